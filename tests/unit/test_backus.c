/* Unit tests of the Backus average and blocking (daemon/core/backus.c):
 * identical layers return the layer, two layers against the closed forms
 * of Backus 1962 / Postma 1955 written in their two-constituent product
 * form and the plane-stress identity, gamma >= 0, fluid layers, the
 * moving window over a log, the window length, boundary detection, block
 * means and the error cases. The numpy homogenisation of a layered medium
 * is the outside reference in tests/reference/test_seismic_numpy.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static int close_rel(double a, double b, double tol)
{
	return fabs(a - b) <= tol * fabs(b);
}

/* A stack of identical isotropic layers is that layer: C11 = C33 =
 * lambda + 2 mu, C13 = lambda, C44 = C66 = mu, Thomsen parameters 0
 * (Backus 1962; an isotropic medium is its own average). */
static void test_identical_layers(void **state)
{
	double h[6] = {0.3, 1.0, 2.5, 0.1, 0.7, 4.0}, vp[6], vs[6], rho[6];
	double mu, m;
	rw_seis_backus b;
	unsigned warn;
	size_t i;

	(void)state;
	for (i = 0; i < 6; i++) {
		vp[i] = 3200.0;
		vs[i] = 1750.0;
		rho[i] = 2350.0;
	}
	assert_int_equal(rw_seis_backus_layers(h, vp, vs, rho, 6, &b, &warn),
	                 RW_OK);
	assert_int_equal(warn, 0);
	mu = 2350.0 * 1750.0 * 1750.0;
	m = 2350.0 * 3200.0 * 3200.0;
	assert_true(close_rel(b.c.c33_pa, m, 1e-14));
	assert_true(close_rel(b.c.c11_pa, m, 1e-14));
	assert_true(close_rel(b.c.c13_pa, m - 2.0 * mu, 1e-14));
	assert_true(close_rel(b.c.c44_pa, mu, 1e-14));
	assert_true(close_rel(b.c.c66_pa, mu, 1e-14));
	assert_true(close_rel(b.rho_kgm3, 2350.0, 1e-15));
	assert_true(fabs(b.th.epsilon) <= 1e-14 && fabs(b.th.delta) <= 1e-14 &&
	            fabs(b.th.gamma) <= 1e-14);
	assert_true(close_rel(b.th.vp0_ms, 3200.0, 1e-14));
}

/* Two isotropic layers with fractions f1, f2 (Backus 1962; Postma 1955;
 * Mavko, Mukerji & Dvorkin 2009, sec. 4.13; the product forms from
 * memory):
 *   C33 = M1 M2 / (f1 M2 + f2 M1), C44 = mu1 mu2 / (f1 mu2 + f2 mu1),
 *   C66 = f1 mu1 + f2 mu2, C13 = (f1 l1 M2 + f2 l2 M1) / (f1 M2 + f2 M1),
 * and C11 through the plane-stress identity C11 - C13^2 / C33 =
 * f1 E1 / (1 - nu1^2) + f2 E2 / (1 - nu2^2): with the out-of-plane stress
 * free, the layers stretch in parallel (E Young's modulus, nu Poisson's
 * ratio of each layer). A shale-like over a sand-like layer and a random
 * set. */
static void check_two(double f1, double vp1, double vs1, double r1, double vp2,
                      double vs2, double r2)
{
	double h[2] = {f1, 1.0 - f1}, vp[2] = {vp1, vp2}, vs[2] = {vs1, vs2};
	double rho[2] = {r1, r2}, f2 = 1.0 - f1;
	double mu1 = r1 * vs1 * vs1, mu2 = r2 * vs2 * vs2;
	double m1 = r1 * vp1 * vp1, m2 = r2 * vp2 * vp2;
	double l1 = m1 - 2 * mu1, l2 = m2 - 2 * mu2;
	double e1 = mu1 * (3 * l1 + 2 * mu1) / (l1 + mu1);
	double e2 = mu2 * (3 * l2 + 2 * mu2) / (l2 + mu2);
	double n1 = l1 / (2 * (l1 + mu1)), n2 = l2 / (2 * (l2 + mu2));
	double c33 = m1 * m2 / (f1 * m2 + f2 * m1);
	double c13 = (f1 * l1 * m2 + f2 * l2 * m1) / (f1 * m2 + f2 * m1);
	double ps = f1 * e1 / (1 - n1 * n1) + f2 * e2 / (1 - n2 * n2);
	rw_seis_backus b;

	assert_int_equal(rw_seis_backus_layers(h, vp, vs, rho, 2, &b, NULL),
	                 RW_OK);
	assert_true(close_rel(b.c.c33_pa, c33, 1e-13));
	assert_true(
	    close_rel(b.c.c44_pa, mu1 * mu2 / (f1 * mu2 + f2 * mu1), 1e-13));
	assert_true(close_rel(b.c.c66_pa, f1 * mu1 + f2 * mu2, 1e-13));
	assert_true(fabs(b.c.c13_pa - c13) <= 1e-13 * c33);
	assert_true(close_rel(b.c.c11_pa - b.c.c13_pa * b.c.c13_pa / b.c.c33_pa,
	                      ps, 1e-12));
	assert_true(close_rel(b.rho_kgm3, f1 * r1 + f2 * r2, 1e-15));
	assert_true(b.th.gamma >= 0.0);
}

