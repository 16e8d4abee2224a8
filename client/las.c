/* LAS reader and writers for the client (Canadian Well Logging Society
 * LAS Version 2.0 and 3.0, open standards), and a CSV reader that presents
 * a CSV file with a header line as if it were a LAS file. The reader is a
 * push parser: bytes go in, complete lines are parsed one at a time, the
 * header is kept line by line and data rows land in a caller-owned block,
 * so memory stays bounded by the header cap, the line cap and one row of
 * accumulation however long the file.
 * Choices: blank lines are kept in the header and skipped in the data;
 * '#' lines are comments everywhere; a STEP, STRT or STOP that disagrees
 * with the depths is a warning (the data are kept as read); any other
 * departure from the standard is an error naming the line. LAS 3.0: the
 * ~Log_Parameter, ~Log_Definition and ~Log_Data sections (or their 2.0
 * names) are read as ~P, ~C and ~A; the DLM delimiter (SPACE, COMMA, TAB)
 * is honoured; other sections are kept as text, those after ~Log_Data
 * too (written back after the data); format braces and associations stay
 * in the description; text channels are refused. CSV: the first line
 * names the columns ("NAME[UNIT]", "NAME (UNIT)" or "NAME", the first
 * being the depth), optionally followed by a line of units; ',' ';' or
 * tab separate fields; empty fields, NaN, null, NA and the NULL value
 * (-999.25 unless set) are missing. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "las.h"
#include "proto/numparse.h"

#define MAX_HEADER_LINES 16384u /* kept header lines */
#define WRAP_LINE_MAX    80u    /* LAS 2.0 wrapped-line length */
#define CHUNK            65536u /* fread chunk of cli_las_read */
#define STEP_RTOL        0.01   /* depth-step tolerance, fraction of STEP */

/* Bits of the sections seen. */
#define SEC_V 0x01u
#define SEC_W 0x02u
#define SEC_C 0x04u
#define SEC_P 0x08u
#define SEC_O 0x10u
#define SEC_A 0x20u

struct cli_las_reader {
	/* line assembly */
	char *line;
	size_t linelen;
	unsigned long lineno; /* number of the last completed line */
	int pending;          /* a complete line waits for block space */
	int dead;
	int finished;
	char err[256];
	unsigned long nwarn;
	char warn[256];
	/* header */
	cli_las_line *lines;
	size_t nlines, caplines;
	size_t header_bytes;
	size_t curves[CLI_LAS_MAX_CURVES]; /* indices into lines */
	size_t ncurves;
	char sec;               /* current section letter, 0 before ~V */
	unsigned seen;          /* SEC_* */
	unsigned long sec_line; /* line of the current section header */
	int header_done;
	int have_vers, have_wrap, wrap;
	int have_strt, have_stop, have_step, have_null;
	double strt, stop, step, null_value;
	/* data */
	double acc[CLI_LAS_MAX_CURVES]; /* the row being assembled */
	size_t nacc;
	unsigned long row_line; /* line where the row being assembled began */
	double *block;
	size_t block_max, block_n;
	unsigned long nrows;
	double last_depth;
	/* cli_las_read */
	char *chunk;
	size_t chunk_len, chunk_off;
	int eof;
	unsigned long long bytes; /* input bytes consumed */
	/* LAS 3.0 */
	int version; /* 2 or 3 (0 before VERS) */
	char dlm;    /* data delimiter: ' ', ',' or '\t' */
	int in_trailer;
	char **trailer;
	size_t ntrailer, captrailer, trailer_bytes;
	/* depth order */
	int order_check, dir;
	double first_depth, first_step;
	int step_uniform;
	/* CSV */
	int csv, csv_state, csv_keep;
	char csv_dlm;
	char **csv_names, **csv_units;
	size_t csv_ncols;
};

static const char empty[] = "";

/* Records the fatal error "line N: ..." and kills the reader. Returns
 * CLI_LAS_ERR. */
static int fail(cli_las_reader *r, unsigned long lineno, const char *fmt, ...)
{
	va_list ap;
	int n;

	if (r->dead)
		return CLI_LAS_ERR;
	n = snprintf(r->err, sizeof r->err, "line %lu: ", lineno);
	if (n < 0)
		n = 0;
	if ((size_t)n < sizeof r->err) {
		va_start(ap, fmt);
		vsnprintf(r->err + n, sizeof r->err - (size_t)n, fmt, ap);
		va_end(ap);
	}
	r->dead = 1;
	return CLI_LAS_ERR;
}

/* Counts a warning and keeps the text of the first one. */
static void warn(cli_las_reader *r, unsigned long lineno, const char *fmt, ...)
{
	va_list ap;
	int n;

	if (r->nwarn++ > 0)
		return;
	n = snprintf(r->warn, sizeof r->warn, "line %lu: ", lineno);
	if (n < 0)
		n = 0;
	if ((size_t)n < sizeof r->warn) {
		va_start(ap, fmt);
		vsnprintf(r->warn + n, sizeof r->warn - (size_t)n, fmt, ap);
		va_end(ap);
	}
}

cli_las_reader *cli_las_reader_new(void)
{
	cli_las_reader *r = calloc(1, sizeof *r);

	if (!r)
		return NULL;
	r->line = malloc(CLI_LAS_MAX_LINE + 1);
	if (!r->line) {
		free(r);
		return NULL;
	}
	r->null_value = NAN;
	r->strt = r->stop = r->step = NAN;
	r->dlm = ' ';
	r->step_uniform = 1;
	r->first_depth = r->first_step = NAN;
	return r;
}

void cli_las_reader_free(cli_las_reader *r)
{
	size_t i;

	if (!r)
		return;
	for (i = 0; i < r->nlines; i++)
		free(r->lines[i].raw);
	free(r->lines);
	for (i = 0; i < r->ntrailer; i++)
		free(r->trailer[i]);
	free(r->trailer);
	for (i = 0; i < r->csv_ncols; i++) {
		free(r->csv_names[i]);
		free(r->csv_units[i]);
	}
	free(r->csv_names);
	free(r->csv_units);
	free(r->line);
	free(r->chunk);
	free(r);
}

void cli_las_set_block(cli_las_reader *r, double *rows, size_t max_rows)
{
	r->block = rows;
	r->block_max = rows ? max_rows : 0;
	r->block_n = 0;
}

size_t cli_las_rows(const cli_las_reader *r)
{
	return r->block_n;
}

const char *cli_las_error(const cli_las_reader *r)
{
	return r->dead ? r->err : empty;
}

unsigned long cli_las_warnings(const cli_las_reader *r)
{
	return r->nwarn;
}

const char *cli_las_warning(const cli_las_reader *r)
{
	return r->nwarn ? r->warn : empty;
}

int cli_las_header_done(const cli_las_reader *r)
{
	return r->header_done;
}

