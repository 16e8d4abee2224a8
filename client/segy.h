/* SEG-Y revision 1 writer for synthetic traces (SEG Technical Standards
 * Committee, "SEG Y rev 1 Data Exchange format", 2002; byte positions from
 * memory, checked by reading back with Debian's python3-segyio in
 * tests/reference/test_segy_segyio.py): a 3200-byte textual header in
 * EBCDIC (code page 037) that names the well, the sampling, what the
 * traces are and the caution; a 400-byte binary header (sample interval
 * in microseconds, samples per trace, format code 5 = 4-byte IEEE float,
 * revision 1, fixed-length traces); and per trace a 240-byte header
 * (sequence numbers, ensemble, sample count and interval, delay time, the
 * angle or offset in bytes 37-40, coordinates zero) and its samples as
 * big-endian IEEE floats. One ensemble (a gather at one location) per
 * file. Depends on libc and libm only; never links the core. */
#ifndef ROCKWIRE_CLIENT_SEGY_H
#define ROCKWIRE_CLIENT_SEGY_H

#include <stddef.h>
#include <stdio.h>

#ifdef __cplusplus
extern "C" {
#endif

#define CLI_SEGY_TEXT_BYTES   3200u
#define CLI_SEGY_BINARY_BYTES 400u
#define CLI_SEGY_TRACE_BYTES  240u
#define CLI_SEGY_TEXT_WIDTH   76u /* characters after "Cnn " on a line */
#define CLI_SEGY_MAX_NOTES    24u /* caller lines in the textual header */
/* Samples per trace: the field is 2 bytes; kept to the signed range so
 * readers that take it as a signed integer agree. */
#define CLI_SEGY_MAX_SAMPLES 32767u
#define CLI_SEGY_MAX_TRACES  32767u /* the 2-byte traces-per-ensemble field */

/* What bytes 37-40 of each trace header (the offset field) hold. Angle
 * gathers put the incidence angle there (common practice: rev 1 has no
 * angle field); the textual header says which and in what unit. */
typedef enum cli_segy_key {
	CLI_SEGY_KEY_ANGLE = 0, /* incidence angle, degrees x key_scale */
	CLI_SEGY_KEY_OFFSET = 1 /* source-receiver offset, metres x key_scale */
} cli_segy_key;

/* A file to write. Strings are printable ASCII (0x20-0x7E). */
typedef struct cli_segy_spec {
	const char *well;         /* well name, 1..60 characters */
	const char *const *notes; /* lines describing the model, each at
	                             most CLI_SEGY_TEXT_WIDTH characters */
	size_t n_notes;           /* <= CLI_SEGY_MAX_NOTES */
	double dt_s;              /* sample interval: whole microseconds,
	                             1..65535 us */
	double t0_s;              /* time of the first sample: whole
	                             milliseconds, 0..32767 ms */
	size_t ns;                /* samples per trace, 1..MAX_SAMPLES */
	size_t ntr;               /* traces, 1..MAX_TRACES */
	cli_segy_key key;         /* what key_value is */
	const double *key_value;  /* ntr values: angle (deg) or offset (m) */
	int key_scale;            /* 1..1000; key_value x key_scale must be
	                             a whole number (within 1e-6) */
	int ensemble;             /* ensemble (CDP) number, >= 1 */
	float null_value;         /* written for null (NaN) samples */
} cli_segy_spec;

/* EBCDIC (code page 037) of a printable ASCII character; 0x40 (space)
 * for anything else. */
unsigned char cli_segy_ebcdic(int c);

/* Checks a spec. Returns 0, or -1 with a message naming the field and the
 * reason in err (err may be NULL). */
int cli_segy_check(const cli_segy_spec *s, char *err, size_t errlen);

/* The textual header: 40 lines of 80 characters "Cnn ..." in EBCDIC,
 * with the caution, the well, the sampling, the trace key and its range,
 * the sample format and null value, the caller's notes, and the rev 1
 * closing lines "C39 SEG Y REV1" and "C40 END TEXTUAL HEADER". Returns 0
 * or -1 (a bad spec; err as cli_segy_check). */
int cli_segy_text_header(const cli_segy_spec *s,
                         unsigned char out[CLI_SEGY_TEXT_BYTES], char *err,
                         size_t errlen);

/* The binary header of a checked spec (big-endian integers). */
void cli_segy_binary_header(const cli_segy_spec *s,
                            unsigned char out[CLI_SEGY_BINARY_BYTES]);

/* The header of trace i (0-based) of a checked spec; dead marks a trace
 * whose every sample is null (trace identification code 2, else 1). */
void cli_segy_trace_header(const cli_segy_spec *s, size_t i, int dead,
                           unsigned char out[CLI_SEGY_TRACE_BYTES]);

/* Writes the whole file to fp: data holds ntr x ns samples, trace-major;
 * NaN is written as null_value and counted in *n_null (may be NULL).
 * Returns 0, or -1 with a message in err (a bad spec, a finite sample
 * beyond the range of a 4-byte float or an infinite one, or a write
 * error); fp is then in an unspecified position. */
int cli_segy_write(FILE *fp, const cli_segy_spec *s, const double *data,
                   size_t *n_null, char *err, size_t errlen);

/* cli_segy_write to a new file at path (created or truncated); on failure
 * the file is removed. */
int cli_segy_write_path(const char *path, const cli_segy_spec *s,
                        const double *data, size_t *n_null, char *err,
                        size_t errlen);

#ifdef __cplusplus
}
#endif

#endif
