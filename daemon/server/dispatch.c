/* Line dispatch: connections with input to take wait on a ready list, and
 * an idle handle takes a bounded number of lines from each per loop turn
 * (--lines-per-turn), so one pipelining client cannot starve the others.
 * Only one line per connection is in flight at a time, which keeps its
 * answers in request order without sequence numbers. A line runs on the
 * loop or, when heavy, in the thread pool (pool.c). */
#include <stdio.h>

#include "server/internal.h"

void srv__ready_remove(conn *c)
{
	srv *s = c->srv;
	conn **pp = &s->ready_head, *prev = NULL;

	if (!conn_has(c, CF_READY))
		return;
	while (*pp && *pp != c) {
		prev = *pp;
		pp = &(*pp)->ready_next;
	}
	assert(*pp == c);
	*pp = c->ready_next;
	if (s->ready_tail == c)
		s->ready_tail = prev;
	c->ready_next = NULL;
	conn_clear(c, CF_READY);
}

void srv__conn_schedule(conn *c)
{
	srv *s = c->srv;

	if (conn_closing(c) || conn_has(c, CF_READY | CF_BUSY | CF_PAUSED))
		return;
	if (!srv_lines_buffered(&c->lines) && !conn_eof(c))
		return;
	conn_set(c, CF_READY);
	c->ready_next = NULL;
	if (s->ready_tail)
		s->ready_tail->ready_next = c;
	else
		s->ready_head = c;
	s->ready_tail = c;
	if (!s->idle_active && !uv_is_closing((uv_handle_t *)&s->idle)) {
		uv_idle_start(&s->idle, srv__on_idle);
		s->idle_active = 1;
	}
}

/* Runs one line on the loop or hands it to the thread pool. Long lines
 * go to the pool unread; shorter ones are costed (rw_proto_cost: samples
 * x angles, session defaults included) and go there when the work passes
 * --offload-work, so a short line that asks for much never runs on the
 * loop. */
static void dispatch_line(conn *c, const char *line, size_t len)
{
	srv *s = c->srv;
	const srv_config *cfg = s->cfg;
	int heavy = cfg->offload_bytes && len >= cfg->offload_bytes, rc = 0;

	if (!heavy) {
		rc = cfg->offload_work
		         ? rw_proto_handle_light(c->session, line, len,
		                                 cfg->offload_work, &c->pending)
		         : rw_proto_handle(c->session, line, len, &c->pending);
		heavy = rc == 1;
	}
	if (heavy) {
		if (srv__pool_submit(c, line, len) == 0)
			return;
		proto_error_line(s->ctx, &c->pending, PROTO_INTERNAL_ERROR,
		                 NULL,
		                 "out of memory: cannot take the request");
		return;
	}
	if (rc) {
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

	while (budget-- > 0 && !conn_closing(c) &&
	       !conn_has(c, CF_BUSY | CF_PAUSED)) {
		srv_line_status st = srv_lines_next(&c->lines, &line, &len);
		if (st == SRV_LINE_NONE && conn_eof(c)) {
			st = srv_lines_tail(&c->lines, &line, &len);
			if (st != SRV_LINE_NONE && conn_has(c, CF_DROP_TAIL)) {
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
		srv__update_pause(c);
	}
	srv__conn_flush(c);
	srv__update_pause(c);
	if (!conn_closing(c))
		srv__conn_update_read(c);
	srv__conn_check_done(c);
	return !conn_closing(c) && !conn_has(c, CF_BUSY | CF_PAUSED) &&
	       srv_lines_buffered(&c->lines) > 0;
}

void srv__on_idle(uv_idle_t *h)
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
		conn_clear(c, CF_READY);
		done = c == last;
		srv__conn_ref(c);
		if (conn_dispatch(c, s->cfg->lines_per_turn))
			srv__conn_schedule(c);
		srv__conn_unref(c);
	}
	if (!s->ready_head && s->idle_active) {
		uv_idle_stop(&s->idle);
		s->idle_active = 0;
	}
}