size_t cli_las_nlines(const cli_las_reader *r)
{
	return r->nlines;
}

const cli_las_line *cli_las_line_at(const cli_las_reader *r, size_t i)
{
	return i < r->nlines ? &r->lines[i] : NULL;
}

size_t cli_las_ncurves(const cli_las_reader *r)
{
	return r->ncurves;
}

const cli_las_line *cli_las_curve(const cli_las_reader *r, size_t i)
{
	return i < r->ncurves ? &r->lines[r->curves[i]] : NULL;
}

/* ASCII case-insensitive string equality. */
static int eq_nocase(const char *a, const char *b)
{
	for (; *a && *b; a++, b++)
		if (tolower((unsigned char)*a) != tolower((unsigned char)*b))
			return 0;
	return *a == *b;
}

const cli_las_line *cli_las_find(const cli_las_reader *r, char sec,
                                 const char *mnem)
{
	size_t i;

	for (i = 0; i < r->nlines; i++)
		if (r->lines[i].kind == CLI_LAS_LINE_ITEM &&
		    r->lines[i].section == sec &&
		    eq_nocase(r->lines[i].mnem, mnem))
			return &r->lines[i];
	return NULL;
}

double cli_las_null(const cli_las_reader *r)
{
	return r->null_value;
}

int cli_las_wrapped(const cli_las_reader *r)
{
	return r->wrap;
}

double cli_las_step(const cli_las_reader *r)
{
	return r->step;
}

int cli_las_version(const cli_las_reader *r)
{
	return r->csv ? 0 : r->version;
}

char cli_las_delimiter(const cli_las_reader *r)
{
	return r->dlm;
}

unsigned long long cli_las_bytes(const cli_las_reader *r)
{
	return r->bytes;
}

void cli_las_set_order_check(cli_las_reader *r, int on)
{
	r->order_check = on;
}

void cli_las_set_csv(cli_las_reader *r, double null_value)
{
	if (r->lineno || r->nlines)
		return; /* only before any input */
	r->csv = 1;
	r->null_value = null_value;
	r->have_null = 1;
}

int cli_las_is_csv(const cli_las_reader *r)
{
	return r->csv;
}

double cli_las_first_depth(const cli_las_reader *r)
{
	return r->first_depth;
}

double cli_las_last_depth(const cli_las_reader *r)
{
	return r->nrows ? r->last_depth : NAN;
}

double cli_las_data_step(const cli_las_reader *r)
{
	if (r->nrows < 2)
		return NAN;
	return r->step_uniform ? r->first_step : 0.0;
}

unsigned long cli_las_nrows(const cli_las_reader *r)
{
	return r->nrows;
}

size_t cli_las_ntrailer(const cli_las_reader *r)
{
	return r->ntrailer;
}

static int is_blank(int c)
{
	return c == ' ' || c == '\t';
}

/* Parses s (NUL-terminated, trimmed) as a finite decimal number: digits,
 * sign, '.', exponent only (no hex, inf or nan). 1 on success.
 * Text in JSON's number form (nearly every LAS value: "2.4482",
 * "-999.25", "1.5e-3") is read by proto_num_parse (rwnum, correctly
 * rounded: the double strtod gives, bit for bit); the other forms the
 * rule allows (".5", "5.", "+1", "007", "1E+03") by strtod as before.
 * Either way an overflow is refused and an underflow reads as zero.
 * parse_numn: the same for the len bytes at s, with s[len] == '\0'. */
static int parse_numn(const char *s, size_t len, double *out)
{
	const char *p;
	char *end;
	double v;
	size_t used;
	int st;

	if (!len)
		return 0;
	st = proto_num_parse(s, len, &v, &used);
	if (used == len &&
	    (st == PROTO_NUM_OK || (st == PROTO_NUM_ERANGE && v == 0))) {
		*out = v;
		return 1;
	}
	if (st == PROTO_NUM_ERANGE && used == len)
		return 0; /* beyond the double range */
	for (p = s; *p; p++)
		if (!isdigit((unsigned char)*p) && *p != '+' && *p != '-' &&
		    *p != '.' && *p != 'e' && *p != 'E')
			return 0;
	errno = 0;
	v = strtod(s, &end);
	if (end == s || *end != '\0' || !isfinite(v))
		return 0;
	*out = v;
	return 1;
}

static int parse_num(const char *s, double *out)
{
	return parse_numn(s, strlen(s), out);
}

/* Copies [b, e) into *dst as a NUL-terminated string with surrounding
 * blanks trimmed, advancing *dst. */
static char *put_trim(char **dst, const char *b, const char *e)
{
	char *s = *dst;

	while (b < e && is_blank((unsigned char)*b))
		b++;
	while (e > b && is_blank((unsigned char)e[-1]))
		e--;
	memcpy(s, b, (size_t)(e - b));
	s[e - b] = '\0';
	*dst = s + (e - b) + 1;
	return s;
}

/* Appends a kept header line; for items splits the fields. Returns the
 * new line or NULL (reader killed). */
static cli_las_line *keep_line(cli_las_reader *r, int kind, const char *s,
                               size_t n)
{
	cli_las_line *l;
	char *mem;

	if (r->nlines >= MAX_HEADER_LINES) {
		fail(r, r->lineno, "header has more than %u lines",
		     MAX_HEADER_LINES);
		return NULL;
	}
	if (r->nlines == r->caplines) {
		size_t cap = r->caplines ? 2 * r->caplines : 64;
		cli_las_line *nl = realloc(r->lines, cap * sizeof *nl);

		if (!nl) {
			fail(r, r->lineno, "out of memory");
			return NULL;
		}
		r->lines = nl;
		r->caplines = cap;
	}
	/* raw copy plus room for four trimmed fields of the same line */
	mem = malloc(2 * n + 5);
	if (!mem) {
		fail(r, r->lineno, "out of memory");
		return NULL;
	}
	memcpy(mem, s, n);
	mem[n] = '\0';
	l = &r->lines[r->nlines++];
	l->kind = kind;
	l->section = r->sec;
	l->lineno = r->lineno;
	l->raw = mem;
	l->mnem = l->unit = l->value = l->desc = mem + n;
	return l;
}

/* Checks the section being left is complete. */
static int close_section(cli_las_reader *r)
{
	if (r->sec == 'V') {
		if (!r->have_vers)
			return fail(r, r->sec_line,
			            "~V section has no VERS item");
		if (!r->have_wrap)
			return fail(r, r->sec_line,
			            "~V section has no WRAP item");
	} else if (r->sec == 'W') {
		static const char *const need[] = {"STRT", "STOP", "STEP",
		                                   "NULL"};
		const int have[] = {r->have_strt, r->have_stop, r->have_step,
		                    r->have_null};
		size_t i;

		for (i = 0; i < 4; i++)
			if (!have[i])
				return fail(r, r->sec_line,
				            "~W section has no %s item",
				            need[i]);
	} else if (r->sec == 'C' && r->ncurves == 0) {
		return fail(r, r->sec_line, "~C section has no curves");
	}
	return CLI_LAS_OK;
}

