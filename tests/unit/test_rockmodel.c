/* Unit tests of the saturated rock, the model spec and the templates
 * (daemon/core/rockmodel.c): the attributes against the project's
 * Gassmann and elastic conversions and the textbook identities, the
 * spec checks naming each bad field, rw_rm_dry against the model
 * functions it dispatches to, clay mixing, the fluid effects that the
 * inversion relies on (the gas effect and the flat response from a few
 * percent gas upwards under uniform saturation), and the template grid
 * and iso-lines. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>
#include <gsl/gsl_errno.h>

#include "rockwire/elastic.h"
#include "rockwire/fluid.h"
#include "rockwire/rock.h"
#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "unit/rm_check.h"

static rw_rm_ws *ws;

static int setup(void **state)
{
	(void)state;
	ws = rw_rm_ws_new(0, 0);
	return ws == NULL;
}

static int teardown(void **state)
{
	(void)state;
	rw_rm_ws_free(ws);
	return 0;
}

/* The saturated rock against the project's Gassmann frame and elastic
 * conversions (rock.h, elastic.h), and the identities lambda rho =
 * AI^2 - 2 SI^2 = (K - 2/3 mu) rho, mu rho = SI^2 (Goodway et al. 1997,
 * from memory) and nu = (r^2 - 2) / (2 (r^2 - 1)), r = vp/vs. */
static void test_saturate(void **state)
{
	static const double kd[] = {2e9, 6e9, 15e9};
	static const double md[] = {1.5e9, 7e9, 14e9};
	static const double ph[] = {0.08, 0.2, 0.33};
	static const double kf[] = {0.05e9, 2.6e9};
	static const double rf[] = {180.0, 1040.0};
	size_t i, j, l;

	(void)state;
	for (i = 0; i < 3; i++)
		for (j = 0; j < 3; j++)
			for (l = 0; l < 2; l++) {
				rw_rm_sat s;
				rw_rock_subst g;
				rw_elastic e;
				unsigned w;
				double r2;

				assert_int_equal(rw_rm_saturate(kd[i], md[i],
				                                ph[j], QZ_K,
				                                QZ_RHO, kf[l],
				                                rf[l], &s, &w),
				                 RW_OK);
				assert_int_equal(w, 0);
				rw_rock_gassmann_frame(kd[i], md[i], ph[j],
				                       QZ_K, QZ_RHO, kf[l],
				                       rf[l], &g, NULL);
				assert_rel(s.k_sat_pa, g.k_sat_pa, 1e-15);
				assert_rel(s.rho_kgm3, g.rho_kgm3, 1e-15);
				assert_rel(s.vp_ms, g.vp_ms, 1e-15);
				assert_rel(s.vs_ms, g.vs_ms, 1e-15);
				assert_int_equal(
				    rw_elastic_from_velocities(
				        s.vp_ms, s.vs_ms, s.rho_kgm3, &e, NULL),
				    RW_OK);
				assert_rel(s.ai, e.ai, 1e-14);
				assert_rel(s.si, e.si, 1e-14);
				assert_rel(s.vpvs, e.vpvs, 1e-14);
				assert_rel(s.nu, e.nu, 1e-12);
				assert_rel(s.lambda_rho, e.lambda * s.rho_kgm3,
				           1e-12);
				assert_rel(s.lambda_rho,
				           (s.k_sat_pa - 2.0 / 3.0 * md[i]) *
				               s.rho_kgm3,
				           1e-12);
				assert_rel(s.mu_rho, md[i] * s.rho_kgm3, 1e-14);
				r2 = s.vpvs * s.vpvs;
				assert_rel(s.nu, (r2 - 2) / (2 * (r2 - 1)),
				           1e-12);
			}
}

/* Edge cases: no pores (the frame is the rock, no fluid); no shear (a
 * suspension: vs = 0, vp/vs infinite, nu = 1/2, flagged); the Gassmann
 * warnings passed on; the errors. */
