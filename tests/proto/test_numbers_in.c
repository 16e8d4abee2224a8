/* Numeric arrays parsed before cJSON (daemon/proto/inarr.c).
 *
 * The reference for every check is the path the pre-pass replaces: cJSON
 * parsing the whole line, its numbers converted by glibc's strtod. Each
 * request is answered twice, with the pre-pass off (proto__inarr_off)
 * and on, and the two answers must be the same bytes: results, echoed
 * inputs, error messages (element indices, "must be a number, not
 * null", ranges, PF_SCALAR / PF_ARRAY rules), batches, distributions,
 * session defaults. Each line is also checked to hold an array the
 * pre-pass really takes out, so no comparison is vacuous. The doubles of
 * the pre-pass itself are compared bit for bit with strtod, whole and
 * split across worker threads. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/harness.h"
#include "proto/internal.h"

/* A growing text buffer for building request lines. */
typedef struct text {
	char *s;
	size_t n, cap;
} text;

static void put(text *t, const char *fmt, ...)
{
	va_list ap;
	int k;

	for (;;) {
		va_start(ap, fmt);
		k = vsnprintf(t->s ? t->s + t->n : NULL, t->cap - t->n, fmt,
		              ap);
		va_end(ap);
		assert_true(k >= 0);
		if ((size_t)k < t->cap - t->n)
			break;
		t->cap = 2 * t->cap + (size_t)k + 64;
		t->s = realloc(t->s, t->cap);
		assert_non_null(t->s);
	}
	t->n += (size_t)k;
}

static void put_array(text *t, const char *fmt, size_t n, double a, double b)
{
	put(t, "[");
	for (size_t i = 0; i < n; i++)
		put(t, fmt, i ? "," : "", a + b * (double)i);
	put(t, "]");
}

/* How many arrays the pre-pass takes out of line. */
static size_t taken(const char *line)
{
	proto_inarr t;
	size_t n;

	assert_int_equal(proto__inarr_scan(NULL, line, strlen(line), 0, &t), 0);
	n = t.n;
	proto__inarr_free(&t);
	return n;
}

/* The answer to line with the pre-pass off, then on (a fresh session
 * each, so defaults set by earlier lines do not leak); both are heap
 * strings the caller frees. */
static void both(const char *const *lines, size_t n, char **off, char **on)
{
	for (int pass = 0; pass < 2; pass++) {
		harness h;
		text all = {0};
		proto__inarr_off = pass == 0;
		h_init(&h);
		put(&all, "%s", "");
		for (size_t i = 0; i < n; i++)
			put(&all, "%s", h_raw(&h, lines[i]));
		h_free(&h);
		*(pass == 0 ? off : on) = all.s;
	}
	proto__inarr_off = 0;
}

/* Lines answered with and without the pre-pass must give the same
 * bytes; the last line must hold a taken-out array. Returns the answer
 * (caller frees). */
static char *same(const char *const *lines, size_t n)
{
	char *off = NULL, *on = NULL;

	if (taken(lines[n - 1]) == 0)
		fail_msg("the pre-pass takes nothing out of %.200s",
		         lines[n - 1]);
	both(lines, n, &off, &on);
	if (strcmp(off, on) != 0)
		fail_msg("answers differ for %.300s\n cJSON: %.400s\n"
		         "pre-pass: %.400s",
		         lines[n - 1], off, on);
	free(off);
	return on;
}

static char *same1(const char *line)
{
	return same(&line, 1);
}

/* The error reason of a one-line answer (static copy). */
static const char *reason_of(const char *answer)
{
	static char why[512];
	cJSON *r = cJSON_Parse(answer), *e, *d, *w;

	assert_non_null(r);
	e = cJSON_GetObjectItemCaseSensitive(r, "error");
	d = cJSON_GetObjectItemCaseSensitive(e, "data");
	w = cJSON_GetObjectItemCaseSensitive(d, "reason");
	snprintf(why, sizeof why, "%s",
	         cJSON_IsString(w) ? w->valuestring : "");
	cJSON_Delete(r);
	return why;
}

#define HEAD "{\"jsonrpc\":\"2.0\",\"id\":7,\"method\":"

/* ---- the doubles ------------------------------------------------------- */

/* Random decimal texts of several kinds, as a JSON array in t and as
 * tokens for strtod. */
