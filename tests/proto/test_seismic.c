/* Protocol tests of the seismic family through rw_proto_handle:
 * seismic.timedepth, seismic.upscale, seismic.wavelet, seismic.synthetic
 * and seismic.avo_fit. Every -32602 path with the parameter it names, the
 * work limit, the shapes, units and QC flags, answers independent of the
 * thread count, and physics against facts of the trade and published
 * closed forms (each named beside its check). numpy's convolution and FFT
 * are the outside references of tests/e2e/test_synthetic.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>

#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(method, params)                                                    \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"" method                   \
	"\",\"params\":" params "}"

/* QC bits by their published numbers (protocol-docs/qc-flags.md). */
#define B_POSTCRIT  (1ull << 17)
#define B_MISSING   (1ull << 28)
#define B_NO_SHEAR  (1ull << 39)
#define B_FILLED    (1ull << 44)
#define B_NULL_NEAR (1ull << 45)
#define B_OUTSIDE   (1ull << 46)
#define B_FIT       (1ull << 47)

static const double PI = 3.14159265358979323846;

static int setup(void **state)
{
	harness *h = malloc(sizeof *h);
	h_init(h);
	*state = h;
	return 0;
}

static int teardown(void **state)
{
	h_free(*state);
	free(*state);
	return 0;
}

static cJSON *ok_call(harness *h, const char *line)
{
	cJSON *r = h_call(h, line);
	if (!r || h_code(r) != 0 || !h_result(r, NULL))
		fail_msg("%.300s -> %.600s", line,
		         h->out.data ? h->out.data : "");
	return r;
}

/* Element [i] or [i][j] of a result member (j < 0: one level). */
static const cJSON *at(const cJSON *r, const char *m, int i, int j)
{
	const cJSON *v = h_result(r, m);
	if (!v)
		fail_msg("member %s missing", m);
	if (i >= 0)
		v = cJSON_GetArrayItem(v, i);
	if (j >= 0)
		v = cJSON_GetArrayItem(v, j);
	if (!v)
		fail_msg("member %s[%d][%d] missing", m, i, j);
	return v;
}

static double num(const cJSON *r, const char *m, int i, int j)
{
	const cJSON *v = at(r, m, i, j);
	if (cJSON_IsNull(v))
		return NAN;
	if (!cJSON_IsNumber(v))
		fail_msg("%s[%d][%d] is not a number", m, i, j);
	return v->valuedouble;
}

static unsigned long long qc(const cJSON *r, const char *m, int i, int j)
{
	return (unsigned long long)num(r, m, i, j);
}

static int len(const cJSON *r, const char *m)
{
	return cJSON_GetArraySize(h_result(r, m));
}

static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.15g want %.15g (abs tol %g)", got, want, tol);
}

/* A JSON array of n values f(i) into buf. */
static char *arr(char *buf, size_t size, int n, double (*f)(int, void *),
                 void *ctx)
{
	size_t u = 0;
	u += (size_t)snprintf(buf + u, size - u, "[");
	for (int i = 0; i < n && u < size; i++) {
		double v = f(i, ctx);
		if (isnan(v))
			u += (size_t)snprintf(buf + u, size - u, "%snull",
			                      i ? "," : "");
		else
			u += (size_t)snprintf(buf + u, size - u, "%s%.17g",
			                      i ? "," : "", v);
	}
	snprintf(buf + u, size - u, "]");
	return buf;
}

/* ---- seismic.timedepth ------------------------------------------------- */

static void test_td_constant_velocity(void **state)
{
	harness *h = *state;
	/* constant velocity: t = t0 + 2 (z - z0) / v exactly (definition of
	 * two-way time); above the log the replacement velocity */
	cJSON *r = ok_call(
	    h, REQ("seismic.timedepth",
	           "{\"depth\":[1000,1012.5,1030,1100],\"vp\":2500,"
	           "\"datum\":{\"depth\":200,\"twt\":10,\"vrep\":2000}}"));
	const double z[4] = {1000, 1012.5, 1030, 1100};
	for (int i = 0; i < 4; i++) {
		double want =
		    10 + 1000 * (2 * 800.0 / 2000 + 2 * (z[i] - 1000) / 2500);
		near(num(r, "twt", i, -1), want, 1e-9);
		near(num(r, "twt_sonic", i, -1), want, 1e-9);
	}
	near(num(r, "vrep", -1, -1), 2000, 0);
	assert_string_equal(
	    cJSON_GetObjectItem(h_result(r, "units"), "twt")->valuestring,
	    "ms");
	assert_null(h_result(r, "drift"));
	cJSON_Delete(r);
	/* seconds in, seconds out; slowness in us/ft */
	r = ok_call(h, REQ("seismic.timedepth",
	                   "{\"depth\":[0,304.8],\"dtp\":100,\"units\":"
	                   "{\"time\":\"s\"}}"));
	/* 100 us/ft over 1000 ft: 0.1 s one way (unit definitions) */
	near(num(r, "twt", 1, -1), 0.2, 1e-12);
	cJSON_Delete(r);
}

static void test_td_checkshots(void **state)
{
	harness *h = *state;
	/* the corrected relation passes through every checkshot (definition
	 * of the drift correction, common practice) */
	cJSON *r =
	    ok_call(h, REQ("seismic.timedepth",
	                   "{\"depth\":[1000,1010,1020,1030,1040,1050],"
	                   "\"vp\":[2500,2600,null,2700,2800,2900],"
	                   "\"checkshots\":{\"depth\":[1010,1040],\"owt\":[4.5,"
	                   "16]}}"));
	const cJSON *csd;
	near(num(r, "twt", 1, -1), 9, 1e-9);
	near(num(r, "twt", 4, -1), 32, 1e-9);
	near(num(r, "checkshot_twt", 0, -1), 9, 1e-12);
	/* drift = checkshot minus sonic time */
	near(num(r, "checkshot_drift", 0, -1), 9 - num(r, "twt_sonic", 1, -1),
	     1e-9);
	near(num(r, "drift", 1, -1), num(r, "checkshot_drift", 0, -1), 1e-9);
	/* held outside the span; the null sonic bridged: log_filled */
	assert_true(qc(r, "qc", 0, -1) & B_FILLED);
	assert_true(qc(r, "qc", 5, -1) & B_FILLED);
	assert_true(qc(r, "qc", 2, -1) & B_MISSING);
	assert_false(qc(r, "qc", 3, -1) & B_FILLED);
	near(num(r, "drift", 0, -1), num(r, "checkshot_drift", 0, -1), 1e-12);
	csd = h_result(r, "warnings");
	assert_true(cJSON_GetArraySize(csd) >= 2);
	cJSON_Delete(r);
}

