/* Rock-physics models of the rockwire compute core: dry-frame moduli of
 * granular packs and sands (Hertz-Mindlin, Walton, soft and stiff sand,
 * contact and constant cement, critical porosity, Krief), of solids with
 * inclusions (Kuster-Toksoz, self-consistent, differential effective
 * medium, Xu-White), the effective-pressure law fitted to core data, the
 * saturated rock and its seismic attributes through the project's
 * Gassmann, templates over porosity and water saturation, and the
 * inversion of two or three attributes for porosity and saturation.
 *
 * Units: moduli Pa, density kg/m^3, pressure Pa (effective pressure, the
 * confining minus the pore pressure), porosity, saturation and fractions
 * as fractions (0..1), impedances kg/(m^2 s), lambda-rho and mu-rho
 * Pa kg/m^3. Per-sample functions are pure, reentrant and allocate
 * nothing; the ones that run GSL solvers (DEM, Xu-White, the template
 * and inversion drivers) take a workspace the caller makes once per
 * thread with rw_rm_ws_new.
 *
 * Every model writes a bit set of RW_RM_WARN_* to *warn (NULL allowed;
 * overwritten, not OR-ed) when an input lies outside the range where the
 * model is meant to hold; the value is still computed and RW_OK returned.
 * Inputs no rock can have are RW_EDOM with NaN outputs.
 *
 * Section numbers of Mavko, Mukerji & Dvorkin 2009 (The Rock Physics
 * Handbook, 2nd ed.) below are from memory; check them before quoting.
 *
 * Screening estimates: these models describe idealised rocks and are no
 * substitute for calibration to local data and qualified review. */
#ifndef ROCKWIRE_ROCKMODEL_H
#define ROCKWIRE_ROCKMODEL_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* ---- warnings --------------------------------------------------------- */

#define RW_RM_WARN_PHI_ABOVE_C                                                 \
	0x0001u /* porosity above the model's critical                         \
	         * (or cemented) porosity: the model is                        \
	         * continued past its range */
#define RW_RM_WARN_COORD_RANGE                                                 \
	0x0002u /* coordination number outside                                 \
	         * [RW_RM_COORD_MIN, RW_RM_COORD_MAX] */
#define RW_RM_WARN_P_RANGE                                                     \
	0x0004u /* effective pressure outside                                  \
	         * [RW_RM_P_MIN_PA, RW_RM_P_MAX_PA] */
#define RW_RM_WARN_ASPECT_RANGE                                                \
	0x0008u /* penny-crack aspect ratio above                              \
	         * RW_RM_PENNY_ASPECT_MAX: not thin */
#define RW_RM_WARN_DILUTE                                                      \
	0x0010u /* Kuster-Toksoz concentration beyond                          \
	         * the dilute limit RW_RM_KT_DILUTE_MAX */
#define RW_RM_WARN_NOT_CONVERGED                                               \
	0x0020u /* self-consistent iteration or DEM                            \
	         * integration did not converge */
#define RW_RM_WARN_CEMENT_HIGH                                                 \
	0x0040u /* contact cement above                                        \
	         * RW_RM_CEMENT_MAX of the bulk volume */
#define RW_RM_WARN_PERCOLATED                                                  \
	0x0080u /* self-consistent: the solid no longer                        \
	         * percolates; the frame has no rigidity */
#define RW_RM_WARN_NO_SHEAR                                                    \
	0x0100u /* saturated rock without shear                                \
	         * rigidity: vs = 0, vp/vs infinite */
#define RW_RM_WARN_PHI_LOW                                                     \
	0x0200u /* porosity below RW_ROCK_PHI_LOW: the                         \
	         * Gassmann step amplifies errors */
#define RW_RM_WARN_FRAME_STIFF                                                 \
	0x0400u /* dry-frame K above the mineral's                             \
	         * (Gassmann's KDRY_GT_KMIN) */
#define RW_RM_WARN_P_EXTRAP                                                    \
	0x0800u /* pressure law used outside the                               \
	         * pressure range of its fitted data */
#define RW_RM_WARN_ABOVE_HS                                                    \
	0x1000u /* dry frame above the Hashin-Shtrikman                        \
	         * upper bound of mineral and empty                            \
	         * pores: no real rock is that stiff */

/* Validity ranges behind the warnings.
 * Coordination number: 4 is about the loosest mechanically stable
 * packing of frictional spheres, 12 the close packing of equal spheres
 * (Mavko, Mukerji & Dvorkin 2009, sec. 5.4, from memory); random packs
 * of sand near 36 % porosity have about 9 (Murphy 1982, from memory).
 * Effective pressure: below about 0.1 MPa grain contacts are not
 * Hertzian (cohesion, surface roughness), and above about 50 MPa quartz
 * sands crush and pressure solution, not elastic contact, controls the
 * frame (common practice, from memory).
 * Penny cracks: the thin-crack forms of Berryman 1980 need aspect ratios
 * well below 1; above 0.1 use RW_RM_SHAPE_SPHEROID (common practice).
 * Kuster-Toksoz: the theory is first order in concentration and holds
 * for sum(c_i / a_i) << 1, a_i the aspect ratio, 1 for spheres, needles
 * and disks (Mavko, Mukerji & Dvorkin 2009, sec. 4.8, from memory);
 * flagged above 0.5.
 * Contact cement: the model puts all cement at grain contacts; beyond
 * about 10 % cement of the bulk volume the cement fills pores and the
 * model stops describing the rock (Dvorkin & Nur 1996, from memory). */
#define RW_RM_COORD_MIN        4.0
#define RW_RM_COORD_MAX        12.0
#define RW_RM_P_MIN_PA         0.1e6
#define RW_RM_P_MAX_PA         50e6
#define RW_RM_PENNY_ASPECT_MAX 0.1
#define RW_RM_KT_DILUTE_MAX    0.5
#define RW_RM_CEMENT_MAX       0.10

/* ---- granular packs and sands ----------------------------------------- */

