/* The fluid family: fluid.properties, the Batzle & Wang 1992 properties of
 * brine, hydrocarbon gas and dead or live oil at reservoir pressure and
 * temperature, and their mixture by saturation (Wood 1955, Brie et al.
 * 1995, Voigt), per sample with broadcasting and QC flags. Also the fluid
 * description rock.substitute and log.process embed (proto_fluid_decl):
 * the same members, or an explicit {k, rho}. */
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "proto/desc.h"
#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/fluid.h"
#include "rockwire/status.h"

const char *const proto_phase_names[] = {"brine", "gas", "oil", NULL};
const char *const proto_mix_names[] = {"wood", "brie", "voigt", NULL};

/* Default Brie exponent: 3, the value Brie et al. 1995 report as typical
 * for gas and brine in sands (from memory). */
#define BRIE_EXPONENT_DEFAULT 3.0
/* Below this many ppm a salinity given in the default unit is flagged:
 * a value meant in g/kg or percent would look like this. */
#define SALINITY_SUSPICIOUS 100e-6

/* ---- the phases --------------------------------------------------------- */

static const proto_field brine_fields[] = {
    {PROTO_NUMS(proto_brine, salinity, PK_SALINITY, PF_REQ | PF_NULLS | PF_LO,
                "NaCl salinity (default ppm by weight; 0 is fresh water)"),
     .lo = 0},
    {0},
};
static const proto_decl brine_decl = {
    .name = "brine",
    .fields = brine_fields,
    .size = sizeof(proto_brine),
    .desc = "brine phase (Batzle & Wang 1992 eqs. 27-29)",
};

static const proto_field gas_fields[] = {
    {PROTO_NUMS(proto_gas, gravity, PK_NONE, PF_REQ | PF_NULLS,
                "gas gravity relative to air (molar-mass ratio)")},
    {0},
};
static const proto_decl gas_decl = {
    .name = "gas",
    .fields = gas_fields,
    .size = sizeof(proto_gas),
    .desc = "hydrocarbon gas phase (Batzle & Wang 1992 eqs. 9-11)",
};

static const proto_field oil_fields[] = {
    {PROTO_NUMS(proto_oil, api, PK_NONE, PF_REQ | PF_NULLS,
                "oil gravity, degrees API")},
    {PROTO_NUMS(proto_oil, gor, PK_GOR, PF_NULLS | PF_LO,
                "dissolved gas-oil ratio (default L/L; scf/bbl accepted); "
                "given = live oil, absent = dead oil"),
     .lo = 0},
    {PROTO_NUMS(proto_oil, gas_gravity, PK_NONE, PF_NULLS,
                "gravity of the dissolved gas; required with gor, refused "
                "without it")},
    {0},
};
static int oil_check(proto_call *c, void *dst)
{
	proto_oil *o = dst;
	if (o->gor.present && !o->gas_gravity.present)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, o->hdr.path, "gas_gravity", ""),
		                  "required with gor: the gravity of the "
		                  "dissolved gas (Batzle & Wang 1992 eqs. "
		                  "21-24)");
	if (!o->gor.present && o->gas_gravity.present)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    proto_path(c, o->hdr.path, "gas_gravity", ""),
		    "only used for live oil: give gor as well, or "
		    "drop gas_gravity for a dead oil");
	return 0;
}

static const proto_decl oil_decl = {
    .name = "oil",
    .fields = oil_fields,
    .size = sizeof(proto_oil),
    .check = oil_check,
    .desc = "oil phase, dead (eqs. 18-20a) or live (eqs. 20b-24)",
};

static const proto_field sat_fields[] = {
    {PROTO_NUMS(proto_sat, brine, PK_NONE, PF_NULLS | PF_FRACTION,
                "brine saturation (fraction of pore volume)")},
    {PROTO_NUMS(proto_sat, gas, PK_NONE, PF_NULLS | PF_FRACTION,
                "gas saturation")},
    {PROTO_NUMS(proto_sat, oil, PK_NONE, PF_NULLS | PF_FRACTION,
                "oil saturation")},
    {0},
};
static const proto_decl sat_decl = {
    .name = "saturation",
    .fields = sat_fields,
    .size = sizeof(proto_sat),
    .desc = "fraction of pore volume of each described phase, each in "
            "[0, 1], summing to 1 within 1e-6 per sample; required with "
            "more than one phase",
};

