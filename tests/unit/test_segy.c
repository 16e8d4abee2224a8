/* Unit tests of the SEG-Y rev 1 writer (client/segy.c): EBCDIC code page
 * 037, the textual header's lines, the binary and trace header fields at
 * the byte positions of the standard (SEG Y rev 1, 2002; from memory),
 * big-endian IEEE samples, nulls and dead traces, and every refusal.
 * Reading back with python3-segyio is the outside check in
 * tests/reference/test_segy_segyio.py. */
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <setjmp.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <gsl/gsl_errno.h>

#include "segy.h"

static const double angles[4] = {0.0, 10.0, 20.0, 30.0};
static const char *const notes[2] = {"WAVELET: RICKER 30 HZ, ZERO PHASE",
                                     "REFLECTIVITY: ZOEPPRITZ, NO STRETCH"};

static cli_segy_spec spec(void)
{
	cli_segy_spec s;

	memset(&s, 0, sizeof s);
	s.well = "ORRIMUND 3";
	s.notes = notes;
	s.n_notes = 2;
	s.dt_s = 0.002;
	s.t0_s = 1.2;
	s.ns = 5;
	s.ntr = 4;
	s.key = CLI_SEGY_KEY_ANGLE;
	s.key_value = angles;
	s.key_scale = 1;
	s.ensemble = 7;
	s.null_value = 0.0f;
	return s;
}

static long be16(const unsigned char *p)
{
	return (int16_t)(uint16_t)((p[0] << 8) | p[1]);
}

static long be32(const unsigned char *p)
{
	return (int32_t)(((uint32_t)p[0] << 24) | ((uint32_t)p[1] << 16) |
	                 ((uint32_t)p[2] << 8) | (uint32_t)p[3]);
}

/* EBCDIC 037 of a few characters (IBM code page 037, from memory; the
 * whole printable range is compared with Python's cp037 codec in
 * tests/reference). */
static void test_ebcdic(void **state)
{
	(void)state;
	assert_int_equal(cli_segy_ebcdic(' '), 0x40);
	assert_int_equal(cli_segy_ebcdic('C'), 0xC3);
	assert_int_equal(cli_segy_ebcdic('0'), 0xF0);
	assert_int_equal(cli_segy_ebcdic('9'), 0xF9);
	assert_int_equal(cli_segy_ebcdic('Z'), 0xE9);
	assert_int_equal(cli_segy_ebcdic('a'), 0x81);
	assert_int_equal(cli_segy_ebcdic('.'), 0x4B);
	assert_int_equal(cli_segy_ebcdic('-'), 0x60);
	assert_int_equal(cli_segy_ebcdic('\n'), 0x40);
	assert_int_equal(cli_segy_ebcdic(200), 0x40);
}

/* Decodes line n (1..40) back to ASCII through the table. */
static void line_of(const unsigned char *text, int n, char out[81])
{
	int i, c;

	for (i = 0; i < 80; i++) {
		unsigned char e = text[80 * (n - 1) + i];

		out[i] = '?';
		for (c = 0x20; c <= 0x7E; c++)
			if (cli_segy_ebcdic(c) == e)
				out[i] = (char)c;
	}
	out[80] = '\0';
}

/* Textual header: 40 lines "C 1 " .. "C40 ", the well, the sampling, the
 * key, the caution, the notes and the rev 1 closing lines (SEG Y rev 1,
 * sec. 3, from memory). */