/* Hertz-Mindlin pack of identical elastic spheres under hydrostatic
 * effective pressure (Mindlin 1949; as written in Mavko, Mukerji &
 * Dvorkin 2009, sec. 5.4), with a shear-reduction (slip) factor f that
 * scales the tangential contact stiffness linearly between frictionless
 * and no-slip contacts (the form in common use, e.g. Duffaut, Landro &
 * Sollie 2010, from memory):
 *   K = [C^2 (1 - phi)^2 mu^2 P / (18 pi^2 (1 - nu)^2)]^(1/3)
 *   mu_HM = (2 + 3f - nu (1 + 3f)) / (5 (2 - nu))
 *           [3 C^2 (1 - phi)^2 mu^2 P / (2 pi^2 (1 - nu)^2)]^(1/3)
 * with nu the grain Poisson's ratio. f = 1 is no slip at the contacts
 * (Mindlin's result, equal to Walton's rough limit), f = 0 frictionless
 * contacts (Walton's smooth limit, mu = 3/5 K).
 * k_min_pa > 0, mu_min_pa > 0: grain moduli; phi in [0, 1): porosity of
 * the pack (usually the critical porosity); coord > 0: coordination
 * number; p_eff_pa >= 0: effective pressure; slip in [0, 1].
 * Warnings: COORD_RANGE, P_RANGE.
 * errors: RW_EDOM for an argument outside those ranges, a non-finite
 * one, or grain moduli with nu outside (-1, 0.5). Outputs NaN on error. */
int rw_rm_hertz_mindlin(double k_min_pa, double mu_min_pa, double phi,
                        double coord, double p_eff_pa, double slip,
                        double *k_dry_pa, double *mu_dry_pa, unsigned *warn);

/* Walton 1987 random pack of identical spheres under hydrostatic
 * pressure, in the A, B notation of Mavko, Mukerji & Dvorkin 2009,
 * sec. 5.4 (from memory):
 *   A = (1/(4 pi)) (1/mu - 1/(mu + lambda)),
 *   B = (1/(4 pi)) (1/mu + 1/(mu + lambda)),
 *   K = (1/6) [3 (1 - phi)^2 C^2 P / (pi^4 B^2)]^(1/3),
 *   rough (infinite friction): mu = (3/5) K (5B + A) / (2B + A),
 *   smooth (no friction):      mu = (3/5) K.
 * rough: nonzero for the rough limit. Arguments, warnings and errors as
 * rw_rm_hertz_mindlin. */
int rw_rm_walton(double k_min_pa, double mu_min_pa, double phi, double coord,
                 double p_eff_pa, int rough, double *k_dry_pa,
                 double *mu_dry_pa, unsigned *warn);

/* Coordination number of a random sphere pack from its porosity,
 * C = 20 - 34 phi + 14 phi^2 (Murphy 1982, as quoted in Mavko, Mukerji
 * & Dvorkin 2009, sec. 5.4, from memory). phi in [0, 1).
 * errors: RW_EDOM for phi outside [0, 1) or non-finite (*coord NaN). */
int rw_rm_coord_murphy(double phi, double *coord);

/* Soft-sand (friable, unconsolidated) model, Dvorkin & Nur 1996: the
 * modified Hashin-Shtrikman lower bound between the Hertz-Mindlin pack at
 * the critical porosity phi_c (K_HM, mu_HM, from rw_rm_hertz_mindlin with
 * phi = phi_c) and the mineral at zero porosity (their eqs. 2-3, from
 * memory; Mavko, Mukerji & Dvorkin 2009, sec. 5.4):
 *   K = [ (phi/phi_c) / (K_HM + 4/3 mu_HM)
 *         + (1 - phi/phi_c) / (K + 4/3 mu_HM) ]^-1 - 4/3 mu_HM
 *   mu = [ (phi/phi_c) / (mu_HM + z) + (1 - phi/phi_c) / (mu + z) ]^-1 - z,
 *   z = (mu_HM / 6) (9 K_HM + 8 mu_HM) / (K_HM + 2 mu_HM).
 * Above phi_c the same construction is continued between the pack at
 * phi_c and an empty space at phi = 1 (replace phi/phi_c by
 * (1 - phi)/(1 - phi_c) and the mineral by zero moduli): rockwire's
 * continuation, not part of the published model, flagged PHI_ABOVE_C.
 * phi in [0, 1), phi_c in (0, 1); the other arguments as
 * rw_rm_hertz_mindlin. Warnings: PHI_ABOVE_C, COORD_RANGE, P_RANGE.
 * errors: as rw_rm_hertz_mindlin, plus RW_EDOM for phi_c outside (0, 1).
 * At phi = 0 the result is the mineral; at phi = phi_c the pack. */
int rw_rm_soft_sand(double k_min_pa, double mu_min_pa, double phi, double phi_c,
                    double coord, double p_eff_pa, double slip,
                    double *k_dry_pa, double *mu_dry_pa, unsigned *warn);

/* Stiff-sand model: the modified Hashin-Shtrikman upper bound between the
 * same Hertz-Mindlin pack at phi_c and the mineral (Gal, Dvorkin & Nur
 * 1998; Mavko, Mukerji & Dvorkin 2009, sec. 5.4, from memory): the
 * soft-sand formulas with mu_HM replaced by the mineral's mu in the
 * 4/3 mu term and z = (mu / 6) (9 K + 8 mu) / (K + 2 mu). Above phi_c
 * the soft-sand continuation is used (flagged PHI_ABOVE_C). Arguments,
 * warnings and errors as rw_rm_soft_sand. Never below the soft sand. */
int rw_rm_stiff_sand(double k_min_pa, double mu_min_pa, double phi,
                     double phi_c, double coord, double p_eff_pa, double slip,
                     double *k_dry_pa, double *mu_dry_pa, unsigned *warn);

/* Cement schemes of the contact-cement model. */
enum {
	RW_RM_CEMENT_CONTACT = 1, /* scheme 1: cement at the grain contacts */
	RW_RM_CEMENT_COATING = 2  /* scheme 2: cement coats the grains */
};

