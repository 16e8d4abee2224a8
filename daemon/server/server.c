/* The libuv server: listeners, connections, line dispatch, ordered writes
 * with backpressure, the thread-pool path for heavy lines, and shutdown.
 *
 * A connection is one input and one output: a socket (both on one
 * handle), or stdin and stdout in --stdio mode, each of which may be a
 * pipe, a terminal or a regular file / character device (read and written
 * with uv_fs_* since those cannot be libuv streams). Lines are taken from
 * connections on a ready list, a bounded number per connection per loop
 * turn, so one pipelining client cannot starve the others. Only one line
 * per connection is in flight at a time, which keeps responses in request
 * order without sequence numbers. A connection is freed only when its last
 * handle has closed and no write, read or work request still refers to it
 * (`refs`), never inside its own callback chain. */
#include <errno.h>
#include <signal.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/un.h>
#include <time.h>
#include <unistd.h>

#include <uv.h>

#include "server/lines.h"
#include "server/srv.h"

#define READ_CHUNK 65536

typedef struct srv srv;
typedef struct conn conn;

enum io_kind { IO_NONE, IO_STREAM, IO_FILE };

typedef union any_handle {
	uv_handle_t h;
	uv_stream_t s;
	uv_pipe_t pipe;
	uv_tty_t tty;
	uv_tcp_t tcp;
} any_handle;

struct conn {
	srv *srv;
	conn *prev, *next;        /* all connections */
	conn *ready_next;         /* ready list */
	int in_ready;

	enum io_kind in_kind;
	any_handle in;
	int in_open;
	uv_file in_fd;
	int64_t in_off;
	uv_fs_t in_req;
	int in_inflight;          /* a file read is in flight */
	char *in_buf;             /* file input buffer */

	enum io_kind out_kind;
	any_handle outh;          /* stdout handle when separate */
	uv_stream_t *out_stream;
	int out_open;
	uv_file out_fd;
	uv_fs_t out_req;
	uv_write_t wreq;

	proto_buf pending;        /* responses not yet handed to a write */
	char *wdata;              /* the write in flight */
	size_t wlen, woff;
	int writing;

	srv_lines lines;
	proto_session *session;

	int reading;              /* input is being read */
	int eof;                  /* no more input will come */
	int paused;               /* unsent output above the high-water mark */
	int closing;
	int busy;                 /* a line is in the thread pool */
	int refs;

	uv_work_t work;
	char *work_line;
	size_t work_len;
	proto_buf work_out;
	int work_rc;

	char name[48];
};

struct srv {
	uv_loop_t *loop;
	const srv_config *cfg;
	proto_ctx *ctx;
	proto_server_stats *stats;
	conn *conns;
	conn *ready_head, *ready_tail;
	uv_idle_t idle;
	int idle_active;
	uv_pipe_t listener;
	int listening;
	char *sock_path;          /* the path we created, to remove at exit */
	dev_t sock_dev;
	ino_t sock_ino;
	uv_signal_t sig_int, sig_term, sig_hup;
	uv_timer_t drain_timer;
	int stopping;
	int exit_code;
	unsigned long next_id;
	char read_buf[READ_CHUNK];
	char transport[160];
};

/* ---- logging ------------------------------------------------------------ */

void srv_log(const char *level, const char *fmt, ...)
{
	char msg[1024], stamp[32];
	struct timespec ts;
	struct tm tm;
	va_list ap;

	clock_gettime(CLOCK_REALTIME, &ts);
	gmtime_r(&ts.tv_sec, &tm);
	strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", &tm);
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	fprintf(stderr, "%s rockwired[%ld]: %s: %s\n", stamp, (long)getpid(),
		level, msg);
}

/* ---- configuration ------------------------------------------------------ */

void srv_config_default(srv_config *cfg)
{
	memset(cfg, 0, sizeof *cfg);
	cfg->socket_mode = 0600;
	cfg->lines_per_turn = 20;
	cfg->offload_bytes = 256 * 1024;
	cfg->drain_timeout_s = 8.0;
	proto_limits_default(&cfg->limits);
}

char *srv_default_socket_path(char *buf, size_t size)
{
	const char *xdg = getenv("XDG_RUNTIME_DIR");
	if (xdg && *xdg)
		snprintf(buf, size, "%s/rockwire.sock", xdg);
	else
		snprintf(buf, size, "/tmp/rockwire-%ld.sock", (long)getuid());
	return buf;
}