static void test_text_header(void **state)
{
	cli_segy_spec s = spec();
	unsigned char t[CLI_SEGY_TEXT_BYTES];
	char line[81], all[40 * 81] = "";
	int n;

	(void)state;
	assert_int_equal(cli_segy_text_header(&s, t, NULL, 0), 0);
	for (n = 1; n <= 40; n++) {
		char want[5];

		line_of(t, n, line);
		snprintf(want, sizeof want, "C%2d ", n);
		assert_memory_equal(line, want, 4);
		strcat(all, line);
	}
	line_of(t, 1, line);
	assert_non_null(strstr(line, "NOT RECORDED DATA"));
	assert_non_null(strstr(all, "WELL: ORRIMUND 3"));
	assert_non_null(strstr(all, "SAMPLE INTERVAL 2 MS, 5 SAMPLES PER "
	                            "TRACE, FIRST AT 1200 MS"));
	assert_non_null(strstr(all, "INCIDENCE ANGLE IN DEGREES X 1"));
	assert_non_null(strstr(all, "ANGLES FROM 0 TO 30 DEG"));
	assert_non_null(strstr(all, "NOT A SUBSTITUTE FOR QUALIFIED"));
	assert_non_null(strstr(all, "WELL-CONTROL DECISIONS"));
	assert_non_null(strstr(all, "WAVELET: RICKER 30 HZ"));
	line_of(t, 39, line);
	assert_memory_equal(line, "C39 SEG Y REV1  ", 16);
	line_of(t, 40, line);
	assert_memory_equal(line, "C40 END TEXTUAL HEADER  ", 24);
}

/* Binary header fields (file bytes 3201-3600; SEG Y rev 1, sec. 4). */
static void test_binary_header(void **state)
{
	cli_segy_spec s = spec();
	unsigned char b[CLI_SEGY_BINARY_BYTES];

	(void)state;
	s.dt_s = 0.0005;
	s.ns = 3001;
	cli_segy_binary_header(&s, b);
	assert_int_equal(be16(b + 12), 4);    /* 3213 traces per ensemble */
	assert_int_equal(be16(b + 16), 500);  /* 3217 interval, us */
	assert_int_equal(be16(b + 20), 3001); /* 3221 samples */
	assert_int_equal(be16(b + 24), 5);    /* 3225 format code */
	assert_int_equal(be16(b + 28), 2);    /* 3229 sorting: CDP */
	assert_int_equal(be16(b + 54), 1);    /* 3255 metres */
	assert_int_equal(be16(b + 300), 256); /* 3501 revision 0x0100 */
	assert_int_equal(be16(b + 302), 1);   /* 3503 fixed length */
	assert_int_equal(be16(b + 304), 0);   /* 3505 extended headers */
	/* an interval above 32767 us is stored as its unsigned 2 bytes */
	s.dt_s = 0.040;
	cli_segy_binary_header(&s, b);
	assert_int_equal(((unsigned)b[16] << 8) | b[17], 40000);
}

/* Trace header fields (bytes 1-240 of each trace; SEG Y rev 1, sec. 5). */
static void test_trace_header(void **state)
{
	cli_segy_spec s = spec();
	unsigned char h[CLI_SEGY_TRACE_BYTES];
	double off[4] = {0.0, 7.25, 12.5, 30.0};

	(void)state;
	cli_segy_trace_header(&s, 2, 0, h);
	assert_int_equal(be32(h + 0), 3);      /* 1 sequence in line */
	assert_int_equal(be32(h + 4), 3);      /* 5 sequence in file */
	assert_int_equal(be32(h + 20), 7);     /* 21 ensemble */
	assert_int_equal(be32(h + 24), 3);     /* 25 trace in ensemble */
	assert_int_equal(be16(h + 28), 1);     /* 29 seismic data */
	assert_int_equal(be32(h + 36), 20);    /* 37 offset field: angle */
	assert_int_equal(be32(h + 72), 0);     /* 73 source x: zero */
	assert_int_equal(be16(h + 108), 1200); /* 109 delay, ms */
	assert_int_equal(be16(h + 114), 5);    /* 115 samples */
	assert_int_equal(be16(h + 116), 2000); /* 117 interval, us */
	cli_segy_trace_header(&s, 0, 1, h);
	assert_int_equal(be16(h + 28), 2); /* dead */
	s.key_value = off;
	s.key_scale = 100;
	s.key = CLI_SEGY_KEY_OFFSET;
	assert_int_equal(cli_segy_check(&s, NULL, 0), 0);
	cli_segy_trace_header(&s, 1, 0, h);
	assert_int_equal(be32(h + 36), 725);
}

/* The file: 3600 header bytes, then per trace 240 + 4 ns bytes; samples
 * big-endian IEEE single (0.25 is 0x3E800000, -1.5 is 0xBFC00000: IEEE
 * 754 encodings); a NaN is the null value and counted; an all-null trace
 * is dead. */
