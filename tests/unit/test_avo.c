/* Unit tests of the linearised reflection coefficients, the AVO classes
 * (daemon/core/avo.c) and elastic impedance (daemon/core/impedance.c):
 * accuracy against the exact solution, the algebraic identities between
 * the published forms, their common normal-incidence limit, class
 * thresholds, and the error cases. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"

typedef int (*approx_fn)(const rw_reflect_medium *, const rw_reflect_medium *,
                         double, double *);

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

/* x scaled so that (x2 - x) / mean = c exactly. */
static double bump(double x, double c)
{
	return x * (1.0 + 0.5 * c) / (1.0 - 0.5 * c);
}

/* A random interface whose three relative contrasts are each at most
 * cmax in magnitude, with vs/vp of the upper medium in [gmin, gmax]. */
static void rand_pair(uint64_t *s, double cmax, double gmin, double gmax,
                      rw_reflect_medium *u, rw_reflect_medium *l)
{
	/* One draw per statement: C leaves the order in which arguments
	 * are evaluated unspecified (gcc and clang differ). This is the
	 * order gcc used, so the sample set is the one the bounds in the
	 * tests were checked on. */
	double vp = urand(s, 1500.0, 5500.0);
	double rho = urand(s, 1900.0, 2700.0);
	double vs = vp * urand(s, gmin, gmax);
	double c_rho, c_vs, c_vp;

	*u = med(vp, vs, rho);
	c_rho = urand(s, -cmax, cmax);
	c_vs = urand(s, -cmax, cmax);
	c_vp = urand(s, -cmax, cmax);
	*l = med(bump(u->vp_ms, c_vp), bump(u->vs_ms, c_vs),
	         bump(u->rho_kgm3, c_rho));
}

static double exact_rpp(const rw_reflect_medium *u, const rw_reflect_medium *l,
                        double th)
{
	rw_reflect_pcoefs c;

	assert_int_equal(rw_reflect_zoeppritz(u, l, th, &c), RW_OK);
	return c.rpp.re;
}

/* Aki & Richards 1980 eq. 5.44 is first order in the contrasts: for
 * contrasts up to 5 % and angles up to 30 degrees it is within 1e-3 of
 * the exact coefficient when vs/vp <= 0.5 (Poisson's ratio >= 1/3, most
 * clastics); for stiffer rock (vs/vp up to 0.7) the second-order error
 * reaches about 1.5e-3, so the bound there is 2e-3 (both measured against
 * the exact solution, which is itself checked against numpy). */
static void test_aki_richards_accuracy(void **state)
{
	uint64_t s = 31;
	int i, j;

	(void)state;
	for (i = 0; i < 4000; i++) {
		rw_reflect_medium u, l;
		int stiff = i & 1;
		double tol = stiff ? 2e-3 : 1e-3;

		rand_pair(&s, 0.05, stiff ? 0.5 : 0.3, stiff ? 0.7 : 0.5, &u,
		          &l);
		for (j = 0; j <= 30; j++) {
			double th = j * M_PI / 180.0, r;

			assert_int_equal(
			    rw_reflect_aki_richards(&u, &l, th, &r), RW_OK);
			assert_true(fabs(r - exact_rpp(&u, &l, th)) < tol);
		}
	}
}

/* Shuey 1985: the two-term form is A + B sin^2 and the three-term form
 * adds C (tan^2 - sin^2), with A, B, C the linearised terms written out
 * here from their definitions (Shuey 1985, in velocities). */
static void test_shuey_terms(void **state)
{
	uint64_t s = 5;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u, l;
		double a, b, c, r2, r3, th = urand(&s, 0.0, 1.2);
		double vp, vs, rho, dvp, dvs, drho, k2;

		rand_pair(&s, 0.3, 0.3, 0.5, &u, &l);
		vp = 0.5 * (u.vp_ms + l.vp_ms);
		vs = 0.5 * (u.vs_ms + l.vs_ms);
		rho = 0.5 * (u.rho_kgm3 + l.rho_kgm3);
		dvp = (l.vp_ms - u.vp_ms) / vp;
		dvs = (l.vs_ms - u.vs_ms) / vs;
		drho = (l.rho_kgm3 - u.rho_kgm3) / rho;
		k2 = vs * vs / (vp * vp);
		assert_int_equal(rw_reflect_shuey_terms(&u, &l, &a, &b, &c),
		                 RW_OK);
		assert_true(fabs(a - 0.5 * (dvp + drho)) < 1e-15);
		assert_true(fabs(b - (0.5 * dvp -
		                      2.0 * k2 * (drho + 2.0 * dvs))) < 1e-15);
		assert_true(fabs(c - 0.5 * dvp) < 1e-15);
		assert_int_equal(rw_reflect_shuey2(&u, &l, th, &r2), RW_OK);
		assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r3), RW_OK);
		assert_true(fabs(r2 - (a + b * sin(th) * sin(th))) < 1e-15);
		assert_true(fabs(r3 - (a + b * sin(th) * sin(th) +
		                       c * (tan(th) * tan(th) -
		                            sin(th) * sin(th)))) < 1e-14);
	}
}

