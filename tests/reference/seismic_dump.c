/* Driver of the seismic core for the numpy/scipy cross-checks
 * (tests/reference/test_seismic_numpy.py). It reads whitespace-separated
 * commands from stdin and prints one JSON line per command:
 *   {"cmd":"name","status":s, "field":[...], ...}
 * with null for non-finite numbers. Commands (counts precede arrays):
 *   conv NR NW I0 METHOD r[NR] w[NW]             -> out
 *   ricker F LEN DT | ormsby F1 F2 F3 F4 LEN DT | bandpass F1..F4 LEN DT
 *                                                -> w, warn
 *   hilbert N x[N]                               -> h
 *   rotate PHASE N x[N]                          -> w
 *   stretch FACTOR N I0 w[N]                     -> w, i0
 *   td N KIND z[N] s[N] DZ DT VREP NCS csz[NCS] cst[NCS]
 *                                  -> twt, corr, drift, cs_drift, warn
 *   resample N KIND t[N] y[N] T0 DT NT           -> out, warn
 *   backus N h[N] vp[N] vs[N] rho[N]             -> c, rho, thomsen
 *   backuslog N WIN MINVALID z[N] vp[N] vs[N] rho[N] -> c11 ... gamma
 *   synth N z vp vs rho (N each) DZ DT VREP NCS csz cst
 *         NW I0 w[NW] T0 DT NT NA ang[NA] METHOD STRETCH KEEP CONV
 *                                    -> traces, refl, warn, twt
 *   avo N MODEL THMIN THMAX theta[N] amp[N]      -> a, b, c, cov, ...
 *   ps VP1 VS1 RHO1 VP2 VS2 RHO2 THETA           -> lin, exact
 * Exit status 1 on malformed input or out of memory. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

static int tok(char *buf, size_t len)
{
	int c;
	size_t n = 0;

	while ((c = getchar()) != EOF &&
	       (c == ' ' || c == '\n' || c == '\t' || c == '\r'))
		;
	if (c == EOF)
		return 0;
	do {
		if (n + 1 < len)
			buf[n++] = (char)c;
	} while ((c = getchar()) != EOF && c != ' ' && c != '\n' && c != '\t' &&
	         c != '\r');
	buf[n] = '\0';
	return 1;
}

static double num(void)
{
	char b[128], *end;
	double v;

	if (!tok(b, sizeof b)) {
		fprintf(stderr, "seismic_dump: unexpected end of input\n");
		exit(1);
	}
	if (strcmp(b, "nan") == 0)
		return NAN;
	v = strtod(b, &end);
	if (end == b || *end != '\0') {
		fprintf(stderr, "seismic_dump: not a number: %s\n", b);
		exit(1);
	}
	return v;
}

static size_t count(void)
{
	double v = num();

	if (!(v >= 0.0) || v > 1e8 || v != floor(v)) {
		fprintf(stderr, "seismic_dump: bad count %g\n", v);
		exit(1);
	}
	return (size_t)v;
}

static double *arr(size_t n)
{
	double *a = calloc(n ? n : 1, sizeof(double));
	size_t i;

	if (a == NULL) {
		fprintf(stderr, "seismic_dump: out of memory\n");
		exit(1);
	}
	for (i = 0; i < n; i++)
		a[i] = num();
	return a;
}

static void *zalloc(size_t n, size_t sz)
{
	void *p = calloc(n ? n : 1, sz);

	if (p == NULL) {
		fprintf(stderr, "seismic_dump: out of memory\n");
		exit(1);
	}
	return p;
}

static void pnum(double x)
{
	if (isfinite(x))
		printf("%.17g", x);
	else
		fputs("null", stdout);
}

static void field(const char *name, const double *x, size_t n)
{
	size_t i;

	printf(",\"%s\":[", name);
	for (i = 0; i < n; i++) {
		if (i)
			putchar(',');
		pnum(x[i]);
	}
	putchar(']');
}

static void ufield(const char *name, const unsigned *x, size_t n)
{
	size_t i;

	printf(",\"%s\":[", name);
	for (i = 0; i < n; i++)
		printf("%s%u", i ? "," : "", x[i]);
	putchar(']');
}

static void head(const char *cmd, int st)
{
	printf("{\"cmd\":\"%s\",\"status\":%d", cmd, st);
}

static void cmd_conv(void)
{
	size_t nr = count(), nw = count(), i0 = count();
	int method = (int)num();
	double *r = arr(nr), *w = arr(nw), *out = zalloc(nr, sizeof(double));
	size_t wl = rw_seis_convolve_workspace(nr, nw);
	double *work = zalloc(wl, sizeof(double));
	int st = rw_seis_convolve(r, nr, w, nw, i0, (rw_seis_conv)method, out,
	                          work, wl);

	head("conv", st);
	field("out", out, nr);
	puts("}");
	free(r);
	free(w);
	free(out);
	free(work);
}

static void cmd_wavelet(const char *kind)
{
	double f[4], len, dt, *w;
	size_t n = 0, cap;
	unsigned warn = 0;
	int st;

	if (strcmp(kind, "ricker") == 0) {
		f[0] = num();
	} else {
		f[0] = num();
		f[1] = num();
		f[2] = num();
		f[3] = num();
	}
	len = num();
	dt = num();
	if (rw_seis_wavelet_size(len, dt, &cap) != RW_OK)
		cap = 1;
	w = zalloc(cap, sizeof(double));
	if (strcmp(kind, "ricker") == 0)
		st = rw_seis_wavelet_ricker(f[0], len, dt, w, cap, &n, &warn);
	else if (strcmp(kind, "ormsby") == 0)
		st = rw_seis_wavelet_ormsby(f, len, dt, w, cap, &n, &warn);
	else
		st = rw_seis_wavelet_bandpass(f, len, dt, w, cap, &n, &warn);
	head(kind, st);
	field("w", w, n);
	printf(",\"warn\":%u}\n", warn);
	free(w);
}

static void cmd_hilbert(int rotate)
{
	double phase = rotate ? num() : 0.0;
	size_t n = count();
	double *x = arr(n), *h = zalloc(n, sizeof(double));
	size_t wl = rw_seis_hilbert_workspace(n);
	double *work = zalloc(wl, sizeof(double));
	int st;

	if (rotate) {
		st = rw_seis_wavelet_rotate(x, n, phase, work, wl);
		head("rotate", st);
		field("w", x, n);
	} else {
		st = rw_seis_hilbert(x, n, h, work, wl);
		head("hilbert", st);
		field("h", h, n);
	}
	puts("}");
	free(x);
	free(h);
	free(work);
}

static void cmd_stretch(void)
{
	double fac = num();
	size_t n = count(), i0 = count(), cap = (size_t)ceil(n * fac) + 4;
	double *w = arr(n), *out = zalloc(cap, sizeof(double));
	double *work = zalloc(n, sizeof(double));
	size_t no = 0, io = 0;
	int st =
	    rw_seis_wavelet_stretch(w, n, i0, fac, out, cap, &no, &io, work, n);
	double i0d = (double)io;

	head("stretch", st);
	field("w", out, no);
	field("i0", &i0d, 1);
	puts("}");
	free(w);
	free(out);
	free(work);
}

/* Reads a datum and checkshots, builds the relation of a log; td_free
 * releases what it allocated. */
