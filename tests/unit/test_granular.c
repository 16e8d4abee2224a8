/* Unit tests of the granular-pack and sand models (daemon/core/
 * granular.c): a Hertz-Mindlin value for quartz worked by hand from
 * Mindlin's formula, the P^(1/3) law, Walton's limits against
 * Hertz-Mindlin, the limits the sand bounds are built to meet (mineral at
 * zero porosity, the pack at critical porosity, stiff above soft), every
 * dry modulus inside the Hashin-Shtrikman bounds of mineral and vacuum,
 * the ordering of the cement models, Krief's and the critical-porosity
 * closed forms, the warnings and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "unit/rm_check.h"

/* Hertz-Mindlin for quartz grains (K 36.6, mu 45 GPa), nine contacts,
 * porosity 0.36, 10 MPa, no slip, worked by hand from Mindlin's formula
 * as written in Mavko, Mukerji & Dvorkin 2009 sec. 5.4:
 *   nu = (3 K - 2 mu) / (2 (3 K + mu)) = 19.8 / 309.6 = 0.0639535
 *   base = C^2 (1-phi)^2 mu^2 P / (pi^2 (1-nu)^2)
 *        = 81 * 0.4096 * 2.025e21 * 1e7 / (9.869604 * 0.876183)
 *        = 6.718464e29 / 8.647586 = 7.769184e28
 *   K  = (base / 18)^(1/3) = (4.316213e27)^(1/3) = 1.628175e9 Pa
 *   mu = (5 - 4 nu) / (5 (2 - nu)) (1.5 base)^(1/3)
 *      = 0.490090 * 4.884494e9 = 2.393857e9 Pa
 * Tolerance 1e-6: the hand values carry 7 digits. */
static void test_hm_worked(void **state)
{
	double k, mu;
	unsigned w = 99;

	(void)state;
	assert_int_equal(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 9.0, 10e6, 1.0, &k, &mu, &w),
	    RW_OK);
	assert_int_equal(w, 0);
	assert_rel(k, 1.628175e9, 1e-6);
	assert_rel(mu, 2.393857e9, 1e-6);
}

/* Hertz-Mindlin moduli scale as P^(1/3) (Mindlin 1949; Mavko et al.
 * 2009 sec. 5.4): 8 times the pressure doubles both, exactly. Also as
 * C^(2/3) and (1 - phi)^(2/3). */
static void test_hm_scaling(void **state)
{
	double k1, mu1, k2, mu2;
	static const double p[] = {1e6, 5e6, 20e6, 40e6};
	size_t i;

	(void)state;
	for (i = 0; i < 4; i++) {
		rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.38, 8.0, p[i], 0.6, &k1,
		                    &mu1, NULL);
		rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.38, 8.0, 8.0 * p[i], 0.6,
		                    &k2, &mu2, NULL);
		assert_rel(k2, 2.0 * k1, 1e-14);
		assert_rel(mu2, 2.0 * mu1, 1e-14);
		rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.38, 8.0 * 8.0, p[i], 0.6,
		                    &k2, &mu2, NULL);
		assert_rel(k2, 4.0 * k1, 1e-14);
	}
	rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.0, 9.0, 10e6, 1.0, &k1, &mu1, NULL);
	rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.5, 9.0, 10e6, 1.0, &k2, &mu2, NULL);
	assert_rel(k2, k1 * cbrt(0.25), 1e-14);
}

/* Walton 1987's rough limit is Mindlin's no-slip pack and the smooth
 * limit the frictionless one (Mavko et al. 2009 sec. 5.4; the identity
 * also follows from A = nu / (2 pi mu), B = (1 - nu) / (2 pi mu)); the
 * smooth shear modulus is 3/5 of the bulk modulus. Walton is written
 * with the A, B constants, Hertz-Mindlin with nu: two code paths. The
 * slip factor is linear between the two limits. */
