/* Unit tests of the convolution and the discrete Hilbert transform
 * (daemon/core/convolve.c): a spike returns the wavelet at its time, the
 * direct and FFT paths agree, closed forms of box convolutions and of the
 * Hilbert kernel, and the error cases. numpy.convolve is the outside
 * reference in tests/reference/test_seismic_numpy.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <stdlib.h>
#include <gsl/gsl_errno.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static double *work_for(size_t nr, size_t nw, size_t *len)
{
	double *w;

	*len = rw_seis_convolve_workspace(nr, nw);
	assert_true(*len > 0);
	w = malloc(*len * sizeof(double));
	assert_non_null(w);
	return w;
}

/* A unit spike at r[m] returns the wavelet with its time-zero sample at
 * out[m] (the definition of the "same" convolution; common practice):
 * exactly for the direct sum, to rounding for the FFT. */
static void test_spike(void **state)
{
	enum { NR = 200, NW = 31 };
	double r[NR] = {0}, w[NW], out[NR], *work;
	size_t len, k, i0 = 12, m = 77;
	int meth;

	(void)state;
	for (k = 0; k < NW; k++)
		w[k] = sin(0.3 * (double)k) + 0.1 * (double)k;
	r[m] = 1.0;
	work = work_for(NR, NW, &len);
	for (meth = RW_SEIS_CONV_DIRECT; meth <= RW_SEIS_CONV_FFT; meth++) {
		assert_int_equal(rw_seis_convolve(r, NR, w, NW, i0,
		                                  (rw_seis_conv)meth, out, work,
		                                  len),
		                 RW_OK);
		for (k = 0; k < NR; k++) {
			long j = (long)k - (long)m + (long)i0;
			double want = (j >= 0 && j < NW) ? w[j] : 0.0;
			double tol = meth == RW_SEIS_CONV_DIRECT ? 0.0 : 1e-14;

			assert_true(fabs(out[k] - want) <= tol);
		}
		/* the time-zero sample lands on the spike */
		assert_true(fabs(out[m] - w[i0]) <= 1e-14);
	}
	free(work);
}

/* Two boxes of lengths a <= b convolve to a trapezoid: ramp 1..a, flat a,
 * ramp down (an arithmetic fact); all values are small integers, so both
 * paths must give them to rounding. */
static void test_boxes(void **state)
{
	enum { A = 7, B = 20 };
	double r[B], w[A], out[B], *work;
	size_t len, k;
	int meth;

	(void)state;
	for (k = 0; k < B; k++)
		r[k] = 1.0;
	for (k = 0; k < A; k++)
		w[k] = 1.0;
	work = work_for(B, A, &len);
	for (meth = RW_SEIS_CONV_DIRECT; meth <= RW_SEIS_CONV_FFT; meth++) {
		/* i0 = 0: out[k] = number of w samples over r, = min(k+1, A) */
		assert_int_equal(rw_seis_convolve(r, B, w, A, 0,
		                                  (rw_seis_conv)meth, out, work,
		                                  len),
		                 RW_OK);
		for (k = 0; k < B; k++) {
			double want = (double)(k + 1 < A ? k + 1 : A);

			assert_true(fabs(out[k] - want) <= 1e-13);
		}
		/* i0 = A - 1: out[k] = min(B - k, A) */
		assert_int_equal(rw_seis_convolve(r, B, w, A, A - 1,
		                                  (rw_seis_conv)meth, out, work,
		                                  len),
		                 RW_OK);
		for (k = 0; k < B; k++) {
			double want = (double)(B - k < A ? B - k : A);

			assert_true(fabs(out[k] - want) <= 1e-13);
		}
	}
	free(work);
}

/* Direct and FFT agree to 1e-12 (the same sum both ways; measured ~1e-14 on
 * these O(1) random series) over a table of shapes, including a wavelet
 * longer than the series, single samples and time zero at either end. */
static void test_fft_vs_direct(void **state)
{
	static const size_t shapes[][3] = {
	    {1, 1, 0},      {1, 5, 2},         {5, 1, 0},       {10, 30, 29},
	    {64, 64, 0},    {257, 33, 16},     {1000, 101, 50}, {999, 257, 3},
	    {3000, 61, 60}, {4096, 1025, 512},
	};
	uint64_t s = 42;
	size_t t;

	(void)state;
	for (t = 0; t < sizeof shapes / sizeof shapes[0]; t++) {
		size_t nr = shapes[t][0], nw = shapes[t][1], i0 = shapes[t][2];
		double *r = malloc(nr * sizeof(double));
		double *w = malloc(nw * sizeof(double));
		double *a = malloc(nr * sizeof(double));
		double *b = malloc(nr * sizeof(double));
		double *c = malloc(nr * sizeof(double));
		size_t len, k;
		double *work = work_for(nr, nw, &len);

		assert_true(r && w && a && b && c);
		for (k = 0; k < nr; k++)
			r[k] = urand(&s, -0.3, 0.3);
		for (k = 0; k < nw; k++)
			w[k] = urand(&s, -1.0, 1.0);
		assert_int_equal(rw_seis_convolve(r, nr, w, nw, i0,
		                                  RW_SEIS_CONV_DIRECT, a, work,
		                                  len),
		                 RW_OK);
		assert_int_equal(rw_seis_convolve(r, nr, w, nw, i0,
		                                  RW_SEIS_CONV_FFT, b, work,
		                                  len),
		                 RW_OK);
		assert_int_equal(rw_seis_convolve(r, nr, w, nw, i0,
		                                  RW_SEIS_CONV_AUTO, c, work,
		                                  len),
		                 RW_OK);
		for (k = 0; k < nr; k++) {
			assert_true(fabs(a[k] - b[k]) <= 1e-12);
			assert_true(fabs(a[k] - c[k]) <= 1e-12);
		}
		free(r);
		free(w);
		free(a);
		free(b);
		free(c);
		free(work);
	}
}

