/* JSON number text to double, correctly rounded: strict RFC 8259 syntax,
 * digits read 8 at a time (SWAR), Clinger's exact fast path, the
 * Eisel-Lemire 128-bit product (Lemire 2021, Algorithm 1, in the form of
 * the fast_float library's compute_float), and strtod on a private
 * locale-independent copy for the few inputs those cannot decide. Plus
 * the numeric-array scanner: a counting pass, a one-pass parse into a
 * caller's buffer, and spans for parsing one array on several threads.
 * Tables: numtab.c (cmake/gen-numtab). */
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/numparse.h"
#include "proto/numtab.h"

#if defined(__SSE2__)
#include <emmintrin.h> /* every x86-64 has SSE2 */
#endif

#define NUM_ONES  UINT64_C(0x0101010101010101)
#define NUM_HIGHS UINT64_C(0x8080808080808080)
#define NUM_LOWS  UINT64_C(0x7f7f7f7f7f7f7f7f)

/* Most significant digits the fallback copy keeps (numparse.h). */
#define NUM_FALLBACK_DIGITS 800

static inline int is_digit(char c)
{
	return (unsigned char)(c - '0') < 10;
}

static inline int is_ws(char c)
{
	return c == ' ' || c == '\n' || c == '\r' || c == '\t';
}

/* The 8 bytes at p as a little-endian word (byte p[0] lowest). */
static inline uint64_t load8(const char *p)
{
	uint64_t v;

	memcpy(&v, p, sizeof v);
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_BIG_ENDIAN__
	v = __builtin_bswap64(v);
#endif
	return v;
}

/* The value of 8 digits given as byte values 0..9, first digit in the
 * lowest byte, by three multiplications (Lemire 2021, sec. 4). */
static inline uint32_t eight_digits(uint64_t v)
{
	const uint64_t mask = UINT64_C(0x000000FF000000FF);
	const uint64_t mul1 = UINT64_C(0x000F424000000064); /* 100, 10^6 */
	const uint64_t mul2 = UINT64_C(0x0000271000000001); /* 1, 10^4 */

	v = (v * 10) + (v >> 8);
	v = (((v & mask) * mul1) + (((v >> 16) & mask) * mul2)) >> 32;
	return (uint32_t)v;
}

static inline int ctz64(uint64_t v)
{
#if defined(__GNUC__) || defined(__clang__)
	return __builtin_ctzll(v);
#else
	int n = 0;
	while (!(v & 1)) {
		v >>= 1;
		n++;
	}
	return n;
#endif
}

/* High bit set in each byte of v that is zero, and only there. */
static inline uint64_t zero_bytes(uint64_t v)
{
	return ~(((v & NUM_LOWS) + NUM_LOWS) | v) & NUM_HIGHS;
}

/* The count of bytes of v with the high bit set, v holding no other bits
 * (as zero_bytes gives): the byte sum by one multiply. __builtin_popcount
 * is a library call on x86-64 without -mpopcnt. */
static inline size_t high_bytes(uint64_t v)
{
	return (size_t)(((v >> 7) * NUM_ONES) >> 56);
}

#if defined(__SSE2__)
/* Adds the 16 byte counters of acc (each at most 255). */
static inline size_t sum_lanes(__m128i acc)
{
	__m128i s = _mm_sad_epu8(acc, _mm_setzero_si128());
	return (size_t)_mm_cvtsi128_si32(s) +
	       (size_t)_mm_cvtsi128_si32(_mm_srli_si128(s, 8));
}
#endif

static const double num_exact_pow10[23] = {
    1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
    1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};

static const uint64_t num_int_pow10[16] = {1u,
                                           10u,
                                           100u,
                                           1000u,
                                           10000u,
                                           100000u,
                                           1000000u,
                                           10000000u,
                                           100000000u,
                                           1000000000u,
                                           10000000000u,
                                           100000000000u,
                                           1000000000000u,
                                           10000000000000u,
                                           100000000000000u,
                                           1000000000000000u};

