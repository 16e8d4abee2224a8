/* Unit tests of the normal compaction trend (daemon/core/trend.c): sample
 * selection, exact recovery of synthetic trends, recovery with noise
 * within the returned uncertainty (checked by the coverage of the
 * one-sigma intervals over many noisy realisations, the statistical
 * meaning of a standard error), evaluation and its flags, and the error
 * cases. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "rockwire/pressure.h"

#define US_FT (1e-6 / 0.3048) /* 1 us/ft in s/m (exact by definition) */
#define NS    400

static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.12g, want %.12g (tol %.3g)", got, want, tol);
}

/* A Gulf-Coast-like shale trend (invented for the test): 183 us/ft at
 * the mudline, 61 us/ft deep, c = 5e-4 per m. */
static const double T_MA = 61.0 * US_FT, T_ML = 183.0 * US_FT, T_C = 5e-4;

static double exp_trend(double s)
{
	return T_MA + (T_ML - T_MA) * exp(-T_C * s);
}

static void test_given_eval(void **state)
{
	rw_pres_trend t;
	double dt, sg;
	unsigned w;

	(void)state;
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_MA, T_ML, T_C,
	                                     100.0, 2000.0, &t),
	                 RW_OK);
	/* the closed form of the exponential trend */
	assert_int_equal(rw_pres_trend_eval(&t, 1000.0, &dt, &sg, &w), RW_OK);
	near(dt, exp_trend(1000.0), 1e-15);
	assert_true(isnan(sg)); /* a given trend has no covariance */
	assert_int_equal(w, 0);
	/* at the mudline dt_ml, deep the matrix value */
	rw_pres_trend_eval(&t, 0.0, &dt, NULL, &w);
	near(dt, T_ML, 1e-18);
	assert_true(w & RW_PRES_WARN_TREND_EXTRAPOLATED);
	rw_pres_trend_eval(&t, 1e5, &dt, NULL, &w);
	near(dt, T_MA, 1e-12);
	assert_true(w & RW_PRES_WARN_TREND_EXTRAPOLATED);
	assert_false(w & RW_PRES_WARN_TREND_FAST);
	/* no span given: every depth is flagged as of unknown validity */
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_MA, T_ML, T_C,
	                                     NAN, NAN, &t),
	                 RW_OK);
	rw_pres_trend_eval(&t, 1000.0, &dt, NULL, &w);
	assert_int_equal(w, RW_PRES_WARN_TREND_NORANGE);
	/* log-linear: dt_ml exp(-c s), falls below any matrix at depth */
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_LOGLIN, NAN, T_ML,
	                                     3e-4, 0.0, 3000.0, &t),
	                 RW_OK);
	assert_true(isnan(t.dt_ma_sm));
	rw_pres_trend_eval(&t, 2000.0, &dt, NULL, &w);
	near(dt, T_ML * exp(-0.6), 1e-15);
	rw_pres_trend_eval(&t, 8000.0, &dt, NULL, &w);
	assert_true(w & RW_PRES_WARN_TREND_FAST);
	assert_true(w & RW_PRES_WARN_TREND_EXTRAPOLATED);
	/* errors */
	assert_int_equal(rw_pres_trend_eval(&t, -1.0, &dt, NULL, &w), RW_EDOM);
	assert_true(isnan(dt));
	assert_int_equal(rw_pres_trend_given(7, T_MA, T_ML, T_C, NAN, NAN, &t),
	                 RW_EINVAL);
	assert_int_equal(rw_pres_trend_eval(&t, 10.0, &dt, NULL, &w),
	                 RW_EINVAL);
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_ML, T_MA, T_C,
	                                     NAN, NAN, &t),
	                 RW_EDOM); /* matrix slower than mudline */
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_MA, T_ML,
	                                     -T_C, NAN, NAN, &t),
	                 RW_EDOM);
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_MA, T_ML, T_C,
	                                     500.0, 100.0, &t),
	                 RW_EDOM);
	assert_int_equal(rw_pres_trend_given(RW_PRES_TREND_EXP, T_MA, T_ML, T_C,
	                                     100.0, NAN, &t),
	                 RW_EDOM);
}

