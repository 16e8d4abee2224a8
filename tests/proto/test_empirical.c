/* rock.empirical through the protocol: each relation against values worked
 * by hand from the published equations (sources beside each check),
 * broadcasting, units, QC flags and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"rock.empirical\","         \
	"\"params\":" params "}"

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

static void test_gardner(void **state)
{
	(void)state;
	/* Gardner et al. 1974: rho = 0.31 vp^0.25 (g/cm3, m/s); at 3000
	 * m/s 0.31 * 3000^0.25 = 2.294 g/cm3 (the familiar "about 2.29"). */
	cJSON *r = h_call(&H, REQ("{\"relation\":\"gardner\","
	                          "\"vp\":[3000,2000,null,-5]}"));
	h_close_to(h_num(r, "rho", 0), 0.31 * pow(3000, 0.25), 1e-12);
	h_close_to(h_num(r, "rho", 0), 2.294, 1e-3);
	h_close_to(h_num(r, "rho", 1), 0.31 * pow(2000, 0.25), 1e-12);
	assert_true(isnan(h_num(r, "rho", 2)));
	assert_true(isnan(h_num(r, "rho", 3)));
	/* a null sample is missing (bit 28), a negative one impossible */
	assert_int_equal((int)h_num(r, "qc", 2), 1 << 28);
	assert_int_equal((int)h_num(r, "qc", 3), 1); /* input_invalid */
	assert_int_equal((int)h_num(r, "qc", 0), 0);
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(h_result(r, "units"), "rho")
	        ->valuestring,
	    "g/cm3");
	cJSON_Delete(r);
	/* From slowness, in ft/s units, with the published ft/s form
	 * rho = 0.23 V^0.25 (Gardner et al. 1974) as a units cross-check:
	 * 0.31 (m/s)^0.25 and 0.23 (ft/s)^0.25 agree to 0.1 %. */
	r = h_call(&H, REQ("{\"relation\":\"gardner\",\"dtp\":101.6}"));
	h_close_to(h_num(r, "rho", 0), 0.23 * pow(1e6 / 101.6, 0.25), 2e-3);
	cJSON_Delete(r);
	/* Overridden constants and the inverse. */
	r = h_call(&H, REQ("{\"relation\":\"gardner\",\"vp\":2500,"
	                   "\"gardner_a\":0.3,\"gardner_b\":0.26}"));
	h_close_to(h_num(r, "rho", 0), 0.3 * pow(2500, 0.26), 1e-12);
	cJSON_Delete(r);
	r = h_call(&H, REQ("{\"relation\":\"gardner_inverse\",\"rho\":2.294}"));
	h_close_to(h_num(r, "vp", 0), pow(2.294 / 0.31, 4), 1e-12);
	cJSON_Delete(r);
	/* Outside the fitted velocity span: computed and flagged. */
	r = h_call(&H, REQ("{\"relation\":\"gardner\",\"vp\":7000}"));
	assert_true(h_num(r, "rho", 0) > 0);
	assert_int_equal((int)h_num(r, "qc", 0), 1 << 29);
	cJSON_Delete(r);
}

static void test_mudrock(void **state)
{
	(void)state;
	/* Castagna et al. 1985: vp = 1.16 vs + 1.36 km/s. */
	cJSON *r = h_call(&H, REQ("{\"relation\":\"mudrock_vs\","
	                          "\"vp\":[3000,1300]}"));
	h_close_to(h_num(r, "vs", 0), (3000 - 1360) / 1.16, 1e-12);
	assert_true(isnan(h_num(r, "vs", 1))); /* vs would be negative */
	cJSON_Delete(r);
	r = h_call(&H, REQ("{\"relation\":\"mudrock_vp\",\"vs\":1.5,"
	                   "\"units\":{\"velocity\":\"km/s\"}}"));
	h_close_to(h_num(r, "vp", 0), 1.16 * 1.5 + 1.36, 1e-12);
	cJSON_Delete(r);
}

