/* Prints the core's rock-model results as JSON lines for the scipy
 * cross-check (tests/reference/test_rockmodel_scipy.py). Reads one
 * command per line from stdin, "NAME ARG...", numbers separated by
 * blanks, and answers each with
 *   {"fn":"NAME","status":s,"warn":w,"out":[...]}
 * (null for non-finite numbers). Commands and their outputs:
 *   hm K MU PHI C P SLIP            -> k mu         (rw_rm_hertz_mindlin)
 *   walton K MU PHI C P ROUGH       -> k mu
 *   soft|stiff K MU PHI PHIC C P SLIP -> k mu
 *   cc K MU KC MUC PHI PHIC C SCHEME -> k mu
 *   constc K MU KC MUC PHI PHIB PHIC C SCHEME -> k mu
 *   crit K MU PHI PHIC              -> k mu
 *   krief K MU PHI                  -> k mu
 *   pq SHAPE ASPECT KBG MUBG KI MUI -> p q
 *   kt KH MUH N (K MU FRAC ASPECT SHAPE)xN  -> k mu
 *   sca TOL N (K MU FRAC ASPECT SHAPE)xN    -> k mu
 *   dem KH MUH TOL N (K MU FRAC ASPECT SHAPE)xN -> k mu
 *   xw K MU PHI VCLAY ASAND ACLAY TOL       -> k mu
 *   sat KD MUD PHI KMIN RHOMIN KFL RHOFL    -> k_sat rho vp vs ai si vpvs
 *                                              nu lambda_rho mu_rho
 *   pfit N WEIGHTED (P M S)xN       -> m_inf m_0 p_c cov(9) chi2 rms
 *   eval SPEC(25) PHI SW CLAY P     -> as sat, after k_dry mu_dry
 *   inv SPEC(25) NOBS A0 A1 A2 LO0 LO1 LO2 HI0 HI1 HI2 CLAY P NSTART
 *       NPROF WMAX NPAR O0 O1 O2 S0 S1 S2
 *                                   -> phi sw clay sd0 sd1 sd2 chi2 sw_lo
 *                                      sw_hi flags
 * SPEC(25) is the rw_rm_spec members in declaration order (integers as
 * numbers). Exit status 1 on a malformed line. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "rockwire/rockmodel.h"

#define MAXA 256

static void num(double x)
{
	if (isfinite(x))
		printf("%.17g", x);
	else
		fputs("null", stdout);
}

static void emit(const char *fn, int st, unsigned warn, const double *o,
                 size_t n)
{
	size_t i;

	printf("{\"fn\":\"%s\",\"status\":%d,\"warn\":%u,\"out\":[", fn, st,
	       warn);
	for (i = 0; i < n; i++) {
		if (i)
			putchar(',');
		num(o[i]);
	}
	fputs("]}\n", stdout);
}

static size_t read_incl(const double *a, size_t at, size_t na, size_t n,
                        rw_rm_incl *c)
{
	size_t i;

	if (n > 16 || at + 5 * n > na)
		return 0;
	for (i = 0; i < n; i++) {
		c[i].k_pa = a[at + 5 * i];
		c[i].mu_pa = a[at + 5 * i + 1];
		c[i].frac = a[at + 5 * i + 2];
		c[i].aspect = a[at + 5 * i + 3];
		c[i].shape = (int)a[at + 5 * i + 4];
	}
	return 1;
}

static void read_spec(const double *a, rw_rm_spec *s)
{
	s->model = (int)a[0];
	s->k_min_pa = a[1];
	s->mu_min_pa = a[2];
	s->rho_min_kgm3 = a[3];
	s->k_clay_pa = a[4];
	s->mu_clay_pa = a[5];
	s->rho_clay_kgm3 = a[6];
	s->clay_mix = (int)a[7];
	s->phi_c = a[8];
	s->coord = a[9];
	s->slip = a[10];
	s->k_cem_pa = a[11];
	s->mu_cem_pa = a[12];
	s->cement_scheme = (int)a[13];
	s->phi_b = a[14];
	s->pore_shape = (int)a[15];
	s->aspect = a[16];
	s->aspect_clay = a[17];
	s->tol = a[18];
	s->k_brine_pa = a[19];
	s->rho_brine_kgm3 = a[20];
	s->k_hc_pa = a[21];
	s->rho_hc_kgm3 = a[22];
	s->fluid_mix = (int)a[23];
	s->brie_e = a[24];
}
#define SPEC_N 25

static void sat_out(const rw_rm_sat *s, double *o)
{
	o[0] = s->k_sat_pa;
	o[1] = s->rho_kgm3;
	o[2] = s->vp_ms;
	o[3] = s->vs_ms;
	o[4] = s->ai;
	o[5] = s->si;
	o[6] = s->vpvs;
	o[7] = s->nu;
	o[8] = s->lambda_rho;
	o[9] = s->mu_rho;
}

/* Runs one command; returns 0 on a malformed line. */
static int run(const char *fn, const double *a, size_t na, rw_rm_ws *ws,
               rw_rm_ws **inv_ws, size_t inv_sizes[2])
{
	double o[32];
	unsigned w = 0;
	int st;
	rw_rm_incl c[16];

#define NEED(k)                                                                \
	do {                                                                   \
		if (na != (k))                                                 \
			return 0;                                              \
	} while (0)
	if (strcmp(fn, "hm") == 0) {
		NEED(6);
		st = rw_rm_hertz_mindlin(a[0], a[1], a[2], a[3], a[4], a[5],
		                         &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "walton") == 0) {
		NEED(6);
		st = rw_rm_walton(a[0], a[1], a[2], a[3], a[4], (int)a[5],
		                  &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "soft") == 0 || strcmp(fn, "stiff") == 0) {
		NEED(7);
		st = (fn[1] == 'o' ? rw_rm_soft_sand : rw_rm_stiff_sand)(
		    a[0], a[1], a[2], a[3], a[4], a[5], a[6], &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "cc") == 0) {
		NEED(8);
		st = rw_rm_contact_cement(a[0], a[1], a[2], a[3], a[4], a[5],
		                          a[6], (int)a[7], &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "constc") == 0) {
		NEED(9);
		st = rw_rm_constant_cement(a[0], a[1], a[2], a[3], a[4], a[5],
		                           a[6], a[7], (int)a[8], &o[0], &o[1],
		                           &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "crit") == 0) {
		NEED(4);
		st = rw_rm_critical_porosity(a[0], a[1], a[2], a[3], &o[0],
		                             &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "krief") == 0) {
		NEED(3);
		st = rw_rm_krief(a[0], a[1], a[2], &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "pq") == 0) {
		NEED(6);
		st = rw_rm_incl_pq((int)a[0], a[1], a[2], a[3], a[4], a[5],
		                   &o[0], &o[1]);
		emit(fn, st, 0, o, 2);
	} else if (strcmp(fn, "kt") == 0) {
		if (na < 3 || !read_incl(a, 3, na, (size_t)a[2], c) ||
		    na != 3 + 5 * (size_t)a[2])
			return 0;
		st = rw_rm_kuster_toksoz(a[0], a[1], (size_t)a[2], c, &o[0],
		                         &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "sca") == 0) {
		if (na < 2 || !read_incl(a, 2, na, (size_t)a[1], c) ||
		    na != 2 + 5 * (size_t)a[1])
			return 0;
		st = rw_rm_self_consistent((size_t)a[1], c, a[0], &o[0], &o[1],
		                           &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "dem") == 0) {
		if (na < 4 || !read_incl(a, 4, na, (size_t)a[3], c) ||
		    na != 4 + 5 * (size_t)a[3])
			return 0;
		st = rw_rm_dem(a[0], a[1], (size_t)a[3], c, a[2], ws, &o[0],
		               &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "xw") == 0) {
		NEED(7);
		st = rw_rm_xu_white(a[0], a[1], a[2], a[3], a[4], a[5], a[6],
		                    ws, &o[0], &o[1], &w);
		emit(fn, st, w, o, 2);
	} else if (strcmp(fn, "sat") == 0) {
		rw_rm_sat s;

		NEED(7);
		st = rw_rm_saturate(a[0], a[1], a[2], a[3], a[4], a[5], a[6],
		                    &s, &w);
		sat_out(&s, o);
		emit(fn, st, w, o, 10);
	} else if (strcmp(fn, "pfit") == 0) {
		double p[64], m[64], s[64];
		rw_rm_pfit f;
		size_t n, i;

		if (na < 2)
			return 0;
		n = (size_t)a[0];
		if (n > 64 || na != 2 + 3 * n)
			return 0;
		for (i = 0; i < n; i++) {
			p[i] = a[2 + 3 * i];
			m[i] = a[3 + 3 * i];
			s[i] = a[4 + 3 * i];
		}
		st = rw_rm_plaw_fit(n, p, m, a[1] != 0.0 ? s : NULL, &f, &w);
		o[0] = f.law.m_inf_pa;
		o[1] = f.law.m_0_pa;
		o[2] = f.law.p_c_pa;
		for (i = 0; i < 9; i++)
			o[3 + i] = f.cov[i / 3][i % 3];
		o[12] = f.chi2;
		o[13] = f.rms_pa;
		emit(fn, st, w, o, 14);
	} else if (strcmp(fn, "eval") == 0) {
		rw_rm_spec sp;
		rw_rm_sat s;

		NEED(SPEC_N + 4);
		read_spec(a, &sp);
		st = rw_rm_eval(&sp, a[SPEC_N], a[SPEC_N + 1], a[SPEC_N + 2],
		                a[SPEC_N + 3], ws, &s, &w);
		o[0] = s.k_dry_pa;
		o[1] = s.mu_dry_pa;
		sat_out(&s, o + 2);
		emit(fn, st, w, o, 12);
	} else if (strcmp(fn, "inv") == 0) {
		rw_rm_spec sp;
		rw_rm_inv_cfg cfg;
		rw_rm_inv_result r;
		const double *b = a + SPEC_N;
		size_t i;

		NEED(SPEC_N + 22);
		read_spec(a, &sp);
		cfg.spec = &sp;
		cfg.n_obs = (size_t)b[0];
		for (i = 0; i < 3; i++) {
			cfg.attr[i] = (int)b[1 + i];
			cfg.lo[i] = b[4 + i];
			cfg.hi[i] = b[7 + i];
		}
		cfg.clay = b[10];
		cfg.p_eff_pa = b[11];
		cfg.n_starts = (unsigned)b[12];
		cfg.n_profile = (unsigned)b[13];
		cfg.sw_width_max = b[14];
		cfg.n_par = (size_t)b[15];
		cfg.max_iter = 100;
		if (cfg.n_obs < 1 || cfg.n_obs > 3 || cfg.n_par < 1 ||
		    cfg.n_par > cfg.n_obs)
			return 0;
		/* one inversion workspace, remade when the sizes change */
		if (*inv_ws == NULL || inv_sizes[0] != cfg.n_obs ||
		    inv_sizes[1] != cfg.n_par) {
			rw_rm_ws_free(*inv_ws);
			*inv_ws = rw_rm_ws_new(cfg.n_obs, cfg.n_par);
			inv_sizes[0] = cfg.n_obs;
			inv_sizes[1] = cfg.n_par;
			if (*inv_ws == NULL)
				return 0;
		}
		st = rw_rm_invert(&cfg, b + 16, b + 19, *inv_ws, &r);
		for (i = 0; i < 3; i++) {
			o[i] = r.x[i];
			o[3 + i] = r.sd[i];
		}
		o[6] = r.chi2;
		o[7] = r.sw_lo;
		o[8] = r.sw_hi;
		o[9] = (double)r.flags;
		emit(fn, st, r.model_warn, o, 10);
	} else {
		return 0;
	}
	return 1;
#undef NEED
}

