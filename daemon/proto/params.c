/* Parameter checking: the one place where presence, types, finiteness,
 * array lengths and units of request parameters are checked and converted,
 * before any handler runs. Also the per-call arena and error recording. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"

struct proto_arena_block {
	proto_arena_block *next;
	max_align_t align[];
};

void *proto_alloc(proto_call *c, size_t bytes)
{
	proto_arena_block *b;

	if (bytes > SIZE_MAX - sizeof *b)
		return NULL;
	b = malloc(sizeof *b + (bytes ? bytes : 1));
	if (!b)
		return NULL;
	b->next = c->arena;
	c->arena = b;
	return b->align;
}

double *proto_alloc_doubles(proto_call *c, size_t n)
{
	if (n > SIZE_MAX / sizeof(double))
		return NULL;
	return proto_alloc(c, n * sizeof(double));
}

void proto__arena_free(proto_call *c)
{
	while (c->arena) {
		proto_arena_block *next = c->arena->next;
		free(c->arena);
		c->arena = next;
	}
}

int proto_fail(proto_call *c, int code, const char *param, const char *fmt, ...)
{
	va_list ap;

	if (c->err_code)
		return -1; /* keep the first error */
	c->err_code = code;
	snprintf(c->err_param, sizeof c->err_param, "%s", param ? param : "");
	va_start(ap, fmt);
	vsnprintf(c->err_reason, sizeof c->err_reason, fmt, ap);
	va_end(ap);
	return -1;
}

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

static const char *want_name(proto_ptype t)
{
	switch (t) {
	case PT_NUMS: return "a number or an array of numbers";
	case PT_NUM: return "a number";
	case PT_INT: return "an integer";
	case PT_STR: return "a string";
	case PT_BOOL: return "true or false";
	case PT_OBJ: return "an object";
	case PT_ARR: return "an array";
	default: return "a JSON value";
	}
}

/* Converts and checks one numeric member. */
static int parse_nums(proto_call *c, const proto_param *p, const char *full,
                      const cJSON *v, proto_vec *out)
{
	size_t n, i = 0;
	double *buf;
	const cJSON *e;

	if (cJSON_IsNumber(v)) {
		n = 1;
	} else if (cJSON_IsArray(v) && p->type == PT_NUMS) {
		n = (size_t)cJSON_GetArraySize(v);
		if (n == 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, full,
			    "empty array: give at least one value");
	} else {
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "must be %s, not %s", want_name(p->type),
		                  type_name(v));
	}
	buf = proto_alloc_doubles(c, n);
	if (!buf)
		return proto_fail(c, PROTO_INTERNAL_ERROR, full,
		                  "out of memory for %zu values", n);
	if (n == 1 && cJSON_IsNumber(v)) {
		buf[0] = v->valuedouble;
		if (!isfinite(buf[0]))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, full,
			    "number out of range: it does not fit "
			    "in a double");
		buf[0] = proto_to_internal(&c->units, p->kind, buf[0]);
	} else {
		cJSON_ArrayForEach(e, v)
		{
			if (cJSON_IsNumber(e)) {
				if (!isfinite(e->valuedouble))
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, full,
					    "element %zu: number out of range: "
					    "it does not fit in a double",
					    i);
				buf[i] = proto_to_internal(&c->units, p->kind,
				                           e->valuedouble);
			} else if (cJSON_IsNull(e) && (p->flags & PP_NULLS)) {
				buf[i] = NAN;
			} else {
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "element %zu must be a number%s, not %s", i,
				    p->flags & PP_NULLS ? " or null" : "",
				    type_name(e));
			}
			i++;
		}
	}
	out->v = buf;
	out->n = n;
	out->present = 1;
	out->is_array = cJSON_IsArray(v);
	return 0;
}

static void accepted_names(const proto_param *spec, char *buf, size_t size)
{
	size_t used = 0;
	buf[0] = '\0';
	for (size_t i = 0; spec[i].name && used < size; i++) {
		int n = snprintf(buf + used, size - used, "%s%s", i ? ", " : "",
		                 spec[i].name);
		if (n < 0)
			break;
		used += (size_t)n;
	}
}