/* ---- connection lifetime ------------------------------------------------ */

static void srv_maybe_finish(srv *s);
static void conn_schedule(conn *c);
static void conn_flush(conn *c);
static void conn_close(conn *c);

static void conn_unref(conn *c)
{
	srv *s = c->srv;

	if (--c->refs > 0)
		return;
	/* Last reference: unlink and free. */
	if (c->prev)
		c->prev->next = c->next;
	else
		s->conns = c->next;
	if (c->next)
		c->next->prev = c->prev;
	if (s->stats->connections_open)
		s->stats->connections_open--;
	srv_lines_free(&c->lines);
	proto_buf_free(&c->pending);
	proto_buf_free(&c->work_out);
	free(c->wdata);
	free(c->work_line);
	free(c->in_buf);
	proto_session_free(c->session);
	free(c);
	srv_maybe_finish(s);
}

static void on_handle_closed(uv_handle_t *h)
{
	conn_unref(h->data);
}

static conn *conn_new(srv *s, const char *kind)
{
	conn *c = calloc(1, sizeof *c);

	if (!c)
		return NULL;
	c->session = proto_session_new(s->ctx);
	if (!c->session) {
		free(c);
		return NULL;
	}
	c->srv = s;
	c->in_fd = c->out_fd = -1;
	srv_lines_init(&c->lines, s->cfg->limits.max_line);
	proto_buf_init(&c->pending);
	proto_buf_init(&c->work_out);
	snprintf(c->name, sizeof c->name, "%s#%lu", kind, ++s->next_id);
	c->next = s->conns;
	if (s->conns)
		s->conns->prev = c;
	s->conns = c;
	s->stats->connections_total++;
	s->stats->connections_open++;
	return c;
}

static size_t conn_unsent(const conn *c)
{
	return c->pending.len + (c->wlen - c->woff);
}

static void ready_remove(conn *c)
{
	srv *s = c->srv;
	conn **pp = &s->ready_head, *prev = NULL;

	if (!c->in_ready)
		return;
	while (*pp && *pp != c) {
		prev = *pp;
		pp = &(*pp)->ready_next;
	}
	if (*pp) {
		*pp = c->ready_next;
		if (s->ready_tail == c)
			s->ready_tail = prev;
	}
	c->ready_next = NULL;
	c->in_ready = 0;
}

static void conn_close(conn *c)
{
	if (c->closing)
		return;
	c->closing = 1;
	ready_remove(c);
	if (c->in_open && c->in_kind == IO_STREAM) {
		c->in_open = 0;
		uv_close(&c->in.h, on_handle_closed);
	}
	if (c->out_open) {
		c->out_open = 0;
		uv_close(&c->outh.h, on_handle_closed);
	}
	/* File descriptors 0 and 1 of --stdio are not ours to close. */
	conn_unref(c); /* the reference held by the connection itself */
}

/* ---- reading ------------------------------------------------------------ */

static void read_stop(conn *c)
{
	if (c->reading && c->in_kind == IO_STREAM && c->in_open)
		uv_read_stop(&c->in.s);
	c->reading = 0;
}

static void conn_feed(conn *c, const char *data, size_t n)
{
	c->srv->stats->bytes_in += n;
	if (srv_lines_append(&c->lines, data, n)) {
		srv_log("error", "%s: out of memory buffering input; closing",
			c->name);
		conn_close(c);
		return;
	}
	conn_schedule(c);
}

static void on_alloc(uv_handle_t *h, size_t suggested, uv_buf_t *buf)
{
	conn *c = h->data;
	(void)suggested;
	buf->base = c->srv->read_buf;
	buf->len = sizeof c->srv->read_buf;
}

static void on_eof(conn *c)
{
	read_stop(c);
	c->eof = 1;
	conn_schedule(c);
}

static void on_read(uv_stream_t *st, ssize_t nread, const uv_buf_t *buf)
{
	conn *c = st->data;

	if (c->closing)
		return;
	if (nread > 0) {
		conn_feed(c, buf->base, (size_t)nread);
	} else if (nread == UV_EOF) {
		on_eof(c);
	} else if (nread < 0) {
		if (nread != UV_ECONNRESET)
			srv_log("warning", "%s: read: %s", c->name,
				uv_strerror((int)nread));
		/* The peer is gone: nobody is left to answer. */
		conn_close(c);
	}
}

