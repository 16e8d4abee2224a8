/* The service family: rpc.discover (the OpenRPC document generated from
 * the method declarations, schema.c) and service.info (version, limits,
 * units with their factors, the QC legend, methods, counters and the
 * caution). */
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"
#include "rw_features.h"

#ifndef RW_VERSION
#define RW_VERSION "0.0.0"
#endif

const char proto_caution[] =
    "rockwire gives screening estimates from published rock-physics "
    "relations. They are not a substitute for qualified review, local "
    "regulations and licensed practice, and must never be the sole basis "
    "for well-control or other drilling and completion decisions.";

/* The document never changes while the daemon runs: built once. */
static pthread_once_t doc_once = PTHREAD_ONCE_INIT;
static char *doc_text;

static void doc_build(void)
{
	cJSON *doc = proto__openrpc();
	if (doc)
		doc_text = cJSON_PrintUnformatted(doc);
	cJSON_Delete(doc);
}

static int discover(proto_call *c, void *args)
{
	(void)args;
	pthread_once(&doc_once, doc_build);
	if (!doc_text)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory building the document");
	proto_w_raw(c, NULL, doc_text, strlen(doc_text));
	return 0;
}

static void write_limits(proto_call *c)
{
	const proto_limits *l = proto_ctx_limits(c->ctx);
	const proto_server_stats *st = proto_ctx_server_stats(c->ctx);

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
	proto_w_int(c, "max_session_bytes", (long long)l->max_session_bytes);
	proto_w_int(c, "threads", l->threads);
	proto_w_num(c, "idle_timeout_s", PK_NONE, l->idle_timeout_s);
	proto_w_num(c, "stall_timeout_s", PK_NONE, l->stall_timeout_s);
	proto_w_num(c, "drain_timeout_s", PK_NONE, l->drain_timeout_s);
	if (st->settings.set) {
		proto_w_int(c, "connection_cap",
		            (long long)st->settings.connection_cap);
		proto_w_int(c, "max_per_peer",
		            (long long)st->settings.max_per_peer);
		proto_w_int(c, "owner_reserve",
		            (long long)st->settings.owner_reserve);
		proto_w_num(c, "tcp_idle_timeout_s", PK_NONE,
		            st->settings.tcp_idle_timeout_s);
		proto_w_int(c, "lines_per_turn", st->settings.lines_per_turn);
		proto_w_int(c, "offload_bytes",
		            (long long)st->settings.offload_bytes);
		proto_w_int(c, "offload_work",
		            (long long)st->settings.offload_work);
		proto_w_int(c, "pool_threads",
		            (long long)st->settings.pool_threads);
		proto_w_int(c, "pool_per_peer",
		            (long long)st->settings.pool_per_peer);
		proto_w_int(c, "pool_lines",
		            (long long)st->settings.pool_lines);
		proto_w_int(c, "backlog", st->settings.backlog);
	}
	proto_w_obj_end(c);
}

/* Every kind's default and accepted units, with the factor of each to
 * the default (value in the default unit = value * scale + offset), so
 * that clients convert with the daemon's factors. */
static void write_units(proto_call *c)
{
	proto_w_obj_begin(c, "units");
	for (int k = 1; k < PK_COUNT; k++) {
		size_t n = proto_units_count((proto_kind)k);
		double s0, o0;
		proto_units_factor_at((proto_kind)k, 0, &s0, &o0);
		proto_w_obj_begin(c, proto_kind_name((proto_kind)k));
		proto_w_str(c, "default",
		            proto_units_name_at((proto_kind)k, 0));
		proto_w_arr_begin(c, "accepted");
		for (size_t i = 0; i < n; i++)
			proto_w_str(c, NULL,
			            proto_units_name_at((proto_kind)k, i));
		proto_w_arr_end(c);
		proto_w_obj_begin(c, "to_default");
		for (size_t i = 0; i < n; i++) {
			double s, o;
			proto_units_factor_at((proto_kind)k, i, &s, &o);
			proto_w_obj_begin(
			    c, proto_units_name_at((proto_kind)k, i));
			proto_w_num(c, "scale", PK_NONE, s / s0);
			proto_w_num(c, "offset", PK_NONE, (o - o0) / s0);
			proto_w_obj_end(c);
		}
		proto_w_obj_end(c);
		proto_w_obj_end(c);
	}
	proto_w_obj_end(c);
}

