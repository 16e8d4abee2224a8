/* The thread pool: a heavy line is copied and run by rw_proto_handle on a
 * libuv worker thread, so the event loop keeps serving other clients.
 *
 * Order: each connection keeps a window of the lines it has taken and
 * not yet answered, in request order. Lines that only read the session
 * (every method but the session ones, rw_proto_classify) may run side by
 * side, so one pipelining client uses every core; an answer that is ready
 * waits for the answers before it, and goes out from the head of the
 * window. A line that runs alone (session.set, service.info, ...) is
 * taken only once the window is empty, and no later line joins the window
 * until it is answered, so a session change takes effect exactly between
 * the lines around it. A light line that arrives while heavy ones run is
 * answered on the loop and its answer waits in the window in the same
 * way. The window holds as many lines as the pool has threads (or the
 * peer's share, when larger): those over the peer's share wait in the
 * pool queue, ready to start the moment one of its lines ends. A job may
 * also be a group of --pool-lines small lines that surely name no session
 * method (srv__pool_lines, taken by dispatch.c's take_group): it answers
 * them one after another, so a client pipelining small requests has them
 * answered on every thread while the loop reads and writes.
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

struct srv_job {
	conn *c;
	srv_job *next;      /* the connection's window, in request order */
	srv_job *pool_next; /* the server's pool queue (waiting) */
	uv_work_t work;
	char *line; /* the copy to run; NULL once run */
	size_t len;
	size_t lines;  /* more than one: that many '\n'-separated lines */
	proto_buf out; /* its answer */
	int alone;     /* runs with no other line of the connection */
	int waiting;   /* in the pool queue */
	int done;      /* answered: out is final */
};

static int peer_has_room(const srv *s, const conn *c)
{
	return !c->peer || c->peer->pool_jobs < s->pool_per_peer;
}

int srv__pool_can_join(const conn *c)
{
	const srv *s = c->srv;
	size_t room = s->pool_threads > s->pool_per_peer ? s->pool_threads
	                                                 : s->pool_per_peer;

	return !c->held && !c->jobs_alone && c->jobs < room;
}

static srv_job *job_new(conn *c, int alone)
{
	srv_job *j = calloc(1, sizeof *j);

	if (!j)
		return NULL;
	j->c = c;
	j->alone = alone;
	proto_buf_init(&j->out);
	return j;
}

/* Appends the job to the connection's window. */
static void window_add(conn *c, srv_job *j)
{
	if (c->jobs)
		c->srv->stats->pool_overlapped++;
	if (c->jobs_tail)
		c->jobs_tail->next = j;
	else
		c->jobs_head = j;
	c->jobs_tail = j;
	c->jobs++;
	if (j->alone)
		c->jobs_alone++;
	c->job_bytes += j->len;
	conn_set(c, CF_BUSY);
}

/* Frees the job's line copy (it ran, or never will). */
static void drop_line(srv_job *j)
{
	assert(j->c->job_bytes >= j->len);
	j->c->job_bytes -= j->len;
	free(j->line);
	j->line = NULL;
	j->len = 0;
}

/* Unlinks j (prev before it, or NULL at the head) and frees it. */
static void window_remove(conn *c, srv_job *prev, srv_job *j)
{
	if (prev)
		prev->next = j->next;
	else
		c->jobs_head = j->next;
	if (c->jobs_tail == j)
		c->jobs_tail = prev;
	assert(c->jobs > 0);
	c->jobs--;
	if (j->alone) {
		assert(c->jobs_alone > 0);
		c->jobs_alone--;
	}
	drop_line(j);
	proto_buf_free(&j->out);
	free(j);
	if (!c->jobs) {
		conn_clear(c, CF_BUSY);
		c->held = 0;
	}
}

/* Moves the answers that are ready at the head of the window to the
 * connection's pending output, in request order. */
