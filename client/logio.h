/* Cross-file helpers of the client subcommands: building request
 * parameters from name=value options (call, log, feed),
 * number formatting, and a non-blocking request/response pipeline over a
 * cli_conn with a bounded number of requests in flight. */
#ifndef RW_CLI_LOGIO_H
#define RW_CLI_LOGIO_H

#include <stddef.h>

#include <cjson/cJSON.h>

#include "cli.h"

/* Sets params[name] = value for "name=value" (dotted names nest); the
 * value is JSON when it parses as JSON, else a string. `who` prefixes
 * messages. 0, or -1 with a message on stderr. */
int cli__param_set(cJSON *params, const char *arg, const char *who);

/* Formats v as JSON number text (proto_num_fmt, rwnum): the shortest
 * digits that read back to exactly v (digits <= 0), or v correctly rounded
 * to `digits` significant digits (1..17; proto_num_fmt_digits), trailing
 * zeros dropped. Layout: integers below 2^53 as integers, else the shorter
 * of plain and exponent notation ("1.5e-7", "1e22": no '+', no leading
 * exponent zeros); -0 as 0. NaN and the infinities give null_text ("null"
 * when NULL). Returns the length (buf >= 40). */
size_t cli__fmt_num(char *buf, double v, int digits, const char *null_text);

/* A growable byte buffer. */
typedef struct cli_buf {
	char *data;
	size_t len, cap, off; /* off: bytes already written out */
} cli_buf;
int cli__buf_put(cli_buf *b, const char *s, size_t n);
int cli__buf_puts(cli_buf *b, const char *s);
/* Room for n more bytes (and a NUL) at b->data + b->len: returns that
 * address, or NULL when out of memory. The caller writes there and adds
 * what it wrote to b->len. */
char *cli__buf_reserve(cli_buf *b, size_t n);
void cli__buf_free(cli_buf *b);

/* Moves bytes both ways once: writes what it can of `out` (non-blocking)
 * and, when the daemon has something, hands each complete response line
 * to on_line(ctx, line, len) (return non-zero to stop). want_read says
 * whether to wait for responses. Waits at most timeout_ms (-1 forever).
 * Returns 0, 1 when the daemon closed, -1 on error or when on_line
 * stopped. With nothing to watch it sleeps timeout_ms (when > 0). */
int cli__pipe_step(cli_conn *c, cli_buf *out, int want_read, int extra_fd,
                   int *extra_ready, int timeout_ms,
                   int (*on_line)(void *ctx, char *line, size_t len),
                   void *ctx);

struct cli_units;
/* Builds the parameters of log and feed: --params JSON (may be NULL),
 * then each "NAME=VALUE" of sets; a value with a unit ("8.5in") is
 * converted to the default unit of NAME's kind with the daemon's factors
 * (a bare number is in the default unit already); units.* become output
 * units in u and are not sent; top-level names and enum values are
 * checked against log.process in disc (may be NULL). *out gets the
 * parameters, *sources an object naming where each top-level one came
 * from (free both with cJSON_Delete). 0, or -1 with a message. */
int cli__build_params(const char *who, char *const *sets, size_t nsets,
                      const char *pjson, struct cli_units *u, const cJSON *disc,
                      cJSON **out, cJSON **sources);
/* Asks for service.info and rpc.discover (ids 1 and 2) and waits for both
 * until deadline_ms (< 0 forever). 0 with *info (the result) and
 * *discover (the result, or NULL when refused), or a CLI_EXIT_* code. */
int cli__fetch_info(cli_conn *c, const char *who, long long deadline_ms,
                    cJSON **info, cJSON **discover);

#endif
