/* `rockwire feed`: a WITS level 0 stream, from stdin or a TCP server
 * (--connect HOST:PORT), through log.process one depth sample at a time.
 * Record/item codes map to inputs (--map 0108=depth ...). Each record that
 * carries the depth item completes a sample: that record's mapped items
 * plus those of records without depth received since the previous sample.
 * Each sample is answered by one NDJSON line (or CSV row). Malformed
 * records are skipped and counted, never fatal; at most FEED_INFLIGHT
 * samples are in flight and input is not read while the pipe is full, so
 * memory stays bounded however long the feed runs. */
#include <errno.h>
#include <math.h>
#include <netdb.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "logio.h"
#include "wits.h"

#define WHO           "rockwire feed"
#define FEED_INFLIGHT 64
#define MAX_MAP       32
#define READ_CHUNK    4096

static const char *const feed_inputs[] = {
    "depth", "dtp",      "dts",      "vp",          "vs",
    "rhob",  "drho",     "caliper",  "bit_size",    "gr",
    "vsh",   "porosity", "pressure", "temperature", NULL};

/* Default map (rockwire's own choice for its demo streams, not the WITS
 * item tables: map your feed explicitly). */
static const struct {
	unsigned code;
	const char *input;
} default_map[] = {
    {108, "depth"}, {113, "dtp"},     {114, "dts"},      {115, "rhob"},
    {116, "drho"},  {117, "caliper"}, {118, "bit_size"}, {119, "gr"},
};

typedef struct feed {
	unsigned code[MAX_MAP];
	int input[MAX_MAP]; /* index into feed_inputs */
	size_t nmap;
	int depth_input;
	/* the sample being assembled */
	double val[16];
	int have[16];
	int seen[16]; /* the stream has carried this input */
	int any;
	/* pipeline */
	cli_buf wbuf;
	size_t inflight;
	unsigned long next_id;
	char *base;
	int csv, csv_header;
	/* counts */
	unsigned long samples_sent, answered, rejected, no_depth_records,
	    unmapped_records;
	int broken;
} feed;

static int input_index(const char *name)
{
	for (int i = 0; feed_inputs[i]; i++)
		if (strcmp(feed_inputs[i], name) == 0)
			return i;
	return -1;
}

static int add_map(feed *f, const char *arg)
{
	const char *eq = strchr(arg, '=');
	unsigned code = 0;
	int in;

	if (!eq || eq - arg != 4) {
		fprintf(stderr,
		        WHO ": --map wants RRII=INPUT with a 4-digit "
		            "record+item code, not '%s'\n",
		        arg);
		return -1;
	}
	for (int i = 0; i < 4; i++) {
		if (arg[i] < '0' || arg[i] > '9') {
			fprintf(stderr, WHO ": --map: '%.4s' is not 4 digits\n",
			        arg);
			return -1;
		}
		code = code * 10 + (unsigned)(arg[i] - '0');
	}
	in = input_index(eq + 1);
	if (in < 0 && strcmp(eq + 1, "none") != 0) {
		fprintf(stderr,
		        WHO ": --map: unknown input '%s'; inputs: depth "
		            "dtp dts vp vs rhob drho caliper bit_size "
		            "gr vsh porosity pressure temperature\n",
		        eq + 1);
		return -1;
	}
	for (size_t i = 0; i < f->nmap; i++)
		if (f->code[i] == code || (in >= 0 && f->input[i] == in)) {
			/* A later --map replaces an earlier (or default) one
			 * for the same code or input. */
			f->code[i] = f->code[--f->nmap];
			f->input[i] = f->input[f->nmap];
			i--;
		}
	if (in < 0)
		return 0;
	if (f->nmap == MAX_MAP) {
		fprintf(stderr, WHO ": too many --map entries\n");
		return -1;
	}
	f->code[f->nmap] = code;
	f->input[f->nmap++] = in;
	return 0;
}

/* Queues the assembled sample as one log.process request. Every mapped
 * input the stream has carried so far goes as a one-element array, [null]
 * when this sample lacks it, so the daemon flags it missing rather than
 * refusing the sample. */
