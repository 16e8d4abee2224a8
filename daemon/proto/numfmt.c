/* Double to JSON text: the shortest round-trip digits by Schubfach
 * (Giulietti 2018, "The Schubfach way to render doubles", rev. 2021), and
 * correctly rounded fixed significant digits by one 126-bit product with
 * an exact snprintf fallback for the undecidable few. The digit search
 * follows the paper's algorithm and its Java reference implementation
 * (DoubleToDecimal, in the JDK since about JDK 19: from memory), with one
 * change for the smallest subnormals (see schubfach()); the paper's names
 * (c, q, k, h, g, vb, vbl, vbr, s, t) are kept so the two can be read
 * side by side. Tables: numtab.c (cmake/gen-numtab). */
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "proto/numfmt.h"
#include "proto/numtab.h"

/* Binary64 constants (Giulietti 2018, sec. 2): precision P, the smallest
 * exponent Q_MIN of c 2^q and the smallest normal significand C_MIN. */
#define NUM_P      53
#define NUM_Q_MIN  (-1074)
#define NUM_C_MIN  (UINT64_C(1) << 52)
#define NUM_MASK63 ((UINT64_C(1) << 63) - 1)

/* The digit search and the layout are inlined into their callers: a call
 * and its register spills are a tenth of the work here. */
#if defined(__GNUC__) || defined(__clang__)
#define NUM_INLINE static inline __attribute__((always_inline))
#else
#define NUM_INLINE static inline
#endif

static const char num_dig2[200] = {
    '0', '0', '0', '1', '0', '2', '0', '3', '0', '4', '0', '5', '0', '6', '0',
    '7', '0', '8', '0', '9', '1', '0', '1', '1', '1', '2', '1', '3', '1', '4',
    '1', '5', '1', '6', '1', '7', '1', '8', '1', '9', '2', '0', '2', '1', '2',
    '2', '2', '3', '2', '4', '2', '5', '2', '6', '2', '7', '2', '8', '2', '9',
    '3', '0', '3', '1', '3', '2', '3', '3', '3', '4', '3', '5', '3', '6', '3',
    '7', '3', '8', '3', '9', '4', '0', '4', '1', '4', '2', '4', '3', '4', '4',
    '4', '5', '4', '6', '4', '7', '4', '8', '4', '9', '5', '0', '5', '1', '5',
    '2', '5', '3', '5', '4', '5', '5', '5', '6', '5', '7', '5', '8', '5', '9',
    '6', '0', '6', '1', '6', '2', '6', '3', '6', '4', '6', '5', '6', '6', '6',
    '7', '6', '8', '6', '9', '7', '0', '7', '1', '7', '2', '7', '3', '7', '4',
    '7', '5', '7', '6', '7', '7', '7', '8', '7', '9', '8', '0', '8', '1', '8',
    '2', '8', '3', '8', '4', '8', '5', '8', '6', '8', '7', '8', '8', '8', '9',
    '9', '0', '9', '1', '9', '2', '9', '3', '9', '4', '9', '5', '9', '6', '9',
    '7', '9', '8', '9', '9'};

static const uint64_t num_pow10[20] = {1u,
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
                                       1000000000000000u,
                                       10000000000000000u,
                                       100000000000000000u,
                                       1000000000000000000u,
                                       10000000000000000000u};

/* floor(e log10 2), floor(e log10 2 - log10 (4/3)) and floor(e log2 10)
 * by fixed-point multiplication (Giulietti 2018, sec. 6; exact for |e| up
 * to 5456721, 5456721 and 1838394; cmake/gen-numtab checks the last on
 * every table entry). Right shifts of negative values are arithmetic on
 * every compiler rockwire builds with (gcc and clang document it). */
static inline int flog10pow2(int e)
{
	return (int)(((int64_t)e * INT64_C(661971961083)) >> 41);
}

static inline int flog10threequarterspow2(int e)
{
	return (
	    int)(((int64_t)e * INT64_C(661971961083) - INT64_C(274743187321)) >>
	         41);
}

static inline int flog2pow10(int e)
{
	return (int)(((int64_t)e * INT64_C(913124641741)) >> 38);
}

/* Round to odd of the top bits of g cp, g = g1 2^63 + g0 (Giulietti 2018,
 * sec. 9, function rop): the 126-bit g times cp, shifted right by 127,
 * with the sticky bit ORed into the lowest bit. */
static inline uint64_t rop(uint64_t g1, uint64_t g0, uint64_t cp)
{
	uint64_t x1, y1, y0, z, vbp;

	(void)proto__num_mul128(g0, cp, &x1);
	y0 = proto__num_mul128(g1, cp, &y1);
	z = (y0 >> 1) + x1;
	vbp = y1 + (z >> 63);
	return vbp | (((z & NUM_MASK63) + NUM_MASK63) >> 63);
}

