/* Shortest round-trip and fixed-digit formatting (daemon/proto/numfmt.c)
 * against the C library (glibc's strtod and printf, both correctly
 * rounded): every text must parse back with strtod to the same double
 * bit for bit, have no more digits than needed (no decimal with one digit
 * fewer reads back: the neighbours of the value at that length, one from
 * printf("%.*e"), are tried with strtod), and be the closest such decimal
 * (printf's correctly rounded digits at that length whenever those read
 * back). 10^7 uniformly random finite doubles (the closest check on one
 * in twenty), plus the hard cases, checked in full: subnormals, the ends
 * of the normal range, every power of two and of ten, the 2^53
 * neighbours and values %.17g prints long. The fixed-digit variant is
 * compared with printf("%.*e") digit for digit. num_iters() (in
 * num_common.h) sets the number of random cases. */
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
#include "unit/num_common.h"

/* Text is a JSON number (RFC 8259 sec. 6) with no '+' and no leading
 * zeros in the exponent, which the layout promises (numfmt.h). */
static int json_number_ok(const char *t)
{
	const char *p = t;

	if (*p == '-')
		p++;
	if (*p == '0')
		p++;
	else if (*p >= '1' && *p <= '9')
		while (*p >= '0' && *p <= '9')
			p++;
	else
		return 0;
	if (*p == '.') {
		p++;
		if (!(*p >= '0' && *p <= '9'))
			return 0;
		while (*p >= '0' && *p <= '9')
			p++;
	}
	if (*p == 'e') {
		p++;
		if (*p == '-')
			p++;
		if (!(*p >= '1' && *p <= '9'))
			return 0;
		while (*p >= '0' && *p <= '9')
			p++;
	}
	return *p == '\0';
}

/* Prints m 10^e as "%llue%d" into buf. */
static void print_me(char *buf, size_t size, uint64_t m, int e)
{
	snprintf(buf, size, "%llue%d", (unsigned long long)m, e);
}

/* Checks that no decimal with fewer than L = strlen(dig) significant
 * digits reads back to v: the (L-1)-digit decimals nearest v on either
 * side are printf's correctly rounded one, r, and its neighbour across v,
 * nb. If r does not read back, nb (no nearer to v) cannot either unless
 * the rounding interval is lopsided, which happens only at powers of two
 * (the gap below is half the gap above); so nb is read only there, or
 * always when `both` is set (the hard cases). */
static void check_minimal(double v, const char *dig, const char *text, int both)
{
	char r[64], rd[48], nb[64];
	int L = (int)strlen(dig), rx, rn, i;
	uint64_t m = 0, top;
	double rv;

	if (L <= 1)
		return;
	snprintf(r, sizeof r, "%.*e", L - 2, v);
	rv = strtod(r, NULL);
	if (rv == v)
		fail_msg("%.17g: %s has %d digits but %s reads back too", v,
		         text, L, r);
	if (!both && (num_bits(v) & ((UINT64_C(1) << 52) - 1)) != 0)
		return;
	rn = num_digits_of(r, rd, &rx);
	for (i = 0; i < rn; i++)
		m = m * 10 + (uint64_t)(rd[i] - '0');
	for (; i < L - 1; i++)
		m *= 10;
	/* value of r = m 10^(rx - (L - 2)) */
	top = 1;
	for (i = 0; i < L - 2; i++)
		top *= 10;
	if (fabs(rv) < fabs(v)) {
		print_me(nb, sizeof nb, m + 1, rx - (L - 2));
	} else if (m == top) {
		/* below 1.00..0 10^rx the step is ten times finer */
		print_me(nb, sizeof nb, top * 10 - 1, rx - 1 - (L - 2));
	} else {
		print_me(nb, sizeof nb, m - 1, rx - (L - 2));
	}
	if (strtod(nb, NULL) == fabs(v))
		fail_msg("%.17g: %s has %d digits but %s reads back too", v,
		         text, L, nb);
}

/* Checks the text of v: JSON syntax, strtod reads it back bit for bit,
 * no decimal with fewer digits reads back, integers below 2^53 print as
 * "%lld" does, and with `closest`, printf's correctly rounded digits at
 * the same length are ours whenever they read back (printf and strtod of
 * numbers far from 1 cost about a microsecond each in glibc, so the
 * random test does that on every twentieth). Returns the digit count. */