/* Eisel-Lemire (Lemire 2021, Algorithm 1; fast_float's compute_float):
 * the bits of the double nearest w 10^q for 0 < w < 2^64, into *bits.
 * Returns 0, or -1 when the truncated product cannot decide (the caller
 * falls back). */
static int eisel_lemire(uint64_t w, int64_t q64, uint64_t *bits)
{
	uint64_t lo, hi, hi2, m;
	int q, lz, upper, power2;
	const uint64_t *t;

	if (q64 < -342) {
		*bits = 0;
		return 0;
	}
	if (q64 > 308) {
		*bits = UINT64_C(0x7ff0000000000000);
		return 0;
	}
	q = (int)q64;
	lz = proto__num_clz64(w);
	w <<= lz;
	t = proto__num_pow5[q - PROTO__NUM_POW5_QMIN];
	lo = proto__num_mul128(w, t[0], &hi);
	if ((hi & 0x1FF) == 0x1FF) {
		/* The 9 bits below the 55 kept are all ones: a carry from the
		 * low half of 5^q could reach them, so add it. */
		(void)proto__num_mul128(w, t[1], &hi2);
		lo += hi2;
		if (hi2 > lo)
			hi++;
	}
	if (lo == UINT64_MAX && (q < -27 || q > 55))
		return -1; /* 5^q is not exact in 128 bits: undecided */
	upper = (int)(hi >> 63);
	m = hi >> (upper + 9);
	/* power(q) = floor(q log2 10) + 63; minimum exponent -1023. */
	power2 = (int)((((int64_t)152170 + 65536) * q) >> 16) + 63 + upper -
	         lz + 1023;
	if (power2 <= 0) {
		/* Subnormal: shift to the fixed exponent, round half up (an
		 * exact halfway subnormal has hundreds of digits, so a tie
		 * cannot come from here). */
		if (-power2 + 1 >= 64) {
			*bits = 0;
			return 0;
		}
		m >>= -power2 + 1;
		m += m & 1;
		m >>= 1;
		/* Rounding up may give the smallest normal. */
		power2 = m < (UINT64_C(1) << 52) ? 0 : 1;
		*bits =
		    ((uint64_t)power2 << 52) | (m & ((UINT64_C(1) << 52) - 1));
		return 0;
	}
	if (lo <= 1 && q >= -4 && q <= 23 && (m & 3) == 1 &&
	    (m << (upper + 9)) == hi)
		m &= ~UINT64_C(1); /* exactly halfway: round to even */
	m += m & 1;
	m >>= 1;
	if (m >= (UINT64_C(2) << 52)) {
		m = UINT64_C(1) << 52;
		power2++;
	}
	m &= ~(UINT64_C(1) << 52);
	if (power2 >= 0x7ff) {
		*bits = UINT64_C(0x7ff0000000000000);
		return 0;
	}
	*bits = ((uint64_t)power2 << 52) | m;
	return 0;
}

/* The parsed shape of one number: digit runs and the explicit exponent. */
typedef struct num_text {
	const char *ib, *ie; /* integer digits */
	const char *fb, *fe; /* fraction digits (fb == fe: none) */
	int64_t exp10;       /* explicit exponent, saturated */
	int neg;
} num_text;

/* strtod on "[-]DIGITSeEXP": the significant digits (at most
 * NUM_FALLBACK_DIGITS, then a '1' if any dropped digit is nonzero) and
 * the matching exponent. No decimal point, so no locale can change it;
 * errno is left as it was. */
