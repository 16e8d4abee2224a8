/* rockwired: the rockwire daemon. Parses the command line and runs the
 * server on a Unix socket or on stdin/stdout. */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "proto/proto.h"
#include "server/srv.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

static void usage(FILE *f)
{
	fprintf(f,
		"usage: rockwired [--stdio | --socket PATH] [options]\n"
		"\n"
		"Rock-physics calculator daemon: line-delimited JSON-RPC 2.0.\n"
		"\n"
		"  --stdio              serve requests on stdin, answer on stdout\n"
		"  --socket PATH        listen on a Unix socket (default:\n"
		"                       $XDG_RUNTIME_DIR/rockwire.sock, else\n"
		"                       /tmp/rockwire-<uid>.sock)\n"
		"  --socket-mode MODE   octal permission bits (default 0600)\n"
		"  --max-line BYTES     longest request line (default 64 MiB)\n"
		"  --max-samples N      samples per request (default 0 = no limit)\n"
		"  --max-work N         samples x angles per request (0 = none)\n"
		"  --max-batch N        requests per batch (default 10000)\n"
		"  --max-depth N        JSON nesting depth (default 64)\n"
		"  --max-connections N  concurrent connections (default 1024)\n"
		"  --lines-per-turn N   fairness: lines per connection per loop\n"
		"                       turn (default 20)\n"
		"  --offload BYTES      lines this long run in the thread pool\n"
		"                       (default 262144; 0 = never)\n"
		"  --help, --version\n"
		"\n"
		"Exit codes: 0 clean shutdown, 2 usage, 3 cannot listen (path\n"
		"busy or a live daemon on it), 4 runtime failure.\n"
		"Logs go to stderr, one line per event.\n"
		"\n"
		"Screening estimates only: not a substitute for qualified review,\n"
		"local regulations and licensed practice; never the sole basis\n"
		"for well-control decisions.\n");
}

/* Parses a non-negative integer with optional K/M/G suffix (binary). */
static int parse_size(const char *s, size_t *out)
{
	char *end;
	unsigned long long v;

	errno = 0;
	if (!*s || *s == '-')
		return -1;
	v = strtoull(s, &end, 10);
	if (errno || end == s)
		return -1;
	switch (*end) {
	case 'K': case 'k': v <<= 10, end++; break;
	case 'M': case 'm': v <<= 20, end++; break;
	case 'G': case 'g': v <<= 30, end++; break;
	default: break;
	}
	if (*end)
		return -1;
	*out = (size_t)v;
	return 0;
}

int main(int argc, char **argv)
{
	enum { O_MODE = 256, O_LINE, O_SAMPLES, O_WORK, O_BATCH, O_DEPTH,
	       O_CONNS, O_TURN, O_OFFLOAD };
	static const struct option opts[] = {
		{"stdio", no_argument, NULL, 'i'},
		{"socket", required_argument, NULL, 's'},
		{"socket-mode", required_argument, NULL, O_MODE},
		{"max-line", required_argument, NULL, O_LINE},
		{"max-samples", required_argument, NULL, O_SAMPLES},
		{"max-work", required_argument, NULL, O_WORK},
		{"max-batch", required_argument, NULL, O_BATCH},
		{"max-depth", required_argument, NULL, O_DEPTH},
		{"max-connections", required_argument, NULL, O_CONNS},
		{"lines-per-turn", required_argument, NULL, O_TURN},
		{"offload", required_argument, NULL, O_OFFLOAD},
		{"help", no_argument, NULL, 'h'},
		{"version", no_argument, NULL, 'V'},
		{NULL, 0, NULL, 0},
	};
	srv_config cfg;
	char path[512];
	size_t v;
	int o;

	gsl_set_error_handler_off();
	srv_config_default(&cfg);
	while ((o = getopt_long(argc, argv, "", opts, NULL)) != -1) {
		const char *name = NULL;
		switch (o) {
		case 'i': cfg.use_stdio = 1; continue;
		case 's': cfg.socket_path = optarg; continue;
		case 'h': usage(stdout); return 0;
		case 'V': printf("rockwired %s\n", RW_VERSION); return 0;
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
		default: usage(stderr); return 2;
		}
		if (parse_size(optarg, &v) < 0) {
			fprintf(stderr, "rockwired: %s: '%s' is not a "
				"non-negative integer (K, M, G suffixes "
				"allowed)\n", name, optarg);
			return 2;
		}
		switch (o) {
		case O_LINE: cfg.limits.max_line = v; break;
		case O_SAMPLES: cfg.limits.max_samples = v; break;
		case O_WORK: cfg.limits.max_work = v; break;
		case O_BATCH: cfg.limits.max_batch = v; break;
		case O_DEPTH: cfg.limits.max_depth = v > 10000 ? 10000 : (int)v;
			break;
		case O_CONNS: cfg.limits.max_conns = v; break;
		case O_TURN: cfg.lines_per_turn = v ? (int)(v > 100000 ? 100000 : v) : 1;
			break;
		case O_OFFLOAD: cfg.offload_bytes = v; break;
		}
		if ((o == O_LINE || o == O_DEPTH || o == O_CONNS) && v == 0) {
			fprintf(stderr, "rockwired: %s must be at least 1\n",
				name);
			return 2;
		}
	}
	if (optind < argc) {
		fprintf(stderr, "rockwired: unexpected argument '%s'\n",
			argv[optind]);
		usage(stderr);
		return 2;
	}
	if (cfg.use_stdio && cfg.socket_path) {
		fprintf(stderr, "rockwired: --stdio and --socket exclude each "
			"other\n");
		return 2;
	}
	if (!cfg.use_stdio && !cfg.socket_path)
		cfg.socket_path = srv_default_socket_path(path, sizeof path);
	return srv_run(&cfg);
}
