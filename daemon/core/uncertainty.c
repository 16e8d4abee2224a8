/* Uncertainty: distributions, reproducible draws (plain Monte Carlo or
 * Latin hypercube, correlated through a Gaussian copula), and output
 * statistics. The numerics are GSL's: the normal CDF and its inverse,
 * MT19937, Cholesky, sorting, quantiles and Spearman's rank correlation.
 * See include/rockwire/uncertainty.h for the contracts and sources. */
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_linalg.h>
#include <gsl/gsl_matrix.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_sort.h>
#include <gsl/gsl_statistics_double.h>

#include "rockwire/uncertainty.h"

int rw_dist_check(const rw_dist *d, const char **why)
{
	const char *w = NULL;

	if (!d)
		w = "no distribution";
	else if (!isfinite(d->a) || !isfinite(d->b) ||
	         ((d->kind == RW_DIST_TRIANGULAR ||
	           d->kind == RW_DIST_TRUNC_NORMAL) &&
	          !isfinite(d->c)) ||
	         (d->kind == RW_DIST_TRUNC_NORMAL && !isfinite(d->d)))
		w = "a parameter is not a finite number";
	else
		switch (d->kind) {
		case RW_DIST_NORMAL:
			if (!(d->b > 0))
				w = "the standard deviation must be > 0";
			break;
		case RW_DIST_LOGNORMAL:
			if (!(d->a > 0))
				w = "a lognormal needs a mean > 0";
			else if (!(d->b > 0))
				w = "the standard deviation must be > 0";
			break;
		case RW_DIST_UNIFORM:
			if (!(d->a < d->b))
				w = "low must be below high";
			break;
		case RW_DIST_TRIANGULAR:
			if (!(d->a < d->c))
				w = "low must be below high";
			else if (!(d->b >= d->a && d->b <= d->c))
				w = "the mode must lie between low and high";
			break;
		case RW_DIST_TRUNC_NORMAL:
			if (!(d->b > 0))
				w = "the standard deviation must be > 0";
			else if (!(d->c < d->d))
				w = "low must be below high";
			else if (gsl_cdf_ugaussian_P((d->d - d->a) / d->b) -
			             gsl_cdf_ugaussian_P((d->c - d->a) / d->b) <
			         1e-12)
				w = "the window [low, high] holds almost none "
				    "of the normal's probability";
			break;
		default: w = "unknown distribution"; break;
		}
	if (why)
		*why = w;
	return w ? RW_EDOM : RW_OK;
}

/* ln-space parameters of a lognormal with mean m and sd s. */
static void lognormal_params(double m, double s, double *mu, double *sigma)
{
	double v = log1p((s / m) * (s / m));
	*sigma = sqrt(v);
	*mu = log(m) - 0.5 * v;
}

double rw_dist_quantile(const rw_dist *d, double u)
{
	double mu, sigma, fm, pa, pb;

	if (!(u > 0 && u < 1) || rw_dist_check(d, NULL) != RW_OK)
		return NAN;
	switch (d->kind) {
	case RW_DIST_NORMAL: return d->a + d->b * gsl_cdf_ugaussian_Pinv(u);
	case RW_DIST_LOGNORMAL:
		lognormal_params(d->a, d->b, &mu, &sigma);
		return exp(mu + sigma * gsl_cdf_ugaussian_Pinv(u));
	case RW_DIST_UNIFORM: return d->a + (d->b - d->a) * u;
	case RW_DIST_TRIANGULAR:
		fm = (d->b - d->a) / (d->c - d->a);
		if (u < fm)
			return d->a + sqrt(u * (d->c - d->a) * (d->b - d->a));
		return d->c - sqrt((1 - u) * (d->c - d->a) * (d->c - d->b));
	case RW_DIST_TRUNC_NORMAL:
		pa = gsl_cdf_ugaussian_P((d->c - d->a) / d->b);
		pb = gsl_cdf_ugaussian_P((d->d - d->a) / d->b);
		return fmin(d->d,
		            fmax(d->c, d->a + d->b * gsl_cdf_ugaussian_Pinv(
		                                         pa + u * (pb - pa))));
	default: return NAN;
	}
}

