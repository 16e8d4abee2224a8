/* Protocol tests of the reflect family: reflect.interface, reflect.series,
 * reflect.impedance and reflect.vti through rw_proto_handle. Shapes and
 * broadcasting, units (angles in rad, velocities in km/s), QC flags and
 * nulls, every -32602 path with the parameter it names, the work limit,
 * physics checks against facts of the trade (normal-incidence coefficient,
 * Snell's law, energy conservation, total reflection), and the AVO classes
 * of shale/sand interfaces built with the project's own fluid substitution
 * (rw_rock_fluid_subst, rw_fluid_brine_props, rw_fluid_gas_props). */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>

#include <gsl/gsl_errno.h>

#include "proto/harness.h"
#include "rockwire/fluid.h"
#include "rockwire/rock.h"
#include "rockwire/status.h"

#define REQ(method, params)                                                    \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"" method                   \
	"\",\"params\":" params "}"

/* QC bits as documented in protocol-docs/reflect.md (the test uses the
 * published numbers, not the daemon's macros). */
#define B_INPUT_INVALID (1u << 0)
#define B_RHO_NONPOS    (1u << 1)
#define B_NU_IMPOSSIBLE (1u << 2)
#define B_NU_NEGATIVE   (1u << 4)
#define B_MEDIUM        (1u << 16)
#define B_POSTCRIT      (1u << 17)
#define B_UNDEFINED     (1u << 18)
#define B_NO_CRIT_P     (1u << 19)
#define B_NO_CRIT_S     (1u << 20)
#define B_POSTCRIT_S    (1u << 21)
#define B_UNSTABLE      (1u << 22)
#define B_MISSING       (1u << 28)

static const double DEG = 3.14159265358979323846 / 180.0;

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
		fail_msg("%s -> %s", line, h->out.data ? h->out.data : "");
	return r;
}

static void expect_error(harness *h, const char *line, int code,
                         const char *param)
{
	cJSON *r = h_call(h, line);
	if (!r)
		fail_msg("no JSON response for %s: '%s'", line, h->out.data);
	if (h_code(r) != code)
		fail_msg("%s: code %d, want %d (%s)", line, h_code(r), code,
		         h->out.data);
	if (param && strcmp(h_param(r), param) != 0)
		fail_msg("%s: param '%s', want '%s' (%s)", line, h_param(r),
		         param, h->out.data);
	cJSON_Delete(r);
}

/* Element of a result member: idx < 0 skips a level (scalar member). */
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
	if (!cJSON_IsNumber(v))
		fail_msg("%s[%d][%d] is not a number", m, i, j);
	return v->valuedouble;
}

static int is_null(const cJSON *r, const char *m, int i, int j)
{
	return cJSON_IsNull(at(r, m, i, j));
}

static unsigned flags(const cJSON *r, const char *m, int i, int j)
{
	return (unsigned)num(r, m, i, j);
}

static const char *str(const cJSON *r, const char *m, int i)
{
	const cJSON *v = at(r, m, i, -1);
	return cJSON_IsString(v) ? v->valuestring : "(not a string)";
}

static const char *unit(const cJSON *r, const char *m)
{
	const cJSON *u =
	    cJSON_GetObjectItemCaseSensitive(h_result(r, "units"), m);
	return cJSON_IsString(u) ? u->valuestring : "";
}

/* ---- reflect.interface ------------------------------------------------ */

#define SH "{\"vp\":2400,\"vs\":1000,\"rho\":2.25}"
#define SD "{\"vp\":2200,\"vs\":1300,\"rho\":2.0}"

static void test_interface_shapes(void **state)
{
	harness *h = *state;
	cJSON *r;

	/* one interface, angles array: arrays over angles */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":" SD
	                   ",\"angle\":[0,10,20],\"methods\":[\"zoeppritz\","
	                   "\"shuey3\"]}"));
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_re")), 3);
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_shuey3")), 3);
	assert_int_equal(cJSON_GetArraySize(h_result(r, "qc")), 3);
	assert_true(cJSON_IsNumber(h_result(r, "intercept")));
	assert_true(cJSON_IsString(h_result(r, "class")));
	assert_null(h_result(r, "rpp_aki_richards")); /* not requested */
	assert_string_equal(unit(r, "rpp_phase"), "deg");
	assert_string_equal(unit(r, "angle"), "deg");
	/* normal incidence: (Z2 - Z1) / (Z2 + Z1), Aki & Richards 1980
	 * sec. 5.2 (a fact of the trade) */
	assert_true(fabs(num(r, "rpp_re", 0, -1) -
	                 (4400.0 - 5400.0) / (4400.0 + 5400.0)) < 1e-12);
	assert_true(fabs(num(r, "rpp_phase", 0, -1) - 180.0) < 1e-9);
	assert_true(fabs(num(r, "rps_re", 0, -1)) < 1e-15);
	assert_true(fabs(num(r, "rps_phase", 0, -1)) < 1e-15);
	cJSON_Delete(r);

	/* many interfaces, many angles: [interface][angle] */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":[2400,2400],\"vs\":1000,"
	                   "\"rho\":2.25},\"lower\":{\"vp\":[2200,2600],"
	                   "\"vs\":1300,\"rho\":2.0},\"angle\":[0,10,20,30],"
	                   "\"methods\":\"aki_richards\"}"));
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_aki_richards")),
	                 2);
	assert_int_equal(cJSON_GetArraySize(at(r, "rpp_aki_richards", 1, -1)),
	                 4);
	assert_int_equal(cJSON_GetArraySize(at(r, "qc", 1, -1)), 4);
	assert_int_equal(cJSON_GetArraySize(h_result(r, "class")), 2);
	assert_int_equal(cJSON_GetArraySize(h_result(r, "critical_p")), 2);
	assert_null(h_result(r, "rpp_re")); /* zoeppritz not requested */
	/* the second interface has a faster lower medium: Snell's law
	 * asin(vp1 / vp2) */
	assert_true(fabs(num(r, "critical_p", 1, -1) -
	                 asin(2400.0 / 2600.0) / DEG) < 1e-9);
	assert_true(is_null(r, "critical_p", 0, -1));
	assert_true(flags(r, "qc_interface", 0, -1) & B_NO_CRIT_P);
	assert_false(flags(r, "qc_interface", 1, -1) & B_NO_CRIT_P);
	assert_true(flags(r, "qc_interface", 1, -1) & B_NO_CRIT_S);
	cJSON_Delete(r);

	/* many interfaces, one angle: arrays over interfaces */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":{\"vp\":[2200,2600],"
	                   "\"vs\":1300,\"rho\":2.0},\"angle\":15}"));
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_re")), 2);
	assert_true(cJSON_IsNumber(at(r, "rpp_re", 1, -1)));
	assert_true(cJSON_IsNumber(h_result(r, "angle")));
	cJSON_Delete(r);

	/* no angle: normal incidence, scalars */
	r = ok_call(
	    h, REQ("reflect.interface", "{\"upper\":" SH ",\"lower\":" SD "}"));
	assert_true(cJSON_IsNumber(h_result(r, "rpp_re")));
	assert_int_equal((int)num(r, "angle", -1, -1), 0);
	cJSON_Delete(r);
}

