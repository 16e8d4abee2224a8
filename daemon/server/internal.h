/* Internals of the server layer shared by its files, never included from
 * outside daemon/server/: the daemon state (srv), a connection (conn) and
 * a listener, and the srv__ functions each concern offers the others.
 *
 *   log.c       log lines, the log file, rate-limited warnings
 *   conn.c      connection lifetime (conn_ref / conn_unref), accounting
 *   peer.c      peers (uid or address) and admission of connections
 *   read.c      the read path: streams, files, pausing, the kernel drain
 *   dispatch.c  the ready list and fair turns: lines to the protocol
 *   pool.c      the thread pool: heavy lines off the event loop
 *   write.c     the write path: ordered answers, backpressure
 *   timer.c     the periodic tick: idle and slow connections
 *   stdio.c     --stdio (pipes, terminals, files)
 *   listen.c    Unix, TCP and activated listeners, accepting
 *   sockpath.c  the default socket path and checks on socket paths
 *   shutdown.c  signals, draining, the end of the loop
 *   srv.c       configuration defaults and srv_run, which wires them
 *
 * A connection is freed only when its last reference goes (conn_unref),
 * never inside its own callback chain. Its state moves one way (open ->
 * end of input -> closing); everything else about it is a flag bit.
 * Internal invariants are assert()ed in debug and sanitizer builds. */
#ifndef RW_SRV_INTERNAL_H
#define RW_SRV_INTERNAL_H

/* Sanitizer builds check invariants even when built with NDEBUG (as
 * RelWithDebInfo is): a broken refcount should stop the run that made
 * it, not be clamped. */
#if defined(__SANITIZE_ADDRESS__)
#undef NDEBUG
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#undef NDEBUG
#endif
#endif
#include <assert.h>
#include <stdint.h>
#include <sys/types.h>

#include <uv.h>

#include "proto/proto.h"
#include "server/lines.h"
#include "server/sd.h"
#include "server/srv.h"

#define SRV_READ_CHUNK     65536
#define SRV_TICK_MS        250         /* idle and slow-reader checks */
#define SRV_STALL_PROGRESS (64u << 10) /* bytes that count as progress */
#define SRV_LOG_BURST      5           /* rate-limited warnings: at most */
#define SRV_LOG_WINDOW_MS  10000       /* this many per window */
#define SRV_REFUSING_MAX   8           /* refusals in flight, at most */
#define SRV_LINGER_MS      2000        /* a refused peer's time to close */
#define SRV_TRIM_AFTER     (8u << 20)  /* bytes of a job that was large */

typedef struct srv srv;
typedef struct conn conn;
typedef struct srv_job srv_job; /* a line in a window (pool.c) */

enum srv_io { IO_NONE, IO_STREAM, IO_FILE };
enum srv_lst_kind { LST_UNIX, LST_TCP };

/* The global budget's state (conn.c). */
enum srv_budget {
	BUDGET_OK,      /* nobody waits for it */
	BUDGET_RESERVE, /* in its last eighth: only big connections wait */
	BUDGET_FULL     /* past it: every connection waits */
};

/* Where a connection came from. */
enum conn_kind { CONN_STDIO, CONN_UNIX, CONN_TCP };

/* The one-way life of a connection. */
enum conn_state {
	CONN_OPEN,   /* input may still arrive */
	CONN_EOF,    /* no more input: answering what is left */
	CONN_CLOSING /* closed: handles closing, waiting for the last ref */
};

/* What a connection is doing and what holds it back. */
enum conn_flag {
	CF_READY = 1u << 0,       /* on the ready list */
	CF_IN_OPEN = 1u << 1,     /* the input stream handle is open */
	CF_OUT_OPEN = 1u << 2,    /* a separate output handle is open */
	CF_READING = 1u << 3,     /* input is being read */
	CF_FILE_READ = 1u << 4,   /* a file read is in flight */
	CF_WRITING = 1u << 5,     /* a write is in flight */
	CF_BUSY = 1u << 6,        /* lines in its window (pool.c) */
	CF_PAUSED = 1u << 7,      /* unsent answers above the high-water */
	CF_IN_FULL = 1u << 8,     /* input above the high-water, a line in */
	CF_BUDGET_WAIT = 1u << 9, /* reads wait for the global budget */
	CF_PEER_DONE = 1u << 10,  /* the peer stopped sending */
	CF_DROP_TAIL = 1u << 11,  /* at the end, an unfinished line is
	                             dropped (shutdown cut it short) */
	CF_REFUSED = 1u << 12,    /* refused at accept: one error, close */
	CF_LINGER = 1u << 13,     /* written and shut down: input discarded
	                             until the peer closes (or a timeout) */
	CF_LAST_WORD = 1u << 15   /* closed by us after one error line:
	                             lingers so the client can read it */
};

