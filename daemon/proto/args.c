/* Parameter checking by declaration: the one place where presence, types,
 * finiteness, bounds, array lengths, units and cross-field rules of
 * request parameters are checked and converted, before any kernel runs.
 * A proto_decl says what an object may hold and where each member lands
 * in a typed struct; this file walks it. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/session.h"

static const char *type_name(const cJSON *v)
{
	if (cJSON_IsNumber(v))
		return "a number";
	if (cJSON_IsString(v))
		return "a string";
	if (cJSON_IsBool(v))
		return "a boolean";
	if (cJSON_IsNull(v))
		return "null";
	if (cJSON_IsArray(v))
		return "an array";
	if (cJSON_IsObject(v))
		return "an object";
	return "an unknown value";
}

int proto_field_index(const proto_decl *d, const char *name)
{
	/* the first byte first: most names differ there, and a call to
	 * strcmp costs more than the test */
	for (int i = 0; d->fields[i].name; i++)
		if (d->fields[i].name[0] == name[0] &&
		    strcmp(d->fields[i].name, name) == 0)
			return i;
	return -1;
}

int proto_inherited_at(const void *s, const proto_decl *d, size_t offset)
{
	const proto_hdr *h = s;
	for (int i = 0; d->fields[i].name; i++)
		if (d->fields[i].offset == offset)
			return (int)((h->inherited >> i) & 1u);
	assert(!"no field at that offset");
	return 0;
}

/* Joins "a, b, c" of a NULL-terminated list into buf. */
static void join_names(const char *const *names, char *buf, size_t size)
{
	size_t used = 0;
	buf[0] = '\0';
	for (size_t i = 0; names[i] && used < size; i++) {
		int n = snprintf(buf + used, size - used, "%s%s", i ? ", " : "",
		                 names[i]);
		if (n < 0)
			break;
		used += (size_t)n;
	}
}

static void field_names(const proto_decl *d, char *buf, size_t size)
{
	size_t used = 0;
	buf[0] = '\0';
	for (size_t i = 0; d->fields[i].name && used < size; i++) {
		int n = snprintf(buf + used, size - used, "%s%s", i ? ", " : "",
		                 d->fields[i].name);
		if (n < 0)
			break;
		used += (size_t)n;
	}
}

/* ---- numbers ------------------------------------------------------------ */

/* The bound of f in the call's units, for messages. */
static double shown(const proto_call *c, const proto_field *f, double v)
{
	return proto_from_internal(&c->units, f->kind, v);
}

int proto__check_bounds(proto_call *c, const proto_field *f, const char *path,
                        const double *v, size_t n, int is_array)
{
	int lo = (f->flags & (PF_LO | PF_FRACTION)) != 0;
	int hi = (f->flags & (PF_HI | PF_FRACTION)) != 0;
	double l = f->flags & PF_FRACTION && !(f->flags & PF_LO) ? 0 : f->lo;
	double h = f->flags & PF_FRACTION && !(f->flags & PF_HI) ? 1 : f->hi;
	const char *unit = proto_unit_name(&c->units, f->kind);
	char at[48];

	if (!lo && !hi && !(f->flags & PF_INT))
		return 0;
	for (size_t i = 0; i < n; i++) {
		double x = v[i];
		int bad_lo, bad_hi;
		if (isnan(x))
			continue; /* a null sample: QC flags say why */
		bad_lo = lo && (f->flags & PF_LO_OPEN ? !(x > l) : !(x >= l));
		bad_hi = hi && (f->flags & PF_HI_OPEN ? !(x < h) : !(x <= h));
		if (is_array)
			snprintf(at, sizeof at, "element %zu: ", i);
		else
			at[0] = '\0';
		if ((f->flags & PF_INT) && x != floor(x))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "%s%.9g is not an integer", at,
			                  shown(c, f, x));
		if (!bad_lo && !bad_hi)
			continue;
		if (f->flags & PF_FRACTION && x > 1 && x <= 100)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "%s%.9g is outside [0, 1]: fractions, "
			    "not percent (%.9g?)",
			    at, x, x / 100);
		if (lo && hi)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "%s%.9g%s%s is outside %s%.9g, %.9g%s", at,
			    shown(c, f, x), f->kind ? " " : "",
			    f->kind ? unit : "",
			    f->flags & PF_LO_OPEN ? "(" : "[", shown(c, f, l),
			    shown(c, f, h), f->flags & PF_HI_OPEN ? ")" : "]");
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path, "%s%.9g%s%s must be %s %.9g",
		    at, shown(c, f, x), f->kind ? " " : "", f->kind ? unit : "",
		    bad_lo ? (f->flags & PF_LO_OPEN ? ">" : ">=")
		           : (f->flags & PF_HI_OPEN ? "<" : "<="),
		    shown(c, f, bad_lo ? l : h));
	}
	return 0;
}

