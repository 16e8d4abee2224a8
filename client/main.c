/* rockwire: the command-line client. A thin getopt_long front end over the
 * protocol: global options, then a subcommand. */
#include <getopt.h>
#include <stdio.h>
#include <string.h>

#include "cli.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

static void usage(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire [--socket PATH] [--spawn] [--daemon PATH] "
	    "COMMAND ...\n"
	    "\n"
	    "Commands:\n"
	    "  call METHOD [name=value ...] [--params JSON] [--table]\n"
	    "        one request; values are JSON when they parse as JSON,\n"
	    "        else strings; dotted names nest (units.velocity=km/s)\n"
	    "  send [FILE|-]\n"
	    "        NDJSON requests in, responses out, pipelined\n"
	    "  log FILE.las [-o OUT] [--format las|csv] [--curve IN=MNEM]\n"
	    "        [--set NAME=VALUE] [--params JSON] [--summary] ...\n"
	    "        well-log file through log.process, curves added\n"
	    "  feed [--connect HOST:PORT] [--map CODE=INPUT] [--format\n"
	    "        ndjson|csv] [--set NAME=VALUE] ...\n"
	    "        WITS level 0 stream (stdin or TCP) through log.process\n"
	    "\n"
	    "Connects to --socket PATH or the default socket\n"
	    "($XDG_RUNTIME_DIR/rockwire.sock, else /tmp/rockwire-<uid>.sock);\n"
	    "when nothing listens there, or with --spawn, runs a private\n"
	    "rockwired --stdio (found via --daemon, $ROCKWIRED, beside this\n"
	    "program, or PATH).\n"
	    "\n"
	    "Exit codes: 0 ok, 1 the daemon answered with an error, 2 usage,\n"
	    "3 no daemon reachable, 4 I/O failure.\n"
	    "\n"
	    "Screening estimates only: not a substitute for qualified review,\n"
	    "local regulations and licensed practice; never the sole basis\n"
	    "for well-control decisions.\n");
}

int main(int argc, char **argv)
{
	static const struct option opts[] = {
	    {"socket", required_argument, NULL, 's'},
	    {"spawn", no_argument, NULL, 'S'},
	    {"daemon", required_argument, NULL, 'd'},
	    {"help", no_argument, NULL, 'h'},
	    {"version", no_argument, NULL, 'V'},
	    {NULL, 0, NULL, 0},
	};
	cli_opts o;
	int c;

	memset(&o, 0, sizeof o);
	o.argv0 = argv[0];
	/* Stop at the first non-option: the subcommand owns the rest. */
	while ((c = getopt_long(argc, argv, "+", opts, NULL)) != -1) {
		switch (c) {
		case 's': o.socket_path = optarg; break;
		case 'S': o.spawn = 1; break;
		case 'd': o.daemon_path = optarg; break;
		case 'h': usage(stdout); return 0;
		case 'V': printf("rockwire %s\n", RW_VERSION); return 0;
		default: usage(stderr); return CLI_EXIT_USAGE;
		}
	}
	if (optind >= argc) {
		usage(stderr);
		return CLI_EXIT_USAGE;
	}
	const char *cmd = argv[optind];
	argc -= optind + 1;
	argv += optind + 1;
	/* COMMAND --help: that command's usage on stdout. */
	if (argc > 0 &&
	    (strcmp(argv[0], "--help") == 0 || strcmp(argv[0], "-h") == 0)) {
		if (strcmp(cmd, "log") == 0)
			cli_usage_log(stdout);
		else if (strcmp(cmd, "feed") == 0)
			cli_usage_feed(stdout);
		else if (strcmp(cmd, "call") == 0 || strcmp(cmd, "send") == 0)
			usage(stdout);
		else
			goto unknown;
		return CLI_EXIT_OK;
	}
	if (strcmp(cmd, "call") == 0)
		return cli_cmd_call(&o, argc, argv);
	if (strcmp(cmd, "send") == 0)
		return cli_cmd_send(&o, argc, argv);
	if (strcmp(cmd, "log") == 0)
		return cli_cmd_log(&o, argc, argv);
	if (strcmp(cmd, "feed") == 0)
		return cli_cmd_feed(&o, argc, argv);
unknown:
	fprintf(stderr, "rockwire: unknown command '%s'\n", cmd);
	usage(stderr);
	return CLI_EXIT_USAGE;
}
