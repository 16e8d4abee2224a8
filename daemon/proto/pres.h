/* Cross-file internals of the pressure family (pressure.c, strength.c)
 * that log.process embeds: the descriptions of the column above the log,
 * the pore water, the compaction trend (given or fitted), Bowers'
 * parameters and a restart point; the setup a request derives from them;
 * the running state carried between requests as a token; and the chain
 * of per-sample steps (overburden, hydrostatic, pore pressure, fracture
 * gradient) that pressure.* and log.process share, so a live feed of
 * single samples and a batch of the same samples give the same numbers.
 * The physics is in the core (rockwire/pressure.h, rockwire/strength.h).
 *
 * Pressures are screening estimates only: every answer carries
 * QC_PRES_CAUTION on every sample and the caution text below. */
#ifndef RW_PROTO_PRES_H
#define RW_PROTO_PRES_H

#include "proto/internal.h"
#include "rockwire/pressure.h"

/* The caution of every pressure, stress and strength answer. */
extern const char proto_pres_caution[];

/* ---- descriptions ------------------------------------------------------- */

typedef struct proto_pres_shallow {
	proto_hdr hdr;
	proto_vec rho_ml, a, s0, p, cap;
} proto_pres_shallow;

/* The column above the log and the depth datum (rw_pres_column). */
typedef struct proto_pres_column {
	proto_hdr hdr;
	proto_vec air_gap, water_depth, rho_sea, g;
	proto_pres_shallow shallow;
} proto_pres_column;
extern const proto_decl proto_pres_column_decl;

typedef struct proto_pres_brine {
	proto_hdr hdr;
	proto_vec salinity, mudline_temperature, temperature_gradient;
} proto_pres_brine;

/* The pore water of the hydrostatic pressure: a density, a gradient, or
 * a Batzle & Wang brine (default fresh water). */
typedef struct proto_pres_water {
	proto_hdr hdr;
	proto_vec density, gradient;
	proto_pres_brine brine;
} proto_pres_water;
extern const proto_decl proto_pres_water_decl;

/* A covariance matrix of (dt_ma, dt_ml, c) in SI (PT_CUSTOM). */
typedef struct proto_pres_cov {
	int given;
	double v[3][3];
} proto_pres_cov;

/* A given compaction trend (the `trend` member pressure.trend answers). */
typedef struct proto_pres_trend {
	proto_hdr hdr;
	int form;
	proto_vec dt_ma, dt_ml, c, top, base;
	proto_pres_cov cov;
} proto_pres_trend;
extern const proto_decl proto_pres_trend_decl;

typedef struct proto_pres_interval {
	proto_hdr hdr;
	proto_vec top, base;
} proto_pres_interval;

/* A trend to fit on the request's samples. */
typedef struct proto_pres_fit {
	proto_hdr hdr;
	proto_list intervals;
	int form;
} proto_pres_fit;
extern const proto_decl proto_pres_fit_decl;

typedef struct proto_pres_bowers {
	proto_hdr hdr;
	proto_vec v0, a, b, u, sigma_max, v_max, unloading_from;
	int a_units;
} proto_pres_bowers;
extern const proto_decl proto_pres_bowers_decl;

/* A restart from known values at a depth. */
typedef struct proto_pres_resume {
	proto_hdr hdr;
	proto_vec tvd, sv, rhob, ph;
} proto_pres_resume;
extern const proto_decl proto_pres_resume_decl;

/* A dynamic-to-static Young's modulus conversion (strength.c): a
 * published name or {a, b} linear (Es = a Ed + b). relation 0 is linear,
 * 1 + id a published one (rockwire/strength.h RW_ESTAT_*). */
typedef struct proto_pres_es {
	proto_hdr hdr;
	proto_vec a, b;
	int relation;
} proto_pres_es;
extern const proto_decl proto_pres_es_decl;
/* Static modulus (Pa) of a sample from vp_ms and e_dyn_pa (either may be
 * NaN when the conversion does not read it); ORs its detail bits. Core
 * status. */
int proto__pres_es(const proto_pres_es *e, double vp_ms, double e_dyn_pa,
                   double *es_pa, uint64_t *detail);

