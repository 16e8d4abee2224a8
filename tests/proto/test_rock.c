/* Protocol tests of rock.substitute (daemon/proto/rock.c): a worked
 * Gassmann 1951 substitution from logs checked against the direct
 * substitution form of Mavko, Mukerji & Dvorkin 2009 (section 6.3), which
 * needs no dry-frame step, the round trip, a gas-saturation sweep, the
 * saturated rock from a dry frame against Gassmann's suspension limit,
 * units, the QC flags and every -32602 path naming its parameter. */
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

#define SUB(params)                                                            \
	"{\"jsonrpc\":\"2.0\",\"id\":3,\"method\":\"rock.substitute\","        \
	"\"params\":" params "}"

/* 1 ft = 0.3048 m; 1 psi = 0.45359237 x 9.80665 / 0.0254^2 Pa (NIST SP
 * 811, exact definitions). */
#define FT      0.3048
#define PSI_MPA (0.45359237 * 9.80665 / (0.0254 * 0.0254) / 1e6)

/* Mavko, Mukerji & Dvorkin 2009, section 6.3 (Gassmann in substitution
 * form): K2/(Km - K2) - Kf2/(phi (Km - Kf2)) = K1/(Km - K1) - Kf1/(phi
 * (Km - Kf1)); Kf2 = 0 gives the dry frame. Returns K2. */
static double direct_subst(double k1, double km, double kf1, double kf2,
                           double phi)
{
	double a = k1 / (km - k1) - kf1 / (phi * (km - kf1)) +
	           kf2 / (phi * (km - kf2));
	return a * km / (1 + a);
}

/* Worked example: a brine sand (vp 3200 m/s, vs 1750 m/s, 2.28 g/cm3,
 * porosity 0.24, quartz) to gas (explicit fluids: brine 2.9 GPa,
 * 1.04 g/cm3; gas 0.08 GPa, 0.22 g/cm3). K2 and K_dry from the direct
 * form, mu unchanged (Gassmann 1951), rho2 = rho + phi (rho_fl2 -
 * rho_fl1) (mass balance), velocities and the percentage changes from
 * their definitions. */
static void test_worked_example(void **state)
{
	cJSON *r = call(
	    SUB("{\"vp\":3200,\"vs\":1750,\"rho\":2.28,"
	        "\"porosity\":0.24,\"mineral\":\"quartz\","
	        "\"fluid_in_place\":{\"k\":2.9,\"rho\":1.04},\"fluid_new\":"
	        "{\"k\":0.08,\"rho\":0.22}}"));
	const cJSON *res = result_of(r);
	rw_mineral q;
	double km, rho = 2280, mu = rho * 1750.0 * 1750.0;
	double k1 = rho * 3200.0 * 3200.0 - 4.0 / 3.0 * mu, k2, kd, rho2;
	double vp2, vs2;

	(void)state;
	assert_int_equal(rw_mineral_find("quartz", NULL, &q), RW_OK);
	km = q.k_pa;
	k2 = direct_subst(k1, km, 2.9e9, 0.08e9, 0.24);
	kd = direct_subst(k1, km, 2.9e9, 0.0, 0.24);
	rho2 = rho + 0.24 * (220.0 - 1040.0);
	vp2 = sqrt((k2 + 4.0 / 3.0 * mu) / rho2);
	vs2 = sqrt(mu / rho2);
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(res, "mode")->valuestring, "logs");
	assert_rel(num(res, "k_sat"), k2 / 1e9, 1e-9);
	assert_rel(num(res, "k_dry"), kd / 1e9, 1e-9);
	assert_rel(num(res, "mu"), mu / 1e9, 1e-12);
	assert_rel(num(res, "rho"), rho2 / 1000, 1e-12);
	assert_rel(num(res, "vp"), vp2, 1e-9);
	assert_rel(num(res, "vs"), vs2, 1e-9);
	assert_rel(num(res, "dvp_pct"), 100 * (vp2 / 3200 - 1), 1e-9);
	assert_rel(num(res, "dvs_pct"), 100 * (vs2 / 1750 - 1), 1e-9);
	assert_rel(num(res, "drho_pct"), 100 * (rho2 / rho - 1), 1e-9);
	assert_rel(num(res, "dai_pct"), 100 * (rho2 * vp2 / (rho * 3200) - 1),
	           1e-9);
	assert_rel(num(res, "dvpvs_pct"),
	           100 * ((vp2 / vs2) / (3200.0 / 1750) - 1), 1e-9);
	assert_rel(num(res, "fluid_in_place_k"), 2.9, 1e-12);
	assert_rel(num(res, "fluid_new_rho"), 0.22, 1e-12);
	assert_rel(num(res, "mineral_k"), km / 1e9, 1e-12);
	/* The gas effect: vp falls, vs rises a little (density only). */
	assert_true(num(res, "vp") < 3200 && num(res, "vs") > 1750);
	assert_int_equal(qc_at(res, 0), 0);
	assert_string_equal(unit_of(res, "k_dry"), "GPa");
	assert_string_equal(unit_of(res, "fluid_new_rho"), "g/cm3");
	cJSON_Delete(r);
}

