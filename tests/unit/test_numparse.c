/* Correctly rounded JSON number parsing and the numeric-array scanner
 * (daemon/proto/numparse.c) against the C library: glibc's strtod, which
 * rounds correctly (to nearest, ties to even) for every input, must give
 * the same double bit for bit on 10^7 random decimal strings of 1-20
 * digits with exponents, on random doubles as printf and proto_num_fmt
 * print them, and on the hard cases: subnormals, the ends of the normal
 * range, every power of ten from 1e-400 to 1e400, the 2^53 neighbours,
 * exact halfway points between doubles (printed exactly from long double)
 * and just either side of them, 19- and 20-digit mantissas, and long
 * inputs up to 10^4 digits. Strict JSON syntax (RFC 8259 sec. 6) for the
 * malformed cases. Every input is copied into a buffer of exactly its
 * length, without a NUL, so that ASan catches a read past the end.
 * num_iters() (num_common.h) sets the number of random cases. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/numfmt.h"
#include "proto/numparse.h"
#include "unit/num_common.h"

/* Parses text (len bytes) from an exact-size copy; returns the status. */
static int parse_exact(const char *text, size_t len, double *v, size_t *used)
{
	char *b = malloc(len ? len : 1);
	int st;

	assert_non_null(b);
	memcpy(b, text, len);
	st = proto_num_parse(b, len, v, used);
	free(b);
	return st;
}

/* Whether the decimal text has a nonzero digit before any exponent. */
static int nonzero_digits(const char *t)
{
	for (; *t && *t != 'e' && *t != 'E'; t++)
		if (*t >= '1' && *t <= '9')
			return 1;
	return 0;
}

/* text must be a valid JSON number: ours equals strtod's bit for bit,
 * consumes all of it, and says ERANGE exactly when strtod's result is
 * infinite or a nonzero input became zero. */
static void check_parse(const char *text)
{
	size_t len = strlen(text), used = 0;
	double v, want = strtod(text, NULL);
	int st = parse_exact(text, len, &v, &used), range;

	if (used != len)
		fail_msg("%.80s: consumed %zu of %zu bytes (status %d)", text,
		         used, len, st);
	if (num_bits(v) != num_bits(want))
		fail_msg("%.80s%s: got %.17g (0x%016llx), strtod %.17g "
		         "(0x%016llx)",
		         text, len > 80 ? "..." : "", v,
		         (unsigned long long)num_bits(v), want,
		         (unsigned long long)num_bits(want));
	range = isinf(want) || (want == 0 && nonzero_digits(text));
	if (st != (range ? PROTO_NUM_ERANGE : PROTO_NUM_OK))
		fail_msg("%.80s: status %d, expected %d", text, st,
		         range ? PROTO_NUM_ERANGE : PROTO_NUM_OK);
}

static void random_decimal(uint64_t *s, char *buf, size_t size);

/* The same with the number followed by more of an array (",", more
 * digits): the parser reads whole words past the number's end there, so
 * it must stop at the number's end and give strtod's double. */
static void check_followed(const char *text)
{
	static const char tail[] = ", 1234567890123456";
	size_t len = strlen(text), used = 0;
	char *b = malloc(len + sizeof tail);
	double v, want = strtod(text, NULL);

	assert_non_null(b);
	memcpy(b, text, len);
	memcpy(b + len, tail, sizeof tail - 1);
	int st = proto_num_parse(b, len + sizeof tail - 1, &v, &used);
	int range = isinf(want) || (want == 0 && nonzero_digits(text));

	assert_int_equal(st, range ? PROTO_NUM_ERANGE : PROTO_NUM_OK);
	free(b);
	if (used != len || num_bits(v) != num_bits(want))
		fail_msg("%s followed: consumed %zu of %zu, got %.17g, "
		         "strtod %.17g",
		         text, used, len, v, want);
}

/* Log-style numbers, as most arrays carry them: up to 9 integer and 9
 * fraction digits (one word read each, and the lengths just past it),
 * each also followed by more array text. */