static int check(double v, int closest)
{
	char buf[PROTO_NUM_FMT_MAX], dig[48], r[64], rd[48];
	int n, x, rx, L;
	size_t len;
	double back;

	memset(buf, 'Z', sizeof buf);
	len = proto_num_fmt(buf, v);
	if (len != strlen(buf) || len > 24)
		fail_msg("%.17g: length %zu for \"%s\"", v, len, buf);
	if (!json_number_ok(buf))
		fail_msg("%.17g: \"%s\" is not a JSON number", v, buf);
	back = strtod(buf, NULL);
	if (v == 0) {
		if (strcmp(buf, "0") != 0)
			fail_msg("zero printed as %s", buf);
		return 1;
	}
	if (num_bits(back) != num_bits(v))
		fail_msg("%.17g (0x%016llx): \"%s\" reads back as %.17g", v,
		         (unsigned long long)num_bits(v), buf, back);
	L = num_digits_of(buf, dig, &x);
	check_minimal(v, dig, buf, closest);
	/* closest: printf's correctly rounded L digits, when they read back */
	if (closest)
		snprintf(r, sizeof r, "%.*e", L - 1, v);
	if (closest && strtod(r, NULL) == v) {
		n = num_digits_of(r, rd, &rx);
		if (n != L || rx != x || strcmp(rd, dig) != 0)
			fail_msg("%.17g: \"%s\" but %s is closer", v, buf, r);
	}
	/* integers below 2^53 print as integers */
	if (fabs(v) < 9007199254740992.0 && v == floor(v)) {
		snprintf(r, sizeof r, "%lld", (long long)v);
		if (strcmp(r, buf) != 0)
			fail_msg("integer %s printed as %s", r, buf);
	}
	return L;
}

/* Printed forms that follow from the definition of shortest round trip
 * (the same digits as Python's repr, which uses David Gay's shortest
 * mode: from memory) and from the layout rules in numfmt.h. */
static int check_all(double v)
{
	return check(v, 1);
}

static void test_examples(void **state)
{
	static const struct {
		double v;
		const char *text;
	} rows[] = {
	    {0.1, "0.1"},
	    {0.3, "0.3"},
	    {0.1 + 0.2, "0.30000000000000004"},
	    {1.0 / 3, "0.3333333333333333"},
	    {2.0 / 3, "0.6666666666666666"},
	    {1e23, "1e23"},
	    {5e-324, "5e-324"},
	    {1e-323, "1e-323"},
	    {DBL_MAX, "1.7976931348623157e308"},
	    {DBL_MIN, "2.2250738585072014e-308"},
	    {-DBL_MIN, "-2.2250738585072014e-308"},
	    {9007199254740991.0, "9007199254740991"},
	    {9007199254740992.0, "9007199254740992"},
	    {9007199254740994.0, "9007199254740994"},
	    {3000, "3000"},
	    {-17, "-17"},
	    {1e15, "1000000000000000"},
	    {1e16, "1e16"},
	    {1e21, "1e21"},
	    {123456789012345680000.0, "123456789012345680000"},
	    {1.5e300, "1.5e300"},
	    {2.5, "2.5"},
	    {-123.456, "-123.456"},
	    {0.5, "0.5"},
	    {0.01, "0.01"},  /* plain and exponent equally long: plain */
	    {0.001, "1e-3"}, /* exponent shorter */
	    {0.00015, "1.5e-4"},
	    {1234.5, "1234.5"},
	    {1.2345e-7, "1.2345e-7"},
	    {2.2250738585072009e-308, "2.225073858507201e-308"},
	    {-0.0, "0"},
	};
	char buf[PROTO_NUM_FMT_MAX];
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		proto_num_fmt(buf, rows[i].v);
		if (strcmp(buf, rows[i].text) != 0)
			fail_msg("%.17g: got %s want %s", rows[i].v, buf,
			         rows[i].text);
		check_all(rows[i].v);
	}
}

static void test_nonfinite(void **state)
{
	char buf[PROTO_NUM_FMT_MAX];
	(void)state;
	assert_int_equal(proto_num_fmt(buf, NAN), 4);
	assert_string_equal(buf, "null");
	assert_int_equal(proto_num_fmt(buf, INFINITY), 4);
	assert_string_equal(buf, "null");
	assert_int_equal(proto_num_fmt(buf, -INFINITY), 4);
	assert_string_equal(buf, "null");
	assert_int_equal(proto_num_fmt(buf, -0.0), 1);
	assert_string_equal(buf, "0");
	assert_int_equal(proto_num_fmt_digits(buf, NAN, 6), 4);
	assert_string_equal(buf, "null");
	assert_int_equal(proto_num_fmt_digits(buf, -INFINITY, 3), 4);
	assert_string_equal(buf, "null");
	assert_int_equal(proto_num_fmt_digits(buf, -0.0, 3), 1);
	assert_string_equal(buf, "0");
}

