/* JSON-RPC 2.0 dispatch: checks the bytes of a line (UTF-8, control
 * characters, nesting), parses it, validates the request envelope, runs
 * the method through the one method table and frames the response or the
 * error. Batches and notifications follow the JSON-RPC 2.0 specification. */
#include <math.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"

/* ---- the method table ---------------------------------------------------- */

static const proto_method *const families[] = {
    proto_service_methods, proto_session_methods,        proto_elastic_methods,
    proto_thomsen_methods, proto_fluid_methods,          proto_mineral_methods,
    proto_rock_methods,    proto_rock_empirical_methods, proto_reflect_methods,
    proto_log_methods,
};

const proto_method *proto_method_at(size_t i)
{
	for (size_t f = 0; f < sizeof families / sizeof families[0]; f++) {
		const proto_method *m = families[f];
		for (; m->name; m++)
			if (i-- == 0)
				return m;
	}
	return NULL;
}

const proto_method *proto_method_find(const char *name)
{
	const proto_method *m;
	for (size_t i = 0; (m = proto_method_at(i)); i++)
		if (strcmp(m->name, name) == 0)
			return m;
	return NULL;
}

/* ---- context, session, counters ----------------------------------------- */

static const int counted_codes[] = {
    PROTO_PARSE_ERROR,    PROTO_INVALID_REQUEST, PROTO_METHOD_NOT_FOUND,
    PROTO_INVALID_PARAMS, PROTO_INTERNAL_ERROR,  PROTO_SERVER_BUSY,
    PROTO_LIMIT_EXCEEDED,
};
#define N_CODES (sizeof counted_codes / sizeof counted_codes[0])

struct proto_ctx {
	proto_limits limits;
	proto_server_stats server;
	atomic_ullong requests, notifications, responses;
	atomic_ullong errors[N_CODES];
};

void proto_limits_default(proto_limits *lim)
{
	lim->max_line = 64u << 20;
	lim->max_samples = 0;
	lim->max_work = 0;
	lim->max_batch = 10000;
	lim->max_depth = 64;
	lim->max_conns = 1024;
	lim->out_high_water = 1u << 20;
	lim->out_hard_limit = 32u << 20;
	lim->global_budget = (size_t)1 << 31;
	lim->idle_timeout_s = 0;
	lim->stall_timeout_s = 30;
	lim->drain_timeout_s = 8;
}

proto_ctx *proto_ctx_new(const proto_limits *lim)
{
	proto_ctx *ctx = calloc(1, sizeof *ctx);
	if (!ctx)
		return NULL;
	if (lim)
		ctx->limits = *lim;
	else
		proto_limits_default(&ctx->limits);
	ctx->server.transport = "none";
	return ctx;
}

void proto_ctx_free(proto_ctx *ctx)
{
	free(ctx);
}

proto_server_stats *proto_ctx_server_stats(proto_ctx *ctx)
{
	return &ctx->server;
}

const proto_limits *proto_ctx_limits(const proto_ctx *ctx)
{
	return &ctx->limits;
}

proto_session *proto_session_new(proto_ctx *ctx)
{
	proto_session *s = calloc(1, sizeof *s);
	if (!s)
		return NULL;
	s->ctx = ctx;
	proto_units_default(&s->units);
	return s;
}

void proto_session_free(proto_session *s)
{
	if (s)
		cJSON_Delete(s->defaults);
	free(s);
}

const proto_units *proto__session_units(const proto_session *s)
{
	return &s->units;
}

proto_ctx *proto__session_ctx(proto_session *s)
{
	return s->ctx;
}

void proto__count_request(proto_ctx *ctx, int notification)
{
	atomic_fetch_add(&ctx->requests, 1);
	if (notification)
		atomic_fetch_add(&ctx->notifications, 1);
}

void proto__count_error(proto_ctx *ctx, int code)
{
	for (size_t i = 0; i < N_CODES; i++)
		if (counted_codes[i] == code)
			atomic_fetch_add(&ctx->errors[i], 1);
}

