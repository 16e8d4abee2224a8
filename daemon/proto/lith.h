/* Cross-file internals of the log and rock.empirical protocol files: the
 * lithology description shared by rock.empirical and log.process (a name
 * or an object of volume fractions for Greenberg & Castagna 1992) and the
 * QC bit for an empirical relation used outside its fitted range. */
#ifndef RW_PROTO_LITH_H
#define RW_PROTO_LITH_H

#include "proto/internal.h"
#include "rockwire/empirical.h"

/* Parses a lithology value at `path` (e.g. "lithology"): a string
 * "sandstone", "limestone", "dolomite" or "shale", or an object of those
 * names to fractions in [0, 1] summing to 1 within 1e-6. v == NULL gives
 * pure sandstone. frac receives the fractions indexed RW_EMP_SANDSTONE..
 * RW_EMP_SHALE. Returns 0 or -1 after proto_fail naming the member. */
int proto__lith_parse(proto_call *c, const cJSON *v, const char *path,
                      double frac[RW_EMP_NLITH]);

/* QC bits of an empirical warning set (RW_EMP_WARN_*): QC_EMP_RANGE when
 * any bit is set. */
uint32_t proto__emp_qc(unsigned warn);

/* Fluid and mineral descriptions parsed by fluid.c and mineral.c (the
 * shapes rock.substitute takes; contracts beside their definitions). */
struct proto_fluid_desc;
struct proto_mineral_desc;
struct proto_fluid_desc *
proto__fluid_desc_parse(proto_call *c, const cJSON *obj, const char *path);
size_t proto__fluid_desc_len(const struct proto_fluid_desc *d, int *is_array,
                             const char **len_from);
int proto__fluid_desc_needs_pt(const struct proto_fluid_desc *d);
void proto__fluid_desc_eval(const struct proto_fluid_desc *d, size_t i,
                            double p_mpa, double t_degc, double *k_pa,
                            double *rho_kgm3, uint32_t *qc);
struct proto_mineral_desc *
proto__mineral_desc_parse(proto_call *c, const cJSON *item, const char *path);
size_t proto__mineral_desc_len(const struct proto_mineral_desc *d,
                               int *is_array, const char **len_from);
int proto__mineral_desc_eval(const struct proto_mineral_desc *d, size_t i,
                             double *k_pa, double *rho_kgm3);

#endif