static void random_numbers(text *t, size_t n, unsigned seed)
{
	uint64_t x = 0x9e3779b97f4a7c15ull ^ seed;

	put(t, "{\"a\":[");
	for (size_t i = 0; i < n; i++) {
		uint64_t bits;
		double d;
		x ^= x << 13, x ^= x >> 7, x ^= x << 17; /* xorshift64 */
		bits = x;
		switch (i % 6) {
		case 0: /* any finite double, printed to 17 digits */
			memcpy(&d, &bits, sizeof d);
			if (!isfinite(d))
				d = 1.5;
			put(t, "%s%.17g", i ? "," : "", d);
			break;
		case 1: /* a log reading */
			put(t, "%s%.4f", i ? "," : "",
			    (double)(bits % 10000000) / 1000);
			break;
		case 2: /* subnormals and the smallest normals */
			put(t, "%s%.17ge-%d", i ? "," : "",
			    (double)(bits % 1000000) / 1e5,
			    300 + (int)(i % 24));
			break;
		case 3: /* integers around 2^53 */
			put(t, "%s%llu", i ? "," : "",
			    (unsigned long long)(9007199254740992ull - 500 +
			                         bits % 1000));
			break;
		case 4: /* long digit strings, beyond 19 digits */
			put(t, "%s-0.%llu%llu", i ? "," : "",
			    (unsigned long long)(bits % 100000000000ull),
			    (unsigned long long)(x % 10000000000000ull));
			break;
		default: /* null, zero and minus zero */
			put(t, "%s%s", i ? "," : "",
			    bits % 3 == 0   ? "null"
			    : bits % 3 == 1 ? "-0"
			                    : "0e5");
			break;
		}
	}
	put(t, "]}");
}

/* Checks the scan of t against strtod on each token. */
static void check_against_strtod(const text *t, const proto_inarr *a, size_t n)
{
	const char *p = strchr(t->s, '[') + 1;

	assert_int_equal(a->n, 1);
	assert_int_equal(a->arr[0].n, n);
	for (size_t i = 0; i < n; i++) {
		double want, got = a->arr[0].v[i];
		char *end;
		if (strncmp(p, "null", 4) == 0) {
			assert_true(isnan(got));
			end = (char *)p + 4;
		} else {
			want = strtod(p, &end); /* glibc: correctly rounded */
			if (memcmp(&want, &got, sizeof got) != 0)
				fail_msg("element %zu '%.40s': strtod %.17g, "
				         "pre-pass %.17g",
				         i, p, want, got);
		}
		p = end + 1;
	}
}

static void test_doubles_match_strtod(void **state)
{
	const size_t n = 60000;
	text t = {0};
	proto_inarr a;
	(void)state;

	random_numbers(&t, n, 1);
	assert_int_equal(proto__inarr_scan(NULL, t.s, t.n, 0, &a), 0);
	check_against_strtod(&t, &a, n);
	/* the line cJSON sees: the array is a placeholder string */
	assert_non_null(a.text);
	assert_int_equal(a.len, strlen("{\"a\":\"\xff"
	                               "0\"}"));
	assert_memory_equal(a.text,
	                    "{\"a\":\"\xff"
	                    "0\"}",
	                    a.len);
	proto__inarr_free(&a);
	free(t.s);
}

/* An array of more than 200,000 elements is parsed in spans on the
 * worker threads: the same doubles as one thread and as strtod. */
static void test_split_across_threads(void **state)
{
	const size_t n = 450000;
	text t = {0};
	proto_inarr one, two;
	proto_limits lim;
	proto_ctx *c1, *c2;
	(void)state;

	random_numbers(&t, n, 2);
	proto_limits_default(&lim);
	lim.threads = 1;
	c1 = proto_ctx_new(&lim);
	lim.threads = 2;
	c2 = proto_ctx_new(&lim);
	assert_int_equal(proto__inarr_scan(c1, t.s, t.n, 0, &one), 0);
	assert_int_equal(proto__inarr_scan(c2, t.s, t.n, 0, &two), 0);
	assert_int_equal(two.arr[0].n, n);
	assert_memory_equal(one.arr[0].v, two.arr[0].v, n * sizeof(double));
	check_against_strtod(&t, &two, n);
	proto__inarr_free(&one);
	proto__inarr_free(&two);
	proto_ctx_free(c1);
	proto_ctx_free(c2);
	free(t.s);
}

