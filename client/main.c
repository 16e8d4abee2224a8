/* rockwire: the command-line client. A thin getopt_long front end over the
 * protocol: global options, then a subcommand. */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "rpc.h"

/* CMake's RW_WITH_PLOT (1 or 0); a build without CMake gets it. */
#ifndef RW_WITH_PLOT
#define RW_WITH_PLOT 1
#endif
#if RW_WITH_PLOT
#include "plot.h"
#endif

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

static void usage(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire [--socket PATH] [--spawn] [--daemon PATH]\n"
	    "                [--timeout SECONDS] [--max-line BYTES] COMMAND "
	    "...\n"
	    "\n"
	    "Commands (COMMAND --help gives each one's full help):\n"
	    "  call METHOD [name=value ...] [--format json|table|csv] ...\n"
	    "        one request; METHOD --help lists its parameters\n"
	    "  send [FILE|-]\n"
	    "        NDJSON requests in, answers out, pipelined and checked\n"
	    "  log FILE [-o OUT] [--format las|csv] [--set NAME=VALUE] ...\n"
	    "        a LAS 2.0 / 3.0 or CSV well log through log.process\n"
	    "  feed --map CODE=INPUT ... [--connect HOST:PORT] ...\n"
	    "        a WITS level 0 stream (stdin or TCP) through log.process\n"
	    "  synthetic FILE [--angles 0:30:5] [--segy OUT.sgy] ...\n"
	    "        synthetic traces of a well log as CSV and SEG-Y\n"
#if RW_WITH_PLOT
	    "  plot KIND INPUT -o OUT.png|svg|pdf ...\n"
	    "        pictures: avo, ig, cross, tracks, sweep\n"
#else
	    "  plot (not built: cmake -DRW_WITH_PLOT=OFF)\n"
#endif
	    "\n"
	    "Options:\n"
	    "  --socket PATH    the daemon's socket (default\n"
	    "                   $XDG_RUNTIME_DIR/rockwire.sock, else\n"
	    "                   /tmp/rockwire-<uid>/rockwire.sock)\n"
	    "  --spawn          always run a private rockwired --stdio\n"
	    "  --daemon PATH    the rockwired to spawn\n"
	    "  --timeout S      for call and send: give up after S seconds\n"
	    "                   without an answer (call's default is 60)\n"
	    "  --max-line N     longest answer line accepted (default 512 "
	    "MiB;\n"
	    "                   suffixes K, M, G)\n"
	    "\n"
	    "When nothing listens on the socket, or with --spawn, the client\n"
	    "runs a private rockwired --stdio (found via --daemon, "
	    "$ROCKWIRED,\n"
	    "beside this program, or PATH). It refuses a socket, or a "
	    "directory\n"
	    "above it, that another user owns or everyone may write to, and a\n"
	    "daemon that runs as another user, and says why.\n"
	    "\n"
	    "Exit codes: 0 ok, 1 the daemon answered with an error, 2 usage,\n"
	    "3 no daemon reachable (or refused as unsafe), 4 I/O failure or "
	    "an\n"
	    "answer that is not a valid JSON-RPC response (or left "
	    "unanswered),\n"
	    "5 malformed input file or stream, 6 timeout; a signal ends the\n"
	    "client with that signal.\n"
	    "\n"
	    "Screening estimates only: not a substitute for qualified review,\n"
	    "local regulations and licensed practice; never the sole basis\n"
	    "for well-control decisions.\n");
}

static int parse_bytes(const char *s, size_t *out)
{
	char *end;
	double v = strtod(s, &end);
	double mult = 1;

	if (end == s || v <= 0)
		return -1;
	if (*end == 'K' || *end == 'k')
		mult = 1024, end++;
	else if (*end == 'M' || *end == 'm')
		mult = 1024.0 * 1024, end++;
	else if (*end == 'G' || *end == 'g')
		mult = 1024.0 * 1024 * 1024, end++;
	if (*end || v * mult < 1024 || v * mult > 64.0 * 1024 * 1024 * 1024)
		return -1;
	*out = (size_t)(v * mult);
	return 0;
}

