/* The reflect family: reflect.interface (exact Zoeppritz coefficients and
 * the published linearisations at one or many interfaces and angles, with
 * intercept, gradient, curvature, AVO class and critical angles),
 * reflect.series (the angle-dependent reflectivity of a blocked log),
 * reflect.impedance (EI, normalised EI and EEI logs) and reflect.vti
 * (Ruger PP reflectivity between two VTI media). Each is declared once:
 * interfaces (or samples) are the driver's samples, angles its cells. The
 * physics is in daemon/core (reflect.h, aniso.h); layouts are documented
 * in protocol-docs/reflect.md. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/aniso.h"
#include "rockwire/reflect.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif
#define DEG (M_PI / 180.0)

/* ---- shared pieces ------------------------------------------------------ */

/* Approximations by their published names; index 0 is the exact solution.
 * Each entry says which angle its formula is evaluated at
 * (include/rockwire/reflect.h and protocol-docs/reflect.md). */
enum {
	M_ZOEPPRITZ = 0,
	M_AKI_RICHARDS,
	M_SHUEY2,
	M_SHUEY3,
	M_HILTERMAN,
	M_FATTI,
	M_GRAY_LMR,
	M_GRAY_KMR,
	M_SMITH_GIDLOW,
	M_AKI_RICHARDS_PS, /* the linearised PS coefficient (seismic.h) */
	M_COUNT
};
static const char *const method_names[] = {
    "zoeppritz",    "aki_richards",    "shuey2",   "shuey3",
    "hilterman",    "fatti",           "gray_lmr", "gray_kmr",
    "smith_gidlow", "aki_richards_ps", NULL};

typedef int (*lin_fn)(const rw_reflect_medium *, const rw_reflect_medium *,
                      double, double *);
static const lin_fn method_fns[M_COUNT] = {
    NULL,
    rw_reflect_aki_richards,
    rw_reflect_shuey2,
    rw_reflect_shuey3,
    rw_reflect_hilterman,
    rw_reflect_fatti,
    rw_reflect_gray_lmr,
    rw_reflect_gray_kmr,
    rw_reflect_smith_gidlow,
    rw_seis_ps_aki_richards,
};

/* An isotropic medium of an interface. */
typedef struct iso_medium {
	proto_hdr hdr;
	proto_vec vp, vs, rho;
} iso_medium;

