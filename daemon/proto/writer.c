/* The result writer: a method writes one JSON value (normally its result
 * object) through these calls, straight into the output buffer. Numeric
 * arrays are formatted one number at a time, never as cJSON nodes; values
 * are converted from internal units to the call's units, non-finite
 * numbers become null, and every member with a dimension is noted for the
 * closing "units" map. Members of the result object that the request's
 * `fields` leaves out are skipped here, for every method at once. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/numfmt.h"

size_t proto_fmt_double(char *buf, double v)
{
	return proto_num_fmt(buf, v);
}

/* Appends v as JSON number text: the shortest digits that read back to v,
 * or `digits` significant digits when the call asked for fewer (null for
 * non-finite). Formats straight into the buffer when it has room. */
static inline void put_num(proto_buf *b, double v, int digits, int comma)
{
	char tmp[PROTO_NUM_FMT_MAX + 1];
	char *at = tmp;
	size_t n;
	/* In place, unless the output limit is this close: then the exact
	 * length decides (proto_buf_append), not the scratch room. */
	int direct = !b->limit || b->len + PROTO_NUM_FMT_MAX + 2 < b->limit;

	if (direct && b->cap - b->len < PROTO_NUM_FMT_MAX + 2 &&
	    proto_buf_reserve(b, PROTO_NUM_FMT_MAX + 1))
		return;
	if (direct)
		at = b->data + b->len;
	if (comma)
		*at = ',';
	n = (size_t)comma + (digits
	                         ? proto_num_fmt_digits(at + comma, v, digits)
	                         : proto_num_fmt(at + comma, v));
	if (direct)
		b->len += n;
	else
		proto_buf_append(b, tmp, n);
}

int proto__digits_apply(proto_call *c, const cJSON *v, const char *path,
                        int *digits)
{
	if (!v)
		return 0;
	if (!cJSON_IsNumber(v) || v->valuedouble != floor(v->valuedouble) ||
	    v->valuedouble < 0 || v->valuedouble > 17)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path,
		    "must be a whole number from 1 to 17 (the "
		    "significant digits of every number in the "
		    "answer), or 0 for the shortest text that "
		    "reads back to the same double (the default)");
	*digits = (int)v->valuedouble;
	return 0;
}

/* ---- result writer ------------------------------------------------------ */

int proto_w_selected(const proto_call *c, const char *key)
{
	if (!c->fields || !key)
		return 1;
	for (size_t i = 0; i < c->n_fields; i++)
		if (strcmp(c->fields[i], key) == 0)
			return 1;
	return 0;
}

/* 1 when a value written now with `key` must be dropped: inside a member
 * being skipped, or a result member `fields` leaves out. */
static int w_skip(proto_call *c, const char *key)
{
	if (c->skip_depth)
		return 1;
	if (c->depth == 1 && !c->key_pending)
		return !proto_w_selected(c, key);
	return 0;
}

static void w_sep(proto_call *c, const char *key)
{
	int d = c->depth, comma = 0;
	if (c->key_pending) {
		/* proto_w_key wrote the separator and the key already. */
		c->key_pending = 0;
		return;
	}
	assert(d >= 0 && d < PROTO_W_DEPTH);
	if (d > 0 && d < PROTO_W_DEPTH) {
		comma = c->need_comma[d];
		c->need_comma[d] = 1;
	}
	if (key)
		proto__buf_member(c->out, comma, key);
	else if (comma)
		proto__buf_put1(c->out, ',');
}

static void w_open(proto_call *c, const char *key, char ch)
{
	int d = c->depth + 1;
	const char *pending = c->key_pending ? c->pending_key : NULL;

	if (c->skip_depth || w_skip(c, key)) {
		/* Count the levels of the skipped member so that its ends
		 * are skipped too. */
		c->skip_depth++;
		return;
	}
	w_sep(c, key);
	proto__buf_put1(c->out, ch);
	assert(d < PROTO_W_DEPTH);
	if (d < PROTO_W_DEPTH) {
		c->need_comma[d] = 0;
		/* The path of an array element is its array's path. */
		c->keys[d] = key ? key : pending ? pending : c->keys[d - 1];
	}
	c->depth = d;
}

static void w_close(proto_call *c, char ch)
{
	if (c->skip_depth) {
		c->skip_depth--;
		return;
	}
	assert(c->depth > 0);
	c->depth--;
	proto__buf_put1(c->out, ch);
}

/* Notes kind k for the dotted path, once. */
static void note_path(proto_call *c, const char *path, proto_kind k)
{
	/* FNV-1a (Fowler, Noll, Vo): every number written asks, so the
	 * notes are told apart by hash before any strcmp. */
	uint32_t h = 2166136261u;
	const unsigned char *q = (const unsigned char *)path;
	size_t len;
	for (; *q; q++)
		h = (h ^ *q) * 16777619u;
	len = (size_t)(q - (const unsigned char *)path);
	for (size_t i = 0; i < c->n_unit_notes; i++)
		if (c->unit_notes[i].hash == h &&
		    strcmp(c->unit_notes[i].path, path) == 0)
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
	char *copy = proto_alloc(c, len + 1);
	if (!copy) {
		c->out->oom = 1;
		return;
	}
	memcpy(copy, path, len + 1);
	c->unit_notes[c->n_unit_notes].path = copy;
	c->unit_notes[c->n_unit_notes].hash = h;
	c->unit_notes[c->n_unit_notes].kind = k;
	c->n_unit_notes++;
}

