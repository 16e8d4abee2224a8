/* Tables of powers of ten shared by the number formatter (numfmt.c) and
 * the number parser (numparse.c); generated into numtab.c by
 * cmake/gen-numtab, which documents how each entry is defined. Internal to
 * the rwnum library. */
#ifndef RW_PROTO_NUMTAB_H
#define RW_PROTO_NUMTAB_H

#include <stdint.h>

/* Schubfach's g(k) for k in [PROTO__NUM_G_KMIN, PROTO__NUM_G_KMIN +
 * PROTO__NUM_G_COUNT - 1] = [-342, 308]: {high 63 bits, low 63 bits} of
 * the 126-bit g(k) = floor(10^-k 2^(125 - floor(log2 10^-k))) + 1
 * (Giulietti 2018, sec. 9). */
#define PROTO__NUM_G_KMIN  (-342)
#define PROTO__NUM_G_COUNT 651
extern const uint64_t proto__num_g[PROTO__NUM_G_COUNT][2];

/* Eisel-Lemire's 128-bit normalised 5^q for q in [-342, 308]: {high 64,
 * low 64} (Lemire 2021, sec. 5). */
#define PROTO__NUM_POW5_QMIN  (-342)
#define PROTO__NUM_POW5_COUNT 651
extern const uint64_t proto__num_pow5[PROTO__NUM_POW5_COUNT][2];

/* The 64 x 64 -> 128-bit product a b: returns the low half, stores the
 * high half in *hi. Uses the compiler's 128-bit integers where it has
 * them (gcc and clang on 64-bit targets), 32-bit partial products
 * otherwise. */
#if defined(__SIZEOF_INT128__)
__extension__ typedef unsigned __int128 proto__num_u128;
static inline uint64_t proto__num_mul128(uint64_t a, uint64_t b, uint64_t *hi)
{
	proto__num_u128 p = (proto__num_u128)a * b;
	*hi = (uint64_t)(p >> 64);
	return (uint64_t)p;
}
#else
static inline uint64_t proto__num_mul128(uint64_t a, uint64_t b, uint64_t *hi)
{
	uint64_t a0 = (uint32_t)a, a1 = a >> 32;
	uint64_t b0 = (uint32_t)b, b1 = b >> 32;
	uint64_t p00 = a0 * b0, p01 = a0 * b1, p10 = a1 * b0, p11 = a1 * b1;
	uint64_t mid = (p00 >> 32) + (uint32_t)p01 + (uint32_t)p10;
	*hi = p11 + (p01 >> 32) + (p10 >> 32) + (mid >> 32);
	return (mid << 32) | (uint32_t)p00;
}
#endif

/* Number of leading zero bits of x != 0. */
static inline int proto__num_clz64(uint64_t x)
{
#if defined(__GNUC__) || defined(__clang__)
	return __builtin_clzll(x);
#else
	int n = 0;
	while (!(x & 0x8000000000000000u)) {
		x <<= 1;
		n++;
	}
	return n;
#endif
}

#endif
