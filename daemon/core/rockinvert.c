/* Inversion of two or three seismic attributes for porosity and water
 * saturation (and clay) on a rock model: weighted nonlinear least
 * squares with GSL's trust-region solver inside a sine transform of the
 * bounds, multi-start over saturation, a linearised covariance by SVD of
 * the Jacobian, an optional saturation profile, and the flags that tell
 * a user when the answer is not unique (the low-gas-saturation
 * ambiguity), lies on a bound or is outside the template. Contracts are
 * in rockwire/rockmodel.h. */
#include <math.h>
#include <stddef.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_multifit_nlinear.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "rockmodel_int.h"

/* Residual given to a trial point where the model fails (per
 * observation, in standard deviations): large enough that the trust
 * region rejects the step. */
#define FAIL_RESIDUAL 1e4
/* Step of the finite differences, in the transformed variable u
 * (radians) for the search and as a fraction of the bound range for the
 * covariance. */
#define FD_STEP_U 1e-6
#define FD_STEP_X 1e-6
/* Singular values below this fraction of the largest count as zero. */
#define SV_RTOL 1e-8
/* A parameter within this fraction of its range from a bound is on it. */
#define BOUND_RTOL 1e-6

struct inv_data {
	const rw_rm_inv_cfg *cfg;
	const double *obs, *sigma;
	rw_rm_ws *ws;
	size_t n_free;
	size_t idx[RW_RM_INV_MAX]; /* physical parameter of each u */
	double x[RW_RM_INV_MAX];   /* physical parameters (fixed and free) */
	unsigned n_eval, n_fail;
};

static double to_x(const rw_rm_inv_cfg *c, size_t j, double u)
{
	return c->lo[j] + (c->hi[j] - c->lo[j]) * 0.5 * (1.0 + sin(u));
}

static double to_u(const rw_rm_inv_cfg *c, size_t j, double x)
{
	double t = 2.0 * (x - c->lo[j]) / (c->hi[j] - c->lo[j]) - 1.0;

	return asin(fmax(-1.0, fmin(1.0, t)));
}

/* Weighted residuals at physical parameters x (all three slots; clay is
 * cfg->clay when not estimated). Returns 0 when the model failed (the
 * residuals are then FAIL_RESIDUAL). */
static int resid_x(struct inv_data *d, const double *x, double *r, rw_rm_sat *s,
                   unsigned *w)
{
	const rw_rm_inv_cfg *c = d->cfg;
	double clay = c->n_par > 2 ? x[RW_RM_PAR_CLAY] : c->clay;
	rw_rm_sat tmp;
	unsigned wt = 0;
	size_t i;
	int ok;

	if (s == NULL)
		s = &tmp;
	d->n_eval++;
	ok = rw_rm_eval(c->spec, x[RW_RM_PAR_PHI], x[RW_RM_PAR_SW], clay,
	                c->p_eff_pa, d->ws, s, &wt) == RW_OK;
	for (i = 0; ok && i < c->n_obs; i++) {
		double v = rw_rm_attr_get(s, c->attr[i]);

		if (!isfinite(v))
			ok = 0;
		else
			r[i] = (v - d->obs[i]) / d->sigma[i];
	}
	if (!ok) {
		d->n_fail++;
		for (i = 0; i < c->n_obs; i++)
			r[i] = FAIL_RESIDUAL;
	}
	if (w)
		*w = wt;
	return ok;
}

static void u_to_x(struct inv_data *d, const gsl_vector *u, double *x)
{
	size_t j;

	for (j = 0; j < RW_RM_INV_MAX; j++)
		x[j] = d->x[j];
	for (j = 0; j < d->n_free; j++)
		x[d->idx[j]] = to_x(d->cfg, d->idx[j], gsl_vector_get(u, j));
}

static int inv_f(const gsl_vector *u, void *data, gsl_vector *f)
{
	struct inv_data *d = data;
	double x[RW_RM_INV_MAX], r[RW_RM_INV_MAX];
	size_t i;

	u_to_x(d, u, x);
	resid_x(d, x, r, NULL, NULL);
	for (i = 0; i < d->cfg->n_obs; i++)
		gsl_vector_set(f, i, r[i]);
	return GSL_SUCCESS;
}

/* Forward differences with a fixed step in u: the models are smooth in
 * u, and a fixed step keeps the tolerance-level noise of DEM small
 * against it. */
