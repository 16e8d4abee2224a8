/* rock.empirical: the empirical velocity, density and porosity relations of
 * the core through the protocol, per sample with broadcasting: Gardner et
 * al. 1974 density (and its inverse), the Castagna et al. 1985 mudrock
 * line, Greenberg & Castagna 1992 shear velocity by lithology, the Han et
 * al. 1986 sandstone fits, the Wyllie et al. 1956 time average and the
 * Raymer, Hunt & Gardner 1980 transform. Also the lithology description
 * shared with log.process (proto_lith_decl). */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/empirical.h"

/* ---- lithology ---------------------------------------------------------- */

static const char *const lith_names[RW_EMP_NLITH + 1] = {
    [RW_EMP_SANDSTONE] = "sandstone",
    [RW_EMP_LIMESTONE] = "limestone",
    [RW_EMP_DOLOMITE] = "dolomite",
    [RW_EMP_SHALE] = "shale",
    [RW_EMP_NLITH] = NULL,
};

#define L(id, nm)                                                              \
	{                                                                      \
		.name = nm, .type = PT_NUMS, .flags = PF_FRACTION,             \
		.offset =                                                      \
		    offsetof(proto_lith, frac) + (id) * sizeof(proto_vec),     \
		.desc = "volume fraction of " nm                               \
	}
static const proto_field lith_fields[] = {
    L(RW_EMP_SANDSTONE, "sandstone"),
    L(RW_EMP_LIMESTONE, "limestone"),
    L(RW_EMP_DOLOMITE, "dolomite"),
    L(RW_EMP_SHALE, "shale"),
    {0},
};
#undef L

static int lith_from_string(proto_call *c, const char *s, const char *path,
                            void *dst)
{
	static const double one = 1.0;
	proto_lith *l = dst;
	const char *near;

	for (int i = 0; i < RW_EMP_NLITH; i++)
		if (strcmp(s, lith_names[i]) == 0) {
			l->frac[i].v = &one;
			l->frac[i].n = 1;
			l->frac[i].present = 1;
			return 0;
		}
	near = proto__suggest(s, lith_names, RW_EMP_NLITH);
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "unknown lithology '%s'%s%s%s; accepted: sandstone, "
	                  "limestone, dolomite, shale, or an object of their "
	                  "volume fractions",
	                  s, near ? "; did you mean '" : "", near ? near : "",
	                  near ? "'?" : "");
}

static int lith_check(proto_call *c, void *dst)
{
	proto_lith *l = dst;
	size_t n = 1;
	int any = 0;

	for (int k = 0; k < RW_EMP_NLITH; k++) {
		any |= l->frac[k].present;
		if (l->frac[k].n > n)
			n = l->frac[k].n;
	}
	if (!any) {
		char *p = proto_strdup(c, l->hdr.path);
		size_t len = p ? strlen(p) : 0;
		if (len && p[len - 1] == '.')
			p[len - 1] = '\0';
		return proto_fail(c, PROTO_INVALID_PARAMS, p ? p : "lithology",
		                  "must be a lithology name or a non-empty "
		                  "object of volume fractions, e.g. "
		                  "{\"sandstone\": 0.7, \"shale\": 0.3}");
	}
	for (size_t i = 0; i < n; i++) {
		double sum = 0;
		for (int k = 0; k < RW_EMP_NLITH; k++)
			if (l->frac[k].present)
				sum += proto_at(&l->frac[k], i);
		if (fabs(sum - 1) > 1e-6) {
			char *p = proto_strdup(c, l->hdr.path);
			size_t len = p ? strlen(p) : 0;
			if (len && p[len - 1] == '.')
				p[len - 1] = '\0';
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, p ? p : "lithology",
			    "fractions sum to %.9g at sample %zu, "
			    "not 1 (tolerance 1e-6)",
			    sum, i);
		}
	}
	return 0;
}

const proto_decl proto_lith_decl = {
    .name = "lithology",
    .fields = lith_fields,
    .size = sizeof(proto_lith),
    .from_string = lith_from_string,
    .string_desc = "sandstone, limestone, dolomite or shale",
    .check = lith_check,
    .desc = "Greenberg & Castagna 1992 lithology: a name, or an object of "
            "volume fractions of sandstone, limestone, dolomite and shale "
            "summing to 1 (default sandstone)",
};

void proto__lith_fractions(const proto_lith *l, double frac[RW_EMP_NLITH])
{
	(void)l;
	for (int k = 0; k < RW_EMP_NLITH; k++)
		frac[k] = 0;
	frac[RW_EMP_SANDSTONE] = 1; /* nothing given: pure sandstone */
}

uint64_t proto__emp_qc(unsigned warn)
{
	return warn ? QC_EMP_RANGE : 0;
}

/* ---- rock.empirical ----------------------------------------------------- */