/* Fatti et al. 1994 and Shuey's three-term form are the same
 * linearisation (Aki & Richards 1980 with vs^2 p^2 = K^2 sin^2) written
 * in different terms: at the same angle they agree to rounding. The
 * Fatti terms are Rp = A, Rs = (dvs/vs + drho/rho)/2, Rd = drho/rho. */
static void test_fatti_identity(void **state)
{
	uint64_t s = 8;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u, l;
		double rf, r3, a, rp, rs, rd, k, th = urand(&s, 0.0, 1.3);

		rand_pair(&s, 0.3, 0.3, 0.5, &u, &l);
		assert_int_equal(rw_reflect_fatti(&u, &l, th, &rf), RW_OK);
		assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r3), RW_OK);
		assert_true(fabs(rf - r3) < 1e-13 * (1.0 + fabs(r3)));
		assert_int_equal(
		    rw_reflect_fatti_terms(&u, &l, &rp, &rs, &rd, &k), RW_OK);
		assert_int_equal(rw_reflect_shuey_terms(&u, &l, &a, NULL, NULL),
		                 RW_OK);
		assert_true(fabs(rp - a) < 1e-15);
		assert_true(fabs(rd - (l.rho_kgm3 - u.rho_kgm3) /
		                          (0.5 * (u.rho_kgm3 + l.rho_kgm3))) <
		            1e-15);
		assert_true(fabs(2.0 * rs - rd -
		                 (l.vs_ms - u.vs_ms) /
		                     (0.5 * (u.vs_ms + l.vs_ms))) < 1e-14);
	}
}

/* The Gray et al. 1999 lambda-mu-rho and bulk-shear forms rewrite the
 * same linearisation in moduli: they differ from Shuey's three-term form
 * only at second order in the contrasts (dlambda/lambda is not exactly
 * the linear sum of dvp/vp, dvs/vs, drho/rho). With 1 % contrasts the
 * difference is below 2e-4 up to 40 degrees, and it shrinks about four
 * times when the contrasts are halved (second order). */
static void test_gray_forms(void **state)
{
	uint64_t s = 77;
	approx_fn fns[2] = {rw_reflect_gray_lmr, rw_reflect_gray_kmr};
	int i, f;

	(void)state;
	for (f = 0; f < 2; f++) {
		for (i = 0; i < 500; i++) {
			rw_reflect_medium u, l, lh;
			double th = urand(&s, 0.0, 40.0 * M_PI / 180.0);
			double rg, r3, rgh, r3h, e1, e2;

			/* vs/vp <= 0.6 keeps the mean lambda well away from 0
			 */
			rand_pair(&s, 0.01, 0.3, 0.6, &u, &l);
			assert_int_equal(fns[f](&u, &l, th, &rg), RW_OK);
			assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r3),
			                 RW_OK);
			e1 = fabs(rg - r3);
			assert_true(e1 < 2e-4);
			/* half the contrasts */
			lh = med(0.5 * (u.vp_ms + l.vp_ms),
			         0.5 * (u.vs_ms + l.vs_ms),
			         0.5 * (u.rho_kgm3 + l.rho_kgm3));
			assert_int_equal(fns[f](&u, &lh, th, &rgh), RW_OK);
			assert_int_equal(rw_reflect_shuey3(&u, &lh, th, &r3h),
			                 RW_OK);
			e2 = fabs(rgh - r3h);
			assert_true(e2 <= 0.3 * e1 + 1e-12);
		}
	}
}

/* Smith & Gidlow 1987 assume Gardner's density rho = a vp^(1/4)
 * (Gardner, Gardner & Gregory 1974): on media that obey it exactly they
 * agree with the three-term form to second order in the contrasts
 * (below 1e-4 for 2 % contrasts up to 35 degrees); on media that do not,
 * the density term is missing and the difference is first order. */
