/* Unit tests of the mineral table and of Voigt / Reuss / Hill /
 * Hashin-Shtrikman mixing (daemon/core/mineral.c): table sanity by the
 * laws of elasticity, the bounds' ordering, the two-phase HS formula of
 * Hashin & Shtrikman 1963 written out independently, Hill's 1963 exact
 * result for equal shear moduli, and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "rockwire/mineral.h"
#include "rockwire/status.h"

static void assert_rel(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol * fabs(want)))
		fail_msg("got %.15g, want %.15g (rel tol %g)", got, want, tol);
}

/* Every entry: a lower-case ASCII name, unique; K, mu, rho positive and
 * finite; Poisson's ratio (3K - 2mu) / (2(3K + mu)) inside (-1, 0.5)
 * (stability of an isotropic solid: K > 0, mu > 0); density between 1000
 * and 8000 kg/m^3 (rock-forming minerals; common practice); moduli below
 * 1000 GPa (diamond's K is about 440 GPa, handbook, from memory). The
 * minerals the rock families name (quartz, calcite, dolomite, the clays,
 * feldspars, ...) are present. */
static void test_table(void **state)
{
	static const char *need[] = {
	    "quartz",    "calcite",  "dolomite", "clay",      "illite",
	    "kaolinite", "smectite", "albite",   "anhydrite", "halite",
	    "pyrite",    "siderite", "feldspar"};
	size_t n = rw_mineral_count(), i, j, idx;
	rw_mineral m, m2;
	const char *c;

	(void)state;
	assert_true(n >= 12);
	for (i = 0; i < n; i++) {
		double nu;
		assert_int_equal(rw_mineral_get(i, &m), RW_OK);
		assert_non_null(m.name);
		assert_non_null(m.source);
		for (c = m.name; *c; c++)
			assert_true((*c >= 'a' && *c <= 'z') || *c == '_');
		assert_true(m.k_pa > 0.0 && m.k_pa < 1e12);
		assert_true(m.mu_pa > 0.0 && m.mu_pa < 1e12);
		assert_true(m.rho_kgm3 > 1000.0 && m.rho_kgm3 < 8000.0);
		nu = (3 * m.k_pa - 2 * m.mu_pa) / (2 * (3 * m.k_pa + m.mu_pa));
		assert_true(nu > -1.0 && nu < 0.5);
		for (j = 0; j < i; j++) {
			assert_int_equal(rw_mineral_get(j, &m2), RW_OK);
			assert_true(strcmp(m.name, m2.name) != 0);
		}
		assert_int_equal(rw_mineral_find(m.name, &idx, &m2), RW_OK);
		assert_int_equal(idx, i);
	}
	for (i = 0; i < sizeof(need) / sizeof(need[0]); i++)
		assert_int_equal(rw_mineral_find(need[i], NULL, NULL), RW_OK);
}

static void test_lookup_errors(void **state)
{
	rw_mineral m;
	size_t idx = 0;

	(void)state;
	assert_int_equal(rw_mineral_get(rw_mineral_count(), &m), RW_EINVAL);
	assert_true(isnan(m.k_pa) && isnan(m.mu_pa) && isnan(m.rho_kgm3));
	assert_null(m.name);
	assert_int_equal(rw_mineral_find("Quartz", &idx, &m), RW_EINVAL);
	assert_int_equal(idx, (size_t)-1);
	assert_true(isnan(m.k_pa));
	assert_int_equal(rw_mineral_find("", &idx, NULL), RW_EINVAL);
	assert_int_equal(rw_mineral_find(NULL, &idx, NULL), RW_EINVAL);
}

struct mixset {
	size_t n;
	double k[4], mu[4], rho[4], f[4];
};

/* Mixtures used below (moduli in Pa): quartz-calcite-clay-like solids,
 * a solid with brine (mu = 0), and an ill-ordered pair (stiffer K with the
 * softer mu). Values are typical, not tabulated references. */
static const struct mixset sets[] = {
    {3,
     {36.6e9, 76.8e9, 21e9},
     {45e9, 32e9, 7e9},
     {2650, 2710, 2600},
     {0.6, 0.25, 0.15}},
    {2, {36.6e9, 2.5e9}, {45e9, 0.0}, {2650, 1050}, {0.75, 0.25}},
    {2, {70e9, 30e9}, {20e9, 40e9}, {2800, 2600}, {0.5, 0.5}},
    {4,
     {36.6e9, 76.8e9, 21e9, 2.5e9},
     {45e9, 32e9, 7e9, 0.0},
     {2650, 2710, 2600, 1050},
     {0.5, 0.2, 0.1, 0.2}},
};

