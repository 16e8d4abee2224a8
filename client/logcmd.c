/* `rockwire log FILE.las`: streams a LAS 2.0 file through log.process in
 * blocks, pipelined with a bounded number of blocks in flight, and writes
 * the input with the computed curves added, as LAS 2.0 (header kept, new
 * curves with units and descriptions, ~Other saying how they were made)
 * or CSV. Curves map to inputs by mnemonic (overridable), LAS units are
 * converted to the protocol's default units, and the output goes to a
 * temporary file renamed into place only when complete. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "las.h"
#include "logio.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

#define WHO          "rockwire log"
#define MAX_INFLIGHT 64
#define MAX_OUT      64

/* Quantity kinds of the inputs, for unit conversion. */
enum { K_LEN, K_SLOW, K_VEL, K_DEN, K_FRAC, K_GR, K_PRES, K_TEMP };

typedef struct unit_map {
	int kind;
	const char *las;      /* upper case */
	double scale, offset; /* to the protocol default: v*scale+offset */
} unit_map;

#define PSI_MPA 0.006894757293168361
static const unit_map units[] = {
    {K_LEN, "M", 1, 0},
    {K_LEN, "FT", 0.3048, 0},
    {K_LEN, "F", 0.3048, 0},
    {K_LEN, "IN", 0.0254, 0},
    {K_LEN, "CM", 0.01, 0},
    {K_LEN, "MM", 0.001, 0},
    {K_SLOW, "US/F", 1, 0},
    {K_SLOW, "US/FT", 1, 0},
    {K_SLOW, "USEC/FT", 1, 0},
    {K_SLOW, "US/M", 0.3048, 0},
    {K_SLOW, "USEC/M", 0.3048, 0},
    {K_VEL, "M/S", 1, 0},
    {K_VEL, "KM/S", 1000, 0},
    {K_VEL, "FT/S", 0.3048, 0},
    {K_VEL, "F/S", 0.3048, 0},
    {K_DEN, "G/C3", 1, 0},
    {K_DEN, "G/CC", 1, 0},
    {K_DEN, "G/CM3", 1, 0},
    {K_DEN, "GM/CC", 1, 0},
    {K_DEN, "KG/M3", 0.001, 0},
    {K_FRAC, "", 1, 0},
    {K_FRAC, "V/V", 1, 0},
    {K_FRAC, "FRAC", 1, 0},
    {K_FRAC, "DEC", 1, 0},
    {K_FRAC, "%", 0.01, 0},
    {K_FRAC, "PU", 0.01, 0},
    {K_PRES, "MPA", 1, 0},
    {K_PRES, "KPA", 0.001, 0},
    {K_PRES, "BAR", 0.1, 0},
    {K_PRES, "PSI", PSI_MPA, 0},
    {K_TEMP, "DEGC", 1, 0},
    {K_TEMP, "C", 1, 0},
    {K_TEMP, "DEGF", 5.0 / 9, -32.0 * 5 / 9},
    {K_TEMP, "F", 5.0 / 9, -32.0 * 5 / 9},
    {K_TEMP, "K", 1, -273.15},
};

/* The inputs of log.process a curve can feed, with default mnemonics. */
typedef struct input_def {
	const char *name;
	int kind;
	const char *mnems[6];
} input_def;

static const input_def inputs[] = {
    {"depth", K_LEN, {"DEPT", "DEPTH", "MD"}},
    {"dtp", K_SLOW, {"DT", "DTC", "DTCO", "DTP", "AC"}},
    {"dts", K_SLOW, {"DTS", "DTSM", "DTSH"}},
    {"vp", K_VEL, {"VP"}},
    {"vs", K_VEL, {"VS"}},
    {"rhob", K_DEN, {"RHOB", "RHOZ", "DEN"}},
    {"drho", K_DEN, {"DRHO", "DCOR"}},
    {"caliper", K_LEN, {"CALI", "CAL", "HCAL"}},
    {"bit_size", K_LEN, {"BS", "BIT"}},
    {"gr", K_GR, {"GR", "GRC"}},
    {"vsh", K_FRAC, {"VSH", "VCL"}},
    {"porosity", K_FRAC, {"PHIT", "PHIE", "POR"}},
    {"pressure", K_PRES, {NULL}},
    {"temperature", K_TEMP, {NULL}},
};
#define N_INPUTS (sizeof inputs / sizeof inputs[0])

static const char *const kind_names[] = {"length",   "slowness",   "velocity",
                                         "density",  "fraction",   "gamma ray",
                                         "pressure", "temperature"};

