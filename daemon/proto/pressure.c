/* The pressure family: pressure.overburden, pressure.hydrostatic,
 * pressure.trend, pressure.pore and pressure.fracture (rock.strength is in
 * strength.c and listed here), and the chain of steps log.process shares
 * with them (pres.h). The overburden and brine integrals are cumulative:
 * each method's prepare runs them once, in sample order, through the
 * core's step functions (the same a live feed runs one sample at a time),
 * and the kernels hand the results to the writer. A request may start
 * from the state token a previous answer returned (the exact
 * continuation of a stream of requests) or from a restart value (flagged
 * resumed). Every answer carries QC_PRES_CAUTION on every sample and the
 * caution text. The physics is in daemon/core/overburden.c,
 * hydrostatic.c, trend.c, porepressure.c and fracture.c. */
#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/pres.h"
#include "proto/table.h"
#include "rockwire/pressure.h"
#include "rockwire/strength.h"

const char proto_pres_caution[] =
    "Pore-pressure, overburden, fracture-gradient and rock-strength values "
    "are screening estimates only. Wrong estimates can contribute to "
    "kicks, losses and blowouts. They are never the sole basis for "
    "mud-weight, casing or well-control decisions, which belong to "
    "qualified people under the operator's procedures, local regulations "
    "and licensed practice. The flags of each sample say where an "
    "estimate is extrapolated or outside its basis; pressure.md says what "
    "each method cannot see.";

const char proto_pres_detail_desc[] =
    "Detail flags per sample (a bit set; 0 none; pressure.md): "
    "1 above_mudline, 2 overburden_from_shallow_law, 4 density_held, "
    "8 depth_repeated, 16 resumed, 32 brine_extrapolated, "
    "64 trend_extrapolated, 128 trend_unverified, "
    "256 trend_faster_than_matrix, 512 pp_below_hydrostatic, "
    "1024 pp_at_overburden, 2048 bowers_unloading, 4096 shmin_below_pp, "
    "8192 shmin_above_overburden, 16384 poisson_nonpositive, "
    "32768 horizontal_swapped, 65536 strength_extrapolated, "
    "131072 static_above_dynamic, 262144 shallow_law_default, "
    "524288 density_doubtful_held, 1048576 not_shale, "
    "2097152 lithology_mismatch, 4194304 depth_not_increasing, "
    "8388608 overburden_below_hydrostatic, 16777216 velocity_below_v0";

/* Water depth from which the shallow-density law must be given: 1000 ft
 * (304.8 m), the usual threshold of "deep water" (common practice). The
 * default law is a shelf law (16.3 lb/gal at the mudline) that overstates
 * the shallow overburden in deep water, and with it the pore pressure and
 * the fracture gradient. */
#define DEEP_WATER_M (1000 * RW_PRES_FT_M)
/* Shale cut-off on vsh (common practice: samples with vsh >= 0.6 read as
 * shale for compaction trends). */
#define VSH_MIN_DFLT 0.6

const char *const proto_pres_pore_names[] = {"eaton", "bowers", "none", NULL};
const char *const proto_pres_frac_names[] = {"eaton", "matthews_kelly",
                                             "poroelastic", "none", NULL};
const char *const proto_pres_form_names[] = {"exponential", "loglinear", NULL};
static const char *const a_unit_names[] = {"m/s/MPa^b", "ft/s/psi^b", NULL};

/* ---- descriptions ------------------------------------------------------- */

#define SC PF_SCALAR
static const proto_field shallow_fields[] = {
    {PROTO_NUMS(proto_pres_shallow, rho_ml, PK_DENSITY,
                SC | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
                "density at the mudline (default 16.3 lb/gal = 1.953 g/cm3, "
                "a shelf value; deep-water mudlines are often 1.4-1.7 "
                "g/cm3); one law for the request"),
     .dflt = RW_PRES_SHALLOW_RHO_ML, .lo = 0, .hi = 3500},
    {PROTO_NUMS(proto_pres_shallow, a, PK_DENSITY, SC | PF_DFLT | PF_LO,
                "density added at s0 below the mudline (default 1 lb/gal)"),
     .dflt = RW_PRES_SHALLOW_A, .lo = 0},
    {PROTO_NUMS(proto_pres_shallow, s0, PK_LENGTH,
                SC | PF_DFLT | PF_LO | PF_LO_OPEN,
                "reference depth below the mudline (default 3125 ft)"),
     .dflt = RW_PRES_SHALLOW_S0, .lo = 0},
    {PROTO_NUMS(proto_pres_shallow, p, PK_NONE,
                SC | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
                "exponent of the power law (default 0.6)"),
     .dflt = RW_PRES_SHALLOW_P, .lo = 0, .hi = 3},
    {PROTO_NUMS(proto_pres_shallow, cap, PK_DENSITY, SC | PF_LO | PF_LO_OPEN,
                "largest density the law reaches (default: no cap)"),
     .lo = 0},
    {0},
};

static int shallow_check(proto_call *c, void *dst)
{
	const proto_pres_shallow *s = dst;

	if (s->cap.present && s->cap.v[0] < s->rho_ml.v[0])
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, s->hdr.path, "cap", ""),
		                  "must be at least rho_ml");
	return 0;
}

static const proto_decl shallow_decl = {
    .name = "shallowDensity",
    .fields = shallow_fields,
    .size = sizeof(proto_pres_shallow),
    .check = shallow_check,
    .desc = "The density below the mudline above the first log density: "
            "rho(s) = min(cap, rho_ml + a (s/s0)^p) at s below the "
            "mudline (a power law, common practice). Required in 1000 ft "
            "of water or more",
};

static const proto_field column_fields[] = {
    {PROTO_NUMS(proto_pres_column, air_gap, PK_LENGTH,
                SC | PF_DFLT | PF_LO | PF_HI,
                "height of the depth datum (drill floor) above sea level "
                "offshore, or above ground level on land (default 0); one "
                "well geometry for the request"),
     .lo = 0, .hi = 200},
    {PROTO_NUMS(proto_pres_column, water_depth, PK_LENGTH,
                SC | PF_DFLT | PF_LO | PF_HI,
                "sea level to mudline (default 0: land)"),
     .lo = 0, .hi = 4000},
    {PROTO_NUMS(proto_pres_column, rho_sea, PK_DENSITY,
                SC | PF_DFLT | PF_LO | PF_HI,
                "sea-water density (default 1.025 g/cm3, common practice)"),
     .dflt = RW_PRES_RHO_SEA, .lo = 900, .hi = 1300},
    {PROTO_NUMS(proto_pres_column, g, PK_NONE, SC | PF_DFLT | PF_LO | PF_HI,
                "gravity in m/s2 (default 9.80665, standard gravity); "
                "Earth's surface spans 9.78-9.83"),
     .dflt = RW_PRES_G0, .lo = 9.7, .hi = 9.9},
    {PROTO_FIELD(proto_pres_column, shallow, PT_OBJ, 0,
                 "the shallow-density law (required in deep water)"),
     .sub = &shallow_decl},
    {0},
};

const proto_decl proto_pres_column_decl = {
    .name = "pressureColumn",
    .fields = column_fields,
    .size = sizeof(proto_pres_column),
    .desc = "The column above the log: depths are true vertical depths "
            "below the datum (the drill floor); air gap, water depth, sea "
            "water, gravity and the shallow-density law",
};

static const proto_field brine_fields[] = {
    {PROTO_NUMS(proto_pres_brine, salinity, PK_SALINITY,
                PF_REQ | SC | PF_LO | PF_HI,
                "NaCl salinity of the pore water; one value for the column"),
     .lo = 0, .hi = 0.35},
    {PROTO_NUMS(proto_pres_brine, mudline_temperature, PK_TEMPERATURE,
                PF_REQ | SC | PF_LO | PF_HI,
                "temperature at the mudline (the sea floor, about 4 degC "
                "in deep water; the mean surface temperature on land)"),
     .lo = -20, .hi = 60},
    {PROTO_NUMS(proto_pres_brine, temperature_gradient, PK_GRADIENT_T,
                PF_REQ | SC | PF_LO | PF_HI,
                "geothermal gradient below the mudline (one value)"),
     .lo = 0, .hi = 0.1},
    {0},
};

static const proto_decl brine_decl = {
    .name = "poreBrine",
    .fields = brine_fields,
    .size = sizeof(proto_pres_brine),
    .desc = "A NaCl brine whose density follows Batzle & Wang 1992 at the "
            "local pressure and temperature (temperature linear below the "
            "mudline)",
};

static const proto_field water_fields[] = {
    {PROTO_NUMS(proto_pres_water, density, PK_DENSITY, SC | PF_LO | PF_HI,
                "constant pore-water density (default 1.00 g/cm3, fresh "
                "water, common practice; formation brines are often "
                "1.02-1.08 g/cm3)"),
     .lo = 900, .hi = 1300},
    {PROTO_NUMS(proto_pres_water, gradient, PK_GRADIENT_P, SC | PF_LO,
                "constant hydrostatic gradient instead of a density "
                "(density = gradient / g)"),
     .lo = 0},
    {PROTO_FIELD(proto_pres_water, brine, PT_OBJ, 0,
                 "a Batzle & Wang brine instead of a constant density"),
     .sub = &brine_decl},
    {0},
};

static const char *const water_one[] = {"density", "gradient", "brine", NULL};
static const proto_rule water_rules[] = {
    {PR_AT_MOST, NULL, 1, water_one, "give one of density, gradient and brine"},
    PR_LAST,
};

const proto_decl proto_pres_water_decl = {
    .name = "poreWater",
    .fields = water_fields,
    .rules = water_rules,
    .size = sizeof(proto_pres_water),
    .desc = "The pore water of the hydrostatic (normal) pressure: a "
            "density, a gradient or a brine; default fresh water, 1.00 "
            "g/cm3 (common practice)",
};

/* covariance_si: [[..3], [..3], [..3]] of numbers (null allowed). */
static int cov_parse(proto_call *c, const cJSON *v, const char *path, void *dst)
{
	proto_pres_cov *cv = dst;
	const cJSON *row, *e;
	proto_arr_iter it;
	int i = 0, j;

	if (!cJSON_IsArray(v) || proto__arr_size(v) != 3)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be a 3 x 3 array (rows of numbers or "
		                  "null), the covariance of (dt_ma, dt_ml, c) "
		                  "in SI units as pressure.trend returns it");
	cJSON_ArrayForEach(row, v)
	{
		if (!cJSON_IsArray(row) || proto__arr_size(row) != 3)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "row %d must be an array of 3 numbers "
			    "or null",
			    i);
		j = 0;
		/* a row of long numbers may come from the pre-pass */
		PROTO_ARR_FOREACH(e, it, row)
		{
			if (cJSON_IsNull(e))
				cv->v[i][j] = NAN;
			else if (cJSON_IsNumber(e) && isfinite(e->valuedouble))
				cv->v[i][j] = e->valuedouble;
			else
				return proto_fail(c, PROTO_INVALID_PARAMS, path,
				                  "element [%d][%d] must be a "
				                  "number or null",
				                  i, j);
			j++;
		}
		i++;
	}
	for (i = 0; i < 3; i++) {
		for (j = 0; j < i; j++) {
			double x = cv->v[i][j], y = cv->v[j][i];
			/* symmetric to rounding (1e-9 of the larger) */
			if (isnan(x) != isnan(y) ||
			    fabs(x - y) > 1e-9 * fmax(fabs(x), fabs(y)))
				return proto_fail(c, PROTO_INVALID_PARAMS, path,
				                  "not symmetric: [%d][%d] and "
				                  "[%d][%d] differ",
				                  i, j, j, i);
			cv->v[i][j] = cv->v[j][i] = 0.5 * (x + y);
		}
		if (cv->v[i][i] < 0)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "a variance (diagonal element %d) is "
			                  "negative",
			                  i);
	}
	cv->given = 1;
	return 0;
}

static const proto_custom cov_custom = {
    .parse = cov_parse,
    .schema = "{\"type\": \"array\", \"minItems\": 3, \"maxItems\": 3, "
              "\"items\": {\"type\": \"array\", \"minItems\": 3, "
              "\"maxItems\": 3, \"items\": {\"type\": [\"number\", "
              "\"null\"]}}, \"description\": \"covariance of (dt_ma, "
              "dt_ml, c) in SI units (s/m, 1/m), as pressure.trend "
              "returns it\"}",
};

static const proto_field trend_fields[] = {
    {.name = "form",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_pres_trend, form),
     .choices = proto_pres_form_names,
     .dflt_choice = RW_PRES_TREND_EXP,
     .desc = "exponential: dt = dt_ma + (dt_ml - dt_ma) exp(-c s); "
             "loglinear: dt = dt_ml exp(-c s); s below the mudline"},
    {PROTO_NUMS(proto_pres_trend, dt_ma, PK_SLOWNESS, SC | PF_LO | PF_LO_OPEN,
                "deep (matrix) limit of the exponential form"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_trend, dt_ml, PK_SLOWNESS,
                PF_REQ | SC | PF_LO | PF_LO_OPEN,
                "trend slowness at the mudline"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_trend, c, PK_INV_LENGTH,
                PF_REQ | SC | PF_LO | PF_LO_OPEN,
                "decay constant per depth below the mudline"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_trend, top, PK_LENGTH, SC | PF_LO,
                "top of the depth span (TVD) the trend was fitted on; "
                "without top and base every sample is flagged "
                "trend_unverified"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_trend, base, PK_LENGTH, SC | PF_LO,
                "base of that span (TVD)"),
     .lo = 0},
    {.name = "covariance_si",
     .type = PT_CUSTOM,
     .offset = offsetof(proto_pres_trend, cov),
     .custom = &cov_custom,
     .desc = "the fit's covariance, for the trend's share of the pore "
             "pressure's uncertainty"},
    {0},
};

static const char *const span[] = {"top", "base", NULL};
static const char *const ma[] = {"dt_ma", NULL};
static const proto_rule trend_rules[] = {
    {PR_ALL_OR_NONE, NULL, 0, span, "give top and base together"},
    {PR_REQUIRES, "form=exponential", 0, ma,
     "the exponential form needs dt_ma, its deep limit"},
    {PR_FORBIDS, "form=loglinear", 0, ma,
     "the loglinear form has no matrix limit: leave dt_ma out"},
    PR_LAST,
};

