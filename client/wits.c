/* WITS level 0 push parser: splits bytes into lines (LF or CR LF, bounded
 * at CLI_WITS_MAX_LINE), tracks "&&" ... "!!" framing and collects each
 * record's (code, value) items in a fixed array; a record is delivered
 * whole or not at all. Choices: surrounding blanks on a line are ignored;
 * blank lines are ignored everywhere; an item whose value is not a plain
 * decimal number (no hex, inf or nan) is a text item — WITS defines
 * alphanumeric items, such as the well identifier 0101 (from memory) —
 * and is counted and delivered marked as text (the caller decides
 * whether it is garbage) without spoiling its record; a line that is not
 * an item (no 4-digit code, or no value) spoils its whole record; an
 * item code seen twice in one record means the record was cut and the
 * next one's items follow: the part before is counted unterminated and
 * a new record starts with the repeated item. */
#include <ctype.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "wits.h"

void cli_wits_init(cli_wits_parser *p, cli_wits_cb cb, void *ctx)
{
	memset(p, 0, sizeof *p);
	p->cb = cb;
	p->ctx = ctx;
}

const cli_wits_stats *cli_wits_get_stats(const cli_wits_parser *p)
{
	return &p->stats;
}

static int blank(int c)
{
	return c == ' ' || c == '\t';
}

/* Parses the item line s (trimmed, NUL-terminated): 4 digits then a value,
 * with or without blanks between. Returns 1 for a finite decimal number
 * (stored in *it), 2 for any other value (a text item), 0 for a line that
 * is not an item. */
static int parse_item(const char *s, cli_wits_item *it)
{
	const char *v = s + 4, *q;
	char *end;
	double x;
	int i;

	for (i = 0; i < 4; i++)
		if (!isdigit((unsigned char)s[i]))
			return 0;
	while (blank((unsigned char)*v))
		v++;
	if (!*v)
		return 0;
	for (q = v; *q; q++)
		if (!isdigit((unsigned char)*q) && *q != '+' && *q != '-' &&
		    *q != '.' && *q != 'e' && *q != 'E') {
			it->code = (unsigned)((s[0] - '0') * 1000 +
			                      (s[1] - '0') * 100 +
			                      (s[2] - '0') * 10 + (s[3] - '0'));
			return 2;
		}
	it->code = (unsigned)((s[0] - '0') * 1000 + (s[1] - '0') * 100 +
	                      (s[2] - '0') * 10 + (s[3] - '0'));
	x = strtod(v, &end);
	if (end == v || *end != '\0' || !isfinite(x))
		return 2;
	it->value = x;
	it->text = 0;
	return 1;
}

/* Drops the open record, counting it as bad or unterminated. */
static void drop(cli_wits_parser *p, unsigned long *counter)
{
	(*counter)++;
	p->in_record = 0;
	p->record_bad = 0;
	p->nitems = 0;
	memset(p->seen, 0, sizeof p->seen);
}

static void begin(cli_wits_parser *p)
{
	p->in_record = 1;
	p->stats.begun++;
}

/* Handles one complete line (without LF). */
static void line_done(cli_wits_parser *p)
{
	char *s = p->line, *e;

	if (p->linelen > 0 && p->line[p->linelen - 1] == '\r')
		p->linelen--;
	if (p->linelen > CLI_WITS_MAX_LINE)
		p->line_long = 1;
	e = p->line + p->linelen;
	if (p->line_long) {
		p->stats.long_lines++;
		if (p->in_record)
			p->record_bad = 1;
		else
			p->stats.garbage++;
		return;
	}
	while (e > s && blank((unsigned char)e[-1]))
		e--;
	*e = '\0';
	while (blank((unsigned char)*s))
		s++;
	if (!*s)
		return;
	if (strcmp(s, "&&") == 0) {
		if (p->in_record)
			drop(p, &p->stats.unterminated);
		begin(p);
		return;
	}
	if (!p->in_record) {
		p->stats.garbage++;
		return;
	}
	if (strcmp(s, "!!") == 0) {
		if (p->record_bad) {
			drop(p, &p->stats.bad_records);
		} else if (p->nitems == 0) {
			drop(p, &p->stats.empty);
		} else {
			size_t num = 0;
			for (size_t i = 0; i < p->nitems; i++)
				num += !p->items[i].text;
			p->stats.records++;
			p->stats.items += num;
			p->cb(p->ctx, p->items, p->nitems);
			p->in_record = 0;
			p->nitems = 0;
			memset(p->seen, 0, sizeof p->seen);
		}
		return;
	}
	if (p->record_bad)
		return;
	if (p->nitems >= CLI_WITS_MAX_ITEMS) {
		p->record_bad = 1;
		return;
	}
	{
		cli_wits_item *it = &p->items[p->nitems];
		int kind = strlen(s) < 4 ? 0 : parse_item(s, it);
		unsigned code = it->code;
		if (!kind) {
			p->stats.bad_lines++;
			p->record_bad = 1;
			return;
		}
		if (p->seen[code / 8] & (1u << (code % 8))) {
			/* the same code twice: the record was cut and the
			 * next one's items follow */
			cli_wits_item keep = *it;
			if (kind == 2)
				keep.value = NAN, keep.text = 1;
			drop(p, &p->stats.unterminated);
			p->stats.run_together++;
			begin(p);
			p->items[0] = keep;
			it = &p->items[0];
		}
		p->seen[code / 8] |= (unsigned char)(1u << (code % 8));
		if (kind == 2) {
			it->value = NAN;
			it->text = 1;
			p->stats.text_items++;
		}
		p->nitems++;
	}
}

void cli_wits_feed(cli_wits_parser *p, const void *buf, size_t len)
{
	const unsigned char *b = buf;
	size_t i;

	for (i = 0; i < len; i++) {
		if (b[i] == '\n') {
			line_done(p);
			p->linelen = 0;
			p->line_long = 0;
		} else if (p->linelen < CLI_WITS_MAX_LINE + 1) {
			/* a NUL byte stays in the line and fails its parse */
			p->line[p->linelen++] = b[i] ? (char)b[i] : '\x01';
		} else {
			p->line_long = 1;
		}
	}
}

void cli_wits_finish(cli_wits_parser *p)
{
	if (p->linelen > 0 || p->line_long) {
		line_done(p);
		p->linelen = 0;
		p->line_long = 0;
	}
	if (p->in_record)
		drop(p, &p->stats.unterminated);
}