/* Contact-cement model, Dvorkin & Nur 1996 (after Dvorkin, Nur & Yin
 * 1994), as written in Mavko, Mukerji & Dvorkin 2009, sec. 5.4 (every
 * coefficient from memory):
 *   K = (1/6) C (1 - phi_c) M_c S_n,
 *   mu = (3/5) K + (3/20) C (1 - phi_c) mu_c S_t,
 *   M_c = K_c + 4/3 mu_c; S_n, S_t quadratic in the cement radius ratio
 *   alpha with coefficients that are power laws of
 *   Lambda_n = 2 mu_c (1 - nu)(1 - nu_c) / (pi mu (1 - 2 nu_c)) and
 *   Lambda_t = mu_c / (pi mu) (see granular.c for the full set);
 *   scheme 1: alpha = 2 [(phi_c - phi) / (3 C (1 - phi_c))]^(1/4),
 *   scheme 2: alpha = [2 (phi_c - phi) / (3 (1 - phi_c))]^(1/2).
 * All porosity lost below phi_c is cement: cement fraction phi_c - phi.
 * k_cem_pa > 0, mu_cem_pa > 0: cement moduli (nu_c < 0.5); phi in
 * [0, phi_c]; scheme RW_RM_CEMENT_CONTACT or RW_RM_CEMENT_COATING;
 * others as rw_rm_hertz_mindlin. The model has no zero-porosity limit.
 * Warnings: CEMENT_HIGH, COORD_RANGE.
 * errors: RW_EDOM for phi above phi_c (negative cement) or any other
 * argument outside its range; RW_EINVAL for an unknown scheme. */
int rw_rm_contact_cement(double k_min_pa, double mu_min_pa, double k_cem_pa,
                         double mu_cem_pa, double phi, double phi_c,
                         double coord, int scheme, double *k_dry_pa,
                         double *mu_dry_pa, unsigned *warn);

/* Constant-cement model, Avseth, Dvorkin, Mavko & Rykkje 2000: sands of
 * one cement content and worsening sorting. The contact-cement rock at
 * phi_b (the porosity where cementing stopped, phi_b <= phi_c) is joined
 * to the mineral by the modified Hashin-Shtrikman lower bound:
 *   K = [ (phi/phi_b) / (K_b + 4/3 mu_b)
 *         + (1 - phi/phi_b) / (K + 4/3 mu_b) ]^-1 - 4/3 mu_b,
 *   mu likewise with z_b = (mu_b / 6) (9 K_b + 8 mu_b) / (K_b + 2 mu_b).
 * phi in [0, phi_b], phi_b in (0, phi_c]; others as
 * rw_rm_contact_cement. Warnings: CEMENT_HIGH (for phi_c - phi_b),
 * COORD_RANGE. errors: RW_EDOM for phi above phi_b (the rock there is
 * contact cement, not this model) and as rw_rm_contact_cement. */
int rw_rm_constant_cement(double k_min_pa, double mu_min_pa, double k_cem_pa,
                          double mu_cem_pa, double phi, double phi_b,
                          double phi_c, double coord, int scheme,
                          double *k_dry_pa, double *mu_dry_pa, unsigned *warn);

/* Critical-porosity model, Nur, Mavko, Dvorkin & Galmudi 1998:
 * K = K_min (1 - phi/phi_c), mu = mu_min (1 - phi/phi_c) for phi < phi_c
 * and 0 (a suspension) above, flagged PHI_ABOVE_C. phi in [0, 1),
 * phi_c in (0, 1); typical phi_c: 0.36-0.40 sandstones, about 0.6
 * limestones (Nur et al. 1998, from memory). The lines fall more slowly
 * than the Hashin-Shtrikman upper bounds of mineral and empty pores when
 * 1/phi_c < 1 + 3K/(4 mu) or 1/phi_c < 1 + mu/z (the bounds' initial
 * slopes; z as in the soft sand), i.e. phi_c above 0.357 for calcite
 * (so also the limestone value 0.6) and above 0.476 for quartz: the
 * low-porosity values then exceed the bound and are flagged ABOVE_HS.
 * errors: RW_EDOM for an argument outside its range. */
int rw_rm_critical_porosity(double k_min_pa, double mu_min_pa, double phi,
                            double phi_c, double *k_dry_pa, double *mu_dry_pa,
                            unsigned *warn);

/* Krief, Garat, Stellingwerff & Ventre 1990: K = K_min (1 - phi)^m,
 * mu = mu_min (1 - phi)^m, m = 3 / (1 - phi) (the exponent 3 from
 * memory). phi in [0, 1). No warnings (*warn set to 0).
 * errors: RW_EDOM for an argument outside its range. */
int rw_rm_krief(double k_min_pa, double mu_min_pa, double phi, double *k_dry_pa,
                double *mu_dry_pa, unsigned *warn);

/* ---- inclusion models ------------------------------------------------- */

/* Inclusion shapes for Berryman's 1980 P and Q factors. */
enum {
	RW_RM_SHAPE_SPHERE = 0,
	RW_RM_SHAPE_NEEDLE = 1, /* prolate, aspect ratio -> infinity */
	RW_RM_SHAPE_DISK = 2,  /* oblate, aspect ratio -> 0, finite stiffness */
	RW_RM_SHAPE_PENNY = 3, /* thin oblate crack of given aspect ratio */
	RW_RM_SHAPE_SPHEROID = 4 /* spheroid of any aspect ratio */
};

/* One constituent of an inclusion model: moduli k_pa >= 0, mu_pa >= 0
 * (0 for an empty or fluid-filled pore), volume fraction frac in [0, 1]
 * of the composite, shape RW_RM_SHAPE_*, and aspect ratio aspect > 0
 * (short over long axis for oblate, long over short for prolate
 * spheroids: the polar over the equatorial semi-axis; used by PENNY and
 * SPHEROID, ignored otherwise). */
typedef struct rw_rm_incl {
	double k_pa;
	double mu_pa;
	double frac;
	double aspect;
	int shape;
} rw_rm_incl;