static void file_read_next(conn *c);

static void on_file_read(uv_fs_t *req)
{
	conn *c = req->data;
	ssize_t n = req->result;

	uv_fs_req_cleanup(req);
	c->in_inflight = 0;
	if (c->closing) {
		conn_unref(c);
		return;
	}
	c->refs--; /* the request's; the connection's own is still held */
	if (n > 0) {
		c->in_off += n;
		conn_feed(c, c->in_buf, (size_t)n);
		if (!c->closing && c->reading && !c->paused)
			file_read_next(c);
	} else {
		if (n < 0)
			srv_log("warning", "%s: read: %s", c->name,
				uv_strerror((int)n));
		on_eof(c);
	}
}

static void file_read_next(conn *c)
{
	uv_buf_t b = uv_buf_init(c->in_buf, READ_CHUNK);
	int rc;

	if (c->in_inflight)
		return;
	c->in_req.data = c;
	c->refs++;
	c->in_inflight = 1;
	rc = uv_fs_read(c->srv->loop, &c->in_req, c->in_fd, &b, 1, c->in_off,
			on_file_read);
	if (rc < 0) {
		c->refs--;
		c->in_inflight = 0;
		srv_log("warning", "%s: read: %s", c->name, uv_strerror(rc));
		on_eof(c);
	}
}

static void read_start(conn *c)
{
	if (c->reading || c->eof || c->closing)
		return;
	c->reading = 1;
	if (c->in_kind == IO_STREAM) {
		int rc = uv_read_start(&c->in.s, on_alloc, on_read);
		if (rc < 0) {
			srv_log("warning", "%s: read start: %s", c->name,
				uv_strerror(rc));
			c->reading = 0;
			on_eof(c);
		}
	} else if (c->in_kind == IO_FILE) {
		file_read_next(c);
	}
}

/* ---- writing ------------------------------------------------------------ */

static void update_pause(conn *c)
{
	size_t unsent = conn_unsent(c);
	size_t high = c->srv->cfg->limits.out_high_water;

	if (!c->paused && unsent > high) {
		c->paused = 1;
		c->srv->stats->reads_paused++;
		read_stop(c);
	} else if (c->paused && unsent <= high / 2) {
		c->paused = 0;
		read_start(c);
		conn_schedule(c);
	}
}

static void conn_check_done(conn *c)
{
	if (c->closing || !c->eof || c->busy || c->writing ||
	    c->pending.len || srv_lines_buffered(&c->lines))
		return;
	conn_close(c);
}

/* A write finished: status < 0 is an error, else `n` bytes went out. */
static void write_done(conn *c, int status, size_t n)
{
	c->writing = 0;
	if (status < 0) {
		if (!c->closing && status != UV_ECANCELED &&
		    status != UV_EPIPE && status != UV_ECONNRESET)
			srv_log("warning", "%s: write: %s", c->name,
				uv_strerror(status));
		free(c->wdata);
		c->wdata = NULL;
		c->wlen = c->woff = 0;
		if (!c->closing)
			conn_close(c);
		return;
	}
	c->srv->stats->bytes_out += n;
	free(c->wdata);
	c->wdata = NULL;
	c->wlen = c->woff = 0;
	if (c->closing)
		return;
	conn_flush(c);
	update_pause(c);
	conn_check_done(c);
}

static void on_stream_written(uv_write_t *req, int status)
{
	conn *c = req->data;

	write_done(c, status, c->wlen - c->woff);
	conn_unref(c);
}

static void file_write_next(conn *c);

static void on_file_written(uv_fs_t *req)
{
	conn *c = req->data;
	ssize_t n = req->result;

	uv_fs_req_cleanup(req);
	if (n >= 0 && !c->closing && c->woff + (size_t)n < c->wlen) {
		/* A short write: send the rest. */
		c->woff += (size_t)n;
		c->srv->stats->bytes_out += (size_t)n;
		c->refs--;
		file_write_next(c);
		return;
	}
	write_done(c, n < 0 ? (int)n : 0, n < 0 ? 0 : (size_t)n);
	conn_unref(c);
}