static void test_short_decimals(void **state)
{
	uint64_t s = num_seed(29);
	long n = num_iters() / 4, i;
	static const char *edge[] = {"0",
	                             "-0",
	                             "0.0",
	                             "-0.0",
	                             "0.5",
	                             "7",
	                             "12345678",
	                             "123456789",
	                             "12345678.1234567",
	                             "12345678.12345678",
	                             "1.12345678",
	                             "9007199254740992",
	                             "9007199254740993",
	                             "90071992.54740993",
	                             "9.5",
	                             "-3021.5",
	                             "1200.1234",
	                             "99999999.9999999",
	                             "0.0000001",
	                             "0.00000001",
	                             "1.5e3",
	                             "1.5E-3",
	                             "12e5",
	                             "0.1e1"};
	char buf[64];
	(void)state;
	for (size_t k = 0; k < sizeof edge / sizeof *edge; k++)
		check_followed(edge[k]);
	for (i = 0; i < n; i++) {
		char *p = buf;
		int ni = 1 + (int)(num_rand(&s) % 9);
		int nf = (int)(num_rand(&s) % 10);
		if (num_rand(&s) & 1)
			*p++ = '-';
		for (int j = 0; j < ni; j++)
			*p++ = (char)('0' + (j == 0 && ni > 1
			                         ? 1 + num_rand(&s) % 9
			                         : num_rand(&s) % 10));
		if (nf) {
			*p++ = '.';
			for (int j = 0; j < nf; j++)
				*p++ = (char)('0' + num_rand(&s) % 10);
		}
		*p = '\0';
		check_followed(buf);
		check_parse(buf);
		random_decimal(&s, buf, sizeof buf);
		check_followed(buf);
	}
}

/* A random JSON number: optional '-', 1-20 digits with a point anywhere
 * inside (or none; a leading zero only as "0.ddd"), and usually an
 * exponent (e or E, optional sign, sometimes leading zeros) chosen so
 * that values cover the whole double range and beyond it. */
static void random_decimal(uint64_t *s, char *buf, size_t size)
{
	char *p = buf;
	int nd = 1 + (int)(num_rand(s) % 20), point, j;

	if (num_rand(s) & 1)
		*p++ = '-';
	point = (int)(num_rand(s) % (uint64_t)(nd + 1)); /* digits before */
	if (point == 0 || num_rand(s) % 4 == 0)
		point = nd; /* no point */
	if (point == 1 && nd > 1 && num_rand(s) % 3 == 0) {
		*p++ = '0';
		*p++ = '.';
		point = -1;
	}
	for (j = 0; j < nd; j++) {
		int d = (int)(num_rand(s) % 10);
		if (j == 0 && point != -1 && d == 0 && !(point == 1 && nd == 1))
			d = 1 + (int)(num_rand(s) % 9);
		if (j == point && point > 0)
			*p++ = '.';
		*p++ = (char)('0' + d);
	}
	if (num_rand(s) % 4) {
		int e = (int)(num_rand(s) % 700) - 350;
		const char *mark = num_rand(s) & 1 ? "e" : "E";
		const char *sign = e < 0 ? "-" : (num_rand(s) & 1) ? "+" : "";
		const char *zeros = num_rand(s) % 16 == 0 ? "00" : "";
		p += snprintf(p, size - (size_t)(p - buf), "%s%s%s%d", mark,
		              sign, zeros, e < 0 ? -e : e);
	}
	*p = '\0';
}

static void test_random_decimals(void **state)
{
	uint64_t s = num_seed(21);
	long n = num_iters(), i;
	char buf[64];
	(void)state;
	for (i = 0; i < n; i++) {
		random_decimal(&s, buf, sizeof buf);
		check_parse(buf);
	}
}

/* Random doubles as %.17g (often the nearest 17 digits to a halfway
 * point), %.16g and %.15g print them and as proto_num_fmt does. */
static void test_random_doubles(void **state)
{
	uint64_t s = num_seed(22);
	long n = num_iters() / 10, i;
	char buf[64];
	(void)state;
	for (i = 0; i < n; i++) {
		double v = num_rand_finite(&s), w;
		size_t used;
		snprintf(buf, sizeof buf, "%.17g", v);
		check_parse(buf);
		snprintf(buf, sizeof buf, "%.16g", v);
		check_parse(buf);
		snprintf(buf, sizeof buf, "%.15g", v);
		check_parse(buf);
		proto_num_fmt(buf, v);
		check_parse(buf);
		assert_int_equal(proto_num_parse(buf, strlen(buf), &w, &used),
		                 PROTO_NUM_OK);
		if (v != 0 && num_bits(w) != num_bits(v))
			fail_msg("%s does not read back as %.17g", buf, v);
	}
}

