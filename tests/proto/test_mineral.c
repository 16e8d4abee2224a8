/* Protocol tests of mineral.list and mineral.mix (daemon/proto/mineral.c):
 * the table as served, the averages against their published closed forms
 * (Voigt 1928, Reuss 1929, Hill 1952, the two-phase Hashin & Shtrikman
 * 1963 bounds), the ordering the bounds theorem demands, broadcasting of
 * fractions, units, and every -32602 path naming its parameter. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cjson/cJSON.h>
#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "proto/internal.h"
#include "proto/proto.h"
#include "rockwire/mineral.h"
#include "rockwire/status.h"

#include "proto/rpc_helpers.h"

#define MIX(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":\"mineral.mix\","            \
	"\"params\":" params "}"

/* mineral.list serves every row of the core table with its source, in
 * the requested units, and takes no parameters. */
static void test_list(void **state)
{
	cJSON *r = call("{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                "\"mineral.list\",\"params\":{\"units\":{\"modulus\":"
	                "\"MPa\",\"density\":\"kg/m3\"}}}");
	const cJSON *res = result_of(r);
	const cJSON *names = cJSON_GetObjectItemCaseSensitive(res, "name");
	const cJSON *src = cJSON_GetObjectItemCaseSensitive(res, "source");
	size_t n = rw_mineral_count();
	rw_mineral m;

	(void)state;
	assert_int_equal((int)num(res, "n"), (int)n);
	assert_int_equal(cJSON_GetArraySize(names), (int)n);
	for (size_t i = 0; i < n; i++) {
		assert_int_equal(rw_mineral_get(i, &m), RW_OK);
		assert_string_equal(
		    cJSON_GetArrayItem(names, (int)i)->valuestring, m.name);
		assert_string_equal(
		    cJSON_GetArrayItem(src, (int)i)->valuestring, m.source);
		assert_rel(num_at(res, "k", (int)i), m.k_pa / 1e6, 1e-12);
		assert_rel(num_at(res, "mu", (int)i), m.mu_pa / 1e6, 1e-12);
		assert_rel(num_at(res, "rho", (int)i), m.rho_kgm3, 1e-12);
	}
	assert_string_equal(unit_of(res, "k"), "MPa");
	assert_string_equal(unit_of(res, "rho"), "kg/m3");
	cJSON_Delete(r);
	expect_invalid("{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	               "\"mineral.list\",\"params\":{\"name\":\"quartz\"}}",
	               "name", "unknown parameter");
}

/* Two well-ordered constituents (calcite stiffer than clay in K and mu):
 * the Hashin & Shtrikman 1963 two-phase bounds (as written in Mavko,
 * Mukerji & Dvorkin 2009, section 4.1)
 *   K = K1 + f2 / (1/(K2 - K1) + f1/(K1 + 4/3 mu1)),
 *   mu = mu1 + f2 / (1/(mu2 - mu1) + 2 f1 (K1 + 2 mu1) /
 *        (5 mu1 (K1 + 4/3 mu1))),
 * upper with 1 = calcite, lower with 1 = clay; Voigt and Reuss means;
 * Hill the mean of the two; Reuss <= HS- <= HS+ <= Voigt. */
static void test_two_phase_bounds(void **state)
{
	cJSON *r = call(MIX("{\"constituents\":[{\"mineral\":\"calcite\","
	                    "\"fraction\":0.7},{\"k\":21,\"mu\":7,\"rho\":2.6,"
	                    "\"fraction\":0.3}]}"));
	const cJSON *res = result_of(r);
	const double k1 = 76.8, m1 = 32, k2 = 21, m2 = 7, f1 = 0.7, f2 = 0.3;
	double kv = f1 * k1 + f2 * k2, kr = 1 / (f1 / k1 + f2 / k2);
	double mv = f1 * m1 + f2 * m2, mr = 1 / (f1 / m1 + f2 / m2);
	double ku = k1 + f2 / (1 / (k2 - k1) + f1 / (k1 + 4.0 / 3 * m1));
	double kl = k2 + f1 / (1 / (k1 - k2) + f2 / (k2 + 4.0 / 3 * m2));
	double mu_u =
	    m1 + f2 / (1 / (m2 - m1) +
	               2 * f1 * (k1 + 2 * m1) / (5 * m1 * (k1 + 4.0 / 3 * m1)));
	double mu_l =
	    m2 + f1 / (1 / (m1 - m2) +
	               2 * f2 * (k2 + 2 * m2) / (5 * m2 * (k2 + 4.0 / 3 * m2)));
	rw_mineral cal;

	(void)state;
	assert_int_equal(rw_mineral_find("calcite", NULL, &cal), RW_OK);
	/* The test's numbers are the table's calcite. */
	assert_rel(cal.k_pa / 1e9, k1, 1e-12);
	assert_rel(cal.mu_pa / 1e9, m1, 1e-12);
	assert_rel(num(res, "k_voigt"), kv, 1e-12);
	assert_rel(num(res, "k_reuss"), kr, 1e-12);
	assert_rel(num(res, "mu_voigt"), mv, 1e-12);
	assert_rel(num(res, "mu_reuss"), mr, 1e-12);
	assert_rel(num(res, "k_hill"), (kv + kr) / 2, 1e-12);
	assert_rel(num(res, "mu_hill"), (mv + mr) / 2, 1e-12);
	assert_rel(num(res, "k_hs_upper"), ku, 1e-10);
	assert_rel(num(res, "k_hs_lower"), kl, 1e-10);
	assert_rel(num(res, "mu_hs_upper"), mu_u, 1e-10);
	assert_rel(num(res, "mu_hs_lower"), mu_l, 1e-10);
	assert_true(kr <= kl && kl <= ku && ku <= kv);
	assert_true(mr <= mu_l && mu_l <= mu_u && mu_u <= mv);
	assert_rel(num(res, "rho"), f1 * cal.rho_kgm3 / 1000 + f2 * 2.6, 1e-12);
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(res, "method")->valuestring,
	    "all");
	cJSON_Delete(r);
}