static int parse_nums(proto_call *c, const proto_field *f, const char *path,
                      const cJSON *v, proto_vec *out)
{
	size_t n, i = 0;
	double *buf;
	const cJSON *e;

	if (cJSON_IsNull(v) && (f->flags & PF_NULLS) &&
	    !(f->flags & PF_ARRAY)) {
		/* one missing sample (a real-time record without this curve) */
		buf = proto_alloc_doubles(c, 1);
		if (!buf)
			return proto_fail(c, PROTO_INTERNAL_ERROR, path,
			                  "out of memory");
		buf[0] = NAN;
		out->v = buf;
		out->n = 1;
		out->present = 1;
		out->is_array = 0;
		return 0;
	}
	if (cJSON_IsNumber(v)) {
		if (f->flags & PF_ARRAY)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "must be an array with one value per "
			                  "sample, not a single number");
		n = 1;
	} else if (cJSON_IsArray(v)) {
		if (f->flags & PF_SCALAR)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "must be a single number: it is one "
			                  "value for the whole request, not an "
			                  "array");
		n = proto__arr_size(v);
		if (n == 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "empty array: give at least one value");
	} else if (cJSON_IsObject(v) &&
	           cJSON_GetObjectItemCaseSensitive(v, "dist")) {
		if (f->flags & PF_ARRAY || !c->method ||
		    (c->method->flags & PM_NO_UNCERTAINTY) ||
		    !c->method->kernel)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "cannot be given as a distribution "
			    "here: uncertainty runs the per-sample "
			    "kernels of a method over draws");
		return proto__dist_parse(c, f, path, v, out);
	} else {
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path, "must be %s%s, not %s",
		    f->flags & PF_SCALAR ? "a number"
		                         : "a number or an array of numbers",
		    f->flags & PF_NULLS ? " (null: missing)" : "",
		    type_name(v));
	}
	buf = proto_alloc_doubles(c, n);
	if (!buf)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "out of memory for %zu values", n);
	if (cJSON_IsNumber(v)) {
		if (!isfinite(v->valuedouble))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "number out of range: it does not fit "
			    "in a double");
		buf[0] = v->valuedouble;
	} else if (proto__numarr(v)) {
		/* parsed before cJSON (inarr.c): numbers, NaN for null */
		memcpy(buf, proto__numarr(v)->v, n * sizeof *buf);
		if (!(f->flags & PF_NULLS))
			for (i = 0; i < n; i++)
				if (isnan(buf[i]))
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, path,
					    "element %zu must be a number, "
					    "not null",
					    i);
	} else {
		cJSON_ArrayForEach(e, v)
		{
			if (cJSON_IsNumber(e)) {
				if (!isfinite(e->valuedouble))
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, path,
					    "element %zu: number out of range: "
					    "it does not fit in a double",
					    i);
				buf[i] = e->valuedouble;
			} else if (cJSON_IsNull(e) && (f->flags & PF_NULLS)) {
				buf[i] = NAN;
			} else {
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, path,
				    "element %zu must be a number%s, not %s", i,
				    f->flags & PF_NULLS ? " or null" : "",
				    type_name(e));
			}
			i++;
		}
	}
	for (i = 0; i < n; i++)
		buf[i] = proto_to_internal(&c->units, f->kind, buf[i]);
	if (proto__check_bounds(c, f, path, buf, n, cJSON_IsArray(v)))
		return -1;
	out->v = buf;
	out->n = n;
	out->present = 1;
	out->is_array = cJSON_IsArray(v) ? 1 : 0;
	if (f->flags & PF_LIST)
		return 0;
	return proto_join(c, f->group, n, out->is_array, path);
}

