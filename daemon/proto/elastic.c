/* The elastic family: elastic.convert, from density plus any two
 * independent isotropic quantities to the full set, per sample, with QC
 * flags. Also the plausibility ranges (the `qc` object) shared with the
 * rock and log families. The physics is in daemon/core/elastic.c. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/elastic.h"

/* ---- plausibility ranges ------------------------------------------------ */

/* Common practice for sedimentary rock (protocol-docs/qc-flags.md). */
#define R(member, k_, dv, text)                                                \
	{                                                                      \
		PROTO_NUMS(proto_qc_ranges, member, k_, PF_SCALAR | PF_DFLT,   \
		           text),                                              \
		    .dflt = dv                                                 \
	}
static const proto_field range_fields[] = {
    R(rho_min, PK_DENSITY, 1000, "lowest plausible density"),
    R(rho_max, PK_DENSITY, 3200, "highest plausible density"),
    R(vp_min, PK_VELOCITY, 1200, "lowest plausible vp"),
    R(vp_max, PK_VELOCITY, 7500, "highest plausible vp"),
    R(vs_min, PK_VELOCITY, 0, "lowest plausible vs"),
    R(vs_max, PK_VELOCITY, 4500, "highest plausible vs"),
    R(nu_min, PK_NONE, 0, "lowest plausible Poisson's ratio"),
    R(nu_max, PK_NONE, 0.5,
      "Poisson's ratio at or above which a sample "
      "is implausible"),
    {0},
};
#undef R

static int ranges_check(proto_call *c, void *dst)
{
	const proto_qc_ranges *r = dst;
	if (r->rho_min.v[0] > r->rho_max.v[0] ||
	    r->vp_min.v[0] > r->vp_max.v[0] ||
	    r->vs_min.v[0] > r->vs_max.v[0] ||
	    r->nu_min.v[0] > r->nu_max.v[0]) {
		char *p = proto_strdup(c, r->hdr.path);
		size_t n = p ? strlen(p) : 0;
		if (n && p[n - 1] == '.')
			p[n - 1] = '\0';
		return proto_fail(c, PROTO_INVALID_PARAMS, n ? p : "qc",
		                  "a minimum is above its maximum");
	}
	return 0;
}

const proto_decl proto_qc_ranges_decl = {
    .name = "qcRanges",
    .fields = range_fields,
    .size = sizeof(proto_qc_ranges),
    .check = ranges_check,
    .desc = "Plausibility ranges for sedimentary rock, in the request's "
            "units, overriding the defaults (common practice)",
};

void proto_qc_ranges_default(proto_qc_ranges *r)
{
	memset(r, 0, sizeof *r);
	for (const proto_field *f = range_fields; f->name; f++) {
		proto_vec *v = (proto_vec *)((unsigned char *)r + f->offset);
		v->v = &f->dflt;
		v->n = 1;
	}
}

uint64_t proto_qc_impossible(unsigned why)
{
	uint64_t f = 0;
	if (why & RW_ELASTIC_BAD_INPUT)
		f |= QC_INPUT_INVALID;
	if (why & RW_ELASTIC_BAD_RHO)
		f |= QC_RHO_NONPOSITIVE;
	if (why & (RW_ELASTIC_BAD_MU | RW_ELASTIC_BAD_K))
		f |= QC_NU_IMPOSSIBLE | QC_MODULUS_NEGATIVE;
	return f;
}

uint64_t proto_qc_plausible(const proto_qc_ranges *r, const rw_elastic *e)
{
	uint64_t f = 0;
	if (e->nu < r->nu_min.v[0] || e->nu >= r->nu_max.v[0])
		f |= QC_NU_NEGATIVE;
	if (e->rho < r->rho_min.v[0] || e->rho > r->rho_max.v[0])
		f |= QC_RHO_RANGE;
	if (e->vp < r->vp_min.v[0] || e->vp > r->vp_max.v[0])
		f |= QC_VP_RANGE;
	if (e->vs < r->vs_min.v[0] || e->vs > r->vs_max.v[0])
		f |= QC_VS_RANGE;
	return f;
}

/* ---- elastic.convert ---------------------------------------------------- */

typedef struct convert_args {
	proto_hdr hdr;
	proto_vec rho;
	proto_vec q[RW_Q_COUNT]; /* indexed by rw_elastic_qty */
	proto_qc_ranges qc;
	int pair[2]; /* derived: the two quantities given */
} convert_args;

typedef struct convert_row {
	rw_elastic e;
	uint64_t qc;
} convert_row;

#define Q(id, nm, k_, text)                                                    \
	{                                                                      \
		.name = nm, .type = PT_NUMS, .kind = k_, .flags = PF_NULLS,    \
		.offset =                                                      \
		    offsetof(convert_args, q) + (id) * sizeof(proto_vec),      \
		.desc = text ". Give exactly two of the thirteen quantities"   \
	}
static const proto_field convert_fields[] = {
    {PROTO_NUMS(convert_args, rho, PK_DENSITY, PF_REQ | PF_NULLS,
                "bulk density; null marks a missing sample")},
    Q(RW_Q_VP, "vp", PK_VELOCITY, "P-wave velocity"),
    Q(RW_Q_VS, "vs", PK_VELOCITY, "S-wave velocity"),
    Q(RW_Q_K, "k", PK_MODULUS, "bulk modulus"),
    Q(RW_Q_MU, "mu", PK_MODULUS, "shear modulus"),
    Q(RW_Q_LAMBDA, "lambda", PK_MODULUS, "Lame's first parameter"),
    Q(RW_Q_E, "e", PK_MODULUS, "Young's modulus"),
    Q(RW_Q_NU, "nu", PK_NONE, "Poisson's ratio"),
    Q(RW_Q_M, "m", PK_MODULUS, "P-wave modulus rho vp^2"),
    Q(RW_Q_AI, "ai", PK_IMPEDANCE, "acoustic impedance rho vp"),
    Q(RW_Q_SI, "si", PK_IMPEDANCE, "shear impedance rho vs"),
    Q(RW_Q_VPVS, "vpvs", PK_NONE, "velocity ratio vp/vs"),
    Q(RW_Q_DTP, "dtp", PK_SLOWNESS, "compressional slowness"),
    Q(RW_Q_DTS, "dts", PK_SLOWNESS, "shear slowness"),
    {PROTO_FIELD(convert_args, qc, PT_OBJ, 0,
                 "plausibility ranges overriding the defaults"),
     .sub = &proto_qc_ranges_decl},
    {0},
};
#undef Q

