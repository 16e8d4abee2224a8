/* Transport and JSON floor (a) of tests/bench: a minimal libuv + cJSON
 * line server. It reads newline-terminated requests from stdin or from
 * Unix-socket connections, parses each line with cJSON, takes its "id"
 * and answers {"jsonrpc":"2.0","id":ID,"result":{"ok":true}} (or a parse
 * error object), writing the answers to one read's lines in one write.
 * That is the least any JSON-RPC line server on libuv must do, so the
 * daemon's requests per second are measured against it.
 *   floor_server --stdio          stdin (pipe or regular file) to stdout
 *   floor_server --socket PATH    serve until SIGTERM or SIGINT
 * Part of the benchmarks; never built by the test suite. */
#include <cjson/cJSON.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <uv.h>

typedef struct conn {
	uv_pipe_t h;
	char *buf;
	size_t len, cap;
	int is_stdio;
} conn;

typedef struct wreq {
	uv_write_t w;
	uv_fs_t fs;
	char *data;
} wreq;

static uv_loop_t *loop;
static uv_pipe_t server;
static uv_pipe_t out_pipe;
static int out_is_file;
static uv_signal_t sig_term, sig_int;
static const char *sock_path;

/* stdin as a regular file: read with uv_fs_read */
static uv_fs_t in_req;
static char in_buf[1 << 16];
static int64_t in_off;
static conn stdio_conn;
static int pending_writes;

static void on_close(uv_handle_t *h)
{
	conn *c = h->data;
	if (!c->is_stdio) {
		free(c->buf);
		free(c);
	}
}

static void on_write(uv_write_t *w, int status)
{
	wreq *r = (wreq *)w;
	(void)status;
	free(r->data);
	free(r);
}

static void on_fs_write(uv_fs_t *fs)
{
	wreq *r = fs->data;
	uv_fs_req_cleanup(fs);
	free(r->data);
	free(r);
	pending_writes--;
}

/* Appends the answer to one line to *o. */
static void answer(const char *line, size_t len, char **o, size_t *olen,
                   size_t *ocap)
{
	cJSON *req = cJSON_ParseWithLength(line, len);
	const cJSON *id = cJSON_GetObjectItemCaseSensitive(req, "id");
	char *ids = id ? cJSON_PrintUnformatted(id) : NULL;
	char tmp[256];
	int n;

	if (!req)
		n = snprintf(
		    tmp, sizeof tmp,
		    "{\"jsonrpc\":\"2.0\",\"id\":null,\"error\":"
		    "{\"code\":-32700,\"message\":\"Parse error\"}}\n");
	else
		n = snprintf(tmp, sizeof tmp,
		             "{\"jsonrpc\":\"2.0\",\"id\":%s,\"result\":"
		             "{\"ok\":true}}\n",
		             ids ? ids : "null");
	if (n > 0 && (size_t)n < sizeof tmp) {
		if (*olen + (size_t)n > *ocap) {
			*ocap = (*ocap + (size_t)n) * 2;
			*o = realloc(*o, *ocap);
		}
		memcpy(*o + *olen, tmp, (size_t)n);
		*olen += (size_t)n;
	}
	free(ids);
	cJSON_Delete(req);
}

static void send_out(conn *c, char *o, size_t olen)
{
	wreq *r;

	if (!olen) {
		free(o);
		return;
	}
	r = malloc(sizeof *r);
	r->data = o;
	if (c->is_stdio && out_is_file) {
		uv_buf_t b = uv_buf_init(o, (unsigned)olen);
		r->fs.data = r;
		pending_writes++;
		uv_fs_write(loop, &r->fs, 1, &b, 1, -1, on_fs_write);
		return;
	}
	uv_buf_t b = uv_buf_init(o, (unsigned)olen);
	uv_write(&r->w,
	         c->is_stdio ? (uv_stream_t *)&out_pipe : (uv_stream_t *)&c->h,
	         &b, 1, on_write);
}

/* Takes every complete line from c's buffer and answers it. */
static void feed(conn *c, const char *data, size_t n)
{
	char *o = NULL;
	size_t olen = 0, ocap = 0, start = 0;

	if (c->len + n > c->cap) {
		c->cap = (c->len + n) * 2;
		c->buf = realloc(c->buf, c->cap);
	}
	memcpy(c->buf + c->len, data, n);
	c->len += n;
	for (size_t i = 0; i < c->len; i++) {
		if (c->buf[i] != '\n')
			continue;
		if (i > start)
			answer(c->buf + start, i - start, &o, &olen, &ocap);
		start = i + 1;
	}
	memmove(c->buf, c->buf + start, c->len - start);
	c->len -= start;
	send_out(c, o, olen);
}