static const proto_field iso_fields[] = {
    {PROTO_NUMS(iso_medium, vp, PK_VELOCITY, PF_REQ | PF_NULLS, "P velocity")},
    {PROTO_NUMS(iso_medium, vs, PK_VELOCITY, PF_REQ | PF_NULLS,
                "S velocity (0 for a fluid)")},
    {PROTO_NUMS(iso_medium, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    {0},
};
static const proto_decl iso_decl = {
    .name = "isoMedium",
    .fields = iso_fields,
    .size = sizeof(iso_medium),
    .desc = "an isotropic medium: vp, vs, rho (arrays = one interface per "
            "element)",
};

static rw_reflect_medium medium_at(const iso_medium *m, size_t i)
{
	rw_reflect_medium r;
	r.vp_ms = proto_at(&m->vp, i);
	r.vs_ms = proto_at(&m->vs, i);
	r.rho_kgm3 = proto_at(&m->rho, i);
	return r;
}

/* QC bits of one isotropic medium: missing, the impossible ones (outputs
 * null) or the implausible negative Poisson's ratio. Mirrors
 * rw_reflect_medium_check. */
static uint64_t medium_flags(const rw_reflect_medium *m)
{
	uint64_t f = 0;

	if (isnan(m->vp_ms) || isnan(m->vs_ms) || isnan(m->rho_kgm3))
		return QC_LOG_MISSING | QC_REFL_MEDIUM;
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

/* An interface, computed once per sample. */
typedef struct iface_row {
	double abc[3]; /* intercept, gradient, curvature */
	double crit_p, crit_s;
	const char *cls;
	rw_reflect_medium u, l;
	int bad;     /* an impossible medium */
	uint64_t fm; /* the media's flags, for every angle */
	uint64_t qc;
} iface_row;

/* Per (interface, angle): exact coefficients (re, im, abs, phase of rpp,
 * rps, tpp, tps) and the linearised values by method id. */
typedef struct angle_row {
	double zz[16];
	double lin[M_COUNT];
	uint64_t qc;
} angle_row;

/* Evaluates the chosen methods (mask) at one interface and angle. */
static uint64_t eval_angle(const iface_row *s, double theta, uint32_t mask,
                           angle_row *o)
{
	uint64_t f = 0;
	int post = theta >= s->crit_p;

	for (int k = 0; k < 16; k++)
		o->zz[k] = NAN;
	for (int j = 0; j < M_COUNT; j++)
		o->lin[j] = NAN;
	if (s->bad)
		return 0;
	if (post)
		f |= QC_REFL_POSTCRITICAL;
	if (theta >= s->crit_s)
		f |= QC_REFL_POSTCRIT_S;
	for (int id = 0; id < M_COUNT; id++) {
		if (!(mask & (1u << id)))
			continue;
		if (id == M_ZOEPPRITZ) {
			rw_reflect_pcoefs pc;
			const rw_reflect_cplx *z[4] = {&pc.rpp, &pc.rps,
			                               &pc.tpp, &pc.tps};
			if (rw_reflect_zoeppritz(&s->u, &s->l, theta, &pc) !=
			    RW_OK) {
				f |= QC_REFL_UNDEFINED;
				continue;
			}
			for (int k = 0; k < 4; k++) {
				double re = z[k]->re, im = z[k]->im;
				/* -0 and +0 are one value: a real negative
				 * coefficient has phase +180 deg, a zero one
				 * (rps, tps at normal incidence) phase 0 */
				if (im == 0)
					im = 0.0;
				if (re == 0)
					re = 0.0;
				o->zz[4 * k] = re;
				o->zz[4 * k + 1] = im;
				o->zz[4 * k + 2] = hypot(re, im);
				o->zz[4 * k + 3] = atan2(im, re);
			}
			o->lin[M_ZOEPPRITZ] = pc.rpp.re;
			continue;
		}
		if (post)
			continue; /* not valid past the P critical angle */
		if (method_fns[id](&s->u, &s->l, theta, &o->lin[id]) != RW_OK) {
			o->lin[id] = NAN;
			f |= QC_REFL_UNDEFINED;
		}
	}
	return f;
}

/* Sets up the interface row of media u, l. */
static void iface_setup(iface_row *r, rw_reflect_medium u, rw_reflect_medium l,
                        int want_abc)
{
	r->u = u;
	r->l = l;
	r->qc = r->fm = medium_flags(&u) | medium_flags(&l);
	r->bad = (r->qc & QC_REFL_MEDIUM) != 0;
	r->crit_p = r->crit_s = NAN;
	r->abc[0] = r->abc[1] = r->abc[2] = NAN;
	r->cls = NULL;
	if (r->bad)
		return;
	rw_reflect_critical_angles(&u, &l, &r->crit_p, &r->crit_s);
	if (want_abc)
		rw_reflect_shuey_terms(&u, &l, &r->abc[0], &r->abc[1],
		                       &r->abc[2]);
	if (isinf(r->crit_p))
		r->qc |= QC_REFL_NO_CRIT_P;
	if (isinf(r->crit_s))
		r->qc |= QC_REFL_NO_CRIT_S;
}

/* The angle field of the methods that take one (0 to 90 deg). */
#define ANGLE_FIELD(st, hi_flags, text)                                        \
	{                                                                      \
		.name = "angle", .type = PT_NUMS, .kind = PK_ANGLE,            \
		.flags = PF_DFLT | PF_LO | PF_HI | (hi_flags), .group = 1,     \
		.offset = offsetof(st, angle), .lo = 0, .hi = M_PI_2,          \
		.desc = text                                                   \
	}
#define METHODS_FIELD(st)                                                      \
	{                                                                      \
		.name = "methods", .type = PT_ENUMSET, .flags = PF_DFLT,       \
		.offset = offsetof(st, methods), .choices = method_names,      \
		.dflt_choice = M_ZOEPPRITZ,                                    \
		.desc =                                                        \
		    "a method name or an array of distinct names (default "    \
		    "zoeppritz)"                                               \
	}

/* A `when` per method, for its outputs. */
#define HAS(id, fn, st)                                                        \
	static int fn(const void *a)                                           \
	{                                                                      \
		return (((const st *)a)->methods.mask >> (id)) & 1u;           \
	}

/* ---- reflect.interface -------------------------------------------------- */

typedef struct class_args {
	proto_hdr hdr;
	proto_vec a_small, theta_max;
} class_args;

static const proto_field class_fields[] = {
    {PROTO_NUMS(class_args, a_small, PK_NONE, PF_SCALAR | PF_DFLT | PF_LO,
                "intercepts within +- a_small count as near zero (default "
                "0.02); one rule for the whole request"),
     .dflt = 0.02, .lo = 0},
    {PROTO_NUMS(class_args, theta_max, PK_ANGLE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_HI | PF_LO_OPEN | PF_HI_OPEN,
                "largest angle the classification considers (default 30 "
                "deg); one rule for the whole request"),
     .dflt = M_PI / 6.0, .lo = 0, .hi = M_PI_2},
    {0},
};
static const proto_decl class_decl = {
    .name = "avoClass",
    .fields = class_fields,
    .size = sizeof(class_args),
    .desc = "AVO class thresholds (reflect.md)",
};

typedef struct iface_args {
	proto_hdr hdr;
	iso_medium upper, lower;
	proto_vec angle;
	proto_enumset methods;
	class_args cls;
	rw_avo_class_params cp; /* derived */
} iface_args;

static const proto_field iface_fields[] = {
    {PROTO_FIELD(iface_args, upper, PT_OBJ, PF_REQ,
                 "the medium above the interface"),
     .sub = &iso_decl},
    {PROTO_FIELD(iface_args, lower, PT_OBJ, PF_REQ,
                 "the medium below the interface"),
     .sub = &iso_decl},
    ANGLE_FIELD(iface_args, 0,
                "incidence angles, 0 to 90 deg (default 0); an array is "
                "the angle dimension of every interface"),
    METHODS_FIELD(iface_args),
    {.name = "class",
     .type = PT_OBJ,
     .offset = offsetof(iface_args, cls),
     .sub = &class_decl,
     .desc = "AVO class thresholds"},
    {0},
};

static int iface_check(proto_call *c, void *dst)
{
	iface_args *a = dst;
	(void)c;
	a->cp = rw_reflect_avo_defaults();
	if (a->cls.hdr.present) {
		a->cp.a_small = a->cls.a_small.v[0];
		a->cp.theta_max_rad = a->cls.theta_max.v[0];
	}
	return 0;
}

static const proto_decl iface_decl = {
    .name = "",
    .fields = iface_fields,
    .size = sizeof(iface_args),
    .check = iface_check,
};

static int iface_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                        void *ws)
{
	const iface_args *a = args;
	iface_row *r = row;
	rw_avo_class k = RW_AVO_NONE;

	(void)ws;
	iface_setup(r, medium_at(&a->upper, i), medium_at(&a->lower, i), 1);
	if (!r->bad &&
	    rw_reflect_avo_classify(r->abc[0], r->abc[1], &a->cp, &k) == RW_OK)
		r->cls = rw_reflect_avo_class_name(k);
	*qc = r->qc;
	return 0;
}

static int iface_cell(const void *args, size_t i, size_t j, void *srow,
                      void *crow, uint64_t *qc, void *ws)
{
	const iface_args *a = args;
	const iface_row *s = srow;
	(void)i, (void)ws;
	*qc = s->fm |
	      eval_angle(s, proto_at(&a->angle, j), a->methods.mask, crow);
	return 0;
}

HAS(M_ZOEPPRITZ, i_zz, iface_args)
HAS(M_AKI_RICHARDS, i_ar, iface_args)
HAS(M_SHUEY2, i_s2, iface_args)
HAS(M_SHUEY3, i_s3, iface_args)
HAS(M_HILTERMAN, i_hi, iface_args)
HAS(M_FATTI, i_fa, iface_args)
HAS(M_GRAY_LMR, i_gl, iface_args)
HAS(M_GRAY_KMR, i_gk, iface_args)
HAS(M_SMITH_GIDLOW, i_sg, iface_args)
HAS(M_AKI_RICHARDS_PS, i_ps, iface_args)

#define LIN(id, nm, d_, w)                                                     \
	{                                                                      \
		.name = "rpp_" nm, .type = PO_NUM, .dim = d_,                  \
		.offset = offsetof(angle_row, lin) + (id) * sizeof(double),    \
		.when = w, .desc = "PP reflectivity, " nm                      \
	}
/* The linearised PS coefficient beside the exact rps. */
#define PS_OUT(d_, w)                                                          \
	{                                                                      \
		.name = "rps_aki_richards", .type = PO_NUM, .dim = d_,         \
		.offset = offsetof(angle_row, lin) +                           \
		          M_AKI_RICHARDS_PS * sizeof(double),                  \
		.when = w,                                                     \
		.desc = "PS reflectivity linearised (Aki & Richards 1980), "   \
		        "the sign convention of the exact rps"                 \
	}
#define ZZ16(d_, w)                                                            \
	{.name = "rpp_re",                                                     \
	 .type = PO_NUM,                                                       \
	 .dim = d_,                                                            \
	 .when = w,                                                            \
	 .offset = offsetof(angle_row, zz),                                    \
	 .desc = "exact Rpp, real part"},                                      \
	    {.name = "rpp_im",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 1 * sizeof(double),           \
	     .desc = "exact Rpp, imaginary part"},                             \
	    {.name = "rpp_abs",                                                \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 2 * sizeof(double),           \
	     .desc = "exact |Rpp|"},                                           \
	    {.name = "rpp_phase",                                              \
	     .type = PO_NUM,                                                   \
	     .kind = PK_ANGLE,                                                 \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 3 * sizeof(double),           \
	     .desc = "exact Rpp phase"},                                       \
	    {.name = "rps_re",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 4 * sizeof(double),           \
	     .desc = "exact Rps (converted), real part"},                      \
	    {.name = "rps_im",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 5 * sizeof(double),           \
	     .desc = "exact Rps, imaginary part"},                             \
	    {.name = "rps_abs",                                                \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 6 * sizeof(double),           \
	     .desc = "exact |Rps|"},                                           \
	    {.name = "rps_phase",                                              \
	     .type = PO_NUM,                                                   \
	     .kind = PK_ANGLE,                                                 \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 7 * sizeof(double),           \
	     .desc = "exact Rps phase"},                                       \
	    {.name = "tpp_re",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 8 * sizeof(double),           \
	     .desc = "exact Tpp, real part"},                                  \
	    {.name = "tpp_im",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 9 * sizeof(double),           \
	     .desc = "exact Tpp, imaginary part"},                             \
	    {.name = "tpp_abs",                                                \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 10 * sizeof(double),          \
	     .desc = "exact |Tpp|"},                                           \
	    {.name = "tpp_phase",                                              \
	     .type = PO_NUM,                                                   \
	     .kind = PK_ANGLE,                                                 \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 11 * sizeof(double),          \
	     .desc = "exact Tpp phase"},                                       \
	    {.name = "tps_re",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 12 * sizeof(double),          \
	     .desc = "exact Tps, real part"},                                  \
	    {.name = "tps_im",                                                 \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 13 * sizeof(double),          \
	     .desc = "exact Tps, imaginary part"},                             \
	    {.name = "tps_abs",                                                \
	     .type = PO_NUM,                                                   \
	     .dim = d_,                                                        \
	     .when = w,                                                        \
	     .offset = offsetof(angle_row, zz) + 14 * sizeof(double),          \
	     .desc = "exact |Tps|"},                                           \
	{                                                                      \
		.name = "tps_phase", .type = PO_NUM, .kind = PK_ANGLE,         \
		.dim = d_, .when = w,                                          \
		.offset = offsetof(angle_row, zz) + 15 * sizeof(double),       \
		.desc = "exact Tps phase"                                      \
	}

static const proto_output iface_outputs[] = {
    {.name = "n_interfaces",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 0,
     .desc = "interfaces"},
    {.name = "n_angles",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 1,
     .desc = "angles"},
    {.name = "angle",
     .type = PO_VEC,
     .kind = PK_ANGLE,
     .dim = D_CELL,
     .offset = offsetof(iface_args, angle),
     .desc = "the angles"},
    ZZ16(D_CELL, i_zz),
    LIN(M_AKI_RICHARDS, "aki_richards", D_CELL, i_ar),
    LIN(M_SHUEY2, "shuey2", D_CELL, i_s2),
    LIN(M_SHUEY3, "shuey3", D_CELL, i_s3),
    LIN(M_HILTERMAN, "hilterman", D_CELL, i_hi),
    LIN(M_FATTI, "fatti", D_CELL, i_fa),
    LIN(M_GRAY_LMR, "gray_lmr", D_CELL, i_gl),
    LIN(M_GRAY_KMR, "gray_kmr", D_CELL, i_gk),
    LIN(M_SMITH_GIDLOW, "smith_gidlow", D_CELL, i_sg),
    PS_OUT(D_CELL, i_ps),
    {.name = "qc",
     .type = PO_FLAGS,
     .dim = D_CELL,
     .offset = offsetof(angle_row, qc),
     .desc = "QC flags per interface and angle"},
    {.name = "intercept",
     .type = PO_NUM,
     .offset = offsetof(iface_row, abc),
     .desc = "Shuey intercept A"},
    {.name = "gradient",
     .type = PO_NUM,
     .offset = offsetof(iface_row, abc) + sizeof(double),
     .desc = "Shuey gradient B"},
    {.name = "curvature",
     .type = PO_NUM,
     .offset = offsetof(iface_row, abc) + 2 * sizeof(double),
     .desc = "Shuey curvature C"},
    {.name = "class",
     .type = PO_STR,
     .offset = offsetof(iface_row, cls),
     .desc = "AVO class (I, IIp, II, III, IV; null where undefined)"},
    {.name = "class_a_small",
     .type = PO_NUM,
     .dim = D_REQ,
     .offset = offsetof(iface_args, cp.a_small),
     .desc = "the near-zero intercept band used"},
    {.name = "class_theta_max",
     .type = PO_NUM,
     .kind = PK_ANGLE,
     .dim = D_REQ,
     .offset = offsetof(iface_args, cp.theta_max_rad),
     .desc = "the angle limit used"},
    {.name = "critical_p",
     .type = PO_NUM,
     .kind = PK_ANGLE,
     .offset = offsetof(iface_row, crit_p),
     .desc = "P critical angle (null when none)"},
    {.name = "critical_s",
     .type = PO_NUM,
     .kind = PK_ANGLE,
     .offset = offsetof(iface_row, crit_s),
     .desc = "S critical angle (null when none)"},
    {.name = "qc_interface",
     .type = PO_FLAGS,
     .offset = offsetof(iface_row, qc),
     .desc = "QC flags per interface"},
    {0},
};

static const proto_method m_interface = {
    .name = "reflect.interface",
    .summary = "Exact Zoeppritz and linearised PP reflectivity, intercept, "
               "gradient, AVO class and critical angles of interfaces.",
    .description =
        "upper and lower media (vp, vs, rho; arrays = many interfaces) "
        "and angles (an array is a second dimension). Grids are "
        "[interface][angle], each dimension an array only when its input "
        "was one. See reflect.md.",
    .params = &iface_decl,
    .outputs = iface_outputs,
    .kernel = iface_kernel,
    .row_size = sizeof(iface_row),
    .qc_offset = offsetof(iface_row, qc),
    .cells = {{iface_cell, 1, sizeof(angle_row), offsetof(angle_row, qc), 0}},
    .cost = 2,
};

/* ---- reflect.series ----------------------------------------------------- */

typedef struct series_args {
	proto_hdr hdr;
	proto_vec vp, vs, rho, depth, time;
	int position;
	proto_vec angle;
	proto_enumset methods;
	proto_vec zdep, ztim; /* derived: interface positions */
} series_args;

enum { POS_MIDPOINT, POS_LAYER_TOP };
static const char *const pos_names[] = {"midpoint", "layer_top", NULL};

static const proto_field series_fields[] = {
    {PROTO_NUMS(series_args, vp, PK_VELOCITY, PF_REQ | PF_NULLS,
                "P velocity log")},
    {PROTO_NUMS(series_args, vs, PK_VELOCITY, PF_REQ | PF_NULLS,
                "S velocity log")},
    {PROTO_NUMS(series_args, rho, PK_DENSITY, PF_REQ | PF_NULLS,
                "density log")},
    {PROTO_NUMS(series_args, depth, PK_LENGTH, PF_ARRAY,
                "depth of each sample, strictly increasing (optional)")},
    {PROTO_NUMS(series_args, time, PK_NONE, PF_ARRAY,
                "time of each sample, strictly increasing (optional)")},
    {.name = "position",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(series_args, position),
     .choices = pos_names,
     .dflt_choice = POS_MIDPOINT,
     .desc = "interface position: midpoint between samples, or layer_top "
             "(the top of the lower layer)"},
    ANGLE_FIELD(series_args, 0, "incidence angles, 0 to 90 deg (default 0)"),
    METHODS_FIELD(series_args),
    {0},
};

static const proto_decl series_decl = {
    .name = "",
    .fields = series_fields,
    .size = sizeof(series_args),
};

/* Interface positions of a position log: halfway between samples, or the
 * top of the lower layer. 0 or -1. */
static int positions(proto_call *c, const char *name, const proto_vec *z,
                     int layer_top, size_t n, proto_vec *out)
{
	double *p;

	memset(out, 0, sizeof *out);
	if (!z->present)
		return 0;
	p = proto_alloc_doubles(c, n - 1);
	if (!p)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 1; i < n; i++) {
		if (!(z->v[i] > z->v[i - 1]))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, name,
			    "element %zu is not greater than "
			    "element %zu: the log must be ordered "
			    "downwards, strictly increasing",
			    i, i - 1);
		p[i - 1] = layer_top ? z->v[i] : 0.5 * (z->v[i - 1] + z->v[i]);
	}
	out->v = p;
	out->n = n - 1;
	out->present = 1;
	out->is_array = 1;
	return 0;
}

