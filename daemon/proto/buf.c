/* The byte buffer responses are built in, and JSON string escaping. It
 * knows nothing of results, units or calls: the result writer (writer.c)
 * appends through it. */
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

/* The longest text the fast paths below copy in one pass. */
enum { ROOM = 64 };

/* 1 when b has n bytes of room past len, growing it if need be; 0 when
 * out of memory or near the output limit, where the exact length must
 * decide (proto_buf_append), not this scratch room. */
static inline int has_room(proto_buf *b, size_t n)
{
	if (b->oom)
		return 0;
	if (b->cap - b->len >= n)
		return 1;
	return (!b->limit || b->len + n < b->limit) &&
	       !proto_buf_reserve(b, n - 1);
}

/* Writes s in quotes at o, scanned and copied in one pass with no call,
 * when it needs no escape and is at most ROOM bytes (ROOM + 2 bytes of
 * room at o); returns the end, or NULL (what was written is then to be
 * overwritten). Names, units and most text take this path. */
static inline char *quote_plain(char *o, const char *s)
{
	const unsigned char *q = (const unsigned char *)s;
	char *stop;

	*o++ = '"';
	stop = o + ROOM;
	while (*q >= 0x20 && *q != '"' && *q != '\\' && o < stop)
		*o++ = (char)*q++;
	if (*q)
		return NULL;
	*o++ = '"';
	return o;
}

/* Appends s as a JSON string with the escapes RFC 8259 requires. Input is
 * expected to be UTF-8 (checked on the way in); bytes >= 0x80 pass. */
static void buf_json_string(proto_buf *b, const char *s)
{
	static const char hex[] = "0123456789abcdef";
	const unsigned char *p = (const unsigned char *)s;
	char esc[7];

	char *e;

	if (has_room(b, ROOM + 3) && (e = quote_plain(b->data + b->len, s))) {
		*e = '\0';
		b->len = (size_t)(e - b->data);
		return;
	}
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

void proto__buf_member(proto_buf *b, int comma, const char *key)
{
	char *o, *e;

	if (has_room(b, ROOM + 5)) {
		o = b->data + b->len;
		*o = ',';
		if ((e = quote_plain(o + comma, key))) {
			*e++ = ':';
			*e = '\0';
			b->len = (size_t)(e - b->data);
			return;
		}
	}
	/* a key to escape or a long one: piece by piece */
	if (comma)
		proto_buf_append(b, ",", 1);
	buf_json_string(b, key);
	proto_buf_append(b, ":", 1);
}
