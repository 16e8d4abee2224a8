/* Reflectivity of plane waves at a welded planar interface between two
 * isotropic media: the exact Zoeppritz solution for an incident P wave,
 * critical angles, the published linearisations (Aki-Richards, Shuey,
 * Hilterman, Fatti, Gray, Smith-Gidlow), intercept/gradient/curvature, AVO
 * classes, and elastic impedance (Connolly EI, normalised EI, EEI). Every
 * function works on one sample and one angle; callers own arrays.
 *
 * Units: velocities m/s, densities kg/m^3, angles radians. "upper" is the
 * medium the incident P wave travels in (downgoing), "lower" the medium
 * below the interface. A medium is valid when vp > 0, rho > 0, vs >= 0 (vs
 * = 0 is a fluid) and its bulk modulus is positive, 3 vp^2 > 4 vs^2
 * (Poisson's ratio above -1); anything else is impossible and gives
 * RW_EDOM. Poisson's ratio below 0 (vs > vp / sqrt 2) is unusual for rock
 * but accepted: flagging it is the caller's business. All inputs must be
 * finite. */
#ifndef ROCKWIRE_REFLECT_H
#define ROCKWIRE_REFLECT_H

#ifdef __cplusplus
extern "C" {
#endif

/* One isotropic medium. */
typedef struct rw_reflect_medium {
	double vp_ms;    /* P-wave velocity, m/s, > 0 */
	double vs_ms;    /* S-wave velocity, m/s, >= 0 (0: fluid) */
	double rho_kgm3; /* bulk density, kg/m^3, > 0 */
} rw_reflect_medium;

/* A complex number as two doubles (no compiler or GSL complex type in the
 * public API). */
typedef struct rw_reflect_cplx {
	double re;
	double im;
} rw_reflect_cplx;

/* Displacement-amplitude coefficients for an incident P wave. */
typedef struct rw_reflect_pcoefs {
	rw_reflect_cplx rpp; /* reflected P / incident P */
	rw_reflect_cplx rps; /* reflected S / incident P */
	rw_reflect_cplx tpp; /* transmitted P / incident P */
	rw_reflect_cplx tps; /* transmitted S / incident P */
} rw_reflect_pcoefs;

/* Checks one medium against the rules in the file comment.
 * errors: RW_EDOM (non-finite, vp <= 0, rho <= 0, vs < 0, or
 * 3 vp^2 <= 4 vs^2). */
int rw_reflect_medium_check(const rw_reflect_medium *m);

/* Exact P-wave reflection and transmission coefficients (Zoeppritz 1919)
 * in the explicit form of Aki & Richards 1980, eq. 5.39 (equation and
 * section numbers in this file are from memory of the first edition), for
 * incidence angle theta_rad in [0, pi/2] in the upper medium. The solid
 * formulas are checked against an independent numpy solve of the boundary
 * conditions (tests/reference/test_zoeppritz_numpy.py).
 *
 * Conventions (those of Aki & Richards 1980, sec. 5.2):
 * - x horizontal, z positive DOWN; the interface is z = 0.
 * - time dependence exp(-i w t); a wave is exp(i w (p x +/- q z - t)) with
 *   ray parameter p = sin(theta) / vp_upper.
 * - vertical slowness q = sqrt(1/v^2 - p^2) when real (>= 0); past a
 *   critical angle q = +i sqrt(p^2 - 1/v^2), so Im(q) >= 0 and the
 *   evanescent wave decays away from the interface on both sides. Post-
 *   critical phases follow from this branch: with exp(+i w t) conventions
 *   all imaginary parts change sign.
 * - P displacement points along the propagation direction; SV
 *   displacement has a positive x component: (cos j, -sin j) for a
 *   downgoing S and (cos j, +sin j) for an upgoing S, j the S angle from
 *   the vertical (x, z components, z down).
 * - the coefficients are ratios of displacement amplitudes (not potentials,
 *   not energy-normalised).
 * Fluids: a fluid upper medium (vs = 0) has no reflected S (rps = 0); the
 * boundary conditions lose continuity of horizontal displacement and the
 * shear traction vanishes, so a 3x3 system is solved instead of the 4x4
 * one. A fluid lower medium likewise gives tps = 0, and two fluids give a
 * 2x2 system. The solid-solid case uses the explicit formulas.
 * errors: RW_EDOM (invalid medium, theta outside [0, pi/2] or not finite),
 * RW_ERANGE (the system is singular at this angle; not reached for real
 * angles at physical interfaces, kept as a guard). */
int rw_reflect_zoeppritz(const rw_reflect_medium *upper,
                         const rw_reflect_medium *lower, double theta_rad,
                         rw_reflect_pcoefs *out);

/* Critical angles of incidence for an incident P wave in the upper medium,
 * from Snell's law (Aki & Richards 1980, sec. 5.2): p_rad = asin(vp_upper /
 * vp_lower), where the transmitted P wave becomes evanescent, and s_rad =
 * asin(vp_upper / vs_lower), where the transmitted S wave does. Where no
 * critical angle exists (lower velocity not above vp_upper, or a fluid
 * lower medium for s_rad) the output is +infinity (HUGE_VAL): every real
 * incidence angle is below it. The reflected S wave never becomes
 * evanescent for an incident P wave because vs_upper < vp_upper.
 * errors: RW_EDOM (invalid medium). */
int rw_reflect_critical_angles(const rw_reflect_medium *upper,
                               const rw_reflect_medium *lower, double *p_rad,
                               double *s_rad);

/* Transmission angle of the P wave, theta_t = asin(vp_lower sin(theta) /
 * vp_upper) (Snell), and the average (theta + theta_t) / 2 used by the
 * Aki-Richards linearisation (Aki & Richards 1980, eq. 5.44). theta_rad in
 * [0, pi/2].
 * errors: RW_EDOM (invalid medium or angle), RW_ERANGE (theta at or past
 * the P critical angle: no real transmission angle). */
int rw_reflect_angle_average(const rw_reflect_medium *upper,
                             const rw_reflect_medium *lower, double theta_rad,
                             double *avg_rad);

/* ---- linearised PP reflection coefficients ------------------------------
 * Contrasts are d = lower - upper over the mean of the two media (for
 * example dvp/vp = (vp2 - vp1) / ((vp1 + vp2) / 2)). Valid for small
 * contrasts and angles below the P critical angle. Every function takes
 * the incidence angle theta_rad in [0, pi/2); the comment of each says
 * which angle its formula is evaluated at.
 * errors (all of them): RW_EDOM (invalid medium, angle outside [0, pi/2)
 * or not finite), RW_ERANGE (Aki-Richards only: theta at or past the P
 * critical angle). */

/* Aki & Richards 1980, eq. 5.44:
 *   R = 1/2 (1 - 4 vs^2 p^2) drho/rho + dvp/(2 vp cos^2 t)
 *       - 4 vs^2 p^2 dvs/vs,
 * with mean vs, p = sin(theta)/vp_upper (the exact ray parameter) and t
 * the AVERAGE of incidence and P transmission angle. */
int rw_reflect_aki_richards(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r);

/* Intercept A, gradient B and curvature C of the three-term form in
 * velocities, obtained from Aki & Richards 1980 eq. 5.44 with
 * vs^2 p^2 = (vs/vp)^2 sin^2 (the rearrangement of Shuey 1985):
 *   A = 1/2 (dvp/vp + drho/rho)
 *   B = 1/2 dvp/vp - 2 (vs/vp)^2 (drho/rho + 2 dvs/vs)
 *   C = 1/2 dvp/vp
 * with mean velocities in vs/vp. Any output pointer may be NULL.
 * errors: RW_EDOM (invalid medium). */
int rw_reflect_shuey_terms(const rw_reflect_medium *upper,
                           const rw_reflect_medium *lower, double *a, double *b,
                           double *c);

/* Shuey 1985 two-term form R = A + B sin^2(theta), at the INCIDENCE
 * angle (the common practice for angle gathers; Shuey's derivation uses
 * the average angle). A and B as in rw_reflect_shuey_terms. */
int rw_reflect_shuey2(const rw_reflect_medium *upper,
                      const rw_reflect_medium *lower, double theta_rad,
                      double *r);

/* Shuey 1985 three-term form R = A + B sin^2 + C (tan^2 - sin^2), at the
 * INCIDENCE angle. */
int rw_reflect_shuey3(const rw_reflect_medium *upper,
                      const rw_reflect_medium *lower, double theta_rad,
                      double *r);

/* Poisson-ratio form of Verm & Hilterman 1995 (Hilterman 2001), from
 * memory: R = NI cos^2(theta) + PR sin^2(theta), NI = (Z2 - Z1)/(Z2 + Z1)
 * the exact normal-incidence coefficient (Z = rho vp) and
 * PR = (sigma2 - sigma1) / (1 - sigma)^2 with sigma the mean Poisson
 * ratio. For sigma = 1/3 this is Hilterman's NI cos^2 + 2.25 dsigma sin^2.
 * Evaluated at the INCIDENCE angle; it drops the tan^2 - sin^2 term, so it
 * is meant for angles below about 30 degrees. */
int rw_reflect_hilterman(const rw_reflect_medium *upper,
                         const rw_reflect_medium *lower, double theta_rad,
                         double *r);

/* Reflectivity terms of Fatti et al. 1994: Rp = 1/2 (dvp/vp + drho/rho)
 * (P impedance), Rs = 1/2 (dvs/vs + drho/rho) (S impedance), Rd = drho/rho,
 * and K = vs/vp of the means. Any output pointer may be NULL.
 * errors: RW_EDOM (invalid medium). */
int rw_reflect_fatti_terms(const rw_reflect_medium *upper,
                           const rw_reflect_medium *lower, double *rp,
                           double *rs, double *rd, double *k);

/* Fatti et al. 1994: R = (1 + tan^2) Rp - 8 K^2 sin^2 Rs
 *                        - (1/2 tan^2 - 2 K^2 sin^2) Rd,
 * terms as in rw_reflect_fatti_terms, at the INCIDENCE angle. */
int rw_reflect_fatti(const rw_reflect_medium *upper,
                     const rw_reflect_medium *lower, double theta_rad,
                     double *r);

/* Gray, Goodway & Chen 1999, lambda-mu-rho form, from memory:
 *   R = (1/4 - K^2/2) sec^2 dlambda/lambda
 *       + K^2 (1/2 sec^2 - 2 sin^2) dmu/mu + (1/2 - 1/4 sec^2) drho/rho,
 * K = vs/vp of the means, lambda and mu the Lame moduli (mean in the
 * denominators), at the INCIDENCE angle. A mean lambda of zero (Poisson's
 * ratio 0 on average; to rounding, |lambda| <= 1e-12 (lambda + 2 mu))
 * makes dlambda/lambda undefined: RW_EDOM. Near it the form loses
 * accuracy (both factors of the lambda term are small and uncertain). */
int rw_reflect_gray_lmr(const rw_reflect_medium *upper,
                        const rw_reflect_medium *lower, double theta_rad,
                        double *r);

/* Gray, Goodway & Chen 1999, bulk-shear form, from memory:
 *   R = (1/4 - K^2/3) sec^2 dk/k + K^2 (1/3 sec^2 - 2 sin^2) dmu/mu
 *       + (1/2 - 1/4 sec^2) drho/rho,
 * k the bulk modulus, at the INCIDENCE angle. */
int rw_reflect_gray_kmr(const rw_reflect_medium *upper,
                        const rw_reflect_medium *lower, double theta_rad,
                        double *r);

/* Smith & Gidlow 1987: the Aki-Richards form with density eliminated by
 * Gardner's relation rho ~ vp^(1/4) (drho/rho = 1/4 dvp/vp):
 *   R = (5/8 - 1/2 K^2 sin^2 + 1/2 tan^2) dvp/vp - 4 K^2 sin^2 dvs/vs,
 * K = vs/vp of the means, at the INCIDENCE angle. The densities of the
 * media are validated but not used. */
int rw_reflect_smith_gidlow(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r);

/* ---- AVO classes ----------------------------------------------------- */

/* Class of the top of a sand from intercept A and gradient B. */
typedef enum rw_avo_class {
	RW_AVO_NONE = 0, /* outside the classes (A > 0 with B >= 0, ...) */
	RW_AVO_I = 1,    /* Rutherford & Williams 1989: A > 0, B < 0 */
	RW_AVO_II = 2,   /* near-zero A, B < 0, no sign change */
	RW_AVO_IIP = 3,  /* small A > 0, B < 0, polarity reversal */
	RW_AVO_III = 4,  /* Rutherford & Williams 1989: A < 0, B < 0 */
	RW_AVO_IV = 5    /* Castagna, Swan & Foster 1998: A < 0, B >= 0 */
} rw_avo_class;

/* Thresholds of rw_reflect_avo_classify. */
typedef struct rw_avo_class_params {
	double a_small;       /* |A| <= a_small is "near zero"; >= 0 */
	double theta_max_rad; /* largest angle of the gather, (0, pi/2) */
} rw_avo_class_params;

/* Defaults: a_small = 0.02 (common practice; Rutherford & Williams 1989
 * describe class II sands as having a normal-incidence coefficient near
 * zero, the 0.02 band is from memory) and theta_max = 30 degrees (a
 * typical far angle of a conventional gather; common practice). */
rw_avo_class_params rw_reflect_avo_defaults(void);

/* Quadrant rule on the (A, B) crossplot for the top of a sand
 * (Rutherford & Williams 1989 classes I-III, the IIp variant with a
 * polarity reversal, class IV of Castagna, Swan & Foster 1998):
 *   A >  a_small,  B <  0                         -> I
 *   |A| <= a_small, B < 0, A > 0, A + B sin^2(theta_max) < 0 -> IIp
 *   |A| <= a_small, B < 0, otherwise               -> II
 *   A < -a_small,  B <  0                         -> III
 *   A < -a_small,  B >= 0                         -> IV
 *   anything else (B >= 0 with A >= -a_small)     -> NONE
 * This is the quadrant rule, not the background-trend rule of Castagna et
 * al. 1998. par may be NULL for the defaults.
 * errors: RW_EDOM (A or B not finite, a_small < 0, theta_max outside
 * (0, pi/2)); *cls = RW_AVO_NONE on failure. */
int rw_reflect_avo_classify(double a, double b, const rw_avo_class_params *par,
                            rw_avo_class *cls);

/* Static short name of a class: "I", "II", "IIp", "III", "IV", "none";
 * never NULL. */
const char *rw_reflect_avo_class_name(rw_avo_class cls);

/* ---- elastic impedance ------------------------------------------------ */

/* Pass as k to use the sample's own (vs/vp)^2. */
#define RW_REFLECT_K_SAMPLE (-1.0)

/* Elastic impedance of Connolly 1999, eq. 4 from memory:
 *   EI = vp^(1 + tan^2) vs^(-8 K sin^2) rho^(1 - 4 K sin^2),
 * in SI (m/s, kg/m^3); the value depends on the units (at theta = 0 it is
 * the acoustic impedance in kg/(m^2 s)), which is why it is usually
 * normalised. k is K = (vs/vp)^2, normally a constant (the mean over the
 * interval), in [0, 0.75), or RW_REFLECT_K_SAMPLE. theta_rad is the
 * incidence angle in [0, pi/2). A fluid (vs = 0) is allowed only at
 * theta = 0 or with k = 0.
 * errors: RW_EDOM (invalid medium or angle, k outside its range),
 * RW_ERANGE (the result overflows). */
int rw_reflect_ei(const rw_reflect_medium *m, double theta_rad, double k,
                  double *ei);

/* Normalised elastic impedance (Whitcombe 2002, from memory):
 *   EI = vp0 rho0 (vp/vp0)^(1 + tan^2) (vs/vs0)^(-8 K sin^2)
 *        (rho/rho0)^(1 - 4 K sin^2),
 * in kg/(m^2 s) at every angle; ref holds vp0, vs0, rho0 (all > 0).
 * Arguments and errors as rw_reflect_ei, plus RW_EDOM for a bad ref. */
int rw_reflect_ei_norm(const rw_reflect_medium *m, double theta_rad, double k,
                       const rw_reflect_medium *ref, double *ei);

/* Extended elastic impedance (Whitcombe, Connolly, Reagan & Redshaw 2002,
 * from memory):
 *   EEI = vp0 rho0 (vp/vp0)^p (vs/vs0)^q (rho/rho0)^r,
 *   p = cos chi + sin chi, q = -8 K sin chi, r = cos chi - 4 K sin chi,
 * chi_rad in [-pi/2, pi/2] (tan chi plays the role of sin^2 theta). At
 * chi = 0 it is the acoustic impedance. Other arguments and errors as
 * rw_reflect_ei_norm. */
int rw_reflect_eei(const rw_reflect_medium *m, double chi_rad, double k,
                   const rw_reflect_medium *ref, double *eei);

#ifdef __cplusplus
}
#endif

#endif
