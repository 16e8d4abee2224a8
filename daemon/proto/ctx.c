/* The daemon-wide context: limits, request and error counters, the bytes
 * session defaults hold, and the worker threads that split one large
 * request across the cores. Shared by every session; counters are atomic
 * so worker threads may count. */
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/pool.h"
#include "proto/session.h"

static const int counted_codes[] = {
    PROTO_PARSE_ERROR,    PROTO_INVALID_REQUEST, PROTO_METHOD_NOT_FOUND,
    PROTO_INVALID_PARAMS, PROTO_INTERNAL_ERROR,  PROTO_SERVER_BUSY,
    PROTO_LIMIT_EXCEEDED,
};
#define N_CODES (sizeof counted_codes / sizeof counted_codes[0])

struct proto_ctx {
	proto_limits limits;
	proto_server_stats server;
	atomic_ullong requests, notifications, responses;
	atomic_ullong errors[N_CODES];
	atomic_size_t session_bytes;
	pthread_mutex_t pool_mu;
	proto_pool *pool; /* started on first use */
	int pool_failed;
	/* one call arena's first block, kept for the next call */
	_Atomic(void *) spare;
};

void proto_limits_default(proto_limits *lim)
{
	lim->max_line = 64u << 20;
	lim->max_samples = 0;
	lim->max_work = 0;
	lim->max_batch = 10000;
	lim->max_depth = 64;
	lim->max_conns = 1024;
	lim->out_high_water = 1u << 20;
	lim->out_hard_limit = 32u << 20;
	lim->global_budget = (size_t)1 << 31;
	lim->idle_timeout_s = 0;
	lim->stall_timeout_s = 30;
	lim->drain_timeout_s = 8;
	lim->max_session_bytes = (size_t)256 << 20;
	lim->threads = 0;
}

proto_ctx *proto_ctx_new(const proto_limits *lim)
{
	proto_ctx *ctx = calloc(1, sizeof *ctx);
	if (!ctx)
		return NULL;
	if (lim)
		ctx->limits = *lim;
	else
		proto_limits_default(&ctx->limits);
	ctx->server.transport = "none";
	atomic_init(&ctx->session_bytes, 0);
	pthread_mutex_init(&ctx->pool_mu, NULL);
	return ctx;
}

void proto_ctx_free(proto_ctx *ctx)
{
	if (!ctx)
		return;
	proto__pool_free(ctx->pool);
	pthread_mutex_destroy(&ctx->pool_mu);
	free(atomic_load(&ctx->spare));
	free(ctx);
}

void *proto__ctx_spare_take(proto_ctx *ctx)
{
	return ctx ? atomic_exchange(&ctx->spare, NULL) : NULL;
}

int proto__ctx_spare_give(proto_ctx *ctx, void *block)
{
	void *none = NULL;
	return ctx && atomic_compare_exchange_strong(&ctx->spare, &none, block);
}

size_t proto_ctx_session_bytes(const proto_ctx *ctx)
{
	return atomic_load(&((proto_ctx *)ctx)->session_bytes);
}

int proto__session_bytes_add(proto_ctx *ctx, size_t add, size_t sub)
{
	size_t cur = atomic_load(&ctx->session_bytes), next;
	do {
		next = cur - sub + add;
		if (add > sub && ctx->limits.max_session_bytes &&
		    next > ctx->limits.max_session_bytes)
			return -1;
	} while (
	    !atomic_compare_exchange_weak(&ctx->session_bytes, &cur, next));
	return 0;
}

void proto__parallel(proto_ctx *ctx, size_t nchunks,
                     void (*fn)(void *arg, size_t chunk), void *arg)
{
	proto_pool *p;

	pthread_mutex_lock(&ctx->pool_mu);
	if (!ctx->pool && !ctx->pool_failed && ctx->limits.threads != 1) {
		ctx->pool = proto__pool_new(ctx->limits.threads);
		ctx->pool_failed = ctx->pool == NULL;
	}
	p = ctx->pool;
	pthread_mutex_unlock(&ctx->pool_mu);
	proto__pool_run(p, nchunks, fn, arg);
}

proto_server_stats *proto_ctx_server_stats(proto_ctx *ctx)
{
	return &ctx->server;
}

const proto_limits *proto_ctx_limits(const proto_ctx *ctx)
{
	return &ctx->limits;
}

void proto__count_request(proto_ctx *ctx, int notification)
{
	atomic_fetch_add(&ctx->requests, 1);
	if (notification)
		atomic_fetch_add(&ctx->notifications, 1);
}

void proto__count_error(proto_ctx *ctx, int code)
{
	for (size_t i = 0; i < N_CODES; i++)
		if (counted_codes[i] == code)
			atomic_fetch_add(&ctx->errors[i], 1);
}

void proto__counters(proto_ctx *ctx, proto_counters *out)
{
	memset(out, 0, sizeof *out);
	out->requests = atomic_load(&ctx->requests);
	out->notifications = atomic_load(&ctx->notifications);
	for (size_t i = 0; i < N_CODES && i < PROTO_N_CODES; i++) {
		out->code[i] = counted_codes[i];
		out->errors[i] = atomic_load(&ctx->errors[i]);
	}
	out->n_codes = N_CODES;
}
