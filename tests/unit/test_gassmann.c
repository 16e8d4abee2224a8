/* Unit tests of Gassmann fluid substitution (daemon/core/gassmann.c):
 * the exact limits of Gassmann's equation, the dry <-> saturated round
 * trip, a worked substitution computed by hand from the published
 * formulas, the gas effect, the warnings and every error path. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "rockwire/fluid.h"
#include "rockwire/rock.h"
#include "rockwire/status.h"

static void assert_rel(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol * fabs(want)))
		fail_msg("got %.15g, want %.15g (rel tol %g, rel dev %g)", got,
		         want, tol, (got - want) / want);
}

static void assert_subst_nan(const rw_rock_subst *s)
{
	assert_true(isnan(s->vp_ms) && isnan(s->vs_ms) && isnan(s->rho_kgm3));
	assert_true(isnan(s->k_sat_pa) && isnan(s->mu_pa) &&
	            isnan(s->k_dry_pa));
}

/* dry -> sat -> dry returns K_dry to 1e-12 relative (algebraic inverse,
 * Mavko, Mukerji & Dvorkin 2009, chapter 6) over a grid of frames,
 * porosities and fluids. */
static void test_round_trip(void **state)
{
	static const double kdry[] = {0.5e9, 3e9, 8e9, 15e9, 30e9};
	static const double phi[] = {0.06, 0.15, 0.25, 0.35};
	static const double kfl[] = {0.02e9, 0.8e9, 2.8e9};
	double km = 36.6e9, ks, kd;
	size_t i;

	(void)state;
	for (i = 0; i < 5 * 4 * 3; i++) {
		double k0 = kdry[i / 12], f = phi[(i / 3) % 4], kf = kfl[i % 3];

		assert_int_equal(rw_rock_gassmann_sat(k0, km, kf, f, &ks, NULL),
		                 RW_OK);
		assert_true(ks > k0);
		assert_int_equal(rw_rock_gassmann_dry(ks, km, kf, f, &kd, NULL),
		                 RW_OK);
		assert_rel(kd, k0, 1e-12);
	}
}

/* Exact limits of Gassmann's equation (from the formula; Mavko et al.
 * 2009): K_fl = K_min gives K_sat = K_min for any frame; K_dry = 0 (a
 * suspension) gives the Reuss average 1/(phi/K_fl + (1 - phi)/K_min);
 * K_dry = K_min gives K_min. */
static void test_limits(void **state)
{
	double km = 36.6e9, ks;
	double kd;

	(void)state;
	for (kd = 0.0; kd <= 30e9; kd += 5e9) {
		assert_int_equal(
		    rw_rock_gassmann_sat(kd, km, km, 0.2, &ks, NULL), RW_OK);
		assert_rel(ks, km, 1e-13);
	}
	assert_int_equal(rw_rock_gassmann_sat(0.0, km, 2.5e9, 0.3, &ks, NULL),
	                 RW_OK);
	assert_rel(ks, 1.0 / (0.3 / 2.5e9 + 0.7 / km), 1e-14);
	assert_int_equal(rw_rock_gassmann_sat(km, km, 2.5e9, 0.3, &ks, NULL),
	                 RW_OK);
	assert_rel(ks, km, 1e-14);
}

/* Worked brine -> gas substitution, by hand from the Gassmann relations
 * and the density balance (Mavko, Mukerji & Dvorkin 2009, chapter 6,
 * fluid-substitution recipe). Invented sandstone: vp 3000 m/s,
 * vs 1600 m/s, rho 2250 kg/m^3, phi 0.25, quartz K_min 36.6 GPa; brine
 * K 2.7 GPa, rho 1050; gas K 0.05 GPa, rho 150.
 *   mu  = 2250 * 1600^2 = 5.76e9 Pa
 *   K1  = 2250 * 3000^2 - 4/3 * 5.76e9 = 20.25e9 - 7.68e9 = 12.57e9 Pa
 *   r   = phi K_min / K_fl = 0.25 * 36.6 / 2.7 = 3.388889
 *   K_dry = [K1 (r + 1 - phi) - K_min] / [r + K1/K_min - 1 - phi]
 *         = [12.57e9 * 4.138889 - 36.6e9] / [3.388889 + 0.343443 - 1.25]
 *         = 15.42583e9 / 2.482332 = 6.214252e9 Pa
 *   a   = 1 - 6.214252 / 36.6 = 0.830212
 *   den = 0.25 / 0.05e9 + 0.75 / 36.6e9 - 6.214252e9 / 36.6e9^2
 *       = 5.0e-9 + 2.04918e-11 - 4.63906e-12 = 5.015853e-9 1/Pa
 *   K2  = 6.214252e9 + 0.830212^2 / 5.015853e-9
 *       = 6.214252e9 + 0.137415e9 = 6.351667e9 Pa
 *   rho2 = 2250 + 0.25 * (150 - 1050) = 2025 kg/m^3
 *   vp2 = sqrt((6.351667e9 + 7.68e9) / 2025) = 2632.341 m/s
 *   vs2 = sqrt(5.76e9 / 2025) = 1686.548 m/s
 * Tolerance 1e-6 relative: the hand values are rounded to 7 digits. */
