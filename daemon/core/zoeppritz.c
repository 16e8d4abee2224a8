/* Exact plane-wave P reflection and transmission at a welded interface
 * between two isotropic media (Zoeppritz 1919, in the explicit form of Aki
 * & Richards 1980), with the reduced systems for fluid media, the critical
 * angles from Snell's law and the average angle of the linearisations.
 * Conventions are stated in include/rockwire/reflect.h. */
#include <complex.h>
#include <math.h>

/* C11's CMPLX builds a complex from parts without the inf/nan pitfalls of
 * x + I*y; glibc's <complex.h> defines it for GCC only. */
#if !defined(CMPLX) && defined(__clang__)
#define CMPLX(x, y) __builtin_complex((double)(x), (double)(y))
#endif
#include <stddef.h>

#include "rockwire/reflect.h"
#include "rockwire/status.h"
#include "reflect_int.h"

#ifndef M_PI_2
#define M_PI_2 1.57079632679489661923
#endif

int rw_reflect_medium_check(const rw_reflect_medium *m)
{
	return rw__medium_check(m);
}

/* Vertical slowness sqrt(1/v^2 - p^2) for v > 0, p >= 0 (s/m), on the
 * branch Re >= 0, Im >= 0 (Aki & Richards 1980, sec. 5.2.4): real for a
 * propagating wave, +i sqrt(p^2 - 1/v^2) for an evanescent one. The
 * factored difference keeps accuracy near the critical angle. */
static double complex vslow(double v, double p)
{
	double s = (1.0 / v - p) * (1.0 / v + p);

	if (s >= 0.0)
		return CMPLX(sqrt(s), 0.0);
	return CMPLX(0.0, sqrt(-s));
}

static rw_reflect_cplx to_pub(double complex z)
{
	rw_reflect_cplx c;

	c.re = creal(z);
	c.im = cimag(z);
	return c;
}

static void set_nan(rw_reflect_pcoefs *out)
{
	out->rpp.re = out->rpp.im = NAN;
	out->rps.re = out->rps.im = NAN;
	out->tpp.re = out->tpp.im = NAN;
	out->tps.re = out->tps.im = NAN;
}

static int cfinite(double complex z)
{
	return isfinite(creal(z)) && isfinite(cimag(z));
}

/* Solves the n x n complex system a x = b (n <= 3) in place by Gaussian
 * elimination with partial pivoting. Returns RW_ERANGE for a singular
 * matrix. */
static int csolve(int n, double complex a[3][3], double complex b[3],
                  double complex x[3])
{
	int i, j, k, piv;

	for (k = 0; k < n; k++) {
		piv = k;
		for (i = k + 1; i < n; i++)
			if (cabs(a[i][k]) > cabs(a[piv][k]))
				piv = i;
		if (!(cabs(a[piv][k]) > 0.0))
			return RW_ERANGE;
		if (piv != k) {
			double complex t;

			for (j = 0; j < n; j++) {
				t = a[k][j];
				a[k][j] = a[piv][j];
				a[piv][j] = t;
			}
			t = b[k];
			b[k] = b[piv];
			b[piv] = t;
		}
		for (i = k + 1; i < n; i++) {
			double complex f = a[i][k] / a[k][k];

			for (j = k; j < n; j++)
				a[i][j] -= f * a[k][j];
			b[i] -= f * b[k];
		}
	}
	for (i = n - 1; i >= 0; i--) {
		double complex s = b[i];

		for (j = i + 1; j < n; j++)
			s -= a[i][j] * x[j];
		x[i] = s / a[i][i];
	}
	return RW_OK;
}

/* Solid over solid: Aki & Richards 1980, eq. 5.39, with complex vertical
 * slownesses (their expressions hold unchanged past critical angles). */
static int solid_solid(const rw_reflect_medium *m1, const rw_reflect_medium *m2,
                       double p, double complex r[4])
{
	double a1 = m1->vp_ms, b1 = m1->vs_ms, r1 = m1->rho_kgm3;
	double a2 = m2->vp_ms, b2 = m2->vs_ms, r2 = m2->rho_kgm3;
	double p2 = p * p;
	double complex qa1 = vslow(a1, p), qb1 = vslow(b1, p);
	double complex qa2 = vslow(a2, p), qb2 = vslow(b2, p);
	double a =
	    r2 * (1.0 - 2.0 * b2 * b2 * p2) - r1 * (1.0 - 2.0 * b1 * b1 * p2);
	double b = r2 * (1.0 - 2.0 * b2 * b2 * p2) + 2.0 * r1 * b1 * b1 * p2;
	double c = r1 * (1.0 - 2.0 * b1 * b1 * p2) + 2.0 * r2 * b2 * b2 * p2;
	double d = 2.0 * (r2 * b2 * b2 - r1 * b1 * b1);
	double complex e = b * qa1 + c * qa2;
	double complex f = b * qb1 + c * qb2;
	double complex g = a - d * qa1 * qb2;
	double complex h = a - d * qa2 * qb1;
	double complex dd = e * f + g * h * p2;

	/* a zero or non-finite denominator (not cabs(dd) > 0: the same
	 * test for finite dd, without a hypot per sample) */
	if ((creal(dd) == 0.0 && cimag(dd) == 0.0) || !cfinite(dd))
		return RW_ERANGE;
	r[0] = ((b * qa1 - c * qa2) * f - (a + d * qa1 * qb2) * h * p2) / dd;
	r[1] = -2.0 * qa1 * (a * b + c * d * qa2 * qb2) * p * a1 / (b1 * dd);
	r[2] = 2.0 * r1 * qa1 * f * a1 / (a2 * dd);
	r[3] = 2.0 * r1 * qa1 * h * p * a1 / (b2 * dd);
	return RW_OK;
}

