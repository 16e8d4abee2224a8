/* Mineral elastic constants and the mixing of solid (or solid and fluid)
 * constituents for the rockwire compute core: a static table of common
 * rock-forming minerals (bulk and shear modulus, density), and the Voigt,
 * Reuss, Hill and Hashin-Shtrikman averages and bounds of N constituents
 * by volume fraction (Berryman 1995 N-phase form). Pure, allocation-free,
 * per sample. Units: moduli Pa, density kg/m^3, fractions 0..1. */
#ifndef ROCKWIRE_MINERAL_H
#define ROCKWIRE_MINERAL_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* One mineral: lower-case ASCII name, bulk modulus k_pa, shear modulus
 * mu_pa, density rho_kgm3, and a short citation of the source of the
 * values. The strings are static; never free them. */
typedef struct rw_mineral {
	const char *name;
	double k_pa;
	double mu_pa;
	double rho_kgm3;
	const char *source;
} rw_mineral;

/* Number of minerals in the table (constant). */
size_t rw_mineral_count(void);

/* Copies table entry i (0 <= i < rw_mineral_count()) to *out.
 * errors: RW_EINVAL for i out of range (out's numbers NaN, strings
 * NULL). */
int rw_mineral_get(size_t i, rw_mineral *out);

/* Finds a mineral by exact, case-sensitive name (e.g. "quartz") and
 * writes its table index to *index and the entry to *out (either may be
 * NULL). errors: RW_EINVAL for a NULL or unknown name (*index is set to
 * (size_t)-1, out's numbers NaN). */
int rw_mineral_find(const char *name, size_t *index, rw_mineral *out);

/* Averaging methods for rw_mineral_mix. */
enum {
	RW_MIX_VOIGT = 0,    /* arithmetic mean of K and mu (upper bound) */
	RW_MIX_REUSS = 1,    /* harmonic mean of K and mu (lower bound) */
	RW_MIX_HILL = 2,     /* mean of Voigt and Reuss (Hill 1952) */
	RW_MIX_HS_UPPER = 3, /* Hashin-Shtrikman upper bound */
	RW_MIX_HS_LOWER = 4  /* Hashin-Shtrikman lower bound */
};

/* Effective bulk and shear modulus and density of n constituents with
 * moduli k_pa[i] >= 0, mu_pa[i] >= 0 (0 for a fluid or an empty pore),
 * densities rho_kgm3[i] >= 0 and volume fractions frac[i] in [0, 1]
 * summing to 1 within 1e-6 (used as given). Density is the arithmetic
 * (volume-weighted) mean for every method.
 * Voigt (1928): K = sum f_i K_i; Reuss (1929): 1/K = sum f_i / K_i
 * (likewise mu; a zero modulus with f_i > 0 gives 0); Hill 1952: the mean
 * of the two. Hashin-Shtrikman 1963 in Berryman's 1995 N-phase form:
 *   Lambda(z) = [sum f_i / (K_i + 4z/3)]^-1 - 4z/3,
 *   Gamma(z)  = [sum f_i / (mu_i + z)]^-1 - z,
 *   zeta(K, mu) = (mu / 6) (9K + 8mu) / (K + 2mu),
 *   K_HS+ = Lambda(mu_max), K_HS- = Lambda(mu_min),
 *   mu_HS+ = Gamma(zeta(K_max, mu_max)), mu_HS- = Gamma(zeta(K_min,
 *   mu_min)),
 * with the max/min taken over constituents with f_i > 0. These are the
 * bounds for well-ordered constituents and Berryman's (wider) bounds
 * otherwise. Any output pointer may be NULL.
 * errors: RW_EINVAL for n == 0, NULL arrays, an unknown method or a
 * fraction sum off by more than 1e-6; RW_EDOM for a negative or non-finite
 * modulus, density or fraction, or a fraction above 1. Outputs NaN on
 * error. */
int rw_mineral_mix(int method, size_t n, const double *k_pa,
                   const double *mu_pa, const double *rho_kgm3,
                   const double *frac, double *k_out_pa, double *mu_out_pa,
                   double *rho_out_kgm3);

#ifdef __cplusplus
}
#endif

#endif
