/* Empirical velocity, density and porosity relations of the compute core
 * (Gardner, mudrock line, Greenberg-Castagna, Han, Wyllie, Raymer-Hunt-
 * Gardner). Pure functions on doubles: SI in and out, km/s only inside
 * where a published fit is written in km/s. Coefficients are written from
 * memory where the comments say so; tests/unit/test_empirical.c checks
 * them against the published values as quoted there. */
#include <math.h>
#include <stddef.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

#include "rockwire/empirical.h"
#include "rockwire/rock.h"

/* Fitted velocity span of Gardner et al. 1974 (m/s), from memory. */
#define GARDNER_VMIN 1500.0
#define GARDNER_VMAX 6100.0
/* Approximate velocity span of Castagna et al. 1985 data (m/s), from
 * memory. */
#define MUDROCK_VMIN 1500.0
#define MUDROCK_VMAX 6000.0
/* Mudrock line constants, km/s (Castagna et al. 1985). */
#define MUDROCK_SLOPE   1.16
#define MUDROCK_ICPT_MS 1360.0
/* Velocity span for Greenberg-Castagna warnings, m/s (common practice). */
#define GC_VMIN 1500.0
#define GC_VMAX 7000.0
/* Fraction sum tolerance of the mixed-lithology rule. */
#define GC_FRAC_TOL 1e-6
/* Porosity above which the time average is flagged (common practice). */
#define WYLLIE_PHI_WARN 0.30
/* Upper porosity of the Raymer et al. 1980 low-porosity form. */
#define RHG_PHI_MAX 0.37
/* Span of the Han et al. 1986 samples, from memory. */
#define HAN_PHI_MIN  0.02
#define HAN_PHI_MAX  0.30
#define HAN_CLAY_MAX 0.50

/* Greenberg & Castagna 1992 regression coefficients {a2, a1, a0} for
 * vs = a2 vp^2 + a1 vp + a0 in km/s, brine-saturated pure lithologies, as
 * quoted in Mavko et al. 2009 sec. 7.9 (from memory). */
static const double gc_coef[RW_EMP_NLITH][3] = {
    [RW_EMP_SANDSTONE] = {0.0, 0.80416, -0.85588},
    [RW_EMP_LIMESTONE] = {-0.05508, 1.01677, -1.03049},
    [RW_EMP_DOLOMITE] = {0.0, 0.58321, -0.07775},
    [RW_EMP_SHALE] = {0.0, 0.76969, -0.86735},
};

/* Han, Nur & Morgan 1986 water-saturated fits, km/s:
 * {A, B, C, D, E, F} for vp = A - B phi - C c, vs = D - E phi - F c, by
 * effective pressure (40 MPa is their headline fit; the others as
 * tabulated in Mavko et al. 2009 sec. 7.9; all from memory). */
static const double han_coef[RW_EMP_HAN_NSETS][6] = {
    [RW_EMP_HAN_40MPA] = {5.59, 6.93, 2.18, 3.52, 4.91, 1.89},
    [RW_EMP_HAN_30MPA] = {5.55, 6.96, 2.18, 3.47, 4.84, 1.87},
    [RW_EMP_HAN_20MPA] = {5.49, 6.94, 2.17, 3.39, 4.73, 1.81},
    [RW_EMP_HAN_10MPA] = {5.39, 7.08, 2.13, 3.29, 4.73, 1.74},
    [RW_EMP_HAN_5MPA] = {5.26, 7.08, 2.02, 3.16, 4.77, 1.64},
};

/* Sets *w to 0 when w is not NULL. */
static void warn_clear(unsigned *w)
{
	if (w)
		*w = 0;
}

/* Sets bit in *w when w is not NULL. */
static void warn_set(unsigned *w, unsigned bit)
{
	if (w)
		*w |= bit;
}

/* 1 when x is finite and > 0. */
static int pos(double x)
{
	return isfinite(x) && x > 0.0;
}

/* 1 when x is finite and in [0, 1]. */
static int unit_frac(double x)
{
	return isfinite(x) && x >= 0.0 && x <= 1.0;
}

/* 1 when 0 < v_fl < v_ma, both finite: a valid matrix/fluid pair. */
static int ma_fl_ok(double v_ma, double v_fl)
{
	return pos(v_ma) && pos(v_fl) && v_fl < v_ma;
}

