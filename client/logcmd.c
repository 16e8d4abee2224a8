/* `rockwire log FILE`: streams a LAS 2.0 / 3.0 or CSV well log through
 * log.process in blocks, pipelined with a bounded number of blocks in
 * flight, and writes the input with the computed curves added, as LAS
 * (header kept, new curves with units and descriptions, ~Other saying
 * how they were made and the caution) or CSV. Curves map to inputs by
 * mnemonic (overridable); each curve is read in the unit its header line
 * states and converted to the protocol's default with the daemon's own
 * factors (service.info); header parameters (~Parameter BS, BHT) are
 * used where a curve or --set gives none, and the output says so; output
 * units are a separate choice. The output goes to a temporary file that
 * follows the umask and is renamed into place only when complete (and
 * removed on SIGINT or SIGTERM).
 *
 * With pressures (--set pressures.depth_is=tvd ...) the overburden and
 * brine integrals run down the whole log: blocks go one at a time, each
 * request carrying the state token the answer before it returned, so the
 * curves equal those of one request over the whole file (and a feed
 * replay of it). A trend to fit (pressures.trend_fit) is fitted first,
 * over the whole file, with pressure.trend, and given to every block. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <signal.h>
#include <stdarg.h>
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
#include "proto/numfmt.h"
#include "proto/numparse.h"
#include "rpc.h"
#include "units.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

#define WHO          "rockwire log"
#define MAX_INFLIGHT 64
#define MAX_OUT      64
#define MAX_RUNS     200 /* depth intervals kept per QC flag */
#define PATCH_WIDTH  24  /* width of STRT/STOP/STEP values patched later */

/* Plausible bit diameters, 3 to 40 in (common practice: slim-hole bits
 * near 3 in, conductor holes up to 36 in). */
#define BIT_MIN_M 0.0762
#define BIT_MAX_M 1.016

static const char caution[] =
    "Screening estimates only: not a substitute for qualified review, "
    "local regulations and licensed practice; never the sole basis for "
    "well-control decisions.";

/* The inputs of log.process a curve can feed, with default mnemonics. */
typedef struct input_def {
	const char *name, *kind, *what;
	const char *mnems[8];
} input_def;

static const input_def inputs[] = {
    {"depth", "length", "depth", {"DEPT", "DEPTH", "MD"}},
    {"dtp",
     "slowness",
     "compressional slowness",
     {"DT", "DTC", "DTCO", "DT4P", "DTP", "AC"}},
    {"dts", "slowness", "shear slowness", {"DTS", "DTSM", "DTSH", "DT4S"}},
    {"vp", "velocity", "compressional velocity", {"VP"}},
    {"vs", "velocity", "shear velocity", {"VS"}},
    {"rhob", "density", "bulk density", {"RHOB", "RHOZ", "ZDEN", "DEN"}},
    {"drho", "density", "density correction", {"DRHO", "DCOR", "ZCOR", "HDRA"}},
    {"caliper", "length", "caliper", {"CALI", "CAL", "HCAL", "CALS"}},
    {"bit_size", "length", "bit size", {"BS", "BIT"}},
    {"gr", "gamma_ray", "gamma ray", {"GR", "GRC", "SGR"}},
    {"vsh", "fraction", "shale volume", {"VSH", "VCL"}},
    {"porosity", "fraction", "porosity", {"PHIT", "PHIE", "POR"}},
    {"pressure", "pressure", "pore pressure", {NULL}},
    {"temperature", "temperature", "temperature", {NULL}},
    {"tvd", "length", "true vertical depth", {"TVD"}},
};
#define N_INPUTS (sizeof inputs / sizeof inputs[0])

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
    {"sv", "overburden (vertical stress), screening estimate"},
    {"sv_emw", "overburden as equivalent mud weight"},
    {"ph", "hydrostatic pore pressure"},
    {"ph_emw", "hydrostatic as equivalent mud weight"},
    {"dt_normal", "normal compaction trend slowness"},
    {"pp", "pore pressure, screening estimate (shale only)"},
    {"pp_emw", "pore pressure as equivalent mud weight"},
    {"pp_sigma_trend", "pore-pressure std. error from the trend alone"},
    {"shmin", "minimum horizontal stress (fracture closure)"},
    {"shmin_emw", "fracture gradient (closure) as equivalent mud weight"},
    {"shmax", "maximum horizontal stress"},
    {"qc", "QC flag bits (0 clean; legend in ~Other)"},
    {"pressure_detail", "pressure detail bits (legend in ~Other)"},
};

/* Per-curve statistics for the QC summary. */
typedef struct stat1 {
	unsigned long long count, nulls;
	double min, max, sum;
} stat1;

typedef struct run {
	double from, to;
} run;

typedef struct flagstat {
	unsigned long long count, runs;
	run *run; /* up to MAX_RUNS */
	size_t nrun;
	int open;
	double from, last;
} flagstat;

typedef struct slot {
	double *rows;
	size_t nrows;
	unsigned long id;
	unsigned long long first; /* index of its first sample */
	unsigned long long end_bytes;
} slot;

typedef struct logrun {
	cli_las_reader *r;
	FILE *in, *out;
	const char *path, *outpath;
	int csv, digits, summary, progress, allow_unsorted;
	size_t block, inflight_max;
	int col[N_INPUTS]; /* curve index per input, -1 none */
	double scale[N_INPUTS], offset[N_INPUTS];
	cJSON *params; /* sent with every block, besides the curves */
	int pres;      /* pressures asked: blocks carry the state */
	char *ptoken;  /* the state token of the last answer */
	char pnote[2048];
	cJSON *sources; /* where each parameter came from */
	char *base;     /* params JSON without the braces */
	size_t ncurves;
	cli_units units;
	const char *qc[CLI_QC_BITS];
	char notes[4096]; /* mapping notes for ~Other and stderr */
	/* depth selection, in the depth curve's unit */
	int have_top, have_base;
	double top_d, base_d;
	int past_range;
	/* the pipeline */
	slot slots[MAX_INFLIGHT];
	size_t head, count;
	unsigned long next_id;
	cli_buf wbuf;
	cli_numcols cols; /* the numeric arrays of the answer being written */
	double *scratch;  /* arrays cJSON had to read (rarely used) */
	size_t scratch_cap;
	char *rowbuf; /* one output row of text */
	size_t rowcap;
	/* output columns, from the first response */
	int have_cols;
	size_t nout;
	char *out_key[MAX_OUT];
	char out_mnem[MAX_OUT][32];
	char out_unit[MAX_OUT][32];
	double out_scale[MAX_OUT], out_offset[MAX_OUT];
	char note[16384];
	int wrote;
	cli_las_wopts wo;
	int patch; /* STRT/STOP (and STEP for CSV input) written by us */
	char strt_txt[48], stop_txt[48], step_txt[48];
	double first_out, last_out, out_step;
	int out_uniform;
	/* QC counts and statistics */
	stat1 *in_stat, out_stat[MAX_OUT];
	flagstat flag[CLI_QC_BITS];
	uint64_t flag_open; /* bit b: flag[b].open */
	unsigned long long samples, flagged, queued;
	double bs_bad; /* an implausible bit size seen in the curve */
	int failed;
	const cJSON *discover;
	/* progress */
	off_t total_bytes;
	unsigned long long done_bytes;
	struct timespec t0, last;
} logrun;

/* ---- the .part file on SIGINT and SIGTERM ----------------------------- */

static char part_path[4096];
static volatile sig_atomic_t part_armed;

static void on_signal(int sig)
{
	if (part_armed)
		unlink(part_path);
	signal(sig, SIG_DFL);
	raise(sig);
}

static void arm_part(const char *path)
{
	struct sigaction sa;

	snprintf(part_path, sizeof part_path, "%s", path);
	part_armed = 1;
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = on_signal;
	sigemptyset(&sa.sa_mask);
	sigaction(SIGINT, &sa, NULL);
	sigaction(SIGTERM, &sa, NULL);
	sigaction(SIGHUP, &sa, NULL);
}

static void disarm_part(void)
{
	part_armed = 0;
}

/* ---- progress ----------------------------------------------------------- */

static double now_s(const struct timespec *t0)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)(t.tv_sec - t0->tv_sec) +
	       (double)(t.tv_nsec - t0->tv_nsec) * 1e-9;
}

/* The bar shows the share of the input whose answers are written, so its
 * percentage and the sample count describe the same samples. */
static void progress(logrun *L, int final)
{
	double el, frac;
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
	frac = L->total_bytes > 0
	           ? (double)L->done_bytes / (double)L->total_bytes
	           : 0;
	if (frac > 1)
		frac = 1;
	if (final)
		frac = 1;
	int bar = (int)(frac * 30);
	if (L->total_bytes > 0)
		fprintf(stderr, "\r[%.*s%*s] %3.0f%% %llu samples %.0f/s", bar,
		        "##############################", 30 - bar, "",
		        100 * frac, L->samples,
		        el > 0 ? (double)L->samples / el : 0.0);
	else
		fprintf(stderr, "\r%llu samples %.0f/s", L->samples,
		        el > 0 ? (double)L->samples / el : 0.0);
	if (!final && frac > 0.01)
		fprintf(stderr, " %.0fs left  ", el * (1 / frac - 1));
	else
		fprintf(stderr, "           ");
	if (final)
		fputc('\n', stderr);
}

/* ---- notes -------------------------------------------------------------- */

static void notef(logrun *L, const char *fmt, ...)
    __attribute__((format(printf, 2, 3)));

/* A note for stderr and for the output's provenance lines. */
static void notef(logrun *L, const char *fmt, ...)
{
	size_t used = strlen(L->notes);
	va_list ap;

	va_start(ap, fmt);
	fprintf(stderr, WHO ": ");
	vfprintf(stderr, fmt, ap);
	fputc('\n', stderr);
	va_end(ap);
	if (used + 2 >= sizeof L->notes)
		return;
	va_start(ap, fmt);
	vsnprintf(L->notes + used, sizeof L->notes - used, fmt, ap);
	va_end(ap);
	used = strlen(L->notes);
	if (used + 1 < sizeof L->notes) {
		L->notes[used] = '\n';
		L->notes[used + 1] = '\0';
	}
}

/* ---- curves and header parameters --------------------------------------- */

static int find_input(const char *name)
{
	for (size_t i = 0; i < N_INPUTS; i++)
		if (strcmp(inputs[i].name, name) == 0)
			return (int)i;
	return -1;
}