/* What is taken out and what is not. */
static void test_what_is_taken(void **state)
{
	char sixteen[256], fifteen[256];
	(void)state;

	snprintf(sixteen, sizeof sixteen, "{\"a\":[%s]}",
	         "1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16");
	snprintf(fifteen, sizeof fifteen, "{\"a\":[%s]}",
	         "1,2,3,4,5,6,7,8,9,10,11,12,13,14,15");
	assert_int_equal(taken(sixteen), 1);
	assert_int_equal(taken(fifteen), 0);
	/* 128 bytes of text also qualify, whatever the count */
	assert_int_equal(
	    taken("{\"a\":[1.00000000000000000000000000000000000000000000000,"
	          "2.00000000000000000000000000000000000000000000000000000,"
	          "3.0000000000000000000000000000000]}"),
	    1);
	/* the line itself (a batch or a bare array) is never taken */
	assert_int_equal(taken("[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17]"),
	                 0);
	/* inside a string it is text */
	assert_int_equal(taken("{\"a\":\"[1,2,3,4,5,6,7,8,9,10,11,12,13,14,"
	                       "15,16,17]\"}"),
	                 0);
	assert_int_equal(taken("{\"a\":\"\\\"[1,2,3,4,5,6,7,8,9,10,11,12,13,"
	                       "14,15,16,17]\"}"),
	                 0);
	/* refused by the fast parse: left for cJSON */
	assert_int_equal(taken("{\"a\":[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,"
	                       "16,1e999]}"),
	                 0);
	assert_int_equal(taken("{\"a\":[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,"
	                       "16,\"x\"]}"),
	                 0);
	/* nested: the rows are taken, not the outer array */
	assert_int_equal(
	    taken("{\"a\":[[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16],"
	          "[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16]]}"),
	    2);
}

/* ---- answers: the same with and without the pre-pass ------------------ */

static void test_results_identical(void **state)
{
	text t = {0};
	char *a;
	(void)state;

	/* 1000 samples with 17 significant digits each; vp, vs and rho
	 * come back in the result, so the doubles are compared as well as
	 * everything computed from them */
	put(&t, HEAD "\"elastic.convert\",\"params\":{\"vp\":");
	put_array(&t, "%s%.17g", 1000, 3000.123456789012, 1.0000000000000002);
	put(&t, ",\"vs\":");
	put_array(&t, "%s%.17g", 1000, 1500.987654321098, 0.333333333333333);
	put(&t, ",\"rho\":");
	put_array(&t, "%s%.17g", 1000, 2.2500000000000001, 0.0001);
	put(&t, "}}");
	a = same1(t.s);
	assert_non_null(strstr(a, "\"result\""));
	free(a);
	free(t.s);
}

/* Every error message for a bad array, from cJSON's path and from the
 * pre-pass, and as the message says today. */