/* Brine -> gas -> brine returns the measured rock (Gassmann's relation is
 * invertible for a fixed frame). */
static void test_round_trip(void **state)
{
	cJSON *a =
	    call(SUB("{\"vp\":[2800,3400],\"vs\":[1400,1900],\"rho\":"
	             "[2.2,2.35],\"porosity\":[0.28,0.18],\"mineral\":"
	             "{\"k\":37,\"rho\":2.65},\"fluid_in_place\":{\"k\":2.7,"
	             "\"rho\":1.02},\"fluid_new\":{\"k\":0.1,\"rho\":"
	             "0.25}}"));
	const cJSON *ra = result_of(a);
	char line[640];
	cJSON *b;
	const cJSON *rb;

	(void)state;
	snprintf(
	    line, sizeof line,
	    SUB("{\"vp\":[%.17g,%.17g],\"vs\":[%.17g,%.17g],\"rho\":"
	        "[%.17g,%.17g],\"porosity\":[0.28,0.18],\"mineral\":{\"k\":"
	        "37},\"fluid_in_place\":{\"k\":0.1,\"rho\":0.25},\"fluid_new\":"
	        "{\"k\":2.7,\"rho\":1.02}}"),
	    num_at(ra, "vp", 0), num_at(ra, "vp", 1), num_at(ra, "vs", 0),
	    num_at(ra, "vs", 1), num_at(ra, "rho", 0), num_at(ra, "rho", 1));
	b = call(line);
	rb = result_of(b);
	assert_rel(num_at(rb, "vp", 0), 2800, 1e-9);
	assert_rel(num_at(rb, "vp", 1), 3400, 1e-9);
	assert_rel(num_at(rb, "vs", 1), 1900, 1e-9);
	assert_rel(num_at(rb, "rho", 0), 2.2, 1e-9);
	assert_rel(num_at(rb, "k_dry", 1), num_at(ra, "k_dry", 1), 1e-9);
	/* No rho for the explicit mineral: reported null, not invented. */
	assert_true(isnan(num_at(rb, "mineral_rho", 0)));
	cJSON_Delete(a);
	cJSON_Delete(b);
}

/* A gas-saturation sweep 0..1 step 0.05 at reservoir p and T (fluids by
 * phases): one curve of 21 samples; at S_g = 0 nothing changes; each
 * sample matches the direct form with the fluid moduli the response
 * reports and the mass balance; density falls monotonically and every
 * gas-bearing vp is below the brine vp (the gas effect). */
