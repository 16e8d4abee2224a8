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

/* Inherited values keep the units they were set in: only a change that
 * would reinterpret one of them is refused. */
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
	/* velocity in km/s does not touch a density or a string default */
	r = h_call(&h, REQ("elastic.convert",
	                   "{\"vp\":3,\"vs\":1.5,\"units\":{\"velocity\":"
	                   "\"km/s\"}}"));
	assert_int_equal(h_code(r), 0);
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2.5) < 1e-12);
	cJSON_Delete(r);
	/* density in kg/m3 would read 2.5 as 2.5 kg/m3: refused */
	assert_int_equal(
	    code_of(&h,
	            REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500,\"units\":"
	                                   "{\"density\":\"kg/m3\"}}"),
	            param, sizeof param),
	    -32602);
	assert_string_equal(param, "units");
	/* the same change in the session: refused, unless rho is set again
	 * in the same call */
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"units\":{\"density\":\"kg/m3\"}}"),
	            param, sizeof param),
	    -32602);
	assert_string_equal(param, "units");
	assert_int_equal(
	    code_of(&h,
	            REQ("session.set", "{\"units\":{\"density\":\"kg/m3\"},"
	                               "\"rho\":2500}"),
	            param, sizeof param),
	    0);
	r = h_call(&h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500}"));
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2500) < 1e-9);
	cJSON_Delete(r);
	h_free(&h);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_log_unused_defaults),
	    cmocka_unit_test(test_fluid_brie_default),
	    cmocka_unit_test(test_units_and_defaults),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
