/* Session defaults across families: a default a request does not use is
 * let pass when it is inherited (sessions hold defaults for several kinds
 * of request), while the same parameter given in the request is refused
 * with -32602 rather than silently ignored. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>

#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(method, params)                                                    \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"" method                   \
	"\",\"params\":" params "}"

#define LOGS "\"vp\":3000,\"vs\":1500,\"rhob\":2.3"

static int code_of(harness *h, const char *line, char *param, size_t size)
{
	cJSON *r = h_call(h, line);
	int code;
	if (!r)
		fail_msg("no response to %s", line);
	code = h_code(r);
	snprintf(param, size, "%s", h_param(r));
	cJSON_Delete(r);
	return code;
}

static void test_log_unused_defaults(void **state)
{
	harness h;
	char param[64];
	(void)state;

	h_init(&h);
	/* explicit but unused: refused, naming the parameter */
	assert_int_equal(
	    code_of(&h, REQ("log.process", "{" LOGS ",\"pressure\":25}"), param,
	            sizeof param),
	    -32602);
	assert_string_equal(param, "pressure");
	assert_int_equal(
	    code_of(&h, REQ("log.process", "{" LOGS ",\"mineral\":\"quartz\"}"),
	            param, sizeof param),
	    -32602);
	assert_string_equal(param, "mineral");
	/* the same as session defaults: a plain log request still works */
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"pressure\":25,\"temperature\":80,"
	                               "\"mineral\":\"quartz\"}"),
	            param, sizeof param),
	    0);
	assert_int_equal(
	    code_of(&h, REQ("log.process", "{" LOGS "}"), param, sizeof param),
	    0);
	/* and a substitution request uses them */
	assert_int_equal(
	    code_of(&h,
	            REQ("log.process",
	                "{" LOGS ",\"porosity\":0.25,\"fluid_in_place\":{"
	                "\"brine\":{\"salinity\":50000}},\"fluid_new\":{"
	                "\"gas\":{\"gravity\":0.65}}}"),
	            param, sizeof param),
	    0);
	h_free(&h);
}

static void test_fluid_brie_default(void **state)
{
	harness h;
	char param[64];
	(void)state;

	h_init(&h);
	assert_int_equal(
	    code_of(&h,
	            REQ("fluid.properties",
	                "{\"pressure\":25,\"temperature\":80,\"brine\":{"
	                "\"salinity\":50000},\"brie_exponent\":3}"),
	            param, sizeof param),
	    -32602);
	assert_string_equal(param, "brie_exponent");
	assert_int_equal(code_of(&h,
	                         REQ("session.set", "{\"brie_exponent\":3}"),
	                         param, sizeof param),
	                 0);
	assert_int_equal(
	    code_of(&h,
	            REQ("fluid.properties",
	                "{\"pressure\":25,\"temperature\":80,\"brine\":{"
	                "\"salinity\":50000}}"),
	            param, sizeof param),
	    0);
	h_free(&h);
}

/* Defaults are quantities: a number is kept in internal units, so a later
 * change of units (in the session or a request) changes how it is shown,
 * never what it means: 2.5 g/cm3 is 2500 kg/m3. */
static void test_units_and_defaults(void **state)
{
	harness h;
	char param[64];
	cJSON *r;
	(void)state;

	h_init(&h);
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"rho\":2.5,\"lithology\":"
	                               "\"shale\"}"),
	            param, sizeof param),
	    0);
	r = h_call(&h, REQ("elastic.convert",
	                   "{\"vp\":3,\"vs\":1.5,\"units\":{\"velocity\":"
	                   "\"km/s\"}}"));
	assert_int_equal(h_code(r), 0);
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2.5) < 1e-12);
	cJSON_Delete(r);
	/* the request's units show the same density in kg/m3 */
	r = h_call(&h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500,"
	                                      "\"units\":{\"density\":"
	                                      "\"kg/m3\"}}"));
	assert_int_equal(h_code(r), 0);
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2500) < 1e-9);
	cJSON_Delete(r);
	/* so does a change of the session's units */
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"units\":{\"density\":\"kg/m3\"}}"),
	            param, sizeof param),
	    0);
	r = h_call(&h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500}"));
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2500) < 1e-9);
	cJSON_Delete(r);
	h_free(&h);
}

