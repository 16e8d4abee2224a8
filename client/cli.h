/* The rockwire client's internals: a connection to a daemon (a Unix socket,
 * or a private rockwired --stdio child on a pipe), line I/O over it, and
 * the subcommands. Plain POSIX; the client never links the compute core,
 * it only speaks the protocol. */
#ifndef RW_CLI_H
#define RW_CLI_H

#include <stddef.h>
#include <stdio.h>
#include <sys/types.h>

typedef struct cli_opts {
	const char *socket_path; /* NULL: the default path */
	int spawn;               /* always start a private daemon */
	const char *daemon_path; /* rockwired to spawn, NULL: find it */
	const char *argv0;
} cli_opts;

/* A duplex line connection. rfd == wfd for a socket. */
typedef struct cli_conn {
	int rfd, wfd;
	pid_t child; /* > 0 for a spawned daemon */
	char *rbuf;  /* received bytes not yet returned as lines */
	size_t rlen, rcap, rstart;
	int eof;
	char desc[256];
} cli_conn;

/* Connects as cli_opts says: the socket when something listens there,
 * otherwise (or with spawn) a rockwired --stdio child. Returns 0, or -1
 * with a message on stderr. */
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
 * timeout_ms >= 0 and nothing arrives in time, returns -2. */
int cli_read_line(cli_conn *c, char **line, size_t *len, int timeout_ms);
/* Pipes request lines from in_fd to the daemon and responses to out_fd
 * at the same time (pipelined; no waiting for each answer). Returns 0 or
 * -1. */
int cli_pump(cli_conn *c, int in_fd, int out_fd);

int cli_cmd_call(const cli_opts *o, int argc, char **argv);
int cli_cmd_send(const cli_opts *o, int argc, char **argv);
/* `rockwire log FILE.las` (client/logcmd.c) and `rockwire feed`
 * (client/feed.c); argv holds the subcommand's arguments. */
int cli_cmd_log(const cli_opts *o, int argc, char **argv);
/* Usage lines of the subcommands, for errors and `COMMAND --help`. */
void cli_usage_log(FILE *f);
void cli_usage_feed(FILE *f);
int cli_cmd_feed(const cli_opts *o, int argc, char **argv);

/* Exit codes of rockwire (documented in --help). */
#define CLI_EXIT_OK        0
#define CLI_EXIT_RPC_ERROR 1 /* the daemon answered with an error */
#define CLI_EXIT_USAGE     2
#define CLI_EXIT_CONNECT   3 /* no daemon reachable or spawnable */
#define CLI_EXIT_IO        4

#endif
