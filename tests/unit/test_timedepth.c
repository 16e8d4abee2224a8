/* Unit tests of the time-depth relation and resampling (daemon/core/
 * timedepth.c): constant and linear slowness against closed forms, the
 * datum and replacement velocity, bridged nulls, checkshot drift
 * (checkshot times reproduced at their depths), refused checkshots,
 * linear and Steffen resampling with nulls, the error cases, and the
 * same times whatever the order of the depths asked.
 * numpy.trapz and numpy.interp are the outside references in
 * tests/reference/test_seismic_numpy.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <gsl/gsl_errno.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"

#define N 2001

static double z[N], v[N], t[N], t2[N];
static unsigned warn[N];

/* Constant velocity from a datum at the first sample: t = 2 z / v
 * exactly (travel time at constant speed), to rounding (1e-14 relative, with
 * compensated sums over 2000 steps), from velocity or slowness input. */
static void test_constant_velocity(void **state)
{
	rw_seis_datum d = {0.0, 0.0, 2750.0};
	size_t i;

	(void)state;
	for (i = 0; i < N; i++) {
		z[i] = 0.1524 * (double)i;
		v[i] = 2750.0;
	}
	assert_int_equal(
	    rw_seis_td_sonic(z, v, N, RW_SEIS_SONIC_VELOCITY, &d, t, warn),
	    RW_OK);
	for (i = 0; i < N; i++) {
		assert_true(fabs(t[i] - 2.0 * z[i] / 2750.0) <=
		            1e-14 * (2.0 * z[i] / 2750.0));
		assert_int_equal(warn[i], 0);
	}
	for (i = 0; i < N; i++)
		v[i] = 1.0 / 2750.0;
	assert_int_equal(
	    rw_seis_td_sonic(z, v, N, RW_SEIS_SONIC_SLOWNESS, &d, t2, NULL),
	    RW_OK);
	for (i = 0; i < N; i++)
		assert_true(fabs(t2[i] - t[i]) <= 1e-14 * t[i] + 1e-300);
}

/* Linear slowness s = a + b z: the trapezoid rule is exact,
 * t(z) = t0 + 2 (a (z - z0) + b (z^2 - z0^2) / 2). Datum 500 m above the
 * log at t0 = 0.1 s with a replacement velocity: t(z_first) = t0 +
 * 2 (z_first - 500) / vrep. */
static void test_linear_slowness_and_datum(void **state)
{
	rw_seis_datum d = {1000.0, 0.1, 1800.0};
	double a = 4.0e-4, b = -5.0e-8, z0 = 1500.0, tz0;
	size_t i, n = 401;

	(void)state;
	for (i = 0; i < n; i++) {
		z[i] = z0 + 0.5 * (double)i;
		v[i] = a + b * z[i];
	}
	assert_int_equal(
	    rw_seis_td_sonic(z, v, n, RW_SEIS_SONIC_SLOWNESS, &d, t, warn),
	    RW_OK);
	tz0 = 0.1 + 2.0 * (z0 - 1000.0) / 1800.0;
	for (i = 0; i < n; i++) {
		double want = tz0 + 2.0 * (a * (z[i] - z0) +
		                           0.5 * b * (z[i] * z[i] - z0 * z0));

		assert_true(fabs(t[i] - want) <= 1e-13);
	}
}

/* Nulls: leading ones take the replacement velocity from the datum,
 * inner ones are bridged with linearly interpolated slowness (so a
 * constant-velocity log with holes gives the same times), trailing ones
 * keep the last slowness; each is flagged. A zero or negative sonic value
 * counts as null. */