/* Methods of pore pressure and fracture gradient (option values). */
enum { PRES_PORE_EATON = 0, PRES_PORE_BOWERS = 1, PRES_PORE_NONE = 2 };
enum {
	PRES_FRAC_EATON = 0,
	PRES_FRAC_MK = 1,
	PRES_FRAC_POROELASTIC = 2,
	PRES_FRAC_NONE = 3
};
extern const char *const proto_pres_pore_names[];
extern const char *const proto_pres_frac_names[];
extern const char *const proto_pres_form_names[];

typedef struct proto_pres_nu {
	proto_hdr hdr;
	proto_vec a, b;
} proto_pres_nu;
extern const proto_decl proto_pres_nu_decl;

/* The `pressures` option object of log.process. */
enum { PRES_DEPTH_TVD = 0, PRES_DEPTH_MD = 1 };
enum { PRES_RHO_HOLD = 0, PRES_RHO_AS_LOGGED = 1 };
typedef struct proto_pres_log {
	proto_hdr hdr;
	int depth_is;
	proto_pres_column column;
	proto_pres_water pore_water;
	proto_pres_trend trend;
	proto_pres_fit trend_fit;
	proto_vec vsh_min;
	int pore;
	proto_vec exponent;
	proto_pres_bowers bowers;
	int fracture;
	proto_vec ki, alpha, eps_h, eps_hmax;
	proto_pres_nu nu_static;
	proto_pres_es e_static_from;
	int density;
	proto_pres_resume resume;
	const char *state;
} proto_pres_log;
extern const proto_decl proto_pres_log_decl;

/* ---- the state carried between requests --------------------------------- */

typedef struct pres_state {
	rw_pres_obg_state obg;
	rw_pres_hydro_state hyd;
	int law_used; /* the shallow law contributed to obg.sv_pa */
	int has_hyd;  /* hyd holds a brine integral */
} pres_state;

/* ---- the setup of a request --------------------------------------------- */

enum { PRES_WATER_CONST = 0, PRES_WATER_BRINE = 1 };

/* Everything the chain needs, derived once per request. It holds no
 * pointer into an arguments struct. */
typedef struct pres_setup {
	rw_pres_column col;
	double mudline;           /* m below the datum */
	int law_default;          /* the shallow law is the default one */
	int water;                /* PRES_WATER_* */
	double rho_w;             /* constant pore water, kg/m^3 */
	double sal, t_ml, t_grad; /* brine: fraction, degC, degC/m */
	int have_trend, trend_fitted, trend_has_cov;
	rw_pres_trend trend;
	double vsh_min; /* shale cut-off; NaN: no selector */
	/* pore pressure */
	int pore;
	double exponent;
	rw_pres_bowers bw;
	int unloading;
	double unloading_from_m;
	/* fracture gradient */
	int frac;
	double nu_a, nu_b, alpha, eps_h, eps_hmax;
	/* the running state: start of this request, then its end */
	pres_state st;
	int continued; /* started from a state token */
} pres_setup;

/* Sets the defaults: land column with the default law, fresh water, no
 * trend, no selector, Eaton 3, Eaton 1969, no strain. */
void proto__pres_setup_init(pres_setup *s);

/* The column named `path` in errors (e.g. "column"). When
 * need_law, the overburden is integrated: in deep water (1000 ft of
 * water or more) the shallow law must be given. 0 or -1. */
int proto__pres_column(proto_call *c, const proto_pres_column *pc,
                       const char *path, int need_law, pres_setup *s);
/* The pore water (w may be absent: fresh water). 0 or -1. */
int proto__pres_water(proto_call *c, const proto_pres_water *w,
                      const char *path, pres_setup *s);
/* A given trend. 0 or -1. */
int proto__pres_trend_given(proto_call *c, const proto_pres_trend *t,
                            const char *path, pres_setup *s);
/* Fits the trend on samples z_m (TVD), dt_sm, vsh (NULL: no selector),
 * excl (NULL or 1 = leave out) inside f's intervals. 0 or -1. */
int proto__pres_trend_fit(proto_call *c, const proto_pres_fit *f,
                          const char *path, size_t n, const double *z_m,
                          const double *dt_sm, const double *vsh,
                          const unsigned char *excl, pres_setup *s);
/* Bowers' parameters into s. 0 or -1. */
int proto__pres_bowers(proto_call *c, const proto_pres_bowers *b,
                       const char *path, pres_setup *s);
