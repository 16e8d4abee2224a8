/* The compute floor of the rock-model benchmarks, run on demand by
 * tests/bench/bench_rockmodel.py (never by ctest): the core functions in a
 * plain C loop on one thread, no JSON. Prints one JSON line.
 *   bench_rockmodel template MODEL NPHI NSW REPS
 *       rw_rm_template of MODEL (soft_sand or dem) over porosity 0-0.4 x
 *       sw 0-1: seconds per node, median, min and max of REPS runs.
 *   bench_rockmodel invert N REPS
 *       N inversions of AI and Vp/Vs (2 % each) on the soft sand, 3
 *       starts, an 11-node profile: seconds per inversion, median, min
 *       and max of REPS runs.
 * The rock is the one bench_rockmodel.py sends: quartz with the core's
 * clay row, phi_c 0.40, Murphy's coordination, no slip, 20 MPa, brine
 * 2.8 GPa and 1.03 g/cm3, gas 0.06 GPa and 0.2 g/cm3 (invented round
 * numbers), Wood mixing. Sample i of the inversion is the model at
 * porosity and sw from sample_point(i), the same formula as the script. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <gsl/gsl_errno.h>

#include "rockwire/mineral.h"
#include "rockwire/rockmodel.h"
#include "rockwire/status.h"

static double now(void)
{
	struct timespec ts;

	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void *xalloc(size_t n)
{
	void *p = malloc(n ? n : 1);

	if (p == NULL) {
		fprintf(stderr, "bench_rockmodel: out of memory\n");
		exit(1);
	}
	return p;
}

static int cmp(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return (x > y) - (x < y);
}

static void spec_of(rw_rm_spec *s, int model)
{
	rw_mineral q, c;

	memset(s, 0, sizeof *s);
	rw_mineral_find("quartz", NULL, &q);
	rw_mineral_find("clay", NULL, &c);
	s->model = model;
	s->k_min_pa = q.k_pa;
	s->mu_min_pa = q.mu_pa;
	s->rho_min_kgm3 = q.rho_kgm3;
	s->k_clay_pa = c.k_pa;
	s->mu_clay_pa = c.mu_pa;
	s->rho_clay_kgm3 = c.rho_kgm3;
	s->clay_mix = RW_MIX_HILL;
	s->phi_c = 0.40;
	s->coord = 0.0;
	s->slip = 1.0;
	s->pore_shape = RW_RM_SHAPE_SPHEROID;
	s->aspect = 0.1;
	s->aspect_clay = 0.03;
	s->tol = 1e-10;
	s->k_brine_pa = 2.8e9;
	s->rho_brine_kgm3 = 1030.0;
	s->k_hc_pa = 0.06e9;
	s->rho_hc_kgm3 = 200.0;
	s->fluid_mix = RW_RM_FLUID_WOOD;
	s->brie_e = 3.0;
}

/* Porosity and sw of inversion sample i (bench_rockmodel.py has the
 * same): a scatter over 0.05-0.35 x 0-1. */
static void sample_point(size_t i, double *phi, double *sw)
{
	*phi = 0.05 + 0.30 * (double)((i * 7919u) % 1000u) / 999.0;
	*sw = (double)((i * 104729u) % 1000u) / 999.0;
}

static void report(const char *what, double *t, int reps)
{
	qsort(t, (size_t)reps, sizeof *t, cmp);
	printf("{\"%s\": {\"median_s\": %.9g, \"min_s\": %.9g, \"max_s\": "
	       "%.9g, \"reps\": %d}}\n",
	       what, t[reps / 2], t[0], t[reps - 1], reps);
}