double rw_dist_mean(const rw_dist *d)
{
	double al, be, z;

	if (rw_dist_check(d, NULL) != RW_OK)
		return NAN;
	switch (d->kind) {
	case RW_DIST_NORMAL:
	case RW_DIST_LOGNORMAL: return d->a;
	case RW_DIST_UNIFORM: return 0.5 * (d->a + d->b);
	case RW_DIST_TRIANGULAR: return (d->a + d->b + d->c) / 3.0;
	case RW_DIST_TRUNC_NORMAL:
		/* mean of a truncated normal: mu + sd (phi(al) - phi(be)) / Z
		 */
		al = (d->c - d->a) / d->b;
		be = (d->d - d->a) / d->b;
		z = gsl_cdf_ugaussian_P(be) - gsl_cdf_ugaussian_P(al);
		return d->a + d->b *
		                  (exp(-0.5 * al * al) - exp(-0.5 * be * be)) /
		                  (sqrt(2 * M_PI) * z);
	default: return NAN;
	}
}

int rw_dist_from_percentiles(double p_lo, double x_lo, double p_hi, double x_hi,
                             int lognormal, rw_dist *out)
{
	double z_lo, z_hi, mu, sigma;

	if (!(p_lo > 0 && p_lo < p_hi && p_hi < 1) || !isfinite(x_lo) ||
	    !isfinite(x_hi) || !(x_lo < x_hi) || (lognormal && !(x_lo > 0)))
		return RW_EDOM;
	z_lo = gsl_cdf_ugaussian_Pinv(p_lo);
	z_hi = gsl_cdf_ugaussian_Pinv(p_hi);
	if (!lognormal) {
		out->kind = RW_DIST_NORMAL;
		out->b = (x_hi - x_lo) / (z_hi - z_lo);
		out->a = x_lo - out->b * z_lo;
	} else {
		sigma = (log(x_hi) - log(x_lo)) / (z_hi - z_lo);
		mu = log(x_lo) - sigma * z_lo;
		out->kind = RW_DIST_LOGNORMAL;
		out->a = exp(mu + 0.5 * sigma * sigma);
		out->b = out->a * sqrt(expm1(sigma * sigma));
	}
	out->c = out->d = 0;
	return RW_OK;
}

/* ---- draws -------------------------------------------------------------- */

struct rw_unc_rng {
	gsl_rng *g;
};

rw_unc_rng *rw_unc_rng_new(void)
{
	rw_unc_rng *r = malloc(sizeof *r);
	if (!r)
		return NULL;
	r->g = gsl_rng_alloc(gsl_rng_mt19937);
	if (!r->g) {
		free(r);
		return NULL;
	}
	return r;
}

void rw_unc_rng_free(rw_unc_rng *r)
{
	if (!r)
		return;
	gsl_rng_free(r->g);
	free(r);
}

/* SplitMix64 (Steele, Lea & Flood 2014): spreads (seed, stream) over the
 * seed space, so neighbouring streams do not start alike. */
static uint64_t mix64(uint64_t x)
{
	x += 0x9e3779b97f4a7c15ull;
	x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ull;
	x = (x ^ (x >> 27)) * 0x94d049bb133111ebull;
	return x ^ (x >> 31);
}

int rw_unc_uniforms(rw_unc_rng *r, uint64_t seed, uint64_t stream, size_t n,
                    int latin, double *u)
{
	uint64_t s;

	if (!r || !u || n == 0)
		return RW_EINVAL;
	s = mix64(seed ^ mix64(stream + 1));
	/* MT19937 takes 32 bits of seed; 0 means its default, so avoid it */
	gsl_rng_set(r->g, (unsigned long)((s >> 32) ^ s) | 1ul);
	if (!latin) {
		for (size_t i = 0; i < n; i++)
			u[i] = gsl_rng_uniform_pos(r->g);
		return RW_OK;
	}
	/* McKay, Beckman & Conover 1979: one point in each of n strata... */
	for (size_t i = 0; i < n; i++)
		u[i] = ((double)i + gsl_rng_uniform_pos(r->g)) / (double)n;
	/* ...in random order (Fisher-Yates) */
	for (size_t i = n - 1; i > 0; i--) {
		size_t j =
		    (size_t)gsl_rng_uniform_int(r->g, (unsigned long)i + 1);
		double t = u[i];
		u[i] = u[j];
		u[j] = t;
	}
	return RW_OK;
}

