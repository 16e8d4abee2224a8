/* Internals shared by the protocol-layer files: the method table entry,
 * the call a handler receives, parameter specs and numeric vectors, units,
 * QC flags, and the result writer. A method family file (elastic.c,
 * fluid.c, ...) includes only this header and the core's public headers.
 * DEVELOPERS.md ("Adding a method") walks through its use. */
#ifndef RW_PROTO_INTERNAL_H
#define RW_PROTO_INTERNAL_H

#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cjson/cJSON.h>

#include "proto/proto.h"

/* ---- units -------------------------------------------------------------- */
/* Quantity kinds. Internal (canonical) units are those the core expects:
 * m/s, s/m, kg/m^3, Pa, MPa (pressure), degC, m, kg/(m^2 s), weight
 * fraction (salinity), L/L (gas-oil ratio), radian. */
typedef enum proto_kind {
	PK_NONE = 0, /* dimensionless: fractions, ratios, counts */
	PK_VELOCITY,
	PK_SLOWNESS,
	PK_DENSITY,
	PK_MODULUS,
	PK_PRESSURE,
	PK_TEMPERATURE,
	PK_LENGTH,
	PK_IMPEDANCE,
	PK_SALINITY,
	PK_GOR,
	PK_ANGLE,
	PK_GRADIENT_P, /* pressure per length (MPa/m internally) */
	PK_GRADIENT_T, /* temperature per length (degC/m internally) */
	PK_COUNT
} proto_kind;

/* Selected unit index per kind (index into that kind's unit list). */
typedef struct proto_units {
	unsigned char sel[PK_COUNT];
} proto_units;

/* Name of a kind as used in `units` objects ("velocity", ...). */
const char *proto_kind_name(proto_kind k);
/* Name of the selected unit of kind k ("m/s", ...). */
const char *proto_unit_name(const proto_units *u, proto_kind k);
/* Converts a value of kind k in the selected unit to internal units and
 * back. */
double proto_to_internal(const proto_units *u, proto_kind k, double v);
double proto_from_internal(const proto_units *u, proto_kind k, double v);
/* Sets u to the documented defaults. */
void proto_units_default(proto_units *u);
/* Lists the accepted unit names of kind k as "a, b, c" into buf. */
void proto_units_list(proto_kind k, char *buf, size_t size);
/* Writes the defaults and accepted units as a JSON object (service.info). */
struct proto_call;
void proto_units_describe(struct proto_call *c);

/* ---- QC flags ----------------------------------------------------------- */
/* One legend for all methods (protocol-docs/qc-flags.md). Bits are grouped:
 * 0-7 general and elastic, 8-15 fluids and rocks, 16-23 reflectivity,
 * 24-31 well logs. The classes say how serious a flag is. */
typedef enum proto_qc_class {
	QC_IMPOSSIBLE,  /* physically impossible: outputs are null */
	QC_IMPLAUSIBLE, /* possible, but implausible for sedimentary rock */
	QC_PREDICTED,   /* a value was predicted, not measured */
	QC_RANGE,       /* an input is outside a correlation's fitted range */
	QC_INPUT        /* a note on the input: missing, corrected, ... */
} proto_qc_class;

typedef struct proto_qc_info {
	uint32_t bit;
	const char *name;
	proto_qc_class cls;
	const char *meaning;
} proto_qc_info;

