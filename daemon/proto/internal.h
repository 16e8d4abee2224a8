/* Internals shared by the protocol-layer files. A method is declared once
 * (proto_method: its parameters as a proto_decl of proto_fields landing in
 * a typed arguments struct, its cross-field rules, its outputs and a
 * per-sample kernel, or a body for methods that are not per sample); the
 * generic driver (driver.c) parses, validates, converts units, broadcasts,
 * runs the kernel and writes the result, and schema.c turns the same
 * declaration into the OpenRPC document and help texts. A method family
 * file (elastic.c, fluid.c, ...) includes only this header and the core's
 * public headers. DEVELOPERS.md ("Adding a method") walks through it. */
#ifndef RW_PROTO_INTERNAL_H
#define RW_PROTO_INTERNAL_H

#include <assert.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cjson/cJSON.h>

#include "proto/proto.h"
#include "proto/qcbits.h"

/* ---- units -------------------------------------------------------------- */
/* Quantity kinds. Internal (canonical) units are those the core expects:
 * m/s, s/m, kg/m^3, Pa, MPa (pressure), degC, m, kg/(m^2 s), weight
 * fraction (salinity), L/L (gas-oil ratio), radian, kg/m^3 (an
 * equivalent mud weight), s, Hz, 1/m, strain as a fraction, Pa kg/m^3
 * (lambda-rho, mu-rho). */
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
	PK_MUD_WEIGHT, /* a pressure as the density of a mud column */
	PK_TIME,
	PK_FREQUENCY,
	PK_INV_LENGTH,
	PK_STRAIN,
	PK_MODULUS_DENSITY, /* lambda-rho, mu-rho */
	PK_COUNT
} proto_kind;

/* Selected unit index per kind (index into that kind's unit list). */
typedef struct proto_units {
	unsigned char sel[PK_COUNT];
} proto_units;

/* Name of a kind as used in `units` objects ("velocity", ...). */
const char *proto_kind_name(proto_kind k);
/* Name of the selected unit of kind k ("m/s", ...); "1" for PK_NONE. */
const char *proto_unit_name(const proto_units *u, proto_kind k);
/* Converts a value of kind k in the selected unit to internal units and
 * back. */
double proto_to_internal(const proto_units *u, proto_kind k, double v);
double proto_from_internal(const proto_units *u, proto_kind k, double v);
/* The next double after a finite y towards +infinity (up) or -infinity:
 * nextafter(y, up ? INFINITY : -INFINITY), without the library call that
 * cost a fifth of a large converted response. */
double proto__units_step(double y, int up);
/* Sets u to the documented defaults. */
void proto_units_default(proto_units *u);
/* Lists the accepted unit names of kind k as "a, b, c" into buf. */
void proto_units_list(proto_kind k, char *buf, size_t size);
/* The units of kind k: count, and the name, alias (NULL when none), scale
 * and offset (internal = v * scale + offset) of unit i. */
size_t proto_units_count(proto_kind k);
const char *proto_units_name_at(proto_kind k, size_t i);
const char *proto_units_alias_at(proto_kind k, size_t i);
void proto_units_factor_at(proto_kind k, size_t i, double *scale,
                           double *offset);

/* ---- QC flags ----------------------------------------------------------- */
typedef enum proto_qc_class {
	QC_IMPOSSIBLE,  /* physically impossible: outputs are null */
	QC_IMPLAUSIBLE, /* possible, but implausible for sedimentary rock */
	QC_PREDICTED,   /* a value was predicted, not measured */
	QC_RANGE,       /* an input is outside a correlation's fitted range */
	QC_INPUT        /* a note on the input: missing, corrected, ... */
} proto_qc_class;

typedef struct proto_qc_info {
	uint64_t bit;
	const char *name;
	proto_qc_class cls;
	const char *meaning;
} proto_qc_info;

/* The legend, terminated by an entry with name NULL. */
extern const proto_qc_info proto_qc_legend[];
const char *proto_qc_class_name(proto_qc_class c);
/* Index (0..63) of the single bit set in mask. */
int proto_qc_index(uint64_t mask);

