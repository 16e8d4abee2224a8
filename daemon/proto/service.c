/* The service family: rpc.discover (the OpenRPC document embedded at build
 * time from protocol-docs/openrpc.json) and service.info (version, limits,
 * units, QC legend, counters and the caution). */
#include <string.h>

#include "proto/internal.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

extern const char rw_openrpc_doc[];
extern const size_t rw_openrpc_doc_len;

const char proto_caution[] =
    "rockwire gives screening estimates from published rock-physics "
    "relations. They are not a substitute for qualified review, local "
    "regulations and licensed practice, and must never be the sole basis "
    "for well-control or other drilling and completion decisions.";

static int discover(proto_call *c)
{
	/* The document is checked to be one JSON object by the tests; it is
	 * written as it is, byte for byte. Trailing whitespace is trimmed so
	 * that the response stays one line. */
	size_t n = rw_openrpc_doc_len;
	const char *d = rw_openrpc_doc;
	size_t i, run = 0;

	while (n && (d[n - 1] == '\n' || d[n - 1] == ' ' || d[n - 1] == '\r'))
		n--;
	proto_w_raw(c, NULL, "", 0);
	/* Newlines inside the pretty-printed document become spaces. */
	for (i = 0; i < n; i++) {
		if (d[i] == '\n' || d[i] == '\r') {
			proto_buf_append(c->out, d + run, i - run);
			proto_buf_append(c->out, " ", 1);
			run = i + 1;
		}
	}
	proto_buf_append(c->out, d + run, n - run);
	return 0;
}

static void write_limits(proto_call *c)
{
	const proto_limits *l = proto_ctx_limits(c->ctx);

	proto_w_obj_begin(c, "limits");
	proto_w_int(c, "max_line_bytes", (long long)l->max_line);
	proto_w_int(c, "max_samples", (long long)l->max_samples);
	proto_w_int(c, "max_work", (long long)l->max_work);
	proto_w_int(c, "max_batch", (long long)l->max_batch);
	proto_w_int(c, "max_depth", l->max_depth);
	proto_w_int(c, "max_connections", (long long)l->max_conns);
	proto_w_int(c, "output_high_water_bytes", (long long)l->out_high_water);
	proto_w_int(c, "output_hard_limit_bytes", (long long)l->out_hard_limit);
	proto_w_int(c, "global_buffer_budget_bytes",
	            (long long)l->global_budget);
	proto_w_num(c, "idle_timeout_s", PK_NONE, l->idle_timeout_s);
	proto_w_num(c, "stall_timeout_s", PK_NONE, l->stall_timeout_s);
	proto_w_num(c, "drain_timeout_s", PK_NONE, l->drain_timeout_s);
	proto_w_obj_end(c);
}

static int info(proto_call *c)
{
	const proto_method *m;

	proto_w_obj_begin(c, NULL);
	proto_w_str(c, "name", "rockwire");
	proto_w_str(c, "version", RW_VERSION);
	proto_w_str(c, "protocol", "JSON-RPC 2.0, one JSON value per line");
	proto_w_str(c, "transport", proto_ctx_server_stats(c->ctx)->transport);
	proto_w_str(c, "caution", proto_caution);
	write_limits(c);
	proto_units_describe(c);
	proto_w_arr_begin(c, "qc_flags");
	for (const proto_qc_info *q = proto_qc_legend; q->name; q++) {
		proto_w_obj_begin(c, NULL);
		proto_w_int(c, "bit", (long long)q->bit);
		proto_w_str(c, "name", q->name);
		proto_w_str(c, "class", proto_qc_class_name(q->cls));
		proto_w_str(c, "meaning", q->meaning);
		proto_w_obj_end(c);
	}
	proto_w_arr_end(c);
	proto_w_arr_begin(c, "methods");
	for (size_t i = 0; (m = proto_method_at(i)); i++)
		proto_w_str(c, NULL, m->name);
	proto_w_arr_end(c);
	proto__write_counters(c);
	proto_w_obj_end(c);
	return 0;
}

static const proto_param no_params[] = {{NULL, PT_ANY, PK_NONE, 0, 0}};

const proto_method proto_service_methods[] = {
    {"rpc.discover", discover, no_params,
     "The OpenRPC document describing every method."},
    {"service.info", info, no_params,
     "Version, limits, units, QC legend, counters and the caution."},
    {NULL, NULL, NULL, NULL},
};
