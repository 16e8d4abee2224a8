/* Client-side units from the daemon's factors (see units.h). */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "rpc.h"
#include "units.h"

/* Usual spellings of logs, CSV files and WITS feeds, as the daemon's unit
 * times an exact factor. kind "" = any kind that has `daemon`. */
static const struct alias {
	const char *kind, *spelling, *daemon;
	double factor;
} aliases[] = {
    /* length; 1 in = 0.0254 m, 1 ft = 0.3048 m exactly (international
     * yard and pound, 1959) */
    {"length", "M", "m", 1},
    {"length", "METER", "m", 1},
    {"length", "METERS", "m", 1},
    {"length", "METRE", "m", 1},
    {"length", "METRES", "m", 1},
    {"length", "FT", "ft", 1},
    {"length", "F", "ft", 1},
    {"length", "FEET", "ft", 1},
    {"length", "IN", "m", 0.0254},
    {"length", "INCH", "m", 0.0254},
    {"length", "INCHES", "m", 0.0254},
    {"length", "CM", "m", 0.01},
    {"length", "MM", "m", 0.001},
    /* slowness */
    {"slowness", "US/F", "us/ft", 1},
    {"slowness", "US/FT", "us/ft", 1},
    {"slowness", "USEC/F", "us/ft", 1},
    {"slowness", "USEC/FT", "us/ft", 1},
    {"slowness", "US/M", "us/m", 1},
    {"slowness", "USEC/M", "us/m", 1},
    /* velocity */
    {"velocity", "M/S", "m/s", 1},
    {"velocity", "M/SEC", "m/s", 1},
    {"velocity", "KM/S", "km/s", 1},
    {"velocity", "KM/SEC", "km/s", 1},
    {"velocity", "FT/S", "ft/s", 1},
    {"velocity", "F/S", "ft/s", 1},
    {"velocity", "FT/SEC", "ft/s", 1},
    /* density */
    {"density", "G/C3", "g/cm3", 1},
    {"density", "G/CC", "g/cm3", 1},
    {"density", "G/CM3", "g/cm3", 1},
    {"density", "GM/CC", "g/cm3", 1},
    {"density", "GR/CC", "g/cm3", 1},
    {"density", "G/CM^3", "g/cm3", 1},
    {"density", "K/M3", "kg/m3", 1},
    {"density", "KG/M3", "kg/m3", 1},
    {"density", "KG/M^3", "kg/m3", 1},
    /* pressure */
    {"pressure", "MPA", "MPa", 1},
    {"pressure", "KPA", "kPa", 1},
    {"pressure", "BAR", "bar", 1},
    {"pressure", "PSI", "psi", 1},
    {"pressure", "PSIA", "psi", 1},
    /* temperature */
    {"temperature", "DEGC", "degC", 1},
    {"temperature", "DEG_C", "degC", 1},
    {"temperature", "C", "degC", 1},
    {"temperature", "DEGF", "degF", 1},
    {"temperature", "DEG_F", "degF", 1},
    {"temperature", "F", "degF", 1},
    {"temperature", "K", "K", 1},
    {"temperature", "DEGK", "K", 1},
    /* modulus */
    {"modulus", "GPA", "GPa", 1},
    {"modulus", "MPA", "MPa", 1},
    {"modulus", "PA", "Pa", 1},
    /* gas-oil ratio */
    {"gor", "M3/M3", "L/L", 1},
    {"gor", "SCF/STB", "scf/bbl", 1},
    /* fractions and gamma ray: the client's own kinds */
    {"fraction", "", "", 1},
    {"fraction", "V/V", "", 1},
    {"fraction", "FRAC", "", 1},
    {"fraction", "FRACTION", "", 1},
    {"fraction", "DEC", "", 1},
    {"fraction", "M3/M3", "", 1},
    {"fraction", "%", "", 0.01},
    {"fraction", "PU", "", 0.01},
    {"fraction", "P.U.", "", 0.01},
    {"gamma_ray", "", "", 1},
    {"gamma_ray", "GAPI", "", 1},
    {"gamma_ray", "API", "", 1},
};

static void copy(char *dst, size_t size, const char *src)
{
	size_t n = src ? strlen(src) : 0;
	if (n >= size)
		n = size - 1;
	if (n)
		memcpy(dst, src, n);
	dst[n] = '\0';
}