static void test_walton_limits(void **state)
{
	static const double km[] = {36.6e9, 76.8e9, 21e9};
	static const double mm[] = {45e9, 32e9, 7e9};
	double k1, mu1, k2, mu2, k3, mu3;
	size_t i;

	(void)state;
	for (i = 0; i < 3; i++) {
		rw_rm_walton(km[i], mm[i], 0.37, 7.0, 15e6, 1, &k1, &mu1, NULL);
		rw_rm_hertz_mindlin(km[i], mm[i], 0.37, 7.0, 15e6, 1.0, &k2,
		                    &mu2, NULL);
		assert_rel(k1, k2, 1e-13);
		assert_rel(mu1, mu2, 1e-13);
		rw_rm_walton(km[i], mm[i], 0.37, 7.0, 15e6, 0, &k1, &mu1, NULL);
		rw_rm_hertz_mindlin(km[i], mm[i], 0.37, 7.0, 15e6, 0.0, &k2,
		                    &mu2, NULL);
		assert_rel(k1, k2, 1e-13);
		assert_rel(mu1, mu2, 1e-13);
		assert_rel(mu1, 0.6 * k1, 1e-14);
		rw_rm_hertz_mindlin(km[i], mm[i], 0.37, 7.0, 15e6, 1.0, &k3,
		                    &mu3, NULL);
		rw_rm_hertz_mindlin(km[i], mm[i], 0.37, 7.0, 15e6, 0.5, &k1,
		                    &mu1, NULL);
		assert_rel(mu1, 0.5 * (mu2 + mu3), 1e-14);
		assert_rel(k1, k3, 0.0);
	}
}

/* Murphy 1982's coordination number (as quoted by Mavko et al. 2009,
 * from memory): 20 - 34 phi + 14 phi^2; at 0.36: 20 - 12.24 + 1.8144. */
static void test_murphy(void **state)
{
	double c;

	(void)state;
	assert_int_equal(rw_rm_coord_murphy(0.36, &c), RW_OK);
	assert_rel(c, 9.5744, 1e-14);
	assert_int_equal(rw_rm_coord_murphy(1.0, &c), RW_EDOM);
	assert_true(isnan(c));
}

/* The limits the sand models are built on (Dvorkin & Nur 1996; Gal et
 * al. 1998; Avseth et al. 2000): at zero porosity the mineral; the soft
 * and stiff sands at critical porosity the Hertz-Mindlin pack; the
 * constant-cement model at phi_b the contact-cement rock; the critical-
 * porosity model zero at phi_c; Krief the mineral at zero porosity. */
static void test_end_members(void **state)
{
	double k, mu, kh, muh;

	(void)state;
	rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.4, 9.0, 20e6, 1.0, &kh, &muh, NULL);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.4, 0.4, 9.0, 20e6, 1.0, &k, &mu, NULL);
	assert_rel(k, kh, 1e-13);
	assert_rel(mu, muh, 1e-13);
	rw_rm_stiff_sand(QZ_K, QZ_MU, 0.4, 0.4, 9.0, 20e6, 1.0, &k, &mu, NULL);
	assert_rel(k, kh, 1e-13);
	assert_rel(mu, muh, 1e-13);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.0, 0.4, 9.0, 20e6, 1.0, &k, &mu, NULL);
	assert_rel(k, QZ_K, 1e-14);
	assert_rel(mu, QZ_MU, 1e-14);
	rw_rm_stiff_sand(QZ_K, QZ_MU, 0.0, 0.4, 9.0, 20e6, 1.0, &k, &mu, NULL);
	assert_rel(k, QZ_K, 1e-14);
	assert_rel(mu, QZ_MU, 1e-14);
	rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.0, 0.35, 0.4, 9.0, 1,
	                      &k, &mu, NULL);
	assert_rel(k, QZ_K, 1e-14);
	assert_rel(mu, QZ_MU, 1e-14);
	rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.35, 0.4, 9.0, 1, &kh,
	                     &muh, NULL);
	rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.35, 0.35, 0.4, 9.0, 1,
	                      &k, &mu, NULL);
	assert_rel(k, kh, 1e-13);
	assert_rel(mu, muh, 1e-13);
	rw_rm_critical_porosity(QZ_K, QZ_MU, 0.0, 0.4, &k, &mu, NULL);
	assert_rel(k, QZ_K, 0.0);
	rw_rm_critical_porosity(QZ_K, QZ_MU, 0.1, 0.4, &k, &mu, NULL);
	assert_rel(k, 0.75 * QZ_K, 1e-15);
	assert_rel(mu, 0.75 * QZ_MU, 1e-15);
	rw_rm_critical_porosity(QZ_K, QZ_MU, 0.4, 0.4, &k, &mu, NULL);
	assert_true(k == 0.0 && mu == 0.0);
	rw_rm_krief(QZ_K, QZ_MU, 0.0, &k, &mu, NULL);
	assert_rel(k, QZ_K, 0.0);
}