void proto__write_counters(proto_call *c)
{
	proto_ctx *ctx = c->ctx;
	const proto_server_stats *s = &ctx->server;
	char code[16];

	proto_w_obj_begin(c, "counters");
	proto_w_int(c, "requests", (long long)atomic_load(&ctx->requests));
	proto_w_int(c, "notifications",
	            (long long)atomic_load(&ctx->notifications));
	proto_w_obj_begin(c, "errors");
	for (size_t i = 0; i < N_CODES; i++) {
		snprintf(code, sizeof code, "%d", counted_codes[i]);
		proto_w_int(c, code, (long long)atomic_load(&ctx->errors[i]));
	}
	proto_w_obj_end(c);
	proto_w_int(c, "connections_total", (long long)s->connections_total);
	proto_w_int(c, "connections_open", (long long)s->connections_open);
	proto_w_int(c, "connections_refused",
	            (long long)s->connections_refused);
	proto_w_int(c, "connections_dropped",
	            (long long)s->connections_dropped);
	proto_w_int(c, "connections_closed_slow",
	            (long long)s->connections_closed_slow);
	proto_w_int(c, "connections_closed_idle",
	            (long long)s->connections_closed_idle);
	proto_w_int(c, "lines_oversized", (long long)s->lines_oversized);
	proto_w_int(c, "bytes_in", (long long)s->bytes_in);
	proto_w_int(c, "bytes_out", (long long)s->bytes_out);
	proto_w_int(c, "buffered_bytes", (long long)s->buffered_bytes);
	proto_w_int(c, "reads_paused", (long long)s->reads_paused);
	proto_w_int(c, "pool_waits", (long long)s->pool_waits);
	proto_w_int(c, "memory_rss_bytes", (long long)s->memory_rss_bytes);
	proto_w_int(c, "memory_trims", (long long)s->memory_trims);
	proto_w_int(c, "memory_released_bytes",
	            (long long)s->memory_released_bytes);
	proto_w_obj_end(c);
}

/* ---- responses ---------------------------------------------------------- */

static const char *code_message(int code)
{
	switch (code) {
	case PROTO_PARSE_ERROR: return "Parse error";
	case PROTO_INVALID_REQUEST: return "Invalid Request";
	case PROTO_METHOD_NOT_FOUND: return "Method not found";
	case PROTO_INVALID_PARAMS: return "Invalid params";
	case PROTO_SERVER_BUSY: return "Server busy";
	case PROTO_LIMIT_EXCEEDED: return "Limit exceeded";
	default: return "Internal error";
	}
}

static void write_id(proto_buf *b, const cJSON *id)
{
	char tmp[32];

	if (cJSON_IsString(id)) {
		proto__buf_json_string(b, id->valuestring);
	} else if (cJSON_IsNumber(id)) {
		size_t n = proto_fmt_double(tmp, id->valuedouble);
		proto_buf_append(b, tmp, n);
	} else {
		proto_buf_append(b, "null", 4);
	}
}

static void write_error(proto_ctx *ctx, proto_buf *b, const cJSON *id, int code,
                        const char *param, const char *reason)
{
	char tmp[24];
	int n;

	proto__count_error(ctx, code);
	proto_buf_append(b, "{\"jsonrpc\":\"2.0\",\"id\":", 22);
	write_id(b, id);
	n = snprintf(tmp, sizeof tmp, "%d", code);
	proto_buf_append(b, ",\"error\":{\"code\":", 17);
	proto_buf_append(b, tmp, (size_t)n);
	proto_buf_append(b, ",\"message\":", 11);
	proto__buf_json_string(b, code_message(code));
	if ((param && *param) || (reason && *reason)) {
		proto_buf_append(b, ",\"data\":{", 9);
		if (param && *param) {
			proto_buf_append(b, "\"param\":", 8);
			proto__buf_json_string(b, param);
			if (reason && *reason)
				proto_buf_append(b, ",", 1);
		}
		if (reason && *reason) {
			proto_buf_append(b, "\"reason\":", 9);
			proto__buf_json_string(b, reason);
		}
		proto_buf_append(b, "}", 1);
	}
	proto_buf_append(b, "}}", 2);
}

void proto_error_line(proto_ctx *ctx, proto_buf *out, int code,
                      const char *param, const char *reason)
{
	write_error(ctx, out, NULL, code, param, reason);
	proto_buf_append(out, "\n", 1);
}

/* ---- byte-level checks ----------------------------------------------------
 */

/* Checks that the line is UTF-8 without raw control characters other than
 * whitespace, and that its nesting stays within max_depth (tracking
 * strings, so brackets inside strings do not count). Returns 0, or the
 * error code with a reason written to `why`. */
