/* Reflectivity of a log in regular time and synthetic angle gathers: the
 * interfaces of the log placed at their corrected two-way times, their PP
 * coefficients (exact or linearised, per angle), the convolution with the
 * wavelet (NMO-stretched or not) and its Hilbert transform for complex
 * coefficients, and the per-sample QC. Conventions are in
 * include/rockwire/seismic.h. */
#include <math.h>
#include <stddef.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_interp.h>

#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "seis_internal.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

/* Largest angle with the stretch: 1 / cos(84 deg) = 9.6 <= 10. */
#define STRETCH_MAX_RAD (84.0 * M_PI_2 / 90.0)

/* The wavelet's reach: samples whose magnitude is at least this fraction
 * of the peak (the threshold of RW_SEIS_WARN_TRUNCATED). */
#define REACH_FRACTION 0.01

static void fill_nan(double *x, size_t n)
{
	size_t i;

	if (x != NULL)
		for (i = 0; i < n; i++)
			x[i] = NAN;
}

static int log_ok(const rw_seis_log *log)
{
	return log != NULL && log->n >= 2 && log->vp_ms != NULL &&
	       log->vs_ms != NULL && log->rho_kgm3 != NULL &&
	       rw__seis_increasing(log->z_m, log->n);
}

/* The relation must give a time to every interface of the log. */
static int td_covers(const rw_seis_td *td, const rw_seis_log *log)
{
	return rw__seis_td_check(td) && log->z_m[0] >= td->datum_z_m &&
	       log->z_m[log->n - 1] <= td->z_m[td->n - 1];
}

/* Medium of sample i; vs is not read when use_vs is 0 (then 0: every
 * form but the Gray ones is independent of vs at normal incidence). */
static int sample_medium(const rw_seis_log *log, size_t i, int use_vs,
                         rw_reflect_medium *m)
{
	m->vp_ms = log->vp_ms[i];
	m->rho_kgm3 = log->rho_kgm3[i];
	m->vs_ms = use_vs ? log->vs_ms[i] : 0.0;
	return rw_reflect_medium_check(m) == RW_OK;
}

/* PP coefficient of one interface; *post when past the P critical angle.
 * Returns 0 when there is no coefficient. */
static int coefficient(const rw_reflect_medium *u, const rw_reflect_medium *l,
                       double th, rw_seis_rmethod m, double *re, double *im,
                       int *post)
{
	double pc, sc;
	int st;

	*re = *im = 0.0;
	*post = 0;
	/* at normal incidence nothing is past critical (pc > 0) */
	if (th > 0.0 && rw_reflect_critical_angles(u, l, &pc, &sc) == RW_OK &&
	    th >= pc)
		*post = 1;
	switch (m) {
	case RW_SEIS_R_ZOEPPRITZ: {
		rw_reflect_pcoefs c;

		st = rw_reflect_zoeppritz(u, l, th, &c);
		*re = c.rpp.re;
		*im = c.rpp.im;
		break;
	}
	case RW_SEIS_R_AKI_RICHARDS:
		st = rw_reflect_aki_richards(u, l, th, re);
		break;
	case RW_SEIS_R_SHUEY2: st = rw_reflect_shuey2(u, l, th, re); break;
	case RW_SEIS_R_SHUEY3: st = rw_reflect_shuey3(u, l, th, re); break;
	case RW_SEIS_R_HILTERMAN:
		st = rw_reflect_hilterman(u, l, th, re);
		break;
	case RW_SEIS_R_FATTI: st = rw_reflect_fatti(u, l, th, re); break;
	case RW_SEIS_R_GRAY_LMR: st = rw_reflect_gray_lmr(u, l, th, re); break;
	case RW_SEIS_R_GRAY_KMR: st = rw_reflect_gray_kmr(u, l, th, re); break;
	case RW_SEIS_R_SMITH_GIDLOW:
		st = rw_reflect_smith_gidlow(u, l, th, re);
		break;
	default: return 0;
	}
	return st == RW_OK && isfinite(*re) && isfinite(*im);
}

