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

/* ---- time-depth ----------------------------------------------------------
 */

/* How a sonic array is given. */
typedef enum rw_seis_sonic_kind {
	RW_SEIS_SONIC_VELOCITY = 0, /* velocity, m/s */
	RW_SEIS_SONIC_SLOWNESS = 1  /* slowness, s/m */
} rw_seis_sonic_kind;

/* Where time starts: the datum depth (same depth reference as the log,
 * at or above its first sample), the two-way time at the datum, and the
 * replacement velocity used between the datum and the first valid sonic
 * sample. */
typedef struct rw_seis_datum {
	double z_m;     /* datum depth, finite, <= first log depth */
	double twt_s;   /* two-way time at the datum, finite */
	double vrep_ms; /* replacement velocity, finite, > 0 */
} rw_seis_datum;

/* Two-way time of every log sample by integrating the sonic from the
 * datum:
 *   t(z_j) = t(z_i) + 2 * integral of slowness from z_i to z_j,
 * with the slowness taken linear between consecutive valid samples (the
 * trapezoid rule; exact for a constant or piecewise-linear slowness, so a
 * constant velocity v gives t = t0 + 2 (z - z0) / v to rounding). Sums are
 * compensated (Neumaier) so rounding does not grow with the log length.
 * Samples above the first valid sonic sample take the replacement velocity
 * from the datum (RW_SEIS_WARN_REPLACEMENT); null or non-positive sonic
 * samples between valid ones are bridged with the slowness interpolated
 * linearly in depth (RW_SEIS_WARN_SONIC_NULL); samples below the last
 * valid one keep its slowness (RW_SEIS_WARN_EXTRAPOLATED). Common
 * practice; the trapezoid rule is the usual sonic integration.
 * z_m: n >= 1 finite, strictly increasing depths; sonic: n values of the
 * given kind (NaN = null); twt_s: n outputs; warn: n bit sets or NULL.
 * errors: RW_EDOM (n = 0, a depth not finite or not increasing, a bad
 * datum or kind), RW_EINVAL (no valid sonic sample); outputs NaN. */
int rw_seis_td_sonic(const double *z_m, const double *sonic, size_t n,
                     rw_seis_sonic_kind kind, const rw_seis_datum *datum,
                     double *twt_s, unsigned *warn);

/* A time-depth relation: the sonic times of the log samples (from
 * rw_seis_td_sonic) and, optionally, a drift curve through checkshots.
 * The arrays belong to the caller and must outlive every use. */
typedef struct rw_seis_td {
	const double *z_m;        /* n log depths, strictly increasing */
	const double *twt_s;      /* n sonic two-way times, strictly rising */
	size_t n;                 /* >= 1 */
	double datum_z_m;         /* datum depth, <= z_m[0] */
	double datum_twt_s;       /* time at the datum */
	const double *cs_z_m;     /* n_cs checkshot depths, increasing */
	const double *cs_drift_s; /* n_cs drifts, from rw_seis_td_drift */
	size_t n_cs;              /* 0: no drift correction */
} rw_seis_td;

/* Drift of each checkshot: its two-way time minus the sonic time at its
 * depth, d_k = t_cs(z_k) - t_sonic(z_k). The sonic time between samples is
 * interpolated linearly in depth through the nodes (datum, z_0, ...,
 * z_{n-1}). The corrected relation (rw_seis_td_eval) adds the drift
 * interpolated linearly between checkshots and held at the end values
 * outside their span: the piecewise-linear drift curve of common practice.
 * A checkshot at the datum pins the drift to zero there. The corrected
 * times must still increase with depth (a positive interval velocity):
 * this is checked at every node of both curves.
 * td: a relation whose cs_z_m and n_cs are set (cs_drift_s is ignored);
 * checkshot depths strictly increasing within [datum, z_{n-1}], times
 * cs_twt_s strictly increasing; cs_drift_s: n_cs outputs.
 * errors: RW_EDOM (a bad table, a checkshot outside the log's depth range,
 * depths or times not increasing), RW_EINVAL (the corrected times would
 * not increase with depth: the checkshots contradict the sonic); outputs
 * NaN. */
int rw_seis_td_drift(const rw_seis_td *td, const double *cs_twt_s,
                     double *cs_drift_s);