static void test_errors_identical(void **state)
{
	static const struct {
		const char *line, *why;
	} cases[] = {
	    /* null where nulls are not allowed (reflect.interface angles) */
	    {HEAD "\"reflect.interface\",\"params\":{\"upper\":{\"vp\":2900,"
	          "\"vs\":1350,\"rho\":2.45},\"lower\":{\"vp\":2827.5,\"vs\":"
	          "1733.5,\"rho\":2.0204},\"angle\":[0,1,2,3,4,null,6,7,8,9,"
	          "10,11,12,13,14,15,16,17]}}",
	     "element 5 must be a number, not null"},
	    /* a bound, with the element index */
	    {HEAD "\"reflect.interface\",\"params\":{\"upper\":{\"vp\":2900,"
	          "\"vs\":1350,\"rho\":2.45},\"lower\":{\"vp\":2827.5,\"vs\":"
	          "1733.5,\"rho\":2.0204},\"angle\":[0,1,2,3,4,5,6,7,8,9,10,"
	          "11,12,13,14,15,16,17,95]}}",
	     NULL},
	    /* PF_SCALAR given an array */
	    {HEAD "\"reflect.impedance\",\"params\":{\"vp\":[2900,2827.5],"
	          "\"vs\":[1350,1733.5],\"rho\":[2.45,2.0204],\"angle\":30,"
	          "\"ref\":{\"vp\":[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,"
	          "17]}}}",
	     "must be a single number: it is one value for the whole "
	     "request, not an array"},
	    /* a string where names are wanted: element 0 */
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":3000,\"vs\":1500,"
	          "\"rho\":2.3,\"fields\":[1,2,3,4,5,6,7,8,9,10,11,12,13,14,"
	          "15,16,17]}}",
	     "element 0 must be an output name"},
	    /* an array of objects wanted */
	    {HEAD "\"reflect.interface\",\"params\":{\"upper\":[1,2,3,4,5,6,"
	          "7,8,9,10,11,12,13,14,15,16,17],\"lower\":{\"vp\":2827.5,"
	          "\"vs\":1733.5,\"rho\":2.0204},\"angle\":10}}",
	     NULL},
	    /* one value per sample wanted, an array of the wrong length */
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":[3000,3000,3000,"
	          "3000,3000,3000,3000,3000,3000,3000,3000,3000,3000,3000,"
	          "3000,3000,3000],\"vs\":[1500,1500],\"rho\":2.3}}",
	     NULL},
	    /* params itself a numeric array, and an id that is one */
	    {HEAD "\"elastic.convert\",\"params\":{\"x\":[1,2,3,4,5,6,7,8,9,"
	          "10,11,12,13,14,15,16,17]}}",
	     NULL},
	    {"{\"jsonrpc\":\"2.0\",\"id\":[1,2,3,4,5,6,7,8,9,10,11,12,13,14,"
	     "15,16,17],\"method\":\"elastic.convert\"}",
	     "must be a string, a number or null"},
	    /* invalid JSON after a taken array: the offset is the line's */
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":[1,2,3,4,5,6,7,8,9,"
	          "10,11,12,13,14,15,16,17] \"vs\":1}}",
	     "not valid JSON near byte offset 110"},
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":[1,2,3,4,5,6,7,8,9,"
	          "10,11,12,13,14,15,16,17],\"vs\":[1,2,3,4,5,6,7,8,9,10,11,"
	          "12,13,14,15,16,17],}}",
	     "not valid JSON near byte offset 160"},
	    /* a line that ends just after a taken array (cJSON names its
	     * last byte) */
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":[1,2,3,4,5,6,7,8,9,"
	          "10,11,12,13,14,15,16,17]",
	     "not valid JSON near byte offset 108"},
	    /* duplicate keys around taken arrays */
	    {HEAD "\"elastic.convert\",\"params\":{\"vp\":[1,2,3,4,5,6,7,8,9,"
	          "10,11,12,13,14,15,16,17],\"vp\":[1,2,3,4,5,6,7,8,9,10,11,"
	          "12,13,14,15,16,17]}}",
	     "duplicate key 'vp': each member may appear once"},
	};
	(void)state;

	for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
		char *a = same1(cases[i].line);
		if (cases[i].why && strcmp(reason_of(a), cases[i].why) != 0)
			fail_msg("case %zu: reason '%s', want '%s'", i,
			         reason_of(a), cases[i].why);
		assert_null(strstr(a, "\"result\""));
		free(a);
	}
}

/* Bad arrays the fast parse refuses keep today's messages (they never
 * become placeholders, so compare with the messages themselves). */
static void test_refused_arrays_keep_messages(void **state)
{
	static const struct {
		const char *elem, *why;
	} cases[] = {
	    {"1e999", "element 16: number out of range: it does not fit in a "
	              "double"},
	    {"\"x\"", "element 16 must be a number or null, not a string"},
	    {"[1]", "element 16 must be a number or null, not an array"},
	    {"true", "element 16 must be a number or null, not a boolean"},
	    {"{}", "element 16 must be a number or null, not an object"},
	};
	(void)state;

	for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
		char line[512], *off, *on;
		const char *lp = line;
		snprintf(line, sizeof line,
		         HEAD "\"elastic.convert\",\"params\":{\"vp\":[3000,"
		              "3000,3000,3000,3000,3000,3000,3000,3000,3000,"
		              "3000,3000,3000,3000,3000,3000,%s],\"vs\":1500,"
		              "\"rho\":2.3}}",
		         cases[i].elem);
		assert_int_equal(taken(line), 0);
		both(&lp, 1, &off, &on);
		assert_string_equal(off, on);
		assert_string_equal(reason_of(on), cases[i].why);
		free(off);
		free(on);
	}
	/* an empty array is not a candidate; its message stays */
	{
		harness h;
		h_init(&h);
		assert_string_equal(
		    reason_of(h_raw(&h, HEAD "\"elastic.convert\",\"params\":"
		                             "{\"vp\":[],\"vs\":1500,\"rho\":"
		                             "2.3}}")),
		    "empty array: give at least one value");
		h_free(&h);
	}
}

