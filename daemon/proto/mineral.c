/* The mineral family: mineral.list (the core's built-in table with the
 * source of every row) and mineral.mix (Voigt, Reuss, Hill and
 * Hashin-Shtrikman averages of any number of constituents by volume
 * fraction, per sample with broadcasting). Also the mineral description
 * shared with rock.substitute (proto__mineral_desc_*): a table name, an
 * explicit {k, rho}, or a mix of constituents, parsed and checked once per
 * request and evaluated per sample without allocation. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "rockwire/mineral.h"
#include "rockwire/status.h"

/* Method names in RW_MIX_* order, then "all" (mineral.mix only). */
static const char *const method_names[] = {
    "voigt", "reuss", "hill", "hs_upper", "hs_lower", "all", NULL};
static const char *const rock_method_names[] = {"voigt",    "reuss",    "hill",
                                                "hs_upper", "hs_lower", NULL};
#define METHOD_ALL 5
#define N_METHODS  5

static const proto_param list_params[] = {
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param mix_params[] = {
    {"constituents", PT_ARR, PK_NONE, PP_REQUIRED, 0},
    {"method", PT_STR, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param constituent_params[] = {
    {"mineral", PT_STR, PK_NONE, 0, 0},
    {"k", PT_NUMS, PK_MODULUS, 0, 0},
    {"mu", PT_NUMS, PK_MODULUS, 0, 0},
    {"rho", PT_NUMS, PK_DENSITY, 0, 0},
    {"fraction", PT_NUMS, PK_NONE, PP_REQUIRED, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* The mineral of rock.substitute when given as an object. */
static const proto_param rock_mineral_params[] = {
    {"k", PT_NUMS, PK_MODULUS, 0, 0},        {"rho", PT_NUMS, PK_DENSITY, 0, 0},
    {"constituents", PT_ARR, PK_NONE, 0, 0}, {"method", PT_STR, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* A parsed mineral description (arena memory of the call). */
struct proto_mineral_desc {
	int explicit_kr;    /* {k, rho} (rock only) */
	proto_vec k1, rho1; /* explicit */
	size_t m;           /* constituents */
	proto_vec *k, *mu, *rho, *f;
	double *tk, *tmu, *trho, *tf; /* per-sample scratch, m each */
	int method;                   /* RW_MIX_* (rock) */
	size_t n;
	int any_array;
	char len_from[160];
};

static int join_len(proto_call *c, struct proto_mineral_desc *d,
                    const proto_vec *v, const char *path)
{
	return proto_join_len(c, v, path, &d->n, &d->any_array, d->len_from,
	                      sizeof d->len_from);
}

/* Every element of v at least lo (or above lo when strict). */
static int check_min(proto_call *c, const proto_vec *v, const char *path,
                     double lo, int strict)
{
	for (size_t i = 0; i < v->n; i++) {
		double x = v->v[i];
		if (strict ? x > lo : x >= lo)
			continue;
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "%s%zu: %.9g must be %s %g (internal "
		                  "units)",
		                  v->is_array ? "element " : "value ", i, x,
		                  strict ? ">" : ">=", lo);
	}
	return 0;
}

static int unknown_mineral(proto_call *c, const char *path, const char *name)
{
	char list[512];
	size_t used = 0;
	rw_mineral m;

	list[0] = '\0';
	for (size_t i = 0; i < rw_mineral_count() && used < sizeof list; i++) {
		int w;
		rw_mineral_get(i, &m);
		w = snprintf(list + used, sizeof list - used, "%s%s",
		             i ? ", " : "", m.name);
		if (w < 0)
			break;
		used += (size_t)w;
	}
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "unknown mineral '%s'; built in: %s (see "
	                  "mineral.list), or give k, mu and rho",
	                  name, list);
}

static proto_vec scalar_vec(proto_call *c, double x)
{
	proto_vec v = {NULL, 1, 1, 0};
	double *p = proto_alloc_doubles(c, 1);
	if (p)
		*p = x;
	v.v = p;
	return v;
}

static struct proto_mineral_desc *desc_new(proto_call *c)
{
	struct proto_mineral_desc *d = proto_alloc(c, sizeof *d);
	if (!d) {
		proto_fail(c, PROTO_INTERNAL_ERROR, NULL, "out of memory");
		return NULL;
	}
	memset(d, 0, sizeof *d);
	d->n = 1;
	d->method = RW_MIX_HILL;
	return d;
}

/* Parses a constituents array at `path` ("constituents" or
 * "mineral.constituents") into d. */
static int parse_constituents(proto_call *c, const cJSON *arr, const char *path,
                              struct proto_mineral_desc *d)
{
	size_t m = (size_t)cJSON_GetArraySize(arr), j = 0;
	const cJSON *e;
	char full[256];

	if (m == 0)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "empty: give at least one constituent");
	d->m = m;
	d->k = proto_alloc(c, m * sizeof *d->k);
	d->mu = proto_alloc(c, m * sizeof *d->mu);
	d->rho = proto_alloc(c, m * sizeof *d->rho);
	d->f = proto_alloc(c, m * sizeof *d->f);
	d->tk = proto_alloc_doubles(c, m);
	d->tmu = proto_alloc_doubles(c, m);
	d->trho = proto_alloc_doubles(c, m);
	d->tf = proto_alloc_doubles(c, m);
	if (!d->k || !d->mu || !d->rho || !d->f || !d->tk || !d->tmu ||
	    !d->trho || !d->tf)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "out of memory for %zu constituents", m);
	cJSON_ArrayForEach(e, arr)
	{
		size_t plen = strlen(path) + 32;
		char *pp = proto_alloc(c, plen);
		proto_args a;
		const char *name;

		if (!pp)
			return proto_fail(c, PROTO_INTERNAL_ERROR, path,
			                  "out of memory");
		snprintf(pp, plen, "%s[%zu].", path, j);
		if (!cJSON_IsObject(e)) {
			snprintf(full, sizeof full, "%s[%zu]", path, j);
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "must be an object {mineral, "
			                  "fraction} or {k, mu, rho, "
			                  "fraction}");
		}
		if (proto_args_parse(c, e, pp, constituent_params, &a))
			return -1;
		name = proto_str_or(&a, "mineral", NULL);
		d->f[j] = *proto_vec_of(&a, "fraction");
		if (name) {
			rw_mineral mn;
			for (int q = 1; q <= 3; q++) {
				const char *mem = q == 1   ? "k"
				                  : q == 2 ? "mu"
				                           : "rho";
				if (!proto_vec_of(&a, mem)->present)
					continue;
				snprintf(full, sizeof full, "%s%s", pp, mem);
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "give either mineral or k, mu and rho, "
				    "not both");
			}
			snprintf(full, sizeof full, "%smineral", pp);
			if (rw_mineral_find(name, NULL, &mn) != RW_OK)
				return unknown_mineral(c, full, name);
			d->k[j] = scalar_vec(c, mn.k_pa);
			d->mu[j] = scalar_vec(c, mn.mu_pa);
			d->rho[j] = scalar_vec(c, mn.rho_kgm3);
			if (!d->k[j].v || !d->mu[j].v || !d->rho[j].v)
				return proto_fail(c, PROTO_INTERNAL_ERROR, path,
				                  "out of memory");
		} else {
			for (int q = 0; q < 3; q++) {
				static const char *const mem[] = {"k", "mu",
				                                  "rho"};
				proto_vec *dst = q == 0   ? &d->k[j]
				                 : q == 1 ? &d->mu[j]
				                          : &d->rho[j];
				*dst = *proto_vec_of(&a, mem[q]);
				snprintf(full, sizeof full, "%s%s", pp, mem[q]);
				if (!dst->present)
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, full,
					    "required: give mineral, or all "
					    "of k, mu and rho");
				if (check_min(c, dst, full, 0.0, 0) ||
				    join_len(c, d, dst, full))
					return -1;
			}
		}
		snprintf(full, sizeof full, "%sfraction", pp);
		for (size_t i = 0; i < d->f[j].n; i++) {
			double x = d->f[j].v[i];
			if (!(x >= 0.0 && x <= 1.0))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "%s%zu: volume fraction %.9g is outside "
				    "[0, 1]",
				    d->f[j].is_array ? "element " : "value ", i,
				    x);
		}
		if (join_len(c, d, &d->f[j], full))
			return -1;
		j++;
	}
	for (size_t i = 0; i < d->n; i++) {
		double sum = 0.0;
		for (j = 0; j < m; j++)
			sum += proto_at(&d->f[j], i);
		if (fabs(sum - 1.0) > 1e-6)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "volume fractions sum to %.9g at "
			                  "sample %zu, not 1 (tolerance 1e-6)",
			                  sum, i);
	}
	return 0;
}

