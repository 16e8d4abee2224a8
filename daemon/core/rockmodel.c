/* A rock model with its parameters, evaluated one sample at a time: the
 * solid (host mineral mixed with clay), the dry frame of the chosen
 * model, the pore fluid of a water saturation, the saturated rock through
 * the project's Gassmann, and its seismic attributes; and templates of a
 * model over porosity x water saturation (x clay or pressure) with their
 * iso-lines. Contracts are in rockwire/rockmodel.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/fluid.h"
#include "rockwire/mineral.h"
#include "rockwire/rock.h"
#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "rockmodel_int.h"

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

static void sat_nan(rw_rm_sat *s)
{
	s->k_dry_pa = NAN;
	s->mu_dry_pa = NAN;
	s->k_sat_pa = NAN;
	s->rho_kgm3 = NAN;
	s->vp_ms = NAN;
	s->vs_ms = NAN;
	s->ai = NAN;
	s->si = NAN;
	s->vpvs = NAN;
	s->nu = NAN;
	s->lambda_rho = NAN;
	s->mu_rho = NAN;
}

int rw_rm_saturate(double k_dry_pa, double mu_dry_pa, double phi,
                   double k_min_pa, double rho_min_kgm3, double k_fl_pa,
                   double rho_fl_kgm3, rw_rm_sat *out, unsigned *warn)
{
	double ks, mu = mu_dry_pa, rho, m;
	unsigned w = 0, rw = 0;

	warn_set(warn, 0);
	if (!isfinite(k_dry_pa) || !isfinite(mu_dry_pa) || !isfinite(phi) ||
	    !isfinite(k_min_pa) || !isfinite(rho_min_kgm3) ||
	    !isfinite(k_fl_pa) || !isfinite(rho_fl_kgm3) || k_dry_pa < 0.0 ||
	    mu_dry_pa < 0.0 || phi < 0.0 || phi >= 1.0 || !(k_min_pa > 0.0) ||
	    !(rho_min_kgm3 > 0.0) || !(k_fl_pa > 0.0) || !(rho_fl_kgm3 > 0.0)) {
		sat_nan(out);
		return RW_EDOM;
	}
	if (phi == 0.0) {
		/* no pore space: the frame is the rock */
		ks = k_dry_pa;
		rho = rho_min_kgm3;
		if (k_dry_pa > k_min_pa)
			w |= RW_RM_WARN_FRAME_STIFF;
	} else {
		rw_rock_subst s;
		int st = rw_rock_gassmann_frame(k_dry_pa, mu_dry_pa, phi,
		                                k_min_pa, rho_min_kgm3, k_fl_pa,
		                                rho_fl_kgm3, &s, &rw);

		if (st != RW_OK) {
			sat_nan(out);
			return st;
		}
		ks = s.k_sat_pa;
		rho = s.rho_kgm3;
		if (rw & RW_ROCK_WARN_PHI_LOW)
			w |= RW_RM_WARN_PHI_LOW;
		if (rw & RW_ROCK_WARN_KDRY_GT_KMIN)
			w |= RW_RM_WARN_FRAME_STIFF;
	}
	m = ks + 4.0 / 3.0 * mu;
	if (!(ks > 0.0) || !(m > 0.0) || !isfinite(m)) {
		sat_nan(out);
		return RW_ERANGE;
	}
	out->k_dry_pa = k_dry_pa;
	out->mu_dry_pa = mu;
	out->k_sat_pa = ks;
	out->rho_kgm3 = rho;
	out->vp_ms = sqrt(m / rho);
	out->vs_ms = sqrt(mu / rho);
	out->ai = rho * out->vp_ms;
	out->si = rho * out->vs_ms;
	if (mu > 0.0) {
		out->vpvs = out->vp_ms / out->vs_ms;
	} else {
		out->vpvs = INFINITY;
		w |= RW_RM_WARN_NO_SHEAR;
	}
	out->nu = (3.0 * ks - 2.0 * mu) / (2.0 * (3.0 * ks + mu));
	out->mu_rho = out->si * out->si;
	out->lambda_rho = out->ai * out->ai - 2.0 * out->mu_rho;
	warn_set(warn, w);
	return RW_OK;
}