const proto_decl proto_pres_trend_decl = {
    .name = "compactionTrend",
    .fields = trend_fields,
    .rules = trend_rules,
    .size = sizeof(proto_pres_trend),
    .desc = "A normal compaction trend of shale slowness, given (the "
            "`trend` member of a pressure.trend answer fits here)",
};

static const proto_field interval_fields[] = {
    {PROTO_NUMS(proto_pres_interval, top, PK_LENGTH, PF_REQ | SC | PF_LO,
                "top of a normally pressured interval (TVD)"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_interval, base, PK_LENGTH, PF_REQ | SC | PF_LO,
                "its base (TVD), at or below top"),
     .lo = 0},
    {0},
};

static int interval_check(proto_call *c, void *dst)
{
	const proto_pres_interval *iv = dst;

	if (iv->base.v[0] < iv->top.v[0])
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, iv->hdr.path, "base", ""),
		                  "is above top");
	return 0;
}

static const proto_decl interval_decl = {
    .name = "depthInterval",
    .fields = interval_fields,
    .size = sizeof(proto_pres_interval),
    .check = interval_check,
};

static const proto_field fit_fields[] = {
    {PROTO_FIELD(proto_pres_fit, intervals, PT_LIST, PF_REQ,
                 "the intervals the user marks as normally pressured "
                 "(the fit uses their shale samples only)"),
     .sub = &interval_decl},
    {.name = "form",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_pres_fit, form),
     .choices = proto_pres_form_names,
     .dflt_choice = RW_PRES_TREND_EXP,
     .desc = "the form to fit (default exponential)"},
    {0},
};

const proto_decl proto_pres_fit_decl = {
    .name = "trendFit",
    .fields = fit_fields,
    .size = sizeof(proto_pres_fit),
    .desc = "A trend fitted by least squares on this request's shale "
            "samples inside the intervals",
};

static const proto_field bowers_fields[] = {
    {PROTO_NUMS(proto_pres_bowers, v0, PK_VELOCITY,
                SC | PF_DFLT | PF_LO | PF_LO_OPEN,
                "velocity at zero effective stress (default 1524 m/s = "
                "5000 ft/s, from memory)"),
     .dflt = 1524, .lo = 0},
    {PROTO_NUMS(proto_pres_bowers, a, PK_NONE, PF_REQ | SC | PF_LO | PF_LO_OPEN,
                "A of v = v0 + A sigma^B, in a_units"),
     .lo = 0},
    {.name = "a_units",
     .type = PT_ENUM,
     .flags = PF_REQ,
     .offset = offsetof(proto_pres_bowers, a_units),
     .choices = a_unit_names,
     .desc = "the units of A: m/s per MPa^B or ft/s per psi^B (required: "
             "the same A differs by a factor of about 10 between them)"},
    {PROTO_NUMS(proto_pres_bowers, b, PK_NONE,
                PF_REQ | SC | PF_LO | PF_LO_OPEN | PF_HI,
                "B of the virgin curve"),
     .lo = 0, .hi = 2},
    {PROTO_NUMS(proto_pres_bowers, u, PK_NONE, SC | PF_DFLT | PF_LO | PF_HI,
                "unloading parameter U (default 1: no hysteresis)"),
     .dflt = 1, .lo = 1, .hi = 20},
    {PROTO_NUMS(proto_pres_bowers, sigma_max, PK_PRESSURE,
                SC | PF_LO | PF_LO_OPEN,
                "effective stress at the onset of unloading"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_bowers, v_max, PK_VELOCITY, SC | PF_LO | PF_LO_OPEN,
                "velocity at the onset of unloading (instead of "
                "sigma_max: sigma_max is its virgin-curve stress)"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_bowers, unloading_from, PK_LENGTH, SC | PF_LO,
                "TVD from which the unloading branch applies (above it the "
                "virgin curve); required with sigma_max or v_max"),
     .lo = 0},
    {0},
};

static const char *const unl_one[] = {"sigma_max", "v_max", NULL};
static const char *const unl_from[] = {"unloading_from", NULL};
static const proto_rule bowers_rules[] = {
    {PR_AT_MOST, NULL, 1, unl_one, "give sigma_max or v_max, not both"},
    {PR_REQUIRES, "sigma_max", 0, unl_from,
     "the unloading branch needs unloading_from, the depth where the "
     "velocity reversal begins"},
    {PR_REQUIRES, "v_max", 0, unl_from,
     "the unloading branch needs unloading_from, the depth where the "
     "velocity reversal begins"},
    PR_LAST,
};

static int bowers_check(proto_call *c, void *dst)
{
	const proto_pres_bowers *b = dst;

	if (b->unloading_from.present && !b->sigma_max.present &&
	    !b->v_max.present)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, b->hdr.path, "sigma_max", ""),
		    "unloading_from needs sigma_max or v_max, the "
		    "onset of unloading");
	return 0;
}

const proto_decl proto_pres_bowers_decl = {
    .name = "bowers",
    .fields = bowers_fields,
    .rules = bowers_rules,
    .size = sizeof(proto_pres_bowers),
    .check = bowers_check,
    .desc = "Bowers 1995 velocity-effective-stress parameters: virgin "
            "curve v = v0 + A sigma^B, optional unloading branch below "
            "unloading_from",
};

static const proto_field resume_fields[] = {
    {PROTO_NUMS(proto_pres_resume, tvd, PK_LENGTH, PF_REQ | SC | PF_LO,
                "TVD of the restart point, at or below the mudline"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_resume, sv, PK_PRESSURE, SC | PF_LO,
                "overburden there (e.g. the last answered value); "
                "required when the request integrates the overburden"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_resume, rhob, PK_DENSITY, SC | PF_LO | PF_LO_OPEN,
                "density there (default: unknown; the next step then "
                "follows the shallow law, flagged)"),
     .lo = 0},
    {PROTO_NUMS(proto_pres_resume, ph, PK_PRESSURE, SC | PF_LO,
                "hydrostatic pressure there (needed for a brine pore "
                "water)"),
     .lo = 0},
    {0},
};

const proto_decl proto_pres_resume_decl = {
    .name = "pressureResume",
    .fields = resume_fields,
    .size = sizeof(proto_pres_resume),
    .desc = "A restart of the running integrals from known values at a "
            "depth (the core cannot check them: every later answer is "
            "flagged resumed)",
};
#undef SC

/* ---- the setup ---------------------------------------------------------- */

void proto__pres_setup_init(pres_setup *s)
{
	memset(s, 0, sizeof *s);
	rw_pres_column_init(&s->col);
	s->mudline = rw_pres_column_mudline(&s->col);
	s->law_default = 1;
	s->water = PRES_WATER_CONST;
	s->rho_w = RW_PRES_RHO_FRESH;
	s->vsh_min = NAN;
	s->pore = PRES_PORE_EATON;
	s->exponent = 3.0;
	s->frac = PRES_FRAC_EATON;
	s->nu_a = 1.0;
	s->nu_b = 0.0;
	s->alpha = 1.0;
	s->unloading_from_m = NAN;
	s->bw.sigma_max_pa = NAN;
}

int proto__pres_column(proto_call *c, const proto_pres_column *pc,
                       const char *path, int need_law, pres_setup *s)
{
	const char *bad;

	rw_pres_column_init(&s->col);
	s->law_default = 1;
	if (pc->hdr.present) {
		const proto_pres_shallow *sh = &pc->shallow;
		/* absent members arrive as their declared defaults */
		s->col.air_gap_m = pc->air_gap.v[0];
		s->col.water_depth_m = pc->water_depth.v[0];
		s->col.rho_sea_kgm3 = pc->rho_sea.v[0];
		s->col.g_ms2 = pc->g.v[0];
		if (sh->hdr.present) {
			s->law_default = 0;
			s->col.rho_ml_kgm3 = sh->rho_ml.v[0];
			s->col.rho_a_kgm3 = sh->a.v[0];
			s->col.trend_s0_m = sh->s0.v[0];
			s->col.trend_p = sh->p.v[0];
			if (sh->cap.present)
				s->col.rho_cap_kgm3 = sh->cap.v[0];
		}
	}
	if (need_law && s->law_default &&
	    s->col.water_depth_m >= DEEP_WATER_M - 1e-9)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, path, ".shallow", ""),
		    "%.6g m of water is deep water (1000 ft or more, common "
		    "practice): give %s.shallow, the shallow-density law of "
		    "the basin. The default is a shelf law (16.3 lb/gal at the "
		    "mudline) that overstates the shallow overburden in deep "
		    "water, and with it the pore pressure and the fracture "
		    "gradient",
		    s->col.water_depth_m, path);
	if (rw_pres_column_check(&s->col, &bad) != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, path, ".", bad),
		                  "out of range for the column");
	s->mudline = rw_pres_column_mudline(&s->col);
	return 0;
}

int proto__pres_water(proto_call *c, const proto_pres_water *w,
                      const char *path, pres_setup *s)
{
	s->water = PRES_WATER_CONST;
	s->rho_w = RW_PRES_RHO_FRESH;
	if (!w->hdr.present)
		return 0;
	if (w->density.present) {
		s->rho_w = w->density.v[0];
	} else if (w->gradient.present) {
		s->rho_w = w->gradient.v[0] * 1e6 / s->col.g_ms2;
		if (s->rho_w < 900 || s->rho_w > 1300)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path, ".gradient", ""),
			    "is %.6g kg/m3 of water at g = %.6g m/s2: outside "
			    "0.9-1.3 g/cm3 (a unit slip?)",
			    s->rho_w, s->col.g_ms2);
	} else if (w->brine.hdr.present) {
		s->water = PRES_WATER_BRINE;
		s->sal = w->brine.salinity.v[0];
		s->t_ml = w->brine.mudline_temperature.v[0];
		s->t_grad = w->brine.temperature_gradient.v[0];
	}
	return 0;
}

int proto__pres_trend_given(proto_call *c, const proto_pres_trend *t,
                            const char *path, pres_setup *s)
{
	double lo = NAN, hi = NAN;
	int st;

	if (t->top.present) {
		lo = t->top.v[0] - s->mudline;
		hi = t->base.v[0] - s->mudline;
		if (lo < 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path, ".top", ""),
			    "is above the mudline (%.6g m below the "
			    "datum): a trend runs below the mudline",
			    s->mudline);
		if (hi < lo)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, path, ".base", ""),
			                  "is above top");
	}
	st =
	    rw_pres_trend_given(t->form, t->dt_ma.present ? t->dt_ma.v[0] : NAN,
	                        t->dt_ml.v[0], t->c.v[0], lo, hi, &s->trend);
	if (st != RW_OK)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, proto_path(c, path, ".dt_ma", ""),
		    "must be below dt_ml: the deep limit is faster "
		    "than the sediment at the mudline");
	s->have_trend = 1;
	s->trend_fitted = 0;
	s->trend_has_cov = t->cov.given;
	if (t->cov.given)
		memcpy(s->trend.cov, t->cov.v, sizeof s->trend.cov);
	return 0;
}

int proto__pres_trend_fit(proto_call *c, const proto_pres_fit *f,
                          const char *path, size_t n, const double *z_m,
                          const double *dt_sm, const double *vsh,
                          const unsigned char *excl, pres_setup *s)
{
	size_t k, nint = f->intervals.n, nuse = 0;
	const proto_pres_interval *iv = f->intervals.items;
	double *top = proto_alloc_doubles(c, nint);
	double *base = proto_alloc_doubles(c, nint);
	double *sb = proto_alloc_doubles(c, n ? n : 1);
	unsigned char *use = proto_alloc(c, n ? n : 1);
	const char *ipath =
	    *path ? proto_path(c, path, ".intervals", "") : "intervals";
	rw_pres_trend_ws *ws;
	int need = f->form == RW_PRES_TREND_EXP ? 4 : 3, st;

	if (!top || !base || !sb || !use)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (k = 0; k < nint; k++) {
		top[k] = iv[k].top.v[0];
		base[k] = iv[k].base.v[0];
		if (top[k] < s->mudline) {
			char idx[32];
			snprintf(idx, sizeof idx, "[%zu].top", k);
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, ipath, idx, ""),
			                  "is above the mudline (%.6g m below "
			                  "the datum): a compaction trend runs "
			                  "below the mudline",
			                  s->mudline);
		}
	}
	st = rw_pres_trend_select(n, z_m, dt_sm, vsh, vsh ? s->vsh_min : 0.0,
	                          excl, nint, top, base, use, &nuse);
	if (st != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS, ipath,
		                  "cannot select the samples (status %d)", st);
	if (nuse < (size_t)need)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, ipath,
		    "%zu sample%s inside the intervals %s; the %s fit needs at "
		    "least %d",
		    nuse, nuse == 1 ? "" : "s",
		    vsh ? "pass the shale selector (vsh at or above vsh_min, "
		          "finite slowness, not excluded)"
		        : "have a finite slowness and are not excluded",
		    proto_pres_form_names[f->form], need);
	for (k = 0; k < n; k++)
		sb[k] = z_m[k] - s->mudline;
	ws = rw_pres_trend_ws_new(nuse < 4 ? 4 : nuse);
	if (!ws)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the trend fit");
	st = rw_pres_trend_fit(ws, f->form, n, sb, dt_sm, use, &s->trend);
	rw_pres_trend_ws_free(ws);
	if (st == RW_ERANGE)
		return proto_fail(c, PROTO_INVALID_PARAMS, ipath,
		                  "the best %s fit of the %zu samples is not a "
		                  "compaction trend (slowness not decreasing "
		                  "with depth, or a decay constant outside "
		                  "1e-6 to 0.1 per m): check the intervals and "
		                  "the shale selector",
		                  proto_pres_form_names[f->form], nuse);
	if (st == RW_EMAXITER)
		return proto_fail(c, PROTO_INVALID_PARAMS, ipath,
		                  "the trend fit did not converge on the %zu "
		                  "samples",
		                  nuse);
	if (st != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS, ipath,
		                  "the %zu samples do not span a depth range: "
		                  "no trend can be fitted",
		                  nuse);
	s->have_trend = 1;
	s->trend_fitted = 1;
	s->trend_has_cov = 1;
	return 0;
}