static void test_saturate_edges(void **state)
{
	rw_rm_sat s;
	unsigned w;

	(void)state;
	assert_int_equal(rw_rm_saturate(QZ_K, QZ_MU, 0.0, QZ_K, QZ_RHO, 2.6e9,
	                                1040.0, &s, &w),
	                 RW_OK);
	assert_rel(s.k_sat_pa, QZ_K, 0.0);
	assert_rel(s.rho_kgm3, QZ_RHO, 0.0);
	assert_rel(s.vp_ms, sqrt((QZ_K + 4.0 / 3.0 * QZ_MU) / QZ_RHO), 1e-15);
	assert_int_equal(w, 0);
	assert_int_equal(
	    rw_rm_saturate(0.0, 0.0, 0.45, QZ_K, QZ_RHO, 2.6e9, 1040.0, &s, &w),
	    RW_OK);
	assert_int_equal(w, RW_RM_WARN_NO_SHEAR);
	assert_true(s.vs_ms == 0.0 && isinf(s.vpvs) && s.si == 0.0);
	assert_rel(s.nu, 0.5, 0.0);
	assert_rel(s.k_sat_pa, 1.0 / (0.45 / 2.6e9 + 0.55 / QZ_K), 1e-14);
	rw_rm_saturate(30e9, 30e9, 0.03, QZ_K, QZ_RHO, 2.6e9, 1040.0, &s, &w);
	assert_int_equal(w, RW_RM_WARN_PHI_LOW);
	rw_rm_saturate(40e9, 30e9, 0.1, QZ_K, QZ_RHO, 2.6e9, 1040.0, &s, &w);
	assert_int_equal(w, RW_RM_WARN_FRAME_STIFF);
	assert_int_equal(rw_rm_saturate(-1.0, 30e9, 0.1, QZ_K, QZ_RHO, 2.6e9,
	                                1040.0, &s, &w),
	                 RW_EDOM);
	assert_true(isnan(s.vp_ms) && isnan(s.ai) && isnan(s.mu_rho));
	assert_int_equal(
	    rw_rm_saturate(5e9, 3e9, 1.0, QZ_K, QZ_RHO, 2.6e9, 1040.0, &s, &w),
	    RW_EDOM);
	assert_int_equal(
	    rw_rm_saturate(5e9, 3e9, 0.2, QZ_K, QZ_RHO, 0.0, 1040.0, &s, &w),
	    RW_EDOM);
}

/* rw_rm_dry dispatches to the model functions with the spec's fields:
 * every model against a direct call (identical numbers), the solid
 * reported, the Murphy default of the coordination number. */