static int default_match(size_t in, const char *mnem)
{
	for (int k = 0; k < 8 && inputs[in].mnems[k]; k++)
		if (strcasecmp(mnem, inputs[in].mnems[k]) == 0)
			return 1;
	return 0;
}

static const char *mnem_of(const logrun *L, size_t in)
{
	return cli_las_curve(L->r, (size_t)L->col[in])->mnem;
}

/* Chooses the curve of every input: --curve overrides, then defaults; a
 * second curve with the same meaning is reported. */
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
			const char *names[N_INPUTS], *s;
			for (size_t i = 0; i < N_INPUTS; i++)
				names[i] = inputs[i].name;
			s = cli__suggest(name, names, N_INPUTS);
			fprintf(stderr,
			        WHO ": --curve: unknown input '%s'%s%s%s; "
			            "inputs: depth dtp dts vp vs rhob "
			            "drho caliper bit_size gr vsh "
			            "porosity pressure temperature tvd\n",
			        name, s ? " (did you mean " : "", s ? s : "",
			        s ? "?)" : "");
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
			const char *names[CLI_LAS_MAX_CURVES], *s;
			for (size_t c = 0; c < L->ncurves; c++)
				names[c] = cli_las_curve(L->r, c)->mnem;
			s = cli__suggest(eq + 1, names, L->ncurves);
			fprintf(
			    stderr,
			    WHO ": --curve %s: %s has no curve '%s'%s%s%s\n",
			    name, L->path, eq + 1, s ? "; did you mean " : "",
			    s ? s : "", s ? "?" : "");
			return -1;
		}
	}
	for (size_t i = 0; i < N_INPUTS; i++) {
		if (expl[i])
			continue;
		/* The first curve in the order of the mnemonic list. */
		for (int k = 0; k < 8 && inputs[i].mnems[k] && L->col[i] < 0;
		     k++)
			for (size_t c = 0; c < L->ncurves; c++)
				if (strcasecmp(cli_las_curve(L->r, c)->mnem,
				               inputs[i].mnems[k]) == 0) {
					L->col[i] = (int)c;
					break;
				}
		if (L->col[i] < 0)
			continue;
		for (size_t c = 0; c < L->ncurves; c++) {
			const cli_las_line *cv = cli_las_curve(L->r, c);
			if ((int)c == L->col[i] ||
			    !default_match(i, cv->mnem) || i == 0)
				continue;
			notef(L,
			      "curves %s (line %lu) and %s (line %lu) both "
			      "give the %s; %s is used (--curve %s=MNEM "
			      "chooses)",
			      mnem_of(L, i),
			      cli_las_curve(L->r, (size_t)L->col[i])->lineno,
			      cv->mnem, cv->lineno, inputs[i].what,
			      mnem_of(L, i), inputs[i].name);
		}
	}
	if (L->col[0] != 0 && !expl[0])
		L->col[0] = 0; /* the index curve is the depth */
	/* Defaults never give both members of a pair: the slowness and the
	 * shale volume win over velocity and gamma ray. */
	static const char *const pairs[][2] = {
	    {"dtp", "vp"}, {"dts", "vs"}, {"vsh", "gr"}};
	for (size_t p = 0; p < 3; p++) {
		int a = find_input(pairs[p][0]), b = find_input(pairs[p][1]);
		int drop = -1;
		if (L->col[a] < 0 || L->col[b] < 0)
			continue;
		if (!expl[b])
			drop = b;
		else if (!expl[a])
			drop = a;
		if (drop < 0)
			continue;
		notef(L,
		      "curves %s (%s) and %s (%s) give the same quantity; %s "
		      "is used",
		      mnem_of(L, (size_t)a), pairs[p][0], mnem_of(L, (size_t)b),
		      pairs[p][1], mnem_of(L, (size_t)(drop == a ? b : a)));
		L->col[drop] = -1;
	}
	/* Gamma ray needs its clean and shale levels; porosity, pressure and
	 * temperature serve fluid substitution only. */
	if (!expl[find_input("gr")] &&
	    !cJSON_GetObjectItemCaseSensitive(L->params, "gr_clean") &&
	    !cJSON_GetObjectItemCaseSensitive(L->params, "gr_shale"))
		L->col[find_input("gr")] = -1;
	if (!cJSON_GetObjectItemCaseSensitive(L->params, "fluid_new"))
		for (size_t i = 0; i < N_INPUTS; i++)
			if (!expl[i] &&
			    (strcmp(inputs[i].name, "porosity") == 0 ||
			     strcmp(inputs[i].name, "pressure") == 0 ||
			     strcmp(inputs[i].name, "temperature") == 0))
				L->col[i] = -1;
	/* A TVD curve serves the pressures when the depth is measured
	 * depth (pressures.depth_is md). */
	{
		const cJSON *di = cJSON_GetObjectItemCaseSensitive(
		    cJSON_GetObjectItemCaseSensitive(L->params, "pressures"),
		    "depth_is");
		int tv = find_input("tvd");
		if (!expl[tv] &&
		    !(cJSON_IsString(di) && strcmp(di->valuestring, "md") == 0))
			L->col[tv] = -1;
	}
	for (size_t i = 0; i < N_INPUTS; i++)
		if (L->col[i] >= 0 && cJSON_GetObjectItemCaseSensitive(
		                          L->params, inputs[i].name)) {
			fprintf(stderr,
			        WHO ": %s is both a curve (%s) and a --set "
			            "value; drop one (--curve %s=none)\n",
			        inputs[i].name, mnem_of(L, i), inputs[i].name);
			return -1;
		}
	return 0;
}

/* The factors that bring every mapped curve to its input's default
 * unit; an unknown unit is an error naming the curve. */
static int curve_units(logrun *L)
{
	for (size_t i = 0; i < N_INPUTS; i++) {
		const cli_las_line *cv;
		char list[512];
		if (L->col[i] < 0)
			continue;
		cv = cli_las_curve(L->r, (size_t)L->col[i]);
		if (cli__unit_factor(&L->units, cv->unit, inputs[i].kind, NULL,
		                     &L->scale[i], &L->offset[i]) == 0)
			continue;
		cli__unit_list(&L->units, inputs[i].kind, list, sizeof list);
		fprintf(stderr,
		        WHO ": curve %s (line %lu) feeds %s, but its unit "
		            "'%s' is not a %s unit the daemon or this client "
		            "knows; accepted: %s\n",
		        cv->mnem, cv->lineno, inputs[i].name, cv->unit,
		        inputs[i].kind, list);
		return -1;
	}
	return 0;
}

/* A header parameter as an input constant: value converted to the
 * input's default unit. 1 used, 0 not there, -1 unusable (said why). */
static int header_param(logrun *L, const char *input, const char *const *mn,
                        const char *why)
{
	int in = find_input(input);
	const cli_las_line *l = NULL;
	char set[160], num[48], src[320];
	double v, scale, offset;
	char *end;

	for (size_t k = 0; mn[k] && !l; k++)
		l = cli_las_find(L->r, 'P', mn[k]);
	if (!l)
		return 0;
	v = strtod(l->value, &end);
	if (end == l->value || *end || !isfinite(v) ||
	    v == cli_las_null(L->r)) {
		notef(L,
		      "header parameter %s (line %lu) = '%s' is not a number; "
		      "not used",
		      l->mnem, l->lineno, l->value);
		return -1;
	}
	if (!*l->unit) {
		notef(L,
		      "header parameter %s (line %lu) has no unit; not used "
		      "(give --set %s=VALUE with a unit)",
		      l->mnem, l->lineno, input);
		return -1;
	}
	if (cli__unit_factor(&L->units, l->unit, inputs[in].kind, NULL, &scale,
	                     &offset)) {
		notef(L,
		      "header parameter %s (line %lu): unit '%s' is not a %s "
		      "unit; "
		      "not used",
		      l->mnem, l->lineno, l->unit, inputs[in].kind);
		return -1;
	}
	v = v * scale + offset;
	snprintf(set, sizeof set, "%s=%.17g", input, v);
	if (cli__param_set(L->params, set, WHO))
		return -1;
	cli__fmt_num(num, v, 10, NULL);
	snprintf(src, sizeof src, "~Parameter %s = %s %s (line %lu)%s%s",
	         l->mnem, l->value, l->unit, l->lineno, why ? "; " : "",
	         why ? why : "");
	cJSON_AddStringToObject(L->sources, input, src);
	fprintf(stderr,
	        WHO ": from the header: %s = %s %s (~Parameter %s %s %s, line "
	            "%lu)\n",
	        input, num, cli__units_kind(&L->units, inputs[in].kind)->dflt,
	        l->mnem, l->value, l->unit, l->lineno);
	return 1;
}

static int has(const cJSON *params, const char *name)
{
	return cJSON_GetObjectItemCaseSensitive(params, name) != NULL;
}

/* Header parameters, the washout check and the bit size. */
static int use_header(logrun *L)
{
	static const char *const bs[] = {"BS", "BIT", "BITSIZE", NULL};
	static const char *const bht[] = {"BHT", "BHTEMP", "TBH", NULL};
	int cal = find_input("caliper"), bit = find_input("bit_size");
	int have_bit = L->col[bit] >= 0 || has(L->params, "bit_size");

	/* Bit size from ~Parameter BS when the washout check needs one. */
	if (L->col[cal] >= 0 && !have_bit)
		have_bit = header_param(L, "bit_size", bs, NULL) > 0;
	if (L->col[cal] >= 0 && !have_bit) {
		notef(L,
		      "washout check skipped: caliper %s but no bit size "
		      "(a BS curve, a ~Parameter BS or --set "
		      "bit_size=8.5in)",
		      mnem_of(L, (size_t)cal));
		L->col[cal] = -1;
	} else if (L->col[cal] < 0 && have_bit) {
		notef(L, "washout check skipped: a bit size but no caliper "
		         "curve");
		L->col[bit] = -1;
		cJSON_DeleteItemFromObjectCaseSensitive(L->params, "bit_size");
		cJSON_DeleteItemFromObjectCaseSensitive(L->sources, "bit_size");
	}
	{
		const cJSON *b =
		    cJSON_GetObjectItemCaseSensitive(L->params, "bit_size");
		if (cJSON_IsNumber(b) &&
		    (b->valuedouble < BIT_MIN_M || b->valuedouble > BIT_MAX_M))
			notef(
			    L,
			    "bit_size %.6g m is implausible for a bit (3 to "
			    "40 in, 0.076 to 1.02 m, common practice); a bare "
			    "number is in m: did you mean %.6gin?",
			    b->valuedouble, b->valuedouble);
	}
	/* The temperature of the fluid model, from ~Parameter BHT, when
	 * fluid substitution needs one and nothing else gives it. */
	if (has(L->params, "fluid_new") &&
	    L->col[find_input("temperature")] < 0 &&
	    !has(L->params, "temperature") &&
	    !has(L->params, "temperature_gradient"))
		header_param(L, "temperature", bht,
		             "the bottom-hole temperature, used at every "
		             "depth: samples above the bottom are cooler than "
		             "that");
	return 0;
}

