/* The OpenRPC document, generated from the method declarations: every
 * method's params (name, required, description, JSON Schema with the
 * quantity kind, default unit, default and bounds in default units) and
 * its result (every declared output), plus a component schema for each
 * nested declaration. The prose that is not per field (the document's
 * info and the shared component schemas) comes from openrpc-base.json,
 * embedded at build time. rpc.discover serves this document; the build
 * writes it to protocol-docs/openrpc.json's generated twin and a test
 * fails when the committed copy differs. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/internal.h"

extern const char rw_openrpc_base[];
extern const size_t rw_openrpc_base_len;

#define REF(name) "#/components/schemas/" name

static cJSON *ref(const char *name)
{
	char buf[160];
	cJSON *o = cJSON_CreateObject();
	snprintf(buf, sizeof buf, "#/components/schemas/%s", name);
	cJSON_AddStringToObject(o, "$ref", buf);
	return o;
}

static cJSON *parse_text(const char *s)
{
	cJSON *v = cJSON_Parse(s);
	assert(v && "a declaration's schema text is not valid JSON");
	return v ? v : cJSON_CreateObject();
}

static cJSON *names_array(const char *const *names)
{
	cJSON *a = cJSON_CreateArray();
	for (size_t i = 0; names && names[i]; i++)
		cJSON_AddItemToArray(a, cJSON_CreateString(names[i]));
	return a;
}

static double to_default(proto_kind k, double v)
{
	proto_units u;
	proto_units_default(&u);
	return proto_from_internal(&u, k, v);
}

/* The number schema of a field, with its bounds in default units. */
static cJSON *number_schema(const proto_field *f, int nulls)
{
	cJSON *s = cJSON_CreateObject();
	int lo = (f->flags & (PF_LO | PF_FRACTION)) != 0;
	int hi = (f->flags & (PF_HI | PF_FRACTION)) != 0;
	double l = f->flags & PF_FRACTION && !(f->flags & PF_LO) ? 0 : f->lo;
	double h = f->flags & PF_FRACTION && !(f->flags & PF_HI) ? 1 : f->hi;

	if (nulls) {
		cJSON *t = cJSON_AddArrayToObject(s, "type");
		cJSON_AddItemToArray(t, cJSON_CreateString(f->flags & PF_INT
		                                               ? "integer"
		                                               : "number"));
		cJSON_AddItemToArray(t, cJSON_CreateString("null"));
	} else {
		cJSON_AddStringToObject(
		    s, "type", f->flags & PF_INT ? "integer" : "number");
	}
	if (lo)
		cJSON_AddNumberToObject(
		    s, f->flags & PF_LO_OPEN ? "exclusiveMinimum" : "minimum",
		    to_default(f->kind, l));
	if (hi)
		cJSON_AddNumberToObject(
		    s, f->flags & PF_HI_OPEN ? "exclusiveMaximum" : "maximum",
		    to_default(f->kind, h));
	return s;
}

static cJSON *decl_schema(const proto_decl *d, cJSON *components);

/* Adds the component schema of nested declaration d (once) and returns a
 * reference to it. */
static cJSON *component(const proto_decl *d, cJSON *components)
{
	if (!cJSON_GetObjectItemCaseSensitive(components, d->name)) {
		/* a placeholder first: declarations may refer to themselves */
		cJSON_AddItemToObject(components, d->name,
		                      cJSON_CreateObject());
		cJSON_ReplaceItemInObjectCaseSensitive(
		    components, d->name, decl_schema(d, components));
	}
	return ref(d->name);
}