static unsigned sec_bit(char c)
{
	switch (c) {
	case 'V': return SEC_V;
	case 'W': return SEC_W;
	case 'C': return SEC_C;
	case 'P': return SEC_P;
	case 'O': return SEC_O;
	case 'A': return SEC_A;
	default: return 0;
	}
}

/* The section letter of a LAS 3.0 title word (case-insensitive): the
 * log sections by their 3.0 or 2.0 names, 'X' for every other section
 * (kept as text). */
static char v3_letter(const char *w, size_t n)
{
	static const struct {
		const char *name;
		char c;
	} names[] = {
	    {"V", 'V'},
	    {"VERSION", 'V'},
	    {"W", 'W'},
	    {"WELL", 'W'},
	    {"C", 'C'},
	    {"CURVE", 'C'},
	    {"P", 'P'},
	    {"PARAMETER", 'P'},
	    {"O", 'O'},
	    {"OTHER", 'O'},
	    {"A", 'A'},
	    {"ASCII", 'A'},
	    {"LOG_DATA", 'A'},
	    {"LOG_DEFINITION", 'C'},
	    {"LOG_PARAMETER", 'P'},
	};
	for (size_t i = 0; i < sizeof names / sizeof *names; i++)
		if (strlen(names[i].name) == n &&
		    strncasecmp(names[i].name, w, n) == 0)
			return names[i].c;
	return 'X';
}

/* A "~X" line in the header. */
static int section_line(cli_las_reader *r, const char *s, size_t n,
                        const char *p)
{
	char c = (char)toupper((unsigned char)p[1]);
	unsigned bit;

	if (p[1] == '\0' || is_blank((unsigned char)p[1]))
		return fail(r, r->lineno, "'~' without a section letter");
	if (r->version == 3) {
		size_t w = strcspn(p + 1, " \t|");
		c = v3_letter(p + 1, w);
	}
	bit = sec_bit(c);
	if (!bit && c != 'X')
		return fail(r, r->lineno,
		            "unknown section ~%c (LAS 2.0 has ~V ~W ~C ~P ~O "
		            "~A)",
		            isprint((unsigned char)p[1]) ? p[1] : '?');
	if (!r->seen && c != 'V')
		return fail(r, r->lineno, "first section is ~%c, expected ~V",
		            c);
	if (r->seen & bit)
		return fail(r, r->lineno, "duplicate ~%c section", c);
	if (close_section(r) != CLI_LAS_OK)
		return CLI_LAS_ERR;
	if (c == 'A') {
		if (!(r->seen & SEC_W))
			return fail(r, r->lineno, "~A before ~W");
		if (!(r->seen & SEC_C))
			return fail(r, r->lineno, "~A before ~C");
	}
	r->seen |= bit;
	r->sec = c;
	r->sec_line = r->lineno;
	if (!keep_line(r, c == 'A' ? CLI_LAS_LINE_DATA : CLI_LAS_LINE_SECTION,
	               s, n))
		return CLI_LAS_ERR;
	if (c == 'A') {
		r->header_done = 1;
		return CLI_LAS_HEADER;
	}
	return CLI_LAS_OK;
}

/* Parses a numeric ~W item into *v. */
static int w_number(cli_las_reader *r, const cli_las_line *l, double *v,
                    int *have)
{
	if (!parse_num(l->value, v))
		return fail(r, r->lineno, "%s value '%.40s' is not a number",
		            l->mnem, l->value);
	*have = 1;
	return CLI_LAS_OK;
}

/* Meaning of the ~V, ~W and ~C items this reader needs. */
static int item_meaning(cli_las_reader *r, const cli_las_line *l)
{
	double v;

	if (r->sec == 'V' && eq_nocase(l->mnem, "VERS")) {
		if (!parse_num(l->value, &v) || (v != 2.0 && v != 3.0))
			return fail(r, r->lineno,
			            "VERS is '%.40s', this reader handles 2.0 "
			            "and 3.0",
			            l->value);
		r->have_vers = 1;
		r->version = v == 3.0 ? 3 : 2;
		if (r->version == 3 && r->wrap)
			return fail(r, r->lineno,
			            "LAS 3.0 does not wrap (WRAP "
			            "must be NO)");
	} else if (r->sec == 'V' && eq_nocase(l->mnem, "DLM")) {
		if (eq_nocase(l->value, "SPACE"))
			r->dlm = ' ';
		else if (eq_nocase(l->value, "COMMA"))
			r->dlm = ',';
		else if (eq_nocase(l->value, "TAB"))
			r->dlm = '\t';
		else
			return fail(r, r->lineno,
			            "DLM is '%.40s', expected SPACE, COMMA or "
			            "TAB",
			            l->value);
	} else if (r->sec == 'V' && eq_nocase(l->mnem, "WRAP")) {
		if (eq_nocase(l->value, "YES"))
			r->wrap = 1;
		else if (eq_nocase(l->value, "NO"))
			r->wrap = 0;
		else
			return fail(r, r->lineno,
			            "WRAP is '%.40s', expected YES or NO",
			            l->value);
		if (r->version == 3 && r->wrap)
			return fail(r, r->lineno,
			            "LAS 3.0 does not wrap (WRAP "
			            "must be NO)");
		r->have_wrap = 1;
	} else if (r->sec == 'W' && eq_nocase(l->mnem, "STRT")) {
		return w_number(r, l, &r->strt, &r->have_strt);
	} else if (r->sec == 'W' && eq_nocase(l->mnem, "STOP")) {
		return w_number(r, l, &r->stop, &r->have_stop);
	} else if (r->sec == 'W' && eq_nocase(l->mnem, "STEP")) {
		return w_number(r, l, &r->step, &r->have_step);
	} else if (r->sec == 'W' && eq_nocase(l->mnem, "NULL")) {
		return w_number(r, l, &r->null_value, &r->have_null);
	} else if (r->sec == 'C') {
		if (r->ncurves >= CLI_LAS_MAX_CURVES)
			return fail(r, r->lineno, "more than %u curves",
			            CLI_LAS_MAX_CURVES);
		r->curves[r->ncurves++] = r->nlines - 1;
	}
	return CLI_LAS_OK;
}

