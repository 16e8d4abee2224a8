/* Unit tests of the dry-frame pressure law and its fit (daemon/core/
 * framepress.c): exact recovery of a known law, the coverage of the
 * returned standard deviations over many noisy data sets (the
 * covariance must mean what it says), the scaling of the unweighted
 * covariance, the extrapolation flags and the errors. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "unit/rm_check.h"

/* An invented dry-frame bulk modulus law: 8 GPa at zero effective
 * pressure, 20 GPa asymptote, 12 MPa characteristic pressure; ten core
 * plugs' worth of pressures from 2 to 60 MPa. */
static const rw_rm_plaw truth = {20e9, 8e9, 12e6, 0.0, 60e6};
static const double pres[10] = {2e6,  5e6,  8e6,  12e6, 16e6,
                                20e6, 25e6, 32e6, 45e6, 60e6};

static double law(double p)
{
	return truth.m_inf_pa -
	       (truth.m_inf_pa - truth.m_0_pa) * exp(-p / truth.p_c_pa);
}

/* Noise-free data are fitted exactly: parameters to 1e-8, residual at
 * rounding level, from the generic start (no knowledge of the truth). */
static void test_exact(void **state)
{
	double m[10];
	rw_rm_pfit f;
	unsigned w = 99;
	size_t i;

	(void)state;
	for (i = 0; i < 10; i++)
		m[i] = law(pres[i]);
	assert_int_equal(rw_rm_plaw_fit(10, pres, m, NULL, &f, &w), RW_OK);
	assert_int_equal(w, 0);
	assert_rel(f.law.m_inf_pa, truth.m_inf_pa, 1e-8);
	assert_rel(f.law.m_0_pa, truth.m_0_pa, 1e-8);
	assert_rel(f.law.p_c_pa, truth.p_c_pa, 1e-8);
	assert_true(f.rms_pa < 1e-6 * truth.m_inf_pa);
	assert_int_equal(f.dof, 7);
	assert_rel(f.law.p_lo_pa, 2e6, 0.0);
	assert_rel(f.law.p_hi_pa, 60e6, 0.0);
}

/* The covariance means what it says: over 400 data sets with Gaussian
 * noise of 0.15 GPa (gsl_rng mt19937, fixed seed), each parameter lies
 * within one returned standard deviation of the truth in 68 % of the
 * fits for a linear model (Press et al. 2007 sec. 15.6, from memory);
 * the binomial spread of the fraction is 0.023, and the fit is only
 * mildly nonlinear here, so the check allows 0.58-0.78. Within three
 * standard deviations: at least 97 % (expected 99.7 %). The unweighted
 * fit of the same data (covariance scaled by chi2/dof) gives the same
 * estimate. */
static void test_coverage(void **state)
{
	gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
	const int runs = 400;
	int in1[3] = {0, 0, 0}, in3[3] = {0, 0, 0}, k;
	double m[10], s[10];
	size_t i, j;

	(void)state;
	gsl_rng_set(r, 20261212);
	for (k = 0; k < runs; k++) {
		rw_rm_pfit f, g;
		double want[3] = {truth.m_inf_pa, truth.m_0_pa, truth.p_c_pa};
		double got[3];

		for (i = 0; i < 10; i++) {
			s[i] = 0.15e9;
			m[i] = law(pres[i]) + gsl_ran_gaussian(r, s[i]);
		}
		assert_int_equal(rw_rm_plaw_fit(10, pres, m, s, &f, NULL),
		                 RW_OK);
		got[0] = f.law.m_inf_pa;
		got[1] = f.law.m_0_pa;
		got[2] = f.law.p_c_pa;
		for (j = 0; j < 3; j++) {
			double sd = sqrt(f.cov[j][j]);

			in1[j] += fabs(got[j] - want[j]) <= sd;
			in3[j] += fabs(got[j] - want[j]) <= 3.0 * sd;
		}
		assert_rel(f.cov[0][1], f.cov[1][0], 1e-10);
		assert_int_equal(rw_rm_plaw_fit(10, pres, m, NULL, &g, NULL),
		                 RW_OK);
		assert_rel(g.law.p_c_pa, f.law.p_c_pa, 1e-6);
		/* equal weights: cov = cov_weighted * (chi2_u / dof) / s^2 */
		assert_rel(g.cov[0][0],
		           f.cov[0][0] * g.chi2 / 7.0 / (s[0] * s[0]), 1e-5);
	}
	for (j = 0; j < 3; j++) {
		double fr = (double)in1[j] / runs;

		if (!(fr >= 0.58 && fr <= 0.78))
			fail_msg("parameter %zu: %.3f within 1 sd", j, fr);
		assert_true(in3[j] >= 0.97 * runs);
	}
	gsl_rng_free(r);
}