static void test_interface_units(void **state)
{
	harness *h = *state;
	cJSON *a, *b;

	a = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":{\"vp\":2900,\"vs\":"
	                   "1500,\"rho\":2.3},\"angle\":[30,60],\"methods\":"
	                   "[\"zoeppritz\",\"fatti\"]}"));
	b = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":2.4,\"vs\":1.0,\"rho\":2250},"
	                   "\"lower\":{\"vp\":2.9,\"vs\":1.5,\"rho\":2300},"
	                   "\"angle\":[0.5235987755982988,1.0471975511965976],"
	                   "\"methods\":[\"zoeppritz\",\"fatti\"],\"units\":{"
	                   "\"velocity\":\"km/s\",\"angle\":\"rad\","
	                   "\"density\":\"kg/m3\"}}"));
	for (int j = 0; j < 2; j++) {
		assert_true(fabs(num(a, "rpp_re", j, -1) -
		                 num(b, "rpp_re", j, -1)) < 1e-12);
		assert_true(fabs(num(a, "rpp_phase", j, -1) * DEG -
		                 num(b, "rpp_phase", j, -1)) < 1e-12);
	}
	assert_true(fabs(num(a, "critical_p", -1, -1) * DEG -
	                 num(b, "critical_p", -1, -1)) < 1e-12);
	assert_string_equal(unit(b, "critical_p"), "rad");
	assert_string_equal(unit(b, "angle"), "rad");
	/* 60 deg is past asin(2.4 / 2.9) = 55.9 deg: the exact coefficient
	 * is complex and the linearised form is null */
	assert_true(flags(a, "qc", 1, -1) & B_POSTCRIT);
	assert_true(is_null(a, "rpp_fatti", 1, -1));
	assert_false(is_null(a, "rpp_fatti", 0, -1));
	assert_true(fabs(num(a, "rpp_im", 1, -1)) > 1e-3);
	cJSON_Delete(a);
	cJSON_Delete(b);
}

/* Energy flux normal to the interface is conserved below the critical
 * angles (Aki & Richards 1980, sec. 5.2.5; a fact of plane-wave physics):
 * for an incident P wave from a fluid,
 *   |Rpp|^2 + Z2 cos(t2) |Tpp|^2 / (Z1 cos t1)
 *           + rho2 vs2 cos(j2) |Tps|^2 / (Z1 cos t1) = 1. */
static void test_interface_energy(void **state)
{
	harness *h = *state;
	const double vp1 = 1500, r1 = 1000, vp2 = 3000, vs2 = 1600, r2 = 2300;
	cJSON *r =
	    ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":1500,\"vs\":0,\"rho\":1.0},"
	                   "\"lower\":{\"vp\":3000,\"vs\":1600,\"rho\":2.3},"
	                   "\"angle\":[0,10,20,29]}"));
	const double th[4] = {0, 10, 20, 29};

	for (int j = 0; j < 4; j++) {
		double t = th[j] * DEG, p = sin(t) / vp1;
		double c1 = cos(t), c2 = sqrt(1 - p * p * vp2 * vp2);
		double cj = sqrt(1 - p * p * vs2 * vs2);
		double e = pow(num(r, "rpp_abs", j, -1), 2) +
		           r2 * vp2 * c2 * pow(num(r, "tpp_abs", j, -1), 2) /
		               (r1 * vp1 * c1) +
		           r2 * vs2 * cj * pow(num(r, "tps_abs", j, -1), 2) /
		               (r1 * vp1 * c1);
		assert_true(fabs(e - 1.0) < 1e-10);
		/* a fluid upper medium reflects no S wave */
		assert_true(fabs(num(r, "rps_abs", j, -1)) < 1e-15);
	}
	assert_true(fabs(num(r, "critical_p", -1, -1) - asin(vp1 / vp2) / DEG) <
	            1e-9);
	assert_true(fabs(num(r, "critical_s", -1, -1) - asin(vp1 / vs2) / DEG) <
	            1e-9);
	cJSON_Delete(r);
}

/* Total reflection between two fluids past the critical angle: |R| = 1
 * with the phase of the acoustic coefficient R = (rho2 q1 - rho1 q2) /
 * (rho2 q1 + rho1 q2), q2 = +i sqrt(p^2 - 1/vp2^2) for exp(-i w t) (Aki &
 * Richards 1980, sec. 5.2; written here from the textbook acoustic case,
 * from memory). */
static void test_interface_total_reflection(void **state)
{
	harness *h = *state;
	cJSON *r =
	    ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":1500,\"vs\":0,\"rho\":1.0},"
	                   "\"lower\":{\"vp\":2500,\"vs\":0,\"rho\":2.0},"
	                   "\"angle\":[50,70]}"));
	const double th[2] = {50, 70};

	for (int j = 0; j < 2; j++) {
		double p = sin(th[j] * DEG) / 1500.0;
		double q1 = cos(th[j] * DEG) / 1500.0;
		double q2 = sqrt(p * p - 1.0 / (2500.0 * 2500.0));
		double phase = -2.0 * atan(1000.0 * q2 / (2000.0 * q1));
		assert_true(fabs(num(r, "rpp_abs", j, -1) - 1.0) < 1e-12);
		assert_true(fabs(num(r, "rpp_phase", j, -1) * DEG - phase) <
		            1e-10);
		assert_true(flags(r, "qc", j, -1) & B_POSTCRIT);
	}
	cJSON_Delete(r);
}

/* The linearisations agree with the exact coefficient at small contrasts
 * and moderate angles (common practice: within about 0.01 below 30 deg
 * for contrasts near 10 %). The lower density follows Gardner's
 * rho ~ vp^(1/4) (Gardner et al. 1974), 2.4 * 1.1^0.25 = 2.4579, because
 * Smith & Gidlow 1987 assume it. */
