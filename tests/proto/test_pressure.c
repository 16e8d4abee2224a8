/* The pressure family through the protocol: pressure.overburden,
 * pressure.hydrostatic, pressure.trend, pressure.pore, pressure.fracture,
 * rock.strength, and log.process with `pressures`. Each physics check
 * names the reference it compares with: an exact integral, facts of the
 * trade (fresh-water gradient, the mud-weight factor), the published
 * formulas in their own units, or the core's own step functions where the
 * check is that the protocol wires them (the core is tested against
 * outside references in tests/unit and tests/reference). Then the caution
 * on every answer, the running state carried between requests, restarts,
 * and every error path (-32602 naming the field). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "proto/rpc_helpers.h"
#include "rockwire/pressure.h"

#define G0      9.80665
#define FT      0.3048
#define PSI_PA  (0.45359237 * G0 / (0.0254 * 0.0254))
#define PPG     (0.45359237 / 3.785411784e-3) /* kg/m3 per lb/gal */
#define US_FT   (1e-6 / FT)                   /* s/m per us/ft */
#define CAUTION (1ull << 48)
#define EXTRAP  (1ull << 49)
#define NOTSH   (1ull << 50)
#define INCONS  (1ull << 51)
#define STRRNG  (1ull << 52)
#define MISSING (1ull << 28)

/* Detail bits (pressure.md). */
#define D_ABOVE_ML (1ull << 0)
#define D_OBG_LAW  (1ull << 1)
#define D_HELD     (1ull << 2)
#define D_RESUMED  (1ull << 4)
#define D_TR_EXTRA (1ull << 6)
#define D_TR_UNVER (1ull << 7)
#define D_BELOW_PH (1ull << 9)
#define D_LAW_DFLT (1ull << 18)
#define D_DOUBTFUL (1ull << 19)
#define D_NOTSHALE (1ull << 20)
#define D_LITH     (1ull << 21)
#define D_NOT_DOWN (1ull << 22)

static char line[1 << 20];

/* A request line of method with params (printf style). */
static const char *req(const char *method, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));
static const char *req(const char *method, const char *fmt, ...)
{
	va_list ap;
	int n = snprintf(line, sizeof line,
	                 "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"%s\","
	                 "\"params\":",
	                 method);
	va_start(ap, fmt);
	n += vsnprintf(line + n, sizeof line - (size_t)n, fmt, ap);
	va_end(ap);
	snprintf(line + n, sizeof line - (size_t)n, "}");
	return line;
}

/* "[a,b,...]" of n doubles (17 digits: exact) into buf. */
static char *arr(char *buf, size_t size, const double *v, size_t n)
{
	size_t used = 0;
	buf[used++] = '[';
	for (size_t i = 0; i < n && used + 32 < size; i++)
		used += (size_t)snprintf(buf + used, size - used, "%s%.17g",
		                         i ? "," : "", v[i]);
	snprintf(buf + used, size - used, "]");
	return buf;
}

static unsigned long long flags(const cJSON *res, const char *key, int i)
{
	return (unsigned long long)num_at(res, key, i);
}

/* Every sample has the caution flag and the answer the caution text. */
static void caution_on_all(const cJSON *res, int n)
{
	const cJSON *c = cJSON_GetObjectItemCaseSensitive(res, "caution");
	if (!c)
		c = cJSON_GetObjectItemCaseSensitive(res, "pressure_caution");
	assert_true(cJSON_IsString(c));
	assert_non_null(strstr(c->valuestring, "screening estimates only"));
	assert_non_null(strstr(c->valuestring, "never the sole basis"));
	for (int i = 0; i < n; i++)
		assert_true(flags(res, "qc", i) & CAUTION);
}

/* ---- overburden ---------------------------------------------------------- */

static void test_overburden_constant_exact(void **state)
{
	/* A constant density integrates exactly: Sv = rho_sea g h_w + rho g
	 * (z - mudline) (the weight of the column, Zoback 2007 sec. 1.2).
	 * The shallow law is the same constant (a = 0), so the step above
	 * the first density and the trapezoids agree. */
	double z[] = {60, 100, 150, 400, 900, 1500};
	cJSON *r;
	const cJSON *res;

	(void)state;
	r = call(req("pressure.overburden",
	             "{\"tvd\":[60,100,150,400,900,1500],\"rhob\":[null,null,"
	             "2.2,2.2,2.2,2.2],\"column\":{\"air_gap\":20,"
	             "\"water_depth\":80,\"shallow\":{\"rho_ml\":2.2,"
	             "\"a\":0}}}"));
	res = result_of(r);
	/* in the water column: sea water below the air gap */
	assert_rel(num_at(res, "sv", 0), 1025 * G0 * 40 * 1e-6, 1e-13);
	assert_true(flags(res, "pressure_detail", 0) & D_ABOVE_ML);
	for (int i = 1; i < 6; i++) {
		double want = 1025 * G0 * 80 + 2200 * G0 * (z[i] - 100);
		assert_rel(num_at(res, "sv", i), want * 1e-6, 1e-13);
		/* EMW and gradient are referred to the datum: p / (g z) */
		assert_rel(num_at(res, "sv_emw", i), want / (G0 * z[i]) / 1000,
		           1e-13);
		assert_rel(num_at(res, "sv_gradient", i), want / z[i] * 1e-6,
		           1e-13);
		assert_false(flags(res, "pressure_detail", i) & D_LAW_DFLT);
	}
	/* the step to the first density follows the law: flagged */
	assert_true(flags(res, "pressure_detail", 2) & D_OBG_LAW);
	assert_true(flags(res, "qc", 2) & EXTRAP);
	assert_false(flags(res, "qc", 3) & EXTRAP);
	assert_rel(num_at(res, "sv_assumed", 5), 2200 * G0 * 50 * 1e-6, 1e-13);
	caution_on_all(res, 6);
	assert_string_equal(unit_of(res, "sv_emw"), "g/cm3");
	cJSON_Delete(r);
}

static void test_overburden_default_law(void **state)
{
	/* The default shallow law (pressure.md; common practice, from
	 * memory): rho = 16.3 ppg + 1 ppg (s / 3125 ft)^0.6, integrated in
	 * closed form. On land from ground level (air gap 0). Every sample
	 * relying on it is flagged shallow_law_default. */
	double rml = 16.3 * PPG, a = PPG, s0 = 3125 * FT, p = 0.6, s = 500;
	double want = G0 * (rml * s + a * s0 * pow(s / s0, p + 1) / (p + 1));
	cJSON *r =
	    call(req("pressure.overburden",
	             "{\"tvd\":[500,1000,1500],\"rhob\":[2.3,2.3,null]}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_rel(num_at(res, "sv", 0), want * 1e-6, 1e-12);
	assert_rel(num_at(res, "sv", 1), (want + 2300 * G0 * 500) * 1e-6,
	           1e-12);
	/* a missing density holds the last one, flagged */
	assert_rel(num_at(res, "sv", 2), (want + 2300 * G0 * 1000) * 1e-6,
	           1e-12);
	assert_true(flags(res, "pressure_detail", 2) & D_HELD);
	for (int i = 0; i < 3; i++) {
		assert_true(flags(res, "pressure_detail", i) & D_LAW_DFLT);
		assert_true(flags(res, "qc", i) & EXTRAP);
	}
	cJSON_Delete(r);
}

static void test_overburden_deep_water_needs_law(void **state)
{
	(void)state;
	/* 1000 ft (304.8 m) of water or more: the law must be given. */
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":1000,\"rhob\":2.2,\"column\":{"
	                   "\"water_depth\":304.8}}"),
	               "column.shallow", "deep water");
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":1000,\"rhob\":2.2,\"column\":{"
	                   "\"water_depth\":1000,\"units\":1}}"),
	               "column.units", "unknown parameter");
	/* given, it is accepted */
	cJSON *r = call(req("pressure.overburden",
	                    "{\"tvd\":1000,\"rhob\":2.2,\"column\":{"
	                    "\"water_depth\":500,\"shallow\":{\"rho_ml\":1.5,"
	                    "\"a\":0.3,\"s0\":1000}}}"));
	result_of(r);
	assert_false(flags(result_of(r), "pressure_detail", 0) & D_LAW_DFLT);
	cJSON_Delete(r);
	/* just above the threshold the default is allowed, and flagged */
	r = call(req("pressure.overburden",
	             "{\"tvd\":1000,\"rhob\":2.2,\"column\":{"
	             "\"water_depth\":300}}"));
	assert_true(flags(result_of(r), "pressure_detail", 0) & D_LAW_DFLT);
	cJSON_Delete(r);
}

