/* The server layer: accepts connections (Unix sockets, loopback TCP,
 * sockets handed over by the service manager, or stdio), frames lines,
 * hands each to the protocol layer, writes responses in order with
 * backpressure and bounds, and shuts down cleanly on signals. */
#ifndef RW_SRV_H
#define RW_SRV_H

#include <stddef.h>

#include "rw_features.h"

#include "proto/proto.h"

/* Exit codes of rockwired (documented in --help and DEVELOPERS.md). */
#define SRV_EXIT_OK      0 /* clean shutdown */
#define SRV_EXIT_USAGE   2 /* bad command line */
#define SRV_EXIT_LISTEN  3 /* cannot listen: path busy, live daemon, ... */
#define SRV_EXIT_RUNTIME 4 /* loop or I/O failure */

/* Listeners given on the command line, plus those passed in by socket
 * activation (LISTEN_FDS), at most this many in all. */
#define SRV_MAX_LISTEN 8

/* owner_reserve's default: 16, or an eighth of max_conns when less. */
#define SRV_RESERVE_AUTO ((size_t)-1)

#define SRV_POOL_LINES_MAX 1024

typedef struct srv_config {
	int use_stdio;       /* serve stdin/stdout */
	unsigned std_closed; /* from srv_fix_std_fds */
	/* "unix:PATH" or "tcp:HOST:PORT" ("tcp:[V6]:PORT"); HOST is a
	 * numeric address or "localhost". */
	const char *listen[SRV_MAX_LISTEN];
	int n_listen;
	int allow_remote;     /* TCP on a non-loopback address */
	unsigned socket_mode; /* Unix socket permission bits (0600) */
	int allow_world;      /* socket_mode may give others access */
	/* listen(2) backlog (the kernel caps it at net.core.somaxconn) */
	int backlog;
	/* log file (reopened on SIGHUP), or NULL for stderr */
	const char *log_path;
	/* connections per peer other than the owner (0 = no cap) */
	size_t max_per_peer;
	/* connection slots only the owner's uid may take */
	size_t owner_reserve;
	/* idle timeout of TCP connections (0 = only --idle-timeout) */
	double tcp_idle_timeout_s;
	int lines_per_turn; /* fairness: lines dispatched per turn */
	/* lines at least this long go to the thread pool (0 = never) */
	size_t offload_bytes;
	/* shorter lines whose work estimate (rw_proto_cost) is at least
	 * this go there too (0 = never) */
	size_t offload_work;
	/* pool lines one peer may hold at once (0 = pool size - 1) */
	size_t pool_per_peer;
	/* thread pool size (0 = UV_THREADPOOL_SIZE, else libuv's 4) */
	size_t threads;
	/* a pipelining connection's small lines go to the pool this many
	 * at a time (0 = never; at most SRV_POOL_LINES_MAX) */
	size_t pool_lines;
	proto_limits limits;
} srv_config;

void srv_config_default(srv_config *cfg);
/* Opens /dev/null on any of the descriptors 0, 1, 2 that is closed, so
 * that no socket or loop descriptor opened later takes its number (logs
 * or answers would go into it). Call first thing in main. Returns a bit
 * set of those that were closed (1 = stdin, 2 = stdout, 4 = stderr), for
 * srv_config.std_closed. */
unsigned srv_fix_std_fds(void);
/* Writes the default socket path into buf: $XDG_RUNTIME_DIR/rockwire.sock
 * when XDG_RUNTIME_DIR is an absolute path, else
 * /tmp/rockwire-<euid>/rockwire.sock (protocol-docs/limits.md, "Default
 * socket path"). Returns 0, or -1 when the path does not fit in `size` or
 * in a socket address. Checks nothing on disk. */
int srv_default_socket_path(char *buf, size_t size);
/* Checks a --listen spec before anything is opened: unix:PATH with a path
 * that fits a socket address, or tcp:HOST:PORT / tcp:[V6]:PORT with a
 * decimal port in 1..65535 (0 picks a free one). Returns 0, or -1 with
 * the reason in err. The host is checked when listening. */
int srv_check_listen_spec(const char *spec, char *err, size_t size);
/* Runs the daemon until it is told to stop (signal, or EOF in stdio mode).
 * With no listener and no --stdio, listens on sockets passed by the
 * service manager, else on the default socket path. Returns an
 * SRV_EXIT_* code. */
int srv_run(const srv_config *cfg);

/* Points stderr at the log file `path` (append, created 0600). Returns 0,
 * or -1 with errno set, stderr unchanged. */
int srv_log_open(const char *path);
/* One log line on stderr: "TIME rockwired[pid]: level: message". */
void srv_log(const char *level, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

#endif