/* "MNEM.UNIT DATA : DESCRIPTION" in ~V, ~W, ~C or ~P. */
static int item_line(cli_las_reader *r, const char *s, size_t n, const char *p)
{
	const char *end = s + n, *dot, *colon, *u, *ue, *q, *me;
	cli_las_line *l;
	char *dst;

	dot = memchr(p, '.', (size_t)(end - p));
	if (!dot)
		return fail(r, r->lineno,
		            "%s line has no '.' after the "
		            "mnemonic",
		            r->sec == 'C' ? "curve" : "header");
	colon = NULL;
	q = end;
	if (r->version == 3) {
		/* "... : DESCRIPTION {FORMAT} | ASSOCIATION": the colon comes
		 * before the braces and the bar. */
		const char *b = memchr(dot, '{', (size_t)(end - dot));
		const char *bar = memchr(dot, '|', (size_t)(end - dot));
		if (bar && (!b || bar < b))
			b = bar;
		if (b)
			q = b;
	}
	while (q > dot + 1)
		if (*--q == ':') {
			colon = q;
			break;
		}
	if (!colon)
		return fail(r, r->lineno,
		            "header line has no ':' before the "
		            "description");
	me = dot; /* the standard layout pads short mnemonics: "FLD ." */
	while (me > p && is_blank((unsigned char)me[-1]))
		me--;
	for (q = p; q < me; q++)
		if (is_blank((unsigned char)*q) || *q == ':')
			break;
	if (me == p)
		return fail(r, r->lineno, "empty mnemonic before '.'");
	if (q < me)
		return fail(r, r->lineno, "mnemonic '%.*s' contains '%c'",
		            (int)(me - p > 40 ? 40 : me - p), p,
		            *q == ':' ? ':' : ' ');
	u = dot + 1;
	for (ue = u; ue < colon && !is_blank((unsigned char)*ue); ue++)
		;
	l = keep_line(r, CLI_LAS_LINE_ITEM, s, n);
	if (!l)
		return CLI_LAS_ERR;
	dst = l->raw + n + 1;
	l->mnem = put_trim(&dst, p, dot);
	l->unit = put_trim(&dst, u, ue);
	l->value = put_trim(&dst, ue, colon);
	l->desc = put_trim(&dst, colon + 1, end);
	return item_meaning(r, l);
}

/* One complete header line s[0..n). */
static int header_line(cli_las_reader *r, const char *s, size_t n)
{
	const char *p = s, *end = s + n;

	r->header_bytes += n + 1;
	if (r->header_bytes > CLI_LAS_MAX_HEADER)
		return fail(r, r->lineno, "header exceeds %u bytes",
		            CLI_LAS_MAX_HEADER);
	while (p < end && is_blank((unsigned char)*p))
		p++;
	if (p < end && *p == '~')
		return section_line(r, s, n, p);
	if (p < end && *p == '#')
		return keep_line(r, CLI_LAS_LINE_COMMENT, s, n) ? CLI_LAS_OK
		                                                : CLI_LAS_ERR;
	if (p == end || r->sec == 'O' || r->sec == 'X')
		return keep_line(r, CLI_LAS_LINE_TEXT, s, n) ? CLI_LAS_OK
		                                             : CLI_LAS_ERR;
	if (!r->sec)
		return fail(r, r->lineno, "text before the ~V section");
	return item_line(r, s, n, p);
}

/* Tolerance for comparing a depth with STRT, STOP or a STEP multiple. */
static double depth_tol(const cli_las_reader *r, double ref)
{
	double t = STEP_RTOL * fabs(r->step);
	double m = 1e-9 * (1.0 + fabs(ref));

	return t > m ? t : m;
}

/* With the order check: the depth must move on in one direction, the
 * one STEP gives (or, for STEP 0 and CSV files, the first two rows). */
static int check_order(cli_las_reader *r, double depth)
{
	double d = depth - r->last_depth;

	if (d == 0)
		return fail(r, r->row_line,
		            "depth %.10g repeats the previous depth", depth);
	if (!r->dir)
		r->dir = !r->csv && r->step != 0 && isfinite(r->step)
		             ? (r->step > 0 ? 1 : -1)
		             : (d > 0 ? 1 : -1);
	if ((d > 0 ? 1 : -1) != r->dir)
		return fail(r, r->row_line,
		            "depth %.10g after %.10g: depths must keep %s",
		            depth, r->last_depth,
		            r->dir > 0 ? "increasing" : "decreasing");
	return CLI_LAS_OK;
}

/* A row is complete in r->acc: checks the depth and stores it. */
static int store_row(cli_las_reader *r)
{
	double *dst = r->block + r->block_n * r->ncurves;
	double depth = r->acc[0];
	size_t i;

	if (depth == r->null_value || isnan(depth))
		return fail(r, r->row_line, "depth is the NULL value");
	if (r->nrows > 0 && r->order_check && check_order(r, depth))
		return CLI_LAS_ERR;
	if (r->nrows == 0) {
		if (!r->csv && fabs(depth - r->strt) > depth_tol(r, r->strt))
			warn(r, r->row_line,
			     "first depth %.10g differs from "
			     "STRT %.10g",
			     depth, r->strt);
		r->first_depth = depth;
	} else {
		double d = depth - r->last_depth;

		if (r->nrows == 1)
			r->first_step = d;
		else if (fabs(d - r->first_step) >
		         1e-6 * (fabs(r->first_step) + 1e-12) +
		             1e-9 * (1 + fabs(depth)))
			r->step_uniform = 0;
		if (!r->csv && r->step != 0.0 &&
		    fabs(d - r->step) > depth_tol(r, r->step))
			warn(r, r->row_line,
			     "depth step %.10g differs from "
			     "STEP %.10g",
			     d, r->step);
	}
	for (i = 0; i < r->ncurves; i++)
		dst[i] = r->acc[i] == r->null_value ? NAN : r->acc[i];
	r->block_n++;
	r->nrows++;
	r->last_depth = depth;
	r->nacc = 0;
	return CLI_LAS_OK;
}

/* Keeps a line after the LAS 3.0 ~Log_Data section, for the writer. */
static int trailer_line(cli_las_reader *r, const char *s, size_t n)
{
	char *t;

	r->trailer_bytes += n + 1;
	if (r->trailer_bytes > CLI_LAS_MAX_HEADER)
		return fail(r, r->lineno,
		            "sections after ~Log_Data exceed %u bytes",
		            CLI_LAS_MAX_HEADER);
	if (r->ntrailer == r->captrailer) {
		size_t cap = r->captrailer ? 2 * r->captrailer : 32;
		char **nt = realloc(r->trailer, cap * sizeof *nt);
		if (!nt)
			return fail(r, r->lineno, "out of memory");
		r->trailer = nt;
		r->captrailer = cap;
	}
	t = malloc(n + 1);
	if (!t)
		return fail(r, r->lineno, "out of memory");
	memcpy(t, s, n);
	t[n] = '\0';
	r->trailer[r->ntrailer++] = t;
	return CLI_LAS_OK;
}

/* A missing value in a CSV field or a delimited LAS 3.0 field. */
static int missing_text(const char *t)
{
	return !*t || eq_nocase(t, "nan") || eq_nocase(t, "null") ||
	       eq_nocase(t, "na") || eq_nocase(t, "n/a");
}

