/* Benchmarks of the seismic core, run on demand by
 * tests/bench/bench_seismic.py (never by ctest). Prints one JSON line.
 *   bench_seismic conv
 *       direct against FFT convolution over a grid of series and wavelet
 *       lengths: seconds per call and nr nw / (N log2 N), N the FFT size
 *       (the crossover behind RW_SEIS_CONV_AUTO).
 *   bench_seismic gather NZ NA REPS
 *       a Zoeppritz gather of NA angles (0 to 45 degrees) from a blocky
 *       random log of NZ samples 0.1524 m apart, 30 Hz Ricker, 2 ms
 *       axis over the log: time-depth, reflectivity and convolution,
 *       seconds per gather (best of REPS).
 *   bench_seismic batch NTR NZ
 *       NTR normal-incidence traces, each from its own log of NZ
 *       samples: seconds for the batch.
 * The logs are invented pseudo-random numbers (a fixed generator, so the
 * numpy side can rebuild them: log k starts the generator at k). */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <gsl/gsl_errno.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"

static double now(void)
{
	struct timespec ts;

	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static void *xalloc(size_t n)
{
	void *p = malloc(n ? n : 1);

	if (p == NULL) {
		fprintf(stderr, "bench_seismic: out of memory\n");
		exit(1);
	}
	return p;
}

/* A blocky log: layers of 3-40 samples. */
static void make_log(uint64_t *s, size_t n, double *z, double *vp, double *vs,
                     double *rho)
{
	size_t i = 0, k;

	while (i < n) {
		size_t len = 3 + (size_t)urand(s, 0, 37.99);
		double a = urand(s, 2200, 4200), g = urand(s, 0.42, 0.6);
		double r = urand(s, 2050, 2600);

		for (k = 0; k < len && i < n; k++, i++) {
			z[i] = 1200.0 + 0.1524 * (double)i;
			vp[i] = a;
			vs[i] = a * g;
			rho[i] = r;
		}
	}
}

static int bench_conv(void)
{
	static const size_t nrs[] = {256, 1024, 4096, 16384};
	static const size_t nws[] = {8, 16, 32, 64, 128, 256, 512};
	size_t a, b;
	int first = 1;

	printf("{\"conv\":[");
	for (a = 0; a < sizeof nrs / sizeof nrs[0]; a++) {
		for (b = 0; b < sizeof nws / sizeof nws[0]; b++) {
			size_t nr = nrs[a], nw = nws[b], k, wl, nfft = 1,
			       lg = 0;
			double *r = xalloc(nr * sizeof(double));
			double *w = xalloc(nw * sizeof(double));
			double *o = xalloc(nr * sizeof(double)), t[2];
			double *work;
			uint64_t s = 1;
			int m;

			for (k = 0; k < nr; k++)
				r[k] = urand(&s, -1, 1);
			for (k = 0; k < nw; k++)
				w[k] = urand(&s, -1, 1);
			wl = rw_seis_convolve_workspace(nr, nw);
			work = xalloc(wl * sizeof(double));
			while (nfft < nr + nw - 1)
				nfft *= 2;
			for (k = nfft; k > 1; k /= 2)
				lg++;
			for (m = 0; m < 2; m++) {
				double t0 = now(), el;
				size_t reps = 0;

				do {
					rw_seis_convolve(
					    r, nr, w, nw, nw / 2,
					    m ? RW_SEIS_CONV_FFT
					      : RW_SEIS_CONV_DIRECT,
					    o, work, wl);
					reps++;
					el = now() - t0;
				} while (el < 0.05);
				t[m] = el / (double)reps;
			}
			printf("%s{\"nr\":%zu,\"nw\":%zu,\"direct_s\":%.3e,"
			       "\"fft_s\":%.3e,\"x\":%.3f}",
			       first ? "" : ",", nr, nw, t[0], t[1],
			       (double)nr * (double)nw /
			           ((double)nfft * (double)lg));
			first = 0;
			free(r);
			free(w);
			free(o);
			free(work);
		}
	}
	puts("]}");
	return 0;
}

/* One synthetic from a log; returns seconds (best of reps) and the
 * trace sum (so the work cannot be optimised away). */
static double run_gather(size_t nz, const double *ang, size_t na, size_t reps,
                         uint64_t start, double *checksum, size_t *nt_out)
{
	double *z = xalloc(nz * sizeof(double)), *vp = xalloc(nz * 8);
	double *vs = xalloc(nz * 8), *rho = xalloc(nz * 8),
	       *twt = xalloc(nz * 8);
	double w[64], best = 1e30, *tr, *work, maxa = 0.0;
	rw_seis_datum d = {1200.0, 1.0, 2000.0};
	rw_seis_td td;
	rw_seis_log log;
	rw_seis_wavelet wav;
	rw_seis_taxis ax;
	rw_seis_synth_opts o = {RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO};
	size_t nw, wl, i, r;
	uint64_t s = start;

	make_log(&s, nz, z, vp, vs, rho);
	rw_seis_wavelet_ricker(30.0, 0.1, 0.002, w, 64, &nw, NULL);
	for (i = 0; i < na; i++)
		if (ang[i] > maxa)
			maxa = ang[i];
	/* the axis: the log's time span at 2 ms (sonic times first) */
	rw_seis_td_sonic(z, vp, nz, RW_SEIS_SONIC_VELOCITY, &d, twt, NULL);
	ax.t0_s = floor(twt[0] / 0.002) * 0.002;
	ax.dt_s = 0.002;
	ax.n = (size_t)((twt[nz - 1] - ax.t0_s) / 0.002) + 2;
	wl = rw_seis_synthetic_workspace(ax.n, nw, maxa, 0);
	work = xalloc(wl * sizeof(double));
	tr = xalloc(na * ax.n * sizeof(double));
	for (r = 0; r < reps; r++) {
		double t0 = now(), el;

		/* the whole chain: time-depth, reflectivity, convolution */
		rw_seis_td_sonic(z, vp, nz, RW_SEIS_SONIC_VELOCITY, &d, twt,
		                 NULL);
		td.z_m = z;
		td.twt_s = twt;
		td.n = nz;
		td.datum_z_m = d.z_m;
		td.datum_twt_s = d.twt_s;
		td.cs_z_m = NULL;
		td.cs_drift_s = NULL;
		td.n_cs = 0;
		log.z_m = z;
		log.vp_ms = vp;
		log.vs_ms = vs;
		log.rho_kgm3 = rho;
		log.n = nz;
		wav.w = w;
		wav.n = nw;
		wav.i0 = (nw - 1) / 2;
		wav.dt_s = 0.002;
		if (rw_seis_synthetic(&log, &td, ang, na, &wav, &ax, &o, tr,
		                      NULL, NULL, work, wl) != RW_OK) {
			fprintf(stderr, "bench_seismic: synthetic failed\n");
			exit(1);
		}
		el = now() - t0;
		if (el < best)
			best = el;
	}
	*checksum = 0.0;
	for (i = 0; i < na * ax.n; i++)
		*checksum += tr[i];
	*nt_out = ax.n;
	free(z);
	free(vp);
	free(vs);
	free(rho);
	free(twt);
	free(work);
	free(tr);
	return best;
}

static int bench_gather(size_t nz, size_t na, size_t reps)
{
	double *ang = xalloc(na * sizeof(double)), cs, t;
	size_t i, nt;

	for (i = 0; i < na; i++)
		ang[i] =
		    na > 1 ? 45.0 * (double)i / (double)(na - 1) * M_PI / 180.0
		           : 0.0;
	t = run_gather(nz, ang, na, reps, 7, &cs, &nt);
	printf("{\"gather_s\":%.6e,\"nz\":%zu,\"na\":%zu,\"nt\":%zu,"
	       "\"checksum\":%.17g}\n",
	       t, nz, na, nt, cs);
	free(ang);
	return 0;
}

static int bench_batch(size_t ntr, size_t nz)
{
	double ang[1] = {0.0}, cs, sum = 0.0, el = 0.0;
	size_t i, nt;

	/* the chain's time only, as on the numpy side (not the log making) */
	for (i = 0; i < ntr; i++) {
		el += run_gather(nz, ang, 1, 1, 1000 + i, &cs, &nt);
		sum += cs;
	}
	printf("{\"batch_s\":%.6e,\"ntr\":%zu,\"nz\":%zu,\"checksum\":%.17g}\n",
	       el, ntr, nz, sum);
	return 0;
}

int main(int argc, char **argv)
{
	gsl_set_error_handler_off();
	if (argc == 2 && strcmp(argv[1], "conv") == 0)
		return bench_conv();
	if (argc == 5 && strcmp(argv[1], "gather") == 0)
		return bench_gather(strtoul(argv[2], NULL, 10),
		                    strtoul(argv[3], NULL, 10),
		                    strtoul(argv[4], NULL, 10));
	if (argc == 4 && strcmp(argv[1], "batch") == 0)
		return bench_batch(strtoul(argv[2], NULL, 10),
		                   strtoul(argv[3], NULL, 10));
	fprintf(stderr, "usage: bench_seismic conv | gather NZ NA REPS | "
	                "batch NTR NZ\n");
	return 2;
}