static cJSON *field_schema(const proto_field *f, cJSON *components)
{
	cJSON *s = NULL, *one, *arr;
	proto_units u;

	proto_units_default(&u);
	switch (f->type) {
	case PT_NUMS:
		if (f->flags & PF_SCALAR) {
			s = number_schema(f, 0);
		} else if (f->flags & PF_ARRAY) {
			s = cJSON_CreateObject();
			cJSON_AddStringToObject(s, "type", "array");
			cJSON_AddNumberToObject(s, "minItems", 1);
			cJSON_AddItemToObject(
			    s, "items", number_schema(f, f->flags & PF_NULLS));
		} else {
			s = cJSON_CreateObject();
			one = cJSON_AddArrayToObject(s, "oneOf");
			cJSON_AddItemToArray(one, number_schema(f, 0));
			arr = cJSON_CreateObject();
			cJSON_AddStringToObject(arr, "type", "array");
			cJSON_AddNumberToObject(arr, "minItems", 1);
			cJSON_AddItemToObject(
			    arr, "items",
			    number_schema(f, f->flags & PF_NULLS));
			cJSON_AddItemToArray(one, arr);
		}
		if (!(f->flags & PF_ARRAY)) {
			/* any number may be a distribution (uncertainty) */
			cJSON *alt = cJSON_CreateObject();
			cJSON *any = cJSON_AddArrayToObject(alt, "anyOf");
			cJSON_AddItemToArray(any, s);
			cJSON_AddItemToArray(any, ref("distribution"));
			s = alt;
		}
		/* fractions (porosity, saturations) are a kind of their own
		 * for clients: they may arrive as percent in a log file */
		cJSON_AddStringToObject(s, "x-kind",
		                        f->flags & PF_FRACTION
		                            ? "fraction"
		                            : proto_kind_name(f->kind));
		if (f->kind != PK_NONE)
			cJSON_AddStringToObject(s, "x-unit",
			                        proto_unit_name(&u, f->kind));
		if (f->group)
			cJSON_AddNumberToObject(s, "x-broadcast-group",
			                        f->group);
		if (f->flags & PF_DFLT)
			cJSON_AddNumberToObject(s, "default",
			                        to_default(f->kind, f->dflt));
		break;
	case PT_STR:
		s = cJSON_CreateObject();
		cJSON_AddStringToObject(s, "type", "string");
		if (f->flags & PF_DFLT && f->dflt_str)
			cJSON_AddStringToObject(s, "default", f->dflt_str);
		break;
	case PT_BOOL:
		s = cJSON_CreateObject();
		cJSON_AddStringToObject(s, "type", "boolean");
		if (f->flags & PF_DFLT)
			cJSON_AddBoolToObject(s, "default", f->dflt_choice);
		break;
	case PT_ENUM:
		s = cJSON_CreateObject();
		cJSON_AddItemToObject(s, "enum", names_array(f->choices));
		if (f->flags & PF_DFLT)
			cJSON_AddStringToObject(s, "default",
			                        f->choices[f->dflt_choice]);
		break;
	case PT_ENUMSET:
		s = cJSON_CreateObject();
		one = cJSON_AddArrayToObject(s, "oneOf");
		arr = cJSON_CreateObject();
		cJSON_AddItemToObject(arr, "enum", names_array(f->choices));
		cJSON_AddItemToArray(one, arr);
		arr = cJSON_CreateObject();
		cJSON_AddStringToObject(arr, "type", "array");
		cJSON_AddNumberToObject(arr, "minItems", 1);
		cJSON_AddBoolToObject(arr, "uniqueItems", 1);
		cJSON_AddItemToObject(arr, "items", cJSON_CreateObject());
		cJSON_AddItemToObject(cJSON_GetObjectItem(arr, "items"), "enum",
		                      names_array(f->choices));
		cJSON_AddItemToArray(one, arr);
		if (f->flags & PF_DFLT)
			cJSON_AddStringToObject(s, "default",
			                        f->choices[f->dflt_choice]);
		break;
	case PT_OBJ: s = component(f->sub, components); break;
	case PT_LIST:
		s = cJSON_CreateObject();
		cJSON_AddStringToObject(s, "type", "array");
		cJSON_AddNumberToObject(s, "minItems", 1);
		cJSON_AddItemToObject(s, "items",
		                      component(f->sub, components));
		break;
	case PT_CUSTOM: s = parse_text(f->custom->schema); break;
	}
	if (!s)
		s = cJSON_CreateObject();
	if (f->desc && f->type != PT_OBJ)
		cJSON_AddStringToObject(s, "description", f->desc);
	return s;
}