/* Facts of IEEE 754 binary64 rounding (to nearest, ties to even). */
static void test_known_values(void **state)
{
	static const struct {
		const char *text;
		double v;
		int status;
	} rows[] = {
	    {"0", 0.0, PROTO_NUM_OK},
	    {"1", 1.0, PROTO_NUM_OK},
	    {"-2.5", -2.5, PROTO_NUM_OK},
	    {"3000", 3000.0, PROTO_NUM_OK},
	    {"0.1", 0.1, PROTO_NUM_OK},
	    {"1e23", 1e23, PROTO_NUM_OK},
	    /* 2^53 + 1 is halfway between 2^53 and 2^53 + 2: even is 2^53 */
	    {"9007199254740993", 9007199254740992.0, PROTO_NUM_OK},
	    {"9007199254740993.0000000000000000001", 9007199254740994.0,
	     PROTO_NUM_OK},
	    {"9007199254740995", 9007199254740996.0, PROTO_NUM_OK},
	    {"1.7976931348623157e308", DBL_MAX, PROTO_NUM_OK},
	    {"2.2250738585072014e-308", DBL_MIN, PROTO_NUM_OK},
	    {"4.9406564584124654e-324", 0x1p-1074, PROTO_NUM_OK},
	    {"5e-324", 0x1p-1074, PROTO_NUM_OK},
	    {"1e400", HUGE_VAL, PROTO_NUM_ERANGE},
	    {"-1e400", -HUGE_VAL, PROTO_NUM_ERANGE},
	    {"1e-400", 0.0, PROTO_NUM_ERANGE},
	    {"0e400", 0.0, PROTO_NUM_OK},
	    {"0.0000e-99999999999999", 0.0, PROTO_NUM_OK},
	    {"1e99999999999999999999", HUGE_VAL, PROTO_NUM_ERANGE},
	};
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		double v;
		size_t used;
		int st =
		    parse_exact(rows[i].text, strlen(rows[i].text), &v, &used);
		if (st != rows[i].status || num_bits(v) != num_bits(rows[i].v))
			fail_msg("%s: got %.17g status %d, want %.17g status "
			         "%d",
			         rows[i].text, v, st, rows[i].v,
			         rows[i].status);
		check_parse(rows[i].text);
	}
	{
		double v;
		size_t used;
		assert_int_equal(parse_exact("-0", 2, &v, &used), PROTO_NUM_OK);
		assert_true(v == 0 && signbit(v)); /* as strtod */
	}
}

/* Powers of ten as 1eK, 1EK and as plain digits, and their neighbours
 * at 17 digits; subnormals and the ends of the normal range as printf
 * prints them at every precision. */
static void test_hard_cases(void **state)
{
	static char buf[1024];
	uint64_t s = num_seed(23), u;
	int e, d, i;
	(void)state;
	for (e = -400; e <= 400; e++) {
		snprintf(buf, sizeof buf, "1e%d", e);
		check_parse(buf);
		snprintf(buf, sizeof buf, "-1E%+d", e);
		check_parse(buf);
		snprintf(buf, sizeof buf, "9.9999999999999999e%d", e);
		check_parse(buf);
		snprintf(buf, sizeof buf, "1.0000000000000001e%d", e);
		check_parse(buf);
		if (e >= 0) {
			buf[0] = '1';
			memset(buf + 1, '0', (size_t)e);
			buf[e + 1] = '\0';
		} else {
			memcpy(buf, "0.", 2);
			memset(buf + 2, '0', (size_t)(-e - 1));
			buf[1 - e] = '1';
			buf[2 - e] = '\0';
		}
		check_parse(buf);
	}
	for (u = 1; u < 2048; u++) {
		double v;
		memcpy(&v, &u, sizeof v);
		for (d = 0; d < 18; d++) {
			snprintf(buf, sizeof buf, "%.*e", d, v);
			check_parse(buf);
		}
	}
	for (i = 0; i < 100000; i++) {
		double v;
		u = num_rand(&s) & ((UINT64_C(1) << 52) - 1);
		memcpy(&v, &u, sizeof v);
		snprintf(buf, sizeof buf, "%.*e", (int)(num_rand(&s) % 18), v);
		check_parse(buf);
	}
	{
		const double ends[] = {DBL_MIN, nextafter(DBL_MIN, 0),
		                       nextafter(DBL_MIN, 1), DBL_MAX,
		                       nextafter(DBL_MAX, 0)};
		for (i = 0; i < 5; i++)
			for (d = 0; d < 25; d++) {
				snprintf(buf, sizeof buf, "%.*e", d, ends[i]);
				check_parse(buf);
			}
	}
	/* Around DBL_MAX: the last value below the halfway point to 2^1024
	 * is DBL_MAX, the halfway point itself rounds to infinity (even). */
	check_parse("1.7976931348623158e308");
	check_parse("1.7976931348623159e308");
	check_parse("179769313486231580793728971405301e276");
	check_parse("179769313486231580793728971405303e276");
	check_parse("2.2250738585072011e-308");
	check_parse("2.2250738585072012e-308");
	check_parse("2.4703282292062327e-324");
	check_parse("2.4703282292062328e-324");
	for (i = -100; i <= 100; i++) {
		snprintf(buf, sizeof buf, "%.0f", 9007199254740992.0 + i);
		check_parse(buf);
		snprintf(buf, sizeof buf, "%.0f.5", 9007199254740992.0 + i);
		check_parse(buf);
	}
}

