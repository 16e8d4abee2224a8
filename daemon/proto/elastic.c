/* The elastic family: elastic.convert, from density plus any two
 * independent isotropic quantities to the full set, per sample, with QC
 * flags. Also the plausibility ranges shared with the log family. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "rockwire/elastic.h"

#define Q(name, kind)                                                          \
	{                                                                      \
		name, PT_NUMS, kind, PP_NULLS, 0                               \
	}

static const proto_param convert_params[] = {
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    Q("vp", PK_VELOCITY),
    Q("vs", PK_VELOCITY),
    Q("k", PK_MODULUS),
    Q("mu", PK_MODULUS),
    Q("lambda", PK_MODULUS),
    Q("e", PK_MODULUS),
    Q("nu", PK_NONE),
    Q("m", PK_MODULUS),
    Q("ai", PK_IMPEDANCE),
    Q("si", PK_IMPEDANCE),
    Q("vpvs", PK_NONE),
    Q("dtp", PK_SLOWNESS),
    Q("dts", PK_SLOWNESS),
    {"qc", PT_OBJ, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* The full set in result order, with kinds and places in rw_elastic. */
#define COL(m, kind)                                                           \
	{                                                                      \
#m, kind, offsetof(rw_elastic, m)                              \
	}
static const struct {
	const char *name;
	proto_kind kind;
	size_t off;
} out_cols[] = {
    COL(vp, PK_VELOCITY),  COL(vs, PK_VELOCITY),  COL(rho, PK_DENSITY),
    COL(k, PK_MODULUS),    COL(mu, PK_MODULUS),   COL(lambda, PK_MODULUS),
    COL(e, PK_MODULUS),    COL(nu, PK_NONE),      COL(m, PK_MODULUS),
    COL(ai, PK_IMPEDANCE), COL(si, PK_IMPEDANCE), COL(vpvs, PK_NONE),
    COL(dtp, PK_SLOWNESS), COL(dts, PK_SLOWNESS),
};
#undef COL

