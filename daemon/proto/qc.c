/* The QC flag legend: one table for every method, reported by service.info
 * and documented in protocol-docs/qc-flags.md. A flag is a bit in the
 * per-sample integer; 0 means clean. */
#include "proto/internal.h"

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
