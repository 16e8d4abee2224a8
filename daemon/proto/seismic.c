/* The seismic family: the modelling chain from a well log to synthetic
 * traces and back to AVO attributes. seismic.timedepth (two-way time of
 * every log sample from the sonic, checkshot drift correction, regular-
 * time resampling of curves), seismic.upscale (Backus averaging and
 * blocking), seismic.wavelet (Ricker, Ormsby, tapered band-pass, caller
 * samples, constant-phase rotation), seismic.synthetic (angle gathers:
 * reflectivity in time convolved with the wavelet) and seismic.avo_fit
 * (least-squares intercept, gradient and curvature per time sample). The
 * first four work on a whole log or trace and write their result
 * themselves (body methods); avo_fit is per time sample. The physics is
 * in daemon/core (include/rockwire/seismic.h); layouts, sources and what
 * the chain does not model are in protocol-docs/seismic.md. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"
#include "rockwire/seismic.h"
#include "rockwire/status.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif
#define DEG (M_PI / 180.0)

/* Largest angle with the wavelet stretch (1 / cos 84 deg = 9.6: the
 * core's limit of a 10-fold stretch). */
#define STRETCH_MAX (84.0 * DEG)
/* Curves one resampling request may carry. */
#define MAX_CURVES 64

/* ---- small helpers ------------------------------------------------------ */

/* A value in the call's units, and that unit's name, for messages. */
static double shown(proto_call *c, proto_kind k, double v)
{
	return proto_from_internal(&c->units, k, v);
}

static const char *uname(proto_call *c, proto_kind k)
{
	return proto_unit_name(&c->units, k);
}

/* The value of a scalar field, or d when its object was not given (the
 * fields of an absent object are not defaulted). */
static double value_or(const proto_vec *v, double d)
{
	return v->v ? v->v[0] : d;
}

static int oom(proto_call *c)
{
	return proto_fail(c, PROTO_INTERNAL_ERROR, NULL, "out of memory");
}

/* Fails unless z (an array of n) increases strictly. */
static int check_increasing(proto_call *c, const char *path, const double *z,
                            size_t n, proto_kind k, const char *what)
{
	for (size_t i = 1; i < n; i++)
		if (!(z[i] > z[i - 1]))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "element %zu (%g %s) is not above element %zu "
			    "(%g %s): %s must increase strictly",
			    i, shown(c, k, z[i]), uname(c, k), i - 1,
			    shown(c, k, z[i - 1]), uname(c, k), what);
	return 0;
}

/* The elements of a vector as a plain array of n (broadcast). */
static double *expand(proto_call *c, const proto_vec *v, size_t n)
{
	double *x = proto_alloc_doubles(c, n ? n : 1);
	if (x)
		for (size_t i = 0; i < n; i++)
			x[i] = proto_at(v, i);
	return x;
}

/* Velocities from a velocity or a slowness vector (null, <= 0: NaN). */
static double *velocities(proto_call *c, const proto_vec *vel,
                          const proto_vec *slow, size_t n)
{
	double *x = proto_alloc_doubles(c, n ? n : 1);
	if (!x)
		return NULL;
	for (size_t i = 0; i < n; i++) {
		double v =
		    vel->present ? proto_at(vel, i) : 1.0 / proto_at(slow, i);
		x[i] = isfinite(v) && v > 0 ? v : NAN;
	}
	return x;
}

/* Writes x[0..n) as an array of kind k. */
static void w_array(proto_call *c, const char *key, proto_kind k,
                    const double *x, size_t n)
{
	proto_w_vec(c, key, k, x, n, 1, 1);
}

static void w_flags(proto_call *c, const char *key, const uint64_t *f, size_t n,
                    int as_array)
{
	proto_w_flag_rows(c, key, f, sizeof *f, 0, n, as_array);
}

/* JSON Schema texts of body outputs (the writer's shapes). */
#define S_NUMS   "{\"$ref\": \"#/components/schemas/outNumbers\"}"
#define S_GRID   "{\"$ref\": \"#/components/schemas/outGrid\"}"
#define S_QC     "{\"$ref\": \"#/components/schemas/qc\"}"
#define S_QCGRID "{\"$ref\": \"#/components/schemas/qcGrid\"}"
#define S_CURVES                                                               \
	"{\"type\": \"object\", \"additionalProperties\": {\"type\": "         \
	"\"array\", \"items\": {\"type\": [\"number\", \"null\"]}}}"
#define S_CURVES_QC                                                            \
	"{\"type\": \"object\", \"additionalProperties\": {\"type\": "         \
	"\"array\", \"items\": {\"type\": \"integer\", \"minimum\": 0}}}"

/* A body output: per-sample shaped (selectable by `fields`). */
#define OUT(nm, k_, sch, text)                                                 \
	{                                                                      \
		.name = nm, .type = PO_CUSTOM, .kind = k_, .dim = D_SAMPLE,    \
		.schema = sch, .desc = text                                    \
	}
/* A request-level output (always written). */
#define OUT_REQ(nm, ty, k_, text)                                              \
	{                                                                      \
		.name = nm, .type = ty, .kind = k_, .dim = D_REQ, .desc = text \
	}

/* ---- the datum and the checkshots --------------------------------------- */

typedef struct datum_args {
	proto_hdr hdr;
	proto_vec depth, twt, vrep;
} datum_args;

static const proto_field datum_fields[] = {
    {PROTO_NUMS(datum_args, depth, PK_LENGTH, PF_SCALAR,
                "datum depth, in the log's depth reference, at or above "
                "the first log sample (default the first sample); one "
                "datum for the log")},
    {PROTO_NUMS(datum_args, twt, PK_TIME, PF_SCALAR | PF_DFLT,
                "two-way time at the datum (default 0); one value for the "
                "log"),
     .dflt = 0},
    {PROTO_NUMS(datum_args, vrep, PK_VELOCITY, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "replacement velocity from the datum to the first valid "
                "sonic sample; required when the datum lies above it; one "
                "value for the log"),
     .lo = 0},
    {0},
};

static const proto_decl datum_decl = {
    .name = "seismicDatum",
    .fields = datum_fields,
    .size = sizeof(datum_args),
    .desc = "where the two-way time starts: depth, time and the "
            "replacement velocity above the log",
};

typedef struct cs_args {
	proto_hdr hdr;
	proto_vec depth, twt, owt;
} cs_args;

static const proto_field cs_fields[] = {
    {PROTO_NUMS(cs_args, depth, PK_LENGTH, PF_REQ | PF_ARRAY,
                "checkshot depths, strictly increasing, within the datum "
                "and the last log sample"),
     .group = 2},
    {PROTO_NUMS(cs_args, twt, PK_TIME, PF_ARRAY,
                "checkshot two-way times, strictly increasing"),
     .group = 2},
    {PROTO_NUMS(cs_args, owt, PK_TIME, PF_ARRAY,
                "checkshot one-way vertical times (doubled), strictly "
                "increasing"),
     .group = 2},
    {0},
};

static const char *const cs_times[] = {"twt", "owt", NULL};
static const proto_rule cs_rules[] = {
    {PR_EXACTLY, NULL, 1, cs_times,
     "give the checkshot times as twt (two-way) or owt (one-way)"},
    PR_LAST,
};

static const proto_decl cs_decl = {
    .name = "seismicCheckshots",
    .fields = cs_fields,
    .rules = cs_rules,
    .size = sizeof(cs_args),
    .desc = "checkshot (depth, time) pairs: the sonic times are corrected "
            "by a drift curve through them, piecewise linear between "
            "them and held beyond (common practice)",
};

/* The time-depth relation of a log, built in the call's arena. */
typedef struct td_state {
	size_t n;
	const double *z;
	double *twt_sonic, *twt, *drift;
	unsigned *warn;
	rw_seis_td td;
	double *cs_z, *cs_twt, *cs_drift;
	size_t ncs;
	double datum_z, datum_twt, vrep; /* vrep NaN when not used */
	size_t n_filled, n_held;
} td_state;

/* Checks and builds the relation: depths z (n), the sonic as velocity
 * (vel) or slowness (slow), the datum and checkshots as parsed. path_son
 * names the sonic field. 0 or -1. */
static int td_build(proto_call *c, const double *z, size_t n,
                    const proto_vec *vel, const proto_vec *slow,
                    const datum_args *d, const cs_args *cs, td_state *s)
{
	const char *son = vel->present ? "vp" : "dtp";
	size_t first = n;
	rw_seis_datum dat;
	unsigned *w2;
	double *son_v;
	int st;

	memset(s, 0, sizeof *s);
	s->n = n;
	s->z = z;
	son_v = proto_alloc_doubles(c, n);
	s->twt_sonic = proto_alloc_doubles(c, n);
	s->twt = proto_alloc_doubles(c, n);
	s->drift = proto_alloc_doubles(c, n);
	s->warn = proto_alloc(c, n * sizeof *s->warn);
	w2 = proto_alloc(c, n * sizeof *w2);
	if (!son_v || !s->twt_sonic || !s->twt || !s->drift || !s->warn || !w2)
		return oom(c);
	for (size_t i = 0; i < n; i++) {
		son_v[i] = vel->present ? proto_at(vel, i) : proto_at(slow, i);
		if (first == n && isfinite(son_v[i]) && son_v[i] > 0)
			first = i;
	}
	if (first == n)
		return proto_fail(c, PROTO_INVALID_PARAMS, son,
		                  "has no valid sample (all null or <= 0): the "
		                  "time-depth relation needs a sonic");
	s->datum_z = d->depth.present ? d->depth.v[0] : z[0];
	s->datum_twt = value_or(&d->twt, 0.0);
	if (s->datum_z > z[0])
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "datum.depth",
		    "%g %s lies below the first log sample (%g "
		    "%s): the datum must be at or above it",
		    shown(c, PK_LENGTH, s->datum_z), uname(c, PK_LENGTH),
		    shown(c, PK_LENGTH, z[0]), uname(c, PK_LENGTH));
	s->vrep = NAN;
	if (s->datum_z < z[first]) {
		if (!d->vrep.present)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "datum.vrep",
			    "is required: the datum (%g %s) lies above the "
			    "first valid sonic sample (%g %s), and the time "
			    "between them needs a replacement velocity",
			    shown(c, PK_LENGTH, s->datum_z),
			    uname(c, PK_LENGTH), shown(c, PK_LENGTH, z[first]),
			    uname(c, PK_LENGTH));
		s->vrep = d->vrep.v[0];
	} else if (d->vrep.present) {
		proto_warn(c, "datum.vrep",
		           "not used: the sonic starts at the datum");
	}
	dat.z_m = s->datum_z;
	dat.twt_s = s->datum_twt;
	dat.vrep_ms = isnan(s->vrep)
	                  ? (vel->present ? son_v[first] : 1.0 / son_v[first])
	                  : s->vrep;
	st = rw_seis_td_sonic(z, son_v, n,
	                      vel->present ? RW_SEIS_SONIC_VELOCITY
	                                   : RW_SEIS_SONIC_SLOWNESS,
	                      &dat, s->twt_sonic, s->warn);
	if (st != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS, son,
		                  "the sonic gives no time-depth relation");
	/* absurd sonic values (a velocity of 1e300 m/s) give times that do
	 * not rise or overflow: refused here, with the sample */
	for (size_t i = 0; i < n; i++)
		if (!isfinite(s->twt_sonic[i]) ||
		    (i && !(s->twt_sonic[i] > s->twt_sonic[i - 1])))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, son,
			    "element %zu gives a two-way time that %s: the "
			    "sonic there is not a rock's (check its value and "
			    "unit)",
			    i,
			    isfinite(s->twt_sonic[i])
			        ? "does not rise with depth"
			        : "overflows");
	s->td.z_m = z;
	s->td.twt_s = s->twt_sonic;
	s->td.n = n;
	s->td.datum_z_m = s->datum_z;
	s->td.datum_twt_s = s->datum_twt;
	if (cs->hdr.present) {
		const proto_vec *tv = cs->twt.present ? &cs->twt : &cs->owt;
		const char *tname =
		    cs->twt.present ? "checkshots.twt" : "checkshots.owt";
		s->ncs = cs->depth.n;
		s->cs_z = expand(c, &cs->depth, s->ncs);
		s->cs_twt = proto_alloc_doubles(c, s->ncs);
		s->cs_drift = proto_alloc_doubles(c, s->ncs);
		if (!s->cs_z || !s->cs_twt || !s->cs_drift)
			return oom(c);
		for (size_t k = 0; k < s->ncs; k++)
			s->cs_twt[k] =
			    (cs->twt.present ? 1.0 : 2.0) * proto_at(tv, k);
		if (check_increasing(c, "checkshots.depth", s->cs_z, s->ncs,
		                     PK_LENGTH, "checkshot depths") ||
		    check_increasing(c, tname, s->cs_twt, s->ncs, PK_TIME,
		                     "checkshot times"))
			return -1;
		for (size_t k = 0; k < s->ncs; k++) {
			if (s->cs_z[k] < s->datum_z)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "checkshots.depth",
				    "element %zu (%g %s) lies above the datum "
				    "(%g %s)",
				    k, shown(c, PK_LENGTH, s->cs_z[k]),
				    uname(c, PK_LENGTH),
				    shown(c, PK_LENGTH, s->datum_z),
				    uname(c, PK_LENGTH));
			if (s->cs_z[k] > z[n - 1])
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "checkshots.depth",
				    "element %zu (%g %s) lies below the last "
				    "log sample (%g %s): the sonic cannot be "
				    "compared there; drop it or extend the log",
				    k, shown(c, PK_LENGTH, s->cs_z[k]),
				    uname(c, PK_LENGTH),
				    shown(c, PK_LENGTH, z[n - 1]),
				    uname(c, PK_LENGTH));
		}
		s->td.cs_z_m = s->cs_z;
		s->td.n_cs = s->ncs;
		st = rw_seis_td_drift(&s->td, s->cs_twt, s->cs_drift);
		if (st != RW_OK)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "checkshots",
			    "contradict the sonic: with the drift through "
			    "them the time would decrease with depth "
			    "somewhere (check their depth reference, and "
			    "one-way against two-way times)");
		s->td.cs_drift_s = s->cs_drift;
	}
	memset(w2, 0, n * sizeof *w2);
	if (rw_seis_td_eval(&s->td, z, n, s->twt, s->drift, w2) != RW_OK)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "the time-depth relation failed to evaluate");
	for (size_t i = 0; i < n; i++) {
		if (!s->ncs)
			s->drift[i] = NAN;
		s->warn[i] |= w2[i];
		if (s->warn[i] &
		    (RW_SEIS_WARN_SONIC_NULL | RW_SEIS_WARN_REPLACEMENT |
		     RW_SEIS_WARN_EXTRAPOLATED))
			s->n_filled++;
		if (w2[i] & RW_SEIS_WARN_DRIFT_HELD)
			s->n_held++;
	}
	return 0;
}