static void test_worked_example(void **state)
{
	rw_rock_subst s;
	unsigned warn;

	(void)state;
	assert_int_equal(rw_rock_fluid_subst(3000.0, 1600.0, 2250.0, 0.25,
	                                     36.6e9, 2.7e9, 1050.0, 0.05e9,
	                                     150.0, &s, &warn),
	                 RW_OK);
	assert_int_equal(warn, 0);
	assert_rel(s.mu_pa, 5.76e9, 1e-15);
	assert_rel(s.k_dry_pa, 6.214252e9, 1e-6);
	assert_rel(s.k_sat_pa, 6.351667e9, 1e-6);
	assert_rel(s.rho_kgm3, 2025.0, 1e-14);
	assert_rel(s.vp_ms, 2632.341, 1e-6);
	assert_rel(s.vs_ms, 1686.548, 1e-6);
}

/* The gas effect (common practice): replacing brine by gas lowers Vp,
 * density and acoustic impedance and raises Vs slightly (density falls,
 * mu is unchanged: Gassmann 1951). Fluids from the core's Batzle-Wang
 * functions at 30 MPa, 80 degC. Also mu is unchanged, and the frame path
 * (dry frame + fluid) agrees with substitution from the brine case. */
static void test_gas_effect(void **state)
{
	rw_fluid_phase brine, gas;
	rw_rock_subst b, g, g2;
	unsigned warn;

	(void)state;
	assert_int_equal(rw_fluid_brine_props(30.0, 80.0, 0.05, &brine, NULL),
	                 RW_OK);
	assert_int_equal(rw_fluid_gas_props(30.0, 80.0, 0.65, &gas, NULL, NULL),
	                 RW_OK);
	assert_int_equal(rw_rock_gassmann_frame(8e9, 7e9, 0.22, 36.6e9, 2650.0,
	                                        brine.k_pa, brine.rho_kgm3, &b,
	                                        &warn),
	                 RW_OK);
	assert_int_equal(warn, 0);
	assert_rel(b.rho_kgm3, 0.78 * 2650.0 + 0.22 * brine.rho_kgm3, 1e-15);
	assert_int_equal(rw_rock_fluid_subst(b.vp_ms, b.vs_ms, b.rho_kgm3, 0.22,
	                                     36.6e9, brine.k_pa, brine.rho_kgm3,
	                                     gas.k_pa, gas.rho_kgm3, &g, &warn),
	                 RW_OK);
	assert_true(g.vp_ms < b.vp_ms);
	assert_true(g.rho_kgm3 < b.rho_kgm3);
	assert_true(g.vp_ms * g.rho_kgm3 < b.vp_ms * b.rho_kgm3);
	assert_true(g.vs_ms > b.vs_ms && g.vs_ms < 1.1 * b.vs_ms);
	assert_rel(g.mu_pa, b.mu_pa, 1e-12);
	assert_rel(g.k_dry_pa, 8e9, 1e-10);

	assert_int_equal(rw_rock_gassmann_frame(8e9, 7e9, 0.22, 36.6e9, 2650.0,
	                                        gas.k_pa, gas.rho_kgm3, &g2,
	                                        &warn),
	                 RW_OK);
	assert_rel(g.vp_ms, g2.vp_ms, 1e-10);
	assert_rel(g.vs_ms, g2.vs_ms, 1e-12);
	assert_rel(g.rho_kgm3, g2.rho_kgm3, 1e-12);

	/* brine -> brine is the identity */
	assert_int_equal(rw_rock_fluid_subst(b.vp_ms, b.vs_ms, b.rho_kgm3, 0.22,
	                                     36.6e9, brine.k_pa, brine.rho_kgm3,
	                                     brine.k_pa, brine.rho_kgm3, &g,
	                                     &warn),
	                 RW_OK);
	assert_rel(g.vp_ms, b.vp_ms, 1e-12);
}

