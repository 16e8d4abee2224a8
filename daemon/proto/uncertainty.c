/* Uncertainty on every answer: any numeric input of a per-sample method
 * may be a distribution, and the driver then runs the method's kernels
 * over draws of the uncertain inputs and reports, per sample, each
 * output's mean, standard deviation and percentiles, the probability of
 * each value of a categorical output (an AVO class, a QC flag), and each
 * output's rank correlation with each uncertain input (its sensitivity).
 * Written once here for every method. The numerics (draws, copula,
 * statistics) are the core's (rockwire/uncertainty.h, GSL).
 *
 * Draws are made before any kernel runs, from one stream per input and
 * sample seeded from the request's seed, so the answer is the same to the
 * bit whatever the number of threads. A distribution with scalar
 * parameters is one uncertain value for the whole request (every sample
 * sees the same draw); with array parameters each sample has its own,
 * independent of the others. Correlations join inputs of the same kind
 * (both per request, or both per sample) through a Gaussian copula. A
 * draw outside a parameter's declared range (a porosity below 0) is not
 * used for that sample; the count of usable draws is reported. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "rockwire/uncertainty.h"

#define MAX_INPUTS 64
#define MAX_PCT    16
#define DRAWS_MAX  1000000
/* Numbers an uncertain request may hold at once (draws x samples x
 * outputs): 2^27 doubles, 1 GiB. */
#define STORE_MAX ((size_t)1 << 27)

/* ---- the uncertainty object --------------------------------------------- */

enum { SAMPLING_MC = 0, SAMPLING_LHS = 1 };
static const char *const sampling_names[] = {"monte_carlo", "latin_hypercube",
                                             NULL};

typedef struct corr_args {
	proto_hdr hdr;
	const cJSON *inputs, *matrix;
} corr_args;

static int raw_parse(proto_call *c, const cJSON *v, const char *path, void *dst)
{
	(void)c, (void)path;
	*(const cJSON **)dst = v;
	return 0;
}
static const proto_custom raw_json = {
    .parse = raw_parse,
    .schema = "{\"type\": \"array\"}",
};

static const proto_field corr_fields[] = {
    {.name = "inputs",
     .type = PT_CUSTOM,
     .flags = PF_REQ,
     .offset = offsetof(corr_args, inputs),
     .custom = &raw_json,
     .desc = "the uncertain inputs correlated, by dotted name "
             "(\"porosity\", \"mineral.k\")"},
    {.name = "matrix",
     .type = PT_CUSTOM,
     .flags = PF_REQ,
     .offset = offsetof(corr_args, matrix),
     .custom = &raw_json,
     .desc = "their correlation matrix (symmetric, unit diagonal, "
             "positive definite), row by row"},
    {0},
};
static const proto_decl corr_decl = {
    .name = "correlations",
    .fields = corr_fields,
    .size = sizeof(corr_args),
    .desc = "correlations between uncertain inputs (a Gaussian copula "
            "over their draws)",
};

typedef struct unc_args {
	proto_hdr hdr;
	proto_vec draws, seed, percentiles;
	int sampling;
	corr_args correlations;
	int sensitivities, raw;
} unc_args;

static const proto_field unc_fields[] = {
    {PROTO_NUMS(unc_args, draws, PK_NONE,
                PF_SCALAR | PF_INT | PF_DFLT | PF_LO | PF_HI,
                "number of draws (default 1000); draws x samples count "
                "against --max-work"),
     .dflt = PROTO_DRAWS_DEFAULT, .lo = 2, .hi = DRAWS_MAX},
    {PROTO_NUMS(unc_args, seed, PK_NONE,
                PF_SCALAR | PF_INT | PF_DFLT | PF_LO | PF_HI,
                "seed of the draws (default 1): the same seed gives the "
                "same answer to the bit"),
     .dflt = 1, .lo = 0, .hi = 9007199254740991.0},
    {.name = "sampling",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(unc_args, sampling),
     .choices = sampling_names,
     .dflt_choice = SAMPLING_LHS,
     .desc = "latin_hypercube (default; McKay et al. 1979) or monte_carlo"},
    {PROTO_NUMS(unc_args, percentiles, PK_NONE,
                PF_LIST | PF_LO | PF_HI | PF_LO_OPEN | PF_HI_OPEN,
                "percentiles to report, in percent (default 10, 50, 90)"),
     .lo = 0, .hi = 100},
    {PROTO_FIELD(unc_args, correlations, PT_OBJ, 0,
                 "correlations between uncertain inputs"),
     .sub = &corr_decl},
    {.name = "sensitivities",
     .type = PT_BOOL,
     .flags = PF_DFLT,
     .offset = offsetof(unc_args, sensitivities),
     .dflt_choice = 1,
     .desc = "report each output's rank correlation with each uncertain "
             "input (default true)"},
    {.name = "raw",
     .type = PT_BOOL,
     .flags = PF_DFLT,
     .offset = offsetof(unc_args, raw),
     .dflt_choice = 0,
     .desc = "also return every draw of every output (default false; "
             "bounded by --max-work)"},
    {0},
};
const proto_decl proto_uncertainty_decl = {
    .name = "uncertainty",
    .fields = unc_fields,
    .size = sizeof(unc_args),
    .desc = "Monte Carlo over the inputs given as distributions",
};

/* ---- finding the uncertain inputs --------------------------------------- */

typedef struct unc_input {
	const char *path;
	const proto_field *f;
	const proto_dist *dist;
	size_t off;      /* of the proto_vec in its container */
	size_t list_off; /* of the proto_list holding it, or SIZE_MAX */
	size_t item, item_size;
	size_t len;    /* 1 or the samples */
	double *draws; /* draws x len, draw-major */
	int corr;      /* index in the correlation set, or -1 */
} unc_input;

typedef struct walk {
	unc_input in[MAX_INPUTS];
	size_t n;
	int too_many, nested_list;
} walk;