static void test_dry_dispatch(void **state)
{
	rw_rm_spec s;
	double kd, md, ks, ms, rs, k, mu, c;
	rw_rm_incl pore = {0.0, 0.0, 0.2, 0.1, RW_RM_SHAPE_SPHEROID};
	rw_rm_incl ph[2] = {{QZ_K, QZ_MU, 0.8, 1.0, RW_RM_SHAPE_SPHERE},
	                    {0.0, 0.0, 0.2, 0.1, RW_RM_SHAPE_SPHEROID}};
	int m;

	(void)state;
	for (m = 0; m < RW_RM_MODEL_COUNT; m++) {
		sand_spec(&s, m);
		assert_int_equal(rw_rm_dry(&s, 0.2, 0.0, 20e6, ws, &kd, &md,
		                           &ks, &ms, &rs, NULL),
		                 RW_OK);
		assert_rel(ks, QZ_K, 0.0);
		assert_rel(ms, QZ_MU, 0.0);
		assert_rel(rs, QZ_RHO, 0.0);
		switch (m) {
		case RW_RM_HERTZ_MINDLIN:
			rw_rm_hertz_mindlin(QZ_K, QZ_MU, 0.2, 9, 20e6, 1, &k,
			                    &mu, NULL);
			break;
		case RW_RM_WALTON_SMOOTH:
		case RW_RM_WALTON_ROUGH:
			rw_rm_walton(QZ_K, QZ_MU, 0.2, 9, 20e6,
			             m == RW_RM_WALTON_ROUGH, &k, &mu, NULL);
			break;
		case RW_RM_SOFT_SAND:
			rw_rm_soft_sand(QZ_K, QZ_MU, 0.2, 0.4, 9, 20e6, 1, &k,
			                &mu, NULL);
			break;
		case RW_RM_STIFF_SAND:
			rw_rm_stiff_sand(QZ_K, QZ_MU, 0.2, 0.4, 9, 20e6, 1, &k,
			                 &mu, NULL);
			break;
		case RW_RM_CONTACT_CEMENT:
			rw_rm_contact_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.2, 0.4,
			                     9, 1, &k, &mu, NULL);
			break;
		case RW_RM_CONSTANT_CEMENT:
			rw_rm_constant_cement(QZ_K, QZ_MU, QZ_K, QZ_MU, 0.2,
			                      0.34, 0.4, 9, 1, &k, &mu, NULL);
			break;
		case RW_RM_CRITICAL_POROSITY:
			rw_rm_critical_porosity(QZ_K, QZ_MU, 0.2, 0.4, &k, &mu,
			                        NULL);
			break;
		case RW_RM_KRIEF:
			rw_rm_krief(QZ_K, QZ_MU, 0.2, &k, &mu, NULL);
			break;
		case RW_RM_KUSTER_TOKSOZ:
			rw_rm_kuster_toksoz(QZ_K, QZ_MU, 1, &pore, &k, &mu,
			                    NULL);
			break;
		case RW_RM_SELF_CONSISTENT:
			rw_rm_self_consistent(2, ph, 1e-10, &k, &mu, NULL);
			break;
		case RW_RM_DEM:
			rw_rm_dem(QZ_K, QZ_MU, 1, &pore, 1e-10, ws, &k, &mu,
			          NULL);
			break;
		default:
			rw_rm_xu_white(QZ_K, QZ_MU, 0.2, 0.0, 0.1, 0.03, 1e-10,
			               ws, &k, &mu, NULL);
			break;
		}
		assert_rel(kd, k, 0.0);
		assert_rel(md, mu, 0.0);
	}
	/* coord 0: Murphy's number at phi_c */
	sand_spec(&s, RW_RM_SOFT_SAND);
	s.coord = 0.0;
	rw_rm_dry(&s, 0.2, 0.0, 20e6, NULL, &kd, &md, NULL, NULL, NULL, NULL);
	rw_rm_coord_murphy(0.4, &c);
	rw_rm_soft_sand(QZ_K, QZ_MU, 0.2, 0.4, c, 20e6, 1, &k, &mu, NULL);
	assert_rel(kd, k, 0.0);
	/* DEM and Xu-White need the workspace */
	sand_spec(&s, RW_RM_DEM);
	assert_int_equal(rw_rm_dry(&s, 0.2, 0.0, 20e6, NULL, &kd, &md, &ks,
	                           NULL, NULL, NULL),
	                 RW_EINVAL);
	assert_true(isnan(kd) && isnan(ks));
}

/* Clay: clay = 0 is the host mineral, 1 the clay mineral, between the
 * chosen mixing rule (Hill here, the mean of Voigt and Reuss, Hill
 * 1952). Xu-White also splits the pores by the clay fraction. A frame
 * above the Hashin-Shtrikman bound is flagged for any model (critical
 * porosity on calcite, see test_granular.c). */
static void test_clay_and_bound(void **state)
{
	rw_rm_spec s;
	double kd, md, ks, ms, rs, kv, kr;
	unsigned w;

	(void)state;
	sand_spec(&s, RW_RM_CRITICAL_POROSITY);
	rw_rm_dry(&s, 0.1, 1.0, 0.0, NULL, &kd, &md, &ks, &ms, &rs, NULL);
	assert_rel(ks, 21e9, 0.0);
	assert_rel(kd, 21e9 * 0.75, 1e-15);
	assert_rel(rs, 2600.0, 0.0);
	rw_rm_dry(&s, 0.1, 0.3, 0.0, NULL, &kd, &md, &ks, &ms, &rs, NULL);
	kv = 0.7 * QZ_K + 0.3 * 21e9;
	kr = 1.0 / (0.7 / QZ_K + 0.3 / 21e9);
	assert_rel(ks, 0.5 * (kv + kr), 1e-14);
	assert_rel(rs, 0.7 * QZ_RHO + 0.3 * 2600.0, 1e-14);
	s.k_min_pa = 76.8e9;
	s.mu_min_pa = 32e9;
	rw_rm_dry(&s, 0.02, 0.0, 0.0, NULL, &kd, &md, NULL, NULL, NULL, &w);
	assert_int_equal(w, RW_RM_WARN_ABOVE_HS);
	sand_spec(&s, RW_RM_SOFT_SAND);
	rw_rm_dry(&s, 0.2, 0.0, 20e6, NULL, &kd, &md, NULL, NULL, NULL, &w);
	assert_int_equal(w, 0);
}

