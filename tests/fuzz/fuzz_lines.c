/* libFuzzer target for the line framer: the input is split into chunks
 * (chunk sizes taken from the first bytes) and appended; every line taken
 * must be within the limit, hold no '\n', and together with the oversize
 * reports account for the bytes fed. Build and run with tests/fuzz/run. */
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "server/lines.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	srv_lines lb;
	const char *line;
	size_t len, max, pos = 0, seed;
	srv_line_status st;

	if (size < 2)
		return 0;
	max = 1 + data[0] % 64;
	seed = data[1];
	data += 2;
	size -= 2;
	srv_lines_init(&lb, max);
	while (pos < size) {
		size_t n = 1 + (seed * 31 + pos) % 97;
		if (n > size - pos)
			n = size - pos;
		if (srv_lines_append(&lb, (const char *)data + pos, n))
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
	return 0;
}
