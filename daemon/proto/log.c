/* The log family: log.process turns well-log samples (a block of depths,
 * or one real-time sample) into the elastic set with per-sample QC:
 * slowness or velocity, bulk density with its correction curve, caliper
 * against bit size, gamma ray or shale volume. Missing shear velocity or
 * density may be predicted by published empirical relations (flagged as
 * predicted, never passed off as measured), and with a fluid scenario the
 * Gassmann-substituted curves are added beside the measured ones. All
 * physics is in the core: elastic.h, empirical.h, fluid.h, mineral.h and
 * rock.h. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/lith.h"
#include "rockwire/elastic.h"
#include "rockwire/empirical.h"
#include "rockwire/fluid.h"
#include "rockwire/mineral.h"
#include "rockwire/rock.h"

#define S(name, kind)                                                          \
	{                                                                      \
		name, PT_NUMS, kind, PP_NULLS, 0                               \
	}

static const proto_param process_params[] = {
    S("depth", PK_LENGTH),
    S("dtp", PK_SLOWNESS),
    S("dts", PK_SLOWNESS),
    S("vp", PK_VELOCITY),
    S("vs", PK_VELOCITY),
    S("rhob", PK_DENSITY),
    S("drho", PK_DENSITY),
    S("caliper", PK_LENGTH),
    S("bit_size", PK_LENGTH),
    S("gr", PK_NONE),
    S("vsh", PK_NONE),
    S("porosity", PK_NONE),
    S("pressure", PK_PRESSURE),
    S("temperature", PK_TEMPERATURE),
    {"gr_clean", PT_NUM, PK_NONE, 0, 0},
    {"gr_shale", PT_NUM, PK_NONE, 0, 0},
    {"vs_predict", PT_STR, PK_NONE, 0, 0},
    {"rho_predict", PT_STR, PK_NONE, 0, 0},
    {"rho_replace_bad", PT_BOOL, PK_NONE, 0, 0},
    {"gardner_a", PT_NUM, PK_NONE, 0, 0},
    {"gardner_b", PT_NUM, PK_NONE, 0, 0},
    {"lithology", PT_ANY, PK_NONE, 0, 0},
    {"drho_limit", PT_NUM, PK_DENSITY, 0, 0},
    {"washout_limit", PT_NUM, PK_LENGTH, 0, 0},
    {"mineral", PT_ANY, PK_NONE, 0, 0},
    {"fluid_in_place", PT_OBJ, PK_NONE, 0, 0},
    {"fluid_new", PT_OBJ, PK_NONE, 0, 0},
    {"pressure_gradient", PT_NUM, PK_GRADIENT_P, 0, 0},
    {"temperature_gradient", PT_NUM, PK_GRADIENT_T, 0, 0},
    {"surface_pressure", PT_NUM, PK_PRESSURE, 0, 0},
    {"surface_temperature", PT_NUM, PK_TEMPERATURE, 0, 0},
    {"qc", PT_OBJ, PK_NONE, 0, 0},
    {NULL, PT_ANY, PK_NONE, 0, 0},
};

/* Default density-correction limit: |DRHO| above 0.05 g/cm3 marks the
 * density as doubtful (common practice quotes 0.05-0.10 g/cm3; the strict
 * end is taken because results may feed drilling decisions). */
#define DRHO_LIMIT_KGM3 50.0
/* Default washout limit: caliper more than 1 in (0.0254 m) over bit size
 * (common practice: pad-contact density and sonic readings degrade once
 * the hole is enlarged by about an inch or more). */
#define WASHOUT_LIMIT_M 0.0254
/* Standard atmosphere, MPa (definition), the default surface pressure. */
#define ATM_MPA 0.101325

/* ---- the method --------------------------------------------------------- */

enum { VSP_NONE, VSP_GC, VSP_MUDROCK };
static const char *const vs_pred_names[] = {"none", "greenberg_castagna",
                                            "mudrock", NULL};
static const char *const rho_pred_names[] = {"none", "gardner", NULL};

/* Output columns, in result order: the elastic set per sample, then the
 * substituted set. */
typedef struct log_out {
	double vp, vs, rho, k, mu, lambda, e, nu, ai, si, vpvs, vsh;
	double vp_sub, vs_sub, rho_sub, k_sub, ai_sub, si_sub, vpvs_sub, nu_sub,
	    k_fl_in_place, rho_fl_in_place, k_fl_new, rho_fl_new;
} log_out;

