/* log.process through the protocol: the elastic set from slowness and
 * density against the textbook identities, each QC flag with its
 * threshold, predicted shear and density (flagged, never silent), the
 * Gassmann-substituted curves against a hand calculation, session
 * defaults and overrides, and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "proto/harness.h"
#include "rockwire/empirical.h"
#include "rockwire/rock.h"

#define REQ(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"log.process\","            \
	"\"params\":" params "}"

#define B_INVALID   (1u << 0)
#define B_NU_NEG    (1u << 4)
#define B_DRHO      (1u << 24)
#define B_WASHOUT   (1u << 25)
#define B_VS_PRED   (1u << 26)
#define B_RHO_PRED  (1u << 27)
#define B_MISSING   (1u << 28)
#define B_EMP_RANGE (1u << 29)
#define B_SUB_FAIL  (1u << 30)

static harness H;

static int setup(void **state)
{
	(void)state;
	h_init(&H);
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	h_free(&H);
	return 0;
}

/* QC flags are 64-bit (bits 0-52, exact in a double). */
static uint64_t qc(const cJSON *r, int i)
{
	return (uint64_t)h_num(r, "qc", i);
}

static void test_elastic_set(void **state)
{
	(void)state;
	/* dtp 100 us/ft is vp = 0.3048 m / 100 us = 3048 m/s; dts 180 us/ft
	 * is 1693.33 m/s (1 ft = 0.3048 m exactly). Moduli from the
	 * isotropic identities mu = rho vs^2, K = rho vp^2 - 4/3 mu,
	 * nu = (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2)) (Mavko et al. 2009,
	 * sec. 2.2). */
	cJSON *r = h_call(&H, REQ("{\"depth\":[1500,1500.5],"
	                          "\"dtp\":[100,90],\"dts\":[180,170],"
	                          "\"rhob\":[2.3,2.4]}"));
	double vp = 3048, vs = 0.3048e6 / 180, rho = 2300;
	double mu = rho * vs * vs, k = rho * vp * vp - 4.0 / 3 * mu;
	h_close_to(h_num(r, "vp", 0), vp, 1e-12);
	h_close_to(h_num(r, "vs", 0), vs, 1e-12);
	h_close_to(h_num(r, "rho", 0), 2.3, 1e-12);
	h_close_to(h_num(r, "mu", 0), mu / 1e9, 1e-12);
	h_close_to(h_num(r, "k", 0), k / 1e9, 1e-12);
	h_close_to(h_num(r, "nu", 0),
	           (vp * vp - 2 * vs * vs) / (2 * (vp * vp - vs * vs)), 1e-12);
	h_close_to(h_num(r, "ai", 0), vp * 2.3, 1e-12);
	h_close_to(h_num(r, "si", 0), vs * 2.3, 1e-12);
	h_close_to(h_num(r, "vpvs", 0), 1.8, 1e-12);
	h_close_to(h_num(r, "depth", 1), 1500.5, 1e-15);
	assert_int_equal(qc(r, 0), 0);
	assert_int_equal(qc(r, 1), 0);
	assert_true(cJSON_IsNull(h_result(r, "vs_predicted_by")));
	assert_true(cJSON_IsNull(h_result(r, "substitution")));
	const cJSON *u = h_result(r, "units");
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(u, "ai")->valuestring,
	    "m/s*g/cm3");
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(u, "depth")->valuestring, "m");
	cJSON_Delete(r);
}

