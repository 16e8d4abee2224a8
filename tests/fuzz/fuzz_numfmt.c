/* libFuzzer target for the number formatter (daemon/proto/numfmt.c):
 * the first 8 bytes are a double's bits, the next one a digit count. The
 * shortest text must be a JSON number that glibc's strtod and
 * proto_num_parse both read back to the same bits, with no decimal of
 * one digit fewer (printf's correctly rounded one) reading back too; the
 * fixed-digit text must have printf("%.*e")'s digits and exponent. Build
 * and run with tests/fuzz/run. */
#include <math.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/numfmt.h"
#include "proto/numparse.h"
#include "../unit/num_common.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	char buf[PROTO_NUM_FMT_MAX], r[64], d1[48], d2[48];
	double v, back;
	size_t len, used;
	int digits, x1, x2, n1, n2;

	if (size < 8)
		return 0;
	memcpy(&v, data, sizeof v);
	digits = size > 8 ? data[8] % 19 : 17; /* 0 and 18 test clamping */
	len = proto_num_fmt(buf, v);
	if (len != strlen(buf) || len > 24)
		abort();
	if (!isfinite(v)) {
		if (strcmp(buf, "null") != 0)
			abort();
		return 0;
	}
	back = strtod(buf, NULL);
	if (v == 0 ? strcmp(buf, "0") != 0 : num_bits(back) != num_bits(v))
		abort();
	if (proto_num_parse(buf, len, &back, &used) != PROTO_NUM_OK ||
	    used != len || (v != 0 && num_bits(back) != num_bits(v)))
		abort();
	n1 = num_digits_of(buf, d1, &x1);
	if (n1 > 1) {
		snprintf(r, sizeof r, "%.*e", n1 - 2, v);
		if (strtod(r, NULL) == v)
			abort(); /* one digit fewer would do */
	}
	proto_num_fmt_digits(buf, v, digits);
	if (digits < 1)
		digits = 1;
	if (digits > 17)
		digits = 17;
	snprintf(r, sizeof r, "%.*e", digits - 1, v);
	n1 = num_digits_of(r, d1, &x1);
	n2 = num_digits_of(buf, d2, &x2);
	if (n1 != n2 || (n1 && (x1 != x2 || strcmp(d1, d2) != 0)))
		abort();
	return 0;
}
