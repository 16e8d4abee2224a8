/* Unit tests of the wavelets (daemon/core/wavelet.c): sizes, the closed
 * forms of the Ricker (zero crossings, trough, peak frequency), the
 * Ormsby and tapered band-pass spectra (flat pass band, empty stop
 * bands), constant-phase rotation, normalisation, the NMO stretch, the
 * warnings and the error cases. Spectra here are direct sums of the
 * discrete-time Fourier transform at chosen frequencies; numpy's FFT and
 * scipy's quadrature are the outside references in
 * tests/reference/test_seismic_numpy.py. */
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

#define CAP 4096

/* |sum_k w_k exp(-2 pi i f t_k)| dt, t_k = (k - i0) dt. */
static double dtft(const double *w, size_t n, size_t i0, double dt, double f)
{
	double re = 0.0, im = 0.0;
	size_t k;

	for (k = 0; k < n; k++) {
		double ph = -2.0 * M_PI * f * ((double)k - (double)i0) * dt;

		re += w[k] * cos(ph);
		im += w[k] * sin(ph);
	}
	return hypot(re, im) * dt;
}

static void test_size(void **state)
{
	static const struct {
		double len, dt;
		size_t n;
	} rows[] = {
	    {0.128, 0.002, 65}, /* 64 ms each side */
	    {0.1, 0.004, 25},   /* 0.1 / 0.008 = 12.5 -> 12 */
	    {0.2, 0.001, 201},  /* an exact multiple keeps its end samples */
	    {0.004, 0.002, 3},
	};
	size_t i, n;

	(void)state;
	for (i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		assert_int_equal(
		    rw_seis_wavelet_size(rows[i].len, rows[i].dt, &n), RW_OK);
		assert_int_equal(n, rows[i].n);
	}
	assert_int_equal(rw_seis_wavelet_size(0.003, 0.002, &n), RW_EDOM);
	assert_int_equal(n, 0);
	assert_int_equal(rw_seis_wavelet_size(-1.0, 0.002, &n), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_size(0.1, 0.0, &n), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_size(1e6, 0.001, &n), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_size(NAN, 0.001, &n), RW_EDOM);
}

/* Ricker closed form (Ricker 1953; from memory): w(0) = 1, zeros at
 * t = +-1 / (pi f sqrt 2), troughs -2 exp(-3/2) at t = +-sqrt(3/2) /
 * (pi f), no DC (the spectrum goes as f^2), and its amplitude spectrum
 * peaks at f. f is chosen so that both the zero and the trough fall on
 * samples. */
static void test_ricker(void **state)
{
	double w[CAP], dt = 0.0005, f, s = 0.0;
	size_t n, i0, k, kz = 20;
	unsigned warn;

	(void)state;
	f = 1.0 / (M_PI * sqrt(2.0) * (double)kz * dt);
	assert_int_equal(rw_seis_wavelet_ricker(f, 0.3, dt, w, CAP, &n, &warn),
	                 RW_OK);
	assert_int_equal(warn, 0);
	i0 = (n - 1) / 2;
	assert_true(w[i0] == 1.0);
	assert_true(fabs(w[i0 + kz]) <= 1e-15 && fabs(w[i0 - kz]) <= 1e-15);
	for (k = 1; k <= i0; k++)
		assert_true(w[i0 + k] == w[i0 - k]);
	/* the trough, at sqrt(3) kz dt, falls between samples: the sampled
	 * minimum lies within the curvature of the exact one (1e-3 at a
	 * sample spacing of 1/35 of the distance) */
	{
		double m = 1.0;

		for (k = 0; k < n; k++)
			if (w[k] < m)
				m = w[k];
		assert_true(m >= -2.0 * exp(-1.5) - 1e-15);
		assert_true(m <= -2.0 * exp(-1.5) + 1e-3);
	}
	for (k = 0; k < n; k++)
		s += w[k];
	assert_true(fabs(s * dt) <= 1e-12);
	/* the spectrum peaks at f: higher than 0.5 Hz either side */
	{
		double a0 = dtft(w, n, i0, dt, f);

		assert_true(a0 > dtft(w, n, i0, dt, f - 0.5));
		assert_true(a0 > dtft(w, n, i0, dt, f + 0.5));
		/* and equals (2 / sqrt(pi)) / f there (closed form of the
		 * spectrum at its peak, from memory) */
		assert_true(fabs(a0 - 2.0 / (sqrt(M_PI) * f) * exp(-1.0)) <=
		            1e-9 / f);
	}
}