static void test_interface_linear_close(void **state)
{
	harness *h = *state;
	static const char *const keys[] = {
	    "rpp_aki_richards", "rpp_shuey3",      "rpp_fatti",
	    "rpp_gray_lmr",     "rpp_gray_kmr",    "rpp_shuey2",
	    "rpp_hilterman",    "rpp_smith_gidlow"};
	cJSON *r = ok_call(
	    h, REQ("reflect.interface",
	           "{\"upper\":{\"vp\":3000,\"vs\":1500,\"rho\":2.4},"
	           "\"lower\":{\"vp\":3300,\"vs\":1650,\"rho\":2.4579},"
	           "\"angle\":[0,10,20,25],\"methods\":[\"zoeppritz\","
	           "\"aki_richards\",\"shuey2\",\"shuey3\",\"hilterman\","
	           "\"fatti\",\"gray_lmr\",\"gray_kmr\",\"smith_gidlow\"]}"));

	for (size_t k = 0; k < sizeof keys / sizeof keys[0]; k++)
		for (int j = 0; j < 4; j++) {
			double d =
			    num(r, keys[k], j, -1) - num(r, "rpp_re", j, -1);
			if (fabs(d) > 0.01)
				fail_msg("%s at angle %d off by %g", keys[k], j,
				         d);
		}
	assert_int_equal(flags(r, "qc", 3, -1), 0);
	cJSON_Delete(r);
}

static void test_interface_qc(void **state)
{
	harness *h = *state;
	cJSON *r;

	/* an impossible medium (3 vp^2 <= 4 vs^2), a null sample, a negative
	 * density, and a negative Poisson's ratio */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":{\"vp\":[2000,null,"
	                   "2000,2000],\"vs\":[1800,1000,1000,1500],\"rho\":"
	                   "[2.2,2.2,-1,2.2]},\"angle\":[0,20],\"methods\":"
	                   "[\"zoeppritz\",\"shuey3\"]}"));
	assert_true(flags(r, "qc", 0, 0) & B_MEDIUM);
	assert_true(flags(r, "qc", 0, 0) & B_NU_IMPOSSIBLE);
	assert_true(is_null(r, "rpp_re", 0, 0));
	assert_true(is_null(r, "rpp_shuey3", 0, 1));
	assert_true(is_null(r, "intercept", 0, -1));
	assert_true(is_null(r, "class", 0, -1));
	/* a null sample is missing, not invalid */
	assert_true(flags(r, "qc_interface", 1, -1) & B_MISSING);
	assert_false(flags(r, "qc_interface", 1, -1) & B_INPUT_INVALID);
	assert_true(is_null(r, "rpp_re", 1, 1));
	assert_true(flags(r, "qc", 2, 1) & B_RHO_NONPOS);
	assert_true(flags(r, "qc_interface", 3, -1) & B_NU_NEGATIVE);
	assert_false(flags(r, "qc_interface", 3, -1) & B_MEDIUM);
	assert_false(is_null(r, "rpp_re", 3, 1));
	cJSON_Delete(r);

	/* 90 deg: exact coefficient -1 (grazing incidence), linearised
	 * forms undefined */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":" SD ",\"angle\":90,"
	                   "\"methods\":[\"zoeppritz\",\"shuey2\"]}"));
	assert_true(fabs(num(r, "rpp_re", -1, -1) + 1.0) < 1e-9);
	assert_true(is_null(r, "rpp_shuey2", -1, -1));
	assert_true(flags(r, "qc", -1, -1) & B_UNDEFINED);
	cJSON_Delete(r);

	/* gray_lmr is undefined for a mean lambda of zero (vs = vp/sqrt 2
	 * on both sides); the other methods are still given */
	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":2000,\"vs\":1414.2135623730951,"
	                   "\"rho\":2.2},\"lower\":{\"vp\":2200,\"vs\":"
	                   "1555.6349186104046,\"rho\":2.3},\"angle\":10,"
	                   "\"methods\":[\"gray_lmr\",\"gray_kmr\"]}"));
	assert_true(is_null(r, "rpp_gray_lmr", -1, -1));
	assert_false(is_null(r, "rpp_gray_kmr", -1, -1));
	assert_true(flags(r, "qc", -1, -1) & B_UNDEFINED);
	cJSON_Delete(r);

	r = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":2000,\"vs\":900,\"rho\":2.2},"
	                   "\"lower\":{\"vp\":1900,\"vs\":1300,\"rho\":2.5},"
	                   "\"angle\":[0,70],\"methods\":[\"zoeppritz\","
	                   "\"shuey3\"]}"));
	/* vp2 < vp1: no P critical angle; vs2 < vp1: no S one either */
	assert_int_equal(flags(r, "qc", 1, -1), 0);
	assert_false(is_null(r, "rpp_shuey3", 1, -1));
	assert_int_equal(flags(r, "qc_interface", -1, -1),
	                 B_NO_CRIT_P | B_NO_CRIT_S);
	cJSON_Delete(r);
}

/* Past the P critical angle the linearised forms are null, the exact
 * ones complex; the S critical angle (asin(vp1 / vs2)) always lies above
 * the P one because vs2 < vp2. A fluid upper medium over a fast solid. */
static void test_interface_postcritical(void **state)
{
	harness *h = *state;
	cJSON *r =
	    ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":{\"vp\":1500,\"vs\":0,\"rho\":1.0},"
	                   "\"lower\":{\"vp\":3500,\"vs\":2000,\"rho\":"
	                   "2.4},\"angle\":[20,30,60],\"methods\":["
	                   "\"zoeppritz\",\"aki_richards\"]}"));
	/* P critical asin(1500/3500) = 25.4 deg, S critical asin(0.75) =
	 * 48.6 deg */
	assert_true(num(r, "critical_p", -1, -1) <
	            num(r, "critical_s", -1, -1));
	assert_int_equal(flags(r, "qc", 0, -1), 0);
	assert_false(is_null(r, "rpp_aki_richards", 0, -1));
	/* 30 deg lies past the P and below the S critical angle; 60 deg
	 * past both */
	assert_int_equal(flags(r, "qc", 1, -1), B_POSTCRIT);
	assert_int_equal(flags(r, "qc", 2, -1), B_POSTCRIT | B_POSTCRIT_S);
	for (int j = 1; j < 3; j++) {
		assert_true(is_null(r, "rpp_aki_richards", j, -1));
		assert_false(is_null(r, "rpp_re", j, -1));
	}
	/* between the two critical angles no transmitted P energy leaves:
	 * the reflected amplitude is below 1 because S is still
	 * transmitted; past both it is total reflection, |Rpp| = 1 (energy
	 * conservation, Aki & Richards 1980 sec. 5.2.5) */
	assert_true(num(r, "rpp_abs", 1, -1) < 1.0);
	assert_true(fabs(num(r, "rpp_abs", 2, -1) - 1.0) < 1e-12);
	cJSON_Delete(r);
}

