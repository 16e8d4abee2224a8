/* Hostile input through the protocol layer and the line framer, with no
 * socket: each case of the corpus is one request line with the outcome
 * it must get (an error code naming a field with a reason, a result with
 * QC flags, or no answer), and after every case a valid request on the
 * same session must still succeed. Expected codes are those of the
 * JSON-RPC 2.0 specification (section 5.1) and protocol-docs/limits.md.
 * The same corpus runs over a real socket in tests/e2e/test_hard_hostile.py.
 */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>
#include <gsl/gsl_errno.h>

#include "proto/proto.h"
#include "server/lines.h"

#define OK_REQ                                                                 \
	"{\"jsonrpc\":\"2.0\",\"id\":\"probe\",\"method\":"                    \
	"\"elastic.convert\",\"params\":{\"rho\":2.4,\"vp\":3000,"             \
	"\"vs\":1500}}"
#define EC(params)                                                             \
	"{\"jsonrpc\":\"2.0\",\"id\":7,\"method\":\"elastic.convert\","        \
	"\"params\":" params "}"

enum { NO_ANSWER = 1, RESULT_QC = 2, BATCH = 3 };

typedef struct hcase {
	const char *name;
	const char *line;
	size_t len;        /* 0: strlen(line) */
	int expect;        /* a JSON-RPC error code, NO_ANSWER, RESULT_QC
	                      (result with a non-zero qc and null vp), or
	                      BATCH */
	const char *param; /* error.data.param wanted, or NULL */
	int batch_n;       /* BATCH: responses wanted ... */
	int batch_code;    /* ... each with this code (0 = a result) */
} hcase;