/* One data line of delimited values (LAS 3.0 COMMA or TAB, or CSV):
 * fields split at dlm, blanks around them trimmed, quotes removed. */
static int delimited_line(cli_las_reader *r, char *s, size_t n, char dlm)
{
	char *p = s, *end = s + n;
	size_t ntok = 0;

	for (;;) {
		char *b = p, *e, *w;
		int quoted = 0;
		while (b < end && is_blank((unsigned char)*b) && *b != dlm)
			b++;
		if (b < end && *b == '"') {
			/* "text" with "" for a quote */
			quoted = 1;
			w = e = ++b;
			while (e < end) {
				if (*e == '"' && e + 1 < end && e[1] == '"') {
					*w++ = '"';
					e += 2;
				} else if (*e == '"') {
					break;
				} else
					*w++ = *e++;
			}
			if (e == end)
				return fail(r, r->lineno,
				            "value %zu has an unclosed quote",
				            ntok + 1);
			p = e + 1;
			*w = '\0';
			while (p < end && *p != dlm)
				p++;
		} else {
			e = b;
			while (e < end && *e != dlm)
				e++;
			p = e;
			while (e > b && is_blank((unsigned char)e[-1]))
				e--;
			*e = '\0';
		}
		if (ntok < r->ncurves) {
			double *v = &r->acc[ntok];
			if (missing_text(b) && (!quoted || !*b))
				*v = NAN;
			else if (!parse_num(b, v))
				return fail(
				    r, r->lineno,
				    "value %zu ('%.32s') of curve %s is "
				    "not a number%s",
				    ntok + 1, b, cli_las_curve(r, ntok)->mnem,
				    r->version == 3
				        ? " (text channels are not read)"
				        : "");
		}
		ntok++;
		if (p >= end)
			break;
		p++; /* past the delimiter */
	}
	if (ntok != r->ncurves)
		return fail(r, r->lineno,
		            "data row has %zu values, expected %zu", ntok,
		            r->ncurves);
	r->nacc = ntok;
	return store_row(r);
}

/* One complete line after ~A. The line buffer is ours to cut. */
static int data_line(cli_las_reader *r, char *s, size_t n)
{
	char *p = s, *end = s + n, *tok;
	size_t ntok = 0, room;
	int wrapped_first;

	while (p < end && is_blank((unsigned char)*p))
		p++;
	if (r->in_trailer)
		return trailer_line(r, s, n);
	if (p == end || *p == '#')
		return CLI_LAS_OK;
	if (*p == '~' && r->version == 3 && !r->csv) {
		/* 3.0 allows sections after ~Log_Data: kept as text */
		r->in_trailer = 1;
		return trailer_line(r, s, n);
	}
	if (*p == '~')
		return fail(r, r->lineno,
		            "section line after ~A (~A must be "
		            "the last section)");
	if (r->block_n >= r->block_max)
		return CLI_LAS_FULL;
	if (r->nacc == 0)
		r->row_line = r->lineno;
	if (r->csv && r->csv_dlm != ' ')
		return delimited_line(r, s, n, r->csv_dlm);
	if (r->dlm != ' ')
		return delimited_line(r, s, n, r->dlm);
	wrapped_first = r->wrap && r->nacc == 0;
	if (r->wrap && n > WRAP_LINE_MAX)
		warn(r, r->lineno,
		     "wrapped data line longer than %u "
		     "characters",
		     WRAP_LINE_MAX);
	room = r->ncurves - r->nacc;
	while (p < end) {
		tok = p;
		while (p < end && !is_blank((unsigned char)*p))
			p++;
		*p = '\0'; /* s has room: the buffer holds MAX_LINE + 1 */
		if (ntok < room && !parse_numn(tok, (size_t)(p - tok),
		                               &r->acc[r->nacc + ntok]))
			return fail(r, r->lineno,
			            "value %zu ('%.32s') is not "
			            "a number",
			            ntok + 1, tok);
		ntok++;
		p++;
		while (p < end && is_blank((unsigned char)*p))
			p++;
	}
	if (wrapped_first && ntok != 1)
		return fail(r, r->lineno,
		            "wrapped data: depth line has %zu "
		            "values, expected the depth alone",
		            ntok);
	if (!r->wrap) {
		if (ntok != r->ncurves)
			return fail(r, r->lineno,
			            "data row has %zu values, "
			            "expected %zu",
			            ntok, r->ncurves);
		r->nacc = ntok;
		return store_row(r);
	}
	if (ntok > room)
		return fail(r, r->lineno,
		            "wrapped row starting at line %lu "
		            "has more than %zu values",
		            r->row_line, r->ncurves);
	r->nacc += ntok;
	if (r->nacc == r->ncurves)
		return store_row(r);
	return CLI_LAS_OK;
}

/* ---- CSV ------------------------------------------------------------- */

/* Splits a CSV line at dlm (blank runs for ' ') into at most max trimmed
 * fields, quotes removed; the line buffer is cut in place. Returns the
 * number of fields, or -1 for an unclosed quote or too many fields. */
static int csv_split(char *s, char dlm, char **f, int max)
{
	int n = 0;
	char *p = s;

	for (;;) {
		char *b = p, *e, *w;
		while (*b && is_blank((unsigned char)*b) && *b != dlm)
			b++;
		if (n == max)
			return -1;
		if (dlm == ' ' && !*b)
			break;
		if (*b == '"') {
			w = e = ++b;
			while (*e && !(*e == '"' && e[1] != '"')) {
				if (*e == '"')
					e++;
				*w++ = *e++;
			}
			if (!*e)
				return -1;
			*w = '\0';
			p = e + 1;
			while (*p && *p != dlm && !(dlm == ' ' && is_blank(*p)))
				p++;
		} else {
			e = b;
			while (*e && *e != dlm && !(dlm == ' ' && is_blank(*e)))
				e++;
			p = e;
			while (e > b && is_blank((unsigned char)e[-1]))
				e--;
		}
		f[n++] = b;
		if (!*p) {
			*e = '\0';
			break;
		}
		*e = '\0';
		p++;
		if (dlm == ' ') {
			while (is_blank((unsigned char)*p))
				p++;
			if (!*p)
				break;
		}
	}
	return n;
}

static char *dup_clean(const char *s, int unit)
{
	size_t n = strlen(s);
	char *d = malloc(n + 1);

	if (!d)
		return NULL;
	for (size_t i = 0; i <= n; i++) {
		char c = s[i];
		/* LAS item fields: no blanks, and no '.' or ':' in a
		 * mnemonic, no ':' in a unit */
		if (c && (is_blank((unsigned char)c) || c == ':' ||
		          (!unit && c == '.') || (unsigned char)c < 32))
			c = '_';
		d[i] = c;
	}
	if (!unit && (d[0] == '#' || d[0] == '~'))
		d[0] = '_';
	return d;
}