static double num_fallback(const num_text *t)
{
	char buf[NUM_FALLBACK_DIGITS + 40], *p = buf;
	const char *d;
	int64_t e = t->exp10;
	int nd = 0, sticky = 0, saved = errno;
	double v;

	if (t->neg)
		*p++ = '-';
	for (d = t->ib; d < t->ie; d++) {
		if (nd == 0 && *d == '0')
			continue;
		if (nd < NUM_FALLBACK_DIGITS) {
			*p++ = *d;
			nd++;
		} else {
			e++;
			sticky |= *d != '0';
		}
	}
	for (d = t->fb; d < t->fe; d++) {
		if (nd == 0 && *d == '0') {
			e--;
			continue;
		}
		if (nd < NUM_FALLBACK_DIGITS) {
			*p++ = *d;
			nd++;
			e--;
		} else {
			sticky |= *d != '0';
		}
	}
	if (nd == 0)
		return t->neg ? -0.0 : 0.0;
	if (sticky) {
		*p++ = '1';
		e--;
	}
	snprintf(p, sizeof buf - (size_t)(p - buf), "e%lld", (long long)e);
	v = strtod(buf, NULL);
	errno = saved;
	return v;
}

/* Reads digits into *w; returns the first byte that is not a digit. While
 * 8 bytes remain, one 8-byte load takes up to 8 digits: d = x - '0' in
 * every byte is the digit where the byte is one, and the high bit of d
 * or of d + 0x76 is set exactly where it is not, up to and including the
 * first non-digit (a borrow or carry only reaches the bytes after it); a
 * run of n < 8 digits is shifted to the top of the word, so that the bytes
 * below count as leading zeros. w wraps when there are more than 19
 * significant digits; the caller recounts then. */
static inline const char *read_digits(const char *p, const char *end,
                                      uint64_t *w)
{
	static const uint64_t pow10[8] = {1,     10,     100,     1000,
	                                  10000, 100000, 1000000, 10000000};
	uint64_t x, d, nd, acc = *w;
	int n;

	while (end - p >= 8) {
		x = load8(p);
		d = x - UINT64_C(0x3030303030303030);
		nd = (d | (d + UINT64_C(0x7676767676767676))) &
		     UINT64_C(0x8080808080808080);
		if (nd == 0) {
			acc = acc * 100000000u + eight_digits(d);
			p += 8;
			continue;
		}
		n = ctz64(nd) >> 3;
		if (n) {
			acc = acc * pow10[n] + eight_digits(d << (8 * (8 - n)));
			p += n;
		}
		*w = acc;
		return p;
	}
	while (p < end && is_digit(*p)) {
		acc = acc * 10 + (uint64_t)(*p - '0');
		p++;
	}
	*w = acc;
	return p;
}

/* Takes the first 19 significant digits of t into *w and returns the
 * power of ten that scales them to the value's magnitude; *exact says
 * whether every dropped digit is 0. */
static int64_t first19(const num_text *t, uint64_t *w, int *exact)
{
	const char *d = t->ib;
	int64_t q = t->exp10;
	uint64_t acc = 0;
	int taken = 0;

	*exact = 1;
	if (!(t->ie - t->ib == 1 && *t->ib == '0')) {
		for (; d < t->ie && taken < 19; d++, taken++)
			acc = acc * 10 + (uint64_t)(*d - '0');
		q += t->ie - d;
		for (; d < t->ie; d++)
			if (*d != '0')
				*exact = 0;
		d = t->fb;
		if (taken == 19) {
			for (; d < t->fe; d++)
				if (*d != '0')
					*exact = 0;
			*w = acc;
			return q;
		}
	} else {
		for (d = t->fb; d < t->fe && *d == '0'; d++)
			q--;
	}
	for (; d < t->fe && taken < 19; d++, taken++, q--)
		acc = acc * 10 + (uint64_t)(*d - '0');
	for (; d < t->fe; d++)
		if (*d != '0')
			*exact = 0;
	*w = acc;
	return q;
}

/* Parses one number at p (p < end); the body of proto_num_parse and of
 * the array scanner. Returns a status; *stop is the end of the number or,
 * for PROTO_NUM_EINVAL, the offending byte, with *why set. */
