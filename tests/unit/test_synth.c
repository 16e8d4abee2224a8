/* Unit tests of reflectivity in time and synthetic gathers (daemon/core/
 * synth.c): a single reflection returns the wavelet scaled by the
 * normal-incidence coefficient at the interface's time, sub-sample
 * splitting, the FFT and direct paths agree, post-critical coefficients
 * through the wavelet's Hilbert transform, the NMO stretch, nulls, flags,
 * and the error cases. The whole chain is re-implemented in numpy in
 * tests/reference/test_seismic_numpy.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <stdlib.h>
#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define NZ  200
#define NT  120
#define CAP 512

struct fixture {
	double z[NZ], vp[NZ], vs[NZ], rho[NZ], twt[NZ];
	rw_seis_log log;
	rw_seis_td td;
	double w[CAP];
	rw_seis_wavelet wav;
	rw_seis_taxis ax;
	double tr[8 * NT], rf[8 * NT];
	unsigned warn[8 * NT];
	double *work;
	size_t wl;
};

static struct fixture F;

/* Two layers split between samples 99 and 100 (z = 1050 m), the datum
 * at 0 m, 0 s; the time axis puts the interface at sample 20 plus frac. */
static void setup_log(double vp1, double vs1, double r1, double vp2, double vs2,
                      double r2, double frac)
{
	rw_seis_datum d = {0.0, 0.0, vp1};
	size_t i, n;
	double tint;

	for (i = 0; i < NZ; i++) {
		F.z[i] = 1000.25 + 0.5 * (double)i;
		F.vp[i] = i < 100 ? vp1 : vp2;
		F.vs[i] = i < 100 ? vs1 : vs2;
		F.rho[i] = i < 100 ? r1 : r2;
	}
	assert_int_equal(rw_seis_td_sonic(F.z, F.vp, NZ, RW_SEIS_SONIC_VELOCITY,
	                                  &d, F.twt, NULL),
	                 RW_OK);
	F.log.z_m = F.z;
	F.log.vp_ms = F.vp;
	F.log.vs_ms = F.vs;
	F.log.rho_kgm3 = F.rho;
	F.log.n = NZ;
	F.td.z_m = F.z;
	F.td.twt_s = F.twt;
	F.td.n = NZ;
	F.td.datum_z_m = 0.0;
	F.td.datum_twt_s = 0.0;
	F.td.cs_z_m = NULL;
	F.td.cs_drift_s = NULL;
	F.td.n_cs = 0;
	/* the interface's time: midway between the two sample times */
	tint = 0.5 * (F.twt[99] + F.twt[100]);
	F.ax.dt_s = 0.002;
	F.ax.t0_s = tint - (20.0 + frac) * F.ax.dt_s;
	F.ax.n = NT;
	assert_int_equal(
	    rw_seis_wavelet_ricker(30.0, 0.08, 0.002, F.w, CAP, &n, NULL),
	    RW_OK);
	F.wav.w = F.w;
	F.wav.n = n;
	F.wav.i0 = (n - 1) / 2;
	F.wav.dt_s = 0.002;
}

static int run(const double *ang, size_t na, rw_seis_rmethod m, int stretch,
               int keep, rw_seis_conv conv)
{
	rw_seis_synth_opts o;
	double maxa = 0.0;
	size_t i;
	int st;

	for (i = 0; i < na; i++)
		if (ang[i] > maxa)
			maxa = ang[i];
	o.method = m;
	o.stretch = stretch;
	o.keep_partial = keep;
	o.conv = conv;
	F.wl = rw_seis_synthetic_workspace(NT, F.wav.n, maxa, stretch);
	assert_true(F.wl > 0);
	F.work = malloc(F.wl * sizeof(double));
	assert_non_null(F.work);
	st = rw_seis_synthetic(&F.log, &F.td, ang, na, &F.wav, &F.ax, &o, F.tr,
	                       F.rf, F.warn, F.work, F.wl);
	free(F.work);
	return st;
}

/* Expected trace of one interface with coefficient (re, im) at sample
 * 20 + frac: the wavelet split (1 - frac, frac) between samples 20 and
 * 21 (the stated placement rule), plus im times the Hilbert transform. */
static double expect(const double *w, const double *h, size_t n, size_t i0,
                     double re, double im, double frac, size_t k)
{
	double s = 0.0;
	int side;

	for (side = 0; side < 2; side++) {
		long j = (long)k - (20 + side) + (long)i0;
		double part = side ? frac : 1.0 - frac;

		if (j >= 0 && j < (long)n)
			s += part * (re * w[j] + (h ? im * h[j] : 0.0));
	}
	return s;
}