static void test_sweep(void **state)
{
	char line[1024], sg[256], sw[256];
	size_t u = 0, v = 0;
	cJSON *r;
	const cJSON *res;
	double rho = 2250, mu = rho * 1600.0 * 1600.0;
	double k1 = rho * 3000.0 * 3000.0 - 4.0 / 3.0 * mu;

	(void)state;
	for (int i = 0; i <= 20; i++) {
		u += (size_t)snprintf(sg + u, sizeof sg - u, "%s%.2f",
		                      i ? "," : "", 0.05 * i);
		v += (size_t)snprintf(sw + v, sizeof sw - v, "%s%.2f",
		                      i ? "," : "", 1 - 0.05 * i);
	}
	snprintf(line, sizeof line,
	         SUB("{\"vp\":3000,\"vs\":1600,\"rho\":2.25,\"porosity\":0.25,"
	             "\"mineral\":\"quartz\",\"pressure\":28,\"temperature\":"
	             "85,\"fluid_in_place\":{\"brine\":{\"salinity\":70000}},"
	             "\"fluid_new\":{\"brine\":{\"salinity\":70000},\"gas\":"
	             "{\"gravity\":0.62},\"saturation\":{\"brine\":[%s],"
	             "\"gas\":[%s]}}}"),
	         sw, sg);
	r = call(line);
	res = result_of(r);
	assert_int_equal((int)num(res, "n"), 21);
	assert_int_equal(array_len(res, "vp"), 21);
	assert_int_equal(array_len(res, "fluid_new_sat_gas"), 21);
	assert_true(fabs(num_at(res, "dvp_pct", 0)) < 1e-9);
	assert_rel(num_at(res, "vp", 0), 3000, 1e-12);
	for (int i = 0; i <= 20; i++) {
		double kf1 = num_at(res, "fluid_in_place_k", i) * 1e9;
		double kf2 = num_at(res, "fluid_new_k", i) * 1e9;
		double rf1 = num_at(res, "fluid_in_place_rho", i) * 1000;
		double rf2 = num_at(res, "fluid_new_rho", i) * 1000;
		double km = num_at(res, "mineral_k", i) * 1e9;
		assert_rel(num_at(res, "k_sat", i) * 1e9,
		           direct_subst(k1, km, kf1, kf2, 0.25), 1e-9);
		assert_rel(num_at(res, "rho", i) * 1000,
		           rho + 0.25 * (rf2 - rf1), 1e-12);
		assert_rel(num_at(res, "fluid_new_sat_gas", i), 0.05 * i,
		           1e-12);
		if (i > 0) {
			assert_true(num_at(res, "rho", i) <
			            num_at(res, "rho", i - 1));
			assert_true(num_at(res, "vp", i) < 3000);
		}
		assert_int_equal(qc_at(res, i), 0);
	}
	cJSON_Delete(r);
}

/* The same substitution in field units (ft/s, kg/m3, MPa, psi, degF)
 * gives the SI answer after the defined conversions. */
static void test_units(void **state)
{
	char line[900];
	cJSON *a, *b;
	const cJSON *ra, *rb;

	(void)state;
	a = call(SUB(
	    "{\"vp\":3000,\"vs\":1600,\"rho\":2.25,\"porosity\":0.25,"
	    "\"mineral\":\"quartz\",\"pressure\":20.684271879505,"
	    "\"temperature\":80,\"fluid_in_place\":{\"brine\":{\"salinity\":"
	    "50000}},\"fluid_new\":{\"oil\":{\"api\":40,\"gor\":120,"
	    "\"gas_gravity\":0.7}}}"));
	snprintf(line, sizeof line,
	         SUB("{\"vp\":%.17g,\"vs\":%.17g,\"rho\":2250,\"porosity\":"
	             "0.25,\"mineral\":\"quartz\",\"pressure\":%.17g,"
	             "\"temperature\":176,\"fluid_in_place\":{\"brine\":{"
	             "\"salinity\":"
	             "50000}},\"fluid_new\":{\"oil\":{\"api\":40,\"gor\":120,"
	             "\"gas_gravity\":0.7}},\"units\":{\"velocity\":\"ft/s\","
	             "\"density\":\"kg/m3\",\"modulus\":\"MPa\",\"pressure\":"
	             "\"psi\",\"temperature\":\"degF\"}}"),
	         3000 / FT, 1600 / FT, 20.684271879505 / PSI_MPA);
	b = call(line);
	ra = result_of(a);
	rb = result_of(b);
	assert_rel(num(rb, "vp") * FT, num(ra, "vp"), 1e-9);
	assert_rel(num(rb, "vs") * FT, num(ra, "vs"), 1e-9);
	assert_rel(num(rb, "rho"), num(ra, "rho") * 1000, 1e-9);
	assert_rel(num(rb, "k_sat"), num(ra, "k_sat") * 1000, 1e-9);
	assert_rel(num(rb, "fluid_new_k"), num(ra, "fluid_new_k") * 1000, 1e-9);
	assert_string_equal(unit_of(rb, "vp"), "ft/s");
	assert_string_equal(unit_of(rb, "k_dry"), "MPa");
	cJSON_Delete(a);
	cJSON_Delete(b);
}

/* From a dry frame: K_dry = 0 is Gassmann's suspension limit, the Reuss
 * average 1/(phi/K_fl + (1 - phi)/K_min) (Mavko et al. 2009, section
 * 6.3); rho = (1 - phi) rho_min + phi rho_fl; mu = mu_dry. A mineral mix
 * (Hill by default) serves as the effective mineral. */
