/* The rock family, Gassmann part: rock.substitute, Gassmann 1951 fluid
 * substitution of a measured rock (vp, vs, rho, porosity) from the fluid
 * in place to a new fluid, or the saturated rock from a dry frame (k_dry,
 * mu_dry, porosity), with the mineral as a table name, explicit moduli or
 * a mix, and the fluids as fluid.properties-style descriptions or explicit
 * k and rho; per sample with broadcasting (saturation sweeps) and QC
 * flags. The empirical rock relations live in rock_empirical.c. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "rockwire/elastic.h"
#include "rockwire/rock.h"
#include "rockwire/status.h"

#define NUMS(name, kind, fl)                                                   \
	{                                                                      \
		name, PT_NUMS, kind, (fl) | PP_NULLS, 0                        \
	}

static const proto_param substitute_params[] = {
    NUMS("vp", PK_VELOCITY, 0),
    NUMS("vs", PK_VELOCITY, 0),
    NUMS("rho", PK_DENSITY, 0),
    NUMS("k_dry", PK_MODULUS, 0),
    NUMS("mu_dry", PK_MODULUS, 0),
    NUMS("porosity", PK_NONE, PP_REQUIRED),
    {"mineral", PT_ANY, PK_NONE, PP_REQUIRED, 0},
    {"fluid_in_place", PT_OBJ, PK_NONE, 0, 0},
    {"fluid_new", PT_OBJ, PK_NONE, PP_REQUIRED, 0},
    NUMS("pressure", PK_PRESSURE, 0),
    NUMS("temperature", PK_TEMPERATURE, 0),
    {"qc", PT_OBJ, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* Per-sample result. */
typedef struct subst_sample {
	rw_rock_subst r;
	double k_fl, rho_fl, k_new, rho_new, k_min, rho_min;
	double pct[5]; /* vp, vs, rho, ai, vpvs */
} subst_sample;

/* Broadcast length of the request across its parts. */
typedef struct dim {
	size_t n;
	int arr;
	char from[160];
} dim;

static int dim_join(proto_call *c, dim *d, size_t n, int arr, const char *path)
{
	if (!arr)
		return 0;
	if (d->arr && n != d->n)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "array length %zu does not match length %zu "
		                  "of '%s'",
		                  n, d->n, d->from);
	if (!d->arr) {
		d->arr = 1;
		d->n = n;
		snprintf(d->from, sizeof d->from, "%s", path);
	}
	return 0;
}

static void subst_nan(rw_rock_subst *r, int keep_kdry)
{
	double kd = r->k_dry_pa;
	r->vp_ms = r->vs_ms = r->rho_kgm3 = NAN;
	r->k_sat_pa = r->mu_pa = r->k_dry_pa = NAN;
	if (keep_kdry)
		r->k_dry_pa = kd;
}

/* QC bits of the Gassmann warnings; *impossible set when the frame is. */
static uint32_t warn_qc(unsigned w, int *impossible)
{
	uint32_t f = 0;
	if (w & RW_ROCK_WARN_PHI_LOW)
		f |= QC_GASSMANN_PHI_LOW;
	if (w & (RW_ROCK_WARN_KDRY_NEG | RW_ROCK_WARN_KDRY_GT_KMIN)) {
		f |= QC_GASSMANN_KDRY;
		*impossible = 1;
	}
	return f;
}

static double pct(double new_v, double old_v)
{
	return 100.0 * (new_v - old_v) / old_v;
}

