/* Time-depth relation of a well: two-way time by integrating the sonic
 * from a datum, the checkshot drift curve and its correction, and the
 * resampling of a curve to a regular time axis with GSL interpolation.
 * Conventions are in include/rockwire/seismic.h. */
#include <math.h>
#include <stddef.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>

#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "seis_internal.h"

static void fill_nan(double *x, size_t n)
{
	size_t i;

	if (x != NULL)
		for (i = 0; i < n; i++)
			x[i] = NAN;
}

static double lerp(double x0, double y0, double x1, double y1, double x)
{
	return y0 + (y1 - y0) * (x - x0) / (x1 - x0);
}

/* Slowness of one sonic sample in s/m, NaN when null or not positive. */
static double slowness(double v, rw_seis_sonic_kind kind)
{
	if (!isfinite(v) || !(v > 0.0))
		return NAN;
	return kind == RW_SEIS_SONIC_VELOCITY ? 1.0 / v : v;
}

static int datum_ok(const rw_seis_datum *d, double z_first)
{
	return d != NULL && isfinite(d->z_m) && isfinite(d->twt_s) &&
	       isfinite(d->vrep_ms) && d->vrep_ms > 0.0 && d->z_m <= z_first;
}

int rw_seis_td_sonic(const double *z_m, const double *sonic, size_t n,
                     rw_seis_sonic_kind kind, const rw_seis_datum *datum,
                     double *twt_s, unsigned *warn)
{
	rw__seis_ksum sum = {0.0, 0.0};
	size_t i, first = n, last = n, prev;
	double s_prev;

	if (twt_s == NULL)
		return RW_EDOM;
	fill_nan(twt_s, n);
	if (warn != NULL)
		for (i = 0; i < n; i++)
			warn[i] = 0;
	if (n == 0 || sonic == NULL || !rw__seis_increasing(z_m, n) ||
	    !datum_ok(datum, z_m[0]) ||
	    (kind != RW_SEIS_SONIC_VELOCITY && kind != RW_SEIS_SONIC_SLOWNESS))
		return RW_EDOM;
	for (i = 0; i < n; i++) {
		if (!isnan(slowness(sonic[i], kind))) {
			if (first == n)
				first = i;
			last = i;
		} else if (warn != NULL) {
			warn[i] |= RW_SEIS_WARN_SONIC_NULL;
		}
	}
	if (first == n)
		return RW_EINVAL;
	/* datum to the first valid sample at the replacement velocity */
	for (i = 0; i <= first; i++) {
		twt_s[i] =
		    datum->twt_s + 2.0 * (z_m[i] - datum->z_m) / datum->vrep_ms;
		if (i < first && warn != NULL)
			warn[i] |= RW_SEIS_WARN_REPLACEMENT;
	}
	sum.s = twt_s[first];
	prev = first;
	s_prev = slowness(sonic[first], kind);
	for (i = first + 1; i <= last; i++) {
		double sa = s_prev, sb, s_left, s_right;
		size_t j, next = i;

		while (isnan(slowness(sonic[next], kind)))
			next++;
		sb = slowness(sonic[next], kind);
		/* slowness linear between valid samples prev and next, so the
		 * trapezoid 2 dz (s_left + s_right) / 2 is exact per step */
		s_left = sa;
		for (j = prev + 1; j <= next; j++) {
			s_right = j == next ? sb
			                    : lerp(z_m[prev], sa, z_m[next], sb,
			                           z_m[j]);
			rw__seis_ksum_add(&sum, (z_m[j] - z_m[j - 1]) *
			                            (s_left + s_right));
			twt_s[j] = rw__seis_ksum_value(&sum);
			s_left = s_right;
		}
		prev = next;
		s_prev = sb;
		i = next;
	}
	/* below the last valid sample: its slowness held */
	for (i = last + 1; i < n; i++) {
		rw__seis_ksum_add(&sum, 2.0 * (z_m[i] - z_m[i - 1]) * s_prev);
		twt_s[i] = rw__seis_ksum_value(&sum);
		if (warn != NULL)
			warn[i] |= RW_SEIS_WARN_EXTRAPOLATED;
	}
	return RW_OK;
}

