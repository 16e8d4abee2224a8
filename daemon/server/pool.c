/* The thread pool: a heavy line is copied and run by rw_proto_handle on a
 * libuv worker thread, so the event loop keeps serving other clients. The
 * connection is not dispatched while its line is out (one line in flight
 * per connection keeps answers in order) and holds a reference until the
 * answer is back on the loop thread. */
#include <stdlib.h>
#include <string.h>

#include "server/internal.h"

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
	assert(conn_has(c, CF_BUSY));
	free(c->work_line);
	c->work_line = NULL;
	c->work_len = 0;
	conn_clear(c, CF_BUSY);
	if (!conn_closing(c)) {
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
		srv__conn_flush(c);
		srv__update_pause(c);
		srv__conn_update_read(c);
		srv__conn_schedule(c);
		srv__conn_check_done(c);
	}
	srv__conn_unref(c); /* the work request's */
}

int srv__pool_submit(conn *c, const char *line, size_t len)
{
	assert(!conn_has(c, CF_BUSY));
	c->work_line = malloc(len ? len : 1);
	if (!c->work_line)
		return -1;
	memcpy(c->work_line, line, len);
	c->work_len = len;
	c->work.data = c;
	proto_buf_init(&c->work_out);
	conn_set(c, CF_BUSY);
	srv__conn_ref(c);
	if (uv_queue_work(c->srv->loop, &c->work, on_work, on_work_done) == 0)
		return 0;
	conn_clear(c, CF_BUSY);
	srv__conn_unref(c);
	free(c->work_line);
	c->work_line = NULL;
	c->work_len = 0;
	return -1;
}
