/* Rock strength from logs for the rockwire compute core: unconfined
 * compressive strength (UCS) correlations for sandstone and shale, the
 * conversion of dynamic (log) Young's modulus to static, and a linear
 * calibration for static Poisson's ratio. The correlations are those
 * compiled by Chang, Zoback & Khaksar 2006 (Empirical relations between
 * rock strength and physical properties in sedimentary rocks, J. Pet. Sci.
 * Eng. 51, 223-237, Tables 1 and 2), each cited to its original source as
 * that paper gives it; coefficients from memory. Every correlation holds
 * only for the rock and region it was fitted on: the info table gives its
 * lithology, region and the span of its input, and use outside the span
 * sets RW_STRENGTH_WARN_RANGE. The spans are approximate (from memory of
 * the sources' descriptions, or common practice where a source states
 * none): see range_note.
 *
 * SI at this API: slowness s/m, velocity m/s, density kg/m^3, moduli and
 * strength Pa, porosity a fraction. Screening estimates only: strength
 * from logs scatters by a factor of two or more about any correlation
 * (Chang et al. 2006); calibrate on core tests before any wellbore
 * stability decision. */
#ifndef ROCKWIRE_STRENGTH_H
#define ROCKWIRE_STRENGTH_H

#include "rockwire/status.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Warning bits. */
#define RW_STRENGTH_WARN_RANGE                                                 \
	0x1u /* input outside the correlation's calibration span */
#define RW_STRENGTH_WARN_ES_ABOVE_ED                                           \
	0x2u /* static modulus above the dynamic one: implausible for          \
	      * sedimentary rock (static is usually the lower) */

/* Lithology a correlation was fitted on. */
enum {
	RW_STRENGTH_SANDSTONE = 0,
	RW_STRENGTH_SHALE = 1,
	RW_STRENGTH_ANY = 2 /* fitted on several rock types */
};

/* The input a correlation uses. */
enum {
	RW_STRENGTH_IN_DT = 0,   /* compressional slowness dt_sm */
	RW_STRENGTH_IN_VP,       /* compressional velocity vp_ms */
	RW_STRENGTH_IN_M,        /* P-wave modulus rho vp^2 (rho_kgm3, vp_ms) */
	RW_STRENGTH_IN_E_STATIC, /* static Young's modulus e_static_pa */
	RW_STRENGTH_IN_E_DYNAMIC, /* dynamic Young's modulus e_dyn_pa */
	RW_STRENGTH_IN_PHI        /* porosity phi */
};

/* UCS correlations (Chang et al. 2006 numbering from memory). */
enum {
	RW_UCS_FREYBURG_1972 = 0, /* sandstone, vp */
	RW_UCS_MCNALLY_1987,      /* sandstone, dt */
	RW_UCS_GULF_SANDSTONE,    /* sandstone, dt */
	RW_UCS_MOOS_1999,         /* sandstone, rho vp^2 */
	RW_UCS_BRADFORD_1998,     /* sandstone, static E */
	RW_UCS_VERNIK_1993,       /* sandstone, porosity */
	RW_UCS_HORSRUD_2001,      /* shale, dt */
	RW_UCS_GOM_PLIOCENE,      /* shale, dt */
	RW_UCS_GLOBAL_SHALE,      /* shale, dt */
	RW_UCS_GOM_SHALE,         /* shale, dt */
	RW_UCS_LAL_1999,          /* shale, dt */
	RW_UCS_HORSRUD_2001_E,    /* shale, static E */
	RW_UCS_HORSRUD_2001_PHI,  /* shale, porosity */
	RW_UCS_COUNT
};

/* Dynamic-to-static Young's modulus conversions. */
enum {
	RW_ESTAT_EISSA_KAZI_1988 = 0, /* any rock, dynamic E */
	RW_ESTAT_HORSRUD_2001,        /* shale, vp */
	RW_ESTAT_COUNT
};

/* Inputs of a sample; only those a correlation uses are read (the others
 * may be NaN). */
typedef struct rw_strength_in {
	double dt_sm;
	double vp_ms;
	double rho_kgm3;
	double e_dyn_pa;
	double e_static_pa;
	double phi;
} rw_strength_in;

/* What a correlation is: its option name, lithology, input, formula in
 * its published units, source and region, and the calibration span of
 * its input in SI (in_min <= x <= in_max is inside). Static strings. */
