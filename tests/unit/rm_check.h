/* Helpers shared by the rock-model unit tests (test_granular.c,
 * test_inclusion.c, test_framepress.c, test_rockmodel.c,
 * test_rockinvert.c): tolerance checks that print both numbers, the
 * Hashin-Shtrikman upper bound of a mineral with empty pores, and the
 * quartz-brine-gas sand the tests share. Include after <cmocka.h>. */
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

/* The shared invented sand: quartz with "clay" (Gulf clays row of the
 * core's table, from memory) mixed by Hill, critical porosity 0.40,
 * nine contacts, no slip; contact cement of quartz; spheroidal pores of
 * aspect 0.1 (clay pores 0.03); brine 2.8 GPa, 1030 kg/m^3 and gas
 * 0.06 GPa, 200 kg/m^3 (Batzle & Wang 1992 orders of magnitude at about
 * 20 MPa, 70 degC: invented round numbers), uniform (Wood) mixing. */
static inline void sand_spec(rw_rm_spec *s, int model)
{
	memset(s, 0, sizeof(*s));
	s->model = model;
	s->k_min_pa = QZ_K;
	s->mu_min_pa = QZ_MU;
	s->rho_min_kgm3 = QZ_RHO;
	s->k_clay_pa = 21e9;
	s->mu_clay_pa = 7e9;
	s->rho_clay_kgm3 = 2600.0;
	s->clay_mix = RW_MIX_HILL;
	s->phi_c = 0.40;
	s->coord = 9.0;
	s->slip = 1.0;
	s->k_cem_pa = QZ_K;
	s->mu_cem_pa = QZ_MU;
	s->cement_scheme = RW_RM_CEMENT_CONTACT;
	s->phi_b = 0.34;
	s->pore_shape = RW_RM_SHAPE_SPHEROID;
	s->aspect = 0.1;
	s->aspect_clay = 0.03;
	s->tol = 1e-10;
	s->k_brine_pa = 2.8e9;
	s->rho_brine_kgm3 = 1030.0;
	s->k_hc_pa = 0.06e9;
	s->rho_hc_kgm3 = 200.0;
	s->fluid_mix = RW_RM_FLUID_WOOD;
	s->brie_e = 3.0;
}

#endif