/* ---- the relation ------------------------------------------------------ */

/* Checks the sonic table and datum (not the checkshots). */
static int table_ok(const rw_seis_td *td)
{
	if (td == NULL || td->n == 0 || !rw__seis_increasing(td->z_m, td->n) ||
	    !rw__seis_increasing(td->twt_s, td->n))
		return 0;
	if (!isfinite(td->datum_z_m) || !isfinite(td->datum_twt_s) ||
	    td->datum_z_m > td->z_m[0])
		return 0;
	if (td->datum_z_m < td->z_m[0] && !(td->datum_twt_s < td->twt_s[0]))
		return 0;
	return 1;
}

/* Checkshot depths: strictly increasing, inside [datum, z_{n-1}]. */
static int cs_depths_ok(const rw_seis_td *td)
{
	if (td->n_cs == 0)
		return 1;
	if (!rw__seis_increasing(td->cs_z_m, td->n_cs))
		return 0;
	return td->cs_z_m[0] >= td->datum_z_m &&
	       td->cs_z_m[td->n_cs - 1] <= td->z_m[td->n - 1];
}

/* Index i of the interval [x_i, x_{i+1}] holding v, x increasing, n >= 2,
 * x_0 <= v <= x_{n-1}. */
static size_t bracket(const double *x, size_t n, double v)
{
	size_t lo = 0, hi = n - 1;

	while (hi - lo > 1) {
		size_t mid = lo + (hi - lo) / 2;

		if (x[mid] <= v)
			lo = mid;
		else
			hi = mid;
	}
	return lo;
}

/* bracket() for queries that mostly rise: walks up from *hint (the last
 * answer) a few intervals before falling back to the bisection of the
 * rest, and stores the answer there. The same index as bracket(): the
 * largest i <= n - 2 with x_i <= v. */
static size_t bracket_from(const double *x, size_t n, double v, size_t *hint)
{
	size_t i = *hint, steps;

	if (i > n - 2 || !(x[i] <= v))
		i = 0;
	for (steps = 0; i < n - 2 && x[i + 1] <= v; i++)
		if (++steps > 8) {
			i += bracket(x + i, n - i, v);
			break;
		}
	*hint = i;
	return i;
}

/* Sonic time at depth z in [datum, z_{n-1}], linear through the nodes;
 * hint as for bracket_from (NULL: bisection). */
static double base_time_from(const rw_seis_td *td, double z, size_t *hint)
{
	size_t i;

	if (z < td->z_m[0])
		return lerp(td->datum_z_m, td->datum_twt_s, td->z_m[0],
		            td->twt_s[0], z);
	if (td->n == 1)
		return td->twt_s[0];
	i = hint ? bracket_from(td->z_m, td->n, z, hint)
	         : bracket(td->z_m, td->n, z);
	return lerp(td->z_m[i], td->twt_s[i], td->z_m[i + 1], td->twt_s[i + 1],
	            z);
}

static double base_time(const rw_seis_td *td, double z)
{
	return base_time_from(td, z, NULL);
}

/* Drift at depth z from nodes (cz, cd, m): linear, held outside; *held
 * set when z is outside the span. */
static double drift_at(const double *cz, const double *cd, size_t m, double z,
                       int *held)
{
	size_t i;

	*held = 0;
	if (m == 0)
		return 0.0;
	if (z <= cz[0]) {
		*held = z < cz[0];
		return cd[0];
	}
	if (z >= cz[m - 1]) {
		*held = z > cz[m - 1];
		return cd[m - 1];
	}
	i = bracket(cz, m, z);
	return lerp(cz[i], cd[i], cz[i + 1], cd[i + 1], z);
}

/* The corrected times at every node of both curves (datum, samples,
 * checkshots) must rise strictly with depth; equal depths are one node. */
