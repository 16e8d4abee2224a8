/* The generic driver: runs a declared method. It parses the params into
 * the method's arguments struct (args.c), applies `fields`, lets the
 * method's prepare hook derive its state and shape, checks the limits,
 * runs the per-sample kernel and the cell kernels over every sample (split
 * across the context's worker threads when the request is large; each
 * sample is independent, so the answer does not depend on the number of
 * threads), and writes the declared outputs in order. Methods that are not
 * per sample run their body instead. Request-wide features live here once
 * for every method: output selection, warnings, and uncertainty
 * (uncertainty.c). */
#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"

/* Work (evaluations x cost) above which a request is split across the
 * worker threads. Below it the thread hand-off costs more than it saves. */
#define PARALLEL_WORK 16384.0

/* ---- fields ------------------------------------------------------------- */

static int selectable(const proto_output *o)
{
	return o->dim != D_REQ && o->type != PO_FLAGS;
}

/* Parses `fields`: the outputs to write. Request-level members, counts
 * and QC flags are always written. */
static int parse_fields(proto_call *c)
{
	const proto_method *m = c->method;
	const cJSON *f = c->p_fields;
	const cJSON *e;
	proto_arr_iter it;
	const char **list, *names[128];
	size_t n = 0, nsel = 0, i = 0;

	if (!f)
		return 0;
	if (m->flags & PM_NO_FIELDS || !m->outputs)
		return proto_fail(c, PROTO_INVALID_PARAMS, "fields",
		                  "%s has no outputs to select", m->name);
	if (!cJSON_IsArray(f) || proto__arr_size(f) == 0)
		return proto_fail(c, PROTO_INVALID_PARAMS, "fields",
		                  "must be a non-empty array of output names");
	for (const proto_output *o = m->outputs; o->name; o++)
		if (nsel < 128 && selectable(o))
			names[nsel++] = o->name;
	size_t cap = proto__arr_size(f) + 256;
	list = proto_alloc(c, cap * sizeof *list);
	if (!list)
		return proto_fail(c, PROTO_INTERNAL_ERROR, "fields",
		                  "out of memory");
	PROTO_ARR_FOREACH(e, it, f)
	{
		size_t k;
		if (!cJSON_IsString(e))
			return proto_fail(c, PROTO_INVALID_PARAMS, "fields",
			                  "element %zu must be an output name",
			                  i);
		for (k = 0; k < nsel; k++)
			if (strcmp(names[k], e->valuestring) == 0)
				break;
		if (k == nsel) {
			char all[1024];
			size_t used = 0;
			const char *near =
			    proto__suggest(e->valuestring, names, nsel);
			all[0] = '\0';
			for (k = 0; k < nsel && used < sizeof all; k++) {
				int w =
				    snprintf(all + used, sizeof all - used,
				             "%s%s", k ? ", " : "", names[k]);
				if (w < 0)
					break;
				used += (size_t)w;
			}
			if (near)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "fields",
				    "element %zu: no output '%s'; did you "
				    "mean '%s'? outputs: %s",
				    i, e->valuestring, near, all);
			return proto_fail(c, PROTO_INVALID_PARAMS, "fields",
			                  "element %zu: no output '%s'; "
			                  "outputs: %s",
			                  i, e->valuestring, all);
		}
		list[n++] = e->valuestring;
		i++;
	}
	for (const proto_output *o = m->outputs; o->name; o++)
		if (!selectable(o))
			list[n++] = o->name;
	list[n++] = "units";
	list[n++] = "warnings";
	/* the members uncertainty adds (uncertainty.c) */
	list[n++] = "uncertainty";
	list[n++] = "sensitivity";
	list[n++] = "draws";
	for (const proto_output *o = m->outputs; o->name; o++)
		if (o->type == PO_FLAGS && n < cap)
			list[n++] = proto_path(c, o->name, "_probability", "");
	c->fields = list;
	c->n_fields = n;
	return 0;
}

/* ---- running the kernels ------------------------------------------------ */

