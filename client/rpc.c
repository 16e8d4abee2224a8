/* JSON-RPC helpers of the client: answer validation, one round trip with
 * a deadline, suggestions from rpc.discover and the QC legend from
 * service.info. See rpc.h. */
#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "proto/numparse.h"
#include "rpc.h"

long long cli__now_ms(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (long long)t.tv_sec * 1000 + t.tv_nsec / 1000000;
}

int cli__id_equal(const cJSON *a, const cJSON *b)
{
	if (!a || !b)
		return 0;
	if (cJSON_IsNull(a) || cJSON_IsNull(b))
		return cJSON_IsNull(a) && cJSON_IsNull(b);
	if (cJSON_IsString(a) && cJSON_IsString(b))
		return strcmp(a->valuestring, b->valuestring) == 0;
	if (cJSON_IsNumber(a) && cJSON_IsNumber(b))
		return a->valuedouble == b->valuedouble;
	return 0;
}

static void id_text(const cJSON *id, char *buf, size_t size)
{
	char *s = id ? cJSON_PrintUnformatted(id) : NULL;
	snprintf(buf, size, "%.60s", s ? s : "(none)");
	cJSON_free(s);
}

int cli__rpc_check(const cJSON *r, const cJSON *expect_id, char *why,
                   size_t whylen)
{
	const cJSON *v, *id, *res, *err;

	if (!cJSON_IsObject(r)) {
		snprintf(why, whylen, "not a JSON object");
		return -1;
	}
	v = cJSON_GetObjectItemCaseSensitive(r, "jsonrpc");
	if (!cJSON_IsString(v) || strcmp(v->valuestring, "2.0") != 0) {
		snprintf(why, whylen, "no \"jsonrpc\":\"2.0\" member");
		return -1;
	}
	id = cJSON_GetObjectItemCaseSensitive(r, "id");
	if (!id) {
		snprintf(why, whylen, "no id");
		return -1;
	}
	if (!cJSON_IsNull(id) && !cJSON_IsString(id) && !cJSON_IsNumber(id)) {
		snprintf(why, whylen,
		         "the id is neither a string, a number "
		         "nor null");
		return -1;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (!res == !err) {
		snprintf(why, whylen,
		         res ? "both a result and an error"
		             : "neither a result nor an error");
		return -1;
	}
	if (err) {
		const cJSON *code =
		    cJSON_GetObjectItemCaseSensitive(err, "code");
		const cJSON *msg =
		    cJSON_GetObjectItemCaseSensitive(err, "message");
		if (!cJSON_IsObject(err) || !cJSON_IsNumber(code) ||
		    code->valuedouble != floor(code->valuedouble) ||
		    !cJSON_IsString(msg)) {
			snprintf(why, whylen,
			         "the error is not an object with an integer "
			         "code and a message");
			return -1;
		}
	}
	if (expect_id && !cli__id_equal(id, expect_id)) {
		char got[64], want[64];
		id_text(id, got, sizeof got);
		id_text(expect_id, want, sizeof want);
		/* An error about the request as a whole has a null id. */
		if (!(cJSON_IsNull(id) && err)) {
			snprintf(why, whylen, "it answers id %s, not %s", got,
			         want);
			return -1;
		}
	}
	return 0;
}

cJSON *cli__rpc_parse(const char *line, size_t len, const cJSON *expect_id,
                      char *why, size_t whylen)
{
	const char *end = NULL;
	cJSON *r = cJSON_ParseWithLengthOpts(line, len, &end, 0);

	if (!r) {
		snprintf(why, whylen, "not valid JSON");
		return NULL;
	}
	while (end && end < line + len &&
	       (*end == ' ' || *end == '\t' || *end == '\r' || *end == '\n'))
		end++;
	if (end && end < line + len) {
		snprintf(why, whylen, "text after the JSON value");
		cJSON_Delete(r);
		return NULL;
	}
	if (cli__rpc_check(r, expect_id, why, whylen)) {
		cJSON_Delete(r);
		return NULL;
	}
	return r;
}

/* ---- answers with long numeric arrays ---------------------------------- */

static const char *skip_ws(const char *p, const char *e)
{
	while (p < e && (*p == ' ' || *p == '\t' || *p == '\r' || *p == '\n'))
		p++;
	return p;
}

/* p at '"': past the closing quote, or NULL. *esc set when the string
 * has a backslash escape. */
static const char *skip_string(const char *p, const char *e, int *esc)
{
	for (p++; p < e; p++) {
		if (*p == '"')
			return p + 1;
		if (*p == '\\') {
			if (esc)
				*esc = 1;
			p++;
		}
	}
	return NULL;
}

/* Past one JSON value at p (structure only: cJSON checks the rest), or
 * NULL. */
static const char *skip_value(const char *p, const char *e)
{
	size_t depth = 0;

	if (p >= e)
		return NULL;
	if (*p != '{' && *p != '[' && *p != '"') {
		while (p < e && *p != ',' && *p != '}' && *p != ']' &&
		       *p != ' ' && *p != '\t' && *p != '\r' && *p != '\n')
			p++;
		return p;
	}
	while (p < e) {
		if (*p == '"') {
			p = skip_string(p, e, NULL);
			if (!p)
				return NULL;
			if (!depth)
				return p;
			continue;
		}
		if (*p == '{' || *p == '[')
			depth++;
		else if ((*p == '}' || *p == ']') && --depth == 0)
			return p + 1;
		p++;
	}
	return NULL;
}

static int skel_put(cli_numcols *c, size_t *used, const char *s, size_t n)
{
	if (c->skel_cap - *used < n + 1) {
		size_t cap = c->skel_cap ? c->skel_cap : 4096;
		char *d;
		while (cap - *used < n + 1)
			cap *= 2;
		d = realloc(c->skel, cap);
		if (!d)
			return -1;
		c->skel = d;
		c->skel_cap = cap;
	}
	memcpy(c->skel + *used, s, n);
	*used += n;
	return 0;
}

/* The array at p as doubles into the pool: 1 with *end past it, 0 when
 * it is not an array of numbers and nulls (left to cJSON), -1 when out
 * of memory. */
static int take_array(cli_numcols *c, const char *p, const char *e, size_t *n,
                      size_t *end)
{
	proto_num_err err;
	size_t room = c->pool_cap - c->pool_used, cnt, cend;
	/* no pool yet: a NULL base with no room (no offset on NULL) */
	double *at = c->pool ? c->pool + c->pool_used : NULL;
	int st = proto_num_array_parse(p, (size_t)(e - p), PROTO_NUM_NULLS, at,
	                               room, n, end, &err);
	if (st != PROTO_NUM_ESIZE)
		return st == PROTO_NUM_OK;
	if (proto_num_array_count(p, (size_t)(e - p), &cnt, &cend, &err))
		return 0;
	if (cnt > room) {
		size_t cap = c->pool_cap ? c->pool_cap : 4096;
		double *d;
		while (cap - c->pool_used < cnt)
			cap *= 2;
		d = realloc(c->pool, cap * sizeof *d);
		if (!d)
			return -1;
		c->pool = d;
		c->pool_cap = cap;
		room = cap - c->pool_used;
	}
	return proto_num_array_parse(p, (size_t)(e - p), PROTO_NUM_NULLS,
	                             c->pool + c->pool_used, room, n, end,
	                             &err) == PROTO_NUM_OK;
}

/* Scans the members of the result object at p ('{'), replacing numeric
 * arrays by "[]" in the skeleton. Returns the end of the object, or
 * NULL when the text cannot be followed (or out of memory: *oom). */
static const char *scan_result(cli_numcols *c, const char *line, const char *p,
                               const char *e, const char **copied, size_t *used,
                               int *oom)
{
	p = skip_ws(p + 1, e);
	if (p < e && *p == '}')
		return p + 1;
	for (;;) {
		const char *k = p, *ke;
		int esc = 0;
		if (p >= e || *p != '"' || !(ke = skip_string(p, e, &esc)))
			return NULL;
		p = skip_ws(ke, e);
		if (p >= e || *p != ':')
			return NULL;
		p = skip_ws(p + 1, e);
		if (p < e && *p == '[' && !esc && c->ncol < CLI_NUMCOLS_MAX) {
			size_t n, end;
			int got = take_array(c, p, e, &n, &end);
			if (got < 0) {
				*oom = 1;
				return NULL;
			}
			if (got) {
				cli_numcol *col = &c->col[c->ncol++];
				col->key = (size_t)(k + 1 - line);
				col->keylen = (size_t)(ke - k - 2);
				col->at = c->pool_used;
				col->n = n;
				c->pool_used += n;
				if (skel_put(c, used, *copied,
				             (size_t)(p - *copied)) ||
				    skel_put(c, used, "[]", 2)) {
					*oom = 1;
					return NULL;
				}
				p += end;
				*copied = p;
			} else if (!(p = skip_value(p, e)))
				return NULL;
		} else if (!(p = skip_value(p, e)))
			return NULL;
		p = skip_ws(p, e);
		if (p < e && *p == '}')
			return p + 1;
		if (p >= e || *p != ',')
			return NULL;
		p = skip_ws(p + 1, e);
	}
}

cJSON *cli__rpc_parse_cols(const char *line, size_t len, const cJSON *expect_id,
                           cli_numcols *cols, char *why, size_t whylen)
{
	const char *p = line, *e = line + len, *copied = line;
	size_t used = 0;
	int seen = 0, oom = 0;

	cols->line = line;
	cols->ncol = 0;
	cols->pool_used = 0;
	p = skip_ws(p, e);
	if (p >= e || *p != '{')
		goto whole;
	p = skip_ws(p + 1, e);
	while (p < e && *p != '}') {
		const char *k = p, *ke;
		if (*p != '"' || !(ke = skip_string(p, e, NULL)))
			goto whole;
		p = skip_ws(ke, e);
		if (p >= e || *p != ':')
			goto whole;
		p = skip_ws(p + 1, e);
		if (!seen && ke - k == 8 && memcmp(k, "\"result\"", 8) == 0 &&
		    p < e && *p == '{') {
			seen = 1;
			p = scan_result(cols, line, p, e, &copied, &used, &oom);
		} else
			p = skip_value(p, e);
		if (!p)
			goto whole;
		p = skip_ws(p, e);
		if (p < e && *p == ',')
			p = skip_ws(p + 1, e);
		else if (p >= e || *p != '}')
			goto whole;
	}
	if (!cols->ncol)
		goto whole;
	if (skel_put(cols, &used, copied, (size_t)(e - copied)))
		goto whole;
	return cli__rpc_parse(cols->skel, used, expect_id, why, whylen);
whole:
	if (oom) {
		snprintf(why, whylen, "out of memory");
		return NULL;
	}
	cols->ncol = 0;
	cols->pool_used = 0;
	return cli__rpc_parse(line, len, expect_id, why, whylen);
}

const double *cli__numcols_get(const cli_numcols *cols, const char *key,
                               size_t *n)
{
	size_t kl = strlen(key);

	for (size_t i = 0; i < cols->ncol; i++) {
		const cli_numcol *c = &cols->col[i];
		if (c->keylen == kl &&
		    memcmp(cols->line + c->key, key, kl) == 0) {
			*n = c->n;
			return cols->pool + c->at;
		}
	}
	*n = 0;
	return NULL;
}

void cli__numcols_free(cli_numcols *cols)
{
	free(cols->pool);
	free(cols->skel);
	memset(cols, 0, sizeof *cols);
}

int cli__await(cli_conn *c, const char *who, long id, long long deadline_ms,
               cJSON **resp)
{
	cJSON *want = cJSON_CreateNumber((double)id);
	char why[160];
	int rc = CLI_EXIT_IO;

	*resp = NULL;
	if (!want)
		return CLI_EXIT_IO;
	for (;;) {
		char *line;
		size_t len;
		long long left =
		    deadline_ms < 0 ? -1 : deadline_ms - cli__now_ms();
		int got;
		if (deadline_ms >= 0 && left < 0)
			left = 0;
		got = cli_read_line(c, &line, &len,
		                    left > 2000000000 ? 2000000000 : (int)left);
		if (got == -2 && deadline_ms >= 0 &&
		    cli__now_ms() < deadline_ms)
			continue; /* interrupted early */
		if (got == -2) {
			fprintf(stderr,
			        "%s: no answer from %s within the timeout "
			        "(--timeout)\n",
			        who, c->desc);
			rc = CLI_EXIT_TIMEOUT;
			break;
		}
		if (got == 0) {
			fprintf(stderr,
			        "%s: %s closed the connection without "
			        "answering\n",
			        who, c->desc);
			break;
		}
		if (got < 0)
			break;
		if (len == 0 || strspn(line, " \t\r") == len)
			continue; /* blank lines are no answers */
		*resp = cli__rpc_parse(line, len, want, why, sizeof why);
		if (!*resp) {
			fprintf(stderr,
			        "%s: invalid answer from %s (%s): %.120s%s\n",
			        who, c->desc, why, line,
			        len > 120 ? "..." : "");
			break;
		}
		rc = 0;
		break;
	}
	cJSON_Delete(want);
	return rc;
}

int cli__write_request(cli_conn *c, const char *method, const cJSON *params,
                       long id)
{
	cJSON *req = cJSON_CreateObject();
	char *text = NULL;
	int rc = -1;

	if (!req || !cJSON_AddStringToObject(req, "jsonrpc", "2.0") ||
	    !cJSON_AddNumberToObject(req, "id", (double)id) ||
	    !cJSON_AddStringToObject(req, "method", method))
		goto out;
	if (params) {
		cJSON *p = cJSON_Duplicate(params, 1);
		if (!p)
			goto out;
		cJSON_AddItemToObject(req, "params", p);
	}
	text = cJSON_PrintUnformatted(req);
	if (!text || cli_write_all(c, text, strlen(text)) ||
	    cli_write_all(c, "\n", 1))
		goto out;
	rc = 0;
out:
	cJSON_free(text);
	cJSON_Delete(req);
	return rc;
}

int cli__roundtrip(cli_conn *c, const char *who, const char *method,
                   const cJSON *params, long id, long long deadline_ms,
                   cJSON **resp)
{
	*resp = NULL;
	if (cli__write_request(c, method, params, id))
		return CLI_EXIT_IO;
	return cli__await(c, who, id, deadline_ms, resp);
}

void cli__print_error(FILE *f, const char *who, const cJSON *err)
{
	const cJSON *code = cJSON_GetObjectItemCaseSensitive(err, "code");
	const cJSON *msg = cJSON_GetObjectItemCaseSensitive(err, "message");
	const cJSON *data = cJSON_GetObjectItemCaseSensitive(err, "data");
	const cJSON *param = cJSON_GetObjectItemCaseSensitive(data, "param");
	const cJSON *why = cJSON_GetObjectItemCaseSensitive(data, "reason");

	fprintf(f, "%s: error %.0f: %s", who,
	        cJSON_IsNumber(code) ? code->valuedouble : 0.0,
	        cJSON_IsString(msg) ? msg->valuestring : "?");
	if (cJSON_IsString(param))
		fprintf(f, ": %s", param->valuestring);
	if (cJSON_IsString(why))
		fprintf(f, ": %s", why->valuestring);
	fputc('\n', f);
}

/* Optimal string alignment distance, ASCII case-insensitive, capped. */
static size_t edit_distance(const char *a, const char *b)
{
	size_t la = strlen(a), lb = strlen(b);
	size_t d[3][65];

	if (la > 64 || lb > 64)
		return (size_t)-1;
	for (size_t j = 0; j <= lb; j++)
		d[0][j] = j;
	for (size_t i = 1; i <= la; i++) {
		size_t *cur = d[i % 3], *prev = d[(i - 1) % 3],
		       *prev2 = d[(i + 1) % 3];
		cur[0] = i;
		for (size_t j = 1; j <= lb; j++) {
			int ca = tolower((unsigned char)a[i - 1]);
			int cb = tolower((unsigned char)b[j - 1]);
			size_t cost = ca != cb;
			size_t v = prev[j] + 1;
			if (cur[j - 1] + 1 < v)
				v = cur[j - 1] + 1;
			if (prev[j - 1] + cost < v)
				v = prev[j - 1] + cost;
			if (i > 1 && j > 1 &&
			    ca == tolower((unsigned char)b[j - 2]) &&
			    tolower((unsigned char)a[i - 2]) == cb &&
			    prev2[j - 2] + 1 < v)
				v = prev2[j - 2] + 1;
			cur[j] = v;
		}
	}
	return d[la % 3][lb];
}

const char *cli__suggest(const char *word, const char *const *cands, size_t n)
{
	size_t len = strlen(word), best = (size_t)-1;
	size_t limit = len <= 4 ? 1 : len <= 8 ? 2 : 3;
	const char *pick = NULL;

	if (!len)
		return NULL;
	for (size_t i = 0; i < n; i++) {
		size_t d;
		if (!cands[i] || strcmp(cands[i], word) == 0)
			continue;
		d = edit_distance(word, cands[i]);
		if (d < best) {
			best = d;
			pick = cands[i];
		}
	}
	return best <= limit ? pick : NULL;
}

const char *cli__suggest_json(const char *word, const cJSON *names)
{
	const char *cands[512];
	const cJSON *e;
	size_t n = 0;

	cJSON_ArrayForEach(e, names)
	{
		if (n == 512)
			break;
		if (cJSON_IsObject(names) && e->string)
			cands[n++] = e->string;
		else if (cJSON_IsArray(names) && cJSON_IsString(e))
			cands[n++] = e->valuestring;
		else if (cJSON_IsArray(names) && cJSON_IsObject(e)) {
			const cJSON *nm =
			    cJSON_GetObjectItemCaseSensitive(e, "name");
			if (cJSON_IsString(nm))
				cands[n++] = nm->valuestring;
		}
	}
	return cli__suggest(word, cands, n);
}

const cJSON *cli__method_doc(const cJSON *discover, const char *name)
{
	const cJSON *m,
	    *ms = cJSON_GetObjectItemCaseSensitive(discover, "methods");

	cJSON_ArrayForEach(m, ms)
	{
		const cJSON *nm = cJSON_GetObjectItemCaseSensitive(m, "name");
		if (cJSON_IsString(nm) && strcmp(nm->valuestring, name) == 0)
			return m;
	}
	return NULL;
}

const cJSON *cli__schema_deref(const cJSON *discover, const cJSON *node)
{
	for (int hops = 0; hops < 8 && node; hops++) {
		const cJSON *ref =
		    cJSON_GetObjectItemCaseSensitive(node, "$ref");
		const char *p;
		const cJSON *cur = discover;
		if (!cJSON_IsString(ref) ||
		    strncmp(ref->valuestring, "#/", 2) != 0)
			return node;
		p = ref->valuestring + 2;
		while (*p && cur) {
			char seg[128];
			size_t n = strcspn(p, "/");
			if (n >= sizeof seg)
				return node;
			memcpy(seg, p, n);
			seg[n] = '\0';
			cur = cJSON_GetObjectItemCaseSensitive(cur, seg);
			p += n + (p[n] == '/');
		}
		if (!cur)
			return node;
		node = cur;
	}
	return node;
}

/* Collects the alternatives of a schema node: itself, its oneOf/anyOf
 * members and array items, each dereferenced. */
static size_t alternatives(const cJSON *doc, const cJSON *node,
                           const cJSON **out, size_t max)
{
	size_t n = 0;
	const char *keys[] = {"oneOf", "anyOf"};

	node = cli__schema_deref(doc, node);
	if (!node || !max)
		return 0;
	out[n++] = node;
	for (size_t k = 0; k < 2; k++) {
		const cJSON *e,
		    *alt = cJSON_GetObjectItemCaseSensitive(node, keys[k]);
		cJSON_ArrayForEach(e, alt)
		{
			if (n < max)
				n += alternatives(doc, e, out + n, max - n);
		}
	}
	{
		const cJSON *items =
		    cJSON_GetObjectItemCaseSensitive(node, "items");
		if (items && n < max)
			n += alternatives(doc, items, out + n, max - n);
	}
	return n;
}

/* The schema of a dotted parameter path in a method doc; *parent gets
 * the schema (or params array) holding the last segment. */
static const cJSON *schema_at(const cJSON *doc, const cJSON *mdoc,
                              const char *path, const cJSON **siblings)
{
	const cJSON *params = cJSON_GetObjectItemCaseSensitive(mdoc, "params");
	const cJSON *node = NULL;
	char seg[128];
	const char *p = path;
	int first = 1;

	*siblings = params;
	while (*p) {
		size_t n = strcspn(p, ".");
		const cJSON *found = NULL;
		if (n >= sizeof seg)
			return NULL;
		memcpy(seg, p, n);
		seg[n] = '\0';
		p += n + (p[n] == '.');
		if (first) {
			const cJSON *e;
			cJSON_ArrayForEach(e, params)
			{
				const cJSON *nm =
				    cJSON_GetObjectItemCaseSensitive(e, "name");
				if (cJSON_IsString(nm) &&
				    strcmp(nm->valuestring, seg) == 0)
					found =
					    cJSON_GetObjectItemCaseSensitive(
					        e, "schema");
			}
			first = 0;
		} else {
			const cJSON *alts[32];
			size_t na = alternatives(doc, node, alts, 32);
			*siblings = NULL;
			for (size_t i = 0; i < na && !found; i++) {
				const cJSON *props =
				    cJSON_GetObjectItemCaseSensitive(
				        alts[i], "properties");
				if (props && !*siblings)
					*siblings = props;
				found = cJSON_GetObjectItemCaseSensitive(props,
				                                         seg);
				if (found)
					*siblings = props;
			}
		}
		if (!found)
			return NULL;
		node = found;
	}
	return node;
}

/* The value at a dotted path in params, or NULL. */
static const cJSON *value_at(const cJSON *params, const char *path)
{
	char seg[128];
	const char *p = path;
	const cJSON *v = params;

	while (*p && v) {
		size_t n = strcspn(p, ".");
		if (n >= sizeof seg)
			return NULL;
		memcpy(seg, p, n);
		seg[n] = '\0';
		p += n + (p[n] == '.');
		v = cJSON_GetObjectItemCaseSensitive(v, seg);
	}
	return v;
}

/* The strings among the enums of a schema node and its alternatives. */
static const char *suggest_enum(const cJSON *doc, const cJSON *node,
                                const char *word)
{
	const cJSON *alts[32];
	const char *cands[256];
	size_t na = alternatives(doc, node, alts, 32), n = 0;

	for (size_t i = 0; i < na; i++) {
		const cJSON *e,
		    *en = cJSON_GetObjectItemCaseSensitive(alts[i], "enum");
		cJSON_ArrayForEach(e, en)
		{
			if (cJSON_IsString(e) && n < 256)
				cands[n++] = e->valuestring;
		}
	}
	return cli__suggest(word, cands, n);
}

/* The word named in a reason such as "unknown value 'mudrok'; ...". */
static int quoted_word(const char *reason, char *buf, size_t size)
{
	const char *a = reason ? strchr(reason, '\'') : NULL, *b;
	if (!a || !(b = strchr(a + 1, '\'')) || (size_t)(b - a - 1) >= size)
		return 0;
	memcpy(buf, a + 1, (size_t)(b - a - 1));
	buf[b - a - 1] = '\0';
	return 1;
}

void cli__explain_error(FILE *f, const char *who, const cJSON *discover,
                        const char *method, const cJSON *params,
                        const cJSON *err)
{
	const cJSON *code = cJSON_GetObjectItemCaseSensitive(err, "code");
	const cJSON *data = cJSON_GetObjectItemCaseSensitive(err, "data");
	const cJSON *param = cJSON_GetObjectItemCaseSensitive(data, "param");
	const cJSON *reason = cJSON_GetObjectItemCaseSensitive(data, "reason");
	const cJSON *mdoc, *node, *siblings = NULL, *v;
	const char *s = NULL, *last;
	char word[128];

	if (!cJSON_IsNumber(code) || !discover)
		return;
	if (code->valuedouble == -32601) {
		s = cli__suggest_json(method, cJSON_GetObjectItemCaseSensitive(
		                                  discover, "methods"));
		if (s)
			fprintf(f, "%s: did you mean %s?\n", who, s);
		return;
	}
	if (code->valuedouble != -32602 || !cJSON_IsString(param))
		return;
	mdoc = cli__method_doc(discover, method);
	if (!mdoc)
		return;
	node = schema_at(discover, mdoc, param->valuestring, &siblings);
	last = strrchr(param->valuestring, '.');
	last = last ? last + 1 : param->valuestring;
	if (!node) {
		/* An unknown name: the closest one at its level. */
		s = cli__suggest_json(last, siblings);
		if (s)
			fprintf(f, "%s: did you mean %.*s%s?\n", who,
			        (int)(last - param->valuestring),
			        param->valuestring, s);
		return;
	}
	/* A known name with a value it does not take. */
	v = value_at(params, param->valuestring);
	if (cJSON_IsString(v))
		s = suggest_enum(discover, node, v->valuestring);
	else if (cJSON_IsString(reason) &&
	         quoted_word(reason->valuestring, word, sizeof word))
		s = suggest_enum(discover, node, word);
	if (s && cJSON_IsString(v))
		fprintf(f, "%s: did you mean %s=%s?\n", who, param->valuestring,
		        s);
	else if (s)
		fprintf(f, "%s: did you mean '%s' (in %s)?\n", who, s,
		        param->valuestring);
}

void cli__qc_legend(const cJSON *info, const char *names[CLI_QC_BITS])
{
	const cJSON *q,
	    *fl = cJSON_GetObjectItemCaseSensitive(info, "qc_flags");

	for (int b = 0; b < CLI_QC_BITS; b++)
		names[b] = NULL;
	cJSON_ArrayForEach(q, fl)
	{
		const cJSON *nm = cJSON_GetObjectItemCaseSensitive(q, "name");
		const cJSON *idx = cJSON_GetObjectItemCaseSensitive(q, "index");
		int b;
		if (!cJSON_IsString(nm) || !cJSON_IsNumber(idx) ||
		    idx->valuedouble < 0 || idx->valuedouble >= CLI_QC_BITS ||
		    idx->valuedouble != (int)idx->valuedouble)
			continue;
		b = (int)idx->valuedouble;
		if (!names[b])
			names[b] = nm->valuestring;
	}
}

int cli__parse_seconds(const char *s, long *ms)
{
	char *end;
	double v;

	if (!s || !*s)
		return -1;
	v = strtod(s, &end);
	if (end == s || *end != '\0' || !isfinite(v) || v < 0 ||
	    v > 86400 * 365)
		return -1;
	*ms = (long)(v * 1000 + 0.5);
	return 0;
}

void cli__unknown_option(const char *who, const char *arg,
                         const char *const *opts, size_t n)
{
	char name[64];
	const char *eq = strchr(arg, '='), *s;
	size_t len = eq ? (size_t)(eq - arg) : strlen(arg);

	if (len >= sizeof name)
		len = sizeof name - 1;
	memcpy(name, arg, len);
	name[len] = '\0';
	s = cli__suggest(name, opts, n);
	if (s)
		fprintf(stderr, "%s: unknown option %s; did you mean %s?\n",
		        who, name, s);
	else
		fprintf(stderr, "%s: unknown option %s (--help lists them)\n",
		        who, name);
}