/* ---- requests ------------------------------------------------------------ */

/* The parameters as text without their braces (the curves follow). */
static int set_base(logrun *L)
{
	char *s = cJSON_PrintUnformatted(L->params);
	size_t n;

	if (!s)
		return -1;
	n = strlen(s);
	memmove(s, s + 1, n - 2);
	s[n - 2] = '\0';
	cJSON_free(L->base);
	L->base = s;
	return 0;
}

/* Pressures: the next block carries the state of this answer (and the
 * restart values, for the first block only, are dropped). 0 or -1. */
static int take_state(logrun *L, const cJSON *res)
{
	const cJSON *tok = cJSON_GetObjectItemCaseSensitive(
	    cJSON_GetObjectItemCaseSensitive(res, "pressure_state"), "token");
	cJSON *pr = cJSON_GetObjectItemCaseSensitive(L->params, "pressures");

	if (!cJSON_IsString(tok) || !cJSON_IsObject(pr))
		return 0;
	free(L->ptoken);
	L->ptoken = strdup(tok->valuestring);
	if (!L->ptoken)
		return -1;
	cJSON_DeleteItemFromObjectCaseSensitive(pr, "resume");
	cJSON_DeleteItemFromObjectCaseSensitive(pr, "state");
	if (!cJSON_AddStringToObject(pr, "state", L->ptoken))
		return -1;
	return set_base(L);
}

/* Appends one block request to the write buffer. */
static int queue_block(logrun *L, slot *s)
{
	char head[96];
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
		/* The numbers go straight into the buffer, shortest
		 * round-trip text: the daemon reads back exactly the
		 * doubles converted here. */
		const double *col = s->rows + (size_t)L->col[i];
		const double sc = L->scale[i], off = L->offset[i];
		char *w = cli__buf_reserve(&L->wbuf,
		                           s->nrows * (PROTO_NUM_FMT_MAX + 1));
		if (!w)
			return -1;
		for (size_t j = 0; j < s->nrows; j++) {
			double v = col[j * L->ncurves];
			if (j)
				*w++ = ',';
			if (isnan(v)) {
				memcpy(w, "null", 4);
				w += 4;
				continue;
			}
			w += proto_num_fmt(w, v * sc + off);
		}
		*w = '\0';
		L->wbuf.len = (size_t)(w - L->wbuf.data);
		if (cli__buf_put(&L->wbuf, "]", 1))
			return -1;
	}
	return cli__buf_puts(&L->wbuf, "}}\n");
}

/* Keeps only the rows of a block within --top/--base. */
static size_t select_rows(logrun *L, double *rows, size_t n)
{
	size_t k = 0;
	double lo = L->have_top ? L->top_d : -INFINITY;
	double hi = L->have_base ? L->base_d : INFINITY;

	if (!L->have_top && !L->have_base)
		return n;
	for (size_t j = 0; j < n; j++) {
		double d = rows[j * L->ncurves];
		if (d < lo || d > hi) {
			/* past the far end of an ordered file: stop reading */
			if (!L->allow_unsorted &&
			    ((cli_las_data_step(L->r) > 0 && d > hi) ||
			     (cli_las_data_step(L->r) < 0 && d < lo)))
				L->past_range = 1;
			continue;
		}
		if (k != j)
			memmove(rows + k * L->ncurves, rows + j * L->ncurves,
			        L->ncurves * sizeof *rows);
		k++;
	}
	return k;
}

static const char *describe(const char *key)
{
	for (size_t i = 0; i < sizeof col_desc / sizeof col_desc[0]; i++)
		if (strcmp(col_desc[i].key, key) == 0)
			return col_desc[i].desc;
	return "computed by log.process";
}

/* ---- the provenance note --------------------------------------------------
 */

/* Appends text to L->note wrapped at 76 columns, each line led by lead. */
static void note_wrap(logrun *L, const char *lead, const char *text)
{
	size_t used = strlen(L->note), col = 0;
	const char *p = text;

	while (*p && used + 80 < sizeof L->note) {
		size_t w = strcspn(p, " \n");
		if (col == 0) {
			/* a LAS line that starts with '~' would be a section */
			used += (size_t)snprintf(L->note + used,
			                         sizeof L->note - used, "%s%s",
			                         lead, *p == '~' ? "- " : "");
			col = strlen(lead);
		} else if (col + 1 + w > 76 && *p != '~') {
			used += (size_t)snprintf(L->note + used,
			                         sizeof L->note - used, "\n%s",
			                         lead);
			col = strlen(lead);
		} else {
			L->note[used++] = ' ';
			col++;
		}
		if (w > sizeof L->note - used - 2)
			w = sizeof L->note - used - 2;
		memcpy(L->note + used, p, w);
		used += w;
		col += w;
		L->note[used] = '\0';
		p += w;
		while (*p == ' ')
			p++;
		if (*p == '\n') {
			p++;
			used += (size_t)snprintf(L->note + used,
			                         sizeof L->note - used, "\n");
			col = 0;
		}
	}
	if (col && used + 2 < sizeof L->note) {
		L->note[used++] = '\n';
		L->note[used] = '\0';
	}
}

/* Builds the note: the caution, what was added and from what: every
 * curve mapped, every input that is not a curve with its value and
 * where it came from, output units, the relations, the QC legend. */
static void build_note(logrun *L, const cJSON *res)
{
	const char *lead = L->csv ? "# " : " ";
	char buf[4096];
	size_t used = 0;
	const cJSON *e;
	const cJSON *vsp =
	    cJSON_GetObjectItemCaseSensitive(res, "vs_predicted_by");
	const cJSON *rhp =
	    cJSON_GetObjectItemCaseSensitive(res, "rho_predicted_by");
	const cJSON *sub =
	    cJSON_GetObjectItemCaseSensitive(res, "substitution");

	L->note[0] = '\0';
	note_wrap(L, lead, caution);
	snprintf(buf, sizeof buf,
	         "Curves %s to %s added by rockwire " RW_VERSION
	         " (log.process) from %s.",
	         L->out_mnem[0], L->out_mnem[L->nout - 1], L->path);
	note_wrap(L, lead, buf);
	used = (size_t)snprintf(buf, sizeof buf, "Inputs from curves:");
	for (size_t i = 0; i < N_INPUTS && used < sizeof buf; i++)
		if (L->col[i] >= 0)
			used += (size_t)snprintf(
			    buf + used, sizeof buf - used, "%s %s=%s (%s)",
			    used > strlen("Inputs from curves:") ? ";" : "",
			    inputs[i].name, mnem_of(L, i),
			    *cli_las_curve(L->r, (size_t)L->col[i])->unit
			        ? cli_las_curve(L->r, (size_t)L->col[i])->unit
			        : "no unit");
	note_wrap(L, lead, buf);
	used = (size_t)snprintf(buf, sizeof buf,
	                        "Inputs not from curves (one value for every "
	                        "sample):%s",
	                        L->params->child ? "" : " none.");
	note_wrap(L, lead, buf);
	cJSON_ArrayForEach(e, L->params)
	{
		char *v = cJSON_PrintUnformatted(e);
		const cJSON *src =
		    cJSON_GetObjectItemCaseSensitive(L->sources, e->string);
		const char *kind = cli__param_kind(L->discover, e->string);
		cli_kind *k = kind ? cli__units_kind(&L->units, kind) : NULL;
		snprintf(buf, sizeof buf, "  %s = %s%s%s (%s)", e->string,
		         v ? v : "?",
		         cJSON_IsNumber(e) && k && *k->dflt ? " " : "",
		         cJSON_IsNumber(e) && k ? k->dflt : "",
		         cJSON_IsString(src) ? src->valuestring : "default");
		cJSON_free(v);
		note_wrap(L, lead, buf);
	}
	used = (size_t)snprintf(buf, sizeof buf, "Output units:");
	for (size_t i = 0; i < L->units.nkind; i++)
		if (L->units.kind[i].out[0])
			used += (size_t)snprintf(
			    buf + used, sizeof buf - used, " %s in %s;",
			    L->units.kind[i].name, L->units.kind[i].out);
	if (used == strlen("Output units:"))
		snprintf(buf + used, sizeof buf - used,
		         " the protocol's defaults (each curve says its unit); "
		         "input curves are read in the units they state.");
	note_wrap(L, lead, buf);
	if (L->have_top || L->have_base) {
		snprintf(
		    buf, sizeof buf,
		    "Depth range selected: %s%.10g to %s%.10g %s.",
		    L->have_top ? "" : "(start) ", L->have_top ? L->top_d : 0,
		    L->have_base ? "" : "(end) ", L->have_base ? L->base_d : 0,
		    cli_las_curve(L->r, 0)->unit);
		note_wrap(L, lead, buf);
	}
	if (L->notes[0])
		note_wrap(L, lead, L->notes);
	snprintf(
	    buf, sizeof buf,
	    "Elastic set from the isotropic relations; vs %s%s; density "
	    "%s%s; %s. Predicted values are marked in QC, never passed "
	    "off as measured.",
	    cJSON_IsString(vsp) ? "predicted where missing by " : "as measured",
	    cJSON_IsString(vsp) ? vsp->valuestring : "",
	    cJSON_IsString(rhp) ? "predicted where missing by " : "as measured",
	    cJSON_IsString(rhp) ? rhp->valuestring : "",
	    cJSON_IsString(sub) ? "Gassmann 1951 fluid substitution in "
	                          "the _SUB curves"
	                        : "no fluid substitution");
	note_wrap(L, lead, buf);
	if (L->pres) {
		const cJSON *pc =
		    cJSON_GetObjectItemCaseSensitive(res, "pressure_caution");
		const cJSON *tr =
		    cJSON_GetObjectItemCaseSensitive(res, "pressure_trend");
		const cJSON *pr =
		    cJSON_GetObjectItemCaseSensitive(L->params, "pressures");
		const cJSON *m = cli__method_doc(L->discover, "log.process");
		const cJSON *dd = cJSON_GetObjectItemCaseSensitive(
		    cJSON_GetObjectItemCaseSensitive(
		        cJSON_GetObjectItemCaseSensitive(
		            cJSON_GetObjectItemCaseSensitive(
		                cJSON_GetObjectItemCaseSensitive(m, "result"),
		                "schema"),
		            "properties"),
		        "pressure_detail"),
		    "description");
		char *t =
		    cJSON_IsObject(tr) ? cJSON_PrintUnformatted(tr) : NULL;
		const cJSON *pore =
		    cJSON_GetObjectItemCaseSensitive(pr, "pore");
		const cJSON *frac =
		    cJSON_GetObjectItemCaseSensitive(pr, "fracture");
		note_wrap(L, lead,
		          cJSON_IsString(pc) ? pc->valuestring
		                             : "Pressures: screening estimates "
		                               "only.");
		snprintf(
		    buf, sizeof buf,
		    "Pressures (pressure.md): overburden SV from the density "
		    "over TVD with the column above the log; hydrostatic PH; "
		    "pore pressure PP by %s; fracture closure SHMIN by %s; "
		    "_EMW curves are p / (g TVD), referred to the depth "
		    "datum. Samples outside shale, extrapolated trends and "
		    "contradictions are flagged in QC and PRESSURE_DETAIL, "
		    "never clipped. None of them sees unloading, lateral "
		    "transfer, centroid or hydrocarbon-column effects, or "
		    "tectonic stress unless strains are given.",
		    cJSON_IsString(pore) ? pore->valuestring : "eaton",
		    cJSON_IsString(frac) ? frac->valuestring : "eaton");
		note_wrap(L, lead, buf);
		if (L->pnote[0])
			note_wrap(L, lead, L->pnote);
		else if (t) {
			snprintf(
			    buf, sizeof buf,
			    "Compaction trend as given: %s (slowness us/ft, c "
			    "1/m, depths m).",
			    t);
			note_wrap(L, lead, buf);
		}
		cJSON_free(t);
		if (cJSON_IsString(dd))
			note_wrap(L, lead, dd->valuestring);
	}
	used = (size_t)snprintf(buf, sizeof buf, "QC bits:");
	for (int b = 0; b < CLI_QC_BITS && used < sizeof buf; b++)
		if (L->qc[b])
			used += (size_t)snprintf(buf + used, sizeof buf - used,
			                         " %d=%s", b, L->qc[b]);
	note_wrap(L, lead, buf);
}

