/* The libuv server: listeners, connections, line dispatch, ordered writes
 * with backpressure and bounds, the thread-pool path for heavy lines, and
 * shutdown.
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
 * (`refs`), never inside its own callback chain: whoever runs code on a
 * connection after something that may close it holds a reference.
 *
 * At shutdown, bytes the kernel already holds are taken in once and
 * answered, since they were sent before the stop.
 *
 * Memory bounds (protocol-docs/limits.md): a connection stops being read
 * while more than the high-water mark of its answers waits unsent, or
 * while more than the high-water mark of its input is buffered with a
 * complete line among it; past the hard bound it must keep its answers
 * moving or it is closed as slow; and all connections stop being read
 * while the bytes buffered over all of them pass the global budget. */
#define _GNU_SOURCE /* POLLRDHUP */
#include <arpa/inet.h>
#include <errno.h>
#include <fcntl.h>
#include <netdb.h>
#include <netinet/in.h>
#include <poll.h>
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
#include "server/sd.h"
#include "server/srv.h"

#define READ_CHUNK     65536
#define TICK_MS        250         /* idle and slow-reader checks */
#define STALL_PROGRESS (64u << 10) /* bytes that count as progress */

typedef struct srv srv;
typedef struct conn conn;

enum io_kind { IO_NONE, IO_STREAM, IO_FILE };
enum lst_kind { LST_UNIX, LST_TCP };

typedef union any_handle {
	uv_handle_t h;
	uv_stream_t s;
	uv_pipe_t pipe;
	uv_tty_t tty;
	uv_tcp_t tcp;
} any_handle;

struct conn {
	srv *srv;
	conn *prev, *next; /* all connections */
	conn *ready_next;  /* ready list */
	int in_ready;

	enum io_kind in_kind;
	any_handle in;
	int in_open;
	uv_file in_fd;
	int64_t in_off;
	uv_fs_t in_req;
	int in_inflight; /* a file read is in flight */
	char *in_buf;    /* file input buffer */

	enum io_kind out_kind;
	any_handle outh; /* stdout handle when separate */
	uv_stream_t *out_stream;
	int out_open;
	uv_file out_fd;
	uv_fs_t out_req;
	uv_write_t wreq;

	proto_buf pending; /* responses not yet handed to a write */
	char *wdata;       /* the write in flight */
	size_t wlen, woff;
	int writing;
	uint64_t out_handed; /* bytes handed to stream writes */
	uint64_t out_done;   /* bytes known written */

	srv_lines lines;
	proto_session *session;

	int is_socket;   /* accepted from a listener (not stdio) */
	int reading;     /* input is being read */
	int eof;         /* no more input will come */
	int drop_tail;   /* at eof, a line without '\n' is dropped */
	int paused;      /* unsent output above the high-water mark */
	int in_full;     /* buffered input above the high-water mark */
	int budget_wait; /* reads wait for the global budget */
	int peer_done;   /* the peer stopped sending: exempt */
	int closing;
	int busy; /* a line is in the thread pool */
	int refs;

	size_t acct;         /* bytes counted in stats->buffered_bytes */
	uint64_t active_ms;  /* last byte in or out */
	uint64_t stall_ms;   /* start of the current progress window */
	uint64_t stall_mark; /* out_sent at stall_ms */
	uint64_t seen_sent;  /* out_sent at the last tick */

	uv_work_t work;
	char *work_line;
	size_t work_len;
	proto_buf work_out;
	int work_rc;

	char name[80];
};

typedef struct srv_listener {
	srv *srv;
	any_handle h;
	enum lst_kind kind;
	int open;
	int activated; /* passed in by the service manager */
	char *path;    /* Unix path we created, to remove */
	dev_t dev;
	ino_t ino;
	char name[128];
} srv_listener;

