/* Request parameters of `rockwire log` and `rockwire feed`: --params
 * JSON and --set NAME=VALUE options merged, values given with a unit
 * ("8.5in") converted to the parameter's default unit with the daemon's
 * factors, units.* split off as output units (they never reinterpret
 * inputs), and names and option values checked against the daemon's
 * schema before any data is sent. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "logio.h"
#include "rpc.h"
#include "units.h"

/* Checks each top-level name, and each string value with an enum, of
 * params against log.process in the discover document. */
static int check_names(const char *who, const cJSON *disc, const cJSON *params)
{
	const cJSON *m = cli__method_doc(disc, "log.process"), *e;
	const cJSON *plist = cJSON_GetObjectItemCaseSensitive(m, "params");

	if (!m)
		return 0; /* an old daemon: it will say what it refuses */
	cJSON_ArrayForEach(e, params)
	{
		const cJSON *p, *found = NULL;
		cJSON_ArrayForEach(p, plist)
		{
			const cJSON *nm =
			    cJSON_GetObjectItemCaseSensitive(p, "name");
			if (cJSON_IsString(nm) &&
			    strcmp(nm->valuestring, e->string) == 0)
				found = p;
		}
		if (!found) {
			const char *s = cli__suggest_json(e->string, plist);
			fprintf(stderr,
			        "%s: log.process has no parameter '%s'%s%s%s\n",
			        who, e->string, s ? "; did you mean " : "",
			        s ? s : "", s ? "?" : "");
			return -1;
		}
		if (cJSON_IsString(e)) {
			const cJSON *sch = cli__schema_deref(
			    disc,
			    cJSON_GetObjectItemCaseSensitive(found, "schema"));
			const cJSON *en = cJSON_GetObjectItemCaseSensitive(
			                sch, "enum"),
			            *x;
			int ok = !en;
			cJSON_ArrayForEach(x, en)
			{
				if (cJSON_IsString(x) &&
				    strcmp(x->valuestring, e->valuestring) == 0)
					ok = 1;
			}
			if (!ok) {
				const char *s =
				    cli__suggest_json(e->valuestring, en);
				char *list = cJSON_PrintUnformatted(en);
				fprintf(stderr,
				        "%s: %s='%s' is not one of %s%s%s%s\n",
				        who, e->string, e->valuestring,
				        list ? list : "?",
				        s ? "; did you mean " : "", s ? s : "",
				        s ? "?" : "");
				cJSON_free(list);
				return -1;
			}
		}
	}
	return 0;
}

/* Converts "NAME=NUMBER UNIT" into the default unit of NAME's kind and
 * sets it. 1 converted, 0 not a value with a unit, -1 error. */
static int set_with_unit(const char *who, cJSON *params, const char *arg,
                         cli_units *u, const cJSON *disc, char *note,
                         size_t notelen)
{
	const char *eq = strchr(arg, '=');
	char name[256], unit[32], set[320], list[512];
	const char *kind, *got = NULL;
	cJSON *probe;
	double v, scale, offset;
	int rc;

	if (!eq || (size_t)(eq - arg) >= sizeof name)
		return 0;
	/* units.KIND=UNIT names a unit ("1/ft"), it carries no value */
	if (strncmp(arg, "units.", 6) == 0)
		return 0;
	probe = cJSON_ParseWithOpts(eq + 1, NULL, 1);
	if (probe) {
		cJSON_Delete(probe);
		return 0; /* JSON: taken as it is */
	}
	if (!cli__split_value_unit(eq + 1, &v, unit, sizeof unit))
		return 0;
	memcpy(name, arg, (size_t)(eq - arg));
	name[eq - arg] = '\0';
	kind = cli__param_kind(disc, name);
	if (!kind && !strchr(name, '.')) {
		/* not a known name at all: say so, with the nearest */
		cJSON *one = cJSON_CreateObject();
		int bad = !one || !cJSON_AddNullToObject(one, name) ||
		          check_names(who, disc, one);
		cJSON_Delete(one);
		if (bad)
			return -1;
	}
	if (!kind) {
		fprintf(stderr,
		        "%s: --set %s: cannot tell which kind of quantity %s "
		        "is, so the unit '%s' cannot be converted; give the "
		        "value in its default unit, without a unit\n",
		        who, arg, name, unit);
		return -1;
	}
	rc = cli__unit_factor(u, unit, kind, &got, &scale, &offset);
	if (rc) {
		cli__unit_list(u, kind, list, sizeof list);
		fprintf(stderr,
		        "%s: --set %s: '%s' is not a %s unit; %s takes %s\n",
		        who, arg, unit, kind, name, list);
		return -1;
	}
	v = v * scale + offset;
	snprintf(set, sizeof set, "%s=%.17g", name, v);
	if (cli__param_set(params, set, who))
		return -1;
	{
		cli_kind *k = cli__units_kind(u, kind);
		char num[48];
		cli__fmt_num(num, v, 10, NULL);
		snprintf(note, notelen, "%s %s, from %s", num,
		         k && k->dflt[0] ? k->dflt : "", eq + 1);
	}
	return 1;
}