/* Berryman's 1980 polarisation factors P (bulk) and Q (shear) of an
 * inclusion (k_inc_pa, mu_inc_pa) in a background (k_bg_pa, mu_bg_pa),
 * as tabulated in Mavko, Mukerji & Dvorkin 2009, sec. 4.8 (from memory):
 * closed forms for spheres, needles, disks and penny cracks, and for a
 * spheroid of any aspect ratio the Eshelby-Wu tensor in Berryman's
 * F1..F9 form, P = T_iijj / 3, Q = (T_ijij - T_iijj / 3) / 5.
 * k_bg_pa > 0, mu_bg_pa > 0 (nu in (-1, 0.5)), k_inc_pa >= 0,
 * mu_inc_pa >= 0, aspect > 0 for PENNY and SPHEROID. Disks need a solid
 * inclusion: an empty or fluid disk has infinite P or Q.
 * errors: RW_EINVAL for an unknown shape; RW_EDOM for an argument
 * outside its range or a non-finite result. Outputs NaN on error. */
int rw_rm_incl_pq(int shape, double aspect, double k_bg_pa, double mu_bg_pa,
                  double k_inc_pa, double mu_inc_pa, double *p, double *q);

/* Kuster & Toksoz 1974 with Berryman's P and Q (Mavko, Mukerji & Dvorkin
 * 2009, sec. 4.8):
 *   (K - K_m)(K_m + 4/3 mu_m) / (K + 4/3 mu_m)
 *       = sum_i c_i (K_i - K_m) P^mi,
 *   (mu - mu_m)(mu_m + z_m) / (mu + z_m) = sum_i c_i (mu_i - mu_m) Q^mi,
 *   z_m = (mu_m / 6)(9 K_m + 8 mu_m) / (K_m + 2 mu_m),
 * solved explicitly for K and mu. Host (matrix) k_host_pa > 0,
 * mu_host_pa > 0; n >= 0 inclusions with fractions summing to at most 1
 * (the host takes the rest). For spheres the result is the
 * Hashin-Shtrikman bound with the host as the stiff end member.
 * Warnings: DILUTE, ASPECT_RANGE.
 * errors: RW_EINVAL for n > 0 with incl NULL, or an unknown shape;
 * RW_EDOM for an argument outside its range or fractions summing above 1
 * (+1e-9); RW_ERANGE when the result is not a positive modulus (flat
 * pores far beyond the dilute limit: empty spheroids of aspect 0.1 in
 * quartz above a concentration of about 0.31). Outputs NaN on error. */
int rw_rm_kuster_toksoz(double k_host_pa, double mu_host_pa, size_t n,
                        const rw_rm_incl *incl, double *k_pa, double *mu_pa,
                        unsigned *warn);

/* Self-consistent approximation, Berryman 1980 (Mavko, Mukerji & Dvorkin
 * 2009, sec. 4.8): K, mu solve sum_i c_i (K_i - K) P^*i = 0 and
 * sum_i c_i (mu_i - mu) Q^*i = 0, with P, Q of each phase in the
 * effective medium itself. Every constituent is a phase (include the
 * mineral, usually as spheres); fractions sum to 1 within 1e-6; at least
 * one phase has mu > 0. Solved by Berryman's fixed-point iteration
 * K <- sum c_i K_i P_i / sum c_i P_i (and mu likewise), started at the
 * Voigt average and stopped when the error estimated from the observed
 * contraction rate is below tol (relative); at most 100000 iterations.
 * When the solid no longer percolates (e.g. empty spherical pores above
 * phi = 0.5) the moduli converge to 0: returned as 0 with PERCOLATED;
 * with fluid-filled pores only the shear modulus vanishes (for brine
 * spheres in quartz from phi = 0.6) and K is then the Reuss average.
 * tol in [1e-14, 1e-2].
 * Warnings: PERCOLATED, ASPECT_RANGE; NOT_CONVERGED with RW_EMAXITER.
 * errors: RW_EINVAL for n == 0, phases NULL or an unknown shape; RW_EDOM
 * for an argument outside its range; RW_EMAXITER when not converged.
 * Outputs NaN on error. */
int rw_rm_self_consistent(size_t n, const rw_rm_incl *phases, double tol,
                          double *k_pa, double *mu_pa, unsigned *warn);

/* Workspace of the GSL solvers (ODE stepper for DEM and Xu-White,
 * nonlinear least squares and small matrices for the inversion). Make one
 * per thread, outside per-sample loops. */
typedef struct rw_rm_ws rw_rm_ws;

/* Allocates a workspace. n_obs, n_par: sizes of the inversion problem it
 * will serve (1 <= n_par <= n_obs <= RW_RM_INV_MAX); 0, 0 for a workspace
 * without the inversion part (DEM, Xu-White, templates). Returns NULL on
 * bad sizes or when out of memory; the caller frees it with
 * rw_rm_ws_free. */
rw_rm_ws *rw_rm_ws_new(size_t n_obs, size_t n_par);

/* Frees a workspace; NULL is a no-op. */
void rw_rm_ws_free(rw_rm_ws *ws);

/* Differential effective medium (Norris 1985; Mavko, Mukerji & Dvorkin
 * 2009, sec. 4.11, from memory): inclusions are added to the host in
 * small steps in fixed proportions c_i / c (c = sum c_i),
 *   (1 - y) dK/dy = sum_i (c_i / c) (K_i - K) P^*i(y),
 *   (1 - y) dmu/dy = sum_i (c_i / c) (mu_i - mu) Q^*i(y),
 * from y = 0 (the host) to y = c, integrated with GSL's adaptive
 * Runge-Kutta-Prince-Dormand 8(9) stepper (gsl_odeiv2_step_rk8pd) on
 * K/K_host and mu/mu_host with absolute and relative tolerance tol in
 * [1e-14, 1e-3]. c < 1. Warnings: ASPECT_RANGE; NOT_CONVERGED with
 * RW_EMAXITER (more than 100000 steps).
 * errors: RW_EINVAL for ws NULL, n > 0 with incl NULL or an unknown
 * shape; RW_EDOM for an argument outside its range or fractions summing
 * to 1 or more; RW_ERANGE when the moduli leave the positive range.
 * Outputs NaN on error. */
