/* The fluid family: fluid.properties, the Batzle & Wang 1992 properties of
 * brine, hydrocarbon gas and dead or live oil at reservoir pressure and
 * temperature, and their mixture by saturation (Wood 1955, Brie et al.
 * 1995, Voigt), per sample with broadcasting and QC flags. Also the fluid
 * description shared with rock.substitute (proto__fluid_desc_*): the same
 * object shape, or an explicit {k, rho}, parsed and checked once per
 * request and evaluated per sample without allocation. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "rockwire/fluid.h"
#include "rockwire/status.h"

enum { PH_BRINE = 0, PH_GAS = 1, PH_OIL = 2, N_PH = 3 };
enum { MIX_WOOD = 0, MIX_BRIE = 1, MIX_VOIGT = 2 };

static const char *const phase_names[N_PH] = {"brine", "gas", "oil"};
static const char *const mix_names[] = {"wood", "brie", "voigt", NULL};

/* Default Brie exponent: 3, the value Brie et al. 1995 report as typical
 * for gas and brine in sands (from memory). */
#define BRIE_EXPONENT_DEFAULT 3.0

#define NUMS(name, kind, fl)                                                   \
	{                                                                      \
		name, PT_NUMS, kind, fl, 0                                     \
	}
#define DESC_MEMBERS                                                           \
	{"brine", PT_OBJ, PK_NONE, 0, 0}, {"gas", PT_OBJ, PK_NONE, 0, 0},      \
	    {"oil", PT_OBJ, PK_NONE, 0, 0},                                    \
	    {"saturation", PT_OBJ, PK_NONE, 0, 0},                             \
	    {"mix", PT_STR, PK_NONE, 0, 0},                                    \
	{                                                                      \
		"brie_exponent", PT_NUM, PK_NONE, 0, 0                         \
	}