static void test_select(void **state)
{
	static const double z[8] = {100, 200, 300, 400, 500, 600, 700, 800};
	double dt[8], vsh[8] = {0.9, 0.2, 0.8, 0.7, NAN, 0.95, 0.6, 0.9};
	unsigned char use[8], exc[8] = {0, 0, 0, 1, 0, 0, 0, 0};
	static const double top[2] = {150, 550}, base[2] = {450, 800};
	size_t i, n;

	(void)state;
	for (i = 0; i < 8; i++)
		dt[i] = 100.0 * US_FT;
	dt[7] = NAN;
	/* whole log, no selector: every finite positive slowness */
	assert_int_equal(rw_pres_trend_select(8, z, dt, NULL, 0.0, NULL, 0,
	                                      NULL, NULL, use, &n),
	                 RW_OK);
	assert_int_equal(n, 7);
	assert_int_equal(use[7], 0);
	/* intervals, shale cut-off 0.6 and one excluded sample:
	 * 300 (in, shale), 600 (in, shale), 700 (in, vsh 0.6 = cut-off) */
	assert_int_equal(rw_pres_trend_select(8, z, dt, vsh, 0.6, exc, 2, top,
	                                      base, use, &n),
	                 RW_OK);
	assert_int_equal(n, 3);
	assert_int_equal(use[2] + use[5] + use[6], 3);
	/* errors */
	assert_int_equal(rw_pres_trend_select(8, z, dt, vsh, 1.5, NULL, 0, NULL,
	                                      NULL, use, &n),
	                 RW_EDOM);
	assert_int_equal(rw_pres_trend_select(8, z, dt, NULL, 0.0, NULL, 2,
	                                      base, top, use, &n),
	                 RW_EDOM);
	assert_int_equal(n, 0);
	assert_int_equal(rw_pres_trend_select(8, NULL, dt, NULL, 0.0, NULL, 0,
	                                      NULL, NULL, use, &n),
	                 RW_EINVAL);
	assert_int_equal(rw_pres_trend_select(8, z, dt, NULL, 0.0, NULL, 1,
	                                      NULL, base, use, &n),
	                 RW_EINVAL);
}

/* Noise-free synthetic trends come back to rounding. */
static void test_exact_recovery(void **state)
{
	rw_pres_trend_ws *ws = rw_pres_trend_ws_new(NS + 10);
	double s[NS + 10], dt[NS + 10];
	unsigned char use[NS + 10];
	rw_pres_trend t;
	size_t i;

	(void)state;
	assert_non_null(ws);
	for (i = 0; i < NS + 10; i++) {
		s[i] = 200.0 + 7.0 * (double)i;
		dt[i] = exp_trend(s[i]);
		use[i] = i < NS; /* the last 10 are marked out and wild */
		if (i >= NS)
			dt[i] = 1e-3;
	}
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, NS + 10, s, dt, use, &t),
	    RW_OK);
	near(t.dt_ma_sm, T_MA, 1e-9 * T_MA);
	near(t.dt_ml_sm, T_ML, 1e-9 * T_ML);
	near(t.c_per_m, T_C, 1e-9 * T_C);
	assert_int_equal(t.n_used, NS);
	near(t.s_min_m, 200.0, 0.0);
	near(t.s_max_m, 200.0 + 7.0 * (NS - 1), 0.0);
	assert_true(t.rms_sm < 1e-12);
	/* log-linear on an exact log-linear trend */
	for (i = 0; i < NS; i++)
		dt[i] = T_ML * exp(-3e-4 * s[i]);
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_LOGLIN, NS, s, dt, NULL, &t),
	    RW_OK);
	near(t.dt_ml_sm, T_ML, 1e-12 * T_ML);
	near(t.c_per_m, 3e-4, 1e-12);
	assert_true(isnan(t.dt_ma_sm) && isnan(t.cov[0][0]));
	rw_pres_trend_ws_free(ws);
}

/* Coverage of the returned one-sigma intervals over R noisy
 * realisations: for an unbiased estimate with a correct standard error
 * about 68.3 % of the intervals hold the truth (normal distribution).
 * With R = 400 the binomial spread is 2.3 %; the window 60-77 % is
 * 3.6 sigma wide each side, so the test fails only when the uncertainty
 * is wrong (too small or too large by about 15 % or more). */
#define R 400