/* Krief et al. 1990 (from memory): K_dry / K = mu_dry / mu =
 * (1 - phi)^(3 / (1 - phi)), so the dry Poisson's ratio is the
 * mineral's; at phi = 0.2 the factor is 0.8^3.75 = 0.4330993 (hand:
 * exp(3.75 ln 0.8) = exp(-0.8367868)). */
static void test_krief(void **state)
{
	double k, mu;

	(void)state;
	assert_int_equal(rw_rm_krief(QZ_K, QZ_MU, 0.2, &k, &mu, NULL), RW_OK);
	assert_rel(k / QZ_K, 0.4330993, 1e-6);
	assert_rel(mu / QZ_MU, k / QZ_K, 1e-15);
}

/* Stiff sand lies above soft sand, constant cement between soft sand and
 * contact cement (Avseth et al. 2000), scheme-1 contact cement above scheme 2
 * (cement at the contacts stiffens more than a coating of the same volume;
 * Dvorkin & Nur 1996), everything falls with porosity and stays inside the
 * Hashin-Shtrikman bounds of mineral and vacuum (Hashin & Shtrikman 1963:
 * the lower bound is zero, the upper one from the core's mixer). Grid of
 * porosities, pressures and two minerals. */
static void test_order_and_bounds(void **state)
{
	static const double km[] = {QZ_K, 76.8e9};
	static const double mm[] = {QZ_MU, 32e9};
	static const double pp[] = {2e6, 10e6, 30e6};
	size_t im, ip;
	unsigned w;
	int i;

	(void)state;
	for (im = 0; im < 2; im++) {
		for (ip = 0; ip < 3; ip++) {
			double ks0 = INFINITY, ms0 = INFINITY, kt0 = INFINITY,
			       mt0 = INFINITY;

			for (i = 0; i <= 20; i++) {
				double phi = 0.02 * i,
				       pc = 0.4 - 0.005 * (i - 12);
				double ks, ms, kt, mt, kc, mc, k2, m2, ku, mu_u,
				    kk, mk;

				rw_rm_soft_sand(km[im], mm[im], phi, 0.4, 9.0,
				                pp[ip], 1.0, &ks, &ms, NULL);
				rw_rm_stiff_sand(km[im], mm[im], phi, 0.4, 9.0,
				                 pp[ip], 1.0, &kt, &mt, NULL);
				hs_upper_vacuum(km[im], mm[im], phi, &ku,
				                &mu_u);
				assert_true(kt >= ks * (1 - 1e-14) &&
				            mt >= ms * (1 - 1e-14));
				assert_true(ks > 0.0 && ms > 0.0);
				assert_true(kt <= ku * (1 + 1e-12) &&
				            mt <= mu_u * (1 + 1e-12));
				assert_true(ks <= ks0 && ms <= ms0 &&
				            kt <= kt0 && mt <= mt0);
				ks0 = ks;
				ms0 = ms;
				kt0 = kt;
				mt0 = mt;
				rw_rm_krief(km[im], mm[im], phi, &kk, &mk,
				            NULL);
				assert_true(kk <= ku * (1 + 1e-12) &&
				            mk <= mu_u * (1 + 1e-12));
				/* inside the bound, or flagged (see
				 * test_critical_above_hs) */
				rw_rm_critical_porosity(km[im], mm[im], phi,
				                        0.4, &kk, &mk, &w);
				assert_true((kk <= ku * (1 + 1e-12) &&
				             mk <= mu_u * (1 + 1e-12)) ||
				            w == RW_RM_WARN_ABOVE_HS);
				if (i < 12 || ip > 0)
					continue;
				/* cement: porosity pc from 0.40 down to 0.36 */
				rw_rm_contact_cement(km[im], mm[im], QZ_K,
				                     QZ_MU, pc, 0.4, 9.0, 1,
				                     &kc, &mc, NULL);
				rw_rm_contact_cement(km[im], mm[im], QZ_K,
				                     QZ_MU, pc, 0.4, 9.0, 2,
				                     &k2, &m2, NULL);
				hs_upper_vacuum(km[im], mm[im], pc, &ku, &mu_u);
				rw_rm_soft_sand(km[im], mm[im], pc, 0.4, 9.0,
				                20e6, 1.0, &ks, &ms, NULL);
				assert_true(kc > 0.0 && k2 > 0.0);
				assert_true(kc <= ku && mc <= mu_u);
				assert_true(k2 <= ku && m2 <= mu_u);
				if (i > 12) {
					assert_true(kc > k2 && mc > m2);
					assert_true(kc > ks && mc > ms);
				}
			}
			for (i = 0; i < 10; i++) {
				double phi = 0.035 * i;
				double kc, mc, kcc, mcc, ks, ms;

				/* constant cement from phi_b = 0.36 (4 %
				 * cement); contact cement only where it holds
				 * (at most 10 % cement: phi >= 0.30) */
				rw_rm_constant_cement(km[im], mm[im], QZ_K,
				                      QZ_MU, phi, 0.36, 0.4,
				                      9.0, 1, &kc, &mc, NULL);
				rw_rm_soft_sand(km[im], mm[im], phi, 0.4, 9.0,
				                pp[ip], 1.0, &ks, &ms, NULL);
				assert_true(kc >= ks * (1 - 1e-14) &&
				            mc >= ms * (1 - 1e-14));
				/* the order holds for cement of the grain
				 * mineral (Avseth et al.'s quartz on quartz):
				 * calcite grains add stiffer material on the
				 * constant-cement line than quartz cement */
				if (phi < 0.30 || im > 0)
					continue;
				rw_rm_contact_cement(km[im], mm[im], QZ_K,
				                     QZ_MU, phi, 0.4, 9.0, 1,
				                     &kcc, &mcc, NULL);
				assert_true(kc <= kcc && mc <= mcc);
			}
		}
	}
}

