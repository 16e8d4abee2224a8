/* `rockwire call`: one request from the command line, its answer checked
 * (a valid JSON-RPC response to this request, within --timeout) and
 * printed as JSON, a table or CSV; errors with a "did you mean" from the
 * daemon's own schema; `rockwire call METHOD --help` prints the method's
 * parameters from rpc.discover. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "format.h"
#include "logio.h"
#include "rpc.h"

#define WHO "rockwire call"

void cli_usage_call(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire call METHOD [name=value ...] [--params JSON]\n"
	    "       [--format json|table|csv] [--table] [--csv]\n"
	    "       [--qc int|names] [--all-columns] [--digits N]\n"
	    "       [--timeout SECONDS]\n"
	    "       rockwire call METHOD --help\n"
	    "\n"
	    "Sends one METHOD request and prints its result on stdout (an "
	    "error\n"
	    "on stderr, exit 1). Each name=value sets a parameter: the value "
	    "is\n"
	    "JSON when it parses as JSON, else a string; dotted names nest\n"
	    "(units.velocity=km/s); --params gives a JSON object to start "
	    "from.\n"
	    "\n"
	    "  --format json     the result as JSON (default; indented on a\n"
	    "                    terminal, one line otherwise)\n"
	    "  --format table    scalars as '# name = value unit' lines, "
	    "arrays\n"
	    "                    as aligned columns with units (one table per\n"
	    "                    length), 2-D results with rows and columns\n"
	    "                    labelled by their axes (angle, depth, ...)\n"
	    "  --format csv      the same as CSV: 'name[unit]' headers, 2-D\n"
	    "                    results in long form (one row per element)\n"
	    "  --table, --csv    short for --format table / csv\n"
	    "  --qc names        QC flag sets by name (legend from "
	    "service.info;\n"
	    "                    JSON gets a 'qc_names' member beside 'qc')\n"
	    "  --all-columns     keep imaginary and phase members that are\n"
	    "                    exactly zero (left out of tables by default)\n"
	    "  --digits N        significant digits in tables (default 7;\n"
	    "                    integers always print whole)\n"
	    "  --timeout S       give up after S seconds without an answer\n"
	    "                    (default 60; exit 6)\n"
	    "  METHOD --help     the method's summary and parameters (type,\n"
	    "                    unit kind, default, range, description) from\n"
	    "                    the daemon's rpc.discover\n"
	    "\n"
	    "A misspelt method, parameter or option value gets a 'did you\n"
	    "mean' from the daemon's schema. Exit codes: 0 ok, 1 the daemon\n"
	    "answered with an error, 2 usage, 3 no daemon reachable, 4 I/O\n"
	    "failure or an invalid answer, 6 timeout.\n");
}

static const char *const call_opts[] = {
    "--params",      "--format", "--table",   "--csv",  "--qc",
    "--all-columns", "--digits", "--timeout", "--help",
};

/* ---- METHOD --help ---------------------------------------------------- */

