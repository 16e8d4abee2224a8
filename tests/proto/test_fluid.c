/* Protocol tests of fluid.properties (daemon/proto/fluid.c): request lines
 * through rw_proto_handle, no socket. Broadcasting of p and T (a depth
 * profile) and of saturations (a sweep), units (psi, degF, scf/bbl, kg/m3)
 * checked against the unit definitions, the mixing rules against their
 * published formulas, limits of the correlations against facts of
 * physics, the QC flags, and every -32602 path naming its parameter. The
 * Batzle & Wang values themselves are checked against IAPWS in
 * tests/reference/test_fluid_proto_iapws.py and the core's unit tests. */
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
#include "rockwire/fluid.h"
#include "rockwire/status.h"

#include "proto/rpc_helpers.h"

/* Unit definitions (NIST SP 811, exact): 1 lbf/in^2 = 0.45359237 kg x
 * 9.80665 m/s^2 / (0.0254 m)^2; degF = degC x 9/5 + 32; 1 bbl = 42 US gal
 * of 231 in^3; 1 ft = 0.3048 m. */
#define PSI_MPA (0.45359237 * 9.80665 / (0.0254 * 0.0254) / 1e6)
#define SCF_BBL_LL                                                             \
	(0.3048 * 0.3048 * 0.3048 / (42.0 * 231.0 * 0.0254 * 0.0254 * 0.0254))

#define REQ(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"fluid.properties\","       \
	"\"params\":" params "}"

/* A depth profile: p an array, T an array, salinity scalar; each sample
 * equals the core at that sample (the wiring), outputs are arrays, units
 * are reported for every dimensioned field. */
static void test_profile_broadcast(void **state)
{
	cJSON *r = call(REQ("{\"pressure\":[10,20,30,40],\"temperature\":"
	                    "[40,55,70,85],\"brine\":{\"salinity\":60000}}"));
	const cJSON *res = result_of(r);
	static const double p[] = {10, 20, 30, 40}, t[] = {40, 55, 70, 85};
	rw_fluid_phase b;

	(void)state;
	assert_int_equal((int)num(res, "n"), 4);
	assert_int_equal(array_len(res, "brine_rho"), 4);
	assert_int_equal(array_len(res, "sat_brine"), 4);
	for (int i = 0; i < 4; i++) {
		assert_int_equal(
		    rw_fluid_brine_props(p[i], t[i], 0.06, &b, NULL), RW_OK);
		assert_rel(num_at(res, "brine_rho", i), b.rho_kgm3 / 1000,
		           1e-12);
		assert_rel(num_at(res, "brine_k", i), b.k_pa / 1e9, 1e-12);
		assert_rel(num_at(res, "brine_v", i), b.v_ms, 1e-12);
		/* One phase: the mixture is the phase. */
		assert_rel(num_at(res, "mix_k", i), b.k_pa / 1e9, 1e-12);
		assert_rel(num_at(res, "sat_brine", i), 1.0, 0);
		assert_int_equal(qc_at(res, i), 0);
	}
	assert_string_equal(unit_of(res, "brine_rho"), "g/cm3");
	assert_string_equal(unit_of(res, "brine_k"), "GPa");
	assert_string_equal(unit_of(res, "mix_v"), "m/s");
	assert_string_equal(unit_of(res, "pressure"), "MPa");
	assert_string_equal(unit_of(res, "temperature"), "degC");
	cJSON_Delete(r);
}

/* psi and degF in, kg/m3 and MPa out: the same numbers as the SI call
 * after the defined conversions; the echoed p and T stay in the call's
 * units. */
static void test_units_psi_degf(void **state)
{
	cJSON *a = call(REQ("{\"pressure\":3000,\"temperature\":176,"
	                    "\"brine\":{\"salinity\":35},\"gas\":"
	                    "{\"gravity\":0.7},\"saturation\":{\"brine\":0.6,"
	                    "\"gas\":0.4},\"units\":{\"pressure\":\"psi\","
	                    "\"temperature\":\"degF\",\"salinity\":\"g/kg\","
	                    "\"density\":\"kg/m3\",\"modulus\":\"MPa\"}}"));
	const cJSON *ra = result_of(a);
	rw_fluid_phase b, g;
	double pm = 3000 * PSI_MPA, tc = (176 - 32) * 5.0 / 9.0;

	(void)state;
	assert_int_equal(rw_fluid_brine_props(pm, tc, 0.035, &b, NULL), RW_OK);
	assert_int_equal(rw_fluid_gas_props(pm, tc, 0.7, &g, NULL, NULL),
	                 RW_OK);
	assert_rel(num(ra, "pressure"), 3000, 1e-12);
	assert_rel(num(ra, "temperature"), 176, 1e-12);
	assert_rel(num(ra, "brine_rho"), b.rho_kgm3, 1e-12);
	assert_rel(num(ra, "gas_k"), g.k_pa / 1e6, 1e-12);
	assert_string_equal(unit_of(ra, "pressure"), "psi");
	assert_string_equal(unit_of(ra, "temperature"), "degF");
	assert_string_equal(unit_of(ra, "gas_rho"), "kg/m3");
	assert_string_equal(unit_of(ra, "mix_k"), "MPa");
	cJSON_Delete(a);
}

