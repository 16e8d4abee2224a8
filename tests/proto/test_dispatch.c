/* Protocol tests without sockets: the JSON-RPC 2.0 envelope, every error
 * code, batches (the specification's own examples as golden cases),
 * notifications, id types, and the parameter machinery through
 * elastic.convert: broadcasting, mismatched lengths, units, QC flags and
 * null outputs. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "proto/harness.h"

#define REQ(method, params)                                                    \
	"{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"" method                   \
	"\",\"params\":" params "}"

/* splitmix64 (Steele et al. 2014): a generator of the test's own. */
static uint64_t mix_next(uint64_t *s)
{
	uint64_t z = (*s += 0x9e3779b97f4a7c15ull);
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
	z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
	return z ^ (z >> 31);
}

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

static void expect_error(harness *h, const char *line, int code,
                         const char *param, int id_null)
{
	cJSON *r = h_call(h, line);
	if (!r)
		fail_msg("no JSON response for %s: '%s'", line, h->out.data);
	if (h_code(r) != code)
		fail_msg("%s: code %d, want %d (%s)", line, h_code(r), code,
		         h->out.data);
	if (param && strcmp(h_param(r), param) != 0)
		fail_msg("%s: param '%s', want '%s'", line, h_param(r), param);
	if (id_null)
		assert_true(cJSON_IsNull(cJSON_GetObjectItem(r, "id")));
	cJSON_Delete(r);
}

/* JSON-RPC 2.0 specification, section 7 examples. */
static void test_spec_examples(void **state)
{
	harness *h = *state;
	const char *raw;

	/* rpc call with invalid JSON */
	expect_error(h,
	             "{\"jsonrpc\": \"2.0\", \"method\": \"foobar, "
	             "\"params\": \"bar\", \"baz]",
	             -32700, NULL, 1);
	/* invalid Request object: method must be a string */
	expect_error(h,
	             "{\"jsonrpc\": \"2.0\", \"method\": 1, \"params\": "
	             "\"bar\"}",
	             -32600, "method", 1);
	/* non-existent method */
	expect_error(h,
	             "{\"jsonrpc\": \"2.0\", \"method\": \"foobar\", "
	             "\"id\": \"1\"}",
	             -32601, "method", 0);
	/* batch, invalid JSON */
	expect_error(h,
	             "[{\"jsonrpc\": \"2.0\", \"method\": \"sum\", "
	             "\"params\": [1,2,4], \"id\": \"1\"},{\"jsonrpc\": "
	             "\"2.0\", \"method\"]",
	             -32700, NULL, 1);
	/* empty array: one error object, not an array */
	expect_error(h, "[]", -32600, NULL, 1);
	/* an invalid batch but not empty: an array holding one error */
	raw = h_raw(h, "[1]");
	{
		cJSON *r = cJSON_Parse(raw);
		assert_true(cJSON_IsArray(r));
		assert_int_equal(cJSON_GetArraySize(r), 1);
		assert_int_equal(h_code(cJSON_GetArrayItem(r, 0)), -32600);
		cJSON_Delete(r);
	}
	/* invalid batch: three errors */
	raw = h_raw(h, "[1,2,3]");
	{
		cJSON *r = cJSON_Parse(raw);
		assert_int_equal(cJSON_GetArraySize(r), 3);
		cJSON_Delete(r);
	}
	/* all notifications: nothing at all */
	raw = h_raw(h, "[{\"jsonrpc\":\"2.0\",\"method\":\"service.info\"},"
	               "{\"jsonrpc\":\"2.0\",\"method\":\"nope\"}]");
	assert_string_equal(raw, "");
	/* a mixed batch: responses for the calls only, in order */
	raw = h_raw(h, "[{\"jsonrpc\":\"2.0\",\"method\":\"service.info\","
	               "\"id\":\"a\"},{\"jsonrpc\":\"2.0\",\"method\":"
	               "\"service.info\"},{\"foo\":\"boo\"},{\"jsonrpc\":"
	               "\"2.0\",\"method\":\"nope\",\"id\":5}]");
	{
		cJSON *r = cJSON_Parse(raw);
		assert_int_equal(cJSON_GetArraySize(r), 3);
		assert_string_equal(
		    cJSON_GetObjectItem(cJSON_GetArrayItem(r, 0), "id")
		        ->valuestring,
		    "a");
		assert_int_equal(h_code(cJSON_GetArrayItem(r, 1)), -32600);
		assert_int_equal(h_code(cJSON_GetArrayItem(r, 2)), -32601);
		cJSON_Delete(r);
	}
	/* exactly one line per response */
	raw = h_raw(h, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	               "\"rpc.discover\"}");
	assert_non_null(strchr(raw, '\n'));
	assert_int_equal(strchr(raw, '\n') - raw + 1, (long)strlen(raw));
}

