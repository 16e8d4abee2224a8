/* AVO fits of a gather's amplitudes: two-term (intercept, gradient) and
 * three-term (with curvature) least squares by GSL's multifit, with the
 * covariance of the terms and the residual; and the linearised PS
 * reflection coefficient of Aki & Richards 1980. Conventions are in
 * include/rockwire/seismic.h. */
#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit.h>

#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

/* Below this reciprocal condition number the design is nearly singular
 * (this project's choice: a millionth of single precision). */
#define RCOND_WARN 1e-8

/* Singular values at or below this fraction of the largest (of the design
 * after GSL's column balancing) count as zero: repeated angles that leave
 * fewer distinct values than terms give exact zeros plus rounding of
 * order 1e-16, well below it. */
#define RANK_TOL 1e-12

struct rw_seis_avo_fitter {
	size_t max;
	gsl_multifit_linear_workspace *ws;
	double *x; /* max x 3 design */
	double *y; /* max amplitudes */
};

rw_seis_avo_fitter *rw_seis_avo_fitter_new(size_t max_angles)
{
	rw_seis_avo_fitter *f;

	if (max_angles < 2 || max_angles > ((size_t)1 << 24))
		return NULL;
	f = calloc(1, sizeof *f);
	if (f == NULL)
		return NULL;
	f->max = max_angles;
	f->ws = gsl_multifit_linear_alloc(max_angles, 3);
	f->x = malloc(max_angles * 3 * sizeof(double));
	f->y = malloc(max_angles * sizeof(double));
	if (f->ws == NULL || f->x == NULL || f->y == NULL) {
		rw_seis_avo_fitter_free(f);
		return NULL;
	}
	return f;
}

void rw_seis_avo_fitter_free(rw_seis_avo_fitter *f)
{
	if (f == NULL)
		return;
	if (f->ws != NULL)
		gsl_multifit_linear_free(f->ws);
	free(f->x);
	free(f->y);
	free(f);
}

static void result_nan(rw_seis_avo_result *r)
{
	int i, j;

	r->a = r->b = r->c = NAN;
	for (i = 0; i < 3; i++)
		for (j = 0; j < 3; j++)
			r->cov[i][j] = NAN;
	r->sigma = r->rms = r->rcond = NAN;
	r->m = 0;
}

int rw_seis_avo_fit(rw_seis_avo_fitter *f, const double *theta_rad,
                    const double *amp, size_t n, size_t stride,
                    rw_seis_avo_model model, double theta_min, double theta_max,
                    rw_seis_avo_result *out, unsigned *warn)
{
	gsl_matrix_view xv, covv;
	gsl_vector_view yv;
	gsl_vector *c;
	double cbuf[3], covbuf[9], chisq, coef[3];
	gsl_vector_view cv;
	size_t i, m = 0, p, rank = 0, j, k;
	int st;

	if (out == NULL)
		return RW_EDOM;
	result_nan(out);
	if (warn != NULL)
		*warn = 0;
	if (f == NULL || theta_rad == NULL || amp == NULL || n > f->max ||
	    stride == 0 ||
	    (model != RW_SEIS_AVO_TWO && model != RW_SEIS_AVO_THREE) ||
	    !isfinite(theta_min) || !isfinite(theta_max) ||
	    theta_min > theta_max)
		return RW_EDOM;
	p = (size_t)model;
	for (i = 0; i < n; i++) {
		double th = theta_rad[i], y = amp[i * stride], s2, t2;

		if (!isfinite(th) || th < 0.0 || th >= M_PI_2)
			return RW_EDOM;
		if (th < theta_min || th > theta_max)
			continue;
		if (!isfinite(y)) {
			if (warn != NULL)
				*warn |= RW_SEIS_WARN_AVO_PARTIAL;
			continue;
		}
		s2 = sin(th) * sin(th);
		t2 = tan(th) * tan(th);
		f->x[m * p] = 1.0;
		f->x[m * p + 1] = s2;
		if (p == 3)
			f->x[m * p + 2] = t2 - s2;
		f->y[m] = y;
		m++;
	}
	if (m < p)
		return RW_EINVAL;
	xv = gsl_matrix_view_array(f->x, m, p);
	yv = gsl_vector_view_array(f->y, m);
	cv = gsl_vector_view_array(cbuf, p);
	covv = gsl_matrix_view_array(covbuf, p, p);
	c = &cv.vector;
	/* truncated SVD: the rank says whether the angles fix every term */
	st = gsl_multifit_linear_tsvd(&xv.matrix, &yv.vector, RANK_TOL, c,
	                              &covv.matrix, &chisq, &rank, f->ws);
	if (st != GSL_SUCCESS || rank < p)
		return RW_EINVAL;
	for (j = 0; j < p; j++)
		coef[j] = gsl_vector_get(c, j);
	out->a = coef[0];
	out->b = coef[1];
	out->c = p == 3 ? coef[2] : NAN;
	out->m = m;
	out->rms = sqrt(chisq / (double)m);
	out->rcond = gsl_multifit_linear_rcond(f->ws);
	if (warn != NULL && !(out->rcond >= RCOND_WARN))
		*warn |= RW_SEIS_WARN_AVO_ILL_COND;
	if (m == p) {
		/* an exact fit: no residual degrees of freedom */
		if (warn != NULL)
			*warn |= RW_SEIS_WARN_AVO_NO_DOF;
		return RW_OK;
	}
	/* GSL's covariance is chisq / (m - rank) (X^T X)^-1 */
	out->sigma = sqrt(chisq / (double)(m - p));
	for (j = 0; j < p; j++)
		for (k = 0; k < p; k++)
			out->cov[j][k] = gsl_matrix_get(&covv.matrix, j, k);
	return RW_OK;
}

/* ---- linearised PS --------------------------------------------------- */

int rw_seis_ps_aki_richards(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r)
{
	double p, vp, vs, rho, dvs, drho, si2, sj1, sj2, ci, cj, ti, tj;

	if (r == NULL)
		return RW_EDOM;
	*r = NAN;
	if (rw_reflect_medium_check(upper) != RW_OK ||
	    rw_reflect_medium_check(lower) != RW_OK || !(upper->vs_ms > 0.0) ||
	    !(lower->vs_ms > 0.0) || !isfinite(theta_rad) || theta_rad < 0.0 ||
	    theta_rad >= M_PI_2)
		return RW_EDOM;
	p = sin(theta_rad) / upper->vp_ms;
	si2 = p * lower->vp_ms;
	if (!(si2 < 1.0))
		return RW_ERANGE;
	sj1 = p * upper->vs_ms;
	sj2 = p * lower->vs_ms;
	/* average P and S angles across the interface (Snell) */
	ti = 0.5 * (theta_rad + asin(si2));
	tj = 0.5 * (asin(sj1) + asin(sj2));
	ci = cos(ti);
	cj = cos(tj);
	vp = 0.5 * (upper->vp_ms + lower->vp_ms);
	vs = 0.5 * (upper->vs_ms + lower->vs_ms);
	rho = 0.5 * (upper->rho_kgm3 + lower->rho_kgm3);
	dvs = (lower->vs_ms - upper->vs_ms) / vs;
	drho = (lower->rho_kgm3 - upper->rho_kgm3) / rho;
	{
		double b2p2 = vs * vs * p * p;
		double cc = vs * vs * (ci / vp) * (cj / vs);

		*r = -(p * vp / (2.0 * cj)) *
		     ((1.0 - 2.0 * b2p2 + 2.0 * cc) * drho -
		      (4.0 * b2p2 - 4.0 * cc) * dvs);
	}
	return RW_OK;
}
