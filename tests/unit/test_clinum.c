/* Unit tests of the client's number I/O (issue 11), each against glibc
 * as the outside reference:
 * - cli__fmt_num (client/logio.c) with N digits prints exactly what
 *   snprintf("%.*g", N, v) prints, for every N from 1 to 17, on random
 *   doubles of several kinds and the hard cases; in shortest mode it
 *   prints what %.15g prints when that reads back (strtod) and otherwise
 *   the fewest digits that read back (16 where %.16g reads back, where
 *   the old code printed 17), laid out as %.17g; subnormals, which hold
 *   fewer than 15 digits, get their shortest digits ("5e-324", where
 *   %.15g gives 4.94065645841247e-324);
 * - the LAS reader (client/las.c) gives, for every value it accepts, the
 *   double strtod gives, bit for bit, and accepts and refuses exactly
 *   what the old rule did (digits, sign, '.', exponent only, the whole
 *   field read by strtod, finite): JSON-form text goes through
 *   proto_num_parse now, the other forms (".5", "5.", "+1", "007") still
 *   through strtod;
 * - cli__rpc_parse_cols (client/rpc.c) gives the numeric arrays of a
 *   result with the values cJSON (strtod) gives, leaves every other
 *   member to the tree, and gives the same verdict and message as
 *   cli__rpc_parse on bad answers. */
#include <ctype.h>
#include <float.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>
#include <cjson/cJSON.h>

#include "las.h"
#include "logio.h"
#include "rpc.h"

/* ---- random numbers (splitmix64) ---------------------------------------- */

static uint64_t rng = 0x2545f4914f6cdd1dull;

static uint64_t rnd(void)
{
	uint64_t z = (rng += 0x9e3779b97f4a7c15ull);
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
	z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
	return z ^ (z >> 31);
}

static double rnd_unit(void)
{
	return (double)(rnd() >> 11) / 9007199254740992.0;
}

static int same_bits(double a, double b)
{
	uint64_t x, y;
	memcpy(&x, &a, sizeof x);
	memcpy(&y, &b, sizeof y);
	return x == y;
}

/* A finite double of one of several kinds: any bit pattern, a computed
 * log value (15-17 digits), a short value as logs carry it, a value near
 * the %g layout thresholds, a subnormal. */
static double rnd_double(int kind)
{
	uint64_t b;
	double v;

	switch (kind % 5) {
	case 0:
		do {
			b = rnd();
			memcpy(&v, &b, sizeof v);
		} while (!isfinite(v));
		return v;
	case 1: return (rnd_unit() * 5000 + 0.001) * (rnd() & 1 ? 1 : -1);
	case 2: {
		static const double p10[] = {1, 10, 100, 1e3, 1e4, 1e5};
		return (double)(rnd() % 1000000) / p10[rnd() % 6];
	}
	case 3:
		/* 1e-6 .. 1e18: around both %g thresholds */
		return pow(10, -6 + 24 * rnd_unit());
	default:
		b = rnd() & 0x000fffffffffffffull;
		memcpy(&v, &b, sizeof v);
		return v;
	}
}

/* ---- cli__fmt_num -------------------------------------------------------- */

static void check_digits(double v)
{
	char got[64], want[64];

	for (int d = 1; d <= 17; d++) {
		size_t n = cli__fmt_num(got, v, d, NULL);
		snprintf(want, sizeof want, "%.*g", d, v);
		if (strcmp(got, want) != 0 || n != strlen(want))
			fail_msg("%.17g with %d digits: '%s', printf '%s'", v,
			         d, got, want);
	}
}

/* Significant digits of printf text. */
static int sig_digits(const char *s)
{
	int n = 0, lead = 1, z = 0;
	for (; *s && *s != 'e'; s++) {
		if (!isdigit((unsigned char)*s))
			continue;
		if (lead && *s == '0')
			continue;
		lead = 0;
		n++;
		z = *s == '0' ? z + 1 : 0;
	}
	return n - z;
}