static int series_prepare(proto_call *c, void *args, proto_shape *sh)
{
	series_args *a = args;
	size_t n = sh->n;

	if (!sh->arr || n < 2)
		return proto_fail(c, PROTO_INVALID_PARAMS, "vp",
		                  "a series needs arrays of at least 2 samples "
		                  "(one interface); use reflect.interface for "
		                  "single interfaces");
	if (positions(c, "depth", &a->depth, a->position == POS_LAYER_TOP, n,
	              &a->zdep) ||
	    positions(c, "time", &a->time, a->position == POS_LAYER_TOP, n,
	              &a->ztim))
		return -1;
	sh->n = n - 1;
	return 0;
}

static int series_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                         void *ws)
{
	const series_args *a = args;
	iface_row *r = row;
	rw_reflect_medium u = {proto_at(&a->vp, i), proto_at(&a->vs, i),
	                       proto_at(&a->rho, i)};
	rw_reflect_medium l = {proto_at(&a->vp, i + 1), proto_at(&a->vs, i + 1),
	                       proto_at(&a->rho, i + 1)};

	(void)ws;
	iface_setup(r, u, l, 1);
	r->abc[2] = NAN;
	*qc = r->qc;
	return 0;
}

static int series_cell(const void *args, size_t i, size_t j, void *srow,
                       void *crow, uint64_t *qc, void *ws)
{
	const series_args *a = args;
	const iface_row *s = srow;
	(void)i, (void)ws;
	*qc = s->fm |
	      eval_angle(s, proto_at(&a->angle, j), a->methods.mask, crow);
	return 0;
}

