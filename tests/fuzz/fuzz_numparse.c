/* libFuzzer target for the number parser and the array scanner
 * (daemon/proto/numparse.c). The input is taken as text of exactly its
 * size (no NUL), so ASan sees any read past it. proto_num_parse must
 * agree with an independent reading of the JSON number grammar (RFC 8259
 * sec. 6: same accepted length, same offending byte) and, when it
 * accepts, with glibc's strtod on a NUL-terminated copy, bit for bit.
 * The array functions must agree with one another: a successful parse
 * implies a successful count of the same length and end, and every split
 * into spans parses to the same bits. Build and run with tests/fuzz/run. */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "proto/numparse.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static int digit(const char *s, size_t n, size_t i)
{
	return i < n && s[i] >= '0' && s[i] <= '9';
}

/* The JSON number grammar read plainly: returns 1 and the length of the
 * number at s, or 0 and the offset of the first byte that cannot
 * continue it when a digit was required there or a leading zero is
 * followed by a digit. */
static int grammar(const char *s, size_t n, size_t *at)
{
	size_t i = 0;

	if (i < n && s[i] == '-')
		i++;
	if (!digit(s, n, i))
		return *at = i, 0;
	if (s[i] == '0') {
		i++;
		if (digit(s, n, i))
			return *at = i, 0;
	} else {
		while (digit(s, n, i))
			i++;
	}
	if (i < n && s[i] == '.') {
		i++;
		if (!digit(s, n, i))
			return *at = i, 0;
		while (digit(s, n, i))
			i++;
	}
	if (i < n && (s[i] == 'e' || s[i] == 'E')) {
		i++;
		if (i < n && (s[i] == '+' || s[i] == '-'))
			i++;
		if (!digit(s, n, i))
			return *at = i, 0;
		while (digit(s, n, i))
			i++;
	}
	*at = i;
	return 1;
}

static int nonzero_digit(const char *s, size_t n)
{
	for (size_t i = 0; i < n && s[i] != 'e' && s[i] != 'E'; i++)
		if (s[i] >= '1' && s[i] <= '9')
			return 1;
	return 0;
}

static uint64_t bits(double v)
{
	uint64_t u;
	memcpy(&u, &v, sizeof u);
	return u;
}

static void check_number(const char *s, size_t size)
{
	double v, want;
	size_t used, at;
	char *copy;
	int st = proto_num_parse(s, size, &v, &used);
	int ok = grammar(s, size, &at);

	if (used != at)
		abort();
	if (!ok) {
		if (st != PROTO_NUM_EINVAL || !isnan(v))
			abort();
		return;
	}
	if (st != PROTO_NUM_OK && st != PROTO_NUM_ERANGE)
		abort();
	copy = malloc(used + 1);
	if (!copy)
		return;
	memcpy(copy, s, used);
	copy[used] = '\0';
	want = strtod(copy, NULL);
	if (bits(v) != bits(want))
		abort();
	if ((st == PROTO_NUM_ERANGE) !=
	    (isinf(want) || (want == 0 && nonzero_digit(copy, used))))
		abort();
	free(copy);
}

static void check_arrays(const char *s, size_t size, unsigned flags,
                         unsigned nspans)
{
	size_t cap = size / 2 + 1, n, end, cn, cend, ns, i, j;
	double *a = malloc(cap * sizeof *a), *b = malloc(cap * sizeof *b);
	proto_num_span spans[8];
	proto_num_err err;
	int st, cst;

	if (!a || !b)
		goto out;
	st = proto_num_array_parse(s, size, flags, a, cap, &n, &end, &err);
	cst = proto_num_array_count(s, size, &cn, &cend, &err);
	if (st != PROTO_NUM_OK) {
		/* an array of more than size/2 + 1 elements is impossible */
		if (st == PROTO_NUM_ESIZE || err.offset > size || !err.why)
			abort();
		goto out;
	}
	if (cst != PROTO_NUM_OK || cn != n || cend != end || end > size)
		abort();
	ns = proto_num_array_split(s, end, n, spans, nspans);
	for (i = 0, j = 0; j < ns; j++) {
		if (spans[j].first != i || spans[j].n == 0)
			abort();
		if (proto_num_array_parse_span(s, &spans[j], flags, b, &err) !=
		    PROTO_NUM_OK)
			abort();
		i += spans[j].n;
	}
	if (i != n)
		abort();
	for (i = 0; i < n; i++)
		if (bits(a[i]) != bits(b[i]) && !(isnan(a[i]) && isnan(b[i])))
			abort();
out:
	free(a);
	free(b);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	char *s = malloc(size ? size : 1);

	if (!s)
		return 0;
	memcpy(s, data, size);
	check_number(s, size);
	check_arrays(s, size, 0, 1 + (unsigned)(size % 8));
	check_arrays(s, size, PROTO_NUM_NULLS, 1 + (unsigned)(size % 5));
	free(s);
	return 0;
}