/* A client string that looks like a placeholder is an ordinary string:
 * the escape \u00ff decodes to the two bytes C3 BF, and a raw 0xFF byte
 * is refused as invalid UTF-8 before the pre-pass. */
static void test_placeholder_lookalike(void **state)
{
	harness h;
	cJSON *r;
	(void)state;

	h_init(&h);
	r = h_call(&h, HEAD "\"elastic.convert\",\"params\":{\"vp\":"
	                    "\"\\u00ff0\",\"vs\":1500,\"rho\":2.3}}");
	assert_int_equal(h_code(r), -32602);
	assert_string_equal(h_param(r), "vp");
	cJSON_Delete(r);
	r = h_call(&h, HEAD "\"elastic.convert\",\"params\":{\"vp\":"
	                    "\"\xff"
	                    "0\",\"vs\":1500,\"rho\":2.3}}");
	assert_int_equal(h_code(r), -32700);
	cJSON_Delete(r);
	h_free(&h);
}

static void test_batches(void **state)
{
	text t = {0};
	char *a;
	(void)state;

	put(&t, "[");
	for (int k = 0; k < 3; k++) {
		put(&t,
		    "%s{\"jsonrpc\":\"2.0\",\"id\":%d,\"method\":"
		    "\"elastic.convert\",\"params\":{\"vp\":",
		    k ? "," : "", k);
		put_array(&t, "%s%.17g", 300, 3000 + k, 0.7);
		put(&t, ",\"vs\":1500,\"rho\":");
		put_array(&t, "%s%.6g", 300, 2.1, 0.001);
		put(&t, "}}");
	}
	/* a notification among them, and a member that is not an object */
	put(&t, ",{\"jsonrpc\":\"2.0\",\"method\":\"elastic.convert\","
	        "\"params\":{\"vp\":");
	put_array(&t, "%s%g", 20, 3000, 1);
	put(&t, ",\"vs\":1500,\"rho\":2.2}},17]");
	a = same1(t.s);
	assert_true(a[0] == '[');
	assert_non_null(strstr(a, "\"id\":2,\"result\""));
	free(a);
	/* a batch of numbers stays a batch: one error per member */
	{
		harness h;
		const char *o;
		size_t n = 0;
		h_init(&h);
		o = h_raw(&h, "[1,2,3,4,5,6,7,8,9,10,11,12,13,14,15,16,17]");
		for (const char *p = o; (p = strstr(p, "a request must be a "
		                                       "JSON object"));
		     p++)
			n++;
		assert_int_equal(n, 17);
		h_free(&h);
	}
	free(t.s);
}

/* Distributions holding arrays (rock.substitute under uncertainty),
 * with a fixed seed: the same draws either way. */
static void test_distributions(void **state)
{
	text t = {0};
	char *a;
	(void)state;

	put(&t, HEAD "\"rock.substitute\",\"params\":{\"vp\":");
	put_array(&t, "%s%.17g", 40, 3000, 10.1);
	put(&t, ",\"vs\":1600,\"rho\":2.25,\"porosity\":{\"dist\":"
	        "\"normal\",\"mean\":");
	put_array(&t, "%s%.17g", 40, 0.2, 0.001);
	put(&t, ",\"sd\":");
	put_array(&t, "%s%.17g", 40, 0.01, 0.0001);
	put(&t, "},\"mineral\":{\"k\":37,\"rho\":2.65},\"fluid_in_place\":"
	        "{\"k\":2.8,\"rho\":1.05},\"fluid_new\":{\"k\":0.05,\"rho\":"
	        "0.2},\"uncertainty\":{\"draws\":200,\"seed\":3}}}");
	a = same1(t.s);
	assert_non_null(strstr(a, "\"result\""));
	free(a);
	/* a null in a distribution's array: today's message */
	t.n = 0;
	put(&t, HEAD "\"rock.substitute\",\"params\":{\"vp\":3000,\"vs\":"
	             "1600,\"rho\":2.25,\"porosity\":{\"dist\":\"normal\","
	             "\"mean\":[0.2,0.2,0.2,0.2,0.2,0.2,0.2,0.2,0.2,0.2,0.2,"
	             "0.2,0.2,0.2,0.2,0.2,null],\"sd\":0.01},\"mineral\":{"
	             "\"k\":37,\"rho\":2.65},\"fluid_in_place\":{\"k\":2.8,"
	             "\"rho\":1.05},\"fluid_new\":{\"k\":0.05,\"rho\":0.2},"
	             "\"uncertainty\":{\"draws\":200,\"seed\":3}}}");
	a = same1(t.s);
	assert_string_equal(reason_of(a), "element 16 must be a number");
	free(a);
	free(t.s);
}

