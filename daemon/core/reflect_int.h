/* Internal to the compute core's reflectivity files: the medium check
 * behind rw_reflect_medium_check (include/rockwire/reflect.h), inline so
 * that the per-sample linearisations (avo.c) and the exact coefficients
 * (zoeppritz.c) do not pay an out-of-line call per medium and sample. */
#ifndef RW_REFLECT_INT_H
#define RW_REFLECT_INT_H

#include <math.h>
#include <stddef.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"

static inline int rw__medium_check(const rw_reflect_medium *m)
{
	if (m == NULL)
		return RW_EDOM;
	if (!isfinite(m->vp_ms) || !isfinite(m->vs_ms) ||
	    !isfinite(m->rho_kgm3))
		return RW_EDOM;
	if (m->vp_ms <= 0.0 || m->rho_kgm3 <= 0.0 || m->vs_ms < 0.0)
		return RW_EDOM;
	/* bulk modulus rho (vp^2 - 4/3 vs^2) must be positive */
	if (3.0 * m->vp_ms * m->vp_ms <= 4.0 * m->vs_ms * m->vs_ms)
		return RW_EDOM;
	return RW_OK;
}

#endif