static const proto_param properties_params[] = {
    NUMS("pressure", PK_PRESSURE, PP_REQUIRED | PP_NULLS),
    NUMS("temperature", PK_TEMPERATURE, PP_REQUIRED | PP_NULLS),
    DESC_MEMBERS,
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* A fluid description inside rock.substitute: the same members, or an
 * explicit k and rho. */
static const proto_param desc_params[] = {
    DESC_MEMBERS,
    NUMS("k", PK_MODULUS, 0),
    NUMS("rho", PK_DENSITY, 0),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param brine_params[] = {
    NUMS("salinity", PK_SALINITY, PP_REQUIRED),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};
static const proto_param gas_params[] = {
    NUMS("gravity", PK_NONE, PP_REQUIRED),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};
static const proto_param oil_params[] = {
    NUMS("api", PK_NONE, PP_REQUIRED),
    NUMS("gor", PK_GOR, 0),
    NUMS("gas_gravity", PK_NONE, 0),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};
static const proto_param sat_params[] = {
    NUMS("brine", PK_NONE, 0),
    NUMS("gas", PK_NONE, 0),
    NUMS("oil", PK_NONE, 0),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* A parsed fluid description (arena memory of the call). */
struct proto_fluid_desc {
	int explicit_kr;  /* k and rho given */
	proto_vec k, rho; /* explicit */
	int has[N_PH];    /* phase described */
	proto_vec sal, grav, api, gor, ggas;
	int live;            /* oil.gor given */
	proto_vec sat[N_PH]; /* saturations (n 0 = phase absent) */
	double one;          /* backing store of an implied 1 */
	int mix;
	double brie_e;
	size_t n; /* broadcast length (1 when all scalar) */
	int any_array;
	char len_from[160]; /* path of the array that set n */
};

/* Per-sample result of a description. */
typedef struct fluid_sample {
	rw_fluid_phase ph[N_PH];
	double z, b0;
	rw_fluid_phase mix;
	uint32_t qc;
} fluid_sample;

/* Joins vector v (path `path`) into the broadcast length of d. */
static int join_len(proto_call *c, struct proto_fluid_desc *d,
                    const proto_vec *v, const char *path)
{
	return proto_join_len(c, v, path, &d->n, &d->any_array, d->len_from,
	                      sizeof d->len_from);
}

/* Parses a nested object with spec and copies member `name` (if any) to
 * *out, joining its length. */
static int sub_vec(proto_call *c, struct proto_fluid_desc *d,
                   const proto_args *a, const char *name, proto_vec *out)
{
	char full[160];

	*out = *proto_vec_of(a, name);
	snprintf(full, sizeof full, "%s%s", a->path, name);
	return join_len(c, d, out, full);
}

/* Makes a path string in the call's arena: prefix + name + ".". */
static const char *arena_path(proto_call *c, const char *prefix,
                              const char *name)
{
	size_t n = strlen(prefix) + strlen(name) + 2;
	char *s = proto_alloc(c, n);
	if (s)
		snprintf(s, n, "%s%s.", prefix, name);
	return s;
}

/* Checks the saturations of every sample: each in [0, 1], the sum 1
 * within 1e-6 (the tolerance of the core's mixing functions). */
static int check_saturations(proto_call *c, struct proto_fluid_desc *d,
                             const char *path)
{
	char full[160];

	for (int p = 0; p < N_PH; p++) {
		const proto_vec *s = &d->sat[p];
		for (size_t i = 0; s->n && i < s->n; i++) {
			double v = s->v[i];
			if (v >= 0.0 && v <= 1.0)
				continue;
			snprintf(full, sizeof full, "%ssaturation.%s", path,
			         phase_names[p]);
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "%s%zu: saturation %.9g is outside "
			                  "[0, 1]",
			                  s->is_array ? "element " : "value ",
			                  i, v);
		}
	}
	for (size_t i = 0; i < d->n; i++) {
		double sum = 0.0;
		for (int p = 0; p < N_PH; p++)
			if (d->has[p])
				sum += proto_at(&d->sat[p], i);
		if (fabs(sum - 1.0) > 1e-6) {
			snprintf(full, sizeof full, "%ssaturation", path);
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "saturations sum to %.9g at sample "
			                  "%zu, not 1 (tolerance 1e-6)",
			                  sum, i);
		}
	}
	return 0;
}

/* Parses the phase members, saturations and mixing rule of `a` (params
 * or a nested description whose path is a->path). */
static int parse_phases(proto_call *c, const proto_args *a,
                        struct proto_fluid_desc *d)
{
	static const proto_param *const specs[N_PH] = {brine_params, gas_params,
	                                               oil_params};
	const char *path = a->path;
	char full[160];
	proto_args sub;
	int nph = 0;

	for (int p = 0; p < N_PH; p++) {
		const cJSON *o = proto_item_of(a, phase_names[p]);
		const char *pp;
		if (!o)
			continue;
		pp = arena_path(c, path, phase_names[p]);
		if (!pp)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		if (proto_args_parse(c, o, pp, specs[p], &sub))
			return -1;
		d->has[p] = 1;
		nph++;
		if (p == PH_BRINE && sub_vec(c, d, &sub, "salinity", &d->sal))
			return -1;
		if (p == PH_GAS && sub_vec(c, d, &sub, "gravity", &d->grav))
			return -1;
		if (p == PH_OIL) {
			if (sub_vec(c, d, &sub, "api", &d->api) ||
			    sub_vec(c, d, &sub, "gor", &d->gor) ||
			    sub_vec(c, d, &sub, "gas_gravity", &d->ggas))
				return -1;
			d->live = d->gor.present;
			snprintf(full, sizeof full, "%sgas_gravity", pp);
			if (d->gor.present && !d->ggas.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "required with gor: the gravity of the "
				    "dissolved gas (Batzle & Wang 1992 eqs. "
				    "21-24)");
			if (!d->gor.present && d->ggas.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "only used for live oil: give gor as well, "
				    "or drop gas_gravity for a dead oil");
		}
	}
	if (!nph)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  *path ? path : "brine",
		                  "describe at least one phase: brine, gas or "
		                  "oil");
	const cJSON *so = proto_item_of(a, "saturation");
	if (so) {
		const char *sp = arena_path(c, path, "saturation");
		if (!sp)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		if (proto_args_parse(c, so, sp, sat_params, &sub))
			return -1;
		for (int p = 0; p < N_PH; p++) {
			const proto_vec *s = proto_vec_of(&sub, phase_names[p]);
			snprintf(full, sizeof full, "%s%s", sp, phase_names[p]);
			if (s->present && !d->has[p])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "no %s phase is described: describe it "
				    "(%s%s) or drop its saturation",
				    phase_names[p], path, phase_names[p]);
			if (!s->present && d->has[p])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "required: the %s phase is described",
				    phase_names[p]);
			if (sub_vec(c, d, &sub, phase_names[p], &d->sat[p]))
				return -1;
		}
	} else if (nph > 1) {
		snprintf(full, sizeof full, "%ssaturation", path);
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "required when more than one phase is "
		                  "described");
	} else {
		d->one = 1.0;
		for (int p = 0; p < N_PH; p++)
			if (d->has[p]) {
				d->sat[p].v = &d->one;
				d->sat[p].n = 1;
				d->sat[p].present = 1;
			}
	}
	d->mix = proto_enum_of(c, a, "mix", mix_names, MIX_WOOD);
	if (d->mix < 0)
		return -1;
	snprintf(full, sizeof full, "%sbrie_exponent", path);
	/* An exponent inherited from the session is let pass for the other
	 * mixes; one given in the request is an error there. */
	if (proto_vec_of(a, "brie_exponent")->present && d->mix != MIX_BRIE &&
	    !(!*path && proto_arg_inherited(c, "brie_exponent")))
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "only used with mix \"brie\"");
	d->brie_e = proto_num_or(a, "brie_exponent", BRIE_EXPONENT_DEFAULT);
	if (!(d->brie_e >= 1.0))
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "%.9g is below 1: the Brie et al. 1995 mix "
		                  "would exceed the Voigt bound",
		                  d->brie_e);
	if (d->mix == MIX_BRIE && !d->has[PH_BRINE]) {
		snprintf(full, sizeof full, "%smix", path);
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "brie needs a brine phase (the water of "
		                  "S_w^e, Brie et al. 1995)");
	}
	return check_saturations(c, d, path);
}

