/* Unit tests of the overburden, hydrostatic and equivalent-mud-weight
 * functions (daemon/core/overburden.c, hydrostatic.c) against exact
 * integrals, GSL quadrature, unit definitions and the figures of the
 * trade named beside each check; plus the batch/stream/resume identity
 * and the error and flag cases. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>

#include "rockwire/pressure.h"

#define G0 9.80665

/* Asserts |got - want| <= tol with a readable message. */
static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.12g, want %.12g (tol %.3g)", got, want, tol);
}

static void test_constants(void **state)
{
	(void)state;
	/* psi: NIST SP 811 (from memory) 1 psi = 6.894757e3 Pa; exact by
	 * the lbf and inch definitions. */
	near(RW_PRES_PSI_PA, 6894.757293168, 1e-6);
	/* 1 lb/gal = 119.8264 kg/m^3 (NIST SP 811, from memory). */
	near(RW_PRES_PPG_KGM3, 119.8264, 1e-4);
	/* 1 g/cm^3 = 8.345 lb/gal (common practice). */
	near(1000.0 / RW_PRES_PPG_KGM3, 8.345, 0.0005);
	/* fresh water 0.433 psi/ft (common practice) and 9.81 kPa/m
	 * (common practice) */
	near(RW_PRES_RHO_FRESH * G0 / RW_PRES_PSIFT_PAM, 0.433, 0.001);
	near(RW_PRES_RHO_FRESH * G0 / 1000.0, 9.81, 0.005);
	/* p[psi] = 0.052 MW[ppg] TVD[ft] (common practice, the field
	 * formula): 1 ppg is 0.052 psi/ft. */
	near(RW_PRES_PPG_KGM3 * G0 / RW_PRES_PSIFT_PAM, 0.052, 0.0001);
	/* 1 psi/ft of overburden is an average density of 2.31 g/cm^3
	 * (common practice). */
	near(RW_PRES_PSIFT_PAM / G0 / 1000.0, 2.31, 0.005);
}

static void test_emw(void **state)
{
	double rho, grad, p;

	(void)state;
	/* 9.80665 MPa at 1000 m is 1 g/cm^3 exactly (definition of g0). */
	assert_int_equal(rw_pres_emw(9.80665e6, 1000.0, G0, &rho, &grad),
	                 RW_OK);
	near(rho, 1000.0, 1e-9);
	near(grad, 9806.65, 1e-9);
	/* 10,000 psi at 10,000 ft is 1 psi/ft = 19.25 ppg (0.052 rule,
	 * common practice: 1 / 0.052 = 19.23; exact 19.25) */
	assert_int_equal(rw_pres_emw(1e4 * RW_PRES_PSI_PA, 1e4 * RW_PRES_FT_M,
	                             G0, &rho, &grad),
	                 RW_OK);
	near(grad / RW_PRES_PSIFT_PAM, 1.0, 1e-12);
	near(rho / RW_PRES_PPG_KGM3, 19.25, 0.01);
	assert_int_equal(rw_pres_from_emw(rho, 1e4 * RW_PRES_FT_M, G0, &p),
	                 RW_OK);
	near(p, 1e4 * RW_PRES_PSI_PA, 1e-6);
	/* errors */
	assert_int_equal(rw_pres_emw(1e6, 0.0, G0, &rho, &grad), RW_EDOM);
	assert_true(isnan(rho) && isnan(grad));
	assert_int_equal(rw_pres_emw(NAN, 10.0, G0, &rho, NULL), RW_EDOM);
	assert_int_equal(rw_pres_emw(1e6, 10.0, 1.62, &rho, NULL), RW_EDOM);
	assert_int_equal(rw_pres_from_emw(-1.0, 10.0, G0, &p), RW_EDOM);
	assert_true(isnan(p));
	assert_int_equal(rw_pres_from_emw(1000.0, -1.0, G0, &p), RW_EDOM);
}

