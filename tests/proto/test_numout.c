/* Numbers out of the daemon: the shortest text that reads back to the same
 * double, inputs echoed unchanged through unit conversions, the `digits`
 * option (request and session), and long columns formatted on the worker
 * threads giving the same text as one thread. The reference for reading
 * text back is glibc's strtod (through cJSON, which calls it), and for
 * fixed digits glibc's printf ("%.*g"), which rounds the exact binary
 * value half to even (C11 7.21.6.1; glibc documents exact rounding). */
#include <float.h>
#include <limits.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "harness.h"
#include "proto/internal.h"

static harness H;

static int setup(void **state)
{
	(void)state;
	h_init(&H);
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	h_free(&H);
	return 0;
}

/* A small deterministic generator (splitmix64, Steele et al. 2014): the
 * test must not depend on the C library's rand. */
static uint64_t mix(uint64_t *s)
{
	uint64_t z = (*s += 0x9e3779b97f4a7c15ull);
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
	z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
	return z ^ (z >> 31);
}

/* Uniform in [lo, hi) with all 53 bits random: most print with 16 or 17
 * digits. */
static double full(uint64_t *s, double lo, double hi)
{
	return lo + (hi - lo) * (double)(mix(s) >> 11) * 0x1p-53;
}

/* Appends the array x[0..n) as %.17g (exact for any double) to buf. */
static size_t put_array(char *buf, const double *x, size_t n)
{
	size_t used = 0;
	buf[used++] = '[';
	for (size_t i = 0; i < n; i++)
		used +=
		    (size_t)sprintf(buf + used, "%s%.17g", i ? "," : "", x[i]);
	buf[used++] = ']';
	buf[used] = '\0';
	return used;
}

static char *convert_line(const double *vp, size_t n, const char *extra)
{
	char *line = malloc(n * 2 * 26 + 512), *p;
	double *vs = malloc(n * sizeof *vs);
	assert_non_null(line);
	assert_non_null(vs);
	for (size_t i = 0; i < n; i++)
		vs[i] = vp[i] / 2;
	p = line + sprintf(line,
	                   "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":"
	                   "\"elastic.convert\",\"params\":{%s\"rho\":2."
	                   "4,\"vp\":",
	                   extra);
	p += put_array(p, vp, n);
	p += sprintf(p, ",\"vs\":");
	p += put_array(p, vs, n);
	sprintf(p, "}}");
	free(vs);
	return line;
}

static void assert_same_bits(double a, double b, size_t i)
{
	uint64_t x, y;
	memcpy(&x, &a, sizeof x);
	memcpy(&y, &b, sizeof y);
	if (x != y)
		fail_msg("element %zu: sent %.17g, got %.17g back", i, a, b);
}

/* The result member `name` of r holds want[0..n), bit for bit. */
static void assert_echo(const cJSON *r, const char *name, const double *want,
                        size_t n)
{
	const cJSON *e, *a = h_result(r, name);
	size_t i = 0;

	assert_int_equal(h_code(r), 0);
	cJSON_ArrayForEach(e, a)
	{
		assert_true(i < n);
		assert_same_bits(want[i], e->valuedouble, i);
		i++;
	}
	assert_int_equal(i, n);
}

/* Every input double comes back bit for bit in its own unit (m/s is the
 * internal velocity unit); most of these need 17 digits to do so. */
static void test_echo_exact_and_shortest(void **state)
{
	enum { N = 2000 };
	double vp[N];
	uint64_t s = 42;
	char *line;
	cJSON *r;
	size_t i = 0;

	(void)state;
	for (i = 0; i < N; i++)
		vp[i] = full(&s, 1500, 7000);
	line = convert_line(vp, N, "");
	r = h_call(&H, line);
	free(line);
	assert_echo(r, "vp", vp, N);
	cJSON_Delete(r);
}