/* Evaluation: the law's own limits (m_0 at P = 0, m_inf far away), and
 * P_EXTRAP outside the fitted pressures. A fit to data that stop short
 * of the plateau (p_c above the highest pressure) is flagged. */
static void test_eval_and_extrapolation(void **state)
{
	rw_rm_plaw l = truth;
	double m, mm[4], pp[4] = {1e6, 2e6, 3e6, 4e6};
	rw_rm_pfit f;
	unsigned w;
	size_t i;

	(void)state;
	l.p_lo_pa = 2e6;
	assert_int_equal(rw_rm_plaw_eval(&l, 0.0, &m, &w), RW_OK);
	assert_rel(m, 8e9, 1e-15);
	assert_int_equal(w, RW_RM_WARN_P_EXTRAP);
	assert_int_equal(rw_rm_plaw_eval(&l, 30e6, &m, &w), RW_OK);
	assert_int_equal(w, 0);
	assert_rel(m, 20e9 - 12e9 * exp(-2.5), 1e-15);
	rw_rm_plaw_eval(&l, 1e9, &m, &w);
	assert_rel(m, 20e9, 1e-15);
	assert_int_equal(w, RW_RM_WARN_P_EXTRAP);
	for (i = 0; i < 4; i++)
		mm[i] = law(pp[i]);
	assert_int_equal(rw_rm_plaw_fit(4, pp, mm, NULL, &f, &w), RW_OK);
	assert_int_equal(w, RW_RM_WARN_P_EXTRAP);
	assert_rel(f.law.p_c_pa, 12e6, 1e-6);
}

static void test_errors(void **state)
{
	double p[4] = {1e6, 2e6, 2e6, 2e6}, m[4] = {1e9, 2e9, 2e9, 2e9};
	double s[4] = {1e8, 1e8, 0.0, 1e8}, v;
	rw_rm_pfit f;
	rw_rm_plaw l = truth;

	(void)state;
	/* fewer than three distinct pressures */
	assert_int_equal(rw_rm_plaw_fit(4, p, m, NULL, &f, NULL), RW_EINVAL);
	assert_true(isnan(f.law.m_inf_pa) && isnan(f.cov[0][0]));
	assert_int_equal(rw_rm_plaw_fit(2, p, m, NULL, &f, NULL), RW_EINVAL);
	assert_int_equal(rw_rm_plaw_fit(3, NULL, m, NULL, &f, NULL), RW_EINVAL);
	p[2] = 3e6;
	p[3] = 4e6;
	assert_int_equal(rw_rm_plaw_fit(4, p, m, s, &f, NULL), RW_EDOM);
	p[1] = -1.0;
	assert_int_equal(rw_rm_plaw_fit(4, p, m, NULL, &f, NULL), RW_EDOM);
	p[1] = 2e6;
	m[0] = 0.0;
	assert_int_equal(rw_rm_plaw_fit(4, p, m, NULL, &f, NULL), RW_EDOM);
	m[0] = NAN;
	assert_int_equal(rw_rm_plaw_fit(4, p, m, NULL, &f, NULL), RW_EDOM);
	assert_int_equal(rw_rm_plaw_eval(&l, -1.0, &v, NULL), RW_EDOM);
	assert_true(isnan(v));
	l.p_c_pa = 0.0;
	assert_int_equal(rw_rm_plaw_eval(&l, 1e6, &v, NULL), RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_exact),
	    cmocka_unit_test(test_coverage),
	    cmocka_unit_test(test_eval_and_extrapolation),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
