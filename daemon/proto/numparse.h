/* JSON number input: correctly rounded decimal-to-double conversion of
 * strict JSON number text (Eisel-Lemire, Lemire 2021, with an exact
 * fallback). Part of the rwnum library (linked by the protocol layer
 * and the client); it depends on nothing but the C library.
 *
 * Thread safety: every function is reentrant; there is no global state
 * and no allocation. The rare fallback calls strtod on a private copy
 * written without a decimal point ("[-]DIGITSeEXP"), so LC_NUMERIC does
 * not change any result; like every strtod call it must not run while
 * another thread calls setlocale (POSIX).
 *
 * Text is never assumed to be NUL terminated: every function reads only
 * the bytes [text, text + len). */
#ifndef RW_PROTO_NUMPARSE_H
#define RW_PROTO_NUMPARSE_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Statuses. */
enum {
	PROTO_NUM_OK = 0,
	PROTO_NUM_EINVAL = 1, /* malformed number or array syntax */
	PROTO_NUM_ERANGE = 2, /* a number beyond the double range */
	PROTO_NUM_ETYPE = 3,  /* an array element that is not a number */
	PROTO_NUM_ESIZE = 4   /* more elements than the buffer holds */
};

/* Parses one JSON number (RFC 8259 sec. 6: -? (0 | [1-9][0-9]*)
 * (.[0-9]+)? ([eE][+-]?[0-9]+)?) at the start of [s, s + len) into *v,
 * correctly rounded to nearest, ties to even: the same double as a
 * correctly rounding strtod (glibc's is), bit for bit, for every input.
 * *used receives the number of bytes consumed: the number ends at the
 * first byte that cannot continue it, which the caller checks (a ',' or
 * ']' in an array, the end of a line...).
 *
 * Method: digits are read 8 at a time; at most 19 significant digits
 * with an exponent within 10^±22 of an exact double use the exact
 * floating-point product (Clinger 1990); the rest use the Eisel-Lemire
 * 128-bit product (Lemire 2021, "Number parsing at a gigabyte per
 * second", Softw. Pract. Exper. 51(8), Algorithm 1), on the first 19
 * digits and on them plus one unit when there are more. When those two
 * disagree, or the product cannot decide (rare: one in many millions of
 * random long inputs), the number is converted by strtod on a private,
 * NUL-terminated, locale-independent copy: its significant digits, at
 * most 800 of them (a final '1' standing for any nonzero digit beyond,
 * which cannot change the rounding: a halfway point between doubles has
 * at most 767 significant digits), and a decimal exponent.
 *
 * errors: PROTO_NUM_EINVAL for text that is not a JSON number: empty, a
 *   leading '+', a leading zero followed by a digit ("012"), no digit
 *   after '-', '.' or the exponent mark (".5", "1.", "1e+"), hex, inf,
 *   nan. *v is NaN and *used is the offset of the offending byte.
 *   PROTO_NUM_ERANGE for a number whose magnitude rounds to infinity
 *   (*v = +-HUGE_VAL) or a nonzero number that rounds to zero (*v = +-0);
 *   *used is the length of the number. Subnormal results are not errors.
 *   -0 gives -0.0, as strtod does. */
int proto_num_parse(const char *s, size_t len, double *v, size_t *used);

/* A static description of a PROTO_NUM_* status; never NULL. */
const char *proto_num_strerror(int status);

#ifdef __cplusplus
}
#endif

#endif