/* The raw answer text of k for a request, for comparing text exactly. */
static char *member_text(const char *raw, const char *member)
{
	char key[64];
	const char *p, *q;
	char *t;
	snprintf(key, sizeof key, "\"%s\":[", member);
	p = strstr(raw, key);
	assert_non_null(p);
	p += strlen(key) - 1;
	q = strchr(p, ']');
	assert_non_null(q);
	t = malloc((size_t)(q - p) + 2);
	assert_non_null(t);
	memcpy(t, p, (size_t)(q - p) + 1);
	t[q - p + 1] = '\0';
	return t;
}

/* Shortest digits, compared as text with the fewest digits glibc's
 * %.*g needs to read back (strtod): the same digit string. */
static void test_shortest_matches_printf_search(void **state)
{
	enum { N = 500 };
	double vp[N];
	uint64_t s = 7;
	char *line, *k;
	cJSON *arr;
	const cJSON *e;

	(void)state;
	for (size_t i = 0; i < N; i++)
		vp[i] = full(&s, 1500, 7000);
	line = convert_line(vp, N, "");
	k = member_text(h_raw(&H, line), "k");
	free(line);
	arr = cJSON_Parse(k);
	assert_non_null(arr);
	{
		const char *p = k + 1;
		cJSON_ArrayForEach(e, arr)
		{
			char want[40];
			size_t len = strcspn(p, ",]");
			double v = e->valuedouble;
			for (int d = 1; d <= 17; d++) {
				snprintf(want, sizeof want, "%.*g", d, v);
				if (strtod(want, NULL) == v)
					break;
			}
			/* %g may choose an exponent where we print plainly:
			 * compare the values and the digit count. */
			{
				char got[40];
				int dg = 0, dw = 0, lead;
				memcpy(got, p, len);
				got[len] = '\0';
				assert_true(strtod(got, NULL) == v);
				lead = 1;
				for (const char *c = got; *c && *c != 'e'; c++)
					if (*c >= '1' && *c <= '9')
						lead = 0, dg++;
					else if (*c == '0' && !lead)
						dg++;
				lead = 1;
				for (const char *c = want; *c && *c != 'e'; c++)
					if (*c >= '1' && *c <= '9')
						lead = 0, dw++;
					else if (*c == '0' && !lead)
						dw++;
				/* trailing zeros of an integer part count in
				 * plain notation: allow them only there */
				if (!strchr(got, '.') && !strchr(got, 'e'))
					assert_true(dg >= dw);
				else
					assert_int_equal(dg, dw);
			}
			p += len + 1;
		}
	}
	cJSON_Delete(arr);
	free(k);
}

/* Typed values (a few decimals) come back unchanged through a unit the
 * daemon converts: ft/s for velocity, degrees for angles (radians
 * inside). (x * s) / s alone gives 29.999999999999996 for 30 deg. */
static void test_echo_through_units(void **state)
{
	enum { N = 3000 };
	double vp[N];
	uint64_t s = 99;
	char *line;
	cJSON *r;
	size_t i;

	(void)state;
	for (i = 0; i < N; i++) {
		char t[32];
		snprintf(t, sizeof t, "%.*f", (int)(mix(&s) % 5),
		         full(&s, 5000, 20000));
		vp[i] = strtod(t, NULL);
	}
	line = convert_line(vp, N, "\"units\":{\"velocity\":\"ft/s\"},");
	r = h_call(&H, line);
	free(line);
	assert_echo(r, "vp", vp, N);
	cJSON_Delete(r);

	r = h_call(&H, "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":"
	               "\"reflect.series\",\"params\":{\"vp\":[3000,3200],"
	               "\"vs\":[1500,1600],\"rho\":[2.3,2.2],\"angle\":[0,10,"
	               "20,30,33.3,41.7]}}");
	assert_int_equal(h_code(r), 0);
	{
		static const double want[] = {0, 10, 20, 30, 33.3, 41.7};
		assert_echo(r, "angle", want, 6);
	}
	cJSON_Delete(r);
}

