/* Pore-fluid properties for the rockwire compute core: density, adiabatic
 * bulk modulus and sound speed of water, brine, hydrocarbon gas, dead oil
 * and live oil after Batzle & Wang 1992 (Geophysics 57(11)), and the
 * mixing of several pore-fluid phases by saturation (Wood 1955, Brie et al.
 * 1995, Voigt). All functions are per sample, pure and allocation-free.
 *
 * Units at this API: pressure MPa (absolute), temperature degC (the units
 * Batzle & Wang fitted their correlations in), salinity as a weight
 * fraction of NaCl (ppm / 1e6), gas gravity relative to air (molar-mass
 * ratio), oil gravity in degrees API, gas-oil ratio in L/L (volume of gas
 * at standard conditions per volume of stock-tank oil), density kg/m^3,
 * bulk modulus Pa, velocity m/s.
 *
 * Every property function writes a bit set of RW_FLUID_WARN_* to *warn
 * (NULL allowed; the set is overwritten, not OR-ed) when an input lies
 * outside the range the correlation was fitted to. The result is still
 * computed and returned with RW_OK: a warning means "extrapolated", not
 * "wrong". Inputs that no real pore fluid can have are RW_EDOM with NaN
 * outputs. The fitted ranges (RW_FLUID_*_MIN/MAX below) are, unless stated,
 * taken from the Batzle & Wang 1992 text and figures as remembered
 * ("from memory"); the water and brine ranges were checked against
 * IAPWS-95 and IAPWS-08 (tests/reference/test_fluid_iapws.py). */
#ifndef ROCKWIRE_FLUID_H
#define ROCKWIRE_FLUID_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Gas-oil ratio: 1 scf/bbl in L/L. 1 bbl = 0.158987294928 m^3 (42 US gal
 * of 231 in^3), 1 scf = 1 ft^3 = 0.028316846592 m^3 (0.3048^3), so
 * 1 scf/bbl = 0.028316846592 / 0.158987294928 = 0.178107607 L/L. */
#define RW_FLUID_SCF_PER_BBL_IN_LL (0.028316846592 / 0.158987294928)

/* Molar mass of dry air, kg/mol; gas gravity G is M_gas / M_air (CRC
 * Handbook value 28.9644 g/mol, from memory). Batzle & Wang 1992 eq. 10a
 * print 28.8 G; the core uses the defining value, 0.57 % higher. */
#define RW_FLUID_AIR_MOLAR_MASS 0.0289644
/* Molar gas constant, J/(mol K) (CODATA 2018, exact by SI definition). */
#define RW_FLUID_GAS_CONSTANT 8.314462618
/* Celsius to kelvin offset. */
#define RW_FLUID_KELVIN 273.15

/* Warning bits (a set; 0 = inside every fitted range). */
#define RW_FLUID_WARN_T_RANGE   0x01u /* temperature outside fitted range */
#define RW_FLUID_WARN_P_RANGE   0x02u /* pressure outside fitted range */
#define RW_FLUID_WARN_SAL_RANGE 0x04u /* salinity outside fitted range */
#define RW_FLUID_WARN_G_RANGE   0x08u /* gas gravity outside fitted range */
#define RW_FLUID_WARN_API_RANGE 0x10u /* oil API gravity outside fit */
#define RW_FLUID_WARN_PR_RANGE                                                 \
	0x20u /* gas pseudo-reduced T or p outside                             \
	       * the Z-factor fit */
#define RW_FLUID_WARN_GOR_MAX                                                  \
	0x40u /* GOR above the gas the oil can                                 \
	       * dissolve at p, T (B&W eq. 21):                                \
	       * free gas would be present */
#define RW_FLUID_WARN_VAPOUR                                                   \
	0x80u /* p below the saturation pressure                               \
	       * of pure water at T (IAPWS-IF97                                \
	       * eq. 30): water would boil; the                                \
	       * liquid correlation is extrapolated */

/* Fitted ranges (warning thresholds), see the header paragraph.
 * Water and brine, B&W 1992 (from memory: the velocity polynomial eq. 28
 * reproduces data to about 100 degC and 100 MPa; brine data to about
 * 0.3 weight fraction NaCl). Measured against IAPWS-95 (pure water) the
 * core stays within 0.24 % in density and 0.39 % in velocity over
 * 20-100 degC, 5-100 MPa; beyond 100 degC the velocity error grows (0.67 %
 * to 150 degC, 1.5 % to 250 degC, 8 % at 350 degC) while density stays
 * within 0.6 % to 250 degC; 35 g/kg brine is within 0.40 % (density) and
 * 0.72 % (velocity) of IAPWS-08 seawater at 0-40 degC, 0.1-100 MPa
 * (tests/reference/test_fluid_iapws.py). */
