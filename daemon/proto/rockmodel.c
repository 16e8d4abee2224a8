/* The rock-model family: rock.model (the dry frame of a granular,
 * cemented or inclusion model, then the saturated rock through Gassmann
 * and the project's fluids, per sample), rock.template (a grid of a model
 * over porosity x water saturation, optionally x clay or effective
 * pressure, with its iso-porosity and iso-saturation lines in a chosen
 * crossplot), rock.invert (porosity and water saturation, optionally
 * clay, from two or three observed attributes by nonlinear least squares
 * on the model, per sample, with covariance, misfit and the
 * non-uniqueness flags) and rock.pressure_fit (the exponential dry-frame
 * pressure law calibrated to core measurements). The model and its
 * parameters are the same flat fields in every method (MODEL_FIELDS). The
 * physics is in daemon/core (rockwire/rockmodel.h); the family page is
 * protocol-docs/rockmodels.md. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/elastic.h"
#include "rockwire/mineral.h"
#include "rockwire/rockmodel.h"
#include "rockwire/status.h"

/* ---- names -------------------------------------------------------------- */

/* In rw_rm_model order. */
static const char *const model_names[] = {
    "hertz_mindlin",   "walton_smooth",
    "walton_rough",    "soft_sand",
    "stiff_sand",      "contact_cement",
    "constant_cement", "critical_porosity",
    "krief",           "kuster_toksoz",
    "self_consistent", "dem",
    "xu_white",        NULL};
/* In RW_MIX_* order. */
static const char *const mix_names[] = {"voigt",    "reuss",    "hill",
                                        "hs_upper", "hs_lower", NULL};
/* In RW_RM_FLUID_* order. */
static const char *const fluid_mix_names[] = {"wood", "brie", "voigt", NULL};
/* RW_RM_CEMENT_* minus one. */
static const char *const scheme_names[] = {"contact", "coating", NULL};
/* In RW_RM_SHAPE_* order. */
static const char *const shape_names[] = {"sphere", "needle",   "disk",
                                          "penny",  "spheroid", NULL};
/* In rw_rm_attr order (rw_rm_attr_name); the first ATTR_OBS can be
 * observed (rock.invert), all can be plotted (rock.template). */
static const char *const attr_names[] = {
    "vp",         "vs",     "rho",   "ai",    "si",     "vpvs", "nu",
    "lambda_rho", "mu_rho", "k_sat", "k_dry", "mu_dry", NULL};
#define ATTR_OBS 10
static const proto_kind attr_kinds[RW_RM_ATTR_COUNT] = {
    PK_VELOCITY,        PK_VELOCITY, PK_DENSITY, PK_IMPEDANCE,
    PK_IMPEDANCE,       PK_NONE,     PK_NONE,    PK_MODULUS_DENSITY,
    PK_MODULUS_DENSITY, PK_MODULUS,  PK_MODULUS, PK_MODULUS};

/* ---- the solid: a mineral with its shear modulus ------------------------ */

/* A mineral of the models (matrix, clay_mineral, cement): a table name,
 * {k, mu, rho}, or {constituents, method} as in mineral.mix. One for the
 * request (a model has one solid); the check derives its moduli. The
 * shared proto_mineral_decl carries no shear modulus, which every model
 * here needs, so the field is `matrix`, not `mineral`: a session default
 * `mineral` keeps one meaning. */
typedef struct rm_solid {
	proto_hdr hdr;
	proto_vec k, mu, rho;
	proto_list constituents;
	int method;
	/* derived */
	double k_pa, mu_pa, rho_kgm3;
	int named; /* given as a table name */
} rm_solid;

/* The object's own path ("matrix" for "matrix."). */
static const char *own_path(proto_call *c, const char *path)
{
	char *p = proto_strdup(c, path);
	size_t n = p ? strlen(p) : 0;

	if (n && p[n - 1] == '.')
		p[n - 1] = '\0';
	return p ? p : path;
}

static int unknown_mineral(proto_call *c, const char *path, const char *name)
{
	const char *names[64], *near;
	char list[512];
	size_t used = 0, n = rw_mineral_count();
	rw_mineral m;

	list[0] = '\0';
	for (size_t i = 0; i < n && i < 64; i++) {
		int w;
		rw_mineral_get(i, &m);
		names[i] = m.name;
		if (used >= sizeof list)
			continue;
		w = snprintf(list + used, sizeof list - used, "%s%s",
		             i ? ", " : "", m.name);
		if (w > 0)
			used += (size_t)w;
	}
	near = proto__suggest(name, names, n < 64 ? n : 64);
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "unknown mineral '%s'%s%s%s; built in: %s (see "
	                  "mineral.list), or give k, mu and rho",
	                  name, near ? "; did you mean '" : "",
	                  near ? near : "", near ? "'?" : "", list);
}

static int solid_set_table(proto_call *c, rm_solid *s, const char *name,
                           const char *path)
{
	rw_mineral m;

	if (rw_mineral_find(name, NULL, &m) != RW_OK)
		return unknown_mineral(c, path, name);
	s->k_pa = m.k_pa;
	s->mu_pa = m.mu_pa;
	s->rho_kgm3 = m.rho_kgm3;
	return 0;
}

static int solid_from_string(proto_call *c, const char *s, const char *path,
                             void *dst)
{
	((rm_solid *)dst)->named = 1;
	return solid_set_table(c, dst, s, path);
}

static int solid_check(proto_call *c, void *dst)
{
	rm_solid *s = dst;
	const proto_constituent *it = s->constituents.items;
	double k[PROTO_MAX_CONSTITUENTS], mu[PROTO_MAX_CONSTITUENTS];
	double rho[PROTO_MAX_CONSTITUENTS], f[PROTO_MAX_CONSTITUENTS];
	size_t n = s->constituents.n;

	if (s->named)
		return 0;
	if (!n) {
		s->k_pa = s->k.v[0];
		s->mu_pa = s->mu.v[0];
		s->rho_kgm3 = s->rho.v[0];
		return 0;
	}
	if (proto__constituents_check(
	        c, &s->constituents,
	        proto_path(c, s->hdr.path, "constituents", "")))
		return -1;
	for (size_t j = 0; j < n; j++) {
		const proto_vec *v[4] = {&it[j].k, &it[j].mu, &it[j].rho,
		                         &it[j].fraction};
		static const char *const nm[4] = {"k", "mu", "rho", "fraction"};
		for (int q = 0; q < 4; q++)
			if (v[q]->n > 1)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, it[j].hdr.path, nm[q], ""),
				    "must be a single number: a model has one "
				    "solid for the request (vary the clay "
				    "fraction instead)");
		k[j] = it[j].k.v[0];
		mu[j] = it[j].mu.v[0];
		rho[j] = it[j].rho.v[0];
		f[j] = it[j].fraction.v[0];
	}
	if (rw_mineral_mix(s->method, n, k, mu, rho, f, &s->k_pa, &s->mu_pa,
	                   &s->rho_kgm3) != RW_OK ||
	    !(s->k_pa > 0 && s->mu_pa > 0 && s->rho_kgm3 > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  own_path(c, s->hdr.path),
		                  "the mix has no positive bulk and shear "
		                  "modulus and density (a fluid constituent "
		                  "with the %s average?)",
		                  mix_names[s->method]);
	return 0;
}

static const proto_field solid_fields[] = {
    {PROTO_NUMS(rm_solid, k, PK_MODULUS, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "bulk modulus (with mu and rho, instead of a name)"),
     .lo = 0},
    {PROTO_NUMS(rm_solid, mu, PK_MODULUS, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "shear modulus"),
     .lo = 0},
    {PROTO_NUMS(rm_solid, rho, PK_DENSITY, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "density"),
     .lo = 0},
    {PROTO_FIELD(rm_solid, constituents, PT_LIST, 0,
                 "a mix of constituents as in mineral.mix (one value "
                 "each)"),
     .sub = &proto_constituent_decl},
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(rm_solid, method),
     .choices = mix_names,
     .dflt_choice = RW_MIX_HILL,
     .desc = "averaging of the constituents (default hill)"},
    {0},
};

static const char *const kmurho[] = {"k", "mu", "rho", NULL};
static const char *const solid_source[] = {"k", "constituents", NULL};
static const char *const solid_method[] = {"method", NULL};
static const proto_rule solid_rules[] = {
    {PR_FORBIDS, "constituents", 0, kmurho,
     "give either constituents or k, mu and rho, not both"},
    {PR_ALL_OR_NONE, NULL, 0, kmurho,
     "required: an explicit mineral needs k, mu and rho"},
    {PR_AT_LEAST, NULL, 1, solid_source,
     "required: a name from mineral.list, {k, mu, rho} or constituents"},
    {PR_FORBIDS, "k", 0, solid_method, "only used with constituents"},
    PR_LAST,
};

static const proto_decl solid_decl = {
    .name = "modelMineral",
    .fields = solid_fields,
    .rules = solid_rules,
    .size = sizeof(rm_solid),
    .from_string = solid_from_string,
    .string_desc = "a mineral name from mineral.list",
    .check = solid_check,
    .desc = "A mineral of a rock model: a name from mineral.list, {k, mu, "
            "rho}, or {constituents, method} as in mineral.mix; one value "
            "each (one solid for the request)",
};

/* ---- the model and its parameters --------------------------------------- */

typedef struct rm_model {
	int model;
	rm_solid matrix, clay_mineral, cement;
	int clay_mix;
	proto_fluid brine, hydrocarbon;
	int fluid_mix;
	proto_vec brie_exponent;
	proto_vec phi_c, coordination, slip;
	int cement_scheme;
	proto_vec phi_b;
	int pore_shape;
	proto_vec aspect, aspect_clay, tolerance;
	proto_vec pressure, temperature;
	/* derived by model_check */
	rw_rm_spec spec; /* fluids filled per sample */
	int by_phases;   /* a fluid is described by phases */
	double coord;    /* coordination number used (NaN: not used) */
	double phi_max;  /* highest porosity without continuation (NaN:
	                  * none below 1) */
} rm_model;

/* Which optional parameters each model uses. */
enum {
	U_PHI_C = 1u << 0,
	U_COORD = 1u << 1,
	U_SLIP = 1u << 2,
	U_CEMENT = 1u << 3, /* cement and cement_scheme */
	U_PHI_B = 1u << 4,
	U_SHAPE = 1u << 5,
	U_ASPECT = 1u << 6,
	U_ASPECT_CLAY = 1u << 7,
	U_TOL = 1u << 8,
};
static const unsigned model_uses[RW_RM_MODEL_COUNT] = {
    [RW_RM_HERTZ_MINDLIN] = U_PHI_C | U_COORD | U_SLIP,
    [RW_RM_WALTON_SMOOTH] = U_PHI_C | U_COORD,
    [RW_RM_WALTON_ROUGH] = U_PHI_C | U_COORD,
    [RW_RM_SOFT_SAND] = U_PHI_C | U_COORD | U_SLIP,
    [RW_RM_STIFF_SAND] = U_PHI_C | U_COORD | U_SLIP,
    [RW_RM_CONTACT_CEMENT] = U_PHI_C | U_COORD | U_CEMENT,
    [RW_RM_CONSTANT_CEMENT] = U_PHI_C | U_COORD | U_CEMENT | U_PHI_B,
    [RW_RM_CRITICAL_POROSITY] = U_PHI_C,
    [RW_RM_KRIEF] = 0,
    [RW_RM_KUSTER_TOKSOZ] = U_SHAPE | U_ASPECT,
    [RW_RM_SELF_CONSISTENT] = U_SHAPE | U_ASPECT | U_TOL,
    [RW_RM_DEM] = U_SHAPE | U_ASPECT | U_TOL,
    [RW_RM_XU_WHITE] = U_ASPECT | U_ASPECT_CLAY | U_TOL,
};

static int granular(int model)
{
	return model == RW_RM_HERTZ_MINDLIN || model == RW_RM_WALTON_SMOOTH ||
	       model == RW_RM_WALTON_ROUGH;
}

/* The model's fields, the same in every method: st is the method's
 * arguments struct with its rm_model as member `m`. */
#define MF_NUMS(st, nm, k_, fl, text)                                          \
	.name = #nm, .type = PT_NUMS, .kind = k_, .flags = fl,                 \
	.offset = offsetof(st, m.nm), .desc = text
#define MF_OBJ(st, nm, decl, text)                                             \
	.name = #nm, .type = PT_OBJ, .offset = offsetof(st, m.nm),             \
	.sub = &decl, .desc = text
#define MF_ENUM(st, nm, names, dfl, text)                                      \
	.name = #nm, .type = PT_ENUM, .flags = PF_DFLT,                        \
	.offset = offsetof(st, m.nm), .choices = names, .dflt_choice = dfl,    \
	.desc = text