static void test_smith_gidlow(void **state)
{
	uint64_t s = 123;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u, l;
		double th = urand(&s, 0.0, 35.0 * M_PI / 180.0), rs, r3;

		rand_pair(&s, 0.02, 0.3, 0.7, &u, &l);
		u.rho_kgm3 = 310.0 * pow(u.vp_ms, 0.25);
		l.rho_kgm3 = 310.0 * pow(l.vp_ms, 0.25);
		assert_int_equal(rw_reflect_smith_gidlow(&u, &l, th, &rs),
		                 RW_OK);
		assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r3), RW_OK);
		assert_true(fabs(rs - r3) < 1e-4);
	}
	{
		/* density contrast against Gardner: 10 % lighter below */
		rw_reflect_medium u = med(3000.0, 1500.0, 2300.0);
		rw_reflect_medium l = med(3000.0, 1500.0, 2070.0);
		double rs, r3;

		assert_int_equal(rw_reflect_smith_gidlow(&u, &l, 0.0, &rs),
		                 RW_OK);
		assert_int_equal(rw_reflect_shuey3(&u, &l, 0.0, &r3), RW_OK);
		assert_true(rs == 0.0 && r3 < -0.04);
	}
}

/* Hilterman's Poisson form equals the Shuey two-term form at mean
 * Poisson ratio 1/3 (vp/vs = 2), where Shuey's 1985 gradient becomes
 * B = -A + dsigma/(1 - sigma)^2 (Shuey 1985 with A0 = -1; Hilterman
 * 2001, from memory), up to second-order terms (NI is the exact normal-
 * incidence coefficient, A its linearisation). Also: with no Poisson
 * contrast the coefficient is NI cos^2 exactly. */
static void test_hilterman(void **state)
{
	uint64_t s = 2024;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		double vp = urand(&s, 2000.0, 5000.0);
		rw_reflect_medium u = med(vp, vp / 2.0, urand(&s, 2000, 2600));
		double g = 1.0 / urand(&s, 1.96, 2.04);
		rw_reflect_medium l;
		double th = urand(&s, 0.0, 30.0 * M_PI / 180.0), rh, r2;

		l.vp_ms = bump(u.vp_ms, urand(&s, -0.02, 0.02));
		l.vs_ms = l.vp_ms * g;
		l.rho_kgm3 = bump(u.rho_kgm3, urand(&s, -0.02, 0.02));
		/* symmetric about vp/vs = 2 to keep the mean ratio near 1/3 */
		u.vs_ms = u.vp_ms / (4.0 - 1.0 / g);
		assert_int_equal(rw_reflect_hilterman(&u, &l, th, &rh), RW_OK);
		assert_int_equal(rw_reflect_shuey2(&u, &l, th, &r2), RW_OK);
		assert_true(fabs(rh - r2) < 3e-4);
	}
	{
		rw_reflect_medium u = med(3000.0, 1500.0, 2300.0);
		rw_reflect_medium l = med(3300.0, 1650.0, 2200.0);
		double z1 = 3000.0 * 2300.0, z2 = 3300.0 * 2200.0, rh;
		double th = 0.4;

		assert_int_equal(rw_reflect_hilterman(&u, &l, th, &rh), RW_OK);
		assert_true(fabs(rh - (z2 - z1) / (z2 + z1) * cos(th) *
		                          cos(th)) < 1e-15);
	}
}

/* At normal incidence every form gives the intercept: exactly A for
 * Aki-Richards, Shuey, Fatti; the exact (Z2 - Z1)/(Z2 + Z1) for
 * Hilterman; A to second order for Gray (moduli contrasts) and the exact
 * solution; 5/8 dvp/vp for Smith-Gidlow (Gardner density). */
static void test_normal_incidence_limit(void **state)
{
	rw_reflect_medium u = med(2900.0, 1300.0, 2350.0);
	rw_reflect_medium l = med(3050.0, 1400.0, 2300.0);
	approx_fn exact_a[] = {rw_reflect_aki_richards, rw_reflect_shuey2,
	                       rw_reflect_shuey3, rw_reflect_fatti};
	approx_fn near_a[] = {rw_reflect_gray_lmr, rw_reflect_gray_kmr,
	                      rw_reflect_hilterman};
	double a, r, dvp = 150.0 / 2975.0;
	size_t i;

	(void)state;
	assert_int_equal(rw_reflect_shuey_terms(&u, &l, &a, NULL, NULL), RW_OK);
	for (i = 0; i < sizeof(exact_a) / sizeof(exact_a[0]); i++) {
		assert_int_equal(exact_a[i](&u, &l, 0.0, &r), RW_OK);
		assert_true(fabs(r - a) < 1e-16);
	}
	for (i = 0; i < sizeof(near_a) / sizeof(near_a[0]); i++) {
		assert_int_equal(near_a[i](&u, &l, 0.0, &r), RW_OK);
		assert_true(fabs(r - a) < 1e-4);
	}
	assert_true(fabs(exact_rpp(&u, &l, 0.0) - a) < 1e-4);
	assert_int_equal(rw_reflect_smith_gidlow(&u, &l, 0.0, &r), RW_OK);
	assert_true(fabs(r - 0.625 * dvp) < 1e-16);
}