int rw_unc_cholesky(size_t n, double *a)
{
	gsl_matrix_view m;

	if (!a || n == 0)
		return RW_EDOM;
	for (size_t i = 0; i < n; i++) {
		if (a[i * n + i] != 1.0)
			return RW_EDOM;
		for (size_t j = 0; j < n; j++) {
			double v = a[i * n + j];
			if (!isfinite(v) || v < -1 || v > 1 ||
			    fabs(v - a[j * n + i]) > 1e-12)
				return RW_EDOM;
		}
	}
	m = gsl_matrix_view_array(a, n, n);
	if (gsl_linalg_cholesky_decomp1(&m.matrix) != GSL_SUCCESS)
		return RW_EDOM;
	for (size_t i = 0; i < n; i++)
		for (size_t j = i + 1; j < n; j++)
			a[i * n + j] = 0;
	return RW_OK;
}

void rw_unc_correlate(size_t n, const double *l, double *u)
{
	double z[64];

	if (n > 64)
		return; /* the protocol allows at most 64 correlated inputs */
	for (size_t i = 0; i < n; i++)
		z[i] = gsl_cdf_ugaussian_Pinv(u[i]);
	for (size_t i = n; i-- > 0;) {
		double s = 0;
		for (size_t j = 0; j <= i; j++)
			s += l[i * n + j] * z[j];
		/* keep the uniform strictly inside (0, 1) */
		u[i] = fmin(fmax(gsl_cdf_ugaussian_P(s), DBL_MIN),
		            1.0 - DBL_EPSILON / 2);
	}
}

/* ---- statistics --------------------------------------------------------- */

int rw_unc_summary(const double *x, size_t stride, size_t n, double *work,
                   const double *pct, size_t npct, double *mean, double *sd,
                   double *q, size_t *n_valid)
{
	size_t m = 0;

	if (!x || !work || (npct && (!pct || !q)) || !mean || !sd)
		return RW_EINVAL;
	for (size_t i = 0; i < n; i++)
		if (isfinite(x[i * stride]))
			work[m++] = x[i * stride];
	if (n_valid)
		*n_valid = m;
	if (m == 0) {
		*mean = *sd = NAN;
		for (size_t k = 0; k < npct; k++)
			q[k] = NAN;
		return RW_OK;
	}
	gsl_sort(work, 1, m);
	return rw_unc_summary_sorted(work, m, pct, npct, mean, sd, q);
}

int rw_unc_summary_sorted(const double *x, size_t n, const double *pct,
                          size_t npct, double *mean, double *sd, double *q)
{
	if (!mean || !sd || (n && !x) || (npct && (!pct || !q)))
		return RW_EINVAL;
	if (n == 0) {
		*mean = *sd = NAN;
		for (size_t k = 0; k < npct; k++)
			q[k] = NAN;
		return RW_OK;
	}
	*mean = gsl_stats_mean(x, 1, n);
	*sd = n > 1 ? gsl_stats_sd_m(x, 1, n, *mean) : NAN;
	for (size_t k = 0; k < npct; k++)
		q[k] = gsl_stats_quantile_from_sorted_data(x, 1, n,
		                                           pct[k] / 100.0);
	return RW_OK;
}

double rw_unc_spearman(const double *x, size_t sx, const double *y, size_t sy,
                       size_t n, double *work)
{
	double *a = work, *b = work + n, *w = work + 2 * n;
	size_t m = 0;
	int const_a = 1, const_b = 1;

	for (size_t i = 0; i < n; i++)
		if (isfinite(x[i * sx]) && isfinite(y[i * sy])) {
			a[m] = x[i * sx];
			b[m] = y[i * sy];
			if (m && a[m] != a[0])
				const_a = 0;
			if (m && b[m] != b[0])
				const_b = 0;
			m++;
		}
	if (m < 3 || const_a || const_b)
		return NAN;
	return gsl_stats_spearman(a, 1, b, 1, m, w);
}

/* The bit pattern of v as an unsigned key in the order of the values
 * (IEEE 754 binary64: flip every bit of a negative, the sign bit of a
 * positive), with -0 as +0. */
static uint64_t sort_key(double v)
{
	uint64_t u;

	if (v == 0)
		v = 0; /* -0 */
	memcpy(&u, &v, sizeof u);
	return u >> 63 ? ~u : u ^ ((uint64_t)1 << 63);
}

