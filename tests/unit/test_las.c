/* Unit tests of the LAS reader and writers (client/las.c): the wrapped and
 * unwrapped LAS 2.0 sample files, the LAS 3.0 one and the CSV one
 * (tests/unit/data, invented well and values) give the same data, NULL
 * and missing samples come back as NaN, header and data survive a write
 * and re-read, every malformed case names its line, the depth order check
 * refuses repeats and reversals, and feeding one byte at a time equals
 * feeding everything at once. Layouts follow the CWLS LAS 2.0 and 3.0
 * standards (from memory of their text). */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "las.h"

#define NC 8 /* curves of the sample files */

/* Directory of this source file, for the sample data. */
static void data_path(char *buf, size_t size, const char *name)
{
	const char *f = __FILE__, *slash = strrchr(f, '/');
	int n = slash ? (int)(slash - f) : 1;

	snprintf(buf, size, "%.*s/data/%s", n, slash ? f : ".", name);
}

/* Whole file into a malloc'd buffer. */
static char *slurp(const char *name, size_t *len)
{
	char path[4096];
	FILE *fp;
	char *buf;
	long n;

	data_path(path, sizeof path, name);
	fp = fopen(path, "rb");
	if (!fp)
		fail_msg("cannot open %s", path);
	fseek(fp, 0, SEEK_END);
	n = ftell(fp);
	fseek(fp, 0, SEEK_SET);
	buf = malloc((size_t)n + 1);
	assert_non_null(buf);
	assert_int_equal(fread(buf, 1, (size_t)n, fp), (size_t)n);
	buf[n] = '\0';
	fclose(fp);
	*len = (size_t)n;
	return buf;
}

/* Result of pushing a buffer through a reader. */
struct parsed {
	cli_las_reader *r;
	double *rows; /* all rows, malloc'd */
	size_t nrows, cap;
	int rc; /* CLI_LAS_OK or CLI_LAS_ERR */
};

static void take(struct parsed *p, const double *blk)
{
	size_t n = cli_las_rows(p->r), nc = cli_las_ncurves(p->r);

	if (p->nrows + n > p->cap) {
		p->cap = 2 * (p->nrows + n) + 16;
		p->rows = realloc(p->rows, p->cap * nc * sizeof *p->rows);
		assert_non_null(p->rows);
	}
	memcpy(p->rows + p->nrows * nc, blk, n * nc * sizeof *blk);
	p->nrows += n;
}

/* Feeds text in chunks of chunk bytes with a block of blk_rows rows; csv
 * reads it as CSV, order turns on the depth order check. */
static struct parsed feed_mode(const char *text, size_t len, size_t chunk,
                               size_t blk_rows, int csv, int order)
{
	struct parsed p = {0};
	double *blk = NULL;
	size_t off = 0, used;
	int rc;

	p.r = cli_las_reader_new();
	assert_non_null(p.r);
	if (csv)
		cli_las_set_csv(p.r, -999.25);
	cli_las_set_order_check(p.r, order);
	while (off < len) {
		size_t n = len - off < chunk ? len - off : chunk;

		rc = cli_las_feed(p.r, text + off, n, &used);
		assert_true(used <= n);
		off += used;
		if (rc == CLI_LAS_ERR) {
			p.rc = rc;
			free(blk);
			return p;
		}
		if (rc == CLI_LAS_HEADER) {
			blk = malloc(blk_rows * cli_las_ncurves(p.r) *
			             sizeof *blk);
			assert_non_null(blk);
			cli_las_set_block(p.r, blk, blk_rows);
		} else if (rc == CLI_LAS_FULL) {
			take(&p, blk);
			cli_las_set_block(p.r, blk, blk_rows);
		} else {
			assert_int_equal(used, n);
		}
	}
	while ((rc = cli_las_finish(p.r)) == CLI_LAS_FULL) {
		take(&p, blk);
		cli_las_set_block(p.r, blk, blk_rows);
	}
	if (rc == CLI_LAS_OK && blk)
		take(&p, blk);
	p.rc = rc;
	free(blk);
	return p;
}

static struct parsed feed_all(const char *text, size_t len, size_t chunk,
                              size_t blk_rows)
{
	return feed_mode(text, len, chunk, blk_rows, 0, 0);
}

static void parsed_free(struct parsed *p)
{
	cli_las_reader_free(p->r);
	free(p->rows);
}

/* Reads a file through cli_las_read with a block of blk_rows. */
static struct parsed read_file(FILE *fp, size_t blk_rows)
{
	struct parsed p = {0};
	double *blk;
	int rc;

	p.r = cli_las_reader_new();
	assert_non_null(p.r);
	rc = cli_las_read(p.r, fp);
	if (rc != CLI_LAS_HEADER) {
		p.rc = CLI_LAS_ERR;
		return p;
	}
	blk = malloc(blk_rows * cli_las_ncurves(p.r) * sizeof *blk);
	assert_non_null(blk);
	for (;;) {
		cli_las_set_block(p.r, blk, blk_rows);
		rc = cli_las_read(p.r, fp);
		if (rc != CLI_LAS_OK || cli_las_rows(p.r) == 0)
			break;
		take(&p, blk);
	}
	free(blk);
	p.rc = rc;
	return p;
}

