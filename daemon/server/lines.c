/* Line framing: see lines.h. Consumed bytes are dropped by moving the
 * unconsumed tail to the front when it is cheap (the tail is small or
 * more than half the buffer is consumed), so a pipelined stream of small
 * lines costs no quadratic copying and a long line is copied O(1) times
 * per doubling. */
#include <stdlib.h>
#include <string.h>

#include "server/lines.h"

#define SHRINK_ABOVE (1u << 20)

void srv_lines_init(srv_lines *lb, size_t max_line)
{
	memset(lb, 0, sizeof *lb);
	lb->max_line = max_line;
}

void srv_lines_free(srv_lines *lb)
{
	free(lb->buf);
	lb->buf = NULL;
	lb->start = lb->len = lb->cap = lb->scan = 0;
}

size_t srv_lines_buffered(const srv_lines *lb)
{
	return lb->len - lb->start;
}

static void compact(srv_lines *lb)
{
	size_t keep = lb->len - lb->start;
	if (lb->start == 0)
		return;
	if (keep)
		memmove(lb->buf, lb->buf + lb->start, keep);
	lb->len = keep;
	lb->start = 0;
}

int srv_lines_append(srv_lines *lb, const char *data, size_t n)
{
	if (lb->start == lb->len && lb->cap > SHRINK_ABOVE) {
		/* Empty after a long line: give the big buffer back so an
		 * idle connection does not keep its high-water memory. */
		free(lb->buf);
		lb->buf = NULL;
		lb->start = lb->len = lb->cap = lb->scan = 0;
	}
	if (!n)
		return 0; /* data may be NULL: not even memchr on it */
	if (lb->discarding) {
		const char *nl = memchr(data, '\n', n);
		if (!nl)
			return 0;
		lb->discarding = 0;
		n -= (size_t)(nl + 1 - data);
		data = nl + 1;
	}
	if (!n)
		return 0;
	if (lb->start &&
	    (lb->start >= lb->len - lb->start || lb->cap - lb->len < n))
		compact(lb);
	if (lb->cap - lb->len < n) {
		size_t cap = lb->cap ? lb->cap : 4096;
		char *b;
		while (cap - lb->len < n) {
			if (cap > ((size_t)-1) / 2)
				return -1;
			cap *= 2;
		}
		b = realloc(lb->buf, cap);
		if (!b)
			return -1;
		lb->buf = b;
		lb->cap = cap;
	}
	memcpy(lb->buf + lb->len, data, n);
	lb->len += n;
	return 0;
}

srv_line_status srv_lines_next(srv_lines *lb, const char **line, size_t *len)
{
	size_t avail = lb->len - lb->start;
	const char *p, *nl;

	/* An empty framer may have no buffer at all: no pointer arithmetic
	 * on it (NULL + 0 is undefined in C). */
	if (!avail)
		return SRV_LINE_NONE;
	p = lb->buf + lb->start;
	nl = memchr(p + lb->scan, '\n', avail - lb->scan);
	if (!nl) {
		lb->scan = avail;
		if (avail > lb->max_line) {
			/* Over the limit with no end in sight: drop what we
			 * hold and skip the rest of the line as it arrives. */
			lb->start = lb->len = lb->scan = 0;
			lb->discarding = 1;
			return SRV_LINE_OVERSIZE;
		}
		return SRV_LINE_NONE;
	}
	*line = p;
	*len = (size_t)(nl - p);
	lb->start += *len + 1;
	lb->scan = 0;
	if (lb->start == lb->len)
		lb->start = lb->len = 0;
	if (*len > lb->max_line)
		return SRV_LINE_OVERSIZE;
	return SRV_LINE_OK;
}

int srv_lines_has_line(srv_lines *lb)
{
	size_t avail = lb->len - lb->start;
	const char *p, *nl;

	if (avail <= lb->scan)
		return 0;
	p = lb->buf + lb->start;
	nl = memchr(p + lb->scan, '\n', avail - lb->scan);
	if (!nl) {
		lb->scan = avail;
		return 0;
	}
	lb->scan = (size_t)(nl - p);
	return 1;
}

srv_line_status srv_lines_tail(srv_lines *lb, const char **line, size_t *len)
{
	size_t avail = lb->len - lb->start;

	if (!avail || lb->discarding)
		return SRV_LINE_NONE;
	*line = lb->buf + lb->start;
	*len = avail;
	lb->start = lb->len = lb->scan = 0;
	if (*len > lb->max_line)
		return SRV_LINE_OVERSIZE;
	return SRV_LINE_OK;
}

int srv_lines_peek(srv_lines *lb, const char **line, size_t *len)
{
	if (lb->discarding || !srv_lines_has_line(lb) ||
	    lb->scan > lb->max_line)
		return 0;
	*line = lb->buf + lb->start;
	*len = lb->scan;
	return 1;
}

size_t srv_lines_peek_many(const srv_lines *lb, const char **line, size_t *len,
                           size_t max)
{
	size_t n = 0, at = lb->start;

	if (lb->discarding)
		return 0;
	while (n < max && at < lb->len) {
		const char *p = lb->buf + at;
		const char *nl = memchr(p, '\n', lb->len - at);
		if (!nl || (size_t)(nl - p) > lb->max_line)
			break;
		line[n] = p;
		len[n] = (size_t)(nl - p);
		at += len[n] + 1;
		n++;
	}
	return n;
}
