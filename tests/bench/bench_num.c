/* Number I/O microbenchmarks of tests/bench (daemon/proto/numfmt.c and
 * numparse.c against the C library and cJSON), on three kinds of values:
 *   bits   doubles with uniformly random bits (any exponent, 16-17 digits)
 *   log    computed log values: 10^6 0.3048 / dt for dt in 40-200 us/ft
 *          (velocities in m/s, 15-17 significant digits)
 *   short  read log values: 2-4 decimals ("2.4482", "110.733")
 * Every run times each variant on the same N values, interleaved so that
 * load from other processes falls on all alike, and prints one JSON line
 * per kind and run:
 *   bench_num fmt N RUNS     ns/number: ours, ours with 7 digits,
 *                            snprintf %.17g, snprintf %.15g (today's
 *                            writer), writing comma-separated into one
 *                            buffer
 *   bench_num parse N RUNS   ns/number on the text of one N-element array
 *                            as proto_num_fmt prints it: the counting
 *                            pass, proto_num_array_parse, a strtod loop,
 *                            cJSON_ParseWithLength plus a walk of its
 *                            nodes into a double buffer; each timed three
 *                            times per run, interleaved, fastest kept
 * and checks that every parser gave the strtod values (exit 1 if not).
 * Part of the benchmarks; never built by the test suite. */
#include <cjson/cJSON.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "proto/numfmt.h"
#include "proto/numparse.h"

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static uint64_t rnd(uint64_t *s)
{
	uint64_t z = (*s += UINT64_C(0x9E3779B97F4A7C15));
	z = (z ^ (z >> 30)) * UINT64_C(0xBF58476D1CE4E5B9);
	z = (z ^ (z >> 27)) * UINT64_C(0x94D049BB133111EB);
	return z ^ (z >> 31);
}

static const char *const kinds[] = {"bits", "log", "short"};

static void fill(double *v, size_t n, int kind)
{
	uint64_t s = 7;
	for (size_t i = 0; i < n; i++) {
		uint64_t u = rnd(&s);
		if (kind == 0) {
			while (((u >> 52) & 0x7ff) == 0x7ff)
				u = rnd(&s);
			memcpy(&v[i], &u, sizeof v[i]);
		} else if (kind == 1) {
			double dt = 40 + (double)(u >> 11) * 0x1p-53 * 160;
			v[i] = 1e6 * 0.3048 / dt;
		} else {
			static const double scale[] = {1e2, 1e3, 1e4};
			double sc = scale[u % 3];
			v[i] = (double)((u >> 8) % 3000000) / sc;
		}
	}
}

/* Seconds to format v[0..n) with variant j into out. */
static double fmt_variant(int j, const double *v, size_t n, char *out)
{
	double t0 = now();
	char *p = out;
	size_t i;

	switch (j) {
	case 0:
		for (i = 0; i < n; i++) {
			p += proto_num_fmt(p, v[i]);
			*p++ = ',';
		}
		break;
	case 1:
		for (i = 0; i < n; i++) {
			p += proto_num_fmt_digits(p, v[i], 7);
			*p++ = ',';
		}
		break;
	default:
		for (i = 0; i < n; i++) {
			p += snprintf(p, 32, "%.*g",
			              j == 2   ? 17
			              : j == 3 ? 15
			                       : 7,
			              v[i]);
			*p++ = ',';
		}
		break;
	}
	return now() - t0;
}

/* The machine is shared: each run takes the values in chunks of CHUNK
 * and times every variant on each chunk in turn (rotating the order), so
 * a burst of load elsewhere falls on all variants alike. */
#define CHUNK 20000

static int bench_fmt(size_t n, int runs)
{
	double *v = malloc(n * sizeof *v);
	char *out = malloc(CHUNK * PROTO_NUM_FMT_MAX + 64);

	if (!v || !out)
		return 1;
	memset(out, ' ', CHUNK * PROTO_NUM_FMT_MAX + 64);
	for (int k = 0; k < 3; k++) {
		fill(v, n, k);
		for (int r = 0; r < runs; r++) {
			double t[5] = {0};
			for (size_t c = 0, x = 0; c < n; c += CHUNK, x++) {
				size_t m = n - c < CHUNK ? n - c : CHUNK;
				for (int j = 0; j < 5; j++) {
					int w = (int)((j + x + (size_t)r) % 5);
					t[w] += fmt_variant(w, v + c, m, out);
				}
			}
			for (int j = 0; j < 5; j++)
				t[j] *= 1e9 / (double)n;
			printf(
			    "{\"bench\":\"numfmt\",\"kind\":\"%s\",\"run\":%d,"
			    "\"n\":%zu,\"ours\":%.2f,\"ours_digits7\":%.2f,"
			    "\"snprintf17\":%.2f,\"snprintf15\":%.2f,"
			    "\"snprintf7\":%.2f}\n",
			    kinds[k], r + 1, n, t[0], t[1], t[2], t[3], t[4]);
			fflush(stdout);
		}
	}
	free(v);
	free(out);
	return 0;
}

