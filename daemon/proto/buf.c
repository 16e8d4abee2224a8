/* Output buffers and the result writer. Responses are built by appending
 * text to a proto_buf; numeric arrays are formatted straight into it, one
 * number at a time, never as cJSON nodes. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"

void proto_buf_init(proto_buf *b)
{
	memset(b, 0, sizeof *b);
}

void proto_buf_free(proto_buf *b)
{
	size_t limit = b->limit;
	free(b->data);
	proto_buf_init(b);
	b->limit = limit;
}

char *proto_buf_take(proto_buf *b, size_t *len)
{
	char *d = b->data;
	if (len)
		*len = b->len;
	b->data = NULL;
	b->len = b->cap = 0;
	return d;
}

int proto_buf_reserve(proto_buf *b, size_t extra)
{
	size_t need, cap;
	char *d;

	if (b->oom)
		return -1;
	if (extra > SIZE_MAX - b->len - 1)
		goto oom;
	need = b->len + extra + 1;
	if (need <= b->cap)
		return 0;
	if (b->limit && need > b->limit)
		goto oom;
	cap = b->cap ? b->cap : 256;
	while (cap < need)
		cap = cap > SIZE_MAX / 2 ? need : cap * 2;
	d = realloc(b->data, cap);
	if (!d)
		goto oom;
	b->data = d;
	b->cap = cap;
	return 0;
oom:
	b->oom = 1;
	return -1;
}

void proto_buf_append(proto_buf *b, const char *s, size_t n)
{
	if (proto_buf_reserve(b, n))
		return;
	memcpy(b->data + b->len, s, n);
	b->len += n;
	b->data[b->len] = '\0';
}

static void buf_puts(proto_buf *b, const char *s)
{
	proto_buf_append(b, s, strlen(s));
}

size_t proto_fmt_double(char *buf, double v)
{
	int n;

	if (!isfinite(v)) {
		memcpy(buf, "null", 5);
		return 4;
	}
	if (v == 0) {
		memcpy(buf, "0", 2);
		return 1;
	}
	/* Integers that a double holds exactly print without exponent. */
	if (fabs(v) < 9007199254740992.0 && v == (double)(long long)v) {
		n = snprintf(buf, 32, "%lld", (long long)v);
		return (size_t)n;
	}
	/* 15 significant digits: beyond any measured quantity, and free of
	 * the binary noise that 17 digits show after unit conversions
	 * (100 us/ft in, 100.00000000000001 out). */
	n = snprintf(buf, 32, "%.15g", v);
	return (size_t)n;
}

/* Appends s as a JSON string with the escapes RFC 8259 requires. Input is
 * expected to be UTF-8 (checked on the way in); bytes >= 0x80 pass. */
static void buf_json_string(proto_buf *b, const char *s)
{
	static const char hex[] = "0123456789abcdef";
	const unsigned char *p = (const unsigned char *)s;
	char esc[7];

	proto_buf_append(b, "\"", 1);
	for (; *p; p++) {
		const unsigned char *q = p;
		while (*q >= 0x20 && *q != '"' && *q != '\\')
			q++;
		if (q > p) {
			proto_buf_append(b, (const char *)p, (size_t)(q - p));
			p = q;
			if (!*p)
				break;
		}
		switch (*p) {
		case '"': proto_buf_append(b, "\\\"", 2); break;
		case '\\': proto_buf_append(b, "\\\\", 2); break;
		case '\n': proto_buf_append(b, "\\n", 2); break;
		case '\r': proto_buf_append(b, "\\r", 2); break;
		case '\t': proto_buf_append(b, "\\t", 2); break;
		default:
			memcpy(esc, "\\u00", 4);
			esc[4] = hex[*p >> 4];
			esc[5] = hex[*p & 15];
			proto_buf_append(b, esc, 6);
		}
	}
	proto_buf_append(b, "\"", 1);
}

void proto__buf_json_string(proto_buf *b, const char *s)
{
	buf_json_string(b, s);
}

/* ---- result writer ------------------------------------------------------ */

