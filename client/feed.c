/* `rockwire feed`: a WITS level 0 stream, from stdin or a TCP server
 * (--connect HOST:PORT), through log.process one depth sample at a time.
 * There is no built-in item map: record/item codes map to inputs with
 * --map 0108=depth or a map file, each with the unit the feed sends (the
 * input's default unit unless given), converted with the daemon's own
 * factors; the map in use is printed at start. A record whose depth item
 * holds a valid depth completes a sample: that record's mapped items plus
 * those of records without depth received since the previous sample. The
 * absent value (-999.25 unless --absent) is missing, never a number.
 * Every completed sample gets exactly one answer line (NDJSON or CSV),
 * flushed as it is written: nulls and QC flags where inputs are missing,
 * and the daemon's error where it refused the sample. Malformed records
 * are skipped and counted, never fatal. A TCP peer that hangs up is
 * reported; --reconnect tries again with a growing pause; an idle timeout
 * reports a feed that has gone quiet. At most FEED_INFLIGHT samples are in
 * flight and input is not read while the pipe is full, so memory stays
 * bounded however long the feed runs.
 *
 * With pressures (--set pressures.depth_is=tvd ...) the answers depend on
 * every sample before them (the running overburden and brine integrals):
 * each answer returns the state token the next sample's request carries,
 * so one request is on the wire at a time and the others wait in the
 * queue; a replay of a log equals the batch (`rockwire log`) sample by
 * sample. The pressure caution is printed at start-up, and the last state
 * at the end, to restart from it. */
#include <errno.h>
#include <math.h>
#include <netdb.h>
#include <poll.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "format.h"
#include "logio.h"
#include "rpc.h"
#include "units.h"
#include "wits.h"

#define WHO           "rockwire feed"
#define FEED_INFLIGHT 64
#define MAX_MAP       32
#define READ_CHUNK    4096
#define N_IN          15
/* Samples one read can complete on top of FEED_INFLIGHT: a record takes
 * at least 13 bytes ("&&\n0108 1\n!!\n"). */
#define QCAP (FEED_INFLIGHT + READ_CHUNK / 13 + 2)

static const char caution[] =
    "screening estimates only: not a substitute for qualified review, "
    "local regulations and licensed practice; never the sole basis for "
    "well-control decisions";

static const struct {
	const char *name, *kind;
} feed_inputs[N_IN] = {
    {"depth", "length"},      {"dtp", "slowness"},
    {"dts", "slowness"},      {"vp", "velocity"},
    {"vs", "velocity"},       {"rhob", "density"},
    {"drho", "density"},      {"caliper", "length"},
    {"bit_size", "length"},   {"gr", "gamma_ray"},
    {"vsh", "fraction"},      {"porosity", "fraction"},
    {"pressure", "pressure"}, {"temperature", "temperature"},
    {"tvd", "length"},
};

typedef struct mapent {
	unsigned code;
	int input;
	char unit[24]; /* "" = the input's default */
	double scale, offset;
	const char *from; /* "--map" or the map file */
	unsigned long line;
} mapent;

typedef struct feed {
	mapent map[MAX_MAP];
	size_t nmap;
	int send[N_IN]; /* inputs sent with every sample */
	double absent;
	/* the sample being assembled */
	double val[N_IN];
	int have[N_IN];
	int any;
	/* pipeline */
	cli_buf wbuf;
	size_t inflight, qhead;
	unsigned long next_id;
	unsigned long qid[QCAP];
	double qdepth[QCAP];
	char *base;
	cJSON *params, *sources;
	int csv, csv_header, qc_names;
	cJSON *columns; /* CSV column names, from the probe */
	cJSON *col_units;
	cli_units units;
	const char *qc[CLI_QC_BITS];
	const cJSON *discover;
	/* counts */
	unsigned long samples_sent, answered, refused, no_depth_records,
	    unmapped_records, absent_values, absent_depth, garbage_items,
	    held_dropped, other_text;
	int broken;
	const char *source;
	/* pressures: the state carried from answer to request */
	int pres, wire, tvd_in;
	double qval[QCAP][N_IN];
	unsigned char qhave[QCAP][N_IN];
	char *token;
	double last_tvd, last_sv;
	char sv_unit[24], depth_unit[24];
} feed;

static volatile sig_atomic_t stop_signal;

static void on_stop(int sig)
{
	stop_signal = sig;
}

static int input_index(const char *name)
{
	for (int i = 0; i < N_IN; i++)
		if (strcmp(feed_inputs[i].name, name) == 0)
			return i;
	return -1;
}

/* One map entry "RRII=INPUT[:UNIT]" (or from a map file "RRII INPUT
 * [UNIT]"). from/line say where it came from. */