/* ---- output ------------------------------------------------------------- */

/* LAS spelling of a protocol unit: upper case, g/cm3 as G/C3. */
static void las_unit(const char *u, char *out, size_t size)
{
	size_t j = 0;

	for (size_t i = 0; u[i] && j + 1 < size; i++) {
		if (strncmp(u + i, "g/cm3", 5) == 0 && j + 5 < size) {
			memcpy(out + j, "G/C3", 4);
			j += 4;
			i += 4;
			continue;
		}
		out[j++] = (char)toupper((unsigned char)u[i]);
	}
	out[j] = '\0';
}

/* Sets up the output columns and writes the header from the first
 * response's result. */
static int start_output(logrun *L, const cJSON *res)
{
	const cJSON *units = cJSON_GetObjectItemCaseSensitive(res, "units");
	const cJSON *m;
	cli_las_newcurve add[MAX_OUT];
	char err[256];

	cJSON_ArrayForEach(m, res)
	{
		const cJSON *u;
		const char *ou = "";
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
			    (char)(L->csv
			               ? m->string[j]
			               : toupper((unsigned char)m->string[j]));
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
		L->out_scale[k] = 1;
		L->out_offset[k] = 0;
		if (cJSON_IsString(u))
			ou = cli__units_output(&L->units, u->valuestring,
			                       &L->out_scale[k],
			                       &L->out_offset[k]);
		if (L->csv)
			snprintf(L->out_unit[k], sizeof L->out_unit[k], "%s",
			         ou);
		else
			las_unit(ou, L->out_unit[k], sizeof L->out_unit[k]);
		add[k].mnem = L->out_mnem[k];
		add[k].unit = L->out_unit[k];
		add[k].desc = describe(m->string);
	}
	L->out_stat[0].min = 0; /* keeps the compiler quiet */
	for (size_t k = 0; k < L->nout; k++) {
		L->out_stat[k].min = INFINITY;
		L->out_stat[k].max = -INFINITY;
	}
	L->have_cols = 1;
	build_note(L, res);
	L->wrote = 1;
	if (L->csv)
		return fputs(L->note, L->out) == EOF ||
		               cli_las_write_csv_header(L->out, L->r, add,
		                                        L->nout)
		           ? -1
		           : 0;
	if (cli_las_write_header_opts(L->out, L->r, add, L->nout, L->note,
	                              L->patch ? &L->wo : NULL, err,
	                              sizeof err)) {
		fprintf(stderr, WHO ": %s\n", err);
		return -1;
	}
	return 0;
}

static void stat_add(stat1 *s, double v)
{
	if (isnan(v)) {
		s->nulls++;
		return;
	}
	s->count++;
	s->sum += v;
	if (v < s->min)
		s->min = v;
	if (v > s->max)
		s->max = v;
}

/* Depth intervals of each QC flag, for the summary file. */
static void flags_add(logrun *L, uint64_t f, double depth)
{
	/* only the flags set now or in a run still open change */
	uint64_t todo = f | L->flag_open;

	for (int b = 0; todo && b < CLI_QC_BITS; b++) {
		flagstat *fs = &L->flag[b];
		int on = (f >> b) & 1u;
		if (!((todo >> b) & 1u))
			continue;
		todo &= ~((uint64_t)1 << b);
		if (on)
			L->flag_open |= (uint64_t)1 << b;
		else
			L->flag_open &= ~((uint64_t)1 << b);
		if (on) {
			fs->count++;
			if (!fs->open) {
				fs->open = 1;
				fs->from = depth;
			}
			fs->last = depth;
		} else if (fs->open) {
			fs->open = 0;
			fs->runs++;
			if (fs->nrun < MAX_RUNS) {
				if (!fs->run)
					fs->run =
					    malloc(MAX_RUNS * sizeof *fs->run);
				if (fs->run)
					fs->run[fs->nrun++] =
					    (run){fs->from, fs->last};
			}
		}
	}
}

/* Appends one value's text at w (cli__fmt_num: `digits` significant
 * digits, 0 for the shortest round-trip, NaN and infinities as the null
 * text). Returns the end. */
static char *put_value(char *w, double v, int digits, const char *nulltxt)
{
	return w + cli__fmt_num(w, v, digits, nulltxt);
}

static int write_rows(logrun *L, const slot *s, const cJSON *res)
{
	const double *val[MAX_OUT];
	double null_v = cli_las_null(L->r);
	char nulltxt[48];
	size_t nc = L->ncurves, width;
	char sep = L->csv ? ',' : cli_las_delimiter(L->r);
	int bit = find_input("bit_size");
	size_t qc_k = L->nout;

	if (cli_las_is_csv(L->r) && !L->csv)
		null_v = -999.25;
	cli__fmt_num(nulltxt, null_v, 0, NULL);
	if (L->csv)
		nulltxt[0] = '\0';
	/* the values of each computed curve: read straight from the answer
	 * (cli__rpc_parse_cols), or from its cJSON array when it was not a
	 * plain numeric array */
	for (size_t k = 0; k < L->nout; k++) {
		size_t n;
		const cJSON *colv;
		val[k] = cli__numcols_get(&L->cols, L->out_key[k], &n);
		if (strcmp(L->out_key[k], "qc") == 0)
			qc_k = k;
		if (val[k] && n == s->nrows)
			continue;
		colv = val[k] ? NULL
		              : cJSON_GetObjectItemCaseSensitive(res,
		                                                 L->out_key[k]);
		if (!cJSON_IsArray(colv) ||
		    (size_t)cJSON_GetArraySize(colv) != s->nrows) {
			fprintf(stderr,
			        WHO ": response for samples from "
			            "%llu lacks %s\n",
			        s->first, L->out_key[k]);
			return -1;
		}
		if (L->scratch_cap < (k + 1) * s->nrows) {
			double *t =
			    realloc(L->scratch, MAX_OUT * s->nrows * sizeof *t);
			if (!t)
				return -1;
			L->scratch = t;
			L->scratch_cap = MAX_OUT * s->nrows;
		}
		double *d = L->scratch + k * s->nrows;
		const cJSON *e = colv->child;
		for (size_t j = 0; j < s->nrows; j++, e = e->next)
			d[j] = cJSON_IsNumber(e) ? e->valuedouble : NAN;
		val[k] = d;
	}
	/* one row of text at a time, one fwrite per row */
	width = (nc + L->nout) * (PROTO_NUM_FMT_MAX + 1); /* >= 40 each */
	if (L->rowcap < width + 2) {
		char *t = realloc(L->rowbuf, width + 2);
		if (!t)
			return -1;
		L->rowbuf = t;
		L->rowcap = width + 2;
	}
	for (size_t j = 0; j < s->nrows; j++) {
		const double *row = s->rows + j * nc;
		uint64_t flags = 0;
		char *w = L->rowbuf;
		if (L->col[bit] >= 0) {
			double b =
			    row[L->col[bit]] * L->scale[bit] + L->offset[bit];
			if (!isnan(b) && (b < BIT_MIN_M || b > BIT_MAX_M) &&
			    isnan(L->bs_bad))
				L->bs_bad = row[0];
		}
		for (size_t c = 0; c < nc; c++) {
			stat_add(&L->in_stat[c], row[c]);
			if (c)
				*w++ = sep;
			w = put_value(w, row[c], 0, nulltxt);
		}
		for (size_t k = 0; k < L->nout; k++) {
			double v = val[k][j];
			int digits = 0;
			if (k == qc_k && !isnan(v)) {
				/* 64-bit sets, bits 0-52: exact in a double,
				 * never past 2^53 */
				flags = v >= 0 && v < 9007199254740992.0
				            ? (uint64_t)v
				            : 0;
				L->flagged += flags != 0;
			} else if (!isnan(v)) {
				v = (v - L->out_offset[k]) / L->out_scale[k];
				digits = L->digits;
			}
			stat_add(&L->out_stat[k], v);
			if (nc + k)
				*w++ = sep;
			w = put_value(w, v, digits, nulltxt);
		}
		*w++ = '\n';
		if (fwrite(L->rowbuf, 1, (size_t)(w - L->rowbuf), L->out) !=
		    (size_t)(w - L->rowbuf))
			return -1;
		flags_add(L, flags, row[0]);
		if (L->samples + j == 0) {
			L->first_out = row[0];
		} else {
			double d = row[0] - L->last_out;
			if (L->samples + j == 1)
				L->out_step = d;
			else if (fabs(d - L->out_step) >
			         1e-6 * fabs(L->out_step) +
			             1e-9 * (1 + fabs(row[0])))
				L->out_uniform = 0;
		}
		L->last_out = row[0];
	}
	L->samples += s->nrows;
	return 0;
}