static int inv_df(const gsl_vector *u, void *data, gsl_matrix *jac)
{
	struct inv_data *d = data;
	double x[RW_RM_INV_MAX], r0[RW_RM_INV_MAX], r1[RW_RM_INV_MAX];
	size_t i, j;

	u_to_x(d, u, x);
	resid_x(d, x, r0, NULL, NULL);
	for (j = 0; j < d->n_free; j++) {
		double uj = gsl_vector_get(u, j) + FD_STEP_U;
		double xs[RW_RM_INV_MAX];

		for (i = 0; i < RW_RM_INV_MAX; i++)
			xs[i] = x[i];
		xs[d->idx[j]] = to_x(d->cfg, d->idx[j], uj);
		resid_x(d, xs, r1, NULL, NULL);
		for (i = 0; i < d->cfg->n_obs; i++)
			gsl_matrix_set(jac, i, j, (r1[i] - r0[i]) / FD_STEP_U);
	}
	return GSL_SUCCESS;
}

/* One least-squares solve from x0 with the free parameters of d. Writes
 * the solution to x (all slots) and its misfit; returns 1 when the
 * solver converged. */
static int solve_from(struct inv_data *d, gsl_multifit_nlinear_workspace *nl,
                      gsl_vector *u0, const double *x0, double *x, double *chi2)
{
	gsl_multifit_nlinear_fdf fdf;
	double r[RW_RM_INV_MAX];
	size_t j;
	int st, info, i;

	fdf.f = inv_f;
	fdf.df = inv_df;
	fdf.fvv = NULL;
	fdf.n = d->cfg->n_obs;
	fdf.p = d->n_free;
	fdf.params = d;
	for (j = 0; j < RW_RM_INV_MAX; j++)
		d->x[j] = x0[j];
	for (j = 0; j < d->n_free; j++)
		gsl_vector_set(u0, j, to_u(d->cfg, d->idx[j], x0[d->idx[j]]));
	st = gsl_multifit_nlinear_init(u0, &fdf, nl);
	if (st == GSL_SUCCESS)
		st = gsl_multifit_nlinear_driver(d->cfg->max_iter, 1e-10, 1e-12,
		                                 0.0, NULL, NULL, &info, nl);
	u_to_x(d, gsl_multifit_nlinear_position(nl), x);
	resid_x(d, x, r, NULL, NULL);
	*chi2 = 0.0;
	for (i = 0; i < (int)d->cfg->n_obs; i++)
		*chi2 += r[i] * r[i];
	return st == GSL_SUCCESS || st == GSL_ENOPROG;
}

static void result_nan(rw_rm_inv_result *out)
{
	size_t i, j;

	for (i = 0; i < RW_RM_INV_MAX; i++) {
		out->x[i] = NAN;
		out->sd[i] = NAN;
		out->alt_x[i] = NAN;
		for (j = 0; j < RW_RM_INV_MAX; j++)
			out->cov[i][j] = NAN;
	}
	out->chi2 = NAN;
	out->sw_lo = NAN;
	out->sw_hi = NAN;
	out->alt_chi2 = NAN;
	out->fit.k_dry_pa = out->fit.mu_dry_pa = out->fit.k_sat_pa = NAN;
	out->fit.rho_kgm3 = out->fit.vp_ms = out->fit.vs_ms = NAN;
	out->fit.ai = out->fit.si = out->fit.vpvs = out->fit.nu = NAN;
	out->fit.lambda_rho = out->fit.mu_rho = NAN;
	out->flags = 0;
	out->model_warn = 0;
	out->n_eval = 0;
}

#define BAD(st, name)                                                          \
	do {                                                                   \
		if (field)                                                     \
			*field = (name);                                       \
		return (st);                                                   \
	} while (0)