struct srv {
	uv_loop_t *loop;
	const srv_config *cfg;
	proto_ctx *ctx;
	proto_server_stats *stats;
	conn *conns;
	conn *ready_head, *ready_tail;
	uv_idle_t idle;
	int idle_active;
	srv_listener lst[SRV_MAX_LISTEN];
	int n_lst;
	int listening;
	uv_signal_t sig_int, sig_term, sig_hup;
	uv_timer_t drain_timer;
	uv_timer_t tick;
	srv_notify notify;
	int stop_notified;
	int stopping;
	int over_budget;
	int exit_code;
	unsigned long next_id;
	char read_buf[READ_CHUNK];
	char transport[320];
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

int srv_log_open(const char *path)
{
	int fd = open(path, O_WRONLY | O_APPEND | O_CREAT | O_CLOEXEC, 0600);
	int err;

	if (fd < 0)
		return -1;
	if (fd != STDERR_FILENO && dup2(fd, STDERR_FILENO) < 0) {
		err = errno;
		close(fd);
		errno = err;
		return -1;
	}
	if (fd != STDERR_FILENO)
		close(fd);
	return 0;
}

/* ---- configuration ------------------------------------------------------ */

void srv_config_default(srv_config *cfg)
{
	memset(cfg, 0, sizeof *cfg);
	cfg->socket_mode = 0600;
	cfg->lines_per_turn = 20;
	cfg->offload_bytes = 256 * 1024;
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

/* ---- accounting --------------------------------------------------------- */

static void srv_maybe_finish(srv *s);
static void conn_schedule(conn *c);
static void conn_flush(conn *c);
static void conn_close(conn *c);
static void conn_update_read(conn *c);

static size_t conn_unsent(const conn *c)
{
	return c->pending.len + (c->wlen - c->woff);
}

/* Bytes written to the peer so far, including progress inside a stream
 * write that libuv is still working through. */
static uint64_t conn_sent(const conn *c)
{
	if (c->writing && c->out_kind == IO_STREAM && !c->closing)
		return c->out_handed -
		       uv_stream_get_write_queue_size(c->out_stream);
	return c->out_done;
}

/* Global budget: past it every connection stops reading; reading resumes
 * below three quarters of it. */
static void budget_check(srv *s)
{
	size_t budget = s->cfg->limits.global_budget;
	uint64_t now = s->stats->buffered_bytes;
	conn *c;

	if (!budget)
		return;
	if (!s->over_budget && now > budget) {
		s->over_budget = 1;
		srv_log("warning",
		        "%llu bytes buffered over all connections, past the "
		        "budget of %zu: reads wait",
		        (unsigned long long)now, budget);
		for (c = s->conns; c; c = c->next) {
			c->budget_wait = !c->peer_done;
			conn_update_read(c);
		}
	} else if (s->over_budget && now <= budget / 4 * 3) {
		s->over_budget = 0;
		srv_log("info", "buffered bytes back under the budget");
		for (c = s->conns; c; c = c->next) {
			c->budget_wait = 0;
			conn_update_read(c);
		}
	}
}

/* Brings this connection's share of buffered_bytes up to date. */
static void conn_account(conn *c)
{
	srv *s = c->srv;
	size_t now = c->closing ? 0
	                        : srv_lines_buffered(&c->lines) +
	                              conn_unsent(c) + c->work_len;

	s->stats->buffered_bytes += now;
	s->stats->buffered_bytes -= c->acct;
	c->acct = now;
	budget_check(s);
}

/* ---- connection lifetime ------------------------------------------------ */

static void conn_unref(conn *c)
{
	srv *s = c->srv;

	if (--c->refs > 0)
		return;
	/* Last reference: unlink and free. */
	s->stats->buffered_bytes -= c->acct;
	c->acct = 0;
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
	budget_check(s);
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
	c->budget_wait = s->over_budget;
	c->active_ms = c->stall_ms = uv_now(s->loop);
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

/* Closes the connection. It may be freed before this returns unless the
 * caller holds a reference. */
static void conn_close(conn *c)
{
	if (c->closing)
		return;
	c->closing = 1;
	ready_remove(c);
	conn_account(c);
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

static void on_eof(conn *c);
static void file_read_next(conn *c);
static void on_alloc(uv_handle_t *h, size_t suggested, uv_buf_t *buf);
static void on_read(uv_stream_t *st, ssize_t nread, const uv_buf_t *buf);

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

/* Reads while nothing holds the connection back: its own unsent output,
 * its own buffered input, or the global budget. */
static void conn_update_read(conn *c)
{
	size_t high = c->srv->cfg->limits.out_high_water;

	c->in_full = high && srv_lines_buffered(&c->lines) > high &&
	             srv_lines_has_line(&c->lines);
	if (c->paused || c->in_full || c->budget_wait)
		read_stop(c);
	else
		read_start(c);
}

static void conn_feed(conn *c, const char *data, size_t n)
{
	c->srv->stats->bytes_in += n;
	c->active_ms = uv_now(c->srv->loop);
	if (srv_lines_append(&c->lines, data, n)) {
		srv_log("error", "%s: out of memory buffering input; closing",
		        c->name);
		conn_close(c);
		return;
	}
	conn_account(c);
	conn_update_read(c);
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

static void on_file_read(uv_fs_t *req)
{
	conn *c = req->data;
	ssize_t n = req->result;

	uv_fs_req_cleanup(req);
	c->in_inflight = 0;
	if (!c->closing) {
		if (n > 0) {
			c->in_off += n;
			conn_feed(c, c->in_buf, (size_t)n);
			if (!c->closing && c->reading)
				file_read_next(c);
		} else {
			if (n < 0)
				srv_log("warning", "%s: read: %s", c->name,
				        uv_strerror((int)n));
			on_eof(c);
		}
	}
	conn_unref(c); /* the request's */
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

/* ---- writing ------------------------------------------------------------ */

static void update_pause(conn *c)
{
	size_t unsent = conn_unsent(c);
	size_t high = c->srv->cfg->limits.out_high_water;

	conn_account(c);
	if (!c->paused && unsent > high) {
		c->paused = 1;
		c->srv->stats->reads_paused++;
		conn_update_read(c);
	} else if (c->paused && unsent <= high / 2) {
		c->paused = 0;
		conn_update_read(c);
		conn_schedule(c);
	}
}

/* At shutdown: takes what the kernel already holds for this connection,
 * without waiting, so that requests sent before the stop but not yet read
 * (reads may have been paused) are answered too (keep = 1), or drops it
 * just before closing so the peer is not reset with answers unread
 * (keep = 0). Bounded by the socket buffer and by `rounds` reads. */
static void drain_kernel(conn *c, int keep)
{
	uv_os_fd_t fd;
	ssize_t n;

	if (c->in_kind != IO_STREAM || !c->in_open ||
	    (c->in.h.type != UV_NAMED_PIPE && c->in.h.type != UV_TCP) ||
	    uv_fileno(&c->in.h, &fd) < 0)
		return;
	for (int rounds = 0; rounds < 1024; rounds++) {
		n = read(fd, c->srv->read_buf, READ_CHUNK);
		if (n <= 0)
			break;
		if (!keep)
			continue;
		c->srv->stats->bytes_in += (size_t)n;
		if (srv_lines_append(&c->lines, c->srv->read_buf, (size_t)n))
			break;
	}
	if (keep)
		conn_account(c);
}

static void conn_check_done(conn *c)
{
	if (c->closing || !c->eof || c->busy || c->writing || c->pending.len ||
	    srv_lines_buffered(&c->lines))
		return;
	if (c->srv->stopping)
		drain_kernel(c, 0);
	conn_close(c);
}

/* A write finished: status < 0 is an error, else `n` bytes went out.
 * The caller holds a reference. */
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
	c->out_done += n;
	free(c->wdata);
	c->wdata = NULL;
	c->wlen = c->woff = 0;
	if (c->closing)
		return;
	c->active_ms = uv_now(c->srv->loop);
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
		c->out_done += (size_t)n;
		c->srv->stats->bytes_out += (size_t)n;
		file_write_next(c);
		conn_unref(c);
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
	c->out_handed += c->wlen;
	rc = uv_write(&c->wreq, c->out_stream, &b, 1, on_stream_written);
	if (rc < 0) {
		c->refs--;
		c->out_handed -= c->wlen;
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
	c->work_len = 0;
	c->busy = 0;
	if (!c->closing) {
		if (c->work_out.oom)
			proto_error_line(c->srv->ctx, &c->pending,
			                 PROTO_INTERNAL_ERROR, NULL,
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
		conn_update_read(c);
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
			c->work_len = 0;
		}
	}
	if (rw_proto_handle(c->session, line, len, &c->pending)) {
		c->pending.oom = 0;
		proto_error_line(s->ctx, &c->pending, PROTO_INTERNAL_ERROR,
		                 NULL, "out of memory building the response");
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
	proto_error_line(c->srv->ctx, &c->pending, PROTO_INVALID_REQUEST, NULL,
	                 why);
}

/* Dispatches up to `budget` lines. Returns 1 when more may be ready. The
 * caller holds a reference. */
static int conn_dispatch(conn *c, int budget)
{
	const char *line;
	size_t len;

	while (budget-- > 0 && !c->busy && !c->paused && !c->closing) {
		srv_line_status st = srv_lines_next(&c->lines, &line, &len);
		if (st == SRV_LINE_NONE && c->eof) {
			st = srv_lines_tail(&c->lines, &line, &len);
			if (st != SRV_LINE_NONE && c->drop_tail) {
				/* Shutdown cut this line short: it is not a
				 * request, so it is not answered. */
				srv_log("info",
				        "%s: dropped %zu bytes of an "
				        "unfinished line at shutdown",
				        c->name, len);
				break;
			}
		}
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
	if (!c->closing)
		conn_update_read(c);
	conn_check_done(c);
	return !c->closing && !c->busy && !c->paused &&
	       srv_lines_buffered(&c->lines) > 0;
}

static void on_idle(uv_idle_t *h)
{
	srv *s = h->data;
	conn *c, *last = s->ready_tail;
	int done = 0;

	/* One pass over the connections that were ready at the start. */
	while (!done && (c = s->ready_head)) {
		s->ready_head = c->ready_next;
		if (!s->ready_head)
			s->ready_tail = NULL;
		c->ready_next = NULL;
		c->in_ready = 0;
		done = c == last;
		c->refs++;
		if (conn_dispatch(c, s->cfg->lines_per_turn))
			conn_schedule(c);
		conn_unref(c);
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
	if (!s->idle_active && !uv_is_closing((uv_handle_t *)&s->idle)) {
		uv_idle_start(&s->idle, on_idle);
		s->idle_active = 1;
	}
}

/* ---- idle and slow connections ------------------------------------------ */

/* The slow-reader rule (protocol-docs/limits.md): a socket connection
 * holding more than the hard bound of unsent output, or any paused one
 * while the global budget is exhausted, must get at least STALL_PROGRESS
 * bytes out per stall window, else it is closed. A client that reads a
 * huge answer keeps it alive however large that answer is. */
static void conn_tick(conn *c, uint64_t now)
{
	const srv_config *cfg = c->srv->cfg;
	uint64_t sent = conn_sent(c);
	size_t unsent = conn_unsent(c);
	size_t hard = cfg->limits.out_hard_limit;
	uint64_t stall = (uint64_t)(cfg->limits.stall_timeout_s * 1000);
	uint64_t idle = (uint64_t)(cfg->limits.idle_timeout_s * 1000);
	int held =
	    (hard && unsent > hard) || (c->srv->over_budget && c->paused);

	if (sent != c->seen_sent) {
		c->seen_sent = sent;
		c->active_ms = now;
	}
	if (!held || sent - c->stall_mark >= STALL_PROGRESS) {
		c->stall_ms = now;
		c->stall_mark = sent;
	} else if (now - c->stall_ms >= stall) {
		c->srv->stats->connections_closed_slow++;
		srv_log("warning",
		        "%s: closed as slow: %zu bytes of answers unsent and "
		        "under %u bytes taken in %.1f s",
		        c->name, unsent, STALL_PROGRESS,
		        cfg->limits.stall_timeout_s);
		conn_close(c);
		return;
	}
	if (idle && !c->busy && now - c->active_ms >= idle) {
		srv_log("info", "%s: closed after %.1f s idle", c->name,
		        cfg->limits.idle_timeout_s);
		c->srv->stats->connections_closed_idle++;
		conn_close(c);
	}
}

/* A connection whose reads wait for the budget cannot see its peer go
 * away, and its buffered bytes are what hold the budget: when the peer
 * has stopped sending (closed, or shut down its side), it is read again.
 * What is left to read is bounded by the kernel's socket buffer. */
static void conn_peek_hangup(conn *c)
{
	struct pollfd pf;
	uv_os_fd_t fd;

	if (!c->budget_wait || c->in_kind != IO_STREAM || !c->in_open ||
	    uv_fileno(&c->in.h, &fd) < 0)
		return;
	pf.fd = fd;
	pf.events = POLLIN;
#ifdef POLLRDHUP
	pf.events |= POLLRDHUP;
	if (poll(&pf, 1, 0) == 1 &&
	    (pf.revents & (POLLHUP | POLLERR | POLLRDHUP))) {
#else
	if (poll(&pf, 1, 0) == 1 && (pf.revents & (POLLHUP | POLLERR))) {
#endif
		c->peer_done = 1;
		c->budget_wait = 0;
		conn_update_read(c);
	}
}

static void on_tick(uv_timer_t *t)
{
	srv *s = t->data;
	uint64_t now = uv_now(s->loop);
	conn *c, *next;

	for (c = s->conns; c; c = next) {
		next = c->next;
		if (c->is_socket && !c->closing) {
			c->refs++;
			conn_peek_hangup(c);
			if (!c->closing)
				conn_tick(c, now);
			next = c->next;
			conn_unref(c);
		}
	}
}

/* ---- stdio -------------------------------------------------------------- */

static int open_side(srv *s, conn *c, int fd, int readable, any_handle *h,
                     enum io_kind *kind, uv_file *file)
{
	uv_handle_type t = uv_guess_handle(fd);
	int rc;

	switch (t) {
	case UV_TTY: rc = uv_tty_init(s->loop, &h->tty, fd, readable); break;
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
	if (c->in_kind == IO_FILE && !(c->in_buf = malloc(READ_CHUNK)))
		goto fail;
	if (open_side(s, c, 1, 0, &c->outh, &c->out_kind, &c->out_fd) < 0)
		goto fail;
	c->out_open = c->out_kind == IO_STREAM;
	c->out_stream = &c->outh.s;
	conn_update_read(c);
	return 0;
fail:
	conn_close(c);
	return -1;
}

/* ---- listeners ---------------------------------------------------------- */

static void peer_name(conn *c, enum lst_kind kind)
{
	struct sockaddr_storage ss;
	char host[INET6_ADDRSTRLEN] = "?";
	int len = sizeof ss, port = 0;
	size_t n = strlen(c->name);

	if (kind != LST_TCP ||
	    uv_tcp_getpeername(&c->in.tcp, (struct sockaddr *)&ss, &len) < 0)
		return;
	if (ss.ss_family == AF_INET) {
		struct sockaddr_in *a = (struct sockaddr_in *)&ss;
		inet_ntop(AF_INET, &a->sin_addr, host, sizeof host);
		port = ntohs(a->sin_port);
	} else if (ss.ss_family == AF_INET6) {
		struct sockaddr_in6 *a = (struct sockaddr_in6 *)&ss;
		inet_ntop(AF_INET6, &a->sin6_addr, host, sizeof host);
		port = ntohs(a->sin6_port);
	}
	snprintf(c->name + n, sizeof c->name - n, "(%s:%d)", host, port);
}

static void on_connection(uv_stream_t *server, int status)
{
	srv_listener *l = server->data;
	srv *s = l->srv;
	conn *c;
	int rc;

	if (status < 0) {
		srv_log("warning", "%s: accept: %s", l->name,
		        uv_strerror(status));
		return;
	}
	c = conn_new(s, l->kind == LST_TCP ? "tcp" : "unix");
	if (!c) {
		srv_log("error", "accept: out of memory");
		return;
	}
	c->refs = 1;
	c->is_socket = 1;
	if (l->kind == LST_TCP)
		uv_tcp_init(s->loop, &c->in.tcp);
	else
		uv_pipe_init(s->loop, &c->in.pipe, 0);
	c->in.h.data = c;
	c->refs++;
	c->in_open = 1;
	c->in_kind = IO_STREAM;
	c->out_kind = IO_STREAM;
	c->out_stream = &c->in.s;
	rc = uv_accept(server, &c->in.s);
	if (rc < 0) {
		srv_log("warning", "%s: accept: %s", l->name, uv_strerror(rc));
		conn_close(c);
		return;
	}
	if (l->kind == LST_TCP) {
		uv_tcp_nodelay(&c->in.tcp, 1);
		peer_name(c, l->kind);
	}
	if (s->stats->connections_open > s->cfg->limits.max_conns) {
		s->stats->connections_refused++;
		srv_log("warning", "%s: refused, %zu connections open (limit)",
		        c->name, s->cfg->limits.max_conns);
		proto_error_line(s->ctx, &c->pending, PROTO_SERVER_BUSY, NULL,
		                 "server busy: too many connections; retry "
		                 "later");
		c->eof = 1;
		conn_flush(c);
		return;
	}
	conn_update_read(c);
}

/* Reclaims a stale socket file at path: only when it is a socket and
 * connecting to it is refused. Returns 0 when the path is free. */
static int reclaim_stale(const char *path)
{
	struct sockaddr_un sa;
	struct stat st;
	int fd, rc, err;

	if (lstat(path, &st) < 0)
		return errno == ENOENT
		           ? 0
		           : (srv_log("error", "%s: %s", path, strerror(errno)),
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

static srv_listener *listener_new(srv *s, enum lst_kind kind)
{
	srv_listener *l;

	if (s->n_lst >= SRV_MAX_LISTEN) {
		srv_log("error", "more than %d listeners", SRV_MAX_LISTEN);
		return NULL;
	}
	l = &s->lst[s->n_lst];
	memset(l, 0, sizeof *l);
	l->srv = s;
	l->kind = kind;
	if (kind == LST_TCP)
		uv_tcp_init(s->loop, &l->h.tcp);
	else
		uv_pipe_init(s->loop, &l->h.pipe, 0);
	l->h.h.data = l;
	l->open = 1;
	s->n_lst++;
	return l;
}

static int listener_listen(srv_listener *l)
{
	int rc = uv_listen(&l->h.s, 128, on_connection);

	if (rc < 0) {
		srv_log("error", "listen %s: %s", l->name, uv_strerror(rc));
		return -1;
	}
	return 0;
}

static int start_unix(srv *s, const char *path, unsigned mode)
{
	srv_listener *l;
	struct stat st;
	mode_t old;
	int rc;

	if (reclaim_stale(path) < 0)
		return -1;
	if (!(l = listener_new(s, LST_UNIX)))
		return -1;
	snprintf(l->name, sizeof l->name, "unix:%s", path);
	/* The socket is created with the final mode: umask around bind, so
	 * it is never briefly wider than asked. */
	old = umask((mode_t)(~mode & 0777));
	rc = uv_pipe_bind(&l->h.pipe, path);
	umask(old);
	if (rc < 0) {
		srv_log("error", "bind %s: %s", path, uv_strerror(rc));
		return -1;
	}
	if (lstat(path, &st) == 0) {
		l->dev = st.st_dev;
		l->ino = st.st_ino;
	}
	l->path = strdup(path);
	if (listener_listen(l) < 0)
		return -1;
	srv_log("info", "listening on %s (mode %04o)", path, mode);
	return 0;
}

/* 1 when the address is loopback: 127.0.0.0/8, ::1, or ::ffff:127.x. */
static int is_loopback(const struct sockaddr *sa)
{
	if (sa->sa_family == AF_INET) {
		const struct sockaddr_in *a = (const struct sockaddr_in *)sa;
		return (ntohl(a->sin_addr.s_addr) >> 24) == 127;
	}
	if (sa->sa_family == AF_INET6) {
		const struct sockaddr_in6 *a = (const struct sockaddr_in6 *)sa;
		const unsigned char *b = a->sin6_addr.s6_addr;
		if (IN6_IS_ADDR_LOOPBACK(&a->sin6_addr))
			return 1;
		return IN6_IS_ADDR_V4MAPPED(&a->sin6_addr) && b[12] == 127;
	}
	return 0;
}

static void addr_text(const struct sockaddr *sa, char *buf, size_t size)
{
	char host[INET6_ADDRSTRLEN] = "?";

	if (sa->sa_family == AF_INET6) {
		const struct sockaddr_in6 *a = (const struct sockaddr_in6 *)sa;
		inet_ntop(AF_INET6, &a->sin6_addr, host, sizeof host);
		snprintf(buf, size, "tcp:[%s]:%d", host, ntohs(a->sin6_port));
	} else {
		const struct sockaddr_in *a = (const struct sockaddr_in *)sa;
		inet_ntop(AF_INET, &a->sin_addr, host, sizeof host);
		snprintf(buf, size, "tcp:%s:%d", host, ntohs(a->sin_port));
	}
}

static void warn_no_auth(const srv_listener *l, int loopback)
{
	if (loopback)
		srv_log("warning",
		        "%s: the protocol has no authentication: any local "
		        "user can connect to this port",
		        l->name);
	else
		srv_log("warning",
		        "%s: listening beyond loopback (--allow-remote): the "
		        "protocol has no authentication or encryption; anyone "
		        "who can reach this address can use the daemon",
		        l->name);
}

/* Parses "HOST:PORT" or "[V6]:PORT" and listens there. */
static int start_tcp(srv *s, const char *spec)
{
	char host[128];
	const char *port, *h = spec;
	size_t hl;
	struct addrinfo hints, *ai = NULL;
	struct sockaddr_storage ss;
	int len = sizeof ss, rc, loop;
	srv_listener *l;

	if (*h == '[') {
		const char *e = strchr(h, ']');
		if (!e || e[1] != ':')
			goto bad;
		hl = (size_t)(e - h - 1);
		h++;
		port = e + 2;
	} else {
		const char *e = strrchr(h, ':');
		if (!e)
			goto bad;
		hl = (size_t)(e - h);
		port = e + 1;
	}
	if (!hl || hl >= sizeof host || !*port)
		goto bad;
	memcpy(host, h, hl);
	host[hl] = '\0';
	memset(&hints, 0, sizeof hints);
	hints.ai_socktype = SOCK_STREAM;
	hints.ai_flags = AI_NUMERICSERV | AI_PASSIVE;
	if (strcmp(host, "localhost") == 0)
		snprintf(host, sizeof host, "127.0.0.1");
	hints.ai_flags |= AI_NUMERICHOST;
	if ((rc = getaddrinfo(host, port, &hints, &ai)) != 0 || !ai) {
		srv_log("error",
		        "--listen tcp:%s: not a numeric address and port (%s)",
		        spec, gai_strerror(rc));
		return -1;
	}
	loop = is_loopback(ai->ai_addr);
	if (!loop && !s->cfg->allow_remote) {
		srv_log("error",
		        "--listen tcp:%s: not a loopback address; the protocol "
		        "has no authentication, so give --allow-remote to "
		        "listen beyond this host",
		        spec);
		freeaddrinfo(ai);
		return -1;
	}
	if (!(l = listener_new(s, LST_TCP))) {
		freeaddrinfo(ai);
		return -1;
	}
	snprintf(l->name, sizeof l->name, "tcp:%s", spec);
	rc = uv_tcp_bind(&l->h.tcp, ai->ai_addr,
	                 ai->ai_family == AF_INET6 ? UV_TCP_IPV6ONLY : 0);
	freeaddrinfo(ai);
	if (rc < 0) {
		srv_log("error", "bind tcp:%s: %s", spec, uv_strerror(rc));
		return -1;
	}
	if (listener_listen(l) < 0)
		return -1;
	/* Name it by the bound address, so port 0 shows the real port. */
	if (uv_tcp_getsockname(&l->h.tcp, (struct sockaddr *)&ss, &len) == 0)
		addr_text((struct sockaddr *)&ss, l->name, sizeof l->name);
	srv_log("info", "listening on %s", l->name);
	warn_no_auth(l, loop);
	return 0;
bad:
	srv_log("error", "--listen tcp:%s: expected HOST:PORT or [V6]:PORT",
	        spec);
	return -1;
}

/* Adopts one socket passed by the service manager. */
static int start_activated(srv *s, int fd)
{
	struct sockaddr_storage ss;
	socklen_t len = sizeof ss;
	int type = 0, acc = 0, rc;
	socklen_t tl = sizeof type, al = sizeof acc;
	srv_listener *l;

	if (getsockname(fd, (struct sockaddr *)&ss, &len) < 0 ||
	    getsockopt(fd, SOL_SOCKET, SO_TYPE, &type, &tl) < 0 ||
	    getsockopt(fd, SOL_SOCKET, SO_ACCEPTCONN, &acc, &al) < 0) {
		srv_log("error", "activated fd %d: not a socket: %s", fd,
		        strerror(errno));
		return -1;
	}
	if (type != SOCK_STREAM || !acc) {
		srv_log("error",
		        "activated fd %d: not a listening stream socket", fd);
		return -1;
	}
	if (ss.ss_family == AF_UNIX) {
		struct sockaddr_un *u = (struct sockaddr_un *)&ss;
		if (!(l = listener_new(s, LST_UNIX)))
			return -1;
		if (len > offsetof(struct sockaddr_un, sun_path) &&
		    u->sun_path[0])
			snprintf(
			    l->name, sizeof l->name, "unix:%.*s",
			    (int)(len - offsetof(struct sockaddr_un, sun_path)),
			    u->sun_path);
		else
			snprintf(l->name, sizeof l->name, "unix:fd%d", fd);
		rc = uv_pipe_open(&l->h.pipe, fd);
	} else if (ss.ss_family == AF_INET || ss.ss_family == AF_INET6) {
		int loop = is_loopback((struct sockaddr *)&ss);
		if (!loop && !s->cfg->allow_remote) {
			char a[128];
			addr_text((struct sockaddr *)&ss, a, sizeof a);
			srv_log("error",
			        "activated %s: not a loopback address; give "
			        "--allow-remote to serve it",
			        a);
			return -1;
		}
		if (!(l = listener_new(s, LST_TCP)))
			return -1;
		addr_text((struct sockaddr *)&ss, l->name, sizeof l->name);
		rc = uv_tcp_open(&l->h.tcp, fd);
		if (rc == 0)
			warn_no_auth(l, loop);
	} else {
		srv_log("error", "activated fd %d: unsupported address family",
		        fd);
		return -1;
	}
	l->activated = 1;
	if (rc < 0) {
		srv_log("error", "activated %s: %s", l->name, uv_strerror(rc));
		return -1;
	}
	if (listener_listen(l) < 0)
		return -1;
	srv_log("info", "listening on %s (passed by the service manager)",
	        l->name);
	return 0;
}

static void transport_text(srv *s)
{
	size_t n = 0;

	s->transport[0] = '\0';
	for (int i = 0; i < s->n_lst && n < sizeof s->transport; i++) {
		int w = snprintf(s->transport + n, sizeof s->transport - n,
		                 "%s%s", i ? " " : "", s->lst[i].name);
		if (w < 0)
			break;
		n += (size_t)w;
	}
	s->stats->transport = s->transport;
}

static int start_listeners(srv *s)
{
	const srv_config *cfg = s->cfg;
	int fds[SRV_MAX_LISTEN], nfd, ignored;
	char path[512];

	nfd = srv__listen_fds(fds, SRV_MAX_LISTEN, &ignored);
	if (ignored)
		srv_log("warning",
		        "LISTEN_FDS/LISTEN_PID present but %s; ignored",
		        nfd ? "more sockets than supported"
		            : "not meant for this process");
	for (int i = 0; i < nfd; i++)
		if (start_activated(s, fds[i]) < 0)
			return -1;
	for (int i = 0; i < cfg->n_listen; i++) {
		const char *spec = cfg->listen[i];
		int rc;
		if (strncmp(spec, "unix:", 5) == 0)
			rc = start_unix(s, spec + 5, cfg->socket_mode);
		else if (strncmp(spec, "tcp:", 4) == 0)
			rc = start_tcp(s, spec + 4);
		else {
			srv_log("error",
			        "--listen %s: expected unix:PATH or "
			        "tcp:HOST:PORT",
			        spec);
			rc = -1;
		}
		if (rc < 0)
			return -1;
	}
	if (!nfd && !cfg->n_listen &&
	    start_unix(s, srv_default_socket_path(path, sizeof path),
	               cfg->socket_mode) < 0)
		return -1;
	s->listening = 1;
	transport_text(s);
	return 0;
}

static void close_listeners(srv *s)
{
	struct stat st;

	for (int i = 0; i < s->n_lst; i++) {
		srv_listener *l = &s->lst[i];
		if (l->open) {
			l->open = 0;
			uv_close(&l->h.h, NULL);
		}
		/* Remove only the socket we created, not one that replaced
		 * it, and never one the service manager owns. */
		if (l->path && lstat(l->path, &st) == 0 &&
		    st.st_dev == l->dev && st.st_ino == l->ino)
			unlink(l->path);
		free(l->path);
		l->path = NULL;
	}
	s->listening = 0;
}

/* ---- shutdown ----------------------------------------------------------- */

static void close_if_open(uv_handle_t *h)
{
	if (!uv_is_closing(h))
		uv_close(h, NULL);
}

static void notify_stopping(srv *s)
{
	if (s->stop_notified)
		return;
	s->stop_notified = 1;
	srv__notify_send(&s->notify, "STOPPING=1");
}

static void srv_maybe_finish(srv *s)
{
	if (!s->stopping && !(s->cfg->use_stdio && !s->listening))
		return;
	if (s->conns)
		return;
	/* Nothing left: close our own handles; the loop then ends. */
	notify_stopping(s);
	close_if_open((uv_handle_t *)&s->sig_int);
	close_if_open((uv_handle_t *)&s->sig_term);
	close_if_open((uv_handle_t *)&s->sig_hup);
	close_if_open((uv_handle_t *)&s->idle);
	close_if_open((uv_handle_t *)&s->drain_timer);
	close_if_open((uv_handle_t *)&s->tick);
}

static void close_all(srv *s)
{
	conn *c, *next;

	for (c = s->conns; c; c = next) {
		c->refs++;
		conn_close(c);
		next = c->next;
		conn_unref(c);
	}
}

static void on_drain_timeout(uv_timer_t *t)
{
	srv *s = t->data;

	srv_log("warning", "drain timeout: closing remaining connections");
	close_all(s);
}

static void srv_stop(srv *s, const char *why)
{
	conn *c, *next;

	if (s->stopping) {
		srv_log("warning", "%s again: closing remaining connections",
		        why);
		close_all(s);
		return;
	}
	s->stopping = 1;
	srv_log("info", "%s: stopping; answering what was already read", why);
	notify_stopping(s);
	close_listeners(s);
	/* Stop reading everywhere; lines already buffered are still
	 * answered (a partial last line without '\n' is not a request). */
	for (c = s->conns; c; c = next) {
		c->refs++;
		read_stop(c);
		if (!c->eof)
			drain_kernel(c, 1);
		c->eof = 1;
		c->drop_tail = 1;
		conn_schedule(c);
		conn_check_done(c);
		next = c->next;
		conn_unref(c);
	}
	uv_timer_start(&s->drain_timer, on_drain_timeout,
	               (uint64_t)(s->cfg->limits.drain_timeout_s * 1000), 0);
	srv_maybe_finish(s);
}

static void on_signal(uv_signal_t *h, int signum)
{
	srv *s = h->data;

	if (signum == SIGHUP) {
		if (!s->cfg->log_path) {
			srv_log("info", "SIGHUP: logs go to stderr; nothing to "
			                "reopen");
		} else if (srv_log_open(s->cfg->log_path) < 0) {
			srv_log("warning",
			        "SIGHUP: cannot reopen %s: %s; "
			        "logging to the old file",
			        s->cfg->log_path, strerror(errno));
		} else {
			srv_log("info", "SIGHUP: log reopened");
		}
		return;
	}
	srv_stop(s, signum == SIGINT ? "SIGINT" : "SIGTERM");
}

int srv_run(const srv_config *cfg)
{
	srv *s;
	int rc = SRV_EXIT_OK;
	char msg[400];

	signal(SIGPIPE, SIG_IGN);
	if (cfg->log_path && srv_log_open(cfg->log_path) < 0) {
		srv_log("error", "--log %s: %s", cfg->log_path,
		        strerror(errno));
		return SRV_EXIT_RUNTIME;
	}
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
	if (srv__notify_open(&s->notify) < 0)
		srv_log("warning", "NOTIFY_SOCKET unusable; not notifying");
	s->stats = proto_ctx_server_stats(s->ctx);
	uv_idle_init(s->loop, &s->idle);
	s->idle.data = s;
	uv_timer_init(s->loop, &s->drain_timer);
	s->drain_timer.data = s;
	uv_unref((uv_handle_t *)&s->drain_timer);
	uv_timer_init(s->loop, &s->tick);
	s->tick.data = s;
	uv_timer_start(&s->tick, on_tick, TICK_MS, TICK_MS);
	uv_unref((uv_handle_t *)&s->tick);
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
	} else if (start_listeners(s) < 0) {
		rc = SRV_EXIT_LISTEN;
	}
	if (rc != SRV_EXIT_OK) {
		s->stopping = 1;
		s->stop_notified = 1;
		close_listeners(s);
		close_all(s);
	} else {
		snprintf(msg, sizeof msg, "READY=1\nSTATUS=serving %s",
		         s->stats->transport);
		if (srv__notify_send(&s->notify, msg) < 0)
			srv_log("warning", "readiness notification failed: %s",
			        strerror(errno));
	}
	srv_maybe_finish(s);
	uv_run(s->loop, UV_RUN_DEFAULT);
	close_listeners(s);
	/* Listeners that failed half-way are closed above; let them go. */
	uv_run(s->loop, UV_RUN_NOWAIT);
	notify_stopping(s);
	srv__notify_close(&s->notify);
	if (uv_loop_close(s->loop) != 0)
		srv_log("warning", "loop closed with handles still open");
	uv_tty_reset_mode();
	proto_ctx_free(s->ctx);
	free(s);
	return rc;
}