static void file_write_next(conn *c)
{
	uv_buf_t b = uv_buf_init(c->wdata + c->woff,
				 (unsigned)(c->wlen - c->woff > 0x40000000
						? 0x40000000
						: c->wlen - c->woff));
	int rc;

	c->out_req.data = c;
	c->refs++;
	c->writing = 1;
	rc = uv_fs_write(c->srv->loop, &c->out_req, c->out_fd, &b, 1, -1,
			 on_file_written);
	if (rc < 0) {
		c->refs--;
		write_done(c, rc, 0);
	}
}

static void conn_flush(conn *c)
{
	int rc;

	if (c->writing || !c->pending.len || c->closing)
		return;
	c->wdata = proto_buf_take(&c->pending, &c->wlen);
	c->woff = 0;
	if (c->out_kind == IO_FILE) {
		file_write_next(c);
		return;
	}
	uv_buf_t b = uv_buf_init(c->wdata, (unsigned)c->wlen);
	c->wreq.data = c;
	c->refs++;
	c->writing = 1;
	rc = uv_write(&c->wreq, c->out_stream, &b, 1, on_stream_written);
	if (rc < 0) {
		c->refs--;
		write_done(c, rc, 0);
	}
}

/* ---- dispatch ----------------------------------------------------------- */

static void on_work(uv_work_t *w)
{
	conn *c = w->data;
	c->work_rc = rw_proto_handle(c->session, c->work_line, c->work_len,
				     &c->work_out);
}

static void on_work_done(uv_work_t *w, int status)
{
	conn *c = w->data;

	(void)status;
	free(c->work_line);
	c->work_line = NULL;
	c->busy = 0;
	if (!c->closing) {
		if (c->work_out.oom)
			proto_error_line(c->srv->ctx, &c->pending,
					 -32603, NULL,
					 "out of memory building the response");
		else if (!c->pending.len) {
			proto_buf tmp = c->pending;
			c->pending = c->work_out;
			c->work_out = tmp;
		} else {
			proto_buf_append(&c->pending, c->work_out.data,
					 c->work_out.len);
		}
		proto_buf_free(&c->work_out);
		conn_flush(c);
		update_pause(c);
		conn_schedule(c);
		conn_check_done(c);
	}
	conn_unref(c);
}

/* Runs one line on the loop or hands it to the thread pool. */
static void dispatch_line(conn *c, const char *line, size_t len)
{
	srv *s = c->srv;

	if (s->cfg->offload_bytes && len >= s->cfg->offload_bytes) {
		c->work_line = malloc(len ? len : 1);
		if (c->work_line) {
			memcpy(c->work_line, line, len);
			c->work_len = len;
			c->work.data = c;
			proto_buf_init(&c->work_out);
			c->busy = 1;
			c->refs++;
			if (uv_queue_work(s->loop, &c->work, on_work,
					  on_work_done) == 0)
				return;
			c->busy = 0;
			c->refs--;
			free(c->work_line);
			c->work_line = NULL;
		}
	}
	if (rw_proto_handle(c->session, line, len, &c->pending)) {
		c->pending.oom = 0;
		proto_error_line(s->ctx, &c->pending, -32603, NULL,
				 "out of memory building the response");
	}
}

static void oversize(conn *c)
{
	char why[160];

	c->srv->stats->lines_oversized++;
	snprintf(why, sizeof why,
		 "line longer than the limit of %zu bytes; skipped up to its "
		 "newline",
		 c->srv->cfg->limits.max_line);
	proto_error_line(c->srv->ctx, &c->pending, -32600, NULL, why);
}

/* Dispatches up to `budget` lines. Returns 1 when more may be ready. */
static int conn_dispatch(conn *c, int budget)
{
	const char *line;
	size_t len;

	while (budget-- > 0 && !c->busy && !c->paused && !c->closing) {
		srv_line_status st = srv_lines_next(&c->lines, &line, &len);
		if (st == SRV_LINE_NONE && c->eof)
			st = srv_lines_tail(&c->lines, &line, &len);
		if (st == SRV_LINE_NONE)
			break;
		if (st == SRV_LINE_OVERSIZE)
			oversize(c);
		else
			dispatch_line(c, line, len);
		update_pause(c);
	}
	conn_flush(c);
	update_pause(c);
	conn_check_done(c);
	return !c->closing && !c->busy && !c->paused &&
	       srv_lines_buffered(&c->lines) > 0;
}

