/* Inclusion models of the rockwire core: Berryman's 1980 P and Q
 * polarisation factors (closed forms for spheres, needles, disks and
 * penny cracks; the general spheroid), Kuster-Toksoz, the self-consistent
 * approximation, the differential effective medium integrated with GSL's
 * ODE stepper, and Xu-White, plus the solver workspace. Formulas as in
 * Mavko, Mukerji & Dvorkin 2009 (sec. 4.8 and 4.11) and Berryman 1980,
 * from memory; tests/reference/test_rockmodel_scipy.py checks the general
 * spheroid against an Eshelby tensor integrated numerically. Contracts
 * are in rockwire/rockmodel.h. */
#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "rockmodel_int.h"
#include "status_gsl.h"

#define SCA_MAX_ITER  100000
#define DEM_MAX_STEPS 100000

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

static int fail2(double *a, double *b, unsigned *warn, unsigned bits, int st)
{
	*a = NAN;
	*b = NAN;
	warn_set(warn, bits);
	return st;
}

static double zeta(double k, double mu)
{
	return mu / 6.0 * (9.0 * k + 8.0 * mu) / (k + 2.0 * mu);
}

/* theta and f of a spheroid of aspect ratio a (Berryman 1980; Mavko,
 * Mukerji & Dvorkin 2009, sec. 4.8):
 *   a < 1: theta = a / (1 - a^2)^(3/2) [acos a - a sqrt(1 - a^2)],
 *   a > 1: theta = a / (a^2 - 1)^(3/2) [a sqrt(a^2 - 1) - acosh a],
 *   f = a^2 / (1 - a^2) (3 theta - 2).
 * Both are analytic through a = 1, where the closed forms cancel. With
 * s = 1 - a^2, theta = a int_0^1 w^(1/2) (1 - s w)^(-1/2) dw (substitute
 * t^2 = 1 - s w in the a < 1 form), so theta = a sum_k c_k s^k / (k + 3/2)
 * with c_k = (2k)! / (4^k k!^2), and
 * f = a^2 [3 a sum_{k>=1} c_k s^(k-1) / (k + 3/2) - 2 / (1 + a)];
 * the series is used for |s| <= 0.25. */
static void spheroid_theta_f(double a, double *theta, double *f)
{
	double s = 1.0 - a * a;

	if (fabs(s) <= 0.25) {
		double c = 1.0, sk = 1.0, s0 = 2.0 / 3.0, t = 0.0;
		int k;

		for (k = 1; k < 200; k++) {
			double term;

			c *= (2.0 * k - 1.0) / (2.0 * k);
			term = c * sk / (k + 1.5); /* c_k s^(k-1) / (k+3/2) */
			t += term;
			sk *= s;
			if (fabs(term) <= 1e-17 * fabs(t))
				break;
		}
		s0 += s * t;
		*theta = a * s0;
		*f = a * a * (3.0 * a * t - 2.0 / (1.0 + a));
		return;
	}
	if (a < 1.0)
		*theta = a / pow(s, 1.5) * (acos(a) - a * sqrt(s));
	else
		*theta = a / pow(-s, 1.5) * (a * sqrt(-s) - acosh(a));
	*f = a * a / s * (3.0 * *theta - 2.0);
}