static void test_overburden_doubtful_and_order(void **state)
{
	cJSON *r;
	const cJSON *res;

	(void)state;
	/* density <= 0 is flagged and held; a shallower sample is refused
	 * for that sample only (null, flagged), the integral carries on */
	r = call(req("pressure.overburden",
	             "{\"tvd\":[100,200,150,300],\"rhob\":[2,-1,2,2],"
	             "\"column\":{\"shallow\":{\"rho_ml\":2,\"a\":0}}}"));
	res = result_of(r);
	assert_true(flags(res, "qc", 1) & (1ull << 1)); /* rho_nonpositive */
	assert_true(flags(res, "pressure_detail", 1) & D_HELD);
	assert_true(isnan(num_at(res, "sv", 2)));
	assert_true(flags(res, "pressure_detail", 2) & D_NOT_DOWN);
	assert_true(flags(res, "qc", 2) & 1ull); /* input_invalid */
	assert_rel(num_at(res, "sv", 3), 2000 * G0 * 300 * 1e-6, 1e-13);
	cJSON_Delete(r);
}

/* ---- the state between requests and restarts ----------------------------- */

static void token_of(const cJSON *res, const char *key, char *out, size_t n)
{
	const cJSON *st = cJSON_GetObjectItemCaseSensitive(res, key);
	const cJSON *t = cJSON_GetObjectItemCaseSensitive(st, "token");
	assert_true(cJSON_IsString(t));
	snprintf(out, n, "%s", t->valuestring);
}

static void test_state_continues_exactly(void **state)
{
	/* Ten samples in one request, and the same as 1 + 3 + 6 samples
	 * carried by the state token: the same numbers, to the last bit. */
	double z[10];
	char za[512], tok[256], tok2[256];
	cJSON *whole, *part;
	int k = 0;

	(void)state;
	for (int i = 0; i < 10; i++)
		z[i] = 812.5 + 13.7 * i + 0.01 * i * i;
	whole = call(req("pressure.overburden",
	                 "{\"tvd\":%s,\"rhob\":[2.05,2.079,2.104,2.125,null,"
	                 "2.155,2.164,2.169,2.17,2.167],\"column\":{"
	                 "\"air_gap\":22,\"water_depth\":91}}",
	                 arr(za, sizeof za, z, 10)));
	const int cut[] = {0, 1, 4, 10};
	static const char *const dens[] = {
	    "[2.05]", "[2.079,2.104,2.125]",
	    "[null,2.155,2.164,2.169,2.17,2.167]"};
	for (int b = 0; b < 3; b++) {
		char st[400] = "";
		if (b)
			snprintf(st, sizeof st, ",\"state\":\"%s\"", tok);
		part = call(req("pressure.overburden",
		                "{\"tvd\":%s,\"rhob\":%s,\"column\":{"
		                "\"air_gap\":22,\"water_depth\":91}%s}",
		                arr(za, sizeof za, z + cut[b],
		                    (size_t)(cut[b + 1] - cut[b])),
		                dens[b], st));
		for (int i = 0; i < cut[b + 1] - cut[b]; i++, k++) {
			assert_true(num_at(result_of(part), "sv", i) ==
			            num_at(result_of(whole), "sv", k));
			assert_true(
			    flags(result_of(part), "pressure_detail", i) ==
			    flags(result_of(whole), "pressure_detail", k));
		}
		token_of(result_of(part), "pressure_state", tok, sizeof tok);
		cJSON_Delete(part);
	}
	token_of(result_of(whole), "pressure_state", tok2, sizeof tok2);
	assert_string_equal(tok, tok2);
	cJSON_Delete(whole);
}

static void test_state_refused(void **state)
{
	cJSON *r;
	char tok[256];

	(void)state;
	r = call(req("pressure.overburden",
	             "{\"tvd\":[500,600],\"rhob\":2.2,\"column\":{"
	             "\"water_depth\":50}}"));
	token_of(result_of(r), "pressure_state", tok, sizeof tok);
	cJSON_Delete(r);
	/* another column: the integral belongs to the one it was made with */
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":700,\"rhob\":2.2,\"column\":{"
	                   "\"water_depth\":60},\"state\":\"%s\"}",
	                   tok),
	               "state", "another column");
	/* a token edited by hand */
	tok[10] = tok[10] == '0' ? '1' : '0';
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":700,\"rhob\":2.2,\"column\":{"
	                   "\"water_depth\":50},\"state\":\"%s\"}",
	                   tok),
	               "state", "another column");
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":700,\"state\":\"not-a-token\"}"),
	               "state", "not a state token");
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":700,\"state\":\"x\",\"resume\":{"
	                   "\"tvd\":600,\"sv\":12}}"),
	               "state", "resume or state");
}

static void test_resume(void **state)
{
	/* A restart from sv = 12 MPa at 600 m with the density there: Sv
	 * continues as 12 MPa + g rho dz, every answer flagged resumed. */
	cJSON *r = call(req("pressure.overburden",
	                    "{\"tvd\":[650,700],\"rhob\":[2.2,2.2],"
	                    "\"resume\":{\"tvd\":600,\"sv\":12,"
	                    "\"rhob\":2.2}}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_rel(num_at(res, "sv", 0), 12 + 2200 * G0 * 50 * 1e-6, 1e-13);
	assert_rel(num_at(res, "sv", 1), 12 + 2200 * G0 * 100 * 1e-6, 1e-13);
	assert_true(flags(res, "pressure_detail", 0) & D_RESUMED);
	assert_true(flags(res, "pressure_detail", 1) & D_RESUMED);
	cJSON_Delete(r);
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":650,\"resume\":{\"tvd\":600}}"),
	               "resume.sv", "required");
	expect_invalid(req("pressure.overburden",
	                   "{\"tvd\":650,\"resume\":{\"tvd\":50,\"sv\":1},"
	                   "\"column\":{\"water_depth\":100}}"),
	               "resume.tvd", "above the mudline");
	expect_invalid(req("pressure.hydrostatic",
	                   "{\"tvd\":650,\"resume\":{\"tvd\":600,\"ph\":6}}"),
	               "resume", "constant pore water");
}

/* ---- hydrostatic -----------------------------------------------------------
 */

