/* Inputs given as probability distributions: the distribution objects a
 * request may put in place of any number of a per-sample method (names,
 * members, units: a standard deviation converts by the unit's scale only)
 * and the core distribution of each sample. The draws and statistics are
 * in uncertainty.c. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "rockwire/uncertainty.h"

/* ---- distributions ------------------------------------------------------ */

static const char *const dist_names[] = {
    "normal",           "lognormal",   "uniform", "triangular",
    "truncated_normal", "percentiles", NULL};

/* The members of each kind, in parameter order; "scale" members (a
 * standard deviation) convert by the unit's scale only. */
static const struct {
	const char *m[4];
	int scale_only[4];
	int n;
} dist_members[PROTO_DIST_COUNT] = {
    [PROTO_DIST_NORMAL] = {{"mean", "sd"}, {0, 1}, 2},
    [PROTO_DIST_LOGNORMAL] = {{"mean", "sd"}, {0, 1}, 2},
    [PROTO_DIST_UNIFORM] = {{"low", "high"}, {0, 0}, 2},
    [PROTO_DIST_TRIANGULAR] = {{"low", "mode", "high"}, {0, 0, 0}, 3},
    [PROTO_DIST_TRUNC_NORMAL] = {{"mean", "sd", "low", "high"},
                                 {0, 1, 0, 0},
                                 4},
};

/* The core distribution of sample i. */
int proto__dist_at(const proto_dist *d, size_t i, rw_dist *out)
{
	double v[4] = {0, 0, 0, 0};

	for (int k = 0; k < 4; k++)
		if (d->p[k].n)
			v[k] = proto_at(&d->p[k], i);
	if (d->kind == PROTO_DIST_PERCENTILES)
		return rw_dist_from_percentiles(d->p_lo, v[0], d->p_hi, v[1],
		                                d->lognormal, out);
	out->kind = d->kind == PROTO_DIST_NORMAL       ? RW_DIST_NORMAL
	            : d->kind == PROTO_DIST_LOGNORMAL  ? RW_DIST_LOGNORMAL
	            : d->kind == PROTO_DIST_UNIFORM    ? RW_DIST_UNIFORM
	            : d->kind == PROTO_DIST_TRIANGULAR ? RW_DIST_TRIANGULAR
	                                               : RW_DIST_TRUNC_NORMAL;
	out->a = v[0], out->b = v[1], out->c = v[2], out->d = v[3];
	return rw_dist_check(out, NULL);
}

/* Reads parameter member `name` of a distribution object into p. */
static int dist_member(proto_call *c, const proto_field *f, const char *path,
                       const cJSON *o, const char *name, int scale_only,
                       proto_vec *p, size_t *n)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, name);
	const char *full = proto_path(c, path, ".", name);
	size_t len, i = 0;
	double *buf;
	const cJSON *e;

	if (!v)
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "required for this distribution");
	if (cJSON_IsNumber(v))
		len = 1;
	else if (cJSON_IsArray(v) && proto__arr_size(v) > 0 &&
	         !(f->flags & PF_SCALAR))
		len = proto__arr_size(v);
	else
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, full, "must be a number%s",
		    f->flags & PF_SCALAR ? " (one value for the request)"
		                         : " or a non-empty array of numbers");
	if (len > 1 && *n > 1 && len != *n)
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "array length %zu does not match the other "
		                  "parameters of the distribution (%zu)",
		                  len, *n);
	if (len > *n)
		*n = len;
	buf = proto_alloc_doubles(c, len);
	if (!buf)
		return proto_fail(c, PROTO_INTERNAL_ERROR, full,
		                  "out of memory");
	if (cJSON_IsNumber(v)) {
		buf[0] = v->valuedouble;
	} else {
		proto_arr_iter it;
		PROTO_ARR_FOREACH(e, it, v)
		{
			if (!cJSON_IsNumber(e))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "element %zu must be a number", i);
			buf[i++] = e->valuedouble;
		}
	}
	for (i = 0; i < len; i++) {
		if (!isfinite(buf[i]))
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "must be finite");
		buf[i] = scale_only
		             ? proto_to_internal(&c->units, f->kind, buf[i]) -
		                   proto_to_internal(&c->units, f->kind, 0)
		             : proto_to_internal(&c->units, f->kind, buf[i]);
		if (scale_only)
			buf[i] = fabs(buf[i]) * (buf[i] < 0 ? -1 : 1);
	}
	p->v = buf;
	p->n = len;
	p->present = 1;
	p->is_array = cJSON_IsArray(v);
	return 0;
}