static void test_td_resample(void **state)
{
	harness *h = *state;
	/* a curve linear in depth at constant velocity is linear in time:
	 * linear interpolation reproduces it exactly */
	cJSON *r = ok_call(
	    h, REQ("seismic.timedepth",
	           "{\"depth\":[0,5,10,15,20],\"vp\":2000,\"resample\":{"
	           "\"dt\":4,\"curves\":{\"gr\":[10,20,30,40,null]}}}"));
	const cJSON *rs = h_result(r, "resampled");
	const cJSON *rq = h_result(r, "resampled_qc");
	assert_int_equal(num(r, "resample_n", -1, -1), 6);
	near(num(r, "resample_time", 5, -1), 20, 1e-12);
	/* t ms = z m at 2000 m/s two-way */
	near(cJSON_GetArrayItem(cJSON_GetObjectItem(rs, "depth"), 3)
	         ->valuedouble,
	     12, 1e-9);
	near(cJSON_GetArrayItem(cJSON_GetObjectItem(rs, "gr"), 3)->valuedouble,
	     34, 1e-9);
	/* next to the null: null and input_missing, never bridged */
	assert_true(
	    cJSON_IsNull(cJSON_GetArrayItem(cJSON_GetObjectItem(rs, "gr"), 4)));
	assert_true((unsigned long long)cJSON_GetArrayItem(
	                cJSON_GetObjectItem(rq, "gr"), 4)
	                ->valuedouble &
	            B_MISSING);
	assert_string_equal(
	    cJSON_GetObjectItem(h_result(r, "units"), "resampled.depth")
	        ->valuestring,
	    "m");
	cJSON_Delete(r);
	/* an axis past the log: outside_log, null */
	r = ok_call(h,
	            REQ("seismic.timedepth",
	                "{\"depth\":[0,5,10],\"vp\":2000,\"resample\":{"
	                "\"t0\":8,\"dt\":2,\"n\":3,\"interp\":\"steffen\"}}"));
	assert_true(cJSON_IsNull(cJSON_GetArrayItem(
	    cJSON_GetObjectItem(h_result(r, "resampled"), "depth"), 2)));
	assert_true(
	    (unsigned long long)cJSON_GetArrayItem(
	        cJSON_GetObjectItem(h_result(r, "resampled_qc"), "depth"), 2)
	        ->valuedouble &
	    B_OUTSIDE);
	cJSON_Delete(r);
}

static void test_td_errors(void **state)
{
	harness *h = *state;
#define TD(p) REQ("seismic.timedepth", p)
	h_expect_invalid(h, TD("{\"vp\":2000}"), "depth");
	h_expect_invalid(h, TD("{\"depth\":[0,1]}"), "vp");
	h_expect_invalid(h, TD("{\"depth\":[0,1],\"vp\":2000,\"dtp\":100}"),
	                 "dtp");
	h_expect_invalid(h, TD("{\"depth\":[0,1,1],\"vp\":2000}"), "depth");
	h_expect_invalid(h, TD("{\"depth\":[0,1],\"vp\":[2000,2000,1]}"), "vp");
	h_expect_invalid(h, TD("{\"depth\":[0,1],\"vp\":[null,-1]}"), "vp");
	/* values no rock has: the times would not rise, or overflow */
	h_expect_invalid(h,
	                 TD("{\"depth\":[1500,1510],\"dtp\":1e-300,"
	                    "\"datum\":{\"depth\":0,\"vrep\":2100}}"),
	                 "dtp");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,1,2,3],\"vp\":[2000,1e-300,2000,"
	                    "2000]}"),
	                 "vp");
	h_expect_invalid(
	    h, TD("{\"depth\":[0,1],\"vp\":2000,\"datum\":{\"depth\":5}}"),
	    "datum.depth");
	h_expect_invalid(
	    h, TD("{\"depth\":[10,11],\"vp\":2000,\"datum\":{\"depth\":0}}"),
	    "datum.vrep");
	/* a null first sonic sample needs the replacement velocity too */
	h_expect_invalid(h, TD("{\"depth\":[10,11],\"vp\":[null,2000]}"),
	                 "datum.vrep");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,1],\"vp\":2000,\"datum\":{"
	                    "\"vrep\":0}}"),
	                 "datum.vrep");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"checkshots\":{"
	                    "\"depth\":[5,20],\"twt\":[5,20]}}"),
	                 "checkshots.depth");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"checkshots\":{"
	                    "\"depth\":[5,8],\"twt\":[5,4]}}"),
	                 "checkshots.twt");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"checkshots\":{"
	                    "\"depth\":[5,8],\"twt\":[5,6],\"owt\":[2,3]}}"),
	                 "checkshots.owt");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"checkshots\":{"
	                    "\"depth\":[5,8],\"twt\":[5]}}"),
	                 "checkshots.twt");
	/* one-way times given as two-way: the drift would reverse time */
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10,20],\"vp\":[1000,4000,4000],"
	                    "\"checkshots\":{\"depth\":[5,20],\"twt\":[10,"
	                    "10.5]}}"),
	                 "checkshots");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"curves\":{\"gr\":[1,2,3]}}}"),
	                 "resample.curves.gr");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"curves\":{\"gr\":[1,\"x\"]}}}"),
	                 "resample.curves.gr");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"curves\":{\"depth\":[1,2]}}}"),
	                 "resample.curves.depth");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"curves\":[1,2]}}"),
	                 "resample.curves");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"t0\":50}}"),
	                 "resample.t0");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"dt\":0}}"),
	                 "resample.dt");
	h_expect_invalid(h,
	                 TD("{\"depth\":[0,10],\"vp\":2000,\"resample\":{"
	                    "\"interp\":\"cubic\"}}"),
	                 "resample.interp");
