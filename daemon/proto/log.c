/* The log family: log.process turns well-log samples (a block of depths,
 * or one real-time sample) into the elastic set with per-sample QC:
 * slowness or velocity, bulk density with its correction curve, caliper
 * against bit size, gamma ray or shale volume. Missing shear velocity or
 * density may be predicted by published empirical relations (flagged as
 * predicted, never passed off as measured), and with a fluid scenario the
 * Gassmann-substituted curves are added beside the measured ones. With
 * the `pressures` option the overburden, hydrostatic, pore-pressure and
 * fracture-gradient curves are added too, through the pressure family's
 * chain (pres.h), whose running integrals continue from one request to
 * the next by a state token. All physics is in the core: elastic.h,
 * empirical.h, fluid.h, mineral.h, rock.h and pressure.h. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "proto/pres.h"
#include "proto/table.h"
#include "rockwire/elastic.h"
#include "rockwire/empirical.h"
#include "rockwire/fluid.h"
#include "rockwire/mineral.h"
#include "rockwire/rock.h"

/* Default density-correction limit: |DRHO| above 0.05 g/cm3 marks the
 * density as doubtful (common practice quotes 0.05-0.10 g/cm3; the strict
 * end is taken because results may feed drilling decisions). */
#define DRHO_LIMIT_KGM3 50.0
/* Default washout limit: caliper more than 1 in (0.0254 m) over bit size
 * (common practice: pad-contact density and sonic readings degrade once
 * the hole is enlarged by about an inch or more). */
#define WASHOUT_LIMIT_M 0.0254
/* Drilled holes run from about 3 in to 30 in (common practice); a bit
 * size outside is most likely in another unit. */
#define BIT_SIZE_MIN_M (3 * 0.0254)
#define BIT_SIZE_MAX_M (30 * 0.0254)
/* Standard atmosphere, MPa (definition), the default surface pressure. */
#define ATM_MPA 0.101325

enum { VSP_NONE, VSP_GC, VSP_MUDROCK, VSP_GC_INSITU };
static const char *const vs_pred_names[] = {
    "none", "greenberg_castagna", "mudrock", "greenberg_castagna_insitu", NULL};
static const char *const rho_pred_names[] = {"none", "gardner", NULL};

typedef struct log_args {
	proto_hdr hdr;
	proto_vec depth, dtp, dts, vp, vs, rhob, drho, caliper, bit_size;
	proto_vec gr, vsh, porosity, pressure, temperature;
	proto_vec gr_clean, gr_shale;
	int vs_predict, rho_predict, rho_replace_bad;
	proto_vec gardner_a, gardner_b;
	proto_lith lithology;
	proto_vec drho_limit, washout_limit;
	proto_mineral mineral;
	proto_fluid fluid_in_place, fluid_new, brine;
	proto_vec pressure_gradient, temperature_gradient;
	proto_vec surface_pressure, surface_temperature;
	proto_qc_ranges qc;
	proto_vec tvd;
	proto_pres_log pressures;
	/* derived */
	int subst, need_pt, have_vsh, washout, insitu;
	double rock_sum;
	struct log_row *pre; /* pressures: rows computed by prepare */
	pres_setup *pset;
} log_args;

#define S(m, k_, text)                                                         \
	{                                                                      \
		PROTO_NUMS(log_args, m, k_, PF_NULLS, text)                    \
	}
#define SCALAR(m, k_, fl, text)                                                \
	PROTO_NUMS(log_args, m, k_, PF_SCALAR | (fl), text)