static int s_depth(const void *a)
{
	return ((const series_args *)a)->zdep.present;
}
static int s_time(const void *a)
{
	return ((const series_args *)a)->ztim.present;
}
HAS(M_ZOEPPRITZ, s_zz, series_args)
HAS(M_AKI_RICHARDS, s_ar, series_args)
HAS(M_SHUEY2, s_s2, series_args)
HAS(M_SHUEY3, s_s3, series_args)
HAS(M_HILTERMAN, s_hi, series_args)
HAS(M_FATTI, s_fa, series_args)
HAS(M_GRAY_LMR, s_gl, series_args)
HAS(M_GRAY_KMR, s_gk, series_args)
HAS(M_SMITH_GIDLOW, s_sg, series_args)
HAS(M_AKI_RICHARDS_PS, s_ps, series_args)
/* The exact rps of a series only beside its linearised form. */
static int s_zz_ps(const void *a)
{
	return s_zz(a) && s_ps(a);
}

static const proto_output series_outputs[] = {
    {.name = "n_interfaces",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 0,
     .desc = "interfaces (samples - 1)"},
    {.name = "n_angles",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 1,
     .desc = "angles"},
    {.name = "angle",
     .type = PO_VEC,
     .kind = PK_ANGLE,
     .dim = D_CELL,
     .offset = offsetof(series_args, angle),
     .desc = "the angles"},
    {.name = "depth",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(series_args, zdep),
     .when = s_depth,
     .desc = "interface depths"},
    {.name = "time",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(series_args, ztim),
     .when = s_time,
     .desc = "interface times"},
    {.name = "rpp_re",
     .type = PO_NUM,
     .dim = D_CELL,
     .when = s_zz,
     .offset = offsetof(angle_row, zz),
     .desc = "exact Rpp, real part"},
    {.name = "rpp_im",
     .type = PO_NUM,
     .dim = D_CELL,
     .when = s_zz,
     .offset = offsetof(angle_row, zz) + sizeof(double),
     .desc = "exact Rpp, imaginary part"},
    LIN(M_AKI_RICHARDS, "aki_richards", D_CELL, s_ar),
    LIN(M_SHUEY2, "shuey2", D_CELL, s_s2),
    LIN(M_SHUEY3, "shuey3", D_CELL, s_s3),
    LIN(M_HILTERMAN, "hilterman", D_CELL, s_hi),
    LIN(M_FATTI, "fatti", D_CELL, s_fa),
    LIN(M_GRAY_LMR, "gray_lmr", D_CELL, s_gl),
    LIN(M_GRAY_KMR, "gray_kmr", D_CELL, s_gk),
    LIN(M_SMITH_GIDLOW, "smith_gidlow", D_CELL, s_sg),
    {.name = "rps_re",
     .type = PO_NUM,
     .dim = D_CELL,
     .when = s_zz_ps,
     .offset = offsetof(angle_row, zz) + 4 * sizeof(double),
     .desc = "exact Rps, real part (with zoeppritz and aki_richards_ps)"},
    {.name = "rps_im",
     .type = PO_NUM,
     .dim = D_CELL,
     .when = s_zz_ps,
     .offset = offsetof(angle_row, zz) + 5 * sizeof(double),
     .desc = "exact Rps, imaginary part (with zoeppritz and "
             "aki_richards_ps)"},
    PS_OUT(D_CELL, s_ps),
    {.name = "qc",
     .type = PO_FLAGS,
     .dim = D_CELL,
     .offset = offsetof(angle_row, qc),
     .desc = "QC flags per angle and interface"},
    {.name = "intercept",
     .type = PO_NUM,
     .offset = offsetof(iface_row, abc),
     .desc = "Shuey intercept A"},
    {.name = "gradient",
     .type = PO_NUM,
     .offset = offsetof(iface_row, abc) + sizeof(double),
     .desc = "Shuey gradient B"},
    {.name = "qc_interface",
     .type = PO_FLAGS,
     .offset = offsetof(iface_row, qc),
     .desc = "QC flags per interface"},
    {0},
};