static void test_frame(void **state)
{
	cJSON *r = call(SUB("{\"k_dry\":[0,9],\"mu_dry\":[4,8],\"porosity\":"
	                    "0.3,\"mineral\":{\"k\":36,\"rho\":2.65},"
	                    "\"fluid_new\":{\"k\":2.5,\"rho\":1.05}}"));
	const cJSON *res = result_of(r);
	double reuss = 1 / (0.3 / 2.5 + 0.7 / 36),
	       rho = 0.7 * 2.65 + 0.3 * 1.05;

	(void)state;
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(res, "mode")->valuestring,
	    "frame");
	assert_rel(num_at(res, "k_sat", 0), reuss, 1e-12);
	assert_rel(num_at(res, "rho", 0), rho, 1e-12);
	assert_rel(num_at(res, "mu", 1), 8, 1e-12);
	assert_rel(num_at(res, "vs", 1), sqrt(8e9 / (rho * 1000)), 1e-12);
	assert_rel(num_at(res, "k_dry", 1), 9, 1e-12);
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "dvp_pct"));
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "fluid_in_place_k"));
	cJSON_Delete(r);
	r = call(SUB("{\"k_dry\":9,\"mu_dry\":8,\"porosity\":0.3,\"mineral\":"
	             "{\"constituents\":[{\"mineral\":\"quartz\",\"fraction\":"
	             "0.85},{\"mineral\":\"clay\",\"fraction\":0.15}]},"
	             "\"fluid_new\":{\"k\":2.5,\"rho\":1.05}}"));
	res = result_of(r);
	{
		rw_mineral q, c;
		double kv, kr;
		rw_mineral_find("quartz", NULL, &q);
		rw_mineral_find("clay", NULL, &c);
		kv = 0.85 * q.k_pa + 0.15 * c.k_pa;
		kr = 1 / (0.85 / q.k_pa + 0.15 / c.k_pa);
		/* Hill 1952: the mean of Voigt and Reuss. */
		assert_rel(num(res, "mineral_k") * 1e9, (kv + kr) / 2, 1e-12);
		assert_rel(num(res, "mineral_rho") * 1000,
		           0.85 * q.rho_kgm3 + 0.15 * c.rho_kgm3, 1e-12);
	}
	cJSON_Delete(r);
}

/* QC: low porosity (0.03 < 0.05, a stiff rock) is flagged and computed;
 * porosity outside (0, 1) or null is an invalid input with null outputs; logs
 * below the Reuss bound of mineral and brine give K_dry < 0 (an
 * impossible frame: k_dry reported, the rock null); vp^2 < 4/3 vs^2 is a
 * negative modulus. */