static void test_qc_flags(void **state)
{
	(void)state;
	/* Sample 0 clean; 1 |drho| 0.06 > 0.05 g/cm3; 2 drho 0.04 clean;
	 * 3 caliper 0.03 m over bit size (> 1 in = 0.0254 m); 4 0.02 m over
	 * (clean); 5 vp/vs 1.3 < sqrt(2): nu < 0 (implausible, computed);
	 * 6 null dtp (missing, outputs null); 7 vp/vs < 2/sqrt(3): K < 0,
	 * impossible. */
	cJSON *r = h_call(
	    &H,
	    REQ("{\"dtp\":[100,100,100,100,100,100,null,100],"
	        "\"dts\":[180,180,180,180,180,130,180,110],"
	        "\"rhob\":2.3,\"drho\":[0,0.06,-0.04,0,0,0,0,0],"
	        "\"caliper\":[0.216,0.216,0.216,0.246,0.236,0.216,0.216,0.216],"
	        "\"bit_size\":0.216}"));
	assert_int_equal(qc(r, 0), 0);
	assert_int_equal(qc(r, 1), B_DRHO);
	assert_int_equal(qc(r, 2), 0);
	assert_int_equal(qc(r, 3), B_WASHOUT);
	assert_int_equal(qc(r, 4), 0);
	assert_int_equal(qc(r, 5), B_NU_NEG);
	assert_true(h_num(r, "nu", 5) < 0);
	/* a null curve: missing only, not also invalid */
	assert_int_equal(qc(r, 6), B_MISSING);
	assert_true(isnan(h_num(r, "k", 6)));
	assert_true(isnan(h_num(r, "vp", 6)));
	assert_true(qc(r, 7) & (1u << 3)); /* modulus_negative */
	assert_true(isnan(h_num(r, "k", 7)));
	/* The measured density is kept when it is doubtful. */
	h_close_to(h_num(r, "rho", 1), 2.3, 1e-12);
	cJSON_Delete(r);
	/* Non-positive slowness or density: impossible, null, nothing
	 * predicted over it (mudrock asked). */
	r = h_call(&H,
	           REQ("{\"dtp\":[100,100,-5],\"dts\":[-1,180,180],"
	               "\"rhob\":[2.3,-2,2.3],\"vs_predict\":\"mudrock\"}"));
	assert_int_equal(qc(r, 0), B_INVALID);
	assert_true(isnan(h_num(r, "vs", 0)));
	assert_int_equal(qc(r, 1), B_INVALID | (1u << 1));
	assert_true(isnan(h_num(r, "rho", 1)));
	assert_int_equal(qc(r, 2), B_INVALID);
	assert_true(isnan(h_num(r, "vp", 2)));
	cJSON_Delete(r);
	/* Thresholds are parameters (in the request's units). */
	r = h_call(&H, REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                   "\"drho\":0.06,\"drho_limit\":0.1,"
	                   "\"caliper\":0.8,\"bit_size\":0.7,"
	                   "\"washout_limit\":0.05,"
	                   "\"units\":{\"length\":\"ft\"}}"));
	/* 0.7 ft is an 8.4 in bit; 0.8 ft of hole is 14 % over gauge. */
	assert_int_equal(qc(r, 0), B_WASHOUT);
	cJSON_Delete(r);
	/* Plausibility ranges through qc. */
	r = h_call(&H, REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                   "\"qc\":{\"vp_max\":3000}}"));
	assert_int_equal(qc(r, 0), 1u << 6);
	cJSON_Delete(r);
}