static cJSON *decl_schema(const proto_decl *d, cJSON *components)
{
	cJSON *o = cJSON_CreateObject(), *props, *req = NULL;

	cJSON_AddStringToObject(o, "type", "object");
	cJSON_AddBoolToObject(o, "additionalProperties", 0);
	props = cJSON_AddObjectToObject(o, "properties");
	for (const proto_field *f = d->fields; f->name; f++) {
		cJSON_AddItemToObject(props, f->name,
		                      field_schema(f, components));
		if (f->flags & PF_REQ) {
			if (!req)
				req = cJSON_CreateArray();
			cJSON_AddItemToArray(req, cJSON_CreateString(f->name));
		}
	}
	if (req)
		cJSON_AddItemToObject(o, "required", req);
	if (d->from_string) {
		cJSON *w = cJSON_CreateObject(), *one, *str;
		one = cJSON_AddArrayToObject(w, "oneOf");
		str = cJSON_CreateObject();
		cJSON_AddStringToObject(str, "type", "string");
		if (d->string_desc)
			cJSON_AddStringToObject(str, "description",
			                        d->string_desc);
		cJSON_AddItemToArray(one, str);
		cJSON_AddItemToArray(one, o);
		o = w;
	}
	if (d->desc)
		cJSON_AddStringToObject(o, "description", d->desc);
	return o;
}

/* ---- results ------------------------------------------------------------ */

static cJSON *typed(const char *type, int nullable)
{
	cJSON *s = cJSON_CreateObject();
	if (nullable) {
		cJSON *t = cJSON_AddArrayToObject(s, "type");
		cJSON_AddItemToArray(t, cJSON_CreateString(type));
		cJSON_AddItemToArray(t, cJSON_CreateString("null"));
	} else {
		cJSON_AddStringToObject(s, "type", type);
	}
	return s;
}

static cJSON *output_schema(const proto_output *o)
{
	cJSON *s;
	proto_units u;

	if (o->schema) {
		s = parse_text(o->schema);
	} else if (o->dim == D_SAMPLE || o->dim == D_CELL ||
	           o->dim == D_CELL2) {
		int grid = o->dim != D_SAMPLE;
		if (o->type == PO_FLAGS)
			s = ref(grid ? "qcGrid" : "qc");
		else if (o->type == PO_STR)
			s = ref("outStrings");
		else
			s = ref(grid ? "outGrid" : "outNumbers");
	} else {
		switch (o->type) {
		case PO_NUM: s = typed("number", 1); break;
		case PO_INT:
		case PO_COUNT: s = typed("integer", 0); break;
		case PO_BOOL: s = typed("boolean", 0); break;
		case PO_STR: s = typed("string", 1); break;
		case PO_FLAGS: s = ref("qc"); break;
		case PO_VEC: s = ref("outNumbers"); break;
		case PO_ENUM: {
			cJSON *e;
			s = cJSON_CreateObject();
			e = names_array(o->choices);
			cJSON_AddItemToArray(e, cJSON_CreateNull());
			cJSON_AddItemToObject(s, "enum", e);
			break;
		}
		default: s = cJSON_CreateObject(); break;
		}
	}
	if (o->dim != D_REQ && o->type != PO_VEC) {
		/* under uncertainty: statistics, probabilities or the union */
		cJSON *alt = cJSON_CreateObject();
		cJSON *any = cJSON_AddArrayToObject(alt, "anyOf");
		cJSON_AddItemToArray(any, s);
		if (o->type == PO_NUM)
			cJSON_AddItemToArray(any, ref("outStatistics"));
		else if (o->type == PO_STR)
			cJSON_AddItemToArray(any, ref("outProbabilities"));
		s = alt;
	}
	if (cJSON_GetObjectItem(s, "$ref")) {
		/* draft-07 ignores siblings of $ref: wrap it */
		cJSON *w = cJSON_CreateObject();
		cJSON *all = cJSON_AddArrayToObject(w, "allOf");
		cJSON_AddItemToArray(all, s);
		s = w;
	}
	if (o->kind != PK_NONE) {
		proto_units_default(&u);
		cJSON_AddStringToObject(s, "x-kind", proto_kind_name(o->kind));
		cJSON_AddStringToObject(s, "x-unit",
		                        proto_unit_name(&u, o->kind));
	}
	if (o->desc)
		cJSON_AddStringToObject(s, "description", o->desc);
	return s;
}