/* The critical-porosity lines K (1 - phi/phi_c), mu (1 - phi/phi_c)
 * start with relative slope -1/phi_c, the Hashin-Shtrikman upper bounds
 * with empty pores with -(1 + 3K/(4 mu)) and -(1 + mu/z) (differentiate
 * K+ = (1-phi) K a / (a + phi K) and mu+ likewise, Hashin & Shtrikman
 * 1963), so the lines stay inside only for phi_c <= min(1 / (1 +
 * 3K/(4 mu)), 1 / (1 + mu/z)): 0.357 for calcite (K 76.8, mu 32 GPa; the
 * bulk bound binds), 0.476 for quartz (the shear bound). Calcite with phi_c =
 * 0.4 is above the bound at low porosity: at phi = 0.02 the bound is 72.649 GPa
 * (hand: 0.98 * 76.8 * 42.667 / (42.667 + 1.536)) and the line 72.96 GPa. */
static void test_critical_above_hs(void **state)
{
	double k, mu;
	unsigned w;
	int i;

	(void)state;
	rw_rm_critical_porosity(76.8e9, 32e9, 0.02, 0.4, &k, &mu, &w);
	assert_rel(k, 72.96e9, 1e-14);
	assert_int_equal(w, RW_RM_WARN_ABOVE_HS);
	rw_rm_critical_porosity(76.8e9, 32e9, 0.02, 0.6, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_ABOVE_HS);
	for (i = 1; i < 60; i++) {
		rw_rm_critical_porosity(76.8e9, 32e9, 0.005 * i, 0.35, &k, &mu,
		                        &w);
		assert_int_equal(w, 0);
		rw_rm_critical_porosity(QZ_K, QZ_MU, 0.0078 * i, 0.47, &k, &mu,
		                        &w);
		assert_int_equal(w, 0);
	}
	rw_rm_critical_porosity(QZ_K, QZ_MU, 0.05, 0.6, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_ABOVE_HS);
}

