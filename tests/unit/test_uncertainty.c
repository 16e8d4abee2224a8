/* Distributions, draws and statistics (rockwire/uncertainty.h). Reference
 * values: the standard normal's 90 % point 1.2815515655446004 (tabulated
 * in Abramowitz & Stegun 1964 table 26.5; digits from memory), the
 * closed forms of each distribution's quantiles, the defining property of
 * a Latin hypercube (one draw per stratum, McKay et al. 1979), and numpy's
 * default percentile definition (linear between order statistics:
 * percentile 10 of 1..10 is 1.9). scipy checks of the whole protocol path
 * are in tests/reference/test_uncertainty_scipy.py. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>

#include "rockwire/uncertainty.h"

static void close_to(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.17g want %.17g (tol %g)", got, want, tol);
}

static void test_quantiles(void **state)
{
	rw_dist n = {RW_DIST_NORMAL, 10, 2, 0, 0};
	rw_dist ln = {RW_DIST_LOGNORMAL, 2.0, 0.5, 0, 0};
	rw_dist un = {RW_DIST_UNIFORM, 3, 7, 0, 0};
	rw_dist tr = {RW_DIST_TRIANGULAR, 0, 1, 4, 0};
	rw_dist tn = {RW_DIST_TRUNC_NORMAL, 0.2, 0.1, 0.15, 0.3};
	double v;

	(void)state;
	close_to(rw_dist_quantile(&n, 0.9), 10 + 2 * 1.2815515655446004, 1e-12);
	close_to(rw_dist_quantile(&n, 0.5), 10, 1e-14);
	/* lognormal median: m / sqrt(1 + s^2/m^2) */
	close_to(rw_dist_quantile(&ln, 0.5), 2.0 / sqrt(1 + 0.0625), 1e-12);
	close_to(rw_dist_quantile(&un, 0.25), 4, 1e-14);
	/* triangular: the mode at F(mode) = (mode - low) / (high - low) */
	close_to(rw_dist_quantile(&tr, 0.25), 1, 1e-14);
	close_to(rw_dist_quantile(&tr, 0.125), sqrt(0.125 * 4 * 1), 1e-14);
	for (double u = 1e-6; u < 1; u += 0.01) {
		v = rw_dist_quantile(&tn, u);
		assert_true(v >= 0.15 && v <= 0.3);
	}
	assert_true(isnan(rw_dist_quantile(&n, 0)));
	assert_true(isnan(rw_dist_quantile(&n, 1)));
	close_to(rw_dist_mean(&tr), 5.0 / 3, 1e-14);
	close_to(rw_dist_mean(&un), 5, 1e-14);
}

static void test_checks_and_percentiles(void **state)
{
	rw_dist bad[] = {
	    {RW_DIST_NORMAL, 1, 0, 0, 0},
	    {RW_DIST_LOGNORMAL, -1, 1, 0, 0},
	    {RW_DIST_UNIFORM, 2, 1, 0, 0},
	    {RW_DIST_TRIANGULAR, 0, 5, 1, 0},
	    {RW_DIST_TRUNC_NORMAL, 0, 1, 50, 60},
	    {RW_DIST_NORMAL, NAN, 1, 0, 0},
	};
	rw_dist d;
	const char *why;

	(void)state;
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		assert_int_equal(rw_dist_check(&bad[i], &why), RW_EDOM);
		assert_non_null(why);
	}
	/* P10 and P90 of a normal are mean -+ 1.28155 sd */
	assert_int_equal(rw_dist_from_percentiles(0.1, 0.2, 0.9, 0.3, 0, &d),
	                 RW_OK);
	close_to(d.a, 0.25, 1e-15);
	close_to(d.b, 0.05 / 1.2815515655446004, 1e-12);
	close_to(rw_dist_quantile(&d, 0.1), 0.2, 1e-12);
	assert_int_equal(rw_dist_from_percentiles(0.1, 2, 0.9, 8, 1, &d),
	                 RW_OK);
	close_to(rw_dist_quantile(&d, 0.1), 2, 1e-12);
	close_to(rw_dist_quantile(&d, 0.9), 8, 1e-12);
	close_to(rw_dist_quantile(&d, 0.5), 4, 1e-12); /* geometric mean */
	assert_int_equal(rw_dist_from_percentiles(0.9, 1, 0.1, 2, 0, &d),
	                 RW_EDOM);
	assert_int_equal(rw_dist_from_percentiles(0.1, -1, 0.9, 2, 1, &d),
	                 RW_EDOM);
}