/* A name that means different things in different methods cannot be a
 * plain session default: `k` is a bulk modulus in elastic.convert and the
 * dimensionless (vs/vp)^2 of reflect.impedance. Set for one method, it
 * never reaches the other. */
static void test_defaults_by_meaning(void **state)
{
	harness h;
	char param[64];
	cJSON *r;
	(void)state;

	h_init(&h);
	r = h_call(&h, REQ("session.set", "{\"k\":0.3}"));
	assert_int_equal(h_code(r), -32602);
	assert_string_equal(h_param(r), "k");
	assert_non_null(strstr(
	    cJSON_GetObjectItem(
	        cJSON_GetObjectItem(cJSON_GetObjectItem(r, "error"), "data"),
	        "reason")
	        ->valuestring,
	    "reflect.impedance"));
	cJSON_Delete(r);
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"reflect.impedance\":{\"k\":0.3}}"),
	            param, sizeof param),
	    0);
	/* elastic.convert with one quantity: k is not inherited */
	assert_int_equal(
	    code_of(&h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":3000}"),
	            param, sizeof param),
	    -32602);
	r = h_call(&h, REQ("reflect.impedance",
	                   "{\"vp\":[3000,3200],\"vs\":[1500,1600],\"rho\":"
	                   "2.3,\"angle\":20}"));
	assert_int_equal(h_code(r), 0);
	assert_true(fabs(h_result(r, "k")->valuedouble - 0.3) < 1e-15);
	cJSON_Delete(r);
	/* a bad scope after good defaults: refused naming it, nothing of the
	 * request kept (and, under the sanitizers, nothing leaked) */
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"rho\":[2.4,2.5],\"nu\":0.25,"
	                               "\"qidc.x\":{}}"),
	            param, sizeof param),
	    -32602);
	assert_string_equal(param, "qidc.x");
	assert_int_equal(
	    code_of(
	        &h,
	        REQ("session.set", "{\"rho\":[2.4,2.5],\"elastic.convert\":3}"),
	        param, sizeof param),
	    -32602);
	assert_string_equal(param, "elastic.convert");
	r = h_call(&h, REQ("session.get", "{}"));
	assert_null(cJSON_GetObjectItem(h_result(r, "defaults"), "rho"));
	cJSON_Delete(r);
	/* a value no method takes, and a string only impedance takes */
	assert_int_equal(
	    code_of(&h, REQ("session.set", "{\"kk\":1}"), param, sizeof param),
	    -32602);
	assert_int_equal(code_of(&h, REQ("session.set", "{\"k\":\"sample\"}"),
	                         param, sizeof param),
	                 0);
	r = h_call(&h, REQ("reflect.impedance",
	                   "{\"vp\":[3000,3200],\"vs\":[1500,1600],\"rho\":"
	                   "2.3,\"angle\":20}"));
	/* the per-method default wins over the plain one */
	assert_true(fabs(h_result(r, "k")->valuedouble - 0.3) < 1e-15);
	cJSON_Delete(r);
	assert_int_equal(
	    code_of(&h, REQ("session.reset", "{}"), param, sizeof param), 0);
	assert_int_equal(code_of(&h, REQ("session.set", "{\"k\":\"sample\"}"),
	                         param, sizeof param),
	                 0);
	r = h_call(&h, REQ("reflect.impedance",
	                   "{\"vp\":[3000,3200],\"vs\":[1500,1600],\"rho\":"
	                   "2.3,\"angle\":20}"));
	assert_string_equal(h_result(r, "k")->valuestring, "sample");
	cJSON_Delete(r);
	h_free(&h);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_log_unused_defaults),
	    cmocka_unit_test(test_fluid_brie_default),
	    cmocka_unit_test(test_units_and_defaults),
	    cmocka_unit_test(test_defaults_by_meaning),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