static void check_shortest(double v)
{
	char got[64], s15[64], s16[64], s17[64];

	cli__fmt_num(got, v, 0, NULL);
	snprintf(s15, sizeof s15, "%.15g", v);
	snprintf(s16, sizeof s16, "%.16g", v);
	snprintf(s17, sizeof s17, "%.17g", v);
	if (strtod(got, NULL) != v)
		fail_msg("%s does not read back as %s", got, s17);
	if (fabs(v) < DBL_MIN) {
		/* subnormals have fewer than 15 digits' precision: %.15g may
		 * read back with more digits than the shortest */
		const char *old = strtod(s15, NULL) == v ? s15 : s17;
		if (sig_digits(got) > sig_digits(old) || !strchr(got, 'e'))
			fail_msg("%s: '%s', before '%s'", s17, got, old);
	} else if (strtod(s15, NULL) == v) {
		if (strcmp(got, s15) != 0)
			fail_msg("%s: '%s', %%.15g '%s'", s17, got, s15);
	} else if (strtod(s16, NULL) == v && sig_digits(s16) == 16) {
		/* the digits of %.16g; laid out as %.17g would be (a
		 * difference only at exponent 16, where %.16g switches to
		 * e+16 and %.17g does not) */
		const char *e = strchr(s16, 'e');
		if (e && strcmp(e, "e+16") == 0) {
			if (strchr(got, 'e') || sig_digits(got) != 16)
				fail_msg("%s: '%s', want 16 plain digits", s17,
				         got);
		} else if (strcmp(got, s16) != 0) {
			fail_msg("%s: '%s', %%.16g '%s'", s17, got, s16);
		}
	} else if (strcmp(got, s17) != 0) {
		fail_msg("%s: '%s', %%.17g '%s'", s17, got, s17);
	}
}

static void test_fmt_hard_cases(void **state)
{
	static const double hard[] = {2.4482,
	                              -999.25,
	                              0.1,
	                              0.7999999999999999,
	                              1e-5,
	                              1.5e-5,
	                              0.0001,
	                              0.00012345,
	                              0.005,
	                              123456789012345.0,
	                              1234567890123456.0,
	                              12345678901234567.0,
	                              1e15,
	                              1e16,
	                              1e17,
	                              1e21,
	                              1e22,
	                              1e23,
	                              9007199254740991.0,
	                              9007199254740992.0,
	                              9007199254740993.0,
	                              DBL_MAX,
	                              DBL_MIN,
	                              4.9406564584124654e-324,
	                              2.2250738585072009e-308,
	                              5e-324,
	                              1e-300,
	                              1e300,
	                              0.3,
	                              2.0 / 3.0,
	                              9.9999999,
	                              99999.995,
	                              0.000099999999,
	                              999999.5,
	                              1000.1524,
	                              8.5,
	                              1e100,
	                              123.456e-100};
	char buf[64];

	(void)state;
	for (size_t i = 0; i < sizeof hard / sizeof hard[0]; i++) {
		check_digits(hard[i]);
		check_digits(-hard[i]);
		check_shortest(hard[i]);
		check_shortest(-hard[i]);
	}
	/* Shortest, not 17 digits where 16 read back (Python's repr, the
	 * outside reference for the shortest text, gives these): the old
	 * %.15g-else-%.17g printed 0.79999999999999993 and
	 * 0.30000000000000004 (the latter is already shortest). */
	cli__fmt_num(buf, 0.1 + 0.7, 0, NULL);
	assert_string_equal(buf, "0.7999999999999999");
	cli__fmt_num(buf, 0.1 + 0.2, 0, NULL);
	assert_string_equal(buf, "0.30000000000000004");
	cli__fmt_num(buf, 2.4482, 0, NULL);
	assert_string_equal(buf, "2.4482");
	cli__fmt_num(buf, 2.4482, 7, NULL);
	assert_string_equal(buf, "2.4482");
	/* printf's zero, sign and nulls */
	assert_int_equal(cli__fmt_num(buf, 0.0, 0, NULL), 1);
	assert_string_equal(buf, "0");
	assert_int_equal(cli__fmt_num(buf, -0.0, 7, NULL), 2);
	assert_string_equal(buf, "-0");
	cli__fmt_num(buf, NAN, 0, NULL);
	assert_string_equal(buf, "null");
	cli__fmt_num(buf, INFINITY, 7, "-999.25");
	assert_string_equal(buf, "-999.25");
	cli__fmt_num(buf, -INFINITY, 7, "");
	assert_string_equal(buf, "");
	/* digits past 17 are 17 */
	cli__fmt_num(buf, 0.1, 40, NULL);
	assert_string_equal(buf, "0.10000000000000001");
}