#if defined(__GNUC__) || defined(__clang__)
__attribute__((always_inline))
#endif
static inline int
scan_number(const char *p, const char *end, double *v, const char **stop,
            const char **why)
{
	num_text t;
	uint64_t w = 0, bits, b2;
	int64_t nfrac = 0, ndig, q;
	int many = 0, exact;

	t.neg = 0;
	t.exp10 = 0;
	if (p < end && *p == '-') {
		t.neg = 1;
		p++;
	}
	if (p == end || !is_digit(*p)) {
		*why = (p < end && *p == '+') ? "a leading '+' is not JSON"
		                              : "expected a digit";
		goto invalid;
	}
	t.ib = p;
	if (*p == '0') {
		p++;
		if (p < end && is_digit(*p)) {
			*why = "leading zeros are not JSON";
			goto invalid;
		}
	} else {
		p = read_digits(p, end, &w);
	}
	t.ie = p;
	t.fb = t.fe = p;
	if (p < end && *p == '.') {
		t.fb = ++p;
		p = read_digits(p, end, &w);
		t.fe = p;
		if (t.fe == t.fb) {
			*why = "expected a digit after '.'";
			goto invalid;
		}
		nfrac = t.fe - t.fb;
	}
	if (p < end && (*p == 'e' || *p == 'E')) {
		int eneg = 0;
		p++;
		if (p < end && (*p == '-' || *p == '+'))
			eneg = *p++ == '-';
		if (p == end || !is_digit(*p)) {
			*why = "expected a digit in the exponent";
			goto invalid;
		}
		for (; p < end && is_digit(*p); p++)
			if (t.exp10 < 100000000)
				t.exp10 = t.exp10 * 10 + (*p - '0');
		if (eneg)
			t.exp10 = -t.exp10;
	}
	*stop = p;
	q = t.exp10 - nfrac;
	ndig = (t.ie - t.ib) + nfrac;
	if (ndig > 19) {
		/* Leading zeros ("0.000123") are not significant. */
		const char *z;
		if (*t.ib == '0') {
			ndig--;
			for (z = t.fb; z < t.fe && *z == '0'; z++)
				ndig--;
		}
		if (ndig > 19) {
			q = first19(&t, &w, &exact);
			many = !exact;
		}
	}
	if (w == 0) {
		*v = t.neg ? -0.0 : 0.0;
		return PROTO_NUM_OK;
	}
	if (!many && w <= (UINT64_C(1) << 53)) {
#if FLT_EVAL_METHOD == 0
		/* Clinger 1990: w and 10^|q| <= 10^22 are exact doubles, so
		 * one correctly rounded operation is the answer. */
		if (q >= -22 && q <= 22) {
			double d = (double)w;
			d = q < 0 ? d / num_exact_pow10[-q]
			          : d * num_exact_pow10[q];
			*v = t.neg ? -d : d;
			return PROTO_NUM_OK;
		}
		if (q > 22 && q <= 22 + 15 &&
		    w <= (UINT64_C(1) << 53) / num_int_pow10[q - 22]) {
			double d = (double)(w * num_int_pow10[q - 22]) * 1e22;
			*v = t.neg ? -d : d;
			return PROTO_NUM_OK;
		}
#endif
	}
	if (eisel_lemire(w, q, &bits) != 0)
		goto fallback;
	if (many &&
	    (w == UINT64_MAX || eisel_lemire(w + 1, q, &b2) != 0 || b2 != bits))
		goto fallback;
	bits |= (uint64_t)t.neg << 63;
	memcpy(v, &bits, sizeof *v);
	goto range;
fallback:
	*v = num_fallback(&t);
range:
	if (isinf(*v)) {
		*why = "beyond the double range (overflow)";
		return PROTO_NUM_ERANGE;
	}
	if (*v == 0) {
		*why = "nonzero but below the double range (underflow)";
		return PROTO_NUM_ERANGE;
	}
	return PROTO_NUM_OK;
invalid:
	*stop = p;
	*v = NAN;
	return PROTO_NUM_EINVAL;
}

int proto_num_parse(const char *s, size_t len, double *v, size_t *used)
{
	const char *stop, *why = NULL;
	int st = scan_number(s, s + len, v, &stop, &why);

	*used = (size_t)(stop - s);
	return st;
}

