/* B3 of tests/bench: the per-sample kernels of the compute core against
 * their compute floors. For each family (elastic conversion, Batzle-Wang
 * brine, gas and dead oil, Gassmann substitution, exact Zoeppritz,
 * Shuey, Aki-Richards, the soft sand, Eaton) the core's public function
 * is called once per sample in a plain loop, and the floor is the same
 * formula written inline here: no library call, no dispatch, no input
 * checks, no warnings. Both write the same output layout (the core's
 * output struct) from the same inputs.
 *
 * Before anything is timed, every output of every sample of the core is
 * compared with the floor's (1e-12 relative), and the core must return
 * RW_OK on every sample (the inputs are valid, so the timed path is the
 * normal one). Allocation: malloc, calloc, realloc, free, posix_memalign
 * and aligned_alloc are wrapped at link time (-DRW_BENCH_WRAP_MALLOC
 * -Wl,--wrap=..., as tests/bench/run builds it; the core is linked
 * statically from librockwire.a, so its calls are the wrapped ones) and
 * counted around each core loop; glibc's mallinfo2() before and
 * after the loops is a second check that catches allocations from shared
 * libraries too (as heap growth).
 *
 * Timing: each run processes the samples in chunks of CHUNK and times the
 * core and the floor on each chunk in turn, the order alternating, so a
 * burst of load from elsewhere on this shared machine falls on both.
 * Prints one JSON line per kernel and run:
 *   bench_kernels N RUNS
 *   {"kernel":"elastic","run":1,"n":N,"core_ns":..,"floor_ns":..,
 *    "allocs":0,"heap_growth":0,"max_rel_diff":0,"errors":0}
 * Part of the benchmarks; never built by the test suite. */
#include <complex.h>
/* glibc defines CMPLX only where the compiler has __builtin_complex
 * (gcc, not clang 14); the finite values here need no more than this. */
#ifndef CMPLX
#define CMPLX(x, y) ((double complex)((double)(x) + _Complex_I * (double)(y)))
#endif
#include <malloc.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "rockwire/elastic.h"
#include "rockwire/fluid.h"
#include "rockwire/pressure.h"
#include "rockwire/reflect.h"
#include "rockwire/rock.h"
#include "rockwire/rockmodel.h"
#include "rockwire/status.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define CHUNK 10000

/* ---- allocation counting (-Wl,--wrap=malloc,...) ------------------------ */

static unsigned long n_alloc;

/* tests/bench/run links with -Wl,--wrap=... and defines
 * RW_BENCH_WRAP_MALLOC; the CMake build of tests/bench/bench_*.c does
 * neither, and then allocations are reported as not counted (null). */
#ifdef RW_BENCH_WRAP_MALLOC
#define COUNTING 1

void *__real_malloc(size_t n);
void *__real_calloc(size_t m, size_t n);
void *__real_realloc(void *p, size_t n);
void __real_free(void *p);
int __real_posix_memalign(void **p, size_t a, size_t n);
void *__real_aligned_alloc(size_t a, size_t n);
void *__wrap_malloc(size_t n);
void *__wrap_calloc(size_t m, size_t n);
void *__wrap_realloc(void *p, size_t n);
void __wrap_free(void *p);
int __wrap_posix_memalign(void **p, size_t a, size_t n);
void *__wrap_aligned_alloc(size_t a, size_t n);

void *__wrap_malloc(size_t n)
{
	n_alloc++;
	return __real_malloc(n);
}

void *__wrap_calloc(size_t m, size_t n)
{
	n_alloc++;
	return __real_calloc(m, n);
}

void *__wrap_realloc(void *p, size_t n)
{
	n_alloc++;
	return __real_realloc(p, n);
}

void __wrap_free(void *p)
{
	if (p)
		n_alloc++;
	__real_free(p);
}

int __wrap_posix_memalign(void **p, size_t a, size_t n)
{
	n_alloc++;
	return __real_posix_memalign(p, a, n);
}

void *__wrap_aligned_alloc(size_t a, size_t n)
{
	n_alloc++;
	return __real_aligned_alloc(a, n);
}
#else
#define COUNTING 0
#endif