/* One sample from logs: vp, vs, rho measured with the fluid in place. */
static uint32_t from_logs(double vp, double vs, double rho, double phi,
                          subst_sample *s)
{
	unsigned w = 0;
	int st, bad = 0;
	uint32_t f;

	st = rw_rock_fluid_subst(vp, vs, rho, phi, s->k_min, s->k_fl, s->rho_fl,
	                         s->k_new, s->rho_new, &s->r, &w);
	f = warn_qc(w, &bad);
	if (st == RW_EDOM) {
		/* Say which input: the fluids and phi were checked before. */
		if (rho <= 0.0)
			f |= QC_RHO_NONPOSITIVE;
		else if (vp > 0.0 && vs >= 0.0)
			f |= QC_MODULUS_NEGATIVE | QC_NU_IMPOSSIBLE;
		else
			f |= QC_INPUT_INVALID;
	} else if (st != RW_OK && !bad) {
		f |= QC_MODULUS_NEGATIVE;
	}
	if (st != RW_OK || bad) {
		subst_nan(&s->r, st == RW_OK);
		if (st == RW_ERANGE && bad) {
			/* The frame failed in the second Gassmann step: still
			 * report the impossible K_dry it came from. */
			rw_elastic e;
			double kd;
			if (rw_elastic_from_velocities(vp, vs, rho, &e, NULL) ==
			        RW_OK &&
			    rw_rock_gassmann_dry(e.k, s->k_min, s->k_fl, phi,
			                         &kd, NULL) == RW_OK)
				s->r.k_dry_pa = kd;
		}
		return f;
	}
	s->pct[0] = pct(s->r.vp_ms, vp);
	s->pct[1] = pct(s->r.vs_ms, vs);
	s->pct[2] = pct(s->r.rho_kgm3, rho);
	s->pct[3] = pct(s->r.rho_kgm3 * s->r.vp_ms, rho * vp);
	/* vs = 0 gives no Vp/Vs: NaN, written null. */
	s->pct[4] = vs > 0.0 ? pct(s->r.vp_ms / s->r.vs_ms, vp / vs) : NAN;
	return f;
}

/* One sample from a dry frame. */
static uint32_t from_frame(double k_dry, double mu_dry, double phi,
                           subst_sample *s)
{
	unsigned w = 0;
	int st, bad = 0;
	uint32_t f;

	if (k_dry < 0.0) {
		subst_nan(&s->r, 0);
		s->r.k_dry_pa = k_dry;
		return QC_GASSMANN_KDRY;
	}
	if (mu_dry < 0.0) {
		subst_nan(&s->r, 0);
		return QC_MODULUS_NEGATIVE;
	}
	st = rw_rock_gassmann_frame(k_dry, mu_dry, phi, s->k_min, s->rho_min,
	                            s->k_new, s->rho_new, &s->r, &w);
	f = warn_qc(w, &bad);
	if (st == RW_EDOM)
		f |= QC_INPUT_INVALID;
	else if (st != RW_OK && !bad)
		f |= QC_MODULUS_NEGATIVE;
	if (st != RW_OK || bad) {
		subst_nan(&s->r, 0);
		s->r.k_dry_pa = k_dry;
	}
	return f;
}

/* Fails unless exactly the members of one mode are given. */
static int check_mode(proto_call *c, const proto_args *a, int *logs)
{
	static const char *const lm[] = {"vp", "vs", "rho"};
	static const char *const fm[] = {"k_dry", "mu_dry"};
	int nl = 0, nf = 0;

	for (int i = 0; i < 3; i++)
		nl += proto_vec_of(a, lm[i])->present;
	for (int i = 0; i < 2; i++)
		nf += proto_vec_of(a, fm[i])->present;
	if (nl && nf)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_vec_of(a, "k_dry")->present ? "k_dry"
		                                                    : "mu_dry",
		                  "give vp, vs and rho (a measured rock) or "
		                  "k_dry and mu_dry (a dry frame), not both");
	if (!nl && !nf)
		return proto_fail(c, PROTO_INVALID_PARAMS, "vp",
		                  "required: give vp, vs and rho (a measured "
		                  "rock) or k_dry and mu_dry (a dry frame)");
	*logs = nl > 0;
	for (int i = 0; nl && i < 3; i++)
		if (!proto_vec_of(a, lm[i])->present)
			return proto_fail(c, PROTO_INVALID_PARAMS, lm[i],
			                  "required with %s: a measured rock "
			                  "needs vp, vs and rho",
			                  nl == 1 ? "the other log"
			                          : "the "
			                            "others");
	for (int i = 0; nf && i < 2; i++)
		if (!proto_vec_of(a, fm[i])->present)
			return proto_fail(c, PROTO_INVALID_PARAMS, fm[i],
			                  "required: a dry frame needs k_dry "
			                  "and mu_dry");
	if (*logs && !proto_item_of(a, "fluid_in_place"))
		return proto_fail(c, PROTO_INVALID_PARAMS, "fluid_in_place",
		                  "required: the fluid in place when vp, vs "
		                  "and rho were measured");
	if (!*logs && proto_item_of(a, "fluid_in_place"))
		return proto_fail(c, PROTO_INVALID_PARAMS, "fluid_in_place",
		                  "a dry frame holds no fluid: give the "
		                  "saturating fluid as fluid_new");
	return 0;
}