static void test_hydrostatic_fresh_water(void **state)
{
	/* Fresh water: 9.81 kPa/m and 0.433 psi/ft (common practice; exactly
	 * 1000 kg/m3 x 9.80665 m/s2 = 9.80665 kPa/m = 0.43352 psi/ft), and
	 * 1 g/cm3 = 8.345 lb/gal (common practice; 8.3454 exactly). */
	cJSON *r;
	const cJSON *res;

	(void)state;
	r = call(req("pressure.hydrostatic",
	             "{\"tvd\":[1000,3000],\"units\":{\"pressure_gradient\":"
	             "\"psi/ft\",\"mud_weight\":\"lb/gal\"}}"));
	res = result_of(r);
	for (int i = 0; i < 2; i++) {
		assert_true(fabs(num_at(res, "ph_gradient", i) - 0.433) < 6e-4);
		assert_rel(num_at(res, "ph_gradient", i),
		           1000 * G0 * FT / PSI_PA, 1e-12);
		assert_true(fabs(num_at(res, "ph_emw", i) - 8.345) < 5e-4);
		assert_rel(num_at(res, "ph_emw", i), 1000 / PPG, 1e-12);
	}
	assert_string_equal(unit_of(res, "ph_emw"), "lb/gal");
	caution_on_all(res, 2);
	cJSON_Delete(r);
	r = call(req("pressure.hydrostatic",
	             "{\"tvd\":2000,\"units\":{\"pressure_gradient\":"
	             "\"kPa/m\"}}"));
	assert_true(fabs(num_at(result_of(r), "ph_gradient", 0) - 9.81) < 5e-3);
	cJSON_Delete(r);
}

static void test_hydrostatic_offshore(void **state)
{
	/* sea water below the air gap, pore water below the mudline */
	cJSON *r = call(req("pressure.hydrostatic",
	                    "{\"tvd\":[10,50,1000],\"column\":{\"air_gap\":25,"
	                    "\"water_depth\":100},\"pore_water\":{"
	                    "\"gradient\":0.0105}}"));
	const cJSON *res = result_of(r);
	double rw = 0.0105e6 / G0;

	(void)state;
	assert_true(num_at(res, "ph", 0) == 0);
	assert_rel(num_at(res, "ph", 1), 1025 * G0 * 25 * 1e-6, 1e-13);
	assert_rel(num_at(res, "ph", 2),
	           (1025 * G0 * 100 + rw * G0 * 875) * 1e-6, 1e-13);
	assert_rel(num_at(res, "rho_water", 1), 1.025, 1e-13);
	assert_rel(num_at(res, "rho_water", 2), rw / 1000, 1e-13);
	cJSON_Delete(r);
	expect_invalid(req("pressure.hydrostatic",
	                   "{\"tvd\":1000,\"pore_water\":{\"gradient\":0.0105,"
	                   "\"density\":1.05}}"),
	               "pore_water.gradient", "one of");
	expect_invalid(req("pressure.hydrostatic",
	                   "{\"tvd\":1000,\"pore_water\":{\"gradient\":0.5}}"),
	               "pore_water.gradient", "unit slip");
}

static void test_hydrostatic_brine_wiring(void **state)
{
	/* The brine column through the protocol equals the core's own step
	 * function run on the same samples (the core is checked against
	 * IAPWS-95 and IAPWS-08 in tests/reference/test_pressure_numpy.py);
	 * this checks the wiring: temperature from the mudline value and the
	 * gradient, salinity in ppm, the restart through the state. */
	double z[] = {150, 600, 1400, 2500}, p;
	rw_pres_column col;
	rw_pres_hydro_state st;
	rw_pres_hydro_ws *ws = rw_pres_hydro_ws_new();
	char tok[256];
	cJSON *r;
	const cJSON *res;

	(void)state;
	rw_pres_column_init(&col);
	col.air_gap_m = 20;
	col.water_depth_m = 110;
	assert_int_equal(rw_pres_hydro_brine_init(&col, 6, 0.08, &st), RW_OK);
	r = call(req("pressure.hydrostatic",
	             "{\"tvd\":[150,600],\"column\":{\"air_gap\":20,"
	             "\"water_depth\":110},\"pore_water\":{\"brine\":{"
	             "\"salinity\":80000,\"mudline_temperature\":6,"
	             "\"temperature_gradient\":30,\"units\":null}}}"));
	assert_non_null(cJSON_GetObjectItemCaseSensitive(r, "error"));
	cJSON_Delete(r);
	r = call(req("pressure.hydrostatic",
	             "{\"tvd\":[150,600],\"column\":{\"air_gap\":20,"
	             "\"water_depth\":110},\"pore_water\":{\"brine\":{"
	             "\"salinity\":80000,\"mudline_temperature\":6,"
	             "\"temperature_gradient\":30}}}"));
	res = result_of(r);
	token_of(res, "pressure_state", tok, sizeof tok);
	for (int i = 0; i < 4; i++) {
		double t = 6 + 0.030 * (z[i] - 130);
		assert_int_equal(rw_pres_hydro_brine_step(ws, &col, &st, z[i],
		                                          t, 0.08, &p, NULL,
		                                          NULL),
		                 RW_OK);
		if (i == 2) {
			cJSON_Delete(r);
			r = call(req(
			    "pressure.hydrostatic",
			    "{\"tvd\":[1400,2500],\"column\":{\"air_gap\":20,"
			    "\"water_depth\":110},\"pore_water\":{\"brine\":{"
			    "\"salinity\":80000,\"mudline_temperature\":6,"
			    "\"temperature_gradient\":30}},\"state\":\"%s\"}",
			    tok));
			res = result_of(r);
		}
		assert_rel(num_at(res, "ph", i % 2), p * 1e-6, 1e-13);
	}
	/* the brine is denser than fresh water: above 1 g/cm3 */
	assert_true(num_at(res, "rho_water", 1) > 1.03);
	cJSON_Delete(r);
	rw_pres_hydro_ws_free(ws);
}

/* ---- trend ------------------------------------------------------------------
 */

static void test_trend_fit_recovers(void **state)
{
	/* A synthetic exponential trend (Athy's porosity decline through the
	 * time average, pressure.md) with Gaussian noise of 2 us/ft: the fit
	 * recovers each parameter within three of its returned standard
	 * errors (a single noise draw; one standard error covers the truth
	 * 68 % of the time, which tests/unit/test_trend.c checks over many
	 * draws). The rms residual is near the noise. */
	enum { N = 300 };
	double z[N], dt[N], ma = 62, ml = 175, c = 5.5e-4;
	char za[N * 26], da[N * 26];
	gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
	cJSON *r;
	const cJSON *res, *tr, *fit;

	(void)state;
	gsl_rng_set(rng, 20240501);
	for (int i = 0; i < N; i++) {
		z[i] = 520 + 8 * i;
		dt[i] = ma + (ml - ma) * exp(-c * (z[i] - 120)) +
		        gsl_ran_gaussian(rng, 2.0);
	}
	gsl_rng_free(rng);
	r = call(req("pressure.trend",
	             "{\"tvd\":%s,\"dtp\":%s,\"intervals\":[{\"top\":500,"
	             "\"base\":3000}],\"column\":{\"air_gap\":20,"
	             "\"water_depth\":100}}",
	             arr(za, sizeof za, z, N), arr(da, sizeof da, dt, N)));
	res = result_of(r);
	tr = cJSON_GetObjectItemCaseSensitive(res, "trend");
	fit = cJSON_GetObjectItemCaseSensitive(res, "fit");
	assert_int_equal(num(fit, "n_used"), N);
	assert_true(fabs(num(tr, "dt_ma") - ma) < 3 * num(fit, "sigma_dt_ma"));
	assert_true(fabs(num(tr, "dt_ml") - ml) < 3 * num(fit, "sigma_dt_ml"));
	assert_true(fabs(num(tr, "c") - c) < 3 * num(fit, "sigma_c"));
	assert_true(fabs(num(fit, "rms") - 2.0) < 0.3);
	assert_rel(num(tr, "top"), 520, 1e-15);
	assert_rel(num(tr, "base"), 520 + 8 * (N - 1), 1e-15);
	assert_string_equal(unit_of(res, "trend.c"), "1/m");
	caution_on_all(res, N);
	cJSON_Delete(r);
}

