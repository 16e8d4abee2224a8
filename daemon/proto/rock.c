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
#include "proto/table.h"
#include "rockwire/elastic.h"
#include "rockwire/rock.h"
#include "rockwire/status.h"

typedef struct subst_args {
	proto_hdr hdr;
	proto_vec vp, vs, rho, k_dry, mu_dry, porosity;
	proto_mineral mineral;
	proto_fluid fluid_in_place, fluid_new;
	proto_vec pressure, temperature;
	proto_qc_ranges qc;
	int mode;     /* derived: MODE_LOGS or MODE_FRAME */
	int needs_pt; /* derived: a fluid is described by phases */
} subst_args;

enum { MODE_LOGS = 0, MODE_FRAME = 1 };
static const char *const mode_names[] = {"logs", "frame", NULL};

/* Per-sample result. */
typedef struct subst_row {
	rw_rock_subst r;
	double k_fl, rho_fl, k_new, rho_new, k_min, rho_min;
	double pct[5]; /* vp, vs, rho, ai, vpvs */
	uint64_t qc;
} subst_row;

#define NUMS(m, k_, fl, text)                                                  \
	{                                                                      \
		PROTO_NUMS(subst_args, m, k_, (fl) | PF_NULLS, text)           \
	}
static const proto_field subst_fields[] = {
    NUMS(vp, PK_VELOCITY, 0, "measured P velocity (logs mode)"),
    NUMS(vs, PK_VELOCITY, 0, "measured S velocity (logs mode)"),
    NUMS(rho, PK_DENSITY, 0, "measured bulk density (logs mode)"),
    NUMS(k_dry, PK_MODULUS, 0, "dry-frame bulk modulus (frame mode)"),
    NUMS(mu_dry, PK_MODULUS, 0, "dry-frame shear modulus (frame mode)"),
    NUMS(porosity, PK_NONE, PF_REQ | PF_FRACTION,
         "porosity (fraction); Gassmann needs 0 < porosity < 1"),
    {PROTO_FIELD(subst_args, mineral, PT_OBJ, PF_REQ, "the mineral"),
     .sub = &proto_mineral_decl},
    {PROTO_FIELD(subst_args, fluid_in_place, PT_OBJ, 0,
                 "logs mode: the fluid in place"),
     .sub = &proto_fluid_decl},
    {PROTO_FIELD(subst_args, fluid_new, PT_OBJ, PF_REQ,
                 "the new fluid (frame mode: the saturating fluid)"),
     .sub = &proto_fluid_decl},
    NUMS(pressure, PK_PRESSURE, 0,
         "pore pressure: required when a fluid is described by phases"),
    NUMS(temperature, PK_TEMPERATURE, 0,
         "temperature: required when a fluid is described by phases"),
    {PROTO_FIELD(subst_args, qc, PT_OBJ, 0,
                 "plausibility ranges for the substituted rock"),
     .sub = &proto_qc_ranges_decl},
    {0},
};
#undef NUMS

static const char *const logs3[] = {"vp", "vs", "rho", NULL};
static const char *const frame2[] = {"k_dry", "mu_dry", NULL};
static const char *const either_mode[] = {"vp", "k_dry", NULL};
static const char *const fip[] = {"fluid_in_place", NULL};
static const proto_rule subst_rules[] = {
    {PR_FORBIDS, "vp", 0, frame2,
     "give vp, vs and rho (a measured rock) or k_dry and mu_dry (a dry "
     "frame), not both"},
    {PR_FORBIDS, "vs", 0, frame2,
     "give vp, vs and rho (a measured rock) or k_dry and mu_dry (a dry "
     "frame), not both"},
    {PR_FORBIDS, "rho", 0, frame2,
     "give vp, vs and rho (a measured rock) or k_dry and mu_dry (a dry "
     "frame), not both"},
    {PR_AT_LEAST, NULL, 1, either_mode,
     "required: give vp, vs and rho (a measured rock) or k_dry and mu_dry "
     "(a dry frame)"},
    {PR_ALL_OR_NONE, NULL, 0, logs3,
     "required: a measured rock needs vp, vs and rho"},
    {PR_ALL_OR_NONE, NULL, 0, frame2,
     "required: a dry frame needs k_dry and mu_dry"},
    {PR_REQUIRES, "vp", 0, fip,
     "required: the fluid in place when vp, vs and rho were measured"},
    {PR_FORBIDS, "k_dry", 0, fip,
     "a dry frame holds no fluid: give the saturating fluid as fluid_new"},
    PR_LAST,
};