/* ---- arrays ------------------------------------------------------------ */

static int arr_fail(proto_num_err *err, int status, size_t index, size_t offset,
                    const char *why)
{
	if (err) {
		err->status = status;
		err->index = index;
		err->offset = offset;
		err->why = why;
	}
	return status;
}

/* Classifies a non-number element starting at p for the error. */
static int bad_element(const char *p, const char *end, unsigned flags,
                       const char **why)
{
	size_t left = (size_t)(end - p);

	switch (*p) {
	case '"': *why = "a string, not a number"; return PROTO_NUM_ETYPE;
	case '{': *why = "an object, not a number"; return PROTO_NUM_ETYPE;
	case '[': *why = "an array, not a number"; return PROTO_NUM_ETYPE;
	case ']':
	case ',': *why = "expected a number"; return PROTO_NUM_EINVAL;
	case '+': *why = "a leading '+' is not JSON"; return PROTO_NUM_EINVAL;
	case '.': *why = "expected a digit before '.'"; return PROTO_NUM_EINVAL;
	default: break;
	}
	if ((left >= 4 && memcmp(p, "true", 4) == 0) ||
	    (left >= 5 && memcmp(p, "false", 5) == 0)) {
		*why = "true or false, not a number";
		return PROTO_NUM_ETYPE;
	}
	if (left >= 4 && memcmp(p, "null", 4) == 0 &&
	    !(flags & PROTO_NUM_NULLS)) {
		*why = "null is not allowed here";
		return PROTO_NUM_ETYPE;
	}
	*why = "expected a number";
	return PROTO_NUM_EINVAL;
}

/* Parses one element at p < end into *v; returns a status, *stop the byte
 * after it (or the offending byte) and *why on failure. */
static inline int scan_element(const char *p, const char *end, unsigned flags,
                               double *v, const char **stop, const char **why)
{
	if (*p == '-' || is_digit(*p))
		return scan_number(p, end, v, stop, why);
	if (*p == 'n' && (flags & PROTO_NUM_NULLS) && end - p >= 4 &&
	    memcmp(p, "null", 4) == 0) {
		*v = NAN;
		*stop = p + 4;
		return PROTO_NUM_OK;
	}
	*stop = p;
	return bad_element(p, end, flags, why);
}

/* Parses elements first.. from p (just after '[' or a ',') up to end,
 * storing out[i]. With want > 0, stops after exactly want elements and
 * requires the text to end there; otherwise reads to the ']' that closes
 * the array (at most cap elements). *count gets the elements read, *close
 * the position of the ']' or of the end of the span. */
static int scan_elements(const char *text, const char *p, const char *end,
                         unsigned flags, double *out, size_t first, size_t cap,
                         size_t want, size_t *count, const char **close,
                         proto_num_err *err)
{
	size_t i = first;
	const char *stop, *why = NULL;
	int st;

	for (;;) {
		while (p < end && is_ws(*p))
			p++;
		if (p == end) {
			return arr_fail(err, PROTO_NUM_EINVAL, i,
			                (size_t)(p - text),
			                "unterminated array");
		}
		if (!want && i >= cap)
			return arr_fail(err, PROTO_NUM_ESIZE, cap,
			                (size_t)(p - text),
			                "more elements than the buffer holds");
		st = scan_element(p, end, flags, &out[i], &stop, &why);
		if (st != PROTO_NUM_OK)
			return arr_fail(
			    err, st, i,
			    (size_t)((st == PROTO_NUM_ERANGE ? p : stop) -
			             text),
			    why);
		p = stop;
		i++;
		while (p < end && is_ws(*p))
			p++;
		if (want && i - first == want) {
			if (p != end)
				return arr_fail(err, PROTO_NUM_EINVAL, i - 1,
				                (size_t)(p - text),
				                "expected ',' or ']'");
			break;
		}
		if (p == end)
			return arr_fail(
			    err, PROTO_NUM_EINVAL, i - 1, (size_t)(p - text),
			    want ? "fewer elements than the span says"
			         : "unterminated array");
		if (*p == ',') {
			p++;
			continue;
		}
		if (*p == ']' && !want)
			break;
		return arr_fail(err, PROTO_NUM_EINVAL, i - 1,
		                (size_t)(p - text), "expected ',' or ']'");
	}
	*count = i - first;
	*close = p;
	return PROTO_NUM_OK;
}