#define RW_FLUID_WATER_T_MIN   0.0
#define RW_FLUID_WATER_T_MAX   100.0
#define RW_FLUID_WATER_P_MIN   0.1
#define RW_FLUID_WATER_P_MAX   100.0
#define RW_FLUID_BRINE_SAL_MAX 0.30
/* Hard limits for water and brine. Below -22 degC no liquid water is
 * stable at any pressure (ice Ih-III-liquid triple point -21.985 degC at
 * 209.9 MPa; the NaCl-H2O eutectic is -21.2 degC; handbook values from
 * memory). NaCl solubility stays below 0.35 weight fraction up to about
 * 300 degC (from memory), so salinity must lie in [0, 0.35]. */
#define RW_FLUID_WATER_T_LIQUID_MIN (-22.0)
#define RW_FLUID_BRINE_SAL_LIMIT    0.35

/* Gas (B&W 1992, from memory: gravity 0.56 for methane to about 1.8 for
 * heavy gases; the Z fit (their eq. 10, after Thomas et al. 1970) covers
 * the Standing-Katz chart range of pseudo-reduced temperature 1.05-3.0
 * and pseudo-reduced pressure up to 15, from memory). The core's Z tends
 * to 1 within 2.6 % as p -> 0 only for T_pr in about 0.6-2.6 (measured in
 * tests/unit/test_fluid.c), so RW_FLUID_GAS_TPR_MAX is 2.6. Temperature
 * and pressure ranges are those of B&W's figures (from memory). */
#define RW_FLUID_GAS_G_MIN   0.55
#define RW_FLUID_GAS_G_MAX   1.8
#define RW_FLUID_GAS_TPR_MIN 1.05
#define RW_FLUID_GAS_TPR_MAX 2.6
#define RW_FLUID_GAS_PPR_MAX 15.0
#define RW_FLUID_GAS_T_MIN   0.0
#define RW_FLUID_GAS_T_MAX   350.0
#define RW_FLUID_GAS_P_MAX   100.0

/* Oil (B&W 1992, from memory: API from about 5 for heavy oils to about
 * 60 for light oils in the velocity data; temperatures to about 150 degC
 * and pressures to about 100 MPa in their oil figures). */
#define RW_FLUID_OIL_API_MIN 5.0
#define RW_FLUID_OIL_API_MAX 60.0
#define RW_FLUID_OIL_T_MIN   0.0
#define RW_FLUID_OIL_T_MAX   150.0
#define RW_FLUID_OIL_P_MAX   100.0

/* One pore-fluid phase: density kg/m^3, adiabatic bulk modulus Pa, sound
 * speed m/s (k = rho v^2). */
typedef struct rw_fluid_phase {
	double rho_kgm3;
	double k_pa;
	double v_ms;
} rw_fluid_phase;

/* Pure water after Batzle & Wang 1992: density eq. 27a, velocity eq. 28
 * (polynomial in T and P with the 5x4 table w_ij), K = rho v^2.
 * p_mpa: absolute pressure, > 0 MPa; t_degc: >= -22 degC (liquid).
 * Warnings: T_RANGE, P_RANGE, VAPOUR.
 * errors: RW_EDOM for p <= 0, t < -22 degC or non-finite input;
 * RW_ERANGE when the polynomials give a non-positive density or velocity
 * (far outside the fit). Outputs NaN on error. */
int rw_fluid_water_props(double p_mpa, double t_degc, rw_fluid_phase *out,
                         unsigned *warn);

/* NaCl brine after Batzle & Wang 1992: density eq. 27b, velocity eq. 29,
 * K = rho v^2. sal_frac: NaCl weight fraction in [0, 0.35]; p, t as for
 * water. Warnings: T_RANGE, P_RANGE, SAL_RANGE (sal > 0.30), VAPOUR (pure
 * water curve: brine boils a little higher, so the flag errs on the safe
 * side).
 * errors: RW_EDOM for p <= 0, t < -22 degC, salinity outside [0, 0.35] or
 * non-finite input; RW_ERANGE for a non-positive result. NaN on error. */
int rw_fluid_brine_props(double p_mpa, double t_degc, double sal_frac,
                         rw_fluid_phase *out, unsigned *warn);

/* Saturation (boiling) pressure of pure water at t_degc, MPa, after
 * IAPWS-IF97 eq. 30 (valid 0.01-373.946 degC).
 * errors: RW_EDOM for t outside [0, 373.946] degC (*psat_mpa NaN). */
int rw_fluid_water_psat(double t_degc, double *psat_mpa);

/* Hydrocarbon gas after Batzle & Wang 1992: pseudo-critical temperature
 * and pressure from gravity (eqs. 9a, 9b), compressibility factor Z
 * (eq. 10b, 10c), density rho = M p / (Z R T) with M = G M_air (eq. 10a),
 * adiabatic bulk modulus K_S = p gamma_0 / (1 - (P_pr/Z) dZ/dP_pr)
 * (eqs. 11a, 11b; dZ/dP_pr analytic). gravity: > 0 and below 12 (where
 * eq. 9b's pseudo-critical pressure reaches zero). z may be NULL.
 * Warnings: G_RANGE, PR_RANGE, T_RANGE, P_RANGE.
 * errors: RW_EDOM for p <= 0, t <= -273.15 degC, gravity outside (0, 12)
 * or non-finite input; RW_ERANGE when Z or the K_S denominator is not
 * positive (far outside the fit). Outputs (and *z) NaN on error. */
