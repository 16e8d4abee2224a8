/* The protocol layer as the server sees it: one JSON-RPC 2.0 request line
 * in, zero or one response line out, with no socket involved. The server
 * owns one proto_ctx per daemon and one proto_session per connection. */
#ifndef RW_PROTO_H
#define RW_PROTO_H

#include <stddef.h>
#include <stdint.h>

/* JSON-RPC 2.0 error codes, shared by the protocol and the server. */
#define PROTO_PARSE_ERROR      -32700
#define PROTO_INVALID_REQUEST  -32600
#define PROTO_METHOD_NOT_FOUND -32601
#define PROTO_INVALID_PARAMS   -32602
#define PROTO_INTERNAL_ERROR   -32603
/* Application codes (-32000..-32099), documented in protocol-docs. */
#define PROTO_SERVER_BUSY    -32000
#define PROTO_LIMIT_EXCEEDED -32001

/* A growable output buffer. `oom` is set (and further appends ignored) when
 * an allocation fails or the buffer would pass `limit` (0 = no limit). */
typedef struct proto_buf {
	char *data;
	size_t len, cap, limit;
	int oom;
} proto_buf;

void proto_buf_init(proto_buf *b);
/* Frees the storage; the buffer is then empty and reusable. */
void proto_buf_free(proto_buf *b);
/* Hands the storage to the caller (free() it); the buffer is left empty. */
char *proto_buf_take(proto_buf *b, size_t *len);
int proto_buf_reserve(proto_buf *b, size_t extra);
void proto_buf_append(proto_buf *b, const char *s, size_t n);

/* Limits the protocol layer knows about. The server enforces the ones on
 * bytes and connections; the protocol enforces the per-request ones and
 * reports all of them in service.info. */
typedef struct proto_limits {
	size_t max_line;        /* bytes per request line */
	size_t max_samples;     /* samples per request (0 = no limit) */
	size_t max_work;        /* samples x angles per request (0 = none) */
	size_t max_batch;       /* requests in one batch array */
	int max_depth;          /* JSON nesting depth */
	size_t max_conns;       /* concurrent connections */
	size_t out_high_water;  /* unsent bytes per connection: stop reading */
	size_t out_hard_limit;  /* unsent bytes per connection past which a
	                           client that stops taking bytes for
	                           stall_timeout_s is closed */
	size_t global_budget;   /* buffered bytes over all connections */
	double idle_timeout_s;  /* 0 = off */
	double stall_timeout_s; /* slow-reader rule window */
	double drain_timeout_s; /* on SIGTERM: give up after this */
	size_t max_session_bytes; /* session defaults over all sessions */
	int threads;              /* worker threads for one large request
	                             (0 = one per online CPU, 1 = none) */
} proto_limits;

/* Sets the defaults documented in protocol-docs/limits.md. */
void proto_limits_default(proto_limits *lim);

/* Server-side counters the protocol reports in service.info. The server
 * updates them from the loop thread; readers may be other threads. */
typedef struct proto_server_stats {
	uint64_t connections_total;
	uint64_t connections_open;
	uint64_t connections_refused;
	uint64_t connections_dropped; /* accept failed (out of descriptors):
	                                 closed unanswered */
	uint64_t connections_closed_slow;
	uint64_t connections_closed_idle;
	uint64_t lines_oversized;
	uint64_t bytes_in, bytes_out;
	uint64_t buffered_bytes;
	uint64_t reads_paused;
	uint64_t pool_waits;            /* lines that waited for their peer's
	                                   share of the thread pool */
	uint64_t pool_overlapped;       /* lines taken while an earlier line
	                                   of the connection was in the pool */
	uint64_t pool_line_groups;      /* groups of --pool-lines small lines
	                                   handed to the pool as one job */
	uint64_t memory_rss_bytes;      /* resident size (sampled 4 per s) */
	uint64_t memory_trims;          /* free memory returned after large
	                                   requests (malloc_trim) */
	uint64_t memory_released_bytes; /* resident bytes those released */
	const char *transport;          /* "stdio", "unix:PATH", ... */
	/* The server's own settings, reported in service.info's limits
	 * (set once at start; `set` 0 when no server runs). */
	struct {
		int set;
		size_t connection_cap; /* max_conns, lowered by ulimit -n */
		size_t max_per_peer;   /* 0 = no cap */
		size_t owner_reserve;  /* slots kept for the owner's uid */
		double tcp_idle_timeout_s;
		int lines_per_turn;
		size_t offload_bytes, offload_work;
		size_t pool_threads, pool_per_peer;
		size_t pool_lines; /* small lines handed over at a time */
		int backlog;
	} settings;
} proto_server_stats;