static int on_line(void *ctx, char *line, size_t len)
{
	logrun *L = ctx;
	cJSON *want, *r;
	const cJSON *res, *err;
	char why[160];
	int rc = -1;

	if (!L->count) {
		fprintf(stderr, WHO ": an answer no request asked for\n");
		return -1;
	}
	slot *s = &L->slots[L->head];
	want = cJSON_CreateNumber((double)s->id);
	r = want ? cli__rpc_parse_cols(line, len, want, &L->cols, why,
	                               sizeof why)
	         : NULL;
	cJSON_Delete(want);
	if (!r) {
		fprintf(stderr, WHO ": invalid answer from the daemon (%s)\n",
		        why);
		return -1;
	}
	res = cJSON_GetObjectItemCaseSensitive(r, "result");
	err = cJSON_GetObjectItemCaseSensitive(r, "error");
	if (err) {
		char who[96];
		snprintf(who, sizeof who,
		         WHO ": the daemon refused the block from sample %llu",
		         s->first);
		cli__print_error(stderr, who, err);
		cli__explain_error(stderr, WHO, L->discover, "log.process",
		                   L->params, err);
		L->failed = CLI_EXIT_RPC_ERROR;
		goto out;
	}
	if (!L->have_cols && start_output(L, res))
		goto out;
	if (L->pres && take_state(L, res)) {
		fprintf(stderr, WHO ": out of memory\n");
		goto out;
	}
	if (write_rows(L, s, res)) {
		if (!L->failed)
			fprintf(stderr, WHO ": cannot write the output: %s\n",
			        strerror(errno));
		goto out;
	}
	L->done_bytes = s->end_bytes;
	L->head = (L->head + 1) % L->inflight_max;
	L->count--;
	rc = 0;
	progress(L, 0);
out:
	cJSON_Delete(r);
	return rc;
}

/* ---- QC summary ---------------------------------------------------------- */

static void put_num(FILE *f, double v)
{
	char num[48];
	cli__fmt_num(num, v, 10, "null");
	fputs(num, f);
}

static int write_summary(logrun *L, FILE *f, int json)
{
	const char *du = cli_las_curve(L->r, 0)->unit;

	if (json) {
		fprintf(f, "{\"caution\":\"%s\",\"input\":", caution);
		{
			cJSON *s = cJSON_CreateString(L->path);
			char *t = s ? cJSON_PrintUnformatted(s) : NULL;
			fputs(t ? t : "null", f);
			cJSON_free(t);
			cJSON_Delete(s);
		}
		fprintf(f, ",\"samples\":%llu,\"flagged\":%llu,\"curves\":[",
		        L->samples, L->flagged);
	} else {
		fprintf(f,
		        "# rockwire log QC summary of %s\n# %s\n"
		        "samples %llu, clean %llu, flagged %llu\n\n"
		        "%-16s %-10s %10s %8s %14s %14s %14s\n",
		        L->path, caution, L->samples, L->samples - L->flagged,
		        L->flagged, "curve", "unit", "count", "nulls", "min",
		        "max", "mean");
	}
	for (size_t c = 0; c < L->ncurves + L->nout; c++) {
		const stat1 *s = c < L->ncurves ? &L->in_stat[c]
		                                : &L->out_stat[c - L->ncurves];
		const char *name = c < L->ncurves ? cli_las_curve(L->r, c)->mnem
		                                  : L->out_mnem[c - L->ncurves];
		const char *unit = c < L->ncurves ? cli_las_curve(L->r, c)->unit
		                                  : L->out_unit[c - L->ncurves];
		double mn = s->count ? s->min : NAN,
		       mx = s->count ? s->max : NAN;
		double mean = s->count ? s->sum / (double)s->count : NAN;
		if (json) {
			fprintf(f,
			        "%s{\"curve\":\"%s\",\"unit\":\"%s\","
			        "\"count\":%llu,\"nulls\":%llu,\"min\":",
			        c ? "," : "", name, unit, s->count, s->nulls);
			put_num(f, mn);
			fputs(",\"max\":", f);
			put_num(f, mx);
			fputs(",\"mean\":", f);
			put_num(f, mean);
			fputc('}', f);
		} else {
			char a[48], b[48], m[48];
			cli__fmt_num(a, mn, 8, "-");
			cli__fmt_num(b, mx, 8, "-");
			cli__fmt_num(m, mean, 8, "-");
			fprintf(f, "%-16s %-10s %10llu %8llu %14s %14s %14s\n",
			        name, *unit ? unit : "-", s->count, s->nulls, a,
			        b, m);
		}
	}
	if (json)
		fputs("],\"flags\":[", f);
	else
		fprintf(f, "\n%-4s %-26s %10s  depth intervals (%s)\n", "bit",
		        "flag", "samples", du);
	for (int b = 0, first = 1; b < CLI_QC_BITS; b++) {
		flagstat *fs = &L->flag[b];
		if (!fs->count)
			continue;
		if (json) {
			fprintf(f,
			        "%s{\"bit\":%d,\"name\":\"%s\",\"count\":%llu,"
			        "\"intervals\":[",
			        first ? "" : ",", b, L->qc[b] ? L->qc[b] : "?",
			        fs->count);
			for (size_t i = 0; i < fs->nrun; i++) {
				fputs(i ? ",[" : "[", f);
				put_num(f, fs->run[i].from);
				fputc(',', f);
				put_num(f, fs->run[i].to);
				fputc(']', f);
			}
			fprintf(f, "],\"intervals_total\":%llu}", fs->runs);
		} else {
			fprintf(f, "%-4d %-26s %10llu ", b,
			        L->qc[b] ? L->qc[b] : "?", fs->count);
			for (size_t i = 0; i < fs->nrun; i++) {
				char a[48], c2[48];
				cli__fmt_num(a, fs->run[i].from, 10, NULL);
				cli__fmt_num(c2, fs->run[i].to, 10, NULL);
				fprintf(f, " %s-%s", a, c2);
			}
			if (fs->runs > fs->nrun)
				fprintf(f, " and %llu more",
				        fs->runs - fs->nrun);
			fputc('\n', f);
		}
		first = 0;
	}
	if (json)
		fputs("]}\n", f);
	return ferror(f) ? -1 : 0;
}

/* Closes the open flag intervals at the end of the data. */
static void flags_close(logrun *L)
{
	flags_add(L, 0, NAN);
}

/* ---- files ----------------------------------------------------------------
 */

static mode_t file_mode(void)
{
	mode_t m = umask(0);
	umask(m);
	return 0666 & ~m;
}

/* Opens PATH.partXXXXXX with the umask's permissions. */
static FILE *open_part(const char *path, char *tmp, size_t size)
{
	int n = snprintf(tmp, size, "%s.partXXXXXX", path), fd;
	FILE *f;

	if (n < 0 || (size_t)n >= size) {
		fprintf(stderr, WHO ": output path too long\n");
		tmp[0] = '\0';
		return NULL;
	}
	fd = mkstemp(tmp);
	if (fd < 0 || fchmod(fd, file_mode()) || !(f = fdopen(fd, "w+"))) {
		fprintf(stderr, WHO ": %s: %s\n", tmp, strerror(errno));
		if (fd >= 0) {
			close(fd);
			unlink(tmp);
		}
		tmp[0] = '\0';
		return NULL;
	}
	return f;
}

static int write_qc_file(logrun *L, const char *path)
{
	char tmp[4096];
	size_t n = strlen(path);
	int json = n > 5 && strcasecmp(path + n - 5, ".json") == 0;
	FILE *f = open_part(path, tmp, sizeof tmp);

	if (!f)
		return -1;
	if (write_summary(L, f, json) || fflush(f) || fsync(fileno(f))) {
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		fclose(f);
		unlink(tmp);
		return -1;
	}
	fclose(f);
	if (rename(tmp, path)) {
		fprintf(stderr, WHO ": rename to %s: %s\n", path,
		        strerror(errno));
		unlink(tmp);
		return -1;
	}
	return 0;
}

/* Writes the real last depth (and, for CSV input, the step) into the
 * fixed-width STOP/STEP values of a LAS file written with --top/--base or
 * from CSV. 0, or -1 when the output cannot be patched (a pipe). */
static int patch_header(logrun *L, FILE *f)
{
	char buf[64];

	if (L->wo.stop_at < 0 || (L->wo.step && L->wo.step_at < 0))
		return -1;
	cli__fmt_num(buf, L->last_out, 0, NULL);
	if (fseek(f, L->wo.stop_at, SEEK_SET) ||
	    fprintf(f, "%-*s", PATCH_WIDTH, buf) < 0)
		return -1;
	if (L->wo.step) {
		cli__fmt_num(
		    buf, L->samples < 2 || !L->out_uniform ? 0.0 : L->out_step,
		    0, NULL);
		if (fseek(f, L->wo.step_at, SEEK_SET) ||
		    fprintf(f, "%-*s", PATCH_WIDTH, buf) < 0)
			return -1;
	}
	return fseek(f, 0, SEEK_END);
}

/* ---- the command -----------------------------------------------------------
 */