#define ONE " (one value for the request: one model)"
#define MODEL_FIELDS(st)                                                       \
	{.name = "model",                                                      \
	 .type = PT_ENUM,                                                      \
	 .flags = PF_REQ,                                                      \
	 .offset = offsetof(st, m.model),                                      \
	 .choices = model_names,                                               \
	 .desc = "the rock model (protocol-docs/rockmodels.md)"},              \
	    {MF_OBJ(st, matrix, solid_decl,                                    \
	            "the host mineral of the solid (default quartz)")},        \
	    {MF_OBJ(st, clay_mineral, solid_decl,                              \
	            "clay mixed into the host by the clay fraction (default "  \
	            "clay)")},                                                 \
	    {MF_ENUM(st, clay_mix, mix_names, RW_MIX_HILL,                     \
	             "how host and clay mix (default hill)")},                 \
	    {MF_OBJ(st, brine, proto_fluid_decl,                               \
	            "the brine end member: {k, rho} or {brine: {salinity}}")}, \
	    {MF_OBJ(st, hydrocarbon, proto_fluid_decl,                         \
	            "the hydrocarbon end member: {k, rho}, or gas and/or oil " \
	            "as in fluid.properties")},                                \
	    {MF_ENUM(                                                          \
	        st, fluid_mix, fluid_mix_names, RW_RM_FLUID_WOOD,              \
	        "how brine and hydrocarbon mix at saturation sw (default "     \
	        "wood; brie takes the hydrocarbon as its gas)")},              \
	    {MF_NUMS(st, brie_exponent, PK_NONE, PF_SCALAR | PF_DFLT | PF_LO,  \
	             "Brie exponent, >= 1, only "                              \
	             "with fluid_mix brie" ONE),                               \
	     .dflt = 3, .lo = 1},                                              \
	    {MF_NUMS(st, phi_c, PK_NONE,                                       \
	             PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI |        \
	                 PF_HI_OPEN,                                           \
	             "critical porosity (default 0.40)" ONE),                  \
	     .dflt = 0.40, .lo = 0, .hi = 1},                                  \
	    {MF_NUMS(                                                          \
	         st, coordination, PK_NONE, PF_SCALAR | PF_LO | PF_LO_OPEN,    \
	         "contacts per grain (default: Murphy 1982 at phi_c)" ONE),    \
	     .lo = 0},                                                         \
	    {MF_NUMS(st, slip, PK_NONE, PF_SCALAR | PF_DFLT | PF_FRACTION,     \
	             "shear-reduction factor, 1 no slip, 0 frictionless "      \
	             "(default 1)" ONE),                                       \
	     .dflt = 1},                                                       \
	    {MF_OBJ(st, cement, solid_decl,                                    \
	            "cement mineral (default quartz)")},                       \
	    {MF_ENUM(st, cement_scheme, scheme_names, 0,                       \
	             "cement at the grain contacts or coating the grains "     \
	             "(default contact)")},                                    \
	    {MF_NUMS(st, phi_b, PK_NONE,                                       \
	             PF_SCALAR | PF_LO | PF_LO_OPEN | PF_HI | PF_HI_OPEN,      \
	             "constant cement: porosity where cementing stopped, "     \
	             "<= phi_c" ONE),                                          \
	     .lo = 0, .hi = 1},                                                \
	    {MF_ENUM(                                                          \
	        st, pore_shape, shape_names, RW_RM_SHAPE_SPHEROID,             \
	        "pore shape of the inclusion models (default spheroid)")},     \
	    {MF_NUMS(st, aspect, PK_NONE, PF_SCALAR | PF_LO | PF_LO_OPEN,      \
	             "pore aspect ratio (default 0.1; xu_white sand pores "    \
	             "0.12)" ONE),                                             \
	     .lo = 0},                                                         \
	    {MF_NUMS(st, aspect_clay, PK_NONE,                                 \
	             PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,                 \
	             "xu_white clay-pore aspect ratio (default 0.03)" ONE),    \
	     .dflt = 0.03, .lo = 0},                                           \
	    {MF_NUMS(st, tolerance, PK_NONE,                                   \
	             PF_SCALAR | PF_DFLT | PF_LO | PF_HI,                      \
	             "relative tolerance of the self-consistent iteration "    \
	             "and the DEM integration (default 1e-10)" ONE),           \
	     .dflt = 1e-10, .lo = 1e-14, .hi = 1e-3},                          \
	    {MF_NUMS(st, pressure, PK_PRESSURE, PF_NULLS,                      \
	             "pore pressure for fluids described by phases "           \
	             "(Batzle & Wang 1992)")},                                 \
	{                                                                      \
		MF_NUMS(st, temperature, PK_TEMPERATURE, PF_NULLS,             \
		        "temperature for fluids described by phases")          \
	}

/* Fails when field `name` was given in the request although the model
 * does not use it; a session default is let pass (it is not used). */
static int refuse_unused(proto_call *c, const proto_decl *d, const void *args,
                         const char *name, const char *why)
{
	const proto_hdr *h = args;
	int i = proto_field_index(d, name);

	if (i >= 0 && ((h->given >> i) & 1u))
		return proto_fail(c, PROTO_INVALID_PARAMS, name, "%s", why);
	return 0;
}

/* Maps a member rw_rm_spec_check names to the parameter. */
static const char *spec_param(const char *member)
{
	static const struct {
		const char *member, *param;
	} map[] = {
	    {"k_min_pa", "matrix"},
	    {"mu_min_pa", "matrix"},
	    {"rho_min_kgm3", "matrix"},
	    {"k_clay_pa", "clay_mineral"},
	    {"mu_clay_pa", "clay_mineral"},
	    {"rho_clay_kgm3", "clay_mineral"},
	    {"clay_mix", "clay_mix"},
	    {"k_brine_pa", "brine"},
	    {"rho_brine_kgm3", "brine"},
	    {"k_hc_pa", "hydrocarbon"},
	    {"rho_hc_kgm3", "hydrocarbon"},
	    {"fluid_mix", "fluid_mix"},
	    {"brie_e", "brie_exponent"},
	    {"coord", "coordination"},
	    {"slip", "slip"},
	    {"phi_c", "phi_c"},
	    {"phi_b", "phi_b"},
	    {"k_cem_pa", "cement"},
	    {"mu_cem_pa", "cement"},
	    {"cement_scheme", "cement_scheme"},
	    {"pore_shape", "pore_shape"},
	    {"aspect", "aspect"},
	    {"aspect_clay", "aspect_clay"},
	    {"tol", "tolerance"},
	};
	for (size_t i = 0; member && i < sizeof map / sizeof map[0]; i++)
		if (strcmp(map[i].member, member) == 0)
			return map[i].param;
	return "model";
}

/* The end members: brine holds brine only, the hydrocarbon no brine. */
static int end_members_check(proto_call *c, rm_model *m)
{
	static const char *const ph[] = {"brine", "gas", "oil"};

	if (!m->brine.explicit_kr)
		for (int p = PROTO_GAS; p <= PROTO_OIL; p++)
			if (m->brine.has[p])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, "brine.", ph[p], ""),
				    "the brine end member holds brine only: "
				    "describe %s under hydrocarbon",
				    ph[p]);
	if (!m->hydrocarbon.explicit_kr && m->hydrocarbon.has[PROTO_BRINE])
		return proto_fail(c, PROTO_INVALID_PARAMS, "hydrocarbon.brine",
		                  "the hydrocarbon end member holds no brine: "
		                  "water is the brine end member, mixed in by "
		                  "sw");
	m->by_phases = !m->brine.explicit_kr || !m->hydrocarbon.explicit_kr;
	for (int q = 0; q < 2; q++) {
		const char *name = q ? "temperature" : "pressure";
		const proto_vec *v = q ? &m->temperature : &m->pressure;
		if (m->by_phases && !v->present)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "required: a fluid is described by "
			                  "phases, whose properties (Batzle & "
			                  "Wang 1992) depend on pore pressure "
			                  "and temperature");
		if (!m->by_phases && v->present && !v->inherited)
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "not used: both fluids are given as "
			                  "explicit k and rho");
	}
	return 0;
}

/* Checks the model's parameters against the model (d: the method's
 * declaration, args: its struct) and derives the spec. */
static int model_check(proto_call *c, const proto_decl *d, const void *args,
                       rm_model *m)
{
	unsigned uses = model_uses[m->model];
	const char *name = model_names[m->model], *bad = NULL;
	rw_rm_spec *s = &m->spec;
	char why[160];
	int coord_given = m->coordination.present;
	static const struct {
		unsigned bit;
		const char *field;
	} opt[] = {
	    {U_PHI_C, "phi_c"},
	    {U_COORD, "coordination"},
	    {U_SLIP, "slip"},
	    {U_CEMENT, "cement"},
	    {U_CEMENT, "cement_scheme"},
	    {U_PHI_B, "phi_b"},
	    {U_SHAPE, "pore_shape"},
	    {U_ASPECT, "aspect"},
	    {U_ASPECT_CLAY, "aspect_clay"},
	    {U_TOL, "tolerance"},
	};

	for (size_t k = 0; k < sizeof opt / sizeof opt[0]; k++) {
		if (uses & opt[k].bit)
			continue;
		snprintf(why, sizeof why, "not used by the %s model", name);
		if (refuse_unused(c, d, args, opt[k].field, why))
			return -1;
	}
	if (granular(m->model) && coord_given &&
	    refuse_unused(c, d, args, "phi_c",
	                  "not used: the pack's porosity is the sample's, and "
	                  "phi_c only sets the Murphy 1982 coordination number "
	                  "when coordination is not given"))
		return -1;
	if (m->model == RW_RM_CONSTANT_CEMENT && !m->phi_b.present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "phi_b",
		                  "required by the constant_cement model: the "
		                  "porosity where cementing stopped");
	if (uses & U_SHAPE) {
		if (m->pore_shape == RW_RM_SHAPE_DISK)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "pore_shape",
			    "an empty disk has no stiffness: use "
			    "penny (thin cracks) or spheroid with an "
			    "aspect ratio");
		if ((m->pore_shape == RW_RM_SHAPE_SPHERE ||
		     m->pore_shape == RW_RM_SHAPE_NEEDLE) &&
		    refuse_unused(c, d, args, "aspect",
		                  "not used: spheres and needles have a fixed "
		                  "shape (give pore_shape penny or spheroid)"))
			return -1;
	}
	if (m->fluid_mix != RW_RM_FLUID_BRIE && m->brie_exponent.present &&
	    refuse_unused(c, d, args, "brie_exponent",
	                  "only used with fluid_mix \"brie\""))
		return -1;
	if (!m->brine.hdr.present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "brine",
		                  "required: the brine end member, {k, rho} or "
		                  "{brine: {salinity}}");
	if (!m->hydrocarbon.hdr.present)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "hydrocarbon",
		    "required: the hydrocarbon end member, {k, "
		    "rho} or gas and/or oil as in fluid.properties");
	if (end_members_check(c, m))
		return -1;
	if (!m->matrix.hdr.present &&
	    solid_set_table(c, &m->matrix, "quartz", "matrix"))
		return -1;
	if (!m->clay_mineral.hdr.present &&
	    solid_set_table(c, &m->clay_mineral, "clay", "clay_mineral"))
		return -1;
	if (!m->cement.hdr.present &&
	    solid_set_table(c, &m->cement, "quartz", "cement"))
		return -1;

	memset(s, 0, sizeof *s);
	s->model = m->model;
	s->k_min_pa = m->matrix.k_pa;
	s->mu_min_pa = m->matrix.mu_pa;
	s->rho_min_kgm3 = m->matrix.rho_kgm3;
	s->k_clay_pa = m->clay_mineral.k_pa;
	s->mu_clay_pa = m->clay_mineral.mu_pa;
	s->rho_clay_kgm3 = m->clay_mineral.rho_kgm3;
	s->clay_mix = m->clay_mix;
	s->phi_c = m->phi_c.v[0];
	s->coord = coord_given ? m->coordination.v[0] : 0.0;
	s->slip = m->slip.v[0];
	s->k_cem_pa = m->cement.k_pa;
	s->mu_cem_pa = m->cement.mu_pa;
	s->cement_scheme = m->cement_scheme + 1;
	s->phi_b = m->phi_b.present ? m->phi_b.v[0] : 0.0;
	s->pore_shape = m->pore_shape;
	s->aspect = m->aspect.present            ? m->aspect.v[0]
	            : m->model == RW_RM_XU_WHITE ? 0.12
	                                         : 0.1;
	s->aspect_clay = m->aspect_clay.v[0];
	s->tol = m->tolerance.v[0];
	s->fluid_mix = m->fluid_mix;
	s->brie_e = m->brie_exponent.v[0];
	/* placeholders: the fluids are set per sample */
	s->k_brine_pa = s->k_hc_pa = 1e9;
	s->rho_brine_kgm3 = s->rho_hc_kgm3 = 1000.0;
	if (rw_rm_spec_check(s, &bad) != RW_OK) {
		const char *p = spec_param(bad);
		if (strcmp(p, "phi_b") == 0)
			return proto_fail(c, PROTO_INVALID_PARAMS, p,
			                  "%.9g is above phi_c %.9g: cementing "
			                  "stops below the critical porosity",
			                  s->phi_b, s->phi_c);
		return proto_fail(c, PROTO_INVALID_PARAMS, p,
		                  "outside the range the %s model accepts",
		                  name);
	}
	m->coord = NAN;
	if (uses & U_COORD) {
		m->coord = s->coord;
		if (!coord_given)
			rw_rm_coord_murphy(s->phi_c, &m->coord);
	}
	m->phi_max = rw_rm_spec_phi_max(s);
	if (!(m->phi_max < 1.0 - 1e-9))
		m->phi_max = NAN;
	if ((uses & U_COORD) &&
	    (m->coord < RW_RM_COORD_MIN || m->coord > RW_RM_COORD_MAX))
		proto_warn(c, coord_given ? "coordination" : "phi_c",
		           "coordination number %.4g is outside [%g, %g], the "
		           "range of mechanically stable sphere packs: every "
		           "sample is flagged model_outside_range",
		           m->coord, RW_RM_COORD_MIN, RW_RM_COORD_MAX);
	if ((uses & U_SHAPE) && m->pore_shape == RW_RM_SHAPE_PENNY &&
	    s->aspect > RW_RM_PENNY_ASPECT_MAX)
		proto_warn(
		    c, "aspect",
		    "penny cracks of aspect ratio %.4g are not thin (the "
		    "thin-crack forms need <= %g): use pore_shape "
		    "spheroid; every sample is flagged model_outside_range",
		    s->aspect, RW_RM_PENNY_ASPECT_MAX);
	return 0;
}

/* Brine and hydrocarbon of sample i into sp. 0 when a fluid cannot be
 * computed there (its QC bits are in *qc). */
static int sample_fluids(const rm_model *m, size_t i, rw_rm_spec *sp,
                         uint64_t *qc)
{
	double p = m->by_phases ? proto_at(&m->pressure, i) : NAN;
	double t = m->by_phases ? proto_at(&m->temperature, i) : NAN;
	uint64_t q1 = 0, q2 = 0;

	proto__fluid_kr(&m->brine, i, p, t, &sp->k_brine_pa,
	                &sp->rho_brine_kgm3, &q1);
	proto__fluid_kr(&m->hydrocarbon, i, p, t, &sp->k_hc_pa,
	                &sp->rho_hc_kgm3, &q2);
	*qc |= q1 | q2;
	return sp->k_brine_pa > 0 && sp->rho_brine_kgm3 > 0 &&
	       sp->k_hc_pa > 0 && sp->rho_hc_kgm3 > 0 &&
	       isfinite(sp->k_brine_pa + sp->rho_brine_kgm3 + sp->k_hc_pa +
	                sp->rho_hc_kgm3);
}