int rw_rm_dem(double k_host_pa, double mu_host_pa, size_t n,
              const rw_rm_incl *incl, double tol, rw_rm_ws *ws, double *k_pa,
              double *mu_pa, unsigned *warn);

/* Xu & White 1995 dry frame of a shaly sand: the pore space is split
 * into sand pores and clay pores in proportion to the sand and clay
 * volumes of the solid (phi_clay = vclay phi, phi_sand = (1 - vclay)
 * phi), both empty spheroids with their own aspect ratios (typical sand
 * 0.1-0.15, clay 0.02-0.05; Xu & White 1995, from memory), added to the
 * solid by DEM (Xu & White add them in small Kuster-Toksoz steps, of
 * which the DEM equations are the continuous form). k_min_pa, mu_min_pa:
 * moduli of the sand-clay solid (mix them first, e.g. with
 * rw_mineral_mix); phi in [0, 1); vclay in [0, 1]: clay volume fraction
 * of the solid; aspects > 0; tol, ws as rw_rm_dem.
 * Warnings and errors as rw_rm_dem. */
int rw_rm_xu_white(double k_min_pa, double mu_min_pa, double phi, double vclay,
                   double aspect_sand, double aspect_clay, double tol,
                   rw_rm_ws *ws, double *k_dry_pa, double *mu_dry_pa,
                   unsigned *warn);

/* ---- pressure --------------------------------------------------------- */

/* Exponential pressure law of a dry-frame modulus (common practice; no
 * single published source): M(P) = m_inf - (m_inf - m_0) exp(-P / p_c),
 * fitted to data over [p_lo_pa, p_hi_pa]. */
typedef struct rw_rm_plaw {
	double m_inf_pa; /* high-pressure asymptote */
	double m_0_pa;   /* value at zero effective pressure */
	double p_c_pa;   /* characteristic pressure, > 0 */
	double p_lo_pa;  /* pressure range of the fitted data */
	double p_hi_pa;
} rw_rm_plaw;

/* Fit of the pressure law to n (pressure, modulus) pairs. */
typedef struct rw_rm_pfit {
	rw_rm_plaw law;
	double cov[3][3]; /* covariance of (m_inf, m_0, p_c), Pa^2 */
	double chi2;      /* sum of squared (weighted) residuals */
	double rms_pa;    /* root-mean-square residual, Pa (unweighted) */
	size_t dof;       /* n - 3 */
	size_t n_iter;
} rw_rm_pfit;

/* Evaluates the law at p_eff_pa >= 0. Warnings: P_EXTRAP outside
 * [p_lo_pa, p_hi_pa] of the law.
 * errors: RW_EDOM for p < 0, a non-finite input or p_c <= 0 (*m NaN). */
int rw_rm_plaw_eval(const rw_rm_plaw *law, double p_eff_pa, double *m_pa,
                    unsigned *warn);

/* Fits the law to n >= 3 points (p_pa[i] >= 0, m_pa[i] > 0, at least 3
 * distinct pressures) by nonlinear least squares
 * (gsl_multifit_nlinear, Levenberg-Marquardt trust region; p_c kept
 * positive by fitting its logarithm). sigma_pa: standard deviations of
 * the moduli (> 0), or NULL for equal weights. Covariance: (J^T W J)^-1
 * at the solution in (m_inf, m_0, p_c); with sigma it is absolute, without
 * it is scaled by chi2 / dof (NaN when dof = 0). This is a calibration
 * call, not a per-sample one: it allocates a GSL workspace and frees it
 * before returning. Warnings: P_EXTRAP when the fitted p_c lies above the
 * highest measured pressure (the asymptote is then an extrapolation).
 * errors: RW_EINVAL for NULL arrays, n < 3 or fewer than 3 distinct
 * pressures; RW_EDOM for a point outside the ranges above or non-finite;
 * RW_EMAXITER when the fit does not converge in 200 iterations. out's
 * numbers NaN on error. */
int rw_rm_plaw_fit(size_t n, const double *p_pa, const double *m_pa,
                   const double *sigma_pa, rw_rm_pfit *out, unsigned *warn);

/* ---- the saturated rock ----------------------------------------------- */

/* Saturated rock and its seismic attributes. */
typedef struct rw_rm_sat {
	double k_dry_pa, mu_dry_pa; /* dry frame */
	double k_sat_pa;            /* Gassmann saturated bulk modulus */
	double rho_kgm3;            /* bulk density */
	double vp_ms, vs_ms;
	double ai;         /* acoustic impedance rho vp, kg/(m^2 s) */
	double si;         /* shear impedance rho vs, kg/(m^2 s) */
	double vpvs;       /* vp / vs (infinite when vs = 0) */
	double nu;         /* Poisson's ratio */
	double lambda_rho; /* lambda rho = AI^2 - 2 SI^2, Pa kg/m^3 */
	double mu_rho;     /* mu rho = SI^2, Pa kg/m^3 */
} rw_rm_sat;

/* Saturated rock from a dry frame through Gassmann (rw_rock_gassmann_frame
 * in rock.h; Gassmann 1951): k_dry_pa >= 0, mu_dry_pa >= 0, phi in
 * [0, 1) (phi = 0: the mineral, no fluid), mineral k_min_pa > 0,
 * rho_min_kgm3 > 0, pore fluid k_fl_pa > 0, rho_fl_kgm3 > 0. Attributes
 * ai = rho vp, si = rho vs, vpvs, nu = (vp^2 - 2 vs^2) / (2 (vp^2 -
 * vs^2)), lambda_rho = ai^2 - 2 si^2, mu_rho = si^2 (Goodway et al. 1997
 * forms, from memory). Warnings: NO_SHEAR (mu_dry = 0), PHI_LOW,
 * FRAME_STIFF.
 * errors: RW_EDOM for an input outside those ranges; RW_ERANGE as
 * rw_rock_gassmann_frame. Outputs NaN on error. */
int rw_rm_saturate(double k_dry_pa, double mu_dry_pa, double phi,
                   double k_min_pa, double rho_min_kgm3, double k_fl_pa,
                   double rho_fl_kgm3, rw_rm_sat *out, unsigned *warn);