static void test_ids_and_envelope(void **state)
{
	harness *h = *state;
	cJSON *r;

	r = h_call(h, "{\"jsonrpc\":\"2.0\",\"id\":\"x-7\",\"method\":"
	              "\"service.info\"}");
	assert_string_equal(cJSON_GetObjectItem(r, "id")->valuestring, "x-7");
	cJSON_Delete(r);
	r = h_call(h, "{\"jsonrpc\":\"2.0\",\"id\":42,\"method\":"
	              "\"service.info\"}");
	assert_int_equal(cJSON_GetObjectItem(r, "id")->valueint, 42);
	cJSON_Delete(r);
	r = h_call(h, "{\"jsonrpc\":\"2.0\",\"id\":null,\"method\":"
	              "\"service.info\"}");
	assert_true(cJSON_IsNull(cJSON_GetObjectItem(r, "id")));
	assert_non_null(h_result(r, "version"));
	cJSON_Delete(r);
	/* a notification is run and not answered */
	assert_string_equal(
	    h_raw(h, "{\"jsonrpc\":\"2.0\",\"method\":\"service.info\"}"), "");
	/* blank and CR-terminated lines */
	assert_string_equal(h_raw(h, "   "), "");
	r = h_call(h, "{\"jsonrpc\":\"2.0\",\"id\":3,\"method\":"
	              "\"service.info\"}\r");
	assert_int_equal(h_code(r), 0);
	cJSON_Delete(r);
	expect_error(h, "{\"jsonrpc\":\"2.0\",\"id\":[1],\"method\":\"x\"}",
	             -32600, "id", 1);
	expect_error(h, "{\"jsonrpc\":\"1.0\",\"id\":1,\"method\":\"x\"}",
	             -32600, "jsonrpc", 0);
	expect_error(h, "{\"id\":1,\"method\":\"service.info\"}", -32600,
	             "jsonrpc", 0);
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	             "\"service.info\",\"extra\":1}",
	             -32600, "extra", 0);
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"id\":2,\"method\":"
	             "\"service.info\"}",
	             -32600, "id", 1);
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	             "\"service.info\",\"params\":5}",
	             -32600, "params", 0);
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	             "\"service.info\",\"params\":[1]}",
	             -32602, "params", 0);
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	             "\"service.info\",\"params\":{\"x\":1}}",
	             -32602, "x", 0);
	/* bytes: invalid UTF-8, raw control bytes, trailing garbage */
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"\xc3\x28\"}",
	             -32700, NULL, 1);
	expect_error(h, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"a\x01\"}",
	             -32700, NULL, 1);
	expect_error(h, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"x\"} x",
	             -32700, NULL, 1);
	expect_error(h, "NaN", -32700, NULL, 1);
	/* U+0000 would be cut short by the parser: refused, not shortened */
	expect_error(h,
	             "{\"jsonrpc\":\"2.0\",\"id\":\"a\\u0000b\","
	             "\"method\":\"service.info\"}",
	             -32600, NULL, 1);
	/* nesting beyond the limit (64) is refused before parsing */
	{
		char deep[400];
		size_t n = 0;
		for (int i = 0; i < 100; i++)
			deep[n++] = '[';
		for (int i = 0; i < 100; i++)
			deep[n++] = ']';
		deep[n] = '\0';
		expect_error(h, deep, -32600, NULL, 1);
	}
}