#undef TD
}

/* ---- seismic.wavelet --------------------------------------------------- */

static void test_wavelet_ricker(void **state)
{
	harness *h = *state;
	cJSON *r =
	    ok_call(h, REQ("seismic.wavelet",
	                   "{\"frequency\":25,\"length\":200,\"dt\":4}"));
	int n = (int)num(r, "n", -1, -1),
	    i0 = (int)num(r, "zero_index", -1, -1);
	/* 2 floor(200 / 8) + 1 samples, centred */
	assert_int_equal(n, 51);
	assert_int_equal(i0, 25);
	for (int k = 0; k < n; k++) {
		/* Ricker 1953: (1 - 2 pi^2 f^2 t^2) exp(-pi^2 f^2 t^2) */
		double t = (k - i0) * 0.004, a = PI * PI * 625 * t * t;
		near(num(r, "amplitude", k, -1), (1 - 2 * a) * exp(-a), 1e-14);
		near(num(r, "time", k, -1), (k - i0) * 4.0, 1e-12);
	}
	assert_null(h_result(r, "warnings"));
	cJSON_Delete(r);
	/* a rotation by 180 deg negates the wavelet (definition) */
	{
		cJSON *p = ok_call(h, REQ("seismic.wavelet",
		                          "{\"frequency\":25,\"length\":200,"
		                          "\"dt\":4,\"phase\":180}"));
		r = ok_call(h,
		            REQ("seismic.wavelet",
		                "{\"frequency\":25,\"length\":200,\"dt\":4}"));
		for (int k = 0; k < 51; k++)
			near(num(p, "amplitude", k, -1),
			     -num(r, "amplitude", k, -1), 1e-12);
		cJSON_Delete(p);
		cJSON_Delete(r);
	}
	/* a short wavelet is flagged as truncated; energy normalisation */
	r = ok_call(h, REQ("seismic.wavelet",
	                   "{\"frequency\":25,\"length\":30,\"dt\":2,"
	                   "\"normalise\":\"energy\"}"));
	{
		double e = 0;
		for (int k = 0; k < len(r, "amplitude"); k++)
			e += pow(num(r, "amplitude", k, -1), 2);
		near(e, 1, 1e-12);
	}
	assert_int_equal(len(r, "warnings"), 1);
	cJSON_Delete(r);
}

static void test_wavelet_others(void **state)
{
	harness *h = *state;
	cJSON *r = ok_call(h, REQ("seismic.wavelet",
	                          "{\"kind\":\"ormsby\",\"corners\":[5,10,40,"
	                          "60],\"length\":400}"));
	/* zero phase: symmetric, peak 1 at time zero */
	int n = len(r, "amplitude"), i0 = (int)num(r, "zero_index", -1, -1);
	near(num(r, "amplitude", i0, -1), 1, 1e-12);
	for (int k = 0; k < n; k++)
		near(num(r, "amplitude", k, -1),
		     num(r, "amplitude", n - 1 - k, -1), 1e-12);
	cJSON_Delete(r);
	r = ok_call(h, REQ("seismic.wavelet",
	                   "{\"kind\":\"bandpass\",\"corners\":[5,10,40,60],"
	                   "\"length\":400,\"dt\":4}"));
	near(num(r, "amplitude", (int)num(r, "zero_index", -1, -1), -1), 1,
	     1e-12);
	cJSON_Delete(r);
	r = ok_call(h, REQ("seismic.wavelet",
	                   "{\"kind\":\"samples\",\"samples\":[0,-1,2,-1],"
	                   "\"normalise\":\"peak\"}"));
	assert_int_equal(num(r, "zero_index", -1, -1), 1);
	near(num(r, "amplitude", 2, -1), 1, 0);
	near(num(r, "time", 0, -1), -2, 1e-12);
	cJSON_Delete(r);
}

static void test_wavelet_errors(void **state)
{
	harness *h = *state;
#define WV(p) REQ("seismic.wavelet", p)
	h_expect_invalid(h, WV("{}"), "frequency");
	h_expect_invalid(h, WV("{\"frequency\":0}"), "frequency");
	/* Nyquist at 2 ms is 250 Hz */
	h_expect_invalid(h, WV("{\"frequency\":250}"), "frequency");
	h_expect_invalid(h, WV("{\"frequency\":30,\"length\":2}"), "length");
	h_expect_invalid(h, WV("{\"frequency\":30,\"corners\":[1,2,3,4]}"),
	                 "corners");
	h_expect_invalid(h, WV("{\"kind\":\"ormsby\"}"), "corners");
	h_expect_invalid(h, WV("{\"kind\":\"ormsby\",\"corners\":[5,10,40]}"),
	                 "corners");
	h_expect_invalid(h,
	                 WV("{\"kind\":\"bandpass\",\"corners\":[10,5,40,"
	                    "60]}"),
	                 "corners");
	h_expect_invalid(h,
	                 WV("{\"kind\":\"ormsby\",\"corners\":[5,10,40,"
	                    "300]}"),
	                 "corners");
	h_expect_invalid(h,
	                 WV("{\"kind\":\"ormsby\",\"corners\":[5,10,40,60],"
	                    "\"frequency\":30}"),
	                 "frequency");
	h_expect_invalid(h, WV("{\"kind\":\"samples\"}"), "samples");
	h_expect_invalid(h, WV("{\"kind\":\"samples\",\"samples\":[0,0,0]}"),
	                 "samples");
	h_expect_invalid(h,
	                 WV("{\"kind\":\"samples\",\"samples\":[1,2],"
	                    "\"zero_index\":2}"),
	                 "zero_index");
	h_expect_invalid(h,
	                 WV("{\"kind\":\"samples\",\"samples\":[1,2],"
	                    "\"length\":20}"),
	                 "length");
	h_expect_invalid(h, WV("{\"frequency\":30,\"phase\":270}"), "phase");
	h_expect_invalid(h, WV("{\"kind\":\"gabor\"}"), "kind");
	h_expect_invalid(h, WV("{\"frequency\":30,\"dt\":-2}"), "dt");
#undef WV
}