/* The unit inverse's neighbour step is C's nextafter (C11 7.12.11.3, as
 * glibc's libm computes it) towards either infinity: on both zeros, the
 * subnormal and normal limits, the largest double, powers of two (where
 * the ulp changes) and random bit patterns of either sign. */
static void test_unit_step_is_nextafter(void **state)
{
	static const double hard[] = {0.0,
	                              -0.0,
	                              DBL_TRUE_MIN,
	                              -DBL_TRUE_MIN,
	                              DBL_MIN,
	                              -DBL_MIN,
	                              DBL_MAX,
	                              -DBL_MAX,
	                              1.0,
	                              -1.0,
	                              0x1p-1022 - 0x1p-1074,
	                              2.0,
	                              -0.5,
	                              1e9,
	                              0.3048,
	                              9007199254740992.0};
	uint64_t s = 7;
	(void)state;
	for (size_t i = 0; i < sizeof hard / sizeof hard[0] + 200000; i++) {
		double y, a, b;
		if (i < sizeof hard / sizeof hard[0]) {
			y = hard[i];
		} else {
			uint64_t bits = mix(&s);
			memcpy(&y, &bits, sizeof y);
			if (!isfinite(y))
				continue;
		}
		for (int up = 0; up < 2; up++) {
			a = proto__units_step(y, up);
			b = nextafter(y, up ? INFINITY : -INFINITY);
			if (memcmp(&a, &b, sizeof a)) {
				fail_msg("step(%a, %d) = %a, nextafter %a", y,
				         up, a, b);
			}
		}
	}
}

/* A column long enough to be formatted on the worker threads gives the
 * same text as the same samples in requests below the threshold. */
static void test_threaded_column_text(void **state)
{
	enum { N = 70000, HALF = N / 2 };
	double *vp = malloc(N * sizeof *vp);
	uint64_t s = 5;
	char *line, *whole, *a, *b, *joined;
	size_t la;

	(void)state;
	assert_non_null(vp);
	for (size_t i = 0; i < N; i++)
		vp[i] = full(&s, 1500, 7000);
	line = convert_line(vp, N, "");
	whole = member_text(h_raw(&H, line), "k");
	free(line);
	line = convert_line(vp, HALF, "");
	a = member_text(h_raw(&H, line), "k");
	free(line);
	line = convert_line(vp + HALF, N - HALF, "");
	b = member_text(h_raw(&H, line), "k");
	free(line);
	la = strlen(a);
	joined = malloc(la + strlen(b) + 1);
	assert_non_null(joined);
	memcpy(joined, a, la - 1); /* drop a's ']' */
	joined[la - 1] = ',';
	strcpy(joined + la, b + 1); /* drop b's '[' */
	assert_string_equal(whole, joined);
	free(joined);
	free(a);
	free(b);
	free(whole);
	free(vp);
}

/* digits N: every number is glibc's "%.Ng" of the full answer, read back
 * (the same decimal value; the layout may differ). */
static void check_digits(const cJSON *full_r, const cJSON *short_r, int n)
{
	const cJSON *fr = cJSON_GetObjectItemCaseSensitive(full_r, "result");
	const cJSON *sr = cJSON_GetObjectItemCaseSensitive(short_r, "result");
	static const char *const names[] = {"k", "mu", "nu", "ai", "dtp", NULL};
	for (int m = 0; names[m]; m++) {
		const cJSON *a = cJSON_GetObjectItemCaseSensitive(fr, names[m]);
		const cJSON *b = cJSON_GetObjectItemCaseSensitive(sr, names[m]);
		const cJSON *x, *y = b ? b->child : NULL;
		assert_non_null(a);
		cJSON_ArrayForEach(x, a)
		{
			char want[48];
			assert_non_null(y);
			snprintf(want, sizeof want, "%.*g", n, x->valuedouble);
			if (strtod(want, NULL) != y->valuedouble)
				fail_msg("%s: %.17g at %d digits: want %s, got "
				         "%.17g",
				         names[m], x->valuedouble, n, want,
				         y->valuedouble);
			y = y->next;
		}
	}
}

