/* Rock strength correlations for the rockwire core: UCS of sandstone and
 * shale from sonic, modulus or porosity as compiled by Chang, Zoback &
 * Khaksar 2006 (each cited to its original source as that paper gives
 * it), dynamic-to-static Young's modulus, and linear calibrations. The
 * formulas are evaluated in the units they were published in (MPa, GPa,
 * us/ft, km/s); the API is SI. Coefficients and calibration spans are
 * from memory where the table says so. Contracts are in
 * rockwire/strength.h. */
#include <math.h>
#include <stddef.h>
#include <string.h>

#include "rockwire/strength.h"

/* Unit factors (exact by definition: 1 ft = 0.3048 m). */
#define US_PER_FT_SM (1e-6 / 0.3048) /* 1 us/ft in s/m */
#define GPA          1e9
#define MPA          1e6

/* Note shared by spans that no source states numerically. */
#define NOTE_APPROX                                                            \
	"approximate span of the rock described; the compilation states "      \
	"no numeric span (from memory)"

static const rw_strength_info ucs_info[RW_UCS_COUNT] = {
    [RW_UCS_FREYBURG_1972] = {"freyburg_1972", RW_STRENGTH_SANDSTONE,
                              RW_STRENGTH_IN_VP, "UCS = 0.035 Vp - 31.5",
                              "Freyburg 1972, as listed by Chang et al. 2006",
                              "Thuringia, Germany; sandstones", 1500.0, 5500.0,
                              NOTE_APPROX},
    [RW_UCS_MCNALLY_1987] = {"mcnally_1987", RW_STRENGTH_SANDSTONE,
                             RW_STRENGTH_IN_DT, "UCS = 1200 exp(-0.036 dt)",
                             "McNally 1987, as listed by Chang et al. 2006",
                             "Bowen Basin, Australia; fine-grained, "
                             "consolidated and unconsolidated sandstones",
                             60.0 * US_PER_FT_SM, 130.0 * US_PER_FT_SM,
                             NOTE_APPROX},
    [RW_UCS_GULF_SANDSTONE] = {"gulf_coast_sandstone", RW_STRENGTH_SANDSTONE,
                               RW_STRENGTH_IN_DT, "UCS = 1.4138e7 dt^-3",
                               "unpublished, as listed by Chang et al. 2006",
                               "Gulf Coast; weak and unconsolidated "
                               "sandstones",
                               100.0 * US_PER_FT_SM, 180.0 * US_PER_FT_SM,
                               NOTE_APPROX},
    [RW_UCS_MOOS_1999] = {"moos_1999", RW_STRENGTH_SANDSTONE, RW_STRENGTH_IN_M,
                          "UCS = 1.745e-9 rho Vp^2 - 21",
                          "Moos et al. 1999, as listed by Chang et al. 2006",
                          "Cook Inlet, Alaska; coarse-grained sands and "
                          "conglomerates",
                          15.0 * GPA, 50.0 * GPA, NOTE_APPROX},
    [RW_UCS_BRADFORD_1998] = {"bradford_1998", RW_STRENGTH_SANDSTONE,
                              RW_STRENGTH_IN_E_STATIC, "UCS = 2.28 + 4.1089 E",
                              "Bradford et al. 1998, as listed by Chang et "
                              "al. 2006",
                              "worldwide; sandstones", 1.0 * GPA, 40.0 * GPA,
                              NOTE_APPROX},
    [RW_UCS_VERNIK_1993] = {"vernik_1993", RW_STRENGTH_SANDSTONE,
                            RW_STRENGTH_IN_PHI, "UCS = 254 (1 - 2.7 phi)^2",
                            "Vernik et al. 1993, as listed by Chang et al. "
                            "2006",
                            "sedimentary basins worldwide; very clean, "
                            "well-consolidated sandstones",
                            0.0, 0.30,
                            "phi < 0.3 as the compilation states it (from "
                            "memory)"},
    [RW_UCS_HORSRUD_2001] = {"horsrud_2001", RW_STRENGTH_SHALE,
                             RW_STRENGTH_IN_DT, "UCS = 0.77 (304.8/dt)^2.93",
                             "Horsrud 2001, as listed by Chang et al. 2006",
                             "North Sea; mostly high-porosity Tertiary "
                             "shales",
                             87.0 * US_PER_FT_SM, 170.0 * US_PER_FT_SM,
                             NOTE_APPROX},
    [RW_UCS_GOM_PLIOCENE] = {"gulf_of_mexico_pliocene", RW_STRENGTH_SHALE,
                             RW_STRENGTH_IN_DT, "UCS = 0.43 (304.8/dt)^3.2",
                             "unpublished, as listed by Chang et al. 2006",
                             "Gulf of Mexico; Pliocene and younger shales",
                             100.0 * US_PER_FT_SM, 200.0 * US_PER_FT_SM,
                             NOTE_APPROX},
    [RW_UCS_GLOBAL_SHALE] = {"global_shale", RW_STRENGTH_SHALE,
                             RW_STRENGTH_IN_DT, "UCS = 1.35 (304.8/dt)^2.6",
                             "unpublished, as listed by Chang et al. 2006",
                             "global; shales", 60.0 * US_PER_FT_SM,
                             180.0 * US_PER_FT_SM, NOTE_APPROX},
    [RW_UCS_GOM_SHALE] = {"gulf_of_mexico_shale", RW_STRENGTH_SHALE,
                          RW_STRENGTH_IN_DT, "UCS = 0.5 (304.8/dt)^3",
                          "unpublished, as listed by Chang et al. 2006",
                          "Gulf of Mexico; shales", 80.0 * US_PER_FT_SM,
                          200.0 * US_PER_FT_SM, NOTE_APPROX},
    [RW_UCS_LAL_1999] = {"lal_1999", RW_STRENGTH_SHALE, RW_STRENGTH_IN_DT,
                         "UCS = 10 (304.8/dt - 1)",
                         "Lal 1999, as listed by Chang et al. 2006",
                         "North Sea; high-porosity Tertiary shales",
                         87.0 * US_PER_FT_SM, 170.0 * US_PER_FT_SM,
                         NOTE_APPROX},
    [RW_UCS_HORSRUD_2001_E] = {"horsrud_2001_modulus", RW_STRENGTH_SHALE,
                               RW_STRENGTH_IN_E_STATIC, "UCS = 7.97 E^0.91",
                               "Horsrud 2001, as listed by Chang et al. 2006",
                               "North Sea; mostly high-porosity Tertiary "
                               "shales",
                               0.5 * GPA, 15.0 * GPA, NOTE_APPROX},
    [RW_UCS_HORSRUD_2001_PHI] = {"horsrud_2001_porosity", RW_STRENGTH_SHALE,
                                 RW_STRENGTH_IN_PHI, "UCS = 2.922 phi^-0.96",
                                 "Horsrud 2001, as listed by Chang et al. "
                                 "2006",
                                 "North Sea; mostly high-porosity Tertiary "
                                 "shales",
                                 0.10, 0.60, NOTE_APPROX},
};

