/* Prints the core's pure-water and brine properties (Batzle & Wang 1992)
 * and the water saturation pressure (IAPWS-IF97 eq. 30) on a grid, one
 * JSON object per line, for tests/reference/test_fluid_iapws.py to
 * compare with IAPWS-95 and IAPWS-08. Grid: T = 0..350 degC in steps of
 * 5 degC, p = 0.1 MPa and 5..100 MPa in steps of 5 MPa; brine salinities
 * 0.035 (for IAPWS-08) and 0.1, 0.2. Output fields: kind, p_mpa, t_degc,
 * sal, status, warn, rho_kgm3, v_ms (null when not finite). */
#include <math.h>
#include <stdio.h>

#include <gsl/gsl_errno.h>

#include "rockwire/fluid.h"
#include "rockwire/status.h"

static void num(const char *key, double x)
{
	if (isfinite(x))
		printf(",\"%s\":%.17g", key, x);
	else
		printf(",\"%s\":null", key);
}

static void line(const char *kind, double p, double t, double s, int st,
                 unsigned warn, const rw_fluid_phase *ph)
{
	printf("{\"kind\":\"%s\"", kind);
	num("p_mpa", p);
	num("t_degc", t);
	num("sal", s);
	printf(",\"status\":%d,\"warn\":%u", st, warn);
	num("rho_kgm3", ph->rho_kgm3);
	num("v_ms", ph->v_ms);
	printf("}\n");
}

int main(void)
{
	static const double sal[] = {0.035, 0.1, 0.2};
	rw_fluid_phase ph;
	unsigned warn;
	double psat;
	int it, ip, is, st;

	gsl_set_error_handler_off();
	for (it = 0; it <= 70; it++) {
		double t = 5.0 * it;
		for (ip = 0; ip <= 20; ip++) {
			double p = ip == 0 ? 0.1 : 5.0 * ip;
			st = rw_fluid_water_props(p, t, &ph, &warn);
			line("water", p, t, 0.0, st, warn, &ph);
			for (is = 0; is < 3; is++) {
				st = rw_fluid_brine_props(p, t, sal[is], &ph,
				                          &warn);
				line("brine", p, t, sal[is], st, warn, &ph);
			}
		}
		st = rw_fluid_water_psat(t, &psat);
		printf("{\"kind\":\"psat\",\"t_degc\":%.17g,\"status\":%d", t,
		       st);
		num("psat_mpa", psat);
		printf("}\n");
	}
	return 0;
}