static void test_predicted(void **state)
{
	(void)state;
	/* Missing shear by Greenberg & Castagna 1992 (sandstone:
	 * vs = 0.80416 vp - 0.85588 km/s, from memory) and by the mudrock
	 * line (Castagna et al. 1985); missing density by Gardner et al.
	 * 1974 (0.31 vp^0.25). Measured values stay measured. */
	cJSON *r = h_call(&H, REQ("{\"dtp\":[100,100],\"dts\":[null,180],"
	                          "\"rhob\":[null,2.3],"
	                          "\"vs_predict\":\"greenberg_castagna\","
	                          "\"rho_predict\":\"gardner\"}"));
	h_close_to(h_num(r, "vs", 0), 1000 * (0.80416 * 3.048 - 0.85588), 1e-9);
	h_close_to(h_num(r, "rho", 0), 0.31 * pow(3048, 0.25), 1e-12);
	assert_int_equal(qc(r, 0), B_VS_PRED | B_RHO_PRED | B_MISSING);
	h_close_to(h_num(r, "vs", 1), 0.3048e6 / 180, 1e-12);
	assert_int_equal(qc(r, 1), 0);
	assert_string_equal(h_result(r, "vs_predicted_by")->valuestring,
	                    "greenberg_castagna");
	assert_string_equal(h_result(r, "rho_predicted_by")->valuestring,
	                    "gardner");
	cJSON_Delete(r);
	r = h_call(&H, REQ("{\"vp\":3000,\"rhob\":2.3,"
	                   "\"vs_predict\":\"mudrock\"}"));
	h_close_to(h_num(r, "vs", 0), (3000 - 1360) / 1.16, 1e-12);
	assert_int_equal(qc(r, 0), B_VS_PRED);
	cJSON_Delete(r);
	/* With vsh the shale fraction comes from the log: vsh 0.4 over a
	 * sandstone matrix is GC mixed 0.6 sandstone / 0.4 shale. */
	double a = 0.80416 * 3 - 0.85588, b = 0.76969 * 3 - 0.86735;
	double want = 0.5 * (0.6 * a + 0.4 * b + 1 / (0.6 / a + 0.4 / b));
	r = h_call(&H, REQ("{\"vp\":3000,\"rhob\":2.3,\"vsh\":0.4,"
	                   "\"vs_predict\":\"greenberg_castagna\"}"));
	h_close_to(h_num(r, "vs", 0), 1000 * want, 1e-9);
	h_close_to(h_num(r, "vsh", 0), 0.4, 1e-15);
	cJSON_Delete(r);
	/* Gamma ray: linear index (60 - 20) / (120 - 20) = 0.4 gives the
	 * same. */
	r = h_call(&H, REQ("{\"vp\":3000,\"rhob\":2.3,\"gr\":60,"
	                   "\"gr_clean\":20,\"gr_shale\":120,"
	                   "\"vs_predict\":\"greenberg_castagna\"}"));
	h_close_to(h_num(r, "vs", 0), 1000 * want, 1e-9);
	cJSON_Delete(r);
	/* Doubtful density replaced only when asked. */
	r = h_call(&H, REQ("{\"vp\":3000,\"vs\":1600,\"rhob\":2.0,"
	                   "\"drho\":0.2,\"rho_predict\":\"gardner\","
	                   "\"rho_replace_bad\":true}"));
	h_close_to(h_num(r, "rho", 0), 0.31 * pow(3000, 0.25), 1e-12);
	assert_int_equal(qc(r, 0), B_DRHO | B_RHO_PRED);
	cJSON_Delete(r);
	/* Prediction outside the fitted span is flagged. */
	r = h_call(&H, REQ("{\"vp\":7200,\"rhob\":2.8,"
	                   "\"vs_predict\":\"greenberg_castagna\","
	                   "\"lithology\":\"dolomite\"}"));
	assert_true(qc(r, 0) & B_EMP_RANGE);
	cJSON_Delete(r);
}

/* Gassmann 1951 substitution worked by hand (Mavko et al. 2009,
 * sec. 6.3): K_dry from K_sat and the old fluid, K_sat2 from K_dry and
 * the new fluid, mu unchanged, rho2 = rho + phi (rho_fl2 - rho_fl1). */
static void gassmann_hand(double vp, double vs, double rho, double phi,
                          double km, double kf1, double rf1, double kf2,
                          double rf2, double *vp2, double *vs2, double *rho2)
{
	double mu = rho * vs * vs, k1 = rho * vp * vp - 4.0 / 3 * mu;
	double kd = (k1 * (phi * km / kf1 + 1 - phi) - km) /
	            (phi * km / kf1 + k1 / km - 1 - phi);
	double x = 1 - kd / km;
	double k2 = kd + x * x / (phi / kf2 + (1 - phi) / km - kd / (km * km));
	*rho2 = rho + phi * (rf2 - rf1);
	*vp2 = sqrt((k2 + 4.0 / 3 * mu) / *rho2);
	*vs2 = sqrt(mu / *rho2);
}

/* Greenberg & Castagna's procedure in a hydrocarbon zone through the
 * protocol: a gas sand made by Gassmann (the core's) from a brine sand
 * that obeys the brine-case relation gives back its own shear velocity;
 * the brine-case relation applied directly would not. */