static int subst_check(proto_call *c, void *dst)
{
	subst_args *a = dst;

	a->mode = a->vp.present ? MODE_LOGS : MODE_FRAME;
	if (a->mode == MODE_FRAME && !proto__mineral_has_rho(&a->mineral))
		return proto_fail(c, PROTO_INVALID_PARAMS, "mineral.rho",
		                  "required for a dry frame: the rock density "
		                  "is (1 - phi) rho_min + phi rho_fluid");
	a->needs_pt = !a->fluid_new.explicit_kr ||
	              (a->mode == MODE_LOGS && !a->fluid_in_place.explicit_kr);
	for (int q = 0; q < 2; q++) {
		const char *name = q ? "temperature" : "pressure";
		const proto_vec *v = q ? &a->temperature : &a->pressure;
		if (a->needs_pt && !v->present)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "required: a fluid is described by "
			                  "phases, whose properties (Batzle & "
			                  "Wang 1992) depend on pore pressure "
			                  "and temperature");
		if (!a->needs_pt && v->present && !v->inherited)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "not used: every fluid is given as "
			                  "explicit k and rho");
	}
	if (!a->qc.hdr.present)
		proto_qc_ranges_default(&a->qc);
	return 0;
}

static const proto_decl subst_decl = {
    .name = "",
    .fields = subst_fields,
    .rules = subst_rules,
    .size = sizeof(subst_args),
    .check = subst_check,
};

static void subst_nan(rw_rock_subst *r, int keep_kdry)
{
	double kd = r->k_dry_pa;
	r->vp_ms = r->vs_ms = r->rho_kgm3 = NAN;
	r->k_sat_pa = r->mu_pa = r->k_dry_pa = NAN;
	if (keep_kdry)
		r->k_dry_pa = kd;
}