/* Linearised forms on fluid media: a fluid over a solid, and two fluids
 * (no shear terms: the coefficient is A sec^2 + (1/2 - 1/2 sec^2)drho...,
 * i.e. Shuey with B = C = dvp/2; checked against the exact fluid-fluid
 * solution, which it approximates to second order). */
static void test_fluids(void **state)
{
	rw_reflect_medium w = med(1500.0, 0.0, 1000.0);
	rw_reflect_medium o = med(1530.0, 0.0, 1020.0);
	rw_reflect_medium r = med(1600.0, 400.0, 1900.0);
	approx_fn fns[] = {rw_reflect_aki_richards, rw_reflect_shuey3,
	                   rw_reflect_fatti,        rw_reflect_gray_lmr,
	                   rw_reflect_gray_kmr,     rw_reflect_smith_gidlow,
	                   rw_reflect_hilterman,    rw_reflect_shuey2};
	size_t i;
	double v;

	(void)state;
	for (i = 0; i < sizeof(fns) / sizeof(fns[0]); i++) {
		assert_int_equal(fns[i](&w, &r, 0.3, &v), RW_OK);
		assert_true(isfinite(v));
		assert_int_equal(fns[i](&w, &o, 0.3, &v), RW_OK);
		assert_true(isfinite(v));
	}
	assert_int_equal(rw_reflect_shuey3(&w, &o, 0.3, &v), RW_OK);
	assert_true(fabs(v - exact_rpp(&w, &o, 0.3)) < 2e-4);
}

/* Classes on the intercept-gradient crossplot with the default band
 * |A| <= 0.02 and far angle 30 degrees (Rutherford & Williams 1989 I-III,
 * IIp with polarity reversal, Castagna, Swan & Foster 1998 IV). */
