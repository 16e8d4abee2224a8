/* The read path: input from a stream (socket, pipe, terminal) or a file
 * (a regular file or character device on --stdio, read with uv_fs_read),
 * fed to the connection's line framer. Reading stops while the
 * connection's unsent answers or buffered complete lines pass the
 * high-water mark, or while the global budget is exhausted. */
#define _GNU_SOURCE /* POLLRDHUP */
#include <poll.h>
#include <stdlib.h>
#include <unistd.h>

#include "server/internal.h"

static void on_alloc(uv_handle_t *h, size_t suggested, uv_buf_t *buf);
static void on_read(uv_stream_t *st, ssize_t nread, const uv_buf_t *buf);
static void file_read_next(conn *c);

void srv__read_stop(conn *c)
{
	if (conn_has(c, CF_READING) && c->in_kind == IO_STREAM &&
	    conn_has(c, CF_IN_OPEN))
		uv_read_stop(&c->in.s);
	conn_clear(c, CF_READING);
}

/* No more input will come. */
static void on_eof(conn *c)
{
	srv__read_stop(c);
	if (!conn_closing(c))
		conn_set_state(c, CONN_EOF);
	srv__conn_schedule(c);
}

static void read_start(conn *c)
{
	if (conn_has(c, CF_READING) || conn_eof(c))
		return;
	conn_set(c, CF_READING);
	if (c->in_kind == IO_STREAM) {
		int rc = uv_read_start(&c->in.s, on_alloc, on_read);
		if (rc < 0) {
			srv_log("warning", "%s: read start: %s", c->name,
			        uv_strerror(rc));
			conn_clear(c, CF_READING);
			on_eof(c);
		}
	} else if (c->in_kind == IO_FILE) {
		file_read_next(c);
	}
}

void srv__conn_update_read(conn *c)
{
	size_t high = c->srv->cfg->limits.out_high_water;

	if (high && srv_lines_buffered(&c->lines) > high &&
	    srv_lines_has_line(&c->lines))
		conn_set(c, CF_IN_FULL);
	else
		conn_clear(c, CF_IN_FULL);
	if (conn_has(c, CF_PAUSED | CF_IN_FULL | CF_BUDGET_WAIT))
		srv__read_stop(c);
	else
		read_start(c);
}

static void conn_feed(conn *c, const char *data, size_t n)
{
	c->srv->stats->bytes_in += n;
	c->in_bytes += n;
	c->active_ms = uv_now(c->srv->loop);
	if (srv_lines_append(&c->lines, data, n)) {
		srv_log("error", "%s: out of memory buffering input; closing",
		        c->name);
		srv__conn_close(c);
		return;
	}
	srv__conn_account(c);
	srv__conn_update_read(c);
	srv__conn_schedule(c);
}

static void on_alloc(uv_handle_t *h, size_t suggested, uv_buf_t *buf)
{
	conn *c = h->data;
	(void)suggested;
	buf->base = c->srv->read_buf;
	buf->len = sizeof c->srv->read_buf;
}

static void on_read(uv_stream_t *st, ssize_t nread, const uv_buf_t *buf)
{
	conn *c = st->data;

	if (conn_closing(c))
		return;
	if (conn_has(c, CF_LINGER)) {
		if (nread < 0) /* the peer closed: done */
			srv__conn_close(c);
		return;
	}
	if (nread > 0) {
		conn_feed(c, buf->base, (size_t)nread);
	} else if (nread == UV_EOF) {
		on_eof(c);
	} else if (nread < 0) {
		if (c->kind == CONN_STDIO) {
			srv_log("error", "stdin: read failed: %s",
			        uv_strerror((int)nread));
			c->srv->exit_code = SRV_EXIT_RUNTIME;
		} else if (nread != UV_ECONNRESET) {
			srv_log("warning", "%s: read: %s", c->name,
			        uv_strerror((int)nread));
		}
		/* The peer is gone: nobody is left to answer. */
		srv__conn_close(c);
	}
}

