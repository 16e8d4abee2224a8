/* Wavelets for synthetic traces: Ricker, Ormsby, cosine-tapered band-pass
 * (closed forms, zero phase, centred, peak 1), constant-phase rotation,
 * checks and normalisation of a caller's wavelet, and the NMO stretch.
 * Formulas and conventions are in include/rockwire/seismic.h. */
#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "seis_internal.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* End samples above this fraction of the peak mean a cut wavelet. */
#define TRUNC_FRACTION 0.01

int rw_seis_wavelet_size(double length_s, double dt_s, size_t *n)
{
	double half;

	if (n == NULL)
		return RW_EDOM;
	*n = 0;
	if (!isfinite(length_s) || !isfinite(dt_s) || !(length_s > 0.0) ||
	    !(dt_s > 0.0))
		return RW_EDOM;
	/* the 1e-9 keeps length = k dt from losing a sample to rounding */
	half = floor(length_s / (2.0 * dt_s) + 1e-9);
	if (!(half >= 1.0) || half > (double)(RW_SEIS_MAX_WAVELET - 1) / 2.0)
		return RW_EDOM;
	*n = 2 * (size_t)half + 1;
	return RW_OK;
}

/* sin(x)/x, with its series near 0. */
static double sinc(double x)
{
	if (fabs(x) < 1e-4)
		return 1.0 - x * x / 6.0;
	return sin(x) / x;
}

/* Shared checks: the sample count fits cap. */
static int setup(double length_s, double dt_s, double *w, size_t cap, size_t *n)
{
	size_t m;

	if (n == NULL)
		return RW_EDOM;
	*n = 0;
	if (rw_seis_wavelet_size(length_s, dt_s, &m) != RW_OK)
		return RW_EDOM;
	if (w == NULL || cap < m)
		return RW_ERANGE;
	*n = m;
	return RW_OK;
}

static void truncation_check(const double *w, size_t n, unsigned *warn)
{
	double peak = 0.0;
	size_t i;

	for (i = 0; i < n; i++)
		if (fabs(w[i]) > peak)
			peak = fabs(w[i]);
	if (warn != NULL && (fabs(w[0]) > TRUNC_FRACTION * peak ||
	                     fabs(w[n - 1]) > TRUNC_FRACTION * peak))
		*warn |= RW_SEIS_WARN_TRUNCATED;
}

int rw_seis_wavelet_ricker(double f_hz, double length_s, double dt_s, double *w,
                           size_t cap, size_t *n, unsigned *warn)
{
	double nyq;
	size_t k, i0;
	int st;

	if (warn != NULL)
		*warn = 0;
	st = setup(length_s, dt_s, w, cap, n);
	if (st != RW_OK)
		return st;
	nyq = 0.5 / dt_s;
	if (!isfinite(f_hz) || !(f_hz > 0.0) || !(f_hz < nyq)) {
		*n = 0;
		return RW_EDOM;
	}
	i0 = (*n - 1) / 2;
	for (k = 0; k < *n; k++) {
		double t = ((double)k - (double)i0) * dt_s;
		double a = M_PI * f_hz * t;

		a *= a;
		w[k] = (1.0 - 2.0 * a) * exp(-a);
	}
	if (warn != NULL && f_hz > nyq / 3.0)
		*warn |= RW_SEIS_WARN_NEAR_NYQUIST;
	truncation_check(w, *n, warn);
	return RW_OK;
}

/* Corner frequencies: 0 <= f1 < f2 <= f3 < f4 <= Nyquist. */
static int corners_ok(const double f[4], double nyq)
{
	int i;

	if (f == NULL)
		return 0;
	for (i = 0; i < 4; i++)
		if (!isfinite(f[i]))
			return 0;
	return f[0] >= 0.0 && f[0] < f[1] && f[1] <= f[2] && f[2] < f[3] &&
	       f[3] <= nyq;
}

/* a^2 sinc^2(pi a t): its transform is the triangle max(0, a - |f|). */
static double tri(double a, double t)
{
	double s = sinc(M_PI * a * t);

	return a * a * s * s;
}

