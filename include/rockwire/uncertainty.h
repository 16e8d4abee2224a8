/* Uncertainty: probability distributions of inputs, their draws (plain
 * Monte Carlo or Latin hypercube, correlated through a Gaussian copula),
 * and the statistics of outputs (mean, standard deviation, percentiles,
 * rank correlation). The protocol layer uses these to run any per-sample
 * method over draws of its uncertain inputs. Draws are reproducible: the
 * same seed and stream give the same numbers on any machine and thread.
 * Sources: Latin hypercube sampling, McKay, Beckman & Conover 1979; the
 * Gaussian copula for correlated inputs (Iman & Conover 1982 use ranks;
 * the normal-scores form here is the common practice); percentiles by
 * linear interpolation between order statistics (Hyndman & Fan 1996
 * definition 7, the default of numpy and GSL). */
#ifndef ROCKWIRE_UNCERTAINTY_H
#define ROCKWIRE_UNCERTAINTY_H

#include <stddef.h>
#include <stdint.h>

#include "rockwire/status.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum rw_dist_kind {
	RW_DIST_NORMAL = 0,   /* a = mean, b = standard deviation */
	RW_DIST_LOGNORMAL,    /* a = mean, b = standard deviation of the
	                         variable itself (> 0 values only) */
	RW_DIST_UNIFORM,      /* a = low, b = high */
	RW_DIST_TRIANGULAR,   /* a = low, b = mode, c = high */
	RW_DIST_TRUNC_NORMAL, /* a = mean, b = sd of the parent normal,
	                         c = low, d = high */
	RW_DIST_COUNT
} rw_dist_kind;

typedef struct rw_dist {
	rw_dist_kind kind;
	double a, b, c, d;
} rw_dist;

/* Checks a distribution's parameters: finite; sd > 0; low < high; low <=
 * mode <= high; for the lognormal mean > 0; for the truncated normal a
 * window holding at least 1e-12 of the parent's probability.
 * errors: RW_EDOM (with the reason in *why, a static string, when why is
 * not NULL). */
int rw_dist_check(const rw_dist *d, const char **why);

/* The value at cumulative probability u in (0, 1) (the inverse CDF).
 * NaN for u outside (0, 1) or an invalid distribution. */
double rw_dist_quantile(const rw_dist *d, double u);

/* The mean of the distribution (NaN when invalid). */
double rw_dist_mean(const rw_dist *d);

/* A normal (lognormal when `lognormal`) through two percentiles: x_lo at
 * probability p_lo and x_hi at p_hi (0 < p_lo < p_hi < 1, x_lo < x_hi;
 * both > 0 for the lognormal), e.g. P10 and P90.
 * errors: RW_EDOM. */
int rw_dist_from_percentiles(double p_lo, double x_lo, double p_hi, double x_hi,
                             int lognormal, rw_dist *out);

/* A random-number stream (GSL's MT19937), for rw_unc_uniforms. Free with
 * rw_unc_rng_free (NULL is a no-op); NULL when out of memory. */
typedef struct rw_unc_rng rw_unc_rng;
rw_unc_rng *rw_unc_rng_new(void);
void rw_unc_rng_free(rw_unc_rng *r);

/* n uniforms in (0, 1) of stream `stream` under `seed` into u: plain
 * Monte Carlo, or with `latin` one in each of n equal strata in random
 * order (Latin hypercube). The same (seed, stream, n, latin) give the
 * same numbers. errors: RW_EINVAL for NULL or n == 0. */
int rw_unc_uniforms(rw_unc_rng *r, uint64_t seed, uint64_t stream, size_t n,
                    int latin, double *u);

/* Cholesky factor of the n x n correlation matrix a (row-major), in
 * place: on return the lower triangle holds L with a = L L^T (the upper
 * triangle is cleared). The matrix must be symmetric with unit diagonal
 * and entries in [-1, 1].
 * errors: RW_EDOM when it is not a correlation matrix or not positive
 * definite (the input is then left undefined). */
int rw_unc_cholesky(size_t n, double *a);