static void walk_decl(walk *w, const proto_decl *d, const unsigned char *base,
                      size_t base_off, size_t list_off, size_t item,
                      size_t item_size)
{
	for (const proto_field *f = d->fields; f->name; f++) {
		const unsigned char *at = base + f->offset;
		if (f->type == PT_NUMS) {
			const proto_vec *v = (const proto_vec *)at;
			if (!v->dist)
				continue;
			if (w->n == MAX_INPUTS) {
				w->too_many = 1;
				return;
			}
			w->in[w->n] =
			    (unc_input){v->dist->path, f,
			                v->dist,       base_off + f->offset,
			                list_off,      item,
			                item_size,     v->dist->n,
			                NULL,          -1};
			w->n++;
		} else if (f->type == PT_OBJ) {
			walk_decl(w, f->sub, at, base_off + f->offset, list_off,
			          item, item_size);
		} else if (f->type == PT_LIST) {
			const proto_list *l = (const proto_list *)at;
			const unsigned char *items = l->items;
			if (list_off != SIZE_MAX) {
				w->nested_list = 1;
				continue;
			}
			for (size_t j = 0; j < l->n; j++)
				walk_decl(w, f->sub, items + j * f->sub->size,
				          0, base_off + f->offset, j,
				          f->sub->size);
		}
	}
}

int proto__has_dist(const proto_decl *d, const void *args)
{
	walk w;
	w.n = 0;
	w.too_many = w.nested_list = 0;
	walk_decl(&w, d, args, 0, SIZE_MAX, 0, 0);
	return w.n > 0 || w.too_many;
}

/* ---- one draw ----------------------------------------------------------- */

typedef struct unc_run {
	proto_call *c;
	const proto_method *m;
	const proto_shape *sh;
	walk *w;
	size_t draws;
	void **dargs;           /* per draw: its args struct, or NULL when
	                           the draw's checks refused it */
	unsigned char *invalid; /* draws x n: the draw is not used there */
	/* stored outputs: per output, (sample, cell) major, draws minor */
	size_t n_num, n_str, n_flg;
	const proto_output **num, **str, **flg;
	double **num_v;
	const char ***str_v;
	uint64_t **flg_v;
	size_t *cells; /* per stored output: cells per sample (1 for samples) */
	int failed;
	char why[256]; /* the first refusal of a draw */
	char why_param[128], why_reason[256];
	size_t refused;
} unc_run;

/* Points the uncertain inputs of draw d's args copy at their draws. */
static int patch_draw(unc_run *r, size_t d, unsigned char *a, proto_call *t)
{
	walk *w = r->w;

	/* lists holding uncertain inputs get their own items */
	for (size_t k = 0; k < w->n; k++) {
		unc_input *in = &w->in[k];
		proto_list *l;
		int first = 1;
		if (in->list_off == SIZE_MAX)
			continue;
		for (size_t j = 0; j < k; j++)
			first &= w->in[j].list_off != in->list_off;
		if (!first)
			continue;
		l = (proto_list *)(a + in->list_off);
		{
			void *copy = proto_alloc(t, l->n * in->item_size);
			if (!copy)
				return -1;
			memcpy(copy, l->items, l->n * in->item_size);
			l->items = copy;
		}
	}
	for (size_t k = 0; k < w->n; k++) {
		unc_input *in = &w->in[k];
		unsigned char *box =
		    in->list_off == SIZE_MAX
		        ? a
		        : (unsigned char *)((proto_list *)(a + in->list_off))
		                  ->items +
		              in->item * in->item_size;
		proto_vec *v = (proto_vec *)(box + in->off);
		v->v = in->draws + d * in->len;
		v->n = in->len;
		v->is_array = in->len > 1;
		v->dist = NULL;
	}
	return 0;
}

/* Runs the declaration checks of d on the struct at s, innermost first. */
static int rerun_checks(proto_call *t, const proto_decl *d, void *s)
{
	unsigned char *base = s;
	for (const proto_field *f = d->fields; f->name; f++) {
		if (f->type == PT_OBJ) {
			const proto_hdr *h =
			    (const proto_hdr *)(base + f->offset);
			if (h->present &&
			    rerun_checks(t, f->sub, base + f->offset))
				return -1;
		} else if (f->type == PT_LIST) {
			proto_list *l = (proto_list *)(base + f->offset);
			for (size_t j = 0; j < l->n; j++)
				if (rerun_checks(t, f->sub,
				                 (unsigned char *)l->items +
				                     j * f->sub->size))
					return -1;
		}
	}
	return d->check ? d->check(t, s) : 0;
}

/* Prepares every draw's args, one after another (the checks and prepare
 * hooks use the call's arena). A draw its checks refuse is not used. */
static int prepare_draws(unc_run *r, const void *args)
{
	proto_call *c = r->c;
	const proto_method *m = r->m;

	for (size_t d = 0; d < r->draws; d++) {
		proto_call t;
		proto_shape sh = *r->sh;
		unsigned char *a = proto_alloc(c, m->params->size);
		int bad;

		if (!a)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory for the draws");
		memcpy(a, args, m->params->size);
		t = *c; /* allocates on from c's arena */
		t.err_code = 0;
		t.n_warnings = 0;
		t.warnings = NULL;
		t.n_trees = 0;
		t.trees = NULL;
		bad = patch_draw(r, d, a, &t) ||
		      rerun_checks(&t, m->params, a) ||
		      (m->prepare && m->prepare(&t, a, &sh)) ||
		      sh.n != r->sh->n || sh.m[0] != r->sh->m[0] ||
		      sh.m[1] != r->sh->m[1];
		/* the draw's memory lives as long as the call */
		proto__arena_adopt(c, &t);
		if (bad) {
			if (!r->refused++) {
				snprintf(
				    r->why, sizeof r->why, "%.60s%s%.180s",
				    t.err_param, t.err_param[0] ? ": " : "",
				    t.err_code ? t.err_reason
				               : "the draw changes the shape");
				snprintf(r->why_param, sizeof r->why_param,
				         "%.120s", t.err_param);
				snprintf(r->why_reason, sizeof r->why_reason,
				         "%.250s",
				         t.err_code
				             ? t.err_reason
				             : "the draw changes the shape");
			}
			r->dargs[d] = NULL;
			continue;
		}
		r->dargs[d] = a;
	}
	return 0;
}

/* ---- the draws ---------------------------------------------------------- */