struct tdbuild {
	double *twt, *csz, *cst, *drift;
	rw_seis_td td;
	int st;
	unsigned *warn;
};

static void td_build(struct tdbuild *b, const double *z, const double *son,
                     size_t n, int kind)
{
	rw_seis_datum d;
	size_t ncs;

	d.z_m = num();
	d.twt_s = num();
	d.vrep_ms = num();
	ncs = count();
	b->csz = arr(ncs);
	b->cst = arr(ncs);
	b->twt = zalloc(n, sizeof(double));
	b->drift = zalloc(ncs, sizeof(double));
	b->warn = zalloc(n, sizeof(unsigned));
	b->st = rw_seis_td_sonic(z, son, n, (rw_seis_sonic_kind)kind, &d,
	                         b->twt, b->warn);
	b->td.z_m = z;
	b->td.twt_s = b->twt;
	b->td.n = n;
	b->td.datum_z_m = d.z_m;
	b->td.datum_twt_s = d.twt_s;
	b->td.cs_z_m = b->csz;
	b->td.cs_drift_s = b->drift;
	b->td.n_cs = ncs;
	if (b->st == RW_OK && ncs > 0)
		b->st = rw_seis_td_drift(&b->td, b->cst, b->drift);
}

static void td_free(struct tdbuild *b)
{
	free(b->twt);
	free(b->csz);
	free(b->cst);
	free(b->drift);
	free(b->warn);
}

