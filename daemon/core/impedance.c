/* Elastic impedance of one medium at an angle: Connolly's EI, its
 * normalised form (Whitcombe 2002) and the extended elastic impedance of
 * Whitcombe et al. 2002. All are products of powers of vp, vs and rho,
 * computed through logarithms so that the exponents can be large. */
#include <math.h>
#include <stddef.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

/* Resolves K: RW_REFLECT_K_SAMPLE -> (vs/vp)^2 of m, else k in [0, 0.75)
 * (K = 3/4 is the bound vs^2 < 3/4 vp^2 of a positive bulk modulus).
 * Returns RW_EDOM for a bad k. */
static int k_get(const rw_reflect_medium *m, double k, double *out)
{
	if (k == RW_REFLECT_K_SAMPLE) {
		*out = (m->vs_ms / m->vp_ms) * (m->vs_ms / m->vp_ms);
		return RW_OK;
	}
	if (!isfinite(k) || k < 0.0 || k >= 0.75)
		return RW_EDOM;
	*out = k;
	return RW_OK;
}

static int ref_ok(const rw_reflect_medium *r)
{
	return r != NULL && isfinite(r->vp_ms) && isfinite(r->vs_ms) &&
	       isfinite(r->rho_kgm3) && r->vp_ms > 0.0 && r->vs_ms > 0.0 &&
	       r->rho_kgm3 > 0.0;
}

/* exp(ea ln(vp/vp0) + eb ln(vs/vs0) + ec ln(rho/rho0)) * scale, with the
 * vs factor left out when eb = 0 (so a fluid works at eb = 0) and
 * RW_EDOM for a fluid at eb != 0 (vs^eb with eb < 0 is infinite). */
static int powprod(const rw_reflect_medium *m, double vp0, double vs0,
                   double rho0, double ea, double eb, double ec, double scale,
                   double *out)
{
	double l = ea * log(m->vp_ms / vp0) + ec * log(m->rho_kgm3 / rho0);
	double v;

	if (eb != 0.0) {
		if (m->vs_ms == 0.0)
			return RW_EDOM;
		l += eb * log(m->vs_ms / vs0);
	}
	v = scale * exp(l);
	if (!isfinite(v) || v == 0.0)
		return RW_ERANGE;
	*out = v;
	return RW_OK;
}

/* Exponents of Connolly 1999 at incidence angle theta and constant K. */
static void ei_exps(double theta, double k, double *ea, double *eb, double *ec)
{
	double s2 = sin(theta) * sin(theta), t = tan(theta);

	*ea = 1.0 + t * t;
	*eb = -8.0 * k * s2;
	*ec = 1.0 - 4.0 * k * s2;
}

int rw_reflect_ei(const rw_reflect_medium *m, double theta_rad, double k,
                  double *ei)
{
	double kk, ea, eb, ec;

	if (ei == NULL)
		return RW_EDOM;
	*ei = NAN;
	if (rw_reflect_medium_check(m) != RW_OK || !isfinite(theta_rad) ||
	    theta_rad < 0.0 || theta_rad >= M_PI_2)
		return RW_EDOM;
	if (k_get(m, k, &kk) != RW_OK)
		return RW_EDOM;
	ei_exps(theta_rad, kk, &ea, &eb, &ec);
	return powprod(m, 1.0, 1.0, 1.0, ea, eb, ec, 1.0, ei);
}

int rw_reflect_ei_norm(const rw_reflect_medium *m, double theta_rad, double k,
                       const rw_reflect_medium *ref, double *ei)
{
	double kk, ea, eb, ec;

	if (ei == NULL)
		return RW_EDOM;
	*ei = NAN;
	if (rw_reflect_medium_check(m) != RW_OK || !ref_ok(ref) ||
	    !isfinite(theta_rad) || theta_rad < 0.0 || theta_rad >= M_PI_2)
		return RW_EDOM;
	if (k_get(m, k, &kk) != RW_OK)
		return RW_EDOM;
	ei_exps(theta_rad, kk, &ea, &eb, &ec);
	return powprod(m, ref->vp_ms, ref->vs_ms, ref->rho_kgm3, ea, eb, ec,
	               ref->vp_ms * ref->rho_kgm3, ei);
}

int rw_reflect_eei(const rw_reflect_medium *m, double chi_rad, double k,
                   const rw_reflect_medium *ref, double *eei)
{
	double kk, c, s;

	if (eei == NULL)
		return RW_EDOM;
	*eei = NAN;
	if (rw_reflect_medium_check(m) != RW_OK || !ref_ok(ref) ||
	    !isfinite(chi_rad) || chi_rad < -M_PI_2 || chi_rad > M_PI_2)
		return RW_EDOM;
	if (k_get(m, k, &kk) != RW_OK)
		return RW_EDOM;
	c = cos(chi_rad);
	s = sin(chi_rad);
	return powprod(m, ref->vp_ms, ref->vs_ms, ref->rho_kgm3, c + s,
	               -8.0 * kk * s, c - 4.0 * kk * s,
	               ref->vp_ms * ref->rho_kgm3, eei);
}