#if LDBL_MANT_DIG >= 54
/* Writes the exact decimal of x (a long double with at most 64
 * significant bits) into buf with trailing zeros of the mantissa
 * removed, as d.ddd...e[+-]X. */
static void exact_decimal(long double x, char *buf, size_t size)
{
	char *e, *z;

	snprintf(buf, size, "%.800Le", x);
	e = strchr(buf, 'e');
	for (z = e; z[-1] == '0'; z--)
		;
	if (z[-1] == '.')
		z--;
	memmove(z, e, strlen(e) + 1);
}

/* Exact halfway points between neighbouring doubles (ties to even), and
 * the same digits with the last one, d, made d-1 and 9999999999 (just
 * below: rounds down) or followed by 0000001 (just above: up), and
 * followed by 1000 zeros and a 1: beyond the 800 digits the fallback
 * keeps, where only its sticky digit remembers that the value is above
 * the tie. */
static void halfway(double v)
{
	static char buf[4096], tail[16], alt[4096 + 1100];
	long double h;
	char *e, *last;

	if (!(v < DBL_MAX))
		return;
	h = (long double)v +
	    ((long double)nextafter(v, INFINITY) - (long double)v) / 2;
	exact_decimal(h, buf, sizeof buf);
	check_parse(buf);
	e = strchr(buf, 'e');
	snprintf(tail, sizeof tail, "%s", e);
	last = e - 1;
	if (*last < '1' || *last > '9')
		fail_msg("halfway point %s: trailing zeros left", buf);
	*e = '\0';
	snprintf(alt, sizeof alt, "%.*s%c9999999999%s", (int)(last - buf), buf,
	         *last - 1, tail);
	check_parse(alt);
	snprintf(alt, sizeof alt, "%s0000001%s", buf, tail);
	check_parse(alt);
	{
		size_t n = strlen(buf);
		memcpy(alt, buf, n);
		memset(alt + n, '0', 1000);
		snprintf(alt + n + 1000, sizeof alt - n - 1000, "1%s", tail);
		check_parse(alt);
		snprintf(alt + n + 1000, sizeof alt - n - 1000, "%s", tail);
		check_parse(alt);
	}
}

static void test_halfway(void **state)
{
	uint64_t s = num_seed(24);
	long n = num_iters() / 200, i;
	int e;
	(void)state;
	for (i = 0; i < n; i++) {
		double v = fabs(num_rand_finite(&s));
		halfway(v);
	}
	for (e = -1074; e < 1023; e++)
		halfway(ldexp(1, e));
	for (i = 0; i < 2000; i++) {
		uint64_t u = num_rand(&s) & ((UINT64_C(1) << 52) - 1);
		double v;
		memcpy(&v, &u, sizeof v);
		halfway(v);
	}
	halfway(9007199254740992.0);
	halfway(DBL_MIN);
	halfway(nextafter(DBL_MAX, 0));
}
#else
static void test_halfway(void **state)
{
	(void)state;
	skip(); /* long double cannot hold a halfway point exactly here */
}
#endif

/* 19- and 20-digit mantissas (where the fast path ends and truncation
 * begins), and long inputs: 800 random digits, 10^4 digits, long runs of
 * zeros before and after the significant digits. */
static void test_long_mantissas(void **state)
{
	static char buf[12000];
	uint64_t s = num_seed(25);
	long n = num_iters() / 20, i;
	int nd, j, e;
	(void)state;
	check_parse("9999999999999999999");
	check_parse("18446744073709551615");
	check_parse("18446744073709551616");
	check_parse("10000000000000000000");
	check_parse("99999999999999999999e-20");
	for (i = 0; i < n; i++) {
		nd = 19 + (int)(num_rand(&s) % 2);
		buf[0] = (char)('1' + num_rand(&s) % 9);
		for (j = 1; j < nd; j++)
			buf[j] = (char)('0' + num_rand(&s) % 10);
		e = (int)(num_rand(&s) % 660) - 330;
		snprintf(buf + nd, sizeof buf - (size_t)nd, "e%d", e);
		check_parse(buf);
	}
	for (i = 0; i < 20000; i++) {
		int point;
		nd = 21 + (int)(num_rand(&s) % 800);
		point = 1 + (int)(num_rand(&s) % (uint64_t)nd);
		buf[0] = (char)('1' + num_rand(&s) % 9);
		for (j = 1; j <= nd; j++)
			buf[j] = (char)('0' + num_rand(&s) % 10);
		memmove(buf + point + 1, buf + point, (size_t)(nd - point + 1));
		buf[point] = '.';
		if (point == nd)
			buf[nd + 1] = '5'; /* keep a digit after the point */
		e = (int)(num_rand(&s) % 700) - 350 - point;
		snprintf(buf + nd + 2, sizeof buf - (size_t)nd - 2, "e%d", e);
		check_parse(buf);
	}
	/* 10^4 digits: 1234...; the same after "0." and 5000 zeros */
	for (j = 0; j < 10000; j++)
		buf[j] = (char)('1' + j % 9);
	snprintf(buf + 10000, sizeof buf - 10000, "e-9700");
	check_parse(buf);
	buf[10000] = '\0';
	check_parse(buf);
	memcpy(buf, "0.", 2);
	memset(buf + 2, '0', 5000);
	memcpy(buf + 5002, "123456789012345678901234567890e5200", 36);
	check_parse(buf);
	memcpy(buf + 5002, "1e4", 4);
	check_parse(buf);
	memset(buf, '0', 3000);
	buf[0] = '1';
	buf[3000] = '\0';
	check_parse(buf); /* 1e2999: overflow */
	memcpy(buf + 3000, "e-2990", 7);
	check_parse(buf);
}