int rw_rm_inv_check(const rw_rm_inv_cfg *cfg, const char **field)
{
	size_t i, j;
	int st, m;

	if (field)
		*field = NULL;
	if (cfg == NULL)
		BAD(RW_EINVAL, "cfg");
	st = rw_rm_spec_check(cfg->spec, field);
	if (st != RW_OK)
		return st;
	m = cfg->spec->model;
	/* finite differences need model noise well below their step */
	if ((m == RW_RM_DEM || m == RW_RM_XU_WHITE ||
	     m == RW_RM_SELF_CONSISTENT) &&
	    cfg->spec->tol > 1e-9)
		BAD(RW_EDOM, "tol");
	if (cfg->n_obs < 2 || cfg->n_obs > RW_RM_INV_MAX)
		BAD(RW_EINVAL, "n_obs");
	if (cfg->n_par < 2 || cfg->n_par > cfg->n_obs)
		BAD(RW_EINVAL, "n_par");
	for (i = 0; i < cfg->n_obs; i++) {
		if (rw_rm_attr_name(cfg->attr[i]) == NULL)
			BAD(RW_EINVAL, "attr");
		for (j = 0; j < i; j++)
			if (cfg->attr[j] == cfg->attr[i])
				BAD(RW_EINVAL, "attr");
	}
	for (i = 0; i < cfg->n_par; i++) {
		double top = i == RW_RM_PAR_PHI ? nextafter(1.0, 0.0) : 1.0;

		if (!isfinite(cfg->lo[i]) || !isfinite(cfg->hi[i]) ||
		    cfg->lo[i] < 0.0 || cfg->hi[i] > top ||
		    !(cfg->hi[i] > cfg->lo[i]))
			BAD(RW_EDOM, i == 0   ? "phi bounds"
			             : i == 1 ? "sw bounds"
			                      : "clay bounds");
	}
	if (cfg->n_par < 3 &&
	    !(isfinite(cfg->clay) && cfg->clay >= 0.0 && cfg->clay <= 1.0))
		BAD(RW_EDOM, "clay");
	if (!(isfinite(cfg->p_eff_pa) && cfg->p_eff_pa >= 0.0))
		BAD(RW_EDOM, "p_eff_pa");
	if (cfg->n_starts < 1 || cfg->n_starts > RW_RM_INV_MAX_STARTS)
		BAD(RW_EINVAL, "n_starts");
	if (cfg->n_profile == 1 || cfg->n_profile == 2 ||
	    cfg->n_profile > RW_RM_INV_MAX_PROFILE)
		BAD(RW_EINVAL, "n_profile");
	if (cfg->max_iter < 1)
		BAD(RW_EINVAL, "max_iter");
	if (!(isfinite(cfg->sw_width_max) && cfg->sw_width_max > 0.0))
		BAD(RW_EDOM, "sw_width_max");
	return RW_OK;
}

/* Linearised covariance at x by SVD of the physical Jacobian. Returns
 * nonzero when a direction is not constrained. */
static int covariance(struct inv_data *d, const double *x,
                      rw_rm_inv_result *out)
{
	const rw_rm_inv_cfg *c = d->cfg;
	rw_rm_ws *ws = d->ws;
	size_t p = c->n_par, n = c->n_obs, i, j, k;
	double r0[RW_RM_INV_MAX], r1[RW_RM_INV_MAX], smax;
	int singular = 0;

	resid_x(d, x, r0, NULL, NULL);
	for (j = 0; j < p; j++) {
		double h = FD_STEP_X * (c->hi[j] - c->lo[j]);
		double xs[RW_RM_INV_MAX];

		for (i = 0; i < RW_RM_INV_MAX; i++)
			xs[i] = x[i];
		if (x[j] + h > c->hi[j])
			h = -h;
		xs[j] = x[j] + h;
		resid_x(d, xs, r1, NULL, NULL);
		for (i = 0; i < n; i++)
			gsl_matrix_set(ws->jac, i, j, (r1[i] - r0[i]) / h);
	}
	if (gsl_linalg_SV_decomp(ws->jac, ws->v, ws->sv, ws->sv_work) !=
	    GSL_SUCCESS) {
		for (i = 0; i < p; i++)
			for (j = 0; j < p; j++)
				out->cov[i][j] = NAN;
		return 1;
	}
	smax = gsl_vector_get(ws->sv, 0);
	for (i = 0; i < p; i++) {
		for (j = 0; j < p; j++) {
			double sum = 0.0;
			int inf = 0;

			for (k = 0; k < p; k++) {
				double s = gsl_vector_get(ws->sv, k);
				double vv = gsl_matrix_get(ws->v, i, k) *
				            gsl_matrix_get(ws->v, j, k);

				if (!(s > SV_RTOL * smax)) {
					if (fabs(vv) > 1e-12)
						inf = vv > 0.0 ? 1 : -1;
					continue;
				}
				sum += vv / (s * s);
			}
			out->cov[i][j] = inf ? inf * INFINITY : sum;
		}
	}
	for (k = 0; k < p; k++)
		if (!(gsl_vector_get(ws->sv, k) > SV_RTOL * smax))
			singular = 1;
	return singular;
}

