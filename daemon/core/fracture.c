/* Minimum horizontal stress (the fracture-gradient estimate) for the
 * rockwire core: Eaton 1969 from Poisson's ratio, Matthews & Kelly 1967
 * with a matrix-stress coefficient, and the poroelastic uniaxial-strain
 * model with Biot's coefficient and tectonic strains. These estimate the
 * stress a fracture must overcome to stay open (closure / propagation),
 * not the breakdown pressure of an intact borehole wall. Per sample, pure,
 * allocation-free. Contracts are in rockwire/pressure.h. */
#include <math.h>

#include "rockwire/pressure.h"

/* Largest tectonic strain magnitude accepted (1 %: far beyond what
 * sedimentary basins store elastically; common practice). */
#define EPS_MAX 0.01

static void warn_put(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

/* Shared checks: sv >= pp >= 0, all finite. */
static int svpp_ok(double sv, double pp)
{
	return isfinite(sv) && isfinite(pp) && pp >= 0.0 && sv >= pp;
}

/* 1 when nu is a possible Poisson's ratio for these formulas. */
static int nu_ok(double nu)
{
	return isfinite(nu) && nu > -1.0 && nu < 0.5;
}

int rw_pres_frac_eaton(double sv_pa, double pp_pa, double nu, double *shmin_pa,
                       unsigned *warn)
{
	double sh;
	unsigned w = 0;

	warn_put(warn, 0);
	if (!svpp_ok(sv_pa, pp_pa) || !nu_ok(nu)) {
		*shmin_pa = NAN;
		return RW_EDOM;
	}
	sh = nu / (1.0 - nu) * (sv_pa - pp_pa) + pp_pa;
	if (nu <= 0.0)
		w |= RW_PRES_WARN_NU_NONPOSITIVE;
	if (sh < pp_pa)
		w |= RW_PRES_WARN_FG_BELOW_PP;
	*shmin_pa = sh;
	warn_put(warn, w);
	return RW_OK;
}

int rw_pres_frac_mk(double sv_pa, double pp_pa, double ki, double *shmin_pa)
{
	if (!svpp_ok(sv_pa, pp_pa) || !isfinite(ki) || ki < 0.0 || ki > 1.0) {
		*shmin_pa = NAN;
		return RW_EDOM;
	}
	*shmin_pa = pp_pa + ki * (sv_pa - pp_pa);
	return RW_OK;
}

int rw_pres_frac_poroelastic(double sv_pa, double pp_pa, double nu,
                             double alpha, double e_static_pa, double eps_h,
                             double eps_hmax, double *shmin_pa,
                             double *shmax_pa, unsigned *warn)
{
	double k, base, ef, lo, hi;
	int strained;
	unsigned w = 0;

	warn_put(warn, 0);
	*shmin_pa = NAN;
	if (shmax_pa)
		*shmax_pa = NAN;
	if (!svpp_ok(sv_pa, pp_pa) || !nu_ok(nu) || !isfinite(alpha) ||
	    alpha < 0.0 || alpha > 1.0 || !isfinite(eps_h) ||
	    !isfinite(eps_hmax) || fabs(eps_h) > EPS_MAX ||
	    fabs(eps_hmax) > EPS_MAX)
		return RW_EDOM;
	strained = eps_h != 0.0 || eps_hmax != 0.0;
	if (strained && !(isfinite(e_static_pa) && e_static_pa > 0.0))
		return RW_EDOM;
	k = nu / (1.0 - nu);
	base = k * (sv_pa - alpha * pp_pa) + alpha * pp_pa;
	ef = strained ? e_static_pa / (1.0 - nu * nu) : 0.0;
	lo = base + ef * (eps_h + nu * eps_hmax);
	hi = base + ef * (eps_hmax + nu * eps_h);
	if (nu <= 0.0)
		w |= RW_PRES_WARN_NU_NONPOSITIVE;
	if (lo < pp_pa)
		w |= RW_PRES_WARN_FG_BELOW_PP;
	if (lo > sv_pa)
		w |= RW_PRES_WARN_FG_ABOVE_SV;
	if (hi < lo)
		w |= RW_PRES_WARN_HORIZ_SWAPPED;
	*shmin_pa = lo;
	if (shmax_pa)
		*shmax_pa = hi;
	warn_put(warn, w);
	return RW_OK;
}