#define QC_INPUT_INVALID    (1u << 0) /* non-finite / null / negative */
#define QC_RHO_NONPOSITIVE  (1u << 1)
#define QC_NU_IMPOSSIBLE    (1u << 2) /* nu outside [-1, 0.5) */
#define QC_MODULUS_NEGATIVE (1u << 3) /* K < 0 or mu <= 0 */
#define QC_NU_NEGATIVE      (1u << 4) /* implausible: nu < 0 */
#define QC_RHO_RANGE        (1u << 5) /* implausible density */
#define QC_VP_RANGE         (1u << 6) /* implausible vp */
#define QC_VS_RANGE         (1u << 7) /* implausible vs */
/* Fluids and Gassmann (8-15), fluid.c and rock.c. */
#define QC_FLUID_CALIBRATION (1u << 8)  /* fluid input outside B&W fit */
#define QC_FLUID_GOR_EXCESS  (1u << 9)  /* GOR above what oil dissolves */
#define QC_FLUID_BOILING     (1u << 10) /* p below water's boiling p */
#define QC_FLUID_FAILED      (1u << 11) /* correlation unphysical: null */
#define QC_GASSMANN_KDRY     (1u << 12) /* K_dry < 0 or > K_min: null */
#define QC_GASSMANN_PHI_LOW  (1u << 13) /* porosity < 0.05: ill-posed */
/* Reflectivity (16-23), reflect.c and thomsen.c. */
#define QC_REFL_MEDIUM       (1u << 16) /* impossible medium: null */
#define QC_REFL_POSTCRITICAL (1u << 17) /* at/past P critical angle */
#define QC_REFL_UNDEFINED    (1u << 18) /* an approximation has no value */
#define QC_REFL_NO_CRIT_P    (1u << 19) /* no P critical angle: null */
#define QC_REFL_NO_CRIT_S    (1u << 20) /* no S critical angle: null */
#define QC_ANISO_UNSTABLE    (1u << 22) /* VTI medium not stable: null */
/* Well logs (log.process, rock.empirical), bits 24-31. */
#define QC_DRHO_HIGH     (1u << 24) /* |drho| above drho_limit */
#define QC_WASHOUT       (1u << 25) /* caliper - bit size > washout_limit */
#define QC_VS_PREDICTED  (1u << 26) /* vs predicted, not measured */
#define QC_RHO_PREDICTED (1u << 27) /* density predicted, not measured */
#define QC_LOG_MISSING   (1u << 28) /* an input curve is null here */
#define QC_EMP_RANGE     (1u << 29) /* empirical relation extrapolated */
#define QC_SUBST_FAILED  (1u << 30) /* substituted outputs null */
#define QC_SUBST_CAUTION (1u << 31) /* Gassmann or fluid-range caution */

/* Plausibility ranges for sedimentary rock (internal units), shared by
 * the elastic and log families; overridable per request (`qc` object). */
typedef struct proto_qc_ranges {
	double rho_min, rho_max, vp_min, vp_max, vs_min, vs_max;
	double nu_min, nu_max;
} proto_qc_ranges;
struct rw_elastic;
struct proto_call;
void proto_qc_ranges_default(proto_qc_ranges *r);
/* Overrides r from a `qc` object (may be NULL); `path` like "qc.". */
int proto_qc_ranges_parse(struct proto_call *c, const cJSON *obj,
                          const char *path, proto_qc_ranges *r);
/* QC bits for a sample the core called impossible (RW_ELASTIC_BAD_*). */
uint32_t proto_qc_impossible(unsigned why);
/* QC bits for a possible sample outside the plausibility ranges. */
uint32_t proto_qc_plausible(const proto_qc_ranges *r,
                            const struct rw_elastic *e);

/* The legend, terminated by an entry with name NULL. */
extern const proto_qc_info proto_qc_legend[];
const char *proto_qc_class_name(proto_qc_class c);

/* ---- per-call memory ---------------------------------------------------- */
typedef struct proto_arena_block proto_arena_block;

/* ---- parameters --------------------------------------------------------- */
typedef enum proto_ptype {
	PT_NUMS, /* number or array of numbers (broadcast in a group) */
	PT_NUM,  /* a single number */
	PT_INT,  /* a single integer */
	PT_STR,  /* a string */
	PT_BOOL, /* true or false */
	PT_OBJ,  /* an object, parsed by the handler */
	PT_ARR,  /* an array, parsed by the handler */
	PT_ANY   /* any JSON value, checked by the handler */
} proto_ptype;

#define PP_REQUIRED 0x1u /* must be present */
#define PP_NULLS    0x2u /* PT_NUMS: array elements may be null (NaN) */

/* One accepted parameter. `group` separates independent broadcast
 * dimensions: arrays in the same group must have one length; group 0 is
 * the sample dimension, group 1 usually angles. */
typedef struct proto_param {
	const char *name;
	proto_ptype type;
	proto_kind kind;
	unsigned flags;
	int group;
} proto_param;

#define PROTO_MAX_PARAMS 48
#define PROTO_MAX_GROUPS 4

/* A numeric parameter in internal units. n is 1 for a scalar. */
typedef struct proto_vec {
	const double *v;
	size_t n;
	int present, is_array;
} proto_vec;

/* Element i with scalar broadcasting. */
static inline double proto_at(const proto_vec *x, size_t i)
{
	return x->n == 1 ? x->v[0] : x->v[i];
}