static void write_counters(proto_call *c)
{
	const proto_server_stats *s = proto_ctx_server_stats(c->ctx);
	proto_counters k;
	char code[16];

	proto__counters(c->ctx, &k);
	proto_w_obj_begin(c, "counters");
	proto_w_int(c, "requests", (long long)k.requests);
	proto_w_int(c, "notifications", (long long)k.notifications);
	proto_w_obj_begin(c, "errors");
	for (size_t i = 0; i < k.n_codes; i++) {
		snprintf(code, sizeof code, "%d", k.code[i]);
		proto_w_int(c, code, (long long)k.errors[i]);
	}
	proto_w_obj_end(c);
	proto_w_int(c, "connections_total", (long long)s->connections_total);
	proto_w_int(c, "connections_open", (long long)s->connections_open);
	proto_w_int(c, "connections_refused",
	            (long long)s->connections_refused);
	proto_w_int(c, "connections_dropped",
	            (long long)s->connections_dropped);
	proto_w_int(c, "connections_closed_slow",
	            (long long)s->connections_closed_slow);
	proto_w_int(c, "connections_closed_idle",
	            (long long)s->connections_closed_idle);
	proto_w_int(c, "lines_oversized", (long long)s->lines_oversized);
	proto_w_int(c, "bytes_in", (long long)s->bytes_in);
	proto_w_int(c, "bytes_out", (long long)s->bytes_out);
	proto_w_int(c, "buffered_bytes", (long long)s->buffered_bytes);
	proto_w_int(c, "reads_paused", (long long)s->reads_paused);
	proto_w_int(c, "pool_waits", (long long)s->pool_waits);
	proto_w_int(c, "pool_overlapped", (long long)s->pool_overlapped);
	proto_w_int(c, "pool_line_groups", (long long)s->pool_line_groups);
	proto_w_int(c, "memory_rss_bytes", (long long)s->memory_rss_bytes);
	proto_w_int(c, "memory_trims", (long long)s->memory_trims);
	proto_w_int(c, "memory_released_bytes",
	            (long long)s->memory_released_bytes);
	proto_w_obj_end(c);
}

static int info(proto_call *c, void *args)
{
	const proto_method *m;

	(void)args;
	proto_w_obj_begin(c, NULL);
	proto_w_str(c, "name", "rockwire");
	proto_w_str(c, "version", RW_VERSION);
	proto_w_str(c, "protocol", "JSON-RPC 2.0, one JSON value per line");
	proto_w_str(c, "transport", proto_ctx_server_stats(c->ctx)->transport);
	proto_w_str(c, "caution", proto_caution);
	/* The daemon's optional parts, as built (CMake RW_WITH_TCP and
	 * RW_WITH_SYSTEMD; protocol-docs/protocol.md, "service.info"). */
	proto_w_obj_begin(c, "features");
	proto_w_bool(c, "unix", 1);
	proto_w_bool(c, "stdio", 1);
	proto_w_bool(c, "tcp", RW_WITH_TCP);
	proto_w_bool(c, "systemd", RW_WITH_SYSTEMD);
	proto_w_obj_end(c);
	write_limits(c);
	write_units(c);
	proto_w_arr_begin(c, "qc_flags");
	for (const proto_qc_info *q = proto_qc_legend; q->name; q++) {
		proto_w_obj_begin(c, NULL);
		proto_w_int(c, "index", proto_qc_index(q->bit));
		proto_w_flags1(c, "mask", q->bit);
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
	write_counters(c);
	proto_w_obj_end(c);
	return 0;
}

static const proto_field no_fields[] = {{0}};
static const proto_decl no_params = {"",   no_fields, NULL, sizeof(proto_hdr),
                                     NULL, NULL,      NULL, NULL};

static const proto_method m_discover = {
    .name = "rpc.discover",
    .summary = "The OpenRPC document describing every method.",
    .params = &no_params,
    .body = discover,
    .flags = PM_SESSION | PM_NO_FIELDS | PM_NO_UNCERTAINTY,
    .openrpc_result = "{\"name\": \"document\", \"schema\": {\"type\": "
                      "\"object\", \"required\": [\"openrpc\", "
                      "\"info\", \"methods\"]}}",
};
static const proto_method m_info = {
    .name = "service.info",
    .summary = "Version, limits, units, QC legend, counters and the "
               "caution.",
    .params = &no_params,
    .body = info,
    .flags = PM_SESSION | PM_NO_FIELDS | PM_NO_UNCERTAINTY,
    .openrpc_result = "{\"name\": \"info\", \"schema\": {\"$ref\": "
                      "\"#/components/schemas/serviceInfo\"}}",
};

const proto_method *const proto_service_methods[] = {&m_discover, &m_info,
                                                     NULL};