/* Subnormals (all of the smallest, every bit position, random ones), the
 * ends of the normal range, every power of two (where the interval is
 * lopsided), every power of ten (each must print as the single digit 1),
 * the 2^53 neighbours and values %.17g prints with 17 digits. */
static void test_hard_cases(void **state)
{
	uint64_t s = num_seed(11), u;
	double v;
	char buf[PROTO_NUM_FMT_MAX], dig[48], want[16];
	int x, e, i;
	(void)state;

	for (u = 1; u < 4096; u++) {
		memcpy(&v, &u, sizeof v);
		check_all(v);
		check_all(-v);
	}
	for (i = 0; i < 52; i++) {
		u = UINT64_C(1) << i;
		memcpy(&v, &u, sizeof v);
		check_all(v);
		u = (UINT64_C(1) << (i + 1)) - 1;
		memcpy(&v, &u, sizeof v);
		check_all(v);
	}
	for (i = 0; i < 200000; i++) {
		u = num_rand(&s) & ((UINT64_C(1) << 52) - 1);
		memcpy(&v, &u, sizeof v);
		check_all(v);
	}
	check_all(DBL_MIN);
	check_all(nextafter(DBL_MIN, 0));
	check_all(nextafter(DBL_MIN, 1));
	check_all(DBL_MAX);
	check_all(nextafter(DBL_MAX, 0));
	for (e = -1074; e <= 1023; e++) {
		check_all(ldexp(1, e));
		check_all(nextafter(ldexp(1, e), 0));
		check_all(nextafter(ldexp(1, e), INFINITY));
	}
	for (e = -323; e <= 308; e++) {
		snprintf(want, sizeof want, "1e%d", e);
		v = strtod(want, NULL);
		proto_num_fmt(buf, v);
		if (num_digits_of(buf, dig, &x) != 1 || dig[0] != '1' || x != e)
			fail_msg("%s printed as %s", want, buf);
		check_all(v);
		check_all(nextafter(v, 0));
		check_all(nextafter(v, INFINITY));
	}
	for (i = -100; i <= 100; i++) {
		check_all(9007199254740992.0 + 2 * i);
		check_all(-(9007199254740992.0 + 2 * i));
	}
	/* %.17g prints these with 17 digits; the shortest has fewer. */
	check_all(0.1);
	check_all(0.2);
	check_all(1.1);
	check_all(100.0 / 3);
	check_all(299792458.1);
	check_all(1 / 2.54);
	check_all(3048.0 / 10000);
}

/* Uniformly random bit patterns over the finite doubles. */
static void test_random_bits(void **state)
{
	uint64_t s = num_seed(1);
	long n = num_iters(), i, hist[18] = {0};
	(void)state;
	for (i = 0; i < n; i++)
		hist[check(num_rand_finite(&s), i % 20 == 0)]++;
	print_message("  %ld doubles: %ld with 17 digits, %ld with 16, %ld "
	              "with 15 or fewer\n",
	              n, hist[17], hist[16], n - hist[17] - hist[16]);
}

/* Minimality checked the direct way, on a subset: the first N in
 * 1..17 for which %.Ng reads back is never fewer digits than ours. */
static void test_printf_scan(void **state)
{
	uint64_t s = num_seed(2);
	long n = num_iters() / 200, i;
	char buf[PROTO_NUM_FMT_MAX], dig[48], r[40];
	int N, x, L;
	(void)state;
	for (i = 0; i < n; i++) {
		double v = num_rand_finite(&s);
		proto_num_fmt(buf, v);
		L = v == 0 ? 1 : num_digits_of(buf, dig, &x);
		for (N = 1; N <= 17; N++) {
			snprintf(r, sizeof r, "%.*g", N, v);
			if (strtod(r, NULL) == v)
				break;
		}
		if (L > N)
			fail_msg("%.17g: %s has %d digits, %%.%dg suffices", v,
			         buf, L, N);
	}
}

/* Decimals of 1..15 significant digits: every such decimal in the normal
 * range reads to a double of its own (DBL_DIG = 15, C11 5.2.4.2.2), so
 * the shortest text of that double has exactly those digits. */