/* QC bits of one log sample of a relation. */
static uint64_t td_qc(const td_state *s, size_t i, const proto_vec *vel,
                      const proto_vec *slow)
{
	uint64_t f = 0;
	double v = vel->present ? proto_at(vel, i) : proto_at(slow, i);
	if (isnan(v))
		f |= QC_LOG_MISSING;
	else if (!(v > 0))
		f |= QC_INPUT_INVALID;
	if (s->warn[i] & (RW_SEIS_WARN_SONIC_NULL | RW_SEIS_WARN_REPLACEMENT |
	                  RW_SEIS_WARN_EXTRAPOLATED | RW_SEIS_WARN_DRIFT_HELD))
		f |= QC_SEIS_FILLED;
	return f;
}

/* Request-level notes on a relation. */
static void td_warn(proto_call *c, const td_state *s)
{
	if (s->n_filled)
		proto_warn(c, NULL,
		           "%zu of %zu samples take a sonic that was not "
		           "measured there (bridged over nulls, held below the "
		           "log or the replacement velocity above it): their "
		           "times are flagged log_filled",
		           s->n_filled, s->n);
	if (s->n_held)
		proto_warn(c, "checkshots",
		           "%zu of %zu samples lie outside the checkshots' "
		           "depth span: the drift is held at its end value "
		           "there (flagged log_filled)",
		           s->n_held, s->n);
}

/* ---- seismic.timedepth -------------------------------------------------- */

/* Named curves to resample: a JSON object of arrays of the log's length,
 * in any unit (returned in the same unit). */
typedef struct curve_set {
	size_t n;
	const char *name[MAX_CURVES];
	double *v[MAX_CURVES];
} curve_set;

static int curves_parse(proto_call *c, const cJSON *v, const char *path,
                        void *dst)
{
	curve_set *cs = dst;
	const cJSON *m;

	if (!cJSON_IsObject(v))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, path,
		    "must be an object of named curves (arrays of "
		    "numbers or nulls, one per log sample)");
	cJSON_ArrayForEach(m, v)
	{
		const char *p = proto_path(c, path, ".", m->string);
		size_t len = proto__arr_size(m), k = 0;
		const cJSON *e;
		double *x;

		if (!p)
			return oom(c);
		if (cs->n == MAX_CURVES)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "more than %d curves: split the "
			                  "request",
			                  MAX_CURVES);
		if (!m->string[0] || strcmp(m->string, "depth") == 0)
			return proto_fail(c, PROTO_INVALID_PARAMS, p,
			                  "a curve needs a name other than "
			                  "'depth' (the depth is always "
			                  "resampled)");
		if (!cJSON_IsArray(m) || len == 0)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, p,
			    "must be a non-empty array of numbers "
			    "or nulls");
		x = proto_alloc_doubles(c, len);
		if (!x)
			return oom(c);
		if (proto__numarr(m)) /* numbers, NaN for null */
			memcpy(x, proto__numarr(m)->v, len * sizeof *x);
		else
			cJSON_ArrayForEach(e, m)
			{
				if (cJSON_IsNull(e))
					x[k] = NAN;
				else if (cJSON_IsNumber(e) &&
				         isfinite(e->valuedouble))
					x[k] = e->valuedouble;
				else
					return proto_fail(
					    c, PROTO_INVALID_PARAMS, p,
					    "element %zu must be a number "
					    "or null",
					    k);
				k++;
			}
		if (proto_join(c, 0, len, 1, p))
			return -1;
		cs->name[cs->n] = m->string;
		cs->v[cs->n] = x;
		cs->n++;
	}
	return 0;
}

static const proto_custom curves_custom = {
    .parse = curves_parse,
    .schema = "{\"type\": \"object\", \"additionalProperties\": {\"type\": "
              "\"array\", \"minItems\": 1, \"items\": {\"type\": "
              "[\"number\", \"null\"]}}, \"description\": \"named curves, "
              "one value per log sample, in any unit (returned in the "
              "same unit)\"}",
};

enum { INTERP_LINEAR, INTERP_STEFFEN };
static const char *const interp_names[] = {"linear", "steffen", NULL};

typedef struct resample_args {
	proto_hdr hdr;
	proto_vec t0, dt, n;
	int interp;
	curve_set curves;
} resample_args;

static const proto_field resample_fields[] = {
    {PROTO_NUMS(resample_args, t0, PK_TIME, PF_SCALAR,
                "time of the first output sample (default the first log "
                "time rounded up to a multiple of dt)")},
    {PROTO_NUMS(resample_args, dt, PK_TIME,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,
                "output sample interval (default 2 ms)"),
     .dflt = 0.002, .lo = 0},
    {PROTO_NUMS(resample_args, n, PK_NONE, PF_SCALAR | PF_INT | PF_LO | PF_HI,
                "output samples (default: to the last log time)"),
     .lo = 1, .hi = 1e8},
    {.name = "interp",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(resample_args, interp),
     .choices = interp_names,
     .dflt_choice = INTERP_LINEAR,
     .desc = "linear, or steffen (monotone cubic, Steffen 1990); runs of "
             "valid samples are interpolated on their own, nulls never "
             "bridged"},
    {.name = "curves",
     .type = PT_CUSTOM,
     .offset = offsetof(resample_args, curves),
     .custom = &curves_custom,
     .desc = "named curves to resample besides the depth"},
    {0},
};

static const proto_decl resample_decl = {
    .name = "seismicResample",
    .fields = resample_fields,
    .size = sizeof(resample_args),
    .desc = "a regular time axis and the curves to resample onto it (the "
            "depth always)",
};

typedef struct td_args {
	proto_hdr hdr;
	proto_vec depth, vp, dtp;
	datum_args datum;
	cs_args checkshots;
	resample_args resample;
} td_args;

static const proto_field td_fields[] = {
    {PROTO_NUMS(td_args, depth, PK_LENGTH, PF_REQ | PF_ARRAY,
                "log depths, strictly increasing downwards")},
    {PROTO_NUMS(td_args, vp, PK_VELOCITY, PF_NULLS,
                "P velocity (give vp or dtp); null where missing")},
    {PROTO_NUMS(td_args, dtp, PK_SLOWNESS, PF_NULLS,
                "compressional slowness (give vp or dtp); null where "
                "missing")},
    {PROTO_FIELD(td_args, datum, PT_OBJ, 0, "where the time starts"),
     .sub = &datum_decl},
    {PROTO_FIELD(td_args, checkshots, PT_OBJ, 0,
                 "checkshots correcting the sonic drift"),
     .sub = &cs_decl},
    {PROTO_FIELD(td_args, resample, PT_OBJ, 0,
                 "resample the depth and curves to regular time"),
     .sub = &resample_decl},
    {0},
};

static const char *const sonic_pair[] = {"vp", "dtp", NULL};
static const proto_rule td_rules[] = {
    {PR_EXACTLY, NULL, 1, sonic_pair,
     "give the sonic as vp (velocity) or dtp (slowness)"},
    PR_LAST,
};

static const proto_decl td_decl = {
    .name = "",
    .fields = td_fields,
    .rules = td_rules,
    .size = sizeof(td_args),
};

/* Resamples y (at the relation's times) onto ax: values and QC. */
static int resample_one(proto_call *c, const double *t, const double *y,
                        size_t n, const rw_seis_taxis *ax, int interp,
                        double *out, uint64_t *qc)
{
	unsigned *w = proto_alloc(c, ax->n * sizeof *w);
	if (!w)
		return oom(c);
	if (rw_seis_resample(t, y, n, ax,
	                     interp == INTERP_STEFFEN ? RW_SEIS_INTERP_STEFFEN
	                                              : RW_SEIS_INTERP_LINEAR,
	                     out, w) != RW_OK)
		return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
		                  "resampling failed (out of memory?)");
	for (size_t k = 0; k < ax->n; k++)
		qc[k] = (w[k] & RW_SEIS_WARN_NULL_INPUT ? QC_LOG_MISSING : 0) |
		        (w[k] & RW_SEIS_WARN_OUTSIDE ? QC_SEIS_OUTSIDE : 0);
	return 0;
}