enum {
	R_GARDNER,
	R_GARDNER_INV,
	R_MUDROCK_VS,
	R_MUDROCK_VP,
	R_GC,
	R_HAN,
	R_WYLLIE,
	R_WYLLIE_PHI,
	R_RHG,
	R_RHG_PHI,
	R_COUNT
};

static const char *const rel_names[] = {"gardner",
                                        "gardner_inverse",
                                        "mudrock_vs",
                                        "mudrock_vp",
                                        "greenberg_castagna",
                                        "han",
                                        "wyllie",
                                        "wyllie_porosity",
                                        "raymer",
                                        "raymer_porosity",
                                        NULL};

typedef struct emp_args {
	proto_hdr hdr;
	int relation;
	proto_vec vp, vs, rho, dtp, porosity, clay, v_matrix, v_fluid;
	proto_vec gardner_a, gardner_b;
	proto_lith lithology;
	proto_vec effective_pressure;
} emp_args;

#define Q(m, k_, fl, text)                                                     \
	{                                                                      \
		PROTO_NUMS(emp_args, m, k_, PF_NULLS | (fl), text)             \
	}
static const proto_field emp_fields[] = {
    {.name = "relation",
     .type = PT_ENUM,
     .flags = PF_REQ,
     .offset = offsetof(emp_args, relation),
     .choices = rel_names,
     .desc = "the relation (protocol-docs/logs.md lists each one's inputs "
             "and fitted range)"},
    Q(vp, PK_VELOCITY, 0, "P velocity"),
    Q(vs, PK_VELOCITY, 0, "S velocity"),
    Q(rho, PK_DENSITY, 0, "bulk density"),
    Q(dtp, PK_SLOWNESS, 0, "compressional slowness (instead of vp)"),
    Q(porosity, PK_NONE, PF_FRACTION, "porosity (fraction)"),
    Q(clay, PK_NONE, PF_FRACTION, "clay volume fraction (han)"),
    Q(v_matrix, PK_VELOCITY, 0, "matrix velocity (wyllie, raymer)"),
    Q(v_fluid, PK_VELOCITY, 0, "pore-fluid velocity (wyllie, raymer)"),
    {PROTO_NUMS(emp_args, gardner_a, PK_NONE, PF_DFLT | PF_LO | PF_LO_OPEN,
                "Gardner a, for rho in g/cm3 and vp in m/s (default 0.31)"),
     .dflt = RW_EMP_GARDNER_A, .lo = 0},
    {PROTO_NUMS(emp_args, gardner_b, PK_NONE, PF_DFLT | PF_LO | PF_LO_OPEN,
                "Gardner b (default 0.25)"),
     .dflt = RW_EMP_GARDNER_B, .lo = 0},
    {PROTO_FIELD(emp_args, lithology, PT_OBJ, 0,
                 "lithology for greenberg_castagna (default sandstone)"),
     .sub = &proto_lith_decl},
    {PROTO_NUMS(emp_args, effective_pressure, PK_PRESSURE, PF_DFLT | PF_NULLS,
                "Han et al. 1986 fit: one of the published 5, 10, 20, 30, "
                "40 MPa sets (default 40)"),
     .dflt = 40},
    {0},
};
#undef Q

static const char *const vp_dtp[] = {"vp", "dtp", NULL};
static const char *const gardner_in[] = {"vp", "dtp", "gardner_a", "gardner_b",
                                         NULL};
static const char *const rho_in[] = {"rho", "gardner_a", "gardner_b", NULL};
static const char *const rho_only[] = {"rho", NULL};
static const char *const vs_only[] = {"vs", NULL};
static const char *const gc_in[] = {"vp", "dtp", "lithology", NULL};
static const char *const han_need[] = {"porosity", "clay", NULL};
static const char *const han_in[] = {"porosity", "clay", "effective_pressure",
                                     NULL};
static const char *const tav_need[] = {"porosity", "v_matrix", "v_fluid", NULL};
static const char *const tav_phi_need[] = {"v_matrix", "v_fluid", NULL};
static const char *const tav_phi_in[] = {"vp", "dtp", "v_matrix", "v_fluid",
                                         NULL};

#define ONLY(rel, names)                                                       \
	{                                                                      \
		PR_ONLY, "relation=" rel, 0, names,                            \
		    "relation '" rel "' does not use this parameter"           \
	}
#define NEEDS(rel, names)                                                      \
	{                                                                      \
		PR_REQUIRES, "relation=" rel, 0, names,                        \
		    "relation '" rel "' needs this parameter"                  \
	}
#define ONE_VP(rel)                                                            \
	{                                                                      \
		PR_EXACTLY, "relation=" rel, 1, vp_dtp,                        \
		    "relation '" rel "' needs vp or dtp, not both"             \
	}