static void test_predicted_insitu(void **state)
{
	const double frac[RW_EMP_NLITH] = {[RW_EMP_SANDSTONE] = 1.0};
	double vs_b, vs_direct;
	rw_rock_subst g;
	char line[1024];
	cJSON *r;

	(void)state;
	assert_int_equal(rw_emp_gc_vs_mixed(3200, frac, &vs_b, NULL), RW_OK);
	assert_int_equal(rw_rock_fluid_subst(3200, vs_b, 2280, 0.25, 36.6e9,
	                                     2.8e9, 1030, 0.06e9, 180, &g,
	                                     NULL),
	                 RW_OK);
	snprintf(line, sizeof line,
	         REQ("{\"vp\":%.17g,\"vs\":null,\"rhob\":%.17g,"
	             "\"vs_predict\":\"greenberg_castagna_insitu\","
	             "\"porosity\":0.25,\"mineral\":\"quartz\","
	             "\"fluid_in_place\":{\"k\":0.06,\"rho\":0.18},"
	             "\"brine\":{\"k\":2.8,\"rho\":1.03}}"),
	         g.vp_ms, g.rho_kgm3 / 1000);
	r = h_call(&H, line);
	assert_int_equal(h_code(r), 0);
	h_close_to(h_num(r, "vs", 0), g.vs_ms, 1e-7);
	assert_true(qc(r, 0) & B_VS_PRED);
	assert_string_equal(h_result(r, "vs_predicted_by")->valuestring,
	                    "greenberg_castagna_insitu");
	cJSON_Delete(r);
	assert_int_equal(rw_emp_gc_vs_mixed(g.vp_ms, frac, &vs_direct, NULL),
	                 RW_OK);
	assert_true(fabs(vs_direct - g.vs_ms) > 0.02 * g.vs_ms);
	/* without the fluid in place the procedure cannot run */
	h_expect_invalid(&H,
	                 REQ("{\"vp\":3000,\"rhob\":2.2,\"vs_predict\":"
	                     "\"greenberg_castagna_insitu\",\"porosity\":"
	                     "0.25,\"mineral\":\"quartz\"}"),
	                 "fluid_in_place");
}

static void test_substitution(void **state)
{
	(void)state;
	double vp2, vs2, rho2;
	/* Quartz K = 36.6 GPa (Mavko et al. 2009 table 7.1, from memory,
	 * as the mineral table); brine 2.8 GPa 1.05 g/cm3 to gas 0.05 GPa
	 * 0.2 g/cm3 (explicit). */
	cJSON *r =
	    h_call(&H, REQ("{\"vp\":[3200,null],\"vs\":1800,\"rhob\":2.25,"
	                   "\"porosity\":[0.25,0.25],\"mineral\":\"quartz\","
	                   "\"fluid_in_place\":{\"k\":2.8,\"rho\":1.05},"
	                   "\"fluid_new\":{\"k\":0.05,\"rho\":0.2}}"));
	gassmann_hand(3200, 1800, 2250, 0.25, 36.6e9, 2.8e9, 1050, 0.05e9, 200,
	              &vp2, &vs2, &rho2);
	h_close_to(h_num(r, "vp_sub", 0), vp2, 1e-9);
	h_close_to(h_num(r, "vs_sub", 0), vs2, 1e-9);
	h_close_to(h_num(r, "rho_sub", 0), rho2 / 1000, 1e-12);
	h_close_to(h_num(r, "vp", 0), 3200, 1e-15);
	assert_true(vp2 < 3200 && vs2 > 1800); /* gas: vp down, vs up */
	assert_string_equal(h_result(r, "substitution")->valuestring,
	                    "gassmann");
	assert_true(qc(r, 1) & B_SUB_FAIL);
	assert_true(isnan(h_num(r, "vp_sub", 1)));
	cJSON_Delete(r);
	/* The same fluid in and out changes nothing (Gassmann's relation
	 * inverted and applied again is the identity). */
	r = h_call(&H, REQ("{\"vp\":3200,\"vs\":1800,\"rhob\":2.25,"
	                   "\"porosity\":0.25,\"mineral\":{\"k\":36.6},"
	                   "\"fluid_in_place\":{\"k\":2.8,\"rho\":1.05},"
	                   "\"fluid_new\":{\"k\":2.8,\"rho\":1.05}}"));
	h_close_to(h_num(r, "vp_sub", 0), 3200, 1e-12);
	h_close_to(h_num(r, "rho_sub", 0), 2.25, 1e-12);
	cJSON_Delete(r);
	/* Batzle-Wang fluids at p, T from gradients and depth: the
	 * substitution uses the fluids reported beside it. */
	r = h_call(&H, REQ("{\"depth\":2000,\"vp\":3200,\"vs\":1800,"
	                   "\"rhob\":2.25,\"porosity\":0.25,"
	                   "\"mineral\":\"quartz\","
	                   "\"fluid_in_place\":{\"brine\":{\"salinity\":"
	                   "60000}},\"fluid_new\":{\"gas\":{\"gravity\":0.65}},"
	                   "\"pressure_gradient\":0.0105,"
	                   "\"temperature_gradient\":30,"
	                   "\"surface_temperature\":15}"));
	double kf1 = h_num(r, "fluid_in_place_k", 0) * 1e9;
	double rf1 = h_num(r, "fluid_in_place_rho", 0) * 1e3;
	double kf2 = h_num(r, "fluid_new_k", 0) * 1e9;
	double rf2 = h_num(r, "fluid_new_rho", 0) * 1e3;
	/* Brine at ~21 MPa, 75 degC: about 2.5-3.2 GPa and 1.0-1.06 g/cm3
	 * (Batzle & Wang 1992 fig. 12-13 range, from memory). */
	assert_true(kf1 > 2.3e9 && kf1 < 3.3e9);
	assert_true(rf1 > 990 && rf1 < 1070);
	assert_true(kf2 > 0.01e9 && kf2 < 0.2e9);
	gassmann_hand(3200, 1800, 2250, 0.25, 36.6e9, kf1, rf1, kf2, rf2, &vp2,
	              &vs2, &rho2);
	h_close_to(h_num(r, "vp_sub", 0), vp2, 1e-6);
	cJSON_Delete(r);
}