/* A single reflection spike returns the wavelet shifted to the right time
 * (convolution with a delta: a fact of linear filtering), scaled by the
 * normal-incidence coefficient (Z2 - Z1) / (Z2 + Z1) (Aki & Richards 1980, the
 * normal-incidence limit); on a sample and between samples; direct and FFT. */
static void test_single_spike(void **state)
{
	double ang[1] = {0.0}, r0;
	static const double fracs[3] = {0.0, 0.3, 0.75};
	size_t k, f;
	int conv;

	(void)state;
	for (f = 0; f < 3; f++) {
		setup_log(2500.0, 1200.0, 2300.0, 2800.0, 1500.0, 2400.0,
		          fracs[f]);
		r0 = (2400.0 * 2800.0 - 2300.0 * 2500.0) /
		     (2400.0 * 2800.0 + 2300.0 * 2500.0);
		for (conv = RW_SEIS_CONV_DIRECT; conv <= RW_SEIS_CONV_FFT;
		     conv++) {
			assert_int_equal(run(ang, 1, RW_SEIS_R_ZOEPPRITZ, 0, 0,
			                     (rw_seis_conv)conv),
			                 RW_OK);
			for (k = 0; k < NT; k++)
				assert_true(fabs(F.tr[k] -
				                 expect(F.w, NULL, F.wav.n,
				                        F.wav.i0, r0, 0.0,
				                        fracs[f], k)) <= 1e-12);
			/* the reflectivity holds the split coefficient */
			assert_true(fabs(F.rf[20] - (1.0 - fracs[f]) * r0) <=
			            1e-12);
		}
		/* the peak is at the interface's sample */
		if (fracs[f] == 0.0)
			assert_true(fabs(F.tr[20] - r0) <= 1e-12);
	}
}

/* FFT and direct agree to 1e-12 on a random log and a gather with the
 * stretch (both paths compute the same sum; 1e-12 leaves room for the
 * FFT's rounding, measured near 1e-14). */
static void test_fft_vs_direct_gather(void **state)
{
	double ang[5] = {0.0, 0.1, 0.3, 0.5, 0.7}, a[5 * NT];
	uint64_t s = 11;
	size_t i;

	(void)state;
	setup_log(2500, 1200, 2300, 2800, 1500, 2400, 0.0);
	for (i = 0; i < NZ; i++) {
		s = s * 6364136223846793005ULL + 1442695040888963407ULL;
		F.vp[i] = 2400.0 + (double)(s >> 53) * 1e-13 * 700.0;
		F.vs[i] = F.vp[i] * 0.5;
		F.rho[i] = 2200.0 + (double)((s >> 20) & 255);
	}
	assert_int_equal(
	    run(ang, 5, RW_SEIS_R_ZOEPPRITZ, 1, 0, RW_SEIS_CONV_DIRECT), RW_OK);
	for (i = 0; i < 5 * NT; i++)
		a[i] = F.tr[i];
	assert_int_equal(
	    run(ang, 5, RW_SEIS_R_ZOEPPRITZ, 1, 0, RW_SEIS_CONV_FFT), RW_OK);
	for (i = 0; i < 5 * NT; i++)
		assert_true(fabs(a[i] - F.tr[i]) <= 1e-12);
}

/* Past the P critical angle the exact coefficient is complex; the trace
 * is Re(R) w + Im(R) H{w} (Aki & Richards 1980 convention exp(-i w t);
 * see seismic.h), and the samples are flagged post-critical. */