static const proto_method m_series = {
    .name = "reflect.series",
    .summary = "Angle-dependent reflectivity of every interface of a blocked "
               "log.",
    .description =
        "vp, vs, rho arrays of one log (at least 2 samples); interface i "
        "lies between samples i and i + 1. Grids are [angle][interface]: "
        "one reflectivity log per angle. See reflect.md.",
    .params = &series_decl,
    .outputs = series_outputs,
    .prepare = series_prepare,
    .kernel = series_kernel,
    .row_size = sizeof(iface_row),
    .qc_offset = offsetof(iface_row, qc),
    .cells = {{series_cell, 1, sizeof(angle_row), offsetof(angle_row, qc), 1}},
    .cost = 2,
};

/* ---- reflect.impedance -------------------------------------------------- */

typedef struct ref_args {
	proto_hdr hdr;
	proto_vec vp, vs, rho;
} ref_args;

static const proto_field ref_fields[] = {
    {PROTO_NUMS(ref_args, vp, PK_VELOCITY, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "reference vp"),
     .lo = 0},
    {PROTO_NUMS(ref_args, vs, PK_VELOCITY, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "reference vs"),
     .lo = 0},
    {PROTO_NUMS(ref_args, rho, PK_DENSITY, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "reference density"),
     .lo = 0},
    {0},
};
static const proto_decl ref_decl = {
    .name = "eiReference",
    .fields = ref_fields,
    .size = sizeof(ref_args),
    .desc = "normalisation constants of EI (Whitcombe 2002); default the "
            "means over the possible samples",
};