double rw_rm_attr_get(const rw_rm_sat *s, int a)
{
	switch (a) {
	case RW_RM_ATTR_VP: return s->vp_ms;
	case RW_RM_ATTR_VS: return s->vs_ms;
	case RW_RM_ATTR_RHO: return s->rho_kgm3;
	case RW_RM_ATTR_AI: return s->ai;
	case RW_RM_ATTR_SI: return s->si;
	case RW_RM_ATTR_VPVS: return s->vpvs;
	case RW_RM_ATTR_NU: return s->nu;
	case RW_RM_ATTR_LAMBDA_RHO: return s->lambda_rho;
	case RW_RM_ATTR_MU_RHO: return s->mu_rho;
	case RW_RM_ATTR_K_SAT: return s->k_sat_pa;
	case RW_RM_ATTR_K_DRY: return s->k_dry_pa;
	case RW_RM_ATTR_MU_DRY: return s->mu_dry_pa;
	default: return NAN;
	}
}

static const char *const attr_names[RW_RM_ATTR_COUNT] = {
    "vp", "vs",         "rho",    "ai",    "si",    "vpvs",
    "nu", "lambda_rho", "mu_rho", "k_sat", "k_dry", "mu_dry"};

const char *rw_rm_attr_name(int a)
{
	if (a < 0 || a >= RW_RM_ATTR_COUNT)
		return NULL;
	return attr_names[a];
}

static const char *const model_names[RW_RM_MODEL_COUNT] = {
    "hertz_mindlin", "walton_smooth",  "walton_rough",    "soft_sand",
    "stiff_sand",    "contact_cement", "constant_cement", "critical_porosity",
    "krief",         "kuster_toksoz",  "self_consistent", "dem",
    "xu_white"};

const char *rw_rm_model_name(int model)
{
	if (model < 0 || model >= RW_RM_MODEL_COUNT)
		return NULL;
	return model_names[model];
}

int rw_rm_model_uses_pressure(int model)
{
	return model == RW_RM_HERTZ_MINDLIN || model == RW_RM_WALTON_SMOOTH ||
	       model == RW_RM_WALTON_ROUGH || model == RW_RM_SOFT_SAND ||
	       model == RW_RM_STIFF_SAND;
}

/* ---- spec ------------------------------------------------------------- */

static int solid_ok(double k, double mu)
{
	double nu;

	if (!isfinite(k) || !isfinite(mu) || !(k > 0.0) || !(mu > 0.0))
		return 0;
	nu = (3.0 * k - 2.0 * mu) / (2.0 * (3.0 * k + mu));
	return nu > -1.0 && nu < 0.5;
}

static int frac_open(double x)
{
	return isfinite(x) && x > 0.0 && x < 1.0;
}

static int pos(double x)
{
	return isfinite(x) && x > 0.0;
}

#define BAD(st, name)                                                          \
	do {                                                                   \
		if (field)                                                     \
			*field = (name);                                       \
		return (st);                                                   \
	} while (0)

