/* The families of the method table (table.c). Each family file defines
 * one NULL-terminated list of its methods. */
#ifndef RW_PROTO_TABLE_H
#define RW_PROTO_TABLE_H

#include "proto/internal.h"

extern const proto_method *const proto_service_methods[];
extern const proto_method *const proto_session_methods[];
extern const proto_method *const proto_elastic_methods[];
extern const proto_method *const proto_thomsen_methods[];
extern const proto_method *const proto_fluid_methods[];
extern const proto_method *const proto_mineral_methods[];
extern const proto_method *const proto_rock_methods[];
extern const proto_method *const proto_rock_empirical_methods[];
extern const proto_method *const proto_reflect_methods[];
extern const proto_method *const proto_log_methods[];
extern const proto_method *const proto_rockmodel_methods[];
extern const proto_method *const proto_seismic_methods[];
extern const proto_method *const proto_pressure_methods[];

#endif