struct rw_elastic;
typedef struct proto_qc_ranges proto_qc_ranges;
/* QC bits for a sample the core called impossible (RW_ELASTIC_BAD_*). */
uint64_t proto_qc_impossible(unsigned why);
/* QC bits for a possible sample outside the plausibility ranges. */
uint64_t proto_qc_plausible(const proto_qc_ranges *r,
                            const struct rw_elastic *e);

/* ---- per-call memory ---------------------------------------------------- */
typedef struct proto_arena_block proto_arena_block;
typedef struct proto_call proto_call;

/* Per-call allocation, freed when the call ends. NULL when out of memory
 * (the call then fails with -32603). Thread-safe for one call. */
void *proto_alloc(proto_call *c, size_t bytes);
double *proto_alloc_doubles(proto_call *c, size_t n);
/* A copy of s in the call's arena; NULL when out of memory. */
char *proto_strdup(proto_call *c, const char *s);
/* "prefix" + "name" + suffix in the call's arena ("fluid." "brine" "."). */
const char *proto_path(proto_call *c, const char *prefix, const char *name,
                       const char *suffix);

/* Records an error for the call and returns -1, for `return proto_fail()`.
 * `param` names the offending parameter (NULL when none). The first error
 * is kept; texts are cut at UTF-8 character boundaries. */
