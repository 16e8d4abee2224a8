/* Writing results shaped by the driver's shape: vectors along the
 * samples, grids over samples and a cell set, request-level outputs, and
 * the closing members of every result. Used by the driver and by the
 * uncertainty runner alike. */
#include <math.h>
#include <string.h>

#include "proto/internal.h"

void proto__w_layout(proto_call *c, const char *key, proto_kind kind, int flags,
                     const unsigned char *base, size_t elem, size_t offset,
                     const proto_shape *sh, int set, int cell_major)
{
	size_t n = sh->n, mm, outer, inner, o_step, i_step;
	int outer_arr, inner_arr;

	if (set < 0) {
		if (flags)
			proto_w_flag_rows(c, key, base, elem, offset, n,
			                  sh->arr);
		else
			proto_w_rows(c, key, kind, base, elem, offset, n,
			             sh->arr);
		return;
	}
	/* [sample][cell] storage: steps in bytes along each dimension */
	mm = sh->m[set];
	outer = cell_major ? mm : n;
	inner = cell_major ? n : mm;
	outer_arr = cell_major ? sh->m_arr[set] : sh->arr;
	inner_arr = cell_major ? sh->arr : sh->m_arr[set];
	o_step = cell_major ? elem : mm * elem;
	i_step = cell_major ? mm * elem : elem;
	if (outer_arr && inner_arr) {
		proto_w_arr_begin(c, key);
		for (size_t a = 0; a < outer; a++) {
			const unsigned char *p = base + a * o_step;
			if (flags)
				proto_w_flag_rows(c, NULL, p, i_step, offset,
				                  inner, 1);
			else
				proto_w_rows(c, NULL, kind, p, i_step, offset,
				             inner, 1);
		}
		proto_w_arr_end(c);
		return;
	}
	/* One dimension has one element: a plain vector along the other. */
	if (outer_arr || !inner_arr) {
		if (flags)
			proto_w_flag_rows(c, key, base, o_step, offset, outer,
			                  outer_arr);
		else
			proto_w_rows(c, key, kind, base, o_step, offset, outer,
			             outer_arr);
	} else {
		if (flags)
			proto_w_flag_rows(c, key, base, i_step, offset, inner,
			                  1);
		else
			proto_w_rows(c, key, kind, base, i_step, offset, inner,
			             1);
	}
}

void proto__write_req(proto_call *c, const proto_output *o, const void *args,
                      const proto_shape *sh)
{
	const unsigned char *at = (const unsigned char *)args + o->offset;

	switch (o->type) {
	case PO_NUM: {
		double v;
		memcpy(&v, at, sizeof v);
		proto_w_num(c, o->name, o->kind, v);
		break;
	}
	case PO_INT: {
		long long v;
		memcpy(&v, at, sizeof v);
		proto_w_int(c, o->name, v);
		break;
	}
	case PO_BOOL: {
		int v;
		memcpy(&v, at, sizeof v);
		proto_w_bool(c, o->name, v);
		break;
	}
	case PO_STR: {
		const char *s;
		memcpy(&s, at, sizeof s);
		if (s)
			proto_w_str(c, o->name, s);
		else
			proto_w_null(c, o->name);
		break;
	}
	case PO_ENUM: {
		int k;
		memcpy(&k, at, sizeof k);
		if (k >= 0)
			proto_w_str(c, o->name, o->choices[k]);
		else
			proto_w_null(c, o->name);
		break;
	}
	case PO_VEC: {
		/* broadcast along the samples, or along a cell set */
		const proto_vec *v = (const proto_vec *)at;
		size_t n = o->dim == D_CELL    ? sh->m[0]
		           : o->dim == D_CELL2 ? sh->m[1]
		                               : sh->n;
		int arr = o->dim == D_CELL    ? sh->m_arr[0]
		          : o->dim == D_CELL2 ? sh->m_arr[1]
		                              : sh->arr;
		proto_w_vec(c, o->name, o->kind, v->v, n, v->n == 1 ? 0 : 1,
		            arr);
		break;
	}
	case PO_CUSTOM: o->write(c, o->name, args); break;
	case PO_COUNT:
		proto_w_int(c, o->name,
		            (long long)(o->offset == 0   ? sh->n
		                        : o->offset == 1 ? sh->m[0]
		                                         : sh->m[1]));
		break;
	case PO_FLAGS: {
		uint64_t f;
		memcpy(&f, at, sizeof f);
		proto_w_flags1(c, o->name, f);
		break;
	}
	}
}

void proto__write_tail(proto_call *c)
{
	if (c->n_warnings) {
		proto_w_arr_begin(c, "warnings");
		for (size_t i = 0; i < c->n_warnings; i++)
			proto_w_str(c, NULL, c->warnings[i]);
		proto_w_arr_end(c);
	}
	proto_w_units(c);
	proto_w_obj_end(c);
}