static void test_trend_selection(void **state)
{
	/* in_fit: inside the interval, shale (vsh >= 0.6), not washed out,
	 * not excluded; not_shale flagged; outside the fitted span the trend
	 * is extrapolated (flagged) */
	cJSON *r = call(
	    req("pressure.trend",
	        "{\"tvd\":[400,500,600,700,800,900,1000,1100,1500],"
	        "\"dtp\":[150,145,140,136,132,128,125,122,110],"
	        "\"vsh\":[0.9,0.9,0.3,0.9,0.9,0.9,0.9,0.9,0.9],"
	        "\"caliper\":[0.3,0.22,0.22,0.22,0.22,0.22,0.22,0.22,0.22],"
	        "\"bit_size\":0.216,\"exclude\":[0,0,0,0,0,0,0,1,0],"
	        "\"intervals\":[{\"top\":350,\"base\":1150}]}"));
	const cJSON *res = result_of(r);
	const int want[] = {0, 1, 0, 1, 1, 1, 1, 0, 0};

	(void)state;
	for (int i = 0; i < 9; i++)
		assert_int_equal(num_at(res, "in_fit", i), want[i]);
	assert_true(flags(res, "qc", 2) & NOTSH);
	assert_false(flags(res, "qc", 3) & NOTSH);
	assert_true(flags(res, "pressure_detail", 8) & D_TR_EXTRA);
	assert_true(flags(res, "qc", 8) & EXTRAP);
	assert_false(flags(res, "qc", 4) & EXTRAP);
	cJSON_Delete(r);
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500,600],\"dtp\":[150,145,140],"
	                   "\"intervals\":[{\"top\":350,\"base\":650}]}"),
	               "intervals", "needs at least 4");
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500,600,700],\"dtp\":[150,145,140,"
	                   "136],\"intervals\":[{\"top\":50,\"base\":650}],"
	                   "\"column\":{\"water_depth\":100}}"),
	               "intervals[0].top", "above the mudline");
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500,600,700],\"dtp\":[140,145,150,"
	                   "156],\"intervals\":[{\"top\":350,\"base\":750}]}"),
	               "intervals", "not a compaction trend");
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500],\"dtp\":[140,145],"
	                   "\"intervals\":[{\"top\":650,\"base\":350}]}"),
	               "intervals[0].base", "above top");
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500],\"dtp\":[140,145],"
	                   "\"caliper\":0.3,\"intervals\":[{\"top\":350,"
	                   "\"base\":650}]}"),
	               "bit_size", "together");
	expect_invalid(req("pressure.trend",
	                   "{\"tvd\":[400,500],\"dtp\":[140,145],"
	                   "\"exclude\":[0,2],\"intervals\":[{\"top\":350,"
	                   "\"base\":650}]}"),
	               "exclude", NULL);
}

/* ---- pore pressure ---------------------------------------------------------
 */

static void test_eaton_on_trend_is_hydrostatic(void **state)
{
	/* Eaton 1975: slowness on the normal trend gives the hydrostatic
	 * pressure; off the trend pp = sv - (sv - ph) (dt_n / dt)^3. */
	double z[] = {800, 1200, 1800}, dtn[3], dt[3];
	double ma = 60, ml = 180, c = 6e-4, mud = 125;
	char za[128], da[128], sv[128];
	double svv[3] = {16, 25, 39};
	cJSON *r;
	const cJSON *res;

	(void)state;
	for (int i = 0; i < 3; i++)
		dtn[i] = ma + (ml - ma) * exp(-c * (z[i] - mud));
	r = call(req("pressure.pore",
	             "{\"tvd\":%s,\"dtp\":%s,\"sv\":%s,\"column\":{"
	             "\"air_gap\":25,\"water_depth\":100},\"trend\":{"
	             "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,\"top\":500,"
	             "\"base\":2000}}",
	             arr(za, sizeof za, z, 3), arr(da, sizeof da, dtn, 3),
	             arr(sv, sizeof sv, svv, 3)));
	res = result_of(r);
	for (int i = 0; i < 3; i++) {
		assert_rel(num_at(res, "pp", i), num_at(res, "ph", i), 1e-9);
		assert_rel(num_at(res, "dt_normal", i), dtn[i], 1e-12);
		/* inside the trend's span: not extrapolated (a slowness a
		 * rounding below the trend may read as a hair below
		 * hydrostatic, which is flagged, as it should be) */
		assert_false(flags(res, "qc", i) & EXTRAP);
	}
	caution_on_all(res, 3);
	cJSON_Delete(r);
	/* off the trend, against the published formula */
	for (int i = 0; i < 3; i++)
		dt[i] = dtn[i] * (1.1 + 0.05 * i);
	r = call(req("pressure.pore",
	             "{\"tvd\":%s,\"dtp\":%s,\"sv\":%s,\"column\":{"
	             "\"air_gap\":25,\"water_depth\":100},\"trend\":{"
	             "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}",
	             arr(za, sizeof za, z, 3), arr(da, sizeof da, dt, 3),
	             arr(sv, sizeof sv, svv, 3)));
	res = result_of(r);
	for (int i = 0; i < 3; i++) {
		double ph = (1025 * G0 * 100 + 1000 * G0 * (z[i] - mud)) * 1e-6;
		double want = svv[i] - (svv[i] - ph) * pow(dtn[i] / dt[i], 3);
		assert_rel(num_at(res, "pp", i), want, 1e-12);
		assert_rel(num_at(res, "sigma_eff", i), svv[i] - want, 1e-12);
		/* a trend without a span: unverified on every sample */
		assert_true(flags(res, "pressure_detail", i) & D_TR_UNVER);
		assert_true(flags(res, "qc", i) & EXTRAP);
	}
	cJSON_Delete(r);
	/* below the trend: pp below hydrostatic (8.6 MPa against 11.8),
	 * reported and flagged */
	r = call(req("pressure.pore",
	             "{\"tvd\":1200,\"dtp\":110,\"sv\":25,\"trend\":{"
	             "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}"));
	res = result_of(r);
	assert_true(num_at(res, "pp", 0) < num_at(res, "ph", 0));
	assert_true(flags(res, "qc", 0) & INCONS);
	assert_true(flags(res, "pressure_detail", 0) & D_BELOW_PH);
	cJSON_Delete(r);
	/* far faster than the trend (a tight streak): Eaton's formula
	 * gives pp = 25 - (25 - 11.8) (121 / 40)^3, below zero absolute;
	 * that is no pressure: null, flagged, the effective stress too */
	r = call(req("pressure.pore",
	             "{\"tvd\":1200,\"dtp\":40,\"sv\":25,\"trend\":{"
	             "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}"));
	res = result_of(r);
	assert_true(isnan(num_at(res, "pp", 0)));
	assert_true(isnan(num_at(res, "sigma_eff", 0)));
	assert_true(flags(res, "qc", 0) & INCONS);
	cJSON_Delete(r);
}

static void test_eaton_shale_selector(void **state)
{
	cJSON *r = call(req("pressure.pore",
	                    "{\"tvd\":[1000,1010],\"dtp\":[120,115],"
	                    "\"sv\":[21,21.2],\"gr\":[110,35],\"gr_clean\":30,"
	                    "\"gr_shale\":120,\"trend\":{\"dt_ma\":60,"
	                    "\"dt_ml\":180,\"c\":6e-4}}"));
	const cJSON *res = result_of(r);

	(void)state;
	assert_false(flags(res, "qc", 0) & NOTSH);
	assert_true(flags(res, "qc", 1) & NOTSH);
	assert_true(flags(res, "pressure_detail", 1) & D_NOTSHALE);
	/* computed all the same: reported, not hidden */
	assert_false(isnan(num_at(res, "pp", 1)));
	assert_rel(num_at(res, "vsh", 0), 80.0 / 90, 1e-13);
	cJSON_Delete(r);
}

