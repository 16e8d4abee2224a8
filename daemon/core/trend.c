/* Normal compaction trend of shale sonic slowness with depth below the
 * mudline for the rockwire core: selection of the samples to fit (depth
 * intervals, shale cut-off, exclusions), least-squares fits of the
 * exponential and the log-linear forms with GSL (gsl_fit_linear,
 * gsl_multifit_nlinear), and evaluation with the fit's standard error.
 * Contracts are in rockwire/pressure.h. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_blas.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_multifit_nlinear.h>
#include <gsl/gsl_vector.h>

#include "rockwire/pressure.h"
#include "status_gsl.h"

/* Decay constants accepted, 1/m (half-depths of about 7 m to 700 km):
 * outside, the fit is not describing compaction. */
#define C_MIN 1e-6
#define C_MAX 1e-1
/* Points of the start-up scan of c, log-spaced over [C_MIN, C_MAX]. */
#define C_SCAN 121
/* Slowness scale inside the fit: us/m keeps the parameters near 1-1000. */
#define DT_SCALE 1e6
/* Levenberg-Marquardt stopping tolerances and iteration cap. */
#define LM_XTOL   1e-12
#define LM_GTOL   1e-12
#define LM_FTOL   0.0
#define LM_MAXIT  500
#define EXP_NPAR  3
#define EXP_MIN_N 4
#define LL_MIN_N  3

struct rw_pres_trend_ws {
	size_t n_max;
	double *s; /* depths of the used samples, m below mudline */
	double *y; /* slownesses, us/m (EXP) or ln(dt) (LOGLIN) */
	double *x; /* scratch: exp(-c s) in the scan */
	size_t m;  /* samples in use for the current fit */
	gsl_multifit_nlinear_workspace *nl;
	gsl_matrix *covar;
};

static void trend_nan(rw_pres_trend *t, int form)
{
	int i, j;

	t->form = form;
	t->dt_ma_sm = NAN;
	t->dt_ml_sm = NAN;
	t->c_per_m = NAN;
	for (i = 0; i < 3; i++)
		for (j = 0; j < 3; j++)
			t->cov[i][j] = NAN;
	t->rms_sm = NAN;
	t->s_min_m = NAN;
	t->s_max_m = NAN;
	t->n_used = 0;
}

int rw_pres_trend_given(int form, double dt_ma_sm, double dt_ml_sm,
                        double c_per_m, double s_min_m, double s_max_m,
                        rw_pres_trend *t)
{
	int span_nan = isnan(s_min_m) && isnan(s_max_m);

	trend_nan(t, form);
	if (form != RW_PRES_TREND_EXP && form != RW_PRES_TREND_LOGLIN)
		return RW_EINVAL;
	if (!isfinite(dt_ml_sm) || !(dt_ml_sm > 0.0) || !isfinite(c_per_m) ||
	    !(c_per_m > 0.0))
		return RW_EDOM;
	if (form == RW_PRES_TREND_EXP &&
	    (!isfinite(dt_ma_sm) || !(dt_ma_sm > 0.0) || dt_ma_sm >= dt_ml_sm))
		return RW_EDOM;
	if (!span_nan && (!isfinite(s_min_m) || !isfinite(s_max_m) ||
	                  s_min_m < 0.0 || s_max_m < s_min_m))
		return RW_EDOM;
	t->dt_ma_sm = form == RW_PRES_TREND_EXP ? dt_ma_sm : NAN;
	t->dt_ml_sm = dt_ml_sm;
	t->c_per_m = c_per_m;
	t->s_min_m = s_min_m;
	t->s_max_m = s_max_m;
	return RW_OK;
}

int rw_pres_trend_select(size_t n, const double *z_m, const double *dt_sm,
                         const double *vsh, double vsh_min,
                         const unsigned char *exclude, size_t n_int,
                         const double *top_m, const double *base_m,
                         unsigned char *use, size_t *n_use)
{
	size_t i, k, count = 0;

	if (n_use)
		*n_use = 0;
	if (n > 0 && (!z_m || !dt_sm || !use))
		return RW_EINVAL;
	if (n_int > 0 && (!top_m || !base_m))
		return RW_EINVAL;
	if (n > 0)
		memset(use, 0, n);
	for (k = 0; k < n_int; k++)
		if (!isfinite(top_m[k]) || !isfinite(base_m[k]) ||
		    top_m[k] > base_m[k])
			return RW_EDOM;
	if (vsh && (!isfinite(vsh_min) || vsh_min < 0.0 || vsh_min > 1.0))
		return RW_EDOM;
	for (i = 0; i < n; i++) {
		int in = n_int == 0;

		if (!isfinite(z_m[i]) || !isfinite(dt_sm[i]) ||
		    !(dt_sm[i] > 0.0))
			continue;
		if (exclude && exclude[i])
			continue;
		if (vsh && !(isfinite(vsh[i]) && vsh[i] >= vsh_min))
			continue;
		for (k = 0; k < n_int && !in; k++)
			in = z_m[i] >= top_m[k] && z_m[i] <= base_m[k];
		if (in) {
			use[i] = 1;
			count++;
		}
	}
	if (n_use)
		*n_use = count;
	return RW_OK;
}