/* Places every interface of the log on the axis (t0, dt, ne): the real
 * and imaginary coefficients split linearly between the two neighbouring
 * samples (re must be zeroed by the caller, im may be NULL), and at the
 * samples an interface would have gone to: counts of null and of
 * post-critical interfaces (mnull, mpost, may be NULL) and the matching
 * warning bits (warn, may be NULL). Returns nonzero when any coefficient
 * is complex. */
static int place(const rw_seis_log *log, const rw_seis_td *td, double th,
                 rw_seis_rmethod method, double t0, double dt, size_t ne,
                 double *re, double *im, double *mnull, double *mpost,
                 unsigned *warn)
{
	int use_vs = th > 0.0 || method == RW_SEIS_R_GRAY_LMR ||
	             method == RW_SEIS_R_GRAY_KMR;
	int any_im = 0, ok1, ok2;
	size_t i, hint = 0;
	rw_reflect_medium m1, m2;

	/* each sample's medium is read once: the lower one of an interface
	 * is the upper one of the next */
	ok1 = sample_medium(log, 0, use_vs, &m1);
	for (i = 0; i + 1 < log->n; i++, m1 = m2, ok1 = ok2) {
		double z = 0.5 * (log->z_m[i] + log->z_m[i + 1]);
		double u = (rw__seis_td_at_from(td, z, &hint) - t0) / dt, fk, a,
		       r, q;
		double part[2];
		unsigned mark = 0;
		int ok, post = 0, side;

		ok2 = sample_medium(log, i + 1, use_vs, &m2);
		fk = floor(u);
		if (!(fk >= -1.0) || !(fk < (double)ne))
			continue; /* off the axis */
		a = u - fk;
		ok = ok1 && ok2 &&
		     coefficient(&m1, &m2, th, method, &r, &q, &post);
		if (!ok) {
			/* post stays: Aki-Richards has no value past critical
			 */
			r = q = 0.0;
			mark |= RW_SEIS_WARN_NULL_NEAR;
		}
		if (post)
			mark |= RW_SEIS_WARN_POSTCRITICAL;
		if (q != 0.0)
			any_im = 1;
		/* sample fk gets 1 - a, sample fk + 1 gets a */
		part[0] = 1.0 - a;
		part[1] = a;
		for (side = 0; side < 2; side++) {
			double kk = fk + (double)side;
			size_t k;

			if (kk < 0.0 || kk >= (double)ne ||
			    (side == 1 && a == 0.0))
				continue;
			k = (size_t)kk;
			re[k] += part[side] * r;
			if (im != NULL)
				im[k] += part[side] * q;
			if (mnull != NULL)
				mnull[k] += !ok;
			if (mpost != NULL)
				mpost[k] += post;
			if (warn != NULL)
				warn[k] |= mark;
		}
	}
	return any_im;
}

/* Time span of the log, for RW_SEIS_WARN_OUTSIDE_LOG. */
static void log_span(const rw_seis_log *log, const rw_seis_td *td, double *top,
                     double *bot)
{
	*top = rw__seis_td_at(td, log->z_m[0]);
	*bot = rw__seis_td_at(td, log->z_m[log->n - 1]);
}

int rw_seis_reflectivity(const rw_seis_log *log, const rw_seis_td *td,
                         double theta_rad, rw_seis_rmethod method,
                         const rw_seis_taxis *ax, double *r_re, double *r_im,
                         unsigned *warn)
{
	double top, bot;
	size_t k;

	if (r_re == NULL || ax == NULL)
		return RW_EDOM;
	fill_nan(r_re, ax->n);
	fill_nan(r_im, ax->n);
	if (warn != NULL)
		for (k = 0; k < ax->n; k++)
			warn[k] = 0;
	if (!rw__seis_axis_ok(ax) || !log_ok(log) || !td_covers(td, log) ||
	    !isfinite(theta_rad) || theta_rad < 0.0 || theta_rad >= M_PI_2 ||
	    (unsigned)method >= RW_SEIS_R_COUNT)
		return RW_EDOM;
	memset(r_re, 0, ax->n * sizeof(double));
	if (r_im != NULL)
		memset(r_im, 0, ax->n * sizeof(double));
	place(log, td, theta_rad, method, ax->t0_s, ax->dt_s, ax->n, r_re, r_im,
	      NULL, NULL, warn);
	log_span(log, td, &top, &bot);
	for (k = 0; warn != NULL && k < ax->n; k++) {
		double t = ax->t0_s + (double)k * ax->dt_s;

		if (t < top || t > bot)
			warn[k] |= RW_SEIS_WARN_OUTSIDE_LOG;
	}
	return RW_OK;
}