static void test_pore_fitted_sigma(void **state)
{
	/* With a fitted trend the trend's share of the uncertainty is
	 * returned; zero-noise data give a tiny but finite one. */
	char za[2048], da[2048];
	double z[40], dt[40];
	cJSON *r;
	const cJSON *res;

	(void)state;
	for (int i = 0; i < 40; i++) {
		z[i] = 300 + 25 * i;
		dt[i] = 60 + 120 * exp(-6e-4 * z[i]) + (i % 3 - 1) * 0.5;
	}
	r = call(req("pressure.pore",
	             "{\"tvd\":%s,\"dtp\":%s,\"rhob\":2.25,\"trend_fit\":{"
	             "\"intervals\":[{\"top\":250,\"base\":800}]}}",
	             arr(za, sizeof za, z, 40), arr(da, sizeof da, dt, 40)));
	res = result_of(r);
	assert_true(num_at(res, "pp_sigma_trend", 39) > 0);
	assert_true(flags(res, "pressure_detail", 39) & D_TR_EXTRA);
	assert_int_equal(
	    num(cJSON_GetObjectItemCaseSensitive(res, "fit"), "n_used"), 21);
	assert_non_null(cJSON_GetObjectItemCaseSensitive(
	    cJSON_GetObjectItemCaseSensitive(res, "trend"), "covariance_si"));
	cJSON_Delete(r);
}

static void test_bowers_field_units(void **state)
{
	/* Bowers 1995 in its published units: v (ft/s) = 5000 + A sigma
	 * (psi)^B with A = 14.2, B = 0.724 (Gulf of Mexico values, from
	 * memory); pp = sv - sigma. */
	double vp[] = {2400, 2900, 3300}, sv = 45e6;
	char va[128];
	cJSON *r = call(req("pressure.pore",
	                    "{\"method\":\"bowers\",\"tvd\":[2000,2200,2400],"
	                    "\"vp\":%s,\"sv\":45,\"bowers\":{\"a\":14.2,"
	                    "\"a_units\":\"ft/s/psi^b\",\"b\":0.724,"
	                    "\"v0\":1524}}",
	                    arr(va, sizeof va, vp, 3)));
	const cJSON *res = result_of(r);

	(void)state;
	for (int i = 0; i < 3; i++) {
		double sig_psi = pow((vp[i] / FT - 5000) / 14.2, 1 / 0.724);
		/* v0 = 1524 m/s is 5000 ft/s exactly */
		assert_rel(num_at(res, "pp", i), (sv - sig_psi * PSI_PA) * 1e-6,
		           1e-11);
	}
	cJSON_Delete(r);
	/* the unloading branch applies from unloading_from down only */
	r = call(req("pressure.pore",
	             "{\"method\":\"bowers\",\"tvd\":[2000,2400],"
	             "\"vp\":[2400,2400],\"sv\":45,\"bowers\":{\"a\":14.2,"
	             "\"a_units\":\"ft/s/psi^b\",\"b\":0.724,\"u\":3.1,"
	             "\"v_max\":3000,\"unloading_from\":2300}}"));
	res = result_of(r);
	assert_false(flags(res, "pressure_detail", 0) & (1ull << 11));
	assert_true(flags(res, "pressure_detail", 1) & (1ull << 11));
	/* unloading: less effective stress at the same velocity */
	assert_true(num_at(res, "pp", 1) > num_at(res, "pp", 0));
	cJSON_Delete(r);
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"bowers\",\"tvd\":2000,\"vp\":2400,"
	                   "\"sv\":45,\"bowers\":{\"a\":14.2,\"b\":0.724}}"),
	               "bowers.a_units", "required");
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"bowers\",\"tvd\":2000,\"vp\":2400,"
	                   "\"sv\":45,\"bowers\":{\"a\":14.2,\"a_units\":"
	                   "\"ft/s/psi^b\",\"b\":0.724,\"sigma_max\":30}}"),
	               "bowers.unloading_from", "velocity reversal");
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"bowers\",\"tvd\":2000,\"vp\":2400,"
	                   "\"sv\":45,\"bowers\":{\"a\":14.2,\"a_units\":"
	                   "\"ft/s/psi^b\",\"b\":0.724,\"v_max\":1000,"
	                   "\"unloading_from\":1500}}"),
	               "bowers.v_max", "above v0");
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"bowers\",\"tvd\":2000,\"vp\":2400,"
	                   "\"sv\":45,\"bowers\":{\"a\":14.2,\"a_units\":"
	                   "\"ft/s/psi^b\",\"b\":0.724},\"trend\":{\"dt_ma\":"
	                   "60,\"dt_ml\":180,\"c\":6e-4}}"),
	               "trend", "no compaction trend");
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"bowers\",\"tvd\":2000,\"vp\":2400,"
	                   "\"sv\":45}"),
	               "bowers", "needs bowers");
}

static void test_pore_errors(void **state)
{
	(void)state;
	expect_invalid(req("pressure.pore", "{\"tvd\":1000,\"dtp\":100,"
	                                    "\"trend\":{\"dt_ma\":60,"
	                                    "\"dt_ml\":180,\"c\":6e-4}}"),
	               "sv", "overburden");
	expect_invalid(
	    req("pressure.pore", "{\"tvd\":1000,\"dtp\":100,\"sv\":20}"),
	    "trend", "Eaton needs");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"dt_ma\":190,\"dt_ml\":180,\"c\":6e-4}}"),
	               "trend.dt_ma", "below dt_ml");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"dt_ml\":180,\"c\":6e-4}}"),
	               "trend.dt_ma", "deep limit");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"form\":\"loglinear\",\"dt_ma\":60,\"dt_ml\":180,"
	                   "\"c\":6e-4}}"),
	               "trend.dt_ma", "no matrix limit");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	                   "\"top\":500}}"),
	               "trend.base", "together");
	expect_invalid(
	    req("pressure.pore",
	        "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"exponent\":11,"
	        "\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}"),
	    "exponent", NULL);
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	                   "\"covariance_si\":[[1,0,0],[0,1,0]]}}"),
	               "trend.covariance_si", "3 x 3");
	/* a covariance symmetric to rounding is taken, one that is not is
	 * refused */
	cJSON *rc =
	    call(req("pressure.pore",
	             "{\"tvd\":1000,\"dtp\":120,\"sv\":20,\"trend\":{"
	             "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	             "\"covariance_si\":[[4e-12,1e-12,3e-11],[1e-12,"
	             "2e-12,1e-11],[3.0000000000001e-11,1e-11,1e-9]]}}"));
	assert_true(num_at(result_of(rc), "pp_sigma_trend", 0) > 0);
	cJSON_Delete(rc);
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"trend\":{"
	                   "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	                   "\"covariance_si\":[[4e-12,1e-12,3e-11],[1e-12,"
	                   "2e-12,1e-11],[3.1e-11,1e-11,1e-9]]}}"),
	               "trend.covariance_si", "not symmetric");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"state\":"
	                   "\"x\",\"trend\":{\"dt_ma\":60,\"dt_ml\":180,"
	                   "\"c\":6e-4}}"),
	               "state", "nothing is integrated");
	expect_invalid(req("pressure.pore",
	                   "{\"tvd\":[1000,1100,1200,1300],\"dtp\":100,"
	                   "\"rhob\":2.2,\"state\":\"x\",\"trend_fit\":{"
	                   "\"intervals\":[{\"top\":900,\"base\":1400}]}}"),
	               "trend_fit", "fit it once");
	expect_invalid(
	    req("pressure.pore",
	        "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"caliper\":0.3,"
	        "\"bit_size\":0.2,\"trend\":{\"dt_ma\":60,"
	        "\"dt_ml\":180,\"c\":6e-4}}"),
	    "caliper", "trend_fit");
	expect_invalid(
	    req("pressure.pore",
	        "{\"tvd\":1000,\"dtp\":100,\"sv\":20,\"gr\":50,"
	        "\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}"),
	    "gr_clean", "gr_clean and gr_shale");
	expect_invalid(req("pressure.pore",
	                   "{\"method\":\"none\",\"tvd\":1000,\"dtp\":100,"
	                   "\"sv\":20}"),
	               "method", "eaton or bowers");
}

