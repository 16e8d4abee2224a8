/* Linearised PP reflection coefficients of an isotropic interface by their
 * published names (Aki-Richards, Shuey, Hilterman, Fatti, Gray, Smith-
 * Gidlow), the intercept/gradient/curvature terms, and the AVO class of an
 * (intercept, gradient) pair. Formulas and the angle each one uses are in
 * include/rockwire/reflect.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"
#include "reflect_int.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

/* Means of the two media and relative contrasts (lower - upper) / mean. */
struct contrast {
	double vp, vs, rho; /* means, SI */
	double dvp, dvs, drho;
	double k; /* vs / vp of the means */
};

/* d / m, with 0 for a contrast between two zeros (two fluids have no
 * shear contrast; every shear term is multiplied by vs^2 anyway). */
static double rel(double d, double m)
{
	if (m == 0.0 && d == 0.0)
		return 0.0;
	return d / m;
}

static int contrast_get(const rw_reflect_medium *u, const rw_reflect_medium *l,
                        struct contrast *c)
{
	if (rw__medium_check(u) != RW_OK || rw__medium_check(l) != RW_OK)
		return RW_EDOM;
	c->vp = 0.5 * (u->vp_ms + l->vp_ms);
	c->vs = 0.5 * (u->vs_ms + l->vs_ms);
	c->rho = 0.5 * (u->rho_kgm3 + l->rho_kgm3);
	c->dvp = (l->vp_ms - u->vp_ms) / c->vp;
	c->dvs = rel(l->vs_ms - u->vs_ms, c->vs);
	c->drho = (l->rho_kgm3 - u->rho_kgm3) / c->rho;
	c->k = c->vs / c->vp;
	return RW_OK;
}

static int angle_ok(double theta_rad)
{
	return isfinite(theta_rad) && theta_rad >= 0.0 && theta_rad < M_PI_2;
}

/* Common prologue: NaN output, contrasts, angle check. */
static int setup(const rw_reflect_medium *u, const rw_reflect_medium *l,
                 double theta_rad, double *r, struct contrast *c)
{
	if (r == NULL)
		return RW_EDOM;
	*r = NAN;
	if (contrast_get(u, l, c) != RW_OK || !angle_ok(theta_rad))
		return RW_EDOM;
	return RW_OK;
}

int rw_reflect_aki_richards(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r)
{
	struct contrast c;
	double s, x, t, p, g, ct;
	int st;

	st = setup(upper, lower, theta_rad, r, &c);
	if (st != RW_OK)
		return st;
	/* rw_reflect_angle_average's arithmetic, without its second checks
	 * of the media and angle (setup made them) and second sine. */
	s = sin(theta_rad);
	x = lower->vp_ms * s / upper->vp_ms;
	if (x >= 1.0)
		return RW_ERANGE;
	t = 0.5 * (theta_rad + asin(x));
	p = s / upper->vp_ms;
	g = c.vs * c.vs * p * p;
	ct = cos(t);
	*r = 0.5 * (1.0 - 4.0 * g) * c.drho + c.dvp / (2.0 * ct * ct) -
	     4.0 * g * c.dvs;
	return RW_OK;
}

/* Shuey's A, B, C from the means and contrasts. */
static void shuey_abc(const struct contrast *m, double *a, double *b, double *c)
{
	*a = 0.5 * (m->dvp + m->drho);
	*b = 0.5 * m->dvp - 2.0 * m->k * m->k * (m->drho + 2.0 * m->dvs);
	*c = 0.5 * m->dvp;
}

int rw_reflect_shuey_terms(const rw_reflect_medium *upper,
                           const rw_reflect_medium *lower, double *a, double *b,
                           double *c)
{
	struct contrast m;
	double va = NAN, vb = NAN, vc = NAN;
	int st;

	st = contrast_get(upper, lower, &m);
	if (st == RW_OK)
		shuey_abc(&m, &va, &vb, &vc);
	if (a != NULL)
		*a = va;
	if (b != NULL)
		*b = vb;
	if (c != NULL)
		*c = vc;
	return st;
}

