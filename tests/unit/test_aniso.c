/* Unit tests of the VTI anisotropy functions (daemon/core/aniso.c):
 * Thomsen parameters against the exact phase velocities of the
 * Christoffel equation, the inverse and its root choice, round trips, the
 * isotropic limit, Ruger's PP coefficient, and the error cases. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/aniso.h"
#include "rockwire/reflect.h"
#include "rockwire/status.h"

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static rw_aniso_thomsen thom(double vp, double vs, double rho, double eps,
                             double delta, double gamma)
{
	rw_aniso_thomsen t;

	t.vp0_ms = vp;
	t.vs0_ms = vs;
	t.rho_kgm3 = rho;
	t.epsilon = eps;
	t.delta = delta;
	t.gamma = gamma;
	return t;
}

/* Exact qP and SH phase velocities of a VTI medium for a phase angle th
 * from the symmetry axis: the Christoffel equation in the x-z plane,
 * rho v^2 = eigenvalues of [[C11 s^2 + C44 c^2, (C13 + C44) s c],
 * [(C13 + C44) s c, C44 s^2 + C33 c^2]] (qP the larger), and
 * rho v_SH^2 = C66 s^2 + C44 c^2 (Thomsen 1986, eqs. 2-4; a textbook
 * result of anisotropic elasticity). */
static double v_qp(const rw_aniso_vti *c, double rho, double th)
{
	double s = sin(th), co = cos(th);
	double g11 = c->c11_pa * s * s + c->c44_pa * co * co;
	double g33 = c->c44_pa * s * s + c->c33_pa * co * co;
	double g13 = (c->c13_pa + c->c44_pa) * s * co;

	return sqrt(
	    0.5 *
	    (g11 + g33 + sqrt((g11 - g33) * (g11 - g33) + 4 * g13 * g13)) /
	    rho);
}

static double v_sh(const rw_aniso_vti *c, double rho, double th)
{
	double s = sin(th), co = cos(th);

	return sqrt((c->c66_pa * s * s + c->c44_pa * co * co) / rho);
}

/* A random stable VTI stiffness (shale-like ranges, invented). */
static rw_aniso_vti rand_vti(uint64_t *s, double *rho)
{
	rw_aniso_vti c;
	rw_aniso_thomsen t;

	do {
		/* One draw per statement, in the order gcc evaluated the
		 * arguments of one call (C leaves it unspecified). */
		double gamma = urand(s, -0.1, 0.4);
		double delta = urand(s, -0.2, 0.3);
		double eps = urand(s, -0.1, 0.4);
		double rho_kgm3 = urand(s, 2000, 2700);
		double vp = urand(s, 2000.0, 5000.0);

		t = thom(vp, 0.0, rho_kgm3, eps, delta, gamma);
		t.vs0_ms = t.vp0_ms * urand(s, 0.3, 0.65);
	} while (rw_aniso_stiff_from_thomsen(&t, &c) != RW_OK);
	*rho = t.rho_kgm3;
	return c;
}

/* Isotropic stiffness (C11 = C33 = lambda + 2 mu, C44 = C66 = mu,
 * C13 = lambda) gives epsilon = delta = gamma = 0 and the isotropic
 * velocities (Thomsen 1986, sec. 2); the inverse at zero anisotropy gives
 * C13 = lambda, the root continuous with the isotropic medium. */
static void test_isotropic(void **state)
{
	double rho = 2400.0, vp = 3500.0, vs = 1900.0;
	double mu = rho * vs * vs, lam = rho * vp * vp - 2.0 * mu;
	rw_aniso_vti c = {lam + 2.0 * mu, lam, lam + 2.0 * mu, mu, mu}, b;
	rw_aniso_thomsen t;

	(void)state;
	assert_int_equal(rw_aniso_thomsen_from_stiff(&c, rho, &t), RW_OK);
	assert_true(fabs(t.epsilon) < 1e-15 && fabs(t.gamma) < 1e-15);
	assert_true(fabs(t.delta) < 1e-15);
	assert_true(fabs(t.vp0_ms - vp) < 1e-9 && fabs(t.vs0_ms - vs) < 1e-9);
	assert_true(t.rho_kgm3 == rho);
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &b), RW_OK);
	assert_true(fabs(b.c13_pa / lam - 1.0) < 1e-12);
	assert_true(fabs(b.c11_pa / c.c11_pa - 1.0) < 1e-14);
	assert_true(fabs(b.c66_pa / mu - 1.0) < 1e-14);
}