static void test_avo_classes(void **state)
{
	struct {
		double a, b;
		rw_avo_class want;
	} t[] = {
	    {0.10, -0.15, RW_AVO_I},    {0.021, -0.01, RW_AVO_I},
	    {0.020, -0.10, RW_AVO_IIP}, /* 0.02 - 0.10/4 < 0 */
	    {0.020, -0.08, RW_AVO_II},  /* 0.02 - 0.02 = 0: no reversal */
	    {0.010, -0.01, RW_AVO_II},  {0.0, -0.2, RW_AVO_II},
	    {-0.020, -0.1, RW_AVO_II},  {-0.021, -0.1, RW_AVO_III},
	    {-0.15, -0.3, RW_AVO_III},  {-0.15, 0.05, RW_AVO_IV},
	    {-0.15, 0.0, RW_AVO_IV},    {0.10, 0.05, RW_AVO_NONE},
	    {0.0, 0.0, RW_AVO_NONE},    {0.01, 0.1, RW_AVO_NONE},
	};
	rw_avo_class_params d = rw_reflect_avo_defaults(), p;
	rw_avo_class c;
	size_t i;

	(void)state;
	assert_true(d.a_small == 0.02);
	assert_true(fabs(d.theta_max_rad - M_PI / 6.0) < 1e-15);
	for (i = 0; i < sizeof(t) / sizeof(t[0]); i++) {
		assert_int_equal(
		    rw_reflect_avo_classify(t[i].a, t[i].b, NULL, &c), RW_OK);
		assert_int_equal(c, t[i].want);
		assert_int_equal(
		    rw_reflect_avo_classify(t[i].a, t[i].b, &d, &c), RW_OK);
		assert_int_equal(c, t[i].want);
	}
	/* thresholds are parameters: a wider band and a farther angle */
	p.a_small = 0.05;
	p.theta_max_rad = 45.0 * M_PI / 180.0;
	assert_int_equal(rw_reflect_avo_classify(0.04, -0.1, &p, &c), RW_OK);
	assert_int_equal(c, RW_AVO_IIP); /* 0.04 - 0.05 < 0 */
	assert_int_equal(rw_reflect_avo_classify(-0.04, -0.1, &p, &c), RW_OK);
	assert_int_equal(c, RW_AVO_II);
	/* a soft gas sand under shale (invented values): low impedance,
	 * bright with angle: class III (common practice) */
	{
		rw_reflect_medium sh = med(2700.0, 1250.0, 2400.0);
		rw_reflect_medium gs = med(2400.0, 1450.0, 2050.0);
		double a, b;

		assert_int_equal(rw_reflect_shuey_terms(&sh, &gs, &a, &b, NULL),
		                 RW_OK);
		assert_int_equal(rw_reflect_avo_classify(a, b, NULL, &c),
		                 RW_OK);
		assert_int_equal(c, RW_AVO_III);
	}
	assert_string_equal(rw_reflect_avo_class_name(RW_AVO_IIP), "IIp");
	assert_string_equal(rw_reflect_avo_class_name(RW_AVO_IV), "IV");
	assert_string_equal(rw_reflect_avo_class_name((rw_avo_class)99),
	                    "none");
	/* errors */
	p.a_small = -0.01;
	assert_int_equal(rw_reflect_avo_classify(0.1, -0.1, &p, &c), RW_EDOM);
	assert_int_equal(c, RW_AVO_NONE);
	p.a_small = 0.02;
	p.theta_max_rad = M_PI_2;
	assert_int_equal(rw_reflect_avo_classify(0.1, -0.1, &p, &c), RW_EDOM);
	p.theta_max_rad = 0.0;
	assert_int_equal(rw_reflect_avo_classify(0.1, -0.1, &p, &c), RW_EDOM);
	assert_int_equal(rw_reflect_avo_classify(NAN, -0.1, NULL, &c), RW_EDOM);
	assert_int_equal(rw_reflect_avo_classify(0.1, INFINITY, NULL, &c),
	                 RW_EDOM);
}

/* Connolly 1999: EI is defined so that R(theta) ~ 1/2 dln(EI), the
 * Aki-Richards form with K = (vs/vp)^2 constant; the log difference
 * matches the relative contrasts to third order, so 1/2 ln(EI2/EI1)
 * equals the three-term form within 2e-5 at 5 % contrasts up to 35
 * degrees. At theta = 0 EI is the acoustic impedance. */
static void test_connolly_ei(void **state)
{
	uint64_t s = 17;
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u, l;
		double th = urand(&s, 0.0, 35.0 * M_PI / 180.0);
		double k, e1, e2, r3;

		rand_pair(&s, 0.05, 0.3, 0.7, &u, &l);
		k = pow((u.vs_ms + l.vs_ms) / (u.vp_ms + l.vp_ms), 2.0);
		assert_int_equal(rw_reflect_ei(&u, th, k, &e1), RW_OK);
		assert_int_equal(rw_reflect_ei(&l, th, k, &e2), RW_OK);
		assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r3), RW_OK);
		assert_true(fabs(0.5 * log(e2 / e1) - r3) < 2e-5);
		assert_int_equal(rw_reflect_ei(&u, 0.0, k, &e1), RW_OK);
		assert_true(fabs(e1 / (u.vp_ms * u.rho_kgm3) - 1.0) < 1e-14);
	}
}

/* Whitcombe 2002: the normalised EI has the dimension of impedance at
 * every angle, maps the reference medium to vp0 rho0, equals AI at zero
 * angle and keeps Connolly's ratios (so the same reflectivity). */
static void test_ei_norm(void **state)
{
	rw_reflect_medium ref = med(3000.0, 1500.0, 2300.0);
	rw_reflect_medium u = med(2800.0, 1300.0, 2250.0);
	rw_reflect_medium l = med(3100.0, 1700.0, 2150.0);
	double th, e, e1, e2, c1, c2;

	(void)state;
	for (th = 0.0; th < 1.2; th += 0.1) {
		assert_int_equal(rw_reflect_ei_norm(&ref, th, 0.25, &ref, &e),
		                 RW_OK);
		assert_true(fabs(e / (3000.0 * 2300.0) - 1.0) < 1e-14);
		assert_int_equal(rw_reflect_ei_norm(&u, th, 0.25, &ref, &e1),
		                 RW_OK);
		assert_int_equal(rw_reflect_ei_norm(&l, th, 0.25, &ref, &e2),
		                 RW_OK);
		assert_int_equal(rw_reflect_ei(&u, th, 0.25, &c1), RW_OK);
		assert_int_equal(rw_reflect_ei(&l, th, 0.25, &c2), RW_OK);
		assert_true(fabs((e2 / e1) / (c2 / c1) - 1.0) < 1e-12);
	}
	assert_int_equal(rw_reflect_ei_norm(&u, 0.0, 0.25, &ref, &e), RW_OK);
	assert_true(fabs(e / (2800.0 * 2250.0) - 1.0) < 1e-14);
}