static int in_bounds(const proto_field *f, double x)
{
	int lo = (f->flags & (PF_LO | PF_FRACTION)) != 0;
	int hi = (f->flags & (PF_HI | PF_FRACTION)) != 0;
	double l = f->flags & PF_FRACTION && !(f->flags & PF_LO) ? 0 : f->lo;
	double h = f->flags & PF_FRACTION && !(f->flags & PF_HI) ? 1 : f->hi;

	if (!isfinite(x))
		return 0;
	if (lo && (f->flags & PF_LO_OPEN ? !(x > l) : !(x >= l)))
		return 0;
	if (hi && (f->flags & PF_HI_OPEN ? !(x < h) : !(x <= h)))
		return 0;
	return 1;
}

/* Parses `correlations` into the lower Cholesky factor l (k x k) over
 * the inputs it names (their corr index set). Returns k, or -1. */
static int correlations(proto_call *c, unc_run *r, const corr_args *ca,
                        double *l)
{
	walk *w = r->w;
	const cJSON *e, *row;
	proto_arr_iter it, jt;
	size_t k = 0, i = 0;

	if (!ca->hdr.present)
		return 0;
	if (!cJSON_IsArray(ca->inputs) || proto__arr_size(ca->inputs) < 2 ||
	    proto__arr_size(ca->inputs) > MAX_INPUTS)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  "uncertainty.correlations.inputs",
		                  "must be an array of 2 to %d names of inputs "
		                  "given as distributions",
		                  MAX_INPUTS);
	PROTO_ARR_FOREACH(e, it, ca->inputs)
	{
		size_t j;
		if (!cJSON_IsString(e))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "uncertainty.correlations.inputs",
			                  "element %zu must be a name", k);
		for (j = 0; j < w->n; j++)
			if (strcmp(w->in[j].path, e->valuestring) == 0)
				break;
		if (j == w->n)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "uncertainty.correlations.inputs",
			                  "'%s' is not an input given as a "
			                  "distribution",
			                  e->valuestring);
		if (w->in[j].corr >= 0)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "uncertainty.correlations.inputs",
			                  "'%s' is named twice",
			                  e->valuestring);
		w->in[j].corr = (int)k++;
	}
	/* correlated inputs are all per request or all per sample */
	{
		size_t len = 0;
		for (size_t j = 0; j < w->n; j++) {
			if (w->in[j].corr < 0)
				continue;
			if (!len)
				len = w->in[j].len;
			else if (w->in[j].len != len)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    "uncertainty.correlations.inputs",
				    "'%s' has %zu values and another "
				    "correlated "
				    "input %zu: correlate inputs that are all "
				    "one value for the request, or all per "
				    "sample",
				    w->in[j].path, w->in[j].len, len);
		}
	}
	if (!cJSON_IsArray(ca->matrix) || proto__arr_size(ca->matrix) != k)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  "uncertainty.correlations.matrix",
		                  "must be %zu rows of %zu numbers", k, k);
	PROTO_ARR_FOREACH(row, it, ca->matrix)
	{
		size_t j = 0;
		if (!cJSON_IsArray(row) || proto__arr_size(row) != k)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "uncertainty.correlations.matrix",
			                  "row %zu must hold %zu numbers", i,
			                  k);
		PROTO_ARR_FOREACH(e, jt, row)
		{
			if (!cJSON_IsNumber(e))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    "uncertainty.correlations.matrix",
				    "row %zu, element %zu must be a number", i,
				    j);
			l[i * k + j++] = e->valuedouble;
		}
		i++;
	}
	if (rw_unc_cholesky(k, l) != RW_OK)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "uncertainty.correlations.matrix",
		    "not a correlation matrix: it must be "
		    "symmetric, with 1 on the diagonal, entries in "
		    "[-1, 1], and positive definite (GSL's Cholesky "
		    "factorisation failed)");
	return (int)k;
}

/* Draws every uncertain input: uniforms per (input, value) stream, the
 * copula over the correlated ones, then each distribution's quantiles. */
static int make_draws(proto_call *c, unc_run *r, const unc_args *u,
                      const double *l, size_t kc)
{
	walk *w = r->w;
	size_t nd = r->draws;
	uint64_t seed = (uint64_t)u->seed.v[0];
	rw_unc_rng *rng = rw_unc_rng_new();
	double *ubuf = proto_alloc_doubles(c, nd);

	if (!rng || !ubuf) {
		rw_unc_rng_free(rng);
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the draws");
	}
	for (size_t k = 0; k < w->n; k++) {
		unc_input *in = &w->in[k];
		if (in->len > SIZE_MAX / nd ||
		    !(in->draws = proto_alloc_doubles(c, nd * in->len))) {
			rw_unc_rng_free(rng);
			return proto_fail(c, PROTO_INTERNAL_ERROR, in->path,
			                  "out of memory for the draws");
		}
		for (size_t s = 0; s < in->len; s++) {
			rw_unc_uniforms(rng, seed, ((uint64_t)k << 32) | s, nd,
			                u->sampling == SAMPLING_LHS, ubuf);
			for (size_t d = 0; d < nd; d++)
				in->draws[d * in->len + s] = ubuf[d];
		}
	}
	rw_unc_rng_free(rng);
	if (kc) {
		size_t len = 0, idx[MAX_INPUTS];
		double uu[MAX_INPUTS];
		for (size_t k = 0; k < w->n; k++)
			if (w->in[k].corr >= 0) {
				idx[w->in[k].corr] = k;
				len = w->in[k].len;
			}
		for (size_t d = 0; d < nd; d++)
			for (size_t s = 0; s < len; s++) {
				for (size_t j = 0; j < kc; j++)
					uu[j] =
					    w->in[idx[j]].draws[d * len + s];
				rw_unc_correlate(kc, l, uu);
				for (size_t j = 0; j < kc; j++)
					w->in[idx[j]].draws[d * len + s] =
					    uu[j];
			}
	}
	for (size_t k = 0; k < w->n; k++) {
		unc_input *in = &w->in[k];
		for (size_t s = 0; s < in->len; s++) {
			rw_dist rd;
			proto__dist_at(in->dist, s,
			               &rd); /* checked when parsed */
			for (size_t d = 0; d < nd; d++) {
				double *x = &in->draws[d * in->len + s];
				*x = rw_dist_quantile(&rd, *x);
			}
		}
	}
	/* draws outside a parameter's declared range are not used */
	for (size_t k = 0; k < w->n; k++) {
		unc_input *in = &w->in[k];
		size_t n = r->sh->n;
		for (size_t d = 0; d < nd; d++)
			for (size_t s = 0; s < in->len; s++) {
				if (in_bounds(in->f,
				              in->draws[d * in->len + s]))
					continue;
				if (in->len == n && in->f->group == 0 && n > 1)
					r->invalid[d * n + s] = 1;
				else
					memset(r->invalid + d * n, 1, n);
			}
	}
	return 0;
}