/* Correlates n uniforms through the Gaussian copula: z = Phi^-1(u),
 * z' = L z (L from rw_unc_cholesky), u = Phi(z'), in place. */
void rw_unc_correlate(size_t n, const double *l, double *u);

/* Statistics of x[0], x[stride], ... (n values; NaN values are left out):
 * the mean, the sample standard deviation (n - 1), and the npct
 * percentiles pct[] (in percent, 0..100) into q[] by linear interpolation
 * between order statistics. work holds n doubles. *n_valid (may be NULL)
 * receives the count of finite values; with none, the outputs are NaN.
 * errors: RW_EINVAL for NULL arrays. */
int rw_unc_summary(const double *x, size_t stride, size_t n, double *work,
                   const double *pct, size_t npct, double *mean, double *sd,
                   double *q, size_t *n_valid);

/* rw_unc_summary of n finite values already sorted ascending (no copy,
 * no sort). */
int rw_unc_summary_sorted(const double *x, size_t n, const double *pct,
                          size_t npct, double *mean, double *sd, double *q);

/* Spearman rank correlation of x[i * sx] and y[i * sy], i < n, over the
 * pairs where both are finite (ties get their mean rank); NaN with fewer
 * than 3 such pairs or when either side is constant. work holds 4 n
 * doubles. */
double rw_unc_spearman(const double *x, size_t sx, const double *y, size_t sy,
                       size_t n, double *work);

/* Sorts n values: perm[k] is the index of the k-th smallest of x[i * sx]
 * (stable; -0 sorts as +0). An LSD radix sort on the values' bit
 * patterns, O(n): an uncertain answer sorts every output at every sample
 * (percentiles, ranks), and this is several times faster there than a
 * comparison sort. work holds 3 n 64-bit words. Returns RW_OK, or RW_EDOM
 * when a value is not finite (perm is then unset). */
int rw_unc_argsort(const double *x, size_t sx, size_t n, size_t *perm,
                   uint64_t *work);

/* Ranks (1 to m; ties, equal values, get their mean rank, as in
 * rw_unc_spearman) from a sort perm of x[i * sx], i < n. With pos NULL,
 * r[i] is the rank of x[i * sx] among all n (m = n). Otherwise only the
 * values with pos[i] != SIZE_MAX are ranked, among themselves, into
 * r[pos[i]] (a compaction: pairs dropped elsewhere drop here too). Returns
 * m, the count ranked. Spearman's correlation is Pearson's of the ranks,
 * so many correlations with one variable need one sort of it. */
size_t rw_unc_ranks_sorted(const double *x, size_t sx, const size_t *perm,
                           size_t n, const size_t *pos, double *r);

/* Whether a sort perm of x[i * sx], i < n, has equal neighbours. */
int rw_unc_sorted_has_ties(const double *x, size_t sx, const size_t *perm,
                           size_t n);

/* rw_unc_ranks_sorted with pos, for values known to have no ties: the
 * kept values in sorted order get ranks 1 to m (no value is read).
 * Returns m. */
size_t rw_unc_ranks_kept(const size_t *perm, size_t n, const size_t *pos,
                         double *r);

/* The same ranks when the values are at hand sorted: sorted[k] is the
 * k-th smallest, at index perm[k]; r[perm[k]] gets its rank (one
 * sequential pass). */
void rw_unc_ranks_of_sorted(const double *sorted, const size_t *perm, size_t n,
                            double *r);

/* rw_unc_argsort then rw_unc_ranks_sorted over all n: ranks of x into r.
 * perm holds n indices, work 3 n 64-bit words. RW_EDOM when a value is
 * not finite. */
int rw_unc_ranks(const double *x, size_t sx, size_t n, double *r, size_t *perm,
                 uint64_t *work);

/* Pearson's correlation of two rank vectors a[0..n), b[0..n) (from
 * rw_unc_ranks or rw_unc_ranks_sorted: their mean is (n + 1) / 2), in one
 * pass: Spearman's correlation of the ranked variables. NaN when n < 3 or
 * either is constant. */
double rw_unc_rank_correlation(const double *a, const double *b, size_t n);

#ifdef __cplusplus
}
#endif

#endif