/* A chosen method returns k, mu, rho only; a fluid constituent (mu = 0)
 * makes the HS lower bound on K the Reuss average and mu_HS- zero
 * (Hashin & Shtrikman 1963 with a zero-shear phase); fractions as arrays
 * broadcast, and a fraction 1 returns that constituent itself. */
static void test_method_and_broadcast(void **state)
{
	cJSON *r = call(MIX("{\"method\":\"hs_lower\",\"constituents\":["
	                    "{\"mineral\":\"quartz\",\"fraction\":[1,0.8,0.6]},"
	                    "{\"k\":2.25,\"mu\":0,\"rho\":1.0,\"fraction\":"
	                    "[0,0.2,0.4]}]}"));
	const cJSON *res = result_of(r);
	rw_mineral q;

	(void)state;
	assert_int_equal(rw_mineral_find("quartz", NULL, &q), RW_OK);
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "k_voigt"));
	assert_int_equal(array_len(res, "k"), 3);
	assert_rel(num_at(res, "k", 0), q.k_pa / 1e9, 1e-12);
	assert_rel(num_at(res, "mu", 0), q.mu_pa / 1e9, 1e-12);
	for (int i = 1; i < 3; i++) {
		double f = 0.2 * i;
		assert_rel(num_at(res, "k", i),
		           1 / ((1 - f) / (q.k_pa / 1e9) + f / 2.25), 1e-10);
		assert_true(fabs(num_at(res, "mu", i)) < 1e-12);
	}
	cJSON_Delete(r);
}

static void test_errors(void **state)
{
	(void)state;
	expect_invalid(MIX("{}"), "constituents", "required");
	expect_invalid(MIX("{\"constituents\":[]}"), "constituents", "empty");
	expect_invalid(MIX("{\"constituents\":{\"mineral\":\"quartz\"}}"),
	               "constituents", "array");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":0.6},{\"mineral\":\"calcite\","
	                   "\"fraction\":[0.3,0.4]}]}"),
	               "constituents", "sum to 0.9 at sample 0");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":1.5},{\"mineral\":\"calcite\","
	                   "\"fraction\":-0.5}]}"),
	               "constituents[0].fraction", "outside [0, 1]");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartzite\","
	                   "\"fraction\":1}]}"),
	               "constituents[0].mineral", "quartz, calcite");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"k\":30,\"fraction\":1}]}"),
	               "constituents[0].k", "not both");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":0.5},{\"k\":30,\"rho\":2.6,"
	                   "\"fraction\":0.5}]}"),
	               "constituents[1].mu", "required");
	expect_invalid(MIX("{\"constituents\":[{\"k\":-3,\"mu\":1,\"rho\":2,"
	                   "\"fraction\":1}]}"),
	               "constituents[0].k", ">= 0");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\"}]}"),
	               "constituents[0].fraction", "required");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":1},\"clay\"]}"),
	               "constituents[1]", "object");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":1,\"volume\":1}]}"),
	               "constituents[0].volume", "unknown");
	expect_invalid(MIX("{\"method\":\"average\",\"constituents\":["
	                   "{\"mineral\":\"quartz\",\"fraction\":1}]}"),
	               "method", "hs_upper");
	expect_invalid(MIX("{\"constituents\":[{\"mineral\":\"quartz\","
	                   "\"fraction\":[0.5,0.5]},{\"mineral\":\"clay\","
	                   "\"fraction\":[0.5,0.5,0.5]}]}"),
	               "constituents[1].fraction", "does not match length 2");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_list),
	    cmocka_unit_test(test_two_phase_bounds),
	    cmocka_unit_test(test_method_and_broadcast),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, setup, teardown);
}