static void test_fmt_random(void **state)
{
	(void)state;
	for (int i = 0; i < 200000; i++) {
		double v = rnd_double(i);
		check_digits(v);
	}
	for (int i = 0; i < 1000000; i++)
		check_shortest(rnd_double(i));
}

/* ---- LAS values ------------------------------------------------------------
 */

/* The rule the reader had (digits, sign, '.', e, E; strtod reads the whole
 * text; finite), with glibc's strtod: 1 and *v, or 0. */
static int old_rule(const char *s, double *v)
{
	char *end;
	if (!*s)
		return 0;
	for (const char *p = s; *p; p++)
		if (!isdigit((unsigned char)*p) && *p != '+' && *p != '-' &&
		    *p != '.' && *p != 'e' && *p != 'E')
			return 0;
	*v = strtod(s, &end);
	return end != s && *end == '\0' && isfinite(*v);
}

/* A random token: mostly JSON number text, some in the other forms the
 * LAS reader allows, some that it refuses. */
static void rnd_token(char *t, size_t size)
{
	static const char *odd[] = {
	    ".5",       "5.",     "+1.5",
	    "007",      "-.125",  "1.E5",
	    "1E+03",    "+.5e-2", "-0",
	    "0.0e0",    "1e-400", "-1e-400",
	    "1e400",    "-1e309", "0x1p3",
	    "inf",      "-inf",   "nan",
	    "INF",      "1e",     "1e+",
	    "--1",      "1-2",    ".",
	    "+",        "e5",     "1.5.2",
	    "1,5",      "2.4482", "-999.25",
	    "4.9e-324", "2e-324", "1.7976931348623157e308",
	    "1.8e308"};
	size_t n = 0;
	int k = (int)(rnd() % 16);

	if (k == 0) {
		snprintf(t, size, "%s",
		         odd[rnd() % (sizeof odd / sizeof *odd)]);
		return;
	}
	if (rnd() % 3 == 0)
		t[n++] = '-';
	if (rnd() % 4 == 0) {
		t[n++] = '0';
	} else {
		int d = 1 + (int)(rnd() % 6);
		t[n++] = (char)('1' + rnd() % 9);
		while (--d)
			t[n++] = (char)('0' + rnd() % 10);
	}
	if (rnd() % 4) {
		int d = 1 + (int)(rnd() % (k == 1 ? 30 : 8));
		t[n++] = '.';
		while (d--)
			t[n++] = (char)('0' + rnd() % 10);
	}
	if (rnd() % 5 == 0) {
		t[n++] = rnd() & 1 ? 'e' : 'E';
		if (rnd() & 1)
			t[n++] = rnd() & 1 ? '-' : '+';
		n += (size_t)snprintf(t + n, size - n, "%d",
		                      (int)(rnd() % (k == 2 ? 400 : 40)));
	}
	t[n] = '\0';
}

static const char las_head[] =
    "~Version\n VERS. 2.0 : v\n WRAP. NO : w\n"
    "~Well\n STRT.M 1 : s\n STOP.M %zu : s\n STEP.M 1 : s\n"
    " NULL. -999.25 : n\n"
    "~Curve\n DEPT.M : d\n X.V : x\n~A\n";

/* Reads text whole into rows (2 curves, up to cap rows): the reader's
 * return code, the row count in *n. */
static int read_las(const char *text, double *rows, size_t cap, size_t *n,
                    char *err, size_t errlen)
{
	cli_las_reader *r = cli_las_reader_new();
	size_t len = strlen(text), off = 0, used;
	int rc;

	assert_non_null(r);
	do {
		rc = cli_las_feed(r, text + off, len - off, &used);
		off += used;
		if (rc == CLI_LAS_HEADER)
			cli_las_set_block(r, rows, cap);
	} while (rc == CLI_LAS_HEADER);
	if (rc == CLI_LAS_OK)
		rc = cli_las_finish(r);
	*n = cli_las_rows(r);
	snprintf(err, errlen, "%s", cli_las_error(r));
	cli_las_reader_free(r);
	return rc;
}