/* The members of a fluid by phases, in a struct that embeds a proto_fluid
 * at `pre` (empty for proto_fluid itself). */
#define PHASE_FIELDS(st, pre)                                                  \
	{.name = "brine",                                                      \
	 .type = PT_OBJ,                                                       \
	 .offset = offsetof(st, pre brine),                                    \
	 .sub = &brine_decl,                                                   \
	 .desc = "brine phase"},                                               \
	    {.name = "gas",                                                    \
	     .type = PT_OBJ,                                                   \
	     .offset = offsetof(st, pre gas),                                  \
	     .sub = &gas_decl,                                                 \
	     .desc = "hydrocarbon gas phase"},                                 \
	    {.name = "oil",                                                    \
	     .type = PT_OBJ,                                                   \
	     .offset = offsetof(st, pre oil),                                  \
	     .sub = &oil_decl,                                                 \
	     .desc = "oil phase, dead or live"},                               \
	    {.name = "saturation",                                             \
	     .type = PT_OBJ,                                                   \
	     .offset = offsetof(st, pre saturation),                           \
	     .sub = &sat_decl,                                                 \
	     .desc = "saturation of each described phase; one may be left "    \
	             "out to fill the rest of the pore space"},                \
	    {.name = "mix",                                                    \
	     .type = PT_ENUM,                                                  \
	     .flags = PF_DFLT,                                                 \
	     .offset = offsetof(st, pre mix),                                  \
	     .choices = proto_mix_names,                                       \
	     .dflt_choice = PROTO_MIX_WOOD,                                    \
	     .desc = "mixing rule: wood (uniform), brie (patchy, Brie et al. " \
	             "1995), voigt (patchy upper bound)"},                     \
	{                                                                      \
		.name = "brie_exponent", .type = PT_NUMS,                      \
		.flags = PF_SCALAR | PF_DFLT | PF_LO,                          \
		.offset = offsetof(st, pre brie_exponent),                     \
		.dflt = BRIE_EXPONENT_DEFAULT, .lo = 1,                        \
		.desc = "Brie exponent e >= 1 (only with mix \"brie\"; e < 1 " \
		        "would exceed the Voigt bound)"                        \
	}

/* The saturation of phase `rest`, left out of the request: 1 less the
 * others at each of the n samples (a null where one is null). */
static int saturation_rest(proto_call *c, proto_fluid *f, const char *path,
                           int rest, size_t n)
{
	double *v = proto_alloc_doubles(c, n);

	if (!v)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "out of memory");
	for (size_t i = 0; i < n; i++) {
		double sum = 0.0;
		for (int p = 0; p < PROTO_NPHASES; p++)
			if (f->has[p] && p != rest)
				sum += proto_at(&f->sat[p], i);
		if (sum > 1.0 + 1e-6)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path, "saturation", ""),
			    "the given saturations sum to %.9g at sample "
			    "%zu, leaving nothing for the %s (more than 1)",
			    sum, i, proto_phase_names[rest]);
		v[i] = sum > 1.0 ? 0.0 : 1.0 - sum;
	}
	memset(&f->sat[rest], 0, sizeof f->sat[rest]);
	f->sat[rest].v = v;
	f->sat[rest].n = n;
	f->sat[rest].present = 1;
	for (int p = 0; p < PROTO_NPHASES; p++)
		f->sat[rest].is_array |= f->has[p] && f->sat[p].is_array;
	return 0;
}

/* Checks the phases, saturations and mixing rule of f (`path` its
 * prefix, "" at the top of fluid.properties), derives has[], sat[]. */
