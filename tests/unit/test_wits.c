/* Unit tests of the WITS level 0 push parser (client/wits.c): an invented
 * recorded stream gives the same records however it is split, malformed
 * records are skipped and counted, every record begun is counted exactly
 * once, text items are delivered marked as text, records that run
 * together are told apart, and CR LF and LF line ends read the same. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "wits.h"

#define MAXI 64
#define MAXR 16

/* Collected callback output. */
struct got {
	size_t nrec;
	size_t len[MAXR];
	cli_wits_item it[MAXR][MAXI];
};

static void collect(void *ctx, const cli_wits_item *items, size_t n)
{
	struct got *g = ctx;

	assert_true(g->nrec < MAXR && n <= MAXI && n > 0);
	memcpy(g->it[g->nrec], items, n * sizeof *items);
	g->len[g->nrec++] = n;
}

/* An invented stream: good records in the standard form (code directly
 * followed by value) and with a blank, garbage, and one of each malformed
 * kind. */
static const char stream[] =
    "&&\n"
    "01081500.25\n"  /* record 01 item 08 */
    "0110 1498.75\n" /* with a blank */
    "0113-23.5\n"
    "01211.2e3\n"
    "!!\n"
    "HELLO RIG\n" /* garbage between records */
    "&&\n"
    "0108abc\n" /* a text item only: nothing numeric to deliver */
    "!!\n"
    "&&\n"
    "01081\n" /* no terminator before the next && */
    "&&\n"
    "  0108 1501.00  \n" /* surrounding blanks tolerated */
    "0110\t1499.5\n"
    "!!\n"
    "&&\n"
    "01X8 5\n" /* not 4 digits */
    "!!\n"
    "&&\n"
    "0108 "
    "1111111111111111111111111111111111111111111111111111111111111111"
    "1111111111111111111111111111111111111111111111111111111111111111"
    "1111111111111111111111111111111111111111111111111111111111111111"
    "1111111111111111111111111111111111111111111111111111111111111111"
    "\n" /* over 256 bytes */
    "!!\n"
    "&&\n"
    "\n"
    "!!\n" /* empty record (a blank line only) */
    "!!\n" /* terminator outside a record */
    "&&\n"
    "1201 0.5\n"
    "1202 nan\n" /* not a plain number: a text item, skipped */
    "!!\n"
    "&&\n"
    "0201 7\n"
    "0202 8\n"
    "!!"; /* last line without an end of line */

static const struct {
	size_t n;
	cli_wits_item it[4];
} want[] = {
    {4,
     {{108, 1500.25, 0}, {110, 1498.75, 0}, {113, -23.5, 0}, {121, 1200.0, 0}}},
    {1, {{108, NAN, 1}}}, /* abc */
    {2, {{108, 1501.0, 0}, {110, 1499.5, 0}}},
    {2, {{1201, 0.5, 0}, {1202, NAN, 1}}},
    {2, {{201, 7.0, 0}, {202, 8.0, 0}}},
};
#define NWANT (sizeof want / sizeof want[0])

static void check_stats(const cli_wits_stats *s)
{
	assert_int_equal(s->records, 5);
	assert_int_equal(s->items, 9);
	assert_int_equal(s->bad_records, 2); /* 01X8, long */
	assert_int_equal(s->unterminated, 1);
	assert_int_equal(s->run_together, 0);
	assert_int_equal(s->empty, 1);      /* the blank one */
	assert_int_equal(s->bad_lines, 1);  /* 01X8 */
	assert_int_equal(s->text_items, 2); /* abc, nan */
	assert_int_equal(s->long_lines, 1);
	assert_int_equal(s->garbage, 2); /* HELLO RIG, stray !! */
	/* every record begun is counted once */
	assert_int_equal(s->begun, s->records + s->bad_records +
	                               s->unterminated + s->empty);
}

static void check_got(const struct got *g)
{
	size_t r, i;

	assert_int_equal(g->nrec, NWANT);
	for (r = 0; r < NWANT; r++) {
		assert_int_equal(g->len[r], want[r].n);
		for (i = 0; i < want[r].n; i++) {
			const cli_wits_item *a = &g->it[r][i],
			                    *b = &want[r].it[i];
			assert_int_equal(a->code, b->code);
			assert_int_equal(a->text, b->text);
			assert_true(b->text ? isnan(a->value)
			                    : a->value == b->value);
		}
	}
}

static void same_got(const struct got *a, const struct got *b)
{
	size_t r;

	assert_int_equal(a->nrec, b->nrec);
	for (r = 0; r < a->nrec; r++) {
		assert_int_equal(a->len[r], b->len[r]);
		for (size_t i = 0; i < a->len[r]; i++) {
			assert_int_equal(a->it[r][i].code, b->it[r][i].code);
			assert_int_equal(a->it[r][i].text, b->it[r][i].text);
			assert_true(a->it[r][i].text ||
			            a->it[r][i].value == b->it[r][i].value);
		}
	}
}

