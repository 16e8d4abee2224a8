/* The session family: per-connection defaults. session.set stores units
 * and parameter values that later requests on the same connection inherit
 * when they do not give them; session.get shows them; session.reset clears
 * them. A default belongs to a parameter meaning, not to a bare name: it
 * reaches only parameters of the same name, type, quantity kind and
 * description (e.g. `rho` as a density wherever it appears), a name that
 * means different things in different methods must be set per method
 * ({"reflect.impedance": {"k": 0.3}}), and a value no method accepts is
 * refused. Numbers are stored as quantities in internal units (a later
 * change of units changes how they are shown, never what they mean);
 * other values as compact JSON text with the units they were given in.
 * Stored bytes count against max_session_bytes and arrays against
 * max_samples. A session belongs to one connection and never leaks into
 * another (--stdio is one session). */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/session.h"

typedef struct sess_default {
	struct sess_default *next;
	char *name;                /* parameter name */
	const proto_method *scope; /* NULL: every method with this meaning */
	const proto_field *field;  /* the meaning it was checked against */
	double *v;                 /* PT_NUMS: values in internal units */
	size_t n;
	int is_array;
	char *json;        /* other types: the value as compact JSON */
	size_t longest;    /* longest numeric array inside (work estimate) */
	proto_units units; /* units the JSON was given in */
	size_t bytes;
} sess_default;

/* Two fields mean the same when their type, kind, group and the
 * structure behind them agree. */
static int same_meaning(const proto_field *a, const proto_field *b)
{
	return a->type == b->type && a->kind == b->kind &&
	       a->group == b->group && a->sub == b->sub &&
	       a->custom == b->custom && a->choices == b->choices;
}

static void default_free(sess_default *d)
{
	if (!d)
		return;
	free(d->name);
	free(d->v);
	free(d->json);
	free(d);
}

proto_session *proto_session_new(proto_ctx *ctx)
{
	proto_session *s = calloc(1, sizeof *s);
	if (!s)
		return NULL;
	s->ctx = ctx;
	proto_units_default(&s->units);
	return s;
}

static void clear(proto_session *s)
{
	sess_default *d = s->defaults;
	while (d) {
		sess_default *next = d->next;
		default_free(d);
		d = next;
	}
	s->defaults = NULL;
	proto__session_bytes_add(s->ctx, 0, s->bytes);
	s->bytes = 0;
}

void proto_session_free(proto_session *s)
{
	if (!s)
		return;
	clear(s);
	free(s);
}

/* The default for field f of method m: one set for m, else one of the
 * same meaning set for every method. */
static const sess_default *find(const proto_session *s, const proto_method *m,
                                const proto_field *f)
{
	const sess_default *d, *any = NULL;

	for (d = s->defaults; d; d = d->next) {
		if (strcmp(d->name, f->name) != 0 || !same_meaning(d->field, f))
			continue;
		if (d->scope == m)
			return d;
		if (!d->scope && !any)
			any = d;
	}
	return any;
}

int proto__session_empty(const proto_session *s)
{
	return !s || !s->defaults;
}

size_t proto__session_len(const proto_session *s, const proto_method *m,
                          const proto_field *f)
{
	const sess_default *d = find(s, m, f);
	if (!d)
		return 0;
	return d->json ? d->longest : d->n;
}

/* The longest numeric array anywhere inside v (1 for scalars). */
static size_t longest(const cJSON *v)
{
	size_t best = 1;
	const cJSON *e;

	if (proto__numarr(v))
		return proto__numarr(v)->n;
	if (cJSON_IsArray(v) && v->child &&
	    (cJSON_IsNumber(v->child) || cJSON_IsNull(v->child)))
		best = (size_t)cJSON_GetArraySize(v);
	cJSON_ArrayForEach(e, v)
	{
		size_t n = longest(e);
		if (n > best)
			best = n;
	}
	return best;
}