static const proto_field log_fields[] = {
    S(depth, PK_LENGTH, "measured or true vertical depth of each sample"),
    S(dtp, PK_SLOWNESS, "compressional slowness (or vp)"),
    S(dts, PK_SLOWNESS, "shear slowness (or vs)"),
    S(vp, PK_VELOCITY, "P velocity (instead of dtp)"),
    S(vs, PK_VELOCITY, "S velocity (instead of dts)"),
    S(rhob, PK_DENSITY, "bulk density"),
    S(drho, PK_DENSITY, "density correction curve"),
    S(caliper, PK_LENGTH, "caliper (hole diameter)"),
    S(bit_size, PK_LENGTH,
      "bit size (the washout check compares the caliper with it)"),
    S(gr, PK_NONE, "gamma ray, API units (for the shale fraction)"),
    {PROTO_NUMS(log_args, vsh, PK_NONE, PF_NULLS,
                "shale volume fraction (instead of gr); values outside "
                "[0, 1] are flagged input_invalid")},
    {PROTO_NUMS(log_args, porosity, PK_NONE, PF_NULLS | PF_FRACTION,
                "porosity (fraction), for fluid substitution")},
    S(pressure, PK_PRESSURE, "pore pressure, for fluids by phases"),
    S(temperature, PK_TEMPERATURE, "temperature, for fluids by phases"),
    {PROTO_NUMS(log_args, gr_clean, PK_NONE, 0,
                "gamma ray of clean rock (with gr)")},
    {PROTO_NUMS(log_args, gr_shale, PK_NONE, 0,
                "gamma ray of shale (with gr, above gr_clean)")},
    {.name = "vs_predict",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(log_args, vs_predict),
     .choices = vs_pred_names,
     .dflt_choice = VSP_NONE,
     .desc = "predict a missing shear log: greenberg_castagna (brine "
             "rock), mudrock (Castagna et al. 1985), or "
             "greenberg_castagna_insitu (their iteration through Gassmann "
             "for hydrocarbon-bearing rock: needs fluid_in_place, brine, "
             "porosity and mineral)"},
    {.name = "rho_predict",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(log_args, rho_predict),
     .choices = rho_pred_names,
     .dflt_choice = 0,
     .desc = "predict a missing density: gardner (Gardner et al. 1974)"},
    {PROTO_FIELD(log_args, rho_replace_bad, PT_BOOL, 0,
                 "also replace doubtful density (drho or washout) by the "
                 "prediction")},
    {PROTO_NUMS(log_args, gardner_a, PK_NONE, PF_DFLT | PF_LO | PF_LO_OPEN,
                "Gardner a, for rho in g/cm3 and vp in m/s (default 0.31)"),
     .dflt = RW_EMP_GARDNER_A, .lo = 0},
    {PROTO_NUMS(log_args, gardner_b, PK_NONE, PF_DFLT | PF_LO | PF_LO_OPEN,
                "Gardner b (default 0.25)"),
     .dflt = RW_EMP_GARDNER_B, .lo = 0},
    {PROTO_FIELD(log_args, lithology, PT_OBJ, 0,
                 "lithology for greenberg_castagna (default sandstone)"),
     .sub = &proto_lith_decl},
    {SCALAR(drho_limit, PK_DENSITY, PF_DFLT | PF_LO | PF_LO_OPEN,
            "|drho| above this flags the density (default 0.05 g/cm3); one "
            "QC rule for the request"),
     .dflt = DRHO_LIMIT_KGM3, .lo = 0},
    {SCALAR(washout_limit, PK_LENGTH, PF_DFLT | PF_LO | PF_LO_OPEN,
            "caliper - bit size above this flags a washout (default 1 in); "
            "one QC rule for the request"),
     .dflt = WASHOUT_LIMIT_M, .lo = 0},
    {PROTO_FIELD(log_args, mineral, PT_OBJ, 0,
                 "the mineral, for fluid substitution"),
     .sub = &proto_mineral_decl},
    {PROTO_FIELD(log_args, fluid_in_place, PT_OBJ, 0,
                 "the fluid in place (substitution, greenberg_castagna_"
                 "insitu)"),
     .sub = &proto_fluid_decl},
    {PROTO_FIELD(log_args, fluid_new, PT_OBJ, 0,
                 "the new fluid of the substitution"),
     .sub = &proto_fluid_decl},
    {PROTO_FIELD(log_args, brine, PT_OBJ, 0,
                 "the brine of the brine case (greenberg_castagna_insitu; "
                 "default the brine phase of fluid_in_place at full "
                 "saturation)"),
     .sub = &proto_fluid_decl},
    {SCALAR(pressure_gradient, PK_GRADIENT_P, 0,
            "an assumed pore-pressure gradient for the fluid model "
            "(pressure = surface_pressure + gradient x depth): an input "
            "for fluid properties, not a pore-pressure prediction")},
    {SCALAR(temperature_gradient, PK_GRADIENT_T, 0,
            "temperature gradient (with surface_temperature and depth)")},
    {SCALAR(surface_pressure, PK_PRESSURE, PF_DFLT,
            "pressure at depth 0 (default 1 atm)"),
     .dflt = ATM_MPA},
    {SCALAR(surface_temperature, PK_TEMPERATURE, 0,
            "temperature at depth 0 (with temperature_gradient)")},
    {PROTO_FIELD(log_args, qc, PT_OBJ, 0, "plausibility ranges"),
     .sub = &proto_qc_ranges_decl},
    S(tvd, PK_LENGTH,
      "true vertical depth below the datum of each sample, for the "
      "pressures when depth is measured depth (pressures.depth_is md)"),
    {PROTO_FIELD(log_args, pressures, PT_OBJ, 0,
                 "add the overburden, hydrostatic, pore-pressure and "
                 "fracture-gradient curves (screening estimates only; "
                 "pressure.md)"),
     .sub = &proto_pres_log_decl},
    {0},
};
#undef S
#undef SCALAR

static const char *const vp_dtp[] = {"vp", "dtp", NULL};
static const char *const dtp_vp[] = {"dtp", "vp", NULL};
static const char *const vs_dts[] = {"vs", "dts", NULL};
static const char *const vsh_gr[] = {"vsh", "gr", NULL};
static const char *const shear_src[] = {"dts", "vs", "vs_predict", NULL};
static const char *const rho_src[] = {"rhob", "rho_predict", NULL};
static const char *const gr_needs[] = {"gr_clean", "gr_shale", NULL};
static const char *const fluids[] = {"fluid_in_place", "fluid_new", NULL};
static const char *const subst_needs[] = {"porosity", "mineral", NULL};
static const char *const insitu_needs[] = {"fluid_in_place", "porosity",
                                           "mineral", NULL};
static const proto_rule log_rules[] = {
    {PR_AT_MOST, NULL, 1, vp_dtp, "give vp or dtp, not both"},
    {PR_AT_MOST, NULL, 1, vs_dts, "give vs or dts, not both"},
    {PR_AT_MOST, NULL, 1, vsh_gr, "give vsh or gr, not both"},
    {PR_AT_LEAST, NULL, 1, dtp_vp, "give the compressional log: dtp or vp"},
    {PR_AT_LEAST, NULL, 1, shear_src,
     "give the shear log (dts or vs), or vs_predict \"greenberg_castagna\" "
     "or \"mudrock\""},
    {PR_AT_LEAST, NULL, 1, rho_src,
     "give the density log rhob, or rho_predict \"gardner\""},
    {PR_REQUIRES, "gr", 0, gr_needs,
     "gr needs gr_clean and gr_shale (API units, gr_shale > gr_clean) for "
     "the linear gamma-ray index"},
    {PR_REQUIRES, "fluid_new", 0, fluids,
     "fluid substitution needs both fluid_in_place and fluid_new"},
    {PR_REQUIRES, "fluid_new", 0, subst_needs,
     "fluid substitution needs the porosity log and the mineral (a table "
     "name, {k, rho} or a mix)"},
    {PR_REQUIRES, "vs_predict=greenberg_castagna_insitu", 0, insitu_needs,
     "greenberg_castagna_insitu needs fluid_in_place, porosity and "
     "mineral: it takes the rock to brine by Gassmann"},
    PR_LAST,
};