/* QC bits of the core's model warnings (protocol-docs/rockmodels.md). */
static uint64_t warn_qc(unsigned w)
{
	uint64_t f = 0;

	if (w &
	    (RW_RM_WARN_PHI_ABOVE_C | RW_RM_WARN_COORD_RANGE |
	     RW_RM_WARN_P_RANGE | RW_RM_WARN_ASPECT_RANGE | RW_RM_WARN_DILUTE |
	     RW_RM_WARN_CEMENT_HIGH | RW_RM_WARN_P_EXTRAP))
		f |= QC_MODEL_RANGE;
	if (w & (RW_RM_WARN_ABOVE_HS | RW_RM_WARN_FRAME_STIFF))
		f |= QC_MODEL_BOUND;
	if (w & RW_RM_WARN_NOT_CONVERGED)
		f |= QC_NOT_CONVERGED;
	if (w & (RW_RM_WARN_PERCOLATED | RW_RM_WARN_NO_SHEAR))
		f |= QC_NO_SHEAR;
	if (w & RW_RM_WARN_PHI_LOW)
		f |= QC_GASSMANN_PHI_LOW;
	return f;
}

/* QC bits of a failed evaluation with valid inputs: the model has no
 * value there (contact cement above phi_c, Kuster-Toksoz far past its
 * dilute limit, ...) or did not converge. */
static uint64_t status_qc(int st)
{
	switch (st) {
	case RW_OK: return 0;
	case RW_EMAXITER: return QC_NOT_CONVERGED;
	case RW_EDOM:
	case RW_ERANGE: return QC_MODEL_RANGE;
	default: return QC_INPUT_INVALID;
	}
}

/* Per-thread scratch of the GSL solvers. */
typedef struct rm_scratch {
	rw_rm_ws *ws;
} rm_scratch;

static int scratch_init0(const void *args, void *ws)
{
	(void)args;
	((rm_scratch *)ws)->ws = rw_rm_ws_new(0, 0);
	return ((rm_scratch *)ws)->ws == NULL;
}

static void scratch_free(void *ws)
{
	rw_rm_ws_free(((rm_scratch *)ws)->ws);
}

/* ---- rock.model --------------------------------------------------------- */

typedef struct model_args {
	proto_hdr hdr;
	rm_model m;
	proto_vec porosity, sw, clay, p_eff;
	proto_qc_ranges qc;
	int uses_p; /* derived: the model depends on p_eff */
} model_args;

static const proto_field model_fields[] = {
    MODEL_FIELDS(model_args),
    {PROTO_NUMS(model_args, porosity, PK_NONE,
                PF_REQ | PF_NULLS | PF_FRACTION | PF_HI | PF_HI_OPEN,
                "porosity, [0, 1); null marks a missing sample"),
     .hi = 1},
    {PROTO_NUMS(model_args, sw, PK_NONE, PF_NULLS | PF_FRACTION | PF_DFLT,
                "water saturation (default 1: brine-filled)"),
     .dflt = 1},
    {PROTO_NUMS(model_args, clay, PK_NONE, PF_NULLS | PF_FRACTION | PF_DFLT,
                "clay volume fraction of the solid (default 0)"),
     .dflt = 0},
    {PROTO_NUMS(model_args, p_eff, PK_PRESSURE, PF_NULLS | PF_LO,
                "effective pressure (confining minus pore): required by "
                "the Hertz-Mindlin based models, refused by the others"),
     .lo = 0},
    {PROTO_FIELD(model_args, qc, PT_OBJ, 0,
                 "plausibility ranges for the saturated rock"),
     .sub = &proto_qc_ranges_decl},
    {0},
};

static int p_eff_check(proto_call *c, int model, const proto_vec *p)
{
	if (rw_rm_model_uses_pressure(model) && !p->present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "p_eff",
		                  "required: the %s model's grain contacts "
		                  "stiffen with effective pressure",
		                  model_names[model]);
	if (!rw_rm_model_uses_pressure(model) && p->present && !p->inherited)
		return proto_fail(c, PROTO_INVALID_PARAMS, "p_eff",
		                  "not used: the %s model does not depend on "
		                  "effective pressure",
		                  model_names[model]);
	return 0;
}

static const proto_decl model_decl;

static int model_args_check(proto_call *c, void *dst)
{
	model_args *a = dst;

	if (model_check(c, &model_decl, a, &a->m) ||
	    p_eff_check(c, a->m.model, &a->p_eff))
		return -1;
	a->uses_p = rw_rm_model_uses_pressure(a->m.model);
	if (!a->qc.hdr.present)
		proto_qc_ranges_default(&a->qc);
	return 0;
}

static const proto_decl model_decl = {
    .name = "",
    .fields = model_fields,
    .size = sizeof(model_args),
    .check = model_args_check,
};

typedef struct model_row {
	rw_rm_sat s;
	rw_rm_parts parts;
	double warn;
	uint64_t qc;
} model_row;

static int model_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                        void *ws)
{
	const model_args *a = args;
	model_row *r = row;
	rw_rm_spec sp = a->m.spec;
	double phi = proto_at(&a->porosity, i), sw = proto_at(&a->sw, i);
	double clay = proto_at(&a->clay, i);
	double p = a->uses_p ? proto_at(&a->p_eff, i) : 0.0;
	unsigned w = 0;
	int st;
	rw_elastic e;

	if (isnan(phi) || isnan(sw) || isnan(clay) || isnan(p)) {
		*qc |= QC_LOG_MISSING;
		return 0;
	}
	if (!sample_fluids(&a->m, i, &sp, qc))
		return 0;
	st = rw_rm_eval_parts(&sp, phi, sw, clay, p * 1e6,
	                      ((rm_scratch *)ws)->ws, &r->s, &r->parts, &w);
	r->warn = (double)w;
	*qc |= warn_qc(w) | status_qc(st);
	if (st == RW_OK && r->s.vs_ms > 0 &&
	    rw_elastic_from_velocities(r->s.vp_ms, r->s.vs_ms, r->s.rho_kgm3,
	                               &e, NULL) == RW_OK)
		*qc |= proto_qc_plausible(&a->qc, &e);
	return 0;
}

static int uses_coord(const void *a)
{
	return !isnan(((const model_args *)a)->m.coord);
}
static int uses_p_eff(const void *a)
{
	return ((const model_args *)a)->uses_p;
}

#define MO(nm, member, k_, text)                                               \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(model_row, member), .desc = text            \
	}
static const proto_output model_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "model",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(model_args, m.model),
     .choices = model_names,
     .desc = "the model"},
    {.name = "coordination",
     .type = PO_NUM,
     .dim = D_REQ,
     .offset = offsetof(model_args, m.coord),
     .when = uses_coord,
     .desc = "coordination number used (given, or Murphy 1982 at phi_c)"},
    {.name = "phi_max",
     .type = PO_NUM,
     .dim = D_REQ,
     .offset = offsetof(model_args, m.phi_max),
     .desc = "highest porosity the model describes without continuation "
             "(null: no limit below 1)"},
    {.name = "porosity",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(model_args, porosity),
     .desc = "porosity (echoed)"},
    {.name = "sw",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(model_args, sw),
     .desc = "water saturation (echoed)"},
    {.name = "clay",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(model_args, clay),
     .desc = "clay fraction of the solid (echoed)"},
    {.name = "p_eff",
     .type = PO_VEC,
     .kind = PK_PRESSURE,
     .dim = D_REQ,
     .offset = offsetof(model_args, p_eff),
     .when = uses_p_eff,
     .desc = "effective pressure (echoed)"},
    MO("k_dry", s.k_dry_pa, PK_MODULUS, "dry-frame bulk modulus"),
    MO("mu_dry", s.mu_dry_pa, PK_MODULUS, "dry-frame shear modulus"),
    MO("k_sat", s.k_sat_pa, PK_MODULUS, "saturated bulk modulus (Gassmann)"),
    MO("rho", s.rho_kgm3, PK_DENSITY, "bulk density"),
    MO("vp", s.vp_ms, PK_VELOCITY, "P velocity"),
    MO("vs", s.vs_ms, PK_VELOCITY, "S velocity"),
    MO("ai", s.ai, PK_IMPEDANCE, "acoustic impedance rho vp"),
    MO("si", s.si, PK_IMPEDANCE, "shear impedance rho vs"),
    MO("vpvs", s.vpvs, PK_NONE, "vp/vs (null without shear rigidity)"),
    MO("nu", s.nu, PK_NONE, "Poisson's ratio"),
    MO("lambda_rho", s.lambda_rho, PK_MODULUS_DENSITY,
       "lambda-rho, AI^2 - 2 SI^2"),
    MO("mu_rho", s.mu_rho, PK_MODULUS_DENSITY, "mu-rho, SI^2"),
    MO("k_solid", parts.k_s_pa, PK_MODULUS,
       "bulk modulus of the solid (host mixed with clay)"),
    MO("mu_solid", parts.mu_s_pa, PK_MODULUS, "shear modulus of the solid"),
    MO("rho_solid", parts.rho_s_kgm3, PK_DENSITY, "density of the solid"),
    MO("k_fluid", parts.k_fl_pa, PK_MODULUS,
       "bulk modulus of the pore fluid at sw"),
    MO("rho_fluid", parts.rho_fl_kgm3, PK_DENSITY,
       "density of the pore fluid at sw"),
    MO("model_warn", warn, PK_NONE,
       "the model's range notes behind the QC flags, a bit set "
       "(protocol-docs/rockmodels.md)"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(model_row, qc),
     .desc = "QC flags"},
    {0},
};
#undef MO

static const proto_method m_model = {
    .name = "rock.model",
    .summary = "Dry frame of a rock model and the saturated rock through "
               "Gassmann, per sample.",
    .description =
        "A granular (Hertz-Mindlin, Walton), sand (soft, stiff, contact "
        "and constant cement), critical-porosity, Krief or inclusion "
        "(Kuster-Toksoz, self-consistent, DEM, Xu-White) model gives the "
        "dry frame at porosity, clay and effective pressure; the pore "
        "fluid (brine and hydrocarbon mixed at sw) saturates it by "
        "Gassmann 1951. Porosity, sw, clay, p_eff and the fluid members "
        "broadcast along one sample dimension. Inputs outside a model's "
        "range are flagged model_outside_range (protocol-docs/rockmodels.md). "
        "Screening estimates: models describe idealised rocks.",
    .params = &model_decl,
    .outputs = model_outputs,
    .kernel = model_kernel,
    .row_size = sizeof(model_row),
    .qc_offset = offsetof(model_row, qc),
    .ws_size = sizeof(rm_scratch),
    .ws_init = scratch_init0,
    .ws_free = scratch_free,
    .cost = 20,
};

/* ---- axes (rock.template) ----------------------------------------------- */

/* An axis: strictly increasing values, an array or {from, to, n}. */
typedef struct rm_axis {
	const double *v; /* internal units */
	size_t n;
	int given; /* in the request (or the session) */
} rm_axis;

#define AXIS_MAX_N 100000

typedef struct axis_kind {
	proto_kind kind;
	double lo, hi; /* internal units */
	int hi_open;
	size_t min_n;
	int fraction;
} axis_kind;

static int axis_value(proto_call *c, const axis_kind *k, const char *path,
                      const cJSON *v, const char *at, double *out)
{
	double x;

	if (!cJSON_IsNumber(v))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "%smust be a number", at);
	if (!isfinite(v->valuedouble))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "%snumber out of range", at);
	x = proto_to_internal(&c->units, k->kind, v->valuedouble);
	if (x < k->lo || x > k->hi || (k->hi_open && x >= k->hi)) {
		if (k->fraction && x > 1 && x <= 100)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "%s%.9g is outside [0, 1%s: fractions, "
			    "not percent (%.9g?)",
			    at, x, k->hi_open ? ")" : "]", x / 100);
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path,
		    "%s%.9g %s is outside [%.9g, %.9g%s", at, v->valuedouble,
		    k->kind ? proto_unit_name(&c->units, k->kind) : "",
		    proto_from_internal(&c->units, k->kind, k->lo),
		    proto_from_internal(&c->units, k->kind, k->hi),
		    k->hi_open ? ")" : "]");
	}
	*out = x;
	return 0;
}

static int axis_parse(proto_call *c, const axis_kind *k, const cJSON *v,
                      const char *path, rm_axis *a)
{
	double *buf;
	size_t n;
	char at[48];

	memset(a, 0, sizeof *a);
	a->given = 1;
	if (cJSON_IsArray(v)) {
		const cJSON *e;
		proto_arr_iter it;
		size_t i = 0;
		n = proto__arr_size(v);
		if (n < k->min_n || n > AXIS_MAX_N)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "%zu values: an axis has %zu to %d",
			                  n, k->min_n, AXIS_MAX_N);
		if (!(buf = proto_alloc_doubles(c, n)))
			return proto_fail(c, PROTO_INTERNAL_ERROR, path,
			                  "out of memory");
		PROTO_ARR_FOREACH(e, it, v)
		{
			snprintf(at, sizeof at, "element %zu: ", i);
			if (axis_value(c, k, path, e, at, &buf[i]))
				return -1;
			if (i > 0 && !(buf[i] > buf[i - 1]))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, path,
				    "element %zu: an axis must be "
				    "strictly increasing",
				    i);
			i++;
		}
	} else if (cJSON_IsObject(v)) {
		const cJSON *from = cJSON_GetObjectItemCaseSensitive(v, "from");
		const cJSON *to = cJSON_GetObjectItemCaseSensitive(v, "to");
		const cJSON *cn = cJSON_GetObjectItemCaseSensitive(v, "n");
		const cJSON *e;
		double lo, hi;
		cJSON_ArrayForEach(e, v)
		{
			if (strcmp(e->string, "from") &&
			    strcmp(e->string, "to") && strcmp(e->string, "n"))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, path, ".", e->string),
				    "unknown parameter; accepted: from, to, n");
		}
		if (!from || !to || !cn)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path,
			               !from ? ".from"
			               : !to ? ".to"
			                     : ".n",
			               ""),
			    "required: an axis object is {from, to, n}");
		if (axis_value(c, k, proto_path(c, path, ".from", ""), from, "",
		               &lo) ||
		    axis_value(c, k, proto_path(c, path, ".to", ""), to, "",
		               &hi))
			return -1;
		if (!(hi > lo))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, path, ".to", ""),
			                  "must be above from");
		if (!cJSON_IsNumber(cn) ||
		    cn->valuedouble != floor(cn->valuedouble) ||
		    cn->valuedouble < (double)k->min_n ||
		    cn->valuedouble > AXIS_MAX_N)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, path, ".n", ""),
			                  "must be an integer from %zu to %d",
			                  k->min_n, AXIS_MAX_N);
		n = (size_t)cn->valuedouble;
		if (!(buf = proto_alloc_doubles(c, n)))
			return proto_fail(c, PROTO_INTERNAL_ERROR, path,
			                  "out of memory");
		for (size_t i = 0; i < n; i++)
			buf[i] = n == 1 ? lo
			                : lo + (hi - lo) * (double)i /
			                           (double)(n - 1);
		buf[n - 1] = n == 1 ? lo : hi;
	} else {
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be an array of increasing numbers or "
		                  "{from, to, n}");
	}
	a->v = buf;
	a->n = n;
	return 0;
}