int proto__pres_bowers(proto_call *c, const proto_pres_bowers *b,
                       const char *path, pres_setup *s)
{
	double a = b->a.v[0], bb = b->b.v[0];

	s->bw.v0_ms = b->v0.v[0];
	s->bw.a_ms = b->a_units == 1 ? rw_pres_bowers_a_from_field(a, bb) : a;
	s->bw.b = bb;
	s->bw.u = b->u.v[0];
	s->bw.sigma_max_pa = NAN;
	s->unloading = 0;
	s->unloading_from_m = NAN;
	if (b->sigma_max.present) {
		s->bw.sigma_max_pa = b->sigma_max.v[0] * 1e6;
	} else if (b->v_max.present) {
		if (rw_pres_bowers_sigma_max(&s->bw, b->v_max.v[0],
		                             &s->bw.sigma_max_pa) != RW_OK)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path, ".v_max", ""),
			    "must be above v0: the virgin curve has "
			    "no effective stress there");
	}
	if (!isnan(s->bw.sigma_max_pa)) {
		s->unloading = 1;
		s->unloading_from_m = b->unloading_from.v[0];
	}
	return 0;
}

/* ---- the state token ---------------------------------------------------- */

/* FNV-1a, 64 bits: a consistency check, not a security measure. */
static uint64_t fnv(uint64_t h, const void *p, size_t n)
{
	const unsigned char *b = p;

	for (size_t i = 0; i < n; i++) {
		h ^= b[i];
		h *= 1099511628211ull;
	}
	return h;
}

/* The setup a state belongs to: the column and the pore water. */
static uint64_t setup_hash(const pres_setup *s, const char *payload)
{
	uint64_t h = 14695981039346656037ull;
	int w = s->water;

	h = fnv(h, payload, strlen(payload));
	h = fnv(h, &s->col, sizeof s->col);
	h = fnv(h, &w, sizeof w);
	if (s->water == PRES_WATER_CONST)
		h = fnv(h, &s->rho_w, sizeof s->rho_w);
	else {
		h = fnv(h, &s->sal, sizeof s->sal);
		h = fnv(h, &s->t_ml, sizeof s->t_ml);
		h = fnv(h, &s->t_grad, sizeof s->t_grad);
	}
	return h;
}

#define TOKEN_VALUES 8
#define TOKEN_PREFIX "rwp1."

static void state_values(const pres_state *st, double v[TOKEN_VALUES])
{
	v[0] = st->obg.z_m;
	v[1] = st->obg.sv_pa;
	v[2] = st->obg.rho_kgm3;
	v[3] = st->obg.sv_assumed_pa;
	v[4] = st->hyd.z_m;
	v[5] = st->hyd.p_pa;
	v[6] = st->hyd.t_degc;
	v[7] = st->hyd.sal_frac;
}

static unsigned state_bits(const pres_state *st)
{
	return (st->obg.resumed ? 1u : 0) | (st->law_used ? 2u : 0) |
	       (st->has_hyd ? 4u : 0) | (st->hyd.resumed ? 8u : 0);
}

const char *proto__pres_token(proto_call *c, const pres_setup *s)
{
	char buf[256];
	double v[TOKEN_VALUES];
	size_t used;

	state_values(&s->st, v);
	used = (size_t)snprintf(buf, sizeof buf, TOKEN_PREFIX);
	for (int i = 0; i < TOKEN_VALUES; i++) {
		uint64_t b;
		memcpy(&b, &v[i], sizeof b);
		used += (size_t)snprintf(buf + used, sizeof buf - used,
		                         "%016" PRIx64, b);
	}
	used += (size_t)snprintf(buf + used, sizeof buf - used, ".%02x",
	                         state_bits(&s->st));
	snprintf(buf + used, sizeof buf - used, ".%016" PRIx64,
	         setup_hash(s, buf));
	return proto_strdup(c, buf);
}

static int hexval(char ch)
{
	if (ch >= '0' && ch <= '9')
		return ch - '0';
	if (ch >= 'a' && ch <= 'f')
		return ch - 'a' + 10;
	return -1;
}

/* Reads n hex digits of p into *out. 0 or -1. */
static int hex_read(const char *p, int n, uint64_t *out)
{
	uint64_t x = 0;

	for (int i = 0; i < n; i++) {
		int d = hexval(p[i]);
		if (d < 0)
			return -1;
		x = x << 4 | (uint64_t)d;
	}
	*out = x;
	return 0;
}

/* Decodes a token into st. 0, -1 malformed, -2 another setup. */
static int token_read(const char *tok, const pres_setup *s, pres_state *st)
{
	size_t plen = strlen(TOKEN_PREFIX), len = strlen(tok);
	size_t body = plen + 16 * TOKEN_VALUES, want = body + 3 + 17;
	double v[TOKEN_VALUES];
	uint64_t b, bits, check;
	char payload[256];

	if (len != want || strncmp(tok, TOKEN_PREFIX, plen) != 0 ||
	    tok[body] != '.' || tok[body + 3] != '.')
		return -1;
	for (int i = 0; i < TOKEN_VALUES; i++) {
		if (hex_read(tok + plen + 16 * (size_t)i, 16, &b))
			return -1;
		memcpy(&v[i], &b, sizeof b);
	}
	if (hex_read(tok + body + 1, 2, &bits) ||
	    hex_read(tok + body + 4, 16, &check) || bits > 15)
		return -1;
	memcpy(payload, tok, body + 3);
	payload[body + 3] = '\0';
	if (setup_hash(s, payload) != check)
		return -2;
	memset(st, 0, sizeof *st);
	st->obg.z_m = v[0];
	st->obg.sv_pa = v[1];
	st->obg.rho_kgm3 = v[2];
	st->obg.sv_assumed_pa = v[3];
	st->obg.resumed = (bits & 1u) != 0;
	st->law_used = (bits & 2u) != 0;
	st->has_hyd = (bits & 4u) != 0;
	st->hyd.z_m = v[4];
	st->hyd.p_pa = v[5];
	st->hyd.t_degc = v[6];
	st->hyd.sal_frac = v[7];
	st->hyd.resumed = (bits & 8u) != 0;
	return 0;
}

/* Brine temperature at z (linear below the mudline). */
static double brine_t(const pres_setup *s, double z)
{
	return s->t_ml + s->t_grad * (z > s->mudline ? z - s->mudline : 0.0);
}

int proto__pres_start(proto_call *c, const char *token, const char *state_path,
                      const proto_pres_resume *r, const char *resume_path,
                      int need_obg, int need_hyd, pres_setup *s)
{
	int brine = need_hyd && s->water == PRES_WATER_BRINE;

	memset(&s->st, 0, sizeof s->st);
	s->continued = 0;
	if (token) {
		int rc = token_read(token, s, &s->st);
		if (rc == -1)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, state_path,
			    "not a state token of this daemon (give "
			    "the pressure_state.token of the previous "
			    "answer as it was)");
		if (rc == -2)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, state_path,
			    "this state was made with another column or pore "
			    "water (air gap, water depth, sea water, gravity, "
			    "shallow law, pore water): the running integrals "
			    "belong to those; keep them, or restart with "
			    "resume "
			    "{tvd, sv} to change them");
		if (need_obg && !isfinite(s->st.obg.z_m))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, state_path,
			    "the state holds no overburden integral");
		if (brine && !s->st.has_hyd)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, state_path,
			    "the state holds no brine hydrostatic "
			    "integral");
		s->continued = 1;
		return 0;
	}
	if (need_obg) {
		if (r->hdr.present && !r->sv.present)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, resume_path, ".sv", ""),
			                  "required to restart the overburden "
			                  "integral");
		if (r->hdr.present) {
			double rho = r->rhob.present ? r->rhob.v[0] : NAN;
			if (r->tvd.v[0] < s->mudline)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, resume_path, ".tvd", ""),
				    "is above the mudline (%.6g m)",
				    s->mudline);
			if (rw_pres_obg_resume(&s->col, r->tvd.v[0],
			                       r->sv.v[0] * 1e6, rho,
			                       &s->st.obg) != RW_OK)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, resume_path, ".sv", ""),
				    "is below the sea-water column at the "
				    "mudline");
		} else {
			rw_pres_obg_init(&s->col, &s->st.obg);
		}
	} else {
		rw_pres_obg_init(&s->col, &s->st.obg);
	}
	if (brine) {
		if (r->hdr.present) {
			double z = r->tvd.v[0];
			if (!r->ph.present)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, resume_path, ".ph", ""),
				    "required to restart the brine "
				    "hydrostatic integral");
			if (z < s->mudline ||
			    rw_pres_hydro_brine_resume(
			        &s->col, z, r->ph.v[0] * 1e6, brine_t(s, z),
			        s->sal, &s->st.hyd) != RW_OK)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS,
				    proto_path(c, resume_path, ".tvd", ""),
				    "the brine cannot restart there (above "
				    "the mudline, or its temperature out of "
				    "range)");
		} else if (rw_pres_hydro_brine_init(&s->col, s->t_ml, s->sal,
		                                    &s->st.hyd) != RW_OK) {
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  "pore_water.brine",
			                  "out of the brine's range at the "
			                  "mudline");
		}
		s->st.has_hyd = 1;
	} else if (r->hdr.present && r->ph.present) {
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, resume_path, ".ph", ""),
		                  "not used by this request: a constant pore "
		                  "water needs no restart value");
	}
	if (r->hdr.present && !need_obg && (r->sv.present || r->rhob.present))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, resume_path,
		                             r->sv.present ? ".sv" : ".rhob",
		                             ""),
		                  "not used by this request: it integrates no "
		                  "overburden");
	return 0;
}

/* ---- the chain ---------------------------------------------------------- */

void proto__pres_sample_clear(pres_sample *o)
{
	o->sv = o->sv_assumed = o->ph = o->rho_w = NAN;
	o->dt_n = o->dt_n_sigma = o->pp = o->pp_sigma = NAN;
	o->sigma_eff = o->shmin = o->shmax = o->nu = NAN;
	o->qc = QC_PRES_CAUTION;
	o->detail = 0;
}

uint64_t proto__pres_qc(uint64_t d)
{
	uint64_t q = QC_PRES_CAUTION;

	if (d & (RW_PRES_WARN_OBG_TREND | RW_PRES_WARN_RHO_HELD |
	         RW_PRES_WARN_FLUID_RANGE | RW_PRES_WARN_TREND_EXTRAPOLATED |
	         RW_PRES_WARN_TREND_NORANGE | PRES_D_LAW_DEFAULT |
	         PRES_D_DENSITY_DOUBTFUL))
		q |= QC_PRES_EXTRAPOLATED;
	if (d &
	    (RW_PRES_WARN_TREND_FAST | RW_PRES_WARN_PP_BELOW_HYDRO |
	     RW_PRES_WARN_PP_AT_SV | RW_PRES_WARN_FG_BELOW_PP |
	     RW_PRES_WARN_FG_ABOVE_SV | RW_PRES_WARN_HORIZ_SWAPPED |
	     PRES_D_SV_BELOW_PH | PRES_D_BELOW_V0 | PRES_D_STATIC_ABOVE_DYN))
		q |= QC_PRES_INCONSISTENT;
	if (d & PRES_D_NOT_SHALE)
		q |= QC_PRES_NOT_SHALE;
	if (d & (PRES_D_STRENGTH_RANGE | PRES_D_LITHOLOGY))
		q |= QC_STRENGTH_RANGE;
	if (d & RW_PRES_WARN_NU_NONPOSITIVE)
		q |= QC_NU_NEGATIVE;
	if (d & PRES_D_NOT_DOWNWARD)
		q |= QC_INPUT_INVALID;
	return q;
}

int proto__pres_integrate(proto_call *c, pres_setup *s, int do_obg, int do_hyd,
                          size_t n, const double *z_m, const double *rho,
                          const unsigned char *doubtful, pres_sample *out)
{
	rw_pres_hydro_ws *ws = NULL;
	int brine = do_hyd && s->water == PRES_WATER_BRINE;

	if (brine && !(ws = rw_pres_hydro_ws_new()))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory for the brine integral");
	for (size_t i = 0; i < n; i++) {
		pres_sample *o = &out[i];
		double z = z_m[i];
		unsigned w = 0;
		int st;

		if (isnan(z)) {
			o->qc |= QC_LOG_MISSING;
			continue;
		}
		if (do_obg) {
			rw_pres_obg_out ob;
			double r = rho ? rho[i] : NAN;
			if (doubtful && doubtful[i] && isfinite(r)) {
				o->detail |= PRES_D_DENSITY_DOUBTFUL;
				r = NAN;
			}
			st = rw_pres_obg_step(&s->col, &s->st.obg, z, r, &ob,
			                      &w);
			if (st == RW_OK) {
				o->sv = ob.sv_pa;
				o->sv_assumed = ob.sv_assumed_pa;
				o->detail |= w;
				if (w & RW_PRES_WARN_OBG_TREND)
					s->st.law_used = 1;
				if (s->law_default && s->st.law_used &&
				    !(w & RW_PRES_WARN_ABOVE_MUDLINE))
					o->detail |= PRES_D_LAW_DEFAULT;
				/* a null density below the mudline: missing
				 * (above it there is no formation to log) */
				if (rho && isnan(rho[i]) &&
				    !(w & RW_PRES_WARN_ABOVE_MUDLINE))
					o->qc |= QC_LOG_MISSING;
			} else if (st == RW_EINVAL) {
				o->detail |= PRES_D_NOT_DOWNWARD;
			} else {
				o->qc |= QC_INPUT_INVALID;
			}
		}
		if (do_hyd) {
			double p = NAN, rw = NAN;
			w = 0;
			if (!brine) {
				st = rw_pres_hydro_const(&s->col, z, s->rho_w,
				                         &p, &w);
				rw = z > s->mudline ? s->rho_w
				     : z > s->col.air_gap_m
				         ? s->col.rho_sea_kgm3
				         : NAN;
			} else {
				st = rw_pres_hydro_brine_step(
				    ws, &s->col, &s->st.hyd, z, brine_t(s, z),
				    s->sal, &p, &rw, &w);
			}
			if (st == RW_OK) {
				o->ph = p;
				o->rho_w = rw;
				o->detail |= w;
			} else if (st == RW_EINVAL) {
				o->detail |= PRES_D_NOT_DOWNWARD;
			} else {
				o->qc |= QC_INPUT_INVALID;
			}
		}
		o->qc |= proto__pres_qc(o->detail);
	}
	rw_pres_hydro_ws_free(ws);
	return 0;
}