static FILE *open_data(const char *name)
{
	char path[4096];
	FILE *fp;

	data_path(path, sizeof path, name);
	fp = fopen(path, "rb");
	if (!fp)
		fail_msg("cannot open %s", path);
	return fp;
}

/* Same values, NaN equal to NaN. */
static void same_rows(const double *a, const double *b, size_t n)
{
	size_t i;

	for (i = 0; i < n; i++) {
		if (isnan(a[i]) && isnan(b[i]))
			continue;
		if (a[i] != b[i])
			fail_msg("value %zu: %.17g != %.17g", i, a[i], b[i]);
	}
}

/* Expected data of both sample files, NaN where the file has NULL. */
static const double sample[6][NC] = {
    {1500.0, 78.4312, 312.5, 2412.0, 0.2710, 2.81, 216.3, 4.8125},
    {1500.5, 81.0250, 318.25, 2398.5, 0.2845, 2.77, 217.0, 4.2500},
    {1501.0, NAN, 301.75, 2431.25, 0.2515, 2.90, 215.8, 6.1250},
    {1501.5, 64.5000, 288.0, 2457.0, NAN, 2.95, 215.5, 9.8750},
    {1502.0, 59.1250, 281.5, 2468.75, 0.2105, 3.02, 215.4, 12.5000},
    {1502.5, 61.7500, NAN, 2461.0, 0.2180, NAN, 215.6, 11.0625},
};

static void test_samples(void **state)
{
	struct parsed u, w;
	const cli_las_line *l;
	FILE *fp;

	(void)state;
	fp = open_data("palvorin_7.las");
	u = read_file(fp, 4);
	fclose(fp);
	fp = open_data("palvorin_7_wrap.las");
	w = read_file(fp, 4);
	fclose(fp);
	if (u.rc != CLI_LAS_OK)
		fail_msg("unwrapped: %s", cli_las_error(u.r));
	if (w.rc != CLI_LAS_OK)
		fail_msg("wrapped: %s", cli_las_error(w.r));
	assert_int_equal(cli_las_wrapped(u.r), 0);
	assert_int_equal(cli_las_wrapped(w.r), 1);
	assert_int_equal(cli_las_ncurves(u.r), NC);
	assert_int_equal(cli_las_ncurves(w.r), NC);
	assert_int_equal(u.nrows, 6);
	assert_int_equal(w.nrows, 6);
	same_rows(u.rows, &sample[0][0], 6 * NC);
	same_rows(w.rows, u.rows, 6 * NC);
	assert_true(cli_las_null(u.r) == -999.25);
	assert_true(cli_las_step(u.r) == 0.5);
	assert_int_equal(cli_las_warnings(u.r), 0);
	assert_int_equal(cli_las_warnings(w.r), 0);
	/* header items: fields split per LAS 2.0 line format */
	l = cli_las_find(u.r, 'W', "well");
	assert_non_null(l);
	assert_string_equal(l->value, "PALVORIN 7");
	assert_string_equal(l->desc, "WELL");
	l = cli_las_find(u.r, 'W', "FLD");
	assert_non_null(l);
	assert_string_equal(l->mnem, "FLD");
	assert_string_equal(l->unit, "");
	assert_string_equal(l->value, "QUELLODIN");
	l = cli_las_find(u.r, 'W', "LOC");
	assert_string_equal(l->value, "DEMO SITE B (INVENTED)");
	l = cli_las_curve(u.r, 1);
	assert_string_equal(l->mnem, "GR");
	assert_string_equal(l->unit, "GAPI");
	assert_string_equal(l->value, "01 101 01 01");
	assert_string_equal(l->desc, "2  GAMMA RAY");
	l = cli_las_curve(u.r, 0);
	assert_string_equal(l->unit, "M");
	assert_string_equal(l->value, "");
	l = cli_las_find(u.r, 'P', "MDEN");
	assert_string_equal(l->unit, "K/M3");
	assert_string_equal(l->value, "2650.0000");
	assert_null(cli_las_find(u.r, 'W', "NOPE"));
	parsed_free(&u);
	parsed_free(&w);
}

static void test_bytewise(void **state)
{
	static const char *const files[] = {"palvorin_7.las",
	                                    "palvorin_7_wrap.las"};
	size_t f, len, chunk;

	(void)state;
	for (f = 0; f < 2; f++) {
		char *text = slurp(files[f], &len);
		struct parsed whole = feed_all(text, len, len, 1000);

		assert_int_equal(whole.rc, CLI_LAS_OK);
		assert_int_equal(whole.nrows, 6);
		for (chunk = 1; chunk <= 13; chunk += 3) {
			struct parsed bit = feed_all(text, len, chunk, 1);

			assert_int_equal(bit.rc, CLI_LAS_OK);
			assert_int_equal(bit.nrows, whole.nrows);
			same_rows(bit.rows, whole.rows, 6 * NC);
			assert_int_equal(cli_las_nlines(bit.r),
			                 cli_las_nlines(whole.r));
			parsed_free(&bit);
		}
		parsed_free(&whole);
		free(text);
	}
}

