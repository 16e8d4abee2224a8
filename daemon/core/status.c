/* Human-readable names of the core status codes, and the one place where
 * GSL statuses are translated to rockwire ones. */
#include <gsl/gsl_errno.h>

#include "rockwire/status.h"
#include "status_gsl.h"

const char *rw_strerror(int status)
{
	switch (status) {
	case RW_OK: return "ok";
	case RW_EDOM: return "input outside the domain of the formula";
	case RW_ERANGE: return "result out of range or not physical";
	case RW_EINVAL: return "inconsistent or underdetermined inputs";
	case RW_EMAXITER: return "iteration did not converge";
	default: return "unknown status";
	}
}

int rw__from_gsl(int gsl_status)
{
	switch (gsl_status) {
	case GSL_SUCCESS: return RW_OK;
	case GSL_EDOM: return RW_EDOM;
	case GSL_ERANGE:
	case GSL_EOVRFLW:
	case GSL_EUNDRFLW: return RW_ERANGE;
	case GSL_EMAXITER:
	case GSL_ENOPROG:
	case GSL_CONTINUE: return RW_EMAXITER;
	default: return RW_EINVAL;
	}
}