static void test_column_check(void **state)
{
	rw_pres_column c;
	const char *f;
	static const struct {
		size_t off;
		double v;
		const char *name;
	} bad[] = {
	    {offsetof(rw_pres_column, air_gap_m), -1.0, "air_gap"},
	    {offsetof(rw_pres_column, water_depth_m), NAN, "water_depth"},
	    {offsetof(rw_pres_column, rho_sea_kgm3), 0.0, "rho_sea"},
	    {offsetof(rw_pres_column, g_ms2), 1.62, "g"},
	    {offsetof(rw_pres_column, rho_ml_kgm3), -5.0, "rho_ml"},
	    {offsetof(rw_pres_column, rho_a_kgm3), -1.0, "rho_a"},
	    {offsetof(rw_pres_column, trend_s0_m), 0.0, "trend_s0"},
	    {offsetof(rw_pres_column, trend_p), 4.0, "trend_p"},
	    {offsetof(rw_pres_column, rho_cap_kgm3), 1000.0, "rho_cap"},
	    {offsetof(rw_pres_column, rho_cap_kgm3), NAN, "rho_cap"},
	};
	size_t i;

	(void)state;
	rw_pres_column_init(&c);
	assert_int_equal(rw_pres_column_check(&c, &f), RW_OK);
	assert_null(f);
	near(c.g_ms2, G0, 0.0);
	for (i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		rw_pres_column b = c;

		memcpy((char *)&b + bad[i].off, &bad[i].v, sizeof(double));
		assert_int_equal(rw_pres_column_check(&b, &f), RW_EDOM);
		assert_string_equal(f, bad[i].name);
	}
}

/* Integrand for GSL's quadrature: the shallow-trend density. */
static double trend_rho(double s, void *p)
{
	double rho;

	rw_pres_shallow_density(p, s, &rho, NULL);
	return rho;
}

static void test_shallow_trend(void **state)
{
	gsl_integration_workspace *w = gsl_integration_workspace_alloc(200);
	rw_pres_column c;
	gsl_function f;
	double s, rho, in, ref, err, pts[3];

	(void)state;
	rw_pres_column_init(&c);
	/* default at the mudline and at 3125 ft: rho_ml and rho_ml + A
	 * (the power law as stated in pressure.h) */
	assert_int_equal(rw_pres_shallow_density(&c, 0.0, &rho, &in), RW_OK);
	near(rho, 16.3 * RW_PRES_PPG_KGM3, 1e-9);
	near(in, 0.0, 0.0);
	assert_int_equal(
	    rw_pres_shallow_density(&c, 3125.0 * RW_PRES_FT_M, &rho, NULL),
	    RW_OK);
	near(rho, 17.3 * RW_PRES_PPG_KGM3, 1e-9);
	/* closed-form integral against GSL adaptive quadrature (QAGS) */
	f.function = trend_rho;
	f.params = &c;
	for (s = 10.0; s <= 5000.0; s *= 2.3) {
		rw_pres_shallow_density(&c, s, NULL, &in);
		gsl_integration_qags(&f, 0.0, s, 0.0, 1e-12, 200, w, &ref,
		                     &err);
		near(in, ref, 1e-10 * ref);
	}
	/* with a cap at 2100 kg/m^3 the density stops rising at the cap
	 * depth; integrate piecewise around it (QAGP) */
	c.rho_cap_kgm3 = 2100.0;
	rw_pres_shallow_density(&c, 4000.0, &rho, &in);
	near(rho, 2100.0, 0.0);
	pts[0] = 0.0;
	pts[1] = c.trend_s0_m *
	         pow((2100.0 - c.rho_ml_kgm3) / c.rho_a_kgm3, 1.0 / c.trend_p);
	pts[2] = 4000.0;
	assert_true(pts[1] > 0.0 && pts[1] < 4000.0);
	gsl_integration_qagp(&f, pts, 3, 0.0, 1e-12, 200, w, &ref, &err);
	near(in, ref, 1e-10 * ref);
	/* A = 0 is a constant density */
	c.rho_a_kgm3 = 0.0;
	c.rho_cap_kgm3 = INFINITY;
	rw_pres_shallow_density(&c, 700.0, &rho, &in);
	near(rho, c.rho_ml_kgm3, 0.0);
	near(in, 700.0 * c.rho_ml_kgm3, 1e-9);
	assert_int_equal(rw_pres_shallow_density(&c, -1.0, &rho, &in), RW_EDOM);
	assert_true(isnan(rho) && isnan(in));
	gsl_integration_workspace_free(w);
}