/* Schubfach's digit search (Giulietti 2018, sec. 10, toDecimal): for the
 * double c 2^q (0 < c < 2^53) finds the decimal f 10^e with the fewest
 * digits inside the rounding interval, closest to c 2^q, ties to even f. */
NUM_INLINE void schubfach(int q, uint64_t c, uint64_t *f_out, int *e_out)
{
	uint64_t out = c & 1, cb = c << 2, cbr = cb + 2, cbl;
	uint64_t g1, g0, vb, vbl, vbr, s, t;
	int k, h, uin, win;
	int64_t cmp;

	if (c != NUM_C_MIN || q == NUM_Q_MIN) {
		cbl = cb - 2;
		k = flog10pow2(q);
	} else {
		/* At a power of two the lower neighbour is half as far. */
		cbl = cb - 1;
		k = flog10threequarterspow2(q);
	}
	h = q + flog2pow10(-k) + 2;
	g1 = proto__num_g[k - PROTO__NUM_G_KMIN][0];
	g0 = proto__num_g[k - PROTO__NUM_G_KMIN][1];
	vb = rop(g1, g0, cb << h);
	vbl = rop(g1, g0, cbl << h);
	vbr = rop(g1, g0, cbr << h);
	s = vb >> 2;
	if (s >= 10) {
		/* One digit fewer: s' 10 and (s' + 1) 10 (sec. 10). The paper
		 * and the JDK try them only for s >= 100, as Java prints at
		 * least two digits; a subnormal below 10^-321 has s < 100 and
		 * may need just one (5e-323, not 4.9e-323). The interval is
		 * narrower than 10 units of 10^k, so it holds at most one of
		 * them, and for s >= 10 either is shorter than s and t. */
		uint64_t sp10 = 10 * (s / 10), tp10 = sp10 + 10;
		int upin = vbl + out <= sp10 << 2;
		int wpin = (tp10 << 2) + out <= vbr;
		if (upin != wpin) {
			*f_out = upin ? sp10 : tp10;
			*e_out = k;
			return;
		}
	}
	t = s + 1;
	uin = vbl + out <= s << 2;
	win = (t << 2) + out <= vbr;
	if (uin != win) {
		*f_out = uin ? s : t;
		*e_out = k;
		return;
	}
	cmp = (int64_t)(vb - ((s + t) << 1));
	*f_out = (cmp < 0 || (cmp == 0 && (s & 1) == 0)) ? s : t;
	*e_out = k;
}

/* Writes the 8 decimal digits of r < 10^8 at p, all lanes at once: two
 * 4-digit halves in 32-bit lanes, split into 2-digit pairs in 16-bit
 * lanes and then into digits in bytes, by multiplications with
 * reciprocals exact over those ranges (x / 100 = (x 5243) >> 19 for x <
 * 10^4, y / 10 = (y 103) >> 10 for y < 100). */
static inline void put8(char *p, uint32_t r)
{
	uint64_t x = (r / 10000) | ((uint64_t)(r % 10000) << 32);
	uint64_t y = ((x * 5243) >> 19) & UINT64_C(0x0000007F0000007F);
	uint64_t z = y | ((x - y * 100) << 16);
	uint64_t u = ((z * 103) >> 10) & UINT64_C(0x000F000F000F000F);
	uint64_t v = u | ((z - u * 10) << 8);

	v += UINT64_C(0x3030303030303030);
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_BIG_ENDIAN__
	v = __builtin_bswap64(v);
#endif
	memcpy(p, &v, 8);
}

/* Writes the 17 decimal digits of f < 10^17, leading zeros included, at
 * p: one 64-bit division by 10^8 splits f into chunks that are then
 * converted side by side. */
static inline void put17(char *p, uint64_t f)
{
	uint64_t hi = f / 100000000u;
	uint32_t lo = (uint32_t)(f - hi * 100000000u);
	uint32_t top = (uint32_t)(hi / 100000000u);
	uint32_t mid = (uint32_t)(hi - (uint64_t)top * 100000000u);

	p[0] = (char)('0' + top);
	put8(p + 1, mid);
	put8(p + 9, lo);
}

/* Number of decimal digits of 0 < f < 10^17. */
static inline int ndigits(uint64_t f)
{
	int n = ((64 - proto__num_clz64(f)) * 1233) >> 12;

	return n + (f >= num_pow10[n]);
}

static inline int ndigits_exp(int x)
{
	return x < 10 ? 1 : x < 100 ? 2 : 3;
}

/* Number of '0's that end the 17 digits at t (not all zeros), 8 at a time:
 * the last '0'-free byte of a word is found by counting leading zero
 * bytes of word ^ "00000000" (the last digit is the word's top byte). */