/* Live oil: GOR in scf/bbl gives the same oil as the defined L/L value;
 * B0 is reported for live oil only. */
static void test_gor_scf_bbl(void **state)
{
	char line[512];
	cJSON *a, *b;
	const cJSON *ra, *rb;

	(void)state;
	a = call(REQ("{\"pressure\":30,\"temperature\":90,\"oil\":{\"api\":"
	             "38,\"gor\":500,\"gas_gravity\":0.75},\"units\":{\"gor\":"
	             "\"scf/bbl\"}}"));
	snprintf(line, sizeof line,
	         REQ("{\"pressure\":30,\"temperature\":90,\"oil\":{\"api\":38,"
	             "\"gor\":%.17g,\"gas_gravity\":0.75}}"),
	         500 * SCF_BBL_LL);
	b = call(line);
	ra = result_of(a);
	rb = result_of(b);
	assert_rel(num(ra, "oil_rho"), num(rb, "oil_rho"), 1e-9);
	assert_rel(num(ra, "oil_v"), num(rb, "oil_v"), 1e-9);
	assert_rel(num(ra, "oil_b0"), num(rb, "oil_b0"), 1e-9);
	/* Dissolved gas lowers the oil velocity (Batzle & Wang 1992, fig. 13
	 * and eq. 20b): a dead oil of the same API is faster. */
	cJSON_Delete(b);
	b = call(REQ("{\"pressure\":30,\"temperature\":90,\"oil\":{\"api\":"
	             "38}}"));
	rb = result_of(b);
	assert_true(num(rb, "oil_v") > num(ra, "oil_v"));
	assert_null(cJSON_GetObjectItemCaseSensitive(rb, "oil_b0"));
	cJSON_Delete(a);
	cJSON_Delete(b);
}

/* Limits that are facts of physics: at 0.1 MPa a light gas is nearly
 * ideal, rho = p M / (R T) with M = G M_air (ideal-gas law; within 2 %),
 * and its adiabatic K / p is the heat-capacity ratio, 1.2-1.4 for light
 * alkane gases (methane 1.31, from memory). A dead oil at 60 degF and
 * 1 atm has the density its API gravity defines, 141.5 / (API + 131.5)
 * g/cm3 (API definition; 1 % allows Batzle & Wang's eq. 19 offset). */
static void test_physical_limits(void **state)
{
	cJSON *r = call(REQ("{\"pressure\":0.1,\"temperature\":60,\"gas\":"
	                    "{\"gravity\":0.6},\"units\":{\"density\":"
	                    "\"kg/m3\",\"modulus\":\"Pa\"}}"));
	const cJSON *res = result_of(r);
	double ideal = 0.1e6 * 0.6 * 0.0289644 / (8.314462618 * 333.15);

	(void)state;
	assert_rel(num(res, "gas_rho"), ideal, 0.02);
	assert_true(num(res, "gas_k") / 0.1e6 > 1.2 &&
	            num(res, "gas_k") / 0.1e6 < 1.4);
	assert_rel(num(res, "gas_z"), 1.0, 0.02);
	cJSON_Delete(r);
	r = call(REQ("{\"pressure\":0.101325,\"temperature\":60,\"oil\":"
	             "{\"api\":30},\"units\":{\"temperature\":\"degF\"}}"));
	res = result_of(r);
	assert_rel(num(res, "oil_rho"), 141.5 / (30 + 131.5), 0.01);
	cJSON_Delete(r);
}

/* The three mixing rules against their published formulas, applied to
 * the phase values of the same response: Wood 1955 1/K = sum S_i/K_i,
 * Voigt K = sum S_i K_i, Brie et al. 1995 K = (K_w - K_g) S_w^e + K_g;
 * density is the saturation-weighted mean in all. */