static void run(const char *s, size_t len, size_t split, struct got *g,
                cli_wits_stats *st)
{
	static cli_wits_parser p; /* large; kept off the stack */

	memset(g, 0, sizeof *g);
	cli_wits_init(&p, collect, g);
	cli_wits_feed(&p, s, split);
	cli_wits_feed(&p, s + split, len - split);
	cli_wits_finish(&p);
	*st = *cli_wits_get_stats(&p);
}

static void test_stream(void **state)
{
	static struct got whole, part;
	cli_wits_stats s0, s1;
	size_t len = sizeof stream - 1, k;

	(void)state;
	run(stream, len, len, &whole, &s0);
	check_got(&whole);
	check_stats(&s0);
	for (k = 0; k <= len; k++) {
		run(stream, len, k, &part, &s1);
		same_got(&part, &whole);
		assert_memory_equal(&s1, &s0, sizeof s0);
	}
}

static void test_bytewise(void **state)
{
	static struct got g;
	static cli_wits_parser p;
	size_t i, len = sizeof stream - 1;

	(void)state;
	memset(&g, 0, sizeof g);
	cli_wits_init(&p, collect, &g);
	for (i = 0; i < len; i++)
		cli_wits_feed(&p, stream + i, 1);
	cli_wits_finish(&p);
	check_got(&g);
	check_stats(cli_wits_get_stats(&p));
}

static void test_crlf(void **state)
{
	static struct got lf, crlf;
	cli_wits_stats s0, s1;
	size_t len = sizeof stream - 1, i, n = 0, k;
	char *buf = malloc(2 * len);

	(void)state;
	assert_non_null(buf);
	for (i = 0; i < len; i++) {
		if (stream[i] == '\n')
			buf[n++] = '\r';
		buf[n++] = stream[i];
	}
	run(stream, len, len, &lf, &s0);
	for (k = 0; k <= n; k += 7) {
		run(buf, n, k, &crlf, &s1);
		same_got(&crlf, &lf);
		assert_memory_equal(&s1, &s0, sizeof s0);
	}
	free(buf);
}

/* Arbitrary bytes never crash and keep the counters consistent; a good
 * record after them still comes through. */
static void test_noise(void **state)
{
	static struct got g;
	static cli_wits_parser p;
	static const char good[] = "\n&&\r\n0108 42\r\n!!\r\n";
	unsigned long seed = 99;
	char buf[4096];
	size_t i, round;

	(void)state;
	memset(&g, 0, sizeof g);
	cli_wits_init(&p, collect, &g);
	for (round = 0; round < 200; round++) {
		for (i = 0; i < sizeof buf; i++) {
			seed = seed * 6364136223846793005ul +
			       1442695040888963407ul;
			buf[i] = (char)(seed >> 40);
			if (buf[i] == '&' || buf[i] == '!')
				buf[i] = 'x'; /* no chance framing */
		}
		cli_wits_feed(&p, buf, sizeof buf);
	}
	assert_int_equal(cli_wits_get_stats(&p)->records, 0);
	assert_true(cli_wits_get_stats(&p)->garbage > 0);
	cli_wits_feed(&p, good, sizeof good - 1);
	cli_wits_finish(&p);
	assert_int_equal(g.nrec, 1);
	assert_int_equal(g.it[0][0].code, 108);
	assert_true(g.it[0][0].value == 42.0);
}

/* Records that run together: a record cut after its depth and the next
 * record's items following; a record cut by a new "&&". Each is counted
 * once and no depth disappears uncounted. */
static void test_run_together(void **state)
{
	static const char cut[] = "&&\n0108 1000\n0108 1000.5\n0113 95\n!!\n"
	                          "&&\n0108 1001\n&&\n0108 1001.5\n!!\n"
	                          "&&\n0108 1002\n0113 96\n0113 97\n!!\n";
	static struct got g;
	cli_wits_stats s;

	(void)state;
	run(cut, sizeof cut - 1, 7, &g, &s);
	assert_int_equal(g.nrec, 3);
	assert_true(g.it[0][0].value == 1000.5 && g.len[0] == 2);
	assert_true(g.it[1][0].value == 1001.5 && g.len[1] == 1);
	/* the last record: 0113 twice; the second part holds 0113 97 */
	assert_true(g.len[2] == 1 && g.it[2][0].code == 113 &&
	            g.it[2][0].value == 97);
	assert_int_equal(s.begun, 6);
	assert_int_equal(s.records, 3);
	assert_int_equal(s.unterminated, 3);
	assert_int_equal(s.run_together, 2);
	assert_int_equal(s.begun,
	                 s.records + s.bad_records + s.unterminated + s.empty);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_stream),
	    cmocka_unit_test(test_bytewise),
	    cmocka_unit_test(test_crlf),
	    cmocka_unit_test(test_noise),
	    cmocka_unit_test(test_run_together),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
