/* The protocol layer's worker threads: a parallel-for over the chunks of
 * one large request. Several requests may run at once (the server runs
 * heavy ones on its own pool); each posts a job, and workers take chunks
 * of the oldest job while its caller takes chunks too, so a job always
 * finishes even when every worker is busy elsewhere. Workers start on
 * first use and stop when the context is freed. */
#include <pthread.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <unistd.h>

#include "proto/internal.h"
#include "proto/pool.h"

typedef struct job {
	void (*fn)(void *arg, size_t chunk);
	void *arg;
	size_t nchunks;
	atomic_size_t next; /* next chunk to take */
	size_t done;        /* chunks finished (under the pool's mutex) */
	int active;         /* workers inside the job (under the mutex):
	                       the caller returns only when none is */
	struct job *qnext;  /* queue link */
	pthread_cond_t finished;
} job;

struct proto_pool {
	pthread_mutex_t mu;
	pthread_cond_t work;
	job *head, *tail;
	pthread_t *threads;
	int n_threads, stopping;
};

/* Runs chunks of j until none is left; returns the number run. */
static size_t take_chunks(job *j)
{
	size_t ran = 0, k;

	while ((k = atomic_fetch_add(&j->next, 1)) < j->nchunks) {
		j->fn(j->arg, k);
		ran++;
	}
	return ran;
}

static void unlink_job(proto_pool *p, job *j)
{
	job **pp = &p->head, *prev = NULL;

	while (*pp && *pp != j) {
		prev = *pp;
		pp = &(*pp)->qnext;
	}
	if (!*pp)
		return;
	*pp = j->qnext;
	if (p->tail == j)
		p->tail = prev;
	j->qnext = NULL;
}

static void *worker(void *arg)
{
	proto_pool *p = arg;

	pthread_mutex_lock(&p->mu);
	for (;;) {
		job *j;
		size_t ran;
		while (!p->stopping && !p->head)
			pthread_cond_wait(&p->work, &p->mu);
		if (p->stopping)
			break;
		j = p->head;
		if (atomic_load(&j->next) >= j->nchunks) {
			/* all taken: others finish it */
			unlink_job(p, j);
			continue;
		}
		j->active++;
		pthread_mutex_unlock(&p->mu);
		ran = take_chunks(j);
		pthread_mutex_lock(&p->mu);
		j->done += ran;
		j->active--;
		if (j->done == j->nchunks && j->active == 0)
			pthread_cond_broadcast(&j->finished);
		unlink_job(p, j);
	}
	pthread_mutex_unlock(&p->mu);
	return NULL;
}

proto_pool *proto__pool_new(int threads)
{
	proto_pool *p;

	if (threads <= 0) {
		long n = sysconf(_SC_NPROCESSORS_ONLN);
		threads = n > 1 ? (int)n : 1;
	}
	/* The caller works too: threads - 1 helpers use every core. */
	threads--;
	p = calloc(1, sizeof *p);
	if (!p)
		return NULL;
	pthread_mutex_init(&p->mu, NULL);
	pthread_cond_init(&p->work, NULL);
	if (threads > 0) {
		p->threads = calloc((size_t)threads, sizeof *p->threads);
		if (!p->threads) {
			proto__pool_free(p);
			return NULL;
		}
	}
	for (int i = 0; i < threads; i++) {
		if (pthread_create(&p->threads[i], NULL, worker, p))
			break;
		p->n_threads++;
	}
	return p;
}

void proto__pool_free(proto_pool *p)
{
	if (!p)
		return;
	pthread_mutex_lock(&p->mu);
	p->stopping = 1;
	pthread_cond_broadcast(&p->work);
	pthread_mutex_unlock(&p->mu);
	for (int i = 0; i < p->n_threads; i++)
		pthread_join(p->threads[i], NULL);
	free(p->threads);
	pthread_cond_destroy(&p->work);
	pthread_mutex_destroy(&p->mu);
	free(p);
}

int proto__pool_threads(const proto_pool *p)
{
	return p ? p->n_threads + 1 : 1;
}

void proto__pool_run(proto_pool *p, size_t nchunks,
                     void (*fn)(void *arg, size_t chunk), void *arg)
{
	job j;
	size_t ran;

	if (!p || p->n_threads == 0 || nchunks < 2) {
		for (size_t k = 0; k < nchunks; k++)
			fn(arg, k);
		return;
	}
	j.fn = fn;
	j.arg = arg;
	j.nchunks = nchunks;
	atomic_init(&j.next, 0);
	j.done = 0;
	j.active = 0;
	j.qnext = NULL;
	pthread_cond_init(&j.finished, NULL);
	pthread_mutex_lock(&p->mu);
	if (p->tail)
		p->tail->qnext = &j;
	else
		p->head = &j;
	p->tail = &j;
	pthread_cond_broadcast(&p->work);
	pthread_mutex_unlock(&p->mu);

	ran = take_chunks(&j);
	pthread_mutex_lock(&p->mu);
	j.done += ran;
	unlink_job(p, &j);
	while (j.done < nchunks || j.active > 0)
		pthread_cond_wait(&j.finished, &p->mu);
	pthread_mutex_unlock(&p->mu);
	pthread_cond_destroy(&j.finished);
}
