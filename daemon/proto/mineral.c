/* The mineral family: mineral.list (the core's built-in table with the
 * source of every row) and mineral.mix (Voigt, Reuss, Hill and
 * Hashin-Shtrikman averages of any number of constituents by volume
 * fraction, per sample with broadcasting). Also the mineral description
 * rock.substitute and log.process embed (proto_mineral_decl): a table
 * name, an explicit {k, rho}, or a mix of constituents. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/mineral.h"
#include "rockwire/status.h"

/* Method names in RW_MIX_* order, then "all" (mineral.mix only). */
static const char *const method_names[] = {
    "voigt", "reuss", "hill", "hs_upper", "hs_lower", "all", NULL};
static const char *const rock_method_names[] = {"voigt",    "reuss",    "hill",
                                                "hs_upper", "hs_lower", NULL};
#define METHOD_ALL 5
#define N_METHODS  5

static int unknown_mineral(proto_call *c, const char *path, const char *name)
{
	char list[512];
	const char *names[64], *near;
	size_t used = 0, n = rw_mineral_count();
	rw_mineral m;

	list[0] = '\0';
	for (size_t i = 0; i < n && i < 64; i++) {
		int w;
		rw_mineral_get(i, &m);
		names[i] = m.name; /* static strings of the core's table */
		if (used >= sizeof list)
			continue;
		w = snprintf(list + used, sizeof list - used, "%s%s",
		             i ? ", " : "", m.name);
		if (w > 0)
			used += (size_t)w;
	}
	near = proto__suggest(name, names, n < 64 ? n : 64);
	if (near)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "unknown mineral '%s'; did you mean '%s'? "
		                  "built in: %s (see mineral.list), or give k, "
		                  "mu and rho",
		                  name, near, list);
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "unknown mineral '%s'; built in: %s (see "
	                  "mineral.list), or give k, mu and rho",
	                  name, list);
}

/* A vec holding one value, in the call's arena. */
static int scalar(proto_call *c, proto_vec *v, double x)
{
	double *p = proto_alloc_doubles(c, 1);
	if (!p)
		return -1;
	*p = x;
	memset(v, 0, sizeof *v);
	v->v = p;
	v->n = 1;
	v->present = 1;
	return 0;
}

/* ---- constituents ------------------------------------------------------- */

static const proto_field constituent_fields[] = {
    {PROTO_FIELD(proto_constituent, mineral, PT_STR, 0,
                 "a name from mineral.list (instead of k, mu, rho)")},
    {PROTO_NUMS(proto_constituent, k, PK_MODULUS, PF_LO,
                "bulk modulus (with mu and rho, instead of a name)"),
     .lo = 0},
    {PROTO_NUMS(proto_constituent, mu, PK_MODULUS, PF_LO,
                "shear modulus (0 for a fluid)"),
     .lo = 0},
    {PROTO_NUMS(proto_constituent, rho, PK_DENSITY, PF_LO, "density"), .lo = 0},
    {PROTO_NUMS(proto_constituent, fraction, PK_NONE, PF_REQ | PF_FRACTION,
                "volume fraction; the fractions of a mix sum to 1")},
    {0},
};

static const char *const kmurho[] = {"k", "mu", "rho", NULL};
static const char *const one_source[] = {"mineral", "k", NULL};
static const proto_rule constituent_rules[] = {
    {PR_FORBIDS, "mineral", 0, kmurho,
     "give either mineral or k, mu and rho, not both"},
    {PR_ALL_OR_NONE, NULL, 0, kmurho,
     "required: give mineral, or all of k, mu and rho"},
    {PR_EXACTLY, NULL, 1, one_source, "give mineral, or all of k, mu and rho"},
    PR_LAST,
};

static int constituent_check(proto_call *c, void *dst)
{
	proto_constituent *k = dst;
	rw_mineral m;

	if (!k->mineral)
		return 0;
	if (rw_mineral_find(k->mineral, NULL, &m) != RW_OK)
		return unknown_mineral(
		    c, proto_path(c, k->hdr.path, "mineral", ""), k->mineral);
	if (scalar(c, &k->k, m.k_pa) || scalar(c, &k->mu, m.mu_pa) ||
	    scalar(c, &k->rho, m.rho_kgm3))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	return 0;
}