static int td_body(proto_call *c, void *args)
{
	td_args *a = args;
	size_t n = a->depth.n;
	const resample_args *r = &a->resample;
	rw_seis_taxis ax = {0, 0, 0};
	double *z = expand(c, &a->depth, n);
	uint64_t *qc = proto_alloc(c, n * sizeof *qc);
	double *rs[MAX_CURVES + 1];
	uint64_t *rq[MAX_CURVES + 1];
	td_state s;

	if (!z || !qc)
		return oom(c);
	if (check_increasing(c, "depth", z, n, PK_LENGTH, "log depths"))
		return -1;
	if (td_build(c, z, n, &a->vp, &a->dtp, &a->datum, &a->checkshots, &s))
		return -1;
	for (size_t i = 0; i < n; i++)
		qc[i] = td_qc(&s, i, &a->vp, &a->dtp);
	if (r->hdr.present) {
		double t_top = s.twt[0], t_bot = s.twt[n - 1];
		ax.dt_s = r->dt.v[0];
		ax.t0_s = r->t0.present
		              ? r->t0.v[0]
		              : ceil(t_top / ax.dt_s - 1e-9) * ax.dt_s;
		if (r->n.present) {
			ax.n = (size_t)r->n.v[0];
		} else {
			double m = floor((t_bot - ax.t0_s) / ax.dt_s + 1e-9);
			if (!(m >= 0))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "resample.t0",
				    "%g %s lies after the last log time (%g "
				    "%s): give resample.n for an axis there",
				    shown(c, PK_TIME, ax.t0_s),
				    uname(c, PK_TIME), shown(c, PK_TIME, t_bot),
				    uname(c, PK_TIME));
			if (m >= 1e8)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, "resample.dt",
				    "gives more than 1e8 samples over the log");
			ax.n = (size_t)m + 1;
		}
		if (proto_check_size(c, n, n + ax.n * (r->curves.n + 1)))
			return -1;
		for (size_t k = 0; k <= r->curves.n; k++) {
			rs[k] = proto_alloc_doubles(c, ax.n);
			rq[k] = proto_alloc(c, ax.n * sizeof *rq[k]);
			if (!rs[k] || !rq[k])
				return oom(c);
			if (resample_one(c, s.twt, k ? r->curves.v[k - 1] : z,
			                 n, &ax, r->interp, rs[k], rq[k]))
				return -1;
		}
	} else if (proto_check_size(c, n, n)) {
		return -1;
	}
	td_warn(c, &s);
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_num(c, "datum_depth", PK_LENGTH, s.datum_z);
	proto_w_num(c, "datum_twt", PK_TIME, s.datum_twt);
	proto_w_num(c, "vrep", PK_VELOCITY, s.vrep);
	w_array(c, "twt", PK_TIME, s.twt, n);
	w_array(c, "twt_sonic", PK_TIME, s.twt_sonic, n);
	if (s.ncs) {
		w_array(c, "drift", PK_TIME, s.drift, n);
		w_array(c, "checkshot_depth", PK_LENGTH, s.cs_z, s.ncs);
		w_array(c, "checkshot_twt", PK_TIME, s.cs_twt, s.ncs);
		w_array(c, "checkshot_drift", PK_TIME, s.cs_drift, s.ncs);
	}
	w_flags(c, "qc", qc, n, 1);
	if (r->hdr.present) {
		double *t = proto_alloc_doubles(c, ax.n);
		if (!t)
			return oom(c);
		for (size_t k = 0; k < ax.n; k++)
			t[k] = ax.t0_s + (double)k * ax.dt_s;
		proto_w_int(c, "resample_n", (long long)ax.n);
		w_array(c, "resample_time", PK_TIME, t, ax.n);
		proto_w_obj_begin(c, "resampled");
		w_array(c, "depth", PK_LENGTH, rs[0], ax.n);
		for (size_t k = 0; k < r->curves.n; k++)
			w_array(c, r->curves.name[k], PK_NONE, rs[k + 1], ax.n);
		proto_w_obj_end(c);
		proto_w_obj_begin(c, "resampled_qc");
		for (size_t k = 0; k <= r->curves.n; k++)
			w_flags(c, k ? r->curves.name[k - 1] : "depth", rq[k],
			        ax.n, 1);
		proto_w_obj_end(c);
	}
	proto__write_tail(c);
	return 0;
}

static int has_cs(const void *a)
{
	return ((const td_args *)a)->checkshots.hdr.present;
}

static int has_rs(const void *a)
{
	return ((const td_args *)a)->resample.hdr.present;
}

static const proto_output td_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "log samples"},
    OUT_REQ("datum_depth", PO_NUM, PK_LENGTH, "the datum depth used"),
    OUT_REQ("datum_twt", PO_NUM, PK_TIME, "the time at the datum"),
    OUT_REQ("vrep", PO_NUM, PK_VELOCITY,
            "the replacement velocity used (null when not needed)"),
    OUT("twt", PK_TIME, S_NUMS,
        "two-way time of each sample: the sonic time corrected by the "
        "checkshot drift (the sonic time without checkshots)"),
    OUT("twt_sonic", PK_TIME, S_NUMS,
        "two-way time from the sonic alone (trapezoid integration)"),
    {.name = "drift",
     .type = PO_CUSTOM,
     .kind = PK_TIME,
     .dim = D_SAMPLE,
     .when = has_cs,
     .schema = S_NUMS,
     .desc = "drift added at each sample (checkshot minus sonic time)"},
    {.name = "checkshot_depth",
     .type = PO_CUSTOM,
     .kind = PK_LENGTH,
     .dim = D_SAMPLE,
     .when = has_cs,
     .schema = S_NUMS,
     .desc = "the checkshot depths"},
    {.name = "checkshot_twt",
     .type = PO_CUSTOM,
     .kind = PK_TIME,
     .dim = D_SAMPLE,
     .when = has_cs,
     .schema = S_NUMS,
     .desc = "the checkshot two-way times used"},
    {.name = "checkshot_drift",
     .type = PO_CUSTOM,
     .kind = PK_TIME,
     .dim = D_SAMPLE,
     .when = has_cs,
     .schema = S_NUMS,
     .desc = "drift at each checkshot"},
    {.name = "qc",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = S_QC,
     .desc = "QC flags per log sample (always returned)"},
    {.name = "resample_n",
     .type = PO_COUNT,
     .dim = D_REQ,
     .when = has_rs,
     .desc = "samples of the regular axis"},
    {.name = "resample_time",
     .type = PO_CUSTOM,
     .kind = PK_TIME,
     .dim = D_SAMPLE,
     .when = has_rs,
     .schema = S_NUMS,
     .desc = "the regular time axis"},
    {.name = "resampled",
     .type = PO_CUSTOM,
     .dim = D_SAMPLE,
     .when = has_rs,
     .schema = S_CURVES,
     .desc = "the depth (in length units) and each named curve (in its "
             "own unit) on the regular axis; null outside the log or "
             "next to a null"},
    {.name = "resampled_qc",
     .type = PO_CUSTOM,
     .dim = D_SAMPLE,
     .when = has_rs,
     .schema = S_CURVES_QC,
     .desc = "QC flags of each resampled curve"},
    {0},
};

static const proto_method m_timedepth = {
    .name = "seismic.timedepth",
    .summary = "Two-way time of every log sample from the sonic, with "
               "checkshot drift correction and regular-time resampling.",
    .description =
        "depth and vp or dtp of one log; datum (depth, twt, vrep); "
        "checkshots (depth, twt or owt); resample (t0, dt, n, interp, "
        "curves). Trapezoid integration of the slowness from the datum; "
        "nulls bridged, flagged. See seismic.md.",
    .params = &td_decl,
    .outputs = td_outputs,
    .body = td_body,
    .cost = 2,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- wavelets ----------------------------------------------------------- */

enum { WK_RICKER, WK_ORMSBY, WK_BANDPASS, WK_SAMPLES };
static const char *const wk_names[] = {"ricker", "ormsby", "bandpass",
                                       "samples", NULL};
enum { WN_NONE, WN_PEAK, WN_ENERGY };
static const char *const wn_names[] = {"none", "peak", "energy", NULL};

typedef struct wav_spec {
	int kind, normalise;
	proto_vec frequency, corners, length, phase, samples, zero_index;
} wav_spec;

/* The wavelet's fields, landing in member m of struct st. */
#define WAV_FIELDS(st, m)                                                      \
	{.name = "kind",                                                       \
	 .type = PT_ENUM,                                                      \
	 .flags = PF_DFLT,                                                     \
	 .offset = offsetof(st, m.kind),                                       \
	 .choices = wk_names,                                                  \
	 .dflt_choice = WK_RICKER,                                             \
	 .desc = "ricker (peak frequency), ormsby or bandpass (four corner "   \
	         "frequencies), or samples (given); default ricker"},          \
	    {.name = "frequency",                                              \
	     .type = PT_NUMS,                                                  \
	     .kind = PK_FREQUENCY,                                             \
	     .flags = PF_SCALAR | PF_LO | PF_LO_OPEN,                          \
	     .offset = offsetof(st, m.frequency),                              \
	     .lo = 0,                                                          \
	     .desc = "Ricker peak frequency, below Nyquist; one wavelet per "  \
	             "request"},                                               \
	    {.name = "corners",                                                \
	     .type = PT_NUMS,                                                  \
	     .kind = PK_FREQUENCY,                                             \
	     .flags = PF_ARRAY | PF_LO,                                        \
	     .group = 3,                                                       \
	     .offset = offsetof(st, m.corners),                                \
	     .lo = 0,                                                          \
	     .desc = "four corner frequencies f1 < f2 <= f3 < f4 <= Nyquist "  \
	             "(Ormsby, band-pass)"},                                   \
	    {.name = "length",                                                 \
	     .type = PT_NUMS,                                                  \
	     .kind = PK_TIME,                                                  \
	     .flags = PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,                \
	     .offset = offsetof(st, m.length),                                 \
	     .dflt = 0.128,                                                    \
	     .lo = 0,                                                          \
	     .desc = "length of a generated wavelet (default 128 ms): 2 "      \
	             "floor(length / (2 dt)) + 1 samples, centred"},           \
	    {.name = "phase",                                                  \
	     .type = PT_NUMS,                                                  \
	     .kind = PK_ANGLE,                                                 \
	     .flags = PF_SCALAR | PF_DFLT | PF_LO | PF_HI,                     \
	     .offset = offsetof(st, m.phase),                                  \
	     .dflt = 0,                                                        \
	     .lo = -M_PI,                                                      \
	     .hi = M_PI,                                                       \
	     .desc = "constant-phase rotation, -180 to 180 deg (default 0: "   \
	             "zero phase); every frequency advanced by it"},           \
	    {.name = "normalise",                                              \
	     .type = PT_ENUM,                                                  \
	     .flags = PF_DFLT,                                                 \
	     .offset = offsetof(st, m.normalise),                              \
	     .choices = wn_names,                                              \
	     .dflt_choice = WN_NONE,                                           \
	     .desc =                                                           \
	         "none (generated wavelets have a peak of 1 at time "          \
	         "zero before rotation), peak (largest |w| = 1) or energy "    \
	         "(sum of w^2 = 1), after the rotation"},                      \
	    {.name = "samples",                                                \
	     .type = PT_NUMS,                                                  \
	     .flags = PF_ARRAY,                                                \
	     .group = 3,                                                       \
	     .offset = offsetof(st, m.samples),                                \
	     .desc = "the wavelet's samples at the trace interval (kind "      \
	             "samples)"},                                              \
	{                                                                      \
		.name = "zero_index", .type = PT_NUMS,                         \
		.flags = PF_SCALAR | PF_INT | PF_LO,                           \
		.offset = offsetof(st, m.zero_index), .lo = 0,                 \
		.desc = "index of time zero among the samples (default the "   \
		        "middle one, (n - 1) / 2 rounded down)"                \
	}

/* Rules of a wavelet declaration; x is one more field a generated or
 * given wavelet may carry (the sample interval of seismic.wavelet). */
#define WAV_NAMES(p, x)                                                        \
	static const char *const p##_ricker_only[] = {                         \
	    "frequency", "length", "phase", "normalise", x, NULL};             \
	static const char *const p##_corner_only[] = {                         \
	    "corners", "length", "phase", "normalise", x, NULL};               \
	static const char *const p##_samples_only[] = {                        \
	    "samples", "zero_index", "phase", "normalise", x, NULL};           \
	static const char *const p##_need_f[] = {"frequency", NULL};           \
	static const char *const p##_need_c[] = {"corners", NULL};             \
	static const char *const p##_need_s[] = {"samples", NULL};