/* ---- fracture gradient ------------------------------------------------------
 */

static void test_fracture_between_pp_and_sv(void **state)
{
	/* For 0 < nu < 0.5 Eaton's 1969 fracture gradient lies strictly
	 * between pore pressure and overburden (nu/(1 - nu) in (0, 1)); so
	 * does the poroelastic one without strain and with alpha = 1 (it is
	 * Eaton's then), and Matthews & Kelly's for 0 < ki < 1. */
	static const char *const m[] = {"eaton", "poroelastic"};
	char nu_a[2048];
	double nu[49];
	cJSON *r;

	(void)state;
	for (int i = 0; i < 49; i++)
		nu[i] = 0.01 * (i + 0.5);
	for (int k = 0; k < 2; k++) {
		r = call(req("pressure.fracture",
		             "{\"method\":\"%s\",\"tvd\":2000,\"sv\":45,"
		             "\"pp\":22,\"nu\":%s}",
		             m[k], arr(nu_a, sizeof nu_a, nu, 49)));
		for (int i = 0; i < 49; i++) {
			double s = num_at(result_of(r), "shmin", i);
			assert_true(s > 22 && s < 45);
			assert_rel(s, nu[i] / (1 - nu[i]) * 23 + 22, 1e-12);
		}
		caution_on_all(result_of(r), 49);
		cJSON_Delete(r);
	}
	r = call(req("pressure.fracture",
	             "{\"method\":\"matthews_kelly\",\"tvd\":2000,\"sv\":45,"
	             "\"pp\":22,\"ki\":[0.01,0.5,0.99]}"));
	for (int i = 0; i < 3; i++) {
		double s = num_at(result_of(r), "shmin", i);
		assert_true(s > 22 && s < 45);
	}
	cJSON_Delete(r);
	/* Hubbert & Willis 1957 (from memory): nu = 0.25 is k = 1/3, so a
	 * 1 psi/ft overburden over 0.465 psi/ft pore pressure gives 0.643
	 * psi/ft (pressure.md) */
	r = call(req("pressure.fracture",
	             "{\"tvd\":10000,\"sv\":10000,\"pp\":4650,\"nu\":0.25,"
	             "\"units\":{\"length\":\"ft\",\"pressure\":\"psi\","
	             "\"pressure_gradient\":\"psi/ft\"}}"));
	assert_true(fabs(num_at(result_of(r), "shmin_gradient", 0) - 0.643) <
	            5e-4);
	cJSON_Delete(r);
}

static void test_fracture_poroelastic_strain(void **state)
{
	/* Tectonic strain adds E/(1 - nu^2) (eps_h + nu eps_H) to shmin and
	 * the same with the strains swapped to shmax (Thiercelin & Plumb
	 * 1994, from memory). */
	cJSON *r = call(req("pressure.fracture",
	                    "{\"method\":\"poroelastic\",\"tvd\":3000,"
	                    "\"sv\":68,\"pp\":35,\"nu\":0.27,\"alpha\":0.8,"
	                    "\"e_static\":12,\"eps_h\":200,\"eps_hmax\":600,"
	                    "\"units\":{\"strain\":\"microstrain\"}}"));
	const cJSON *res = result_of(r);
	double nu = 0.27, base = nu / (1 - nu) * (68 - 0.8 * 35) + 0.8 * 35;
	double k = 12e3 / (1 - nu * nu); /* MPa */

	(void)state;
	assert_rel(num_at(res, "shmin", 0), base + k * (200e-6 + nu * 600e-6),
	           1e-12);
	assert_rel(num_at(res, "shmax", 0), base + k * (600e-6 + nu * 200e-6),
	           1e-12);
	cJSON_Delete(r);
	expect_invalid(req("pressure.fracture",
	                   "{\"method\":\"poroelastic\",\"tvd\":3000,\"sv\":68,"
	                   "\"pp\":35,\"nu\":0.27,\"eps_h\":0.001}"),
	               "e_static", "tectonic strain");
	expect_invalid(req("pressure.fracture",
	                   "{\"method\":\"matthews_kelly\",\"tvd\":3000,"
	                   "\"sv\":68,\"pp\":35}"),
	               "ki", "matrix-stress");
	expect_invalid(req("pressure.fracture",
	                   "{\"method\":\"matthews_kelly\",\"tvd\":3000,"
	                   "\"sv\":68,\"pp\":35,\"ki\":0.5,\"nu\":0.3}"),
	               "nu", "uses ki");
	expect_invalid(
	    req("pressure.fracture", "{\"tvd\":3000,\"sv\":68,\"pp\":35}"),
	    "nu", "required");
	expect_invalid(req("pressure.fracture",
	                   "{\"tvd\":3000,\"sv\":68,\"pp\":35,\"nu\":0.3,"
	                   "\"alpha\":0.8}"),
	               "alpha", "poroelastic");
	expect_invalid(req("pressure.fracture",
	                   "{\"method\":\"poroelastic\",\"tvd\":3000,\"sv\":68,"
	                   "\"pp\":35,\"nu\":0.3,\"eps_h\":0.02,"
	                   "\"e_static\":10}"),
	               "eps_h", NULL);
	/* a negative pore pressure (Eaton on a fast non-shale): no stress
	 * from it, flagged as a contradiction, not as a bad input */
	cJSON *r3 = call(req("pressure.fracture",
	                     "{\"tvd\":3000,\"sv\":68,\"pp\":-3,\"nu\":0.3}"));
	assert_true(isnan(num_at(result_of(r3), "shmin", 0)));
	assert_true(flags(result_of(r3), "qc", 0) & INCONS);
	assert_false(flags(result_of(r3), "qc", 0) & 1ull);
	cJSON_Delete(r3);
	/* pp above sv: reported as a contradiction, no value */
	cJSON *r2 = call(req("pressure.fracture",
	                     "{\"tvd\":3000,\"sv\":68,\"pp\":70,\"nu\":0.3}"));
	assert_true(isnan(num_at(result_of(r2), "shmin", 0)));
	assert_true(flags(result_of(r2), "qc", 0) & INCONS);
	cJSON_Delete(r2);
}

/* ---- rock strength ----------------------------------------------------------
 */