static cJSON *result_schema(const proto_method *m)
{
	cJSON *o = cJSON_CreateObject(), *props, *w;

	cJSON_AddStringToObject(o, "type", "object");
	cJSON_AddBoolToObject(o, "additionalProperties", 0);
	props = cJSON_AddObjectToObject(o, "properties");
	for (const proto_output *out = m->outputs; out && out->name; out++)
		if (!cJSON_GetObjectItemCaseSensitive(props, out->name))
			cJSON_AddItemToObject(props, out->name,
			                      output_schema(out));
	w = cJSON_CreateObject();
	cJSON_AddStringToObject(w, "type", "array");
	cJSON_AddItemToObject(w, "items", typed("string", 0));
	cJSON_AddStringToObject(w, "description",
	                        "request-level notes: the request was "
	                        "answered, but something in it deserves a "
	                        "look");
	cJSON_AddItemToObject(props, "warnings", w);
	if (m->kernel && !(m->flags & PM_NO_UNCERTAINTY)) {
		cJSON_AddItemToObject(props, "uncertainty",
		                      ref("uncertaintySummary"));
		cJSON_AddItemToObject(props, "sensitivity", ref("sensitivity"));
		cJSON_AddItemToObject(props, "draws", ref("rawDraws"));
		for (const proto_output *out = m->outputs; out && out->name;
		     out++)
			if (out->type == PO_FLAGS) {
				char key[64];
				snprintf(key, sizeof key, "%s_probability",
				         out->name);
				if (!cJSON_GetObjectItemCaseSensitive(props,
				                                      key))
					cJSON_AddItemToObject(
					    props, key,
					    ref("flagProbabilities"));
			}
	}
	cJSON_AddItemToObject(props, "units", ref("unitsOut"));
	return o;
}

static cJSON *method_doc(const proto_method *m, cJSON *components)
{
	cJSON *o = cJSON_CreateObject(), *params, *p, *res;
	int selectable = 0;

	cJSON_AddStringToObject(o, "name", m->name);
	cJSON_AddStringToObject(o, "summary", m->summary);
	if (m->description)
		cJSON_AddStringToObject(o, "description", m->description);
	if (m->openrpc_params) {
		params = parse_text(m->openrpc_params);
	} else {
		params = cJSON_CreateArray();
		for (const proto_field *f = m->params->fields; f->name; f++) {
			p = cJSON_CreateObject();
			cJSON_AddStringToObject(p, "name", f->name);
			if (f->flags & PF_REQ)
				cJSON_AddBoolToObject(p, "required", 1);
			if (f->desc)
				cJSON_AddStringToObject(p, "description",
				                        f->desc);
			cJSON_AddItemToObject(p, "schema",
			                      field_schema(f, components));
			cJSON_AddItemToArray(params, p);
		}
		if (m->params->fields[0].name) {
			p = cJSON_CreateObject();
			cJSON_AddStringToObject(p, "name", "units");
			cJSON_AddItemToObject(p, "schema", ref("unitsIn"));
			cJSON_AddItemToArray(params, p);
			p = cJSON_CreateObject();
			cJSON_AddStringToObject(p, "name", "digits");
			cJSON_AddStringToObject(
			    p, "description",
			    "significant digits of every number in the answer, "
			    "1 to 17; 0 (the default): the shortest text that "
			    "reads back to the same double");
			cJSON_AddItemToObject(p, "schema", ref("digits"));
			cJSON_AddItemToArray(params, p);
		}
		for (const proto_output *out = m->outputs; out && out->name;
		     out++)
			selectable |=
			    out->dim != D_REQ && out->type != PO_FLAGS;
		if (m->kernel && !(m->flags & PM_NO_UNCERTAINTY)) {
			p = cJSON_CreateObject();
			cJSON_AddStringToObject(p, "name", "uncertainty");
			cJSON_AddStringToObject(
			    p, "description",
			    "Monte Carlo over the inputs given as "
			    "distributions: "
			    "every output becomes its mean, sd and percentiles "
			    "(protocol.md, Uncertainty)");
			cJSON_AddItemToObject(
			    p, "schema",
			    component(&proto_uncertainty_decl, components));
			cJSON_AddItemToArray(params, p);
		}
		if (selectable && !(m->flags & PM_NO_FIELDS)) {
			cJSON *s = cJSON_CreateObject(), *items, *e;
			p = cJSON_CreateObject();
			cJSON_AddStringToObject(p, "name", "fields");
			cJSON_AddStringToObject(
			    p, "description",
			    "the outputs to return (default: all); counts, "
			    "request-level members, QC flags and units are "
			    "always returned");
			cJSON_AddStringToObject(s, "type", "array");
			cJSON_AddNumberToObject(s, "minItems", 1);
			items = cJSON_AddObjectToObject(s, "items");
			e = cJSON_AddArrayToObject(items, "enum");
			for (const proto_output *out = m->outputs; out->name;
			     out++) {
				int dup = 0;
				const cJSON *x;
				if (out->dim == D_REQ || out->type == PO_FLAGS)
					continue;
				cJSON_ArrayForEach(x, e) dup |=
				    strcmp(x->valuestring, out->name) == 0;
				if (!dup)
					cJSON_AddItemToArray(
					    e, cJSON_CreateString(out->name));
			}
			cJSON_AddItemToObject(p, "schema", s);
			cJSON_AddItemToArray(params, p);
		}
	}
	cJSON_AddItemToObject(o, "params", params);
	if (m->openrpc_result) {
		res = parse_text(m->openrpc_result);
	} else {
		res = cJSON_CreateObject();
		cJSON_AddStringToObject(res, "name", "result");
		cJSON_AddItemToObject(res, "schema", result_schema(m));
	}
	cJSON_AddItemToObject(o, "result", res);
	return o;
}