static void test_mixing_rules(void **state)
{
	static const char *const mix[] = {"wood", "voigt", "brie"};
	char line[512];

	(void)state;
	for (int m = 0; m < 3; m++) {
		cJSON *r;
		const cJSON *res;
		double kb, kg, rb, rg, want;

		snprintf(line, sizeof line,
		         REQ("{\"pressure\":20,\"temperature\":70,\"brine\":"
		             "{\"salinity\":100000},\"gas\":{\"gravity\":0.65},"
		             "\"saturation\":{\"brine\":0.7,\"gas\":0.3},"
		             "\"mix\":\"%s\"%s}"),
		         mix[m], m == 2 ? ",\"brie_exponent\":5" : "");
		r = call(line);
		res = result_of(r);
		kb = num(res, "brine_k"), kg = num(res, "gas_k");
		rb = num(res, "brine_rho"), rg = num(res, "gas_rho");
		want = m == 0   ? 1 / (0.7 / kb + 0.3 / kg)
		       : m == 1 ? 0.7 * kb + 0.3 * kg
		                : (kb - kg) * pow(0.7, 5) + kg;
		assert_rel(num(res, "mix_k"), want, 1e-12);
		assert_rel(num(res, "mix_rho"), 0.7 * rb + 0.3 * rg, 1e-12);
		assert_string_equal(
		    cJSON_GetObjectItemCaseSensitive(res, "mix")->valuestring,
		    mix[m]);
		if (m == 2)
			assert_rel(num(res, "brie_exponent"), 5, 0);
		cJSON_Delete(r);
	}
}

/* A saturation sweep with scalar p and T: one curve; phases at zero
 * saturation are still reported; the Wood mix falls monotonically as gas
 * replaces brine (Wood 1955: K is a harmonic mean). */