static void test_strength(void **state)
{
	/* Horsrud 2001 (Chang et al. 2006 Table 2, coefficients from
	 * memory): UCS = 0.77 (304.8/dt)^2.93 MPa with dt in us/ft, fitted on
	 * North Sea shales of about 87-170 us/ft (flagged outside), and the
	 * Eissa & Kazi 1988 static modulus 0.74 Ed - 0.82 GPa. */
	cJSON *r = call(req("rock.strength",
	                    "{\"relation\":\"horsrud_2001\",\"dtp\":[100,200],"
	                    "\"e_dyn\":[20,6],\"e_static_from\":"
	                    "\"eissa_kazi_1988\",\"vsh\":[0.8,0.2]}"));
	const cJSON *res = result_of(r), *rel;

	(void)state;
	assert_rel(num_at(res, "ucs", 0), 0.77 * pow(3.048, 2.93), 1e-12);
	assert_rel(num_at(res, "ucs", 1), 0.77 * pow(1.524, 2.93), 1e-12);
	assert_rel(num_at(res, "e_static", 0), 0.74 * 20 - 0.82, 1e-12);
	assert_false(flags(res, "qc", 0) & STRRNG);
	assert_true(flags(res, "qc", 1) & STRRNG);
	/* a shale relation on a sand (vsh 0.2) */
	assert_true(flags(res, "pressure_detail", 1) & D_LITH);
	rel = cJSON_GetObjectItemCaseSensitive(res, "relation");
	assert_string_equal(
	    cJSON_GetObjectItemCaseSensitive(rel, "lithology")->valuestring,
	    "shale");
	assert_rel(num(rel, "span_min"), 87, 1e-12);
	caution_on_all(res, 2);
	cJSON_Delete(r);
	/* a linear calibration and a modulus correlation */
	r = call(req("rock.strength",
	             "{\"relation\":\"bradford_1998\",\"e_static_from\":{"
	             "\"a\":0.5,\"b\":1},\"vp\":3000,\"vs\":1600,"
	             "\"rhob\":2.3}"));
	res = result_of(r);
	{
		double vp = 3000, vs = 1600, rho = 2300;
		double ed = rho * vs * vs * (3 * vp * vp - 4 * vs * vs) /
		            (vp * vp - vs * vs);
		double es = 0.5 * ed + 1e9;
		assert_rel(num_at(res, "e_dyn", 0), ed * 1e-9, 1e-12);
		assert_rel(num_at(res, "ucs", 0), 2.28 + 4.1089 * es * 1e-9,
		           1e-12);
	}
	cJSON_Delete(r);
	expect_invalid(req("rock.strength", "{\"dtp\":100}"), "relation",
	               "required");
	expect_invalid(
	    req("rock.strength", "{\"relation\":\"horsrud_2010\",\"dtp\":100}"),
	    "relation", "did you mean");
	expect_invalid(
	    req("rock.strength", "{\"relation\":\"vernik_1993\",\"dtp\":100}"),
	    "porosity", "required");
	expect_invalid(req("rock.strength",
	                   "{\"relation\":\"horsrud_2001\",\"dtp\":100,"
	                   "\"porosity\":0.2}"),
	               "porosity", "not used");
	expect_invalid(req("rock.strength",
	                   "{\"relation\":\"bradford_1998\",\"dtp\":100}"),
	               "e_static", "static Young");
	expect_invalid(req("rock.strength",
	                   "{\"relation\":\"horsrud_2001\",\"dtp\":100,"
	                   "\"e_static_from\":\"kazi\"}"),
	               "e_static_from", "unknown conversion");
	expect_invalid(req("rock.strength",
	                   "{\"relation\":\"horsrud_2001\",\"dtp\":100,"
	                   "\"vs\":1000}"),
	               "vs", "needs vp");
}

/* ---- log.process
 * ------------------------------------------------------------- */

#define LOGP(extra)                                                            \
	"{\"depth\":[900,1000,1100,1200],\"dtp\":[125,122,150,140],"           \
	"\"dts\":[230,225,280,260],\"rhob\":[2.25,2.3,2.2,2.33],"              \
	"\"gr\":[100,105,110,40],\"gr_clean\":30,\"gr_shale\":120,"            \
	"\"caliper\":[0.22,0.30,0.22,0.22],\"bit_size\":0.216,"                \
	"\"pressures\":{\"depth_is\":\"tvd\",\"column\":{\"air_gap\":25,"      \
	"\"water_depth\":100},\"trend\":{\"dt_ma\":60,\"dt_ml\":180,"          \
	"\"c\":6e-4,\"top\":500,\"base\":1000}" extra "}}"

static void test_log_matches_methods(void **state)
{
	/* log.process with pressures gives what the stand-alone methods give
	 * on the same samples: the overburden of the densities it uses (a
	 * washed-out one held), Eaton on its slowness, Eaton 1969 on its
	 * Poisson's ratio. */
	cJSON *lg = call(req("log.process", LOGP("")));
	const cJSON *L = result_of(lg), *P;
	cJSON *ob, *po, *fr;
	char nu[256], pp[256], sv[256];
	double v[3][4];

	(void)state;
	ob =
	    call(req("pressure.overburden",
	             "{\"tvd\":[900,1000,1100,1200],\"rhob\":[2.25,null,2.2,"
	             "2.33],\"column\":{\"air_gap\":25,\"water_depth\":100}}"));
	for (int i = 0; i < 4; i++)
		assert_rel(num_at(L, "sv", i), num_at(result_of(ob), "sv", i),
		           1e-14);
	/* the washed-out density (caliper 0.30 over 0.216) was held */
	assert_true(flags(L, "pressure_detail", 1) & D_DOUBTFUL);
	assert_true(flags(L, "qc", 1) & EXTRAP);
	for (int i = 0; i < 4; i++) {
		v[0][i] = num_at(L, "sv", i);
		v[1][i] = num_at(L, "pp", i);
		v[2][i] = num_at(L, "nu", i);
	}
	po = call(req("pressure.pore",
	              "{\"tvd\":[900,1000,1100,1200],\"dtp\":[125,122,150,"
	              "140],\"sv\":%s,\"gr\":[100,105,110,40],\"gr_clean\":30,"
	              "\"gr_shale\":120,\"column\":{\"air_gap\":25,"
	              "\"water_depth\":100},\"trend\":{\"dt_ma\":60,"
	              "\"dt_ml\":180,\"c\":6e-4,\"top\":500,\"base\":1000}}",
	              arr(sv, sizeof sv, v[0], 4)));
	P = result_of(po);
	for (int i = 0; i < 4; i++) {
		assert_rel(num_at(L, "pp", i), num_at(P, "pp", i), 1e-13);
		assert_rel(num_at(L, "ph", i), num_at(P, "ph", i), 1e-13);
		assert_rel(num_at(L, "dt_normal", i), num_at(P, "dt_normal", i),
		           1e-13);
	}
	/* the sand (gr 40) is not shale; below the trend's span extrapolated */
	assert_true(flags(L, "qc", 3) & NOTSH);
	assert_true(flags(L, "pressure_detail", 2) & D_TR_EXTRA);
	fr = call(req("pressure.fracture",
	              "{\"tvd\":[900,1000,1100,1200],\"sv\":%s,\"pp\":%s,"
	              "\"nu\":%s,\"column\":{\"air_gap\":25,"
	              "\"water_depth\":100}}",
	              arr(sv, sizeof sv, v[0], 4), arr(pp, sizeof pp, v[1], 4),
	              arr(nu, sizeof nu, v[2], 4)));
	for (int i = 0; i < 4; i++) {
		assert_rel(num_at(L, "shmin", i),
		           num_at(result_of(fr), "shmin", i), 1e-13);
		assert_rel(num_at(L, "shmin_emw", i),
		           num_at(result_of(fr), "shmin_emw", i), 1e-13);
	}
	caution_on_all(L, 4);
	cJSON_Delete(lg);
	cJSON_Delete(ob);
	cJSON_Delete(po);
	cJSON_Delete(fr);
}