static inline int trailing_zeros17(const char *t)
{
	const uint64_t zeros = UINT64_C(0x3030303030303030);
	uint64_t w;

	memcpy(&w, t + 9, 8);
	w ^= zeros;
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_BIG_ENDIAN__
	w = __builtin_bswap64(w);
#endif
	if (w)
		return proto__num_clz64(w) >> 3;
	memcpy(&w, t + 1, 8);
	w ^= zeros;
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_BIG_ENDIAN__
	w = __builtin_bswap64(w);
#endif
	if (w)
		return 8 + (proto__num_clz64(w) >> 3);
	return 16;
}

/* Whether the 16-digit integer d[0..n) 10^e (n + e = 16) is below 2^53. */
static int below_2p53(const char *d, int n, int e)
{
	uint64_t v = 0;
	int i;

	for (i = 0; i < n; i++)
		v = v * 10 + (uint64_t)(d[i] - '0');
	return v * num_pow10[e] < (UINT64_C(1) << 53);
}

/* Lays out (-1)^neg f 10^e, 0 < f <= 10^17, as JSON number text (the
 * rules in numfmt.h) and returns its length. The digits are copied 16
 * bytes at a time whatever their count (one vector load and store), so
 * bytes past the text up to PROTO_NUM_FMT_MAX may be overwritten. */
NUM_INLINE size_t layout(char *buf, int neg, uint64_t f, int e)
{
	char tmp[48], *d, *p = buf;
	int n, x, plain_len, exp_len, ax, z;

	if (f >= num_pow10[17]) { /* only 10^17 itself: t = s + 1 */
		f /= 10;
		e++;
	}
	put17(tmp, f);
	n = ndigits(f);
	d = tmp + 17 - n;
	z = trailing_zeros17(tmp);
	n -= z;
	e += z;
	x = e + n - 1; /* the exponent in d.ddd 10^x */
	if (neg)
		*p++ = '-';
	if (e >= 0 && (x < 15 || (x == 15 && below_2p53(d, n, e)))) {
		/* An integer below 2^53: all its digits, never an exponent. */
		memcpy(p, d, 16);
		if (e > 0)
			memset(p + n, '0', 16);
		p += n + e;
		*p = '\0';
		return (size_t)(p - buf);
	}
	if (e >= 0)
		plain_len = n + e;
	else if (x >= 0)
		plain_len = n + 1;
	else
		plain_len = n + 1 - x;
	ax = x < 0 ? -x : x;
	exp_len = n + (n > 1) + 1 + (x < 0) + ndigits_exp(ax);
	if (plain_len <= exp_len) {
		if (e >= 0) {
			/* n + e <= 21 here: the exponent form is >= n + 3 */
			memcpy(p, d, 16);
			memcpy(p + 16, d + 16, 1);
			memset(p + n, '0', (size_t)e);
			p += n + e;
		} else if (x >= 0) {
			memcpy(p, d, 16);
			p[x + 1] = '.';
			memcpy(p + x + 2, d + x + 1, 16);
			p += n + 1;
		} else {
			/* at most 3 zeros after the point: 0.00123 ties 1.23e-3
			 */
			memcpy(p, "0.000", 5);
			memcpy(p + 1 - x, d, 16);
			memcpy(p + 17 - x, d + 16, 1);
			p += n + 1 - x;
		}
	} else {
		p[0] = d[0];
		p[1] = '.';
		memcpy(p + 2, d + 1, 16);
		p += n > 1 ? n + 1 : 1;
		*p++ = 'e';
		if (x < 0)
			*p++ = '-';
		if (ax >= 100) {
			*p++ = (char)('0' + ax / 100);
			ax %= 100;
			memcpy(p, num_dig2 + 2 * ax, 2);
			p += 2;
		} else if (ax >= 10) {
			memcpy(p, num_dig2 + 2 * ax, 2);
			p += 2;
		} else {
			*p++ = (char)('0' + ax);
		}
	}
	*p = '\0';
	return (size_t)(p - buf);
}

static size_t put_null(char *buf)
{
	memcpy(buf, "null", 5);
	return 4;
}

static size_t put_zero(char *buf)
{
	buf[0] = '0';
	buf[1] = '\0';
	return 1;
}