int proto__session_inherit(proto_call *c, const proto_decl *d, void *dst,
                           const cJSON *obj)
{
	proto_session *s = c->session;
	proto_hdr *h = dst;

	(void)obj;
	if (!s || !s->defaults)
		return 0;
	for (int i = 0; d->fields[i].name; i++) {
		const proto_field *f = &d->fields[i];
		const sess_default *sd;
		if (proto_given(dst, i) || !(sd = find(s, c->method, f)))
			continue;
		if (!sd->json) {
			if (proto__vec_accept(c, f, f->name, sd->v, sd->n,
			                      sd->is_array, dst))
				return -1;
		} else {
			cJSON *v =
			    cJSON_ParseWithLength(sd->json, strlen(sd->json));
			proto_units saved = c->units;
			int rc;
			if (!v || proto__call_keep_json(c, v))
				return proto_fail(c, PROTO_INTERNAL_ERROR,
				                  f->name, "out of memory");
			c->units = sd->units;
			rc = proto__field_parse(c, f, v, dst);
			c->units = saved;
			if (rc)
				return -1;
		}
		h->inherited |= (uint64_t)1 << i;
	}
	return 0;
}

/* ---- session.set -------------------------------------------------------- */

/* A scratch call to try a value against a field: its own arena, groups
 * and error. */
static void scratch_init(proto_call *t, const proto_call *c,
                         const proto_method *m, const proto_units *u)
{
	memset(t, 0, sizeof *t);
	t->ctx = c->ctx;
	t->session = NULL;
	t->method = m;
	t->units = *u;
	for (int g = 0; g < PROTO_MAX_GROUPS; g++)
		t->group[g].n = 1;
}

/* Tries v as field f of method m under units u. 0 when it fits; else -1
 * with the reason copied into why. */
static int try_fit(const proto_call *c, const proto_method *m,
                   const proto_field *f, const cJSON *v, const proto_units *u,
                   char *why, size_t why_size)
{
	proto_call t;
	void *dst;
	int rc;

	scratch_init(&t, c, m, u);
	dst = proto_alloc(&t, m->params->size);
	if (!dst) {
		snprintf(why, why_size, "out of memory");
		return -1;
	}
	memset(dst, 0, m->params->size);
	rc = proto__field_parse(&t, f, v, dst);
	if (rc)
		snprintf(why, why_size, "%s", t.err_reason);
	proto__arena_free(&t);
	return rc;
}

/* A candidate field for a default. */
typedef struct fit {
	const proto_method *m;
	const proto_field *f;
} fit;

/* Finds which methods' parameters `name` = v fits (scope: one method, or
 * NULL for all). Fails unless they share one meaning. */
static int resolve_fit(proto_call *c, const char *path, const char *name,
                       const cJSON *v, const proto_method *scope,
                       const proto_units *u, fit *out)
{
	const proto_method *m;
	char why[512] = "", first[512] = "";
	fit fits[64];
	int nfits = 0, candidates = 0;

	for (size_t i = 0; (m = proto_method_at(i)); i++) {
		int k;
		if (m->flags & (PM_SESSION | PM_RAW_PARAMS) || !m->params ||
		    (scope && m != scope))
			continue;
		k = proto_field_index(m->params, name);
		if (k < 0)
			continue;
		candidates++;
		if (try_fit(c, m, &m->params->fields[k], v, u, why,
		            sizeof why)) {
			if (!first[0])
				snprintf(first, sizeof first, "%s (as in %s)",
				         why, m->name);
			continue;
		}
		if (nfits < 64)
			fits[nfits++] = (fit){m, &m->params->fields[k]};
	}
	if (!candidates)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  scope ? "%s takes no such parameter"
		                        : "no method takes this parameter, so "
		                          "it cannot be a session default%s",
		                  scope ? scope->name : "");
	if (!nfits)
		return proto_fail(c, PROTO_INVALID_PARAMS, path, "%s", first);
	for (int k = 1; k < nfits; k++)
		if (!same_meaning(fits[0].f, fits[k].f))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "means different things in %s and %s: set it for "
			    "one method, e.g. {\"%s\": {\"%s\": ...}}",
			    fits[0].m->name, fits[k].m->name, fits[k].m->name,
			    name);
	*out = fits[0];
	return 0;
}