/* Whitcombe et al. 2002: EEI at chi has reflectivity 1/2 dln(EEI) =
 * A cos(chi) + B sin(chi), A and B Shuey's two-term intercept and
 * gradient (with K the same constant), to third order in the contrasts:
 * ln(x2/x1) - dx/x = (dx/x)^3/12 + ..., about 1e-5 per unit exponent at
 * 5 % contrasts, and the exponents reach 8 K ~ 4 near chi = 90 degrees,
 * hence 5e-5. EEI(0) is the acoustic impedance. */
static void test_eei(void **state)
{
	uint64_t s = 4;
	rw_reflect_medium ref = med(3000.0, 1500.0, 2300.0);
	int i;

	(void)state;
	for (i = 0; i < 500; i++) {
		rw_reflect_medium u, l;
		double chi = urand(&s, -M_PI_2, M_PI_2), k, e1, e2, a, b;

		rand_pair(&s, 0.05, 0.3, 0.7, &u, &l);
		k = pow((u.vs_ms + l.vs_ms) / (u.vp_ms + l.vp_ms), 2.0);
		assert_int_equal(rw_reflect_eei(&u, chi, k, &ref, &e1), RW_OK);
		assert_int_equal(rw_reflect_eei(&l, chi, k, &ref, &e2), RW_OK);
		assert_int_equal(rw_reflect_shuey_terms(&u, &l, &a, &b, NULL),
		                 RW_OK);
		assert_true(fabs(0.5 * log(e2 / e1) -
		                 (a * cos(chi) + b * sin(chi))) < 5e-5);
		assert_int_equal(rw_reflect_eei(&u, 0.0, k, &ref, &e1), RW_OK);
		assert_true(fabs(e1 / (u.vp_ms * u.rho_kgm3) - 1.0) < 1e-14);
	}
}

/* K taken from the sample when asked; fluids allowed only where the vs
 * exponent vanishes. */
static void test_ei_k_and_fluids(void **state)
{
	rw_reflect_medium m = med(3000.0, 1200.0, 2300.0);
	rw_reflect_medium w = med(1500.0, 0.0, 1030.0);
	rw_reflect_medium ref = med(3000.0, 1500.0, 2300.0);
	double e1, e2;

	(void)state;
	assert_int_equal(rw_reflect_ei(&m, 0.5, RW_REFLECT_K_SAMPLE, &e1),
	                 RW_OK);
	assert_int_equal(rw_reflect_ei(&m, 0.5, 0.16, &e2), RW_OK);
	assert_true(fabs(e1 / e2 - 1.0) < 1e-14);
	assert_int_equal(rw_reflect_ei(&w, 0.0, 0.25, &e1), RW_OK);
	assert_true(fabs(e1 - 1500.0 * 1030.0) < 1e-6);
	assert_int_equal(rw_reflect_ei(&w, 0.3, RW_REFLECT_K_SAMPLE, &e1),
	                 RW_OK);
	assert_int_equal(rw_reflect_ei(&w, 0.3, 0.25, &e1), RW_EDOM);
	assert_true(isnan(e1));
	assert_int_equal(rw_reflect_eei(&w, 0.3, 0.25, &ref, &e1), RW_EDOM);
	assert_int_equal(rw_reflect_eei(&w, 0.0, 0.25, &ref, &e1), RW_OK);
}

/* Bad inputs: RW_EDOM and NaN for every form; RW_ERANGE for Aki-Richards
 * past the P critical angle; RW_EDOM for Gray lambda-mu-rho at mean
 * lambda 0. */