size_t proto_num_fmt(char *buf, double v)
{
	uint64_t bits, t, c, f;
	int neg, bq, mq, e;

	memcpy(&bits, &v, sizeof bits);
	neg = (int)(bits >> 63);
	t = bits & (NUM_C_MIN - 1);
	bq = (int)(bits >> 52) & 0x7ff;
	if (bq == 0x7ff)
		return put_null(buf);
	if (bq != 0) {
		mq = -NUM_Q_MIN + 1 - bq;
		c = NUM_C_MIN | t;
		if (0 < mq && mq < NUM_P) {
			/* Integers below 2^53 need no search. */
			f = c >> mq;
			if (f << mq == c)
				return layout(buf, neg, f, 0);
		}
		schubfach(-mq, c, &f, &e);
	} else if (t != 0) {
		/* The paper scales c < C_TINY = 3 by 10 (its dk = -1) because
		 * Java's toString wants two digits: 4.9e-324 where 5e-324 is
		 * the shortest. Here the two tiniest subnormals take the plain
		 * search, which gives 5e-324 and 1e-323 (test_numfmt.c). */
		schubfach(NUM_Q_MIN, t, &f, &e);
	} else {
		return put_zero(buf);
	}
	return layout(buf, neg, f, e);
}

/* Low 64 bits of the 192-bit (p2 p1 p0) shifted right by s, 0 < s < 128. */
static inline uint64_t shr192(uint64_t p2, uint64_t p1, uint64_t p0, int s)
{
	if (s < 64)
		return (p0 >> s) | (p1 << (64 - s));
	if (s == 64)
		return p1;
	return (p1 >> (s - 64)) | (p2 << (128 - s));
}

/* The rare case the product cannot decide: glibc's printf rounds the
 * exact binary value. The digits are read back from its text skipping any
 * non-digit, so a locale's decimal separator does not matter. */
static size_t digits_fallback(char *buf, int neg, double av, int digits)
{
	char tmp[64];
	const char *p;
	uint64_t f = 0;
	int e = 0, esign = 1;

	snprintf(tmp, sizeof tmp, "%.*e", digits - 1, av);
	for (p = tmp; *p && *p != 'e'; p++)
		if (*p >= '0' && *p <= '9')
			f = f * 10 + (uint64_t)(*p - '0');
	if (*p == 'e') {
		p++;
		if (*p == '-' || *p == '+')
			esign = *p++ == '-' ? -1 : 1;
		for (; *p >= '0' && *p <= '9'; p++)
			e = e * 10 + (*p - '0');
	}
	return layout(buf, neg, f, esign * e - (digits - 1));
}

size_t proto_num_fmt_digits(char *buf, double v, int digits)
{
	uint64_t bits, t, c, g1, g0, ghi, glo, a1, a0, b1, b0, p0, p1, p2;
	uint64_t y, frac, err;
	int neg, bq, q, bl, k, sh, s, pass;

	if (digits < 1)
		digits = 1;
	if (digits > 17)
		digits = 17;
	memcpy(&bits, &v, sizeof bits);
	neg = (int)(bits >> 63);
	t = bits & (NUM_C_MIN - 1);
	bq = (int)(bits >> 52) & 0x7ff;
	if (bq == 0x7ff)
		return put_null(buf);
	if (bq != 0) {
		c = NUM_C_MIN | t;
		q = bq - 1075;
	} else if (t != 0) {
		c = t;
		q = NUM_Q_MIN;
	} else {
		return put_zero(buf);
	}
	/* v = c 2^q lies in [2^(q+bl-1), 2^(q+bl)), so floor(log10 v) is
	 * flog10pow2(q + bl - 1) or one more: scale by 10^-k so that y = v
	 * 10^-k has `digits` digits before the point, or one more. */
	bl = 64 - proto__num_clz64(c);
	k = flog10pow2(q + bl - 1) - digits + 1;
	for (pass = 0;; pass++) {
		/* P = c g(k) (179 bits at most) is 10^-k v 2^sh, over by less
		 * than c in its last place since g(k) is at most 1 over. */
		g1 = proto__num_g[k - PROTO__NUM_G_KMIN][0];
		g0 = proto__num_g[k - PROTO__NUM_G_KMIN][1];
		ghi = g1 >> 1;
		glo = (g1 << 63) | g0;
		a0 = proto__num_mul128(c, glo, &a1);
		b0 = proto__num_mul128(c, ghi, &b1);
		p0 = a0;
		p1 = a1 + b0;
		p2 = b1 + (p1 < a1);
		sh = 125 - q - flog2pow10(-k);
		/* y < 10^18 < 2^60 and P >= 2^(bl+124) give 66 <= sh <= 178. */
		s = sh - 64;
		y = s < 64 ? (p1 >> s) | (p2 << (64 - s)) : p2 >> (s - 64);
		if (y >= num_pow10[digits] && pass == 0) {
			k++;
			continue;
		}
		break;
	}
	/* The 64 bits after the point, and the error bound in their units. */
	frac = shr192(p2, p1, p0, s);
	err = (s < 64 ? c >> s : 0) + 1;
	if (frac >= UINT64_C(0x8000000000000000)) {
		if (frac - UINT64_C(0x8000000000000000) < err) {
			double av = v < 0 ? -v : v;
			return digits_fallback(buf, neg, av, digits);
		}
		y++;
	}
	return layout(buf, neg, y, k);
}