/* Parameters of one object checked against a spec. */
typedef struct proto_args {
	const proto_param *spec;
	size_t count;
	const char *path; /* "" for params, "fluid." etc. */
	const cJSON *item[PROTO_MAX_PARAMS];
	proto_vec vec[PROTO_MAX_PARAMS];
	size_t n[PROTO_MAX_GROUPS];      /* broadcast length per group */
	int any_array[PROTO_MAX_GROUPS]; /* an array was given in group */
} proto_args;

/* ---- the call ----------------------------------------------------------- */
typedef struct proto_method proto_method;

typedef struct proto_unit_note {
	const char *path;
	proto_kind kind;
} proto_unit_note;

typedef struct proto_call {
	proto_ctx *ctx;
	proto_session *session;
	const proto_method *method;
	const cJSON *params; /* the params object (NULL when absent) */
	proto_args args;     /* params checked against method->params */
	proto_units units;   /* session units overridden by params */
	proto_buf *out;      /* the result is written here */
	/* result writer state */
	int depth;
	int key_pending;
	const char *pending_key;
	unsigned char need_comma[32];
	const char *keys[32];        /* key of each open object/array */
	uint32_t kinds_used;         /* bit per proto_kind written */
	proto_unit_note *unit_notes; /* field path -> kind, for "units" */
	size_t n_unit_notes, cap_unit_notes;
	/* parameters taken from the session, not the request */
	const char *inherited[PROTO_MAX_PARAMS];
	size_t n_inherited;
	/* error state */
	int err_code;
	char err_param[128];
	char err_reason[512];
	proto_arena_block *arena;
} proto_call;

typedef int (*proto_handler)(proto_call *c);

struct proto_method {
	const char *name;
	proto_handler handler;
	const proto_param *params; /* terminated by {NULL}; an empty list
	                              takes no parameters; NULL means the
	                              handler checks c->params itself */
	const char *summary;
};

/* A connection's session: units and default parameters that later
 * requests on the connection inherit (session.set). */
struct proto_session {
	proto_ctx *ctx;
	proto_units units;
	cJSON *defaults; /* object of parameter defaults, or NULL */
};

/* Builds the parameters a method sees: the request's own, plus session
 * defaults for the method's parameters the request does not give. *merged
 * is params itself when nothing is inherited, else a new object of
 * references that the caller deletes. 0 or -1 after proto_fail. */
int proto__session_merge(proto_call *c, const cJSON *params, cJSON **merged);

/* Each family file defines its table, terminated by {NULL}. */
extern const proto_method proto_session_methods[];
extern const proto_method proto_service_methods[];
extern const proto_method proto_elastic_methods[];
extern const proto_method proto_fluid_methods[];
extern const proto_method proto_mineral_methods[];
extern const proto_method proto_rock_methods[];
extern const proto_method proto_log_methods[];
extern const proto_method proto_rock_empirical_methods[];
extern const proto_method proto_thomsen_methods[];
extern const proto_method proto_reflect_methods[];

/* Looks a method up by name; NULL when unknown. */
const proto_method *proto_method_find(const char *name);
/* Iterates the table: returns the i-th method or NULL past the end. */
const proto_method *proto_method_at(size_t i);

/* Records an error for the call and returns -1, for `return proto_fail()`.
 * `param` names the offending parameter (NULL when none). */