static const hcase corpus[] = {
    /* framing and JSON text (RFC 8259) */
    {"truncated object", "{\"jsonrpc\":\"2.0\",\"id\":1,\"meth", 0, -32700,
     NULL, 0, 0},
    {"truncated string", "{\"jsonrpc\":\"2.0\",\"id\":\"abc", 0, -32700, NULL,
     0, 0},
    {"truncated array", "[{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"x\"}", 0,
     -32700, NULL, 0, 0},
    {"lone brace", "}", 0, -32700, NULL, 0, 0},
    {"trailing garbage",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"service.info\"} x",
     0, -32700, NULL, 0, 0},
    {"two values", "{} {}", 0, -32700, NULL, 0, 0},
    {"deep nesting arrays", NULL, 0, -32600, NULL, 0, 0},
    {"deep nesting objects", NULL, 0, -32600, NULL, 0, 0},
    {"NUL byte raw", "{\"jsonrpc\":\"2.0\",\0\"id\":1}", 24, -32700, NULL, 0,
     0},
    {"NUL only", "\0", 1, -32700, NULL, 0, 0},
    {"control byte",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\x01\"method\":"
     "\"service.info\"}",
     0, -32700, NULL, 0, 0},
    {"invalid UTF-8 lone continuation", "{\"id\":\"\x80\"}", 0, -32700, NULL, 0,
     0},
    {"invalid UTF-8 overlong", "{\"id\":\"\xc0\xaf\"}", 0, -32700, NULL, 0, 0},
    {"invalid UTF-8 surrogate", "{\"id\":\"\xed\xa0\x80\"}", 0, -32700, NULL, 0,
     0},
    {"invalid UTF-8 truncated", "{\"id\":\"\xe2\x82", 0, -32700, NULL, 0, 0},
    {"invalid UTF-8 above U+10FFFF", "{\"id\":\"\xf4\x90\x80\x80\"}", 0, -32700,
     NULL, 0, 0},
    {"NaN literal", EC("{\"rho\":2.4,\"vp\":NaN,\"vs\":1500}"), 0, -32700, NULL,
     0, 0},
    {"Infinity literal", EC("{\"rho\":2.4,\"vp\":Infinity,\"vs\":1500}"), 0,
     -32700, NULL, 0, 0},
    {"-Infinity literal", EC("{\"rho\":2.4,\"vp\":-Infinity,\"vs\":1}"), 0,
     -32700, NULL, 0, 0},
    {"1e400", EC("{\"rho\":2.4,\"vp\":1e400,\"vs\":1500}"), 0, -32602, "vp", 0,
     0},
    {"-1e400 in array",
     EC("{\"rho\":2.4,\"vp\":[3000,-1e400],"
        "\"vs\":1500}"),
     0, -32602, "vp", 0, 0},
    /* envelope (JSON-RPC 2.0 section 4) */
    {"missing jsonrpc", "{\"id\":1,\"method\":\"service.info\"}", 0, -32600,
     "jsonrpc", 0, 0},
    {"wrong jsonrpc",
     "{\"jsonrpc\":\"1.0\",\"id\":1,\"method\":"
     "\"service.info\"}",
     0, -32600, "jsonrpc", 0, 0},
    {"jsonrpc as number",
     "{\"jsonrpc\":2.0,\"id\":1,\"method\":"
     "\"service.info\"}",
     0, -32600, "jsonrpc", 0, 0},
    {"missing method", "{\"jsonrpc\":\"2.0\",\"id\":1}", 0, -32600, "method", 0,
     0},
    {"method as number", "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":5}", 0,
     -32600, "method", 0, 0},
    {"unknown method",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"elastic.nothing\"}",
     0, -32601, "method", 0, 0},
    {"unknown member",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"service.info\",\"extra\":1}",
     0, -32600, "extra", 0, 0},
    {"unknown member spelt like a known one",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"service.info\",\"param\":{}}",
     0, -32600, "param", 0, 0},
    {"params a string",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"service.info\",\"params\":\"x\"}",
     0, -32600, "params", 0, 0},
    {"params an array", EC("[2.4,3000,1500]"), 0, -32602, "params", 0, 0},
    {"request a number", "42", 0, -32600, NULL, 0, 0},
    {"request a string", "\"service.info\"", 0, -32600, NULL, 0, 0},
    {"request null", "null", 0, -32600, NULL, 0, 0},
    {"duplicate key top",
     "{\"jsonrpc\":\"2.0\",\"id\":1,\"id\":2,"
     "\"method\":\"service.info\"}",
     0, -32600, "id", 0, 0},
    {"duplicate key nested",
     EC("{\"rho\":2.4,\"vp\":3000,\"vp\":3100,"
        "\"vs\":1500}"),
     0, -32600, "vp", 0, 0},
    /* eight members are compared pairwise, nine through a hash set */
    {"duplicate key of eight",
     EC("{\"rho\":2.4,\"a\":1,\"b\":1,\"c\":1,\"d\":1,\"e\":1,"
        "\"vp\":3000,\"rho\":2.5}"),
     0, -32600, "rho", 0, 0},
    {"duplicate key of nine",
     EC("{\"rho\":2.4,\"a\":1,\"b\":1,\"c\":1,\"d\":1,\"e\":1,"
        "\"f\":1,\"vp\":3000,\"rho\":2.5}"),
     0, -32600, "rho", 0, 0},
    /* every id type (JSON-RPC 2.0 section 4: string, number, null) */
    {"id string",
     "{\"jsonrpc\":\"2.0\",\"id\":\"a-1\",\"method\":"
     "\"service.info\"}",
     0, 0, NULL, 0, 0},
    {"id integer",
     "{\"jsonrpc\":\"2.0\",\"id\":-17,\"method\":"
     "\"service.info\"}",
     0, 0, NULL, 0, 0},
    {"id fraction",
     "{\"jsonrpc\":\"2.0\",\"id\":2.5,\"method\":"
     "\"service.info\"}",
     0, 0, NULL, 0, 0},
    {"id null",
     "{\"jsonrpc\":\"2.0\",\"id\":null,\"method\":"
     "\"service.info\"}",
     0, 0, NULL, 0, 0},
    {"id true",
     "{\"jsonrpc\":\"2.0\",\"id\":true,\"method\":"
     "\"service.info\"}",
     0, -32600, "id", 0, 0},
    {"id object",
     "{\"jsonrpc\":\"2.0\",\"id\":{},\"method\":"
     "\"service.info\"}",
     0, -32600, "id", 0, 0},
    {"id array",
     "{\"jsonrpc\":\"2.0\",\"id\":[1],\"method\":"
     "\"service.info\"}",
     0, -32600, "id", 0, 0},
    /* a number beyond a double is still an id: it is echoed as its text
     * (test_ids_exact) */
    {"id 1e400",
     "{\"jsonrpc\":\"2.0\",\"id\":1e400,\"method\":"
     "\"service.info\"}",
     0, 0, NULL, 0, 0},
    {"notification", "{\"jsonrpc\":\"2.0\",\"method\":\"service.info\"}", 0,
     NO_ANSWER, NULL, 0, 0},
    {"notification with bad params",
     "{\"jsonrpc\":\"2.0\",\"method\":"
     "\"elastic.convert\",\"params\":{\"rho\":\"x\"}}",
     0, NO_ANSWER, NULL, 0, 0},
    {"blank line", "  \t ", 0, NO_ANSWER, NULL, 0, 0},
    {"CR only", "\r", 0, NO_ANSWER, NULL, 0, 0},
    /* parameters (DESIGN.md: structural mistakes fail with -32602,
     * unphysical samples give null and a QC flag) */
    {"negative density", EC("{\"rho\":-2.4,\"vp\":3000,\"vs\":1500}"), 0,
     RESULT_QC, NULL, 0, 0},
    {"vs above vp", EC("{\"rho\":2.4,\"vp\":1500,\"vs\":3000}"), 0, RESULT_QC,
     NULL, 0, 0},
    {"mismatched lengths",
     EC("{\"rho\":2.4,\"vp\":[3000,3100],"
        "\"vs\":[1500,1600,1700]}"),
     0, -32602, "vs", 0, 0},
    {"empty array", EC("{\"rho\":2.4,\"vp\":[],\"vs\":1500}"), 0, -32602, "vp",
     0, 0},
    {"wrong type string", EC("{\"rho\":\"2.4\",\"vp\":3000,\"vs\":1500}"), 0,
     -32602, "rho", 0, 0},
    {"wrong type bool", EC("{\"rho\":2.4,\"vp\":true,\"vs\":1500}"), 0, -32602,
     "vp", 0, 0},
    {"wrong type object", EC("{\"rho\":2.4,\"vp\":{},\"vs\":1500}"), 0, -32602,
     "vp", 0, 0},
    {"string in array",
     EC("{\"rho\":2.4,\"vp\":[3000,\"x\"],"
        "\"vs\":1500}"),
     0, -32602, "vp", 0, 0},
    {"unknown parameter",
     EC("{\"rho\":2.4,\"vp\":3000,\"vs\":1500,"
        "\"colour\":1}"),
     0, -32602, "colour", 0, 0},
    {"missing density", EC("{\"vp\":3000,\"vs\":1500}"), 0, -32602, NULL, 0, 0},
    {"one quantity only", EC("{\"rho\":2.4,\"vp\":3000}"), 0, -32602, NULL, 0,
     0},
    {"unknown unit",
     EC("{\"rho\":2.4,\"vp\":3000,\"vs\":1500,\"units\":"
        "{\"velocity\":\"furlong/fortnight\"}}"),
     0, -32602, NULL, 0, 0},
    {"units not an object",
     EC("{\"rho\":2.4,\"vp\":3000,\"vs\":1500,"
        "\"units\":3}"),
     0, -32602, "units", 0, 0},
    /* batches (JSON-RPC 2.0 section 6) */
    {"empty batch", "[]", 0, -32600, NULL, 0, 0},
    {"batch of junk", "[1,2,3]", 0, BATCH, NULL, 3, -32600},
    {"batch mixed",
     "[{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
     "\"service.info\"},{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
     "\"nope\"},{\"jsonrpc\":\"2.0\",\"method\":\"service.info\"}]",
     0, BATCH, NULL, 2, 99},
    {"batch all notifications",
     "[{\"jsonrpc\":\"2.0\",\"method\":"
     "\"service.info\"}]",
     0, NO_ANSWER, NULL, 0, 0},
    {"huge batch", NULL, 0, -32600, NULL, 0, 0},
};
#define N_CORPUS (sizeof corpus / sizeof corpus[0])

