/* JSON number input: correctly rounded decimal-to-double conversion of
 * strict JSON number text (Eisel-Lemire, Lemire 2021, with an exact
 * fallback), and a scanner that reads a JSON array of numbers straight
 * into a caller's double buffer, whole or in spans that threads can parse
 * side by side. Part of the rwnum library (linked by the protocol layer
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

/* Where and why an array scan failed. index is the 0-based element the
 * problem is in or after (for "unterminated array": the element count so
 * far), offset the byte offset from the start of the text passed (not of
 * a span), status a PROTO_NUM_E* code, why a static English phrase
 * ("expected ',' or ']'", "a string, not a number", ...). */
typedef struct proto_num_err {
	size_t index;
	size_t offset;
	int status;
	const char *why;
} proto_num_err;

/* Flags for the array functions. */
#define PROTO_NUM_NULLS 0x1u /* accept null elements and store NaN */

/* Counting pass over the JSON array starting at text[0] (leading JSON
 * whitespace allowed): *n receives the number of elements and *end the
 * offset just past the closing ']'. Only the structure is checked, at
 * several bytes per cycle: the brackets, strings, objects and nested
 * arrays (ETYPE), a missing ']' (EINVAL); the count is the number of
 * commas plus one. A malformed element, such as "[1,,2]" or "[1,x]", is
 * left for proto_num_array_parse to find and name, so the count of an
 * array that later fails to parse may be off; the count of one that
 * parses is exact.
 * errors: PROTO_NUM_EINVAL, PROTO_NUM_ETYPE; *err filled, *n and *end 0. */
int proto_num_array_count(const char *text, size_t len, size_t *n, size_t *end,
                          proto_num_err *err);

/* Parses the JSON array starting at text[0] (leading whitespace allowed),
 * every element a JSON number (or null with PROTO_NUM_NULLS, stored as
 * NaN; no number parses to NaN, so NaN marks exactly the nulls), into
 * out[0..*n), at most cap elements, in one pass with no allocation.
 * *end receives the offset just past ']'. Numbers are converted as by
 * proto_num_parse.
 * errors: PROTO_NUM_EINVAL (syntax, malformed number), PROTO_NUM_ERANGE
 *   (a number beyond the double range), PROTO_NUM_ETYPE (an element that
 *   is a string, object, array, true, false, or null without
 *   PROTO_NUM_NULLS), PROTO_NUM_ESIZE (more than cap elements; index =
 *   cap). *err names the element and the byte; out[0..err->index) hold
 *   the elements before it; *n and *end are 0. */
int proto_num_array_parse(const char *text, size_t len, unsigned flags,
                          double *out, size_t cap, size_t *n, size_t *end,
                          proto_num_err *err);

/* A run of consecutive elements of one array: its text is [begin, end)
 * (begin just after the '[' or a ',', end at the ',' or ']' that closes
 * the run), its first element has index first, and it holds n elements. */
typedef struct proto_num_span {
	size_t begin;
	size_t end;
	size_t first;
	size_t n;
} proto_num_span;

/* Cuts the array whose counting pass (proto_num_array_count) succeeded
 * with n elements ending at offset end into at most nspans spans of
 * about equal bytes, each cut at a comma, and fills spans[0..k) in order;
 * returns k (0 for an empty array, fewer than nspans when the array has
 * fewer elements). Their n add up to n. Reads the text once more,
 * counting commas 8 bytes at a time. For splitting a long array across
 * threads: each thread calls proto_num_array_parse_span on its span.
 * errors: none (returns 0 when nspans is 0). */
size_t proto_num_array_split(const char *text, size_t end, size_t n,
                             proto_num_span *spans, size_t nspans);

/* Parses the span's elements into out[span->first .. span->first +
 * span->n) (out is the buffer of the whole array; disjoint spans write
 * disjoint parts, so threads may share it). Same element rules, flags
 * and errors as proto_num_array_parse; err->index is the index in the
 * whole array and err->offset the offset in text, so a message can name
 * "element 17" whichever thread found it; PROTO_NUM_EINVAL also when the
 * span holds other than span->n elements.
 * errors: as proto_num_array_parse, except PROTO_NUM_ESIZE. */
int proto_num_array_parse_span(const char *text, const proto_num_span *span,
                               unsigned flags, double *out, proto_num_err *err);

/* A static description of a PROTO_NUM_* status; never NULL. */
const char *proto_num_strerror(int status);

#ifdef __cplusplus
}
#endif

#endif
