/* Effective-pressure law of a dry-frame modulus, the exponential form in
 * common use, M(P) = M_inf - (M_inf - M_0) exp(-P / P_c), and its
 * calibration to (pressure, modulus) core measurements by nonlinear least
 * squares with GSL. Contracts are in rockwire/rockmodel.h. */
#include <math.h>
#include <stddef.h>

#include <gsl/gsl_blas.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_multifit_nlinear.h>
#include <gsl/gsl_vector.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "status_gsl.h"

#define PFIT_MAX_ITER 200

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

int rw_rm_plaw_eval(const rw_rm_plaw *law, double p_eff_pa, double *m_pa,
                    unsigned *warn)
{
	warn_set(warn, 0);
	if (law == NULL || !isfinite(p_eff_pa) || p_eff_pa < 0.0 ||
	    !isfinite(law->m_inf_pa) || !isfinite(law->m_0_pa) ||
	    !isfinite(law->p_c_pa) || !(law->p_c_pa > 0.0)) {
		*m_pa = NAN;
		return RW_EDOM;
	}
	*m_pa = law->m_inf_pa -
	        (law->m_inf_pa - law->m_0_pa) * exp(-p_eff_pa / law->p_c_pa);
	if (!(p_eff_pa >= law->p_lo_pa && p_eff_pa <= law->p_hi_pa))
		warn_set(warn, RW_RM_WARN_P_EXTRAP);
	return RW_OK;
}

/* The fit runs on u = (m_inf / ms, m_0 / ms, ln(p_c / ps)) so that every
 * unknown is of order one and p_c stays positive. */
struct pfit_data {
	size_t n;
	const double *p, *m, *sigma;
	double ms, ps;
};

static int pfit_f(const gsl_vector *u, void *data, gsl_vector *f)
{
	const struct pfit_data *d = data;
	double minf = gsl_vector_get(u, 0) * d->ms;
	double m0 = gsl_vector_get(u, 1) * d->ms;
	double pc = exp(gsl_vector_get(u, 2)) * d->ps;
	size_t i;

	if (!isfinite(pc) || !(pc > 0.0))
		return GSL_EDOM;
	for (i = 0; i < d->n; i++) {
		double mod = minf - (minf - m0) * exp(-d->p[i] / pc);
		double s = d->sigma ? d->sigma[i] : d->ms;

		gsl_vector_set(f, i, (mod - d->m[i]) / s);
	}
	return GSL_SUCCESS;
}

static int pfit_df(const gsl_vector *u, void *data, gsl_matrix *j)
{
	const struct pfit_data *d = data;
	double minf = gsl_vector_get(u, 0) * d->ms;
	double m0 = gsl_vector_get(u, 1) * d->ms;
	double pc = exp(gsl_vector_get(u, 2)) * d->ps;
	size_t i;

	for (i = 0; i < d->n; i++) {
		double e = exp(-d->p[i] / pc);
		double s = d->sigma ? d->sigma[i] : d->ms;

		gsl_matrix_set(j, i, 0, (1.0 - e) * d->ms / s);
		gsl_matrix_set(j, i, 1, e * d->ms / s);
		/* dM/d ln(p_c) = -(m_inf - m_0) e p / p_c */
		gsl_matrix_set(j, i, 2, -(minf - m0) * e * d->p[i] / pc / s);
	}
	return GSL_SUCCESS;
}

static void pfit_nan(rw_rm_pfit *out)
{
	size_t i, j;

	out->law.m_inf_pa = NAN;
	out->law.m_0_pa = NAN;
	out->law.p_c_pa = NAN;
	out->law.p_lo_pa = NAN;
	out->law.p_hi_pa = NAN;
	for (i = 0; i < 3; i++)
		for (j = 0; j < 3; j++)
			out->cov[i][j] = NAN;
	out->chi2 = NAN;
	out->rms_pa = NAN;
	out->dof = 0;
	out->n_iter = 0;
}