/* Records that the value at key (inside the open objects) has kind k, for
 * the "units" member. Paths are dotted: "fluid_new.k". */
static void note_unit(proto_call *c, const char *key, proto_kind k)
{
	char path[160];
	size_t used = 0;
	int top = c->depth < PROTO_W_DEPTH ? c->depth : PROTO_W_DEPTH - 1;

	if (k == PK_NONE)
		return;
	if (!key)
		key = c->keys[top];
	if (top <= 1) {
		/* a member of the result itself: its key is the path */
		if (key && *key)
			note_path(c, key, k);
		return;
	}
	path[0] = '\0';
	/* keys[1] is the result object itself (no name). */
	for (int d = 2; d <= top; d++) {
		const char *seg = c->keys[d];
		if (!seg || (d > 2 && c->keys[d - 1] == seg))
			continue;
		size_t n = strlen(seg);
		if (used + n + 2 > sizeof path)
			return;
		memcpy(path + used, seg, n);
		used += n;
		path[used++] = '.';
		path[used] = '\0';
	}
	if (key && !(top >= 2 && c->keys[top] == key)) {
		size_t n = strlen(key);
		if (used + n + 1 > sizeof path)
			n = sizeof path - used - 1;
		memcpy(path + used, key, n);
		path[used + n] = '\0';
	} else if (used) {
		path[used - 1] = '\0';
	}
	if (path[0])
		note_path(c, path, k);
}

void proto_w_note_unit(proto_call *c, const char *key, proto_kind k)
{
	if (!c->skip_depth)
		note_unit(c, key, k);
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
	w_close(c, '}');
}

void proto_w_arr_end(proto_call *c)
{
	w_close(c, ']');
}

void proto_w_key(proto_call *c, const char *key)
{
	assert(!c->key_pending);
	if (w_skip(c, key)) {
		/* The value that follows is dropped with its key. */
		c->skip_depth++;
		c->key_pending = 2;
		return;
	}
	w_sep(c, key);
	c->key_pending = 1;
	c->pending_key = key;
}

/* For a skipped proto_w_key, the value ends the skip. Returns 1 when the
 * value must be dropped. */
static int w_value_skip(proto_call *c, const char *key)
{
	if (c->key_pending == 2) {
		c->key_pending = 0;
		c->skip_depth--;
		return 1;
	}
	return w_skip(c, key);
}

static void w_number(proto_call *c, proto_kind k, double v)
{
	if (k != PK_NONE)
		v = proto_from_internal(&c->units, k, v);
	put_num(c->out, v, c->digits, 0);
}

void proto_w_num(proto_call *c, const char *key, proto_kind k, double v)
{
	const char *pk = c->key_pending ? c->pending_key : NULL;
	if (w_value_skip(c, key))
		return;
	note_unit(c, key ? key : pk, k);
	w_sep(c, key);
	w_number(c, k, v);
}

/* The decimal text of v at out (20 bytes at most, no NUL); returns its
 * length. A QC column of a large response has one per sample, which
 * snprintf made 7 % of the whole request. */
static size_t u64_text(char *out, uint64_t v)
{
	char t[20];
	size_t n = 0;
	do {
		t[sizeof t - ++n] = (char)('0' + v % 10);
		v /= 10;
	} while (v);
	memcpy(out, t + sizeof t - n, n);
	return n;
}

void proto_w_int(proto_call *c, const char *key, long long v)
{
	char tmp[21];
	size_t n = 0;
	if (w_value_skip(c, key))
		return;
	if (v < 0)
		tmp[n++] = '-';
	/* the magnitude in unsigned arithmetic: -LLONG_MIN overflows */
	n += u64_text(tmp + n, v < 0 ? 0 - (uint64_t)v : (uint64_t)v);
	w_sep(c, key);
	proto_buf_append(c->out, tmp, n);
}

void proto_w_flags1(proto_call *c, const char *key, uint64_t v)
{
	char tmp[20];
	size_t n;
	if (w_value_skip(c, key))
		return;
	n = u64_text(tmp, v);
	w_sep(c, key);
	proto_buf_append(c->out, tmp, n);
}

void proto_w_str(proto_call *c, const char *key, const char *s)
{
	if (w_value_skip(c, key))
		return;
	w_sep(c, key);
	proto__buf_json_string(c->out, s);
}

void proto_w_bool(proto_call *c, const char *key, int v)
{
	if (w_value_skip(c, key))
		return;
	w_sep(c, key);
	proto_buf_append(c->out, v ? "true" : "false", v ? 4 : 5);
}