/* A short type description of a schema node. */
static void type_text(const cJSON *doc, const cJSON *node, char *buf,
                      size_t size, int depth)
{
	const cJSON *t, *en, *one, *cst;
	size_t used = 0;

	buf[0] = '\0';
	{
		const cJSON *r = cJSON_GetObjectItemCaseSensitive(node, "$ref");
		const char *tail =
		    cJSON_IsString(r) ? strrchr(r->valuestring, '/') : NULL;
		if (tail && strcmp(tail, "/distribution") == 0) {
			snprintf(buf, size, "a distribution");
			return;
		}
	}
	node = cli__schema_deref(doc, node);
	if (!node || depth > 4)
		return;
	en = cJSON_GetObjectItemCaseSensitive(node, "enum");
	one = cJSON_GetObjectItemCaseSensitive(node, "oneOf");
	if (!one)
		one = cJSON_GetObjectItemCaseSensitive(node, "anyOf");
	cst = cJSON_GetObjectItemCaseSensitive(node, "const");
	t = cJSON_GetObjectItemCaseSensitive(node, "type");
	if (en) {
		const cJSON *e;
		used += (size_t)snprintf(buf, size, "one of ");
		cJSON_ArrayForEach(e, en)
		{
			char *s = cJSON_PrintUnformatted(e);
			if (used < size)
				used += (size_t)snprintf(
				    buf + used, size - used, "%s%s",
				    e == en->child ? "" : "|", s ? s : "?");
			cJSON_free(s);
		}
		return;
	}
	if (cst) {
		char *s = cJSON_PrintUnformatted(cst);
		snprintf(buf, size, "%s", s ? s : "?");
		cJSON_free(s);
		return;
	}
	if (one) {
		const cJSON *e;
		cJSON_ArrayForEach(e, one)
		{
			char sub[256];
			type_text(doc, e, sub, sizeof sub, depth + 1);
			if (used < size)
				used += (size_t)snprintf(
				    buf + used, size - used, "%s%s",
				    e == one->child ? "" : " or ", sub);
		}
		return;
	}
	if (cJSON_IsArray(t)) {
		const cJSON *e;
		cJSON_ArrayForEach(e, t)
		{
			if (cJSON_IsString(e) && used < size)
				used += (size_t)snprintf(
				    buf + used, size - used, "%s%s",
				    e == t->child ? "" : " or ",
				    e->valuestring);
		}
		return;
	}
	if (cJSON_IsString(t) && strcmp(t->valuestring, "array") == 0) {
		char sub[256];
		type_text(doc, cJSON_GetObjectItemCaseSensitive(node, "items"),
		          sub, sizeof sub, depth + 1);
		snprintf(buf, size,
		         strstr(sub, " or ") ? "array of (%s)" : "array of %s",
		         *sub ? sub : "values");
		return;
	}
	if (cJSON_IsString(t) && strcmp(t->valuestring, "object") == 0) {
		const cJSON *e,
		    *props =
		        cJSON_GetObjectItemCaseSensitive(node, "properties");
		used += (size_t)snprintf(buf, size, "object");
		if (props && props->child && used < size) {
			used += (size_t)snprintf(buf + used, size - used, " {");
			cJSON_ArrayForEach(e, props)
			{
				if (used < size)
					used += (size_t)snprintf(
					    buf + used, size - used, "%s%s",
					    e == props->child ? "" : ", ",
					    e->string);
			}
			if (used < size)
				snprintf(buf + used, size - used, "}");
		}
		return;
	}
	if (cJSON_IsString(t))
		snprintf(buf, size, "%s", t->valuestring);
	else
		snprintf(buf, size, "any");
}

/* Wraps text at 76 columns with an indent. */
static void wrap(FILE *f, const char *text, int indent)
{
	const char *p = text;
	int col = indent;

	fprintf(f, "%*s", indent, "");
	while (*p) {
		size_t w;
		while (*p == ' ')
			p++;
		w = strcspn(p, " ");
		if (!w)
			break;
		if (col > indent && col + 1 + (int)w > 76) {
			fprintf(f, "\n%*s", indent, "");
			col = indent;
		} else if (col > indent) {
			fputc(' ', f);
			col++;
		}
		fprintf(f, "%.*s", (int)w, p);
		col += (int)w;
		p += w;
	}
	fputc('\n', f);
}

static const char *str_of(const cJSON *o, const char *k)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, k);
	return cJSON_IsString(v) ? v->valuestring : NULL;
}

static void number_of(const cJSON *o, const char *k, const char *label,
                      char *buf, size_t size, size_t *used)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, k);
	if (cJSON_IsNumber(v) && *used < size) {
		char num[48];
		cli__fmt_cell(num, v->valuedouble, 0);
		*used += (size_t)snprintf(buf + *used, size - *used, "%s%s %s",
		                          *used ? ", " : "", label, num);
	}
}