/* Attributes of rw_rm_sat that templates plot and the inversion fits. */
typedef enum rw_rm_attr {
	RW_RM_ATTR_VP,
	RW_RM_ATTR_VS,
	RW_RM_ATTR_RHO,
	RW_RM_ATTR_AI,
	RW_RM_ATTR_SI,
	RW_RM_ATTR_VPVS,
	RW_RM_ATTR_NU,
	RW_RM_ATTR_LAMBDA_RHO,
	RW_RM_ATTR_MU_RHO,
	RW_RM_ATTR_K_SAT,
	RW_RM_ATTR_K_DRY,
	RW_RM_ATTR_MU_DRY,
	RW_RM_ATTR_COUNT
} rw_rm_attr;

/* Value of attribute a of s (NaN for an unknown a). */
double rw_rm_attr_get(const rw_rm_sat *s, int a);

/* Short lower-case name of an attribute ("ai", "vpvs", ...; the
 * rw_rm_sat member names without units), NULL when out of range. */
const char *rw_rm_attr_name(int a);

/* ---- a model with its parameters: one call per sample ------------------ */

/* Models of rw_rm_spec. */
typedef enum rw_rm_model {
	RW_RM_HERTZ_MINDLIN,
	RW_RM_WALTON_SMOOTH,
	RW_RM_WALTON_ROUGH,
	RW_RM_SOFT_SAND,
	RW_RM_STIFF_SAND,
	RW_RM_CONTACT_CEMENT,
	RW_RM_CONSTANT_CEMENT,
	RW_RM_CRITICAL_POROSITY,
	RW_RM_KRIEF,
	RW_RM_KUSTER_TOKSOZ,
	RW_RM_SELF_CONSISTENT,
	RW_RM_DEM,
	RW_RM_XU_WHITE,
	RW_RM_MODEL_COUNT
} rw_rm_model;

/* Short lower-case name of a model ("soft_sand", ...), NULL when out of
 * range. */
const char *rw_rm_model_name(int model);

/* Nonzero when the model's dry frame depends on effective pressure (the
 * Hertz-Mindlin based ones: Hertz-Mindlin, Walton, soft and stiff sand). */
int rw_rm_model_uses_pressure(int model);

/* Pore-fluid mixing of brine and hydrocarbon by water saturation. */
enum {
	RW_RM_FLUID_WOOD = 0,  /* uniform saturation, Wood 1955 */
	RW_RM_FLUID_BRIE = 1,  /* patchy, Brie et al. 1995, exponent brie_e;
	                        * the hydrocarbon is the gas phase */
	RW_RM_FLUID_VOIGT = 2, /* patchy upper bound */
};

/* A model and all its parameters; per-sample inputs (porosity, water
 * saturation, clay fraction, effective pressure) are arguments of
 * rw_rm_eval. Fields a model does not use are ignored (see
 * rw_rm_spec_check for which are used). */
typedef struct rw_rm_spec {
	int model; /* rw_rm_model */
	/* Solid: host mineral and the clay mixed into it by clay fraction
	 * with rule clay_mix (RW_MIX_* of mineral.h). */
	double k_min_pa, mu_min_pa, rho_min_kgm3;
	double k_clay_pa, mu_clay_pa, rho_clay_kgm3;
	int clay_mix;
	/* Granular and sand models. */
	double phi_c; /* critical porosity */
	double coord; /* coordination number; 0 = Murphy 1982 at phi_c */
	double slip;  /* shear-reduction factor, 1 = no slip */
	/* Cement models. */
	double k_cem_pa, mu_cem_pa;
	int cement_scheme; /* RW_RM_CEMENT_* */
	double phi_b;      /* constant cement: porosity at end of cementing */
	/* Inclusion models: pores are empty (dry frame) and of one shape and
	 * aspect ratio; the solid is spherical in the self-consistent model;
	 * Xu-White uses aspect for sand pores and aspect_clay for clay
	 * pores. tol: DEM and self-consistent tolerance. */
	int pore_shape; /* RW_RM_SHAPE_* */
	double aspect, aspect_clay;
	double tol;
	/* Pore fluids: brine and one hydrocarbon phase (gas or oil), as
	 * computed by fluid.h, mixed by water saturation. */
	double k_brine_pa, rho_brine_kgm3;
	double k_hc_pa, rho_hc_kgm3;
	int fluid_mix; /* RW_RM_FLUID_* */
	double brie_e; /* Brie exponent, >= 1 */
} rw_rm_spec;

/* Checks a spec once before a run. On failure *field (may be NULL) names
 * the offending member ("phi_c", "k_cem_pa", ...) as a static string.
 * Members checked for every model: the host and clay minerals (K, mu > 0
 * with nu in (-1, 0.5), rho > 0), clay_mix, brine and hydrocarbon
 * (k, rho > 0), fluid_mix, and brie_e >= 1 with RW_RM_FLUID_BRIE. Per
 * model:
 *   Hertz-Mindlin, Walton: coord >= 0 (0: Murphy 1982 at phi_c, which
 *     is then needed), slip in [0, 1] (Hertz-Mindlin);
 *   soft and stiff sand: phi_c in (0, 1), coord, slip;
 *   contact cement: phi_c, coord, cement moduli, cement_scheme;
 *   constant cement: those and phi_b in (0, phi_c];
 *   critical porosity: phi_c; Krief: nothing more;
 *   Kuster-Toksoz, self-consistent, DEM: pore_shape (not DISK: empty
 *     disks have no stiffness), aspect > 0 for PENNY and SPHEROID, tol
 *     in [1e-14, 1e-3] (not Kuster-Toksoz);
 *   Xu-White: aspect, aspect_clay > 0, tol.
 * errors: RW_EINVAL for an unknown model, shape, scheme, mix rule or
 * fluid mix; RW_EDOM for a used member outside its range. */
int rw_rm_spec_check(const rw_rm_spec *spec, const char **field);