#define WAV_RULES(p)                                                           \
	{PR_REQUIRES, "kind=ricker", 0, p##_need_f,                            \
	 "a Ricker wavelet needs its peak frequency"},                         \
	    {PR_ONLY, "kind=ricker", 0, p##_ricker_only,                       \
	     "not a parameter of a Ricker wavelet (frequency, length, "        \
	     "phase, normalise)"},                                             \
	    {PR_REQUIRES, "kind=ormsby", 0, p##_need_c,                        \
	     "an Ormsby wavelet needs its four corner frequencies"},           \
	    {PR_ONLY, "kind=ormsby", 0, p##_corner_only,                       \
	     "not a parameter of an Ormsby wavelet (corners, length, phase, "  \
	     "normalise)"},                                                    \
	    {PR_REQUIRES, "kind=bandpass", 0, p##_need_c,                      \
	     "a band-pass wavelet needs its four corner frequencies"},         \
	    {PR_ONLY, "kind=bandpass", 0, p##_corner_only,                     \
	     "not a parameter of a band-pass wavelet (corners, length, "       \
	     "phase, normalise)"},                                             \
	    {PR_REQUIRES, "kind=samples", 0, p##_need_s,                       \
	     "a given wavelet needs its samples"},                             \
	{                                                                      \
		PR_ONLY, "kind=samples", 0, p##_samples_only,                  \
		    "not a parameter of a given wavelet (samples, "            \
		    "zero_index, phase, normalise)"                            \
	}

/* A built wavelet. */
typedef struct wav_out {
	double *w;
	size_t n, i0;
	double dt;
} wav_out;

/* Builds the wavelet of spec s at interval dt; prefix is the path of its
 * fields ("" or "wavelet."), dt_path names the interval in messages.
 * 0 or -1. */
static int wav_build(proto_call *c, const wav_spec *s, const char *prefix,
                     double dt, const char *dt_path, wav_out *o)
{
	double nyq = 0.5 / dt, f4[4];
	unsigned warn = 0;
	const char *fpath = proto_path(c, prefix, "frequency", "");
	const char *cpath = proto_path(c, prefix, "corners", "");
	const char *lpath = proto_path(c, prefix, "length", "");
	const char *spath = proto_path(c, prefix, "samples", "");
	size_t cap;
	int st;

	if (!fpath || !cpath || !lpath || !spath)
		return oom(c);
	o->dt = dt;
	if (s->kind == WK_SAMPLES) {
		o->n = s->samples.n;
		if (o->n > RW_SEIS_MAX_WAVELET)
			return proto_fail(c, PROTO_INVALID_PARAMS, spath,
			                  "%zu samples: at most %u", o->n,
			                  RW_SEIS_MAX_WAVELET);
		o->i0 = s->zero_index.present ? (size_t)s->zero_index.v[0]
		                              : (o->n - 1) / 2;
		if (o->i0 >= o->n)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS,
			    proto_path(c, prefix, "zero_index", ""),
			    "%zu is past the last of the %zu samples", o->i0,
			    o->n);
		o->w = expand(c, &s->samples, o->n);
		if (!o->w)
			return oom(c);
		if (rw_seis_wavelet_check(o->w, o->n, o->i0) != RW_OK)
			return proto_fail(c, PROTO_INVALID_PARAMS, spath,
			                  "are all zero: not a wavelet");
	} else {
		double len = s->length.v[0], m = floor(len / (2.0 * dt) + 1e-9);
		if (!(m >= 1) || 2.0 * m + 1 > RW_SEIS_MAX_WAVELET)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, lpath,
			    "%g %s at the interval %g %s gives %.0f samples: "
			    "a wavelet has 3 to %u",
			    shown(c, PK_TIME, len), uname(c, PK_TIME),
			    shown(c, PK_TIME, dt), uname(c, PK_TIME),
			    m >= 0 ? 2 * m + 1 : 0, RW_SEIS_MAX_WAVELET);
		if (s->kind == WK_RICKER && !(s->frequency.v[0] < nyq))
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, fpath,
			    "%g Hz is not below the Nyquist frequency %g Hz "
			    "of the sample interval %g %s (%s)",
			    s->frequency.v[0], nyq, shown(c, PK_TIME, dt),
			    uname(c, PK_TIME), dt_path);
		if (s->kind != WK_RICKER) {
			if (s->corners.n != 4)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, cpath,
				    "give four corner frequencies "
				    "f1 < f2 <= f3 < f4, not %zu",
				    s->corners.n);
			for (int k = 0; k < 4; k++)
				f4[k] = s->corners.v[k];
			if (!(f4[0] < f4[1] && f4[1] <= f4[2] && f4[2] < f4[3]))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, cpath,
				    "[%g, %g, %g, %g] Hz: the corners must "
				    "satisfy f1 < f2 <= f3 < f4",
				    f4[0], f4[1], f4[2], f4[3]);
			if (f4[3] > nyq)
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, cpath,
				    "f4 = %g Hz is above the Nyquist frequency "
				    "%g Hz of the sample interval %g %s (%s)",
				    f4[3], nyq, shown(c, PK_TIME, dt),
				    uname(c, PK_TIME), dt_path);
		}
		cap = 2 * (size_t)m + 1;
		o->w = proto_alloc_doubles(c, cap);
		if (!o->w)
			return oom(c);
		st = s->kind == WK_RICKER
		         ? rw_seis_wavelet_ricker(s->frequency.v[0], len, dt,
		                                  o->w, cap, &o->n, &warn)
		     : s->kind == WK_ORMSBY
		         ? rw_seis_wavelet_ormsby(f4, len, dt, o->w, cap, &o->n,
		                                  &warn)
		         : rw_seis_wavelet_bandpass(f4, len, dt, o->w, cap,
		                                    &o->n, &warn);
		if (st != RW_OK)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, lpath,
			    "no wavelet of this length and interval");
		o->i0 = (o->n - 1) / 2;
	}
	if (s->phase.v[0] != 0) {
		size_t wl = rw_seis_hilbert_workspace(o->n);
		double *work = proto_alloc_doubles(c, wl ? wl : 1);
		if (!work)
			return oom(c);
		if (rw_seis_wavelet_rotate(o->w, o->n, s->phase.v[0], work,
		                           wl) != RW_OK)
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  proto_path(c, prefix, "phase", ""),
			                  "the rotation failed");
	}
	if (s->normalise != WN_NONE &&
	    rw_seis_wavelet_normalise(o->w, o->n,
	                              s->normalise == WN_PEAK
	                                  ? RW_SEIS_NORM_PEAK
	                                  : RW_SEIS_NORM_ENERGY) != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS, spath,
		                  "cannot be normalised (all zero)");
	if (warn & RW_SEIS_WARN_TRUNCATED)
		proto_warn(c, lpath,
		           "the wavelet is cut where it is still above 1%% of "
		           "its peak: its spectrum ripples; lengthen it");
	if (warn & RW_SEIS_WARN_NEAR_NYQUIST)
		proto_warn(c, s->kind == WK_RICKER ? fpath : cpath,
		           "the wavelet has energy near the Nyquist frequency "
		           "(%g Hz): a finer sample interval represents it "
		           "better",
		           nyq);
	return 0;
}

/* ---- seismic.wavelet ---------------------------------------------------- */

typedef struct wavelet_args {
	proto_hdr hdr;
	wav_spec w;
	proto_vec dt;
} wavelet_args;

WAV_NAMES(wv, "dt")

static const proto_field wavelet_fields[] = {
    WAV_FIELDS(wavelet_args, w),
    {PROTO_NUMS(wavelet_args, dt, PK_TIME,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,
                "sample interval (default 2 ms); one for the wavelet"),
     .dflt = 0.002, .lo = 0},
    {0},
};

static const proto_rule wavelet_rules[] = {WAV_RULES(wv), PR_LAST};

static const proto_decl wavelet_decl = {
    .name = "",
    .fields = wavelet_fields,
    .rules = wavelet_rules,
    .size = sizeof(wavelet_args),
};

static int wavelet_body(proto_call *c, void *args)
{
	wavelet_args *a = args;
	wav_out o;
	double *t;

	if (wav_build(c, &a->w, "", a->dt.v[0], "dt", &o))
		return -1;
	t = proto_alloc_doubles(c, o.n);
	if (!t)
		return oom(c);
	for (size_t k = 0; k < o.n; k++)
		t[k] = ((double)k - (double)o.i0) * o.dt;
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)o.n);
	proto_w_int(c, "zero_index", (long long)o.i0);
	proto_w_num(c, "dt", PK_TIME, o.dt);
	w_array(c, "time", PK_TIME, t, o.n);
	w_array(c, "amplitude", PK_NONE, o.w, o.n);
	proto__write_tail(c);
	return 0;
}

static const proto_output wavelet_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "samples"},
    OUT_REQ("zero_index", PO_INT, PK_NONE, "index of time zero"),
    OUT_REQ("dt", PO_NUM, PK_TIME, "the sample interval"),
    OUT("time", PK_TIME, S_NUMS, "time of each sample (0 at zero_index)"),
    OUT("amplitude", PK_NONE, S_NUMS, "the wavelet's samples"),
    {0},
};