static void on_alloc(uv_handle_t *h, size_t hint, uv_buf_t *b)
{
	static char rb[1 << 16];
	(void)h;
	(void)hint;
	*b = uv_buf_init(rb, sizeof rb);
}

static void on_read(uv_stream_t *s, ssize_t n, const uv_buf_t *b)
{
	conn *c = s->data;
	if (n > 0) {
		feed(c, b->base, (size_t)n);
		return;
	}
	if (n < 0) {
		if (c->len)
			feed(c, "\n", 1);
		if (!uv_is_closing((uv_handle_t *)s))
			uv_close((uv_handle_t *)s, on_close);
	}
}

static void on_file_read(uv_fs_t *r)
{
	ssize_t n = r->result;
	uv_fs_req_cleanup(r);
	if (n > 0) {
		uv_buf_t b = uv_buf_init(in_buf, sizeof in_buf);
		feed(&stdio_conn, in_buf, (size_t)n);
		in_off += n;
		uv_fs_read(loop, &in_req, 0, &b, 1, in_off, on_file_read);
		return;
	}
	if (stdio_conn.len)
		feed(&stdio_conn, "\n", 1);
}

static void on_connection(uv_stream_t *srv, int status)
{
	conn *c;
	if (status < 0)
		return;
	c = calloc(1, sizeof *c);
	uv_pipe_init(loop, &c->h, 0);
	c->h.data = c;
	if (uv_accept(srv, (uv_stream_t *)&c->h) == 0)
		uv_read_start((uv_stream_t *)&c->h, on_alloc, on_read);
	else
		uv_close((uv_handle_t *)&c->h, on_close);
}

static void close_walk(uv_handle_t *h, void *arg)
{
	(void)arg;
	if (!uv_is_closing(h))
		uv_close(h, h->data && h->type == UV_NAMED_PIPE &&
		                    h != (uv_handle_t *)&server &&
		                    h != (uv_handle_t *)&out_pipe
		                ? on_close
		                : NULL);
}

static void on_signal(uv_signal_t *s, int signum)
{
	(void)s;
	(void)signum;
	uv_walk(loop, close_walk, NULL);
}

int main(int argc, char **argv)
{
	loop = uv_default_loop();
	signal(SIGPIPE, SIG_IGN);
	if (argc == 2 && strcmp(argv[1], "--stdio") == 0) {
		stdio_conn.is_stdio = 1;
		out_is_file = uv_guess_handle(1) == UV_FILE;
		if (!out_is_file) {
			uv_pipe_init(loop, &out_pipe, 0);
			uv_pipe_open(&out_pipe, 1);
		}
		if (uv_guess_handle(0) == UV_FILE) {
			uv_buf_t b = uv_buf_init(in_buf, sizeof in_buf);
			uv_fs_read(loop, &in_req, 0, &b, 1, 0, on_file_read);
		} else {
			uv_pipe_init(loop, &stdio_conn.h, 0);
			stdio_conn.h.data = &stdio_conn;
			uv_pipe_open(&stdio_conn.h, 0);
			uv_read_start((uv_stream_t *)&stdio_conn.h, on_alloc,
			              on_read);
		}
		uv_run(loop, UV_RUN_DEFAULT);
		if (!out_is_file)
			uv_close((uv_handle_t *)&out_pipe, NULL);
		uv_run(loop, UV_RUN_DEFAULT);
		free(stdio_conn.buf);
		return 0;
	}
	if (argc == 3 && strcmp(argv[1], "--socket") == 0) {
		sock_path = argv[2];
		unlink(sock_path);
		uv_pipe_init(loop, &server, 0);
		if (uv_pipe_bind(&server, sock_path) ||
		    uv_listen((uv_stream_t *)&server, 1024, on_connection)) {
			fprintf(stderr, "floor_server: cannot listen on %s\n",
			        sock_path);
			return 3;
		}
		uv_signal_init(loop, &sig_term);
		uv_signal_start(&sig_term, on_signal, SIGTERM);
		uv_signal_init(loop, &sig_int);
		uv_signal_start(&sig_int, on_signal, SIGINT);
		uv_run(loop, UV_RUN_DEFAULT);
		unlink(sock_path);
		return 0;
	}
	fprintf(stderr, "usage: floor_server --stdio | --socket PATH\n");
	return 2;
}