/* ---- inputs ---------------------------------------------------------- */

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static uint64_t lcg = 88172645463325252u;

/* Uniform in [lo, hi) from a fixed LCG: the same inputs on every machine. */
static double u(double lo, double hi)
{
	lcg = lcg * 6364136223846793005u + 1442695040888963407u;
	return lo + (hi - lo) * (double)(lcg >> 11) / 9007199254740992.0;
}

/* Up to 6 input columns per sample; outputs as the core's structs. */
static size_t n;
static double *in[6];
#define MAXOUT 16                    /* doubles per sample, at most */
static double *out_core, *out_floor; /* n * MAXOUT doubles each */
static unsigned *warn;               /* the core's warnings, kept */
static int errors;                   /* samples the core refused */

/* Invented sand-shale interfaces and logs (no real well): rho kg/m^3,
 * vp, vs m/s. */
static void logs3(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(2500.0, 4500.0);
		in[1][i] = in[0][i] / u(1.6, 2.2);
		in[2][i] = u(2100.0, 2600.0);
	}
}

/* The per-request parameters (mineral, fluids, critical porosity,
 * coordination number, Eaton exponent) are read at run time at the top of
 * each loop, as a request's would be: the floor may hoist what depends on
 * them alone out of its loop (a plain loop over one request would), but
 * the compiler cannot fold them into constants. Quartz (Mavko, Mukerji &
 * Dvorkin 2009, table 7.1.1, from memory), a brine and a gas. */
static volatile double v_par[9] = {36.6e9, 2.8e9, 1030.0, 0.12e9, 250.0,
                                   45.0e9, 0.40,  9.0,    3.0};
#define PARAMS                                                                 \
	const double K_MIN = v_par[0], K_FL1 = v_par[1], R_FL1 = v_par[2],     \
	             K_FL2 = v_par[3], R_FL2 = v_par[4], MU_MIN = v_par[5],    \
	             PHI_C = v_par[6], COORD = v_par[7], EATON_N = v_par[8];   \
	(void)K_MIN, (void)K_FL1, (void)R_FL1, (void)K_FL2, (void)R_FL2,       \
	    (void)MU_MIN, (void)PHI_C, (void)COORD, (void)EATON_N

/* ---- the kernels: core loop and floor loop over [i0, i1) ---------------- */

/* 1. elastic conversion from vp, vs, rho (rw_elastic_from_velocities). */
static void elastic_init(void)
{
	logs3();
}

static void elastic_core(size_t i0, size_t i1)
{
	int err = 0;
	rw_elastic *o = (rw_elastic *)out_core;
	for (size_t i = i0; i < i1; i++)
		err += rw_elastic_from_velocities(in[0][i], in[1][i], in[2][i],
		                                  &o[i], &warn[i]) != RW_OK;
	errors += err;
}

/* Mavko, Mukerji & Dvorkin 2009, isotropic constants: M = rho vp^2,
 * mu = rho vs^2, K = M - 4/3 mu, lambda = M - 2 mu, nu and E (ASTM
 * D2845), impedances, Vp/Vs, slownesses. */
static void elastic_floor(size_t i0, size_t i1)
{
	rw_elastic *o = (rw_elastic *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double a = in[0][i], b = in[1][i], rho = in[2][i];
		double m = rho * a * a, mu = rho * b * b;
		rw_elastic *e = &o[i];

		e->rho = rho;
		e->m = m;
		e->mu = mu;
		e->k = m - 4.0 / 3.0 * mu;
		e->lambda = m - 2.0 * mu;
		e->nu = (m - 2.0 * mu) / (2.0 * (m - mu));
		e->e = 2.0 * mu * (1.0 + e->nu);
		e->vp = a;
		e->vs = b;
		e->ai = rho * a;
		e->si = rho * b;
		e->vpvs = a / b;
		e->dtp = 1.0 / a;
		e->dts = 1.0 / b;
	}
}

/* 2. NaCl brine, Batzle & Wang 1992 eqs. 27a, 27b, 28, 29. */
static void brine_init(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(5.0, 80.0);   /* p, MPa */
		in[1][i] = u(20.0, 120.0); /* T, degC */
		in[2][i] = u(0.0, 0.25);   /* salinity, fraction */
	}
}