/* ---- seismic.upscale --------------------------------------------------- */

static double up_vp(int i, void *x)
{
	(void)x;
	return i < 10 ? 3000 : 2200;
}
static double up_vs(int i, void *x)
{
	(void)x;
	return i < 10 ? 1600 : 900;
}
static double up_rho(int i, void *x)
{
	(void)x;
	return i < 10 ? 2.45 : 2.15;
}
static double up_z(int i, void *x)
{
	(void)x;
	return (double)i;
}

static void test_upscale_backus(void **state)
{
	harness *h = *state;
	char z[512], vp[512], vs[512], rho[512], line[4096];
	cJSON *r;
	/* two isotropic layers: the closed form of Backus 1962 in the form
	 * of Mavko, Mukerji & Dvorkin 2009, sec. 4.13 (thickness averages
	 * <.> over the window [6, 14] m: 3.5 m of layer 1, 4.5 m of 2) */
	snprintf(line, sizeof line,
	         REQ("seismic.upscale",
	             "{\"depth\":%s,\"vp\":%s,\"vs\":%s,\"rho\":%s,"
	             "\"window\":8}"),
	         arr(z, sizeof z, 20, up_z, NULL),
	         arr(vp, sizeof vp, 20, up_vp, NULL),
	         arr(vs, sizeof vs, 20, up_vs, NULL),
	         arr(rho, sizeof rho, 20, up_rho, NULL));
	r = ok_call(h, line);
	{
		double w[2] = {3.5 / 8, 4.5 / 8}, M[2], mu[2], lam[2], rh[2];
		double iM = 0, imu = 0, amu = 0, lM = 0, c11a = 0, arho = 0;
		for (int k = 0; k < 2; k++) {
			double p = k ? 2200 : 3000, s = k ? 900 : 1600;
			rh[k] = k ? 2150 : 2450;
			M[k] = rh[k] * p * p;
			mu[k] = rh[k] * s * s;
			lam[k] = M[k] - 2 * mu[k];
			iM += w[k] / M[k];
			imu += w[k] / mu[k];
			amu += w[k] * mu[k];
			lM += w[k] * lam[k] / M[k];
			c11a += w[k] * 4 * mu[k] * (lam[k] + mu[k]) / M[k];
			arho += w[k] * rh[k];
		}
		double c33 = 1 / iM, c44 = 1 / imu, c66 = amu, c13 = lM * c33;
		double c11 = c11a + lM * lM * c33;
		near(num(r, "c33", 10, -1) * 1e9, c33, 1e-12 * c33);
		near(num(r, "c44", 10, -1) * 1e9, c44, 1e-12 * c44);
		near(num(r, "c66", 10, -1) * 1e9, c66, 1e-12 * c66);
		near(num(r, "c13", 10, -1) * 1e9, c13, 1e-12 * c13);
		near(num(r, "c11", 10, -1) * 1e9, c11, 1e-12 * c11);
		near(num(r, "rho", 10, -1) * 1000, arho, 1e-12 * arho);
		/* Thomsen 1986: epsilon = (C11 - C33) / (2 C33), gamma =
		 * (C66 - C44) / (2 C44) */
		near(num(r, "epsilon", 10, -1), (c11 - c33) / (2 * c33), 1e-12);
		near(num(r, "gamma", 10, -1), (c66 - c44) / (2 * c44), 1e-12);
		near(num(r, "vp0", 10, -1), sqrt(c33 / arho), 1e-9);
	}
	/* far from the contrast: a stack of identical layers is the layer
	 * itself (Backus 1962), isotropic */
	near(num(r, "c33", 2, -1) * 1e9, 2450.0 * 3000 * 3000,
	     1e-12 * 2450.0 * 9e6);
	near(num(r, "epsilon", 2, -1), 0, 1e-13);
	near(num(r, "delta", 2, -1), 0, 1e-13);
	near(num(r, "gamma", 2, -1), 0, 1e-13);
	/* isotropic layers give gamma >= 0 (from memory: arithmetic over
	 * harmonic mean of mu) */
	for (int i = 0; i < 20; i++)
		assert_true(num(r, "gamma", i, -1) >= -1e-15);
	/* the window cut at the log's ends */
	assert_true(qc(r, "qc", 0, -1) & B_OUTSIDE);
	assert_false(qc(r, "qc", 10, -1) & B_OUTSIDE);
	near(num(r, "window", -1, -1), 8, 0);
	cJSON_Delete(r);
	/* window from the frequency: 1/3 x 900 m/s / 30 Hz = 10 m (Liner &
	 * Fei 2006 Backus number) */
	snprintf(line, sizeof line,
	         REQ("seismic.upscale",
	             "{\"depth\":%s,\"vp\":%s,\"vs\":%s,\"rho\":%s,"
	             "\"frequency\":30}"),
	         z, vp, vs, rho);
	r = ok_call(h, line);
	near(num(r, "window", -1, -1), 10, 1e-12);
	cJSON_Delete(r);
	/* a fluid layer: C44 = 0, Thomsen parameters null, no_shear */
	r = ok_call(h, REQ("seismic.upscale",
	                   "{\"depth\":[0,1,2,3],\"vp\":[3000,1500,1500,3000],"
	                   "\"vs\":[1500,0,0,1500],\"rho\":[2.4,1.0,1.0,2.4],"
	                   "\"window\":2}"));
	assert_true(qc(r, "qc", 1, -1) & B_NO_SHEAR);
	assert_true(isnan(num(r, "epsilon", 1, -1)));
	near(num(r, "c44", 1, -1), 0, 0);
	cJSON_Delete(r);
}