const proto_decl proto_constituent_decl = {
    .name = "constituent",
    .fields = constituent_fields,
    .rules = constituent_rules,
    .size = sizeof(proto_constituent),
    .check = constituent_check,
    .desc = "{mineral, fraction} with a name from mineral.list, or {k, mu, "
            "rho, fraction} (each >= 0; mu = 0 for a fluid); any number "
            "may be an array (one mix per sample)",
};

int proto__constituents_check(proto_call *c, const proto_list *l,
                              const char *path)
{
	const proto_constituent *it = l->items;
	size_t n = 1;

	if (l->n > PROTO_MAX_CONSTITUENTS)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "%zu constituents: at most %d", l->n,
		                  PROTO_MAX_CONSTITUENTS);
	for (size_t j = 0; j < l->n; j++)
		if (it[j].fraction.n > n)
			n = it[j].fraction.n;
	for (size_t i = 0; i < n; i++) {
		double sum = 0.0;
		for (size_t j = 0; j < l->n; j++)
			sum += proto_at(&it[j].fraction, i);
		if (fabs(sum - 1.0) > 1e-6)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "volume fractions sum to %.9g at sample "
			    "%zu, not 1 (tolerance 1e-6)",
			    sum, i);
	}
	return 0;
}

/* Loads sample i of the constituents. */
static void load_sample(const proto_list *l, size_t i, double *k, double *mu,
                        double *rho, double *f)
{
	const proto_constituent *it = l->items;
	for (size_t j = 0; j < l->n; j++) {
		k[j] = proto_at(&it[j].k, i);
		mu[j] = proto_at(&it[j].mu, i);
		rho[j] = proto_at(&it[j].rho, i);
		f[j] = proto_at(&it[j].fraction, i);
	}
}

/* ---- the description shared with rock and log -------------------------- */

static const proto_field mineral_fields[] = {
    {PROTO_NUMS(proto_mineral, k, PK_MODULUS, PF_LO | PF_LO_OPEN,
                "explicit mineral bulk modulus"),
     .lo = 0},
    {PROTO_NUMS(proto_mineral, rho, PK_DENSITY, PF_LO | PF_LO_OPEN,
                "explicit mineral density (required for a dry frame)"),
     .lo = 0},
    {PROTO_FIELD(proto_mineral, constituents, PT_LIST, 0,
                 "a mix of constituents, as in mineral.mix"),
     .sub = &proto_constituent_decl},
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_mineral, method),
     .choices = rock_method_names,
     .dflt_choice = RW_MIX_HILL,
     .desc = "averaging of the constituents (default hill)"},
    {0},
};

static const char *const k_or_mix[] = {"k", "constituents", NULL};
static const char *const explicit_kr[] = {"k", "rho", NULL};
static const char *const method_only[] = {"method", NULL};
static const proto_rule mineral_rules[] = {
    {PR_FORBIDS, "constituents", 0, explicit_kr,
     "give either constituents or k and rho, not both"},
    {PR_AT_LEAST, NULL, 1, k_or_mix,
     "required: the mineral bulk modulus k (with rho), a name, or "
     "constituents"},
    {PR_FORBIDS, "k", 0, method_only, "only used with constituents"},
    PR_LAST,
};

static int mineral_from_string(proto_call *c, const char *s, const char *path,
                               void *dst)
{
	proto_mineral *m = dst;
	rw_mineral mn;

	if (rw_mineral_find(s, NULL, &mn) != RW_OK)
		return unknown_mineral(c, path, s);
	if (scalar(c, &m->k, mn.k_pa) || scalar(c, &m->rho, mn.rho_kgm3))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	m->hdr.given |= 3; /* k and rho */
	m->explicit_kr = 1;
	return 0;
}

static int mineral_check(proto_call *c, void *dst)
{
	proto_mineral *m = dst;

	if (m->constituents.n)
		return proto__constituents_check(
		    c, &m->constituents,
		    proto_path(c, m->hdr.path, "constituents", ""));
	m->explicit_kr = 1;
	return 0;
}

const proto_decl proto_mineral_decl = {
    .name = "mineral",
    .fields = mineral_fields,
    .rules = mineral_rules,
    .size = sizeof(proto_mineral),
    .from_string = mineral_from_string,
    .string_desc = "a mineral name from mineral.list",
    .check = mineral_check,
    .desc = "The mineral: a name from mineral.list, {k, rho} (rho "
            "optional where not needed), or {constituents, method} as in "
            "mineral.mix (method default hill)",
};

