/* LAS well-log files (Canadian Well Logging Society, LAS Version 2.0 and
 * 3.0) and CSV files with a header line: a streaming push reader that
 * keeps every header line so a writer can reproduce it, delivers data rows
 * in caller-sized blocks of doubles (NaN for the NULL value), and writers
 * for LAS (WRAP NO) and CSV. A CSV file is presented as a LAS 2.0 file
 * whose header the reader makes up from the CSV header line. Memory is
 * bounded whatever the input: the header is capped at CLI_LAS_MAX_HEADER
 * bytes, a line at CLI_LAS_MAX_LINE bytes and the curve count at
 * CLI_LAS_MAX_CURVES. Depends on libc and libm only. */
#ifndef ROCKWIRE_CLIENT_LAS_H
#define ROCKWIRE_CLIENT_LAS_H

#include <stddef.h>
#include <stdio.h>

#ifdef __cplusplus
extern "C" {
#endif

#define CLI_LAS_MAX_HEADER (1024u * 1024u) /* bytes before ~A */
#define CLI_LAS_MAX_LINE   65536u          /* bytes per line, without EOL */
#define CLI_LAS_MAX_CURVES 1024u

/* Return codes of cli_las_feed, cli_las_finish and cli_las_read. */
enum {
	CLI_LAS_ERR = -1,   /* input is malformed; see cli_las_error() */
	CLI_LAS_OK = 0,     /* all bytes consumed; feed more */
	CLI_LAS_HEADER = 1, /* header complete (after the ~A line) */
	CLI_LAS_FULL = 2    /* row block full; take rows, set a new block */
};

/* Kinds of kept header lines. */
enum {
	CLI_LAS_LINE_SECTION = 0, /* "~X..." */
	CLI_LAS_LINE_ITEM = 1,    /* MNEM.UNIT DATA : DESCRIPTION */
	CLI_LAS_LINE_COMMENT = 2, /* starts with '#' */
	CLI_LAS_LINE_TEXT = 3,    /* ~O free text, or a blank line */
	CLI_LAS_LINE_DATA = 4     /* the ~A line itself */
};

/* One header line as read. raw is the line without its end of line; for
 * CLI_LAS_LINE_ITEM mnem, unit, value and desc are the trimmed fields
 * (in ~C, value is the API code), otherwise they are "". section is the
 * upper-case letter of the enclosing section ('V','W','C','P','O','A'). */
typedef struct cli_las_line {
	int kind;
	char section;
	unsigned long lineno;
	char *raw;
	char *mnem;
	char *unit;
	char *value;
	char *desc;
} cli_las_line;

/* A curve to add on output. mnem: non-empty, no space, '.', ':' or '#'
 * start; unit: no space or ':' (may be "" or NULL); desc: no line break
 * (may be NULL). */
typedef struct cli_las_newcurve {
	const char *mnem;
	const char *unit;
	const char *desc;
} cli_las_newcurve;

typedef struct cli_las_reader cli_las_reader;

/* Allocates a reader; free with cli_las_reader_free. NULL when out of
 * memory. */
cli_las_reader *cli_las_reader_new(void);
/* Makes r read CSV (call before any input): the first non-comment line
 * names the columns, "NAME[UNIT]", "NAME (UNIT)" or "NAME", the first one
 * the depth; a next line of units (no numbers) is taken when the names
 * carry none; ',' (else tab, ';' or blanks, from the header line)
 * separates fields; empty fields, NaN, null, NA, N/A and null_value are
 * missing (NaN). */
void cli_las_set_csv(cli_las_reader *r, double null_value);
int cli_las_is_csv(const cli_las_reader *r);
/* With on, a depth equal to the previous one, or one that goes back
 * against the direction of STEP (or, for STEP 0 and CSV, of the first
 * two rows), is an error naming the line. Off by default. */
void cli_las_set_order_check(cli_las_reader *r, int on);
/* Frees a reader and all header strings; NULL is a no-op. */
void cli_las_reader_free(cli_las_reader *r);

/* Points the reader at a caller-owned row block of max_rows rows of
 * cli_las_ncurves() doubles (row-major) and resets its row count to 0.
 * The block must stay valid until the next call or until the reader is
 * freed. */
void cli_las_set_block(cli_las_reader *r, double *rows, size_t max_rows);
/* Rows stored in the current block. */
size_t cli_las_rows(const cli_las_reader *r);

/* Pushes len bytes of input. Stores in *used how many were consumed and
 * returns CLI_LAS_OK (all consumed), CLI_LAS_HEADER (stopped right after
 * the header: call again with the rest), CLI_LAS_FULL (the block is full:
 * take the rows, cli_las_set_block, call again with the rest; a complete
 * line may be held until then) or CLI_LAS_ERR (the reader is dead; every
 * later call returns CLI_LAS_ERR). Any byte sequence is safe. */
int cli_las_feed(cli_las_reader *r, const void *buf, size_t len, size_t *used);
/* Declares end of input: processes a last line without end of line and
 * checks that the file is complete. Returns CLI_LAS_OK, CLI_LAS_FULL (set
 * a new block and call again) or CLI_LAS_ERR. */
int cli_las_finish(cli_las_reader *r);

/* Reads from fp until the current block is full or input ends, keeping
 * unconsumed bytes in the reader between calls. Returns CLI_LAS_HEADER
 * once when the header is complete, then CLI_LAS_OK with rows in the
 * block (cli_las_rows() == 0 means end of data), or CLI_LAS_ERR (also on
 * a read error, or when no row block is set after the header). Do not
 * mix with cli_las_feed on one reader. */
int cli_las_read(cli_las_reader *r, FILE *fp);

/* "line N: what is wrong" for the error that killed the reader, or "". */
const char *cli_las_error(const cli_las_reader *r);
/* Number of warnings (STEP, STRT or STOP inconsistent with the depths,
 * wrapped lines over 80 characters) and the text of the first one, or "".
 * Warnings never change data. */
unsigned long cli_las_warnings(const cli_las_reader *r);
const char *cli_las_warning(const cli_las_reader *r);

/* 1 once the header is complete. */
int cli_las_header_done(const cli_las_reader *r);
/* Kept header lines, in input order, up to and including the ~A line. */
size_t cli_las_nlines(const cli_las_reader *r);
const cli_las_line *cli_las_line_at(const cli_las_reader *r, size_t i);
/* Curves of ~C in order (the first is the index: depth, time or index). */
size_t cli_las_ncurves(const cli_las_reader *r);
const cli_las_line *cli_las_curve(const cli_las_reader *r, size_t i);
/* First item with this mnemonic (case-insensitive) in section sec, or
 * NULL. */
const cli_las_line *cli_las_find(const cli_las_reader *r, char sec,
                                 const char *mnem);
/* NULL value from ~W, the input WRAP (1 = YES), and STEP (0 = variable). */
double cli_las_null(const cli_las_reader *r);
int cli_las_wrapped(const cli_las_reader *r);
double cli_las_step(const cli_las_reader *r);
/* 2 or 3 for LAS (after ~V), 0 for CSV. */
int cli_las_version(const cli_las_reader *r);
/* The data delimiter of a LAS 3.0 file (DLM): ' ', ',' or '\t'. */
char cli_las_delimiter(const cli_las_reader *r);
/* Input bytes consumed so far (complete lines processed or held). */
unsigned long long cli_las_bytes(const cli_las_reader *r);
/* Data rows read so far; the first and last depth (NaN before any); the
 * step between rows (the first one when all agree within 1e-6, 0 when
 * they vary, NaN with fewer than two rows). */
unsigned long cli_las_nrows(const cli_las_reader *r);
double cli_las_first_depth(const cli_las_reader *r);
double cli_las_last_depth(const cli_las_reader *r);
double cli_las_data_step(const cli_las_reader *r);
/* Lines of LAS 3.0 sections after ~Log_Data (kept as text). */
size_t cli_las_ntrailer(const cli_las_reader *r);

/* Writes the header of r (complete) as LAS 2.0: every kept line as read,
 * except WRAP set to NO, the nadd curves of add appended at the end of ~C,
 * the lines of note (may be NULL; '\n'-separated) appended at the end of
 * ~O (a ~O section is created before ~A if there is none), and a bare
 * "~A" line when curves were added. Returns 0, or -1 with a message in
 * err (bad new curve or note line, or a write error). */
int cli_las_write_header(FILE *fp, const cli_las_reader *r,
                         const cli_las_newcurve *add, size_t nadd,
                         const char *note, char *err, size_t errlen);
/* Options of cli_las_write_header_opts: ~W STRT, STOP and STEP values to
 * write instead of the kept ones (NULL keeps a line), left-aligned in
 * width characters so that a value can be patched in place later; the
 * file offsets where they start come back in *_at (-1 when not written
 * or the stream cannot tell). */
typedef struct cli_las_wopts {
	const char *strt, *stop, *step;
	int width;
	long strt_at, stop_at, step_at;
} cli_las_wopts;
/* cli_las_write_header with options (o may be NULL). LAS 3.0 headers keep
 * their data section line as read. */
int cli_las_write_header_opts(FILE *fp, const cli_las_reader *r,
                              const cli_las_newcurve *add, size_t nadd,
                              const char *note, cli_las_wopts *o, char *err,
                              size_t errlen);
/* Writes the LAS 3.0 sections that followed ~Log_Data, as read. 0 or -1. */
int cli_las_write_trailer(FILE *fp, const cli_las_reader *r);
/* Writes nrows rows of ncols doubles (row-major) as ~A lines, one line
 * per depth, each value " %.*f" with decimals digits (0..15), NaN as
 * null_value in %.15g form (so it reads back as NULL); a non-zero value too
 * small to show a digit at that precision, or of magnitude 1e15 or more, is
 * written in %.*e form so no value is rounded to zero or to a long digit
 * string. Returns 0, -1 on a write error or bad decimals or a non-finite
 * non-NaN value. */
int cli_las_write_rows(FILE *fp, const double *rows, size_t nrows, size_t ncols,
                       double null_value, int decimals);

/* CSV header row "MNEM[UNIT],..." for the curves of r followed by add
 * (a curve without unit is written "MNEM"); fields with ',' or '"' are
 * quoted. Returns 0 or -1 on a write error. */
int cli_las_write_csv_header(FILE *fp, const cli_las_reader *r,
                             const cli_las_newcurve *add, size_t nadd);
/* CSV data rows, values as in cli_las_write_rows, NaN as an empty field.
 * Returns 0 or -1 on a write error or bad decimals. */
int cli_las_write_csv_rows(FILE *fp, const double *rows, size_t nrows,
                           size_t ncols, int decimals);

#ifdef __cplusplus
}
#endif

#endif