/* Text that is not a JSON number: status, stop offset. */
static void test_malformed(void **state)
{
	static const struct {
		const char *text;
		size_t at;
	} rows[] = {
	    {"", 0},      {"-", 1},   {"+1", 0},       {"01", 1},  {"-01", 2},
	    {"00", 1},    {"1.", 2},  {".5", 0},       {"-.5", 1}, {"1e", 2},
	    {"1e+", 3},   {"1E-", 3}, {"--1", 1},      {"inf", 0}, {"-inf", 1},
	    {"nan", 0},   {"NaN", 0}, {"Infinity", 0}, {" 1", 0},  {"1.e5", 2},
	    {"1.5e", 4},  {"- 1", 1}, {"\xd9\xa1", 0}, {"e5", 0},  {"0.e1", 2},
	    {"1e+-2", 3},
	};
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		double v = 0;
		size_t used = 99;
		int st =
		    parse_exact(rows[i].text, strlen(rows[i].text), &v, &used);
		if (st != PROTO_NUM_EINVAL || used != rows[i].at || !isnan(v))
			fail_msg("\"%s\": status %d at %zu, want EINVAL at "
			         "%zu",
			         rows[i].text, st, used, rows[i].at);
	}
}

/* A number ends where JSON lets the next token begin; the caller judges
 * that byte. Every prefix of a number is parsed within its length. */
static void test_stop(void **state)
{
	static const struct {
		const char *text;
		size_t used;
		double v;
	} rows[] = {
	    {"12,3", 2, 12},   {"1.5]", 3, 1.5},  {"1e5x", 3, 1e5},
	    {"0x10", 1, 0},    {"-7 ", 2, -7},    {"3.25e-1}", 7, 0.325},
	    {"100\n", 3, 100}, {"5.0.1", 3, 5.0}, {"0e0e0", 3, 0},
	};
	const char *full = "-123456789012.345678901234e-7";
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		double v;
		size_t used;
		int st =
		    parse_exact(rows[i].text, strlen(rows[i].text), &v, &used);
		if (st != PROTO_NUM_OK || used != rows[i].used ||
		    v != rows[i].v)
			fail_msg("\"%s\": status %d used %zu value %.17g",
			         rows[i].text, st, used, v);
	}
	for (size_t len = 0; len <= strlen(full); len++) {
		char pre[64];
		double v;
		size_t used;
		int st = parse_exact(full, len, &v, &used);
		snprintf(pre, sizeof pre, "%.*s", (int)len, full);
		if (st == PROTO_NUM_OK) {
			assert_int_equal(used, len);
			check_parse(pre);
		} else {
			/* only "", "-" and a trailing '.' or 'e'/'e-' */
			assert_int_equal(st, PROTO_NUM_EINVAL);
			assert_int_equal(used, len);
		}
	}
}

/* ---- arrays ------------------------------------------------------------ */

/* Runs the scanner on an exact-size copy of text: count, whole parse and
 * (when nspans > 0) the spans of a split, which must agree. */
static int scan(const char *text, unsigned flags, double *out, size_t cap,
                size_t *n, size_t *end, proto_num_err *err)
{
	size_t len = strlen(text);
	char *b = malloc(len ? len : 1);
	int st;

	assert_non_null(b);
	memcpy(b, text, len);
	st = proto_num_array_parse(b, len, flags, out, cap, n, end, err);
	free(b);
	return st;
}