static void test_short_decimals(void **state)
{
	uint64_t s = num_seed(3);
	long n = num_iters() / 20, i;
	char text[64], buf[PROTO_NUM_FMT_MAX], d1[48], d2[48];
	int nd, e, x1, x2, k;
	(void)state;
	for (i = 0; i < n; i++) {
		uint64_t m = 0;
		nd = 1 + (int)(num_rand(&s) % 15);
		for (k = 0; k < nd; k++)
			m = m * 10 +
			    (k == 0 ? 1 + num_rand(&s) % 9 : num_rand(&s) % 10);
		/* d.ddd 10^x with x in [-307, 307]: normal doubles */
		e = (int)(num_rand(&s) % 615) - 307 - (nd - 1);
		snprintf(text, sizeof text, "%s%llue%d",
		         (num_rand(&s) & 1) ? "-" : "", (unsigned long long)m,
		         e);
		double v = strtod(text, NULL);
		check_all(v);
		proto_num_fmt(buf, v);
		num_digits_of(text, d1, &x1);
		num_digits_of(buf, d2, &x2);
		if (strcmp(d1, d2) != 0 || x1 != x2)
			fail_msg("%s printed as %s", text, buf);
	}
}

/* Fixed significant digits: equal to glibc's printf("%.*e"), which
 * rounds the exact binary value half to even, for random doubles and
 * digit counts, for exact ties (which take the snprintf fallback), and
 * for the examples in numfmt.h. */
static void check_digits(double v, int digits)
{
	char buf[PROTO_NUM_FMT_MAX], r[64], d1[48], d2[48];
	int x1, x2, n1, n2;

	proto_num_fmt_digits(buf, v, digits);
	if (!json_number_ok(buf))
		fail_msg("%.17g/%d: \"%s\" is not a JSON number", v, digits,
		         buf);
	snprintf(r, sizeof r, "%.*e", digits - 1, v);
	n1 = num_digits_of(r, d1, &x1);
	n2 = num_digits_of(buf, d2, &x2);
	if (n1 != n2 || (n1 && (x1 != x2 || strcmp(d1, d2) != 0)))
		fail_msg("%.17g with %d digits: got %s, printf %s", v, digits,
		         buf, r);
}

static void test_digits(void **state)
{
	static const struct {
		double v;
		int digits;
		const char *text;
	} rows[] = {
	    {0.12345, 3, "0.123"},
	    {1234567, 3, "1230000"},
	    {1.0004e-7, 3, "1e-7"},
	    {0.125, 2, "0.12"}, /* tie: even */
	    {0.375, 2, "0.38"},
	    {2.5, 1, "2"},
	    {3.5, 1, "4"},
	    {0.1, 17, "0.10000000000000001"},
	    {0.1, 18, "0.10000000000000001"}, /* clamped to 17 */
	    {0.1, 0, "0.1"},                  /* clamped to 1 */
	    {9.5, 1, "10"},
	    {999.96, 4, "1000"},
	    {3000, 6, "3000"},
	    {-2.71828182845904, 6, "-2.71828"},
	    {DBL_MAX, 3, "1.8e308"},
	    {5e-324, 1, "5e-324"},
	};
	uint64_t s = num_seed(4);
	long n = num_iters() / 20, i;
	char buf[PROTO_NUM_FMT_MAX];
	int d, k;
	(void)state;
	for (size_t j = 0; j < sizeof rows / sizeof rows[0]; j++) {
		proto_num_fmt_digits(buf, rows[j].v, rows[j].digits);
		if (strcmp(buf, rows[j].text) != 0)
			fail_msg("%.17g with %d digits: got %s want %s",
			         rows[j].v, rows[j].digits, buf, rows[j].text);
	}
	for (i = 0; i < n; i++)
		check_digits(num_rand_finite(&s), 1 + (int)(num_rand(&s) % 17));
	/* exact ties m.5 10^e and values one ulp either side */
	for (k = 0; k < 100000; k++) {
		d = 1 + (int)(num_rand(&s) % 15);
		double m = (double)(num_rand(&s) % 100000000) + 0.5;
		double v = ldexp(m, -(int)(num_rand(&s) % 4));
		check_digits(v, d);
		check_digits(nextafter(v, 0), d);
		check_digits(nextafter(v, INFINITY), d);
	}
	for (k = -1074; k <= 1023; k++)
		for (d = 1; d <= 17; d++)
			check_digits(ldexp(1, k), d);
	for (k = 1; k < 4096; k++) {
		uint64_t u = (uint64_t)k;
		double v;
		memcpy(&v, &u, sizeof v);
		for (d = 1; d <= 17; d++)
			check_digits(v, d);
	}
	for (d = 1; d <= 17; d++) {
		check_digits(DBL_MAX, d);
		check_digits(DBL_MIN, d);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_examples),
	    cmocka_unit_test(test_nonfinite),
	    cmocka_unit_test(test_hard_cases),
	    cmocka_unit_test(test_random_bits),
	    cmocka_unit_test(test_printf_scan),
	    cmocka_unit_test(test_short_decimals),
	    cmocka_unit_test(test_digits),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