void proto__pres_pore(const pres_setup *s, double z, double dt, double vp,
                      double vsh, pres_sample *o)
{
	unsigned w = 0;
	int st;

	if (s->pore == PRES_PORE_NONE || isnan(z))
		return;
	if (!isnan(s->vsh_min) && !(vsh >= s->vsh_min))
		o->detail |= PRES_D_NOT_SHALE;
	if (s->pore == PRES_PORE_EATON && s->have_trend && z > s->mudline) {
		double sig = NAN;
		rw_pres_trend_eval(&s->trend, z - s->mudline, &o->dt_n, &sig,
		                   &w);
		o->dt_n_sigma = s->trend_has_cov ? sig : NAN;
		o->detail |= w;
	}
	if (isnan(o->sv) || isnan(o->ph))
		goto done; /* flagged where it failed */
	if (z <= s->mudline) {
		/* the air or water column: no formation */
		o->pp = o->ph;
		o->detail |= RW_PRES_WARN_ABOVE_MUDLINE;
		goto done;
	}
	if (o->sv < o->ph) {
		o->detail |= PRES_D_SV_BELOW_PH;
		goto done;
	}
	if (s->pore == PRES_PORE_EATON) {
		if (isnan(dt)) {
			o->qc |= QC_LOG_MISSING;
			goto done;
		}
		st = rw_pres_pore_eaton(o->sv, o->ph, dt, o->dt_n, s->exponent,
		                        &o->pp, &o->sigma_eff, &w);
		if (st != RW_OK) {
			o->qc |= QC_INPUT_INVALID;
			goto done;
		}
		o->detail |= w;
		if (isfinite(o->dt_n_sigma))
			rw_pres_pore_eaton_sigma(o->sv, o->ph, dt, o->dt_n,
			                         s->exponent, o->dt_n_sigma,
			                         &o->pp_sigma);
	} else {
		int unl = s->unloading && z >= s->unloading_from_m;
		if (isnan(vp)) {
			o->qc |= QC_LOG_MISSING;
			goto done;
		}
		st = rw_pres_pore_bowers(&s->bw, unl, o->sv, o->ph, vp, &o->pp,
		                         &o->sigma_eff, &w);
		if (st == RW_ERANGE)
			o->detail |= PRES_D_BELOW_V0;
		else if (st != RW_OK)
			o->qc |= QC_INPUT_INVALID;
		else
			o->detail |= w;
	}
done:
	/* a slowness far faster than the trend (a tight streak, a seal) can
	 * drive Eaton's or Bowers' pore pressure below zero absolute: not a
	 * pressure at all, so null, flagged pressure_inconsistent (its
	 * warning bit says pp below hydrostatic) */
	if (o->pp < 0) {
		o->pp = o->pp_sigma = o->sigma_eff = NAN;
		o->detail |= RW_PRES_WARN_PP_BELOW_HYDRO;
	}
	o->qc |= proto__pres_qc(o->detail);
}

void proto__pres_frac(const pres_setup *s, double z, double nu_dyn, double ki,
                      double e_static_pa, pres_sample *o)
{
	unsigned w = 0;
	double nu = NAN;
	int st = RW_OK;

	if (s->frac == PRES_FRAC_NONE || isnan(z))
		return;
	if (s->frac != PRES_FRAC_MK) {
		if (isnan(nu_dyn)) {
			o->qc |= QC_LOG_MISSING;
			goto done;
		}
		if (rw_strength_nu_static(nu_dyn, s->nu_a, s->nu_b, &nu) !=
		    RW_OK) {
			o->qc |= QC_INPUT_INVALID;
			goto done;
		}
		o->nu = nu;
	}
	if (isnan(o->sv) || isnan(o->pp))
		goto done;
	if (z <= s->mudline) {
		o->detail |= RW_PRES_WARN_ABOVE_MUDLINE;
		goto done;
	}
	if (o->pp > o->sv) {
		o->detail |= RW_PRES_WARN_PP_AT_SV;
		goto done;
	}
	if (o->pp < 0) {
		/* a negative pore pressure (e.g. Eaton on a fast non-shale):
		 * reported as it is, no stress from it */
		o->detail |= RW_PRES_WARN_PP_BELOW_HYDRO;
		goto done;
	}
	switch (s->frac) {
	case PRES_FRAC_EATON:
		st = rw_pres_frac_eaton(o->sv, o->pp, nu, &o->shmin, &w);
		break;
	case PRES_FRAC_MK:
		if (isnan(ki)) {
			o->qc |= QC_LOG_MISSING;
			goto done;
		}
		st = rw_pres_frac_mk(o->sv, o->pp, ki, &o->shmin);
		break;
	default:
		if ((s->eps_h != 0 || s->eps_hmax != 0) && isnan(e_static_pa)) {
			o->qc |= QC_LOG_MISSING;
			goto done;
		}
		st = rw_pres_frac_poroelastic(
		    o->sv, o->pp, nu, s->alpha, e_static_pa, s->eps_h,
		    s->eps_hmax, &o->shmin, &o->shmax, &w);
	}
	if (st != RW_OK)
		o->qc |= QC_INPUT_INVALID;
	else
		o->detail |= w;
done:
	o->qc |= proto__pres_qc(o->detail);
}

/* ---- shared writers ----------------------------------------------------- */

void proto__pres_write_caution(proto_call *c, const char *key, const void *args)
{
	(void)args;
	proto_w_str(c, key, proto_pres_caution);
}

/* A double exactly, as a raw JSON number (null when not finite). */
static size_t exact(char *buf, size_t size, double v)
{
	return (size_t)(isfinite(v) ? snprintf(buf, size, "%.17g", v)
	                            : snprintf(buf, size, "null"));
}

void proto__pres_write_trend(proto_call *c, const char *key,
                             const pres_setup *s)
{
	const rw_pres_trend *t = &s->trend;
	char buf[768];
	size_t used = 0;

	if (!s->have_trend) {
		proto_w_null(c, key);
		return;
	}
	proto_w_obj_begin(c, key);
	proto_w_str(c, "form", proto_pres_form_names[t->form]);
	if (t->form == RW_PRES_TREND_EXP)
		proto_w_num(c, "dt_ma", PK_SLOWNESS, t->dt_ma_sm);
	proto_w_num(c, "dt_ml", PK_SLOWNESS, t->dt_ml_sm);
	proto_w_num(c, "c", PK_INV_LENGTH, t->c_per_m);
	if (!isnan(t->s_min_m)) {
		proto_w_num(c, "top", PK_LENGTH, t->s_min_m + s->mudline);
		proto_w_num(c, "base", PK_LENGTH, t->s_max_m + s->mudline);
	}
	if (s->trend_has_cov) {
		buf[used++] = '[';
		for (int i = 0; i < 3; i++) {
			used += (size_t)snprintf(buf + used, sizeof buf - used,
			                         "%s[", i ? "," : "");
			for (int j = 0; j < 3; j++) {
				if (j)
					buf[used++] = ',';
				/* symmetric exactly (the fit's is to rounding)
				 */
				used += exact(
				    buf + used, sizeof buf - used,
				    t->form == RW_PRES_TREND_LOGLIN &&
				            (i == 0 || j == 0)
				        ? NAN
				        : 0.5 * (t->cov[i][j] + t->cov[j][i]));
			}
			buf[used++] = ']';
		}
		buf[used++] = ']';
		proto_w_raw(c, "covariance_si", buf, used);
	}
	proto_w_obj_end(c);
}

void proto__pres_write_state(proto_call *c, const char *key,
                             const pres_setup *s)
{
	const char *tok = proto__pres_token(c, s);

	proto_w_obj_begin(c, key);
	if (tok)
		proto_w_str(c, "token", tok);
	else
		proto_w_null(c, "token");
	proto_w_obj_end(c);
}

/* ---- per-sample rows shared by the methods ------------------------------ */

/* What a method's prepare computed, in the call's arena. */
typedef struct pres_run {
	pres_setup set;
	pres_sample *out;
	double *z; /* TVD per sample, m */
	double *vsh;
	unsigned char *in_fit;
	int has_vsh;
} pres_run;

/* One output row; each method declares the members it writes. */
typedef struct pres_row {
	double sv, sv_grad, sv_emw, sv_assumed;
	double ph, ph_grad, ph_emw, rho_w;
	double dt_n, dt_n_sigma, in_fit, vsh;
	double pp, pp_grad, pp_emw, pp_sigma, sigma_eff;
	double shmin, shmin_grad, shmin_emw, shmax, nu;
	uint64_t qc, detail;
} pres_row;

/* Equivalent mud weight (kg/m^3) and gradient (MPa/m) of p_pa at z. */
static void emw_of(double p, double z, double g, double *emw, double *grad)
{
	double rho, gr;

	if (rw_pres_emw(p, z, g, &rho, &gr) == RW_OK) {
		*emw = rho;
		*grad = gr * 1e-6;
	}
}

static void fill_row(const pres_run *r, size_t i, pres_row *row, uint64_t *qc)
{
	const pres_sample *o = &r->out[i];
	double z = r->z[i], g = r->set.col.g_ms2;

	row->sv = o->sv * 1e-6;
	emw_of(o->sv, z, g, &row->sv_emw, &row->sv_grad);
	row->sv_assumed = o->sv_assumed * 1e-6;
	row->ph = o->ph * 1e-6;
	emw_of(o->ph, z, g, &row->ph_emw, &row->ph_grad);
	row->rho_w = o->rho_w;
	row->dt_n = o->dt_n;
	row->dt_n_sigma = o->dt_n_sigma;
	row->in_fit = r->in_fit ? (double)r->in_fit[i] : NAN;
	row->vsh = r->vsh ? r->vsh[i] : NAN;
	row->pp = o->pp * 1e-6;
	emw_of(o->pp, z, g, &row->pp_emw, &row->pp_grad);
	row->pp_sigma = o->pp_sigma * 1e-6;
	row->sigma_eff = o->sigma_eff * 1e-6;
	row->shmin = o->shmin * 1e-6;
	emw_of(o->shmin, z, g, &row->shmin_emw, &row->shmin_grad);
	row->shmax = o->shmax * 1e-6;
	row->nu = o->nu;
	row->detail = o->detail;
	*qc = o->qc;
}

/* Allocates the run: setup defaults, n cleared samples and the depths
 * of tvd. NULL after proto_fail. */
static pres_run *run_new(proto_call *c, const proto_vec *tvd, size_t n)
{
	pres_run *r = proto_alloc(c, sizeof *r);

	if (!r || !(r->out = proto_alloc(c, (n ? n : 1) * sizeof *r->out)) ||
	    !(r->z = proto_alloc_doubles(c, n ? n : 1))) {
		proto_fail(c, PROTO_INTERNAL_ERROR, NULL, "out of memory");
		return NULL;
	}
	memset(r, 0, offsetof(pres_run, out));
	proto__pres_setup_init(&r->set);
	r->vsh = NULL;
	r->in_fit = NULL;
	r->has_vsh = 0;
	for (size_t i = 0; i < n; i++) {
		proto__pres_sample_clear(&r->out[i]);
		r->z[i] = proto_at(tvd, i);
	}
	return r;
}

/* Samples of a numeric input as an arena array (NaN when absent). */
static double *vec_array(proto_call *c, const proto_vec *v, size_t n)
{
	double *a = proto_alloc_doubles(c, n ? n : 1);

	if (!a)
		return NULL;
	for (size_t i = 0; i < n; i++)
		a[i] = v->present ? proto_at(v, i) : NAN;
	return a;
}

/* The shale fraction per sample from vsh, or from gr by the linear
 * gamma-ray index clipped to [0, 1] (common practice, as log.process);
 * NaN where missing. Values of vsh outside [0, 1] are NaN and flagged
 * input_invalid. */
static int shale_of(proto_call *c, pres_run *r, const proto_vec *vsh,
                    const proto_vec *gr, const proto_vec *g0,
                    const proto_vec *g1, size_t n)
{
	if (!vsh->present && !gr->present)
		return 0;
	r->vsh = proto_alloc_doubles(c, n ? n : 1);
	if (!r->vsh)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	r->has_vsh = 1;
	for (size_t i = 0; i < n; i++) {
		double v;
		if (vsh->present) {
			v = proto_at(vsh, i);
			if (!isnan(v) && (v < 0 || v > 1)) {
				r->out[i].qc |= QC_INPUT_INVALID;
				v = NAN;
			}
		} else {
			double g = proto_at(gr, i), a = proto_at(g0, i);
			double b = proto_at(g1, i);
			v = isnan(g) ? NAN
			             : fmin(1, fmax(0, (g - a) / (b - a)));
		}
		if (isnan(v) && !(r->out[i].qc & QC_INPUT_INVALID))
			r->out[i].qc |= QC_LOG_MISSING;
		r->vsh[i] = v;
	}
	return 0;
}

/* gr_shale above gr_clean per element. */
static int gr_check(proto_call *c, const proto_vec *gr, const proto_vec *g0,
                    const proto_vec *g1)
{
	if (!gr->present)
		return 0;
	for (size_t i = 0; i < g0->n || i < g1->n; i++)
		if (!(proto_at(g1, i) > proto_at(g0, i)))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "gr_shale",
			    "must be above gr_clean (element %zu)", i);
	return 0;
}

/* Slowness per sample from dtp or vp (NaN when missing or not
 * positive; not positive is flagged input_invalid). */
