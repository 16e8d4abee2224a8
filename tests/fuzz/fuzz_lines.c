/* libFuzzer target for the line framer: the input is split into chunks
 * (chunk sizes taken from the first bytes) and appended; every line taken
 * must be within the limit and hold no '\n', and the framer must not
 * hoard a long line. The third byte chooses extra paths: probing a framer
 * that never held a byte (a connection that closed before sending
 * anything, --stdio </dev/null), empty appends with no data pointer, a
 * buffer grown past 1 MiB and given back, and probing after free. Build
 * and run with tests/fuzz/run. */
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "server/lines.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void probe_empty(srv_lines *lb)
{
	const char *line;
	size_t len;

	if (srv_lines_has_line(lb) ||
	    srv_lines_next(lb, &line, &len) != SRV_LINE_NONE ||
	    srv_lines_tail(lb, &line, &len) != SRV_LINE_NONE ||
	    srv_lines_buffered(lb))
		abort();
}

/* Grows the buffer past 1 MiB with one line and takes it, so the next
 * append gives the buffer back. */
static void big_line(srv_lines *lb, size_t max)
{
	static char big[(1u << 20) + 100];
	const char *line;
	size_t len;

	memset(big, 'x', sizeof big - 1);
	big[sizeof big - 1] = '\n';
	lb->max_line = sizeof big;
	if (srv_lines_append(lb, big, sizeof big) ||
	    srv_lines_next(lb, &line, &len) != SRV_LINE_OK ||
	    len != sizeof big - 1)
		abort();
	lb->max_line = max;
	probe_empty(lb);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	srv_lines lb;
	const char *line;
	size_t len, max, pos = 0, seed;
	unsigned mode;
	srv_line_status st;

	if (size < 3)
		return 0;
	max = 1 + data[0] % 64;
	seed = data[1];
	mode = data[2];
	data += 3;
	size -= 3;
	srv_lines_init(&lb, max);
	if (mode & 1)
		probe_empty(&lb);
	if (mode & 2 && srv_lines_append(&lb, NULL, 0))
		abort();
	if (mode & 4)
		big_line(&lb, max);
	while (pos < size) {
		size_t n = 1 + (seed * 31 + pos) % 97;
		if (n > size - pos)
			n = size - pos;
		if (srv_lines_append(&lb, (const char *)data + pos, n))
			abort();
		if (mode & 2 && srv_lines_append(&lb, NULL, 0))
			abort();
		pos += n;
		(void)srv_lines_has_line(&lb);
		while ((st = srv_lines_next(&lb, &line, &len)) !=
		       SRV_LINE_NONE) {
			if (st == SRV_LINE_OK &&
			    (len > max || memchr(line, '\n', len)))
				abort();
		}
		if (srv_lines_buffered(&lb) > max + 97)
			abort(); /* the framer must not hoard a long line */
	}
	st = srv_lines_tail(&lb, &line, &len);
	if (st == SRV_LINE_OK && (len > max || memchr(line, '\n', len)))
		abort();
	if (srv_lines_buffered(&lb))
		abort();
	srv_lines_free(&lb);
	if (mode & 8)
		probe_empty(&lb);
	return 0;
}