/* ---- synthetic gathers -------------------------------------------------- */

/* Workspace layout of rw_seis_synthetic, in doubles. */
struct layout {
	size_t pre, post; /* extension of the axis before and after */
	size_t ne;        /* extended axis length */
	size_t ncap;      /* longest (stretched) wavelet */
	size_t conv;      /* one convolution plan */
	size_t hilb;      /* the Hilbert workspace */
	size_t total;
};

/* Layout for given extensions; 0 on overflow. */
static int layout_fill(size_t nt, size_t nw, double pre, double post,
                       struct layout *l)
{
	double total;

	if (pre + post + (double)nt > 1e12)
		return 0;
	l->pre = (size_t)pre;
	l->post = (size_t)post;
	l->ne = nt + l->pre + l->post;
	l->ncap = l->pre + l->post + 1;
	/* the stretched wavelet (at most ncap - 2 samples) must stay within
	 * the wavelet limit, which also bounds its Hilbert transform */
	if (l->ncap - 2 > RW_SEIS_MAX_WAVELET)
		return 0;
	l->conv = rw__seis_conv_work(l->ne, l->ncap);
	l->hilb = rw_seis_hilbert_workspace(
	    l->ncap < RW_SEIS_MAX_WAVELET ? l->ncap : RW_SEIS_MAX_WAVELET);
	if (l->conv == 0 || l->hilb == 0)
		return 0;
	/* re, im, two mark prefix sums (ne + 1 each), two outputs; the
	 * wavelet and its Hilbert transform; spline abscissae; the Hilbert
	 * workspace; two convolution plans */
	total = 6.0 * (double)l->ne + 2.0 + 2.0 * (double)l->ncap + (double)nw +
	        (double)l->hilb + 2.0 * (double)l->conv;
	if (total > 1e14)
		return 0;
	l->total = (size_t)total;
	return 1;
}

static double stretch_factor(double max_theta, int stretch)
{
	return stretch ? 1.0 / cos(max_theta) : 1.0;
}

static int angle_ok(double th, int stretch)
{
	return isfinite(th) && th >= 0.0 && th < M_PI_2 &&
	       (!stretch || th <= STRETCH_MAX_RAD);
}

size_t rw_seis_synthetic_workspace(size_t nt, size_t nw, double max_theta_rad,
                                   int stretch)
{
	struct layout l;
	double f, ext;

	if (nt == 0 || nw == 0 || nw > RW_SEIS_MAX_WAVELET ||
	    !angle_ok(max_theta_rad, stretch))
		return 0;
	f = stretch_factor(max_theta_rad, stretch);
	/* pre + post = ceil(a f) + ceil(b f) + 2 <= ceil((a + b) f) + 3 for
	 * a + b = nw - 1, whatever the time-zero index: an upper bound */
	ext = ceil((double)(nw - 1) * f) + 3.0;
	if (!layout_fill(nt, nw, ext, 0.0, &l))
		return 0;
	return l.total;
}

/* Prefix sums in place: p[0] = 0, p[k + 1] = p[k] + m[k]; p has ne + 1. */
static void prefix(double *p, size_t ne)
{
	double run = 0.0, next;
	size_t k;

	/* m[k] is stored in p[k + 1] on entry */
	p[0] = 0.0;
	for (k = 1; k <= ne; k++) {
		next = p[k];
		run += next;
		p[k] = run;
	}
}

/* Count of marks in ext indices [lo, hi] (as longs, clipped). */
static double marks_in(const double *p, size_t ne, long lo, long hi)
{
	if (lo < 0)
		lo = 0;
	if (hi > (long)ne - 1)
		hi = (long)ne - 1;
	if (hi < lo)
		return 0.0;
	return p[hi + 1] - p[lo];
}