static void test_interface_errors(void **state)
{
	harness *h = *state;
	const int E = -32602;

	expect_error(h, REQ("reflect.interface", "{\"lower\":" SD "}"), E,
	             "upper");
	expect_error(h, REQ("reflect.interface", "{\"upper\":" SH "}"), E,
	             "lower");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":{\"vp\":1,\"vs\":1},\"lower\":" SD "}"),
	             E, "upper.rho");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":{\"vp\":\"x\",\"vs\":1,"
	                 "\"rho\":2}}"),
	             E, "lower.vp");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":{\"vp\":2,\"vs\":1,"
	                 "\"rho\":2,\"vq\":1}}"),
	             E, "lower.vq");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":{\"vp\":[1,2],\"vs\":1,\"rho\":2},"
	                 "\"lower\":{\"vp\":2,\"vs\":[1,2,3],\"rho\":2}}"),
	             E, "lower.vs");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":{\"vp\":[1,2],\"vs\":[1,2,3],\"rho\":2},"
	                 "\"lower\":" SD "}"),
	             E, "upper.vs");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"angle\":[0,"
	                 "95]}"),
	             E, "angle");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"angle\":-1}"),
	             E, "angle");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"angle\":"
	                 "\"30\"}"),
	             E, "angle");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"methods\":"
	                 "\"shuey\"}"),
	             E, "methods");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"methods\":["
	                 "\"shuey2\",\"shuey2\"]}"),
	             E, "methods");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"methods\":["
	                 "\"shuey2\",3]}"),
	             E, "methods");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"methods\":[]}"),
	             E, "methods");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"methods\":7}"),
	             E, "methods");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"class\":{"
	                 "\"a_small\":-0.1}}"),
	             E, "class.a_small");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"class\":{"
	                 "\"theta_max\":90}}"),
	             E, "class.theta_max");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"class\":{"
	                 "\"theta\":30}}"),
	             E, "class.theta");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"class\":3}"),
	             E, "class");
	expect_error(h,
	             REQ("reflect.interface",
	                 "{\"upper\":" SH ",\"lower\":" SD ",\"upper2\":1}"),
	             E, "upper2");
	expect_error(
	    h, REQ("reflect.interface", "{\"upper\":[1,2],\"lower\":" SD "}"),
	    E, "upper");
}

static void test_interface_limit(void **state)
{
	proto_limits lim;
	harness h;
	(void)state;

	proto_limits_default(&lim);
	lim.max_work = 10;
	h.ctx = proto_ctx_new(&lim);
	h.s = proto_session_new(h.ctx);
	proto_buf_init(&h.out);
	/* 3 interfaces x 4 angles = 12 > 10 */
	expect_error(&h,
	             REQ("reflect.interface",
	                 "{\"upper\":{\"vp\":[2,2,2],\"vs\":1,\"rho\":2},"
	                 "\"lower\":" SD ",\"angle\":[0,1,2,3]}"),
	             -32001, NULL);
	/* 2 x 4 = 8 passes */
	cJSON *r = ok_call(&h, REQ("reflect.interface",
	                           "{\"upper\":{\"vp\":[2000,2100],\"vs\":1000,"
	                           "\"rho\":2},\"lower\":" SD
	                           ",\"angle\":[0,1,2,3]}"));
	cJSON_Delete(r);
	expect_error(&h,
	             REQ("reflect.series",
	                 "{\"vp\":[2000,2100,2200,2300],\"vs\":1000,"
	                 "\"rho\":2,\"angle\":[0,1,2,3]}"),
	             -32001, NULL);
	h_free(&h);
}

/* Explicit overridable class thresholds: a_small widens the near-zero
 * band (Rutherford & Williams 1989 class II: intercept near zero). */
static void test_interface_class_params(void **state)
{
	harness *h = *state;
	/* A = 1/2 (dvp/vp + drho/rho): about +0.045 here */
	const char *base = "{\"upper\":{\"vp\":2800,\"vs\":1300,\"rho\":2.3},"
	                   "\"lower\":{\"vp\":3000,\"vs\":1700,\"rho\":2.4}";
	char line[512];
	cJSON *r;

	snprintf(line, sizeof line, REQ("reflect.interface", "%s}"), base);
	r = ok_call(h, line);
	assert_true(num(r, "intercept", -1, -1) > 0.02);
	assert_true(num(r, "gradient", -1, -1) < 0);
	assert_string_equal(str(r, "class", -1), "I");
	assert_true(fabs(num(r, "class_a_small", -1, -1) - 0.02) < 1e-15);
	cJSON_Delete(r);
	snprintf(line, sizeof line,
	         REQ("reflect.interface", "%s,\"class\":{\"a_small\":0.06,"
	                                  "\"theta_max\":40}}"),
	         base);
	r = ok_call(h, line);
	/* |A| <= 0.06 and A + B sin^2(40) < 0: polarity reversal, IIp */
	assert_string_equal(str(r, "class", -1), "IIp");
	assert_true(fabs(num(r, "class_theta_max", -1, -1) - 40) < 1e-12);
	cJSON_Delete(r);
}

/* ---- AVO classes from the project's own fluid substitution ------------ */

/* Scenario (invented): a soft shale over three sands at 30 MPa pore
 * pressure, 80 degC, brine of 80000 ppm NaCl and a gas of gravity 0.65.
 * The measured (brine) sands: a moderately consolidated sand whose
 * impedance nearly matches the shale, and a tight sand; each is
 * substituted to gas with Gassmann (rw_rock_fluid_subst). What a
 * practitioner expects (common practice, after Rutherford & Williams 1989
 * and Castagna, Swan & Foster 1998): the impedance-matched brine sand is
 * class II, the same sand with gas class III, the tight sand class I with
 * either fluid; gas lowers both AI and vp/vs. */
static void class_of(harness *h, const rw_rock_subst *sand, char *cls, size_t n,
                     double *a, double *b)
{
	char line[512];
	cJSON *r;

	snprintf(line, sizeof line,
	         REQ("reflect.interface",
	             "{\"upper\":{\"vp\":2900,\"vs\":1350,\"rho\":2450},"
	             "\"lower\":{\"vp\":%.17g,\"vs\":%.17g,\"rho\":%.17g},"
	             "\"units\":{\"density\":\"kg/m3\"}}"),
	         sand->vp_ms, sand->vs_ms, sand->rho_kgm3);
	r = ok_call(h, line);
	snprintf(cls, n, "%s", str(r, "class", -1));
	*a = num(r, "intercept", -1, -1);
	*b = num(r, "gradient", -1, -1);
	cJSON_Delete(r);
}

