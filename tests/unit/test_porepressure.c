/* Unit tests of the pore-pressure methods (daemon/core/porepressure.c):
 * Eaton 1975 against its closed form and its defining properties (on the
 * trend it returns hydrostatic; it rises towards the overburden as the
 * shale slows), Bowers 1995 loading / unloading consistency, the unit
 * conversion of Bowers' field coefficients by an independent path, and
 * every flag and error case. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include "rockwire/pressure.h"

#define US_FT (1e-6 / 0.3048) /* 1 us/ft in s/m (exact by definition) */
#define MPA   1e6

static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.12g, want %.12g (tol %.3g)", got, want, tol);
}

static void test_eaton(void **state)
{
	double pp, sig, prev, dt, sv, ph;
	unsigned w;

	(void)state;
	/* Eaton 1975: pp = sv - (sv - ph)(dt_n/dt)^3; by hand with sv 60,
	 * ph 30 MPa and dt 25 % slower than the trend:
	 * 60 - 30 * 0.8^3 = 44.64 MPa, effective stress 15.36 MPa */
	assert_int_equal(rw_pres_pore_eaton(60 * MPA, 30 * MPA, 125 * US_FT,
	                                    100 * US_FT, 3.0, &pp, &sig, &w),
	                 RW_OK);
	near(pp, 44.64 * MPA, 1e-6);
	near(sig, 15.36 * MPA, 1e-6);
	assert_int_equal(w, 0);
	/* slowness on the trend returns hydrostatic (Eaton 1975: the ratio is
	 * 1), for any exponent, overburden and hydrostatic */
	for (sv = 5 * MPA; sv < 200 * MPA; sv *= 1.7)
		for (ph = 0.0; ph <= sv; ph += 0.23 * sv)
			for (dt = 50 * US_FT; dt < 200 * US_FT; dt *= 1.3) {
				assert_int_equal(
				    rw_pres_pore_eaton(sv, ph, dt, dt, 1.2, &pp,
				                       &sig, &w),
				    RW_OK);
				assert_true(pp == ph);
				assert_false(w & RW_PRES_WARN_PP_BELOW_HYDRO);
			}
	/* slower than the trend: pore pressure rises, stays below sv */
	prev = 30 * MPA;
	for (dt = 101 * US_FT; dt < 400 * US_FT; dt *= 1.05) {
		rw_pres_pore_eaton(60 * MPA, 30 * MPA, dt, 100 * US_FT, 3.0,
		                   &pp, NULL, &w);
		assert_true(pp > prev && pp < 60 * MPA);
		prev = pp;
	}
	/* faster than the trend: below hydrostatic, reported not clipped;
	 * far faster it goes negative and is still reported */
	rw_pres_pore_eaton(60 * MPA, 30 * MPA, 90 * US_FT, 100 * US_FT, 3.0,
	                   &pp, NULL, &w);
	assert_true(pp < 30 * MPA);
	assert_true(w & RW_PRES_WARN_PP_BELOW_HYDRO);
	rw_pres_pore_eaton(60 * MPA, 30 * MPA, 60 * US_FT, 100 * US_FT, 3.0,
	                   &pp, NULL, &w);
	near(pp, 60 * MPA - 30 * MPA * pow(100.0 / 60.0, 3.0), 1e-6);
	assert_true(pp < 0.0);
	assert_true(w & RW_PRES_WARN_PP_BELOW_HYDRO);
	/* sv = ph (at the mudline): no effective stress */
	rw_pres_pore_eaton(10 * MPA, 10 * MPA, 150 * US_FT, 100 * US_FT, 3.0,
	                   &pp, &sig, &w);
	near(pp, 10 * MPA, 0.0);
	assert_true(w & RW_PRES_WARN_PP_AT_SV);
	/* errors */
	assert_int_equal(rw_pres_pore_eaton(10 * MPA, 20 * MPA, 1e-4, 1e-4, 3.0,
	                                    &pp, &sig, &w),
	                 RW_EDOM);
	assert_true(isnan(pp) && isnan(sig));
	assert_int_equal(
	    rw_pres_pore_eaton(30 * MPA, -1.0, 1e-4, 1e-4, 3.0, &pp, NULL, &w),
	    RW_EDOM);
	assert_int_equal(rw_pres_pore_eaton(30 * MPA, 10 * MPA, 0.0, 1e-4, 3.0,
	                                    &pp, NULL, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_pore_eaton(30 * MPA, 10 * MPA, 1e-4, NAN, 3.0,
	                                    &pp, NULL, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_pore_eaton(30 * MPA, 10 * MPA, 1e-4, 1e-4, 0.0,
	                                    &pp, NULL, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_pore_eaton(30 * MPA, 10 * MPA, 1e-4, 1e-4,
	                                    11.0, &pp, NULL, &w),
	                 RW_EDOM);
}

static void test_eaton_sigma(void **state)
{
	gsl_rng *rng = gsl_rng_alloc(gsl_rng_mt19937);
	double sv = 70 * MPA, ph = 33 * MPA, dt = 130 * US_FT;
	double dtn = 100 * US_FT, sg = 1.5 * US_FT, h = 1e-3 * US_FT;
	double spp, pp1, pp2, sum = 0.0, sum2 = 0.0, m, sd;
	int k, nmc = 20000;

	(void)state;
	assert_int_equal(
	    rw_pres_pore_eaton_sigma(sv, ph, dt, dtn, 3.0, sg, &spp), RW_OK);
	/* the derivative against a central difference */
	rw_pres_pore_eaton(sv, ph, dt, dtn + h, 3.0, &pp1, NULL, NULL);
	rw_pres_pore_eaton(sv, ph, dt, dtn - h, 3.0, &pp2, NULL, NULL);
	near(spp, fabs(pp1 - pp2) / (2.0 * h) * sg, 1e-6 * spp);
	/* and against the spread of pp over normally distributed trends
	 * (Monte Carlo, 20000 draws: the sample sd is within 1 % of the
	 * truth at 1 sigma; the first-order value is within about 1 % here
	 * since sigma / dt_n is 0.015; 4 % allowed) */
	gsl_rng_set(rng, 5544);
	for (k = 0; k < nmc; k++) {
		rw_pres_pore_eaton(sv, ph, dt, dtn + gsl_ran_gaussian(rng, sg),
		                   3.0, &pp1, NULL, NULL);
		sum += pp1;
		sum2 += pp1 * pp1;
	}
	m = sum / nmc;
	sd = sqrt(sum2 / nmc - m * m);
	near(sd, spp, 0.04 * spp);
	/* no trend uncertainty, none in pp; errors */
	rw_pres_pore_eaton_sigma(sv, ph, dt, dtn, 3.0, 0.0, &spp);
	near(spp, 0.0, 0.0);
	assert_int_equal(
	    rw_pres_pore_eaton_sigma(sv, ph, dt, dtn, 3.0, -1.0, &spp),
	    RW_EDOM);
	assert_true(isnan(spp));
	assert_int_equal(
	    rw_pres_pore_eaton_sigma(sv, ph, dt, dtn, 3.0, NAN, &spp), RW_EDOM);
	assert_int_equal(
	    rw_pres_pore_eaton_sigma(ph, sv, dt, dtn, 3.0, sg, &spp), RW_EDOM);
	gsl_rng_free(rng);
}

/* Illustrative Bowers coefficients: v0 = 5000 ft/s (Bowers 1995, from
 * memory), A = 14 ft/s per psi^B and B = 0.73 (inside the span Bowers
 * reports for Gulf of Mexico wells, from memory), U = 3.5. */
static rw_pres_bowers bowers_example(void)
{
	rw_pres_bowers bw;

	bw.v0_ms = 5000.0 * 0.3048;
	bw.b = 0.73;
	bw.a_ms = rw_pres_bowers_a_from_field(14.0, bw.b);
	bw.u = 3.5;
	bw.sigma_max_pa = NAN;
	return bw;
}

static void test_bowers_units(void **state)
{
	rw_pres_bowers bw = bowers_example();
	double sig_psi, v, v_field;

	(void)state;
	/* the SI curve equals the field curve v = 5000 + 14 s^0.73 (ft/s,
	 * psi) converted afterwards (1 ft = 0.3048 m, 1 psi = 6894.757 Pa,
	 * exact definitions) */
	for (sig_psi = 100.0; sig_psi < 20000.0; sig_psi *= 1.9) {
		v_field = 5000.0 + 14.0 * pow(sig_psi, 0.73);
		assert_int_equal(rw_pres_bowers_velocity(
		                     &bw, 0, sig_psi * RW_PRES_PSI_PA, &v),
		                 RW_OK);
		near(v, v_field * 0.3048, 1e-9 * v);
	}
	assert_true(isnan(rw_pres_bowers_a_from_field(NAN, 0.7)));
}

static void test_bowers_consistency(void **state)
{
	rw_pres_bowers bw = bowers_example();
	double s, v, vu, back, smax, sv_, su, vmax;
	unsigned w;

	(void)state;
	/* virgin curve: velocity to stress and back */
	for (s = 0.5 * MPA; s < 80 * MPA; s *= 1.4) {
		assert_int_equal(rw_pres_bowers_velocity(&bw, 0, s, &v), RW_OK);
		assert_int_equal(rw_pres_bowers_sigma(&bw, 0, v, &back, &w),
		                 RW_OK);
		near(back, s, 1e-9 * s);
		assert_int_equal(w, 0);
	}
	/* sigma_max from v_max lies on the virgin curve */
	assert_int_equal(rw_pres_bowers_velocity(&bw, 0, 35 * MPA, &vmax),
	                 RW_OK);
	assert_int_equal(rw_pres_bowers_sigma_max(&bw, vmax, &smax), RW_OK);
	near(smax, 35 * MPA, 1e-6);
	bw.sigma_max_pa = smax;
	for (s = 0.5 * MPA; s < 80 * MPA; s *= 1.3) {
		rw_pres_bowers_velocity(&bw, 0, s, &v);
		assert_int_equal(rw_pres_bowers_velocity(&bw, 1, s, &vu),
		                 RW_OK);
		if (s >= smax) {
			/* beyond sigma_max the rock loads again: virgin */
			near(vu, v, 0.0);
		} else {
			/* Bowers 1995: after unloading the velocity stays
			 * higher than on the virgin curve at the same stress
			 * (hysteresis), and below the velocity at sigma_max */
			assert_true(vu > v);
			assert_true(vu < vmax);
		}
		/* unloading: stress and back */
		assert_int_equal(rw_pres_bowers_sigma(&bw, 1, vu, &back, &w),
		                 RW_OK);
		near(back, s, 1e-9 * s);
		assert_int_equal(!!(w & RW_PRES_WARN_UNLOADING), s < smax);
	}
	/* the branches meet at sigma_max: continuous velocity */
	rw_pres_bowers_velocity(&bw, 1, smax * (1.0 - 1e-9), &vu);
	near(vu, vmax, 1e-6);
	/* for the same velocity the unloading branch gives less effective
	 * stress, so more pore pressure: sigma_u = sigma_max
	 * (sigma_virgin / sigma_max)^U (Bowers 1995, by hand) */
	v = 0.5 * (bw.v0_ms + vmax);
	rw_pres_bowers_sigma(&bw, 0, v, &sv_, &w);
	rw_pres_bowers_sigma(&bw, 1, v, &su, &w);
	near(su, smax * pow(sv_ / smax, bw.u), 1e-9 * su);
	assert_true(su < sv_);
	/* U = 1 is no hysteresis: unloading = virgin */
	bw.u = 1.0;
	for (s = 0.5 * MPA; s < 80 * MPA; s *= 1.3) {
		rw_pres_bowers_velocity(&bw, 0, s, &v);
		rw_pres_bowers_velocity(&bw, 1, s, &vu);
		near(vu, v, 1e-9 * v);
	}
}

static void test_bowers_pore(void **state)
{
	rw_pres_bowers bw = bowers_example();
	double v, pp, sig;
	unsigned w;

	(void)state;
	/* pp = sv - sigma(v) */
	rw_pres_bowers_velocity(&bw, 0, 20 * MPA, &v);
	assert_int_equal(
	    rw_pres_pore_bowers(&bw, 0, 60 * MPA, 28 * MPA, v, &pp, &sig, &w),
	    RW_OK);
	near(pp, 40 * MPA, 1e-6);
	near(sig, 20 * MPA, 1e-6);
	assert_int_equal(w, 0);
	/* a fast rock: sigma above sv - ph, pp below hydrostatic, and
	 * below zero it is flagged even with no hydrostatic given */
	rw_pres_bowers_velocity(&bw, 0, 45 * MPA, &v);
	rw_pres_pore_bowers(&bw, 0, 60 * MPA, 28 * MPA, v, &pp, NULL, &w);
	near(pp, 15 * MPA, 1e-6);
	assert_true(w & RW_PRES_WARN_PP_BELOW_HYDRO);
	rw_pres_bowers_velocity(&bw, 0, 70 * MPA, &v);
	rw_pres_pore_bowers(&bw, 0, 60 * MPA, NAN, v, &pp, NULL, &w);
	assert_true(pp < 0.0);
	assert_true(w & RW_PRES_WARN_PP_BELOW_HYDRO);
	/* the unloading branch flagged and higher */
	bw.sigma_max_pa = 35 * MPA;
	rw_pres_bowers_velocity(&bw, 0, 20 * MPA, &v);
	rw_pres_pore_bowers(&bw, 1, 60 * MPA, 28 * MPA, v, &pp, &sig, &w);
	assert_true(w & RW_PRES_WARN_UNLOADING);
	assert_true(pp > 40 * MPA);
	/* errors: v at or below v0 has no effective stress on the curve */
	assert_int_equal(rw_pres_pore_bowers(&bw, 0, 60 * MPA, 28 * MPA,
	                                     bw.v0_ms, &pp, &sig, &w),
	                 RW_ERANGE);
	assert_true(isnan(pp) && isnan(sig));
	assert_int_equal(
	    rw_pres_pore_bowers(&bw, 0, -1.0, 28 * MPA, 2500.0, &pp, &sig, &w),
	    RW_EDOM);
	assert_int_equal(
	    rw_pres_pore_bowers(&bw, 0, 60 * MPA, -1.0, 2500.0, &pp, &sig, &w),
	    RW_EDOM);
	bw.sigma_max_pa = NAN;
	assert_int_equal(rw_pres_pore_bowers(&bw, 1, 60 * MPA, 28 * MPA, 2500.0,
	                                     &pp, &sig, &w),
	                 RW_EDOM); /* unloading asked, no sigma_max */
	assert_int_equal(rw_pres_bowers_velocity(&bw, 1, 10 * MPA, &v),
	                 RW_EDOM);
	bw.sigma_max_pa = 35 * MPA;
	bw.u = 0.5;
	assert_int_equal(rw_pres_bowers_sigma(&bw, 1, 2500.0, &sig, &w),
	                 RW_EDOM);
	bw = bowers_example();
	bw.b = 0.0;
	assert_int_equal(rw_pres_bowers_sigma(&bw, 0, 2500.0, &sig, &w),
	                 RW_EDOM);
	bw = bowers_example();
	assert_int_equal(rw_pres_bowers_velocity(&bw, 0, -1.0, &v), RW_EDOM);
	assert_true(isnan(v));
	assert_int_equal(rw_pres_bowers_sigma_max(&bw, 1000.0, &sig), RW_EDOM);
	assert_true(isnan(sig));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_eaton),
	    cmocka_unit_test(test_eaton_sigma),
	    cmocka_unit_test(test_bowers_units),
	    cmocka_unit_test(test_bowers_consistency),
	    cmocka_unit_test(test_bowers_pore),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
