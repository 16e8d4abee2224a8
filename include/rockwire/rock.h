/* Rock-frame relations of the rockwire compute core: Gassmann 1951 fluid
 * substitution (saturated modulus from the dry frame and back), the
 * substitution of one pore fluid for another in a measured rock (velocities
 * and density in, velocities and density out), and the saturated rock from
 * a dry frame. Pure, allocation-free, per sample. Units: moduli Pa,
 * density kg/m^3, velocity m/s, porosity a fraction.
 *
 * Gassmann assumes a monomineralic (or effective-mineral), isotropic,
 * homogeneous frame with connected pores and relaxed (low-frequency) pore
 * pressure; the shear modulus does not depend on the fluid. */
#ifndef ROCKWIRE_ROCK_H
#define ROCKWIRE_ROCK_H

#ifdef __cplusplus
extern "C" {
#endif

/* Warning bits (a set; 0 = none). The result is still computed. */
#define RW_ROCK_WARN_KDRY_NEG                                                  \
	0x01u /* dry-frame K < 0: the inputs are                               \
	       * inconsistent with Gassmann (e.g. a                            \
	       * wrong K_min, K_fl or porosity) */
#define RW_ROCK_WARN_KDRY_GT_KMIN                                              \
	0x02u                      /* dry-frame K > mineral K: a frame         \
	                            * stiffer than its mineral */
#define RW_ROCK_WARN_PHI_LOW 0x04u /* porosity below RW_ROCK_PHI_LOW */

/* Low-porosity warning threshold, a fraction. Below about 5 % the change
 * K_sat - K_dry is small next to the uncertainty of K_min and of the
 * measured moduli, so the inversion to K_dry amplifies errors roughly as
 * 1/phi (common practice; the conservative end of the 0.02-0.05 range in
 * use, chosen because the results may feed drilling decisions). */
#define RW_ROCK_PHI_LOW 0.05

/* Saturated bulk modulus from the dry frame, Gassmann 1951 (as written in
 * Mavko, Mukerji & Dvorkin 2009, chapter 6):
 *   K_sat = K_dry + (1 - K_dry/K_min)^2 /
 *           (phi/K_fl + (1 - phi)/K_min - K_dry/K_min^2).
 * k_dry_pa >= 0 (a negative value is computed and flagged), k_min_pa > 0,
 * k_fl_pa > 0, phi in (0, 1). warn may be NULL (overwritten, not OR-ed).
 * Warnings: PHI_LOW, KDRY_NEG, KDRY_GT_KMIN.
 * errors: RW_EDOM for phi outside (0, 1), k_min <= 0, k_fl <= 0 or a
 * non-finite input; RW_ERANGE when the denominator is not positive or the
 * result is not finite. *k_sat_pa NaN on error. */
int rw_rock_gassmann_sat(double k_dry_pa, double k_min_pa, double k_fl_pa,
                         double phi, double *k_sat_pa, unsigned *warn);

/* Dry-frame bulk modulus from the saturated one, Gassmann 1951 inverted
 * (Mavko, Mukerji & Dvorkin 2009, chapter 6):
 *   K_dry = [K_sat (phi K_min/K_fl + 1 - phi) - K_min] /
 *           [phi K_min/K_fl + K_sat/K_min - 1 - phi].
 * k_sat_pa > 0, other arguments and warnings as rw_rock_gassmann_sat
 * (the KDRY_* warnings refer to the computed K_dry).
 * errors: RW_EDOM as above or k_sat <= 0; RW_ERANGE when the denominator
 * is zero or the result not finite. *k_dry_pa NaN on error. */
int rw_rock_gassmann_dry(double k_sat_pa, double k_min_pa, double k_fl_pa,
                         double phi, double *k_dry_pa, unsigned *warn);

/* Result of a substitution: velocities, density and moduli of the rock
 * with the new fluid, and the dry-frame bulk modulus used. */
typedef struct rw_rock_subst {
	double vp_ms;
	double vs_ms;
	double rho_kgm3;
	double k_sat_pa;
	double mu_pa;
	double k_dry_pa;
} rw_rock_subst;

/* Gassmann fluid substitution of a measured rock. From vp_ms > 0,
 * vs_ms >= 0 (with vp^2 > 4/3 vs^2, i.e. K > 0), rho_kgm3 > 0, porosity
 * phi in (0, 1), mineral k_min_pa > 0 and the old and new pore fluids
 * (k > 0, rho > 0): mu = rho vs^2, K_1 = rho vp^2 - 4/3 mu, K_dry from
 * K_1 and the old fluid, K_2 from K_dry and the new fluid,
 * rho_2 = rho + phi (rho_fl_new - rho_fl_old), vp_2 = sqrt((K_2 + 4/3 mu)
 * / rho_2), vs_2 = sqrt(mu / rho_2) (Mavko, Mukerji & Dvorkin 2009,
 * chapter 6). warn may be NULL. Warnings: as rw_rock_gassmann_sat.
 * errors: RW_EDOM for an input outside the ranges above or non-finite;
 * RW_ERANGE when rho_2 <= 0, K_2 <= 0 or a Gassmann denominator vanishes.
 * All outputs NaN on error. */
int rw_rock_fluid_subst(double vp_ms, double vs_ms, double rho_kgm3, double phi,
                        double k_min_pa, double k_fl_old_pa,
                        double rho_fl_old_kgm3, double k_fl_new_pa,
                        double rho_fl_new_kgm3, rw_rock_subst *out,
                        unsigned *warn);

/* Saturated rock from a dry frame: k_dry_pa >= 0, mu_dry_pa >= 0,
 * phi in (0, 1), mineral k_min_pa > 0 and rho_min_kgm3 > 0, fluid
 * k_fl_pa > 0 and rho_fl_kgm3 > 0. rho = (1 - phi) rho_min + phi rho_fl,
 * K_sat by Gassmann, mu = mu_dry, vp = sqrt((K_sat + 4/3 mu) / rho),
 * vs = sqrt(mu / rho); out->k_dry_pa echoes k_dry_pa. warn may be NULL.
 * Warnings: as rw_rock_gassmann_sat.
 * errors: RW_EDOM for an input outside those ranges or non-finite;
 * RW_ERANGE as rw_rock_gassmann_sat. All outputs NaN on error. */
int rw_rock_gassmann_frame(double k_dry_pa, double mu_dry_pa, double phi,
                           double k_min_pa, double rho_min_kgm3, double k_fl_pa,
                           double rho_fl_kgm3, rw_rock_subst *out,
                           unsigned *warn);

#ifdef __cplusplus
}
#endif

#endif
