/* Synthetic seismograms from well logs: the time-depth relation of a sonic
 * log with checkshot drift correction, resampling of curves to regular
 * time, Backus (1962) upscaling and blocking, wavelets (Ricker, Ormsby,
 * cosine-tapered band-pass, constant-phase rotation, caller samples),
 * reflectivity in time, convolution (direct and FFT), angle gathers, AVO
 * least-squares fits with their covariance, and the linearised PS
 * reflection coefficient. Results are screening estimates for modelling
 * and well ties, not a substitute for qualified review.
 *
 * Units: depth m, time s (two-way time unless said otherwise), frequency
 * Hz, velocity m/s, slowness s/m, density kg/m^3, stiffness Pa, angles
 * radians. Depths increase downwards. A null log value is NaN; it never
 * becomes a silent zero: functions skip it, flag the samples it touches
 * (RW_SEIS_WARN_* bits, per sample where a function has per-sample
 * outputs) and say how in their comments.
 *
 * Memory: callers own every array. Functions that need scratch take a
 * workspace of doubles whose length a `_workspace` helper gives. Where a
 * function uses a GSL object that GSL itself allocates (interpolation
 * state, the least-squares workspace) it says so; FFTs are GSL's radix-2
 * real transforms, which need no allocation. No function keeps state
 * between calls; all are reentrant. */
#ifndef ROCKWIRE_SEISMIC_H
#define ROCKWIRE_SEISMIC_H

#include <stddef.h>

#include "rockwire/aniso.h"
#include "rockwire/reflect.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- warning bits --------------------------------------------------------
 * A warning never changes a result unless its comment says the output is
 * null. One bit set serves the whole family. */
#define RW_SEIS_WARN_SONIC_NULL    0x1u   /* sonic null or <= 0 here: bridged */
#define RW_SEIS_WARN_REPLACEMENT   0x2u   /* above the first valid sonic */
#define RW_SEIS_WARN_EXTRAPOLATED  0x4u   /* below the last valid sonic */
#define RW_SEIS_WARN_DRIFT_HELD    0x8u   /* outside the checkshot span */
#define RW_SEIS_WARN_NULL_INPUT    0x10u  /* output null: a null input */
#define RW_SEIS_WARN_OUTSIDE       0x20u  /* output null: outside the input */
#define RW_SEIS_WARN_WINDOW_CUT    0x40u  /* averaging window cut by log end */
#define RW_SEIS_WARN_NULL_IN_WIN   0x80u  /* nulls excluded from the average */
#define RW_SEIS_WARN_TOO_FEW_VALID 0x100u /* output null: too few valid */
#define RW_SEIS_WARN_FLUID_LAYER   0x200u /* a layer has vs = 0 (C44 = 0) */
#define RW_SEIS_WARN_TRUNCATED     0x400u /* wavelet cut above 1% of peak */
#define RW_SEIS_WARN_NEAR_NYQUIST  0x800u /* wavelet energy near Nyquist */
#define RW_SEIS_WARN_OUTSIDE_LOG   0x1000u  /* trace time outside the log */
#define RW_SEIS_WARN_NULL_NEAR     0x2000u  /* a null interface in reach */
#define RW_SEIS_WARN_POSTCRITICAL  0x4000u  /* interface past critical angle */
#define RW_SEIS_WARN_AVO_PARTIAL   0x8000u  /* null amplitudes left out */
#define RW_SEIS_WARN_AVO_NO_DOF    0x10000u /* no residual dof: no errors */
#define RW_SEIS_WARN_AVO_ILL_COND  0x20000u /* design nearly singular */

/* Largest wavelet, in samples, any function accepts (16 s at 1 ms). */
#define RW_SEIS_MAX_WAVELET 16385u

/* ---- convolution ---------------------------------------------------------
 */

/* Convolution algorithm. */
typedef enum rw_seis_conv {
	RW_SEIS_CONV_AUTO = 0,   /* the cheaper of the two by operation count */
	RW_SEIS_CONV_DIRECT = 1, /* the sum itself */
	RW_SEIS_CONV_FFT = 2     /* GSL radix-2 real FFTs, zero-padded */
} rw_seis_conv;

/* Workspace, in doubles, of rw_seis_convolve for these lengths (0 on
 * overflow or a zero length). */
size_t rw_seis_convolve_workspace(size_t nr, size_t nw);

/* "Same"-length convolution of a series r (nr) with a wavelet w (nw, time
 * zero at i0):
 *   out[k] = sum_j w[j] r[k + i0 - j]   (terms with r outside 0..nr-1
 *            are zero),
 * so a unit spike at r[m] returns the wavelet with its time-zero sample at
 * out[m]. The FFT path pads both to a power of two >= nr + nw - 1 (a
 * linear, not circular, convolution); both paths agree to about 1e-15
 * relative to sum |r| max |w|. AUTO takes the FFT when nr nw exceeds
 * 6 N log2 N, N the padded size (the crossover measured by
 * tests/bench/bench_seismic). r and out must not overlap.
 * errors: RW_EDOM (a zero length, i0 >= nw, a bad method, a non-finite
 * input), RW_ERANGE (work_len too small); out NaN. */
int rw_seis_convolve(const double *r, size_t nr, const double *w, size_t nw,
                     size_t i0, rw_seis_conv method, double *out, double *work,
                     size_t work_len);

/* Workspace, in doubles, of rw_seis_hilbert and rw_seis_wavelet_rotate
 * for an n-sample wavelet (0 when n is 0 or above RW_SEIS_MAX_WAVELET). */
size_t rw_seis_hilbert_workspace(size_t n);

/* Discrete Hilbert transform of n samples taken as zero outside them:
 *   h[k] = sum_m x[m] g[k - m], g[j] = 2 / (pi j) for odd j, 0 for even j,
 * the ideal discrete-time Hilbert transformer (Oppenheim & Schafer 1989,
 * sec. 11.4, from memory), so H{cos(w k)} = sin(w k). Evaluated as a linear
 * convolution with the kernel cut at the lags that matter (|j| < n): exact
 * to rounding, computed with GSL's radix-2 FFT for long inputs. The
 * transform of a finite wavelet has 1/t tails beyond its ends: they are
 * cut at the n samples. x and h must not overlap.
 * errors: RW_EDOM (n = 0 or too large, a non-finite sample), RW_ERANGE
 * (work_len too small); h NaN. */
int rw_seis_hilbert(const double *x, size_t n, double *h, double *work,
                    size_t work_len);

#ifdef __cplusplus
}
#endif

#endif