static int send_sample(feed *f)
{
	char head[128], num[48];
	int first = 1;

	snprintf(head, sizeof head,
	         "{\"jsonrpc\":\"2.0\",\"id\":%lu,\"method\":\"log.process\","
	         "\"params\":{",
	         f->next_id++);
	if (cli__buf_puts(&f->wbuf, head))
		return -1;
	if (*f->base) {
		if (cli__buf_puts(&f->wbuf, f->base))
			return -1;
		first = 0;
	}
	for (size_t m = 0; m < f->nmap; m++) {
		int in = f->input[m];
		size_t n;
		if (!f->seen[in])
			continue; /* never in this stream: not an input */
		snprintf(head, sizeof head, "%s\"%s\":[", first ? "" : ",",
		         feed_inputs[in]);
		first = 0;
		n = cli__fmt_num(num, f->have[in] ? f->val[in] : NAN, 0, NULL);
		if (cli__buf_puts(&f->wbuf, head) ||
		    cli__buf_put(&f->wbuf, num, n) ||
		    cli__buf_put(&f->wbuf, "]", 1))
			return -1;
	}
	if (cli__buf_puts(&f->wbuf, "}}\n"))
		return -1;
	f->inflight++;
	f->samples_sent++;
	memset(f->have, 0, sizeof f->have);
	f->any = 0;
	return 0;
}

static void on_record(void *ctx, const cli_wits_item *items, size_t n)
{
	feed *f = ctx;
	int depth_here = 0, mapped = 0;

	for (size_t i = 0; i < n; i++)
		for (size_t m = 0; m < f->nmap; m++)
			if (f->code[m] == items[i].code) {
				f->val[f->input[m]] = items[i].value;
				f->have[f->input[m]] = 1;
				f->seen[f->input[m]] = 1;
				mapped = f->any = 1;
				if (f->input[m] == f->depth_input)
					depth_here = 1;
			}
	if (!mapped) {
		f->unmapped_records++;
		return;
	}
	if (!depth_here) {
		f->no_depth_records++;
		return;
	}
	if (send_sample(f))
		f->broken = 1;
}

/* Replaces one-element arrays by their element. */
static void flatten(cJSON *res)
{
	cJSON *m, *next;
	for (m = res->child; m; m = next) {
		next = m->next;
		if (cJSON_IsArray(m) && cJSON_GetArraySize(m) == 1) {
			cJSON *e = cJSON_DetachItemFromArray(m, 0);
			cJSON_ReplaceItemInObjectCaseSensitive(res, m->string,
			                                       e);
		}
	}
}

static void print_csv(feed *f, const cJSON *res)
{
	const cJSON *m, *units = cJSON_GetObjectItemCaseSensitive(res, "units");
	char num[48];
	int first = 1;

	if (!f->csv_header) {
		cJSON_ArrayForEach(m, res)
		{
			const cJSON *u;
			if (!cJSON_IsNumber(m) && !cJSON_IsNull(m))
				continue;
			if (strcmp(m->string, "n") == 0)
				continue;
			u = cJSON_GetObjectItemCaseSensitive(units, m->string);
			printf("%s%s%s%s%s", first ? "" : ",", m->string,
			       cJSON_IsString(u) ? "[" : "",
			       cJSON_IsString(u) ? u->valuestring : "",
			       cJSON_IsString(u) ? "]" : "");
			first = 0;
		}
		putchar('\n');
		f->csv_header = 1;
		first = 1;
	}
	cJSON_ArrayForEach(m, res)
	{
		if (!cJSON_IsNumber(m) && !cJSON_IsNull(m))
			continue;
		if (strcmp(m->string, "n") == 0)
			continue;
		cli__fmt_num(num, cJSON_IsNumber(m) ? m->valuedouble : NAN, 0,
		             "");
		printf("%s%s", first ? "" : ",", num);
		first = 0;
	}
	putchar('\n');
}