/* Constant density integrates exactly (Sv = rho g h for a uniform
 * column), on land and offshore, on irregular samples. */
static void test_constant_density(void **state)
{
	static const double z[] = {480.0,  480.15, 481.0,  600.0,
	                           1234.5, 1234.6, 2000.0, 3999.9};
	rw_pres_column c;
	rw_pres_obg_state st;
	rw_pres_obg_out o;
	unsigned w;
	size_t i;

	(void)state;
	rw_pres_column_init(&c);
	c.air_gap_m = 25.0;
	c.rho_ml_kgm3 = 2300.0;
	c.rho_a_kgm3 = 0.0;
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_OK);
	for (i = 0; i < sizeof z / sizeof z[0]; i++) {
		assert_int_equal(
		    rw_pres_obg_step(&c, &st, z[i], 2300.0, &o, &w), RW_OK);
		near(o.sv_pa, 2300.0 * G0 * (z[i] - 25.0), 1e-12 * o.sv_pa);
		near(o.grad_pam, o.sv_pa / z[i], 1e-9);
	}
	/* offshore: the sea-water column, then formation */
	c.water_depth_m = 1500.0;
	c.air_gap_m = 20.0;
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_OK);
	near(st.sv_pa, 1025.0 * G0 * 1500.0, 1e-6);
	for (i = 0; i < sizeof z / sizeof z[0]; i++) {
		double zz = z[i] + 1520.0;

		assert_int_equal(rw_pres_obg_step(&c, &st, zz, 2300.0, &o, &w),
		                 RW_OK);
		near(o.sv_pa,
		     1025.0 * G0 * 1500.0 + 2300.0 * G0 * (zz - 1520.0),
		     1e-12 * o.sv_pa);
	}
}

/* The trapezoidal rule is exact for a density linear in depth: the
 * increments between log samples equal g times the exact integral. */
static void test_linear_density(void **state)
{
	rw_pres_column c;
	rw_pres_obg_state st;
	rw_pres_obg_out o;
	double z, z1 = 0.0, sv1 = 0.0;
	int k;

	(void)state;
	rw_pres_column_init(&c);
	c.water_depth_m = 300.0;
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_OK);
	for (k = 0, z = 700.0; z < 3500.0; k++, z += 0.1524 + 3.0 * (k % 7)) {
		double rho = 1900.0 + 0.21 * (z - 300.0);

		assert_int_equal(rw_pres_obg_step(&c, &st, z, rho, &o, NULL),
		                 RW_OK);
		if (k == 0) {
			z1 = z;
			sv1 = o.sv_pa;
			continue;
		}
		/* int (1900 + 0.21 (z - 300)) dz from z1 to z */
		near(o.sv_pa - sv1,
		     G0 * (1900.0 * (z - z1) +
		           0.105 * ((z - 300.0) * (z - 300.0) -
		                    (z1 - 300.0) * (z1 - 300.0))),
		     1e-9 * o.sv_pa);
	}
}

/* Flags and rules of the step: trend before the first density, held
 * density, repeated depth, column above the mudline, going up. */
