/* Helpers shared by test_numfmt.c and test_numparse.c: a seeded random
 * generator, the number of random cases, and a reader that reduces any
 * decimal text (ours or printf's) to its significant digits and exponent,
 * so that two texts of one number can be compared whatever their layout. */
#ifndef RW_TEST_NUM_COMMON_H
#define RW_TEST_NUM_COMMON_H

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* Random cases per randomised test: 10^7 in a plain build (about 10 s
 * per test file at -O2 on one core), 10^6 under AddressSanitizer and
 * UBSan, where every access is checked and the same run would take
 * minutes. RW_NUM_ITERS=N in the environment overrides both (e.g. 10^9
 * for a long soak). The switch is at compile time: gcc defines
 * __SANITIZE_ADDRESS__, clang answers __has_feature. */
#if defined(__SANITIZE_ADDRESS__)
#define NUM_SANITIZED 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define NUM_SANITIZED 1
#endif
#endif
#ifdef NUM_SANITIZED
#define NUM_ITERS_DEFAULT 1000000L
#else
#define NUM_ITERS_DEFAULT 10000000L
#endif

static inline long num_iters(void)
{
	const char *s = getenv("RW_NUM_ITERS");
	long n = s ? strtol(s, NULL, 10) : 0;

	return n > 0 ? n : NUM_ITERS_DEFAULT;
}

/* splitmix64 (Steele, Lea & Flood 2014): fixed seeds, so a failure is
 * reproducible; RW_NUM_SEED changes the seed. */
static inline uint64_t num_rand(uint64_t *s)
{
	uint64_t z = (*s += UINT64_C(0x9E3779B97F4A7C15));

	z = (z ^ (z >> 30)) * UINT64_C(0xBF58476D1CE4E5B9);
	z = (z ^ (z >> 27)) * UINT64_C(0x94D049BB133111EB);
	return z ^ (z >> 31);
}

static inline uint64_t num_seed(uint64_t dflt)
{
	const char *s = getenv("RW_NUM_SEED");

	return s ? strtoull(s, NULL, 10) : dflt;
}

/* A double with uniformly random bits among the finite ones. */
static inline double num_rand_finite(uint64_t *s)
{
	uint64_t u;
	double v;

	do
		u = num_rand(s);
	while (((u >> 52) & 0x7ff) == 0x7ff);
	memcpy(&v, &u, sizeof v);
	return v;
}

static inline uint64_t num_bits(double v)
{
	uint64_t u;

	memcpy(&u, &v, sizeof u);
	return u;
}

/* Reduces decimal text ("-1.2300e+05", "0.00123", "123000") to its
 * significant digits without leading or trailing zeros (dig, NUL
 * terminated, at most 40) and the exponent x of d.ddd 10^x; returns the
 * digit count, 0 for zero. Any non-digit before the exponent mark is
 * skipped, so a locale's decimal separator does not matter. */
static inline int num_digits_of(const char *t, char *dig, int *x)
{
	int n = 0, point = -1, pos = 0, lead = 0, e = 0, eneg = 0;
	const char *p = t;

	for (; *p && *p != 'e' && *p != 'E'; p++) {
		if (*p >= '0' && *p <= '9') {
			if (n == 0 && *p == '0') {
				lead++;
			} else if (n < 40) {
				dig[n++] = *p;
			}
			pos++;
		} else if (*p != '-') {
			point = pos; /* digits before the separator */
		}
	}
	if (*p) {
		p++;
		if (*p == '-' || *p == '+')
			eneg = *p++ == '-';
		for (; *p >= '0' && *p <= '9'; p++)
			e = e * 10 + (*p - '0');
	}
	if (point < 0)
		point = pos;
	while (n > 0 && dig[n - 1] == '0')
		n--;
	dig[n] = '\0';
	/* The first significant digit is digit number lead (0-based). */
	*x = (eneg ? -e : e) + point - lead - 1;
	return n;
}

#endif