void rw_pres_trend_ws_free(rw_pres_trend_ws *ws)
{
	if (!ws)
		return;
	if (ws->nl)
		gsl_multifit_nlinear_free(ws->nl);
	if (ws->covar)
		gsl_matrix_free(ws->covar);
	free(ws->s);
	free(ws->y);
	free(ws->x);
	free(ws);
}

rw_pres_trend_ws *rw_pres_trend_ws_new(size_t n_max)
{
	gsl_multifit_nlinear_parameters par;
	rw_pres_trend_ws *ws;

	if (n_max < EXP_MIN_N)
		return NULL;
	ws = calloc(1, sizeof *ws);
	if (!ws)
		return NULL;
	ws->n_max = n_max;
	ws->s = malloc(n_max * sizeof *ws->s);
	ws->y = malloc(n_max * sizeof *ws->y);
	ws->x = malloc(n_max * sizeof *ws->x);
	par = gsl_multifit_nlinear_default_parameters();
	ws->nl = gsl_multifit_nlinear_alloc(gsl_multifit_nlinear_trust, &par,
	                                    n_max, EXP_NPAR);
	ws->covar = gsl_matrix_alloc(EXP_NPAR, EXP_NPAR);
	if (!ws->s || !ws->y || !ws->x || !ws->nl || !ws->covar) {
		rw_pres_trend_ws_free(ws);
		return NULL;
	}
	return ws;
}

/* Residuals of the exponential form, parameters (dt_ma, dt_ml, ln c) with
 * slownesses in us/m. Rows past the samples in use (the workspace holds
 * n_max) are zero and do not change the solution or J^T J. */
static int exp_f(const gsl_vector *p, void *data, gsl_vector *f)
{
	const rw_pres_trend_ws *ws = data;
	double ma = gsl_vector_get(p, 0), ml = gsl_vector_get(p, 1);
	double c = exp(gsl_vector_get(p, 2));
	size_t i;

	for (i = 0; i < ws->n_max; i++) {
		double r = 0.0;

		if (i < ws->m)
			r = ma + (ml - ma) * exp(-c * ws->s[i]) - ws->y[i];
		gsl_vector_set(f, i, r);
	}
	return GSL_SUCCESS;
}

static int exp_df(const gsl_vector *p, void *data, gsl_matrix *j)
{
	const rw_pres_trend_ws *ws = data;
	double ma = gsl_vector_get(p, 0), ml = gsl_vector_get(p, 1);
	double c = exp(gsl_vector_get(p, 2));
	size_t i;

	for (i = 0; i < ws->n_max; i++) {
		double e = 0.0, s = 0.0;

		if (i < ws->m) {
			s = ws->s[i];
			e = exp(-c * s);
		}
		gsl_matrix_set(j, i, 0, i < ws->m ? 1.0 - e : 0.0);
		gsl_matrix_set(j, i, 1, e);
		gsl_matrix_set(j, i, 2, -(ml - ma) * c * s * e);
	}
	return GSL_SUCCESS;
}

/* Copies the used samples into the workspace; checks their domain and
 * the depth span. ln_y: store ln(dt) instead of dt in us/m. */
static int gather(rw_pres_trend_ws *ws, size_t n, const double *s_bml,
                  const double *dt, const unsigned char *use, int ln_y,
                  double *smin, double *smax)
{
	size_t i, m = 0;

	*smin = INFINITY;
	*smax = -INFINITY;
	for (i = 0; i < n; i++) {
		if (use && !use[i])
			continue;
		if (!isfinite(s_bml[i]) || s_bml[i] < 0.0 || !isfinite(dt[i]) ||
		    !(dt[i] > 0.0))
			return RW_EDOM;
		if (m == ws->n_max)
			return RW_EINVAL;
		ws->s[m] = s_bml[i];
		ws->y[m] = ln_y ? log(dt[i]) : dt[i] * DT_SCALE;
		*smin = fmin(*smin, s_bml[i]);
		*smax = fmax(*smax, s_bml[i]);
		m++;
	}
	ws->m = m;
	return RW_OK;
}