/* Above critical porosity the soft sand is continued to an empty space
 * at phi = 1 (rockwire's continuation, see rockmodel.h): continuous at
 * phi_c, decreasing, zero at 1, and flagged. */
static void test_soft_above_critical(void **state)
{
	double k0, m0, k, mu, kp = INFINITY;
	double phi;
	unsigned w;

	(void)state;
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.4, 0.4, 9.0, 20e6, 1.0, &k0, &m0, &w);
	assert_int_equal(w, 0);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.4 + 1e-9, 0.4, 9.0, 20e6, 1.0, &k, &mu,
	                &w);
	assert_int_equal(w, RW_RM_WARN_PHI_ABOVE_C);
	assert_rel(k, k0, 1e-7);
	assert_rel(mu, m0, 1e-7);
	for (phi = 0.41; phi < 1.0; phi += 0.05) {
		rw_rm_stiff_sand(QZ_K, QZ_MU, phi, 0.4, 9.0, 20e6, 1.0, &k, &mu,
		                 &w);
		assert_int_equal(w, RW_RM_WARN_PHI_ABOVE_C);
		assert_true(k < kp && k > 0.0);
		kp = k;
	}
	rw_rm_soft_sand(QZ_K, QZ_MU, nextafter(1.0, 0.0), 0.4, 9.0, 20e6, 1.0,
	                &k, &mu, &w);
	assert_true(k < 1e-6 * k0);
	rw_rm_critical_porosity(QZ_K, QZ_MU, 0.5, 0.4, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_PHI_ABOVE_C);
	assert_true(k == 0.0 && mu == 0.0);
}

/* Zero effective pressure: a pack without stiffness; the soft sand is
 * then zero at any porosity above 0, the stiff sand the upper bound with
 * an empty end member (finite). Both flagged P_RANGE. */
static void test_zero_pressure(void **state)
{
	double k, mu;
	unsigned w;

	(void)state;
	assert_int_equal(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 9.0, 0.0, 1.0, &k, &mu, &w),
	    RW_OK);
	assert_true(k == 0.0 && mu == 0.0);
	assert_int_equal(w, RW_RM_WARN_P_RANGE);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.2, 0.4, 9.0, 0.0, 1.0, &k, &mu, &w);
	assert_true(k == 0.0 && mu == 0.0);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.0, 0.4, 9.0, 0.0, 1.0, &k, &mu, &w);
	assert_rel(k, QZ_K, 0.0);
	rw_rm_stiff_sand(QZ_K, QZ_MU, 0.2, 0.4, 9.0, 0.0, 1.0, &k, &mu, &w);
	assert_true(k > 0.0 && k < QZ_K && mu > 0.0);
	assert_int_equal(w, RW_RM_WARN_P_RANGE);
}

