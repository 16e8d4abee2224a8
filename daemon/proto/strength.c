/* rock.strength: unconfined compressive strength from sonic, modulus or
 * porosity by one of the correlations compiled by Chang, Zoback & Khaksar
 * 2006, and the static Young's modulus from the dynamic one (Eissa & Kazi
 * 1988, Horsrud 2001, or the user's linear calibration), per sample, each
 * flagged outside its calibration span and lithology. Listed with the
 * pressure family (pressure.c): it answers with the family's caution and
 * flags. The physics is in daemon/core/strength.c. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/pres.h"
#include "rockwire/strength.h"

/* Shale cut-off of the lithology check (common practice, as the pressure
 * family's shale selector). */
#define VSH_SHALE 0.6

static const char *const ucs_names[] = {
    "freyburg_1972",
    "mcnally_1987",
    "gulf_coast_sandstone",
    "moos_1999",
    "bradford_1998",
    "vernik_1993",
    "horsrud_2001",
    "gulf_of_mexico_pliocene",
    "global_shale",
    "gulf_of_mexico_shale",
    "lal_1999",
    "horsrud_2001_modulus",
    "horsrud_2001_porosity",
    NULL,
};

typedef proto_pres_es es_desc;

static const proto_field es_fields[] = {
    {PROTO_NUMS(es_desc, a, PK_NONE, PF_REQ | PF_SCALAR,
                "slope of Es = a Ed + b, from core tests")},
    {PROTO_NUMS(es_desc, b, PK_MODULUS, PF_SCALAR | PF_DFLT,
                "intercept (default 0)")},
    {0},
};

static int es_from_string(proto_call *c, const char *s, const char *path,
                          void *dst)
{
	es_desc *e = dst;
	int id = rw_strength_e_static_find(s);

	if (id < 0)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path,
		    "unknown conversion '%s'; accepted: "
		    "eissa_kazi_1988, horsrud_2001, or {a, b} for "
		    "Es = a Ed + b",
		    s);
	e->relation = 1 + id;
	return 0;
}

const proto_decl proto_pres_es_decl = {
    .name = "staticModulus",
    .fields = es_fields,
    .size = sizeof(es_desc),
    .from_string = es_from_string,
    .string_desc = "eissa_kazi_1988 or horsrud_2001",
    .desc = "Dynamic to static Young's modulus: eissa_kazi_1988 (Es = "
            "0.74 Ed - 0.82 GPa), horsrud_2001 (Es = 0.076 vp^3.23, vp in "
            "km/s, shales), or {a, b} for the user's Es = a Ed + b",
};

int proto__pres_es(const proto_pres_es *e, double vp_ms, double e_dyn_pa,
                   double *es_pa, uint64_t *detail)
{
	rw_strength_in in = {NAN, vp_ms, NAN, e_dyn_pa, NAN, NAN};
	unsigned w = 0;
	int st;

	in.dt_sm = vp_ms > 0 ? 1 / vp_ms : NAN;
	if (e->relation == 0) {
		st = isnan(e_dyn_pa) ? RW_EDOM
		                     : rw_strength_linear(e_dyn_pa, e->a.v[0],
		                                          e->b.v[0], es_pa);
		if (st == RW_OK && !(*es_pa > 0)) {
			st = RW_ERANGE;
			*es_pa = NAN;
		}
	} else {
		st = rw_strength_e_static(e->relation - 1, &in, es_pa, &w);
	}
	*detail |= (uint64_t)w << 16;
	return st;
}

typedef struct str_args {
	proto_hdr hdr;
	int relation;
	es_desc e_static_from;
	proto_vec dtp, vp, vs, rhob, e_dyn, e_static, porosity, vsh;
	/* derived */
	const rw_strength_info *info;
	const rw_strength_info *es_info;
} str_args;

static const proto_field str_fields[] = {
    {.name = "relation",
     .type = PT_ENUM,
     .flags = PF_REQ,
     .offset = offsetof(str_args, relation),
     .choices = ucs_names,
     .desc = "the UCS correlation (pressure.md lists each one's lithology, "
             "source, region and calibration span)"},
    {PROTO_FIELD(str_args, e_static_from, PT_OBJ, 0,
                 "derive the static Young's modulus from the dynamic one "
                 "(for the modulus correlations, and as an output)"),
     .sub = &proto_pres_es_decl},
    {PROTO_NUMS(str_args, dtp, PK_SLOWNESS, PF_NULLS,
                "compressional slowness (or vp)")},
    {PROTO_NUMS(str_args, vp, PK_VELOCITY, PF_NULLS, "P velocity")},
    {PROTO_NUMS(str_args, vs, PK_VELOCITY, PF_NULLS,
                "S velocity (with vp and rhob, for the dynamic modulus)")},
    {PROTO_NUMS(str_args, rhob, PK_DENSITY, PF_NULLS, "bulk density")},
    {PROTO_NUMS(str_args, e_dyn, PK_MODULUS, PF_NULLS,
                "dynamic Young's modulus (instead of vs)")},
    {PROTO_NUMS(str_args, e_static, PK_MODULUS, PF_NULLS,
                "static Young's modulus, measured or converted elsewhere "
                "(instead of e_static_from)")},
    {PROTO_NUMS(str_args, porosity, PK_NONE, PF_NULLS | PF_FRACTION,
                "porosity (fraction)")},
    {PROTO_NUMS(str_args, vsh, PK_NONE, PF_NULLS,
                "shale fraction: a sandstone correlation on shale (vsh >= "
                "0.6) or a shale one on sand is flagged")},
    {0},
};

