/* The one method table: every family's declared methods, in the order
 * rpc.discover and service.info list them. A family file defines its
 * methods as a NULL-terminated array of pointers to proto_method; a new
 * family is one line here and one in table.h. */
#include <string.h>

#include "proto/internal.h"
#include "proto/table.h"

static const proto_method *const *const families[] = {
    proto_service_methods,  proto_session_methods,        proto_elastic_methods,
    proto_thomsen_methods,  proto_fluid_methods,          proto_mineral_methods,
    proto_rock_methods,     proto_rock_empirical_methods, proto_reflect_methods,
    proto_log_methods,      proto_rockmodel_methods,      proto_seismic_methods,
    proto_pressure_methods,
};

const proto_method *proto_method_at(size_t i)
{
	for (size_t f = 0; f < sizeof families / sizeof families[0]; f++) {
		const proto_method *const *m = families[f];
		for (; *m; m++)
			if (i-- == 0)
				return *m;
	}
	return NULL;
}

const proto_method *proto_method_find(const char *name)
{
	/* family by family: every request asks, and proto_method_at walks
	 * from the start each time */
	for (size_t f = 0; f < sizeof families / sizeof families[0]; f++)
		for (const proto_method *const *m = families[f]; *m; m++)
			if ((*m)->name[0] == name[0] &&
			    strcmp((*m)->name, name) == 0)
				return *m;
	return NULL;
}
