/* libFuzzer target for the request handler: any bytes as one request
 * line through rw_proto_handle, with small limits so deep, wide and
 * batched inputs reach their checks quickly. The response must be empty
 * or one '\n'-terminated line; anything else aborts. Build and run with
 * tests/fuzz/run. */
#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

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

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	proto_session *s = proto_session_new(ctx);
	proto_buf out;
	const char *nl;

	if (!s)
		return 0;
	proto_buf_init(&out);
	/* Lines never hold '\n' (the framer splits on it): cut there, and
	 * run the rest as a second request on the same session. */
	nl = memchr(data, '\n', size);
	if (nl) {
		size_t first = (size_t)(nl - (const char *)data);
		rw_proto_handle(s, (const char *)data, first, &out);
		data += first + 1;
		size -= first + 1;
		if (memchr(data, '\n', size))
			size = (size_t)((const char *)memchr(data, '\n', size) -
			                (const char *)data);
	}
	rw_proto_handle(s, (const char *)data, size, &out);
	if (out.len && out.data[out.len - 1] != '\n')
		abort();
	proto_buf_free(&out);
	proto_session_free(s);
	return 0;
}