static int phases_check(proto_call *c, proto_fluid *f, const char *path)
{
	static const double one = 1.0;
	const proto_hdr *ph[PROTO_NPHASES] = {&f->brine.hdr, &f->gas.hdr,
	                                      &f->oil.hdr};
	const proto_vec *sv[PROTO_NPHASES] = {
	    &f->saturation.brine, &f->saturation.gas, &f->saturation.oil};
	int nph = 0;
	size_t n = 1;

	for (int p = 0; p < PROTO_NPHASES; p++) {
		f->has[p] = ph[p]->present;
		nph += f->has[p];
	}
	if (!nph)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  *path ? proto_path(c, path, "brine", "")
		                        : "brine",
		                  "describe at least one phase: brine, gas or "
		                  "oil");
	f->live = f->oil.gor.present;
	if (f->saturation.hdr.present) {
		int rest = -1;
		for (int p = 0; p < PROTO_NPHASES; p++) {
			const char *full = proto_path(c, path, "saturation.",
			                              proto_phase_names[p]);
			if (sv[p]->present && !f->has[p])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, full,
				    "no %s phase is described: describe it "
				    "(%s%s) or drop its saturation",
				    proto_phase_names[p], path,
				    proto_phase_names[p]);
			if (!sv[p]->present && f->has[p]) {
				/* one described phase may be left out: it
				 * fills the rest of the pore space */
				if (rest >= 0)
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, full,
					    "required: the %s phase is "
					    "described and only one phase "
					    "(here %s) may be left to fill "
					    "the rest",
					    proto_phase_names[p],
					    proto_phase_names[rest]);
				rest = p;
				continue;
			}
			f->sat[p] = *sv[p];
			if (sv[p]->n > n)
				n = sv[p]->n;
		}
		if (rest >= 0 && saturation_rest(c, f, path, rest, n))
			return -1;
	} else if (nph > 1) {
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, path, "saturation", ""),
		                  "required when more than one phase is "
		                  "described");
	} else {
		for (int p = 0; p < PROTO_NPHASES; p++) {
			memset(&f->sat[p], 0, sizeof f->sat[p]);
			if (f->has[p]) {
				f->sat[p].v = &one;
				f->sat[p].n = 1;
				f->sat[p].present = 1;
			}
		}
	}
	/* An exponent inherited from the session is let pass for the other
	 * mixes; one given in the request is an error there. */
	if (f->brie_exponent.present && !f->brie_exponent.inherited &&
	    f->mix != PROTO_MIX_BRIE)
		return proto_fail(c, PROTO_INVALID_PARAMS,
		                  proto_path(c, path, "brie_exponent", ""),
		                  "only used with mix \"brie\"");
	for (size_t i = 0; i < n; i++) {
		double sum = 0.0;
		for (int p = 0; p < PROTO_NPHASES; p++)
			if (f->has[p])
				sum += proto_at(&f->sat[p], i);
		if (isnan(sum))
			continue; /* a null saturation: that sample is missing
			           */
		if (fabs(sum - 1.0) > 1e-6)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, path, "saturation", ""),
			    "saturations sum to %.9g at sample %zu, "
			    "not 1 (tolerance 1e-6); one phase may be left "
			    "out to fill the rest",
			    sum, i);
	}
	f->salinity_unit = c->units.sel[PK_SALINITY] == 0;
	f->brie_e = f->brie_exponent.v[0];
	return 0;
}

/* ---- the description shared with rock and log -------------------------- */

static const char *const explicit_kr[] = {"k", "rho", NULL};
static const char *const by_phases[] = {
    "brine", "gas", "oil", "saturation", "mix", "brie_exponent", NULL};

static const proto_field fluid_fields[] = {
    PHASE_FIELDS(proto_fluid, ),
    {PROTO_NUMS(proto_fluid, k, PK_MODULUS, PF_NULLS | PF_LO | PF_LO_OPEN,
                "explicit bulk modulus (with rho, instead of phases)"),
     .lo = 0},
    {PROTO_NUMS(proto_fluid, rho, PK_DENSITY, PF_NULLS | PF_LO | PF_LO_OPEN,
                "explicit density (with k)"),
     .lo = 0},
    {0},
};

static const proto_rule fluid_rules[] = {
    {PR_ALL_OR_NONE, NULL, 0, explicit_kr,
     "required: an explicit fluid needs both k and rho"},
    {PR_FORBIDS, "k", 0, by_phases,
     "give either k and rho, or a description by phases, not both"},
    PR_LAST,
};

