/* Weak elastic anisotropy of transversely isotropic media with a vertical
 * symmetry axis (VTI): Thomsen 1986 parameters from the five stiffnesses
 * and back, and the PP reflection coefficient of an interface between two
 * VTI media after Ruger 1997. Units: stiffnesses Pa, velocities m/s,
 * density kg/m^3, angles radians; Thomsen's epsilon, delta and gamma are
 * dimensionless. Stiffnesses use Voigt indices with 3 the symmetry axis.
 * Equation numbers are from memory. */
#ifndef ROCKWIRE_ANISO_H
#define ROCKWIRE_ANISO_H

#ifdef __cplusplus
extern "C" {
#endif

/* The five independent stiffnesses of a VTI medium (C12 = C11 - 2 C66). */
typedef struct rw_aniso_vti {
	double c11_pa;
	double c13_pa;
	double c33_pa;
	double c44_pa;
	double c66_pa;
} rw_aniso_vti;

/* A VTI medium by Thomsen's parameters. */
typedef struct rw_aniso_thomsen {
	double vp0_ms;   /* vertical P velocity sqrt(C33/rho), > 0 */
	double vs0_ms;   /* vertical S velocity sqrt(C44/rho), [0, vp0) */
	double rho_kgm3; /* density, > 0 */
	double epsilon;  /* (C11 - C33) / (2 C33) */
	double delta;    /* exact delta, Thomsen 1986 eq. 8c */
	double gamma;    /* (C66 - C44) / (2 C44) */
} rw_aniso_thomsen;

/* Checks that the stiffnesses are finite and positive definite (VTI
 * stability: C44 > 0, C66 > 0, C11 > C66, C33 > 0 and
 * C13^2 < C33 (C11 - C66), i.e. C11 > |C12| and C33 (C11 + C12) > 2 C13^2;
 * from memory, a standard result of linear elasticity).
 * errors: RW_EDOM (not finite or not positive definite). */
int rw_aniso_vti_check(const rw_aniso_vti *c);

/* Thomsen 1986, eqs. 8a-8c and 10: vp0 = sqrt(C33/rho),
 * vs0 = sqrt(C44/rho), epsilon = (C11 - C33)/(2 C33),
 * gamma = (C66 - C44)/(2 C44) and the exact
 * delta = ((C13 + C44)^2 - (C33 - C44)^2) / (2 C33 (C33 - C44)).
 * c: a stable VTI stiffness with C33 > C44; rho_kgm3 > 0.
 * errors: RW_EDOM (unstable or non-finite stiffness, C33 <= C44, rho not
 * positive); outputs NaN on failure. */
int rw_aniso_thomsen_from_stiff(const rw_aniso_vti *c, double rho_kgm3,
                                rw_aniso_thomsen *t);

/* Inverse of rw_aniso_thomsen_from_stiff: C33 = rho vp0^2,
 * C44 = rho vs0^2, C11 = C33 (1 + 2 epsilon), C66 = C44 (1 + 2 gamma) and
 * C13 = -C44 + sqrt(2 delta C33 (C33 - C44) + (C33 - C44)^2). The root
 * with C13 + C44 >= 0 is taken: it is the one continuous with the
 * isotropic medium (delta = 0 gives C13 = C33 - 2 C44 = lambda); the other
 * root, C13 < -C44, is not the medium Thomsen's delta was measured on in
 * sedimentary rock and is not returned.
 * t: vp0 > 0, 0 < vs0 < vp0, rho > 0, finite epsilon, delta, gamma.
 * errors: RW_EDOM (inputs outside those ranges, or delta below
 * -(C33 - C44)/(2 C33) so that no real C13 exists), RW_ERANGE (the
 * resulting stiffness is not positive definite); outputs NaN on
 * failure. */
int rw_aniso_stiff_from_thomsen(const rw_aniso_thomsen *t, rw_aniso_vti *c);

/* PP reflection coefficient of a welded interface between two VTI media
 * (Ruger 1997, from memory), at the INCIDENCE angle theta_rad in
 * [0, pi/2):
 *   R = 1/2 dZ/Z + 1/2 [dvp/vp - (2 vs/vp)^2 dG/G + d(delta)] sin^2
 *       + 1/2 [dvp/vp + d(epsilon)] sin^2 tan^2,
 * with Z = rho vp0, G = rho vs0^2, vertical velocities, d = lower - upper,
 * mean values in the denominators and in vs/vp. With no anisotropy it is
 * the three-term isotropic form (rw_reflect_shuey3, with impedance and
 * modulus contrasts in place of their linearised sums). gamma is checked
 * but not used. A medium with vs0 = 0 (a fluid) must have epsilon = delta
 * = gamma = 0.
 * errors: RW_EDOM (a medium invalid as in rw_aniso_stiff_from_thomsen
 * or the angle out of range), RW_ERANGE (a medium whose stiffness is not
 * positive definite). */
int rw_aniso_ruger_pp(const rw_aniso_thomsen *upper,
                      const rw_aniso_thomsen *lower, double theta_rad,
                      double *r);

#ifdef __cplusplus
}
#endif

#endif