static double *slowness_of(proto_call *c, pres_run *r, const proto_vec *dtp,
                           const proto_vec *vp, size_t n)
{
	double *dt = proto_alloc_doubles(c, n ? n : 1);

	if (!dt)
		return NULL;
	for (size_t i = 0; i < n; i++) {
		double v = dtp->present  ? proto_at(dtp, i)
		           : vp->present ? 1.0 / proto_at(vp, i)
		                         : NAN;
		if (!isnan(v) && !(v > 0 && isfinite(v))) {
			r->out[i].qc |= QC_INPUT_INVALID;
			v = NAN;
		}
		dt[i] = v;
	}
	return dt;
}

/* Common field declarations. */
#define TVD_FIELD(st)                                                          \
	{                                                                      \
		PROTO_NUMS(                                                    \
		    st, tvd, PK_LENGTH, PF_REQ | PF_NULLS,                     \
		    "true vertical depth below the datum (drill floor) of "    \
		    "each sample, in order down the well; a log in measured "  \
		    "depth must be converted with the deviation survey "       \
		    "first")                                                   \
	}
#define COLUMN_FIELD(st)                                                       \
	{                                                                      \
		PROTO_FIELD(                                                   \
		    st, column, PT_OBJ, 0,                                     \
		    "the column above the log (default: land, datum at "       \
		    "ground level, the default shallow-density law)"),         \
		    .sub = &proto_pres_column_decl                             \
	}
#define STATE_FIELD(st)                                                        \
	{                                                                      \
		PROTO_FIELD(                                                   \
		    st, state, PT_STR, 0,                                      \
		    "the pressure_state.token of the previous answer: this "   \
		    "request continues its running integrals exactly (a "      \
		    "stream of requests down one well)")                       \
	}
#define RESUME_FIELD(st)                                                       \
	{                                                                      \
		PROTO_FIELD(                                                   \
		    st, resume, PT_OBJ, 0,                                     \
		    "restart the running integrals from known values at a "    \
		    "depth (flagged resumed)"),                                \
		    .sub = &proto_pres_resume_decl                             \
	}
#define WATER_FIELD(st)                                                        \
	{                                                                      \
		PROTO_FIELD(                                                   \
		    st, pore_water, PT_OBJ, 0,                                 \
		    "the pore water of the hydrostatic pressure (default "     \
		    "fresh water, 1.00 g/cm3, common practice)"),              \
		    .sub = &proto_pres_water_decl                              \
	}
#define SHALE_FIELDS(st)                                                       \
	{PROTO_NUMS(st, vsh, PK_NONE, PF_NULLS,                                \
	            "shale volume fraction, the shale selector (or gr)")},     \
	    {PROTO_NUMS(st, gr, PK_NONE, PF_NULLS,                             \
	                "gamma ray, API units (with gr_clean and gr_shale)")}, \
	    {PROTO_NUMS(st, gr_clean, PK_NONE, 0, "gamma ray of clean rock")}, \
	    {PROTO_NUMS(st, gr_shale, PK_NONE, 0,                              \
	                "gamma ray of shale (above gr_clean)")},               \
	{                                                                      \
		PROTO_NUMS(                                                    \
		    st, vsh_min, PK_NONE, PF_SCALAR | PF_DFLT | PF_FRACTION,   \
		    "shale cut-off: samples with vsh at or above it are "      \
		    "shale (default 0.6, common practice); one rule for "      \
		    "the request"),                                            \
		    .dflt = VSH_MIN_DFLT                                       \
	}

static const char *const vsh_gr[] = {"vsh", "gr", NULL};
static const char *const gr_needs[] = {"gr_clean", "gr_shale", NULL};
static const char *const dtp_vp[] = {"dtp", "vp", NULL};
static const char *const resume_state[] = {"resume", "state", NULL};

#define SHALE_RULES                                                            \
	{PR_AT_MOST, NULL, 1, vsh_gr, "give vsh or gr, not both"},             \
	{                                                                      \
		PR_REQUIRES, "gr", 0, gr_needs,                                \
		    "gr needs gr_clean and gr_shale (API units) for the "      \
		    "linear "                                                  \
		    "gamma-ray index"                                          \
	}

static int has_vsh_out(const pres_run *r)
{
	return r && r->has_vsh;
}

/* ---- pressure.overburden ------------------------------------------------ */

typedef struct obg_args {
	proto_hdr hdr;
	proto_vec tvd, rhob;
	proto_pres_column column;
	proto_pres_resume resume;
	const char *state;
	pres_run *run; /* derived, in the arena */
} obg_args;

static const proto_field obg_fields[] = {
    TVD_FIELD(obg_args),
    {PROTO_NUMS(obg_args, rhob, PK_DENSITY, PF_NULLS,
                "bulk density log; null or not positive: the last valid "
                "density is held (flagged); without rhob the whole column "
                "follows the shallow-density law")},
    COLUMN_FIELD(obg_args),
    RESUME_FIELD(obg_args),
    STATE_FIELD(obg_args),
    {0},
};

static const proto_rule obg_rules[] = {
    {PR_AT_MOST, NULL, 1, resume_state, "give resume or state, not both"},
    PR_LAST,
};

static const proto_decl obg_decl = {
    .name = "",
    .fields = obg_fields,
    .rules = obg_rules,
    .size = sizeof(obg_args),
};

/* Densities for the overburden: NaN where missing; not positive is
 * flagged (and held, as missing). */
static double *density_of(proto_call *c, pres_run *r, const proto_vec *rhob,
                          size_t n)
{
	double *rho = vec_array(c, rhob, n);

	if (!rho)
		return NULL;
	for (size_t i = 0; i < n; i++)
		if (!isnan(rho[i]) && !(rho[i] > 0)) {
			r->out[i].qc |= QC_RHO_NONPOSITIVE;
			rho[i] = NAN;
		}
	return rho;
}

static int obg_prepare(proto_call *c, void *args, proto_shape *sh)
{
	obg_args *a = args;
	size_t n = sh->n;
	pres_run *r = run_new(c, &a->tvd, n);
	double *rho;

	if (!r)
		return -1;
	if (proto__pres_column(c, &a->column, "column", 1, &r->set) ||
	    proto__pres_start(c, a->state, "state", &a->resume, "resume", 1, 0,
	                      &r->set))
		return -1;
	if (!a->rhob.present)
		proto_warn(c, "rhob",
		           "not given: the whole overburden follows the "
		           "shallow-density law (every sample flagged "
		           "pressure_extrapolated)");
	rho = density_of(c, r, &a->rhob, n);
	if (!rho)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	if (proto__pres_integrate(c, &r->set, 1, 0, n, r->z,
	                          a->rhob.present ? rho : NULL, NULL, r->out))
		return -1;
	a->run = r;
	return 0;
}

static int obg_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	(void)ws;
	fill_row(((const obg_args *)args)->run, i, row, qc);
	return 0;
}

static void obg_write_state(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_state(c, key, &((const obg_args *)args)->run->set);
}

#define ROW(nm, m, k_, w, text)                                                \
	{                                                                      \
		.name = nm, .type = PO_NUM, .kind = k_,                        \
		.offset = offsetof(pres_row, m), .when = w, .desc = text       \
	}
#define COMMON_TAIL                                                            \
	{.name = "qc",                                                         \
	 .type = PO_FLAGS,                                                     \
	 .offset = offsetof(pres_row, qc),                                     \
	 .desc = "QC flags per sample (pressure_screening_only on every "      \
	         "sample)"},                                                   \
	    {.name = "pressure_detail",                                        \
	     .type = PO_FLAGS,                                                 \
	     .offset = offsetof(pres_row, detail),                             \
	     .desc = proto_pres_detail_desc},                                  \
	{                                                                      \
		.name = "caution", .type = PO_CUSTOM, .dim = D_REQ,            \
		.write = proto__pres_write_caution,                            \
		.schema = "{\"type\": \"string\"}",                            \
		.desc = "screening estimates only (the family's caution)"      \
	}

static const proto_output obg_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "tvd",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(obg_args, tvd),
     .desc = "TVD (echoed)"},
    ROW("sv", sv, PK_PRESSURE, NULL, "overburden (vertical stress), gauge"),
    ROW("sv_gradient", sv_grad, PK_GRADIENT_P, NULL,
        "overburden / TVD (referred to the datum)"),
    ROW("sv_emw", sv_emw, PK_MUD_WEIGHT, NULL,
        "overburden as an equivalent mud weight, sv / (g TVD)"),
    ROW("sv_assumed", sv_assumed, PK_PRESSURE, NULL,
        "the part of sv integrated from assumed densities (the shallow "
        "law and held values) since the start or the restart"),
    COMMON_TAIL,
    {.name = "pressure_state",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = obg_write_state,
     .schema = PRES_SCHEMA_STATE,
     .desc = "the running integrals after the last sample: give its "
             "token as `state` to continue with the next samples"},
    {0},
};

static const proto_method m_overburden = {
    .name = "pressure.overburden",
    .summary = "Overburden (vertical stress) from bulk density over true "
               "vertical depth, with the column above the log.",
    .description =
        "Sv = rho_sea g h_w + g int rho dz from the mudline: the shallow-"
        "density law above the first valid density, trapezoids between "
        "log samples, the last valid density held over gaps (the core's "
        "rw_pres_obg_step, the same for a batch and a live feed). In 1000 "
        "ft of water or more the shallow law must be given. Screening "
        "estimates only; see pressure.md.",
    .params = &obg_decl,
    .outputs = obg_outputs,
    .prepare = obg_prepare,
    .kernel = obg_kernel,
    .row_size = sizeof(pres_row),
    .qc_offset = offsetof(pres_row, qc),
    .cost = 2,
};

/* ---- pressure.hydrostatic ----------------------------------------------- */

typedef struct hyd_args {
	proto_hdr hdr;
	proto_vec tvd;
	proto_pres_column column;
	proto_pres_water pore_water;
	proto_pres_resume resume;
	const char *state;
	pres_run *run;
} hyd_args;

static const proto_field hyd_fields[] = {
    TVD_FIELD(hyd_args),    COLUMN_FIELD(hyd_args), WATER_FIELD(hyd_args),
    RESUME_FIELD(hyd_args), STATE_FIELD(hyd_args),  {0},
};

static const proto_decl hyd_decl = {
    .name = "",
    .fields = hyd_fields,
    .rules = obg_rules,
    .size = sizeof(hyd_args),
};

static int hyd_prepare(proto_call *c, void *args, proto_shape *sh)
{
	hyd_args *a = args;
	pres_run *r = run_new(c, &a->tvd, sh->n);

	if (!r)
		return -1;
	if (proto__pres_column(c, &a->column, "column", 0, &r->set) ||
	    proto__pres_water(c, &a->pore_water, "pore_water", &r->set))
		return -1;
	if (r->set.water != PRES_WATER_BRINE &&
	    (a->resume.hdr.present || a->state))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  a->state ? "state" : "resume",
		                  "not used by this request: a constant pore "
		                  "water integrates in closed form, with no "
		                  "running state");
	if (proto__pres_start(c, a->state, "state", &a->resume, "resume", 0, 1,
	                      &r->set) ||
	    proto__pres_integrate(c, &r->set, 0, 1, sh->n, r->z, NULL, NULL,
	                          r->out))
		return -1;
	a->run = r;
	return 0;
}

static int hyd_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	(void)ws;
	fill_row(((const hyd_args *)args)->run, i, row, qc);
	return 0;
}

static void hyd_write_state(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_state(c, key, &((const hyd_args *)args)->run->set);
}

static int hyd_brine(const void *args)
{
	return ((const hyd_args *)args)->run->set.water == PRES_WATER_BRINE;
}

static const proto_output hyd_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "tvd",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(hyd_args, tvd),
     .desc = "TVD (echoed)"},
    ROW("ph", ph, PK_PRESSURE, NULL, "hydrostatic (normal) pore pressure"),
    ROW("ph_gradient", ph_grad, PK_GRADIENT_P, NULL, "ph / TVD"),
    ROW("ph_emw", ph_emw, PK_MUD_WEIGHT, NULL,
        "ph as an equivalent mud weight"),
    ROW("rho_water", rho_w, PK_DENSITY, NULL,
        "density of the water at the sample (sea water above the "
        "mudline)"),
    COMMON_TAIL,
    {.name = "pressure_state",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = hyd_brine,
     .write = hyd_write_state,
     .schema = PRES_SCHEMA_STATE,
     .desc = "the brine integral after the last sample (brine only)"},
    {0},
};

static const proto_method m_hydrostatic = {
    .name = "pressure.hydrostatic",
    .summary = "Hydrostatic (normal) pore pressure from a pore-water "
               "density, gradient or Batzle & Wang brine.",
    .description =
        "Sea water to the mudline, pore water below it (on land from "
        "ground level). A constant density or gradient (default fresh "
        "water, 1.00 g/cm3, common practice), or a NaCl brine whose "
        "density follows Batzle & Wang 1992 at the local pressure and "
        "temperature, integrated with GSL's RKF45 driver. Screening "
        "estimates only; see pressure.md.",
    .params = &hyd_decl,
    .outputs = hyd_outputs,
    .prepare = hyd_prepare,
    .kernel = hyd_kernel,
    .row_size = sizeof(pres_row),
    .qc_offset = offsetof(pres_row, qc),
    .cost = 2,
};

/* ---- pressure.trend ----------------------------------------------------- */

#define WASHOUT_LIMIT_M 0.0254 /* as log.process: 1 in over bit size */

typedef struct trend_args {
	proto_hdr hdr;
	proto_vec tvd, dtp, vp, vsh, gr, gr_clean, gr_shale, vsh_min;
	proto_vec caliper, bit_size, washout_limit, exclude;
	proto_list intervals;
	int form;
	proto_pres_column column;
	pres_run *run;
} trend_args;