/* The fluid effects (Gassmann 1951 with Wood 1955 mixing): gas lowers
 * AI and Vp/Vs; under uniform saturation the response is flat from a
 * few percent gas upwards - Vp/Vs at Sw = 0.9 is within a quarter of the
 * whole brine-to-gas change of the full-gas value (the low-gas-saturation
 * effect, e.g. Mavko, Mukerji & Dvorkin 2009, sec. on patchy
 * saturation, from memory); patchy (Voigt) mixing is not flat. Brie's
 * exponent 1 is the Voigt mix (Brie et al. 1995). */
static void test_fluid_effects(void **state)
{
	rw_rm_spec s;
	rw_rm_sat b, g, g90, v90, br;
	unsigned w;

	(void)state;
	sand_spec(&s, RW_RM_SOFT_SAND);
	rw_rm_eval(&s, 0.25, 1.0, 0.0, 20e6, NULL, &b, &w);
	rw_rm_eval(&s, 0.25, 0.0, 0.0, 20e6, NULL, &g, &w);
	rw_rm_eval(&s, 0.25, 0.9, 0.0, 20e6, NULL, &g90, &w);
	assert_true(g.ai < b.ai && g.vpvs < b.vpvs);
	assert_rel(g.mu_dry_pa, b.mu_dry_pa, 0.0);
	assert_true(g90.vpvs - g.vpvs < 0.25 * (b.vpvs - g.vpvs));
	s.fluid_mix = RW_RM_FLUID_VOIGT;
	rw_rm_eval(&s, 0.25, 0.9, 0.0, 20e6, NULL, &v90, &w);
	assert_true(v90.vpvs - g.vpvs > 0.75 * (b.vpvs - g.vpvs));
	s.fluid_mix = RW_RM_FLUID_BRIE;
	s.brie_e = 1.0;
	rw_rm_eval(&s, 0.25, 0.9, 0.0, 20e6, NULL, &br, &w);
	assert_rel(br.vp_ms, v90.vp_ms, 1e-14);
	/* Brie et al. 1995 with e = 3: K_fl = (K_brine - K_gas) Sw^3 + K_gas
	 * (the liquid is the brine, 1 - S_gas = Sw); the saturated rock
	 * must be the Gassmann rock of that fluid. */
	{
		double kfl = (2.8e9 - 0.06e9) * 0.5 * 0.5 * 0.5 + 0.06e9;
		rw_rm_spec e = s;
		rw_rm_sat want;

		s.brie_e = 3.0;
		rw_rm_eval(&s, 0.25, 0.5, 0.0, 20e6, NULL, &br, &w);
		e.fluid_mix = RW_RM_FLUID_WOOD;
		e.k_brine_pa = e.k_hc_pa = kfl;
		e.rho_brine_kgm3 = e.rho_hc_kgm3 = 0.5 * 1030.0 + 0.5 * 200.0;
		rw_rm_eval(&e, 0.25, 0.5, 0.0, 20e6, NULL, &want, &w);
		assert_rel(br.k_sat_pa, want.k_sat_pa, 1e-12);
		assert_rel(br.vp_ms, want.vp_ms, 1e-12);
	}
	/* density is linear in Sw whatever the mixing */
	assert_rel(g90.rho_kgm3,
	           0.75 * QZ_RHO + 0.25 * (0.9 * 1030.0 + 0.1 * 200.0), 1e-14);
	/* the errors */
	assert_int_equal(rw_rm_eval(&s, 0.25, 1.1, 0.0, 20e6, NULL, &b, &w),
	                 RW_EDOM);
	assert_true(isnan(b.ai));
	assert_int_equal(rw_rm_eval(&s, 0.25, 0.5, -0.1, 20e6, NULL, &b, &w),
	                 RW_EDOM);
	assert_int_equal(rw_rm_eval(&s, 0.25, 0.5, 0.0, -1.0, NULL, &b, &w),
	                 RW_EDOM);
}