static int check_bytes(const unsigned char *p, size_t len, int max_depth,
                       char *why, size_t why_size)
{
	int depth = 0, in_str = 0, esc = 0;

	for (size_t i = 0; i < len; i++) {
		unsigned char ch = p[i];
		if (ch < 0x80) {
			if (ch < 0x20 && ch != '\t' && ch != '\n' &&
			    ch != '\r') {
				snprintf(why, why_size,
				         "control byte 0x%02x at offset %zu "
				         "(JSON text allows none unescaped)",
				         ch, i);
				return PROTO_PARSE_ERROR;
			}
			if (in_str) {
				/* cJSON ends strings at U+0000, which would
				 * silently shorten the value: refuse it. */
				if (esc && ch == 'u' && i + 4 < len &&
				    memcmp(p + i + 1, "0000", 4) == 0) {
					snprintf(why, why_size,
					         "\\u0000 in a string at byte "
					         "offset %zu is not supported",
					         i - 1);
					return PROTO_INVALID_REQUEST;
				}
				if (esc)
					esc = 0;
				else if (ch == '\\')
					esc = 1;
				else if (ch == '"')
					in_str = 0;
			} else if (ch == '"') {
				in_str = 1;
			} else if (ch == '[' || ch == '{') {
				if (++depth > max_depth) {
					snprintf(
					    why, why_size,
					    "nesting deeper than %d levels "
					    "at offset %zu",
					    max_depth, i);
					return PROTO_INVALID_REQUEST;
				}
			} else if (ch == ']' || ch == '}') {
				depth--;
			}
			continue;
		}
		/* Multi-byte sequence: RFC 3629 well-formed ranges. */
		size_t need;
		unsigned lo = 0x80, hi = 0xbf;
		if (ch >= 0xc2 && ch <= 0xdf)
			need = 1;
		else if (ch >= 0xe0 && ch <= 0xef) {
			need = 2;
			if (ch == 0xe0)
				lo = 0xa0;
			if (ch == 0xed)
				hi = 0x9f;
		} else if (ch >= 0xf0 && ch <= 0xf4) {
			need = 3;
			if (ch == 0xf0)
				lo = 0x90;
			if (ch == 0xf4)
				hi = 0x8f;
		} else {
			goto bad;
		}
		if (i + need >= len)
			goto bad;
		if (p[i + 1] < lo || p[i + 1] > hi)
			goto bad;
		for (size_t j = 2; j <= need; j++)
			if (p[i + j] < 0x80 || p[i + j] > 0xbf)
				goto bad;
		i += need;
		esc = 0;
		continue;
	bad:
		snprintf(why, why_size, "invalid UTF-8 at byte offset %zu", i);
		return PROTO_PARSE_ERROR;
	}
	return 0;
}

/* Finds a duplicated key anywhere in the value; returns it or NULL. */
static const char *find_duplicate_key(const cJSON *v)
{
	const cJSON *a, *b;

	if (!cJSON_IsObject(v) && !cJSON_IsArray(v))
		return NULL;
	for (a = v->child; a; a = a->next) {
		const char *d;
		if (cJSON_IsObject(v))
			for (b = a->next; b; b = b->next)
				if (strcmp(a->string, b->string) == 0)
					return a->string;
		if ((a->child) && (d = find_duplicate_key(a)))
			return d;
	}
	return NULL;
}

/* ---- one request -------------------------------------------------------- */

static void run_method(proto_session *s, const proto_method *m,
                       const cJSON *params, const cJSON *id, proto_buf *out)
{
	proto_call c;
	cJSON *merged = (cJSON *)params;
	size_t mark = out->len;

	memset(&c, 0, sizeof c);
	c.ctx = s->ctx;
	c.session = s;
	c.method = m;
	c.params = params;
	c.out = out;
	c.units = s->units;

	proto_buf_append(out, "{\"jsonrpc\":\"2.0\",\"id\":", 22);
	write_id(out, id);
	proto_buf_append(out, ",\"result\":", 10);
	if (params && !cJSON_IsObject(params)) {
		proto_fail(&c, PROTO_INVALID_PARAMS, "params",
		           "must be an object of named parameters");
	} else if (!proto__units_apply(
	               &c, cJSON_GetObjectItemCaseSensitive(params, "units"),
	               "units", &c.units) &&
	           !proto__session_merge(&c, params, &merged) &&
	           (!m->params ||
	            !proto_args_parse(&c, merged, "", m->params, &c.args))) {
		c.params = merged;
		if (m->handler(&c) == 0 && !c.err_code && !out->oom) {
			proto_buf_append(out, "}", 1);
			proto__arena_free(&c);
			if (merged != params)
				cJSON_Delete(merged);
			return;
		}
	}
	proto__arena_free(&c);
	if (merged != params)
		cJSON_Delete(merged);
	if (out->oom) {
		/* Drop the partial result and report it in the small room we
		 * keep: the limit is lifted for the error line. */
		size_t limit = out->limit;
		out->oom = 0;
		out->limit = 0;
		out->len = mark;
		write_error(s->ctx, out, id, PROTO_INTERNAL_ERROR, NULL,
		            "the response does not fit in memory or in the "
		            "output limit; split the request");
		out->limit = limit;
		return;
	}
	out->len = mark;
	if (!c.err_code)
		proto_fail(&c, PROTO_INTERNAL_ERROR, NULL,
		           "method failed without a reason");
	write_error(s->ctx, out, id, c.err_code, c.err_param, c.err_reason);
}