/* Descriptions of the result columns. */
static const struct {
	const char *key, *desc;
} col_desc[] = {
    {"vp", "P-wave velocity"},
    {"vs", "S-wave velocity"},
    {"rho", "bulk density used"},
    {"k", "bulk modulus"},
    {"mu", "shear modulus"},
    {"lambda", "Lame lambda"},
    {"e", "Young's modulus"},
    {"nu", "Poisson's ratio"},
    {"ai", "acoustic impedance"},
    {"si", "shear impedance"},
    {"vpvs", "Vp/Vs ratio"},
    {"vsh", "shale volume used"},
    {"vp_sub", "P-wave velocity after fluid substitution"},
    {"vs_sub", "S-wave velocity after fluid substitution"},
    {"rho_sub", "density after fluid substitution"},
    {"k_sub", "bulk modulus after fluid substitution"},
    {"ai_sub", "acoustic impedance after fluid substitution"},
    {"si_sub", "shear impedance after fluid substitution"},
    {"vpvs_sub", "Vp/Vs after fluid substitution"},
    {"nu_sub", "Poisson's ratio after fluid substitution"},
    {"fluid_in_place_k", "bulk modulus of the fluid in place"},
    {"fluid_in_place_rho", "density of the fluid in place"},
    {"fluid_new_k", "bulk modulus of the new fluid"},
    {"fluid_new_rho", "density of the new fluid"},
    {"qc", "QC flag bits (0 clean; legend in ~Other)"},
};

typedef struct slot {
	double *rows;
	size_t nrows;
	unsigned long id;
	unsigned long long first; /* index of its first sample */
} slot;

typedef struct logrun {
	cli_las_reader *r;
	FILE *in, *out;
	const char *path;
	int csv, digits, summary, progress, subst, gr_levels;
	size_t block, inflight_max;
	int col[N_INPUTS]; /* curve index per input, -1 none */
	double scale[N_INPUTS], offset[N_INPUTS];
	char *base; /* params JSON without the braces */
	size_t ncurves;
	/* the pipeline */
	slot slots[MAX_INFLIGHT];
	size_t head, count;
	unsigned long next_id;
	cli_buf wbuf;
	int info_pending;
	/* output columns, from the first response */
	int have_cols;
	size_t nout;
	char *out_key[MAX_OUT];
	char out_mnem[MAX_OUT][32];
	char out_unit[MAX_OUT][32];
	char note[4096];
	double *orow;
	/* QC legend and counts */
	char *flag_name[32];
	unsigned long long flag_count[32];
	unsigned long long samples, flagged, queued;
	int failed;
	/* progress */
	off_t total_bytes;
	struct timespec t0, last;
} logrun;

static double now_s(const struct timespec *t0)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)(t.tv_sec - t0->tv_sec) +
	       (double)(t.tv_nsec - t0->tv_nsec) * 1e-9;
}

static void progress(logrun *L, int final)
{
	double el, frac;
	long pos;
	struct timespec t;

	if (!L->progress)
		return;
	clock_gettime(CLOCK_MONOTONIC, &t);
	if (!final && (double)(t.tv_sec - L->last.tv_sec) +
	                      (double)(t.tv_nsec - L->last.tv_nsec) * 1e-9 <
	                  0.25)
		return;
	L->last = t;
	el = now_s(&L->t0);
	pos = ftell(L->in);
	frac = L->total_bytes > 0 && pos > 0
	           ? (double)pos / (double)L->total_bytes
	           : 0;
	if (final)
		frac = 1;
	int bar = (int)(frac * 30);
	fprintf(stderr, "\r[%.*s%*s] %3.0f%% %llu samples %.0f/s", bar,
	        "##############################", 30 - bar, "", 100 * frac,
	        L->samples, el > 0 ? (double)L->samples / el : 0.0);
	if (!final && frac > 0.01)
		fprintf(stderr, " %.0fs left  ", el * (1 / frac - 1));
	else
		fprintf(stderr, "           ");
	if (final)
		fputc('\n', stderr);
}

/* Maps the LAS unit of a curve to the protocol's default unit. */
static int unit_conv(const cli_las_line *cv, const char *input, int kind,
                     double *scale, double *offset)
{
	char up[64], list[256];
	size_t n = strlen(cv->unit), used = 0;

	if (kind == K_GR) {
		*scale = 1, *offset = 0;
		return 0; /* API units; any label is taken as API */
	}
	if (n >= sizeof up)
		n = sizeof up - 1;
	for (size_t i = 0; i < n; i++)
		up[i] = (char)toupper((unsigned char)cv->unit[i]);
	up[n] = '\0';
	list[0] = '\0';
	for (size_t i = 0; i < sizeof units / sizeof units[0]; i++) {
		if (units[i].kind != kind)
			continue;
		if (strcmp(units[i].las, up) == 0) {
			*scale = units[i].scale;
			*offset = units[i].offset;
			return 0;
		}
		int w = snprintf(list + used, sizeof list - used, "%s%s",
		                 used ? ", " : "",
		                 *units[i].las ? units[i].las : "(none)");
		if (w > 0 && (size_t)w < sizeof list - used)
			used += (size_t)w;
	}
	fprintf(stderr,
	        WHO ": curve %s (line %lu) feeds %s, but its unit '%s' is not "
	            "a %s unit this client knows; accepted: %s\n",
	        cv->mnem, cv->lineno, input, cv->unit, kind_names[kind], list);
	return -1;
}

