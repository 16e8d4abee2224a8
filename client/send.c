/* `rockwire send`: NDJSON requests from a file or stdin to the daemon,
 * pipelined, answers to stdout in order as they arrive. Blank lines and
 * '#' comment lines are skipped. Every answer is checked against the
 * request it answers (a valid JSON-RPC response with its id; a batch
 * answered by an array); requests left unanswered when the daemon closes,
 * or when --timeout passes without an answer, are reported. Memory is
 * bounded: input is not read while CLI_SEND_INFLIGHT requests await their
 * answers or 4 MiB wait to be written. */
#include <errno.h>
#include <fcntl.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "logio.h"
#include "rpc.h"

#define WHO               "rockwire send"
#define CLI_SEND_INFLIGHT 8192
#define WBUF_HIGH         (4u << 20)

void cli_usage_send(FILE *f)
{
	fprintf(
	    f, "usage: rockwire send [FILE|-] [--timeout SECONDS]\n"
	       "\n"
	       "Sends the JSON-RPC requests in FILE (or stdin), one per line,\n"
	       "pipelined, and writes each answer line to stdout in order.\n"
	       "Blank lines and '#' comment lines are skipped. Every answer\n"
	       "is checked: a valid JSON-RPC 2.0 response carrying the id of\n"
	       "its request (an array for a batch; notifications get none).\n"
	       "\n"
	       "  --timeout S   give up when S seconds pass with requests\n"
	       "                outstanding and no answer (default: wait)\n"
	       "\n"
	       "Exit codes: 0 every request answered without error, 1 some\n"
	       "answer is an error, 2 usage, 3 no daemon reachable, 4 I/O\n"
	       "failure, an invalid answer, or requests left unanswered, 5 a\n"
	       "request line longer than --max-line, 6 timeout. Problems are\n"
	       "counted on stderr.\n");
}

/* What one request line expects back. */
typedef struct expect {
	cJSON *ids; /* array of ids (a batch), or one id */
	int batch;  /* the answer is an array */
	unsigned long line;
} expect;

typedef struct sendrun {
	expect q[CLI_SEND_INFLIGHT];
	size_t head, count;
	unsigned long requests, answered, errors, invalid, notes;
	cli_buf wbuf;
} sendrun;

static int is_notification(const cJSON *r)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(r, "jsonrpc");
	const cJSON *m = cJSON_GetObjectItemCaseSensitive(r, "method");
	const cJSON *e;

	if (!cJSON_IsObject(r) || cJSON_GetObjectItemCaseSensitive(r, "id"))
		return 0;
	if (!cJSON_IsString(v) || strcmp(v->valuestring, "2.0") != 0 ||
	    !cJSON_IsString(m))
		return 0;
	cJSON_ArrayForEach(e, r)
	{
		if (strcmp(e->string, "jsonrpc") &&
		    strcmp(e->string, "method") && strcmp(e->string, "params"))
			return 0;
	}
	return 1;
}

/* The id an answer to request object r carries (null when the request is
 * malformed), as a new node; NULL for a notification. */
static cJSON *answer_id(const cJSON *r)
{
	const cJSON *id = cJSON_GetObjectItemCaseSensitive(r, "id");

	if (is_notification(r))
		return NULL;
	if (cJSON_IsObject(r) && id &&
	    (cJSON_IsString(id) || cJSON_IsNumber(id) || cJSON_IsNull(id)))
		return cJSON_Duplicate(id, 0);
	return cJSON_CreateNull();
}