/* Compares every kept item of a and b, except WRAP; a ~C item of b named
 * added (may be NULL) is skipped. */
static int skip_b(const cli_las_line *l, const char *added)
{
	return l->kind != CLI_LAS_LINE_ITEM ||
	       (added && l->section == 'C' && strcmp(l->mnem, added) == 0);
}

static void same_items(const cli_las_reader *a, const cli_las_reader *b,
                       const char *added)
{
	size_t i, j = 0, nb = cli_las_nlines(b);

	for (i = 0; i < cli_las_nlines(a); i++) {
		const cli_las_line *la = cli_las_line_at(a, i), *lb;

		if (la->kind != CLI_LAS_LINE_ITEM)
			continue;
		while (j < nb && skip_b(cli_las_line_at(b, j), added))
			j++;
		assert_true(j < nb);
		lb = cli_las_line_at(b, j++);
		assert_int_equal(la->section, lb->section);
		assert_string_equal(la->mnem, lb->mnem);
		assert_string_equal(la->unit, lb->unit);
		if (strcmp(la->mnem, "WRAP") != 0) {
			assert_string_equal(la->raw, lb->raw);
			assert_string_equal(la->value, lb->value);
			assert_string_equal(la->desc, lb->desc);
		} else {
			assert_string_equal(lb->value, "NO");
		}
	}
}

static void test_roundtrip(void **state)
{
	static const cli_las_newcurve add[] = {
	    {"VS", "M/S", "Shear velocity, predicted"},
	};
	double rows7[6][NC + 1];
	struct parsed in, back, plain;
	const cli_las_line *l;
	char err[128], line[512];
	FILE *fp, *tmp;
	size_t i, j;

	(void)state;
	fp = open_data("palvorin_7_wrap.las");
	in = read_file(fp, 16);
	fclose(fp);
	assert_int_equal(in.rc, CLI_LAS_OK);
	for (i = 0; i < 6; i++) {
		for (j = 0; j < NC; j++)
			rows7[i][j] = in.rows[i * NC + j];
		rows7[i][NC] = i == 3 ? NAN : 1000.0 + 12.5 * (double)i;
	}
	/* plain copy: header and data as read */
	tmp = tmpfile();
	assert_non_null(tmp);
	assert_int_equal(
	    cli_las_write_header(tmp, in.r, NULL, 0, NULL, err, sizeof err), 0);
	assert_int_equal(cli_las_write_rows(tmp, in.rows, 6, NC, -999.25, 4),
	                 0);
	rewind(tmp);
	plain = read_file(tmp, 2);
	fclose(tmp);
	if (plain.rc != CLI_LAS_OK)
		fail_msg("re-read: %s", cli_las_error(plain.r));
	assert_int_equal(cli_las_wrapped(plain.r), 0);
	assert_int_equal(cli_las_nlines(plain.r), cli_las_nlines(in.r));
	same_items(in.r, plain.r, NULL);
	assert_int_equal(plain.nrows, 6);
	same_rows(plain.rows, in.rows, 6 * NC);
	/* with an added curve and a note */
	tmp = tmpfile();
	assert_non_null(tmp);
	assert_int_equal(cli_las_write_header(tmp, in.r, add, 1,
	                                      "VS from an empirical relation\n"
	                                      "second note line",
	                                      err, sizeof err),
	                 0);
	assert_int_equal(
	    cli_las_write_rows(tmp, &rows7[0][0], 6, NC + 1, -999.25, 4), 0);
	rewind(tmp);
	back = read_file(tmp, 5);
	fclose(tmp);
	if (back.rc != CLI_LAS_OK)
		fail_msg("re-read: %s", cli_las_error(back.r));
	same_items(in.r, back.r, "VS");
	assert_int_equal(cli_las_ncurves(back.r), NC + 1);
	l = cli_las_curve(back.r, NC);
	assert_string_equal(l->mnem, "VS");
	assert_string_equal(l->unit, "M/S");
	assert_string_equal(l->desc, "Shear velocity, predicted");
	assert_int_equal(back.nrows, 6);
	same_rows(back.rows, &rows7[0][0], 6 * (NC + 1));
	/* the note lands at the end of ~O */
	for (i = 0; i < cli_las_nlines(back.r); i++) {
		l = cli_las_line_at(back.r, i);
		if (l->section == 'O' &&
		    strcmp(l->raw, "second note line") == 0)
			break;
	}
	assert_true(i < cli_las_nlines(back.r));
	assert_int_equal(cli_las_line_at(back.r, i + 1)->kind,
	                 CLI_LAS_LINE_DATA);
	/* bad additions are refused with a reason */
	{
		static const cli_las_newcurve bad[] = {{"V S", "M/S", ""}};

		tmp = tmpfile();
		assert_int_equal(cli_las_write_header(tmp, in.r, bad, 1, NULL,
		                                      err, sizeof err),
		                 -1);
		assert_non_null(strstr(err, "mnemonic"));
		assert_int_equal(cli_las_write_header(tmp, in.r, NULL, 0,
		                                      "ok\n~X bad", err,
		                                      sizeof err),
		                 -1);
		assert_non_null(strstr(err, "note"));
		fclose(tmp);
	}
	/* CSV */
	tmp = tmpfile();
	assert_int_equal(cli_las_write_csv_header(tmp, in.r, add, 1), 0);
	assert_int_equal(
	    cli_las_write_csv_rows(tmp, &rows7[0][0], 6, NC + 1, 4), 0);
	rewind(tmp);
	assert_non_null(fgets(line, sizeof line, tmp));
	assert_string_equal(line, "DEPT[M],GR[GAPI],DT[US/M],RHOB[K/M3],"
	                          "NPHI[V/V],PEF[B/E],CALI[MM],RDEP[OHMM],"
	                          "VS[M/S]\n");
	assert_non_null(fgets(line, sizeof line, tmp));
	assert_string_equal(line, "1500.0000,78.4312,312.5000,2412.0000,"
	                          "0.2710,2.8100,216.3000,4.8125,1000.0000\n");
	assert_non_null(fgets(line, sizeof line, tmp));
	assert_non_null(fgets(line, sizeof line, tmp));
	assert_string_equal(line, "1501.0000,,301.7500,2431.2500,0.2515,"
	                          "2.9000,215.8000,6.1250,1025.0000\n");
	fclose(tmp);
	/* values too small for the decimals are not rounded to zero */
	tmp = tmpfile();
	{
		const double v[2] = {1.0, 2.5e-7};

		assert_int_equal(cli_las_write_rows(tmp, v, 1, 2, -999.25, 4),
		                 0);
		assert_int_equal(cli_las_write_rows(tmp, v, 1, 2, -999.25, 99),
		                 -1);
	}
	rewind(tmp);
	assert_non_null(fgets(line, sizeof line, tmp));
	assert_non_null(strstr(line, "2.500000e-07"));
	fclose(tmp);
	parsed_free(&in);
	parsed_free(&plain);
	parsed_free(&back);
}

