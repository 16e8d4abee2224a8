/* Pore-fluid correlations of Batzle & Wang 1992 (Geophysics 57(11),
 * 1396-1408) for water, NaCl brine, hydrocarbon gas, dead and live oil,
 * the IAPWS-IF97 saturation curve used to flag boiling water, and the
 * Wood / Voigt / Brie mixing of pore-fluid phases. Coefficients are
 * written from the paper as remembered ("from memory"); the water and
 * brine results are checked against IAPWS-95 and IAPWS-08 by
 * tests/reference/test_fluid_iapws.py, and the gas against the ideal-gas
 * limit in tests/unit/test_fluid.c. Contracts are in rockwire/fluid.h. */
#include <math.h>
#include <stddef.h>

#include "rockwire/fluid.h"
#include "rockwire/status.h"

/* Sets all three outputs to NaN (the failure convention). */
static void phase_nan(rw_fluid_phase *out)
{
	out->rho_kgm3 = NAN;
	out->k_pa = NAN;
	out->v_ms = NAN;
}

/* Fills k from rho (kg/m^3) and v (m/s); RW_ERANGE (NaN outputs) if
 * either is not a positive finite number. */
static int phase_finish(rw_fluid_phase *out, double rho_kgm3, double v_ms)
{
	if (!(isfinite(rho_kgm3) && rho_kgm3 > 0.0 && isfinite(v_ms) &&
	      v_ms > 0.0)) {
		phase_nan(out);
		return RW_ERANGE;
	}
	out->rho_kgm3 = rho_kgm3;
	out->v_ms = v_ms;
	out->k_pa = rho_kgm3 * v_ms * v_ms;
	return RW_OK;
}

static void warn_set(unsigned *warn, unsigned bits)
{
	if (warn)
		*warn = bits;
}

/* 1 when p_mpa is above the saturation pressure at t_degc for certain,
 * so rw_fluid_water_psat need not be evaluated (its square root and
 * divisions were a third of a brine sample). The bounds are just above
 * psat at the top of each temperature band (0.101418, 1.55467, 8.58771
 * and 22.064 MPa from rw_fluid_water_psat) and psat rises with T;
 * tests/unit/test_fluid.c checks on a fine grid that the warning is
 * unchanged. */
static int surely_liquid(double p_mpa, double t_degc)
{
	static const double band[4][2] = {{100.0, 0.1015},
	                                  {200.0, 1.5550},
	                                  {300.0, 8.5880},
	                                  {373.946, 22.065}};

	for (int i = 0; i < 4; i++)
		if (t_degc <= band[i][0])
			return p_mpa > band[i][1];
	return 0;
}

/* Warning bits shared by water and brine for pressure and temperature. */
static unsigned water_pt_warn(double p_mpa, double t_degc)
{
	unsigned w = 0;
	double psat;

	if (t_degc < RW_FLUID_WATER_T_MIN || t_degc > RW_FLUID_WATER_T_MAX)
		w |= RW_FLUID_WARN_T_RANGE;
	if (p_mpa < RW_FLUID_WATER_P_MIN || p_mpa > RW_FLUID_WATER_P_MAX)
		w |= RW_FLUID_WARN_P_RANGE;
	if (t_degc > 373.946)
		w |= RW_FLUID_WARN_VAPOUR; /* supercritical: no liquid */
	else if (!surely_liquid(p_mpa, t_degc) &&
	         rw_fluid_water_psat(t_degc, &psat) == RW_OK && p_mpa < psat)
		w |= RW_FLUID_WARN_VAPOUR;
	return w;
}

/* IAPWS-IF97 (IAPWS R7-97, 2007 revision) eq. 30, the saturation-pressure
 * equation of region 4, with the coefficients n1..n10 of its Table 34
 * (from memory; checked against iapws._PSat_T in the reference test).
 * t_degc in [0, 373.946]; result in MPa. */
