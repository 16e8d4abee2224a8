/* Line dispatch: connections with input to take wait on a ready list, and
 * an idle handle takes a bounded number of lines from each per loop turn
 * (--lines-per-turn), so one pipelining client cannot starve the others.
 * A line runs on the loop or, when heavy, in the thread pool (pool.c).
 * While a connection has lines in the pool, the next ones join its window
 * when they only read the session (the window keeps the answers in
 * request order); any other line waits until the window is empty. */
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

/* Whether the framer holds something to take: a complete line, a line
 * past the limit to report, or the tail at the end of input. Half a line
 * is not: the connection waits for the rest without costing a turn. */
static int lines_ready(conn *c)
{
	size_t held = srv_lines_buffered(&c->lines);

	return srv_lines_has_line(&c->lines) ||
	       held > c->srv->cfg->limits.max_line || (held && conn_eof(c));
}

void srv__conn_schedule(conn *c)
{
	srv *s = c->srv;

	if (conn_closing(c) || conn_has(c, CF_READY | CF_PAUSED) ||
	    (conn_has(c, CF_BUSY) && !srv__pool_can_join(c)))
		return;
	if (!lines_ready(c) && !conn_eof(c))
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
 * go to the pool unread (to run alone: what they ask is not known);
 * shorter ones are costed (rw_proto_cost: samples x angles, session
 * defaults included) and go there when the work passes --offload-work, so
 * a short line that asks for much never runs on the loop. */
static void dispatch_line(conn *c, const char *line, size_t len)
{
	srv *s = c->srv;
	const srv_config *cfg = s->cfg;
	int heavy = cfg->offload_bytes && len >= cfg->offload_bytes, rc = 0;
	int alone = heavy;

	if (!heavy) {
		rc = cfg->offload_work
		         ? rw_proto_handle_light(c->session, line, len,
		                                 cfg->offload_work, &c->pending)
		         : rw_proto_handle(c->session, line, len, &c->pending);
		heavy = rc >= 1;
		alone = rc == 2;
	}
	if (heavy) {
		if (srv__pool_submit(c, line, len, alone) == 0)
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

/* The next complete line of a busy connection, when it may join the
 * window: it must only read the session and not be a long line (those
 * are not read before they run). It goes to the pool, or is answered on
 * the loop when light; either way its answer waits for the ones before
 * it. Returns 1 when the line was taken; 0 when there is none, or it
 * waits for the window to empty (c->held). */
static int join_window(conn *c)
{
	srv *s = c->srv;
	const srv_config *cfg = s->cfg;
	const char *line;
	size_t len, work;
	int alone, rc;

	if (!srv_lines_peek(&c->lines, &line, &len))
		return 0;
	if (!cfg->offload_work ||
	    (cfg->offload_bytes && len >= cfg->offload_bytes)) {
		c->held = 1;
		return 0;
	}
	work = rw_proto_classify(c->session, line, len, &alone);
	if (alone) {
		c->held = 1;
		return 0;
	}
	rc = work >= cfg->offload_work ? srv__pool_submit(c, line, len, 0)
	                               : srv__pool_answer(c, line, len);
	if (rc) {
		c->held = 1; /* out of memory: try again once it drains */
		return 0;
	}
	(void)srv_lines_next(&c->lines, &line, &len);
	return 1;
}

/* Lines longer than this are not grouped: a group is for small requests
 * (a large one is split across the pool by itself). */
#define GROUP_LINE_MAX 8192

/* When the next --pool-lines lines are all buffered, small, and surely
 * name no session method (rw_proto_line_shares), hands them to the pool
 * as one job: a client that pipelines small requests then has them
 * answered on the pool's threads side by side, in order, while the loop
 * reads and writes. Returns 1 when it took them. One client sending one
 * line at a time never fills a group, so its latency is unchanged. */
static int take_group(conn *c)
{
	srv *s = c->srv;
	const srv_config *cfg = s->cfg;
	size_t k = cfg->pool_lines, n, i, max_len = GROUP_LINE_MAX;
	const char *line[SRV_POOL_LINES_MAX];
	size_t len[SRV_POOL_LINES_MAX];

	if (k < 2 || c->group_wait)
		return 0;
	if (conn_has(c, CF_BUSY) && !srv__pool_can_join(c))
		return 0;
	/* cheap test first: k lines need at least 32 bytes each here */
	if (srv_lines_buffered(&c->lines) < k * 32)
		return 0;
	if (cfg->offload_bytes && cfg->offload_bytes - 1 < max_len)
		max_len = cfg->offload_bytes - 1;
	n = srv_lines_peek_many(&c->lines, line, len, k);
	if (n < k)
		return 0;
	for (i = 0; i < n; i++)
		if (len[i] > max_len || !rw_proto_line_shares(line[i], len[i]))
			break;
	if (i < n) {
		/* that line and those before it go one at a time */
		c->group_wait = i + 1;
		return 0;
	}
	if (srv__pool_lines(c, line, len, n))
		return 0; /* out of memory: one at a time */
	for (i = 0; i < n; i++) {
		const char *l;
		size_t ln;
		srv_line_status st = srv_lines_next(&c->lines, &l, &ln);
		assert(st == SRV_LINE_OK && l == line[i] && ln == len[i]);
		(void)st;
	}
	return 1;
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

	while (budget-- > 0 && !conn_closing(c) && !conn_has(c, CF_PAUSED)) {
		srv_line_status st;
		if (take_group(c)) {
			srv__update_pause(c);
			continue;
		}
		if (c->group_wait)
			c->group_wait--;
		if (conn_has(c, CF_BUSY)) {
			if (!srv__pool_can_join(c) || !join_window(c))
				break;
			srv__update_pause(c);
			continue;
		}
		st = srv_lines_next(&c->lines, &line, &len);
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
	return !conn_closing(c) && !conn_has(c, CF_PAUSED) &&
	       (!conn_has(c, CF_BUSY) || srv__pool_can_join(c)) &&
	       lines_ready(c);
}

enum { LONE_TURNS = 16 };

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
		/* With no other connection waiting, a turn is LONE_TURNS
		 * turns long: the loop still polls for new work every few
		 * hundred lines, but a lone pipelined client (stdin, one
		 * socket) no longer pays a poll and a write every 20. */
		if (conn_dispatch(c, s->cfg->lines_per_turn *
		                         (s->ready_head ? 1 : LONE_TURNS)))
			srv__conn_schedule(c);
		srv__conn_unref(c);
	}
	if (!s->ready_head && s->idle_active) {
		uv_idle_stop(&s->idle);
		s->idle_active = 0;
	}
}