static void test_ricker_warnings(void **state)
{
	double w[CAP];
	size_t n;
	unsigned warn;

	(void)state;
	/* 100 Hz at 2 ms: Nyquist 250 Hz, above a third of it */
	assert_int_equal(
	    rw_seis_wavelet_ricker(100.0, 0.1, 0.002, w, CAP, &n, &warn),
	    RW_OK);
	assert_true(warn & RW_SEIS_WARN_NEAR_NYQUIST);
	/* 10 Hz in 40 ms: cut far above 1% of its peak */
	assert_int_equal(
	    rw_seis_wavelet_ricker(10.0, 0.04, 0.002, w, CAP, &n, &warn),
	    RW_OK);
	assert_true(warn & RW_SEIS_WARN_TRUNCATED);
	assert_false(warn & RW_SEIS_WARN_NEAR_NYQUIST);
	assert_int_equal(
	    rw_seis_wavelet_ricker(250.0, 0.1, 0.002, w, CAP, &n, &warn),
	    RW_EDOM);
	assert_int_equal(n, 0);
	assert_int_equal(
	    rw_seis_wavelet_ricker(0.0, 0.1, 0.002, w, CAP, &n, NULL), RW_EDOM);
	assert_int_equal(
	    rw_seis_wavelet_ricker(30.0, 0.1, 0.002, w, 10, &n, NULL),
	    RW_ERANGE);
}

typedef int (*band_fn)(const double *, double, double, double *, size_t,
                       size_t *, unsigned *);

/* Trapezoid (Ormsby) and raised-cosine (band-pass) spectra of a long
 * wavelet (2 s at 2 ms; Ormsby 1961 and common practice): flat between
 * the inner corners and near zero outside the outer ones. The bounds are
 * the ripple of the cut wavelet, measured on this grid as 2.9e-4 in the
 * pass band and 1.0e-4 in the stop bands for the Ormsby, 1.0e-4 and
 * 1.2e-4 for the band-pass, and checked as 1e-3 and 5e-4. The spectrum is
 * relative to its value mid-band, and the shape of each ramp is checked
 * at its middle (1/2 for both, within the pass-band bound). */
static void test_band_spectra(void **state)
{
	static const double fc[4] = {6.0, 12.0, 45.0, 65.0};
	static const struct {
		band_fn fn;
		double flat_tol, stop_tol;
	} kinds[] = {{rw_seis_wavelet_ormsby, 1e-3, 5e-4},
	             {rw_seis_wavelet_bandpass, 1e-3, 5e-4}};
	double *w = malloc(1001 * sizeof(double)), dt = 0.002;
	size_t n, i0, t;

	(void)state;
	assert_non_null(w);
	for (t = 0; t < 2; t++) {
		double ref, f;
		unsigned warn;

		assert_int_equal(kinds[t].fn(fc, 2.0, dt, w, 1001, &n, &warn),
		                 RW_OK);
		i0 = (n - 1) / 2;
		assert_true(fabs(w[i0] - 1.0) <= 1e-15);
		ref = dtft(w, n, i0, dt, 28.5);
		for (f = fc[1] + 2.0; f <= fc[2] - 2.0; f += 0.7)
			assert_true(fabs(dtft(w, n, i0, dt, f) / ref - 1.0) <=
			            kinds[t].flat_tol);
		for (f = 0.0; f <= fc[0] - 2.0; f += 0.5)
			assert_true(dtft(w, n, i0, dt, f) / ref <=
			            kinds[t].stop_tol);
		for (f = fc[3] + 2.0; f <= 249.0; f += 1.3)
			assert_true(dtft(w, n, i0, dt, f) / ref <=
			            kinds[t].stop_tol);
		assert_true(fabs(dtft(w, n, i0, dt, 9.0) / ref - 0.5) <=
		            kinds[t].flat_tol);
		assert_true(fabs(dtft(w, n, i0, dt, 55.0) / ref - 0.5) <=
		            kinds[t].flat_tol);
	}
	free(w);
}