/* ---- running the kernels over the draws --------------------------------- */

/* Where output o's value of sample i, cell j lies in a row. */
static const unsigned char *out_at(const proto_method *m, const proto_output *o,
                                   const unsigned char *rows,
                                   unsigned char *const *cells,
                                   const proto_shape *sh, size_t i, size_t j)
{
	if (o->dim == D_SAMPLE)
		return rows + i * m->row_size + o->offset;
	{
		int k = o->dim - D_CELL;
		return cells[k] + (i * sh->m[k] + j) * m->cells[k].row_size +
		       o->offset;
	}
}

static const char excluded[] = "";

typedef struct chunk_arg {
	unc_run *r;
	size_t per; /* draws per chunk */
} chunk_arg;

static void run_draws(void *arg, size_t chunk)
{
	chunk_arg *ca = arg;
	unc_run *r = ca->r;
	const proto_method *m = r->m;
	const proto_shape *sh = r->sh;
	size_t n = sh->n, lo = chunk * ca->per, hi = lo + ca->per;
	unsigned char *rows = NULL, *cells[2] = {NULL, NULL};
	unsigned char *blank = NULL, *cblank[2] = {NULL, NULL};
	void *ws = NULL;

	if (hi > r->draws)
		hi = r->draws;
	rows = calloc(n ? n : 1, m->row_size);
	blank = calloc(1, m->row_size);
	for (int k = 0; k < 2; k++)
		if (m->cells[k].kernel) {
			cells[k] =
			    calloc(n * sh->m[k] + 1, m->cells[k].row_size);
			cblank[k] = calloc(1, m->cells[k].row_size);
		}
	if (m->ws_size)
		ws = calloc(1, m->ws_size);
	if (!rows || !blank ||
	    (m->cells[0].kernel && (!cells[0] || !cblank[0])) ||
	    (m->cells[1].kernel && (!cells[1] || !cblank[1])) ||
	    (m->ws_size && !ws)) {
		r->failed = 1;
		goto out;
	}
	/* A row before its kernel runs: numeric outputs NaN, strings NULL,
	 * flags 0; copied in, not rebuilt, for every sample of every draw. */
	for (const proto_output *o = m->outputs; o->name; o++) {
		const double nan = NAN;
		int k = o->dim - D_CELL;
		if (o->type != PO_NUM)
			continue;
		if (o->dim == D_SAMPLE)
			memcpy(blank + o->offset, &nan, sizeof nan);
		else if (k >= 0 && k < 2 && cblank[k])
			memcpy(cblank[k] + o->offset, &nan, sizeof nan);
	}
	for (size_t d = lo; d < hi; d++) {
		const void *a = r->dargs[d];
		if (a && ws && m->ws_init && m->ws_init(a, ws)) {
			r->failed = 1;
			goto out;
		}
		for (size_t i = 0; a && i < n; i++) {
			unsigned char *row = rows + i * m->row_size;
			memcpy(row, blank, m->row_size);
			m->kernel(a, i, row, (uint64_t *)(row + m->qc_offset),
			          ws);
			for (int k = 0; k < 2; k++) {
				const proto_cells *cs = &m->cells[k];
				if (!cs->kernel)
					continue;
				for (size_t j = 0; j < sh->m[k]; j++) {
					unsigned char *cr =
					    cells[k] +
					    (i * sh->m[k] + j) * cs->row_size;
					memcpy(cr, cblank[k], cs->row_size);
					cs->kernel(
					    a, i, j, row, cr,
					    (uint64_t *)(cr + cs->qc_offset),
					    ws);
				}
			}
		}
		if (a && ws && m->ws_free)
			m->ws_free(ws);
		/* keep the selected outputs of this draw */
		for (size_t i = 0; i < n; i++) {
			int use = a && !r->invalid[d * n + i];
			for (size_t j = 0; j < r->n_num; j++)
				for (size_t q = 0; q < r->cells[j]; q++) {
					double v = NAN;
					if (use)
						memcpy(&v,
						       out_at(m, r->num[j],
						              rows, cells, sh,
						              i, q),
						       sizeof v);
					r->num_v[j][(i * r->cells[j] + q) *
					                r->draws +
					            d] = v;
				}
			for (size_t j = 0; j < r->n_str; j++) {
				const char *s = excluded;
				if (use)
					memcpy(&s,
					       out_at(m, r->str[j], rows, cells,
					              sh, i, 0),
					       sizeof s);
				r->str_v[j][i * r->draws + d] = s;
			}
			for (size_t j = 0; j < r->n_flg; j++) {
				size_t nc = r->cells[r->n_num + j];
				for (size_t q = 0; q < nc; q++) {
					uint64_t f = UINT64_MAX;
					if (use)
						memcpy(&f,
						       out_at(m, r->flg[j],
						              rows, cells, sh,
						              i, q),
						       sizeof f);
					r->flg_v[j][(i * nc + q) * r->draws +
					            d] = f;
				}
			}
		}
	}
out:
	free(rows);
	free(blank);
	free(cblank[0]);
	free(cblank[1]);
	free(cells[0]);
	free(cells[1]);
	free(ws);
}

/* ---- statistics --------------------------------------------------------- */

