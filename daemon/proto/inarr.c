/* Numeric arrays taken out of a request line before cJSON sees it.
 *
 * A request carrying a whole well holds a few arrays of 10^5-10^6
 * numbers. cJSON would make one heap node and one strtod call of each;
 * instead a pre-pass finds the large numeric arrays (JSON-aware: strings
 * and escapes are tracked), parses each with proto_num_array_parse (the
 * correctly rounded parser of numparse.h, nulls stored as NaN) straight
 * into doubles, and gives cJSON a compacted copy of the line in which
 * each such array is a placeholder string "\xFF<index>". check_bytes has
 * already refused a raw 0xFF byte in the line (it is never UTF-8) and
 * cJSON decodes "\u00ff" to C3 BF, so no client can write a placeholder.
 * After parsing, each placeholder node is turned back into an array node
 * that carries the doubles instead of children (see internal.h,
 * "numeric arrays from the pre-pass"). An array the fast parse refuses
 * (bad syntax, a number beyond the double range, a string among the
 * numbers) is left as text, so cJSON and the parameter code report it
 * exactly as before. A line whose compacted copy cJSON refuses, or in
 * which a placeholder stands where no value may (an object key: the
 * line is not JSON), is parsed again as it was sent, so its error names
 * the byte where the client wrote it. */
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/numparse.h"

/* Arrays taken out: at least this many elements or this many bytes of
 * text. Below that a placeholder (a string node, a table entry, one
 * allocation) saves little over cJSON's nodes, and the few small arrays
 * of a request (angles, a 3 x 3 matrix row, a handful of names) stay
 * ordinary nodes. */
#define INARR_MIN_ELEMS 16
#define INARR_MIN_BYTES 128
/* Arrays of more elements than this are parsed in spans on the context's
 * worker threads (about 1-2 ms of parsing on one core: below it the hand
 * over costs more than it saves). */
#define INARR_SPLIT_ELEMS 200000
#define INARR_SPANS       8

#define PLACEHOLDER_BYTE '\xff'

/* Nonzero: take nothing out (the whole line goes to cJSON as before).
 * Only tests set it, to compare every answer with and without the
 * pre-pass; the daemon never does. */
int proto__inarr_off;

static int grow(proto_inarr *t)
{
	size_t cap = t->cap ? 2 * t->cap : 8;
	proto_numarr *a = realloc(t->arr, cap * sizeof *a);

	if (!a)
		return -1;
	t->arr = a;
	t->cap = cap;
	return 0;
}

typedef struct span_job {
	const char *text;
	proto_num_span span[INARR_SPANS];
	int status[INARR_SPANS];
	double *out;
} span_job;

static void span_chunk(void *arg, size_t k)
{
	span_job *j = arg;
	proto_num_err err;

	j->status[k] = proto_num_array_parse_span(
	    j->text, &j->span[k], PROTO_NUM_NULLS, j->out, &err);
}

/* Parses the array text[0..end) of n counted elements into out; 0 when
 * every element is a number or null. */
static int parse_array(proto_ctx *ctx, const char *text, size_t end, size_t n,
                       double *out)
{
	proto_num_err err;
	size_t got, e;

	if (ctx && n > INARR_SPLIT_ELEMS &&
	    proto_ctx_limits(ctx)->threads != 1) {
		span_job j;
		size_t k =
		    proto_num_array_split(text, end, n, j.span, INARR_SPANS);
		j.text = text;
		j.out = out;
		proto__parallel(ctx, k, span_chunk, &j);
		for (size_t i = 0; i < k; i++)
			if (j.status[i] != PROTO_NUM_OK)
				return -1;
		return k ? 0 : -1;
	}
	if (proto_num_array_parse(text, end, PROTO_NUM_NULLS, out, n, &got, &e,
	                          &err) != PROTO_NUM_OK)
		return -1;
	return got == n && e == end ? 0 : -1;
}

/* The bytes the scan stops at; it steps over the others. */
static const unsigned char structural[256] = {
    ['"'] = 1, ['['] = 1, [']'] = 1, ['{'] = 1, ['}'] = 1};