/* Berryman's F1..F9 form of the Eshelby-Wu tensor for a spheroid. */
static void pq_spheroid(double a, double km, double mum, double ki, double mui,
                        double *p, double *q)
{
	double th, f, aa, b, r, f1, f2, f3, f4, f5, f6, f7, f8, f9, tiijj,
	    tijij;

	spheroid_theta_f(a, &th, &f);
	aa = mui / mum - 1.0;
	b = (ki / km - mui / mum) / 3.0;
	r = 3.0 * mum / (3.0 * km + 4.0 * mum);
	f1 = 1.0 + aa * (1.5 * (f + th) - r * (1.5 * f + 2.5 * th - 4.0 / 3.0));
	f2 = 1.0 +
	     aa * (1.0 + 1.5 * (f + th) - 0.5 * r * (3.0 * f + 5.0 * th)) +
	     b * (3.0 - 4.0 * r) +
	     0.5 * aa * (aa + 3.0 * b) * (3.0 - 4.0 * r) *
	         (f + th - r * (f - th + 2.0 * th * th));
	f3 = 1.0 + aa * (1.0 - (f + 1.5 * th) + r * (f + th));
	f4 = 1.0 + 0.25 * aa * (f + 3.0 * th - r * (f - th));
	f5 = aa * (-f + r * (f + th - 4.0 / 3.0)) + b * th * (3.0 - 4.0 * r);
	f6 = 1.0 + aa * (1.0 + f - r * (f + th)) +
	     b * (1.0 - th) * (3.0 - 4.0 * r);
	f7 = 2.0 + 0.25 * aa * (3.0 * f + 9.0 * th - r * (3.0 * f + 5.0 * th)) +
	     b * th * (3.0 - 4.0 * r);
	f8 = aa * (1.0 - 2.0 * r + 0.5 * f * (r - 1.0) +
	           0.5 * th * (5.0 * r - 3.0)) +
	     b * (1.0 - th) * (3.0 - 4.0 * r);
	f9 = aa * ((r - 1.0) * f - r * th) + b * th * (3.0 - 4.0 * r);
	tiijj = 3.0 * f1 / f2;
	tijij = tiijj / 3.0 + 2.0 / f3 + 1.0 / f4 +
	        (f4 * f5 + f6 * f7 - f8 * f9) / (f2 * f4);
	*p = tiijj / 3.0;
	*q = (tijij - tiijj / 3.0) / 5.0;
}

int rw_rm_incl_pq(int shape, double aspect, double k_bg_pa, double mu_bg_pa,
                  double k_inc_pa, double mu_inc_pa, double *p, double *q)
{
	double km = k_bg_pa, mum = mu_bg_pa, ki = k_inc_pa, mui = mu_inc_pa;
	double nu, zi, beta, gam;

	*p = NAN;
	*q = NAN;
	if (shape < RW_RM_SHAPE_SPHERE || shape > RW_RM_SHAPE_SPHEROID)
		return RW_EINVAL;
	if (!isfinite(km) || !isfinite(mum) || !isfinite(ki) ||
	    !isfinite(mui) || !(km > 0.0) || !(mum > 0.0) || ki < 0.0 ||
	    mui < 0.0)
		return RW_EDOM;
	nu = (3.0 * km - 2.0 * mum) / (2.0 * (3.0 * km + mum));
	if (!(nu > -1.0 && nu < 0.5))
		return RW_EDOM;
	if ((shape == RW_RM_SHAPE_PENNY || shape == RW_RM_SHAPE_SPHEROID) &&
	    (!isfinite(aspect) || !(aspect > 0.0)))
		return RW_EDOM;
	switch (shape) {
	case RW_RM_SHAPE_SPHERE:
		*p = (km + 4.0 / 3.0 * mum) / (ki + 4.0 / 3.0 * mum);
		*q = (mum + zeta(km, mum)) / (mui + zeta(km, mum));
		break;
	case RW_RM_SHAPE_NEEDLE:
		gam = mum * (3.0 * km + mum) / (3.0 * km + 7.0 * mum);
		*p = (km + mum + mui / 3.0) / (ki + mum + mui / 3.0);
		*q = 0.2 * (4.0 * mum / (mum + mui) +
		            2.0 * (mum + gam) / (mui + gam) +
		            (ki + 4.0 / 3.0 * mum) / (ki + mum + mui / 3.0));
		break;
	case RW_RM_SHAPE_DISK:
		if (!(mui > 0.0))
			return RW_EDOM;
		zi = zeta(ki, mui);
		*p = (km + 4.0 / 3.0 * mui) / (ki + 4.0 / 3.0 * mui);
		*q = (mum + zi) / (mui + zi);
		break;
	case RW_RM_SHAPE_PENNY:
		beta = mum * (3.0 * km + mum) / (3.0 * km + 4.0 * mum);
		*p = (km + 4.0 / 3.0 * mui) /
		     (ki + 4.0 / 3.0 * mui + M_PI * aspect * beta);
		*q = 0.2 *
		     (1.0 +
		      8.0 * mum /
		          (4.0 * mui + M_PI * aspect * (mum + 2.0 * beta)) +
		      2.0 * (ki + 2.0 / 3.0 * (mui + mum)) /
		          (ki + 4.0 / 3.0 * mui + M_PI * aspect * beta));
		break;
	default: /* RW_RM_SHAPE_SPHEROID */
		if (aspect == 1.0) {
			*p = (km + 4.0 / 3.0 * mum) / (ki + 4.0 / 3.0 * mum);
			*q = (mum + zeta(km, mum)) / (mui + zeta(km, mum));
		} else {
			pq_spheroid(aspect, km, mum, ki, mui, p, q);
		}
		break;
	}
	if (!isfinite(*p) || !isfinite(*q)) {
		*p = NAN;
		*q = NAN;
		return RW_EDOM;
	}
	return RW_OK;
}