static const proto_rule emp_rules[] = {
    ONE_VP("gardner"),
    NEEDS("gardner_inverse", rho_only),
    ONE_VP("mudrock_vs"),
    NEEDS("mudrock_vp", vs_only),
    ONE_VP("greenberg_castagna"),
    NEEDS("han", han_need),
    NEEDS("wyllie", tav_need),
    ONE_VP("wyllie_porosity"),
    NEEDS("wyllie_porosity", tav_phi_need),
    NEEDS("raymer", tav_need),
    ONE_VP("raymer_porosity"),
    NEEDS("raymer_porosity", tav_phi_need),
    ONLY("gardner", gardner_in),
    ONLY("gardner_inverse", rho_in),
    ONLY("mudrock_vs", vp_dtp),
    ONLY("mudrock_vp", vs_only),
    ONLY("greenberg_castagna", gc_in),
    ONLY("han", han_in),
    ONLY("wyllie", tav_need),
    ONLY("wyllie_porosity", tav_phi_in),
    ONLY("raymer", tav_need),
    ONLY("raymer_porosity", tav_phi_in),
    PR_LAST,
};
#undef ONLY
#undef NEEDS
#undef ONE_VP

/* The Han et al. 1986 set of a pressure (MPa), or -1. */
static int han_set(double p)
{
	static const double mpa[RW_EMP_HAN_NSETS] = {[RW_EMP_HAN_40MPA] = 40,
	                                             [RW_EMP_HAN_30MPA] = 30,
	                                             [RW_EMP_HAN_20MPA] = 20,
	                                             [RW_EMP_HAN_10MPA] = 10,
	                                             [RW_EMP_HAN_5MPA] = 5};
	for (int i = 0; i < RW_EMP_HAN_NSETS; i++)
		if (fabs(p - mpa[i]) < 1e-6)
			return i;
	return -1;
}

static int emp_check(proto_call *c, void *dst)
{
	emp_args *a = dst;
	const proto_vec *p = &a->effective_pressure;

	if (a->relation != R_HAN)
		return 0;
	for (size_t i = 0; i < p->n; i++)
		if (!isnan(p->v[i]) && han_set(p->v[i]) < 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "effective_pressure",
			    "Han et al. 1986 published fits at 5, "
			    "10, 20, 30 and 40 MPa only (%g MPa "
			    "given%s%zu)",
			    p->v[i], p->is_array ? " at element " : "",
			    p->is_array ? i : 0);
	return 0;
}

static const proto_decl emp_decl = {
    .name = "",
    .fields = emp_fields,
    .rules = emp_rules,
    .size = sizeof(emp_args),
    .check = emp_check,
};

typedef struct emp_row {
	double vp, vs, rho, porosity;
	uint64_t qc;
} emp_row;

/* The velocity input of sample i: vp, or 1/dtp (NaN when missing; a
 * non-positive slowness gives a negative velocity the core refuses). */
static double vel_at(const emp_args *a, size_t i)
{
	double dt;
	if (a->vp.present)
		return proto_at(&a->vp, i);
	dt = proto_at(&a->dtp, i);
	return dt > 0 ? 1.0 / dt : isnan(dt) ? NAN : -1.0;
}

