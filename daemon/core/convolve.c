/* Convolution of a series with a wavelet, by the direct sum or by GSL's
 * radix-2 real FFTs on a zero-padded, caller-owned workspace, and the
 * discrete Hilbert transform built on it. Conventions are in
 * include/rockwire/seismic.h. */
#include <math.h>
#include <stdint.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_fft_halfcomplex.h>
#include <gsl/gsl_fft_real.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "seis_internal.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

size_t rw__seis_pow2(size_t n)
{
	size_t p = 1;

	while (p < n) {
		if (p > SIZE_MAX / 2)
			return 0;
		p *= 2;
	}
	return p;
}

int rw__seis_increasing(const double *x, size_t n)
{
	size_t i;

	if (x == NULL)
		return 0;
	for (i = 0; i < n; i++) {
		if (!isfinite(x[i]))
			return 0;
		if (i > 0 && !(x[i] > x[i - 1]))
			return 0;
	}
	return 1;
}

/* FFT size of a linear convolution of lengths nr and nw; 0 on overflow. */
static size_t fft_size(size_t nr, size_t nw)
{
	if (nr == 0 || nw == 0 || nr > SIZE_MAX - nw)
		return 0;
	return rw__seis_pow2(nr + nw - 1);
}

size_t rw__seis_conv_work(size_t nr, size_t nw)
{
	size_t n = fft_size(nr, nw);

	if (n == 0 || n > SIZE_MAX / (2 * sizeof(double)))
		return 0;
	return 2 * n;
}

/* Operation counts: the direct sum costs nr nw multiply-adds; a
 * transform of size N about N log2 N, and an application two of them
 * plus the product. tests/bench/bench_seismic.py measured the crossover
 * at nr nw / (N log2 N) between 3 (short series) and 8 (16384 samples,
 * where the radix-2 transforms leave the cache) on the development
 * machine; 6 sits in that band, where the two paths differ by less than
 * a factor of two. */
int rw__seis_conv_use_fft(size_t nr, size_t nw)
{
	size_t n = fft_size(nr, nw), lg = 0, m;

	if (n == 0)
		return 0;
	for (m = n; m > 1; m /= 2)
		lg++;
	return (double)nr * (double)nw > 6.0 * (double)n * (double)lg;
}

int rw__seis_conv_plan_init(rw__seis_conv_plan *p, const double *w, size_t nw,
                            size_t i0, size_t nr, rw_seis_conv method,
                            double *work, size_t work_len)
{
	int fft;

	memset(p, 0, sizeof *p);
	if (w == NULL || nw == 0 || nr == 0 || i0 >= nw)
		return RW_EDOM;
	switch (method) {
	case RW_SEIS_CONV_AUTO: fft = rw__seis_conv_use_fft(nr, nw); break;
	case RW_SEIS_CONV_DIRECT: fft = 0; break;
	case RW_SEIS_CONV_FFT: fft = 1; break;
	default: return RW_EDOM;
	}
	p->nr = nr;
	p->nw = nw;
	p->i0 = i0;
	p->w = w;
	if (!fft)
		return RW_OK;
	p->nfft = fft_size(nr, nw);
	if (p->nfft == 0 || work == NULL || work_len < 2 * p->nfft)
		return RW_ERANGE;
	p->spec = work;
	p->buf = work + p->nfft;
	memset(p->spec, 0, p->nfft * sizeof(double));
	memcpy(p->spec, w, nw * sizeof(double));
	if (gsl_fft_real_radix2_transform(p->spec, 1, p->nfft) != GSL_SUCCESS)
		return RW_ERANGE;
	return RW_OK;
}

/* Product of two spectra in GSL's radix-2 half-complex layout
 * (r0, r1, ..., r(n/2), i(n/2-1), ..., i1), into a. */
static void hc_mul(double *a, const double *b, size_t n)
{
	size_t k;

	a[0] *= b[0];
	if (n == 1)
		return;
	a[n / 2] *= b[n / 2];
	for (k = 1; k < n / 2; k++) {
		double ar = a[k], ai = a[n - k], br = b[k], bi = b[n - k];

		a[k] = ar * br - ai * bi;
		a[n - k] = ar * bi + ai * br;
	}
}