static void test_upscale_block(void **state)
{
	harness *h = *state;
	cJSON *r = ok_call(
	    h, REQ("seismic.upscale",
	           "{\"method\":\"block\",\"depth\":[0,1,2,3],\"vp\":[2000,"
	           "4000,3000,3000],\"vs\":[1000,2000,1500,1500],\"rho\":[2,"
	           "2.2,2.4,2.4],\"boundaries\":[-0.5,1.5,3.5]}"));
	/* harmonic mean of vp keeps the travel time: 2 / (1/2000 + 1/4000) */
	near(num(r, "block_vp", 0, -1), 2 / (1 / 2000.0 + 1 / 4000.0), 1e-9);
	near(num(r, "block_rho", 0, -1), 2.1, 1e-12);
	near(num(r, "vp", 1, -1), num(r, "block_vp", 0, -1), 0);
	assert_int_equal(num(r, "n_blocks", -1, -1), 2);
	cJSON_Delete(r);
	r = ok_call(h, REQ("seismic.upscale",
	                   "{\"method\":\"block\",\"depth\":[0,1,2,3,4,5],"
	                   "\"vp\":[3000,3000,2000,2000,3000,3000],\"vs\":"
	                   "[1500,1500,1000,1000,1500,1500],\"rho\":[2.4,2.4,"
	                   "2.2,2.2,2.4,2.4],\"threshold\":0.1,\"mean\":{"
	                   "\"vp\":\"arithmetic\"}}"));
	assert_int_equal(num(r, "n_blocks", -1, -1), 3);
	near(num(r, "boundaries", 1, -1), 1.5, 1e-12);
	near(num(r, "boundaries", 2, -1), 3.5, 1e-12);
	cJSON_Delete(r);
}

static void test_upscale_errors(void **state)
{
	harness *h = *state;
#define UP(p)                                                                  \
	REQ("seismic.upscale", "{\"depth\":[0,1,2],\"vp\":3000,\"vs\":1500,"   \
	                       "\"rho\":2.4" p "}")
	h_expect_invalid(h, UP(""), "window");
	h_expect_invalid(h, UP(",\"window\":2,\"frequency\":30"), "frequency");
	h_expect_invalid(h, UP(",\"window\":2,\"backus_number\":0.3"),
	                 "frequency");
	h_expect_invalid(h, UP(",\"window\":0"), "window");
	h_expect_invalid(h, UP(",\"window\":2,\"min_valid\":0"), "min_valid");
	h_expect_invalid(h, UP(",\"window\":2,\"threshold\":0.1"), "threshold");
	h_expect_invalid(h, UP(",\"method\":\"block\""), "boundaries");
	h_expect_invalid(h,
	                 UP(",\"method\":\"block\",\"boundaries\":[0,2],"
	                    "\"threshold\":0.1"),
	                 "threshold");
	h_expect_invalid(h, UP(",\"method\":\"block\",\"boundaries\":[2,0]"),
	                 "boundaries");
	h_expect_invalid(h, UP(",\"method\":\"block\",\"boundaries\":[2]"),
	                 "boundaries");
	h_expect_invalid(h, UP(",\"method\":\"block\",\"window\":2"), "window");
	h_expect_invalid(h,
	                 UP(",\"method\":\"block\",\"threshold\":0.1,"
	                    "\"curve\":\"gr\""),
	                 "curve");
	h_expect_invalid(h, UP(",\"method\":\"median\""), "method");
	h_expect_invalid(h,
	                 REQ("seismic.upscale",
	                     "{\"depth\":[0],\"vp\":3000,\"vs\":1500,\"rho\":"
	                     "2.4,\"window\":2}"),
	                 "depth");
	h_expect_invalid(h,
	                 REQ("seismic.upscale",
	                     "{\"depth\":[0,1],\"vp\":3000,\"rho\":2.4,"
	                     "\"window\":2}"),
	                 "vs");
#undef UP
}

/* ---- seismic.synthetic ------------------------------------------------- */

/* A two-layer log at 2000 m/s: one interface at 1049.75 m, at 50 ms with
 * the datum's 0.25 ms. */
static double sp_z(int i, void *x)
{
	(void)x;
	return 1000 + 0.5 * i;
}
static double sp_rho(int i, void *x)
{
	(void)x;
	return i < 100 ? 2.2 : 2.4;
}
static double sp_vs(int i, void *x)
{
	(void)x;
	return i < 100 ? 900 : 1100;
}

static char *spike_line(char *line, size_t size, const char *extra)
{
	char z[4096], rho[4096], vs[4096];
	snprintf(line, size,
	         REQ("seismic.synthetic",
	             "{\"depth\":%s,\"vp\":2000,\"vs\":%s,\"rho\":%s,"
	             "\"datum\":{\"twt\":0.25},\"wavelet\":{\"frequency\":30,"
	             "\"length\":100},\"axis\":{\"t0\":0,\"n\":101}%s}"),
	         arr(z, sizeof z, 200, sp_z, NULL),
	         arr(vs, sizeof vs, 200, sp_vs, NULL),
	         arr(rho, sizeof rho, 200, sp_rho, NULL), extra);
	return line;
}