/* A parameter given in the request that the request does not use is an
 * error (it would be silently ignored); one inherited from the session is
 * let pass, since sessions hold defaults for several kinds of request. */
static int unused(proto_call *c, const proto_vec *v, int obj_present,
                  const char *name, const char *why)
{
	if (v && (!v->present || v->inherited))
		return 0;
	if (!v && !obj_present)
		return 0;
	return proto_fail(c, PROTO_INVALID_PARAMS, name,
	                  "not used by this "
	                  "request: %s",
	                  why);
}

static const proto_decl log_decl;

static int log_check(proto_call *c, void *dst)
{
	static const char *const pt_why =
	    "it serves fluids described by phases at reservoir conditions";
	log_args *a = dst;
	double lith[RW_EMP_NLITH];

	a->have_vsh = a->vsh.present || a->gr.present;
	a->subst = a->fluid_new.hdr.present;
	a->insitu = a->vs_predict == VSP_GC_INSITU;
	if (a->fluid_in_place.hdr.present && !a->subst && !a->insitu &&
	    !proto_inherited_at(a, &log_decl,
	                        offsetof(log_args, fluid_in_place)))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "fluid_new",
		    "fluid substitution needs both fluid_in_place "
		    "and fluid_new");
	if (a->gr.present)
		for (size_t i = 0; i < a->gr_clean.n || i < a->gr_shale.n; i++)
			if (!(proto_at(&a->gr_shale, i) >
			      proto_at(&a->gr_clean, i)))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "gr_shale",
				    "must be above gr_clean (%s%zu)",
				    "element ", i);
	if (!a->gr.present &&
	    (unused(c, &a->gr_clean, 0, "gr_clean", "used only with gr") ||
	     unused(c, &a->gr_shale, 0, "gr_shale", "used only with gr")))
		return -1;
	if (a->rho_replace_bad && a->rho_predict == 0)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "rho_replace_bad",
		    "replacing doubtful density needs rho_predict "
		    "\"gardner\"");
	if (a->rho_predict == 0 &&
	    (unused(c, &a->gardner_a, 0, "gardner_a",
	            "used only with rho_predict \"gardner\"") ||
	     unused(c, &a->gardner_b, 0, "gardner_b",
	            "used only with rho_predict \"gardner\"")))
		return -1;
	/* The washout check needs both curves: without one, say so and go
	 * on without the check rather than refusing the samples. */
	a->washout = a->caliper.present && a->bit_size.present;
	if (a->caliper.present && !a->bit_size.present && !a->caliper.inherited)
		proto_warn(c, "bit_size",
		           "not given: the washout check (caliper against bit "
		           "size) did not run");
	if (a->bit_size.present && !a->caliper.present &&
	    !a->bit_size.inherited)
		proto_warn(c, "caliper",
		           "not given: the washout check (caliper against bit "
		           "size) did not run");
	if (a->lithology.hdr.present)
		for (int k = 0; k < RW_EMP_NLITH; k++)
			lith[k] = a->lithology.frac[k].present
			              ? a->lithology.frac[k].v[0]
			              : 0;
	else
		proto__lith_fractions(NULL, lith);
	a->rock_sum = lith[RW_EMP_SANDSTONE] + lith[RW_EMP_LIMESTONE] +
	              lith[RW_EMP_DOLOMITE];
	if ((a->vs_predict == VSP_GC || a->insitu) && a->have_vsh &&
	    !(a->rock_sum > 0))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "lithology",
		    "with vsh or gr the shale fraction comes from "
		    "the log; lithology must name at least one of "
		    "sandstone, limestone, dolomite for the rest");
	if (!a->subst && !a->insitu &&
	    (unused(c, NULL,
	            a->mineral.hdr.present &&
	                !proto_inherited_at(a, &log_decl,
	                                    offsetof(log_args, mineral)),
	            "mineral", "it serves fluid substitution") ||
	     unused(c, &a->porosity, 0, "porosity",
	            "it serves fluid substitution")))
		return -1;
	if (a->insitu && !a->brine.hdr.present) {
		/* the brine phase of the fluid in place, alone */
		if (a->fluid_in_place.explicit_kr ||
		    !a->fluid_in_place.has[PROTO_BRINE])
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "brine",
			    "required: fluid_in_place has no brine "
			    "phase to take as the brine case");
		static const double one = 1.0;
		a->brine = a->fluid_in_place;
		a->brine.has[PROTO_GAS] = a->brine.has[PROTO_OIL] = 0;
		memset(&a->brine.sat, 0, sizeof a->brine.sat);
		a->brine.sat[PROTO_BRINE].v = &one;
		a->brine.sat[PROTO_BRINE].n = 1;
		a->brine.sat[PROTO_BRINE].present = 1;
		a->brine.mix = PROTO_MIX_WOOD;
	}
	a->need_pt =
	    (a->subst &&
	     (!a->fluid_in_place.explicit_kr || !a->fluid_new.explicit_kr)) ||
	    (a->insitu &&
	     (!a->fluid_in_place.explicit_kr || !a->brine.explicit_kr));
	if (a->need_pt) {
		int need_depth = 0;
		if (!a->pressure.present) {
			if (!a->pressure_gradient.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "pressure",
				    "fluid descriptions need the pore "
				    "pressure: "
				    "give pressure, or pressure_gradient with "
				    "depth");
			need_depth = 1;
		}
		if (!a->temperature.present) {
			if (!a->temperature_gradient.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "temperature",
				    "fluid descriptions need the temperature: "
				    "give temperature, or temperature_gradient "
				    "with surface_temperature and depth");
			if (!a->surface_temperature.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    "surface_temperature",
				    "required with temperature_gradient");
			need_depth = 1;
		}
		if (need_depth && !a->depth.present)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "depth",
			    "required to apply pressure_gradient or "
			    "temperature_gradient (depth is taken as true "
			    "vertical depth below the surface)");
	} else if (unused(c, &a->pressure, 0, "pressure", pt_why) ||
	           unused(c, &a->temperature, 0, "temperature", pt_why) ||
	           unused(c, &a->pressure_gradient, 0, "pressure_gradient",
	                  pt_why) ||
	           unused(c, &a->temperature_gradient, 0,
	                  "temperature_gradient", pt_why) ||
	           unused(c, &a->surface_temperature, 0, "surface_temperature",
	                  pt_why) ||
	           (a->surface_pressure.present &&
	            unused(c, &a->surface_pressure, 0, "surface_pressure",
	                   pt_why))) {
		return -1;
	}
	if (!a->qc.hdr.present)
		proto_qc_ranges_default(&a->qc);
	if (a->pressures.hdr.present) {
		const proto_pres_log *p = &a->pressures;
		if (p->depth_is == PRES_DEPTH_TVD && !a->depth.present)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "depth",
			    "required by pressures: the depth of "
			    "each sample (TVD, as depth_is says)");
		if (p->depth_is == PRES_DEPTH_MD && !a->tvd.present)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "tvd",
			    "required by pressures with depth_is md: the true "
			    "vertical depth of each sample (from the well's "
			    "deviation survey); pressures are integrated over "
			    "TVD, never over measured depth");
		if (p->depth_is == PRES_DEPTH_TVD &&
		    unused(c, &a->tvd, 0, "tvd",
		           "pressures.depth_is is tvd: the depth is the TVD"))
			return -1;
	} else if (unused(c, &a->tvd, 0, "tvd", "it serves pressures")) {
		return -1;
	}
	return 0;
}