typedef struct fixture {
	proto_ctx *ctx;
	proto_session *s;
	proto_buf out;
	char *deep_arr, *deep_obj, *huge_batch;
} fixture;

static char *repeat(const char *head, const char *unit, size_t n,
                    const char *tail)
{
	size_t hl = strlen(head), ul = strlen(unit), tl = strlen(tail);
	char *s = malloc(hl + ul * n + tl + 1), *p = s;

	assert_non_null(s);
	memcpy(p, head, hl);
	p += hl;
	for (size_t i = 0; i < n; i++, p += ul)
		memcpy(p, unit, ul);
	memcpy(p, tail, tl + 1);
	return s;
}

static int setup(void **state)
{
	fixture *f = calloc(1, sizeof *f);
	proto_limits lim;

	proto_limits_default(&lim);
	lim.max_batch = 100;
	f->ctx = proto_ctx_new(&lim);
	f->s = proto_session_new(f->ctx);
	proto_buf_init(&f->out);
	/* 65 levels: one past the default depth of 64. */
	f->deep_arr = repeat("", "[", 65, "");
	f->deep_obj = repeat("", "{\"a\":", 65, "1");
	f->huge_batch = repeat("[",
	                       "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                       "\"service.info\"},",
	                       100,
	                       "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
	                       "\"service.info\"}]");
	*state = f;
	return 0;
}