/* The cells a request keeps: only the members it writes (its `fields`,
 * the outputs whose `when` holds, the QC flags), 8 bytes each, packed in
 * a row of their own. The kernel fills a full cell row in per-chunk
 * scratch; the kept members are copied out. A default Zoeppritz
 * reflect.series keeps 24 of the 216 bytes of each interface x angle
 * until its columns are written. */
typedef struct packed {
	size_t n;      /* kept members (0: the full rows are kept) */
	size_t size;   /* bytes of a packed row: 8 x n */
	size_t *from;  /* offset of each kept member in the full row */
	ptrdiff_t *at; /* per output: its offset in the packed row, -1 */
} packed;

typedef struct run {
	proto_call *c;
	const proto_method *m;
	const void *args;
	const proto_shape *shape;
	unsigned char *rows, *cells[2];
	packed pk[2];
	size_t chunk; /* samples per chunk */
	int failed;   /* a scratch allocation failed */
} run;

/* Sets the declared numeric outputs of a row to NaN and strings to NULL,
 * so a kernel that stops early leaves nulls, not zeros. */
static void row_clear(const proto_method *m, int dim, unsigned char *row)
{
	const double nan = NAN;
	const char *none = NULL;

	for (const proto_output *o = m->outputs; o && o->name; o++) {
		if (o->dim != dim)
			continue;
		if (o->type == PO_NUM)
			memcpy(row + o->offset, &nan, sizeof nan);
		else if (o->type == PO_STR)
			memcpy(row + o->offset, &none, sizeof none);
	}
}

static void run_chunk(void *arg, size_t chunk)
{
	run *r = arg;
	const proto_method *m = r->m;
	size_t lo = chunk * r->chunk, hi = lo + r->chunk;
	unsigned char *scratch[2] = {NULL, NULL};
	void *ws = NULL;

	if (hi > r->shape->n)
		hi = r->shape->n;
	if (m->ws_size) {
		ws = calloc(1, m->ws_size);
		if (!ws || (m->ws_init && m->ws_init(r->args, ws))) {
			free(ws);
			r->failed = 1;
			return;
		}
	}
	for (int k = 0; k < 2; k++)
		if (r->pk[k].n &&
		    !(scratch[k] = malloc(m->cells[k].row_size))) {
			r->failed = 1;
			goto out;
		}
	for (size_t i = lo; i < hi; i++) {
		unsigned char *row = r->rows + i * m->row_size;
		uint64_t *qc = (uint64_t *)(row + m->qc_offset);
		row_clear(m, D_SAMPLE, row);
		*qc = 0;
		m->kernel(r->args, i, row, qc, ws);
		for (int k = 0; k < 2; k++) {
			const proto_cells *cs = &m->cells[k];
			const packed *pk = &r->pk[k];
			size_t mm = r->shape->m[k];
			if (!cs->kernel)
				continue;
			for (size_t j = 0; j < mm; j++) {
				unsigned char *crow =
				    pk->n ? scratch[k]
				          : r->cells[k] +
				                (i * mm + j) * cs->row_size;
				uint64_t *cq =
				    (uint64_t *)(crow + cs->qc_offset);
				row_clear(m, D_CELL + k, crow);
				*cq = 0;
				cs->kernel(r->args, i, j, row, crow, cq, ws);
				if (pk->n) {
					unsigned char *to =
					    r->cells[k] +
					    (i * mm + j) * pk->size;
					for (size_t q = 0; q < pk->n; q++)
						memcpy(to + 8 * q,
						       crow + pk->from[q], 8);
				}
			}
		}
	}
out:
	free(scratch[0]);
	free(scratch[1]);
	if (ws) {
		if (m->ws_free)
			m->ws_free(ws);
		free(ws);
	}
}

/* Chooses the members cell set k keeps (see `packed`); leaves pk->n 0,
 * the full rows, when a member is not an 8-byte number or flag set or
 * packing saves nothing. */
