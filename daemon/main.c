/* rockwired: the rockwire daemon. Parses the command line and runs the
 * server on Unix sockets, loopback TCP, sockets passed by the service
 * manager, or stdin/stdout. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "proto/proto.h"
#include "server/srv.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

/* The optional parts built in (CMake options RW_WITH_TCP and
 * RW_WITH_SYSTEMD; service.info's "features" lists the same). */
static const char features[] = "unix, stdio"
#if RW_WITH_TCP
                               ", tcp"
#endif
#if RW_WITH_SYSTEMD
                               ", systemd"
#endif
    ;
static const char left_out[] = ""
#if !RW_WITH_TCP
                               "tcp"
#endif
#if !RW_WITH_TCP && !RW_WITH_SYSTEMD
                               ", "
#endif
#if !RW_WITH_SYSTEMD
                               "systemd"
#endif
    ;
#if !RW_WITH_TCP
static const char no_tcp[] = "this rockwired was built without TCP (cmake "
                             "-DRW_WITH_TCP=OFF); rebuild with "
                             "-DRW_WITH_TCP=ON";
#endif

static void usage(FILE *f)
{
	fputs(
	    "usage: rockwired [--stdio | --socket PATH | --listen SPEC...]"
	    " [options]\n"
	    "\n"
	    "Rock-physics calculator daemon: line-delimited JSON-RPC 2.0.\n"
	    "\n"
	    "  --stdio              serve requests on stdin, answer on stdout\n"
	    "  --socket PATH        listen on a Unix socket (same as --listen\n"
	    "                       unix:PATH; at most 107 bytes). With no\n"
	    "                       listener given: sockets passed by the\n"
	    "                       service manager (LISTEN_FDS), else\n"
	    "                       $XDG_RUNTIME_DIR/rockwire.sock, else\n"
	    "                       /tmp/rockwire-<uid>/rockwire.sock (the\n"
	    "                       directory made 0700 and checked)\n"
	    "  --listen SPEC        unix:PATH or tcp:HOST:PORT (HOST numeric\n"
	    "                       or localhost, [V6] for IPv6; PORT "
	    "1..65535,\n"
	    "                       0 picks one); repeatable, up to 8\n"
	    "  --allow-remote       allow TCP beyond loopback (the protocol\n"
	    "                       has no authentication)\n"
	    "  --socket-mode MODE   octal permission bits (default 0600); at\n"
	    "                       most the owner's group (0660)\n"
	    "  --allow-world-access let --socket-mode give others access\n"
	    "                       (0666): any local user can connect\n"
	    "  --backlog N          pending connections the kernel queues\n"
	    "                       (default 4096, capped by somaxconn)\n"
	    "  --log FILE           log to FILE instead of stderr; SIGHUP\n"
	    "                       reopens it\n"
	    "\n",
	    f);
	fputs(
	    /* split: C guarantees string literals of 4095 bytes only */
	    "Limits (see protocol-docs/limits.md; all shown by "
	    "service.info):\n"
	    "  --max-line BYTES     longest request line (default 64M)\n"
	    "  --max-samples N      samples per request (default 0 = no "
	    "limit)\n"
	    "  --max-work N         samples x angles per request (0 = none)\n"
	    "  --max-batch N        requests per batch (default 10000)\n"
	    "  --max-depth N        JSON nesting depth (default 64)\n"
	    "  --max-connections N  concurrent connections (default 1024)\n"
	    "  --max-per-peer N     connections per peer: a uid on Unix\n"
	    "                       sockets, an address on TCP (all of\n"
	    "                       loopback is one); the daemon's own uid\n"
	    "                       is exempt (default 128; 0 = no cap)\n"
	    "  --owner-reserve N    connections kept for the daemon's own\n"
	    "                       uid on Unix sockets (default 16, or an\n"
	    "                       eighth of --max-connections if less)\n"
	    "  --high-water BYTES   unsent answers (or buffered input) per\n"
	    "                       connection before reading pauses\n"
	    "                       (default 1M)\n"
	    "  --max-output BYTES   hard bound on unsent answers per\n"
	    "                       connection: past it a client must keep\n"
	    "                       reading (default 32M; 0 = off)\n"
	    "  --stall-timeout S    ... at least 64 KiB per S seconds, or it\n"
	    "                       is closed as slow (default 30)\n"
	    "  --budget BYTES       bytes buffered over all connections\n"
	    "                       before all reads wait (default 2G; 0 =\n"
	    "                       off)\n"
	    "  --idle-timeout S     close a connection idle this long\n"
	    "                       (default 0 = never)\n"
	    "  --tcp-idle-timeout S the same for TCP connections, which any\n"
	    "                       local user can open (default 120; the\n"
	    "                       shorter of the two applies; 0 = off)\n"
	    "  --drain-timeout S    on SIGTERM, close what is left after S\n"
	    "                       seconds (default 8)\n"
	    "  --lines-per-turn N   fairness: lines per connection per loop\n"
	    "                       turn (default 20; 16 times as many when\n"
	    "                       no other connection is waiting)\n"
	    "  --offload BYTES      lines this long run in the thread pool\n"
	    "                       (default 256K; 0 = never)\n"
	    "  --offload-work N     so do shorter ones whose work (samples\n"
	    "                       x angles, session defaults included) is\n"
	    "                       at least N (default 1000; 0 = never)\n"
	    "  --threads N          thread pool size (default 4, or\n"
	    "                       UV_THREADPOOL_SIZE; at most 1024)\n"
	    "  --pool-per-peer N    pool threads one peer may hold at once\n"
	    "                       (default: the pool size - 1, at least 1)\n"
	    "  --pool-lines N       a pipelining connection's small lines go\n"
	    "                       to the pool N at a time, so that one\n"
	    "                       client uses every core (default 64, at\n"
	    "                       most 1024; 0 = never)\n"
	    "  --help, --version\n",
	    f);
	fputs("\n"
	      "Signals: SIGTERM/SIGINT stop accepting, answer what was read\n"
	      "and exit 0 (a second one closes at once); SIGHUP reopens the\n"
	      "log. With NOTIFY_SOCKET set, READY=1 and STOPPING=1 are sent.\n"
	      "Exit codes: 0 clean shutdown, 2 usage (or a feature this build\n"
	      "lacks), 3 cannot listen (path busy or a live daemon on it), 4\n"
	      "runtime failure.\n"
	      "Logs go to stderr (or --log), one line per event.\n",
	      f);
	fprintf(f, "Built in: %s; left out: %s (CMake RW_WITH_* options).\n",
	        features, *left_out ? left_out : "nothing");
	fputs(
	    "\n"
	    "Screening estimates only: not a substitute for qualified review,\n"
	    "local regulations and licensed practice; never the sole basis\n"
	    "for well-control decisions.\n",
	    f);
}