static void test_band_errors(void **state)
{
	double w[CAP];
	size_t n;
	unsigned warn;
	static const double bad[][4] = {
	    {10, 5, 40, 60},  /* f1 > f2 */
	    {5, 10, 40, 40},  /* f3 = f4 */
	    {5, 5, 40, 60},   /* f1 = f2 */
	    {-1, 10, 40, 60}, /* negative */
	    {5, 10, 60, 40},  /* f3 > f4 */
	    {5, 10, 40, 300}, /* f4 above Nyquist (250 Hz) */
	    {5, NAN, 40, 60},
	};
	static const double near_nyq[4] = {5, 10, 150, 240};
	static const double box[4] = {0, 4, 4, 30}; /* f1 = 0, f2 = f3 */
	size_t i;

	(void)state;
	for (i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		assert_int_equal(rw_seis_wavelet_ormsby(bad[i], 0.2, 0.002, w,
		                                        CAP, &n, &warn),
		                 RW_EDOM);
		assert_int_equal(rw_seis_wavelet_bandpass(bad[i], 0.2, 0.002, w,
		                                          CAP, &n, &warn),
		                 RW_EDOM);
		assert_int_equal(n, 0);
	}
	assert_int_equal(
	    rw_seis_wavelet_ormsby(near_nyq, 0.2, 0.002, w, CAP, &n, &warn),
	    RW_OK);
	assert_true(warn & RW_SEIS_WARN_NEAR_NYQUIST);
	assert_int_equal(
	    rw_seis_wavelet_bandpass(box, 0.2, 0.002, w, CAP, &n, &warn),
	    RW_OK);
	assert_true(fabs(w[(n - 1) / 2] - 1.0) <= 1e-15);
	assert_int_equal(
	    rw_seis_wavelet_ormsby(box, 0.2, 0.002, w, 20, &n, &warn),
	    RW_ERANGE);
}

/* Rotation: 0 leaves the wavelet, pi negates it, pi/2 makes a symmetric
 * wavelet antisymmetric (the Hilbert kernel is odd), and the energy is
 * kept apart from the cut 1/t tails (measured 4.6e-6 for a 25 Hz Ricker
 * of 200 ms, checked as 1e-4; an all-pass rotation keeps the energy). */
static void test_rotate(void **state)
{
	double w[CAP], r[CAP], *work, e0 = 0.0, e1 = 0.0;
	size_t n, k, i0, len;

	(void)state;
	assert_int_equal(
	    rw_seis_wavelet_ricker(25.0, 0.2, 0.002, w, CAP, &n, NULL), RW_OK);
	i0 = (n - 1) / 2;
	len = rw_seis_hilbert_workspace(n);
	work = malloc(len * sizeof(double));
	assert_non_null(work);
	for (k = 0; k < n; k++)
		r[k] = w[k];
	assert_int_equal(rw_seis_wavelet_rotate(r, n, 0.0, work, len), RW_OK);
	for (k = 0; k < n; k++)
		assert_true(r[k] == w[k]);
	assert_int_equal(rw_seis_wavelet_rotate(r, n, M_PI, work, len), RW_OK);
	for (k = 0; k < n; k++)
		assert_true(fabs(r[k] + w[k]) <= 1e-15);
	for (k = 0; k < n; k++)
		r[k] = w[k];
	assert_int_equal(rw_seis_wavelet_rotate(r, n, M_PI / 2, work, len),
	                 RW_OK);
	assert_true(fabs(r[i0]) <= 1e-15);
	for (k = 1; k <= i0; k++)
		assert_true(fabs(r[i0 + k] + r[i0 - k]) <= 1e-15);
	for (k = 0; k < n; k++) {
		e0 += w[k] * w[k];
		e1 += r[k] * r[k];
	}
	assert_true(fabs(e1 / e0 - 1.0) <= 1e-4);
	/* errors leave the wavelet unchanged */
	assert_int_equal(rw_seis_wavelet_rotate(r, n, NAN, work, len), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_rotate(r, n, 1.0, work, 3), RW_ERANGE);
	assert_true(fabs(r[i0]) <= 1e-15);
	free(work);
}