static void on_idle(uv_idle_t *h)
{
	srv *s = h->data;
	conn *c, *last = s->ready_tail;

	/* One pass over the connections that were ready at the start. */
	while ((c = s->ready_head)) {
		s->ready_head = c->ready_next;
		if (!s->ready_head)
			s->ready_tail = NULL;
		c->ready_next = NULL;
		c->in_ready = 0;
		if (conn_dispatch(c, s->cfg->lines_per_turn))
			conn_schedule(c);
		if (c == last)
			break;
	}
	if (!s->ready_head && s->idle_active) {
		uv_idle_stop(&s->idle);
		s->idle_active = 0;
	}
}

static void conn_schedule(conn *c)
{
	srv *s = c->srv;

	if (c->in_ready || c->closing || c->busy || c->paused)
		return;
	if (!srv_lines_buffered(&c->lines) && !c->eof)
		return;
	c->in_ready = 1;
	c->ready_next = NULL;
	if (s->ready_tail)
		s->ready_tail->ready_next = c;
	else
		s->ready_head = c;
	s->ready_tail = c;
	if (!s->idle_active) {
		uv_idle_start(&s->idle, on_idle);
		s->idle_active = 1;
	}
}

/* ---- stdio -------------------------------------------------------------- */

static int open_side(srv *s, conn *c, int fd, int readable, any_handle *h,
		     enum io_kind *kind, uv_file *file)
{
	uv_handle_type t = uv_guess_handle(fd);
	int rc;

	switch (t) {
	case UV_TTY:
		rc = uv_tty_init(s->loop, &h->tty, fd, readable);
		break;
	case UV_NAMED_PIPE:
		rc = uv_pipe_init(s->loop, &h->pipe, 0);
		if (rc == 0 && (rc = uv_pipe_open(&h->pipe, fd)) < 0)
			uv_close(&h->h, NULL);
		break;
	case UV_TCP:
		rc = uv_tcp_init(s->loop, &h->tcp);
		if (rc == 0 && (rc = uv_tcp_open(&h->tcp, fd)) < 0)
			uv_close(&h->h, NULL);
		break;
	case UV_FILE:
		*kind = IO_FILE;
		*file = fd;
		return 0;
	default:
		srv_log("error", "fd %d: unsupported kind of file", fd);
		return -1;
	}
	if (rc < 0) {
		srv_log("error", "fd %d: %s", fd, uv_strerror(rc));
		return -1;
	}
	h->h.data = c;
	*kind = IO_STREAM;
	c->refs++;
	return 0;
}

static int start_stdio(srv *s)
{
	conn *c = conn_new(s, "stdio");

	if (!c)
		return -1;
	c->refs = 1;
	if (open_side(s, c, 0, 1, &c->in, &c->in_kind, &c->in_fd) < 0)
		goto fail;
	c->in_open = c->in_kind == IO_STREAM;
	if (c->in_kind == IO_FILE &&
	    !(c->in_buf = malloc(READ_CHUNK)))
		goto fail;
	if (open_side(s, c, 1, 0, &c->outh, &c->out_kind, &c->out_fd) < 0)
		goto fail;
	c->out_open = c->out_kind == IO_STREAM;
	c->out_stream = &c->outh.s;
	read_start(c);
	return 0;
fail:
	conn_close(c);
	return -1;
}

/* ---- Unix socket -------------------------------------------------------- */

static void on_connection(uv_stream_t *server, int status)
{
	srv *s = server->data;
	conn *c;
	int rc;

	if (status < 0) {
		srv_log("warning", "accept: %s", uv_strerror(status));
		return;
	}
	c = conn_new(s, "unix");
	if (!c) {
		srv_log("error", "accept: out of memory");
		return;
	}
	c->refs = 1;
	uv_pipe_init(s->loop, &c->in.pipe, 0);
	c->in.h.data = c;
	c->refs++;
	c->in_open = 1;
	c->in_kind = IO_STREAM;
	c->out_kind = IO_STREAM;
	c->out_stream = &c->in.s;
	rc = uv_accept(server, &c->in.s);
	if (rc < 0) {
		srv_log("warning", "accept: %s", uv_strerror(rc));
		conn_close(c);
		return;
	}
	if (s->stats->connections_open > s->cfg->limits.max_conns) {
		s->stats->connections_refused++;
		srv_log("warning", "%s: refused, %zu connections open (limit)",
			c->name, s->cfg->limits.max_conns);
		proto_error_line(s->ctx, &c->pending, -32000, NULL,
				 "server busy: too many connections; retry "
				 "later");
		c->eof = 1;
		conn_flush(c);
		return;
	}
	read_start(c);
}

