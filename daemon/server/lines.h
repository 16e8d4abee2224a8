/* Line framing for one connection: bytes in, complete lines out, with a
 * ceiling on line length. Independent of libuv so it can be tested and
 * fuzzed on its own. */
#ifndef RW_SRV_LINES_H
#define RW_SRV_LINES_H

#include <stddef.h>

typedef struct srv_lines {
	char *buf;
	size_t start, len, cap; /* unconsumed bytes are buf[start..len) */
	size_t scan;            /* bytes after start known to hold no '\n' */
	size_t max_line;        /* longest accepted line, '\n' excluded */
	int discarding;         /* dropping an oversized line to its '\n' */
} srv_lines;

typedef enum srv_line_status {
	SRV_LINE_NONE,    /* no complete line buffered */
	SRV_LINE_OK,      /* *line, *len hold one line without its '\n' */
	SRV_LINE_OVERSIZE /* a line passed max_line; it is being skipped */
} srv_line_status;

void srv_lines_init(srv_lines *lb, size_t max_line);
void srv_lines_free(srv_lines *lb);
/* Appends received bytes. A buffer left empty after holding more than
 * 1 MiB is released first. While an oversized line is being skipped, bytes
 * up to and including its '\n' are dropped here. Returns 0, or -1 when out
 * of memory. */
int srv_lines_append(srv_lines *lb, const char *data, size_t n);
/* Takes the next line. The pointer stays valid until the next append.
 * SRV_LINE_OVERSIZE is returned once per oversized line. */
srv_line_status srv_lines_next(srv_lines *lb, const char **line, size_t *len);
/* Takes what is left as a final line at end of input (no '\n'); returns
 * SRV_LINE_NONE when nothing is left or the tail is being discarded. */
srv_line_status srv_lines_tail(srv_lines *lb, const char **line, size_t *len);
/* The next line without taking it: 1 with *line, *len set when a
 * complete line of at most max_line bytes is buffered (a later
 * srv_lines_next returns it), else 0. The same pointer rule. */
int srv_lines_peek(srv_lines *lb, const char **line, size_t *len);
/* Up to max complete lines from the next one on, without taking them:
 * their starts into line[] and lengths into len[]; stops before a line
 * longer than max_line, and gives none while a line is being discarded.
 * Returns how many; later srv_lines_next calls return the same lines.
 * The same pointer rule. */
size_t srv_lines_peek_many(const srv_lines *lb, const char **line, size_t *len,
                           size_t max);
/* 1 when a complete line is buffered (a later srv_lines_next returns
 * it). Scans each byte once however often it is called. */
int srv_lines_has_line(srv_lines *lb);
/* Bytes held. */
size_t srv_lines_buffered(const srv_lines *lb);

#endif