#define HV  "~V\n VERS. 2.0 : v\n WRAP. NO : w\n"
#define HVW "~V\n VERS. 2.0 : v\n WRAP. YES : w\n"
#define HW                                                                     \
	"~W\n STRT.M 10.0 : s\n STOP.M 11.0 : e\n STEP.M 0.5 : d\n"            \
	" NULL. -999.25 : n\n"
#define HC  "~C\n DEPT.M : depth\n GR.GAPI : gamma\n"
#define HC3 "~C\n DEPT.M : depth\n GR.GAPI : gamma\n DT.US/M : sonic\n"

/* Each malformed input and the text its error must contain. */
static const struct {
	const char *text;
	const char *msg;
} bad[] = {
    {"~W\n STRT.M 1 : s\n", "line 1: first section is ~W, expected ~V"},
    {" VERS. 2.0 : v\n", "line 1: text before the ~V section"},
    {"~V\n VERS. 4.0 : v\n", "line 2: VERS is '4.0'"},
    {"~V\n VERS. 3.0 : v\n WRAP. YES : w\n", "line 3: LAS 3.0 does not wrap"},
    {"~V\n VERS. 3.0 : v\n WRAP. NO : w\n DLM. PIPE : d\n",
     "line 4: DLM is 'PIPE'"},
    {"~V\n VERS. 2.0 : v\n" HW, "line 1: ~V section has no WRAP item"},
    {"~V\n WRAP. NO : w\n" HW, "line 1: ~V section has no VERS item"},
    {"~V\n VERS. 2.0 : v\n WRAP. MAYBE : w\n", "line 3: WRAP is 'MAYBE'"},
    {HV "~W\n STRT.M 1 : s\n STOP.M 2 : e\n STEP.M 1 : d\n~C\n",
     "line 4: ~W section has no NULL item"},
    {HV HW "~A\n", "line 9: ~A before ~C"},
    {HV HC "~A\n", "line 7: ~A before ~W"},
    {HV HW HC, "line 11: end of input: no ~A section"},
    {HV HW, "end of input: no ~C section"},
    {"", "line 1: end of input: no ~V section"},
    {HV HW "~C\n DEPT M : depth\n", "line 10: curve line has no '.'"},
    {HV " DATE. today\n", "line 4: header line has no ':'"},
    {HV " BAD NAME. x : y\n", "line 4: mnemonic 'BAD NAME' contains"},
    {HV " .M x : y\n", "line 4: empty mnemonic"},
    {HV HW "~C\n~A\n", "line 9: ~C section has no curves"},
    {HV HW " STRT.M abc : s\n", "line 9: STRT value 'abc' is not a number"},
    {HV HV, "line 4: duplicate ~V section"},
    {HV "~Q\n", "line 4: unknown section ~Q"},
    {HV "~\n", "line 4: '~' without a section letter"},
    {HV HW HC "~A\n10.0\n", "line 13: data row has 1 values, expected 2"},
    {HV HW HC "~A\n10.0 1 2\n", "line 13: data row has 3 values, "
                                "expected 2"},
    {HV HW HC "~A\n10.0 1\n10.5 x1\n", "line 14: value 2 ('x1') is not a "
                                       "number"},
    {HV HW HC "~A\n10.0 nan\n", "line 13: value 2 ('nan') is not"},
    {HV HW HC "~A\n10.0 0x10\n", "line 13: value 2 ('0x10') is not"},
    {HV HW HC "~A\n10.0 1e999\n", "line 13: value 2 ('1e999') is not"},
    {HV HW HC "~A\n-999.25 1\n", "line 13: depth is the NULL value"},
    {HV HW HC "~A\n10.0 1\n~O\n", "line 14: section line after ~A"},
    {HVW HW HC3 "~A\n10.0\n1 2\n10.5 1\n",
     "line 16: wrapped data: depth line has 2 values"},
    {HVW HW HC3 "~A\n10.0\n1\n2 3\n",
     "line 16: wrapped row starting at line 14 has more than 3 values"},
    {HVW HW HC3 "~A\n10.0\n1 2\n10.5\n1\n",
     "line 17: end of input inside the wrapped row starting at line 16 "
     "(2 of 3 values)"},
    {HV "\n # c\n ~P x\n BAD\n", "line 7: header line has no '.'"},
    {HV HW HC "~A\n10.0 1\n10.5 2\0\n", "line 14: NUL byte"},
};