/* Builds the stored form of a default. NULL after proto_fail. */
static sess_default *make_default(proto_call *c, const char *path,
                                  const char *name, const cJSON *v,
                                  const fit *ft, const proto_method *scope,
                                  const proto_units *u)
{
	const proto_limits *lim = proto_ctx_limits(c->ctx);
	sess_default *d = calloc(1, sizeof *d);
	size_t len = longest(v);

	if (!d)
		goto oom;
	d->name = malloc(strlen(name) + 1);
	if (!d->name)
		goto oom;
	memcpy(d->name, name, strlen(name) + 1);
	d->scope = scope;
	d->field = ft->f;
	d->units = *u;
	d->bytes = sizeof *d + strlen(name) + 1;
	if (lim->max_samples && len > lim->max_samples) {
		default_free(d);
		proto_fail(c, PROTO_LIMIT_EXCEEDED, path,
		           "%zu samples exceed the limit of %zu per request "
		           "(session defaults too)",
		           len, lim->max_samples);
		return NULL;
	}
	if (ft->f->type == PT_NUMS && !cJSON_IsObject(v)) {
		size_t n = cJSON_IsArray(v) ? proto__arr_size(v) : 1;
		const cJSON *e;
		proto_arr_iter it;
		size_t i = 0;
		d->v = malloc(n * sizeof *d->v);
		if (!d->v)
			goto oom;
		d->n = n;
		d->is_array = cJSON_IsArray(v);
		if (!d->is_array) {
			d->v[0] =
			    proto_to_internal(u, ft->f->kind, v->valuedouble);
		} else {
			PROTO_ARR_FOREACH(e, it, v)
			{
				d->v[i++] =
				    cJSON_IsNumber(e)
				        ? proto_to_internal(u, ft->f->kind,
				                            e->valuedouble)
				        : NAN;
			}
		}
		d->bytes += n * sizeof *d->v;
	} else {
		/* printed as the tree cJSON would have built: large numeric
		 * arrays inside (a distribution's) become nodes again */
		if (proto__numarr_restore((cJSON *)v))
			goto oom;
		d->json = cJSON_PrintUnformatted(v);
		if (!d->json)
			goto oom;
		d->longest = len;
		d->bytes += strlen(d->json) + 1;
	}
	return d;
oom:
	default_free(d);
	proto_fail(c, PROTO_INTERNAL_ERROR, path, "out of memory");
	return NULL;
}

/* Stores d, replacing a default of the same name and scope. */
static int store(proto_call *c, sess_default *d, const char *path)
{
	proto_session *s = c->session;
	sess_default **pp = &s->defaults, *old = NULL;

	for (; *pp; pp = &(*pp)->next)
		if (strcmp((*pp)->name, d->name) == 0 &&
		    (*pp)->scope == d->scope) {
			old = *pp;
			break;
		}
	if (proto__session_bytes_add(c->ctx, d->bytes, old ? old->bytes : 0)) {
		size_t lim = proto_ctx_limits(c->ctx)->max_session_bytes;
		default_free(d);
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, path,
		                  "session defaults over all connections "
		                  "would pass the limit of %zu bytes; give "
		                  "large arrays in the requests themselves",
		                  lim);
	}
	if (old) {
		d->next = old->next;
		*pp = d;
		s->bytes -= old->bytes;
		default_free(old);
	} else {
		d->next = s->defaults;
		s->defaults = d;
	}
	s->bytes += d->bytes;
	return 0;
}

/* A prepared default, before anything is stored (a call stores all of
 * its defaults or none). */
typedef struct pending {
	sess_default *d;
	const char *path;
} pending;

