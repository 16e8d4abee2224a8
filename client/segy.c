/* SEG-Y revision 1 writer: textual header in EBCDIC, binary header, trace
 * headers and big-endian IEEE float samples. Layout and conventions are in
 * segy.h. */
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "segy.h"

#ifndef RW_VERSION
#define RW_VERSION "unknown"
#endif

/* ASCII 0x20-0x7E to EBCDIC code page 037 (checked against Python's
 * cp037 codec in tests/reference/test_segy_segyio.py). */
static const unsigned char ebcdic037[95] = {
    0x40, 0x5A, 0x7F, 0x7B, 0x5B, 0x6C, 0x50, 0x7D, 0x4D, 0x5D, 0x5C, 0x4E,
    0x6B, 0x60, 0x4B, 0x61, 0xF0, 0xF1, 0xF2, 0xF3, 0xF4, 0xF5, 0xF6, 0xF7,
    0xF8, 0xF9, 0x7A, 0x5E, 0x4C, 0x7E, 0x6E, 0x6F, 0x7C, 0xC1, 0xC2, 0xC3,
    0xC4, 0xC5, 0xC6, 0xC7, 0xC8, 0xC9, 0xD1, 0xD2, 0xD3, 0xD4, 0xD5, 0xD6,
    0xD7, 0xD8, 0xD9, 0xE2, 0xE3, 0xE4, 0xE5, 0xE6, 0xE7, 0xE8, 0xE9, 0xBA,
    0xE0, 0xBB, 0xB0, 0x6D, 0x79, 0x81, 0x82, 0x83, 0x84, 0x85, 0x86, 0x87,
    0x88, 0x89, 0x91, 0x92, 0x93, 0x94, 0x95, 0x96, 0x97, 0x98, 0x99, 0xA2,
    0xA3, 0xA4, 0xA5, 0xA6, 0xA7, 0xA8, 0xA9, 0xC0, 0x4F, 0xD0, 0xA1};

unsigned char cli_segy_ebcdic(int c)
{
	if (c < 0x20 || c > 0x7E)
		return 0x40;
	return ebcdic037[c - 0x20];
}

static int fail(char *err, size_t errlen, const char *fmt, ...)
{
	va_list ap;

	if (err != NULL && errlen > 0) {
		va_start(ap, fmt);
		vsnprintf(err, errlen, fmt, ap);
		va_end(ap);
	}
	return -1;
}

/* Printable ASCII of at most max characters (and at least one if
 * nonempty); returns the offending position or -1 when fine. */
static long bad_text(const char *s, size_t max, int nonempty, size_t *len)
{
	size_t i;

	*len = 0;
	if (s == NULL)
		return nonempty ? 0 : -1;
	for (i = 0; s[i] != '\0'; i++) {
		unsigned char c = (unsigned char)s[i];

		if (c < 0x20 || c > 0x7E || i >= max)
			return (long)i;
	}
	*len = i;
	if (nonempty && i == 0)
		return 0;
	return -1;
}

/* x is within 1e-6 of a whole number; *out gets it. */
static int whole(double x, double *out)
{
	double r = floor(x + 0.5);

	if (!isfinite(x) || fabs(x - r) > 1e-6)
		return 0;
	*out = r;
	return 1;
}

static long us_of(const cli_segy_spec *s)
{
	double r;

	return whole(s->dt_s * 1e6, &r) ? (long)r : -1;
}

static long ms_of(const cli_segy_spec *s)
{
	double r;

	return whole(s->t0_s * 1e3, &r) ? (long)r : -1;
}