static void test_array_basic(void **state)
{
	double out[8];
	size_t n, end, cn, cend;
	proto_num_err err;
	const char *t = " [ 1 ,\t2.5\r\n, -3e2,0 ] , \"x\"";
	(void)state;
	assert_int_equal(scan(t, 0, out, 8, &n, &end, &err), PROTO_NUM_OK);
	assert_int_equal(n, 4);
	assert_int_equal(end, 22); /* just past the ']' */
	assert_true(out[0] == 1 && out[1] == 2.5 && out[2] == -300 &&
	            out[3] == 0);
	assert_int_equal(proto_num_array_count(t, strlen(t), &cn, &cend, &err),
	                 PROTO_NUM_OK);
	assert_int_equal(cn, 4);
	assert_int_equal(cend, 22);
	assert_int_equal(scan("[]", 0, out, 0, &n, &end, &err), PROTO_NUM_OK);
	assert_int_equal(n, 0);
	assert_int_equal(end, 2);
	assert_int_equal(scan("[ \n ]", 0, out, 8, &n, &end, &err),
	                 PROTO_NUM_OK);
	assert_int_equal(n, 0);
	assert_int_equal(proto_num_array_count("[ ]", 3, &cn, &cend, &err),
	                 PROTO_NUM_OK);
	assert_int_equal(cn, 0);
	assert_int_equal(proto_num_array_count("[7]", 3, &cn, &cend, &err),
	                 PROTO_NUM_OK);
	assert_int_equal(cn, 1);
	assert_int_equal(
	    scan("[null,1,null]", PROTO_NUM_NULLS, out, 8, &n, &end, &err),
	    PROTO_NUM_OK);
	assert_int_equal(n, 3);
	assert_true(isnan(out[0]) && out[1] == 1 && isnan(out[2]));
}

/* Each malformed array: status, element index, byte offset. */
static void test_array_errors(void **state)
{
	static const struct {
		const char *text;
		unsigned flags;
		int status;
		size_t index, offset;
	} rows[] = {
	    {"[1,2,]", 0, PROTO_NUM_EINVAL, 2, 5},
	    {"[1 2]", 0, PROTO_NUM_EINVAL, 0, 3},
	    {"[1,,2]", 0, PROTO_NUM_EINVAL, 1, 3},
	    {"[,1]", 0, PROTO_NUM_EINVAL, 0, 1},
	    {"[1,\"a\"]", 0, PROTO_NUM_ETYPE, 1, 3},
	    {"[1,[2]]", 0, PROTO_NUM_ETYPE, 1, 3},
	    {"[{}]", 0, PROTO_NUM_ETYPE, 0, 1},
	    {"[0,true]", 0, PROTO_NUM_ETYPE, 1, 3},
	    {"[false]", 0, PROTO_NUM_ETYPE, 0, 1},
	    {"[1,null]", 0, PROTO_NUM_ETYPE, 1, 3},
	    {"[1,nul]", PROTO_NUM_NULLS, PROTO_NUM_EINVAL, 1, 3},
	    {"[1,2", 0, PROTO_NUM_EINVAL, 1, 4},
	    {"[", 0, PROTO_NUM_EINVAL, 0, 1},
	    {"[01]", 0, PROTO_NUM_EINVAL, 0, 2},
	    {"[5,1e400]", 0, PROTO_NUM_ERANGE, 1, 3},
	    {"[5,-1e-400]", 0, PROTO_NUM_ERANGE, 1, 3},
	    {"[-]", 0, PROTO_NUM_EINVAL, 0, 2},
	    {"[1.5.3]", 0, PROTO_NUM_EINVAL, 0, 4},
	    {"[12abc]", 0, PROTO_NUM_EINVAL, 0, 3},
	    {"[+1]", 0, PROTO_NUM_EINVAL, 0, 1},
	    {"[.5]", 0, PROTO_NUM_EINVAL, 0, 1},
	    {"[NaN]", 0, PROTO_NUM_EINVAL, 0, 1},
	    {"1,2", 0, PROTO_NUM_ETYPE, 0, 0},
	    {"  {\"a\":1}", 0, PROTO_NUM_ETYPE, 0, 2},
	    {"", 0, PROTO_NUM_ETYPE, 0, 0},
	    {"[1,2,3,4,5,6,7,8,9,x]", 0, PROTO_NUM_EINVAL, 9, 19},
	};
	double out[16];
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		size_t n = 9, end = 9;
		proto_num_err err;
		memset(&err, 0, sizeof err);
		int st =
		    scan(rows[i].text, rows[i].flags, out, 16, &n, &end, &err);
		if (st != rows[i].status || err.status != st ||
		    err.index != rows[i].index ||
		    err.offset != rows[i].offset || !err.why || n != 0 ||
		    end != 0)
			fail_msg("%s: status %d element %zu offset %zu (%s); "
			         "want %d, %zu, %zu",
			         rows[i].text, st, err.index, err.offset,
			         err.why ? err.why : "-", rows[i].status,
			         rows[i].index, rows[i].offset);
	}
	/* the counting pass sees strings and nesting, not bad numbers */
	{
		size_t n, end;
		proto_num_err err;
		assert_int_equal(
		    proto_num_array_count("[1,\"]\"]", 7, &n, &end, &err),
		    PROTO_NUM_ETYPE);
		assert_int_equal(err.index, 1);
		assert_int_equal(
		    proto_num_array_count("[1,2,{}]", 8, &n, &end, &err),
		    PROTO_NUM_ETYPE);
		assert_int_equal(err.index, 2);
		assert_int_equal(err.offset, 5);
		assert_int_equal(
		    proto_num_array_count("[1,2", 4, &n, &end, &err),
		    PROTO_NUM_EINVAL);
		assert_int_equal(
		    proto_num_array_count("[1,x]", 5, &n, &end, &err),
		    PROTO_NUM_OK);
		assert_int_equal(n, 2);
	}
	/* more elements than the buffer: ESIZE at index cap */
	{
		size_t n, end;
		proto_num_err err;
		assert_int_equal(scan("[1,2,3]", 0, out, 2, &n, &end, &err),
		                 PROTO_NUM_ESIZE);
		assert_int_equal(err.index, 2);
		assert_int_equal(err.offset, 5);
		assert_true(out[0] == 1 && out[1] == 2);
	}
	assert_string_equal(proto_num_strerror(PROTO_NUM_ESIZE),
	                    "more elements than the buffer holds");
	assert_string_equal(proto_num_strerror(99), "unknown status");
}

