/* The write path: answers are appended to the connection's pending buffer
 * in request order and handed to one write at a time (uv_write on a
 * stream, uv_fs_write on a file, short writes continued). While more than
 * the high-water mark waits unsent the connection is paused: not read and
 * not dispatched; it resumes below half the mark. */
#include <limits.h>
#include <stdlib.h>

#include "server/internal.h"

/* The largest piece of one write buffer (and of one file write): a
 * uv_buf_t length is an unsigned int. Tests build a daemon with small
 * pieces to reach the several-buffer path. */
#ifndef SRV_WRITE_PIECE
#define SRV_WRITE_PIECE 0x40000000
#endif

void srv__update_pause(conn *c)
{
	size_t unsent = srv__conn_unsent(c);
	size_t high = c->srv->cfg->limits.out_high_water;

	srv__conn_account(c);
	if (!conn_has(c, CF_PAUSED) && unsent > high) {
		conn_set(c, CF_PAUSED);
		c->srv->stats->reads_paused++;
		srv__conn_update_read(c);
	} else if (conn_has(c, CF_PAUSED) && unsent <= high / 2) {
		conn_clear(c, CF_PAUSED);
		srv__conn_update_read(c);
		srv__conn_schedule(c);
	}
}

/* A write finished: status < 0 is an error, else `n` bytes went out.
 * The caller holds a reference. */
static void write_done(conn *c, int status, size_t n)
{
	conn_clear(c, CF_WRITING);
	if (status < 0) {
		if (c->kind == CONN_STDIO && status != UV_ECANCELED) {
			/* Nobody else will tell: the answers are lost, and
			 * the exit status must say so. */
			srv_log(
			    "error",
			    "stdout: write failed: %s; %zu bytes of answers "
			    "lost",
			    uv_strerror(status), srv__conn_unsent(c));
			c->srv->exit_code = SRV_EXIT_RUNTIME;
		} else if (!conn_closing(c) && status != UV_ECANCELED &&
		           status != UV_EPIPE && status != UV_ECONNRESET) {
			srv_log("warning", "%s: write: %s", c->name,
			        uv_strerror(status));
		}
		free(c->wdata);
		c->wdata = NULL;
		c->wlen = c->woff = 0;
		srv__conn_close(c);
		return;
	}
	c->srv->stats->bytes_out += n;
	c->out_done += n;
	if (c->wlen >= SRV_TRIM_AFTER)
		c->srv->trim_pending = 1;
	free(c->wdata);
	c->wdata = NULL;
	c->wlen = c->woff = 0;
	if (conn_closing(c))
		return;
	c->active_ms = uv_now(c->srv->loop);
	srv__conn_flush(c);
	srv__update_pause(c);
	srv__conn_check_done(c);
}

static void on_stream_written(uv_write_t *req, int status)
{
	conn *c = req->data;

	write_done(c, status, c->wlen - c->woff);
	srv__conn_unref(c); /* the write's */
}

static void file_write_next(conn *c);

static void on_file_written(uv_fs_t *req)
{
	conn *c = req->data;
	ssize_t n = req->result;

	uv_fs_req_cleanup(req);
	if (n >= 0 && !conn_closing(c) && c->woff + (size_t)n < c->wlen) {
		/* A short write: send the rest. */
		c->woff += (size_t)n;
		c->out_done += (size_t)n;
		c->srv->stats->bytes_out += (size_t)n;
		conn_clear(c, CF_WRITING);
		file_write_next(c);
		srv__conn_unref(c);
		return;
	}
	write_done(c, n < 0 ? (int)n : 0, n < 0 ? 0 : (size_t)n);
	srv__conn_unref(c); /* the write's */
}

static void file_write_next(conn *c)
{
	uv_buf_t b = uv_buf_init(c->wdata + c->woff,
	                         (unsigned)(c->wlen - c->woff > SRV_WRITE_PIECE
	                                        ? SRV_WRITE_PIECE
	                                        : c->wlen - c->woff));
	int rc;

	c->out_req.data = c;
	srv__conn_ref(c);
	conn_set(c, CF_WRITING);
	rc = uv_fs_write(c->srv->loop, &c->out_req, c->out_fd, &b, 1, -1,
	                 on_file_written);
	if (rc < 0) {
		srv__conn_unref(c);
		write_done(c, rc, 0);
	}
}

void srv__conn_flush(conn *c)
{
	uv_buf_t small[4], *bufs;
	size_t nb;
	int rc;

	if (conn_has(c, CF_WRITING) || !c->pending.len || conn_closing(c))
		return;
	c->wdata = proto_buf_take(&c->pending, &c->wlen);
	c->woff = 0;
	if (c->out_kind == IO_FILE) {
		file_write_next(c);
		return;
	}
	/* A uv_buf_t holds an unsigned int length: hand more than 1 GiB
	 * over as several buffers of one write (libuv copies the array), so
	 * nothing past 4 GiB is cut off. */
	nb = (c->wlen + (size_t)SRV_WRITE_PIECE - 1) / (size_t)SRV_WRITE_PIECE;
	bufs = nb <= 4 ? small : malloc(nb * sizeof *bufs);
	if (!bufs || nb > UINT_MAX) {
		if (bufs != small)
			free(bufs);
		srv__conn_ref(c);
		conn_set(c, CF_WRITING);
		write_done(c, UV_ENOMEM, 0);
		srv__conn_unref(c);
		return;
	}
	for (size_t i = 0; i < nb; i++) {
		size_t off = i * (size_t)SRV_WRITE_PIECE, n = c->wlen - off;
		bufs[i] = uv_buf_init(
		    c->wdata + off,
		    (unsigned)(n > SRV_WRITE_PIECE ? SRV_WRITE_PIECE : n));
	}
	c->wreq.data = c;
	srv__conn_ref(c);
	conn_set(c, CF_WRITING);
	c->out_handed += c->wlen;
	rc = uv_write(&c->wreq, c->out_stream, bufs, (unsigned)nb,
	              on_stream_written);
	if (bufs != small)
		free(bufs);
	if (rc < 0) {
		srv__conn_unref(c);
		c->out_handed -= c->wlen;
		write_done(c, rc, 0);
	}
}