static void test_two_layers(void **state)
{
	uint64_t s = 7;
	int i;

	(void)state;
	check_two(0.5, 2900.0, 1300.0, 2450.0, 3600.0, 2100.0, 2250.0);
	check_two(0.2, 1600.0, 400.0, 2000.0, 5800.0, 3100.0, 2700.0);
	for (i = 0; i < 200; i++) {
		double vp1 = urand(&s, 1500, 6000), vp2 = urand(&s, 1500, 6000);

		check_two(urand(&s, 0.01, 0.99), vp1, vp1 * urand(&s, 0.2, 0.7),
		          urand(&s, 1800, 2900), vp2, vp2 * urand(&s, 0.2, 0.7),
		          urand(&s, 1800, 2900));
	}
}

/* The average of isotropic layers has gamma >= 0: gamma = (<mu><1/mu> -
 * 1) / 2 and the arithmetic mean is at least the harmonic one (from
 * memory; Backus 1962 notes that fine layering of isotropic media gives
 * SH faster horizontally). Random stacks of 2-12 layers. */
static void test_gamma_nonnegative(void **state)
{
	uint64_t s = 99;
	int t;

	(void)state;
	for (t = 0; t < 1000; t++) {
		double h[12], vp[12], vs[12], rho[12];
		size_t i, n = 2 + (size_t)urand(&s, 0, 10.99);
		rw_seis_backus b;

		for (i = 0; i < n; i++) {
			h[i] = urand(&s, 0.01, 10.0);
			vp[i] = urand(&s, 1500.0, 6500.0);
			vs[i] = vp[i] * urand(&s, 0.15, 0.7);
			rho[i] = urand(&s, 1700.0, 3000.0);
		}
		assert_int_equal(
		    rw_seis_backus_layers(h, vp, vs, rho, n, &b, NULL), RW_OK);
		assert_true(b.th.gamma >= -1e-15);
	}
}

/* A fluid layer (vs = 0) makes C44 = 0: stiffness kept, Thomsen
 * parameters null, flagged. */
static void test_fluid_layer(void **state)
{
	double h[2] = {1, 1}, vp[2] = {1500, 3000}, vs[2] = {0, 1500};
	double rho[2] = {1030, 2400};
	rw_seis_backus b;
	unsigned warn;

	(void)state;
	assert_int_equal(rw_seis_backus_layers(h, vp, vs, rho, 2, &b, &warn),
	                 RW_OK);
	assert_int_equal(warn, RW_SEIS_WARN_FLUID_LAYER);
	assert_true(b.c.c44_pa == 0.0);
	assert_true(
	    close_rel(b.c.c66_pa, 0.5 * 2400.0 * 1500.0 * 1500.0, 1e-15));
	assert_true(isnan(b.th.epsilon) && isnan(b.th.gamma));
	assert_true(b.th.vs0_ms == 0.0 && b.th.vp0_ms > 0.0);
}