static void test_greenberg_castagna(void **state)
{
	(void)state;
	/* Greenberg & Castagna 1992 pure-lithology fits (vs, vp in km/s;
	 * coefficients as quoted in Mavko et al. 2009 sec. 7.9, from
	 * memory), one point per lithology at vp = 3 km/s. */
	static const struct {
		const char *lith;
		double vs;
	} pts[] = {
	    {"sandstone", 0.80416 * 3 - 0.85588},
	    {"limestone", -0.05508 * 9 + 1.01677 * 3 - 1.03049},
	    {"dolomite", 0.58321 * 3 - 0.07775},
	    {"shale", 0.76969 * 3 - 0.86735},
	};
	char line[256];
	for (size_t i = 0; i < sizeof pts / sizeof pts[0]; i++) {
		snprintf(line, sizeof line,
		         REQ("{\"relation\":\"greenberg_castagna\","
		             "\"vp\":3000,\"lithology\":\"%s\"}"),
		         pts[i].lith);
		cJSON *r = h_call(&H, line);
		h_close_to(h_num(r, "vs", 0), 1000 * pts[i].vs, 1e-9);
		cJSON_Delete(r);
	}
	/* Mixed lithology: mean of the arithmetic and harmonic averages
	 * (Greenberg & Castagna 1992). */
	double a = pts[0].vs, b = pts[3].vs;
	double want = 0.5 * (0.6 * a + 0.4 * b + 1 / (0.6 / a + 0.4 / b));
	cJSON *r = h_call(&H, REQ("{\"relation\":\"greenberg_castagna\","
	                          "\"vp\":3000,\"lithology\":{\"sandstone\":"
	                          "0.6,\"shale\":0.4}}"));
	h_close_to(h_num(r, "vs", 0), 1000 * want, 1e-9);
	cJSON_Delete(r);
}

static void test_han(void **state)
{
	(void)state;
	/* Han et al. 1986 at 40 MPa: vp = 5.59 - 6.93 phi - 2.18 C,
	 * vs = 3.52 - 4.91 phi - 1.89 C (km/s; from memory). */
	cJSON *r = h_call(&H, REQ("{\"relation\":\"han\",\"porosity\":0.2,"
	                          "\"clay\":[0.1,0.6]}"));
	h_close_to(h_num(r, "vp", 0), 1000 * (5.59 - 6.93 * 0.2 - 2.18 * 0.1),
	           1e-12);
	h_close_to(h_num(r, "vs", 0), 1000 * (3.52 - 4.91 * 0.2 - 1.89 * 0.1),
	           1e-12);
	assert_int_equal((int)h_num(r, "qc", 1), 1 << 29); /* clay > 0.5 */
	cJSON_Delete(r);
	h_expect_invalid(
	    &H,
	    REQ("{\"relation\":\"han\",\"porosity\":0.2,\"clay\":0,"
	        "\"effective_pressure\":15}"),
	    "effective_pressure");
}

