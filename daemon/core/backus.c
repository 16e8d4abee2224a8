/* Upscaling of well logs to seismic scale: the Backus (1962) average of
 * isotropic layers (explicit layers or a moving window over a log), the
 * window length from a fraction of the shortest wavelength, and blocking
 * (boundaries detected on a curve, block means between boundaries).
 * Conventions are in include/rockwire/seismic.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/aniso.h"
#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "seis_internal.h"

/* Thickness-weighted sums of the Backus average. */
struct bsum {
	rw__seis_ksum w;       /* total weight */
	rw__seis_ksum rho;     /* rho */
	rw__seis_ksum inv_m;   /* 1 / M */
	rw__seis_ksum inv_mu;  /* 1 / mu (solid layers) */
	rw__seis_ksum mu;      /* mu */
	rw__seis_ksum lam_m;   /* lambda / M */
	rw__seis_ksum c11part; /* 4 mu (lambda + mu) / M */
	int fluid;             /* a layer with mu = 0 */
};

static void bsum_add(struct bsum *s, double vp, double vs, double rho, double w)
{
	double m = rho * vp * vp, mu = rho * vs * vs, lam = m - 2.0 * mu;

	rw__seis_ksum_add(&s->w, w);
	rw__seis_ksum_add(&s->rho, w * rho);
	rw__seis_ksum_add(&s->inv_m, w / m);
	rw__seis_ksum_add(&s->mu, w * mu);
	rw__seis_ksum_add(&s->lam_m, w * lam / m);
	rw__seis_ksum_add(&s->c11part, w * 4.0 * mu * (lam + mu) / m);
	if (mu > 0.0)
		rw__seis_ksum_add(&s->inv_mu, w / mu);
	else
		s->fluid = 1;
}

static void backus_nan(rw_seis_backus *b)
{
	b->c.c11_pa = b->c.c13_pa = b->c.c33_pa = b->c.c44_pa = b->c.c66_pa =
	    NAN;
	b->rho_kgm3 = NAN;
	b->th.vp0_ms = b->th.vs0_ms = b->th.rho_kgm3 = NAN;
	b->th.epsilon = b->th.delta = b->th.gamma = NAN;
}

/* Mavko, Mukerji & Dvorkin 2009, sec. 4.13 (see seismic.h). */
static void bsum_final(const struct bsum *s, rw_seis_backus *b, unsigned *warn)
{
	double w = rw__seis_ksum_value(&s->w);
	double inv_m = rw__seis_ksum_value(&s->inv_m) / w;
	double lam_m = rw__seis_ksum_value(&s->lam_m) / w;
	double c33 = 1.0 / inv_m;

	b->c.c33_pa = c33;
	b->c.c13_pa = lam_m * c33;
	b->c.c11_pa =
	    rw__seis_ksum_value(&s->c11part) / w + lam_m * lam_m * c33;
	b->c.c66_pa = rw__seis_ksum_value(&s->mu) / w;
	b->c.c44_pa =
	    s->fluid ? 0.0 : 1.0 / (rw__seis_ksum_value(&s->inv_mu) / w);
	b->rho_kgm3 = rw__seis_ksum_value(&s->rho) / w;
	if (s->fluid) {
		b->th.vp0_ms = sqrt(c33 / b->rho_kgm3);
		b->th.vs0_ms = 0.0;
		b->th.rho_kgm3 = b->rho_kgm3;
		b->th.epsilon = b->th.delta = b->th.gamma = NAN;
		if (warn != NULL)
			*warn |= RW_SEIS_WARN_FLUID_LAYER;
		return;
	}
	if (rw_aniso_thomsen_from_stiff(&b->c, b->rho_kgm3, &b->th) != RW_OK) {
		/* not reached for valid isotropic layers: the average of
		 * stable media is stable; kept as a guard */
		b->th.vp0_ms = b->th.vs0_ms = b->th.rho_kgm3 = NAN;
	}
}

static int medium_ok(double vp, double vs, double rho)
{
	rw_reflect_medium m;

	m.vp_ms = vp;
	m.vs_ms = vs;
	m.rho_kgm3 = rho;
	return rw_reflect_medium_check(&m) == RW_OK;
}