static void test_layer_errors(void **state)
{
	double h[2] = {1, 1}, vp[2] = {3000, 3000}, vs[2] = {1500, 1500};
	double rho[2] = {2400, 2400}, hb[2] = {1, 0}, vsb[2] = {1500, 2800};
	rw_seis_backus b;

	(void)state;
	assert_int_equal(rw_seis_backus_layers(h, vp, vs, rho, 0, &b, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_backus_layers(hb, vp, vs, rho, 2, &b, NULL),
	                 RW_EDOM);
	/* vs > vp sqrt(3)/2: negative bulk modulus, impossible */
	assert_int_equal(rw_seis_backus_layers(h, vp, vsb, rho, 2, &b, NULL),
	                 RW_EDOM);
	assert_true(isnan(b.c.c33_pa) && isnan(b.rho_kgm3));
}

#define NL 40

/* Moving window over a log: a two-layer log with the boundary midway
 * between samples 19 and 20 gives, at a sample whose window straddles it,
 * the two-layer average with the overlap fractions; a sample whose
 * window stays in one layer gets that layer; the end windows are cut and
 * flagged; a null inside a window is left out and flagged; a window that
 * is mostly null is null. */
static void test_backus_log(void **state)
{
	double z[NL], vp[NL], vs[NL], rho[NL];
	rw_seis_backus out[NL], two;
	unsigned warn[NL];
	size_t i;

	(void)state;
	for (i = 0; i < NL; i++) {
		z[i] = 2000.0 + 0.5 * (double)i;
		vp[i] = i < 20 ? 2800.0 : 3500.0;
		vs[i] = i < 20 ? 1200.0 : 2000.0;
		rho[i] = i < 20 ? 2400.0 : 2250.0;
	}
	/* window 3 m around sample 18 (z = 2009): [2007.5, 2010.5], the
	 * boundary at 2009.75: 2.25 m above, 0.75 m below */
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 3.0, 0.5, out, warn), RW_OK);
	{
		double h[2] = {2.25, 0.75}, a[2] = {2800, 3500},
		       b[2] = {1200, 2000};
		double r[2] = {2400, 2250};

		assert_int_equal(
		    rw_seis_backus_layers(h, a, b, r, 2, &two, NULL), RW_OK);
	}
	assert_true(close_rel(out[18].c.c33_pa, two.c.c33_pa, 1e-13));
	assert_true(close_rel(out[18].c.c11_pa, two.c.c11_pa, 1e-13));
	assert_true(close_rel(out[18].c.c44_pa, two.c.c44_pa, 1e-13));
	assert_int_equal(warn[18], 0);
	assert_true(
	    close_rel(out[10].c.c33_pa, 2400.0 * 2800.0 * 2800.0, 1e-14));
	assert_true(fabs(out[10].th.gamma) <= 1e-14);
	assert_int_equal(warn[0], RW_SEIS_WARN_WINDOW_CUT);
	assert_int_equal(warn[NL - 2], RW_SEIS_WARN_WINDOW_CUT);
	assert_true(
	    close_rel(out[0].c.c33_pa, 2400.0 * 2800.0 * 2800.0, 1e-14));
	/* a null in a window */
	vs[10] = NAN;
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 3.0, 0.5, out, warn), RW_OK);
	assert_int_equal(warn[10], RW_SEIS_WARN_NULL_IN_WIN);
	assert_int_equal(warn[12], RW_SEIS_WARN_NULL_IN_WIN);
	assert_int_equal(warn[14], 0);
	assert_true(
	    close_rel(out[10].c.c44_pa, 2400.0 * 1200.0 * 1200.0, 1e-14));
	/* a mostly null window: nulls at 8..12, window 2 m (4 cells) */
	for (i = 8; i <= 12; i++)
		rho[i] = NAN;
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 2.0, 0.5, out, warn), RW_OK);
	assert_true(warn[10] & RW_SEIS_WARN_TOO_FEW_VALID);
	assert_true(isnan(out[10].c.c33_pa));
	/* a window shorter than a cell: the sample itself */
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 0.01, 1.0, out, warn),
	    RW_OK);
	assert_true(
	    close_rel(out[25].c.c33_pa, 2250.0 * 3500.0 * 3500.0, 1e-14));
	/* errors */
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, 1, 3.0, 0.5, out, warn),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 0.0, 0.5, out, warn),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_backus_log(z, vp, vs, rho, NL, 3.0, 1.5, out, warn),
	    RW_EDOM);
	assert_true(isnan(out[25].c.c33_pa));
}

/* Window length: L = b v_min / f (Liner & Fei 2006, from memory), with
 * the slowest positive shear velocity, or P when there is no shear. */
static void test_window(void **state)
{
	double vp[4] = {3000, 2500, NAN, 3300}, vs[4] = {1500, 0, 1200, NAN};
	double none[4] = {NAN, 0, -1, NAN}, w;

	(void)state;
	assert_int_equal(rw_seis_backus_window(vp, vs, 4, 1.0 / 3.0, 30.0, &w),
	                 RW_OK);
	assert_true(close_rel(w, 1200.0 / 90.0, 1e-15));
	assert_int_equal(
	    rw_seis_backus_window(vp, none, 4, 1.0 / 3.0, 30.0, &w), RW_OK);
	assert_true(close_rel(w, 2500.0 / 90.0, 1e-15));
	assert_int_equal(rw_seis_backus_window(none, none, 4, 0.3, 30.0, &w),
	                 RW_EINVAL);
	assert_true(isnan(w));
	assert_int_equal(rw_seis_backus_window(vp, vs, 4, 0.0, 30.0, &w),
	                 RW_EDOM);
	assert_int_equal(rw_seis_backus_window(vp, vs, 4, 0.3, -1.0, &w),
	                 RW_EDOM);
}