static const char *const quantities[] = {"vp",   "vs",  "k",   "mu", "lambda",
                                         "e",    "nu",  "m",   "ai", "si",
                                         "vpvs", "dtp", "dts", NULL};

static const proto_rule convert_rules[] = {
    {PR_EXACTLY, NULL, 2, quantities,
     "give rho and exactly two of vp, vs, k, mu, lambda, e, nu, m, ai, si, "
     "vpvs, dtp, dts"},
    PR_LAST,
};

static const proto_decl convert_decl = {
    .name = "",
    .fields = convert_fields,
    .rules = convert_rules,
    .size = sizeof(convert_args),
};

static int convert_prepare(proto_call *c, void *args, proto_shape *sh)
{
	static const char *const why_pair[] = {
	    [RW_PAIR_SAME] = "the same quantity twice",
	    [RW_PAIR_DEPENDENT] = "both fix the same property, so the pair "
	                          "does not determine the rock",
	    [RW_PAIR_TWO_ROOTS] = "the pair has two physical solutions, so it "
	                          "does not determine the rock",
	};
	convert_args *a = args;
	int n = 0;
	rw_elastic_pair pc;

	(void)sh;
	for (int i = 0; i < RW_Q_COUNT; i++)
		if (a->q[i].present && n < 2)
			a->pair[n++] = i;
	assert(n == 2); /* the rule above */
	pc = rw_elastic_pair_check(a->pair[0], a->pair[1]);
	if (pc != RW_PAIR_OK)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, rw_elastic_qty_name(a->pair[1]),
		    "%s and %s: %s", rw_elastic_qty_name(a->pair[0]),
		    rw_elastic_qty_name(a->pair[1]), why_pair[pc]);
	if (!a->qc.hdr.present)
		proto_qc_ranges_default(&a->qc);
	return 0;
}

static int convert_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                          void *ws)
{
	const convert_args *a = args;
	convert_row *r = row;
	double rho = proto_at(&a->rho, i);
	double va = proto_at(&a->q[a->pair[0]], i);
	double vb = proto_at(&a->q[a->pair[1]], i);
	unsigned why = 0;

	(void)ws;
	if (isnan(rho) || isnan(va) || isnan(vb)) {
		/* a null sample: missing, not impossible */
		rw_elastic_from_pair(NAN, a->pair[0], NAN, a->pair[1], NAN,
		                     &r->e, &why);
		*qc = QC_LOG_MISSING;
		return 0;
	}
	if (rw_elastic_from_pair(rho, a->pair[0], va, a->pair[1], vb, &r->e,
	                         &why) == RW_OK)
		*qc = proto_qc_plausible(&a->qc, &r->e);
	else
		*qc = proto_qc_impossible(why);
	return 0;
}

#define OUT(m, k_, text)                                                       \
	{                                                                      \
		.name = #m, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(convert_row, e.m), .desc = text             \
	}
static const proto_output convert_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    OUT(vp, PK_VELOCITY, "P-wave velocity"),
    OUT(vs, PK_VELOCITY, "S-wave velocity"),
    OUT(rho, PK_DENSITY, "bulk density"),
    OUT(k, PK_MODULUS, "bulk modulus"),
    OUT(mu, PK_MODULUS, "shear modulus"),
    OUT(lambda, PK_MODULUS, "Lame's first parameter"),
    OUT(e, PK_MODULUS, "Young's modulus"),
    OUT(nu, PK_NONE, "Poisson's ratio"),
    OUT(m, PK_MODULUS, "P-wave modulus"),
    OUT(ai, PK_IMPEDANCE, "acoustic impedance"),
    OUT(si, PK_IMPEDANCE, "shear impedance"),
    OUT(vpvs, PK_NONE, "vp/vs"),
    OUT(dtp, PK_SLOWNESS, "compressional slowness"),
    OUT(dts, PK_SLOWNESS, "shear slowness"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(convert_row, qc),
     .desc = "QC flags per sample"},
    {0},
};
#undef OUT

static const proto_method m_convert = {
    .name = "elastic.convert",
    .summary = "The full isotropic elastic set from density and any two "
               "independent quantities.",
    .description =
        "Accepts rho plus exactly two of vp, vs, k, mu, lambda, e, nu, m, "
        "ai, si, vpvs, dtp, dts. Pairs that fix the same property (vp with "
        "ai, dtp or m; vs with si, dts or mu; nu with vpvs) or that have two "
        "physical roots (e with vp, ai, dtp or m) are refused with -32602. "
        "Impossible samples give null outputs and QC flags; a null input "
        "gives null outputs flagged input_missing only.",
    .params = &convert_decl,
    .outputs = convert_outputs,
    .prepare = convert_prepare,
    .kernel = convert_kernel,
    .row_size = sizeof(convert_row),
    .qc_offset = offsetof(convert_row, qc),
    .cost = 1,
};

const proto_method *const proto_elastic_methods[] = {&m_convert, NULL};