static int add_map(feed *f, const char *arg, const char *from,
                   unsigned long line)
{
	char buf[128], *p, *input, *unit = NULL;
	unsigned code = 0;
	int in;

	if (strlen(arg) >= sizeof buf)
		goto bad;
	memcpy(buf, arg, strlen(arg) + 1);
	for (p = buf; *p; p++)
		if (*p == '=' || *p == '\t')
			*p = ' ';
	p = buf;
	while (*p == ' ')
		p++;
	for (int i = 0; i < 4; i++) {
		if (p[i] < '0' || p[i] > '9')
			goto bad;
		code = code * 10 + (unsigned)(p[i] - '0');
	}
	if (p[4] != ' ')
		goto bad;
	input = p + 5;
	while (*input == ' ')
		input++;
	p = input + strcspn(input, " :");
	if (*p) {
		*p++ = '\0';
		while (*p == ' ' || *p == ':')
			p++;
		unit = p;
		p += strcspn(p, " ");
		*p = '\0';
		if (!*unit)
			unit = NULL;
	}
	in = input_index(input);
	if (in < 0 && strcmp(input, "none") != 0) {
		const char *names[N_IN], *s;
		for (int i = 0; i < N_IN; i++)
			names[i] = feed_inputs[i].name;
		s = cli__suggest(input, names, N_IN);
		fprintf(stderr,
		        WHO ": %s%s%.0lu: unknown input '%s'%s%s%s; inputs: "
		            "depth dtp dts vp vs rhob drho caliper bit_size gr "
		            "vsh porosity pressure temperature tvd\n",
		        from, line ? " line " : "", line, input,
		        s ? " (did you mean " : "", s ? s : "", s ? "?)" : "");
		return -1;
	}
	for (size_t i = 0; i < f->nmap; i++)
		if (f->map[i].code == code ||
		    (in >= 0 && f->map[i].input == in)) {
			/* a later entry replaces an earlier one for the same
			 * code or input */
			f->map[i] = f->map[--f->nmap];
			i--;
		}
	if (in < 0)
		return 0;
	if (f->nmap == MAX_MAP) {
		fprintf(stderr, WHO ": too many map entries\n");
		return -1;
	}
	f->map[f->nmap] = (mapent){code, in, "", 1, 0, from, line};
	if (unit)
		snprintf(f->map[f->nmap].unit, sizeof f->map[f->nmap].unit,
		         "%s", unit);
	f->nmap++;
	return 0;
bad:
	fprintf(stderr,
	        WHO ": %s%s%.0lu: a map entry is RRII=INPUT[:UNIT] with a "
	            "4-digit record+item code (e.g. 0108=depth:m), not '%s'\n",
	        from, line ? " line " : "", line, arg);
	return -1;
}

static int read_map_file(feed *f, const char *path)
{
	FILE *fp = fopen(path, "r");
	char line[256];
	unsigned long n = 0;
	int rc = 0;

	if (!fp) {
		fprintf(stderr, WHO ": --map-file %s: %s\n", path,
		        strerror(errno));
		return -1;
	}
	while (fgets(line, sizeof line, fp)) {
		char *p = line, *e;
		n++;
		while (*p == ' ' || *p == '\t')
			p++;
		e = p + strlen(p);
		while (e > p && (e[-1] == '\n' || e[-1] == '\r' ||
		                 e[-1] == ' ' || e[-1] == '\t'))
			*--e = '\0';
		if (!*p || *p == '#')
			continue;
		if (add_map(f, p, path, n)) {
			rc = -1;
			break;
		}
	}
	fclose(fp);
	return rc;
}

/* Unit factors of every map entry, from the daemon's table. */
static int map_units(feed *f)
{
	for (size_t i = 0; i < f->nmap; i++) {
		mapent *m = &f->map[i];
		const char *kind = feed_inputs[m->input].kind;
		cli_kind *k = cli__units_kind(&f->units, kind);
		char list[512];
		if (!m->unit[0]) {
			m->scale = 1;
			m->offset = 0;
			snprintf(m->unit, sizeof m->unit, "%s",
			         k && k->dflt[0] ? k->dflt : "");
			continue;
		}
		if (cli__unit_factor(&f->units, m->unit, kind, NULL, &m->scale,
		                     &m->offset) == 0)
			continue;
		cli__unit_list(&f->units, kind, list, sizeof list);
		fprintf(stderr,
		        WHO ": map %04u=%s: '%s' is not a %s unit; accepted: "
		            "%s\n",
		        m->code, feed_inputs[m->input].name, m->unit, kind,
		        list);
		return -1;
	}
	return 0;
}

/* ---- requests ------------------------------------------------------------ */

/* The parameters as text without their braces, for the requests. */
static int set_base(feed *f)
{
	char *s = cJSON_PrintUnformatted(f->params);
	size_t n;

	if (!s)
		return -1;
	n = strlen(s);
	memmove(s, s + 1, n - 2);
	s[n - 2] = '\0';
	cJSON_free(f->base);
	f->base = s;
	return 0;
}

/* Writes the log.process request of one sample: every input sent as a
 * one-element array, [null] when this sample lacks it, so the daemon
 * flags it missing rather than refusing the sample. */
static int write_sample(feed *f, unsigned long id, const double *val,
                        const unsigned char *have, int probe)
{
	char head[128], num[48];
	int first = 1;

	snprintf(head, sizeof head,
	         "{\"jsonrpc\":\"2.0\",\"id\":%lu,\"method\":\"log.process\","
	         "\"params\":{",
	         id);
	if (cli__buf_puts(&f->wbuf, head))
		return -1;
	if (*f->base) {
		if (cli__buf_puts(&f->wbuf, f->base))
			return -1;
		first = 0;
	}
	for (int in = 0; in < N_IN; in++) {
		size_t n;
		if (!f->send[in])
			continue;
		snprintf(head, sizeof head, "%s\"%s\":[", first ? "" : ",",
		         feed_inputs[in].name);
		first = 0;
		n = cli__fmt_num(num, !probe && have[in] ? val[in] : NAN, 0,
		                 NULL);
		if (cli__buf_puts(&f->wbuf, head) ||
		    cli__buf_put(&f->wbuf, num, n) ||
		    cli__buf_put(&f->wbuf, "]", 1))
			return -1;
	}
	return cli__buf_puts(&f->wbuf, "}}\n");
}

/* Pressures: writes the head of the queue when nothing is on the wire.
 * Its request carries the state the previous answer returned. */