int rw_rm_spec_check(const rw_rm_spec *spec, const char **field)
{
	int m;

	if (field)
		*field = NULL;
	if (spec == NULL)
		BAD(RW_EINVAL, "spec");
	m = spec->model;
	if (m < 0 || m >= RW_RM_MODEL_COUNT)
		BAD(RW_EINVAL, "model");
	if (!solid_ok(spec->k_min_pa, spec->mu_min_pa))
		BAD(RW_EDOM, !pos(spec->k_min_pa) ? "k_min_pa" : "mu_min_pa");
	if (!pos(spec->rho_min_kgm3))
		BAD(RW_EDOM, "rho_min_kgm3");
	if (!solid_ok(spec->k_clay_pa, spec->mu_clay_pa))
		BAD(RW_EDOM,
		    !pos(spec->k_clay_pa) ? "k_clay_pa" : "mu_clay_pa");
	if (!pos(spec->rho_clay_kgm3))
		BAD(RW_EDOM, "rho_clay_kgm3");
	if (spec->clay_mix < RW_MIX_VOIGT || spec->clay_mix > RW_MIX_HS_LOWER)
		BAD(RW_EINVAL, "clay_mix");
	if (!pos(spec->k_brine_pa))
		BAD(RW_EDOM, "k_brine_pa");
	if (!pos(spec->rho_brine_kgm3))
		BAD(RW_EDOM, "rho_brine_kgm3");
	if (!pos(spec->k_hc_pa))
		BAD(RW_EDOM, "k_hc_pa");
	if (!pos(spec->rho_hc_kgm3))
		BAD(RW_EDOM, "rho_hc_kgm3");
	if (spec->fluid_mix < RW_RM_FLUID_WOOD ||
	    spec->fluid_mix > RW_RM_FLUID_VOIGT)
		BAD(RW_EINVAL, "fluid_mix");
	if (spec->fluid_mix == RW_RM_FLUID_BRIE &&
	    !(isfinite(spec->brie_e) && spec->brie_e >= 1.0))
		BAD(RW_EDOM, "brie_e");
	switch (m) {
	case RW_RM_HERTZ_MINDLIN:
	case RW_RM_WALTON_SMOOTH:
	case RW_RM_WALTON_ROUGH:
	case RW_RM_SOFT_SAND:
	case RW_RM_STIFF_SAND:
		if (!(isfinite(spec->coord) && spec->coord >= 0.0))
			BAD(RW_EDOM, "coord");
		if (m == RW_RM_HERTZ_MINDLIN || m == RW_RM_SOFT_SAND ||
		    m == RW_RM_STIFF_SAND) {
			if (!(isfinite(spec->slip) && spec->slip >= 0.0 &&
			      spec->slip <= 1.0))
				BAD(RW_EDOM, "slip");
		}
		if ((m == RW_RM_SOFT_SAND || m == RW_RM_STIFF_SAND ||
		     spec->coord == 0.0) &&
		    !frac_open(spec->phi_c))
			BAD(RW_EDOM, "phi_c");
		break;
	case RW_RM_CONSTANT_CEMENT:
		if (!(pos(spec->phi_b) && spec->phi_b <= spec->phi_c))
			BAD(RW_EDOM, "phi_b");
		/* fall through */
	case RW_RM_CONTACT_CEMENT:
		if (!frac_open(spec->phi_c))
			BAD(RW_EDOM, "phi_c");
		if (!(isfinite(spec->coord) && spec->coord >= 0.0))
			BAD(RW_EDOM, "coord");
		if (!solid_ok(spec->k_cem_pa, spec->mu_cem_pa))
			BAD(RW_EDOM,
			    !pos(spec->k_cem_pa) ? "k_cem_pa" : "mu_cem_pa");
		if (spec->cement_scheme != RW_RM_CEMENT_CONTACT &&
		    spec->cement_scheme != RW_RM_CEMENT_COATING)
			BAD(RW_EINVAL, "cement_scheme");
		break;
	case RW_RM_CRITICAL_POROSITY:
		if (!frac_open(spec->phi_c))
			BAD(RW_EDOM, "phi_c");
		break;
	case RW_RM_KRIEF: break;
	case RW_RM_KUSTER_TOKSOZ:
	case RW_RM_SELF_CONSISTENT:
	case RW_RM_DEM:
		if (spec->pore_shape < RW_RM_SHAPE_SPHERE ||
		    spec->pore_shape > RW_RM_SHAPE_SPHEROID)
			BAD(RW_EINVAL, "pore_shape");
		/* an empty disk has no stiffness in the thin limit */
		if (spec->pore_shape == RW_RM_SHAPE_DISK)
			BAD(RW_EDOM, "pore_shape");
		if ((spec->pore_shape == RW_RM_SHAPE_PENNY ||
		     spec->pore_shape == RW_RM_SHAPE_SPHEROID) &&
		    !pos(spec->aspect))
			BAD(RW_EDOM, "aspect");
		if (m != RW_RM_KUSTER_TOKSOZ &&
		    !(isfinite(spec->tol) && spec->tol >= 1e-14 &&
		      spec->tol <= 1e-3))
			BAD(RW_EDOM, "tol");
		break;
	case RW_RM_XU_WHITE:
		if (!pos(spec->aspect))
			BAD(RW_EDOM, "aspect");
		if (!pos(spec->aspect_clay))
			BAD(RW_EDOM, "aspect_clay");
		if (!(isfinite(spec->tol) && spec->tol >= 1e-14 &&
		      spec->tol <= 1e-3))
			BAD(RW_EDOM, "tol");
		break;
	default: break;
	}
	return RW_OK;
}