static const proto_decl log_decl = {
    .name = "",
    .fields = log_fields,
    .rules = log_rules,
    .size = sizeof(log_args),
    .check = log_check,
};

/* Output columns: the elastic set per sample, then the substituted set. */
typedef struct log_row {
	double vp, vs, rho, k, mu, lambda, e, nu, ai, si, vpvs, vsh;
	double vp_sub, vs_sub, rho_sub, k_sub, ai_sub, si_sub, vpvs_sub, nu_sub;
	double k_fl_in_place, rho_fl_in_place, k_fl_new, rho_fl_new;
	double sv, sv_emw, ph, ph_emw, dt_normal, pp, pp_emw, pp_sigma;
	double shmin, shmin_emw, shmax;
	uint64_t qc, pdetail;
} log_row;

/* Velocity from a velocity or a slowness vector (exactly one present or
 * neither); NaN when missing, -1 when not positive. */
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

/* Pressure (MPa) and temperature (degC) of sample i: the curves when
 * given, else surface value + gradient x depth. */
static void pt_at(const log_args *a, size_t i, double *p, double *t)
{
	double z = a->depth.present ? proto_at(&a->depth, i) : NAN;
	*p = a->pressure.present
	         ? proto_at(&a->pressure, i)
	         : a->surface_pressure.v[0] + a->pressure_gradient.v[0] * z;
	*t = a->temperature.present ? proto_at(&a->temperature, i)
	                            : a->surface_temperature.v[0] +
	                                  a->temperature_gradient.v[0] * z;
}

/* The lithology fractions of sample i for Greenberg & Castagna. */
static void lith_at(const log_args *a, size_t i, double vsh,
                    double fr[RW_EMP_NLITH])
{
	double lith[RW_EMP_NLITH];

	if (a->lithology.hdr.present)
		for (int k = 0; k < RW_EMP_NLITH; k++)
			lith[k] = a->lithology.frac[k].present
			              ? proto_at(&a->lithology.frac[k], i)
			              : 0;
	else
		proto__lith_fractions(NULL, lith);
	memcpy(fr, lith, sizeof lith);
	if (a->have_vsh && !isnan(vsh)) {
		double rock = lith[RW_EMP_SANDSTONE] + lith[RW_EMP_LIMESTONE] +
		              lith[RW_EMP_DOLOMITE];
		for (int j = 0; j < RW_EMP_SHALE; j++)
			fr[j] = lith[j] / rock * (1 - vsh);
		fr[RW_EMP_SHALE] = vsh;
	}
}