static int on_line(void *ctx, char *line, size_t len)
{
	feed *f = ctx;
	cJSON *r = cJSON_ParseWithLength(line, len);
	cJSON *res, *err;

	if (f->inflight)
		f->inflight--;
	if (!r) {
		fprintf(stderr, WHO ": unreadable response from the daemon\n");
		f->rejected++;
		return 0;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (err || !cJSON_IsObject(res)) {
		const cJSON *d = cJSON_GetObjectItemCaseSensitive(err, "data");
		const cJSON *p = cJSON_GetObjectItemCaseSensitive(d, "param");
		const cJSON *why =
		    cJSON_GetObjectItemCaseSensitive(d, "reason");
		if (f->rejected < 5)
			fprintf(stderr, WHO ": sample refused: %s: %s\n",
			        cJSON_IsString(p) ? p->valuestring : "?",
			        cJSON_IsString(why) ? why->valuestring : "?");
		f->rejected++;
		cJSON_Delete(r);
		return 0;
	}
	f->answered++;
	flatten(res);
	cJSON_DeleteItemFromObjectCaseSensitive(res, "n");
	if (f->csv) {
		print_csv(f, res);
	} else {
		char *s = cJSON_PrintUnformatted(res);
		if (s) {
			fputs(s, stdout);
			fputc('\n', stdout);
			cJSON_free(s);
		}
	}
	cJSON_Delete(r);
	return ferror(stdout) ? -1 : 0;
}

static int tcp_connect(const char *hp)
{
	char host[256];
	const char *colon = strrchr(hp, ':');
	struct addrinfo hints, *res, *ai;
	int fd = -1, e;

	if (!colon || colon == hp || (size_t)(colon - hp) >= sizeof host ||
	    !colon[1]) {
		fprintf(stderr, WHO ": --connect wants HOST:PORT, not '%s'\n",
		        hp);
		return -2;
	}
	memcpy(host, hp, (size_t)(colon - hp));
	host[colon - hp] = '\0';
	memset(&hints, 0, sizeof hints);
	hints.ai_socktype = SOCK_STREAM;
	e = getaddrinfo(host, colon + 1, &hints, &res);
	if (e) {
		fprintf(stderr, WHO ": %s: %s\n", hp, gai_strerror(e));
		return -1;
	}
	for (ai = res; ai; ai = ai->ai_next) {
		fd = socket(ai->ai_family, ai->ai_socktype | SOCK_CLOEXEC,
		            ai->ai_protocol);
		if (fd < 0)
			continue;
		if (connect(fd, ai->ai_addr, ai->ai_addrlen) == 0)
			break;
		close(fd);
		fd = -1;
	}
	freeaddrinfo(res);
	if (fd < 0)
		fprintf(stderr, WHO ": cannot connect to %s: %s\n", hp,
		        strerror(errno));
	return fd;
}

void cli_usage_feed(FILE *f)
{
	fprintf(f, "usage: rockwire feed [--connect HOST:PORT] "
	           "[--map RRII=INPUT|none ...] [--format ndjson|csv]\n"
	           "       [--set NAME=VALUE ...]\n");
}

int cli_cmd_feed(const cli_opts *o, int argc, char **argv)
{
	static cli_wits_parser wp; /* fixed buffers: keep off the stack */
	feed f;
	cJSON *params = cJSON_CreateObject();
	const char *connect_to = NULL;
	char buf[READ_CHUNK];
	cli_conn c;
	int in_fd = 0, in_open = 1, rc = CLI_EXIT_IO, connected = 0;
	int gr_explicit = 0;

	memset(&f, 0, sizeof f);
	if (!params)
		return CLI_EXIT_IO;
	for (size_t i = 0; i < sizeof default_map / sizeof default_map[0];
	     i++) {
		f.code[f.nmap] = default_map[i].code;
		f.input[f.nmap++] = input_index(default_map[i].input);
	}
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i], *v = i + 1 < argc ? argv[i + 1] : NULL;
		if (strcmp(a, "--map") == 0 && v) {
			if (add_map(&f, v))
				goto usage;
			if (strcmp(strchr(v, '=') + 1, "gr") == 0)
				gr_explicit = 1;
			i++;
		} else if (strcmp(a, "--connect") == 0 && v) {
			connect_to = v;
			i++;
		} else if (strcmp(a, "--set") == 0 && v) {
			if (cli__param_set(params, v, WHO))
				goto usage;
			i++;
		} else if (strcmp(a, "--format") == 0 && v) {
			if (strcmp(v, "csv") == 0)
				f.csv = 1;
			else if (strcmp(v, "ndjson") != 0) {
				fprintf(stderr,
				        WHO ": --format ndjson or csv\n");
				goto usage;
			}
			i++;
		} else {
			fprintf(stderr, WHO ": unknown argument %s\n", a);
			goto usage;
		}
	}
	f.depth_input = input_index("depth");
	/* Gamma ray needs gr_clean and gr_shale: without them the default
	 * gr mapping is dropped (an explicit --map keeps it). */
	if (!gr_explicit &&
	    !cJSON_GetObjectItemCaseSensitive(params, "gr_clean"))
		for (size_t m = 0; m < f.nmap; m++)
			if (f.input[m] == input_index("gr")) {
				f.code[m] = f.code[--f.nmap];
				f.input[m] = f.input[f.nmap];
				break;
			}
	{
		int has_depth = 0;
		for (size_t m = 0; m < f.nmap; m++) {
			has_depth |= f.input[m] == f.depth_input;
			if (cJSON_GetObjectItemCaseSensitive(
			        params, feed_inputs[f.input[m]])) {
				fprintf(stderr,
				        WHO ": %s is both mapped and --set; "
				            "drop one\n",
				        feed_inputs[f.input[m]]);
				goto usage;
			}
		}
		if (!has_depth) {
			fprintf(stderr, WHO ": no code is mapped to depth; a "
			                    "sample is completed by its depth "
			                    "item\n");
			goto usage;
		}
	}
	{
		char *s = cJSON_PrintUnformatted(params);
		size_t n;
		if (!s)
			goto out;
		n = strlen(s);
		memmove(s, s + 1, n - 2);
		s[n - 2] = '\0';
		f.base = s;
	}
	if (connect_to) {
		in_fd = tcp_connect(connect_to);
		if (in_fd == -2) {
			in_fd = -1;
			goto usage;
		}
		if (in_fd < 0) {
			rc = CLI_EXIT_CONNECT;
			goto out;
		}
	}
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	cli_wits_init(&wp, on_record, &f);
	for (;;) {
		int ready = 0, st;
		int room = f.inflight < FEED_INFLIGHT &&
		           f.wbuf.len - f.wbuf.off < 65536;
		if (!in_open && !f.inflight && f.wbuf.off == f.wbuf.len)
			break;
		st = cli__pipe_step(&c, &f.wbuf, f.inflight > 0,
		                    in_open && room ? in_fd : -1, &ready, -1,
		                    on_line, &f);
		if (st < 0)
			goto out;
		if (st == 1 && (f.inflight || f.wbuf.off < f.wbuf.len)) {
			fprintf(stderr, WHO ": the daemon closed the "
			                    "connection early\n");
			goto out;
		}
		if (ready) {
			ssize_t n = read(in_fd, buf, sizeof buf);
			if (n < 0 && errno == EINTR)
				continue;
			if (n <= 0) {
				if (n < 0)
					fprintf(stderr, WHO ": read: %s\n",
					        strerror(errno));
				in_open = 0;
				cli_wits_finish(&wp);
			} else {
				cli_wits_feed(&wp, buf, (size_t)n);
			}
			if (f.broken) {
				fprintf(stderr, WHO ": out of memory\n");
				goto out;
			}
		}
	}
	rc = f.rejected ? CLI_EXIT_RPC_ERROR : CLI_EXIT_OK;
out:
	fflush(stdout);
	{
		const cli_wits_stats *s = cli_wits_get_stats(&wp);
		fprintf(stderr,
		        "feed: %lu records, %lu samples sent, %lu answered, "
		        "%lu refused; skipped: %lu malformed records, %lu "
		        "unterminated, %lu empty, %lu bad lines, %lu long "
		        "lines, %lu lines outside records; %lu text items "
		        "not used; %lu records without mapped items, %lu "
		        "held for the next depth\n",
		        s->records, f.samples_sent, f.answered, f.rejected,
		        s->bad_records, s->unterminated, s->empty, s->bad_lines,
		        s->long_lines, s->garbage, s->text_items,
		        f.unmapped_records, f.no_depth_records);
	}
	if (f.any)
		fprintf(stderr, WHO ": values after the last depth item were "
		                    "not sent (no depth completed them)\n");
	if (connected)
		cli_disconnect(&c);
	if (in_fd > 0)
		close(in_fd);
	cli__buf_free(&f.wbuf);
	cJSON_free(f.base);
	cJSON_Delete(params);
	return rc;
usage:
	cli_usage_feed(stderr);
	rc = CLI_EXIT_USAGE;
	goto out;
}