static void test_log_blocks_equal_whole(void **state)
{
	/* Two blocks carried by the state token equal one request. */
	char tok[256];
	cJSON *whole = call(req("log.process", LOGP(""))), *a, *b;

	(void)state;
	a = call(req("log.process",
	             "{\"depth\":[900,1000],\"dtp\":[125,122],\"dts\":[230,"
	             "225],\"rhob\":[2.25,2.3],\"gr\":[100,105],\"gr_clean\":"
	             "30,\"gr_shale\":120,\"caliper\":[0.22,0.30],"
	             "\"bit_size\":0.216,\"pressures\":{\"depth_is\":\"tvd\","
	             "\"column\":{\"air_gap\":25,\"water_depth\":100},"
	             "\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	             "\"top\":500,\"base\":1000}}}"));
	token_of(result_of(a), "pressure_state", tok, sizeof tok);
	b = call(req("log.process",
	             "{\"depth\":[1100,1200],\"dtp\":[150,140],\"dts\":[280,"
	             "260],\"rhob\":[2.2,2.33],\"gr\":[110,40],\"gr_clean\":"
	             "30,\"gr_shale\":120,\"caliper\":[0.22,0.22],"
	             "\"bit_size\":0.216,\"pressures\":{\"depth_is\":\"tvd\","
	             "\"column\":{\"air_gap\":25,\"water_depth\":100},"
	             "\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	             "\"top\":500,\"base\":1000},\"state\":\"%s\"}}",
	             tok));
	static const char *const keys[] = {
	    "sv", "ph", "pp", "shmin", "sv_emw", "pp_emw", "pressure_detail",
	    "qc"};
	for (size_t k = 0; k < sizeof keys / sizeof *keys; k++)
		for (int i = 0; i < 4; i++)
			assert_true(
			    num_at(result_of(i < 2 ? a : b), keys[k], i % 2) ==
			    num_at(result_of(whole), keys[k], i));
	cJSON_Delete(whole);
	cJSON_Delete(a);
	cJSON_Delete(b);
}

static void test_log_md_and_fit(void **state)
{
	cJSON *r;
	const cJSON *res;

	(void)state;
	/* md with a tvd curve: the pressures follow the TVD */
	r = call(req("log.process",
	             "{\"depth\":[1000,1100],\"tvd\":[950,1030],\"dtp\":[120,"
	             "118],\"dts\":[220,215],\"rhob\":2.3,\"pressures\":{"
	             "\"depth_is\":\"md\",\"pore\":\"none\",\"fracture\":"
	             "\"none\",\"column\":{\"shallow\":{\"rho_ml\":2.3,"
	             "\"a\":0}}}}"));
	res = result_of(r);
	assert_rel(num_at(res, "sv", 1), 2300 * G0 * 1030 * 1e-6, 1e-13);
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "pp"));
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "shmin"));
	cJSON_Delete(r);
	/* a trend fitted on the request's shale samples */
	r = call(req("log.process",
	             "{\"depth\":[600,700,800,900,1000,1100],\"dtp\":[150,144,"
	             "139,134,130,126],\"dts\":[300,290,280,270,262,255],"
	             "\"rhob\":2.2,\"pressures\":{\"depth_is\":\"tvd\","
	             "\"trend_fit\":{\"intervals\":[{\"top\":500,"
	             "\"base\":1200}]}}}"));
	res = result_of(r);
	assert_int_equal(
	    num(cJSON_GetObjectItemCaseSensitive(res, "pressure_fit"),
	        "n_used"),
	    6);
	assert_true(num_at(res, "pp_sigma_trend", 0) >= 0);
	cJSON_Delete(r);
	/* without pressures nothing of the family is written */
	r = call(req("log.process", "{\"dtp\":120,\"dts\":220,\"rhob\":2.3}"));
	res = result_of(r);
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "sv"));
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "pressure_state"));
	assert_null(cJSON_GetObjectItemCaseSensitive(res, "pressure_detail"));
	cJSON_Delete(r);
}

static void test_log_errors(void **state)
{
	(void)state;
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"pore\":\"none\","
	                   "\"fracture\":\"none\"}}"),
	               "pressures.depth_is", "required");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"md\","
	                   "\"pore\":\"none\",\"fracture\":\"none\"}}"),
	               "tvd", "deviation survey");
	expect_invalid(
	    req("log.process",
	        "{\"dtp\":120,\"dts\":220,\"rhob\":2.3,\"pressures\":{"
	        "\"depth_is\":\"tvd\",\"pore\":\"none\","
	        "\"fracture\":\"none\"}}"),
	    "depth", "required by pressures");
	expect_invalid(
	    req("log.process",
	        "{\"depth\":1000,\"tvd\":990,\"dtp\":120,\"dts\":220,"
	        "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	        "\"pore\":\"none\",\"fracture\":\"none\"}}"),
	    "tvd", "not used");
	expect_invalid(
	    req("log.process",
	        "{\"depth\":1000,\"tvd\":990,\"dtp\":120,\"dts\":220,"
	        "\"rhob\":2.3}"),
	    "tvd", "serves pressures");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"pore\":\"none\"}}"),
	               "pressures.fracture", "needs the pore pressure");
	expect_invalid(
	    req("log.process",
	        "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	        "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\"}}"),
	    "pressures.trend", "Eaton needs");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"pore\":\"none\",\"fracture\":\"none\","
	                   "\"column\":{\"water_depth\":800}}}"),
	               "pressures.column.shallow", "deep water");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"fracture\":\"matthews_kelly\",\"trend\":{"
	                   "\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}}"),
	               "pressures.ki", "matrix-stress");
	expect_invalid(
	    req("log.process",
	        "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	        "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	        "\"fracture\":\"poroelastic\",\"eps_h\":0.001,"
	        "\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4}}}"),
	    "pressures.e_static_from", "tectonic strain");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"state\":\"rwp1.x\",\"trend_fit\":{\"intervals\":"
	                   "[{\"top\":500,\"base\":1200}]}}}"),
	               "pressures.trend_fit", "fit it once");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"pore\":\"none\",\"fracture\":\"none\","
	                   "\"state\":\"rwp1.x\"}}"),
	               "pressures.state", "not a state token");
	expect_invalid(req("log.process",
	                   "{\"depth\":1000,\"dtp\":120,\"dts\":220,"
	                   "\"rhob\":2.3,\"pressures\":{\"depth_is\":\"tvd\","
	                   "\"pore\":\"none\",\"fracture\":\"none\","
	                   "\"bogus\":1}}"),
	               "pressures.bogus", "unknown parameter");
}

int main(void)
{
	gsl_set_error_handler_off();
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_overburden_constant_exact),
	    cmocka_unit_test(test_overburden_default_law),
	    cmocka_unit_test(test_overburden_deep_water_needs_law),
	    cmocka_unit_test(test_overburden_doubtful_and_order),
	    cmocka_unit_test(test_state_continues_exactly),
	    cmocka_unit_test(test_state_refused),
	    cmocka_unit_test(test_resume),
	    cmocka_unit_test(test_hydrostatic_fresh_water),
	    cmocka_unit_test(test_hydrostatic_offshore),
	    cmocka_unit_test(test_hydrostatic_brine_wiring),
	    cmocka_unit_test(test_trend_fit_recovers),
	    cmocka_unit_test(test_trend_selection),
	    cmocka_unit_test(test_eaton_on_trend_is_hydrostatic),
	    cmocka_unit_test(test_eaton_shale_selector),
	    cmocka_unit_test(test_pore_fitted_sigma),
	    cmocka_unit_test(test_bowers_field_units),
	    cmocka_unit_test(test_pore_errors),
	    cmocka_unit_test(test_fracture_between_pp_and_sv),
	    cmocka_unit_test(test_fracture_poroelastic_strain),
	    cmocka_unit_test(test_strength),
	    cmocka_unit_test(test_log_matches_methods),
	    cmocka_unit_test(test_log_blocks_equal_whole),
	    cmocka_unit_test(test_log_md_and_fit),
	    cmocka_unit_test(test_log_errors),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