static void mix(int method, const struct mixset *s, double *k, double *mu,
                double *rho)
{
	assert_int_equal(
	    rw_mineral_mix(method, s->n, s->k, s->mu, s->rho, s->f, k, mu, rho),
	    RW_OK);
}

/* Reuss <= HS- <= HS+ <= Voigt for K and mu (Hashin & Shtrikman 1963;
 * Berryman 1995); Hill is the mean of Voigt and Reuss (Hill 1952);
 * density is the arithmetic mean for all. */
static void test_bounds_order(void **state)
{
	size_t i, j;
	double kv, muv, kr, mur, kh, muh, ku, muu, kl, mul, rv, rr, rh, ru, rl,
	    rho;

	(void)state;
	for (i = 0; i < sizeof(sets) / sizeof(sets[0]); i++) {
		const struct mixset *s = &sets[i];
		mix(RW_MIX_VOIGT, s, &kv, &muv, &rv);
		mix(RW_MIX_REUSS, s, &kr, &mur, &rr);
		mix(RW_MIX_HILL, s, &kh, &muh, &rh);
		mix(RW_MIX_HS_UPPER, s, &ku, &muu, &ru);
		mix(RW_MIX_HS_LOWER, s, &kl, &mul, &rl);
		assert_true(kr <= kl * (1 + 1e-14) && kl <= ku * (1 + 1e-14));
		assert_true(ku <= kv * (1 + 1e-14));
		assert_true(mur <= mul + 1e-3 && mul <= muu * (1 + 1e-14));
		assert_true(muu <= muv * (1 + 1e-14));
		assert_true(kl < ku && kr < kv);
		assert_rel(kh, 0.5 * (kv + kr), 1e-15);
		assert_rel(muh, 0.5 * (muv + mur), 1e-15);
		rho = 0.0;
		for (j = 0; j < s->n; j++)
			rho += s->f[j] * s->rho[j];
		assert_rel(rv, rho, 1e-15);
		assert_rel(rr, rho, 1e-15);
		assert_rel(rh, rho, 1e-15);
		assert_rel(ru, rho, 1e-15);
		assert_rel(rl, rho, 1e-15);
	}
}

/* With a fluid present (mu_min = 0) the HS lower bound equals the Reuss
 * average for K and is 0 for mu (Mavko, Mukerji & Dvorkin 2009, section
 * on the Hashin-Shtrikman bounds, from memory; it follows from
 * Lambda(0) being the Reuss average in Berryman 1995). */
static void test_hs_lower_with_fluid(void **state)
{
	double kl, mul, kr, mur;

	(void)state;
	mix(RW_MIX_HS_LOWER, &sets[1], &kl, &mul, NULL);
	mix(RW_MIX_REUSS, &sets[1], &kr, &mur, NULL);
	assert_rel(kl, kr, 1e-14);
	assert_true(mul == 0.0 && mur == 0.0);
}

/* Two-phase HS bounds in the form of Hashin & Shtrikman 1963 (as quoted
 * in Mavko, Mukerji & Dvorkin 2009), with phase 1 the stiffer in both K
 * and mu (well-ordered):
 *   K+  = K1 + f2 / (1/(K2 - K1) + f1 / (K1 + 4/3 mu1)),
 *   mu+ = mu1 + f2 / (1/(mu2 - mu1) + 2 f1 (K1 + 2 mu1)
 *         / (5 mu1 (K1 + 4/3 mu1))),
 * and the lower bounds with 1 and 2 exchanged. Quartz and calcite are not
 * well ordered (calcite has the larger K, quartz the larger mu), so the
 * pair used is quartz and clay. */
static double hs2_k(double k1, double mu1, double f1, double k2, double f2)
{
	return k1 + f2 / (1.0 / (k2 - k1) + f1 / (k1 + 4.0 / 3.0 * mu1));
}

static double hs2_mu(double k1, double mu1, double f1, double mu2, double f2)
{
	return mu1 + f2 / (1.0 / (mu2 - mu1) +
	                   2.0 * f1 * (k1 + 2.0 * mu1) /
	                       (5.0 * mu1 * (k1 + 4.0 / 3.0 * mu1)));
}