static void test_nulls(void **state)
{
	rw_seis_datum d = {100.0, 0.0, 2000.0};
	size_t i, n = 50;

	(void)state;
	for (i = 0; i < n; i++) {
		z[i] = 100.0 + 2.0 * (double)i;
		v[i] = 2000.0;
	}
	v[0] = v[1] = NAN;
	v[10] = v[11] = -1.0;
	v[20] = 0.0;
	v[48] = v[49] = NAN;
	assert_int_equal(
	    rw_seis_td_sonic(z, v, n, RW_SEIS_SONIC_VELOCITY, &d, t, warn),
	    RW_OK);
	for (i = 0; i < n; i++)
		assert_true(fabs(t[i] - (z[i] - 100.0) / 1000.0) <= 1e-15);
	assert_int_equal(warn[0],
	                 RW_SEIS_WARN_SONIC_NULL | RW_SEIS_WARN_REPLACEMENT);
	assert_int_equal(warn[2], 0);
	assert_int_equal(warn[10], RW_SEIS_WARN_SONIC_NULL);
	assert_int_equal(warn[20], RW_SEIS_WARN_SONIC_NULL);
	assert_int_equal(warn[49],
	                 RW_SEIS_WARN_SONIC_NULL | RW_SEIS_WARN_EXTRAPOLATED);
	/* a bridged null between different velocities: slowness halfway */
	for (i = 0; i < 3; i++)
		z[i] = 100.0 + (double)i;
	v[0] = 2000.0;
	v[1] = NAN;
	v[2] = 4000.0;
	assert_int_equal(
	    rw_seis_td_sonic(z, v, 3, RW_SEIS_SONIC_VELOCITY, &d, t, NULL),
	    RW_OK);
	/* s: 5e-4, 3.75e-4, 2.5e-4 -> steps 2 * (5 + 3.75) / 2 e-4 ... */
	assert_true(fabs(t[1] - (5e-4 + 3.75e-4)) <= 1e-16);
	assert_true(fabs(t[2] - (5e-4 + 2 * 3.75e-4 + 2.5e-4)) <= 1e-16);
}

/* Checkshots: the corrected relation returns each checkshot's time at
 * its depth (to rounding), whether the depth falls on a sample, between
 * samples or above the log (between the datum and the first sample); the
 * drift is linear between checkshots and held outside (flagged). */
static void test_checkshots(void **state)
{
	rw_seis_datum d = {0.0, 0.0, 1900.0};
	double csz[4] = {800.0, 1507.25, 1600.0, 1790.1};
	double cst[4], drift[4], tq[4], dr[N];
	rw_seis_td td;
	size_t i, n = 601;

	(void)state;
	for (i = 0; i < n; i++) {
		z[i] = 1500.0 + 0.5 * (double)i;
		v[i] = 2600.0 + 1.5 * (double)(i % 37);
	}
	assert_int_equal(
	    rw_seis_td_sonic(z, v, n, RW_SEIS_SONIC_VELOCITY, &d, t, NULL),
	    RW_OK);
	td.z_m = z;
	td.twt_s = t;
	td.n = n;
	td.datum_z_m = d.z_m;
	td.datum_twt_s = d.twt_s;
	td.cs_z_m = csz;
	td.cs_drift_s = NULL;
	td.n_cs = 4;
	/* checkshot times: the sonic time plus 3, 5, 2 and 8 ms */
	{
		rw_seis_td plain = td;
		double add[4] = {0.003, 0.005, 0.002, 0.008};

		plain.n_cs = 0;
		assert_int_equal(
		    rw_seis_td_eval(&plain, csz, 4, cst, NULL, NULL), RW_OK);
		for (i = 0; i < 4; i++)
			cst[i] += add[i];
	}
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_OK);
	assert_true(fabs(drift[0] - 0.003) <= 1e-15);
	assert_true(fabs(drift[3] - 0.008) <= 1e-15);
	td.cs_drift_s = drift;
	assert_int_equal(rw_seis_td_eval(&td, csz, 4, tq, NULL, NULL), RW_OK);
	for (i = 0; i < 4; i++)
		assert_true(fabs(tq[i] - cst[i]) <= 1e-15);
	assert_int_equal(rw_seis_td_eval(&td, z, n, t2, dr, warn), RW_OK);
	for (i = 0; i < n; i++) {
		double want;

		if (z[i] <= 1507.25)
			want =
			    0.003 + (0.005 - 0.003) * (z[i] - 800.0) / 707.25;
		else if (z[i] <= 1600.0)
			want =
			    0.005 + (0.002 - 0.005) * (z[i] - 1507.25) / 92.75;
		else if (z[i] <= 1790.1)
			want =
			    0.002 + (0.008 - 0.002) * (z[i] - 1600.0) / 190.1;
		else
			want = 0.008;
		assert_true(fabs(dr[i] - want) <= 1e-15);
		assert_true(fabs(t2[i] - (t[i] + dr[i])) <= 1e-15);
		assert_int_equal(warn[i] & RW_SEIS_WARN_DRIFT_HELD,
		                 z[i] > 1790.1 ? RW_SEIS_WARN_DRIFT_HELD : 0);
	}
	/* depths outside the relation are null and flagged */
	{
		double q[2] = {-1.0, 1800.5}, r[2];
		unsigned w2[2];

		assert_int_equal(rw_seis_td_eval(&td, q, 2, r, NULL, w2),
		                 RW_OK);
		assert_true(isnan(r[0]) && isnan(r[1]));
		assert_int_equal(w2[0], RW_SEIS_WARN_OUTSIDE);
	}
	/* one checkshot: a bulk shift everywhere */
	td.n_cs = 1;
	td.cs_z_m = &csz[1];
	assert_int_equal(rw_seis_td_drift(&td, &cst[1], drift), RW_OK);
	td.cs_drift_s = drift;
	assert_int_equal(rw_seis_td_eval(&td, z, n, t2, NULL, NULL), RW_OK);
	for (i = 0; i < n; i++)
		assert_true(fabs(t2[i] - t[i] - 0.005) <= 1e-15);
}

