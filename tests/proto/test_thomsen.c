/* Protocol tests of elastic.thomsen through rw_proto_handle: both
 * directions, broadcasting, units (GPa and Pa, km/s), QC flags and nulls,
 * and every -32602 path with the parameter it names. Physics checks use
 * Thomsen's definitions (Thomsen 1986, eqs. 8a-8c, 10) and the isotropic
 * limit, a fact of linear elasticity. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>

#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic.thomsen\","        \
	"\"params\":" params "}"

#define B_INPUT_INVALID (1u << 0)
#define B_RHO_NONPOS    (1u << 1)
#define B_NU_NEGATIVE   (1u << 4)
#define B_UNSTABLE      (1u << 22)

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
	if (!r || h_code(r) != 0)
		fail_msg("%s -> %s", line, h->out.data ? h->out.data : "");
	return r;
}

static void expect_error(harness *h, const char *line, const char *param)
{
	cJSON *r = h_call(h, line);
	if (!r || h_code(r) != -32602 || strcmp(h_param(r), param) != 0)
		fail_msg("%s: want -32602 on '%s', got %s", line, param,
		         h->out.data);
	cJSON_Delete(r);
}

static double num(const cJSON *r, const char *m, int i)
{
	const cJSON *v = h_result(r, m);
	if (i >= 0)
		v = cJSON_GetArrayItem(v, i);
	if (!cJSON_IsNumber(v))
		fail_msg("%s[%d] is not a number", m, i);
	return v->valuedouble;
}

static int is_null(const cJSON *r, const char *m, int i)
{
	return cJSON_IsNull(cJSON_GetArrayItem(h_result(r, m), i));
}

static void test_forward(void **state)
{
	harness *h = *state;
	/* c in GPa (default), rho in g/cm3 */
	cJSON *r = ok_call(h, REQ("{\"rho\":2.5,\"c11\":40,\"c13\":12,"
	                          "\"c33\":30,\"c44\":8,\"c66\":10}"));
	/* Thomsen 1986 eq. 8a, 8b, 10 and 8c (exact delta) */
	assert_true(fabs(num(r, "epsilon", -1) - (40.0 - 30) / 60) < 1e-14);
	assert_true(fabs(num(r, "gamma", -1) - (10.0 - 8) / 16) < 1e-14);
	assert_true(fabs(num(r, "delta", -1) -
	                 ((20.0 * 20) - 22.0 * 22) / (2 * 30.0 * 22)) < 1e-14);
	assert_true(fabs(num(r, "vp0", -1) - sqrt(30e9 / 2500)) < 1e-9);
	assert_true(fabs(num(r, "vs0", -1) - sqrt(8e9 / 2500)) < 1e-9);
	assert_true(fabs(num(r, "c13", -1) - 12) < 1e-12);
	assert_int_equal((int)num(r, "qc", -1), 0);
	cJSON_Delete(r);

	/* isotropic limit: C11 = C33, C66 = C44, C13 = C33 - 2 C44 gives
	 * epsilon = delta = gamma = 0 (linear elasticity) */
	r = ok_call(h, REQ("{\"rho\":2.4,\"c11\":[30,30],\"c13\":14,\"c33\":30,"
	                   "\"c44\":8,\"c66\":8}"));
	for (int i = 0; i < 2; i++) {
		assert_true(fabs(num(r, "epsilon", i)) < 1e-15);
		assert_true(fabs(num(r, "delta", i)) < 1e-15);
		assert_true(fabs(num(r, "gamma", i)) < 1e-15);
	}
	cJSON_Delete(r);

	/* Pa and km/s */
	r = ok_call(h, REQ("{\"rho\":2500,\"c11\":40e9,\"c13\":12e9,"
	                   "\"c33\":30e9,\"c44\":8e9,\"c66\":10e9,\"units\":{"
	                   "\"modulus\":\"Pa\",\"velocity\":\"km/s\","
	                   "\"density\":\"kg/m3\"}}"));
	assert_true(fabs(num(r, "vp0", -1) - sqrt(30e9 / 2500) / 1000) < 1e-12);
	assert_true(fabs(num(r, "c33", -1) - 30e9) < 1e-3);
	cJSON_Delete(r);
}