static int find_input(const char *name)
{
	for (size_t i = 0; i < N_INPUTS; i++)
		if (strcmp(inputs[i].name, name) == 0)
			return (int)i;
	return -1;
}

/* Chooses the curve of every input: --curve overrides, then defaults. */
static int map_curves(logrun *L, char **maps, size_t nmaps)
{
	int expl[N_INPUTS] = {0};

	for (size_t i = 0; i < N_INPUTS; i++)
		L->col[i] = -1;
	for (size_t m = 0; m < nmaps; m++) {
		const char *eq = strchr(maps[m], '=');
		char name[32];
		int in;
		if (!eq || eq == maps[m] ||
		    (size_t)(eq - maps[m]) >= sizeof name) {
			fprintf(stderr,
			        WHO ": --curve wants INPUT=MNEMONIC, "
			            "not '%s'\n",
			        maps[m]);
			return -1;
		}
		memcpy(name, maps[m], (size_t)(eq - maps[m]));
		name[eq - maps[m]] = '\0';
		in = find_input(name);
		if (in < 0) {
			fprintf(stderr,
			        WHO ": --curve: unknown input '%s'; "
			            "inputs: depth dtp dts vp vs rhob "
			            "drho caliper bit_size gr vsh "
			            "porosity pressure temperature\n",
			        name);
			return -1;
		}
		expl[in] = 1;
		if (strcasecmp(eq + 1, "none") == 0)
			continue;
		for (size_t c = 0; c < L->ncurves; c++)
			if (strcasecmp(cli_las_curve(L->r, c)->mnem, eq + 1) ==
			    0) {
				L->col[in] = (int)c;
				break;
			}
		if (L->col[in] < 0) {
			fprintf(stderr,
			        WHO ": --curve %s: %s has no curve '%s'\n",
			        name, L->path, eq + 1);
			return -1;
		}
	}
	for (size_t i = 0; i < N_INPUTS; i++) {
		if (expl[i])
			continue;
		for (int k = 0; k < 6 && inputs[i].mnems[k] && L->col[i] < 0;
		     k++)
			for (size_t c = 0; c < L->ncurves; c++)
				if (strcasecmp(cli_las_curve(L->r, c)->mnem,
				               inputs[i].mnems[k]) == 0) {
					L->col[i] = (int)c;
					break;
				}
	}
	/* Defaults never give both members of a pair: the slowness and the
	 * shale volume win over velocity and gamma ray. */
	static const char *const pairs[][2] = {
	    {"dtp", "vp"}, {"dts", "vs"}, {"vsh", "gr"}};
	for (size_t p = 0; p < 3; p++) {
		int a = find_input(pairs[p][0]), b = find_input(pairs[p][1]);
		if (L->col[a] >= 0 && L->col[b] >= 0 && !expl[b])
			L->col[b] = -1;
		else if (L->col[a] >= 0 && L->col[b] >= 0 && !expl[a])
			L->col[a] = -1;
	}
	/* Porosity, pressure and temperature serve fluid substitution
	 * only: by default they are sent only when fluid_new is set. */
	/* Gamma ray needs its clean and shale levels (--set gr_clean=..
	 * --set gr_shale=..); without them it is not sent by default. */
	if (!expl[find_input("gr")] && !L->gr_levels)
		L->col[find_input("gr")] = -1;
	if (!L->subst)
		for (size_t i = 0; i < N_INPUTS; i++)
			if (!expl[i] &&
			    (strcmp(inputs[i].name, "porosity") == 0 ||
			     strcmp(inputs[i].name, "pressure") == 0 ||
			     strcmp(inputs[i].name, "temperature") == 0))
				L->col[i] = -1;
	for (size_t i = 0; i < N_INPUTS; i++) {
		if (L->col[i] < 0)
			continue;
		if (unit_conv(cli_las_curve(L->r, (size_t)L->col[i]),
		              inputs[i].name, inputs[i].kind, &L->scale[i],
		              &L->offset[i]))
			return -1;
	}
	return 0;
}