/* The meaning of the parameters, checked against exact phase velocities
 * (Thomsen 1986, eqs. 8a-8c and 16-17): horizontal qP velocity is
 * vp0 sqrt(1 + 2 epsilon), horizontal SH velocity is vs0 sqrt(1 + 2
 * gamma), and near the axis v_qP = vp0 (1 + delta sin^2 + O(sin^4)) with
 * the exact delta. Checked at theta = 1e-3 rad (truncation ~1e-6). */
static void test_thomsen_meaning(void **state)
{
	uint64_t s = 1;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		double rho, th = 1e-3, sn = sin(th);
		rw_aniso_vti c = rand_vti(&s, &rho);
		rw_aniso_thomsen t;

		assert_int_equal(rw_aniso_thomsen_from_stiff(&c, rho, &t),
		                 RW_OK);
		assert_true(fabs(v_qp(&c, rho, 0.0) / t.vp0_ms - 1.0) < 1e-14);
		assert_true(fabs(v_sh(&c, rho, 0.0) / t.vs0_ms - 1.0) < 1e-14);
		assert_true(fabs(v_qp(&c, rho, M_PI_2) /
		                     (t.vp0_ms * sqrt(1.0 + 2.0 * t.epsilon)) -
		                 1.0) < 1e-14);
		assert_true(fabs(v_sh(&c, rho, M_PI_2) /
		                     (t.vs0_ms * sqrt(1.0 + 2.0 * t.gamma)) -
		                 1.0) < 1e-14);
		assert_true(
		    fabs((v_qp(&c, rho, th) / t.vp0_ms - 1.0) / (sn * sn) -
		         t.delta) < 1e-5);
	}
}

/* Round trips: Thomsen -> stiffness -> Thomsen and stiffness -> Thomsen
 * -> stiffness, to rounding. */
static void test_round_trip(void **state)
{
	uint64_t s = 2;
	int i;

	(void)state;
	for (i = 0; i < 1000; i++) {
		double rho;
		rw_aniso_vti c = rand_vti(&s, &rho), c2;
		rw_aniso_thomsen t, t2;
		double m = c.c33_pa;

		assert_int_equal(rw_aniso_thomsen_from_stiff(&c, rho, &t),
		                 RW_OK);
		assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c2), RW_OK);
		assert_true(fabs(c2.c11_pa - c.c11_pa) < 1e-12 * m);
		assert_true(fabs(c2.c13_pa - c.c13_pa) < 1e-12 * m);
		assert_true(fabs(c2.c33_pa - c.c33_pa) < 1e-12 * m);
		assert_true(fabs(c2.c44_pa - c.c44_pa) < 1e-12 * m);
		assert_true(fabs(c2.c66_pa - c.c66_pa) < 1e-12 * m);
		assert_int_equal(rw_aniso_thomsen_from_stiff(&c2, rho, &t2),
		                 RW_OK);
		assert_true(fabs(t2.epsilon - t.epsilon) < 1e-12);
		assert_true(fabs(t2.delta - t.delta) < 1e-12);
		assert_true(fabs(t2.gamma - t.gamma) < 1e-12);
		assert_true(fabs(t2.vp0_ms / t.vp0_ms - 1.0) < 1e-14);
		assert_true(fabs(t2.vs0_ms / t.vs0_ms - 1.0) < 1e-14);
	}
}

/* The root of C13 is the one with C13 + C44 >= 0 (continuous with the
 * isotropic medium); a stiffness with C13 < -C44 has a Thomsen delta but
 * is not given back by the inverse (documented). */
static void test_c13_root(void **state)
{
	rw_aniso_vti c = {30e9, -12e9, 25e9, 8e9, 9e9}, b;
	rw_aniso_thomsen t;

	(void)state;
	assert_int_equal(rw_aniso_vti_check(&c), RW_OK);
	assert_int_equal(rw_aniso_thomsen_from_stiff(&c, 2400.0, &t), RW_OK);
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &b), RW_OK);
	assert_true(b.c13_pa + b.c44_pa >= 0.0);
	/* both roots give the same delta: C13 + C44 = +/- 4e9 */
	assert_true(fabs(b.c13_pa - (4e9 - 8e9)) < 1e-3);
}

/* Ruger 1997 with no anisotropy is the isotropic three-term form: within
 * second-order terms of rw_reflect_shuey3 (impedance and modulus ratios in
 * place of their linearised sums; < 2e-4 at 5 % contrasts up to 30
 * degrees) and within 2e-3 of the exact coefficient. */
