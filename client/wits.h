/* WITS level 0 (Wellsite Information Transfer Specification) push parser
 * for the client's real-time feed: ASCII records framed by a "&&" line and
 * a "!!" line, each line between them a 4-digit code (2-digit record, 2-
 * digit item) followed by the value, directly or after blanks. Bytes are
 * fed in any chunking; each complete, well-formed record is handed to a
 * callback as (code, value) items, text values marked as such. Malformed
 * records are skipped and counted, never fatal; every record begun is
 * counted exactly once, as delivered, malformed, unterminated or empty.
 * Two records that run together (a record cut off and the next one's
 * items following without "!!" and "&&") are told apart by the repeated
 * item code: the cut part counts as unterminated. The parser is a plain struct
 * with fixed buffers: no allocation, memory bounded however long it runs.
 * Depends on libc and libm only. */
#ifndef ROCKWIRE_CLIENT_WITS_H
#define ROCKWIRE_CLIENT_WITS_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

#define CLI_WITS_MAX_LINE  256u /* bytes per line, without CR LF */
#define CLI_WITS_MAX_ITEMS 256u /* items per record */

/* One data item: code = 100 * record + item (e.g. 0108 -> 108). A text
 * value (WITS alphanumeric items, or garbage where a number belongs) has
 * text = 1 and value NaN. */
typedef struct cli_wits_item {
	unsigned code;
	double value;
	int text;
} cli_wits_item;

/* Counters, all since cli_wits_init. */
typedef struct cli_wits_stats {
	unsigned long begun;        /* records begun: each is counted once
	                             * more below as delivered, malformed,
	                             * unterminated or empty */
	unsigned long records;      /* records delivered */
	unsigned long items;        /* numeric items delivered */
	unsigned long bad_records;  /* skipped: a bad or over-long line, or
	                             * too many items */
	unsigned long unterminated; /* skipped: "&&" again, end of input, or
	                             * a repeated item code, before "!!" */
	unsigned long run_together; /* of those: cut by a repeated code */
	unsigned long empty;        /* "&&" "!!" with no items (not
	                             * delivered) */
	unsigned long bad_lines;    /* lines in a record without 4 digits and
	                             * a finite number */
	unsigned long long_lines;   /* lines over CLI_WITS_MAX_LINE */
	unsigned long garbage;      /* non-blank lines outside a record */
	unsigned long text_items;   /* items with a non-numeric value (WITS
	                             * alphanumeric items, or garbage):
	                             * delivered with text = 1 */
} cli_wits_stats;

/* Called once per good record with its n >= 1 items in input order
 * (numeric and text); the array is valid only during the call. */
typedef void (*cli_wits_cb)(void *ctx, const cli_wits_item *items, size_t n);

typedef struct cli_wits_parser {
	cli_wits_cb cb;
	void *ctx;
	cli_wits_stats stats;
	int in_record;
	int record_bad;
	int line_long;
	size_t linelen;
	size_t nitems;
	char line[CLI_WITS_MAX_LINE + 2]; /* + a CR + NUL */
	cli_wits_item items[CLI_WITS_MAX_ITEMS];
	unsigned char seen[10000 / 8 + 1]; /* codes in the open record */
} cli_wits_parser;

/* Resets p; cb (not NULL) gets each good record with ctx. */
void cli_wits_init(cli_wits_parser *p, cli_wits_cb cb, void *ctx);
/* Pushes len bytes; lines end with LF or CR LF. Any bytes are safe. */
void cli_wits_feed(cli_wits_parser *p, const void *buf, size_t len);
/* End of input: a last line without LF is processed, and a record still
 * open is counted unterminated. The parser may be fed again after. */
void cli_wits_finish(cli_wits_parser *p);
/* Current counters. */
const cli_wits_stats *cli_wits_get_stats(const cli_wits_parser *p);

#ifdef __cplusplus
}
#endif

#endif