static void brine_core(size_t i0, size_t i1)
{
	int err = 0;
	rw_fluid_phase *o = (rw_fluid_phase *)out_core;
	for (size_t i = i0; i < i1; i++)
		err += rw_fluid_brine_props(in[0][i], in[1][i], in[2][i], &o[i],
		                            &warn[i]) != RW_OK;
	errors += err;
}

static const double bw_w[5][4] = {
    {1402.85, 1.524, 3.437e-3, -1.197e-5},
    {4.871, -0.0111, 1.739e-4, -1.628e-6},
    {-0.04783, 2.747e-4, -2.135e-6, 1.237e-8},
    {1.487e-4, -6.503e-7, -1.455e-8, 1.327e-10},
    {-2.197e-7, 7.987e-10, 5.230e-11, -4.614e-13},
};

static void brine_floor(size_t i0, size_t i1)
{
	rw_fluid_phase *o = (rw_fluid_phase *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double p = in[0][i], t = in[1][i], s = in[2][i];
		double rw, rho, vw = 0.0, ti = 1.0, v;

		rw = 1.0 +
		     1e-6 * (-80.0 * t - 3.3 * t * t + 0.00175 * t * t * t +
		             489.0 * p - 2.0 * t * p + 0.016 * t * t * p -
		             1.3e-5 * t * t * t * p - 0.333 * p * p -
		             0.002 * t * p * p);
		for (int a = 0; a < 5; a++) {
			double pj = 1.0;
			for (int b = 0; b < 4; b++) {
				vw += bw_w[a][b] * ti * pj;
				pj *= p;
			}
			ti *= t;
		}
		rho = rw + s * (0.668 + 0.44 * s +
		                1e-6 * (300.0 * p - 2400.0 * p * s +
		                        t * (80.0 + 3.0 * t - 3300.0 * s -
		                             13.0 * p + 47.0 * p * s)));
		v = vw +
		    s * (1170.0 - 9.6 * t + 0.055 * t * t - 8.5e-5 * t * t * t +
		         2.6 * p - 0.0029 * t * p - 0.0476 * p * p) +
		    pow(s, 1.5) * (780.0 - 10.0 * p + 0.16 * p * p) -
		    1820.0 * s * s;
		o[i].rho_kgm3 = 1000.0 * rho;
		o[i].v_ms = v;
		o[i].k_pa = 1000.0 * rho * v * v;
	}
}

/* 3. hydrocarbon gas, Batzle & Wang 1992 eqs. 9-11. */
static void gas_init(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(5.0, 60.0);   /* p, MPa */
		in[1][i] = u(30.0, 120.0); /* T, degC */
		in[2][i] = u(0.56, 0.9);   /* gravity */
	}
}

static void gas_core(size_t i0, size_t i1)
{
	int err = 0;
	rw_fluid_phase *o = (rw_fluid_phase *)out_core;
	for (size_t i = i0; i < i1; i++) {
		double z;
		err += rw_fluid_gas_props(in[0][i], in[1][i], in[2][i], &o[i],
		                          &z, &warn[i]) != RW_OK;
	}
	errors += err;
}

static void gas_floor(size_t i0, size_t i1)
{
	rw_fluid_phase *o = (rw_fluid_phase *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double p = in[0][i], g = in[2][i];
		double ta = in[1][i] + RW_FLUID_KELVIN;
		double tpr = ta / (94.72 + 170.75 * g);
		double ppr = p / (4.892 - 0.4048 * g);
		double a = 0.03 + 0.00527 * pow(3.5 - tpr, 3.0);
		double b = 0.642 * tpr - 0.007 * pow(tpr, 4.0) - 0.52;
		double c = 0.109 * (3.85 - tpr) * (3.85 - tpr);
		double d = 0.45 + 8.0 * (0.56 - 1.0 / tpr) * (0.56 - 1.0 / tpr);
		double e = c * exp(-d * pow(ppr, 1.2) / tpr);
		double z = a * ppr + b + e;
		double dzdp = a - e * d * 1.2 * pow(ppr, 0.2) / tpr;
		double gam = 0.85 + 5.6 / (ppr + 2.0) +
		             27.1 / ((ppr + 3.5) * (ppr + 3.5)) -
		             8.7 * exp(-0.65 * (ppr + 1.0));
		double den = 1.0 - ppr / z * dzdp;
		double rho = g * RW_FLUID_AIR_MOLAR_MASS * p * 1e6 /
		             (z * RW_FLUID_GAS_CONSTANT * ta);

		o[i].rho_kgm3 = rho;
		o[i].k_pa = p * 1e6 * gam / den;
		o[i].v_ms = sqrt(o[i].k_pa / rho);
	}
}