double rw_rm_spec_phi_max(const rw_rm_spec *spec)
{
	switch (spec->model) {
	case RW_RM_SOFT_SAND:
	case RW_RM_STIFF_SAND:
	case RW_RM_CONTACT_CEMENT:
	case RW_RM_CRITICAL_POROSITY: return spec->phi_c;
	case RW_RM_CONSTANT_CEMENT: return spec->phi_b;
	case RW_RM_SELF_CONSISTENT:
		if (spec->pore_shape == RW_RM_SHAPE_SPHERE)
			return 0.5;
		return nextafter(1.0, 0.0);
	case RW_RM_HERTZ_MINDLIN:
	case RW_RM_WALTON_SMOOTH:
	case RW_RM_WALTON_ROUGH:
	case RW_RM_KRIEF:
	case RW_RM_KUSTER_TOKSOZ:
	case RW_RM_DEM:
	case RW_RM_XU_WHITE: return nextafter(1.0, 0.0);
	default: return NAN;
	}
}

/* Host mineral mixed with clay fraction clay of the solid. */
static int solid_mix(const rw_rm_spec *sp, double clay, double *k, double *mu,
                     double *rho)
{
	double kk[2], mm[2], rr[2], ff[2];

	if (clay == 0.0) {
		*k = sp->k_min_pa;
		*mu = sp->mu_min_pa;
		*rho = sp->rho_min_kgm3;
		return RW_OK;
	}
	if (clay == 1.0) {
		*k = sp->k_clay_pa;
		*mu = sp->mu_clay_pa;
		*rho = sp->rho_clay_kgm3;
		return RW_OK;
	}
	kk[0] = sp->k_min_pa;
	kk[1] = sp->k_clay_pa;
	mm[0] = sp->mu_min_pa;
	mm[1] = sp->mu_clay_pa;
	rr[0] = sp->rho_min_kgm3;
	rr[1] = sp->rho_clay_kgm3;
	ff[0] = 1.0 - clay;
	ff[1] = clay;
	return rw_mineral_mix(sp->clay_mix, 2, kk, mm, rr, ff, k, mu, rho);
}

