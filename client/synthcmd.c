/* `rockwire synthetic FILE`: the synthetic seismogram of a well log. Reads
 * a LAS 2.0 / 3.0 or CSV log (depth, P sonic, density, and the shear
 * sonic for angles above zero), converts each curve from the unit its
 * header states with the daemon's own factors, asks the daemon for the
 * time-depth relation (seismic.timedepth, with optional checkshots from a
 * CSV file) and then for the traces (seismic.synthetic) on an axis of
 * whole milliseconds that covers the log and the wavelet, and writes the
 * time-depth curve and the traces as CSV and the traces as SEG-Y rev 1
 * (client/segy.c). Every file carries the caution. Outputs go to
 * temporary files renamed into place only when complete. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cjson/cJSON.h>

#include "cli.h"
#include "las.h"
#include "logio.h"
#include "rpc.h"
#include "segy.h"
#include "units.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define WHO        "rockwire synthetic"
#define MAX_ANGLES 181
#define BLOCK_ROWS 4096

static const char caution[] =
    "Screening estimates only: not a substitute for qualified review, "
    "local regulations and licensed practice; never the sole basis for "
    "well-control decisions.";

/* The log inputs, the kind of each and the mnemonics looked for. */
enum { IN_DEPTH, IN_DTP, IN_VP, IN_DTS, IN_VS, IN_RHO, N_IN };
static const struct {
	const char *name, *kind, *what;
	const char *mnems[8];
} inputs[N_IN] = {
    {"depth", "length", "depth", {"DEPT", "DEPTH", "MD"}},
    {"dtp",
     "slowness",
     "compressional slowness",
     {"DT", "DTC", "DTCO", "DT4P", "DTP", "AC"}},
    {"vp", "velocity", "compressional velocity", {"VP"}},
    {"dts", "slowness", "shear slowness", {"DTS", "DTSM", "DTSH", "DT4S"}},
    {"vs", "velocity", "shear velocity", {"VS"}},
    {"rhob", "density", "bulk density", {"RHOB", "RHOZ", "ZDEN", "DEN"}},
};