/* Appends one block request to the write buffer. */
static int queue_block(logrun *L, slot *s)
{
	char num[48], head[96];
	int first = 1;

	snprintf(head, sizeof head,
	         "{\"jsonrpc\":\"2.0\",\"id\":%lu,\"method\":\"log.process\","
	         "\"params\":{",
	         s->id);
	if (cli__buf_puts(&L->wbuf, head))
		return -1;
	if (*L->base) {
		if (cli__buf_puts(&L->wbuf, L->base))
			return -1;
		first = 0;
	}
	for (size_t i = 0; i < N_INPUTS; i++) {
		if (L->col[i] < 0)
			continue;
		snprintf(head, sizeof head, "%s\"%s\":[", first ? "" : ",",
		         inputs[i].name);
		first = 0;
		if (cli__buf_puts(&L->wbuf, head))
			return -1;
		for (size_t j = 0; j < s->nrows; j++) {
			double v = s->rows[j * L->ncurves + (size_t)L->col[i]];
			size_t n;
			if (!isnan(v))
				v = v * L->scale[i] + L->offset[i];
			n = cli__fmt_num(num + 1, v, 0, NULL);
			num[0] = ',';
			if (cli__buf_put(&L->wbuf, j ? num : num + 1,
			                 j ? n + 1 : n))
				return -1;
		}
		if (cli__buf_put(&L->wbuf, "]", 1))
			return -1;
	}
	return cli__buf_puts(&L->wbuf, "}}\n");
}

static const char *describe(const char *key)
{
	for (size_t i = 0; i < sizeof col_desc / sizeof col_desc[0]; i++)
		if (strcmp(col_desc[i].key, key) == 0)
			return col_desc[i].desc;
	return "computed by log.process";
}

/* Sets up the output columns and writes the header from the first
 * response's result. */
static int start_output(logrun *L, const cJSON *res)
{
	const cJSON *units = cJSON_GetObjectItemCaseSensitive(res, "units");
	const cJSON *m;
	cli_las_newcurve add[MAX_OUT];
	char err[256];
	size_t used = 0;

	cJSON_ArrayForEach(m, res)
	{
		const cJSON *u;
		size_t k, j;
		if (!cJSON_IsArray(m) || strcmp(m->string, "depth") == 0)
			continue;
		if (L->nout == MAX_OUT)
			break;
		k = L->nout++;
		L->out_key[k] = strdup(m->string);
		if (!L->out_key[k])
			return -1;
		for (j = 0; m->string[j] && j < 24; j++)
			L->out_mnem[k][j] =
			    (char)toupper((unsigned char)m->string[j]);
		L->out_mnem[k][j] = '\0';
		/* A clash with an input mnemonic gets a suffix. */
		for (size_t c = 0; c < L->ncurves; c++)
			if (strcasecmp(cli_las_curve(L->r, c)->mnem,
			               L->out_mnem[k]) == 0) {
				size_t e = strlen(L->out_mnem[k]);
				memcpy(L->out_mnem[k] + e, "_2", 3);
				break;
			}
		u = cJSON_GetObjectItemCaseSensitive(units, m->string);
		L->out_unit[k][0] = '\0';
		if (cJSON_IsString(u)) {
			/* LAS spells g/cm3 G/C3. */
			const char *us = u->valuestring,
			           *gc = strstr(us, "g/cm3");
			if (gc) {
				snprintf(L->out_unit[k], sizeof L->out_unit[k],
				         "%.*sG/C3", (int)(gc - us), us);
				for (j = 0; j < (size_t)(gc - us); j++)
					L->out_unit[k][j] =
					    (char)toupper((unsigned char)us[j]);
			} else
				for (j = 0; u->valuestring[j] && j < 31; j++)
					L->out_unit[k][j] = (char)toupper(
					    (unsigned char)u->valuestring[j]);
			if (!gc)
				L->out_unit[k][j] = '\0';
		}
		add[k].mnem = L->out_mnem[k];
		add[k].unit = L->out_unit[k];
		add[k].desc = describe(m->string);
	}
	L->orow = malloc((L->ncurves + L->nout) * sizeof *L->orow);
	if (!L->orow)
		return -1;
	L->have_cols = 1;
	/* ~Other: how the new curves were made. */
	const cJSON *vsp =
	    cJSON_GetObjectItemCaseSensitive(res, "vs_predicted_by");
	const cJSON *rhp =
	    cJSON_GetObjectItemCaseSensitive(res, "rho_predicted_by");
	const cJSON *sub =
	    cJSON_GetObjectItemCaseSensitive(res, "substitution");
	used += (size_t)snprintf(L->note + used, sizeof L->note - used,
	                         "Curves %s to %s added by rockwire " RW_VERSION
	                         " (log.process) from this file's curves;",
	                         L->out_mnem[0], L->out_mnem[L->nout - 1]);
	for (size_t i = 0; i < N_INPUTS && used < sizeof L->note; i++)
		if (L->col[i] >= 0)
			used += (size_t)snprintf(
			    L->note + used, sizeof L->note - used, " %s=%s",
			    inputs[i].name,
			    cli_las_curve(L->r, (size_t)L->col[i])->mnem);
	if (used < sizeof L->note)
		used += (size_t)snprintf(
		    L->note + used, sizeof L->note - used,
		    ".\nElastic set from the isotropic relations; vs %s%s; "
		    "density %s%s; %s.\n",
		    cJSON_IsString(vsp) ? "predicted where missing by "
		                        : "as measured",
		    cJSON_IsString(vsp) ? vsp->valuestring : "",
		    cJSON_IsString(rhp) ? "predicted where missing by "
		                        : "as "
		                          "measured",
		    cJSON_IsString(rhp) ? rhp->valuestring : "",
		    cJSON_IsString(sub) ? "Gassmann 1951 fluid substitution "
		                          "in the _SUB curves"
		                        : "no fluid substitution");
	if (used < sizeof L->note)
		used += (size_t)snprintf(
		    L->note + used, sizeof L->note - used,
		    "Predicted values are marked in QC, never passed off as "
		    "measured. QC bits:");
	for (int b = 0; b < 32 && used < sizeof L->note; b++)
		if (L->flag_name[b])
			used += (size_t)snprintf(
			    L->note + used, sizeof L->note - used, "%s %d=%s",
			    b % 6 ? "" : "\n", b, L->flag_name[b]);
	if (used >= sizeof L->note)
		L->note[sizeof L->note - 1] = '\0';
	if (L->csv)
		return cli_las_write_csv_header(L->out, L->r, add, L->nout);
	if (cli_las_write_header(L->out, L->r, add, L->nout, L->note, err,
	                         sizeof err)) {
		fprintf(stderr, WHO ": %s\n", err);
		return -1;
	}
	return 0;
}

