/* Isotropic elastic conversions. Every accepted input pair is reduced to
 * the P-wave modulus M and the shear modulus mu at the given density, and
 * the full set is derived from (rho, M, mu). The relations between the
 * isotropic constants are the standard ones tabulated in Mavko, Mukerji &
 * Dvorkin 2009 (section 2.2, "Relationships among elastic constants");
 * Vp^2 = (K + 4/3 mu)/rho and Vs^2 = mu/rho; Young's modulus and Poisson's
 * ratio from velocities as in ASTM D2845. */
#include <math.h>
#include <stddef.h>

#include "rockwire/elastic.h"

enum grp { G_P, G_S, G_OTHER };

static enum grp group_of(rw_elastic_qty q)
{
	switch (q) {
	case RW_Q_VP:
	case RW_Q_AI:
	case RW_Q_DTP:
	case RW_Q_M: return G_P;
	case RW_Q_VS:
	case RW_Q_SI:
	case RW_Q_DTS:
	case RW_Q_MU: return G_S;
	default: return G_OTHER;
	}
}

static const char *const qty_names[RW_Q_COUNT] = {
    "vp", "vs", "k",  "mu",   "lambda", "e",   "nu",
    "m",  "ai", "si", "vpvs", "dtp",    "dts",
};

const char *rw_elastic_qty_name(rw_elastic_qty q)
{
	if ((int)q < 0 || q >= RW_Q_COUNT)
		return NULL;
	return qty_names[q];
}

rw_elastic_pair rw_elastic_pair_check(rw_elastic_qty a, rw_elastic_qty b)
{
	enum grp ga, gb;

	if (a == b)
		return RW_PAIR_SAME;
	ga = group_of(a);
	gb = group_of(b);
	if (ga != G_OTHER && ga == gb)
		return RW_PAIR_DEPENDENT;
	if ((a == RW_Q_NU && b == RW_Q_VPVS) ||
	    (a == RW_Q_VPVS && b == RW_Q_NU))
		return RW_PAIR_DEPENDENT;
	/* E = mu (3M - 4mu)/(M - mu) is quadratic in mu with, in general, two
	 * roots that are both physical (e.g. one with nu < 0, one with
	 * nu > 0), so M (or vp, ai, dtp) with E does not fix the rock. */
	if ((ga == G_P && b == RW_Q_E) || (gb == G_P && a == RW_Q_E))
		return RW_PAIR_TWO_ROOTS;
	return RW_PAIR_OK;
}

static void fill_nan(rw_elastic *o)
{
	o->vp = o->vs = o->rho = NAN;
	o->k = o->mu = o->lambda = o->e = o->nu = o->m = NAN;
	o->ai = o->si = o->vpvs = o->dtp = o->dts = NAN;
}

/* The quantities that follow from out's rho, vp and vs: impedances,
 * velocity ratio and slownesses. */
static void velocity_terms(rw_elastic *out)
{
	out->ai = out->rho * out->vp;
	out->si = out->rho * out->vs;
	out->vpvs = out->vp / out->vs;
	out->dtp = 1.0 / out->vp;
	out->dts = 1.0 / out->vs;
}

int rw_elastic_from_moduli(double rho, double m, double mu, rw_elastic *out,
                           unsigned *why)
{
	unsigned bad = 0;
	double k;

	if (!isfinite(rho) || !isfinite(m) || !isfinite(mu))
		bad |= RW_ELASTIC_BAD_INPUT;
	if (!(rho > 0))
		bad |= RW_ELASTIC_BAD_RHO;
	if (!(mu > 0))
		bad |= RW_ELASTIC_BAD_MU;
	k = m - 4.0 / 3.0 * mu;
	/* K = 0 (nu = -1) is a solid with no resistance to compression:
	 * impossible, as the reflectivity checks also hold it. */
	if (!(k > 0))
		bad |= RW_ELASTIC_BAD_K;
	if (why)
		*why = bad;
	if (bad) {
		fill_nan(out);
		return RW_EDOM;
	}
	out->rho = rho;
	out->m = m;
	out->mu = mu;
	out->k = k;
	out->lambda = m - 2.0 * mu;
	out->vp = sqrt(m / rho);
	out->vs = sqrt(mu / rho);
	/* Young's modulus and Poisson's ratio from velocities (ASTM D2845):
	 * nu = (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2)), E = 2 rho vs^2 (1 + nu). */
	out->nu = (m - 2.0 * mu) / (2.0 * (m - mu));
	out->e = 2.0 * mu * (1.0 + out->nu);
	velocity_terms(out);
	return RW_OK;
}

int rw_elastic_from_velocities(double vp, double vs, double rho,
                               rw_elastic *out, unsigned *why)
{
	return rw_elastic_from_pair(rho, RW_Q_VP, vp, RW_Q_VS, vs, out, why);
}

