/* Pressures and stresses while drilling, for the rockwire compute core:
 * overburden (vertical stress) from bulk density, hydrostatic pressure,
 * the normal compaction trend of sonic slowness, pore pressure after
 * Eaton 1975 and Bowers 1995, the minimum horizontal stress (fracture
 * gradient) after Eaton 1969, Matthews & Kelly 1967 and the poroelastic
 * uniaxial-strain model, and equivalent-mud-weight conversions.
 *
 * SCREENING ESTIMATES ONLY. Results may feed drilling decisions but are
 * never the sole basis for mud-weight, casing or well-control decisions:
 * those belong to qualified people under the operator's procedures, local
 * regulations and licensed practice. Every extrapolation is flagged per
 * sample (RW_PRES_WARN_*); protocol-docs/pressure.md says what each method
 * cannot see.
 *
 * Conventions at this API:
 * - SI units: Pa, kg/m^3, m, s/m, m/s. Pressures and stresses are gauge
 *   (relative to the atmosphere), the drilling convention; the Batzle &
 *   Wang brine is evaluated at gauge + RW_PRES_P_ATM.
 * - Depth z is true vertical depth (TVD) in metres below the depth datum,
 *   the drill floor (rotary table / kelly bushing). The air gap is the
 *   datum's height above sea level (offshore) or above ground level (on
 *   land); the water depth is sea level to mudline (0 on land). Below the
 *   mudline, z_bml = z - air_gap - water_depth. Gradients and equivalent
 *   mud weights are referred to the datum: value / (g z).
 * - Functions return RW_OK or an RW_E* status (rockwire/status.h), write
 *   NaN outputs on failure, and write a bit set of RW_PRES_WARN_* to *warn
 *   (NULL allowed; the set is overwritten, not OR-ed). A warning never
 *   changes a result: values are reported, not clipped.
 * - Per-sample functions allocate nothing. The trend fit and the brine
 *   hydrostatic integration take a workspace the caller creates once with
 *   its _new and releases with its _free. Every function is reentrant; a
 *   workspace or a state must not be shared between threads. */
#ifndef ROCKWIRE_PRESSURE_H
#define ROCKWIRE_PRESSURE_H

#include <stddef.h>

#include "rockwire/status.h"