static int teardown(void **state)
{
	fixture *f = *state;

	free(f->deep_arr);
	free(f->deep_obj);
	free(f->huge_batch);
	proto_buf_free(&f->out);
	proto_session_free(f->s);
	proto_ctx_free(f->ctx);
	free(f);
	return 0;
}

/* Runs one line; returns the parsed response or NULL when there is none
 * (fails the test when there is output that is not one JSON line). */
static cJSON *run(fixture *f, const char *line, size_t len, const char *name)
{
	cJSON *r;

	f->out.len = 0;
	assert_int_equal(rw_proto_handle(f->s, line, len, &f->out), 0);
	if (!f->out.len)
		return NULL;
	if (f->out.data[f->out.len - 1] != '\n' ||
	    memchr(f->out.data, '\n', f->out.len) !=
	        f->out.data + f->out.len - 1)
		fail_msg("%s: response is not exactly one line", name);
	r = cJSON_ParseWithLength(f->out.data, f->out.len);
	if (!r)
		fail_msg("%s: response is not JSON: %.*s", name,
		         (int)f->out.len, f->out.data);
	return r;
}

static int code_of(const cJSON *r)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *c = cJSON_GetObjectItemCaseSensitive(e, "code");
	return cJSON_IsNumber(c) ? c->valueint : 0;
}

/* An error must say why: error.data.reason is a non-empty string. */
static void check_error(const cJSON *r, const hcase *k)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *d = cJSON_GetObjectItemCaseSensitive(e, "data");
	const cJSON *why = cJSON_GetObjectItemCaseSensitive(d, "reason");
	const cJSON *p = cJSON_GetObjectItemCaseSensitive(d, "param");

	if (code_of(r) != k->expect)
		fail_msg("%s: code %d, want %d", k->name, code_of(r),
		         k->expect);
	if (!cJSON_IsString(why) || !*why->valuestring)
		fail_msg("%s: error without a reason", k->name);
	if (k->param &&
	    (!cJSON_IsString(p) || strcmp(p->valuestring, k->param) != 0))
		fail_msg("%s: param %s, want %s", k->name,
		         cJSON_IsString(p) ? p->valuestring : "(none)",
		         k->param);
}