static const char *const dtp_vp[] = {"dtp", "vp", NULL};
static const char *const vs_edyn[] = {"vs", "e_dyn", NULL};
static const char *const es_two[] = {"e_static", "e_static_from", NULL};
static const proto_rule str_rules[] = {
    {PR_AT_MOST, NULL, 1, dtp_vp, "give dtp or vp, not both"},
    {PR_AT_MOST, NULL, 1, vs_edyn, "give vs or e_dyn, not both"},
    {PR_AT_MOST, NULL, 1, es_two, "give e_static or e_static_from, not both"},
    PR_LAST,
};

static const proto_decl str_decl;

static int str_need(proto_call *c, int ok, const char *name, const char *why)
{
	return ok ? 0
	          : proto_fail(c, PROTO_INVALID_PARAMS, name, "required: %s",
	                       why);
}

static int str_unused(proto_call *c, const proto_vec *v, int used,
                      const char *name)
{
	if (!v->present || used || v->inherited)
		return 0;
	return proto_fail(c, PROTO_INVALID_PARAMS, name,
	                  "not used by this request (the relations chosen do "
	                  "not read it)");
}

static int str_check(proto_call *c, void *dst)
{
	str_args *a = dst;
	int in, es = 0, u_vel = 0, u_rho = 0, u_vs = 0, u_ed = 0, u_phi = 0;
	int have_v = a->dtp.present || a->vp.present;
	int have_ed;

	a->info = rw_strength_ucs_info(a->relation);
	in = a->info->input;
	a->es_info = NULL;
	if (a->e_static_from.hdr.present && a->e_static_from.relation > 0)
		a->es_info =
		    rw_strength_e_static_info(a->e_static_from.relation - 1);
	if (a->vs.present && !(have_v && a->rhob.present))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "vs",
		    "the dynamic modulus from vs needs vp (or dtp) "
		    "and rhob");
	have_ed = a->e_dyn.present || a->vs.present;
	switch (in) {
	case RW_STRENGTH_IN_DT:
	case RW_STRENGTH_IN_VP:
		if (str_need(c, have_v, "dtp",
		             "this relation reads the compressional log (dtp "
		             "or vp)"))
			return -1;
		u_vel = 1;
		break;
	case RW_STRENGTH_IN_M:
		if (str_need(c, have_v, "dtp",
		             "this relation reads rho vp^2 (dtp or vp, and "
		             "rhob)") ||
		    str_need(c, a->rhob.present, "rhob",
		             "this relation reads rho vp^2"))
			return -1;
		u_vel = u_rho = 1;
		break;
	case RW_STRENGTH_IN_E_STATIC:
		if (str_need(
		        c, a->e_static.present || a->e_static_from.hdr.present,
		        "e_static",
		        "this relation reads the static Young's modulus: "
		        "give e_static, or e_static_from to convert the "
		        "dynamic one"))
			return -1;
		break;
	default:
		if (str_need(c, a->porosity.present, "porosity",
		             "this relation reads porosity"))
			return -1;
		u_phi = 1;
	}
	if (a->e_static_from.hdr.present) {
		es = a->e_static_from.relation;
		if (es == 1 + RW_ESTAT_HORSRUD_2001) {
			if (str_need(c, have_v, "dtp",
			             "horsrud_2001 converts from vp (dtp or "
			             "vp)"))
				return -1;
			u_vel = 1;
		} else {
			if (str_need(c, have_ed, "e_dyn",
			             "the conversion reads the dynamic Young's "
			             "modulus: give e_dyn, or vs with vp and "
			             "rhob"))
				return -1;
			u_ed = 1;
			if (a->vs.present)
				u_vel = u_rho = u_vs = 1;
		}
	}
	if (str_unused(c, &a->dtp, u_vel, "dtp") ||
	    str_unused(c, &a->vp, u_vel, "vp") ||
	    str_unused(c, &a->rhob, u_rho, "rhob") ||
	    str_unused(c, &a->vs, u_vs, "vs") ||
	    str_unused(c, &a->e_dyn, u_ed, "e_dyn") ||
	    str_unused(c, &a->porosity, u_phi, "porosity") ||
	    str_unused(c, &a->e_static, in == RW_STRENGTH_IN_E_STATIC,
	               "e_static"))
		return -1;
	return 0;
}