/* rw_rm_eval_parts reports the solid of rw_rm_dry and the Wood 1955
 * fluid (1/K = Sw/K_brine + (1 - Sw)/K_gas, density linear), and the
 * same rock as rw_rm_eval; NaN parts on error. */
static void test_eval_parts(void **state)
{
	rw_rm_spec s;
	rw_rm_sat a, b;
	rw_rm_parts p;
	double kd, mud, ks, mus, rhos;
	unsigned w;

	(void)state;
	sand_spec(&s, RW_RM_STIFF_SAND);
	assert_int_equal(
	    rw_rm_eval_parts(&s, 0.22, 0.3, 0.2, 15e6, NULL, &a, &p, &w),
	    RW_OK);
	rw_rm_eval(&s, 0.22, 0.3, 0.2, 15e6, NULL, &b, &w);
	assert_rel(a.vp_ms, b.vp_ms, 0.0);
	assert_rel(a.lambda_rho, b.lambda_rho, 0.0);
	rw_rm_dry(&s, 0.22, 0.2, 15e6, NULL, &kd, &mud, &ks, &mus, &rhos, &w);
	assert_rel(p.k_s_pa, ks, 0.0);
	assert_rel(p.mu_s_pa, mus, 0.0);
	assert_rel(p.rho_s_kgm3, rhos, 0.0);
	assert_rel(p.k_fl_pa, 1.0 / (0.3 / 2.8e9 + 0.7 / 0.06e9), 1e-14);
	assert_rel(p.rho_fl_kgm3, 0.3 * 1030.0 + 0.7 * 200.0, 1e-14);
	assert_int_equal(
	    rw_rm_eval_parts(&s, 0.22, 1.5, 0.2, 15e6, NULL, &a, &p, &w),
	    RW_EDOM);
	assert_true(isnan(p.k_s_pa) && isnan(p.k_fl_pa) && isnan(a.vp_ms));
}

/* The limits the physics fixes, over every model through rw_rm_dry:
 * at zero porosity each model defined there returns the solid (Hertz-
 * Mindlin and Walton describe a pack, contact cement a rock near
 * critical porosity: no zero-porosity limit); and every dry frame lies
 * inside the Hashin-Shtrikman bounds of the solid and empty pores (the
 * lower bound is zero; the upper one from the core's mixer, Berryman
 * 1995 form), over porosities up to the model's phi_max (contact cement
 * within its 10 % cement, Kuster-Toksoz until it fails past its dilute
 * limit), on quartz and on a quartz-clay solid. */