int proto__vec_accept(proto_call *c, const proto_field *f, const char *path,
                      const double *v, size_t n, int is_array, void *dst)
{
	proto_vec *out = (proto_vec *)((unsigned char *)dst + f->offset);

	if (is_array && (f->flags & PF_SCALAR))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "the session holds an array, but this "
		                  "method takes one value for the request");
	if (!is_array && (f->flags & PF_ARRAY))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "the session holds one value, but this "
		                  "method needs one per sample");
	if (proto__check_bounds(c, f, path, v, n, is_array))
		return -1;
	out->v = v;
	out->n = n;
	out->present = 1;
	out->inherited = 1;
	out->is_array = is_array ? 1 : 0;
	if (f->flags & PF_LIST)
		return 0;
	return proto_join(c, f->group, n, is_array, path);
}

/* ---- strings and choices ------------------------------------------------ */

static size_t count_names(const char *const *names)
{
	size_t n = 0;
	while (names[n])
		n++;
	return n;
}

static int unknown_choice(proto_call *c, const proto_field *f, const char *path,
                          const char *s)
{
	char list[512];
	const char *near =
	    proto__suggest(s, f->choices, count_names(f->choices));

	join_names(f->choices, list, sizeof list);
	if (near)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "unknown value '%s'; did you mean '%s'? "
		                  "accepted: %s",
		                  s, near, list);
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "unknown value '%s'; accepted: %s", s, list);
}

static int choice_index(const proto_field *f, const char *s)
{
	for (int i = 0; f->choices[i]; i++)
		if (strcmp(f->choices[i], s) == 0)
			return i;
	return -1;
}

static int parse_enumset(proto_call *c, const proto_field *f, const char *path,
                         const cJSON *v, proto_enumset *o)
{
	const cJSON *e;
	proto_arr_iter it;
	size_t i = 0;

	memset(o, 0, sizeof *o);
	if (!cJSON_IsString(v) && !(cJSON_IsArray(v) && proto__arr_size(v) > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be a name or a non-empty array of "
		                  "names");
	for (e = cJSON_IsString(v) ? v : proto__arr_first(&it, v); e;
	     e = cJSON_IsString(v) ? NULL : proto__arr_next(&it), i++) {
		int k;
		if (!cJSON_IsString(e))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "element %zu must be a name (a "
			                  "string), not %s",
			                  i, type_name(e));
		k = choice_index(f, e->valuestring);
		if (k < 0)
			return unknown_choice(c, f, path, e->valuestring);
		assert(k < 32);
		if (o->mask & (1u << k))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "'%s' is given twice",
			                  e->valuestring);
		o->mask |= 1u << k;
		o->id[o->n++] = (unsigned char)k;
	}
	return 0;
}

/* ---- one field ---------------------------------------------------------- */

static int parse_list(proto_call *c, const proto_field *f, const char *path,
                      const cJSON *v, proto_list *o)
{
	const cJSON *e;
	proto_arr_iter it;
	size_t n, j = 0;
	unsigned char *items;

	if (!cJSON_IsArray(v))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be an array of objects, not %s",
		                  type_name(v));
	n = proto__arr_size(v);
	if (n == 0)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "empty: give at least one");
	items = proto_alloc(c, n * f->sub->size);
	if (!items)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "out of memory");
	PROTO_ARR_FOREACH(e, it, v)
	{
		char idx[32];
		snprintf(idx, sizeof idx, "[%zu].", j);
		if (!cJSON_IsObject(e) &&
		    !(cJSON_IsString(e) && f->sub->from_string)) {
			snprintf(idx, sizeof idx, "[%zu]", j);
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, path, idx, ""),
			                  "must be an object, not %s",
			                  type_name(e));
		}
		if (proto_decl_parse(c, f->sub, e, proto_path(c, path, idx, ""),
		                     items + j * f->sub->size))
			return -1;
		j++;
	}
	o->n = n;
	o->items = items;
	return 0;
}