static void test_draws(void **state)
{
	enum { N = 1000 };
	double u[N], v[N];
	int seen[N] = {0};
	double mean = 0;
	rw_unc_rng *r = rw_unc_rng_new();

	(void)state;
	assert_non_null(r);
	assert_int_equal(rw_unc_uniforms(r, 7, 3, N, 1, u), RW_OK);
	for (int i = 0; i < N; i++) {
		int k = (int)floor(u[i] * N);
		assert_true(u[i] > 0 && u[i] < 1);
		assert_true(k >= 0 && k < N);
		seen[k]++;
	}
	for (int i = 0; i < N; i++)
		assert_int_equal(seen[i], 1); /* one per stratum */
	/* reproducible, and another stream differs */
	assert_int_equal(rw_unc_uniforms(r, 7, 3, N, 1, v), RW_OK);
	assert_memory_equal(u, v, sizeof u);
	assert_int_equal(rw_unc_uniforms(r, 7, 4, N, 1, v), RW_OK);
	assert_memory_not_equal(u, v, sizeof u);
	assert_int_equal(rw_unc_uniforms(r, 8, 3, N, 0, v), RW_OK);
	for (int i = 0; i < N; i++)
		mean += v[i] / N;
	/* the mean of N uniforms: 0.5 within 4 sigma, sigma = 1/sqrt(12 N) */
	close_to(mean, 0.5, 4 / sqrt(12.0 * N));
	assert_int_equal(rw_unc_uniforms(r, 1, 1, 0, 0, v), RW_EINVAL);
	rw_unc_rng_free(r);
	rw_unc_rng_free(NULL);
}

static void test_cholesky_and_copula(void **state)
{
	double a[4] = {1, 0.5, 0.5, 1};
	double np[9] = {1, 0.9, 0.9, 0.9, 1, -0.9, 0.9, -0.9, 1};
	double asym[4] = {1, 0.5, 0.4, 1};
	enum { N = 20000 };
	static double x[N], y[N], u1[N], u2[N];
	double sxy = 0, sxx = 0, syy = 0;
	rw_unc_rng *r = rw_unc_rng_new();
	double l[4] = {1, 0.7, 0.7, 1};

	(void)state;
	assert_int_equal(rw_unc_cholesky(2, a), RW_OK);
	close_to(a[0], 1, 1e-15);
	close_to(a[2], 0.5, 1e-15);
	close_to(a[3], sqrt(0.75), 1e-15);
	close_to(a[1], 0, 0);
	assert_int_equal(rw_unc_cholesky(3, np), RW_EDOM); /* not PD */
	assert_int_equal(rw_unc_cholesky(2, asym), RW_EDOM);
	/* the copula gives the normal scores the asked correlation */
	assert_int_equal(rw_unc_cholesky(2, l), RW_OK);
	rw_unc_uniforms(r, 11, 0, N, 1, u1);
	rw_unc_uniforms(r, 11, 1, N, 1, u2);
	for (int i = 0; i < N; i++) {
		double uu[2] = {u1[i], u2[i]};
		rw_unc_correlate(2, l, uu);
		rw_dist sn = {RW_DIST_NORMAL, 0, 1, 0, 0};
		x[i] = rw_dist_quantile(&sn, uu[0]);
		y[i] = rw_dist_quantile(&sn, uu[1]);
	}
	for (int i = 0; i < N; i++) {
		sxy += x[i] * y[i];
		sxx += x[i] * x[i];
		syy += y[i] * y[i];
	}
	/* sampling error of a correlation ~ (1 - rho^2)/sqrt(N) = 0.0036 */
	close_to(sxy / sqrt(sxx * syy), 0.7, 4 * 0.51 / sqrt(N));
	rw_unc_rng_free(r);
}