static const proto_method m_wavelet = {
    .name = "seismic.wavelet",
    .summary = "A Ricker, Ormsby, tapered band-pass or given wavelet, "
               "optionally phase-rotated and normalised.",
    .description = "kind, frequency or corners, length, dt, phase, "
                   "normalise; or samples and zero_index. Generated "
                   "wavelets are zero phase, odd-length, centred, peak 1. "
                   "Truncation and near-Nyquist energy are warnings. See "
                   "seismic.md.",
    .params = &wavelet_decl,
    .outputs = wavelet_outputs,
    .body = wavelet_body,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- seismic.upscale ---------------------------------------------------- */

enum { UP_BACKUS, UP_BLOCK };
static const char *const up_names[] = {"backus", "block", NULL};
enum { CUR_AI, CUR_VP, CUR_VS, CUR_RHO };
static const char *const cur_names[] = {"ai", "vp", "vs", "rho", NULL};
static const char *const mean_names[] = {"arithmetic", "harmonic", NULL};

typedef struct mean_args {
	proto_hdr hdr;
	int vp, vs, rho;
} mean_args;

static const proto_field mean_fields[] = {
    {.name = "vp",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(mean_args, vp),
     .choices = mean_names,
     .dflt_choice = RW_SEIS_MEAN_HARMONIC,
     .desc = "mean of vp in a block (default harmonic: keeps the "
             "block's travel time)"},
    {.name = "vs",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(mean_args, vs),
     .choices = mean_names,
     .dflt_choice = RW_SEIS_MEAN_HARMONIC,
     .desc = "mean of vs in a block (default harmonic)"},
    {.name = "rho",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(mean_args, rho),
     .choices = mean_names,
     .dflt_choice = RW_SEIS_MEAN_ARITHMETIC,
     .desc = "mean of the density in a block (default arithmetic: keeps "
             "the mass)"},
    {0},
};

static const proto_decl mean_decl = {
    .name = "seismicBlockMeans",
    .fields = mean_fields,
    .size = sizeof(mean_args),
    .desc = "how each curve's block value is formed",
};

typedef struct up_args {
	proto_hdr hdr;
	proto_vec depth, vp, vs, rho;
	int method;
	proto_vec window, backus_number, frequency, min_valid;
	proto_vec boundaries;
	int curve;
	proto_vec threshold, min_thickness;
	mean_args mean;
} up_args;

static const proto_field up_fields[] = {
    {PROTO_NUMS(up_args, depth, PK_LENGTH, PF_REQ | PF_ARRAY,
                "log depths, strictly increasing")},
    {PROTO_NUMS(up_args, vp, PK_VELOCITY, PF_REQ | PF_NULLS, "P velocity")},
    {PROTO_NUMS(up_args, vs, PK_VELOCITY, PF_REQ | PF_NULLS,
                "S velocity (0 for a fluid layer)")},
    {PROTO_NUMS(up_args, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(up_args, method),
     .choices = up_names,
     .dflt_choice = UP_BACKUS,
     .desc = "backus (Backus 1962 moving average: VTI stiffnesses and "
             "Thomsen parameters) or block (layer means between "
             "boundaries)"},
    {PROTO_NUMS(up_args, window, PK_LENGTH, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "Backus window length, centred on each sample (or give "
                "frequency); one for the log"),
     .lo = 0},
    {PROTO_NUMS(up_args, backus_number, PK_NONE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
                "window as this fraction of the shortest wavelength at "
                "frequency (default 1/3, the Backus-number limit of Liner "
                "& Fei 2006)"),
     .dflt = 1.0 / 3.0, .lo = 0, .hi = 10},
    {PROTO_NUMS(up_args, frequency, PK_FREQUENCY,
                PF_SCALAR | PF_LO | PF_LO_OPEN,
                "dominant frequency setting the window: backus_number x "
                "the smallest vs (vp where no shear) / frequency"),
     .lo = 0},
    {PROTO_NUMS(up_args, min_valid, PK_NONE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN | PF_HI,
                "least valid fraction of the window's length for a value "
                "(default 0.5)"),
     .dflt = 0.5, .lo = 0, .hi = 1},
    {PROTO_NUMS(up_args, boundaries, PK_LENGTH, PF_ARRAY,
                "block boundaries, strictly increasing (block)"),
     .group = 1},
    {.name = "curve",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(up_args, curve),
     .choices = cur_names,
     .dflt_choice = CUR_AI,
     .desc = "the curve whose departures start blocks (default ai = rho "
             "vp)"},
    {PROTO_NUMS(up_args, threshold, PK_NONE, PF_SCALAR | PF_LO | PF_LO_OPEN,
                "detect boundaries: a sample departing from its block's "
                "running mean by more than this fraction of the curve's "
                "mean over the log starts a new block"),
     .lo = 0},
    {PROTO_NUMS(up_args, min_thickness, PK_LENGTH, PF_SCALAR | PF_DFLT | PF_LO,
                "thinnest block the detection makes (default 0)"),
     .dflt = 0, .lo = 0},
    {PROTO_FIELD(up_args, mean, PT_OBJ, 0,
                 "how each curve is averaged in a block"),
     .sub = &mean_decl},
    {0},
};

static const char *const up_win[] = {"window", "frequency", NULL};
static const char *const up_bn[] = {"frequency", NULL};
static const char *const up_bounds[] = {"boundaries", "threshold", NULL};
static const char *const up_backus_only[] = {
    "depth",         "vp",        "vs",        "rho", "window",
    "backus_number", "frequency", "min_valid", NULL};
static const char *const up_block_only[] = {
    "depth",         "vp",   "vs", "rho", "boundaries", "threshold", "curve",
    "min_thickness", "mean", NULL};
static const proto_rule up_rules[] = {
    {PR_ONLY, "method=backus", 0, up_backus_only,
     "not a parameter of the Backus average"},
    {PR_ONLY, "method=block", 0, up_block_only, "not a parameter of blocking"},
    {PR_EXACTLY, "method=backus", 1, up_win,
     "give the Backus window as a length (window) or from the dominant "
     "frequency (frequency, with backus_number)"},
    {PR_REQUIRES, "backus_number", 0, up_bn,
     "backus_number sets the window from the dominant frequency: give "
     "frequency too"},
    {PR_EXACTLY, "method=block", 1, up_bounds,
     "give the blocks by their boundaries or a detection threshold"},
    PR_LAST,
};

static const proto_decl up_decl = {
    .name = "",
    .fields = up_fields,
    .rules = up_rules,
    .size = sizeof(up_args),
};

/* QC bits of a Backus sample. */
static uint64_t backus_qc(unsigned w)
{
	uint64_t f = 0;
	if (w & RW_SEIS_WARN_WINDOW_CUT)
		f |= QC_SEIS_OUTSIDE;
	if (w & RW_SEIS_WARN_NULL_IN_WIN)
		f |= QC_SEIS_FILLED;
	if (w & RW_SEIS_WARN_TOO_FEW_VALID)
		f |= QC_LOG_MISSING;
	if (w & RW_SEIS_WARN_FLUID_LAYER)
		f |= QC_NO_SHEAR;
	return f;
}

static int up_backus(proto_call *c, const up_args *a, const double *z,
                     const double *vp, const double *vs, const double *rho,
                     size_t n)
{
	rw_seis_backus *b = proto_alloc(c, n * sizeof *b);
	unsigned *w = proto_alloc(c, n * sizeof *w);
	uint64_t *qc = proto_alloc(c, n * sizeof *qc);
	double *col = proto_alloc_doubles(c, n), window;
	static const struct {
		const char *name;
		proto_kind k;
	} outs[] = {
	    {"c11", PK_MODULUS},  {"c13", PK_MODULUS},  {"c33", PK_MODULUS},
	    {"c44", PK_MODULUS},  {"c66", PK_MODULUS},  {"rho", PK_DENSITY},
	    {"vp0", PK_VELOCITY}, {"vs0", PK_VELOCITY}, {"epsilon", PK_NONE},
	    {"delta", PK_NONE},   {"gamma", PK_NONE}};

	if (!b || !w || !qc || !col)
		return oom(c);
	if (a->window.present) {
		window = a->window.v[0];
	} else if (rw_seis_backus_window(vp, vs, n, a->backus_number.v[0],
	                                 a->frequency.v[0], &window) != RW_OK) {
		return proto_fail(c, PROTO_INVALID_PARAMS, "vp",
		                  "has no valid positive velocity to set the "
		                  "window from");
	}
	if (rw_seis_backus_log(z, vp, vs, rho, n, window, a->min_valid.v[0], b,
	                       w) != RW_OK)
		return proto_fail(c, PROTO_INVALID_PARAMS, "depth",
		                  "the Backus average refused the log");
	for (size_t i = 0; i < n; i++) {
		qc[i] = backus_qc(w[i]);
		for (int q = 0; q < 3; q++) {
			double v = q == 0 ? vp[i] : q == 1 ? vs[i] : rho[i];
			if (isnan(v))
				qc[i] |= QC_LOG_MISSING;
		}
	}
	if (window < 2.0 * (z[n - 1] - z[0]) / (double)(n - 1))
		proto_warn(c, a->window.present ? "window" : "frequency",
		           "the window (%g %s) spans fewer than two samples: "
		           "the average is close to the log itself",
		           shown(c, PK_LENGTH, window), uname(c, PK_LENGTH));
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "method", "backus");
	proto_w_num(c, "window", PK_LENGTH, window);
	for (size_t k = 0; k < sizeof outs / sizeof outs[0]; k++) {
		for (size_t i = 0; i < n; i++) {
			const rw_seis_backus *e = &b[i];
			double v = NAN;
			switch (k) {
			case 0: v = e->c.c11_pa; break;
			case 1: v = e->c.c13_pa; break;
			case 2: v = e->c.c33_pa; break;
			case 3: v = e->c.c44_pa; break;
			case 4: v = e->c.c66_pa; break;
			case 5: v = e->rho_kgm3; break;
			case 6: v = sqrt(e->c.c33_pa / e->rho_kgm3); break;
			case 7: v = sqrt(e->c.c44_pa / e->rho_kgm3); break;
			case 8: v = e->th.epsilon; break;
			case 9: v = e->th.delta; break;
			default: v = e->th.gamma; break;
			}
			col[i] = v;
		}
		w_array(c, outs[k].name, outs[k].k, col, n);
	}
	w_flags(c, "qc", qc, n, 1);
	proto__write_tail(c);
	return 0;
}

static int up_block(proto_call *c, const up_args *a, const double *z,
                    const double *vp, const double *vs, const double *rho,
                    size_t n)
{
	double *bounds, *blk[3], *out[3], *y = proto_alloc_doubles(c, n);
	unsigned *w = proto_alloc(c, n * sizeof *w);
	uint64_t *qc = proto_alloc(c, n * sizeof *qc);
	const double *src[3] = {vp, vs, rho};
	int kinds[3] = {a->mean.vp, a->mean.vs, a->mean.rho};
	static const char *const bn[3] = {"block_vp", "block_vs", "block_rho"};
	static const char *const sn[3] = {"vp", "vs", "rho"};
	static const proto_kind kk[3] = {PK_VELOCITY, PK_VELOCITY, PK_DENSITY};
	size_t nb;

	if (!y || !w || !qc)
		return oom(c);
	if (!a->mean.hdr.present) {
		/* the declaration's defaults (an absent object has none) */
		kinds[0] = kinds[1] = RW_SEIS_MEAN_HARMONIC;
		kinds[2] = RW_SEIS_MEAN_ARITHMETIC;
	}
	if (a->boundaries.present) {
		nb = a->boundaries.n;
		bounds = expand(c, &a->boundaries, nb);
		if (!bounds)
			return oom(c);
		if (nb < 2)
			return proto_fail(c, PROTO_INVALID_PARAMS, "boundaries",
			                  "give at least two boundaries (one "
			                  "block)");
		if (check_increasing(c, "boundaries", bounds, nb, PK_LENGTH,
		                     "boundaries"))
			return -1;
	} else {
		double sum = 0;
		size_t nv = 0;
		for (size_t i = 0; i < n; i++) {
			y[i] = a->curve == CUR_AI   ? rho[i] * vp[i]
			       : a->curve == CUR_VP ? vp[i]
			       : a->curve == CUR_VS ? vs[i]
			                            : rho[i];
			if (isfinite(y[i])) {
				sum += fabs(y[i]);
				nv++;
			}
		}
		if (!nv || !(sum > 0))
			return proto_fail(c, PROTO_INVALID_PARAMS,
			                  cur_names[a->curve],
			                  "has no valid non-zero sample to "
			                  "detect blocks on");
		bounds = proto_alloc_doubles(c, n + 1);
		if (!bounds)
			return oom(c);
		if (rw_seis_block_detect(
		        z, y, n, a->threshold.v[0] * sum / (double)nv,
		        a->min_thickness.v[0], bounds, n + 1, &nb) != RW_OK)
			return proto_fail(c, PROTO_INVALID_PARAMS, "threshold",
			                  "block detection failed on the log");
	}
	memset(w, 0, n * sizeof *w);
	for (int q = 0; q < 3; q++) {
		blk[q] = proto_alloc_doubles(c, nb - 1 ? nb - 1 : 1);
		out[q] = proto_alloc_doubles(c, n);
		if (!blk[q] || !out[q])
			return oom(c);
		if (rw_seis_block_means(z, src[q], n, bounds, nb,
		                        (rw_seis_mean)kinds[q], blk[q], out[q],
		                        w) != RW_OK)
			return proto_fail(c, PROTO_INVALID_PARAMS, "boundaries",
			                  "the blocks do not fit the log");
	}
	for (size_t i = 0; i < n; i++) {
		qc[i] = 0;
		if (w[i] & RW_SEIS_WARN_OUTSIDE)
			qc[i] |= QC_SEIS_OUTSIDE;
		if (w[i] & RW_SEIS_WARN_TOO_FEW_VALID)
			qc[i] |= QC_LOG_MISSING;
		for (int q = 0; q < 3; q++)
			if (isnan(src[q][i]))
				qc[i] |= QC_LOG_MISSING;
	}
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n", (long long)n);
	proto_w_str(c, "method", "block");
	proto_w_int(c, "n_blocks", (long long)(nb - 1));
	w_array(c, "boundaries", PK_LENGTH, bounds, nb);
	for (int q = 0; q < 3; q++)
		w_array(c, bn[q], kk[q], blk[q], nb - 1);
	for (int q = 0; q < 3; q++)
		w_array(c, sn[q], kk[q], out[q], n);
	w_flags(c, "qc", qc, n, 1);
	proto__write_tail(c);
	return 0;
}

static int up_body(proto_call *c, void *args)
{
	up_args *a = args;
	size_t n = a->depth.n;
	double *z = expand(c, &a->depth, n);
	double *vp = expand(c, &a->vp, n), *vs = expand(c, &a->vs, n);
	double *rho = expand(c, &a->rho, n);

	if (!z || !vp || !vs || !rho)
		return oom(c);
	if (n < 2)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "depth",
		    "upscaling needs a log of at least 2 samples");
	if (check_increasing(c, "depth", z, n, PK_LENGTH, "log depths"))
		return -1;
	if (proto_check_size(c, n, 4 * n))
		return -1;
	return a->method == UP_BACKUS ? up_backus(c, a, z, vp, vs, rho, n)
	                              : up_block(c, a, z, vp, vs, rho, n);
}