/* RMS slowness residual (s/m) of the gathered samples under trend t. */
static double rms_of(const rw_pres_trend_ws *ws, const rw_pres_trend *t,
                     int ln_y)
{
	double ss = 0.0, dt, obs;
	size_t i;

	for (i = 0; i < ws->m; i++) {
		rw_pres_trend_eval(t, ws->s[i], &dt, NULL, NULL);
		obs = ln_y ? exp(ws->y[i]) : ws->y[i] / DT_SCALE;
		ss += (obs - dt) * (obs - dt);
	}
	return sqrt(ss / (double)ws->m);
}

static int fit_loglin(rw_pres_trend_ws *ws, rw_pres_trend *t)
{
	double a, b, c00, c01, c11, ss, dtml;
	int s;

	if (ws->m < LL_MIN_N)
		return RW_EINVAL;
	s = gsl_fit_linear(ws->s, 1, ws->y, 1, ws->m, &a, &b, &c00, &c01, &c11,
	                   &ss);
	if (s != GSL_SUCCESS)
		return rw__from_gsl(s);
	if (!isfinite(a) || !isfinite(b) || !isfinite(c00) || !isfinite(c11))
		return RW_ERANGE;
	if (-b < C_MIN || -b > C_MAX)
		return RW_ERANGE;
	dtml = exp(a);
	t->dt_ml_sm = dtml;
	t->c_per_m = -b;
	/* (ln dt_ml, -c) -> (dt_ml, c): J = diag(dt_ml, -1) */
	t->cov[1][1] = dtml * dtml * c00;
	t->cov[1][2] = t->cov[2][1] = -dtml * c01;
	t->cov[2][2] = c11;
	return RW_OK;
}

static int fit_exp(rw_pres_trend_ws *ws, rw_pres_trend *t)
{
	gsl_multifit_nlinear_fdf fdf;
	double p0[EXP_NPAR], best = INFINITY, chisq, s2, c, jt[EXP_NPAR];
	gsl_vector_view pv;
	gsl_matrix *jac;
	size_t k, i;
	int s, info, a, b;

	if (ws->m < EXP_MIN_N)
		return RW_EINVAL;
	/* start: scan c; for fixed c the model is linear in (dt_ma, A) */
	for (k = 0; k < C_SCAN; k++) {
		double ck =
		    C_MIN * pow(C_MAX / C_MIN, (double)k / (C_SCAN - 1));
		double c0, c1, v00, v01, v11, ss;

		for (i = 0; i < ws->m; i++)
			ws->x[i] = exp(-ck * ws->s[i]);
		if (gsl_fit_linear(ws->x, 1, ws->y, 1, ws->m, &c0, &c1, &v00,
		                   &v01, &v11, &ss) != GSL_SUCCESS ||
		    !isfinite(ss))
			continue;
		if (ss < best) {
			best = ss;
			p0[0] = c0;
			p0[1] = c0 + c1;
			p0[2] = log(ck);
		}
	}
	/* the best start has slowness rising with depth: no compaction */
	if (!isfinite(best) || !(p0[1] > p0[0]))
		return RW_ERANGE;

	fdf.f = exp_f;
	fdf.df = exp_df;
	fdf.fvv = NULL;
	fdf.n = ws->n_max;
	fdf.p = EXP_NPAR;
	fdf.params = ws;
	pv = gsl_vector_view_array(p0, EXP_NPAR);
	s = gsl_multifit_nlinear_init(&pv.vector, &fdf, ws->nl);
	if (s != GSL_SUCCESS)
		return rw__from_gsl(s);
	s = gsl_multifit_nlinear_driver(LM_MAXIT, LM_XTOL, LM_GTOL, LM_FTOL,
	                                NULL, NULL, &info, ws->nl);
	if (s != GSL_SUCCESS)
		return s == GSL_EMAXITER ? RW_EMAXITER : rw__from_gsl(s);
	for (i = 0; i < EXP_NPAR; i++)
		p0[i] =
		    gsl_vector_get(gsl_multifit_nlinear_position(ws->nl), i);
	c = exp(p0[2]);
	if (!isfinite(p0[0]) || !isfinite(p0[1]) || !(p0[0] > 0.0) ||
	    !(p0[1] > p0[0]) || !isfinite(c) || c < C_MIN || c > C_MAX)
		return RW_ERANGE;
	jac = gsl_multifit_nlinear_jac(ws->nl);
	s = gsl_multifit_nlinear_covar(jac, 0.0, ws->covar);
	if (s != GSL_SUCCESS)
		return RW_ERANGE;
	gsl_blas_ddot(gsl_multifit_nlinear_residual(ws->nl),
	              gsl_multifit_nlinear_residual(ws->nl), &chisq);
	s2 = chisq / (double)(ws->m - EXP_NPAR);
	/* (dt_ma, dt_ml) us/m -> s/m; ln c -> c: J = diag(1e-6, 1e-6, c) */
	jt[0] = jt[1] = 1.0 / DT_SCALE;
	jt[2] = c;
	for (a = 0; a < EXP_NPAR; a++)
		for (b = 0; b < EXP_NPAR; b++) {
			double v = gsl_matrix_get(ws->covar, a, b);

			if (!isfinite(v))
				return RW_ERANGE;
			t->cov[a][b] = s2 * jt[a] * v * jt[b];
		}
	if (!(t->cov[0][0] >= 0.0 && t->cov[1][1] >= 0.0 &&
	      t->cov[2][2] >= 0.0))
		return RW_ERANGE;
	t->dt_ma_sm = p0[0] / DT_SCALE;
	t->dt_ml_sm = p0[1] / DT_SCALE;
	t->c_per_m = c;
	return RW_OK;
}