/* Checkshots whose times rise but would make the corrected time run
 * backwards somewhere between them are refused: a slow layer (1000 m/s,
 * 10 ms of two-way time over 5 m) over a fast one (10000 m/s, 1 ms over
 * 5 m), with checkshots 10 m apart only 2 ms apart: the drift slope of
 * -0.9 ms/m beats the fast layer's 0.2 ms/m. Checkshots outside the log,
 * out of order, or with falling times are refused as input errors. */
static void test_checkshot_errors(void **state)
{
	rw_seis_datum d = {0.0, 0.0, 2000.0};
	double csz[2] = {1000.0, 1010.0}, cst[2], drift[2];
	rw_seis_td td;
	size_t i, n = 41;

	(void)state;
	for (i = 0; i < n; i++) {
		z[i] = 1000.0 + 0.5 * (double)i;
		v[i] = z[i] <= 1005.0 ? 1000.0 : 10000.0;
	}
	assert_int_equal(
	    rw_seis_td_sonic(z, v, n, RW_SEIS_SONIC_VELOCITY, &d, t, NULL),
	    RW_OK);
	td.z_m = z;
	td.twt_s = t;
	td.n = n;
	td.datum_z_m = 0.0;
	td.datum_twt_s = 0.0;
	td.cs_z_m = csz;
	td.cs_drift_s = drift;
	td.n_cs = 2;
	cst[0] = 1.0;
	cst[1] = 1.002;
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_EINVAL);
	assert_true(isnan(drift[0]) && isnan(drift[1]));
	/* 10 ms apart the times still rise everywhere */
	cst[1] = 1.010;
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_OK);
	cst[1] = 0.999; /* falling checkshot times */
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_EDOM);
	cst[1] = 1.010;
	csz[1] = 1030.0; /* below the log (its last sample is at 1020 m) */
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_EDOM);
	csz[1] = 999.0; /* not increasing */
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_EDOM);
	td.n_cs = 0;
	assert_int_equal(rw_seis_td_drift(&td, cst, drift), RW_EDOM);
}