/* Parses the value v of field f into its place in dst. */
static int parse_field(proto_call *c, const proto_field *f, const char *path,
                       const cJSON *v, unsigned char *dst)
{
	void *at = dst + f->offset;

	switch (f->type) {
	case PT_NUMS: return parse_nums(c, f, path, v, at);
	case PT_STR:
		if (!cJSON_IsString(v))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "must be a string, not %s",
			                  type_name(v));
		*(const char **)at = v->valuestring;
		return 0;
	case PT_BOOL:
		if (!cJSON_IsBool(v))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "must be true or false, not %s",
			                  type_name(v));
		*(int *)at = cJSON_IsTrue(v);
		return 0;
	case PT_ENUM: {
		int k;
		if (!cJSON_IsString(v))
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "must be a string, not %s",
			                  type_name(v));
		k = choice_index(f, v->valuestring);
		if (k < 0)
			return unknown_choice(c, f, path, v->valuestring);
		*(int *)at = k;
		return 0;
	}
	case PT_ENUMSET: return parse_enumset(c, f, path, v, at);
	case PT_OBJ:
		if (!cJSON_IsObject(v) &&
		    !(cJSON_IsString(v) && f->sub->from_string))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "must be %s%s, not %s",
			    f->sub->from_string
			        ? (f->sub->string_desc ? f->sub->string_desc
			                               : "a name")
			        : "an object",
			    f->sub->from_string ? " or an object" : "",
			    type_name(v));
		return proto_decl_parse(c, f->sub, v,
		                        proto_path(c, path, ".", ""), at);
	case PT_LIST: return parse_list(c, f, path, v, at);
	case PT_CUSTOM: return f->custom->parse(c, v, path, at);
	}
	assert(!"unknown field type");
	return proto_fail(c, PROTO_INTERNAL_ERROR, path, "bad declaration");
}

/* Puts field f of dst in its absent state: default or zero. */
static void field_absent(const proto_field *f, unsigned char *dst)
{
	void *at = dst + f->offset;

	switch (f->type) {
	case PT_NUMS: {
		proto_vec *x = at;
		memset(x, 0, sizeof *x);
		if (f->flags & PF_DFLT) {
			x->v = &f->dflt; /* static storage of the declaration */
			x->n = 1;
		}
		break;
	}
	case PT_STR:
		*(const char **)at = f->flags & PF_DFLT ? f->dflt_str : NULL;
		break;
	case PT_BOOL:
		*(int *)at = f->flags & PF_DFLT ? f->dflt_choice : 0;
		break;
	case PT_ENUM:
		*(int *)at = f->flags & PF_DFLT ? f->dflt_choice : -1;
		break;
	case PT_ENUMSET: {
		proto_enumset *s = at;
		memset(s, 0, sizeof *s);
		if (f->flags & PF_DFLT) {
			s->id[0] = (unsigned char)f->dflt_choice;
			s->n = 1;
			s->mask = 1u << f->dflt_choice;
		}
		break;
	}
	case PT_OBJ: memset(at, 0, f->sub->size); break;
	case PT_LIST: memset(at, 0, sizeof(proto_list)); break;
	case PT_CUSTOM:
		if (f->custom->absent)
			f->custom->absent(at);
		break;
	}
}

/* ---- rules -------------------------------------------------------------- */

/* Resolves "name" or "name=value" of d: field index and the enum value
 * index (-1 for a plain name). */
static int resolve_slow(const proto_decl *d, const char *ref, int *value)
{
	char name[64];
	const char *eq = strchr(ref, '=');
	size_t len = eq ? (size_t)(eq - ref) : strlen(ref);
	int i;

	*value = -1;
	if (len >= sizeof name)
		return -1;
	memcpy(name, ref, len);
	name[len] = '\0';
	i = proto_field_index(d, name);
	assert(i >= 0 && "a rule names a field its declaration lacks");
	if (i >= 0 && eq) {
		const proto_field *f = &d->fields[i];
		assert(f->type == PT_ENUM && f->choices);
		*value = f->type == PT_ENUM ? choice_index(f, eq + 1) : -1;
		assert(*value >= 0 && "a rule names an unknown enum value");
	}
	return i;
}

/* Rules are static declarations, so a (declaration, name) pair always
 * resolves the same: a small direct-mapped cache per thread saves the
 * string look-ups that cost a tenth of a small request. */
static int resolve(const proto_decl *d, const char *ref, int *value)
{
	static __thread struct {
		const proto_decl *d;
		const char *ref;
		int i, value;
	} cache[256];
	uintptr_t key = (uintptr_t)d ^ ((uintptr_t)ref * 0x9e3779b1u);
	size_t slot = (size_t)((key >> 4) ^ (key >> 12)) & 255;

	if (cache[slot].d == d && cache[slot].ref == ref) {
		*value = cache[slot].value;
		return cache[slot].i;
	}
	cache[slot].i = resolve_slow(d, ref, value);
	cache[slot].value = *value;
	cache[slot].d = d;
	cache[slot].ref = ref;
	return cache[slot].i;
}