int main(int argc, char **argv)
{
	static const struct option opts[] = {
	    {"socket", required_argument, NULL, 's'},
	    {"spawn", no_argument, NULL, 'S'},
	    {"daemon", required_argument, NULL, 'd'},
	    {"timeout", required_argument, NULL, 't'},
	    {"max-line", required_argument, NULL, 'm'},
	    {"help", no_argument, NULL, 'h'},
	    {"version", no_argument, NULL, 'V'},
	    {NULL, 0, NULL, 0},
	};
	static const char *const commands[] = {"call", "send",      "log",
	                                       "feed", "synthetic", "plot"};
	static const char *const gopts[] = {
	    "--socket",   "--spawn", "--daemon", "--timeout",
	    "--max-line", "--help",  "--version"};
	cli_opts o;
	int c;

	memset(&o, 0, sizeof o);
	o.argv0 = argv[0];
	o.timeout_ms = -1;
	opterr = 0;
	/* Stop at the first non-option: the subcommand owns the rest. */
	while ((c = getopt_long(argc, argv, "+h", opts, NULL)) != -1) {
		switch (c) {
		case 's': o.socket_path = optarg; break;
		case 'S': o.spawn = 1; break;
		case 'd': o.daemon_path = optarg; break;
		case 't':
			if (cli__parse_seconds(optarg, &o.timeout_ms)) {
				fprintf(stderr, "rockwire: --timeout wants "
				                "seconds\n");
				return CLI_EXIT_USAGE;
			}
			break;
		case 'm':
			if (parse_bytes(optarg, &o.max_line)) {
				fprintf(stderr, "rockwire: --max-line wants a "
				                "size from 1K to 64G\n");
				return CLI_EXIT_USAGE;
			}
			break;
		case 'h': usage(stdout); return 0;
		case 'V': printf("rockwire %s\n", RW_VERSION); return 0;
		default:
			if (optind > 0 && optind <= argc &&
			    strncmp(argv[optind - 1], "--", 2) == 0)
				cli__unknown_option(
				    "rockwire", argv[optind - 1], gopts,
				    sizeof gopts / sizeof *gopts);
			else
				usage(stderr);
			return CLI_EXIT_USAGE;
		}
	}
	if (optind >= argc) {
		usage(stderr);
		return CLI_EXIT_USAGE;
	}
	const char *cmd = argv[optind];
	argc -= optind + 1;
	argv += optind + 1;
	int help = argc > 0 && (strcmp(argv[0], "--help") == 0 ||
	                        strcmp(argv[0], "-h") == 0);
	if (strcmp(cmd, "call") == 0) {
		if (help) {
			cli_usage_call(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_call(&o, argc, argv);
	}
	if (strcmp(cmd, "send") == 0) {
		if (help) {
			cli_usage_send(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_send(&o, argc, argv);
	}
	if (strcmp(cmd, "log") == 0) {
		if (help) {
			cli_usage_log(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_log(&o, argc, argv);
	}
	if (strcmp(cmd, "feed") == 0) {
		if (help) {
			cli_usage_feed(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_feed(&o, argc, argv);
	}
	if (strcmp(cmd, "synthetic") == 0) {
		if (help) {
			cli_usage_synthetic(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_synthetic(&o, argc, argv);
	}
	if (strcmp(cmd, "plot") == 0) {
#if RW_WITH_PLOT
		if (help) {
			cli_usage_plot(stdout);
			return CLI_EXIT_OK;
		}
		return cli_cmd_plot(&o, argc, argv);
#else
		fprintf(stderr,
		        "rockwire: plot: this rockwire was built without "
		        "pictures (cmake -DRW_WITH_PLOT=OFF); rebuild with "
		        "-DRW_WITH_PLOT=ON (needs cairo)\n");
		return CLI_EXIT_USAGE;
#endif
	}
	if (strcmp(cmd, "help") == 0) {
		usage(stdout);
		return CLI_EXIT_OK;
	}
	{
		const char *s = cli__suggest(
		    cmd, commands, sizeof commands / sizeof *commands);
		fprintf(stderr, "rockwire: unknown command '%s'%s%s%s\n", cmd,
		        s ? "; did you mean " : "", s ? s : "", s ? "?" : "");
		if (!s)
			usage(stderr);
	}
	return CLI_EXIT_USAGE;
}