static int emp_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const emp_args *a = args;
	emp_row *r = row;
	unsigned warn = 0;
	int st = RW_OK;
	double ga = proto_at(&a->gardner_a, i), gb = proto_at(&a->gardner_b, i);
	double frac[RW_EMP_NLITH], in = NAN;

	(void)ws;
	switch (a->relation) {
	case R_GARDNER:
		in = vel_at(a, i);
		st = rw_emp_gardner_density(in, ga, gb, &r->rho, &warn);
		break;
	case R_GARDNER_INV:
		in = proto_at(&a->rho, i);
		st = rw_emp_gardner_vp(in, ga, gb, &r->vp, &warn);
		break;
	case R_MUDROCK_VS:
		in = vel_at(a, i);
		st = rw_emp_mudrock_vs(in, &r->vs, &warn);
		break;
	case R_MUDROCK_VP:
		in = proto_at(&a->vs, i);
		st = rw_emp_mudrock_vp(in, &r->vp, &warn);
		break;
	case R_GC:
		in = vel_at(a, i);
		if (a->lithology.hdr.present)
			for (int k = 0; k < RW_EMP_NLITH; k++)
				frac[k] =
				    a->lithology.frac[k].present
				        ? proto_at(&a->lithology.frac[k], i)
				        : 0;
		else
			proto__lith_fractions(NULL, frac);
		st = rw_emp_gc_vs_mixed(in, frac, &r->vs, &warn);
		break;
	case R_HAN:
		in = proto_at(&a->porosity, i) + proto_at(&a->clay, i) +
		     proto_at(&a->effective_pressure, i);
		if (!isnan(in))
			st = rw_emp_han_velocities(
			    proto_at(&a->porosity, i), proto_at(&a->clay, i),
			    han_set(proto_at(&a->effective_pressure, i)),
			    &r->vp, &r->vs, &warn);
		break;
	case R_WYLLIE:
	case R_RHG:
		in = proto_at(&a->porosity, i);
		if (a->relation == R_WYLLIE)
			st = rw_emp_wyllie_velocity(
			    in, proto_at(&a->v_matrix, i),
			    proto_at(&a->v_fluid, i), &r->vp, &warn);
		else
			st = rw_emp_rhg_velocity(in, proto_at(&a->v_matrix, i),
			                         proto_at(&a->v_fluid, i),
			                         &r->vp, &warn);
		in += proto_at(&a->v_matrix, i) + proto_at(&a->v_fluid, i);
		break;
	default:
		in = vel_at(a, i);
		if (a->relation == R_WYLLIE_PHI)
			st = rw_emp_wyllie_porosity(
			    in, proto_at(&a->v_matrix, i),
			    proto_at(&a->v_fluid, i), &r->porosity, &warn);
		else
			st = rw_emp_rhg_porosity(in, proto_at(&a->v_matrix, i),
			                         proto_at(&a->v_fluid, i),
			                         &r->porosity, &warn);
		in += proto_at(&a->v_matrix, i) + proto_at(&a->v_fluid, i);
		break;
	}
	if (isnan(in)) {
		*qc = QC_LOG_MISSING;
		r->vp = r->vs = r->rho = r->porosity = NAN;
	} else if (st != RW_OK) {
		*qc = QC_INPUT_INVALID;
		r->vp = r->vs = r->rho = r->porosity = NAN;
	} else {
		*qc = proto__emp_qc(warn);
	}
	return 0;
}

static int out_rho(const void *a)
{
	return ((const emp_args *)a)->relation == R_GARDNER;
}
static int out_vp(const void *a)
{
	int r = ((const emp_args *)a)->relation;
	return r == R_GARDNER_INV || r == R_MUDROCK_VP || r == R_WYLLIE ||
	       r == R_RHG || r == R_HAN;
}
static int out_vs(const void *a)
{
	int r = ((const emp_args *)a)->relation;
	return r == R_MUDROCK_VS || r == R_GC || r == R_HAN;
}
static int out_phi(const void *a)
{
	int r = ((const emp_args *)a)->relation;
	return r == R_WYLLIE_PHI || r == R_RHG_PHI;
}

static const proto_output emp_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "relation",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(emp_args, relation),
     .choices = rel_names,
     .desc = "the relation used"},
    {.name = "rho",
     .type = PO_NUM,
     .kind = PK_DENSITY,
     .offset = offsetof(emp_row, rho),
     .when = out_rho,
     .desc = "density (gardner)"},
    {.name = "vp",
     .type = PO_NUM,
     .kind = PK_VELOCITY,
     .offset = offsetof(emp_row, vp),
     .when = out_vp,
     .desc = "P velocity"},
    {.name = "vs",
     .type = PO_NUM,
     .kind = PK_VELOCITY,
     .offset = offsetof(emp_row, vs),
     .when = out_vs,
     .desc = "S velocity"},
    {.name = "porosity",
     .type = PO_NUM,
     .offset = offsetof(emp_row, porosity),
     .when = out_phi,
     .desc = "porosity (fraction)"},
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(emp_row, qc),
     .desc = "QC flags"},
    {0},
};

static const proto_method m_empirical = {
    .name = "rock.empirical",
    .summary = "Empirical velocity, density and porosity relations "
               "(Gardner, mudrock line, Greenberg-Castagna, Han, Wyllie, "
               "Raymer-Hunt-Gardner).",
    .description =
        "One relation per request, per sample with broadcasting. Each "
        "relation takes only its own inputs (others are refused): gardner "
        "vp|dtp [gardner_a, gardner_b] -> rho; gardner_inverse rho -> vp; "
        "mudrock_vs vp|dtp -> vs; mudrock_vp vs -> vp; greenberg_castagna "
        "vp|dtp [lithology] -> vs; han porosity, clay [effective_pressure] "
        "-> vp, vs; wyllie and raymer porosity, v_matrix, v_fluid -> vp; "
        "wyllie_porosity and raymer_porosity vp|dtp, v_matrix, v_fluid -> "
        "porosity. Outside the fitted range: computed and flagged "
        "empirical_extrapolated. See protocol-docs/logs.md.",
    .params = &emp_decl,
    .outputs = emp_outputs,
    .kernel = emp_kernel,
    .row_size = sizeof(emp_row),
    .qc_offset = offsetof(emp_row, qc),
};

const proto_method *const proto_rock_empirical_methods[] = {&m_empirical, NULL};