static int log_sample(const log_args *a, size_t i, log_row *r, uint64_t *qc)
{
	uint64_t fl = 0;
	unsigned why = 0, warn = 0;
	double v_p = vel(&a->vp, &a->dtp, i), v_s = vel(&a->vs, &a->dts, i);
	double rho = a->rhob.present ? proto_at(&a->rhob, i) : NAN;
	double vsh = NAN, p = NAN, t = NAN;
	int bad_rho = 0, vsp_block = 0;
	rw_elastic e;

	if (a->drho.present) {
		double d = proto_at(&a->drho, i);
		if (isnan(d))
			fl |= QC_LOG_MISSING;
		else if (fabs(d) > a->drho_limit.v[0])
			fl |= QC_DRHO_HIGH, bad_rho = 1;
	}
	if (a->bit_size.present) {
		double b = proto_at(&a->bit_size, i);
		if (!isnan(b) && (b < BIT_SIZE_MIN_M || b > BIT_SIZE_MAX_M))
			fl |= QC_BIT_SIZE_RANGE;
	}
	if (a->washout) {
		double cl = proto_at(&a->caliper, i),
		       b = proto_at(&a->bit_size, i);
		if (isnan(cl) || isnan(b))
			fl |= QC_LOG_MISSING;
		else if (cl - b > a->washout_limit.v[0])
			fl |= QC_WASHOUT, bad_rho = 1;
	}
	if (a->vsh.present) {
		vsh = proto_at(&a->vsh, i);
		if (isnan(vsh))
			fl |= QC_LOG_MISSING;
		else if (vsh < 0 || vsh > 1)
			fl |= QC_INPUT_INVALID, vsh = NAN;
	} else if (a->gr.present) {
		/* Linear gamma-ray index, clipped to [0, 1] (common practice;
		 * a normalisation, not a rock relation). */
		double g = proto_at(&a->gr, i);
		double g0 = proto_at(&a->gr_clean, i);
		double g1 = proto_at(&a->gr_shale, i);
		if (isnan(g))
			fl |= QC_LOG_MISSING;
		else
			vsh = fmin(1, fmax(0, (g - g0) / (g1 - g0)));
	}
	r->vsh = vsh;
	if (isnan(v_p))
		fl |= QC_LOG_MISSING;
	if (isnan(v_s) && (a->vs.present || a->dts.present))
		fl |= QC_LOG_MISSING;
	if (isnan(rho) && a->rhob.present)
		fl |= QC_LOG_MISSING;
	/* A velocity, slowness or density <= 0 has no meaning: the sample is
	 * impossible and nothing is predicted over it. */
	if (!isnan(v_p) && !(v_p > 0))
		fl |= QC_INPUT_INVALID, v_p = NAN, vsp_block = 1;
	if (!isnan(v_s) && !(v_s > 0))
		fl |= QC_INPUT_INVALID, v_s = NAN, vsp_block = 1;
	if (!isnan(rho) && !(rho > 0))
		fl |= QC_RHO_NONPOSITIVE, rho = NAN, vsp_block = 1;
	if (!vsp_block && (isnan(rho) || (bad_rho && a->rho_replace_bad)) &&
	    a->rho_predict == 1 && !isnan(v_p) &&
	    rw_emp_gardner_density(v_p, proto_at(&a->gardner_a, i),
	                           proto_at(&a->gardner_b, i), &rho,
	                           &warn) == RW_OK)
		fl |= QC_RHO_PREDICTED | proto__emp_qc(warn);
	if (a->need_pt)
		pt_at(a, i, &p, &t);
	if (!vsp_block && isnan(v_s) && a->vs_predict != VSP_NONE &&
	    !isnan(v_p)) {
		int st;
		double fr[RW_EMP_NLITH];
		warn = 0;
		if (a->vs_predict == VSP_MUDROCK) {
			st = rw_emp_mudrock_vs(v_p, &v_s, &warn);
		} else if (a->have_vsh && isnan(vsh)) {
			st = RW_EDOM;
		} else {
			lith_at(a, i, vsh, fr);
			if (a->vs_predict == VSP_GC) {
				st = rw_emp_gc_vs_mixed(v_p, fr, &v_s, &warn);
			} else {
				double kfl, rfl, kb, rb, kmin, rmin;
				uint64_t q1, q2;
				proto__fluid_kr(&a->fluid_in_place, i, p, t,
				                &kfl, &rfl, &q1);
				proto__fluid_kr(&a->brine, i, p, t, &kb, &rb,
				                &q2);
				fl |= q1 | q2;
				st = proto__mineral_eval(&a->mineral, i, &kmin,
				                         &rmin);
				if (st == RW_OK)
					st = rw_emp_gc_vs_insitu(
					    v_p, rho, proto_at(&a->porosity, i),
					    kmin, kfl, rfl, kb, rb, fr, &v_s,
					    NULL, &warn);
			}
		}
		if (st == RW_OK)
			fl |= QC_VS_PREDICTED | proto__emp_qc(warn);
		else
			v_s = NAN;
	}
	r->vp = v_p, r->vs = v_s, r->rho = rho;
	if (rw_elastic_from_velocities(v_p, v_s, rho, &e, &why) == RW_OK) {
		fl |= proto_qc_plausible(&a->qc, &e);
		r->k = e.k, r->mu = e.mu, r->lambda = e.lambda;
		r->e = e.e, r->nu = e.nu, r->ai = e.ai, r->si = e.si;
		r->vpvs = e.vpvs;
	} else if (isnan(v_s) || isnan(v_p) || isnan(rho)) {
		/* a missing curve (not an impossible rock), or a value that
		 * was impossible and dropped above */
		fl |= vsp_block ? QC_INPUT_INVALID : QC_LOG_MISSING;
	} else {
		fl |= proto_qc_impossible(why);
	}
	if (a->subst) {
		rw_rock_subst sb;
		double ph = proto_at(&a->porosity, i);
		double k_min = NAN, rho_min, kfo, rfo, kfn, rfn;
		uint64_t q1 = 0, q2 = 0;
		unsigned gw = 0;
		int st;
		proto__fluid_kr(&a->fluid_in_place, i, p, t, &kfo, &rfo, &q1);
		proto__fluid_kr(&a->fluid_new, i, p, t, &kfn, &rfn, &q2);
		fl |= q1 | q2;
		r->k_fl_in_place = kfo, r->rho_fl_in_place = rfo;
		r->k_fl_new = kfn, r->rho_fl_new = rfn;
		if (isnan(ph))
			fl |= QC_LOG_MISSING;
		st = proto__mineral_eval(&a->mineral, i, &k_min, &rho_min);
		if (st == RW_OK)
			st = rw_rock_fluid_subst(v_p, v_s, rho, ph, k_min, kfo,
			                         rfo, kfn, rfn, &sb, &gw);
		if (gw & (RW_ROCK_WARN_KDRY_NEG | RW_ROCK_WARN_KDRY_GT_KMIN))
			fl |= QC_GASSMANN_KDRY;
		if (gw & RW_ROCK_WARN_PHI_LOW)
			fl |= QC_GASSMANN_PHI_LOW;
		/* A dry frame softer than nothing or stiffer than its mineral
		 * means the inputs contradict Gassmann: no substituted values
		 * (as rock.substitute). */
		if (st == RW_OK &&
		    !(gw &
		      (RW_ROCK_WARN_KDRY_NEG | RW_ROCK_WARN_KDRY_GT_KMIN)) &&
		    rw_elastic_from_velocities(sb.vp_ms, sb.vs_ms, sb.rho_kgm3,
		                               &e, &why) == RW_OK) {
			r->vp_sub = sb.vp_ms, r->vs_sub = sb.vs_ms;
			r->rho_sub = sb.rho_kgm3, r->k_sub = sb.k_sat_pa;
			r->ai_sub = e.ai, r->si_sub = e.si;
			r->vpvs_sub = e.vpvs, r->nu_sub = e.nu;
			if (gw || q1 || q2)
				fl |= QC_SUBST_CAUTION;
		} else {
			fl |= QC_SUBST_FAILED;
		}
	}
	*qc = fl;
	return 0;
}