static void w_sep(proto_call *c, const char *key)
{
	int d = c->depth;
	if (c->key_pending) {
		/* proto_w_key wrote the separator and the key already. */
		c->key_pending = 0;
		return;
	}
	if (d > 0 && d < (int)sizeof c->need_comma) {
		if (c->need_comma[d])
			proto_buf_append(c->out, ",", 1);
		c->need_comma[d] = 1;
	}
	if (key) {
		buf_json_string(c->out, key);
		proto_buf_append(c->out, ":", 1);
	}
}

static void w_open(proto_call *c, const char *key, char ch)
{
	int d = c->depth + 1;
	const char *pending = c->key_pending ? c->pending_key : NULL;

	w_sep(c, key);
	proto_buf_append(c->out, &ch, 1);
	if (d < (int)sizeof c->need_comma) {
		c->need_comma[d] = 0;
		/* The path of an array element is its array's path. */
		c->keys[d] = key ? key : pending ? pending : c->keys[d - 1];
	}
	c->depth = d;
}

/* Records that the value at key (inside the open objects) has kind k, for
 * the "units" member. Paths are dotted: "fluid_new.k". */
static void note_unit(proto_call *c, const char *key, proto_kind k)
{
	char path[160];
	size_t used = 0;
	int top = c->depth < (int)sizeof c->need_comma
	              ? c->depth
	              : (int)sizeof c->need_comma - 1;

	if (k == PK_NONE)
		return;
	c->kinds_used |= 1u << k;
	if (!key)
		key = c->keys[top];
	path[0] = '\0';
	/* keys[1] is the result object itself (no name). */
	for (int d = 2; d <= top; d++) {
		const char *seg = c->keys[d];
		if (!seg || (d > 2 && c->keys[d - 1] == seg))
			continue;
		used += (size_t)snprintf(path + used, sizeof path - used, "%s.",
		                         seg);
		if (used >= sizeof path)
			return;
	}
	if (key && !(top >= 2 && c->keys[top] == key))
		snprintf(path + used, sizeof path - used, "%s", key);
	else if (used)
		path[used - 1] = '\0';
	if (!path[0])
		return;
	for (size_t i = 0; i < c->n_unit_notes; i++)
		if (strcmp(c->unit_notes[i].path, path) == 0)
			return;
	if (c->n_unit_notes == c->cap_unit_notes) {
		size_t cap = c->cap_unit_notes ? 2 * c->cap_unit_notes : 32;
		proto_unit_note *n = proto_alloc(c, cap * sizeof *n);
		if (!n) {
			c->out->oom = 1;
			return;
		}
		if (c->n_unit_notes)
			memcpy(n, c->unit_notes, c->n_unit_notes * sizeof *n);
		c->unit_notes = n;
		c->cap_unit_notes = cap;
	}
	char *copy = proto_alloc(c, strlen(path) + 1);
	if (!copy) {
		c->out->oom = 1;
		return;
	}
	memcpy(copy, path, strlen(path) + 1);
	c->unit_notes[c->n_unit_notes].path = copy;
	c->unit_notes[c->n_unit_notes].kind = k;
	c->n_unit_notes++;
}

void proto_w_obj_begin(proto_call *c, const char *key)
{
	w_open(c, key, '{');
}

void proto_w_arr_begin(proto_call *c, const char *key)
{
	w_open(c, key, '[');
}

void proto_w_obj_end(proto_call *c)
{
	c->depth--;
	proto_buf_append(c->out, "}", 1);
}

void proto_w_arr_end(proto_call *c)
{
	c->depth--;
	proto_buf_append(c->out, "]", 1);
}

void proto_w_key(proto_call *c, const char *key)
{
	w_sep(c, key);
	c->key_pending = 1;
	c->pending_key = key;
}

static void w_number(proto_call *c, proto_kind k, double v)
{
	char tmp[32];
	size_t n;

	if (k != PK_NONE)
		v = proto_from_internal(&c->units, k, v);
	n = proto_fmt_double(tmp, v);
	proto_buf_append(c->out, tmp, n);
}