static void check_case(fixture *f, const hcase *k)
{
	const char *line = k->line;
	size_t len = k->len;
	cJSON *r;

	if (!line) {
		if (strcmp(k->name, "deep nesting arrays") == 0)
			line = f->deep_arr;
		else if (strcmp(k->name, "deep nesting objects") == 0)
			line = f->deep_obj;
		else
			line = f->huge_batch;
	}
	if (!len)
		len = strlen(line);
	r = run(f, line, len, k->name);
	switch (k->expect) {
	case NO_ANSWER:
		if (r)
			fail_msg("%s: answered, want no answer", k->name);
		break;
	case RESULT_QC: {
		const cJSON *res, *qc, *vp;
		if (!r || code_of(r))
			fail_msg("%s: want a result with QC flags", k->name);
		res = cJSON_GetObjectItemCaseSensitive(r, "result");
		qc = cJSON_GetObjectItemCaseSensitive(res, "qc");
		vp = cJSON_GetObjectItemCaseSensitive(res, "vp");
		if (!cJSON_IsNumber(qc) || qc->valuedouble == 0)
			fail_msg("%s: qc flags not set", k->name);
		if (!cJSON_IsNull(vp))
			fail_msg("%s: output of an unphysical sample is not "
			         "null",
			         k->name);
		break;
	}
	case BATCH: {
		const cJSON *e;
		int n = 0;
		if (!r || !cJSON_IsArray(r))
			fail_msg("%s: want a batch response", k->name);
		cJSON_ArrayForEach(e, r)
		{
			if (k->batch_code != 99 && code_of(e) != k->batch_code)
				fail_msg("%s: element code %d, want %d",
				         k->name, code_of(e), k->batch_code);
			n++;
		}
		if (n != k->batch_n)
			fail_msg("%s: %d responses, want %d", k->name, n,
			         k->batch_n);
		break;
	}
	case 0:
		if (!r || code_of(r))
			fail_msg("%s: want a result, got %.*s", k->name,
			         (int)f->out.len, f->out.data);
		break;
	default:
		if (!r)
			fail_msg("%s: no answer, want error %d", k->name,
			         k->expect);
		check_error(r, k);
		break;
	}
	cJSON_Delete(r);
}

/* The next valid request on the same session is served normally. */
static void check_probe(fixture *f, const char *after)
{
	cJSON *r = run(f, OK_REQ, strlen(OK_REQ), after);
	const cJSON *res = cJSON_GetObjectItemCaseSensitive(r, "result");
	const cJSON *vp = cJSON_GetObjectItemCaseSensitive(res, "vp");
	const cJSON *id = cJSON_GetObjectItemCaseSensitive(r, "id");

	if (!r || !cJSON_IsNumber(vp) || vp->valuedouble != 3000 ||
	    !cJSON_IsString(id) || strcmp(id->valuestring, "probe") != 0)
		fail_msg("probe after '%s' failed", after);
	cJSON_Delete(r);
}

static void test_corpus(void **state)
{
	fixture *f = *state;

	assert_true(N_CORPUS >= 40);
	for (size_t i = 0; i < N_CORPUS; i++) {
		check_case(f, &corpus[i]);
		check_probe(f, corpus[i].name);
	}
}

/* The id comes back as it was sent: JSON-RPC 2.0 section 5 ("It MUST be
 * the same as the value of the id member in the Request Object"). */
static void test_ids_echoed(void **state)
{
	fixture *f = *state;
	static const char *const ids[] = {
	    "\"a-1\"", "-17", "2.5", "null", "\"\"", "0", "\"\\u00e9\""};

	for (size_t i = 0; i < sizeof ids / sizeof ids[0]; i++) {
		char line[200];
		cJSON *r, *want;
		snprintf(line, sizeof line,
		         "{\"jsonrpc\":\"2.0\",\"id\":%s,\"method\":\"nope\"}",
		         ids[i]);
		r = run(f, line, strlen(line), ids[i]);
		want = cJSON_Parse(ids[i]);
		assert_non_null(r);
		assert_non_null(want);
		if (!cJSON_Compare(cJSON_GetObjectItemCaseSensitive(r, "id"),
		                   want, 1))
			fail_msg("id %s not echoed: %.*s", ids[i],
			         (int)f->out.len, f->out.data);
		assert_int_equal(code_of(r), -32601);
		cJSON_Delete(want);
		cJSON_Delete(r);
	}
}

/* JSON-RPC 2.0 asks for the id back as given: numbers that a double
 * cannot hold, or that round to another id, come back as their text. */