int rw_reflect_shuey2(const rw_reflect_medium *upper,
                      const rw_reflect_medium *lower, double theta_rad,
                      double *r)
{
	struct contrast m;
	double a, b, c, s;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	shuey_abc(&m, &a, &b, &c);
	s = sin(theta_rad);
	*r = a + b * s * s;
	return RW_OK;
}

int rw_reflect_shuey3(const rw_reflect_medium *upper,
                      const rw_reflect_medium *lower, double theta_rad,
                      double *r)
{
	struct contrast m;
	double a, b, c, s, t;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	shuey_abc(&m, &a, &b, &c);
	s = sin(theta_rad);
	t = tan(theta_rad);
	*r = a + b * s * s + c * (t * t - s * s);
	return RW_OK;
}

/* Poisson's ratio (vp^2 - 2 vs^2) / (2 (vp^2 - vs^2)) of a valid medium. */
static double poisson(const rw_reflect_medium *m)
{
	double p2 = m->vp_ms * m->vp_ms, s2 = m->vs_ms * m->vs_ms;

	return (p2 - 2.0 * s2) / (2.0 * (p2 - s2));
}

int rw_reflect_hilterman(const rw_reflect_medium *upper,
                         const rw_reflect_medium *lower, double theta_rad,
                         double *r)
{
	struct contrast m;
	double z1, z2, ni, s1, s2, sm, pr, s;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	z1 = upper->rho_kgm3 * upper->vp_ms;
	z2 = lower->rho_kgm3 * lower->vp_ms;
	ni = (z2 - z1) / (z2 + z1);
	s1 = poisson(upper);
	s2 = poisson(lower);
	sm = 0.5 * (s1 + s2);
	pr = (s2 - s1) / ((1.0 - sm) * (1.0 - sm));
	s = sin(theta_rad);
	*r = ni * (1.0 - s * s) + pr * s * s;
	return RW_OK;
}

int rw_reflect_fatti_terms(const rw_reflect_medium *upper,
                           const rw_reflect_medium *lower, double *rp,
                           double *rs, double *rd, double *k)
{
	struct contrast m;
	double vp = NAN, vs = NAN, vd = NAN, vk = NAN;
	int st;

	st = contrast_get(upper, lower, &m);
	if (st == RW_OK) {
		vp = 0.5 * (m.dvp + m.drho);
		vs = 0.5 * (m.dvs + m.drho);
		vd = m.drho;
		vk = m.k;
	}
	if (rp != NULL)
		*rp = vp;
	if (rs != NULL)
		*rs = vs;
	if (rd != NULL)
		*rd = vd;
	if (k != NULL)
		*k = vk;
	return st;
}

int rw_reflect_fatti(const rw_reflect_medium *upper,
                     const rw_reflect_medium *lower, double theta_rad,
                     double *r)
{
	struct contrast m;
	double rp, rs, rd, k, s2, t2;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	rw_reflect_fatti_terms(upper, lower, &rp, &rs, &rd, &k);
	s2 = sin(theta_rad) * sin(theta_rad);
	t2 = tan(theta_rad) * tan(theta_rad);
	*r = (1.0 + t2) * rp - 8.0 * k * k * s2 * rs -
	     (0.5 * t2 - 2.0 * k * k * s2) * rd;
	return RW_OK;
}

/* P-wave modulus rho vp^2 and shear modulus rho vs^2 of a medium (Pa). */
static void moduli(const rw_reflect_medium *m, double *m_pa, double *mu_pa)
{
	*m_pa = m->rho_kgm3 * m->vp_ms * m->vp_ms;
	*mu_pa = m->rho_kgm3 * m->vs_ms * m->vs_ms;
}