/* Who is on the other end of connections (peer.c). */
typedef struct srv_peer {
	struct srv_peer *next;
	char key[64];     /* "uid 1000", "loopback", "192.0.2.7", ... */
	int owner;        /* the uid the daemon runs as */
	size_t conns;     /* connections open */
	size_t pool_jobs; /* lines in the thread pool */
} srv_peer;

/* A rate limiter for warnings: SRV_LOG_BURST per SRV_LOG_WINDOW_MS, then
 * one line saying how many were not logged. */
typedef struct srv_ratelimit {
	const char *what; /* "refused-connection warnings" */
	uint64_t start_ms;
	unsigned count;
	unsigned long suppressed;
} srv_ratelimit;

typedef union srv_handle {
	uv_handle_t h;
	uv_stream_t s;
	uv_pipe_t pipe;
	uv_tty_t tty;
	uv_tcp_t tcp;
} srv_handle;

struct conn {
	srv *srv;
	conn *prev, *next; /* all connections */
	conn *ready_next;  /* ready list */

	enum conn_kind kind;
	enum conn_state state;
	unsigned flags; /* enum conn_flag bits */
	int refs;
	srv_peer *peer; /* NULL for stdio (or when out of memory) */

	enum srv_io in_kind;
	srv_handle in;
	uv_file in_fd;
	int64_t in_off;
	uv_fs_t in_req;
	char *in_buf; /* file input buffer */

	enum srv_io out_kind;
	srv_handle outh; /* stdout handle when separate */
	uv_stream_t *out_stream;
	uv_file out_fd;
	uv_fs_t out_req;
	uv_write_t wreq;
	uv_shutdown_t sreq;
	uint64_t linger_ms; /* when lingering began */

	proto_buf pending; /* answers not yet handed to a write */
	char *wdata;       /* the write in flight */
	size_t wlen, woff;
	uint64_t out_handed; /* bytes handed to stream writes */
	uint64_t out_done;   /* bytes known written */

	srv_lines lines;
	proto_session *session;

	size_t acct;            /* bytes counted in stats->buffered_bytes */
	uint64_t active_ms;     /* last byte in or out */
	uint64_t stall_ms;      /* start of the current progress window */
	uint64_t stall_mark;    /* bytes sent at stall_ms */
	uint64_t seen_sent;     /* bytes sent at the last tick */
	uint64_t in_bytes;      /* bytes received */
	uint64_t in_stall_ms;   /* start of the input progress window */
	uint64_t in_stall_mark; /* in_bytes at in_stall_ms */

	/* The window (pool.c): lines taken but not yet answered, in request
	 * order, run in the thread pool (or answered on the loop while
	 * earlier ones run); answers go out from the head, in order. */
	srv_job *jobs_head, *jobs_tail;
	size_t jobs;       /* in the window (CF_BUSY when nonzero) */
	size_t jobs_alone; /* of them, lines that run alone */
	size_t job_bytes;  /* their line copies not yet run */
	int held;          /* the next line waits until the window is empty */
	/* lines to take one at a time before trying a group again: one of
	 * them cannot join a group (take_group, dispatch.c) */
	size_t group_wait;

	char name[80];
};

typedef struct srv_listener {
	srv *srv;
	srv_handle h;
	enum srv_lst_kind kind;
	int open;
	int activated; /* passed in by the service manager */
	int deferred;  /* a connection waits in libuv, not yet accepted */
	char *path;    /* Unix path we created, to remove */
	dev_t dev;
	ino_t ino;
	char name[128];
} srv_listener;