#define COL(m, kind)                                                           \
	{                                                                      \
#m, kind, offsetof(log_out, m)                                 \
	}
static const struct {
	const char *name;
	proto_kind kind;
	size_t off;
} out_cols[] = {
    COL(vp, PK_VELOCITY),
    COL(vs, PK_VELOCITY),
    COL(rho, PK_DENSITY),
    COL(k, PK_MODULUS),
    COL(mu, PK_MODULUS),
    COL(lambda, PK_MODULUS),
    COL(e, PK_MODULUS),
    COL(nu, PK_NONE),
    COL(ai, PK_IMPEDANCE),
    COL(si, PK_IMPEDANCE),
    COL(vpvs, PK_NONE),
    COL(vsh, PK_NONE),
    COL(vp_sub, PK_VELOCITY),
    COL(vs_sub, PK_VELOCITY),
    COL(rho_sub, PK_DENSITY),
    COL(k_sub, PK_MODULUS),
    COL(ai_sub, PK_IMPEDANCE),
    COL(si_sub, PK_IMPEDANCE),
    COL(vpvs_sub, PK_NONE),
    COL(nu_sub, PK_NONE),
    COL(k_fl_in_place, PK_MODULUS),
    COL(rho_fl_in_place, PK_DENSITY),
    COL(k_fl_new, PK_MODULUS),
    COL(rho_fl_new, PK_DENSITY),
};
#undef COL
#define N_ELASTIC_COLS 11 /* vp .. vpvs */
#define COL_VSH        11
#define COL_SUB        12

/* Velocity from a velocity or a slowness vector (exactly one present or
 * neither); NaN when missing or not positive. */
static double vel(const proto_vec *v, const proto_vec *dt, size_t i)
{
	if (v->present)
		return proto_at(v, i);
	if (dt->present) {
		double s = proto_at(dt, i);
		return s > 0 ? 1.0 / s : (isnan(s) ? NAN : -1.0);
	}
	return NAN;
}

static int either(proto_call *c, const char *a, const char *b)
{
	if (proto_item_of(&c->args, a) && proto_item_of(&c->args, b))
		return proto_fail(c, PROTO_INVALID_PARAMS, b,
		                  "give %s or %s, not both", a, b);
	return 0;
}

/* Pressure (MPa) and temperature (degC) of sample i: the curves when
 * given, else surface value + gradient x depth. */
typedef struct pt_src {
	const proto_vec *p, *t, *depth;
	double p0, gp, t0, gt;
} pt_src;

static void pt_at(const pt_src *s, size_t i, double *p, double *t)
{
	double z = s->depth->present ? proto_at(s->depth, i) : NAN;
	*p = s->p->present ? proto_at(s->p, i) : s->p0 + s->gp * z;
	*t = s->t->present ? proto_at(s->t, i) : s->t0 + s->gt * z;
}

/* Parameters that only fluid descriptions at reservoir conditions use. */
static const char *const pt_names[] = {
    "pressure",          "temperature",
    "pressure_gradient", "temperature_gradient",
    "surface_pressure",  "surface_temperature",
};

/* A parameter given in the request that this request does not use is an
 * error (it would be silently ignored); one inherited from the session is
 * let pass, since sessions hold defaults for several kinds of request.
 * Returns 1 after proto_fail, else 0. */
static int unused(proto_call *c, const char *name)
{
	if (!proto_item_of(&c->args, name) || proto_arg_inherited(c, name))
		return 0;
	proto_fail(c, PROTO_INVALID_PARAMS, name,
	           "not used by this request: it serves fluid substitution "
	           "(fluid_in_place and fluid_new described by phases at "
	           "reservoir conditions)");
	return 1;
}

static int pt_check(proto_call *c, pt_src *s)
{
	const proto_args *a = &c->args;
	int need_depth = 0;

	s->p = proto_vec_of(a, "pressure");
	s->t = proto_vec_of(a, "temperature");
	s->depth = proto_vec_of(a, "depth");
	s->gp = proto_num_or(a, "pressure_gradient", NAN);
	s->gt = proto_num_or(a, "temperature_gradient", NAN);
	s->p0 = proto_num_or(a, "surface_pressure", ATM_MPA);
	s->t0 = proto_num_or(a, "surface_temperature", NAN);
	if (!s->p->present) {
		if (!isfinite(s->gp))
			return proto_fail(c, PROTO_INVALID_PARAMS, "pressure",
			                  "fluid descriptions need the pore "
			                  "pressure: give pressure, or "
			                  "pressure_gradient with depth");
		need_depth = 1;
	}
	if (!s->t->present) {
		if (!isfinite(s->gt))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "temperature",
			                  "fluid descriptions need the "
			                  "temperature: give temperature, or "
			                  "temperature_gradient with "
			                  "surface_temperature and depth");
		if (!isfinite(s->t0))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "surface_temperature",
			                  "required with temperature_gradient");
		need_depth = 1;
	}
	if (need_depth && !s->depth->present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "depth",
		                  "required to apply pressure_gradient or "
		                  "temperature_gradient (depth is taken as "
		                  "true vertical depth below the surface)");
	return 0;
}

