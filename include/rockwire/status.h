/* Status codes shared by every function of the rockwire compute core.
 * A fallible core function returns one of these and writes its results
 * through output pointers; on failure the outputs are NaN. */
#ifndef ROCKWIRE_STATUS_H
#define ROCKWIRE_STATUS_H

#ifdef __cplusplus
extern "C" {
#endif

enum {
	RW_OK = 0,      /* success */
	RW_EDOM = 1,    /* input outside the domain of the formula */
	RW_ERANGE = 2,  /* result not representable or not physical */
	RW_EINVAL = 3,  /* inconsistent or underdetermined inputs */
	RW_EMAXITER = 4 /* an iteration did not converge */
};

/* Returns a static, human-readable description of a status code; never
 * NULL (unknown codes give "unknown status"). */
const char *rw_strerror(int status);

#ifdef __cplusplus
}
#endif

#endif