/* 4. dead oil, Batzle & Wang 1992 eqs. 18-20. */
static void oil_init(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(5.0, 60.0);   /* p, MPa */
		in[1][i] = u(20.0, 120.0); /* T, degC */
		in[2][i] = u(15.0, 45.0);  /* API */
	}
}

static void oil_core(size_t i0, size_t i1)
{
	int err = 0;
	rw_fluid_phase *o = (rw_fluid_phase *)out_core;
	for (size_t i = i0; i < i1; i++)
		err += rw_fluid_deadoil_props(in[0][i], in[1][i], in[2][i],
		                              &o[i], &warn[i]) != RW_OK;
	errors += err;
}

static void oil_floor(size_t i0, size_t i1)
{
	rw_fluid_phase *o = (rw_fluid_phase *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double p = in[0][i], t = in[1][i];
		double r0 = 141.5 / (in[2][i] + 131.5);
		double rp = r0 +
		            (0.00277 * p - 1.71e-7 * p * p * p) * (r0 - 1.15) *
		                (r0 - 1.15) +
		            3.49e-4 * p;
		double rho = rp / (0.972 + 3.81e-4 * pow(t + 17.78, 1.175));
		double v =
		    2096.0 * sqrt(r0 / (2.6 - r0)) - 3.7 * t + 4.64 * p +
		    0.0115 * (4.12 * sqrt(1.08 / r0 - 1.0) - 1.0) * t * p;

		o[i].rho_kgm3 = 1000.0 * rho;
		o[i].v_ms = v;
		o[i].k_pa = 1000.0 * rho * v * v;
	}
}

/* 5. Gassmann substitution, brine to gas (Mavko, Mukerji & Dvorkin
 * 2009, ch. 6): K_dry from the brine rock, K_sat with gas. */

static void subst_init(void)
{
	PARAMS;
	/* brine sands whose velocity and density fall with porosity (an
	 * invented trend), so every sample has a positive dry frame */
	for (size_t i = 0; i < n; i++) {
		double phi = u(0.12, 0.30);

		in[0][i] = (4800.0 - 6000.0 * phi) * u(0.95, 1.05);
		in[1][i] = in[0][i] / u(1.6, 2.0);
		in[2][i] = 2650.0 * (1.0 - phi) + R_FL1 * phi;
		in[3][i] = phi;
	}
}

static void subst_core(size_t i0, size_t i1)
{
	PARAMS;
	int err = 0;
	rw_rock_subst *o = (rw_rock_subst *)out_core;
	for (size_t i = i0; i < i1; i++)
		err += rw_rock_fluid_subst(in[0][i], in[1][i], in[2][i],
		                           in[3][i], K_MIN, K_FL1, R_FL1, K_FL2,
		                           R_FL2, &o[i], &warn[i]) != RW_OK;
	errors += err;
}

