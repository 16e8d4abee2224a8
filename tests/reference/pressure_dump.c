/* Prints the core's pressure, stress, trend and strength results as JSON
 * lines for the numpy / scipy cross-check
 * (tests/reference/test_pressure_numpy.py). Usage: pressure_dump MODE,
 * reading whitespace-separated numbers from stdin ("nan" and "inf" are
 * accepted, as strtod reads them). Modes and their input lines:
 *   obg     first line: the column (air_gap water_depth rho_sea g rho_ml
 *           rho_a trend_s0 trend_p rho_cap), then "z rho" per sample
 *   hydro   first line: the column, second "t_ml sal", then "z t sal"
 *   eaton   "sv ph dt dt_n n"
 *   bowers  "v0 a b u sigma_max unloading sv ph v"
 *   frac    "sv pp nu alpha e eps_h eps_H ki"
 *   trend   first line "form n", then n lines "s dt"
 *   emw     "p z g"
 *   ucs     "id dt vp rho e_dyn e_static phi"
 *   estat   the same as ucs, id a static-modulus id
 * Each answer is one line of JSON with "status", "warn" and the values,
 * null for non-finite numbers. Exit 1 on a malformed line, 2 on usage. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "rockwire/pressure.h"
#include "rockwire/strength.h"

#define MAXF 16

static void num(const char *name, double x, int last)
{
	printf("\"%s\":", name);
	if (isfinite(x))
		printf("%.17g", x);
	else
		fputs("null", stdout);
	fputs(last ? "}\n" : ",", stdout);
}

static void head(int status, unsigned warn)
{
	printf("{\"status\":%d,\"warn\":%u,", status, warn);
}

/* Reads one line of exactly want numbers (want 0: up to MAXF) into v;
 * returns the count, 0 at end of input, -1 on a malformed line. */
static int read_line(double *v, int want)
{
	char line[1024], *p, *end;
	int k = 0;

	for (;;) {
		if (!fgets(line, sizeof line, stdin))
			return 0;
		if (strspn(line, " \t\r\n") != strlen(line))
			break;
	}
	p = line;
	while (k < MAXF) {
		double x = strtod(p, &end);

		if (end == p)
			break;
		v[k++] = x;
		p = end;
	}
	if (strspn(p, " \t\r\n") != strlen(p))
		return -1;
	if (want && k != want)
		return -1;
	return k;
}

static int read_column(rw_pres_column *c)
{
	double v[MAXF];

	if (read_line(v, 9) != 9)
		return -1;
	c->air_gap_m = v[0];
	c->water_depth_m = v[1];
	c->rho_sea_kgm3 = v[2];
	c->g_ms2 = v[3];
	c->rho_ml_kgm3 = v[4];
	c->rho_a_kgm3 = v[5];
	c->trend_s0_m = v[6];
	c->trend_p = v[7];
	c->rho_cap_kgm3 = v[8];
	return 0;
}

static int mode_obg(void)
{
	rw_pres_column c;
	rw_pres_obg_state st;
	rw_pres_obg_out o;
	double v[MAXF];
	unsigned w;
	int k, s;

	if (read_column(&c) || rw_pres_obg_init(&c, &st) != RW_OK)
		return 1;
	while ((k = read_line(v, 2)) > 0) {
		s = rw_pres_obg_step(&c, &st, v[0], v[1], &o, &w);
		head(s, w);
		num("sv", o.sv_pa, 0);
		num("grad", o.grad_pam, 0);
		num("assumed", o.sv_assumed_pa, 1);
	}
	return k < 0;
}

static int mode_hydro(void)
{
	rw_pres_hydro_ws *ws = rw_pres_hydro_ws_new();
	rw_pres_column c;
	rw_pres_hydro_state st;
	double v[MAXF], p, rho;
	unsigned w;
	int k = -1, s;

	if (!ws)
		return 1;
	if (read_column(&c) || read_line(v, 2) != 2 ||
	    rw_pres_hydro_brine_init(&c, v[0], v[1], &st) != RW_OK)
		goto out;
	while ((k = read_line(v, 3)) > 0) {
		s = rw_pres_hydro_brine_step(ws, &c, &st, v[0], v[1], v[2], &p,
		                             &rho, &w);
		head(s, w);
		num("p", p, 0);
		num("rho", rho, 1);
	}
out:
	rw_pres_hydro_ws_free(ws);
	return k < 0;
}

static int mode_eaton(void)
{
	double v[MAXF], pp, sig;
	unsigned w;
	int k, s;

	while ((k = read_line(v, 5)) > 0) {
		s = rw_pres_pore_eaton(v[0], v[1], v[2], v[3], v[4], &pp, &sig,
		                       &w);
		head(s, w);
		num("pp", pp, 0);
		num("sigma", sig, 1);
	}
	return k < 0;
}