/* Corrected two-way time at depths zq (nq of them, any order): the sonic
 * time interpolated linearly through the nodes plus the drift curve (zero
 * when td->n_cs = 0). At a checkshot depth the result is the checkshot
 * time to rounding. drift_s (may be NULL) receives the drift applied;
 * warn (may be NULL) gets RW_SEIS_WARN_DRIFT_HELD outside the checkshot
 * span. Depths outside [datum, z_{n-1}] give NaN and
 * RW_SEIS_WARN_OUTSIDE.
 * errors: RW_EDOM (a bad table); outputs NaN. */
int rw_seis_td_eval(const rw_seis_td *td, const double *zq, size_t nq,
                    double *twt_s, double *drift_s, unsigned *warn);

/* A regular time axis: t_k = t0_s + k dt_s, k = 0 .. n-1. */
typedef struct rw_seis_taxis {
	double t0_s; /* finite */
	double dt_s; /* finite, > 0 */
	size_t n;    /* >= 1 */
} rw_seis_taxis;

/* Interpolation for resampling (GSL interpolation types). */
typedef enum rw_seis_interp {
	RW_SEIS_INTERP_LINEAR = 0, /* gsl_interp_linear */
	RW_SEIS_INTERP_STEFFEN = 1 /* gsl_interp_steffen: monotone cubic of
	                              Steffen 1990, no overshoot */
} rw_seis_interp;

/* Resamples a curve y sampled at times t_s (n, strictly increasing; e.g.
 * the corrected times of the log samples) to the regular axis ax. Nulls
 * are never bridged: the curve is split into runs of consecutive valid
 * samples, each run is interpolated on its own (a run of two samples is
 * linear whatever the kind), and an output time whose bracketing samples
 * are not both valid is null (RW_SEIS_WARN_NULL_INPUT). Output times
 * outside [t_0, t_{n-1}] are null (RW_SEIS_WARN_OUTSIDE). Point
 * interpolation does not low-pass: resampling a fine log to a coarse axis
 * aliases its thin beds (build reflectivity with rw_seis_reflectivity,
 * which keeps every interface, rather than from a resampled log).
 * Allocates one GSL interpolation object per run.
 * errors: RW_EDOM (bad times, axis or kind), RW_ERANGE (out of memory);
 * outputs NaN. */
int rw_seis_resample(const double *t_s, const double *y, size_t n,
                     const rw_seis_taxis *ax, rw_seis_interp kind, double *out,
                     unsigned *warn);

/* ---- upscaling -----------------------------------------------------------
 */

/* The Backus average of a stack of isotropic layers: the VTI stiffnesses
 * of the long-wavelength equivalent medium, its density and its Thomsen
 * parameters. */
typedef struct rw_seis_backus {
	rw_aniso_vti c;      /* C11, C13, C33, C44, C66, Pa */
	double rho_kgm3;     /* thickness-weighted mean density */
	rw_aniso_thomsen th; /* NaN when C44 = 0 (a fluid layer) */
} rw_seis_backus;

/* Backus 1962 average of n isotropic layers with thickness weights h_m
 * (only their ratios matter), in the form of Mavko, Mukerji & Dvorkin
 * 2009, sec. 4.13 (equation numbers from memory), with M = rho vp^2,
 * mu = rho vs^2, lambda = M - 2 mu and <.> the thickness average:
 *   C33 = <1/M>^-1, C44 = <1/mu>^-1, C66 = <mu>,
 *   C13 = <lambda/M> C33,
 *   C11 = <4 mu (lambda + mu) / M> + <lambda/M>^2 C33, rho = <rho>.
 * A layer with vs = 0 makes C44 = 0: the stiffness is returned, the
 * Thomsen parameters are NaN and *warn gets RW_SEIS_WARN_FLUID_LAYER. For
 * isotropic layers gamma = (<mu><1/mu> - 1)/2 >= 0 (arithmetic over
 * harmonic mean). Thomsen parameters by rw_aniso_thomsen_from_stiff.
 * Layers: h > 0, and valid media as rw_reflect_medium_check. warn may be
 * NULL.
 * errors: RW_EDOM (n = 0, a thickness not finite or <= 0, an invalid
 * medium); outputs NaN. */