static int set(proto_call *c)
{
	proto_session *s = c->session;
	const cJSON *m, *e;
	proto_units units = s->units;
	int digits = s->digits;
	pending *todo;
	size_t n = 0, cap = 0;

	if (!c->params || !c->params->child)
		return proto_fail(c, PROTO_INVALID_PARAMS, "params",
		                  "give at least one default to set");
	if (proto__units_apply(
	        c, cJSON_GetObjectItemCaseSensitive(c->params, "units"),
	        "units", &units) ||
	    proto__digits_apply(
	        c, cJSON_GetObjectItemCaseSensitive(c->params, "digits"),
	        "digits", &digits))
		return -1;
	cJSON_ArrayForEach(m, c->params)
	{
		if (cJSON_IsObject(m) && proto_method_find(m->string))
			cap += (size_t)cJSON_GetArraySize(m);
		else
			cap++;
	}
	todo = proto_alloc(c, (cap ? cap : 1) * sizeof *todo);
	if (!todo)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	cJSON_ArrayForEach(m, c->params)
	{
		const proto_method *scope = NULL;
		const cJSON *first = m, *only = m;
		if (strcmp(m->string, "units") == 0 ||
		    strcmp(m->string, "digits") == 0)
			continue;
		if (strchr(m->string, '.')) {
			scope = proto_method_find(m->string);
			if (!scope ||
			    scope->flags & (PM_SESSION | PM_RAW_PARAMS)) {
				proto_fail(
				    c, PROTO_INVALID_PARAMS, m->string,
				    "no method of that name takes "
				    "parameters; per-method defaults are "
				    "{\"method\": {\"param\": value}}");
				goto fail;
			}
			if (!cJSON_IsObject(m) || !m->child) {
				proto_fail(c, PROTO_INVALID_PARAMS, m->string,
				           "must be a non-empty object of %s's "
				           "parameters",
				           scope->name);
				goto fail;
			}
			first = m->child;
			only = NULL;
		}
		for (e = first; e; e = only ? NULL : e->next) {
			const char *path =
			    scope ? proto_path(c, m->string, ".", e->string)
			          : e->string;
			fit ft;
			sess_default *d;
			if (resolve_fit(c, path, e->string, e, scope, &units,
			                &ft))
				goto fail;
			d = make_default(c, path, e->string, e, &ft, scope,
			                 &units);
			if (!d)
				goto fail;
			todo[n].d = d;
			todo[n].path = path;
			n++;
		}
	}
	for (size_t i = 0; i < n; i++) {
		sess_default *d = todo[i].d;
		todo[i].d = NULL;
		if (store(c, d, todo[i].path))
			goto fail;
	}
	s->units = units;
	c->units = units;
	s->digits = digits;
	c->digits = digits;
	return 0;
fail:
	for (size_t i = 0; i < n; i++)
		default_free(todo[i].d);
	return -1;
}

static void write_default(proto_call *c, const sess_default *d)
{
	if (d->json) {
		cJSON *v = cJSON_ParseWithLength(d->json, strlen(d->json));
		if (!v) {
			c->out->oom = 1;
			return;
		}
		proto_w_json(c, d->name, v);
		cJSON_Delete(v);
		return;
	}
	proto_w_vec(c, d->name, d->field->kind, d->v, d->n, 1, d->is_array);
}

static void write_session(proto_call *c)
{
	proto_session *s = c->session;
	const sess_default *d, *e;

	proto_w_obj_begin(c, NULL);
	proto_w_obj_begin(c, "units");
	for (int k = 1; k < PK_COUNT; k++)
		proto_w_str(c, proto_kind_name((proto_kind)k),
		            proto_unit_name(&s->units, (proto_kind)k));
	proto_w_obj_end(c);
	proto_w_int(c, "digits", s->digits);
	/* Numbers are shown in the session's units. */
	c->units = s->units;
	proto_w_obj_begin(c, "defaults");
	for (d = s->defaults; d; d = d->next)
		if (!d->scope)
			write_default(c, d);
	for (d = s->defaults; d; d = d->next) {
		int seen = 0;
		if (!d->scope)
			continue;
		for (e = s->defaults; e != d; e = e->next)
			seen |= e->scope == d->scope;
		if (seen)
			continue; /* written with the first of its method */
		proto_w_obj_begin(c, d->scope->name);
		for (e = d; e; e = e->next)
			if (e->scope == d->scope)
				write_default(c, e);
		proto_w_obj_end(c);
	}
	proto_w_obj_end(c);
	proto_w_int(c, "bytes", (long long)s->bytes);
	/* The session's "units" member above lists every kind already. */
	proto_w_obj_end(c);
}