/* The start of the running state: a state token (may be NULL), a resume
 * (may be absent) or a fresh start at the mudline. need_obg, need_hyd:
 * which integrals the request runs. state_path names the token in
 * errors. 0 or -1. */
int proto__pres_start(proto_call *c, const char *token, const char *state_path,
                      const proto_pres_resume *r, const char *resume_path,
                      int need_obg, int need_hyd, pres_setup *s);

/* ---- the chain ---------------------------------------------------------- */

/* The per-sample answer of the chain, in SI (Pa, kg/m^3, s/m). */
typedef struct pres_sample {
	double sv, sv_assumed, ph, rho_w, dt_n, dt_n_sigma, pp, pp_sigma;
	double sigma_eff, shmin, shmax, nu;
	uint64_t qc, detail;
} pres_sample;

/* Sets every value of o to NaN and its flags to QC_PRES_CAUTION. */
void proto__pres_sample_clear(pres_sample *o);

/* Runs the integrals over the n samples in order: the overburden from
 * rho (NaN: missing; doubtful[i] set: the density is not used and the
 * last valid one is held) when do_obg, the hydrostatic pressure when
 * do_hyd. z_m NaN: the sample is skipped (missing). Advances s->st.
 * 0, or -1 when out of memory (after proto_fail). */
int proto__pres_integrate(proto_call *c, pres_setup *s, int do_obg, int do_hyd,
                          size_t n, const double *z_m, const double *rho,
                          const unsigned char *doubtful, pres_sample *out);

/* Pore pressure of one sample from o->sv and o->ph (given or
 * integrated): dt_sm (Eaton) or vp_ms (Bowers), vsh (NaN: none, or
 * missing when the request has a selector). */
void proto__pres_pore(const pres_setup *s, double z_m, double dt_sm,
                      double vp_ms, double vsh, pres_sample *o);
/* Fracture gradient of one sample from o->sv and o->pp: nu_dyn (Eaton,
 * poroelastic), ki (Matthews & Kelly), e_static_pa (poroelastic with
 * strain). */
void proto__pres_frac(const pres_setup *s, double z_m, double nu_dyn, double ki,
                      double e_static_pa, pres_sample *o);

/* The state token of s->st (after the request), in the call's arena;
 * NULL when out of memory. */
const char *proto__pres_token(proto_call *c, const pres_setup *s);

/* QC bits for a set of detail bits (PRES_D_*). */
uint64_t proto__pres_qc(uint64_t detail);

/* Detail bits: the core's RW_PRES_WARN_* (bits 0-15), the strength
 * warnings shifted by 16, and the protocol's own. */
#define PRES_D_STRENGTH_RANGE   ((uint64_t)1 << 16)
#define PRES_D_STATIC_ABOVE_DYN ((uint64_t)1 << 17)
#define PRES_D_LAW_DEFAULT      ((uint64_t)1 << 18)
#define PRES_D_DENSITY_DOUBTFUL ((uint64_t)1 << 19)
#define PRES_D_NOT_SHALE        ((uint64_t)1 << 20)
#define PRES_D_LITHOLOGY        ((uint64_t)1 << 21)
#define PRES_D_NOT_DOWNWARD     ((uint64_t)1 << 22)
#define PRES_D_SV_BELOW_PH      ((uint64_t)1 << 23)
#define PRES_D_BELOW_V0         ((uint64_t)1 << 24)

/* The legend of the detail bits, one line for the schema. */
extern const char proto_pres_detail_desc[];

/* Writers shared by the family's outputs. */
void proto__pres_write_caution(proto_call *c, const char *key,
                               const void *args);
/* Writes the trend of s as an object (given or fitted). */
void proto__pres_write_trend(proto_call *c, const char *key,
                             const pres_setup *s);
/* Writes {"token": ...} of the state after the request. */
void proto__pres_write_state(proto_call *c, const char *key,
                             const pres_setup *s);

/* Schema texts of those outputs. */
#define PRES_SCHEMA_TREND "{\"type\": [\"object\", \"null\"]}"
#define PRES_SCHEMA_STATE                                                      \
	"{\"type\": \"object\", \"properties\": {\"token\": {\"type\": "       \
	"\"string\"}}, \"required\": [\"token\"], \"additionalProperties\": "  \
	"false}"

/* rock.strength (strength.c), listed with the family. */
extern const proto_method proto__m_strength;

#endif