/* k: one number in [0, 0.75) for the request, or "sample". */
typedef struct k_value {
	double k;
	int given, sample;
} k_value;

static int k_parse(proto_call *c, const cJSON *v, const char *path, void *dst)
{
	k_value *k = dst;
	if (cJSON_IsString(v) && strcmp(v->valuestring, "sample") == 0) {
		k->sample = 1;
		k->given = 1;
		return 0;
	}
	if (cJSON_IsNumber(v) && v->valuedouble >= 0 && v->valuedouble < 0.75) {
		k->k = v->valuedouble;
		k->given = 1;
		return 0;
	}
	return proto_fail(c, PROTO_INVALID_PARAMS, path,
	                  "must be a number in [0, 0.75) (K = (vs/vp)^2), one "
	                  "constant for the request, or \"sample\" (each "
	                  "sample's own)");
}

static const proto_custom k_custom = {
    .parse = k_parse,
    .schema = "{\"oneOf\": [{\"type\": \"number\", \"minimum\": 0, "
              "\"exclusiveMaximum\": 0.75}, {\"const\": \"sample\"}], "
              "\"description\": \"K = (vs/vp)^2: one constant for the "
              "request (default the mean over the possible samples), or "
              "\\\"sample\\\" for each sample's own\"}",
};

typedef struct imp_args {
	proto_hdr hdr;
	proto_vec vp, vs, rho, angle, chi;
	k_value k;
	ref_args ref;
	rw_reflect_medium refm; /* derived */
	double k_used;
} imp_args;