/* Reach of a wavelet: first and last index with |w| >= 1% of the peak. */
static void reach(const double *w, size_t n, size_t *lo, size_t *hi)
{
	double peak = 0.0;
	size_t k;

	for (k = 0; k < n; k++)
		if (fabs(w[k]) > peak)
			peak = fabs(w[k]);
	*lo = 0;
	*hi = n - 1;
	while (*lo < n - 1 && fabs(w[*lo]) < REACH_FRACTION * peak)
		(*lo)++;
	while (*hi > *lo && fabs(w[*hi]) < REACH_FRACTION * peak)
		(*hi)--;
}

int rw_seis_synthetic(const rw_seis_log *log, const rw_seis_td *td,
                      const double *theta_rad, size_t n_angles,
                      const rw_seis_wavelet *wav, const rw_seis_taxis *ax,
                      const rw_seis_synth_opts *opts, double *traces,
                      double *refl, unsigned *warn, double *work,
                      size_t work_len)
{
	struct layout l;
	double *re, *im, *pnull, *ppost, *out, *out2, *wcur, *hcur, *xs, *hw;
	double *convw, *convh, max_th = 0.0, top, bot, f, t0e;
	rw__seis_conv_plan pw, ph;
	gsl_interp *spline = NULL;
	size_t a, k, nt, total;
	int st = RW_OK, have_h = 0, need_stretch = 0;

	if (traces == NULL || ax == NULL || (n_angles > 0 && theta_rad == NULL))
		return RW_EDOM;
	nt = ax->n;
	if (n_angles > 0 && nt > ((size_t)-1) / sizeof(double) / n_angles)
		return RW_EDOM;
	total = nt * n_angles;
	fill_nan(traces, total);
	fill_nan(refl, total);
	if (warn != NULL)
		for (k = 0; k < total; k++)
			warn[k] = 0;
	if (n_angles == 0 || !rw__seis_axis_ok(ax) || !log_ok(log) ||
	    !td_covers(td, log) || opts == NULL ||
	    (unsigned)opts->method >= RW_SEIS_R_COUNT ||
	    (unsigned)opts->conv > RW_SEIS_CONV_FFT || wav == NULL ||
	    rw_seis_wavelet_check(wav->w, wav->n, wav->i0) != RW_OK ||
	    !isfinite(wav->dt_s) ||
	    !(fabs(wav->dt_s - ax->dt_s) <= 1e-9 * ax->dt_s))
		return RW_EDOM;
	for (a = 0; a < n_angles; a++) {
		if (!angle_ok(theta_rad[a], opts->stretch))
			return RW_EDOM;
		if (theta_rad[a] > max_th)
			max_th = theta_rad[a];
		if (opts->stretch && theta_rad[a] > 0.0)
			need_stretch = 1;
	}
	if (need_stretch && wav->n < 3)
		return RW_EDOM;
	f = stretch_factor(max_th, opts->stretch);
	if (!layout_fill(nt, wav->n,
	                 ceil((double)(wav->n - 1 - wav->i0) * f) + 1.0,
	                 ceil((double)wav->i0 * f) + 1.0, &l))
		return RW_EDOM;
	if (work == NULL || work_len < l.total)
		return RW_ERANGE;
	re = work;
	im = re + l.ne;
	pnull = im + l.ne;
	ppost = pnull + l.ne + 1;
	out = ppost + l.ne + 1;
	out2 = out + l.ne;
	wcur = out2 + l.ne;
	hcur = wcur + l.ncap;
	xs = hcur + l.ncap;
	hw = xs + wav->n;
	convw = hw + l.hilb;
	convh = convw + l.conv;
	t0e = ax->t0_s - (double)l.pre * ax->dt_s;
	log_span(log, td, &top, &bot);
	if (need_stretch) {
		for (k = 0; k < wav->n; k++)
			xs[k] = (double)k - (double)wav->i0;
		spline = gsl_interp_alloc(gsl_interp_cspline, wav->n);
		if (spline == NULL || gsl_interp_init(spline, xs, wav->w,
		                                      wav->n) != GSL_SUCCESS) {
			st = RW_ERANGE;
			goto out;
		}
	}
	/* the unstretched wavelet's plan serves every angle without stretch */
	memcpy(wcur, wav->w, wav->n * sizeof(double));
	st = rw__seis_conv_plan_init(&pw, wcur, wav->n, wav->i0, l.ne,
	                             opts->conv, convw, l.conv);
	if (st != RW_OK)
		goto out;
	{
		size_t ncur = wav->n, i0cur = wav->i0, rlo, rhi;
		double fcur = 1.0;

		reach(wcur, ncur, &rlo, &rhi);
		for (a = 0; a < n_angles; a++) {
			double th = theta_rad[a];
			double fa = opts->stretch ? 1.0 / cos(th) : 1.0;
			int any_im;

			if (th == 0.0)
				fa = 1.0;
			if (fa != fcur) {
				/* a new wavelet: stretch, new plans */
				if (fa == 1.0) {
					memcpy(wcur, wav->w,
					       wav->n * sizeof(double));
					ncur = wav->n;
					i0cur = wav->i0;
				} else {
					st = rw__seis_stretch_eval(
					    spline, xs, wav->w, wav->n, wav->i0,
					    fa, wcur, l.ncap, &ncur, &i0cur);
					if (st != RW_OK)
						goto out;
				}
				st = rw__seis_conv_plan_init(
				    &pw, wcur, ncur, i0cur, l.ne, opts->conv,
				    convw, l.conv);
				if (st != RW_OK)
					goto out;
				fcur = fa;
				have_h = 0;
				reach(wcur, ncur, &rlo, &rhi);
			}
			memset(re, 0, l.ne * sizeof(double));
			memset(im, 0, l.ne * sizeof(double));
			memset(pnull, 0, (l.ne + 1) * sizeof(double));
			memset(ppost, 0, (l.ne + 1) * sizeof(double));
			/* marks go to p[k + 1] for the in-place prefix sums */
			any_im =
			    place(log, td, th, opts->method, t0e, ax->dt_s,
			          l.ne, re, im, pnull + 1, ppost + 1, NULL);
			prefix(pnull, l.ne);
			prefix(ppost, l.ne);
			st = rw__seis_conv_apply(&pw, re, out);
			if (st != RW_OK)
				goto out;
			if (any_im) {
				if (!have_h) {
					st = rw_seis_hilbert(wcur, ncur, hcur,
					                     hw, l.hilb);
					if (st == RW_OK)
						st = rw__seis_conv_plan_init(
						    &ph, hcur, ncur, i0cur,
						    l.ne, opts->conv, convh,
						    l.conv);
					if (st != RW_OK)
						goto out;
					have_h = 1;
				}
				st = rw__seis_conv_apply(&ph, im, out2);
				if (st != RW_OK)
					goto out;
				for (k = 0; k < l.ne; k++)
					out[k] += out2[k];
			}
			for (k = 0; k < nt; k++) {
				size_t q = k + l.pre, o = a * nt + k;
				/* out[q] sees r[m], m = q + i0 - j, j in
				 * the wavelet's reach [rlo, rhi] */
				long lo = (long)q + (long)i0cur - (long)rhi;
				long hi = (long)q + (long)i0cur - (long)rlo;
				double t = ax->t0_s + (double)k * ax->dt_s;
				unsigned wb = 0;
				int isnull;

				isnull = marks_in(pnull, l.ne, lo, hi) > 0.0;
				if (isnull)
					wb |= RW_SEIS_WARN_NULL_NEAR;
				if (marks_in(ppost, l.ne, lo, hi) > 0.0)
					wb |= RW_SEIS_WARN_POSTCRITICAL;
				if (t < top || t > bot)
					wb |= RW_SEIS_WARN_OUTSIDE_LOG;
				traces[o] = (isnull && !opts->keep_partial)
				                ? NAN
				                : out[q];
				if (refl != NULL)
					refl[o] =
					    (!opts->keep_partial &&
					     pnull[q + 1] - pnull[q] > 0.0)
					        ? NAN
					        : re[q];
				if (warn != NULL)
					warn[o] = wb;
			}
		}
	}
out:
	gsl_interp_free(spline);
	if (st != RW_OK) {
		fill_nan(traces, total);
		fill_nan(refl, total);
	}
	return st;
}
