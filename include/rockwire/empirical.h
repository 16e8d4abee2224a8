/* Empirical rock-physics relations between velocity, density, porosity and
 * clay content: Gardner density, the Castagna mudrock line, the
 * Greenberg-Castagna shear-velocity estimate, Han's sandstone fits, the
 * Wyllie time average and the Raymer-Hunt-Gardner transform. SI units at
 * the API (m/s, kg/m^3, s/m; porosity, clay volume and fractions as
 * fractions). Each function returns an RW_* status, writes NaN outputs on
 * failure, and sets bits of *warn (RW_EMP_WARN_*) when an input or result
 * lies outside the range the relation was fitted on; warn may be NULL. A
 * warning never changes a result. */
#ifndef ROCKWIRE_EMPIRICAL_H
#define ROCKWIRE_EMPIRICAL_H

#include "rockwire/status.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Warning bits: the value is computed, but outside the fitted range. */
#define RW_EMP_WARN_VELOCITY 0x1u /* velocity outside the fitted range */
#define RW_EMP_WARN_DENSITY  0x2u /* density outside the fitted range */
#define RW_EMP_WARN_POROSITY 0x4u /* porosity outside the fitted range */
#define RW_EMP_WARN_CLAY     0x8u /* clay volume outside the fitted range */

/* Published Gardner, Gardner & Gregory 1974 constants: rho = a Vp^b with
 * rho in g/cm3 and Vp in m/s (their ft/s form is 0.23 Vp^0.25). */
#define RW_EMP_GARDNER_A 0.31
#define RW_EMP_GARDNER_B 0.25

/* Lithologies of Greenberg & Castagna 1992 (brine-saturated rock). */
enum {
	RW_EMP_SANDSTONE = 0,
	RW_EMP_LIMESTONE = 1,
	RW_EMP_DOLOMITE = 2,
	RW_EMP_SHALE = 3,
	RW_EMP_NLITH = 4
};

/* Pressure sets of the Han, Nur & Morgan 1986 water-saturated fits
 * (effective pressure, MPa). */
enum {
	RW_EMP_HAN_40MPA = 0,
	RW_EMP_HAN_30MPA = 1,
	RW_EMP_HAN_20MPA = 2,
	RW_EMP_HAN_10MPA = 3,
	RW_EMP_HAN_5MPA = 4,
	RW_EMP_HAN_NSETS = 5
};

/* Gardner density from P velocity, rho = 1000 a vp^b kg/m^3 (Gardner et
 * al. 1974), a in g/cm3 per (m/s)^b, b dimensionless; pass
 * RW_EMP_GARDNER_A and RW_EMP_GARDNER_B for the published fit.
 * vp_ms > 0, a > 0, b > 0, all finite.
 * warn: RW_EMP_WARN_VELOCITY outside 1500..6100 m/s (range of the data
 * the fit was drawn through, from memory; Mavko et al. 2009, sec. 7.9).
 * errors: RW_EDOM for a non-positive or non-finite argument;
 * RW_ERANGE if the result is not finite. */
int rw_emp_gardner_density(double vp_ms, double a, double b, double *rho_kgm3,
                           unsigned *warn);

/* Inverse Gardner: vp = (rho / (1000 a))^(1/b) m/s (Gardner et al. 1974).
 * rho_kgm3 > 0, a > 0, b > 0, all finite.
 * warn: RW_EMP_WARN_VELOCITY when the resulting vp is outside
 * 1500..6100 m/s (as above).
 * errors: RW_EDOM for a non-positive or non-finite argument;
 * RW_ERANGE if the result is not finite. */
int rw_emp_gardner_vp(double rho_kgm3, double a, double b, double *vp_ms,
                      unsigned *warn);

/* Mudrock line, vp = 1.16 vs + 1360 m/s (Castagna et al. 1985,
 * 1.36 km/s), for water-saturated clastic silicate rock.
 * vs_ms > 0 finite.
 * warn: RW_EMP_WARN_VELOCITY when vp is outside 1500..6000 m/s (approximate
 * span of their data, from memory).
 * errors: RW_EDOM for non-positive or non-finite vs. */