/* Skips leading whitespace and the '['; returns the byte after it, or
 * NULL (with *err) when the text does not start an array. */
static const char *array_open(const char *text, const char *end,
                              proto_num_err *err)
{
	const char *p = text;

	while (p < end && is_ws(*p))
		p++;
	if (p == end || *p != '[') {
		arr_fail(err, PROTO_NUM_ETYPE, 0, (size_t)(p - text),
		         "expected '[' (an array)");
		return NULL;
	}
	return p + 1;
}

int proto_num_array_parse(const char *text, size_t len, unsigned flags,
                          double *out, size_t cap, size_t *n, size_t *end,
                          proto_num_err *err)
{
	const char *e = text + len, *p, *close;
	size_t count = 0;
	int st;

	*n = 0;
	*end = 0;
	p = array_open(text, e, err);
	if (!p)
		return PROTO_NUM_ETYPE;
	while (p < e && is_ws(*p))
		p++;
	if (p < e && *p == ']') {
		*end = (size_t)(p + 1 - text);
		return PROTO_NUM_OK;
	}
	st = scan_elements(text, p, e, flags, out, 0, cap, 0, &count, &close,
	                   err);
	if (st != PROTO_NUM_OK)
		return st;
	*n = count;
	*end = (size_t)(close + 1 - text);
	return PROTO_NUM_OK;
}

int proto_num_array_parse_span(const char *text, const proto_num_span *span,
                               unsigned flags, double *out, proto_num_err *err)
{
	size_t count;
	const char *close;

	if (span->n == 0)
		return arr_fail(err, PROTO_NUM_EINVAL, span->first, span->begin,
		                "empty span");
	return scan_elements(text, text + span->begin, text + span->end, flags,
	                     out, span->first, 0, span->n, &count, &close, err);
}

/* Counts commas in [p, end), 16 bytes at a time with SSE2, else 8. */
static size_t count_commas(const char *p, const char *end)
{
	size_t n = 0;

#if defined(__SSE2__)
	const __m128i comma = _mm_set1_epi8(',');
	__m128i acc = _mm_setzero_si128();
	int runs = 0;
	/* per-lane counters (a match is -1), summed before they wrap */
	while (end - p >= 16) {
		__m128i x = _mm_loadu_si128((const __m128i *)(const void *)p);
		acc = _mm_sub_epi8(acc, _mm_cmpeq_epi8(x, comma));
		p += 16;
		if (++runs == 255) {
			n += sum_lanes(acc);
			acc = _mm_setzero_si128();
			runs = 0;
		}
	}
	n += sum_lanes(acc);
#endif
	while (end - p >= 8) {
		n += high_bytes(zero_bytes(load8(p) ^ (NUM_ONES * ',')));
		p += 8;
	}
	for (; p < end; p++)
		n += *p == ',';
	return n;
}