int cli_segy_check(const cli_segy_spec *s, char *err, size_t errlen)
{
	size_t i, len;
	long pos;
	double r;

	if (s == NULL)
		return fail(err, errlen, "no SEG-Y description");
	pos = bad_text(s->well, 60, 1, &len);
	if (pos >= 0)
		return fail(err, errlen,
		            "well: must be 1 to 60 printable ASCII characters "
		            "(problem at character %ld)",
		            pos + 1);
	if (s->n_notes > CLI_SEGY_MAX_NOTES || (s->n_notes && !s->notes))
		return fail(err, errlen, "notes: at most %u lines",
		            CLI_SEGY_MAX_NOTES);
	for (i = 0; i < s->n_notes; i++) {
		pos = bad_text(s->notes[i], CLI_SEGY_TEXT_WIDTH, 0, &len);
		if (pos >= 0)
			return fail(
			    err, errlen,
			    "notes[%zu]: must be at most %u printable "
			    "ASCII characters (problem at character %ld)",
			    i, CLI_SEGY_TEXT_WIDTH, pos + 1);
	}
	if (!isfinite(s->dt_s) || us_of(s) < 1 || us_of(s) > 65535)
		return fail(err, errlen,
		            "dt: %g s is not a whole number of microseconds "
		            "in 1..65535 (the binary header's 2-byte field)",
		            s->dt_s);
	if (!isfinite(s->t0_s) || ms_of(s) < 0 || ms_of(s) > 32767)
		return fail(
		    err, errlen,
		    "t0: %g s is not a whole number of milliseconds in "
		    "0..32767 (the trace header's delay time); choose an "
		    "axis that starts on a millisecond",
		    s->t0_s);
	if (s->ns < 1 || s->ns > CLI_SEGY_MAX_SAMPLES)
		return fail(err, errlen, "samples: %zu is outside 1..%u", s->ns,
		            CLI_SEGY_MAX_SAMPLES);
	if (s->ntr < 1 || s->ntr > CLI_SEGY_MAX_TRACES)
		return fail(err, errlen,
		            "traces: %zu is outside 1..%u (one ensemble per "
		            "file)",
		            s->ntr, CLI_SEGY_MAX_TRACES);
	if (s->key != CLI_SEGY_KEY_ANGLE && s->key != CLI_SEGY_KEY_OFFSET)
		return fail(err, errlen, "key: must be angle or offset");
	if (s->key_scale < 1 || s->key_scale > 1000)
		return fail(err, errlen, "key_scale: %d is outside 1..1000",
		            s->key_scale);
	if (s->key_value == NULL)
		return fail(err, errlen, "key values: missing");
	for (i = 0; i < s->ntr; i++) {
		double v = s->key_value[i] * (double)s->key_scale;

		if (!whole(v, &r) || fabs(r) > 2147483647.0)
			return fail(err, errlen,
			            "key value of trace %zu: %g x %d is not a "
			            "whole number that fits bytes 37-40",
			            i + 1, s->key_value[i], s->key_scale);
	}
	if (s->ensemble < 1)
		return fail(err, errlen, "ensemble: must be >= 1");
	if (!isfinite(s->null_value))
		return fail(err, errlen, "null value: must be finite");
	return 0;
}

/* One 80-column line "Cnn text" (n in 1..40, "C 1" style as in the
 * standard's example) in EBCDIC at out + 80 (n - 1); text is at most
 * CLI_SEGY_TEXT_WIDTH characters (checked by the callers). */
static void text_line(unsigned char *out, int n, const char *text)
{
	char line[80];
	size_t i, len = text ? strlen(text) : 0;

	memset(line, ' ', sizeof line);
	line[0] = 'C';
	line[1] = n >= 10 ? (char)('0' + n / 10) : ' ';
	line[2] = (char)('0' + n % 10);
	for (i = 0; i < len && i < CLI_SEGY_TEXT_WIDTH; i++)
		line[4 + i] = text[i];
	for (i = 0; i < 80; i++)
		out[80 * (n - 1) + i] = cli_segy_ebcdic((unsigned char)line[i]);
}

/* Formats one textual-header line into buf (CLI_SEGY_TEXT_WIDTH + 1
 * bytes); nonzero when it would not fit. */
static int line_fmt(char *buf, const char *fmt, ...)
{
	va_list ap;
	int len;

	va_start(ap, fmt);
	len = vsnprintf(buf, CLI_SEGY_TEXT_WIDTH + 1, fmt, ap);
	va_end(ap);
	return len < 0 || len > (int)CLI_SEGY_TEXT_WIDTH;
}