int main(void)
{
	char line[8192];
	long lineno = 0;
	rw_rm_ws *ws, *inv_ws = NULL;
	size_t inv_sizes[2] = {0, 0};
	int rc = 0;

	gsl_set_error_handler_off();
	ws = rw_rm_ws_new(0, 0);
	if (ws == NULL) {
		fprintf(stderr, "rockmodel_dump: out of memory\n");
		return 1;
	}
	while (fgets(line, sizeof(line), stdin) != NULL) {
		char fn[16], *p = line, *end;
		double a[MAXA];
		size_t na = 0;
		int k = 0;

		lineno++;
		p += strspn(p, " \t");
		if (*p == '\n' || *p == '\0' || *p == '#')
			continue;
		while (*p && !strchr(" \t\r\n", *p) && k < 15)
			fn[k++] = *p++;
		fn[k] = '\0';
		for (;;) {
			p += strspn(p, " \t\r\n");
			if (*p == '\0')
				break;
			if (na == MAXA) {
				rc = 1;
				break;
			}
			a[na] = strtod(p, &end);
			if (end == p) {
				rc = 1;
				break;
			}
			na++;
			p = end;
		}
		if (rc || !run(fn, a, na, ws, &inv_ws, inv_sizes)) {
			fprintf(stderr, "line %ld: malformed command\n",
			        lineno);
			rc = 1;
			break;
		}
	}
	rw_rm_ws_free(ws);
	rw_rm_ws_free(inv_ws);
	return rc;
}