static int substitute(proto_call *c)
{
	static const char *const ph[3] = {"brine", "gas", "oil"};
	static const char *const satkeys[3] = {
	    "fluid_new_sat_brine", "fluid_new_sat_gas", "fluid_new_sat_oil"};
	static const char *const pctkeys[5] = {"dvp_pct", "dvs_pct", "drho_pct",
	                                       "dai_pct", "dvpvs_pct"};
	const proto_args *a = &c->args;
	struct proto_fluid_desc *fo = NULL, *fn;
	struct proto_mineral_desc *md;
	const proto_vec *vp = proto_vec_of(a, "vp");
	const proto_vec *vs = proto_vec_of(a, "vs");
	const proto_vec *rho = proto_vec_of(a, "rho");
	const proto_vec *kd = proto_vec_of(a, "k_dry");
	const proto_vec *mud = proto_vec_of(a, "mu_dry");
	const proto_vec *phi = proto_vec_of(a, "porosity");
	const proto_vec *p = proto_vec_of(a, "pressure");
	const proto_vec *t = proto_vec_of(a, "temperature");
	size_t n, ln;
	subst_sample *s;
	uint32_t *qc;
	proto_qc_ranges ranges;
	const char *from;
	int logs = 0, arr, needs_pt;
	dim d = {1, 0, ""};

	if (check_mode(c, a, &logs))
		return -1;
	md = proto__mineral_desc_parse(c, proto_item_of(a, "mineral"),
	                               "mineral");
	if (!md)
		return -1;
	if (!logs && !proto__mineral_desc_has_rho(md))
		return proto_fail(c, PROTO_INVALID_PARAMS, "mineral.rho",
		                  "required for a dry frame: the rock density "
		                  "is (1 - phi) rho_min + phi rho_fluid");
	if (logs) {
		fo = proto__fluid_desc_parse(
		    c, proto_item_of(a, "fluid_in_place"), "fluid_in_place.");
		if (!fo)
			return -1;
	}
	fn = proto__fluid_desc_parse(c, proto_item_of(a, "fluid_new"),
	                             "fluid_new.");
	if (!fn)
		return -1;
	needs_pt = proto__fluid_desc_needs_pt(fn) ||
	           (fo && proto__fluid_desc_needs_pt(fo));
	for (int q = 0; q < 2; q++) {
		const char *name = q ? "temperature" : "pressure";
		int given = proto_vec_of(a, name)->present;
		if (needs_pt && !given)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "required: a fluid is described by "
			                  "phases, whose properties (Batzle & "
			                  "Wang 1992) depend on pore pressure "
			                  "and temperature");
		if (!needs_pt && given)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "not used: every fluid is given as "
			                  "explicit k and rho");
	}
	/* One sample dimension across params, fluids and the mineral. */
	for (size_t i = 0; i < a->count; i++)
		if (dim_join(c, &d, a->vec[i].n, a->vec[i].is_array,
		             a->spec[i].name))
			return -1;
	ln = proto__mineral_desc_len(md, &arr, &from);
	if (dim_join(c, &d, ln, arr, from))
		return -1;
	if (fo) {
		ln = proto__fluid_desc_len(fo, &arr, &from);
		if (dim_join(c, &d, ln, arr, from))
			return -1;
	}
	ln = proto__fluid_desc_len(fn, &arr, &from);
	if (dim_join(c, &d, ln, arr, from))
		return -1;
	n = d.n;
	arr = d.arr;
	if (proto_check_size(c, n, n))
		return -1;
	s = proto_alloc(c, n * sizeof *s);
	qc = proto_alloc(c, n * sizeof *qc);
	if (!s || !qc)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	proto_qc_ranges_default(&ranges);
	if (proto_qc_ranges_parse(c, proto_item_of(a, "qc"), "qc.", &ranges))
		return -1;
	for (size_t i = 0; i < n; i++) {
		double pi = needs_pt ? proto_at(p, i) : NAN;
		double ti = needs_pt ? proto_at(t, i) : NAN;
		double f = proto_at(phi, i);
		uint32_t q1 = 0, q2 = 0;
		subst_sample *x = &s[i];

		for (size_t k = 0; k < 5; k++)
			x->pct[k] = NAN;
		x->k_fl = x->rho_fl = NAN;
		if (fo)
			proto__fluid_desc_eval(fo, i, pi, ti, &x->k_fl,
			                       &x->rho_fl, &q1);
		proto__fluid_desc_eval(fn, i, pi, ti, &x->k_new, &x->rho_new,
		                       &q2);
		qc[i] = q1 | q2;
		if (proto__mineral_desc_eval(md, i, &x->k_min, &x->rho_min) !=
		    RW_OK)
			qc[i] |= QC_INPUT_INVALID;
		if (!(f > 0.0 && f < 1.0) || (fo && !isfinite(x->k_fl)) ||
		    !isfinite(x->k_new) || !isfinite(x->k_min)) {
			/* porosity outside (0, 1) or null, or a fluid that
			 * could not be computed (its flags say why). */
			if (!(f > 0.0 && f < 1.0))
				qc[i] |= QC_INPUT_INVALID;
			x->r.k_dry_pa = NAN;
			subst_nan(&x->r, 0);
			continue;
		}
		if (logs)
			qc[i] |= from_logs(proto_at(vp, i), proto_at(vs, i),
			                   proto_at(rho, i), f, x);
		else
			qc[i] |=
			    from_frame(proto_at(kd, i), proto_at(mud, i), f, x);
		/* The substituted rock gets the same plausibility checks as
		 * any elastic sample (elastic.convert's ranges, `qc`). */
		rw_elastic e;
		if (isfinite(x->r.vp_ms) &&
		    rw_elastic_from_velocities(x->r.vp_ms, x->r.vs_ms,
		                               x->r.rho_kgm3, &e,
		                               NULL) == RW_OK)
			qc[i] |= proto_qc_plausible(&ranges, &e);
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "mode", logs ? "logs" : "frame");
#define W(key, kind, member)                                                   \
	PROTO_W_MEMBER(c, key, kind, s, subst_sample, member, n, arr)
	W("vp", PK_VELOCITY, r.vp_ms);
	W("vs", PK_VELOCITY, r.vs_ms);
	W("rho", PK_DENSITY, r.rho_kgm3);
	W("k_sat", PK_MODULUS, r.k_sat_pa);
	W("mu", PK_MODULUS, r.mu_pa);
	W("k_dry", PK_MODULUS, r.k_dry_pa);
	if (logs) {
		W("fluid_in_place_k", PK_MODULUS, k_fl);
		W("fluid_in_place_rho", PK_DENSITY, rho_fl);
	}
	W("fluid_new_k", PK_MODULUS, k_new);
	W("fluid_new_rho", PK_DENSITY, rho_new);
	W("mineral_k", PK_MODULUS, k_min);
	W("mineral_rho", PK_DENSITY, rho_min);
#undef W
	for (int k = 0; k < 3; k++) {
		size_t sn;
		int sa;
		const double *sv = proto__fluid_desc_sat(fn, ph[k], &sn, &sa);
		if (sv)
			proto_w_vec(c, satkeys[k], PK_NONE, sv, n,
			            sn == 1 ? 0 : 1, arr);
	}
	for (int k = 0; logs && k < 5; k++)
		proto_w_rows(c, pctkeys[k], PK_NONE, s, sizeof *s,
		             offsetof(subst_sample, pct) + k * sizeof s->pct[0],
		             n, arr);
	proto_w_flags(c, "qc", qc, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_rock_methods[] = {
    {"rock.substitute", substitute, substitute_params,
     "Gassmann 1951 fluid substitution from logs or a dry frame."},
    {NULL, NULL, NULL, NULL},
};
