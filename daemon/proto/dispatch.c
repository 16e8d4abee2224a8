/* JSON-RPC 2.0 dispatch: checks the bytes of a line (UTF-8, control
 * characters, nesting), parses it, validates the request envelope, runs
 * the method through the one method table and frames the response or the
 * error. Batches and notifications follow the JSON-RPC 2.0 specification;
 * a numeric id is echoed as the text it was given in. */
#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#if defined(__SSE2__)
#include <emmintrin.h> /* every x86-64 has SSE2 */
#endif

#include "proto/internal.h"
#include "proto/session.h"

/* ---- context, session, counters ----------------------------------------- */

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

/* A request id: the parsed value and, for a number, the text it was
 * given in (JSON-RPC 2.0 asks for the id back as sent: 9007199254740993
 * and 1.0000000000000002 must not come back rounded). */
typedef struct req_id {
	const cJSON *v;
	const char *raw;
	size_t raw_len;
} req_id;

static void write_id(proto_buf *b, const req_id *id)
{
	char tmp[40];

	if (!id || !id->v) {
		proto_buf_append(b, "null", 4);
	} else if (cJSON_IsString(id->v)) {
		proto__buf_json_string(b, id->v->valuestring);
	} else if (cJSON_IsNumber(id->v)) {
		if (id->raw && id->raw_len) {
			proto_buf_append(b, id->raw, id->raw_len);
		} else {
			size_t n = proto_fmt_double(tmp, id->v->valuedouble);
			proto_buf_append(b, tmp, n);
		}
	} else {
		proto_buf_append(b, "null", 4);
	}
}

static void write_error(proto_ctx *ctx, proto_buf *b, const req_id *id,
                        int code, const char *param, const char *reason)
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

/* Whether none of the bytes at p is one the check below looks at: a
 * control byte, a byte of a multi-byte sequence, '"', '\\' or a bracket
 * ('|' and bytes 0x5b-0x5d, 0x7b-0x7d are taken for brackets: such a
 * word only goes the slow way), so the digits, commas and spaces of a
 * numeric array pass a word at a time. With SSE2, 16 bytes: a signed
 * compare below 0x20 catches the control bytes and every byte of 0x80
 * or more at once. */
#if defined(__SSE2__)
static int plain16(const unsigned char *p)
{
	__m128i x = _mm_loadu_si128((const __m128i *)(const void *)p);
	__m128i y = _mm_andnot_si128(_mm_set1_epi8(0x20), x);
	__m128i bad = _mm_cmplt_epi8(x, _mm_set1_epi8(0x20));

	bad = _mm_or_si128(bad, _mm_cmpeq_epi8(x, _mm_set1_epi8('"')));
	bad = _mm_or_si128(bad, _mm_cmpeq_epi8(y, _mm_set1_epi8('[')));
	bad = _mm_or_si128(bad, _mm_cmpeq_epi8(y, _mm_set1_epi8('\\')));
	bad = _mm_or_si128(bad, _mm_cmpeq_epi8(y, _mm_set1_epi8(']')));
	return _mm_movemask_epi8(bad) == 0;
}
#define PLAIN_STEP 16
#define plain_step plain16
#else
/* 8 bytes: each test is the exact "any byte" form of the zero-byte trick
 * (Anderson, Bit Twiddling Hacks). */
static int plain8(const unsigned char *p)
{
	const uint64_t ones = UINT64_C(0x0101010101010101), high = ones * 0x80;
	uint64_t x, y;

	memcpy(&x, p, sizeof x);
	y = x & ~(ones * 0x20); /* '{' '|' '}' fold onto '[' '\\' ']' */
#define ANY_ZERO(v) (((v)-ones) & ~(v)&high)
	return !(((x - ones * 0x20) & ~x & high) | (x & high) |
	         ANY_ZERO(x ^ (ones * '"')) | ANY_ZERO(y ^ (ones * '[')) |
	         ANY_ZERO(y ^ (ones * '\\')) | ANY_ZERO(y ^ (ones * ']')));
#undef ANY_ZERO
}
#define PLAIN_STEP 8
#define plain_step plain8
#endif

/* Where the byte check stands: nesting depth, inside a string, just
 * after a backslash. */