struct srv {
	uv_loop_t *loop;
	const srv_config *cfg;
	proto_ctx *ctx;
	proto_server_stats *stats;
	conn *conns;
	conn *ready_head, *ready_tail;
	uv_idle_t idle;
	int idle_active;
	srv_listener lst[SRV_MAX_LISTEN];
	int n_lst;
	int listening;
	uv_signal_t sig_int, sig_term, sig_hup;
	uv_timer_t drain_timer;
	uv_timer_t tick;
	srv_notify notify;
	int stop_notified;
	int stopping;
	int over_budget; /* enum srv_budget */
	int exit_code;
	srv_peer *peers;
	size_t conn_cap; /* max_conns, lowered to fit the fd limit */
	long fd_limit;   /* RLIMIT_NOFILE, 0 when unlimited */
	int fd_warned;   /* "out of file descriptors" logged */
	size_t refusing; /* refused connections not yet freed */
	srv_ratelimit rl_refused;
	srv_job *pool_head, *pool_tail; /* lines waiting for a pool slot */
	size_t pool_threads;            /* libuv's thread pool size */
	size_t pool_per_peer;           /* pool lines per peer at once */
	size_t pool_running;            /* lines in the pool now */
	int trim_pending;               /* a large job ended: trim memory */
	unsigned long next_id;
	char read_buf[SRV_READ_CHUNK];
	char transport[320];
};

/* ---- flags and state ---------------------------------------------------- */

static inline int conn_has(const conn *c, unsigned f)
{
	return (c->flags & f) != 0;
}

static inline void conn_set(conn *c, unsigned f)
{
	c->flags |= f;
}

static inline void conn_clear(conn *c, unsigned f)
{
	c->flags &= ~f;
}

static inline int conn_closing(const conn *c)
{
	return c->state == CONN_CLOSING;
}

static inline int conn_eof(const conn *c)
{
	return c->state >= CONN_EOF;
}

/* Moves the state forward (never back). */
static inline void conn_set_state(conn *c, enum conn_state st)
{
	assert(st >= c->state);
	c->state = st;
}

/* ---- conn.c: lifetime and accounting ------------------------------------ */

/* A new connection with one reference (its own, dropped by
 * srv__conn_close), linked and counted. NULL when out of memory. */
conn *srv__conn_new(srv *s, enum conn_kind kind);
/* Takes a reference: whoever runs code on a connection after something
 * that may close it holds one. */
void srv__conn_ref(conn *c);
/* Drops a reference; the last one unlinks and frees the connection. */
void srv__conn_unref(conn *c);
/* The close callback of every connection handle (drops its reference). */
void srv__on_handle_closed(uv_handle_t *h);
/* Closes the connection. It may be freed before this returns unless the
 * caller holds a reference. */
void srv__conn_close(conn *c);
/* Closes the connection once its input has ended and everything read is
 * answered and written. */
void srv__conn_check_done(conn *c);
/* Unsent answer bytes (pending plus the rest of the write in flight). */
size_t srv__conn_unsent(const conn *c);
/* Bytes written to the peer so far, including progress inside a stream
 * write that libuv is still working through. */
uint64_t srv__conn_sent(const conn *c);
/* Brings this connection's share of buffered_bytes up to date and checks
 * the global budget. */
void srv__conn_account(conn *c);

/* ---- peer.c ------------------------------------------------------------- */

/* Finds or makes the connection's peer and counts the connection. */
void srv__peer_attach(conn *c);
void srv__peer_detach(conn *c);
/* Sets conn_cap from --max-connections and the descriptor limit. */
void srv__fd_budget(srv *s);
/* --owner-reserve, with its default (an eighth of --max-connections, at
 * most 16) resolved. */
size_t srv__owner_reserve(const srv_config *cfg);
/* NULL when the (attached, counted) connection may be served; else a
 * short name of the rule that refuses it, with the client's message in
 * `why`. */
const char *srv__admit(conn *c, char *why, size_t size);

/* ---- log.c -------------------------------------------------------------- */

/* 1 when a rate-limited warning may be logged now. */
int srv__ratelimit(srv_ratelimit *rl, uint64_t now_ms);
/* Logs how many were not logged, once their window is over. */
void srv__ratelimit_flush(srv_ratelimit *rl, uint64_t now_ms);

/* ---- read.c ------------------------------------------------------------- */

void srv__read_stop(conn *c);
/* Lingering close of a socket connection whose last bytes are written:
 * shuts down our side (FIN), then discards input until the peer closes,
 * so that a request it sent late cannot turn the close into a reset that
 * destroys the answer unread (a refusal's -32000). timer.c closes it
 * after SRV_LINGER_MS. */
void srv__conn_linger(conn *c);
/* Reads while nothing holds the connection back: its own unsent output,
 * its own buffered input, or the global budget. */
void srv__conn_update_read(conn *c);
/* At shutdown: takes in (keep = 1) or drops (keep = 0) what the kernel
 * already holds for the connection, without waiting. */
void srv__drain_kernel(conn *c, int keep);
/* A connection whose reads wait for the budget and whose peer stopped
 * sending is read again (see read.c). */