static size_t mismatches(const double *a, const double *b, size_t n)
{
	size_t bad = 0;
	for (size_t i = 0; i < n; i++)
		bad += memcmp(&a[i], &b[i], sizeof a[i]) != 0;
	return bad;
}

static int bench_parse(size_t n, int runs)
{
	double *v = malloc(n * sizeof *v), *got = malloc(n * sizeof *got);
	double *want = malloc(n * sizeof *want);
	char *text = malloc(n * PROTO_NUM_FMT_MAX + 64);
	int status = 0;

	if (!v || !got || !want || !text)
		return 1;
	memset(got, 0, n * sizeof *got); /* no page faults in the timing */
	memset(want, 0, n * sizeof *want);
	for (int k = 0; k < 3; k++) {
		size_t len, cnt, end, bad = 0;
		proto_num_err err;
		char *p = text, *q;

		fill(v, n, k);
		*p++ = '[';
		for (size_t i = 0; i < n; i++) {
			if (i)
				*p++ = ',';
			p += proto_num_fmt(p, v[i]);
		}
		*p++ = ']';
		*p = '\0';
		len = (size_t)(p - text);
		for (int r = 0; r < runs; r++) {
			/* each variant 3 times, interleaved; the fastest of
			 * the three counts (a burst of load elsewhere only
			 * slows a run down) */
			double t[4] = {1e30, 1e30, 1e30, 1e30}, t0, dt;
			for (int j = 0; j < 12; j++) {
				int w = (j + r) % 4;
				t0 = now();
				switch (w) {
				case 0:
					proto_num_array_count(text, len, &cnt,
					                      &end, &err);
					dt = now() - t0;
					break;
				case 1:
					proto_num_array_parse(text, len, 0, got,
					                      n, &cnt, &end,
					                      &err);
					dt = now() - t0;
					bad += mismatches(got, v, n);
					break;
				case 2:
					q = text + 1;
					for (size_t i = 0; i < n; i++) {
						want[i] = strtod(q, &q);
						q++;
					}
					dt = now() - t0;
					bad += mismatches(want, v, n);
					break;
				default: {
					cJSON *a =
					    cJSON_ParseWithLength(text, len);
					const cJSON *e;
					size_t i = 0;
					cJSON_ArrayForEach(e, a)
					{
						if (i < n)
							want[i++] =
							    e->valuedouble;
					}
					dt = now() - t0;
					cJSON_Delete(a);
					bad += i != n;
				} break;
				}
				if (dt < t[w])
					t[w] = dt;
			}
			printf("{\"bench\":\"numparse\",\"kind\":\"%s\","
			       "\"run\":%d,"
			       "\"n\":%zu,\"bytes_per_number\":%.2f,"
			       "\"count\":%.2f,\"ours\":%.2f,\"strtod\":%.2f,"
			       "\"cjson\":%.2f,\"mismatches\":%zu}\n",
			       kinds[k], r + 1, n, (double)len / (double)n,
			       t[0] * 1e9 / (double)n, t[1] * 1e9 / (double)n,
			       t[2] * 1e9 / (double)n, t[3] * 1e9 / (double)n,
			       bad);
			fflush(stdout);
			if (bad)
				status = 1;
		}
	}
	free(v);
	free(got);
	free(want);
	free(text);
	return status;
}

int main(int argc, char **argv)
{
	size_t n = argc > 2 ? strtoul(argv[2], NULL, 10) : 1000000;
	int runs = argc > 3 ? atoi(argv[3]) : 5;

	if (argc > 1 && strcmp(argv[1], "fmt") == 0)
		return bench_fmt(n, runs);
	if (argc > 1 && strcmp(argv[1], "parse") == 0)
		return bench_parse(n, runs);
	fprintf(stderr, "usage: bench_num fmt|parse [N [RUNS]]\n");
	return 2;
}
