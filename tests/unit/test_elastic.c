/* Unit tests of the isotropic elastic conversions (daemon/core/elastic.c)
 * against handbook values and the defining relations. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <math.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "rockwire/elastic.h"

#define GPA 1e9

static void assert_rel(double got, double want, double tol)
{
	double err = fabs(got - want) / fmax(fabs(want), 1e-300);
	if (!(err <= tol))
		fail_msg("got %.12g want %.12g (rel err %.3g > %.3g)", got,
		         want, err, tol);
}

/* Mineral moduli: Mavko, Mukerji & Dvorkin 2009, mineral table (from
 * memory): quartz K 36.6 GPa, mu 45 GPa, 2.65 g/cm3 -> Vp about 6038 m/s,
 * Vs about 4121 m/s; calcite 76.8 GPa, 32 GPa, 2.71 g/cm3 -> about 6640 and
 * 3436 m/s. Tolerance 1 m/s: the handbook quotes rounded velocities. */
static void test_minerals_handbook(void **state)
{
	static const struct {
		const char *name;
		double k, mu, rho, vp, vs;
	} rows[] = {
	    {"quartz", 36.6, 45.0, 2650, 6038, 4121},
	    {"calcite", 76.8, 32.0, 2710, 6640, 3436},
	};
	(void)state;
	for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
		rw_elastic o;
		unsigned why = 99;
		int st =
		    rw_elastic_from_pair(rows[i].rho, RW_Q_K, rows[i].k * GPA,
		                         RW_Q_MU, rows[i].mu * GPA, &o, &why);
		assert_int_equal(st, RW_OK);
		assert_int_equal(why, 0);
		assert_true(fabs(o.vp - rows[i].vp) < 1.0);
		assert_true(fabs(o.vs - rows[i].vs) < 1.0);
	}
}

/* ASTM D2845: E = rho vs^2 (3 vp^2 - 4 vs^2) / (vp^2 - vs^2) and
 * nu = (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2)), written here independently of
 * the library's route through M and mu. */
static void test_astm_d2845(void **state)
{
	const double vp = 4200, vs = 2300, rho = 2450;
	const double vp2 = vp * vp, vs2 = vs * vs;
	double e = rho * vs2 * (3 * vp2 - 4 * vs2) / (vp2 - vs2);
	double nu = (vp2 - 2 * vs2) / (2 * (vp2 - vs2));
	rw_elastic o;
	(void)state;
	assert_int_equal(rw_elastic_from_velocities(vp, vs, rho, &o, NULL),
	                 RW_OK);
	assert_rel(o.e, e, 1e-13);
	assert_rel(o.nu, nu, 1e-13);
	/* Vp^2 = (K + 4/3 mu)/rho and Vs^2 = mu/rho. */
	assert_rel(vp2, (o.k + 4.0 / 3.0 * o.mu) / rho, 1e-13);
	assert_rel(vs2, o.mu / rho, 1e-13);
	assert_rel(o.ai, rho * vp, 1e-15);
	assert_rel(o.dts, 1 / vs, 1e-15);
}

/* nu = 0.25 exactly when Vp/Vs = sqrt(3) (common practice). */
static void test_poisson_quarter(void **state)
{
	rw_elastic o;
	(void)state;
	assert_int_equal(
	    rw_elastic_from_velocities(3000 * sqrt(3.0), 3000, 2300, &o, NULL),
	    RW_OK);
	assert_true(fabs(o.nu - 0.25) < 1e-15);
}

/* Every accepted pair, fed with the values of a reference rock, returns
 * the same full set within 1e-9 relative. Rocks span nu < 0 to nu near
 * 0.5 so that both roots of the lambda-E quadratic are exercised. */
