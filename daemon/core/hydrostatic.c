/* Hydrostatic pressure of a NaCl brine whose density follows Batzle &
 * Wang 1992 at the local pressure, temperature and salinity, integrated
 * over depth with GSL's ODE driver (gsl_odeiv2). The workspace holds the
 * driver, so a per-sample step allocates nothing; the same step function
 * serves a batch and a live feed, so both agree exactly. Contracts are in
 * rockwire/pressure.h. */
#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>

#include "rockwire/fluid.h"
#include "rockwire/pressure.h"
#include "status_gsl.h"

/* Temperature bounds of the brine integration, degC: liquid water (the
 * lower bound of rockwire/fluid.h) to below the critical point of water
 * (373.946 degC, IAPWS-95). */
#define T_MIN RW_FLUID_WATER_T_LIQUID_MIN
#define T_MAX 350.0
/* ODE tolerances: absolute (Pa) and relative. */
#define ODE_EPSABS 1e-3
#define ODE_EPSREL 1e-10
/* First trial step (m) and the cap on driver steps per sample. */
#define ODE_H0   10.0
#define ODE_NMAX 100000

/* What the right-hand side needs: the step's end points (T and S are
 * linear in depth between them) and the OR of the brine warnings. */
typedef struct hydro_rhs {
	double z0, z1, t0, t1, s0, s1, g;
	unsigned fluid_warn;
} hydro_rhs;

struct rw_pres_hydro_ws {
	gsl_odeiv2_system sys;
	gsl_odeiv2_driver *drv;
	hydro_rhs rhs;
};

/* dp/dz = rho(p + p_atm, T(z), S(z)) g; y[0] is the gauge pressure, Pa. */
static int hydro_f(double z, const double y[], double dydz[], void *params)
{
	hydro_rhs *r = params;
	double f = r->z1 > r->z0 ? (z - r->z0) / (r->z1 - r->z0) : 1.0;
	double t = r->t0 + f * (r->t1 - r->t0);
	double s = r->s0 + f * (r->s1 - r->s0);
	double p_mpa = (y[0] + RW_PRES_P_ATM) * 1e-6;
	rw_fluid_phase ph;
	unsigned w;

	if (!isfinite(p_mpa) || p_mpa <= 0.0 ||
	    rw_fluid_brine_props(p_mpa, t, s, &ph, &w) != RW_OK)
		return GSL_EBADFUNC;
	r->fluid_warn |= w;
	dydz[0] = ph.rho_kgm3 * r->g;
	return GSL_SUCCESS;
}

rw_pres_hydro_ws *rw_pres_hydro_ws_new(void)
{
	rw_pres_hydro_ws *ws = calloc(1, sizeof *ws);

	if (!ws)
		return NULL;
	ws->sys.function = hydro_f;
	ws->sys.jacobian = NULL;
	ws->sys.dimension = 1;
	ws->sys.params = &ws->rhs;
	ws->drv = gsl_odeiv2_driver_alloc_y_new(&ws->sys, gsl_odeiv2_step_rkf45,
	                                        ODE_H0, ODE_EPSABS, ODE_EPSREL);
	if (!ws->drv) {
		free(ws);
		return NULL;
	}
	gsl_odeiv2_driver_set_nmax(ws->drv, ODE_NMAX);
	return ws;
}

void rw_pres_hydro_ws_free(rw_pres_hydro_ws *ws)
{
	if (!ws)
		return;
	gsl_odeiv2_driver_free(ws->drv);
	free(ws);
}

static void hydro_state_nan(rw_pres_hydro_state *st)
{
	st->z_m = NAN;
	st->p_pa = NAN;
	st->t_degc = NAN;
	st->sal_frac = NAN;
	st->resumed = 0;
}

/* 1 when t and s are inside the integration's domain. */
static int ts_ok(double t, double s)
{
	return isfinite(t) && t >= T_MIN && t <= T_MAX && isfinite(s) &&
	       s >= 0.0 && s <= RW_FLUID_BRINE_SAL_LIMIT;
}

int rw_pres_hydro_brine_init(const rw_pres_column *col, double t_ml_degc,
                             double sal_frac, rw_pres_hydro_state *st)
{
	if (rw_pres_column_check(col, NULL) != RW_OK ||
	    !ts_ok(t_ml_degc, sal_frac)) {
		hydro_state_nan(st);
		return RW_EDOM;
	}
	st->z_m = rw_pres_column_mudline(col);
	st->p_pa = col->rho_sea_kgm3 * col->g_ms2 * col->water_depth_m;
	st->t_degc = t_ml_degc;
	st->sal_frac = sal_frac;
	st->resumed = 0;
	return RW_OK;
}