int rw_seis_backus_layers(const double *h_m, const double *vp_ms,
                          const double *vs_ms, const double *rho_kgm3, size_t n,
                          rw_seis_backus *out, unsigned *warn);

/* Backus average over a moving window of length window_m centred on each
 * log sample. Each sample stands for its cell, from the midpoint to the
 * previous sample to the midpoint to the next (the end cells extend half a
 * step beyond the end samples), and is weighted by the length of its cell
 * inside the window. Near the ends the window is cut to the log
 * (RW_SEIS_WARN_WINDOW_CUT). Invalid samples (a null or an invalid medium)
 * are left out and the rest reweighted (RW_SEIS_WARN_NULL_IN_WIN); when
 * the valid length is below min_valid times the window's length in the
 * log, the output is null (RW_SEIS_WARN_TOO_FEW_VALID).
 * z_m: n >= 2 strictly increasing depths; window_m finite > 0; min_valid
 * in (0, 1]; out, warn: n each (warn may be NULL).
 * errors: RW_EDOM (bad depths or arguments); outputs NaN. */
int rw_seis_backus_log(const double *z_m, const double *vp_ms,
                       const double *vs_ms, const double *rho_kgm3, size_t n,
                       double window_m, double min_valid, rw_seis_backus *out,
                       unsigned *warn);

/* Averaging length from a fraction of the shortest wavelength:
 * L = b * v_min / f, with v_min the smallest valid positive shear velocity
 * of the log (the shear wavelength is the shortest), or the smallest
 * valid P velocity when the log has no shear. b is the Backus number of
 * Liner & Fei 2006 (from memory: the Backus average keeps both the
 * transmitted and the scattered wavefield for b <= 1/3); f the dominant
 * frequency. Mavko, Mukerji & Dvorkin 2009, sec. 4.13, give the same
 * long-wavelength condition in words.
 * errors: RW_EDOM (b or f not finite or <= 0), RW_EINVAL (no valid
 * velocity); *window_m NaN. */
int rw_seis_backus_window(const double *vp_ms, const double *vs_ms, size_t n,
                          double b, double f_hz, double *window_m);

/* How a block's value is formed from its samples. */
typedef enum rw_seis_mean {
	RW_SEIS_MEAN_ARITHMETIC = 0, /* <y>: density, porosity */
	RW_SEIS_MEAN_HARMONIC = 1    /* 1/<1/y>: velocity (keeps the time) */
} rw_seis_mean;

/* Block boundaries where a curve departs from the running mean of the
 * current block by more than threshold (absolute, in the curve's units):
 * walking down the valid samples, sample j starts a new block, with a
 * boundary at the midpoint between j and the sample above, when
 * |y_j - mean| > threshold and the current block is at least min_thick_m
 * thick at that boundary. Null samples are skipped. The first boundary is
 * the top of the first cell and the last the bottom of the last cell (cells
 * as rw_seis_backus_log). bounds: cap doubles; *nb receives the count.
 * errors: RW_EDOM (bad depths, n < 2, threshold not finite or <= 0,
 * min_thick_m not finite or < 0), RW_EINVAL (no valid sample), RW_ERANGE
 * (cap too small; n + 1 always suffices); *nb = 0. */
int rw_seis_block_detect(const double *z_m, const double *y, size_t n,
                         double threshold, double min_thick_m, double *bounds,
                         size_t cap, size_t *nb);

/* Block values between boundaries bounds[0] < ... < bounds[nb-1]: each
 * block's mean of the valid samples, weighted by their cell length inside
 * the block (a boundary inside a cell splits its weight), of the given
 * kind. block: nb - 1 values (null when the block has no valid sample,
 * RW_SEIS_WARN_TOO_FEW_VALID in the warn of the samples inside); out
 * (may be NULL): n values, the blocked curve at the samples (block k holds
 * [bounds[k], bounds[k+1]); samples outside the blocks are null with
 * RW_SEIS_WARN_OUTSIDE); warn: n or NULL. For the harmonic mean a value
 * <= 0 counts as invalid.
 * errors: RW_EDOM (bad depths, nb < 2, bounds not increasing, bad kind);
 * outputs NaN. */