typedef struct stats {
	size_t npct;
	double pct[MAX_PCT];
	size_t *valid; /* per sample: draws used */
	double **num;  /* per numeric output: (2 + npct) x (n x cells) */
	double **sens; /* per numeric output: inputs x (n x cells) */
	/* ranks of the draws of each input that is one value for the
	 * request (NULL with a non-finite draw, or without sensitivities) */
	double *in_rank[MAX_INPUTS];
	size_t *in_perm[MAX_INPUTS]; /* and their sorts */
	int in_ties[MAX_INPUTS];     /* whether equal draws are among them */
	/* categorical outputs: the values seen and their probabilities */
	const char **cat[8];
	size_t ncat[8];
	double *cat_p[8]; /* ncat x n */
	/* flags: union, and the probability of each bit seen */
	uint64_t *fl_union[8];
	uint64_t fl_seen[8];
	double *fl_p[8]; /* 64 x (n x cells) */
} stats;

typedef struct stat_arg {
	unc_run *r;
	stats *st;
} stat_arg;

/* One sort of each output at each sample (and cell) serves its
 * percentiles and its ranks; each input is sorted once per sample (once
 * for the request when it is one value): Spearman's correlation is then
 * Pearson's of the ranks. Draws where the output is not finite drop out
 * of both. */
static void stat_sample(void *arg, size_t i)
{
	stat_arg *sa = arg;
	unc_run *r = sa->r;
	stats *st = sa->st;
	size_t nd = r->draws, n = r->sh->n, nin = r->w->n;
	size_t nw = (4 + 2 * nin) * nd, nz = (5 + nin) * nd;
	double *dw = malloc(nw * sizeof *dw), q[MAX_PCT];
	size_t *zw = malloc(nz * sizeof *zw);
	uint64_t *kw = malloc(3 * nd * sizeof *kw);
	double *yv, *sorted, *ry, *rx, *rin;
	size_t *perm, *pos, *pin;
	const double *rank_of[MAX_INPUTS];
	const size_t *perm_of[MAX_INPUTS];
	int ties_of[MAX_INPUTS];
	int sens = 0;

	if (!dw || !zw || !kw) {
		free(dw);
		free(zw);
		free(kw);
		r->failed = 1;
		return;
	}
	yv = dw, sorted = dw + nd, ry = dw + 2 * nd, rx = dw + 3 * nd;
	rin = dw + 4 * nd;
	perm = zw, pos = zw + nd, pin = zw + 2 * nd;
	for (size_t j = 0; j < r->n_num; j++)
		sens |= st->sens[j] != NULL;
	for (size_t k = 0; sens && k < nin; k++) {
		const unc_input *in = &r->w->in[k];
		if (in->len == 1) {
			rank_of[k] = st->in_rank[k];
			perm_of[k] = st->in_perm[k];
			ties_of[k] = st->in_ties[k];
			continue;
		}
		if (rw_unc_argsort(in->draws + i, in->len, nd, pin + k * nd,
		                   kw) != RW_OK) {
			rank_of[k] = NULL, perm_of[k] = NULL, ties_of[k] = 1;
			continue;
		}
		rw_unc_ranks_sorted(in->draws + i, in->len, pin + k * nd, nd,
		                    NULL, rin + k * nd);
		rank_of[k] = rin + k * nd, perm_of[k] = pin + k * nd;
		ties_of[k] = rw_unc_sorted_has_ties(in->draws + i, in->len,
		                                    perm_of[k], nd);
	}
	for (size_t j = 0; j < r->n_num; j++) {
		size_t nc = r->cells[j], cells = n * nc;
		for (size_t c = 0; c < nc; c++) {
			const double *y = r->num_v[j] + (i * nc + c) * nd;
			size_t e = i * nc + c, m = 0;
			for (size_t d = 0; d < nd; d++)
				if (isfinite(y[d])) {
					pos[d] = m;
					yv[m++] = y[d];
				} else {
					pos[d] = SIZE_MAX;
				}
			rw_unc_argsort(yv, 1, m, perm, kw);
			for (size_t k = 0; k < m; k++)
				sorted[k] = yv[perm[k]];
			rw_unc_summary_sorted(sorted, m, st->pct, st->npct,
			                      &st->num[j][e],
			                      &st->num[j][cells + e], q);
			for (size_t k = 0; k < st->npct; k++)
				st->num[j][(2 + k) * cells + e] = q[k];
			if (!st->sens[j])
				continue;
			rw_unc_ranks_of_sorted(sorted, perm, m, ry);
			for (size_t k = 0; k < nin; k++) {
				const unc_input *in = &r->w->in[k];
				const double *xr = rank_of[k];
				double v = NAN;
				if (xr && m < nd) {
					/* the input's ranks among the
					 * draws kept */
					if (ties_of[k])
						rw_unc_ranks_sorted(
						    in->draws +
						        (in->len > 1 ? i : 0),
						    in->len, perm_of[k], nd,
						    pos, rx);
					else
						rw_unc_ranks_kept(perm_of[k],
						                  nd, pos, rx);
					xr = rx;
				}
				if (xr)
					v = rw_unc_rank_correlation(xr, ry, m);
				st->sens[j][k * cells + e] = v;
			}
		}
	}
	for (size_t j = 0; j < r->n_str; j++)
		for (size_t k = 0; k < st->ncat[j]; k++) {
			size_t hits = 0;
			for (size_t d = 0; d < nd; d++)
				hits +=
				    r->str_v[j][i * nd + d] == st->cat[j][k];
			st->cat_p[j][k * n + i] =
			    st->valid[i] ? (double)hits / (double)st->valid[i]
			                 : NAN;
		}
	for (size_t j = 0; j < r->n_flg; j++) {
		size_t nc = r->cells[r->n_num + j], cells = n * nc;
		for (size_t c = 0; c < nc; c++) {
			const uint64_t *f = r->flg_v[j] + (i * nc + c) * nd;
			size_t e = i * nc + c, used = 0, hits[64] = {0};
			uint64_t u = 0;
			for (size_t d = 0; d < nd; d++) {
				if (f[d] == UINT64_MAX)
					continue;
				used++;
				u |= f[d];
				/* only the raised bits (most draws raise
				 * none); flags live in bits 0-52 */
				for (uint64_t v = f[d] & ((1ull << 53) - 1); v;
				     v &= v - 1)
					hits[__builtin_ctzll(v)]++;
			}
			st->fl_union[j][e] = u;
			for (int b = 0; b < 53; b++)
				st->fl_p[j][(size_t)b * cells + e] =
				    used ? (double)hits[b] / (double)used : NAN;
		}
	}
	free(dw);
	free(zw);
	free(kw);
}