static void subst_floor(size_t i0, size_t i1)
{
	PARAMS;
	rw_rock_subst *o = (rw_rock_subst *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double vp = in[0][i], vs = in[1][i], rho = in[2][i];
		double phi = in[3][i];
		double mu = rho * vs * vs;
		double k1 = rho * vp * vp - 4.0 / 3.0 * mu;
		double r = phi * K_MIN / K_FL1;
		double kd = (k1 * (r + 1.0 - phi) - K_MIN) /
		            (r + k1 / K_MIN - 1.0 - phi);
		double a = 1.0 - kd / K_MIN;
		double den =
		    phi / K_FL2 + (1.0 - phi) / K_MIN - kd / (K_MIN * K_MIN);
		double k2 = kd + a * a / den;
		double rho2 = rho + phi * (R_FL2 - R_FL1);

		o[i].k_sat_pa = k2;
		o[i].mu_pa = mu;
		o[i].rho_kgm3 = rho2;
		o[i].k_dry_pa = kd;
		o[i].vp_ms = sqrt((k2 + 4.0 / 3.0 * mu) / rho2);
		o[i].vs_ms = sqrt(mu / rho2);
	}
}

/* 6-8. reflectivity of a sand-shale interface at one angle each:
 * in[0..2] upper vp, vs, rho; in[3..5] lower; angles 0-40 deg. */
static double *theta;

static void iface_init(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(2500.0, 4000.0);
		in[1][i] = in[0][i] / u(1.7, 2.2);
		in[2][i] = u(2200.0, 2550.0);
		in[3][i] = in[0][i] * u(0.8, 1.2);
		in[4][i] = in[3][i] / u(1.5, 2.2);
		in[5][i] = in[2][i] * u(0.9, 1.08);
		theta[i] = u(0.0, 40.0) * M_PI / 180.0;
	}
}

static void media(size_t i, rw_reflect_medium *a, rw_reflect_medium *b)
{
	a->vp_ms = in[0][i];
	a->vs_ms = in[1][i];
	a->rho_kgm3 = in[2][i];
	b->vp_ms = in[3][i];
	b->vs_ms = in[4][i];
	b->rho_kgm3 = in[5][i];
}

static void zoep_core(size_t i0, size_t i1)
{
	int err = 0;
	rw_reflect_pcoefs *o = (rw_reflect_pcoefs *)out_core;
	for (size_t i = i0; i < i1; i++) {
		rw_reflect_medium a, b;
		media(i, &a, &b);
		err += rw_reflect_zoeppritz(&a, &b, theta[i], &o[i]) != RW_OK;
	}
	errors += err;
}

/* Vertical slowness on the branch Re >= 0, Im >= 0. */
static inline double complex qz(double v, double p)
{
	double s = (1.0 / v - p) * (1.0 / v + p);
	return s >= 0.0 ? CMPLX(sqrt(s), 0.0) : CMPLX(0.0, sqrt(-s));
}

/* Aki & Richards 1980, eq. 5.39 (solid over solid). */
static void zoep_floor(size_t i0, size_t i1)
{
	rw_reflect_pcoefs *o = (rw_reflect_pcoefs *)out_floor;
	for (size_t i = i0; i < i1; i++) {
		double a1 = in[0][i], b1 = in[1][i], r1 = in[2][i];
		double a2 = in[3][i], b2 = in[4][i], r2 = in[5][i];
		double p = sin(theta[i]) / a1, p2 = p * p;
		double complex qa1 = qz(a1, p), qb1 = qz(b1, p);
		double complex qa2 = qz(a2, p), qb2 = qz(b2, p);
		double a = r2 * (1.0 - 2.0 * b2 * b2 * p2) -
		           r1 * (1.0 - 2.0 * b1 * b1 * p2);
		double b =
		    r2 * (1.0 - 2.0 * b2 * b2 * p2) + 2.0 * r1 * b1 * b1 * p2;
		double c =
		    r1 * (1.0 - 2.0 * b1 * b1 * p2) + 2.0 * r2 * b2 * b2 * p2;
		double d = 2.0 * (r2 * b2 * b2 - r1 * b1 * b1);
		double complex e = b * qa1 + c * qa2;
		double complex f = b * qb1 + c * qb2;
		double complex g = a - d * qa1 * qb2;
		double complex h = a - d * qa2 * qb1;
		double complex dd = e * f + g * h * p2;
		double complex rpp, rps, tpp, tps;

		rpp = ((b * qa1 - c * qa2) * f - (a + d * qa1 * qb2) * h * p2) /
		      dd;
		rps = -2.0 * qa1 * (a * b + c * d * qa2 * qb2) * p * a1 /
		      (b1 * dd);
		tpp = 2.0 * r1 * qa1 * f * a1 / (a2 * dd);
		tps = 2.0 * r1 * qa1 * h * p * a1 / (b2 * dd);
		o[i].rpp.re = creal(rpp);
		o[i].rpp.im = cimag(rpp);
		o[i].rps.re = creal(rps);
		o[i].rps.im = cimag(rps);
		o[i].tpp.re = creal(tpp);
		o[i].tpp.im = cimag(tpp);
		o[i].tps.re = creal(tps);
		o[i].tps.im = cimag(tps);
	}
}