static const rw_strength_info estat_info[RW_ESTAT_COUNT] = {
    [RW_ESTAT_EISSA_KAZI_1988] = {"eissa_kazi_1988", RW_STRENGTH_ANY,
                                  RW_STRENGTH_IN_E_DYNAMIC,
                                  "Es = 0.74 Ed - 0.82", "Eissa & Kazi 1988",
                                  "a wide range of rock types (sedimentary "
                                  "and others)",
                                  5.0 * GPA, 100.0 * GPA, NOTE_APPROX},
    [RW_ESTAT_HORSRUD_2001] = {"horsrud_2001", RW_STRENGTH_SHALE,
                               RW_STRENGTH_IN_VP, "Es = 0.076 Vp^3.23",
                               "Horsrud 2001", "North Sea shales", 1800.0,
                               3600.0, NOTE_APPROX},
};

const rw_strength_info *rw_strength_ucs_info(int id)
{
	if (id < 0 || id >= RW_UCS_COUNT)
		return NULL;
	return &ucs_info[id];
}

int rw_strength_ucs_find(const char *name)
{
	int i;

	if (!name)
		return -1;
	for (i = 0; i < RW_UCS_COUNT; i++)
		if (strcmp(ucs_info[i].name, name) == 0)
			return i;
	return -1;
}

const rw_strength_info *rw_strength_e_static_info(int id)
{
	if (id < 0 || id >= RW_ESTAT_COUNT)
		return NULL;
	return &estat_info[id];
}

int rw_strength_e_static_find(const char *name)
{
	int i;

	if (!name)
		return -1;
	for (i = 0; i < RW_ESTAT_COUNT; i++)
		if (strcmp(estat_info[i].name, name) == 0)
			return i;
	return -1;
}

static int pos(double x)
{
	return isfinite(x) && x > 0.0;
}

/* The input value a correlation uses, in SI, or NaN when it is missing or
 * outside its domain. */
static double input_of(int input, const rw_strength_in *in)
{
	switch (input) {
	case RW_STRENGTH_IN_DT: return pos(in->dt_sm) ? in->dt_sm : NAN;
	case RW_STRENGTH_IN_VP: return pos(in->vp_ms) ? in->vp_ms : NAN;
	case RW_STRENGTH_IN_M:
		return pos(in->rho_kgm3) && pos(in->vp_ms)
		           ? in->rho_kgm3 * in->vp_ms * in->vp_ms
		           : NAN;
	case RW_STRENGTH_IN_E_STATIC:
		return pos(in->e_static_pa) ? in->e_static_pa : NAN;
	case RW_STRENGTH_IN_E_DYNAMIC:
		return pos(in->e_dyn_pa) ? in->e_dyn_pa : NAN;
	case RW_STRENGTH_IN_PHI:
		return pos(in->phi) && in->phi < 1.0 ? in->phi : NAN;
	default: return NAN;
	}
}