int proto__mineral_has_rho(const proto_mineral *m)
{
	return !m->explicit_kr || m->rho.present;
}

int proto__mineral_eval(const proto_mineral *m, size_t i, double *k_pa,
                        double *rho_kgm3)
{
	double k[PROTO_MAX_CONSTITUENTS], mu[PROTO_MAX_CONSTITUENTS];
	double rho[PROTO_MAX_CONSTITUENTS], f[PROTO_MAX_CONSTITUENTS];

	if (m->explicit_kr) {
		*k_pa = proto_at(&m->k, i);
		*rho_kgm3 = m->rho.present ? proto_at(&m->rho, i) : NAN;
		return RW_OK;
	}
	load_sample(&m->constituents, i, k, mu, rho, f);
	return rw_mineral_mix(m->method, m->constituents.n, k, mu, rho, f, k_pa,
	                      NULL, rho_kgm3);
}

/* ---- mineral.list ------------------------------------------------------- */

static int list(proto_call *c, void *args)
{
	size_t n = rw_mineral_count();
	double *v = proto_alloc_doubles(c, 3 * n);
	rw_mineral m;

	(void)args;
	if (!v)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_arr_begin(c, "name");
	for (size_t i = 0; i < n; i++) {
		rw_mineral_get(i, &m);
		proto_w_str(c, NULL, m.name);
		v[3 * i] = m.k_pa;
		v[3 * i + 1] = m.mu_pa;
		v[3 * i + 2] = m.rho_kgm3;
	}
	proto_w_arr_end(c);
	proto_w_vec(c, "k", PK_MODULUS, v, n, 3, 1);
	proto_w_vec(c, "mu", PK_MODULUS, v + 1, n, 3, 1);
	proto_w_vec(c, "rho", PK_DENSITY, v + 2, n, 3, 1);
	proto_w_arr_begin(c, "source");
	for (size_t i = 0; i < n; i++) {
		rw_mineral_get(i, &m);
		proto_w_str(c, NULL, m.source);
	}
	proto_w_arr_end(c);
	proto__write_tail(c);
	return 0;
}

static const proto_field no_fields[] = {{0}};
static const proto_decl no_params = {
    .name = "", .fields = no_fields, .size = sizeof(proto_hdr)};

#define STRINGS "{\"type\": \"array\", \"items\": {\"type\": \"string\"}}"
#define NUMBERS "{\"type\": \"array\", \"items\": {\"type\": \"number\"}}"
static const proto_output list_outputs[] = {
    {.name = "n", .type = PO_INT, .dim = D_REQ, .desc = "table rows"},
    {.name = "name",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = STRINGS,
     .desc = "mineral names"},
    {.name = "k",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .kind = PK_MODULUS,
     .schema = NUMBERS,
     .desc = "bulk moduli"},
    {.name = "mu",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .kind = PK_MODULUS,
     .schema = NUMBERS,
     .desc = "shear moduli"},
    {.name = "rho",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .kind = PK_DENSITY,
     .schema = NUMBERS,
     .desc = "densities"},
    {.name = "source",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = STRINGS,
     .desc = "the published source of each row"},
    {0},
};

static const proto_method m_list = {
    .name = "mineral.list",
    .summary = "The built-in mineral table with sources.",
    .params = &no_params,
    .outputs = list_outputs,
    .body = list,
    .flags = PM_NO_FIELDS | PM_NO_UNCERTAINTY,
};

/* ---- mineral.mix -------------------------------------------------------- */

typedef struct mix_args {
	proto_hdr hdr;
	proto_list constituents;
	int method;
} mix_args;

static const proto_field mix_fields[] = {
    {PROTO_FIELD(mix_args, constituents, PT_LIST, PF_REQ,
                 "the constituents and their volume fractions"),
     .sub = &proto_constituent_decl},
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(mix_args, method),
     .choices = method_names,
     .dflt_choice = METHOD_ALL,
     .desc = "voigt, reuss, hill, hs_upper, hs_lower, or all (default)"},
    {0},
};

static int mix_check(proto_call *c, void *dst)
{
	mix_args *a = dst;
	return proto__constituents_check(c, &a->constituents, "constituents");
}

