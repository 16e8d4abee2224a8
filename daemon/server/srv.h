/* The server layer: accepts connections (Unix socket, stdio, and later
 * TCP), frames lines, hands each to the protocol layer, writes responses
 * in order with backpressure, and shuts down cleanly on signals. */
#ifndef RW_SRV_H
#define RW_SRV_H

#include <stddef.h>

#include "proto/proto.h"

/* Exit codes of rockwired (documented in --help and DEVELOPERS.md). */
#define SRV_EXIT_OK 0       /* clean shutdown */
#define SRV_EXIT_USAGE 2    /* bad command line */
#define SRV_EXIT_LISTEN 3   /* cannot listen: path busy, live daemon, ... */
#define SRV_EXIT_RUNTIME 4  /* loop or I/O failure */

typedef struct srv_config {
	int use_stdio;              /* serve stdin/stdout */
	const char *socket_path;    /* Unix socket to listen on, or NULL */
	unsigned socket_mode;       /* permission bits, default 0600 */
	int lines_per_turn;         /* fairness: lines dispatched per turn */
	size_t offload_bytes;       /* lines at least this long go to the
				       thread pool (0 = never) */
	double drain_timeout_s;     /* on SIGTERM: give up after this */
	proto_limits limits;
} srv_config;

void srv_config_default(srv_config *cfg);
/* The default socket path: $XDG_RUNTIME_DIR/rockwire.sock, else
 * /tmp/rockwire-<uid>.sock. Writes into buf; returns buf. */
char *srv_default_socket_path(char *buf, size_t size);
/* Runs the daemon until it is told to stop (signal, or EOF in stdio mode).
 * Returns an SRV_EXIT_* code. */
int srv_run(const srv_config *cfg);

/* One log line on stderr: "rockwired[pid]: level: message". */
void srv_log(const char *level, const char *fmt, ...)
	__attribute__((format(printf, 2, 3)));

#endif