int proto_fail(proto_call *c, int code, const char *param, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
/* Adds a request-level warning (the result's "warnings" list): the
 * request is answered, but something in it deserves a look. */
void proto_warn(proto_call *c, const char *param, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
/* Checks the request's sample count and work against the limits. */
int proto_check_size(proto_call *c, size_t samples, size_t work);

/* ---- declarations ------------------------------------------------------- */

/* A numeric parameter in internal units: a scalar (n == 1) or an array.
 * `present` is set when the request (or the session) gave it; a default
 * gives present == 0 with n == 1. */
typedef struct proto_dist proto_dist;
typedef struct proto_vec {
	const double *v;
	size_t n;
	unsigned char present, is_array, inherited;
	const proto_dist *dist; /* given as a distribution (uncertainty) */
} proto_vec;

/* An input given as a probability distribution (uncertainty.c). The
 * parameters are in internal units (a standard deviation converts by the
 * unit's scale only); each is a scalar or an array of the samples. */
enum {
	PROTO_DIST_NORMAL = 0,
	PROTO_DIST_LOGNORMAL,
	PROTO_DIST_UNIFORM,
	PROTO_DIST_TRIANGULAR,
	PROTO_DIST_TRUNC_NORMAL,
	PROTO_DIST_PERCENTILES,
	PROTO_DIST_COUNT
};
struct proto_dist {
	int kind;          /* PROTO_DIST_* */
	int lognormal;     /* percentiles: the shape through them */
	double p_lo, p_hi; /* percentiles: their probabilities */
	proto_vec p[4];    /* the parameters (see uncertainty.c) */
	size_t n;          /* 1, or the samples given */
	const char *path;  /* the input's dotted name */
};

/* Element i with scalar broadcasting. */
static inline double proto_at(const proto_vec *x, size_t i)
{
	return x->n == 1 ? x->v[0] : x->v[i];
}

/* Every struct a declaration lands in starts with this header. */
typedef struct proto_hdr {
	const char *path;      /* "" at the top, "fluid_new." when nested */
	uint64_t given;        /* bit per field index: given in the request */
	uint64_t inherited;    /* bit per field index: from the session */
	unsigned char present; /* the object itself was given */
} proto_hdr;

/* A list of objects (PT_LIST): n items of the sub-declaration's size. */
typedef struct proto_list {
	size_t n;
	void *items;
} proto_list;

typedef enum proto_ptype {
	PT_NUMS = 1, /* number or array (broadcast in `group`): proto_vec */
	PT_STR,      /* a string: const char * */
	PT_BOOL,     /* true or false: int */
	PT_ENUM,     /* one of `choices`: int index */
	PT_ENUMSET,  /* one name or an array of distinct names of `choices`:
	                proto_enumset */
	PT_OBJ,      /* an object of `sub`: the struct, inline at offset */
	PT_LIST,     /* a non-empty array of `sub` objects: proto_list */
	PT_CUSTOM,   /* parsed by `custom`: whatever it writes */
} proto_ptype;

/* PT_ENUMSET: the chosen indexes in request order. */
typedef struct proto_enumset {
	unsigned char id[32];
	int n;
	uint32_t mask;
} proto_enumset;

/* Field flags. */
#define PF_REQ    0x0001u /* required */
#define PF_NULLS  0x0002u /* PT_NUMS arrays may hold null (NaN) */
#define PF_SCALAR 0x0004u /* PT_NUMS: one value per request, no array */
#define PF_DFLT                                                                \
	0x0008u             /* has a default (dflt, or choice dflt_choice,     \
	                       or the string dflt_str) */
#define PF_LO       0x0010u /* values >= lo (> lo with PF_LO_OPEN) */
#define PF_HI       0x0020u /* values <= hi (< hi with PF_HI_OPEN) */
#define PF_LO_OPEN  0x0040u
#define PF_HI_OPEN  0x0080u
#define PF_FRACTION 0x0100u /* in [0, 1]; out of range hints at percent */
#define PF_INT      0x0200u /* PT_NUMS: integer values */
#define PF_ARRAY    0x0400u /* PT_NUMS: must be an array */
#define PF_LIST                                                                \
	0x1000u /* PT_NUMS: a list of its own length (e.g. percentiles),       \
	           not broadcast with the samples */
#define PF_AXIS                                                                \
	0x0800u /* PT_CUSTOM: a grid axis (an array, or an object with n);     \
	           its length multiplies the work estimate */

typedef struct proto_decl proto_decl;
typedef struct proto_custom proto_custom;

/* One accepted parameter, landing at `offset` in its declaration's
 * struct. Bounds and defaults are in internal units. */
typedef struct proto_field {
	const char *name;
	proto_ptype type;
	proto_kind kind;
	unsigned flags;
	unsigned char group; /* broadcast dimension: 0 samples, 1 angles... */
	size_t offset;
	double dflt, lo, hi;
	const char *const *choices; /* PT_ENUM, PT_ENUMSET; NULL-terminated */
	int dflt_choice;
	const char *dflt_str;
	const proto_decl *sub;      /* PT_OBJ, PT_LIST */
	const proto_custom *custom; /* PT_CUSTOM */
	const char *desc;           /* one line, for the schema and --help */
} proto_field;

/* A parameter the declaration machinery cannot express. */
struct proto_custom {
	/* Parses v (never NULL) into dst; path names v in errors. */
	int (*parse)(proto_call *c, const cJSON *v, const char *path,
	             void *dst);
	/* Sets dst when the parameter is absent (may be NULL: zeroed). */
	void (*absent)(void *dst);
	const char *schema; /* JSON Schema of the value (JSON text) */
};

/* Cross-field rules, as data. Names are field names of the declaration,
 * or "name=value" for an enum field holding that value. A rule with a
 * `when` condition (a name or "name=value") applies only when it holds. */
typedef enum proto_rule_kind {
	PR_END = 0,
	PR_EXACTLY,  /* exactly `count` of names given */
	PR_AT_LEAST, /* at least `count` of names given */
	PR_AT_MOST,  /* at most `count` of names given */
	PR_ALL_OR_NONE,
	PR_REQUIRES, /* every name given */
	PR_FORBIDS,  /* none of names given */
	PR_ONLY,     /* no field outside names (and `when`) given */
} proto_rule_kind;

typedef struct proto_rule {
	proto_rule_kind kind;
	const char *when;
	int count;
	const char *const *names; /* NULL-terminated */
	const char *why;          /* the error's reason */
} proto_rule;

/* The sentinel closing a rule table (designated, so no field is left
 * implicitly zero in a warning compiler's eyes). */
#define PR_LAST                                                                \
	{                                                                      \
		.kind = PR_END                                                 \
	}

struct proto_decl {
	const char *name; /* schema component name ("" for method params) */
	const proto_field *fields; /* terminated by name NULL */
	const proto_rule *rules;   /* terminated by PR_END, or NULL */
	size_t size;               /* of the struct; starts with proto_hdr */
	/* A string given instead of the object (e.g. a mineral name). */
	int (*from_string)(proto_call *c, const char *s, const char *path,
	                   void *dst);
	const char *string_desc; /* schema text of that string */
	/* Cross-field checks after fields and rules (may be NULL). */
	int (*check)(proto_call *c, void *dst);
	const char *desc;
};

/* Was field `idx` of a parsed struct given (request or session)? */
static inline int proto_given(const void *s, int idx)
{
	const proto_hdr *h = (const proto_hdr *)s;
	return (int)(((h->given | h->inherited) >> idx) & 1u);
}

/* Was the field at `offset` of d inherited from the session (not given in
 * the request)? For cross-field checks that let session defaults pass. */
int proto_inherited_at(const void *s, const proto_decl *d, size_t offset);

/* Parses obj (may be NULL) against d into dst (d->size bytes) at `path`.
 * Rejects unknown members (with a suggestion), wrong types, non-finite
 * numbers, missing required members, values outside declared bounds,
 * arrays whose length disagrees with their broadcast group, and broken
 * rules; converts numbers to internal units with the call's units; fills
 * defaults. 0, or -1 after proto_fail. */
int proto_decl_parse(proto_call *c, const proto_decl *d, const cJSON *obj,
                     const char *path, void *dst);
/* Index of a field by name in d, or -1 (an assert in debug builds: a name
 * written in code must be declared). */
int proto_field_index(const proto_decl *d, const char *name);
/* Checks every method's declaration (names, offsets, rules, outputs):
 * 0, or -1 with the first problem in why. For the tests. */
int proto__decl_selfcheck(char *why, size_t n);
/* Joins an array of length n at path into broadcast group g. 0 or -1. */
int proto_join(proto_call *c, int g, size_t n, int is_array, const char *path);

/* Field declarations, shortened: the field named as the struct member.
 * Add bounds and defaults as further designated initializers:
 *   {PROTO_NUMS(my_args, vp, PK_VELOCITY, PF_NULLS, "P velocity"),
 *    .lo = 0, .flags = ...} is not allowed (flags twice); write
 *   {PROTO_NUMS(my_args, vp, PK_VELOCITY, PF_NULLS | PF_LO, "..."),
 *    .lo = 0}. */
#define PROTO_NUMS(st, member, kind_, flags_, desc_)                           \
	.name = #member, .type = PT_NUMS, .kind = kind_, .flags = flags_,      \
	.offset = offsetof(st, member), .desc = desc_
#define PROTO_FIELD(st, member, type_, flags_, desc_)                          \
	.name = #member, .type = type_, .flags = flags_,                       \
	.offset = offsetof(st, member), .desc = desc_

/* Plausibility ranges for sedimentary rock (internal units), shared by
 * the elastic, rock and log families; overridable per request as the
 * `qc` object (proto_qc_ranges_decl, defaults in elastic.c). */
struct proto_qc_ranges {
	proto_hdr hdr;
	proto_vec rho_min, rho_max, vp_min, vp_max, vs_min, vs_max;
	proto_vec nu_min, nu_max;
};
extern const proto_decl proto_qc_ranges_decl;
/* The ranges as given or defaulted, for methods that did not parse a qc
 * object: the defaults. */
void proto_qc_ranges_default(proto_qc_ranges *r);

extern const proto_decl proto_uncertainty_decl;
/* Draws when `uncertainty.draws` is not given. */
#define PROTO_DRAWS_DEFAULT 1000
/* The core distribution of sample i of d (dist.c): RW_OK or RW_EDOM. */
struct rw_dist;
int proto__dist_at(const proto_dist *d, size_t i, struct rw_dist *out);
/* Parses a distribution object for field f at path into out (its nominal
 * value, the mean, in out->v) (uncertainty.c). 0 or -1. */
int proto__dist_parse(proto_call *c, const proto_field *f, const char *path,
                      const cJSON *v, proto_vec *out);
/* Runs a per-sample method over draws of its uncertain inputs and writes
 * the statistics of its outputs (uncertainty.c). Called by the driver
 * after prepare when an input is a distribution. 0 or -1. */
struct proto_shape;
int proto__run_uncertain(proto_call *c, void *args,
                         const struct proto_shape *sh);
/* Checks n values of field f against its declared bounds (args.c):
 * 0, or -1 after proto_fail naming path. */
int proto__check_bounds(proto_call *c, const proto_field *f, const char *path,
                        const double *v, size_t n, int is_array);
/* 1 when the parsed args hold an input given as a distribution. */
int proto__has_dist(const proto_decl *d, const void *args);

/* ---- outputs and methods ------------------------------------------------ */

typedef enum proto_otype {
	PO_NUM = 1, /* double */
	PO_FLAGS,   /* uint64_t QC set */
	PO_INT,     /* long long */
	PO_STR,     /* const char * (NULL written as null) */
	PO_BOOL,    /* int */
	PO_VEC,     /* D_REQ: a proto_vec of the args, written per sample */
	PO_ENUM,    /* D_REQ: an int index into `choices`, written as name */
	PO_CUSTOM,  /* D_REQ: written by `write` */
	PO_COUNT,   /* D_REQ: a count of the shape: offset 0 samples, 1 and 2
	               the cells of each set */
} proto_otype;

typedef enum proto_dim {
	D_SAMPLE = 0, /* a member of the per-sample row */
	D_CELL,       /* a member of the per-cell row (sample x cell group) */
	D_CELL2,      /* the second cell set */
	D_REQ,        /* a member of the arguments struct (one per request) */
} proto_dim;

typedef struct proto_output {
	const char *name;
	proto_otype type;
	proto_kind kind;
	unsigned char dim;
	size_t offset;
	int (*when)(const void *args); /* written only when true (NULL: always)
	                                */
	const char *const *choices;    /* PO_ENUM */
	void (*write)(proto_call *c, const char *key, const void *args);
	const char *desc;
	const char *schema; /* JSON Schema text overriding the default */
} proto_output;

/* The shape of a per-sample method's answer, set by the driver from the
 * broadcast groups and adjustable by the method's prepare hook. */
typedef struct proto_shape {
	size_t n;     /* samples */
	int arr;      /* samples are written as arrays */
	size_t m[2];  /* cells per sample in each cell set */
	int m_arr[2]; /* cells are written as arrays */
} proto_shape;

typedef int (*proto_kernel)(const void *args, size_t i, void *row, uint64_t *qc,
                            void *ws);
typedef int (*proto_cell_kernel)(const void *args, size_t i, size_t j,
                                 void *srow, void *crow, uint64_t *qc,
                                 void *ws);

/* A cell set: kernel run for every (sample, cell) pair of a group. */
typedef struct proto_cells {
	proto_cell_kernel kernel;
	int group;        /* the broadcast group of the cells */
	size_t row_size;  /* per-cell row */
	size_t qc_offset; /* of the uint64_t QC member in the cell row */
	int cell_major;   /* written [cell][sample] (else [sample][cell]) */
} proto_cells;

#define PM_NO_FIELDS      0x1u /* no `fields` selection */
#define PM_NO_UNCERTAINTY 0x2u /* no distributions */
#define PM_SESSION        0x4u /* a session method: no session defaults */
#define PM_RAW_PARAMS     0x8u /* the body reads c->params itself */

typedef struct proto_method {
	const char *name;
	const char *summary;
	const char *description;
	const proto_decl *params;
	const proto_output *outputs; /* terminated by name NULL */
	/* After parsing: derived state in the args struct (never pointers
	 * into it: the driver may copy it), shape adjustments. */
	int (*prepare)(proto_call *c, void *args, proto_shape *shape);
	proto_kernel kernel;
	size_t row_size, qc_offset;
	proto_cells cells[2];
	size_t ws_size; /* per-thread scratch for kernels */
	int (*ws_init)(const void *args, void *ws);
	void (*ws_free)(void *ws);
	/* Methods that are not per sample write their result themselves. */
	int (*body)(proto_call *c, void *args);
	double cost; /* relative cost of one evaluation (0 means 1) */
	unsigned flags;
	/* OpenRPC text replacing the generated params list or result (for
	 * methods whose params are not a declaration, e.g. session.set). */
	const char *openrpc_params, *openrpc_result;
} proto_method;

/* ---- the call ----------------------------------------------------------- */

typedef struct proto_unit_note {
	const char *path;
	uint32_t hash; /* of path (FNV-1a), compared before the text */
	proto_kind kind;
} proto_unit_note;

typedef struct proto_group {
	size_t n;
	int any_array;
	const char *from; /* path of the first array of the group */
} proto_group;

#define PROTO_MAX_GROUPS 4
#define PROTO_W_DEPTH    32

struct proto_call {
	proto_ctx *ctx;
	proto_session *session;
	const proto_method *method;
	const cJSON *params; /* the params object (NULL when absent) */
	/* its members every method reads, found in one pass (NULL when
	 * absent): units, digits, fields, uncertainty */
	const cJSON *p_units, *p_digits, *p_fields, *p_unc;
	void *args;        /* the parsed arguments struct */
	proto_units units; /* session units overridden by params */
	proto_group group[PROTO_MAX_GROUPS];
	proto_buf *out; /* the result is written here */
	/* result writer state */
	int depth;
	int key_pending;
	const char *pending_key;
	unsigned char need_comma[PROTO_W_DEPTH];
	const char *keys[PROTO_W_DEPTH]; /* key of each open object/array */
	int skip_depth; /* > 0 while a deselected member is open */
	proto_unit_note *unit_notes;
	size_t n_unit_notes, cap_unit_notes;
	int digits; /* significant digits of numbers out; 0: shortest exact */
	const char *const *fields; /* `fields`: members to write, or NULL */
	size_t n_fields;
	/* warnings for the result */
	char **warnings;
	size_t n_warnings;
	/* supplies session defaults to a method's params (set by dispatch:
	 * a hook, so the declaration machinery does not call the session) */
	int (*inherit)(proto_call *c, const proto_decl *d, void *dst,
	               const cJSON *obj);
	/* cJSON trees the call's values point into, deleted at its end */
	cJSON **trees;
	size_t n_trees;
	/* error state */
	int err_code;
	char err_param[128];
	char err_reason[512];
	proto_arena_block *arena;
};

/* A connection's session (session.c). */
struct proto_session {
	proto_ctx *ctx;
	proto_units units;
	int digits;                    /* of numbers out; 0: shortest exact */
	struct sess_default *defaults; /* list, newest first */
	size_t bytes;                  /* held by the defaults */
};

/* Looks a method up by name; NULL when unknown. */
const proto_method *proto_method_find(const char *name);
/* Iterates the table: returns the i-th method or NULL past the end. */
const proto_method *proto_method_at(size_t i);

/* Runs a method on its params (already checked to be an object or NULL):
 * parses, validates, runs and writes the result value. 0 or -1 after
 * proto_fail (driver.c). */
int proto__run_method(proto_call *c);
/* Fills the top-level fields the request does not give from the session
 * (session.c): called by proto_decl_parse for the method's params. */
int proto__session_inherit(proto_call *c, const proto_decl *d, void *dst,
                           const cJSON *obj);

/* Writes values laid out as the shape says: set -1 a vector along the
 * samples, set 0 or 1 a grid [sample][cell] of that cell set (written
 * [cell][sample] when cell_major), each dimension an array only when its
 * input was one. Element e of the storage is at base + e * elem + offset.
 * flags: uint64_t values, else doubles of kind `kind`. */
void proto__w_layout(proto_call *c, const char *key, proto_kind kind, int flags,
                     const unsigned char *base, size_t elem, size_t offset,
                     const struct proto_shape *sh, int set, int cell_major);
/* Writes a request-level output (dim D_REQ, or a PO_VEC) of args. */
void proto__write_req(proto_call *c, const proto_output *o, const void *args,
                      const struct proto_shape *sh);
/* Writes "warnings" (when any), "units" and closes the result object:
 * the end of every result, for methods with a body too. */
void proto__write_tail(proto_call *c);
/* Parses one field's value v for a session default into dst (the struct
 * the field lands in), with the call's current units. 0 or -1. */
int proto__field_parse(proto_call *c, const proto_field *f, const cJSON *v,
                       void *dst);

/* ---- the result writer -------------------------------------------------- */
/* The handler writes one JSON value, normally an object, through these.
 * Keys are written by the *_key variants or proto_w_key. Non-finite
 * numbers are written as null; the caller sets the QC flag that says why.
 * Numbers of kind k are converted from internal units to the call's units
 * and the member is added to the response's "units" map. Members of the
 * result object that the request's `fields` leaves out are skipped. */
void proto_w_obj_begin(proto_call *c, const char *key);
void proto_w_obj_end(proto_call *c);
void proto_w_arr_begin(proto_call *c, const char *key);
void proto_w_arr_end(proto_call *c);
void proto_w_key(proto_call *c, const char *key);
void proto_w_num(proto_call *c, const char *key, proto_kind k, double v);
void proto_w_int(proto_call *c, const char *key, long long v);
void proto_w_flags1(proto_call *c, const char *key, uint64_t v);
void proto_w_str(proto_call *c, const char *key, const char *s);
void proto_w_bool(proto_call *c, const char *key, int v);
void proto_w_null(proto_call *c, const char *key);
/* Writes a raw JSON text as a value (must be valid JSON). */
void proto_w_raw(proto_call *c, const char *key, const char *json, size_t n);
/* Writes a cJSON value (small values only; large arrays use proto_w_vec). */
void proto_w_json(proto_call *c, const char *key, const cJSON *v);
/* Writes values[0..n-1] as an array when as_array, else values[0] as a
 * number. `stride` is the distance between elements in doubles. */
void proto_w_vec(proto_call *c, const char *key, proto_kind k,
                 const double *values, size_t n, size_t stride, int as_array);
/* The same for one double member of an array of n structs: `rows` is the
 * array, row_size its element size, offset the member's offsetof. Reads
 * through the bytes of the array, never by walking a pointer past a
 * member. */
void proto_w_rows(proto_call *c, const char *key, proto_kind k,
                  const void *rows, size_t row_size, size_t offset, size_t n,
                  int as_array);
/* QC flag sets (uint64_t members of rows) the same way. */
void proto_w_flag_rows(proto_call *c, const char *key, const void *rows,
                       size_t row_size, size_t offset, size_t n, int as_array);
/* The "units" member: for every field written so far with a dimension,
 * its dotted path and unit. Last member of a result object. */
void proto_w_units(proto_call *c);
/* Notes that member `key` of the open object has kind k, for the "units"
 * map, when its numbers were written converted already (as PK_NONE). */
void proto_w_note_unit(proto_call *c, const char *key, proto_kind k);
/* 1 when the result member `key` is selected by `fields`. */
int proto_w_selected(const proto_call *c, const char *key);

/* Formats a double for JSON (shortest digits that round-trip; integers
 * exactly); non-finite gives "null". Returns the length (buf >= 32). */
size_t proto_fmt_double(char *buf, double v);

/* ---- context and session internals ------------------------------------- */
void proto__count_request(proto_ctx *ctx, int notification);
void proto__count_error(proto_ctx *ctx, int code);
/* A snapshot of the request and error counters (service.info). */
#define PROTO_N_CODES 8
typedef struct proto_counters {
	unsigned long long requests, notifications;
	int code[PROTO_N_CODES];
	unsigned long long errors[PROTO_N_CODES];
	size_t n_codes;
} proto_counters;
void proto__counters(proto_ctx *ctx, proto_counters *out);
/* Applies a `units` object onto u (errors name `path`). 0 or -1. */
/* Reads `digits` (NULL: absent, *digits unchanged): 0 for the shortest
 * text that reads back to the same double, 1..17 significant digits
 * (writer.c). 0 or -1 after proto_fail naming path. */
int proto__digits_apply(proto_call *c, const cJSON *v, const char *path,
                        int *digits);
int proto__units_apply(proto_call *c, const cJSON *obj, const char *path,
                       proto_units *u);
/* Frees the call's arena. */
void proto__arena_free(proto_call *c);
/* The context's spare first arena block (NULL when none; ctx may be
 * NULL), and giving one back: 1 when kept, 0 when the caller frees it
 * (ctx.c). Any thread. */
void *proto__ctx_spare_take(proto_ctx *ctx);
int proto__ctx_spare_give(proto_ctx *ctx, void *block);
/* Gives c the arena and kept trees of t, a copy of c that allocated on
 * from c's arena (a scratch call's memory then lives as long as c). */
void proto__arena_adopt(proto_call *c, proto_call *t);
/* Appends s to b as a JSON string. */
void proto__buf_json_string(proto_buf *b, const char *s);
/* Appends a member's start: a comma when `comma`, then "key": (buf.c). */
void proto__buf_member(proto_buf *b, int comma, const char *key);
/* Appends one byte (the writer's brackets and commas) without a call
 * when the buffer has room. */
static inline void proto__buf_put1(proto_buf *b, char ch)
{
	if (b->oom || b->cap - b->len < 2) {
		proto_buf_append(b, &ch, 1);
		return;
	}
	b->data[b->len++] = ch;
	b->data[b->len] = '\0';
}
/* The OpenRPC document generated from the declarations (schema.c), as a
 * cJSON tree the caller deletes; NULL when out of memory. */
cJSON *proto__openrpc(void);
/* Edit distance based suggestion: the closest of `names` to `s` when close
 * enough, else NULL. */
const char *proto__suggest(const char *s, const char *const *names, size_t n);
/* Runs fn(arg, chunk) for chunk in [0, nchunks) on the context's worker
 * threads and the caller; returns when all are done. */
void proto__parallel(proto_ctx *ctx, size_t nchunks,
                     void (*fn)(void *arg, size_t chunk), void *arg);

/* ---- numeric arrays from the pre-pass (inarr.c) ---------------------------
 * Large numeric arrays of a request line are parsed into doubles before
 * cJSON sees the line; in the tree each is an array node without
 * children (type cJSON_Array | cJSON_IsReference | PROTO_NUMARR_BIT, its
 * valuestring pointing at a proto_numarr, which cJSON_Delete leaves
 * alone). Code reading params must not use cJSON_GetArraySize,
 * cJSON_ArrayForEach or ->child on arrays: proto__arr_size and
 * PROTO_ARR_FOREACH see both kinds, proto__numarr gives the doubles, and
 * proto__numarr_restore turns the nodes back into ordinary ones where a
 * rare path needs them (printing a tree). */
#define PROTO_NUMARR_BIT 0x1000
typedef struct proto_numarr {
	double *v; /* n values, NaN for null; NULL in a count-only scan */
	size_t n;
} proto_numarr;
typedef struct proto_inarr {
	proto_numarr *arr;
	size_t n, cap;
	char *text; /* the compacted line (NUL-terminated), NULL if none */
	size_t len;
} proto_inarr;
/* Finds the numeric arrays worth taking out of the line (not the line
 * itself, so a batch stays a batch) and parses them (count_only: counts
 * them); t->text is then the line with placeholders, or NULL when none
 * was taken. Large arrays are parsed on ctx's threads (ctx may be NULL).
 * -1 when out of memory (t is then empty). */
int proto__inarr_scan(proto_ctx *ctx, const char *line, size_t len,
                      int count_only, proto_inarr *t);
/* Tests only: nonzero turns the pre-pass off (inarr.c). */
extern int proto__inarr_off;
/* After cJSON parsed t->text: placeholders become numeric array nodes;
 * -1 when one of them was not a value (the line is not JSON as sent). */
int proto__inarr_attach(cJSON *root, proto_inarr *t);
void proto__inarr_free(proto_inarr *t);
/* The doubles of a numeric array node, or NULL for any other node. */
const proto_numarr *proto__numarr(const cJSON *v);
/* Elements of an array (either kind) or members of an object; 0 else. */
size_t proto__arr_size(const cJSON *v);
/* Iteration over an array of either kind: the elements of a numeric
 * array are presented one at a time in a scratch number (or null) node
 * inside the iterator, valid until the next step. */
typedef struct proto_arr_iter {
	const proto_numarr *a;
	const cJSON *e;
	size_t i;
	cJSON tmp;
} proto_arr_iter;
const cJSON *proto__arr_first(proto_arr_iter *it, const cJSON *v);
const cJSON *proto__arr_next(proto_arr_iter *it);
#define PROTO_ARR_FOREACH(e, it, v)                                            \
	for ((e) = proto__arr_first(&(it), (v)); (e);                          \
	     (e) = proto__arr_next(&(it)))
/* Turns every numeric array node under v (v included) into an ordinary
 * cJSON array; -1 when out of memory. */
int proto__numarr_restore(cJSON *v);

#endif