/* session.set with arrays (plain and inside a distribution), echoed
 * by session.get and inherited by a request. */
static void test_session_defaults(void **state)
{
	text set = {0}, dist = {0};
	const char *lines[4];
	char *a;
	(void)state;

	put(&set, HEAD "\"session.set\",\"params\":{\"vs\":");
	put_array(&set, "%s%.17g", 50, 1500.1, 0.1);
	put(&set, ",\"rho\":");
	put_array(&set, "%s%.17g", 50, 2.2, 0.001);
	put(&set, "}}");
	put(&dist, HEAD "\"session.set\",\"params\":{\"rock.substitute\":{"
	                "\"porosity\":{\"dist\":\"normal\",\"mean\":");
	put_array(&dist, "%s%.17g", 50, 0.2, 0.001);
	put(&dist, ",\"sd\":0.01}}}}");
	lines[0] = set.s;
	lines[1] = dist.s;
	lines[2] = HEAD "\"session.get\"}";
	lines[3] = set.s;
	a = same(lines, 2);
	free(a);
	a = same(lines, 4);
	assert_non_null(strstr(a, "\"porosity\":{\"dist\":\"normal\","
	                          "\"mean\":[0.2,"));
	free(a);
	/* a request inheriting the 50-sample defaults */
	{
		text req = {0};
		put(&req, HEAD "\"elastic.convert\",\"params\":{\"vp\":");
		put_array(&req, "%s%.17g", 50, 3000, 1.5);
		put(&req, "}}");
		lines[1] = req.s;
		a = same(lines, 2);
		assert_non_null(strstr(a, "\"n\":50"));
		free(a);
		free(req.s);
	}
	free(set.s);
	free(dist.s);
}

/* rock.template axes and seismic.avo_fit amplitude grids (nested
 * arrays: the rows are taken out). */
static void test_axes_and_grids(void **state)
{
	text t = {0};
	char *a;
	(void)state;

	put(&t, HEAD "\"rock.template\",\"params\":{\"model\":\"stiff_sand\","
	             "\"p_eff\":20,\"porosity_axis\":");
	put_array(&t, "%s%.17g", 30, 0.05, 0.01);
	put(&t, ",\"sw_axis\":");
	put_array(&t, "%s%.17g", 21, 0, 0.05);
	put(&t, ",\"brine\":{\"k\":2.8,\"rho\":1.03},\"hydrocarbon\":{\"k\":"
	        "0.06,\"rho\":0.2},\"fields\":[\"ai\",\"vpvs\"]}}");
	a = same1(t.s);
	assert_non_null(strstr(a, "\"result\""));
	free(a);
	/* an axis that decreases: today's message, element named */
	t.n = 0;
	put(&t, HEAD "\"rock.template\",\"params\":{\"model\":\"stiff_sand\","
	             "\"p_eff\":20,\"porosity_axis\":");
	put_array(&t, "%s%.17g", 30, 0.35, -0.01);
	put(&t, ",\"sw_axis\":[0,1],\"brine\":{\"k\":2.8,\"rho\":1.03},"
	        "\"hydrocarbon\":{\"k\":0.06,\"rho\":0.2}}}");
	a = same1(t.s);
	assert_string_equal(reason_of(a), "element 1: an axis must be "
	                                  "strictly increasing");
	free(a);
	/* an amplitude grid [angle][time] of 6 angles x 40 samples */
	t.n = 0;
	put(&t, HEAD "\"seismic.avo_fit\",\"params\":{\"angle\":[0,6,12,18,"
	             "24,30],\"amplitude\":[");
	for (int k = 0; k < 6; k++) {
		double s2 = pow(sin(6.0 * k * 3.14159265358979323846 / 180), 2);
		put(&t, "%s", k ? "," : "");
		put_array(&t, "%s%.17g", 40, 0.05 - 0.2 * s2, 0.001 * s2);
	}
	put(&t, "]}}");
	a = same1(t.s);
	assert_non_null(strstr(a, "\"result\""));
	free(a);
	free(t.s);
}