/* elastic.convert through the protocol: arrays, broadcasting, units, QC. */
static void test_elastic_convert(void **state)
{
	harness *h = *state;
	cJSON *r;
	const cJSON *vp, *qc, *u;

	r = h_call(
	    h, REQ("elastic.convert", "{\"rho\":2.65,\"k\":36.6,\"mu\":45}"));
	/* quartz: Mavko et al. 2009 mineral table (from memory) gives Vp
	 * about 6038 m/s */
	assert_true(fabs(h_result(r, "vp")->valuedouble - 6038) < 1);
	assert_int_equal(h_result(r, "qc")->valueint, 0);
	u = h_result(r, "units");
	assert_string_equal(cJSON_GetObjectItem(u, "vp")->valuestring, "m/s");
	assert_string_equal(cJSON_GetObjectItem(u, "dtp")->valuestring,
	                    "us/ft");
	cJSON_Delete(r);

	/* broadcasting: one array, scalars follow */
	r = h_call(h, REQ("elastic.convert",
	                  "{\"rho\":[2.2,2.3,null],\"vp\":3000,\"vs\":[1500,"
	                  "2200,1500]}"));
	vp = h_result(r, "vp");
	qc = h_result(r, "qc");
	assert_int_equal(cJSON_GetArraySize(vp), 3);
	assert_true(cJSON_IsNumber(cJSON_GetArrayItem(vp, 0)));
	/* vs 2200 with vp 3000: nu < 0, possible but implausible */
	assert_true(cJSON_GetArrayItem(qc, 1)->valueint & (1 << 4));
	assert_true(cJSON_IsNumber(cJSON_GetArrayItem(vp, 1)));
	/* a null density: null outputs, flagged input_missing (bit 28) only,
	 * not as an impossible density */
	assert_true(cJSON_IsNull(cJSON_GetArrayItem(vp, 2)));
	assert_int_equal(cJSON_GetArrayItem(qc, 2)->valueint, 1 << 28);
	cJSON_Delete(r);

	/* impossible sample: vp/vs below 2/sqrt(3) gives K < 0 */
	r = h_call(h,
	           REQ("elastic.convert",
	               "{\"rho\":2.3,\"vp\":[3000,3000],\"vs\":[1500,2700]}"));
	vp = h_result(r, "vp");
	qc = h_result(r, "qc");
	assert_true(cJSON_IsNull(cJSON_GetArrayItem(vp, 1)));
	assert_true(cJSON_GetArrayItem(qc, 1)->valueint & (1 << 2));
	assert_int_equal(cJSON_GetArrayItem(qc, 0)->valueint, 0);
	cJSON_Delete(r);

	/* units in and out: km/s and kg/m3, slowness in us/m */
	r = h_call(h, REQ("elastic.convert",
	                  "{\"rho\":2300,\"vp\":3,\"vs\":1.5,\"units\":{"
	                  "\"velocity\":\"km/s\",\"density\":\"kg/m3\","
	                  "\"slowness\":\"us/m\",\"modulus\":\"MPa\"}}"));
	assert_true(fabs(h_result(r, "vp")->valuedouble - 3) < 1e-12);
	assert_true(fabs(h_result(r, "dtp")->valuedouble - 1e6 / 3000) < 1e-9);
	/* mu = rho vs^2 = 2300 * 1500^2 Pa = 5175 MPa */
	assert_true(fabs(h_result(r, "mu")->valuedouble - 5175) < 1e-9);
	assert_string_equal(
	    cJSON_GetObjectItem(h_result(r, "units"), "rho")->valuestring,
	    "kg/m3");
	cJSON_Delete(r);

	/* slowness input: 100 us/ft is 3048 m/s */
	r = h_call(
	    h, REQ("elastic.convert", "{\"rho\":2.3,\"dtp\":100,\"dts\":200}"));
	assert_true(fabs(h_result(r, "vp")->valuedouble - 3048) < 1e-9);
	cJSON_Delete(r);

	/* structural mistakes */
	expect_error(h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500}"),
	             -32602, "rho", 0);
	expect_error(h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":3000}"),
	             -32602, "vp", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"k\":9}"),
	             -32602, NULL, 0);
	expect_error(
	    h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":3000,\"ai\":6900}"),
	    -32602, "ai", 0);
	expect_error(
	    h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":3000,\"e\":20}"),
	    -32602, "e", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":[2.3,2.4],\"vp\":[3000,3100,3200],"
	                 "\"vs\":1500}"),
	             -32602, "vp", 0);
	expect_error(
	    h,
	    REQ("elastic.convert", "{\"rho\":2.3,\"vp\":\"3000\",\"vs\":1500}"),
	    -32602, "vp", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":[3000,\"x\"],\"vs\":1500}"),
	             -32602, "vp", 0);
	expect_error(
	    h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":1e400,\"vs\":1500}"),
	    -32602, "vp", 0);
	expect_error(
	    h, REQ("elastic.convert", "{\"rho\":2.3,\"vp\":[],\"vs\":1500}"),
	    -32602, "vp", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"vq\":1}"),
	             -32602, "vq", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3,\"vs\":1,\"units\":{"
	                 "\"velocity\":\"mph\"}}"),
	             -32602, "units", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3,\"vs\":1,\"units\":{"
	                 "\"speed\":\"m/s\"}}"),
	             -32602, "units", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"qc\":{"
	                 "\"vp_min\":9000,\"vp_max\":100}}"),
	             -32602, "qc", 0);
	expect_error(h,
	             REQ("elastic.convert",
	                 "{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"qc\":{"
	                 "\"vpmin\":9000}}"),
	             -32602, "qc.vpmin", 0);
}

