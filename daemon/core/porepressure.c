/* Pore pressure from sonic for the rockwire core: Eaton's 1975 ratio
 * method against a normal compaction trend, and Bowers' 1995
 * velocity-effective-stress relation with its unloading branch. Per
 * sample, pure, allocation-free. Values are reported, never clipped: a
 * pore pressure below hydrostatic or at the overburden is flagged.
 * Contracts are in rockwire/pressure.h. */
#include <math.h>

#include "rockwire/pressure.h"

/* Largest Eaton exponent accepted (the published sonic value is 3 and
 * calibrated values stay well below 10; common practice). */
#define EATON_N_MAX 10.0
/* Largest Bowers exponent B accepted (published values are below 1;
 * from memory). */
#define BOWERS_B_MAX 2.0
/* Pa per MPa: Bowers' curves are written with sigma in MPa here. */
#define MPA 1e6

static void warn_put(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

/* 1 when x is finite and >= 0. */
static int nonneg(double x)
{
	return isfinite(x) && x >= 0.0;
}

/* 1 when x is finite and > 0. */
static int pos(double x)
{
	return isfinite(x) && x > 0.0;
}

int rw_pres_pore_eaton(double sv_pa, double ph_pa, double dt_sm, double dt_n_sm,
                       double exponent, double *pp_pa, double *sigma_pa,
                       unsigned *warn)
{
	double r, sig;
	unsigned w = 0;

	warn_put(warn, 0);
	if (!nonneg(sv_pa) || !nonneg(ph_pa) || sv_pa < ph_pa || !pos(dt_sm) ||
	    !pos(dt_n_sm) || !pos(exponent) || exponent > EATON_N_MAX) {
		*pp_pa = NAN;
		if (sigma_pa)
			*sigma_pa = NAN;
		return RW_EDOM;
	}
	r = dt_n_sm / dt_sm;
	sig = (sv_pa - ph_pa) * pow(r, exponent);
	if (r > 1.0)
		w |= RW_PRES_WARN_PP_BELOW_HYDRO;
	if (!(sig > 0.0))
		w |= RW_PRES_WARN_PP_AT_SV;
	/* on the trend the result is ph exactly, not sv - (sv - ph) */
	*pp_pa = r == 1.0 ? ph_pa : sv_pa - sig;
	if (sigma_pa)
		*sigma_pa = sig;
	warn_put(warn, w);
	return RW_OK;
}

int rw_pres_pore_eaton_sigma(double sv_pa, double ph_pa, double dt_sm,
                             double dt_n_sm, double exponent,
                             double sigma_dt_n_sm, double *sigma_pp_pa)
{
	double r;

	if (!nonneg(sv_pa) || !nonneg(ph_pa) || sv_pa < ph_pa || !pos(dt_sm) ||
	    !pos(dt_n_sm) || !pos(exponent) || exponent > EATON_N_MAX ||
	    !nonneg(sigma_dt_n_sm)) {
		*sigma_pp_pa = NAN;
		return RW_EDOM;
	}
	r = dt_n_sm / dt_sm;
	*sigma_pp_pa = (sv_pa - ph_pa) * exponent * pow(r, exponent - 1.0) *
	               sigma_dt_n_sm / dt_sm;
	return RW_OK;
}

/* 1 when the virgin-curve parameters of *bw are in range. */
static int bowers_ok(const rw_pres_bowers *bw)
{
	return pos(bw->v0_ms) && pos(bw->a_ms) && pos(bw->b) &&
	       bw->b <= BOWERS_B_MAX;
}

/* 1 when the unloading parameters of *bw are in range. */
static int bowers_unl_ok(const rw_pres_bowers *bw)
{
	return isfinite(bw->u) && bw->u >= 1.0 && pos(bw->sigma_max_pa);
}

double rw_pres_bowers_a_from_field(double a_ftps_psib, double b)
{
	if (!isfinite(a_ftps_psib) || !isfinite(b))
		return NAN;
	return RW_PRES_FT_M * a_ftps_psib * pow(MPA / RW_PRES_PSI_PA, b);
}

int rw_pres_bowers_sigma_max(const rw_pres_bowers *bw, double v_max_ms,
                             double *sigma_max_pa)
{
	if (!bowers_ok(bw) || !isfinite(v_max_ms) || v_max_ms <= bw->v0_ms) {
		*sigma_max_pa = NAN;
		return RW_EDOM;
	}
	*sigma_max_pa =
	    MPA * pow((v_max_ms - bw->v0_ms) / bw->a_ms, 1.0 / bw->b);
	return RW_OK;
}

int rw_pres_bowers_velocity(const rw_pres_bowers *bw, int unloading,
                            double sigma_pa, double *v_ms)
{
	double s, smax, se;

	if (!bowers_ok(bw) || !nonneg(sigma_pa) ||
	    (unloading && !bowers_unl_ok(bw))) {
		*v_ms = NAN;
		return RW_EDOM;
	}
	s = sigma_pa / MPA;
	se = s;
	if (unloading) {
		smax = bw->sigma_max_pa / MPA;
		if (s < smax)
			se = smax * pow(s / smax, 1.0 / bw->u);
	}
	*v_ms = bw->v0_ms + bw->a_ms * pow(se, bw->b);
	return RW_OK;
}

int rw_pres_bowers_sigma(const rw_pres_bowers *bw, int unloading, double v_ms,
                         double *sigma_pa, unsigned *warn)
{
	double sv, smax;

	warn_put(warn, 0);
	*sigma_pa = NAN;
	if (!bowers_ok(bw) || !isfinite(v_ms) ||
	    (unloading && !bowers_unl_ok(bw)))
		return RW_EDOM;
	if (v_ms <= bw->v0_ms)
		return RW_ERANGE;
	/* virgin-curve effective stress, MPa */
	sv = pow((v_ms - bw->v0_ms) / bw->a_ms, 1.0 / bw->b);
	if (unloading) {
		smax = bw->sigma_max_pa / MPA;
		if (sv < smax) {
			/* sigma_max^(1-U) ((v - v0)/A)^(U/B), written as
			 * sigma_max (sigma_virgin / sigma_max)^U */
			sv = smax * pow(sv / smax, bw->u);
			warn_put(warn, RW_PRES_WARN_UNLOADING);
		}
	}
	*sigma_pa = sv * MPA;
	return RW_OK;
}

int rw_pres_pore_bowers(const rw_pres_bowers *bw, int unloading, double sv_pa,
                        double ph_pa, double v_ms, double *pp_pa,
                        double *sigma_pa, unsigned *warn)
{
	double sig, pp;
	unsigned w;
	int s;

	warn_put(warn, 0);
	*pp_pa = NAN;
	if (sigma_pa)
		*sigma_pa = NAN;
	if (!nonneg(sv_pa) || (!isnan(ph_pa) && !nonneg(ph_pa)))
		return RW_EDOM;
	s = rw_pres_bowers_sigma(bw, unloading, v_ms, &sig, &w);
	if (s != RW_OK)
		return s;
	pp = sv_pa - sig;
	if (pp < 0.0 || (!isnan(ph_pa) && pp < ph_pa))
		w |= RW_PRES_WARN_PP_BELOW_HYDRO;
	if (!(sig > 0.0))
		w |= RW_PRES_WARN_PP_AT_SV;
	*pp_pa = pp;
	if (sigma_pa)
		*sigma_pa = sig;
	warn_put(warn, w);
	return RW_OK;
}