static void test_avo_classes_fluid_subst(void **state)
{
	harness *h = *state;
	rw_fluid_phase brine, gas;
	rw_rock_subst soft_b, soft_g, tight_b, tight_g;
	const double k_quartz = 36.6e9; /* Mavko et al. 2009 table, from
	                                 * memory */
	char cls[16];
	double a, b;

	assert_int_equal(rw_fluid_brine_props(30, 80, 0.08, &brine, NULL),
	                 RW_OK);
	assert_int_equal(rw_fluid_gas_props(30, 80, 0.65, &gas, NULL, NULL),
	                 RW_OK);
	/* soft sand "measured" with brine: phi 0.25; tight sand phi 0.08 */
	soft_b = (rw_rock_subst){3150, 1650, 2230, 0, 0, 0};
	tight_b = (rw_rock_subst){4300, 2650, 2520, 0, 0, 0};
	assert_int_equal(rw_rock_fluid_subst(3150, 1650, 2230, 0.25, k_quartz,
	                                     brine.k_pa, brine.rho_kgm3,
	                                     gas.k_pa, gas.rho_kgm3, &soft_g,
	                                     NULL),
	                 RW_OK);
	assert_int_equal(rw_rock_fluid_subst(4300, 2650, 2520, 0.08, k_quartz,
	                                     brine.k_pa, brine.rho_kgm3,
	                                     gas.k_pa, gas.rho_kgm3, &tight_g,
	                                     NULL),
	                 RW_OK);
	/* a lighter fluid lowers AI and vp/vs (Gassmann: K falls, mu
	 * stays, density falls less than K) */
	assert_true(soft_g.vp_ms * soft_g.rho_kgm3 <
	            soft_b.vp_ms * soft_b.rho_kgm3);
	assert_true(soft_g.vp_ms / soft_g.vs_ms < soft_b.vp_ms / soft_b.vs_ms);
	assert_true(tight_g.vp_ms * tight_g.rho_kgm3 <
	            tight_b.vp_ms * tight_b.rho_kgm3);
	assert_true(tight_g.vp_ms / tight_g.vs_ms <
	            tight_b.vp_ms / tight_b.vs_ms);

	class_of(h, &soft_b, cls, sizeof cls, &a, &b);
	assert_string_equal(cls, "II");
	class_of(h, &soft_g, cls, sizeof cls, &a, &b);
	assert_string_equal(cls, "III");
	assert_true(a < -0.05 && b < 0);
	class_of(h, &tight_b, cls, sizeof cls, &a, &b);
	assert_string_equal(cls, "I");
	class_of(h, &tight_g, cls, sizeof cls, &a, &b);
	assert_string_equal(cls, "I");
}

/* Class IV (Castagna, Swan & Foster 1998): a soft gas sand under a hard,
 * fast shale or tight layer, with A < 0 and a gradient that turns
 * positive because the sand's vs is lower than the cap's. */
static void test_avo_class_iv(void **state)
{
	harness *h = *state;
	cJSON *r = ok_call(h, REQ("reflect.interface",
	                          "{\"upper\":{\"vp\":3300,\"vs\":1900,\"rho\":"
	                          "2.45},\"lower\":{\"vp\":2600,\"vs\":1550,"
	                          "\"rho\":2.1}}"));
	assert_true(num(r, "intercept", -1, -1) < -0.02);
	assert_true(num(r, "gradient", -1, -1) >= 0);
	assert_string_equal(str(r, "class", -1), "IV");
	cJSON_Delete(r);
}

/* ---- reflect.series ---------------------------------------------------- */

static void test_series(void **state)
{
	harness *h = *state;
	cJSON *r, *q;

	r = ok_call(h, REQ("reflect.series",
	                   "{\"vp\":[2400,2200,2600,null],\"vs\":[1000,1300,"
	                   "1200,1200],\"rho\":[2.25,2.0,2.3,2.3],\"depth\":["
	                   "1000,1010,1030,1031],\"time\":[1.0,1.008,1.02,"
	                   "1.021],\"angle\":[0,30],\"methods\":[\"zoeppritz\","
	                   "\"shuey3\"]}"));
	assert_int_equal((int)num(r, "n_interfaces", -1, -1), 3);
	/* layout [angle][interface] */
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_re")), 2);
	assert_int_equal(cJSON_GetArraySize(at(r, "rpp_re", 0, -1)), 3);
	assert_int_equal(cJSON_GetArraySize(at(r, "qc", 1, -1)), 3);
	/* interface positions halfway between samples */
	assert_true(fabs(num(r, "depth", 0, -1) - 1005) < 1e-12);
	assert_true(fabs(num(r, "depth", 1, -1) - 1020) < 1e-12);
	assert_true(fabs(num(r, "time", 2, -1) - 1.0205) < 1e-12);
	assert_string_equal(unit(r, "depth"), "m");
	/* the null sample nulls the interfaces on both sides of it only */
	assert_true(is_null(r, "rpp_re", 1, 2));
	assert_true(flags(r, "qc", 1, 2) & B_MISSING);
	assert_true(flags(r, "qc_interface", 2, -1) & B_MEDIUM);
	assert_false(is_null(r, "rpp_re", 1, 1));
	/* same numbers as reflect.interface for the same pair */
	q = ok_call(h, REQ("reflect.interface",
	                   "{\"upper\":" SH ",\"lower\":" SD ",\"angle\":[0,"
	                   "30],\"methods\":[\"zoeppritz\",\"shuey3\"]}"));
	for (int j = 0; j < 2; j++) {
		assert_true(num(r, "rpp_re", j, 0) == num(q, "rpp_re", j, -1));
		assert_true(num(r, "rpp_shuey3", j, 0) ==
		            num(q, "rpp_shuey3", j, -1));
	}
	assert_true(num(r, "intercept", 0, -1) == num(q, "intercept", -1, -1));
	cJSON_Delete(q);
	cJSON_Delete(r);

	/* layer tops; one angle: arrays over interfaces */
	r = ok_call(h, REQ("reflect.series",
	                   "{\"vp\":[2400,2200,2600],\"vs\":[1000,1300,1200],"
	                   "\"rho\":[2.25,2.0,2.3],\"depth\":[1000,1010,1030],"
	                   "\"position\":\"layer_top\",\"angle\":20,"
	                   "\"units\":{\"length\":\"ft\"}}"));
	assert_true(fabs(num(r, "depth", 0, -1) - 1010) < 1e-9);
	assert_true(fabs(num(r, "depth", 1, -1) - 1030) < 1e-9);
	assert_string_equal(unit(r, "depth"), "ft");
	assert_true(cJSON_IsNumber(at(r, "rpp_re", 1, -1)));
	assert_null(h_result(r, "time"));
	cJSON_Delete(r);
}