static void print_method_help(FILE *f, const cJSON *doc, const cJSON *m)
{
	const cJSON *p, *params = cJSON_GetObjectItemCaseSensitive(m, "params");
	const char *s;

	fprintf(f, "%s", str_of(m, "name"));
	if ((s = str_of(m, "summary")))
		fprintf(f, ": %s", s);
	fputc('\n', f);
	if ((s = str_of(m, "description"))) {
		fputc('\n', f);
		wrap(f, s, 2);
	}
	fprintf(f, "\nParameters%s:\n",
	        params && params->child ? "" : " (none)");
	cJSON_ArrayForEach(p, params)
	{
		const cJSON *sch =
		    cJSON_GetObjectItemCaseSensitive(p, "schema");
		const cJSON *node = cli__schema_deref(doc, sch);
		const cJSON *req =
		    cJSON_GetObjectItemCaseSensitive(p, "required");
		const cJSON *dflt;
		const char *kind = NULL, *keys[] = {"x-unit-kind", "x-kind",
		                                    "x-quantity", "x-unit"};
		char type[512], extra[512];
		size_t used = 0;

		type_text(doc, sch, type, sizeof type, 0);
		for (size_t k = 0; k < 4 && !kind; k++) {
			kind = str_of(p, keys[k]);
			if (!kind)
				kind = str_of(node, keys[k]);
		}
		fprintf(f, "\n  %s%s  %s\n", str_of(p, "name"),
		        cJSON_IsTrue(req) ? " (required)" : "", type);
		extra[0] = '\0';
		if (kind)
			used += (size_t)snprintf(extra, sizeof extra,
			                         "unit kind %s", kind);
		dflt = cJSON_GetObjectItemCaseSensitive(node, "default");
		if (!dflt)
			dflt = cJSON_GetObjectItemCaseSensitive(p, "default");
		if (dflt && used < sizeof extra) {
			char *d = cJSON_PrintUnformatted(dflt);
			used += (size_t)snprintf(
			    extra + used, sizeof extra - used, "%sdefault %s",
			    used ? ", " : "", d ? d : "?");
			cJSON_free(d);
		}
		{
			/* bounds may sit in the first alternative (a number
			 * that may also be a distribution, or an array) */
			const cJSON *rn = node;
			for (int hop = 0;
			     hop < 3 && rn &&
			     !cJSON_GetObjectItem(rn, "minimum") &&
			     !cJSON_GetObjectItem(rn, "maximum") &&
			     !cJSON_GetObjectItem(rn, "exclusiveMinimum");
			     hop++) {
				const cJSON *alt =
				    cJSON_GetObjectItem(rn, "anyOf");
				if (!alt)
					alt = cJSON_GetObjectItem(rn, "oneOf");
				rn = alt ? cli__schema_deref(doc, alt->child)
				         : NULL;
			}
			if (rn)
				node = rn;
		}
		number_of(node, "minimum", ">=", extra, sizeof extra, &used);
		number_of(node, "exclusiveMinimum", ">", extra, sizeof extra,
		          &used);
		number_of(node, "maximum", "<=", extra, sizeof extra, &used);
		number_of(node, "exclusiveMaximum", "<", extra, sizeof extra,
		          &used);
		if (*extra)
			fprintf(f, "      (%s)\n", extra);
		if ((s = str_of(p, "description")))
			wrap(f, s, 6);
	}
	fprintf(f, "\nUnits: numbers are in each quantity kind's default "
	           "unit unless a 'units'\nparameter says otherwise "
	           "(service.info lists the kinds and units).\n");
}

/* ---- the call ---------------------------------------------------------- */

static int fetch(cli_conn *c, const char *method, long id, long long deadline,
                 cJSON **result)
{
	cJSON *r = NULL;
	int rc = cli__roundtrip(c, WHO, method, NULL, id, deadline, &r);

	*result = NULL;
	if (rc)
		return rc;
	*result = cJSON_DetachItemFromObjectCaseSensitive(r, "result");
	cJSON_Delete(r);
	return *result ? 0 : CLI_EXIT_RPC_ERROR;
}

static int method_help(const cli_opts *o, const char *method, long timeout)
{
	cli_conn c;
	cJSON *doc = NULL;
	const cJSON *m;
	int rc;

	if (cli_connect(o, &c))
		return CLI_EXIT_CONNECT;
	rc = fetch(&c, "rpc.discover", 1,
	           timeout < 0 ? -1 : cli__now_ms() + timeout, &doc);
	cli_disconnect(&c);
	if (rc)
		return rc;
	m = cli__method_doc(doc, method);
	if (m) {
		print_method_help(stdout, doc, m);
	} else {
		const char *s = cli__suggest_json(
		    method, cJSON_GetObjectItemCaseSensitive(doc, "methods"));
		fprintf(stderr, WHO ": the daemon has no method '%s'%s%s%s\n",
		        method, s ? "; did you mean " : "", s ? s : "",
		        s ? "?" : "");
		rc = CLI_EXIT_USAGE;
	}
	cJSON_Delete(doc);
	return rc;
}

