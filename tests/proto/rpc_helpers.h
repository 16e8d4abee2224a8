/* Request helpers shared by the protocol tests of the fluid, mineral and
 * rock families: one context and session per test group (setup and
 * teardown), a call that returns the parsed response, accessors for result
 * members with broadcasting, and the -32602 check that names the
 * parameter and part of the reason. Include after <cmocka.h>. */
#ifndef RW_TEST_PROTO_RPC_HELPERS_H
#define RW_TEST_PROTO_RPC_HELPERS_H

#include <math.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "proto/proto.h"

/* ---- request helpers (rw_proto_handle with no socket) ----------------- */

static proto_ctx *g_ctx;
static proto_session *g_sess;

static inline int setup(void **state)
{
	(void)state;
	g_ctx = proto_ctx_new(NULL);
	g_sess = proto_session_new(g_ctx);
	return g_ctx && g_sess ? 0 : -1;
}

static inline int teardown(void **state)
{
	(void)state;
	proto_session_free(g_sess);
	proto_ctx_free(g_ctx);
	return 0;
}

/* Sends one request line; returns the parsed response (cJSON_Delete). */
static inline cJSON *call(const char *line)
{
	proto_buf b;
	cJSON *r;

	proto_buf_init(&b);
	assert_int_equal(rw_proto_handle(g_sess, line, strlen(line), &b), 0);
	assert_non_null(b.data);
	r = cJSON_ParseWithLength(b.data, b.len);
	if (!r)
		fail_msg("unparsable response: %s", b.data);
	proto_buf_free(&b);
	return r;
}

/* The result object of a successful call (fails the test otherwise). */
static inline const cJSON *result_of(const cJSON *resp)
{
	const cJSON *res = cJSON_GetObjectItemCaseSensitive(resp, "result");
	if (!cJSON_IsObject(res)) {
		char *s = cJSON_PrintUnformatted(resp);
		fail_msg("no result: %s", s);
	}
	return res;
}

/* Calls and checks that the call fails with -32602 naming `param` and
 * (when want is not NULL) a reason containing `want`. */
static inline void expect_invalid(const char *line, const char *param,
                                  const char *want)
{
	cJSON *r = call(line);
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *data = cJSON_GetObjectItemCaseSensitive(e, "data");
	const cJSON *p = cJSON_GetObjectItemCaseSensitive(data, "param");
	const cJSON *why = cJSON_GetObjectItemCaseSensitive(data, "reason");
	char *s = cJSON_PrintUnformatted(r);

	if (!cJSON_IsObject(e) ||
	    cJSON_GetObjectItemCaseSensitive(e, "code")->valueint != -32602 ||
	    !cJSON_IsString(p) || strcmp(p->valuestring, param) != 0 ||
	    !cJSON_IsString(why) || (want && !strstr(why->valuestring, want)))
		fail_msg("want -32602 on '%s' (%s) for %s\ngot %s", param,
		         want ? want : "any reason", line, s);
	cJSON_free(s);
	cJSON_Delete(r);
}

/* Member `key` of res as a number (scalar) or element i of its array;
 * NaN for null. */
static inline double num_at(const cJSON *res, const char *key, int i)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(res, key);
	if (!v)
		fail_msg("result has no member '%s'", key);
	if (cJSON_IsArray(v))
		v = cJSON_GetArrayItem(v, i);
	else if (i > 0)
		fail_msg("'%s' is not an array", key);
	if (cJSON_IsNull(v))
		return NAN;
	if (!cJSON_IsNumber(v))
		fail_msg("'%s'[%d] is not a number", key, i);
	return v->valuedouble;
}

static inline double num(const cJSON *res, const char *key)
{
	return num_at(res, key, 0);
}

/* QC flags are a 64-bit set (bits 0..52: exact JSON numbers). */
static inline unsigned long long qc_at(const cJSON *res, int i)
{
	return (unsigned long long)num_at(res, "qc", i);
}

static inline const char *unit_of(const cJSON *res, const char *key)
{
	const cJSON *u = cJSON_GetObjectItemCaseSensitive(res, "units");
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(u, key);
	return cJSON_IsString(v) ? v->valuestring : "";
}

static inline void assert_rel(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol * fabs(want)))
		fail_msg("got %.15g, want %.15g (rel tol %g)", got, want, tol);
}

static inline int array_len(const cJSON *res, const char *key)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(res, key);
	return cJSON_IsArray(v) ? cJSON_GetArraySize(v) : -1;
}

#endif