static void test_digits(void **state)
{
	enum { N = 400 };
	double vp[N];
	uint64_t s = 11;
	char *line, extra[64];
	cJSON *full_r, *r;

	(void)state;
	for (size_t i = 0; i < N; i++)
		vp[i] = full(&s, 1500, 7000);
	line = convert_line(vp, N, "");
	full_r = h_call(&H, line);
	free(line);
	for (int n = 1; n <= 17; n += 4) {
		snprintf(extra, sizeof extra, "\"digits\":%d,", n);
		line = convert_line(vp, N, extra);
		r = h_call(&H, line);
		free(line);
		assert_int_equal(h_code(r), 0);
		check_digits(full_r, r, n);
		cJSON_Delete(r);
	}
	/* the session's digits, and a request overriding them */
	r = h_call(&H, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"session."
	               "set\",\"params\":{\"digits\":4}}");
	assert_int_equal(h_code(r), 0);
	assert_int_equal((int)h_num(r, "digits", 0), 4);
	cJSON_Delete(r);
	line = convert_line(vp, N, "");
	r = h_call(&H, line);
	free(line);
	check_digits(full_r, r, 4);
	cJSON_Delete(r);
	line = convert_line(vp, N, "\"digits\":0,");
	r = h_call(&H, line);
	free(line);
	check_digits(full_r, r, 17); /* 0: exact again */
	cJSON_Delete(r);
	r = h_call(&H, "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"session."
	               "reset\"}");
	assert_int_equal((int)h_num(r, "digits", 0), 0);
	cJSON_Delete(r);
	line = convert_line(vp, N, "");
	r = h_call(&H, line);
	free(line);
	check_digits(full_r, r, 17);
	cJSON_Delete(r);
	cJSON_Delete(full_r);
}

static const char *reason(const cJSON *r)
{
	const cJSON *e = cJSON_GetObjectItemCaseSensitive(r, "error");
	const cJSON *d = cJSON_GetObjectItemCaseSensitive(e, "data");
	const cJSON *w = cJSON_GetObjectItemCaseSensitive(d, "reason");
	return cJSON_IsString(w) ? w->valuestring : "";
}

static void test_digits_refused(void **state)
{
	static const char *const bad[] = {"18",   "-1",   "2.5", "\"3\"",
	                                  "true", "null", "[3]"};
	(void)state;
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
		char line[256];
		cJSON *r;
		snprintf(line, sizeof line,
		         "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"elastic."
		         "convert\",\"params\":{\"rho\":2.4,\"vp\":3000,\"vs\":"
		         "1500,\"digits\":%s}}",
		         bad[i]);
		r = h_call(&H, line);
		assert_int_equal(h_code(r), -32602);
		assert_string_equal(h_param(r), "digits");
		assert_non_null(strstr(reason(r), "from 1 to 17"));
		cJSON_Delete(r);
		snprintf(line, sizeof line,
		         "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"session."
		         "set\",\"params\":{\"digits\":%s}}",
		         bad[i]);
		r = h_call(&H, line);
		assert_int_equal(h_code(r), -32602);
		assert_string_equal(h_param(r), "digits");
		cJSON_Delete(r);
	}
}

/* Whole numbers written by the result writer (counts, the QC flags) read
 * as glibc's printf("%lld") writes them, the ends of the range included
 * (C11 7.21.6.1). */