static struct proto_fluid_desc *desc_new(proto_call *c)
{
	struct proto_fluid_desc *d = proto_alloc(c, sizeof *d);
	if (!d) {
		proto_fail(c, PROTO_INTERNAL_ERROR, NULL, "out of memory");
		return NULL;
	}
	memset(d, 0, sizeof *d);
	d->n = 1;
	return d;
}

/* Maps core fluid warnings to QC bits. */
static uint32_t warn_qc(unsigned w)
{
	uint32_t f = 0;
	if (w & (RW_FLUID_WARN_T_RANGE | RW_FLUID_WARN_P_RANGE |
	         RW_FLUID_WARN_SAL_RANGE | RW_FLUID_WARN_G_RANGE |
	         RW_FLUID_WARN_API_RANGE | RW_FLUID_WARN_PR_RANGE))
		f |= QC_FLUID_CALIBRATION;
	if (w & RW_FLUID_WARN_GOR_MAX)
		f |= QC_FLUID_GOR_EXCESS;
	if (w & RW_FLUID_WARN_VAPOUR)
		f |= QC_FLUID_BOILING;
	return f;
}

static uint32_t status_qc(int st)
{
	if (st == RW_OK)
		return 0;
	return st == RW_EDOM ? QC_INPUT_INVALID : QC_FLUID_FAILED;
}

static void phase_nan(rw_fluid_phase *p)
{
	p->rho_kgm3 = p->k_pa = p->v_ms = NAN;
}

/* Evaluates sample i of a phase description at p (MPa), t (degC). */
static void eval_sample(const struct proto_fluid_desc *d, size_t i, double p,
                        double t, fluid_sample *s)
{
	rw_fluid_phase ph[N_PH];
	double sat[N_PH];
	size_t n = 0, iw = N_PH;
	int ok = 1, st;
	unsigned w;

	s->qc = 0;
	s->z = s->b0 = NAN;
	phase_nan(&s->mix);
	for (int k = 0; k < N_PH; k++)
		phase_nan(&s->ph[k]);
	if (!isfinite(p) || !isfinite(t)) {
		s->qc = QC_INPUT_INVALID;
		return;
	}
	if (d->has[PH_BRINE]) {
		w = 0;
		st = rw_fluid_brine_props(p, t, proto_at(&d->sal, i),
		                          &s->ph[PH_BRINE], &w);
		s->qc |= warn_qc(w) | status_qc(st);
	}
	if (d->has[PH_GAS]) {
		w = 0;
		st = rw_fluid_gas_props(p, t, proto_at(&d->grav, i),
		                        &s->ph[PH_GAS], &s->z, &w);
		s->qc |= warn_qc(w) | status_qc(st);
	}
	if (d->has[PH_OIL]) {
		w = 0;
		if (d->live)
			st = rw_fluid_liveoil_props(
			    p, t, proto_at(&d->api, i), proto_at(&d->gor, i),
			    proto_at(&d->ggas, i), &s->ph[PH_OIL], &s->b0, &w);
		else
			st = rw_fluid_deadoil_props(p, t, proto_at(&d->api, i),
			                            &s->ph[PH_OIL], &w);
		s->qc |= warn_qc(w) | status_qc(st);
	}
	/* Mix the phases present in the sample; a phase at zero saturation
	 * is reported but takes no part (so its failure does not void the
	 * mix). */
	for (int k = 0; k < N_PH; k++) {
		double sk;
		if (!d->has[k])
			continue;
		sk = proto_at(&d->sat[k], i);
		if (sk <= 0.0)
			continue;
		if (!isfinite(s->ph[k].k_pa))
			ok = 0;
		if (k == PH_BRINE)
			iw = n;
		ph[n] = s->ph[k];
		sat[n++] = sk;
	}
	if (!ok)
		return;
	if (d->mix == MIX_VOIGT)
		st = rw_fluid_mix_voigt(n, ph, sat, &s->mix);
	else if (d->mix == MIX_BRIE && iw < n)
		st = rw_fluid_mix_brie(n, ph, sat, iw, d->brie_e, &s->mix);
	else /* wood, or brie at S_w = 0 where it equals the Wood mix */
		st = rw_fluid_mix_wood(n, ph, sat, &s->mix);
	if (st != RW_OK)
		s->qc |= QC_FLUID_FAILED;
}

