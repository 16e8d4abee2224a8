/* The session family: per-connection defaults. session.set stores units
 * and parameter values that later requests on the same connection inherit
 * when they do not give them; session.get shows them; session.reset clears
 * them. A session belongs to one connection and never leaks into another
 * (--stdio is one session). */
#include <string.h>

#include "proto/internal.h"

/* The first parameter spec entry of any method with this name. */
static const proto_param *spec_entry(const char *name)
{
	const proto_method *m;
	for (size_t i = 0; (m = proto_method_at(i)); i++) {
		if (!m->params || strncmp(m->name, "session.", 8) == 0)
			continue;
		for (const proto_param *p = m->params; p->name; p++)
			if (strcmp(p->name, name) == 0)
				return p;
	}
	return NULL;
}

static const proto_param *method_entry(const proto_method *m, const char *name)
{
	if (!m->params)
		return NULL;
	for (const proto_param *p = m->params; p->name; p++)
		if (strcmp(p->name, name) == 0)
			return p;
	return NULL;
}

static int has_number(const cJSON *v)
{
	const cJSON *e;
	if (cJSON_IsNumber(v))
		return 1;
	cJSON_ArrayForEach(e, v) if (has_number(e)) return 1;
	return 0;
}

/* 1 when the stored default v of parameter p would mean something else
 * under units b than under units a (the units it was given in). Values
 * with no number never do; a top-level number depends on its own kind
 * only; numbers inside objects are assumed to depend on any kind. */
static int units_matter(const proto_param *p, const cJSON *v,
                        const proto_units *a, const proto_units *b)
{
	if (!has_number(v))
		return 0;
	if (p && (p->type == PT_NUMS || p->type == PT_NUM || p->type == PT_INT))
		return p->kind != PK_NONE && a->sel[p->kind] != b->sel[p->kind];
	return memcmp(a, b, sizeof *a) != 0;
}

int proto__session_merge(proto_call *c, const cJSON *params, cJSON **merged)
{
	proto_session *s = c->session;
	const cJSON *d, *m;
	cJSON *tmp = NULL;

	*merged = (cJSON *)params;
	if (!s->defaults || !s->defaults->child)
		return 0;
	cJSON_ArrayForEach(d, s->defaults)
	{
		const proto_param *p = method_entry(c->method, d->string);
		if (!p || cJSON_GetObjectItemCaseSensitive(params, d->string))
			continue;
		/* Inherited values are in the session's units; a request
		 * whose units would change their meaning is refused. */
		if (units_matter(p, d, &s->units, &c->units)) {
			cJSON_Delete(tmp);
			return proto_fail(c, PROTO_INVALID_PARAMS, "units",
			                  "the session default '%s' was set in "
			                  "the session's units, which this "
			                  "request's units would change; give "
			                  "%s in the request, or change units "
			                  "with session.set",
			                  d->string, d->string);
		}
		if (!tmp) {
			tmp = cJSON_CreateObject();
			if (!tmp)
				return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
				                  "out of memory");
			cJSON_ArrayForEach(m, params)
			    cJSON_AddItemReferenceToObject(tmp, m->string,
			                                   (cJSON *)m);
		}
		cJSON_AddItemReferenceToObject(tmp, d->string, (cJSON *)d);
		if (c->n_inherited < PROTO_MAX_PARAMS)
			c->inherited[c->n_inherited++] = d->string;
	}
	*merged = tmp ? tmp : (cJSON *)params;
	return 0;
}

int proto_arg_inherited(const proto_call *c, const char *name)
{
	for (size_t i = 0; i < c->n_inherited; i++)
		if (strcmp(c->inherited[i], name) == 0)
			return 1;
	return 0;
}

