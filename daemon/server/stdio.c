/* --stdio: one connection on stdin and stdout, each of which may be a
 * pipe, a socket, a terminal (libuv streams) or a regular file or
 * character device (read and written with uv_fs_*, since those cannot be
 * streams). File descriptors 0 and 1 are not ours to close. */
#include <stdlib.h>

#include "server/internal.h"

static int open_side(srv *s, conn *c, int fd, int readable, srv_handle *h,
                     enum srv_io *kind, uv_file *file)
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
	srv__conn_ref(c); /* the handle's */
	return 0;
}

int srv__start_stdio(srv *s)
{
	conn *c = srv__conn_new(s, CONN_STDIO);

	if (!c)
		return -1;
	if (open_side(s, c, 0, 1, &c->in, &c->in_kind, &c->in_fd) < 0)
		goto fail;
	if (c->in_kind == IO_STREAM)
		conn_set(c, CF_IN_OPEN);
	if (c->in_kind == IO_FILE && !(c->in_buf = malloc(SRV_READ_CHUNK)))
		goto fail;
	if (open_side(s, c, 1, 0, &c->outh, &c->out_kind, &c->out_fd) < 0)
		goto fail;
	if (c->out_kind == IO_STREAM)
		conn_set(c, CF_OUT_OPEN);
	c->out_stream = &c->outh.s;
	srv__conn_update_read(c);
	return 0;
fail:
	srv__conn_close(c);
	return -1;
}
