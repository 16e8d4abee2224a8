/* Thomsen parameters of VTI media and the Ruger PP reflection coefficient
 * of an interface between two of them. Definitions and conventions are in
 * include/rockwire/aniso.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/aniso.h"
#include "rockwire/status.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

static void thomsen_nan(rw_aniso_thomsen *t)
{
	t->vp0_ms = t->vs0_ms = t->rho_kgm3 = NAN;
	t->epsilon = t->delta = t->gamma = NAN;
}

static void vti_nan(rw_aniso_vti *c)
{
	c->c11_pa = c->c13_pa = c->c33_pa = c->c44_pa = c->c66_pa = NAN;
}

int rw_aniso_vti_check(const rw_aniso_vti *c)
{
	if (c == NULL)
		return RW_EDOM;
	if (!isfinite(c->c11_pa) || !isfinite(c->c13_pa) ||
	    !isfinite(c->c33_pa) || !isfinite(c->c44_pa) ||
	    !isfinite(c->c66_pa))
		return RW_EDOM;
	if (!(c->c44_pa > 0.0) || !(c->c66_pa > 0.0) || !(c->c33_pa > 0.0) ||
	    !(c->c11_pa > c->c66_pa))
		return RW_EDOM;
	if (!(c->c13_pa * c->c13_pa < c->c33_pa * (c->c11_pa - c->c66_pa)))
		return RW_EDOM;
	return RW_OK;
}

int rw_aniso_thomsen_from_stiff(const rw_aniso_vti *c, double rho_kgm3,
                                rw_aniso_thomsen *t)
{
	double a, b;

	if (t == NULL)
		return RW_EDOM;
	thomsen_nan(t);
	if (rw_aniso_vti_check(c) != RW_OK || !isfinite(rho_kgm3) ||
	    !(rho_kgm3 > 0.0) || !(c->c33_pa > c->c44_pa))
		return RW_EDOM;
	a = c->c13_pa + c->c44_pa;
	b = c->c33_pa - c->c44_pa;
	t->vp0_ms = sqrt(c->c33_pa / rho_kgm3);
	t->vs0_ms = sqrt(c->c44_pa / rho_kgm3);
	t->rho_kgm3 = rho_kgm3;
	t->epsilon = (c->c11_pa - c->c33_pa) / (2.0 * c->c33_pa);
	t->gamma = (c->c66_pa - c->c44_pa) / (2.0 * c->c44_pa);
	/* (a^2 - b^2) factored as (a - b)(a + b) for accuracy near 0 */
	t->delta = (a - b) * (a + b) / (2.0 * c->c33_pa * b);
	return RW_OK;
}

/* Range checks shared by the inverse and Ruger; vs0 = 0 allowed only when
 * fluid_ok (then the medium must be isotropic). */
static int thomsen_args(const rw_aniso_thomsen *t, int fluid_ok)
{
	if (t == NULL)
		return RW_EDOM;
	if (!isfinite(t->vp0_ms) || !isfinite(t->vs0_ms) ||
	    !isfinite(t->rho_kgm3) || !isfinite(t->epsilon) ||
	    !isfinite(t->delta) || !isfinite(t->gamma))
		return RW_EDOM;
	if (!(t->vp0_ms > 0.0) || !(t->rho_kgm3 > 0.0) || t->vs0_ms < 0.0 ||
	    !(t->vs0_ms < t->vp0_ms))
		return RW_EDOM;
	if (t->vs0_ms == 0.0) {
		if (!fluid_ok || t->epsilon != 0.0 || t->delta != 0.0 ||
		    t->gamma != 0.0)
			return RW_EDOM;
	}
	return RW_OK;
}

int rw_aniso_stiff_from_thomsen(const rw_aniso_thomsen *t, rw_aniso_vti *c)
{
	double c33, c44, b, arg;

	if (c == NULL)
		return RW_EDOM;
	vti_nan(c);
	if (thomsen_args(t, 0) != RW_OK)
		return RW_EDOM;
	c33 = t->rho_kgm3 * t->vp0_ms * t->vp0_ms;
	c44 = t->rho_kgm3 * t->vs0_ms * t->vs0_ms;
	b = c33 - c44;
	arg = b * (2.0 * t->delta * c33 + b);
	if (arg < 0.0)
		return RW_EDOM;
	c->c33_pa = c33;
	c->c44_pa = c44;
	c->c11_pa = c33 * (1.0 + 2.0 * t->epsilon);
	c->c66_pa = c44 * (1.0 + 2.0 * t->gamma);
	c->c13_pa = sqrt(arg) - c44;
	if (rw_aniso_vti_check(c) != RW_OK) {
		vti_nan(c);
		return RW_ERANGE;
	}
	return RW_OK;
}

/* Validates one Ruger medium: ranges, then stability of its stiffness
 * unless it is an isotropic fluid. */
static int ruger_medium(const rw_aniso_thomsen *t)
{
	rw_aniso_vti c;

	if (thomsen_args(t, 1) != RW_OK)
		return RW_EDOM;
	if (t->vs0_ms == 0.0)
		return RW_OK;
	return rw_aniso_stiff_from_thomsen(t, &c);
}

int rw_aniso_ruger_pp(const rw_aniso_thomsen *upper,
                      const rw_aniso_thomsen *lower, double theta_rad,
                      double *r)
{
	double z1, z2, g1, g2, gm, vp, vs, dg, s2, t2, iso2, iso4;
	int st;

	if (r == NULL)
		return RW_EDOM;
	*r = NAN;
	if (!isfinite(theta_rad) || theta_rad < 0.0 || theta_rad >= M_PI_2)
		return RW_EDOM;
	st = ruger_medium(upper);
	if (st == RW_OK)
		st = ruger_medium(lower);
	if (st != RW_OK)
		return st;
	z1 = upper->rho_kgm3 * upper->vp0_ms;
	z2 = lower->rho_kgm3 * lower->vp0_ms;
	g1 = upper->rho_kgm3 * upper->vs0_ms * upper->vs0_ms;
	g2 = lower->rho_kgm3 * lower->vs0_ms * lower->vs0_ms;
	gm = 0.5 * (g1 + g2);
	vp = 0.5 * (upper->vp0_ms + lower->vp0_ms);
	vs = 0.5 * (upper->vs0_ms + lower->vs0_ms);
	dg = gm > 0.0 ? (g2 - g1) / gm : 0.0;
	s2 = sin(theta_rad) * sin(theta_rad);
	t2 = tan(theta_rad) * tan(theta_rad);
	iso2 = (lower->vp0_ms - upper->vp0_ms) / vp -
	       4.0 * (vs / vp) * (vs / vp) * dg;
	iso4 = (lower->vp0_ms - upper->vp0_ms) / vp;
	*r = (z2 - z1) / (z2 + z1) +
	     0.5 * (iso2 + (lower->delta - upper->delta)) * s2 +
	     0.5 * (iso4 + (lower->epsilon - upper->epsilon)) * s2 * t2;
	return RW_OK;
}