static void test_session(void **state)
{
	(void)state;
	cJSON *r = h_call(&H, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                      "\"session.set\",\"params\":{\"vs_predict\":"
	                      "\"mudrock\",\"drho_limit\":0.1}}");
	assert_int_equal(h_code(r), 0);
	cJSON_Delete(r);
	/* Inherited: mudrock prediction, drho 0.06 below 0.1. */
	r = h_call(&H, REQ("{\"vp\":3000,\"rhob\":2.3,\"drho\":0.06}"));
	h_close_to(h_num(r, "vs", 0), (3000 - 1360) / 1.16, 1e-12);
	assert_int_equal(qc(r, 0), B_VS_PRED);
	cJSON_Delete(r);
	/* The request's own values override the session. */
	r = h_call(&H, REQ("{\"vp\":3000,\"rhob\":2.3,\"drho\":0.06,"
	                   "\"drho_limit\":0.05,"
	                   "\"vs_predict\":\"greenberg_castagna\"}"));
	h_close_to(h_num(r, "vs", 0), 1000 * (0.80416 * 3 - 0.85588), 1e-9);
	assert_int_equal(qc(r, 0), B_VS_PRED | B_DRHO);
	cJSON_Delete(r);
	r = h_call(&H, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	               "\"session.reset\"}");
	cJSON_Delete(r);
}