int rw_rm_dry(const rw_rm_spec *spec, double phi, double clay, double p_eff_pa,
              rw_rm_ws *ws, double *k_dry_pa, double *mu_dry_pa, double *k_s_pa,
              double *mu_s_pa, double *rho_s_kgm3, unsigned *warn)
{
	const rw_rm_spec *sp = spec;
	double ks = NAN, mus = NAN, rhos = NAN, coord, kd = NAN, mud = NAN;
	rw_rm_incl ph[2];
	unsigned w = 0;
	int st;

	warn_set(warn, 0);
	st = rw_rm_spec_check(spec, NULL);
	if (st == RW_OK &&
	    (!isfinite(phi) || phi < 0.0 || phi >= 1.0 || !isfinite(clay) ||
	     clay < 0.0 || clay > 1.0 || !isfinite(p_eff_pa) || p_eff_pa < 0.0))
		st = RW_EDOM;
	if (st == RW_OK)
		st = solid_mix(sp, clay, &ks, &mus, &rhos);
	if (st != RW_OK)
		goto out;
	coord = sp->coord;
	if (coord == 0.0)
		rw_rm_coord_murphy(sp->phi_c, &coord);
	switch (sp->model) {
	case RW_RM_HERTZ_MINDLIN:
		st = rw_rm_hertz_mindlin(ks, mus, phi, coord, p_eff_pa,
		                         sp->slip, &kd, &mud, &w);
		break;
	case RW_RM_WALTON_SMOOTH:
	case RW_RM_WALTON_ROUGH:
		st = rw_rm_walton(ks, mus, phi, coord, p_eff_pa,
		                  sp->model == RW_RM_WALTON_ROUGH, &kd, &mud,
		                  &w);
		break;
	case RW_RM_SOFT_SAND:
		st = rw_rm_soft_sand(ks, mus, phi, sp->phi_c, coord, p_eff_pa,
		                     sp->slip, &kd, &mud, &w);
		break;
	case RW_RM_STIFF_SAND:
		st = rw_rm_stiff_sand(ks, mus, phi, sp->phi_c, coord, p_eff_pa,
		                      sp->slip, &kd, &mud, &w);
		break;
	case RW_RM_CONTACT_CEMENT:
		st = rw_rm_contact_cement(ks, mus, sp->k_cem_pa, sp->mu_cem_pa,
		                          phi, sp->phi_c, coord,
		                          sp->cement_scheme, &kd, &mud, &w);
		break;
	case RW_RM_CONSTANT_CEMENT:
		st = rw_rm_constant_cement(ks, mus, sp->k_cem_pa, sp->mu_cem_pa,
		                           phi, sp->phi_b, sp->phi_c, coord,
		                           sp->cement_scheme, &kd, &mud, &w);
		break;
	case RW_RM_CRITICAL_POROSITY:
		st = rw_rm_critical_porosity(ks, mus, phi, sp->phi_c, &kd, &mud,
		                             &w);
		break;
	case RW_RM_KRIEF: st = rw_rm_krief(ks, mus, phi, &kd, &mud, &w); break;
	case RW_RM_KUSTER_TOKSOZ:
	case RW_RM_SELF_CONSISTENT:
	case RW_RM_DEM:
		/* phase 0: the solid (spheres), phase 1: the empty pores */
		ph[0].k_pa = ks;
		ph[0].mu_pa = mus;
		ph[0].frac = 1.0 - phi;
		ph[0].aspect = 1.0;
		ph[0].shape = RW_RM_SHAPE_SPHERE;
		ph[1].k_pa = 0.0;
		ph[1].mu_pa = 0.0;
		ph[1].frac = phi;
		ph[1].aspect = sp->aspect;
		ph[1].shape = sp->pore_shape;
		if (sp->model == RW_RM_KUSTER_TOKSOZ)
			st = rw_rm_kuster_toksoz(ks, mus, 1, &ph[1], &kd, &mud,
			                         &w);
		else if (sp->model == RW_RM_SELF_CONSISTENT)
			st = rw_rm_self_consistent(2, ph, sp->tol, &kd, &mud,
			                           &w);
		else
			st = rw_rm_dem(ks, mus, 1, &ph[1], sp->tol, ws, &kd,
			               &mud, &w);
		break;
	case RW_RM_XU_WHITE:
		st =
		    rw_rm_xu_white(ks, mus, phi, clay, sp->aspect,
		                   sp->aspect_clay, sp->tol, ws, &kd, &mud, &w);
		break;
	default: st = RW_EINVAL; break;
	}
	if (st == RW_OK)
		w |= rw__rm_hs_check(ks, mus, phi, kd, mud);
	warn_set(warn, w);
out:
	if (st != RW_OK) {
		kd = mud = ks = mus = rhos = NAN;
	}
	*k_dry_pa = kd;
	*mu_dry_pa = mud;
	if (k_s_pa)
		*k_s_pa = ks;
	if (mu_s_pa)
		*mu_s_pa = mus;
	if (rho_s_kgm3)
		*rho_s_kgm3 = rhos;
	return st;
}