static int is_backus(const void *a)
{
	return ((const up_args *)a)->method == UP_BACKUS;
}

static int is_block(const void *a)
{
	return ((const up_args *)a)->method == UP_BLOCK;
}

#define UP_OUT(nm, k_, w, text)                                                \
	{                                                                      \
		.name = nm, .type = PO_CUSTOM, .kind = k_, .dim = D_SAMPLE,    \
		.when = w, .schema = S_NUMS, .desc = text                      \
	}
static const proto_output up_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "log samples"},
    {.name = "method",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(up_args, method),
     .choices = up_names,
     .desc = "the method used"},
    {.name = "window",
     .type = PO_NUM,
     .kind = PK_LENGTH,
     .dim = D_REQ,
     .when = is_backus,
     .desc = "the Backus window length used"},
    UP_OUT("c11", PK_MODULUS, is_backus, "VTI stiffness C11"),
    UP_OUT("c13", PK_MODULUS, is_backus, "VTI stiffness C13"),
    UP_OUT("c33", PK_MODULUS, is_backus, "VTI stiffness C33"),
    UP_OUT("c44", PK_MODULUS, is_backus, "VTI stiffness C44"),
    UP_OUT("c66", PK_MODULUS, is_backus, "VTI stiffness C66"),
    UP_OUT("rho", PK_DENSITY, NULL,
           "averaged density (backus) or blocked density (block)"),
    UP_OUT("vp0", PK_VELOCITY, is_backus,
           "vertical P velocity sqrt(C33 / rho)"),
    UP_OUT("vs0", PK_VELOCITY, is_backus,
           "vertical S velocity sqrt(C44 / rho)"),
    UP_OUT("epsilon", PK_NONE, is_backus,
           "Thomsen epsilon (null with a fluid layer in the window)"),
    UP_OUT("delta", PK_NONE, is_backus, "Thomsen delta"),
    UP_OUT("gamma", PK_NONE, is_backus, "Thomsen gamma"),
    {.name = "n_blocks",
     .type = PO_COUNT,
     .dim = D_REQ,
     .when = is_block,
     .desc = "blocks"},
    UP_OUT("boundaries", PK_LENGTH, is_block, "block boundaries"),
    UP_OUT("block_vp", PK_VELOCITY, is_block, "vp of each block"),
    UP_OUT("block_vs", PK_VELOCITY, is_block, "vs of each block"),
    UP_OUT("block_rho", PK_DENSITY, is_block, "density of each block"),
    UP_OUT("vp", PK_VELOCITY, is_block, "blocked vp at the samples"),
    UP_OUT("vs", PK_VELOCITY, is_block, "blocked vs at the samples"),
    {.name = "qc",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = S_QC,
     .desc = "QC flags per log sample (always returned)"},
    {0},
};