#ifdef __cplusplus
extern "C" {
#endif

/* ---- constants and conversion factors --------------------------------- */

/* Standard acceleration of gravity, m/s^2 (3rd CGPM 1901; exact by
 * definition). */
#define RW_PRES_G0 9.80665
/* International foot and inch, m, and avoirdupois pound, kg (1959
 * international yard and pound agreement; exact by definition). */
#define RW_PRES_FT_M  0.3048
#define RW_PRES_IN_M  0.0254
#define RW_PRES_LB_KG 0.45359237
/* Pound-force per square inch, Pa: 1 lbf = 0.45359237 kg x 9.80665 m/s^2
 * on 0.0254^2 m^2 (exact; 6894.757293168...). */
#define RW_PRES_PSI_PA                                                         \
	(RW_PRES_LB_KG * RW_PRES_G0 / (RW_PRES_IN_M * RW_PRES_IN_M))
/* US liquid gallon, m^3: 231 in^3 exactly (3.785411784 L). */
#define RW_PRES_GAL_M3 (231.0 * RW_PRES_IN_M * RW_PRES_IN_M * RW_PRES_IN_M)
/* 1 lb/gal (ppg) in kg/m^3: 0.45359237 / 3.785411784e-3 = 119.826427...;
 * so 1 g/cm^3 = 8.3454 lb/gal (8.345 is the common-practice figure). */
#define RW_PRES_PPG_KGM3 (RW_PRES_LB_KG / RW_PRES_GAL_M3)
/* 1 psi/ft in Pa/m (22620.59...); fresh water at 1000 kg/m^3 and g0 is
 * 0.43352 psi/ft (0.433 psi/ft is the common-practice figure). */
#define RW_PRES_PSIFT_PAM (RW_PRES_PSI_PA / RW_PRES_FT_M)
/* Standard atmosphere, Pa (exact by definition). */
#define RW_PRES_P_ATM 101325.0
/* Fresh water, kg/m^3 (common practice; IAPWS-95 gives 999.97 at 4 degC
 * and 998.2 at 20 degC, 0.1 MPa). */
#define RW_PRES_RHO_FRESH 1000.0
/* Sea water, kg/m^3 (common practice; IAPWS-08 seawater of 35.165 g/kg is
 * 1027.0 at 10 degC, 0.1 MPa, and about 1024-1028 over 0-25 degC). */
#define RW_PRES_RHO_SEA 1025.0

/* Default shallow-density power law below the mudline (see
 * rw_pres_column): rho = rho_ml + A (z_bml / s0)^p with rho_ml 16.3 lb/gal,
 * A 1 lb/gal, s0 3125 ft, p 0.6. A form common in practice for young
 * clastic shelf sediments; the coefficients are from memory and are not
 * calibrated to any basin. In deep water, mudline densities are often much
 * lower (about 1.4-1.7 g/cm^3, from memory) and this default then
 * overstates the shallow overburden: calibrate it. No cap by default. */
#define RW_PRES_SHALLOW_RHO_ML (16.3 * RW_PRES_PPG_KGM3)
#define RW_PRES_SHALLOW_A      (1.0 * RW_PRES_PPG_KGM3)
#define RW_PRES_SHALLOW_S0     (3125.0 * RW_PRES_FT_M)
#define RW_PRES_SHALLOW_P      0.6

/* Slowness below which a compaction trend is faster than any common rock
 * matrix (dolomite is about 43.5 us/ft = 7000 m/s; common practice): the
 * trend is then not a shale compaction trend. s/m. */
#define RW_PRES_DT_FASTEST (1.0 / 7000.0)

/* ---- warning bits (a set; 0 = nothing to report) ---------------------- */

#define RW_PRES_WARN_ABOVE_MUDLINE                                             \
	0x00001u /* sample at or above the mudline: the value is the air or    \
	          * water column, not formation */
#define RW_PRES_WARN_OBG_TREND                                                 \
	0x00002u /* overburden over this step from the shallow density trend   \
	          * (no log density yet): extrapolated */
#define RW_PRES_WARN_RHO_HELD                                                  \
	0x00004u /* density missing here: the last valid density was held      \
	          * over this step */
#define RW_PRES_WARN_DEPTH_REPEAT                                              \
	0x00008u /* depth equal to the previous sample: the previous value is  \
	          * repeated and the state is unchanged */
#define RW_PRES_WARN_RESUMED                                                   \
	0x00010u /* the running integral was resumed from a given value,       \
	          * which the core cannot check */
#define RW_PRES_WARN_FLUID_RANGE                                               \
	0x00020u /* the brine correlation (Batzle & Wang 1992) was used        \
	          * outside its fitted range in this step */
#define RW_PRES_WARN_TREND_EXTRAPOLATED                                        \
	0x00040u /* depth outside the depth span the trend was fitted on */
#define RW_PRES_WARN_TREND_NORANGE                                             \
	0x00080u /* the trend was given without a depth span: its validity     \
	          * here is unknown */
#define RW_PRES_WARN_TREND_FAST                                                \
	0x00100u /* trend slowness below RW_PRES_DT_FASTEST: faster than any   \
	          * common matrix, not a compaction trend */
#define RW_PRES_WARN_PP_BELOW_HYDRO                                            \
	0x00200u /* pore pressure below hydrostatic (reported, not clipped)    \
	          */
#define RW_PRES_WARN_PP_AT_SV                                                  \
	0x00400u /* pore pressure at or above the overburden: no effective     \
	          * stress left (reported, not clipped) */
#define RW_PRES_WARN_UNLOADING                                                 \
	0x00800u /* Bowers unloading branch used at this sample */
#define RW_PRES_WARN_FG_BELOW_PP                                               \
	0x01000u /* horizontal stress below pore pressure (reported, not       \
	          * clipped) */
#define RW_PRES_WARN_FG_ABOVE_SV                                               \
	0x02000u /* minimum horizontal stress above the overburden: not a      \
	          * normal-faulting state; a fracture would open horizontally  \
	          * at about the overburden */
#define RW_PRES_WARN_NU_NONPOSITIVE                                            \
	0x04000u /* Poisson's ratio <= 0: possible for a solid, implausible    \
	          * for sedimentary rock */
#define RW_PRES_WARN_HORIZ_SWAPPED                                             \
	0x08000u /* the "maximum" horizontal stress came out below the         \
	          * minimum (strains given in the wrong order?) */

/* ---- geometry of the column above the log ----------------------------- */

/* The column above the first log sample, and the depth datum (see the
 * header paragraph). All members finite.
 * air_gap_m >= 0; water_depth_m >= 0; rho_sea_kgm3 in (0, 2000];
 * g_ms2 in [9.7, 9.9] (Earth's surface gravity spans about 9.780-9.832
 * m/s^2; common practice);
 * shallow density below the mudline, rho(s) = min(rho_cap,
 * rho_ml + A (s / s0)^p) at s metres below the mudline (a power law of
 * depth below the mudline, common practice): rho_ml_kgm3 in (0, 3500],
 * rho_a_kgm3 >= 0 (0 gives the constant rho_ml), trend_s0_m > 0,
 * trend_p in (0, 3], rho_cap_kgm3 >= rho_ml_kgm3 (+INFINITY for no cap;
 * the only non-finite value accepted). */
typedef struct rw_pres_column {
	double air_gap_m;
	double water_depth_m;
	double rho_sea_kgm3;
	double g_ms2;
	double rho_ml_kgm3;
	double rho_a_kgm3;
	double trend_s0_m;
	double trend_p;
	double rho_cap_kgm3;
} rw_pres_column;

/* Fills *col with the defaults: air gap 0, water depth 0 (land),
 * RW_PRES_RHO_SEA, RW_PRES_G0, the RW_PRES_SHALLOW_* power law, no cap.
 * No errors. */
void rw_pres_column_init(rw_pres_column *col);

/* Checks every member of *col against the ranges above. On failure *field
 * (may be NULL) receives the member's name without its unit suffix
 * ("air_gap", "water_depth", "rho_sea", "g", "rho_ml", "rho_a",
 * "trend_s0", "trend_p", "rho_cap"), else NULL.
 * errors: RW_EDOM for a member out of range or not finite. */
int rw_pres_column_check(const rw_pres_column *col, const char **field);

/* Depth of the mudline below the datum, air gap + water depth, m. */
double rw_pres_column_mudline(const rw_pres_column *col);

/* Shallow-trend density at s_bml_m >= 0 metres below the mudline and its
 * integral from the mudline, int_0^s rho ds (kg/m^2), in closed form:
 * rho_ml s + A s0 (s/s0)^(p+1) / (p+1) below the cap depth
 * s_c = s0 ((rho_cap - rho_ml)/A)^(1/p), plus rho_cap (s - s_c) beyond it.
 * Either output may be NULL. col must pass rw_pres_column_check.
 * errors: RW_EDOM for s < 0 or non-finite (outputs NaN). */
int rw_pres_shallow_density(const rw_pres_column *col, double s_bml_m,
                            double *rho_kgm3, double *int_kgm2);

/* ---- overburden -------------------------------------------------------- */

/* Running state of the overburden integral. Treat as opaque: create it
 * with rw_pres_obg_init or rw_pres_obg_resume. z_m is the depth of the
 * last sample integrated (the mudline at start), sv_pa the vertical
 * stress there, rho_kgm3 the density carried into the next step (NaN
 * until the first valid log density), sv_assumed_pa the part of sv_pa
 * that this state integrated from assumed densities (shallow trend, held
 * density), resumed non-zero after rw_pres_obg_resume. */
typedef struct rw_pres_obg_state {
	double z_m;
	double sv_pa;
	double rho_kgm3;
	double sv_assumed_pa;
	int resumed;
} rw_pres_obg_state;

/* One answered sample of the overburden. grad_pam is sv / z (Pa/m,
 * referred to the datum; NaN at z = 0); sv_assumed_pa as in the state. */
typedef struct rw_pres_obg_out {
	double sv_pa;
	double grad_pam;
	double sv_assumed_pa;
} rw_pres_obg_out;

/* Starts the integral at the mudline: z = air gap + water depth,
 * sv = rho_sea g water_depth, no log density yet.
 * errors: RW_EDOM when col fails rw_pres_column_check (state NaN). */
int rw_pres_obg_init(const rw_pres_column *col, rw_pres_obg_state *st);

/* Starts the integral from a known vertical stress sv_pa at depth z_m
 * (a restart of the feed). z_m >= the mudline depth; sv_pa finite and at
 * least the water column rho_sea g water_depth; rho_kgm3 the density at
 * z_m (finite and > 0), or NaN when unknown: the following steps then use
 * the shallow trend until the next valid log density, as at the start.
 * Every later answer carries RW_PRES_WARN_RESUMED.
 * errors: RW_EDOM for col out of range or an argument out of range
 * (state NaN). */
int rw_pres_obg_resume(const rw_pres_column *col, double z_m, double sv_pa,
                       double rho_kgm3, rw_pres_obg_state *st);

/* Integrates the overburden to the sample (z_m, rho_kgm3) and answers it:
 * Sv(z) = rho_sea g h_w + g int_{mudline}^{z} rho(z') dz'
 * (the vertical stress of a laterally uniform column; e.g. Zoback 2007,
 * Reservoir Geomechanics, sec. 1.2, from memory). Rules, the same in a
 * batch and in a live feed (this is the only integrator):
 * - before the first valid density the step follows the shallow trend in
 *   closed form (RW_PRES_WARN_OBG_TREND), and so does the step that ends
 *   at the first valid density: the log takes over from there, with no
 *   blending;
 * - between two valid densities, the trapezoidal rule on the log's own
 *   samples, g (z - z_prev) (rho_prev + rho) / 2 (exact for density
 *   linear in depth);
 * - a missing density (NaN, infinite or <= 0) holds the last valid one
 *   over the step, g (z - z_prev) rho_prev (RW_PRES_WARN_RHO_HELD): causal,
 *   so a live feed can answer at once;
 * - 0 <= z <= mudline while the state is still at the mudline: the air or
 *   water column, rho_sea g max(0, z - air gap), without touching the
 *   state (RW_PRES_WARN_ABOVE_MUDLINE);
 * - z equal to the state's depth: the state's value again
 *   (RW_PRES_WARN_DEPTH_REPEAT), state unchanged.
 * On success the state advances to z; on error it is unchanged.
 * errors: RW_EDOM for z < 0 or non-finite; RW_EINVAL for z shallower than
 * the state's depth (the log must go down) or col out of range. */
int rw_pres_obg_step(const rw_pres_column *col, rw_pres_obg_state *st,
                     double z_m, double rho_kgm3, rw_pres_obg_out *out,
                     unsigned *warn);

/* Batch form: rw_pres_obg_init, then rw_pres_obg_step on each of the n
 * samples in order, so a batch and a feed of the same samples agree
 * exactly. out[i] and warn[i] (warn may be NULL) per sample; a sample
 * whose step fails has NaN outputs and the integral carries on from the
 * last good sample. status[i] (may be NULL) receives each step's status.
 * Returns RW_OK, or RW_EDOM when col fails its check (all outputs NaN) or
 * RW_EINVAL for n > 0 with a NULL array. */
int rw_pres_obg_batch(const rw_pres_column *col, size_t n, const double *z_m,
                      const double *rho_kgm3, rw_pres_obg_out *out,
                      unsigned *warn, int *status);

/* ---- hydrostatic pressure ---------------------------------------------- */

/* Hydrostatic (normal) pore pressure at z_m for a pore water of constant
 * density rho_w_kgm3 (in (0, 2000]; RW_PRES_RHO_FRESH is the common
 * default; a gradient G in Pa/m is rho_w = G / g): the sea-water column
 * down to the mudline and pore water below it,
 * p = rho_sea g h_w + rho_w g (z - mudline); in the water column
 * rho_sea g (z - air gap); 0 in the air gap
 * (RW_PRES_WARN_ABOVE_MUDLINE for both). On land (h_w = 0) this is
 * rho_w g (z - air gap): the column starts at ground level (a water table
 * at the surface).
 * errors: RW_EDOM for z < 0, non-finite z or rho_w out of range, or col
 * out of range. */
int rw_pres_hydro_const(const rw_pres_column *col, double z_m,
                        double rho_w_kgm3, double *p_pa, unsigned *warn);

/* Workspace of the brine hydrostatic integration (a GSL ODE driver).
 * rw_pres_hydro_ws_new returns NULL when out of memory; the caller frees
 * it with rw_pres_hydro_ws_free (NULL is a no-op). */
typedef struct rw_pres_hydro_ws rw_pres_hydro_ws;
rw_pres_hydro_ws *rw_pres_hydro_ws_new(void);
void rw_pres_hydro_ws_free(rw_pres_hydro_ws *ws);

/* Running state of the brine hydrostatic integral: depth, gauge pressure,
 * temperature and salinity at the last sample. */
typedef struct rw_pres_hydro_state {
	double z_m;
	double p_pa;
	double t_degc;
	double sal_frac;
	int resumed;
} rw_pres_hydro_state;

/* Starts the brine integral at the mudline with p = rho_sea g h_w and the
 * mudline temperature t_ml_degc (in [-22, 350]) and NaCl weight fraction
 * sal_frac (in [0, 0.35]).
 * errors: RW_EDOM for an argument or col out of range (state NaN). */
int rw_pres_hydro_brine_init(const rw_pres_column *col, double t_ml_degc,
                             double sal_frac, rw_pres_hydro_state *st);

/* Starts the brine integral from a known gauge pressure p_pa >= 0 at
 * z_m >= mudline, with the temperature and salinity there. Later answers
 * carry RW_PRES_WARN_RESUMED.
 * errors: RW_EDOM for an argument or col out of range (state NaN). */
int rw_pres_hydro_brine_resume(const rw_pres_column *col, double z_m,
                               double p_pa, double t_degc, double sal_frac,
                               rw_pres_hydro_state *st);

/* Hydrostatic pressure of a NaCl brine whose density follows Batzle &
 * Wang 1992 (eq. 27b, rockwire/fluid.h) at the local pressure,
 * temperature and salinity: integrates dp/dz = rho(p + p_atm, T(z), S(z)) g
 * from the state's depth to z_m with GSL's adaptive Runge-Kutta-Fehlberg
 * (4,5) driver (absolute tolerance 1e-3 Pa, relative 1e-10), T and S
 * linear in depth between the state and this sample. rho_kgm3 (may be
 * NULL) is the brine density at z_m. RW_PRES_WARN_FLUID_RANGE when the
 * brine correlation was used outside its fitted range in the step (above
 * 100 degC or 100 MPa, or salinity above 0.30; rockwire/fluid.h). Samples
 * at or above the mudline and repeated depths follow the same rules as
 * rw_pres_obg_step. On success the state advances; on error it is
 * unchanged.
 * errors: RW_EDOM for z, t_degc (in [-22, 350]) or sal_frac (in
 * [0, 0.35]) out of range or non-finite, or when the brine correlation has
 * no value in the step; RW_EINVAL for z above the state's depth, a NULL
 * workspace or col out of range; RW_EMAXITER when the ODE driver fails. */
int rw_pres_hydro_brine_step(rw_pres_hydro_ws *ws, const rw_pres_column *col,
                             rw_pres_hydro_state *st, double z_m, double t_degc,
                             double sal_frac, double *p_pa, double *rho_kgm3,
                             unsigned *warn);

/* ---- equivalent mud weight --------------------------------------------- */

/* Equivalent mud weight of a pressure or stress p_pa at depth z_m below
 * the datum: rho = p / (g z) in kg/m^3 (divide by 1000 for g/cm^3 = SG,
 * by RW_PRES_PPG_KGM3 for lb/gal); the gradient p / z in Pa/m (divide by
 * RW_PRES_PSIFT_PAM for psi/ft). Either output may be NULL. g_ms2 in
 * [9.7, 9.9].
 * errors: RW_EDOM for z <= 0, g out of range or non-finite p. */
int rw_pres_emw(double p_pa, double z_m, double g_ms2, double *rho_kgm3,
                double *grad_pam);

/* The pressure of a mud weight rho_kgm3 (> 0) at depth z_m (>= 0):
 * p = rho g z, Pa.
 * errors: RW_EDOM for an argument out of range or non-finite. */
int rw_pres_from_emw(double rho_kgm3, double z_m, double g_ms2, double *p_pa);

/* ---- normal compaction trend ------------------------------------------- */

/* Forms of the trend of shale sonic slowness with depth s below the
 * mudline:
 * RW_PRES_TREND_EXP:    dt(s) = dt_ma + (dt_ml - dt_ma) exp(-c s), the
 *   exponential porosity decline of Athy 1930 (phi = phi_0 exp(-c s);
 *   AAPG Bull. 14, from memory) carried through the Wyllie et al. 1956
 *   time average, which makes dt - dt_ma proportional to phi; dt_ma the
 *   deep (matrix) limit, dt_ml the slowness at the mudline.
 * RW_PRES_TREND_LOGLIN: dt(s) = dt_ml exp(-c s), a straight line of
 *   log slowness against depth (common practice). It has no matrix limit
 *   and runs below any matrix slowness at depth (RW_PRES_WARN_TREND_FAST).
 */
enum { RW_PRES_TREND_EXP = 0, RW_PRES_TREND_LOGLIN = 1 };

/* A trend, fitted (rw_pres_trend_fit) or given (rw_pres_trend_given).
 * Slownesses in s/m, c in 1/m, depths in m below the mudline.
 * cov: covariance of (dt_ma, dt_ml, c) in SI units from the fit (for
 *   LOGLIN row and column 0 are NaN); all NaN for a given trend.
 * rms_sm: root-mean-square slowness residual of the fitted samples.
 * s_min_m, s_max_m: depth span of the fitted samples (given: as set by
 *   the caller, NaN when not known).
 * n_used: samples in the fit (0 for a given trend). */
typedef struct rw_pres_trend {
	int form;
	double dt_ma_sm;
	double dt_ml_sm;
	double c_per_m;
	double cov[3][3];
	double rms_sm;
	double s_min_m;
	double s_max_m;
	size_t n_used;
} rw_pres_trend;

/* Builds a given trend. form RW_PRES_TREND_EXP needs
 * 0 < dt_ma < dt_ml, c > 0; LOGLIN ignores dt_ma (stored NaN) and needs
 * dt_ml > 0, c > 0. s_min_m <= s_max_m, both >= 0, or both NaN (span not
 * known: every evaluation is flagged RW_PRES_WARN_TREND_NORANGE).
 * errors: RW_EINVAL for an unknown form; RW_EDOM for an argument out of
 * range (trend NaN). */
int rw_pres_trend_given(int form, double dt_ma_sm, double dt_ml_sm,
                        double c_per_m, double s_min_m, double s_max_m,
                        rw_pres_trend *t);

/* Marks the samples of a log to fit the trend on: use[i] = 1 when depth
 * z_m[i] lies in one of the n_int closed intervals [top_m[k], base_m[k]]
 * (TVD below the datum, top <= base; the user's normally pressured
 * intervals; n_int = 0 means the whole log), dt_sm[i] is finite and
 * > 0, exclude[i] is 0 (exclude may be NULL; e.g. washouts), and, when
 * vsh is not NULL, vsh[i] is finite and >= vsh_min (the shale selector;
 * vsh from GR as the caller computes it). *n_use (may be NULL) counts the
 * marked samples.
 * errors: RW_EINVAL for NULL arrays with n > 0 (or n_int > 0), RW_EDOM
 * for an interval with top > base or non-finite bounds, or vsh_min
 * outside [0, 1] when vsh is given (use[] all 0). */
int rw_pres_trend_select(size_t n, const double *z_m, const double *dt_sm,
                         const double *vsh, double vsh_min,
                         const unsigned char *exclude, size_t n_int,
                         const double *top_m, const double *base_m,
                         unsigned char *use, size_t *n_use);

/* Workspace of the trend fit for up to n_max samples (a GSL nonlinear
 * least-squares workspace and scratch arrays). Returns NULL for n_max < 4
 * or when out of memory; free with rw_pres_trend_ws_free (NULL is a
 * no-op). */
typedef struct rw_pres_trend_ws rw_pres_trend_ws;
rw_pres_trend_ws *rw_pres_trend_ws_new(size_t n_max);
void rw_pres_trend_ws_free(rw_pres_trend_ws *ws);

/* Least-squares fit of a trend to the samples with use[i] != 0 (use may
 * be NULL: all samples), s_bml_m[i] depth below the mudline (>= 0),
 * dt_sm[i] slowness (> 0).
 * EXP: minimises sum (dt_i - dt(s_i))^2 over (dt_ma, dt_ml, c): a scan of
 *   c on a log grid (1e-6 to 1e-1 per m) with the linear sub-problem
 *   solved exactly (gsl_fit_linear) picks the start, GSL's
 *   Levenberg-Marquardt (gsl_multifit_nlinear) polishes it; covariance
 *   s^2 (J^T J)^-1 with s^2 = RSS / (m - 3) at the optimum.
 * LOGLIN: ordinary least squares of ln dt on s (gsl_fit_linear), the
 *   covariance of (ln dt_ml, -c) carried to (dt_ml, c) to first order.
 * Needs at least 4 (EXP) or 3 (LOGLIN) samples and a depth span > 0.
 * errors: RW_EINVAL for an unknown form, NULL arguments, more samples than
 * the workspace holds, too few samples or no depth span; RW_EDOM for a
 * used sample with s < 0, dt <= 0 or non-finite values; RW_ERANGE when
 * the optimum is not a compaction trend (dt_ml <= dt_ma, c outside
 * [1e-6, 0.1] per m, dt_ma <= 0) or the covariance is singular;
 * RW_EMAXITER when the solver does not converge. Trend NaN on error. */
int rw_pres_trend_fit(rw_pres_trend_ws *ws, int form, size_t n,
                      const double *s_bml_m, const double *dt_sm,
                      const unsigned char *use, rw_pres_trend *t);

/* Slowness of the trend at s_bml_m >= 0 below the mudline, and its
 * standard error sigma_sm (may be NULL) from the fit's covariance to
 * first order, sqrt(J C J^T) (NaN for a given trend). Warnings:
 * TREND_EXTRAPOLATED (s outside [s_min, s_max]), TREND_NORANGE, and
 * TREND_FAST.
 * errors: RW_EDOM for s < 0 or non-finite; RW_EINVAL for a trend with an
 * unknown form or non-finite parameters. */
int rw_pres_trend_eval(const rw_pres_trend *t, double s_bml_m, double *dt_sm,
                       double *sigma_sm, unsigned *warn);

/* ---- pore pressure ------------------------------------------------------ */

/* Eaton 1975 sonic method (SPE 5544, from memory):
 * pp = sv - (sv - ph) (dt_n / dt)^n, with the effective stress
 * sigma_pa = (sv - ph) (dt_n / dt)^n (may be NULL). sv_pa >= ph_pa >= 0
 * finite (overburden and hydrostatic at the sample); dt_sm > 0 the shale
 * slowness, dt_n_sm > 0 the normal-trend slowness there; exponent in
 * (0, 10] (3 is the usual sonic value, from memory). Slowness on the trend
 * gives pp = ph exactly. Warnings: PP_BELOW_HYDRO (dt < dt_n), PP_AT_SV
 * (no effective stress: sv = ph).
 * The method assumes a shale whose slowness departs from its trend only
 * through undercompaction; it cannot see unloading, lateral transfer or
 * non-shale rock (protocol-docs/pressure.md).
 * errors: RW_EDOM for an argument out of range or non-finite (outputs
 * NaN). */
int rw_pres_pore_eaton(double sv_pa, double ph_pa, double dt_sm, double dt_n_sm,
                       double exponent, double *pp_pa, double *sigma_pa,
                       unsigned *warn);

/* Standard error of the Eaton pore pressure due to the trend's standard
 * error sigma_dt_n_sm (>= 0, from rw_pres_trend_eval), to first order:
 * |d pp / d dt_n| sigma = (sv - ph) n (dt_n/dt)^(n-1) sigma / dt. Only
 * the trend's part of the uncertainty: the overburden's, the exponent's
 * and the log's are not in it. Arguments as rw_pres_pore_eaton.
 * errors: RW_EDOM for an argument out of range or non-finite (NaN). */
int rw_pres_pore_eaton_sigma(double sv_pa, double ph_pa, double dt_sm,
                             double dt_n_sm, double exponent,
                             double sigma_dt_n_sm, double *sigma_pp_pa);

/* Bowers 1995 velocity-effective-stress relation (SPE Drilling &
 * Completion 10(2), from memory), with sigma in MPa in the formulas:
 * virgin (loading) curve v = v0 + A sigma^B;
 * unloading curve v = v0 + A (sigma_max (sigma / sigma_max)^(1/U))^B for
 * sigma <= sigma_max, joining the virgin curve at sigma_max.
 * v0_ms > 0 (about 1524 m/s = 5000 ft/s is usual, from memory), a_ms > 0
 * (A in m/s per MPa^B; rw_pres_bowers_a_from_field converts from
 * ft/s per psi^B), b in (0, 2], u >= 1 (1: no hysteresis), sigma_max_pa
 * > 0 for the unloading branch or NaN for the virgin curve only. */
typedef struct rw_pres_bowers {
	double v0_ms;
	double a_ms;
	double b;
	double u;
	double sigma_max_pa;
} rw_pres_bowers;

/* A in m/s per MPa^B from A in ft/s per psi^B:
 * A_SI = 0.3048 A_field (1e6 / RW_PRES_PSI_PA)^B. NaN for non-finite
 * input. */
double rw_pres_bowers_a_from_field(double a_ftps_psib, double b);

/* sigma_max from the velocity v_max_ms at the onset of unloading, on the
 * virgin curve: sigma_max = ((v_max - v0) / A)^(1/B) MPa (Bowers 1995).
 * The v0, a_ms and b of *bw are used.
 * errors: RW_EDOM for parameters out of range or v_max <= v0. */
int rw_pres_bowers_sigma_max(const rw_pres_bowers *bw, double v_max_ms,
                             double *sigma_max_pa);

/* Velocity at effective stress sigma_pa >= 0 on the curve chosen by
 * unloading (0: virgin; non-zero: the unloading curve below sigma_max,
 * the virgin curve above it).
 * errors: RW_EDOM for parameters or sigma out of range (an unloading
 * request with sigma_max NaN is out of range). */
int rw_pres_bowers_velocity(const rw_pres_bowers *bw, int unloading,
                            double sigma_pa, double *v_ms);

/* Effective stress from velocity, the inverse of rw_pres_bowers_velocity:
 * virgin sigma = ((v - v0)/A)^(1/B); unloading (when asked and v below
 * the virgin velocity at sigma_max) sigma = sigma_max^(1-U)
 * ((v - v0)/A)^(U/B) (RW_PRES_WARN_UNLOADING).
 * errors: RW_EDOM for parameters out of range or non-finite v;
 * RW_ERANGE for v <= v0 (no positive effective stress on the curve). */
int rw_pres_bowers_sigma(const rw_pres_bowers *bw, int unloading, double v_ms,
                         double *sigma_pa, unsigned *warn);

/* Bowers pore pressure pp = sv - sigma(v). sv_pa >= 0; ph_pa the
 * hydrostatic pressure (>= 0) for the PP_BELOW_HYDRO check, or NaN to
 * skip it; sigma_pa may be NULL. Warnings: UNLOADING, PP_BELOW_HYDRO,
 * PP_AT_SV (never for v > v0: sigma > 0).
 * errors: as rw_pres_bowers_sigma, plus RW_EDOM for sv or ph out of
 * range. */
int rw_pres_pore_bowers(const rw_pres_bowers *bw, int unloading, double sv_pa,
                        double ph_pa, double v_ms, double *pp_pa,
                        double *sigma_pa, unsigned *warn);

/* ---- minimum horizontal stress / fracture gradient ---------------------- */

/* Eaton 1969 (J. Pet. Tech. 21(10), from memory):
 * shmin = nu / (1 - nu) (sv - pp) + pp. sv_pa >= pp_pa >= 0 finite;
 * nu in (-1, 0.5) (dynamic from logs, or static:
 * rw_strength_linear in rockwire/strength.h). For 0 < nu < 0.5 the
 * result lies strictly between pp and sv (sv > pp). Warnings:
 * NU_NONPOSITIVE, FG_BELOW_PP (nu < 0).
 * errors: RW_EDOM for an argument out of range or non-finite. */
int rw_pres_frac_eaton(double sv_pa, double pp_pa, double nu, double *shmin_pa,
                       unsigned *warn);

/* Matthews & Kelly 1967 (Oil & Gas J. 65, from memory):
 * shmin = pp + ki (sv - pp), with the matrix-stress coefficient ki in
 * [0, 1] (read from their depth chart for the basin, or calibrated on
 * leak-off tests). sv_pa >= pp_pa >= 0 finite.
 * errors: RW_EDOM for an argument out of range or non-finite. */
int rw_pres_frac_mk(double sv_pa, double pp_pa, double ki, double *shmin_pa);

/* Poroelastic horizontal stresses with tectonic strains (the
 * uniaxial-strain model plus horizontal strains, as in Thiercelin & Plumb
 * 1994, SPE Form. Eval. 9(4), from memory; Fjaer et al. 2008, Petroleum
 * Related Rock Mechanics, ch. 6, from memory):
 * shmin = nu/(1-nu) (sv - alpha pp) + alpha pp
 *         + E/(1-nu^2) (eps_h + nu eps_H),
 * shmax = the same with eps_h and eps_H swapped
 * (compression positive; eps_h, eps_H the total horizontal strains in the
 * directions of the minimum and maximum stress, 0 for both gives the
 * uniaxial-strain state). sv_pa >= pp_pa >= 0; nu in (-1, 0.5); alpha
 * (Biot) in [0, 1]; e_static_pa > 0 (static Young's modulus; ignored and
 * may be NaN when both strains are 0); |eps| <= 0.01. shmax_pa may be
 * NULL. With alpha = 1 and no strain this is Eaton 1969. Warnings:
 * NU_NONPOSITIVE, FG_BELOW_PP, FG_ABOVE_SV, HORIZ_SWAPPED (shmax <
 * shmin). Thermal stress is not included.
 * errors: RW_EDOM for an argument out of range or non-finite. */
int rw_pres_frac_poroelastic(double sv_pa, double pp_pa, double nu,
                             double alpha, double e_static_pa, double eps_h,
                             double eps_hmax, double *shmin_pa,
                             double *shmax_pa, unsigned *warn);

#ifdef __cplusplus
}
#endif

#endif
