/* The rockwire client's internals: a connection to a daemon (a Unix socket,
 * or a private rockwired --stdio child on a pipe), line I/O over it, and
 * the subcommands. Plain POSIX; the client never links the compute core,
 * it only speaks the protocol. */
#ifndef RW_CLI_H
#define RW_CLI_H

#include <stddef.h>
#include <stdio.h>
#include <sys/types.h>

/* Longest response (and request) line the client handles unless
 * --max-line says otherwise: generous (a 10^6-sample log.process answer
 * is about 250 MB) but finite. */
#define CLI_DEFAULT_MAX_LINE (512u * 1024u * 1024u)
/* Default --timeout of `rockwire call`, in milliseconds. */
#define CLI_DEFAULT_CALL_TIMEOUT_MS 60000

typedef struct cli_opts {
	const char *socket_path; /* NULL: the default path */
	int spawn;               /* always start a private daemon */
	const char *daemon_path; /* rockwired to spawn, NULL: find it */
	const char *argv0;
	long timeout_ms; /* --timeout before the command; -1 not given */
	size_t max_line; /* response line bound (bytes) */
} cli_opts;

/* A duplex line connection. rfd == wfd for a socket. */
typedef struct cli_conn {
	int rfd, wfd;
	pid_t child; /* > 0 for a spawned daemon */
	char *rbuf;  /* received bytes not yet returned as lines */
	size_t rlen, rcap, rstart;
	size_t max_line; /* 0: CLI_DEFAULT_MAX_LINE */
	int eof;
	char desc[256];
} cli_conn;

/* Writes the default socket path into buf: $XDG_RUNTIME_DIR/rockwire.sock,
 * else /tmp/rockwire-<uid>/rockwire.sock. */
void cli__default_socket(char *buf, size_t size);
/* Checks that the socket at path (when it exists) and the directories it
 * lives in are safe to trust: the socket is a socket, not a symbolic
 * link, owned by this user (or root) and not writable by others; every
 * directory above it is owned by this user or root and, when others may
 * write to it, has the sticky bit; with is_default, the directory holding
 * the socket is owned by this user and open to nobody else (mode 0700).
 * Returns 1 when the socket exists and is safe, 0 when it (or its
 * directory) does not exist, -1 when it must not be used, with the reason
 * in why. */
int cli__socket_safe(const char *path, int is_default, char *why,
                     size_t whylen);

/* Connects as cli_opts says: the socket when something listens there,
 * otherwise (or with spawn) a rockwired --stdio child. A socket that
 * cli__socket_safe refuses, or whose daemon runs as another user, is an
 * error, never a reason to fall back. Returns 0, or -1 with a message on
 * stderr. */
int cli_connect(const cli_opts *o, cli_conn *c);
/* Ends the write side (the daemon then answers what it has and closes). */
void cli_close_write(cli_conn *c);
/* Closes everything and reaps a child; returns the child's exit status
 * (0 when none). */
int cli_disconnect(cli_conn *c);
/* Writes all of buf (blocking). 0 or -1. */
int cli_write_all(cli_conn *c, const char *buf, size_t n);
/* Reads the next response line (without '\n') into *line (owned by c,
 * valid until the next call). Returns 1, 0 at EOF, -1 on error. When
 * timeout_ms >= 0 and nothing arrives in time, returns -2; a line longer
 * than the connection's max_line returns -3 (the connection is then
 * unusable). */
int cli_read_line(cli_conn *c, char **line, size_t *len, int timeout_ms);

int cli_cmd_call(const cli_opts *o, int argc, char **argv);
int cli_cmd_send(const cli_opts *o, int argc, char **argv);
/* `rockwire log FILE.las` (client/logcmd.c) and `rockwire feed`
 * (client/feed.c); argv holds the subcommand's arguments. */
int cli_cmd_log(const cli_opts *o, int argc, char **argv);
int cli_cmd_feed(const cli_opts *o, int argc, char **argv);
/* `rockwire synthetic FILE` (client/synthcmd.c). */
int cli_cmd_synthetic(const cli_opts *o, int argc, char **argv);
void cli_usage_synthetic(FILE *f);
/* Full help of the subcommands, for `COMMAND --help` (and the first
 * lines, for usage errors). */
void cli_usage_log(FILE *f);
void cli_usage_feed(FILE *f);
void cli_usage_call(FILE *f);
void cli_usage_send(FILE *f);

/* Exit codes of rockwire (documented in --help and DEVELOPERS.md). */
#define CLI_EXIT_OK        0
#define CLI_EXIT_RPC_ERROR 1 /* the daemon answered with an error */
#define CLI_EXIT_USAGE     2
#define CLI_EXIT_CONNECT   3 /* no daemon reachable, or refused as unsafe */
#define CLI_EXIT_IO                                                            \
	4                  /* I/O failure, or an answer that is not a          \
	                    * valid JSON-RPC response */
#define CLI_EXIT_INPUT   5 /* malformed input file or stream */
#define CLI_EXIT_TIMEOUT 6 /* no answer within --timeout */

#endif