void cli_usage_log(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire log FILE [-o OUT] [--format las|csv]\n"
	    "       [--input las|csv] [--curve INPUT=MNEM|none ...]\n"
	    "       [--set NAME=VALUE[UNIT] ...] [--params JSON]\n"
	    "       [--units KIND=UNIT ...] [--top DEPTH[UNIT]]\n"
	    "       [--base DEPTH[UNIT]] [--allow-unsorted] [--null VALUE]\n"
	    "       [--qc-summary FILE] [--summary] [--block N] [--inflight "
	    "N]\n"
	    "       [--digits N] [--progress|--no-progress]\n"
	    "\n"
	    "Streams a well log (LAS 2.0 or 3.0, or CSV with a header line;\n"
	    "FILE '-' is stdin) through log.process and writes it back with\n"
	    "the computed curves added (stdout unless -o).\n"
	    "\n"
	    "  -o OUT            write OUT (via OUT.partXXXXXX, renamed when\n"
	    "                    complete, removed on error or interrupt;\n"
	    "                    permissions follow the umask)\n"
	    "  --format las|csv  output format (default: las, csv for CSV "
	    "input)\n"
	    "  --input las|csv   input format (default: csv for *.csv)\n"
	    "  --curve IN=MNEM   which curve feeds input IN (none: no curve);\n"
	    "                    inputs: depth dtp dts vp vs rhob drho "
	    "caliper\n"
	    "                    bit_size gr vsh porosity pressure "
	    "temperature tvd\n"
	    "  --set NAME=VALUE  a log.process parameter (JSON, else a "
	    "string;\n"
	    "                    dotted names nest). A number may carry a "
	    "unit:\n"
	    "                    bit_size=8.5in, surface_temperature=59degF,\n"
	    "                    porosity=25%%; a bare number is in the\n"
	    "                    parameter's default unit (bit_size in m)\n"
	    "  --params JSON     parameters as one JSON object\n"
	    "  --units KIND=UNIT output unit of a quantity kind "
	    "(velocity=km/s,\n"
	    "                    modulus=MPa, ...); --set units.KIND=UNIT is "
	    "the\n"
	    "                    same. Input curves are always read in the\n"
	    "                    units their header lines state\n"
	    "  --top, --base D   only depths from D (to D); D in the depth\n"
	    "                    curve's unit unless given (--top 1550m)\n"
	    "  --allow-unsorted  accept repeated and out-of-order depths\n"
	    "                    (refused by default)\n"
	    "  --null VALUE      missing value of a CSV input (default "
	    "-999.25;\n"
	    "                    empty fields, NaN and NA are missing too)\n"
	    "  --qc-summary FILE per curve count, nulls, min, max, mean; per "
	    "QC\n"
	    "                    flag its count and depth intervals (JSON "
	    "when\n"
	    "                    FILE ends in .json, else text)\n"
	    "  --summary         the QC counts on stderr\n"
	    "  --block N         samples per request (default 2000)\n"
	    "  --inflight N      requests in flight (default 4, max 64)\n"
	    "  --digits N        significant digits of computed curves (7)\n"
	    "  --progress        a progress bar on stderr (default on a\n"
	    "                    terminal)\n"
	    "\n"
	    "Curves map to inputs by mnemonic: depth DEPT DEPTH MD; dtp DT "
	    "DTC\n"
	    "DTCO DT4P DTP AC; dts DTS DTSM DTSH DT4S; vp VP; vs VS; rhob "
	    "RHOB\n"
	    "RHOZ ZDEN DEN; drho DRHO DCOR ZCOR HDRA; caliper CALI CAL HCAL\n"
	    "CALS; bit_size BS BIT; gr GR GRC SGR (with gr_clean, gr_shale);\n"
	    "vsh VSH VCL; porosity PHIT PHIE POR (with fluid_new). A second\n"
	    "curve with the same meaning is reported. Header parameters are\n"
	    "used where no curve or --set gives the value, and the output "
	    "says\n"
	    "so: ~Parameter BS for the washout check, BHT as the temperature\n"
	    "of fluid substitution. Without a bit size the washout check is\n"
	    "skipped with a warning.\n"
	    "\n"
	    "Pressures: --set pressures.depth_is=tvd (or md with a TVD curve,\n"
	    "tvd TVD) and the rest of log.process's pressures object add the\n"
	    "overburden, hydrostatic, pore-pressure and fracture-gradient\n"
	    "curves. Blocks then go one at a time, each carrying the state of\n"
	    "the running integrals; pressures.trend_fit is fitted once over\n"
	    "the whole file with pressure.trend first (FILE, not stdin).\n"
	    "\n"
	    "Every output carries the caution: screening estimates only, not "
	    "a\n"
	    "substitute for qualified review, local regulations and licensed\n"
	    "practice; never the sole basis for well-control decisions.\n"
	    "\n"
	    "Exit codes: 0 ok, 1 the daemon refused a block, 2 usage, 3 no\n"
	    "daemon, 4 I/O failure, 5 malformed input (the message names the\n"
	    "line), 6 timeout; a signal ends it with that signal.\n");
}

/* The QC legend of bits 32-63 (cli__qc_legend knows 0-31): names by the
 * "index" of each flag of service.info. */
static void qc_legend_hi(const cJSON *info, const char *names[64])
{
	const cJSON *q;

	for (int b = 32; b < 64; b++)
		names[b] = NULL;
	cJSON_ArrayForEach(q,
	                   cJSON_GetObjectItemCaseSensitive(info, "qc_flags"))
	{
		const cJSON *nm = cJSON_GetObjectItemCaseSensitive(q, "name");
		const cJSON *ix = cJSON_GetObjectItemCaseSensitive(q, "index");
		if (cJSON_IsString(nm) && cJSON_IsNumber(ix) &&
		    ix->valuedouble >= 32 && ix->valuedouble < 64)
			names[(int)ix->valuedouble] = nm->valuestring;
	}
}

/* Pressures with pressures.trend_fit: fits the trend once over the whole
 * file with pressure.trend (a block-by-block fit would change from block
 * to block) and gives the result to every block as pressures.trend. Reads
 * the file a first time for the samples inside the intervals (and
 * --top/--base). 0, or a CLI_EXIT_* code with a message. */
static int prefit(logrun *L, cli_conn *c, long long deadline)
{
	cJSON *pr = cJSON_GetObjectItemCaseSensitive(L->params, "pressures");
	cJSON *fit = cJSON_GetObjectItemCaseSensitive(pr, "trend_fit");
	const cJSON *ivs = cJSON_GetObjectItemCaseSensitive(fit, "intervals");
	const cJSON *di = cJSON_GetObjectItemCaseSensitive(pr, "depth_is");
	static const char *const names[] = {"dtp",     "vp",       "vsh", "gr",
	                                    "caliper", "bit_size", NULL};
	int zin = cJSON_IsString(di) && strcmp(di->valuestring, "md") == 0
	              ? find_input("tvd")
	              : 0;
	cJSON *q = NULL, *arrs[7] = {NULL}, *resp = NULL, *iv;
	cli_las_reader *r = NULL;
	FILE *in = NULL;
	double *rows = NULL;
	size_t n = 0, used = 0;
	int rc = CLI_EXIT_IO, st;
	const cJSON *res, *err, *tr, *fs;

	if (!cJSON_IsObject(fit))
		return 0;
	if (L->in == stdin) {
		fprintf(stderr,
		        WHO ": pressures.trend_fit reads the file twice (the "
		            "trend is fitted over the whole log first): give a "
		            "file, not stdin, or give pressures.trend\n");
		return CLI_EXIT_USAGE;
	}
	if (L->col[zin] < 0) {
		fprintf(stderr, WHO ": pressures: no %s curve\n",
		        zin ? "TVD (--curve tvd=MNEM)" : "depth");
		return CLI_EXIT_USAGE;
	}
	if (!cJSON_IsArray(ivs)) {
		fprintf(stderr, WHO ": pressures.trend_fit.intervals must be "
		                    "an array of {top, base}\n");
		return CLI_EXIT_USAGE;
	}
	in = fopen(L->path, "rb");
	r = cli_las_reader_new();
	rows = malloc(L->block * L->ncurves * sizeof *rows);
	q = cJSON_CreateObject();
	for (int k = 0; k < 7; k++)
		arrs[k] = cJSON_CreateArray();
	if (!in || !r || !rows || !q) {
		fprintf(stderr, WHO ": %s: %s\n", L->path,
		        in ? "out of memory" : strerror(errno));
		goto out;
	}
	if (cli_las_is_csv(L->r))
		cli_las_set_csv(r, cli_las_null(L->r));
	cli_las_set_order_check(r, !L->allow_unsorted);
	if (cli_las_read(r, in) != CLI_LAS_HEADER)
		goto bad;
	for (;;) {
		cli_las_set_block(r, rows, L->block);
		st = cli_las_read(r, in);
		if (st == CLI_LAS_ERR)
			goto bad;
		n = cli_las_rows(r);
		if (!n)
			break;
		n = select_rows(L, rows, n);
		for (size_t j = 0; j < n; j++) {
			const double *row = rows + j * L->ncurves;
			double z =
			    row[L->col[zin]] * L->scale[zin] + L->offset[zin];
			int inside = 0;
			cJSON_ArrayForEach(iv, ivs)
			{
				const cJSON *t =
				    cJSON_GetObjectItemCaseSensitive(iv, "top");
				const cJSON *b =
				    cJSON_GetObjectItemCaseSensitive(iv,
				                                     "base");
				if (cJSON_IsNumber(t) && cJSON_IsNumber(b) &&
				    z >= t->valuedouble && z <= b->valuedouble)
					inside = 1;
			}
			if (!inside)
				continue;
			cJSON_AddItemToArray(arrs[6], cJSON_CreateNumber(z));
			for (int k = 0; names[k]; k++) {
				int ix = find_input(names[k]);
				double v;
				if (L->col[ix] < 0)
					continue;
				v = row[L->col[ix]];
				cJSON_AddItemToArray(
				    arrs[k], isnan(v) ? cJSON_CreateNull()
				                      : cJSON_CreateNumber(
				                            v * L->scale[ix] +
				                            L->offset[ix]));
			}
			used++;
		}
		if (L->past_range)
			break;
	}
	L->past_range = 0;
	if (!used) {
		fprintf(stderr,
		        WHO ": pressures.trend_fit: no sample of %s lies in "
		            "its intervals\n",
		        L->path);
		rc = CLI_EXIT_USAGE;
		goto out;
	}
	cJSON_AddItemToObject(q, "tvd", arrs[6]);
	arrs[6] = NULL;
	for (int k = 0; names[k]; k++) {
		int ix = find_input(names[k]);
		if (L->col[ix] < 0)
			continue;
		cJSON_AddItemToObject(q, names[k], arrs[k]);
		arrs[k] = NULL;
	}
	{
		/* the request's selector and rules, as log.process has them */
		static const char *const top[] = {
		    "gr_clean", "gr_shale", "bit_size", "washout_limit", NULL};
		static const char *const sub[] = {"column", "vsh_min", NULL};
		for (int k = 0; top[k]; k++) {
			const cJSON *v =
			    cJSON_GetObjectItemCaseSensitive(L->params, top[k]);
			if (v && !cJSON_GetObjectItemCaseSensitive(q, top[k]))
				cJSON_AddItemToObject(q, top[k],
				                      cJSON_Duplicate(v, 1));
		}
		for (int k = 0; sub[k]; k++) {
			const cJSON *v =
			    cJSON_GetObjectItemCaseSensitive(pr, sub[k]);
			if (v)
				cJSON_AddItemToObject(q, sub[k],
				                      cJSON_Duplicate(v, 1));
		}
		cJSON_ArrayForEach(iv, fit)
		{
			cJSON_AddItemToObject(q, iv->string,
			                      cJSON_Duplicate(iv, 1));
		}
		if (cJSON_GetObjectItemCaseSensitive(q, "caliper") &&
		    !cJSON_GetObjectItemCaseSensitive(q, "bit_size"))
			cJSON_DeleteItemFromObjectCaseSensitive(q, "caliper");
		if (!cJSON_GetObjectItemCaseSensitive(q, "caliper"))
			cJSON_DeleteItemFromObjectCaseSensitive(q, "bit_size");
		if (!cJSON_GetObjectItemCaseSensitive(q, "gr")) {
			cJSON_DeleteItemFromObjectCaseSensitive(q, "gr_clean");
			cJSON_DeleteItemFromObjectCaseSensitive(q, "gr_shale");
		}
		if (!cJSON_GetObjectItemCaseSensitive(q, "caliper"))
			cJSON_DeleteItemFromObjectCaseSensitive(
			    q, "washout_limit");
	}
	rc = cli__roundtrip(c, WHO, "pressure.trend", q, 3, deadline, &resp);
	if (rc)
		goto out;
	res = cJSON_GetObjectItemCaseSensitive(resp, "result");
	err = cJSON_GetObjectItemCaseSensitive(resp, "error");
	if (err || !cJSON_IsObject(res)) {
		cli__print_error(stderr,
		                 WHO ": pressures.trend_fit: pressure.trend "
		                     "refused the fit",
		                 err);
		rc = CLI_EXIT_RPC_ERROR;
		goto out;
	}
	tr = cJSON_GetObjectItemCaseSensitive(res, "trend");
	fs = cJSON_GetObjectItemCaseSensitive(res, "fit");
	{
		char *t = cJSON_PrintUnformatted(tr);
		char *f = cJSON_PrintUnformatted(fs);
		snprintf(
		    L->pnote, sizeof L->pnote,
		    "Compaction trend fitted over the whole file by "
		    "pressure.trend on %zu samples inside "
		    "pressures.trend_fit's intervals (the shale among them, "
		    "washouts left out), then given to every block: %s; "
		    "fit %s (slowness us/ft, c 1/m, depths m).",
		    used, t ? t : "?", f ? f : "?");
		notef(L,
		      "pressures: trend fitted with pressure.trend over the "
		      "%zu samples inside the intervals (n_used: those that "
		      "pass the shale selector, not washed out): %s",
		      used, f ? f : "?");
		cJSON_free(t);
		cJSON_free(f);
	}
	cJSON_DeleteItemFromObjectCaseSensitive(pr, "trend_fit");
	cJSON_AddItemToObject(pr, "trend", cJSON_Duplicate(tr, 1));
	rc = 0;
	goto out;
bad:
	fprintf(stderr, WHO ": %s: %s\n", L->path, cli_las_error(r));
	rc = CLI_EXIT_INPUT;
out:
	for (int k = 0; k < 7; k++)
		cJSON_Delete(arrs[k]);
	cJSON_Delete(q);
	cJSON_Delete(resp);
	cli_las_reader_free(r);
	free(rows);
	if (in)
		fclose(in);
	return rc;
}