static void test_statistics(void **state)
{
	double x[11] = {3, 1, 2, 4, 5, NAN, 6, 7, 8, 9, 10};
	double pct[3] = {10, 50, 90}, q[3], w[44], mean, sd;
	double a[6] = {1, 2, 3, 4, 5, 6}, b[6] = {2, 4, 6, 8, 10, 12};
	double c[6] = {6, 5, 4, 3, 2, 1}, k[6] = {1, 1, 1, 1, 1, 1};
	size_t nv;

	(void)state;
	assert_int_equal(
	    rw_unc_summary(x, 1, 11, w, pct, 3, &mean, &sd, q, &nv), RW_OK);
	assert_int_equal(nv, 10);
	close_to(mean, 5.5, 1e-15);
	close_to(sd, sqrt(55.0 / 6.0), 1e-14);
	close_to(q[0], 1.9, 1e-14);
	close_to(q[1], 5.5, 1e-14);
	close_to(q[2], 9.1, 1e-14);
	close_to(rw_unc_spearman(a, 1, b, 1, 6, w), 1, 1e-14);
	close_to(rw_unc_spearman(a, 1, c, 1, 6, w), -1, 1e-14);
	assert_true(isnan(rw_unc_spearman(a, 1, k, 1, 6, w)));
}

/* The fast path (sort once, ranks, then Pearson's correlation of the
 * ranks) equals GSL's gsl_stats_spearman (through rw_unc_spearman) on
 * random data with ties, strided input included, and with pairs dropped
 * (a NaN output) by the compaction; the radix sort orders values as
 * gsl_sort_index does (negatives, -0 and +0, subnormals, huge values);
 * ranks of {3, 1, 3, 2} are {3.5, 1, 3.5, 2} (mean ranks for ties, the
 * textbook definition). */