typedef struct synth {
	const char *path, *csv, *td_csv, *segy, *cs_path, *method;
	char kind[16];
	double freq, corners[4];
	double length_ms, phase_deg, dt_ms, segy_null;
	double angles[MAX_ANGLES];
	size_t na;
	int stretch, keep, have_datum_z, have_datum_t, have_vrep, input_csv;
	double datum_z, datum_t, vrep, csv_null;
	char *maps[N_IN];
	size_t nmaps;
	/* the log */
	cli_las_reader *r;
	double *rows;
	size_t nrows, ncurves, cap;
	int col[N_IN];
	double scale[N_IN], offset[N_IN];
	cli_units units;
	char well[64];
} synth;

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
	if (fd < 0 || fchmod(fd, file_mode()) || !(f = fdopen(fd, "w"))) {
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

/* Closes f and renames tmp to path; removes tmp on failure. 0 or -1. */
static int finish_part(FILE *f, const char *tmp, const char *path)
{
	if (fflush(f) || ferror(f) || fsync(fileno(f))) {
		fprintf(stderr, WHO ": cannot write %s: %s\n", path,
		        strerror(errno));
		fclose(f);
		unlink(tmp);
		return -1;
	}
	if (fclose(f) || rename(tmp, path)) {
		fprintf(stderr, WHO ": cannot write %s: %s\n", path,
		        strerror(errno));
		unlink(tmp);
		return -1;
	}
	return 0;
}

/* ---- options ------------------------------------------------------------ */

static int parse_double(const char *s, double *v)
{
	char *end;
	errno = 0;
	*v = strtod(s, &end);
	return end != s && !*end && !errno && isfinite(*v) ? 0 : -1;
}

/* "0:30:5" (first:last:step, inclusive) or "0,10,25". 0 or -1. */
static int parse_angles(synth *S, const char *s)
{
	char buf[1024], *p, *save = NULL;
	double a, b, step;

	if (strlen(s) >= sizeof buf)
		return -1;
	snprintf(buf, sizeof buf, "%s", s);
	S->na = 0;
	if (strchr(buf, ':')) {
		char *c1 = strchr(buf, ':'), *c2;
		*c1 = '\0';
		c2 = strchr(c1 + 1, ':');
		if (!c2)
			return -1;
		*c2 = '\0';
		if (parse_double(buf, &a) || parse_double(c1 + 1, &b) ||
		    parse_double(c2 + 1, &step) || !(step > 0) || b < a)
			return -1;
		for (double x = a; x <= b + 1e-9 * step; x = a + step * S->na) {
			if (S->na == MAX_ANGLES)
				return -1;
			S->angles[S->na++] = x;
		}
		return 0;
	}
	for (p = strtok_r(buf, ",", &save); p; p = strtok_r(NULL, ",", &save)) {
		if (S->na == MAX_ANGLES || parse_double(p, &a))
			return -1;
		S->angles[S->na++] = a;
	}
	return S->na ? 0 : -1;
}

/* "ricker:30", "ormsby:5,10,50,60", "bandpass:5,10,50,60". 0 or -1. */
static int parse_wavelet(synth *S, const char *s)
{
	const char *colon = strchr(s, ':');
	size_t k = colon ? (size_t)(colon - s) : 0;
	char buf[256], *p, *save = NULL;
	int n = 0;

	if (!colon || k >= sizeof S->kind)
		return -1;
	memcpy(S->kind, s, k);
	S->kind[k] = '\0';
	snprintf(buf, sizeof buf, "%s", colon + 1);
	if (strcmp(S->kind, "ricker") == 0)
		return parse_double(buf, &S->freq);
	if (strcmp(S->kind, "ormsby") && strcmp(S->kind, "bandpass"))
		return -2;
	for (p = strtok_r(buf, ",", &save); p; p = strtok_r(NULL, ",", &save))
		if (n == 4 || parse_double(p, &S->corners[n++]))
			return -1;
	return n == 4 ? 0 : -1;
}

void cli_usage_synthetic(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire synthetic FILE [--angles LIST] [--wavelet SPEC]\n"
	    "       [--length MS] [--phase DEG] [--dt MS] [--method NAME]\n"
	    "       [--stretch] [--keep-partial] [--checkshots FILE.csv]\n"
	    "       [--datum-depth D] [--datum-time MS] [--vrep V]\n"
	    "       [--curve IN=MNEM ...] [--input las|csv] [--null VALUE]\n"
	    "       [--csv OUT.csv] [--td-csv OUT.csv] [--segy OUT.sgy]\n"
	    "       [--segy-null VALUE]\n"
	    "\n"
	    "The synthetic seismogram of a well log (LAS 2.0 / 3.0, or CSV\n"
	    "with a header line; FILE '-' is stdin): the time-depth relation\n"
	    "from the sonic (seismic.timedepth, corrected by checkshots when\n"
	    "given), then the traces (seismic.synthetic) on a whole-\n"
	    "millisecond axis covering the log and the wavelet.\n"
	    "\n"
	    "  --angles LIST      incidence angles in degrees: "
	    "FIRST:LAST:STEP\n"
	    "                     or a comma list (default 0); angles above 0\n"
	    "                     need a shear curve\n"
	    "  --wavelet SPEC     ricker:FREQ, ormsby:F1,F2,F3,F4 or\n"
	    "                     bandpass:F1,F2,F3,F4 in Hz (default "
	    "ricker:30)\n"
	    "  --length MS        wavelet length (default 128)\n"
	    "  --phase DEG        constant-phase rotation (default 0)\n"
	    "  --dt MS            trace sample interval (default 2)\n"
	    "  --method NAME      PP coefficient: zoeppritz (default),\n"
	    "                     aki_richards, shuey2, shuey3, hilterman,\n"
	    "                     fatti, gray_lmr, gray_kmr, smith_gidlow\n"
	    "  --stretch          stretch each angle's wavelet by "
	    "1/cos(angle)\n"
	    "  --keep-partial     keep trace samples near null interfaces\n"
	    "                     (flagged) instead of writing them null\n"
	    "  --checkshots FILE  CSV: depth first, then a TWT or OWT column\n"
	    "                     (units in the header, e.g. "
	    "DEPTH[m],OWT[ms];\n"
	    "                     default m and ms)\n"
	    "  --datum-depth D    where time starts, in the depth curve's "
	    "unit\n"
	    "                     (default the first sample)\n"
	    "  --datum-time MS    two-way time at the datum (default 0)\n"
	    "  --vrep V           replacement velocity in m/s above the log\n"
	    "  --curve IN=MNEM    which curve feeds IN: depth dtp vp dts vs "
	    "rhob\n"
	    "                     (MNEM none: no curve, e.g. dts=none)\n"
	    "  --input las|csv    input format (default: csv for *.csv)\n"
	    "  --null VALUE       missing value of a CSV input (-999.25)\n"
	    "  --csv OUT          the traces: TIME, DEPTH, one column per "
	    "angle\n"
	    "  --td-csv OUT       the time-depth curve at the log samples\n"
	    "  --segy OUT         the traces as SEG-Y rev 1 (IEEE floats; the\n"
	    "                     angle in trace header bytes 37-40)\n"
	    "  --segy-null VALUE  written for null samples in SEG-Y (0)\n"
	    "Without --csv, --td-csv or --segy the traces CSV goes to stdout.\n"
	    "\n"
	    "Primaries only: no transmission loss, multiples, spreading or\n"
	    "attenuation; each angle is taken at every interface.\n"
	    "Every output carries the caution: screening estimates only, not "
	    "a\n"
	    "substitute for qualified review, local regulations and licensed\n"
	    "practice; never the sole basis for well-control decisions.\n"
	    "\n"
	    "Exit codes: 0 ok, 1 the daemon refused a request, 2 usage, 3 no\n"
	    "daemon, 4 I/O failure, 5 malformed input (the message names the\n"
	    "line), 6 timeout.\n");
}

/* ---- the log ------------------------------------------------------------ */

static int read_all(synth *S, FILE *in)
{
	for (;;) {
		int st;
		size_t got;
		if (S->cap - S->nrows < BLOCK_ROWS) {
			size_t cap = S->cap ? 2 * S->cap : 4 * BLOCK_ROWS;
			double *p = realloc(S->rows,
			                    cap * S->ncurves * sizeof *S->rows);
			if (!p) {
				fprintf(stderr, WHO ": out of memory\n");
				return CLI_EXIT_IO;
			}
			S->rows = p;
			S->cap = cap;
		}
		cli_las_set_block(S->r, S->rows + S->nrows * S->ncurves,
		                  BLOCK_ROWS);
		st = cli_las_read(S->r, in);
		if (st == CLI_LAS_ERR) {
			fprintf(stderr, WHO ": %s: %s\n", S->path,
			        cli_las_error(S->r));
			return CLI_EXIT_INPUT;
		}
		got = cli_las_rows(S->r);
		if (!got)
			return 0;
		S->nrows += got;
	}
}

