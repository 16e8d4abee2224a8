/* Cross-file internals of the protocol layer: the fluid and mineral
 * descriptions that fluid.c and mineral.c parse and that rock.substitute
 * and log.process reuse, so a fluid or a mineral is written the same way
 * in every request. The contracts are beside the definitions. */
#ifndef RW_PROTO_DESC_H
#define RW_PROTO_DESC_H

#include "proto/internal.h"

struct proto_fluid_desc;
struct proto_mineral_desc;

/* Fluids (fluid.c): {k, rho} or a fluid.properties-style description. */
struct proto_fluid_desc *
proto__fluid_desc_parse(proto_call *c, const cJSON *obj, const char *path);
size_t proto__fluid_desc_len(const struct proto_fluid_desc *d, int *is_array,
                             const char **len_from);
int proto__fluid_desc_needs_pt(const struct proto_fluid_desc *d);
void proto__fluid_desc_eval(const struct proto_fluid_desc *d, size_t i,
                            double p_mpa, double t_degc, double *k_pa,
                            double *rho_kgm3, uint32_t *qc);
const double *proto__fluid_desc_sat(const struct proto_fluid_desc *d,
                                    const char *phase, size_t *n,
                                    int *is_array);

/* Minerals (mineral.c): a table name, {k, mu?, rho?} or a mix. */
struct proto_mineral_desc *
proto__mineral_desc_parse(proto_call *c, const cJSON *item, const char *path);
size_t proto__mineral_desc_len(const struct proto_mineral_desc *d,
                               int *is_array, const char **len_from);
int proto__mineral_desc_has_rho(const struct proto_mineral_desc *d);
int proto__mineral_desc_eval(const struct proto_mineral_desc *d, size_t i,
                             double *k_pa, double *rho_kgm3);

#endif