static int write_rows(logrun *L, const slot *s, const cJSON *res)
{
	const cJSON *colv[MAX_OUT];
	const cJSON *it[MAX_OUT];
	double null_v = cli_las_null(L->r);
	char nulltxt[48], num[48];
	size_t nc = L->ncurves;

	cli__fmt_num(nulltxt, null_v, 0, NULL);
	for (size_t k = 0; k < L->nout; k++) {
		colv[k] = cJSON_GetObjectItemCaseSensitive(res, L->out_key[k]);
		if (!cJSON_IsArray(colv[k]) ||
		    (size_t)cJSON_GetArraySize(colv[k]) != s->nrows) {
			fprintf(stderr,
			        WHO ": response for samples from "
			            "%llu lacks %s\n",
			        s->first, L->out_key[k]);
			return -1;
		}
		it[k] = colv[k]->child;
	}
	for (size_t j = 0; j < s->nrows; j++) {
		const double *row = s->rows + j * nc;
		for (size_t c = 0; c < nc + L->nout; c++) {
			double v;
			int digits = 0;
			if (c < nc) {
				v = row[c];
			} else {
				const cJSON *e = it[c - nc];
				v = cJSON_IsNumber(e) ? e->valuedouble : NAN;
				it[c - nc] = e ? e->next : NULL;
				digits = strcmp(L->out_key[c - nc], "qc")
				             ? L->digits
				             : 0;
				if (!digits &&
				    strcmp(L->out_key[c - nc], "qc") == 0) {
					uint32_t f = (uint32_t)v;
					L->flagged += f != 0;
					for (int b = 0; b < 32; b++)
						L->flag_count[b] +=
						    (f >> b) & 1u;
				}
			}
			size_t n =
			    cli__fmt_num(num, v, digits, L->csv ? "" : nulltxt);
			if (c && fputc(L->csv ? ',' : ' ', L->out) == EOF)
				return -1;
			if (fwrite(num, 1, n, L->out) != n)
				return -1;
		}
		if (fputc('\n', L->out) == EOF)
			return -1;
	}
	L->samples += s->nrows;
	return 0;
}

