/* Line framing (daemon/server/lines.c): a request stream fed whole, byte
 * by byte and in random chunks gives the same lines; oversized lines are
 * reported once and skipped to their newline; responses produced by the
 * protocol for each framing are byte-identical. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "proto/proto.h"
#include "server/lines.h"

static const char stream[] =
    "{\"jsonrpc\":\"2.0\",\"id\":1,\"method\":\"service.info\"}\n"
    "\n"
    "{\"jsonrpc\":\"2.0\",\"id\":2,\"method\":\"elastic.convert\","
    "\"params\":{\"rho\":2.3,\"vp\":[3000,3100],\"vs\":1500}}\r\n"
    "[{\"jsonrpc\":\"2.0\",\"id\":3,\"method\":\"nope\"}]\n"
    "{\"jsonrpc\":\"2.0\",\"id\":4,\"method\":\"elastic.convert\","
    "\"params\":{\"rho\":2.3,\"vp\":3000,\"vs\":1500,\"pad\":\""
    "xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx"
    "xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx"
    "\"}}\n"
    "garbage\n"
    "{\"jsonrpc\":\"2.0\",\"id\":5,\"method\":\"rpc.discover\"}\n"
    "{\"jsonrpc\":\"2.0\",\"id\":6,\"method\":\"service.info\"}";

/* Feeds `stream` in chunks of the sizes produced by next_chunk and runs
 * every line through the protocol; returns all output (caller frees).
 * max_line 150 makes request 4 oversized. */
static char *run(size_t (*next_chunk)(size_t left, unsigned *seed),
                 unsigned seed, int *oversized)
{
	proto_ctx *ctx = proto_ctx_new(NULL);
	proto_session *s = proto_session_new(ctx);
	proto_buf out;
	srv_lines lb;
	size_t off = 0, total = strlen(stream);
	const char *line;
	size_t len;
	srv_line_status st;

	proto_buf_init(&out);
	srv_lines_init(&lb, 150);
	*oversized = 0;
	while (off < total) {
		size_t n = next_chunk(total - off, &seed);
		assert_int_equal(srv_lines_append(&lb, stream + off, n), 0);
		off += n;
		while ((st = srv_lines_next(&lb, &line, &len)) !=
		       SRV_LINE_NONE) {
			if (st == SRV_LINE_OVERSIZE) {
				(*oversized)++;
				proto_error_line(ctx, &out,
				                 PROTO_INVALID_REQUEST, NULL,
				                 "too long");
			} else {
				rw_proto_handle(s, line, len, &out);
			}
		}
	}
	if (srv_lines_tail(&lb, &line, &len) == SRV_LINE_OK)
		rw_proto_handle(s, line, len, &out);
	srv_lines_free(&lb);
	proto_session_free(s);
	proto_ctx_free(ctx);
	/* service.info counters differ by nothing here: same requests. */
	return proto_buf_take(&out, NULL);
}

static size_t whole(size_t left, unsigned *seed)
{
	(void)seed;
	return left;
}

static size_t one(size_t left, unsigned *seed)
{
	(void)left;
	(void)seed;
	return 1;
}

static size_t random_chunk(size_t left, unsigned *seed)
{
	size_t n;
	*seed = *seed * 1103515245u + 12345u;
	n = 1 + (*seed >> 16) % 97;
	return n < left ? n : left;
}

static void test_framings_agree(void **state)
{
	int ov_whole, ov;
	char *ref = run(whole, 0, &ov_whole);
	(void)state;
	assert_int_equal(ov_whole, 1);
	/* 7 answers: ids 1, 2, batch [3], oversize, garbage, 5, 6 */
	{
		int lines = 0;
		for (const char *p = ref; *p; p++)
			lines += *p == '\n';
		assert_int_equal(lines, 7);
	}
	char *b = run(one, 0, &ov);
	assert_int_equal(ov, 1);
	assert_string_equal(b, ref);
	free(b);
	for (unsigned seed = 1; seed < 60; seed++) {
		char *r = run(random_chunk, seed, &ov);
		assert_int_equal(ov, 1);
		assert_string_equal(r, ref);
		free(r);
	}
	free(ref);
}

/* An oversized line with no newline yet is dropped as it arrives and
 * reported once; the next line is served. */
static void test_oversize_streaming(void **state)
{
	srv_lines lb;
	const char *line;
	size_t len;
	char chunk[64];
	int reports = 0;
	(void)state;

	srv_lines_init(&lb, 100);
	memset(chunk, 'a', sizeof chunk);
	for (int i = 0; i < 100; i++) {
		srv_lines_append(&lb, chunk, sizeof chunk);
		while (srv_lines_next(&lb, &line, &len) == SRV_LINE_OVERSIZE)
			reports++;
		assert_true(srv_lines_buffered(&lb) <= 200);
	}
	srv_lines_append(&lb, "tail\nnext\n", 10);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, 4);
	assert_memory_equal(line, "next", 4);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(reports, 1);
	/* exactly at the limit is accepted */
	{
		char exact[101];
		memset(exact, 'b', 100);
		exact[100] = '\n';
		srv_lines_append(&lb, exact, sizeof exact);
		assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
		assert_int_equal(len, 100);
	}
	srv_lines_free(&lb);
}