#define EXCL_FIELDS(st)                                                        \
	{PROTO_NUMS(st, caliper, PK_LENGTH, PF_NULLS,                          \
	            "caliper: samples washed out (caliper - bit_size above "   \
	            "washout_limit) are left out of the fit")},                \
	    {PROTO_NUMS(st, bit_size, PK_LENGTH, PF_NULLS,                     \
	                "bit size (with caliper)")},                           \
	    {PROTO_NUMS(st, washout_limit, PK_LENGTH,                          \
	                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,              \
	                "washout threshold (default 1 in, as log.process); "   \
	                "one rule for the request"),                           \
	     .dflt = WASHOUT_LIMIT_M, .lo = 0},                                \
	{                                                                      \
		PROTO_NUMS(st, exclude, PK_NONE, PF_INT | PF_LO | PF_HI,       \
		           "1 leaves a sample out of the fit (edited data, "   \
		           "cycle skips), 0 keeps it"),                        \
		    .lo = 0, .hi = 1                                           \
	}

static const proto_field trend_m_fields[] = {
    TVD_FIELD(trend_args),
    {PROTO_NUMS(trend_args, dtp, PK_SLOWNESS, PF_NULLS,
                "compressional slowness (or vp)")},
    {PROTO_NUMS(trend_args, vp, PK_VELOCITY, PF_NULLS,
                "P velocity (instead of dtp)")},
    SHALE_FIELDS(trend_args),
    EXCL_FIELDS(trend_args),
    {PROTO_FIELD(trend_args, intervals, PT_LIST, PF_REQ,
                 "the intervals the user marks as normally pressured "
                 "(TVD): the fit uses their shale samples only"),
     .sub = &interval_decl},
    {.name = "form",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(trend_args, form),
     .choices = proto_pres_form_names,
     .dflt_choice = RW_PRES_TREND_EXP,
     .desc = "exponential (default) or loglinear"},
    COLUMN_FIELD(trend_args),
    {0},
};

static const char *const cal_bit[] = {"caliper", "bit_size", NULL};
static const proto_rule trend_m_rules[] = {
    {PR_EXACTLY, NULL, 1, dtp_vp, "give the compressional log: dtp or vp"},
    SHALE_RULES,
    {PR_ALL_OR_NONE, NULL, 0, cal_bit,
     "the washout check needs caliper and bit_size together"},
    PR_LAST,
};

static int trend_check(proto_call *c, void *dst)
{
	trend_args *a = dst;
	return gr_check(c, &a->gr, &a->gr_clean, &a->gr_shale);
}

static const proto_decl trend_m_decl = {
    .name = "",
    .fields = trend_m_fields,
    .rules = trend_m_rules,
    .size = sizeof(trend_args),
    .check = trend_check,
};

/* Samples to leave out of a fit: exclude = 1, washouts. */
static unsigned char *exclusions(proto_call *c, const proto_vec *exclude,
                                 const proto_vec *cal, const proto_vec *bit,
                                 const proto_vec *lim, size_t n)
{
	unsigned char *x = proto_alloc(c, n ? n : 1);

	if (!x)
		return NULL;
	for (size_t i = 0; i < n; i++) {
		x[i] = exclude->present && proto_at(exclude, i) == 1;
		if (cal->present && bit->present &&
		    proto_at(cal, i) - proto_at(bit, i) > lim->v[0])
			x[i] = 1;
	}
	return x;
}

static int trend_prepare(proto_call *c, void *args, proto_shape *sh)
{
	trend_args *a = args;
	size_t n = sh->n;
	pres_run *r = run_new(c, &a->tvd, n);
	proto_pres_fit f;
	unsigned char *x;
	double *dt;

	if (!r)
		return -1;
	if (proto__pres_column(c, &a->column, "column", 0, &r->set) ||
	    shale_of(c, r, &a->vsh, &a->gr, &a->gr_clean, &a->gr_shale, n))
		return -1;
	r->set.vsh_min = r->has_vsh ? a->vsh_min.v[0] : NAN;
	if (!r->has_vsh)
		proto_warn(c, "vsh",
		           "no shale selector (vsh or gr): every sample inside "
		           "the intervals is fitted as shale");
	dt = slowness_of(c, r, &a->dtp, &a->vp, n);
	x = exclusions(c, &a->exclude, &a->caliper, &a->bit_size,
	               &a->washout_limit, n);
	r->in_fit = proto_alloc(c, n ? n : 1);
	if (!dt || !x || !r->in_fit)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	memset(&f, 0, sizeof f);
	f.intervals = a->intervals;
	f.form = a->form;
	if (proto__pres_trend_fit(c, &f, "", n, r->z, dt, r->vsh, x, &r->set))
		return -1;
	/* the samples the fit used, as rw_pres_trend_select chose them */
	{
		const proto_pres_interval *iv = a->intervals.items;
		double *top = proto_alloc_doubles(c, a->intervals.n);
		double *base = proto_alloc_doubles(c, a->intervals.n);
		if (!top || !base)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		for (size_t k = 0; k < a->intervals.n; k++) {
			top[k] = iv[k].top.v[0];
			base[k] = iv[k].base.v[0];
		}
		rw_pres_trend_select(n, r->z, dt, r->vsh, r->set.vsh_min, x,
		                     a->intervals.n, top, base, r->in_fit,
		                     NULL);
	}
	for (size_t i = 0; i < n; i++) {
		pres_sample *o = &r->out[i];
		double z = r->z[i];
		unsigned w = 0;
		if (isnan(z)) {
			o->qc |= QC_LOG_MISSING;
			continue;
		}
		if (z > r->set.mudline) {
			rw_pres_trend_eval(&r->set.trend, z - r->set.mudline,
			                   &o->dt_n, &o->dt_n_sigma, &w);
			o->detail |= w;
		} else {
			o->detail |= RW_PRES_WARN_ABOVE_MUDLINE;
		}
		if (r->has_vsh && !(r->vsh[i] >= r->set.vsh_min))
			o->detail |= PRES_D_NOT_SHALE;
		o->qc |= proto__pres_qc(o->detail);
	}
	a->run = r;
	return 0;
}

static int trend_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                        void *ws)
{
	(void)ws;
	fill_row(((const trend_args *)args)->run, i, row, qc);
	return 0;
}

static void trend_write(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_trend(c, key, &((const trend_args *)args)->run->set);
}

/* The fit's statistics: samples, rms residual, standard errors. */
static void write_fit(proto_call *c, const char *key, const pres_setup *s)
{
	const rw_pres_trend *t = &s->trend;

	if (!s->trend_fitted) {
		proto_w_null(c, key);
		return;
	}
	proto_w_obj_begin(c, key);
	proto_w_int(c, "n_used", (long long)t->n_used);
	proto_w_num(c, "rms", PK_SLOWNESS, t->rms_sm);
	if (t->form == RW_PRES_TREND_EXP)
		proto_w_num(c, "sigma_dt_ma", PK_SLOWNESS, sqrt(t->cov[0][0]));
	proto_w_num(c, "sigma_dt_ml", PK_SLOWNESS, sqrt(t->cov[1][1]));
	proto_w_num(c, "sigma_c", PK_INV_LENGTH, sqrt(t->cov[2][2]));
	proto_w_obj_end(c);
}

static void trend_write_fit(proto_call *c, const char *key, const void *args)
{
	write_fit(c, key, &((const trend_args *)args)->run->set);
}

static int trend_has_vsh(const void *args)
{
	return has_vsh_out(((const trend_args *)args)->run);
}

#define SCHEMA_FIT                                                             \
	"{\"type\": [\"object\", \"null\"], \"properties\": {\"n_used\": "     \
	"{\"type\": \"integer\"}, \"rms\": {\"type\": [\"number\", "           \
	"\"null\"]}, \"sigma_dt_ma\": {\"type\": [\"number\", \"null\"]}, "    \
	"\"sigma_dt_ml\": {\"type\": [\"number\", \"null\"]}, \"sigma_c\": "   \
	"{\"type\": [\"number\", \"null\"]}}, \"additionalProperties\": "      \
	"false}"

static const proto_output trend_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "tvd",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(trend_args, tvd),
     .desc = "TVD (echoed)"},
    ROW("dt_normal", dt_n, PK_SLOWNESS, NULL,
        "the fitted trend's slowness at each sample"),
    ROW("dt_normal_sigma", dt_n_sigma, PK_SLOWNESS, NULL,
        "its standard error from the fit's covariance (first order)"),
    ROW("in_fit", in_fit, PK_NONE, NULL, "1 where the fit used the sample"),
    ROW("vsh", vsh, PK_NONE, trend_has_vsh, "shale fraction used"),
    COMMON_TAIL,
    {.name = "trend",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = trend_write,
     .schema = PRES_SCHEMA_TREND,
     .desc = "the fitted trend (form, dt_ma, dt_ml, c, top and base of the "
             "fitted samples, covariance_si): give it as `trend` to "
             "pressure.pore or log.process"},
    {.name = "fit",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .write = trend_write_fit,
     .schema = SCHEMA_FIT,
     .desc = "samples used, rms residual, standard errors"},
    {0},
};

static const proto_method m_trend = {
    .name = "pressure.trend",
    .summary = "Normal compaction trend of shale slowness, fitted by least "
               "squares over intervals marked as normally pressured.",
    .description =
        "dt = dt_ma + (dt_ml - dt_ma) exp(-c s) (or dt_ml exp(-c s)) in "
        "depth s below the mudline, fitted with GSL on the samples inside "
        "the intervals that pass the shale selector and are not washed "
        "out or excluded. Returns the parameters, their covariance and "
        "standard errors, the rms residual and the trend at every sample, "
        "flagged where it is extrapolated. Screening estimates only; see "
        "pressure.md.",
    .params = &trend_m_decl,
    .outputs = trend_outputs,
    .prepare = trend_prepare,
    .kernel = trend_kernel,
    .row_size = sizeof(pres_row),
    .qc_offset = offsetof(pres_row, qc),
    .cost = 2,
};

/* ---- pressure.pore ------------------------------------------------------ */

typedef struct pore_args {
	proto_hdr hdr;
	proto_vec tvd, sv, rhob, ph, dtp, vp;
	proto_vec vsh, gr, gr_clean, gr_shale, vsh_min;
	proto_vec caliper, bit_size, washout_limit, exclude;
	int method;
	proto_vec exponent;
	proto_pres_trend trend;
	proto_pres_fit trend_fit;
	proto_pres_bowers bowers;
	proto_pres_water pore_water;
	proto_pres_column column;
	proto_pres_resume resume;
	const char *state;
	/* derived */
	pres_run *run;
	int obg, hyd;
} pore_args;

static const proto_field pore_fields[] = {
    TVD_FIELD(pore_args),
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(pore_args, method),
     .choices = proto_pres_pore_names,
     .dflt_choice = PRES_PORE_EATON,
     .desc = "eaton (Eaton 1975, sonic; default) or bowers (Bowers 1995)"},
    {PROTO_NUMS(pore_args, sv, PK_PRESSURE, PF_NULLS,
                "overburden per sample (or rhob to integrate it)")},
    {PROTO_NUMS(pore_args, rhob, PK_DENSITY, PF_NULLS,
                "bulk density, to integrate the overburden (instead of "
                "sv)")},
    {PROTO_NUMS(pore_args, ph, PK_PRESSURE, PF_NULLS,
                "hydrostatic pressure per sample (or pore_water)")},
    {PROTO_NUMS(pore_args, dtp, PK_SLOWNESS, PF_NULLS,
                "shale compressional slowness (or vp)")},
    {PROTO_NUMS(pore_args, vp, PK_VELOCITY, PF_NULLS,
                "P velocity (instead of dtp)")},
    SHALE_FIELDS(pore_args),
    EXCL_FIELDS(pore_args),
    {PROTO_NUMS(pore_args, exponent, PK_NONE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
                "Eaton's exponent (default 3, the usual sonic value, from "
                "memory; calibrate it); one for the request"),
     .dflt = 3, .lo = 0, .hi = 10},
    {PROTO_FIELD(pore_args, trend, PT_OBJ, 0,
                 "the normal compaction trend, given (Eaton)"),
     .sub = &proto_pres_trend_decl},
    {PROTO_FIELD(pore_args, trend_fit, PT_OBJ, 0,
                 "fit the trend on this request's samples instead "
                 "(Eaton)"),
     .sub = &proto_pres_fit_decl},
    {PROTO_FIELD(pore_args, bowers, PT_OBJ, 0,
                 "Bowers' parameters (method bowers)"),
     .sub = &proto_pres_bowers_decl},
    WATER_FIELD(pore_args),
    COLUMN_FIELD(pore_args),
    RESUME_FIELD(pore_args),
    STATE_FIELD(pore_args),
    {0},
};

static const char *const sv_rhob[] = {"sv", "rhob", NULL};
static const char *const ph_water[] = {"ph", "pore_water", NULL};
static const char *const trends[] = {"trend", "trend_fit", NULL};
static const char *const eaton_only[] = {"trend", "trend_fit", "exponent",
                                         NULL};
static const char *const bowers_only[] = {"bowers", NULL};
static const proto_rule pore_rules[] = {
    {PR_EXACTLY, NULL, 1, sv_rhob,
     "give the overburden: sv, or rhob to integrate it"},
    {PR_AT_MOST, NULL, 1, ph_water,
     "give ph or pore_water (default fresh water), not both"},
    {PR_EXACTLY, NULL, 1, dtp_vp, "give the compressional log: dtp or vp"},
    SHALE_RULES,
    {PR_ALL_OR_NONE, NULL, 0, cal_bit,
     "the washout check needs caliper and bit_size together"},
    {PR_EXACTLY, "method=eaton", 1, trends,
     "Eaton needs the normal compaction trend: give trend, or trend_fit "
     "to fit it here"},
    {PR_FORBIDS, "method=eaton", 0, bowers_only,
     "bowers parameters serve method bowers"},
    {PR_FORBIDS, "method=bowers", 0, eaton_only,
     "Bowers' method uses no compaction trend or Eaton exponent"},
    {PR_REQUIRES, "method=bowers", 0, bowers_only,
     "method bowers needs bowers {a, a_units, b} (and the unloading "
     "parameters where unloading occurs)"},
    {PR_AT_MOST, NULL, 1, resume_state, "give resume or state, not both"},
    PR_LAST,
};