/* ---- writing ------------------------------------------------------------ */

/* The name of QC bit b. */
static const char *flag_name(int b)
{
	for (const proto_qc_info *q = proto_qc_legend; q->name; q++)
		if (q->bit == QC_BIT(b))
			return q->name;
	return "unknown";
}

static void write_stats(proto_call *c, unc_run *r, stats *st, size_t j)
{
	const proto_output *o = r->num[j];
	const proto_shape *sh = r->sh;
	size_t cells = sh->n * r->cells[j];
	int set = o->dim == D_SAMPLE ? -1 : o->dim - D_CELL;
	int cm = set < 0 ? 0 : r->m->cells[set].cell_major;
	const unsigned char *base = (const unsigned char *)st->num[j];
	double *sd = proto_alloc_doubles(c, cells);
	char key[24];

	proto_w_obj_begin(c, o->name);
	proto__w_layout(c, "mean", o->kind, 0, base, sizeof(double), 0, sh, set,
	                cm);
	/* a standard deviation converts by the unit's scale only */
	if (sd) {
		for (size_t e = 0; e < cells; e++) {
			double m = st->num[j][e], s = st->num[j][cells + e];
			sd[e] = o->kind == PK_NONE
			            ? s
			            : proto_from_internal(&c->units, o->kind,
			                                  m + s) -
			                  proto_from_internal(&c->units,
			                                      o->kind, m);
		}
		proto__w_layout(c, "sd", PK_NONE, 0, (unsigned char *)sd,
		                sizeof(double), 0, sh, set, cm);
		proto_w_note_unit(c, "sd", o->kind);
	}
	for (size_t k = 0; k < st->npct; k++) {
		snprintf(key, sizeof key, "p%g", st->pct[k]);
		proto__w_layout(c, proto_strdup(c, key), o->kind, 0,
		                base + (2 + k) * cells * sizeof(double),
		                sizeof(double), 0, sh, set, cm);
	}
	proto_w_obj_end(c);
}

static void write_result(proto_call *c, unc_run *r, stats *st, const void *args,
                         const unc_args *u)
{
	const proto_method *m = r->m;
	const proto_shape *sh = r->sh;
	size_t n = sh->n;
	int sens = u->sensitivities;

	proto_w_obj_begin(c, NULL);
	for (const proto_output *o = m->outputs; o->name; o++) {
		size_t j;
		if (o->when && !o->when(args))
			continue;
		if (o->type == PO_VEC || o->dim == D_REQ) {
			proto__write_req(c, o, args, sh);
			continue;
		}
		for (j = 0; j < r->n_num && r->num[j] != o; j++)
			;
		if (j < r->n_num) {
			write_stats(c, r, st, j);
			continue;
		}
		for (j = 0; j < r->n_str && r->str[j] != o; j++)
			;
		if (j < r->n_str) {
			proto_w_obj_begin(c, o->name);
			proto_w_obj_begin(c, "probability");
			for (size_t k = 0; k < st->ncat[j]; k++)
				proto__w_layout(
				    c,
				    st->cat[j][k] ? st->cat[j][k] : "undefined",
				    PK_NONE, 0,
				    (unsigned char *)(st->cat_p[j] + k * n),
				    sizeof(double), 0, sh, -1, 0);
			proto_w_obj_end(c);
			proto_w_obj_end(c);
			continue;
		}
		for (j = 0; j < r->n_flg && r->flg[j] != o; j++)
			;
		if (j < r->n_flg) {
			int set = o->dim == D_SAMPLE ? -1 : o->dim - D_CELL;
			int cm = set < 0 ? 0 : m->cells[set].cell_major;
			size_t cells = n * r->cells[r->n_num + j];
			char key[64];
			/* the union: every flag any draw raised */
			proto__w_layout(c, o->name, PK_NONE, 1,
			                (unsigned char *)st->fl_union[j],
			                sizeof(uint64_t), 0, sh, set, cm);
			snprintf(key, sizeof key, "%s_probability", o->name);
			proto_w_obj_begin(c, proto_strdup(c, key));
			for (int b = 0; b < 53; b++) {
				int seen = 0;
				for (size_t e = 0; e < cells; e++)
					seen |= (st->fl_union[j][e] >> b) & 1u;
				if (seen)
					proto__w_layout(
					    c, flag_name(b), PK_NONE, 0,
					    (unsigned char *)(st->fl_p[j] +
					                      (size_t)b *
					                          cells),
					    sizeof(double), 0, sh, set, cm);
			}
			proto_w_obj_end(c);
		}
	}
	proto_w_obj_begin(c, "uncertainty");
	proto_w_int(c, "draws", (long long)r->draws);
	proto_w_int(c, "seed", (long long)u->seed.v[0]);
	proto_w_str(c, "sampling", sampling_names[u->sampling]);
	proto_w_vec(c, "percentiles", PK_NONE, st->pct, st->npct, 1, 1);
	proto_w_arr_begin(c, "inputs");
	for (size_t k = 0; k < r->w->n; k++)
		proto_w_str(c, NULL, r->w->in[k].path);
	proto_w_arr_end(c);
	{
		double *v = proto_alloc_doubles(c, n);
		for (size_t i = 0; v && i < n; i++)
			v[i] = (double)st->valid[i];
		if (v)
			proto_w_vec(c, "valid_draws", PK_NONE, v, n, 1,
			            sh->arr);
	}
	proto_w_obj_end(c);
	if (sens) {
		proto_w_obj_begin(c, "sensitivity");
		for (size_t j = 0; j < r->n_num; j++) {
			const proto_output *o = r->num[j];
			size_t cells = n * r->cells[j], nk = r->w->n;
			int set = o->dim == D_SAMPLE ? -1 : o->dim - D_CELL;
			int cm = set < 0 ? 0 : m->cells[set].cell_major;
			double *share;
			if (!st->sens[j])
				continue;
			share = proto_alloc_doubles(c, cells * nk);
			proto_w_obj_begin(c, o->name);
			for (size_t e = 0; share && e < cells; e++) {
				double tot = 0;
				for (size_t k = 0; k < nk; k++) {
					double x = st->sens[j][k * cells + e];
					tot += isfinite(x) ? x * x : 0;
				}
				for (size_t k = 0; k < nk; k++) {
					double x = st->sens[j][k * cells + e];
					share[k * cells + e] =
					    tot > 0 && isfinite(x) ? x * x / tot
					                           : NAN;
				}
			}
			for (size_t k = 0; k < nk; k++) {
				proto_w_obj_begin(c, r->w->in[k].path);
				proto__w_layout(
				    c, "rank_correlation", PK_NONE, 0,
				    (unsigned char *)(st->sens[j] + k * cells),
				    sizeof(double), 0, sh, set, cm);
				if (share)
					proto__w_layout(
					    c, "share", PK_NONE, 0,
					    (unsigned char *)(share +
					                      k * cells),
					    sizeof(double), 0, sh, set, cm);
				proto_w_obj_end(c);
			}
			proto_w_obj_end(c);
		}
		proto_w_obj_end(c);
	}
	if (u->raw) {
		proto_w_obj_begin(c, "draws");
		for (size_t j = 0; j < r->n_num; j++) {
			size_t nc = r->cells[j];
			proto_w_arr_begin(c, r->num[j]->name);
			for (size_t e = 0; e < n * nc; e++)
				proto_w_vec(c, NULL, r->num[j]->kind,
				            r->num_v[j] + e * r->draws,
				            r->draws, 1, 1);
			proto_w_arr_end(c);
		}
		proto_w_obj_end(c);
	}
	proto__write_tail(c);
}