int cli__units_load(cli_units *u, const cJSON *info)
{
	const cJSON *k,
	    *units = cJSON_GetObjectItemCaseSensitive(info, "units");
	static const char *const own[] = {"fraction", "gamma_ray"};

	memset(u, 0, sizeof *u);
	cJSON_ArrayForEach(k, units)
	{
		const cJSON *d = cJSON_GetObjectItemCaseSensitive(k, "default");
		const cJSON *td =
		    cJSON_GetObjectItemCaseSensitive(k, "to_default");
		const cJSON *e;
		cli_kind *kk;
		if (!cJSON_IsString(d) || u->nkind == CLI_UNITS_MAX_KINDS - 2)
			continue;
		kk = &u->kind[u->nkind++];
		copy(kk->name, sizeof kk->name, k->string);
		copy(kk->dflt, sizeof kk->dflt, d->valuestring);
		kk->out_scale = 1;
		cJSON_ArrayForEach(e, td)
		{
			const cJSON *sc =
			    cJSON_GetObjectItemCaseSensitive(e, "scale");
			const cJSON *of =
			    cJSON_GetObjectItemCaseSensitive(e, "offset");
			cli_unit *un;
			if (!cJSON_IsNumber(sc) || !cJSON_IsNumber(of) ||
			    kk->nunit == CLI_UNITS_MAX_PER ||
			    !(sc->valuedouble > 0))
				continue;
			un = &kk->unit[kk->nunit++];
			copy(un->name, sizeof un->name, e->string);
			un->scale = sc->valuedouble;
			un->offset = of->valuedouble;
		}
		if (!kk->nunit) {
			/* an older daemon without factors: the default only */
			cli_unit *un = &kk->unit[kk->nunit++];
			copy(un->name, sizeof un->name, kk->dflt);
			un->scale = 1;
		}
	}
	if (!u->nkind)
		return -1;
	for (size_t i = 0; i < 2; i++) {
		cli_kind *kk = &u->kind[u->nkind++];
		copy(kk->name, sizeof kk->name, own[i]);
		kk->out_scale = 1;
		kk->unit[0].scale = 1;
		kk->nunit = 1;
	}
	return 0;
}

cli_kind *cli__units_kind(cli_units *u, const char *name)
{
	for (size_t i = 0; name && i < u->nkind; i++)
		if (strcmp(u->kind[i].name, name) == 0)
			return &u->kind[i];
	return NULL;
}

cli_kind *cli__units_kind_of_default(cli_units *u, const char *unit)
{
	for (size_t i = 0; unit && i < u->nkind; i++)
		if (u->kind[i].dflt[0] && strcmp(u->kind[i].dflt, unit) == 0)
			return &u->kind[i];
	return NULL;
}

static const cli_unit *daemon_unit(const cli_kind *k, const char *name,
                                   int nocase)
{
	for (size_t i = 0; i < k->nunit; i++)
		if (nocase ? strcasecmp(k->unit[i].name, name) == 0
		           : strcmp(k->unit[i].name, name) == 0)
			return &k->unit[i];
	return NULL;
}

/* Factor of spelling in one kind: 0 found, -1 not. */
static int factor_in(const cli_kind *k, const char *spelling, double *scale,
                     double *offset)
{
	const cli_unit *un = daemon_unit(k, spelling, 1);
	char up[32];
	size_t n = strlen(spelling);

	if (un) {
		*scale = un->scale;
		*offset = un->offset;
		return 0;
	}
	if (strcmp(k->name, "gamma_ray") == 0) {
		/* gamma ray is in API units whatever the label says */
		*scale = 1;
		*offset = 0;
		return 0;
	}
	if (n >= sizeof up)
		return -1;
	for (size_t i = 0; i <= n; i++)
		up[i] = (char)toupper((unsigned char)spelling[i]);
	for (size_t i = 0; i < sizeof aliases / sizeof *aliases; i++) {
		const struct alias *a = &aliases[i];
		if (strcmp(a->kind, k->name) || strcmp(a->spelling, up))
			continue;
		if (!*a->daemon) {
			*scale = a->factor;
			*offset = 0;
			return 0;
		}
		un = daemon_unit(k, a->daemon, 0);
		if (!un)
			return -1;
		*scale = a->factor * un->scale;
		*offset = un->offset;
		return 0;
	}
	return -1;
}