int rw_emp_mudrock_vp(double vs_ms, double *vp_ms, unsigned *warn);

/* Inverse mudrock line, vs = (vp - 1360) / 1.16 m/s (Castagna et al.
 * 1985). vp_ms > 1360 finite (otherwise vs would not be positive).
 * warn: RW_EMP_WARN_VELOCITY when vp is outside 1500..6000 m/s.
 * errors: RW_EDOM for vp <= 1360 m/s or non-finite. */
int rw_emp_mudrock_vs(double vp_ms, double *vs_ms, unsigned *warn);

/* Greenberg & Castagna 1992 shear velocity of brine-saturated pure
 * lithology lith (RW_EMP_SANDSTONE..RW_EMP_SHALE):
 * vs = a2 vp^2 + a1 vp + a0 in km/s (their regression table, as quoted in
 * Mavko et al. 2009 sec. 7.9; coefficients from memory).
 * vp_ms > 0 finite.
 * warn: RW_EMP_WARN_VELOCITY when vp is outside 1500..7000 m/s (common
 * practice: from brine-like to dolomite velocities).
 * errors: RW_EINVAL for an unknown lith; RW_EDOM for non-positive or
 * non-finite vp; RW_ERANGE when the fit gives vs <= 0 (vp below about
 * 1.07 km/s for sandstone, 1.13 km/s for shale). */
int rw_emp_gc_vs(double vp_ms, int lith, double *vs_ms, unsigned *warn);

/* Greenberg & Castagna 1992 mixed-lithology shear velocity: the average of
 * the volume-weighted arithmetic and harmonic means of the pure-lithology
 * estimates, vs = 0.5 (sum f_i vs_i + 1 / sum (f_i / vs_i)), for
 * brine-saturated rock. frac[RW_EMP_NLITH] are volume fractions of the
 * solid, indexed by RW_EMP_SANDSTONE..RW_EMP_SHALE, each in [0, 1],
 * summing to 1 within 1e-6 (they are not renormalised). Lithologies with
 * zero fraction do not enter. vp_ms > 0 finite.
 * warn: as rw_emp_gc_vs.
 * errors: RW_EDOM for vp or a fraction out of range or non-finite;
 * RW_EINVAL when the fractions do not sum to 1; RW_ERANGE when a
 * lithology present gives vs <= 0. */
int rw_emp_gc_vs_mixed(double vp_ms, const double frac[RW_EMP_NLITH],
                       double *vs_ms, unsigned *warn);

/* Han, Nur & Morgan 1986 water-saturated shaly-sandstone fits
 * vp = A - B phi - C c, vs = D - E phi - F c (km/s) at the effective
 * pressure set pset (RW_EMP_HAN_40MPA is their headline fit; the lower
 * pressure sets are as tabulated in Mavko et al. 2009 sec. 7.9; all
 * coefficients from memory). phi porosity and clay volume fraction of
 * bulk rock, each in [0, 1], phi + clay <= 1.
 * warn: RW_EMP_WARN_POROSITY for phi outside 0.02..0.30 and
 * RW_EMP_WARN_CLAY for clay above 0.50 (the span of their 75 samples,
 * from memory).
 * errors: RW_EINVAL for an unknown pset; RW_EDOM for phi or clay out of
 * range or non-finite; RW_ERANGE when a fitted velocity is <= 0. */
int rw_emp_han_velocities(double phi, double clay, int pset, double *vp_ms,
                          double *vs_ms, unsigned *warn);

/* Wyllie et al. 1956 time average, 1/v = phi/v_fl + (1 - phi)/v_ma.
 * 0 < v_fl_ms < v_ma_ms finite, phi in [0, 1].
 * warn: RW_EMP_WARN_POROSITY for phi > 0.30 (common practice: the time
 * average is for consolidated rock and reads high in soft sand).
 * errors: RW_EDOM for arguments out of range or non-finite. */
int rw_emp_wyllie_velocity(double phi, double v_ma_ms, double v_fl_ms,
                           double *v_ms, unsigned *warn);

