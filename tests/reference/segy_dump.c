/* Driver of the SEG-Y writer (client/segy.c) for the read-back check with
 * Debian's python3-segyio (tests/reference/test_segy_segyio.py).
 *   segy_dump ebcdic
 *       prints the EBCDIC code of every printable ASCII character.
 *   segy_dump write PATH WELL DT T0 NS NTR SCALE NULL
 *       reads NTR angles then NTR x NS samples ("nan" for null) from
 *       stdin and writes an angle gather.
 *   segy_dump chain LAS PATH
 *       reads a LAS 2.0 file with the client's reader (curves DEPT, DT
 *       in us/ft, DTS in us/ft, RHOB in g/cm3), builds the time-depth
 *       relation with the invented checkshots below, a 30 Hz Ricker and
 *       a Zoeppritz gather at 0-30 degrees with the core, and writes it.
 * Each mode prints one JSON line (status, counts, the parameters used);
 * exit status 1 on a failure. The checkshots and the replacement velocity
 * are invented demonstration values for the invented well. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "las.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"
#include "segy.h"

/* Invented: datum at 0 m and 0 s, replacement velocity above the log,
 * checkshots (depth m, two-way time s) of the demo well. */
#define DATUM_VREP 1800.0
static const double cs_z[3] = {1000.0, 1600.0, 1700.0};
static const double cs_t[3] = {1.1080, 1.7310, 1.8049};

static double num(void)
{
	char b[64], *end;
	double v;

	if (scanf("%63s", b) != 1) {
		fprintf(stderr, "segy_dump: unexpected end of input\n");
		exit(1);
	}
	if (strcmp(b, "nan") == 0)
		return NAN;
	v = strtod(b, &end);
	if (end == b || *end != '\0') {
		fprintf(stderr, "segy_dump: not a number: %s\n", b);
		exit(1);
	}
	return v;
}

static double arg_num(const char *s)
{
	char *end;
	double v = strtod(s, &end);

	if (end == s || *end != '\0') {
		fprintf(stderr, "segy_dump: not a number: %s\n", s);
		exit(2);
	}
	return v;
}

static void *xalloc(size_t n, size_t sz)
{
	void *p = calloc(n ? n : 1, sz);

	if (p == NULL) {
		fprintf(stderr, "segy_dump: out of memory\n");
		exit(1);
	}
	return p;
}

static void json_str(const char *s)
{
	putchar('"');
	for (; *s; s++) {
		if (*s == '"' || *s == '\\')
			putchar('\\');
		putchar(*s >= 0x20 ? *s : ' ');
	}
	putchar('"');
}

static void json_arr(const char *name, const double *x, size_t n)
{
	size_t i;

	printf(",\"%s\":[", name);
	for (i = 0; i < n; i++) {
		if (i)
			putchar(',');
		if (isfinite(x[i]))
			printf("%.17g", x[i]);
		else
			fputs("null", stdout);
	}
	putchar(']');
}

static int mode_write(int argc, char **argv)
{
	cli_segy_spec s;
	double *ang, *data;
	size_t i, nn = 0;
	char err[256] = "";
	int st;

	if (argc != 10) {
		fprintf(stderr, "usage: segy_dump write PATH WELL DT T0 NS NTR "
		                "SCALE NULL\n");
		return 2;
	}
	memset(&s, 0, sizeof s);
	s.well = argv[3];
	s.dt_s = arg_num(argv[4]);
	s.t0_s = arg_num(argv[5]);
	s.ns = (size_t)arg_num(argv[6]);
	s.ntr = (size_t)arg_num(argv[7]);
	s.key = CLI_SEGY_KEY_ANGLE;
	s.key_scale = (int)arg_num(argv[8]);
	s.null_value = (float)arg_num(argv[9]);
	s.ensemble = 1;
	ang = xalloc(s.ntr, sizeof(double));
	data = xalloc(s.ntr * s.ns, sizeof(double));
	for (i = 0; i < s.ntr; i++)
		ang[i] = num();
	for (i = 0; i < s.ntr * s.ns; i++)
		data[i] = num();
	s.key_value = ang;
	st = cli_segy_write_path(argv[2], &s, data, &nn, err, sizeof err);
	printf("{\"status\":%d,\"nulls\":%zu,\"err\":", st, nn);
	json_str(err);
	puts("}");
	free(ang);
	free(data);
	return st == 0 ? 0 : 1;
}