static int pump(feed *f)
{
	if (!f->pres || f->wire || !f->inflight)
		return 0;
	f->wire = 1;
	return write_sample(f, f->qid[f->qhead], f->qval[f->qhead],
	                    f->qhave[f->qhead], 0);
}

/* Queues the assembled sample (or, for the probe, only writes it). */
static int send_sample(feed *f, int probe)
{
	unsigned char have[N_IN];
	size_t k = (f->qhead + f->inflight) % QCAP;

	for (int in = 0; in < N_IN; in++)
		have[in] = (unsigned char)f->have[in];
	if (probe || !f->pres) {
		if (write_sample(f, f->next_id, f->val, have, probe))
			return -1;
	} else {
		memcpy(f->qval[k], f->val, sizeof f->qval[k]);
		memcpy(f->qhave[k], have, sizeof f->qhave[k]);
	}
	if (!probe) {
		f->qid[k] = f->next_id;
		f->qdepth[k] = f->val[0];
		f->inflight++;
		f->samples_sent++;
		memset(f->have, 0, sizeof f->have);
		f->any = 0;
	}
	f->next_id++;
	return probe ? 0 : pump(f);
}

/* Pressures: takes the state of an answer for the next request (the
 * restart values were for the first one only). */
static int take_state(feed *f, const cJSON *res, size_t slot)
{
	const cJSON *st =
	    cJSON_GetObjectItemCaseSensitive(res, "pressure_state");
	const cJSON *tok = cJSON_GetObjectItemCaseSensitive(st, "token");
	const cJSON *sv = cJSON_GetObjectItemCaseSensitive(res, "sv");
	cJSON *pr = cJSON_GetObjectItemCaseSensitive(f->params, "pressures");
	char *t;

	if (cJSON_IsArray(sv))
		sv = cJSON_GetArrayItem(sv, 0);
	if (!cJSON_IsString(tok) || !cJSON_IsObject(pr))
		return 0;
	if (f->token && strcmp(f->token, tok->valuestring) == 0)
		return 0;
	t = strdup(tok->valuestring);
	if (!t)
		return -1;
	free(f->token);
	f->token = t;
	if (cJSON_IsNumber(sv)) {
		f->last_sv = sv->valuedouble;
		f->last_tvd = f->tvd_in >= 0 && f->qhave[slot][f->tvd_in]
		                  ? f->qval[slot][f->tvd_in]
		                  : f->qval[slot][0];
	}
	cJSON_DeleteItemFromObjectCaseSensitive(pr, "resume");
	cJSON_DeleteItemFromObjectCaseSensitive(pr, "state");
	if (!cJSON_AddStringToObject(pr, "state", f->token))
		return -1;
	return set_base(f);
}

static void on_record(void *ctx, const cli_wits_item *items, size_t n)
{
	feed *f = ctx;
	int mapped = 0, depth_item = 0, depth_ok = 0;
	double v[N_IN];
	int got[N_IN] = {0};

	for (size_t i = 0; i < n; i++) {
		int hit = 0;
		for (size_t m = 0; m < f->nmap; m++) {
			const mapent *e = &f->map[m];
			if (e->code != items[i].code)
				continue;
			hit = mapped = 1;
			if (e->input == 0)
				depth_item = 1;
			if (items[i].text) {
				f->garbage_items++;
				continue;
			}
			if (items[i].value == f->absent) {
				f->absent_values++;
				continue;
			}
			v[e->input] = items[i].value * e->scale + e->offset;
			got[e->input] = 1;
			if (e->input == 0)
				depth_ok = isfinite(v[0]);
		}
		if (!hit && items[i].text)
			f->other_text++;
	}
	if (!mapped) {
		f->unmapped_records++;
		return;
	}
	if (depth_item && !depth_ok) {
		/* never a sample without a valid depth: this record's values
		 * cannot be placed */
		f->absent_depth++;
		return;
	}
	for (int in = 0; in < N_IN; in++)
		if (got[in]) {
			f->val[in] = v[in];
			f->have[in] = 1;
			f->any = 1;
		}
	if (!depth_item) {
		f->no_depth_records++;
		return;
	}
	if (f->inflight == QCAP || send_sample(f, 0))
		f->broken = 1;
}

/* ---- answers
 * ----------------------------------------------------------------- */

/* One-element arrays become their element; numbers with a unit go to
 * the output unit chosen. */
static void shape(feed *f, cJSON *res)
{
	cJSON *m, *next,
	    *units = cJSON_GetObjectItemCaseSensitive(res, "units");

	for (m = res->child; m; m = next) {
		next = m->next;
		if (cJSON_IsArray(m) && cJSON_GetArraySize(m) == 1) {
			cJSON *e = cJSON_DetachItemFromArray(m, 0);
			cJSON_ReplaceItemInObjectCaseSensitive(res, m->string,
			                                       e);
		}
	}
	cJSON_DeleteItemFromObjectCaseSensitive(res, "n");
	for (m = res->child; m; m = m->next) {
		cJSON *u = cJSON_GetObjectItemCaseSensitive(units, m->string);
		double s, o;
		const char *ou;
		if (!cJSON_IsString(u))
			continue;
		ou = cli__units_output(&f->units, u->valuestring, &s, &o);
		if (ou == u->valuestring)
			continue;
		if (cJSON_IsNumber(m))
			cJSON_SetNumberValue(m, (m->valuedouble - o) / s);
		cJSON_SetValuestring(u, ou);
	}
	if (f->qc_names) {
		const cJSON *q = cJSON_GetObjectItemCaseSensitive(res, "qc");
		char buf[1024];
		if (cJSON_IsNumber(q)) {
			cli__qc_names((unsigned long long)q->valuedouble, f->qc,
			              buf, sizeof buf);
			cJSON_AddStringToObject(res, "qc_names", buf);
		}
	}
}