static int corrected_increasing(const rw_seis_td *td, const double *cd)
{
	size_t i = 0, k = 0;
	double z_last = td->datum_z_m, t_last, z, t;
	int held;

	t_last = (td->datum_z_m < td->z_m[0] ? td->datum_twt_s : td->twt_s[0]) +
	         drift_at(td->cs_z_m, cd, td->n_cs, td->datum_z_m, &held);
	while (i < td->n || k < td->n_cs) {
		if (k >= td->n_cs || (i < td->n && td->z_m[i] <= td->cs_z_m[k]))
			z = td->z_m[i++];
		else
			z = td->cs_z_m[k++];
		if (!(z > z_last))
			continue;
		t = base_time(td, z) +
		    drift_at(td->cs_z_m, cd, td->n_cs, z, &held);
		if (!(t > t_last))
			return 0;
		z_last = z;
		t_last = t;
	}
	return 1;
}

int rw_seis_td_drift(const rw_seis_td *td, const double *cs_twt_s,
                     double *cs_drift_s)
{
	size_t k;

	if (cs_drift_s == NULL || td == NULL)
		return RW_EDOM;
	fill_nan(cs_drift_s, td->n_cs);
	if (!table_ok(td) || td->n_cs == 0 || !cs_depths_ok(td) ||
	    !rw__seis_increasing(cs_twt_s, td->n_cs))
		return RW_EDOM;
	for (k = 0; k < td->n_cs; k++)
		cs_drift_s[k] = cs_twt_s[k] - base_time(td, td->cs_z_m[k]);
	if (!corrected_increasing(td, cs_drift_s)) {
		fill_nan(cs_drift_s, td->n_cs);
		return RW_EINVAL;
	}
	return RW_OK;
}

/* Full check of a relation, drifts included. */
static int td_ok(const rw_seis_td *td)
{
	size_t k;

	if (!table_ok(td) || !cs_depths_ok(td))
		return 0;
	if (td->n_cs > 0) {
		if (td->cs_drift_s == NULL)
			return 0;
		for (k = 0; k < td->n_cs; k++)
			if (!isfinite(td->cs_drift_s[k]))
				return 0;
	}
	return 1;
}

int rw_seis_td_eval(const rw_seis_td *td, const double *zq, size_t nq,
                    double *twt_s, double *drift_s, unsigned *warn)
{
	size_t i, hint = 0;

	if (twt_s == NULL)
		return RW_EDOM;
	fill_nan(twt_s, nq);
	fill_nan(drift_s, nq);
	if (warn != NULL)
		for (i = 0; i < nq; i++)
			warn[i] = 0;
	if (!td_ok(td) || (nq > 0 && zq == NULL))
		return RW_EDOM;
	for (i = 0; i < nq; i++) {
		double z = zq[i], d;
		int held;

		if (!isfinite(z) || z < td->datum_z_m ||
		    z > td->z_m[td->n - 1]) {
			if (warn != NULL)
				warn[i] |= RW_SEIS_WARN_OUTSIDE;
			continue;
		}
		d = drift_at(td->cs_z_m, td->cs_drift_s, td->n_cs, z, &held);
		twt_s[i] = base_time_from(td, z, &hint) + d;
		if (drift_s != NULL)
			drift_s[i] = d;
		if (held && warn != NULL)
			warn[i] |= RW_SEIS_WARN_DRIFT_HELD;
	}
	return RW_OK;
}

/* Corrected time at one depth inside the relation (checked by caller). */
double rw__seis_td_at(const rw_seis_td *td, double z)
{
	int held;

	return base_time(td, z) +
	       drift_at(td->cs_z_m, td->cs_drift_s, td->n_cs, z, &held);
}

double rw__seis_td_at_from(const rw_seis_td *td, double z, size_t *hint)
{
	int held;

	return base_time_from(td, z, hint) +
	       drift_at(td->cs_z_m, td->cs_drift_s, td->n_cs, z, &held);
}

int rw__seis_td_check(const rw_seis_td *td)
{
	return td_ok(td);
}

/* ---- resampling -------------------------------------------------------- */

static int axis_ok(const rw_seis_taxis *ax)
{
	return ax != NULL && ax->n > 0 && isfinite(ax->t0_s) &&
	       isfinite(ax->dt_s) && ax->dt_s > 0.0 &&
	       isfinite(ax->t0_s + (double)(ax->n - 1) * ax->dt_s);
}