/* Writes a random array of k numbers (random doubles as %.17g and
 * proto_num_fmt print them, short decimals, nulls) with random
 * whitespace into buf; the values strtod gives go to want. */
static size_t random_array(uint64_t *s, char *buf, size_t size, size_t k,
                           double *want, int nulls)
{
	static const char *ws[] = {"", "", "", " ", "\n", "\t ", "\r\n  "};
	size_t len = 0, i;

	len +=
	    (size_t)snprintf(buf + len, size - len, "%s[", ws[num_rand(s) % 7]);
	for (i = 0; i < k; i++) {
		char num[PROTO_NUM_FMT_MAX + 16];
		double v = num_rand_finite(s);
		switch (num_rand(s) % 5) {
		case 0: snprintf(num, sizeof num, "%.17g", v); break;
		case 1: proto_num_fmt(num, v); break;
		case 2:
			snprintf(num, sizeof num, "%d.%02d",
			         (int)(num_rand(s) % 7000),
			         (int)(num_rand(s) % 100));
			break;
		case 3:
			if (nulls) {
				memcpy(num, "null", 5);
				break;
			}
			/* fall through */
		default:
			snprintf(num, sizeof num, "%d",
			         (int)(num_rand(s) % 200000) - 100000);
			break;
		}
		want[i] = strcmp(num, "null") ? strtod(num, NULL) : NAN;
		len += (size_t)snprintf(buf + len, size - len, "%s%s%s%s",
		                        i ? "," : "", ws[num_rand(s) % 7], num,
		                        ws[num_rand(s) % 7]);
	}
	len += (size_t)snprintf(buf + len, size - len, "]");
	return len;
}

static int same(double a, double b)
{
	return num_bits(a) == num_bits(b) || (isnan(a) && isnan(b));
}

/* Random arrays: the count, the whole parse and every split into spans
 * parsed span by span give the same elements, bit for bit as strtod. */