static int pore_check(proto_call *c, void *dst)
{
	pore_args *a = dst;

	if (a->method == PRES_PORE_NONE)
		return proto_fail(c, PROTO_INVALID_PARAMS, "method",
		                  "pressure.pore needs a method: eaton or "
		                  "bowers");
	if (!a->trend_fit.hdr.present) {
		const char *un = a->caliper.present         ? "caliper"
		                 : a->bit_size.present      ? "bit_size"
		                 : a->exclude.present       ? "exclude"
		                 : a->washout_limit.present ? "washout_limit"
		                                            : NULL;
		if (un)
			return proto_fail(c, PROTO_INVALID_PARAMS, un,
			                  "not used by this request: it serves "
			                  "trend_fit (the samples of the fit)");
	}
	if (a->trend_fit.hdr.present && (a->resume.hdr.present || a->state))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "trend_fit",
		    "a trend fitted on each request would change "
		    "from one request to the next of a stream: fit "
		    "it once (pressure.trend) and give it as "
		    "trend");
	return gr_check(c, &a->gr, &a->gr_clean, &a->gr_shale);
}

static const proto_decl pore_decl = {
    .name = "",
    .fields = pore_fields,
    .rules = pore_rules,
    .size = sizeof(pore_args),
    .check = pore_check,
};

static int pore_prepare(proto_call *c, void *args, proto_shape *sh)
{
	pore_args *a = args;
	size_t n = sh->n;
	pres_run *r = run_new(c, &a->tvd, n);
	pres_setup *s;
	double *dt, *rho = NULL;

	if (!r)
		return -1;
	s = &r->set;
	a->obg = a->rhob.present;
	a->hyd = !a->ph.present;
	if (proto__pres_column(c, &a->column, "column", a->obg, s) ||
	    proto__pres_water(c, &a->pore_water, "pore_water", s) ||
	    shale_of(c, r, &a->vsh, &a->gr, &a->gr_clean, &a->gr_shale, n))
		return -1;
	if ((a->resume.hdr.present || a->state) && !a->obg &&
	    !(a->hyd && s->water == PRES_WATER_BRINE))
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  a->state ? "state" : "resume",
		                  "not used by this request: with sv given "
		                  "and a constant pore water nothing is "
		                  "integrated");
	if (proto__pres_start(c, a->state, "state", &a->resume, "resume",
	                      a->obg, a->hyd, s))
		return -1;
	s->pore = a->method;
	s->exponent = a->exponent.v[0];
	s->vsh_min = r->has_vsh ? a->vsh_min.v[0] : NAN;
	if (!r->has_vsh)
		proto_warn(c, "vsh",
		           "no shale selector (vsh or gr): every sample is "
		           "taken as shale; the pore pressure means nothing "
		           "outside shale");
	if (a->method == PRES_PORE_BOWERS &&
	    proto__pres_bowers(c, &a->bowers, "bowers", s))
		return -1;
	dt = slowness_of(c, r, &a->dtp, &a->vp, n);
	if (!dt)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	if (a->trend.hdr.present &&
	    proto__pres_trend_given(c, &a->trend, "trend", s))
		return -1;
	if (a->trend_fit.hdr.present) {
		unsigned char *x =
		    exclusions(c, &a->exclude, &a->caliper, &a->bit_size,
		               &a->washout_limit, n);
		if (!x)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory");
		if (proto__pres_trend_fit(c, &a->trend_fit, "trend_fit", n,
		                          r->z, dt, r->vsh, x, s))
			return -1;
	}
	if (a->obg && !(rho = density_of(c, r, &a->rhob, n)))
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	if (proto__pres_integrate(c, s, a->obg, a->hyd, n, r->z, rho, NULL,
	                          r->out))
		return -1;
	for (size_t i = 0; i < n; i++) {
		pres_sample *o = &r->out[i];
		if (!a->obg)
			o->sv = proto_at(&a->sv, i) * 1e6;
		if (!a->hyd)
			o->ph = proto_at(&a->ph, i) * 1e6;
		if ((!a->obg && isnan(o->sv)) || (!a->hyd && isnan(o->ph)))
			o->qc |= QC_LOG_MISSING;
		proto__pres_pore(s, r->z[i], dt[i],
		                 isnan(dt[i]) ? NAN : 1 / dt[i],
		                 r->vsh ? r->vsh[i] : NAN, o);
	}
	a->run = r;
	return 0;
}

static int pore_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                       void *ws)
{
	(void)ws;
	fill_row(((const pore_args *)args)->run, i, row, qc);
	return 0;
}

static void pore_write_trend(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_trend(c, key, &((const pore_args *)args)->run->set);
}
static void pore_write_fit(proto_call *c, const char *key, const void *args)
{
	write_fit(c, key, &((const pore_args *)args)->run->set);
}
static void pore_write_state(proto_call *c, const char *key, const void *args)
{
	proto__pres_write_state(c, key, &((const pore_args *)args)->run->set);
}
static int pore_eaton(const void *args)
{
	return ((const pore_args *)args)->method == PRES_PORE_EATON;
}
static int pore_cov(const void *args)
{
	const pore_args *a = args;
	return a->method == PRES_PORE_EATON && a->run->set.trend_has_cov;
}
static int pore_fitted(const void *args)
{
	return ((const pore_args *)args)->run->set.trend_fitted;
}
static int pore_stateful(const void *args)
{
	const pore_args *a = args;
	return a->obg || (a->hyd && a->run->set.water == PRES_WATER_BRINE);
}
static int pore_has_vsh(const void *args)
{
	return has_vsh_out(((const pore_args *)args)->run);
}

static const proto_output pore_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "tvd",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(pore_args, tvd),
     .desc = "TVD (echoed)"},
    ROW("pp", pp, PK_PRESSURE, NULL, "pore pressure (reported, not clipped)"),
    ROW("pp_gradient", pp_grad, PK_GRADIENT_P, NULL, "pp / TVD"),
    ROW("pp_emw", pp_emw, PK_MUD_WEIGHT, NULL,
        "pp as an equivalent mud weight"),
    ROW("sigma_eff", sigma_eff, PK_PRESSURE, NULL,
        "vertical effective stress sv - pp"),
    ROW("dt_normal", dt_n, PK_SLOWNESS, pore_eaton,
        "normal-trend slowness at the sample"),
    ROW("pp_sigma_trend", pp_sigma, PK_PRESSURE, pore_cov,
        "standard error of pp from the trend's uncertainty alone (first "
        "order); the overburden's, the exponent's and the log's are not "
        "in it"),
    ROW("sv", sv, PK_PRESSURE, NULL, "overburden used"),
    ROW("sv_emw", sv_emw, PK_MUD_WEIGHT, NULL, "overburden as an EMW"),
    ROW("ph", ph, PK_PRESSURE, NULL, "hydrostatic pressure used"),
    ROW("ph_emw", ph_emw, PK_MUD_WEIGHT, NULL, "hydrostatic as an EMW"),
    ROW("vsh", vsh, PK_NONE, pore_has_vsh, "shale fraction used"),
    COMMON_TAIL,
    {.name = "trend",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = pore_eaton,
     .write = pore_write_trend,
     .schema = PRES_SCHEMA_TREND,
     .desc = "the trend used (given or fitted)"},
    {.name = "fit",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = pore_fitted,
     .write = pore_write_fit,
     .schema = SCHEMA_FIT,
     .desc = "the fit's statistics when the trend was fitted here"},
    {.name = "pressure_state",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .when = pore_stateful,
     .write = pore_write_state,
     .schema = PRES_SCHEMA_STATE,
     .desc = "the running integrals after the last sample"},
    {0},
};

static const proto_method m_pore = {
    .name = "pressure.pore",
    .summary = "Pore pressure from sonic: Eaton 1975 against a compaction "
               "trend, or Bowers 1995 velocity-effective-stress.",
    .description =
        "Eaton: pp = sv - (sv - ph) (dt_normal / dt)^n; Bowers: pp = sv - "
        "((v - v0)/A)^(1/B), with the unloading branch below "
        "unloading_from. sv given or integrated from rhob, ph given or "
        "from the pore water, the trend given or fitted. Values are "
        "reported, never clipped; samples outside shale and extrapolated "
        "trends are flagged. Shale methods cannot see unloading, lateral "
        "transfer, centroid or buoyancy effects. Screening estimates "
        "only; see pressure.md.",
    .params = &pore_decl,
    .outputs = pore_outputs,
    .prepare = pore_prepare,
    .kernel = pore_kernel,
    .row_size = sizeof(pres_row),
    .qc_offset = offsetof(pres_row, qc),
    .cost = 3,
};

/* ---- pressure.fracture -------------------------------------------------- */

typedef proto_pres_nu nu_static_args;

static const proto_field nu_static_fields[] = {
    {PROTO_NUMS(nu_static_args, a, PK_NONE, PF_SCALAR | PF_DFLT,
                "slope (default 1)"),
     .dflt = 1},
    {PROTO_NUMS(nu_static_args, b, PK_NONE, PF_SCALAR | PF_DFLT,
                "intercept (default 0)")},
    {0},
};

const proto_decl proto_pres_nu_decl = {
    .name = "nuStatic",
    .fields = nu_static_fields,
    .size = sizeof(nu_static_args),
    .desc = "static Poisson's ratio a nu + b from the dynamic one, with a "
            "and b from core tests (default a = 1, b = 0: no published "
            "conversion is widely agreed; common practice); one "
            "calibration for the request",
};

typedef struct frac_args {
	proto_hdr hdr;
	proto_vec tvd, sv, pp, nu, vp, vs, ki, alpha, e_static, eps_h, eps_hmax;
	int method;
	nu_static_args nu_static;
	proto_pres_column column;
	pres_run *run;
} frac_args;

#define STRAIN(m, text)                                                        \
	{                                                                      \
		PROTO_NUMS(frac_args, m, PK_STRAIN,                            \
		           PF_SCALAR | PF_DFLT | PF_LO | PF_HI, text),         \
		    .lo = -0.01, .hi = 0.01                                    \
	}
static const proto_field frac_fields[] = {
    TVD_FIELD(frac_args),
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(frac_args, method),
     .choices = proto_pres_frac_names,
     .dflt_choice = PRES_FRAC_EATON,
     .desc = "eaton (Eaton 1969; default), matthews_kelly (Matthews & "
             "Kelly 1967) or poroelastic (uniaxial strain with tectonic "
             "strains)"},
    {PROTO_NUMS(frac_args, sv, PK_PRESSURE, PF_REQ | PF_NULLS,
                "overburden per sample")},
    {PROTO_NUMS(frac_args, pp, PK_PRESSURE, PF_REQ | PF_NULLS,
                "pore pressure per sample")},
    {PROTO_NUMS(frac_args, nu, PK_NONE, PF_NULLS,
                "dynamic Poisson's ratio (or vp and vs)")},
    {PROTO_NUMS(frac_args, vp, PK_VELOCITY, PF_NULLS,
                "P velocity (with vs, instead of nu)")},
    {PROTO_NUMS(frac_args, vs, PK_VELOCITY, PF_NULLS, "S velocity")},
    {PROTO_NUMS(frac_args, ki, PK_NONE, PF_NULLS | PF_FRACTION,
                "Matthews & Kelly matrix-stress coefficient per sample, "
                "from their depth chart for the basin or leak-off tests")},
    {PROTO_NUMS(frac_args, alpha, PK_NONE, PF_SCALAR | PF_DFLT | PF_FRACTION,
                "Biot's coefficient (poroelastic; default 1); one for the "
                "request"),
     .dflt = 1},
    {PROTO_NUMS(frac_args, e_static, PK_MODULUS, PF_NULLS,
                "static Young's modulus (poroelastic with strain; "
                "rock.strength converts dynamic to static)")},
    STRAIN(eps_h, "tectonic strain in the direction of the minimum "
                  "horizontal stress (compression positive; default 0)"),
    STRAIN(eps_hmax, "tectonic strain in the direction of the maximum "
                     "horizontal stress (default 0)"),
    {PROTO_FIELD(frac_args, nu_static, PT_OBJ, 0,
                 "dynamic-to-static Poisson's ratio calibration"),
     .sub = &proto_pres_nu_decl},
    COLUMN_FIELD(frac_args),
    {0},
};
#undef STRAIN

static const char *const nu_src[] = {"nu", "vp", NULL};
static const char *const vp_vs[] = {"vp", "vs", NULL};
static const char *const ki_only[] = {"ki", NULL};
static const char *const poro_only[] = {"alpha", "e_static", "eps_h",
                                        "eps_hmax", NULL};
static const char *const nu_all[] = {"nu", "vp", "vs", "nu_static", NULL};
static const proto_rule frac_rules[] = {
    {PR_ALL_OR_NONE, NULL, 0, vp_vs, "give vp and vs together"},
    {PR_AT_MOST, NULL, 1, nu_src, "give nu, or vp and vs, not both"},
    {PR_REQUIRES, "method=matthews_kelly", 0, ki_only,
     "Matthews & Kelly needs ki, the matrix-stress coefficient"},
    {PR_FORBIDS, "method=matthews_kelly", 0, nu_all,
     "Matthews & Kelly uses ki, not Poisson's ratio"},
    {PR_FORBIDS, "method=eaton", 0, ki_only, "ki serves matthews_kelly"},
    {PR_FORBIDS, "method=poroelastic", 0, ki_only, "ki serves matthews_kelly"},
    {PR_FORBIDS, "method=eaton", 0, poro_only,
     "alpha, e_static and the strains serve the poroelastic method"},
    {PR_FORBIDS, "method=matthews_kelly", 0, poro_only,
     "alpha, e_static and the strains serve the poroelastic method"},
    PR_LAST,
};

static int frac_check(proto_call *c, void *dst)
{
	frac_args *a = dst;

	if (a->method == PRES_FRAC_NONE)
		return proto_fail(c, PROTO_INVALID_PARAMS, "method",
		                  "pressure.fracture needs a method: eaton, "
		                  "matthews_kelly or poroelastic");
	if (a->method != PRES_FRAC_MK && !a->nu.present && !a->vp.present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "nu",
		                  "required: Poisson's ratio, or vp and vs");
	if (a->method == PRES_FRAC_POROELASTIC &&
	    (a->eps_h.v[0] != 0 || a->eps_hmax.v[0] != 0) &&
	    !a->e_static.present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "e_static",
		                  "required with tectonic strain: the stress "
		                  "of a strain is E / (1 - nu^2) times it");
	return 0;
}