static void test_round_trip_all_pairs(void **state)
{
	static const double rocks[][3] = {
	    {4200, 2300, 2450}, {2100, 600, 2100},
	    {6038, 4121, 2650}, {5000, 3400, 2500}, /* nu < 0 */
	    {1800, 300, 2000},                      /* nu near 0.49 */
	};
	int tested = 0;
	(void)state;
	for (size_t r = 0; r < sizeof rocks / sizeof rocks[0]; r++) {
		rw_elastic ref;
		assert_int_equal(
		    rw_elastic_from_velocities(rocks[r][0], rocks[r][1],
		                               rocks[r][2], &ref, NULL),
		    RW_OK);
		const double *vals = &ref.vp;
		double v[RW_Q_COUNT] = {ref.vp,     ref.vs, ref.k,    ref.mu,
		                        ref.lambda, ref.e,  ref.nu,   ref.m,
		                        ref.ai,     ref.si, ref.vpvs, ref.dtp,
		                        ref.dts};
		(void)vals;
		for (int a = 0; a < RW_Q_COUNT; a++)
			for (int b = 0; b < RW_Q_COUNT; b++) {
				rw_elastic o;
				if (rw_elastic_pair_check(a, b) != RW_PAIR_OK)
					continue;
				int st = rw_elastic_from_pair(
				    ref.rho, a, v[a], b, v[b], &o, NULL);
				if (st != RW_OK)
					fail_msg("pair %s,%s rock %zu: %d",
					         rw_elastic_qty_name(a),
					         rw_elastic_qty_name(b), r, st);
				assert_rel(o.vp, ref.vp, 1e-9);
				assert_rel(o.vs, ref.vs, 1e-9);
				assert_rel(o.k, ref.k, 1e-9);
				assert_rel(o.mu, ref.mu, 1e-9);
				assert_rel(o.e, ref.e, 1e-9);
				assert_rel(o.m, ref.m, 1e-9);
				assert_rel(o.nu, ref.nu, 1e-9);
				assert_rel(o.lambda, ref.lambda, 1e-9);
				tested++;
			}
	}
	/* 13 quantities give 156 ordered pairs; refused are 12 within the P
	 * group (vp ai dtp m), 12 within the S group, nu-vpvs twice and the 8
	 * P-group-with-e pairs: 122 accepted per rock. This guards against the
	 * check silently refusing pairs. */
	assert_int_equal(tested, 5 * 122);
}

static void test_pair_classes(void **state)
{
	(void)state;
	assert_int_equal(rw_elastic_pair_check(RW_Q_VP, RW_Q_VP), RW_PAIR_SAME);
	assert_int_equal(rw_elastic_pair_check(RW_Q_VP, RW_Q_AI),
	                 RW_PAIR_DEPENDENT);
	assert_int_equal(rw_elastic_pair_check(RW_Q_DTS, RW_Q_MU),
	                 RW_PAIR_DEPENDENT);
	assert_int_equal(rw_elastic_pair_check(RW_Q_NU, RW_Q_VPVS),
	                 RW_PAIR_DEPENDENT);
	assert_int_equal(rw_elastic_pair_check(RW_Q_E, RW_Q_M),
	                 RW_PAIR_TWO_ROOTS);
	assert_int_equal(rw_elastic_pair_check(RW_Q_VS, RW_Q_E), RW_PAIR_OK);
}

/* Physically impossible samples: NaN outputs and the reason bits. */
static void test_impossible(void **state)
{
	rw_elastic o;
	unsigned why;
	(void)state;
	assert_int_equal(rw_elastic_from_velocities(3000, 2700, 2400, &o, &why),
	                 RW_EDOM); /* vp/vs < 2/sqrt(3): K < 0 */
	assert_true(why & RW_ELASTIC_BAD_K);
	assert_true(isnan(o.vp) && isnan(o.nu));
	assert_int_equal(rw_elastic_from_velocities(3000, 1500, -1, &o, &why),
	                 RW_EDOM);
	assert_true(why & RW_ELASTIC_BAD_RHO);
	assert_int_equal(rw_elastic_from_velocities(3000, 0, 2400, &o, &why),
	                 RW_EDOM);
	assert_true(why & RW_ELASTIC_BAD_MU);
	assert_int_equal(rw_elastic_from_pair(2400, RW_Q_DTP, -1e-4, RW_Q_VS,
	                                      1500, &o, &why),
	                 RW_EDOM);
	assert_true(why & RW_ELASTIC_BAD_INPUT);
	assert_int_equal(
	    rw_elastic_from_pair(2400, RW_Q_NU, 0.6, RW_Q_VS, 1500, &o, &why),
	    RW_EDOM);
	assert_int_equal(
	    rw_elastic_from_pair(2400, RW_Q_VP, 3000, RW_Q_AI, 7.2e6, &o, &why),
	    RW_EINVAL);
}

