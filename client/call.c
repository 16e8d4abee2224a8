/* `rockwire call` and `rockwire send`: one request from the command line,
 * or a pipelined stream of NDJSON requests. */
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "logio.h"

static const char *unit_of(const cJSON *units, const char *name)
{
	const cJSON *u = cJSON_GetObjectItemCaseSensitive(units, name);
	return cJSON_IsString(u) ? u->valuestring : NULL;
}

/* 1 for an array of numbers, strings and nulls (a table column), 2 for
 * an array of such arrays (a matrix), 0 otherwise. */
static int array_rank(const cJSON *v)
{
	const cJSON *e;
	int rank = 0;

	if (!cJSON_IsArray(v) || !v->child)
		return 0;
	cJSON_ArrayForEach(e, v)
	{
		int r = cJSON_IsArray(e) ? 2
		        : (cJSON_IsNumber(e) || cJSON_IsString(e) ||
		           cJSON_IsNull(e))
		            ? 1
		            : 0;
		if (r == 2 && array_rank(e) != 1)
			return 0;
		if (!r || (rank && r != rank))
			return 0;
		rank = r;
	}
	return rank;
}

static void print_cell(FILE *f, const cJSON *e, int w)
{
	if (cJSON_IsNumber(e))
		fprintf(f, " %*.7g", w, e->valuedouble);
	else if (cJSON_IsString(e))
		fprintf(f, " %*s", w, e->valuestring);
	else
		fprintf(f, " %*s", w, "null");
}

static void column_head(const cJSON *units, const cJSON *col, char *buf,
                        size_t size)
{
	const char *u = unit_of(units, col->string);
	snprintf(buf, size, u ? "%s[%s]" : "%s", col->string, u);
}

/* Prints a result for people: scalars as "# name = value unit" lines,
 * one-dimensional arrays as aligned columns grouped by length (one table
 * per length, e.g. per-angle and per-interface members), two-dimensional
 * arrays as one matrix each (rows are the first index). Units are in the
 * headers. Returns 0, or -1 when nothing could be printed that way. */
static int print_table(const cJSON *result, FILE *f)
{
	const cJSON *units = cJSON_GetObjectItemCaseSensitive(result, "units");
	const cJSON *m, *cols[128];
	int done[128] = {0};
	size_t ncol = 0, printed = 0;
	char head[160];

	if (!cJSON_IsObject(result))
		return -1;
	cJSON_ArrayForEach(m, result)
	{
		if (cJSON_IsNumber(m) || cJSON_IsString(m) || cJSON_IsBool(m) ||
		    cJSON_IsNull(m)) {
			const char *u = unit_of(units, m->string);
			char *s = cJSON_PrintUnformatted(m);
			fprintf(f, "# %s = %s%s%s\n", m->string, s ? s : "?",
			        u ? " " : "", u ? u : "");
			cJSON_free(s);
			printed++;
		} else if (array_rank(m) && ncol < 128) {
			cols[ncol++] = m;
		}
	}
	/* One table per array length, in order of first appearance. */
	for (size_t j = 0; j < ncol; j++) {
		size_t group[128], ng = 0;
		int width[128], n;
		if (done[j] || array_rank(cols[j]) != 1)
			continue;
		n = cJSON_GetArraySize(cols[j]);
		for (size_t k = j; k < ncol; k++)
			if (!done[k] && array_rank(cols[k]) == 1 &&
			    cJSON_GetArraySize(cols[k]) == n) {
				done[k] = 1;
				group[ng++] = k;
			}
		for (size_t g = 0; g < ng; g++) {
			column_head(units, cols[group[g]], head, sizeof head);
			width[g] =
			    (int)strlen(head) > 13 ? (int)strlen(head) : 13;
			fprintf(f, " %*s", width[g], head);
		}
		fputc('\n', f);
		for (int i = 0; i < n; i++) {
			for (size_t g = 0; g < ng; g++)
				print_cell(
				    f, cJSON_GetArrayItem(cols[group[g]], i),
				    width[g]);
			fputc('\n', f);
		}
		fputc('\n', f);
		printed++;
	}
	for (size_t j = 0; j < ncol; j++) {
		const cJSON *row;
		int r = 0;
		if (array_rank(cols[j]) != 2)
			continue;
		column_head(units, cols[j], head, sizeof head);
		fprintf(f, "%s (rows: first index, columns: second)\n", head);
		cJSON_ArrayForEach(row, cols[j])
		{
			const cJSON *e;
			fprintf(f, " %4d", r++);
			cJSON_ArrayForEach(e, row) print_cell(f, e, 13);
			fputc('\n', f);
		}
		fputc('\n', f);
		printed++;
	}
	return printed ? 0 : -1;
}

/* Prints a response: the result to stdout, an error to stderr. Returns the
 * exit code. */