/* ---- the method --------------------------------------------------------- */

int proto__run_uncertain(proto_call *c, void *args, const proto_shape *sh)
{
	const proto_method *m = c->method;
	const cJSON *uj = c->p_unc;
	unc_args u;
	walk *w = proto_alloc(c, sizeof *w);
	unc_run r;
	stats st;
	double l[MAX_INPUTS * MAX_INPUTS];
	int kc;
	size_t n = sh->n, nd, store = 0, ncell = 1 + sh->m[0] + sh->m[1];
	const proto_output *o;

	if (!w)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	if (proto_decl_parse(c, &proto_uncertainty_decl, uj, "uncertainty.",
	                     &u))
		return -1;
	w->n = 0;
	w->too_many = w->nested_list = 0;
	walk_decl(w, m->params, args, 0, SIZE_MAX, 0, 0);
	if (w->too_many)
		return proto_fail(c, PROTO_INVALID_PARAMS, "uncertainty",
		                  "more than %d inputs are distributions",
		                  MAX_INPUTS);
	if (w->nested_list)
		return proto_fail(c, PROTO_INVALID_PARAMS, "uncertainty",
		                  "distributions inside nested lists are not "
		                  "supported");
	if (!w->n)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "uncertainty",
		    "no input is given as a distribution (e.g. "
		    "\"porosity\": {\"dist\": \"normal\", \"mean\": "
		    "0.25, \"sd\": 0.02})");
	memset(&r, 0, sizeof r);
	memset(&st, 0, sizeof st);
	r.c = c;
	r.m = m;
	r.sh = sh;
	r.w = w;
	r.draws = nd = (size_t)u.draws.v[0];
	if (n && nd > SIZE_MAX / n / ncell)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "draws x samples overflows");
	if (proto_check_size(c, n, nd * n * ncell))
		return -1;
	kc = correlations(c, &r, &u.correlations, l);
	if (kc < 0)
		return -1;
	/* percentiles */
	if (u.percentiles.present) {
		if (u.percentiles.n > MAX_PCT)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "uncertainty.percentiles",
			                  "at most %d percentiles", MAX_PCT);
		st.npct = u.percentiles.n;
		for (size_t k = 0; k < st.npct; k++)
			st.pct[k] = u.percentiles.v[k];
	} else {
		st.npct = 3;
		st.pct[0] = 10, st.pct[1] = 50, st.pct[2] = 90;
	}
	/* the outputs to keep: numbers, categories and flags selected */
	r.num = proto_alloc(c, 64 * sizeof *r.num);
	r.str = proto_alloc(c, 8 * sizeof *r.str);
	r.flg = proto_alloc(c, 8 * sizeof *r.flg);
	r.cells = proto_alloc(c, (64 + 8) * sizeof *r.cells);
	if (!r.num || !r.str || !r.flg || !r.cells)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (o = m->outputs; o->name; o++) {
		size_t nc;
		if (o->dim == D_REQ || o->type == PO_VEC ||
		    (o->when && !o->when(args)))
			continue;
		nc = o->dim == D_SAMPLE ? 1 : sh->m[o->dim - D_CELL];
		if (o->type == PO_NUM && proto_w_selected(c, o->name) &&
		    r.n_num < 64) {
			r.cells[r.n_num] = nc;
			r.num[r.n_num++] = o;
			store += nc;
		} else if (o->type == PO_STR && o->dim == D_SAMPLE &&
		           r.n_str < 8 && proto_w_selected(c, o->name)) {
			r.str[r.n_str++] = o;
			store += 1;
		}
	}
	for (o = m->outputs; o->name; o++)
		if (o->type == PO_FLAGS && o->dim != D_REQ && r.n_flg < 8 &&
		    (!o->when || o->when(args))) {
			r.cells[r.n_num + r.n_flg] =
			    o->dim == D_SAMPLE ? 1 : sh->m[o->dim - D_CELL];
			store += r.cells[r.n_num + r.n_flg];
			r.flg[r.n_flg++] = o;
		}
	if (store && (n * nd > STORE_MAX / store))
		return proto_fail(
		    c, PROTO_LIMIT_EXCEEDED, "uncertainty.draws",
		    "%zu draws x %zu samples x %zu outputs is more "
		    "than one request may hold (%zu numbers): use "
		    "fewer draws, `fields`, or split the request",
		    nd, n, store, STORE_MAX);
	r.num_v = proto_alloc(c, (r.n_num + 1) * sizeof *r.num_v);
	r.str_v = proto_alloc(c, (r.n_str + 1) * sizeof *r.str_v);
	r.flg_v = proto_alloc(c, (r.n_flg + 1) * sizeof *r.flg_v);
	r.dargs = proto_alloc(c, nd * sizeof *r.dargs);
	r.invalid = proto_alloc(c, nd * (n ? n : 1));
	if (!r.num_v || !r.str_v || !r.flg_v || !r.dargs || !r.invalid)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	memset(r.invalid, 0, nd * (n ? n : 1));
	for (size_t j = 0; j < r.n_num; j++)
		if (!(r.num_v[j] = proto_alloc_doubles(c, nd * n * r.cells[j])))
			return proto_fail(
			    c, PROTO_INTERNAL_ERROR, NULL,
			    "out of memory for the draws' outputs");
	for (size_t j = 0; j < r.n_str; j++)
		if (!(r.str_v[j] = proto_alloc(c, nd * n * sizeof(char *))))
			return proto_fail(
			    c, PROTO_INTERNAL_ERROR, NULL,
			    "out of memory for the draws' outputs");
	for (size_t j = 0; j < r.n_flg; j++)
		if (!(r.flg_v[j] = proto_alloc(
		          c, nd * n * r.cells[r.n_num + j] * sizeof(uint64_t))))
			return proto_fail(
			    c, PROTO_INTERNAL_ERROR, NULL,
			    "out of memory for the draws' outputs");
	if (make_draws(c, &r, &u, l, (size_t)kc) || prepare_draws(&r, args))
		return -1;
	if (r.refused == nd)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  r.why_param[0] ? r.why_param : "uncertainty",
		                  "no draw passes the method's checks (%zu "
		                  "tried); the first: %s",
		                  nd, r.why_reason);
	{
		chunk_arg ca = {&r, 1};
		size_t nchunks = nd < 64 ? nd : 64;
		ca.per = (nd + nchunks - 1) / nchunks;
		nchunks = (nd + ca.per - 1) / ca.per;
		proto__parallel(c->ctx, nchunks, run_draws, &ca);
	}
	if (r.failed)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory running the draws");
	/* statistics */
	st.valid = proto_alloc(c, (n ? n : 1) * sizeof *st.valid);
	st.num = proto_alloc(c, (r.n_num + 1) * sizeof *st.num);
	st.sens = proto_alloc(c, (r.n_num + 1) * sizeof *st.sens);
	if (!st.valid || !st.num || !st.sens)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < n; i++) {
		st.valid[i] = 0;
		for (size_t d = 0; d < nd; d++)
			st.valid[i] += r.dargs[d] && !r.invalid[d * n + i];
	}
	for (size_t j = 0; j < r.n_num; j++) {
		st.num[j] =
		    proto_alloc_doubles(c, (2 + st.npct) * n * r.cells[j]);
		st.sens[j] =
		    u.sensitivities
		        ? proto_alloc_doubles(c, w->n * n * r.cells[j] + 1)
		        : NULL;
		if (!st.num[j] || (u.sensitivities && !st.sens[j]))
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
	}
	for (size_t j = 0; j < r.n_str; j++) {
		st.cat[j] = proto_alloc(c, 16 * sizeof(char *));
		if (!st.cat[j])
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		for (size_t e = 0; e < nd * n; e++) {
			const char *v = r.str_v[j][e];
			size_t k;
			if (v == excluded)
				continue;
			for (k = 0; k < st.ncat[j]; k++)
				if (st.cat[j][k] == v ||
				    (v && st.cat[j][k] &&
				     strcmp(st.cat[j][k], v) == 0))
					break;
			if (k == st.ncat[j] && k < 16)
				st.cat[j][st.ncat[j]++] = v;
		}
		st.cat_p[j] = proto_alloc_doubles(c, (st.ncat[j] + 1) * n);
		if (!st.cat_p[j])
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
	}
	for (size_t j = 0; j < r.n_flg; j++) {
		size_t cells = n * r.cells[r.n_num + j];
		st.fl_union[j] = proto_alloc(c, (cells + 1) * sizeof(uint64_t));
		st.fl_p[j] = proto_alloc_doubles(c, 53 * cells + 1);
		if (!st.fl_union[j] || !st.fl_p[j])
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
	}
	for (size_t k = 0; u.sensitivities && k < w->n; k++) {
		uint64_t *kw;
		if (w->in[k].len != 1)
			continue;
		st.in_perm[k] = proto_alloc(c, (nd + 1) * sizeof(size_t));
		st.in_rank[k] = proto_alloc_doubles(c, nd + 1);
		kw = malloc(3 * nd * sizeof *kw);
		if (!st.in_perm[k] || !st.in_rank[k] || !kw) {
			free(kw);
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		}
		if (rw_unc_argsort(w->in[k].draws, 1, nd, st.in_perm[k], kw) ==
		    RW_OK) {
			rw_unc_ranks_sorted(w->in[k].draws, 1, st.in_perm[k],
			                    nd, NULL, st.in_rank[k]);
			st.in_ties[k] = rw_unc_sorted_has_ties(
			    w->in[k].draws, 1, st.in_perm[k], nd);
		} else
			st.in_rank[k] = NULL, st.in_perm[k] = NULL;
		free(kw);
	}
	{
		stat_arg sa = {&r, &st};
		proto__parallel(c->ctx, n, stat_sample, &sa);
	}
	if (r.failed)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the statistics");
	if (r.refused)
		proto_warn(
		    c, "uncertainty",
		    "%zu of %zu draws were refused by the method's checks "
		    "and not used (the first: %s)",
		    r.refused, nd, r.why);
	{
		size_t low = 0;
		for (size_t i = 0; i < n; i++)
			low += st.valid[i] < nd;
		if (low && low > 0)
			proto_warn(
			    c, "uncertainty",
			    "draws outside a parameter's valid range were "
			    "left out at %zu sample(s); valid_draws gives "
			    "the count used at each",
			    low);
	}
	if (u.sensitivities && u.correlations.inputs)
		proto_warn(c, "uncertainty.sensitivities",
		           "inputs are correlated: the rank correlation of "
		           "each includes the effect of its partners, so the "
		           "shares of correlated inputs overlap");
	write_result(c, &r, &st, args, &u);
	return 0;
}