static void test_all_models_limits(void **state)
{
	rw_rm_spec s;
	int m, i;
	double clay;

	(void)state;
	for (m = 0; m < RW_RM_MODEL_COUNT; m++) {
		for (clay = 0.0; clay <= 0.31; clay += 0.3) {
			double kd, md, ks, ms, top;

			sand_spec(&s, m);
			rw_rm_dry(&s, 0.0, clay, 20e6, ws, &kd, &md, &ks, &ms,
			          NULL, NULL);
			if (m != RW_RM_HERTZ_MINDLIN &&
			    m != RW_RM_WALTON_SMOOTH &&
			    m != RW_RM_WALTON_ROUGH &&
			    m != RW_RM_CONTACT_CEMENT) {
				assert_rel(kd, ks, 1e-12);
				assert_rel(md, ms, 1e-12);
			}
			top = fmin(rw_rm_spec_phi_max(&s), 0.6);
			for (i = 0; i <= 30; i++) {
				double phi = top * i / 30.0, ku, muu;

				int st;

				if (m == RW_RM_CONTACT_CEMENT && phi < 0.3)
					continue;
				st = rw_rm_dry(&s, phi, clay, 20e6, ws, &kd,
				               &md, &ks, &ms, NULL, NULL);
				/* Kuster-Toksoz is first order in
				 * concentration: empty spheroids of aspect 0.1
				 * drive K negative near phi = 0.31, long past
				 * its dilute limit */
				if (m == RW_RM_KUSTER_TOKSOZ &&
				    st == RW_ERANGE &&
				    phi > RW_RM_KT_DILUTE_MAX * s.aspect)
					break;
				assert_int_equal(st, RW_OK);
				hs_upper_vacuum(ks, ms, phi, &ku, &muu);
				if (!(kd >= 0.0 && md >= 0.0 &&
				      kd <= ku * (1 + 1e-12) &&
				      md <= muu * (1 + 1e-12)))
					fail_msg("%s at phi %g clay %g: K %g "
					         "(HS %g), mu %g (HS %g)",
					         rw_rm_model_name(m), phi, clay,
					         kd, ku, md, muu);
			}
		}
	}
}

/* Every bad member is named. */
static void test_spec_check(void **state)
{
	rw_rm_spec s;
	const char *f;
	struct {
		int model;
		size_t off;
		double v;
		const char *name;
		int st;
	} bad[] = {
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, k_min_pa), -1, "k_min_pa",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, mu_min_pa), NAN, "mu_min_pa",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, rho_min_kgm3), 0,
	     "rho_min_kgm3", RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, k_clay_pa), 0, "k_clay_pa",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, phi_c), 1.0, "phi_c",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, coord), -2, "coord",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, slip), 1.5, "slip", RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, k_brine_pa), 0, "k_brine_pa",
	     RW_EDOM},
	    {RW_RM_SOFT_SAND, offsetof(rw_rm_spec, rho_hc_kgm3), -5,
	     "rho_hc_kgm3", RW_EDOM},
	    {RW_RM_CONSTANT_CEMENT, offsetof(rw_rm_spec, phi_b), 0.45, "phi_b",
	     RW_EDOM},
	    {RW_RM_CONTACT_CEMENT, offsetof(rw_rm_spec, mu_cem_pa), 0,
	     "mu_cem_pa", RW_EDOM},
	    {RW_RM_DEM, offsetof(rw_rm_spec, aspect), 0, "aspect", RW_EDOM},
	    {RW_RM_DEM, offsetof(rw_rm_spec, tol), 1e-2, "tol", RW_EDOM},
	    {RW_RM_XU_WHITE, offsetof(rw_rm_spec, aspect_clay), -1,
	     "aspect_clay", RW_EDOM},
	};
	size_t i;

	(void)state;
	for (i = 0; i < sizeof(bad) / sizeof(bad[0]); i++) {
		sand_spec(&s, bad[i].model);
		assert_int_equal(rw_rm_spec_check(&s, &f), RW_OK);
		assert_null(f);
		memcpy((char *)&s + bad[i].off, &bad[i].v, sizeof(double));
		assert_int_equal(rw_rm_spec_check(&s, &f), bad[i].st);
		assert_string_equal(f, bad[i].name);
	}
	sand_spec(&s, RW_RM_MODEL_COUNT);
	assert_int_equal(rw_rm_spec_check(&s, &f), RW_EINVAL);
	assert_string_equal(f, "model");
	sand_spec(&s, RW_RM_KUSTER_TOKSOZ);
	s.pore_shape = RW_RM_SHAPE_DISK;
	assert_int_equal(rw_rm_spec_check(&s, &f), RW_EDOM);
	assert_string_equal(f, "pore_shape");
	sand_spec(&s, RW_RM_SOFT_SAND);
	s.fluid_mix = RW_RM_FLUID_BRIE;
	s.brie_e = 0.5;
	assert_int_equal(rw_rm_spec_check(&s, &f), RW_EDOM);
	assert_string_equal(f, "brie_e");
	s.fluid_mix = 7;
	assert_int_equal(rw_rm_spec_check(&s, &f), RW_EINVAL);
	assert_string_equal(f, "fluid_mix");
	assert_int_equal(rw_rm_spec_check(NULL, &f), RW_EINVAL);
}