int rw_pres_hydro_brine_resume(const rw_pres_column *col, double z_m,
                               double p_pa, double t_degc, double sal_frac,
                               rw_pres_hydro_state *st)
{
	if (rw_pres_column_check(col, NULL) != RW_OK || !isfinite(z_m) ||
	    z_m < rw_pres_column_mudline(col) || !isfinite(p_pa) ||
	    p_pa < 0.0 || !ts_ok(t_degc, sal_frac)) {
		hydro_state_nan(st);
		return RW_EDOM;
	}
	st->z_m = z_m;
	st->p_pa = p_pa;
	st->t_degc = t_degc;
	st->sal_frac = sal_frac;
	st->resumed = 1;
	return RW_OK;
}

/* Sets the outputs to NaN and returns status. */
static int brine_fail(double *p_pa, double *rho_kgm3, int status)
{
	*p_pa = NAN;
	if (rho_kgm3)
		*rho_kgm3 = NAN;
	return status;
}

int rw_pres_hydro_brine_step(rw_pres_hydro_ws *ws, const rw_pres_column *col,
                             rw_pres_hydro_state *st, double z_m, double t_degc,
                             double sal_frac, double *p_pa, double *rho_kgm3,
                             unsigned *warn)
{
	double ml, z, y[1], h0;
	rw_fluid_phase ph;
	unsigned w, fw;
	int s;

	if (warn)
		*warn = 0;
	if (!isfinite(z_m) || z_m < 0.0 || !ts_ok(t_degc, sal_frac))
		return brine_fail(p_pa, rho_kgm3, RW_EDOM);
	if (!ws || rw_pres_column_check(col, NULL) != RW_OK ||
	    !isfinite(st->z_m))
		return brine_fail(p_pa, rho_kgm3, RW_EINVAL);
	w = st->resumed ? RW_PRES_WARN_RESUMED : 0u;
	ml = rw_pres_column_mudline(col);
	if (z_m < st->z_m || (z_m == st->z_m && !st->resumed && z_m == ml)) {
		double h = z_m - col->air_gap_m;

		if (!st->resumed && st->z_m == ml && z_m <= ml) {
			/* the sea-water (or air) column above the log */
			*p_pa =
			    h > 0.0 ? col->rho_sea_kgm3 * col->g_ms2 * h : 0.0;
			if (rho_kgm3)
				*rho_kgm3 = h > 0.0 ? col->rho_sea_kgm3 : NAN;
			if (warn)
				*warn = w | RW_PRES_WARN_ABOVE_MUDLINE;
			return RW_OK;
		}
		return brine_fail(p_pa, rho_kgm3, RW_EINVAL);
	}
	ws->rhs.z0 = st->z_m;
	ws->rhs.z1 = z_m;
	ws->rhs.t0 = st->t_degc;
	ws->rhs.t1 = t_degc;
	ws->rhs.s0 = st->sal_frac;
	ws->rhs.s1 = sal_frac;
	ws->rhs.g = col->g_ms2;
	ws->rhs.fluid_warn = 0;
	y[0] = st->p_pa;
	if (z_m == st->z_m) {
		w |= RW_PRES_WARN_DEPTH_REPEAT;
	} else {
		z = st->z_m;
		h0 = fmin(ODE_H0, z_m - st->z_m);
		gsl_odeiv2_driver_reset_hstart(ws->drv, h0);
		s = gsl_odeiv2_driver_apply(ws->drv, &z, z_m, y);
		if (s == GSL_EBADFUNC)
			return brine_fail(p_pa, rho_kgm3, RW_EDOM);
		if (s != GSL_SUCCESS || !isfinite(y[0])) {
			s = rw__from_gsl(s);
			return brine_fail(p_pa, rho_kgm3,
			                  s == RW_OK ? RW_EMAXITER : s);
		}
	}
	/* density at the sample itself (also for a repeated depth) */
	if (rw_fluid_brine_props((y[0] + RW_PRES_P_ATM) * 1e-6, t_degc,
	                         sal_frac, &ph, &fw) != RW_OK)
		return brine_fail(p_pa, rho_kgm3, RW_EDOM);
	if ((ws->rhs.fluid_warn | fw) != 0)
		w |= RW_PRES_WARN_FLUID_RANGE;
	if (z_m > st->z_m) {
		st->z_m = z_m;
		st->p_pa = y[0];
		st->t_degc = t_degc;
		st->sal_frac = sal_frac;
	}
	*p_pa = y[0];
	if (rho_kgm3)
		*rho_kgm3 = ph.rho_kgm3;
	if (warn)
		*warn = w;
	return RW_OK;
}
