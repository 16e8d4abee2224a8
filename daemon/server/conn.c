/* Connection lifetime and accounting. A connection holds one reference of
 * its own from srv__conn_new until srv__conn_close; every open handle and
 * every read, write or work request in flight holds another. The last
 * srv__conn_unref unlinks and frees it, so it is never freed inside its
 * own callback chain. Its bytes (buffered input, unsent answers, a line
 * in the thread pool) are counted in the server's buffered_bytes, which
 * the global budget bounds. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "server/internal.h"

size_t srv__conn_unsent(const conn *c)
{
	return c->pending.len + (c->wlen - c->woff);
}

uint64_t srv__conn_sent(const conn *c)
{
	if (conn_has(c, CF_WRITING) && c->out_kind == IO_STREAM &&
	    !conn_closing(c))
		return c->out_handed -
		       uv_stream_get_write_queue_size(c->out_stream);
	return c->out_done;
}

/* Whether the budget holds this connection's reads back: everyone's past
 * the whole budget; past all but its reserve (the last eighth), only
 * those of connections holding more than the high-water mark, so new
 * and small requests are still read and served. A peer that stopped
 * sending is read to its end (what is left is in the kernel). */
static int budget_holds(const srv *s, const conn *c)
{
	if (conn_has(c, CF_PEER_DONE) || s->over_budget == BUDGET_OK)
		return 0;
	return s->over_budget == BUDGET_FULL ||
	       c->acct > s->cfg->limits.out_high_water;
}

static void budget_apply(conn *c)
{
	int hold = budget_holds(c->srv, c);

	if (hold == conn_has(c, CF_BUDGET_WAIT))
		return;
	if (hold)
		conn_set(c, CF_BUDGET_WAIT);
	else
		conn_clear(c, CF_BUDGET_WAIT);
	srv__conn_update_read(c);
}

/* Global budget, in three states with hysteresis: past budget - reserve
 * big connections wait (BUDGET_RESERVE), past the budget all do
 * (BUDGET_FULL); back under three quarters of budget - reserve nobody
 * waits. */
static void budget_check(srv *s)
{
	size_t budget = s->cfg->limits.global_budget;
	size_t soft = budget - budget / 8;
	uint64_t now = s->stats->buffered_bytes;
	int was = s->over_budget, st = was;
	conn *c;

	if (!budget)
		return;
	if (now > budget)
		st = BUDGET_FULL;
	else if (now > soft && st == BUDGET_OK)
		st = BUDGET_RESERVE;
	else if (now <= soft && st == BUDGET_FULL)
		st = BUDGET_RESERVE;
	if (now <= soft / 4 * 3)
		st = BUDGET_OK;
	if (st == was)
		return;
	s->over_budget = st;
	if (st == BUDGET_FULL)
		srv_log("warning",
		        "%llu bytes buffered over all connections, past the "
		        "budget of %zu: reads wait",
		        (unsigned long long)now, budget);
	else if (st == BUDGET_RESERVE && was == BUDGET_OK)
		srv_log("warning",
		        "%llu bytes buffered over all connections, into the "
		        "last eighth of the budget of %zu: connections holding "
		        "more than %zu bytes wait, smaller ones are served",
		        (unsigned long long)now, budget,
		        s->cfg->limits.out_high_water);
	else if (st == BUDGET_OK)
		srv_log("info", "buffered bytes back under the budget");
	for (c = s->conns; c; c = c->next)
		budget_apply(c);
}

void srv__conn_account(conn *c)
{
	srv *s = c->srv;
	size_t now = conn_closing(c) ? 0
	                             : srv_lines_buffered(&c->lines) +
	                                   srv__conn_unsent(c) + c->job_bytes;

	assert(s->stats->buffered_bytes >= c->acct);
	s->stats->buffered_bytes -= c->acct;
	s->stats->buffered_bytes += now;
	c->acct = now;
	budget_check(s);
	if (s->over_budget == BUDGET_RESERVE && !conn_closing(c))
		budget_apply(c); /* it may have grown past the mark */
}