/* Handles one request object; appends its response (or nothing for a
 * notification). */
static void handle_one(proto_session *s, const cJSON *req, proto_buf *out)
{
	const cJSON *ver, *method, *id = NULL, *params = NULL, *m;
	const proto_method *pm;
	int has_id = 0;
	char why[256];
	size_t mark = out->len;

	if (!cJSON_IsObject(req)) {
		proto__count_request(s->ctx, 0);
		write_error(s->ctx, out, NULL, PROTO_INVALID_REQUEST, NULL,
		            "a request must be a JSON object");
		return;
	}
	ver = cJSON_GetObjectItemCaseSensitive(req, "jsonrpc");
	method = cJSON_GetObjectItemCaseSensitive(req, "method");
	params = cJSON_GetObjectItemCaseSensitive(req, "params");
	m = cJSON_GetObjectItemCaseSensitive(req, "id");
	if (m) {
		has_id = 1;
		if (cJSON_IsString(m) || cJSON_IsNull(m) ||
		    (cJSON_IsNumber(m) && isfinite(m->valuedouble)))
			id = m;
	}
	proto__count_request(s->ctx, !has_id);
	if (has_id && !id) {
		write_error(s->ctx, out, NULL, PROTO_INVALID_REQUEST, "id",
		            "must be a string, a number or null");
		return;
	}
	cJSON_ArrayForEach(m, req)
	{
		if (strcmp(m->string, "jsonrpc") &&
		    strcmp(m->string, "method") &&
		    strcmp(m->string, "params") && strcmp(m->string, "id")) {
			snprintf(why, sizeof why,
			         "unknown member '%.64s'; a request has "
			         "jsonrpc, method, params and id",
			         m->string);
			write_error(s->ctx, out, id, PROTO_INVALID_REQUEST,
			            m->string, why);
			return;
		}
	}
	if (!cJSON_IsString(ver) || strcmp(ver->valuestring, "2.0") != 0) {
		write_error(s->ctx, out, id, PROTO_INVALID_REQUEST, "jsonrpc",
		            ver ? "must be exactly \"2.0\""
		                : "missing; must be \"2.0\"");
		return;
	}
	if (!cJSON_IsString(method)) {
		write_error(s->ctx, out, id, PROTO_INVALID_REQUEST, "method",
		            method ? "must be a string" : "missing");
		return;
	}
	if (params && !cJSON_IsObject(params) && !cJSON_IsArray(params)) {
		write_error(s->ctx, out, id, PROTO_INVALID_REQUEST, "params",
		            "must be an object or an array");
		return;
	}
	pm = proto_method_find(method->valuestring);
	if (!pm) {
		snprintf(why, sizeof why,
		         "no method '%.100s'; rpc.discover lists them",
		         method->valuestring);
		write_error(s->ctx, out, id, PROTO_METHOD_NOT_FOUND, "method",
		            why);
	} else {
		run_method(s, pm, params, id, out);
	}
	if (!has_id)
		out->len = mark; /* notifications are run, not answered */
}