int rw_seis_block_means(const double *z_m, const double *y, size_t n,
                        const double *bounds, size_t nb, rw_seis_mean kind,
                        double *block, double *out, unsigned *warn);

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
 * tests/bench/bench_seismic.py lies between 3 and 8). r and out must not
 * overlap.
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

/* ---- wavelets ------------------------------------------------------------
 * A wavelet is n samples at the trace's interval, with time zero at index
 * i0. The generators below are zero phase, odd-length and centred: n =
 * 2 floor(length / (2 dt)) + 1, i0 = (n - 1) / 2, sample k at time
 * (k - i0) dt, normalised to a peak of 1 at time zero. */

/* Samples of a centred wavelet of the given length: length_s finite > 0,
 * dt_s finite > 0, and 3 <= n <= RW_SEIS_MAX_WAVELET.
 * errors: RW_EDOM (bad arguments or n out of range); *n = 0. */
int rw_seis_wavelet_size(double length_s, double dt_s, size_t *n);

/* Ricker wavelet w(t) = (1 - 2 pi^2 f^2 t^2) exp(-pi^2 f^2 t^2), f the
 * peak frequency of its amplitude spectrum (Ricker 1953; Sheriff &
 * Geldart 1995, from memory). f in (0, Nyquist); *warn (may be NULL) gets
 * RW_SEIS_WARN_NEAR_NYQUIST for f > Nyquist/3 (the spectrum at Nyquist is
 * then above ~3e-3 of its peak) and RW_SEIS_WARN_TRUNCATED when an end
 * sample exceeds 1% of the peak (both thresholds are this project's
 * choice). w: cap doubles; *n receives the count (rw_seis_wavelet_size).
 * errors: RW_EDOM (bad arguments), RW_ERANGE (cap too small); *n = 0. */
int rw_seis_wavelet_ricker(double f_hz, double length_s, double dt_s, double *w,
                           size_t cap, size_t *n, unsigned *warn);

/* Ormsby wavelet: the inverse transform of a trapezoidal amplitude
 * spectrum, zero below f1, rising linearly to 1 at f2, flat to f3,
 * falling linearly to 0 at f4 (Ormsby 1961; in the sinc^2 form of common
 * practice):
 *   w(t) ~ [pi f4^2 sinc^2(pi f4 t) - pi f3^2 sinc^2(pi f3 t)] / (f4 - f3)
 *        - [pi f2^2 sinc^2(pi f2 t) - pi f1^2 sinc^2(pi f1 t)] / (f2 - f1),
 * sinc x = sin x / x, normalised to w(0) = 1. f_hz: 0 <= f1 < f2 <= f3 <
 * f4 <= Nyquist. Warnings and other arguments as rw_seis_wavelet_ricker
 * (NEAR_NYQUIST when f4 > 0.8 Nyquist). The spectrum of the cut wavelet
 * ripples around the trapezoid by an amount that falls with length.
 * errors: as rw_seis_wavelet_ricker. */
int rw_seis_wavelet_ormsby(const double f_hz[4], double length_s, double dt_s,
                           double *w, size_t cap, size_t *n, unsigned *warn);

/* Band-pass wavelet with cosine-tapered corners: the zero-phase inverse
 * transform of the amplitude spectrum 0 below f1, (1 - cos(pi (f - f1) /
 * (f2 - f1))) / 2 up to f2, 1 to f3, (1 + cos(pi (f - f3) / (f4 - f3))) / 2
 * down to 0 at f4 (a raised-cosine taper; common practice), evaluated in
 * closed form:
 *   w(t) = 2 * integral_0^inf A(f) cos(2 pi f t) df, normalised to w(0) = 1.
 * The smooth corners make its side lobes decay as 1/t^3 instead of the
 * Ormsby's 1/t^2. Arguments, warnings and errors as
 * rw_seis_wavelet_ormsby. */
int rw_seis_wavelet_bandpass(const double f_hz[4], double length_s, double dt_s,
                             double *w, size_t cap, size_t *n, unsigned *warn);

