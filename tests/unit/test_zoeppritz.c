/* Unit tests of the exact P-wave reflection/transmission solution
 * (daemon/core/zoeppritz.c): energy conservation, normal and grazing
 * incidence, critical angles, total reflection, reciprocity, the fluid
 * limits of the solid solution, and the error cases. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"

/* Small deterministic generator (64-bit LCG, Knuth's MMIX constants) so
 * that a failure can be reproduced. */
static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static rw_reflect_medium med(double vp, double vs, double rho)
{
	rw_reflect_medium m;

	m.vp_ms = vp;
	m.vs_ms = vs;
	m.rho_kgm3 = rho;
	return m;
}

static rw_reflect_medium rand_solid(uint64_t *s, double gmin, double gmax)
{
	/* One draw per statement, in the order gcc evaluated the arguments
	 * of one call (C leaves it unspecified; clang differs). */
	double vp = urand(s, 1500.0, 6000.0);
	double rho = urand(s, 1800.0, 2900.0);
	double vs = vp * urand(s, gmin, gmax);

	return med(vp, vs, rho);
}

static double abs2(rw_reflect_cplx c)
{
	return c.re * c.re + c.im * c.im;
}

/* Real part of the vertical slowness (zero for an evanescent wave). */
static double qre(double v, double p)
{
	double s = 1.0 / (v * v) - p * p;

	return s > 0.0 ? sqrt(s) : 0.0;
}

/* Vertical energy flux balance, reflected + transmitted over incident,
 * minus one. The flux of a plane wave through the interface is
 * proportional to rho v^2 q |A|^2 (Aki & Richards 1980, sec. 5.2.5: the
 * energy-normalised coefficients carry sqrt(rho v cos)); evanescent waves
 * carry none. */
static double flux_residual(const rw_reflect_medium *u,
                            const rw_reflect_medium *l, double th,
                            const rw_reflect_pcoefs *c)
{
	double p = sin(th) / u->vp_ms;
	double in = u->rho_kgm3 * u->vp_ms * u->vp_ms * qre(u->vp_ms, p);
	double out = in * abs2(c->rpp);

	if (u->vs_ms > 0.0)
		out += u->rho_kgm3 * u->vs_ms * u->vs_ms * qre(u->vs_ms, p) *
		       abs2(c->rps);
	out +=
	    l->rho_kgm3 * l->vp_ms * l->vp_ms * qre(l->vp_ms, p) * abs2(c->tpp);
	if (l->vs_ms > 0.0)
		out += l->rho_kgm3 * l->vs_ms * l->vs_ms * qre(l->vs_ms, p) *
		       abs2(c->tps);
	return out / in - 1.0;
}

/* Physics: energy is conserved at a welded interface (Aki & Richards
 * 1980, sec. 5.2.5), before and after the critical angles, for solid and
 * fluid media, to 1e-9. */
static void test_energy(void **state)
{
	uint64_t s = 12345;
	int i, kind;

	(void)state;
	for (kind = 0; kind < 4; kind++) {
		for (i = 0; i < 2000; i++) {
			rw_reflect_medium u = rand_solid(&s, 0.3, 0.7);
			rw_reflect_medium l = rand_solid(&s, 0.3, 0.7);
			double th = urand(&s, 0.0, 1.55);
			rw_reflect_pcoefs c;

			if (kind & 1)
				u.vs_ms = 0.0;
			if (kind & 2)
				l.vs_ms = 0.0;
			assert_int_equal(rw_reflect_zoeppritz(&u, &l, th, &c),
			                 RW_OK);
			assert_true(fabs(flux_residual(&u, &l, th, &c)) < 1e-9);
		}
	}
}

/* Poisson's ratio below zero (vs up to 0.85 vp) is unusual but possible:
 * accepted, and energy is still conserved. */
static void test_negative_poisson(void **state)
{
	rw_reflect_medium u = med(3000.0, 2500.0, 2300.0);
	rw_reflect_medium l = med(4000.0, 2000.0, 2500.0);
	rw_reflect_pcoefs c;
	double th;

	(void)state;
	for (th = 0.0; th < 1.57; th += 0.05) {
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, th, &c), RW_OK);
		assert_true(fabs(flux_residual(&u, &l, th, &c)) < 1e-9);
	}
}

