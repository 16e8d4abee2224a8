/* The QC flag bits: one legend for every method (protocol-docs/
 * qc-flags.md, generated from qc.c). A sample's flags are a 64-bit set;
 * 0 means clean. Only bits 0..52 are used so that the set is an exact
 * JSON number. Bits are grouped by family: 0-7 general and elastic, 8-15
 * fluids and rocks, 16-23 reflectivity, 24-35 well logs, 36-43 rock
 * models, 44-47 seismic modelling, 48-52 pressures and stresses. */
#ifndef RW_PROTO_QCBITS_H
#define RW_PROTO_QCBITS_H

#include <stdint.h>

#define QC_BIT(n) ((uint64_t)1 << (n))

#define QC_INPUT_INVALID    QC_BIT(0) /* non-finite / null / negative */
#define QC_RHO_NONPOSITIVE  QC_BIT(1)
#define QC_NU_IMPOSSIBLE    QC_BIT(2) /* nu outside [-1, 0.5) */
#define QC_MODULUS_NEGATIVE QC_BIT(3) /* K <= 0 or mu <= 0 */
#define QC_NU_NEGATIVE      QC_BIT(4) /* implausible: nu < 0 */
#define QC_RHO_RANGE        QC_BIT(5) /* implausible density */
#define QC_VP_RANGE         QC_BIT(6) /* implausible vp */
#define QC_VS_RANGE         QC_BIT(7) /* implausible vs */
/* Fluids and Gassmann (8-15). */
#define QC_FLUID_CALIBRATION QC_BIT(8)  /* fluid input outside B&W fit */
#define QC_FLUID_GOR_EXCESS  QC_BIT(9)  /* GOR above what oil dissolves */
#define QC_FLUID_BOILING     QC_BIT(10) /* p below water's boiling p */
#define QC_FLUID_FAILED      QC_BIT(11) /* correlation unphysical: null */
#define QC_GASSMANN_KDRY     QC_BIT(12) /* K_dry < 0 or > K_min: null */
#define QC_GASSMANN_PHI_LOW  QC_BIT(13) /* porosity < 0.05: ill-posed */
#define QC_SALINITY_LOW      QC_BIT(14) /* salinity < 100 ppm: a unit? */
#define QC_FLUID_GOR_RANGE   QC_BIT(15) /* GOR beyond the fit: null */
/* Reflectivity (16-23). */
#define QC_REFL_MEDIUM       QC_BIT(16) /* impossible medium: null */
#define QC_REFL_POSTCRITICAL QC_BIT(17) /* at/past the P critical angle */
#define QC_REFL_UNDEFINED    QC_BIT(18) /* an approximation has no value */
#define QC_REFL_NO_CRIT_P    QC_BIT(19) /* no P critical angle: null */
#define QC_REFL_NO_CRIT_S    QC_BIT(20) /* no S critical angle: null */
#define QC_REFL_POSTCRIT_S   QC_BIT(21) /* at/past the S critical angle */
#define QC_ANISO_UNSTABLE    QC_BIT(22) /* VTI medium not stable: null */
/* Well logs (24-31). */
#define QC_DRHO_HIGH     QC_BIT(24) /* |drho| above drho_limit */
#define QC_WASHOUT       QC_BIT(25) /* caliper - bit size > limit */
#define QC_VS_PREDICTED  QC_BIT(26) /* vs predicted, not measured */
#define QC_RHO_PREDICTED QC_BIT(27) /* density predicted */
#define QC_LOG_MISSING   QC_BIT(28) /* an input curve is null here */
#define QC_EMP_RANGE     QC_BIT(29) /* empirical relation extrapolated */
#define QC_SUBST_FAILED  QC_BIT(30) /* substituted outputs null */
#define QC_SUBST_CAUTION QC_BIT(31) /* Gassmann or fluid caution */
/* Well logs, continued (32-35). */
#define QC_BIT_SIZE_RANGE QC_BIT(32) /* bit size implausible */
/* Rock models, templates and inversion (36-43). */
#define QC_MODEL_RANGE   QC_BIT(36) /* input outside model validity */
#define QC_MODEL_BOUND   QC_BIT(37) /* frame above the HS bound */
#define QC_NOT_CONVERGED QC_BIT(38) /* an iteration did not converge */
#define QC_NO_SHEAR      QC_BIT(39) /* no shear rigidity (vs = 0) */
#define QC_INV_NONUNIQUE QC_BIT(40) /* the data do not fix the answer */
#define QC_INV_BOUND     QC_BIT(41) /* the estimate lies on a bound */
#define QC_INV_OUTSIDE   QC_BIT(42) /* observation outside the model */
#define QC_INV_MULTIPLE  QC_BIT(43) /* two separate solutions fit */
/* Seismic modelling (44-47). */
#define QC_SEIS_FILLED    QC_BIT(44) /* log value bridged or held */
#define QC_SEIS_NULL_NEAR QC_BIT(45) /* null interface within reach */
#define QC_SEIS_OUTSIDE   QC_BIT(46) /* outside the log or the axis */
#define QC_SEIS_FIT       QC_BIT(47) /* AVO fit poorly determined */
/* Pressures and stresses (48-52). */
#define QC_PRES_CAUTION      QC_BIT(48) /* every answer of the family */
#define QC_PRES_EXTRAPOLATED QC_BIT(49) /* trend or law beyond its data */
#define QC_PRES_NOT_SHALE    QC_BIT(50) /* not the shale it needs */
#define QC_PRES_INCONSISTENT QC_BIT(51) /* e.g. pp above overburden */
#define QC_STRENGTH_RANGE    QC_BIT(52) /* correlation outside its range */

#endif