typedef struct rw_strength_info {
	const char *name;
	int lithology;
	int input;
	const char *formula;
	const char *source;
	const char *region;
	double in_min;
	double in_max;
	const char *range_note;
} rw_strength_info;

/* Description of UCS correlation id, or NULL for an unknown id. */
const rw_strength_info *rw_strength_ucs_info(int id);

/* Id of the UCS correlation with this option name, or -1. */
int rw_strength_ucs_find(const char *name);

/* Unconfined compressive strength from correlation id, Pa. The formulas
 * (UCS in MPa; dt in us/ft, vp in m/s, rho in kg/m^3, E in GPa, as the
 * compilation writes them; coefficients from memory):
 *   FREYBURG_1972   0.035 vp - 31.5
 *   MCNALLY_1987    1200 exp(-0.036 dt)
 *   GULF_SANDSTONE  1.4138e7 dt^-3
 *   MOOS_1999       1.745e-9 rho vp^2 - 21
 *   BRADFORD_1998   2.28 + 4.1089 E
 *   VERNIK_1993     254 (1 - 2.7 phi)^2
 *   HORSRUD_2001    0.77 (304.8/dt)^2.93
 *   GOM_PLIOCENE    0.43 (304.8/dt)^3.2
 *   GLOBAL_SHALE    1.35 (304.8/dt)^2.6
 *   GOM_SHALE       0.5 (304.8/dt)^3
 *   LAL_1999        10 (304.8/dt - 1)
 *   HORSRUD_2001_E  7.97 E^0.91
 *   HORSRUD_2001_PHI 2.922 phi^-0.96
 * (304.8/dt with dt in us/ft is vp in km/s.) Warnings: RANGE.
 * errors: RW_EINVAL for an unknown id; RW_EDOM for the needed input
 * missing, non-finite or non-positive (porosity: outside (0, 1));
 * RW_ERANGE when the formula gives UCS <= 0 there (e.g. Lal 1999 at
 * vp <= 1 km/s) or Vernik 1993 past its minimum (phi > 1/2.7, where the
 * square would rise again). Output NaN on error. */
int rw_strength_ucs(int id, const rw_strength_in *in, double *ucs_pa,
                    unsigned *warn);

/* Description of static-modulus conversion id, or NULL. */
const rw_strength_info *rw_strength_e_static_info(int id);

/* Id of the static-modulus conversion with this option name, or -1. */
int rw_strength_e_static_find(const char *name);

/* Static Young's modulus, Pa (E in GPa in the formulas, from memory):
 *   EISSA_KAZI_1988  Es = 0.74 Ed - 0.82  (Eissa & Kazi 1988, Int. J. Rock
 *                    Mech. Min. Sci. 25(6); a wide range of rock types)
 *   HORSRUD_2001     Es = 0.076 vp^3.23, vp in km/s (Horsrud 2001, SPE
 *                    Drill. Completion 16(2); North Sea shales)
 * Warnings: RANGE; ES_ABOVE_ED when e_dyn_pa is given (finite) and below
 * the result.
 * errors: RW_EINVAL for an unknown id; RW_EDOM for the needed input
 * missing or non-positive; RW_ERANGE for a result <= 0. NaN on error. */
int rw_strength_e_static(int id, const rw_strength_in *in, double *e_pa,
                         unsigned *warn);

/* Linear calibration y = a x + b (a static property from a dynamic one,
 * with a and b from the user's core tests; a = 1, b = 0 keeps the dynamic
 * value, the common-practice default when no calibration exists).
 * errors: RW_EDOM for a non-finite argument (y NaN). */
int rw_strength_linear(double x, double a, double b, double *y);

/* Static Poisson's ratio nu_s = a nu_d + b, with nu_d in (-1, 0.5). No
 * published dynamic-to-static conversion for Poisson's ratio is widely
 * agreed; a = 1, b = 0 (static equals dynamic) is the common-practice
 * default.
 * errors: RW_EDOM for nu_d out of range or a non-finite argument;
 * RW_ERANGE for a result outside (-1, 0.5). NaN on error. */
int rw_strength_nu_static(double nu_dyn, double a, double b, double *nu_s);

#ifdef __cplusplus
}
#endif

#endif