int rw_rm_plaw_fit(size_t n, const double *p_pa, const double *m_pa,
                   const double *sigma_pa, rw_rm_pfit *out, unsigned *warn)
{
	gsl_multifit_nlinear_fdf fdf;
	gsl_multifit_nlinear_parameters prm =
	    gsl_multifit_nlinear_default_parameters();
	gsl_multifit_nlinear_workspace *w = NULL;
	gsl_matrix *jac = NULL, *cov = NULL;
	gsl_vector *u0 = NULL;
	struct pfit_data d;
	double pmin = INFINITY, pmax = -INFINITY, mmin = INFINITY,
	       mmax = -INFINITY, minf, m0, pc, ss = 0.0, chi2 = 0.0;
	size_t i, j, ndist = 0;
	int info, st, ret = RW_OK;

	warn_set(warn, 0);
	if (out == NULL)
		return RW_EINVAL;
	pfit_nan(out);
	if (p_pa == NULL || m_pa == NULL || n < 3)
		return RW_EINVAL;
	for (i = 0; i < n; i++) {
		if (!isfinite(p_pa[i]) || !isfinite(m_pa[i]) || p_pa[i] < 0.0 ||
		    !(m_pa[i] > 0.0) ||
		    (sigma_pa && !(isfinite(sigma_pa[i]) && sigma_pa[i] > 0.0)))
			return RW_EDOM;
		for (j = 0; j < i; j++)
			if (p_pa[j] == p_pa[i])
				break;
		if (j == i)
			ndist++;
		pmin = fmin(pmin, p_pa[i]);
		pmax = fmax(pmax, p_pa[i]);
		mmin = fmin(mmin, m_pa[i]);
		mmax = fmax(mmax, m_pa[i]);
	}
	if (ndist < 3)
		return RW_EINVAL;
	d.n = n;
	d.p = p_pa;
	d.m = m_pa;
	d.sigma = sigma_pa;
	d.ms = mmax;
	d.ps = pmax;
	fdf.f = pfit_f;
	fdf.df = pfit_df;
	fdf.fvv = NULL;
	fdf.n = n;
	fdf.p = 3;
	fdf.params = &d;
	w = gsl_multifit_nlinear_alloc(gsl_multifit_nlinear_trust, &prm, n, 3);
	u0 = gsl_vector_alloc(3);
	jac = gsl_matrix_alloc(n, 3);
	cov = gsl_matrix_alloc(3, 3);
	if (!w || !u0 || !jac || !cov) {
		ret = RW_ERANGE;
		goto out;
	}
	/* start: plateau at the largest value, zero-pressure value a little
	 * below the smallest, p_c a third of the measured range */
	gsl_vector_set(u0, 0, 1.0);
	gsl_vector_set(u0, 1, (mmin - 0.1 * (mmax - mmin)) / mmax);
	gsl_vector_set(u0, 2, log(fmax(pmax - pmin, 1e-3 * pmax) / 3.0 / pmax));
	st = gsl_multifit_nlinear_init(u0, &fdf, w);
	if (st == GSL_SUCCESS)
		st = gsl_multifit_nlinear_driver(PFIT_MAX_ITER, 1e-12, 1e-12,
		                                 0.0, NULL, NULL, &info, w);
	/* GSL_ENOPROG: no step lowers the misfit further, i.e. a minimum
	 * reached to rounding. */
	if (st != GSL_SUCCESS && st != GSL_ENOPROG) {
		ret = st == GSL_EMAXITER ? RW_EMAXITER : rw__from_gsl(st);
		goto out;
	}
	minf = gsl_vector_get(w->x, 0) * d.ms;
	m0 = gsl_vector_get(w->x, 1) * d.ms;
	pc = exp(gsl_vector_get(w->x, 2)) * d.ps;
	/* Jacobian of the weighted residuals in (m_inf, m_0, p_c) */
	for (i = 0; i < n; i++) {
		double e = exp(-p_pa[i] / pc);
		double s = sigma_pa ? sigma_pa[i] : 1.0;
		double r = minf - (minf - m0) * e - m_pa[i];

		gsl_matrix_set(jac, i, 0, (1.0 - e) / s);
		gsl_matrix_set(jac, i, 1, e / s);
		gsl_matrix_set(jac, i, 2,
		               -(minf - m0) * e * p_pa[i] / (pc * pc) / s);
		ss += r * r;
		chi2 += (r / s) * (r / s);
	}
	st = gsl_multifit_nlinear_covar(jac, 0.0, cov);
	if (st != GSL_SUCCESS) {
		ret = rw__from_gsl(st);
		goto out;
	}
	out->law.m_inf_pa = minf;
	out->law.m_0_pa = m0;
	out->law.p_c_pa = pc;
	out->law.p_lo_pa = pmin;
	out->law.p_hi_pa = pmax;
	out->dof = n - 3;
	out->chi2 = chi2;
	out->rms_pa = sqrt(ss / (double)n);
	out->n_iter = gsl_multifit_nlinear_niter(w);
	for (i = 0; i < 3; i++) {
		for (j = 0; j < 3; j++) {
			double c = gsl_matrix_get(cov, i, j);

			if (sigma_pa == NULL)
				c = out->dof > 0 ? c * chi2 / (double)out->dof
				                 : NAN;
			out->cov[i][j] = c;
		}
	}
	if (pc > pmax)
		warn_set(warn, RW_RM_WARN_P_EXTRAP);
out:
	gsl_multifit_nlinear_free(w);
	gsl_vector_free(u0);
	gsl_matrix_free(jac);
	gsl_matrix_free(cov);
	return ret;
}