/* The CSV header row: names and units of the columns. */
static int csv_names(cli_las_reader *r, char *s)
{
	char *f[CLI_LAS_MAX_CURVES];
	int n;

	if (strchr(s, ','))
		r->csv_dlm = ',';
	else if (strchr(s, '\t'))
		r->csv_dlm = '\t';
	else if (strchr(s, ';'))
		r->csv_dlm = ';';
	else
		r->csv_dlm = ' ';
	n = csv_split(s, r->csv_dlm, f, CLI_LAS_MAX_CURVES);
	if (n < 0)
		return fail(r, r->lineno,
		            "CSV header: an unclosed quote, or more than %u "
		            "columns",
		            CLI_LAS_MAX_CURVES);
	r->csv_names = calloc((size_t)n, sizeof *r->csv_names);
	r->csv_units = calloc((size_t)n, sizeof *r->csv_units);
	if (!r->csv_names || !r->csv_units)
		return fail(r, r->lineno, "out of memory");
	for (int i = 0; i < n; i++) {
		char *b = f[i], *u = NULL, *e;
		size_t len = strlen(b);
		/* NAME[UNIT] or NAME (UNIT) */
		if (len && b[len - 1] == ']' && (u = strrchr(b, '['))) {
			b[len - 1] = '\0';
			*u++ = '\0';
		} else if (len && b[len - 1] == ')' && (u = strrchr(b, '('))) {
			b[len - 1] = '\0';
			*u++ = '\0';
		}
		e = b + strlen(b);
		while (e > b && is_blank((unsigned char)e[-1]))
			*--e = '\0';
		if (!*b)
			return fail(r, r->lineno,
			            "CSV header: column %d has no name", i + 1);
		r->csv_names[i] = dup_clean(b, 0);
		r->csv_units[i] = dup_clean(u ? u : "", 1);
		r->csv_ncols++;
		if (!r->csv_names[i] || !r->csv_units[i])
			return fail(r, r->lineno, "out of memory");
	}
	if (n < 2)
		return fail(r, r->lineno,
		            "CSV header names %d column; a depth column and at "
		            "least one curve are needed",
		            n);
	return CLI_LAS_OK;
}

/* Is s a row of units (no number in it) for a header that had none? */
static int csv_units_row(cli_las_reader *r, const char *line)
{
	char buf[4096], *f[CLI_LAS_MAX_CURVES];
	int n, text = 0;
	double v;

	for (size_t i = 0; i < r->csv_ncols; i++)
		if (r->csv_units[i][0])
			return 0;
	if (strlen(line) >= sizeof buf)
		return 0;
	memcpy(buf, line, strlen(line) + 1);
	n = csv_split(buf, r->csv_dlm, f, CLI_LAS_MAX_CURVES);
	if (n != (int)r->csv_ncols)
		return 0;
	for (int i = 0; i < n; i++) {
		if (parse_num(f[i], &v))
			return 0;
		text += f[i][0] != '\0' && !missing_text(f[i]);
	}
	if (!text)
		return 0;
	for (int i = 0; i < n; i++) {
		char *u = dup_clean(f[i], 1);
		if (!u)
			return 0;
		free(r->csv_units[i]);
		r->csv_units[i] = u;
	}
	return 1;
}

/* Feeds one made-up header line through the LAS header parser. */
static int synth(cli_las_reader *r, const char *fmt, ...)
{
	char line[1024];
	va_list ap;
	int n;

	va_start(ap, fmt);
	n = vsnprintf(line, sizeof line, fmt, ap);
	va_end(ap);
	if (n < 0 || (size_t)n >= sizeof line)
		return fail(r, r->lineno, "CSV header field too long");
	return header_line(r, line, (size_t)n);
}

/* The CSV file as a LAS 2.0 header (STRT, STOP and STEP are placeholders
 * the writer replaces). */
static int csv_header(cli_las_reader *r)
{
	const char *du = r->csv_units[0];
	int rc = CLI_LAS_OK;

	rc |= synth(r, "~Version information");
	rc |= synth(r, " VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0");
	rc |= synth(r, " WRAP.    NO : ONE LINE PER DEPTH STEP");
	rc |= synth(r, "~Well information");
	rc |= synth(r, " STRT.%s 0 : START DEPTH", du);
	rc |= synth(r, " STOP.%s 0 : STOP DEPTH", du);
	rc |= synth(r, " STEP.%s 0 : STEP", du);
	rc |= synth(r, " NULL. %.15g : NULL VALUE", r->null_value);
	rc |= synth(r, "~Curve information");
	for (size_t i = 0; i < r->csv_ncols && !rc; i++)
		rc |= synth(r, " %s.%s : column %zu of the CSV file",
		            r->csv_names[i], r->csv_units[i], i + 1);
	if (rc || r->dead)
		return CLI_LAS_ERR;
	return synth(r, "~A");
}

/* One line of a CSV file before its data. */
static int csv_line(cli_las_reader *r, char *s, size_t n)
{
	const char *p = s;
	int rc;

	while (p < s + n && is_blank((unsigned char)*p))
		p++;
	if (p == s + n || *p == '#')
		return CLI_LAS_OK;
	if (r->csv_state == 0) {
		r->csv_state = 1;
		return csv_names(r, s);
	}
	if (r->csv_state == 1 && csv_units_row(r, s)) {
		r->csv_state = 2;
		return CLI_LAS_OK;
	}
	/* the first data row: the header is complete; the row stays
	 * pending for the data parser */
	rc = csv_header(r);
	if (rc == CLI_LAS_HEADER)
		r->csv_keep = 1;
	return rc;
}

/* Processes the pending complete line. */
static int process_line(cli_las_reader *r)
{
	int rc;

	if (r->linelen > 0 && r->line[r->linelen - 1] == '\r')
		r->linelen--;
	r->line[r->linelen] = '\0';
	if (!r->header_done && r->csv)
		rc = csv_line(r, r->line, r->linelen);
	else if (!r->header_done)
		rc = header_line(r, r->line, r->linelen);
	else
		rc = data_line(r, r->line, r->linelen);
	if (rc == CLI_LAS_FULL)
		return rc; /* keep the line pending */
	if (rc == CLI_LAS_HEADER && r->csv_keep) {
		r->csv_keep = 0;
		return rc; /* the first CSV data row, still to be read */
	}
	r->pending = 0;
	r->linelen = 0;
	return rc;
}

