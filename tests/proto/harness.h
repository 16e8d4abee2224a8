/* Shared helpers for protocol tests: run request lines through
 * rw_proto_handle with no socket and look at the parsed responses. */
#ifndef RW_TEST_PROTO_HARNESS_H
#define RW_TEST_PROTO_HARNESS_H

#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "proto/proto.h"

typedef struct harness {
	proto_ctx *ctx;
	proto_session *s;
	proto_buf out;
} harness;

static inline void h_init(harness *h)
{
	h->ctx = proto_ctx_new(NULL);
	h->s = proto_session_new(h->ctx);
	proto_buf_init(&h->out);
}

static inline void h_free(harness *h)
{
	proto_buf_free(&h->out);
	proto_session_free(h->s);
	proto_ctx_free(h->ctx);
}

/* Runs one line; returns the raw output (owned by h, valid until the next
 * call; "" when there is none). */
static inline const char *h_raw(harness *h, const char *line)
{
	h->out.len = 0;
	if (h->out.data)
		h->out.data[0] = '\0';
	rw_proto_handle(h->s, line, strlen(line), &h->out);
	return h->out.len ? h->out.data : "";
}

/* Runs one line and parses the single response (caller cJSON_Deletes). */
static inline cJSON *h_call(harness *h, const char *line)
{
	return cJSON_Parse(h_raw(h, line));
}

/* The error code of a response, 0 when it is a result. */
static inline int h_code(const cJSON *r)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *c = cJSON_GetObjectItemCaseSensitive(e, "code");
	return cJSON_IsNumber(c) ? c->valueint : 0;
}

/* error.data.param of a response, "" when absent. */
static inline const char *h_param(const cJSON *r)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *d = cJSON_GetObjectItemCaseSensitive(e, "data");
	const cJSON *p = cJSON_GetObjectItemCaseSensitive(d, "param");
	return cJSON_IsString(p) ? p->valuestring : "";
}

static inline const cJSON *h_result(const cJSON *r, const char *member)
{
	const cJSON *res = cJSON_GetObjectItemCaseSensitive(r, "result");
	return member ? cJSON_GetObjectItemCaseSensitive(res, member) : res;
}

/* The helpers below use cmocka: include this header after <cmocka.h>
 * where they are used. */
#ifdef cmocka_unit_test
#include <math.h>
#include <stdio.h>

/* Element i of a result member (a number, or an element of an array);
 * NaN for null; fails the test when the member is missing. */
static inline double h_num(const cJSON *r, const char *member, int i)
{
	const cJSON *m = h_result(r, member);
	if (!m) {
		print_error("no member %s\n", member);
		fail();
	}
	if (cJSON_IsArray(m))
		m = cJSON_GetArrayItem(m, i);
	if (cJSON_IsNull(m))
		return NAN;
	assert_true(cJSON_IsNumber(m));
	return m->valuedouble;
}

static inline void h_close_to(double got, double want, double rel)
{
	if (!(fabs(got - want) <= rel * fabs(want))) {
		print_error("got %.10g want %.10g (rel tol %g)\n", got, want,
		            rel);
		fail();
	}
}

/* Runs line and checks it fails with -32602 naming param. */
static inline void h_expect_invalid(harness *h, const char *line,
                                    const char *param)
{
	cJSON *r = h_call(h, line);
	assert_non_null(r);
	if (h_code(r) != -32602 || strcmp(h_param(r), param) != 0) {
		print_error("code %d param '%s', want -32602 '%s' for %s\n",
		            h_code(r), h_param(r), param, line);
		fail();
	}
	cJSON_Delete(r);
}
#endif

#endif