int cli_cmd_call(const cli_opts *o, int argc, char **argv)
{
	cJSON *params = NULL, *resp = NULL, *info = NULL, *doc = NULL;
	const char *method = NULL, *pjson = NULL;
	cli_fmt fmt;
	int rc = CLI_EXIT_USAGE, help = 0;
	long timeout =
	    o->timeout_ms >= 0 ? o->timeout_ms : CLI_DEFAULT_CALL_TIMEOUT_MS;
	long long deadline;
	cli_conn c;
	int connected = 0;

	memset(&fmt, 0, sizeof fmt);
	fmt.pretty = isatty(1);
	params = cJSON_CreateObject();
	if (!params)
		return CLI_EXIT_IO;
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		if (strcmp(a, "--table") == 0)
			fmt.format = CLI_FMT_TABLE;
		else if (strcmp(a, "--csv") == 0)
			fmt.format = CLI_FMT_CSV;
		else if (strcmp(a, "--all-columns") == 0)
			fmt.all_columns = 1;
		else if (strcmp(a, "--help") == 0 || strcmp(a, "-h") == 0)
			help = 1;
		else if ((strcmp(a, "--params") == 0 ||
		          strcmp(a, "--format") == 0 ||
		          strcmp(a, "--qc") == 0 ||
		          strcmp(a, "--digits") == 0 ||
		          strcmp(a, "--timeout") == 0) &&
		         !v) {
			fprintf(stderr, WHO ": %s needs a value\n", a);
			goto out;
		} else if (strcmp(a, "--params") == 0) {
			pjson = v, i++;
		} else if (strcmp(a, "--format") == 0) {
			static const char *const names[] = {"json", "table",
			                                    "csv"};
			int k;
			for (k = 0; k < 3 && strcmp(v, names[k]); k++)
				;
			if (k == 3) {
				const char *s = cli__suggest(v, names, 3);
				fprintf(stderr,
				        WHO ": --format is json, table or "
				            "csv, not '%s'%s%s%s\n",
				        v, s ? "; did you mean " : "",
				        s ? s : "", s ? "?" : "");
				goto out;
			}
			fmt.format = k;
			i++;
		} else if (strcmp(a, "--qc") == 0) {
			if (strcmp(v, "names") == 0)
				fmt.qc_names = 1;
			else if (strcmp(v, "int") != 0) {
				fprintf(stderr,
				        WHO ": --qc is int or names, not "
				            "'%s'\n",
				        v);
				goto out;
			}
			i++;
		} else if (strcmp(a, "--digits") == 0) {
			char *end;
			long n = strtol(v, &end, 10);
			if (*end || n < 1 || n > 17) {
				fprintf(stderr, WHO ": --digits is 1..17\n");
				goto out;
			}
			fmt.digits = (int)n;
			i++;
		} else if (strcmp(a, "--timeout") == 0) {
			if (cli__parse_seconds(v, &timeout)) {
				fprintf(stderr,
				        WHO ": --timeout wants seconds, not "
				            "'%s'\n",
				        v);
				goto out;
			}
			i++;
		} else if (a[0] == '-' && a[1] == '-') {
			cli__unknown_option(WHO, a, call_opts,
			                    sizeof call_opts /
			                        sizeof *call_opts);
			goto out;
		} else if (!method) {
			method = a;
		} else if (cli__param_set(params, a, WHO)) {
			goto out;
		}
	}
	if (!method) {
		cli_usage_call(stderr);
		goto out;
	}
	if (help) {
		rc = method_help(o, method, timeout);
		goto out;
	}
	if (pjson) {
		cJSON *p = cJSON_ParseWithLength(pjson, strlen(pjson)), *m;
		if (!cJSON_IsObject(p)) {
			fprintf(stderr,
			        WHO ": --params must be a JSON object\n");
			cJSON_Delete(p);
			goto out;
		}
		/* name=value options win over --params */
		while ((m = params->child)) {
			cJSON_DetachItemViaPointer(params, m);
			cJSON_DeleteItemFromObjectCaseSensitive(p, m->string);
			cJSON_AddItemToObject(p, m->string, m);
		}
		cJSON_Delete(params);
		params = p;
	}
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	deadline = timeout > 0 ? cli__now_ms() + timeout : -1;
	if (cli__write_request(&c, method, params, 1) ||
	    (fmt.qc_names && cli__write_request(&c, "service.info", NULL, 2))) {
		rc = CLI_EXIT_IO;
		goto out;
	}
	rc = cli__await(&c, WHO, 1, deadline, &resp);
	if (rc)
		goto out;
	if (fmt.qc_names) {
		rc = cli__await(&c, WHO, 2, deadline, &info);
		if (rc)
			goto out;
		cli__qc_legend(cJSON_GetObjectItemCaseSensitive(info, "result"),
		               fmt.qc);
	}
	{
		const cJSON *err =
		    cJSON_GetObjectItemCaseSensitive(resp, "error");
		const cJSON *res =
		    cJSON_GetObjectItemCaseSensitive(resp, "result");
		if (err) {
			cli__print_error(stderr, "rockwire", err);
			/* A near miss gets a suggestion from the schema. */
			if (fetch(&c, "rpc.discover", 3, deadline, &doc) == 0)
				cli__explain_error(stderr, "rockwire", doc,
				                   method, params, err);
			rc = CLI_EXIT_RPC_ERROR;
			goto out;
		}
		if (fmt.format != CLI_FMT_JSON && cli__result_has_matrix(res) &&
		    fetch(&c, "rpc.discover", 3, deadline, &doc) == 0) {
			fmt.discover = doc;
			fmt.method = method;
		}
		if (cli__print_result(stdout, res, &fmt) || fflush(stdout)) {
			fprintf(stderr, WHO ": cannot write the output: %s\n",
			        strerror(errno));
			rc = CLI_EXIT_IO;
			goto out;
		}
	}
	rc = CLI_EXIT_OK;
out:
	if (connected)
		cli_disconnect(&c);
	cJSON_Delete(doc);
	cJSON_Delete(info);
	cJSON_Delete(resp);
	cJSON_Delete(params);
	return rc;
}
