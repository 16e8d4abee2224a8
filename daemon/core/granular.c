/* Granular-pack and sand models of the rockwire core: Hertz-Mindlin and
 * Walton packs, the soft- and stiff-sand bounds, contact and constant
 * cement, critical porosity and Krief. Formulas as written in Mavko,
 * Mukerji & Dvorkin 2009 (sec. 5.4) and the papers cited at each
 * function, from memory where marked. Contracts are in
 * rockwire/rockmodel.h. */
#include <math.h>

#include "rockwire/rockmodel.h"
#include "rockwire/status.h"
#include "rockmodel_int.h"

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

static int fail2(double *a, double *b, unsigned *warn, int st)
{
	*a = NAN;
	*b = NAN;
	warn_set(warn, 0);
	return st;
}

/* Poisson's ratio of an isotropic solid. */
static double poisson(double k, double mu)
{
	return (3.0 * k - 2.0 * mu) / (2.0 * (3.0 * k + mu));
}

/* Grain moduli usable by the contact models: positive, finite, with
 * Poisson's ratio in (-1, 0.5). */
static int solid_ok(double k, double mu)
{
	double nu;

	if (!isfinite(k) || !isfinite(mu) || !(k > 0.0) || !(mu > 0.0))
		return 0;
	nu = poisson(k, mu);
	return nu > -1.0 && nu < 0.5;
}

/* Hashin-Shtrikman "zeta" of a solid: (mu/6)(9K + 8mu)/(K + 2mu). */
static double hs_zeta(double k, double mu)
{
	if (!(mu > 0.0))
		return 0.0;
	return mu / 6.0 * (9.0 * k + 8.0 * mu) / (k + 2.0 * mu);
}

/* Two-point modified Hashin-Shtrikman form used by the sand models:
 * end members (k1, mu1) with fraction f1 and (k2, mu2) with 1 - f1,
 * joined with the reference shear modulus mu_ref (the pack's for the
 * lower, the mineral's for the upper bound) and z_ref its zeta. A zero
 * denominator member (an empty end member with zero reference) is
 * handled by the caller. */
static void mhs(double f1, double k1, double mu1, double k2, double mu2,
                double mu_ref, double z_ref, double *k, double *mu)
{
	double a = 4.0 / 3.0 * mu_ref;

	*k = 1.0 / (f1 / (k1 + a) + (1.0 - f1) / (k2 + a)) - a;
	*mu = 1.0 / (f1 / (mu1 + z_ref) + (1.0 - f1) / (mu2 + z_ref)) - z_ref;
}

void rw__rm_hs_vacuum(double k, double mu, double phi, double *k_up,
                      double *mu_up)
{
	double a = 4.0 / 3.0 * mu, z = hs_zeta(k, mu);

	*k_up = (1.0 - phi) * k * a / (a + phi * k);
	*mu_up = (1.0 - phi) * mu * z / (z + phi * mu);
}

unsigned rw__rm_hs_check(double k, double mu, double phi, double k_dry,
                         double mu_dry)
{
	double ku, muu;

	rw__rm_hs_vacuum(k, mu, phi, &ku, &muu);
	if (k_dry > ku * (1.0 + 1e-12) || mu_dry > muu * (1.0 + 1e-12))
		return RW_RM_WARN_ABOVE_HS;
	return 0;
}

static unsigned pack_warn(double coord, double p)
{
	unsigned w = 0;

	if (coord < RW_RM_COORD_MIN || coord > RW_RM_COORD_MAX)
		w |= RW_RM_WARN_COORD_RANGE;
	if (p < RW_RM_P_MIN_PA || p > RW_RM_P_MAX_PA)
		w |= RW_RM_WARN_P_RANGE;
	return w;
}

static int pack_args_ok(double k, double mu, double phi, double coord, double p)
{
	return solid_ok(k, mu) && isfinite(phi) && phi >= 0.0 && phi < 1.0 &&
	       isfinite(coord) && coord > 0.0 && isfinite(p) && p >= 0.0;
}

