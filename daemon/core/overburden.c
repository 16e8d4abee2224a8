/* Overburden (vertical stress) from bulk density for the rockwire core:
 * the column above the log (air gap, sea water, a shallow-density power
 * law below the mudline), the running integral over the log's own samples
 * shared by batch and live-feed use, its resume, the constant-density
 * hydrostatic pressure and equivalent-mud-weight conversions. Contracts
 * are in rockwire/pressure.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/pressure.h"

/* Surface gravity bounds, m/s^2 (common practice; see pressure.h). */
#define G_MIN 9.7
#define G_MAX 9.9
/* Upper bounds of densities accepted as inputs, kg/m^3. */
#define RHO_WATER_MAX 2000.0
#define RHO_ML_MAX    3500.0
/* Upper bound of the shallow-trend exponent. */
#define TREND_P_MAX 3.0

static void warn_put(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

static void obg_out_nan(rw_pres_obg_out *out)
{
	out->sv_pa = NAN;
	out->grad_pam = NAN;
	out->sv_assumed_pa = NAN;
}

static void obg_state_nan(rw_pres_obg_state *st)
{
	st->z_m = NAN;
	st->sv_pa = NAN;
	st->rho_kgm3 = NAN;
	st->sv_assumed_pa = NAN;
	st->resumed = 0;
}

void rw_pres_column_init(rw_pres_column *col)
{
	col->air_gap_m = 0.0;
	col->water_depth_m = 0.0;
	col->rho_sea_kgm3 = RW_PRES_RHO_SEA;
	col->g_ms2 = RW_PRES_G0;
	col->rho_ml_kgm3 = RW_PRES_SHALLOW_RHO_ML;
	col->rho_a_kgm3 = RW_PRES_SHALLOW_A;
	col->trend_s0_m = RW_PRES_SHALLOW_S0;
	col->trend_p = RW_PRES_SHALLOW_P;
	col->rho_cap_kgm3 = INFINITY;
}

int rw_pres_column_check(const rw_pres_column *col, const char **field)
{
	const char *bad = NULL;

	if (!isfinite(col->air_gap_m) || col->air_gap_m < 0.0)
		bad = "air_gap";
	else if (!isfinite(col->water_depth_m) || col->water_depth_m < 0.0)
		bad = "water_depth";
	else if (!isfinite(col->rho_sea_kgm3) || !(col->rho_sea_kgm3 > 0.0) ||
	         col->rho_sea_kgm3 > RHO_WATER_MAX)
		bad = "rho_sea";
	else if (!isfinite(col->g_ms2) || col->g_ms2 < G_MIN ||
	         col->g_ms2 > G_MAX)
		bad = "g";
	else if (!isfinite(col->rho_ml_kgm3) || !(col->rho_ml_kgm3 > 0.0) ||
	         col->rho_ml_kgm3 > RHO_ML_MAX)
		bad = "rho_ml";
	else if (!isfinite(col->rho_a_kgm3) || col->rho_a_kgm3 < 0.0)
		bad = "rho_a";
	else if (!isfinite(col->trend_s0_m) || !(col->trend_s0_m > 0.0))
		bad = "trend_s0";
	else if (!isfinite(col->trend_p) || !(col->trend_p > 0.0) ||
	         col->trend_p > TREND_P_MAX)
		bad = "trend_p";
	else if (!(col->rho_cap_kgm3 >= col->rho_ml_kgm3)) /* NaN too */
		bad = "rho_cap";
	if (field)
		*field = bad;
	return bad ? RW_EDOM : RW_OK;
}

double rw_pres_column_mudline(const rw_pres_column *col)
{
	return col->air_gap_m + col->water_depth_m;
}

/* Water-column pressure (gauge) at the mudline, Pa. */
static double mudline_pressure(const rw_pres_column *col)
{
	return col->rho_sea_kgm3 * col->g_ms2 * col->water_depth_m;
}

/* Air or sea-water column at 0 <= z <= mudline, Pa. */
static double column_above_mudline(const rw_pres_column *col, double z)
{
	double h = z - col->air_gap_m;

	return h > 0.0 ? col->rho_sea_kgm3 * col->g_ms2 * h : 0.0;
}

int rw_pres_shallow_density(const rw_pres_column *col, double s_bml_m,
                            double *rho_kgm3, double *int_kgm2)
{
	double r0 = col->rho_ml_kgm3, a = col->rho_a_kgm3;
	double s0 = col->trend_s0_m, p = col->trend_p, cap = col->rho_cap_kgm3;
	double s = s_bml_m, sc = INFINITY, rho, in;

	if (!isfinite(s) || s < 0.0) {
		if (rho_kgm3)
			*rho_kgm3 = NAN;
		if (int_kgm2)
			*int_kgm2 = NAN;
		return RW_EDOM;
	}
	/* depth at which the power law reaches the cap */
	if (isfinite(cap) && a > 0.0)
		sc = s0 * pow((cap - r0) / a, 1.0 / p);
	if (s <= sc) {
		rho = r0 + a * pow(s / s0, p);
		in = r0 * s + a * s0 * pow(s / s0, p + 1.0) / (p + 1.0);
	} else {
		rho = cap;
		in = r0 * sc + a * s0 * pow(sc / s0, p + 1.0) / (p + 1.0) +
		     cap * (s - sc);
	}
	if (rho_kgm3)
		*rho_kgm3 = rho;
	if (int_kgm2)
		*int_kgm2 = in;
	return RW_OK;
}

/* Overburden over [z0, z1] (both at or below the mudline) from the
 * shallow trend, Pa. */
static double trend_step(const rw_pres_column *col, double z0, double z1)
{
	double ml = rw_pres_column_mudline(col), i0, i1;

	rw_pres_shallow_density(col, z0 - ml, NULL, &i0);
	rw_pres_shallow_density(col, z1 - ml, NULL, &i1);
	return col->g_ms2 * (i1 - i0);
}

int rw_pres_obg_init(const rw_pres_column *col, rw_pres_obg_state *st)
{
	if (rw_pres_column_check(col, NULL) != RW_OK) {
		obg_state_nan(st);
		return RW_EDOM;
	}
	st->z_m = rw_pres_column_mudline(col);
	st->sv_pa = mudline_pressure(col);
	st->rho_kgm3 = NAN;
	st->sv_assumed_pa = 0.0;
	st->resumed = 0;
	return RW_OK;
}

int rw_pres_obg_resume(const rw_pres_column *col, double z_m, double sv_pa,
                       double rho_kgm3, rw_pres_obg_state *st)
{
	if (rw_pres_column_check(col, NULL) != RW_OK || !isfinite(z_m) ||
	    z_m < rw_pres_column_mudline(col) || !isfinite(sv_pa) ||
	    sv_pa < mudline_pressure(col) ||
	    (!isnan(rho_kgm3) && !(isfinite(rho_kgm3) && rho_kgm3 > 0.0))) {
		obg_state_nan(st);
		return RW_EDOM;
	}
	st->z_m = z_m;
	st->sv_pa = sv_pa;
	st->rho_kgm3 = rho_kgm3;
	st->sv_assumed_pa = 0.0;
	st->resumed = 1;
	return RW_OK;
}

/* Fills out from a stress at depth z. */
static void obg_answer(rw_pres_obg_out *out, double sv, double z,
                       double assumed)
{
	out->sv_pa = sv;
	out->grad_pam = z > 0.0 ? sv / z : NAN;
	out->sv_assumed_pa = assumed;
}

int rw_pres_obg_step(const rw_pres_column *col, rw_pres_obg_state *st,
                     double z_m, double rho_kgm3, rw_pres_obg_out *out,
                     unsigned *warn)
{
	double ml, dz, d, g;
	unsigned w;

	warn_put(warn, 0);
	if (!isfinite(z_m) || z_m < 0.0) {
		obg_out_nan(out);
		return RW_EDOM;
	}
	if (rw_pres_column_check(col, NULL) != RW_OK || !isfinite(st->z_m)) {
		obg_out_nan(out);
		return RW_EINVAL;
	}
	w = st->resumed ? RW_PRES_WARN_RESUMED : 0u;
	ml = rw_pres_column_mudline(col);
	if (!st->resumed && st->z_m == ml && z_m <= ml) {
		/* at or above the mudline, before the log starts: the column */
		obg_answer(out, column_above_mudline(col, z_m), z_m, 0.0);
		warn_put(warn, w | RW_PRES_WARN_ABOVE_MUDLINE);
		return RW_OK;
	}
	if (z_m < st->z_m) {
		obg_out_nan(out);
		return RW_EINVAL;
	}
	if (z_m == st->z_m) {
		obg_answer(out, st->sv_pa, z_m, st->sv_assumed_pa);
		warn_put(warn, w | RW_PRES_WARN_DEPTH_REPEAT);
		return RW_OK;
	}
	g = col->g_ms2;
	dz = z_m - st->z_m;
	if (isnan(st->rho_kgm3)) {
		/* no log density yet: the shallow trend, in closed form */
		d = trend_step(col, st->z_m, z_m);
		st->sv_assumed_pa += d;
		w |= RW_PRES_WARN_OBG_TREND;
		if (isfinite(rho_kgm3) && rho_kgm3 > 0.0)
			st->rho_kgm3 = rho_kgm3;
	} else if (isfinite(rho_kgm3) && rho_kgm3 > 0.0) {
		/* trapezoidal rule on the log's own samples */
		d = g * dz * 0.5 * (st->rho_kgm3 + rho_kgm3);
		st->rho_kgm3 = rho_kgm3;
	} else {
		/* missing density: hold the last valid one (causal) */
		d = g * dz * st->rho_kgm3;
		st->sv_assumed_pa += d;
		w |= RW_PRES_WARN_RHO_HELD;
	}
	st->sv_pa += d;
	st->z_m = z_m;
	obg_answer(out, st->sv_pa, z_m, st->sv_assumed_pa);
	warn_put(warn, w);
	return RW_OK;
}

int rw_pres_obg_batch(const rw_pres_column *col, size_t n, const double *z_m,
                      const double *rho_kgm3, rw_pres_obg_out *out,
                      unsigned *warn, int *status)
{
	rw_pres_obg_state st;
	size_t i;
	int s;

	if (n > 0 && (!z_m || !rho_kgm3 || !out))
		return RW_EINVAL;
	s = rw_pres_obg_init(col, &st);
	for (i = 0; i < n; i++) {
		if (s != RW_OK) {
			obg_out_nan(&out[i]);
			if (warn)
				warn[i] = 0;
			if (status)
				status[i] = s;
			continue;
		}
		if (status)
			status[i] =
			    rw_pres_obg_step(col, &st, z_m[i], rho_kgm3[i],
			                     &out[i], warn ? &warn[i] : NULL);
		else
			rw_pres_obg_step(col, &st, z_m[i], rho_kgm3[i], &out[i],
			                 warn ? &warn[i] : NULL);
	}
	return s;
}

int rw_pres_hydro_const(const rw_pres_column *col, double z_m,
                        double rho_w_kgm3, double *p_pa, unsigned *warn)
{
	double ml;

	warn_put(warn, 0);
	if (rw_pres_column_check(col, NULL) != RW_OK || !isfinite(z_m) ||
	    z_m < 0.0 || !isfinite(rho_w_kgm3) || !(rho_w_kgm3 > 0.0) ||
	    rho_w_kgm3 > RHO_WATER_MAX) {
		*p_pa = NAN;
		return RW_EDOM;
	}
	ml = rw_pres_column_mudline(col);
	if (z_m <= ml) {
		*p_pa = column_above_mudline(col, z_m);
		warn_put(warn, RW_PRES_WARN_ABOVE_MUDLINE);
		return RW_OK;
	}
	*p_pa = mudline_pressure(col) + rho_w_kgm3 * col->g_ms2 * (z_m - ml);
	return RW_OK;
}

int rw_pres_emw(double p_pa, double z_m, double g_ms2, double *rho_kgm3,
                double *grad_pam)
{
	if (!isfinite(p_pa) || !isfinite(z_m) || !(z_m > 0.0) ||
	    !isfinite(g_ms2) || g_ms2 < G_MIN || g_ms2 > G_MAX) {
		if (rho_kgm3)
			*rho_kgm3 = NAN;
		if (grad_pam)
			*grad_pam = NAN;
		return RW_EDOM;
	}
	if (rho_kgm3)
		*rho_kgm3 = p_pa / (g_ms2 * z_m);
	if (grad_pam)
		*grad_pam = p_pa / z_m;
	return RW_OK;
}

int rw_pres_from_emw(double rho_kgm3, double z_m, double g_ms2, double *p_pa)
{
	if (!isfinite(rho_kgm3) || !(rho_kgm3 > 0.0) || !isfinite(z_m) ||
	    z_m < 0.0 || !isfinite(g_ms2) || g_ms2 < G_MIN || g_ms2 > G_MAX) {
		*p_pa = NAN;
		return RW_EDOM;
	}
	*p_pa = rho_kgm3 * g_ms2 * z_m;
	return RW_OK;
}