static void cmd_td(void)
{
	size_t n = count();
	int kind = (int)num();
	double *z = arr(n), *s = arr(n), *corr, *dr, *cst, *csd;
	struct tdbuild b;
	unsigned *w2;
	int st;

	td_build(&b, z, s, n, kind);
	corr = zalloc(n, sizeof(double));
	dr = zalloc(n, sizeof(double));
	w2 = zalloc(n, sizeof(unsigned));
	cst = zalloc(b.td.n_cs, sizeof(double));
	csd = zalloc(b.td.n_cs, sizeof(double));
	st = b.st;
	if (st == RW_OK)
		st = rw_seis_td_eval(&b.td, z, n, corr, dr, w2);
	if (st == RW_OK)
		st = rw_seis_td_eval(&b.td, b.csz, b.td.n_cs, cst, csd, NULL);
	head("td", st);
	field("twt", b.twt, n);
	field("corr", corr, n);
	field("drift", dr, n);
	field("cs_drift", b.drift, b.td.n_cs);
	field("cs_eval", cst, b.td.n_cs);
	ufield("warn", b.warn, n);
	ufield("warn_eval", w2, n);
	puts("}");
	td_free(&b);
	free(z);
	free(s);
	free(corr);
	free(dr);
	free(w2);
	free(cst);
	free(csd);
}

static void cmd_resample(void)
{
	size_t n = count();
	int kind = (int)num();
	double *t = arr(n), *y = arr(n);
	rw_seis_taxis ax;
	double *out;
	unsigned *warn;
	int st;

	ax.t0_s = num();
	ax.dt_s = num();
	ax.n = count();
	out = zalloc(ax.n, sizeof(double));
	warn = zalloc(ax.n, sizeof(unsigned));
	st = rw_seis_resample(t, y, n, &ax, (rw_seis_interp)kind, out, warn);
	head("resample", st);
	field("out", out, ax.n);
	ufield("warn", warn, ax.n);
	puts("}");
	free(t);
	free(y);
	free(out);
	free(warn);
}

static void backus_fields(const rw_seis_backus *b, size_t n)
{
	static const char *names[] = {"c11", "c13", "c33",   "c44",   "c66",
	                              "rho", "eps", "delta", "gamma", NULL};
	double *v = zalloc(n, sizeof(double));
	size_t i;
	int k;

	for (k = 0; names[k] != NULL; k++) {
		for (i = 0; i < n; i++) {
			const rw_seis_backus *x = &b[i];
			double val[9] = {
			    x->c.c11_pa,   x->c.c13_pa, x->c.c33_pa,
			    x->c.c44_pa,   x->c.c66_pa, x->rho_kgm3,
			    x->th.epsilon, x->th.delta, x->th.gamma};

			v[i] = val[k];
		}
		field(names[k], v, n);
	}
	free(v);
}

static void cmd_backus(void)
{
	size_t n = count();
	double *h = arr(n), *vp = arr(n), *vs = arr(n), *rho = arr(n);
	rw_seis_backus b;
	unsigned warn = 0;
	int st = rw_seis_backus_layers(h, vp, vs, rho, n, &b, &warn);

	head("backus", st);
	backus_fields(&b, 1);
	printf(",\"warn\":%u}\n", warn);
	free(h);
	free(vp);
	free(vs);
	free(rho);
}

static void cmd_backuslog(void)
{
	size_t n = count();
	double win = num(), minv = num();
	double *z = arr(n), *vp = arr(n), *vs = arr(n), *rho = arr(n);
	rw_seis_backus *b = zalloc(n, sizeof *b);
	unsigned *warn = zalloc(n, sizeof(unsigned));
	int st = rw_seis_backus_log(z, vp, vs, rho, n, win, minv, b, warn);

	head("backuslog", st);
	backus_fields(b, n);
	ufield("warn", warn, n);
	puts("}");
	free(z);
	free(vp);
	free(vs);
	free(rho);
	free(b);
	free(warn);
}

static void cmd_synth(void)
{
	size_t n = count(), nw, na, i0, wl, nt;
	double *z = arr(n), *vp = arr(n), *vs = arr(n), *rho = arr(n), *w, *ang,
	       *tr, *rf, *work;
	rw_seis_log log = {z, vp, vs, rho, n};
	rw_seis_wavelet wav;
	rw_seis_taxis ax;
	rw_seis_synth_opts o;
	struct tdbuild b;
	unsigned *warn;
	double maxa = 0.0;
	size_t i;
	int st;

	/* the sonic of the relation is vp itself */
	td_build(&b, z, vp, n, RW_SEIS_SONIC_VELOCITY);
	nw = count();
	i0 = count();
	w = arr(nw);
	ax.t0_s = num();
	ax.dt_s = num();
	ax.n = nt = count();
	na = count();
	ang = arr(na);
	o.method = (rw_seis_rmethod)(int)num();
	o.stretch = (int)num();
	o.keep_partial = (int)num();
	o.conv = (rw_seis_conv)(int)num();
	wav.w = w;
	wav.n = nw;
	wav.i0 = i0;
	wav.dt_s = ax.dt_s;
	for (i = 0; i < na; i++)
		if (ang[i] > maxa)
			maxa = ang[i];
	wl = rw_seis_synthetic_workspace(nt, nw, maxa, o.stretch);
	work = zalloc(wl, sizeof(double));
	tr = zalloc(nt * na, sizeof(double));
	rf = zalloc(nt * na, sizeof(double));
	warn = zalloc(nt * na, sizeof(unsigned));
	st = b.st;
	if (st == RW_OK)
		st = rw_seis_synthetic(&log, &b.td, ang, na, &wav, &ax, &o, tr,
		                       rf, warn, work, wl);
	head("synth", st);
	field("traces", tr, nt * na);
	field("refl", rf, nt * na);
	ufield("warn", warn, nt * na);
	{
		double *mid = zalloc(n, sizeof(double));
		double *tm = zalloc(n, sizeof(double));

		for (i = 0; i + 1 < n; i++)
			mid[i] = 0.5 * (z[i] + z[i + 1]);
		if (b.st == RW_OK && n > 1)
			rw_seis_td_eval(&b.td, mid, n - 1, tm, NULL, NULL);
		field("t_iface", tm, n > 0 ? n - 1 : 0);
		free(mid);
		free(tm);
	}
	puts("}");
	td_free(&b);
	free(z);
	free(vp);
	free(vs);
	free(rho);
	free(w);
	free(ang);
	free(tr);
	free(rf);
	free(warn);
	free(work);
}