/* Normal incidence: Rpp = (Z2 - Z1)/(Z2 + Z1), Tpp = 2 Z1/(Z1 + Z2) for
 * displacement, no converted waves (Aki & Richards 1980, sec. 5.2; a fact
 * of the trade); the solve just off normal incidence tends to it. */
static void test_normal_incidence(void **state)
{
	uint64_t s = 777;
	int i;

	(void)state;
	for (i = 0; i < 200; i++) {
		rw_reflect_medium u = rand_solid(&s, 0.3, 0.7);
		rw_reflect_medium l = rand_solid(&s, 0.3, 0.7);
		rw_reflect_pcoefs c, near;
		double z1, z2;

		if (i % 3 == 1)
			u.vs_ms = 0.0;
		if (i % 5 == 2)
			l.vs_ms = 0.0;
		z1 = u.rho_kgm3 * u.vp_ms;
		z2 = l.rho_kgm3 * l.vp_ms;
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, 0.0, &c), RW_OK);
		assert_true(fabs(c.rpp.re - (z2 - z1) / (z2 + z1)) < 1e-13);
		assert_true(fabs(c.tpp.re - 2.0 * z1 / (z1 + z2)) < 1e-13);
		assert_true(fabs(c.rpp.im) + fabs(c.tpp.im) < 1e-15);
		assert_true(abs2(c.rps) + abs2(c.tps) < 1e-30);
		/* the closed form taken at 0 is the limit of the solve of
		 * each branch (solid and fluid on either side) */
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, 1e-8, &near),
		                 RW_OK);
		assert_true(fabs(near.rpp.re - c.rpp.re) < 1e-12);
		assert_true(fabs(near.tpp.re - c.tpp.re) < 1e-12);
		assert_true(abs2(near.rps) + abs2(near.tps) < 1e-14);
	}
}

/* Grazing incidence (theta = 90 degrees) on solids and fluids gives
 * Rpp = -1 and no transmitted wave (Aki & Richards 1980, sec. 5.2.4: the
 * numerator and denominator become equal and opposite; from memory). */
static void test_grazing(void **state)
{
	rw_reflect_medium u = med(2500.0, 1200.0, 2200.0);
	rw_reflect_medium l = med(3500.0, 1900.0, 2450.0);
	rw_reflect_medium w = med(1500.0, 0.0, 1030.0);
	rw_reflect_pcoefs c;

	(void)state;
	assert_int_equal(rw_reflect_zoeppritz(&u, &l, M_PI_2, &c), RW_OK);
	assert_true(fabs(c.rpp.re + 1.0) < 1e-12 && fabs(c.rpp.im) < 1e-12);
	assert_true(abs2(c.tpp) + abs2(c.tps) + abs2(c.rps) < 1e-24);
	assert_int_equal(rw_reflect_zoeppritz(&w, &l, M_PI_2, &c), RW_OK);
	assert_true(fabs(c.rpp.re + 1.0) < 1e-12 && fabs(c.rpp.im) < 1e-12);
}

/* Critical angles from Snell's law (sin = vp1/v2), +inf where none exists;
 * at a fluid-fluid interface Rpp = 1 exactly at the P critical angle, |Rpp|
 * < 1 before and = 1 after it (total reflection; Aki & Richards 1980, sec.
 * 5.2.4). */