static void test_errors(void **state)
{
	rw_reflect_medium ok = med(3000.0, 1500.0, 2300.0);
	rw_reflect_medium bad = med(3000.0, -1.0, 2300.0);
	rw_reflect_medium fast = med(4500.0, 2200.0, 2500.0);
	rw_reflect_medium ref = med(3000.0, 1500.0, 2300.0);
	approx_fn fns[] = {rw_reflect_aki_richards, rw_reflect_shuey2,
	                   rw_reflect_shuey3,       rw_reflect_fatti,
	                   rw_reflect_gray_lmr,     rw_reflect_gray_kmr,
	                   rw_reflect_smith_gidlow, rw_reflect_hilterman};
	double r, a, b, c, angles[] = {-0.1, M_PI_2, NAN, INFINITY};
	size_t i, j;

	(void)state;
	for (i = 0; i < sizeof(fns) / sizeof(fns[0]); i++) {
		assert_int_equal(fns[i](&bad, &ok, 0.2, &r), RW_EDOM);
		assert_true(isnan(r));
		assert_int_equal(fns[i](&ok, &bad, 0.2, &r), RW_EDOM);
		assert_true(isnan(r));
		assert_int_equal(fns[i](NULL, &ok, 0.2, &r), RW_EDOM);
		assert_int_equal(fns[i](&ok, &ok, 0.2, NULL), RW_EDOM);
		for (j = 0; j < sizeof(angles) / sizeof(angles[0]); j++) {
			assert_int_equal(fns[i](&ok, &ok, angles[j], &r),
			                 RW_EDOM);
			assert_true(isnan(r));
		}
	}
	assert_int_equal(rw_reflect_aki_richards(&ok, &fast, 0.8, &r),
	                 RW_ERANGE);
	assert_true(isnan(r));
	assert_int_equal(rw_reflect_shuey_terms(&bad, &ok, &a, &b, &c),
	                 RW_EDOM);
	assert_true(isnan(a) && isnan(b) && isnan(c));
	{
		/* vp/vs = sqrt 2 on both sides: lambda = 0 */
		rw_reflect_medium z1 = med(3000.0, 3000.0 / sqrt(2.0), 2300.0);
		rw_reflect_medium z2 = med(3200.0, 3200.0 / sqrt(2.0), 2300.0);

		assert_int_equal(rw_reflect_gray_lmr(&z1, &z1, 0.2, &r),
		                 RW_EDOM);
		(void)z2;
	}
	assert_int_equal(rw_reflect_ei(&ok, M_PI_2, 0.25, &r), RW_EDOM);
	assert_int_equal(rw_reflect_ei(&ok, -0.1, 0.25, &r), RW_EDOM);
	assert_int_equal(rw_reflect_ei(&ok, 0.2, 0.75, &r), RW_EDOM);
	assert_int_equal(rw_reflect_ei(&ok, 0.2, -0.5, &r), RW_EDOM);
	assert_int_equal(rw_reflect_ei(&ok, 0.2, NAN, &r), RW_EDOM);
	assert_true(isnan(r));
	assert_int_equal(rw_reflect_ei(&bad, 0.2, 0.25, &r), RW_EDOM);
	ref.vs_ms = 0.0;
	assert_int_equal(rw_reflect_ei_norm(&ok, 0.2, 0.25, &ref, &r), RW_EDOM);
	assert_int_equal(rw_reflect_eei(&ok, 0.2, 0.25, &ref, &r), RW_EDOM);
	ref.vs_ms = 1500.0;
	assert_int_equal(rw_reflect_eei(&ok, M_PI_2 + 0.01, 0.25, &ref, &r),
	                 RW_EDOM);
	assert_int_equal(rw_reflect_eei(&ok, 0.2, 0.25, NULL, &r), RW_EDOM);
	/* a huge exponent near grazing overflows: RW_ERANGE, not inf */
	assert_int_equal(rw_reflect_ei(&ok, M_PI_2 - 1e-9, 0.25, &r),
	                 RW_ERANGE);
	assert_true(isnan(r));
}

/* rw_reflect_aki_richards, _shuey2 and _shuey3 compute the average angle
 * and the Shuey terms inline (an optimisation); their answers must be to
 * the bit those composed from the public rw_reflect_angle_average and
 * rw_reflect_shuey_terms, and their refusals the same. An equivalence
 * check of the rewrite; the physics is checked above. */