/* `fields` over per-cell outputs: the cells keep only the selected
 * members (driver.c packs them), and each is the full answer's value,
 * null and QC flags included; a member left out is not written. */
static void test_series_fields(void **state)
{
	harness *h = *state;
	const char *const kept[] = {"rpp_im", "rpp_shuey3", "qc"};
	cJSON *all, *some;

#define SERIES_IN                                                              \
	"\"vp\":[2400,2200,2600,null,2500],\"vs\":[1000,1300,1200,1200,1100]," \
	"\"rho\":[2.25,2.0,2.3,2.3,2.2],\"angle\":[0,15,30,45],"               \
	"\"methods\":[\"zoeppritz\",\"shuey3\",\"aki_richards\"]"
	all = ok_call(h, REQ("reflect.series", "{" SERIES_IN "}"));
	some = ok_call(h, REQ("reflect.series",
	                      "{" SERIES_IN ",\"fields\":[\"rpp_shuey3\","
	                      "\"rpp_im\"]}"));
#undef SERIES_IN
	for (size_t f = 0; f < sizeof kept / sizeof *kept; f++)
		for (int j = 0; j < 4; j++)
			for (int i = 0; i < 4; i++) {
				const cJSON *a = at(all, kept[f], j, i);
				const cJSON *b = at(some, kept[f], j, i);
				if (cJSON_IsNull(a)) {
					assert_true(cJSON_IsNull(b));
					continue;
				}
				assert_true(cJSON_IsNumber(b));
				assert_true(a->valuedouble == b->valuedouble);
			}
	/* the interface with the null sample is null here too */
	assert_true(is_null(some, "rpp_im", 1, 2));
	assert_non_null(h_result(all, "rpp_re"));
	assert_non_null(h_result(all, "rpp_aki_richards"));
	assert_null(h_result(some, "rpp_re"));
	assert_null(h_result(some, "rpp_aki_richards"));
	assert_null(h_result(some, "intercept"));
	cJSON_Delete(some);
	cJSON_Delete(all);
}

static void test_series_errors(void **state)
{
	harness *h = *state;
	const int E = -32602;

	expect_error(
	    h, REQ("reflect.series", "{\"vp\":2400,\"vs\":1000,\"rho\":2.2}"),
	    E, "vp");
	expect_error(
	    h, REQ("reflect.series", "{\"vp\":[2400],\"vs\":1000,\"rho\":2.2}"),
	    E, "vp");
	expect_error(h,
	             REQ("reflect.series", "{\"vp\":[2400,2500],\"vs\":1000}"),
	             E, "rho");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":[1000,1,2],\"rho\":2.2}"),
	             E, "vs");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"depth\":[10,10]}"),
	             E, "depth");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"depth\":10}"),
	             E, "depth");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"depth\":[1,2,3]}"),
	             E, "depth");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"depth\":[1,null]}"),
	             E, "depth");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"time\":[2,1]}"),
	             E, "time");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"position\":\"top\"}"),
	             E, "position");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"angle\":[0,91]}"),
	             E, "angle");
	expect_error(h,
	             REQ("reflect.series",
	                 "{\"vp\":[2400,2500],\"vs\":1000,\"rho\":2.2,"
	                 "\"methods\":[\"ruger\"]}"),
	             E, "methods");
}

/* ---- reflect.impedance ------------------------------------------------- */

static void test_impedance(void **state)
{
	harness *h = *state;
	cJSON *r;

	r = ok_call(h, REQ("reflect.impedance",
	                   "{\"vp\":[2400,2200,2600,1500],\"vs\":[1000,1300,"
	                   "1200,0],\"rho\":[2.25,2.0,2.3,1.0],\"angle\":[0,"
	                   "30],\"chi\":[0,45]}"));
	/* layout [angle][sample] */
	assert_int_equal(cJSON_GetArraySize(h_result(r, "ei_norm")), 2);
	assert_int_equal(cJSON_GetArraySize(at(r, "ei_norm", 0, -1)), 4);
	assert_int_equal(cJSON_GetArraySize(at(r, "eei", 1, -1)), 4);
	/* at normal incidence EI, normalised EI and EEI(chi = 0) are the
	 * acoustic impedance (Connolly 1999; Whitcombe 2002; Whitcombe et
	 * al. 2002) */
	assert_true(fabs(num(r, "ei", 0, 0) - 2400.0 * 2250.0) < 1e-6);
	assert_true(fabs(num(r, "ei_norm", 0, 1) - 2200.0 * 2.0) < 1e-9);
	assert_true(fabs(num(r, "eei", 0, 2) - 2600.0 * 2.3) < 1e-9);
	assert_true(fabs(num(r, "ei_norm", 0, 3) - 1500.0) < 1e-9);
	assert_string_equal(unit(r, "ei_norm"), "m/s*g/cm3");
	assert_string_equal(unit(r, "ref_rho"), "g/cm3");
	/* defaults: means of the possible samples, echoed */
	assert_true(fabs(num(r, "ref_vp", -1, -1) - 2175.0) < 1e-9);
	assert_true(fabs(num(r, "ref_vs", -1, -1) - 875.0) < 1e-9);
	{
		double k = (pow(1000.0 / 2400, 2) + pow(1300.0 / 2200, 2) +
		            pow(1200.0 / 2600, 2)) /
		           4;
		assert_true(fabs(num(r, "k", -1, -1) - k) < 1e-12);
	}
	/* the fluid has no EI at 30 deg with k > 0: null, flagged */
	assert_true(is_null(r, "ei_norm", 1, 3));
	assert_true(is_null(r, "eei", 1, 3));
	assert_false(is_null(r, "ei_norm", 0, 3));
	assert_true(flags(r, "qc", 3, -1) & B_UNDEFINED);
	assert_int_equal(flags(r, "qc", 0, -1), 0);
	cJSON_Delete(r);

	/* Connolly 1999 eq. 3 (from memory): for a small contrast the
	 * normal-incidence formula applied to EI gives the Aki-Richards
	 * reflectivity at the incidence angle with a constant K:
	 * (EI2 - EI1) / (EI2 + EI1) ~ A + B sin^2 + C (tan^2 - sin^2)
	 * (shuey3 with the same K); the difference is second order. */
	r = ok_call(h, REQ("reflect.impedance",
	                   "{\"vp\":[3000,3150],\"vs\":[1500,1600],\"rho\":"
	                   "[2.40,2.45],\"angle\":25,\"k\":0.25}"));
	{
		double e1 = num(r, "ei_norm", 0, -1),
		       e2 = num(r, "ei_norm", 1, -1);
		cJSON *q = ok_call(
		    h, REQ("reflect.interface",
		           "{\"upper\":{\"vp\":3000,\"vs\":1500,\"rho\":2.40},"
		           "\"lower\":{\"vp\":3150,\"vs\":1600,\"rho\":2.45},"
		           "\"angle\":25,\"methods\":\"shuey3\"}"));
		/* vs/vp of the means is 1550 / 3075, K = 0.254 ~ 0.25 */
		assert_true(fabs((e2 - e1) / (e2 + e1) -
		                 num(q, "rpp_shuey3", -1, -1)) < 2e-3);
		cJSON_Delete(q);
	}
	assert_true(fabs(num(r, "k", -1, -1) - 0.25) < 1e-15);
	cJSON_Delete(r);

	/* explicit reference and per-sample K */
	r = ok_call(h, REQ("reflect.impedance",
	                   "{\"vp\":2.4,\"vs\":1.2,\"rho\":2300,\"angle\":0,"
	                   "\"k\":\"sample\",\"ref\":{\"vp\":2.0,\"vs\":1.0,"
	                   "\"rho\":2000},\"units\":{\"velocity\":\"km/s\","
	                   "\"density\":\"kg/m3\",\"impedance\":\"kg/m2s\"}}"));
	assert_string_equal(str(r, "k", -1), "sample");
	assert_true(fabs(num(r, "ei_norm", -1, -1) - 2400.0 * 2300.0) < 1e-6);
	assert_true(fabs(num(r, "ref_vp", -1, -1) - 2.0) < 1e-15);
	assert_null(h_result(r, "eei"));
	cJSON_Delete(r);
}