static void test_malformed(void **state)
{
	size_t i, len;
	struct parsed p;

	(void)state;
	for (i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		len = strlen(bad[i].text);
		if (strstr(bad[i].msg, "NUL"))
			len += 2; /* the embedded NUL and the newline */
		p = feed_all(bad[i].text, len, len, 4);
		if (p.rc != CLI_LAS_ERR)
			fail_msg("case %zu accepted, want '%s'", i, bad[i].msg);
		if (!strstr(cli_las_error(p.r), bad[i].msg))
			fail_msg("case %zu: got '%s', want '%s'", i,
			         cli_las_error(p.r), bad[i].msg);
		/* byte by byte gives the same error */
		parsed_free(&p);
		p = feed_all(bad[i].text, len, 1, 1);
		assert_int_equal(p.rc, CLI_LAS_ERR);
		assert_non_null(strstr(cli_las_error(p.r), bad[i].msg));
		parsed_free(&p);
	}
}

static void test_limits_and_warnings(void **state)
{
	static const char step_bad[] = HV HW HC "~A\n10.0 1\n11.0 2\n";
	static const char crlf[] = "~V\r\n VERS. 2.0 : v\r\n WRAP. NO : w\r\n"
	                           "~W\r\n STRT.M 10.0 : s\r\n STOP.M 10.5 : e"
	                           "\r\n STEP.M 0.5 : d\r\n NULL. -999.25 : n"
	                           "\r\n~C\r\n DEPT.M : d\r\n GR.GAPI : g\r\n"
	                           "~A\r\n10.0 1\r\n10.5 -999.25";
	struct parsed p;
	char *big;
	size_t n;

	(void)state;
	/* STEP disagreeing with the depths: warned, data kept as read */
	p = feed_all(step_bad, strlen(step_bad), 7, 4);
	assert_int_equal(p.rc, CLI_LAS_OK);
	assert_int_equal(p.nrows, 2);
	assert_true(p.rows[2] == 11.0);
	assert_true(cli_las_warnings(p.r) >= 1);
	assert_non_null(strstr(cli_las_warning(p.r),
	                       "line 14: depth step 1 differs from STEP 0.5"));
	parsed_free(&p);
	/* CRLF line ends, last line without an end of line, NULL as NaN */
	p = feed_all(crlf, strlen(crlf), 3, 1);
	if (p.rc != CLI_LAS_OK)
		fail_msg("%s", cli_las_error(p.r));
	assert_int_equal(p.nrows, 2);
	assert_true(p.rows[2] == 10.5 && isnan(p.rows[3]));
	assert_int_equal(cli_las_warnings(p.r), 0);
	assert_string_equal(cli_las_curve(p.r, 1)->desc, "g");
	parsed_free(&p);
	/* a header over 1 MiB is refused */
	n = CLI_LAS_MAX_HEADER + 100;
	big = malloc(n);
	assert_non_null(big);
	memcpy(big, HV "~O\n", strlen(HV "~O\n"));
	memset(big + strlen(HV "~O\n"), 'x', n - strlen(HV "~O\n"));
	for (size_t i = 100; i < n; i += 100)
		big[i] = '\n';
	p = feed_all(big, n, 4096, 4);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r), "header exceeds"));
	parsed_free(&p);
	/* an over-long line is refused */
	memset(big, 'x', n);
	memcpy(big, HV, strlen(HV));
	p = feed_all(big, CLI_LAS_MAX_LINE + 200, 1000, 4);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r), "line 4: line longer than"));
	parsed_free(&p);
	free(big);
}