static void shuey_core(size_t i0, size_t i1)
{
	int err = 0;
	for (size_t i = i0; i < i1; i++) {
		rw_reflect_medium a, b;
		media(i, &a, &b);
		err +=
		    rw_reflect_shuey3(&a, &b, theta[i], &out_core[i]) != RW_OK;
	}
	errors += err;
}

/* Shuey 1985 three-term form, A, B, C as in Mavko, Mukerji & Dvorkin
 * 2009 (sec. 3.x, from memory): means and relative contrasts. */
static void shuey_floor(size_t i0, size_t i1)
{
	for (size_t i = i0; i < i1; i++) {
		double vp = 0.5 * (in[0][i] + in[3][i]);
		double vs = 0.5 * (in[1][i] + in[4][i]);
		double rho = 0.5 * (in[2][i] + in[5][i]);
		double dvp = (in[3][i] - in[0][i]) / vp;
		double dvs = (in[4][i] - in[1][i]) / vs;
		double drho = (in[5][i] - in[2][i]) / rho;
		double k = vs / vp;
		double a = 0.5 * (dvp + drho);
		double b = 0.5 * dvp - 2.0 * k * k * (drho + 2.0 * dvs);
		double c = 0.5 * dvp;
		double s = sin(theta[i]), t = tan(theta[i]);

		out_floor[i] = a + b * s * s + c * (t * t - s * s);
	}
}

static void aki_core(size_t i0, size_t i1)
{
	int err = 0;
	for (size_t i = i0; i < i1; i++) {
		rw_reflect_medium a, b;
		media(i, &a, &b);
		err += rw_reflect_aki_richards(&a, &b, theta[i],
		                               &out_core[i]) != RW_OK;
	}
	errors += err;
}

/* Aki & Richards 1980, eq. 5.44 (from memory), at the average of the
 * incidence and transmission angles. */
static void aki_floor(size_t i0, size_t i1)
{
	for (size_t i = i0; i < i1; i++) {
		double vp = 0.5 * (in[0][i] + in[3][i]);
		double vs = 0.5 * (in[1][i] + in[4][i]);
		double rho = 0.5 * (in[2][i] + in[5][i]);
		double dvp = (in[3][i] - in[0][i]) / vp;
		double dvs = (in[4][i] - in[1][i]) / vs;
		double drho = (in[5][i] - in[2][i]) / rho;
		double s = sin(theta[i]);
		double t = 0.5 * (theta[i] + asin(in[3][i] * s / in[0][i]));
		double p = s / in[0][i];
		double g = vs * vs * p * p;
		double ct = cos(t);

		out_floor[i] = 0.5 * (1.0 - 4.0 * g) * drho +
		               dvp / (2.0 * ct * ct) - 4.0 * g * dvs;
	}
}

/* 9. soft sand (Dvorkin & Nur 1996): Hertz-Mindlin at critical porosity
 * joined to the mineral by the modified lower Hashin-Shtrikman bound. */

static void sand_init(void)
{
	for (size_t i = 0; i < n; i++) {
		in[0][i] = u(0.05, 0.38); /* porosity */
		in[1][i] = u(5e6, 40e6);  /* effective pressure, Pa */
		in[2][i] = u(0.0, 1.0);   /* slip (friction) fraction */
	}
}

static void sand_core(size_t i0, size_t i1)
{
	PARAMS;
	int err = 0;
	for (size_t i = i0; i < i1; i++)
		err += rw_rm_soft_sand(K_MIN, MU_MIN, in[0][i], PHI_C, COORD,
		                       in[1][i], in[2][i], &out_core[2 * i],
		                       &out_core[2 * i + 1], &warn[i]) != RW_OK;
	errors += err;
}