/* Names, pressure use, porosity limits. */
static void test_names(void **state)
{
	rw_rm_spec s;
	rw_rm_sat z;

	(void)state;
	assert_string_equal(rw_rm_model_name(RW_RM_SOFT_SAND), "soft_sand");
	assert_string_equal(rw_rm_model_name(RW_RM_XU_WHITE), "xu_white");
	assert_null(rw_rm_model_name(RW_RM_MODEL_COUNT));
	assert_null(rw_rm_model_name(-1));
	assert_string_equal(rw_rm_attr_name(RW_RM_ATTR_VPVS), "vpvs");
	assert_string_equal(rw_rm_attr_name(RW_RM_ATTR_MU_DRY), "mu_dry");
	assert_null(rw_rm_attr_name(RW_RM_ATTR_COUNT));
	assert_true(rw_rm_model_uses_pressure(RW_RM_STIFF_SAND));
	assert_false(rw_rm_model_uses_pressure(RW_RM_CONTACT_CEMENT));
	assert_false(rw_rm_model_uses_pressure(RW_RM_DEM));
	sand_spec(&s, RW_RM_CONSTANT_CEMENT);
	assert_rel(rw_rm_spec_phi_max(&s), 0.34, 0.0);
	sand_spec(&s, RW_RM_SELF_CONSISTENT);
	s.pore_shape = RW_RM_SHAPE_SPHERE;
	assert_rel(rw_rm_spec_phi_max(&s), 0.5, 0.0);
	memset(&z, 0, sizeof(z));
	assert_true(isnan(rw_rm_attr_get(&z, RW_RM_ATTR_COUNT)));
	assert_rel(rw_rm_attr_get(&z, RW_RM_ATTR_AI), 0.0, 0.0);
}

/* The template is the grid of rw_rm_eval: every node of a 5 x 4 x 3
 * soft-sand template (pressure axis) equals the direct evaluation, the
 * status and warnings are per node, stiffer at higher pressure, and the
 * iso-lines are slices in axis order. */
static void test_template(void **state)
{
	static const double phi[5] = {0.04, 0.12, 0.2, 0.28, 0.36};
	static const double sw[4] = {0.0, 0.4, 0.8, 1.0};
	static const double p[3] = {5e6, 20e6, 40e6};
	rw_rm_sat nodes[60], d;
	int st[60];
	unsigned wn[60], w;
	double iso_phi[40], iso_sw[40];
	rw_rm_spec s;
	size_t i, j, k;

	(void)state;
	sand_spec(&s, RW_RM_SOFT_SAND);
	assert_int_equal(rw_rm_template(&s, 5, phi, 4, sw, RW_RM_AXIS_PRESSURE,
	                                3, p, 0.0, 0.0, ws, nodes, st, wn),
	                 RW_OK);
	for (k = 0; k < 3; k++)
		for (j = 0; j < 4; j++)
			for (i = 0; i < 5; i++) {
				size_t at = (k * 4 + j) * 5 + i;

				rw_rm_eval(&s, phi[i], sw[j], 0.0, p[k], ws, &d,
				           &w);
				assert_int_equal(st[at], RW_OK);
				assert_int_equal(wn[at], w);
				assert_rel(nodes[at].ai, d.ai, 0.0);
				assert_rel(nodes[at].vpvs, d.vpvs, 0.0);
				if (k > 0)
					assert_true(nodes[at].vp_ms >
					            nodes[at - 20].vp_ms);
			}
	assert_int_equal(wn[0], RW_RM_WARN_PHI_LOW);
	assert_int_equal(rw_rm_template_lines(nodes, 5, 4, 3, 1, RW_RM_ATTR_AI,
	                                      RW_RM_ATTR_VPVS, iso_phi, iso_sw),
	                 RW_OK);
	for (i = 0; i < 5; i++)
		for (j = 0; j < 4; j++) {
			const rw_rm_sat *n = &nodes[(4 + j) * 5 + i];

			assert_rel(iso_phi[2 * (i * 4 + j)], n->ai, 0.0);
			assert_rel(iso_phi[2 * (i * 4 + j) + 1], n->vpvs, 0.0);
			assert_rel(iso_sw[2 * (j * 5 + i)], n->ai, 0.0);
			assert_rel(iso_sw[2 * (j * 5 + i) + 1], n->vpvs, 0.0);
		}
}