static void test_ids_exact(void **state)
{
	fixture *f = *state;
	static const char *const ids[] = {"9007199254740993",
	                                  "1.0000000000000002", "1e400", "-0",
	                                  "12345678901234567890"};

	for (size_t i = 0; i < sizeof ids / sizeof ids[0]; i++) {
		char line[200], want[64];
		const char *at;
		snprintf(line, sizeof line,
		         "[{\"jsonrpc\":\"2.0\",\"id\":%s,\"method\":\"nope\"},"
		         "{\"jsonrpc\":\"2.0\",\"id\":%s ,\"method\":"
		         "\"service.info\"}]",
		         ids[i], ids[i]);
		f->out.len = 0;
		rw_proto_handle(f->s, line, strlen(line), &f->out);
		snprintf(want, sizeof want, "\"id\":%s,", ids[i]);
		at = strstr(f->out.data, want);
		if (!at || !strstr(at + 1, want))
			fail_msg("id %s not echoed as given in both answers: "
			         "%.200s",
			         ids[i], f->out.data);
	}
}

/* The duplicate-key check is linear: an object of 80,000 distinct keys
 * is answered (unknown parameters), one of them twice is refused. */
static void test_many_keys(void **state)
{
	fixture *f = *state;
	size_t n = 80000, cap = n * 16 + 200, len = 0;
	char *line = malloc(cap);
	cJSON *r;

	assert_non_null(line);
	len += (size_t)snprintf(line + len, cap - len,
	                        "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                        "\"elastic.convert\",\"params\":{");
	for (size_t i = 0; i < n; i++)
		len += (size_t)snprintf(line + len, cap - len, "%s\"k%zu\":1",
		                        i ? "," : "", i);
	snprintf(line + len, cap - len, "}}");
	r = run(f, line, strlen(line), "1");
	assert_int_equal(code_of(r), -32602);
	cJSON_Delete(r);
	/* the same with one key repeated at the end */
	snprintf(line + len, cap - len, ",\"k17\":2}}");
	r = run(f, line, strlen(line), NULL);
	assert_int_equal(code_of(r), -32600);
	cJSON_Delete(r);
	free(line);
}

/* Error texts are cut at character boundaries: a parameter name of 200
 * two-byte characters gives an error line that is valid UTF-8. */
static void test_utf8_errors(void **state)
{
	fixture *f = *state;
	char line[2048];
	size_t len = 0;
	cJSON *r;

	len += (size_t)snprintf(line, sizeof line,
	                        "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                        "\"elastic.convert\",\"params\":{\"");
	for (int i = 0; i < 200; i++)
		len +=
		    (size_t)snprintf(line + len, sizeof line - len, "\xc3\xa9");
	snprintf(line + len, sizeof line - len, "\":1}}");
	f->out.len = 0;
	rw_proto_handle(f->s, line, strlen(line), &f->out);
	/* well-formed UTF-8: every lead byte has its continuation bytes */
	for (size_t i = 0; i < f->out.len; i++) {
		unsigned char ch = (unsigned char)f->out.data[i];
		size_t need = ch >= 0xf0   ? 3
		              : ch >= 0xe0 ? 2
		              : ch >= 0xc0 ? 1
		                           : 0;
		if (ch >= 0x80 && ch < 0xc0)
			fail_msg("stray continuation byte at %zu", i);
		for (size_t k = 1; k <= need; k++)
			if (i + k >= f->out.len ||
			    ((unsigned char)f->out.data[i + k] & 0xc0) != 0x80)
				fail_msg("cut sequence at %zu", i);
		i += need;
	}
	r = cJSON_ParseWithLength(f->out.data, f->out.len);
	assert_non_null(r);
	assert_int_equal(code_of(r), -32602);
	cJSON_Delete(r);
}

static const char *reason_of(const cJSON *r)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *d = cJSON_GetObjectItemCaseSensitive(e, "data");
	const cJSON *why = cJSON_GetObjectItemCaseSensitive(d, "reason");
	return cJSON_IsString(why) ? why->valuestring : "";
}

/* The byte check skips plain bytes 16 (SSE2) or 8 at a time: whatever the
 * alignment of a long run of plain bytes before it, a control byte, a bad UTF-8
 * byte, \u0000, an escaped quote and the nesting are found where they
 * are, and brackets inside a string do not count. */