/* The field indices of rule r's names (at most 32), into idx; returns
 * their count. Resolved once per thread and rule: a rule of thirteen
 * names cost thirteen look-ups a request. */
static int rule_fields(const proto_decl *d, const proto_rule *r, int *idx)
{
	static __thread struct {
		const proto_decl *d;
		const proto_rule *r;
		int n, idx[32];
	} cache[64];
	uintptr_t key = (uintptr_t)d ^ ((uintptr_t)r * 0x9e3779b1u);
	size_t slot = (size_t)((key >> 4) ^ (key >> 10)) & 63;
	int n = 0;

	if (cache[slot].d != d || cache[slot].r != r) {
		for (int k = 0; r->names && r->names[k]; k++) {
			int value, i = resolve(d, r->names[k], &value);
			assert(n < 32);
			if (i >= 0 && n < 32)
				cache[slot].idx[n++] = i;
		}
		cache[slot].n = n;
		cache[slot].d = d;
		cache[slot].r = r;
	}
	memcpy(idx, cache[slot].idx, (size_t)cache[slot].n * sizeof *idx);
	return cache[slot].n;
}

/* Does ref hold for the parsed struct? */
static int holds(const proto_decl *d, const void *dst, const char *ref)
{
	int value, i = resolve(d, ref, &value);
	if (i < 0)
		return 0;
	if (value >= 0)
		return *(const int *)((const unsigned char *)dst +
		                      d->fields[i].offset) == value;
	return proto_given(dst, i);
}

/* Drops an inherited field (a session default) that breaks a rule: a
 * default does not apply where the request makes it meaningless. */
static int drop_inherited(const proto_decl *d, void *dst, int i)
{
	proto_hdr *h = dst;
	if (!((h->inherited >> i) & 1u))
		return 0;
	h->inherited &= ~((uint64_t)1 << i);
	field_absent(&d->fields[i], dst);
	return 1;
}

static int check_rule(proto_call *c, const proto_decl *d, void *dst,
                      const proto_rule *r)
{
	const proto_hdr *h = dst;
	int idx[32], n = 0, given = 0, first_missing = -1, first_given = -1;
	int extra_given = -1;

	if (r->when && !holds(d, dst, r->when))
		return 0;
	n = rule_fields(d, r, idx);
	for (int k = 0; k < n; k++) {
		int i = idx[k];
		if (proto_given(dst, i)) {
			given++;
			if (first_given < 0)
				first_given = i;
		} else if (first_missing < 0) {
			first_missing = i;
		}
	}
	switch (r->kind) {
	case PR_EXACTLY:
	case PR_AT_MOST:
		if (given > r->count) {
			/* Too many: session defaults yield first. */
			for (int k = n - 1; k >= 0 && given > r->count; k--)
				if (drop_inherited(d, dst, idx[k]))
					given--;
			if (given > r->count) {
				int seen = 0;
				for (int k = 0; k < n; k++)
					if (proto_given(dst, idx[k]) &&
					    ++seen == r->count + 1)
						extra_given = idx[k];
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, h->path,
				               d->fields[extra_given].name, ""),
				    "%s (%d given)", r->why, given);
			}
		}
		if (r->kind == PR_EXACTLY && given < r->count)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, h->path,
			               d->fields[first_given >= 0 ? first_given
			                                          : idx[0]]
			                   .name,
			               ""),
			    "%s (%d given)", r->why, given);
		return 0;
	case PR_AT_LEAST:
		if (given < r->count)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, h->path, d->fields[idx[0]].name, ""),
			    "%s", r->why);
		return 0;
	case PR_ALL_OR_NONE:
		if (given && given < n) {
			for (int k = 0; k < n; k++)
				drop_inherited(d, dst, idx[k]);
			given = 0;
			first_missing = -1;
			for (int k = 0; k < n; k++) {
				if (proto_given(dst, idx[k]))
					given++;
				else if (first_missing < 0)
					first_missing = idx[k];
			}
			if (given && given < n)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, h->path,
				               d->fields[first_missing].name,
				               ""),
				    "%s", r->why);
		}
		return 0;
	case PR_REQUIRES:
		if (first_missing >= 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, h->path,
			               d->fields[first_missing].name, ""),
			    "%s", r->why);
		return 0;
	case PR_FORBIDS:
		for (int k = 0; k < n; k++) {
			if (!proto_given(dst, idx[k]) ||
			    drop_inherited(d, dst, idx[k]))
				continue;
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, h->path, d->fields[idx[k]].name, ""),
			    "%s", r->why);
		}
		return 0;
	case PR_ONLY: {
		int wi = -1, wv;
		if (r->when)
			wi = resolve(d, r->when, &wv);
		for (int i = 0; d->fields[i].name; i++) {
			int listed = i == wi;
			for (int k = 0; k < n && !listed; k++)
				listed = idx[k] == i;
			if (listed || !proto_given(dst, i) ||
			    drop_inherited(d, dst, i))
				continue;
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, h->path, d->fields[i].name, ""), "%s",
			    r->why);
		}
		return 0;
	}
	case PR_END: break;
	}
	return 0;
}