int rw_fluid_water_psat(double t_degc, double *psat_mpa)
{
	static const double n[10] = {0.11670521452767e4,  -0.72421316703206e6,
	                             -0.17073846940092e2, 0.12020824702470e5,
	                             -0.32325550322333e7, 0.14915108613530e2,
	                             -0.48232657361591e4, 0.40511340542057e6,
	                             -0.23855557567849,   0.65017534844798e3};
	double ts, th, a, b, c, x;

	if (!(t_degc >= 0.0 && t_degc <= 373.946)) {
		*psat_mpa = NAN;
		return RW_EDOM;
	}
	ts = t_degc + RW_FLUID_KELVIN;
	th = ts + n[8] / (ts - n[9]);
	a = th * th + n[0] * th + n[1];
	b = n[2] * th * th + n[3] * th + n[4];
	c = n[5] * th * th + n[6] * th + n[7];
	x = 2.0 * c / (-b + sqrt(b * b - 4.0 * a * c));
	*psat_mpa = x * x * x * x;
	return RW_OK;
}

/* Pure-water density, g/cm^3, Batzle & Wang 1992 eq. 27a (from memory).
 * T degC, P MPa. */
static double bw_water_rho_gcc(double p, double t)
{
	return 1.0 + 1e-6 * (-80.0 * t - 3.3 * t * t + 0.00175 * t * t * t +
	                     489.0 * p - 2.0 * t * p + 0.016 * t * t * p -
	                     1.3e-5 * t * t * t * p - 0.333 * p * p -
	                     0.002 * t * p * p);
}

/* Pure-water velocity, m/s, Batzle & Wang 1992 eq. 28: sum over i = 0..4,
 * j = 0..3 of w_ij T^i P^j, with their Table 1 (from memory). */
static double bw_water_v_ms(double p, double t)
{
	static const double w[5][4] = {
	    {1402.85, 1.524, 3.437e-3, -1.197e-5},
	    {4.871, -0.0111, 1.739e-4, -1.628e-6},
	    {-0.04783, 2.747e-4, -2.135e-6, 1.237e-8},
	    {1.487e-4, -6.503e-7, -1.455e-8, 1.327e-10},
	    {-2.197e-7, 7.987e-10, 5.230e-11, -4.614e-13},
	};
	double v = 0.0, ti = 1.0;
	int i, j;

	for (i = 0; i < 5; i++) {
		double pj = 1.0;
		for (j = 0; j < 4; j++) {
			v += w[i][j] * ti * pj;
			pj *= p;
		}
		ti *= t;
	}
	return v;
}

/* Checks shared by water and brine: finite, p > 0, liquid temperature. */
static int water_domain(double p_mpa, double t_degc)
{
	if (!isfinite(p_mpa) || !isfinite(t_degc) || p_mpa <= 0.0 ||
	    t_degc < RW_FLUID_WATER_T_LIQUID_MIN)
		return RW_EDOM;
	return RW_OK;
}

int rw_fluid_water_props(double p_mpa, double t_degc, rw_fluid_phase *out,
                         unsigned *warn)
{
	if (water_domain(p_mpa, t_degc) != RW_OK) {
		phase_nan(out);
		warn_set(warn, 0);
		return RW_EDOM;
	}
	warn_set(warn, water_pt_warn(p_mpa, t_degc));
	return phase_finish(out, 1000.0 * bw_water_rho_gcc(p_mpa, t_degc),
	                    bw_water_v_ms(p_mpa, t_degc));
}

int rw_fluid_brine_props(double p_mpa, double t_degc, double sal_frac,
                         rw_fluid_phase *out, unsigned *warn)
{
	double p = p_mpa, t = t_degc, s = sal_frac, rho, v;
	unsigned w;

	if (water_domain(p, t) != RW_OK || !isfinite(s) || s < 0.0 ||
	    s > RW_FLUID_BRINE_SAL_LIMIT) {
		phase_nan(out);
		warn_set(warn, 0);
		return RW_EDOM;
	}
	w = water_pt_warn(p, t);
	if (s > RW_FLUID_BRINE_SAL_MAX)
		w |= RW_FLUID_WARN_SAL_RANGE;
	warn_set(warn, w);

	/* B&W eq. 27b (from memory), g/cm^3. */
	rho = bw_water_rho_gcc(p, t) +
	      s * (0.668 + 0.44 * s +
	           1e-6 * (300.0 * p - 2400.0 * p * s +
	                   t * (80.0 + 3.0 * t - 3300.0 * s - 13.0 * p +
	                        47.0 * p * s)));
	/* B&W eq. 29 (from memory), m/s. */
	v = bw_water_v_ms(p, t) +
	    s * (1170.0 - 9.6 * t + 0.055 * t * t - 8.5e-5 * t * t * t +
	         2.6 * p - 0.0029 * t * p - 0.0476 * p * p) +
	    pow(s, 1.5) * (780.0 - 10.0 * p + 0.16 * p * p) - 1820.0 * s * s;
	return phase_finish(out, 1000.0 * rho, v);
}

