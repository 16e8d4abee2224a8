/* The mineral table of the rockwire core and the Voigt / Reuss / Hill /
 * Hashin-Shtrikman mixing of N constituents (Berryman 1995 N-phase form).
 * Table values are those of the mineral table of Mavko, Mukerji & Dvorkin
 * 2009 (The Rock Physics Handbook, 2nd ed., table 7.1) and the primary
 * sources it cites, all written from memory: check a row against the
 * handbook before relying on it for a decision. Contracts are in
 * rockwire/mineral.h. */
#include <math.h>
#include <stddef.h>
#include <string.h>

#include "rockwire/mineral.h"
#include "rockwire/status.h"

#define GPA 1e9

/* Rows: name, K, mu, rho, source. "MMD09" = Mavko, Mukerji & Dvorkin
 * 2009 table 7.1; every row from memory. Clay entries carry a large
 * uncertainty in the literature (values from powders and from
 * extrapolation differ by factors of several); the ones marked
 * "low confidence" are the least certain recollections. */
static const rw_mineral minerals[] = {
    {"quartz", 36.6 * GPA, 45.0 * GPA, 2650.0, "MMD09 table 7.1, from memory"},
    {"calcite", 76.8 * GPA, 32.0 * GPA, 2710.0, "MMD09 table 7.1, from memory"},
    {"dolomite", 94.9 * GPA, 45.0 * GPA, 2870.0,
     "MMD09 table 7.1, from memory"},
    /* Generic clay: the "Gulf clays" row (Tosaya 1982 via MMD09). */
    {"clay", 21.0 * GPA, 7.0 * GPA, 2600.0,
     "MMD09 table 7.1 (Gulf clays, Tosaya 1982), from memory"},
    {"illite", 39.4 * GPA, 11.7 * GPA, 2700.0,
     "MMD09 table 7.1, from memory, low confidence"},
    /* Measured on a compacted powder: far softer than a crystal. */
    {"kaolinite", 1.5 * GPA, 1.4 * GPA, 1580.0,
     "MMD09 table 7.1 (Vanorio et al. 2003), from memory"},
    {"smectite", 9.3 * GPA, 6.9 * GPA, 2390.0,
     "MMD09 table 7.1 (Vanorio et al. 2003), from memory, low confidence"},
    /* Feldspar: albite, the sodium end-member of plagioclase, listed
     * under its own name and as the generic "feldspar" a practitioner
     * asks for. */
    {"albite", 75.6 * GPA, 25.6 * GPA, 2630.0, "MMD09 table 7.1, from memory"},
    {"feldspar", 75.6 * GPA, 25.6 * GPA, 2630.0,
     "albite values (MMD09 table 7.1), from memory"},
    {"anhydrite", 56.1 * GPA, 29.1 * GPA, 2980.0,
     "MMD09 table 7.1, from memory"},
    {"halite", 24.8 * GPA, 14.9 * GPA, 2160.0, "MMD09 table 7.1, from memory"},
    {"pyrite", 147.4 * GPA, 132.5 * GPA, 4930.0,
     "MMD09 table 7.1, from memory"},
    {"siderite", 123.7 * GPA, 51.0 * GPA, 3960.0,
     "MMD09 table 7.1, from memory"},
};

#define N_MINERALS (sizeof(minerals) / sizeof(minerals[0]))

static void mineral_nan(rw_mineral *out)
{
	out->name = NULL;
	out->source = NULL;
	out->k_pa = NAN;
	out->mu_pa = NAN;
	out->rho_kgm3 = NAN;
}

size_t rw_mineral_count(void)
{
	return N_MINERALS;
}

int rw_mineral_get(size_t i, rw_mineral *out)
{
	if (i >= N_MINERALS) {
		mineral_nan(out);
		return RW_EINVAL;
	}
	*out = minerals[i];
	return RW_OK;
}

int rw_mineral_find(const char *name, size_t *index, rw_mineral *out)
{
	size_t i;

	if (name != NULL) {
		for (i = 0; i < N_MINERALS; i++) {
			if (strcmp(name, minerals[i].name) == 0) {
				if (index)
					*index = i;
				if (out)
					*out = minerals[i];
				return RW_OK;
			}
		}
	}
	if (index)
		*index = (size_t)-1;
	if (out)
		mineral_nan(out);
	return RW_EINVAL;
}

/* [sum f_i / (x_i + z)]^-1 - z over constituents with f_i > 0, for
 * x_i >= 0 and z >= 0. A zero denominator with f_i > 0 makes the sum
 * infinite and the harmonic part 0. z = 0 gives the Reuss average. */