/* ---- an object ---------------------------------------------------------- */

int proto_decl_parse(proto_call *c, const proto_decl *d, const cJSON *obj,
                     const char *path, void *dst)
{
	unsigned char *base = dst;
	proto_hdr *h = dst;
	const cJSON *m;
	char list[1024];
	int nfields = 0;

	memset(dst, 0, d->size);
	h->path = path;
	while (d->fields[nfields].name)
		nfields++;
	assert(nfields <= 64);
	for (int i = 0; i < nfields; i++)
		field_absent(&d->fields[i], base);
	if (obj && cJSON_IsString(obj) && d->from_string) {
		/* "quartz" for {"name": "quartz"}: the path is the member's
		 * own, without the trailing dot. */
		char *own = proto_strdup(c, path);
		size_t len = own ? strlen(own) : 0;
		if (!own)
			return proto_fail(c, PROTO_INTERNAL_ERROR, path,
			                  "out of memory");
		if (len && own[len - 1] == '.')
			own[len - 1] = '\0';
		h->present = 1;
		if (d->from_string(c, obj->valuestring, own, dst))
			return -1;
		return d->check ? d->check(c, dst) : 0;
	}
	if (obj && !cJSON_IsObject(obj)) {
		char *own = proto_strdup(c, *path ? path : "params");
		size_t len = own ? strlen(own) : 0;
		if (len && own[len - 1] == '.')
			own[len - 1] = '\0';
		return proto_fail(c, PROTO_INVALID_PARAMS, own ? own : path,
		                  "must be an object of named parameters, not "
		                  "%s",
		                  type_name(obj));
	}
	if (obj) {
		h->present = 1;
		cJSON_ArrayForEach(m, obj)
		{
			int i = proto_field_index(d, m->string);
			const char *full = proto_path(c, path, m->string, "");
			if (i < 0) {
				const char *names[64], *near;
				/* "units", "digits" and "fields" are accepted
				 * at the top of every method and handled by the
				 * driver. */
				if (!*path &&
				    (strcmp(m->string, "units") == 0 ||
				     strcmp(m->string, "digits") == 0 ||
				     strcmp(m->string, "fields") == 0 ||
				     strcmp(m->string, "uncertainty") == 0))
					continue;
				for (int k = 0; k < nfields; k++)
					names[k] = d->fields[k].name;
				near = proto__suggest(m->string, names,
				                      (size_t)nfields);
				field_names(d, list, sizeof list);
				if (near)
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, full,
					    "unknown parameter; did you mean "
					    "'%s'? accepted: %s",
					    near, list);
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "unknown parameter; accepted: "
				    "%s",
				    nfields ? list : "none");
			}
			h->given |= (uint64_t)1 << i;
			if (parse_field(c, &d->fields[i], full, m, base))
				return -1;
		}
	}
	/* Session defaults fill what the request leaves out (top level of a
	 * method's params only). */
	if (!*path && c->method && d == c->method->params &&
	    !(c->method->flags & PM_SESSION) && c->inherit &&
	    c->inherit(c, d, dst, obj))
		return -1;
	for (int i = 0; i < nfields; i++) {
		const proto_field *f = &d->fields[i];
		if ((f->flags & PF_REQ) && !proto_given(dst, i))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, path, f->name, ""),
			                  "required parameter is missing");
	}
	for (const proto_rule *r = d->rules; r && r->kind != PR_END; r++)
		if (check_rule(c, d, dst, r))
			return -1;
	return d->check ? d->check(c, dst) : 0;
}