/* The work estimate counts taken-out arrays as cJSON's would. */
static void test_cost(void **state)
{
	text t = {0};
	harness h;
	size_t off, on;
	(void)state;

	put(&t, HEAD "\"reflect.series\",\"params\":{\"vp\":");
	put_array(&t, "%s%.17g", 5000, 3000, 0.1);
	put(&t, ",\"vs\":1500,\"rho\":2.3,\"angle\":");
	put_array(&t, "%s%g", 20, 0, 1);
	put(&t, "}}");
	h_init(&h);
	proto__inarr_off = 1;
	off = rw_proto_cost(h.s, t.s, t.n);
	proto__inarr_off = 0;
	on = rw_proto_cost(h.s, t.s, t.n);
	assert_int_equal(off, on);
	assert_true(on >= 5000 * 20);
	h_free(&h);
	free(t.s);
}

/* Every numeric array of line, however short, padded with blanks after
 * its '[' so that it passes INARR_MIN_BYTES and the pre-pass takes it
 * out: a method that walks a short array (a covariance row, a 3 x 3
 * matrix, a few angles) with cJSON's own iteration would see it empty.
 * Strings are copied as they are. */
static void pad_arrays(text *t, const char *line)
{
	int in_str = 0;

	t->n = 0;
	put(t, "%s", "");
	for (const char *p = line; *p; p++) {
		put(t, "%c", *p);
		if (in_str) {
			if (*p == '\\' && p[1])
				put(t, "%c", *++p);
			else if (*p == '"')
				in_str = 0;
		} else if (*p == '"') {
			in_str = 1;
		} else if (*p == '[' && (p[1] == '-' || p[1] == 'n' ||
		                         (p[1] >= '0' && p[1] <= '9'))) {
			put(t, "%130s", "");
		}
	}
}

/* The requests of every demo file (the .jsonl files of demo-requests, each one
 * session) and the same requests with every numeric array padded: the
 * same bytes with the pre-pass on and off. */
static void test_demo_requests_padded(void **state)
{
	static const char *const files[] = {"elastic-basics.jsonl",
	                                    "orrimund-3-samples.jsonl",
	                                    "pressures-orrimund-5.jsonl",
	                                    "prospect-quillmoor.jsonl",
	                                    "reservoir-korvane.jsonl",
	                                    "rock-models.jsonl",
	                                    "well-tie.jsonl"};
	size_t padded_taken = 0, lines_run = 0;
	(void)state;

	for (size_t f = 0; f < sizeof files / sizeof *files; f++) {
		char path[4096], row[1 << 16];
		text pad = {0};
		char **orig = NULL, **padl = NULL;
		size_t n = 0;
		FILE *fp;

		snprintf(path, sizeof path, "%s/demo-requests/%s",
		         RW_SOURCE_DIR, files[f]);
		fp = fopen(path, "r");
		if (!fp)
			fail_msg("cannot open %s", path);
		while (fgets(row, sizeof row, fp)) {
			size_t len = strlen(row);
			if (len && row[len - 1] == '\n')
				row[--len] = '\0';
			if (row[0] != '{' && row[0] != '[')
				continue; /* comments and blank lines */
			if (strstr(row, "\"service."))
				continue; /* times and counters differ */
			orig = realloc(orig, (n + 1) * sizeof *orig);
			padl = realloc(padl, (n + 1) * sizeof *padl);
			assert_non_null(orig);
			assert_non_null(padl);
			orig[n] = strdup(row);
			pad_arrays(&pad, row);
			padl[n] = strdup(pad.s);
			padded_taken += taken(padl[n]);
			n++;
		}
		fclose(fp);
		for (int kind = 0; kind < 2; kind++) {
			char **lines = kind ? padl : orig;
			char *off = NULL, *on = NULL;
			both((const char *const *)lines, n, &off, &on);
			if (strcmp(off, on) != 0) {
				size_t d = 0;
				while (off[d] == on[d])
					d++;
				fail_msg("%s%s: answers differ at byte %zu\n"
				         " cJSON: %.300s\n pre-pass: %.300s",
				         files[f], kind ? " (padded)" : "", d,
				         off + (d > 100 ? d - 100 : 0),
				         on + (d > 100 ? d - 100 : 0));
			}
			free(off);
			free(on);
		}
		for (size_t i = 0; i < n; i++) {
			free(orig[i]);
			free(padl[i]);
		}
		lines_run += n;
		free(orig);
		free(padl);
		free(pad.s);
	}
	/* not vacuous: the padding makes the pre-pass take arrays out */
	assert_true(lines_run >= 20);
	assert_true(padded_taken >= lines_run);
}