static int log_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const log_args *a = args;

	(void)ws;
	if (a->pre) {
		/* pressures: prepare computed the whole row in depth order */
		memcpy(row, &a->pre[i], sizeof a->pre[i]);
		return 0;
	}
	return log_sample(a, i, row, qc);
}

/* ---- pressures ----------------------------------------------------------
 * The overburden and brine integrals run down the log in order, so the
 * whole request is computed here, before the driver's kernels (which
 * only copy the rows): first every sample's elastic set and QC (split
 * across the worker threads when large, as the driver would), then the
 * pressure chain in depth order. */

#define PRES_PARALLEL_WORK 16384.0

typedef struct pres_job {
	const log_args *a;
	log_row *rows;
	size_t n, chunk;
} pres_job;

static void pres_rows(void *arg, size_t k)
{
	pres_job *j = arg;
	size_t lo = k * j->chunk, hi = lo + j->chunk;

	if (hi > j->n)
		hi = j->n;
	for (size_t i = lo; i < hi; i++) {
		log_row *r = &j->rows[i];
		double *d = (double *)(void *)r;
		/* every member before qc is a double output: NaN, as the
		 * driver clears a row */
		for (size_t m = 0; m < offsetof(log_row, qc) / sizeof *d; m++)
			d[m] = NAN;
		r->qc = r->pdetail = 0;
		log_sample(j->a, i, r, &r->qc);
	}
}

static int log_prepare(proto_call *c, void *args, proto_shape *sh)
{
	log_args *a = args;
	const proto_pres_log *p = &a->pressures;
	size_t n = sh->n, nb = n ? n : 1;
	pres_job job = {a, NULL, n, n ? n : 1};
	pres_setup *s;
	pres_sample *out;
	double *z, *rho, *dt;
	unsigned char *doubt, *excl;
	int hyd = 1;

	if (!p->hdr.present)
		return 0;
	job.rows = proto_alloc(c, nb * sizeof *job.rows);
	s = proto_alloc(c, sizeof *s);
	out = proto_alloc(c, nb * sizeof *out);
	z = proto_alloc_doubles(c, nb);
	rho = proto_alloc_doubles(c, nb);
	dt = proto_alloc_doubles(c, nb);
	doubt = proto_alloc(c, nb);
	excl = proto_alloc(c, nb);
	if (!job.rows || !s || !out || !z || !rho || !dt || !doubt || !excl)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the pressures");
	if ((double)n * 3 > PRES_PARALLEL_WORK && n > 64) {
		job.chunk = (n + 63) / 64;
		proto__parallel(c->ctx, (n + job.chunk - 1) / job.chunk,
		                pres_rows, &job);
	} else {
		pres_rows(&job, 0);
	}
	proto__pres_setup_init(s);
	if (proto__pres_column(c, &p->column, "pressures.column", 1, s) ||
	    proto__pres_water(c, &p->pore_water, "pressures.pore_water", s))
		return -1;
	for (size_t i = 0; i < n; i++) {
		const log_row *r = &job.rows[i];
		z[i] = proto_at(
		    p->depth_is == PRES_DEPTH_MD ? &a->tvd : &a->depth, i);
		rho[i] = r->rho;
		doubt[i] = p->density == PRES_RHO_HOLD &&
		           (r->qc & (QC_DRHO_HIGH | QC_WASHOUT)) &&
		           !(r->qc & QC_RHO_PREDICTED);
		dt[i] = r->vp > 0 ? 1 / r->vp : NAN;
		excl[i] = (r->qc & QC_WASHOUT) != 0;
		proto__pres_sample_clear(&out[i]);
	}
	s->vsh_min = a->have_vsh ? p->vsh_min.v[0] : NAN;
	if (!a->have_vsh && p->pore != PRES_PORE_NONE)
		proto_warn(c, "pressures",
		           "no shale selector (vsh or gr): every sample is "
		           "taken as shale; the pore pressure means nothing "
		           "outside shale");
	s->pore = p->pore;
	s->exponent = p->exponent.v[0];
	s->frac = p->fracture;
	s->alpha = p->alpha.v[0];
	s->eps_h = p->eps_h.v[0];
	s->eps_hmax = p->eps_hmax.v[0];
	if (p->nu_static.hdr.present) {
		s->nu_a = p->nu_static.a.v[0];
		s->nu_b = p->nu_static.b.v[0];
	}
	if (p->pore == PRES_PORE_BOWERS &&
	    proto__pres_bowers(c, &p->bowers, "pressures.bowers", s))
		return -1;
	if (p->trend.hdr.present &&
	    proto__pres_trend_given(c, &p->trend, "pressures.trend", s))
		return -1;
	if (p->trend_fit.hdr.present) {
		double *vsh = NULL;
		if (a->have_vsh) {
			vsh = proto_alloc_doubles(c, nb);
			if (!vsh)
				return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
				                  "out of memory");
			for (size_t i = 0; i < n; i++)
				vsh[i] = job.rows[i].vsh;
		}
		if (proto__pres_trend_fit(c, &p->trend_fit,
		                          "pressures.trend_fit", n, z, dt, vsh,
		                          excl, s))
			return -1;
	}
	if (proto__pres_start(c, p->state, "pressures.state", &p->resume,
	                      "pressures.resume", 1, hyd, s) ||
	    proto__pres_integrate(c, s, 1, hyd, n, z, rho, doubt, out))
		return -1;
	for (size_t i = 0; i < n; i++) {
		log_row *r = &job.rows[i];
		pres_sample *o = &out[i];
		double es = NAN, g = s->col.g_ms2, gr;
		proto__pres_pore(s, z[i], dt[i], r->vp, r->vsh, o);
		if (s->frac == PRES_FRAC_POROELASTIC &&
		    (s->eps_h != 0 || s->eps_hmax != 0))
			proto__pres_es(&p->e_static_from, r->vp, r->e, &es,
			               &o->detail);
		proto__pres_frac(s, z[i], r->nu,
		                 p->ki.present ? p->ki.v[0] : NAN, es, o);
		r->sv = o->sv * 1e-6;
		r->ph = o->ph * 1e-6;
		r->dt_normal = o->dt_n;
		r->pp = o->pp * 1e-6;
		r->pp_sigma = o->pp_sigma * 1e-6;
		r->shmin = o->shmin * 1e-6;
		r->shmax = o->shmax * 1e-6;
		rw_pres_emw(o->sv, z[i], g, &r->sv_emw, &gr);
		rw_pres_emw(o->ph, z[i], g, &r->ph_emw, &gr);
		rw_pres_emw(o->pp, z[i], g, &r->pp_emw, &gr);
		rw_pres_emw(o->shmin, z[i], g, &r->shmin_emw, &gr);
		r->qc |= o->qc | proto__pres_qc(o->detail);
		r->pdetail = o->detail;
	}
	a->pre = job.rows;
	a->pset = s;
	return 0;
}