static const proto_decl frac_decl = {
    .name = "",
    .fields = frac_fields,
    .rules = frac_rules,
    .size = sizeof(frac_args),
    .check = frac_check,
};

/* Dynamic Poisson's ratio from vp and vs (Mavko et al. 2009, sec. 2.2):
 * (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2)); NaN when impossible. */
static double nu_of(double vp, double vs)
{
	double p2 = vp * vp, s2 = vs * vs;

	if (!(vp > 0) || !(vs >= 0) || !(p2 > s2))
		return NAN;
	return (p2 - 2 * s2) / (2 * (p2 - s2));
}

static int frac_prepare(proto_call *c, void *args, proto_shape *sh)
{
	frac_args *a = args;
	size_t n = sh->n;
	pres_run *r = run_new(c, &a->tvd, n);
	pres_setup *s;

	if (!r)
		return -1;
	s = &r->set;
	if (proto__pres_column(c, &a->column, "column", 0, s))
		return -1;
	s->frac = a->method;
	s->pore = PRES_PORE_NONE;
	s->alpha = a->alpha.v[0];
	s->eps_h = a->eps_h.v[0];
	s->eps_hmax = a->eps_hmax.v[0];
	if (a->nu_static.hdr.present) {
		s->nu_a = a->nu_static.a.v[0];
		s->nu_b = a->nu_static.b.v[0];
	}
	for (size_t i = 0; i < n; i++) {
		pres_sample *o = &r->out[i];
		double nu = NAN, z = r->z[i];
		o->sv = proto_at(&a->sv, i) * 1e6;
		o->pp = proto_at(&a->pp, i) * 1e6;
		if (isnan(z) || isnan(o->sv) || isnan(o->pp))
			o->qc |= QC_LOG_MISSING;
		if (a->nu.present) {
			nu = proto_at(&a->nu, i);
		} else if (a->vp.present) {
			double vp = proto_at(&a->vp, i),
			       vs = proto_at(&a->vs, i);
			nu = nu_of(vp, vs);
			if (isnan(nu) && !isnan(vp) && !isnan(vs))
				o->qc |= QC_INPUT_INVALID;
		}
		proto__pres_frac(
		    s, z, nu, a->ki.present ? proto_at(&a->ki, i) : NAN,
		    a->e_static.present ? proto_at(&a->e_static, i) : NAN, o);
	}
	a->run = r;
	return 0;
}

static int frac_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                       void *ws)
{
	(void)ws;
	fill_row(((const frac_args *)args)->run, i, row, qc);
	return 0;
}

static int frac_poro(const void *args)
{
	return ((const frac_args *)args)->method == PRES_FRAC_POROELASTIC;
}
static int frac_nu(const void *args)
{
	return ((const frac_args *)args)->method != PRES_FRAC_MK;
}

static const proto_output frac_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "tvd",
     .type = PO_VEC,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .offset = offsetof(frac_args, tvd),
     .desc = "TVD (echoed)"},
    ROW("shmin", shmin, PK_PRESSURE, NULL,
        "minimum horizontal stress, the closure estimate of the fracture "
        "gradient (not the breakdown pressure)"),
    ROW("shmin_gradient", shmin_grad, PK_GRADIENT_P, NULL, "shmin / TVD"),
    ROW("shmin_emw", shmin_emw, PK_MUD_WEIGHT, NULL,
        "shmin as an equivalent mud weight"),
    ROW("shmax", shmax, PK_PRESSURE, frac_poro,
        "maximum horizontal stress (poroelastic)"),
    ROW("nu_used", nu, PK_NONE, frac_nu, "static Poisson's ratio used"),
    COMMON_TAIL,
    {0},
};

static const proto_method m_fracture = {
    .name = "pressure.fracture",
    .summary = "Minimum horizontal stress (fracture gradient) after Eaton "
               "1969, Matthews & Kelly 1967 or the poroelastic "
               "uniaxial-strain model with tectonic strain.",
    .description =
        "Eaton: shmin = nu/(1 - nu) (sv - pp) + pp; Matthews & Kelly: pp "
        "+ ki (sv - pp); poroelastic: nu/(1-nu) (sv - alpha pp) + alpha pp "
        "+ E/(1 - nu^2) (eps_h + nu eps_H). Closure stress, not breakdown; "
        "no thermal or depletion effects; a vertical principal stress is "
        "assumed. Screening estimates only; see pressure.md.",
    .params = &frac_decl,
    .outputs = frac_outputs,
    .prepare = frac_prepare,
    .kernel = frac_kernel,
    .row_size = sizeof(pres_row),
    .qc_offset = offsetof(pres_row, qc),
    .cost = 1,
};

/* ---- the pressures option of log.process ------------------------------- */

static const char *const depth_is_names[] = {"tvd", "md", NULL};
static const char *const density_names[] = {"hold_doubtful", "as_logged", NULL};

#define LOGF(m, k_, fl, text) PROTO_NUMS(proto_pres_log, m, k_, fl, text)
static const proto_field log_fields[] = {
    {.name = "depth_is",
     .type = PT_ENUM,
     .flags = PF_REQ,
     .offset = offsetof(proto_pres_log, depth_is),
     .choices = depth_is_names,
     .desc = "what the log's depth is: tvd (true vertical depth below the "
             "datum, the drill floor: a vertical well, or a log already in "
             "TVD) or md (measured depth: give the tvd curve). Required: "
             "pressures need TVD, and a wrong choice moves every value"},
    {PROTO_FIELD(proto_pres_log, column, PT_OBJ, 0,
                 "the column above the log (default: land, the default "
                 "shallow-density law)"),
     .sub = &proto_pres_column_decl},
    {PROTO_FIELD(proto_pres_log, pore_water, PT_OBJ, 0,
                 "the pore water (default fresh water, 1.00 g/cm3)"),
     .sub = &proto_pres_water_decl},
    {PROTO_FIELD(proto_pres_log, trend, PT_OBJ, 0,
                 "the normal compaction trend, given (Eaton)"),
     .sub = &proto_pres_trend_decl},
    {PROTO_FIELD(proto_pres_log, trend_fit, PT_OBJ, 0,
                 "fit the trend on this request's samples (a whole log in "
                 "one request; rockwire log fits it with pressure.trend "
                 "first)"),
     .sub = &proto_pres_fit_decl},
    {LOGF(vsh_min, PK_NONE, PF_SCALAR | PF_DFLT | PF_FRACTION,
          "shale cut-off on the log's vsh (from vsh or gr): samples at or "
          "above it are shale (default 0.6, common practice)"),
     .dflt = VSH_MIN_DFLT},
    {.name = "pore",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_pres_log, pore),
     .choices = proto_pres_pore_names,
     .dflt_choice = PRES_PORE_EATON,
     .desc = "pore-pressure method: eaton (default), bowers or none"},
    {LOGF(exponent, PK_NONE, PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
          "Eaton's exponent (default 3, from memory; calibrate it)"),
     .dflt = 3, .lo = 0, .hi = 10},
    {PROTO_FIELD(proto_pres_log, bowers, PT_OBJ, 0,
                 "Bowers' parameters (pore bowers)"),
     .sub = &proto_pres_bowers_decl},
    {.name = "fracture",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_pres_log, fracture),
     .choices = proto_pres_frac_names,
     .dflt_choice = PRES_FRAC_EATON,
     .desc = "fracture-gradient method: eaton (default, from the log's "
             "Poisson's ratio), matthews_kelly, poroelastic or none"},
    {LOGF(ki, PK_NONE, PF_SCALAR | PF_FRACTION,
          "Matthews & Kelly matrix-stress coefficient (one for the "
          "request)")},
    {LOGF(alpha, PK_NONE, PF_SCALAR | PF_DFLT | PF_FRACTION,
          "Biot's coefficient (poroelastic; default 1)"),
     .dflt = 1},
    {LOGF(eps_h, PK_STRAIN, PF_SCALAR | PF_DFLT | PF_LO | PF_HI,
          "tectonic strain along the minimum horizontal stress "
          "(poroelastic; compression positive; default 0)"),
     .lo = -0.01, .hi = 0.01},
    {LOGF(eps_hmax, PK_STRAIN, PF_SCALAR | PF_DFLT | PF_LO | PF_HI,
          "tectonic strain along the maximum horizontal stress (default "
          "0)"),
     .lo = -0.01, .hi = 0.01},
    {PROTO_FIELD(proto_pres_log, nu_static, PT_OBJ, 0,
                 "dynamic-to-static Poisson's ratio calibration"),
     .sub = &proto_pres_nu_decl},
    {PROTO_FIELD(proto_pres_log, e_static_from, PT_OBJ, 0,
                 "static Young's modulus from the log's dynamic one "
                 "(poroelastic with strain)"),
     .sub = &proto_pres_es_decl},
    {.name = "density",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(proto_pres_log, density),
     .choices = density_names,
     .dflt_choice = PRES_RHO_HOLD,
     .desc = "hold_doubtful (default): a density flagged washout or "
             "density_correction_high is not integrated, the last valid "
             "one is held (flagged); as_logged integrates it"},
    {PROTO_FIELD(proto_pres_log, resume, PT_OBJ, 0,
                 "restart the running integrals from known values at a "
                 "depth (flagged resumed)"),
     .sub = &proto_pres_resume_decl},
    {PROTO_FIELD(proto_pres_log, state, PT_STR, 0,
                 "the pressure_state.token of the previous answer: "
                 "continues its integrals exactly (the next block of a "
                 "log, the next sample of a feed)")},
    {0},
};
#undef LOGF

static const char *const l_trends[] = {"trend", "trend_fit", NULL};
static const char *const l_eaton_only[] = {"trend", "trend_fit", "exponent",
                                           NULL};
static const char *const l_bowers[] = {"bowers", NULL};
static const char *const l_pore_all[] = {"trend", "trend_fit", "exponent",
                                         "bowers", NULL};
static const char *const l_ki[] = {"ki", NULL};
static const char *const l_poro[] = {"alpha", "eps_h", "eps_hmax",
                                     "e_static_from", NULL};
static const char *const l_nu[] = {"nu_static", NULL};
static const char *const l_frac_all[] = {
    "ki", "alpha", "eps_h", "eps_hmax", "nu_static", "e_static_from", NULL};
static const proto_rule log_rules[] = {
    {PR_AT_MOST, NULL, 1, l_trends, "give trend or trend_fit, not both"},
    {PR_EXACTLY, "pore=eaton", 1, l_trends,
     "Eaton needs the normal compaction trend: give trend, or trend_fit; "
     "or pore \"bowers\" or \"none\""},
    {PR_FORBIDS, "pore=eaton", 0, l_bowers,
     "bowers parameters serve pore \"bowers\""},
    {PR_REQUIRES, "pore=bowers", 0, l_bowers,
     "pore \"bowers\" needs bowers {a, a_units, b}"},
    {PR_FORBIDS, "pore=bowers", 0, l_eaton_only,
     "Bowers' method uses no compaction trend or Eaton exponent"},
    {PR_FORBIDS, "pore=none", 0, l_pore_all, "not used with pore \"none\""},
    {PR_REQUIRES, "fracture=matthews_kelly", 0, l_ki,
     "Matthews & Kelly needs ki, the matrix-stress coefficient"},
    {PR_FORBIDS, "fracture=matthews_kelly", 0, l_poro,
     "serves the poroelastic method"},
    {PR_FORBIDS, "fracture=matthews_kelly", 0, l_nu,
     "Matthews & Kelly uses no Poisson's ratio"},
    {PR_FORBIDS, "fracture=eaton", 0, l_ki, "ki serves matthews_kelly"},
    {PR_FORBIDS, "fracture=eaton", 0, l_poro, "serves the poroelastic method"},
    {PR_FORBIDS, "fracture=poroelastic", 0, l_ki, "ki serves matthews_kelly"},
    {PR_FORBIDS, "fracture=none", 0, l_frac_all,
     "not used with fracture \"none\""},
    {PR_AT_MOST, NULL, 1, resume_state, "give resume or state, not both"},
    PR_LAST,
};

static int log_check(proto_call *c, void *dst)
{
	proto_pres_log *p = dst;

	if (p->pore == PRES_PORE_NONE && p->fracture != PRES_FRAC_NONE)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, p->hdr.path, "fracture", ""),
		                  "the fracture gradient needs the pore "
		                  "pressure: with pore \"none\" give fracture "
		                  "\"none\" too");
	if (p->fracture == PRES_FRAC_POROELASTIC &&
	    (p->eps_h.v[0] != 0 || p->eps_hmax.v[0] != 0) &&
	    !p->e_static_from.hdr.present)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, p->hdr.path, "e_static_from", ""),
		    "required with tectonic strain: the static "
		    "Young's modulus from the log's dynamic one");
	if (p->fracture == PRES_FRAC_POROELASTIC && p->eps_h.v[0] == 0 &&
	    p->eps_hmax.v[0] == 0 && p->e_static_from.hdr.present)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, p->hdr.path, "e_static_from", ""),
		    "not used without tectonic strain");
	if (p->trend_fit.hdr.present && (p->resume.hdr.present || p->state))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, p->hdr.path, "trend_fit", ""),
		    "a trend fitted on each request would change "
		    "from one block (or sample) to the next: fit it "
		    "once with pressure.trend and give it as trend");
	return 0;
}

const proto_decl proto_pres_log_decl = {
    .name = "logPressures",
    .fields = log_fields,
    .rules = log_rules,
    .size = sizeof(proto_pres_log),
    .check = log_check,
    .desc = "Overburden, hydrostatic, pore-pressure and fracture-gradient "
            "curves (screening estimates only; pressure.md)",
};

const proto_method *const proto_pressure_methods[] = {
    &m_overburden, &m_hydrostatic,     &m_trend, &m_pore,
    &m_fracture,   &proto__m_strength, NULL,
};