static void print_csv_header(feed *f)
{
	const cJSON *c;
	int first = 1;

	cJSON_ArrayForEach(c, f->columns)
	{
		const cJSON *u = cJSON_GetObjectItemCaseSensitive(
		    f->col_units, c->valuestring);
		printf("%s%s%s%s%s", first ? "" : ",", c->valuestring,
		       cJSON_IsString(u) ? "[" : "",
		       cJSON_IsString(u) ? u->valuestring : "",
		       cJSON_IsString(u) ? "]" : "");
		first = 0;
	}
	putchar('\n');
	f->csv_header = 1;
}

static void print_csv_row(feed *f, const cJSON *res, double depth)
{
	const cJSON *c;
	char num[48];
	int first = 1;

	cJSON_ArrayForEach(c, f->columns)
	{
		const cJSON *m =
		    res ? cJSON_GetObjectItemCaseSensitive(res, c->valuestring)
		        : NULL;
		if (!res && strcmp(c->valuestring, "depth") == 0)
			cli__fmt_num(num, depth, 0, "");
		else if (cJSON_IsNumber(m))
			cli__fmt_num(num, m->valuedouble, 0, "");
		else if (cJSON_IsString(m))
			snprintf(num, sizeof num, "%.40s", m->valuestring);
		else
			num[0] = '\0';
		printf("%s%s", first ? "" : ",", num);
		first = 0;
	}
	putchar('\n');
}

/* Prints the error answer for a sample as its line. */
static void print_refused(feed *f, const cJSON *err, double depth)
{
	if (f->csv) {
		print_csv_row(f, NULL, depth);
	} else {
		cJSON *o = cJSON_CreateObject();
		char *s;
		cJSON_AddItemToObject(o, "depth",
		                      isfinite(depth)
		                          ? cJSON_CreateNumber(depth)
		                          : cJSON_CreateNull());
		cJSON_AddNullToObject(o, "qc");
		cJSON_AddItemToObject(o, "error", cJSON_Duplicate(err, 1));
		s = cJSON_PrintUnformatted(o);
		if (s)
			printf("%s\n", s);
		cJSON_free(s);
		cJSON_Delete(o);
	}
}