int cli_segy_text_header(const cli_segy_spec *s,
                         unsigned char out[CLI_SEGY_TEXT_BYTES], char *err,
                         size_t errlen)
{
	char buf[12][CLI_SEGY_TEXT_WIDTH + 1];
	double lo, hi;
	size_t i;
	int n = 1, k, bad = 0;

	if (cli_segy_check(s, err, errlen) != 0)
		return -1;
	lo = hi = s->key_value[0];
	for (i = 1; i < s->ntr; i++) {
		if (s->key_value[i] < lo)
			lo = s->key_value[i];
		if (s->key_value[i] > hi)
			hi = s->key_value[i];
	}
	bad |= line_fmt(buf[0], "WELL: %s", s->well);
	bad |= line_fmt(buf[1], "WRITTEN BY ROCKWIRE %s", RW_VERSION);
	bad |= line_fmt(
	    buf[2],
	    "SAMPLE INTERVAL %g MS, %zu SAMPLES PER TRACE, FIRST AT %ld MS",
	    (double)us_of(s) / 1000.0, s->ns, ms_of(s));
	bad |= line_fmt(
	    buf[3], "%zu TRACES IN ONE ENSEMBLE (NUMBER %d), SEQUENCE FROM 1",
	    s->ntr, s->ensemble);
	bad |=
	    line_fmt(buf[4], "BYTES 37-40 (OFFSET FIELD) HOLD THE %s X %d",
	             s->key == CLI_SEGY_KEY_ANGLE ? "INCIDENCE ANGLE IN DEGREES"
	                                          : "OFFSET IN METRES",
	             s->key_scale);
	bad |= line_fmt(buf[5], "%s FROM %g TO %g %s",
	                s->key == CLI_SEGY_KEY_ANGLE ? "ANGLES" : "OFFSETS", lo,
	                hi, s->key == CLI_SEGY_KEY_ANGLE ? "DEG" : "M");
	bad |= line_fmt(
	    buf[6],
	    "SAMPLES 4-BYTE IEEE FLOAT BIG-ENDIAN (FORMAT CODE 5), TWO-WAY "
	    "TIME");
	bad |= line_fmt(
	    buf[7],
	    "NULL SAMPLES (NO MODEL VALUE) WRITTEN AS %g; ALL-NULL TRACES "
	    "DEAD",
	    (double)s->null_value);
	bad |= line_fmt(
	    buf[8], "COORDINATES NOT SET (ZERO); TIME FROM THE MODEL'S DATUM");
	bad |= line_fmt(
	    buf[9],
	    "CAUTION: SCREENING ESTIMATES, NOT A SUBSTITUTE FOR QUALIFIED");
	bad |= line_fmt(
	    buf[10],
	    "REVIEW, LOCAL REGULATIONS AND LICENSED PRACTICE; NEVER THE "
	    "SOLE");
	bad |= line_fmt(buf[11], "BASIS FOR WELL-CONTROL DECISIONS.");
	if (bad)
		return fail(err, errlen,
		            "a header line is longer than %u characters "
		            "(a number too long to print)",
		            CLI_SEGY_TEXT_WIDTH);
	text_line(out, n++,
	          "SYNTHETIC SEISMOGRAM MODELLED FROM WELL LOGS - NOT RECORDED "
	          "DATA");
	for (k = 0; k < 12; k++)
		text_line(out, n++, buf[k]);
	text_line(out, n++, "");
	for (i = 0; i < s->n_notes; i++)
		text_line(out, n++, s->notes[i]);
	while (n <= 38)
		text_line(out, n++, "");
	text_line(out, 39, "SEG Y REV1");
	text_line(out, 40, "END TEXTUAL HEADER");
	return 0;
}

static void put16(unsigned char *p, long v)
{
	uint16_t u = (uint16_t)(int16_t)v;

	p[0] = (unsigned char)(u >> 8);
	p[1] = (unsigned char)(u & 0xFF);
}

static void put16u(unsigned char *p, unsigned long v)
{
	p[0] = (unsigned char)((v >> 8) & 0xFF);
	p[1] = (unsigned char)(v & 0xFF);
}

static void put32(unsigned char *p, long v)
{
	uint32_t u = (uint32_t)(int32_t)v;

	p[0] = (unsigned char)(u >> 24);
	p[1] = (unsigned char)((u >> 16) & 0xFF);
	p[2] = (unsigned char)((u >> 8) & 0xFF);
	p[3] = (unsigned char)(u & 0xFF);
}

/* Offsets below are 0-based within each header; the standard's 1-based
 * file bytes are in the comments. */
void cli_segy_binary_header(const cli_segy_spec *s,
                            unsigned char out[CLI_SEGY_BINARY_BYTES])
{
	memset(out, 0, CLI_SEGY_BINARY_BYTES);
	put32(out + 0, 1);             /* 3201 job id */
	put32(out + 4, 1);             /* 3205 line number */
	put32(out + 8, 1);             /* 3209 reel number */
	put16(out + 12, (long)s->ntr); /* 3213 traces per ensemble */
	put16(out + 14, 0);            /* 3215 auxiliary traces */
	put16u(out + 16, (unsigned long)us_of(s)); /* 3217 interval, us */
	put16u(out + 18, (unsigned long)us_of(s)); /* 3219 original interval */
	put16(out + 20, (long)s->ns);              /* 3221 samples per trace */
	put16(out + 22, (long)s->ns);              /* 3223 original samples */
	put16(out + 24, 5);                        /* 3225 format: IEEE float */
	put16(out + 26, (long)s->ntr);             /* 3227 ensemble fold */
	put16(out + 28, 2);        /* 3229 sorting: CDP ensemble */
	put16(out + 30, 1);        /* 3231 vertical sum: none */
	put16(out + 54, 1);        /* 3255 measurement: metres */
	put16u(out + 300, 0x0100); /* 3501 revision 1.0 */
	put16(out + 302, 1);       /* 3503 fixed-length traces */
	put16(out + 304, 0);       /* 3505 extended headers */
}