static void test_errors(void **state)
{
	(void)state;
	h_expect_invalid(&H, REQ("{\"dts\":180,\"rhob\":2.3}"), "dtp");
	h_expect_invalid(
	    &H, REQ("{\"vp\":3000,\"dtp\":100,\"dts\":180,\"rhob\":2.3}"),
	    "dtp");
	h_expect_invalid(
	    &H, REQ("{\"dtp\":100,\"vs\":1,\"dts\":180,\"rhob\":2.3}"), "dts");
	h_expect_invalid(&H, REQ("{\"dtp\":100,\"rhob\":2.3}"), "dts");
	h_expect_invalid(&H, REQ("{\"dtp\":100,\"dts\":180}"), "rhob");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":[100,90],\"dts\":[180,170,160],"
	                     "\"rhob\":2.3}"),
	                 "dts");
	/* A caliper without bit size: the washout check cannot run; the
	 * samples are answered with a warning that says so. */
	{
		cJSON *w = h_call(&H, REQ("{\"dtp\":100,\"dts\":180,"
		                          "\"rhob\":2.3,\"caliper\":0.3}"));
		const cJSON *wl = h_result(w, "warnings");
		assert_int_equal(h_code(w), 0);
		assert_true(cJSON_IsArray(wl) && cJSON_GetArraySize(wl) == 1);
		assert_non_null(strstr(cJSON_GetArrayItem(wl, 0)->valuestring,
		                       "washout check"));
		assert_int_equal(qc(w, 0), 0);
		cJSON_Delete(w);
	}
	h_expect_invalid(
	    &H, REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,\"gr\":50}"),
	    "gr_clean");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,\"gr\":50,"
	                     "\"vsh\":0.2}"),
	                 "gr");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"gr_clean\":20}"),
	                 "gr_clean");
	h_expect_invalid(
	    &H, REQ("{\"dtp\":100,\"rhob\":2.3,\"vs_predict\":\"magic\"}"),
	    "vs_predict");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rho_predict\":\"x\"}"),
	                 "rho_predict");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"rho_replace_bad\":true}"),
	                 "rho_replace_bad");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"gardner_a\":0.3}"),
	                 "gardner_a");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"drho_limit\":0}"),
	                 "drho_limit");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"washout_limit\":-1}"),
	                 "washout_limit");
	h_expect_invalid(
	    &H,
	    REQ("{\"dtp\":100,\"rhob\":2.3,\"vs_predict\":"
	        "\"greenberg_castagna\",\"lithology\":{\"sandstone\":"
	        "0.3}}"),
	    "lithology");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"rhob\":2.3,\"vsh\":0.3,"
	                     "\"vs_predict\":\"greenberg_castagna\","
	                     "\"lithology\":\"shale\"}"),
	                 "lithology");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"qc\":{\"vp_min\":5000,\"vp_max\":4000}}"),
	                 "qc");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"qc\":{\"k_max\":1}}"),
	                 "qc.k_max");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"mineral\":\"quartz\"}"),
	                 "mineral");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"porosity\":0.2,\"mineral\":\"quartz\","
	                     "\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	                 "fluid_in_place");
	h_expect_invalid(
	    &H,
	    REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	        "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":2,"
	        "\"rho\":1},\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	    "porosity");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"porosity\":0.2,\"fluid_in_place\":{\"k\":2,"
	                     "\"rho\":1},\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	                 "mineral");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"porosity\":0.2,\"mineral\":\"unobtainium\","
	                     "\"fluid_in_place\":{\"k\":2,\"rho\":1},"
	                     "\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	                 "mineral");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	                     "\"porosity\":0.2,\"mineral\":\"quartz\","
	                     "\"fluid_in_place\":{\"k\":2},"
	                     "\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	                 "fluid_in_place.rho");
	h_expect_invalid(
	    &H,
	    REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	        "\"porosity\":0.2,\"mineral\":\"quartz\","
	        "\"fluid_in_place\":{\"brine\":{\"salinity\":1000}},"
	        "\"fluid_new\":{\"k\":1,\"rho\":1},"
	        "\"temperature\":60}"),
	    "pressure");
	h_expect_invalid(
	    &H,
	    REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	        "\"porosity\":0.2,\"mineral\":\"quartz\","
	        "\"fluid_in_place\":{\"brine\":{\"salinity\":1000}},"
	        "\"fluid_new\":{\"k\":1,\"rho\":1},\"pressure\":20,"
	        "\"temperature_gradient\":30}"),
	    "surface_temperature");
	h_expect_invalid(
	    &H,
	    REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,"
	        "\"porosity\":0.2,\"mineral\":\"quartz\","
	        "\"fluid_in_place\":{\"brine\":{\"salinity\":1000}},"
	        "\"fluid_new\":{\"k\":1,\"rho\":1},"
	        "\"pressure_gradient\":0.01,\"temperature\":60}"),
	    "depth");
	h_expect_invalid(&H,
	                 REQ("{\"dtp\":[100,90],\"dts\":180,\"rhob\":2.3,"
	                     "\"porosity\":0.2,\"mineral\":\"quartz\","
	                     "\"fluid_in_place\":{\"k\":[2,2,2],\"rho\":1},"
	                     "\"fluid_new\":{\"k\":1,\"rho\":1}}"),
	                 "fluid_in_place.k");
	h_expect_invalid(
	    &H, REQ("{\"dtp\":100,\"dts\":180,\"rhob\":2.3,\"bogus\":1}"),
	    "bogus");
	h_expect_invalid(
	    &H, REQ("{\"dtp\":[100,\"x\"],\"dts\":180,\"rhob\":2.3}"), "dtp");
}

int main(void)
{
	gsl_set_error_handler_off();
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_elastic_set),
	    cmocka_unit_test(test_qc_flags),
	    cmocka_unit_test(test_predicted),
	    cmocka_unit_test(test_predicted_insitu),
	    cmocka_unit_test(test_substitution),
	    cmocka_unit_test(test_session),
	    cmocka_unit_test(test_errors),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