static int on_line(void *ctx, char *line, size_t len)
{
	feed *f = ctx;
	cJSON *want, *r;
	cJSON *res;
	const cJSON *err;
	char why[160];
	double depth;
	size_t slot;

	if (!f->inflight) {
		fprintf(stderr, WHO ": an answer no sample asked for\n");
		return -1;
	}
	want = cJSON_CreateNumber((double)f->qid[f->qhead]);
	depth = f->qdepth[f->qhead];
	slot = f->qhead;
	f->qhead = (f->qhead + 1) % QCAP;
	f->inflight--;
	f->wire = 0;
	r = want ? cli__rpc_parse(line, len, want, why, sizeof why) : NULL;
	cJSON_Delete(want);
	if (!r) {
		fprintf(stderr, WHO ": invalid answer from the daemon (%s)\n",
		        why);
		return -1;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (err || !cJSON_IsObject(res)) {
		if (f->refused < 5)
			cli__print_error(stderr, WHO ": sample refused", err);
		f->refused++;
		print_refused(f, err, depth);
	} else {
		f->answered++;
		if (f->pres && take_state(f, res, slot)) {
			cJSON_Delete(r);
			fprintf(stderr, WHO ": out of memory\n");
			return -1;
		}
		shape(f, res);
		if (f->csv) {
			print_csv_row(f, res, depth);
		} else {
			char *s = cJSON_PrintUnformatted(res);
			if (s) {
				fputs(s, stdout);
				fputc('\n', stdout);
				cJSON_free(s);
			}
		}
	}
	cJSON_Delete(r);
	/* Each answer goes out as it is written: a pipe must not hold it. */
	if (fflush(stdout) || ferror(stdout)) {
		fprintf(stderr, WHO ": cannot write the output: %s\n",
		        strerror(errno));
		return -1;
	}
	if (pump(f)) {
		fprintf(stderr, WHO ": out of memory\n");
		return -1;
	}
	return 0;
}

/* The probe: every input null. Checks the parameters before any data and
 * gives the CSV columns. 0, or an exit code. */
static int probe(feed *f, cli_conn *c)
{
	cJSON *r = NULL, *res;
	const cJSON *err, *m;
	int rc;

	if (send_sample(f, 1))
		return CLI_EXIT_IO;
	while (f->wbuf.off < f->wbuf.len) {
		if (cli_write_all(c, f->wbuf.data + f->wbuf.off,
		                  f->wbuf.len - f->wbuf.off))
			return CLI_EXIT_IO;
		f->wbuf.off = f->wbuf.len;
	}
	rc = cli__await(c, WHO, (long)f->next_id - 1,
	                cli__now_ms() + CLI_DEFAULT_CALL_TIMEOUT_MS, &r);
	if (rc)
		return rc;
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (err) {
		cli__print_error(stderr, WHO ": the daemon refuses this setup",
		                 err);
		cli__explain_error(stderr, WHO, f->discover, "log.process",
		                   f->params, err);
		cJSON_Delete(r);
		return CLI_EXIT_RPC_ERROR;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	if (f->pres) {
		const cJSON *pc =
		    cJSON_GetObjectItemCaseSensitive(res, "pressure_caution");
		const cJSON *pr =
		    cJSON_GetObjectItemCaseSensitive(f->params, "pressures");
		const cJSON *di =
		    cJSON_GetObjectItemCaseSensitive(pr, "depth_is");
		fprintf(stderr, WHO ": pressures: %s\n",
		        cJSON_IsString(pc) ? pc->valuestring
		                           : "screening estimates only");
		if (cJSON_IsString(di) && strcmp(di->valuestring, "md") == 0)
			fprintf(
			    stderr, WHO
			    ": pressures: the depth item is measured "
			    "depth; they follow the tvd item (true vertical "
			    "depth below the datum)\n");
		else
			fprintf(
			    stderr, WHO
			    ": pressures: the depth item is taken as "
			    "true vertical depth below the datum "
			    "(pressures.depth_is tvd); a measured depth would "
			    "make every pressure wrong\n");
		fprintf(stderr,
		        WHO
		        ": pressures: %s; one sample on the wire at a time, "
		        "each carrying the state of the answer before it\n",
		        cJSON_GetObjectItemCaseSensitive(pr, "state")
		            ? "continuing from the state token given"
		        : cJSON_GetObjectItemCaseSensitive(pr, "resume")
		            ? "restarting from the resume values given (the "
		              "answers are flagged resumed)"
		            : "the running integrals start at the mudline");
	}
	shape(f, res);
	f->columns = cJSON_CreateArray();
	f->col_units =
	    cJSON_Duplicate(cJSON_GetObjectItemCaseSensitive(res, "units"), 1);
	cJSON_ArrayForEach(m, res)
	{
		if (cJSON_IsObject(m) || cJSON_IsArray(m) ||
		    strcmp(m->string, "pressure_caution") == 0)
			continue;
		cJSON_AddItemToArray(f->columns, cJSON_CreateString(m->string));
	}
	if (f->pres && f->csv) {
		/* the caution heads the CSV, as in rockwire log's CSV files */
		const cJSON *pc =
		    cJSON_GetObjectItemCaseSensitive(res, "pressure_caution");
		printf("# %s\n# %s\n", caution,
		       cJSON_IsString(pc) ? pc->valuestring : "");
	}
	cJSON_Delete(r);
	return 0;
}

/* ---- the WITS source
 * ------------------------------------------------------------ */

static int tcp_connect(const char *hp, int quiet)
{
	char host[256];
	const char *colon = strrchr(hp, ':');
	struct addrinfo hints, *res, *ai;
	int fd = -1, e, saved = 0;

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
		if (!quiet)
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
		saved = errno;
		close(fd);
		fd = -1;
	}
	freeaddrinfo(res);
	if (fd < 0 && !quiet)
		fprintf(stderr, WHO ": cannot connect to %s: %s\n", hp,
		        strerror(saved));
	if (fd < 0)
		errno = saved;
	return fd;
}

void cli_usage_feed(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire feed --map RRII=INPUT[:UNIT] ... | --map-file "
	    "FILE\n"
	    "       [--connect HOST:PORT [--reconnect] [--max-backoff S]]\n"
	    "       [--idle-timeout S] [--absent VALUE] [--format ndjson|csv]\n"
	    "       [--set NAME=VALUE[UNIT] ...] [--params JSON]\n"
	    "       [--units KIND=UNIT ...] [--qc names]\n"
	    "\n"
	    "Reads WITS level 0 records (\"&&\" ... \"!!\", one RRII item and\n"
	    "its value per line) from stdin or a TCP server and answers every\n"
	    "completed depth sample with one line on stdout, flushed at once.\n"
	    "\n"
	    "  --map RRII=INPUT[:UNIT]  item RRII (2-digit record, 2-digit\n"
	    "                    item) feeds INPUT (depth dtp dts vp vs rhob\n"
	    "                    drho caliper bit_size gr vsh porosity "
	    "pressure\n"
	    "                    temperature tvd), its values in UNIT "
	    "(default: the\n"
	    "                    input's default unit, e.g. depth m, dtp "
	    "us/ft).\n"
	    "                    There is no built-in map: a feed's items "
	    "mean\n"
	    "                    what its provider says. The map in use is\n"
	    "                    printed on stderr at start\n"
	    "  --map-file FILE   map entries, one per line ('0108 depth m' or\n"
	    "                    '0108=depth:m'; '#' comments)\n"
	    "  --connect H:P     read from a TCP server instead of stdin\n"
	    "  --reconnect       when the server hangs up (or goes quiet for\n"
	    "                    --idle-timeout), connect again after 1, 2, 4\n"
	    "                    ... s, at most --max-backoff (default 30)\n"
	    "  --idle-timeout S  report when no data has arrived for S "
	    "seconds\n"
	    "                    (default 60; 0 never)\n"
	    "  --absent VALUE    the feed's absent value (default -999.25):\n"
	    "                    missing, never a number; a record whose "
	    "depth\n"
	    "                    is absent completes no sample\n"
	    "  --format          ndjson (default: the log.process result with\n"
	    "                    one-element arrays made scalars) or csv\n"
	    "  --set, --params, --units  as for rockwire log (values may "
	    "carry\n"
	    "                    a unit; units.* choose output units only)\n"
	    "  --qc names        add qc_names to each NDJSON line\n"
	    "\n"
	    "Pressures (--set pressures.depth_is=tvd|md and the rest of\n"
	    "log.process's pressures object, e.g. pressures.trend): each "
	    "answer\n"
	    "returns the state of the running integrals, which the next\n"
	    "sample's request carries, so samples go one at a time. The depth\n"
	    "must be declared: tvd (the depth item is TVD below the datum) or\n"
	    "md with a tvd item mapped. A restart resumes from the state "
	    "token\n"
	    "printed at the end (--set pressures.state=TOKEN) or from known\n"
	    "values (--set pressures.resume.tvd=2450m --set\n"
	    "pressures.resume.sv=48.2MPa; flagged resumed).\n"
	    "\n"
	    "A record with the depth item completes a sample: its mapped "
	    "items\n"
	    "plus those of records without depth since the previous sample.\n"
	    "Every mapped input is sent with every sample, null when missing,\n"
	    "so each completed sample is answered: with nulls and QC flags "
	    "where\n"
	    "inputs are missing, or with the daemon's error ({\"depth\":D,\n"
	    "\"qc\":null,\"error\":...}) where it refused it. Malformed "
	    "records\n"
	    "are skipped; each record is counted once in the summary on\n"
	    "stderr. SIGINT or SIGTERM ends the feed after the answers in\n"
	    "flight.\n"
	    "\n"
	    "Screening estimates only: not a substitute for qualified review,\n"
	    "local regulations and licensed practice; never the sole basis\n"
	    "for well-control decisions.\n"
	    "\n"
	    "Exit codes: 0 ok, 1 the daemon refused a sample or the setup, 2\n"
	    "usage, 3 no daemon or WITS source, 4 I/O failure.\n");
}

