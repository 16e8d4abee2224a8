/* Internal to the core: the convolution plan shared by the wavelet and
 * synthetic-trace code (direct sums or GSL radix-2 real FFTs on caller
 * workspace), and small helpers of the seismic family. */
#ifndef RW_CORE_SEIS_INTERNAL_H
#define RW_CORE_SEIS_INTERNAL_H

#include <stddef.h>

#include <gsl/gsl_interp.h>

#include "rockwire/seismic.h"

/* Smallest power of two >= n (n >= 1); 0 when it does not fit a size_t. */
size_t rw__seis_pow2(size_t n);

/* Convolution of many series of one length with one wavelet: the
 * wavelet's spectrum is computed once by rw__seis_conv_plan and reused by
 * every rw__seis_conv_apply. */
typedef struct rw__seis_conv_plan {
	size_t nr, nw, i0; /* series length, wavelet length, its time zero */
	size_t nfft;       /* FFT size; 0 for the direct sum */
	const double *w;   /* the wavelet (direct sum) */
	double *spec;      /* nfft: half-complex spectrum of the wavelet */
	double *buf;       /* nfft: scratch of each application */
} rw__seis_conv_plan;

/* Doubles of workspace a plan for these lengths may need (its FFT case);
 * 0 on overflow or a zero length. */
size_t rw__seis_conv_work(size_t nr, size_t nw);

/* Whether AUTO takes the FFT for these lengths. */
int rw__seis_conv_use_fft(size_t nr, size_t nw);

/* Prepares a plan in work (rw__seis_conv_work(nr, nw) doubles, or none
 * for DIRECT). w must outlive the plan. Returns RW_OK, RW_EDOM (bad
 * lengths or method) or RW_ERANGE (work too small, or a GSL failure). */
int rw__seis_conv_plan_init(rw__seis_conv_plan *p, const double *w, size_t nw,
                            size_t i0, size_t nr, rw_seis_conv method,
                            double *work, size_t work_len);

/* out[k] = sum_j w[j] r[k + i0 - j], k < nr (see rw_seis_convolve).
 * Returns RW_OK or RW_ERANGE (a GSL failure). */
int rw__seis_conv_apply(const rw__seis_conv_plan *p, const double *r,
                        double *out);

/* Neumaier compensated summation. */
typedef struct rw__seis_ksum {
	double s, c;
} rw__seis_ksum;

static inline void rw__seis_ksum_add(rw__seis_ksum *k, double x)
{
	double t = k->s + x;

	if ((k->s >= 0 ? k->s : -k->s) >= (x >= 0 ? x : -x))
		k->c += (k->s - t) + x;
	else
		k->c += (x - t) + k->s;
	k->s = t;
}

static inline double rw__seis_ksum_value(const rw__seis_ksum *k)
{
	return k->s + k->c;
}

/* rw_seis_wavelet_stretch with the spline it already initialised on xs
 * (sample index relative to time zero, n of them) and w. Returns RW_OK or
 * RW_ERANGE (cap too small, or a GSL failure). */
int rw__seis_stretch_eval(const gsl_interp *it, const double *xs,
                          const double *w, size_t n, size_t i0, double factor,
                          double *out, size_t cap, size_t *n_out,
                          size_t *i0_out);

/* Nonzero when a time-depth relation is valid (drifts included). */
int rw__seis_td_check(const rw_seis_td *td);

/* Corrected two-way time at depth z inside a relation that passed
 * rw__seis_td_check (no checks). */
double rw__seis_td_at(const rw_seis_td *td, double z);
/* The same for depths that mostly rise from call to call: *hint (start
 * at 0) keeps the last interval, so a pass down the log costs O(1) a
 * depth instead of a bisection. The same value as rw__seis_td_at. */
double rw__seis_td_at_from(const rw_seis_td *td, double z, size_t *hint);

/* Nonzero when a time axis is valid. */
int rw__seis_axis_ok(const rw_seis_taxis *ax);

/* Checks n finite, strictly increasing values. */
int rw__seis_increasing(const double *x, size_t n);

#endif
