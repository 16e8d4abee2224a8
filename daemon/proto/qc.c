/* The QC flag legend: one table for every method, reported by service.info
 * and documented in protocol-docs/qc-flags.md. A flag is a bit in the
 * per-sample integer; 0 means clean. */
#include "proto/internal.h"

int proto_qc_index(uint64_t mask)
{
	int i = 0;
	assert(mask && !(mask & (mask - 1)));
	while (mask > 1) {
		mask >>= 1;
		i++;
	}
	return i;
}

const proto_qc_info proto_qc_legend[] = {
    {QC_INPUT_INVALID, "input_invalid", QC_IMPOSSIBLE,
     "an input of the sample is missing, not finite, or has no meaning "
     "(e.g. a negative velocity or slowness, or a pair with no real "
     "solution); outputs are null"},
    {QC_RHO_NONPOSITIVE, "density_nonpositive", QC_IMPOSSIBLE,
     "density <= 0; outputs are null"},
    {QC_NU_IMPOSSIBLE, "poisson_impossible", QC_IMPOSSIBLE,
     "Poisson's ratio outside [-1, 0.5) (equivalently K < 0 or mu <= 0); "
     "outputs are null"},
    {QC_MODULUS_NEGATIVE, "modulus_negative", QC_IMPOSSIBLE,
     "a bulk modulus < 0 or a shear modulus <= 0; outputs are null"},
    {QC_NU_NEGATIVE, "poisson_negative", QC_IMPLAUSIBLE,
     "Poisson's ratio < 0: possible for a solid, implausible for "
     "sedimentary rock (the usual 0 to 0.5 check, common practice)"},
    {QC_RHO_RANGE, "density_implausible", QC_IMPLAUSIBLE,
     "density outside the plausibility range (default 1.0-3.2 g/cm3, "
     "common practice; params qc.rho_min, qc.rho_max)"},
    {QC_VP_RANGE, "vp_implausible", QC_IMPLAUSIBLE,
     "vp outside the plausibility range (default 1200-7500 m/s, common "
     "practice; params qc.vp_min, qc.vp_max)"},
    {QC_VS_RANGE, "vs_implausible", QC_IMPLAUSIBLE,
     "vs outside the plausibility range (default 0-4500 m/s, common "
     "practice; params qc.vs_min, qc.vs_max)"},
    {QC_REFL_MEDIUM, "medium_impossible", QC_IMPOSSIBLE,
     "a medium of the interface or sample is impossible (vp <= 0, "
     "rho <= 0, vs < 0, 3 vp^2 <= 4 vs^2, or a VTI medium the Thomsen "
     "checks refuse); its reflectivity outputs are null"},
    {QC_REFL_POSTCRITICAL, "postcritical", QC_RANGE,
     "incidence at or past the P critical angle of the interface: the "
     "exact coefficients are complex (their _im and _phase members), the "
     "linearised forms are not valid there and are null. It says nothing "
     "of the S critical angle, which may lie above (see postcritical_s)"},
    {QC_REFL_POSTCRIT_S, "postcritical_s", QC_RANGE,
     "incidence at or past the S critical angle (vs of the lower medium "
     "above vp of the upper): converted waves are evanescent there"},
    {QC_REFL_UNDEFINED, "approximation_undefined", QC_RANGE,
     "a requested formula has no value for this sample although the "
     "media are possible (90 deg incidence, gray_lmr with a mean lambda "
     "of 0, EI of a fluid at a non-zero angle, overflow); that value is "
     "null, the others are given"},
    {QC_REFL_NO_CRIT_P, "no_critical_p", QC_INPUT,
     "vp of the lower medium is not above vp of the upper: there is no P "
     "critical angle and critical_p is null"},
    {QC_REFL_NO_CRIT_S, "no_critical_s", QC_INPUT,
     "vs of the lower medium is not above vp of the upper (or it is a "
     "fluid): there is no S critical angle and critical_s is null"},
    {QC_ANISO_UNSTABLE, "stiffness_unstable", QC_IMPOSSIBLE,
     "the VTI stiffness is not positive definite, C33 <= C44, vs0 is "
     "not in (0, vp0), delta admits no real C13, or a fluid (vs0 = 0) is "
     "given anisotropy; outputs are null"},
    {QC_DRHO_HIGH, "density_correction_high", QC_INPUT,
     "|drho| above drho_limit (default 0.05 g/cm3, the strict end of "
     "the 0.05-0.10 g/cm3 common practice): the density log is doubtful "
     "(replaced by a prediction only with rho_replace_bad)"},
    {QC_WASHOUT, "washout", QC_INPUT,
     "caliper exceeds bit size by more than washout_limit (default "
     "1 in = 0.0254 m, common practice): pad and sonic readings are "
     "doubtful"},
    {QC_BIT_SIZE_RANGE, "bit_size_implausible", QC_INPUT,
     "bit size outside 3-30 in (76-762 mm, common practice for drilled "
     "holes): probably given in another unit; the washout check uses it "
     "as given"},
    {QC_VS_PREDICTED, "vs_predicted", QC_PREDICTED,
     "vs was predicted from vp (vs_predicted_by in the result names the "
     "relation), not measured"},
    {QC_RHO_PREDICTED, "density_predicted", QC_PREDICTED,
     "density was predicted from vp (rho_predicted_by names the "
     "relation), not measured"},
    {QC_LOG_MISSING, "input_missing", QC_INPUT,
     "an input curve is null (missing) at this sample; outputs that need "
     "it are null unless predicted"},
    {QC_EMP_RANGE, "empirical_extrapolated", QC_RANGE,
     "an empirical relation was used outside the range it was fitted on "
     "(protocol-docs/logs.md lists the ranges)"},
    {QC_SUBST_FAILED, "substitution_failed", QC_IMPOSSIBLE,
     "Gassmann substitution impossible at this sample (missing or "
     "unphysical input, fluid outside the correlations' domain); "
     "substituted outputs are null"},
    {QC_SUBST_CAUTION, "substitution_caution", QC_RANGE,
     "substitution computed with a caution: dry-frame K < 0 or above "
     "the mineral's, porosity below 0.05, or a fluid property outside "
     "its fitted range"},
    {QC_FLUID_CALIBRATION, "fluid_outside_calibration", QC_RANGE,
     "a pore-fluid input (pressure, temperature, salinity, gas gravity, "
     "oil API, gas pseudo-reduced p or T) is outside the range Batzle & "
     "Wang 1992 fitted; the value is extrapolated (ranges in "
     "fluids.md)"},
    {QC_FLUID_GOR_EXCESS, "gor_above_saturation", QC_IMPLAUSIBLE,
     "the oil's GOR exceeds the gas it can dissolve at this pressure "
     "and temperature (Batzle & Wang 1992 eq. 21): free gas would be "
     "present, so a single live-oil phase is not the real state"},
    {QC_FLUID_GOR_RANGE, "gor_beyond_correlation", QC_IMPOSSIBLE,
     "the oil's GOR is beyond what the Batzle & Wang 1992 live-oil "
     "correlation supports (its pseudo-density, eq. 22, falls below the "
     "limit in fluids.md); the oil's outputs are null"},
    {QC_SALINITY_LOW, "salinity_suspicious", QC_INPUT,
     "a brine salinity below 100 ppm given in the default unit (ppm): "
     "fresh water is possible, but a value meant in g/kg or percent "
     "would look the same; give units.salinity to say which"},
    {QC_FLUID_BOILING, "water_boiling", QC_IMPLAUSIBLE,
     "pressure below the boiling pressure of pure water at this "
     "temperature (IAPWS-IF97 eq. 30): the brine would be vapour; the "
     "liquid correlation is extrapolated"},
    {QC_FLUID_FAILED, "fluid_unphysical", QC_IMPOSSIBLE,
     "a fluid correlation gives no physical value here (non-positive "
     "density or velocity far outside its fit); outputs that need it "
     "are null"},
    {QC_GASSMANN_KDRY, "dry_frame_impossible", QC_IMPOSSIBLE,
     "Gassmann's dry-frame bulk modulus is below 0 or above the "
     "mineral's: the logs, porosity, mineral and fluid are inconsistent; "
     "k_dry is reported, the substituted rock is null"},
    {QC_GASSMANN_PHI_LOW, "porosity_low_gassmann", QC_RANGE,
     "porosity below 0.05: Gassmann's substitution is ill-conditioned "
     "(errors in the mineral modulus and logs are amplified roughly as "
     "1/porosity; common practice)"},
    {QC_MODEL_RANGE, "model_outside_range", QC_RANGE,
     "a rock-model input is outside the model's range of validity "
     "(porosity above critical, aspect ratio, coordination number, "
     "pressure, a dilute-limit concentration exceeded, cement above 10 %; "
     "values kept) or the model has no value there (outputs null); in "
     "rock.invert also: the model was undefined at some trial points, "
     "and rock.pressure_fit: a prediction outside the measured pressures "
     "(rockmodels.md)"},
    {QC_MODEL_BOUND, "model_above_bound", QC_IMPLAUSIBLE,
     "the model's dry frame is stiffer than the Hashin-Shtrikman upper "
     "bound of mineral and empty pores (or than the mineral itself): the "
     "model is used where it does not hold; the value is kept so the "
     "break is visible"},
    {QC_NOT_CONVERGED, "not_converged", QC_IMPOSSIBLE,
     "an iteration (self-consistent, DEM) did not converge: outputs are "
     "null; in rock.invert no start converged and the estimate is the "
     "best point reached"},
    {QC_NO_SHEAR, "no_shear_rigidity", QC_INPUT,
     "the frame has no shear rigidity (vs = 0, a suspension; the "
     "self-consistent solid no longer percolates): vp/vs is null, "
     "Poisson's ratio 0.5"},
    {QC_INV_NONUNIQUE, "inversion_nonunique", QC_RANGE,
     "the observations do not fix the answer: a range of saturations "
     "(typically any gas saturation from a few percent up) fits as well "
     "within the uncertainty; see the returned range"},
    {QC_INV_BOUND, "inversion_on_bound", QC_RANGE,
     "an estimate lies on a bound of its search range (porosity, "
     "saturation or clay)"},
    {QC_INV_OUTSIDE, "inversion_outside_model", QC_RANGE,
     "the observation lies outside what the model produces over the "
     "search ranges: the estimate is the closest the model comes"},
    {QC_INV_MULTIPLE, "inversion_multiple", QC_RANGE,
     "two separate solutions fit the observations; the second is "
     "returned beside the first"},
    {QC_SEIS_FILLED, "log_filled", QC_PREDICTED,
     "a value here is filled in, not measured: a null sonic bridged by "
     "interpolation, the last sonic held below the log, the replacement "
     "velocity above it, the checkshot drift held beyond the checkshots' "
     "span, or (upscaling) nulls in the averaging window left out and "
     "the rest reweighted"},
    {QC_SEIS_NULL_NEAR, "null_within_wavelet", QC_INPUT,
     "a null interface lies within the wavelet's reach (its samples at "
     "or above 1% of its peak) of this trace sample: its amplitude "
     "misses that interface (null, or kept when asked)"},
    {QC_SEIS_OUTSIDE, "outside_log", QC_INPUT,
     "the sample lies outside the log's depth or time span: a resampled "
     "value or a block value is null there; a trace sample there sees no "
     "interface of the log (only wavelet tails); an upscaling window is "
     "cut to the log"},
    {QC_SEIS_FIT, "fit_poor", QC_RANGE,
     "the AVO fit is poorly determined: no residual degree of freedom "
     "(no uncertainty), nearly singular over the angles used, or too few "
     "usable angles (then null)"},
    {QC_PRES_CAUTION, "pressure_screening_only", QC_INPUT,
     "set on every sample of every pressure, stress and strength answer: "
     "a screening estimate only, never the sole basis for mud-weight, "
     "casing or well-control decisions (pressure.md says what each "
     "method cannot see)"},
    {QC_PRES_EXTRAPOLATED, "pressure_extrapolated", QC_RANGE,
     "the estimate leans on an assumption or an extrapolation: the "
     "shallow-density law over this step, the default (shelf) law anywhere "
     "above, a density held over a gap or a doubtful one not used, a "
     "compaction trend beyond the depths it was fitted on or given without "
     "them, or the brine correlation outside its fit (pressure_detail "
     "says which)"},
    {QC_PRES_NOT_SHALE, "not_shale", QC_RANGE,
     "the sample fails the shale selector (vsh below vsh_min, or vsh "
     "missing): Eaton and Bowers read shale compaction, so the pore "
     "pressure here is outside their basis; it is computed all the same"},
    {QC_PRES_INCONSISTENT, "pressure_inconsistent", QC_IMPLAUSIBLE,
     "the estimate contradicts its frame: pore pressure below hydrostatic "
     "or at the overburden, a fracture gradient outside pore pressure and "
     "overburden, the overburden below hydrostatic, a velocity below "
     "Bowers' v0, a trend faster than any matrix, a static modulus above "
     "the dynamic one; reported, never clipped (but a pore pressure "
     "below zero absolute is no pressure: null)"},
    {QC_STRENGTH_RANGE, "strength_extrapolated", QC_RANGE,
     "a strength or static-modulus correlation used outside its "
     "calibration span, or on the other lithology than it was fitted on "
     "(pressure.md names each one's source, rock and span)"},
    {0, NULL, QC_INPUT, NULL},
};

const char *proto_qc_class_name(proto_qc_class c)
{
	switch (c) {
	case QC_IMPOSSIBLE: return "impossible";
	case QC_IMPLAUSIBLE: return "implausible";
	case QC_PREDICTED: return "predicted";
	case QC_RANGE: return "outside_calibration";
	default: return "input";
	}
}