static const proto_field imp_fields[] = {
    {PROTO_NUMS(imp_args, vp, PK_VELOCITY, PF_REQ | PF_NULLS, "P velocity")},
    {PROTO_NUMS(imp_args, vs, PK_VELOCITY, PF_REQ | PF_NULLS, "S velocity")},
    {PROTO_NUMS(imp_args, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    {.name = "angle",
     .type = PT_NUMS,
     .kind = PK_ANGLE,
     .flags = PF_LO | PF_HI | PF_HI_OPEN,
     .group = 1,
     .offset = offsetof(imp_args, angle),
     .lo = 0,
     .hi = M_PI_2,
     .desc = "incidence angles for EI, 0 to below 90 deg"},
    {.name = "chi",
     .type = PT_NUMS,
     .kind = PK_ANGLE,
     .flags = PF_LO | PF_HI,
     .group = 2,
     .offset = offsetof(imp_args, chi),
     .lo = -M_PI_2,
     .hi = M_PI_2,
     .desc = "EEI projection angles chi, -90 to 90 deg (Whitcombe et al. "
             "2002)"},
    {.name = "k",
     .type = PT_CUSTOM,
     .offset = offsetof(imp_args, k),
     .custom = &k_custom,
     .desc = "K = (vs/vp)^2"},
    {PROTO_FIELD(imp_args, ref, PT_OBJ, 0, "normalisation constants"),
     .sub = &ref_decl},
    {0},
};

static const char *const angle_chi[] = {"angle", "chi", NULL};
static const proto_rule imp_rules[] = {
    {PR_AT_LEAST, NULL, 1, angle_chi,
     "give angle (for EI), chi (for EEI) or both"},
    PR_LAST,
};

static const proto_decl imp_decl = {
    .name = "",
    .fields = imp_fields,
    .rules = imp_rules,
    .size = sizeof(imp_args),
};

static int imp_prepare(proto_call *c, void *args, proto_shape *sh)
{
	imp_args *a = args;
	double sum[4] = {0, 0, 0, 0};
	size_t nv = 0;

	(void)c;
	if (!a->angle.present)
		sh->m[0] = 0;
	if (!a->chi.present)
		sh->m[1] = 0;
	/* Defaults: means over the possible samples (reflect.md). */
	for (size_t i = 0; i < sh->n; i++) {
		rw_reflect_medium m = {proto_at(&a->vp, i), proto_at(&a->vs, i),
		                       proto_at(&a->rho, i)};
		if (medium_flags(&m) & QC_REFL_MEDIUM)
			continue;
		sum[0] += m.vp_ms, sum[1] += m.vs_ms, sum[2] += m.rho_kgm3;
		sum[3] += (m.vs_ms / m.vp_ms) * (m.vs_ms / m.vp_ms);
		nv++;
	}
	a->refm.vp_ms = a->ref.vp.present ? a->ref.vp.v[0]
	                : nv              ? sum[0] / (double)nv
	                                  : NAN;
	a->refm.vs_ms = a->ref.vs.present ? a->ref.vs.v[0]
	                : nv              ? sum[1] / (double)nv
	                                  : NAN;
	a->refm.rho_kgm3 = a->ref.rho.present ? a->ref.rho.v[0]
	                   : nv               ? sum[2] / (double)nv
	                                      : NAN;
	a->k_used = a->k.sample  ? RW_REFLECT_K_SAMPLE
	            : a->k.given ? a->k.k
	            : nv         ? sum[3] / (double)nv
	                         : NAN;
	return 0;
}

typedef struct imp_row {
	rw_reflect_medium m;
	int bad;
	uint64_t qc;
} imp_row;

typedef struct ei_row {
	double ei, ei_norm;
	uint64_t qc;
} ei_row;

typedef struct eei_row {
	double eei;
	uint64_t qc;
} eei_row;

static int imp_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const imp_args *a = args;
	imp_row *r = row;

	(void)ws;
	r->m.vp_ms = proto_at(&a->vp, i);
	r->m.vs_ms = proto_at(&a->vs, i);
	r->m.rho_kgm3 = proto_at(&a->rho, i);
	*qc = medium_flags(&r->m);
	r->bad = (*qc & QC_REFL_MEDIUM) != 0;
	return 0;
}

static int ei_cell(const void *args, size_t i, size_t j, void *srow, void *crow,
                   uint64_t *qc, void *ws)
{
	const imp_args *a = args;
	imp_row *s = srow;
	ei_row *o = crow;
	double th = proto_at(&a->angle, j);

	(void)i, (void)ws, (void)qc;
	o->ei = o->ei_norm = NAN;
	if (s->bad)
		return 0;
	if (rw_reflect_ei(&s->m, th, a->k_used, &o->ei) != RW_OK ||
	    rw_reflect_ei_norm(&s->m, th, a->k_used, &a->refm, &o->ei_norm) !=
	        RW_OK)
		s->qc |= QC_REFL_UNDEFINED;
	return 0;
}

static int eei_cell(const void *args, size_t i, size_t j, void *srow,
                    void *crow, uint64_t *qc, void *ws)
{
	const imp_args *a = args;
	imp_row *s = srow;
	eei_row *o = crow;

	(void)i, (void)ws, (void)qc;
	o->eei = NAN;
	if (!s->bad && rw_reflect_eei(&s->m, proto_at(&a->chi, j), a->k_used,
	                              &a->refm, &o->eei) != RW_OK)
		s->qc |= QC_REFL_UNDEFINED;
	return 0;
}

static void write_k(proto_call *c, const char *key, const void *args)
{
	const imp_args *a = args;
	if (a->k.sample)
		proto_w_str(c, key, "sample");
	else
		proto_w_num(c, key, PK_NONE, a->k_used);
}

static int has_angle(const void *a)
{
	return ((const imp_args *)a)->angle.present;
}
static int has_chi(const void *a)
{
	return ((const imp_args *)a)->chi.present;
}

static const proto_output imp_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "angle",
     .type = PO_VEC,
     .kind = PK_ANGLE,
     .dim = D_CELL,
     .offset = offsetof(imp_args, angle),
     .when = has_angle,
     .desc = "the EI angles"},
    {.name = "chi",
     .type = PO_VEC,
     .kind = PK_ANGLE,
     .dim = D_CELL2,
     .offset = offsetof(imp_args, chi),
     .when = has_chi,
     .desc = "the EEI angles"},
    {.name = "k",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_k,
     .schema = "{\"oneOf\": [{\"type\": [\"number\", \"null\"]}, {\"const\": "
               "\"sample\"}]}",
     .desc = "the K used"},
    {.name = "ref_vp",
     .type = PO_NUM,
     .kind = PK_VELOCITY,
     .dim = D_REQ,
     .offset = offsetof(imp_args, refm.vp_ms),
     .desc = "reference vp used"},
    {.name = "ref_vs",
     .type = PO_NUM,
     .kind = PK_VELOCITY,
     .dim = D_REQ,
     .offset = offsetof(imp_args, refm.vs_ms),
     .desc = "reference vs used"},
    {.name = "ref_rho",
     .type = PO_NUM,
     .kind = PK_DENSITY,
     .dim = D_REQ,
     .offset = offsetof(imp_args, refm.rho_kgm3),
     .desc = "reference density used"},
    {.name = "ei",
     .type = PO_NUM,
     .dim = D_CELL,
     .offset = offsetof(ei_row, ei),
     .when = has_angle,
     .desc = "elastic impedance (Connolly 1999), [angle][sample]"},
    {.name = "ei_norm",
     .type = PO_NUM,
     .kind = PK_IMPEDANCE,
     .dim = D_CELL,
     .offset = offsetof(ei_row, ei_norm),
     .when = has_angle,
     .desc = "normalised EI (Whitcombe 2002), [angle][sample]"},
    {.name = "eei",
     .type = PO_NUM,
     .kind = PK_IMPEDANCE,
     .dim = D_CELL2,
     .offset = offsetof(eei_row, eei),
     .when = has_chi,
     .desc = "extended elastic impedance (Whitcombe et al. 2002), "
             "[chi][sample]"},
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(imp_row, qc),
     .desc = "QC flags per sample"},
    {0},
};

static const proto_method m_impedance = {
    .name = "reflect.impedance",
    .summary = "Elastic impedance (EI, normalised EI) and extended elastic "
               "impedance logs.",
    .description =
        "vp, vs, rho logs; angle for EI and normalised EI, chi for EEI. "
        "k is one constant for the request (default the mean of "
        "(vs/vp)^2 over the possible samples) or \"sample\". Grids are "
        "[angle or chi][sample]. See reflect.md.",
    .params = &imp_decl,
    .outputs = imp_outputs,
    .prepare = imp_prepare,
    .kernel = imp_kernel,
    .row_size = sizeof(imp_row),
    .qc_offset = offsetof(imp_row, qc),
    .cells = {{ei_cell, 1, sizeof(ei_row), offsetof(ei_row, qc), 1},
              {eei_cell, 2, sizeof(eei_row), offsetof(eei_row, qc), 1}},
    .cost = 2,
};

/* ---- reflect.vti -------------------------------------------------------- */

typedef struct vti_medium {
	proto_hdr hdr;
	proto_vec vp0, vs0, rho, epsilon, delta, gamma;
} vti_medium;