static void test_check_normalise(void **state)
{
	double w[5] = {0.5, -2.0, 1.0, 0.0, 0.25}, e = 0.0;
	double zero[3] = {0, 0, 0}, bad[3] = {1, INFINITY, 0};
	size_t k;

	(void)state;
	assert_int_equal(rw_seis_wavelet_check(w, 5, 4), RW_OK);
	assert_int_equal(rw_seis_wavelet_check(w, 5, 5), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_check(w, 0, 0), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_check(zero, 3, 1), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_check(bad, 3, 1), RW_EDOM);
	assert_int_equal(rw_seis_wavelet_normalise(w, 5, RW_SEIS_NORM_PEAK),
	                 RW_OK);
	assert_true(w[1] == -1.0 && w[0] == 0.25 && w[2] == 0.5);
	assert_int_equal(rw_seis_wavelet_normalise(w, 5, RW_SEIS_NORM_ENERGY),
	                 RW_OK);
	for (k = 0; k < 5; k++)
		e += w[k] * w[k];
	assert_true(fabs(e - 1.0) <= 1e-15);
	assert_int_equal(rw_seis_wavelet_normalise(zero, 3, RW_SEIS_NORM_PEAK),
	                 RW_EDOM);
	assert_int_equal(rw_seis_wavelet_normalise(w, 5, (rw_seis_norm)9),
	                 RW_EDOM);
}

/* NMO stretch: factor 1 returns the wavelet (the spline interpolates its
 * nodes); a Ricker of f stretched by s is the Ricker of f / s (w(t / s)
 * of the closed form), to the cubic spline's error (measured 2.1e-5 for
 * 20 Hz at 2 ms, checked as 1e-4); the lengths follow the stated
 * ceilings and the peak stays 1. */
static void test_stretch(void **state)
{
	double w[CAP], out[CAP], ref[CAP], xs[CAP];
	size_t n, no, io, nr, k;
	double s = 1.0 / cos(30.0 * M_PI / 180.0);

	(void)state;
	assert_int_equal(
	    rw_seis_wavelet_ricker(20.0, 0.16, 0.002, w, CAP, &n, NULL), RW_OK);
	assert_int_equal(rw_seis_wavelet_stretch(w, n, (n - 1) / 2, 1.0, out,
	                                         CAP, &no, &io, xs, CAP),
	                 RW_OK);
	assert_int_equal(no, n);
	for (k = 0; k < n; k++)
		assert_true(fabs(out[k] - w[k]) <= 1e-15);
	assert_int_equal(rw_seis_wavelet_stretch(w, n, (n - 1) / 2, s, out, CAP,
	                                         &no, &io, xs, CAP),
	                 RW_OK);
	assert_int_equal(io, (size_t)ceil((double)((n - 1) / 2) * s));
	assert_int_equal(no, 2 * io + 1);
	assert_true(fabs(out[io] - 1.0) <= 1e-15);
	assert_int_equal(rw_seis_wavelet_ricker(20.0 / s,
	                                        2.0 * io * 0.002 + 1e-9, 0.002,
	                                        ref, CAP, &nr, NULL),
	                 RW_OK);
	assert_int_equal(nr, no);
	for (k = 0; k < no; k++)
		assert_true(fabs(out[k] - ref[k]) <= 1e-4);
	/* errors */
	assert_int_equal(
	    rw_seis_wavelet_stretch(w, n, 0, 0.5, out, CAP, &no, &io, xs, CAP),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_wavelet_stretch(w, 2, 0, 2.0, out, CAP, &no, &io, xs, CAP),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_wavelet_stretch(w, n, 0, 11.0, out, CAP, &no, &io, xs, CAP),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_wavelet_stretch(w, n, 0, 2.0, out, n, &no, &io, xs, CAP),
	    RW_ERANGE);
	assert_int_equal(
	    rw_seis_wavelet_stretch(w, n, 0, 2.0, out, CAP, &no, &io, xs, 2),
	    RW_ERANGE);
	assert_int_equal(no, 0);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_size),
	    cmocka_unit_test(test_ricker),
	    cmocka_unit_test(test_ricker_warnings),
	    cmocka_unit_test(test_band_spectra),
	    cmocka_unit_test(test_band_errors),
	    cmocka_unit_test(test_rotate),
	    cmocka_unit_test(test_check_normalise),
	    cmocka_unit_test(test_stretch),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