/* A template node where the model is not defined (constant cement above
 * phi_b) is NaN with its status, and a NaN pair in the iso-lines; the
 * rest of the grid is filled. Clay axis. Call errors. */
static void test_template_failures(void **state)
{
	static const double phi[3] = {0.1, 0.3, 0.38};
	static const double sw[2] = {0.2, 1.0};
	static const double clay[2] = {0.0, 0.3};
	rw_rm_sat nodes[12];
	int st[12];
	double iso_sw[12];
	rw_rm_spec s;

	(void)state;
	sand_spec(&s, RW_RM_CONSTANT_CEMENT);
	assert_int_equal(rw_rm_template(&s, 3, phi, 2, sw, RW_RM_AXIS_CLAY, 2,
	                                clay, 0.0, 0.0, ws, nodes, st, NULL),
	                 RW_OK);
	assert_int_equal(st[2], RW_EDOM);
	assert_true(isnan(nodes[2].ai));
	assert_int_equal(st[1], RW_OK);
	assert_true(nodes[6 + 1].vp_ms < nodes[1].vp_ms);
	rw_rm_template_lines(nodes, 3, 2, 2, 0, RW_RM_ATTR_AI, RW_RM_ATTR_SI,
	                     NULL, iso_sw);
	assert_true(isnan(iso_sw[4]) && isnan(iso_sw[5]));
	assert_false(isnan(iso_sw[2]));
	/* errors */
	assert_int_equal(rw_rm_template(&s, 3, phi, 2, sw, RW_RM_AXIS_NONE, 2,
	                                NULL, 0.0, 0.0, ws, nodes, st, NULL),
	                 RW_EINVAL);
	assert_int_equal(rw_rm_template(&s, 2, sw + 1, 2, sw, RW_RM_AXIS_NONE,
	                                1, NULL, 0.0, 0.0, ws, nodes, st, NULL),
	                 RW_EDOM);
	assert_int_equal(rw_rm_template(&s, 2, phi + 1, 2, sw, 5, 1, clay, 0.0,
	                                0.0, ws, nodes, st, NULL),
	                 RW_EINVAL);
	{
		static const double dn[2] = {0.3, 0.1};

		assert_int_equal(rw_rm_template(&s, 2, dn, 2, sw,
		                                RW_RM_AXIS_NONE, 1, NULL, 0.0,
		                                0.0, ws, nodes, st, NULL),
		                 RW_EINVAL);
	}
	assert_int_equal(rw_rm_template_lines(nodes, 3, 2, 2, 2, RW_RM_ATTR_AI,
	                                      RW_RM_ATTR_SI, NULL, iso_sw),
	                 RW_EINVAL);
	assert_int_equal(rw_rm_template_lines(nodes, 3, 2, 2, 0, 99,
	                                      RW_RM_ATTR_SI, NULL, iso_sw),
	                 RW_EINVAL);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_saturate),
	    cmocka_unit_test(test_saturate_edges),
	    cmocka_unit_test(test_dry_dispatch),
	    cmocka_unit_test(test_clay_and_bound),
	    cmocka_unit_test(test_all_models_limits),
	    cmocka_unit_test(test_fluid_effects),
	    cmocka_unit_test(test_eval_parts),
	    cmocka_unit_test(test_spec_check),
	    cmocka_unit_test(test_names),
	    cmocka_unit_test(test_template),
	    cmocka_unit_test(test_template_failures),
	};

	gsl_set_error_handler_off();
	return cmocka_run_group_tests(tests, setup, teardown);
}