static void test_ruger_isotropic(void **state)
{
	uint64_t s = 3;
	int i, j;

	(void)state;
	for (i = 0; i < 1000; i++) {
		/* One draw per statement: C leaves the order in which
		 * arguments are evaluated unspecified (gcc and clang differ).
		 * This is the order gcc used, so the sample set is the one
		 * the bounds below were checked on. */
		double vp = urand(&s, 2000.0, 5000.0);
		double rho = urand(&s, 2000.0, 2600.0);
		double vs = vp * urand(&s, 0.3, 0.6);
		rw_aniso_thomsen u = thom(vp, vs, rho, 0, 0, 0);
		rw_aniso_thomsen l = u;
		rw_reflect_medium mu, ml;

		l.vp0_ms *= 1.0 + urand(&s, -0.05, 0.05);
		l.vs0_ms *= 1.0 + urand(&s, -0.05, 0.05);
		l.rho_kgm3 *= 1.0 + urand(&s, -0.05, 0.05);
		mu.vp_ms = u.vp0_ms;
		mu.vs_ms = u.vs0_ms;
		mu.rho_kgm3 = u.rho_kgm3;
		ml.vp_ms = l.vp0_ms;
		ml.vs_ms = l.vs0_ms;
		ml.rho_kgm3 = l.rho_kgm3;
		for (j = 0; j <= 30; j += 5) {
			double th = j * M_PI / 180.0, r, r3;
			rw_reflect_pcoefs ex;

			assert_int_equal(rw_aniso_ruger_pp(&u, &l, th, &r),
			                 RW_OK);
			assert_int_equal(rw_reflect_shuey3(&mu, &ml, th, &r3),
			                 RW_OK);
			assert_int_equal(
			    rw_reflect_zoeppritz(&mu, &ml, th, &ex), RW_OK);
			assert_true(fabs(r - r3) < 2e-4);
			assert_true(fabs(r - ex.rpp.re) < 2e-3);
		}
	}
}

/* The anisotropic terms: an isotropic medium over a VTI medium with the
 * same vertical velocities and density reflects only through the angle
 * dependence of the lower P velocity. The weak-contrast coefficient of a
 * velocity contrast, dv/(2 v cos^2) (Aki & Richards 1980, eq. 5.44), with
 * the exact qP phase velocity of the lower medium at that angle, agrees
 * with Ruger's 1/2 delta sin^2 + 1/2 epsilon sin^2 tan^2 to first order
 * in the anisotropy (within 1e-4 for |epsilon|, |delta| <= 0.03 up to 30
 * degrees; the terms themselves reach 4e-3). */
static void test_ruger_anisotropic(void **state)
{
	uint64_t s = 4;
	int i, j;

	(void)state;
	for (i = 0; i < 500; i++) {
		/* One draw per statement: C leaves the order in which
		 * arguments are evaluated unspecified (gcc and clang differ).
		 * This is the order gcc used, so the sample set is the one
		 * the bounds below were checked on. */
		double vp = urand(&s, 2000.0, 5000.0);
		double rho = urand(&s, 2000.0, 2600.0);
		double vs = vp * urand(&s, 0.3, 0.6);
		rw_aniso_thomsen u = thom(vp, vs, rho, 0, 0, 0);
		rw_aniso_thomsen l = u;
		rw_aniso_vti c;

		l.epsilon = urand(&s, -0.03, 0.03);
		l.delta = urand(&s, -0.03, 0.03);
		l.gamma = urand(&s, -0.03, 0.03);
		assert_int_equal(rw_aniso_stiff_from_thomsen(&l, &c), RW_OK);
		for (j = 1; j <= 30; j++) {
			double th = j * M_PI / 180.0, r, v, h;

			v = v_qp(&c, l.rho_kgm3, th);
			h = (v - vp) / (0.5 * (v + vp)) /
			    (2.0 * cos(th) * cos(th));
			assert_int_equal(rw_aniso_ruger_pp(&u, &l, th, &r),
			                 RW_OK);
			assert_true(fabs(r - h) < 1e-4);
			/* and the reverse interface changes sign to first order
			 */
			assert_int_equal(rw_aniso_ruger_pp(&l, &u, th, &r),
			                 RW_OK);
			assert_true(fabs(r + h) < 1e-4);
		}
	}
}

/* A fluid (vs0 = 0, isotropic) over a VTI medium is accepted; a
 * "fluid" with anisotropy is not. */
static void test_ruger_fluid(void **state)
{
	rw_aniso_thomsen w = thom(1500.0, 0.0, 1030.0, 0, 0, 0);
	rw_aniso_thomsen sh = thom(2600.0, 1100.0, 2350.0, 0.15, 0.05, 0.2);
	double r, z1 = 1500.0 * 1030.0, z2 = 2600.0 * 2350.0;

	(void)state;
	assert_int_equal(rw_aniso_ruger_pp(&w, &sh, 0.0, &r), RW_OK);
	assert_true(fabs(r - (z2 - z1) / (z2 + z1)) < 1e-15);
	w.delta = 0.1;
	assert_int_equal(rw_aniso_ruger_pp(&w, &sh, 0.2, &r), RW_EDOM);
	assert_true(isnan(r));
}

