/* The reflect family: reflect.interface (exact Zoeppritz coefficients and
 * the published linearisations at one or many interfaces and angles, with
 * intercept, gradient, curvature, AVO class and critical angles),
 * reflect.series (the angle-dependent reflectivity of a blocked log),
 * reflect.impedance (EI, normalised EI and EEI logs) and reflect.vti
 * (Ruger PP reflectivity between two VTI media). The physics is in
 * daemon/core (reflect.h, aniso.h); this file checks parameters, loops over
 * samples and angles, encodes QC flags and writes the results. Layouts are
 * documented in protocol-docs/reflect.md. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "rockwire/aniso.h"
#include "rockwire/reflect.h"
#include "rockwire/status.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

/* ---- shared pieces ------------------------------------------------------ */

/* Approximations by their published names; index 0 is the exact solution.
 * Each entry says which angle its formula is evaluated at
 * (include/rockwire/reflect.h and protocol-docs/reflect.md). */
enum { M_ZOEPPRITZ = 0, M_COUNT = 9 };
static const char *const method_names[] = {
    "zoeppritz", "aki_richards", "shuey2",   "shuey3",       "hilterman",
    "fatti",     "gray_lmr",     "gray_kmr", "smith_gidlow", NULL};
/* Result member of each linearised method ("rpp_" + name). */
static const char *const method_keys[] = {
    NULL,           "rpp_aki_richards", "rpp_shuey2",
    "rpp_shuey3",   "rpp_hilterman",    "rpp_fatti",
    "rpp_gray_lmr", "rpp_gray_kmr",     "rpp_smith_gidlow"};

typedef int (*lin_fn)(const rw_reflect_medium *, const rw_reflect_medium *,
                      double, double *);
static const lin_fn method_fns[] = {
    NULL,
    rw_reflect_aki_richards,
    rw_reflect_shuey2,
    rw_reflect_shuey3,
    rw_reflect_hilterman,
    rw_reflect_fatti,
    rw_reflect_gray_lmr,
    rw_reflect_gray_kmr,
    rw_reflect_smith_gidlow,
};

/* The chosen methods in request order. */
typedef struct method_set {
	int id[M_COUNT];
	int n;
	int exact; /* zoeppritz is among them */
} method_set;

/* Parses `methods`: a method name or an array of distinct names; absent
 * means zoeppritz alone. 0 or -1 after proto_fail. */
static int methods_parse(proto_call *c, const proto_args *a, method_set *ms)
{
	const cJSON *v = proto_item_of(a, "methods");
	const cJSON *e;
	size_t i = 0;

	memset(ms, 0, sizeof *ms);
	if (!v) {
		ms->id[ms->n++] = M_ZOEPPRITZ;
		ms->exact = 1;
		return 0;
	}
	if (cJSON_IsString(v) ||
	    (cJSON_IsArray(v) && cJSON_GetArraySize(v) > 0)) {
		const cJSON *first = cJSON_IsString(v) ? v : v->child;
		for (e = first; e;
		     e = cJSON_IsString(v) ? NULL : e->next, i++) {
			int k;
			if (!cJSON_IsString(e))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "methods",
				    "element %zu must be a method "
				    "name (a string)",
				    i);
			for (k = 0; method_names[k]; k++)
				if (strcmp(method_names[k], e->valuestring) ==
				    0)
					break;
			if (!method_names[k])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "methods",
				    "unknown method '%s'; accepted: zoeppritz, "
				    "aki_richards, shuey2, shuey3, hilterman, "
				    "fatti, gray_lmr, gray_kmr, smith_gidlow",
				    e->valuestring);
			for (int j = 0; j < ms->n; j++)
				if (ms->id[j] == k)
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, "methods",
					    "'%s' is given twice",
					    e->valuestring);
			ms->id[ms->n++] = k;
			if (k == M_ZOEPPRITZ)
				ms->exact = 1;
		}
		return 0;
	}
	return proto_fail(c, PROTO_INVALID_PARAMS, "methods",
	                  "must be a method name or a non-empty array of "
	                  "method names");
}

/* Checks every element of an angle vector against [lo, hi] (radians;
 * hi_open excludes hi). The message quotes the value in the call's unit. */
static int angles_check(proto_call *c, const proto_vec *v, const char *name,
                        double lo, double hi, int hi_open)
{
	for (size_t i = 0; v->present && i < v->n; i++) {
		double x = v->v[i];
		if (x >= lo && (hi_open ? x < hi : x <= hi))
			continue;
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, name,
		    "element %zu: %g %s is outside [%g, %g%s %s", i,
		    proto_from_internal(&c->units, PK_ANGLE, x),
		    proto_unit_name(&c->units, PK_ANGLE),
		    proto_from_internal(&c->units, PK_ANGLE, lo),
		    proto_from_internal(&c->units, PK_ANGLE, hi),
		    hi_open ? ")" : "]", proto_unit_name(&c->units, PK_ANGLE));
	}
	return 0;
}