/* Fraction of the way from an outside node (misfit rise d_out > 1) back
 * to an inside one (d_in <= 1) where the rise is 1: linear in the square
 * root of the rise, which is linear in distance for a quadratic valley. */
static double crossing(double d_out, double d_in)
{
	double a = sqrt(fmax(d_out, 0.0)), b = sqrt(fmax(d_in, 0.0));

	return a > b ? (a - 1.0) / (a - b) : 0.0;
}

/* Profile of the misfit along sw; sets sw_lo, sw_hi around the best
 * estimate and reports a node that beats it (returns its index + 1) or a
 * separate valley (MULTIPLE, alt_*). */
static size_t profile(struct inv_data *d, const double *xb, double chi2b,
                      rw_rm_inv_result *out, double *pchi2, double *px)
{
	const rw_rm_inv_cfg *c = d->cfg;
	size_t np = c->n_profile, k, j, better = 0, lo_k, hi_k;
	double thr = chi2b + 1.0, lo = c->lo[RW_RM_PAR_SW],
	       hi = c->hi[RW_RM_PAR_SW], swb = xb[RW_RM_PAR_SW];
	int found;

	d->n_free = 0;
	for (j = 0; j < c->n_par; j++)
		if (j != RW_RM_PAR_SW)
			d->idx[d->n_free++] = j;
	for (k = 0; k < np; k++) {
		double x0[RW_RM_INV_MAX];

		for (j = 0; j < RW_RM_INV_MAX; j++)
			x0[j] = xb[j];
		x0[RW_RM_PAR_SW] =
		    lo + (hi - lo) * (double)k / (double)(np - 1);
		solve_from(d, d->ws->nl_prof, d->ws->u0_prof, x0,
		           &px[k * RW_RM_INV_MAX], &pchi2[k]);
		if (pchi2[k] < chi2b - 1e-6 &&
		    (better == 0 || pchi2[k] < pchi2[better - 1]))
			better = k + 1;
	}
	/* walk outward from the best estimate to the first node above the
	 * 68 % level; interpolate the crossing (see crossing()) */
	out->sw_lo = lo;
	out->sw_hi = hi;
	lo_k = 0;
	hi_k = np - 1;
	found = 0;
	for (k = np; k-- > 0;) {
		double swk = px[k * RW_RM_INV_MAX + RW_RM_PAR_SW];

		if (swk >= swb)
			continue;
		if (pchi2[k] > thr) {
			double s_in = swb, c_in = chi2b;

			if (k + 1 < np &&
			    px[(k + 1) * RW_RM_INV_MAX + RW_RM_PAR_SW] < swb) {
				s_in =
				    px[(k + 1) * RW_RM_INV_MAX + RW_RM_PAR_SW];
				c_in = pchi2[k + 1];
			}
			out->sw_lo =
			    swk + (s_in - swk) *
			              crossing(pchi2[k] - chi2b, c_in - chi2b);
			lo_k = k;
			found = 1;
			break;
		}
	}
	if (!found)
		lo_k = 0;
	found = 0;
	for (k = 0; k < np; k++) {
		double swk = px[k * RW_RM_INV_MAX + RW_RM_PAR_SW];

		if (swk <= swb)
			continue;
		if (pchi2[k] > thr) {
			double s_in = swb, c_in = chi2b;

			if (k > 0 &&
			    px[(k - 1) * RW_RM_INV_MAX + RW_RM_PAR_SW] > swb) {
				s_in =
				    px[(k - 1) * RW_RM_INV_MAX + RW_RM_PAR_SW];
				c_in = pchi2[k - 1];
			}
			out->sw_hi =
			    swk - (swk - s_in) *
			              crossing(pchi2[k] - chi2b, c_in - chi2b);
			hi_k = k;
			found = 1;
			break;
		}
	}
	if (!found)
		hi_k = np - 1;
	/* a node beyond the connected range that fits again: a second
	 * valley */
	for (k = 0; k < np; k++) {
		double swk = px[k * RW_RM_INV_MAX + RW_RM_PAR_SW];

		if ((k < lo_k && swk < out->sw_lo) ||
		    (k > hi_k && swk > out->sw_hi)) {
			if (pchi2[k] <= thr && !(out->alt_chi2 <= pchi2[k])) {
				out->alt_chi2 = pchi2[k];
				for (j = 0; j < RW_RM_INV_MAX; j++)
					out->alt_x[j] =
					    px[k * RW_RM_INV_MAX + j];
				out->flags |= RW_RM_INV_MULTIPLE;
			}
		}
	}
	return better;
}