static int print_response(const char *line, int table)
{
	cJSON *r = cJSON_Parse(line);
	const cJSON *res, *err;
	int rc = CLI_EXIT_OK;

	if (!r) {
		fprintf(stderr, "rockwire: unreadable response: %.200s\n",
		        line);
		return CLI_EXIT_IO;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (err) {
		const cJSON *code =
		    cJSON_GetObjectItemCaseSensitive(err, "code");
		const cJSON *msg =
		    cJSON_GetObjectItemCaseSensitive(err, "message");
		const cJSON *data =
		    cJSON_GetObjectItemCaseSensitive(err, "data");
		const cJSON *param =
		    cJSON_GetObjectItemCaseSensitive(data, "param");
		const cJSON *why =
		    cJSON_GetObjectItemCaseSensitive(data, "reason");
		fprintf(stderr, "rockwire: error %d: %s",
		        code ? code->valueint : 0,
		        cJSON_IsString(msg) ? msg->valuestring : "?");
		if (cJSON_IsString(param))
			fprintf(stderr, ": %s", param->valuestring);
		if (cJSON_IsString(why))
			fprintf(stderr, ": %s", why->valuestring);
		fputc('\n', stderr);
		rc = CLI_EXIT_RPC_ERROR;
	} else if (table && print_table(res, stdout) == 0) {
		/* printed */
	} else {
		char *s =
		    isatty(1) ? cJSON_Print(res) : cJSON_PrintUnformatted(res);
		if (s) {
			fputs(s, stdout);
			fputc('\n', stdout);
			cJSON_free(s);
		}
	}
	cJSON_Delete(r);
	return rc;
}

int cli_cmd_call(const cli_opts *o, int argc, char **argv)
{
	cJSON *req = NULL, *params = NULL;
	const char *method = NULL, *pjson = NULL;
	int table = 0, rc = CLI_EXIT_USAGE, got;
	cli_conn c;
	char *line, *text = NULL;
	size_t len;

	for (int i = 0; i < argc; i++) {
		if (strcmp(argv[i], "--table") == 0)
			table = 1;
		else if (strcmp(argv[i], "--params") == 0 && i + 1 < argc)
			pjson = argv[++i];
		else if (strncmp(argv[i], "--params=", 9) == 0)
			pjson = argv[i] + 9;
		else if (argv[i][0] == '-' && argv[i][1] == '-') {
			fprintf(stderr, "rockwire call: unknown option %s\n",
			        argv[i]);
			return CLI_EXIT_USAGE;
		} else if (!method)
			method = argv[i];
	}
	if (!method) {
		fprintf(stderr, "usage: rockwire call METHOD [name=value ...] "
		                "[--params JSON] [--table]\n");
		return CLI_EXIT_USAGE;
	}
	params = pjson ? cJSON_Parse(pjson) : cJSON_CreateObject();
	if (!params || !cJSON_IsObject(params)) {
		fprintf(stderr, "rockwire call: --params must be a JSON "
		                "object\n");
		goto out;
	}
	int seen_method = 0;
	for (int i = 0; i < argc; i++) {
		if (strcmp(argv[i], "--params") == 0) {
			i++;
			continue;
		}
		if (argv[i][0] == '-' && argv[i][1] == '-')
			continue;
		if (!seen_method && strcmp(argv[i], method) == 0) {
			seen_method = 1;
			continue;
		}
		if (cli__param_set(params, argv[i], "rockwire call"))
			goto out;
	}
	req = cJSON_CreateObject();
	cJSON_AddStringToObject(req, "jsonrpc", "2.0");
	cJSON_AddNumberToObject(req, "id", 1);
	cJSON_AddStringToObject(req, "method", method);
	cJSON_AddItemToObject(req, "params", params);
	params = NULL;
	text = cJSON_PrintUnformatted(req);
	if (!text)
		goto out;
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	if (cli_write_all(&c, text, strlen(text)) ||
	    cli_write_all(&c, "\n", 1)) {
		cli_disconnect(&c);
		rc = CLI_EXIT_IO;
		goto out;
	}
	cli_close_write(&c);
	got = cli_read_line(&c, &line, &len, -1);
	if (got == 1)
		rc = print_response(line, table);
	else {
		fprintf(stderr, "rockwire: no response from %s\n", c.desc);
		rc = CLI_EXIT_IO;
	}
	cli_disconnect(&c);
out:
	cJSON_free(text);
	cJSON_Delete(req);
	cJSON_Delete(params);
	return rc;
}

int cli_cmd_send(const cli_opts *o, int argc, char **argv)
{
	const char *file = argc > 0 ? argv[0] : "-";
	cli_conn c;
	int fd, rc;

	if (argc > 1) {
		fprintf(stderr, "usage: rockwire send [FILE|-]\n");
		return CLI_EXIT_USAGE;
	}
	fd = strcmp(file, "-") == 0 ? 0 : open(file, O_RDONLY | O_CLOEXEC);
	if (fd < 0) {
		fprintf(stderr, "rockwire send: %s: %s\n", file,
		        strerror(errno));
		return CLI_EXIT_IO;
	}
	if (cli_connect(o, &c)) {
		if (fd)
			close(fd);
		return CLI_EXIT_CONNECT;
	}
	rc = cli_pump(&c, fd, 1) ? CLI_EXIT_IO : CLI_EXIT_OK;
	if (fd)
		close(fd);
	cli_disconnect(&c);
	return rc;
}