static int bench_template(const char *name, size_t n_phi, size_t n_sw, int reps)
{
	int model = strcmp(name, "dem") == 0 ? RW_RM_DEM : RW_RM_SOFT_SAND;
	double *phi = xalloc(n_phi * sizeof *phi),
	       *sw = xalloc(n_sw * sizeof *sw);
	rw_rm_sat *nodes = xalloc(n_phi * n_sw * sizeof *nodes);
	int *st = xalloc(n_phi * n_sw * sizeof *st);
	unsigned *w = xalloc(n_phi * n_sw * sizeof *w);
	double t[64], sum = 0;
	rw_rm_ws *ws = rw_rm_ws_new(0, 0);
	rw_rm_spec s;

	spec_of(&s, model);
	for (size_t i = 0; i < n_phi; i++)
		phi[i] = 0.4 * (double)i / (double)(n_phi - 1);
	for (size_t j = 0; j < n_sw; j++)
		sw[j] = (double)j / (double)(n_sw - 1);
	for (int r = 0; r < reps; r++) {
		double t0 = now();
		if (rw_rm_template(&s, n_phi, phi, n_sw, sw, RW_RM_AXIS_NONE, 1,
		                   NULL, 0.0, 20e6, ws, nodes, st, w) != RW_OK)
			return 1;
		t[r] = (now() - t0) / (double)(n_phi * n_sw);
	}
	for (size_t k = 0; k < n_phi * n_sw; k++)
		if (isfinite(nodes[k].ai))
			sum += nodes[k].ai;
	report("template", t, reps);
	fprintf(stderr, "checksum %.12g\n", sum);
	rw_rm_ws_free(ws);
	free(phi);
	free(sw);
	free(nodes);
	free(st);
	free(w);
	return 0;
}

static int bench_invert(size_t n, int reps)
{
	double *obs = xalloc(2 * n * sizeof *obs), t[64], sum = 0;
	rw_rm_ws *ws0 = rw_rm_ws_new(0, 0), *ws = rw_rm_ws_new(2, 2);
	rw_rm_spec s;
	rw_rm_inv_cfg c;
	rw_rm_inv_result res;

	spec_of(&s, RW_RM_SOFT_SAND);
	for (size_t i = 0; i < n; i++) {
		double phi, sw;
		rw_rm_sat o;
		sample_point(i, &phi, &sw);
		rw_rm_eval(&s, phi, sw, 0.0, 20e6, ws0, &o, NULL);
		obs[2 * i] = o.ai;
		obs[2 * i + 1] = o.vpvs;
	}
	memset(&c, 0, sizeof c);
	c.spec = &s;
	c.n_obs = 2;
	c.attr[0] = RW_RM_ATTR_AI;
	c.attr[1] = RW_RM_ATTR_VPVS;
	c.n_par = 2;
	c.lo[RW_RM_PAR_PHI] = 0.01;
	c.hi[RW_RM_PAR_PHI] = 0.40;
	c.lo[RW_RM_PAR_SW] = 0.0;
	c.hi[RW_RM_PAR_SW] = 1.0;
	c.p_eff_pa = 20e6;
	c.n_starts = 3;
	c.n_profile = 11;
	c.max_iter = 100;
	c.sw_width_max = 0.2;
	for (int r = 0; r < reps; r++) {
		double t0 = now();
		sum = 0;
		for (size_t i = 0; i < n; i++) {
			double sig[2] = {0.02 * obs[2 * i],
			                 0.02 * obs[2 * i + 1]};
			rw_rm_invert(&c, &obs[2 * i], sig, ws, &res);
			sum += res.x[0];
		}
		t[r] = (now() - t0) / (double)n;
	}
	report("invert", t, reps);
	fprintf(stderr, "checksum %.12g\n", sum);
	rw_rm_ws_free(ws0);
	rw_rm_ws_free(ws);
	free(obs);
	return 0;
}

/* A count in [lo, hi] from s, or 0 when s is not one. */
static long count(const char *s, long lo, long hi)
{
	char *end;
	long v = strtol(s, &end, 10);
	return end != s && *end == '\0' && v >= lo && v <= hi ? v : 0;
}

int main(int argc, char **argv)
{
	gsl_set_error_handler_off();
	if (argc == 6 && strcmp(argv[1], "template") == 0) {
		long np = count(argv[3], 2, 100000),
		     ns = count(argv[4], 2, 100000);
		long reps = count(argv[5], 1, 64);
		if (np && ns && reps)
			return bench_template(argv[2], (size_t)np, (size_t)ns,
			                      (int)reps);
	}
	if (argc == 4 && strcmp(argv[1], "invert") == 0) {
		long n = count(argv[2], 1, 10000000),
		     reps = count(argv[3], 1, 64);
		if (n && reps)
			return bench_invert((size_t)n, (int)reps);
	}
	fprintf(stderr, "usage: bench_rockmodel template MODEL NPHI NSW REPS |"
	                " invert N REPS\n");
	return 2;
}