static void test_plain_runs(void **state)
{
	fixture *f = *state;
	static char line[4096], want[64];

	for (int c = 0; c < 40; c++) {
		/* short lines go byte by byte, long ones (after 300 bytes
		 * of leading whitespace) a word at a time */
		size_t lead = c < 20 ? 0 : 300;
		int pad = c % 20;
		char pads[32];
		size_t at;
		cJSON *r, *id;
		memset(line, ' ', lead);
		memset(pads, 'a', (size_t)pad);
		pads[pad] = 0;
		/* a control byte in a string */
		at = lead + (size_t)snprintf(line + lead, sizeof line - lead,
		                             "{\"jsonrpc\":\"2.0\",\"id\":\"%s",
		                             pads);
		snprintf(line + at, sizeof line - at, "\x01\",\"method\":1}");
		r = run(f, line, strlen(line), "plain runs");
		assert_int_equal(code_of(r), -32700);
		snprintf(want, sizeof want, "0x01 at offset %zu ", at);
		assert_non_null(strstr(reason_of(r), want));
		cJSON_Delete(r);
		/* a byte that starts no UTF-8 sequence, after array digits */
		at = lead + (size_t)snprintf(
		                line + lead, sizeof line - lead,
		                "{\"jsonrpc\":\"2.0\",\"id\":1,\"params\":"
		                "{\"vp\":[");
		for (int k = 0; k < pad; k++)
			at += (size_t)snprintf(line + at, sizeof line - at,
			                       "3%d.5, ", k);
		snprintf(line + at, sizeof line - at, "\xff]}}");
		r = run(f, line, strlen(line), "plain runs");
		assert_int_equal(code_of(r), -32700);
		snprintf(want, sizeof want, "offset %zu", at);
		assert_non_null(strstr(reason_of(r), want));
		cJSON_Delete(r);
		/* \u0000 after a run */
		snprintf(line + lead, sizeof line - lead,
		         "{\"jsonrpc\":\"2.0\",\"id\":\"%s\\u0000\"}", pads);
		r = run(f, line, strlen(line), "plain runs");
		assert_int_equal(code_of(r), -32600);
		assert_non_null(strstr(reason_of(r), "\\u0000"));
		cJSON_Delete(r);
		/* an escaped quote and a backslash between runs, brackets
		 * inside the string: the id comes back whole */
		snprintf(line + lead, sizeof line - lead,
		         "{\"jsonrpc\":\"2.0\",\"id\":\"%s\\\"%s\\\\u0000"
		         "[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[["
		         "[[[[[[[[[[[[[[[[[[{|}%s\",\"method\":\"no.such\"}",
		         pads, pads, pads);
		r = run(f, line, strlen(line), "plain runs");
		id = cJSON_GetObjectItemCaseSensitive(r, "id");
		assert_int_equal(code_of(r), -32601);
		assert_true(cJSON_IsString(id));
		snprintf(line, sizeof line, "%s\"%s\\u0000", pads, pads);
		assert_int_equal(strncmp(id->valuestring, line, strlen(line)),
		                 0);
		cJSON_Delete(r);
		/* a quote alone among plain bytes opens a string: the
		 * brackets inside it do not count (a batch of one string,
		 * answered with an array, not a nesting error) */
		memset(line, ' ', lead);
		snprintf(line + lead, sizeof line - lead,
		         "[%40s\"%s%40s"
		         "[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[[["
		         "[[[[[[[[[[[[[[[[[[[[[[\"]",
		         "", pads, "");
		r = run(f, line, strlen(line), "plain runs");
		assert_true(cJSON_IsArray(r));
		cJSON_Delete(r);
		/* nesting past the limit, brackets apart by runs of spaces */
		at = (size_t)snprintf(
		    line, sizeof line,
		    "{\"jsonrpc\":\"2.0\",\"id\":1,\"params\":");
		for (int k = 0; k < 70; k++)
			at += (size_t)snprintf(line + at, sizeof line - at,
			                       "[%*s", pad, "");
		r = run(f, line, strlen(line), "plain runs");
		assert_int_equal(code_of(r), -32600);
		assert_non_null(strstr(reason_of(r), "nesting deeper"));
		cJSON_Delete(r);
	}
}

/* The framer: a line past the limit is reported once and skipped to its
 * newline; the lines around it come out whole; a NUL is just a byte. */