static void test_las_values(void **state)
{
	enum { N = 100000 };
	char(*tok)[48] = malloc(N * sizeof *tok);
	double *want = malloc(N * sizeof *want);
	double *rows = malloc(2 * N * sizeof *rows);
	char *text = malloc(N * 64 + 512), err[300], one[1024];
	size_t n = 0, got, len, bad = 0, good_odd = 0;

	(void)state;
	assert_non_null(tok);
	assert_non_null(want);
	assert_non_null(rows);
	assert_non_null(text);
	/* accepted tokens all in one file; each refused one in a file of
	 * its own, which must fail on its line naming the value */
	while (n < N) {
		double v;
		rnd_token(tok[n], sizeof tok[n]);
		if (old_rule(tok[n], &v)) {
			want[n] = v == -999.25 ? NAN : v;
			if (strspn(tok[n], "-0123456789") == 0 ||
			    strchr(tok[n], '+'))
				good_odd++;
			n++;
			continue;
		}
		bad++;
		snprintf(one, sizeof one, las_head, (size_t)2);
		snprintf(one + strlen(one), sizeof one - strlen(one),
		         "1 0.5\n2 %s\n", tok[n]);
		if (read_las(one, rows, 4, &got, err, sizeof err) !=
		    CLI_LAS_ERR)
			fail_msg("'%s' accepted; the old rule refused it",
			         tok[n]);
		snprintf(one, sizeof one,
		         "line 14: value 2 ('%.32s') is not a number", tok[n]);
		if (strcmp(err, one) != 0)
			fail_msg("'%s': '%s', want '%s'", tok[n], err, one);
	}
	assert_true(bad > 100);      /* the refusals were exercised */
	assert_true(good_odd > 100); /* and the strtod-only forms */
	len = (size_t)snprintf(text, 512, las_head, (size_t)N);
	for (size_t i = 0; i < N; i++)
		len += (size_t)sprintf(text + len, "%zu %s\n", i + 1, tok[i]);
	assert_int_equal(read_las(text, rows, N, &got, err, sizeof err),
	                 CLI_LAS_OK);
	assert_int_equal(got, N);
	for (size_t i = 0; i < N; i++) {
		double v = rows[2 * i + 1];
		if (!(isnan(want[i]) ? isnan(v) : same_bits(v, want[i])))
			fail_msg("'%s' read as %a, strtod %a", tok[i], v,
			         want[i]);
	}
	free(tok);
	free(want);
	free(rows);
	free(text);
}

/* ---- answers ---------------------------------------------------------------
 */

/* Checks cli__rpc_parse_cols on line against cJSON's parse of it;
 * returns the number of arrays it read itself. */
static size_t check_answer(const char *line)
{
	cli_numcols cols = {0};
	char why1[160] = "", why2[160] = "";
	cJSON *id = cJSON_CreateNumber(7);
	cJSON *want = cli__rpc_parse(line, strlen(line), id, why1, sizeof why1);
	cJSON *got = cli__rpc_parse_cols(line, strlen(line), id, &cols, why2,
	                                 sizeof why2);
	const cJSON *m, *res;
	size_t ncol = cols.ncol;

	if (!want) {
		if (got)
			fail_msg("accepted, cJSON refused (%s): %.200s", why1,
			         line);
		assert_string_equal(why1, why2);
		goto out;
	}
	if (!got)
		fail_msg("refused (%s): %.200s", why2, line);
	res = cJSON_GetObjectItemCaseSensitive(want, "result");
	if (!cJSON_IsObject(res))
		res = NULL; /* an error, or a result that is no object */
	cJSON_ArrayForEach(m, res)
	{
		size_t n;
		const double *v = cli__numcols_get(&cols, m->string, &n);
		const cJSON *g = cJSON_GetObjectItemCaseSensitive(
		    cJSON_GetObjectItemCaseSensitive(got, "result"), m->string);
		int numeric = cJSON_IsArray(m);
		const cJSON *e;
		size_t i = 0;
		cJSON_ArrayForEach(e, m) numeric &=
		    cJSON_IsNumber(e) || cJSON_IsNull(e);
		if (m != res->child &&
		    cJSON_GetObjectItemCaseSensitive(res, m->string) != m)
			continue; /* a repeated name: the first counts */
		if (!v) {
			/* as text: cJSON_Compare never finds inf equal */
			char *a = cJSON_PrintUnformatted(m);
			char *b = g ? cJSON_PrintUnformatted(g) : NULL;
			if (!a || !b || strcmp(a, b) != 0)
				fail_msg("member %s differs", m->string);
			cJSON_free(a);
			cJSON_free(b);
			continue;
		}
		if (!numeric)
			fail_msg("member %s is not numeric", m->string);
		assert_true(cJSON_IsArray(g) && cJSON_GetArraySize(g) == 0);
		assert_int_equal(n, (size_t)cJSON_GetArraySize(m));
		cJSON_ArrayForEach(e, m)
		{
			if (cJSON_IsNull(e) ? !isnan(v[i])
			                    : !same_bits(v[i], e->valuedouble))
				fail_msg("%s[%zu]: %a, cJSON %a", m->string, i,
				         v[i], e->valuedouble);
			i++;
		}
	}
	/* everything outside result is the same */
	cJSON_ArrayForEach(m, want) if (strcmp(m->string, "result") != 0)
	    assert_true(cJSON_Compare(
	        m, cJSON_GetObjectItemCaseSensitive(got, m->string), 1));
	ncol = cols.ncol;
out:
	cJSON_Delete(want);
	cJSON_Delete(got);
	cJSON_Delete(id);
	cli__numcols_free(&cols);
	return ncol;
}