static void on_file_read(uv_fs_t *req)
{
	conn *c = req->data;
	ssize_t n = req->result;

	uv_fs_req_cleanup(req);
	conn_clear(c, CF_FILE_READ);
	if (!conn_closing(c)) {
		if (n > 0) {
			c->in_off += n;
			conn_feed(c, c->in_buf, (size_t)n);
			if (!conn_closing(c) && conn_has(c, CF_READING))
				file_read_next(c);
		} else {
			if (n < 0) {
				srv_log("error", "stdin: read failed: %s",
				        uv_strerror((int)n));
				c->srv->exit_code = SRV_EXIT_RUNTIME;
			}
			on_eof(c);
		}
	}
	srv__conn_unref(c); /* the request's */
}

static void file_read_next(conn *c)
{
	uv_buf_t b = uv_buf_init(c->in_buf, SRV_READ_CHUNK);
	int rc;

	if (conn_has(c, CF_FILE_READ))
		return;
	c->in_req.data = c;
	srv__conn_ref(c);
	conn_set(c, CF_FILE_READ);
	rc = uv_fs_read(c->srv->loop, &c->in_req, c->in_fd, &b, 1, c->in_off,
	                on_file_read);
	if (rc < 0) {
		conn_clear(c, CF_FILE_READ);
		srv__conn_unref(c);
		srv_log("warning", "%s: read: %s", c->name, uv_strerror(rc));
		on_eof(c);
	}
}

/* Bounded by the socket buffer and by 1024 reads. Taking in (keep = 1)
 * answers requests sent before the stop but not yet read (reads may have
 * been paused); dropping (keep = 0) just before closing spares the peer a
 * reset with answers unread. */
void srv__drain_kernel(conn *c, int keep)
{
	uv_os_fd_t fd;
	ssize_t n;

	if (c->in_kind != IO_STREAM || !conn_has(c, CF_IN_OPEN) ||
	    (c->in.h.type != UV_NAMED_PIPE && c->in.h.type != UV_TCP) ||
	    uv_fileno(&c->in.h, &fd) < 0)
		return;
	for (int rounds = 0; rounds < 1024; rounds++) {
		n = read(fd, c->srv->read_buf, SRV_READ_CHUNK);
		if (n <= 0)
			break;
		if (!keep)
			continue;
		c->srv->stats->bytes_in += (size_t)n;
		c->in_bytes += (size_t)n;
		if (srv_lines_append(&c->lines, c->srv->read_buf, (size_t)n))
			break;
	}
	if (keep)
		srv__conn_account(c);
}

/* A connection whose reads wait for the budget cannot see its peer go
 * away, and its buffered bytes are what hold the budget: when the peer
 * has stopped sending (closed, or shut down its side), it is read again.
 * What is left to read is bounded by the kernel's socket buffer. */
void srv__conn_peek_hangup(conn *c)
{
	struct pollfd pf;
	uv_os_fd_t fd;

	if (!conn_has(c, CF_BUDGET_WAIT) || c->in_kind != IO_STREAM ||
	    !conn_has(c, CF_IN_OPEN) || uv_fileno(&c->in.h, &fd) < 0)
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
		conn_set(c, CF_PEER_DONE);
		conn_clear(c, CF_BUDGET_WAIT);
		srv__conn_update_read(c);
	}
}

static void on_shutdown(uv_shutdown_t *req, int status)
{
	conn *c = req->data;

	(void)status;
	srv__conn_unref(c); /* the request's */
}

void srv__conn_linger(conn *c)
{
	assert(c->kind != CONN_STDIO && conn_has(c, CF_IN_OPEN));
	if (conn_has(c, CF_LINGER))
		return;
	conn_set(c, CF_LINGER);
	c->linger_ms = uv_now(c->srv->loop);
	c->sreq.data = c;
	srv__conn_ref(c);
	if (uv_shutdown(&c->sreq, &c->in.s, on_shutdown) < 0) {
		srv__conn_unref(c);
		srv__conn_close(c);
		return;
	}
	srv__read_stop(c);
	if (uv_read_start(&c->in.s, on_alloc, on_read) < 0)
		srv__conn_close(c);
	else
		conn_set(c, CF_READING);
}