void srv__conn_peek_hangup(conn *c);

/* ---- dispatch.c --------------------------------------------------------- */

/* Puts the connection on the ready list when it has lines to take. */
void srv__conn_schedule(conn *c);
void srv__ready_remove(conn *c);
/* The idle handle's callback: one fair pass over the ready list. */
void srv__on_idle(uv_idle_t *h);

/* ---- pool.c ------------------------------------------------------------- */

/* Adds a copy of the line to the connection's window and hands it to the
 * thread pool, or to the pool queue when its peer holds its share of the
 * pool already. `alone`: the line changes or reports the session
 * (rw_proto_classify), so no later line joins the window until it is
 * answered. Returns 0 (the answer, possibly an error, comes back through
 * the connection, in order), or -1 when out of memory, in which case
 * nothing changed. */
int srv__pool_submit(conn *c, const char *line, size_t len, int alone);
/* Adds copies of n > 1 lines, none of them alone
 * (rw_proto_line_shares), to the connection's window as one pool job
 * that answers them in order: a pipelining client's small lines then run
 * on the pool's threads side by side, while the loop reads and writes.
 * Returns 0, or -1 when out of memory (nothing changed). */
int srv__pool_lines(conn *c, const char *const *line, const size_t *len,
                    size_t n);
/* Answers a light line on the loop while earlier lines of the connection
 * are in the pool: the answer waits in the window for theirs. 0, or -1
 * when out of memory (nothing changed). */
int srv__pool_answer(conn *c, const char *line, size_t len);
/* Whether the next line may join a busy connection's window: no line in
 * it runs alone, the next one was not found to need to, and the window
 * has room (as many lines as the pool has threads). */
int srv__pool_can_join(const conn *c);
/* A closing connection's lines leave the pool queue and its answered
 * ones are dropped; those running finish and are freed then. */
void srv__pool_cancel(conn *c);
/* Reads the pool size (UV_THREADPOOL_SIZE) and sets the per-peer share
 * and fewer malloc arenas. Before the first job. */
void srv__pool_init(srv *s);
/* From the tick: samples the resident size, and returns free memory to
 * the system after a large job once the pool is idle. */
void srv__memory_tick(srv *s);

/* ---- write.c ------------------------------------------------------------ */

/* Hands pending answers to a write when none is in flight. */
void srv__conn_flush(conn *c);
/* Pauses or resumes the connection on its unsent answers. */
void srv__update_pause(conn *c);

/* ---- timer.c ------------------------------------------------------------ */

void srv__on_tick(uv_timer_t *t);

/* ---- stdio.c ------------------------------------------------------------ */

int srv__start_stdio(srv *s);

/* ---- sockpath.c --------------------------------------------------------- */

/* "uid N (name)", or "uid N" when the name is unknown. */
void srv__owner_text(uid_t uid, char *buf, size_t size);
/* Resolves the default socket path into `path` and prepares its
 * directory (creates /tmp/rockwire-<euid> 0700 when missing; checks the
 * directory with lstat: not a symlink, owned by us, not group or world
 * writable). Returns an SRV_EXIT_* code, after logging why it is not
 * SRV_EXIT_OK. */
int srv__default_socket(char *path, size_t size);
/* Checks what lstat found at a socket path we are to listen on: only a
 * socket owned by our effective uid may be probed and reclaimed; a
 * symlink, another kind of file or another user's socket is refused,
 * naming its owner. Returns 0, or -1 after logging. */
struct stat;
int srv__check_existing(const char *path, const struct stat *st);

/* ---- listen.c ----------------------------------------------------------- */

/* Starts every listener; returns an SRV_EXIT_* code. */
int srv__start_listeners(srv *s);
/* Accepts what waits in listeners that deferred accepting (too many
 * refusals in flight). */
void srv__listen_resume(srv *s);
/* 1 for 127.0.0.0/8, ::1 and ::ffff:127.0.0.0/104. */
struct sockaddr;
#if RW_WITH_TCP
int srv__is_loopback(const struct sockaddr *sa);
#endif
void srv__close_listeners(srv *s);

/* ---- shutdown.c --------------------------------------------------------- */

/* When stopping and nothing is left, closes the daemon's own handles so
 * the loop ends. */
void srv__maybe_finish(srv *s);
void srv__close_all(srv *s);
void srv__notify_stopping(srv *s);
void srv__on_signal(uv_signal_t *h, int signum);

#endif