static void sand_floor(size_t i0, size_t i1)
{
	PARAMS;
	const double nu =
	    (3.0 * K_MIN - 2.0 * MU_MIN) / (2.0 * (3.0 * K_MIN + MU_MIN));
	for (size_t i = i0; i < i1; i++) {
		double phi = in[0][i], p = in[1][i], slip = in[2][i];
		double base = COORD * COORD * (1.0 - PHI_C) * (1.0 - PHI_C) *
		              MU_MIN * MU_MIN * p /
		              (M_PI * M_PI * (1.0 - nu) * (1.0 - nu));
		double khm = cbrt(base / 18.0);
		double muhm = (2.0 + 3.0 * slip - nu * (1.0 + 3.0 * slip)) /
		              (5.0 * (2.0 - nu)) * cbrt(1.5 * base);
		double z =
		    muhm / 6.0 * (9.0 * khm + 8.0 * muhm) / (khm + 2.0 * muhm);
		double a = 4.0 / 3.0 * muhm, f = phi / PHI_C;

		out_floor[2 * i] =
		    1.0 / (f / (khm + a) + (1.0 - f) / (K_MIN + a)) - a;
		out_floor[2 * i + 1] =
		    1.0 / (f / (muhm + z) + (1.0 - f) / (MU_MIN + z)) - z;
	}
}

/* 10. Eaton 1975 pore pressure from sonic: pp = sv - (sv - ph)
 * (dt_n / dt)^n, n = 3. */
static void eaton_init(void)
{
	for (size_t i = 0; i < n; i++) {
		double z = u(500.0, 5000.0);
		in[0][i] = 2300.0 * 9.80665 * z;       /* sv, Pa */
		in[1][i] = 1030.0 * 9.80665 * z;       /* ph, Pa */
		in[3][i] = 1e-6 / 0.3048 * u(60, 120); /* normal dt, s/m */
		in[2][i] = in[3][i] * u(0.95, 1.6);    /* measured dt */
	}
}

static void eaton_core(size_t i0, size_t i1)
{
	PARAMS;
	int err = 0;
	for (size_t i = i0; i < i1; i++)
		err +=
		    rw_pres_pore_eaton(in[0][i], in[1][i], in[2][i], in[3][i],
		                       EATON_N, &out_core[2 * i],
		                       &out_core[2 * i + 1], &warn[i]) != RW_OK;
	errors += err;
}

static void eaton_floor(size_t i0, size_t i1)
{
	PARAMS;
	for (size_t i = i0; i < i1; i++) {
		double r = in[3][i] / in[2][i];
		double sig = (in[0][i] - in[1][i]) * pow(r, EATON_N);

		out_floor[2 * i] = r == 1.0 ? in[1][i] : in[0][i] - sig;
		out_floor[2 * i + 1] = sig;
	}
}

/* ---- driver ---------------------------------------------------------- */

struct kernel {
	const char *name;
	int nout; /* doubles per sample */
	void (*init)(void);
	void (*core)(size_t, size_t);
	void (*floor)(size_t, size_t);
};

static const struct kernel kernels[] = {
    {"elastic", (int)(sizeof(rw_elastic) / sizeof(double)), elastic_init,
     elastic_core, elastic_floor},
    {"brine", 3, brine_init, brine_core, brine_floor},
    {"gas", 3, gas_init, gas_core, gas_floor},
    {"deadoil", 3, oil_init, oil_core, oil_floor},
    {"gassmann", (int)(sizeof(rw_rock_subst) / sizeof(double)), subst_init,
     subst_core, subst_floor},
    {"zoeppritz", (int)(sizeof(rw_reflect_pcoefs) / sizeof(double)), iface_init,
     zoep_core, zoep_floor},
    {"shuey3", 1, iface_init, shuey_core, shuey_floor},
    {"aki_richards", 1, iface_init, aki_core, aki_floor},
    {"soft_sand", 2, sand_init, sand_core, sand_floor},
    {"eaton", 2, eaton_init, eaton_core, eaton_floor},
};