/* Classifies one request line and queues what it expects. */
static int queue_expect(sendrun *S, const char *line, size_t len,
                        unsigned long lineno)
{
	cJSON *r = cJSON_ParseWithLength(line, len);
	expect *e;

	S->requests++;
	if (cJSON_IsArray(r) && r->child) {
		cJSON *ids = cJSON_CreateArray(), *el;
		cJSON_ArrayForEach(el, r)
		{
			cJSON *id = answer_id(el);
			if (id)
				cJSON_AddItemToArray(ids, id);
		}
		cJSON_Delete(r);
		if (!ids)
			return -1;
		if (!ids->child) {
			cJSON_Delete(ids);
			return 0; /* all notifications: no answer */
		}
		e = &S->q[(S->head + S->count++) % CLI_SEND_INFLIGHT];
		e->ids = ids;
		e->batch = 1;
		e->line = lineno;
		return 0;
	}
	{
		cJSON *id = r ? answer_id(r) : cJSON_CreateNull();
		if (r && !id && is_notification(r)) {
			cJSON_Delete(r);
			return 0;
		}
		cJSON_Delete(r);
		if (!id)
			return -1;
		e = &S->q[(S->head + S->count++) % CLI_SEND_INFLIGHT];
		e->ids = id;
		e->batch = 0;
		e->line = lineno;
	}
	return 0;
}

static void note(sendrun *S, const char *fmt, unsigned long line,
                 const char *why)
{
	if (S->notes++ < 10)
		fprintf(stderr, fmt, line, why);
}

static int has_error(const cJSON *r)
{
	return cJSON_GetObjectItemCaseSensitive(r, "error") != NULL;
}

/* Checks one answer line against the oldest expectation and prints it. */
static int on_answer(sendrun *S, const char *line, size_t len)
{
	expect *e;
	char why[200];
	cJSON *r;

	if (len == 0 || strspn(line, " \t\r") == len)
		return 0;
	if (!S->count) {
		S->invalid++;
		note(S,
		     WHO ": an answer no request asked for (after line %lu): "
		         "%s\n",
		     0, "");
		return 0;
	}
	e = &S->q[S->head];
	fwrite(line, 1, len, stdout);
	fputc('\n', stdout);
	if (!e->batch) {
		r = cli__rpc_parse(line, len, e->ids, why, sizeof why);
		if (!r) {
			S->invalid++;
			note(S, WHO ": invalid answer to line %lu: %s\n",
			     e->line, why);
		} else if (has_error(r))
			S->errors++;
		cJSON_Delete(r);
	} else {
		const char *end = NULL;
		cJSON *el;
		int n = cJSON_GetArraySize(e->ids), got = 0, bad = 0;
		r = cJSON_ParseWithLengthOpts(line, len, &end, 0);
		if (!cJSON_IsArray(r)) {
			bad = 1;
			snprintf(why, sizeof why,
			         "a batch is answered by an "
			         "array");
		}
		cJSON_ArrayForEach(el, r)
		{
			cJSON *id;
			int found = 0;
			if (bad)
				break;
			if (cli__rpc_check(el, NULL, why, sizeof why)) {
				bad = 1;
				break;
			}
			id = cJSON_GetObjectItemCaseSensitive(el, "id");
			for (int k = 0; k < cJSON_GetArraySize(e->ids); k++)
				if (cli__id_equal(cJSON_GetArrayItem(e->ids, k),
				                  id)) {
					cJSON_DeleteItemFromArray(e->ids, k);
					found = 1;
					break;
				}
			if (!found && !(cJSON_IsNull(id) && has_error(el))) {
				bad = 1;
				snprintf(why, sizeof why,
				         "the batch answer has an id no "
				         "request of the batch carries");
				break;
			}
			if (has_error(el))
				S->errors++;
			got++;
		}
		if (!bad && got != n) {
			bad = 1;
			snprintf(why, sizeof why,
			         "the batch answer has %d responses for %d "
			         "requests",
			         got, n);
		}
		if (bad) {
			S->invalid++;
			note(S,
			     WHO ": invalid answer to the batch on line %lu: "
			         "%s\n",
			     e->line, why);
		}
		cJSON_Delete(r);
	}
	cJSON_Delete(e->ids);
	e->ids = NULL;
	S->head = (S->head + 1) % CLI_SEND_INFLIGHT;
	S->count--;
	S->answered++;
	return ferror(stdout) ? -1 : 0;
}