/* Constant-phase rotation in place: w <- w cos(phase) - H{w} sin(phase),
 * H as rw_seis_hilbert. Every positive frequency is advanced by phase
 * (with the transform W(f) = integral w(t) exp(-2 pi i f t) dt, W(f) is
 * multiplied by exp(i phase sgn f)), so cos(2 pi f t) becomes cos(2 pi f t
 * + phase); phase = pi gives -w. The rotation keeps the amplitude
 * spectrum and the energy, apart from the cut Hilbert tails; the peak
 * normalisation of the zero-phase wavelet is not redone. phase_rad finite.
 * errors: as rw_seis_hilbert (w unchanged). */
int rw_seis_wavelet_rotate(double *w, size_t n, double phase_rad, double *work,
                           size_t work_len);

/* Checks a caller's wavelet: 1 <= n <= RW_SEIS_MAX_WAVELET, i0 < n,
 * finite samples, not all zero.
 * errors: RW_EDOM. */
int rw_seis_wavelet_check(const double *w, size_t n, size_t i0);

/* Normalisations of rw_seis_wavelet_normalise. */
typedef enum rw_seis_norm {
	RW_SEIS_NORM_PEAK = 0,  /* largest |w| becomes 1, signs kept */
	RW_SEIS_NORM_ENERGY = 1 /* sum of w^2 becomes 1 */
} rw_seis_norm;

/* Scales a wavelet in place by the chosen normalisation.
 * errors: RW_EDOM (as rw_seis_wavelet_check with i0 = 0, or a bad kind);
 * w unchanged. */
int rw_seis_wavelet_normalise(double *w, size_t n, rw_seis_norm kind);

/* NMO stretch of a wavelet: out(t) = w(t / factor), factor >= 1 (angle
 * theta: factor = 1 / cos theta, the stretch normal-moveout correction
 * puts on a reflection's wavelet; Dunkin & Levin 1973, from memory). The
 * samples are interpolated with a natural cubic spline (gsl_interp_cspline,
 * allocated once per call) and are zero beyond the stretched ends; the
 * stretched wavelet spans ceil(i0 factor) samples before its time zero and
 * ceil((n - 1 - i0) factor) after it, so *n_out <= ceil((n - 1) factor) + 2.
 * The peak amplitude is kept (not the energy). n >= 3; factor finite in
 * [1, 10]; work: n doubles (the spline's abscissae); out must not overlap
 * w or work.
 * errors: RW_EDOM (bad arguments), RW_ERANGE (cap or work too small, out
 * of memory); *n_out = 0. */
int rw_seis_wavelet_stretch(const double *w, size_t n, size_t i0, double factor,
                            double *out, size_t cap, size_t *n_out,
                            size_t *i0_out, double *work, size_t work_len);

/* ---- reflectivity and synthetic traces -----------------------------------
 */

/* A well log in depth: n samples of depth, vp, vs and density (NaN =
 * null). */
typedef struct rw_seis_log {
	const double *z_m;
	const double *vp_ms;
	const double *vs_ms;
	const double *rho_kgm3;
	size_t n;
} rw_seis_log;

/* PP reflection coefficient used for the traces: the exact Zoeppritz
 * solution or one of the project's linearisations (include/rockwire/
 * reflect.h), in the order and with the names of the reflect family. */
typedef enum rw_seis_rmethod {
	RW_SEIS_R_ZOEPPRITZ = 0,
	RW_SEIS_R_AKI_RICHARDS,
	RW_SEIS_R_SHUEY2,
	RW_SEIS_R_SHUEY3,
	RW_SEIS_R_HILTERMAN,
	RW_SEIS_R_FATTI,
	RW_SEIS_R_GRAY_LMR,
	RW_SEIS_R_GRAY_KMR,
	RW_SEIS_R_SMITH_GIDLOW,
	RW_SEIS_R_COUNT
} rw_seis_rmethod;