static void test_hs_two_phase(void **state)
{
	static const double fq[] = {0.1, 0.35, 0.5, 0.8, 0.95};
	double k[2] = {36.6e9, 21e9}, mu[2] = {45e9, 7e9}, r[2] = {2650, 2600};
	double f[2], ku, muu, kl, mul;
	size_t i;

	(void)state;
	for (i = 0; i < sizeof(fq) / sizeof(fq[0]); i++) {
		f[0] = fq[i];
		f[1] = 1.0 - fq[i];
		assert_int_equal(rw_mineral_mix(RW_MIX_HS_UPPER, 2, k, mu, r, f,
		                                &ku, &muu, NULL),
		                 RW_OK);
		assert_int_equal(rw_mineral_mix(RW_MIX_HS_LOWER, 2, k, mu, r, f,
		                                &kl, &mul, NULL),
		                 RW_OK);
		assert_rel(ku, hs2_k(k[0], mu[0], f[0], k[1], f[1]), 1e-12);
		assert_rel(muu, hs2_mu(k[0], mu[0], f[0], mu[1], f[1]), 1e-12);
		assert_rel(kl, hs2_k(k[1], mu[1], f[1], k[0], f[0]), 1e-12);
		assert_rel(mul, hs2_mu(k[1], mu[1], f[1], mu[0], f[0]), 1e-12);
	}
}

/* Hill 1963: when all constituents have the same shear modulus mu the
 * effective bulk modulus is exact,
 *   1/(K + 4/3 mu) = sum f_i / (K_i + 4/3 mu),
 * so the HS bounds coincide on it, and mu_eff = mu. */
static void test_equal_mu(void **state)
{
	double k[3] = {36.6e9, 76.8e9, 10e9}, mu[3] = {20e9, 20e9, 20e9};
	double r[3] = {2650, 2710, 2400}, f[3] = {0.3, 0.5, 0.2};
	double ku, muu, kl, mul, exact, s = 0.0;
	int i;

	(void)state;
	for (i = 0; i < 3; i++)
		s += f[i] / (k[i] + 4.0 / 3.0 * 20e9);
	exact = 1.0 / s - 4.0 / 3.0 * 20e9;
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HS_UPPER, 3, k, mu, r, f, &ku, &muu, NULL),
	    RW_OK);
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HS_LOWER, 3, k, mu, r, f, &kl, &mul, NULL),
	    RW_OK);
	assert_rel(ku, exact, 1e-14);
	assert_rel(kl, exact, 1e-14);
	assert_rel(muu, 20e9, 1e-14);
	assert_rel(mul, 20e9, 1e-14);
}

/* One constituent (or one with fraction 1): every method returns it. */
static void test_single(void **state)
{
	double k[2] = {76.8e9, 2.5e9}, mu[2] = {32e9, 0.0}, r[2] = {2710, 1000};
	double f[2] = {1.0, 0.0}, ko, muo, ro;
	int m;

	(void)state;
	for (m = RW_MIX_VOIGT; m <= RW_MIX_HS_LOWER; m++) {
		assert_int_equal(
		    rw_mineral_mix(m, 2, k, mu, r, f, &ko, &muo, &ro), RW_OK);
		assert_rel(ko, 76.8e9, 1e-14);
		assert_rel(muo, 32e9, 1e-14);
		assert_rel(ro, 2710, 1e-15);
	}
}

static void test_mix_errors(void **state)
{
	double k[2] = {36.6e9, 21e9}, mu[2] = {45e9, 7e9}, r[2] = {2650, 2600};
	double f_bad[2] = {0.6, 0.3}, f_neg[2] = {1.2, -0.2};
	double f[2] = {0.6, 0.4}, ko = 0, muo = 0, ro = 0;
	double kneg[2] = {-1.0, 21e9}, knan[2] = {NAN, 21e9};

	(void)state;
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 2, k, mu, r, f_bad, &ko, &muo, &ro),
	    RW_EINVAL);
	assert_true(isnan(ko) && isnan(muo) && isnan(ro));
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 2, k, mu, r, f_neg, &ko, &muo, &ro),
	    RW_EDOM);
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 2, kneg, mu, r, f, &ko, &muo, &ro),
	    RW_EDOM);
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 2, knan, mu, r, f, &ko, &muo, &ro),
	    RW_EDOM);
	assert_int_equal(rw_mineral_mix(99, 2, k, mu, r, f, &ko, &muo, &ro),
	                 RW_EINVAL);
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 0, k, mu, r, f, &ko, &muo, &ro),
	    RW_EINVAL);
	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HILL, 2, NULL, mu, r, f, &ko, &muo, &ro),
	    RW_EINVAL);
	assert_true(isnan(ko));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_table),
	    cmocka_unit_test(test_lookup_errors),
	    cmocka_unit_test(test_bounds_order),
	    cmocka_unit_test(test_hs_lower_with_fluid),
	    cmocka_unit_test(test_hs_two_phase),
	    cmocka_unit_test(test_equal_mu),
	    cmocka_unit_test(test_single),
	    cmocka_unit_test(test_mix_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