static const proto_method m_upscale = {
    .name = "seismic.upscale",
    .summary = "Backus average (VTI stiffnesses, Thomsen parameters) or "
               "blocking of a vp, vs, rho log.",
    .description =
        "depth, vp, vs, rho of one log. backus: window, or frequency "
        "with backus_number (Liner & Fei 2006), min_valid. block: "
        "boundaries, or threshold with curve and min_thickness; mean per "
        "curve. See seismic.md.",
    .params = &up_decl,
    .outputs = up_outputs,
    .body = up_body,
    .cost = 4,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- seismic.synthetic -------------------------------------------------- */

/* PP coefficients by the reflect family's names, in the core's order. */
static const char *const pp_names[] = {
    "zoeppritz", "aki_richards", "shuey2",   "shuey3",       "hilterman",
    "fatti",     "gray_lmr",     "gray_kmr", "smith_gidlow", NULL};
enum { NULLS_NULL, NULLS_KEEP };
static const char *const nulls_names[] = {"null", "keep", NULL};
static const char *const conv_names[] = {"auto", "direct", "fft", NULL};

typedef struct axis_args {
	proto_hdr hdr;
	proto_vec t0, dt, n;
} axis_args;

static const proto_field axis_fields[] = {
    {PROTO_NUMS(axis_args, t0, PK_TIME, PF_SCALAR,
                "time of the first trace sample (default: where the "
                "wavelet first reaches the log's top, a multiple of dt)")},
    {PROTO_NUMS(axis_args, dt, PK_TIME,
                PF_SCALAR | PF_DFLT | PF_LO | PF_LO_OPEN,
                "trace sample interval (default 2 ms)"),
     .dflt = 0.002, .lo = 0},
    {PROTO_NUMS(axis_args, n, PK_NONE, PF_SCALAR | PF_INT | PF_LO | PF_HI,
                "trace samples (default: until the wavelet leaves the "
                "log's base)"),
     .lo = 1, .hi = 1e8},
    {0},
};

static const proto_decl axis_decl = {
    .name = "seismicAxis",
    .fields = axis_fields,
    .size = sizeof(axis_args),
    .desc = "the regular time axis of the traces",
};

typedef struct synth_wavelet {
	proto_hdr hdr;
	wav_spec w;
} synth_wavelet;

WAV_NAMES(sw, NULL)

static const proto_field synth_wavelet_fields[] = {
    WAV_FIELDS(synth_wavelet, w),
    {0},
};

static const proto_rule synth_wavelet_rules[] = {WAV_RULES(sw), PR_LAST};

static const proto_decl synth_wavelet_decl = {
    .name = "seismicWavelet",
    .fields = synth_wavelet_fields,
    .rules = synth_wavelet_rules,
    .size = sizeof(synth_wavelet),
    .desc = "the wavelet, at the trace interval (as seismic.wavelet, "
            "without dt)",
};

typedef struct synth_args {
	proto_hdr hdr;
	proto_vec depth, vp, dtp, vs, dts, rho, twt;
	datum_args datum;
	cs_args checkshots;
	synth_wavelet wavelet;
	proto_vec angle;
	int method, nulls, convolution, stretch;
	axis_args axis;
} synth_args;

static const proto_field synth_fields[] = {
    {PROTO_NUMS(synth_args, depth, PK_LENGTH, PF_REQ | PF_ARRAY,
                "log depths, strictly increasing")},
    {PROTO_NUMS(synth_args, vp, PK_VELOCITY, PF_NULLS,
                "P velocity (give vp or dtp)")},
    {PROTO_NUMS(synth_args, dtp, PK_SLOWNESS, PF_NULLS,
                "compressional slowness (give vp or dtp)")},
    {PROTO_NUMS(synth_args, vs, PK_VELOCITY, PF_NULLS,
                "S velocity (or dts); needed above normal incidence and "
                "by the Gray forms")},
    {PROTO_NUMS(synth_args, dts, PK_SLOWNESS, PF_NULLS,
                "shear slowness (or vs)")},
    {PROTO_NUMS(synth_args, rho, PK_DENSITY, PF_REQ | PF_NULLS, "density")},
    {PROTO_NUMS(synth_args, twt, PK_TIME, PF_ARRAY,
                "two-way time of each sample (e.g. seismic.timedepth's "
                "twt), strictly increasing; default: from the sonic, "
                "datum and checkshots")},
    {PROTO_FIELD(synth_args, datum, PT_OBJ, 0,
                 "where the time starts (without twt)"),
     .sub = &datum_decl},
    {PROTO_FIELD(synth_args, checkshots, PT_OBJ, 0,
                 "checkshots correcting the sonic drift (without twt)"),
     .sub = &cs_decl},
    {PROTO_FIELD(synth_args, wavelet, PT_OBJ, PF_REQ, "the wavelet"),
     .sub = &synth_wavelet_decl},
    {.name = "angle",
     .type = PT_NUMS,
     .kind = PK_ANGLE,
     .flags = PF_DFLT | PF_LO | PF_HI | PF_HI_OPEN,
     .group = 1,
     .offset = offsetof(synth_args, angle),
     .lo = 0,
     .hi = M_PI / 2,
     .desc = "incidence angles of the gather, 0 to below 90 deg (84 with "
             "stretch; default 0), each taken at every interface"},
    {.name = "method",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(synth_args, method),
     .choices = pp_names,
     .dflt_choice = RW_SEIS_R_ZOEPPRITZ,
     .desc = "PP coefficient: zoeppritz (exact) or a linearisation of "
             "the reflect family"},
    {.name = "nulls",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(synth_args, nulls),
     .choices = nulls_names,
     .dflt_choice = NULLS_NULL,
     .desc = "trace samples within the wavelet's reach of a null "
             "interface: null (default) or keep (flagged)"},
    {.name = "convolution",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(synth_args, convolution),
     .choices = conv_names,
     .dflt_choice = RW_SEIS_CONV_AUTO,
     .desc = "auto (the cheaper by operation count), direct or fft"},
    {.name = "stretch",
     .type = PT_BOOL,
     .flags = PF_DFLT,
     .offset = offsetof(synth_args, stretch),
     .dflt_choice = 0,
     .desc = "stretch each angle's wavelet by 1 / cos(angle), as NMO "
             "correction does (default false: the same wavelet at every "
             "angle)"},
    {PROTO_FIELD(synth_args, axis, PT_OBJ, 0, "the traces' time axis"),
     .sub = &axis_decl},
    {0},
};

static const char *const shear_pair[] = {"vs", "dts", NULL};
static const char *const td_given[] = {"datum", "checkshots", NULL};
static const proto_rule synth_rules[] = {
    {PR_EXACTLY, NULL, 1, sonic_pair,
     "give the P sonic as vp (velocity) or dtp (slowness)"},
    {PR_AT_MOST, NULL, 1, shear_pair,
     "give the shear sonic as vs or dts, not both"},
    {PR_FORBIDS, "twt", 0, td_given,
     "twt gives the time-depth relation already: drop datum and "
     "checkshots, or twt"},
    PR_LAST,
};

static const proto_decl synth_decl = {
    .name = "",
    .fields = synth_fields,
    .rules = synth_rules,
    .size = sizeof(synth_args),
};

/* One angle's trace: the chunks of the gather. */
typedef struct synth_job {
	const rw_seis_log *log;
	const rw_seis_td *td;
	const double *theta;
	const rw_seis_wavelet *wav;
	const rw_seis_taxis *ax;
	rw_seis_synth_opts opts;
	double *traces, *refl;
	unsigned *warn;
	int *status;
} synth_job;

/* Runs angle a on its own (the same work whatever thread runs it, so the
 * gather does not depend on the thread count). */
static void synth_chunk(void *arg, size_t a)
{
	synth_job *j = arg;
	size_t nt = j->ax->n;
	size_t wl = rw_seis_synthetic_workspace(nt, j->wav->n, j->theta[a],
	                                        j->opts.stretch);
	double *work = wl ? malloc(wl * sizeof *work) : NULL;

	if (!work) {
		j->status[a] = RW_ERANGE;
		return;
	}
	j->status[a] = rw_seis_synthetic(
	    j->log, j->td, &j->theta[a], 1, j->wav, j->ax, &j->opts,
	    j->traces + a * nt, j->refl + a * nt, j->warn + a * nt, work, wl);
	free(work);
}

static uint64_t synth_qc(unsigned w)
{
	return (w & RW_SEIS_WARN_NULL_NEAR ? QC_SEIS_NULL_NEAR : 0) |
	       (w & RW_SEIS_WARN_POSTCRITICAL ? QC_REFL_POSTCRITICAL : 0) |
	       (w & RW_SEIS_WARN_OUTSIDE_LOG ? QC_SEIS_OUTSIDE : 0);
}

/* Writes a [angle][t] grid of doubles (the angle level only when the
 * angles were an array). */
static void w_grid(proto_call *c, const char *key, const double *x, size_t na,
                   size_t nt, int arr)
{
	if (!arr) {
		w_array(c, key, PK_NONE, x, nt);
		return;
	}
	proto_w_arr_begin(c, key);
	for (size_t a = 0; a < na; a++)
		w_array(c, NULL, PK_NONE, x + a * nt, nt);
	proto_w_arr_end(c);
}

static int synth_body(proto_call *c, void *args)
{
	synth_args *a = args;
	size_t n = a->depth.n, na = a->angle.n, nt;
	double *z = expand(c, &a->depth, n);
	double *vp = velocities(c, &a->vp, &a->dtp, n), *vs, *rho;
	double *theta = expand(c, &a->angle, na);
	double max_th = 0, reach_pre, reach_post, t_top, t_bot, *tw;
	int need_vs =
	    a->method == RW_SEIS_R_GRAY_LMR || a->method == RW_SEIS_R_GRAY_KMR;
	rw_seis_log log;
	rw_seis_taxis ax;
	rw_seis_wavelet wv;
	synth_job job;
	wav_out wo;
	td_state s;
	const rw_seis_td *td;
	rw_seis_td td_given_rel;
	double *traces, *refl, *depth_t, *t;
	unsigned *warn, *dw;
	uint64_t *qc;
	int *status;
	double work;

	if (!z || !vp || !theta)
		return oom(c);
	if (n < 2)
		return proto_fail(c, PROTO_INVALID_PARAMS, "depth",
		                  "a synthetic needs a log of at least 2 "
		                  "samples (one interface)");
	if (check_increasing(c, "depth", z, n, PK_LENGTH, "log depths"))
		return -1;
	for (size_t k = 0; k < na; k++) {
		if (theta[k] > max_th)
			max_th = theta[k];
		if (theta[k] > 0)
			need_vs = 1;
		if (a->stretch && theta[k] > STRETCH_MAX)
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, "angle",
			    "element %zu (%g %s) is above 84 deg: the wavelet "
			    "stretch 1 / cos(angle) would exceed 10",
			    k, shown(c, PK_ANGLE, theta[k]),
			    uname(c, PK_ANGLE));
	}
	if (need_vs && !a->vs.present && !a->dts.present)
		return proto_fail(c, PROTO_INVALID_PARAMS, "vs",
		                  "is needed above normal incidence and by the "
		                  "Gray forms: give vs or dts");
	vs = a->vs.present || a->dts.present ? velocities(c, &a->vs, &a->dts, n)
	                                     : proto_alloc_doubles(c, n);
	rho = expand(c, &a->rho, n);
	if (!vs || !rho)
		return oom(c);
	if (!a->vs.present && !a->dts.present)
		for (size_t i = 0; i < n; i++)
			vs[i] = NAN; /* not read at normal incidence */
	else if (a->vs.present)
		/* as given: vs = 0 is a fluid layer (velocities() would null
		 * it), a negative vs the core's medium check refuses */
		for (size_t i = 0; i < n; i++)
			vs[i] = proto_at(&a->vs, i);
	/* the time-depth relation */
	if (a->twt.present) {
		tw = expand(c, &a->twt, n);
		if (!tw)
			return oom(c);
		if (check_increasing(c, "twt", tw, n, PK_TIME,
		                     "times down the log"))
			return -1;
		memset(&td_given_rel, 0, sizeof td_given_rel);
		td_given_rel.z_m = z;
		td_given_rel.twt_s = tw;
		td_given_rel.n = n;
		td_given_rel.datum_z_m = z[0];
		td_given_rel.datum_twt_s = tw[0];
		td = &td_given_rel;
		memset(&s, 0, sizeof s);
		s.twt = tw;
	} else {
		if (td_build(c, z, n, &a->vp, &a->dtp, &a->datum,
		             &a->checkshots, &s))
			return -1;
		td = &s.td;
		td_warn(c, &s);
	}
	/* the wavelet and the axis */
	if (wav_build(c, &a->wavelet.w, "wavelet.",
	              value_or(&a->axis.dt, 0.002), "axis.dt", &wo))
		return -1;
	ax.dt_s = value_or(&a->axis.dt, 0.002);
	t_top = s.twt[0];
	t_bot = s.twt[n - 1];
	{
		double f = a->stretch ? 1.0 / cos(max_th) : 1.0;
		reach_pre = (double)(wo.n - 1 - wo.i0) * ax.dt_s * f;
		reach_post = (double)wo.i0 * ax.dt_s * f;
	}
	ax.t0_s = a->axis.t0.present
	              ? a->axis.t0.v[0]
	              : floor((t_top - reach_post) / ax.dt_s + 1e-9) * ax.dt_s;
	if (a->axis.n.present) {
		ax.n = (size_t)a->axis.n.v[0];
	} else {
		double m = ceil((t_bot + reach_pre - ax.t0_s) / ax.dt_s - 1e-9);
		if (!(m >= 0) || m >= 1e8)
			return proto_fail(c, PROTO_INVALID_PARAMS, "axis.t0",
			                  "leaves no trace over the log: give "
			                  "axis.n");
		ax.n = (size_t)m + 1;
	}
	nt = ax.n;
	if (!rw_seis_synthetic_workspace(nt, wo.n, max_th, a->stretch))
		return proto_fail(
		    c, PROTO_INVALID_PARAMS,
		    a->wavelet.w.kind == WK_SAMPLES ? "wavelet.samples"
		                                    : "wavelet.length",
		    "the wavelet (%zu samples%s) is too long for a trace: with "
		    "its reach on both sides it must stay within %u samples",
		    wo.n, a->stretch ? ", stretched at the largest angle" : "",
		    RW_SEIS_MAX_WAVELET);
	/* the work: coefficients, then convolutions of the wavelet */
	work = (double)na * ((double)n + (double)nt * (double)wo.n);
	if (proto_check_size(c, n,
	                     work > (double)SIZE_MAX / 2 ? SIZE_MAX / 2
	                                                 : (size_t)work))
		return -1;
	if ((double)na * (double)nt > 1e9)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, "angle",
		                  "%zu angles x %zu samples: too many trace "
		                  "samples for one answer; split the request",
		                  na, nt);
	traces = proto_alloc_doubles(c, na * nt);
	refl = proto_alloc_doubles(c, na * nt);
	warn = proto_alloc(c, na * nt * sizeof *warn);
	qc = proto_alloc(c, na * nt * sizeof *qc);
	status = proto_alloc(c, na * sizeof *status);
	depth_t = proto_alloc_doubles(c, nt);
	t = proto_alloc_doubles(c, nt);
	dw = proto_alloc(c, nt * sizeof *dw);
	if (!traces || !refl || !warn || !qc || !status || !depth_t || !t ||
	    !dw)
		return oom(c);
	log.z_m = z;
	log.vp_ms = vp;
	log.vs_ms = vs;
	log.rho_kgm3 = rho;
	log.n = n;
	wv.w = wo.w;
	wv.n = wo.n;
	wv.i0 = wo.i0;
	wv.dt_s = ax.dt_s;
	job.log = &log;
	job.td = td;
	job.theta = theta;
	job.wav = &wv;
	job.ax = &ax;
	job.opts.method = (rw_seis_rmethod)a->method;
	job.opts.stretch = a->stretch;
	job.opts.keep_partial = a->nulls == NULLS_KEEP;
	job.opts.conv = (rw_seis_conv)a->convolution;
	job.traces = traces;
	job.refl = refl;
	job.warn = warn;
	job.status = status;
	/* one angle per chunk: on the worker threads for big gathers */
	if (na > 1 && work > 2e5)
		proto__parallel(c->ctx, na, synth_chunk, &job);
	else
		for (size_t k = 0; k < na; k++)
			synth_chunk(&job, k);
	for (size_t k = 0; k < na; k++) {
		if (status[k] == RW_ERANGE)
			return proto_fail(c, PROTO_INTERNAL_ERROR, NULL,
			                  "out of memory for the trace at "
			                  "angle %zu",
			                  k);
		if (status[k] != RW_OK)
			return proto_fail(c, PROTO_INVALID_PARAMS, "depth",
			                  "the log and its time-depth relation "
			                  "give no trace (status %d)",
			                  status[k]);
	}
	for (size_t k = 0; k < na * nt; k++)
		qc[k] = synth_qc(warn[k]);
	for (size_t k = 0; k < nt; k++)
		t[k] = ax.t0_s + (double)k * ax.dt_s;
	if (rw_seis_resample(s.twt, z, n, &ax, RW_SEIS_INTERP_LINEAR, depth_t,
	                     dw) != RW_OK)
		return oom(c);
	proto_w_obj_begin(c, NULL);
	proto_w_int(c, "n_angles", (long long)na);
	proto_w_int(c, "n_samples", (long long)nt);
	proto_w_num(c, "t0", PK_TIME, ax.t0_s);
	proto_w_num(c, "dt", PK_TIME, ax.dt_s);
	proto_w_vec(c, "angle", PK_ANGLE, theta, na, 1, a->angle.is_array);
	w_array(c, "time", PK_TIME, t, nt);
	w_array(c, "depth", PK_LENGTH, depth_t, nt);
	w_grid(c, "traces", traces, na, nt, a->angle.is_array);
	w_grid(c, "reflectivity", refl, na, nt, a->angle.is_array);
	if (a->angle.is_array) {
		proto_w_arr_begin(c, "qc");
		for (size_t k = 0; k < na; k++)
			w_flags(c, NULL, qc + k * nt, nt, 1);
		proto_w_arr_end(c);
	} else {
		w_flags(c, "qc", qc, nt, 1);
	}
	proto__write_tail(c);
	return 0;
}

static const proto_output synth_outputs[] = {
    {.name = "n_angles", .type = PO_COUNT, .dim = D_REQ, .desc = "angles"},
    {.name = "n_samples",
     .type = PO_COUNT,
     .dim = D_REQ,
     .offset = 1,
     .desc = "samples per trace"},
    OUT_REQ("t0", PO_NUM, PK_TIME, "time of the first trace sample"),
    OUT_REQ("dt", PO_NUM, PK_TIME, "trace sample interval"),
    {.name = "angle",
     .type = PO_CUSTOM,
     .kind = PK_ANGLE,
     .dim = D_REQ,
     .schema = S_NUMS,
     .desc = "the angles"},
    OUT("time", PK_TIME, S_NUMS, "time of each trace sample"),
    OUT("depth", PK_LENGTH, S_NUMS,
        "depth at each trace time from the time-depth relation (null "
        "outside the log)"),
    OUT("traces", PK_NONE, S_GRID,
        "the synthetic traces, [angle][time] (only [time] for one "
        "angle given as a number)"),
    OUT("reflectivity", PK_NONE, S_GRID,
        "the reflectivity on the axis (real part), shaped as traces"),
    {.name = "qc",
     .type = PO_CUSTOM,
     .dim = D_REQ,
     .schema = S_QCGRID,
     .desc = "QC flags per trace sample, shaped as traces"},
    {0},
};

static const proto_method m_synthetic = {
    .name = "seismic.synthetic",
    .summary = "Synthetic traces of a log: reflectivity in time convolved "
               "with a wavelet, at normal incidence or as an angle "
               "gather.",
    .description =
        "depth, vp or dtp, vs or dts, rho of one log; twt, or datum and "
        "checkshots; wavelet; angle; method; stretch; nulls; axis (t0, "
        "dt, n); convolution. Primaries only: no transmission loss, "
        "multiples, spreading or attenuation; constant-angle gathers. "
        "See seismic.md.",
    .params = &synth_decl,
    .outputs = synth_outputs,
    .body = synth_body,
    /* rw_proto_cost sees log samples x angles (the angle field is group
     * 1); per such pair a trace costs one coefficient plus about nt nw /
     * n multiply-adds: 10 for a 0.5 m log at 2 ms with the default
     * 128 ms wavelet (nt ~ n / 6, nw = 65), so 16 in all. The limits
     * check (proto_check_size) counts angles x (n + nt nw) exactly. */
    .cost = 16,
    .flags = PM_NO_UNCERTAINTY,
};