static void cmd_avo(void)
{
	size_t n = count();
	int model = (int)num();
	double lo = num(), hi = num();
	double *th = arr(n), *amp = arr(n);
	rw_seis_avo_fitter *f = rw_seis_avo_fitter_new(n < 2 ? 2 : n);
	rw_seis_avo_result r;
	unsigned warn = 0;
	int st;

	if (f == NULL) {
		fprintf(stderr, "seismic_dump: out of memory\n");
		exit(1);
	}
	st = rw_seis_avo_fit(f, th, amp, n, 1, (rw_seis_avo_model)model, lo, hi,
	                     &r, &warn);
	head("avo", st);
	{
		double abc[3] = {r.a, r.b, r.c}, cov[9], misc[4];
		int i, j;

		for (i = 0; i < 3; i++)
			for (j = 0; j < 3; j++)
				cov[3 * i + j] = r.cov[i][j];
		misc[0] = r.sigma;
		misc[1] = r.rms;
		misc[2] = r.rcond;
		misc[3] = (double)r.m;
		field("abc", abc, 3);
		field("cov", cov, 9);
		field("sigma_rms_rcond_m", misc, 4);
	}
	printf(",\"warn\":%u}\n", warn);
	rw_seis_avo_fitter_free(f);
	free(th);
	free(amp);
}

static void cmd_ps(void)
{
	rw_reflect_medium u, l;
	rw_reflect_pcoefs c;
	double th, lin, ex[2];
	int st, st2;

	u.vp_ms = num();
	u.vs_ms = num();
	u.rho_kgm3 = num();
	l.vp_ms = num();
	l.vs_ms = num();
	l.rho_kgm3 = num();
	th = num();
	st = rw_seis_ps_aki_richards(&u, &l, th, &lin);
	st2 = rw_reflect_zoeppritz(&u, &l, th, &c);
	ex[0] = st2 == RW_OK ? c.rps.re : NAN;
	ex[1] = st2 == RW_OK ? c.rps.im : NAN;
	head("ps", st);
	field("lin", &lin, 1);
	field("exact", ex, 2);
	puts("}");
}

int main(void)
{
	char cmd[64];

	gsl_set_error_handler_off();
	while (tok(cmd, sizeof cmd)) {
		if (strcmp(cmd, "conv") == 0)
			cmd_conv();
		else if (strcmp(cmd, "ricker") == 0 ||
		         strcmp(cmd, "ormsby") == 0 ||
		         strcmp(cmd, "bandpass") == 0)
			cmd_wavelet(cmd);
		else if (strcmp(cmd, "hilbert") == 0)
			cmd_hilbert(0);
		else if (strcmp(cmd, "rotate") == 0)
			cmd_hilbert(1);
		else if (strcmp(cmd, "stretch") == 0)
			cmd_stretch();
		else if (strcmp(cmd, "td") == 0)
			cmd_td();
		else if (strcmp(cmd, "resample") == 0)
			cmd_resample();
		else if (strcmp(cmd, "backus") == 0)
			cmd_backus();
		else if (strcmp(cmd, "backuslog") == 0)
			cmd_backuslog();
		else if (strcmp(cmd, "synth") == 0)
			cmd_synth();
		else if (strcmp(cmd, "avo") == 0)
			cmd_avo();
		else if (strcmp(cmd, "ps") == 0)
			cmd_ps();
		else {
			fprintf(stderr, "seismic_dump: unknown command %s\n",
			        cmd);
			return 1;
		}
		fflush(stdout);
	}
	return 0;
}