int rw_fluid_gas_props(double p_mpa, double t_degc, double gravity,
                       rw_fluid_phase *out, double *z, unsigned *warn)
{
	double ta, tpc, ppc, tpr, ppr, a, b, c, d, e, zz, dzdp, gam, den;
	double rho;
	unsigned w = 0;

	if (!isfinite(p_mpa) || !isfinite(t_degc) || !isfinite(gravity) ||
	    p_mpa <= 0.0 || t_degc <= -RW_FLUID_KELVIN || gravity <= 0.0 ||
	    gravity >= 12.0)
		goto domain;
	ta = t_degc + RW_FLUID_KELVIN;
	/* B&W eqs. 9a, 9b (from memory): pseudo-critical T in K, p in MPa. */
	tpc = 94.72 + 170.75 * gravity;
	ppc = 4.892 - 0.4048 * gravity;
	tpr = ta / tpc;
	ppr = p_mpa / ppc;

	if (gravity < RW_FLUID_GAS_G_MIN || gravity > RW_FLUID_GAS_G_MAX)
		w |= RW_FLUID_WARN_G_RANGE;
	if (tpr < RW_FLUID_GAS_TPR_MIN || tpr > RW_FLUID_GAS_TPR_MAX ||
	    ppr > RW_FLUID_GAS_PPR_MAX)
		w |= RW_FLUID_WARN_PR_RANGE;
	if (t_degc < RW_FLUID_GAS_T_MIN || t_degc > RW_FLUID_GAS_T_MAX)
		w |= RW_FLUID_WARN_T_RANGE;
	if (p_mpa > RW_FLUID_GAS_P_MAX)
		w |= RW_FLUID_WARN_P_RANGE;
	warn_set(warn, w);

	/* B&W eqs. 10b, 10c (from memory):
	 * Z = a P_pr + b + E, E = c exp(-d P_pr^1.2 / T_pr). */
	a = 0.03 + 0.00527 * pow(3.5 - tpr, 3.0);
	b = 0.642 * tpr - 0.007 * pow(tpr, 4.0) - 0.52;
	c = 0.109 * (3.85 - tpr) * (3.85 - tpr);
	d = 0.45 + 8.0 * (0.56 - 1.0 / tpr) * (0.56 - 1.0 / tpr);
	e = c * exp(-d * pow(ppr, 1.2) / tpr);
	zz = a * ppr + b + e;
	dzdp = a - e * d * 1.2 * pow(ppr, 0.2) / tpr;
	/* B&W eq. 11b (from memory). */
	gam = 0.85 + 5.6 / (ppr + 2.0) + 27.1 / ((ppr + 3.5) * (ppr + 3.5)) -
	      8.7 * exp(-0.65 * (ppr + 1.0));
	den = 1.0 - ppr / zz * dzdp;
	if (!(zz > 0.0) || !(den > 0.0) || !(gam > 0.0)) {
		phase_nan(out);
		if (z)
			*z = NAN;
		return RW_ERANGE;
	}
	/* B&W eq. 10a with M = G M_air: rho = M p / (Z R T), SI units. */
	rho = gravity * RW_FLUID_AIR_MOLAR_MASS * p_mpa * 1e6 /
	      (zz * RW_FLUID_GAS_CONSTANT * ta);
	if (z)
		*z = zz;
	/* B&W eq. 11a: K_S = p gamma_0 / (1 - P_pr/Z dZ/dP_pr), Pa. */
	out->rho_kgm3 = rho;
	out->k_pa = p_mpa * 1e6 * gam / den;
	out->v_ms = sqrt(out->k_pa / rho);
	if (!isfinite(out->v_ms) || !(out->v_ms > 0.0)) {
		phase_nan(out);
		if (z)
			*z = NAN;
		return RW_ERANGE;
	}
	return RW_OK;
domain:
	phase_nan(out);
	if (z)
		*z = NAN;
	warn_set(warn, 0);
	return RW_EDOM;
}