static void test_wyllie_raymer(void **state)
{
	(void)state;
	/* Wyllie et al. 1956 time average with the handbook sandstone
	 * matrix 55.5 us/ft and mud-filtrate 189 us/ft (common practice,
	 * from memory): phi 0.2 gives dt = 0.2*189 + 0.8*55.5 = 82.2 us/ft,
	 * i.e. 1e6/82.2 ft/s. Given in ft/s to exercise units. */
	cJSON *r = h_call(&H, REQ("{\"relation\":\"wyllie\",\"porosity\":0.2,"
	                          "\"v_matrix\":18018.018018018,"
	                          "\"v_fluid\":5291.005291005,"
	                          "\"units\":{\"velocity\":\"ft/s\"}}"));
	h_close_to(h_num(r, "vp", 0), 1e6 / 82.2, 1e-9);
	cJSON_Delete(r);
	/* Porosity back from the slowness: (82.2 - 55.5) / (189 - 55.5). */
	r = h_call(&H, REQ("{\"relation\":\"wyllie_porosity\",\"dtp\":82.2,"
	                   "\"v_matrix\":5491.89189189,"
	                   "\"v_fluid\":1612.6984127}"));
	h_close_to(h_num(r, "porosity", 0), 0.2, 1e-6);
	cJSON_Delete(r);
	/* Raymer et al. 1980: v = (1 - phi)^2 v_ma + phi v_fl. */
	r = h_call(&H, REQ("{\"relation\":\"raymer\",\"porosity\":[0.2,0.4],"
	                   "\"v_matrix\":5480,\"v_fluid\":1500}"));
	h_close_to(h_num(r, "vp", 0), 0.64 * 5480 + 0.2 * 1500, 1e-12);
	assert_int_equal((int)h_num(r, "qc", 1), 1 << 29); /* phi >= 0.37 */
	cJSON_Delete(r);
	r = h_call(&H, REQ("{\"relation\":\"raymer_porosity\",\"vp\":3807.2,"
	                   "\"v_matrix\":5480,\"v_fluid\":1500}"));
	h_close_to(h_num(r, "porosity", 0), 0.2, 1e-9);
	cJSON_Delete(r);
}

static void test_errors(void **state)
{
	(void)state;
	h_expect_invalid(&H, REQ("{\"vp\":3000}"), "relation");
	h_expect_invalid(&H, REQ("{\"relation\":\"lindseth\",\"vp\":3000}"),
	                 "relation");
	h_expect_invalid(&H, REQ("{\"relation\":\"gardner\"}"), "vp");
	h_expect_invalid(
	    &H, REQ("{\"relation\":\"gardner\",\"vp\":1,\"dtp\":1}"), "dtp");
	h_expect_invalid(
	    &H, REQ("{\"relation\":\"gardner\",\"vp\":3000,\"rho\":2}"), "rho");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"gardner\",\"vp\":3000,"
	                     "\"gardner_a\":-1}"),
	                 "gardner_a");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"gardner\",\"vp\":3000,"
	                     "\"gardner_b\":0}"),
	                 "gardner_b");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"mudrock_vs\",\"vp\":3000,"
	                     "\"lithology\":\"shale\"}"),
	                 "lithology");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"greenberg_castagna\",\"vp\":3000,"
	                     "\"lithology\":\"granite\"}"),
	                 "lithology");
	h_expect_invalid(
	    &H,
	    REQ("{\"relation\":\"greenberg_castagna\",\"vp\":3000,"
	        "\"lithology\":{\"sandstone\":0.5,\"shale\":0.4}}"),
	    "lithology");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"greenberg_castagna\",\"vp\":3000,"
	                     "\"lithology\":{\"chalk\":1}}"),
	                 "lithology.chalk");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"greenberg_castagna\",\"vp\":3000,"
	                     "\"lithology\":{\"shale\":2}}"),
	                 "lithology.shale");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"wyllie\",\"porosity\":0.2,"
	                     "\"v_matrix\":5000}"),
	                 "v_fluid");
	h_expect_invalid(&H,
	                 REQ("{\"relation\":\"han\",\"porosity\":[0.1,0.2],"
	                     "\"clay\":[0,0,0]}"),
	                 "clay");
	h_expect_invalid(
	    &H, REQ("{\"relation\":\"gardner\",\"vp\":3000,\"x\":1}"), "x");
	h_expect_invalid(&H, REQ("{\"relation\":\"gardner\",\"vp\":\"fast\"}"),
	                 "vp");
}

int main(void)
{
	gsl_set_error_handler_off();
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_gardner),
	    cmocka_unit_test(test_mudrock),
	    cmocka_unit_test(test_greenberg_castagna),
	    cmocka_unit_test(test_han),
	    cmocka_unit_test(test_wyllie_raymer),
	    cmocka_unit_test(test_errors),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
