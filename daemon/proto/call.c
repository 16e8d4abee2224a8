/* The per-call services every method uses: the arena that holds a call's
 * memory until it ends, error and warning recording, and the size limits.
 * Texts that go into a response are cut only at UTF-8 character
 * boundaries, so an error line is always valid UTF-8. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/session.h"

/* The arena: a call's memory is carved from blocks that live until the
 * call ends. A small request takes everything it needs from its first
 * block (one malloc an allocation was a tenth of a scalar request; the
 * context keeps one first block from call to call, so most calls make
 * none), later blocks double up to ARENA_MAX, and an allocation
 * larger than a quarter of the next block gets a block of its own, linked
 * behind the one being carved. Under AddressSanitizer every allocation is
 * its own block, so an overrun is still caught at the byte. */
struct proto_arena_block {
	proto_arena_block *next;
	size_t used, cap; /* bytes of align[] carved, and held */
	max_align_t align[];
};

enum { ARENA_FIRST = 4096, ARENA_MAX = 65536 };

#if defined(__SANITIZE_ADDRESS__)
#define ARENA_EACH 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer)
#define ARENA_EACH 1
#endif
#endif

void *proto_alloc(proto_call *c, size_t bytes)
{
	const size_t a = sizeof(max_align_t);
	proto_arena_block *b = c->arena, *nb;
	size_t need, size;

	if (bytes > SIZE_MAX / 2 - sizeof *b)
		return NULL;
	need = bytes ? (bytes + a - 1) / a * a : a;
#ifndef ARENA_EACH
	if (b && b->cap - b->used >= need) {
		void *p = (char *)b->align + b->used;
		b->used += need;
		return p;
	}
	size = !b                        ? ARENA_FIRST
	       : b->cap >= ARENA_MAX / 2 ? ARENA_MAX
	                                 : 2 * b->cap;
	if (need <= size / 4) {
		nb = !b ? proto__ctx_spare_take(c->ctx) : NULL;
		if (!nb)
			nb = malloc(sizeof *nb + size);
		if (!nb)
			return NULL;
		nb->next = b;
		nb->used = need;
		nb->cap = size;
		c->arena = nb;
		return nb->align;
	}
#else
	(void)size;
#endif
	nb = malloc(sizeof *nb + need);
	if (!nb)
		return NULL;
	nb->used = nb->cap = need;
#ifndef ARENA_EACH
	if (b) {
		/* behind the block being carved, which stays first */
		nb->next = b->next;
		b->next = nb;
		return nb->align;
	}
#endif
	nb->next = b;
	c->arena = nb;
	return nb->align;
}

double *proto_alloc_doubles(proto_call *c, size_t n)
{
	if (n > SIZE_MAX / sizeof(double))
		return NULL;
	return proto_alloc(c, (n ? n : 1) * sizeof(double));
}

char *proto_strdup(proto_call *c, const char *s)
{
	size_t n = strlen(s) + 1;
	char *d = proto_alloc(c, n);
	if (d)
		memcpy(d, s, n);
	return d;
}

const char *proto_path(proto_call *c, const char *prefix, const char *name,
                       const char *suffix)
{
	/* Built for every parameter read, error or not: copies, not
	 * snprintf, which cost a tenth of a small request. */
	size_t a, b, d;
	char *s;

	if (!*prefix && !*suffix) {
		/* a top-level parameter: its name (the commonest case) */
		s = proto_strdup(c, name);
		return s ? s : "";
	}
	a = strlen(prefix);
	b = strlen(name);
	d = strlen(suffix);
	s = proto_alloc(c, a + b + d + 1);
	if (!s)
		return "";
	memcpy(s, prefix, a);
	memcpy(s + a, name, b);
	memcpy(s + a + b, suffix, d + 1);
	return s;
}

int proto__call_keep_json(proto_call *c, cJSON *tree)
{
	cJSON **list = proto_alloc(c, (c->n_trees + 1) * sizeof *list);
	if (!list) {
		cJSON_Delete(tree);
		return -1;
	}
	if (c->n_trees)
		memcpy(list, c->trees, c->n_trees * sizeof *list);
	list[c->n_trees++] = tree;
	c->trees = list;
	return 0;
}

void proto__arena_adopt(proto_call *c, proto_call *t)
{
	/* t began as a copy of c: its blocks continue c's */
	c->arena = t->arena;
	t->arena = NULL;
	for (size_t i = 0; i < t->n_trees; i++)
		if (proto__call_keep_json(c, t->trees[i]))
			c->out->oom = 1;
	t->n_trees = 0;
}

void proto__arena_free(proto_call *c)
{
	for (size_t i = 0; i < c->n_trees; i++)
		cJSON_Delete(c->trees[i]);
	c->n_trees = 0;
	c->trees = NULL;
	while (c->arena) {
		proto_arena_block *next = c->arena->next;
		/* the first block of the next call, without a malloc */
		if (c->arena->cap != ARENA_FIRST ||
		    !proto__ctx_spare_give(c->ctx, c->arena))
			free(c->arena);
		c->arena = next;
	}
}

/* Drops a UTF-8 sequence cut short at the end of s (after a bounded
 * copy): s then ends on a character boundary. */