/* The usual log case, (vp, vs) of a valid solid, without the general
 * path's dispatch, its square roots (whose results the given velocities
 * replace) and its second pass over the derived fields: the same
 * operations in the same order, so the same bits (tests/unit/
 * test_elastic.c checks them against the general path). Returns 0, with
 * nothing written, for anything else: the general path then decides. */
static int from_vp_vs(double rho, double vp, double vs, rw_elastic *out,
                      unsigned *why)
{
	double m, mu, k;

	if (!(rho > 0) || !(vp >= 0) || !(vs >= 0) || !isfinite(rho) ||
	    !isfinite(vp) || !isfinite(vs))
		return 0;
	m = rho * vp * vp;
	mu = rho * vs * vs;
	k = m - 4.0 / 3.0 * mu;
	if (!isfinite(m) || !isfinite(mu) || !(mu > 0) || !(k > 0))
		return 0;
	if (why)
		*why = 0;
	out->rho = rho;
	out->m = m;
	out->mu = mu;
	out->k = k;
	out->lambda = m - 2.0 * mu;
	out->vp = vp;
	out->vs = vs;
	out->nu = (m - 2.0 * mu) / (2.0 * (m - mu));
	out->e = 2.0 * mu * (1.0 + out->nu);
	velocity_terms(out);
	return 1;
}

/* Converts a member of the P group to M, or of the S group to mu (both
 * rho v^2). Returns NaN for a negative value or a zero slowness. */
static double group_modulus(double rho, rw_elastic_qty q, double v)
{
	double vel;

	switch (q) {
	case RW_Q_M:
	case RW_Q_MU: return v;
	case RW_Q_VP:
	case RW_Q_VS: vel = v; break;
	case RW_Q_AI:
	case RW_Q_SI: vel = v / rho; break;
	case RW_Q_DTP:
	case RW_Q_DTS: vel = 1.0 / v; break;
	default: return NAN;
	}
	/* A zero velocity or impedance is a zero modulus (reported as such by
	 * rw_elastic_from_moduli); a negative one, or a zero slowness, has no
	 * meaning. */
	if (!(v >= 0) || !isfinite(vel))
		return NAN;
	return rho * vel * vel;
}

/* Shear modulus from M and an "other" quantity (k, lambda, nu, vpvs). */
static double mu_from_m(double m, rw_elastic_qty q, double v)
{
	switch (q) {
	case RW_Q_K: return 0.75 * (m - v);
	case RW_Q_LAMBDA: return 0.5 * (m - v);
	case RW_Q_NU: return m * (1.0 - 2.0 * v) / (2.0 * (1.0 - v));
	case RW_Q_VPVS: return v > 0 ? m / (v * v) : NAN;
	default: return NAN;
	}
}

/* M from mu and an "other" quantity (k, lambda, e, nu, vpvs). */
static double m_from_mu(double mu, rw_elastic_qty q, double v)
{
	switch (q) {
	case RW_Q_K: return v + 4.0 / 3.0 * mu;
	case RW_Q_LAMBDA: return v + 2.0 * mu;
	case RW_Q_E: return mu * (4.0 * mu - v) / (3.0 * mu - v);
	case RW_Q_NU: return 2.0 * mu * (1.0 - v) / (1.0 - 2.0 * v);
	case RW_Q_VPVS: return v > 0 ? mu * v * v : NAN;
	default: return NAN;
	}
}

/* Poisson's ratio from Vp/Vs: nu = (r^2 - 2) / (2 (r^2 - 1)). */
static double nu_from_vpvs(double r)
{
	double r2 = r * r;
	return (r2 - 2.0) / (2.0 * (r2 - 1.0));
}

/* mu from lambda and E: 2 mu^2 + (3 lambda - E) mu - E lambda = 0. Keeps
 * the root that gives a physical solid (mu > 0, K >= 0); with lambda >= 0
 * only the larger root is non-negative, and with lambda < 0 the smaller
 * root gives K < 0 (checked by the round-trip tests). */
static double mu_from_lambda_e(double lam, double e)
{
	double b = 3.0 * lam - e;
	double disc = b * b + 8.0 * e * lam;
	if (!(disc >= 0))
		return NAN;
	return (-b + sqrt(disc)) / 4.0;
}