static void test_synthetic_spike(void **state)
{
	harness *h = *state;
	static char line[16384];
	cJSON *r, *w, *d, *f;
	/* normal incidence, constant velocity: R = (rho2 - rho1) / (rho2 +
	 * rho1) (the normal-incidence coefficient, a fact of the trade); the
	 * trace is R times the wavelet centred at the interface's time */
	const double R = 0.2 / 4.6;

	r = ok_call(h, spike_line(line, sizeof line, ""));
	w = ok_call(
	    h, REQ("seismic.wavelet", "{\"frequency\":30,\"length\":100}"));
	assert_int_equal(num(r, "n_samples", -1, -1), 101);
	assert_int_equal(len(r, "traces"), 101); /* one angle: [time] */
	near(num(r, "reflectivity", 25, -1), R, 1e-13);
	for (int k = 0; k < 101; k++) {
		int j = k - 25 + 25; /* wavelet index: zero_index 25 at 50 ms */
		double want =
		    j >= 0 && j < 51 ? R * num(w, "amplitude", j, -1) : 0;
		near(num(r, "traces", k, -1), want, 1e-13);
		near(num(r, "time", k, -1), 2.0 * k, 1e-12);
	}
	/* depth at 50 ms is the interface's */
	near(num(r, "depth", 25, -1), 1049.75, 1e-9);
	/* direct and FFT convolution agree to 1e-12 (issue 13) */
	d = ok_call(
	    h, spike_line(line, sizeof line, ",\"convolution\":\"direct\""));
	f = ok_call(h,
	            spike_line(line, sizeof line, ",\"convolution\":\"fft\""));
	for (int k = 0; k < 101; k++)
		near(num(d, "traces", k, -1), num(f, "traces", k, -1), 1e-12);
	cJSON_Delete(d);
	cJSON_Delete(f);
	cJSON_Delete(w);
	cJSON_Delete(r);
}

static void test_synthetic_gather(void **state)
{
	harness *h = *state;
	static char line[16384];
	cJSON *r, *z, *s;
	double rpp;

	r = ok_call(h, spike_line(line, sizeof line, ",\"angle\":[0,20,35]"));
	/* the gather's peak at the interface is the exact coefficient at
	 * that angle (reflect.interface, tested against numpy's solve of the
	 * boundary conditions) */
	z = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":2000,\"vs\":900,\"rho\":2.2},"
	                   "\"lower\":{\"vp\":2000,\"vs\":1100,\"rho\":2.4},"
	                   "\"angle\":[0,20,35]}"));
	assert_int_equal(len(r, "traces"), 3);
	for (int a = 0; a < 3; a++) {
		rpp = num(z, "rpp_re", a, -1);
		near(num(r, "traces", a, 25), rpp, 1e-12);
		assert_int_equal(qc(r, "qc", a, 25), 0);
	}
	/* outside the log's time span: flagged, zero */
	assert_true(qc(r, "qc", 0, 0) & B_OUTSIDE);
	assert_true(fabs(num(r, "traces", 0, 0)) < 1e-8); /* a faint tail */
	/* the stretch keeps the peak and widens the wavelet */
	s = ok_call(h, spike_line(line, sizeof line,
	                          ",\"angle\":[0,35],\"stretch\":true"));
	near(num(s, "traces", 1, 25), num(r, "traces", 2, 25), 1e-12);
	/* 6 ms off the peak, inside the main lobe: higher when widened */
	assert_true(fabs(num(s, "traces", 1, 28)) >
	            1.5 * fabs(num(r, "traces", 2, 28)));
	near(num(s, "traces", 0, 30), num(r, "traces", 0, 30), 1e-15);
	cJSON_Delete(s);
	cJSON_Delete(z);
	cJSON_Delete(r);
}

static double nv_vs(int i, void *x)
{
	(void)x;
	return i == 150 ? NAN : (i < 100 ? 900 : 1100);
}

static void test_synthetic_nulls(void **state)
{
	harness *h = *state;
	static char line[16384];
	char z[4096], rho[4096], vs[4096];
	cJSON *r, *k;
	const char *tmpl =
	    REQ("seismic.synthetic",
	        "{\"depth\":%s,\"vp\":2000,\"vs\":%s,\"rho\":%s,\"angle\":[10],"
	        "\"wavelet\":{\"frequency\":30,\"length\":100},\"axis\":{"
	        "\"t0\":0,\"n\":101}%s}");

	arr(z, sizeof z, 200, sp_z, NULL);
	arr(vs, sizeof vs, 200, nv_vs, NULL);
	arr(rho, sizeof rho, 200, sp_rho, NULL);
	snprintf(line, sizeof line, tmpl, z, vs, rho, "");
	r = ok_call(h, line);
	/* the null vs at 1075 m (75 ms, sample 37) nulls the trace within
	 * the wavelet's reach and flags it; 40 ms is beyond the reach */
	assert_true(isnan(num(r, "traces", 0, 37)));
	assert_true(qc(r, "qc", 0, 37) & B_NULL_NEAR);
	assert_false(isnan(num(r, "traces", 0, 20)));
	assert_false(qc(r, "qc", 0, 20) & B_NULL_NEAR);
	snprintf(line, sizeof line, tmpl, z, vs, rho, ",\"nulls\":\"keep\"");
	k = ok_call(h, line);
	assert_false(isnan(num(k, "traces", 0, 37)));
	assert_true(qc(k, "qc", 0, 37) & B_NULL_NEAR);
	near(num(k, "traces", 0, 20), num(r, "traces", 0, 20), 1e-15);
	cJSON_Delete(k);
	cJSON_Delete(r);
	/* vs = 0 is a fluid layer, not a null: a sea floor reflects at an
	 * angle (Zoeppritz's fluid/solid case) */
	r = ok_call(h, REQ("seismic.synthetic",
	                   "{\"depth\":[0,10,20],\"vp\":[1500,2500,2500],"
	                   "\"vs\":[0,1200,1200],\"rho\":[1.0,2.2,2.2],"
	                   "\"angle\":[10],\"wavelet\":{\"frequency\":30,"
	                   "\"length\":20}}"));
	for (int k2 = 0; k2 < len(r, "time"); k2++) {
		assert_false(isnan(num(r, "traces", 0, k2)));
		assert_false(qc(r, "qc", 0, k2) & B_NULL_NEAR);
	}
	cJSON_Delete(r);
	/* post-critical interfaces of a linearisation are flagged */
	r = ok_call(h,
	            REQ("seismic.synthetic",
	                "{\"depth\":[0,10,20],\"vp\":[2000,4000,4000],\"vs\":"
	                "[1000,2000,2000],\"rho\":2.3,\"angle\":[40],"
	                "\"method\":\"shuey2\",\"twt\":[0,10,15],\"wavelet\":"
	                "{\"frequency\":30,\"length\":40}}"));
	{
		int found = 0;
		for (int k2 = 0; k2 < len(r, "time"); k2++)
			found |= (qc(r, "qc", 0, k2) & B_POSTCRIT) != 0;
		assert_true(found);
	}
	cJSON_Delete(r);
}