typedef struct proto_ctx proto_ctx;
typedef struct proto_session proto_session;

/* Creates the daemon-wide context (limits are copied). Returns NULL when
 * out of memory; free with proto_ctx_free (NULL is a no-op). */
proto_ctx *proto_ctx_new(const proto_limits *lim);
void proto_ctx_free(proto_ctx *ctx);
/* The server's counters inside ctx, for the server to update. */
proto_server_stats *proto_ctx_server_stats(proto_ctx *ctx);
const proto_limits *proto_ctx_limits(const proto_ctx *ctx);

/* Bytes held by session defaults over all sessions of ctx (they count
 * against the server's buffer budget too). */
size_t proto_ctx_session_bytes(const proto_ctx *ctx);

/* A per-connection session (units and other defaults). Returns NULL when
 * out of memory; free with proto_session_free (NULL is a no-op). */
proto_session *proto_session_new(proto_ctx *ctx);
void proto_session_free(proto_session *s);

/* Handles one request line (without its '\n'; a trailing '\r' is
 * tolerated). Appends the response line, '\n' terminated, to `out`, or
 * nothing for a notification, an all-notification batch or a blank line.
 * Returns 0, or -1 when `out` ran out of memory (out->oom set). Safe to
 * call from worker threads: lines of one session that are not alone
 * (rw_proto_classify) may run at once, an alone one needs the session to
 * itself. */
int rw_proto_handle(proto_session *s, const char *line, size_t len,
                    proto_buf *out);

/* rw_proto_handle for the event loop: answers the line when its work
 * (rw_proto_cost) is below `offload` and returns 0 (-1 when out of
 * memory), or leaves `out` alone and returns 1 so the caller can run the
 * line elsewhere (rw_proto_handle on a worker thread), 2 when the line
 * must also run alone (see rw_proto_classify); offload 0 answers every
 * line. A line without large arrays is parsed once for both; lines that
 * do not parse are answered here. The same threading rule as
 * rw_proto_cost. */
int rw_proto_handle_light(proto_session *s, const char *line, size_t len,
                          size_t offload, proto_buf *out);

/* Estimates the work of a request line in sample evaluations (samples x
 * angles and other broadcast dimensions, over every request of a batch,
 * counting parameters the session supplies), without running it, so the
 * server can decide to run it off the event loop. Lines that do not
 * parse, or name no known method, cost 1. Reads the session: call it
 * from the thread that owns the session, with no alone line (see
 * rw_proto_classify) of it in flight. */
size_t rw_proto_cost(proto_session *s, const char *line, size_t len);
/* rw_proto_cost, and *alone set when a request of the line names a
 * session method (session.set, service.info, ...): such a line changes
 * or reports the session, so it must not run while another line of the
 * session does. Every other line only reads the session, and lines of one
 * session that are not alone may run side by side on worker threads. */
size_t rw_proto_classify(proto_session *s, const char *line, size_t len,
                         int *alone);
/* 1 when the line surely names no session method, from its text alone
 * (no parse): it holds no backslash (so no escaped name) and no session
 * method's name anywhere. Such a line only reads the session and may run
 * beside other lines of it; 0 says nothing (the line may still share).
 * Any thread. */
int rw_proto_line_shares(const char *line, size_t len);

/* Appends an error response with id null: used by the server for lines it
 * refuses before parsing (too long). `param` and `reason` go into
 * error.data; either may be NULL. Counts the error. */
void proto_error_line(proto_ctx *ctx, proto_buf *out, int code,
                      const char *param, const char *reason);

/* The published caution text (also in README and service.info). */
extern const char proto_caution[];

#endif