static int choose_packed(proto_call *c, const proto_method *m, const void *args,
                         int k, packed *pk)
{
	size_t nout = 0, n = 0;

	memset(pk, 0, sizeof *pk);
	for (const proto_output *o = m->outputs; o->name; o++)
		nout++;
	pk->at = proto_alloc(c, nout * sizeof *pk->at);
	pk->from = proto_alloc(c, (nout ? nout : 1) * sizeof *pk->from);
	if (!pk->at || !pk->from)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < nout; i++) {
		const proto_output *o = &m->outputs[i];
		pk->at[i] = -1;
		/* a vector (the angles) is written from the arguments */
		if (o->dim != D_CELL + k || o->type == PO_VEC ||
		    (o->when && !o->when(args)))
			continue;
		if (o->type != PO_NUM && o->type != PO_FLAGS) {
			pk->n = 0;
			return 0;
		}
		if (o->type == PO_NUM && !proto_w_selected(c, o->name))
			continue;
		pk->at[i] = (ptrdiff_t)(8 * n);
		pk->from[n++] = o->offset;
	}
	if (8 * n >= m->cells[k].row_size)
		return 0;
	pk->n = n;
	pk->size = 8 * n;
	return 0;
}

/* Runs every sample, on the worker threads when the work is large. */
static int run_samples(run *r)
{
	const proto_method *m = r->m;
	const proto_shape *sh = r->shape;
	double work = (double)sh->n * (m->cost > 0 ? m->cost : 1.0) *
	              (1.0 + (double)sh->m[0] + (double)sh->m[1]);
	size_t nchunks = 1;

	r->chunk = sh->n ? sh->n : 1;
	if (work > PARALLEL_WORK && sh->n > 1) {
		/* Small chunks balance the threads; 64 per request is
		 * plenty for a few cores and keeps scheduling cheap. */
		nchunks = sh->n < 64 ? sh->n : 64;
		r->chunk = (sh->n + nchunks - 1) / nchunks;
		nchunks = (sh->n + r->chunk - 1) / r->chunk;
	}
	if (nchunks == 1)
		run_chunk(r, 0);
	else
		proto__parallel(r->c->ctx, nchunks, run_chunk, r);
	if (r->failed)
		return proto_fail(r->c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the kernels' scratch");
	return 0;
}

/* ---- writing ------------------------------------------------------------ */

/* Writes member `o` of the cells of set k: a grid [sample][cell] or
 * [cell][sample], each dimension an array only when its input was one. */
static void write_grid(proto_call *c, const proto_method *m, const run *r,
                       const proto_output *o, int k)
{
	const packed *pk = &r->pk[k];
	size_t size = m->cells[k].row_size, offset = o->offset;

	if (pk->n) {
		ptrdiff_t at = pk->at[o - m->outputs];
		if (at < 0)
			return; /* not written: `fields` leaves it out */
		size = pk->size;
		offset = (size_t)at;
	}
	proto__w_layout(c, o->name, o->kind, o->type == PO_FLAGS, r->cells[k],
	                size, offset, r->shape, k, m->cells[k].cell_major);
}

static void write_strings(proto_call *c, const char *key,
                          const unsigned char *rows, size_t row_size,
                          size_t offset, size_t n, int arr)
{
	const char *s;

	if (!arr) {
		memcpy(&s, rows + offset, sizeof s);
		if (s)
			proto_w_str(c, key, s);
		else
			proto_w_null(c, key);
		return;
	}
	proto_w_arr_begin(c, key);
	for (size_t i = 0; i < n; i++) {
		memcpy(&s, rows + i * row_size + offset, sizeof s);
		if (s)
			proto_w_str(c, NULL, s);
		else
			proto_w_null(c, NULL);
	}
	proto_w_arr_end(c);
}

static void write_outputs(proto_call *c, const proto_method *m, const run *r)
{
	const proto_shape *sh = r->shape;

	proto_w_obj_begin(c, NULL);
	for (const proto_output *o = m->outputs; o->name; o++) {
		if (o->when && !o->when(r->args))
			continue;
		if (o->type == PO_VEC) {
			proto__write_req(c, o, r->args, sh);
			continue;
		}
		switch (o->dim) {
		case D_SAMPLE:
			if (o->type == PO_FLAGS)
				proto_w_flag_rows(c, o->name, r->rows,
				                  m->row_size, o->offset, sh->n,
				                  sh->arr);
			else if (o->type == PO_STR)
				write_strings(c, o->name, r->rows, m->row_size,
				              o->offset, sh->n, sh->arr);
			else
				proto_w_rows(c, o->name, o->kind, r->rows,
				             m->row_size, o->offset, sh->n,
				             sh->arr);
			break;
		case D_CELL:
		case D_CELL2: write_grid(c, m, r, o, o->dim - D_CELL); break;
		default: proto__write_req(c, o, r->args, sh);
		}
	}
}

/* ---- the method --------------------------------------------------------- */

int proto__run_method(proto_call *c)
{
	const proto_method *m = c->method;
	proto_shape sh;
	run r;
	void *args;

	for (int g = 0; g < PROTO_MAX_GROUPS; g++) {
		c->group[g].n = 1;
		c->group[g].any_array = 0;
		c->group[g].from = "";
	}
	if (parse_fields(c))
		return -1;
	args = proto_alloc(c, m->params->size);
	if (!args)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	c->args = args;
	if ((!m->kernel || (m->flags & PM_NO_UNCERTAINTY)) && c->p_unc)
		return proto_fail(c, PROTO_INVALID_PARAMS, "uncertainty",
		                  "%s is not a per-sample method: it takes no "
		                  "uncertainty",
		                  m->name);
	if (m->flags & PM_RAW_PARAMS) {
		assert(m->body);
		return m->body(c, args);
	}
	if (proto_decl_parse(c, m->params, c->params, "", args))
		return -1;
	if (m->body)
		return m->body(c, args);
	assert(m->kernel && m->outputs);
	memset(&sh, 0, sizeof sh);
	sh.n = c->group[0].n;
	sh.arr = c->group[0].any_array;
	for (int k = 0; k < 2; k++) {
		if (!m->cells[k].kernel)
			continue;
		sh.m[k] = c->group[m->cells[k].group].n;
		sh.m_arr[k] = c->group[m->cells[k].group].any_array;
	}
	if (m->prepare && m->prepare(c, args, &sh))
		return -1;
	if (c->p_unc || proto__has_dist(m->params, args)) {
		if (m->flags & PM_NO_UNCERTAINTY)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "uncertainty",
			    "%s does not take uncertainty", m->name);
		return proto__run_uncertain(c, args, &sh);
	}
	{
		size_t cells = sh.m[0] + sh.m[1];
		size_t per = cells ? cells : 1;
		if (sh.n && per > SIZE_MAX / sh.n)
			return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
			                  "the request's size overflows");
		if (proto_check_size(c, sh.n, sh.n * per))
			return -1;
	}
	memset(&r, 0, sizeof r);
	r.c = c;
	r.m = m;
	r.args = args;
	r.shape = &sh;
	r.rows = sh.n <= SIZE_MAX / (m->row_size ? m->row_size : 1)
	             ? proto_alloc(c, sh.n * m->row_size)
	             : NULL;
	if (!r.rows)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", sh.n);
	for (int k = 0; k < 2; k++) {
		size_t cells = sh.n * sh.m[k], size;
		if (!m->cells[k].kernel)
			continue;
		if (choose_packed(c, m, args, k, &r.pk[k]))
			return -1;
		size = r.pk[k].n ? r.pk[k].size : m->cells[k].row_size;
		r.cells[k] = cells <= SIZE_MAX / size
		                 ? proto_alloc(c, (cells ? cells : 1) * size)
		                 : NULL;
		if (!r.cells[k])
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory for %zu cells", cells);
	}
	if (run_samples(&r))
		return -1;
	write_outputs(c, m, &r);
	proto__write_tail(c);
	return 0;
}