/* A fluid or mineral description with arrays must match the samples. */
static int desc_len_check(proto_call *c, size_t dn, int darr, const char *from,
                          size_t n, int arr)
{
	if (!darr || (arr && dn == n))
		return 0;
	return proto_fail(c, PROTO_INVALID_PARAMS, from,
	                  "array length %zu does not match the %zu log "
	                  "sample(s); give one value or one per sample",
	                  dn, n);
}

static int process(proto_call *c)
{
	const proto_args *a = &c->args;
	const proto_vec *vp = proto_vec_of(a, "vp"),
	                *dtp = proto_vec_of(a, "dtp");
	const proto_vec *vs = proto_vec_of(a, "vs"),
	                *dts = proto_vec_of(a, "dts");
	const proto_vec *rhob = proto_vec_of(a, "rhob");
	const proto_vec *drho = proto_vec_of(a, "drho");
	const proto_vec *cal = proto_vec_of(a, "caliper");
	const proto_vec *bs = proto_vec_of(a, "bit_size");
	const proto_vec *gr = proto_vec_of(a, "gr");
	const proto_vec *vshv = proto_vec_of(a, "vsh");
	const proto_vec *phi = proto_vec_of(a, "porosity");
	const proto_vec *depth = proto_vec_of(a, "depth");
	double ga = proto_num_or(a, "gardner_a", RW_EMP_GARDNER_A);
	double gb = proto_num_or(a, "gardner_b", RW_EMP_GARDNER_B);
	double drho_lim = proto_num_or(a, "drho_limit", DRHO_LIMIT_KGM3);
	double wash_lim = proto_num_or(a, "washout_limit", WASHOUT_LIMIT_M);
	double gr0 = proto_num_or(a, "gr_clean", NAN);
	double gr1 = proto_num_or(a, "gr_shale", NAN);
	int replace_bad = proto_bool_or(a, "rho_replace_bad", 0);
	double lith[RW_EMP_NLITH], rock_sum;
	proto_qc_ranges ranges;
	struct proto_fluid_desc *f_old = NULL, *f_new = NULL;
	struct proto_mineral_desc *mineral = NULL;
	const char *from;
	size_t dn;
	pt_src pts = {NULL, NULL, NULL, 0, 0, 0, 0};
	int vsp, rhop, subst, have_vsh, is_arr, need_pt = 0;
	size_t n = a->n[0];
	int arr = a->any_array[0];
	log_out *o;
	uint32_t *flags;

	if (either(c, "vp", "dtp") || either(c, "vs", "dts") ||
	    either(c, "vsh", "gr"))
		return -1;
	if (!vp->present && !dtp->present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "dtp",
		                  "give the compressional log: dtp or vp");
	if (!vs->present && !dts->present && !proto_item_of(a, "vs_predict"))
		return proto_fail(c, PROTO_INVALID_PARAMS, "dts",
		                  "give the shear log (dts or vs), or "
		                  "vs_predict \"greenberg_castagna\" or "
		                  "\"mudrock\"");
	if (!rhob->present && !proto_item_of(a, "rho_predict"))
		return proto_fail(c, PROTO_INVALID_PARAMS, "rhob",
		                  "give the density log rhob, or "
		                  "rho_predict \"gardner\"");
	if (cal->present != bs->present)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  cal->present ? "bit_size" : "caliper",
		                  "the washout check needs both caliper and "
		                  "bit_size");
	if (gr->present && !(isfinite(gr0) && isfinite(gr1) && gr1 > gr0))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  isfinite(gr0) ? "gr_shale" : "gr_clean",
		                  "gr needs gr_clean and gr_shale (API units, "
		                  "gr_shale > gr_clean) for the linear "
		                  "gamma-ray index");
	if (!gr->present &&
	    (proto_item_of(a, "gr_clean") || proto_item_of(a, "gr_shale")))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_item_of(a, "gr_clean") ? "gr_clean"
		                                               : "gr_shale",
		                  "used only with gr");
	vsp = proto_enum_of(c, a, "vs_predict", vs_pred_names, VSP_NONE);
	rhop = proto_enum_of(c, a, "rho_predict", rho_pred_names, 0);
	if (vsp < 0 || rhop < 0)
		return -1;
	if (replace_bad && rhop == 0)
		return proto_fail(c, PROTO_INVALID_PARAMS, "rho_replace_bad",
		                  "replacing doubtful density needs "
		                  "rho_predict \"gardner\"");
	if (rhop == 0 &&
	    (proto_item_of(a, "gardner_a") || proto_item_of(a, "gardner_b")))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_item_of(a, "gardner_a") ? "gardner_a"
		                                                : "gardner_b",
		                  "used only with rho_predict \"gardner\"");
	if (!(ga > 0) || !(gb > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  ga > 0 ? "gardner_b" : "gardner_a",
		                  "must be > 0");
	if (!(drho_lim > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "drho_limit",
		                  "must be > 0");
	if (!(wash_lim > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "washout_limit",
		                  "must be > 0");
	if (proto__lith_parse(c, proto_item_of(a, "lithology"), "lithology",
	                      lith))
		return -1;
	have_vsh = vshv->present || gr->present;
	rock_sum = lith[RW_EMP_SANDSTONE] + lith[RW_EMP_LIMESTONE] +
	           lith[RW_EMP_DOLOMITE];
	if (vsp == VSP_GC && have_vsh && !(rock_sum > 0))
		return proto_fail(c, PROTO_INVALID_PARAMS, "lithology",
		                  "with vsh or gr the shale fraction comes "
		                  "from the log; lithology must name at "
		                  "least one of sandstone, limestone, "
		                  "dolomite for the rest");
	proto_qc_ranges_default(&ranges);
	if (proto_qc_ranges_parse(c, proto_item_of(a, "qc"), "qc.", &ranges))
		return -1;
	if (proto_item_of(a, "fluid_in_place") &&
	    !(f_old = proto__fluid_desc_parse(
	          c, proto_item_of(a, "fluid_in_place"), "fluid_in_place.")))
		return -1;
	if (proto_item_of(a, "fluid_new") &&
	    !(f_new = proto__fluid_desc_parse(c, proto_item_of(a, "fluid_new"),
	                                      "fluid_new.")))
		return -1;
	subst = f_new != NULL;
	if (!f_old != !f_new)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  f_old ? "fluid_new" : "fluid_in_place",
		                  "fluid substitution needs both "
		                  "fluid_in_place and fluid_new");
	if (!subst && (unused(c, "mineral") || unused(c, "porosity")))
		return -1;
	if (subst) {
		if (!phi->present)
			return proto_fail(c, PROTO_INVALID_PARAMS, "porosity",
			                  "fluid substitution needs the "
			                  "porosity log");
		if (!proto_item_of(a, "mineral"))
			return proto_fail(c, PROTO_INVALID_PARAMS, "mineral",
			                  "fluid substitution needs the "
			                  "mineral: a table name, {k, rho} "
			                  "or a mix");
		mineral = proto__mineral_desc_parse(
		    c, proto_item_of(a, "mineral"), "mineral");
		if (!mineral)
			return -1;
		dn = proto__fluid_desc_len(f_old, &is_arr, &from);
		if (desc_len_check(c, dn, is_arr, from, n, arr))
			return -1;
		dn = proto__fluid_desc_len(f_new, &is_arr, &from);
		if (desc_len_check(c, dn, is_arr, from, n, arr))
			return -1;
		dn = proto__mineral_desc_len(mineral, &is_arr, &from);
		if (desc_len_check(c, dn, is_arr, from, n, arr))
			return -1;
		need_pt = proto__fluid_desc_needs_pt(f_old) ||
		          proto__fluid_desc_needs_pt(f_new);
		if (need_pt && pt_check(c, &pts))
			return -1;
	}
	if (!need_pt)
		for (size_t k = 0; k < sizeof pt_names / sizeof pt_names[0];
		     k++)
			if (unused(c, pt_names[k]))
				return -1;
	if (proto_check_size(c, n, n))
		return -1;
	o = proto_alloc(c, n * sizeof *o);
	flags = proto_alloc(c, n * sizeof *flags);
	if (!o || !flags)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for %zu samples", n);

	for (size_t i = 0; i < n; i++) {
		log_out *r = &o[i];
		uint32_t fl = 0;
		unsigned why = 0, warn = 0;
		double v_p = vel(vp, dtp, i), v_s = vel(vs, dts, i);
		double rho = rhob->present ? proto_at(rhob, i) : NAN;
		double vsh = NAN;
		int bad_rho = 0, vsp_block = 0;
		rw_elastic e;

		for (size_t k = 0; k < sizeof out_cols / sizeof out_cols[0];
		     k++) {
			const double nan = NAN;
			memcpy((unsigned char *)r + out_cols[k].off, &nan,
			       sizeof nan);
		}
		if (drho->present) {
			double d = proto_at(drho, i);
			if (isnan(d))
				fl |= QC_LOG_MISSING;
			else if (fabs(d) > drho_lim)
				fl |= QC_DRHO_HIGH, bad_rho = 1;
		}
		if (cal->present) {
			double cl = proto_at(cal, i), b = proto_at(bs, i);
			if (isnan(cl) || isnan(b))
				fl |= QC_LOG_MISSING;
			else if (cl - b > wash_lim)
				fl |= QC_WASHOUT, bad_rho = 1;
		}
		if (vshv->present) {
			vsh = proto_at(vshv, i);
			if (isnan(vsh))
				fl |= QC_LOG_MISSING;
			else if (vsh < 0 || vsh > 1)
				fl |= QC_INPUT_INVALID, vsh = NAN;
		} else if (gr->present) {
			/* Linear gamma-ray index, clipped to [0, 1] (common
			 * practice; a normalisation, not a rock relation). */
			double g = proto_at(gr, i);
			if (isnan(g))
				fl |= QC_LOG_MISSING;
			else
				vsh = fmin(1, fmax(0, (g - gr0) / (gr1 - gr0)));
		}
		r->vsh = vsh;
		if (isnan(v_p))
			fl |= QC_LOG_MISSING;
		if (isnan(v_s) && (vs->present || dts->present))
			fl |= QC_LOG_MISSING;
		if (isnan(rho) && rhob->present)
			fl |= QC_LOG_MISSING;
		/* A velocity, slowness or density <= 0 has no meaning: the
		 * sample is impossible and nothing is predicted over it. */
		if (!isnan(v_p) && !(v_p > 0))
			fl |= QC_INPUT_INVALID, v_p = NAN, vsp_block = 1;
		if (!isnan(v_s) && !(v_s > 0))
			fl |= QC_INPUT_INVALID, v_s = NAN, vsp_block = 1;
		if (!isnan(rho) && !(rho > 0))
			fl |= QC_RHO_NONPOSITIVE, rho = NAN, vsp_block = 1;
		if (vsp_block) {
			/* no predictions for an impossible sample */
		} else if (isnan(rho) || (bad_rho && replace_bad)) {
			if (rhop == 1 && !isnan(v_p)) {
				if (rw_emp_gardner_density(v_p, ga, gb, &rho,
				                           &warn) == RW_OK)
					fl |= QC_RHO_PREDICTED |
					      proto__emp_qc(warn);
			}
		}
		if (!vsp_block && isnan(v_s) && vsp != VSP_NONE &&
		    !isnan(v_p)) {
			int st;
			warn = 0;
			if (vsp == VSP_MUDROCK) {
				st = rw_emp_mudrock_vs(v_p, &v_s, &warn);
			} else {
				double fr[RW_EMP_NLITH];
				memcpy(fr, lith, sizeof fr);
				if (have_vsh && !isnan(vsh)) {
					for (int j = 0; j < RW_EMP_SHALE; j++)
						fr[j] = lith[j] / rock_sum *
						        (1 - vsh);
					fr[RW_EMP_SHALE] = vsh;
				}
				st = have_vsh && isnan(vsh)
				         ? RW_EDOM
				         : rw_emp_gc_vs_mixed(v_p, fr, &v_s,
				                              &warn);
			}
			if (st == RW_OK)
				fl |= QC_VS_PREDICTED | proto__emp_qc(warn);
			else
				v_s = NAN;
		}
		r->vp = v_p, r->vs = v_s, r->rho = rho;
		if (rw_elastic_from_velocities(v_p, v_s, rho, &e, &why) ==
		    RW_OK) {
			fl |= proto_qc_plausible(&ranges, &e);
			r->k = e.k, r->mu = e.mu, r->lambda = e.lambda;
			r->e = e.e, r->nu = e.nu, r->ai = e.ai, r->si = e.si;
			r->vpvs = e.vpvs;
		} else {
			fl |= proto_qc_impossible(why) | QC_INPUT_INVALID;
			if (!vsp_block &&
			    (isnan(v_s) || isnan(v_p) || isnan(rho)))
				fl |= QC_LOG_MISSING;
		}
		if (subst) {
			rw_rock_subst sb;
			double p = NAN, t = NAN, ph = proto_at(phi, i);
			double k_min = NAN, rho_min, kfo, rfo, kfn, rfn;
			uint32_t q1 = 0, q2 = 0;
			unsigned gw = 0;
			int st;
			if (need_pt)
				pt_at(&pts, i, &p, &t);
			proto__fluid_desc_eval(f_old, i, p, t, &kfo, &rfo, &q1);
			proto__fluid_desc_eval(f_new, i, p, t, &kfn, &rfn, &q2);
			fl |= q1 | q2;
			r->k_fl_in_place = kfo, r->rho_fl_in_place = rfo;
			r->k_fl_new = kfn, r->rho_fl_new = rfn;
			if (isnan(ph))
				fl |= QC_LOG_MISSING;
			st = proto__mineral_desc_eval(mineral, i, &k_min,
			                              &rho_min);
			if (st == RW_OK)
				st = rw_rock_fluid_subst(v_p, v_s, rho, ph,
				                         k_min, kfo, rfo, kfn,
				                         rfn, &sb, &gw);
			if (gw &
			    (RW_ROCK_WARN_KDRY_NEG | RW_ROCK_WARN_KDRY_GT_KMIN))
				fl |= QC_GASSMANN_KDRY;
			if (gw & RW_ROCK_WARN_PHI_LOW)
				fl |= QC_GASSMANN_PHI_LOW;
			/* A dry frame softer than nothing or stiffer than its
			 * mineral means the inputs contradict Gassmann: no
			 * substituted values (as rock.substitute). */
			if (st == RW_OK &&
			    !(gw & (RW_ROCK_WARN_KDRY_NEG |
			            RW_ROCK_WARN_KDRY_GT_KMIN)) &&
			    rw_elastic_from_velocities(sb.vp_ms, sb.vs_ms,
			                               sb.rho_kgm3, &e,
			                               &why) == RW_OK) {
				r->vp_sub = sb.vp_ms, r->vs_sub = sb.vs_ms;
				r->rho_sub = sb.rho_kgm3,
				r->k_sub = sb.k_sat_pa;
				r->ai_sub = e.ai, r->si_sub = e.si;
				r->vpvs_sub = e.vpvs, r->nu_sub = e.nu;
				if (gw || q1 || q2)
					fl |= QC_SUBST_CAUTION;
			} else {
				fl |= QC_SUBST_FAILED;
			}
		}
		flags[i] = fl;
	}

	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	if (depth->present) {
		double *z = proto_alloc_doubles(c, n);
		if (!z)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory for %zu samples", n);
		for (size_t i = 0; i < n; i++)
			z[i] = proto_at(depth, i);
		proto_w_vec(c, "depth", PK_LENGTH, z, n, 1, arr);
	}
	for (size_t k = 0; k < sizeof out_cols / sizeof out_cols[0]; k++) {
		if (k == COL_VSH && !have_vsh)
			continue;
		if (k >= COL_SUB && !subst)
			break;
		proto_w_rows(c, out_cols[k].name, out_cols[k].kind, o,
		             sizeof *o, out_cols[k].off, n, arr);
	}
	proto_w_flags(c, "qc", flags, n, arr);
	if (vsp == VSP_NONE)
		proto_w_null(c, "vs_predicted_by");
	else
		proto_w_str(c, "vs_predicted_by", vs_pred_names[vsp]);
	if (rhop == 0)
		proto_w_null(c, "rho_predicted_by");
	else
		proto_w_str(c, "rho_predicted_by", rho_pred_names[rhop]);
	if (subst)
		proto_w_str(c, "substitution", "gassmann");
	else
		proto_w_null(c, "substitution");
	proto_w_units(c);
	proto_w_obj_end(c);
	return 0;
}

const proto_method proto_log_methods[] = {
    {"log.process", process, process_params,
     "Elastic set and QC flags from well-log samples, with optional "
     "predicted shear or density and Gassmann-substituted curves."},
    {NULL, NULL, NULL, NULL},
};
