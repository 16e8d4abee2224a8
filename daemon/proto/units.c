/* Units: the one place that knows unit names and conversion factors. Each
 * kind has a list of accepted units, the first being the default; a value
 * in a unit converts to internal units as v * scale + offset. */
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "proto/internal.h"
#include "proto/numfmt.h"
#include "rockwire/fluid.h"

typedef struct unit_def {
	const char *name;
	const char *alias; /* another accepted spelling, or NULL */
	double scale, offset;
} unit_def;

typedef struct kind_def {
	const char *name;
	const unit_def *units;
	size_t count;
} kind_def;

#define FT 0.3048
#define PSI_MPA                                                                \
	0.006894757293168361 /* 1 psi = 6894.757... Pa (exact def.             \
	                        via lbf and inch) */
/* 1 scf/bbl in L/L: the exact factor of the core (fluid.h). */
#define SCF_PER_BBL RW_FLUID_SCF_PER_BBL_IN_LL

static const unit_def u_velocity[] = {
    {"m/s", NULL, 1, 0}, {"km/s", NULL, 1000, 0}, {"ft/s", NULL, FT, 0}};
static const unit_def u_slowness[] = {{"us/ft", NULL, 1e-6 / FT, 0},
                                      {"us/m", NULL, 1e-6, 0}};
static const unit_def u_density[] = {{"g/cm3", "g/cc", 1000, 0},
                                     {"kg/m3", "kg/m^3", 1, 0}};
static const unit_def u_modulus[] = {
    {"GPa", NULL, 1e9, 0}, {"MPa", NULL, 1e6, 0}, {"Pa", NULL, 1, 0}};
static const unit_def u_pressure[] = {{"MPa", NULL, 1, 0},
                                      {"kPa", NULL, 1e-3, 0},
                                      {"bar", NULL, 0.1, 0},
                                      {"psi", NULL, PSI_MPA, 0}};
static const unit_def u_temperature[] = {
    {"degC", NULL, 1, 0},
    {"degF", NULL, 5.0 / 9.0, -32.0 * 5.0 / 9.0},
    {"K", NULL, 1, -273.15}};
static const unit_def u_length[] = {{"m", NULL, 1, 0},
                                    {"ft", NULL, FT, 0},
                                    {"in", NULL, FT / 12, 0},
                                    {"cm", NULL, 0.01, 0},
                                    {"mm", NULL, 0.001, 0}};
static const unit_def u_impedance[] = {{"m/s*g/cm3", NULL, 1000, 0},
                                       {"kg/m2s", NULL, 1, 0},
                                       {"ft/s*g/cm3", NULL, FT * 1000, 0}};
static const unit_def u_salinity[] = {
    {"ppm", NULL, 1e-6, 0}, {"g/kg", NULL, 1e-3, 0}, {"fraction", NULL, 1, 0}};
static const unit_def u_gor[] = {{"L/L", "m3/m3", 1, 0},
                                 {"scf/bbl", NULL, SCF_PER_BBL, 0}};
static const unit_def u_angle[] = {{"deg", NULL, M_PI / 180.0, 0},
                                   {"rad", NULL, 1, 0}};
static const unit_def u_grad_p[] = {{"MPa/m", NULL, 1, 0},
                                    {"kPa/m", NULL, 1e-3, 0},
                                    {"psi/ft", NULL, PSI_MPA / FT, 0}};
static const unit_def u_grad_t[] = {
    {"degC/km", NULL, 1e-3, 0},
    {"degC/m", NULL, 1, 0},
    {"degF/100ft", NULL, 5.0 / 9.0 / (100 * FT), 0}};

/* 1 lb/gal (US) = 0.45359237 kg / 3.785411784 L (both exact by
 * definition) = 119.826427... kg/m^3. */
#define LB_PER_GAL (0.45359237 / 3.785411784e-3)
static const unit_def u_mud_weight[] = {{"g/cm3", "sg", 1000, 0},
                                        {"lb/gal", "ppg", LB_PER_GAL, 0},
                                        {"kg/m3", NULL, 1, 0}};
static const unit_def u_time[] = {
    {"ms", NULL, 1e-3, 0}, {"s", NULL, 1, 0}, {"us", NULL, 1e-6, 0}};