void srv__conn_ref(conn *c)
{
	assert(c->refs > 0);
	c->refs++;
}

void srv__conn_unref(conn *c)
{
	srv *s = c->srv;

	assert(c->refs > 0);
	if (--c->refs > 0)
		return;
	/* Last reference: nothing can be in flight, and the connection was
	 * closed (its own reference is the one dropped there). */
	assert(conn_closing(c));
	assert(!conn_has(c, CF_READY | CF_IN_OPEN | CF_OUT_OPEN | CF_FILE_READ |
	                        CF_WRITING | CF_BUSY));
	assert(!c->jobs && !c->jobs_head && !c->job_bytes);
	assert(s->stats->buffered_bytes >= c->acct);
	s->stats->buffered_bytes -= c->acct;
	c->acct = 0;
	if (c->prev)
		c->prev->next = c->next;
	else
		s->conns = c->next;
	if (c->next)
		c->next->prev = c->prev;
	assert(s->stats->connections_open > 0);
	s->stats->connections_open--;
	srv__peer_detach(c);
	srv_lines_free(&c->lines);
	proto_buf_free(&c->pending);
	free(c->wdata);
	free(c->in_buf);
	proto_session_free(c->session);
	if (conn_has(c, CF_REFUSED)) {
		assert(s->refusing > 0);
		s->refusing--;
	}
	free(c);
	budget_check(s);
	srv__listen_resume(s);
	srv__maybe_finish(s);
}

void srv__on_handle_closed(uv_handle_t *h)
{
	srv__conn_unref(h->data);
}

static const char *kind_name(enum conn_kind kind)
{
	switch (kind) {
	case CONN_UNIX: return "unix";
	case CONN_TCP: return "tcp";
	default: return "stdio";
	}
}

conn *srv__conn_new(srv *s, enum conn_kind kind)
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
	c->kind = kind;
	c->state = CONN_OPEN;
	c->refs = 1;
	c->in_fd = c->out_fd = -1;
	if (s->over_budget == BUDGET_FULL)
		conn_set(c, CF_BUDGET_WAIT);
	c->active_ms = c->stall_ms = c->in_stall_ms = uv_now(s->loop);
	srv_lines_init(&c->lines, s->cfg->limits.max_line);
	proto_buf_init(&c->pending);
	snprintf(c->name, sizeof c->name, "%s#%lu", kind_name(kind),
	         ++s->next_id);
	c->next = s->conns;
	if (s->conns)
		s->conns->prev = c;
	s->conns = c;
	s->stats->connections_total++;
	s->stats->connections_open++;
	return c;
}

void srv__conn_close(conn *c)
{
	if (conn_closing(c))
		return;
	conn_set_state(c, CONN_CLOSING);
	srv__ready_remove(c);
	srv__pool_cancel(c);
	srv__conn_account(c);
	if (conn_has(c, CF_IN_OPEN)) {
		conn_clear(c, CF_IN_OPEN | CF_READING);
		uv_close(&c->in.h, srv__on_handle_closed);
	}
	if (conn_has(c, CF_OUT_OPEN)) {
		conn_clear(c, CF_OUT_OPEN);
		uv_close(&c->outh.h, srv__on_handle_closed);
	}
	/* File descriptors 0 and 1 of --stdio are not ours to close. */
	srv__conn_unref(c); /* the reference held by the connection itself */
}

void srv__conn_check_done(conn *c)
{
	if (conn_closing(c) || !conn_eof(c) ||
	    conn_has(c, CF_BUSY | CF_WRITING | CF_LINGER) || c->pending.len ||
	    srv_lines_buffered(&c->lines))
		return;
	if (conn_has(c, CF_LAST_WORD) && conn_has(c, CF_IN_OPEN)) {
		/* the client may still be sending: let it read the error */
		srv__conn_linger(c);
		return;
	}
	/* Unread input would make the close a reset, which can cost the
	 * peer the answers it has not read yet. */
	if (c->srv->stopping)
		srv__drain_kernel(c, 0);
	srv__conn_close(c);
}