static int match(size_t in, const char *mnem)
{
	for (size_t k = 0; k < 8 && inputs[in].mnems[k]; k++)
		if (strcasecmp(inputs[in].mnems[k], mnem) == 0)
			return 1;
	return 0;
}

static int map_curves(synth *S)
{
	for (size_t i = 0; i < N_IN; i++)
		S->col[i] = -1;
	for (size_t m = 0; m < S->nmaps; m++) {
		char *eq = strchr(S->maps[m], '=');
		size_t i;
		if (!eq) {
			fprintf(stderr,
			        WHO ": --curve wants IN=MNEM, not '%s'\n",
			        S->maps[m]);
			return CLI_EXIT_USAGE;
		}
		*eq = '\0';
		for (i = 0; i < N_IN; i++)
			if (strcmp(inputs[i].name, S->maps[m]) == 0)
				break;
		if (i == N_IN) {
			const char *names[N_IN], *s;
			for (size_t k = 0; k < N_IN; k++)
				names[k] = inputs[k].name;
			s = cli__suggest(S->maps[m], names, N_IN);
			fprintf(stderr,
			        WHO ": --curve: no input '%s'%s%s%s; inputs: "
			            "depth dtp vp dts vs rhob\n",
			        S->maps[m], s ? " (did you mean " : "",
			        s ? s : "", s ? "?)" : "");
			return CLI_EXIT_USAGE;
		}
		S->col[i] = -2; /* set below */
		for (size_t k = 0; k < S->ncurves; k++)
			if (strcasecmp(cli_las_curve(S->r, k)->mnem, eq + 1) ==
			    0)
				S->col[i] = (int)k;
		if (S->col[i] == -2 && strcmp(eq + 1, "none") == 0) {
			S->col[i] = -3;
		} else if (S->col[i] == -2) {
			fprintf(stderr,
			        WHO ": --curve %s=%s: %s has no curve %s\n",
			        inputs[i].name, eq + 1, S->path, eq + 1);
			return CLI_EXIT_USAGE;
		}
	}
	for (size_t i = 0; i < N_IN; i++) {
		if (S->col[i] == -3) {
			S->col[i] = -1;
			continue;
		}
		if (S->col[i] >= 0)
			continue;
		for (size_t k = 0; k < S->ncurves && S->col[i] < 0; k++)
			if (match(i, cli_las_curve(S->r, k)->mnem) ||
			    (i == IN_DEPTH && k == 0))
				S->col[i] = (int)k;
	}
	if (S->col[IN_DTP] >= 0 && S->col[IN_VP] >= 0)
		S->col[IN_VP] = -1; /* the slowness is the measured one */
	if (S->col[IN_DTS] >= 0 && S->col[IN_VS] >= 0)
		S->col[IN_VS] = -1;
	if (S->col[IN_DTP] < 0 && S->col[IN_VP] < 0) {
		fprintf(stderr,
		        WHO
		        ": %s has no P sonic (DT, DTC, DTCO, DTP, AC or VP): "
		        "name it with --curve dtp=MNEM\n",
		        S->path);
		return CLI_EXIT_INPUT;
	}
	if (S->col[IN_RHO] < 0) {
		fprintf(stderr,
		        WHO ": %s has no density (RHOB, RHOZ, ZDEN, DEN): name "
		            "it with --curve rhob=MNEM\n",
		        S->path);
		return CLI_EXIT_INPUT;
	}
	for (size_t i = 0; i < N_IN; i++) {
		const cli_las_line *cv;
		char list[512];
		if (S->col[i] < 0)
			continue;
		cv = cli_las_curve(S->r, (size_t)S->col[i]);
		if (cli__unit_factor(&S->units, cv->unit, inputs[i].kind, NULL,
		                     &S->scale[i], &S->offset[i]) == 0)
			continue;
		cli__unit_list(&S->units, inputs[i].kind, list, sizeof list);
		fprintf(stderr,
		        WHO ": curve %s (line %lu) feeds %s, but its unit '%s' "
		            "is not a %s unit; accepted: %s\n",
		        cv->mnem, cv->lineno, inputs[i].name, cv->unit,
		        inputs[i].kind, list);
		return CLI_EXIT_INPUT;
	}
	return 0;
}

/* The curve of input `in` in the protocol's default unit as a JSON array
 * (null for a missing value). */
static cJSON *curve_json(const synth *S, int in)
{
	cJSON *a = cJSON_CreateArray();
	int k = S->col[in];
	for (size_t i = 0; a && i < S->nrows; i++) {
		double v = S->rows[i * S->ncurves + (size_t)k];
		cJSON_AddItemToArray(
		    a, isnan(v) ? cJSON_CreateNull()
		                : cJSON_CreateNumber(v * S->scale[in] +
		                                     S->offset[in]));
	}
	return a;
}

/* The well's name from ~W WELL, printable ASCII only. */
static void well_name(synth *S)
{
	const cli_las_line *w = cli_las_find(S->r, 'W', "WELL");
	const char *src = w && w->value[0] ? w->value : S->path;
	size_t j = 0;
	for (size_t i = 0; src[i] && j + 1 < sizeof S->well && j < 60; i++)
		if (src[i] >= 0x20 && src[i] < 0x7f)
			S->well[j++] = src[i];
	if (!j)
		S->well[j++] = '?';
	S->well[j] = '\0';
}

