/* The elastic family, continued: elastic.thomsen, Thomsen 1986 weak-
 * anisotropy parameters of a VTI medium from its five stiffnesses and
 * density, or the stiffnesses from vp0, vs0, epsilon, delta, gamma and
 * density. The physics is in daemon/core/aniso.c (rockwire/aniso.h). */
#include <math.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/aniso.h"
#include "rockwire/status.h"

typedef struct thomsen_args {
	proto_hdr hdr;
	proto_vec rho;
	proto_vec c11, c13, c33, c44, c66;
	proto_vec vp0, vs0, epsilon, delta, gamma;
	int forward; /* derived: stiffnesses given */
} thomsen_args;

/* One output row: the stiffnesses and the Thomsen set, both in SI. */
typedef struct row {
	double c11, c13, c33, c44, c66, vp0, vs0, rho, eps, delta, gamma;
	uint64_t qc;
} row;

#define N(m, k_, text)                                                         \
	{                                                                      \
		PROTO_NUMS(thomsen_args, m, k_, PF_NULLS, text)                \
	}
static const proto_field thomsen_fields[] = {
    {PROTO_NUMS(thomsen_args, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    N(c11, PK_MODULUS, "stiffness C11"),
    N(c13, PK_MODULUS, "stiffness C13"),
    N(c33, PK_MODULUS, "stiffness C33"),
    N(c44, PK_MODULUS, "stiffness C44"),
    N(c66, PK_MODULUS, "stiffness C66"),
    N(vp0, PK_VELOCITY, "vertical P velocity"),
    N(vs0, PK_VELOCITY, "vertical S velocity"),
    N(epsilon, PK_NONE, "Thomsen epsilon"),
    N(delta, PK_NONE, "Thomsen delta"),
    N(gamma, PK_NONE, "Thomsen gamma"),
    {0},
};
#undef N

static const char *const stiff[] = {"c11", "c13", "c33", "c44", "c66", NULL};
static const char *const thom[] = {"vp0",   "vs0",   "epsilon",
                                   "delta", "gamma", NULL};
static const char *const one_each[] = {"c11", "vp0", NULL};
static const proto_rule thomsen_rules[] = {
    {PR_FORBIDS, "c11", 0, thom,
     "give either the stiffnesses (c11, c13, c33, c44, c66) or vp0, vs0, "
     "epsilon, delta, gamma, not both"},
    {PR_FORBIDS, "c13", 0, thom,
     "give either the stiffnesses or the Thomsen set, not both"},
    {PR_AT_LEAST, NULL, 1, one_each,
     "give the stiffnesses c11, c13, c33, c44, c66, or vp0, vs0, epsilon, "
     "delta, gamma"},
    {PR_ALL_OR_NONE, NULL, 0, stiff,
     "give all five of c11, c13, c33, c44, c66"},
    {PR_ALL_OR_NONE, NULL, 0, thom,
     "give all five of vp0, vs0, epsilon, delta, gamma"},
    PR_LAST,
};

static int thomsen_check(proto_call *c, void *dst)
{
	thomsen_args *a = dst;
	(void)c;
	a->forward = a->c11.present;
	return 0;
}

static const proto_decl thomsen_decl = {
    .name = "",
    .fields = thomsen_fields,
    .rules = thomsen_rules,
    .size = sizeof(thomsen_args),
    .check = thomsen_check,
};

static int thomsen_kernel(const void *args, size_t i, void *out, uint64_t *qc,
                          void *ws)
{
	const thomsen_args *a = args;
	const proto_vec *const fw[5] = {&a->c11, &a->c13, &a->c33, &a->c44,
	                                &a->c66};
	const proto_vec *const bw[5] = {&a->vp0, &a->vs0, &a->epsilon,
	                                &a->delta, &a->gamma};
	double x[5], r = proto_at(&a->rho, i);
	rw_aniso_vti s;
	rw_aniso_thomsen t;
	row *o = out;
	int st, missing = isnan(r);

	(void)ws;
	for (int k = 0; k < 5; k++) {
		x[k] = proto_at(a->forward ? fw[k] : bw[k], i);
		missing = missing || isnan(x[k]);
	}
	memset(&s, 0, sizeof s);
	memset(&t, 0, sizeof t);
	if (a->forward) {
		s.c11_pa = x[0], s.c13_pa = x[1], s.c33_pa = x[2];
		s.c44_pa = x[3], s.c66_pa = x[4];
		st = rw_aniso_thomsen_from_stiff(&s, r, &t);
		if (st != RW_OK)
			s.c11_pa = s.c13_pa = s.c33_pa = s.c44_pa = s.c66_pa =
			    NAN;
	} else {
		t.vp0_ms = x[0], t.vs0_ms = x[1], t.rho_kgm3 = r;
		t.epsilon = x[2], t.delta = x[3], t.gamma = x[4];
		st = rw_aniso_stiff_from_thomsen(&t, &s);
		if (st != RW_OK)
			t.vp0_ms = t.vs0_ms = t.rho_kgm3 = t.epsilon = t.delta =
			    t.gamma = NAN;
	}
	if (st == RW_OK)
		*qc = 2.0 * t.vs0_ms * t.vs0_ms > t.vp0_ms * t.vp0_ms
		          ? QC_NU_NEGATIVE
		          : 0;
	else if (missing)
		*qc = QC_LOG_MISSING;
	else if (!isfinite(r) || !(r > 0))
		*qc = QC_RHO_NONPOSITIVE;
	else
		*qc = QC_ANISO_UNSTABLE;
	o->c11 = s.c11_pa, o->c13 = s.c13_pa, o->c33 = s.c33_pa;
	o->c44 = s.c44_pa, o->c66 = s.c66_pa;
	o->vp0 = t.vp0_ms, o->vs0 = t.vs0_ms, o->rho = st == RW_OK ? r : NAN;
	o->eps = t.epsilon, o->delta = t.delta, o->gamma = t.gamma;
	return 0;
}

#define O(nm, m, k_, text)                                                     \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(row, m), .desc = text                       \
	}
static const proto_output thomsen_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    O("c11", c11, PK_MODULUS, "C11"),
    O("c13", c13, PK_MODULUS, "C13"),
    O("c33", c33, PK_MODULUS, "C33"),
    O("c44", c44, PK_MODULUS, "C44"),
    O("c66", c66, PK_MODULUS, "C66"),
    O("vp0", vp0, PK_VELOCITY, "vertical P velocity"),
    O("vs0", vs0, PK_VELOCITY, "vertical S velocity"),
    O("rho", rho, PK_DENSITY, "density"),
    O("epsilon", eps, PK_NONE, "Thomsen epsilon"),
    O("delta", delta, PK_NONE, "Thomsen delta"),
    O("gamma", gamma, PK_NONE, "Thomsen gamma"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(row, qc),
     .desc = "QC flags"},
    {0},
};
#undef O

static const proto_method m_thomsen = {
    .name = "elastic.thomsen",
    .summary = "Thomsen epsilon, delta, gamma, vp0, vs0 of a VTI medium from "
               "its stiffnesses, or the stiffnesses from them.",
    .description = "Thomsen 1986: give rho and the five stiffnesses c11, "
                   "c13, c33, c44, c66, or rho and vp0, vs0, epsilon, "
                   "delta, gamma; both ways return the full set.",
    .params = &thomsen_decl,
    .outputs = thomsen_outputs,
    .kernel = thomsen_kernel,
    .row_size = sizeof(row),
    .qc_offset = offsetof(row, qc),
};

const proto_method *const proto_thomsen_methods[] = {&m_thomsen, NULL};