static const proto_param range_params[] = {
    {"rho_min", PT_NUM, PK_DENSITY, 0, 0},
    {"rho_max", PT_NUM, PK_DENSITY, 0, 0},
    {"vp_min", PT_NUM, PK_VELOCITY, 0, 0},
    {"vp_max", PT_NUM, PK_VELOCITY, 0, 0},
    {"vs_min", PT_NUM, PK_VELOCITY, 0, 0},
    {"vs_max", PT_NUM, PK_VELOCITY, 0, 0},
    {"nu_min", PT_NUM, PK_NONE, 0, 0},
    {"nu_max", PT_NUM, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

void proto_qc_ranges_default(proto_qc_ranges *r)
{
	/* Common practice for sedimentary rock (protocol-docs/qc-flags.md). */
	r->rho_min = 1000, r->rho_max = 3200;
	r->vp_min = 1200, r->vp_max = 7500;
	r->vs_min = 0, r->vs_max = 4500;
	r->nu_min = 0, r->nu_max = 0.5;
}

int proto_qc_ranges_parse(proto_call *c, const cJSON *obj, const char *path,
                          proto_qc_ranges *r)
{
	proto_args a;

	if (!obj)
		return 0;
	if (proto_args_parse(c, obj, path, range_params, &a))
		return -1;
	r->rho_min = proto_num_or(&a, "rho_min", r->rho_min);
	r->rho_max = proto_num_or(&a, "rho_max", r->rho_max);
	r->vp_min = proto_num_or(&a, "vp_min", r->vp_min);
	r->vp_max = proto_num_or(&a, "vp_max", r->vp_max);
	r->vs_min = proto_num_or(&a, "vs_min", r->vs_min);
	r->vs_max = proto_num_or(&a, "vs_max", r->vs_max);
	r->nu_min = proto_num_or(&a, "nu_min", r->nu_min);
	r->nu_max = proto_num_or(&a, "nu_max", r->nu_max);
	if (r->rho_min > r->rho_max || r->vp_min > r->vp_max ||
	    r->vs_min > r->vs_max || r->nu_min > r->nu_max)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "a minimum is above its maximum");
	return 0;
}

uint32_t proto_qc_impossible(unsigned why)
{
	uint32_t f = 0;
	if (why & RW_ELASTIC_BAD_INPUT)
		f |= QC_INPUT_INVALID;
	if (why & RW_ELASTIC_BAD_RHO)
		f |= QC_RHO_NONPOSITIVE;
	if (why & (RW_ELASTIC_BAD_MU | RW_ELASTIC_BAD_K))
		f |= QC_NU_IMPOSSIBLE | QC_MODULUS_NEGATIVE;
	return f;
}

uint32_t proto_qc_plausible(const proto_qc_ranges *r, const rw_elastic *e)
{
	uint32_t f = 0;
	if (e->nu < r->nu_min || e->nu >= r->nu_max)
		f |= QC_NU_NEGATIVE;
	if (e->rho < r->rho_min || e->rho > r->rho_max)
		f |= QC_RHO_RANGE;
	if (e->vp < r->vp_min || e->vp > r->vp_max)
		f |= QC_VP_RANGE;
	if (e->vs < r->vs_min || e->vs > r->vs_max)
		f |= QC_VS_RANGE;
	return f;
}

static int convert(proto_call *c)
{
	const proto_args *a = &c->args;
	const proto_vec *rho = proto_vec_of(a, "rho");
	const proto_vec *in[2] = {NULL, NULL};
	rw_elastic_qty q[2] = {RW_Q_COUNT, RW_Q_COUNT};
	proto_qc_ranges ranges;
	rw_elastic *res;
	uint32_t *flags;
	size_t n = a->n[0], given = 0;
	int arr = a->any_array[0];
	static const char *const why_pair[] = {
	    [RW_PAIR_SAME] = "the same quantity twice",
	    [RW_PAIR_DEPENDENT] = "both fix the same property, so the "
	                          "pair does not determine the rock",
	    [RW_PAIR_TWO_ROOTS] = "the pair has two physical solutions, "
	                          "so it does not determine the rock",
	};

	for (int i = 0; i < RW_Q_COUNT; i++) {
		const proto_vec *v = proto_vec_of(a, rw_elastic_qty_name(i));
		if (!v->present)
			continue;
		if (given < 2) {
			in[given] = v;
			q[given] = (rw_elastic_qty)i;
		}
		given++;
	}
	if (given != 2)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  given ? rw_elastic_qty_name(q[0]) : "vp",
		                  "give rho and exactly two of vp, vs, k, mu, "
		                  "lambda, e, nu, m, ai, si, vpvs, dtp, dts "
		                  "(%zu given)",
		                  given);
	rw_elastic_pair pc = rw_elastic_pair_check(q[0], q[1]);
	if (pc != RW_PAIR_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  rw_elastic_qty_name(q[1]), "%s and %s: %s",
		                  rw_elastic_qty_name(q[0]),
		                  rw_elastic_qty_name(q[1]), why_pair[pc]);
	proto_qc_ranges_default(&ranges);
	if (proto_qc_ranges_parse(c, proto_item_of(a, "qc"), "qc.", &ranges))
		return -1;
	if (proto_check_size(c, n, n))
		return -1;
	res = proto_alloc(c, n * sizeof *res);
	flags = proto_alloc(c, n * sizeof *flags);
	if (!res || !flags)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	for (size_t i = 0; i < n; i++) {
		unsigned why = 0;
		int st = rw_elastic_from_pair(
		    proto_at(rho, i), q[0], proto_at(in[0], i), q[1],
		    proto_at(in[1], i), &res[i], &why);
		flags[i] = st == RW_OK ? proto_qc_plausible(&ranges, &res[i])
		                       : proto_qc_impossible(why);
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	for (size_t k = 0; k < sizeof out_cols / sizeof out_cols[0]; k++)
		proto_w_rows(c, out_cols[k].name, out_cols[k].kind, res,
		             sizeof *res, out_cols[k].off, n, arr);
	proto_w_flags(c, "qc", flags, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_elastic_methods[] = {
    {"elastic.convert", convert, convert_params,
     "Full isotropic elastic set from density and any two independent "
     "quantities."},
    {NULL, NULL, NULL, NULL},
};