static void test_array_random(void **state)
{
	uint64_t s = num_seed(26);
	size_t cap = 6000, bufsize = cap * 40 + 64;
	char *buf = malloc(bufsize), *exact;
	double *want = malloc(cap * sizeof *want);
	double *got = malloc(cap * sizeof *got);
	double *got2 = malloc(cap * sizeof *got2);
	proto_num_span spans[24];
	long rounds = num_iters() / 50000 + 20, r;
	(void)state;
	assert_true(buf && want && got && got2);
	for (r = 0; r < rounds; r++) {
		size_t k = (size_t)(num_rand(&s) % (r % 4 == 0 ? cap : 40));
		int nulls = (int)(num_rand(&s) & 1);
		size_t len = random_array(&s, buf, bufsize, k, want, nulls);
		size_t n, end, cn, cend, ns, i, j, covered;
		proto_num_err err;
		exact = malloc(len);
		assert_non_null(exact);
		memcpy(exact, buf, len);
		assert_int_equal(
		    proto_num_array_count(exact, len, &cn, &cend, &err),
		    PROTO_NUM_OK);
		assert_int_equal(proto_num_array_parse(
		                     exact, len, nulls ? PROTO_NUM_NULLS : 0,
		                     got, cap, &n, &end, &err),
		                 PROTO_NUM_OK);
		assert_int_equal(n, k);
		assert_int_equal(cn, k);
		assert_int_equal(end, len);
		assert_int_equal(cend, len);
		for (i = 0; i < k; i++)
			if (!same(got[i], want[i]))
				fail_msg("element %zu: %.17g, strtod %.17g", i,
				         got[i], want[i]);
		ns = proto_num_array_split(exact, end, n, spans,
		                           1 + num_rand(&s) % 24);
		assert_true(k == 0 ? ns == 0 : ns >= 1);
		memset(got2, 0, k * sizeof *got2);
		for (j = 0, covered = 0; j < ns; j++) {
			assert_int_equal(spans[j].first, covered);
			assert_true(spans[j].n > 0);
			assert_true(exact[spans[j].end] == ',' ||
			            exact[spans[j].end] == ']');
			if (j + 1 < ns)
				assert_int_equal(spans[j + 1].begin,
				                 spans[j].end + 1);
			assert_int_equal(proto_num_array_parse_span(
			                     exact, &spans[j],
			                     nulls ? PROTO_NUM_NULLS : 0, got2,
			                     &err),
			                 PROTO_NUM_OK);
			covered += spans[j].n;
		}
		assert_int_equal(covered, k);
		for (i = 0; i < k; i++)
			if (!same(got2[i], want[i]))
				fail_msg(
				    "span element %zu: %.17g, strtod %.17g", i,
				    got2[i], want[i]);
		free(exact);
	}
	free(buf);
	free(want);
	free(got);
	free(got2);
}

/* A bad element found in a span is named by its index in the whole array
 * and its offset in the whole text, and a span that does not hold the
 * elements it says is refused. */
static void test_array_span_errors(void **state)
{
	char text[4096];
	size_t len = 0, i, n, end, ns, j;
	proto_num_span spans[8];
	double out[600];
	proto_num_err err;
	int found = 0;
	(void)state;
	len += (size_t)snprintf(text, sizeof text, "[");
	for (i = 0; i < 500; i++)
		len += (size_t)snprintf(text + len, sizeof text - len, "%s%zu",
		                        i ? "," : "", i == 417 ? 0 : i + 1000);
	len += (size_t)snprintf(text + len, sizeof text - len, "]");
	/* element 417 becomes "1e999" in place of "0" */
	{
		char *z = strstr(text, ",0,");
		assert_non_null(z);
		memmove(z + 6, z + 2, len - (size_t)(z + 2 - text) + 1);
		memcpy(z + 1, "1e999", 5);
		len += 4;
	}
	assert_int_equal(proto_num_array_count(text, len, &n, &end, &err),
	                 PROTO_NUM_OK);
	assert_int_equal(n, 500);
	ns = proto_num_array_split(text, end, n, spans, 8);
	assert_int_equal(ns, 8);
	for (j = 0; j < ns; j++) {
		int st =
		    proto_num_array_parse_span(text, &spans[j], 0, out, &err);
		if (st != PROTO_NUM_OK) {
			assert_int_equal(st, PROTO_NUM_ERANGE);
			assert_int_equal(err.index, 417);
			assert_memory_equal(text + err.offset, "1e999", 5);
			found++;
		}
	}
	assert_int_equal(found, 1);
	/* a span claiming one element too many or too few */
	spans[0].n++;
	assert_int_equal(
	    proto_num_array_parse_span(text, &spans[0], 0, out, &err),
	    PROTO_NUM_EINVAL);
	spans[0].n -= 2;
	assert_int_equal(
	    proto_num_array_parse_span(text, &spans[0], 0, out, &err),
	    PROTO_NUM_EINVAL);
	assert_int_equal(proto_num_array_split(text, end, n, spans, 0), 0);
	assert_int_equal(proto_num_array_split("[]", 2, 0, spans, 4), 0);
	/* more spans asked than elements: one element each */
	assert_int_equal(proto_num_array_split("[1,2,3]", 7, 3, spans, 8), 3);
	for (j = 0; j < 3; j++) {
		assert_int_equal(spans[j].n, 1);
		assert_int_equal(spans[j].first, j);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_known_values),
	    cmocka_unit_test(test_malformed),
	    cmocka_unit_test(test_stop),
	    cmocka_unit_test(test_hard_cases),
	    cmocka_unit_test(test_halfway),
	    cmocka_unit_test(test_long_mantissas),
	    cmocka_unit_test(test_random_decimals),
	    cmocka_unit_test(test_short_decimals),
	    cmocka_unit_test(test_random_doubles),
	    cmocka_unit_test(test_array_basic),
	    cmocka_unit_test(test_array_errors),
	    cmocka_unit_test(test_array_random),
	    cmocka_unit_test(test_array_span_errors),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