static void test_framer_oversize(void **state)
{
	srv_lines lb;
	const char *line;
	size_t len;
	char big[100];
	static const char nul_line[] = "ab\0cd\n";

	(void)state;
	srv_lines_init(&lb, 16);
	memset(big, 'x', sizeof big);
	assert_int_equal(srv_lines_append(&lb, "first\n", 6), 0);
	assert_int_equal(srv_lines_append(&lb, big, sizeof big), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, 5);
	assert_memory_equal(line, "first", 5);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OVERSIZE);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_append(&lb, big, sizeof big), 0);
	assert_int_equal(srv_lines_buffered(&lb), 0);
	assert_int_equal(srv_lines_append(&lb, "xx\nnext\n", 8), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, 4);
	assert_memory_equal(line, "next", 4);
	assert_int_equal(srv_lines_append(&lb, nul_line, 6), 0);
	assert_true(srv_lines_has_line(&lb));
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, 5);
	assert_memory_equal(line, "ab\0cd", 5);
	/* A long line that arrives whole with its newline is also refused. */
	assert_int_equal(srv_lines_append(&lb, big, 20), 0);
	assert_int_equal(srv_lines_append(&lb, "\nok\n", 4), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OVERSIZE);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_memory_equal(line, "ok", 2);
	assert_false(srv_lines_has_line(&lb));
	/* A tail without a newline at end of input. */
	assert_int_equal(srv_lines_append(&lb, "tail", 4), 0);
	assert_false(srv_lines_has_line(&lb));
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_tail(&lb, &line, &len), SRV_LINE_OK);
	assert_memory_equal(line, "tail", 4);
	srv_lines_free(&lb);
}

/* A big buffer is handed back once it empties. */
/* Peeking shows the next complete line without taking it (the window
 * looks at a line before it decides to take it); half a line and a line
 * past the limit are not shown. */
static void test_framer_peek(void **state)
{
	srv_lines lb;
	const char *line, *seen;
	size_t len, seen_len;
	char longer[40];

	(void)state;
	srv_lines_init(&lb, 16);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 0);
	assert_int_equal(srv_lines_append(&lb, "abc\nde", 6), 0);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 1);
	assert_int_equal(seen_len, 3);
	assert_memory_equal(seen, "abc", 3);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 1);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_ptr_equal(line, seen);
	assert_int_equal(len, 3);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 0);
	assert_int_equal(srv_lines_append(&lb, "f\n", 2), 0);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 1);
	assert_int_equal(seen_len, 3);
	assert_memory_equal(seen, "def", 3);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	memset(longer, 'z', sizeof longer);
	longer[sizeof longer - 1] = '\n';
	assert_int_equal(srv_lines_append(&lb, longer, sizeof longer), 0);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OVERSIZE);
	assert_int_equal(srv_lines_append(&lb, "ok\n", 3), 0);
	assert_int_equal(srv_lines_peek(&lb, &seen, &seen_len), 1);
	assert_memory_equal(seen, "ok", 2);
	srv_lines_free(&lb);
}

static void test_framer_shrinks(void **state)
{
	srv_lines lb;
	const char *line;
	size_t len, n = 3u << 20;
	char *big = malloc(n + 1);

	(void)state;
	assert_non_null(big);
	memset(big, 'y', n);
	big[n] = '\n';
	srv_lines_init(&lb, 4u << 20);
	assert_int_equal(srv_lines_append(&lb, big, n + 1), 0);
	assert_true(lb.cap > n);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, n);
	assert_int_equal(srv_lines_append(&lb, "a\n", 2), 0);
	assert_true(lb.cap <= 4096);
	srv_lines_free(&lb);
	free(big);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_corpus),
	    cmocka_unit_test(test_ids_echoed),
	    cmocka_unit_test(test_ids_exact),
	    cmocka_unit_test(test_many_keys),
	    cmocka_unit_test(test_utf8_errors),
	    cmocka_unit_test(test_plain_runs),
	    cmocka_unit_test(test_framer_oversize),
	    cmocka_unit_test(test_framer_peek),
	    cmocka_unit_test(test_framer_shrinks),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, setup, teardown);
}