/* Warning bits shared by dead and live oil. */
static unsigned oil_warn(double p_mpa, double t_degc, double api)
{
	unsigned w = 0;

	if (api < RW_FLUID_OIL_API_MIN || api > RW_FLUID_OIL_API_MAX)
		w |= RW_FLUID_WARN_API_RANGE;
	if (t_degc < RW_FLUID_OIL_T_MIN || t_degc > RW_FLUID_OIL_T_MAX)
		w |= RW_FLUID_WARN_T_RANGE;
	if (p_mpa > RW_FLUID_OIL_P_MAX)
		w |= RW_FLUID_WARN_P_RANGE;
	return w;
}

/* B&W eqs. 20a / 20b (from memory): oil velocity, m/s, from a (pseudo-)
 * density rho in g/cm^3 (< 1.08), T degC, P MPa. */
static double bw_oil_v_ms(double rho, double p, double t)
{
	return 2096.0 * sqrt(rho / (2.6 - rho)) - 3.7 * t + 4.64 * p +
	       0.0115 * (4.12 * sqrt(1.08 / rho - 1.0) - 1.0) * t * p;
}

/* rho_0 from API gravity, g/cm^3 (definition of API gravity). */
static double api_rho0_gcc(double api)
{
	return 141.5 / (api + 131.5);
}

int rw_fluid_deadoil_props(double p_mpa, double t_degc, double api,
                           rw_fluid_phase *out, unsigned *warn)
{
	double r0, rp, rho, p = p_mpa, t = t_degc;

	if (!isfinite(p) || !isfinite(t) || !isfinite(api) || p <= 0.0 ||
	    t <= -RW_FLUID_KELVIN || api <= 0.5) {
		phase_nan(out);
		warn_set(warn, 0);
		return RW_EDOM;
	}
	warn_set(warn, oil_warn(p, t, api));
	r0 = api_rho0_gcc(api);
	/* B&W eq. 18 (from memory): isothermal pressure correction. */
	rp = r0 +
	     (0.00277 * p - 1.71e-7 * p * p * p) * (r0 - 1.15) * (r0 - 1.15) +
	     3.49e-4 * p;
	/* B&W eq. 19 (from memory): thermal expansion. */
	rho = rp / (0.972 + 3.81e-4 * pow(t + 17.78, 1.175));
	return phase_finish(out, 1000.0 * rho, bw_oil_v_ms(r0, p, t));
}

int rw_fluid_liveoil_props(double p_mpa, double t_degc, double api,
                           double gor_ll, double gas_gravity,
                           rw_fluid_phase *out, double *b0, unsigned *warn)
{
	double p = p_mpa, t = t_degc, g = gas_gravity, rg = gor_ll;
	double r0, bo, rhog, rhop, rgmax, base;
	unsigned w;
	int st;

	if (!isfinite(p) || !isfinite(t) || !isfinite(api) || !isfinite(rg) ||
	    !isfinite(g) || p <= 0.0 || t <= -RW_FLUID_KELVIN || api <= 0.5 ||
	    rg < 0.0 || g <= 0.0)
		goto domain;
	r0 = api_rho0_gcc(api);
	/* B&W eq. 23 (from memory): formation volume factor. */
	base = 2.4 * rg * sqrt(g / r0) + t + 17.8;
	if (!(base > 0.0))
		goto domain;
	bo = 0.972 + 0.00038 * pow(base, 1.175);
	/* B&W eq. 22 (from memory): pseudo-density for the velocity. */
	rhop = r0 / bo / (1.0 + 0.001 * rg);
	if (!(rhop > 0.0 && rhop < 1.08))
		goto domain;
	/* B&W eq. 24 (from memory): density of the gas-saturated oil. */
	rhog = (r0 + 0.0012 * g * rg) / bo;

	w = oil_warn(p, t, api);
	if (g < RW_FLUID_GAS_G_MIN || g > RW_FLUID_GAS_G_MAX)
		w |= RW_FLUID_WARN_G_RANGE;
	/* B&W eq. 21 (from memory): the most gas the oil can dissolve. */
	rgmax = 2.03 * g * pow(p * exp(0.02878 * api - 0.00377 * t), 1.205);
	if (rg > rgmax) {
		/* Free gas: no single live-oil phase to describe. */
		w |= RW_FLUID_WARN_GOR_MAX;
		warn_set(warn, w);
		phase_nan(out);
		if (b0)
			*b0 = NAN;
		return RW_ERANGE;
	}
	warn_set(warn, w);

	st = phase_finish(out, 1000.0 * rhog, bw_oil_v_ms(rhop, p, t));
	if (b0)
		*b0 = st == RW_OK ? bo : NAN;
	return st;
domain:
	phase_nan(out);
	if (b0)
		*b0 = NAN;
	warn_set(warn, 0);
	return RW_EDOM;
}