int rw__seis_axis_ok(const rw_seis_taxis *ax)
{
	return axis_ok(ax);
}

/* Interpolates the run [a, b] (b > a) at the output times inside it. */
static int resample_run(const double *t, const double *y, size_t a, size_t b,
                        const rw_seis_taxis *ax, rw_seis_interp kind,
                        double *out, unsigned *warn)
{
	const gsl_interp_type *type =
	    (kind == RW_SEIS_INTERP_STEFFEN && b - a + 1 >= 3)
	        ? gsl_interp_steffen
	        : gsl_interp_linear;
	gsl_interp_accel acc = {0, 0, 0};
	size_t m = b - a + 1, k, k0;
	gsl_interp *it;
	double f;
	int st = RW_OK;

	it = gsl_interp_alloc(type, m);
	if (it == NULL)
		return RW_ERANGE;
	if (gsl_interp_init(it, t + a, y + a, m) != GSL_SUCCESS) {
		gsl_interp_free(it);
		return RW_ERANGE;
	}
	f = ceil((t[a] - ax->t0_s) / ax->dt_s);
	if (!(f < (double)ax->n)) {
		gsl_interp_free(it);
		return RW_OK;
	}
	k0 = f > 0.0 ? (size_t)f : 0;
	if (k0 > 0)
		k0--; /* rounding of the ceiling: recheck one below */
	for (k = k0; k < ax->n; k++) {
		double tk = ax->t0_s + (double)k * ax->dt_s, v;

		if (tk < t[a])
			continue;
		if (tk > t[b])
			break;
		if (gsl_interp_eval_e(it, t + a, y + a, tk, &acc, &v) !=
		    GSL_SUCCESS) {
			st = RW_ERANGE;
			break;
		}
		out[k] = v;
		if (warn != NULL)
			warn[k] &= ~(RW_SEIS_WARN_NULL_INPUT);
	}
	gsl_interp_free(it);
	return st;
}

int rw_seis_resample(const double *t_s, const double *y, size_t n,
                     const rw_seis_taxis *ax, rw_seis_interp kind, double *out,
                     unsigned *warn)
{
	size_t k, a;

	if (out == NULL || ax == NULL)
		return RW_EDOM;
	fill_nan(out, ax->n);
	if (warn != NULL)
		for (k = 0; k < ax->n; k++)
			warn[k] = 0;
	if (!axis_ok(ax) || n == 0 || y == NULL ||
	    !rw__seis_increasing(t_s, n) ||
	    (kind != RW_SEIS_INTERP_LINEAR && kind != RW_SEIS_INTERP_STEFFEN))
		return RW_EDOM;
	/* every output starts null; a run that covers it clears the flag */
	for (k = 0; k < ax->n; k++) {
		double tk = ax->t0_s + (double)k * ax->dt_s;

		if (warn == NULL)
			continue;
		if (tk < t_s[0] || tk > t_s[n - 1])
			warn[k] |= RW_SEIS_WARN_OUTSIDE;
		else
			warn[k] |= RW_SEIS_WARN_NULL_INPUT;
	}
	for (a = 0; a < n;) {
		size_t b;

		if (!isfinite(y[a])) {
			a++;
			continue;
		}
		for (b = a; b + 1 < n && isfinite(y[b + 1]); b++)
			;
		if (b == a) {
			/* a lone valid sample: only an output exactly on it */
			double f = floor((t_s[a] - ax->t0_s) / ax->dt_s + 0.5);

			k = f >= 0.0 && f < (double)ax->n ? (size_t)f : ax->n;
			if (k < ax->n &&
			    ax->t0_s + (double)k * ax->dt_s == t_s[a]) {
				out[k] = y[a];
				if (warn != NULL)
					warn[k] &= ~RW_SEIS_WARN_NULL_INPUT;
			}
		} else {
			int st =
			    resample_run(t_s, y, a, b, ax, kind, out, warn);

			if (st != RW_OK) {
				fill_nan(out, ax->n);
				return st;
			}
		}
		a = b + 1;
	}
	return RW_OK;
}
