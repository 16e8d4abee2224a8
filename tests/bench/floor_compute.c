/* Compute floor (b) of tests/bench: the elastic.convert formulas from
 * density, vp and vs as a plain C loop over arrays, with no JSON, no
 * protocol and no library call: the same unit conversions (g/cm3 in, GPa,
 * m/s*g/cm3 and us/ft out), the fourteen outputs and the impossible and
 * implausible QC flags of the daemon. Relations as in Mavko, Mukerji &
 * Dvorkin 2009 (isotropic constants); ranges as elastic.c's defaults
 * (common practice). Prints one JSON line per run:
 *   floor_compute N RUNS
 *   {"bench":"floor_compute","run":1,"n":N,"ns_per_sample":3.1}
 * Part of the benchmarks; never built by the test suite. */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#define FT 0.3048

typedef struct out14 {
	double *vp, *vs, *rho, *k, *mu, *lambda, *e, *nu, *m, *ai, *si, *vpvs,
	    *dtp, *dts;
	uint32_t *qc;
} out14;

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static void convert(size_t n, const double *rho_gcc, const double *vp,
                    const double *vs, out14 *o)
{
	for (size_t i = 0; i < n; i++) {
		double rho = rho_gcc[i] * 1000.0, a = vp[i], b = vs[i];
		double a2 = a * a, b2 = b * b;
		double mu = rho * b2, m = rho * a2, k = m - 4.0 / 3.0 * mu;
		double lam = m - 2.0 * mu;
		double nu = (a2 - 2.0 * b2) / (2.0 * (a2 - b2));
		double e = 2.0 * mu * (1.0 + nu);
		uint32_t f = 0;

		if (!(rho > 0) || !(a > 0) || !(b >= 0) || !isfinite(a) ||
		    !isfinite(b) || !isfinite(rho)) {
			f = 1u | (rho > 0 ? 0 : 2u);
		} else if (!(mu > 0) || k < 0) {
			f = 4u | 8u;
		}
		if (f) {
			o->vp[i] = o->vs[i] = o->rho[i] = o->k[i] = o->mu[i] =
			    o->lambda[i] = o->e[i] = o->nu[i] = o->m[i] =
			        o->ai[i] = o->si[i] = o->vpvs[i] = o->dtp[i] =
			            o->dts[i] = NAN;
			o->qc[i] = f;
			continue;
		}
		if (nu < 0 || nu >= 0.5)
			f |= 16u;
		if (rho < 1000 || rho > 3200)
			f |= 32u;
		if (a < 1200 || a > 7500)
			f |= 64u;
		if (b < 0 || b > 4500)
			f |= 128u;
		o->vp[i] = a;
		o->vs[i] = b;
		o->rho[i] = rho_gcc[i];
		o->k[i] = k * 1e-9;
		o->mu[i] = mu * 1e-9;
		o->lambda[i] = lam * 1e-9;
		o->e[i] = e * 1e-9;
		o->nu[i] = nu;
		o->m[i] = m * 1e-9;
		o->ai[i] = rho_gcc[i] * a;
		o->si[i] = rho_gcc[i] * b;
		o->vpvs[i] = a / b;
		o->dtp[i] = 1e6 * FT / a;
		o->dts[i] = 1e6 * FT / b;
		o->qc[i] = f;
	}
}

int main(int argc, char **argv)
{
	size_t n = argc > 1 ? strtoul(argv[1], NULL, 10) : 1000000;
	int runs = argc > 2 ? atoi(argv[2]) : 5;
	double *in = malloc(3 * n * sizeof *in), *buf;
	out14 o;
	uint64_t s = 1;
	double sink = 0;

	buf = malloc(14 * n * sizeof *buf);
	o.qc = malloc(n * sizeof *o.qc);
	if (!in || !buf || !o.qc || n == 0)
		return 1;
	double **cols[] = {&o.vp,     &o.vs,   &o.rho, &o.k,  &o.mu,
	                   &o.lambda, &o.e,    &o.nu,  &o.m,  &o.ai,
	                   &o.si,     &o.vpvs, &o.dtp, &o.dts};
	for (int c = 0; c < 14; c++)
		*cols[c] = buf + (size_t)c * n;
	memset(buf, 0, 14 * n * sizeof *buf); /* no page faults in the loop */
	memset(o.qc, 0, n * sizeof *o.qc);
	for (size_t i = 0; i < n; i++) {
		/* the same invented sand-shale values as the requests */
		s = s * 6364136223846793005u + 1442695040888963407u;
		in[i] = 2.0 + (double)(s >> 40) / (double)(1u << 24) * 0.6;
		in[n + i] =
		    2500 + (double)((s >> 20) & 0xfffff) / 1048576.0 * 2500;
		in[2 * n + i] = in[n + i] / (1.7 + (double)(s & 0xff) / 512.0);
	}
	for (int r = 0; r < runs; r++) {
		double t0 = now();
		convert(n, in, in + n, in + 2 * n, &o);
		double t1 = now();
		sink += o.nu[n / 2];
		printf("{\"bench\":\"floor_compute\",\"run\":%d,\"n\":%zu,"
		       "\"ns_per_sample\":%.3f}\n",
		       r + 1, n, (t1 - t0) * 1e9 / (double)n);
	}
	fprintf(stderr, "floor_compute: checksum %.6f\n", sink);
	free(in);
	free(buf);
	free(o.qc);
	return 0;
}