static void summary(feed *f, const cli_wits_parser *wp)
{
	const cli_wits_stats *s = cli_wits_get_stats(wp);
	unsigned long completed = f->samples_sent;

	fprintf(stderr,
	        "feed: %lu records: %lu delivered (%lu completed a sample, "
	        "%lu held for the next depth, %lu with an absent depth, %lu "
	        "without mapped items), %lu malformed records, %lu "
	        "unterminated (%lu cut short by the next record), %lu empty; "
	        "%lu absent values, %lu garbage items on mapped codes, %lu "
	        "text items on other codes; %lu lines outside records, %lu "
	        "long lines; %lu samples sent, %lu answered, %lu refused\n",
	        s->begun, s->records, completed, f->no_depth_records,
	        f->absent_depth, f->unmapped_records, s->bad_records,
	        s->unterminated, s->run_together, s->empty, f->absent_values,
	        f->garbage_items, f->other_text, s->garbage, s->long_lines,
	        f->samples_sent, f->answered, f->refused);
	if (f->held_dropped)
		fprintf(stderr,
		        "feed: %lu held values dropped when the source "
		        "reconnected\n",
		        f->held_dropped);
	if (f->any)
		fprintf(stderr, "feed: values after the last depth item were "
		                "not sent (no depth completed them)\n");
	if (f->pres && f->token)
		fprintf(
		    stderr,
		    "feed: pressures: the last state, after TVD %.10g "
		    "(sv %.10g): restart with --set pressures.state=%s (the "
		    "same column and pore water), or from known values with "
		    "--set pressures.resume.tvd=... --set "
		    "pressures.resume.sv=...\n",
		    f->last_tvd, f->last_sv, f->token);
	fprintf(stderr, "feed: %s\n", caution);
}