int cli__unit_factor(const cli_units *u, const char *spelling, const char *want,
                     const char **kind_out, double *scale, double *offset)
{
	int found = 0;

	for (size_t i = 0; i < u->nkind; i++) {
		const cli_kind *k = &u->kind[i];
		double s, o;
		if (want && strcmp(k->name, want))
			continue;
		/* Without a kind, bare text ("" or "API") says nothing. */
		if (!want && (strcmp(k->name, "fraction") == 0 ||
		              strcmp(k->name, "gamma_ray") == 0))
			continue;
		if (factor_in(k, spelling, &s, &o))
			continue;
		if (found++) /* a second kind has it too */
			return -2;
		*scale = s;
		*offset = o;
		if (kind_out)
			*kind_out = k->name;
	}
	return found ? 0 : -1;
}

void cli__unit_list(const cli_units *u, const char *kind, char *buf,
                    size_t size)
{
	size_t used = 0;

	buf[0] = '\0';
	for (size_t i = 0; i < u->nkind; i++) {
		const cli_kind *k = &u->kind[i];
		if (strcmp(k->name, kind))
			continue;
		for (size_t j = 0; j < k->nunit && used < size; j++)
			used +=
			    (size_t)snprintf(buf + used, size - used, "%s%s",
			                     used ? ", " : "", k->unit[j].name);
		for (size_t j = 0;
		     j < sizeof aliases / sizeof *aliases && used < size; j++)
			if (strcmp(aliases[j].kind, kind) == 0)
				used += (size_t)snprintf(
				    buf + used, size - used, "%s%s",
				    used ? ", " : "",
				    *aliases[j].spelling ? aliases[j].spelling
				                         : "(none)");
	}
}

int cli__units_set_output(cli_units *u, const char *kind, const char *unit,
                          const char *who)
{
	cli_kind *k = cli__units_kind(u, kind);
	const cli_unit *un;

	if (!k || !k->dflt[0]) {
		const char *names[CLI_UNITS_MAX_KINDS], *s;
		for (size_t i = 0; i < u->nkind; i++)
			names[i] = u->kind[i].dflt[0] ? u->kind[i].name : NULL;
		s = cli__suggest(kind, names, u->nkind);
		fprintf(stderr, "%s: units.%s: no such quantity kind%s%s%s\n",
		        who, kind, s ? "; did you mean " : "", s ? s : "",
		        s ? "?" : "");
		return -1;
	}
	un = daemon_unit(k, unit, 0);
	if (!un) {
		const char *names[CLI_UNITS_MAX_PER], *s;
		char list[256];
		for (size_t i = 0; i < k->nunit; i++)
			names[i] = k->unit[i].name;
		size_t used = 0;
		s = cli__suggest(unit, names, k->nunit);
		list[0] = '\0';
		for (size_t i = 0; i < k->nunit && used < sizeof list; i++)
			used += (size_t)snprintf(
			    list + used, sizeof list - used, "%s%s",
			    i ? ", " : "", k->unit[i].name);
		fprintf(stderr,
		        "%s: units.%s: '%s' is not one of the daemon's %s "
		        "units (%s)%s%s%s\n",
		        who, kind, unit, kind, list, s ? "; did you mean " : "",
		        s ? s : "", s ? "?" : "");
		return -1;
	}
	copy(k->out, sizeof k->out, un->name);
	k->out_scale = un->scale;
	k->out_offset = un->offset;
	return 0;
}

const char *cli__units_output(cli_units *u, const char *unit, double *scale,
                              double *offset)
{
	cli_kind *k = cli__units_kind_of_default(u, unit);

	*scale = 1;
	*offset = 0;
	if (!k || !k->out[0])
		return unit;
	*scale = k->out_scale;
	*offset = k->out_offset;
	return k->out;
}

/* log.process parameters and their kinds, for a schema that does not
 * say (x-unit-kind). By last path segment where a segment alone tells. */
static const struct {
	const char *path, *kind;
} param_kinds[] = {
    {"depth", "length"},
    {"dtp", "slowness"},
    {"dts", "slowness"},
    {"vp", "velocity"},
    {"vs", "velocity"},
    {"rhob", "density"},
    {"drho", "density"},
    {"caliper", "length"},
    {"bit_size", "length"},
    {"gr", "gamma_ray"},
    {"gr_clean", "gamma_ray"},
    {"gr_shale", "gamma_ray"},
    {"vsh", "fraction"},
    {"porosity", "fraction"},
    {"pressure", "pressure"},
    {"temperature", "temperature"},
    {"drho_limit", "density"},
    {"washout_limit", "length"},
    {"pressure_gradient", "pressure_gradient"},
    {"temperature_gradient", "temperature_gradient"},
    {"surface_pressure", "pressure"},
    {"surface_temperature", "temperature"},
    {"qc.rho_min", "density"},
    {"qc.rho_max", "density"},
    {"qc.vp_min", "velocity"},
    {"qc.vp_max", "velocity"},
    {"qc.vs_min", "velocity"},
    {"qc.vs_max", "velocity"},
    /* inside fluid and mineral descriptions */
    {".salinity", "salinity"},
    {".gor", "gor"},
    {".k", "modulus"},
    {".mu", "modulus"},
    {".rho", "density"},
    {".pressure", "pressure"},
    {".temperature", "temperature"},
};