/* Warnings: low porosity (< RW_ROCK_PHI_LOW), a negative K_dry (a rock
 * too soft for its fluid and mineral) and K_dry > K_min (a saturated rock
 * stiffer than Gassmann allows). */
static void test_warnings(void **state)
{
	rw_rock_subst s;
	unsigned warn;
	double k;

	(void)state;
	assert_int_equal(
	    rw_rock_gassmann_sat(30e9, 36.6e9, 2.5e9, 0.03, &k, &warn), RW_OK);
	assert_int_equal(warn, RW_ROCK_WARN_PHI_LOW);
	assert_int_equal(
	    rw_rock_gassmann_sat(20e9, 36.6e9, 2.5e9, 0.05, &k, &warn), RW_OK);
	assert_int_equal(warn, 0);
	/* K1 = 2000 * 1500^2 = 4.5e9 is below the Reuss value of quartz and
	 * brine at phi 0.3 (1/(0.3/2.7e9 + 0.7/36.6e9) = 7.7e9): K_dry < 0 */
	assert_int_equal(rw_rock_fluid_subst(1500.0, 0.0, 2000.0, 0.3, 36.6e9,
	                                     2.7e9, 1050.0, 0.05e9, 150.0, &s,
	                                     &warn),
	                 RW_ERANGE);
	assert_int_equal(
	    rw_rock_gassmann_dry(4.5e9, 36.6e9, 2.7e9, 0.3, &k, &warn), RW_OK);
	assert_true(k < 0.0);
	assert_true(warn & RW_ROCK_WARN_KDRY_NEG);
	/* K_sat 40 GPa above quartz's 36.6 GPa: K_dry = 112.52 / 2.8209 GPa */
	assert_int_equal(
	    rw_rock_gassmann_dry(40.0e9, 36.6e9, 2.5e9, 0.2, &k, &warn), RW_OK);
	assert_true(k > 36.6e9);
	assert_true(warn & RW_ROCK_WARN_KDRY_GT_KMIN);
}