static int has_pres(const void *a)
{
	return ((const log_args *)a)->pressures.hdr.present;
}
static int has_pp(const void *a)
{
	const log_args *l = a;
	return l->pressures.hdr.present && l->pressures.pore != PRES_PORE_NONE;
}
static int has_eaton(const void *a)
{
	const log_args *l = a;
	return l->pressures.hdr.present && l->pressures.pore == PRES_PORE_EATON;
}
static int has_pp_sigma(const void *a)
{
	const log_args *l = a;
	return has_eaton(a) && l->pset->trend_has_cov;
}
static int has_fit(const void *a)
{
	const log_args *l = a;
	return l->pressures.hdr.present && l->pset->trend_fitted;
}
static int has_frac(const void *a)
{
	const log_args *l = a;
	return l->pressures.hdr.present &&
	       l->pressures.fracture != PRES_FRAC_NONE;
}
static int has_shmax(const void *a)
{
	const log_args *l = a;
	return l->pressures.hdr.present &&
	       l->pressures.fracture == PRES_FRAC_POROELASTIC;
}
static void write_pstate(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_state(c, key, ((const log_args *)args)->pset);
}
static void write_ptrend(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_trend(c, key, ((const log_args *)args)->pset);
}
static void write_pfit(proto_call *c, const char *key, const void *args)
{
	const pres_setup *s = ((const log_args *)args)->pset;
	const rw_pres_trend *t = &s->trend;

	proto_w_obj_begin(c, key);
	proto_w_int(c, "n_used", (long long)t->n_used);
	proto_w_num(c, "rms", PK_SLOWNESS, t->rms_sm);
	proto_w_obj_end(c);
}

static int has_depth(const void *a)
{
	return ((const log_args *)a)->depth.present;
}
static int has_vsh(const void *a)
{
	return ((const log_args *)a)->have_vsh;
}
static int has_subst(const void *a)
{
	return ((const log_args *)a)->subst;
}

static void write_vs_by(proto_call *c, const char *key, const void *args)
{
	const log_args *a = args;
	if (a->vs_predict == VSP_NONE)
		proto_w_null(c, key);
	else
		proto_w_str(c, key, vs_pred_names[a->vs_predict]);
}
static void write_rho_by(proto_call *c, const char *key, const void *args)
{
	const log_args *a = args;
	if (a->rho_predict == 0)
		proto_w_null(c, key);
	else
		proto_w_str(c, key, rho_pred_names[a->rho_predict]);
}
static void write_subst(proto_call *c, const char *key, const void *args)
{
	if (((const log_args *)args)->subst)
		proto_w_str(c, key, "gassmann");
	else
		proto_w_null(c, key);
}

#define O(nm, m, k_, w, text)                                                  \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(log_row, m), .when = w, .desc = text        \
	}