/* QC bits of the Gassmann warnings; *impossible set when the frame is. */
static uint64_t warn_qc(unsigned w, int *impossible)
{
	uint64_t f = 0;
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
static uint64_t from_logs(double vp, double vs, double rho, double phi,
                          subst_row *s)
{
	unsigned w = 0;
	int st, bad = 0;
	uint64_t f;

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
static uint64_t from_frame(double k_dry, double mu_dry, double phi,
                           subst_row *s)
{
	unsigned w = 0;
	int st, bad = 0;
	uint64_t f;

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

static int subst_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                        void *ws)
{
	const subst_args *a = args;
	subst_row *x = row;
	double pi = a->needs_pt ? proto_at(&a->pressure, i) : NAN;
	double ti = a->needs_pt ? proto_at(&a->temperature, i) : NAN;
	double f = proto_at(&a->porosity, i);
	int logs = a->mode == MODE_LOGS;
	uint64_t q1 = 0, q2 = 0;
	rw_elastic e;

	(void)ws;
	x->r.vp_ms = x->r.vs_ms = x->r.rho_kgm3 = NAN;
	x->r.k_sat_pa = x->r.mu_pa = x->r.k_dry_pa = NAN;
	if (logs)
		proto__fluid_kr(&a->fluid_in_place, i, pi, ti, &x->k_fl,
		                &x->rho_fl, &q1);
	proto__fluid_kr(&a->fluid_new, i, pi, ti, &x->k_new, &x->rho_new, &q2);
	*qc = q1 | q2;
	if (proto__mineral_eval(&a->mineral, i, &x->k_min, &x->rho_min) !=
	    RW_OK)
		*qc |= QC_INPUT_INVALID;
	if (isnan(f) ||
	    (logs ? isnan(proto_at(&a->vp, i)) || isnan(proto_at(&a->vs, i)) ||
	                isnan(proto_at(&a->rho, i))
	          : isnan(proto_at(&a->k_dry, i)) ||
	                isnan(proto_at(&a->mu_dry, i)))) {
		*qc |= QC_LOG_MISSING;
		return 0;
	}
	if (!(f > 0.0 && f < 1.0) || (logs && !isfinite(x->k_fl)) ||
	    !isfinite(x->k_new) || !isfinite(x->k_min)) {
		/* porosity of 0 or 1, or a fluid that could not be computed
		 * (its flags say why) */
		if (!(f > 0.0 && f < 1.0))
			*qc |= QC_INPUT_INVALID;
		return 0;
	}
	if (logs)
		*qc |= from_logs(proto_at(&a->vp, i), proto_at(&a->vs, i),
		                 proto_at(&a->rho, i), f, x);
	else
		*qc |= from_frame(proto_at(&a->k_dry, i),
		                  proto_at(&a->mu_dry, i), f, x);
	/* The substituted rock gets the same plausibility checks as any
	 * elastic sample (elastic.convert's ranges, `qc`). */
	if (isfinite(x->r.vp_ms) &&
	    rw_elastic_from_velocities(x->r.vp_ms, x->r.vs_ms, x->r.rho_kgm3,
	                               &e, NULL) == RW_OK)
		*qc |= proto_qc_plausible(&a->qc, &e);
	return 0;
}

static int is_logs(const void *a)
{
	return ((const subst_args *)a)->mode == MODE_LOGS;
}
static int new_brine(const void *a)
{
	const proto_fluid *f = &((const subst_args *)a)->fluid_new;
	return !f->explicit_kr && f->has[PROTO_BRINE];
}
static int new_gas(const void *a)
{
	const proto_fluid *f = &((const subst_args *)a)->fluid_new;
	return !f->explicit_kr && f->has[PROTO_GAS];
}
static int new_oil(const void *a)
{
	const proto_fluid *f = &((const subst_args *)a)->fluid_new;
	return !f->explicit_kr && f->has[PROTO_OIL];
}

#define O(nm, m, k_, w, text)                                                  \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(subst_row, m), .when = w, .desc = text      \
	}
#define PCT(nm, k, text)                                                       \
	{                                                                      \
		.name = nm, .type = PO_NUM,                                    \
		.offset = offsetof(subst_row, pct) + (k) * sizeof(double),     \
		.when = is_logs, .desc = text                                  \
	}
static const proto_output subst_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "mode",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(subst_args, mode),
     .choices = mode_names,
     .desc = "logs (a measured rock) or frame (a dry frame)"},
    O("vp", r.vp_ms, PK_VELOCITY, NULL, "substituted P velocity"),
    O("vs", r.vs_ms, PK_VELOCITY, NULL, "substituted S velocity"),
    O("rho", r.rho_kgm3, PK_DENSITY, NULL, "substituted density"),
    O("k_sat", r.k_sat_pa, PK_MODULUS, NULL,
      "saturated bulk modulus (Gassmann)"),
    O("mu", r.mu_pa, PK_MODULUS, NULL, "shear modulus (unchanged)"),
    O("k_dry", r.k_dry_pa, PK_MODULUS, NULL, "dry-frame bulk modulus"),
    O("fluid_in_place_k", k_fl, PK_MODULUS, is_logs,
      "bulk modulus of the fluid in place"),
    O("fluid_in_place_rho", rho_fl, PK_DENSITY, is_logs,
      "density of the fluid in place"),
    O("fluid_new_k", k_new, PK_MODULUS, NULL, "bulk modulus of the new fluid"),
    O("fluid_new_rho", rho_new, PK_DENSITY, NULL, "density of the new fluid"),
    O("mineral_k", k_min, PK_MODULUS, NULL, "mineral bulk modulus"),
    O("mineral_rho", rho_min, PK_DENSITY, NULL, "mineral density"),
    {.name = "fluid_new_sat_brine",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(subst_args, fluid_new.sat[PROTO_BRINE]),
     .when = new_brine,
     .desc = "brine saturation of the new fluid"},
    {.name = "fluid_new_sat_gas",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(subst_args, fluid_new.sat[PROTO_GAS]),
     .when = new_gas,
     .desc = "gas saturation of the new fluid"},
    {.name = "fluid_new_sat_oil",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(subst_args, fluid_new.sat[PROTO_OIL]),
     .when = new_oil,
     .desc = "oil saturation of the new fluid"},
    PCT("dvp_pct", 0, "change of vp, percent"),
    PCT("dvs_pct", 1, "change of vs, percent"),
    PCT("drho_pct", 2, "change of density, percent"),
    PCT("dai_pct", 3, "change of acoustic impedance, percent"),
    PCT("dvpvs_pct", 4, "change of vp/vs, percent"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(subst_row, qc),
     .desc = "QC flags"},
    {0},
};
#undef O
#undef PCT

static const proto_method m_substitute = {
    .name = "rock.substitute",
    .summary = "Gassmann 1951 fluid substitution from logs or a dry frame.",
    .description =
        "logs mode: vp, vs, rho measured with fluid_in_place, porosity, "
        "mineral and fluid_new; mu = rho vs^2 stays, K_dry from the "
        "measured K and the old fluid, K_sat from K_dry and the new fluid. "
        "frame mode: k_dry, mu_dry, porosity, mineral (with rho) and "
        "fluid_new. Every array (logs, porosity, fluid and mineral "
        "members) shares one sample dimension, so a fluid_new.saturation "
        "array is a saturation sweep. See fluids.md.",
    .params = &subst_decl,
    .outputs = subst_outputs,
    .kernel = subst_kernel,
    .row_size = sizeof(subst_row),
    .qc_offset = offsetof(subst_row, qc),
    .cost = 4,
};

const proto_method *const proto_rock_methods[] = {&m_substitute, NULL};