/* Parses a non-negative integer with optional K/M/G suffix (binary). */
static int parse_size(const char *s, size_t *out)
{
	char *end;
	unsigned long long v;
	int shift = 0;

	errno = 0;
	if (*s < '0' || *s > '9')
		return -1;
	v = strtoull(s, &end, 10);
	if (errno || end == s)
		return -1;
	switch (*end) {
	case 'K':
	case 'k': shift = 10, end++; break;
	case 'M':
	case 'm': shift = 20, end++; break;
	case 'G':
	case 'g': shift = 30, end++; break;
	default: break;
	}
	if (*end || v > ((unsigned long long)SIZE_MAX >> shift))
		return -1;
	*out = (size_t)(v << shift);
	return 0;
}

/* Parses seconds: a finite decimal in [0, 1e6]. */
static int parse_seconds(const char *s, double *out)
{
	char *end;
	double v;

	errno = 0;
	if (!*s)
		return -1;
	v = strtod(s, &end);
	if (errno || *end || !isfinite(v) || v < 0 || v > 1e6)
		return -1;
	*out = v;
	return 0;
}

int main(int argc, char **argv)
{
	enum {
		O_MODE = 256,
		O_LINE,
		O_SAMPLES,
		O_WORK,
		O_BATCH,
		O_DEPTH,
		O_CONNS,
		O_TURN,
		O_OFFLOAD,
		O_HIGH,
		O_HARD,
		O_BUDGET,
		O_LISTEN,
		O_REMOTE,
		O_LOG,
		O_IDLE,
		O_STALL,
		O_DRAIN,
		O_WORLD,
		O_BACKLOG,
		O_PER_PEER,
		O_RESERVE,
		O_TCP_IDLE,
		O_OFFLOAD_WORK,
		O_THREADS,
		O_POOL_PEER,
		O_POOL_LINES
	};
	static const struct option opts[] = {
	    {"stdio", no_argument, NULL, 'i'},
	    {"socket", required_argument, NULL, 's'},
	    {"listen", required_argument, NULL, O_LISTEN},
	    {"allow-remote", no_argument, NULL, O_REMOTE},
	    {"socket-mode", required_argument, NULL, O_MODE},
	    {"allow-world-access", no_argument, NULL, O_WORLD},
	    {"backlog", required_argument, NULL, O_BACKLOG},
	    {"log", required_argument, NULL, O_LOG},
	    {"max-line", required_argument, NULL, O_LINE},
	    {"max-samples", required_argument, NULL, O_SAMPLES},
	    {"max-work", required_argument, NULL, O_WORK},
	    {"max-batch", required_argument, NULL, O_BATCH},
	    {"max-depth", required_argument, NULL, O_DEPTH},
	    {"max-connections", required_argument, NULL, O_CONNS},
	    {"max-per-peer", required_argument, NULL, O_PER_PEER},
	    {"owner-reserve", required_argument, NULL, O_RESERVE},
	    {"tcp-idle-timeout", required_argument, NULL, O_TCP_IDLE},
	    {"high-water", required_argument, NULL, O_HIGH},
	    {"max-output", required_argument, NULL, O_HARD},
	    {"budget", required_argument, NULL, O_BUDGET},
	    {"idle-timeout", required_argument, NULL, O_IDLE},
	    {"stall-timeout", required_argument, NULL, O_STALL},
	    {"drain-timeout", required_argument, NULL, O_DRAIN},
	    {"lines-per-turn", required_argument, NULL, O_TURN},
	    {"offload", required_argument, NULL, O_OFFLOAD},
	    {"offload-work", required_argument, NULL, O_OFFLOAD_WORK},
	    {"threads", required_argument, NULL, O_THREADS},
	    {"pool-per-peer", required_argument, NULL, O_POOL_PEER},
	    {"pool-lines", required_argument, NULL, O_POOL_LINES},
	    {"help", no_argument, NULL, 'h'},
	    {"version", no_argument, NULL, 'V'},
	    {NULL, 0, NULL, 0},
	};
	srv_config cfg;
	static char unix_spec[SRV_MAX_LISTEN][600];
	char err[300];
	size_t v;
	double secs;
	int o;

	unsigned std_closed = srv_fix_std_fds();

	gsl_set_error_handler_off();
	srv_config_default(&cfg);
	cfg.std_closed = std_closed;
	while ((o = getopt_long(argc, argv, "", opts, NULL)) != -1) {
		const char *name = NULL;
		switch (o) {
		case 'i': cfg.use_stdio = 1; continue;
		case 's':
		case O_LISTEN:
			if (cfg.n_listen >= SRV_MAX_LISTEN) {
				fprintf(stderr,
				        "rockwired: at most %d "
				        "listeners\n",
				        SRV_MAX_LISTEN);
				return 2;
			}
			if (o == 's') {
				if (strlen(optarg) >= 500) {
					fprintf(stderr,
					        "rockwired: --socket: path of "
					        "%zu bytes is longer than a "
					        "socket address holds\n",
					        strlen(optarg));
					return 2;
				}
				snprintf(unix_spec[cfg.n_listen],
				         sizeof unix_spec[0], "unix:%s",
				         optarg);
				cfg.listen[cfg.n_listen] =
				    unix_spec[cfg.n_listen];
			} else {
				cfg.listen[cfg.n_listen] = optarg;
			}
			if (srv_check_listen_spec(cfg.listen[cfg.n_listen], err,
			                          sizeof err) < 0) {
				fprintf(stderr, "rockwired: %s: %s\n",
				        o == 's' ? "--socket" : "--listen",
				        err);
				return 2;
			}
			cfg.n_listen++;
			continue;
		case O_WORLD: cfg.allow_world = 1; continue;
		case O_REMOTE:
#if !RW_WITH_TCP
			fprintf(stderr, "rockwired: --allow-remote: %s\n",
			        no_tcp);
			return 2;
#endif
			cfg.allow_remote = 1;
			continue;
		case O_LOG:
			if (!*optarg) {
				fprintf(stderr, "rockwired: --log: empty "
				                "path\n");
				return 2;
			}
			cfg.log_path = optarg;
			continue;
		case 'h': usage(stdout); return 0;
		case 'V':
			printf("rockwired %s (%s)\n", RW_VERSION, features);
			return 0;
		case O_MODE: {
			char *end;
			unsigned long m = strtoul(optarg, &end, 8);
			if (*optarg == '\0' || *end || m > 0777 ||
			    (m & 0600) != 0600) {
				fprintf(stderr,
				        "rockwired: --socket-mode: '%s' is not "
				        "an octal mode that keeps owner rw "
				        "(e.g. 0600, 0660)\n",
				        optarg);
				return 2;
			}
			cfg.socket_mode = (unsigned)m;
			continue;
		}
		case O_IDLE:
		case O_STALL:
		case O_DRAIN:
		case O_TCP_IDLE:
			name = o == O_IDLE       ? "--idle-timeout"
			       : o == O_STALL    ? "--stall-timeout"
			       : o == O_TCP_IDLE ? "--tcp-idle-timeout"
			                         : "--drain-timeout";
#if !RW_WITH_TCP
			if (o == O_TCP_IDLE) {
				fprintf(stderr,
				        "rockwired: --tcp-idle-timeout: %s\n",
				        no_tcp);
				return 2;
			}
#endif
			if (parse_seconds(optarg, &secs) < 0) {
				fprintf(stderr,
				        "rockwired: %s: '%s' is not a "
				        "number of seconds in [0, 1e6]\n",
				        name, optarg);
				return 2;
			}
			if (o == O_IDLE)
				cfg.limits.idle_timeout_s = secs;
			else if (o == O_STALL)
				cfg.limits.stall_timeout_s = secs;
			else if (o == O_TCP_IDLE)
				cfg.tcp_idle_timeout_s = secs;
			else
				cfg.limits.drain_timeout_s = secs;
			continue;
		default: break;
		}
		switch (o) {
		case O_LINE: name = "--max-line"; break;
		case O_SAMPLES: name = "--max-samples"; break;
		case O_WORK: name = "--max-work"; break;
		case O_BATCH: name = "--max-batch"; break;
		case O_DEPTH: name = "--max-depth"; break;
		case O_CONNS: name = "--max-connections"; break;
		case O_TURN: name = "--lines-per-turn"; break;
		case O_OFFLOAD: name = "--offload"; break;
		case O_OFFLOAD_WORK: name = "--offload-work"; break;
		case O_THREADS: name = "--threads"; break;
		case O_POOL_PEER: name = "--pool-per-peer"; break;
		case O_POOL_LINES: name = "--pool-lines"; break;
		case O_HIGH: name = "--high-water"; break;
		case O_HARD: name = "--max-output"; break;
		case O_BUDGET: name = "--budget"; break;
		case O_BACKLOG: name = "--backlog"; break;
		case O_PER_PEER: name = "--max-per-peer"; break;
		case O_RESERVE: name = "--owner-reserve"; break;
		default: usage(stderr); return 2;
		}
		if (parse_size(optarg, &v) < 0) {
			fprintf(stderr,
			        "rockwired: %s: '%s' is not a "
			        "non-negative integer (K, M, G suffixes "
			        "allowed)\n",
			        name, optarg);
			return 2;
		}
		if ((o == O_LINE || o == O_DEPTH || o == O_CONNS ||
		     o == O_HIGH || o == O_BACKLOG || o == O_THREADS ||
		     o == O_POOL_PEER) &&
		    v == 0) {
			fprintf(stderr, "rockwired: %s must be at least 1\n",
			        name);
			return 2;
		}
		switch (o) {
		case O_LINE: cfg.limits.max_line = v; break;
		case O_SAMPLES: cfg.limits.max_samples = v; break;
		case O_WORK: cfg.limits.max_work = v; break;
		case O_BATCH: cfg.limits.max_batch = v; break;
		case O_DEPTH:
			cfg.limits.max_depth = v > 10000 ? 10000 : (int)v;
			break;
		case O_CONNS: cfg.limits.max_conns = v; break;
		case O_TURN:
			cfg.lines_per_turn =
			    v ? (int)(v > 100000 ? 100000 : v) : 1;
			break;
		case O_OFFLOAD: cfg.offload_bytes = v; break;
		case O_OFFLOAD_WORK: cfg.offload_work = v; break;
		case O_THREADS: cfg.threads = v; break;
		case O_POOL_PEER: cfg.pool_per_peer = v; break;
		case O_POOL_LINES:
			if (v > SRV_POOL_LINES_MAX) {
				fprintf(stderr,
				        "rockwired: --pool-lines must be at "
				        "most %d (lines a group)\n",
				        SRV_POOL_LINES_MAX);
				return 2;
			}
			cfg.pool_lines = v;
			break;
		case O_HIGH: cfg.limits.out_high_water = v; break;
		case O_HARD: cfg.limits.out_hard_limit = v; break;
		case O_BUDGET: cfg.limits.global_budget = v; break;
		case O_BACKLOG: cfg.backlog = v > 65535 ? 65535 : (int)v; break;
		case O_PER_PEER: cfg.max_per_peer = v; break;
		case O_RESERVE: cfg.owner_reserve = v; break;
		}
	}
	if (optind < argc) {
		fprintf(stderr, "rockwired: unexpected argument '%s'\n",
		        argv[optind]);
		usage(stderr);
		return 2;
	}
	if (cfg.use_stdio && cfg.n_listen) {
		fprintf(stderr, "rockwired: --stdio excludes --socket and "
		                "--listen\n");
		return 2;
	}
	if (cfg.threads > 1024) {
		fprintf(stderr, "rockwired: --threads: at most 1024\n");
		return 2;
	}
	if (cfg.owner_reserve != SRV_RESERVE_AUTO &&
	    cfg.owner_reserve >= cfg.limits.max_conns) {
		fprintf(stderr,
		        "rockwired: --owner-reserve (%zu) must be below "
		        "--max-connections (%zu)\n",
		        cfg.owner_reserve, cfg.limits.max_conns);
		return 2;
	}
	if ((cfg.socket_mode & 0007) && !cfg.allow_world) {
		fprintf(stderr,
		        "rockwired: --socket-mode %04o gives every local user "
		        "access to an unauthenticated protocol; it may widen "
		        "only to the group (e.g. 0660), or add "
		        "--allow-world-access\n",
		        cfg.socket_mode);
		return 2;
	}
	if (cfg.limits.out_hard_limit &&
	    cfg.limits.out_hard_limit < cfg.limits.out_high_water) {
		fprintf(stderr,
		        "rockwired: --max-output (%zu) must be at "
		        "least --high-water (%zu)\n",
		        cfg.limits.out_hard_limit, cfg.limits.out_high_water);
		return 2;
	}
	if (cfg.limits.out_hard_limit && cfg.limits.stall_timeout_s <= 0) {
		fprintf(stderr, "rockwired: --stall-timeout must be above 0 "
		                "(use --max-output 0 to turn the rule off)\n");
		return 2;
	}
	return srv_run(&cfg);
}