void proto_w_null(proto_call *c, const char *key)
{
	if (w_value_skip(c, key))
		return;
	w_sep(c, key);
	proto_buf_append(c->out, "null", 4);
}

void proto_w_raw(proto_call *c, const char *key, const char *json, size_t n)
{
	if (w_value_skip(c, key))
		return;
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

/* One column formatted on the worker threads: chunk k writes numbers
 * [k * per, (k + 1) * per) into its own buffer, joined in order after. */
typedef struct fmt_job {
	const unsigned char *base;
	size_t row_size, n, per;
	proto_kind k;
	const proto_units *units;
	int digits;
	proto_buf *parts;
} fmt_job;

static void fmt_range(proto_buf *b, const fmt_job *j, size_t from, size_t to)
{
	double v;
	for (size_t i = from; i < to; i++) {
		memcpy(&v, j->base + i * j->row_size, sizeof v);
		if (j->k != PK_NONE)
			v = proto_from_internal(j->units, j->k, v);
		put_num(b, v, j->digits, i != 0);
	}
}

static void fmt_chunk(void *arg, size_t k)
{
	const fmt_job *j = arg;
	size_t from = k * j->per, to = from + j->per;
	if (to > j->n)
		to = j->n;
	/* 25 bytes holds any number and its comma; most take fewer. */
	if (!proto_buf_reserve(&j->parts[k], (to - from) * 25 + 64))
		fmt_range(&j->parts[k], j, from, to);
}

/* Numbers a column must have before its formatting is split across the
 * worker threads: below it the hand-off and the extra copy cost more
 * than they save (about 40 ns a number on one core). */
#define PARALLEL_FMT 65536
#define FMT_CHUNKS   16

void proto_w_rows(proto_call *c, const char *key, proto_kind k,
                  const void *rows, size_t row_size, size_t offset, size_t n,
                  int as_array)
{
	fmt_job j = {(const unsigned char *)rows + offset,
	             row_size,
	             n,
	             n,
	             k,
	             &c->units,
	             c->digits,
	             NULL};
	double v;

	if (!as_array) {
		v = NAN;
		if (n)
			memcpy(&v, j.base, sizeof v);
		proto_w_num(c, key, k, v);
		return;
	}
	if (w_value_skip(c, key))
		return;
	note_unit(c, key ? key : c->key_pending ? c->pending_key : NULL, k);
	w_sep(c, key);
	proto_buf_append(c->out, "[", 1);
	if (n >= PARALLEL_FMT && c->ctx) {
		proto_buf parts[FMT_CHUNKS];
		size_t nchunks;
		memset(parts, 0, sizeof parts);
		j.per = (n + FMT_CHUNKS - 1) / FMT_CHUNKS;
		nchunks = (n + j.per - 1) / j.per;
		j.parts = parts;
		proto__parallel(c->ctx, nchunks, fmt_chunk, &j);
		for (size_t i = 0; i < nchunks; i++) {
			if (parts[i].oom)
				c->out->oom = 1;
			else
				proto_buf_append(c->out, parts[i].data,
				                 parts[i].len);
			free(parts[i].data);
		}
	} else {
		fmt_range(c->out, &j, 0, n);
	}
	proto_buf_append(c->out, "]", 1);
}

void proto_w_vec(proto_call *c, const char *key, proto_kind k,
                 const double *values, size_t n, size_t stride, int as_array)
{
	proto_w_rows(c, key, k, values, stride * sizeof *values, 0, n,
	             as_array);
}

void proto_w_flag_rows(proto_call *c, const char *key, const void *rows,
                       size_t row_size, size_t offset, size_t n, int as_array)
{
	const unsigned char *base = (const unsigned char *)rows + offset;
	char tmp[21];
	uint64_t f = 0;

	if (!as_array) {
		if (n)
			memcpy(&f, base, sizeof f);
		proto_w_flags1(c, key, f);
		return;
	}
	if (w_value_skip(c, key))
		return;
	w_sep(c, key);
	if (n < SIZE_MAX / 12)
		proto_buf_reserve(c->out, n * 11 + 2);
	proto_buf_append(c->out, "[", 1);
	tmp[0] = ',';
	for (size_t i = 0; i < n; i++) {
		size_t len;
		memcpy(&f, base + i * row_size, sizeof f);
		len = u64_text(tmp + 1, f);
		proto_buf_append(c->out, tmp + (i == 0), len + (i != 0));
	}
	proto_buf_append(c->out, "]", 1);
}

void proto_w_units(proto_call *c)
{
	proto_w_obj_begin(c, "units");
	/* Straight into the buffer: its members are never left out one by
	 * one (`fields` always keeps the map), so only a skip of the map
	 * itself, as w_open would make it, stops them. */
	if (!c->skip_depth)
		for (size_t i = 0; i < c->n_unit_notes; i++) {
			proto__buf_member(c->out, i > 0, c->unit_notes[i].path);
			proto__buf_json_string(
			    c->out,
			    proto_unit_name(&c->units, c->unit_notes[i].kind));
		}
	proto_w_obj_end(c);
}