#define NULLSTR "{\"type\": [\"string\", \"null\"]}"
static const proto_output log_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "depth",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(log_args, depth),
     .when = has_depth,
     .desc = "depth (echoed)"},
    O("vp", vp, PK_VELOCITY, NULL, "P velocity (measured or from dtp)"),
    O("vs", vs, PK_VELOCITY, NULL, "S velocity (measured or predicted)"),
    O("rho", rho, PK_DENSITY, NULL, "density (measured or predicted)"),
    O("k", k, PK_MODULUS, NULL, "bulk modulus"),
    O("mu", mu, PK_MODULUS, NULL, "shear modulus"),
    O("lambda", lambda, PK_MODULUS, NULL, "Lame's first parameter"),
    O("e", e, PK_MODULUS, NULL, "Young's modulus (dynamic)"),
    O("nu", nu, PK_NONE, NULL, "Poisson's ratio (dynamic)"),
    O("ai", ai, PK_IMPEDANCE, NULL, "acoustic impedance"),
    O("si", si, PK_IMPEDANCE, NULL, "shear impedance"),
    O("vpvs", vpvs, PK_NONE, NULL, "vp/vs"),
    O("vsh", vsh, PK_NONE, has_vsh, "shale volume fraction"),
    O("vp_sub", vp_sub, PK_VELOCITY, has_subst, "substituted vp"),
    O("vs_sub", vs_sub, PK_VELOCITY, has_subst, "substituted vs"),
    O("rho_sub", rho_sub, PK_DENSITY, has_subst, "substituted density"),
    O("k_sub", k_sub, PK_MODULUS, has_subst, "substituted bulk modulus"),
    O("ai_sub", ai_sub, PK_IMPEDANCE, has_subst, "substituted AI"),
    O("si_sub", si_sub, PK_IMPEDANCE, has_subst, "substituted SI"),
    O("vpvs_sub", vpvs_sub, PK_NONE, has_subst, "substituted vp/vs"),
    O("nu_sub", nu_sub, PK_NONE, has_subst, "substituted Poisson's ratio"),
    O("fluid_in_place_k", k_fl_in_place, PK_MODULUS, has_subst,
      "bulk modulus of the fluid in place"),
    O("fluid_in_place_rho", rho_fl_in_place, PK_DENSITY, has_subst,
      "density of the fluid in place"),
    O("fluid_new_k", k_fl_new, PK_MODULUS, has_subst,
      "bulk modulus of the new fluid"),
    O("fluid_new_rho", rho_fl_new, PK_DENSITY, has_subst,
      "density of the new fluid"),
    O("sv", sv, PK_PRESSURE, has_pres, "overburden (vertical stress)"),
    O("sv_emw", sv_emw, PK_MUD_WEIGHT, has_pres,
      "overburden as an equivalent mud weight"),
    O("ph", ph, PK_PRESSURE, has_pres, "hydrostatic pore pressure"),
    O("ph_emw", ph_emw, PK_MUD_WEIGHT, has_pres,
      "hydrostatic as an equivalent mud weight"),
    O("dt_normal", dt_normal, PK_SLOWNESS, has_eaton,
      "normal compaction trend slowness"),
    O("pp", pp, PK_PRESSURE, has_pp,
      "pore pressure (reported, not clipped; shale only)"),
    O("pp_emw", pp_emw, PK_MUD_WEIGHT, has_pp,
      "pore pressure as an equivalent mud weight"),
    O("pp_sigma_trend", pp_sigma, PK_PRESSURE, has_pp_sigma,
      "standard error of pp from the trend alone (first order)"),
    O("shmin", shmin, PK_PRESSURE, has_frac,
      "minimum horizontal stress (fracture closure estimate)"),
    O("shmin_emw", shmin_emw, PK_MUD_WEIGHT, has_frac,
      "minimum horizontal stress as an equivalent mud weight"),
    O("shmax", shmax, PK_PRESSURE, has_shmax,
      "maximum horizontal stress (poroelastic)"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(log_row, qc),
     .desc = "QC flags per sample"},
    {.name = "pressure_detail",
     .type = PO_FLAGS,
     .offset = offsetof(log_row, pdetail),
     .when = has_pres,
     .desc = proto_pres_detail_desc},
    {.name = "vs_predicted_by",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_vs_by,
     .schema = NULLSTR,
     .desc = "the relation that predicted missing shear, or null"},
    {.name = "rho_predicted_by",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_rho_by,
     .schema = NULLSTR,
     .desc = "the relation that predicted missing density, or null"},
    {.name = "substitution",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = write_subst,
     .schema = NULLSTR,
     .desc = "\"gassmann\" when substituted curves are given, or null"},
    {.name = "pressure_trend",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = has_eaton,
     .write = write_ptrend,
     .schema = PRES_SCHEMA_TREND,
     .desc = "the compaction trend the pore pressure used (given or "
             "fitted)"},
    {.name = "pressure_fit",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = has_fit,
     .write = write_pfit,
     .schema = "{\"type\": \"object\"}",
     .desc = "samples used and rms residual of a trend fitted here"},
    {.name = "pressure_state",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = has_pres,
     .write = write_pstate,
     .schema = PRES_SCHEMA_STATE,
     .desc = "the running pressure integrals after the last sample: give "
             "its token as pressures.state with the next samples"},
    {.name = "pressure_caution",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = has_pres,
     .write = proto__pres_write_caution,
     .schema = "{\"type\": \"string\"}",
     .desc = "screening estimates only (the pressure family's caution)"},
    {0},
};
#undef O

static const proto_method m_process = {
    .name = "log.process",
    .summary = "Elastic set and QC flags from well-log samples, with "
               "optional predicted shear or density and Gassmann-"
               "substituted curves.",
    .description =
        "One block of samples (arrays, one per curve) or one real-time "
        "sample (scalars). Slowness or velocity, density, and the QC "
        "curves (drho, caliper with bit size, gr or vsh); missing shear or "
        "density may be predicted (flagged predicted); with fluid_in_place "
        "and fluid_new the Gassmann-substituted curves are added; with "
        "pressures, the overburden, hydrostatic, pore-pressure and "
        "fracture-gradient curves (pressure.md). Screening estimates only: "
        "never the sole basis for drilling or well-control decisions. See "
        "logs.md.",
    .params = &log_decl,
    .outputs = log_outputs,
    .prepare = log_prepare,
    .kernel = log_kernel,
    .row_size = sizeof(log_row),
    .qc_offset = offsetof(log_row, qc),
    .cost = 3,
};

const proto_method *const proto_log_methods[] = {&m_process, NULL};