typedef struct byte_state {
	int depth, in_str, esc;
} byte_state;

/* Bytes the check passes over with nothing to do: bit 0 outside strings
 * (printable ASCII but the quote and brackets), bit 1 inside them
 * (printable ASCII but the quote and the backslash). Control bytes and
 * bytes of multi-byte sequences are never plain. */
static const unsigned char plain_byte[256] = {
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 3, 3, 0, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3,
    3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3,
    3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 2, 1, 2, 3, 3,
    3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3, 3,
    3, 3, 3, 2, 3, 2, 3, 3, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
    0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
};

/* The plain_byte bit that applies in state st: none just after a
 * backslash. */
static inline unsigned plain_mask(const byte_state *st)
{
	return st->esc ? 0 : st->in_str ? 2 : 1;
}

/* Checks bytes from..to of the line (a multi-byte sequence may run past
 * to; *next gets where the check stopped). Returns 0, or the error code
 * with a reason written to `why`. */
#if defined(__GNUC__) || defined(__clang__)
__attribute__((always_inline))
#endif
static inline int
check_range(const unsigned char *p, size_t from, size_t to, size_t len,
            int max_depth, byte_state *st, size_t *next, char *why,
            size_t why_size)
{
	size_t i;
	unsigned mask = plain_mask(st);

	for (i = from; i < to; i++) {
		unsigned char ch = p[i];
		if (plain_byte[ch] & mask)
			continue;
		if (ch < 0x80) {
			if (ch < 0x20 && ch != '\t' && ch != '\n' &&
			    ch != '\r') {
				snprintf(why, why_size,
				         "control byte 0x%02x at offset %zu "
				         "(JSON text allows none unescaped)",
				         ch, i);
				return PROTO_PARSE_ERROR;
			}
			if (st->in_str) {
				/* cJSON ends strings at U+0000, which would
				 * silently shorten the value: refuse it. */
				if (st->esc && ch == 'u' && i + 4 < len &&
				    memcmp(p + i + 1, "0000", 4) == 0) {
					snprintf(why, why_size,
					         "\\u0000 in a string at byte "
					         "offset %zu is not supported",
					         i - 1);
					return PROTO_INVALID_REQUEST;
				}
				if (st->esc)
					st->esc = 0;
				else if (ch == '\\')
					st->esc = 1;
				else if (ch == '"')
					st->in_str = 0;
			} else if (ch == '"') {
				st->in_str = 1;
			} else if (ch == '[' || ch == '{') {
				if (++st->depth > max_depth) {
					snprintf(
					    why, why_size,
					    "nesting deeper than %d levels "
					    "at offset %zu",
					    max_depth, i);
					return PROTO_INVALID_REQUEST;
				}
			} else if (ch == ']' || ch == '}') {
				st->depth--;
			}
			mask = plain_mask(st);
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
		st->esc = 0;
		mask = plain_mask(st);
		continue;
	bad:
		snprintf(why, why_size, "invalid UTF-8 at byte offset %zu", i);
		return PROTO_PARSE_ERROR;
	}
	*next = i;
	return 0;
}

/* Checks that the line is UTF-8 without raw control characters other than
 * whitespace, and that its nesting stays within max_depth (tracking
 * strings, so brackets inside strings do not count). A long line goes a
 * word at a time: plain words (numeric arrays) pass in one test, the
 * others byte by byte; a short one (a small request, mostly keys and
 * quotes) byte by byte. Returns 0, or the error code with a reason
 * written to `why`. */
static int check_bytes(const unsigned char *p, size_t len, int max_depth,
                       char *why, size_t why_size)
{
	byte_state st = {0, 0, 0};
	size_t i = 0;
	int rc;

	if (len >= 256)
		while (len - i >= PLAIN_STEP) {
			/* an escape's next byte is not plain */
			if (!st.esc && plain_step(p + i)) {
				i += PLAIN_STEP;
				continue;
			}
			rc = check_range(p, i, i + PLAIN_STEP, len, max_depth,
			                 &st, &i, why, why_size);
			if (rc)
				return rc;
		}
	return check_range(p, i, len, len, max_depth, &st, &i, why, why_size);
}

/* One pass over the members of object obj: found[i] gets the first
 * member named names[i], or NULL (what cJSON_GetObjectItemCaseSensitive
 * would give, without a pass a name). Returns the first member named none
 * of them, or NULL. */
static const cJSON *members(const cJSON *obj, const char *const *names,
                            size_t n, const cJSON **found)
{
	const cJSON *other = NULL;

	for (size_t i = 0; i < n; i++)
		found[i] = NULL;
	for (const cJSON *e = obj->child; e; e = e->next) {
		size_t i;
		for (i = 0; i < n; i++)
			if (e->string[0] == names[i][0] &&
			    strcmp(e->string, names[i]) == 0)
				break;
		if (i == n) {
			if (!other)
				other = e;
		} else if (!found[i]) {
			found[i] = e;
		}
	}
	return other;
}

/* ---- duplicate keys ------------------------------------------------------ */

/* FNV-1a, for the per-object key set. */
static uint64_t key_hash(const char *s)
{
	uint64_t h = 1469598103934665603ull;
	for (; *s; s++)
		h = (h ^ (unsigned char)*s) * 1099511628211ull;
	return h;
}

/* Finds a duplicated key anywhere in the value, in time linear in its
 * size: one hash set per object. Returns the key, or NULL; *oom is set
 * when the set could not be allocated. */
static const char *find_duplicate_key(const cJSON *v, int *oom)
{
	const cJSON *a;
	const char **set = NULL;
	size_t n = 0, cap = 1;

	if (!cJSON_IsObject(v) && !cJSON_IsArray(v))
		return NULL;
	if (cJSON_IsObject(v)) {
		for (a = v->child; a; a = a->next)
			n++;
		while (cap < 2 * n)
			cap <<= 1;
		if (n > 1 && n <= 8) {
			/* a few keys (every small request): each against
			 * the ones before it, no set to allocate */
			for (a = v->child->next; a; a = a->next)
				for (const cJSON *b = v->child; b != a;
				     b = b->next)
					if (a->string[0] == b->string[0] &&
					    strcmp(a->string, b->string) == 0)
						return a->string;
		} else if (n > 1) {
			set = calloc(cap, sizeof *set);
			if (!set) {
				*oom = 1;
				return NULL;
			}
			for (a = v->child; a; a = a->next) {
				size_t h =
				    (size_t)key_hash(a->string) & (cap - 1);
				while (set[h] && strcmp(set[h], a->string))
					h = (h + 1) & (cap - 1);
				if (set[h]) {
					free(set);
					return a->string;
				}
				set[h] = a->string;
			}
			free(set);
		}
	}
	for (a = v->child; a; a = a->next) {
		const char *d;
		if (a->child && (d = find_duplicate_key(a, oom)))
			return d;
		if (*oom)
			return NULL;
	}
	return NULL;
}

/* ---- raw member text ---------------------------------------------------- */

/* Skips whitespace from p; returns the new position. */
static size_t skip_ws(const char *s, size_t len, size_t p)
{
	while (p < len &&
	       (s[p] == ' ' || s[p] == '\t' || s[p] == '\n' || s[p] == '\r'))
		p++;
	return p;
}

/* Skips one JSON value starting at p (the line parsed, so it is valid);
 * returns the position after it. */
static size_t skip_value(const char *s, size_t len, size_t p)
{
	int depth = 0, in_str = 0, esc = 0;

	if (p < len && s[p] != '{' && s[p] != '[' && s[p] != '"') {
		while (p < len && s[p] != ',' && s[p] != '}' && s[p] != ']' &&
		       s[p] != ' ' && s[p] != '\t' && s[p] != '\n' &&
		       s[p] != '\r')
			p++;
		return p;
	}
	for (; p < len; p++) {
		char ch = s[p];
		if (in_str) {
			if (esc)
				esc = 0;
			else if (ch == '\\')
				esc = 1;
			else if (ch == '"' && (in_str = 0, depth == 0))
				return p + 1;
			continue;
		}
		if (ch == '"')
			in_str = 1;
		else if (ch == '{' || ch == '[')
			depth++;
		else if ((ch == '}' || ch == ']') && --depth == 0)
			return p + 1;
	}
	return p;
}

/* The raw text of member "id" of the object at s[p..]: sets *at, *n. */
static void raw_id(const char *s, size_t len, size_t p, const char **at,
                   size_t *n)
{
	*at = NULL;
	*n = 0;
	p = skip_ws(s, len, p);
	if (p >= len || s[p] != '{')
		return;
	p++;
	for (;;) {
		size_t k0, k1, v0;
		p = skip_ws(s, len, p);
		if (p >= len || s[p] != '"')
			return;
		k0 = p;
		p = skip_value(s, len, p);
		k1 = p;
		p = skip_ws(s, len, p);
		if (p >= len || s[p] != ':')
			return;
		p = skip_ws(s, len, p + 1);
		v0 = p;
		p = skip_value(s, len, p);
		if (k1 - k0 == 4 && memcmp(s + k0, "\"id\"", 4) == 0) {
			*at = s + v0;
			*n = p - v0;
			return;
		}
		p = skip_ws(s, len, p);
		if (p >= len || s[p] != ',')
			return;
		p++;
	}
}

/* ---- one request -------------------------------------------------------- */

static void run_method(proto_session *s, const proto_method *m,
                       const cJSON *params, const req_id *id, proto_buf *out)
{
	proto_call c;
	size_t mark = out->len;

	memset(&c, 0, sizeof c);
	c.ctx = s->ctx;
	c.session = s;
	c.method = m;
	c.params = params;
	if (cJSON_IsObject(params)) {
		static const char *const common[] = {"units", "digits",
		                                     "fields", "uncertainty"};
		const cJSON *found[4];
		(void)members(params, common, 4, found);
		c.p_units = found[0];
		c.p_digits = found[1];
		c.p_fields = found[2];
		c.p_unc = found[3];
	}
	c.out = out;
	c.units = s->units;
	c.digits = s->digits;
	c.inherit = proto__session_inherit;

	proto_buf_append(out, "{\"jsonrpc\":\"2.0\",\"id\":", 22);
	write_id(out, id);
	proto_buf_append(out, ",\"result\":", 10);
	if (params && !cJSON_IsObject(params)) {
		proto_fail(&c, PROTO_INVALID_PARAMS, "params",
		           "must be an object of named parameters");
	} else if (!proto__units_apply(&c, c.p_units, "units", &c.units) &&
	           !proto__digits_apply(&c, c.p_digits, "digits", &c.digits) &&
	           !proto__run_method(&c) && !c.err_code && !out->oom) {
		assert(c.depth == 0 && c.skip_depth == 0);
		proto_buf_append(out, "}", 1);
		proto__arena_free(&c);
		return;
	}
	proto__arena_free(&c);
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

/* Handles one request object (raw text at line[p..]); appends its
 * response, or nothing for a notification. */
static void handle_one(proto_session *s, const cJSON *req, const char *line,
                       size_t len, size_t p, proto_buf *out)
{
	const cJSON *ver, *method, *params = NULL, *m, *unknown;
	const proto_method *pm;
	req_id id = {NULL, NULL, 0};
	int has_id = 0;
	char why[256];
	size_t mark = out->len;

	if (!cJSON_IsObject(req)) {
		proto__count_request(s->ctx, 0);
		write_error(s->ctx, out, NULL, PROTO_INVALID_REQUEST, NULL,
		            "a request must be a JSON object");
		return;
	}
	/* One pass over the members (duplicates were refused), the first
	 * unknown one kept for its error. */
	{
		static const char *const envelope[] = {"jsonrpc", "method",
		                                       "params", "id"};
		const cJSON *found[4];
		unknown = members(req, envelope, 4, found);
		ver = found[0];
		method = found[1];
		params = found[2];
		m = found[3];
	}
	if (m) {
		has_id = 1;
		if (cJSON_IsNumber(m))
			raw_id(line, len, p, &id.raw, &id.raw_len);
		/* a number is echoed as its text, so even 1e400 (beyond a
		 * double) comes back as given */
		if (cJSON_IsString(m) || cJSON_IsNull(m) ||
		    (cJSON_IsNumber(m) &&
		     (id.raw_len || isfinite(m->valuedouble))))
			id.v = m;
	}
	proto__count_request(s->ctx, !has_id);
	if (has_id && !id.v) {
		write_error(s->ctx, out, NULL, PROTO_INVALID_REQUEST, "id",
		            "must be a string, a number or null");
		return;
	}
	if (unknown) {
		snprintf(why, sizeof why,
		         "unknown member '%.64s'; a request has "
		         "jsonrpc, method, params and id",
		         unknown->string);
		write_error(s->ctx, out, &id, PROTO_INVALID_REQUEST,
		            unknown->string, why);
		return;
	}
	if (!cJSON_IsString(ver) || strcmp(ver->valuestring, "2.0") != 0) {
		write_error(s->ctx, out, &id, PROTO_INVALID_REQUEST, "jsonrpc",
		            ver ? "must be exactly \"2.0\""
		                : "missing; must be \"2.0\"");
		return;
	}
	if (!cJSON_IsString(method)) {
		write_error(s->ctx, out, &id, PROTO_INVALID_REQUEST, "method",
		            method ? "must be a string" : "missing");
		return;
	}
	if (params && !cJSON_IsObject(params) && !cJSON_IsArray(params)) {
		write_error(s->ctx, out, &id, PROTO_INVALID_REQUEST, "params",
		            "must be an object or an array");
		return;
	}
	pm = proto_method_find(method->valuestring);
	if (!pm) {
		const char *names[256], *near;
		size_t n = 0;
		const proto_method *x;
		while (n < 256 && (x = proto_method_at(n)))
			names[n++] = x->name;
		near = proto__suggest(method->valuestring, names, n);
		if (near)
			snprintf(why, sizeof why,
			         "no method '%.100s'; did you mean '%s'? "
			         "rpc.discover lists them",
			         method->valuestring, near);
		else
			snprintf(why, sizeof why,
			         "no method '%.100s'; rpc.discover lists them",
			         method->valuestring);
		write_error(s->ctx, out, &id, PROTO_METHOD_NOT_FOUND, "method",
		            why);
	} else {
		run_method(s, pm, params, &id, out);
	}
	if (!has_id)
		out->len = mark; /* notifications are run, not answered */
}

/* cJSON's parse of the whole line (trailing blanks allowed); NULL when
 * it is not one JSON value, *end at the byte cJSON stopped. */
static cJSON *parse_line(const char *line, size_t len, const char **end)
{
	cJSON *root;

	*end = NULL;
	root = cJSON_ParseWithLengthOpts(line, len, end, 0);
	if (root) {
		while (*end < line + len && (**end == ' ' || **end == '\t'))
			(*end)++;
		if (*end != line + len) {
			cJSON_Delete(root);
			root = NULL;
		}
	}
	return root;
}

static size_t cost_of(proto_session *s, const cJSON *root);
static int alone_of(const cJSON *root);

/* rw_proto_handle, and rw_proto_handle_light when offload is nonzero: a
 * line that parses and costs at least offload is left unanswered (1, or
 * 2 when it names a session method). */
static int handle_line(proto_session *s, const char *line, size_t len,
                       proto_buf *out, size_t offload)
{
	proto_ctx *ctx = s->ctx;
	const char *end = NULL, *dup;
	cJSON *root;
	proto_inarr arrs = {0};
	char why[256];
	size_t i, mark = out->len;
	int code, oom = 0;

	if (len && line[len - 1] == '\r')
		len--;
	for (i = 0; i < len; i++)
		if (line[i] != ' ' && line[i] != '\t')
			break;
	if (i == len)
		return 0; /* blank lines are ignored */
	code = check_bytes((const unsigned char *)line, len,
	                   proto_ctx_limits(ctx)->max_depth, why, sizeof why);
	if (code) {
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, code, NULL, why);
		return out->oom ? -1 : 0;
	}
	/* large numeric arrays: parsed here, placeholders for cJSON */
	if (proto__inarr_scan(ctx, line, len, 0, &arrs)) {
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, PROTO_INTERNAL_ERROR, NULL,
		                 "out of memory reading the request");
		return out->oom ? -1 : 0;
	}
	root = arrs.text ? parse_line(arrs.text, arrs.len, &end)
	                 : parse_line(line, len, &end);
	if (arrs.text && proto__inarr_attach(root, &arrs)) {
		/* not JSON as sent: cJSON on the line itself names the
		 * byte where the client wrote the error */
		cJSON_Delete(root);
		proto__inarr_free(&arrs);
		root = parse_line(line, len, &end);
	} else if (arrs.text) {
		line = arrs.text;
		len = arrs.len;
	}
	if (!root) {
		size_t off = end && end >= line ? (size_t)(end - line) : 0;
		snprintf(why, sizeof why, "not valid JSON near byte offset %zu",
		         off);
		proto__inarr_free(&arrs);
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out, PROTO_PARSE_ERROR, NULL, why);
		return out->oom ? -1 : 0;
	}
	dup = find_duplicate_key(root, &oom);
	if (dup || oom) {
		if (dup)
			snprintf(
			    why, sizeof why,
			    "duplicate key '%.64s': each member may appear "
			    "once",
			    dup);
		proto__count_request(ctx, 0);
		proto_error_line(ctx, out,
		                 dup ? PROTO_INVALID_REQUEST
		                     : PROTO_INTERNAL_ERROR,
		                 dup, dup ? why : "out of memory");
		cJSON_Delete(root);
		proto__inarr_free(&arrs);
		return out->oom ? -1 : 0;
	}
	if (offload && cost_of(s, root) >= offload) {
		int alone = alone_of(root);
		cJSON_Delete(root);
		proto__inarr_free(&arrs);
		return 1 + alone;
	}
	if (cJSON_IsArray(root)) {
		size_t n = (size_t)cJSON_GetArraySize(root);
		const cJSON *e;
		int first = 1;
		size_t p = skip_ws(line, len, 0) + 1; /* after '[' */
		if (n == 0) {
			proto__count_request(ctx, 0);
			proto_error_line(ctx, out, PROTO_INVALID_REQUEST, NULL,
			                 "empty batch");
		} else if (proto_ctx_limits(ctx)->max_batch &&
		           n > proto_ctx_limits(ctx)->max_batch) {
			snprintf(why, sizeof why,
			         "batch of %zu requests exceeds the limit of "
			         "%zu",
			         n, proto_ctx_limits(ctx)->max_batch);
			proto__count_request(ctx, 0);
			proto_error_line(ctx, out, PROTO_INVALID_REQUEST, NULL,
			                 why);
		} else {
			proto_buf_append(out, "[", 1);
			cJSON_ArrayForEach(e, root)
			{
				size_t before = out->len, body;
				p = skip_ws(line, len, p);
				if (!first)
					proto_buf_append(out, ",", 1);
				body = out->len;
				handle_one(s, e, line, len, p, out);
				/* next element: past this value and its comma
				 */
				p = skip_ws(line, len,
				            skip_value(line, len, p));
				if (p < len && line[p] == ',')
					p++;
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
		handle_one(s, root, line, len, 0, out);
		if (out->len != before)
			proto_buf_append(out, "\n", 1);
	}
	cJSON_Delete(root);
	proto__inarr_free(&arrs);
	return out->oom ? -1 : 0;
}

int rw_proto_handle(proto_session *s, const char *line, size_t len,
                    proto_buf *out)
{
	return handle_line(s, line, len, out, 0);
}

int rw_proto_handle_light(proto_session *s, const char *line, size_t len,
                          size_t offload, proto_buf *out)
{
	proto_inarr arrs;
	int alone;

	if (!offload)
		return rw_proto_handle(s, line, len, out);
	/* Large arrays: counted without parsing them (rw_proto_cost), so a
	 * heavy line goes to the pool having cost little on the loop. The
	 * rest, most lines, are parsed once for the estimate and the
	 * answer. */
	if (proto__inarr_scan(NULL, line, len, 1, &arrs) == 0 && !arrs.n)
		return handle_line(s, line, len, out, offload);
	proto__inarr_free(&arrs);
	return rw_proto_classify(s, line, len, &alone) >= offload
	           ? 1 + alone
	           : rw_proto_handle(s, line, len, out);
}

/* ---- work estimate ------------------------------------------------------ */

/* The longest numeric array anywhere inside v (1 for scalars). */
static size_t longest_array(const cJSON *v)
{
	size_t best = 1;
	const cJSON *e;

	if (proto__numarr(v))
		return proto__numarr(v)->n > best ? proto__numarr(v)->n : best;
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

/* True when a distribution object (uncertainty) is anywhere in v. */
static int has_dist(const cJSON *v, int depth)
{
	const cJSON *e;

	if (depth > 16)
		return 0;
	if (cJSON_IsObject(v) &&
	    cJSON_IsString(cJSON_GetObjectItemCaseSensitive(v, "dist")))
		return 1;
	cJSON_ArrayForEach(
	    e, v) if (cJSON_IsObject(e) ||
	              cJSON_IsArray(e)) if (has_dist(e, depth + 1)) return 1;
	return 0;
}

/* The nodes of a grid axis: an array's length, or an object's n. */
static size_t axis_len(const cJSON *v)
{
	const cJSON *n = cJSON_GetObjectItemCaseSensitive(v, "n");

	if (cJSON_IsArray(v))
		return proto__arr_size(v);
	if (cJSON_IsNumber(n) && n->valuedouble >= 1 && n->valuedouble < 1e15)
		return (size_t)n->valuedouble;
	return 1;
}

/* Counts n samples for field f's broadcast group (nested objects and
 * the other types count for group 0). */
static void widen(size_t *len, const proto_field *f, size_t n)
{
	int g = f->type == PT_NUMS ? f->group : 0;
	if (g < PROTO_MAX_GROUPS && n > len[g])
		len[g] = n;
}

/* Work of one request: the product over broadcast groups of the longest
 * array given for the group (nested objects count for group 0), times
 * the nodes of every grid axis (PF_AXIS), times the draws when an input
 * is a distribution, times the method's cost per evaluation. */
static size_t request_cost(proto_session *s, const cJSON *req)
{
	const cJSON *method = NULL, *params = NULL;
	const proto_method *m;
	size_t len[PROTO_MAX_GROUPS];
	double work = 1;
	int nested = 0, dist = 0;

	if (cJSON_IsObject(req)) {
		static const char *const names[] = {"method", "params"};
		const cJSON *found[2];
		(void)members(req, names, 2, found);
		method = found[0];
		params = found[1];
	}
	if (!cJSON_IsString(method) ||
	    !(m = proto_method_find(method->valuestring)) || !m->params)
		return 1;
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		len[g] = 1;
	/* One pass over the members given: a scalar counts once whatever
	 * field it is, so only arrays and objects are looked up. */
	if (cJSON_IsObject(params))
		for (const cJSON *v = params->child; v; v = v->next) {
			const proto_field *f;
			int i;
			if (!cJSON_IsArray(v) && !cJSON_IsObject(v)) {
				if (cJSON_IsString(v) &&
				    strcmp(v->string, "dist") == 0)
					dist = 1;
				continue;
			}
			nested = 1;
			if ((i = proto_field_index(m->params, v->string)) < 0)
				continue;
			f = &m->params->fields[i];
			if (f->flags & PF_AXIS)
				work *= (double)axis_len(v);
			else
				widen(len, f, longest_array(v));
		}
	/* fields left out that the session holds */
	if (!proto__session_empty(s))
		for (const proto_field *f = m->params->fields; f->name; f++)
			if (!(f->flags & PF_AXIS) &&
			    !cJSON_GetObjectItemCaseSensitive(params, f->name))
				widen(len, f, proto__session_len(s, m, f));
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		work *= (double)len[g];
	if (cJSON_IsObject(params) && !nested ? dist : has_dist(params, 0)) {
		const cJSON *u =
		    cJSON_GetObjectItemCaseSensitive(params, "uncertainty");
		const cJSON *d = cJSON_GetObjectItemCaseSensitive(u, "draws");
		work *= cJSON_IsNumber(d) && d->valuedouble >= 1
		            ? d->valuedouble
		            : PROTO_DRAWS_DEFAULT;
	}
	work *= m->cost > 0 ? m->cost : 1.0;
	return work >= (double)SIZE_MAX ? SIZE_MAX : (size_t)work;
}

size_t rw_proto_cost(proto_session *s, const char *line, size_t len)
{
	int alone;

	return rw_proto_classify(s, line, len, &alone);
}

size_t rw_proto_classify(proto_session *s, const char *line, size_t len,
                         int *alone)
{
	proto_inarr arrs;
	cJSON *root;
	size_t work;

	*alone = 0;
	/* large arrays are only counted: cJSON parses what is left */
	if (proto__inarr_scan(NULL, line, len, 1, &arrs))
		return 1;
	if (arrs.text)
		root = cJSON_ParseWithLengthOpts(arrs.text, arrs.len, NULL, 0);
	else
		root = cJSON_ParseWithLengthOpts(line, len, NULL, 0);
	if (proto__inarr_attach(root, &arrs)) {
		cJSON_Delete(root);
		root = NULL; /* not JSON as sent */
	}
	if (!root) {
		proto__inarr_free(&arrs);
		return 1;
	}
	work = cost_of(s, root);
	*alone = alone_of(root);
	cJSON_Delete(root);
	proto__inarr_free(&arrs);
	return work;
}

/* The names of the session methods (PM_SESSION), for the text test of
 * rw_proto_line_shares; set once. */
enum { MAX_ALONE = 32 };
static const char *alone_name[MAX_ALONE];
static size_t alone_len[MAX_ALONE], alone_dot[MAX_ALONE], n_alone;
static int alone_overflow;
static pthread_once_t alone_once = PTHREAD_ONCE_INIT;

static void alone_init(void)
{
	const proto_method *m;

	for (size_t i = 0; (m = proto_method_at(i)); i++) {
		const char *dot;
		if (!(m->flags & PM_SESSION))
			continue;
		dot = strchr(m->name, '.');
		if (n_alone == MAX_ALONE || !dot) {
			/* not what the test below can see: no line shares */
			alone_overflow = 1;
			return;
		}
		alone_name[n_alone] = m->name;
		alone_dot[n_alone] = (size_t)(dot - m->name);
		alone_len[n_alone++] = strlen(m->name);
	}
}

int rw_proto_line_shares(const char *line, size_t len)
{
	const char *p = line, *end = line + len;

	pthread_once(&alone_once, alone_init);
	/* A JSON string names a method in its own letters unless it uses
	 * an escape, so a line without a backslash that contains no session
	 * method's name names none. Each name is "family.name": it is tried
	 * where the line has a dot, against the dot of the name. */
	if (alone_overflow || memchr(line, '\\', len))
		return 0;
	while ((p = memchr(p, '.', (size_t)(end - p)))) {
		size_t at = (size_t)(p - line);
		for (size_t k = 0; k < n_alone; k++) {
			size_t d = alone_dot[k];
			if (at >= d && at - d + alone_len[k] <= len &&
			    line[at - d] == alone_name[k][0] &&
			    memcmp(line + at - d, alone_name[k],
			           alone_len[k]) == 0)
				return 0;
		}
		p++;
	}
	return 1;
}

/* Whether a request names a session method (PM_SESSION): those change or
 * report the session, so the server runs them alone, after every earlier
 * line of the connection and before every later one. */
static int request_alone(const cJSON *req)
{
	const cJSON *name = cJSON_GetObjectItemCaseSensitive(req, "method");
	const proto_method *m;

	return cJSON_IsString(name) &&
	       (m = proto_method_find(name->valuestring)) &&
	       (m->flags & PM_SESSION);
}

static int alone_of(const cJSON *root)
{
	const cJSON *e;

	if (!cJSON_IsArray(root))
		return request_alone(root);
	cJSON_ArrayForEach(e, root) if (request_alone(e)) return 1;
	return 0;
}

static size_t cost_of(proto_session *s, const cJSON *root)
{
	size_t work = 0;
	const cJSON *e;

	if (cJSON_IsArray(root)) {
		cJSON_ArrayForEach(e, root)
		{
			size_t w = request_cost(s, e);
			work = work > SIZE_MAX - w ? SIZE_MAX : work + w;
		}
	} else {
		work = request_cost(s, root);
	}
	return work ? work : 1;
}