/* Fluid over solid. Boundary conditions at z = 0 (Aki & Richards 1980,
 * sec. 5.2.3, with slip allowed): u_z and sigma_zz continuous, sigma_xz = 0
 * on the solid side; no reflected S. Unknowns (Rpp, Tpp, Tps); the traction
 * rows are divided by rho1 vp1 so the matrix is dimensionless. Plane-wave
 * displacements and tractions follow from the polarisations in reflect.h:
 * a P wave of slowness (p, +/-q) gives sigma_zz = i w rho vp (1 - 2 vs^2
 * p^2) and sigma_xz = +/- i w 2 rho vs^2 vp p q; an S wave gives sigma_zz =
 * -i w 2 rho vs^3 p q and sigma_xz = +/- i w rho vs (1 - 2 vs^2 p^2). */
static int fluid_solid(const rw_reflect_medium *m1, const rw_reflect_medium *m2,
                       double p, double complex r[4])
{
	double a1 = m1->vp_ms, r1 = m1->rho_kgm3;
	double a2 = m2->vp_ms, b2 = m2->vs_ms, r2 = m2->rho_kgm3;
	double z1 = r1 * a1, w2 = 1.0 - 2.0 * b2 * b2 * p * p;
	double complex qa1 = vslow(a1, p), qa2 = vslow(a2, p);
	double complex qb2 = vslow(b2, p);
	double complex m[3][3], rhs[3], x[3];
	int st;

	/* u_z: incident + reflected P = transmitted P + S */
	m[0][0] = a1 * qa1;
	m[0][1] = a2 * qa2;
	m[0][2] = -b2 * p;
	rhs[0] = a1 * qa1;
	/* sigma_xz on the solid side vanishes */
	m[1][0] = 0.0;
	m[1][1] = 2.0 * r2 * b2 * b2 * a2 * p * qa2 / z1;
	m[1][2] = r2 * b2 * w2 / z1;
	rhs[1] = 0.0;
	/* sigma_zz */
	m[2][0] = -1.0;
	m[2][1] = r2 * a2 * w2 / z1;
	m[2][2] = -2.0 * r2 * b2 * b2 * b2 * p * qb2 / z1;
	rhs[2] = 1.0;
	st = csolve(3, m, rhs, x);
	if (st != RW_OK)
		return st;
	r[0] = x[0];
	r[1] = 0.0;
	r[2] = x[1];
	r[3] = x[2];
	return RW_OK;
}

/* Solid over fluid: u_z and sigma_zz continuous, sigma_xz = 0 on the solid
 * side; no transmitted S. Unknowns (Rpp, Rps, Tpp). */
static int solid_fluid(const rw_reflect_medium *m1, const rw_reflect_medium *m2,
                       double p, double complex r[4])
{
	double a1 = m1->vp_ms, b1 = m1->vs_ms, r1 = m1->rho_kgm3;
	double a2 = m2->vp_ms, r2 = m2->rho_kgm3;
	double z1 = r1 * a1, w1 = 1.0 - 2.0 * b1 * b1 * p * p;
	double complex qa1 = vslow(a1, p), qb1 = vslow(b1, p);
	double complex qa2 = vslow(a2, p);
	double complex m[3][3], rhs[3], x[3];
	int st;

	/* u_z */
	m[0][0] = -a1 * qa1;
	m[0][1] = b1 * p;
	m[0][2] = -a2 * qa2;
	rhs[0] = -a1 * qa1;
	/* sigma_xz on the solid side vanishes */
	m[1][0] = -2.0 * r1 * b1 * b1 * a1 * p * qa1 / z1;
	m[1][1] = -r1 * b1 * w1 / z1;
	m[1][2] = 0.0;
	rhs[1] = -2.0 * r1 * b1 * b1 * a1 * p * qa1 / z1;
	/* sigma_zz */
	m[2][0] = w1;
	m[2][1] = -2.0 * r1 * b1 * b1 * b1 * p * qb1 / z1;
	m[2][2] = -r2 * a2 / z1;
	rhs[2] = -w1;
	st = csolve(3, m, rhs, x);
	if (st != RW_OK)
		return st;
	r[0] = x[0];
	r[1] = x[1];
	r[2] = x[2];
	r[3] = 0.0;
	return RW_OK;
}

/* Fluid over fluid: u_z and pressure continuous, closed form
 * Rpp = (rho2 vp2 qa1 - rho1 vp1 qa2 ...) from the 2x2 system. */