static void test_integers_out(void **state)
{
	const long long edge[] = {0,         1,         -1,         9,
	                          10,        -10,       99,         100,
	                          LLONG_MAX, LLONG_MIN, -LLONG_MAX, 1000000,
	                          123456789, -987654321};
	uint64_t seed = 11;
	char want[32];
	(void)state;

	for (size_t i = 0; i < 100000 + sizeof edge / sizeof edge[0]; i++) {
		proto_call c;
		proto_buf out;
		long long v = i < sizeof edge / sizeof edge[0]
		                  ? edge[i]
		                  : (long long)(mix(&seed) >> (i % 64));
		if (i % 2 && v != LLONG_MIN)
			v = -v;
		memset(&c, 0, sizeof c);
		proto_buf_init(&out);
		c.out = &out;
		proto_w_int(&c, NULL, v);
		snprintf(want, sizeof want, "%lld", v);
		assert_non_null(out.data);
		assert_string_equal(out.data, want);
		proto_buf_free(&out);
	}
}

/* Member keys written by the result writer read back (through cJSON's
 * parser) as the same key: plain ones, ones that need escapes, and ones
 * either side of the writer's one-pass length; near an output limit a
 * key that fits is written and one that does not sets oom. */
static void test_member_keys(void **state)
{
	char keys[6][200];
	(void)state;

	strcpy(keys[0], "vp");
	strcpy(keys[1], "say \"hi\"\\\n\t\x01 end");
	memset(keys[2], 'a', 64);
	keys[2][64] = '\0';
	memset(keys[3], 'b', 65);
	keys[3][65] = '\0';
	memset(keys[4], 'c', 150);
	keys[4][150] = '\0';
	strcpy(keys[5], "\xc3\xa9t\xc3\xa9"); /* UTF-8 passes */
	for (size_t i = 0; i < 6; i++)
		for (int comma = 0; comma < 2; comma++) {
			proto_buf out;
			cJSON *o;
			proto_buf_init(&out);
			proto_buf_append(&out, "{\"x\":0", comma ? 6 : 1);
			proto__buf_member(&out, comma, keys[i]);
			proto_buf_append(&out, "1}", 2);
			assert_false(out.oom);
			assert_int_equal(strlen(out.data), out.len);
			o = cJSON_Parse(out.data);
			assert_non_null(o);
			assert_non_null(
			    cJSON_GetObjectItemCaseSensitive(o, keys[i]));
			cJSON_Delete(o);
			proto_buf_free(&out);
		}
	for (size_t room = 0; room < 8; room++) {
		proto_buf out;
		proto_buf_init(&out);
		/* 250 bytes in a buffer of 256 (the first size): ,"vp": and
		 * the NUL make it grow, which the limit governs */
		proto_buf_reserve(&out, 250);
		assert_int_equal(out.cap, 256);
		memset(out.data, ' ', 250);
		out.len = 250;
		out.limit = 250 + 6 + room;
		proto__buf_member(&out, 1, "vp");
		if (room >= 1) {
			assert_false(out.oom);
			assert_int_equal(out.len, 256);
			assert_memory_equal(out.data + 250, ",\"vp\":", 6);
		} else {
			assert_true(out.oom);
		}
		proto_buf_free(&out);
		/* the same for a string value: "vp" is 4 bytes */
		proto_buf_reserve(&out, 252);
		memset(out.data, ' ', 252);
		out.len = 252;
		out.limit = 252 + 4 + room;
		proto__buf_json_string(&out, "vp");
		if (room >= 1) {
			assert_false(out.oom);
			assert_memory_equal(out.data + 252, "\"vp\"", 4);
		} else {
			assert_true(out.oom);
		}
		proto_buf_free(&out);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_echo_exact_and_shortest),
	    cmocka_unit_test(test_shortest_matches_printf_search),
	    cmocka_unit_test(test_echo_through_units),
	    cmocka_unit_test(test_unit_step_is_nextafter),
	    cmocka_unit_test(test_threaded_column_text),
	    cmocka_unit_test(test_digits),
	    cmocka_unit_test(test_digits_refused),
	    cmocka_unit_test(test_integers_out),
	    cmocka_unit_test(test_member_keys),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