/* Wyllie et al. 1956 porosity from slowness,
 * phi = (dt - dt_ma) / (dt_fl - dt_ma), slownesses in s/m with
 * 0 < dt_ma < dt_fl finite and dt in [dt_ma, dt_fl].
 * warn: RW_EMP_WARN_POROSITY for phi > 0.30 (as above).
 * errors: RW_EDOM for arguments out of range or non-finite (a slowness
 * faster than the matrix or slower than the fluid has no porosity). */
int rw_emp_wyllie_porosity_dt(double dt_sm, double dt_ma_sm, double dt_fl_sm,
                              double *phi, unsigned *warn);

/* Wyllie et al. 1956 porosity from velocity (the slowness form with
 * dt = 1/v). 0 < v_fl_ms < v_ma_ms finite, v_ms in [v_fl_ms, v_ma_ms].
 * warn and errors as rw_emp_wyllie_porosity_dt. */
int rw_emp_wyllie_porosity(double v_ms, double v_ma_ms, double v_fl_ms,
                           double *phi, unsigned *warn);

/* Raymer, Hunt & Gardner 1980 velocity, v = (1 - phi)^2 v_ma + phi v_fl,
 * their form for phi < 0.37. 0 < v_fl_ms < v_ma_ms finite, phi in [0, 1].
 * warn: RW_EMP_WARN_POROSITY for phi >= 0.37 (outside the published form;
 * they interpolate to a suspension model above it).
 * errors: RW_EDOM for arguments out of range or non-finite. */
int rw_emp_rhg_velocity(double phi, double v_ma_ms, double v_fl_ms,
                        double *v_ms, unsigned *warn);

/* Raymer, Hunt & Gardner 1980 porosity from velocity: the root of
 * v_ma x^2 - v_fl x + (v_fl - v) = 0 with x = 1 - phi, taking
 * x = (v_fl + sqrt(v_fl^2 + 4 v_ma (v - v_fl))) / (2 v_ma), the branch on
 * which v falls as phi rises (the other root gives phi > 1 - v_fl/(2 v_ma)
 * where the formula turns back). 0 < v_fl_ms < v_ma_ms finite and
 * v_ms <= v_ma_ms.
 * warn: RW_EMP_WARN_POROSITY when the result is >= 0.37.
 * errors: RW_EDOM for arguments out of range or non-finite, or v below the
 * minimum of the quadratic (no real root). */
int rw_emp_rhg_porosity(double v_ms, double v_ma_ms, double v_fl_ms,
                        double *phi, unsigned *warn);

/* Greenberg & Castagna 1992 shear velocity of a rock holding another
 * pore fluid than brine (hydrocarbons): their relations hold for brine
 * saturation, so the in-situ vs is the fixed point of: Gassmann from the
 * in-situ fluid to brine with the trial vs, the brine-case vs from the
 * brine vp (rw_emp_gc_vs_mixed), and back to the in-situ fluid, where mu
 * is unchanged and vs = vs_brine sqrt(rho_brine / rho) (Greenberg &
 * Castagna 1992; Mavko, Mukerji & Dvorkin 2009 sec. 7.9). Solved with
 * GSL's Brent root finder to 1e-10 relative. vp_ms, rho_kgm3 measured in
 * situ; phi in (0, 1); k_min_pa the mineral; k_fl/rho_fl the in-situ
 * fluid; k_brine/rho_brine the brine that replaces it; frac as
 * rw_emp_gc_vs_mixed. vs_brine_ms (may be NULL) receives the brine-case
 * vs. warn: as rw_emp_gc_vs, for the brine vp.
 * errors: RW_EDOM for an input out of range or non-finite; RW_ERANGE when
 * no shear velocity is consistent (Gassmann fails over the whole range,
 * e.g. the fluid is stiffer than the rock allows); RW_EMAXITER when the
 * iteration does not converge. *vs_ms NaN on error. */
int rw_emp_gc_vs_insitu(double vp_ms, double rho_kgm3, double phi,
                        double k_min_pa, double k_fl_pa, double rho_fl_kgm3,
                        double k_brine_pa, double rho_brine_kgm3,
                        const double frac[RW_EMP_NLITH], double *vs_ms,
                        double *vs_brine_ms, unsigned *warn);

#ifdef __cplusplus
}
#endif

#endif