/* Overridden plausibility ranges change the flags, not the values. */
static void test_qc_override(void **state)
{
	harness *h = *state;
	cJSON *r = h_call(h, REQ("elastic.convert",
	                         "{\"rho\":1.9,\"vp\":1300,\"vs\":300,\"qc\":{"
	                         "\"vp_min\":1500}}"));
	assert_true(h_result(r, "qc")->valueint & (1 << 6));
	assert_true(fabs(h_result(r, "vp")->valuedouble - 1300) < 1e-9);
	cJSON_Delete(r);
}

/* service.info carries the caution, limits, units and the legend; the
 * counters count. */
static void test_service_info(void **state)
{
	harness *h = *state;
	cJSON *r = h_call(h, REQ("service.info", "{}"));
	const cJSON *c = h_result(r, "counters");
	assert_non_null(
	    strstr(h_result(r, "caution")->valuestring, "qualified review"));
	assert_true(cJSON_GetObjectItem(h_result(r, "limits"), "max_line_bytes")
	                ->valuedouble >= 64.0 * 1024 * 1024);
	assert_true(cJSON_GetArraySize(h_result(r, "qc_flags")) >= 8);
	assert_true(cJSON_GetObjectItem(c, "requests")->valueint >= 1);
	assert_true(
	    cJSON_GetObjectItem(cJSON_GetObjectItem(c, "errors"), "-32602")
	        ->valueint >= 0);
	cJSON_Delete(r);
	r = h_call(h, REQ("rpc.discover", "{}"));
	assert_string_equal(h_result(r, "openrpc")->valuestring, "1.2.6");
	assert_true(cJSON_GetArraySize(h_result(r, "methods")) >= 3);
	cJSON_Delete(r);
}

/* Sessions: defaults inherited, overridden by params, reset. */
static void test_session(void **state)
{
	harness *h = *state;
	cJSON *r;

	r = h_call(h, REQ("session.set", "{\"rho\":2.5}"));
	assert_int_equal(h_code(r), 0);
	cJSON_Delete(r);
	r = h_call(h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500}"));
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2.5) < 1e-12);
	cJSON_Delete(r);
	r = h_call(
	    h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500,\"rho\":2.1}"));
	assert_true(fabs(h_result(r, "rho")->valuedouble - 2.1) < 1e-12);
	cJSON_Delete(r);
	expect_error(h, REQ("session.set", "{\"rho\":\"heavy\"}"), -32602,
	             "rho", 0);
	expect_error(h, REQ("session.set", "{\"nonesuch\":1}"), -32602,
	             "nonesuch", 0);
	r = h_call(h, REQ("session.reset", "{}"));
	cJSON_Delete(r);
	expect_error(h, REQ("elastic.convert", "{\"vp\":3000,\"vs\":1500}"),
	             -32602, "rho", 0);
}

/* The work estimate the server uses to keep heavy requests off the event
 * loop: samples x angles, counting session defaults; batches add up. */