static const axis_kind ax_porosity = {PK_NONE, 0, 1, 1, 2, 1};
static const axis_kind ax_sw = {PK_NONE, 0, 1, 0, 2, 1};
static const axis_kind ax_clay = {PK_NONE, 0, 1, 0, 1, 1};
static const axis_kind ax_p_eff = {PK_PRESSURE, 0, 1e6, 0, 1, 0};

static int parse_ax_porosity(proto_call *c, const cJSON *v, const char *path,
                             void *dst)
{
	return axis_parse(c, &ax_porosity, v, path, dst);
}
static int parse_ax_sw(proto_call *c, const cJSON *v, const char *path,
                       void *dst)
{
	return axis_parse(c, &ax_sw, v, path, dst);
}
static int parse_ax_clay(proto_call *c, const cJSON *v, const char *path,
                         void *dst)
{
	return axis_parse(c, &ax_clay, v, path, dst);
}
static int parse_ax_p_eff(proto_call *c, const cJSON *v, const char *path,
                          void *dst)
{
	return axis_parse(c, &ax_p_eff, v, path, dst);
}

#define AXIS_OBJ(kind_json)                                                    \
	"{\"type\": \"object\", \"additionalProperties\": false, "             \
	"\"required\": [\"from\", \"to\", \"n\"], \"properties\": "            \
	"{\"from\": {\"type\": \"number\"" kind_json "}, \"to\": "             \
	"{\"type\": \"number\"" kind_json "}, \"n\": {\"type\": "              \
	"\"integer\", \"minimum\": 1, \"maximum\": 100000}}}"
#define AXIS_ARR(kind_json, min)                                               \
	"{\"type\": \"array\", \"minItems\": " #min ", \"maxItems\": 100000, " \
	"\"items\": {\"type\": \"number\"" kind_json "}}"
#define FRAC_JSON ", \"minimum\": 0, \"maximum\": 1"
#define P_JSON    ", \"minimum\": 0"
static const proto_custom cu_porosity = {
    .parse = parse_ax_porosity,
    .schema = "{\"oneOf\": [" AXIS_ARR(FRAC_JSON, 2) ", " AXIS_OBJ(
        FRAC_JSON) "], \"x-kind\": \"fraction\"}"};
static const proto_custom cu_sw = {
    .parse = parse_ax_sw,
    .schema = "{\"oneOf\": [" AXIS_ARR(FRAC_JSON, 2) ", " AXIS_OBJ(
        FRAC_JSON) "], \"x-kind\": \"fraction\"}"};
static const proto_custom cu_clay = {
    .parse = parse_ax_clay,
    .schema = "{\"oneOf\": [" AXIS_ARR(FRAC_JSON, 1) ", " AXIS_OBJ(
        FRAC_JSON) "], \"x-kind\": \"fraction\"}"};
static const proto_custom cu_p_eff = {
    .parse = parse_ax_p_eff,
    .schema = "{\"oneOf\": [" AXIS_ARR(P_JSON, 1) ", " AXIS_OBJ(
        P_JSON) "], \"x-kind\": \"pressure\", \"x-unit\": "
                "\"MPa\"}"};

/* ---- rock.template ------------------------------------------------------ */

typedef struct xplot {
	proto_hdr hdr;
	int x, y;
} xplot;

static const proto_field xplot_fields[] = {
    {.name = "x",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(xplot, x),
     .choices = attr_names,
     .dflt_choice = RW_RM_ATTR_AI,
     .desc = "attribute on the x axis (default ai)"},
    {.name = "y",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(xplot, y),
     .choices = attr_names,
     .dflt_choice = RW_RM_ATTR_VPVS,
     .desc = "attribute on the y axis (default vpvs)"},
    {0},
};

static int xplot_check(proto_call *c, void *dst)
{
	xplot *x = dst;
	if (x->hdr.present && x->x == x->y)
		return proto_fail(c, PROTO_INVALID_PARAMS, "crossplot.y",
		                  "'%s' is the x attribute too: a crossplot "
		                  "needs two attributes",
		                  attr_names[x->y]);
	return 0;
}

static const proto_decl xplot_decl = {
    .name = "crossplot",
    .fields = xplot_fields,
    .size = sizeof(xplot),
    .check = xplot_check,
    .desc = "the two attributes of the iso-lines (default ai and vpvs)",
};

typedef struct tpl_args {
	proto_hdr hdr;
	rm_model m;
	rm_axis porosity_axis, sw_axis, clay_axis, p_eff_axis;
	proto_vec clay, p_eff;
	xplot crossplot;
} tpl_args;

static const proto_field tpl_fields[] = {
    MODEL_FIELDS(tpl_args),
    {PROTO_FIELD(tpl_args, porosity_axis, PT_CUSTOM, PF_AXIS,
                 "porosity axis: increasing values in [0, 1) or {from, to, "
                 "n} (default 0 to min(phi_max, 0.4) in 21 nodes)"),
     .custom = &cu_porosity},
    {PROTO_FIELD(tpl_args, sw_axis, PT_CUSTOM, PF_AXIS,
                 "water-saturation axis (default 0 to 1 in 11 nodes)"),
     .custom = &cu_sw},
    {PROTO_FIELD(tpl_args, clay_axis, PT_CUSTOM, PF_AXIS,
                 "clay fractions of the solid as the third axis (instead "
                 "of one clay)"),
     .custom = &cu_clay},
    {PROTO_FIELD(tpl_args, p_eff_axis, PT_CUSTOM, PF_AXIS,
                 "effective pressures as the third axis (instead of one "
                 "p_eff)"),
     .custom = &cu_p_eff},
    {PROTO_NUMS(tpl_args, clay, PK_NONE, PF_SCALAR | PF_FRACTION | PF_DFLT,
                "clay fraction of the solid at every node (default 0; one "
                "value: the template's axes are porosity and sw)"),
     .dflt = 0},
    {PROTO_NUMS(tpl_args, p_eff, PK_PRESSURE, PF_SCALAR | PF_LO,
                "effective pressure at every node: required by the "
                "Hertz-Mindlin based models (one value, or p_eff_axis)"),
     .lo = 0},
    {PROTO_FIELD(tpl_args, crossplot, PT_OBJ, 0,
                 "the attributes of the iso-lines"),
     .sub = &xplot_decl},
    {0},
};

static const char *const ax_clay_f[] = {"clay_axis", NULL};
static const char *const ax_p_f[] = {"p_eff_axis", NULL};
static const char *const ax_both[] = {"clay_axis", "p_eff_axis", NULL};
static const proto_rule tpl_rules[] = {
    {PR_FORBIDS, "clay", 0, ax_clay_f,
     "give one clay or a clay_axis, not both"},
    {PR_FORBIDS, "p_eff", 0, ax_p_f,
     "give one p_eff or a p_eff_axis, not both"},
    {PR_AT_MOST, NULL, 1, ax_both,
     "a template has one third axis: clay_axis or p_eff_axis"},
    PR_LAST,
};

static const proto_decl tpl_decl;

static int tpl_check(proto_call *c, void *dst)
{
	tpl_args *a = dst;
	int up = 0;

	if (model_check(c, &tpl_decl, a, &a->m))
		return -1;
	up = rw_rm_model_uses_pressure(a->m.model);
	if (up && !a->p_eff.present && !a->p_eff_axis.given)
		return proto_fail(c, PROTO_INVALID_PARAMS, "p_eff",
		                  "required: the %s model's grain contacts "
		                  "stiffen with effective pressure (or give "
		                  "p_eff_axis)",
		                  model_names[a->m.model]);
	if (!up && (refuse_unused(c, &tpl_decl, a, "p_eff",
	                          "not used: the model does not depend on "
	                          "effective pressure") ||
	            refuse_unused(c, &tpl_decl, a, "p_eff_axis",
	                          "not used: the model does not depend on "
	                          "effective pressure")))
		return -1;
	if (!up)
		memset(&a->p_eff_axis, 0, sizeof a->p_eff_axis);
	if (!a->crossplot.hdr.present) {
		a->crossplot.x = RW_RM_ATTR_AI;
		a->crossplot.y = RW_RM_ATTR_VPVS;
	}
	return 0;
}

static const proto_decl tpl_decl = {
    .name = "",
    .fields = tpl_fields,
    .rules = tpl_rules,
    .size = sizeof(tpl_args),
    .check = tpl_check,
};

/* Model cost of one node relative to a sand (for the thread split). */
static double node_cost(int model)
{
	switch (model) {
	case RW_RM_DEM:
	case RW_RM_XU_WHITE: return 50;
	case RW_RM_SELF_CONSISTENT: return 80;
	default: return 1;
	}
}

static void sat_nan(rw_rm_sat *s)
{
	s->k_dry_pa = s->mu_dry_pa = s->k_sat_pa = s->rho_kgm3 = NAN;
	s->vp_ms = s->vs_ms = s->ai = s->si = s->vpvs = s->nu = NAN;
	s->lambda_rho = s->mu_rho = NAN;
}

typedef struct tpl_run {
	const tpl_args *a;
	const rw_rm_spec *spec;
	const double *phi, *sw, *ax3;
	size_t n_phi, n_sw, n_3;
	int ax3_kind;
	double clay, p_pa;
	uint64_t fluid_qc;
	rw_rm_sat *nodes;
	uint64_t *qc;
	double *warn;
	size_t rows_per_chunk; /* rows of n_phi nodes */
	int failed;
} tpl_run;

static void tpl_chunk(void *arg, size_t chunk)
{
	tpl_run *r = arg;
	size_t rows = r->n_sw * r->n_3;
	size_t lo = chunk * r->rows_per_chunk, hi = lo + r->rows_per_chunk;
	rw_rm_ws *ws = rw_rm_ws_new(0, 0);

	if (!ws) {
		r->failed = 1;
		return;
	}
	if (hi > rows)
		hi = rows;
	for (size_t row = lo; row < hi; row++) {
		size_t k = row / r->n_sw, j = row % r->n_sw;
		double clay =
		    r->ax3_kind == RW_RM_AXIS_CLAY ? r->ax3[k] : r->clay;
		double p = r->ax3_kind == RW_RM_AXIS_PRESSURE ? r->ax3[k] * 1e6
		                                              : r->p_pa;
		for (size_t i = 0; i < r->n_phi; i++) {
			size_t at = row * r->n_phi + i;
			unsigned w = 0;
			int st = RW_OK;
			if (r->fluid_qc & (QC_LOG_MISSING | QC_FLUID_FAILED |
			                   QC_INPUT_INVALID)) {
				/* no fluid: every node is null */
				sat_nan(&r->nodes[at]);
				r->qc[at] = r->fluid_qc;
				r->warn[at] = NAN;
				continue;
			}
			st = rw_rm_eval(r->spec, r->phi[i], r->sw[j], clay, p,
			                ws, &r->nodes[at], &w);
			r->qc[at] = r->fluid_qc | warn_qc(w) | status_qc(st);
			r->warn[at] = (double)w;
		}
	}
	rw_rm_ws_free(ws);
}

/* Writes member `off` (a double) of every node as the grid
 * [k][i][j] (without k when there is no third axis). */
static void write_grid(proto_call *c, const char *key, proto_kind kind,
                       const tpl_run *r, const void *base, size_t size,
                       size_t off, int flags)
{
	const unsigned char *b = base;
	size_t stride = r->n_phi * size; /* j steps */

	proto_w_arr_begin(c, key);
	for (size_t k = 0; k < r->n_3; k++) {
		if (r->ax3_kind != RW_RM_AXIS_NONE)
			proto_w_arr_begin(c, NULL);
		for (size_t i = 0; i < r->n_phi; i++) {
			const unsigned char *p =
			    b + (k * r->n_sw * r->n_phi + i) * size;
			if (flags)
				proto_w_flag_rows(c, NULL, p, stride, off,
				                  r->n_sw, 1);
			else
				proto_w_rows(c, NULL, kind, p, stride, off,
				             r->n_sw, 1);
		}
		if (r->ax3_kind != RW_RM_AXIS_NONE)
			proto_w_arr_end(c);
	}
	proto_w_arr_end(c);
}

static void write_lines(proto_call *c, const tpl_run *r, int iso_phi,
                        const double *pts, size_t k)
{
	size_t nl = iso_phi ? r->n_phi : r->n_sw;
	size_t np = iso_phi ? r->n_sw : r->n_phi;
	int ax = r->a->crossplot.x, ay = r->a->crossplot.y;

	for (size_t l = 0; l < nl; l++) {
		const double *p = pts + 2 * l * np;
		proto_w_obj_begin(c, NULL);
		if (iso_phi)
			proto_w_num(c, "porosity", PK_NONE, r->phi[l]);
		else
			proto_w_num(c, "sw", PK_NONE, r->sw[l]);
		if (r->ax3_kind == RW_RM_AXIS_CLAY)
			proto_w_num(c, "clay", PK_NONE, r->ax3[k]);
		else if (r->ax3_kind == RW_RM_AXIS_PRESSURE)
			proto_w_num(c, "p_eff", PK_PRESSURE, r->ax3[k]);
		proto_w_vec(c, "x", attr_kinds[ax], p, np, 2, 1);
		proto_w_vec(c, "y", attr_kinds[ay], p + 1, np, 2, 1);
		proto_w_obj_end(c);
	}
}

