/* Unit tests of the AVO least-squares fits and the linearised PS
 * coefficient (daemon/core/avofit.c): exact two- and three-term gathers
 * return their terms, the variances against the textbook closed form of
 * straight-line regression, nulls, angle ranges, the degenerate designs,
 * the PS form against the exact Zoeppritz rps, and the error cases.
 * numpy.linalg.lstsq is the outside reference in
 * tests/reference/test_seismic_numpy.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define DEG (M_PI / 180.0)

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

/* The least-squares intercept and gradient of an exact two-term gather
 * return its A and B (a fit of exact data must return the data's
 * coefficients), and the three-term fit of an
 * exact three-term gather returns A, B, C; the residual is zero to
 * rounding. Amplitudes from rw_reflect_shuey2/3 of an interface, whose
 * terms rw_reflect_shuey_terms gives (Shuey 1985). */
static void test_exact_gathers(void **state)
{
	rw_reflect_medium u = {2900.0, 1400.0, 2400.0},
	                  l = {3300.0, 1950.0, 2300.0};
	double th[31], amp[31], a, b, c;
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(31);
	rw_seis_avo_result r;
	unsigned warn;
	size_t i;

	(void)state;
	assert_non_null(f);
	assert_int_equal(rw_reflect_shuey_terms(&u, &l, &a, &b, &c), RW_OK);
	for (i = 0; i < 31; i++) {
		th[i] = (double)i * DEG;
		assert_int_equal(rw_reflect_shuey2(&u, &l, th[i], &amp[i]),
		                 RW_OK);
	}
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 31, 1, RW_SEIS_AVO_TWO,
	                                 0.0, 30.0 * DEG, &r, &warn),
	                 RW_OK);
	assert_int_equal(warn, 0);
	assert_true(fabs(r.a - a) <= 1e-12 && fabs(r.b - b) <= 1e-12);
	assert_true(isnan(r.c));
	assert_true(r.rms <= 1e-15 && r.m == 31);
	for (i = 0; i < 31; i++)
		assert_int_equal(rw_reflect_shuey3(&u, &l, th[i], &amp[i]),
		                 RW_OK);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 31, 1, RW_SEIS_AVO_THREE,
	                                 0.0, 30.0 * DEG, &r, &warn),
	                 RW_OK);
	assert_true(fabs(r.a - a) <= 1e-12 && fabs(r.b - b) <= 1e-12 &&
	            fabs(r.c - c) <= 1e-10);
	rw_seis_avo_fitter_free(f);
}

/* Straight-line regression y = A + B x with x = sin^2 (a textbook closed
 * form): B = Sxy / Sxx, A = ybar - B xbar, var(B) = s^2 / Sxx,
 * var(A) = s^2 (1/m + xbar^2 / Sxx), cov(A, B) = -xbar s^2 / Sxx,
 * s^2 = RSS / (m - 2). Noisy amplitudes from a fixed generator. */
static void test_two_term_uncertainty(void **state)
{
	double th[25], amp[25], x[25], xbar = 0, ybar = 0, sxx = 0, sxy = 0;
	double a, b, rss = 0, s2;
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(25);
	rw_seis_avo_result r;
	uint64_t s = 5;
	size_t i, m = 25;

	(void)state;
	assert_non_null(f);
	for (i = 0; i < m; i++) {
		th[i] = urand(&s, 2.0, 38.0) * DEG;
		x[i] = sin(th[i]) * sin(th[i]);
		amp[i] = 0.05 - 0.2 * x[i] + urand(&s, -0.01, 0.01);
		xbar += x[i] / (double)m;
		ybar += amp[i] / (double)m;
	}
	for (i = 0; i < m; i++) {
		sxx += (x[i] - xbar) * (x[i] - xbar);
		sxy += (x[i] - xbar) * (amp[i] - ybar);
	}
	b = sxy / sxx;
	a = ybar - b * xbar;
	for (i = 0; i < m; i++)
		rss += (amp[i] - a - b * x[i]) * (amp[i] - a - b * x[i]);
	s2 = rss / (double)(m - 2);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, m, 1, RW_SEIS_AVO_TWO, 0.0,
	                                 M_PI / 4, &r, NULL),
	                 RW_OK);
	assert_true(fabs(r.a - a) <= 1e-13 && fabs(r.b - b) <= 1e-13);
	assert_true(fabs(r.cov[1][1] / (s2 / sxx) - 1.0) <= 1e-10);
	assert_true(fabs(r.cov[0][0] / (s2 * (1.0 / m + xbar * xbar / sxx)) -
	                 1.0) <= 1e-10);
	assert_true(fabs(r.cov[0][1] / (-xbar * s2 / sxx) - 1.0) <= 1e-10);
	assert_true(r.cov[1][0] == r.cov[0][1]);
	assert_true(fabs(r.sigma - sqrt(s2)) <= 1e-12 * sqrt(s2));
	assert_true(fabs(r.rms - sqrt(rss / m)) <= 1e-12 * sqrt(rss / m));
	rw_seis_avo_fitter_free(f);
}