/* Validates a phase set for mixing; see the contract in fluid.h. */
static int mix_check(size_t n, const rw_fluid_phase *phase, const double *sat)
{
	double sum = 0.0;
	size_t i;

	if (n == 0 || phase == NULL || sat == NULL)
		return RW_EINVAL;
	for (i = 0; i < n; i++) {
		if (!isfinite(sat[i]) || sat[i] < 0.0 || sat[i] > 1.0)
			return RW_EDOM;
		if (!isfinite(phase[i].k_pa) || !(phase[i].k_pa > 0.0) ||
		    !isfinite(phase[i].rho_kgm3) || !(phase[i].rho_kgm3 > 0.0))
			return RW_EDOM;
		sum += sat[i];
	}
	if (fabs(sum - 1.0) > 1e-6)
		return RW_EINVAL;
	return RW_OK;
}

static double mix_rho(size_t n, const rw_fluid_phase *phase, const double *sat)
{
	double r = 0.0;
	size_t i;

	for (i = 0; i < n; i++)
		r += sat[i] * phase[i].rho_kgm3;
	return r;
}

static int mix_out(rw_fluid_phase *out, double k, double rho)
{
	out->k_pa = k;
	out->rho_kgm3 = rho;
	out->v_ms = sqrt(k / rho);
	return RW_OK;
}

int rw_fluid_mix_wood(size_t n, const rw_fluid_phase *phase, const double *sat,
                      rw_fluid_phase *out)
{
	double c = 0.0;
	size_t i;
	int st = mix_check(n, phase, sat);

	if (st != RW_OK) {
		phase_nan(out);
		return st;
	}
	for (i = 0; i < n; i++)
		c += sat[i] / phase[i].k_pa;
	return mix_out(out, 1.0 / c, mix_rho(n, phase, sat));
}

int rw_fluid_mix_voigt(size_t n, const rw_fluid_phase *phase, const double *sat,
                       rw_fluid_phase *out)
{
	double k = 0.0;
	size_t i;
	int st = mix_check(n, phase, sat);

	if (st != RW_OK) {
		phase_nan(out);
		return st;
	}
	for (i = 0; i < n; i++)
		k += sat[i] * phase[i].k_pa;
	return mix_out(out, k, mix_rho(n, phase, sat));
}

int rw_fluid_mix_brie(size_t n, const rw_fluid_phase *phase, const double *sat,
                      size_t i_gas, double exponent, rw_fluid_phase *out)
{
	double sg, sl = 0.0, c = 0.0, kliq, k;
	size_t i;
	int st = mix_check(n, phase, sat);

	if (st == RW_OK && !(isfinite(exponent) && exponent >= 1.0))
		st = RW_EDOM;
	if (st != RW_OK) {
		phase_nan(out);
		return st;
	}
	if (i_gas >= n)
		return rw_fluid_mix_wood(n, phase, sat, out); /* no gas */
	sg = sat[i_gas];
	for (i = 0; i < n; i++)
		if (i != i_gas)
			sl += sat[i];
	if (sl <= 0.0) {
		k = phase[i_gas].k_pa; /* gas only */
	} else {
		/* Brie et al. 1995: the liquids mix uniformly (Wood), the gas
		 * in patches. */
		for (i = 0; i < n; i++)
			if (i != i_gas)
				c += (sat[i] / sl) / phase[i].k_pa;
		kliq = 1.0 / c;
		k = (kliq - phase[i_gas].k_pa) * pow(1.0 - sg, exponent) +
		    phase[i_gas].k_pa;
	}
	return mix_out(out, k, mix_rho(n, phase, sat));
}