/* The path of the first array among the inputs a template uses (the
 * fluids, and pressure and temperature when a fluid is described by
 * phases), or NULL. An unused session default may be an array. */
static const char *one_model_array(proto_call *c, const rm_model *m)
{
	const proto_fluid *fl[2] = {&m->brine, &m->hydrocarbon};

	for (int q = 0; q < 2; q++) {
		const proto_fluid *f = fl[q];
		const char *pre = f->hdr.path;
		const struct {
			const proto_vec *v;
			const char *name;
		} vs[] = {
		    {&f->k, "k"},
		    {&f->rho, "rho"},
		    {&f->brine.salinity, "brine.salinity"},
		    {&f->gas.gravity, "gas.gravity"},
		    {&f->oil.api, "oil.api"},
		    {&f->oil.gor, "oil.gor"},
		    {&f->oil.gas_gravity, "oil.gas_gravity"},
		    {&f->saturation.brine, "saturation.brine"},
		    {&f->saturation.gas, "saturation.gas"},
		    {&f->saturation.oil, "saturation.oil"},
		    {&f->brie_exponent, "brie_exponent"},
		};
		for (size_t k = 0; k < sizeof vs / sizeof vs[0]; k++)
			if (vs[k].v->present && vs[k].v->is_array)
				return proto_path(c, pre, vs[k].name, "");
	}
	if (m->by_phases && m->pressure.is_array)
		return "pressure";
	if (m->by_phases && m->temperature.is_array)
		return "temperature";
	return NULL;
}

static const double *default_axis(proto_call *c, double lo, double hi, size_t n)
{
	double *v = proto_alloc_doubles(c, n);
	for (size_t i = 0; v && i < n; i++)
		v[i] = lo + (hi - lo) * (double)i / (double)(n - 1);
	if (v)
		v[n - 1] = hi;
	return v;
}

static int tpl_body(proto_call *c, void *args)
{
	tpl_args *a = args;
	const rm_model *m = &a->m;
	rw_rm_spec spec = m->spec;
	tpl_run r;
	size_t nodes, rows, nchunks = 1;
	double *iso_phi, *iso_sw;
	uint64_t fqc = 0;
	int up = rw_rm_model_uses_pressure(m->model);

	{
		const char *arr = one_model_array(c, m);
		if (arr)
			return proto_fail(c, PROTO_INVALID_PARAMS, arr,
			                  "must be a single number: "
			                  "rock.template draws one model (its "
			                  "axes are porosity, sw and clay or "
			                  "p_eff)");
	}
	memset(&r, 0, sizeof r);
	r.a = a;
	r.spec = &spec;
	if (a->porosity_axis.given) {
		r.phi = a->porosity_axis.v;
		r.n_phi = a->porosity_axis.n;
	} else {
		double top =
		    isnan(m->phi_max) || m->phi_max > 0.4 ? 0.4 : m->phi_max;
		r.n_phi = 21;
		r.phi = default_axis(c, 0.0, top, r.n_phi);
	}
	if (a->sw_axis.given) {
		r.sw = a->sw_axis.v;
		r.n_sw = a->sw_axis.n;
	} else {
		r.n_sw = 11;
		r.sw = default_axis(c, 0.0, 1.0, r.n_sw);
	}
	if (!r.phi || !r.sw)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	r.n_3 = 1;
	r.ax3_kind = RW_RM_AXIS_NONE;
	r.clay = a->clay.v[0];
	r.p_pa = up && a->p_eff.present ? a->p_eff.v[0] * 1e6 : 0.0;
	if (a->clay_axis.given) {
		r.ax3_kind = RW_RM_AXIS_CLAY;
		r.ax3 = a->clay_axis.v;
		r.n_3 = a->clay_axis.n;
	} else if (a->p_eff_axis.given) {
		r.ax3_kind = RW_RM_AXIS_PRESSURE;
		r.ax3 = a->p_eff_axis.v;
		r.n_3 = a->p_eff_axis.n;
	}
	if (r.n_phi * r.n_sw > 1000000 / r.n_3)
		return proto_fail(
		    c, PROTO_LIMIT_EXCEEDED, NULL,
		    "%zu x %zu x %zu nodes: a template has at most "
		    "1,000,000; use fewer axis values",
		    r.n_phi, r.n_sw, r.n_3);
	nodes = r.n_phi * r.n_sw * r.n_3;
	if (proto_check_size(c, nodes, nodes))
		return -1;
	if (!isnan(m->phi_max) && r.phi[r.n_phi - 1] > m->phi_max)
		proto_warn(
		    c, "porosity",
		    "the axis reaches %.4g, above %.4g, the highest "
		    "porosity the %s model describes: nodes there are "
		    "continued past the model (flagged model_outside_range) or "
		    "null",
		    r.phi[r.n_phi - 1], m->phi_max, model_names[m->model]);
	sample_fluids(m, 0, &spec, &fqc);
	r.fluid_qc = fqc;
	r.nodes = proto_alloc(c, nodes * sizeof *r.nodes);
	r.qc = proto_alloc(c, nodes * sizeof *r.qc);
	r.warn = proto_alloc_doubles(c, nodes);
	iso_phi = proto_alloc_doubles(c, 2 * r.n_phi * r.n_sw);
	iso_sw = proto_alloc_doubles(c, 2 * r.n_phi * r.n_sw);
	if (!r.nodes || !r.qc || !r.warn || !iso_phi || !iso_sw)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu nodes", nodes);
	rows = r.n_sw * r.n_3;
	r.rows_per_chunk = rows;
	if ((double)nodes * node_cost(m->model) > 16384.0 && rows > 1) {
		nchunks = rows < 64 ? rows : 64;
		r.rows_per_chunk = (rows + nchunks - 1) / nchunks;
		nchunks = (rows + r.rows_per_chunk - 1) / r.rows_per_chunk;
	}
	if (nchunks == 1)
		tpl_chunk(&r, 0);
	else
		proto__parallel(c->ctx, nchunks, tpl_chunk, &r);
	if (r.failed)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the solvers' scratch");

	proto_w_obj_begin(c, NULL);
	proto_w_str(c, "model", model_names[m->model]);
	proto_w_int(c, "n_porosity", (long long)r.n_phi);
	proto_w_int(c, "n_sw", (long long)r.n_sw);
	proto_w_int(c, "n_axis3", (long long)(r.ax3_kind ? r.n_3 : 0));
	if (r.ax3_kind)
		proto_w_str(c, "axis3",
		            r.ax3_kind == RW_RM_AXIS_CLAY ? "clay" : "p_eff");
	else
		proto_w_null(c, "axis3");
	proto_w_vec(c, "porosity", PK_NONE, r.phi, r.n_phi, 1, 1);
	proto_w_vec(c, "sw", PK_NONE, r.sw, r.n_sw, 1, 1);
	if (r.ax3_kind == RW_RM_AXIS_CLAY)
		proto_w_vec(c, "clay", PK_NONE, r.ax3, r.n_3, 1, 1);
	else
		proto_w_num(c, "clay", PK_NONE, r.clay);
	if (r.ax3_kind == RW_RM_AXIS_PRESSURE)
		proto_w_vec(c, "p_eff", PK_PRESSURE, r.ax3, r.n_3, 1, 1);
	else if (up)
		proto_w_num(c, "p_eff", PK_PRESSURE, r.p_pa / 1e6);
	if (!isnan(m->coord))
		proto_w_num(c, "coordination", PK_NONE, m->coord);
	proto_w_num(c, "phi_max", PK_NONE, m->phi_max);
	proto_w_num(c, "k_fluid_brine", PK_MODULUS, spec.k_brine_pa);
	proto_w_num(c, "rho_fluid_brine", PK_DENSITY, spec.rho_brine_kgm3);
	proto_w_num(c, "k_fluid_hydrocarbon", PK_MODULUS, spec.k_hc_pa);
	proto_w_num(c, "rho_fluid_hydrocarbon", PK_DENSITY, spec.rho_hc_kgm3);
	proto_w_obj_begin(c, "crossplot");
	proto_w_str(c, "x", attr_names[a->crossplot.x]);
	proto_w_str(c, "y", attr_names[a->crossplot.y]);
	proto_w_obj_end(c);
	for (int q = 0; q < RW_RM_ATTR_COUNT; q++) {
		static const size_t off[RW_RM_ATTR_COUNT] = {
		    offsetof(rw_rm_sat, vp_ms),
		    offsetof(rw_rm_sat, vs_ms),
		    offsetof(rw_rm_sat, rho_kgm3),
		    offsetof(rw_rm_sat, ai),
		    offsetof(rw_rm_sat, si),
		    offsetof(rw_rm_sat, vpvs),
		    offsetof(rw_rm_sat, nu),
		    offsetof(rw_rm_sat, lambda_rho),
		    offsetof(rw_rm_sat, mu_rho),
		    offsetof(rw_rm_sat, k_sat_pa),
		    offsetof(rw_rm_sat, k_dry_pa),
		    offsetof(rw_rm_sat, mu_dry_pa)};
		if (proto_w_selected(c, attr_names[q]))
			write_grid(c, attr_names[q], attr_kinds[q], &r, r.nodes,
			           sizeof *r.nodes, off[q], 0);
	}
	if (proto_w_selected(c, "model_warn"))
		write_grid(c, "model_warn", PK_NONE, &r, r.warn, sizeof(double),
		           0, 0);
	write_grid(c, "qc", PK_NONE, &r, r.qc, sizeof(uint64_t), 0, 1);
	for (int iso = 1; iso >= 0; iso--) {
		const char *key = iso ? "iso_porosity" : "iso_saturation";
		if (!proto_w_selected(c, key))
			continue;
		proto_w_arr_begin(c, key);
		for (size_t k = 0; k < r.n_3; k++) {
			rw_rm_template_lines(r.nodes, r.n_phi, r.n_sw, r.n_3, k,
			                     a->crossplot.x, a->crossplot.y,
			                     iso_phi, iso_sw);
			write_lines(c, &r, iso, iso ? iso_phi : iso_sw, k);
		}
		proto_w_arr_end(c);
	}
	proto__write_tail(c);
	return 0;
}

#define GRID_SCHEMA                                                            \
	"{\"type\": \"array\", \"description\": \"[porosity][sw], or "         \
	"[axis3][porosity][sw]; null where the node failed\"}"
#define LINES_SCHEMA                                                           \
	"{\"type\": \"array\", \"items\": {\"type\": \"object\", "             \
	"\"required\": [\"x\", \"y\"], \"properties\": {\"porosity\": "        \
	"{\"type\": \"number\"}, \"sw\": {\"type\": \"number\"}, \"clay\": "   \
	"{\"type\": \"number\"}, \"p_eff\": {\"type\": \"number\"}, \"x\": "   \
	"{\"type\": \"array\", \"items\": {\"type\": [\"number\", "            \
	"\"null\"]}}, \"y\": {\"type\": \"array\", \"items\": {\"type\": "     \
	"[\"number\", \"null\"]}}}, \"additionalProperties\": false}}"
#define NUMS_REF "{\"$ref\": \"#/components/schemas/outNumbers\"}"
#define NUM_OR_NUMS                                                            \
	"{\"oneOf\": [{\"type\": \"number\"}, {\"type\": \"array\", "          \
	"\"items\": {\"type\": \"number\"}}]}"
#define TG(nm, k_, text)                                                       \
	{                                                                      \
		.name = nm, .type = PO_CUSTOM, .kind = k_, .dim = D_SAMPLE,    \
		.schema = GRID_SCHEMA, .desc = text                            \
	}
#define TR(nm, ty, k_, sch, text)                                              \
	{                                                                      \
		.name = nm, .type = ty, .kind = k_, .dim = D_REQ,              \
		.schema = sch, .desc = text                                    \
	}
static const proto_output tpl_outputs[] = {
    TR("model", PO_STR, PK_NONE, NULL, "the model"),
    TR("n_porosity", PO_INT, PK_NONE, NULL, "porosity nodes"),
    TR("n_sw", PO_INT, PK_NONE, NULL, "saturation nodes"),
    TR("n_axis3", PO_INT, PK_NONE, NULL, "third-axis nodes (0: none)"),
    TR("axis3", PO_STR, PK_NONE, NULL, "the third axis: clay, p_eff or null"),
    TR("porosity", PO_CUSTOM, PK_NONE, NUMS_REF, "the porosity axis"),
    TR("sw", PO_CUSTOM, PK_NONE, NUMS_REF, "the saturation axis"),
    TR("clay", PO_CUSTOM, PK_NONE, NUM_OR_NUMS,
       "the clay fraction, or its axis"),
    TR("p_eff", PO_CUSTOM, PK_PRESSURE, NUM_OR_NUMS,
       "the effective pressure, or its axis (pressure models)"),
    TR("coordination", PO_NUM, PK_NONE, NULL,
       "coordination number used (granular, sand and cement models)"),
    TR("phi_max", PO_NUM, PK_NONE, NULL,
       "highest porosity the model describes (null: no limit below 1)"),
    TR("k_fluid_brine", PO_NUM, PK_MODULUS, NULL, "brine bulk modulus"),
    TR("rho_fluid_brine", PO_NUM, PK_DENSITY, NULL, "brine density"),
    TR("k_fluid_hydrocarbon", PO_NUM, PK_MODULUS, NULL,
       "hydrocarbon bulk modulus"),
    TR("rho_fluid_hydrocarbon", PO_NUM, PK_DENSITY, NULL,
       "hydrocarbon density"),
    TR("crossplot", PO_CUSTOM, PK_NONE,
       "{\"type\": \"object\", \"properties\": {\"x\": {\"type\": "
       "\"string\"}, \"y\": {\"type\": \"string\"}}}",
       "the attributes of the iso-lines"),
    TG("vp", PK_VELOCITY, "P velocity at every node"),
    TG("vs", PK_VELOCITY, "S velocity"),
    TG("rho", PK_DENSITY, "bulk density"),
    TG("ai", PK_IMPEDANCE, "acoustic impedance"),
    TG("si", PK_IMPEDANCE, "shear impedance"),
    TG("vpvs", PK_NONE, "vp/vs"),
    TG("nu", PK_NONE, "Poisson's ratio"),
    TG("lambda_rho", PK_MODULUS_DENSITY, "lambda-rho"),
    TG("mu_rho", PK_MODULUS_DENSITY, "mu-rho"),
    TG("k_sat", PK_MODULUS, "saturated bulk modulus"),
    TG("k_dry", PK_MODULUS, "dry-frame bulk modulus"),
    TG("mu_dry", PK_MODULUS, "dry-frame shear modulus"),
    TG("model_warn", PK_NONE, "the model's range notes (a bit set)"),
    TR("qc", PO_CUSTOM, PK_NONE, GRID_SCHEMA, "QC flags of every node"),
    {.name = "iso_porosity",
     .type = PO_CUSTOM,
     .dim = D_SAMPLE,
     .schema = LINES_SCHEMA,
     .desc = "one line per porosity (and third-axis value): the nodes of "
             "increasing sw in the crossplot"},
    {.name = "iso_saturation",
     .type = PO_CUSTOM,
     .dim = D_SAMPLE,
     .schema = LINES_SCHEMA,
     .desc = "one line per sw (and third-axis value): the nodes of "
             "increasing porosity in the crossplot"},
    {0},
};
#undef TG
#undef TR