/* Checkshots from a CSV file: depth (first column) and a TWT or OWT
 * column, in the units its header states (default m and ms). */
static int read_checkshots(synth *S, cJSON *params)
{
	FILE *f = fopen(S->cs_path, "rb");
	cli_las_reader *r;
	double rows[4096 * 8];
	cJSON *cs, *dz, *dt;
	int tcol = -1, owt = 0, st, rc = CLI_EXIT_INPUT;
	double zs = 1, zo = 0, ts = 1, to = 0;
	size_t nc;

	if (!f) {
		fprintf(stderr, WHO ": %s: %s\n", S->cs_path, strerror(errno));
		return CLI_EXIT_IO;
	}
	r = cli_las_reader_new();
	if (!r) {
		fclose(f);
		return CLI_EXIT_IO;
	}
	cli_las_set_csv(r, -999.25);
	st = cli_las_read(r, f);
	if (st != CLI_LAS_HEADER) {
		fprintf(stderr, WHO ": %s: %s\n", S->cs_path,
		        st == CLI_LAS_ERR ? cli_las_error(r) : "no data");
		goto out;
	}
	nc = cli_las_ncurves(r);
	for (size_t k = 1; k < nc; k++) {
		const char *m = cli_las_curve(r, k)->mnem;
		if (strncasecmp(m, "TWT", 3) == 0 ||
		    strncasecmp(m, "OWT", 3) == 0) {
			tcol = (int)k;
			owt = toupper((unsigned char)m[0]) == 'O';
			break;
		}
	}
	if (tcol < 0 || nc > 8) {
		fprintf(stderr,
		        WHO ": %s: want the depth first and a TWT (two-way) or "
		            "OWT (one-way) time column, at most 8 columns\n",
		        S->cs_path);
		goto out;
	}
	{
		const char *zu = cli_las_curve(r, 0)->unit;
		const char *tu = cli_las_curve(r, (size_t)tcol)->unit;
		if ((zu[0] && cli__unit_factor(&S->units, zu, "length", NULL,
		                               &zs, &zo)) ||
		    (tu[0] &&
		     cli__unit_factor(&S->units, tu, "time", NULL, &ts, &to))) {
			fprintf(stderr,
			        WHO ": %s: the units '%s' and '%s' are not a "
			            "length and a time\n",
			        S->cs_path, zu, tu);
			goto out;
		}
	}
	cli_las_set_block(r, rows, 4096);
	st = cli_las_read(r, f);
	if (st == CLI_LAS_ERR || cli_las_rows(r) == 0) {
		fprintf(stderr, WHO ": %s: %s\n", S->cs_path,
		        st == CLI_LAS_ERR ? cli_las_error(r)
		                          : "no checkshot rows");
		goto out;
	}
	cs = cJSON_AddObjectToObject(params, "checkshots");
	dz = cJSON_AddArrayToObject(cs, "depth");
	dt = cJSON_AddArrayToObject(cs, owt ? "owt" : "twt");
	for (size_t i = 0; i < cli_las_rows(r); i++) {
		double z = rows[i * nc], t = rows[i * nc + (size_t)tcol];
		if (isnan(z) || isnan(t)) {
			fprintf(stderr,
			        WHO ": %s: checkshot row %zu has a "
			            "missing value\n",
			        S->cs_path, i + 1);
			goto out;
		}
		cJSON_AddItemToArray(dz, cJSON_CreateNumber(z * zs + zo));
		/* to ms: the daemon's time default */
		cJSON_AddItemToArray(dt, cJSON_CreateNumber((t * ts + to)));
	}
	rc = 0;
out:
	cli_las_reader_free(r);
	fclose(f);
	return rc;
}

/* ---- requests ----------------------------------------------------------- */

/* Sends one request and takes its result; on an error answer prints it
 * with a suggestion and returns CLI_EXIT_RPC_ERROR. */
static int request(cli_conn *c, const cJSON *disc, const char *method,
                   const cJSON *params, long id, long long deadline,
                   cJSON **resp, const cJSON **res)
{
	int rc = cli__roundtrip(c, WHO, method, params, id, deadline, resp);
	const cJSON *err;
	if (rc)
		return rc;
	err = cJSON_GetObjectItemCaseSensitive(*resp, "error");
	if (err) {
		cli__print_error(stderr, WHO, err);
		cli__explain_error(stderr, WHO, disc, method, params, err);
		return CLI_EXIT_RPC_ERROR;
	}
	*res = cJSON_GetObjectItemCaseSensitive(*resp, "result");
	return 0;
}

static double jnum(const cJSON *a, size_t i)
{
	const cJSON *v = cJSON_IsArray(a) ? cJSON_GetArrayItem(a, (int)i) : a;
	return cJSON_IsNumber(v) ? v->valuedouble : NAN;
}

static void print_warnings(const cJSON *res)
{
	const cJSON *w, *e;
	w = cJSON_GetObjectItemCaseSensitive(res, "warnings");
	cJSON_ArrayForEach(e, w) if (cJSON_IsString(e))
	    fprintf(stderr, WHO ": note: %s\n", e->valuestring);
}

/* ---- outputs ------------------------------------------------------------ */

static void put(FILE *f, double v)
{
	char b[48];
	cli__fmt_num(b, v, 9, "");
	fputs(b, f);
}