/* Reflectivity of the log on the regular time axis ax, for one incidence
 * angle theta_rad in [0, pi/2) taken at every interface (a constant-angle
 * gather, common practice). Interfaces lie midway in depth between
 * consecutive samples (each sample stands for its cell); each one's time
 * is rw_seis_td_eval at that depth and its coefficient is method's, upper
 * medium the shallower sample. Sub-sample placement: a coefficient at time
 * tau with t_k <= tau < t_k+1 is split linearly, (1 - a) R to sample k and
 * a R to k + 1, a = (tau - t_k) / dt (common practice); this keeps the sum
 * and the centroid and acts as a triangle filter whose amplitude response
 * is [sin(pi f dt) / (pi f dt)]^2 (0.8% down at f = 0.05 / dt, 10 Hz at
 * 5 ms; pick a finer axis for high frequencies). Interfaces outside the
 * axis are dropped. Complex (post-critical) Zoeppritz coefficients put
 * their imaginary part in r_im (zero otherwise); with the exp(-i w t)
 * convention of Aki & Richards, the trace is r_re * w + r_im * H{w}.
 * An interface with a null needed input (vp, rho, or vs, which is not
 * needed at theta = 0 except by the Gray forms) or without a coefficient
 * (Aki-Richards past critical) adds nothing and marks its samples
 * RW_SEIS_WARN_NULL_NEAR; one past the P critical angle marks them
 * RW_SEIS_WARN_POSTCRITICAL (linearisations are not valid there); samples
 * outside the log's time span get RW_SEIS_WARN_OUTSIDE_LOG. Primaries
 * only: no transmission loss, multiples or spreading.
 * r_re: ax->n outputs; r_im, warn: ax->n or NULL.
 * errors: RW_EDOM (bad log depths, table, axis, angle or method); outputs
 * NaN. */
int rw_seis_reflectivity(const rw_seis_log *log, const rw_seis_td *td,
                         double theta_rad, rw_seis_rmethod method,
                         const rw_seis_taxis *ax, double *r_re, double *r_im,
                         unsigned *warn);

/* A wavelet as used by rw_seis_synthetic. */
typedef struct rw_seis_wavelet {
	const double *w; /* n samples */
	size_t n;        /* 1 .. RW_SEIS_MAX_WAVELET */
	size_t i0;       /* index of time zero, < n */
	double dt_s;     /* must equal the axis's dt (relative 1e-9) */
} rw_seis_wavelet;

/* Options of rw_seis_synthetic. */
typedef struct rw_seis_synth_opts {
	rw_seis_rmethod method; /* PP coefficient */
	int stretch;       /* nonzero: each angle's wavelet NMO-stretched by
	                      1 / cos theta (rw_seis_wavelet_stretch); zero: the
	                      same wavelet at every angle */
	int keep_partial;  /* nonzero: keep trace samples within the wavelet's
	                      reach of a null interface (flagged); zero: make
	                      them null */
	rw_seis_conv conv; /* convolution algorithm */
} rw_seis_synth_opts;

/* Workspace, in doubles, of rw_seis_synthetic for an axis of nt samples, a
 * wavelet of nw samples and the largest angle of the gather (it sets the
 * stretched length when stretch is nonzero). 0 on bad arguments. */
size_t rw_seis_synthetic_workspace(size_t nt, size_t nw, double max_theta_rad,
                                   int stretch);

/* Synthetic gather: for each angle, the reflectivity of
 * rw_seis_reflectivity (built on the axis extended by the wavelet's reach
 * so that interfaces just outside it still contribute) convolved with the
 * wavelet (stretched or not), plus the imaginary part convolved with the
 * wavelet's Hilbert transform where Zoeppritz coefficients are complex.
 * The wavelet's spectrum is computed once per gather (once per angle with
 * stretch). traces: n_angles x ax->n, angle-major; refl (may be NULL): the
 * real reflectivity on the axis, same layout; warn (may be NULL): same
 * layout, the reflectivity flags spread over the wavelet's reach (a
 * sample is flagged when an interface it sees through the wavelet is;
 * the reach is the span of the wavelet's samples at or above 1% of its
 * peak, so a faint tail does not null a trace). With keep_partial zero,
 * refl is null where a null interface lies.
 * angles: in [0, pi/2), below 84 degrees with stretch (a stretch <= 10).
 * errors: RW_EDOM (bad log, table, axis, wavelet, angles or options, dt
 * mismatch), RW_ERANGE (work_len too small, or out of memory for the
 * stretch interpolation); outputs NaN. */
int rw_seis_synthetic(const rw_seis_log *log, const rw_seis_td *td,
                      const double *theta_rad, size_t n_angles,
                      const rw_seis_wavelet *wav, const rw_seis_taxis *ax,
                      const rw_seis_synth_opts *opts, double *traces,
                      double *refl, unsigned *warn, double *work,
                      size_t work_len);