int rw_pres_trend_fit(rw_pres_trend_ws *ws, int form, size_t n,
                      const double *s_bml_m, const double *dt_sm,
                      const unsigned char *use, rw_pres_trend *t)
{
	double smin, smax;
	int s, ln_y = form == RW_PRES_TREND_LOGLIN;

	if (!t)
		return RW_EINVAL;
	trend_nan(t, form);
	if (form != RW_PRES_TREND_EXP && form != RW_PRES_TREND_LOGLIN)
		return RW_EINVAL;
	if (!ws || (n > 0 && (!s_bml_m || !dt_sm)))
		return RW_EINVAL;
	s = gather(ws, n, s_bml_m, dt_sm, use, ln_y, &smin, &smax);
	if (s != RW_OK)
		return s;
	if (ws->m == 0 || !(smax > smin))
		return RW_EINVAL;
	s = ln_y ? fit_loglin(ws, t) : fit_exp(ws, t);
	if (s != RW_OK) {
		trend_nan(t, form);
		return s;
	}
	t->s_min_m = smin;
	t->s_max_m = smax;
	t->n_used = ws->m;
	t->rms_sm = rms_of(ws, t, ln_y);
	return RW_OK;
}

int rw_pres_trend_eval(const rw_pres_trend *t, double s_bml_m, double *dt_sm,
                       double *sigma_sm, unsigned *warn)
{
	double e, dt, j[3], var = 0.0;
	int a, b, lo;
	unsigned w = 0;

	if (warn)
		*warn = 0;
	*dt_sm = NAN;
	if (sigma_sm)
		*sigma_sm = NAN;
	if (t->form != RW_PRES_TREND_EXP && t->form != RW_PRES_TREND_LOGLIN)
		return RW_EINVAL;
	if (!isfinite(t->dt_ml_sm) || !isfinite(t->c_per_m) ||
	    (t->form == RW_PRES_TREND_EXP && !isfinite(t->dt_ma_sm)))
		return RW_EINVAL;
	if (!isfinite(s_bml_m) || s_bml_m < 0.0)
		return RW_EDOM;
	e = exp(-t->c_per_m * s_bml_m);
	if (t->form == RW_PRES_TREND_EXP) {
		dt = t->dt_ma_sm + (t->dt_ml_sm - t->dt_ma_sm) * e;
		j[0] = 1.0 - e;
		j[1] = e;
		j[2] = -(t->dt_ml_sm - t->dt_ma_sm) * s_bml_m * e;
		lo = 0;
	} else {
		dt = t->dt_ml_sm * e;
		j[0] = 0.0;
		j[1] = e;
		j[2] = -s_bml_m * dt;
		lo = 1;
	}
	if (isnan(t->s_min_m) || isnan(t->s_max_m))
		w |= RW_PRES_WARN_TREND_NORANGE;
	else if (s_bml_m < t->s_min_m || s_bml_m > t->s_max_m)
		w |= RW_PRES_WARN_TREND_EXTRAPOLATED;
	if (dt < RW_PRES_DT_FASTEST)
		w |= RW_PRES_WARN_TREND_FAST;
	for (a = lo; a < 3; a++)
		for (b = lo; b < 3; b++)
			var += j[a] * t->cov[a][b] * j[b];
	*dt_sm = dt;
	if (sigma_sm)
		*sigma_sm = isfinite(var) && var >= 0.0 ? sqrt(var) : NAN;
	if (warn)
		*warn = w;
	return RW_OK;
}