static void csv_notes(FILE *f, const synth *S, const char *what)
{
	fprintf(f, "# %s\n", caution);
	fprintf(f, "# well: %s; %s from %s by rockwire synthetic\n", S->well,
	        what, S->path);
	fprintf(f, "# primaries only: no transmission loss, multiples, "
	           "spreading or attenuation\n");
}

static int write_traces_csv(FILE *f, const synth *S, const cJSON *res,
                            const char *desc)
{
	const cJSON *t = cJSON_GetObjectItemCaseSensitive(res, "time");
	const cJSON *d = cJSON_GetObjectItemCaseSensitive(res, "depth");
	const cJSON *tr = cJSON_GetObjectItemCaseSensitive(res, "traces");
	size_t nt = (size_t)cJSON_GetArraySize(t);

	csv_notes(f, S, "synthetic traces");
	fprintf(f, "# %s\n", desc);
	fprintf(f, "# empty field: null (a null log sample within the "
	           "wavelet's reach)\n");
	fprintf(f, "TIME[ms],DEPTH[m]");
	for (size_t a = 0; a < S->na; a++)
		fprintf(f, ",SYN_%g", S->angles[a]);
	fputc('\n', f);
	for (size_t k = 0; k < nt; k++) {
		put(f, jnum(t, k));
		fputc(',', f);
		put(f, jnum(d, k));
		for (size_t a = 0; a < S->na; a++) {
			fputc(',', f);
			put(f, jnum(cJSON_GetArrayItem(tr, (int)a), k));
		}
		fputc('\n', f);
	}
	return ferror(f) ? -1 : 0;
}

static int write_td_csv(FILE *f, const synth *S, const cJSON *td,
                        const cJSON *depth)
{
	const cJSON *twt = cJSON_GetObjectItemCaseSensitive(td, "twt");
	const cJSON *son = cJSON_GetObjectItemCaseSensitive(td, "twt_sonic");
	const cJSON *dr = cJSON_GetObjectItemCaseSensitive(td, "drift");
	const cJSON *qc = cJSON_GetObjectItemCaseSensitive(td, "qc");

	csv_notes(f, S, "time-depth relation");
	fprintf(f,
	        "# TWT: two-way time from the datum (%s); QC: flag bits "
	        "(0 clean; rockwire call service.info lists them)\n",
	        dr ? "sonic corrected by the checkshot drift"
	           : "sonic, no checkshots");
	fprintf(f, "DEPTH[m],TWT[ms],TWT_SONIC[ms]%s,QC\n",
	        dr ? ",DRIFT[ms]" : "");
	for (size_t i = 0; i < S->nrows; i++) {
		put(f, jnum(depth, i));
		fputc(',', f);
		put(f, jnum(twt, i));
		fputc(',', f);
		put(f, jnum(son, i));
		if (dr) {
			fputc(',', f);
			put(f, jnum(dr, i));
		}
		fprintf(f, ",%.0f\n", jnum(qc, i));
	}
	return ferror(f) ? -1 : 0;
}

static int write_segy(const synth *S, const cJSON *res, const char *desc,
                      const char *wdesc)
{
	const cJSON *tr = cJSON_GetObjectItemCaseSensitive(res, "traces");
	size_t nt =
	    (size_t)jnum(cJSON_GetObjectItemCaseSensitive(res, "n_samples"), 0);
	double t0 = jnum(cJSON_GetObjectItemCaseSensitive(res, "t0"), 0);
	double dt = jnum(cJSON_GetObjectItemCaseSensitive(res, "dt"), 0);
	double *data = malloc(S->na * (nt ? nt : 1) * sizeof *data);
	char notes[6][CLI_SEGY_TEXT_WIDTH + 1], err[256], tmp[4096];
	const char *np[6];
	cli_segy_spec sp;
	size_t nnull = 0;
	int scale = 1;
	FILE *f;

	if (!data) {
		fprintf(stderr, WHO ": out of memory\n");
		return CLI_EXIT_IO;
	}
	for (size_t a = 0; a < S->na; a++)
		for (size_t k = 0; k < nt; k++)
			data[a * nt + k] =
			    jnum(cJSON_GetArrayItem(tr, (int)a), k);
	/* the smallest angle scale that holds every angle exactly */
	while (scale < 1000) {
		int ok = 1;
		for (size_t a = 0; a < S->na; a++) {
			double x = S->angles[a] * scale;
			ok &= fabs(x - round(x)) <= 1e-6;
		}
		if (ok)
			break;
		scale *= 10;
	}
	snprintf(notes[0], sizeof notes[0], "SYNTHETIC ANGLE GATHER FROM %.40s",
	         S->path);
	snprintf(notes[1], sizeof notes[1], "%.76s", desc);
	snprintf(notes[2], sizeof notes[2], "%.76s", wdesc);
	snprintf(notes[3], sizeof notes[3],
	         "PRIMARIES ONLY: NO TRANSMISSION LOSS, MULTIPLES, SPREADING");
	snprintf(notes[4], sizeof notes[4],
	         "OR ATTENUATION; EACH ANGLE TAKEN AT EVERY INTERFACE");
	snprintf(notes[5], sizeof notes[5], "NULL SAMPLES WRITTEN AS %g",
	         S->segy_null);
	for (int k = 0; k < 6; k++)
		np[k] = notes[k];
	memset(&sp, 0, sizeof sp);
	sp.well = S->well;
	sp.notes = np;
	sp.n_notes = 6;
	sp.dt_s = dt * 1e-3;
	sp.t0_s = t0 * 1e-3;
	sp.ns = nt;
	sp.ntr = S->na;
	sp.key = CLI_SEGY_KEY_ANGLE;
	sp.key_value = S->angles;
	sp.key_scale = scale;
	sp.ensemble = 1;
	sp.null_value = (float)S->segy_null;
	f = open_part(S->segy, tmp, sizeof tmp);
	if (!f) {
		free(data);
		return CLI_EXIT_IO;
	}
	if (cli_segy_write(f, &sp, data, &nnull, err, sizeof err)) {
		fprintf(stderr, WHO ": %s: %s\n", S->segy, err);
		fclose(f);
		unlink(tmp);
		free(data);
		return CLI_EXIT_IO;
	}
	free(data);
	return finish_part(f, tmp, S->segy) ? CLI_EXIT_IO : 0;
}