/* Checks the constituents of an inclusion model; sums the fractions and
 * collects shape warnings. */
static int incl_check(size_t n, const rw_rm_incl *c, double *sum, unsigned *w)
{
	size_t i;

	*sum = 0.0;
	if (n > 0 && c == NULL)
		return RW_EINVAL;
	for (i = 0; i < n; i++) {
		if (c[i].shape < RW_RM_SHAPE_SPHERE ||
		    c[i].shape > RW_RM_SHAPE_SPHEROID)
			return RW_EINVAL;
		if (!isfinite(c[i].k_pa) || !isfinite(c[i].mu_pa) ||
		    !isfinite(c[i].frac) || c[i].k_pa < 0.0 ||
		    c[i].mu_pa < 0.0 || c[i].frac < 0.0 || c[i].frac > 1.0)
			return RW_EDOM;
		if ((c[i].shape == RW_RM_SHAPE_PENNY ||
		     c[i].shape == RW_RM_SHAPE_SPHEROID) &&
		    (!isfinite(c[i].aspect) || !(c[i].aspect > 0.0)))
			return RW_EDOM;
		if (c[i].shape == RW_RM_SHAPE_PENNY &&
		    c[i].aspect > RW_RM_PENNY_ASPECT_MAX)
			*w |= RW_RM_WARN_ASPECT_RANGE;
		*sum += c[i].frac;
	}
	return RW_OK;
}

static int host_ok(double k, double mu)
{
	double nu;

	if (!isfinite(k) || !isfinite(mu) || !(k > 0.0) || !(mu > 0.0))
		return 0;
	nu = (3.0 * k - 2.0 * mu) / (2.0 * (3.0 * k + mu));
	return nu > -1.0 && nu < 0.5;
}

int rw_rm_kuster_toksoz(double k_host_pa, double mu_host_pa, size_t n,
                        const rw_rm_incl *incl, double *k_pa, double *mu_pa,
                        unsigned *warn)
{
	double km = k_host_pa, mum = mu_host_pa, sum, lk = 0.0, lm = 0.0,
	       dil = 0.0, ak, zm, k, mu;
	unsigned w = 0;
	size_t i;
	int st;

	if (!host_ok(km, mum))
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	st = incl_check(n, incl, &sum, &w);
	if (st != RW_OK)
		return fail2(k_pa, mu_pa, warn, 0, st);
	if (sum > 1.0 + 1e-9)
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	for (i = 0; i < n; i++) {
		double p, q, a = 1.0;

		st = rw_rm_incl_pq(incl[i].shape, incl[i].aspect, km, mum,
		                   incl[i].k_pa, incl[i].mu_pa, &p, &q);
		if (st != RW_OK)
			return fail2(k_pa, mu_pa, warn, 0, st);
		lk += incl[i].frac * (incl[i].k_pa - km) * p;
		lm += incl[i].frac * (incl[i].mu_pa - mum) * q;
		if ((incl[i].shape == RW_RM_SHAPE_PENNY ||
		     incl[i].shape == RW_RM_SHAPE_SPHEROID) &&
		    incl[i].aspect < 1.0)
			a = incl[i].aspect;
		dil += incl[i].frac / a;
	}
	if (dil > RW_RM_KT_DILUTE_MAX)
		w |= RW_RM_WARN_DILUTE;
	/* (K - Km) A = L (K + 4/3 mum) with A = Km + 4/3 mum, likewise mu */
	ak = km + 4.0 / 3.0 * mum;
	k = (km * ak + 4.0 / 3.0 * mum * lk) / (ak - lk);
	zm = zeta(km, mum);
	mu = (mum * (mum + zm) + zm * lm) / (mum + zm - lm);
	if (!isfinite(k) || !isfinite(mu) || !(ak - lk > 0.0) ||
	    !(mum + zm - lm > 0.0) || k < 0.0 || mu < 0.0)
		return fail2(k_pa, mu_pa, warn, w, RW_ERANGE);
	*k_pa = k;
	*mu_pa = mu;
	warn_set(warn, w);
	return RW_OK;
}