void proto_w_num(proto_call *c, const char *key, proto_kind k, double v)
{
	const char *pk = c->key_pending ? c->pending_key : NULL;
	note_unit(c, key ? key : pk, k);
	w_sep(c, key);
	w_number(c, k, v);
}

void proto_w_int(proto_call *c, const char *key, long long v)
{
	char tmp[32];
	int n = snprintf(tmp, sizeof tmp, "%lld", v);
	w_sep(c, key);
	proto_buf_append(c->out, tmp, (size_t)n);
}

void proto_w_str(proto_call *c, const char *key, const char *s)
{
	w_sep(c, key);
	buf_json_string(c->out, s);
}

void proto_w_bool(proto_call *c, const char *key, int v)
{
	w_sep(c, key);
	buf_puts(c->out, v ? "true" : "false");
}

void proto_w_null(proto_call *c, const char *key)
{
	w_sep(c, key);
	proto_buf_append(c->out, "null", 4);
}

void proto_w_raw(proto_call *c, const char *key, const char *json, size_t n)
{
	w_sep(c, key);
	proto_buf_append(c->out, json, n);
}

void proto_w_json(proto_call *c, const char *key, const cJSON *v)
{
	char *s = cJSON_PrintUnformatted(v);
	if (!s) {
		c->out->oom = 1;
		return;
	}
	proto_w_raw(c, key, s, strlen(s));
	cJSON_free(s);
}

void proto_w_rows(proto_call *c, const char *key, proto_kind k,
                  const void *rows, size_t row_size, size_t offset, size_t n,
                  int as_array)
{
	const unsigned char *base = (const unsigned char *)rows + offset;
	char tmp[32];
	double v;

	if (!as_array) {
		v = NAN;
		if (n)
			memcpy(&v, base, sizeof v);
		proto_w_num(c, key, k, v);
		return;
	}
	note_unit(c, key ? key : c->key_pending ? c->pending_key : NULL, k);
	w_sep(c, key);
	/* Reserve roughly: 24 bytes per number is the %.15g worst case. */
	if (n < SIZE_MAX / 26)
		proto_buf_reserve(c->out, n * 25 + 2);
	proto_buf_append(c->out, "[", 1);
	for (size_t i = 0; i < n; i++) {
		size_t len;
		memcpy(&v, base + i * row_size, sizeof v);
		if (k != PK_NONE)
			v = proto_from_internal(&c->units, k, v);
		len = proto_fmt_double(tmp, v);
		if (i)
			proto_buf_append(c->out, ",", 1);
		proto_buf_append(c->out, tmp, len);
	}
	proto_buf_append(c->out, "]", 1);
}

void proto_w_vec(proto_call *c, const char *key, proto_kind k,
                 const double *values, size_t n, size_t stride, int as_array)
{
	proto_w_rows(c, key, k, values, stride * sizeof *values, 0, n,
	             as_array);
}

void proto_w_flags(proto_call *c, const char *key, const uint32_t *flags,
                   size_t n, int as_array)
{
	char tmp[16];

	if (!as_array) {
		proto_w_int(c, key, n ? flags[0] : 0);
		return;
	}
	w_sep(c, key);
	if (n < SIZE_MAX / 12)
		proto_buf_reserve(c->out, n * 11 + 2);
	proto_buf_append(c->out, "[", 1);
	for (size_t i = 0; i < n; i++) {
		int len = snprintf(tmp, sizeof tmp, i ? ",%u" : "%u",
		                   (unsigned)flags[i]);
		proto_buf_append(c->out, tmp, (size_t)len);
	}
	proto_buf_append(c->out, "]", 1);
}

void proto_w_units(proto_call *c)
{
	proto_w_obj_begin(c, "units");
	for (size_t i = 0; i < c->n_unit_notes; i++)
		proto_w_str(c, c->unit_notes[i].path,
		            proto_unit_name(&c->units, c->unit_notes[i].kind));
	proto_w_obj_end(c);
}