static double max_rel_diff(int nout)
{
	double worst = 0.0;
	for (size_t i = 0; i < n * (size_t)nout; i++) {
		double a = out_core[i], b = out_floor[i];
		double m = fmax(fabs(a), fabs(b)), d;

		if (isnan(a) || isnan(b))
			return INFINITY; /* every sample is valid: no NaN */
		d = m > 0.0 ? fabs(a - b) / m : 0.0;
		if (d > worst)
			worst = d;
	}
	return worst;
}

int main(int argc, char **argv)
{
	int runs, bad = 0;
	const char *only = argc > 3 ? argv[3] : NULL;

	if (argc < 3 || (n = strtoul(argv[1], NULL, 10)) < CHUNK ||
	    (runs = atoi(argv[2])) < 1) {
		fprintf(stderr,
		        "usage: bench_kernels N RUNS [KERNEL]"
		        " (N >= %d)\n",
		        CHUNK);
		return 2;
	}
	for (int j = 0; j < 6; j++)
		in[j] = malloc(n * sizeof(double));
	theta = malloc(n * sizeof(double));
	out_core = malloc(n * MAXOUT * sizeof(double));
	out_floor = malloc(n * MAXOUT * sizeof(double));
	warn = malloc(n * sizeof(unsigned));
	for (int j = 0; j < 6; j++)
		if (!in[j])
			return 1;
	if (!theta || !out_core || !out_floor || !warn)
		return 1;

	for (size_t k = 0; k < sizeof kernels / sizeof kernels[0]; k++) {
		const struct kernel *K = &kernels[k];
		double diff;
		unsigned long allocs;
		size_t heap0;
		ssize_t growth;

		if (only && strcmp(only, K->name) != 0)
			continue;
		if (K->nout > MAXOUT)
			return 1;
		K->init();
		/* outputs to NaN so a sample left unwritten cannot pass */
		for (size_t i = 0; i < n * MAXOUT; i++)
			out_core[i] = out_floor[i] = NAN;
		errors = 0;
		K->floor(0, n);
		heap0 = mallinfo2().uordblks;
		allocs = n_alloc;
		K->core(0, n);
		allocs = n_alloc - allocs;
		growth = (ssize_t)(mallinfo2().uordblks - heap0);
		diff = max_rel_diff(K->nout);
		if (errors || !(diff <= 1e-12)) {
			fprintf(
			    stderr,
			    "bench_kernels: %s: %d samples refused, "
			    "largest relative difference %g (limit 1e-12)\n",
			    K->name, errors, diff);
			bad = 1;
			continue;
		}
		for (int r = 0; r < runs; r++) {
			double tc = 0.0, tf = 0.0, t0;
			unsigned long a0 = n_alloc;

			for (size_t c = 0, x = 0; c < n; c += CHUNK, x++) {
				size_t e = n - c < CHUNK ? n - c : CHUNK;
				int core_first = (int)((x + (size_t)r) % 2);

				for (int w = 0; w < 2; w++) {
					t0 = now();
					if ((w == 0) == core_first) {
						heap0 = mallinfo2().uordblks;
						t0 = now();
						K->core(c, c + e);
						tc += now() - t0;
						growth +=
						    (ssize_t)(mallinfo2()
						                  .uordblks -
						              heap0);
					} else {
						K->floor(c, c + e);
						tf += now() - t0;
					}
				}
			}
			allocs += n_alloc - a0;
			char nal[32] = "null";
			if (COUNTING)
				snprintf(nal, sizeof nal, "%lu", allocs);
			printf("{\"kernel\":\"%s\",\"run\":%d,\"n\":%zu,"
			       "\"core_ns\":%.3f,\"floor_ns\":%.3f,"
			       "\"allocs\":%s,\"heap_growth\":%zd,"
			       "\"max_rel_diff\":%.3g,\"errors\":%d}\n",
			       K->name, r + 1, n, tc * 1e9 / (double)n,
			       tf * 1e9 / (double)n, nal, growth, diff, errors);
			fflush(stdout);
		}
	}
	return bad;
}