static void test_errors(void **state)
{
	static const double badphi[] = {0.0, 1.0, -0.1, 1.2, NAN};
	rw_rock_subst s;
	unsigned warn;
	double k = 0.0;
	size_t i;

	(void)state;
	for (i = 0; i < 5; i++) {
		assert_int_equal(rw_rock_gassmann_sat(8e9, 36.6e9, 2.5e9,
		                                      badphi[i], &k, &warn),
		                 RW_EDOM);
		assert_true(isnan(k));
		assert_int_equal(rw_rock_gassmann_dry(12e9, 36.6e9, 2.5e9,
		                                      badphi[i], &k, &warn),
		                 RW_EDOM);
		assert_int_equal(
		    rw_rock_fluid_subst(3000, 1600, 2250, badphi[i], 36.6e9,
		                        2.7e9, 1050, 0.05e9, 150, &s, &warn),
		    RW_EDOM);
		assert_subst_nan(&s);
		assert_int_equal(rw_rock_gassmann_frame(8e9, 7e9, badphi[i],
		                                        36.6e9, 2650, 2.5e9,
		                                        1050, &s, &warn),
		                 RW_EDOM);
		assert_subst_nan(&s);
	}
	assert_int_equal(rw_rock_gassmann_sat(8e9, 36.6e9, -1.0, 0.2, &k, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_rock_gassmann_sat(8e9, 0.0, 2.5e9, 0.2, &k, NULL),
	                 RW_EDOM);
	assert_int_equal(
	    rw_rock_gassmann_dry(-1.0, 36.6e9, 2.5e9, 0.2, &k, NULL), RW_EDOM);
	/* vp^2 < 4/3 vs^2: negative bulk modulus */
	assert_int_equal(rw_rock_fluid_subst(2000, 1800, 2250, 0.2, 36.6e9,
	                                     2.7e9, 1050, 0.05e9, 150, &s,
	                                     NULL),
	                 RW_EDOM);
	assert_subst_nan(&s);
	assert_int_equal(rw_rock_fluid_subst(3000, 1600, -2250, 0.2, 36.6e9,
	                                     2.7e9, 1050, 0.05e9, 150, &s,
	                                     NULL),
	                 RW_EDOM);
	/* new density would be negative: 900 + 0.9 (1 - 1050) < 0 */
	assert_int_equal(rw_rock_fluid_subst(3000, 1600, 900, 0.9, 36.6e9,
	                                     2.7e9, 1050, 2.7e9, 1.0, &s, NULL),
	                 RW_ERANGE);
	assert_subst_nan(&s);
	assert_int_equal(rw_rock_gassmann_frame(-1.0, 7e9, 0.2, 36.6e9, 2650,
	                                        2.5e9, 1050, &s, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_rock_gassmann_frame(8e9, 7e9, 0.2, 36.6e9, 2650,
	                                        0.0, 1050, &s, NULL),
	                 RW_EDOM);
}

/* rw_rock_fluid_subst runs the Gassmann dry and saturated steps inline
 * (an optimisation): status, warnings and all six outputs must be those
 * composed from the public rw_rock_gassmann_dry and _sat, to the bit,
 * over valid rocks and ones whose dry frame comes out negative, above the
 * mineral or impossible. An equivalence check; the physics is above. */
static void test_subst_inline_bits(void **state)
{
	uint64_t s = 99;
	(void)state;
	for (int i = 0; i < 200000; i++) {
		double x[6];
		for (int j = 0; j < 6; j++) {
			s = s * 6364136223846793005u + 1442695040888963407u;
			x[j] = (double)(s >> 11) / 9007199254740992.0;
		}
		double vp = 1500 + 5000 * x[0], vs = vp * (0.3 + 0.4 * x[1]);
		double rho = 1800 + 1000 * x[2], phi = 0.01 + 0.45 * x[3];
		double kmin = 20e9 + 60e9 * x[4], kfo = 2.8e9,
		       kfn = 0.02e9 + 3e9 * x[5];
		double rfo = 1030, rfn = 100 + 900 * x[5];
		rw_rock_subst o;
		unsigned w = 77, w1 = 0, w2 = 0;
		int st = rw_rock_fluid_subst(vp, vs, rho, phi, kmin, kfo, rfo,
		                             kfn, rfn, &o, &w);
		double mu = rho * vs * vs, k1 = rho * vp * vp - 4.0 / 3.0 * mu;
		double kd = NAN, k2 = NAN, rho2, m;
		int want = k1 > 0.0 ? RW_OK : RW_EDOM;

		if (want == RW_OK)
			want =
			    rw_rock_gassmann_dry(k1, kmin, kfo, phi, &kd, &w1);
		if (want == RW_OK)
			want =
			    rw_rock_gassmann_sat(kd, kmin, kfn, phi, &k2, &w2);
		rho2 = rho + phi * (rfn - rfo);
		m = k2 + 4.0 / 3.0 * mu;
		if (want == RW_OK &&
		    (!(k2 > 0.0) || !(m > 0.0) || !(rho2 > 0.0)))
			want = RW_ERANGE;
		assert_int_equal(st, want);
		assert_int_equal(w, w1 | w2);
		if (want != RW_OK) {
			assert_true(isnan(o.vp_ms) && isnan(o.k_dry_pa));
			continue;
		}
		double e[6] = {
		    sqrt(m / rho2), sqrt(mu / rho2), rho2, k2, mu, kd};
		assert_memory_equal(&o.vp_ms, &e[0], sizeof(double));
		assert_memory_equal(&o.vs_ms, &e[1], sizeof(double));
		assert_memory_equal(&o.rho_kgm3, &e[2], sizeof(double));
		assert_memory_equal(&o.k_sat_pa, &e[3], sizeof(double));
		assert_memory_equal(&o.mu_pa, &e[4], sizeof(double));
		assert_memory_equal(&o.k_dry_pa, &e[5], sizeof(double));
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_round_trip),
	    cmocka_unit_test(test_limits),
	    cmocka_unit_test(test_worked_example),
	    cmocka_unit_test(test_gas_effect),
	    cmocka_unit_test(test_warnings),
	    cmocka_unit_test(test_errors),
	    cmocka_unit_test(test_subst_inline_bits),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