static void test_impedance_errors(void **state)
{
	harness *h = *state;
	const int E = -32602;
#define LOG "\"vp\":[2400,2500],\"vs\":[1000,1100],\"rho\":[2.2,2.3]"

	expect_error(h, REQ("reflect.impedance", "{" LOG "}"), E, "angle");
	expect_error(h, REQ("reflect.impedance", "{" LOG ",\"angle\":90}"), E,
	             "angle");
	expect_error(h, REQ("reflect.impedance", "{" LOG ",\"chi\":[0,100]}"),
	             E, "chi");
	expect_error(
	    h, REQ("reflect.impedance", "{" LOG ",\"angle\":10,\"k\":0.8}"), E,
	    "k");
	expect_error(
	    h,
	    REQ("reflect.impedance", "{" LOG ",\"angle\":10,\"k\":\"mean\"}"),
	    E, "k");
	expect_error(
	    h, REQ("reflect.impedance", "{" LOG ",\"angle\":10,\"k\":[0.2]}"),
	    E, "k");
	expect_error(h,
	             REQ("reflect.impedance",
	                 "{" LOG ",\"angle\":10,\"ref\":{\"vs\":0}}"),
	             E, "ref.vs");
	expect_error(h,
	             REQ("reflect.impedance",
	                 "{" LOG ",\"angle\":10,\"ref\":{\"vp\":[1,2]}}"),
	             E, "ref.vp");
	expect_error(h,
	             REQ("reflect.impedance",
	                 "{" LOG ",\"angle\":10,\"ref\":{\"ai\":1}}"),
	             E, "ref.ai");
	expect_error(h,
	             REQ("reflect.impedance",
	                 "{\"vp\":[2400,2500],\"vs\":[1000],\"rho\":2.2,"
	                 "\"angle\":10}"),
	             E, "vs");
	expect_error(h,
	             REQ("reflect.impedance",
	                 "{\"vp\":[2400,2500],\"rho\":2.2,\"angle\":10}"),
	             E, "vs");
#undef LOG
}

/* ---- reflect.vti ------------------------------------------------------- */

static void test_vti(void **state)
{
	harness *h = *state;
	cJSON *r;

	/* anisotropic shale over isotropic sand; Ruger 1997 (from memory):
	 * the anisotropic terms add 1/2 d(delta) sin^2 + 1/2 d(epsilon)
	 * sin^2 tan^2 to the isotropic form (d = lower - upper) */
	r = ok_call(h, REQ("reflect.vti",
	                   "{\"upper\":{\"vp0\":2400,\"vs0\":1000,\"rho\":2.25,"
	                   "\"epsilon\":0.12,\"delta\":0.06,\"gamma\":0.1},"
	                   "\"lower\":{\"vp0\":2200,\"vs0\":1300,\"rho\":2.0,"
	                   "\"epsilon\":0,\"delta\":0},\"angle\":[0,20,35]}"));
	assert_true(fabs(num(r, "rpp_ruger", 0, -1) -
	                 (4400.0 - 5400.0) / (4400.0 + 5400.0)) < 1e-12);
	for (int j = 1; j < 3; j++) {
		double t = (j == 1 ? 20 : 35) * DEG;
		double s2 = sin(t) * sin(t), t2 = tan(t) * tan(t);
		double d = 0.5 * (0 - 0.06) * s2 + 0.5 * (0 - 0.12) * s2 * t2;
		assert_true(fabs(num(r, "rpp_ruger", j, -1) -
		                 num(r, "rpp_isotropic", j, -1) - d) < 1e-12);
	}
	assert_int_equal(flags(r, "qc", 2, -1), 0);
	cJSON_Delete(r);

	/* broadcasting over interfaces; a fluid with anisotropy and an
	 * unstable medium are impossible; km/s and rad */
	r = ok_call(h, REQ("reflect.vti",
	                   "{\"upper\":{\"vp0\":[2.4,1.5,2.4],\"vs0\":[1.0,0,"
	                   "1.0],\"rho\":2.25,\"epsilon\":[0.1,0.1,0.1],"
	                   "\"delta\":[0.05,0,-0.45]},\"lower\":{\"vp0\":2.2,"
	                   "\"vs0\":1.3,\"rho\":2.0,\"epsilon\":0,\"delta\":0},"
	                   "\"angle\":0.3,\"units\":{\"velocity\":\"km/s\","
	                   "\"angle\":\"rad\"}}"));
	assert_int_equal(cJSON_GetArraySize(h_result(r, "rpp_ruger")), 3);
	assert_false(is_null(r, "rpp_ruger", 0, -1));
	assert_true(is_null(r, "rpp_ruger", 1, -1));
	assert_true(flags(r, "qc", 1, -1) & B_UNSTABLE);
	assert_true(is_null(r, "rpp_ruger", 2, -1));
	assert_true(flags(r, "qc", 2, -1) & B_MEDIUM);
	assert_true(fabs(num(r, "angle", -1, -1) - 0.3) < 1e-15);
	cJSON_Delete(r);
}