/* Writes a CSV through a temporary file (or stdout when path is NULL). */
static int write_csv_file(const char *path, const synth *S, const cJSON *a,
                          const cJSON *b, const char *desc, int traces)
{
	char tmp[4096];
	FILE *f = path ? open_part(path, tmp, sizeof tmp) : stdout;
	int bad;
	if (!f)
		return CLI_EXIT_IO;
	bad =
	    traces ? write_traces_csv(f, S, a, desc) : write_td_csv(f, S, a, b);
	if (!path)
		return bad || fflush(stdout) ? CLI_EXIT_IO : 0;
	if (bad) {
		fprintf(stderr, WHO ": cannot write %s\n", path);
		fclose(f);
		unlink(tmp);
		return CLI_EXIT_IO;
	}
	return finish_part(f, tmp, path) ? CLI_EXIT_IO : 0;
}

/* ---- the command -------------------------------------------------------- */

int cli_cmd_synthetic(const cli_opts *o, int argc, char **argv)
{
	static const char *const opts[] = {
	    "--angles",     "--wavelet",     "--length",     "--phase",
	    "--dt",         "--method",      "--stretch",    "--keep-partial",
	    "--checkshots", "--datum-depth", "--datum-time", "--vrep",
	    "--curve",      "--input",       "--null",       "--csv",
	    "--td-csv",     "--segy",        "--segy-null",  "--help"};
	synth S;
	cJSON *info = NULL, *disc = NULL, *tdp = NULL, *syp = NULL;
	cJSON *tdr = NULL, *syr = NULL, *wav, *axis, *depth_json = NULL;
	const cJSON *tdres, *syres;
	char desc[160], wdesc[160];
	cli_conn c;
	int connected = 0, rc = CLI_EXIT_USAGE, st;
	long long deadline;
	FILE *in = NULL;

	memset(&S, 0, sizeof S);
	snprintf(S.kind, sizeof S.kind, "ricker");
	S.freq = 30;
	S.length_ms = 128;
	S.dt_ms = 2;
	S.method = "zoeppritz";
	S.na = 1;
	S.csv_null = -999.25;
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		int flag = strcmp(a, "--stretch") == 0 ||
		           strcmp(a, "--keep-partial") == 0;
		int known = 0;
		for (size_t k = 0; k < sizeof opts / sizeof *opts; k++)
			known |= strcmp(a, opts[k]) == 0;
		if (a[0] == '-' && a[1] && !known) {
			cli__unknown_option(WHO, a, opts,
			                    sizeof opts / sizeof *opts);
			goto out;
		}
		if (!known) {
			if (S.path) {
				fprintf(stderr, WHO ": one input file only\n");
				goto usage;
			}
			S.path = a;
			continue;
		}
		if (flag) {
			if (a[2] == 's')
				S.stretch = 1;
			else
				S.keep = 1;
			continue;
		}
		if (!v) {
			fprintf(stderr, WHO ": %s needs a value\n", a);
			goto usage;
		}
		i++;
		if (strcmp(a, "--angles") == 0) {
			if (parse_angles(&S, v)) {
				fprintf(stderr,
				        WHO
				        ": --angles wants FIRST:LAST:STEP or "
				        "a comma list of degrees (at most "
				        "%d), not '%s'\n",
				        MAX_ANGLES, v);
				goto usage;
			}
		} else if (strcmp(a, "--wavelet") == 0) {
			int w = parse_wavelet(&S, v);
			if (w) {
				static const char *const kinds[] = {
				    "ricker", "ormsby", "bandpass"};
				const char *s =
				    w == -2 ? cli__suggest(S.kind, kinds, 3)
				            : NULL;
				fprintf(
				    stderr,
				    WHO
				    ": --wavelet wants ricker:FREQ, "
				    "ormsby:F1,F2,F3,F4 or "
				    "bandpass:F1,F2,F3,F4, not '%s'%s%s%s\n",
				    v, s ? " (did you mean " : "", s ? s : "",
				    s ? "?)" : "");
				goto usage;
			}
		} else if (strcmp(a, "--method") == 0) {
			S.method = v;
		} else if (strcmp(a, "--checkshots") == 0) {
			S.cs_path = v;
		} else if (strcmp(a, "--csv") == 0) {
			S.csv = v;
		} else if (strcmp(a, "--td-csv") == 0) {
			S.td_csv = v;
		} else if (strcmp(a, "--segy") == 0) {
			S.segy = v;
		} else if (strcmp(a, "--curve") == 0) {
			if (S.nmaps == N_IN) {
				fprintf(stderr, WHO ": too many --curve\n");
				goto usage;
			}
			S.maps[S.nmaps++] = argv[i];
		} else if (strcmp(a, "--input") == 0) {
			if (strcmp(v, "las") && strcmp(v, "csv")) {
				fprintf(stderr,
				        WHO ": --input is las or csv, not "
				            "'%s'\n",
				        v);
				goto usage;
			}
			S.input_csv = strcmp(v, "csv") == 0 ? 1 : -1;
		} else {
			double x;
			if (parse_double(v, &x)) {
				fprintf(stderr,
				        WHO ": %s wants a number, not "
				            "'%s'\n",
				        a, v);
				goto usage;
			}
			if (strcmp(a, "--length") == 0)
				S.length_ms = x;
			else if (strcmp(a, "--phase") == 0)
				S.phase_deg = x;
			else if (strcmp(a, "--dt") == 0)
				S.dt_ms = x;
			else if (strcmp(a, "--datum-depth") == 0)
				S.datum_z = x, S.have_datum_z = 1;
			else if (strcmp(a, "--datum-time") == 0)
				S.datum_t = x, S.have_datum_t = 1;
			else if (strcmp(a, "--vrep") == 0)
				S.vrep = x, S.have_vrep = 1;
			else if (strcmp(a, "--null") == 0)
				S.csv_null = x;
			else
				S.segy_null = x;
		}
	}
	if (!S.path)
		goto usage;
	/* whole microseconds and milliseconds, as SEG-Y stores them */
	{
		double us = S.dt_ms * 1000;
		if (!(us >= 1 && us <= 65535) || fabs(us - round(us)) > 1e-6) {
			fprintf(stderr,
			        WHO ": --dt %g: the sample interval must be a "
			            "whole number of microseconds, 0.001 to "
			            "65.535 ms\n",
			        S.dt_ms);
			goto usage;
		}
	}
	in = strcmp(S.path, "-") == 0 ? stdin : fopen(S.path, "rb");
	if (!in) {
		fprintf(stderr, WHO ": %s: %s\n", S.path, strerror(errno));
		rc = CLI_EXIT_IO;
		goto out;
	}
	S.r = cli_las_reader_new();
	if (!S.r) {
		rc = CLI_EXIT_IO;
		goto out;
	}
	if (S.input_csv > 0 ||
	    (!S.input_csv && strlen(S.path) > 4 &&
	     strcasecmp(S.path + strlen(S.path) - 4, ".csv") == 0))
		cli_las_set_csv(S.r, S.csv_null);
	cli_las_set_order_check(S.r, 1);
	st = cli_las_read(S.r, in);
	if (st != CLI_LAS_HEADER) {
		fprintf(stderr, WHO ": %s: %s\n", S.path,
		        st == CLI_LAS_ERR ? cli_las_error(S.r)
		                          : "no ~A section: not a LAS file");
		rc = CLI_EXIT_INPUT;
		goto out;
	}
	S.ncurves = cli_las_ncurves(S.r);
	if ((rc = read_all(&S, in)))
		goto out;
	if (S.nrows < 2) {
		fprintf(stderr,
		        WHO ": %s: a synthetic needs at least two "
		            "depth samples\n",
		        S.path);
		rc = CLI_EXIT_INPUT;
		goto out;
	}
	well_name(&S);
	if (cli_connect(o, &c)) {
		rc = CLI_EXIT_CONNECT;
		goto out;
	}
	connected = 1;
	deadline =
	    cli__now_ms() +
	    (o->timeout_ms > 0 ? o->timeout_ms : CLI_DEFAULT_CALL_TIMEOUT_MS);
	if ((rc = cli__fetch_info(&c, WHO, deadline, &info, &disc)))
		goto out;
	rc = CLI_EXIT_IO;
	if (cli__units_load(&S.units, info)) {
		fprintf(stderr, WHO ": the daemon's service.info has no unit "
		                    "table\n");
		goto out;
	}
	if ((rc = map_curves(&S)))
		goto out;
	if (S.na && (S.angles[S.na - 1] > 0 || S.angles[0] > 0) &&
	    S.col[IN_DTS] < 0 && S.col[IN_VS] < 0) {
		fprintf(stderr,
		        WHO ": angles above 0 need a shear curve (DTS, DTSM, "
		            "DTSH or VS; --curve dts=MNEM)\n");
		rc = CLI_EXIT_INPUT;
		goto out;
	}
	/* 1. the time-depth relation */
	tdp = cJSON_CreateObject();
	depth_json = curve_json(&S, IN_DEPTH);
	cJSON_AddItemToObject(tdp, "depth", cJSON_Duplicate(depth_json, 1));
	if (S.col[IN_DTP] >= 0)
		cJSON_AddItemToObject(tdp, "dtp", curve_json(&S, IN_DTP));
	else
		cJSON_AddItemToObject(tdp, "vp", curve_json(&S, IN_VP));
	if (S.have_datum_z || S.have_datum_t || S.have_vrep) {
		cJSON *d = cJSON_AddObjectToObject(tdp, "datum");
		if (S.have_datum_z)
			cJSON_AddNumberToObject(d, "depth",
			                        S.datum_z * S.scale[IN_DEPTH] +
			                            S.offset[IN_DEPTH]);
		if (S.have_datum_t)
			cJSON_AddNumberToObject(d, "twt", S.datum_t);
		if (S.have_vrep)
			cJSON_AddNumberToObject(d, "vrep", S.vrep);
	}
	if (S.cs_path && (rc = read_checkshots(&S, tdp)))
		goto out;
	if ((rc = request(&c, disc, "seismic.timedepth", tdp, 10, deadline,
	                  &tdr, &tdres)))
		goto out;
	print_warnings(tdres);
	/* 2. the axis: whole milliseconds, covering the log and the
	 * wavelet (stretched at the largest angle) */
	{
		const cJSON *twt =
		    cJSON_GetObjectItemCaseSensitive(tdres, "twt");
		double top = jnum(twt, 0), bot = jnum(twt, S.nrows - 1);
		double maxa = 0, half, step, t0;
		long us = lround(S.dt_ms * 1000), m = 1;
		for (size_t a = 0; a < S.na; a++)
			if (S.angles[a] > maxa)
				maxa = S.angles[a];
		half =
		    0.5 * S.length_ms *
		    (S.stretch && maxa < 90 ? 1 / cos(maxa * M_PI / 180) : 1);
		while ((us * m) % 1000)
			m++;
		step = (double)(us * m) / 1000.0;
		t0 = floor((top - half) / step) * step;
		if (t0 < 0)
			t0 = 0;
		syp = cJSON_CreateObject();
		cJSON_AddItemToObject(syp, "depth", depth_json);
		depth_json = NULL;
		if (S.col[IN_DTP] >= 0)
			cJSON_AddItemToObject(syp, "dtp",
			                      curve_json(&S, IN_DTP));
		else
			cJSON_AddItemToObject(syp, "vp", curve_json(&S, IN_VP));
		if (S.col[IN_DTS] >= 0)
			cJSON_AddItemToObject(syp, "dts",
			                      curve_json(&S, IN_DTS));
		else if (S.col[IN_VS] >= 0)
			cJSON_AddItemToObject(syp, "vs", curve_json(&S, IN_VS));
		cJSON_AddItemToObject(syp, "rho", curve_json(&S, IN_RHO));
		cJSON_AddItemToObject(syp, "twt", cJSON_Duplicate(twt, 1));
		wav = cJSON_AddObjectToObject(syp, "wavelet");
		cJSON_AddStringToObject(wav, "kind", S.kind);
		if (strcmp(S.kind, "ricker") == 0) {
			cJSON_AddNumberToObject(wav, "frequency", S.freq);
			snprintf(wdesc, sizeof wdesc,
			         "WAVELET RICKER %g HZ, %g MS, PHASE %g DEG",
			         S.freq, S.length_ms, S.phase_deg);
		} else {
			cJSON_AddItemToObject(
			    wav, "corners",
			    cJSON_CreateDoubleArray(S.corners, 4));
			snprintf(
			    wdesc, sizeof wdesc,
			    "WAVELET %s %g-%g-%g-%g HZ, %g MS, PHASE %g DEG",
			    strcmp(S.kind, "ormsby") ? "BANDPASS" : "ORMSBY",
			    S.corners[0], S.corners[1], S.corners[2],
			    S.corners[3], S.length_ms, S.phase_deg);
		}
		cJSON_AddNumberToObject(wav, "length", S.length_ms);
		cJSON_AddNumberToObject(wav, "phase", S.phase_deg);
		cJSON_AddItemToObject(
		    syp, "angle", cJSON_CreateDoubleArray(S.angles, (int)S.na));
		cJSON_AddStringToObject(syp, "method", S.method);
		cJSON_AddBoolToObject(syp, "stretch", S.stretch);
		cJSON_AddStringToObject(syp, "nulls", S.keep ? "keep" : "null");
		axis = cJSON_AddObjectToObject(syp, "axis");
		cJSON_AddNumberToObject(axis, "t0", t0);
		cJSON_AddNumberToObject(axis, "dt", S.dt_ms);
		cJSON_AddNumberToObject(
		    axis, "n", ceil((bot + half - t0) / S.dt_ms - 1e-9) + 1);
	}
	if ((rc = request(&c, disc, "seismic.synthetic", syp, 11, deadline,
	                  &syr, &syres)))
		goto out;
	print_warnings(syres);
	snprintf(desc, sizeof desc, "PP %s, %s, NULLS %s, T-D %s", S.method,
	         S.stretch ? "STRETCHED" : "NO STRETCH",
	         S.keep ? "KEPT" : "NULL", S.cs_path ? "CHECKSHOTS" : "SONIC");
	for (char *p = desc; *p; p++)
		*p = (char)toupper((unsigned char)*p);
	rc = 0;
	if (S.td_csv)
		rc = write_csv_file(
		    S.td_csv, &S, tdres,
		    cJSON_GetObjectItemCaseSensitive(syp, "depth"), desc, 0);
	if (!rc && (S.csv || (!S.td_csv && !S.segy)))
		rc = write_csv_file(S.csv, &S, syres, NULL, desc, 1);
	if (!rc && S.segy)
		rc = write_segy(&S, syres, desc, wdesc);
	goto out;
usage:
	fprintf(stderr, "(rockwire synthetic --help lists the options)\n");
	rc = CLI_EXIT_USAGE;
out:
	if (connected)
		cli_disconnect(&c);
	if (in && in != stdin)
		fclose(in);
	cli_las_reader_free(S.r);
	free(S.rows);
	cJSON_Delete(depth_json);
	cJSON_Delete(tdp);
	cJSON_Delete(syp);
	cJSON_Delete(tdr);
	cJSON_Delete(syr);
	cJSON_Delete(info);
	cJSON_Delete(disc);
	return rc;
}
