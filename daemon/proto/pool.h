/* The protocol layer's worker threads (pool.c): a parallel-for that the
 * driver uses to split one large request across the cores. */
#ifndef RW_PROTO_POOL_H
#define RW_PROTO_POOL_H

#include <stddef.h>

typedef struct proto_pool proto_pool;

/* Starts threads - 1 workers (threads <= 0: one per online CPU); the
 * caller of proto__pool_run is the last one. NULL when out of memory;
 * free with proto__pool_free (NULL is a no-op), which joins them. */
proto_pool *proto__pool_new(int threads);
void proto__pool_free(proto_pool *p);
/* Threads that run a job, the caller included. */
int proto__pool_threads(const proto_pool *p);
/* Runs fn(arg, k) for k in [0, nchunks) and returns when all are done.
 * Safe to call from several threads at once. */
void proto__pool_run(proto_pool *p, size_t nchunks,
                     void (*fn)(void *arg, size_t chunk), void *arg);

#endif