/* Loads sample i of the constituents into the scratch arrays. */
static void load_sample(const struct proto_mineral_desc *d, size_t i)
{
	for (size_t j = 0; j < d->m; j++) {
		d->tk[j] = proto_at(&d->k[j], i);
		d->tmu[j] = proto_at(&d->mu[j], i);
		d->trho[j] = proto_at(&d->rho[j], i);
		d->tf[j] = proto_at(&d->f[j], i);
	}
}

/* ---- the description shared with rock.substitute ---------------------- */

/* Parses the mineral of rock.substitute at `path` ("mineral"): a table
 * name, {k, rho} (k > 0, rho > 0; rho optional) or {constituents,
 * method} (method default "hill"). NULL after proto_fail. */
struct proto_mineral_desc *
proto__mineral_desc_parse(proto_call *c, const cJSON *item, const char *path)
{
	struct proto_mineral_desc *d = desc_new(c);
	char full[256], sub[192];
	proto_args a;
	const cJSON *arr;

	if (!d)
		return NULL;
	if (cJSON_IsString(item)) {
		rw_mineral mn;
		if (rw_mineral_find(item->valuestring, NULL, &mn) != RW_OK) {
			unknown_mineral(c, path, item->valuestring);
			return NULL;
		}
		d->explicit_kr = 1;
		d->k1 = scalar_vec(c, mn.k_pa);
		d->rho1 = scalar_vec(c, mn.rho_kgm3);
		if (!d->k1.v || !d->rho1.v) {
			proto_fail(c, PROTO_INTERNAL_ERROR, path,
			           "out of memory");
			return NULL;
		}
		return d;
	}
	if (!cJSON_IsObject(item)) {
		proto_fail(c, PROTO_INVALID_PARAMS, path,
		           "must be a mineral name (see mineral.list), "
		           "{k, rho} or {constituents, method}");
		return NULL;
	}
	snprintf(sub, sizeof sub, "%s.", path);
	if (proto_args_parse(c, item, sub, rock_mineral_params, &a))
		return NULL;
	arr = proto_item_of(&a, "constituents");
	if (arr) {
		for (int q = 0; q < 2; q++) {
			const char *mem = q ? "rho" : "k";
			if (!proto_vec_of(&a, mem)->present)
				continue;
			snprintf(full, sizeof full, "%s%s", sub, mem);
			proto_fail(c, PROTO_INVALID_PARAMS, full,
			           "give either constituents or k and rho, "
			           "not both");
			return NULL;
		}
		d->method = proto_enum_of(c, &a, "method", rock_method_names,
		                          RW_MIX_HILL);
		snprintf(full, sizeof full, "%sconstituents", sub);
		if (d->method < 0 || parse_constituents(c, arr, full, d))
			return NULL;
		return d;
	}
	if (proto_item_of(&a, "method")) {
		snprintf(full, sizeof full, "%smethod", sub);
		proto_fail(c, PROTO_INVALID_PARAMS, full,
		           "only used with constituents");
		return NULL;
	}
	d->k1 = *proto_vec_of(&a, "k");
	d->rho1 = *proto_vec_of(&a, "rho");
	snprintf(full, sizeof full, "%sk", sub);
	if (!d->k1.present) {
		proto_fail(c, PROTO_INVALID_PARAMS, full,
		           "required: the mineral bulk modulus (or give "
		           "a name or constituents)");
		return NULL;
	}
	if (check_min(c, &d->k1, full, 0.0, 1) || join_len(c, d, &d->k1, full))
		return NULL;
	snprintf(full, sizeof full, "%srho", sub);
	if (d->rho1.present && (check_min(c, &d->rho1, full, 0.0, 1) ||
	                        join_len(c, d, &d->rho1, full)))
		return NULL;
	d->explicit_kr = 1;
	return d;
}