static void test_inverse_round_trip(void **state)
{
	harness *h = *state;
	char line[512];
	cJSON *f = ok_call(h, REQ("{\"rho\":2.5,\"c11\":40,\"c13\":12,"
	                          "\"c33\":30,\"c44\":8,\"c66\":10}"));
	cJSON *r;

	snprintf(line, sizeof line,
	         REQ("{\"rho\":2.5,\"vp0\":%.17g,\"vs0\":%.17g,\"epsilon\":"
	             "%.17g,\"delta\":%.17g,\"gamma\":%.17g}"),
	         num(f, "vp0", -1), num(f, "vs0", -1), num(f, "epsilon", -1),
	         num(f, "delta", -1), num(f, "gamma", -1));
	r = ok_call(h, line);
	assert_true(fabs(num(r, "c11", -1) - 40) < 1e-9);
	assert_true(fabs(num(r, "c13", -1) - 12) < 1e-9);
	assert_true(fabs(num(r, "c33", -1) - 30) < 1e-9);
	assert_true(fabs(num(r, "c44", -1) - 8) < 1e-9);
	assert_true(fabs(num(r, "c66", -1) - 10) < 1e-9);
	cJSON_Delete(r);
	cJSON_Delete(f);
}

static void test_qc(void **state)
{
	harness *h = *state;
	/* unstable (C13^2 >= C33 (C11 - C66)), zero density, null input,
	 * negative Poisson's ratio along the axis (vs0 > vp0 / sqrt 2) */
	cJSON *r = ok_call(h, REQ("{\"rho\":[2.5,0,2.5,2.5],\"c11\":40,"
	                          "\"c13\":[30,12,null,2],\"c33\":30,\"c44\":"
	                          "[8,8,8,16],\"c66\":[10,10,10,17]}"));
	assert_true(is_null(r, "epsilon", 0));
	assert_true(is_null(r, "c11", 0));
	assert_int_equal((int)num(r, "qc", 0), (int)B_UNSTABLE);
	assert_int_equal((int)num(r, "qc", 1), (int)B_RHO_NONPOS);
	assert_true(is_null(r, "rho", 1));
	/* a null input: missing (bit 28), not invalid */
	assert_int_equal((int)num(r, "qc", 2), 1 << 28);
	assert_int_equal((int)num(r, "qc", 3), (int)B_NU_NEGATIVE);
	assert_false(is_null(r, "delta", 3));
	cJSON_Delete(r);

	/* delta too negative for a real C13 */
	r = ok_call(h,
	            REQ("{\"rho\":2.5,\"vp0\":3000,\"vs0\":1500,"
	                "\"epsilon\":0.1,\"delta\":[-0.5,0.1],\"gamma\":0}"));
	assert_true(is_null(r, "c13", 0));
	assert_int_equal((int)num(r, "qc", 0), (int)B_UNSTABLE);
	assert_false(is_null(r, "c13", 1));
	cJSON_Delete(r);
}

static void test_errors(void **state)
{
	harness *h = *state;

	expect_error(h,
	             REQ("{\"c11\":40,\"c13\":12,\"c33\":30,\"c44\":8,"
	                 "\"c66\":10}"),
	             "rho");
	expect_error(h, REQ("{\"rho\":2.5}"), "c11");
	expect_error(h,
	             REQ("{\"rho\":2.5,\"c11\":40,\"c33\":30,\"c44\":8,"
	                 "\"c66\":10}"),
	             "c13");
	expect_error(h,
	             REQ("{\"rho\":2.5,\"vp0\":3000,\"vs0\":1500,"
	                 "\"epsilon\":0.1,\"delta\":0.1}"),
	             "gamma");
	expect_error(h,
	             REQ("{\"rho\":2.5,\"c11\":40,\"c13\":12,\"c33\":30,"
	                 "\"c44\":8,\"c66\":10,\"epsilon\":0.1}"),
	             "epsilon");
	expect_error(h,
	             REQ("{\"rho\":2.5,\"c11\":[40,41],\"c13\":[12,1,2],"
	                 "\"c33\":30,\"c44\":8,\"c66\":10}"),
	             "c13");
	expect_error(h,
	             REQ("{\"rho\":2.5,\"c11\":\"40\",\"c13\":12,"
	                 "\"c33\":30,\"c44\":8,\"c66\":10}"),
	             "c11");
	expect_error(h, REQ("{\"rho\":2.5,\"c12\":40}"), "c12");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
#define T(f) cmocka_unit_test_setup_teardown(f, setup, teardown)
	    T(test_forward),
	    T(test_inverse_round_trip),
	    T(test_qc),
	    T(test_errors),
#undef T
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