/* Angle range, nulls and strided amplitudes (a gather stored angle-major:
 * one time sample's amplitudes are nt apart). */
static void test_range_nulls_stride(void **state)
{
	double th[10], g[10 * 3];
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(10);
	rw_seis_avo_result r;
	unsigned warn;
	size_t i;

	(void)state;
	assert_non_null(f);
	for (i = 0; i < 10; i++) {
		double s2;

		th[i] = 5.0 * (double)i * DEG;
		s2 = sin(th[i]) * sin(th[i]);
		g[i * 3 + 0] = 1.0;
		g[i * 3 + 1] = 0.1 - 0.3 * s2;
		g[i * 3 + 2] = i > 6 ? 9.0 : -0.1 + 0.2 * s2; /* far is bad */
	}
	g[2 * 3 + 1] = NAN;
	assert_int_equal(rw_seis_avo_fit(f, th, g + 1, 10, 3, RW_SEIS_AVO_TWO,
	                                 0.0, 45.0 * DEG, &r, &warn),
	                 RW_OK);
	assert_int_equal(warn, RW_SEIS_WARN_AVO_PARTIAL);
	assert_int_equal(r.m, 9);
	assert_true(fabs(r.a - 0.1) <= 1e-13 && fabs(r.b + 0.3) <= 1e-13);
	/* the bad far angles left out by the range */
	assert_int_equal(rw_seis_avo_fit(f, th, g + 2, 10, 3, RW_SEIS_AVO_TWO,
	                                 0.0, 30.0 * DEG + 1e-12, &r, &warn),
	                 RW_OK);
	assert_int_equal(r.m, 7);
	assert_true(fabs(r.a + 0.1) <= 1e-13 && fabs(r.b - 0.2) <= 1e-13);
	rw_seis_avo_fitter_free(f);
}

/* Degenerate designs: exactly as many angles as terms is an exact fit
 * with no uncertainty (flagged); fewer, or repeated angles with fewer
 * distinct values than terms, cannot fix the terms; three distinct angles
 * of which two almost coincide leave the three-term design nearly
 * singular (flagged; its covariance says how poorly C is fixed). */
static void test_degenerate(void **state)
{
	double th[6] = {0.1, 0.3, 0.1, 0.1, 0.1, 0.1};
	double amp[6] = {0.1, 0.05, 0.1, 0.1, 0.1, 0.1};
	double narrow[6], na[6];
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(6);
	rw_seis_avo_result r;
	unsigned warn;
	size_t i;

	(void)state;
	assert_non_null(f);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 2, 1, RW_SEIS_AVO_TWO, 0.0,
	                                 1.0, &r, &warn),
	                 RW_OK);
	assert_true(warn & RW_SEIS_WARN_AVO_NO_DOF);
	assert_true(isfinite(r.a) && isnan(r.sigma) && isnan(r.cov[0][0]));
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 1, 1, RW_SEIS_AVO_TWO, 0.0,
	                                 1.0, &r, &warn),
	                 RW_EINVAL);
	assert_true(isnan(r.a));
	th[1] = 0.1;
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 6, 1, RW_SEIS_AVO_TWO, 0.0,
	                                 1.0, &r, &warn),
	                 RW_EINVAL);
	/* two angles and a third 1e-9 rad from one of them: rcond of the
	 * balanced design 1.1e-9 (numpy, column norms scaled to 1) */
	narrow[0] = narrow[1] = 0.1;
	narrow[2] = narrow[3] = narrow[4] = 0.3;
	narrow[5] = 0.3 + 1e-9;
	for (i = 0; i < 6; i++) {
		double s2 = sin(narrow[i]) * sin(narrow[i]);

		na[i] = 0.1 + 0.2 * s2;
	}
	/* only two distinct angles: refused */
	narrow[4] = narrow[5] = 0.3;
	assert_int_equal(rw_seis_avo_fit(f, narrow, na, 6, 1, RW_SEIS_AVO_THREE,
	                                 0.0, 1.0, &r, &warn),
	                 RW_EINVAL);
	narrow[5] = 0.3 + 1e-9;
	assert_int_equal(rw_seis_avo_fit(f, narrow, na, 6, 1, RW_SEIS_AVO_THREE,
	                                 0.0, 1.0, &r, &warn),
	                 RW_OK);
	assert_true(warn & RW_SEIS_WARN_AVO_ILL_COND);
	assert_true(r.rcond < 1e-8);
	rw_seis_avo_fitter_free(f);
}