size_t proto__mineral_desc_len(const struct proto_mineral_desc *d,
                               int *is_array, const char **len_from)
{
	*is_array = d->any_array;
	*len_from = d->len_from;
	return d->n;
}

int proto__mineral_desc_has_rho(const struct proto_mineral_desc *d)
{
	return !d->explicit_kr || d->rho1.present;
}

/* Mineral bulk modulus (Pa) and density (kg/m^3, NaN when not given) of
 * sample i. Returns the core status of the mix (RW_OK for a table or
 * explicit mineral). */
int proto__mineral_desc_eval(const struct proto_mineral_desc *d, size_t i,
                             double *k_pa, double *rho_kgm3)
{
	if (d->explicit_kr) {
		*k_pa = proto_at(&d->k1, i);
		*rho_kgm3 = d->rho1.present ? proto_at(&d->rho1, i) : NAN;
		return RW_OK;
	}
	load_sample(d, i);
	return rw_mineral_mix(d->method, d->m, d->tk, d->tmu, d->trho, d->tf,
	                      k_pa, NULL, rho_kgm3);
}

/* ---- mineral.list ------------------------------------------------------- */

static int list(proto_call *c)
{
	size_t n = rw_mineral_count();
	double *v = proto_alloc_doubles(c, 3 * n);
	rw_mineral m;

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
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

/* ---- mineral.mix -------------------------------------------------------- */

static int mix(proto_call *c)
{
	static const char *const kkeys[N_METHODS] = {
	    "k_voigt", "k_reuss", "k_hill", "k_hs_upper", "k_hs_lower"};
	static const char *const mkeys[N_METHODS] = {
	    "mu_voigt", "mu_reuss", "mu_hill", "mu_hs_upper", "mu_hs_lower"};
	const proto_args *a = &c->args;
	struct proto_mineral_desc *d = desc_new(c);
	int method, lo, hi;
	double *k, *mu, *rho;
	size_t n;

	if (!d)
		return -1;
	method = proto_enum_of(c, a, "method", method_names, METHOD_ALL);
	if (method < 0 ||
	    parse_constituents(c, proto_item_of(a, "constituents"),
	                       "constituents", d))
		return -1;
	n = d->n;
	lo = method == METHOD_ALL ? 0 : method;
	hi = method == METHOD_ALL ? N_METHODS : method + 1;
	if (proto_check_size(c, n, n * d->m * (size_t)(hi - lo)))
		return -1;
	k = proto_alloc_doubles(c, n * N_METHODS);
	mu = proto_alloc_doubles(c, n * N_METHODS);
	rho = proto_alloc_doubles(c, n);
	if (!k || !mu || !rho)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	for (size_t i = 0; i < n; i++) {
		load_sample(d, i);
		for (int q = lo; q < hi; q++) {
			/* Inputs were checked, so the core cannot fail here;
			 * a failure would show as null. */
			rw_mineral_mix(q, d->m, d->tk, d->tmu, d->trho, d->tf,
			               &k[q * n + i], &mu[q * n + i], &rho[i]);
		}
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "method", method_names[method]);
	if (method == METHOD_ALL) {
		for (int q = 0; q < N_METHODS; q++) {
			proto_w_vec(c, kkeys[q], PK_MODULUS, k + q * n, n, 1,
			            d->any_array);
			proto_w_vec(c, mkeys[q], PK_MODULUS, mu + q * n, n, 1,
			            d->any_array);
		}
	} else {
		proto_w_vec(c, "k", PK_MODULUS, k + method * n, n, 1,
		            d->any_array);
		proto_w_vec(c, "mu", PK_MODULUS, mu + method * n, n, 1,
		            d->any_array);
	}
	proto_w_vec(c, "rho", PK_DENSITY, rho, n, 1, d->any_array);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_mineral_methods[] = {
    {"mineral.list", list, list_params,
     "The built-in mineral table with sources."},
    {"mineral.mix", mix, mix_params,
     "Voigt, Reuss, Hill and Hashin-Shtrikman mixing of constituents by "
     "volume fraction."},
    {NULL, NULL, NULL, NULL},
};