static void deliver(conn *c)
{
	srv_job *j;

	while ((j = c->jobs_head) && j->done) {
		if (j->out.oom)
			proto_error_line(c->srv->ctx, &c->pending,
			                 PROTO_INTERNAL_ERROR, NULL,
			                 "out of memory building the response");
		else if (!c->pending.len) {
			proto_buf tmp = c->pending;
			c->pending = j->out;
			j->out = tmp;
		} else {
			proto_buf_append(&c->pending, j->out.data, j->out.len);
		}
		window_remove(c, NULL, j);
	}
}

/* Answers the job's lines in order into its output. */
static void run_lines(srv_job *j)
{
	const char *p = j->line, *end = j->line + j->len;

	if (j->lines <= 1) {
		(void)rw_proto_handle(j->c->session, j->line, j->len, &j->out);
		return;
	}
	while (p < end) {
		const char *nl = memchr(p, '\n', (size_t)(end - p));
		size_t n = nl ? (size_t)(nl - p) : (size_t)(end - p);
		if (rw_proto_handle(j->c->session, p, n, &j->out)) {
			/* as on the loop (dispatch_line): this answer is an
			 * error, the others stand */
			j->out.oom = 0;
			proto_error_line(j->c->srv->ctx, &j->out,
			                 PROTO_INTERNAL_ERROR, NULL,
			                 "out of memory building the response");
		}
		p += n + 1;
	}
}

static void on_work(uv_work_t *w)
{
	run_lines(w->data);
}

static void pool_kick(srv *s);

static void on_work_done(uv_work_t *w, int status)
{
	srv_job *j = w->data;
	conn *c = j->c;
	srv *s = c->srv;

	(void)status;
	assert(conn_has(c, CF_BUSY) && !j->waiting && !j->done);
	assert(s->pool_running > 0);
	s->pool_running--;
	if (c->peer) {
		assert(c->peer->pool_jobs > 0);
		c->peer->pool_jobs--;
	}
	if (j->len + j->out.cap >= SRV_TRIM_AFTER)
		s->trim_pending = 1;
	drop_line(j);
	j->done = 1;
	if (!conn_closing(c)) {
		deliver(c);
		srv__conn_flush(c);
		srv__update_pause(c);
		srv__conn_update_read(c);
		srv__conn_schedule(c);
		srv__conn_check_done(c);
	} else {
		/* The rest of the window went at the close: only lines that
		 * were running are left. */
		srv_job *prev = NULL, *k;
		for (k = c->jobs_head; k != j; k = k->next)
			prev = k;
		window_remove(c, prev, j);
	}
	pool_kick(s);
	srv__conn_unref(c); /* the work request's */
}

/* Hands the job's line to libuv. Returns 0 or -1. */
static int queue(srv_job *j)
{
	srv *s = j->c->srv;

	j->work.data = j;
	if (uv_queue_work(s->loop, &j->work, on_work, on_work_done) < 0)
		return -1;
	s->pool_running++;
	if (j->c->peer)
		j->c->peer->pool_jobs++;
	return 0;
}

/* Gives up a line that cannot be run: its answer is an error, in its
 * place in the window. */
static void give_up(srv_job *j)
{
	if (j->lines > 1) {
		/* Many requests: answered here instead, none lost. */
		run_lines(j);
		drop_line(j);
		j->done = 1;
		deliver(j->c);
		return;
	}
	drop_line(j);
	proto_buf_free(&j->out);
	proto_error_line(j->c->srv->ctx, &j->out, PROTO_INTERNAL_ERROR, NULL,
	                 "cannot start the request in the thread pool");
	j->done = 1;
	deliver(j->c);
}

/* Starts waiting lines whose peers have room again, oldest first. */
static void pool_kick(srv *s)
{
	srv_job *prev = NULL, *j = s->pool_head, *next;

	for (; j; j = next) {
		conn *c = j->c;
		next = j->pool_next;
		if (!peer_has_room(s, c)) {
			prev = j;
			continue;
		}
		if (prev)
			prev->pool_next = next;
		else
			s->pool_head = next;
		if (s->pool_tail == j)
			s->pool_tail = prev;
		j->pool_next = NULL;
		j->waiting = 0;
		if (queue(j) < 0) {
			give_up(j);
			srv__conn_flush(c);
			srv__conn_schedule(c);
			srv__conn_unref(c); /* the queue's */
		}
	}
}