/* Reclaims a stale socket file at path: only when it is a socket and
 * connecting to it is refused. Returns 0 when the path is free. */
static int reclaim_stale(const char *path)
{
	struct sockaddr_un sa;
	struct stat st;
	int fd, rc, err;

	if (lstat(path, &st) < 0)
		return errno == ENOENT ? 0 : (srv_log("error", "%s: %s", path,
						      strerror(errno)),
					      -1);
	if (!S_ISSOCK(st.st_mode)) {
		srv_log("error",
			"%s exists and is not a socket; refusing to touch it",
			path);
		return -1;
	}
	memset(&sa, 0, sizeof sa);
	sa.sun_family = AF_UNIX;
	if (strlen(path) >= sizeof sa.sun_path) {
		srv_log("error", "%s: socket path too long", path);
		return -1;
	}
	memcpy(sa.sun_path, path, strlen(path) + 1);
	fd = socket(AF_UNIX, SOCK_STREAM, 0);
	if (fd < 0) {
		srv_log("error", "socket: %s", strerror(errno));
		return -1;
	}
	rc = connect(fd, (struct sockaddr *)&sa, sizeof sa);
	err = errno;
	close(fd);
	if (rc == 0) {
		srv_log("error",
			"another daemon is already listening on %s; stop it or "
			"choose another --socket",
			path);
		return -1;
	}
	if (err != ECONNREFUSED) {
		srv_log("error", "%s: cannot probe the existing socket: %s",
			path, strerror(err));
		return -1;
	}
	if (unlink(path) < 0) {
		srv_log("error", "%s: cannot remove stale socket: %s", path,
			strerror(errno));
		return -1;
	}
	srv_log("info", "removed stale socket %s", path);
	return 0;
}

static int start_unix(srv *s, const char *path, unsigned mode)
{
	struct stat st;
	mode_t old;
	int rc;

	if (reclaim_stale(path) < 0)
		return -1;
	uv_pipe_init(s->loop, &s->listener, 0);
	s->listener.data = s;
	/* The socket is created with the final mode: umask around bind, so
	 * it is never briefly wider than asked. */
	old = umask((mode_t)(~mode & 0777));
	rc = uv_pipe_bind(&s->listener, path);
	umask(old);
	if (rc < 0) {
		srv_log("error", "bind %s: %s", path, uv_strerror(rc));
		uv_close((uv_handle_t *)&s->listener, NULL);
		return -1;
	}
	if (lstat(path, &st) == 0) {
		s->sock_dev = st.st_dev;
		s->sock_ino = st.st_ino;
	}
	s->sock_path = strdup(path);
	rc = uv_listen((uv_stream_t *)&s->listener, 128, on_connection);
	if (rc < 0) {
		srv_log("error", "listen %s: %s", path, uv_strerror(rc));
		uv_close((uv_handle_t *)&s->listener, NULL);
		return -1;
	}
	s->listening = 1;
	snprintf(s->transport, sizeof s->transport, "unix:%s", path);
	s->stats->transport = s->transport;
	srv_log("info", "listening on %s (mode %04o)", path, mode);
	return 0;
}

static void remove_socket(srv *s)
{
	struct stat st;

	if (!s->sock_path)
		return;
	/* Remove only the socket we created, not one that replaced it. */
	if (lstat(s->sock_path, &st) == 0 && st.st_dev == s->sock_dev &&
	    st.st_ino == s->sock_ino)
		unlink(s->sock_path);
	free(s->sock_path);
	s->sock_path = NULL;
}

/* ---- shutdown ----------------------------------------------------------- */

static void close_if_open(uv_handle_t *h)
{
	if (!uv_is_closing(h))
		uv_close(h, NULL);
}