static int set_and_show(proto_call *c, void *args)
{
	(void)args;
	if (set(c))
		return -1;
	write_session(c);
	return 0;
}

static int get(proto_call *c, void *args)
{
	(void)args;
	write_session(c);
	return 0;
}

static int reset(proto_call *c, void *args)
{
	proto_session *s = c->session;
	(void)args;
	clear(s);
	proto_units_default(&s->units);
	s->digits = 0;
	c->units = s->units;
	c->digits = 0;
	write_session(c);
	return 0;
}

static const proto_field no_fields[] = {{0}};
static const proto_decl no_params = {"",   no_fields, NULL, sizeof(proto_hdr),
                                     NULL, NULL,      NULL, NULL};

#define SESSION_RESULT                                                         \
	"{\"name\": \"session\", \"schema\": {\"$ref\": "                      \
	"\"#/components/schemas/session\"}}"

static const proto_method m_set = {
    .name = "session.set",
    .summary = "Set per-connection units, digits and parameter defaults "
               "that later requests on the connection inherit.",
    .description =
        "Accepts units and any parameter that some method accepts, checked "
        "against that method's declaration. A default reaches only "
        "parameters of the same name and meaning (type, quantity kind, "
        "structure): a name that means different things in different "
        "methods is refused unless set for one method, as {\"method.name\": "
        "{\"param\": value}}. A request inherits a default for each of its "
        "own parameters that it does not give; params in the request "
        "override the session for that request. Numbers are kept as "
        "quantities (a later change of units changes how they are shown, "
        "never what they mean); other values keep the units they were "
        "given in. Stored bytes count against max_session_bytes and "
        "arrays against max_samples (-32001). A session belongs to one "
        "connection (--stdio is one session) and never leaks into another.",
    .params = &no_params,
    .body = set_and_show,
    .flags = PM_SESSION | PM_RAW_PARAMS | PM_NO_FIELDS | PM_NO_UNCERTAINTY,
    .openrpc_params =
        "[{\"name\": \"units\", \"schema\": {\"$ref\": "
        "\"#/components/schemas/unitsIn\"}}, {\"name\": \"digits\", "
        "\"schema\": {\"$ref\": \"#/components/schemas/digits\"}}, "
        "{\"name\": \"defaults\", "
        "\"description\": \"any parameter some method takes, by name "
        "(rho, porosity, mineral, fluid_in_place, ...), or an object of "
        "one method's parameters under the method's name\", \"schema\": "
        "{}}]",
    .openrpc_result = SESSION_RESULT,
};
static const proto_method m_get = {
    .name = "session.get",
    .summary = "The connection's units (every kind) and defaults.",
    .params = &no_params,
    .body = get,
    .flags = PM_SESSION | PM_NO_FIELDS | PM_NO_UNCERTAINTY,
    .openrpc_result = SESSION_RESULT,
};
static const proto_method m_reset = {
    .name = "session.reset",
    .summary = "Clear the connection's defaults and restore the default units.",
    .params = &no_params,
    .body = reset,
    .flags = PM_SESSION | PM_NO_FIELDS | PM_NO_UNCERTAINTY,
    .openrpc_result = SESSION_RESULT,
};

const proto_method *const proto_session_methods[] = {&m_set, &m_get, &m_reset,
                                                     NULL};