int proto__dist_parse(proto_call *c, const proto_field *f, const char *path,
                      const cJSON *v, proto_vec *out)
{
	const cJSON *kind = cJSON_GetObjectItemCaseSensitive(v, "dist"), *m;
	proto_dist *d = proto_alloc(c, sizeof *d);
	const char *full = proto_path(c, path, ".", "dist");
	double *nominal;
	size_t n = 1;
	int k;

	if (!d)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "out of memory");
	memset(d, 0, sizeof *d);
	d->path = path;
	if (!cJSON_IsString(kind))
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "must name the distribution: normal, "
		                  "lognormal, uniform, triangular, "
		                  "truncated_normal or percentiles");
	for (k = 0; dist_names[k]; k++)
		if (strcmp(dist_names[k], kind->valuestring) == 0)
			break;
	if (!dist_names[k]) {
		const char *near = proto__suggest(kind->valuestring, dist_names,
		                                  PROTO_DIST_COUNT);
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "unknown distribution '%s'%s%s%s; accepted: "
		                  "normal, lognormal, uniform, triangular, "
		                  "truncated_normal, percentiles",
		                  kind->valuestring,
		                  near ? "; did you mean '" : "",
		                  near ? near : "", near ? "'?" : "");
	}
	d->kind = k;
	if (k == PROTO_DIST_PERCENTILES) {
		/* exactly two members pNN (e.g. p10 and p90), optional shape */
		const cJSON *pm[2] = {NULL, NULL};
		double pr[2];
		int np = 0;
		cJSON_ArrayForEach(m, v)
		{
			char *end;
			double q;
			if (strcmp(m->string, "dist") == 0)
				continue;
			if (strcmp(m->string, "shape") == 0) {
				if (!cJSON_IsString(m) ||
				    (strcmp(m->valuestring, "normal") &&
				     strcmp(m->valuestring, "lognormal")))
					return proto_fail(
					    c, PROTO_INVALID_PARAMS,
					    proto_path(c, path, ".shape", ""),
					    "must be normal or lognormal");
				d->lognormal =
				    strcmp(m->valuestring, "lognormal") == 0;
				continue;
			}
			q = m->string[0] == 'p' ? strtod(m->string + 1, &end)
			                        : NAN;
			if (m->string[0] != 'p' || *end ||
			    !(q > 0 && q < 100) || np == 2)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, path, ".", m->string),
				    "a percentiles distribution takes two "
				    "members pNN (e.g. p10 and p90) and an "
				    "optional shape");
			pm[np] = m;
			pr[np++] = q;
		}
		if (np != 2)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "a percentiles distribution takes two "
			    "members pNN (e.g. p10 and p90)");
		if (pr[0] > pr[1]) {
			const cJSON *t = pm[0];
			double tq = pr[0];
			pm[0] = pm[1], pr[0] = pr[1];
			pm[1] = t, pr[1] = tq;
		}
		if (pr[0] == pr[1])
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "the two percentiles must differ");
		d->p_lo = pr[0] / 100, d->p_hi = pr[1] / 100;
		for (int j = 0; j < 2; j++)
			if (dist_member(c, f, path, v, pm[j]->string, 0,
			                &d->p[j], &n))
				return -1;
	} else {
		cJSON_ArrayForEach(m, v)
		{
			int known = strcmp(m->string, "dist") == 0;
			for (int j = 0; j < dist_members[k].n; j++)
				known |= strcmp(m->string,
				                dist_members[k].m[j]) == 0;
			if (!known)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, path, ".", m->string),
				    "not a parameter of a %s distribution "
				    "(%s%s%s%s%s%s%s)",
				    dist_names[k], dist_members[k].m[0],
				    dist_members[k].n > 1 ? ", " : "",
				    dist_members[k].n > 1 ? dist_members[k].m[1]
				                          : "",
				    dist_members[k].n > 2 ? ", " : "",
				    dist_members[k].n > 2 ? dist_members[k].m[2]
				                          : "",
				    dist_members[k].n > 3 ? ", " : "",
				    dist_members[k].n > 3 ? dist_members[k].m[3]
				                          : "");
		}
		for (int j = 0; j < dist_members[k].n; j++)
			if (dist_member(c, f, path, v, dist_members[k].m[j],
			                dist_members[k].scale_only[j], &d->p[j],
			                &n))
				return -1;
	}
	d->n = n;
	nominal = proto_alloc_doubles(c, n);
	if (!nominal)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "out of memory");
	for (size_t i = 0; i < n; i++) {
		rw_dist rd;
		const char *why = "invalid parameters";
		if (proto__dist_at(d, i, &rd) != RW_OK) {
			rw_dist_check(&rd, &why);
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "%s%zu: %s",
			                  n > 1 ? "sample " : "value ", i,
			                  d->kind == PROTO_DIST_PERCENTILES
			                      ? "the percentiles must increase "
			                        "(and be > 0 for a lognormal)"
			                      : why);
		}
		nominal[i] = rw_dist_mean(&rd);
	}
	memset(out, 0, sizeof *out);
	out->v = nominal;
	out->n = n;
	out->present = 1;
	out->is_array = n > 1;
	out->dist = d;
	return proto_join(c, f->group, n, n > 1, path);
}
