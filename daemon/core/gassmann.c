/* Gassmann 1951 fluid substitution for the rockwire core: saturated bulk
 * modulus from the dry frame and back, substitution of one pore fluid for
 * another in a measured rock, and the saturated rock from a dry frame.
 * Formulas as written in Mavko, Mukerji & Dvorkin 2009 (chapter 6,
 * Gassmann's relations). Contracts are in rockwire/rock.h. */
#include <math.h>

#include "rockwire/rock.h"
#include "rockwire/status.h"

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

/* Common domain checks of phi, K_min and K_fl. */
static int gassmann_domain(double k_min, double k_fl, double phi)
{
	if (!isfinite(k_min) || !isfinite(k_fl) || !isfinite(phi) ||
	    !(phi > 0.0 && phi < 1.0) || !(k_min > 0.0) || !(k_fl > 0.0))
		return RW_EDOM;
	return RW_OK;
}

/* Warnings about a dry-frame modulus and porosity. */
static unsigned frame_warn(double k_dry, double k_min, double phi)
{
	unsigned w = 0;

	if (phi < RW_ROCK_PHI_LOW)
		w |= RW_ROCK_WARN_PHI_LOW;
	if (k_dry < 0.0)
		w |= RW_ROCK_WARN_KDRY_NEG;
	if (k_dry > k_min)
		w |= RW_ROCK_WARN_KDRY_GT_KMIN;
	return w;
}

int rw_rock_gassmann_sat(double k_dry_pa, double k_min_pa, double k_fl_pa,
                         double phi, double *k_sat_pa, unsigned *warn)
{
	double a, den, k;

	warn_set(warn, 0);
	if (gassmann_domain(k_min_pa, k_fl_pa, phi) != RW_OK ||
	    !isfinite(k_dry_pa)) {
		*k_sat_pa = NAN;
		return RW_EDOM;
	}
	warn_set(warn, frame_warn(k_dry_pa, k_min_pa, phi));
	a = 1.0 - k_dry_pa / k_min_pa;
	den = phi / k_fl_pa + (1.0 - phi) / k_min_pa -
	      k_dry_pa / (k_min_pa * k_min_pa);
	if (!(den > 0.0)) {
		*k_sat_pa = NAN;
		return RW_ERANGE;
	}
	k = k_dry_pa + a * a / den;
	if (!isfinite(k)) {
		*k_sat_pa = NAN;
		return RW_ERANGE;
	}
	*k_sat_pa = k;
	return RW_OK;
}

int rw_rock_gassmann_dry(double k_sat_pa, double k_min_pa, double k_fl_pa,
                         double phi, double *k_dry_pa, unsigned *warn)
{
	double r, num, den, k;

	warn_set(warn, 0);
	if (gassmann_domain(k_min_pa, k_fl_pa, phi) != RW_OK ||
	    !isfinite(k_sat_pa) || !(k_sat_pa > 0.0)) {
		*k_dry_pa = NAN;
		return RW_EDOM;
	}
	r = phi * k_min_pa / k_fl_pa;
	num = k_sat_pa * (r + 1.0 - phi) - k_min_pa;
	den = r + k_sat_pa / k_min_pa - 1.0 - phi;
	if (den == 0.0) {
		*k_dry_pa = NAN;
		return RW_ERANGE;
	}
	k = num / den;
	if (!isfinite(k)) {
		*k_dry_pa = NAN;
		return RW_ERANGE;
	}
	warn_set(warn, frame_warn(k, k_min_pa, phi));
	*k_dry_pa = k;
	return RW_OK;
}

static void subst_nan(rw_rock_subst *out)
{
	out->vp_ms = NAN;
	out->vs_ms = NAN;
	out->rho_kgm3 = NAN;
	out->k_sat_pa = NAN;
	out->mu_pa = NAN;
	out->k_dry_pa = NAN;
}

/* Fills velocities from K_sat, mu and rho; RW_ERANGE if the P-wave
 * modulus or density is not positive. */
static int subst_finish(rw_rock_subst *out, double k_sat, double mu, double rho,
                        double k_dry)
{
	double m = k_sat + 4.0 / 3.0 * mu;

	if (!(k_sat > 0.0) || !(m > 0.0) || !(rho > 0.0) || !isfinite(m)) {
		subst_nan(out);
		return RW_ERANGE;
	}
	out->k_sat_pa = k_sat;
	out->mu_pa = mu;
	out->rho_kgm3 = rho;
	out->k_dry_pa = k_dry;
	out->vp_ms = sqrt(m / rho);
	out->vs_ms = sqrt(mu / rho);
	return RW_OK;
}