int proto_fail(proto_call *c, int code, const char *param, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

/* Per-call allocation, freed when the call ends. NULL when out of memory
 * (the call then fails with -32603). */
void *proto_alloc(proto_call *c, size_t bytes);
double *proto_alloc_doubles(proto_call *c, size_t n);

/* Checks `obj` (may be NULL when nothing was given) against `spec`:
 * rejects unknown members, wrong types, non-finite numbers, missing
 * required members and mismatched array lengths within a group; converts
 * PT_NUMS/PT_NUM members to internal units with c->units. `path` prefixes
 * member names in errors ("" at the top, "fluid." for a nested object).
 * Returns 0 or -1 after proto_fail. */
int proto_args_parse(proto_call *c, const cJSON *obj, const char *path,
                     const proto_param *spec, proto_args *a);
/* The vector / item of a spec member by name; the name must be in the spec
 * (an internal error otherwise). A missing member gives a vec with
 * present == 0 and n == 0. */
const proto_vec *proto_vec_of(const proto_args *a, const char *name);
const cJSON *proto_item_of(const proto_args *a, const char *name);
/* 1 when a top-level parameter came from the session defaults rather
 * than the request: a method may let an inherited parameter it does not
 * need pass, where the same parameter given in the request is an error. */
int proto_arg_inherited(const proto_call *c, const char *name);
/* Helpers for optional scalars with defaults. */
double proto_num_or(const proto_args *a, const char *name, double dflt);
const char *proto_str_or(const proto_args *a, const char *name,
                         const char *dflt);
int proto_bool_or(const proto_args *a, const char *name, int dflt);
/* Chooses one of `names` (NULL-terminated) for a string member; returns the
 * index, the default index when absent, or -1 after proto_fail listing the
 * accepted values. */
int proto_enum_of(proto_call *c, const proto_args *a, const char *name,
                  const char *const *names, int dflt);
/* Joins an array parameter checked outside proto_args_parse (members of
 * nested lists) into one broadcast length: the first array sets *n and
 * records its path in `from`; a later array of another length fails with
 * -32602 naming both. Scalars and absent vectors are left out. 0 or -1. */
int proto_join_len(proto_call *c, const proto_vec *v, const char *path,
                   size_t *n, int *any_array, char *from, size_t from_size);
/* Checks the request's sample count and work against the limits: samples
 * is the broadcast length, work the samples x other dimensions. */
int proto_check_size(proto_call *c, size_t samples, size_t work);

/* ---- the result writer -------------------------------------------------- */
/* The handler writes one JSON value, normally an object, through these.
 * Keys are written by the *_key variants or proto_w_key. Non-finite
 * numbers are written as null; the caller sets the QC flag that says why.
 * Numbers of kind k are converted from internal units to the call's units
 * and the kind is added to the response's "units" map. */
void proto_w_obj_begin(proto_call *c, const char *key);
void proto_w_obj_end(proto_call *c);
void proto_w_arr_begin(proto_call *c, const char *key);
void proto_w_arr_end(proto_call *c);
void proto_w_key(proto_call *c, const char *key);
void proto_w_num(proto_call *c, const char *key, proto_kind k, double v);
void proto_w_int(proto_call *c, const char *key, long long v);
void proto_w_str(proto_call *c, const char *key, const char *s);
void proto_w_bool(proto_call *c, const char *key, int v);
void proto_w_null(proto_call *c, const char *key);
/* Writes a raw JSON text as a value (must be valid JSON). */
void proto_w_raw(proto_call *c, const char *key, const char *json, size_t n);
/* Writes a cJSON value (small values only; large arrays use proto_w_vec). */
void proto_w_json(proto_call *c, const char *key, const cJSON *v);
/* Writes values[0..n-1] as an array when as_array, else values[0] as a
 * number. `stride` is the distance between elements in doubles (1 for a
 * plain array; more for interleaved double arrays). */
void proto_w_vec(proto_call *c, const char *key, proto_kind k,
                 const double *values, size_t n, size_t stride, int as_array);
/* The same for one double member of an array of n structs: `rows` is the
 * array, row_size its element size, offset the member's offsetof. Reads
 * through the bytes of the array, so no pointer walks past a member. */
void proto_w_rows(proto_call *c, const char *key, proto_kind k,
                  const void *rows, size_t row_size, size_t offset, size_t n,
                  int as_array);
#define PROTO_W_MEMBER(c, key, kind, rows, type, member, n, as_array)          \
	proto_w_rows((c), (key), (kind), (rows), sizeof(type),                 \
	             offsetof(type, member), (n), (as_array))
/* Writes QC flags the same way. */
void proto_w_flags(proto_call *c, const char *key, const uint32_t *flags,
                   size_t n, int as_array);
/* Writes the "units" member: for every field written so far with a
 * dimension, its dotted path ("vp", "fluid_new.k") and unit. Called by
 * the handler as the last member of its result object. */
void proto_w_units(proto_call *c);

/* Formats a double with 15 significant digits (integers exactly);
 * non-finite gives "null". Returns the length (buf >= 32). */
size_t proto_fmt_double(char *buf, double v);

/* ---- context and session internals ------------------------------------- */
const proto_units *proto__session_units(const proto_session *s);
proto_ctx *proto__session_ctx(proto_session *s);
void proto__count_request(proto_ctx *ctx, int notification);
void proto__count_error(proto_ctx *ctx, int code);
/* Writes the counters as members of the current object (service.info). */
void proto__write_counters(proto_call *c);
/* Applies a `units` object onto u (errors name `path`). 0 or -1. */
int proto__units_apply(proto_call *c, const cJSON *obj, const char *path,
                       proto_units *u);
/* Frees the call's arena. */
void proto__arena_free(proto_call *c);
/* Appends s to b as a JSON string. */
void proto__buf_json_string(proto_buf *b, const char *s);

#endif