/* Column of a curve by mnemonic, or -1. */
static long column(const cli_las_reader *r, const char *mnem)
{
	size_t i;

	for (i = 0; i < cli_las_ncurves(r); i++)
		if (strcmp(cli_las_curve(r, i)->mnem, mnem) == 0)
			return (long)i;
	return -1;
}

static int mode_chain(int argc, char **argv)
{
	enum { MAXROWS = 100000, NA = 7 };
	cli_las_reader *r;
	FILE *fp;
	double *rows, *z, *vp, *vs, *rho, *twt, drift[3], w[1024], *tr, *work;
	double ang[NA], angdeg[NA];
	long cz, cdt, cdts, crho;
	size_t n = 0, i, nc, nw, nn = 0, wl;
	rw_seis_datum d = {0.0, 0.0, DATUM_VREP};
	rw_seis_td td;
	rw_seis_log log;
	rw_seis_wavelet wav;
	rw_seis_taxis ax;
	rw_seis_synth_opts o = {RW_SEIS_R_ZOEPPRITZ, 0, 0, RW_SEIS_CONV_AUTO};
	cli_segy_spec s;
	static const char *const notes[] = {
	    ("INVENTED DEMONSTRATION WELL AND CHECKSHOTS; NOT FROM ANY REAL "
	     "WELL"),
	    "REFLECTIVITY: EXACT ZOEPPRITZ PP, CONSTANT ANGLE PER TRACE",
	    "WAVELET: RICKER 30 HZ ZERO PHASE, 128 MS; NO NMO STRETCH",
	    "TIME-DEPTH: SONIC INTEGRATED, CHECKSHOT DRIFT CORRECTED",
	    "NULL SAMPLES: WITHIN THE WAVELET'S REACH OF A MISSING SHEAR LOG"};
	char err[256] = "";
	int st;

	if (argc != 4) {
		fprintf(stderr, "usage: segy_dump chain LAS PATH\n");
		return 2;
	}
	fp = fopen(argv[2], "r");
	if (fp == NULL) {
		fprintf(stderr, "segy_dump: cannot open %s\n", argv[2]);
		return 1;
	}
	r = cli_las_reader_new();
	if (r == NULL)
		return 1;
	if (cli_las_read(r, fp) != CLI_LAS_HEADER) {
		fprintf(stderr, "segy_dump: %s\n", cli_las_error(r));
		return 1;
	}
	nc = cli_las_ncurves(r);
	rows = xalloc((size_t)MAXROWS * nc, sizeof(double));
	cli_las_set_block(r, rows, MAXROWS);
	if (cli_las_read(r, fp) != CLI_LAS_OK) {
		fprintf(stderr, "segy_dump: %s\n", cli_las_error(r));
		return 1;
	}
	n = cli_las_rows(r);
	fclose(fp);
	cz = column(r, "DEPT");
	cdt = column(r, "DT");
	cdts = column(r, "DTS");
	crho = column(r, "RHOB");
	if (cz < 0 || cdt < 0 || cdts < 0 || crho < 0 || n < 2) {
		fprintf(stderr, "segy_dump: curves DEPT DT DTS RHOB needed\n");
		return 1;
	}
	z = xalloc(n, sizeof(double));
	vp = xalloc(n, sizeof(double));
	vs = xalloc(n, sizeof(double));
	rho = xalloc(n, sizeof(double));
	twt = xalloc(n, sizeof(double));
	for (i = 0; i < n; i++) {
		/* us/ft to m/s, g/cm3 to kg/m3 */
		z[i] = rows[i * nc + (size_t)cz];
		vp[i] = 0.3048e6 / rows[i * nc + (size_t)cdt];
		vs[i] = 0.3048e6 / rows[i * nc + (size_t)cdts];
		rho[i] = 1000.0 * rows[i * nc + (size_t)crho];
	}
	st = rw_seis_td_sonic(z, vp, n, RW_SEIS_SONIC_VELOCITY, &d, twt, NULL);
	td.z_m = z;
	td.twt_s = twt;
	td.n = n;
	td.datum_z_m = d.z_m;
	td.datum_twt_s = d.twt_s;
	td.cs_z_m = cs_z;
	td.cs_drift_s = drift;
	td.n_cs = 3;
	if (st == RW_OK)
		st = rw_seis_td_drift(&td, cs_t, drift);
	if (st == RW_OK)
		st = rw_seis_wavelet_ricker(30.0, 0.128, 0.002, w, 1024, &nw,
		                            NULL);
	if (st != RW_OK) {
		fprintf(stderr, "segy_dump: %s\n", rw_strerror(st));
		return 1;
	}
	log.z_m = z;
	log.vp_ms = vp;
	log.vs_ms = vs;
	log.rho_kgm3 = rho;
	log.n = n;
	wav.w = w;
	wav.n = nw;
	wav.i0 = (nw - 1) / 2;
	wav.dt_s = 0.002;
	ax.t0_s = 1.640;
	ax.dt_s = 0.002;
	ax.n = 110;
	for (i = 0; i < NA; i++) {
		angdeg[i] = 5.0 * (double)i;
		ang[i] = angdeg[i] * M_PI / 180.0;
	}
	wl = rw_seis_synthetic_workspace(ax.n, nw, ang[NA - 1], 0);
	work = xalloc(wl, sizeof(double));
	tr = xalloc(NA * ax.n, sizeof(double));
	st = rw_seis_synthetic(&log, &td, ang, NA, &wav, &ax, &o, tr, NULL,
	                       NULL, work, wl);
	if (st != RW_OK) {
		fprintf(stderr, "segy_dump: synthetic: %s\n", rw_strerror(st));
		return 1;
	}
	memset(&s, 0, sizeof s);
	s.well = "ORRIMUND 3";
	s.notes = notes;
	s.n_notes = sizeof notes / sizeof notes[0];
	s.dt_s = ax.dt_s;
	s.t0_s = ax.t0_s;
	s.ns = ax.n;
	s.ntr = NA;
	s.key = CLI_SEGY_KEY_ANGLE;
	s.key_value = angdeg;
	s.key_scale = 1;
	s.ensemble = 1;
	s.null_value = 0.0f;
	st = cli_segy_write_path(argv[3], &s, tr, &nn, err, sizeof err);
	printf("{\"status\":%d,\"nulls\":%zu,\"err\":", st, nn);
	json_str(err);
	printf(",\"vrep\":%.17g", DATUM_VREP);
	json_arr("cs_z", cs_z, 3);
	json_arr("cs_t", cs_t, 3);
	json_arr("wavelet", w, nw);
	json_arr("angles_deg", angdeg, NA);
	printf(",\"t0\":%.17g,\"dt\":%.17g,\"nt\":%zu", ax.t0_s, ax.dt_s, ax.n);
	json_arr("traces", tr, NA * ax.n);
	puts("}");
	cli_las_reader_free(r);
	free(rows);
	free(z);
	free(vp);
	free(vs);
	free(rho);
	free(twt);
	free(work);
	free(tr);
	return st == 0 ? 0 : 1;
}

int main(int argc, char **argv)
{
	gsl_set_error_handler_off();
	if (argc >= 2 && strcmp(argv[1], "ebcdic") == 0) {
		int c;

		printf("{\"codes\":[");
		for (c = 0x20; c <= 0x7E; c++)
			printf("%s%d", c > 0x20 ? "," : "", cli_segy_ebcdic(c));
		puts("]}");
		return 0;
	}
	if (argc >= 2 && strcmp(argv[1], "write") == 0)
		return mode_write(argc, argv);
	if (argc >= 2 && strcmp(argv[1], "chain") == 0)
		return mode_chain(argc, argv);
	fprintf(stderr,
	        "usage: segy_dump ebcdic | write ... | chain LAS PATH\n");
	return 2;
}