static const proto_method m_template = {
    .name = "rock.template",
    .summary = "A rock model over porosity x water saturation (x clay or "
               "effective pressure), with iso-lines for a crossplot.",
    .description =
        "Evaluates the model (the fields of rock.model) at every node of "
        "the porosity and sw axes, optionally x a clay or p_eff axis: "
        "every attribute as a grid [porosity][sw] ([axis3][porosity][sw] "
        "with a third axis), node QC flags, and the iso-porosity and "
        "iso-saturation lines as ordered x, y lists in the crossplot "
        "attributes, ready to draw behind logs or seismic attributes. A "
        "template is a screening interpretation; low gas saturations are "
        "not distinguishable (protocol-docs/rockmodels.md).",
    .params = &tpl_decl,
    .outputs = tpl_outputs,
    .body = tpl_body,
    .cost = 20,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- rock.invert -------------------------------------------------------- */

/* Observed attributes or their uncertainties, by name. */
typedef struct obs_set {
	proto_hdr hdr;
	proto_vec v[ATTR_OBS];
} obs_set;

#define OBS(nm, id, k_, fl, text)                                              \
	{                                                                      \
		.name = nm, .type = PT_NUMS,                                   \
		.kind = (fl)&PF_FRACTION ? PK_NONE : k_, .flags = fl,          \
		.offset = offsetof(obs_set, v) + (id) * sizeof(proto_vec),     \
		.desc = text                                                   \
	}
#define OBS_FIELDS(fl, what)                                                   \
	OBS("vp", RW_RM_ATTR_VP, PK_VELOCITY, fl, what " of vp"),              \
	    OBS("vs", RW_RM_ATTR_VS, PK_VELOCITY, fl, what " of vs"),          \
	    OBS("rho", RW_RM_ATTR_RHO, PK_DENSITY, fl,                         \
	        what " of the bulk density"),                                  \
	    OBS("ai", RW_RM_ATTR_AI, PK_IMPEDANCE, fl,                         \
	        what " of the acoustic impedance"),                            \
	    OBS("si", RW_RM_ATTR_SI, PK_IMPEDANCE, fl,                         \
	        what " of the shear impedance"),                               \
	    OBS("vpvs", RW_RM_ATTR_VPVS, PK_NONE, fl, what " of vp/vs"),       \
	    OBS("nu", RW_RM_ATTR_NU, PK_NONE, fl, what " of Poisson's ratio"), \
	    OBS("lambda_rho", RW_RM_ATTR_LAMBDA_RHO, PK_MODULUS_DENSITY, fl,   \
	        what " of lambda-rho"),                                        \
	    OBS("mu_rho", RW_RM_ATTR_MU_RHO, PK_MODULUS_DENSITY, fl,           \
	        what " of mu-rho"),                                            \
	    OBS("k_sat", RW_RM_ATTR_K_SAT, PK_MODULUS, fl,                     \
	        what " of the saturated bulk modulus")

static const proto_field obs_fields[] = {
    OBS_FIELDS(PF_NULLS, "observed values (null: a missing sample)"), {0}};
static const proto_field sigma_fields[] = {
    OBS_FIELDS(PF_LO | PF_LO_OPEN,
               "standard deviation (> 0, in the attribute's unit)"),
    {0}};
static const proto_field sigma_rel_fields[] = {
    OBS_FIELDS(PF_LO | PF_LO_OPEN | PF_FRACTION,
               "standard deviation as a fraction (0, 1] of the value"),
    {0}};
#undef OBS
#undef OBS_FIELDS

static const char *const obs_names[] = {"vp",     "vs",    "rho", "ai",
                                        "si",     "vpvs",  "nu",  "lambda_rho",
                                        "mu_rho", "k_sat", NULL};
static const proto_rule obs_rules[] = {
    {PR_AT_LEAST, NULL, 2, obs_names,
     "give two or three observed attributes (e.g. ai and vpvs)"},
    {PR_AT_MOST, NULL, 3, obs_names, "at most three observed attributes"},
    PR_LAST,
};

static const proto_decl obs_decl = {
    .name = "observations",
    .fields = obs_fields,
    .rules = obs_rules,
    .size = sizeof(obs_set),
    .desc = "observed attributes, two or three of vp, vs, rho, ai, si, "
            "vpvs, nu, lambda_rho, mu_rho, k_sat; arrays are samples, "
            "null marks a missing one",
};
static const proto_decl sigma_decl = {
    .name = "sigmaAbs",
    .fields = sigma_fields,
    .size = sizeof(obs_set),
    .desc = "standard deviations of the observations, in their units",
};
static const proto_decl sigma_rel_decl = {
    .name = "sigmaRel",
    .fields = sigma_rel_fields,
    .size = sizeof(obs_set),
    .desc = "standard deviations as fractions of the observed values",
};

typedef struct inv_args {
	proto_hdr hdr;
	rm_model m;
	obs_set observations, sigma, sigma_rel;
	int estimate_clay;
	proto_vec clay, p_eff;
	proto_vec porosity_min, porosity_max, sw_min, sw_max, clay_min,
	    clay_max;
	proto_vec starts, profile, sw_width, max_iter;
	/* derived by the check */
	size_t n_obs, n_par;
	int attr[RW_RM_INV_MAX];
	double lo[RW_RM_INV_MAX], hi[RW_RM_INV_MAX];
	int uses_p;
} inv_args;

#define SC (PF_SCALAR | PF_DFLT)
static const proto_field inv_fields[] = {
    MODEL_FIELDS(inv_args),
    {PROTO_FIELD(inv_args, observations, PT_OBJ, PF_REQ,
                 "the observed attributes (two or three)"),
     .sub = &obs_decl},
    {PROTO_FIELD(inv_args, sigma, PT_OBJ, 0,
                 "absolute standard deviations per observed attribute"),
     .sub = &sigma_decl},
    {PROTO_FIELD(inv_args, sigma_rel, PT_OBJ, 0,
                 "relative standard deviations per observed attribute"),
     .sub = &sigma_rel_decl},
    {.name = "estimate_clay",
     .type = PT_BOOL,
     .flags = PF_DFLT,
     .offset = offsetof(inv_args, estimate_clay),
     .desc = "estimate the clay fraction too (needs three observations; "
             "default false)"},
    {PROTO_NUMS(inv_args, clay, PK_NONE, PF_NULLS | PF_FRACTION | PF_DFLT,
                "clay fraction of the solid when it is not estimated "
                "(default 0)"),
     .dflt = 0},
    {PROTO_NUMS(inv_args, p_eff, PK_PRESSURE, PF_NULLS | PF_LO,
                "effective pressure: required by the Hertz-Mindlin based "
                "models, refused by the others"),
     .lo = 0},
    {PROTO_NUMS(inv_args, porosity_min, PK_NONE, SC | PF_FRACTION,
                "lowest porosity searched (default 0.01; one search box "
                "for the request)"),
     .dflt = 0.01},
    {PROTO_NUMS(inv_args, porosity_max, PK_NONE,
                PF_SCALAR | PF_FRACTION | PF_HI | PF_HI_OPEN,
                "highest porosity searched (default the model's phi_max, "
                "else 0.5)"),
     .hi = 1},
    {PROTO_NUMS(inv_args, sw_min, PK_NONE, SC | PF_FRACTION,
                "lowest water saturation searched (default 0)"),
     .dflt = 0},
    {PROTO_NUMS(inv_args, sw_max, PK_NONE, SC | PF_FRACTION,
                "highest water saturation searched (default 1)"),
     .dflt = 1},
    {PROTO_NUMS(inv_args, clay_min, PK_NONE, SC | PF_FRACTION,
                "lowest clay fraction searched (estimate_clay; default 0)"),
     .dflt = 0},
    {PROTO_NUMS(inv_args, clay_max, PK_NONE, SC | PF_FRACTION,
                "highest clay fraction searched (estimate_clay; default "
                "0.6)"),
     .dflt = 0.6},
    {PROTO_NUMS(inv_args, starts, PK_NONE, SC | PF_INT | PF_LO | PF_HI,
                "starting saturations spread over the sw range (1-64, "
                "default 3; one search setup for the request)"),
     .dflt = 3, .lo = 1, .hi = RW_RM_INV_MAX_STARTS},
    {PROTO_NUMS(inv_args, profile, PK_NONE, SC | PF_INT | PF_LO | PF_HI,
                "saturation profile nodes for the sw range: 0 (none) or "
                "3-201 (default 11)"),
     .dflt = 11, .lo = 0, .hi = RW_RM_INV_MAX_PROFILE},
    {PROTO_NUMS(inv_args, sw_width, PK_NONE, SC | PF_LO | PF_LO_OPEN | PF_HI,
                "sw range (68 %) wider than this is flagged "
                "inv_nonunique (default 0.2)"),
     .dflt = 0.2, .lo = 0, .hi = 1},
    {PROTO_NUMS(inv_args, max_iter, PK_NONE, SC | PF_INT | PF_LO | PF_HI,
                "iterations per start (default 100)"),
     .dflt = 100, .lo = 1, .hi = 1000},
    {0},
};
#undef SC

static const proto_decl inv_decl;

static int inv_check(proto_call *c, void *dst)
{
	inv_args *a = dst;
	rm_model *m = &a->m;
	int any_abs = a->sigma.hdr.present, any_rel = a->sigma_rel.hdr.present;
	double top;

	if (model_check(c, &inv_decl, a, m) ||
	    p_eff_check(c, m->model, &a->p_eff))
		return -1;
	a->uses_p = rw_rm_model_uses_pressure(m->model);
	if ((m->model == RW_RM_DEM || m->model == RW_RM_XU_WHITE ||
	     m->model == RW_RM_SELF_CONSISTENT) &&
	    m->tolerance.v[0] > 1e-9)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "tolerance",
		    "%.3g is too loose for the inversion: its "
		    "Jacobian is a finite difference of step 1e-6, "
		    "so the %s model needs tolerance <= 1e-9",
		    m->tolerance.v[0], model_names[m->model]);
	a->n_obs = 0;
	for (int q = 0; q < ATTR_OBS; q++) {
		int obs = a->observations.v[q].present;
		int ab = a->sigma.v[q].present, rel = a->sigma_rel.v[q].present;
		if (!obs && (ab || rel))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, ab ? "sigma." : "sigma_rel.",
			               obs_names[q], ""),
			    "%s is not observed", obs_names[q]);
		if (!obs)
			continue;
		if (ab && rel)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, "sigma_rel.", obs_names[q], ""),
			    "give sigma.%s or sigma_rel.%s, not both",
			    obs_names[q], obs_names[q]);
		if (!ab && !rel)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c,
			               any_rel && !any_abs ? "sigma_rel."
			                                   : "sigma.",
			               obs_names[q], ""),
			    "required: the uncertainty of every observed "
			    "attribute (sigma.%s in its unit, or sigma_rel.%s "
			    "as a fraction)",
			    obs_names[q], obs_names[q]);
		a->attr[a->n_obs++] = q;
	}
	a->n_par = a->estimate_clay ? 3 : 2;
	if (a->estimate_clay && a->n_obs < 3)
		return proto_fail(c, PROTO_INVALID_PARAMS, "estimate_clay",
		                  "three parameters need three observed "
		                  "attributes (%zu given)",
		                  a->n_obs);
	if (a->estimate_clay &&
	    refuse_unused(c, &inv_decl, a, "clay",
	                  "not used: clay is estimated (estimate_clay)"))
		return -1;
	if (!a->estimate_clay &&
	    (refuse_unused(c, &inv_decl, a, "clay_min",
	                   "only used with estimate_clay") ||
	     refuse_unused(c, &inv_decl, a, "clay_max",
	                   "only used with estimate_clay")))
		return -1;
	if (a->profile.v[0] == 1 || a->profile.v[0] == 2)
		return proto_fail(c, PROTO_INVALID_PARAMS, "profile",
		                  "%g nodes: give 0 (no profile) or 3 to %d",
		                  a->profile.v[0], RW_RM_INV_MAX_PROFILE);
	top = isnan(m->phi_max) ? 0.5 : m->phi_max;
	a->lo[RW_RM_PAR_PHI] = a->porosity_min.v[0];
	a->hi[RW_RM_PAR_PHI] =
	    a->porosity_max.present ? a->porosity_max.v[0] : top;
	a->lo[RW_RM_PAR_SW] = a->sw_min.v[0];
	a->hi[RW_RM_PAR_SW] = a->sw_max.v[0];
	a->lo[RW_RM_PAR_CLAY] = a->clay_min.v[0];
	a->hi[RW_RM_PAR_CLAY] = a->clay_max.v[0];
	for (size_t j = 0; j < a->n_par; j++) {
		static const char *const nm[3] = {"porosity", "sw", "clay"};
		if (!(a->hi[j] > a->lo[j]))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, nm[j],
			               j == RW_RM_PAR_PHI &&
			                       !a->porosity_max.present
			                   ? "_min"
			                   : "_max",
			               ""),
			    "the %s range [%.9g, %.9g] is empty: the maximum "
			    "must be above the minimum",
			    nm[j], a->lo[j], a->hi[j]);
	}
	if (!isnan(m->phi_max) && a->hi[RW_RM_PAR_PHI] > m->phi_max)
		proto_warn(
		    c, "porosity_max",
		    "%.4g is above %.4g, the highest porosity the %s "
		    "model describes: estimates there are continued past "
		    "the model (flagged model_outside_range) or kept out by "
		    "the "
		    "model's failure",
		    a->hi[RW_RM_PAR_PHI], m->phi_max, model_names[m->model]);
	return 0;
}