static int mode_bowers(void)
{
	rw_pres_bowers bw;
	double v[MAXF], pp, sig;
	unsigned w;
	int k, s;

	while ((k = read_line(v, 9)) > 0) {
		bw.v0_ms = v[0];
		bw.a_ms = v[1];
		bw.b = v[2];
		bw.u = v[3];
		bw.sigma_max_pa = v[4];
		s = rw_pres_pore_bowers(&bw, v[5] != 0.0, v[6], v[7], v[8], &pp,
		                        &sig, &w);
		head(s, w);
		num("pp", pp, 0);
		num("sigma", sig, 1);
	}
	return k < 0;
}

static int mode_frac(void)
{
	double v[MAXF], e, mk, lo, hi;
	unsigned we, wp;
	int k, se, sm, sp;

	while ((k = read_line(v, 8)) > 0) {
		se = rw_pres_frac_eaton(v[0], v[1], v[2], &e, &we);
		sm = rw_pres_frac_mk(v[0], v[1], v[7], &mk);
		sp = rw_pres_frac_poroelastic(v[0], v[1], v[2], v[3], v[4],
		                              v[5], v[6], &lo, &hi, &wp);
		printf("{\"status\":[%d,%d,%d],\"warn\":[%u,%u],", se, sm, sp,
		       we, wp);
		num("eaton", e, 0);
		num("mk", mk, 0);
		num("shmin", lo, 0);
		num("shmax", hi, 1);
	}
	return k < 0;
}

static int mode_trend(void)
{
	rw_pres_trend_ws *ws;
	rw_pres_trend t;
	double v[MAXF], *s = NULL, *dt = NULL;
	size_t n, i;
	int form, st, a, b, rc = 1;

	if (read_line(v, 2) != 2 || !(v[1] >= 4.0 && v[1] <= 1e6))
		return 1;
	form = (int)v[0];
	n = (size_t)v[1];
	ws = rw_pres_trend_ws_new(n);
	s = malloc(n * sizeof *s);
	dt = malloc(n * sizeof *dt);
	if (!ws || !s || !dt)
		goto out;
	for (i = 0; i < n; i++) {
		if (read_line(v, 2) != 2)
			goto out;
		s[i] = v[0];
		dt[i] = v[1];
	}
	st = rw_pres_trend_fit(ws, form, n, s, dt, NULL, &t);
	head(st, 0);
	num("dt_ma", t.dt_ma_sm, 0);
	num("dt_ml", t.dt_ml_sm, 0);
	num("c", t.c_per_m, 0);
	num("rms", t.rms_sm, 0);
	fputs("\"cov\":[", stdout);
	for (a = 0; a < 3; a++)
		for (b = 0; b < 3; b++) {
			if (isfinite(t.cov[a][b]))
				printf("%.17g", t.cov[a][b]);
			else
				fputs("null", stdout);
			fputs(a == 2 && b == 2 ? "]}\n" : ",", stdout);
		}
	rc = 0;
out:
	rw_pres_trend_ws_free(ws);
	free(s);
	free(dt);
	return rc;
}

static int mode_emw(void)
{
	double v[MAXF], rho, grad;
	int k, s;

	while ((k = read_line(v, 3)) > 0) {
		s = rw_pres_emw(v[0], v[1], v[2], &rho, &grad);
		head(s, 0);
		num("rho", rho, 0);
		num("grad", grad, 1);
	}
	return k < 0;
}

static int mode_strength(int estat)
{
	rw_strength_in in;
	double v[MAXF], x;
	unsigned w;
	int k, s;

	while ((k = read_line(v, 7)) > 0) {
		in.dt_sm = v[1];
		in.vp_ms = v[2];
		in.rho_kgm3 = v[3];
		in.e_dyn_pa = v[4];
		in.e_static_pa = v[5];
		in.phi = v[6];
		s = estat ? rw_strength_e_static((int)v[0], &in, &x, &w)
		          : rw_strength_ucs((int)v[0], &in, &x, &w);
		head(s, w);
		num("value", x, 1);
	}
	return k < 0;
}

int main(int argc, char **argv)
{
	gsl_set_error_handler_off();
	if (argc != 2) {
		fprintf(stderr, "usage: pressure_dump obg|hydro|eaton|bowers|"
		                "frac|trend|emw|ucs|estat < input\n");
		return 2;
	}
	if (!strcmp(argv[1], "obg"))
		return mode_obg();
	if (!strcmp(argv[1], "hydro"))
		return mode_hydro();
	if (!strcmp(argv[1], "eaton"))
		return mode_eaton();
	if (!strcmp(argv[1], "bowers"))
		return mode_bowers();
	if (!strcmp(argv[1], "frac"))
		return mode_frac();
	if (!strcmp(argv[1], "trend"))
		return mode_trend();
	if (!strcmp(argv[1], "emw"))
		return mode_emw();
	if (!strcmp(argv[1], "ucs"))
		return mode_strength(0);
	if (!strcmp(argv[1], "estat"))
		return mode_strength(1);
	fprintf(stderr, "pressure_dump: unknown mode %s\n", argv[1]);
	return 2;
}