static void test_qc(void **state)
{
	cJSON *r =
	    call(SUB("{\"vp\":[5000,3000,3000,1500,1200],\"vs\":[3000,"
	             "1600,1600,200,1100],\"rho\":[2.6,2.25,2.25,2.0,"
	             "2.0],\"porosity\":[0.03,1,null,0.1,0.2],"
	             "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":2.8,"
	             "\"rho\":1.05},\"fluid_new\":{\"k\":0.05,\"rho\":"
	             "0.2}}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_true(qc_at(res, 0) & QC_GASSMANN_PHI_LOW);
	assert_true(isfinite(num_at(res, "vp", 0)));
	assert_true(qc_at(res, 1) & QC_INPUT_INVALID);
	assert_true(isnan(num_at(res, "vp", 1)));
	/* a null porosity is missing, not invalid */
	assert_true(qc_at(res, 2) & QC_LOG_MISSING);
	assert_false(qc_at(res, 2) & QC_INPUT_INVALID);
	assert_true(isnan(num_at(res, "k_sat", 2)));
	assert_true(qc_at(res, 3) & QC_GASSMANN_KDRY);
	assert_true(num_at(res, "k_dry", 3) < 0);
	assert_true(isnan(num_at(res, "vp", 3)));
	assert_true(qc_at(res, 4) & QC_MODULUS_NEGATIVE);
	assert_true(isnan(num_at(res, "vp", 4)));
	cJSON_Delete(r);
	/* A frame stiffer than its mineral. */
	r = call(SUB("{\"k_dry\":[40,-1],\"mu_dry\":20,\"porosity\":0.2,"
	             "\"mineral\":\"quartz\",\"fluid_new\":{\"k\":2.5,\"rho\":"
	             "1.0}}"));
	res = result_of(r);
	assert_true(qc_at(res, 0) & QC_GASSMANN_KDRY);
	assert_true(isnan(num_at(res, "vp", 0)));
	assert_rel(num_at(res, "k_dry", 0), 40, 0);
	assert_true(qc_at(res, 1) & QC_GASSMANN_KDRY);
	cJSON_Delete(r);
	/* Fluid flags reach the rock: brine at 150 degC is outside the
	 * Batzle & Wang fit. */
	r = call(SUB("{\"vp\":3000,\"vs\":1600,\"rho\":2.25,\"porosity\":0.25,"
	             "\"mineral\":\"quartz\",\"pressure\":30,\"temperature\":"
	             "150,\"fluid_in_place\":{\"brine\":{\"salinity\":50000}},"
	             "\"fluid_new\":{\"k\":0.1,\"rho\":0.3}}"));
	res = result_of(r);
	assert_true(qc_at(res, 0) & QC_FLUID_CALIBRATION);
	cJSON_Delete(r);
}

#define LOGS "\"vp\":3000,\"vs\":1600,\"rho\":2.25,\"porosity\":0.25,"
#define FL   "\"fluid_in_place\":{\"k\":2.8,\"rho\":1.05},"
#define FN   "\"fluid_new\":{\"k\":0.05,\"rho\":0.2}"

static void test_errors(void **state)
{
	(void)state;
	expect_invalid(SUB("{\"porosity\":0.2,\"mineral\":\"quartz\"," FN "}"),
	               "vp", "k_dry and mu_dry");
	expect_invalid(
	    SUB("{" LOGS "\"k_dry\":5,\"mineral\":\"quartz\"," FL FN "}"),
	    "k_dry", "not both");
	expect_invalid(SUB("{\"vp\":3000,\"rho\":2.25,\"porosity\":0.2,"
	                   "\"mineral\":\"quartz\"," FL FN "}"),
	               "vs", "required");
	expect_invalid(SUB("{\"k_dry\":5,\"porosity\":0.2,\"mineral\":"
	                   "\"quartz\"," FN "}"),
	               "mu_dry", "required");
	expect_invalid(SUB("{" LOGS "\"mineral\":\"quartz\"," FN "}"),
	               "fluid_in_place", "fluid in place");
	expect_invalid(SUB("{\"k_dry\":5,\"mu_dry\":4,\"porosity\":0.2,"
	                   "\"mineral\":\"quartz\"," FL FN "}"),
	               "fluid_in_place", "fluid_new");
	expect_invalid(SUB("{" LOGS
	                   "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":"
	                   "2.8,\"rho\":1.05}}"),
	               "fluid_new", "required");
	expect_invalid(SUB("{" LOGS FL FN "}"), "mineral", "required");
	expect_invalid(SUB("{" LOGS "\"mineral\":\"granite\"," FL FN "}"),
	               "mineral", "unknown mineral 'granite'");
	expect_invalid(SUB("{" LOGS "\"mineral\":36," FL FN "}"), "mineral",
	               "mineral name");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"rho\":2.65}," FL FN "}"),
	               "mineral.k", "required");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"k\":0}," FL FN "}"),
	               "mineral.k", "> 0");
	expect_invalid(
	    SUB("{" LOGS "\"mineral\":{\"k\":36,\"mu\":44}," FL FN "}"),
	    "mineral.mu", "unknown");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"k\":36,\"method\":"
	                   "\"hill\"}," FL FN "}"),
	               "mineral.method", "constituents");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"k\":36,\"constituents\":"
	                   "[{\"mineral\":\"quartz\",\"fraction\":1}]}," FL FN
	                   "}"),
	               "mineral.k", "not both");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"constituents\":[{"
	                   "\"mineral\":\"quartz\",\"fraction\":0.5}]}," FL FN
	                   "}"),
	               "mineral.constituents", "sum to 0.5");
	expect_invalid(SUB("{" LOGS "\"mineral\":{\"constituents\":[{"
	                   "\"mineral\":\"quartz\",\"fraction\":1}],"
	                   "\"method\":\"all\"}," FL FN "}"),
	               "mineral.method", "hs_lower");
	expect_invalid(SUB("{\"k_dry\":5,\"mu_dry\":4,\"porosity\":0.2,"
	                   "\"mineral\":{\"k\":36}," FN "}"),
	               "mineral.rho", "dry frame");
	expect_invalid(SUB("{" LOGS
	                   "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":"
	                   "2.8}," FN "}"),
	               "fluid_in_place.rho", "required");
	expect_invalid(SUB("{" LOGS
	                   "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":"
	                   "-2.8,\"rho\":1}," FN "}"),
	               "fluid_in_place.k", "> 0");
	expect_invalid(SUB("{" LOGS
	                   "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":"
	                   "2.8,\"rho\":1,\"brine\":{\"salinity\":0}}," FN "}"),
	               "fluid_in_place.brine", "not both");
	expect_invalid(SUB("{" LOGS "\"mineral\":\"quartz\",\"pressure\":20,"
	                   "\"temperature\":60," FL FN "}"),
	               "pressure", "not used");
	expect_invalid(SUB("{" LOGS
	                   "\"mineral\":\"quartz\",\"temperature\":60," FL
	                   "\"fluid_new\":{\"gas\":{\"gravity\":0.6}}}"),
	               "pressure", "required");
	expect_invalid(SUB("{" LOGS "\"mineral\":\"quartz\",\"pressure\":20,"
	                   "\"temperature\":60," FL "\"fluid_new\":{\"brine\":"
	                   "{\"salinity\":0},\"gas\":{\"gravity\":0.6},"
	                   "\"saturation\":{\"brine\":0.5,\"gas\":0.6}}}"),
	               "fluid_new.saturation", "sum to 1.1");
	expect_invalid(SUB("{\"vp\":[3000,3100],\"vs\":1600,\"rho\":2.25,"
	                   "\"porosity\":0.25,\"mineral\":\"quartz\","
	                   "\"pressure\":20,\"temperature\":60," FL
	                   "\"fluid_new\":{\"brine\":{\"salinity\":0},\"gas\":"
	                   "{\"gravity\":0.6},\"saturation\":{\"brine\":[1,0.5,"
	                   "0],\"gas\":[0,0.5,1]}}}"),
	               "fluid_new.saturation.brine", "length 2 of 'vp'");
	expect_invalid(
	    SUB("{" LOGS "\"mineral\":\"quartz\"," FL FN ",\"phi\":0.2}"),
	    "phi", "unknown");
}