static int on_line(void *ctx, char *line, size_t len)
{
	logrun *L = ctx;
	cJSON *r = cJSON_ParseWithLength(line, len);
	const cJSON *id, *res, *err;
	int rc = -1;

	if (!r) {
		fprintf(stderr, WHO ": unreadable response from the daemon\n");
		return -1;
	}
	id = cJSON_GetObjectItemCaseSensitive(r, "id");
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (L->info_pending && cJSON_IsNumber(id) && id->valueint == 0) {
		const cJSON *q,
		    *fl = cJSON_GetObjectItemCaseSensitive(res, "qc_flags");
		cJSON_ArrayForEach(q, fl)
		{
			const cJSON *b =
			    cJSON_GetObjectItemCaseSensitive(q, "index");
			const cJSON *nm =
			    cJSON_GetObjectItemCaseSensitive(q, "name");
			if (cJSON_IsNumber(b) && cJSON_IsString(nm)) {
				int bit = (int)b->valuedouble;
				if (bit >= 0 && bit < 32 && !L->flag_name[bit])
					L->flag_name[bit] =
					    strdup(nm->valuestring);
			}
		}
		L->info_pending = 0;
		cJSON_Delete(r);
		return 0;
	}
	if (!L->count) {
		fprintf(stderr, WHO ": unexpected response from the daemon\n");
		goto out;
	}
	slot *s = &L->slots[L->head];
	if (!cJSON_IsNumber(id) || (unsigned long)id->valuedouble != s->id) {
		fprintf(stderr, WHO ": response out of order\n");
		goto out;
	}
	if (err) {
		const cJSON *d = cJSON_GetObjectItemCaseSensitive(err, "data");
		const cJSON *p = cJSON_GetObjectItemCaseSensitive(d, "param");
		const cJSON *why =
		    cJSON_GetObjectItemCaseSensitive(d, "reason");
		const cJSON *msg =
		    cJSON_GetObjectItemCaseSensitive(err, "message");
		fprintf(stderr,
		        WHO ": the daemon refused the block from "
		            "sample %llu: %s%s%s%s%s\n",
		        s->first,
		        cJSON_IsString(msg) ? msg->valuestring : "error",
		        cJSON_IsString(p) ? ": " : "",
		        cJSON_IsString(p) ? p->valuestring : "",
		        cJSON_IsString(why) ? ": " : "",
		        cJSON_IsString(why) ? why->valuestring : "");
		L->failed = CLI_EXIT_RPC_ERROR;
		goto out;
	}
	if (!L->have_cols && start_output(L, res))
		goto out;
	if (write_rows(L, s, res)) {
		if (!L->failed)
			fprintf(stderr, WHO ": cannot write the output: %s\n",
			        strerror(errno));
		goto out;
	}
	L->head = (L->head + 1) % L->inflight_max;
	L->count--;
	rc = 0;
	progress(L, 0);
out:
	cJSON_Delete(r);
	return rc;
}

void cli_usage_log(FILE *f)
{
	fprintf(f,
	        "usage: rockwire log FILE.las [-o OUT] [--format las|csv]\n"
	        "       [--curve INPUT=MNEM|none ...] [--set NAME=VALUE ...]\n"
	        "       [--params JSON] [--block N] [--inflight N]\n"
	        "       [--digits N] [--summary] [--progress|--no-progress]\n");
}

