/* Internal to the core: translation of GSL statuses to RW_* codes. */
#ifndef RW_CORE_STATUS_GSL_H
#define RW_CORE_STATUS_GSL_H

/* Maps a GSL status (GSL_SUCCESS, GSL_EDOM, ...) to an RW_* status. */
int rw__from_gsl(int gsl_status);

#endif