int rw_emp_gardner_density(double vp_ms, double a, double b, double *rho_kgm3,
                           unsigned *warn)
{
	double rho;

	*rho_kgm3 = NAN;
	warn_clear(warn);
	if (!pos(vp_ms) || !pos(a) || !pos(b))
		return RW_EDOM;
	rho = 1000.0 * a * pow(vp_ms, b);
	if (!isfinite(rho))
		return RW_ERANGE;
	if (vp_ms < GARDNER_VMIN || vp_ms > GARDNER_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*rho_kgm3 = rho;
	return RW_OK;
}

int rw_emp_gardner_vp(double rho_kgm3, double a, double b, double *vp_ms,
                      unsigned *warn)
{
	double vp;

	*vp_ms = NAN;
	warn_clear(warn);
	if (!pos(rho_kgm3) || !pos(a) || !pos(b))
		return RW_EDOM;
	vp = pow(rho_kgm3 / (1000.0 * a), 1.0 / b);
	if (!isfinite(vp) || vp <= 0.0)
		return RW_ERANGE;
	if (vp < GARDNER_VMIN || vp > GARDNER_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*vp_ms = vp;
	return RW_OK;
}

int rw_emp_mudrock_vp(double vs_ms, double *vp_ms, unsigned *warn)
{
	double vp;

	*vp_ms = NAN;
	warn_clear(warn);
	if (!pos(vs_ms))
		return RW_EDOM;
	vp = MUDROCK_SLOPE * vs_ms + MUDROCK_ICPT_MS;
	if (!isfinite(vp))
		return RW_ERANGE;
	if (vp < MUDROCK_VMIN || vp > MUDROCK_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*vp_ms = vp;
	return RW_OK;
}

int rw_emp_mudrock_vs(double vp_ms, double *vs_ms, unsigned *warn)
{
	*vs_ms = NAN;
	warn_clear(warn);
	if (!isfinite(vp_ms) || vp_ms <= MUDROCK_ICPT_MS)
		return RW_EDOM;
	if (vp_ms < MUDROCK_VMIN || vp_ms > MUDROCK_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*vs_ms = (vp_ms - MUDROCK_ICPT_MS) / MUDROCK_SLOPE;
	return RW_OK;
}

/* Greenberg & Castagna 1992 pure-lithology vs in m/s from vp in m/s, with
 * lith already checked. May be <= 0 at low vp. */
static double gc_pure(double vp_ms, int lith)
{
	const double *c = gc_coef[lith];
	double v = vp_ms / 1000.0;

	return 1000.0 * ((c[0] * v + c[1]) * v + c[2]);
}

int rw_emp_gc_vs(double vp_ms, int lith, double *vs_ms, unsigned *warn)
{
	double vs;

	*vs_ms = NAN;
	warn_clear(warn);
	if (lith < 0 || lith >= RW_EMP_NLITH)
		return RW_EINVAL;
	if (!pos(vp_ms))
		return RW_EDOM;
	vs = gc_pure(vp_ms, lith);
	if (!isfinite(vs) || vs <= 0.0)
		return RW_ERANGE;
	if (vp_ms < GC_VMIN || vp_ms > GC_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*vs_ms = vs;
	return RW_OK;
}

int rw_emp_gc_vs_mixed(double vp_ms, const double frac[RW_EMP_NLITH],
                       double *vs_ms, unsigned *warn)
{
	double sum = 0.0, arith = 0.0, inv = 0.0, vs;
	int i;

	*vs_ms = NAN;
	warn_clear(warn);
	if (!pos(vp_ms))
		return RW_EDOM;
	for (i = 0; i < RW_EMP_NLITH; i++) {
		if (!unit_frac(frac[i]))
			return RW_EDOM;
		sum += frac[i];
	}
	if (fabs(sum - 1.0) > GC_FRAC_TOL)
		return RW_EINVAL;
	for (i = 0; i < RW_EMP_NLITH; i++) {
		if (frac[i] == 0.0)
			continue;
		vs = gc_pure(vp_ms, i);
		if (!isfinite(vs) || vs <= 0.0)
			return RW_ERANGE;
		arith += frac[i] * vs;
		inv += frac[i] / vs;
	}
	vs = 0.5 * (arith + 1.0 / inv);
	if (!isfinite(vs) || vs <= 0.0)
		return RW_ERANGE;
	if (vp_ms < GC_VMIN || vp_ms > GC_VMAX)
		warn_set(warn, RW_EMP_WARN_VELOCITY);
	*vs_ms = vs;
	return RW_OK;
}

int rw_emp_han_velocities(double phi, double clay, int pset, double *vp_ms,
                          double *vs_ms, unsigned *warn)
{
	const double *c;
	double vp, vs;

	*vp_ms = NAN;
	*vs_ms = NAN;
	warn_clear(warn);
	if (pset < 0 || pset >= RW_EMP_HAN_NSETS)
		return RW_EINVAL;
	if (!unit_frac(phi) || !unit_frac(clay) || phi + clay > 1.0)
		return RW_EDOM;
	c = han_coef[pset];
	vp = 1000.0 * (c[0] - c[1] * phi - c[2] * clay);
	vs = 1000.0 * (c[3] - c[4] * phi - c[5] * clay);
	if (vp <= 0.0 || vs <= 0.0)
		return RW_ERANGE;
	if (phi < HAN_PHI_MIN || phi > HAN_PHI_MAX)
		warn_set(warn, RW_EMP_WARN_POROSITY);
	if (clay > HAN_CLAY_MAX)
		warn_set(warn, RW_EMP_WARN_CLAY);
	*vp_ms = vp;
	*vs_ms = vs;
	return RW_OK;
}

int rw_emp_wyllie_velocity(double phi, double v_ma_ms, double v_fl_ms,
                           double *v_ms, unsigned *warn)
{
	*v_ms = NAN;
	warn_clear(warn);
	if (!unit_frac(phi) || !ma_fl_ok(v_ma_ms, v_fl_ms))
		return RW_EDOM;
	if (phi > WYLLIE_PHI_WARN)
		warn_set(warn, RW_EMP_WARN_POROSITY);
	*v_ms = 1.0 / (phi / v_fl_ms + (1.0 - phi) / v_ma_ms);
	return RW_OK;
}

int rw_emp_wyllie_porosity_dt(double dt_sm, double dt_ma_sm, double dt_fl_sm,
                              double *phi, unsigned *warn)
{
	double p;

	*phi = NAN;
	warn_clear(warn);
	if (!pos(dt_ma_sm) || !pos(dt_fl_sm) || !(dt_ma_sm < dt_fl_sm))
		return RW_EDOM;
	if (!isfinite(dt_sm) || dt_sm < dt_ma_sm || dt_sm > dt_fl_sm)
		return RW_EDOM;
	p = (dt_sm - dt_ma_sm) / (dt_fl_sm - dt_ma_sm);
	if (p > WYLLIE_PHI_WARN)
		warn_set(warn, RW_EMP_WARN_POROSITY);
	*phi = p;
	return RW_OK;
}

int rw_emp_wyllie_porosity(double v_ms, double v_ma_ms, double v_fl_ms,
                           double *phi, unsigned *warn)
{
	*phi = NAN;
	warn_clear(warn);
	if (!ma_fl_ok(v_ma_ms, v_fl_ms))
		return RW_EDOM;
	if (!isfinite(v_ms) || v_ms < v_fl_ms || v_ms > v_ma_ms)
		return RW_EDOM;
	return rw_emp_wyllie_porosity_dt(1.0 / v_ms, 1.0 / v_ma_ms,
	                                 1.0 / v_fl_ms, phi, warn);
}

int rw_emp_rhg_velocity(double phi, double v_ma_ms, double v_fl_ms,
                        double *v_ms, unsigned *warn)
{
	double x = 1.0 - phi;

	*v_ms = NAN;
	warn_clear(warn);
	if (!unit_frac(phi) || !ma_fl_ok(v_ma_ms, v_fl_ms))
		return RW_EDOM;
	if (phi >= RHG_PHI_MAX)
		warn_set(warn, RW_EMP_WARN_POROSITY);
	*v_ms = x * x * v_ma_ms + phi * v_fl_ms;
	return RW_OK;
}

int rw_emp_rhg_porosity(double v_ms, double v_ma_ms, double v_fl_ms,
                        double *phi, unsigned *warn)
{
	double disc, x, p;

	*phi = NAN;
	warn_clear(warn);
	if (!ma_fl_ok(v_ma_ms, v_fl_ms) || !pos(v_ms) || v_ms > v_ma_ms)
		return RW_EDOM;
	disc = v_fl_ms * v_fl_ms + 4.0 * v_ma_ms * (v_ms - v_fl_ms);
	if (!(disc >= 0.0))
		return RW_EDOM;
	x = (v_fl_ms + sqrt(disc)) / (2.0 * v_ma_ms);
	p = 1.0 - x;
	/* v <= v_ma gives x <= 1; rounding may leave -0 or a tiny negative */
	if (p < 0.0)
		p = 0.0;
	if (p >= RHG_PHI_MAX)
		warn_set(warn, RW_EMP_WARN_POROSITY);
	*phi = p;
	return RW_OK;
}

/* ---- Greenberg & Castagna in situ --------------------------------------- */

typedef struct gc_insitu {
	double vp, rho, phi, k_min, k_fl, rho_fl, k_b, rho_b;
	const double *frac;
	unsigned warn;
	int bad; /* Gassmann or the regression failed at the trial vs */
} gc_insitu;

/* The in-situ vs the procedure returns for a trial vs, minus the trial:
 * zero at the consistent shear velocity. */
static double gc_residual(double vs, void *arg)
{
	gc_insitu *g = arg;
	rw_rock_subst b;
	double vs_b;
	unsigned w = 0;

	if (rw_rock_fluid_subst(g->vp, vs, g->rho, g->phi, g->k_min, g->k_fl,
	                        g->rho_fl, g->k_b, g->rho_b, &b,
	                        NULL) != RW_OK ||
	    rw_emp_gc_vs_mixed(b.vp_ms, g->frac, &vs_b, &w) != RW_OK) {
		g->bad = 1;
		return NAN;
	}
	g->warn = w;
	/* mu is the same in both fluids: rho_b vs_b^2 = rho vs^2 */
	return vs_b * sqrt(b.rho_kgm3 / g->rho) - vs;
}

int rw_emp_gc_vs_insitu(double vp_ms, double rho_kgm3, double phi,
                        double k_min_pa, double k_fl_pa, double rho_fl_kgm3,
                        double k_brine_pa, double rho_brine_kgm3,
                        const double frac[RW_EMP_NLITH], double *vs_ms,
                        double *vs_brine_ms, unsigned *warn)
{
	gc_insitu g = {vp_ms,   rho_kgm3,    phi,        k_min_pa,
	               k_fl_pa, rho_fl_kgm3, k_brine_pa, rho_brine_kgm3,
	               frac,    0,           0};
	gsl_root_fsolver *s = NULL;
	gsl_function fn = {gc_residual, &g};
	double lo, hi, flo = NAN, fhi = NAN, root = NAN, vs_b = NAN;
	int st = RW_ERANGE, iter;

	*vs_ms = NAN;
	if (vs_brine_ms)
		*vs_brine_ms = NAN;
	if (warn)
		*warn = 0;
	if (!isfinite(vp_ms) || !isfinite(rho_kgm3) || !isfinite(phi) ||
	    !isfinite(k_min_pa) || !isfinite(k_fl_pa) ||
	    !isfinite(rho_fl_kgm3) || !isfinite(k_brine_pa) ||
	    !isfinite(rho_brine_kgm3) || !frac || vp_ms <= 0 || rho_kgm3 <= 0 ||
	    !(phi > 0 && phi < 1) || k_min_pa <= 0 || k_fl_pa <= 0 ||
	    rho_fl_kgm3 <= 0 || k_brine_pa <= 0 || rho_brine_kgm3 <= 0)
		return RW_EDOM;
	/* vs from nearly 0 to just below vp sqrt(3/4) (K > 0): find the
	 * first sign change on a coarse scan, where both ends are valid. */
	for (int k = 1; k <= 64; k++) {
		double v = vp_ms * sqrt(0.75) * k / 65.0;
		double f;
		g.bad = 0;
		f = gc_residual(v, &g);
		if (g.bad || isnan(f)) {
			flo = NAN;
			continue;
		}
		if (!isnan(flo) && (f == 0 || (f < 0) != (flo < 0))) {
			hi = v;
			fhi = f;
			lo = v - vp_ms * sqrt(0.75) / 65.0;
			break;
		}
		flo = f;
	}
	if (isnan(fhi))
		return RW_ERANGE;
	if (fhi == 0) {
		root = hi;
		st = RW_OK;
	} else {
		s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
		if (!s)
			return RW_ERANGE;
		if (gsl_root_fsolver_set(s, &fn, lo, hi) != GSL_SUCCESS) {
			gsl_root_fsolver_free(s);
			return RW_ERANGE;
		}
		st = RW_EMAXITER;
		for (iter = 0; iter < 200; iter++) {
			if (gsl_root_fsolver_iterate(s) != GSL_SUCCESS) {
				st = RW_ERANGE;
				break;
			}
			lo = gsl_root_fsolver_x_lower(s);
			hi = gsl_root_fsolver_x_upper(s);
			if (gsl_root_test_interval(lo, hi, 0, 1e-10) ==
			    GSL_SUCCESS) {
				root = gsl_root_fsolver_root(s);
				st = RW_OK;
				break;
			}
		}
		gsl_root_fsolver_free(s);
	}
	if (st != RW_OK)
		return st;
	g.bad = 0;
	if (isnan(gc_residual(root, &g)) || g.bad)
		return RW_ERANGE;
	{
		rw_rock_subst b;
		if (rw_rock_fluid_subst(vp_ms, root, rho_kgm3, phi, k_min_pa,
		                        k_fl_pa, rho_fl_kgm3, k_brine_pa,
		                        rho_brine_kgm3, &b, NULL) == RW_OK)
			vs_b = b.vs_ms;
	}
	*vs_ms = root;
	if (vs_brine_ms)
		*vs_brine_ms = vs_b;
	if (warn)
		*warn = g.warn;
	return RW_OK;
}