static void test_critical_fluid_fluid(void **state)
{
	rw_reflect_medium u = med(1500.0, 0.0, 1000.0);
	rw_reflect_medium l = med(1800.0, 0.0, 1300.0);
	rw_reflect_pcoefs c;
	double cp, cs, th;

	(void)state;
	assert_int_equal(rw_reflect_critical_angles(&u, &l, &cp, &cs), RW_OK);
	assert_true(fabs(sin(cp) - 1500.0 / 1800.0) < 1e-15);
	assert_true(isinf(cs) && cs > 0.0);
	assert_int_equal(rw_reflect_zoeppritz(&u, &l, cp, &c), RW_OK);
	assert_true(fabs(c.rpp.re - 1.0) < 1e-7 && fabs(c.rpp.im) < 1e-7);
	for (th = 0.0; th < cp - 1e-6; th += 0.01) {
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, th, &c), RW_OK);
		assert_true(abs2(c.rpp) < 1.0);
		assert_true(fabs(c.rpp.im) < 1e-15);
	}
	for (th = cp + 1e-6; th < M_PI_2 - 1e-3; th += 0.01) {
		double q1 = cos(th) / 1500.0, pp = sin(th) / 1500.0;
		double b2 = sqrt(pp * pp - 1.0 / (1800.0 * 1800.0));

		assert_int_equal(rw_reflect_zoeppritz(&u, &l, th, &c), RW_OK);
		assert_true(fabs(abs2(c.rpp) - 1.0) < 1e-12);
		/* acoustic coefficient (rho2 q1 - rho1 q2)/(rho2 q1 + rho1 q2)
		 * with q2 = +i b2 (exp(-i w t), decaying downwards): its phase
		 * is -2 atan(rho1 b2 / (rho2 q1)), negative (Aki & Richards
		 * 1980, sec. 5.2.4) */
		assert_true(fabs(atan2(c.rpp.im, c.rpp.re) +
		                 2.0 * atan(1000.0 * b2 / (1300.0 * q1))) <
		            1e-9);
	}
	/* slower below: no critical angle */
	assert_int_equal(rw_reflect_critical_angles(&l, &u, &cp, &cs), RW_OK);
	assert_true(isinf(cp) && isinf(cs));
}

/* Fluid over a fast solid (vs2 > vp1): past the S critical angle
 * asin(vp1/vs2) both transmitted waves are evanescent and the fluid has
 * no S wave, so |Rpp| = 1; between the P and S critical angles the
 * transmitted S still carries energy and |Rpp| < 1 (Aki & Richards 1980,
 * sec. 5.2.4). Solid over solid past both critical angles: the reflected S
 * still propagates, so |Rpp| < 1 (energy goes into Rps). */
static void test_total_reflection(void **state)
{
	rw_reflect_medium w = med(1500.0, 0.0, 1030.0);
	rw_reflect_medium r = med(4500.0, 2500.0, 2600.0);
	rw_reflect_medium u = med(2000.0, 1000.0, 2200.0);
	rw_reflect_pcoefs c;
	double cp, cs, th;

	(void)state;
	assert_int_equal(rw_reflect_critical_angles(&w, &r, &cp, &cs), RW_OK);
	assert_true(fabs(sin(cp) - 1500.0 / 4500.0) < 1e-15);
	assert_true(fabs(sin(cs) - 1500.0 / 2500.0) < 1e-15);
	for (th = cp + 0.01; th < cs - 0.01; th += 0.01) {
		assert_int_equal(rw_reflect_zoeppritz(&w, &r, th, &c), RW_OK);
		assert_true(abs2(c.rpp) < 1.0 - 1e-6);
	}
	for (th = cs + 1e-6; th <= M_PI_2; th += 0.01) {
		assert_int_equal(rw_reflect_zoeppritz(&w, &r, th, &c), RW_OK);
		assert_true(fabs(abs2(c.rpp) - 1.0) < 1e-12);
	}
	assert_int_equal(rw_reflect_critical_angles(&u, &r, &cp, &cs), RW_OK);
	assert_true(fabs(sin(cs) - 2000.0 / 2500.0) < 1e-15);
	for (th = cs + 0.01; th < 1.5; th += 0.01) {
		assert_int_equal(rw_reflect_zoeppritz(&u, &r, th, &c), RW_OK);
		assert_true(abs2(c.rpp) < 1.0 - 1e-6);
		assert_true(abs2(c.rps) > 1e-6);
		assert_true(fabs(flux_residual(&u, &r, th, &c)) < 1e-9);
	}
}

/* Reciprocity (Aki & Richards 1980, sec. 5.2.6): at the same ray
 * parameter, the energy-normalised PP transmission coefficient is the same
 * for the path 1 -> 2 and 2 -> 1, i.e. Tpp12 rho2 vp2^2 q2 =
 * Tpp21 rho1 vp1^2 q1. Checked where both P waves propagate. */