static void parts_nan(rw_rm_parts *p)
{
	if (p)
		p->k_s_pa = p->mu_s_pa = p->rho_s_kgm3 = p->k_fl_pa =
		    p->rho_fl_kgm3 = NAN;
}

int rw_rm_eval_parts(const rw_rm_spec *spec, double phi, double sw, double clay,
                     double p_eff_pa, rw_rm_ws *ws, rw_rm_sat *out,
                     rw_rm_parts *parts, unsigned *warn)
{
	double kd, mud, ks, mus, rhos;
	rw_fluid_phase ph[2], fl;
	double sat[2];
	unsigned w1 = 0, w2 = 0;
	int st;

	warn_set(warn, 0);
	parts_nan(parts);
	if (!isfinite(sw) || sw < 0.0 || sw > 1.0) {
		sat_nan(out);
		return RW_EDOM;
	}
	st = rw_rm_dry(spec, phi, clay, p_eff_pa, ws, &kd, &mud, &ks, &mus,
	               &rhos, &w1);
	if (st != RW_OK) {
		warn_set(warn, w1);
		sat_nan(out);
		return st;
	}
	ph[0].k_pa = spec->k_brine_pa;
	ph[0].rho_kgm3 = spec->rho_brine_kgm3;
	ph[0].v_ms = sqrt(spec->k_brine_pa / spec->rho_brine_kgm3);
	ph[1].k_pa = spec->k_hc_pa;
	ph[1].rho_kgm3 = spec->rho_hc_kgm3;
	ph[1].v_ms = sqrt(spec->k_hc_pa / spec->rho_hc_kgm3);
	sat[0] = sw;
	sat[1] = 1.0 - sw;
	/* Brie's gas is phase 1, the hydrocarbon: its liquid is the brine */
	if (spec->fluid_mix == RW_RM_FLUID_BRIE)
		st = rw_fluid_mix_brie(2, ph, sat, 1, spec->brie_e, &fl);
	else if (spec->fluid_mix == RW_RM_FLUID_VOIGT)
		st = rw_fluid_mix_voigt(2, ph, sat, &fl);
	else
		st = rw_fluid_mix_wood(2, ph, sat, &fl);
	if (st == RW_OK)
		st = rw_rm_saturate(kd, mud, phi, ks, rhos, fl.k_pa,
		                    fl.rho_kgm3, out, &w2);
	else
		sat_nan(out);
	warn_set(warn, w1 | w2);
	if (st == RW_OK && parts) {
		parts->k_s_pa = ks;
		parts->mu_s_pa = mus;
		parts->rho_s_kgm3 = rhos;
		parts->k_fl_pa = fl.k_pa;
		parts->rho_fl_kgm3 = fl.rho_kgm3;
	}
	return st;
}

int rw_rm_eval(const rw_rm_spec *spec, double phi, double sw, double clay,
               double p_eff_pa, rw_rm_ws *ws, rw_rm_sat *out, unsigned *warn)
{
	return rw_rm_eval_parts(spec, phi, sw, clay, p_eff_pa, ws, out, NULL,
	                        warn);
}

/* ---- templates -------------------------------------------------------- */

static int increasing(size_t n, const double *x, double lo, double hi,
                      int hi_open)
{
	size_t i;

	for (i = 0; i < n; i++) {
		if (!isfinite(x[i]) || x[i] < lo || x[i] > hi ||
		    (hi_open && x[i] >= hi))
			return RW_EDOM;
		if (i > 0 && !(x[i] > x[i - 1]))
			return RW_EINVAL;
	}
	return RW_OK;
}