/* Warnings: coordination number outside [4, 12], pressure outside
 * [0.1, 50] MPa, contact cement above 10 % (0.31 below 0.40: 9 %; 0.40 -
 * 0.30 is just above 0.10 in binary, so the edge itself is not tested). */
static void test_warnings(void **state)
{
	double k, mu;
	unsigned w;

	(void)state;
	rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 3.0, 10e6, 1.0, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_COORD_RANGE);
	rw_rm_walton(QZ_K, QZ_MU, 0.36, 13.0, 60e6, 1, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_COORD_RANGE | RW_RM_WARN_P_RANGE);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.2, 0.36, 9.0, 0.05e6, 1.0, &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_P_RANGE);
	rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.31, 0.40, 9.0, 1, &k,
	                     &mu, &w);
	assert_int_equal(w, 0);
	rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.29, 0.40, 9.0, 2, &k,
	                     &mu, &w);
	assert_int_equal(w, RW_RM_WARN_CEMENT_HIGH);
	rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.1, 0.25, 0.40, 9.0, 1,
	                      &k, &mu, &w);
	assert_int_equal(w, RW_RM_WARN_CEMENT_HIGH);
}

#define EXPECT_EDOM(call)                                                      \
	do {                                                                   \
		k = mu = 1.0;                                                  \
		assert_int_equal((call), RW_EDOM);                             \
		assert_true(isnan(k) && isnan(mu));                            \
	} while (0)

static void test_errors(void **state)
{
	double k, mu;

	(void)state;
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(-1.0, QZ_MU, 0.36, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, 0.0, 0.36, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, NAN, 0.36, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 1.0, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 0, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 9, -1, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.36, 9, 1e7, 1.5, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_hertz_mindlin(QZ_K, QZ_MU, NAN, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_walton(QZ_K, QZ_MU, 0.36, 9, INFINITY, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_soft_sand(QZ_K, QZ_MU, 0.2, 1.0, 9, 1e7, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_stiff_sand(QZ_K, QZ_MU, -0.1, 0.4, 9, 1e7, 1, &k, &mu, NULL));
	/* negative cement */
	EXPECT_EDOM(rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.41, 0.4, 9,
	                                 1, &k, &mu, NULL));
	EXPECT_EDOM(rw_rm_contact_cement(QZ_K, QZ_MU, 0.0, QZ_MU, 0.3, 0.4, 9,
	                                 1, &k, &mu, NULL));
	k = mu = 1.0;
	assert_int_equal(rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.3,
	                                      0.4, 9, 3, &k, &mu, NULL),
	                 RW_EINVAL);
	assert_true(isnan(k) && isnan(mu));
	/* above phi_b, and phi_b above phi_c */
	EXPECT_EDOM(rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.36, 0.35,
	                                  0.4, 9, 1, &k, &mu, NULL));
	EXPECT_EDOM(rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.2, 0.45,
	                                  0.4, 9, 1, &k, &mu, NULL));
	EXPECT_EDOM(
	    rw_rm_critical_porosity(QZ_K, QZ_MU, 0.2, 0.0, &k, &mu, NULL));
	EXPECT_EDOM(rw_rm_krief(QZ_K, QZ_MU, 1.0, &k, &mu, NULL));
	EXPECT_EDOM(rw_rm_krief(NAN, QZ_MU, 0.1, &k, &mu, NULL));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_hm_worked),
	    cmocka_unit_test(test_hm_scaling),
	    cmocka_unit_test(test_walton_limits),
	    cmocka_unit_test(test_murphy),
	    cmocka_unit_test(test_end_members),
	    cmocka_unit_test(test_krief),
	    cmocka_unit_test(test_order_and_bounds),
	    cmocka_unit_test(test_critical_above_hs),
	    cmocka_unit_test(test_soft_above_critical),
	    cmocka_unit_test(test_zero_pressure),
	    cmocka_unit_test(test_warnings),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