int rw_rm_hertz_mindlin(double k_min_pa, double mu_min_pa, double phi,
                        double coord, double p_eff_pa, double slip,
                        double *k_dry_pa, double *mu_dry_pa, unsigned *warn)
{
	double nu, base, k, fac;

	if (!pack_args_ok(k_min_pa, mu_min_pa, phi, coord, p_eff_pa) ||
	    !isfinite(slip) || slip < 0.0 || slip > 1.0)
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	nu = poisson(k_min_pa, mu_min_pa);
	/* base = C^2 (1 - phi)^2 mu^2 P / (pi^2 (1 - nu)^2) */
	base = coord * coord * (1.0 - phi) * (1.0 - phi) * mu_min_pa *
	       mu_min_pa * p_eff_pa / (M_PI * M_PI * (1.0 - nu) * (1.0 - nu));
	k = cbrt(base / 18.0);
	/* Tangential stiffness linear in slip between no friction (1/5) and
	 * no slip ((5 - 4 nu) / (5 (2 - nu))). */
	fac = (2.0 + 3.0 * slip - nu * (1.0 + 3.0 * slip)) / (5.0 * (2.0 - nu));
	*k_dry_pa = k;
	*mu_dry_pa = fac * cbrt(1.5 * base);
	warn_set(warn, pack_warn(coord, p_eff_pa));
	return RW_OK;
}

int rw_rm_walton(double k_min_pa, double mu_min_pa, double phi, double coord,
                 double p_eff_pa, int rough, double *k_dry_pa,
                 double *mu_dry_pa, unsigned *warn)
{
	double lam, a, b, k;

	if (!pack_args_ok(k_min_pa, mu_min_pa, phi, coord, p_eff_pa))
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	lam = k_min_pa - 2.0 / 3.0 * mu_min_pa;
	a = (1.0 / mu_min_pa - 1.0 / (mu_min_pa + lam)) / (4.0 * M_PI);
	b = (1.0 / mu_min_pa + 1.0 / (mu_min_pa + lam)) / (4.0 * M_PI);
	k = cbrt(3.0 * (1.0 - phi) * (1.0 - phi) * coord * coord * p_eff_pa /
	         (pow(M_PI, 4.0) * b * b)) /
	    6.0;
	*k_dry_pa = k;
	if (rough)
		*mu_dry_pa = 0.6 * k * (5.0 * b + a) / (2.0 * b + a);
	else
		*mu_dry_pa = 0.6 * k;
	warn_set(warn, pack_warn(coord, p_eff_pa));
	return RW_OK;
}

int rw_rm_coord_murphy(double phi, double *coord)
{
	if (!isfinite(phi) || phi < 0.0 || phi >= 1.0) {
		*coord = NAN;
		return RW_EDOM;
	}
	*coord = 20.0 - 34.0 * phi + 14.0 * phi * phi;
	return RW_OK;
}

/* Soft- and stiff-sand bounds: upper selects the stiff sand. */
static int sand(int upper, double k_min, double mu_min, double phi,
                double phi_c, double coord, double p, double slip,
                double *k_dry, double *mu_dry, unsigned *warn)
{
	double khm, muhm, mu_ref, z_ref;
	unsigned w;
	int st;

	if (!isfinite(phi_c) || !(phi_c > 0.0 && phi_c < 1.0) ||
	    !isfinite(phi) || phi < 0.0 || phi >= 1.0)
		return fail2(k_dry, mu_dry, warn, RW_EDOM);
	st = rw_rm_hertz_mindlin(k_min, mu_min, phi_c, coord, p, slip, &khm,
	                         &muhm, &w);
	if (st != RW_OK)
		return fail2(k_dry, mu_dry, warn, st);
	if (phi > phi_c) {
		/* rockwire's continuation to an empty space at phi = 1 with
		 * the pack as reference (see the header). */
		w |= RW_RM_WARN_PHI_ABOVE_C;
		if (!(muhm > 0.0)) {
			*k_dry = 0.0;
			*mu_dry = 0.0;
		} else {
			mhs((1.0 - phi) / (1.0 - phi_c), khm, muhm, 0.0, 0.0,
			    muhm, hs_zeta(khm, muhm), k_dry, mu_dry);
		}
		warn_set(warn, w);
		return RW_OK;
	}
	if (upper) {
		mu_ref = mu_min;
		z_ref = hs_zeta(k_min, mu_min);
	} else {
		mu_ref = muhm;
		z_ref = hs_zeta(khm, muhm);
	}
	if (!(mu_ref > 0.0)) {
		/* zero effective pressure: the pack has no stiffness, and the
		 * lower bound with a zero reference is zero unless there is
		 * no pack at all */
		*k_dry = phi > 0.0 ? 0.0 : k_min;
		*mu_dry = phi > 0.0 ? 0.0 : mu_min;
	} else {
		mhs(phi / phi_c, khm, muhm, k_min, mu_min, mu_ref, z_ref, k_dry,
		    mu_dry);
	}
	warn_set(warn, w);
	return RW_OK;
}