static void srv_maybe_finish(srv *s)
{
	if (!s->stopping && !(s->cfg->use_stdio && !s->listening))
		return;
	if (s->conns)
		return;
	/* Nothing left: close our own handles; the loop then ends. */
	close_if_open((uv_handle_t *)&s->sig_int);
	close_if_open((uv_handle_t *)&s->sig_term);
	close_if_open((uv_handle_t *)&s->sig_hup);
	close_if_open((uv_handle_t *)&s->idle);
	close_if_open((uv_handle_t *)&s->drain_timer);
}

static void on_drain_timeout(uv_timer_t *t)
{
	srv *s = t->data;
	conn *c, *next;

	srv_log("warning", "drain timeout: closing remaining connections");
	for (c = s->conns; c; c = next) {
		next = c->next;
		conn_close(c);
	}
}

static void srv_stop(srv *s, const char *why)
{
	conn *c, *next;

	if (s->stopping)
		return;
	s->stopping = 1;
	srv_log("info", "%s: stopping; answering what was already read", why);
	if (s->listening) {
		s->listening = 0;
		uv_close((uv_handle_t *)&s->listener, NULL);
	}
	remove_socket(s);
	/* Stop reading everywhere; lines already buffered are still
	 * answered (a partial last line without '\n' is not a request). */
	for (c = s->conns; c; c = next) {
		next = c->next;
		read_stop(c);
		if (c->in_kind == IO_FILE)
			c->reading = 0;
		c->eof = 1;
		conn_schedule(c);
		conn_check_done(c);
	}
	uv_timer_start(&s->drain_timer, on_drain_timeout,
		       (uint64_t)(s->cfg->drain_timeout_s * 1000), 0);
	srv_maybe_finish(s);
}

static void on_signal(uv_signal_t *h, int signum)
{
	srv *s = h->data;

	if (signum == SIGHUP) {
		srv_log("info", "SIGHUP: logs go to stderr; nothing to reopen");
		return;
	}
	srv_stop(s, signum == SIGINT ? "SIGINT" : "SIGTERM");
}

int srv_run(const srv_config *cfg)
{
	srv *s;
	int rc = SRV_EXIT_OK;

	signal(SIGPIPE, SIG_IGN);
	s = calloc(1, sizeof *s);
	if (!s)
		return SRV_EXIT_RUNTIME;
	s->cfg = cfg;
	s->loop = uv_default_loop();
	s->ctx = proto_ctx_new(&cfg->limits);
	if (!s->ctx) {
		free(s);
		return SRV_EXIT_RUNTIME;
	}
	s->stats = proto_ctx_server_stats(s->ctx);
	uv_idle_init(s->loop, &s->idle);
	s->idle.data = s;
	uv_timer_init(s->loop, &s->drain_timer);
	s->drain_timer.data = s;
	uv_unref((uv_handle_t *)&s->drain_timer);
	uv_signal_init(s->loop, &s->sig_int);
	uv_signal_init(s->loop, &s->sig_term);
	uv_signal_init(s->loop, &s->sig_hup);
	s->sig_int.data = s->sig_term.data = s->sig_hup.data = s;
	uv_signal_start(&s->sig_int, on_signal, SIGINT);
	uv_signal_start(&s->sig_term, on_signal, SIGTERM);
	uv_signal_start(&s->sig_hup, on_signal, SIGHUP);

	if (cfg->use_stdio) {
		s->stats->transport = "stdio";
		if (start_stdio(s) < 0)
			rc = SRV_EXIT_RUNTIME;
	} else if (start_unix(s, cfg->socket_path, cfg->socket_mode) < 0) {
		rc = SRV_EXIT_LISTEN;
	}
	if (rc != SRV_EXIT_OK) {
		s->stopping = 1;
		for (conn *c = s->conns, *n; c; c = n) {
			n = c->next;
			conn_close(c);
		}
		srv_maybe_finish(s);
	} else {
		srv_maybe_finish(s);
	}
	uv_run(s->loop, UV_RUN_DEFAULT);
	remove_socket(s);
	if (uv_loop_close(s->loop) != 0)
		srv_log("warning", "loop closed with handles still open");
	uv_tty_reset_mode();
	proto_ctx_free(s->ctx);
	free(s);
	return rc;
}