int rw_seis_wavelet_ormsby(const double f_hz[4], double length_s, double dt_s,
                           double *w, size_t cap, size_t *n, unsigned *warn)
{
	double nyq, w0;
	size_t k, i0;
	int st;

	if (warn != NULL)
		*warn = 0;
	st = setup(length_s, dt_s, w, cap, n);
	if (st != RW_OK)
		return st;
	nyq = 0.5 / dt_s;
	if (!corners_ok(f_hz, nyq)) {
		*n = 0;
		return RW_EDOM;
	}
	i0 = (*n - 1) / 2;
	/* value at t = 0: (f4 + f3) - (f2 + f1) > 0 */
	w0 = (f_hz[3] + f_hz[2]) - (f_hz[1] + f_hz[0]);
	for (k = 0; k < *n; k++) {
		double t = ((double)k - (double)i0) * dt_s;
		double hi =
		    (tri(f_hz[3], t) - tri(f_hz[2], t)) / (f_hz[3] - f_hz[2]);
		double lo =
		    (tri(f_hz[1], t) - tri(f_hz[0], t)) / (f_hz[1] - f_hz[0]);

		w[k] = (hi - lo) / w0;
	}
	if (warn != NULL && f_hz[3] > 0.8 * nyq)
		*warn |= RW_SEIS_WARN_NEAR_NYQUIST;
	truncation_check(w, *n, warn);
	return RW_OK;
}

/* sin(x d / 2) / x, the value d / 2 at x = 0. */
static double shalf(double x, double d)
{
	return 0.5 * d * sinc(0.5 * x * d);
}

/* integral_a^b cos(om f) df. */
static double flat(double a, double b, double om)
{
	return 2.0 * cos(0.5 * om * (a + b)) * shalf(om, b - a);
}

/* integral_a^b (1 - cos(pi (f - a) / d)) / 2 cos(om f) df, d = b - a,
 * om >= 0: with k = pi / d, c = (a + b) / 2 and e = k - om (product to sum
 * of the cosines, then sin(om b) + sin(om a) = 2 sin(om c) cos(om d / 2)
 * and cos(om d / 2) = sin(e d / 2)),
 *   = cos(om c) S(om) - om sin(om c) S(e) / (k + om),
 * S(x) = sin(x d / 2) / x, finite at e = 0 where the terms meet. */
static double rise(double a, double b, double om)
{
	double d = b - a, k = M_PI / d, c = 0.5 * (a + b);

	return cos(om * c) * shalf(om, d) -
	       om * sin(om * c) * shalf(k - om, d) / (k + om);
}

int rw_seis_wavelet_bandpass(const double f_hz[4], double length_s, double dt_s,
                             double *w, size_t cap, size_t *n, unsigned *warn)
{
	double nyq, w0;
	size_t k, i0;
	int st;

	if (warn != NULL)
		*warn = 0;
	st = setup(length_s, dt_s, w, cap, n);
	if (st != RW_OK)
		return st;
	nyq = 0.5 / dt_s;
	if (!corners_ok(f_hz, nyq)) {
		*n = 0;
		return RW_EDOM;
	}
	i0 = (*n - 1) / 2;
	w0 = 0.5 * (f_hz[1] - f_hz[0]) + (f_hz[2] - f_hz[1]) +
	     0.5 * (f_hz[3] - f_hz[2]);
	for (k = 0; k < *n; k++) {
		double t = fabs(((double)k - (double)i0) * dt_s);
		double om = 2.0 * M_PI * t;
		double v =
		    rise(f_hz[0], f_hz[1], om) + flat(f_hz[1], f_hz[2], om) +
		    flat(f_hz[2], f_hz[3], om) - rise(f_hz[2], f_hz[3], om);

		/* w(t) = 2 v, w(0) = 2 w0 */
		w[k] = v / w0;
	}
	if (warn != NULL && f_hz[3] > 0.8 * nyq)
		*warn |= RW_SEIS_WARN_NEAR_NYQUIST;
	truncation_check(w, *n, warn);
	return RW_OK;
}

int rw_seis_wavelet_rotate(double *w, size_t n, double phase_rad, double *work,
                           size_t work_len)
{
	double *h, c, s;
	size_t k;
	int st;

	if (w == NULL || n == 0 || n > RW_SEIS_MAX_WAVELET ||
	    !isfinite(phase_rad))
		return RW_EDOM;
	if (work == NULL || work_len < rw_seis_hilbert_workspace(n))
		return RW_ERANGE;
	/* rw_seis_hilbert leaves work[2n - 1, 3n - 1) alone for this */
	h = work + 2 * n - 1;
	st = rw_seis_hilbert(w, n, h, work, work_len);
	if (st != RW_OK)
		return st;
	c = cos(phase_rad);
	s = sin(phase_rad);
	for (k = 0; k < n; k++)
		w[k] = w[k] * c - h[k] * s;
	return RW_OK;
}