static void utf8_trim(char *s)
{
	size_t n = strlen(s), i = n, need;
	unsigned char lead;

	while (i > 0 && ((unsigned char)s[i - 1] & 0xc0) == 0x80 && n - i < 4)
		i--;
	if (i == 0)
		return;
	lead = (unsigned char)s[i - 1];
	if (lead < 0x80)
		return;
	need = lead >= 0xf0 ? 4 : lead >= 0xe0 ? 3 : lead >= 0xc0 ? 2 : 1;
	if (n - (i - 1) < need)
		s[i - 1] = '\0';
}

int proto_fail(proto_call *c, int code, const char *param, const char *fmt, ...)
{
	va_list ap;

	if (c->err_code)
		return -1; /* keep the first error */
	c->err_code = code;
	snprintf(c->err_param, sizeof c->err_param, "%s", param ? param : "");
	utf8_trim(c->err_param);
	va_start(ap, fmt);
	vsnprintf(c->err_reason, sizeof c->err_reason, fmt, ap);
	va_end(ap);
	utf8_trim(c->err_reason);
	return -1;
}

void proto_warn(proto_call *c, const char *param, const char *fmt, ...)
{
	char text[512];
	int used = 0;
	va_list ap;
	char **list;

	if (param && *param)
		used = snprintf(text, sizeof text, "%s: ", param);
	if (used < 0 || (size_t)used >= sizeof text)
		used = 0;
	va_start(ap, fmt);
	vsnprintf(text + used, sizeof text - (size_t)used, fmt, ap);
	va_end(ap);
	utf8_trim(text);
	for (size_t i = 0; i < c->n_warnings; i++)
		if (strcmp(c->warnings[i], text) == 0)
			return; /* once per request */
	list = proto_alloc(c, (c->n_warnings + 1) * sizeof *list);
	if (!list)
		return;
	if (c->n_warnings)
		memcpy(list, c->warnings, c->n_warnings * sizeof *list);
	list[c->n_warnings] = proto_strdup(c, text);
	if (!list[c->n_warnings])
		return;
	c->warnings = list;
	c->n_warnings++;
}

int proto_join(proto_call *c, int g, size_t n, int is_array, const char *path)
{
	proto_group *gr;

	assert(g >= 0 && g < PROTO_MAX_GROUPS);
	if (!is_array)
		return 0;
	gr = &c->group[g];
	if (gr->any_array && gr->n != n)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "array length %zu does not match length %zu "
		                  "of '%s'",
		                  n, gr->n, gr->from);
	if (!gr->any_array) {
		gr->any_array = 1;
		gr->n = n;
		gr->from = path;
	}
	return 0;
}

int proto_check_size(proto_call *c, size_t samples, size_t work)
{
	const proto_limits *lim = proto_ctx_limits(c->ctx);

	if (lim->max_samples && samples > lim->max_samples)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "%zu samples exceed the limit of %zu per "
		                  "request; split the request",
		                  samples, lim->max_samples);
	if (lim->max_work && work > lim->max_work)
		return proto_fail(
		    c, PROTO_LIMIT_EXCEEDED, NULL,
		    "%zu evaluations (samples or grid nodes, x "
		    "angles, x draws or fits) exceed the limit of "
		    "%zu per request; split the request",
		    work, lim->max_work);
	return 0;
}

/* Optimal string alignment distance between a and b, capped at cap + 1
 * (lengths above 63 are not compared). */
static size_t edit_distance(const char *a, const char *b, size_t cap)
{
	size_t la = strlen(a), lb = strlen(b);
	size_t d[64][64];

	if (la > 63 || lb > 63)
		return cap + 1;
	if ((la > lb ? la - lb : lb - la) > cap)
		return cap + 1;
	for (size_t i = 0; i <= la; i++)
		d[i][0] = i;
	for (size_t j = 0; j <= lb; j++)
		d[0][j] = j;
	for (size_t i = 1; i <= la; i++)
		for (size_t j = 1; j <= lb; j++) {
			size_t cost = a[i - 1] != b[j - 1];
			size_t v = d[i - 1][j] + 1;
			if (d[i][j - 1] + 1 < v)
				v = d[i][j - 1] + 1;
			if (d[i - 1][j - 1] + cost < v)
				v = d[i - 1][j - 1] + cost;
			if (i > 1 && j > 1 && a[i - 1] == b[j - 2] &&
			    a[i - 2] == b[j - 1] && d[i - 2][j - 2] + 1 < v)
				v = d[i - 2][j - 2] + 1; /* transposition */
			d[i][j] = v;
		}
	return d[la][lb];
}

const char *proto__suggest(const char *s, const char *const *names, size_t n)
{
	size_t best = SIZE_MAX, len = strlen(s);
	/* a third of the length, at least one edit, at most three */
	size_t cap = len / 3 < 1 ? 1 : len / 3 > 3 ? 3 : len / 3;
	const char *pick = NULL;

	for (size_t i = 0; i < n; i++) {
		size_t d = edit_distance(s, names[i], cap);
		if (d <= cap && d < best) {
			best = d;
			pick = names[i];
		}
	}
	return pick;
}