static const proto_decl inv_decl = {
    .name = "",
    .fields = inv_fields,
    .size = sizeof(inv_args),
    .check = inv_check,
};

/* The work of an inversion: each sample is a fit from every start and
 * at every profile node, for the --max-work limit. */
static int inv_prepare(proto_call *c, void *args, proto_shape *sh)
{
	const inv_args *a = args;
	size_t fits = (size_t)a->starts.v[0] + (size_t)a->profile.v[0];
	if (sh->n > SIZE_MAX / fits)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "the request's size overflows");
	return proto_check_size(c, sh->n, sh->n * fits);
}

static int inv_ws_init(const void *args, void *ws)
{
	const inv_args *a = args;
	((rm_scratch *)ws)->ws = rw_rm_ws_new(a->n_obs, a->n_par);
	return ((rm_scratch *)ws)->ws == NULL;
}

typedef struct inv_row {
	double x[RW_RM_INV_MAX], sd[RW_RM_INV_MAX];
	double corr[3]; /* porosity-sw, porosity-clay, sw-clay */
	double chi2, sw_lo, sw_hi;
	double alt[RW_RM_INV_MAX], alt_chi2;
	double fit[ATTR_OBS];
	double n_eval, warn;
	const char *bound;
	uint64_t qc;
} inv_row;

/* Which parameters lie on a bound (bits phi 1, sw 2, clay 4). */
static const char *const bound_names[8] = {
    NULL,   "porosity",      "sw",      "porosity,sw",
    "clay", "porosity,clay", "sw,clay", "porosity,sw,clay"};

/* An observation no rock can have: non-positive where the attribute is
 * positive, Poisson's ratio outside (-1, 0.5). */
static int obs_valid(int attr, double v)
{
	if (attr == RW_RM_ATTR_NU)
		return v > -1.0 && v < 0.5;
	if (attr == RW_RM_ATTR_LAMBDA_RHO)
		return 1;
	return v > 0.0;
}

static int inv_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const inv_args *a = args;
	inv_row *r = row;
	rw_rm_spec sp = a->m.spec;
	rw_rm_inv_cfg cfg;
	rw_rm_inv_result res;
	double obs[RW_RM_INV_MAX], sig[RW_RM_INV_MAX];
	double clay = a->estimate_clay ? 0.0 : proto_at(&a->clay, i);
	double p = a->uses_p ? proto_at(&a->p_eff, i) : 0.0;
	unsigned f, b = 0;
	int bad = 0;

	for (size_t q = 0; q < a->n_obs; q++) {
		int at = a->attr[q];
		obs[q] = proto_at(&a->observations.v[at], i);
		sig[q] = a->sigma.v[at].present
		             ? proto_at(&a->sigma.v[at], i)
		             : proto_at(&a->sigma_rel.v[at], i) * fabs(obs[q]);
		if (isnan(obs[q]))
			*qc |= QC_LOG_MISSING;
		else if (!obs_valid(at, obs[q]) || !(sig[q] > 0))
			bad = 1;
	}
	if (isnan(clay) || isnan(p))
		*qc |= QC_LOG_MISSING;
	if (*qc & QC_LOG_MISSING)
		return 0;
	if (bad) {
		*qc |= QC_INPUT_INVALID;
		return 0;
	}
	if (!sample_fluids(&a->m, i, &sp, qc))
		return 0;
	memset(&cfg, 0, sizeof cfg);
	cfg.spec = &sp;
	cfg.n_obs = a->n_obs;
	cfg.n_par = a->n_par;
	for (size_t q = 0; q < a->n_obs; q++)
		cfg.attr[q] = a->attr[q];
	for (int j = 0; j < RW_RM_INV_MAX; j++) {
		cfg.lo[j] = a->lo[j];
		cfg.hi[j] = a->hi[j];
	}
	cfg.clay = clay;
	cfg.p_eff_pa = p * 1e6;
	cfg.n_starts = (unsigned)a->starts.v[0];
	cfg.n_profile = (unsigned)a->profile.v[0];
	cfg.max_iter = (unsigned)a->max_iter.v[0];
	cfg.sw_width_max = a->sw_width.v[0];
	if (rw_rm_invert(&cfg, obs, sig, ((rm_scratch *)ws)->ws, &res) !=
	    RW_OK) {
		*qc |= QC_INPUT_INVALID;
		return 0;
	}
	f = res.flags;
	if (f & RW_RM_INV_NONUNIQUE)
		*qc |= QC_INV_NONUNIQUE;
	if (f & RW_RM_INV_MULTIPLE)
		*qc |= QC_INV_MULTIPLE;
	if (f &
	    (RW_RM_INV_BOUND_PHI | RW_RM_INV_BOUND_SW | RW_RM_INV_BOUND_CLAY))
		*qc |= QC_INV_BOUND;
	if (f & RW_RM_INV_OUTSIDE)
		*qc |= QC_INV_OUTSIDE;
	if (f & RW_RM_INV_NOT_CONVERGED)
		*qc |= QC_NOT_CONVERGED;
	if (f & RW_RM_INV_MODEL_FAIL)
		*qc |= QC_MODEL_RANGE;
	*qc |= warn_qc(res.model_warn);
	b = (f & RW_RM_INV_BOUND_PHI ? 1u : 0u) |
	    (f & RW_RM_INV_BOUND_SW ? 2u : 0u) |
	    (f & RW_RM_INV_BOUND_CLAY ? 4u : 0u);
	r->bound = bound_names[b];
	r->warn = (double)res.model_warn;
	r->n_eval = (double)res.n_eval;
	if (!isfinite(rw_rm_attr_get(&res.fit, a->attr[0]))) {
		/* the model has no value at the best point reached */
		*qc |= QC_MODEL_RANGE;
		return 0;
	}
	for (int j = 0; j < RW_RM_INV_MAX; j++) {
		r->x[j] = res.x[j];
		r->sd[j] = res.sd[j];
		r->alt[j] = res.alt_x[j];
	}
	r->corr[0] = res.cov[0][1] / (res.sd[0] * res.sd[1]);
	if (a->n_par == 3) {
		r->corr[1] = res.cov[0][2] / (res.sd[0] * res.sd[2]);
		r->corr[2] = res.cov[1][2] / (res.sd[1] * res.sd[2]);
	}
	r->chi2 = res.chi2;
	r->sw_lo = res.sw_lo;
	r->sw_hi = res.sw_hi;
	r->alt_chi2 = res.alt_chi2;
	for (size_t q = 0; q < a->n_obs; q++)
		r->fit[a->attr[q]] = rw_rm_attr_get(&res.fit, a->attr[q]);
	return 0;
}

static int est_clay(const void *a)
{
	return ((const inv_args *)a)->estimate_clay;
}
static int inv_uses_p(const void *a)
{
	return ((const inv_args *)a)->uses_p;
}
static int observed(const void *args, int at)
{
	return ((const inv_args *)args)->observations.v[at].present;
}
#define OBSERVED(id)                                                           \
	static int obs_##id(const void *a)                                     \
	{                                                                      \
		return observed(a, RW_RM_ATTR_##id);                           \
	}
OBSERVED(VP)
OBSERVED(VS)
OBSERVED(RHO)
OBSERVED(AI)
OBSERVED(SI)
OBSERVED(VPVS)
OBSERVED(NU)
OBSERVED(LAMBDA_RHO)
OBSERVED(MU_RHO)
OBSERVED(K_SAT)
#undef OBSERVED

static void write_attributes(proto_call *c, const char *key, const void *args)
{
	const inv_args *a = args;
	proto_w_arr_begin(c, key);
	for (size_t q = 0; q < a->n_obs; q++)
		proto_w_str(c, NULL, obs_names[a->attr[q]]);
	proto_w_arr_end(c);
}

static void write_bounds(proto_call *c, const char *key, const void *args)
{
	const inv_args *a = args;
	static const char *const nm[3] = {"porosity", "sw", "clay"};
	proto_w_obj_begin(c, key);
	for (size_t j = 0; j < a->n_par; j++) {
		proto_w_arr_begin(c, nm[j]);
		proto_w_num(c, NULL, PK_NONE, a->lo[j]);
		proto_w_num(c, NULL, PK_NONE, a->hi[j]);
		proto_w_arr_end(c);
	}
	proto_w_obj_end(c);
}

#define IO(nm, member, k_, w, text)                                            \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(inv_row, member), .when = w, .desc = text   \
	}
#define FIT(nm, id, k_)                                                        \
	IO("fit_" nm, fit[RW_RM_ATTR_##id], k_, obs_##id,                      \
	   "the model's " nm " at the estimate")
static const proto_output inv_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "model",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(inv_args, m.model),
     .choices = model_names,
     .desc = "the model"},
    {.name = "attributes",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_attributes,
     .schema = "{\"type\": \"array\", \"items\": {\"type\": \"string\"}}",
     .desc = "the observed attributes, in this order"},
    {.name = "bounds",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_bounds,
     .schema = "{\"type\": \"object\", \"additionalProperties\": "
               "{\"type\": \"array\", \"items\": {\"type\": \"number\"}}}",
     .desc = "the search box: [min, max] of each estimated parameter"},
    {.name = "p_eff",
     .type = PO_VEC,
     .kind = PK_PRESSURE,
     .dim = D_REQ,
     .offset = offsetof(inv_args, p_eff),
     .when = inv_uses_p,
     .desc = "effective pressure (echoed)"},
    IO("porosity", x[RW_RM_PAR_PHI], PK_NONE, NULL, "estimated porosity"),
    IO("sw", x[RW_RM_PAR_SW], PK_NONE, NULL, "estimated water saturation"),
    IO("clay", x[RW_RM_PAR_CLAY], PK_NONE, est_clay, "estimated clay"),
    IO("porosity_sd", sd[RW_RM_PAR_PHI], PK_NONE, NULL,
       "standard deviation of porosity (linearised; null: not "
       "constrained)"),
    IO("sw_sd", sd[RW_RM_PAR_SW], PK_NONE, NULL,
       "standard deviation of sw (linearised; null: not constrained)"),
    IO("clay_sd", sd[RW_RM_PAR_CLAY], PK_NONE, est_clay,
       "standard deviation of clay"),
    IO("corr_porosity_sw", corr[0], PK_NONE, NULL,
       "correlation of the porosity and sw estimates"),
    IO("corr_porosity_clay", corr[1], PK_NONE, est_clay,
       "correlation of porosity and clay"),
    IO("corr_sw_clay", corr[2], PK_NONE, est_clay,
       "correlation of sw and clay"),
    IO("chi2", chi2, PK_NONE, NULL,
       "misfit: sum of squared residuals in standard deviations"),
    IO("sw_lo", sw_lo, PK_NONE, NULL, "lower end of the 68 % sw range"),
    IO("sw_hi", sw_hi, PK_NONE, NULL, "upper end of the 68 % sw range"),
    IO("alt_porosity", alt[RW_RM_PAR_PHI], PK_NONE, NULL,
       "porosity of a distinct second solution (inv_multiple)"),
    IO("alt_sw", alt[RW_RM_PAR_SW], PK_NONE, NULL, "sw of the second solution"),
    IO("alt_clay", alt[RW_RM_PAR_CLAY], PK_NONE, est_clay,
       "clay of the second solution"),
    IO("alt_chi2", alt_chi2, PK_NONE, NULL, "misfit of the second solution"),
    FIT("vp", VP, PK_VELOCITY),
    FIT("vs", VS, PK_VELOCITY),
    FIT("rho", RHO, PK_DENSITY),
    FIT("ai", AI, PK_IMPEDANCE),
    FIT("si", SI, PK_IMPEDANCE),
    FIT("vpvs", VPVS, PK_NONE),
    FIT("nu", NU, PK_NONE),
    FIT("lambda_rho", LAMBDA_RHO, PK_MODULUS_DENSITY),
    FIT("mu_rho", MU_RHO, PK_MODULUS_DENSITY),
    FIT("k_sat", K_SAT, PK_MODULUS),
    {.name = "bound",
     .type = PO_STR,
     .offset = offsetof(inv_row, bound),
     .desc = "the estimated parameters on a bound of the search box "
             "(null: none)"},
    IO("n_eval", n_eval, PK_NONE, NULL, "model evaluations used"),
    IO("model_warn", warn, PK_NONE, NULL,
       "the model's range notes at the estimate (a bit set)"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(inv_row, qc),
     .desc = "QC flags"},
    {0},
};
#undef IO
#undef FIT