static void test_sonic_errors(void **state)
{
	double zz[3] = {1.0, 2.0, 3.0}, vv[3] = {2000.0, 2000.0, 2000.0}, tt[3];
	double zbad[3] = {1.0, 1.0, 3.0}, vnull[3] = {NAN, NAN, -1.0};
	rw_seis_datum d = {0.0, 0.0, 1500.0}, below = {1.5, 0.0, 1500.0};
	rw_seis_datum slow = {0.0, 0.0, 0.0};

	(void)state;
	assert_int_equal(
	    rw_seis_td_sonic(zz, vv, 0, RW_SEIS_SONIC_VELOCITY, &d, tt, NULL),
	    RW_EDOM);
	assert_int_equal(
	    rw_seis_td_sonic(zbad, vv, 3, RW_SEIS_SONIC_VELOCITY, &d, tt, NULL),
	    RW_EDOM);
	assert_true(isnan(tt[0]));
	assert_int_equal(rw_seis_td_sonic(zz, vv, 3, RW_SEIS_SONIC_VELOCITY,
	                                  &below, tt, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_seis_td_sonic(zz, vv, 3, RW_SEIS_SONIC_VELOCITY,
	                                  &slow, tt, NULL),
	                 RW_EDOM);
	assert_int_equal(
	    rw_seis_td_sonic(zz, vv, 3, (rw_seis_sonic_kind)5, &d, tt, NULL),
	    RW_EDOM);
	assert_int_equal(rw_seis_td_sonic(zz, vnull, 3, RW_SEIS_SONIC_VELOCITY,
	                                  &d, tt, NULL),
	                 RW_EINVAL);
	assert_int_equal(
	    rw_seis_td_sonic(zz, vv, 3, RW_SEIS_SONIC_VELOCITY, NULL, tt, NULL),
	    RW_EDOM);
}

/* Resampling: linear interpolation of a straight line is exact; Steffen's
 * interpolant of monotone data is monotone and never leaves the data's
 * range (Steffen 1990, its defining property); nulls are not bridged and
 * outside times are null, each flagged. */
static void test_resample(void **state)
{
	double ts[8] = {0.100,  0.1013, 0.1031, 0.1040,
	                0.1069, 0.1075, 0.1100, 0.1123};
	double ys[8] = {0.0, 0.1, 0.9, 1.0, 1.0, 2.5, 2.6, 9.0};
	double lin[8], out[64];
	unsigned w[64];
	rw_seis_taxis ax = {0.0995, 0.0005, 28};
	size_t k;

	(void)state;
	for (k = 0; k < 8; k++)
		lin[k] = 3.0 - 20.0 * ts[k];
	assert_int_equal(
	    rw_seis_resample(ts, lin, 8, &ax, RW_SEIS_INTERP_LINEAR, out, w),
	    RW_OK);
	for (k = 0; k < ax.n; k++) {
		double tk = ax.t0_s + (double)k * ax.dt_s;

		if (tk < ts[0] || tk > ts[7]) {
			assert_true(isnan(out[k]));
			assert_int_equal(w[k], RW_SEIS_WARN_OUTSIDE);
		} else {
			assert_true(fabs(out[k] - (3.0 - 20.0 * tk)) <= 1e-14);
			assert_int_equal(w[k], 0);
		}
	}
	assert_int_equal(
	    rw_seis_resample(ts, ys, 8, &ax, RW_SEIS_INTERP_STEFFEN, out, w),
	    RW_OK);
	{
		double prev = -1.0;

		for (k = 1; k < 25; k++) {
			assert_true(out[k] >= prev);
			assert_true(out[k] >= 0.0 && out[k] <= 9.0);
			prev = out[k];
		}
		/* flat between equal samples: no overshoot */
		for (k = 0; k < ax.n; k++) {
			double tk = ax.t0_s + (double)k * ax.dt_s;

			if (tk >= ts[3] && tk <= ts[4])
				assert_true(fabs(out[k] - 1.0) <= 1e-15);
		}
	}
	/* a null splits the curve; a run of two is linear */
	ys[3] = NAN;
	ys[6] = NAN;
	assert_int_equal(
	    rw_seis_resample(ts, ys, 8, &ax, RW_SEIS_INTERP_STEFFEN, out, w),
	    RW_OK);
	for (k = 0; k < ax.n; k++) {
		double tk = ax.t0_s + (double)k * ax.dt_s;

		if ((tk > ts[2] && tk < ts[4]) || (tk > ts[5] && tk < ts[7])) {
			assert_true(isnan(out[k]));
			assert_int_equal(w[k], RW_SEIS_WARN_NULL_INPUT);
		}
		if (tk >= ts[4] && tk <= ts[5])
			assert_true(fabs(out[k] -
			                 (1.0 + 1.5 * (tk - ts[4]) /
			                            (ts[5] - ts[4]))) <= 1e-14);
	}
	/* errors */
	ax.dt_s = 0.0;
	assert_int_equal(
	    rw_seis_resample(ts, ys, 8, &ax, RW_SEIS_INTERP_LINEAR, out, w),
	    RW_EDOM);
	ax.dt_s = 0.001;
	assert_int_equal(
	    rw_seis_resample(ts, ys, 8, &ax, (rw_seis_interp)4, out, w),
	    RW_EDOM);
	ts[2] = ts[1];
	assert_int_equal(
	    rw_seis_resample(ts, ys, 8, &ax, RW_SEIS_INTERP_LINEAR, out, w),
	    RW_EDOM);
	assert_true(isnan(out[0]));
}

/* Query order: depths asked in one call, rising (nodes, midpoints, long
 * jumps), falling and shuffled, get the same time to the bit as each
 * asked alone, and at the nodes exactly the table's time (linear through
 * the nodes, common practice). Guards the cursor that walks the table
 * for rising depths against the bisection it replaces. */
static void test_query_order(void **state)
{
	rw_seis_datum d = {0.0, 0.0, 1800.0};
	static double zq[3 * N], tq[3 * N];
	double one;
	rw_seis_td td = {0};
	size_t i, n = 1201, nq = 0;
	uint64_t r = 42;

	(void)state;
	for (i = 0; i < n; i++) {
		/* uneven spacing: 0.1524 m and, every 50th, a 3 m step */
		z[i] = i ? z[i - 1] + (i % 50 ? 0.1524 : 3.0) : 2100.0;
		v[i] = 2400.0 + 900.0 * sin(0.05 * (double)i);
	}
	assert_int_equal(
	    rw_seis_td_sonic(z, v, n, RW_SEIS_SONIC_VELOCITY, &d, t, NULL),
	    RW_OK);
	td.z_m = z;
	td.twt_s = t;
	td.n = n;
	td.datum_z_m = d.z_m;
	td.datum_twt_s = d.twt_s;
	for (i = 0; i < n; i++)
		zq[nq++] = z[i];
	for (i = 0; i + 1 < n; i++)
		zq[nq++] = 0.5 * (z[i] + z[i + 1]);
	for (i = 0; i < 200; i++) {
		r = r * 6364136223846793005u + 1442695040888963407u;
		zq[nq++] = z[0] + (z[n - 1] - z[0]) *
		                      ((double)(r >> 11) / 9007199254740992.0);
	}
	for (i = 0; i < 50; i++)
		zq[nq++] = z[n - 1 - 20 * i]; /* falling */
	assert_int_equal(rw_seis_td_eval(&td, zq, nq, tq, NULL, NULL), RW_OK);
	for (i = 0; i < nq; i++) {
		assert_int_equal(
		    rw_seis_td_eval(&td, zq + i, 1, &one, NULL, NULL), RW_OK);
		assert_memory_equal(&one, tq + i, sizeof one);
	}
	for (i = 0; i < n; i++)
		assert_memory_equal(&t[i], tq + i, sizeof t[i]);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_constant_velocity),
	    cmocka_unit_test(test_linear_slowness_and_datum),
	    cmocka_unit_test(test_nulls),
	    cmocka_unit_test(test_checkshots),
	    cmocka_unit_test(test_checkshot_errors),
	    cmocka_unit_test(test_sonic_errors),
	    cmocka_unit_test(test_resample),
	    cmocka_unit_test(test_query_order),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