int rw_reflect_gray_lmr(const rw_reflect_medium *upper,
                        const rw_reflect_medium *lower, double theta_rad,
                        double *r)
{
	struct contrast m;
	double l1, l2, mu1, mu2, lm, mm, s2, sec2, k2;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	moduli(upper, &l1, &mu1);
	moduli(lower, &l2, &mu2);
	l1 -= 2.0 * mu1; /* lambda = M - 2 mu */
	l2 -= 2.0 * mu2;
	lm = 0.5 * (l1 + l2);
	mm = 0.5 * (mu1 + mu2);
	/* lambda = 0 to rounding: relative to the P modulus lambda + 2 mu */
	if (fabs(lm) <= 1e-12 * (lm + 2.0 * mm))
		return RW_EDOM;
	s2 = sin(theta_rad) * sin(theta_rad);
	sec2 = 1.0 / (cos(theta_rad) * cos(theta_rad));
	k2 = m.k * m.k;
	*r = (0.25 - 0.5 * k2) * sec2 * (l2 - l1) / lm +
	     k2 * (0.5 * sec2 - 2.0 * s2) * rel(mu2 - mu1, mm) +
	     (0.5 - 0.25 * sec2) * m.drho;
	return RW_OK;
}

int rw_reflect_gray_kmr(const rw_reflect_medium *upper,
                        const rw_reflect_medium *lower, double theta_rad,
                        double *r)
{
	struct contrast m;
	double k1, k2b, mu1, mu2, km, mm, s2, sec2, g;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	moduli(upper, &k1, &mu1);
	moduli(lower, &k2b, &mu2);
	k1 -= 4.0 / 3.0 * mu1; /* K = M - 4/3 mu */
	k2b -= 4.0 / 3.0 * mu2;
	km = 0.5 * (k1 + k2b);
	mm = 0.5 * (mu1 + mu2);
	s2 = sin(theta_rad) * sin(theta_rad);
	sec2 = 1.0 / (cos(theta_rad) * cos(theta_rad));
	g = m.k * m.k;
	*r = (0.25 - g / 3.0) * sec2 * (k2b - k1) / km +
	     g * (sec2 / 3.0 - 2.0 * s2) * rel(mu2 - mu1, mm) +
	     (0.5 - 0.25 * sec2) * m.drho;
	return RW_OK;
}

int rw_reflect_smith_gidlow(const rw_reflect_medium *upper,
                            const rw_reflect_medium *lower, double theta_rad,
                            double *r)
{
	struct contrast m;
	double s2, t2, k2;
	int st;

	st = setup(upper, lower, theta_rad, r, &m);
	if (st != RW_OK)
		return st;
	s2 = sin(theta_rad) * sin(theta_rad);
	t2 = tan(theta_rad) * tan(theta_rad);
	k2 = m.k * m.k;
	*r = (0.625 - 0.5 * k2 * s2 + 0.5 * t2) * m.dvp - 4.0 * k2 * s2 * m.dvs;
	return RW_OK;
}

rw_avo_class_params rw_reflect_avo_defaults(void)
{
	rw_avo_class_params p;

	p.a_small = 0.02;
	p.theta_max_rad = M_PI / 6.0;
	return p;
}

int rw_reflect_avo_classify(double a, double b, const rw_avo_class_params *par,
                            rw_avo_class *cls)
{
	rw_avo_class_params d = rw_reflect_avo_defaults();
	double s;

	if (cls == NULL)
		return RW_EDOM;
	*cls = RW_AVO_NONE;
	if (par == NULL)
		par = &d;
	if (!isfinite(a) || !isfinite(b) || !isfinite(par->a_small) ||
	    !(par->a_small >= 0.0) || !isfinite(par->theta_max_rad) ||
	    !(par->theta_max_rad > 0.0 && par->theta_max_rad < M_PI_2))
		return RW_EDOM;
	s = sin(par->theta_max_rad);
	if (a > par->a_small) {
		*cls = b < 0.0 ? RW_AVO_I : RW_AVO_NONE;
	} else if (a >= -par->a_small) {
		if (b < 0.0)
			*cls = (a > 0.0 && a + b * s * s < 0.0) ? RW_AVO_IIP
			                                        : RW_AVO_II;
	} else {
		*cls = b < 0.0 ? RW_AVO_III : RW_AVO_IV;
	}
	return RW_OK;
}

const char *rw_reflect_avo_class_name(rw_avo_class cls)
{
	switch (cls) {
	case RW_AVO_I: return "I";
	case RW_AVO_II: return "II";
	case RW_AVO_IIP: return "IIp";
	case RW_AVO_III: return "III";
	case RW_AVO_IV: return "IV";
	default: return "none";
	}
}