static int vti_nan(const rw_aniso_vti *c)
{
	return isnan(c->c11_pa) && isnan(c->c13_pa) && isnan(c->c33_pa) &&
	       isnan(c->c44_pa) && isnan(c->c66_pa);
}

/* Errors: impossible stiffnesses and parameters give RW_EDOM, inverse
 * results that are not positive definite RW_ERANGE, with NaN outputs. */
static void test_errors(void **state)
{
	rw_aniso_vti bad[] = {
	    {30e9, 10e9, 25e9, 0.0, 9e9},  /* C44 = 0 */
	    {30e9, 10e9, 25e9, 8e9, -1e9}, /* C66 < 0 */
	    {8e9, 1e9, 25e9, 8e9, 9e9},    /* C11 < C66 */
	    {30e9, 30e9, 25e9, 8e9, 9e9},  /* C13^2 > C33 (C11 - C66) */
	    {30e9, 10e9, 0.0, 8e9, 9e9},   /* C33 = 0 */
	    {NAN, 10e9, 25e9, 8e9, 9e9},
	};
	rw_aniso_vti slow = {30e9, 1e9, 8e9, 9e9, 9e9}; /* C33 < C44 */
	rw_aniso_vti ok = {30e9, 10e9, 25e9, 8e9, 9e9}, c;
	rw_aniso_thomsen t, good = thom(3000, 1500, 2300, 0.1, 0.05, 0.1);
	double r;
	size_t i;

	(void)state;
	for (i = 0; i < sizeof(bad) / sizeof(bad[0]); i++) {
		assert_int_equal(rw_aniso_vti_check(&bad[i]), RW_EDOM);
		assert_int_equal(rw_aniso_thomsen_from_stiff(&bad[i], 2300, &t),
		                 RW_EDOM);
		assert_true(isnan(t.epsilon) && isnan(t.delta) &&
		            isnan(t.vp0_ms));
	}
	assert_int_equal(rw_aniso_vti_check(&slow), RW_OK);
	assert_int_equal(rw_aniso_thomsen_from_stiff(&slow, 2300, &t), RW_EDOM);
	assert_int_equal(rw_aniso_thomsen_from_stiff(&ok, 0.0, &t), RW_EDOM);
	assert_int_equal(rw_aniso_thomsen_from_stiff(&ok, NAN, &t), RW_EDOM);
	assert_int_equal(rw_aniso_thomsen_from_stiff(NULL, 2300, &t), RW_EDOM);

	t = good;
	t.vs0_ms = 3000.0; /* vs0 = vp0 */
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_EDOM);
	assert_true(vti_nan(&c));
	t = good;
	t.vs0_ms = 0.0;
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_EDOM);
	t = good;
	t.rho_kgm3 = -1.0;
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_EDOM);
	t = good;
	t.delta = -0.5; /* below -(C33 - C44)/(2 C33) = -0.375: no real C13 */
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_EDOM);
	assert_true(vti_nan(&c));
	t = good;
	t.epsilon = -0.45; /* C11 = 0.1 C33 < C66: not positive definite */
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_ERANGE);
	assert_true(vti_nan(&c));
	t = good;
	t.gamma = INFINITY;
	assert_int_equal(rw_aniso_stiff_from_thomsen(&t, &c), RW_EDOM);

	assert_int_equal(rw_aniso_ruger_pp(&good, &good, -0.1, &r), RW_EDOM);
	assert_true(isnan(r));
	assert_int_equal(rw_aniso_ruger_pp(&good, &good, M_PI_2, &r), RW_EDOM);
	t = good;
	t.epsilon = -0.45;
	assert_int_equal(rw_aniso_ruger_pp(&good, &t, 0.2, &r), RW_ERANGE);
	assert_true(isnan(r));
	assert_int_equal(rw_aniso_ruger_pp(NULL, &good, 0.2, &r), RW_EDOM);
	assert_int_equal(rw_aniso_ruger_pp(&good, &good, 0.2, NULL), RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_isotropic),
	    cmocka_unit_test(test_thomsen_meaning),
	    cmocka_unit_test(test_round_trip),
	    cmocka_unit_test(test_c13_root),
	    cmocka_unit_test(test_ruger_isotropic),
	    cmocka_unit_test(test_ruger_anisotropic),
	    cmocka_unit_test(test_ruger_fluid),
	    cmocka_unit_test(test_errors),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