int cli_cmd_send(const cli_opts *o, int argc, char **argv)
{
	static sendrun S; /* the queue is large: keep it off the stack */
	const char *file = NULL;
	long timeout = o->timeout_ms > 0 ? o->timeout_ms : -1;
	size_t max_line = o->max_line ? o->max_line : CLI_DEFAULT_MAX_LINE;
	char *ibuf = NULL;
	size_t ilen = 0, icap = 0;
	unsigned long lineno = 0;
	int fd = -1, in_open = 1, rc = CLI_EXIT_IO, closed_write = 0;
	long long last = 0;
	cli_conn c;
	int connected = 0, timed_out = 0, daemon_closed = 0, pending_lines = 0;

	memset(&S, 0, sizeof S);
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		if (strcmp(a, "--timeout") == 0 && i + 1 < argc) {
			if (cli__parse_seconds(argv[++i], &timeout)) {
				fprintf(stderr,
				        WHO ": --timeout wants seconds\n");
				return CLI_EXIT_USAGE;
			}
			if (timeout == 0)
				timeout = -1;
		} else if (a[0] == '-' && a[1] == '-') {
			static const char *const opts[] = {"--timeout",
			                                   "--help"};
			cli__unknown_option(WHO, a, opts, 2);
			return CLI_EXIT_USAGE;
		} else if (!file) {
			file = a;
		} else {
			cli_usage_send(stderr);
			return CLI_EXIT_USAGE;
		}
	}
	if (!file)
		file = "-";
	fd = strcmp(file, "-") == 0 ? 0 : open(file, O_RDONLY | O_CLOEXEC);
	if (fd < 0) {
		fprintf(stderr, WHO ": %s: %s\n", file, strerror(errno));
		return CLI_EXIT_IO;
	}
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	last = cli__now_ms();
	for (;;) {
		struct pollfd p[3];
		int n = 0, ir = -1, iw = -1, dr = -1, wait_ms = -1;
		int room = S.count < CLI_SEND_INFLIGHT &&
		           S.wbuf.len - S.wbuf.off < WBUF_HIGH;

		if (!in_open && !pending_lines && S.wbuf.off == S.wbuf.len &&
		    !closed_write) {
			cli_close_write(&c);
			closed_write = 1;
		}
		if (!in_open && !pending_lines && !S.count &&
		    S.wbuf.off == S.wbuf.len)
			break;
		if (in_open && room && !pending_lines) {
			p[n] = (struct pollfd){fd, POLLIN, 0};
			ir = n++;
		}
		if (S.wbuf.off < S.wbuf.len) {
			fcntl(c.wfd, F_SETFL,
			      fcntl(c.wfd, F_GETFL) | O_NONBLOCK);
			p[n] = (struct pollfd){c.wfd, POLLOUT, 0};
			iw = n++;
		}
		p[n] = (struct pollfd){c.rfd, POLLIN, 0};
		dr = n++;
		if (timeout > 0 && S.count) {
			long long left = last + timeout - cli__now_ms();
			if (left <= 0) {
				timed_out = 1;
				break;
			}
			wait_ms = (int)(left > 1000000000 ? 1000000000 : left);
		}
		if (poll(p, (nfds_t)n, wait_ms) < 0) {
			if (errno == EINTR)
				continue;
			goto out;
		}
		if (ir >= 0 && p[ir].revents) {
			ssize_t r;
			if (icap - ilen < 65536) {
				size_t cap = icap ? 2 * icap : 131072;
				char *b = realloc(ibuf, cap);
				if (!b) {
					fprintf(stderr,
					        WHO ": out of memory\n");
					goto out;
				}
				ibuf = b;
				icap = cap;
			}
			r = read(fd, ibuf + ilen, icap - ilen - 1);
			if (r < 0 && errno == EINTR)
				continue;
			if (r < 0)
				fprintf(stderr, WHO ": %s: %s\n", file,
				        strerror(errno));
			if (r <= 0) {
				in_open = 0;
				if (ilen && ibuf[ilen - 1] != '\n')
					ibuf[ilen++] = '\n'; /* last line */
			} else
				ilen += (size_t)r;
		}
		/* Complete lines to the daemon, while there is room. */
		{
			size_t start = 0;
			while (S.count < CLI_SEND_INFLIGHT &&
			       S.wbuf.len - S.wbuf.off < WBUF_HIGH) {
				char *nl = ilen > start
				               ? memchr(ibuf + start, '\n',
				                        ilen - start)
				               : NULL;
				size_t len, k;
				if (!nl)
					break;
				len = (size_t)(nl - (ibuf + start));
				lineno++;
				for (k = 0;
				     k < len && (ibuf[start + k] == ' ' ||
				                 ibuf[start + k] == '\t' ||
				                 ibuf[start + k] == '\r');
				     k++)
					;
				if (k < len && ibuf[start + k] != '#') {
					if (queue_expect(&S, ibuf + start, len,
					                 lineno) ||
					    cli__buf_put(&S.wbuf, ibuf + start,
					                 len + 1)) {
						fprintf(stderr, WHO
						        ": out of memory\n");
						goto out;
					}
					if (S.count == 1)
						last = cli__now_ms();
				}
				start += len + 1;
			}
			if (start) {
				memmove(ibuf, ibuf + start, ilen - start);
				ilen -= start;
			}
			pending_lines = ilen > 0 && memchr(ibuf, '\n', ilen);
			if (ilen > max_line) {
				fprintf(stderr,
				        WHO ": %s: line %lu is longer than %zu "
				            "bytes (--max-line)\n",
				        file, lineno + 1, max_line);
				rc = CLI_EXIT_INPUT;
				goto out;
			}
		}
		if (iw >= 0 && p[iw].revents) {
			ssize_t w = write(c.wfd, S.wbuf.data + S.wbuf.off,
			                  S.wbuf.len - S.wbuf.off);
			if (w < 0 && errno != EAGAIN && errno != EINTR) {
				fprintf(stderr, WHO ": write to %s: %s\n",
				        c.desc, strerror(errno));
				daemon_closed = 1;
				break;
			}
			if (w > 0)
				S.wbuf.off += (size_t)w;
		}
		if (p[dr].revents) {
			char *line;
			size_t len;
			int got;
			while ((got = cli_read_line(&c, &line, &len, 0)) == 1) {
				if (on_answer(&S, line, len)) {
					fprintf(stderr,
					        WHO ": cannot write the "
					            "output: %s\n",
					        strerror(errno));
					goto out;
				}
				last = cli__now_ms();
			}
			fflush(stdout);
			if (got == 0) {
				daemon_closed = 1;
				break;
			}
			if (got == -1 || got == -3)
				goto out;
		}
	}
	fflush(stdout);
	rc = CLI_EXIT_OK;
	if (S.errors)
		rc = CLI_EXIT_RPC_ERROR;
	if (S.invalid || S.count ||
	    (daemon_closed && (in_open || pending_lines)))
		rc = CLI_EXIT_IO;
	if (timed_out) {
		fprintf(stderr,
		        WHO ": no answer from %s for %.1f s (--timeout)\n",
		        c.desc, (double)timeout / 1000);
		rc = CLI_EXIT_TIMEOUT;
	} else if (S.count || (daemon_closed && (in_open || pending_lines))) {
		fprintf(stderr,
		        WHO ": %s closed the connection with requests "
		            "unanswered\n",
		        c.desc);
	}
	if (rc != CLI_EXIT_OK)
		fprintf(stderr,
		        WHO ": %lu requests, %lu answered (%lu errors, %lu "
		            "invalid), %zu unanswered%s\n",
		        S.requests, S.answered, S.errors, S.invalid, S.count,
		        in_open || pending_lines ? ", input not read to the end"
		                                 : "");
out:
	for (size_t k = 0; k < S.count; k++)
		cJSON_Delete(S.q[(S.head + k) % CLI_SEND_INFLIGHT].ids);
	if (connected)
		cli_disconnect(&c);
	if (fd > 0)
		close(fd);
	free(ibuf);
	cli__buf_free(&S.wbuf);
	return rc;
}