static void test_fit_errors(void **state)
{
	double th[3] = {0.1, 0.2, 0.3}, amp[3] = {1, 2, 3};
	double bad[3] = {0.1, 1.6, 0.3};
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(3);
	rw_seis_avo_result r;

	(void)state;
	assert_null(rw_seis_avo_fitter_new(1));
	rw_seis_avo_fitter_free(NULL);
	assert_non_null(f);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 4, 1, RW_SEIS_AVO_TWO, 0.0,
	                                 1.0, &r, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_avo_fit(f, bad, amp, 3, 1, RW_SEIS_AVO_TWO,
	                                 0.0, 1.0, &r, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 3, 1, (rw_seis_avo_model)4,
	                                 0.0, 1.0, &r, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 3, 0, RW_SEIS_AVO_TWO, 0.0,
	                                 1.0, &r, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_avo_fit(f, th, amp, 3, 1, RW_SEIS_AVO_TWO, 0.5,
	                                 0.4, &r, NULL),
	                 RW_EDOM);
	assert_true(isnan(r.a) && isnan(r.rms));
	rw_seis_avo_fitter_free(f);
}

/* Linearised PS (Aki & Richards 1980, eq. 5.46 from memory) against the
 * exact rps of rw_reflect_zoeppritz (checked itself against a numpy
 * solve): zero at normal incidence; for contrasts of at most 5%, angles
 * to 40 degrees and vs/vp of 0.4-0.62 the difference is second order in
 * the largest contrast c: measured at most 0.59 c^2 over these 2000
 * interfaces, checked as 0.75 c^2 (the factor is this test's). Same sign
 * convention: a density increase gives a negative Rps at small angles in
 * both. */
static void test_ps(void **state)
{
	rw_reflect_medium u = {3000.0, 1500.0, 2300.0},
	                  l = {3000.0, 1500.0, 2400.0};
	rw_reflect_pcoefs c;
	double r;
	uint64_t s = 3;
	int i;

	(void)state;
	assert_int_equal(rw_seis_ps_aki_richards(&u, &l, 0.0, &r), RW_OK);
	assert_true(r == 0.0);
	assert_int_equal(rw_seis_ps_aki_richards(&u, &l, 10.0 * DEG, &r),
	                 RW_OK);
	assert_int_equal(rw_reflect_zoeppritz(&u, &l, 10.0 * DEG, &c), RW_OK);
	assert_true(r < 0.0 && c.rps.re < 0.0);
	for (i = 0; i < 2000; i++) {
		double cm = 0.05, e[3], th, emax = 0.0;
		int k;

		for (k = 0; k < 3; k++) {
			e[k] = urand(&s, -cm, cm);
			if (fabs(e[k]) > emax)
				emax = fabs(e[k]);
		}
		u.vp_ms = urand(&s, 2000, 5000);
		u.vs_ms = u.vp_ms * urand(&s, 0.4, 0.62);
		u.rho_kgm3 = urand(&s, 2000, 2700);
		l.vp_ms = u.vp_ms * (1 + e[0]);
		l.vs_ms = u.vs_ms * (1 + e[1]);
		l.rho_kgm3 = u.rho_kgm3 * (1 + e[2]);
		th = urand(&s, 0.0, 40.0) * DEG;
		if (l.vp_ms > u.vp_ms && sin(th) >= 0.98 * u.vp_ms / l.vp_ms)
			continue;
		assert_int_equal(rw_seis_ps_aki_richards(&u, &l, th, &r),
		                 RW_OK);
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, th, &c), RW_OK);
		assert_true(fabs(r - c.rps.re) <= 0.75 * emax * emax + 1e-6);
	}
	/* errors: a fluid, past critical, bad angle */
	u.vs_ms = 0.0;
	assert_int_equal(rw_seis_ps_aki_richards(&u, &l, 0.1, &r), RW_EDOM);
	assert_true(isnan(r));
	u.vs_ms = 1500.0;
	u.vp_ms = 2500.0;
	l.vp_ms = 4000.0;
	assert_int_equal(rw_seis_ps_aki_richards(&u, &l, 50.0 * DEG, &r),
	                 RW_ERANGE);
	assert_int_equal(rw_seis_ps_aki_richards(&u, &l, M_PI / 2, &r),
	                 RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_exact_gathers),
	    cmocka_unit_test(test_two_term_uncertainty),
	    cmocka_unit_test(test_range_nulls_stride),
	    cmocka_unit_test(test_degenerate),
	    cmocka_unit_test(test_fit_errors),
	    cmocka_unit_test(test_ps),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
