/* Isotropic elastic conversions: from density plus any two independent
 * elastic quantities to the full set of velocities, moduli, impedances and
 * slownesses. All quantities in SI: m/s, kg/m^3, Pa, kg/(m^2 s), s/m. */
#ifndef ROCKWIRE_ELASTIC_H
#define ROCKWIRE_ELASTIC_H

#include "rockwire/status.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The full isotropic set. Impedances ai = rho vp, si = rho vs; slownesses
 * dtp = 1/vp, dts = 1/vs; m is the P-wave modulus rho vp^2; e is Young's
 * modulus; nu is Poisson's ratio; vpvs the velocity ratio. */
typedef struct rw_elastic {
	double vp, vs, rho;
	double k, mu, lambda, e, nu, m;
	double ai, si, vpvs, dtp, dts;
} rw_elastic;

/* The quantities an input pair may name (density is given separately). */
typedef enum rw_elastic_qty {
	RW_Q_VP,
	RW_Q_VS,
	RW_Q_K,
	RW_Q_MU,
	RW_Q_LAMBDA,
	RW_Q_E,
	RW_Q_NU,
	RW_Q_M,
	RW_Q_AI,
	RW_Q_SI,
	RW_Q_VPVS,
	RW_Q_DTP,
	RW_Q_DTS,
	RW_Q_COUNT
} rw_elastic_qty;

/* Why a pair is not accepted, from rw_elastic_pair_check. */
typedef enum rw_elastic_pair {
	RW_PAIR_OK = 0,
	RW_PAIR_SAME,      /* the same quantity twice */
	RW_PAIR_DEPENDENT, /* both fix the same thing, e.g. vp and ai */
	RW_PAIR_TWO_ROOTS  /* the pair has two valid solutions, e.g. vp and e */
} rw_elastic_pair;

/* Why a sample is physically impossible: bits set by the conversions. */
#define RW_ELASTIC_BAD_INPUT                                                   \
	0x1u                    /* non-finite, non-positive velocity or        \
	                           slowness, or no real solution */
#define RW_ELASTIC_BAD_RHO 0x2u /* density <= 0 */
#define RW_ELASTIC_BAD_MU  0x4u /* shear modulus <= 0 (nu >= 0.5) */
#define RW_ELASTIC_BAD_K   0x8u /* bulk modulus <= 0 (nu <= -1) */

/* Classifies the pair (a, b) as determining an isotropic solid with a
 * given density or not. Pure; no errors. */
rw_elastic_pair rw_elastic_pair_check(rw_elastic_qty a, rw_elastic_qty b);

/* Short lower-case name of a quantity ("vp", "nu", ...), NULL when out of
 * range. The names are those of the rw_elastic members. */
const char *rw_elastic_qty_name(rw_elastic_qty q);

/* Computes the full set from density rho (kg/m^3) and the values of two
 * quantities a and b (SI). The pair must pass rw_elastic_pair_check.
 * The two given quantities are returned exactly as given (and a given
 * velocity's impedance, slowness and vp/vs follow from it directly).
 * *why (may be NULL) receives RW_ELASTIC_BAD_* bits when the sample is
 * impossible.
 * errors: RW_EINVAL for a pair that is not accepted; RW_EDOM when the
 * sample is physically impossible (all outputs NaN). */
int rw_elastic_from_pair(double rho, rw_elastic_qty a, double va,
                         rw_elastic_qty b, double vb, rw_elastic *out,
                         unsigned *why);

/* Computes the full set from vp, vs (m/s) and rho (kg/m^3), the usual log
 * case. Same errors and *why as rw_elastic_from_pair. */
int rw_elastic_from_velocities(double vp, double vs, double rho,
                               rw_elastic *out, unsigned *why);

/* Computes the full set from rho (kg/m^3), the P-wave modulus m and the
 * shear modulus mu (Pa). Impossible when rho <= 0, mu <= 0 or
 * k = m - 4/3 mu <= 0 (equivalently nu outside (-1, 0.5)).
 * errors: RW_EDOM (outputs NaN, *why set). */
int rw_elastic_from_moduli(double rho, double m, double mu, rw_elastic *out,
                           unsigned *why);

#ifdef __cplusplus
}
#endif

#endif