static void test_postcritical(void **state)
{
	double ang[1] = {50.0 * M_PI / 180.0}, h[CAP], *hw;
	rw_reflect_medium u = {2500.0, 1200.0, 2300.0},
	                  l = {4000.0, 2200.0, 2500.0};
	rw_reflect_pcoefs c;
	size_t k, hl;

	(void)state;
	setup_log(u.vp_ms, u.vs_ms, u.rho_kgm3, l.vp_ms, l.vs_ms, l.rho_kgm3,
	          0.0);
	assert_int_equal(rw_reflect_zoeppritz(&u, &l, ang[0], &c), RW_OK);
	assert_true(fabs(c.rpp.im) > 0.05);
	hl = rw_seis_hilbert_workspace(F.wav.n);
	hw = malloc(hl * sizeof(double));
	assert_non_null(hw);
	assert_int_equal(rw_seis_hilbert(F.w, F.wav.n, h, hw, hl), RW_OK);
	free(hw);
	assert_int_equal(
	    run(ang, 1, RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO), RW_OK);
	for (k = 0; k < NT; k++)
		assert_true(
		    fabs(F.tr[k] - expect(F.w, h, F.wav.n, F.wav.i0, c.rpp.re,
		                          c.rpp.im, 0.0, k)) <= 1e-12);
	assert_true(F.warn[20] & RW_SEIS_WARN_POSTCRITICAL);
	assert_false(F.warn[NT - 1] & RW_SEIS_WARN_POSTCRITICAL);
	/* Aki-Richards has no value there: the samples are null */
	assert_int_equal(
	    run(ang, 1, RW_SEIS_R_AKI_RICHARDS, 0, 0, RW_SEIS_CONV_AUTO),
	    RW_OK);
	assert_true(isnan(F.tr[20]) && isnan(F.rf[20]));
	assert_true(F.warn[20] & RW_SEIS_WARN_NULL_NEAR);
	assert_true(F.warn[20] & RW_SEIS_WARN_POSTCRITICAL);
	assert_false(isnan(F.tr[NT - 1]));
}

/* Angle gather with a linearisation: the trace at each angle is the
 * wavelet times rw_reflect_shuey2 at that angle; with the stretch, the
 * wavelet is the one rw_seis_wavelet_stretch gives for 1 / cos theta
 * (Dunkin & Levin 1973, from memory), centred on the interface. */
static void test_gather_and_stretch(void **state)
{
	double ang[3] = {0.0, 0.35, 0.6}, ws[CAP], xs[CAP], r;
	rw_reflect_medium u = {3000.0, 1500.0, 2350.0},
	                  l = {2700.0, 1600.0, 2150.0};
	size_t a, k, ns, i0s;

	(void)state;
	setup_log(u.vp_ms, u.vs_ms, u.rho_kgm3, l.vp_ms, l.vs_ms, l.rho_kgm3,
	          0.0);
	assert_int_equal(run(ang, 3, RW_SEIS_R_SHUEY2, 0, 0, RW_SEIS_CONV_AUTO),
	                 RW_OK);
	for (a = 0; a < 3; a++) {
		assert_int_equal(rw_reflect_shuey2(&u, &l, ang[a], &r), RW_OK);
		for (k = 0; k < NT; k++)
			assert_true(fabs(F.tr[a * NT + k] -
			                 expect(F.w, NULL, F.wav.n, F.wav.i0, r,
			                        0.0, 0.0, k)) <= 1e-12);
	}
	assert_int_equal(run(ang, 3, RW_SEIS_R_SHUEY2, 1, 0, RW_SEIS_CONV_FFT),
	                 RW_OK);
	for (a = 0; a < 3; a++) {
		assert_int_equal(rw_reflect_shuey2(&u, &l, ang[a], &r), RW_OK);
		if (ang[a] == 0.0) {
			ns = F.wav.n;
			i0s = F.wav.i0;
			for (k = 0; k < ns; k++)
				ws[k] = F.w[k];
		} else {
			assert_int_equal(
			    rw_seis_wavelet_stretch(F.w, F.wav.n, F.wav.i0,
			                            1.0 / cos(ang[a]), ws, CAP,
			                            &ns, &i0s, xs, CAP),
			    RW_OK);
		}
		for (k = 0; k < NT; k++)
			assert_true(fabs(F.tr[a * NT + k] -
			                 expect(ws, NULL, ns, i0s, r, 0.0, 0.0,
			                        k)) <= 1e-12);
	}
}

/* Nulls: a null vs does not matter at normal incidence; at an angle the
 * samples within the wavelet's reach of the interface are null and
 * flagged, or kept and flagged with keep_partial; the log's time span
 * flags the samples outside it. */