int rw_rm_self_consistent(size_t n, const rw_rm_incl *phases, double tol,
                          double *k_pa, double *mu_pa, unsigned *warn)
{
	double sum, kv = 0.0, muv = 0.0, kr = 0.0, k, mu, dprev = 0.0;
	unsigned w = 0;
	size_t i;
	int st, it, shear_solid = 0, zero_k = 0;

	if (n == 0 || phases == NULL)
		return fail2(k_pa, mu_pa, warn, 0, RW_EINVAL);
	st = incl_check(n, phases, &sum, &w);
	if (st != RW_OK)
		return fail2(k_pa, mu_pa, warn, 0, st);
	if (fabs(sum - 1.0) > 1e-6 || !isfinite(tol) || tol < 1e-14 ||
	    tol > 1e-2)
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	for (i = 0; i < n; i++) {
		kv += phases[i].frac * phases[i].k_pa;
		muv += phases[i].frac * phases[i].mu_pa;
		if (phases[i].frac > 0.0 && phases[i].mu_pa > 0.0)
			shear_solid = 1;
		if (phases[i].frac > 0.0 && phases[i].k_pa == 0.0)
			zero_k = 1;
		else if (phases[i].frac > 0.0)
			kr += phases[i].frac / phases[i].k_pa;
	}
	if (!shear_solid || !(kv > 0.0))
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	k = kv;
	mu = muv;
	for (it = 0; it < SCA_MAX_ITER; it++) {
		double sk = 0.0, skp = 0.0, sm = 0.0, smq = 0.0, kn, mun, d, r,
		       err;

		for (i = 0; i < n; i++) {
			double p, q;

			if (phases[i].frac == 0.0)
				continue;
			st = rw_rm_incl_pq(phases[i].shape, phases[i].aspect, k,
			                   mu, phases[i].k_pa, phases[i].mu_pa,
			                   &p, &q);
			if (st != RW_OK)
				return fail2(k_pa, mu_pa, warn, w, RW_ERANGE);
			sk += phases[i].frac * phases[i].k_pa * p;
			skp += phases[i].frac * p;
			sm += phases[i].frac * phases[i].mu_pa * q;
			smq += phases[i].frac * q;
		}
		kn = sk / skp;
		mun = sm / smq;
		/* Percolation: the solid's rigidity vanishes. Empty pores take
		 * K with it; fluid-filled ones leave a suspension, whose SC
		 * bulk modulus with zero shear is the Reuss average. */
		if (mun < 1e-13 * muv) {
			*k_pa = zero_k ? 0.0 : 1.0 / kr;
			*mu_pa = 0.0;
			warn_set(warn, w | RW_RM_WARN_PERCOLATED);
			return RW_OK;
		}
		d = fmax(fabs(kn - k) / kv, fabs(mun - mu) / muv);
		/* Linear convergence at rate r leaves an error of about
		 * d r / (1 - r) after a step of size d. */
		r = dprev > 0.0 ? d / dprev : 1.0;
		err = r < 1.0 ? d * r / (1.0 - r) : INFINITY;
		k = kn;
		mu = mun;
		/* relative to the moduli: a zero fixed point (percolation)
		 * never passes and ends in the branch above */
		if (d == 0.0 || err <= tol * fmin(k / kv, mu / muv)) {
			*k_pa = k;
			*mu_pa = mu;
			warn_set(warn, w);
			return RW_OK;
		}
		dprev = d;
	}
	return fail2(k_pa, mu_pa, warn, w | RW_RM_WARN_NOT_CONVERGED,
	             RW_EMAXITER);
}