/* QC bits of one isotropic medium: the impossible ones (outputs null) or
 * the implausible negative Poisson's ratio. Mirrors
 * rw_reflect_medium_check. */
static uint32_t medium_flags(const rw_reflect_medium *m)
{
	uint32_t f = 0;

	if (!isfinite(m->vp_ms) || !isfinite(m->vs_ms) ||
	    !isfinite(m->rho_kgm3))
		return QC_INPUT_INVALID | QC_REFL_MEDIUM;
	if (m->rho_kgm3 <= 0)
		f |= QC_RHO_NONPOSITIVE | QC_REFL_MEDIUM;
	if (m->vp_ms <= 0 || m->vs_ms < 0)
		f |= QC_INPUT_INVALID | QC_REFL_MEDIUM;
	else if (3.0 * m->vp_ms * m->vp_ms <= 4.0 * m->vs_ms * m->vs_ms)
		f |= QC_NU_IMPOSSIBLE | QC_REFL_MEDIUM;
	else if (2.0 * m->vs_ms * m->vs_ms > m->vp_ms * m->vp_ms)
		f |= QC_NU_NEGATIVE; /* nu < 0: vs > vp / sqrt 2 */
	return f;
}

/* Writes a [outer][inner] block of doubles (element (o, i) at
 * data[(o * n_inner + i) * stride]) with each dimension an array only when
 * its input was one. */
static void w_grid(proto_call *c, const char *key, proto_kind k,
                   const double *data, size_t n_outer, size_t n_inner,
                   size_t stride, int outer_arr, int inner_arr)
{
	if (outer_arr && inner_arr) {
		proto_w_arr_begin(c, key);
		for (size_t o = 0; o < n_outer; o++)
			proto_w_vec(c, NULL, k, data + o * n_inner * stride,
			            n_inner, stride, 1);
		proto_w_arr_end(c);
	} else if (outer_arr) {
		proto_w_vec(c, key, k, data, n_outer, n_inner * stride, 1);
	} else {
		proto_w_vec(c, key, k, data, n_inner, stride, inner_arr);
	}
}

static void w_grid_flags(proto_call *c, const char *key, const uint32_t *f,
                         size_t n_outer, size_t n_inner, int outer_arr,
                         int inner_arr)
{
	if (outer_arr && inner_arr) {
		proto_w_arr_begin(c, key);
		for (size_t o = 0; o < n_outer; o++)
			proto_w_flags(c, NULL, f + o * n_inner, n_inner, 1);
		proto_w_arr_end(c);
	} else {
		/* one dimension is 1: the flags are contiguous */
		proto_w_flags(c, key, f, n_outer * n_inner,
		              outer_arr || inner_arr);
	}
}

/* Allocates n doubles or fails the call. */
static double *doubles(proto_call *c, size_t n)
{
	double *d = proto_alloc_doubles(c, n ? n : 1);
	if (!d)
		proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		           "out of memory for %zu values", n);
	return d;
}

static uint32_t *flag_alloc(proto_call *c, size_t n)
{
	uint32_t *f = n < SIZE_MAX / sizeof *f
	                  ? proto_alloc(c, (n ? n : 1) * sizeof *f)
	                  : NULL;
	if (!f)
		proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		           "out of memory for %zu flags", n);
	else
		memset(f, 0, (n ? n : 1) * sizeof *f);
	return f;
}

/* A pair of nested media objects (upper, lower) parsed with one spec;
 * their arrays form one broadcast dimension, the interfaces. */
typedef struct media_pair {
	proto_args up, lo;
	size_t n;
	int arr;
} media_pair;

/* Name of the first array member of a, or NULL. */
static const char *first_array(const proto_args *a)
{
	for (size_t i = 0; i < a->count; i++)
		if (a->vec[i].present && a->vec[i].is_array)
			return a->spec[i].name;
	return NULL;
}

static int media_parse(proto_call *c, const proto_param *spec, media_pair *mp)
{
	const char *fu, *fl;

	if (proto_args_parse(c, proto_item_of(&c->args, "upper"), "upper.",
	                     spec, &mp->up) ||
	    proto_args_parse(c, proto_item_of(&c->args, "lower"), "lower.",
	                     spec, &mp->lo))
		return -1;
	fu = first_array(&mp->up);
	fl = first_array(&mp->lo);
	if (fu && fl && mp->up.n[0] != mp->lo.n[0]) {
		char full[64];
		snprintf(full, sizeof full, "lower.%s", fl);
		return proto_fail(c, PROTO_INVALID_PARAMS, full,
		                  "array length %zu does not match length %zu "
		                  "of 'upper.%s'",
		                  mp->lo.n[0], mp->up.n[0], fu);
	}
	mp->arr = fu || fl;
	mp->n = fu ? mp->up.n[0] : mp->lo.n[0];
	return 0;
}