int rw_rm_soft_sand(double k_min_pa, double mu_min_pa, double phi, double phi_c,
                    double coord, double p_eff_pa, double slip,
                    double *k_dry_pa, double *mu_dry_pa, unsigned *warn)
{
	return sand(0, k_min_pa, mu_min_pa, phi, phi_c, coord, p_eff_pa, slip,
	            k_dry_pa, mu_dry_pa, warn);
}

int rw_rm_stiff_sand(double k_min_pa, double mu_min_pa, double phi,
                     double phi_c, double coord, double p_eff_pa, double slip,
                     double *k_dry_pa, double *mu_dry_pa, unsigned *warn)
{
	return sand(1, k_min_pa, mu_min_pa, phi, phi_c, coord, p_eff_pa, slip,
	            k_dry_pa, mu_dry_pa, warn);
}

/* Dvorkin, Nur & Yin 1994 fits S_n and S_t of the normal and tangential
 * contact stiffness of two cemented grains, as quoted in Mavko, Mukerji &
 * Dvorkin 2009, sec. 5.4 (coefficients from memory). nu: grain Poisson's
 * ratio; a: cement radius ratio. */
static double cement_sn(double ln, double a)
{
	double an = -0.024153 * pow(ln, -1.3646);
	double bn = 0.20405 * pow(ln, -0.89008);
	double cn = 0.00024649 * pow(ln, -1.9864);

	return an * a * a + bn * a + cn;
}

static double cement_st(double lt, double nu, double a)
{
	double nu2 = nu * nu;
	double at = -1e-2 * (2.26 * nu2 + 2.07 * nu + 2.3) *
	            pow(lt, 0.079 * nu2 + 0.1754 * nu - 1.342);
	double bt = (0.0573 * nu2 + 0.0937 * nu + 0.202) *
	            pow(lt, 0.0274 * nu2 + 0.0529 * nu - 0.8765);
	double ct = 1e-4 * (9.654 * nu2 + 4.945 * nu + 3.1) *
	            pow(lt, 0.01867 * nu2 + 0.4011 * nu - 1.8186);

	return at * a * a + bt * a + ct;
}