void cli_segy_trace_header(const cli_segy_spec *s, size_t i, int dead,
                           unsigned char out[CLI_SEGY_TRACE_BYTES])
{
	double key = floor(s->key_value[i] * (double)s->key_scale + 0.5);

	memset(out, 0, CLI_SEGY_TRACE_BYTES);
	put32(out + 0, (long)(i + 1));  /* 1 sequence number in line */
	put32(out + 4, (long)(i + 1));  /* 5 sequence number in file */
	put32(out + 8, 1);              /* 9 original field record */
	put32(out + 12, (long)(i + 1)); /* 13 trace in field record */
	put32(out + 20, s->ensemble);   /* 21 ensemble (CDP) number */
	put32(out + 24, (long)(i + 1)); /* 25 trace in ensemble */
	put16(out + 28, dead ? 2 : 1);  /* 29 id: 1 seismic, 2 dead */
	put16(out + 30, 1);             /* 31 vertically summed traces */
	put16(out + 32, 1);             /* 33 horizontally stacked */
	put16(out + 34, 1);             /* 35 data use: production */
	put32(out + 36, (long)key);     /* 37 offset field: angle/offset */
	put16(out + 68, 1);             /* 69 elevation scalar */
	put16(out + 70, 1);             /* 71 coordinate scalar */
	put16(out + 88, 1);             /* 89 coordinate units: length */
	put16(out + 108, ms_of(s));     /* 109 delay recording time, ms */
	put16(out + 114, (long)s->ns);  /* 115 samples in this trace */
	put16u(out + 116, (unsigned long)us_of(s)); /* 117 interval, us */
}

int cli_segy_write(FILE *fp, const cli_segy_spec *s, const double *data,
                   size_t *n_null, char *err, size_t errlen)
{
	unsigned char text[CLI_SEGY_TEXT_BYTES], bin[CLI_SEGY_BINARY_BYTES];
	unsigned char th[CLI_SEGY_TRACE_BYTES], buf[4096];
	size_t i, k, nulls = 0;

	if (n_null != NULL)
		*n_null = 0;
	if (fp == NULL || data == NULL)
		return fail(err, errlen, "no output or no data");
	if (cli_segy_text_header(s, text, err, errlen) != 0)
		return -1;
	cli_segy_binary_header(s, bin);
	if (fwrite(text, 1, sizeof text, fp) != sizeof text ||
	    fwrite(bin, 1, sizeof bin, fp) != sizeof bin)
		return fail(err, errlen, "write error in the file headers");
	for (i = 0; i < s->ntr; i++) {
		const double *tr = data + i * s->ns;
		int dead = 1;
		size_t used = 0;

		for (k = 0; k < s->ns; k++) {
			if (!isnan(tr[k]))
				dead = 0;
			if (!isnan(tr[k]) &&
			    (!isfinite(tr[k]) || fabs(tr[k]) > FLT_MAX))
				return fail(err, errlen,
				            "trace %zu sample %zu: %g does not "
				            "fit a 4-byte float",
				            i + 1, k + 1, tr[k]);
		}
		cli_segy_trace_header(s, i, dead, th);
		if (fwrite(th, 1, sizeof th, fp) != sizeof th)
			return fail(err, errlen, "write error at trace %zu",
			            i + 1);
		for (k = 0; k < s->ns; k++) {
			float f;
			uint32_t u;

			if (isnan(tr[k])) {
				f = s->null_value;
				nulls++;
			} else {
				f = (float)tr[k];
			}
			memcpy(&u, &f, sizeof u);
			buf[used++] = (unsigned char)(u >> 24);
			buf[used++] = (unsigned char)((u >> 16) & 0xFF);
			buf[used++] = (unsigned char)((u >> 8) & 0xFF);
			buf[used++] = (unsigned char)(u & 0xFF);
			if (used == sizeof buf || k + 1 == s->ns) {
				if (fwrite(buf, 1, used, fp) != used)
					return fail(err, errlen,
					            "write error at trace %zu",
					            i + 1);
				used = 0;
			}
		}
	}
	if (fflush(fp) != 0)
		return fail(err, errlen, "write error at the end of the file");
	if (n_null != NULL)
		*n_null = nulls;
	return 0;
}

int cli_segy_write_path(const char *path, const cli_segy_spec *s,
                        const double *data, size_t *n_null, char *err,
                        size_t errlen)
{
	FILE *fp;
	int st;

	if (path == NULL || path[0] == '\0')
		return fail(err, errlen, "no output path");
	/* check first: a bad spec does not touch an existing file */
	if (cli_segy_check(s, err, errlen) != 0)
		return -1;
	fp = fopen(path, "wb");
	if (fp == NULL)
		return fail(err, errlen, "%s: %s", path, strerror(errno));
	st = cli_segy_write(fp, s, data, n_null, err, errlen);
	if (fclose(fp) != 0 && st == 0)
		st = fail(err, errlen, "%s: write error on close", path);
	if (st != 0)
		remove(path);
	return st;
}