static rw_reflect_medium medium_at(const proto_args *a, size_t i)
{
	rw_reflect_medium m;

	m.vp_ms = proto_at(proto_vec_of(a, "vp"), i);
	m.vs_ms = proto_at(proto_vec_of(a, "vs"), i);
	m.rho_kgm3 = proto_at(proto_vec_of(a, "rho"), i);
	return m;
}

/* Per-angle evaluation of the chosen methods at one interface. Writes
 * exact coefficients (16 doubles: re, im, abs, phase of rpp, rps, tpp,
 * tps) to zz when non-NULL, linearised values to lin[j] for method slot j
 * of ms, and returns the QC bits of this (interface, angle) sample.
 * medium_bad: the interface has an impossible medium (everything null).
 * crit_p, crit_s: critical angles (HUGE_VAL for none). */
static uint32_t eval_angle(const rw_reflect_medium *u,
                           const rw_reflect_medium *l, double theta,
                           double crit_p, double crit_s, const method_set *ms,
                           double *zz, double *lin, int medium_bad)
{
	uint32_t f = 0;
	int post = theta >= crit_p;

	if (zz)
		for (int k = 0; k < 16; k++)
			zz[k] = NAN;
	for (int j = 0; j < ms->n; j++)
		lin[j] = NAN;
	if (medium_bad)
		return 0;
	/* the S critical angle, when there is one, lies above the P one
	 * (vs_lower < vp_lower), so one flag covers both */
	(void)crit_s;
	if (post)
		f |= QC_REFL_POSTCRITICAL;
	for (int j = 0; j < ms->n; j++) {
		int id = ms->id[j];
		if (id == M_ZOEPPRITZ) {
			rw_reflect_pcoefs pc;
			const rw_reflect_cplx *z[4] = {&pc.rpp, &pc.rps,
			                               &pc.tpp, &pc.tps};
			if (rw_reflect_zoeppritz(u, l, theta, &pc) != RW_OK) {
				f |= QC_REFL_UNDEFINED;
				continue;
			}
			for (int k = 0; zz && k < 4; k++) {
				double re = z[k]->re, im = z[k]->im;
				/* -0 and +0 are one value: a real negative
				 * coefficient has phase +180 deg, a zero one
				 * (rps, tps at normal incidence) phase 0 */
				if (im == 0)
					im = 0.0;
				if (re == 0)
					re = 0.0;
				zz[4 * k] = re;
				zz[4 * k + 1] = im;
				zz[4 * k + 2] = hypot(re, im);
				zz[4 * k + 3] = atan2(im, re);
			}
			lin[j] = pc.rpp.re;
			continue;
		}
		if (post)
			continue; /* not valid past the P critical angle */
		if (method_fns[id](u, l, theta, &lin[j]) != RW_OK) {
			lin[j] = NAN;
			f |= QC_REFL_UNDEFINED;
		}
	}
	return f;
}