int cli_las_feed(cli_las_reader *r, const void *buf, size_t len, size_t *used)
{
	const unsigned char *b = buf;
	size_t i = 0;
	int rc;

	*used = 0;
	if (r->dead)
		return CLI_LAS_ERR;
	if (r->finished)
		return fail(r, r->lineno, "input after end of input");
	for (;;) {
		if (r->pending) {
			rc = process_line(r);
			if (rc != CLI_LAS_OK) {
				*used = i;
				r->bytes += i;
				return rc;
			}
		}
		if (i == len)
			break;
		/* The rest of this line at once: the checks of a byte at a
		 * time (a NUL, then the length, at the first byte that
		 * offends) on the span up to the next newline. */
		const unsigned char *nl = memchr(b + i, '\n', len - i);
		size_t seg = (size_t)((nl ? nl : b + len) - (b + i));
		const unsigned char *z = memchr(b + i, '\0', seg);
		size_t room = CLI_LAS_MAX_LINE - r->linelen;
		if (z && (size_t)(z - (b + i)) <= room)
			return fail(r, r->lineno + 1, "NUL byte");
		if (seg > room)
			return fail(r, r->lineno + 1,
			            "line longer than %u "
			            "bytes",
			            CLI_LAS_MAX_LINE);
		memcpy(r->line + r->linelen, b + i, seg);
		r->linelen += seg;
		i += seg;
		if (nl) {
			r->lineno++;
			r->pending = 1;
			i++;
		}
	}
	*used = i;
	r->bytes += i;
	return CLI_LAS_OK;
}

int cli_las_finish(cli_las_reader *r)
{
	int rc;

	if (r->dead)
		return CLI_LAS_ERR;
	if (r->finished)
		return CLI_LAS_OK;
	if (!r->pending && r->linelen > 0) {
		r->lineno++;
		r->pending = 1;
	}
	if (r->pending) {
		rc = process_line(r);
		if (rc == CLI_LAS_FULL || rc == CLI_LAS_ERR)
			return rc;
	}
	if (!r->header_done && r->csv)
		return fail(r, r->lineno ? r->lineno : 1,
		            r->csv_state ? "CSV file has a header line but no "
		                           "data rows"
		                         : "CSV file has no header line");
	if (!r->header_done) {
		if (!(r->seen & SEC_V))
			return fail(r, r->lineno ? r->lineno : 1,
			            "end of input: no ~V "
			            "section");
		if (close_section(r) != CLI_LAS_OK)
			return CLI_LAS_ERR;
		if (!(r->seen & SEC_W))
			return fail(r, r->lineno,
			            "end of input: no ~W "
			            "section");
		if (!(r->seen & SEC_C))
			return fail(r, r->lineno,
			            "end of input: no ~C "
			            "section");
		return fail(r, r->lineno, "end of input: no ~A section");
	}
	if (r->nacc > 0)
		return fail(r, r->lineno,
		            "end of input inside the wrapped "
		            "row starting at line %lu (%zu of %zu values)",
		            r->row_line, r->nacc, r->ncurves);
	if (r->nrows > 0 && !r->csv &&
	    fabs(r->last_depth - r->stop) > depth_tol(r, r->stop))
		warn(r, r->lineno, "last depth %.10g differs from STOP %.10g",
		     r->last_depth, r->stop);
	r->finished = 1;
	return CLI_LAS_OK;
}

int cli_las_read(cli_las_reader *r, FILE *fp)
{
	size_t used, n;
	int rc;

	if (r->dead)
		return CLI_LAS_ERR;
	if (r->header_done && r->block_max == 0)
		return fail(r, r->lineno,
		            "no row block set before reading "
		            "data");
	if (!r->chunk) {
		r->chunk = malloc(CHUNK);
		if (!r->chunk)
			return fail(r, r->lineno, "out of memory");
	}
	for (;;) {
		if (r->chunk_off < r->chunk_len) {
			rc = cli_las_feed(r, r->chunk + r->chunk_off,
			                  r->chunk_len - r->chunk_off, &used);
			r->chunk_off += used;
			if (rc == CLI_LAS_FULL)
				return CLI_LAS_OK;
			if (rc != CLI_LAS_OK)
				return rc;
			continue;
		}
		if (r->eof) {
			rc = cli_las_finish(r);
			return rc == CLI_LAS_FULL ? CLI_LAS_OK : rc;
		}
		n = fread(r->chunk, 1, CHUNK, fp);
		if (n == 0) {
			if (ferror(fp))
				return fail(r, r->lineno + 1, "read error");
			r->eof = 1;
		}
		r->chunk_len = n;
		r->chunk_off = 0;
	}
}

/* ---- writers --------------------------------------------------------- */

/* Formats v (finite) into buf per cli_las_write_rows. */
static int fmt_value(char *buf, size_t size, double v, int decimals)
{
	double a = fabs(v);
	int n;

	if (!isfinite(v))
		return -1;
	if (a != 0.0 && (a < 0.5 * pow(10.0, -decimals) || a >= 1e15))
		n = snprintf(buf, size, "%.*e", decimals > 6 ? decimals : 6, v);
	else
		n = snprintf(buf, size, "%.*f", decimals, v);
	return n < 0 || (size_t)n >= size ? -1 : 0;
}

/* Sets err to the message. Returns -1. */
static int werr(char *err, size_t errlen, const char *msg, const char *what)
{
	if (err && errlen)
		snprintf(err, errlen, "%s%s%.40s%s", msg, what ? " '" : "",
		         what ? what : "", what ? "'" : "");
	return -1;
}

/* Checks the curves and note the writer would add. */
static int check_additions(const cli_las_newcurve *add, size_t nadd,
                           const char *note, char *err, size_t errlen)
{
	size_t i;
	const char *p;

	for (i = 0; i < nadd; i++) {
		const char *m = add[i].mnem;

		if (!m || !*m || *m == '#' || *m == '~' ||
		    strpbrk(m, " \t.:\r\n"))
			return werr(err, errlen,
			            "new curve mnemonic must be "
			            "non-empty, without space '.' ':' or a "
			            "leading '#' '~':",
			            m ? m : "");
		if (add[i].unit && strpbrk(add[i].unit, " \t:\r\n"))
			return werr(err, errlen,
			            "new curve unit must not "
			            "contain space or ':':",
			            add[i].unit);
		if (add[i].desc && strpbrk(add[i].desc, ":\r\n"))
			return werr(err, errlen,
			            "new curve description must "
			            "not contain ':' or a line break:",
			            add[i].desc);
	}
	for (p = note; p && *p;) {
		const char *q = p;

		while (*q == ' ' || *q == '\t')
			q++;
		if (*q == '~')
			return werr(err, errlen,
			            "note line must not start "
			            "with '~'",
			            NULL);
		q = strchr(p, '\n');
		if (!q)
			break;
		p = q + 1;
	}
	return 0;
}

static int write_curves(FILE *fp, const cli_las_newcurve *add, size_t nadd)
{
	size_t i;

	for (i = 0; i < nadd; i++)
		if (fprintf(fp, " %s.%s  : %s\n", add[i].mnem,
		            add[i].unit ? add[i].unit : "",
		            add[i].desc ? add[i].desc : "") < 0)
			return -1;
	return 0;
}

