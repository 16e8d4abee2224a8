/* Unit tests of the minimum-horizontal-stress methods
 * (daemon/core/fracture.c): Eaton 1969 bounds and a classic hand case,
 * Matthews & Kelly limits and its equivalence with Eaton, and the
 * poroelastic model checked by putting its stresses back into Hooke's law
 * of isotropic poroelasticity (an independent route to the same state),
 * plus the flags and error cases. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "rockwire/pressure.h"

#define MPA 1e6
#define GPA 1e9

static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.12g, want %.12g (tol %.3g)", got, want, tol);
}

static void test_eaton_bounds(void **state)
{
	double sv, pp, nu, sh;
	unsigned w;

	(void)state;
	/* for 0 < nu < 0.5 the Eaton 1969 fracture gradient lies
	 * strictly between pore pressure and overburden */
	for (sv = 10 * MPA; sv < 250 * MPA; sv *= 1.6)
		for (pp = 0.0; pp < sv; pp += 0.17 * sv)
			for (nu = 0.01; nu < 0.5; nu += 0.02) {
				assert_int_equal(
				    rw_pres_frac_eaton(sv, pp, nu, &sh, &w),
				    RW_OK);
				assert_true(sh > pp && sh < sv);
				assert_int_equal(w, 0);
			}
	/* nu = 0.25 gives K = 1/3, the lower bound of Hubbert & Willis
	 * 1957 (from memory): with an overburden of 1 psi/ft and a normal
	 * pore pressure of 0.465 psi/ft (Gulf Coast, common practice) the
	 * fracture gradient is (1 + 2 * 0.465) / 3 = 0.643 psi/ft */
	assert_int_equal(rw_pres_frac_eaton(1.0 * RW_PRES_PSIFT_PAM * 3048.0,
	                                    0.465 * RW_PRES_PSIFT_PAM * 3048.0,
	                                    0.25, &sh, &w),
	                 RW_OK);
	near(sh / 3048.0 / RW_PRES_PSIFT_PAM, 0.6433, 0.0001);
	/* limits: nu = 0 gives pp, nu -> 0.5 gives sv */
	rw_pres_frac_eaton(50 * MPA, 20 * MPA, 0.0, &sh, &w);
	near(sh, 20 * MPA, 0.0);
	assert_true(w & RW_PRES_WARN_NU_NONPOSITIVE);
	rw_pres_frac_eaton(50 * MPA, 20 * MPA, 0.4999999, &sh, &w);
	near(sh, 50 * MPA, 1e-6 * 50 * MPA);
	/* a negative nu is possible for a solid: reported, flagged */
	assert_int_equal(rw_pres_frac_eaton(50 * MPA, 20 * MPA, -0.2, &sh, &w),
	                 RW_OK);
	near(sh, 20 * MPA - 30 * MPA / 6.0, 1e-6);
	assert_true(w & RW_PRES_WARN_FG_BELOW_PP);
	assert_true(w & RW_PRES_WARN_NU_NONPOSITIVE);
	/* errors */
	assert_int_equal(rw_pres_frac_eaton(50 * MPA, 20 * MPA, 0.5, &sh, &w),
	                 RW_EDOM);
	assert_true(isnan(sh));
	assert_int_equal(rw_pres_frac_eaton(50 * MPA, 20 * MPA, -1.0, &sh, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_eaton(20 * MPA, 50 * MPA, 0.3, &sh, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_eaton(20 * MPA, -1.0, 0.3, &sh, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_eaton(NAN, 1.0, 0.3, &sh, NULL), RW_EDOM);
}

static void test_mk(void **state)
{
	double sh, she, nu;

	(void)state;
	/* Matthews & Kelly 1967: ki = 0 gives pp, ki = 1 gives sv */
	assert_int_equal(rw_pres_frac_mk(50 * MPA, 20 * MPA, 0.0, &sh), RW_OK);
	near(sh, 20 * MPA, 0.0);
	assert_int_equal(rw_pres_frac_mk(50 * MPA, 20 * MPA, 1.0, &sh), RW_OK);
	near(sh, 50 * MPA, 0.0);
	/* ki = nu / (1 - nu) is Eaton 1969 (the two share the form
	 * pp + k (sv - pp); Eaton 1969 derived k from nu) */
	for (nu = 0.05; nu < 0.5; nu += 0.05) {
		rw_pres_frac_mk(70 * MPA, 33 * MPA, nu / (1.0 - nu), &sh);
		rw_pres_frac_eaton(70 * MPA, 33 * MPA, nu, &she, NULL);
		near(sh, she, 1e-6);
	}
	assert_int_equal(rw_pres_frac_mk(50 * MPA, 20 * MPA, 1.1, &sh),
	                 RW_EDOM);
	assert_true(isnan(sh));
	assert_int_equal(rw_pres_frac_mk(50 * MPA, 20 * MPA, -0.1, &sh),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_mk(10 * MPA, 20 * MPA, 0.5, &sh),
	                 RW_EDOM);
}

/* Hooke's law of isotropic poroelasticity, effective stresses
 * sigma' = sigma - alpha pp (Biot; Fjaer et al. 2008, ch. 1, from
 * memory): eps_x = (s'_x - nu (s'_y + s'_z)) / E. */
static double hooke_eps(double sx, double sy, double sz, double ap, double nu,
                        double e)
{
	return ((sx - ap) - nu * ((sy - ap) + (sz - ap))) / e;
}

static void test_poroelastic(void **state)
{
	double sh, sH, she, sv = 62 * MPA, pp = 27 * MPA, e = 12 * GPA;
	double nu, alpha, eh, eH;
	unsigned w;

	(void)state;
	/* alpha = 1 and no strain: Eaton 1969 */
	for (nu = 0.05; nu < 0.5; nu += 0.05) {
		assert_int_equal(rw_pres_frac_poroelastic(sv, pp, nu, 1.0, NAN,
		                                          0.0, 0.0, &sh, &sH,
		                                          &w),
		                 RW_OK);
		rw_pres_frac_eaton(sv, pp, nu, &she, NULL);
		near(sh, she, 1e-6);
		near(sH, sh, 0.0);
	}
	/* the stresses, put back into Hooke's law, give the horizontal
	 * strains that were asked for and the vertical stress sv */
	for (nu = 0.1; nu < 0.45; nu += 0.07)
		for (alpha = 0.5; alpha <= 1.0; alpha += 0.25)
			for (eh = -2e-4; eh <= 4e-4; eh += 3e-4)
				for (eH = eh; eH <= 1e-3; eH += 4e-4) {
					double ap = alpha * pp;

					assert_int_equal(
					    rw_pres_frac_poroelastic(
					        sv, pp, nu, alpha, e, eh, eH,
					        &sh, &sH, &w),
					    RW_OK);
					near(hooke_eps(sh, sH, sv, ap, nu, e),
					     eh, 1e-12);
					near(hooke_eps(sH, sh, sv, ap, nu, e),
					     eH, 1e-12);
					assert_true(sH >= sh);
					assert_false(
					    w & RW_PRES_WARN_HORIZ_SWAPPED);
				}
	/* compressive strain can lift shmin above sv (a reverse-faulting
	 * state): flagged; strains in the wrong order: flagged */
	rw_pres_frac_poroelastic(sv, pp, 0.25, 1.0, 30 * GPA, 2e-3, 3e-3, &sh,
	                         &sH, &w);
	assert_true(sh > sv);
	assert_true(w & RW_PRES_WARN_FG_ABOVE_SV);
	rw_pres_frac_poroelastic(sv, pp, 0.25, 1.0, e, 5e-4, 1e-4, &sh, &sH,
	                         &w);
	assert_true(w & RW_PRES_WARN_HORIZ_SWAPPED);
	/* extension can pull it below pp */
	rw_pres_frac_poroelastic(sv, pp, 0.25, 1.0, 30 * GPA, -1e-3, 0.0, &sh,
	                         NULL, &w);
	assert_true(sh < pp);
	assert_true(w & RW_PRES_WARN_FG_BELOW_PP);
	/* errors: strain without a modulus, bad alpha, nu, strain */
	assert_int_equal(rw_pres_frac_poroelastic(sv, pp, 0.25, 1.0, NAN, 1e-4,
	                                          0.0, &sh, &sH, &w),
	                 RW_EDOM);
	assert_true(isnan(sh) && isnan(sH));
	assert_int_equal(rw_pres_frac_poroelastic(sv, pp, 0.25, 1.2, e, 0.0,
	                                          0.0, &sh, &sH, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_poroelastic(sv, pp, 0.5, 1.0, e, 0.0, 0.0,
	                                          &sh, &sH, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_poroelastic(sv, pp, 0.25, 1.0, e, 0.02,
	                                          0.0, &sh, &sH, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_frac_poroelastic(pp, sv, 0.25, 1.0, e, 0.0,
	                                          0.0, &sh, &sH, &w),
	                 RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_eaton_bounds),
	    cmocka_unit_test(test_mk),
	    cmocka_unit_test(test_poroelastic),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
