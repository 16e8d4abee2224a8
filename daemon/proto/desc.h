/* Cross-file internals of the protocol layer: the fluid and mineral
 * descriptions that fluid.c and mineral.c declare and that rock.substitute
 * and log.process embed, so a fluid or a mineral is written the same way
 * in every request, and the lithology of rock.empirical and log.process.
 * Each is a declaration (proto_decl) landing in the struct below; the
 * evaluation functions read sample i without allocating. */
#ifndef RW_PROTO_DESC_H
#define RW_PROTO_DESC_H

#include "proto/internal.h"
#include "rockwire/empirical.h"
#include "rockwire/fluid.h"

/* ---- fluids (fluid.c) --------------------------------------------------- */

enum { PROTO_BRINE = 0, PROTO_GAS = 1, PROTO_OIL = 2, PROTO_NPHASES = 3 };
enum { PROTO_MIX_WOOD = 0, PROTO_MIX_BRIE = 1, PROTO_MIX_VOIGT = 2 };

typedef struct proto_brine {
	proto_hdr hdr;
	proto_vec salinity;
} proto_brine;

typedef struct proto_gas {
	proto_hdr hdr;
	proto_vec gravity;
} proto_gas;

typedef struct proto_oil {
	proto_hdr hdr;
	proto_vec api, gor, gas_gravity;
} proto_oil;

typedef struct proto_sat {
	proto_hdr hdr;
	proto_vec brine, gas, oil;
} proto_sat;

/* A fluid: phases with saturations and a mixing rule (Batzle & Wang 1992
 * at the sample's pressure and temperature), or an explicit k and rho. */
typedef struct proto_fluid {
	proto_hdr hdr;
	proto_brine brine;
	proto_gas gas;
	proto_oil oil;
	proto_sat saturation;
	int mix;
	proto_vec brie_exponent;
	proto_vec k, rho;
	/* derived by the check */
	int explicit_kr;
	int has[PROTO_NPHASES];
	int live;          /* oil.gor given */
	int salinity_unit; /* salinity given in the default unit (ppm) */
	double brie_e;     /* the Brie exponent used */
	proto_vec sat[PROTO_NPHASES];
} proto_fluid;

/* The fluid description of rock.substitute and log.process. */
extern const proto_decl proto_fluid_decl;
extern const char *const proto_phase_names[];
extern const char *const proto_mix_names[];

/* Per-sample result of a fluid. */
typedef struct proto_fluid_sample {
	rw_fluid_phase ph[PROTO_NPHASES];
	double z, b0;
	rw_fluid_phase mix;
	uint64_t qc;
} proto_fluid_sample;

/* Evaluates sample i of f at p_mpa (MPa), t_degc (degC); NaN values and QC
 * bits where a phase or the mix cannot be computed. */
void proto__fluid_eval(const proto_fluid *f, size_t i, double p_mpa,
                       double t_degc, proto_fluid_sample *s);
/* Bulk modulus (Pa) and density (kg/m^3) of sample i of the mixture (or
 * the explicit fluid), with its QC bits. */
void proto__fluid_kr(const proto_fluid *f, size_t i, double p_mpa,
                     double t_degc, double *k_pa, double *rho_kgm3,
                     uint64_t *qc);

/* ---- minerals (mineral.c) ----------------------------------------------- */

#define PROTO_MAX_CONSTITUENTS 16

typedef struct proto_constituent {
	proto_hdr hdr;
	const char *mineral;
	proto_vec k, mu, rho, fraction;
} proto_constituent;

/* A mineral: a table name, {k, rho} (rho optional where the method does
 * not need it) or {constituents, method}. */
typedef struct proto_mineral {
	proto_hdr hdr;
	proto_vec k, rho;
	proto_list constituents;
	int method;
	/* derived */
	int explicit_kr;
} proto_mineral;

extern const proto_decl proto_mineral_decl;
extern const proto_decl proto_constituent_decl;

/* Bulk modulus (Pa) and density (kg/m^3, NaN when not given) of sample i.
 * Returns the core status of the mix (RW_OK for a table or explicit
 * mineral). */
int proto__mineral_eval(const proto_mineral *m, size_t i, double *k_pa,
                        double *rho_kgm3);
int proto__mineral_has_rho(const proto_mineral *m);
/* Checks a list of constituents: mineral or k, mu and rho; fractions
 * summing to 1 per sample. 0 or -1. */
int proto__constituents_check(proto_call *c, const proto_list *l,
                              const char *path);

/* ---- lithology (rock_empirical.c) --------------------------------------- */

/* A name ("sandstone") or an object of volume fractions. */
typedef struct proto_lith {
	proto_hdr hdr;
	proto_vec frac[RW_EMP_NLITH]; /* indexed by RW_EMP_SANDSTONE.. */
} proto_lith;

extern const proto_decl proto_lith_decl;
/* The fractions (pure sandstone when nothing was given). */
void proto__lith_fractions(const proto_lith *l, double frac[RW_EMP_NLITH]);
/* QC bits of an empirical warning set: QC_EMP_RANGE when any is set. */
uint64_t proto__emp_qc(unsigned warn);

#endif