int rw_proto_handle(proto_session *s, const char *line, size_t len,
                    proto_buf *out)
{
	proto_ctx *ctx = s->ctx;
	const char *end = NULL;
	cJSON *root;
	char why[256];
	size_t i, mark = out->len;
	int code;

	if (len && line[len - 1] == '\r')
		len--;
	for (i = 0; i < len; i++)
		if (line[i] != ' ' && line[i] != '\t')
			break;
	if (i == len)
		return 0; /* blank lines are ignored */
	code = check_bytes((const unsigned char *)line, len,
	                   ctx->limits.max_depth, why, sizeof why);
	if (code) {
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, code, NULL, why);
		return out->oom ? -1 : 0;
	}
	root = cJSON_ParseWithLengthOpts(line, len, &end, 0);
	if (root) {
		while (end < line + len && (*end == ' ' || *end == '\t'))
			end++;
		if (end != line + len) {
			cJSON_Delete(root);
			root = NULL;
		}
	}
	if (!root) {
		size_t off = end && end >= line ? (size_t)(end - line) : 0;
		snprintf(why, sizeof why, "not valid JSON near byte offset %zu",
		         off);
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, PROTO_PARSE_ERROR, NULL, why);
		return out->oom ? -1 : 0;
	}
	const char *dup = find_duplicate_key(root);
	if (dup) {
		snprintf(why, sizeof why,
		         "duplicate key '%.64s': each member may appear once",
		         dup);
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, PROTO_INVALID_REQUEST, dup, why);
		cJSON_Delete(root);
		return out->oom ? -1 : 0;
	}
	if (cJSON_IsArray(root)) {
		size_t n = (size_t)cJSON_GetArraySize(root);
		const cJSON *e;
		int first = 1;
		if (n == 0) {
			proto__count_request(ctx, 0);
			proto_error_line(ctx, out, PROTO_INVALID_REQUEST, NULL,
			                 "empty batch");
		} else if (ctx->limits.max_batch && n > ctx->limits.max_batch) {
			snprintf(why, sizeof why,
			         "batch of %zu requests exceeds the limit of "
			         "%zu",
			         n, ctx->limits.max_batch);
			proto__count_request(ctx, 0);
			proto_error_line(ctx, out, PROTO_INVALID_REQUEST, NULL,
			                 why);
		} else {
			proto_buf_append(out, "[", 1);
			cJSON_ArrayForEach(e, root)
			{
				size_t before = out->len;
				if (!first)
					proto_buf_append(out, ",", 1);
				size_t body = out->len;
				handle_one(s, e, out);
				if (out->len == body)
					out->len = before; /* notification */
				else
					first = 0;
			}
			if (first)
				out->len = mark; /* all notifications */
			else
				proto_buf_append(out, "]\n", 2);
		}
	} else {
		size_t before = out->len;
		handle_one(s, root, out);
		if (out->len != before)
			proto_buf_append(out, "\n", 1);
	}
	cJSON_Delete(root);
	return out->oom ? -1 : 0;
}

/* ---- work estimate ------------------------------------------------------ */

/* The longest numeric array anywhere inside v (1 for scalars). */
static size_t longest_array(const cJSON *v)
{
	size_t best = 1;
	const cJSON *e;

	if (cJSON_IsArray(v)) {
		size_t n = (size_t)cJSON_GetArraySize(v);
		if (v->child &&
		    (cJSON_IsNumber(v->child) || cJSON_IsNull(v->child)))
			best = n > best ? n : best;
	}
	cJSON_ArrayForEach(e, v)
	{
		size_t n = longest_array(e);
		if (n > best)
			best = n;
	}
	return best;
}

/* Work of one request: the product over broadcast groups of the longest
 * array given for the group (group 0 also takes nested objects). */
static size_t request_cost(proto_session *s, const cJSON *req)
{
	const cJSON *method = cJSON_GetObjectItemCaseSensitive(req, "method");
	const cJSON *params = cJSON_GetObjectItemCaseSensitive(req, "params");
	const proto_method *m;
	size_t len[PROTO_MAX_GROUPS], work = 1;

	if (!cJSON_IsString(method) ||
	    !(m = proto_method_find(method->valuestring)) || !m->params)
		return 1;
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		len[g] = 1;
	for (const proto_param *p = m->params; p->name; p++) {
		const cJSON *v =
		    cJSON_GetObjectItemCaseSensitive(params, p->name);
		size_t n;
		if (!v && s->defaults)
			v = cJSON_GetObjectItemCaseSensitive(s->defaults,
			                                     p->name);
		if (!v)
			continue;
		n = longest_array(v);
		if (p->group >= 0 && p->group < PROTO_MAX_GROUPS &&
		    n > len[p->group])
			len[p->group] = n;
	}
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		work = len[g] && work > SIZE_MAX / len[g] ? SIZE_MAX
		                                          : work * len[g];
	return work;
}

size_t rw_proto_cost(proto_session *s, const char *line, size_t len)
{
	cJSON *root = cJSON_ParseWithLengthOpts(line, len, NULL, 0);
	size_t work = 0;
	const cJSON *e;

	if (!root)
		return 1;
	if (cJSON_IsArray(root)) {
		cJSON_ArrayForEach(e, root)
		{
			size_t w = request_cost(s, e);
			work = work > SIZE_MAX - w ? SIZE_MAX : work + w;
		}
	} else {
		work = request_cost(s, root);
	}
	cJSON_Delete(root);
	return work ? work : 1;
}