static void test_cost(void **state)
{
	harness *h = *state;
	const char *small = "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                    "\"elastic.convert\",\"params\":{\"rho\":2.3,"
	                    "\"vp\":3000,\"vs\":1500}}";
	const char *series = "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                     "\"reflect.series\",\"params\":{\"vp\":[1,2,3,"
	                     "4],\"vs\":1,\"rho\":1,\"angle\":[0,10,20]}}";
	const char *inherit = "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
	                      "\"elastic.convert\",\"params\":{\"vp\":3000,"
	                      "\"vs\":1500}}";
	char batch[1024];
	cJSON *r;

	assert_int_equal(rw_proto_cost(h->s, small, strlen(small)), 1);
	/* 4 samples x 3 angles x reflect.series' declared cost of 2 */
	assert_int_equal(rw_proto_cost(h->s, series, strlen(series)), 24);
	assert_int_equal(rw_proto_cost(h->s, "{", 1), 1);
	snprintf(batch, sizeof batch, "[%s,%s]", small, series);
	assert_int_equal(rw_proto_cost(h->s, batch, strlen(batch)), 25);
	r = h_call(h, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	              "\"session.set\",\"params\":{\"rho\":[2.1,2.2,2.3,"
	              "2.4,2.5]}}");
	assert_int_equal(h_code(r), 0);
	cJSON_Delete(r);
	assert_int_equal(rw_proto_cost(h->s, inherit, strlen(inherit)), 5);
	/* a value given is used, not the session's */
	assert_int_equal(rw_proto_cost(h->s, small, strlen(small)), 1);
	/* a short line can be heavy: 5000 draws x 1 sample (elastic.convert,
	 * cost 1), the default 1000 draws, and a 50 x 40 template grid x
	 * rock.template's cost of 20 per node */
	{
		const char *unc =
		    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		    "\"elastic.convert\",\"params\":{\"rho\":{\"dist\":"
		    "\"normal\",\"mean\":2.3,\"sd\":0.1},\"vp\":3000,"
		    "\"vs\":1500,\"uncertainty\":{\"draws\":5000}}}";
		const char *unc_d =
		    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		    "\"elastic.convert\",\"params\":{\"rho\":{\"dist\":"
		    "\"normal\",\"mean\":2.3,\"sd\":0.1},\"vp\":3000,"
		    "\"vs\":1500}}";
		const char *tpl =
		    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		    "\"rock.template\",\"params\":{\"model\":\"soft_sand\","
		    "\"porosity_axis\":{\"from\":0,\"to\":0.4,\"n\":50},"
		    "\"sw_axis\":{\"from\":0,\"to\":1,\"n\":40}}}";
		assert_int_equal(rw_proto_cost(h->s, unc, strlen(unc)), 5000);
		assert_int_equal(rw_proto_cost(h->s, unc_d, strlen(unc_d)),
		                 1000);
		assert_int_equal(rw_proto_cost(h->s, tpl, strlen(tpl)),
		                 50 * 40 * 20);
	}
}

/* rw_proto_classify: a line that names a session method anywhere (alone
 * in a batch or not) runs alone; other lines, unknown methods and lines
 * that do not parse only read the session. The estimate is
 * rw_proto_cost's. */
static void test_classify(void **state)
{
	harness *h = *state;
	const char *set = "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                  "\"session.set\",\"params\":{\"vs\":1500}}";
	const char *info = "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
	                   "\"service.info\"}";
	const char *series = "{\"jsonrpc\":\"2.0\",\"id\":3,\"method\":"
	                     "\"reflect.series\",\"params\":{\"vp\":[1,2,3,"
	                     "4],\"vs\":1,\"rho\":1,\"angle\":[0,10,20]}}";
	const char *nope = "{\"jsonrpc\":\"2.0\",\"id\":4,\"method\":\"nope\"}";
	char batch[1024];
	int alone = -1;

	assert_int_equal(
	    rw_proto_classify(h->s, series, strlen(series), &alone), 24);
	assert_int_equal(alone, 0);
	rw_proto_classify(h->s, set, strlen(set), &alone);
	assert_int_equal(alone, 1);
	rw_proto_classify(h->s, info, strlen(info), &alone);
	assert_int_equal(alone, 1);
	rw_proto_classify(h->s, nope, strlen(nope), &alone);
	assert_int_equal(alone, 0);
	rw_proto_classify(h->s, "{", 1, &alone);
	assert_int_equal(alone, 0);
	snprintf(batch, sizeof batch, "[%s,%s]", series, nope);
	rw_proto_classify(h->s, batch, strlen(batch), &alone);
	assert_int_equal(alone, 0);
	snprintf(batch, sizeof batch, "[%s,%s,%s]", series, info, nope);
	assert_int_equal(rw_proto_classify(h->s, batch, strlen(batch), &alone),
	                 26);
	assert_int_equal(alone, 1);
}