static const proto_param iso_medium_spec[] = {
    {"vp", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"vs", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param class_spec[] = {
    {"a_small", PT_NUM, PK_NONE, 0, 0},
    {"theta_max", PT_NUM, PK_ANGLE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* The angle vector of a call, with 0 as the default. */
static const proto_vec *angle_vec(const proto_args *a)
{
	static const double zero = 0.0;
	static const proto_vec dflt = {&zero, 1, 1, 0};
	const proto_vec *v = proto_vec_of(a, "angle");
	return v->present ? v : &dflt;
}

/* ---- reflect.interface -------------------------------------------------- */

static const proto_param interface_params[] = {
    {"upper", PT_OBJ, PK_NONE, PP_REQUIRED, 0},
    {"lower", PT_OBJ, PK_NONE, PP_REQUIRED, 0},
    {"angle", PT_NUMS, PK_ANGLE, 0, 1},
    {"methods", PT_ANY, PK_NONE, 0, 0},
    {"class", PT_OBJ, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const char *const zz_keys[16] = {
    "rpp_re",  "rpp_im",    "rpp_abs", "rpp_phase", "rps_re",  "rps_im",
    "rps_abs", "rps_phase", "tpp_re",  "tpp_im",    "tpp_abs", "tpp_phase",
    "tps_re",  "tps_im",    "tps_abs", "tps_phase"};

/* Class thresholds from the `class` object. 0 or -1. */
static int class_parse(proto_call *c, rw_avo_class_params *cp)
{
	proto_args a;

	*cp = rw_reflect_avo_defaults();
	if (proto_args_parse(c, proto_item_of(&c->args, "class"), "class.",
	                     class_spec, &a))
		return -1;
	cp->a_small = proto_num_or(&a, "a_small", cp->a_small);
	cp->theta_max_rad = proto_num_or(&a, "theta_max", cp->theta_max_rad);
	if (!(cp->a_small >= 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "class.a_small",
		                  "must be >= 0 (a band of intercepts around "
		                  "zero)");
	if (!(cp->theta_max_rad > 0 && cp->theta_max_rad < M_PI_2))
		return proto_fail(c, PROTO_INVALID_PARAMS, "class.theta_max",
		                  "must lie in (0, 90) deg");
	return 0;
}

static int interface(proto_call *c)
{
	media_pair mp;
	method_set ms;
	rw_avo_class_params cp;
	const proto_vec *ang;
	size_t ni, na, nn;
	int ang_arr;
	double *zz = NULL, *lin, *abc, *crit;
	uint32_t *qc, *qci;
	const char **cls;

	if (media_parse(c, iso_medium_spec, &mp) ||
	    methods_parse(c, &c->args, &ms) || class_parse(c, &cp))
		return -1;
	ang = angle_vec(&c->args);
	if (angles_check(c, ang, "angle", 0, M_PI_2, 0))
		return -1;
	ni = mp.n;
	na = ang->n;
	ang_arr = ang->is_array;
	if (na && ni > SIZE_MAX / na)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "interfaces x angles overflows");
	nn = ni * na;
	if (proto_check_size(c, ni, nn))
		return -1;
	if (ms.exact && nn > SIZE_MAX / 16)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "interfaces x angles overflows");
	if ((ms.exact && !(zz = doubles(c, 16 * nn))) ||
	    !(lin = doubles(c, (size_t)ms.n * nn)) ||
	    !(abc = doubles(c, 3 * ni)) || !(crit = doubles(c, 2 * ni)) ||
	    !(qc = flag_alloc(c, nn)) || !(qci = flag_alloc(c, ni)) ||
	    !(cls = proto_alloc(c, ni * sizeof *cls + 1)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < ni; i++) {
		rw_reflect_medium u = medium_at(&mp.up, i);
		rw_reflect_medium l = medium_at(&mp.lo, i);
		uint32_t fm = medium_flags(&u) | medium_flags(&l);
		int bad = (fm & QC_REFL_MEDIUM) != 0;
		double cpp = NAN, csp = NAN;
		double tmp[M_COUNT];
		rw_avo_class k = RW_AVO_NONE;

		cls[i] = NULL;
		abc[3 * i] = abc[3 * i + 1] = abc[3 * i + 2] = NAN;
		qci[i] = fm;
		if (!bad) {
			rw_reflect_critical_angles(&u, &l, &cpp, &csp);
			rw_reflect_shuey_terms(&u, &l, &abc[3 * i],
			                       &abc[3 * i + 1],
			                       &abc[3 * i + 2]);
			if (rw_reflect_avo_classify(abc[3 * i], abc[3 * i + 1],
			                            &cp, &k) == RW_OK)
				cls[i] = rw_reflect_avo_class_name(k);
			if (isinf(cpp))
				qci[i] |= QC_REFL_NO_CRIT_P;
			if (isinf(csp))
				qci[i] |= QC_REFL_NO_CRIT_S;
		}
		crit[2 * i] = cpp;
		crit[2 * i + 1] = csp;
		for (size_t j = 0; j < na; j++) {
			size_t s = i * na + j;
			qc[s] = fm | eval_angle(
			                 &u, &l, proto_at(ang, j),
			                 bad ? NAN : cpp, bad ? NAN : csp, &ms,
			                 zz ? zz + 16 * s : NULL, tmp, bad);
			for (int m = 0; m < ms.n; m++)
				lin[(size_t)m * nn + s] = tmp[m];
		}
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n_interfaces", (long long)ni);
	proto_w_int(c, "n_angles", (long long)na);
	proto_w_vec(c, "angle", PK_ANGLE, ang->v, na, 1, ang_arr);
	for (int m = 0; m < ms.n; m++) {
		if (ms.id[m] == M_ZOEPPRITZ) {
			for (int k = 0; k < 16; k++)
				w_grid(c, zz_keys[k],
				       (k & 3) == 3 ? PK_ANGLE : PK_NONE,
				       zz + k, ni, na, 16, mp.arr, ang_arr);
			continue;
		}
		w_grid(c, method_keys[ms.id[m]], PK_NONE, lin + (size_t)m * nn,
		       ni, na, 1, mp.arr, ang_arr);
	}
	w_grid_flags(c, "qc", qc, ni, na, mp.arr, ang_arr);
	proto_w_vec(c, "intercept", PK_NONE, abc, ni, 3, mp.arr);
	proto_w_vec(c, "gradient", PK_NONE, abc + 1, ni, 3, mp.arr);
	proto_w_vec(c, "curvature", PK_NONE, abc + 2, ni, 3, mp.arr);
	if (mp.arr)
		proto_w_arr_begin(c, "class");
	for (size_t i = 0; i < ni; i++) {
		const char *key = mp.arr ? NULL : "class";
		if (cls[i])
			proto_w_str(c, key, cls[i]);
		else
			proto_w_null(c, key);
	}
	if (mp.arr)
		proto_w_arr_end(c);
	proto_w_num(c, "class_a_small", PK_NONE, cp.a_small);
	proto_w_num(c, "class_theta_max", PK_ANGLE, cp.theta_max_rad);
	proto_w_vec(c, "critical_p", PK_ANGLE, crit, ni, 2, mp.arr);
	proto_w_vec(c, "critical_s", PK_ANGLE, crit + 1, ni, 2, mp.arr);
	proto_w_flags(c, "qc_interface", qci, ni, mp.arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

/* ---- reflect.series ----------------------------------------------------- */

static const proto_param series_params[] = {
    {"vp", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"vs", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    {"depth", PT_NUMS, PK_LENGTH, 0, 0},
    {"time", PT_NUMS, PK_NONE, 0, 0},
    {"position", PT_STR, PK_NONE, 0, 0},
    {"angle", PT_NUMS, PK_ANGLE, 0, 1},
    {"methods", PT_ANY, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* Checks that a position log is an array of the log's length, strictly
 * increasing, and writes the interface positions to out (n - 1 values):
 * halfway between samples, or the top of the lower layer. */
static int positions(proto_call *c, const char *name, int layer_top, size_t n,
                     double *out)
{
	const proto_vec *z = proto_vec_of(&c->args, name);

	if (!z->present)
		return 0;
	if (!z->is_array)
		return proto_fail(c, PROTO_INVALID_PARAMS, name,
		                  "must be an array with one value per "
		                  "sample of the log");
	for (size_t i = 1; i < n; i++) {
		if (!(z->v[i] > z->v[i - 1]))
			return proto_fail(c, PROTO_INVALID_PARAMS, name,
			                  "element %zu is not greater than "
			                  "element %zu: the log must be "
			                  "ordered downwards, strictly "
			                  "increasing",
			                  i, i - 1);
		out[i - 1] =
		    layer_top ? z->v[i] : 0.5 * (z->v[i - 1] + z->v[i]);
	}
	return 0;
}

static int series(proto_call *c)
{
	static const char *const pos_names[] = {"midpoint", "layer_top", NULL};
	const proto_args *a = &c->args;
	method_set ms;
	const proto_vec *ang;
	size_t n = a->n[0], ni, na, nn;
	int pos, ang_arr;
	double *zz = NULL, *lin, *ab, *zdep, *ztim;
	uint32_t *qc, *qci;
	const proto_vec *vp = proto_vec_of(a, "vp");
	const proto_vec *vs = proto_vec_of(a, "vs");
	const proto_vec *rho = proto_vec_of(a, "rho");

	if (!a->any_array[0] || n < 2)
		return proto_fail(c, PROTO_INVALID_PARAMS, "vp",
		                  "a series needs arrays of at least 2 samples "
		                  "(one interface); use reflect.interface for "
		                  "single interfaces");
	if ((pos = proto_enum_of(c, a, "position", pos_names, 0)) < 0 ||
	    methods_parse(c, a, &ms))
		return -1;
	ang = angle_vec(a);
	if (angles_check(c, ang, "angle", 0, M_PI_2, 0))
		return -1;
	ni = n - 1;
	na = ang->n;
	ang_arr = ang->is_array;
	if (ni > SIZE_MAX / 16 / na)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "interfaces x angles overflows");
	nn = ni * na;
	if (proto_check_size(c, n, nn))
		return -1;
	if ((ms.exact && !(zz = doubles(c, 16 * nn))) ||
	    !(lin = doubles(c, (size_t)ms.n * nn)) ||
	    !(ab = doubles(c, 2 * ni)) || !(zdep = doubles(c, ni)) ||
	    !(ztim = doubles(c, ni)) || !(qc = flag_alloc(c, nn)) ||
	    !(qci = flag_alloc(c, ni)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	if (positions(c, "depth", pos, n, zdep) ||
	    positions(c, "time", pos, n, ztim))
		return -1;
	for (size_t i = 0; i < ni; i++) {
		rw_reflect_medium u = {proto_at(vp, i), proto_at(vs, i),
		                       proto_at(rho, i)};
		rw_reflect_medium l = {proto_at(vp, i + 1), proto_at(vs, i + 1),
		                       proto_at(rho, i + 1)};
		uint32_t fm = medium_flags(&u) | medium_flags(&l);
		int bad = (fm & QC_REFL_MEDIUM) != 0;
		double cpp = NAN, csp = NAN, tmp[M_COUNT], zt[16];

		qci[i] = fm;
		ab[2 * i] = ab[2 * i + 1] = NAN;
		if (!bad) {
			rw_reflect_critical_angles(&u, &l, &cpp, &csp);
			rw_reflect_shuey_terms(&u, &l, &ab[2 * i],
			                       &ab[2 * i + 1], NULL);
		}
		for (size_t j = 0; j < na; j++) {
			/* layout [angle][interface]: one log per angle */
			size_t s = j * ni + i;
			qc[s] = fm | eval_angle(&u, &l, proto_at(ang, j), cpp,
			                        csp, &ms, zt, tmp, bad);
			if (zz) {
				zz[2 * s] = zt[0];
				zz[2 * s + 1] = zt[1];
			}
			for (int m = 0; m < ms.n; m++)
				lin[(size_t)m * nn + s] = tmp[m];
		}
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n_interfaces", (long long)ni);
	proto_w_int(c, "n_angles", (long long)na);
	proto_w_vec(c, "angle", PK_ANGLE, ang->v, na, 1, ang_arr);
	if (proto_vec_of(a, "depth")->present)
		proto_w_vec(c, "depth", PK_LENGTH, zdep, ni, 1, 1);
	if (proto_vec_of(a, "time")->present)
		proto_w_vec(c, "time", PK_NONE, ztim, ni, 1, 1);
	for (int m = 0; m < ms.n; m++) {
		if (ms.id[m] == M_ZOEPPRITZ) {
			w_grid(c, "rpp_re", PK_NONE, zz, na, ni, 2, ang_arr, 1);
			w_grid(c, "rpp_im", PK_NONE, zz + 1, na, ni, 2, ang_arr,
			       1);
			continue;
		}
		w_grid(c, method_keys[ms.id[m]], PK_NONE, lin + (size_t)m * nn,
		       na, ni, 1, ang_arr, 1);
	}
	w_grid_flags(c, "qc", qc, na, ni, ang_arr, 1);
	proto_w_vec(c, "intercept", PK_NONE, ab, ni, 2, 1);
	proto_w_vec(c, "gradient", PK_NONE, ab + 1, ni, 2, 1);
	proto_w_flags(c, "qc_interface", qci, ni, 1);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

/* ---- reflect.impedance -------------------------------------------------- */

static const proto_param impedance_params[] = {
    {"vp", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"vs", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    {"angle", PT_NUMS, PK_ANGLE, 0, 1},
    {"chi", PT_NUMS, PK_ANGLE, 0, 2},
    {"k", PT_ANY, PK_NONE, 0, 0},
    {"ref", PT_OBJ, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param ref_spec[] = {
    {"vp", PT_NUM, PK_VELOCITY, 0, 0},
    {"vs", PT_NUM, PK_VELOCITY, 0, 0},
    {"rho", PT_NUM, PK_DENSITY, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static int impedance(proto_call *c)
{
	const proto_args *a = &c->args;
	const proto_vec *vp = proto_vec_of(a, "vp");
	const proto_vec *vs = proto_vec_of(a, "vs");
	const proto_vec *rho = proto_vec_of(a, "rho");
	const proto_vec *ang = proto_vec_of(a, "angle");
	const proto_vec *chi = proto_vec_of(a, "chi");
	const cJSON *kj = proto_item_of(a, "k");
	size_t n = a->n[0], na = ang->present ? ang->n : 0;
	size_t nc = chi->present ? chi->n : 0, nv = 0;
	int arr = a->any_array[0], k_sample = 0, k_given = 0;
	double k = 0, sum[4] = {0, 0, 0, 0};
	rw_reflect_medium ref;
	proto_args ra;
	double *ei, *ein, *eei;
	uint32_t *qc;

	if (!ang->present && !chi->present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "angle",
		                  "give angle (for EI), chi (for EEI) or both");
	if (angles_check(c, ang, "angle", 0, M_PI_2, 1) ||
	    angles_check(c, chi, "chi", -M_PI_2, M_PI_2, 0))
		return -1;
	if (kj) {
		if (cJSON_IsString(kj) &&
		    strcmp(kj->valuestring, "sample") == 0)
			k_sample = 1;
		else if (cJSON_IsNumber(kj) && kj->valuedouble >= 0 &&
		         kj->valuedouble < 0.75)
			k = kj->valuedouble, k_given = 1;
		else
			return proto_fail(c, PROTO_INVALID_PARAMS, "k",
			                  "must be a number in [0, 0.75) (K = "
			                  "(vs/vp)^2) or \"sample\"");
	}
	if (proto_args_parse(c, proto_item_of(a, "ref"), "ref.", ref_spec, &ra))
		return -1;
	if (proto_check_size(c, n, n * (na + nc ? na + nc : 1)))
		return -1;
	if (!(ei = doubles(c, n * (na ? na : 1))) ||
	    !(ein = doubles(c, n * (na ? na : 1))) ||
	    !(eei = doubles(c, n * (nc ? nc : 1))) || !(qc = flag_alloc(c, n)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	/* Defaults: means over the possible samples (protocol-docs). */
	for (size_t i = 0; i < n; i++) {
		rw_reflect_medium m = {proto_at(vp, i), proto_at(vs, i),
		                       proto_at(rho, i)};
		qc[i] = medium_flags(&m);
		if (qc[i] & QC_REFL_MEDIUM)
			continue;
		sum[0] += m.vp_ms, sum[1] += m.vs_ms, sum[2] += m.rho_kgm3;
		sum[3] += (m.vs_ms / m.vp_ms) * (m.vs_ms / m.vp_ms);
		nv++;
	}
	ref.vp_ms = proto_num_or(&ra, "vp", nv ? sum[0] / nv : NAN);
	ref.vs_ms = proto_num_or(&ra, "vs", nv ? sum[1] / nv : NAN);
	ref.rho_kgm3 = proto_num_or(&ra, "rho", nv ? sum[2] / nv : NAN);
	if (!k_given)
		k = nv ? sum[3] / nv : NAN;
	if (k_sample)
		k = RW_REFLECT_K_SAMPLE;
	static const char *const rn[3] = {"ref.vp", "ref.vs", "ref.rho"};
	const double rv[3] = {ref.vp_ms, ref.vs_ms, ref.rho_kgm3};
	for (int j = 0; j < 3; j++)
		if (proto_vec_of(&ra, rn[j] + 4)->present && !(rv[j] > 0))
			return proto_fail(c, PROTO_INVALID_PARAMS, rn[j],
			                  "must be > 0");
	for (size_t i = 0; i < n; i++) {
		rw_reflect_medium m = {proto_at(vp, i), proto_at(vs, i),
		                       proto_at(rho, i)};
		int bad = (qc[i] & QC_REFL_MEDIUM) != 0;
		for (size_t j = 0; j < na; j++) {
			double th = ang->v[j];
			size_t s = j * n + i;
			ei[s] = ein[s] = NAN;
			if (bad)
				continue;
			if (rw_reflect_ei(&m, th, k, &ei[s]) != RW_OK ||
			    rw_reflect_ei_norm(&m, th, k, &ref, &ein[s]) !=
			        RW_OK)
				qc[i] |= QC_REFL_UNDEFINED;
		}
		for (size_t j = 0; j < nc; j++) {
			size_t s = j * n + i;
			eei[s] = NAN;
			if (!bad && rw_reflect_eei(&m, chi->v[j], k, &ref,
			                           &eei[s]) != RW_OK)
				qc[i] |= QC_REFL_UNDEFINED;
		}
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	if (na)
		proto_w_vec(c, "angle", PK_ANGLE, ang->v, na, 1, ang->is_array);
	if (nc)
		proto_w_vec(c, "chi", PK_ANGLE, chi->v, nc, 1, chi->is_array);
	if (k_sample)
		proto_w_str(c, "k", "sample");
	else
		proto_w_num(c, "k", PK_NONE, k);
	proto_w_num(c, "ref_vp", PK_VELOCITY, ref.vp_ms);
	proto_w_num(c, "ref_vs", PK_VELOCITY, ref.vs_ms);
	proto_w_num(c, "ref_rho", PK_DENSITY, ref.rho_kgm3);
	if (na) {
		w_grid(c, "ei", PK_NONE, ei, na, n, 1, ang->is_array, arr);
		w_grid(c, "ei_norm", PK_IMPEDANCE, ein, na, n, 1, ang->is_array,
		       arr);
	}
	if (nc)
		w_grid(c, "eei", PK_IMPEDANCE, eei, nc, n, 1, chi->is_array,
		       arr);
	proto_w_flags(c, "qc", qc, n, arr);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

/* ---- reflect.vti -------------------------------------------------------- */

static const proto_param vti_medium_spec[] = {
    {"vp0", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"vs0", PT_NUMS, PK_VELOCITY, PP_REQUIRED | PP_NULLS, 0},
    {"rho", PT_NUMS, PK_DENSITY, PP_REQUIRED | PP_NULLS, 0},
    {"epsilon", PT_NUMS, PK_NONE, PP_REQUIRED | PP_NULLS, 0},
    {"delta", PT_NUMS, PK_NONE, PP_REQUIRED | PP_NULLS, 0},
    {"gamma", PT_NUMS, PK_NONE, PP_NULLS, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static const proto_param vti_params[] = {
    {"upper", PT_OBJ, PK_NONE, PP_REQUIRED, 0},
    {"lower", PT_OBJ, PK_NONE, PP_REQUIRED, 0},
    {"angle", PT_NUMS, PK_ANGLE, 0, 1},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

static rw_aniso_thomsen thomsen_at(const proto_args *a, size_t i)
{
	static const double zero = 0.0;
	static const proto_vec none = {&zero, 1, 1, 0};
	const proto_vec *g = proto_vec_of(a, "gamma");
	rw_aniso_thomsen t;

	t.vp0_ms = proto_at(proto_vec_of(a, "vp0"), i);
	t.vs0_ms = proto_at(proto_vec_of(a, "vs0"), i);
	t.rho_kgm3 = proto_at(proto_vec_of(a, "rho"), i);
	t.epsilon = proto_at(proto_vec_of(a, "epsilon"), i);
	t.delta = proto_at(proto_vec_of(a, "delta"), i);
	t.gamma = proto_at(g->present ? g : &none, i);
	return t;
}

/* QC bits of one Ruger medium: missing/non-finite, density, or a medium
 * the core refuses (vs0 outside [0, vp0), an anisotropic fluid, no real
 * C13 or a stiffness that is not positive definite). */
static uint32_t vti_flags(const rw_aniso_thomsen *t)
{
	double r;

	if (!isfinite(t->vp0_ms) || !isfinite(t->vs0_ms) ||
	    !isfinite(t->rho_kgm3) || !isfinite(t->epsilon) ||
	    !isfinite(t->delta) || !isfinite(t->gamma))
		return QC_INPUT_INVALID | QC_REFL_MEDIUM;
	if (t->rho_kgm3 <= 0)
		return QC_RHO_NONPOSITIVE | QC_REFL_MEDIUM;
	if (t->vp0_ms <= 0 || t->vs0_ms < 0)
		return QC_INPUT_INVALID | QC_REFL_MEDIUM;
	/* the core checks the medium; test it against itself at 0 deg */
	if (rw_aniso_ruger_pp(t, t, 0.0, &r) != RW_OK)
		return QC_ANISO_UNSTABLE | QC_REFL_MEDIUM;
	if (2.0 * t->vs0_ms * t->vs0_ms > t->vp0_ms * t->vp0_ms)
		return QC_NU_NEGATIVE;
	return 0;
}

static int vti(proto_call *c)
{
	media_pair mp;
	const proto_vec *ang;
	size_t ni, na, nn;
	double *r, *ri;
	uint32_t *qc;

	if (media_parse(c, vti_medium_spec, &mp))
		return -1;
	ang = angle_vec(&c->args);
	if (angles_check(c, ang, "angle", 0, M_PI_2, 1))
		return -1;
	ni = mp.n;
	na = ang->n;
	if (ni > SIZE_MAX / na)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, NULL,
		                  "interfaces x angles overflows");
	nn = ni * na;
	if (proto_check_size(c, ni, nn))
		return -1;
	if (!(r = doubles(c, nn)) || !(ri = doubles(c, nn)) ||
	    !(qc = flag_alloc(c, nn)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < ni; i++) {
		rw_aniso_thomsen u = thomsen_at(&mp.up, i);
		rw_aniso_thomsen l = thomsen_at(&mp.lo, i);
		rw_aniso_thomsen ui = u, li = l;
		uint32_t fm = vti_flags(&u) | vti_flags(&l);

		ui.epsilon = ui.delta = ui.gamma = 0;
		li.epsilon = li.delta = li.gamma = 0;
		for (size_t j = 0; j < na; j++) {
			size_t s = i * na + j;
			double th = proto_at(ang, j);
			r[s] = ri[s] = NAN;
			qc[s] = fm;
			if (fm & QC_REFL_MEDIUM)
				continue;
			if (rw_aniso_ruger_pp(&u, &l, th, &r[s]) != RW_OK ||
			    rw_aniso_ruger_pp(&ui, &li, th, &ri[s]) != RW_OK)
				qc[s] |= QC_REFL_UNDEFINED;
		}
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n_interfaces", (long long)ni);
	proto_w_int(c, "n_angles", (long long)na);
	proto_w_vec(c, "angle", PK_ANGLE, ang->v, na, 1, ang->is_array);
	w_grid(c, "rpp_ruger", PK_NONE, r, ni, na, 1, mp.arr, ang->is_array);
	w_grid(c, "rpp_isotropic", PK_NONE, ri, ni, na, 1, mp.arr,
	       ang->is_array);
	w_grid_flags(c, "qc", qc, ni, na, mp.arr, ang->is_array);
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_reflect_methods[] = {
    {"reflect.interface", interface, interface_params,
     "Exact Zoeppritz and linearised PP reflectivity, intercept, "
     "gradient, AVO class and critical angles of interfaces."},
    {"reflect.series", series, series_params,
     "Angle-dependent reflectivity of every interface of a blocked log."},
    {"reflect.impedance", impedance, impedance_params,
     "Elastic impedance (EI, normalised EI) and extended elastic "
     "impedance logs."},
    {"reflect.vti", vti, vti_params,
     "Ruger PP reflectivity between two VTI media."},
    {NULL, NULL, NULL, NULL},
};