/* A covariance row of long numbers (more than INARR_MIN_BYTES of text)
 * is taken out by the pre-pass; its values are read all the same. */
static void test_covariance_rows(void **state)
{
	const char *line =
	    HEAD "\"pressure.pore\",\"params\":{\"tvd\":1000,\"dtp\":120,"
	         "\"sv\":20,\"trend\":{\"dt_ma\":60,\"dt_ml\":180,\"c\":6e-4,"
	         "\"covariance_si\":[[4."
	         "00000000000000000000000000000000000000000000e-12,"
	         "1.0000000000000000000000000000000000e-12,"
	         "3.0000000000000000000000000000000000e-11],"
	         "[1e-12,2e-12,1e-11],[3e-11,1e-11,1e-9]]}}}";
	char *a;

	(void)state;
	a = same1(line);
	assert_null(strstr(a, "\"error\""));
	assert_non_null(strstr(a, "\"pp_sigma_trend\":0.54"));
	free(a);
}

/* A numeric array where JSON allows no value (an object key, a member
 * without a key) is not JSON: the answer is the parse error cJSON gives
 * for the line as sent, at the byte the client wrote, never a parameter
 * named by the placeholder (its 0xFF byte is not UTF-8). Found by the
 * fuzzer. */
static void test_array_where_no_value_may(void **state)
{
	text a = {0}, b = {0}, c = {0};
	char *r;
	(void)state;

	put(&a, HEAD "\"elastic.convert\",\"params\":{");
	put_array(&a, "%s%.17g", 20, 3000, 1);
	put(&a, ":1}}");
	put(&b, HEAD "\"elastic.convert\",\"params\":{\"vs\":1500,");
	put_array(&b, "%s%.17g", 20, 3000, 1);
	put(&b, "}}");
	/* the fuzzer's line: an array for the params' first key, cut */
	put(&c, HEAD "\"session.set\",\"params\":{");
	put_array(&c, "%s%.17g", 24, 2.1, 0.01);
	put(&c, "}00000002],\"vs\":1600}}");
	/* cJSON stops at the '[' where a key must start, or one past it;
	 * the old answer was past the whole array, or a parameter named
	 * by the placeholder */
	for (int k = 0; k < 3; k++) {
		const char *line = k == 0 ? a.s : k == 1 ? b.s : c.s;
		size_t key = (size_t)(strchr(line, '[') - line), off = 0;
		r = same1(line);
		assert_int_equal(sscanf(reason_of(r),
		                        "not valid JSON near byte offset %zu",
		                        &off),
		                 1);
		assert_in_range(off, key, key + 1);
		assert_null(strchr(r, '\xff'));
		free(r);
	}
	free(a.s);
	free(b.s);
	free(c.s);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_doubles_match_strtod),
	    cmocka_unit_test(test_split_across_threads),
	    cmocka_unit_test(test_what_is_taken),
	    cmocka_unit_test(test_results_identical),
	    cmocka_unit_test(test_errors_identical),
	    cmocka_unit_test(test_refused_arrays_keep_messages),
	    cmocka_unit_test(test_placeholder_lookalike),
	    cmocka_unit_test(test_batches),
	    cmocka_unit_test(test_distributions),
	    cmocka_unit_test(test_session_defaults),
	    cmocka_unit_test(test_axes_and_grids),
	    cmocka_unit_test(test_cost),
	    cmocka_unit_test(test_demo_requests_padded),
	    cmocka_unit_test(test_covariance_rows),
	    cmocka_unit_test(test_array_where_no_value_may),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
