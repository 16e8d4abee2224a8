/* Units on the client side, taken from the daemon: service.info lists
 * every quantity kind with its default unit and, per accepted unit, the
 * factors to the default (value in the default unit = v * scale +
 * offset). The client reads curves, WITS items and `--set` values in the
 * units they state, converts them to the default with those factors, and
 * always sends defaults; output units are a separate choice applied to
 * the answer with the same factors. A few spellings the daemon has no
 * unit for are defined here from exact definitions (1 in = 0.0254 m,
 * 1 cm = 0.01 m, 1 mm = 0.001 m, 1 % = 0.01), and the usual LAS
 * spellings (US/F, G/C3, K/M3, ...) map to the daemon's names. */
#ifndef RW_CLI_UNITS_H
#define RW_CLI_UNITS_H

#include <stddef.h>

#include <cjson/cJSON.h>

#define CLI_UNITS_MAX_KINDS 24
#define CLI_UNITS_MAX_PER   12

typedef struct cli_unit {
	char name[24];
	double scale, offset; /* to the kind's default */
} cli_unit;

typedef struct cli_kind {
	char name[24]; /* "velocity", ... */
	char dflt[24]; /* its default unit */
	cli_unit unit[CLI_UNITS_MAX_PER];
	size_t nunit;
	char out[24]; /* output unit chosen, "" = the default */
	double out_scale, out_offset;
} cli_kind;

typedef struct cli_units {
	cli_kind kind[CLI_UNITS_MAX_KINDS];
	size_t nkind;
} cli_units;

/* Fills u from a service.info result's "units" (plus the client's own
 * kinds "fraction" and "gamma_ray", which need no daemon factors).
 * Returns 0, or -1 when info has no usable unit table. */
int cli__units_load(cli_units *u, const cJSON *info);
/* The kind called name, or NULL. */
cli_kind *cli__units_kind(cli_units *u, const char *name);
/* The kind whose default unit is spelt unit exactly (to read an
 * answer's "units" map), or NULL. */
cli_kind *cli__units_kind_of_default(cli_units *u, const char *unit);

/* Converts a value stated in `spelling` (daemon spelling or a usual
 * LAS/CSV/WITS one, case-insensitive) to the default of kind `want`
 * (NULL: any kind that has the spelling, when only one has). On success
 * returns 0 and sets *scale and *offset (default = v * scale + offset)
 * and *kind_out (may be NULL). Returns -1 when the spelling is not a unit
 * of that kind, -2 when it is ambiguous without a kind (e.g. "F": feet or
 * degF). */
int cli__unit_factor(const cli_units *u, const char *spelling, const char *want,
                     const char **kind_out, double *scale, double *offset);
/* Writes the accepted spellings of a kind, comma-separated, for
 * messages. */
void cli__unit_list(const cli_units *u, const char *kind, char *buf,
                    size_t size);
/* Chooses the output unit of a kind ("kind=unit"). 0, or -1 with a
 * message on stderr (unknown kind or unit, with a suggestion). */
int cli__units_set_output(cli_units *u, const char *kind, const char *unit,
                          const char *who);
/* For an answer field in unit `unit` (a default): the unit to print and
 * the conversion from the default (out = (v - offset) / scale). Returns
 * the printed unit (unit itself when no output unit is chosen). */
const char *cli__units_output(cli_units *u, const char *unit, double *scale,
                              double *offset);

/* The quantity kind of a log.process parameter at a dotted path, from the
 * schema when it says (x-unit-kind) or else from the client's table of
 * log.process parameters; NULL when unknown. discover may be NULL. */
const char *cli__param_kind(const cJSON *discover, const char *path);

/* A `--set` value given with a unit ("8.5in", "-3 degC"): splits it into
 * the number and the unit text. Returns 1 when value is such a pair, 0
 * otherwise. */
int cli__split_value_unit(const char *value, double *num, char *unit,
                          size_t unitlen);

#endif
