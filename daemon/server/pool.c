/* The thread pool: a heavy line is copied and run by rw_proto_handle on a
 * libuv worker thread, so the event loop keeps serving other clients. The
 * connection is not dispatched while its line is out (one line in flight
 * per connection keeps answers in order) and holds a reference until the
 * answer is back on the loop thread.
 *
 * Fairness: a peer (peer.c) may hold at most --pool-per-peer lines in the
 * pool at once (default: one thread fewer than the pool has), so one
 * client cannot occupy every thread. A line over its peer's share waits,
 * in arrival order, in the server's pool queue; it never runs on the
 * loop instead.
 *
 * Memory: the pool threads' malloc arenas keep what large requests freed
 * (glibc keeps it for reuse), so after a large job the tick returns free
 * memory to the system (malloc_trim) and service.info reports the
 * resident size. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#ifdef __GLIBC__
#include <malloc.h> /* mallopt, malloc_trim */
#endif

#include "server/internal.h"

static int peer_has_room(const srv *s, const conn *c)
{
	return !c->peer || c->peer->pool_jobs < s->pool_per_peer;
}

static void on_work(uv_work_t *w)
{
	conn *c = w->data;
	c->work_rc = rw_proto_handle(c->session, c->work_line, c->work_len,
	                             &c->work_out);
}

static void pool_kick(srv *s);

static void on_work_done(uv_work_t *w, int status)
{
	conn *c = w->data;
	srv *s = c->srv;
	size_t big = c->work_len + c->work_out.cap;

	(void)status;
	assert(conn_has(c, CF_BUSY) && !conn_has(c, CF_POOL_WAIT));
	assert(s->pool_running > 0);
	s->pool_running--;
	if (c->peer) {
		assert(c->peer->pool_jobs > 0);
		c->peer->pool_jobs--;
	}
	if (big >= SRV_TRIM_AFTER)
		s->trim_pending = 1;
	free(c->work_line);
	c->work_line = NULL;
	c->work_len = 0;
	conn_clear(c, CF_BUSY);
	if (!conn_closing(c)) {
		if (c->work_out.oom)
			proto_error_line(s->ctx, &c->pending,
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
	} else {
		proto_buf_free(&c->work_out);
	}
	pool_kick(s);
	srv__conn_unref(c); /* the work request's */
}

/* Hands the connection's copied line to libuv. Returns 0 or -1. */
static int queue(conn *c)
{
	srv *s = c->srv;

	c->work.data = c;
	proto_buf_init(&c->work_out);
	if (uv_queue_work(s->loop, &c->work, on_work, on_work_done) < 0)
		return -1;
	s->pool_running++;
	if (c->peer)
		c->peer->pool_jobs++;
	return 0;
}

/* Gives up a line that cannot be run: its answer is an error. */
static void give_up(conn *c)
{
	free(c->work_line);
	c->work_line = NULL;
	c->work_len = 0;
	conn_clear(c, CF_BUSY | CF_POOL_WAIT);
	proto_error_line(c->srv->ctx, &c->pending, PROTO_INTERNAL_ERROR, NULL,
	                 "cannot start the request in the thread pool");
}

/* Starts waiting lines whose peers have room again, oldest first. */
static void pool_kick(srv *s)
{
	conn *prev = NULL, *c = s->pool_head, *next;

	for (; c; c = next) {
		next = c->pool_next;
		if (!peer_has_room(s, c)) {
			prev = c;
			continue;
		}
		if (prev)
			prev->pool_next = next;
		else
			s->pool_head = next;
		if (s->pool_tail == c)
			s->pool_tail = prev;
		c->pool_next = NULL;
		conn_clear(c, CF_POOL_WAIT);
		if (queue(c) < 0) {
			give_up(c);
			srv__conn_flush(c);
			srv__conn_schedule(c);
			srv__conn_unref(c); /* the queue's */
		}
	}
}

int srv__pool_submit(conn *c, const char *line, size_t len)
{
	srv *s = c->srv;

	assert(!conn_has(c, CF_BUSY));
	c->work_line = malloc(len ? len : 1);
	if (!c->work_line)
		return -1;
	memcpy(c->work_line, line, len);
	c->work_len = len;
	conn_set(c, CF_BUSY);
	srv__conn_ref(c); /* the work's (or the queue's) */
	if (peer_has_room(s, c)) {
		if (queue(c) == 0)
			return 0;
		give_up(c);
		srv__conn_unref(c);
		return 0;
	}
	/* Over the peer's share: wait for one of its lines to finish. */
	conn_set(c, CF_POOL_WAIT);
	c->pool_next = NULL;
	if (s->pool_tail)
		s->pool_tail->pool_next = c;
	else
		s->pool_head = c;
	s->pool_tail = c;
	s->stats->pool_waits++;
	return 0;
}

void srv__pool_cancel(conn *c)
{
	srv *s = c->srv;
	conn **pp, *prev = NULL;

	if (!conn_has(c, CF_POOL_WAIT))
		return;
	for (pp = &s->pool_head; *pp != c; pp = &(*pp)->pool_next) {
		assert(*pp);
		prev = *pp;
	}
	*pp = c->pool_next;
	if (s->pool_tail == c)
		s->pool_tail = prev;
	c->pool_next = NULL;
	free(c->work_line);
	c->work_line = NULL;
	c->work_len = 0;
	conn_clear(c, CF_BUSY | CF_POOL_WAIT);
	srv__conn_unref(c); /* the queue's */
}

void srv__pool_init(srv *s)
{
	const char *e = getenv("UV_THREADPOOL_SIZE");
	long n = e ? strtol(e, NULL, 10) : 4;

	/* libuv's own rule: 4 unless the variable says 1..1024 */
	if (n < 1)
		n = 4;
	if (n > 1024)
		n = 1024;
	s->pool_threads = (size_t)n;
	s->pool_per_peer = s->cfg->pool_per_peer;
	if (!s->pool_per_peer)
		s->pool_per_peer =
		    s->pool_threads > 1 ? s->pool_threads - 1 : 1;
#ifdef __GLIBC__
	/* Fewer malloc arenas than threads: each pool thread would
	 * otherwise keep the high-water memory of its largest request. */
	mallopt(M_ARENA_MAX, 2);
#endif
}

/* Resident set size from /proc/self/statm, 0 when unknown. */
static uint64_t rss_bytes(void)
{
	FILE *f = fopen("/proc/self/statm", "re");
	unsigned long long size, res = 0;

	if (!f)
		return 0;
	if (fscanf(f, "%llu %llu", &size, &res) != 2)
		res = 0;
	fclose(f);
	return (uint64_t)res * (uint64_t)sysconf(_SC_PAGESIZE);
}

void srv__memory_tick(srv *s)
{
	uint64_t before;

	s->stats->memory_rss_bytes = rss_bytes();
	if (!s->trim_pending || s->pool_running)
		return;
	s->trim_pending = 0;
	before = s->stats->memory_rss_bytes;
#ifdef __GLIBC__
	malloc_trim(0);
#endif
	s->stats->memory_trims++;
	s->stats->memory_rss_bytes = rss_bytes();
	if (before > s->stats->memory_rss_bytes)
		s->stats->memory_released_bytes +=
		    before - s->stats->memory_rss_bytes;
}