/* ---- the description shared with rock.substitute ---------------------- */

/* Parses a fluid description object at `path` ("fluid."): either
 * {k, rho} (explicit, both required, k > 0 and rho > 0) or phases with
 * saturations and a mixing rule. NULL after proto_fail. */
struct proto_fluid_desc *
proto__fluid_desc_parse(proto_call *c, const cJSON *obj, const char *path)
{
	struct proto_fluid_desc *d = desc_new(c);
	proto_args a;
	char full[160];

	if (!d || proto_args_parse(c, obj, path, desc_params, &a))
		return NULL;
	d->k = *proto_vec_of(&a, "k");
	d->rho = *proto_vec_of(&a, "rho");
	if (d->k.present || d->rho.present) {
		const char *bad = NULL;
		for (const proto_param *p = desc_params; p->name; p++)
			if (p->type != PT_NUMS && proto_item_of(&a, p->name))
				bad = p->name;
		if (bad) {
			snprintf(full, sizeof full, "%s%s", path, bad);
			proto_fail(c, PROTO_INVALID_PARAMS, full,
			           "give either k and rho, or a description "
			           "by phases, not both");
			return NULL;
		}
		for (int m = 0; m < 2; m++) {
			const proto_vec *v = m ? &d->rho : &d->k;
			snprintf(full, sizeof full, "%s%s", path,
			         m ? "rho" : "k");
			if (!v->present) {
				proto_fail(c, PROTO_INVALID_PARAMS, full,
				           "required with %s", m ? "k" : "rho");
				return NULL;
			}
			for (size_t i = 0; i < v->n; i++)
				if (!(v->v[i] > 0.0)) {
					proto_fail(
					    c, PROTO_INVALID_PARAMS, full,
					    "element %zu: must be > 0", i);
					return NULL;
				}
			if (join_len(c, d, v, full))
				return NULL;
		}
		d->explicit_kr = 1;
		return d;
	}
	if (parse_phases(c, &a, d))
		return NULL;
	return d;
}

size_t proto__fluid_desc_len(const struct proto_fluid_desc *d, int *is_array,
                             const char **len_from)
{
	*is_array = d->any_array;
	*len_from = d->len_from;
	return d->n;
}

int proto__fluid_desc_needs_pt(const struct proto_fluid_desc *d)
{
	return !d->explicit_kr;
}

/* Bulk modulus (Pa), density (kg/m^3) and QC bits of sample i of the
 * mixture at p_mpa, t_degc (ignored for an explicit fluid). NaN outputs
 * when the fluid cannot be computed (*qc says why). */
void proto__fluid_desc_eval(const struct proto_fluid_desc *d, size_t i,
                            double p_mpa, double t_degc, double *k_pa,
                            double *rho_kgm3, uint32_t *qc)
{
	fluid_sample s;

	if (d->explicit_kr) {
		*k_pa = proto_at(&d->k, i);
		*rho_kgm3 = proto_at(&d->rho, i);
		*qc = 0;
		return;
	}
	eval_sample(d, i, p_mpa, t_degc, &s);
	*k_pa = s.mix.k_pa;
	*rho_kgm3 = s.mix.rho_kgm3;
	*qc = s.qc;
}

/* The saturation vector of a phase ("brine", "gas", "oil"); NULL when the
 * phase is absent or the fluid explicit. */