int rw_seis_backus_layers(const double *h_m, const double *vp_ms,
                          const double *vs_ms, const double *rho_kgm3, size_t n,
                          rw_seis_backus *out, unsigned *warn)
{
	struct bsum s = {{0, 0}, {0, 0}, {0, 0}, {0, 0},
	                 {0, 0}, {0, 0}, {0, 0}, 0};
	size_t i;

	if (out == NULL)
		return RW_EDOM;
	backus_nan(out);
	if (warn != NULL)
		*warn = 0;
	if (n == 0 || h_m == NULL || vp_ms == NULL || vs_ms == NULL ||
	    rho_kgm3 == NULL)
		return RW_EDOM;
	for (i = 0; i < n; i++)
		if (!isfinite(h_m[i]) || !(h_m[i] > 0.0) ||
		    !medium_ok(vp_ms[i], vs_ms[i], rho_kgm3[i]))
			return RW_EDOM;
	for (i = 0; i < n; i++)
		bsum_add(&s, vp_ms[i], vs_ms[i], rho_kgm3[i], h_m[i]);
	bsum_final(&s, out, warn);
	return RW_OK;
}

/* Cell edges: e_0 = z_0 - (z_1 - z_0)/2, e_i = (z_{i-1} + z_i)/2,
 * e_n = z_{n-1} + (z_{n-1} - z_{n-2})/2 (n >= 2). */
static double edge(const double *z, size_t n, size_t i)
{
	if (i == 0)
		return z[0] - 0.5 * (z[1] - z[0]);
	if (i == n)
		return z[n - 1] + 0.5 * (z[n - 1] - z[n - 2]);
	return 0.5 * (z[i - 1] + z[i]);
}

/* Length of [a, b] inside [lo, hi]. */
static double overlap(double a, double b, double lo, double hi)
{
	double l = a > lo ? a : lo, h = b < hi ? b : hi;

	return h > l ? h - l : 0.0;
}

int rw_seis_backus_log(const double *z_m, const double *vp_ms,
                       const double *vs_ms, const double *rho_kgm3, size_t n,
                       double window_m, double min_valid, rw_seis_backus *out,
                       unsigned *warn)
{
	double top, bot;
	size_t i, jlo = 0;

	if (out == NULL)
		return RW_EDOM;
	for (i = 0; i < n; i++) {
		backus_nan(&out[i]);
		if (warn != NULL)
			warn[i] = 0;
	}
	if (n < 2 || !rw__seis_increasing(z_m, n) || vp_ms == NULL ||
	    vs_ms == NULL || rho_kgm3 == NULL || !isfinite(window_m) ||
	    !(window_m > 0.0) || !isfinite(min_valid) || !(min_valid > 0.0) ||
	    min_valid > 1.0)
		return RW_EDOM;
	top = edge(z_m, n, 0);
	bot = edge(z_m, n, n);
	for (i = 0; i < n; i++) {
		struct bsum s = {{0, 0}, {0, 0}, {0, 0}, {0, 0},
		                 {0, 0}, {0, 0}, {0, 0}, 0};
		double lo = z_m[i] - 0.5 * window_m,
		       hi = z_m[i] + 0.5 * window_m;
		double span, valid;
		unsigned wb = 0;
		size_t j;

		if (lo < top || hi > bot)
			wb |= RW_SEIS_WARN_WINDOW_CUT;
		lo = lo < top ? top : lo;
		hi = hi > bot ? bot : hi;
		span = hi - lo;
		while (jlo < n && edge(z_m, n, jlo + 1) <= lo)
			jlo++;
		for (j = jlo; j < n && edge(z_m, n, j) < hi; j++) {
			double w = overlap(edge(z_m, n, j), edge(z_m, n, j + 1),
			                   lo, hi);

			if (w <= 0.0)
				continue;
			if (!medium_ok(vp_ms[j], vs_ms[j], rho_kgm3[j])) {
				wb |= RW_SEIS_WARN_NULL_IN_WIN;
				continue;
			}
			bsum_add(&s, vp_ms[j], vs_ms[j], rho_kgm3[j], w);
		}
		valid = rw__seis_ksum_value(&s.w);
		if (!(valid > 0.0) || valid < min_valid * span) {
			wb |= RW_SEIS_WARN_TOO_FEW_VALID;
		} else {
			bsum_final(&s, &out[i], &wb);
		}
		if (warn != NULL)
			warn[i] = wb;
	}
	return RW_OK;
}

int rw_seis_backus_window(const double *vp_ms, const double *vs_ms, size_t n,
                          double b, double f_hz, double *window_m)
{
	double vmin = INFINITY;
	size_t i;

	if (window_m == NULL)
		return RW_EDOM;
	*window_m = NAN;
	if (!isfinite(b) || !(b > 0.0) || !isfinite(f_hz) || !(f_hz > 0.0))
		return RW_EDOM;
	if (vs_ms != NULL)
		for (i = 0; i < n; i++)
			if (isfinite(vs_ms[i]) && vs_ms[i] > 0.0 &&
			    vs_ms[i] < vmin)
				vmin = vs_ms[i];
	if (!isfinite(vmin) && vp_ms != NULL)
		for (i = 0; i < n; i++)
			if (isfinite(vp_ms[i]) && vp_ms[i] > 0.0 &&
			    vp_ms[i] < vmin)
				vmin = vp_ms[i];
	if (!isfinite(vmin))
		return RW_EINVAL;
	*window_m = b * vmin / f_hz;
	return RW_OK;
}