/* ---- seismic.avo_fit ---------------------------------------------------- */

/* Amplitudes [angle][time] as one flat array. */
typedef struct amp_grid {
	size_t na, nt;
	double *v;
	int nested;
} amp_grid;

static int amp_number(const cJSON *e, double *x)
{
	if (cJSON_IsNull(e))
		*x = NAN;
	else if (cJSON_IsNumber(e) && isfinite(e->valuedouble))
		*x = e->valuedouble;
	else
		return -1;
	return 0;
}

static int amp_parse(proto_call *c, const cJSON *v, const char *path, void *dst)
{
	amp_grid *g = dst;
	const cJSON *row, *e, *first;
	proto_arr_iter it, jt;
	size_t a = 0;

	if (!cJSON_IsArray(v) || !proto__arr_size(v))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be an array over the angles: of arrays "
		                  "over time ([angle][time], as "
		                  "seismic.synthetic's traces) or of numbers");
	g->na = proto__arr_size(v);
	first = proto__arr_first(&it, v);
	g->nested = cJSON_IsArray(first);
	g->nt = g->nested ? proto__arr_size(first) : 1;
	if (g->nt == 0)
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "element 0 is an empty array");
	if (g->nt > ((size_t)-1) / sizeof(double) / g->na)
		return proto_fail(c, PROTO_LIMIT_EXCEEDED, path, "too large");
	g->v = proto_alloc_doubles(c, g->na * g->nt);
	if (!g->v)
		return oom(c);
	PROTO_ARR_FOREACH(row, it, v)
	{
		size_t k = 0;
		if (!g->nested) {
			if (amp_number(row, &g->v[a]))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, path,
				    "element %zu must be a number or "
				    "null (or every element an array)",
				    a);
			a++;
			continue;
		}
		if (!cJSON_IsArray(row) || proto__arr_size(row) != g->nt)
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "element %zu must be an array of %zu "
			                  "amplitudes like element 0",
			                  a, g->nt);
		PROTO_ARR_FOREACH(e, jt, row)
		{
			if (amp_number(e, &g->v[a * g->nt + k]))
				return proto_fail(
				    c, PROTO_INVALID_PARAMS, path,
				    "element [%zu][%zu] must be a "
				    "number or null",
				    a, k);
			k++;
		}
		a++;
	}
	if (proto_join(c, 1, g->na, 1, path) ||
	    proto_join(c, 0, g->nt, g->nested, path))
		return -1;
	return 0;
}

static const proto_custom amp_custom = {
    .parse = amp_parse,
    .schema = "{\"type\": \"array\", \"minItems\": 1, \"items\": "
              "{\"oneOf\": [{\"type\": [\"number\", \"null\"]}, {\"type\": "
              "\"array\", \"minItems\": 1, \"items\": {\"type\": "
              "[\"number\", \"null\"]}}]}, \"description\": \"amplitudes "
              "[angle][time] (or [angle] for one time sample); null where "
              "missing\"}",
};

enum { AVO_SHUEY2, AVO_SHUEY3 };
static const char *const avo_names[] = {"shuey2", "shuey3", NULL};

typedef struct avo_args {
	proto_hdr hdr;
	proto_vec angle;
	amp_grid amplitude;
	int model;
	proto_vec angle_min, angle_max;
} avo_args;

static const proto_field avo_fields[] = {
    {.name = "angle",
     .type = PT_NUMS,
     .kind = PK_ANGLE,
     .flags = PF_REQ | PF_ARRAY | PF_LO | PF_HI | PF_HI_OPEN,
     .group = 1,
     .offset = offsetof(avo_args, angle),
     .lo = 0,
     .hi = M_PI / 2,
     .desc = "the gather's angles, 0 to below 90 deg"},
    {.name = "amplitude",
     .type = PT_CUSTOM,
     .flags = PF_REQ,
     .offset = offsetof(avo_args, amplitude),
     .custom = &amp_custom,
     .desc = "amplitudes [angle][time]"},
    {.name = "model",
     .type = PT_ENUM,
     .flags = PF_DFLT,
     .offset = offsetof(avo_args, model),
     .choices = avo_names,
     .dflt_choice = AVO_SHUEY2,
     .desc = "shuey2 (A + B sin^2) or shuey3 (+ C (tan^2 - sin^2)); "
             "Shuey 1985"},
    {PROTO_NUMS(avo_args, angle_min, PK_ANGLE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_HI | PF_HI_OPEN,
                "smallest angle used (default 0)"),
     .dflt = 0, .lo = 0, .hi = M_PI / 2},
    {PROTO_NUMS(avo_args, angle_max, PK_ANGLE,
                PF_SCALAR | PF_DFLT | PF_LO | PF_HI | PF_HI_OPEN,
                "largest angle used (default 30 deg, where the two-term "
                "form holds; common practice)"),
     .dflt = 30 * DEG, .lo = 0, .hi = M_PI / 2},
    {0},
};

static const proto_decl avo_decl = {
    .name = "",
    .fields = avo_fields,
    .size = sizeof(avo_args),
};

static int avo_prepare(proto_call *c, void *args, proto_shape *sh)
{
	avo_args *a = args;
	double lo = a->angle_min.v[0], hi = a->angle_max.v[0];
	int p = a->model == AVO_SHUEY3 ? 3 : 2;
	size_t used = 0;

	(void)sh;
	if (lo > hi)
		return proto_fail(c, PROTO_INVALID_PARAMS, "angle_min",
		                  "%g %s is above angle_max (%g %s)",
		                  shown(c, PK_ANGLE, lo), uname(c, PK_ANGLE),
		                  shown(c, PK_ANGLE, hi), uname(c, PK_ANGLE));
	for (size_t k = 0; k < a->angle.n; k++)
		used += a->angle.v[k] >= lo && a->angle.v[k] <= hi;
	if (used < (size_t)p)
		return proto_fail(
		    c, PROTO_INVALID_PARAMS, "angle_max",
		    "only %zu of the %zu angles lie in [angle_min, "
		    "angle_max] = [%g, %g] %s: the %s fit needs at "
		    "least %d",
		    used, a->angle.n, shown(c, PK_ANGLE, lo),
		    shown(c, PK_ANGLE, hi), uname(c, PK_ANGLE),
		    avo_names[a->model], p);
	return 0;
}

typedef struct avo_ws {
	rw_seis_avo_fitter *f;
} avo_ws;

static int avo_ws_init(const void *args, void *ws)
{
	const avo_args *a = args;
	avo_ws *w = ws;
	w->f = rw_seis_avo_fitter_new(a->angle.n < 2 ? 2 : a->angle.n);
	return w->f ? 0 : -1;
}

static void avo_ws_free(void *ws)
{
	rw_seis_avo_fitter_free(((avo_ws *)ws)->f);
}

typedef struct avo_row {
	double a, b, cc, se[3], cov_ab, cov_ac, cov_bc, sigma, rms, n_used,
	    rcond;
	uint64_t qc;
} avo_row;

static int avo_kernel(const void *args, size_t i, void *row, uint64_t *qc,
                      void *ws)
{
	const avo_args *a = args;
	const amp_grid *g = &a->amplitude;
	avo_row *r = row;
	rw_seis_avo_result res;
	unsigned warn = 0;
	int three = a->model == AVO_SHUEY3, st;

	st = rw_seis_avo_fit(((avo_ws *)ws)->f, a->angle.v, g->v + i, g->na,
	                     g->nt, three ? RW_SEIS_AVO_THREE : RW_SEIS_AVO_TWO,
	                     a->angle_min.v[0], a->angle_max.v[0], &res, &warn);
	if (warn & RW_SEIS_WARN_AVO_PARTIAL)
		*qc |= QC_LOG_MISSING;
	if (warn & (RW_SEIS_WARN_AVO_NO_DOF | RW_SEIS_WARN_AVO_ILL_COND))
		*qc |= QC_SEIS_FIT;
	if (st != RW_OK) {
		/* too few usable angles (nulls) or coinciding ones */
		*qc |= QC_SEIS_FIT;
		for (size_t k = 0; k < g->na; k++)
			if (isnan(g->v[k * g->nt + i]))
				*qc |= QC_LOG_MISSING;
		return 0;
	}
	r->a = res.a;
	r->b = res.b;
	r->cc = three ? res.c : NAN;
	for (int k = 0; k < 3; k++)
		r->se[k] = k < 2 || three ? sqrt(res.cov[k][k]) : NAN;
	r->cov_ab = res.cov[0][1];
	r->cov_ac = three ? res.cov[0][2] : NAN;
	r->cov_bc = three ? res.cov[1][2] : NAN;
	r->sigma = res.sigma;
	r->rms = res.rms;
	r->n_used = (double)res.m;
	r->rcond = res.rcond;
	return 0;
}

static int is_three(const void *a)
{
	return ((const avo_args *)a)->model == AVO_SHUEY3;
}

#define AVO_OUT(nm, member, w, text)                                           \
	{                                                                      \
		.name = nm, .type = PO_NUM,                                    \
		.offset = offsetof(avo_row, member), .when = w, .desc = text   \
	}
static const proto_output avo_outputs[] = {
    {.name = "n", .type = PO_COUNT, .dim = D_REQ, .desc = "time samples"},
    {.name = "model",
     .type = PO_ENUM,
     .dim = D_REQ,
     .offset = offsetof(avo_args, model),
     .choices = avo_names,
     .desc = "the model fitted"},
    AVO_OUT("intercept", a, NULL, "intercept A"),
    AVO_OUT("gradient", b, NULL, "gradient B"),
    AVO_OUT("curvature", cc, is_three, "curvature C (shuey3)"),
    AVO_OUT("intercept_error", se[0], NULL,
            "standard error of A, sqrt of its variance (null with no "
            "residual degree of freedom)"),
    AVO_OUT("gradient_error", se[1], NULL, "standard error of B"),
    AVO_OUT("curvature_error", se[2], is_three, "standard error of C"),
    AVO_OUT("cov_ab", cov_ab, NULL, "covariance of A and B"),
    AVO_OUT("cov_ac", cov_ac, is_three, "covariance of A and C"),
    AVO_OUT("cov_bc", cov_bc, is_three, "covariance of B and C"),
    AVO_OUT("sigma", sigma, NULL,
            "residual standard error sqrt(RSS / (m - p))"),
    AVO_OUT("rms", rms, NULL, "root-mean-square residual sqrt(RSS / m)"),
    AVO_OUT("n_used", n_used, NULL, "angles used in the fit"),
    AVO_OUT("rcond", rcond, NULL,
            "reciprocal condition number of the (balanced) design"),
    {.name = "qc",
     .type = PO_FLAGS,
     .offset = offsetof(avo_row, qc),
     .desc = "QC flags per time sample"},
    {0},
};

static const proto_method m_avo_fit = {
    .name = "seismic.avo_fit",
    .summary = "Least-squares AVO intercept, gradient (and curvature) per "
               "time sample of a gather, with their uncertainty.",
    .description =
        "angle and amplitude [angle][time] (seismic.synthetic's traces "
        "fit as they are); model shuey2 or shuey3; angle_min, angle_max. "
        "Ordinary least squares (GSL); covariance sigma^2 (X^T X)^-1. "
        "See seismic.md.",
    .params = &avo_decl,
    .outputs = avo_outputs,
    .prepare = avo_prepare,
    .kernel = avo_kernel,
    .row_size = sizeof(avo_row),
    .qc_offset = offsetof(avo_row, qc),
    .ws_size = sizeof(avo_ws),
    .ws_init = avo_ws_init,
    .ws_free = avo_ws_free,
    .cost = 2,
    .flags = PM_NO_UNCERTAINTY,
};

const proto_method *const proto_seismic_methods[] = {
    &m_timedepth, &m_upscale, &m_wavelet, &m_synthetic, &m_avo_fit, NULL};