/* The Hilbert transform of a unit impulse at m is the ideal kernel
 * 2 / (pi (k - m)) at odd distances and 0 at even ones (Oppenheim &
 * Schafer 1989, sec. 11.4, from memory); a cosine deep inside a long
 * window becomes a sine (H{cos} = sin), to the truncation of the 1/t
 * kernel: the cut tail is an oscillating sum of order 1 / (pi d sin w) at
 * distance d from the window ends (4.4e-4 at the centre, d = 2000,
 * w = 0.37; checked as 1e-3). */
static void test_hilbert_closed_forms(void **state)
{
	enum { N = 41, M = 4001 };
	double x[N] = {0}, h[N], *c, *hc, *work;
	size_t len, k, m = 13;

	(void)state;
	x[m] = 1.0;
	len = rw_seis_hilbert_workspace(N);
	work = malloc(len * sizeof(double));
	assert_non_null(work);
	assert_int_equal(rw_seis_hilbert(x, N, h, work, len), RW_OK);
	for (k = 0; k < N; k++) {
		long d = (long)k - (long)m;
		double want = (d % 2 != 0) ? 2.0 / (M_PI * (double)d) : 0.0;

		assert_true(fabs(h[k] - want) <= 1e-15);
	}
	free(work);
	c = malloc(M * sizeof(double));
	hc = malloc(M * sizeof(double));
	len = rw_seis_hilbert_workspace(M);
	work = malloc(len * sizeof(double));
	assert_true(c && hc && work);
	for (k = 0; k < M; k++)
		c[k] = cos(0.37 * (double)k);
	assert_int_equal(rw_seis_hilbert(c, M, hc, work, len), RW_OK);
	for (k = M / 2 - 20; k <= M / 2 + 20; k++)
		assert_true(fabs(hc[k] - sin(0.37 * (double)k)) <= 1e-3);
	free(c);
	free(hc);
	free(work);
}

static void test_errors(void **state)
{
	double r[4] = {1, 2, 3, 4}, w[3] = {1, 0, -1}, out[4], work[64];
	double bad[4] = {1, NAN, 3, 4};

	(void)state;
	assert_int_equal(rw_seis_convolve_workspace(0, 3), 0);
	assert_int_equal(rw_seis_convolve_workspace(4, 0), 0);
	assert_int_equal(
	    rw_seis_convolve(r, 0, w, 3, 0, RW_SEIS_CONV_DIRECT, out, work, 64),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_convolve(r, 4, w, 3, 3, RW_SEIS_CONV_DIRECT, out, work, 64),
	    RW_EDOM);
	assert_true(isnan(out[0]) && isnan(out[3]));
	assert_int_equal(
	    rw_seis_convolve(r, 4, w, 3, 0, (rw_seis_conv)7, out, work, 64),
	    RW_EDOM);
	assert_int_equal(rw_seis_convolve(bad, 4, w, 3, 0, RW_SEIS_CONV_DIRECT,
	                                  out, work, 64),
	                 RW_EDOM);
	assert_int_equal(
	    rw_seis_convolve(r, 4, w, 3, 0, RW_SEIS_CONV_FFT, out, work, 3),
	    RW_ERANGE);
	assert_true(isnan(out[1]));
	/* the direct sum needs no workspace */
	assert_int_equal(
	    rw_seis_convolve(r, 4, w, 3, 1, RW_SEIS_CONV_DIRECT, out, NULL, 0),
	    RW_OK);
	assert_true(out[0] == 2.0 && out[1] == 2.0);
	assert_int_equal(rw_seis_hilbert_workspace(0), 0);
	assert_int_equal(rw_seis_hilbert_workspace(RW_SEIS_MAX_WAVELET + 1), 0);
	assert_int_equal(rw_seis_hilbert(r, 0, out, work, 64), RW_EDOM);
	assert_int_equal(rw_seis_hilbert(bad, 4, out, work, 64), RW_EDOM);
	assert_int_equal(rw_seis_hilbert(r, 4, out, work, 2), RW_ERANGE);
	assert_true(isnan(out[2]));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_spike),
	    cmocka_unit_test(test_boxes),
	    cmocka_unit_test(test_fft_vs_direct),
	    cmocka_unit_test(test_hilbert_closed_forms),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