static const proto_field vti_medium_fields[] = {
    {PROTO_NUMS(vti_medium, vp0, PK_VELOCITY, PF_REQ | PF_NULLS,
                "vertical P velocity")},
    {PROTO_NUMS(vti_medium, vs0, PK_VELOCITY, PF_REQ | PF_NULLS,
                "vertical S velocity")},
    {PROTO_NUMS(vti_medium, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    {PROTO_NUMS(vti_medium, epsilon, PK_NONE, PF_REQ | PF_NULLS,
                "Thomsen epsilon")},
    {PROTO_NUMS(vti_medium, delta, PK_NONE, PF_REQ | PF_NULLS,
                "Thomsen delta")},
    {PROTO_NUMS(vti_medium, gamma, PK_NONE, PF_NULLS | PF_DFLT,
                "Thomsen gamma (not used by PP reflectivity; default 0)"),
     .dflt = 0},
    {0},
};
static const proto_decl vti_medium_decl = {
    .name = "vtiMedium",
    .fields = vti_medium_fields,
    .size = sizeof(vti_medium),
    .desc = "a VTI medium by its Thomsen parameters",
};

typedef struct vti_args {
	proto_hdr hdr;
	vti_medium upper, lower;
	proto_vec angle;
} vti_args;

static const proto_field vti_fields[] = {
    {PROTO_FIELD(vti_args, upper, PT_OBJ, PF_REQ, "the upper medium"),
     .sub = &vti_medium_decl},
    {PROTO_FIELD(vti_args, lower, PT_OBJ, PF_REQ, "the lower medium"),
     .sub = &vti_medium_decl},
    ANGLE_FIELD(vti_args, PF_HI_OPEN,
                "incidence angles, 0 to below 90 deg (default 0)"),
    {0},
};
static const proto_decl vti_decl = {
    .name = "",
    .fields = vti_fields,
    .size = sizeof(vti_args),
};

static rw_aniso_thomsen thomsen_at(const vti_medium *m, size_t i)
{
	rw_aniso_thomsen t;
	t.vp0_ms = proto_at(&m->vp0, i);
	t.vs0_ms = proto_at(&m->vs0, i);
	t.rho_kgm3 = proto_at(&m->rho, i);
	t.epsilon = proto_at(&m->epsilon, i);
	t.delta = proto_at(&m->delta, i);
	t.gamma = proto_at(&m->gamma, i);
	return t;
}

/* QC bits of one Ruger medium: missing/non-finite, density, or a medium
 * the core refuses (vs0 outside [0, vp0), an anisotropic fluid, no real
 * C13 or a stiffness that is not positive definite). */
static uint64_t vti_flags(const rw_aniso_thomsen *t)
{
	double r;

	if (isnan(t->vp0_ms) || isnan(t->vs0_ms) || isnan(t->rho_kgm3) ||
	    isnan(t->epsilon) || isnan(t->delta) || isnan(t->gamma))
		return QC_LOG_MISSING | QC_REFL_MEDIUM;
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

typedef struct vti_row {
	rw_aniso_thomsen u, l;
	uint64_t qc;
} vti_row;

typedef struct vti_cell_row {
	double r, ri;
	uint64_t qc;
} vti_cell_row;

static int vti_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const vti_args *a = args;
	vti_row *r = row;

	(void)ws;
	r->u = thomsen_at(&a->upper, i);
	r->l = thomsen_at(&a->lower, i);
	*qc = vti_flags(&r->u) | vti_flags(&r->l);
	return 0;
}

static int vti_cell(const void *args, size_t i, size_t j, void *srow,
                    void *crow, uint64_t *qc, void *ws)
{
	const vti_args *a = args;
	const vti_row *s = srow;
	vti_cell_row *o = crow;
	rw_aniso_thomsen ui = s->u, li = s->l;
	double th = proto_at(&a->angle, j);

	(void)i, (void)ws;
	o->r = o->ri = NAN;
	*qc = s->qc;
	if (s->qc & QC_REFL_MEDIUM)
		return 0;
	ui.epsilon = ui.delta = ui.gamma = 0;
	li.epsilon = li.delta = li.gamma = 0;
	if (rw_aniso_ruger_pp(&s->u, &s->l, th, &o->r) != RW_OK ||
	    rw_aniso_ruger_pp(&ui, &li, th, &o->ri) != RW_OK)
		*qc |= QC_REFL_UNDEFINED;
	return 0;
}

static const proto_output vti_outputs[] = {
    {.name = "n_interfaces",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 0,
     .desc = "interfaces"},
    {.name = "n_angles",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 1,
     .desc = "angles"},
    {.name = "angle",
     .type = PO_VEC,
     .kind = PK_ANGLE,
     .dim = D_CELL,
     .offset = offsetof(vti_args, angle),
     .desc = "the angles"},
    {.name = "rpp_ruger",
     .type = PO_NUM,
     .dim = D_CELL,
     .offset = offsetof(vti_cell_row, r),
     .desc = "Ruger 1997 VTI PP reflectivity"},
    {.name = "rpp_isotropic",
     .type = PO_NUM,
     .dim = D_CELL,
     .offset = offsetof(vti_cell_row, ri),
     .desc = "the same with epsilon = delta = 0"},
    {.name = "qc",
     .type = PO_FLAGS,
     .dim = D_CELL,
     .offset = offsetof(vti_cell_row, qc),
     .desc = "QC flags per interface and angle"},
    {0},
};

static const proto_method m_vti = {
    .name = "reflect.vti",
    .summary = "Ruger PP reflectivity between two VTI media.",
    .description = "upper and lower VTI media (vp0, vs0, rho, epsilon, "
                   "delta, gamma) and angles; grids are "
                   "[interface][angle]. Pre-critical small-angle form "
                   "(Ruger 1997). See reflect.md.",
    .params = &vti_decl,
    .outputs = vti_outputs,
    .kernel = vti_kernel,
    .row_size = sizeof(vti_row),
    .qc_offset = offsetof(vti_row, qc),
    .cells = {{vti_cell, 1, sizeof(vti_cell_row), offsetof(vti_cell_row, qc),
               0}},
};

const proto_method *const proto_reflect_methods[] = {
    &m_interface, &m_series, &m_impedance, &m_vti, NULL};