static const unit_def u_frequency[] = {{"Hz", NULL, 1, 0},
                                       {"kHz", NULL, 1e3, 0}};
static const unit_def u_inv_length[] = {
    {"1/m", NULL, 1, 0}, {"1/km", NULL, 1e-3, 0}, {"1/ft", NULL, 1 / FT, 0}};
static const unit_def u_strain[] = {{"fraction", NULL, 1, 0},
                                    {"microstrain", NULL, 1e-6, 0}};
static const unit_def u_moddens[] = {{"GPa*g/cm3", NULL, 1e12, 0},
                                     {"Pa*kg/m3", NULL, 1, 0}};

#define KIND(n, a)                                                             \
	{                                                                      \
		n, a, sizeof a / sizeof a[0]                                   \
	}
static const kind_def kinds[PK_COUNT] = {
    [PK_NONE] = {"none", NULL, 0},
    [PK_VELOCITY] = KIND("velocity", u_velocity),
    [PK_SLOWNESS] = KIND("slowness", u_slowness),
    [PK_DENSITY] = KIND("density", u_density),
    [PK_MODULUS] = KIND("modulus", u_modulus),
    [PK_PRESSURE] = KIND("pressure", u_pressure),
    [PK_TEMPERATURE] = KIND("temperature", u_temperature),
    [PK_LENGTH] = KIND("length", u_length),
    [PK_IMPEDANCE] = KIND("impedance", u_impedance),
    [PK_SALINITY] = KIND("salinity", u_salinity),
    [PK_GOR] = KIND("gor", u_gor),
    [PK_ANGLE] = KIND("angle", u_angle),
    [PK_GRADIENT_P] = KIND("pressure_gradient", u_grad_p),
    [PK_GRADIENT_T] = KIND("temperature_gradient", u_grad_t),
    [PK_MUD_WEIGHT] = KIND("mud_weight", u_mud_weight),
    [PK_TIME] = KIND("time", u_time),
    [PK_FREQUENCY] = KIND("frequency", u_frequency),
    [PK_INV_LENGTH] = KIND("inverse_length", u_inv_length),
    [PK_STRAIN] = KIND("strain", u_strain),
    [PK_MODULUS_DENSITY] = KIND("modulus_density", u_moddens),
};

const char *proto_kind_name(proto_kind k)
{
	return (int)k >= 0 && k < PK_COUNT ? kinds[k].name : "none";
}

static const unit_def *unit_of(const proto_units *u, proto_kind k)
{
	if ((int)k <= 0 || k >= PK_COUNT)
		return NULL;
	return &kinds[k].units[u->sel[k]];
}

const char *proto_unit_name(const proto_units *u, proto_kind k)
{
	const unit_def *d = unit_of(u, k);
	return d ? d->name : "1";
}

double proto_to_internal(const proto_units *u, proto_kind k, double v)
{
	const unit_def *d = unit_of(u, k);
	return d ? v * d->scale + d->offset : v;
}

double proto__units_step(double y, int up)
{
	uint64_t b;
	if (y == 0)
		return up ? DBL_TRUE_MIN : -DBL_TRUE_MIN;
	memcpy(&b, &y, sizeof b);
	/* the bit pattern of a finite double, read as an integer, orders the
	 * values of one sign: one more is one ulp further from zero */
	b += ((b >> 63) == (uint64_t)!up) ? 1 : (uint64_t)-1;
	memcpy(&y, &b, sizeof y);
	return y;
}

/* The inverse of v * scale + offset that gives a caller's number back:
 * (v - offset) / scale alone misses it for about one value in ten (30 deg
 * read in, 29.999999999999996 written out). Of that quotient and its two
 * neighbours, those that map to v again are the numbers the caller may
 * have sent; the one with the shortest text is the one a person or a
 * file wrote. With a pure scale this recovers every input of up to 17
 * digits tried (random decimals, every unit here); an offset (degF, K)
 * loses bits in the sum and some inputs come back one ulp off. */
