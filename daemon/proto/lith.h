/* Cross-file internals of the log and rock.empirical protocol files: the
 * lithology description shared by rock.empirical and log.process (a name
 * or an object of volume fractions for Greenberg & Castagna 1992) and the
 * QC bit for an empirical relation used outside its fitted range. */
#ifndef RW_PROTO_LITH_H
#define RW_PROTO_LITH_H

#include "proto/desc.h"
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

#endif