/* Boundaries where the curve leaves its block's running mean by more
 * than the threshold (common practice): a three-step curve with noise
 * below the threshold gives boundaries exactly at the step midpoints; a
 * minimum thickness suppresses a thin spike; nulls are skipped. */
static void test_block_detect(void **state)
{
	double z[30], y[30], b[32];
	size_t i, nb;

	(void)state;
	for (i = 0; i < 30; i++) {
		z[i] = 100.0 + (double)i;
		y[i] = (i < 10   ? 10.0
		        : i < 22 ? 20.0
		                 : 14.0) +
		       ((i % 3) - 1.0) * 0.4;
	}
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 0.0, b, 32, &nb),
	                 RW_OK);
	assert_int_equal(nb, 4);
	assert_true(b[0] == 99.5 && b[1] == 109.5 && b[2] == 121.5 &&
	            b[3] == 129.5);
	/* a one-sample spike makes a block unless min thickness forbids */
	y[5] = 40.0;
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 0.0, b, 32, &nb),
	                 RW_OK);
	assert_int_equal(nb, 6);
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 8.0, b, 32, &nb),
	                 RW_OK);
	assert_true(b[1] >= 99.5 + 8.0);
	y[5] = NAN;
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 0.0, b, 32, &nb),
	                 RW_OK);
	assert_int_equal(nb, 4);
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 0.0, b, 3, &nb),
	                 RW_ERANGE);
	assert_int_equal(nb, 0);
	assert_int_equal(rw_seis_block_detect(z, y, 30, 0.0, 0.0, b, 32, &nb),
	                 RW_EDOM);
	for (i = 0; i < 30; i++)
		y[i] = NAN;
	assert_int_equal(rw_seis_block_detect(z, y, 30, 2.0, 0.0, b, 32, &nb),
	                 RW_EINVAL);
}

/* Block means: cell-weighted arithmetic and harmonic means; the harmonic
 * mean of velocity keeps the two-way time through each block (sum of
 * dz / v over the cells; common practice for blocking sonic). */
static void test_block_means(void **state)
{
	double z[6] = {0, 1, 2, 3, 4, 5},
	       v[6] = {2000, 2500, 4000, 3000, NAN, 3500};
	double bounds[3] = {-0.5, 2.0, 5.5}, blk[2], out[6];
	unsigned warn[6];

	(void)state;
	assert_int_equal(rw_seis_block_means(z, v, 6, bounds, 3,
	                                     RW_SEIS_MEAN_HARMONIC, blk, out,
	                                     warn),
	                 RW_OK);
	/* block 0: cells [-0.5,0.5], [0.5,1.5], [1.5,2.0] (half of cell 2) */
	assert_true(close_rel(2.5 / blk[0],
	                      1 / 2000.0 + 1 / 2500.0 + 0.5 / 4000.0, 1e-15));
	/* block 1: half of cell 2, cells 3 and 5 (4 is null) */
	assert_true(close_rel(2.5 / blk[1],
	                      0.5 / 4000.0 + 1 / 3000.0 + 1 / 3500.0, 1e-15));
	assert_true(out[1] == blk[0] && out[2] == blk[1] && out[5] == blk[1]);
	assert_int_equal(rw_seis_block_means(z, v, 6, bounds, 3,
	                                     RW_SEIS_MEAN_ARITHMETIC, blk, out,
	                                     warn),
	                 RW_OK);
	assert_true(close_rel(blk[0], (2000 + 2500 + 0.5 * 4000) / 2.5, 1e-15));
	/* samples outside the blocks; an empty block */
	bounds[0] = 0.5;
	bounds[1] = 3.8;
	bounds[2] = 4.2;
	assert_int_equal(rw_seis_block_means(z, v, 6, bounds, 3,
	                                     RW_SEIS_MEAN_ARITHMETIC, blk, out,
	                                     warn),
	                 RW_OK);
	assert_int_equal(warn[0], RW_SEIS_WARN_OUTSIDE);
	assert_true(isnan(out[0]) && isnan(out[5]));
	assert_true(isnan(blk[1]));
	assert_int_equal(warn[4], RW_SEIS_WARN_TOO_FEW_VALID);
	bounds[1] = 0.5;
	assert_int_equal(rw_seis_block_means(z, v, 6, bounds, 3,
	                                     RW_SEIS_MEAN_ARITHMETIC, blk, out,
	                                     warn),
	                 RW_EDOM);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_identical_layers),
	    cmocka_unit_test(test_two_layers),
	    cmocka_unit_test(test_gamma_nonnegative),
	    cmocka_unit_test(test_fluid_layer),
	    cmocka_unit_test(test_layer_errors),
	    cmocka_unit_test(test_backus_log),
	    cmocka_unit_test(test_window),
	    cmocka_unit_test(test_block_detect),
	    cmocka_unit_test(test_block_means),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