static void test_ranks_fast_path(void **state)
{
	enum { N = 500 };
	static double x[2 * N], y[N], rx[N], ry[N], w[4 * N], v[N];
	static size_t perm[N], gp[N], pos[N];
	static uint64_t kw[3 * N];
	double t[4] = {3, 1, 3, 2}, rt[4], bad[3] = {1, NAN, 2};
	double odd[8] = {-0.0, 0.0, -1e-310, 1e-310, -1e308, 1e308, -2, 2};
	gsl_rng *g = gsl_rng_alloc(gsl_rng_mt19937);
	size_t m = 0;

	(void)state;
	for (int i = 0; i < N; i++) {
		x[2 * i] = floor(gsl_rng_uniform(g) * 40) - 20; /* ties */
		x[2 * i + 1] = -1;
		y[i] = x[2 * i] * 0.3 + gsl_rng_uniform(g) * 10;
		v[i] = (gsl_rng_uniform(g) - 0.5) *
		       pow(10, floor(gsl_rng_uniform(g) * 600) - 300);
	}
	assert_int_equal(rw_unc_ranks(x, 2, N, rx, perm, kw), RW_OK);
	assert_int_equal(rw_unc_ranks(y, 1, N, ry, perm, kw), RW_OK);
	close_to(rw_unc_rank_correlation(rx, ry, N),
	         rw_unc_spearman(x, 2, y, 1, N, w), 1e-12);
	/* the sort against GSL's (a comparison sort: same order of values) */
	assert_int_equal(rw_unc_argsort(v, 1, N, perm, kw), RW_OK);
	gsl_sort_index(gp, v, 1, N);
	for (int i = 0; i < N; i++)
		close_to(v[perm[i]], v[gp[i]], 0);
	/* stable: equal values keep the order of their indices */
	assert_int_equal(rw_unc_argsort(x, 2, N, perm, kw), RW_OK);
	for (int i = 1; i < N; i++)
		assert_true(x[2 * perm[i - 1]] < x[2 * perm[i]] ||
		            (x[2 * perm[i - 1]] == x[2 * perm[i]] &&
		             perm[i - 1] < perm[i]));
	assert_int_equal(rw_unc_argsort(odd, 1, 8, perm, kw), RW_OK);
	close_to(odd[perm[0]], -1e308, 0);
	close_to(odd[perm[7]], 1e308, 0);
	close_to(odd[perm[2]], -1e-310, 0);
	assert_true(odd[perm[3]] == 0 && odd[perm[4]] == 0 && perm[3] == 0 &&
	            perm[4] == 1); /* -0 = +0, stable */
	/* drop every 7th pair (as a NaN output would) */
	for (int i = 0; i < N; i++) {
		pos[i] = i % 7 ? m++ : SIZE_MAX;
		if (i % 7 == 0)
			y[i] = NAN;
	}
	{
		static double yc[N], rxc[N], ryc[N];
		size_t k = 0;
		for (int i = 0; i < N; i++)
			if (pos[i] != SIZE_MAX)
				yc[k++] = y[i];
		assert_int_equal(rw_unc_ranks(yc, 1, m, ryc, perm, kw), RW_OK);
		assert_int_equal(rw_unc_argsort(x, 2, N, perm, kw), RW_OK);
		assert_int_equal(rw_unc_ranks_sorted(x, 2, perm, N, pos, rxc),
		                 m);
		close_to(rw_unc_rank_correlation(rxc, ryc, m),
		         rw_unc_spearman(x, 2, y, 1, N, w), 1e-12);
	}
	{
		/* without ties the kept ranks need no values: the same as
		 * rw_unc_ranks_sorted on the draws of y (continuous) */
		static double ra[N], rb[N];
		size_t kept = 0;
		assert_int_equal(rw_unc_argsort(v, 1, N, perm, kw), RW_OK);
		assert_false(rw_unc_sorted_has_ties(v, 1, perm, N));
		assert_int_equal(rw_unc_ranks_sorted(v, 1, perm, N, pos, ra),
		                 m);
		assert_int_equal(rw_unc_ranks_kept(perm, N, pos, rb), m);
		for (size_t i = 0; i < m; i++) {
			close_to(rb[i], ra[i], 0);
			kept += rb[i] == floor(rb[i]);
		}
		assert_int_equal(kept, m);
		assert_int_equal(rw_unc_argsort(x, 2, N, perm, kw), RW_OK);
		assert_true(rw_unc_sorted_has_ties(x, 2, perm, N));
	}
	{
		/* ranks of the sorted values equal ranks of the values */
		static double sv[N], r2[N];
		assert_int_equal(rw_unc_ranks(x, 2, N, ry, perm, kw), RW_OK);
		assert_int_equal(rw_unc_argsort(x, 2, N, perm, kw), RW_OK);
		for (int i = 0; i < N; i++)
			sv[i] = x[2 * perm[i]];
		rw_unc_ranks_of_sorted(sv, perm, N, r2);
		for (int i = 0; i < N; i++)
			close_to(r2[i], ry[i], 0);
	}
	assert_int_equal(rw_unc_ranks(t, 1, 4, rt, perm, kw), RW_OK);
	close_to(rt[0], 3.5, 0);
	close_to(rt[1], 1, 0);
	close_to(rt[2], 3.5, 0);
	close_to(rt[3], 2, 0);
	assert_int_equal(rw_unc_ranks(bad, 1, 3, rt, perm, kw), RW_EDOM);
	assert_true(isnan(rw_unc_rank_correlation(rt, rt, 2)));
	gsl_rng_free(g);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_quantiles),
	    cmocka_unit_test(test_checks_and_percentiles),
	    cmocka_unit_test(test_draws),
	    cmocka_unit_test(test_cholesky_and_copula),
	    cmocka_unit_test(test_statistics),
	    cmocka_unit_test(test_ranks_fast_path),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
