/* libFuzzer target for the request handler: any bytes as one request
 * line through rw_proto_handle, with small limits so deep, wide and
 * batched inputs reach their checks quickly. The response must be empty
 * or one '\n'-terminated line, and the same with the numeric-array
 * pre-pass off and through the event loop's rw_proto_handle_light;
 * anything else aborts. Build and run with tests/fuzz/run. */
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "proto/internal.h"
#include "proto/proto.h"

static proto_ctx *ctx;

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
	proto_limits lim;

	(void)argc;
	(void)argv;
	gsl_set_error_handler_off();
	proto_limits_default(&lim);
	lim.max_batch = 64;
	lim.max_samples = 4096;
	lim.max_work = 1 << 16;
	ctx = proto_ctx_new(&lim);
	return ctx ? 0 : 1;
}

/* True when the bytes hold the word. */
static int holds(const uint8_t *data, size_t size, const char *w)
{
	size_t n = strlen(w);
	for (size_t i = 0; i + n <= size; i++)
		if (memcmp(data + i, w, n) == 0)
			return 1;
	return 0;
}

static void handle(proto_session *s, const char *line, size_t len,
                   proto_buf *out, int light)
{
	if (!light || rw_proto_handle_light(s, line, len, 1000, out) >= 1)
		rw_proto_handle(s, line, len, out);
}

/* Runs the input (one or two lines) on a fresh session into out; with
 * light set, through rw_proto_handle_light as the event loop does (a
 * line it leaves for the pool is then answered by rw_proto_handle). */
static void run(const uint8_t *data, size_t size, proto_buf *out, int light)
{
	proto_session *s = proto_session_new(ctx);
	const char *nl;

	if (!s)
		return;
	/* Lines never hold '\n' (the framer splits on it): cut there, and
	 * run the rest as a second request on the same session. */
	nl = memchr(data, '\n', size);
	if (nl) {
		size_t first = (size_t)(nl - (const char *)data);
		handle(s, (const char *)data, first, out, light);
		data += first + 1;
		size -= first + 1;
		if (memchr(data, '\n', size))
			size = (size_t)((const char *)memchr(data, '\n', size) -
			                (const char *)data);
	}
	handle(s, (const char *)data, size, out, light);
	proto_session_free(s);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	proto_buf out, ref;

	proto_buf_init(&out);
	proto_buf_init(&ref);
	run(data, size, &out, 0);
	if (out.len && out.data[out.len - 1] != '\n')
		abort();
	/* The numeric-array pre-pass (inarr.c) must not change any answer:
	 * the same input with it off gives the same bytes (service.info
	 * reports times and counters, which differ between the runs). */
	if (!holds(data, size, "service")) {
		proto__inarr_off = 1;
		run(data, size, &ref, 0);
		proto__inarr_off = 0;
		if (out.len != ref.len ||
		    (out.len && memcmp(out.data, ref.data, out.len) != 0))
			abort();
		/* and the event loop's way: costed, then answered */
		ref.len = 0;
		run(data, size, &ref, 1);
		if (out.len != ref.len ||
		    (out.len && memcmp(out.data, ref.data, out.len) != 0))
			abort();
	}
	proto_buf_free(&ref);
	proto_buf_free(&out);
	return 0;
}