int cli_cmd_feed(const cli_opts *o, int argc, char **argv)
{
	static const char *const opts[] = {
	    "--map",         "--map-file",     "--connect", "--reconnect",
	    "--max-backoff", "--idle-timeout", "--absent",  "--format",
	    "--set",         "--params",       "--units",   "--qc",
	    "--help"};
	static cli_wits_parser wp; /* fixed buffers: keep off the stack */
	static feed f;
	char *sets[256];
	char unit_sets[32][96];
	size_t nsets = 0, nunits = 0;
	const char *connect_to = NULL, *pjson = NULL;
	char buf[READ_CHUNK];
	cJSON *info = NULL, *disc = NULL;
	cli_conn c;
	int in_fd = 0, rc = CLI_EXIT_IO, connected = 0, reconnect = 0;
	int state; /* 1 reading, 2 waiting to reconnect, 0 source ended */
	long idle_ms = 60000, max_backoff_ms = 30000, backoff_ms = 1000;
	long long last_data, next_try = 0;
	int idle_reported = 0;
	struct sigaction sa;

	memset(&f, 0, sizeof f);
	memset(&wp, 0, sizeof wp);
	f.absent = -999.25;
	f.next_id = 10;
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i], *v = i + 1 < argc ? argv[i + 1] : NULL;
		int takes = strcmp(a, "--reconnect") != 0 && a[0] == '-' &&
		            strcmp(a, "--help") != 0;
		if (takes && !v) {
			fprintf(stderr, WHO ": %s needs a value\n", a);
			goto usage;
		}
		if (strcmp(a, "--map") == 0) {
			if (add_map(&f, v, "--map", 0))
				goto usage;
			i++;
		} else if (strcmp(a, "--map-file") == 0) {
			if (read_map_file(&f, v))
				goto usage;
			i++;
		} else if (strcmp(a, "--connect") == 0) {
			connect_to = v;
			i++;
		} else if (strcmp(a, "--reconnect") == 0) {
			reconnect = 1;
		} else if (strcmp(a, "--max-backoff") == 0 ||
		           strcmp(a, "--idle-timeout") == 0) {
			long ms;
			if (cli__parse_seconds(v, &ms) ||
			    (a[2] == 'm' && ms < 1000)) {
				fprintf(stderr, WHO ": %s wants seconds\n", a);
				goto usage;
			}
			if (a[2] == 'm')
				max_backoff_ms = ms;
			else
				idle_ms = ms;
			i++;
		} else if (strcmp(a, "--absent") == 0) {
			char *end;
			f.absent = strtod(v, &end);
			if (end == v || *end || !isfinite(f.absent)) {
				fprintf(stderr, WHO ": bad --absent '%s'\n", v);
				goto usage;
			}
			i++;
		} else if (strcmp(a, "--set") == 0 && nsets < 256) {
			sets[nsets++] = argv[++i];
		} else if (strcmp(a, "--units") == 0 && nsets < 256 &&
		           nunits < 32 && strchr(v, '=')) {
			snprintf(unit_sets[nunits], sizeof unit_sets[nunits],
			         "units.%s", v);
			sets[nsets++] = unit_sets[nunits++];
			i++;
		} else if (strcmp(a, "--params") == 0) {
			pjson = v;
			i++;
		} else if (strcmp(a, "--qc") == 0) {
			if (strcmp(v, "names") && strcmp(v, "int")) {
				fprintf(stderr, WHO ": --qc is int or names\n");
				goto usage;
			}
			f.qc_names = strcmp(v, "names") == 0;
			i++;
		} else if (strcmp(a, "--format") == 0) {
			if (strcmp(v, "csv") == 0)
				f.csv = 1;
			else if (strcmp(v, "ndjson") != 0) {
				fprintf(stderr,
				        WHO ": --format ndjson or csv\n");
				goto usage;
			}
			i++;
		} else if (a[0] == '-') {
			cli__unknown_option(WHO, a, opts,
			                    sizeof opts / sizeof *opts);
			rc = CLI_EXIT_USAGE;
			goto out;
		} else {
			fprintf(stderr, WHO ": unknown argument %s\n", a);
			goto usage;
		}
	}
	if (!f.nmap) {
		fprintf(stderr, WHO
		        ": no WITS item map: give --map RRII=INPUT[:UNIT] "
		        "for each item (e.g. --map 0108=depth:m --map "
		        "0113=dtp:us/ft) or --map-file FILE; items mean what "
		        "your feed's provider says, so there is no default\n");
		goto usage;
	}
	{
		int has_depth = 0;
		for (size_t m = 0; m < f.nmap; m++)
			has_depth |= f.map[m].input == 0;
		if (!has_depth) {
			fprintf(stderr, WHO ": no code is mapped to depth; a "
			                    "sample is completed by its depth "
			                    "item\n");
			goto usage;
		}
	}
	if (reconnect && !connect_to) {
		fprintf(stderr, WHO ": --reconnect needs --connect\n");
		goto usage;
	}
	if (connect_to && !strrchr(connect_to, ':')) {
		fprintf(stderr, WHO ": --connect wants HOST:PORT, not '%s'\n",
		        connect_to);
		goto usage;
	}
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	rc = cli__fetch_info(
	    &c, WHO, cli__now_ms() + CLI_DEFAULT_CALL_TIMEOUT_MS, &info, &disc);
	if (rc)
		goto out;
	rc = CLI_EXIT_IO;
	f.discover = disc;
	if (cli__units_load(&f.units, info)) {
		fprintf(stderr, WHO ": the daemon's service.info has no unit "
		                    "table\n");
		goto out;
	}
	cli__qc_legend(info, f.qc);
	if (cli__build_params(WHO, sets, nsets, pjson, &f.units, disc,
	                      &f.params, &f.sources) ||
	    map_units(&f)) {
		rc = CLI_EXIT_USAGE;
		goto out;
	}
	for (size_t m = 0; m < f.nmap; m++) {
		if (cJSON_GetObjectItemCaseSensitive(
		        f.params, feed_inputs[f.map[m].input].name)) {
			fprintf(stderr,
			        WHO ": %s is both mapped and --set; drop "
			            "one\n",
			        feed_inputs[f.map[m].input].name);
			rc = CLI_EXIT_USAGE;
			goto out;
		}
		f.send[f.map[m].input] = 1;
	}
	/* The washout check needs both caliper and bit size. */
	{
		int cal = input_index("caliper"), bit = input_index("bit_size");
		int have_bit = f.send[bit] || cJSON_GetObjectItemCaseSensitive(
		                                  f.params, "bit_size");
		if (f.send[cal] && !have_bit) {
			fprintf(stderr,
			        WHO ": washout check skipped: caliper "
			            "mapped but no bit size (map one or "
			            "--set bit_size=8.5in)\n");
			f.send[cal] = 0;
		} else if (!f.send[cal] && f.send[bit]) {
			fprintf(stderr, WHO ": washout check skipped: bit size "
			                    "mapped but no caliper\n");
			f.send[bit] = 0;
		}
	}
	f.pres = cJSON_IsObject(
	    cJSON_GetObjectItemCaseSensitive(f.params, "pressures"));
	f.tvd_in = f.send[input_index("tvd")] ? input_index("tvd") : -1;
	f.last_tvd = f.last_sv = NAN;
	if (set_base(&f))
		goto out;
	/* Start-up: the caution and the map in use. */
	fprintf(stderr, WHO ": %s\n", caution);
	fprintf(stderr, WHO ": WITS map:");
	for (size_t m = 0; m < f.nmap; m++)
		fprintf(stderr, "%s %04u -> %s (%s)%s", m ? "," : "",
		        f.map[m].code, feed_inputs[f.map[m].input].name,
		        f.map[m].unit[0] ? f.map[m].unit : "no unit",
		        f.send[f.map[m].input] ? "" : " not sent");
	fprintf(stderr, "; absent value %.15g; source %s\n", f.absent,
	        connect_to ? connect_to : "stdin");
	rc = probe(&f, &c);
	if (rc)
		goto out;
	rc = CLI_EXIT_IO;
	if (f.csv)
		print_csv_header(&f);
	fflush(stdout);
	if (connect_to) {
		in_fd = tcp_connect(connect_to, 0);
		if (in_fd == -2) {
			in_fd = -1;
			rc = CLI_EXIT_USAGE;
			goto out;
		}
		if (in_fd < 0 && !reconnect) {
			rc = CLI_EXIT_CONNECT;
			goto out;
		}
	}
	f.source = connect_to ? connect_to : "stdin";
	state = in_fd >= 0 ? 1 : 2;
	next_try = cli__now_ms() + backoff_ms;
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = on_stop;
	sigemptyset(&sa.sa_mask);
	sigaction(SIGINT, &sa, NULL);
	sigaction(SIGTERM, &sa, NULL);
	cli_wits_init(&wp, on_record, &f);
	last_data = cli__now_ms();
	for (;;) {
		int ready = 0, st, wait_ms = -1;
		int room = f.inflight < FEED_INFLIGHT &&
		           f.wbuf.len - f.wbuf.off < 65536;
		long long now = cli__now_ms();

		if (stop_signal && state) {
			fprintf(stderr,
			        WHO ": stopping (%s): answering the samples in "
			            "flight\n",
			        stop_signal == SIGINT ? "SIGINT" : "SIGTERM");
			if (in_fd > 0)
				close(in_fd);
			in_fd = -1;
			cli_wits_finish(&wp);
			state = 0;
		}
		if (!state && !f.inflight && f.wbuf.off == f.wbuf.len)
			break;
		if (state == 2 && now >= next_try) {
			in_fd = tcp_connect(connect_to, 1);
			if (in_fd >= 0) {
				fprintf(stderr, WHO ": connected to %s\n",
				        connect_to);
				state = 1;
				backoff_ms = 1000;
				last_data = now;
				idle_reported = 0;
			} else {
				fprintf(stderr,
				        WHO ": cannot connect to %s (%s); next "
				            "try in %ld s\n",
				        connect_to, strerror(errno),
				        backoff_ms / 1000);
				next_try = now + backoff_ms;
				backoff_ms = backoff_ms * 2 > max_backoff_ms
				                 ? max_backoff_ms
				                 : backoff_ms * 2;
			}
			in_fd = in_fd < 0 ? -1 : in_fd;
		}
		if (state == 1 && idle_ms > 0 &&
		    now - last_data >= idle_ms * (idle_reported + 1)) {
			fprintf(stderr, WHO ": no data from %s for %.0f s%s\n",
			        f.source, (double)(now - last_data) / 1000,
			        reconnect ? "; connecting again" : "");
			idle_reported++;
			if (reconnect) {
				close(in_fd);
				in_fd = -1;
				cli_wits_finish(&wp);
				if (f.any)
					f.held_dropped++;
				memset(f.have, 0, sizeof f.have);
				f.any = 0;
				state = 2;
				next_try = now;
				continue;
			}
		}
		if (state == 1 && idle_ms > 0)
			wait_ms = (int)(last_data +
			                idle_ms * (idle_reported + 1) - now);
		if (state == 2)
			wait_ms = (int)(next_try > now ? next_try - now : 0);
		if (wait_ms < 0 && (state == 1 && idle_ms > 0))
			wait_ms = 0;
		st = cli__pipe_step(&c, &f.wbuf, f.inflight > 0,
		                    state == 1 && room ? in_fd : -1, &ready,
		                    wait_ms, on_line, &f);
		if (st < 0)
			goto out;
		if (st == 1 && (f.inflight || f.wbuf.off < f.wbuf.len)) {
			fprintf(stderr, WHO ": the daemon closed the "
			                    "connection early\n");
			goto out;
		}
		if (ready && state == 1) {
			ssize_t n = read(in_fd, buf, sizeof buf);
			if (n < 0 && errno == EINTR)
				continue;
			if (n > 0) {
				if (idle_reported)
					fprintf(stderr,
					        WHO ": data from %s again\n",
					        f.source);
				idle_reported = 0;
				last_data = cli__now_ms();
				cli_wits_feed(&wp, buf, (size_t)n);
			} else {
				if (n < 0)
					fprintf(stderr,
					        WHO ": read from %s: %s\n",
					        f.source, strerror(errno));
				else if (connect_to)
					fprintf(stderr,
					        WHO
					        ": %s closed the connection "
					        "(%lu records so far)%s\n",
					        connect_to,
					        cli_wits_get_stats(&wp)->begun,
					        reconnect ? "; connecting again"
					                  : "");
				else
					fprintf(stderr,
					        WHO ": end of input (stdin)\n");
				if (in_fd > 0)
					close(in_fd);
				in_fd = -1;
				cli_wits_finish(&wp);
				if (reconnect) {
					if (f.any)
						f.held_dropped++;
					memset(f.have, 0, sizeof f.have);
					f.any = 0;
					state = 2;
					next_try = cli__now_ms() + backoff_ms;
				} else {
					state = 0;
				}
			}
			if (f.broken) {
				fprintf(stderr, WHO ": out of memory\n");
				goto out;
			}
		}
	}
	rc = f.refused ? CLI_EXIT_RPC_ERROR : CLI_EXIT_OK;
	summary(&f, &wp);
out:
	fflush(stdout);
	if (connected)
		cli_disconnect(&c);
	if (in_fd > 0)
		close(in_fd);
	cli__buf_free(&f.wbuf);
	cJSON_free(f.base);
	cJSON_Delete(f.params);
	cJSON_Delete(f.sources);
	cJSON_Delete(f.columns);
	cJSON_Delete(f.col_units);
	free(f.token);
	cJSON_Delete(info);
	cJSON_Delete(disc);
	return rc;
usage:
	fprintf(stderr, "(rockwire feed --help lists the options)\n");
	rc = CLI_EXIT_USAGE;
	goto out;
}