static void test_answers(void **state)
{
	static const char *lines[] = {
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"vp\":[1.5,null,2e3,"
	    "-0,9007199254740991],\"names\":[\"a\",\"b\"],\"units\":{\"vp\":"
	    "\"m/s\",\"x\":[1,2]},\"mixed\":[1,\"x\"],\"nested\":[[1],[2]],"
	    "\"big\":[1e400],\"esc\\u0041\":[1,2],\"empty\":[],\"n\":3,"
	    "\"s\":\"[1,2]\",\"q\\\"\":[4]}}",
	    " { \"id\" : 7 , \"result\" : { \"a\" : [ 1 , 2.5 ] , \"b\" : "
	    "[0.1,0.2] } , \"jsonrpc\" : \"2.0\" } \r\n",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1],\"a\":[2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1]},"
	    "\"result\":{\"a\":[2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1,2]}} x",
	    "{\"jsonrpc\":\"2.0\",\"id\":8,\"result\":{\"a\":[1,2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1,2]}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1,,2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1,2]},"
	    "\"error\":{\"code\":1,\"message\":\"m\"}}",
	    "{\"id\":7,\"result\":{\"a\":[1,2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[01]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1 2]}}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":[1,2]}",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"error\":{\"code\":-32602,"
	    "\"message\":\"bad\",\"data\":{\"a\":[1,2]}}}",
	    "[1,2]",
	    "",
	    "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{\"a\":[1e-400,-1e-400,"
	    "4.9e-324,1.7976931348623157e308]}}",
	};
	char *line = malloc(64 * 20000 + 256);
	size_t n;

	(void)state;
	assert_non_null(line);
	for (size_t i = 0; i < sizeof lines / sizeof lines[0]; i++)
		check_answer(lines[i]);
	/* vp, units.x is nested, mixed/nested/big/escaped names are not
	 * read so: vp and empty */
	assert_int_equal(check_answer(lines[0]), 2);
	/* long arrays of random doubles as %.17g and %.15g print them */
	for (int round = 0; round < 5; round++) {
		n = (size_t)sprintf(
		    line, "{\"jsonrpc\":\"2.0\",\"id\":7,\"result\":{");
		for (int c = 0; c < 3; c++) {
			n += (size_t)sprintf(line + n, "%s\"c%d\":[",
			                     c ? "," : "", c);
			for (int j = 0; j < 20000 / 3; j++) {
				double v = rnd_double(j + round);
				n += (size_t)sprintf(line + n,
				                     j % 97 == 5 ? "%snull"
				                     : c == 1    ? "%s%.15g"
				                                 : "%s%.17g",
				                     j ? "," : "", v);
			}
			line[n++] = ']';
		}
		strcpy(line + n, "}}");
		assert_int_equal(check_answer(line), 3);
	}
	free(line);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_fmt_hard_cases),
	    cmocka_unit_test(test_fmt_random),
	    cmocka_unit_test(test_las_values),
	    cmocka_unit_test(test_answers),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