cJSON *proto__openrpc(void)
{
	cJSON *doc =
	    cJSON_ParseWithLength(rw_openrpc_base, rw_openrpc_base_len);
	cJSON *methods, *comps, *schemas;
	const proto_method *m;

	if (!doc)
		return NULL;
	methods = cJSON_GetObjectItemCaseSensitive(doc, "methods");
	if (!methods)
		methods = cJSON_AddArrayToObject(doc, "methods");
	comps = cJSON_GetObjectItemCaseSensitive(doc, "components");
	if (!comps)
		comps = cJSON_AddObjectToObject(doc, "components");
	schemas = cJSON_GetObjectItemCaseSensitive(comps, "schemas");
	if (!schemas)
		schemas = cJSON_AddObjectToObject(comps, "schemas");
	for (size_t i = 0; (m = proto_method_at(i)); i++)
		cJSON_AddItemToArray(methods, method_doc(m, schemas));
	/* the accepted units, from the one table in units.c */
	{
		cJSON *u = cJSON_CreateObject(), *props;
		cJSON_AddStringToObject(
		    u, "description",
		    "Overrides the unit of a quantity kind for "
		    "this request (inputs and outputs).");
		cJSON_AddStringToObject(u, "type", "object");
		cJSON_AddBoolToObject(u, "additionalProperties", 0);
		props = cJSON_AddObjectToObject(u, "properties");
		for (int k = 1; k < PK_COUNT; k++) {
			cJSON *e = cJSON_CreateObject();
			cJSON *list = cJSON_AddArrayToObject(e, "enum");
			for (size_t j = 0; j < proto_units_count((proto_kind)k);
			     j++) {
				const char *alias =
				    proto_units_alias_at((proto_kind)k, j);
				cJSON_AddItemToArray(
				    list,
				    cJSON_CreateString(
				        proto_units_name_at((proto_kind)k, j)));
				if (alias)
					cJSON_AddItemToArray(
					    list, cJSON_CreateString(alias));
			}
			cJSON_AddItemToObject(
			    props, proto_kind_name((proto_kind)k), e);
		}
		cJSON_DeleteItemFromObjectCaseSensitive(schemas, "unitsIn");
		cJSON_AddItemToObject(schemas, "unitsIn", u);
	}
	return doc;
}