/* ---- blocking ---------------------------------------------------------- */

int rw_seis_block_detect(const double *z_m, const double *y, size_t n,
                         double threshold, double min_thick_m, double *bounds,
                         size_t cap, size_t *nb)
{
	rw__seis_ksum sum = {0.0, 0.0};
	size_t j, count = 0, in_block = 0;
	double block_top;

	if (nb == NULL)
		return RW_EDOM;
	*nb = 0;
	if (n < 2 || !rw__seis_increasing(z_m, n) || y == NULL ||
	    !isfinite(threshold) || !(threshold > 0.0) ||
	    !isfinite(min_thick_m) || min_thick_m < 0.0)
		return RW_EDOM;
	for (j = 0; j < n && !isfinite(y[j]); j++)
		;
	if (j == n)
		return RW_EINVAL;
	if (bounds == NULL || cap < 2)
		return RW_ERANGE;
	block_top = edge(z_m, n, 0);
	bounds[count++] = block_top;
	for (j = 0; j < n; j++) {
		double mean;

		if (!isfinite(y[j]))
			continue;
		if (in_block > 0) {
			double b = 0.5 * (z_m[j - 1] + z_m[j]);

			mean = rw__seis_ksum_value(&sum) / (double)in_block;
			if (fabs(y[j] - mean) > threshold &&
			    b - block_top >= min_thick_m) {
				if (count + 1 >= cap)
					return RW_ERANGE;
				bounds[count++] = b;
				block_top = b;
				sum.s = sum.c = 0.0;
				in_block = 0;
			}
		}
		rw__seis_ksum_add(&sum, y[j]);
		in_block++;
	}
	if (count >= cap)
		return RW_ERANGE;
	bounds[count++] = edge(z_m, n, n);
	*nb = count;
	return RW_OK;
}

int rw_seis_block_means(const double *z_m, const double *y, size_t n,
                        const double *bounds, size_t nb, rw_seis_mean kind,
                        double *block, double *out, unsigned *warn)
{
	size_t i, k, j0 = 0;

	if (block == NULL)
		return RW_EDOM;
	for (k = 0; k + 1 < nb; k++)
		block[k] = NAN;
	for (i = 0; out != NULL && i < n; i++)
		out[i] = NAN;
	for (i = 0; warn != NULL && i < n; i++)
		warn[i] = 0;
	if (n < 2 || !rw__seis_increasing(z_m, n) || y == NULL || nb < 2 ||
	    !rw__seis_increasing(bounds, nb) ||
	    (kind != RW_SEIS_MEAN_ARITHMETIC && kind != RW_SEIS_MEAN_HARMONIC))
		return RW_EDOM;
	for (k = 0; k + 1 < nb; k++) {
		rw__seis_ksum sw = {0.0, 0.0}, sy = {0.0, 0.0};
		double lo = bounds[k], hi = bounds[k + 1], wt;
		size_t j;

		while (j0 < n && edge(z_m, n, j0 + 1) <= lo)
			j0++;
		for (j = j0; j < n && edge(z_m, n, j) < hi; j++) {
			double w = overlap(edge(z_m, n, j), edge(z_m, n, j + 1),
			                   lo, hi);

			if (w <= 0.0 || !isfinite(y[j]))
				continue;
			if (kind == RW_SEIS_MEAN_HARMONIC) {
				if (!(y[j] > 0.0))
					continue;
				rw__seis_ksum_add(&sy, w / y[j]);
			} else {
				rw__seis_ksum_add(&sy, w * y[j]);
			}
			rw__seis_ksum_add(&sw, w);
		}
		wt = rw__seis_ksum_value(&sw);
		if (wt > 0.0) {
			double m = rw__seis_ksum_value(&sy) / wt;

			block[k] = kind == RW_SEIS_MEAN_HARMONIC ? 1.0 / m : m;
		}
	}
	/* the blocked curve at the samples: block k holds [b_k, b_{k+1}) */
	for (i = 0, k = 0; i < n; i++) {
		double z = z_m[i];

		if (z < bounds[0] || z > bounds[nb - 1]) {
			if (warn != NULL)
				warn[i] |= RW_SEIS_WARN_OUTSIDE;
			continue;
		}
		while (k + 2 < nb && z >= bounds[k + 1])
			k++;
		if (out != NULL)
			out[i] = block[k];
		if (!isfinite(block[k]) && warn != NULL)
			warn[i] |= RW_SEIS_WARN_TOO_FEW_VALID;
	}
	return RW_OK;
}