int rw_rock_fluid_subst(double vp_ms, double vs_ms, double rho_kgm3, double phi,
                        double k_min_pa, double k_fl_old_pa,
                        double rho_fl_old_kgm3, double k_fl_new_pa,
                        double rho_fl_new_kgm3, rw_rock_subst *out,
                        unsigned *warn)
{
	double mu, k1, r, num, den, a, kdry, k2, rho2;

	warn_set(warn, 0);
	if (!isfinite(vp_ms) || !isfinite(vs_ms) || !isfinite(rho_kgm3) ||
	    !isfinite(rho_fl_old_kgm3) || !isfinite(rho_fl_new_kgm3) ||
	    !(vp_ms > 0.0) || vs_ms < 0.0 || !(rho_kgm3 > 0.0) ||
	    !(rho_fl_old_kgm3 > 0.0) || !(rho_fl_new_kgm3 > 0.0) ||
	    gassmann_domain(k_min_pa, k_fl_old_pa, phi) != RW_OK ||
	    gassmann_domain(k_min_pa, k_fl_new_pa, phi) != RW_OK) {
		subst_nan(out);
		return RW_EDOM;
	}
	mu = rho_kgm3 * vs_ms * vs_ms;
	k1 = rho_kgm3 * vp_ms * vp_ms - 4.0 / 3.0 * mu;
	if (!(k1 > 0.0) || !isfinite(k1)) {
		subst_nan(out);
		return RW_EDOM;
	}
	/* rw_rock_gassmann_dry, then rw_rock_gassmann_sat with the new
	 * fluid, inline: their domain checks are the ones above, and both
	 * warn about the same frame. Same arithmetic, statuses and warnings
	 * (tests/unit/test_gassmann.c checks them against the two calls). */
	r = phi * k_min_pa / k_fl_old_pa;
	num = k1 * (r + 1.0 - phi) - k_min_pa;
	den = r + k1 / k_min_pa - 1.0 - phi;
	kdry = den == 0.0 ? NAN : num / den;
	if (!isfinite(kdry)) {
		subst_nan(out);
		return RW_ERANGE;
	}
	warn_set(warn, frame_warn(kdry, k_min_pa, phi));
	a = 1.0 - kdry / k_min_pa;
	den = phi / k_fl_new_pa + (1.0 - phi) / k_min_pa -
	      kdry / (k_min_pa * k_min_pa);
	k2 = den > 0.0 ? kdry + a * a / den : NAN;
	if (!isfinite(k2)) {
		subst_nan(out);
		return RW_ERANGE;
	}
	rho2 = rho_kgm3 + phi * (rho_fl_new_kgm3 - rho_fl_old_kgm3);
	return subst_finish(out, k2, mu, rho2, kdry);
}

int rw_rock_gassmann_frame(double k_dry_pa, double mu_dry_pa, double phi,
                           double k_min_pa, double rho_min_kgm3, double k_fl_pa,
                           double rho_fl_kgm3, rw_rock_subst *out,
                           unsigned *warn)
{
	double ks;
	int st;

	warn_set(warn, 0);
	if (!isfinite(k_dry_pa) || !isfinite(mu_dry_pa) ||
	    !isfinite(rho_min_kgm3) || !isfinite(rho_fl_kgm3) ||
	    k_dry_pa < 0.0 || mu_dry_pa < 0.0 || !(rho_min_kgm3 > 0.0) ||
	    !(rho_fl_kgm3 > 0.0) ||
	    gassmann_domain(k_min_pa, k_fl_pa, phi) != RW_OK) {
		subst_nan(out);
		return RW_EDOM;
	}
	st = rw_rock_gassmann_sat(k_dry_pa, k_min_pa, k_fl_pa, phi, &ks, warn);
	if (st != RW_OK) {
		subst_nan(out);
		return st;
	}
	return subst_finish(out, ks, mu_dry_pa,
	                    (1.0 - phi) * rho_min_kgm3 + phi * rho_fl_kgm3,
	                    k_dry_pa);
}