static void test_saturation_sweep(void **state)
{
	cJSON *r = call(REQ("{\"pressure\":25,\"temperature\":75,\"brine\":"
	                    "{\"salinity\":50000},\"gas\":{\"gravity\":0.6},"
	                    "\"oil\":{\"api\":35},\"saturation\":{\"brine\":"
	                    "[1,0.75,0.5,0.25,0],\"gas\":[0,0.25,0.5,0.75,1],"
	                    "\"oil\":0}}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_int_equal((int)num(res, "n"), 5);
	assert_int_equal(array_len(res, "pressure"), 5);
	assert_true(isfinite(num_at(res, "gas_rho", 0)));
	assert_true(isfinite(num_at(res, "oil_k", 4)));
	assert_rel(num_at(res, "mix_k", 0), num_at(res, "brine_k", 0), 1e-12);
	assert_rel(num_at(res, "mix_k", 4), num_at(res, "gas_k", 4), 1e-12);
	for (int i = 1; i < 5; i++)
		assert_true(num_at(res, "mix_k", i) <
		            num_at(res, "mix_k", i - 1));
	/* the brine left out fills the rest: the same answer as giving it */
	{
		cJSON *r2 = call(
		    REQ("{\"pressure\":25,\"temperature\":75,\"brine\":"
		        "{\"salinity\":50000},\"gas\":{\"gravity\":0.6},"
		        "\"oil\":{\"api\":35},\"saturation\":{\"gas\":[0,0.25,"
		        "0.5,0.75,1],\"oil\":0}}"));
		const cJSON *res2 = result_of(r2);
		for (int i = 0; i < 5; i++) {
			assert_rel(num_at(res2, "mix_k", i),
			           num_at(res, "mix_k", i), 1e-15);
			assert_rel(num_at(res2, "sat_brine", i) + 1.0,
			           num_at(res, "sat_brine", i) + 1.0, 1e-15);
		}
		cJSON_Delete(r2);
	}
	cJSON_Delete(r);
}

/* QC flags: outside the fitted range (brine above 100 degC, Batzle &
 * Wang 1992 as stated in fluid.h), boiling (0.2 MPa at 150 degC is below
 * water's 0.476 MPa saturation pressure, IAPWS-IF97, from memory), GOR
 * above what the oil dissolves (200 L/L at 5 MPa, B&W eq. 21: free gas,
 * so no single live-oil phase: null with the flag), a null pressure
 * (input missing, outputs null) and an impossible salinity
 * (0.5 > the NaCl solubility limit: input invalid, null). */
static void test_qc_flags(void **state)
{
	cJSON *r = call(REQ("{\"pressure\":[30,0.2,null],\"temperature\":150,"
	                    "\"brine\":{\"salinity\":30000}}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_true(qc_at(res, 0) & QC_FLUID_CALIBRATION);
	assert_false(qc_at(res, 0) & QC_FLUID_BOILING);
	assert_true(qc_at(res, 1) & QC_FLUID_BOILING);
	assert_true(qc_at(res, 2) == QC_LOG_MISSING);
	assert_true(isnan(num_at(res, "brine_rho", 2)));
	assert_true(isnan(num_at(res, "mix_k", 2)));
	assert_true(isfinite(num_at(res, "brine_rho", 1)));
	cJSON_Delete(r);
	r = call(REQ("{\"pressure\":5,\"temperature\":60,\"oil\":{\"api\":"
	             "35,\"gor\":200,\"gas_gravity\":0.7}}"));
	res = result_of(r);
	assert_true(qc_at(res, 0) & QC_FLUID_GOR_EXCESS);
	assert_true(qc_at(res, 0) & QC_FLUID_FAILED);
	assert_true(isnan(num(res, "oil_v")));
	cJSON_Delete(r);
	r = call(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	             "{\"salinity\":[0.1,0.5]},\"units\":{\"salinity\":"
	             "\"fraction\"}}"));
	res = result_of(r);
	assert_int_equal(qc_at(res, 0), 0);
	assert_true(qc_at(res, 1) & QC_INPUT_INVALID);
	assert_true(isnan(num_at(res, "brine_k", 1)));
	cJSON_Delete(r);
}

/* Every structural mistake fails with -32602 naming the parameter. */
static void test_errors(void **state)
{
	(void)state;
	expect_invalid(REQ("{\"temperature\":60,\"brine\":{\"salinity\":0}}"),
	               "pressure", "required");
	expect_invalid(REQ("{\"pressure\":20,\"brine\":{\"salinity\":0}}"),
	               "temperature", "required");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60}"), "brine",
	               "at least one phase");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":{}}"),
	               "brine.salinity", "required");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0,\"temp\":3}}"),
	               "brine.temp", "unknown");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"gas\":0.6}"),
	               "gas", "object");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"gas\":{}}"),
	               "gas.gravity", "required");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"oil\":"
	                   "{\"gor\":50,\"gas_gravity\":0.7}}"),
	               "oil.api", "required");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"oil\":"
	                   "{\"api\":30,\"gor\":50}}"),
	               "oil.gas_gravity", "required with gor");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"oil\":"
	                   "{\"api\":30,\"gas_gravity\":0.7}}"),
	               "oil.gas_gravity", "live oil");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6}}"),
	               "saturation", "more than one phase");
	expect_invalid(
	    REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	        "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	        "\"oil\":{\"api\":30},\"saturation\":{\"brine\":1}}"),
	    "saturation.oil", "only one phase (here gas)");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"saturation\":{\"gas\":1.5}}"),
	               "saturation.gas", "outside [0, 1]");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"oil\":{\"api\":30},\"saturation\":{\"gas\":0.7,"
	                   "\"oil\":0.6}}"),
	               "saturation", "leaving nothing for the brine");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"saturation\":{\"brine\":0.5,"
	                   "\"oil\":0.5}}"),
	               "saturation.oil", "no oil phase");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"saturation\":{\"brine\":[0.5,0.6],\"gas\":0.4}}"),
	               "saturation", "sum to 0.9 at sample 0");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"saturation\":{\"brine\":1.2,\"gas\":-0.2}}"),
	               "saturation.brine", "outside [0, 1]");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"mix\":\"average\"}"),
	               "mix", "wood, brie, voigt");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"brie_exponent\":3}"),
	               "brie_exponent", "only used with mix");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"saturation\":{\"brine\":0.5,\"gas\":0.5},"
	                   "\"mix\":\"brie\",\"brie_exponent\":0.5}"),
	               "brie_exponent", "must be >= 1");
	expect_invalid(REQ("{\"pressure\":[20,30],\"temperature\":60,"
	                   "\"brine\":{\"salinity\":0},\"gas\":{\"gravity\":"
	                   "0.6},\"saturation\":{\"brine\":[1,0.5,0],\"gas\":"
	                   "[0,0.5,1]}}"),
	               "saturation.brine", "does not match length 2");
	expect_invalid(REQ("{\"pressure\":[20,30],\"temperature\":[60,70,80],"
	                   "\"brine\":{\"salinity\":0}}"),
	               "temperature", "does not match");
	expect_invalid(REQ("{\"pressure\":\"20\",\"temperature\":60,"
	                   "\"brine\":{\"salinity\":0}}"),
	               "pressure", "number");
	expect_invalid(REQ("{\"pressure\":20,\"temperature\":60,\"brine\":"
	                   "{\"salinity\":0},\"units\":{\"gor\":\"bbl/scf\"}}"),
	               "units", "scf/bbl");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_profile_broadcast),
	    cmocka_unit_test(test_units_psi_degf),
	    cmocka_unit_test(test_gor_scf_bbl),
	    cmocka_unit_test(test_physical_limits),
	    cmocka_unit_test(test_mixing_rules),
	    cmocka_unit_test(test_saturation_sweep),
	    cmocka_unit_test(test_qc_flags),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, setup, teardown);
}