static void test_noise_coverage(void **state)
{
	rw_pres_trend_ws *ws = rw_pres_trend_ws_new(NS);
	gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
	double s[NS], dt[NS], sd = 3.0 * US_FT; /* 3 us/ft of scatter */
	double truth[3] = {T_MA, T_ML, T_C}, est[3], sig[3], pt, pe, ps;
	int hit[3] = {0, 0, 0}, hit_pred = 0, r, k;
	rw_pres_trend t;
	size_t i;

	(void)state;
	gsl_rng_set(rng, 20140);
	for (r = 0; r < R; r++) {
		for (i = 0; i < NS; i++) {
			s[i] = 150.0 + 7.0 * (double)i;
			dt[i] = exp_trend(s[i]) + gsl_ran_gaussian(rng, sd);
		}
		assert_int_equal(rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, NS, s,
		                                   dt, NULL, &t),
		                 RW_OK);
		est[0] = t.dt_ma_sm;
		est[1] = t.dt_ml_sm;
		est[2] = t.c_per_m;
		for (k = 0; k < 3; k++) {
			sig[k] = sqrt(t.cov[k][k]);
			/* every realisation within 5 sigma (p ~ 6e-7) */
			assert_true(fabs(est[k] - truth[k]) < 5.0 * sig[k]);
			hit[k] += fabs(est[k] - truth[k]) <= sig[k];
		}
		/* the trend's own standard error at 2000 m */
		pt = exp_trend(2000.0);
		rw_pres_trend_eval(&t, 2000.0, &pe, &ps, NULL);
		hit_pred += fabs(pe - pt) <= ps;
		/* the residual is the noise: the rms of 400 normal draws
		 * has a relative spread of 1/sqrt(800) = 3.5 %, and the
		 * extreme of 400 realisations reaches about 3.4 of those
		 * (12 %); 20 % is 5.7 spreads */
		near(t.rms_sm, sd, 0.2 * sd);
	}
	for (k = 0; k < 3; k++) {
		double f = (double)hit[k] / R;

		if (f < 0.60 || f > 0.77)
			fail_msg("parameter %d: coverage %.3f", k, f);
	}
	assert_true((double)hit_pred / R >= 0.60);
	assert_true((double)hit_pred / R <= 0.77);

	/* the same for the log-linear form on a log-linear truth with
	 * multiplicative (log-normal) scatter of 2 % */
	hit[1] = hit[2] = 0;
	for (r = 0; r < R; r++) {
		for (i = 0; i < NS; i++) {
			s[i] = 150.0 + 7.0 * (double)i;
			dt[i] = T_ML *
			        exp(-3e-4 * s[i] + gsl_ran_gaussian(rng, 0.02));
		}
		assert_int_equal(rw_pres_trend_fit(ws, RW_PRES_TREND_LOGLIN, NS,
		                                   s, dt, NULL, &t),
		                 RW_OK);
		hit[1] += fabs(t.dt_ml_sm - T_ML) <= sqrt(t.cov[1][1]);
		hit[2] += fabs(t.c_per_m - 3e-4) <= sqrt(t.cov[2][2]);
	}
	for (k = 1; k < 3; k++) {
		double f = (double)hit[k] / R;

		if (f < 0.60 || f > 0.77)
			fail_msg("log-linear parameter %d: coverage %.3f", k,
			         f);
	}
	gsl_rng_free(rng);
	rw_pres_trend_ws_free(ws);
}

static void test_fit_errors(void **state)
{
	rw_pres_trend_ws *ws = rw_pres_trend_ws_new(8);
	double s[10], dt[10];
	rw_pres_trend t;
	size_t i;

	(void)state;
	assert_null(rw_pres_trend_ws_new(3));
	for (i = 0; i < 10; i++) {
		s[i] = 500.0 + 100.0 * (double)i;
		dt[i] = exp_trend(s[i]);
	}
	/* more samples than the workspace holds */
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, 10, s, dt, NULL, &t),
	    RW_EINVAL);
	assert_true(isnan(t.c_per_m));
	/* too few samples */
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, 3, s, dt, NULL, &t),
	    RW_EINVAL);
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_LOGLIN, 2, s, dt, NULL, &t),
	    RW_EINVAL);
	/* no depth span */
	for (i = 0; i < 5; i++)
		s[i] = 800.0;
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, 5, s, dt, NULL, &t),
	    RW_EINVAL);
	for (i = 0; i < 10; i++)
		s[i] = 500.0 + 100.0 * (double)i;
	/* slowness rising with depth is not a compaction trend */
	for (i = 0; i < 8; i++)
		dt[i] = (80.0 + 5.0 * (double)i) * US_FT;
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, 8, s, dt, NULL, &t),
	    RW_ERANGE);
	assert_true(isnan(t.dt_ml_sm));
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_LOGLIN, 8, s, dt, NULL, &t),
	    RW_ERANGE);
	/* bad samples, bad form, missing workspace */
	dt[2] = -1.0;
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_EXP, 8, s, dt, NULL, &t),
	    RW_EDOM);
	dt[2] = exp_trend(s[2]);
	s[3] = -5.0;
	assert_int_equal(
	    rw_pres_trend_fit(ws, RW_PRES_TREND_LOGLIN, 8, s, dt, NULL, &t),
	    RW_EDOM);
	assert_int_equal(rw_pres_trend_fit(ws, 9, 8, s, dt, NULL, &t),
	                 RW_EINVAL);
	assert_int_equal(
	    rw_pres_trend_fit(NULL, RW_PRES_TREND_EXP, 8, s, dt, NULL, &t),
	    RW_EINVAL);
	rw_pres_trend_ws_free(ws);
	rw_pres_trend_ws_free(NULL);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_given_eval),
	    cmocka_unit_test(test_select),
	    cmocka_unit_test(test_exact_recovery),
	    cmocka_unit_test(test_noise_coverage),
	    cmocka_unit_test(test_fit_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