int proto_args_parse(proto_call *c, const cJSON *obj, const char *path,
                     const proto_param *spec, proto_args *a)
{
	static const proto_param none[] = {{NULL, PT_ANY, PK_NONE, 0, 0}};
	char full[160], list[512];
	const cJSON *m;
	size_t count = 0;

	memset(a, 0, sizeof *a);
	if (!spec)
		spec = none;
	while (spec[count].name)
		count++;
	if (count > PROTO_MAX_PARAMS)
		return proto_fail(c, PROTO_INTERNAL_ERROR, path,
		                  "parameter spec too long");
	a->spec = spec;
	a->count = count;
	a->path = path;
	if (obj && !cJSON_IsObject(obj))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  *path ? path : "params",
		                  "must be an object of named parameters, not "
		                  "%s",
		                  type_name(obj));
	if (obj) {
		cJSON_ArrayForEach(m, obj)
		{
			size_t i;
			for (i = 0; i < count; i++)
				if (strcmp(spec[i].name, m->string) == 0)
					break;
			snprintf(full, sizeof full, "%s%s", path, m->string);
			if (i == count) {
				/* "units" is accepted at the top of every
				 * method and applied before this. */
				if (!*path && strcmp(m->string, "units") == 0)
					continue;
				accepted_names(spec, list, sizeof list);
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "unknown parameter; accepted: "
				    "%s",
				    count ? list : "none");
			}
			a->item[i] = m;
		}
	}
	for (size_t i = 0; i < count; i++) {
		const proto_param *p = &spec[i];
		const cJSON *v = a->item[i];
		snprintf(full, sizeof full, "%s%s", path, p->name);
		if (!v) {
			if (p->flags & PP_REQUIRED)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "required parameter is missing");
			continue;
		}
		switch (p->type) {
		case PT_NUMS:
		case PT_NUM:
			if (parse_nums(c, p, full, v, &a->vec[i]))
				return -1;
			break;
		case PT_INT:
			if (!cJSON_IsNumber(v) || !isfinite(v->valuedouble) ||
			    v->valuedouble != floor(v->valuedouble) ||
			    fabs(v->valuedouble) > 9007199254740992.0)
				return proto_fail(c, PROTO_INVALID_PARAMS, full,
				                  "must be an integer, not %s",
				                  cJSON_IsNumber(v)
				                      ? "a fractional or huge "
				                        "number"
				                      : type_name(v));
			break;
		case PT_STR:
			if (!cJSON_IsString(v))
				goto wrong;
			break;
		case PT_BOOL:
			if (!cJSON_IsBool(v))
				goto wrong;
			break;
		case PT_OBJ:
			if (!cJSON_IsObject(v))
				goto wrong;
			break;
		case PT_ARR:
			if (!cJSON_IsArray(v))
				goto wrong;
			break;
		case PT_ANY: break;
		}
		continue;
	wrong:
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "must be %s, not %s", want_name(p->type),
		                  type_name(v));
	}
	/* Broadcast lengths per group: arrays must agree, scalars follow. */
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		a->n[g] = 1;
	for (size_t i = 0; i < count; i++) {
		const proto_vec *x = &a->vec[i];
		int g = spec[i].group;
		if (!x->present || !x->is_array)
			continue;
		if (g < 0 || g >= PROTO_MAX_GROUPS)
			return proto_fail(c, PROTO_INTERNAL_ERROR, spec[i].name,
			                  "bad broadcast group");
		if (a->any_array[g] && x->n != a->n[g]) {
			size_t j;
			for (j = 0; j < i; j++)
				if (spec[j].group == g && a->vec[j].is_array)
					break;
			snprintf(full, sizeof full, "%s%s", path, spec[i].name);
			return proto_fail(c, PROTO_INVALID_PARAMS, full,
			                  "array length %zu does not match "
			                  "length %zu of '%s%s'",
			                  x->n, a->n[g], path, spec[j].name);
		}
		a->any_array[g] = 1;
		a->n[g] = x->n;
	}
	return 0;
}

static size_t index_of(const proto_args *a, const char *name)
{
	for (size_t i = 0; i < a->count; i++)
		if (strcmp(a->spec[i].name, name) == 0)
			return i;
	return a->count;
}

const proto_vec *proto_vec_of(const proto_args *a, const char *name)
{
	static const proto_vec absent = {NULL, 0, 0, 0};
	size_t i = index_of(a, name);
	return i < a->count ? &a->vec[i] : &absent;
}

const cJSON *proto_item_of(const proto_args *a, const char *name)
{
	size_t i = index_of(a, name);
	return i < a->count ? a->item[i] : NULL;
}

double proto_num_or(const proto_args *a, const char *name, double dflt)
{
	const proto_vec *v = proto_vec_of(a, name);
	if (v->present)
		return v->v[0];
	return dflt;
}

const char *proto_str_or(const proto_args *a, const char *name,
                         const char *dflt)
{
	const cJSON *v = proto_item_of(a, name);
	return cJSON_IsString(v) ? v->valuestring : dflt;
}

int proto_bool_or(const proto_args *a, const char *name, int dflt)
{
	const cJSON *v = proto_item_of(a, name);
	return cJSON_IsBool(v) ? cJSON_IsTrue(v) : dflt;
}

int proto_enum_of(proto_call *c, const proto_args *a, const char *name,
                  const char *const *names, int dflt)
{
	const char *s = proto_str_or(a, name, NULL);
	char list[512], full[160];
	size_t used = 0;

	if (!s)
		return dflt;
	for (int i = 0; names[i]; i++)
		if (strcmp(names[i], s) == 0)
			return i;
	list[0] = '\0';
	for (int i = 0; names[i] && used < sizeof list; i++) {
		int n = snprintf(list + used, sizeof list - used, "%s%s",
		                 i ? ", " : "", names[i]);
		if (n < 0)
			break;
		used += (size_t)n;
	}
	snprintf(full, sizeof full, "%s%s", a->path, name);
	proto_fail(c, PROTO_INVALID_PARAMS, full,
	           "unknown value '%s'; accepted: %s", s, list);
	return -1;
}

int proto_join_len(proto_call *c, const proto_vec *v, const char *path,
                   size_t *n, int *any_array, char *from, size_t from_size)
{
	if (!v->present || !v->is_array)
		return 0;
	if (*any_array && v->n != *n)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "array length %zu does not match length %zu "
		                  "of '%s'",
		                  v->n, *n, from);
	if (!*any_array) {
		*any_array = 1;
		*n = v->n;
		snprintf(from, from_size, "%s", path);
	}
	return 0;
}

int proto_check_size(proto_call *c, size_t samples, size_t work)
{
	const proto_limits *lim = proto_ctx_limits(c->ctx);

	if (lim->max_samples && samples > lim->max_samples)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "%zu samples exceed the limit of %zu per "
		                  "request; split the request",
		                  samples, lim->max_samples);
	if (lim->max_work && work > lim->max_work)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "%zu evaluations (samples x angles) exceed "
		                  "the limit of %zu per request; split the "
		                  "request",
		                  work, lim->max_work);
	return 0;
}