static void test_nulls_and_flags(void **state)
{
	double ang[2] = {0.0, 0.3};
	size_t k;

	(void)state;
	setup_log(2500, 1200, 2300, 2800, 1500, 2400, 0.0);
	F.vs[100] = NAN;
	assert_int_equal(
	    run(ang, 2, RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO), RW_OK);
	for (k = 0; k < NT; k++) {
		assert_false(isnan(F.tr[k]));
		assert_false(F.warn[k] & RW_SEIS_WARN_NULL_NEAR);
	}
	assert_true(isnan(F.tr[NT + 20]) && isnan(F.rf[NT + 20]));
	assert_true(F.warn[NT + 20] & RW_SEIS_WARN_NULL_NEAR);
	/* far from the interface (beyond the wavelet's reach) all is well */
	assert_false(isnan(F.tr[NT + 60]));
	assert_false(F.warn[NT + 60] & RW_SEIS_WARN_NULL_NEAR);
	/* the first sample lies above the top of the log */
	assert_true(F.warn[0] & RW_SEIS_WARN_OUTSIDE_LOG);
	assert_false(F.warn[20] & RW_SEIS_WARN_OUTSIDE_LOG);
	assert_int_equal(
	    run(ang, 2, RW_SEIS_R_ZOEPPRITZ, 0, 1, RW_SEIS_CONV_AUTO), RW_OK);
	assert_false(isnan(F.tr[NT + 20]));
	assert_true(F.warn[NT + 20] & RW_SEIS_WARN_NULL_NEAR);
	/* the Gray forms need vs at normal incidence too */
	assert_int_equal(
	    run(ang, 1, RW_SEIS_R_GRAY_LMR, 0, 0, RW_SEIS_CONV_AUTO), RW_OK);
	assert_true(isnan(F.tr[20]));
}

/* rw_seis_reflectivity: the coefficients on the axis, flags at the
 * interface's samples. */
static void test_reflectivity(void **state)
{
	double re[NT], im[NT], r0;
	unsigned w[NT];
	size_t k;

	(void)state;
	setup_log(2500, 1200, 2300, 2800, 1500, 2400, 0.25);
	r0 = (2400.0 * 2800.0 - 2300.0 * 2500.0) /
	     (2400.0 * 2800.0 + 2300.0 * 2500.0);
	assert_int_equal(rw_seis_reflectivity(&F.log, &F.td, 0.0,
	                                      RW_SEIS_R_ZOEPPRITZ, &F.ax, re,
	                                      im, w),
	                 RW_OK);
	for (k = 0; k < NT; k++) {
		double want = k == 20 ? 0.75 * r0 : k == 21 ? 0.25 * r0 : 0.0;

		assert_true(fabs(re[k] - want) <= 1e-13);
		assert_true(im[k] == 0.0);
	}
	assert_true(w[0] & RW_SEIS_WARN_OUTSIDE_LOG);
	assert_int_equal(w[20], 0);
	assert_int_equal(rw_seis_reflectivity(&F.log, &F.td, M_PI / 2,
	                                      RW_SEIS_R_ZOEPPRITZ, &F.ax, re,
	                                      im, w),
	                 RW_EDOM);
	assert_true(isnan(re[3]));
}

static void test_errors(void **state)
{
	double ang[2] = {0.0, 0.3}, big[1] = {85.0 * M_PI / 180.0};
	rw_seis_synth_opts o = {RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO};
	double work[16];

	(void)state;
	setup_log(2500, 1200, 2300, 2800, 1500, 2400, 0.0);
	F.wav.dt_s = 0.004; /* not the axis's */
	assert_int_equal(
	    run(ang, 2, RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO), RW_EDOM);
	assert_true(isnan(F.tr[0]));
	F.wav.dt_s = 0.002;
	assert_int_equal(rw_seis_synthetic_workspace(NT, F.wav.n, big[0], 1),
	                 0);
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, big, 1, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_ERANGE);
	o.stretch = 1;
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, big, 1, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
	o.stretch = 0;
	o.method = RW_SEIS_R_COUNT;
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, ang, 2, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
	o.method = RW_SEIS_R_ZOEPPRITZ;
	F.log.n = 1;
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, ang, 2, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
	F.log.n = NZ;
	F.td.n = 50; /* the relation stops above the bottom of the log */
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, ang, 2, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
	F.td.n = NZ;
	ang[1] = M_PI / 2;
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, ang, 2, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
	ang[1] = 0.3;
	F.w[0] = NAN;
	assert_int_equal(rw_seis_synthetic(&F.log, &F.td, ang, 2, &F.wav, &F.ax,
	                                   &o, F.tr, NULL, NULL, work, 16),
	                 RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_single_spike),
	    cmocka_unit_test(test_fft_vs_direct_gather),
	    cmocka_unit_test(test_postcritical),
	    cmocka_unit_test(test_gather_and_stretch),
	    cmocka_unit_test(test_nulls_and_flags),
	    cmocka_unit_test(test_reflectivity),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