static double harmonic_shift(size_t n, const double *x, const double *f,
                             double z)
{
	double s = 0.0;
	size_t i;

	for (i = 0; i < n; i++) {
		if (f[i] <= 0.0)
			continue;
		if (x[i] + z <= 0.0)
			return -z + 0.0;
		s += f[i] / (x[i] + z);
	}
	return 1.0 / s - z;
}

static double arith(size_t n, const double *x, const double *f)
{
	double s = 0.0;
	size_t i;

	for (i = 0; i < n; i++)
		s += f[i] * x[i];
	return s;
}

/* Berryman 1995 zeta(K, mu) = (mu / 6) (9K + 8mu) / (K + 2mu); 0 when
 * mu = 0 (and when K = mu = 0). */
static double hs_zeta(double k, double mu)
{
	if (mu <= 0.0)
		return 0.0;
	return mu / 6.0 * (9.0 * k + 8.0 * mu) / (k + 2.0 * mu);
}

static void set3(double *k, double *mu, double *rho, double a, double b,
                 double c)
{
	if (k)
		*k = a;
	if (mu)
		*mu = b;
	if (rho)
		*rho = c;
}

int rw_mineral_mix(int method, size_t n, const double *k_pa,
                   const double *mu_pa, const double *rho_kgm3,
                   const double *frac, double *k_out_pa, double *mu_out_pa,
                   double *rho_out_kgm3)
{
	double sum = 0.0, k, mu, kmax = 0.0, kmin = INFINITY, mumax = 0.0;
	double mumin = INFINITY;
	size_t i;
	int st = RW_OK;

	if (n == 0 || !k_pa || !mu_pa || !rho_kgm3 || !frac ||
	    method < RW_MIX_VOIGT || method > RW_MIX_HS_LOWER)
		st = RW_EINVAL;
	for (i = 0; st == RW_OK && i < n; i++) {
		if (!(isfinite(k_pa[i]) && k_pa[i] >= 0.0 &&
		      isfinite(mu_pa[i]) && mu_pa[i] >= 0.0 &&
		      isfinite(rho_kgm3[i]) && rho_kgm3[i] >= 0.0 &&
		      isfinite(frac[i]) && frac[i] >= 0.0 && frac[i] <= 1.0)) {
			st = RW_EDOM;
			break;
		}
		sum += frac[i];
		if (frac[i] > 0.0) {
			kmax = fmax(kmax, k_pa[i]);
			kmin = fmin(kmin, k_pa[i]);
			mumax = fmax(mumax, mu_pa[i]);
			mumin = fmin(mumin, mu_pa[i]);
		}
	}
	if (st == RW_OK && fabs(sum - 1.0) > 1e-6)
		st = RW_EINVAL;
	if (st != RW_OK) {
		set3(k_out_pa, mu_out_pa, rho_out_kgm3, NAN, NAN, NAN);
		return st;
	}

	switch (method) {
	case RW_MIX_VOIGT:
		k = arith(n, k_pa, frac);
		mu = arith(n, mu_pa, frac);
		break;
	case RW_MIX_REUSS:
		k = harmonic_shift(n, k_pa, frac, 0.0);
		mu = harmonic_shift(n, mu_pa, frac, 0.0);
		break;
	case RW_MIX_HILL:
		k = 0.5 *
		    (arith(n, k_pa, frac) + harmonic_shift(n, k_pa, frac, 0.0));
		mu = 0.5 * (arith(n, mu_pa, frac) +
		            harmonic_shift(n, mu_pa, frac, 0.0));
		break;
	case RW_MIX_HS_UPPER:
		/* Lambda(mu_max) = [sum f/(K + 4/3 mu_max)]^-1 - 4/3 mu_max */
		k = harmonic_shift(n, k_pa, frac, 4.0 / 3.0 * mumax);
		mu = harmonic_shift(n, mu_pa, frac, hs_zeta(kmax, mumax));
		break;
	default: /* RW_MIX_HS_LOWER */
		k = harmonic_shift(n, k_pa, frac, 4.0 / 3.0 * mumin);
		mu = harmonic_shift(n, mu_pa, frac, hs_zeta(kmin, mumin));
		break;
	}
	set3(k_out_pa, mu_out_pa, rho_out_kgm3, k, mu,
	     arith(n, rho_kgm3, frac));
	return RW_OK;
}
