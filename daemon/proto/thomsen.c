/* The elastic family, continued: elastic.thomsen, Thomsen 1986 weak-
 * anisotropy parameters of a VTI medium from its five stiffnesses and
 * density, or the stiffnesses from vp0, vs0, epsilon, delta, gamma and
 * density. The physics is in daemon/core/aniso.c (rockwire/aniso.h). */
#include <math.h>
#include <string.h>

#include "proto/internal.h"
#include "rockwire/aniso.h"
#include "rockwire/status.h"

#define N(name, kind)                                                          \
	{                                                                      \
		name, PT_NUMS, kind, PP_NULLS, 0                               \
	}

static const proto_param thomsen_params[] = {
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    N("c11", PK_MODULUS),
    N("c13", PK_MODULUS),
    N("c33", PK_MODULUS),
    N("c44", PK_MODULUS),
    N("c66", PK_MODULUS),
    N("vp0", PK_VELOCITY),
    N("vs0", PK_VELOCITY),
    N("epsilon", PK_NONE),
    N("delta", PK_NONE),
    N("gamma", PK_NONE),
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const char *const stiff_names[5] = {"c11", "c13", "c33", "c44", "c66"};
static const char *const thom_names[5] = {"vp0", "vs0", "epsilon", "delta",
                                          "gamma"};

/* Counts the members of a set that are present; *first_missing and
 * *first_present name them (NULL when none). */
static int count_set(const proto_args *a, const char *const names[5],
                     const char **first_missing, const char **first_present)
{
	int n = 0;

	*first_missing = *first_present = NULL;
	for (int i = 0; i < 5; i++) {
		if (proto_vec_of(a, names[i])->present) {
			n++;
			if (!*first_present)
				*first_present = names[i];
		} else if (!*first_missing) {
			*first_missing = names[i];
		}
	}
	return n;
}

/* One output row: the stiffnesses and the Thomsen set, both in SI. */
typedef struct row {
	double c11, c13, c33, c44, c66, vp0, vs0, rho, eps, delta, gamma;
} row;

static int thomsen(proto_call *c)
{
	const proto_args *a = &c->args;
	const char *sm, *sp, *tm, *tp;
	int ns = count_set(a, stiff_names, &sm, &sp);
	int nt = count_set(a, thom_names, &tm, &tp);
	int forward = ns > 0;
	size_t n = a->n[0];
	int arr = a->any_array[0];
	const proto_vec *v[5], *rho = proto_vec_of(a, "rho");
	row *res;
	uint32_t *qc;

	if (ns && nt)
		return proto_fail(c, PROTO_INVALID_PARAMS, tp,
		                  "give either the stiffnesses (c11, c13, c33, "
		                  "c44, c66) or vp0, vs0, epsilon, delta, "
		                  "gamma, not both (%s was given too)",
		                  sp);
	if (!ns && !nt)
		return proto_fail(c, PROTO_INVALID_PARAMS, "c11",
		                  "give the stiffnesses c11, c13, c33, c44, "
		                  "c66, or vp0, vs0, epsilon, delta, gamma");
	if (forward ? ns < 5 : nt < 5)
		return proto_fail(c, PROTO_INVALID_PARAMS, forward ? sm : tm,
		                  "required with %s: give all five of %s",
		                  forward ? sp : tp,
		                  forward ? "c11, c13, c33, c44, c66"
		                          : "vp0, vs0, epsilon, delta, gamma");
	if (proto_check_size(c, n, n))
		return -1;
	res = proto_alloc(c, n * sizeof *res);
	qc = proto_alloc(c, n * sizeof *qc);
	if (!res || !qc)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);
	for (int k = 0; k < 5; k++)
		v[k] =
		    proto_vec_of(a, forward ? stiff_names[k] : thom_names[k]);
	for (size_t i = 0; i < n; i++) {
		double x[5], r = proto_at(rho, i);
		rw_aniso_vti s;
		rw_aniso_thomsen t;
		int st, finite = isfinite(r);

		for (int k = 0; k < 5; k++) {
			x[k] = proto_at(v[k], i);
			finite = finite && isfinite(x[k]);
		}
		if (forward) {
			s.c11_pa = x[0], s.c13_pa = x[1], s.c33_pa = x[2];
			s.c44_pa = x[3], s.c66_pa = x[4];
			st = rw_aniso_thomsen_from_stiff(&s, r, &t);
			if (st != RW_OK)
				s.c11_pa = s.c13_pa = s.c33_pa = s.c44_pa =
				    s.c66_pa = NAN;
		} else {
			t.vp0_ms = x[0], t.vs0_ms = x[1], t.rho_kgm3 = r;
			t.epsilon = x[2], t.delta = x[3], t.gamma = x[4];
			st = rw_aniso_stiff_from_thomsen(&t, &s);
			if (st != RW_OK)
				t.vp0_ms = t.vs0_ms = t.rho_kgm3 = t.epsilon =
				    t.delta = t.gamma = NAN;
		}
		if (st == RW_OK)
			qc[i] = 2.0 * t.vs0_ms * t.vs0_ms > t.vp0_ms * t.vp0_ms
			            ? QC_NU_NEGATIVE
			            : 0;
		else if (!finite)
			qc[i] = QC_INPUT_INVALID;
		else if (!(r > 0))
			qc[i] = QC_RHO_NONPOSITIVE;
		else
			qc[i] = QC_ANISO_UNSTABLE;
		res[i] =
		    (row){s.c11_pa,  s.c13_pa, s.c33_pa, s.c44_pa,
		          s.c66_pa,  t.vp0_ms, t.vs0_ms, st == RW_OK ? r : NAN,
		          t.epsilon, t.delta,  t.gamma};
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	{
		static const struct {
			const char *name;
			proto_kind kind;
			size_t off;
		} cols[11] = {
		    {"c11", PK_MODULUS, offsetof(row, c11)},
		    {"c13", PK_MODULUS, offsetof(row, c13)},
		    {"c33", PK_MODULUS, offsetof(row, c33)},
		    {"c44", PK_MODULUS, offsetof(row, c44)},
		    {"c66", PK_MODULUS, offsetof(row, c66)},
		    {"vp0", PK_VELOCITY, offsetof(row, vp0)},
		    {"vs0", PK_VELOCITY, offsetof(row, vs0)},
		    {"rho", PK_DENSITY, offsetof(row, rho)},
		    {"epsilon", PK_NONE, offsetof(row, eps)},
		    {"delta", PK_NONE, offsetof(row, delta)},
		    {"gamma", PK_NONE, offsetof(row, gamma)},
		};
		for (int k = 0; k < 11; k++)
			proto_w_rows(c, cols[k].name, cols[k].kind, res,
			             sizeof *res, cols[k].off, n, arr);
	}
	proto_w_flags(c, "qc", qc, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_thomsen_methods[] = {
    {"elastic.thomsen", thomsen, thomsen_params,
     "Thomsen epsilon, delta, gamma, vp0, vs0 of a VTI medium from its "
     "stiffnesses, or the stiffnesses from them."},
    {NULL, NULL, NULL, NULL},
};