int rw__seis_conv_apply(const rw__seis_conv_plan *p, const double *r,
                        double *out)
{
	size_t k, j, nr = p->nr, nw = p->nw, i0 = p->i0;

	if (p->nfft == 0) {
		for (k = 0; k < nr; k++) {
			/* j with 0 <= k + i0 - j < nr and 0 <= j < nw */
			size_t top = k + i0, jlo, jhi;
			double s = 0.0;

			jlo = top >= nr ? top - nr + 1 : 0;
			jhi = top < nw - 1 ? top : nw - 1;
			for (j = jlo; j <= jhi && jlo <= jhi; j++)
				s += p->w[j] * r[top - j];
			out[k] = s;
		}
		return RW_OK;
	}
	memset(p->buf, 0, p->nfft * sizeof(double));
	memcpy(p->buf, r, nr * sizeof(double));
	if (gsl_fft_real_radix2_transform(p->buf, 1, p->nfft) != GSL_SUCCESS)
		return RW_ERANGE;
	hc_mul(p->buf, p->spec, p->nfft);
	if (gsl_fft_halfcomplex_radix2_inverse(p->buf, 1, p->nfft) !=
	    GSL_SUCCESS)
		return RW_ERANGE;
	/* the linear convolution c[q] = sum r[m] w[q - m]; out[k] = c[k+i0] */
	for (k = 0; k < nr; k++)
		out[k] = p->buf[k + i0];
	return RW_OK;
}

size_t rw_seis_convolve_workspace(size_t nr, size_t nw)
{
	return rw__seis_conv_work(nr, nw);
}

static int all_finite(const double *x, size_t n)
{
	size_t i;

	for (i = 0; i < n; i++)
		if (!isfinite(x[i]))
			return 0;
	return 1;
}

static void fill_nan(double *x, size_t n)
{
	size_t i;

	for (i = 0; i < n; i++)
		x[i] = NAN;
}

int rw_seis_convolve(const double *r, size_t nr, const double *w, size_t nw,
                     size_t i0, rw_seis_conv method, double *out, double *work,
                     size_t work_len)
{
	rw__seis_conv_plan p;
	int st;

	if (out == NULL)
		return RW_EDOM;
	fill_nan(out, nr);
	if (r == NULL || w == NULL || nr == 0 || nw == 0 || i0 >= nw)
		return RW_EDOM;
	if (!all_finite(r, nr) || !all_finite(w, nw))
		return RW_EDOM;
	st = rw__seis_conv_plan_init(&p, w, nw, i0, nr, method, work, work_len);
	if (st == RW_OK)
		st = rw__seis_conv_apply(&p, r, out);
	if (st != RW_OK)
		fill_nan(out, nr);
	return st;
}

/* ---- Hilbert transform --------------------------------------------------
 * Workspace: the kernel (2n - 1 doubles), n doubles for the rotation's
 * transform, then the convolution plan's workspace. */

size_t rw_seis_hilbert_workspace(size_t n)
{
	size_t cw;

	if (n == 0 || n > RW_SEIS_MAX_WAVELET)
		return 0;
	cw = rw__seis_conv_work(n, 2 * n - 1);
	return cw == 0 ? 0 : cw + 3 * n - 1;
}

int rw_seis_hilbert(const double *x, size_t n, double *h, double *work,
                    size_t work_len)
{
	rw__seis_conv_plan p;
	double *g;
	size_t j;
	int st;

	if (h == NULL)
		return RW_EDOM;
	if (n == 0 || n > RW_SEIS_MAX_WAVELET) {
		return RW_EDOM;
	}
	fill_nan(h, n);
	if (x == NULL || !all_finite(x, n))
		return RW_EDOM;
	if (work == NULL || work_len < rw_seis_hilbert_workspace(n))
		return RW_ERANGE;
	/* g[j] holds the kernel at lag j - (n - 1) */
	g = work;
	for (j = 0; j < 2 * n - 1; j++) {
		long lag = (long)j - (long)(n - 1);

		g[j] = (lag % 2 != 0) ? 2.0 / (M_PI * (double)lag) : 0.0;
	}
	st = rw__seis_conv_plan_init(&p, g, 2 * n - 1, n - 1, n,
	                             RW_SEIS_CONV_AUTO, work + 3 * n - 1,
	                             work_len - (3 * n - 1));
	if (st == RW_OK)
		st = rw__seis_conv_apply(&p, x, h);
	if (st != RW_OK)
		fill_nan(h, n);
	return st;
}