int rw_rm_template(const rw_rm_spec *spec, size_t n_phi, const double *phi,
                   size_t n_sw, const double *sw, int axis3_kind, size_t n_3,
                   const double *axis3, double clay, double p_eff_pa,
                   rw_rm_ws *ws, rw_rm_sat *nodes, int *status, unsigned *warn)
{
	size_t i, j, k;
	int st;

	if (spec == NULL || phi == NULL || sw == NULL || nodes == NULL ||
	    n_phi < 2 || n_sw < 2 || n_3 < 1)
		return RW_EINVAL;
	if (axis3_kind == RW_RM_AXIS_NONE) {
		if (n_3 != 1 || axis3 != NULL)
			return RW_EINVAL;
	} else if (axis3_kind == RW_RM_AXIS_CLAY ||
	           axis3_kind == RW_RM_AXIS_PRESSURE) {
		if (axis3 == NULL)
			return RW_EINVAL;
		st = increasing(n_3, axis3, 0.0,
		                axis3_kind == RW_RM_AXIS_CLAY ? 1.0 : INFINITY,
		                0);
		if (st != RW_OK)
			return st;
	} else {
		return RW_EINVAL;
	}
	if (rw_rm_spec_check(spec, NULL) != RW_OK)
		return RW_EINVAL;
	st = increasing(n_phi, phi, 0.0, 1.0, 1);
	if (st == RW_OK)
		st = increasing(n_sw, sw, 0.0, 1.0, 0);
	if (st != RW_OK)
		return st;
	if (axis3_kind != RW_RM_AXIS_CLAY &&
	    (!isfinite(clay) || clay < 0.0 || clay > 1.0))
		return RW_EDOM;
	if (axis3_kind != RW_RM_AXIS_PRESSURE &&
	    (!isfinite(p_eff_pa) || p_eff_pa < 0.0))
		return RW_EDOM;
	for (k = 0; k < n_3; k++) {
		double c = axis3_kind == RW_RM_AXIS_CLAY ? axis3[k] : clay;
		double p =
		    axis3_kind == RW_RM_AXIS_PRESSURE ? axis3[k] : p_eff_pa;

		for (j = 0; j < n_sw; j++) {
			for (i = 0; i < n_phi; i++) {
				size_t at = (k * n_sw + j) * n_phi + i;
				unsigned w = 0;

				st = rw_rm_eval(spec, phi[i], sw[j], c, p, ws,
				                &nodes[at], &w);
				if (status)
					status[at] = st;
				if (warn)
					warn[at] = w;
			}
		}
	}
	return RW_OK;
}

int rw_rm_template_lines(const rw_rm_sat *nodes, size_t n_phi, size_t n_sw,
                         size_t n_3, size_t k, int attr_x, int attr_y,
                         double *iso_phi, double *iso_sw)
{
	size_t i, j;

	if (nodes == NULL || n_phi == 0 || n_sw == 0 || k >= n_3 ||
	    rw_rm_attr_name(attr_x) == NULL || rw_rm_attr_name(attr_y) == NULL)
		return RW_EINVAL;
	for (j = 0; j < n_sw; j++) {
		for (i = 0; i < n_phi; i++) {
			const rw_rm_sat *s = &nodes[(k * n_sw + j) * n_phi + i];
			double x = rw_rm_attr_get(s, attr_x);
			double y = rw_rm_attr_get(s, attr_y);

			if (!isfinite(x) || !isfinite(y))
				x = y = NAN;
			if (iso_phi) {
				iso_phi[2 * (i * n_sw + j)] = x;
				iso_phi[2 * (i * n_sw + j) + 1] = y;
			}
			if (iso_sw) {
				iso_sw[2 * (j * n_phi + i)] = x;
				iso_sw[2 * (j * n_phi + i) + 1] = y;
			}
		}
	}
	return RW_OK;
}