/* Highest porosity at which the model is defined without continuation:
 * phi_c (sands, cement, critical porosity), phi_b (constant cement),
 * 0.5 for the self-consistent model with spheres, just below 1 otherwise.
 * NaN for an unknown model. */
double rw_rm_spec_phi_max(const rw_rm_spec *spec);

/* Dry frame and solid of a spec at porosity phi in [0, 1), clay fraction
 * of the solid clay in [0, 1] and effective pressure p_eff_pa >= 0. The
 * solid (k_s, mu_s, rho_s; any pointer may be NULL) is the host mineral
 * mixed with clay by spec->clay_mix. ws: a workspace, needed by DEM and
 * Xu-White (may be NULL for the others). Warnings: those of the model,
 * and ABOVE_HS for any model whose frame exceeds the Hashin-Shtrikman
 * upper bound of the solid with empty pores.
 * errors: those of the model and of rw_rm_spec_check; RW_EINVAL for DEM
 * or Xu-White without ws. Outputs NaN on error. */
int rw_rm_dry(const rw_rm_spec *spec, double phi, double clay, double p_eff_pa,
              rw_rm_ws *ws, double *k_dry_pa, double *mu_dry_pa, double *k_s_pa,
              double *mu_s_pa, double *rho_s_kgm3, unsigned *warn);

/* Saturated rock of a spec: rw_rm_dry, the pore fluid of water
 * saturation sw in [0, 1] (brine and hydrocarbon mixed by
 * spec->fluid_mix with fluid.h's mixers), then rw_rm_saturate.
 * Warnings: those of rw_rm_dry and rw_rm_saturate.
 * errors: those of rw_rm_dry, the mixers and rw_rm_saturate; RW_EDOM for
 * sw outside [0, 1]. Outputs NaN on error. */
int rw_rm_eval(const rw_rm_spec *spec, double phi, double sw, double clay,
               double p_eff_pa, rw_rm_ws *ws, rw_rm_sat *out, unsigned *warn);

/* The solid and the pore fluid behind a saturated rock. */
typedef struct rw_rm_parts {
	double k_s_pa, mu_s_pa, rho_s_kgm3; /* host mineral mixed with clay */
	double k_fl_pa, rho_fl_kgm3;        /* brine and hydrocarbon at sw */
} rw_rm_parts;

/* rw_rm_eval that also reports the solid and the pore fluid it used
 * (parts may be NULL; its members NaN on error). Arguments, warnings and
 * errors as rw_rm_eval. */
int rw_rm_eval_parts(const rw_rm_spec *spec, double phi, double sw, double clay,
                     double p_eff_pa, rw_rm_ws *ws, rw_rm_sat *out,
                     rw_rm_parts *parts, unsigned *warn);

/* ---- templates -------------------------------------------------------- */

/* Third template axis. */
enum {
	RW_RM_AXIS_NONE = 0,
	RW_RM_AXIS_CLAY = 1,    /* clay fraction of the solid */
	RW_RM_AXIS_PRESSURE = 2 /* effective pressure, Pa */
};

/* A template: spec evaluated on the grid phi[i] x sw[j] x axis3[k]
 * (n_phi, n_sw >= 2, strictly increasing, phi in [0, 1), sw in [0, 1];
 * axis3_kind RW_RM_AXIS_NONE with n_3 = 1 and axis3 NULL, or CLAY /
 * PRESSURE with n_3 >= 1 values). clay and p_eff_pa are used where they
 * are not on the third axis. Node (i, j, k) is written to
 * nodes[(k * n_sw + j) * n_phi + i], its status (RW_*) to status[] and its
 * warnings to warn[] (same index; status and warn may be NULL); a failed
 * node has NaN members, the grid is still filled. ws as rw_rm_dry.
 * errors (the call itself): RW_EINVAL for NULL arrays, bad sizes, an
 * unknown axis kind, axes not strictly increasing or a spec that fails
 * rw_rm_spec_check; RW_EDOM for an axis value outside its range. */
int rw_rm_template(const rw_rm_spec *spec, size_t n_phi, const double *phi,
                   size_t n_sw, const double *sw, int axis3_kind, size_t n_3,
                   const double *axis3, double clay, double p_eff_pa,
                   rw_rm_ws *ws, rw_rm_sat *nodes, int *status, unsigned *warn);

/* Iso-lines of slice k of a template in the crossplot of attributes
 * attr_x and attr_y: the iso-porosity line of phi[i] is the points of
 * increasing sw, written as (x, y) pairs to
 * iso_phi[2 * (i * n_sw + j) + {0, 1}]; the iso-saturation line of sw[j]
 * is the points of increasing phi, iso_sw[2 * (j * n_phi + i) + {0, 1}].
 * Failed nodes appear as NaN pairs (a plotter breaks the line there).
 * Either output may be NULL.
 * errors: RW_EINVAL for NULL nodes, n_phi or n_sw of 0, k >= n_3 or an
 * unknown attribute. */
int rw_rm_template_lines(const rw_rm_sat *nodes, size_t n_phi, size_t n_sw,
                         size_t n_3, size_t k, int attr_x, int attr_y,
                         double *iso_phi, double *iso_sw);

/* ---- inversion -------------------------------------------------------- */

/* Most observations and parameters of one inversion; most starts and
 * profile nodes. */
#define RW_RM_INV_MAX         3
#define RW_RM_INV_MAX_STARTS  64
#define RW_RM_INV_MAX_PROFILE 201

/* Parameters estimated, in this order: porosity, water saturation and,
 * with n_par = 3, clay fraction of the solid. */
enum { RW_RM_PAR_PHI = 0, RW_RM_PAR_SW = 1, RW_RM_PAR_CLAY = 2 };

/* Inversion flags (a set; 0 = a unique estimate inside the template). */
#define RW_RM_INV_NONUNIQUE                                                    \
	0x01u /* the data do not fix sw: its 68 %                              \
	       * range is wider than sw_width_max */
#define RW_RM_INV_MULTIPLE                                                     \
	0x02u                      /* another, distinct estimate fits          \
	                            * within the 68 % misfit level */