int rw_seis_wavelet_check(const double *w, size_t n, size_t i0)
{
	size_t k;
	int nonzero = 0;

	if (w == NULL || n == 0 || n > RW_SEIS_MAX_WAVELET || i0 >= n)
		return RW_EDOM;
	for (k = 0; k < n; k++) {
		if (!isfinite(w[k]))
			return RW_EDOM;
		if (w[k] != 0.0)
			nonzero = 1;
	}
	return nonzero ? RW_OK : RW_EDOM;
}

int rw_seis_wavelet_normalise(double *w, size_t n, rw_seis_norm kind)
{
	double s = 0.0;
	size_t k;

	if (rw_seis_wavelet_check(w, n, 0) != RW_OK)
		return RW_EDOM;
	if (kind == RW_SEIS_NORM_PEAK) {
		for (k = 0; k < n; k++)
			if (fabs(w[k]) > s)
				s = fabs(w[k]);
	} else if (kind == RW_SEIS_NORM_ENERGY) {
		rw__seis_ksum e = {0.0, 0.0};

		for (k = 0; k < n; k++)
			rw__seis_ksum_add(&e, w[k] * w[k]);
		s = sqrt(rw__seis_ksum_value(&e));
	} else {
		return RW_EDOM;
	}
	if (!(s > 0.0) || !isfinite(s))
		return RW_EDOM;
	for (k = 0; k < n; k++)
		w[k] /= s;
	return RW_OK;
}

/* The stretch with a spline already initialised on xs (sample index
 * relative to time zero) and w; shared with the synthetic gather, which
 * initialises one spline per call. */
int rw__seis_stretch_eval(const gsl_interp *it, const double *xs,
                          const double *w, size_t n, size_t i0, double factor,
                          double *out, size_t cap, size_t *n_out,
                          size_t *i0_out)
{
	gsl_interp_accel acc = {0, 0, 0};
	double x_lo = -(double)i0, x_hi = (double)(n - 1 - i0);
	size_t before, after, m, q;

	*n_out = *i0_out = 0;
	/* the 1e-9 keeps an exact multiple from gaining a sample */
	before = (size_t)ceil((double)i0 * factor - 1e-9);
	after = (size_t)ceil((double)(n - 1 - i0) * factor - 1e-9);
	m = before + after + 1;
	if (out == NULL || cap < m)
		return RW_ERANGE;
	for (q = 0; q < m; q++) {
		double u = ((double)q - (double)before) / factor, v = 0.0;

		if (u >= x_lo && u <= x_hi &&
		    gsl_interp_eval_e(it, xs, w, u, &acc, &v) != GSL_SUCCESS)
			return RW_ERANGE;
		out[q] = v;
	}
	*n_out = m;
	*i0_out = before;
	return RW_OK;
}

int rw_seis_wavelet_stretch(const double *w, size_t n, size_t i0, double factor,
                            double *out, size_t cap, size_t *n_out,
                            size_t *i0_out, double *work, size_t work_len)
{
	gsl_interp *it;
	size_t k;
	int st;

	if (n_out == NULL || i0_out == NULL)
		return RW_EDOM;
	*n_out = *i0_out = 0;
	if (rw_seis_wavelet_check(w, n, i0) != RW_OK || n < 3 ||
	    !isfinite(factor) || factor < 1.0 || factor > 10.0)
		return RW_EDOM;
	if (work == NULL || work_len < n)
		return RW_ERANGE;
	for (k = 0; k < n; k++)
		work[k] = (double)k - (double)i0;
	it = gsl_interp_alloc(gsl_interp_cspline, n);
	if (it == NULL)
		return RW_ERANGE;
	st = gsl_interp_init(it, work, w, n) == GSL_SUCCESS ? RW_OK : RW_ERANGE;
	if (st == RW_OK)
		st = rw__seis_stretch_eval(it, work, w, n, i0, factor, out, cap,
		                           n_out, i0_out);
	gsl_interp_free(it);
	return st;
}