/* RW_STRENGTH_WARN_RANGE when x is outside the span of *inf. */
static unsigned span_warn(const rw_strength_info *inf, double x)
{
	return x < inf->in_min || x > inf->in_max ? RW_STRENGTH_WARN_RANGE : 0u;
}

int rw_strength_ucs(int id, const rw_strength_in *in, double *ucs_pa,
                    unsigned *warn)
{
	const rw_strength_info *inf = rw_strength_ucs_info(id);
	double x, u, dt = NAN, vk = NAN, e = NAN;

	if (warn)
		*warn = 0;
	*ucs_pa = NAN;
	if (!inf)
		return RW_EINVAL;
	x = input_of(inf->input, in);
	if (isnan(x))
		return RW_EDOM;
	if (inf->input == RW_STRENGTH_IN_DT) {
		dt = x / US_PER_FT_SM; /* us/ft */
		vk = 304.8 / dt;       /* km/s */
	} else if (inf->input == RW_STRENGTH_IN_E_STATIC) {
		e = x / GPA;
	}
	switch (id) {
	case RW_UCS_FREYBURG_1972: u = 0.035 * x - 31.5; break;
	case RW_UCS_MCNALLY_1987: u = 1200.0 * exp(-0.036 * dt); break;
	case RW_UCS_GULF_SANDSTONE: u = 1.4138e7 / (dt * dt * dt); break;
	case RW_UCS_MOOS_1999: u = 1.745e-9 * x - 21.0; break;
	case RW_UCS_BRADFORD_1998: u = 2.28 + 4.1089 * e; break;
	case RW_UCS_VERNIK_1993:
		if (x > 1.0 / 2.7)
			return RW_ERANGE;
		u = 254.0 * (1.0 - 2.7 * x) * (1.0 - 2.7 * x);
		break;
	case RW_UCS_HORSRUD_2001: u = 0.77 * pow(vk, 2.93); break;
	case RW_UCS_GOM_PLIOCENE: u = 0.43 * pow(vk, 3.2); break;
	case RW_UCS_GLOBAL_SHALE: u = 1.35 * pow(vk, 2.6); break;
	case RW_UCS_GOM_SHALE: u = 0.5 * vk * vk * vk; break;
	case RW_UCS_LAL_1999: u = 10.0 * (vk - 1.0); break;
	case RW_UCS_HORSRUD_2001_E: u = 7.97 * pow(e, 0.91); break;
	case RW_UCS_HORSRUD_2001_PHI: u = 2.922 * pow(x, -0.96); break;
	default: return RW_EINVAL;
	}
	if (!isfinite(u) || !(u > 0.0))
		return RW_ERANGE;
	*ucs_pa = u * MPA;
	if (warn)
		*warn = span_warn(inf, x);
	return RW_OK;
}

int rw_strength_e_static(int id, const rw_strength_in *in, double *e_pa,
                         unsigned *warn)
{
	const rw_strength_info *inf = rw_strength_e_static_info(id);
	double x, es;
	unsigned w;

	if (warn)
		*warn = 0;
	*e_pa = NAN;
	if (!inf)
		return RW_EINVAL;
	x = input_of(inf->input, in);
	if (isnan(x))
		return RW_EDOM;
	switch (id) {
	case RW_ESTAT_EISSA_KAZI_1988: es = 0.74 * (x / GPA) - 0.82; break;
	case RW_ESTAT_HORSRUD_2001: es = 0.076 * pow(x / 1000.0, 3.23); break;
	default: return RW_EINVAL;
	}
	if (!isfinite(es) || !(es > 0.0))
		return RW_ERANGE;
	es *= GPA;
	w = span_warn(inf, x);
	if (pos(in->e_dyn_pa) && es > in->e_dyn_pa)
		w |= RW_STRENGTH_WARN_ES_ABOVE_ED;
	*e_pa = es;
	if (warn)
		*warn = w;
	return RW_OK;
}

int rw_strength_linear(double x, double a, double b, double *y)
{
	if (!isfinite(x) || !isfinite(a) || !isfinite(b)) {
		*y = NAN;
		return RW_EDOM;
	}
	*y = a * x + b;
	return RW_OK;
}

int rw_strength_nu_static(double nu_dyn, double a, double b, double *nu_s)
{
	double v;

	*nu_s = NAN;
	if (!isfinite(nu_dyn) || nu_dyn <= -1.0 || nu_dyn >= 0.5 ||
	    !isfinite(a) || !isfinite(b))
		return RW_EDOM;
	v = a * nu_dyn + b;
	if (!(v > -1.0 && v < 0.5))
		return RW_ERANGE;
	*nu_s = v;
	return RW_OK;
}