int proto__inarr_scan(proto_ctx *ctx, const char *line, size_t len,
                      int count_only, proto_inarr *t)
{
	size_t i = 0, copied = 0, out = 0;
	int depth = 0;

	memset(t, 0, sizeof *t);
	/* no '[' at all (scalar requests): nothing to do */
	if (proto__inarr_off || !memchr(line, '[', len))
		return 0;
	while (i < len) {
		char ch;
		while (i < len && !structural[(unsigned char)line[i]])
			i++;
		if (i >= len)
			break;
		ch = line[i];
		if (ch == '"') {
			/* skip the string, escapes included */
			for (i++; i < len && line[i] != '"'; i++)
				if (line[i] == '\\')
					i++;
			i++;
			continue;
		}
		if (ch == '{') {
			depth++;
		} else if (ch == '}' || ch == ']') {
			depth--;
		} else if (ch == '[') {
			size_t p = i + 1, n = 0, end = 0;
			proto_num_err err;
			double *v = NULL;
			char ph[32];
			int phn;
			/* the line itself (a batch) is never taken out */
			int top = depth == 0;
			depth++;
			while (p < len && (line[p] == ' ' || line[p] == '\t' ||
			                   line[p] == '\n' || line[p] == '\r'))
				p++;
			if (top || p >= len ||
			    !(line[p] == '-' || line[p] == 'n' ||
			      (line[p] >= '0' && line[p] <= '9')) ||
			    proto_num_array_count(line + i, len - i, &n, &end,
			                          &err) != PROTO_NUM_OK ||
			    (n < INARR_MIN_ELEMS && end < INARR_MIN_BYTES)) {
				i++;
				continue;
			}
			if (!count_only) {
				v = malloc(n * sizeof *v);
				if (!v)
					goto oom;
				if (parse_array(ctx, line + i, end, n, v)) {
					/* left as text: cJSON and the
					 * parameter code name the problem */
					free(v);
					i++;
					continue;
				}
			}
			if (t->n == t->cap && grow(t)) {
				free(v);
				goto oom;
			}
			if (!t->text) {
				t->text = malloc(len + 1);
				if (!t->text) {
					free(v);
					goto oom;
				}
			}
			t->arr[t->n].v = v;
			t->arr[t->n].n = n;
			phn = snprintf(ph, sizeof ph, "\"%c%zu\"",
			               PLACEHOLDER_BYTE, t->n);
			memcpy(t->text + out, line + copied, i - copied);
			out += i - copied;
			memcpy(t->text + out, ph, (size_t)phn);
			out += (size_t)phn;
			t->n++;
			i += end;
			copied = i;
			depth--;
			continue;
		}
		i++;
	}
	if (t->text) {
		memcpy(t->text + out, line + copied, len - copied);
		out += len - copied;
		t->text[out] = '\0';
		t->len = out;
	}
	return 0;
oom:
	proto__inarr_free(t);
	return -1;
}

void proto__inarr_free(proto_inarr *t)
{
	for (size_t k = 0; k < t->n; k++)
		free(t->arr[k].v);
	free(t->arr);
	free(t->text);
	memset(t, 0, sizeof *t);
}

/* Turns the placeholder strings under v into numeric array nodes;
 * returns how many. */
static size_t attach(cJSON *v, proto_inarr *t)
{
	size_t n = 0;

	for (cJSON *e = v->child; e; e = e->next) {
		if (cJSON_IsString(e) && e->valuestring &&
		    e->valuestring[0] == PLACEHOLDER_BYTE) {
			size_t k = strtoul(e->valuestring + 1, NULL, 10);
			assert(k < t->n);
			cJSON_free(e->valuestring);
			e->valuestring = (char *)&t->arr[k];
			e->type =
			    cJSON_Array | cJSON_IsReference | PROTO_NUMARR_BIT;
			n++;
		} else if (e->child) {
			n += attach(e, t);
		}
	}
	return n;
}

int proto__inarr_attach(cJSON *root, proto_inarr *t)
{
	if (!t->n)
		return 0;
	return root && attach(root, t) == t->n ? 0 : -1;
}

/* ---- reading --------------------------------------------------------- */

const proto_numarr *proto__numarr(const cJSON *v)
{
	if (v && (v->type & PROTO_NUMARR_BIT) && cJSON_IsArray(v))
		return (const proto_numarr *)(const void *)v->valuestring;
	return NULL;
}

size_t proto__arr_size(const cJSON *v)
{
	const proto_numarr *a = proto__numarr(v);

	if (a)
		return a->n;
	return cJSON_IsArray(v) || cJSON_IsObject(v)
	           ? (size_t)cJSON_GetArraySize(v)
	           : 0;
}

/* Fills the iterator's scratch node with element it->i of a numeric
 * array: a number, or null where the text had null. */
static const cJSON *scratch(proto_arr_iter *it)
{
	double x;

	if (it->i >= it->a->n)
		return NULL;
	memset(&it->tmp, 0, sizeof it->tmp);
	x = it->a->v ? it->a->v[it->i] : 0;
	if (isnan(x)) {
		it->tmp.type = cJSON_NULL;
	} else {
		/* as cJSON sets a number node */
		it->tmp.type = cJSON_Number;
		it->tmp.valuedouble = x;
		it->tmp.valueint = x >= INT_MAX   ? INT_MAX
		                   : x <= INT_MIN ? INT_MIN
		                                  : (int)x;
	}
	return &it->tmp;
}

const cJSON *proto__arr_first(proto_arr_iter *it, const cJSON *v)
{
	memset(it, 0, sizeof *it);
	it->a = proto__numarr(v);
	if (it->a)
		return scratch(it);
	it->e = v ? v->child : NULL;
	return it->e;
}

const cJSON *proto__arr_next(proto_arr_iter *it)
{
	if (it->a) {
		it->i++;
		return scratch(it);
	}
	it->e = it->e ? it->e->next : NULL;
	return it->e;
}

int proto__numarr_restore(cJSON *v)
{
	const proto_numarr *a = proto__numarr(v);

	if (a) {
		cJSON *head = NULL, *tail = NULL;
		for (size_t i = 0; i < a->n; i++) {
			double x = a->v ? a->v[i] : 0;
			cJSON *e = isnan(x) ? cJSON_CreateNull()
			                    : cJSON_CreateNumber(x);
			if (!e) {
				cJSON_Delete(head);
				return -1;
			}
			if (tail) {
				tail->next = e;
				e->prev = tail;
			} else {
				head = e;
			}
			tail = e;
		}
		if (head)
			head->prev = tail; /* cJSON keeps the last here */
		v->valuestring = NULL;
		v->type = cJSON_Array;
		v->child = head;
		return 0;
	}
	for (cJSON *e = v ? v->child : NULL; e; e = e->next)
		if ((e->child || (e->type & PROTO_NUMARR_BIT)) &&
		    proto__numarr_restore(e))
			return -1;
	return 0;
}