static int fluid_check(proto_call *c, void *dst)
{
	proto_fluid *f = dst;
	if (f->k.present) {
		f->explicit_kr = 1;
		return 0;
	}
	return phases_check(c, f, f->hdr.path);
}

const proto_decl proto_fluid_decl = {
    .name = "fluid",
    .fields = fluid_fields,
    .rules = fluid_rules,
    .size = sizeof(proto_fluid),
    .check = fluid_check,
    .desc = "A pore fluid: {k, rho} (explicit, both > 0), or phases as in "
            "fluid.properties (brine, gas, oil, saturation, mix, "
            "brie_exponent) evaluated at the sample's pressure and "
            "temperature",
};

/* Maps core fluid warnings to QC bits. */
static uint64_t warn_qc(unsigned w)
{
	uint64_t f = 0;
	if (w & (RW_FLUID_WARN_T_RANGE | RW_FLUID_WARN_P_RANGE |
	         RW_FLUID_WARN_SAL_RANGE | RW_FLUID_WARN_G_RANGE |
	         RW_FLUID_WARN_API_RANGE | RW_FLUID_WARN_PR_RANGE))
		f |= QC_FLUID_CALIBRATION;
	if (w & RW_FLUID_WARN_GOR_MAX)
		f |= QC_FLUID_GOR_EXCESS;
	if (w & RW_FLUID_WARN_VAPOUR)
		f |= QC_FLUID_BOILING;
	return f;
}

static uint64_t status_qc(int st)
{
	if (st == RW_OK)
		return 0;
	return st == RW_EDOM ? QC_INPUT_INVALID : QC_FLUID_FAILED;
}

static void phase_nan(rw_fluid_phase *p)
{
	p->rho_kgm3 = p->k_pa = p->v_ms = NAN;
}

void proto__fluid_eval(const proto_fluid *f, size_t i, double p, double t,
                       proto_fluid_sample *s)
{
	rw_fluid_phase ph[PROTO_NPHASES];
	double sat[PROTO_NPHASES];
	size_t n = 0, ig = PROTO_NPHASES;
	int ok = 1, st;
	unsigned w;

	s->qc = 0;
	s->z = s->b0 = NAN;
	phase_nan(&s->mix);
	for (int k = 0; k < PROTO_NPHASES; k++)
		phase_nan(&s->ph[k]);
	if (isnan(p) || isnan(t)) {
		s->qc = QC_LOG_MISSING;
		return;
	}
	if (f->has[PROTO_BRINE]) {
		double sal = proto_at(&f->brine.salinity, i);
		w = 0;
		if (isnan(sal)) {
			s->qc |= QC_LOG_MISSING;
		} else {
			st = rw_fluid_brine_props(p, t, sal,
			                          &s->ph[PROTO_BRINE], &w);
			s->qc |= warn_qc(w) | status_qc(st);
			if (f->salinity_unit && sal > 0 &&
			    sal < SALINITY_SUSPICIOUS)
				s->qc |= QC_SALINITY_LOW;
		}
	}
	if (f->has[PROTO_GAS]) {
		w = 0;
		st = rw_fluid_gas_props(p, t, proto_at(&f->gas.gravity, i),
		                        &s->ph[PROTO_GAS], &s->z, &w);
		s->qc |= warn_qc(w) | status_qc(st);
	}
	if (f->has[PROTO_OIL]) {
		w = 0;
		if (f->live)
			st = rw_fluid_liveoil_props(
			    p, t, proto_at(&f->oil.api, i),
			    proto_at(&f->oil.gor, i),
			    proto_at(&f->oil.gas_gravity, i), &s->ph[PROTO_OIL],
			    &s->b0, &w);
		else
			st = rw_fluid_deadoil_props(p, t,
			                            proto_at(&f->oil.api, i),
			                            &s->ph[PROTO_OIL], &w);
		s->qc |= warn_qc(w) | status_qc(st);
	}
	/* Mix the phases present in the sample; a phase at zero saturation
	 * is reported but takes no part (so its failure does not void the
	 * mix). */
	for (int k = 0; k < PROTO_NPHASES; k++) {
		double sk;
		if (!f->has[k])
			continue;
		sk = proto_at(&f->sat[k], i);
		if (isnan(sk)) {
			s->qc |= QC_LOG_MISSING;
			return;
		}
		if (sk <= 0.0)
			continue;
		if (!isfinite(s->ph[k].k_pa))
			ok = 0;
		if (k == PROTO_GAS)
			ig = n;
		ph[n] = s->ph[k];
		sat[n++] = sk;
	}
	if (!ok)
		return;
	if (f->mix == PROTO_MIX_VOIGT)
		st = rw_fluid_mix_voigt(n, ph, sat, &s->mix);
	else if (f->mix == PROTO_MIX_BRIE)
		st = rw_fluid_mix_brie(n, ph, sat, ig, f->brie_e, &s->mix);
	else
		st = rw_fluid_mix_wood(n, ph, sat, &s->mix);
	if (st != RW_OK)
		s->qc |= QC_FLUID_FAILED;
}