static void test_step_rules(void **state)
{
	rw_pres_column c;
	rw_pres_obg_state st, keep;
	rw_pres_obg_out o;
	double in1, in2, sv;
	unsigned w;

	(void)state;
	rw_pres_column_init(&c);
	c.air_gap_m = 25.0;
	c.water_depth_m = 100.0;
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_OK);
	/* in the air gap and the water column: the column, state kept */
	assert_int_equal(rw_pres_obg_step(&c, &st, 10.0, 2000.0, &o, &w),
	                 RW_OK);
	near(o.sv_pa, 0.0, 0.0);
	assert_true(w & RW_PRES_WARN_ABOVE_MUDLINE);
	assert_int_equal(rw_pres_obg_step(&c, &st, 75.0, 2000.0, &o, &w),
	                 RW_OK);
	near(o.sv_pa, 1025.0 * G0 * 50.0, 1e-9);
	assert_true(w & RW_PRES_WARN_ABOVE_MUDLINE);
	assert_int_equal(rw_pres_obg_step(&c, &st, 125.0, 2000.0, &o, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_ABOVE_MUDLINE);
	assert_false(w & RW_PRES_WARN_DEPTH_REPEAT);
	near(st.z_m, 125.0, 0.0);
	/* missing density before the log: the shallow trend */
	assert_int_equal(rw_pres_obg_step(&c, &st, 400.0, NAN, &o, &w), RW_OK);
	assert_true(w & RW_PRES_WARN_OBG_TREND);
	rw_pres_shallow_density(&c, 275.0, NULL, &in1);
	near(o.sv_pa, 1025.0 * G0 * 100.0 + G0 * in1, 1e-6);
	near(o.sv_assumed_pa, G0 * in1, 1e-6);
	/* the first density: the step to it still follows the trend */
	assert_int_equal(rw_pres_obg_step(&c, &st, 500.0, 2100.0, &o, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_OBG_TREND);
	rw_pres_shallow_density(&c, 375.0, NULL, &in2);
	near(o.sv_pa, 1025.0 * G0 * 100.0 + G0 * in2, 1e-6);
	sv = o.sv_pa;
	/* then the log, by trapezoids */
	assert_int_equal(rw_pres_obg_step(&c, &st, 510.0, 2200.0, &o, &w),
	                 RW_OK);
	assert_int_equal(w, 0);
	near(o.sv_pa, sv + G0 * 10.0 * 2150.0, 1e-6);
	near(o.sv_assumed_pa, G0 * in2, 1e-6);
	sv = o.sv_pa;
	/* a gap: the last density is held */
	assert_int_equal(rw_pres_obg_step(&c, &st, 515.0, -999.25, &o, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_RHO_HELD);
	near(o.sv_pa, sv + G0 * 5.0 * 2200.0, 1e-6);
	near(o.sv_assumed_pa, G0 * in2 + G0 * 5.0 * 2200.0, 1e-6);
	sv = o.sv_pa;
	assert_int_equal(rw_pres_obg_step(&c, &st, 520.0, 2300.0, &o, &w),
	                 RW_OK);
	assert_int_equal(w, 0);
	near(o.sv_pa, sv + G0 * 5.0 * 2250.0, 1e-6);
	/* a repeated depth repeats the value, state kept */
	keep = st;
	assert_int_equal(rw_pres_obg_step(&c, &st, 520.0, 2900.0, &o, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_DEPTH_REPEAT);
	assert_memory_equal(&st, &keep, sizeof st);
	/* going up is refused, state kept; bad depth */
	assert_int_equal(rw_pres_obg_step(&c, &st, 519.0, 2300.0, &o, &w),
	                 RW_EINVAL);
	assert_true(isnan(o.sv_pa));
	assert_memory_equal(&st, &keep, sizeof st);
	assert_int_equal(rw_pres_obg_step(&c, &st, 50.0, 2300.0, &o, &w),
	                 RW_EINVAL);
	assert_int_equal(rw_pres_obg_step(&c, &st, -1.0, 2300.0, &o, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_obg_step(&c, &st, INFINITY, 2300.0, &o, &w),
	                 RW_EDOM);
	/* a bad column */
	c.g_ms2 = 0.0;
	assert_int_equal(rw_pres_obg_step(&c, &st, 600.0, 2300.0, &o, &w),
	                 RW_EINVAL);
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_EDOM);
	assert_true(isnan(st.sv_pa));
}

/* Deterministic pseudo-random numbers for the log below. */
static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

#define NLOG 4000

/* The streaming overburden equals the batch one (at least to rounding; here
 * exactly, as both run the same step), and a resume at any sample with
 * the batch's (z, sv, rho) continues exactly. */
static void test_stream_batch_resume(void **state)
{
	static double z[NLOG], rho[NLOG];
	static rw_pres_obg_out ob[NLOG];
	static unsigned wb[NLOG];
	static int sb[NLOG];
	rw_pres_column c;
	rw_pres_obg_state st;
	rw_pres_obg_out o;
	uint64_t s = 77;
	double zz = 900.0, last_rho = NAN;
	unsigned w;
	size_t i, cut = 2345;

	(void)state;
	rw_pres_column_init(&c);
	c.air_gap_m = 24.0;
	c.water_depth_m = 812.0;
	for (i = 0; i < NLOG; i++) {
		z[i] = zz;
		zz += urand(&s, 0.05, 2.0);
		rho[i] = urand(&s, 1900.0, 2700.0);
		if (i < 5 || (i > 1000 && i < 1010) || i % 97 == 0)
			rho[i] = NAN;
	}
	z[1500] = z[1499]; /* one repeated depth */
	assert_int_equal(rw_pres_obg_batch(&c, NLOG, z, rho, ob, wb, sb),
	                 RW_OK);
	assert_int_equal(rw_pres_obg_init(&c, &st), RW_OK);
	for (i = 0; i < NLOG; i++) {
		assert_int_equal(
		    rw_pres_obg_step(&c, &st, z[i], rho[i], &o, &w), sb[i]);
		assert_true(o.sv_pa == ob[i].sv_pa);
		assert_true(o.sv_assumed_pa == ob[i].sv_assumed_pa);
		assert_int_equal(w, wb[i]);
		if (i == cut)
			break;
	}
	assert_true(wb[0] & RW_PRES_WARN_OBG_TREND);
	assert_true(wb[1003] & RW_PRES_WARN_RHO_HELD);
	assert_true(wb[1500] & RW_PRES_WARN_DEPTH_REPEAT);
	/* resume from the batch's value at the cut */
	for (i = cut; i > 0 && !(isfinite(rho[i]) && rho[i] > 0.0); i--)
		;
	last_rho = isfinite(rho[cut]) ? rho[cut] : rho[i];
	assert_int_equal(
	    rw_pres_obg_resume(&c, z[cut], ob[cut].sv_pa, last_rho, &st),
	    RW_OK);
	for (i = cut + 1; i < NLOG; i++) {
		assert_int_equal(
		    rw_pres_obg_step(&c, &st, z[i], rho[i], &o, &w), RW_OK);
		assert_true(o.sv_pa == ob[i].sv_pa);
		assert_true(w & RW_PRES_WARN_RESUMED);
		assert_int_equal(w & ~RW_PRES_WARN_RESUMED, wb[i]);
	}
	/* resume refuses impossible starts */
	assert_int_equal(rw_pres_obg_resume(&c, 100.0, 1e7, 2000.0, &st),
	                 RW_EDOM);
	assert_int_equal(rw_pres_obg_resume(&c, 2000.0, 1e3, 2000.0, &st),
	                 RW_EDOM);
	assert_int_equal(rw_pres_obg_resume(&c, 2000.0, 3e7, -1.0, &st),
	                 RW_EDOM);
	assert_true(isnan(st.sv_pa));
	/* resume without a density: the trend carries the next step */
	assert_int_equal(rw_pres_obg_resume(&c, 2000.0, 3e7, NAN, &st), RW_OK);
	assert_int_equal(rw_pres_obg_step(&c, &st, 2010.0, 2400.0, &o, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_OBG_TREND);
	assert_true(w & RW_PRES_WARN_RESUMED);
	/* batch argument errors */
	assert_int_equal(rw_pres_obg_batch(&c, 3, NULL, rho, ob, wb, sb),
	                 RW_EINVAL);
	c.rho_sea_kgm3 = -1.0;
	assert_int_equal(rw_pres_obg_batch(&c, 3, z, rho, ob, wb, sb), RW_EDOM);
	assert_true(isnan(ob[2].sv_pa));
	assert_int_equal(sb[2], RW_EDOM);
}

static void test_hydro_const(void **state)
{
	rw_pres_column c;
	double p;
	unsigned w;

	(void)state;
	rw_pres_column_init(&c);
	c.air_gap_m = 10.0;
	/* land: fresh water from ground level, 9.80665 kPa/m (9.81 kPa/m,
	 * common practice) */
	assert_int_equal(
	    rw_pres_hydro_const(&c, 1010.0, RW_PRES_RHO_FRESH, &p, &w), RW_OK);
	near(p, 9.80665e6, 1e-6);
	assert_int_equal(w, 0);
	/* 0.433 psi/ft over 10,000 ft of fresh water (common practice):
	 * 4335 psi */
	assert_int_equal(
	    rw_pres_hydro_const(&c, 10.0 + 1e4 * RW_PRES_FT_M, 1000.0, &p, &w),
	    RW_OK);
	near(p / RW_PRES_PSI_PA, 4335.0, 1.0);
	/* offshore: sea water to the mudline, then pore water */
	c.water_depth_m = 1000.0;
	assert_int_equal(rw_pres_hydro_const(&c, 2010.0, 1050.0, &p, &w),
	                 RW_OK);
	near(p, G0 * (1025.0 * 1000.0 + 1050.0 * 1000.0), 1e-6);
	assert_int_equal(rw_pres_hydro_const(&c, 510.0, 1050.0, &p, &w), RW_OK);
	near(p, G0 * 1025.0 * 500.0, 1e-6);
	assert_true(w & RW_PRES_WARN_ABOVE_MUDLINE);
	assert_int_equal(rw_pres_hydro_const(&c, 5.0, 1050.0, &p, &w), RW_OK);
	near(p, 0.0, 0.0);
	/* errors */
	assert_int_equal(rw_pres_hydro_const(&c, -1.0, 1000.0, &p, &w),
	                 RW_EDOM);
	assert_true(isnan(p));
	assert_int_equal(rw_pres_hydro_const(&c, 100.0, 0.0, &p, &w), RW_EDOM);
	assert_int_equal(rw_pres_hydro_const(&c, 100.0, 2500.0, &p, &w),
	                 RW_EDOM);
}

static void test_hydro_brine(void **state)
{
	rw_pres_hydro_ws *ws = rw_pres_hydro_ws_new();
	rw_pres_column c;
	rw_pres_hydro_state st, keep;
	double p1, p2, rho, z, pfresh, prev = 0.0, sum = 0.0, rho_prev = 0.0;
	unsigned w;
	int k;

	(void)state;
	assert_non_null(ws);
	rw_pres_column_init(&c);
	c.air_gap_m = 30.0;
	c.water_depth_m = 120.0;
	/* one long step equals many short ones: T linear in depth either
	 * way, so the ODE solution must not depend on the sampling (1 Pa) */
	assert_int_equal(rw_pres_hydro_brine_init(&c, 8.0, 0.05, &st), RW_OK);
	near(st.p_pa, 1025.0 * G0 * 120.0, 1e-6);
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 3150.0, 98.0,
	                                          0.05, &p1, &rho, &w),
	                 RW_OK);
	assert_int_equal(w, 0);
	assert_int_equal(rw_pres_hydro_brine_init(&c, 8.0, 0.05, &st), RW_OK);
	for (k = 1; k <= 300; k++) {
		z = 150.0 + 10.0 * k;
		assert_int_equal(rw_pres_hydro_brine_step(
		                     ws, &c, &st, z, 8.0 + 0.03 * (z - 150.0),
		                     0.05, &p2, &rho, &w),
		                 RW_OK);
		/* the pressure is g times the integral of the density it
		 * returns: trapezoids of 10 m agree to 1e-6 (the density is
		 * smooth; curvature error ~ dz^2/12 rho'' L) */
		if (k > 1)
			sum += G0 * 10.0 * 0.5 * (rho + rho_prev);
		else
			prev = p2;
		rho_prev = rho;
	}
	near(p2, p1, 1.0);
	near(p2 - prev, sum, 1e-6 * sum);
	/* a NaCl brine is denser than fresh water: higher pressure. Fresh
	 * water at 30 degC is 995.6 kg/m^3 at 0.1 MPa and about 0.45 per
	 * GPa^-1 compressible, so some 1000.5 kg/m^3 at the 11 MPa
	 * of this depth (IAPWS-95, from memory): within 2.5 kg/m^3. */
	assert_int_equal(rw_pres_hydro_brine_init(&c, 30.0, 0.0, &st), RW_OK);
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 1150.0, 30.0,
	                                          0.0, &pfresh, &rho, &w),
	                 RW_OK);
	near(rho, 1000.5, 2.5);
	assert_true(pfresh < 1025.0 * G0 * 120.0 + 1000.0 * G0 * 1000.0);
	assert_true(pfresh > 1025.0 * G0 * 120.0 + 990.0 * G0 * 1000.0);
	assert_true(p1 > pfresh);
	/* above the mudline: the sea column, no state change */
	assert_int_equal(rw_pres_hydro_brine_init(&c, 8.0, 0.05, &st), RW_OK);
	keep = st;
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 90.0, 8.0, 0.05,
	                                          &p1, &rho, &w),
	                 RW_OK);
	near(p1, 1025.0 * G0 * 60.0, 1e-6);
	assert_true(w & RW_PRES_WARN_ABOVE_MUDLINE);
	assert_memory_equal(&st, &keep, sizeof st);
	/* outside the fitted range: flagged, still computed */
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 5000.0, 180.0,
	                                          0.05, &p1, &rho, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_FLUID_RANGE);
	/* repeated depth; going up; bad inputs */
	keep = st;
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 5000.0, 180.0,
	                                          0.05, &p2, &rho, &w),
	                 RW_OK);
	assert_true(w & RW_PRES_WARN_DEPTH_REPEAT);
	near(p2, p1, 0.0);
	assert_memory_equal(&st, &keep, sizeof st);
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 4000.0, 150.0,
	                                          0.05, &p2, &rho, &w),
	                 RW_EINVAL);
	assert_true(isnan(p2) && isnan(rho));
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 6000.0, 400.0,
	                                          0.05, &p2, &rho, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 6000.0, 150.0,
	                                          0.5, &p2, &rho, &w),
	                 RW_EDOM);
	assert_int_equal(rw_pres_hydro_brine_step(NULL, &c, &st, 6000.0, 150.0,
	                                          0.05, &p2, &rho, &w),
	                 RW_EINVAL);
	assert_memory_equal(&st, &keep, sizeof st);
	/* resume continues exactly like the state it copies */
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 5500.0, 165.0,
	                                          0.05, &p1, &rho, &w),
	                 RW_OK);
	assert_int_equal(rw_pres_hydro_brine_resume(&c, keep.z_m, keep.p_pa,
	                                            keep.t_degc, keep.sal_frac,
	                                            &st),
	                 RW_OK);
	assert_int_equal(rw_pres_hydro_brine_step(ws, &c, &st, 5500.0, 165.0,
	                                          0.05, &p2, &rho, &w),
	                 RW_OK);
	assert_true(p1 == p2);
	assert_true(w & RW_PRES_WARN_RESUMED);
	assert_int_equal(
	    rw_pres_hydro_brine_resume(&c, 10.0, 1e6, 20.0, 0.0, &st), RW_EDOM);
	assert_int_equal(rw_pres_hydro_brine_init(&c, -30.0, 0.0, &st),
	                 RW_EDOM);
	rw_pres_hydro_ws_free(ws);
	rw_pres_hydro_ws_free(NULL);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_constants),
	    cmocka_unit_test(test_emw),
	    cmocka_unit_test(test_column_check),
	    cmocka_unit_test(test_shallow_trend),
	    cmocka_unit_test(test_constant_density),
	    cmocka_unit_test(test_linear_density),
	    cmocka_unit_test(test_step_rules),
	    cmocka_unit_test(test_stream_batch_resume),
	    cmocka_unit_test(test_hydro_const),
	    cmocka_unit_test(test_hydro_brine),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
