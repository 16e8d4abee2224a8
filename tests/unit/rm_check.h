/* Helpers shared by the rock-model unit tests: tolerance checks that
 * print both numbers and the Hashin-Shtrikman upper bound of a mineral
 * with empty pores. Include after <cmocka.h>. */
#ifndef RW_TESTS_RM_CHECK_H
#define RW_TESTS_RM_CHECK_H

#include <math.h>
#include <string.h>

#include "rockwire/mineral.h"
#include "rockwire/rockmodel.h"

/* Quartz, Mavko, Mukerji & Dvorkin 2009 table 7.1 (from memory; the
 * values of the core's mineral table). */
#define QZ_K   36.6e9
#define QZ_MU  45.0e9
#define QZ_RHO 2650.0

static inline void assert_rel(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol * fabs(want)))
		fail_msg("got %.15g, want %.15g (rel tol %g, rel dev %g)", got,
		         want, tol, (got - want) / want);
}

static inline void assert_abs(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol))
		fail_msg("got %.15g, want %.15g (abs tol %g)", got, want, tol);
}

/* Hashin-Shtrikman upper bound of a mineral with a volume fraction phi
 * of empty pores, through the core's mixer (Berryman 1995 N-phase form;
 * the lower bound is zero). */
static inline void hs_upper_vacuum(double k, double mu, double phi, double *ku,
                                   double *muu)
{
	double kk[2] = {k, 0.0}, mm[2] = {mu, 0.0}, rr[2] = {1.0, 0.0};
	double ff[2] = {1.0 - phi, phi}, rho;

	assert_int_equal(
	    rw_mineral_mix(RW_MIX_HS_UPPER, 2, kk, mm, rr, ff, ku, muu, &rho),
	    RW_OK);
}

#endif