static void test_reciprocity(void **state)
{
	uint64_t s = 4242;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u = rand_solid(&s, 0.3, 0.7);
		rw_reflect_medium l = rand_solid(&s, 0.3, 0.7);
		double vmax = fmax(u.vp_ms, l.vp_ms);
		double p = urand(&s, 0.0, 0.999) / vmax;
		double th1 = asin(p * u.vp_ms), th2 = asin(p * l.vp_ms);
		rw_reflect_pcoefs c12, c21;
		double f1, f2, lhs_re, lhs_im, rhs_re, rhs_im;

		if (i % 4 == 1)
			u.vs_ms = 0.0;
		if (i % 4 == 2)
			l.vs_ms = 0.0;
		assert_int_equal(rw_reflect_zoeppritz(&u, &l, th1, &c12),
		                 RW_OK);
		assert_int_equal(rw_reflect_zoeppritz(&l, &u, th2, &c21),
		                 RW_OK);
		f1 = u.rho_kgm3 * u.vp_ms * u.vp_ms * qre(u.vp_ms, p);
		f2 = l.rho_kgm3 * l.vp_ms * l.vp_ms * qre(l.vp_ms, p);
		lhs_re = c12.tpp.re * f2;
		lhs_im = c12.tpp.im * f2;
		rhs_re = c21.tpp.re * f1;
		rhs_im = c21.tpp.im * f1;
		assert_true(hypot(lhs_re - rhs_re, lhs_im - rhs_im) <=
		            1e-11 * hypot(lhs_re, lhs_im));
	}
}

/* The fluid reduced systems are the limit of the solid solution as the
 * shear velocity goes to zero (the converted wave's energy vanishes): the
 * explicit Aki & Richards 1980 formulas at vs = 1e-4 m/s must agree with
 * the 3x3 solution at vs = 0 for every coefficient that exists in both. */
static void test_fluid_limit(void **state)
{
	uint64_t s = 99;
	int i;

	(void)state;
	for (i = 0; i < 300; i++) {
		rw_reflect_medium u = rand_solid(&s, 0.3, 0.7);
		rw_reflect_medium l = rand_solid(&s, 0.3, 0.7);
		rw_reflect_medium uf = u, us = u, lf = l, ls = l;
		double th = urand(&s, 0.0, 1.5);
		rw_reflect_pcoefs a, b;

		uf.vs_ms = 0.0;
		us.vs_ms = 1e-4;
		assert_int_equal(rw_reflect_zoeppritz(&uf, &l, th, &a), RW_OK);
		assert_int_equal(rw_reflect_zoeppritz(&us, &l, th, &b), RW_OK);
		assert_true(hypot(a.rpp.re - b.rpp.re, a.rpp.im - b.rpp.im) <
		            1e-6);
		assert_true(hypot(a.tpp.re - b.tpp.re, a.tpp.im - b.tpp.im) <
		            1e-6);
		assert_true(hypot(a.tps.re - b.tps.re, a.tps.im - b.tps.im) <
		            1e-6);
		assert_true(a.rps.re == 0.0 && a.rps.im == 0.0);
		lf.vs_ms = 0.0;
		ls.vs_ms = 1e-4;
		assert_int_equal(rw_reflect_zoeppritz(&u, &lf, th, &a), RW_OK);
		assert_int_equal(rw_reflect_zoeppritz(&u, &ls, th, &b), RW_OK);
		assert_true(hypot(a.rpp.re - b.rpp.re, a.rpp.im - b.rpp.im) <
		            1e-6);
		assert_true(hypot(a.tpp.re - b.tpp.re, a.tpp.im - b.tpp.im) <
		            1e-6);
		assert_true(hypot(a.rps.re - b.rps.re, a.rps.im - b.rps.im) <
		            1e-6);
		assert_true(a.tps.re == 0.0 && a.tps.im == 0.0);
	}
}

/* No contrast, no reflection: identical media transmit everything. */
static void test_no_contrast(void **state)
{
	rw_reflect_medium m = med(3200.0, 1700.0, 2400.0);
	rw_reflect_pcoefs c;
	double th;

	(void)state;
	for (th = 0.0; th < 1.5; th += 0.1) {
		assert_int_equal(rw_reflect_zoeppritz(&m, &m, th, &c), RW_OK);
		assert_true(sqrt(abs2(c.rpp)) < 1e-14);
		assert_true(sqrt(abs2(c.rps)) < 1e-14);
		assert_true(fabs(c.tpp.re - 1.0) < 1e-14);
		assert_true(sqrt(abs2(c.tps)) < 1e-14);
	}
}