/* A framer that never held a byte (a connection closed before sending
 * anything, --stdio </dev/null), one emptied after a long line gave its
 * buffer back, and empty appends: nothing to take, and no arithmetic on
 * the null buffer (clang's UBSan reports "applying zero offset to null
 * pointer" otherwise). */
static void test_empty(void **state)
{
	srv_lines lb;
	const char *line = NULL;
	size_t len = 0;
	static char big[(1u << 20) + 2];
	(void)state;

	srv_lines_init(&lb, 4u << 20);
	assert_int_equal(srv_lines_has_line(&lb), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_tail(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_append(&lb, "", 0), 0);
	assert_int_equal(srv_lines_buffered(&lb), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	/* a line over 1 MiB, taken: the next append releases the buffer */
	memset(big, 'x', sizeof big - 1);
	big[sizeof big - 1] = '\n';
	assert_int_equal(srv_lines_append(&lb, big, sizeof big), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_OK);
	assert_int_equal(len, sizeof big - 1);
	assert_int_equal(srv_lines_append(&lb, "", 0), 0);
	assert_int_equal(srv_lines_has_line(&lb), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_tail(&lb, &line, &len), SRV_LINE_NONE);
	srv_lines_free(&lb);
	/* and after free, as a closed connection's framer is */
	assert_int_equal(srv_lines_has_line(&lb), 0);
	assert_int_equal(srv_lines_next(&lb, &line, &len), SRV_LINE_NONE);
	assert_int_equal(srv_lines_tail(&lb, &line, &len), SRV_LINE_NONE);
}

/* srv_lines_peek_many sees what srv_lines_next then takes: the stream in
 * random chunks, at each point up to 4 lines peeked and the same lines
 * taken one by one; it stops before an oversized line and before an
 * incomplete one, gives nothing while a line is discarded, and an empty
 * framer gives nothing. */
static void test_peek_many(void **state)
{
	const char *pl[4], *line;
	size_t plen[4], len;
	(void)state;

	for (unsigned seed = 1; seed < 40; seed++) {
		srv_lines lb;
		size_t off = 0, total = strlen(stream), taken = 0;
		unsigned sd = seed;

		srv_lines_init(&lb, 150);
		assert_int_equal(srv_lines_peek_many(&lb, pl, plen, 4), 0);
		while (off < total) {
			size_t n = random_chunk(total - off, &sd), k;
			assert_int_equal(srv_lines_append(&lb, stream + off, n),
			                 0);
			off += n;
			k = srv_lines_peek_many(&lb, pl, plen, 1 + sd % 4);
			for (size_t i = 0; i < k; i++) {
				char copy[200];
				assert_true(plen[i] <= 150);
				memcpy(copy, pl[i], plen[i]);
				assert_int_equal(
				    srv_lines_next(&lb, &line, &len),
				    SRV_LINE_OK);
				assert_int_equal(len, plen[i]);
				assert_memory_equal(line, copy, len);
				taken++;
			}
			/* what is left is taken the usual way */
			while (srv_lines_next(&lb, &line, &len) !=
			       SRV_LINE_NONE)
				taken++;
		}
		/* 7 complete lines (a blank one and the oversized one
		 * among them); the last has no newline and stays for
		 * srv_lines_tail */
		assert_int_equal(taken, 7);
		assert_int_equal(srv_lines_tail(&lb, &line, &len), SRV_LINE_OK);
		srv_lines_free(&lb);
	}
	{
		/* stops before an oversized line; nothing while discarding */
		srv_lines lb;
		char big[300];
		srv_lines_init(&lb, 100);
		memset(big, 'z', sizeof big);
		srv_lines_append(&lb, "ab\ncd\n", 6);
		srv_lines_append(&lb, big, 150);
		srv_lines_append(&lb, "\nef\n", 4);
		assert_int_equal(srv_lines_peek_many(&lb, pl, plen, 4), 2);
		assert_memory_equal(pl[1], "cd", 2);
		srv_lines_free(&lb);
		srv_lines_init(&lb, 100);
		srv_lines_append(&lb, big, sizeof big);
		assert_int_equal(srv_lines_next(&lb, &line, &len),
		                 SRV_LINE_OVERSIZE);
		srv_lines_append(&lb, "zz\nok\n", 6);
		assert_int_equal(srv_lines_peek_many(&lb, pl, plen, 4), 1);
		assert_memory_equal(pl[0], "ok", 2);
		srv_lines_free(&lb);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_framings_agree),
	    cmocka_unit_test(test_oversize_streaming),
	    cmocka_unit_test(test_empty),
	    cmocka_unit_test(test_peek_many),
	};
	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, NULL, NULL);
}