/* (M, mu) from two "other" quantities. */
static void solve_others(rw_elastic_qty a, double va, rw_elastic_qty b,
                         double vb, double *m, double *mu)
{
	double nu;

	/* Order the pair so that a < b in enum order: K, LAMBDA, E, NU, VPVS.
	 */
	if (a > b) {
		rw_elastic_qty tq = a;
		double tv = va;
		a = b, va = vb, b = tq, vb = tv;
	}
	*mu = NAN;
	switch (a) {
	case RW_Q_K:
		switch (b) {
		case RW_Q_LAMBDA: *mu = 1.5 * (va - vb); break;
		case RW_Q_E: *mu = 3.0 * va * vb / (9.0 * va - vb); break;
		case RW_Q_NU:
			*mu = 3.0 * va * (1.0 - 2.0 * vb) / (2.0 * (1.0 + vb));
			break;
		case RW_Q_VPVS: *mu = va / (vb * vb - 4.0 / 3.0); break;
		default: break;
		}
		*m = va + 4.0 / 3.0 * *mu;
		return;
	case RW_Q_LAMBDA:
		switch (b) {
		case RW_Q_E: *mu = mu_from_lambda_e(va, vb); break;
		case RW_Q_NU: *mu = va * (1.0 - 2.0 * vb) / (2.0 * vb); break;
		case RW_Q_VPVS: *mu = va / (vb * vb - 2.0); break;
		default: break;
		}
		*m = va + 2.0 * *mu;
		return;
	case RW_Q_E:
		nu = b == RW_Q_NU ? vb : nu_from_vpvs(vb);
		*mu = va / (2.0 * (1.0 + nu));
		*m = 2.0 * *mu * (1.0 - nu) / (1.0 - 2.0 * nu);
		return;
	default: *m = NAN; return;
	}
}

/* The member of out that holds quantity q. */
static double *qty_field(rw_elastic *out, rw_elastic_qty q)
{
	switch (q) {
	case RW_Q_VP: return &out->vp;
	case RW_Q_VS: return &out->vs;
	case RW_Q_K: return &out->k;
	case RW_Q_MU: return &out->mu;
	case RW_Q_LAMBDA: return &out->lambda;
	case RW_Q_E: return &out->e;
	case RW_Q_NU: return &out->nu;
	case RW_Q_M: return &out->m;
	case RW_Q_AI: return &out->ai;
	case RW_Q_SI: return &out->si;
	case RW_Q_VPVS: return &out->vpvs;
	case RW_Q_DTP: return &out->dtp;
	case RW_Q_DTS:
	case RW_Q_COUNT: break;
	}
	return &out->dts;
}

int rw_elastic_from_pair(double rho, rw_elastic_qty a, double va,
                         rw_elastic_qty b, double vb, rw_elastic *out,
                         unsigned *why)
{
	enum grp ga, gb;
	double m = NAN, mu = NAN;

	if (a == RW_Q_VP && b == RW_Q_VS && from_vp_vs(rho, va, vb, out, why))
		return RW_OK;
	if ((int)a < 0 || a >= RW_Q_COUNT || (int)b < 0 || b >= RW_Q_COUNT ||
	    rw_elastic_pair_check(a, b) != RW_PAIR_OK) {
		if (why)
			*why = RW_ELASTIC_BAD_INPUT;
		fill_nan(out);
		return RW_EINVAL;
	}
	if (!isfinite(rho) || !isfinite(va) || !isfinite(vb)) {
		if (why)
			*why = RW_ELASTIC_BAD_INPUT |
			       (rho > 0 ? 0u : RW_ELASTIC_BAD_RHO);
		fill_nan(out);
		return RW_EDOM;
	}
	if (!(rho > 0)) {
		if (why)
			*why = RW_ELASTIC_BAD_RHO;
		fill_nan(out);
		return RW_EDOM;
	}
	ga = group_of(a);
	gb = group_of(b);
	if (gb == G_P || (gb == G_S && ga == G_OTHER)) {
		/* Put the group member first. */
		rw_elastic_qty tq = a;
		double tv = va;
		enum grp tg = ga;
		a = b, va = vb, ga = gb, b = tq, vb = tv, gb = tg;
	}
	if (ga == G_P && gb == G_S) {
		m = group_modulus(rho, a, va);
		mu = group_modulus(rho, b, vb);
	} else if (ga == G_P) {
		m = group_modulus(rho, a, va);
		mu = mu_from_m(m, b, vb);
	} else if (ga == G_S) {
		mu = group_modulus(rho, a, va);
		m = m_from_mu(mu, b, vb);
	} else {
		solve_others(a, va, b, vb, &m, &mu);
	}
	if (!isfinite(m) || !isfinite(mu)) {
		if (why)
			*why = RW_ELASTIC_BAD_INPUT;
		fill_nan(out);
		return RW_EDOM;
	}
	if (rw_elastic_from_moduli(rho, m, mu, out, why) != RW_OK)
		return RW_EDOM;
	/* The two given quantities come back as given, not as the last bit
	 * of a round trip through the moduli (vp -> m -> sqrt(m / rho)),
	 * and the velocity quantities follow a given velocity exactly. */
	if (a == RW_Q_VP || b == RW_Q_VP)
		out->vp = a == RW_Q_VP ? va : vb;
	if (a == RW_Q_VS || b == RW_Q_VS)
		out->vs = a == RW_Q_VS ? va : vb;
	velocity_terms(out);
	*qty_field(out, a) = va;
	*qty_field(out, b) = vb;
	return RW_OK;
}