int cli_cmd_log(const cli_opts *o, int argc, char **argv)
{
	logrun L;
	char *maps[64];
	size_t nmaps = 0;
	const char *outpath = NULL, *pjson = NULL;
	char tmppath[4096];
	cJSON *params = NULL;
	cli_conn c;
	int connected = 0, rc = CLI_EXIT_IO, st, eof = 0, tmpfd = -1;
	int force_prog = -1;
	struct stat sb;

	memset(&L, 0, sizeof L);
	L.block = 2000;
	L.inflight_max = 4;
	L.digits = 7;
	tmppath[0] = '\0';
	params = cJSON_CreateObject();
	if (!params)
		return CLI_EXIT_IO;
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		if ((strcmp(a, "-o") == 0 || strcmp(a, "--output") == 0) && v)
			outpath = v, i++;
		else if (strcmp(a, "--format") == 0 && v) {
			if (strcmp(v, "csv") == 0)
				L.csv = 1;
			else if (strcmp(v, "las") != 0) {
				fprintf(stderr, WHO ": --format las or csv\n");
				goto usage_fail;
			}
			i++;
		} else if (strcmp(a, "--curve") == 0 && v && nmaps < 64)
			maps[nmaps++] = argv[++i];
		else if (strcmp(a, "--set") == 0 && v) {
			if (cli__param_set(params, v, WHO))
				goto usage_fail;
			i++;
		} else if (strcmp(a, "--params") == 0 && v)
			pjson = v, i++;
		else if ((strcmp(a, "--block") == 0 ||
		          strcmp(a, "--inflight") == 0 ||
		          strcmp(a, "--digits") == 0) &&
		         v) {
			char *end;
			long n = strtol(v, &end, 10);
			if (*end || n < 1 || n > 1000000 ||
			    (a[2] == 'i' && n > MAX_INFLIGHT) ||
			    (a[2] == 'd' && n > 17)) {
				fprintf(stderr, WHO ": bad %s '%s'\n", a, v);
				goto usage_fail;
			}
			if (a[2] == 'b')
				L.block = (size_t)n;
			else if (a[2] == 'i')
				L.inflight_max = (size_t)n;
			else
				L.digits = (int)n;
			i++;
		} else if (strcmp(a, "--summary") == 0)
			L.summary = 1;
		else if (strcmp(a, "--progress") == 0)
			force_prog = 1;
		else if (strcmp(a, "--no-progress") == 0)
			force_prog = 0;
		else if (a[0] == '-' && a[1]) {
			fprintf(stderr, WHO ": unknown option %s\n", a);
			goto usage_fail;
		} else if (!L.path)
			L.path = a;
		else {
			fprintf(stderr, WHO ": one input file only\n");
			goto usage_fail;
		}
	}
	if (!L.path)
		goto usage_fail;
	if (pjson) {
		cJSON *p = cJSON_Parse(pjson), *m;
		if (!cJSON_IsObject(p)) {
			fprintf(stderr,
			        WHO ": --params must be a JSON object\n");
			cJSON_Delete(p);
			goto usage_fail;
		}
		while ((m = p->child)) {
			cJSON_DetachItemViaPointer(p, m);
			if (cJSON_GetObjectItemCaseSensitive(params, m->string))
				cJSON_DeleteItemFromObjectCaseSensitive(
				    params, m->string);
			cJSON_AddItemToObject(params, m->string, m);
		}
		cJSON_Delete(p);
	}
	L.in = strcmp(L.path, "-") == 0 ? stdin : fopen(L.path, "rb");
	if (!L.in) {
		fprintf(stderr, WHO ": %s: %s\n", L.path, strerror(errno));
		goto out;
	}
	if (fstat(fileno(L.in), &sb) == 0 && S_ISREG(sb.st_mode))
		L.total_bytes = sb.st_size;
	L.progress = force_prog >= 0 ? force_prog : isatty(2);
	L.r = cli_las_reader_new();
	if (!L.r)
		goto out;
	st = cli_las_read(L.r, L.in);
	if (st != CLI_LAS_HEADER) {
		fprintf(stderr, WHO ": %s: %s\n", L.path,
		        st == CLI_LAS_ERR ? cli_las_error(L.r)
		                          : "no ~A section: not a LAS file");
		goto out;
	}
	L.ncurves = cli_las_ncurves(L.r);
	L.subst = cJSON_GetObjectItemCaseSensitive(params, "fluid_new") != NULL;
	L.gr_levels = cJSON_GetObjectItemCaseSensitive(params, "gr_clean") ||
	              cJSON_GetObjectItemCaseSensitive(params, "gr_shale");
	if (map_curves(&L, maps, nmaps))
		goto out;
	for (size_t i = 0; i < N_INPUTS; i++)
		if (L.col[i] >= 0 &&
		    cJSON_GetObjectItemCaseSensitive(params, inputs[i].name)) {
			fprintf(stderr,
			        WHO ": %s is both a curve (%s) and a --set "
			            "value; drop one (--curve %s=none)\n",
			        inputs[i].name,
			        cli_las_curve(L.r, (size_t)L.col[i])->mnem,
			        inputs[i].name);
			goto usage_fail;
		}
	{
		char *s = cJSON_PrintUnformatted(params);
		size_t n;
		if (!s)
			goto out;
		n = strlen(s);
		/* Strip the braces: the curves are appended after. */
		memmove(s, s + 1, n - 2);
		s[n - 2] = '\0';
		L.base = s;
	}
	for (size_t k = 0; k < L.inflight_max; k++) {
		L.slots[k].rows = malloc(L.block * L.ncurves * sizeof(double));
		if (!L.slots[k].rows) {
			fprintf(stderr, WHO ": out of memory\n");
			goto out;
		}
	}
	if (outpath) {
		int n =
		    snprintf(tmppath, sizeof tmppath, "%s.partXXXXXX", outpath);
		if (n < 0 || (size_t)n >= sizeof tmppath) {
			fprintf(stderr, WHO ": output path too long\n");
			goto out;
		}
		tmpfd = mkstemp(tmppath);
		if (tmpfd < 0 || !(L.out = fdopen(tmpfd, "w"))) {
			fprintf(stderr, WHO ": %s: %s\n", tmppath,
			        strerror(errno));
			if (tmpfd >= 0)
				close(tmpfd);
			tmppath[0] = '\0';
			goto out;
		}
	} else {
		L.out = stdout;
	}
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	clock_gettime(CLOCK_MONOTONIC, &L.t0);
	L.last = L.t0;
	/* The QC legend first, for the ~Other note and the summary. */
	cli__buf_puts(&L.wbuf, "{\"jsonrpc\":\"2.0\",\"id\":0,\"method\":"
	                       "\"service.info\"}\n");
	L.info_pending = 1;
	L.next_id = 1;
	for (;;) {
		/* Fill: read blocks while there is room in flight. */
		while (!eof && L.count < L.inflight_max &&
		       L.wbuf.len - L.wbuf.off < (4u << 20)) {
			slot *s = &L.slots[(L.head + L.count) % L.inflight_max];
			cli_las_set_block(L.r, s->rows, L.block);
			st = cli_las_read(L.r, L.in);
			if (st == CLI_LAS_ERR) {
				fprintf(stderr, WHO ": %s: %s\n", L.path,
				        cli_las_error(L.r));
				goto out;
			}
			s->nrows = cli_las_rows(L.r);
			if (s->nrows == 0) {
				eof = 1;
				break;
			}
			s->id = L.next_id++;
			s->first = L.queued;
			L.queued += s->nrows;
			if (queue_block(&L, s)) {
				fprintf(stderr, WHO ": out of memory\n");
				goto out;
			}
			L.count++;
		}
		if (eof && !L.count && !L.info_pending &&
		    L.wbuf.off == L.wbuf.len)
			break;
		st = cli__pipe_step(&c, &L.wbuf, 1, -1, NULL, -1, on_line, &L);
		if (st < 0)
			goto out;
		if (st == 1 && (L.count || L.info_pending)) {
			fprintf(stderr, WHO ": the daemon closed the "
			                    "connection early\n");
			goto out;
		}
	}
	if (!L.have_cols) {
		/* No data rows: the header alone, with no new curves. */
		char err[256];
		if (L.csv ? cli_las_write_csv_header(L.out, L.r, NULL, 0)
		          : cli_las_write_header(L.out, L.r, NULL, 0, NULL, err,
		                                 sizeof err))
			goto out;
	}
	if (fflush(L.out) || (L.out != stdout && ferror(L.out))) {
		fprintf(stderr, WHO ": cannot write the output: %s\n",
		        strerror(errno));
		goto out;
	}
	if (L.out != stdout) {
		if (fsync(fileno(L.out)) || fclose(L.out)) {
			L.out = NULL;
			fprintf(stderr, WHO ": cannot write the output: %s\n",
			        strerror(errno));
			goto out;
		}
		L.out = NULL;
		if (rename(tmppath, outpath)) {
			fprintf(stderr, WHO ": rename to %s: %s\n", outpath,
			        strerror(errno));
			goto out;
		}
		tmppath[0] = '\0';
	}
	progress(&L, 1);
	if (cli_las_warnings(L.r))
		fprintf(stderr, WHO ": %s: %lu warning(s), first: %s\n", L.path,
		        cli_las_warnings(L.r), cli_las_warning(L.r));
	if (L.summary) {
		fprintf(stderr,
		        "QC summary: %llu samples, %llu clean, %llu "
		        "flagged\n",
		        L.samples, L.samples - L.flagged, L.flagged);
		for (int b = 0; b < 32; b++)
			if (L.flag_count[b])
				fprintf(stderr, "  bit %2d %-28s %llu\n", b,
				        L.flag_name[b] ? L.flag_name[b] : "?",
				        L.flag_count[b]);
	}
	rc = CLI_EXIT_OK;
	goto out;