/* Parses one field's value from a session default (session.c): JSON v,
 * under the units the default was given in. */
int proto__field_parse(proto_call *c, const proto_field *f, const cJSON *v,
                       void *dst)
{
	return parse_field(c, f, f->name, v, dst);
}

/* ---- self-check of the declarations ------------------------------------- */

static int check_decl(const proto_decl *d, const char *where, char *why,
                      size_t n, int depth)
{
	int nf = 0;

	if (depth > 8)
		return 0;
	for (const proto_field *f = d->fields; f->name; f++, nf++) {
		for (const proto_field *g = d->fields; g != f; g++)
			if (strcmp(g->name, f->name) == 0) {
				snprintf(why, n, "%s: field %s twice", where,
				         f->name);
				return -1;
			}
		if (f->offset < sizeof(proto_hdr) || f->offset >= d->size) {
			snprintf(why, n,
			         "%s.%s: offset %zu outside the struct "
			         "(%zu bytes after its header)",
			         where, f->name, f->offset, d->size);
			return -1;
		}
		if ((f->type == PT_ENUM || f->type == PT_ENUMSET) &&
		    (!f->choices ||
		     ((f->flags & PF_DFLT) &&
		      f->dflt_choice >= (int)count_names(f->choices)))) {
			snprintf(why, n, "%s.%s: choices", where, f->name);
			return -1;
		}
		if ((f->type == PT_OBJ || f->type == PT_LIST) &&
		    (!f->sub || check_decl(f->sub, f->name, why, n, depth + 1)))
			return f->sub ? -1
			              : (snprintf(why, n, "%s.%s: no sub",
			                          where, f->name),
			                 -1);
		if (f->type == PT_CUSTOM && (!f->custom || !f->custom->parse)) {
			snprintf(why, n, "%s.%s: no parser", where, f->name);
			return -1;
		}
		if (f->group >= PROTO_MAX_GROUPS) {
			snprintf(why, n, "%s.%s: group", where, f->name);
			return -1;
		}
	}
	if (nf > 64) {
		snprintf(why, n, "%s: more than 64 fields", where);
		return -1;
	}
	for (const proto_rule *r = d->rules; r && r->kind != PR_END; r++) {
		int v;
		if (r->when && resolve(d, r->when, &v) < 0) {
			snprintf(why, n, "%s: rule condition %s", where,
			         r->when);
			return -1;
		}
		for (int k = 0; r->names && r->names[k]; k++)
			if (resolve(d, r->names[k], &v) < 0) {
				snprintf(why, n, "%s: rule names %s", where,
				         r->names[k]);
				return -1;
			}
		if (!r->why || !r->names) {
			snprintf(why, n, "%s: rule without names or reason",
			         where);
			return -1;
		}
	}
	return 0;
}

int proto__decl_selfcheck(char *why, size_t n)
{
	const proto_method *m;

	for (size_t i = 0; (m = proto_method_at(i)); i++) {
		if (!m->params || !m->summary || (!m->kernel && !m->body)) {
			snprintf(why, n,
			         "%s: params, summary and a kernel or "
			         "body are required",
			         m->name);
			return -1;
		}
		if (check_decl(m->params, m->name, why, n, 0))
			return -1;
		if (m->kernel &&
		    (!m->outputs || !m->row_size ||
		     m->qc_offset + sizeof(uint64_t) > m->row_size)) {
			snprintf(why, n, "%s: outputs, row and qc offset",
			         m->name);
			return -1;
		}
		for (const proto_output *o = m->outputs; o && o->name; o++) {
			size_t lim = o->dim == D_REQ || o->type == PO_VEC
			                 ? m->params->size
			             : o->dim == D_SAMPLE
			                 ? m->row_size
			                 : m->cells[o->dim - D_CELL].row_size;
			if (o->type != PO_COUNT && o->type != PO_CUSTOM &&
			    o->offset >= lim) {
				snprintf(why, n, "%s: output %s offset",
				         m->name, o->name);
				return -1;
			}
			if ((o->type == PO_ENUM && !o->choices) ||
			    (o->type == PO_CUSTOM && o->dim == D_REQ &&
			     !o->write && m->kernel)) {
				snprintf(why, n, "%s: output %s", m->name,
				         o->name);
				return -1;
			}
		}
	}
	return 0;
}