/* ---- workspace -------------------------------------------------------- */

void rw_rm_ws_free(rw_rm_ws *ws)
{
	if (ws == NULL)
		return;
	if (ws->evo)
		gsl_odeiv2_evolve_free(ws->evo);
	if (ws->ctrl)
		gsl_odeiv2_control_free(ws->ctrl);
	if (ws->step)
		gsl_odeiv2_step_free(ws->step);
	if (ws->nl)
		gsl_multifit_nlinear_free(ws->nl);
	if (ws->nl_prof)
		gsl_multifit_nlinear_free(ws->nl_prof);
	gsl_vector_free(ws->u0);
	gsl_vector_free(ws->u0_prof);
	gsl_matrix_free(ws->jac);
	gsl_matrix_free(ws->v);
	gsl_vector_free(ws->sv);
	gsl_vector_free(ws->sv_work);
	free(ws);
}

rw_rm_ws *rw_rm_ws_new(size_t n_obs, size_t n_par)
{
	rw_rm_ws *ws;

	if (n_obs > RW_RM_INV_MAX || n_par > n_obs || (n_obs > 0 && n_par == 0))
		return NULL;
	ws = calloc(1, sizeof(*ws));
	if (ws == NULL)
		return NULL;
	ws->step = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rk8pd, 2);
	ws->ctrl = gsl_odeiv2_control_y_new(1e-8, 1e-8);
	ws->evo = gsl_odeiv2_evolve_alloc(2);
	if (!ws->step || !ws->ctrl || !ws->evo)
		goto fail;
	ws->n_obs = n_obs;
	ws->n_par = n_par;
	if (n_obs > 0) {
		gsl_multifit_nlinear_parameters prm =
		    gsl_multifit_nlinear_default_parameters();

		ws->nl = gsl_multifit_nlinear_alloc(gsl_multifit_nlinear_trust,
		                                    &prm, n_obs, n_par);
		ws->u0 = gsl_vector_alloc(n_par);
		ws->jac = gsl_matrix_alloc(n_obs, n_par);
		ws->v = gsl_matrix_alloc(n_par, n_par);
		ws->sv = gsl_vector_alloc(n_par);
		ws->sv_work = gsl_vector_alloc(n_par);
		if (!ws->nl || !ws->u0 || !ws->jac || !ws->v || !ws->sv ||
		    !ws->sv_work)
			goto fail;
		if (n_par > 1) {
			ws->nl_prof = gsl_multifit_nlinear_alloc(
			    gsl_multifit_nlinear_trust, &prm, n_obs, n_par - 1);
			ws->u0_prof = gsl_vector_alloc(n_par - 1);
			if (!ws->nl_prof || !ws->u0_prof)
				goto fail;
		}
	}
	return ws;
fail:
	rw_rm_ws_free(ws);
	return NULL;
}

/* ---- differential effective medium ------------------------------------ */

struct dem_sys {
	double k1, mu1, c;
	size_t n;
	const rw_rm_incl *incl;
};

/* dy/dt of the DEM equations on y = (K / K1, mu / mu1), t the inclusion
 * concentration. */
static int dem_rhs(double t, const double y[], double dydt[], void *params)
{
	const struct dem_sys *s = params;
	double k = y[0] * s->k1, mu = y[1] * s->mu1, dk = 0.0, dmu = 0.0;
	size_t i;

	if (!(k > 0.0) || !(mu > 0.0) || !(t < 1.0))
		return GSL_EBADFUNC;
	for (i = 0; i < s->n; i++) {
		double p, q, wt = s->incl[i].frac / s->c;

		if (wt == 0.0)
			continue;
		if (rw_rm_incl_pq(s->incl[i].shape, s->incl[i].aspect, k, mu,
		                  s->incl[i].k_pa, s->incl[i].mu_pa, &p,
		                  &q) != RW_OK)
			return GSL_EBADFUNC;
		dk += wt * (s->incl[i].k_pa - k) * p;
		dmu += wt * (s->incl[i].mu_pa - mu) * q;
	}
	dydt[0] = dk / ((1.0 - t) * s->k1);
	dydt[1] = dmu / ((1.0 - t) * s->mu1);
	return GSL_SUCCESS;
}