int cli__build_params(const char *who, char *const *sets, size_t nsets,
                      const char *pjson, cli_units *u, const cJSON *disc,
                      cJSON **out, cJSON **sources)
{
	cJSON *params = NULL, *src = cJSON_CreateObject(), *units, *e;

	*out = *sources = NULL;
	if (!src)
		return -1;
	if (pjson) {
		params = cJSON_ParseWithLength(pjson, strlen(pjson));
		if (!cJSON_IsObject(params)) {
			fprintf(stderr, "%s: --params must be a JSON object\n",
			        who);
			goto fail;
		}
		cJSON_ArrayForEach(e, params)
		{
			cJSON_AddStringToObject(src, e->string, "--params");
		}
	} else {
		params = cJSON_CreateObject();
		if (!params)
			goto fail;
	}
	for (size_t i = 0; i < nsets; i++) {
		char note[160], name[256], text[512];
		const char *eq = strchr(sets[i], '=');
		const char *dot;
		int rc;
		size_t n;
		if (!eq || eq == sets[i]) {
			fprintf(stderr,
			        "%s: --set wants NAME=VALUE, not '%s'\n", who,
			        sets[i]);
			goto fail;
		}
		rc = set_with_unit(who, params, sets[i], u, disc, note,
		                   sizeof note);
		if (rc < 0)
			goto fail;
		if (rc == 0 && cli__param_set(params, sets[i], who))
			goto fail;
		/* the top-level name says where it came from */
		dot = memchr(sets[i], '.', (size_t)(eq - sets[i]));
		n = (size_t)((dot ? dot : eq) - sets[i]);
		if (n >= sizeof name)
			n = sizeof name - 1;
		memcpy(name, sets[i], n);
		name[n] = '\0';
		snprintf(text, sizeof text, "--set %s", sets[i]);
		cJSON_DeleteItemFromObjectCaseSensitive(src, name);
		cJSON_AddStringToObject(src, name, text);
	}
	/* units.*: output units only; inputs are always sent in defaults */
	units = cJSON_DetachItemFromObjectCaseSensitive(params, "units");
	cJSON_DeleteItemFromObjectCaseSensitive(src, "units");
	if (units && !cJSON_IsObject(units)) {
		fprintf(stderr, "%s: units must be an object of kind=unit\n",
		        who);
		cJSON_Delete(units);
		goto fail;
	}
	cJSON_ArrayForEach(e, units)
	{
		if (!cJSON_IsString(e) ||
		    cli__units_set_output(u, e->string, e->valuestring, who)) {
			if (!cJSON_IsString(e))
				fprintf(stderr,
				        "%s: units.%s must be a unit "
				        "name\n",
				        who, e->string);
			cJSON_Delete(units);
			goto fail;
		}
	}
	cJSON_Delete(units);
	if (check_names(who, disc, params))
		goto fail;
	*out = params;
	*sources = src;
	return 0;
fail:
	cJSON_Delete(params);
	cJSON_Delete(src);
	return -1;
}

int cli__fetch_info(cli_conn *c, const char *who, long long deadline,
                    cJSON **info, cJSON **discover)
{
	cJSON *a = NULL, *b = NULL;
	int rc;

	*info = *discover = NULL;
	if (cli__write_request(c, "service.info", NULL, 1) ||
	    cli__write_request(c, "rpc.discover", NULL, 2))
		return CLI_EXIT_IO;
	rc = cli__await(c, who, 1, deadline, &a);
	if (!rc)
		rc = cli__await(c, who, 2, deadline, &b);
	if (!rc) {
		*info = cJSON_DetachItemFromObjectCaseSensitive(a, "result");
		*discover =
		    cJSON_DetachItemFromObjectCaseSensitive(b, "result");
		if (!*info) {
			fprintf(stderr, "%s: the daemon refused service.info\n",
			        who);
			rc = CLI_EXIT_RPC_ERROR;
		}
	}
	cJSON_Delete(a);
	cJSON_Delete(b);
	return rc;
}