/* The substituted rock gets the elastic plausibility checks: brine to gas
 * lowers Poisson's ratio (common practice), here from about 0.30 to about
 * 0.16 (vp/vs 1.875 before, about 1.58 after), so a minimum of 0.2
 * flags it (bit 4) and the defaults (0 to 0.5) do not. */
static void test_output_plausibility(void **state)
{
	cJSON *r;
	(void)state;

	r = call("{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	         "\"rock.substitute\",\"params\":{\"vp\":3000,\"vs\":1600,"
	         "\"rho\":2.25,\"porosity\":0.25,\"mineral\":\"quartz\","
	         "\"fluid_in_place\":{\"k\":2.6,\"rho\":1.03},"
	         "\"fluid_new\":{\"k\":0.06,\"rho\":0.2}}}");
	assert_int_equal(qc_at(result_of(r), 0), 0);
	cJSON_Delete(r);
	r = call("{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	         "\"rock.substitute\",\"params\":{\"vp\":3000,\"vs\":1600,"
	         "\"rho\":2.25,\"porosity\":0.25,\"mineral\":\"quartz\","
	         "\"fluid_in_place\":{\"k\":2.6,\"rho\":1.03},"
	         "\"fluid_new\":{\"k\":0.06,\"rho\":0.2},\"qc\":{"
	         "\"nu_min\":0.2}}}");
	assert_int_equal(qc_at(result_of(r), 0), 1u << 4);
	/* the values are unchanged by the flag */
	assert_true(fabs(num(result_of(r), "rho") - 2.0425) < 1e-12);
	cJSON_Delete(r);
	expect_invalid("{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	               "\"rock.substitute\",\"params\":{\"vp\":3000,"
	               "\"vs\":1600,\"rho\":2.25,\"porosity\":0.25,"
	               "\"mineral\":\"quartz\",\"fluid_in_place\":{\"k\":2.6,"
	               "\"rho\":1.03},\"fluid_new\":{\"k\":0.06,\"rho\":0.2},"
	               "\"qc\":{\"nu\":1}}}",
	               "qc.nu", "unknown");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_worked_example),
	    cmocka_unit_test(test_round_trip),
	    cmocka_unit_test(test_sweep),
	    cmocka_unit_test(test_units),
	    cmocka_unit_test(test_frame),
	    cmocka_unit_test(test_qc),
	    cmocka_unit_test(test_errors),
	    cmocka_unit_test(test_output_plausibility),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, setup, teardown);
}
