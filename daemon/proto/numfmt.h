/* JSON number output: a double as the shortest decimal that reads back to
 * the same double (Schubfach, Giulietti 2018), or correctly rounded to a
 * fixed number of significant digits. Part of the rwnum library, which the
 * protocol layer and the client both link; it depends on nothing but the C
 * library. Every function is reentrant and thread-safe: no global state,
 * no allocation, no locale (the output never depends on LC_NUMERIC). */
#ifndef RW_PROTO_NUMFMT_H
#define RW_PROTO_NUMFMT_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Bytes a buffer must have for any call below. The longest text is 24
 * characters ("-2.2250738585072014e-308") plus the NUL, but the digits
 * are stored 16 bytes at a time, so up to PROTO_NUM_FMT_MAX bytes from
 * buf may be written: a writer appending numbers to an output buffer
 * reserves this much per number, then advances by the returned length. */
#define PROTO_NUM_FMT_MAX 48

/* Writes v as JSON number text into buf (PROTO_NUM_FMT_MAX bytes), NUL
 * terminated, and returns its length without the NUL (1..24).
 *
 * The digits are the fewest significant digits that parse back (by any
 * correctly rounding reader, e.g. strtod) to exactly v; when several such
 * digit strings exist, the one closest to v, ties to even (Giulietti 2018,
 * "The Schubfach way to render doubles", sec. 8-10). Layout:
 * - a value printed as an integer of magnitude below 2^53 is written as
 *   an integer: 3000, -17, 9007199254740991 (never 3e3);
 * - otherwise the shorter of plain (0.001234, 123.5) and exponent
 *   notation (1.234e-7, 1e22; lower-case e, a '-' but never a '+' or
 *   leading zeros in the exponent), plain when both are equally long;
 * - -0 is written as 0 (JSON consumers rarely keep the sign of zero, and
 *   every rockwire quantity treats it as 0);
 * - NaN and the infinities are written as null (JSON has no text for
 *   them; callers that must tell null from a number check isfinite()).
 * errors: none. */
size_t proto_num_fmt(char *buf, double v);

/* As proto_num_fmt, but with the decimal value of v correctly rounded
 * (round half to even on the exact binary value, as glibc's printf does)
 * to `digits` significant digits, trailing zeros dropped: digits 3 gives
 * 0.123 for 0.12345, 1230000 for 1234567 and 1e-7 for 1.0004e-7. digits
 * outside 1..17 is clamped to that range (17 digits always read back to
 * the same double). Same layout rules, -0, NaN and infinity handling as
 * proto_num_fmt. Uses a 126-bit product; the rare value too close to a
 * rounding boundary for it to decide (about one in 10^4 for 17 digits,
 * far fewer for 6) is rounded by snprintf("%.*e") instead, which glibc
 * does exactly.
 * errors: none. */
size_t proto_num_fmt_digits(char *buf, double v, int digits);

#ifdef __cplusplus
}
#endif

#endif