/* A depth option "1550", "1550m", "5085ft" in the depth curve's unit. */
static int depth_option(logrun *L, const char *opt, const char *v, double *out)
{
	char unit[32];
	double x, scale, offset;
	char *end;

	if (cli__split_value_unit(v, &x, unit, sizeof unit)) {
		if (cli__unit_factor(&L->units, unit, "length", NULL, &scale,
		                     &offset)) {
			fprintf(stderr,
			        WHO ": %s %s: '%s' is not a length "
			            "unit\n",
			        opt, v, unit);
			return -1;
		}
		x = x * scale + offset;                  /* to m */
		*out = (x - L->offset[0]) / L->scale[0]; /* to the curve */
		return 0;
	}
	x = strtod(v, &end);
	if (end == v || *end || !isfinite(x)) {
		fprintf(stderr, WHO ": %s wants a depth, not '%s'\n", opt, v);
		return -1;
	}
	*out = x;
	return 0;
}

static int ends_with_ci(const char *s, const char *suf)
{
	size_t a = strlen(s), b = strlen(suf);
	return a >= b && strcasecmp(s + a - b, suf) == 0;
}

int cli_cmd_log(const cli_opts *o, int argc, char **argv)
{
	static const char *const opts[] = {
	    "--output",   "--format",         "--input",    "--curve",
	    "--set",      "--params",         "--units",    "--top",
	    "--base",     "--allow-unsorted", "--null",     "--qc-summary",
	    "--summary",  "--block",          "--inflight", "--digits",
	    "--progress", "--no-progress",    "--help"};
	logrun L;
	char *maps[64], *sets[256];
	char unit_sets[32][96];
	size_t nmaps = 0, nsets = 0, nunits = 0;
	const char *pjson = NULL, *top = NULL, *basev = NULL, *qcfile = NULL;
	const char *fmt = NULL, *infmt = NULL;
	char tmppath[4096];
	cJSON *info = NULL, *disc = NULL;
	cli_conn c;
	int connected = 0, rc = CLI_EXIT_IO, st, eof = 0;
	int force_prog = -1;
	double csv_null = -999.25;
	struct stat sb;
	long long deadline;

	memset(&L, 0, sizeof L);
	L.block = 2000;
	L.inflight_max = 4;
	L.digits = 7;
	L.bs_bad = NAN;
	L.out_uniform = 1;
	tmppath[0] = '\0';
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		int takes =
		    strcmp(a, "-o") == 0 || strcmp(a, "--output") == 0 ||
		    strcmp(a, "--format") == 0 || strcmp(a, "--input") == 0 ||
		    strcmp(a, "--curve") == 0 || strcmp(a, "--set") == 0 ||
		    strcmp(a, "--params") == 0 || strcmp(a, "--units") == 0 ||
		    strcmp(a, "--top") == 0 || strcmp(a, "--base") == 0 ||
		    strcmp(a, "--null") == 0 ||
		    strcmp(a, "--qc-summary") == 0 ||
		    strcmp(a, "--block") == 0 || strcmp(a, "--inflight") == 0 ||
		    strcmp(a, "--digits") == 0;
		if (takes && !v) {
			fprintf(stderr, WHO ": %s needs a value\n", a);
			goto usage_fail;
		}
		if (strcmp(a, "-o") == 0 || strcmp(a, "--output") == 0)
			L.outpath = v, i++;
		else if (strcmp(a, "--format") == 0 ||
		         strcmp(a, "--input") == 0) {
			if (strcmp(v, "csv") && strcmp(v, "las")) {
				fprintf(stderr,
				        WHO ": %s is las or csv, not '%s'\n", a,
				        v);
				goto usage_fail;
			}
			if (a[2] == 'f')
				fmt = v;
			else
				infmt = v;
			i++;
		} else if (strcmp(a, "--curve") == 0) {
			if (nmaps == 64) {
				fprintf(stderr, WHO ": too many --curve\n");
				goto usage_fail;
			}
			maps[nmaps++] = argv[++i];
		} else if (strcmp(a, "--set") == 0) {
			if (nsets == 256) {
				fprintf(stderr, WHO ": too many --set\n");
				goto usage_fail;
			}
			sets[nsets++] = argv[++i];
		} else if (strcmp(a, "--units") == 0) {
			if (!strchr(v, '=') || nunits == 32 || nsets == 256) {
				fprintf(stderr,
				        WHO ": --units wants KIND=UNIT, not "
				            "'%s'\n",
				        v);
				goto usage_fail;
			}
			snprintf(unit_sets[nunits], sizeof unit_sets[nunits],
			         "units.%s", v);
			sets[nsets++] = unit_sets[nunits++];
			i++;
		} else if (strcmp(a, "--params") == 0)
			pjson = v, i++;
		else if (strcmp(a, "--top") == 0)
			top = v, i++;
		else if (strcmp(a, "--base") == 0)
			basev = v, i++;
		else if (strcmp(a, "--qc-summary") == 0)
			qcfile = v, i++;
		else if (strcmp(a, "--null") == 0) {
			char *end;
			csv_null = strtod(v, &end);
			if (end == v || *end || !isfinite(csv_null)) {
				fprintf(stderr, WHO ": bad --null '%s'\n", v);
				goto usage_fail;
			}
			i++;
		} else if (strcmp(a, "--block") == 0 ||
		           strcmp(a, "--inflight") == 0 ||
		           strcmp(a, "--digits") == 0) {
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
		else if (strcmp(a, "--allow-unsorted") == 0)
			L.allow_unsorted = 1;
		else if (strcmp(a, "--progress") == 0)
			force_prog = 1;
		else if (strcmp(a, "--no-progress") == 0)
			force_prog = 0;
		else if (a[0] == '-' && a[1]) {
			cli__unknown_option(WHO, a, opts,
			                    sizeof opts / sizeof *opts);
			rc = CLI_EXIT_USAGE;
			goto out;
		} else if (!L.path)
			L.path = a;
		else {
			fprintf(stderr, WHO ": one input file only\n");
			goto usage_fail;
		}
	}
	if (!L.path)
		goto usage_fail;
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
	if (infmt ? strcmp(infmt, "csv") == 0 : ends_with_ci(L.path, ".csv"))
		cli_las_set_csv(L.r, csv_null);
	L.csv = fmt ? strcmp(fmt, "csv") == 0 : cli_las_is_csv(L.r);
	cli_las_set_order_check(L.r, !L.allow_unsorted);
	st = cli_las_read(L.r, L.in);
	if (st != CLI_LAS_HEADER) {
		fprintf(stderr, WHO ": %s: %s%s\n", L.path,
		        st == CLI_LAS_ERR ? cli_las_error(L.r)
		                          : "no ~A section: not a LAS file",
		        !cli_las_is_csv(L.r) &&
		                strstr(cli_las_error(L.r), "before the ~V")
		            ? " (a CSV file? --input csv)"
		            : "");
		rc = CLI_EXIT_INPUT;
		goto out;
	}
	L.ncurves = cli_las_ncurves(L.r);
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	deadline =
	    cli__now_ms() +
	    (o->timeout_ms > 0 ? o->timeout_ms : CLI_DEFAULT_CALL_TIMEOUT_MS);
	rc = cli__fetch_info(&c, WHO, deadline, &info, &disc);
	if (rc)
		goto out;
	rc = CLI_EXIT_IO;
	L.discover = disc;
	if (cli__units_load(&L.units, info)) {
		fprintf(stderr, WHO ": the daemon's service.info has no unit "
		                    "table\n");
		goto out;
	}
	cli__qc_legend(info, L.qc);
	qc_legend_hi(info, L.qc);
	if (cli__build_params(WHO, sets, nsets, pjson, &L.units, disc,
	                      &L.params, &L.sources)) {
		rc = CLI_EXIT_USAGE;
		goto out;
	}
	if (map_curves(&L, maps, nmaps)) {
		rc = CLI_EXIT_USAGE;
		goto out;
	}
	if (curve_units(&L)) {
		rc = CLI_EXIT_INPUT;
		goto out;
	}
	use_header(&L);
	if ((top && depth_option(&L, "--top", top, &L.top_d)) ||
	    (basev && depth_option(&L, "--base", basev, &L.base_d))) {
		rc = CLI_EXIT_USAGE;
		goto out;
	}
	L.have_top = top != NULL;
	L.have_base = basev != NULL;
	if (L.have_top && L.have_base && L.top_d > L.base_d) {
		double t = L.top_d;
		L.top_d = L.base_d;
		L.base_d = t;
	}
	L.pres = cJSON_IsObject(
	    cJSON_GetObjectItemCaseSensitive(L.params, "pressures"));
	if (L.pres) {
		rc = prefit(&L, &c, deadline);
		if (rc)
			goto out;
		rc = CLI_EXIT_IO;
		if (L.inflight_max > 1)
			notef(&L, "pressures: blocks go one at a time, each "
			          "carrying the state of the running integrals "
			          "from the answer before it");
		L.inflight_max = 1;
	}
	if (set_base(&L))
		goto out;
	L.in_stat = calloc(L.ncurves, sizeof *L.in_stat);
	if (!L.in_stat)
		goto out;
	for (size_t k = 0; k < L.ncurves; k++) {
		L.in_stat[k].min = INFINITY;
		L.in_stat[k].max = -INFINITY;
	}
	for (size_t k = 0; k < L.inflight_max; k++) {
		L.slots[k].rows = malloc(L.block * L.ncurves * sizeof(double));
		if (!L.slots[k].rows) {
			fprintf(stderr, WHO ": out of memory\n");
			goto out;
		}
	}
	L.patch = !L.csv && (cli_las_is_csv(L.r) || L.have_top || L.have_base);
	if (L.outpath) {
		L.out = open_part(L.outpath, tmppath, sizeof tmppath);
		if (!L.out)
			goto out;
		arm_part(tmppath);
	} else {
		L.out = stdout;
		if (L.patch && cli_las_is_csv(L.r) &&
		    (fstat(1, &sb) || !S_ISREG(sb.st_mode))) {
			fprintf(stderr,
			        WHO ": LAS output of a CSV file needs -o FILE "
			            "(or stdout to a file): its STOP depth is "
			            "written at the end\n");
			rc = CLI_EXIT_USAGE;
			goto out;
		}
	}
	clock_gettime(CLOCK_MONOTONIC, &L.t0);
	L.last = L.t0;
	L.next_id = 10;
	for (;;) {
		/* Fill: read blocks while there is room in flight. */
		while (!eof && L.count < L.inflight_max &&
		       L.wbuf.len - L.wbuf.off < (4u << 20)) {
			slot *s = &L.slots[(L.head + L.count) % L.inflight_max];
			cli_las_set_block(L.r, s->rows, L.block);
			st = cli_las_read(L.r, L.in);
			if (st == CLI_LAS_ERR) {
				fprintf(stderr, WHO ": %s: %s%s\n", L.path,
				        cli_las_error(L.r),
				        strstr(cli_las_error(L.r), "depth")
				            ? " (--allow-unsorted accepts it)"
				            : "");
				rc = CLI_EXIT_INPUT;
				goto out;
			}
			s->nrows = cli_las_rows(L.r);
			if (s->nrows == 0) {
				eof = 1;
				break;
			}
			s->nrows = select_rows(&L, s->rows, s->nrows);
			s->end_bytes = cli_las_bytes(L.r);
			if (L.past_range)
				eof = 1;
			if (s->nrows == 0) {
				L.done_bytes = s->end_bytes;
				continue;
			}
			s->id = L.next_id++;
			s->first = L.queued;
			L.queued += s->nrows;
			if (L.patch && !L.count && !L.have_cols &&
			    !L.strt_txt[0]) {
				double d0 = s->rows[0];
				const cli_las_line *sl =
				    cli_las_find(L.r, 'W', "STOP");
				double stop = sl ? strtod(sl->value, NULL) : d0;
				cli__fmt_num(L.strt_txt, d0, 0, NULL);
				/* STOP until it is known: the file's, within
				 * the range asked for */
				if (L.have_base && stop > L.base_d)
					stop = L.base_d;
				if (L.have_top && stop < L.top_d)
					stop = L.top_d;
				if (cli_las_is_csv(L.r) || !isfinite(stop))
					stop = d0;
				cli__fmt_num(L.stop_txt, stop, 0, NULL);
				L.wo.strt = L.strt_txt;
				L.wo.stop = L.stop_txt;
				L.wo.width = PATCH_WIDTH;
				if (cli_las_is_csv(L.r)) {
					snprintf(L.step_txt, sizeof L.step_txt,
					         "0");
					L.wo.step = L.step_txt;
				}
			}
			if (queue_block(&L, s)) {
				fprintf(stderr, WHO ": out of memory\n");
				goto out;
			}
			L.count++;
		}
		if (eof && !L.count && L.wbuf.off == L.wbuf.len)
			break;
		st = cli__pipe_step(&c, &L.wbuf, 1, -1, NULL, -1, on_line, &L);
		if (st < 0)
			goto out;
		if (st == 1 && L.count) {
			fprintf(stderr, WHO ": the daemon closed the "
			                    "connection early\n");
			goto out;
		}
	}
	if (!L.have_cols) {
		/* No data rows: the header alone, with no new curves. */
		char err[256];
		L.wrote = 1;
		if (L.have_top || L.have_base)
			notef(&L, "no sample between --top and --base");
		if (L.csv ? cli_las_write_csv_header(L.out, L.r, NULL, 0)
		          : cli_las_write_header(L.out, L.r, NULL, 0, NULL, err,
		                                 sizeof err))
			goto out;
	}
	if (!L.csv && cli_las_write_trailer(L.out, L.r))
		goto out;
	if (fflush(L.out) || ferror(L.out)) {
		fprintf(stderr, WHO ": cannot write the output: %s\n",
		        strerror(errno));
		goto out;
	}
	if (L.patch && L.have_cols && patch_header(&L, L.out))
		fprintf(stderr,
		        WHO
		        ": the output is not a file, so STOP in its header "
		        "could not be set to the last depth written (%.10g)\n",
		        L.last_out);
	if (L.out != stdout) {
		if (fflush(L.out) || fsync(fileno(L.out)) || fclose(L.out)) {
			L.out = NULL;
			fprintf(stderr, WHO ": cannot write the output: %s\n",
			        strerror(errno));
			goto out;
		}
		L.out = NULL;
		if (rename(tmppath, L.outpath)) {
			fprintf(stderr, WHO ": rename to %s: %s\n", L.outpath,
			        strerror(errno));
			goto out;
		}
		disarm_part();
		tmppath[0] = '\0';
	} else if (fflush(stdout)) {
		goto out;
	}
	progress(&L, 1);
	flags_close(&L);
	if (!isnan(L.bs_bad))
		fprintf(stderr,
		        WHO ": the bit size curve %s is implausible at %.10g "
		            "(outside 3 to 40 in; common practice): check its "
		            "unit\n",
		        mnem_of(&L, (size_t)find_input("bit_size")), L.bs_bad);
	if (cli_las_warnings(L.r))
		fprintf(stderr, WHO ": %s: %lu warning(s), first: %s\n", L.path,
		        cli_las_warnings(L.r), cli_las_warning(L.r));
	if (qcfile && write_qc_file(&L, qcfile))
		goto out;
	if (L.summary) {
		fprintf(stderr,
		        "QC summary: %llu samples, %llu clean, %llu "
		        "flagged\n",
		        L.samples, L.samples - L.flagged, L.flagged);
		for (int b = 0; b < CLI_QC_BITS; b++)
			if (L.flag[b].count)
				fprintf(stderr, "  bit %2d %-28s %llu\n", b,
				        L.qc[b] ? L.qc[b] : "?",
				        L.flag[b].count);
	}
	rc = CLI_EXIT_OK;
	goto out;
usage_fail:
	if (!L.path)
		fprintf(stderr, "usage: rockwire log FILE [options]\n");
	fprintf(stderr, "(rockwire log --help lists the options)\n");
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
		disarm_part();
		if (rc != CLI_EXIT_OK)
			fprintf(stderr, WHO ": no output written%s%s\n",
			        L.outpath ? " to " : "",
			        L.outpath ? L.outpath : "");
	} else if (rc != CLI_EXIT_OK && L.out == stdout && L.wrote) {
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
	for (int b = 0; b < CLI_QC_BITS; b++)
		free(L.flag[b].run);
	free(L.in_stat);
	cli__buf_free(&L.wbuf);
	cli__numcols_free(&L.cols);
	free(L.scratch);
	free(L.rowbuf);
	cJSON_free(L.base);
	free(L.ptoken);
	cJSON_Delete(L.params);
	cJSON_Delete(L.sources);
	cJSON_Delete(info);
	cJSON_Delete(disc);
	return rc;
}