void proto__fluid_kr(const proto_fluid *f, size_t i, double p_mpa,
                     double t_degc, double *k_pa, double *rho_kgm3,
                     uint64_t *qc)
{
	proto_fluid_sample s;

	if (f->explicit_kr) {
		*k_pa = proto_at(&f->k, i);
		*rho_kgm3 = proto_at(&f->rho, i);
		*qc = isnan(*k_pa) || isnan(*rho_kgm3) ? QC_LOG_MISSING : 0;
		return;
	}
	proto__fluid_eval(f, i, p_mpa, t_degc, &s);
	*k_pa = s.mix.k_pa;
	*rho_kgm3 = s.mix.rho_kgm3;
	*qc = s.qc;
}

/* ---- fluid.properties --------------------------------------------------- */

typedef struct props_args {
	proto_hdr hdr;
	proto_vec pressure, temperature;
	proto_fluid f;
} props_args;

static const proto_field props_fields[] = {
    {PROTO_NUMS(props_args, pressure, PK_PRESSURE, PF_REQ | PF_NULLS,
                "pore pressure; null marks a missing sample")},
    {PROTO_NUMS(props_args, temperature, PK_TEMPERATURE, PF_REQ | PF_NULLS,
                "temperature; null marks a missing sample")},
    PHASE_FIELDS(props_args, f.),
    {0},
};

static int props_check(proto_call *c, void *dst)
{
	props_args *a = dst;
	return phases_check(c, &a->f, "");
}

static const proto_decl props_decl = {
    .name = "",
    .fields = props_fields,
    .size = sizeof(props_args),
    .check = props_check,
};

static int props_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                        void *ws)
{
	const props_args *a = args;
	proto_fluid_sample *s = row;

	(void)ws;
	proto__fluid_eval(&a->f, i, proto_at(&a->pressure, i),
	                  proto_at(&a->temperature, i), s);
	*qc = s->qc;
	return 0;
}

static int has_brine(const void *a)
{
	return ((const props_args *)a)->f.has[PROTO_BRINE];
}
static int has_gas(const void *a)
{
	return ((const props_args *)a)->f.has[PROTO_GAS];
}
static int has_oil(const void *a)
{
	return ((const props_args *)a)->f.has[PROTO_OIL];
}
static int live_oil(const void *a)
{
	return has_oil(a) && ((const props_args *)a)->f.live;
}
static int is_brie(const void *a)
{
	return ((const props_args *)a)->f.mix == PROTO_MIX_BRIE;
}

#define PH(k, m)                                                               \
	offsetof(proto_fluid_sample, ph) + (k) * sizeof(rw_fluid_phase) +      \
	    offsetof(rw_fluid_phase, m)
#define PHASE_OUT(nm, k, w)                                                    \
	{.name = nm "_rho",                                                    \
	 .type = PO_NUM,                                                       \
	 .kind = PK_DENSITY,                                                   \
	 .offset = PH(k, rho_kgm3),                                            \
	 .when = w,                                                            \
	 .desc = nm " density"},                                               \
	    {.name = nm "_k",                                                  \
	     .type = PO_NUM,                                                   \
	     .kind = PK_MODULUS,                                               \
	     .offset = PH(k, k_pa),                                            \
	     .when = w,                                                        \
	     .desc = nm " adiabatic bulk modulus"},                            \
	{                                                                      \
		.name = nm "_v", .type = PO_NUM, .kind = PK_VELOCITY,          \
		.offset = PH(k, v_ms), .when = w, .desc = nm " sound speed"    \
	}