int rw_fluid_gas_props(double p_mpa, double t_degc, double gravity,
                       rw_fluid_phase *out, double *z, unsigned *warn);

/* Dead (gas-free) oil after Batzle & Wang 1992: reference density
 * rho_0 = 141.5 / (API + 131.5) g/cm^3, pressure correction eq. 18,
 * temperature correction eq. 19, velocity eq. 20a, K = rho v^2.
 * api: > 0 and such that rho_0 < 1.08 g/cm^3 (eq. 20a's square root;
 * API > 0.5). Warnings: API_RANGE, T_RANGE, P_RANGE.
 * errors: RW_EDOM for p <= 0, t <= -273.15 degC, api <= 0.5 or non-finite;
 * RW_ERANGE for a non-positive result. NaN on error. */
int rw_fluid_deadoil_props(double p_mpa, double t_degc, double api,
                           rw_fluid_phase *out, unsigned *warn);

/* Live (gas-saturated) oil after Batzle & Wang 1992. gor_ll: dissolved
 * gas R_G in L/L (>= 0); gas_gravity of the dissolved gas (> 0).
 * Formation volume factor B_0 eq. 23, density at saturation
 * rho_G = (rho_0 + 0.0012 G R_G) / B_0 (eq. 24), pseudo-density
 * rho' = (rho_0 / B_0) / (1 + 0.001 R_G) (eq. 22) used in place of rho_0
 * in the velocity eq. 20b; K = rho_G v^2. Eq. 24 is the density at the
 * bubble point; compression of the oil above it is not modelled. b0 may be
 * NULL. Warnings: as dead oil, plus G_RANGE, and GOR_MAX when gor_ll
 * exceeds R_G(max) of eq. 21 at p, t: the oil cannot hold that much gas,
 * free gas would coexist, and the single-phase live-oil relations do not
 * apply, so the outputs are NaN with RW_ERANGE (a GOR of 3000 L/L would
 * otherwise give an "oil" of 0.27 g/cm^3 at 217 m/s).
 * errors: RW_EDOM for p <= 0, t <= -273.15 degC, api <= 0.5, gor < 0,
 * gas_gravity <= 0, rho' >= 1.08 g/cm^3 or non-finite input; RW_ERANGE
 * for GOR above R_G(max) or a non-positive result. Outputs (and *b0) NaN
 * on error. */
int rw_fluid_liveoil_props(double p_mpa, double t_degc, double api,
                           double gor_ll, double gas_gravity,
                           rw_fluid_phase *out, double *b0, unsigned *warn);

/* Mixtures of n pore-fluid phases with saturations sat[i] (fractions of
 * the pore volume, each in [0, 1], summing to 1 within 1e-6; they are used
 * as given, not renormalised). Each phase needs k_pa > 0 and rho_kgm3 > 0.
 * Density is always the saturation-weighted mean; v = sqrt(k / rho).
 * errors: RW_EINVAL for n == 0, NULL arrays or a saturation sum off by
 * more than 1e-6; RW_EDOM for a saturation outside [0, 1] or a phase with
 * non-positive or non-finite k or rho. Output NaN on error. */

/* Wood 1955 (uniform saturation): 1/K = sum S_i / K_i (Reuss average). */
int rw_fluid_mix_wood(size_t n, const rw_fluid_phase *phase, const double *sat,
                      rw_fluid_phase *out);

/* Voigt average K = sum S_i K_i (patchy-saturation upper bound). */
int rw_fluid_mix_voigt(size_t n, const rw_fluid_phase *phase, const double *sat,
                       rw_fluid_phase *out);

/* Brie et al. 1995 patchy mixing: K = (K_liquid - K_gas) (1 - S_gas)^e
 * + K_gas, where phase[i_gas] is the gas with saturation S_gas and
 * K_liquid is the Wood mix of all other (liquid: brine, oil) phases with
 * their saturations renormalised to sum to 1. Without gas (i_gas >= n) it
 * is the Wood mix of all phases; with gas alone (S_gas = 1), K_gas.
 * exponent e >= 1 (e = 1 is the Voigt average for one liquid and one gas
 * phase; e < 1 would exceed the Voigt bound). As e grows K falls towards
 * K_gas; for large e (about 5 and more for gas and brine) it drops below
 * the Wood mix of all phases, as the published formula does.
 * errors: as above, plus RW_EDOM for e < 1 or non-finite e. */
int rw_fluid_mix_brie(size_t n, const rw_fluid_phase *phase, const double *sat,
                      size_t i_gas, double exponent, rw_fluid_phase *out);

#ifdef __cplusplus
}
#endif

#endif