/* Arbitrary and mutated input: never a crash, and every error names a
 * line. */
static void test_garbage(void **state)
{
	size_t len, i, k;
	char *text = slurp("palvorin_7_wrap.las", &len);
	char *mut = malloc(len);
	unsigned long seed = 12345;
	struct parsed p;

	(void)state;
	assert_non_null(mut);
	for (k = 0; k < 400; k++) {
		memcpy(mut, text, len);
		for (i = 0; i < 1 + k % 5; i++) {
			seed = seed * 6364136223846793005ul +
			       1442695040888963407ul;
			mut[(seed >> 33) % len] = (char)(seed >> 17);
		}
		p = feed_all(mut, len, 1 + k % 17, 1 + k % 3);
		assert_true(p.rc == CLI_LAS_OK || p.rc == CLI_LAS_ERR);
		if (p.rc == CLI_LAS_ERR)
			assert_memory_equal(cli_las_error(p.r), "line ", 5);
		parsed_free(&p);
	}
	free(mut);
	free(text);
}

#define V3 "~V\n VERS. 3.0 : v\n WRAP. NO : w\n DLM. COMMA : d\n"

/* LAS 3.0: the same data as the 2.0 sample, sections kept, and a
 * round trip through the writer with the trailing sections. */
static void test_las3(void **state)
{
	struct parsed v3, back;
	const cli_las_line *l;
	FILE *fp, *tmp;
	char err[256];

	(void)state;
	fp = open_data("palvorin_7_v3.las");
	v3 = read_file(fp, 4);
	fclose(fp);
	if (v3.rc != CLI_LAS_OK)
		fail_msg("v3: %s", cli_las_error(v3.r));
	assert_int_equal(cli_las_version(v3.r), 3);
	assert_int_equal(cli_las_delimiter(v3.r), ',');
	assert_int_equal(cli_las_ncurves(v3.r), NC);
	assert_int_equal(v3.nrows, 6);
	same_rows(v3.rows, &sample[0][0], 6 * NC);
	assert_int_equal(cli_las_warnings(v3.r), 0);
	l = cli_las_find(v3.r, 'P', "BS");
	assert_non_null(l);
	assert_string_equal(l->unit, "MM");
	assert_string_equal(l->value, "215.9000");
	l = cli_las_curve(v3.r, 7);
	assert_string_equal(l->mnem, "RDEP");
	assert_string_equal(l->unit, "OHMM");
	assert_string_equal(l->desc, "DEEP RESISTIVITY {F} | RDEP_TOOL");
	/* ~Tops_Definition before the data is kept in the header, the two
	 * sections after it as trailing text */
	assert_int_equal(cli_las_ntrailer(v3.r), 4);
	tmp = tmpfile();
	assert_non_null(tmp);
	assert_int_equal(
	    cli_las_write_header(tmp, v3.r, NULL, 0, NULL, err, sizeof err), 0);
	for (size_t i = 0; i < v3.nrows; i++) {
		for (size_t j = 0; j < NC; j++) {
			double v = v3.rows[i * NC + j];
			fprintf(tmp, "%s%.15g", j ? "," : "",
			        isnan(v) ? -999.25 : v);
		}
		fputc('\n', tmp);
	}
	assert_int_equal(cli_las_write_trailer(tmp, v3.r), 0);
	rewind(tmp);
	back = read_file(tmp, 2);
	fclose(tmp);
	assert_int_equal(back.rc, CLI_LAS_OK);
	assert_int_equal(back.nrows, 6);
	same_rows(back.rows, v3.rows, 6 * NC);
	assert_int_equal(cli_las_ntrailer(back.r), 4);
	parsed_free(&back);
	parsed_free(&v3);
}

