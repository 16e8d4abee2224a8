/* The periodic tick (every SRV_TICK_MS): the slow-reader rule, the
 * stalled-input rule, the idle timeout, hang-up checks on connections
 * whose reads wait for the budget, and memory sampling. */
#include <stdio.h>

#include "server/internal.h"

/* The stalled-input rule (protocol-docs/limits.md): an unfinished line
 * of more than the high-water mark must keep arriving, at least
 * SRV_STALL_PROGRESS bytes per stall window, else the connection gets
 * one error and is closed, and its bytes go back to the budget. Waiting
 * for the budget is no excuse (those bytes are what holds it); waiting
 * for its own answers to be read (paused) or for its request in the
 * pool is. Returns 1 when it closed the connection. */
static int input_tick(conn *c, uint64_t now, uint64_t stall)
{
	srv *s = c->srv;
	size_t high = s->cfg->limits.out_high_water;
	size_t unfinished = 0;
	char why[200];

	if (!conn_eof(c) && !conn_has(c, CF_PAUSED | CF_BUSY) &&
	    !srv_lines_has_line(&c->lines))
		unfinished = srv_lines_buffered(&c->lines);
	if (unfinished <= high ||
	    c->in_bytes - c->in_stall_mark >= SRV_STALL_PROGRESS) {
		c->in_stall_ms = now;
		c->in_stall_mark = c->in_bytes;
		return 0;
	}
	if (now - c->in_stall_ms < stall)
		return 0;
	s->stats->connections_closed_slow++;
	srv_log("warning",
	        "%s: closed as slow: an unfinished line of %zu bytes grew "
	        "by under %u bytes in %.1f s",
	        c->name, unfinished, SRV_STALL_PROGRESS,
	        s->cfg->limits.stall_timeout_s);
	snprintf(why, sizeof why,
	         "unfinished line of %zu bytes stalled: under %u bytes "
	         "arrived in %.1f s; connection closed",
	         unfinished, SRV_STALL_PROGRESS,
	         s->cfg->limits.stall_timeout_s);
	srv__read_stop(c);
	srv_lines_free(&c->lines);
	conn_set_state(c, CONN_EOF);
	if (c->kind != CONN_STDIO)
		conn_set(c, CF_LAST_WORD);
	proto_error_line(s->ctx, &c->pending, PROTO_INVALID_REQUEST, NULL, why);
	srv__conn_flush(c);
	srv__update_pause(c);
	srv__conn_check_done(c);
	return 1;
}

/* The slow-reader rule (protocol-docs/limits.md): a socket connection
 * holding more than the hard bound of unsent output, or any paused one
 * while the global budget is exhausted, must get at least
 * SRV_STALL_PROGRESS bytes out per stall window, else it is closed. A
 * client that reads a huge answer keeps it alive however large that
 * answer is. */
static void conn_tick(conn *c, uint64_t now)
{
	const srv_config *cfg = c->srv->cfg;
	uint64_t sent = srv__conn_sent(c);
	size_t unsent = srv__conn_unsent(c);
	size_t hard = cfg->limits.out_hard_limit;
	uint64_t stall = (uint64_t)(cfg->limits.stall_timeout_s * 1000);
	double idle_s = cfg->limits.idle_timeout_s;
	uint64_t idle;
	int held = (hard && unsent > hard) ||
	           (c->srv->over_budget && conn_has(c, CF_PAUSED));

	/* TCP connections, which any local user can open, have an idle
	 * timeout of their own: the shorter of the two that are set. */
#if RW_WITH_TCP
	if (c->kind == CONN_TCP && cfg->tcp_idle_timeout_s > 0 &&
	    (idle_s <= 0 || cfg->tcp_idle_timeout_s < idle_s))
		idle_s = cfg->tcp_idle_timeout_s;
#endif
	idle = (uint64_t)(idle_s * 1000);
	if (input_tick(c, now, stall))
		return;
	if (sent != c->seen_sent) {
		c->seen_sent = sent;
		c->active_ms = now;
	}
	if (!held || sent - c->stall_mark >= SRV_STALL_PROGRESS) {
		c->stall_ms = now;
		c->stall_mark = sent;
	} else if (now - c->stall_ms >= stall) {
		c->srv->stats->connections_closed_slow++;
		srv_log("warning",
		        "%s: closed as slow: %zu bytes of answers unsent and "
		        "under %u bytes taken in %.1f s",
		        c->name, unsent, SRV_STALL_PROGRESS,
		        cfg->limits.stall_timeout_s);
		srv__conn_close(c);
		return;
	}
	if (idle && !conn_has(c, CF_BUSY) && now - c->active_ms >= idle) {
		srv_log("info", "%s: closed after %.1f s idle", c->name,
		        idle_s);
		c->srv->stats->connections_closed_idle++;
		srv__conn_close(c);
	}
}

void srv__on_tick(uv_timer_t *t)
{
	srv *s = t->data;
	uint64_t now = uv_now(s->loop);
	conn *c, *next;

	srv__ratelimit_flush(&s->rl_refused, now);
	srv__memory_tick(s);
	for (c = s->conns; c; c = next) {
		next = c->next;
		if (conn_has(c, CF_LINGER) && !conn_closing(c)) {
			if (now - c->linger_ms >= SRV_LINGER_MS) {
				srv__conn_ref(c);
				srv__conn_close(c);
				next = c->next;
				srv__conn_unref(c);
			}
			continue;
		}
		if (c->kind != CONN_STDIO && !conn_closing(c)) {
			srv__conn_ref(c);
			srv__conn_peek_hangup(c);
			if (!conn_closing(c))
				conn_tick(c, now);
			next = c->next;
			srv__conn_unref(c);
		}
	}
}