static const proto_decl str_decl = {
    .name = "",
    .fields = str_fields,
    .rules = str_rules,
    .size = sizeof(str_args),
    .check = str_check,
};

typedef struct str_row {
	double ucs, e_static, e_dyn;
	uint64_t qc, detail;
} str_row;

/* Dynamic Young's modulus rho vs^2 (3 vp^2 - 4 vs^2) / (vp^2 - vs^2)
 * (Mavko et al. 2009, sec. 2.2); NaN when impossible. */
static double e_dyn_of(double vp, double vs, double rho)
{
	double p2 = vp * vp, s2 = vs * vs;

	if (!(vp > 0) || !(vs > 0) || !(rho > 0) || !(p2 > s2))
		return NAN;
	return rho * s2 * (3 * p2 - 4 * s2) / (p2 - s2);
}

static int str_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const str_args *a = args;
	str_row *r = row;
	rw_strength_in in;
	uint64_t d = 0, q = 0;
	unsigned w = 0;
	double vp = NAN;
	int st;

	(void)ws;
	if (a->vp.present)
		vp = proto_at(&a->vp, i);
	else if (a->dtp.present) {
		double dt = proto_at(&a->dtp, i);
		vp = dt > 0 ? 1 / dt : (isnan(dt) ? NAN : -1);
	}
	in.dt_sm = vp > 0 ? 1 / vp : NAN;
	in.vp_ms = vp;
	in.rho_kgm3 = a->rhob.present ? proto_at(&a->rhob, i) : NAN;
	in.phi = a->porosity.present ? proto_at(&a->porosity, i) : NAN;
	in.e_dyn_pa = a->e_dyn.present ? proto_at(&a->e_dyn, i) : NAN;
	if (a->vs.present) {
		double vs = proto_at(&a->vs, i);
		in.e_dyn_pa = e_dyn_of(vp, vs, in.rho_kgm3);
		if (isnan(in.e_dyn_pa) && !isnan(vs) && !isnan(vp) &&
		    !isnan(in.rho_kgm3))
			q |= QC_INPUT_INVALID;
	}
	in.e_static_pa = a->e_static.present ? proto_at(&a->e_static, i) : NAN;
	r->e_dyn = in.e_dyn_pa;
	if (a->e_static_from.hdr.present) {
		st = proto__pres_es(&a->e_static_from, vp, in.e_dyn_pa,
		                    &in.e_static_pa, &d);
		if (st != RW_OK)
			q |= isnan(in.e_dyn_pa) && isnan(vp) ? QC_LOG_MISSING
			                                     : QC_INPUT_INVALID;
	}
	r->e_static = in.e_static_pa;
	w = 0;
	st = rw_strength_ucs(a->relation, &in, &r->ucs, &w);
	d |= (uint64_t)w << 16;
	if (st == RW_EDOM) {
		int missing =
		    (a->info->input <= RW_STRENGTH_IN_M && isnan(vp)) ||
		    (a->info->input == RW_STRENGTH_IN_M &&
		     isnan(in.rho_kgm3)) ||
		    (a->info->input == RW_STRENGTH_IN_PHI && isnan(in.phi)) ||
		    (a->info->input == RW_STRENGTH_IN_E_STATIC &&
		     isnan(in.e_static_pa));
		q |= missing ? QC_LOG_MISSING : QC_INPUT_INVALID;
	} else if (st != RW_OK) {
		q |= QC_INPUT_INVALID;
	}
	r->ucs *= 1e-6; /* MPa, the pressure kind's internal unit */
	if (a->vsh.present && a->info->lithology != RW_STRENGTH_ANY) {
		double vsh = proto_at(&a->vsh, i);
		int shale = vsh >= VSH_SHALE;
		if (isnan(vsh))
			q |= QC_LOG_MISSING;
		else if (shale != (a->info->lithology == RW_STRENGTH_SHALE))
			d |= PRES_D_LITHOLOGY;
	}
	r->detail = d;
	*qc = q | proto__pres_qc(d);
	return 0;
}