static int write_note(FILE *fp, const char *note)
{
	const char *p = note, *q;

	while (p && *p) {
		q = strchr(p, '\n');
		if (!q)
			q = p + strlen(p);
		if (fprintf(fp, "%.*s\n", (int)(q - p), p) < 0)
			return -1;
		p = *q ? q + 1 : q;
	}
	return 0;
}

/* Writes a ~W item with its value replaced, padded for a later patch,
 * recording where the value starts. */
static int write_override(FILE *fp, const cli_las_line *l, const char *value,
                          int width, long *at)
{
	if (fprintf(fp, " %s.%s ", l->mnem, l->unit) < 0)
		return -1;
	*at = ftell(fp);
	return fprintf(fp, "%-*s : %s\n", width, value, l->desc) < 0 ? -1 : 0;
}

int cli_las_write_header_opts(FILE *fp, const cli_las_reader *r,
                              const cli_las_newcurve *add, size_t nadd,
                              const char *note, cli_las_wopts *o, char *err,
                              size_t errlen)
{
	char prev = 0;
	size_t i;

	if (o)
		o->strt_at = o->stop_at = o->step_at = -1;
	if (!r->header_done || r->dead)
		return werr(err, errlen, "reader has no complete header", NULL);
	if (check_additions(add, nadd, note, err, errlen))
		return -1;
	for (i = 0; i < r->nlines; i++) {
		const cli_las_line *l = &r->lines[i];
		int rc = 0;

		if (l->kind == CLI_LAS_LINE_SECTION ||
		    l->kind == CLI_LAS_LINE_DATA) {
			if (prev == 'C')
				rc |= write_curves(fp, add, nadd);
			else if (prev == 'O')
				rc |= write_note(fp, note);
			if (l->kind == CLI_LAS_LINE_DATA &&
			    !(r->seen & SEC_O) && note && *note) {
				rc |= fprintf(fp, "~Other information\n") < 0;
				rc |= write_note(fp, note);
			}
			prev = l->section;
		}
		if (l->kind == CLI_LAS_LINE_ITEM && l->section == 'W' && o &&
		    o->strt && eq_nocase(l->mnem, "STRT"))
			rc |= write_override(fp, l, o->strt, o->width,
			                     &o->strt_at);
		else if (l->kind == CLI_LAS_LINE_ITEM && l->section == 'W' &&
		         o && o->stop && eq_nocase(l->mnem, "STOP"))
			rc |= write_override(fp, l, o->stop, o->width,
			                     &o->stop_at);
		else if (l->kind == CLI_LAS_LINE_ITEM && l->section == 'W' &&
		         o && o->step && eq_nocase(l->mnem, "STEP"))
			rc |= write_override(fp, l, o->step, o->width,
			                     &o->step_at);
		else if (l->kind == CLI_LAS_LINE_ITEM && l->section == 'V' &&
		         eq_nocase(l->mnem, "WRAP") && r->wrap)
			rc |= fprintf(fp, "WRAP.   NO  : One line per depth "
			                  "step\n") < 0;
		else if (l->kind == CLI_LAS_LINE_DATA && nadd > 0 &&
		         r->version != 3)
			rc |= fprintf(fp, "~A\n") < 0;
		else
			rc |= fprintf(fp, "%s\n", l->raw) < 0;
		if (rc)
			return werr(err, errlen, "write error", NULL);
	}
	return 0;
}

int cli_las_write_header(FILE *fp, const cli_las_reader *r,
                         const cli_las_newcurve *add, size_t nadd,
                         const char *note, char *err, size_t errlen)
{
	return cli_las_write_header_opts(fp, r, add, nadd, note, NULL, err,
	                                 errlen);
}

int cli_las_write_trailer(FILE *fp, const cli_las_reader *r)
{
	for (size_t i = 0; i < r->ntrailer; i++)
		if (fprintf(fp, "%s\n", r->trailer[i]) < 0)
			return -1;
	return 0;
}

int cli_las_write_rows(FILE *fp, const double *rows, size_t nrows, size_t ncols,
                       double null_value, int decimals)
{
	char buf[64];
	size_t i, j;

	if (decimals < 0 || decimals > 15 || !isfinite(null_value))
		return -1;
	for (i = 0; i < nrows; i++) {
		for (j = 0; j < ncols; j++) {
			double v = rows[i * ncols + j];

			if (isnan(v))
				snprintf(buf, sizeof buf, "%.15g", null_value);
			else if (fmt_value(buf, sizeof buf, v, decimals))
				return -1;
			if (fprintf(fp, " %12s", buf) < 0)
				return -1;
		}
		if (fputc('\n', fp) == EOF)
			return -1;
	}
	return 0;
}

/* Writes "MNEM[UNIT]" (or "MNEM") as one CSV field, quoted when either
 * part holds ',', '"' or a line break. */
static int csv_name(FILE *fp, const char *mnem, const char *unit)
{
	const char *part[4] = {mnem, unit && *unit ? "[" : "",
	                       unit && *unit ? unit : "",
	                       unit && *unit ? "]" : ""};
	int quote =
	    strpbrk(mnem, ",\"\r\n") || (unit && strpbrk(unit, ",\"\r\n"));
	const char *s;
	size_t i;

	if (quote && fputc('"', fp) == EOF)
		return -1;
	for (i = 0; i < 4; i++)
		for (s = part[i]; *s; s++) {
			if (quote && *s == '"' && fputc('"', fp) == EOF)
				return -1;
			if (fputc(*s, fp) == EOF)
				return -1;
		}
	return quote && fputc('"', fp) == EOF ? -1 : 0;
}

int cli_las_write_csv_header(FILE *fp, const cli_las_reader *r,
                             const cli_las_newcurve *add, size_t nadd)
{
	size_t i, k = 0;

	for (i = 0; i < r->ncurves; i++, k++) {
		const cli_las_line *c = cli_las_curve(r, i);

		if ((k && fputc(',', fp) == EOF) ||
		    csv_name(fp, c->mnem, c->unit))
			return -1;
	}
	for (i = 0; i < nadd; i++, k++)
		if ((k && fputc(',', fp) == EOF) ||
		    csv_name(fp, add[i].mnem, add[i].unit))
			return -1;
	return fputc('\n', fp) == EOF ? -1 : 0;
}

int cli_las_write_csv_rows(FILE *fp, const double *rows, size_t nrows,
                           size_t ncols, int decimals)
{
	char buf[64];
	size_t i, j;

	if (decimals < 0 || decimals > 15)
		return -1;
	for (i = 0; i < nrows; i++) {
		for (j = 0; j < ncols; j++) {
			double v = rows[i * ncols + j];

			if (j && fputc(',', fp) == EOF)
				return -1;
			if (isnan(v))
				continue;
			if (fmt_value(buf, sizeof buf, v, decimals) ||
			    fputs(buf, fp) == EOF)
				return -1;
		}
		if (fputc('\n', fp) == EOF)
			return -1;
	}
	return 0;
}