static int set(proto_call *c)
{
	proto_session *s = c->session;
	const cJSON *m;
	cJSON *defaults;
	proto_units units = s->units;

	if (!c->params || !c->params->child)
		return proto_fail(c, PROTO_INVALID_PARAMS, "params",
		                  "give at least one default to set");
	if (proto__units_apply(
	        c, cJSON_GetObjectItemCaseSensitive(c->params, "units"),
	        "units", &units))
		return -1;
	/* Stored defaults keep the units they were given in: a change of
	 * units that would change what one of them means is refused,
	 * unless this call sets that default again. */
	if (s->defaults) {
		const cJSON *d;
		cJSON_ArrayForEach(d, s->defaults)
		{
			if (cJSON_GetObjectItemCaseSensitive(c->params,
			                                     d->string))
				continue;
			if (units_matter(spec_entry(d->string), d, &s->units,
			                 &units))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "units",
				    "the session default '%s' was set in the "
				    "current units, which this change would "
				    "reinterpret; set it again in the same "
				    "call, or session.reset first",
				    d->string);
		}
	}
	/* Check every value against the parameter it stands for. */
	cJSON_ArrayForEach(m, c->params)
	{
		const proto_param *p;
		proto_param one[2];
		proto_args a;
		cJSON *wrap;
		proto_units saved = c->units;
		int rc;

		if (strcmp(m->string, "units") == 0)
			continue;
		p = spec_entry(m->string);
		if (!p)
			return proto_fail(c, PROTO_INVALID_PARAMS, m->string,
			                  "no method takes this parameter, so "
			                  "it cannot be a session default");
		one[0] = *p;
		one[0].flags &= ~PP_REQUIRED;
		memset(&one[1], 0, sizeof one[1]);
		wrap = cJSON_CreateObject();
		if (!wrap)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		cJSON_AddItemReferenceToObject(wrap, m->string, (cJSON *)m);
		c->units = units;
		rc = proto_args_parse(c, wrap, "", one, &a);
		c->units = saved;
		cJSON_Delete(wrap);
		if (rc)
			return -1;
	}
	defaults = s->defaults ? s->defaults : cJSON_CreateObject();
	if (!defaults)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	cJSON_ArrayForEach(m, c->params)
	{
		cJSON *copy;
		if (strcmp(m->string, "units") == 0)
			continue;
		copy = cJSON_Duplicate(m, 1);
		if (!copy) {
			if (!s->defaults)
				cJSON_Delete(defaults);
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		}
		if (cJSON_GetObjectItemCaseSensitive(defaults, m->string))
			cJSON_ReplaceItemInObjectCaseSensitive(defaults,
			                                       m->string, copy);
		else
			cJSON_AddItemToObject(defaults, m->string, copy);
	}
	s->defaults = defaults;
	s->units = units;
	c->units = units;
	return 0;
}

static void write_session(proto_call *c)
{
	proto_session *s = c->session;

	proto_w_obj_begin(c, NULL);
	proto_w_obj_begin(c, "units");
	for (int k = 1; k < PK_COUNT; k++)
		proto_w_str(c, proto_kind_name((proto_kind)k),
		            proto_unit_name(&s->units, (proto_kind)k));
	proto_w_obj_end(c);
	if (s->defaults)
		proto_w_json(c, "defaults", s->defaults);
	else
		proto_w_raw(c, "defaults", "{}", 2);
	proto_w_obj_end(c);
}

static int set_and_show(proto_call *c)
{
	if (set(c))
		return -1;
	write_session(c);
	return 0;
}

static int get(proto_call *c)
{
	write_session(c);
	return 0;
}

static int reset(proto_call *c)
{
	proto_session *s = c->session;
	cJSON_Delete(s->defaults);
	s->defaults = NULL;
	proto_units_default(&s->units);
	write_session(c);
	return 0;
}

/* session.set takes any parameter some method takes: it checks them itself
 * above, so its table entry has no spec (NULL skips the dispatcher's
 * check). The others take no parameters (an empty spec). */
static const proto_param no_params[] = {{NULL, PT_ANY, PK_NONE, 0, 0}};

const proto_method proto_session_methods[] = {
    {"session.set", set_and_show, NULL,
     "Set per-connection units and parameter defaults."},
    {"session.get", get, no_params,
     "Show the connection's units and defaults."},
    {"session.reset", reset, no_params,
     "Clear the connection's defaults and units."},
    {NULL, NULL, NULL, NULL},
};