static const proto_output props_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    {.name = "mix",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(props_args, f.mix),
     .choices = proto_mix_names,
     .desc = "mixing rule used"},
    {.name = "brie_exponent",
     .type = PO_NUM,
     .dim = D_REQ,
     .offset = offsetof(props_args, f.brie_e),
     .when = is_brie,
     .desc = "Brie exponent used"},
    {.name = "pressure",
     .type = PO_VEC,
     .kind = PK_PRESSURE,
     .dim = D_REQ,
     .offset = offsetof(props_args, pressure),
     .desc = "pressure (echoed)"},
    {.name = "temperature",
     .type = PO_VEC,
     .kind = PK_TEMPERATURE,
     .dim = D_REQ,
     .offset = offsetof(props_args, temperature),
     .desc = "temperature (echoed)"},
    {.name = "sat_brine",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(props_args, f.sat[PROTO_BRINE]),
     .when = has_brine,
     .desc = "brine saturation (echoed)"},
    {.name = "sat_gas",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(props_args, f.sat[PROTO_GAS]),
     .when = has_gas,
     .desc = "gas saturation (echoed)"},
    {.name = "sat_oil",
     .type = PO_VEC,
     .dim = D_REQ,
     .offset = offsetof(props_args, f.sat[PROTO_OIL]),
     .when = has_oil,
     .desc = "oil saturation (echoed)"},
    PHASE_OUT("brine", PROTO_BRINE, has_brine),
    PHASE_OUT("gas", PROTO_GAS, has_gas),
    {.name = "gas_z",
     .type = PO_NUM,
     .offset = offsetof(proto_fluid_sample, z),
     .when = has_gas,
     .desc = "gas compressibility factor Z"},
    PHASE_OUT("oil", PROTO_OIL, has_oil),
    {.name = "oil_b0",
     .type = PO_NUM,
     .offset = offsetof(proto_fluid_sample, b0),
     .when = live_oil,
     .desc = "live-oil formation volume factor B0"},
    {.name = "mix_rho",
     .type = PO_NUM,
     .kind = PK_DENSITY,
     .offset = offsetof(proto_fluid_sample, mix.rho_kgm3),
     .desc = "mixture density (saturation-weighted)"},
    {.name = "mix_k",
     .type = PO_NUM,
     .kind = PK_MODULUS,
     .offset = offsetof(proto_fluid_sample, mix.k_pa),
     .desc = "mixture bulk modulus by the mixing rule"},
    {.name = "mix_v",
     .type = PO_NUM,
     .kind = PK_VELOCITY,
     .offset = offsetof(proto_fluid_sample, mix.v_ms),
     .desc = "sqrt(K/rho) of the mixture"},
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(proto_fluid_sample, qc),
     .desc = "QC flags"},
    {0},
};

static const proto_method m_props = {
    .name = "fluid.properties",
    .summary = "Brine, gas and oil properties at pressure and temperature "
               "(Batzle & Wang 1992) and their mixture by saturation.",
    .description =
        "Describe one or more phases (brine, gas, dead or live oil); with "
        "more than one, give saturation for each described phase, summing "
        "to 1 within 1e-6 per sample (-32602 shows the sum). pressure, "
        "temperature, salinity, gravities, GOR and saturations may be "
        "arrays of one length (a depth profile or a sweep); scalars "
        "broadcast. Every described phase is reported, also at zero "
        "saturation. Samples outside the fitted ranges carry QC flag "
        "fluid_outside_calibration; impossible samples are null with "
        "flags. See fluids.md.",
    .params = &props_decl,
    .outputs = props_outputs,
    .kernel = props_kernel,
    .row_size = sizeof(proto_fluid_sample),
    .qc_offset = offsetof(proto_fluid_sample, qc),
    .cost = 3,
};

const proto_method *const proto_fluid_methods[] = {&m_props, NULL};