/* Adds the job, its line copy made, to its connection's window and
 * hands it to the pool, or to the pool queue when its peer holds its
 * share already. */
static void start(srv_job *j)
{
	conn *c = j->c;
	srv *s = c->srv;

	window_add(c, j);
	srv__conn_ref(c); /* the work's (or the queue's) */
	if (peer_has_room(s, c)) {
		if (queue(j) < 0) {
			give_up(j);
			srv__conn_unref(c);
		}
		return;
	}
	/* Over the peer's share: wait for one of its lines to finish. */
	j->waiting = 1;
	if (s->pool_tail)
		s->pool_tail->pool_next = j;
	else
		s->pool_head = j;
	s->pool_tail = j;
	s->stats->pool_waits++;
}

int srv__pool_submit(conn *c, const char *line, size_t len, int alone)
{
	srv_job *j;

	assert(!c->jobs_alone && (!alone || !c->jobs));
	j = job_new(c, alone);
	if (!j)
		return -1;
	j->line = malloc(len ? len : 1);
	if (!j->line) {
		free(j);
		return -1;
	}
	memcpy(j->line, line, len);
	j->len = len;
	start(j);
	return 0;
}

int srv__pool_lines(conn *c, const char *const *line, const size_t *len,
                    size_t n)
{
	srv_job *j;
	size_t bytes = 0;
	char *w;

	assert(!c->jobs_alone && n > 1);
	for (size_t i = 0; i < n; i++)
		bytes += len[i] + 1;
	j = job_new(c, 0);
	if (!j)
		return -1;
	j->line = w = malloc(bytes);
	if (!j->line) {
		free(j);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		memcpy(w, line[i], len[i]);
		w += len[i];
		*w++ = '\n';
	}
	j->len = bytes - 1; /* the last '\n' is not a line's */
	j->lines = n;
	c->srv->stats->pool_line_groups++;
	start(j);
	return 0;
}

int srv__pool_answer(conn *c, const char *line, size_t len)
{
	srv_job *j;

	assert(c->jobs && !c->jobs_alone);
	j = job_new(c, 0);
	if (!j)
		return -1;
	window_add(c, j);
	(void)rw_proto_handle(c->session, line, len, &j->out);
	j->done = 1;
	deliver(c);
	return 0;
}

void srv__pool_cancel(conn *c)
{
	srv *s = c->srv;
	srv_job *j, *next, *prev = NULL;

	for (j = c->jobs_head; j; j = next) {
		next = j->next;
		if (j->waiting) {
			srv_job **pp, *qprev = NULL;
			for (pp = &s->pool_head; *pp != j;
			     pp = &(*pp)->pool_next) {
				assert(*pp);
				qprev = *pp;
			}
			*pp = j->pool_next;
			if (s->pool_tail == j)
				s->pool_tail = qprev;
			window_remove(c, prev, j);
			srv__conn_unref(c); /* the queue's */
		} else if (j->done) {
			window_remove(c, prev, j);
		} else {
			prev = j; /* running: freed when it finishes */
		}
	}
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
	/* One malloc arena a thread (the loop's and each pool thread's), up
	 * to 8: threads answering small lines side by side would otherwise
	 * queue on a shared arena's lock for every allocation the thread
	 * cache misses (200,000 scalar lines from a file: 0.70 -> 0.61 s
	 * of user time with 4 pool threads). Each arena keeps the high-water
	 * memory of its thread's largest request; srv__memory_tick returns
	 * it (malloc_trim) once the pool is idle after a large one. */
	mallopt(M_ARENA_MAX,
	        (int)(s->pool_threads + 1 < 8 ? s->pool_threads + 1 : 8));
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