#define RW_RM_INV_BOUND_PHI  0x04u /* porosity estimate on a bound */
#define RW_RM_INV_BOUND_SW   0x08u /* saturation estimate on a bound */
#define RW_RM_INV_BOUND_CLAY 0x10u /* clay estimate on a bound */
#define RW_RM_INV_OUTSIDE                                                      \
	0x20u /* observation outside the template:                             \
	       * misfit above the 99 % level */
#define RW_RM_INV_NOT_CONVERGED                                                \
	0x40u /* no start converged; estimate is                               \
	       * the best point reached */
#define RW_RM_INV_MODEL_FAIL                                                   \
	0x80u /* the model failed at trial points:                             \
	       * the search was penalised there */

/* What to invert and how. */
typedef struct rw_rm_inv_cfg {
	const rw_rm_spec *spec;
	size_t n_obs;             /* observations, 2 or 3 */
	int attr[RW_RM_INV_MAX];  /* their attributes, RW_RM_ATTR_*, distinct */
	size_t n_par;             /* 2: phi and sw; 3: and clay */
	double lo[RW_RM_INV_MAX]; /* lower bounds of phi, sw, clay */
	double hi[RW_RM_INV_MAX]; /* upper bounds, hi > lo */
	double clay;              /* clay fraction when not estimated */
	double p_eff_pa;          /* effective pressure */
	unsigned n_starts;        /* starts of sw over its range, 1..64 */
	unsigned n_profile;       /* sw profile nodes: 0 (none) or 3..201 */
	unsigned max_iter;        /* per start, >= 1 */
	double sw_width_max;      /* NONUNIQUE threshold on the sw range */
} rw_rm_inv_cfg;

/* Result of one inversion. */
typedef struct rw_rm_inv_result {
	double x[RW_RM_INV_MAX]; /* estimate: phi, sw, clay (clay echoes
	                          * cfg->clay when not estimated) */
	double cov[RW_RM_INV_MAX]
	          [RW_RM_INV_MAX];   /* linearised covariance;
	                              * +inf variances along directions the
	                              * data do not constrain */
	double sd[RW_RM_INV_MAX];    /* square roots of the diagonal */
	double chi2;                 /* weighted misfit sum ((f - d) / s)^2 */
	double sw_lo, sw_hi;         /* 68 % range of sw (profile or linear) */
	double alt_x[RW_RM_INV_MAX]; /* a distinct second estimate (MULTIPLE) */
	double alt_chi2;             /* its misfit; NaN when none */
	rw_rm_sat fit;               /* the model at the estimate */
	unsigned flags;              /* RW_RM_INV_* */
	unsigned model_warn; /* RW_RM_WARN_* of the model at the estimate */
	unsigned n_eval;     /* model evaluations used */
} rw_rm_inv_result;

/* Checks an inversion setup once before a run: spec, sizes, attributes,
 * bounds inside the model's domain (phi in [0, 1), sw and clay in
 * [0, 1]), counts, and for DEM, Xu-White and self-consistent models a
 * tolerance of at most 1e-9 (the Jacobian is a finite difference with a
 * step of 1e-6: the model's own error must stay well below it). *field
 * (may be NULL) names the offending member ("n_obs", "attr", "phi
 * bounds", "tol", ...). errors: RW_EINVAL or RW_EDOM as
 * rw_rm_spec_check. */
int rw_rm_inv_check(const rw_rm_inv_cfg *cfg, const char **field);

/* Estimates porosity and water saturation (and clay with n_par = 3) from
 * observations obs[0..n_obs-1] of the attributes cfg->attr with standard
 * deviations sigma[] > 0, by weighted nonlinear least squares on the
 * model (gsl_multifit_nlinear, Levenberg-Marquardt trust region). Bounds
 * are kept by the transform x = lo + (hi - lo) (1 + sin u) / 2 (common
 * practice for bounded least squares), so every trial point lies in the
 * box; a trial point where the model fails gets a large residual.
 * Multi-start from n_starts saturations spread over the sw range; the
 * best misfit wins. Covariance: (J^T J)^-1 of the weighted residuals in
 * the physical parameters at the estimate (finite differences; one-sided
 * at a bound), by SVD; directions with singular values below 1e-8 of the
 * largest get infinite variance and NONUNIQUE. With n_profile >= 3 the sw
 * range is a profile scan: at n_profile saturations evenly spaced over
 * the bounds the other parameters are refitted and sw_lo, sw_hi bracket
 * the saturations whose misfit stays within chi2 + 1 (68 % for one
 * parameter; Press et al. 2007, sec. 15.6, from memory), the crossing
 * interpolated linearly in sqrt(misfit rise), and widened to sw +- sd up
 * to one node spacing (the nodes cannot resolve a sharper minimum);
 * without a profile sw +- sd clipped to the bounds (the whole range
 * when sd is not finite).
 * Flags: NONUNIQUE (sw_hi - sw_lo > sw_width_max, or a singular
 * direction); MULTIPLE (another start converged within chi2 + the 68 %
 * level of chi-square for n_par parameters - 2.30 for two, 3.53 for
 * three - at a saturation more than max(0.05, 2 sd) away and outside
 * [sw_lo, sw_hi], or at a porosity more than max(0.01, 2 sd) away; with
 * a profile also a second valley of the profile); BOUND_* (within 1e-6
 * of the range of a bound); OUTSIDE (chi2 above the 99 % point of
 * chi-square with max(1, n_obs - n_par) degrees of freedom: 6.63 for
 * one); NOT_CONVERGED; MODEL_FAIL (the model failed at some trial
 * point). ws: from rw_rm_ws_new(cfg->n_obs, cfg->n_par).
 * errors: RW_EINVAL for NULL pointers, a workspace of other sizes or a
 * setup that fails rw_rm_inv_check; RW_EDOM for a non-finite observation
 * or sigma <= 0. Per-sample trouble is in out->flags, not the status.
 * out's numbers NaN on error. */
int rw_rm_invert(const rw_rm_inv_cfg *cfg, const double *obs,
                 const double *sigma, rw_rm_ws *ws, rw_rm_inv_result *out);

#ifdef __cplusplus
}
#endif

#endif