int rw_rm_invert(const rw_rm_inv_cfg *cfg, const double *obs,
                 const double *sigma, rw_rm_ws *ws, rw_rm_inv_result *out)
{
	struct inv_data d;
	double xb[RW_RM_INV_MAX], chi2b = INFINITY, x0[RW_RM_INV_MAX];
	double sx[RW_RM_INV_MAX_STARTS][RW_RM_INV_MAX],
	    schi2[RW_RM_INV_MAX_STARTS];
	double pchi2[RW_RM_INV_MAX_PROFILE],
	    px[RW_RM_INV_MAX_PROFILE * RW_RM_INV_MAX];
	double lvl, dchi2, r[RW_RM_INV_MAX];
	size_t i, j, ns, dof;
	int any_conv = 0, singular, pass;

	if (out == NULL)
		return RW_EINVAL;
	result_nan(out);
	if (cfg == NULL || obs == NULL || sigma == NULL || ws == NULL)
		return RW_EINVAL;
	if (rw_rm_inv_check(cfg, NULL) != RW_OK)
		return RW_EINVAL;
	if (ws->n_obs != cfg->n_obs || ws->n_par != cfg->n_par ||
	    ws->nl == NULL)
		return RW_EINVAL;
	for (i = 0; i < cfg->n_obs; i++)
		if (!isfinite(obs[i]) || !isfinite(sigma[i]) ||
		    !(sigma[i] > 0.0))
			return RW_EDOM;
	d.cfg = cfg;
	d.obs = obs;
	d.sigma = sigma;
	d.ws = ws;
	d.n_eval = 0;
	d.n_fail = 0;

	/* multi-start: porosity and clay at mid-range, saturation spread */
	ns = cfg->n_starts;
	for (i = 0; i < RW_RM_INV_MAX; i++)
		xb[i] = NAN;
	for (i = 0; i < ns; i++) {
		d.n_free = cfg->n_par;
		for (j = 0; j < cfg->n_par; j++) {
			d.idx[j] = j;
			x0[j] = 0.5 * (cfg->lo[j] + cfg->hi[j]);
		}
		if (cfg->n_par < 3)
			x0[RW_RM_PAR_CLAY] = cfg->clay;
		x0[RW_RM_PAR_SW] =
		    cfg->lo[RW_RM_PAR_SW] +
		    (cfg->hi[RW_RM_PAR_SW] - cfg->lo[RW_RM_PAR_SW]) *
		        ((double)i + 0.5) / (double)ns;
		any_conv |=
		    solve_from(&d, ws->nl, ws->u0, x0, sx[i], &schi2[i]);
		if (schi2[i] < chi2b) {
			chi2b = schi2[i];
			for (j = 0; j < RW_RM_INV_MAX; j++)
				xb[j] = sx[i][j];
		}
	}
	if (!any_conv)
		out->flags |= RW_RM_INV_NOT_CONVERGED;

	/* profile along sw; a node that beats the best restarts the full
	 * fit from there (once) */
	for (pass = 0; cfg->n_profile >= 3 && pass < 2; pass++) {
		size_t better;

		out->flags &= ~RW_RM_INV_MULTIPLE;
		out->alt_chi2 = NAN;
		better = profile(&d, xb, chi2b, out, pchi2, px);
		if (better == 0 || pass == 1)
			break;
		d.n_free = cfg->n_par;
		for (j = 0; j < cfg->n_par; j++)
			d.idx[j] = j;
		{
			double xn[RW_RM_INV_MAX], cn;

			solve_from(&d, ws->nl, ws->u0,
			           &px[(better - 1) * RW_RM_INV_MAX], xn, &cn);
			if (cn < chi2b) {
				chi2b = cn;
				for (j = 0; j < RW_RM_INV_MAX; j++)
					xb[j] = xn[j];
			}
		}
	}

	/* the estimate and its covariance */
	for (j = 0; j < RW_RM_INV_MAX; j++)
		out->x[j] = xb[j];
	if (cfg->n_par < 3)
		out->x[RW_RM_PAR_CLAY] = cfg->clay;
	if (!resid_x(&d, out->x, r, &out->fit, &out->model_warn))
		out->flags |= RW_RM_INV_MODEL_FAIL;
	out->chi2 = chi2b;
	singular = covariance(&d, out->x, out);
	for (j = 0; j < cfg->n_par; j++)
		out->sd[j] = out->cov[j][j] >= 0.0 ? sqrt(out->cov[j][j]) : NAN;
	{
		/* Without a profile: the linear range. With one: the profile
		 * range, widened to the linear one up to a node spacing (the
		 * nodes cannot resolve a minimum sharper than that). */
		double s = out->sd[RW_RM_PAR_SW], sw = out->x[RW_RM_PAR_SW];
		double lo = cfg->lo[RW_RM_PAR_SW], hi = cfg->hi[RW_RM_PAR_SW];

		if (cfg->n_profile >= 3) {
			double h = (hi - lo) / (double)(cfg->n_profile - 1);

			s = isnan(s) ? h : fmin(s, h);
			out->sw_lo = fmin(out->sw_lo, fmax(lo, sw - s));
			out->sw_hi = fmax(out->sw_hi, fmin(hi, sw + s));
		} else if (isnan(s)) {
			out->sw_lo = lo;
			out->sw_hi = hi;
		} else {
			out->sw_lo = fmax(lo, sw - s);
			out->sw_hi = fmin(hi, sw + s);
		}
	}
	if (singular || !(out->sw_hi - out->sw_lo <= cfg->sw_width_max))
		out->flags |= RW_RM_INV_NONUNIQUE;

	/* another start that fits as well, somewhere else */
	dchi2 = gsl_cdf_chisq_Pinv(0.6827, (double)cfg->n_par);
	for (i = 0; i < ns; i++) {
		double dsw = fabs(sx[i][RW_RM_PAR_SW] - xb[RW_RM_PAR_SW]);
		double dphi = fabs(sx[i][RW_RM_PAR_PHI] - xb[RW_RM_PAR_PHI]);
		double ssw = out->sd[RW_RM_PAR_SW],
		       sphi = out->sd[RW_RM_PAR_PHI];

		int out_sw;

		if (!(schi2[i] <= chi2b + dchi2))
			continue;
		/* inside the 68 % range of sw it is the same valley */
		out_sw = dsw > fmax(0.05, 2.0 * ssw) &&
		         (sx[i][RW_RM_PAR_SW] < out->sw_lo ||
		          sx[i][RW_RM_PAR_SW] > out->sw_hi);
		if (!out_sw && !(dphi > fmax(0.01, 2.0 * sphi)))
			continue;
		if (!(out->alt_chi2 <= schi2[i])) {
			out->alt_chi2 = schi2[i];
			for (j = 0; j < RW_RM_INV_MAX; j++)
				out->alt_x[j] = sx[i][j];
		}
		out->flags |= RW_RM_INV_MULTIPLE;
	}

	/* bounds and the template's edge */
	for (j = 0; j < cfg->n_par; j++) {
		double tol = BOUND_RTOL * (cfg->hi[j] - cfg->lo[j]);

		if (out->x[j] - cfg->lo[j] <= tol ||
		    cfg->hi[j] - out->x[j] <= tol)
			out->flags |= j == RW_RM_PAR_PHI ? RW_RM_INV_BOUND_PHI
			              : j == RW_RM_PAR_SW
			                  ? RW_RM_INV_BOUND_SW
			                  : RW_RM_INV_BOUND_CLAY;
	}
	dof = cfg->n_obs > cfg->n_par ? cfg->n_obs - cfg->n_par : 1;
	lvl = gsl_cdf_chisq_Qinv(0.01, (double)dof);
	if (!(chi2b <= lvl))
		out->flags |= RW_RM_INV_OUTSIDE;
	if (d.n_fail > 0)
		out->flags |= RW_RM_INV_MODEL_FAIL;
	out->n_eval = d.n_eval;
	return RW_OK;
}