static void write_info(proto_call *c, const char *key,
                       const rw_strength_info *in)
{
	static const char *const lith[] = {"sandstone", "shale", "any"};
	static const proto_kind kinds[] = {
	    [RW_STRENGTH_IN_DT] = PK_SLOWNESS,
	    [RW_STRENGTH_IN_VP] = PK_VELOCITY,
	    [RW_STRENGTH_IN_M] = PK_MODULUS,
	    [RW_STRENGTH_IN_E_STATIC] = PK_MODULUS,
	    [RW_STRENGTH_IN_E_DYNAMIC] = PK_MODULUS,
	    [RW_STRENGTH_IN_PHI] = PK_NONE};
	static const char *const input[] = {
	    [RW_STRENGTH_IN_DT] = "dtp",
	    [RW_STRENGTH_IN_VP] = "vp",
	    [RW_STRENGTH_IN_M] = "rho_vp2",
	    [RW_STRENGTH_IN_E_STATIC] = "e_static",
	    [RW_STRENGTH_IN_E_DYNAMIC] = "e_dyn",
	    [RW_STRENGTH_IN_PHI] = "porosity"};
	double lo = in->in_min, hi = in->in_max;

	proto_w_obj_begin(c, key);
	proto_w_str(c, "name", in->name);
	proto_w_str(c, "lithology", lith[in->lithology]);
	proto_w_str(c, "input", input[in->input]);
	proto_w_str(c, "formula", in->formula);
	proto_w_str(c, "source", in->source);
	proto_w_str(c, "region", in->region);
	proto_w_num(c, "span_min", kinds[in->input], lo);
	proto_w_num(c, "span_max", kinds[in->input], hi);
	proto_w_str(c, "span_note", in->range_note);
	proto_w_obj_end(c);
}

static void write_rel(proto_call *c, const char *key, const void *args)
{
	write_info(c, key, ((const str_args *)args)->info);
}

static void write_es_rel(proto_call *c, const char *key, const void *args)
{
	const str_args *a = args;

	if (a->es_info) {
		write_info(c, key, a->es_info);
		return;
	}
	proto_w_obj_begin(c, key);
	proto_w_str(c, "name", "linear");
	proto_w_num(c, "a", PK_NONE, a->e_static_from.a.v[0]);
	proto_w_num(c, "b", PK_MODULUS, a->e_static_from.b.v[0]);
	proto_w_str(c, "source", "the user's calibration on core tests");
	proto_w_obj_end(c);
}

static int has_es(const void *args)
{
	const str_args *a = args;
	return a->e_static_from.hdr.present || a->e_static.present;
}
static int has_es_from(const void *args)
{
	return ((const str_args *)args)->e_static_from.hdr.present;
}
static int has_edyn(const void *args)
{
	const str_args *a = args;
	return a->e_dyn.present || a->vs.present;
}

#define INFO_SCHEMA "{\"type\": \"object\"}"
static const proto_output str_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "ucs",
     .type = PO_NUM,
     .kind = PK_PRESSURE,
     .offset = offsetof(str_row, ucs),
     .desc = "unconfined compressive strength (computed outside the span, "
             "flagged)"},
    {.name = "e_static",
     .type = PO_NUM,
     .kind = PK_MODULUS,
     .offset = offsetof(str_row, e_static),
     .when = has_es,
     .desc = "static Young's modulus (converted, or as given)"},
    {.name = "e_dyn",
     .type = PO_NUM,
     .kind = PK_MODULUS,
     .offset = offsetof(str_row, e_dyn),
     .when = has_edyn,
     .desc = "dynamic Young's modulus used"},
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(str_row, qc),
     .desc = "QC flags per sample (pressure_screening_only on every "
             "sample; strength_extrapolated outside a span or lithology)"},
    {.name = "pressure_detail",
     .type = PO_FLAGS,
     .offset = offsetof(str_row, detail),
     .desc = proto_pres_detail_desc},
    {.name = "relation",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_rel,
     .schema = INFO_SCHEMA,
     .desc = "the UCS correlation: name, lithology, input, formula in its "
             "published units, source, region, calibration span"},
    {.name = "e_static_relation",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = has_es_from,
     .write = write_es_rel,
     .schema = INFO_SCHEMA,
     .desc = "the static-modulus conversion used"},
    {.name = "caution",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = proto__pres_write_caution,
     .schema = "{\"type\": \"string\"}",
     .desc = "screening estimates only (the family's caution)"},
    {0},
};

const proto_method proto__m_strength = {
    .name = "rock.strength",
    .summary = "Unconfined compressive strength and static Young's modulus "
               "from logs, by published correlations.",
    .description =
        "One of the UCS correlations compiled by Chang, Zoback & Khaksar "
        "2006 (sandstone and shale; from sonic, rho vp^2, static modulus or "
        "porosity) and optionally the static modulus from the dynamic one. "
        "Outside a correlation's calibration span or lithology the value "
        "is computed and flagged. Strength from logs scatters by a factor "
        "of two or more: calibrate on core tests. Screening estimates "
        "only; see pressure.md.",
    .params = &str_decl,
    .outputs = str_outputs,
    .kernel = str_kernel,
    .row_size = sizeof(str_row),
    .qc_offset = offsetof(str_row, qc),
    .cost = 1,
};