static void test_inline_terms_bits(void **state)
{
	uint64_t s = 77;
	int i;

	(void)state;
	for (i = 0; i < 20000; i++) {
		rw_reflect_medium u, l;
		double th = urand(&s, 0.0, 1.5), t, a, b, c, p, g, ct;
		double r, want, sn;
		int st;

		rand_pair(&s, 0.6, 0.3, 0.6, &u, &l);
		st = rw_reflect_angle_average(&u, &l, th, &t);
		assert_int_equal(rw_reflect_aki_richards(&u, &l, th, &r), st);
		if (st == RW_OK) {
			struct {
				double vs, dvp, dvs, drho;
			} m = {0.5 * (u.vs_ms + l.vs_ms), 0, 0, 0};
			m.dvp =
			    (l.vp_ms - u.vp_ms) / (0.5 * (u.vp_ms + l.vp_ms));
			m.dvs = (l.vs_ms - u.vs_ms) / m.vs;
			m.drho = (l.rho_kgm3 - u.rho_kgm3) /
			         (0.5 * (u.rho_kgm3 + l.rho_kgm3));
			p = sin(th) / u.vp_ms;
			g = m.vs * m.vs * p * p;
			ct = cos(t);
			want = 0.5 * (1.0 - 4.0 * g) * m.drho +
			       m.dvp / (2.0 * ct * ct) - 4.0 * g * m.dvs;
			assert_memory_equal(&r, &want, sizeof r);
		} else {
			assert_true(isnan(r));
		}
		st = rw_reflect_shuey_terms(&u, &l, &a, &b, &c);
		if (st != RW_OK) { /* a lower medium with K <= 0 */
			assert_int_equal(rw_reflect_shuey2(&u, &l, th, &r), st);
			assert_true(isnan(r));
			assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r), st);
			assert_true(isnan(r));
			continue;
		}
		sn = sin(th);
		assert_int_equal(rw_reflect_shuey2(&u, &l, th, &r), RW_OK);
		want = a + b * sn * sn;
		assert_memory_equal(&r, &want, sizeof r);
		assert_int_equal(rw_reflect_shuey3(&u, &l, th, &r), RW_OK);
		want = a + b * sn * sn + c * (tan(th) * tan(th) - sn * sn);
		assert_memory_equal(&r, &want, sizeof r);
	}
}

/* The linearisations check both media with the inline copy of
 * rw_reflect_medium_check (reflect_int.h): every medium it refuses is
 * refused by them too, on either side, with a NaN answer. */
static void test_inline_medium_check(void **state)
{
	const rw_reflect_medium bad[] = {
	    med(0.0, 0.0, 2300.0),
	    med(-3000.0, 1500.0, 2300.0),
	    med(3000.0, -1.0, 2300.0),
	    med(3000.0, 1500.0, 0.0),
	    med(NAN, 1500.0, 2300.0),
	    med(3000.0, INFINITY, 2300.0),
	    med(3000.0, 1500.0, NAN),
	    med(3000.0, 3000.0, 2300.0),
	    med(2000.0, 2000.0 * 0.86602540378443871, 2300.0),
	};
	const rw_reflect_medium ok = med(3000.0, 1500.0, 2300.0);
	int (*const f[3])(const rw_reflect_medium *, const rw_reflect_medium *,
	                  double, double *) = {
	    rw_reflect_aki_richards, rw_reflect_shuey2, rw_reflect_shuey3};
	(void)state;
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		assert_int_equal(rw_reflect_medium_check(&bad[i]), RW_EDOM);
		for (int k = 0; k < 3; k++) {
			double r = 0.0;
			assert_int_equal(f[k](&bad[i], &ok, 0.2, &r), RW_EDOM);
			assert_true(isnan(r));
			r = 0.0;
			assert_int_equal(f[k](&ok, &bad[i], 0.2, &r), RW_EDOM);
			assert_true(isnan(r));
		}
	}
	for (int k = 0; k < 3; k++) {
		double r;
		assert_int_equal(f[k](&ok, &ok, 0.2, &r), RW_OK);
		assert_true(r == 0.0);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_aki_richards_accuracy),
	    cmocka_unit_test(test_shuey_terms),
	    cmocka_unit_test(test_fatti_identity),
	    cmocka_unit_test(test_gray_forms),
	    cmocka_unit_test(test_smith_gidlow),
	    cmocka_unit_test(test_hilterman),
	    cmocka_unit_test(test_normal_incidence_limit),
	    cmocka_unit_test(test_fluids),
	    cmocka_unit_test(test_avo_classes),
	    cmocka_unit_test(test_connolly_ei),
	    cmocka_unit_test(test_ei_norm),
	    cmocka_unit_test(test_eei),
	    cmocka_unit_test(test_ei_k_and_fluids),
	    cmocka_unit_test(test_errors),
	    cmocka_unit_test(test_inline_terms_bits),
	    cmocka_unit_test(test_inline_medium_check),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