/* ---- AVO fits ------------------------------------------------------------
 */

/* Models of the least-squares fit. */
typedef enum rw_seis_avo_model {
	RW_SEIS_AVO_TWO = 2,  /* R = A + B sin^2 (Shuey 1985, two-term) */
	RW_SEIS_AVO_THREE = 3 /* R = A + B sin^2 + C (tan^2 - sin^2) (Shuey
	                         1985, three-term) */
} rw_seis_avo_model;

/* One fit. */
typedef struct rw_seis_avo_result {
	double a, b, c;   /* intercept, gradient, curvature (NaN: two-term) */
	double cov[3][3]; /* covariance of (A, B, C): sigma^2 (X^T X)^-1 */
	double sigma;     /* residual standard error sqrt(RSS / (m - p)) */
	double rms;       /* root-mean-square residual sqrt(RSS / m) */
	double rcond;     /* reciprocal condition number of the design */
	size_t m;         /* angles used */
} rw_seis_avo_result;

/* Least-squares state (a GSL multifit workspace); one per thread. */
typedef struct rw_seis_avo_fitter rw_seis_avo_fitter;

/* Allocates a fitter for up to max_angles angles (>= 2). Returns NULL on
 * a bad size or out of memory; free with rw_seis_avo_fitter_free. */
rw_seis_avo_fitter *rw_seis_avo_fitter_new(size_t max_angles);

/* Frees a fitter; NULL is a no-op. */
void rw_seis_avo_fitter_free(rw_seis_avo_fitter *f);

/* Fits the model to the amplitudes amp[i * stride] at angles theta_rad[i]
 * (i < n), using the angles in [theta_min, theta_max] whose amplitude is
 * not null (RW_SEIS_WARN_AVO_PARTIAL when a null is left out), by
 * ordinary least squares (gsl_multifit_linear_tsvd). The covariance is
 * sigma^2 (X^T X)^-1, which assumes independent residuals of equal
 * variance; with exactly p angles the fit is exact and sigma and the
 * covariance are NaN (RW_SEIS_WARN_AVO_NO_DOF). RW_SEIS_WARN_AVO_ILL_COND
 * when rcond < 1e-8, of the design after GSL's column balancing (so the
 * small scale of tan^2 - sin^2 does not count, near-coinciding angles
 * do); a narrow angle range is not flagged by itself: the covariance then
 * says how poorly the gradient and curvature are fixed.
 * Angles in [0, pi/2), theta_min <= theta_max, n <= the fitter's
 * max_angles, stride >= 1; warn may be NULL.
 * errors: RW_EDOM (bad arguments), RW_EINVAL (fewer usable angles than
 * terms, or repeated angles that leave fewer distinct values than terms:
 * a singular value of the balanced design at or below 1e-12 of the
 * largest); outputs NaN. */
int rw_seis_avo_fit(rw_seis_avo_fitter *f, const double *theta_rad,
                    const double *amp, size_t n, size_t stride,
                    rw_seis_avo_model model, double theta_min, double theta_max,
                    rw_seis_avo_result *out, unsigned *warn);

/* Linearised PS reflection coefficient for an incident P wave (Aki &
 * Richards 1980, eq. 5.46 from memory; the first-order form of the exact
 * rps of rw_reflect_zoeppritz, with its sign conventions):
 *   Rps = -(p vp / (2 cos j)) [ (1 - 2 vs^2 p^2 + 2 vs^2 (cos i / vp)
 *          (cos j / vs)) drho/rho - (4 vs^2 p^2 - 4 vs^2 (cos i / vp)
 *          (cos j / vs)) dvs/vs ],
 * p = sin(theta) / vp_upper, i and j the averages of the P angles and of
 * the S angles (Snell) on the two sides, mean vp, vs, rho. Both media must
 * be solids. theta_rad in [0, pi/2).
 * errors: RW_EDOM (invalid medium, a fluid, a bad angle), RW_ERANGE (at or
 * past the P critical angle); *r NaN. */
int rw_seis_ps_aki_richards(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r);

#ifdef __cplusplus
}
#endif

#endif