static const proto_method m_invert = {
    .name = "rock.invert",
    .summary = "Porosity and water saturation (optionally clay) from two "
               "or three observed attributes on a rock model.",
    .description =
        "Per sample, weighted nonlinear least squares on the model (the "
        "fields of rock.model) with GSL's trust-region solver inside the "
        "search box, from several starting saturations: the estimate, "
        "its linearised standard deviations and correlation, the misfit, "
        "the 68 % sw range from a profile, a distinct second solution "
        "where one fits, and flags where the answer is not unique (low "
        "gas saturations), lies on a bound or the observation is outside "
        "the model. A screening interpretation (protocol-docs/"
        "rockmodels.md).",
    .params = &inv_decl,
    .outputs = inv_outputs,
    .prepare = inv_prepare,
    .kernel = inv_kernel,
    .row_size = sizeof(inv_row),
    .qc_offset = offsetof(inv_row, qc),
    .ws_size = sizeof(rm_scratch),
    .ws_init = inv_ws_init,
    .ws_free = scratch_free,
    .cost = 8000,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- rock.pressure_fit -------------------------------------------------- */

typedef struct pfit_sigma {
	proto_hdr hdr;
	proto_vec modulus, velocity;
} pfit_sigma;

static const proto_field pfit_sigma_fields[] = {
    {PROTO_NUMS(pfit_sigma, modulus, PK_MODULUS, PF_LO | PF_LO_OPEN,
                "standard deviation of each modulus (> 0)"),
     .lo = 0},
    {PROTO_NUMS(pfit_sigma, velocity, PK_VELOCITY, PF_LO | PF_LO_OPEN,
                "standard deviation of each velocity (> 0)"),
     .lo = 0},
    {0},
};
static const char *const pfit_quantities[] = {"modulus", "velocity", NULL};
static const proto_rule pfit_sigma_rules[] = {
    {PR_AT_MOST, NULL, 1, pfit_quantities,
     "give the uncertainty of the measured quantity only"},
    PR_LAST,
};
static const proto_decl pfit_sigma_decl = {
    .name = "pressureFitSigma",
    .fields = pfit_sigma_fields,
    .rules = pfit_sigma_rules,
    .size = sizeof(pfit_sigma),
    .desc = "standard deviations of the measurements, {modulus} or "
            "{velocity}: a number or one per measurement",
};

typedef struct pfit_args {
	proto_hdr hdr;
	proto_vec p_eff, modulus, velocity;
	pfit_sigma sigma;
	proto_vec at;
} pfit_args;

static const proto_field pfit_fields[] = {
    {PROTO_NUMS(pfit_args, p_eff, PK_PRESSURE, PF_REQ | PF_ARRAY | PF_LO,
                "effective pressure of each core measurement"),
     .lo = 0},
    {PROTO_NUMS(pfit_args, modulus, PK_MODULUS, PF_ARRAY | PF_LO | PF_LO_OPEN,
                "measured dry-frame modulus (K or mu) at each pressure"),
     .lo = 0},
    {PROTO_NUMS(pfit_args, velocity, PK_VELOCITY, PF_ARRAY | PF_LO | PF_LO_OPEN,
                "measured dry velocity (vp or vs) at each pressure, "
                "instead of a modulus"),
     .lo = 0},
    {PROTO_FIELD(pfit_args, sigma, PT_OBJ, 0,
                 "measurement standard deviations (default: equal weights, "
                 "covariance scaled by the residuals)"),
     .sub = &pfit_sigma_decl},
    {PROTO_NUMS(pfit_args, at, PK_PRESSURE, PF_LO,
                "effective pressures to evaluate the fitted law at"),
     .lo = 0, .group = 1},
    {0},
};

static const proto_rule pfit_rules[] = {
    {PR_EXACTLY, NULL, 1, pfit_quantities,
     "give the measured modulus or the measured velocity (one of them)"},
    PR_LAST,
};

static int pfit_check(proto_call *c, void *dst)
{
	pfit_args *a = dst;
	int vel = a->velocity.present;

	if (a->sigma.hdr.present &&
	    (vel ? a->sigma.modulus.present : a->sigma.velocity.present))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  vel ? "sigma.modulus" : "sigma.velocity",
		                  "the data are %s: give sigma.%s",
		                  vel ? "velocities" : "moduli",
		                  vel ? "velocity" : "modulus");
	if (a->sigma.hdr.present && !a->sigma.modulus.present &&
	    !a->sigma.velocity.present)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  vel ? "sigma.velocity" : "sigma.modulus",
		                  "required in sigma");
	if (a->p_eff.n < 3)
		return proto_fail(c, PROTO_INVALID_PARAMS, "p_eff",
		                  "%zu measurements: the law has three "
		                  "parameters, give at least 3",
		                  a->p_eff.n);
	return 0;
}

static const proto_decl pfit_decl = {
    .name = "",
    .fields = pfit_fields,
    .rules = pfit_rules,
    .size = sizeof(pfit_args),
    .check = pfit_check,
};

static int pfit_body(proto_call *c, void *args)
{
	const pfit_args *a = args;
	int vel = a->velocity.present;
	proto_kind k = vel ? PK_VELOCITY : PK_MODULUS;
	const proto_vec *data = vel ? &a->velocity : &a->modulus;
	const proto_vec *sv = vel ? &a->sigma.velocity : &a->sigma.modulus;
	size_t n = a->p_eff.n, na = a->at.present ? a->at.n : 0;
	double *p = proto_alloc_doubles(c, n), *s = NULL, *fit, *res;
	double *pred = NULL, *pred_sd = NULL, corr[3];
	uint64_t *pq = NULL;
	rw_rm_pfit f;
	unsigned w = 0;
	size_t n_extrap = 0;
	int st;

	fit = proto_alloc_doubles(c, n);
	res = proto_alloc_doubles(c, n);
	if (sv->present)
		s = proto_alloc_doubles(c, n);
	if (na) {
		pred = proto_alloc_doubles(c, na);
		pred_sd = proto_alloc_doubles(c, na);
		pq = proto_alloc(c, na * sizeof *pq);
	}
	if (!p || !fit || !res || (sv->present && !s) ||
	    (na && (!pred || !pred_sd || !pq)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < n; i++) {
		p[i] = a->p_eff.v[i] * 1e6;
		if (s)
			s[i] = proto_at(sv, i);
	}
	st = rw_rm_plaw_fit(n, p, data->v, s, &f, &w);
	if (st == RW_EINVAL)
		return proto_fail(c, PROTO_INVALID_PARAMS, "p_eff",
		                  "fewer than 3 distinct pressures: the law's "
		                  "three parameters are not determined");
	if (st == RW_EMAXITER)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, vel ? "velocity" : "modulus",
		    "the exponential law M = m_inf - (m_inf - "
		    "m_0) exp(-P/p_c) could not be fitted in 200 "
		    "iterations: the data may not follow it "
		    "(decreasing with pressure, or no curvature)");
	if (st != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  vel ? "velocity" : "modulus",
		                  "the data cannot be fitted by the law");
	for (size_t i = 0; i < n; i++) {
		rw_rm_plaw_eval(&f.law, p[i], &fit[i], NULL);
		res[i] = data->v[i] - fit[i];
	}
	{
		double sd0 = sqrt(f.cov[0][0]), sd1 = sqrt(f.cov[1][1]);
		double sd2 = sqrt(f.cov[2][2]);
		corr[0] = f.cov[0][1] / (sd0 * sd1);
		corr[1] = f.cov[0][2] / (sd0 * sd2);
		corr[2] = f.cov[1][2] / (sd1 * sd2);
	}
	for (size_t i = 0; i < na; i++) {
		double pp = proto_at(&a->at, i) * 1e6, e, g[3], var = 0;
		unsigned pw = 0;
		rw_rm_plaw_eval(&f.law, pp, &pred[i], &pw);
		/* linear propagation of the covariance (delta method) */
		e = exp(-pp / f.law.p_c_pa);
		g[0] = 1.0 - e;
		g[1] = e;
		g[2] = -(f.law.m_inf_pa - f.law.m_0_pa) * e * pp /
		       (f.law.p_c_pa * f.law.p_c_pa);
		for (int r = 0; r < 3; r++)
			for (int q = 0; q < 3; q++)
				var += g[r] * f.cov[r][q] * g[q];
		pred_sd[i] = var >= 0 ? sqrt(var) : NAN;
		pq[i] = pw & RW_RM_WARN_P_EXTRAP ? QC_MODEL_RANGE : 0;
		n_extrap += pq[i] != 0;
	}
	if (w & RW_RM_WARN_P_EXTRAP)
		proto_warn(c, NULL,
		           "the fitted p_c (%.4g MPa) lies above the highest "
		           "measured pressure (%.4g MPa): m_inf is an "
		           "extrapolation, not a measured plateau",
		           f.law.p_c_pa / 1e6, f.law.p_hi_pa / 1e6);
	if (n_extrap)
		proto_warn(c, "at",
		           "%zu of %zu pressures lie outside the measured %.4g "
		           "to %.4g MPa: those predictions are extrapolated "
		           "(flagged model_outside_range)",
		           n_extrap, na, f.law.p_lo_pa / 1e6,
		           f.law.p_hi_pa / 1e6);
	if (!s && f.dof == 0)
		proto_warn(c, NULL,
		           "3 measurements and 3 parameters: the law passes "
		           "through them and without sigma its uncertainty is "
		           "unknown (null)");

	proto_w_obj_begin(c, NULL);
	proto_w_str(c, "quantity", vel ? "velocity" : "modulus");
	proto_w_int(c, "n", (long long)n);
	proto_w_num(c, "m_inf", k, f.law.m_inf_pa);
	proto_w_num(c, "m_0", k, f.law.m_0_pa);
	proto_w_num(c, "p_c", PK_PRESSURE, f.law.p_c_pa / 1e6);
	proto_w_num(c, "m_inf_sd", k, sqrt(f.cov[0][0]));
	proto_w_num(c, "m_0_sd", k, sqrt(f.cov[1][1]));
	proto_w_num(c, "p_c_sd", PK_PRESSURE, sqrt(f.cov[2][2]) / 1e6);
	proto_w_num(c, "corr_m_inf_m_0", PK_NONE, corr[0]);
	proto_w_num(c, "corr_m_inf_p_c", PK_NONE, corr[1]);
	proto_w_num(c, "corr_m_0_p_c", PK_NONE, corr[2]);
	proto_w_num(c, "chi2", PK_NONE, s ? f.chi2 : NAN);
	proto_w_int(c, "dof", (long long)f.dof);
	proto_w_num(c, "rms", k, f.rms_pa);
	proto_w_bool(c, "weighted", s != NULL);
	proto_w_int(c, "n_iter", (long long)f.n_iter);
	proto_w_num(c, "p_lo", PK_PRESSURE, f.law.p_lo_pa / 1e6);
	proto_w_num(c, "p_hi", PK_PRESSURE, f.law.p_hi_pa / 1e6);
	proto_w_bool(c, "p_c_beyond_data", (w & RW_RM_WARN_P_EXTRAP) != 0);
	proto_w_vec(c, "fitted", k, fit, n, 1, 1);
	proto_w_vec(c, "residual", k, res, n, 1, 1);
	if (na) {
		proto_w_vec(c, "at", PK_PRESSURE, a->at.v, na,
		            a->at.n == 1 ? 0 : 1, a->at.is_array);
		proto_w_vec(c, "predicted", k, pred, na, 1, a->at.is_array);
		proto_w_vec(c, "predicted_sd", k, pred_sd, na, 1,
		            a->at.is_array);
		proto_w_flag_rows(c, "qc", pq, sizeof *pq, 0, na,
		                  a->at.is_array);
	}
	proto__write_tail(c);
	return 0;
}

#define PR(nm, ty, k_, text)                                                   \
	{                                                                      \
		.name = nm, .type = ty, .kind = k_, .dim = D_REQ, .desc = text \
	}
#define PA(nm, k_, text)                                                       \
	{                                                                      \
		.name = nm, .type = PO_CUSTOM, .kind = k_, .dim = D_SAMPLE,    \
		.schema = NUMS_REF, .desc = text                               \
	}
static const proto_output pfit_outputs[] = {
    PR("quantity", PO_STR, PK_NONE, "modulus or velocity: what was fitted"),
    PR("n", PO_INT, PK_NONE, "measurements"),
    PR("m_inf", PO_NUM, PK_NONE,
       "high-pressure asymptote (in the unit of the data)"),
    PR("m_0", PO_NUM, PK_NONE, "value at zero effective pressure"),
    PR("p_c", PO_NUM, PK_PRESSURE, "characteristic pressure"),
    PR("m_inf_sd", PO_NUM, PK_NONE, "standard deviation of m_inf"),
    PR("m_0_sd", PO_NUM, PK_NONE, "standard deviation of m_0"),
    PR("p_c_sd", PO_NUM, PK_PRESSURE, "standard deviation of p_c"),
    PR("corr_m_inf_m_0", PO_NUM, PK_NONE, "correlation of m_inf and m_0"),
    PR("corr_m_inf_p_c", PO_NUM, PK_NONE, "correlation of m_inf and p_c"),
    PR("corr_m_0_p_c", PO_NUM, PK_NONE, "correlation of m_0 and p_c"),
    PR("chi2", PO_NUM, PK_NONE,
       "sum of squared residuals in standard deviations (null when not "
       "weighted: see rms)"),
    PR("dof", PO_INT, PK_NONE, "degrees of freedom, n - 3"),
    PR("rms", PO_NUM, PK_NONE, "root-mean-square residual (unit of the data)"),
    PR("weighted", PO_BOOL, PK_NONE,
       "sigma was given: the covariance is absolute (else scaled by "
       "chi2/dof)"),
    PR("n_iter", PO_INT, PK_NONE, "iterations of the fit"),
    PR("p_lo", PO_NUM, PK_PRESSURE, "lowest measured pressure"),
    PR("p_hi", PO_NUM, PK_PRESSURE, "highest measured pressure"),
    PR("p_c_beyond_data", PO_BOOL, PK_NONE,
       "p_c lies above the highest measured pressure: m_inf is "
       "extrapolated"),
    PA("fitted", PK_NONE, "the law at each measured pressure"),
    PA("residual", PK_NONE, "measured minus fitted"),
    PA("at", PK_PRESSURE, "the pressures evaluated (with at)"),
    PA("predicted", PK_NONE, "the law at each pressure of at"),
    PA("predicted_sd", PK_NONE,
       "standard deviation of each prediction (linear propagation)"),
    {.name = "qc",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = "{\"$ref\": \"#/components/schemas/qc\"}",
     .desc = "QC flags of each prediction (with at; model_outside_range: "
             "extrapolated)"},
    {0},
};
#undef PR
#undef PA

static const proto_method m_pressure_fit = {
    .name = "rock.pressure_fit",
    .summary = "The exponential dry-frame pressure law fitted to core "
               "measurements.",
    .description =
        "Fits M(P) = m_inf - (m_inf - m_0) exp(-P / p_c) (common "
        "practice) to dry-core moduli or velocities at n >= 3 effective "
        "pressures by nonlinear least squares (GSL), with covariance, "
        "residuals and optional predictions at other pressures; every "
        "prediction outside the measured range is flagged. A "
        "calibration of one sample, not of the formation "
        "(protocol-docs/rockmodels.md).",
    .params = &pfit_decl,
    .outputs = pfit_outputs,
    .body = pfit_body,
    .flags = PM_NO_UNCERTAINTY,
};

const proto_method *const proto_rockmodel_methods[] = {
    &m_model, &m_template, &m_invert, &m_pressure_fit, NULL};