int rw_rm_contact_cement(double k_min_pa, double mu_min_pa, double k_cem_pa,
                         double mu_cem_pa, double phi, double phi_c,
                         double coord, int scheme, double *k_dry_pa,
                         double *mu_dry_pa, unsigned *warn)
{
	double nu, nuc, ln, lt, a, mc, k;
	unsigned w = 0;

	if (scheme != RW_RM_CEMENT_CONTACT && scheme != RW_RM_CEMENT_COATING)
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EINVAL);
	if (!solid_ok(k_min_pa, mu_min_pa) || !solid_ok(k_cem_pa, mu_cem_pa) ||
	    !isfinite(phi_c) || !(phi_c > 0.0 && phi_c < 1.0) ||
	    !isfinite(phi) || phi < 0.0 || phi > phi_c || !isfinite(coord) ||
	    !(coord > 0.0))
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	nu = poisson(k_min_pa, mu_min_pa);
	nuc = poisson(k_cem_pa, mu_cem_pa);
	if (scheme == RW_RM_CEMENT_CONTACT)
		a = 2.0 *
		    pow((phi_c - phi) / (3.0 * coord * (1.0 - phi_c)), 0.25);
	else
		a = sqrt(2.0 * (phi_c - phi) / (3.0 * (1.0 - phi_c)));
	ln = 2.0 * mu_cem_pa * (1.0 - nu) * (1.0 - nuc) /
	     (M_PI * mu_min_pa * (1.0 - 2.0 * nuc));
	lt = mu_cem_pa / (M_PI * mu_min_pa);
	mc = k_cem_pa + 4.0 / 3.0 * mu_cem_pa;
	k = coord * (1.0 - phi_c) * mc * cement_sn(ln, a) / 6.0;
	*k_dry_pa = k;
	*mu_dry_pa = 0.6 * k + 0.15 * coord * (1.0 - phi_c) * mu_cem_pa *
	                           cement_st(lt, nu, a);
	if (phi_c - phi > RW_RM_CEMENT_MAX)
		w |= RW_RM_WARN_CEMENT_HIGH;
	if (coord < RW_RM_COORD_MIN || coord > RW_RM_COORD_MAX)
		w |= RW_RM_WARN_COORD_RANGE;
	warn_set(warn, w);
	return RW_OK;
}

int rw_rm_constant_cement(double k_min_pa, double mu_min_pa, double k_cem_pa,
                          double mu_cem_pa, double phi, double phi_b,
                          double phi_c, double coord, int scheme,
                          double *k_dry_pa, double *mu_dry_pa, unsigned *warn)
{
	double kb, mub;
	unsigned w;
	int st;

	if (!isfinite(phi_b) || !isfinite(phi_c) || !(phi_b > 0.0) ||
	    phi_b > phi_c || !isfinite(phi) || phi < 0.0 || phi > phi_b)
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	st = rw_rm_contact_cement(k_min_pa, mu_min_pa, k_cem_pa, mu_cem_pa,
	                          phi_b, phi_c, coord, scheme, &kb, &mub, &w);
	if (st != RW_OK)
		return fail2(k_dry_pa, mu_dry_pa, warn, st);
	mhs(phi / phi_b, kb, mub, k_min_pa, mu_min_pa, mub, hs_zeta(kb, mub),
	    k_dry_pa, mu_dry_pa);
	warn_set(warn, w);
	return RW_OK;
}

int rw_rm_critical_porosity(double k_min_pa, double mu_min_pa, double phi,
                            double phi_c, double *k_dry_pa, double *mu_dry_pa,
                            unsigned *warn)
{
	if (!solid_ok(k_min_pa, mu_min_pa) || !isfinite(phi) || phi < 0.0 ||
	    phi >= 1.0 || !isfinite(phi_c) || !(phi_c > 0.0 && phi_c < 1.0))
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	if (phi >= phi_c) {
		*k_dry_pa = 0.0;
		*mu_dry_pa = 0.0;
		warn_set(warn, phi > phi_c ? RW_RM_WARN_PHI_ABOVE_C : 0u);
		return RW_OK;
	}
	*k_dry_pa = k_min_pa * (1.0 - phi / phi_c);
	*mu_dry_pa = mu_min_pa * (1.0 - phi / phi_c);
	warn_set(warn, rw__rm_hs_check(k_min_pa, mu_min_pa, phi, *k_dry_pa,
	                               *mu_dry_pa));
	return RW_OK;
}

int rw_rm_krief(double k_min_pa, double mu_min_pa, double phi, double *k_dry_pa,
                double *mu_dry_pa, unsigned *warn)
{
	double f;

	if (!solid_ok(k_min_pa, mu_min_pa) || !isfinite(phi) || phi < 0.0 ||
	    phi >= 1.0)
		return fail2(k_dry_pa, mu_dry_pa, warn, RW_EDOM);
	f = pow(1.0 - phi, 3.0 / (1.0 - phi));
	*k_dry_pa = k_min_pa * f;
	*mu_dry_pa = mu_min_pa * f;
	warn_set(warn, 0);
	return RW_OK;
}