/* rw_proto_line_shares: lines naming no session method share; every line
 * naming one (session.set, session.get, session.reset, service.info,
 * rpc.discover), or with an escape that could spell one, does not; and
 * it is never wrong where rw_proto_classify (a full parse) can tell:
 * 20,000 lines put together from fragments that name, nearly name or
 * escape session methods, in every order, none said to share when the
 * parse finds a session method. */
static void test_line_shares(void **state)
{
	harness *h = *state;
	static const char *const alone[] = {"session.set", "session.get",
	                                    "session.reset", "service.info",
	                                    "rpc.discover"};
	static const char *const frag[] = {"session.set",
	                                   "session.ge",
	                                   "sessionset",
	                                   "service.inf",
	                                   "rpc.discover",
	                                   "rpc.discove",
	                                   "elastic.convert",
	                                   "\\u0073",
	                                   "ses",
	                                   "sion.set",
	                                   "\\",
	                                   "service.info",
	                                   "2.0",
	                                   "session.reset",
	                                   ".",
	                                   "rpc."};
	char line[512];
	uint64_t seed = 99;

	assert_int_equal(
	    rw_proto_line_shares(REQ("elastic.convert", "{\"rho\":2}"),
	                         strlen(REQ("elastic.convert", "{\"rho\":2}"))),
	    1);
	for (size_t i = 0; i < sizeof alone / sizeof alone[0]; i++) {
		int n = snprintf(line, sizeof line,
		                 "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		                 "\"%s\"}",
		                 alone[i]);
		assert_int_equal(rw_proto_line_shares(line, (size_t)n), 0);
		/* the name at either end of the text */
		assert_int_equal(
		    rw_proto_line_shares(alone[i], strlen(alone[i])), 0);
	}
	/* an escaped name: only a parse sees session.set */
	strcpy(line, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	             "\"sess\\u0069on.set\",\"params\":{\"vs\":1}}");
	assert_int_equal(rw_proto_line_shares(line, strlen(line)), 0);
	for (int t = 0; t < 20000; t++) {
		int n, alone_flag = -1;
		char method[200] = "";
		size_t used = 0;
		for (int k = 0, parts = 1 + (int)(mix_next(&seed) % 4);
		     k < parts; k++) {
			const char *f = frag[mix_next(&seed) %
			                     (sizeof frag / sizeof frag[0])];
			size_t fl = strlen(f);
			if (used + fl + 1 < sizeof method) {
				memcpy(method + used, f, fl + 1);
				used += fl;
			}
		}
		n = snprintf(line, sizeof line,
		             "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		             "\"%s\",\"params\":{\"note\":\"%s\"}}",
		             method, t % 3 ? "" : method);
		if (rw_proto_line_shares(line, (size_t)n)) {
			rw_proto_classify(h->s, line, (size_t)n, &alone_flag);
			if (alone_flag != 0)
				fail_msg("said to share but names a session "
				         "method: %s",
				         line);
		}
	}
}

/* rw_proto_handle_light answers what costs less than its threshold with
 * the same bytes as rw_proto_handle (each on a fresh session), and
 * leaves the rest unanswered (1, nothing written): scalar lines, a batch,
 * lines that are not JSON or not UTF-8, a line with large arrays, and
 * short lines made heavy by draws or by an inherited session default. */