static void test_synthetic_threads(void **state)
{
	/* the gather is the same whatever the thread count */
	static char line[32768];
	char *one, *two;
	harness a, b;
	proto_limits lim;
	char ang[256];
	size_t u = 0;

	(void)state;
	u += (size_t)snprintf(ang + u, sizeof ang - u, "[");
	for (int k = 0; k < 20; k++)
		u += (size_t)snprintf(ang + u, sizeof ang - u, "%s%d",
		                      k ? "," : "", 2 * k);
	snprintf(ang + u, sizeof ang - u, "]");
	{
		char extra[400];
		snprintf(extra, sizeof extra, ",\"angle\":%s", ang);
		spike_line(line, sizeof line, extra);
	}
	proto_limits_default(&lim);
	lim.threads = 1;
	a.ctx = proto_ctx_new(&lim);
	a.s = proto_session_new(a.ctx);
	proto_buf_init(&a.out);
	lim.threads = 3;
	b.ctx = proto_ctx_new(&lim);
	b.s = proto_session_new(b.ctx);
	proto_buf_init(&b.out);
	one = strdup(h_raw(&a, line));
	two = strdup(h_raw(&b, line));
	assert_non_null(strstr(one, "\"traces\":[["));
	assert_string_equal(one, two);
	free(one);
	free(two);
	h_free(&a);
	h_free(&b);
}

static void test_synthetic_errors(void **state)
{
	harness *h = *state;
#define SY(p)                                                                  \
	REQ("seismic.synthetic", "{\"depth\":[0,10,20],\"vp\":2000,"           \
	                         "\"rho\":2.3" p "}")
#define WL ",\"wavelet\":{\"frequency\":30}"
	h_expect_invalid(h, SY(""), "wavelet");
	h_expect_invalid(h, SY(WL ",\"angle\":10"), "vs");
	h_expect_invalid(h, SY(WL ",\"method\":\"gray_lmr\""), "vs");
	h_expect_invalid(h, SY(WL ",\"vs\":1000,\"dts\":300"), "dts");
	h_expect_invalid(h, SY(WL ",\"vs\":1000,\"angle\":[10,90]"), "angle");
	h_expect_invalid(h,
	                 SY(WL ",\"vs\":1000,\"angle\":[10,85],\"stretch\":"
	                       "true"),
	                 "angle");
	h_expect_invalid(h, SY(WL ",\"twt\":[0,5,10],\"datum\":{\"twt\":3}"),
	                 "datum");
	h_expect_invalid(h, SY(WL ",\"twt\":[0,5,5]"), "twt");
	h_expect_invalid(h, SY(WL ",\"twt\":[0,5]"), "twt");
	h_expect_invalid(h, SY(",\"wavelet\":{\"frequency\":300}"),
	                 "wavelet.frequency");
	h_expect_invalid(h,
	                 SY(",\"wavelet\":{\"frequency\":30},\"axis\":{\"dt\":"
	                    "4}"
	                    ",\"convolution\":\"slow\""),
	                 "convolution");
	h_expect_invalid(h, SY(WL ",\"method\":\"aki_richards_ps\""), "method");
	h_expect_invalid(h, SY(WL ",\"axis\":{\"n\":0}"), "axis.n");
	/* the longest wavelet there is, but no room for its reach */
	h_expect_invalid(h,
	                 SY(",\"wavelet\":{\"frequency\":30,\"length\":"
	                    "32768}"),
	                 "wavelet.length");
	h_expect_invalid(h,
	                 SY(",\"vs\":1000,\"angle\":[0,60],\"stretch\":"
	                    "true,\"wavelet\":{\"frequency\":30,"
	                    "\"length\":20000}"),
	                 "wavelet.length");
	h_expect_invalid(h, SY(WL ",\"nulls\":\"zero\""), "nulls");
	h_expect_invalid(h,
	                 REQ("seismic.synthetic",
	                     "{\"depth\":[0],\"vp\":2000,\"rho\":2.3" WL "}"),
	                 "depth");
#undef SY
#undef WL
}

static void test_synthetic_limit(void **state)
{
	proto_limits lim;
	harness a;
	cJSON *r;

	(void)state;
	proto_limits_default(&lim);
	lim.max_work = 1000;
	a.ctx = proto_ctx_new(&lim);
	a.s = proto_session_new(a.ctx);
	proto_buf_init(&a.out);
	/* the work counts the wavelet: 3 angles x (3 + nt x 65) > 1000 */
	r = h_call(&a, REQ("seismic.synthetic",
	                   "{\"depth\":[0,10,20],\"vp\":2000,\"vs\":1000,"
	                   "\"rho\":2.3,\"angle\":[0,10,20],\"wavelet\":{"
	                   "\"frequency\":30}}"));
	assert_int_equal(h_code(r), -32001);
	cJSON_Delete(r);
	h_free(&a);
}

/* ---- seismic.avo_fit --------------------------------------------------- */