static int all_nan(const rw_reflect_pcoefs *c)
{
	return isnan(c->rpp.re) && isnan(c->rpp.im) && isnan(c->rps.re) &&
	       isnan(c->rps.im) && isnan(c->tpp.re) && isnan(c->tpp.im) &&
	       isnan(c->tps.re) && isnan(c->tps.im);
}

/* Impossible inputs give RW_EDOM and NaN outputs. */
static void test_errors(void **state)
{
	rw_reflect_medium ok = med(3000.0, 1500.0, 2300.0);
	rw_reflect_medium bad[] = {
	    med(0.0, 0.0, 2300.0),
	    med(-3000.0, 1500.0, 2300.0),
	    med(3000.0, -1.0, 2300.0),
	    med(3000.0, 1500.0, 0.0),
	    med(3000.0, 1500.0, -5.0),
	    med(NAN, 1500.0, 2300.0),
	    med(3000.0, INFINITY, 2300.0),
	    /* K = 0: vs = sqrt(3)/2 vp exactly, and beyond */
	    med(2000.0, 2000.0 * 0.86602540378443871, 2300.0),
	    med(3000.0, 3000.0, 2300.0),
	};
	rw_reflect_pcoefs c;
	double cp, cs, avg;
	size_t i;

	(void)state;
	for (i = 0; i < sizeof(bad) / sizeof(bad[0]); i++) {
		assert_int_equal(rw_reflect_medium_check(&bad[i]), RW_EDOM);
		assert_int_equal(rw_reflect_zoeppritz(&bad[i], &ok, 0.2, &c),
		                 RW_EDOM);
		assert_true(all_nan(&c));
		assert_int_equal(rw_reflect_zoeppritz(&ok, &bad[i], 0.2, &c),
		                 RW_EDOM);
		assert_true(all_nan(&c));
		assert_int_equal(
		    rw_reflect_critical_angles(&bad[i], &ok, &cp, &cs),
		    RW_EDOM);
		assert_true(isnan(cp) && isnan(cs));
	}
	assert_int_equal(rw_reflect_zoeppritz(&ok, &ok, -0.01, &c), RW_EDOM);
	assert_true(all_nan(&c));
	assert_int_equal(rw_reflect_zoeppritz(&ok, &ok, M_PI_2 + 1e-9, &c),
	                 RW_EDOM);
	assert_int_equal(rw_reflect_zoeppritz(&ok, &ok, NAN, &c), RW_EDOM);
	assert_int_equal(rw_reflect_zoeppritz(NULL, &ok, 0.1, &c), RW_EDOM);
	assert_int_equal(rw_reflect_zoeppritz(&ok, &ok, 0.1, NULL), RW_EDOM);
	assert_int_equal(rw_reflect_medium_check(NULL), RW_EDOM);
	/* average angle: past the P critical angle there is none */
	{
		rw_reflect_medium f = med(4000.0, 2000.0, 2500.0);

		assert_int_equal(rw_reflect_angle_average(&ok, &f, 1.0, &avg),
		                 RW_ERANGE);
		assert_true(isnan(avg));
		assert_int_equal(rw_reflect_angle_average(&ok, &f, 0.3, &avg),
		                 RW_OK);
		/* Snell: sin t2 = (4000/3000) sin 0.3 */
		assert_true(fabs(avg - 0.5 * (0.3 + asin(4.0 / 3.0 *
		                                         sin(0.3)))) < 1e-15);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_energy),
	    cmocka_unit_test(test_negative_poisson),
	    cmocka_unit_test(test_normal_incidence),
	    cmocka_unit_test(test_grazing),
	    cmocka_unit_test(test_critical_fluid_fluid),
	    cmocka_unit_test(test_total_reflection),
	    cmocka_unit_test(test_reciprocity),
	    cmocka_unit_test(test_fluid_limit),
	    cmocka_unit_test(test_no_contrast),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