/* LAS 3.0 cases: tab and space delimiters, empty fields, text values. */
static void test_las3_cases(void **state)
{
	static const char tab[] = "~V\n VERS. 3.0 : v\n WRAP. NO : w\n"
	                          " DLM. TAB : d\n" HW HC "~Log_Data\n"
	                          "10.0\t1\n10.5\t\n11.0\t3\n";
	static const char comma[] = V3 HW "~Log_Definition\n DEPT.M : d\n"
	                                  " GR.GAPI : g {F}\n~Log_Data | "
	                                  "Log_Definition\n10.0, 1\n10.5,2\n";
	static const char text[] = V3 HW HC "~A\n10.0,SAND\n";
	static const char core_first[] =
	    V3 HW "~Core_Definition\n CORT.M : c\n"
	          "~Core_Data\n 10.1, 3\n" HC "~Log_Data\n10.0,1\n";
	struct parsed p;

	(void)state;
	p = feed_all(tab, strlen(tab), 7, 2);
	assert_int_equal(p.rc, CLI_LAS_OK);
	assert_int_equal(p.nrows, 3);
	assert_true(isnan(p.rows[3]) && p.rows[5] == 3);
	parsed_free(&p);
	p = feed_all(comma, strlen(comma), 1, 1);
	assert_int_equal(p.rc, CLI_LAS_OK);
	assert_int_equal(p.nrows, 2);
	assert_true(p.rows[3] == 2);
	assert_string_equal(cli_las_curve(p.r, 1)->desc, "g {F}");
	parsed_free(&p);
	p = feed_all(text, strlen(text), 64, 2);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r),
	                       "line 14: value 2 ('SAND') of curve GR is not a "
	                       "number (text channels are not read)"));
	parsed_free(&p);
	p = feed_all(core_first, strlen(core_first), 64, 2);
	if (p.rc != CLI_LAS_OK)
		fail_msg("core sections: %s", cli_las_error(p.r));
	assert_int_equal(p.nrows, 1);
	parsed_free(&p);
}

/* CSV: the same data as the LAS sample, and its cases. */
static void test_csv(void **state)
{
	static const struct {
		const char *text;
		int ok;
		size_t rows;
		const char *msg;
	} cases[] = {
	    {"DEPT;GR\nm;gAPI\n1;2\n2;NaN\n", 1, 2, NULL},
	    {"DEPT (m),GR\n1,2\n", 1, 1, NULL},
	    {"\"DEPT [m]\",\"G,R\"\n1,\"2\"\n", 1, 1, NULL},
	    {"DEPT\tGR\n1\t2\n", 1, 1, NULL},
	    {"DEPT GR\n1 2\n", 1, 1, NULL},
	    {"# only a comment\n", 0, 0, "line 1: CSV file has no header"},
	    {"DEPT[M],GR\n", 0, 0,
	     "line 1: CSV file has a header line but "
	     "no data rows"},
	    {"DEPT[M]\n1\n", 0, 0, "line 1: CSV header names 1 column"},
	    {"DEPT[M],GR\n1,2\n2,abc\n", 0, 0,
	     "line 3: value 2 ('abc') of "
	     "curve GR is not a number"},
	    {"DEPT[M],GR\n1,2,3\n", 0, 0, "line 2: data row has 3 values"},
	    {"DEPT[M],,GR\n", 0, 0,
	     "line 1: CSV header: column 2 has no "
	     "name"},
	    {"DEPT[M],GR\n1,\"2\n", 0, 0,
	     "line 2: value 2 has an unclosed "
	     "quote"},
	    {"DEPT[M],GR\n-999.25,1\n", 0, 0, "line 2: depth is the NULL"},
	};
	struct parsed p;
	size_t len;
	char *text;

	(void)state;
	text = slurp("palvorin_7.csv", &len);
	p = feed_mode(text, len, len, 4, 1, 1);
	if (p.rc != CLI_LAS_OK)
		fail_msg("csv: %s", cli_las_error(p.r));
	assert_int_equal(cli_las_version(p.r), 0);
	assert_int_equal(cli_las_ncurves(p.r), NC);
	assert_int_equal(p.nrows, 6);
	same_rows(p.rows, &sample[0][0], 6 * NC);
	assert_string_equal(cli_las_curve(p.r, 3)->mnem, "RHOB");
	assert_string_equal(cli_las_curve(p.r, 3)->unit, "K/M3");
	assert_true(cli_las_first_depth(p.r) == 1500.0);
	assert_true(cli_las_last_depth(p.r) == 1502.5);
	assert_true(cli_las_data_step(p.r) == 0.5);
	assert_int_equal(cli_las_bytes(p.r), len);
	parsed_free(&p);
	p = feed_mode(text, len, 1, 1, 1, 1);
	assert_int_equal(p.rc, CLI_LAS_OK);
	same_rows(p.rows, &sample[0][0], 6 * NC);
	parsed_free(&p);
	free(text);
	for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
		for (size_t chunk = 1; chunk < 100; chunk += 98) {
			p = feed_mode(cases[i].text, strlen(cases[i].text),
			              chunk, 2, 1, 0);
			if (cases[i].ok && p.rc != CLI_LAS_OK)
				fail_msg("csv case %zu: %s", i,
				         cli_las_error(p.r));
			if (!cases[i].ok &&
			    (p.rc != CLI_LAS_ERR ||
			     !strstr(cli_las_error(p.r), cases[i].msg)))
				fail_msg("csv case %zu: got '%s', want '%s'", i,
				         cli_las_error(p.r), cases[i].msg);
			if (cases[i].ok)
				assert_int_equal(p.nrows, cases[i].rows);
			parsed_free(&p);
		}
	}
	p = feed_mode(cases[0].text, strlen(cases[0].text), 99, 2, 1, 0);
	assert_string_equal(cli_las_curve(p.r, 0)->unit, "m");
	assert_string_equal(cli_las_curve(p.r, 1)->unit, "gAPI");
	assert_true(isnan(p.rows[3]));
	parsed_free(&p);
	p = feed_mode(cases[1].text, strlen(cases[1].text), 99, 2, 1, 0);
	assert_string_equal(cli_las_curve(p.r, 0)->unit, "m");
	parsed_free(&p);
	p = feed_mode(cases[2].text, strlen(cases[2].text), 99, 2, 1, 0);
	/* no blank, '.' or ':' in a LAS mnemonic */
	assert_string_equal(cli_las_curve(p.r, 0)->mnem, "DEPT");
	assert_string_equal(cli_las_curve(p.r, 1)->mnem, "G,R");
	parsed_free(&p);
}