int proto_num_array_count(const char *text, size_t len, size_t *n, size_t *end,
                          proto_num_err *err)
{
	const char *e = text + len, *body, *p, *q;
	size_t commas = 0;

	*n = 0;
	*end = 0;
	body = p = array_open(text, e, err);
	if (!p)
		return PROTO_NUM_ETYPE;
		/* 16 (SSE2) or 8 bytes at a time until a byte that ends or
		 * breaks the scan. */
#if defined(__SSE2__)
	{
		const __m128i close = _mm_set1_epi8(']');
		const __m128i quote = _mm_set1_epi8('"');
		const __m128i open = _mm_set1_epi8('[');
		const __m128i brace = _mm_set1_epi8('{');
		const __m128i comma = _mm_set1_epi8(',');
		__m128i acc = _mm_setzero_si128();
		int runs = 0;
		while (e - p >= 16) {
			__m128i x =
			    _mm_loadu_si128((const __m128i *)(const void *)p);
			__m128i stop = _mm_or_si128(
			    _mm_or_si128(_mm_cmpeq_epi8(x, close),
			                 _mm_cmpeq_epi8(x, quote)),
			    _mm_or_si128(_mm_cmpeq_epi8(x, open),
			                 _mm_cmpeq_epi8(x, brace)));
			if (_mm_movemask_epi8(stop))
				break;
			acc = _mm_sub_epi8(acc, _mm_cmpeq_epi8(x, comma));
			p += 16;
			if (++runs == 255) {
				commas += sum_lanes(acc);
				acc = _mm_setzero_si128();
				runs = 0;
			}
		}
		commas += sum_lanes(acc);
	}
#endif
	while (e - p >= 8) {
		uint64_t x = load8(p);
		if (zero_bytes(x ^ (NUM_ONES * ']')) |
		    zero_bytes(x ^ (NUM_ONES * '"')) |
		    zero_bytes(x ^ (NUM_ONES * '[')) |
		    zero_bytes(x ^ (NUM_ONES * '{')))
			break;
		commas += high_bytes(zero_bytes(x ^ (NUM_ONES * ',')));
		p += 8;
	}
	for (; p < e; p++) {
		switch (*p) {
		case ',': commas++; break;
		case ']':
			if (commas == 0) {
				for (q = body; q < p && is_ws(*q); q++)
					;
				*n = q < p ? 1 : 0;
			} else {
				*n = commas + 1;
			}
			*end = (size_t)(p + 1 - text);
			return PROTO_NUM_OK;
		case '"':
			return arr_fail(err, PROTO_NUM_ETYPE, commas,
			                (size_t)(p - text),
			                "a string, not a number");
		case '[':
			return arr_fail(err, PROTO_NUM_ETYPE, commas,
			                (size_t)(p - text),
			                "an array, not a number");
		case '{':
			return arr_fail(err, PROTO_NUM_ETYPE, commas,
			                (size_t)(p - text),
			                "an object, not a number");
		default: break;
		}
	}
	return arr_fail(err, PROTO_NUM_EINVAL, commas, (size_t)(p - text),
	                "unterminated array");
}

size_t proto_num_array_split(const char *text, size_t end, size_t n,
                             proto_num_span *spans, size_t nspans)
{
	const char *body = text, *close, *cur, *cut, *lim = text + end;
	size_t k, i, used = 0, first = 0, bytes, cnt;

	if (nspans == 0 || n == 0 || end == 0)
		return 0;
	while (body < lim && *body != '[')
		body++;
	body++;
	close = lim - 1; /* the ']' */
	k = nspans < n ? nspans : n;
	bytes = (size_t)(close - body);
	cur = body;
	for (i = 1; i <= k; i++) {
		if (i == k) {
			cut = close;
		} else {
			const char *target = body + bytes / k * i;
			if (target < cur)
				target = cur;
			cut = memchr(target, ',', (size_t)(close - target));
			if (!cut)
				cut = close;
		}
		cnt = count_commas(cur, cut) + 1;
		if (first + cnt > n) /* the caller's n was not this array's */
			cnt = n - first;
		spans[used].begin = (size_t)(cur - text);
		spans[used].end = (size_t)(cut - text);
		spans[used].first = first;
		spans[used].n = cnt;
		used++;
		first += cnt;
		if (cut == close || first == n)
			break;
		cur = cut + 1;
	}
	return used;
}

const char *proto_num_strerror(int status)
{
	switch (status) {
	case PROTO_NUM_OK: return "ok";
	case PROTO_NUM_EINVAL: return "malformed number or array";
	case PROTO_NUM_ERANGE: return "number beyond the double range";
	case PROTO_NUM_ETYPE: return "not a number";
	case PROTO_NUM_ESIZE: return "more elements than the buffer holds";
	default: return "unknown status";
	}
}