/* The kind of a nested parameter ("pressures.column.water_depth") by
 * walking the schema's object properties from the top-level parameter
 * down; NULL when the schema does not say. */
static const char *nested_kind(const cJSON *discover, const cJSON *params,
                               const char *path)
{
	const char *dot = strchr(path, '.');
	const cJSON *p, *node = NULL, *k;
	char seg[128];
	size_t n = (size_t)(dot - path);

	if (!dot || n >= sizeof seg)
		return NULL;
	memcpy(seg, path, n);
	seg[n] = '\0';
	cJSON_ArrayForEach(p, params)
	{
		const cJSON *nm = cJSON_GetObjectItemCaseSensitive(p, "name");
		if (cJSON_IsString(nm) && strcmp(nm->valuestring, seg) == 0)
			node = cJSON_GetObjectItemCaseSensitive(p, "schema");
	}
	while (node && dot) {
		const char *next;
		node = cli__schema_deref(discover, node);
		path = dot + 1;
		next = strchr(path, '.');
		n = next ? (size_t)(next - path) : strlen(path);
		if (n >= sizeof seg)
			return NULL;
		memcpy(seg, path, n);
		seg[n] = '\0';
		node = cJSON_GetObjectItemCaseSensitive(
		    cJSON_GetObjectItemCaseSensitive(node, "properties"), seg);
		dot = next;
	}
	node = cli__schema_deref(discover, node);
	k = cJSON_GetObjectItemCaseSensitive(node, "x-kind");
	return cJSON_IsString(k) ? k->valuestring : NULL;
}

const char *cli__param_kind(const cJSON *discover, const char *path)
{
	const char *last = strrchr(path, '.');

	if (discover) {
		const cJSON *m = cli__method_doc(discover, "log.process");
		const cJSON *p,
		    *params = cJSON_GetObjectItemCaseSensitive(m, "params");
		cJSON_ArrayForEach(p, params)
		{
			const cJSON *nm =
			    cJSON_GetObjectItemCaseSensitive(p, "name");
			const cJSON *k =
			    cJSON_GetObjectItemCaseSensitive(p, "x-unit-kind");
			if (!k) /* the daemon puts it in the param's schema */
				k = cJSON_GetObjectItemCaseSensitive(
				    cJSON_GetObjectItemCaseSensitive(p,
				                                     "schema"),
				    "x-kind");
			if (cJSON_IsString(nm) && cJSON_IsString(k) &&
			    strcmp(nm->valuestring, path) == 0)
				return k->valuestring;
		}
		if (last) {
			const char *nk = nested_kind(discover, params, path);
			if (nk)
				return nk;
		}
	}
	for (size_t i = 0; i < sizeof param_kinds / sizeof *param_kinds; i++) {
		const char *pk = param_kinds[i].path;
		if (pk[0] == '.' ? last && strcmp(last, pk) == 0
		                 : strcmp(path, pk) == 0)
			return param_kinds[i].kind;
	}
	return NULL;
}

int cli__split_value_unit(const char *value, double *num, char *unit,
                          size_t unitlen)
{
	char *end;
	double v;
	const char *u;
	size_t n;

	errno = 0;
	v = strtod(value, &end);
	if (end == value || !isfinite(v))
		return 0;
	/* no hex, inf or nan numbers */
	for (const char *p = value; p < end; p++)
		if (!isdigit((unsigned char)*p) && !strchr("+-.eE ", *p))
			return 0;
	u = end;
	while (*u == ' ')
		u++;
	n = strlen(u);
	while (n && u[n - 1] == ' ')
		n--;
	if (!n || n >= unitlen || strpbrk(u, "[]{}\",:"))
		return 0;
	memcpy(unit, u, n);
	unit[n] = '\0';
	*num = v;
	return 1;
}