int rw_rm_dem(double k_host_pa, double mu_host_pa, size_t n,
              const rw_rm_incl *incl, double tol, rw_rm_ws *ws, double *k_pa,
              double *mu_pa, unsigned *warn)
{
	struct dem_sys s;
	gsl_odeiv2_system sys;
	double sum, t = 0.0, h, y[2] = {1.0, 1.0};
	unsigned w = 0;
	int st, steps = 0;

	if (ws == NULL)
		return fail2(k_pa, mu_pa, warn, 0, RW_EINVAL);
	if (!host_ok(k_host_pa, mu_host_pa) || !isfinite(tol) || tol < 1e-14 ||
	    tol > 1e-3)
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	st = incl_check(n, incl, &sum, &w);
	if (st != RW_OK)
		return fail2(k_pa, mu_pa, warn, 0, st);
	if (!(sum < 1.0))
		return fail2(k_pa, mu_pa, warn, 0, RW_EDOM);
	if (sum == 0.0) {
		*k_pa = k_host_pa;
		*mu_pa = mu_host_pa;
		warn_set(warn, w);
		return RW_OK;
	}
	s.k1 = k_host_pa;
	s.mu1 = mu_host_pa;
	s.c = sum;
	s.n = n;
	s.incl = incl;
	sys.function = dem_rhs;
	sys.jacobian = NULL;
	sys.dimension = 2;
	sys.params = &s;
	gsl_odeiv2_step_reset(ws->step);
	gsl_odeiv2_evolve_reset(ws->evo);
	gsl_odeiv2_control_init(ws->ctrl, tol, tol, 1.0, 0.0);
	h = fmin(1e-3, sum);
	while (t < sum) {
		if (++steps > DEM_MAX_STEPS)
			return fail2(k_pa, mu_pa, warn,
			             w | RW_RM_WARN_NOT_CONVERGED, RW_EMAXITER);
		st = gsl_odeiv2_evolve_apply(ws->evo, ws->ctrl, ws->step, &sys,
		                             &t, sum, &h, y);
		if (st != GSL_SUCCESS)
			return fail2(k_pa, mu_pa, warn, w,
			             st == GSL_EBADFUNC ? RW_ERANGE
			                                : rw__from_gsl(st));
	}
	if (!(y[0] > 0.0) || !(y[1] > 0.0) || !isfinite(y[0]) ||
	    !isfinite(y[1]))
		return fail2(k_pa, mu_pa, warn, w, RW_ERANGE);
	*k_pa = y[0] * k_host_pa;
	*mu_pa = y[1] * mu_host_pa;
	warn_set(warn, w);
	return RW_OK;
}

int rw_rm_xu_white(double k_min_pa, double mu_min_pa, double phi, double vclay,
                   double aspect_sand, double aspect_clay, double tol,
                   rw_rm_ws *ws, double *k_dry_pa, double *mu_dry_pa,
                   unsigned *warn)
{
	rw_rm_incl pores[2];

	if (!isfinite(phi) || !isfinite(vclay) || phi < 0.0 || phi >= 1.0 ||
	    vclay < 0.0 || vclay > 1.0 || !isfinite(aspect_sand) ||
	    !isfinite(aspect_clay) || !(aspect_sand > 0.0) ||
	    !(aspect_clay > 0.0))
		return fail2(k_dry_pa, mu_dry_pa, warn, 0, RW_EDOM);
	pores[0].k_pa = 0.0;
	pores[0].mu_pa = 0.0;
	pores[0].frac = (1.0 - vclay) * phi;
	pores[0].aspect = aspect_sand;
	pores[0].shape = RW_RM_SHAPE_SPHEROID;
	pores[1] = pores[0];
	pores[1].frac = vclay * phi;
	pores[1].aspect = aspect_clay;
	return rw_rm_dem(k_min_pa, mu_min_pa, 2, pores, tol, ws, k_dry_pa,
	                 mu_dry_pa, warn);
}