static void test_avo_fit_exact(void **state)
{
	harness *h = *state;
	char line[4096];
	size_t u = 0;
	const double A = 0.05, B = -0.21, C = 0.08, A2 = -0.03, B2 = 0.1;
	cJSON *r;

	/* an exact two-term gather returns its A and B (issue 13; the model
	 * of Shuey 1985) */
	u += (size_t)snprintf(line + u, sizeof line - u,
	                      "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                      "\"seismic.avo_fit\",\"params\":{\"angle\":[0,5,"
	                      "10,15,20,25,30,35],\"amplitude\":[");
	for (int k = 0; k < 8; k++) {
		double s2 = pow(sin(5.0 * k * PI / 180), 2);
		u += (size_t)snprintf(line + u, sizeof line - u,
		                      "%s[%.17g,%.17g]", k ? "," : "",
		                      A + B * s2, A2 + B2 * s2);
	}
	snprintf(line + u, sizeof line - u, "]}}");
	r = ok_call(h, line);
	near(num(r, "intercept", 0, -1), A, 1e-13);
	near(num(r, "gradient", 0, -1), B, 1e-12);
	near(num(r, "intercept", 1, -1), A2, 1e-13);
	near(num(r, "gradient", 1, -1), B2, 1e-12);
	/* 0-30 deg by default: 7 angles, residual ~ 0 */
	near(num(r, "n_used", 0, -1), 7, 0);
	assert_true(num(r, "sigma", 0, -1) < 1e-12);
	assert_true(num(r, "intercept_error", 0, -1) < 1e-12);
	assert_null(h_result(r, "curvature"));
	cJSON_Delete(r);
	/* three terms, 0-40 deg */
	u = 0;
	u += (size_t)snprintf(line + u, sizeof line - u,
	                      "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                      "\"seismic.avo_fit\",\"params\":{\"model\":"
	                      "\"shuey3\",\"angle_max\":40,\"angle\":[0,8,16,"
	                      "24,32,40],\"amplitude\":[");
	for (int k = 0; k < 6; k++) {
		double th = 8.0 * k * PI / 180, s2 = pow(sin(th), 2);
		u += (size_t)snprintf(line + u, sizeof line - u, "%s%.17g",
		                      k ? "," : "",
		                      A + B * s2 + C * (pow(tan(th), 2) - s2));
	}
	snprintf(line + u, sizeof line - u, "]}}");
	r = ok_call(h, line);
	near(num(r, "intercept", -1, -1), A, 1e-12);
	near(num(r, "gradient", -1, -1), B, 1e-10);
	near(num(r, "curvature", -1, -1), C, 1e-9);
	cJSON_Delete(r);
}

static void test_avo_fit_qc(void **state)
{
	harness *h = *state;
	cJSON *r = ok_call(
	    h, REQ("seismic.avo_fit",
	           "{\"angle\":[0,10,20,30],\"amplitude\":[[0.1,0.1,null],"
	           "[0.09,null,null],[0.07,null,null],[0.05,0.04,null]]}"));
	/* a null left out: input_missing; two angles for two terms: no
	 * degrees of freedom, no errors; all null: no fit */
	assert_int_equal(qc(r, "qc", 0, -1), 0);
	assert_true(qc(r, "qc", 1, -1) & B_MISSING);
	assert_true(qc(r, "qc", 1, -1) & B_FIT);
	assert_false(isnan(num(r, "intercept", 1, -1)));
	assert_true(isnan(num(r, "intercept_error", 1, -1)));
	assert_true(isnan(num(r, "intercept", 2, -1)));
	assert_true(qc(r, "qc", 2, -1) & B_FIT);
	cJSON_Delete(r);
}

static void test_avo_fit_errors(void **state)
{
	harness *h = *state;
#define AV(p) REQ("seismic.avo_fit", p)
	h_expect_invalid(h, AV("{\"angle\":[0,10]}"), "amplitude");
	h_expect_invalid(h, AV("{\"amplitude\":[1,2]}"), "angle");
	h_expect_invalid(h, AV("{\"angle\":[0,10,20],\"amplitude\":[1,2]}"),
	                 "amplitude");
	h_expect_invalid(h, AV("{\"angle\":[0,10],\"amplitude\":[[1,2],[1]]}"),
	                 "amplitude");
	h_expect_invalid(h, AV("{\"angle\":[0,10],\"amplitude\":[[1,2],3]}"),
	                 "amplitude");
	h_expect_invalid(h, AV("{\"angle\":[0,10],\"amplitude\":[1,\"x\"]}"),
	                 "amplitude");
	h_expect_invalid(h, AV("{\"angle\":[0,10],\"amplitude\":[]}"),
	                 "amplitude");
	h_expect_invalid(h, AV("{\"angle\":[0,90],\"amplitude\":[1,2]}"),
	                 "angle");
	h_expect_invalid(h, AV("{\"angle\":[0,40],\"amplitude\":[1,2]}"),
	                 "angle_max");
	h_expect_invalid(h,
	                 AV("{\"angle\":[0,10,40],\"amplitude\":[1,2,3],"
	                    "\"model\":\"shuey3\"}"),
	                 "angle_max");
	h_expect_invalid(h,
	                 AV("{\"angle\":[0,10],\"amplitude\":[1,2],"
	                    "\"angle_min\":20,\"angle_max\":10}"),
	                 "angle_min");
	h_expect_invalid(h,
	                 AV("{\"angle\":[0,10],\"amplitude\":[1,2],\"model\":"
	                    "\"shuey\"}"),
	                 "model");
#undef AV
}

int main(void)
{
	const struct CMUnitTest tests[] = {
#define T(f) cmocka_unit_test_setup_teardown(f, setup, teardown)
	    T(test_td_constant_velocity),
	    T(test_td_checkshots),
	    T(test_td_resample),
	    T(test_td_errors),
	    T(test_wavelet_ricker),
	    T(test_wavelet_others),
	    T(test_wavelet_errors),
	    T(test_upscale_backus),
	    T(test_upscale_block),
	    T(test_upscale_errors),
	    T(test_synthetic_spike),
	    T(test_synthetic_gather),
	    T(test_synthetic_nulls),
	    cmocka_unit_test(test_synthetic_threads),
	    T(test_synthetic_errors),
	    cmocka_unit_test(test_synthetic_limit),
	    T(test_avo_fit_exact),
	    T(test_avo_fit_qc),
	    T(test_avo_fit_errors),
#undef T
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