static void test_write(void **state)
{
	cli_segy_spec s = spec();
	double d[4 * 5];
	unsigned char *buf;
	size_t i, nn, len;
	char err[200];
	FILE *fp = tmpfile();

	(void)state;
	assert_non_null(fp);
	for (i = 0; i < 20; i++)
		d[i] = 0.01 * (double)i;
	d[0] = 0.25;
	d[1] = -1.5;
	d[7] = NAN;
	for (i = 15; i < 20; i++)
		d[i] = NAN;
	s.null_value = -999.25f;
	assert_int_equal(cli_segy_write(fp, &s, d, &nn, err, sizeof err), 0);
	assert_int_equal(nn, 6);
	len = (size_t)ftell(fp);
	assert_int_equal(len, 3600 + 4 * (240 + 4 * 5));
	buf = malloc(len);
	assert_non_null(buf);
	rewind(fp);
	assert_int_equal(fread(buf, 1, len, fp), len);
	assert_int_equal(be32(buf + 3600 + 240), 0x3E800000);
	assert_int_equal((uint32_t)be32(buf + 3600 + 244), 0xBFC00000u);
	{
		/* trace 2, sample 3 (index 7) is the null value */
		const unsigned char *p = buf + 3600 + 260 + 240 + 2 * 4;
		uint32_t u = (uint32_t)be32(p);
		float f;

		memcpy(&f, &u, sizeof f);
		assert_true(f == -999.25f);
	}
	assert_int_equal(be16(buf + 3600 + 3 * 260 + 28), 2);
	assert_int_equal(be16(buf + 3600 + 2 * 260 + 28), 1);
	free(buf);
	fclose(fp);
}

static void test_refusals(void **state)
{
	cli_segy_spec s;
	char err[200];
	double bad_ang[4] = {0.0, 10.5, 20.0, 30.0};
	double d[20] = {0}, big[20] = {0};
	const char *long_note[1] = {"X234567890123456789012345678901234567890"
	                            "12345678901234567890123456789012345678"};
	FILE *fp;

	(void)state;
	s = spec();
	s.dt_s = 0.0020005;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "dt:"));
	s = spec();
	s.t0_s = 1.2005;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "t0:"));
	s = spec();
	s.ns = 40000;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "samples:"));
	s = spec();
	s.key_value = bad_ang;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "trace 2"));
	s.key_scale = 10; /* 10.5 deg in tenths is fine */
	assert_int_equal(cli_segy_check(&s, err, sizeof err), 0);
	s = spec();
	s.well = "BAD\tNAME";
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "well:"));
	s.well = "";
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	s = spec();
	s.notes = long_note;
	s.n_notes = 1;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	assert_non_null(strstr(err, "notes[0]"));
	s = spec();
	s.n_notes = 25;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	s = spec();
	s.null_value = NAN;
	assert_int_equal(cli_segy_check(&s, err, sizeof err), -1);
	/* a sample beyond a 4-byte float */
	s = spec();
	big[3] = 1e39;
	fp = tmpfile();
	assert_non_null(fp);
	assert_int_equal(cli_segy_write(fp, &s, big, NULL, err, sizeof err),
	                 -1);
	assert_non_null(strstr(err, "sample 4"));
	big[3] = INFINITY;
	assert_int_equal(cli_segy_write(fp, &s, big, NULL, err, sizeof err),
	                 -1);
	fclose(fp);
	/* an unwritable path; a bad spec leaves no file */
	assert_int_equal(cli_segy_write_path("/nonexistent/dir/x.sgy", &s, d,
	                                     NULL, err, sizeof err),
	                 -1);
	assert_non_null(strstr(err, "/nonexistent/dir/x.sgy"));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
	    cmocka_unit_test(test_ebcdic),
	    cmocka_unit_test(test_text_header),
	    cmocka_unit_test(test_binary_header),
	    cmocka_unit_test(test_trace_header),
	    cmocka_unit_test(test_write),
	    cmocka_unit_test(test_refusals),
	};

	gsl_set_error_handler_off(); /* the test links the core's GSL */
	return cmocka_run_group_tests(tests, NULL, NULL);
}
