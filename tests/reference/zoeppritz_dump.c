/* Prints the core's exact P-wave coefficients as JSON lines for the numpy
 * cross-check (tests/reference/test_zoeppritz_numpy.py). With the argument
 * "-" it reads lines "vp1 vs1 rho1 vp2 vs2 rho2 theta_rad" from stdin;
 * without arguments it prints a fixed pseudo-random set of interfaces and
 * angles (solids and fluids, pre- and post-critical). Each output line is
 *   {"in":[vp1,vs1,rho1,vp2,vs2,rho2,theta],"status":s,
 *    "rpp":[re,im],"rps":[re,im],"tpp":[re,im],"tps":[re,im]}
 * with null for non-finite numbers. Exit status 1 on a malformed line. */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>

#include "rockwire/reflect.h"

static void num(double x)
{
	if (isfinite(x))
		printf("%.17g", x);
	else
		fputs("null", stdout);
}

static void pair(const char *name, rw_reflect_cplx c)
{
	printf(",\"%s\":[", name);
	num(c.re);
	putchar(',');
	num(c.im);
	putchar(']');
}

static void emit(const double v[7])
{
	rw_reflect_medium u, l;
	rw_reflect_pcoefs c;
	int st, i;

	u.vp_ms = v[0];
	u.vs_ms = v[1];
	u.rho_kgm3 = v[2];
	l.vp_ms = v[3];
	l.vs_ms = v[4];
	l.rho_kgm3 = v[5];
	st = rw_reflect_zoeppritz(&u, &l, v[6], &c);
	fputs("{\"in\":[", stdout);
	for (i = 0; i < 7; i++) {
		if (i)
			putchar(',');
		num(v[i]);
	}
	printf("],\"status\":%d", st);
	pair("rpp", c.rpp);
	pair("rps", c.rps);
	pair("tpp", c.tpp);
	pair("tps", c.tps);
	fputs("}\n", stdout);
}

static double urand(uint64_t *s, double lo, double hi)
{
	*s = *s * 6364136223846793005ULL + 1442695040888963407ULL;
	return lo + (hi - lo) * (double)(*s >> 11) / 9007199254740992.0;
}

static void fixed_set(void)
{
	uint64_t s = 20260101;
	double v[7];
	int i;

	for (i = 0; i < 400; i++) {
		v[0] = urand(&s, 1400.0, 6000.0);
		v[1] = (i % 4 == 1) ? 0.0 : v[0] * urand(&s, 0.3, 0.7);
		v[2] = urand(&s, 1000.0, 2900.0);
		v[3] = urand(&s, 1400.0, 6000.0);
		v[4] = (i % 4 == 2) ? 0.0 : v[3] * urand(&s, 0.3, 0.7);
		v[5] = urand(&s, 1000.0, 2900.0);
		v[6] = urand(&s, 0.0, M_PI_2);
		if (i % 4 == 3 && i % 8 == 7)
			v[1] = v[4] = 0.0;
		emit(v);
	}
}

int main(int argc, char **argv)
{
	char line[512];
	long lineno = 0;

	gsl_set_error_handler_off();
	if (argc < 2) {
		fixed_set();
		return 0;
	}
	if (strcmp(argv[1], "-") != 0) {
		fprintf(stderr, "usage: zoeppritz_dump [-]\n");
		return 2;
	}
	while (fgets(line, sizeof(line), stdin) != NULL) {
		double v[7];
		char *p = line, *end;
		int i;

		lineno++;
		if (strspn(line, " \t\r\n") == strlen(line))
			continue;
		for (i = 0; i < 7; i++) {
			v[i] = strtod(p, &end);
			if (end == p) {
				fprintf(stderr,
				        "line %ld: field %d is not a "
				        "number\n",
				        lineno, i + 1);
				return 1;
			}
			p = end;
		}
		if (strspn(p, " \t\r\n") != strlen(p)) {
			fprintf(stderr, "line %ld: more than 7 fields\n",
			        lineno);
			return 1;
		}
		emit(v);
	}
	return 0;
}