static int fluid_fluid(const rw_reflect_medium *m1, const rw_reflect_medium *m2,
                       double p, double complex r[4])
{
	double a1 = m1->vp_ms, r1 = m1->rho_kgm3;
	double a2 = m2->vp_ms, r2 = m2->rho_kgm3;
	double complex qa1 = vslow(a1, p), qa2 = vslow(a2, p);
	/* u_z: a1 qa1 (1 - R) = a2 qa2 T; p: r1 a1 (1 + R) = r2 a2 T */
	double complex den = r2 * qa1 + r1 * qa2;

	if (cimag(qa1) == 0.0 && cimag(qa2) == 0.0) {
		/* both waves propagate: real arithmetic, not libgcc's
		 * complex division (the same values, correctly rounded) */
		double q1 = creal(qa1), q2 = creal(qa2), d = r2 * q1 + r1 * q2;
		if (!(fabs(d) > 0.0))
			return RW_ERANGE;
		r[0] = (r2 * q1 - r1 * q2) / d;
		r[1] = 0.0;
		r[2] = 2.0 * r1 * a1 * q1 / (a2 * d);
		r[3] = 0.0;
		return RW_OK;
	}
	if (!(cabs(den) > 0.0))
		return RW_ERANGE;
	r[0] = (r2 * qa1 - r1 * qa2) / den;
	r[1] = 0.0;
	r[2] = 2.0 * r1 * a1 * qa1 / (a2 * den);
	r[3] = 0.0;
	return RW_OK;
}

int rw_reflect_zoeppritz(const rw_reflect_medium *upper,
                         const rw_reflect_medium *lower, double theta_rad,
                         rw_reflect_pcoefs *out)
{
	double complex r[4];
	double p;
	int st, i;

	if (out == NULL)
		return RW_EDOM;
	set_nan(out);
	if (rw__medium_check(upper) != RW_OK ||
	    rw__medium_check(lower) != RW_OK)
		return RW_EDOM;
	if (!isfinite(theta_rad) || theta_rad < 0.0 || theta_rad > M_PI_2)
		return RW_EDOM;
	if (theta_rad == 0.0) {
		/* Normal incidence: no converted waves, and the P waves see
		 * only the impedances (Aki & Richards 1980, sec. 5.2, from
		 * memory): the limit of every branch below at p = 0, in two
		 * roundings instead of a solve. */
		double z1 = upper->rho_kgm3 * upper->vp_ms;
		double z2 = lower->rho_kgm3 * lower->vp_ms;
		double zs = z1 + z2;
		out->rpp = to_pub((z2 - z1) / zs);
		out->tpp = to_pub(2.0 * z1 / zs);
		out->rps = out->tps = to_pub(0.0);
		return RW_OK;
	}
	p = sin(theta_rad) / upper->vp_ms;
	if (upper->vs_ms > 0.0 && lower->vs_ms > 0.0)
		st = solid_solid(upper, lower, p, r);
	else if (lower->vs_ms > 0.0)
		st = fluid_solid(upper, lower, p, r);
	else if (upper->vs_ms > 0.0)
		st = solid_fluid(upper, lower, p, r);
	else
		st = fluid_fluid(upper, lower, p, r);
	if (st != RW_OK)
		return st;
	for (i = 0; i < 4; i++)
		if (!cfinite(r[i]))
			return RW_ERANGE;
	out->rpp = to_pub(r[0]);
	out->rps = to_pub(r[1]);
	out->tpp = to_pub(r[2]);
	out->tps = to_pub(r[3]);
	return RW_OK;
}

int rw_reflect_critical_angles(const rw_reflect_medium *upper,
                               const rw_reflect_medium *lower, double *p_rad,
                               double *s_rad)
{
	double cp = NAN, cs = NAN;
	int st = RW_EDOM;

	if (rw_reflect_medium_check(upper) != RW_OK ||
	    rw_reflect_medium_check(lower) != RW_OK)
		goto out;
	cp = lower->vp_ms > upper->vp_ms ? asin(upper->vp_ms / lower->vp_ms)
	                                 : HUGE_VAL;
	cs = lower->vs_ms > upper->vp_ms ? asin(upper->vp_ms / lower->vs_ms)
	                                 : HUGE_VAL;
	st = RW_OK;
out:
	if (p_rad != NULL)
		*p_rad = cp;
	if (s_rad != NULL)
		*s_rad = cs;
	return st;
}

int rw_reflect_angle_average(const rw_reflect_medium *upper,
                             const rw_reflect_medium *lower, double theta_rad,
                             double *avg_rad)
{
	double s;

	if (avg_rad == NULL)
		return RW_EDOM;
	*avg_rad = NAN;
	if (rw_reflect_medium_check(upper) != RW_OK ||
	    rw_reflect_medium_check(lower) != RW_OK)
		return RW_EDOM;
	if (!isfinite(theta_rad) || theta_rad < 0.0 || theta_rad > M_PI_2)
		return RW_EDOM;
	s = lower->vp_ms * sin(theta_rad) / upper->vp_ms;
	if (s >= 1.0)
		return RW_ERANGE;
	*avg_rad = 0.5 * (theta_rad + asin(s));
	return RW_OK;
}