/* The depth order check: repeats and reversals refused, naming the
 * line; a file logged upwards (negative STEP) is in order. */
static void test_order(void **state)
{
	static const char dup[] = HV HW HC "~A\n10.0 1\n10.5 2\n10.5 3\n";
	static const char rev[] = HV HW HC "~A\n10.0 1\n10.5 2\n10.2 3\n";
	static const char up[] = HV "~W\n STRT.M 11.0 : s\n STOP.M 10.0 : e\n"
	                            " STEP.M -0.5 : d\n NULL. -999.25 : n\n" HC
	                            "~A\n11.0 1\n10.5 2\n10.0 3\n";
	static const char csv_rev[] = "DEPT,GR\n3,1\n2,1\n2.5,1\n";
	struct parsed p;

	(void)state;
	p = feed_mode(dup, strlen(dup), 5, 2, 0, 1);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r),
	                       "line 15: depth 10.5 repeats the previous"));
	parsed_free(&p);
	p = feed_mode(rev, strlen(rev), 5, 2, 0, 1);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r),
	                       "line 15: depth 10.2 after 10.5: depths must "
	                       "keep increasing"));
	parsed_free(&p);
	p = feed_mode(rev, strlen(rev), 5, 2, 0, 0);
	assert_int_equal(p.rc, CLI_LAS_OK); /* the check is off */
	assert_true(cli_las_data_step(p.r) == 0);
	parsed_free(&p);
	p = feed_mode(up, strlen(up), 5, 2, 0, 1);
	assert_int_equal(p.rc, CLI_LAS_OK);
	assert_int_equal(p.nrows, 3);
	assert_true(cli_las_data_step(p.r) == -0.5);
	parsed_free(&p);
	p = feed_mode(csv_rev, strlen(csv_rev), 5, 2, 1, 1);
	assert_int_equal(p.rc, CLI_LAS_ERR);
	assert_non_null(strstr(cli_las_error(p.r), "line 4: depth 2.5 after 2: "
	                                           "depths must keep "
	                                           "decreasing"));
	parsed_free(&p);
}

/* STRT, STOP and STEP replaced in fixed width, then patched in place. */
static void test_header_patch(void **state)
{
	static const char text[] = HV HW HC "~A\n10.0 1\n10.5 2\n";
	cli_las_wopts o = {"10.0", "0", "0.5", 20, 0, 0, 0};
	struct parsed p, back;
	FILE *tmp = tmpfile();
	char err[128];

	(void)state;
	assert_non_null(tmp);
	p = feed_all(text, strlen(text), 64, 4);
	assert_int_equal(p.rc, CLI_LAS_OK);
	assert_int_equal(cli_las_write_header_opts(tmp, p.r, NULL, 0, NULL, &o,
	                                           err, sizeof err),
	                 0);
	assert_true(o.strt_at > 0 && o.stop_at > o.strt_at &&
	            o.step_at > o.stop_at);
	fprintf(tmp, "10.0 1\n10.5 2\n");
	fseek(tmp, o.stop_at, SEEK_SET);
	fprintf(tmp, "%-20s", "10.5");
	rewind(tmp);
	back = read_file(tmp, 4);
	fclose(tmp);
	assert_int_equal(back.rc, CLI_LAS_OK);
	assert_string_equal(cli_las_find(back.r, 'W', "STOP")->value, "10.5");
	assert_int_equal(cli_las_warnings(back.r), 0);
	parsed_free(&back);
	parsed_free(&p);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_samples),
	    cmocka_unit_test(test_bytewise),
	    cmocka_unit_test(test_roundtrip),
	    cmocka_unit_test(test_malformed),
	    cmocka_unit_test(test_limits_and_warnings),
	    cmocka_unit_test(test_garbage),
	    cmocka_unit_test(test_las3),
	    cmocka_unit_test(test_las3_cases),
	    cmocka_unit_test(test_csv),
	    cmocka_unit_test(test_order),
	    cmocka_unit_test(test_header_patch),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