usage_fail:
	cli_usage_log(stderr);
	rc = CLI_EXIT_USAGE;
out:
	if (rc != CLI_EXIT_OK && L.failed)
		rc = L.failed;
	if (L.progress && rc != CLI_EXIT_OK)
		fputc('\n', stderr);
	if (L.out && L.out != stdout)
		fclose(L.out);
	if (tmppath[0]) {
		unlink(tmppath);
		if (rc != CLI_EXIT_OK)
			fprintf(stderr, WHO ": no output written%s%s\n",
			        outpath ? " to " : "", outpath ? outpath : "");
	} else if (rc != CLI_EXIT_OK && L.out == stdout) {
		fflush(stdout);
		fprintf(stderr, WHO ": the output on stdout is INCOMPLETE\n");
	}
	if (connected)
		cli_disconnect(&c);
	if (L.in && L.in != stdin)
		fclose(L.in);
	cli_las_reader_free(L.r);
	for (size_t k = 0; k < MAX_INFLIGHT; k++)
		free(L.slots[k].rows);
	for (size_t k = 0; k < L.nout; k++)
		free(L.out_key[k]);
	for (int b = 0; b < 32; b++)
		free(L.flag_name[b]);
	free(L.orow);
	cli__buf_free(&L.wbuf);
	cJSON_free(L.base);
	cJSON_Delete(params);
	return rc;
}