static void test_vti_errors(void **state)
{
	harness *h = *state;
	const int E = -32602;
#define VU                                                                     \
	"{\"vp0\":2400,\"vs0\":1000,\"rho\":2.25,\"epsilon\":0.1,"             \
	"\"delta\":0.05}"

	expect_error(h, REQ("reflect.vti", "{\"upper\":" VU "}"), E, "lower");
	expect_error(h,
	             REQ("reflect.vti",
	                 "{\"upper\":" VU ",\"lower\":{\"vp0\":2400,\"vs0\":"
	                 "1000,\"rho\":2.25,\"epsilon\":0.1}}"),
	             E, "lower.delta");
	expect_error(h,
	             REQ("reflect.vti",
	                 "{\"upper\":" VU ",\"lower\":" VU ",\"angle\":90}"),
	             E, "angle");
	expect_error(h,
	             REQ("reflect.vti",
	                 "{\"upper\":" VU ",\"lower\":{\"vp\":2400,\"vs0\":"
	                 "1000,\"rho\":2.25,\"epsilon\":0.1,\"delta\":0}}"),
	             E, "lower.vp");
	expect_error(h,
	             REQ("reflect.vti",
	                 "{\"upper\":{\"vp0\":[1,2],\"vs0\":1,\"rho\":2,"
	                 "\"epsilon\":0,\"delta\":0},\"lower\":{\"vp0\":[1,2,"
	                 "3],\"vs0\":1,\"rho\":2,\"epsilon\":0,\"delta\":0}}"),
	             E, "lower.vp0");
	expect_error(h,
	             REQ("reflect.vti",
	                 "{\"upper\":" VU ",\"lower\":" VU ",\"methods\":"
	                 "\"ruger\"}"),
	             E, "methods");
#undef VU
}

/* The linearised PS coefficient (method aki_richards_ps) beside the exact
 * rps. Facts the check rests on (Aki & Richards 1980, sec. 5.2.6, eq.
 * 5.46 is the first-order form of the exact solution): no conversion at
 * normal incidence, agreement with the exact coefficient to first order
 * in the contrasts (halving every contrast roughly halves the relative
 * difference), no value for a fluid (no S wave) or past the P critical
 * angle. */
static void test_ps_aki_richards(void **state)
{
	harness *h = *state;
	double prev = 0;

	for (int k = 0; k < 2; k++) {
		char line[512];
		double f = k ? 0.5 : 1.0; /* contrast scale */
		cJSON *r;
		snprintf(
		    line, sizeof line,
		    REQ("reflect.interface",
		        "{\"upper\":{\"vp\":3000,\"vs\":1500,\"rho\":2.3},"
		        "\"lower\":{\"vp\":%.6f,\"vs\":%.6f,\"rho\":%.6f},"
		        "\"angle\":[0,10,20,30],\"methods\":[\"zoeppritz\","
		        "\"aki_richards_ps\"]}"),
		    3000 * (1 + 0.06 * f), 1500 * (1 + 0.08 * f),
		    2.3 * (1 + 0.04 * f));
		r = ok_call(h, line);
		assert_true(fabs(num(r, "rps_aki_richards", 0, -1)) < 1e-15);
		for (int j = 1; j < 4; j++) {
			double ex = num(r, "rps_re", j, -1);
			double li = num(r, "rps_aki_richards", j, -1);
			double rel = fabs(li - ex) / fabs(ex);
			/* same sign, within 5% at these contrasts (first order)
			 */
			assert_true(ex * li > 0);
			assert_true(rel < 0.05);
			if (j == 3 && k == 1)
				assert_true(rel < 0.7 * prev);
			if (j == 3)
				prev = rel;
		}
		cJSON_Delete(r);
	}
	/* a fluid below: no PS; past critical: none either */
	{
		cJSON *r = ok_call(
		    h, REQ("reflect.interface",
		           "{\"upper\":{\"vp\":2000,\"vs\":900,\"rho\":2.2},"
		           "\"lower\":{\"vp\":[1500,4000],\"vs\":[0,2000],"
		           "\"rho\":[1.0,2.5]},\"angle\":[20,40],"
		           "\"methods\":\"aki_richards_ps\"}"));
		assert_true(is_null(r, "rps_aki_richards", 0, 0));
		assert_true(flags(r, "qc", 0, 0) & B_UNDEFINED);
		assert_false(is_null(r, "rps_aki_richards", 1, 0));
		assert_true(is_null(r, "rps_aki_richards", 1, 1));
		assert_true(flags(r, "qc", 1, 1) & B_POSTCRIT);
		assert_null(h_result(r, "rps_re"));
		cJSON_Delete(r);
	}
	/* series: the exact rps appears beside the linearised one */
	{
		cJSON *r = ok_call(
		    h,
		    REQ("reflect.series",
		        "{\"vp\":[3000,3100],\"vs\":[1500,1560],\"rho\":[2.3,"
		        "2.35],\"angle\":[10],\"methods\":[\"zoeppritz\","
		        "\"aki_richards_ps\"]}"));
		double ex = num(r, "rps_re", 0, 0);
		double li = num(r, "rps_aki_richards", 0, 0);
		assert_true(fabs(li - ex) < 0.03 * fabs(ex));
		cJSON_Delete(r);
		r = ok_call(h, REQ("reflect.series",
		                   "{\"vp\":[3000,3100],\"vs\":[1500,1560],"
		                   "\"rho\":[2.3,2.35],\"angle\":[10]}"));
		assert_null(h_result(r, "rps_re"));
		assert_null(h_result(r, "rps_aki_richards"));
		cJSON_Delete(r);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
#define T(f) cmocka_unit_test_setup_teardown(f, setup, teardown)
	    T(test_interface_shapes),
	    T(test_interface_units),
	    T(test_interface_energy),
	    T(test_interface_total_reflection),
	    T(test_interface_linear_close),
	    T(test_interface_qc),
	    T(test_interface_postcritical),
	    T(test_interface_errors),
	    cmocka_unit_test(test_interface_limit),
	    T(test_interface_class_params),
	    T(test_avo_classes_fluid_subst),
	    T(test_avo_class_iv),
	    T(test_series),
	    T(test_series_fields),
	    T(test_series_errors),
	    T(test_impedance),
	    T(test_impedance_errors),
	    T(test_vti),
	    T(test_vti_errors),
	    T(test_ps_aki_richards),
#undef T
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
