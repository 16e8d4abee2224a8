/* The per-call services of call.c: the arena (alignment, no overlap, small
 * and large sizes across block boundaries, the first block reused through
 * the context, a scratch call allocating on from its parent's arena) and
 * parameter paths. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "proto/internal.h"

/* Sizes on either side of the arena's thresholds: its 16-byte rounding,
 * a quarter of the first 4 KiB block, the block itself, the doubled
 * blocks and the 64 KiB cap. */
static const size_t sizes[] = {0,    1,    7,     16,   17,    100, 1000,
                               1024, 1025, 1100,  4096, 5000,  3,   2000,
                               9000, 17,   70000, 40,   16385, 333};
#define N_SIZES (sizeof sizes / sizeof sizes[0])
#define N_ALLOC 600

/* Allocates N_ALLOC blocks of the sizes above in c, fills each with its
 * own byte and checks every byte after all are made: an overlap or a
 * block shorter than asked shows as a byte of another. */
static void fill_and_check(proto_call *c)
{
	unsigned char *p[N_ALLOC];
	size_t n[N_ALLOC];

	for (size_t i = 0; i < N_ALLOC; i++) {
		n[i] = sizes[(i * 7) % N_SIZES];
		p[i] = proto_alloc(c, n[i]);
		assert_non_null(p[i]);
		assert_int_equal((uintptr_t)p[i] % _Alignof(max_align_t), 0);
		memset(p[i], (int)(i % 251), n[i]);
	}
	for (size_t i = 0; i < N_ALLOC; i++)
		for (size_t j = 0; j < n[i]; j++)
			if (p[i][j] != (unsigned char)(i % 251))
				fail_msg("allocation %zu (%zu bytes): byte %zu "
				         "overwritten",
				         i, n[i], j);
}

static void test_arena(void **state)
{
	proto_limits lim;
	proto_ctx *ctx;
	(void)state;

	proto_limits_default(&lim);
	ctx = proto_ctx_new(&lim);
	assert_non_null(ctx);
	/* with a context (its spare first block taken and given back from
	 * the second round on) and without one */
	for (int round = 0; round < 4; round++) {
		proto_call c;
		memset(&c, 0, sizeof c);
		c.ctx = round < 3 ? ctx : NULL;
		fill_and_check(&c);
		assert_null(proto_alloc(&c, SIZE_MAX));
		assert_null(proto_alloc(&c, SIZE_MAX / 2));
		proto__arena_free(&c);
		assert_null(c.arena);
	}
	proto_ctx_free(ctx);
}

/* A scratch call copied from its parent allocates on from the parent's
 * arena (uncertainty draws); after proto__arena_adopt the parent owns
 * everything, and the parent's earlier allocations are intact. */
static void test_arena_adopt(void **state)
{
	proto_call c, t;
	unsigned char *mine, *theirs[50];
	(void)state;

	memset(&c, 0, sizeof c);
	mine = proto_alloc(&c, 300);
	assert_non_null(mine);
	memset(mine, 0xab, 300);
	for (int d = 0; d < 50; d++) {
		t = c;
		theirs[d] = proto_alloc(&t, (size_t)(d * 97 + 1));
		assert_non_null(theirs[d]);
		memset(theirs[d], d, (size_t)(d * 97 + 1));
		proto__arena_adopt(&c, &t);
		assert_null(t.arena);
	}
	for (int i = 0; i < 300; i++)
		assert_int_equal(mine[i], 0xab);
	for (int d = 0; d < 50; d++)
		for (int j = 0; j < d * 97 + 1; j++)
			assert_int_equal(theirs[d][j], d);
	proto__arena_free(&c);
	assert_null(c.arena);
}

static void test_paths(void **state)
{
	proto_call c;
	(void)state;

	memset(&c, 0, sizeof c);
	assert_string_equal(proto_path(&c, "", "vp", ""), "vp");
	assert_string_equal(proto_path(&c, "fluid.", "brine", "."),
	                    "fluid.brine.");
	assert_string_equal(proto_path(&c, "a", "", ""), "a");
	assert_string_equal(proto_path(&c, "", "", "[3]"), "[3]");
	proto__arena_free(&c);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_arena),
	    cmocka_unit_test(test_arena_adopt),
	    cmocka_unit_test(test_paths),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