static const proto_decl mix_decl = {
    .name = "",
    .fields = mix_fields,
    .size = sizeof(mix_args),
    .check = mix_check,
};

typedef struct mix_row {
	double k[N_METHODS], mu[N_METHODS], rho;
	double k1, mu1; /* the chosen method's, when one is chosen */
	uint64_t qc;
} mix_row;

static int mix_prepare(proto_call *c, void *args, proto_shape *sh)
{
	const mix_args *a = args;
	size_t per = a->method == METHOD_ALL ? N_METHODS : 1;
	return proto_check_size(c, sh->n, sh->n * a->constituents.n * per);
}

static int mix_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const mix_args *a = args;
	mix_row *r = row;
	double k[PROTO_MAX_CONSTITUENTS], mu[PROTO_MAX_CONSTITUENTS];
	double rho[PROTO_MAX_CONSTITUENTS], f[PROTO_MAX_CONSTITUENTS];
	int lo = a->method == METHOD_ALL ? 0 : a->method;
	int hi = a->method == METHOD_ALL ? N_METHODS : a->method + 1;

	(void)ws;
	for (int q = 0; q < N_METHODS; q++)
		r->k[q] = r->mu[q] = NAN;
	load_sample(&a->constituents, i, k, mu, rho, f);
	for (int q = lo; q < hi; q++)
		if (rw_mineral_mix(q, a->constituents.n, k, mu, rho, f,
		                   &r->k[q], &r->mu[q], &r->rho) != RW_OK)
			*qc |= QC_INPUT_INVALID;
	r->k1 = r->k[lo];
	r->mu1 = r->mu[lo];
	return 0;
}

static int mix_all(const void *a)
{
	return ((const mix_args *)a)->method == METHOD_ALL;
}
static int mix_one(const void *a)
{
	return !mix_all(a);
}

#define KM(q, nm)                                                              \
	{.name = "k_" nm,                                                      \
	 .type = PO_NUM,                                                       \
	 .kind = PK_MODULUS,                                                   \
	 .offset = offsetof(mix_row, k) + (q) * sizeof(double),                \
	 .when = mix_all,                                                      \
	 .desc = "bulk modulus, " nm},                                         \
	{                                                                      \
		.name = "mu_" nm, .type = PO_NUM, .kind = PK_MODULUS,          \
		.offset = offsetof(mix_row, mu) + (q) * sizeof(double),        \
		.when = mix_all, .desc = "shear modulus, " nm                  \
	}
static const proto_output mix_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "method",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(mix_args, method),
     .choices = method_names,
     .desc = "the averaging used"},
    KM(RW_MIX_VOIGT, "voigt"),
    KM(RW_MIX_REUSS, "reuss"),
    KM(RW_MIX_HILL, "hill"),
    KM(RW_MIX_HS_UPPER, "hs_upper"),
    KM(RW_MIX_HS_LOWER, "hs_lower"),
    {.name = "k",
     .type = PO_NUM,
     .kind = PK_MODULUS,
     .offset = offsetof(mix_row, k1),
     .when = mix_one,
     .desc = "bulk modulus by the chosen method"},
    {.name = "mu",
     .type = PO_NUM,
     .kind = PK_MODULUS,
     .offset = offsetof(mix_row, mu1),
     .when = mix_one,
     .desc = "shear modulus by the chosen method"},
    {.name = "rho",
     .type = PO_NUM,
     .kind = PK_DENSITY,
     .offset = offsetof(mix_row, rho),
     .desc = "density (arithmetic)"},
    {0},
};

static const proto_method m_mix = {
    .name = "mineral.mix",
    .summary = "Voigt, Reuss, Hill and Hashin-Shtrikman mixing of "
               "constituents by volume fraction.",
    .description =
        "Mixes any number of constituents (a name from mineral.list, or "
        "explicit k, mu, rho) by volume fraction, summing to 1 within 1e-6 "
        "per sample. Any number may be an array: one mix per sample. "
        "method \"all\" (default) returns every average as k_<method>, "
        "mu_<method>; one method returns k and mu.",
    .params = &mix_decl,
    .outputs = mix_outputs,
    .prepare = mix_prepare,
    .kernel = mix_kernel,
    .row_size = sizeof(mix_row),
    .qc_offset = offsetof(mix_row, qc),
    .cost = 5,
};

const proto_method *const proto_mineral_methods[] = {&m_list, &m_mix, NULL};