int rw_unc_argsort(const double *x, size_t sx, size_t n, size_t *perm,
                   uint64_t *work)
{
	enum { BITS = 11, RADIX = 1 << BITS, PASSES = (64 + BITS - 1) / BITS };
	/* ib holds indices as size_t (no wider than 64 bits) */
	uint64_t *ka = work, *kb = work + n, *ib = work + 2 * n;
	size_t count[PASSES][RADIX];
	int in_perm = 1, first = 1;

	memset(count, 0, sizeof count);
	for (size_t i = 0; i < n; i++) {
		uint64_t k;
		if (!isfinite(x[i * sx]))
			return RW_EDOM;
		ka[i] = k = sort_key(x[i * sx]);
		for (int p = 0; p < PASSES; p++)
			count[p][(k >> (p * BITS)) & (RADIX - 1)]++;
	}
	/* LSD radix sort, 11 bits a pass (6 passes cover 64 bits), stable:
	 * the digits of every pass counted in the one read above; a pass
	 * where every key has the same digit is skipped; keys and indices
	 * move between two buffers without copying back. */
	for (int p = 0; p < PASSES && n; p++) {
		size_t *c = count[p], sum = 0;
		int shift = p * BITS;
		size_t *from_i = in_perm ? perm : (size_t *)ib;
		size_t *to_i = in_perm ? (size_t *)ib : perm;
		uint64_t *t;
		if (c[(ka[0] >> shift) & (RADIX - 1)] == n)
			continue;
		for (size_t d = 0; d < RADIX; d++) {
			size_t v = c[d];
			c[d] = sum;
			sum += v;
		}
		for (size_t i = 0; i < n; i++) {
			size_t to = c[(ka[i] >> shift) & (RADIX - 1)]++;
			kb[to] = ka[i];
			to_i[to] = first ? i : from_i[i];
		}
		first = 0;
		in_perm = !in_perm;
		t = ka, ka = kb, kb = t;
	}
	if (first)
		for (size_t i = 0; i < n; i++)
			perm[i] = i;
	else if (!in_perm)
		memcpy(perm, ib, n * sizeof *perm);
	return RW_OK;
}

size_t rw_unc_ranks_sorted(const double *x, size_t sx, const size_t *perm,
                           size_t n, const size_t *pos, double *r)
{
	size_t m = 0, k = 0;

	while (k < n) {
		size_t first = m, j;
		double v = x[perm[k] * sx];
		/* the run of values equal to v, kept ones counted */
		for (j = k; j < n && x[perm[j] * sx] == v; j++)
			if (!pos || pos[perm[j]] != SIZE_MAX)
				m++;
		for (size_t t = k; t < j; t++) {
			size_t d = perm[t];
			if (pos && pos[d] == SIZE_MAX)
				continue;
			/* ranks first+1 .. m: their mean */
			r[pos ? pos[d] : d] = 0.5 * (double)(first + 1 + m);
		}
		k = j;
	}
	return m;
}

int rw_unc_sorted_has_ties(const double *x, size_t sx, const size_t *perm,
                           size_t n)
{
	for (size_t k = 1; k < n; k++)
		if (x[perm[k] * sx] == x[perm[k - 1] * sx])
			return 1;
	return 0;
}

size_t rw_unc_ranks_kept(const size_t *perm, size_t n, const size_t *pos,
                         double *r)
{
	size_t m = 0;

	for (size_t k = 0; k < n; k++) {
		size_t p = pos[perm[k]];
		if (p != SIZE_MAX)
			r[p] = (double)++m;
	}
	return m;
}

void rw_unc_ranks_of_sorted(const double *sorted, const size_t *perm, size_t n,
                            double *r)
{
	for (size_t k = 0; k < n;) {
		size_t t = k + 1;
		double mean;
		while (t < n && sorted[t] == sorted[k])
			t++;
		mean = 0.5 * (double)(k + 1 + t); /* ranks k+1 .. t */
		for (; k < t; k++)
			r[perm[k]] = mean;
	}
}

int rw_unc_ranks(const double *x, size_t sx, size_t n, double *r, size_t *perm,
                 uint64_t *work)
{
	int rc = rw_unc_argsort(x, sx, n, perm, work);

	if (rc != RW_OK)
		return rc;
	rw_unc_ranks_sorted(x, sx, perm, n, NULL, r);
	return RW_OK;
}

double rw_unc_rank_correlation(const double *a, const double *b, size_t n)
{
	/* mean ranks keep the mean of ranks 1..n: (n + 1) / 2 */
	double c = 0.5 * (double)(n + 1), sab = 0, saa = 0, sbb = 0;

	if (n < 3)
		return NAN;
	for (size_t i = 0; i < n; i++) {
		double x = a[i] - c, y = b[i] - c;
		sab += x * y;
		saa += x * x;
		sbb += y * y;
	}
	if (!(saa > 0) || !(sbb > 0))
		return NAN;
	return sab / sqrt(saa * sbb);
}