static void test_handle_light(void **state)
{
	char big[4096];
	size_t used;
	const char *lines[] = {
	    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic.convert\","
	    "\"params\":{\"rho\":2.3,\"vp\":3000,\"vs\":1500}}",
	    "[{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic.convert\","
	    "\"params\":{\"rho\":2.3,\"vp\":3000,\"vs\":1500}},{\"jsonrpc\":"
	    "\"2.0\",\"method\":\"service.ping\"},{\"jsonrpc\":\"2.0\",\"id\":"
	    "3,\"method\":\"nope\"}]",
	    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\"",
	    "{\"jsonrpc\":\"2.0\",\"id\":\"\xc3\x28\"}",
	    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic.convert\","
	    "\"params\":{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"bogus\":1}}",
	    big,
	};
	const char *heavy[] = {
	    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic.convert\","
	    "\"params\":{\"rho\":{\"dist\":\"normal\",\"mean\":2.3,\"sd\":0.1},"
	    "\"vp\":3000,\"vs\":1500,\"uncertainty\":{\"draws\":5000}}}",
	    big,
	};
	(void)state;

	/* 200 samples: above the pre-pass threshold, below 1000 of work */
	used = (size_t)snprintf(big, sizeof big,
	                        "{\"jsonrpc\":\"2.0\",\"id\":9,\"method\":"
	                        "\"elastic.convert\",\"params\":{\"rho\":2.3,"
	                        "\"vs\":1500,\"vp\":[3000");
	for (int i = 1; i < 200; i++)
		used += (size_t)snprintf(big + used, sizeof big - used, ",%d",
		                         3000 + i);
	snprintf(big + used, sizeof big - used, "]}}");
	for (size_t k = 0; k < sizeof lines / sizeof *lines; k++) {
		harness a, b;
		h_init(&a);
		h_init(&b);
		rw_proto_handle(a.s, lines[k], strlen(lines[k]), &a.out);
		assert_int_equal(rw_proto_handle_light(b.s, lines[k],
		                                       strlen(lines[k]), 1000,
		                                       &b.out),
		                 0);
		assert_true(a.out.len > 0);
		assert_int_equal(a.out.len, b.out.len);
		assert_memory_equal(a.out.data, b.out.data, a.out.len);
		h_free(&a);
		h_free(&b);
	}
	for (size_t k = 0; k < sizeof heavy / sizeof *heavy; k++) {
		harness b;
		h_init(&b);
		assert_int_equal(rw_proto_handle_light(b.s, heavy[k],
		                                       strlen(heavy[k]),
		                                       k ? 100 : 1000, &b.out),
		                 1);
		assert_int_equal(b.out.len, 0);
		h_free(&b);
	}
	/* heavy, and naming a session method: left to run alone (2) */
	{
		harness b;
		char batch[8192];
		snprintf(batch, sizeof batch,
		         "[%s,{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
		         "\"session.set\",\"params\":{\"vs\":1400}}]",
		         heavy[0]);
		h_init(&b);
		assert_int_equal(rw_proto_handle_light(
		                     b.s, batch, strlen(batch), 1000, &b.out),
		                 2);
		assert_int_equal(b.out.len, 0);
		/* the same with large arrays, which are only counted */
		snprintf(batch, sizeof batch,
		         "[%s,{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
		         "\"service.info\"}]",
		         big);
		assert_int_equal(rw_proto_handle_light(
		                     b.s, batch, strlen(batch), 100, &b.out),
		                 2);
		assert_int_equal(b.out.len, 0);
		h_free(&b);
	}
	/* an inherited 5-sample default makes a scalar line cost 5 */
	{
		harness b;
		const char *inherit =
		    "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
		    "\"elastic.convert\",\"params\":{\"vp\":3000,\"vs\":1500}}";
		h_init(&b);
		h_raw(&b, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
		          "\"session.set\",\"params\":{\"rho\":[2.1,2.2,2.3,"
		          "2.4,2.5]}}");
		b.out.len = 0;
		assert_int_equal(rw_proto_handle_light(
		                     b.s, inherit, strlen(inherit), 5, &b.out),
		                 1);
		assert_int_equal(b.out.len, 0);
		assert_int_equal(rw_proto_handle_light(
		                     b.s, inherit, strlen(inherit), 6, &b.out),
		                 0);
		assert_non_null(strstr(b.out.data, "\"n\":5"));
		h_free(&b);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test_setup_teardown(test_spec_examples, setup,
	                                    teardown),
	    cmocka_unit_test_setup_teardown(test_ids_and_envelope, setup,
	                                    teardown),
	    cmocka_unit_test_setup_teardown(test_elastic_convert, setup,
	                                    teardown),
	    cmocka_unit_test_setup_teardown(test_qc_override, setup, teardown),
	    cmocka_unit_test_setup_teardown(test_service_info, setup, teardown),
	    cmocka_unit_test_setup_teardown(test_session, setup, teardown),
	    cmocka_unit_test_setup_teardown(test_cost, setup, teardown),
	    cmocka_unit_test_setup_teardown(test_classify, setup, teardown),
	    cmocka_unit_test_setup_teardown(test_line_shares, setup, teardown),
	    cmocka_unit_test(test_handle_light),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