static double inverse(const unit_def *d, double v)
{
	double y = (v - d->offset) / d->scale, best = y, c[2];
	char tmp[PROTO_NUM_FMT_MAX];
	size_t best_len = 0;
	int here;

	if (!isfinite(y))
		return y;
	here = y * d->scale + d->offset == v;
	c[0] = proto__units_step(y, 0);
	c[1] = proto__units_step(y, 1);
	for (int i = 0; i < 2; i++) {
		size_t n;
		if (c[i] * d->scale + d->offset != v)
			continue;
		if (!here) {
			/* y does not map back; a neighbour does */
			best = c[i];
			best_len = proto_num_fmt(tmp, c[i]);
			here = 1;
			continue;
		}
		if (!best_len)
			best_len = proto_num_fmt(tmp, best);
		n = proto_num_fmt(tmp, c[i]);
		if (n < best_len) {
			best = c[i];
			best_len = n;
		}
	}
	return best;
}

double proto_from_internal(const proto_units *u, proto_kind k, double v)
{
	const unit_def *d = unit_of(u, k);
	if (!d || (d->scale == 1 && d->offset == 0))
		return v;
	return inverse(d, v);
}

void proto_units_default(proto_units *u)
{
	memset(u, 0, sizeof *u);
}

void proto_units_list(proto_kind k, char *buf, size_t size)
{
	size_t used = 0;
	buf[0] = '\0';
	if ((int)k <= 0 || k >= PK_COUNT)
		return;
	for (size_t i = 0; i < kinds[k].count && used < size; i++) {
		int n = snprintf(buf + used, size - used, "%s%s", i ? ", " : "",
		                 kinds[k].units[i].name);
		if (n < 0)
			break;
		used += (size_t)n;
	}
}

static int kind_by_name(const char *name)
{
	for (int k = 1; k < PK_COUNT; k++)
		if (strcmp(kinds[k].name, name) == 0)
			return k;
	return -1;
}

int proto__units_apply(proto_call *c, const cJSON *obj, const char *path,
                       proto_units *u)
{
	const cJSON *m;
	char list[256];

	if (!obj)
		return 0;
	if (!cJSON_IsObject(obj))
		return proto_fail(c, PROTO_INVALID_PARAMS, path,
		                  "must be an object mapping a quantity kind "
		                  "to a unit, e.g. {\"velocity\": \"km/s\"}");
	cJSON_ArrayForEach(m, obj)
	{
		int k = kind_by_name(m->string);
		size_t i;
		if (k < 0) {
			size_t used = 0;
			list[0] = '\0';
			for (int j = 1; j < PK_COUNT && used < sizeof list;
			     j++) {
				int n = snprintf(
				    list + used, sizeof list - used, "%s%s",
				    j > 1 ? ", " : "", kinds[j].name);
				if (n < 0)
					break;
				used += (size_t)n;
			}
			return proto_fail(
			    c, PROTO_INVALID_PARAMS, path,
			    "unknown quantity kind '%s'; accepted: "
			    "%s",
			    m->string, list);
		}
		if (!cJSON_IsString(m)) {
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "%s: the unit must be a string",
			                  m->string);
		}
		for (i = 0; i < kinds[k].count; i++) {
			const unit_def *d = &kinds[k].units[i];
			if (strcmp(d->name, m->valuestring) == 0 ||
			    (d->alias && strcmp(d->alias, m->valuestring) == 0))
				break;
		}
		if (i == kinds[k].count) {
			proto_units_list((proto_kind)k, list, sizeof list);
			return proto_fail(c, PROTO_INVALID_PARAMS, path,
			                  "unknown %s unit '%s'; accepted: %s",
			                  m->string, m->valuestring, list);
		}
		u->sel[k] = (unsigned char)i;
	}
	return 0;
}

size_t proto_units_count(proto_kind k)
{
	return (int)k > 0 && k < PK_COUNT ? kinds[k].count : 0;
}

const char *proto_units_name_at(proto_kind k, size_t i)
{
	assert(i < proto_units_count(k));
	return kinds[k].units[i].name;
}

const char *proto_units_alias_at(proto_kind k, size_t i)
{
	assert(i < proto_units_count(k));
	return kinds[k].units[i].alias;
}

void proto_units_factor_at(proto_kind k, size_t i, double *scale,
                           double *offset)
{
	assert(i < proto_units_count(k));
	*scale = kinds[k].units[i].scale;
	*offset = kinds[k].units[i].offset;
}
