/* Printing a method's result for people and for other programs:
 * `--format json|table|csv`. Integer values print as integers; nested
 * objects are flattened to dotted names; one-dimensional arrays become
 * columns (one table per length), arrays of objects become tables with
 * one column per member, and two-dimensional arrays are labelled by
 * their axes (angle, depth, ...) rather than by index; exact all-zero
 * imaginary and phase members are left out unless asked for; QC flag
 * sets can be printed by name. */
#ifndef RW_CLI_FORMAT_H
#define RW_CLI_FORMAT_H

#include <stdio.h>

#include <cjson/cJSON.h>

enum { CLI_FMT_JSON = 0, CLI_FMT_TABLE = 1, CLI_FMT_CSV = 2 };

/* QC flags are 64-bit (the daemon uses bits 0-52: exact JSON numbers). */
#define CLI_QC_BITS 64

typedef struct cli_fmt {
	int format;                  /* CLI_FMT_* */
	int qc_names;                /* print QC bit sets as flag names */
	int all_columns;             /* keep all-zero imaginary/phase members */
	int digits;                  /* significant digits in tables (0: 7) */
	int pretty;                  /* indented JSON */
	const char *qc[CLI_QC_BITS]; /* flag names by bit index, or NULL */
	const cJSON *discover;       /* rpc.discover result, or NULL */
	const char *method;          /* for the axes of 2-D results */
} cli_fmt;

/* Prints result to f as fmt says. Returns 0, or -1 on a write error. */
int cli__print_result(FILE *f, const cJSON *result, const cli_fmt *fmt);
/* 1 when the result holds a two-dimensional array (its axes may need the
 * discover document). */
int cli__result_has_matrix(const cJSON *result);
/* Writes the names of the bits set in flags, joined by '|', into buf
 * ("clean" for 0; "bit N" for a bit with no name). */
void cli__qc_names(unsigned long long flags, const char *const qc[CLI_QC_BITS],
                   char *buf, size_t size);
/* Formats v for a table (digits significant digits; integral values as
 * integers) or, with digits 0, as the shortest text that reads back
 * exactly. buf holds >= 40 bytes. */
void cli__fmt_cell(char *buf, double v, int digits);

#endif