/* The direct (vp, vs) path of rw_elastic_from_pair (an optimisation) must
 * give the general path's answer to the bit: status, reason bits and all
 * fourteen outputs. The general path is reached with the pair given as
 * (vs, vp). Not a physics check (the tests above are): an equivalence
 * check over valid logs and the edge and invalid inputs. */
static void same_as_general(double vp, double vs, double rho)
{
	rw_elastic a, b;
	unsigned wa = 77, wb = 77;
	int sa = rw_elastic_from_velocities(vp, vs, rho, &a, &wa);
	int sb = rw_elastic_from_pair(rho, RW_Q_VS, vs, RW_Q_VP, vp, &b, &wb);
	const double *x = &a.vp, *y = &b.vp;

	if (sa != sb || wa != wb)
		fail_msg("vp %g vs %g rho %g: status %d/%d, why %u/%u", vp, vs,
		         rho, sa, sb, wa, wb);
	for (size_t i = 0; i < sizeof a / sizeof(double); i++)
		if (memcmp(&x[i], &y[i], sizeof(double)) != 0 &&
		    !(isnan(x[i]) && isnan(y[i])))
			fail_msg("vp %g vs %g rho %g: field %zu %.17g vs %.17g",
			         vp, vs, rho, i, x[i], y[i]);
}

static void test_velocity_path_bits(void **state)
{
	static const double edge[][3] = {
	    {3000, 0, 2400},
	    {3000, 1500, 0},
	    {3000, 1500, -1},
	    {3000, 2700, 2400},
	    {3000, 3000 / 1.1547005383792515, 2400},
	    {0, 0, 2400},
	    {-3000, 1500, 2400},
	    {3000, -1, 2400},
	    {NAN, 1500, 2400},
	    {3000, NAN, 2400},
	    {3000, 1500, NAN},
	    {INFINITY, 1500, 2400},
	    {1e200, 1e199, 2400},
	    {1e-200, 1e-201, 1},
	    {3000, 1500, INFINITY},
	    {5.0e-324, 0, 1},
	    {6000, 4121, 2650},
	};
	uint64_t s = 12345;
	(void)state;
	for (size_t i = 0; i < sizeof edge / sizeof edge[0]; i++)
		same_as_general(edge[i][0], edge[i][1], edge[i][2]);
	for (int i = 0; i < 200000; i++) {
		double r[3];
		for (int j = 0; j < 3; j++) {
			s = s * 6364136223846793005u + 1442695040888963407u;
			r[j] = (double)(s >> 11) / 9007199254740992.0;
		}
		/* vp/vs from 1.05 (K < 0) to 3: valid and invalid solids */
		same_as_general(1000 + 6000 * r[0],
		                (1000 + 6000 * r[0]) / (1.05 + 1.95 * r[1]),
		                1000 + 2000 * r[2]);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_minerals_handbook),
	    cmocka_unit_test(test_astm_d2845),
	    cmocka_unit_test(test_poisson_quarter),
	    cmocka_unit_test(test_round_trip_all_pairs),
	    cmocka_unit_test(test_pair_classes),
	    cmocka_unit_test(test_impossible),
	    cmocka_unit_test(test_velocity_path_bits),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