const double *proto__fluid_desc_sat(const struct proto_fluid_desc *d,
                                    const char *phase, size_t *n, int *is_array)
{
	for (int p = 0; p < N_PH; p++)
		if (strcmp(phase, phase_names[p]) == 0 && d->has[p] &&
		    !d->explicit_kr) {
			*n = d->sat[p].n;
			*is_array = d->sat[p].is_array;
			return d->sat[p].v;
		}
	return NULL;
}

/* ---- fluid.properties --------------------------------------------------- */

static int properties(proto_call *c)
{
	const proto_args *a = &c->args;
	const proto_vec *p = proto_vec_of(a, "pressure");
	const proto_vec *t = proto_vec_of(a, "temperature");
	struct proto_fluid_desc *d = desc_new(c);
	fluid_sample *s;
	uint32_t *qc;
	double *sat;
	size_t n;
	int arr;

	if (!d || parse_phases(c, a, d))
		return -1;
	/* p and T (group 0 at the top) join the nested arrays. */
	if (join_len(c, d, p, "pressure") || join_len(c, d, t, "temperature"))
		return -1;
	n = d->n;
	arr = d->any_array;
	if (proto_check_size(c, n, n * N_PH))
		return -1;
	s = proto_alloc(c, n * sizeof *s);
	qc = proto_alloc(c, n * sizeof *qc);
	sat = proto_alloc_doubles(c, n);
	if (!s || !qc || !sat)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	for (size_t i = 0; i < n; i++) {
		eval_sample(d, i, proto_at(p, i), proto_at(t, i), &s[i]);
		qc[i] = s[i].qc;
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "mix", mix_names[d->mix]);
	if (d->mix == MIX_BRIE)
		proto_w_num(c, "brie_exponent", PK_NONE, d->brie_e);
	proto_w_vec(c, "pressure", PK_PRESSURE, p->v, n, p->n == 1 ? 0 : 1,
	            arr);
	proto_w_vec(c, "temperature", PK_TEMPERATURE, t->v, n,
	            t->n == 1 ? 0 : 1, arr);
	for (int k = 0; k < N_PH; k++) {
		char key[32];
		const proto_vec *sv = &d->sat[k];
		if (!d->has[k])
			continue;
		for (size_t i = 0; i < n; i++)
			sat[i] = proto_at(sv, i);
		snprintf(key, sizeof key, "sat_%s", phase_names[k]);
		proto_w_vec(c, key, PK_NONE, sat, n, 1, arr);
	}
	for (int k = 0; k < N_PH; k++) {
		/* Keys must outlive the writer's unit notes: static names. */
		static const char *const keys[N_PH][3] = {
		    {"brine_rho", "brine_k", "brine_v"},
		    {"gas_rho", "gas_k", "gas_v"},
		    {"oil_rho", "oil_k", "oil_v"}};
		if (!d->has[k])
			continue;
		size_t ph = offsetof(fluid_sample, ph) + k * sizeof s->ph[0];
		proto_w_rows(c, keys[k][0], PK_DENSITY, s, sizeof *s,
		             ph + offsetof(rw_fluid_phase, rho_kgm3), n, arr);
		proto_w_rows(c, keys[k][1], PK_MODULUS, s, sizeof *s,
		             ph + offsetof(rw_fluid_phase, k_pa), n, arr);
		proto_w_rows(c, keys[k][2], PK_VELOCITY, s, sizeof *s,
		             ph + offsetof(rw_fluid_phase, v_ms), n, arr);
		if (k == PH_GAS)
			PROTO_W_MEMBER(c, "gas_z", PK_NONE, s, fluid_sample, z,
			               n, arr);
		if (k == PH_OIL && d->live)
			PROTO_W_MEMBER(c, "oil_b0", PK_NONE, s, fluid_sample,
			               b0, n, arr);
	}
	PROTO_W_MEMBER(c, "mix_rho", PK_DENSITY, s, fluid_sample, mix.rho_kgm3,
	               n, arr);
	PROTO_W_MEMBER(c, "mix_k", PK_MODULUS, s, fluid_sample, mix.k_pa, n,
	               arr);
	PROTO_W_MEMBER(c, "mix_v", PK_VELOCITY, s, fluid_sample, mix.v_ms, n,
	               arr);
	proto_w_flags(c, "qc", qc, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_fluid_methods[] = {
    {"fluid.properties", properties, properties_params,
     "Brine, gas and oil properties at pressure and temperature (Batzle "
     "& Wang 1992) and their mixture by saturation."},
    {NULL, NULL, NULL, NULL},
};
