/* A program that links the installed compute core, as an embedded or
 * in-process user would: no daemon, no JSON. Built by test_install.py
 * with `pkg-config --cflags --libs rockwire`. Prints quartz's elastic set
 * from its table entry, and the Gassmann-saturated rock of an invented
 * frame. */
#include <stdio.h>

#include "rockwire/elastic.h"
#include "rockwire/mineral.h"
#include "rockwire/rock.h"
#include "rockwire/version.h"

int main(void)
{
	rw_mineral q;
	rw_elastic e;
	rw_rock_subst s;
	unsigned why = 0;

	if (rw_mineral_find("quartz", NULL, &q) != RW_OK)
		return 1;
	if (rw_elastic_from_moduli(q.rho_kgm3, q.k_pa + 4.0 / 3.0 * q.mu_pa,
	                           q.mu_pa, &e, &why) != RW_OK)
		return 2;
	if (rw_rock_gassmann_frame(10e9, 8e9, 0.25, q.k_pa, q.rho_kgm3, 2.8e9,
	                           1030, &s, NULL) != RW_OK)
		return 3;
	printf("version %s %d\n", RW_VERSION_STRING, RW_VERSION_NUMBER);
	printf("quartz vp %.6f vs %.6f\n", e.vp, e.vs);
	printf("saturated vp %.6f\n", s.vp_ms);
	return 0;
}
