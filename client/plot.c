/* `rockwire plot`: pictures of rockwire answers, drawn with cairo into
 * PNG, SVG or PDF (by the output's extension). Kinds: AVO curves (every
 * method of reflect.interface answers against angle), the
 * intercept-gradient crossplot with the AVO class regions of the
 * daemon's own rule and a background trend, crossplots of two curves
 * coloured by a third or by QC class with a rock.template grid behind,
 * depth-indexed log tracks with a QC strip, and fluid-substitution sweeps
 * (vp, AI, Vp/Vs against water saturation). Inputs are daemon answers
 * (a response line, a bare result, several of either, from a file or
 * stdin) or a LAS / CSV log, which goes through log.process by the same
 * code as `rockwire log` unless it has been processed already.
 *
 * Layout (the project's own): title line at the top left, plot area,
 * a legend column on the right, and a caption band at the bottom with
 * the caution and the method used. Colours: the colour-blind-safe
 * palette of Okabe & Ito 2008 (Color Universal Design); continuous
 * values are binned along a blue-to-yellow ramp through three of its
 * colours, the axis the common red-green colour deficiencies keep
 * distinct. Each curve is one path (one SVG <path>); legend swatches are
 * filled, never stroked, so a curve's colour strokes nothing else.
 * Every file carries the caution: in the caption, and as PNG tEXt, SVG
 * <desc> or PDF subject. Files are written whole to OUT.partXXXXXX and
 * renamed into place. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cairo.h>
#include <cairo-pdf.h>
#include <cairo-svg.h>
#include <cjson/cJSON.h>

#include "cli.h"
#include "las.h"
#include "logio.h"
#include "plot.h"
#include "rpc.h"

#define WHO        "rockwire plot"
#define MAX_SERIES 64
#define MAX_IDS    16
#define MAX_COLS   1100
#define MAX_TRACKS 12
#define MAX_INPUT  (512u * 1024u * 1024u)

static const char caution_short[] =
    "Screening estimates - not a substitute for qualified review, local "
    "regulations and licensed practice; never the sole basis for "
    "well-control decisions.";

/* ---- colours ------------------------------------------------------------ */

typedef struct rgb {
	double r, g, b;
} rgb;

#define HEX(v)                                                                 \
	{                                                                      \
		((v) >> 16 & 255) / 255.0, ((v) >> 8 & 255) / 255.0,           \
		    ((v)&255) / 255.0                                          \
	}

/* Okabe & Ito 2008, "Color Universal Design": black, orange, sky blue,
 * bluish green, yellow, blue, vermillion, reddish purple. */
enum {
	OI_BLACK,
	OI_ORANGE,
	OI_SKY,
	OI_GREEN,
	OI_YELLOW,
	OI_BLUE,
	OI_VERM,
	OI_PURPLE
};
static const rgb okabe_ito[8] = {HEX(0x000000), HEX(0xE69F00), HEX(0x56B4E9),
                                 HEX(0x009E73), HEX(0xF0E442), HEX(0x0072B2),
                                 HEX(0xD55E00), HEX(0xCC79A7)};
/* Order in which series take colours: the darker, more separable ones
 * first; yellow (weak on white) last. */
static const int series_order[8] = {OI_BLACK,  OI_BLUE,   OI_VERM, OI_GREEN,
                                    OI_PURPLE, OI_ORANGE, OI_SKY,  OI_YELLOW};
/* Greys of the frame (none is a palette colour). */
static const rgb c_ink = HEX(0x333333), c_grid = HEX(0xDDDDDD),
                 c_band = HEX(0xF1F1EC), c_tmpl = HEX(0xA8A8A8),
                 c_trend = HEX(0x6E6E6E);

static rgb series_colour(int i)
{
	return okabe_ito[series_order[i % 8]];
}

/* Bin k of nbins on the blue - sky blue - yellow ramp. */
static rgb ramp(int k, int nbins)
{
	double t = nbins > 1 ? (double)k / (nbins - 1) : 0.0, u;
	const rgb *a, *b;
	rgb c;

	if (t < 0.5) {
		a = &okabe_ito[OI_BLUE], b = &okabe_ito[OI_SKY], u = t * 2;
	} else {
		a = &okabe_ito[OI_SKY], b = &okabe_ito[OI_YELLOW];
		u = (t - 0.5) * 2;
	}
	c.r = a->r + (b->r - a->r) * u;
	c.g = a->g + (b->g - a->g) * u;
	c.b = a->b + (b->b - a->b) * u;
	return c;
}

/* ---- the canvas --------------------------------------------------------- */

enum { FMT_PNG, FMT_SVG, FMT_PDF };

typedef struct canvas {
	cairo_surface_t *s;
	cairo_t *cr;
	int fmt;
	double w, h;
	cli_buf out;     /* SVG and PDF bytes from cairo */
	double px0, py0; /* plot area, device units */
	double px1, py1;
	double x0, x1; /* data range */
	double y0, y1;
	int ylog, ydown; /* ydown: y grows downward (depth) */
	double legend_x; /* left edge of the legend column */
	double legend_y; /* next legend line */
	int verbose;
	int nseries;
} canvas;

static cairo_status_t to_buf(void *closure, const unsigned char *data,
                             unsigned int len)
{
	return cli__buf_put(closure, (const char *)data, len)
	           ? CAIRO_STATUS_WRITE_ERROR
	           : CAIRO_STATUS_SUCCESS;
}

static int canvas_open(canvas *cv, int fmt, double w, double h)
{
	memset(cv, 0, sizeof *cv);
	cv->fmt = fmt;
	cv->w = w;
	cv->h = h;
	if (fmt == FMT_PNG)
		cv->s = cairo_image_surface_create(CAIRO_FORMAT_RGB24, (int)w,
		                                   (int)h);
	else if (fmt == FMT_SVG)
		cv->s =
		    cairo_svg_surface_create_for_stream(to_buf, &cv->out, w, h);
	else
		cv->s =
		    cairo_pdf_surface_create_for_stream(to_buf, &cv->out, w, h);
	if (cairo_surface_status(cv->s) != CAIRO_STATUS_SUCCESS)
		return -1;
	cv->cr = cairo_create(cv->s);
	cairo_set_source_rgb(cv->cr, 1, 1, 1);
	cairo_paint(cv->cr);
	cairo_select_font_face(cv->cr, "DejaVu Sans", CAIRO_FONT_SLANT_NORMAL,
	                       CAIRO_FONT_WEIGHT_NORMAL);
	return cairo_status(cv->cr) == CAIRO_STATUS_SUCCESS ? 0 : -1;
}

static void canvas_free(canvas *cv)
{
	if (cv->cr)
		cairo_destroy(cv->cr);
	if (cv->s)
		cairo_surface_destroy(cv->s);
	cli__buf_free(&cv->out);
	cv->cr = NULL;
	cv->s = NULL;
}

static void set_rgb(canvas *cv, rgb c)
{
	cairo_set_source_rgb(cv->cr, c.r, c.g, c.b);
}

/* Text at (x, y) baseline; align 0 left, 1 centre, 2 right; angle 0 or
 * 90 (upwards). Returns the width. */
static double text(canvas *cv, double x, double y, double size, int align,
                   int up, rgb c, const char *s)
{
	cairo_text_extents_t e;
	cairo_t *cr = cv->cr;

	cairo_set_font_size(cr, size);
	cairo_text_extents(cr, s, &e);
	cairo_save(cr);
	cairo_translate(cr, x, y);
	if (up)
		cairo_rotate(cr, -M_PI / 2);
	cairo_move_to(cr, -e.x_advance * align / 2.0, 0);
	set_rgb(cv, c);
	cairo_show_text(cr, s);
	cairo_restore(cr);
	return e.x_advance;
}

static double text_width(canvas *cv, double size, const char *s)
{
	cairo_text_extents_t e;
	cairo_set_font_size(cv->cr, size);
	cairo_text_extents(cv->cr, s, &e);
	return e.x_advance;
}

static double map_x(const canvas *cv, double x)
{
	return cv->px0 + (x - cv->x0) / (cv->x1 - cv->x0) * (cv->px1 - cv->px0);
}

static double map_y(const canvas *cv, double y)
{
	double t = (y - cv->y0) / (cv->y1 - cv->y0);
	return cv->ydown ? cv->py0 + t * (cv->py1 - cv->py0)
	                 : cv->py1 - t * (cv->py1 - cv->py0);
}

/* A 1-2-5 step giving about n intervals over range. */
static double nice_step(double range, int n)
{
	double raw = range / n, mag = pow(10, floor(log10(raw))), f = raw / mag;
	return (f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10) * mag;
}

/* A data range [lo, hi] widened by pad (fraction) and never empty. */
static void pad_range(double *lo, double *hi, double pad)
{
	double d;
	if (!isfinite(*lo) || !isfinite(*hi)) {
		*lo = 0, *hi = 1;
		return;
	}
	if (*hi - *lo <= fabs(*hi) * 1e-9) {
		d = fabs(*hi) > 0 ? fabs(*hi) * 0.1 : 1;
		*lo -= d, *hi += d;
		return;
	}
	d = (*hi - *lo) * pad;
	*lo -= d, *hi += d;
}

static void fmt_tick(char *buf, size_t size, double v, double step)
{
	if (fabs(v) < step * 1e-6)
		v = 0;
	snprintf(buf, size, "%.*g", fabs(v) >= 1e5 || step < 1e-3 ? 3 : 6, v);
}

/* Grid, frame, ticks and labels of the current plot area and range. */
/* Flags of axes(): leave out the tick labels of an axis. */
enum { AX_NO_XTICKS = 1, AX_NO_YTICKS = 2 };

static void axes_ex(canvas *cv, const char *xlabel, const char *ylabel, int nx,
                    int ny, int flags)
{
	cairo_t *cr = cv->cr;
	double sx = nice_step(cv->x1 - cv->x0, nx);
	double sy = nice_step(cv->y1 - cv->y0, ny);
	char b[64];

	cairo_set_line_width(cr, 1);
	set_rgb(cv, c_grid);
	for (double v = ceil(cv->x0 / sx) * sx; v <= cv->x1 + sx * 1e-9;
	     v += sx) {
		double x = floor(map_x(cv, v)) + 0.5;
		cairo_move_to(cr, x, cv->py0);
		cairo_line_to(cr, x, cv->py1);
	}
	for (double v = ceil(cv->y0 / sy) * sy; v <= cv->y1 + sy * 1e-9;
	     v += sy) {
		double y = floor(map_y(cv, v)) + 0.5;
		cairo_move_to(cr, cv->px0, y);
		cairo_line_to(cr, cv->px1, y);
	}
	cairo_stroke(cr);
	for (double v = ceil(cv->x0 / sx) * sx;
	     !(flags & AX_NO_XTICKS) && v <= cv->x1 + sx * 1e-9; v += sx) {
		fmt_tick(b, sizeof b, v, sx);
		text(cv, map_x(cv, v), cv->py1 + 14, 10, 1, 0, c_ink, b);
	}
	for (double v = ceil(cv->y0 / sy) * sy;
	     !(flags & AX_NO_YTICKS) && v <= cv->y1 + sy * 1e-9; v += sy) {
		fmt_tick(b, sizeof b, v, sy);
		text(cv, cv->px0 - 4, map_y(cv, v) + 3.5, 10, 2, 0, c_ink, b);
	}
	set_rgb(cv, c_ink);
	cairo_rectangle(cr, floor(cv->px0) + 0.5, floor(cv->py0) + 0.5,
	                floor(cv->px1 - cv->px0), floor(cv->py1 - cv->py0));
	cairo_stroke(cr);
	if (xlabel)
		text(cv, (cv->px0 + cv->px1) / 2, cv->py1 + 30, 11, 1, 0, c_ink,
		     xlabel);
	if (ylabel)
		text(cv, cv->px0 - 44, (cv->py0 + cv->py1) / 2, 11, 1, 1, c_ink,
		     ylabel);
}

static void axes(canvas *cv, const char *xlabel, const char *ylabel, int nx,
                 int ny)
{
	axes_ex(cv, xlabel, ylabel, nx, ny, 0);
}

static void clip_area(canvas *cv)
{
	cairo_save(cv->cr);
	cairo_rectangle(cv->cr, cv->px0, cv->py0, cv->px1 - cv->px0,
	                cv->py1 - cv->py0);
	cairo_clip(cv->cr);
}

static void unclip(canvas *cv)
{
	cairo_restore(cv->cr);
}

static void note_series(canvas *cv, const char *what, const char *label, rgb c,
                        size_t n)
{
	cv->nseries++;
	if (cv->verbose)
		printf("series\t%s\t%s\t#%02X%02X%02X\t%zu\n", what, label,
		       (unsigned)lround(c.r * 255), (unsigned)lround(c.g * 255),
		       (unsigned)lround(c.b * 255), n);
}

static const double dash_sets[4][4] = {{0}, {7, 4, 0}, {2, 3, 0}, {8, 3, 2, 3}};
static const int dash_len[4] = {0, 2, 2, 4};

/* One curve as one stroked path; NaN points break it. Returns the points
 * drawn. */
static size_t curve(canvas *cv, size_t n, const double *x, const double *y,
                    rgb c, double width, int dash, const char *label)
{
	cairo_t *cr = cv->cr;
	int pen = 0;
	size_t drawn = 0;

	clip_area(cv);
	for (size_t i = 0; i < n; i++) {
		if (!isfinite(x[i]) || !isfinite(y[i])) {
			pen = 0;
			continue;
		}
		if (pen)
			cairo_line_to(cr, map_x(cv, x[i]), map_y(cv, y[i]));
		else
			cairo_move_to(cr, map_x(cv, x[i]), map_y(cv, y[i]));
		pen = 1;
		drawn++;
	}
	set_rgb(cv, c);
	cairo_set_line_width(cr, width);
	cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
	cairo_set_dash(cr, dash_sets[dash & 3], dash_len[dash & 3], 0);
	cairo_stroke(cr);
	cairo_set_dash(cr, NULL, 0, 0);
	unclip(cv);
	note_series(cv, "line", label, c, drawn);
	return drawn;
}

/* Points i with sel[i] (NULL: all) as one filled path of discs. */
static size_t points(canvas *cv, size_t n, const double *x, const double *y,
                     const unsigned char *sel, rgb c, double r,
                     const char *label)
{
	cairo_t *cr = cv->cr;
	size_t drawn = 0;

	clip_area(cv);
	for (size_t i = 0; i < n; i++) {
		double px, py;
		if ((sel && !sel[i]) || !isfinite(x[i]) || !isfinite(y[i]))
			continue;
		px = map_x(cv, x[i]);
		py = map_y(cv, y[i]);
		cairo_new_sub_path(cr);
		cairo_arc(cr, px, py, r, 0, 2 * M_PI);
		drawn++;
	}
	set_rgb(cv, c);
	if (drawn)
		cairo_fill(cr);
	else
		cairo_new_path(cr);
	unclip(cv);
	if (drawn)
		note_series(cv, "points", label, c, drawn);
	return drawn;
}

/* A legend line: a filled swatch in the curve's dash pattern (or a disc
 * for points), then the label. */
static void legend(canvas *cv, rgb c, int dash, int disc, const char *label)
{
	cairo_t *cr = cv->cr;
	double x = cv->legend_x, y = cv->legend_y;

	set_rgb(cv, c);
	if (disc) {
		cairo_arc(cr, x + 10, y - 4, 3.5, 0, 2 * M_PI);
	} else {
		double pos = 0, len = 22;
		int k = 0;
		while (pos < len) {
			double on =
			    dash_len[dash & 3]
			        ? dash_sets[dash & 3][k % dash_len[dash & 3]]
			        : len;
			double off =
			    dash_len[dash & 3]
			        ? dash_sets[dash & 3]
			                   [(k + 1) % dash_len[dash & 3]]
			        : 0;
			cairo_rectangle(cr, x + pos, y - 5.5,
			                fmin(on, len - pos), 2.5);
			pos += on + off;
			k += 2;
		}
	}
	cairo_fill(cr);
	text(cv, x + 28, y, 10, 0, 0, c_ink, label);
	cv->legend_y += 15;
}

static void legend_heading(canvas *cv, const char *s)
{
	cv->legend_y += 4;
	text(cv, cv->legend_x, cv->legend_y, 10.5, 0, 0, c_ink, s);
	cv->legend_y += 15;
}

/* Title at the top, caption band at the bottom: the caution and what
 * was drawn from what, shrunk to fit the width. */
static void frame_text(canvas *cv, const char *title, const char *method)
{
	char line[1024];
	double size = 10, wd;

	text(cv, 16, 24, 14, 0, 0, c_ink, title);
	set_rgb(cv, c_band);
	cairo_rectangle(cv->cr, 0, cv->h - 34, cv->w, 34);
	cairo_fill(cv->cr);
	snprintf(line, sizeof line, "%s", caution_short);
	wd = text_width(cv, size, line);
	if (wd > cv->w - 36)
		size *= (cv->w - 36) / wd;
	text(cv, 12, cv->h - 20, size, 0, 0, c_ink, line);
	snprintf(line, sizeof line, "Method: %s. rockwire plot.", method);
	size = 10;
	wd = text_width(cv, size, line);
	if (wd > cv->w - 36)
		size *= (cv->w - 36) / wd;
	text(cv, 12, cv->h - 7, size, 0, 0, c_ink, line);
}

/* ---- writing the file --------------------------------------------------- */

static uint32_t crc32_png(const unsigned char *p, size_t n)
{
	/* The CRC of the PNG specification (ISO/IEC 15948, annex D). */
	uint32_t c = 0xFFFFFFFFu;
	for (size_t i = 0; i < n; i++) {
		c ^= p[i];
		for (int k = 0; k < 8; k++)
			c = (c >> 1) ^ (0xEDB88320u & (0u - (c & 1u)));
	}
	return c ^ 0xFFFFFFFFu;
}

static int put_be32(cli_buf *b, uint32_t v)
{
	char q[4] = {(char)(v >> 24), (char)(v >> 16), (char)(v >> 8), (char)v};
	return cli__buf_put(b, q, 4);
}

/* A PNG tEXt chunk with keyword key and text val. */
static int png_text(cli_buf *b, const char *key, const char *val)
{
	size_t kl = strlen(key), vl = strlen(val), n = 4 + kl + 1 + vl;
	unsigned char *c = malloc(n);
	int rc;

	if (!c)
		return -1;
	memcpy(c, "tEXt", 4);
	memcpy(c + 4, key, kl + 1);
	memcpy(c + 5 + kl, val, vl);
	rc = put_be32(b, (uint32_t)(n - 4)) ||
	     cli__buf_put(b, (const char *)c, n) ||
	     put_be32(b, crc32_png(c, n));
	free(c);
	return rc ? -1 : 0;
}

static void xml_escape(cli_buf *b, const char *s)
{
	for (; *s; s++) {
		if (*s == '&')
			cli__buf_puts(b, "&amp;");
		else if (*s == '<')
			cli__buf_puts(b, "&lt;");
		else if (*s == '>')
			cli__buf_puts(b, "&gt;");
		else
			cli__buf_put(b, s, 1);
	}
}

static const char caution_full[] =
    "Screening estimates only: not a substitute for qualified review, "
    "local regulations and licensed practice; never the sole basis for "
    "well-control decisions.";

/* Finishes the drawing and writes the file (or stdout for "-") with the
 * caution in its metadata. 0, or CLI_EXIT_IO with a message. */
static int canvas_write(canvas *cv, const char *path, const char *title,
                        const char *method)
{
	cli_buf final = {0};
	char tmp[4096], meta[1200];
	int fd = -1, rc = CLI_EXIT_IO;
	size_t off = 0;

	snprintf(meta, sizeof meta, "%s Method: %s.", caution_full, method);
	if (cv->fmt == FMT_PDF) {
		cairo_pdf_surface_set_metadata(cv->s, CAIRO_PDF_METADATA_TITLE,
		                               title);
		cairo_pdf_surface_set_metadata(
		    cv->s, CAIRO_PDF_METADATA_SUBJECT, meta);
		cairo_pdf_surface_set_metadata(
		    cv->s, CAIRO_PDF_METADATA_CREATOR, "rockwire plot");
	}
	cairo_destroy(cv->cr);
	cv->cr = NULL;
	if (cv->fmt == FMT_PNG) {
		cli_buf png = {0};
		cairo_surface_flush(cv->s);
		if (cairo_surface_write_to_png_stream(cv->s, to_buf, &png) !=
		        CAIRO_STATUS_SUCCESS ||
		    png.len < 33) {
			cli__buf_free(&png);
			fprintf(stderr, WHO ": cannot encode the PNG\n");
			return CLI_EXIT_IO;
		}
		/* signature (8) and IHDR (25), then our text chunks */
		if (cli__buf_put(&final, png.data, 33) ||
		    png_text(&final, "Title", title) ||
		    png_text(&final, "Software", "rockwire plot") ||
		    png_text(&final, "Comment", meta) ||
		    cli__buf_put(&final, png.data + 33, png.len - 33)) {
			cli__buf_free(&png);
			goto out;
		}
		cli__buf_free(&png);
	} else {
		cairo_surface_finish(cv->s);
		if (cairo_surface_status(cv->s) != CAIRO_STATUS_SUCCESS) {
			fprintf(stderr, WHO ": cairo: %s\n",
			        cairo_status_to_string(
			            cairo_surface_status(cv->s)));
			goto out;
		}
		if (cv->fmt == FMT_SVG) {
			const char *svg = cv->out.data ? cv->out.data : "";
			const char *p = strstr(svg, "<svg");
			const char *q = p ? strchr(p, '>') : NULL;
			if (!q) {
				fprintf(stderr, WHO ": cairo wrote no <svg>\n");
				goto out;
			}
			cli__buf_put(&final, svg, (size_t)(q + 1 - svg));
			cli__buf_puts(&final, "\n<title>");
			xml_escape(&final, title);
			cli__buf_puts(&final, "</title>\n<desc>");
			xml_escape(&final, meta);
			cli__buf_puts(&final, "</desc>");
			cli__buf_put(&final, q + 1,
			             cv->out.len - (size_t)(q + 1 - svg));
		} else {
			cli__buf_put(&final, cv->out.data, cv->out.len);
		}
	}
	if (strcmp(path, "-") == 0) {
		if (fwrite(final.data, 1, final.len, stdout) != final.len ||
		    fflush(stdout)) {
			fprintf(stderr, WHO ": stdout: %s\n", strerror(errno));
			goto out;
		}
		rc = 0;
		goto out;
	}
	snprintf(tmp, sizeof tmp, "%s.partXXXXXX", path);
	fd = mkstemp(tmp);
	if (fd < 0) {
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		goto out;
	}
	{
		mode_t um = umask(0);
		umask(um);
		fchmod(fd, 0666 & ~um);
	}
	while (off < final.len) {
		ssize_t w = write(fd, final.data + off, final.len - off);
		if (w < 0 && errno == EINTR)
			continue;
		if (w <= 0) {
			fprintf(stderr, WHO ": %s: %s\n", path,
			        strerror(errno));
			goto out;
		}
		off += (size_t)w;
	}
	if (close(fd) < 0) {
		fd = -1;
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		goto out;
	}
	fd = -1;
	if (rename(tmp, path) < 0) {
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		goto out;
	}
	tmp[0] = '\0';
	rc = 0;
out:
	if (fd >= 0)
		close(fd);
	if (rc && tmp[0] && strcmp(path, "-"))
		unlink(tmp);
	cli__buf_free(&final);
	return rc;
}

/* ---- answers from a file or stdin --------------------------------------- */

typedef struct answer {
	const cJSON *result; /* NULL for an error answer */
	const cJSON *error;
	char id[128]; /* "" when none */
} answer;

typedef struct answers {
	cJSON *roots[256];
	size_t nroots;
	answer a[512];
	size_t n;
	char src[512];
} answers;

static void id_text(const cJSON *id, char *buf, size_t size)
{
	if (cJSON_IsString(id))
		snprintf(buf, size, "%s", id->valuestring);
	else if (cJSON_IsNumber(id)) {
		char *p = cJSON_PrintUnformatted(id);
		snprintf(buf, size, "%s", p ? p : "");
		free(p);
	} else
		buf[0] = '\0';
}

static void add_answer(answers *A, const cJSON *v)
{
	answer *a;
	if (A->n == sizeof A->a / sizeof A->a[0] || !cJSON_IsObject(v))
		return;
	a = &A->a[A->n];
	memset(a, 0, sizeof *a);
	if (cJSON_HasObjectItem(v, "jsonrpc")) {
		a->result = cJSON_GetObjectItemCaseSensitive(v, "result");
		a->error = cJSON_GetObjectItemCaseSensitive(v, "error");
		id_text(cJSON_GetObjectItemCaseSensitive(v, "id"), a->id,
		        sizeof a->id);
		if (!cJSON_IsObject(a->result))
			a->result = NULL;
		if (!a->result && !a->error)
			return;
	} else {
		a->result = v;
	}
	A->n++;
}

static char *read_all(FILE *f, size_t *len)
{
	size_t cap = 65536, n = 0;
	char *b = malloc(cap + 1);
	while (b) {
		size_t r = fread(b + n, 1, cap - n, f);
		n += r;
		if (r == 0)
			break;
		if (n == cap) {
			char *nb;
			if (cap >= MAX_INPUT) {
				free(b);
				errno = EFBIG;
				return NULL;
			}
			nb = realloc(b, cap * 2 + 1);
			if (!nb) {
				free(b);
				return NULL;
			}
			b = nb;
			cap *= 2;
		}
	}
	if (!b)
		return NULL;
	if (ferror(f)) {
		free(b);
		return NULL;
	}
	b[n] = '\0';
	*len = n;
	return b;
}

/* Reads every JSON value of path ("-" stdin): response lines, bare
 * results, batch arrays, pretty-printed or not; '#' lines and blank
 * lines are skipped. CLI_EXIT_* code. */
static int load_answers(answers *A, const char *path)
{
	FILE *f = strcmp(path, "-") == 0 ? stdin : fopen(path, "rb");
	size_t len = 0, pos = 0;
	char *buf;

	memset(A, 0, sizeof *A);
	snprintf(A->src, sizeof A->src, "%s",
	         strcmp(path, "-") == 0 ? "stdin" : path);
	if (!f) {
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		return CLI_EXIT_IO;
	}
	buf = read_all(f, &len);
	if (f != stdin)
		fclose(f);
	if (!buf) {
		fprintf(stderr, WHO ": %s: %s\n", path, strerror(errno));
		return CLI_EXIT_IO;
	}
	while (pos < len) {
		const char *end = NULL;
		cJSON *v;
		while (pos < len && isspace((unsigned char)buf[pos]))
			pos++;
		if (pos >= len)
			break;
		if (buf[pos] == '#') {
			while (pos < len && buf[pos] != '\n')
				pos++;
			continue;
		}
		v = cJSON_ParseWithLengthOpts(buf + pos, len - pos, &end, 0);
		if (!v) {
			size_t line = 1;
			for (size_t i = 0; i < pos; i++)
				line += buf[i] == '\n';
			fprintf(stderr,
			        WHO ": %s: line %zu: not a JSON answer (a "
			            "response line or a result object)\n",
			        A->src, line);
			free(buf);
			return CLI_EXIT_INPUT;
		}
		if (A->nroots == sizeof A->roots / sizeof A->roots[0]) {
			cJSON_Delete(v);
			fprintf(stderr, WHO ": %s: more than %zu JSON values\n",
			        A->src, sizeof A->roots / sizeof A->roots[0]);
			free(buf);
			return CLI_EXIT_INPUT;
		}
		A->roots[A->nroots++] = v;
		if (cJSON_IsArray(v)) {
			const cJSON *e;
			cJSON_ArrayForEach(e, v) add_answer(A, e);
		} else {
			add_answer(A, v);
		}
		pos = (size_t)(end - buf);
	}
	free(buf);
	if (A->n == 0) {
		fprintf(stderr, WHO ": %s: no answer in it\n", A->src);
		return CLI_EXIT_INPUT;
	}
	return 0;
}

static void answers_free(answers *A)
{
	for (size_t i = 0; i < A->nroots; i++)
		cJSON_Delete(A->roots[i]);
	A->nroots = A->n = 0;
}

/* The answers to draw: those named by ids (in that order), else every
 * result for which fits() holds. Fills sel[] (at most max) and returns
 * the count, or -1 with a message. */
/* An answer computed under uncertainty: its outputs are statistics
 * ({mean, sd, pNN}), which the plots do not draw. */
static int uncertain(const cJSON *r)
{
	return cJSON_IsObject(
	    cJSON_GetObjectItemCaseSensitive(r, "uncertainty"));
}

static int pick(const answers *A, char **ids, size_t nids,
                int (*fits)(const cJSON *), const char *what,
                const answer **sel, size_t max)
{
	size_t n = 0;

	if (nids) {
		for (size_t k = 0; k < nids && n < max; k++) {
			const answer *hit = NULL;
			for (size_t i = 0; i < A->n && !hit; i++)
				if (strcmp(A->a[i].id, ids[k]) == 0)
					hit = &A->a[i];
			if (!hit) {
				char list[512] = "";
				size_t l = 0;
				for (size_t i = 0; i < A->n && l < 400; i++)
					l += (size_t)snprintf(
					    list + l, sizeof list - l, "%s%s",
					    l ? ", " : "",
					    A->a[i].id[0] ? A->a[i].id
					                  : "(no id)");
				fprintf(stderr,
				        WHO ": --id %s: no answer with that id "
				            "in %s (ids there: %s)\n",
				        ids[k], A->src, list);
				return -1;
			}
			if (!hit->result) {
				fprintf(stderr, WHO ": --id %s: ", ids[k]);
				cli__print_error(stderr,
				                 "the answer is an error",
				                 hit->error);
				return -1;
			}
			if (uncertain(hit->result)) {
				fprintf(stderr,
				        WHO ": --id %s: an answer under "
				            "uncertainty holds statistics, not "
				            "curves; plot the same request "
				            "without distributions\n",
				        ids[k]);
				return -1;
			}
			if (!fits(hit->result)) {
				fprintf(stderr,
				        WHO
				        ": --id %s: that answer has no %s\n",
				        ids[k], what);
				return -1;
			}
			sel[n++] = hit;
		}
		return (int)n;
	}
	for (size_t i = 0; i < A->n && n < max; i++)
		if (A->a[i].result && !uncertain(A->a[i].result) &&
		    fits(A->a[i].result))
			sel[n++] = &A->a[i];
	if (n == 0) {
		fprintf(stderr, WHO ": %s: no answer with %s%s\n", A->src, what,
		        A->n && !A->a[0].result ? " (the answers there are "
		                                  "errors)"
		                                : "");
		return -1;
	}
	return (int)n;
}

static const char *unit_of(const cJSON *result, const char *name)
{
	const cJSON *u = cJSON_GetObjectItemCaseSensitive(result, "units");
	const cJSON *v = u ? cJSON_GetObjectItemCaseSensitive(u, name) : NULL;
	return cJSON_IsString(v) ? v->valuestring : NULL;
}

/* Numbers of a JSON array (null -> NaN) into a new array; NULL when v is
 * not an array of numbers and nulls. *n gets the length. */
static double *nums(const cJSON *v, size_t *n)
{
	size_t k = 0, len;
	double *d;
	const cJSON *e;

	if (!cJSON_IsArray(v))
		return NULL;
	len = (size_t)cJSON_GetArraySize(v);
	d = malloc((len ? len : 1) * sizeof *d);
	if (!d)
		return NULL;
	cJSON_ArrayForEach(e, v)
	{
		if (cJSON_IsNumber(e))
			d[k++] = e->valuedouble;
		else if (cJSON_IsNull(e))
			d[k++] = NAN;
		else {
			free(d);
			return NULL;
		}
	}
	*n = k;
	return d;
}

static void label_unit(char *buf, size_t size, const char *name,
                       const char *unit)
{
	if (unit && *unit)
		snprintf(buf, size, "%s [%s]", name, unit);
	else
		snprintf(buf, size, "%s", name);
}

static void range_of(const double *v, size_t n, double *lo, double *hi)
{
	for (size_t i = 0; i < n; i++)
		if (isfinite(v[i])) {
			if (v[i] < *lo)
				*lo = v[i];
			if (v[i] > *hi)
				*hi = v[i];
		}
}

/* ---- options ------------------------------------------------------------ */

typedef struct popts {
	const char *kind, *input, *out, *title, *format;
	char *ids[MAX_IDS];
	size_t nids;
	const char *x, *y, *color, *tmpl, *sat;
	char *tracks[MAX_TRACKS];
	size_t ntracks;
	char *logargs[600];
	size_t nlogargs;
	int w, h, verbose, iface;
	double trend;
	int trend_given;
	double top, base;
} popts;

static void base_layout(canvas *cv, double legend_w)
{
	legend_w = fmin(legend_w, cv->w * 0.3);
	cv->px0 = 78;
	cv->py0 = 44;
	cv->px1 = cv->w - legend_w - 24;
	cv->py1 = cv->h - 34 - 48;
	cv->legend_x = cv->px1 + 18;
	cv->legend_y = cv->py0 + 10;
}

/* ---- AVO curves --------------------------------------------------------- */

static int fits_avo(const cJSON *r)
{
	const cJSON *e;
	if (!cJSON_IsArray(cJSON_GetObjectItemCaseSensitive(r, "angle")))
		return 0;
	cJSON_ArrayForEach(
	    e, r) if (e->string && strncmp(e->string, "rpp_", 4) == 0) return 1;
	return 0;
}

/* Is member name a reflectivity curve: the exact real part or an
 * approximation (not the exact imaginary part, modulus or phase)? */
static int avo_member(const char *name)
{
	return strncmp(name, "rpp_", 4) == 0 && strcmp(name, "rpp_im") &&
	       strcmp(name, "rpp_abs") && strcmp(name, "rpp_phase");
}

/* Row k of a reflectivity member: the member itself when 1-D, its row k
 * when [interface][angle]. */
static const cJSON *avo_row(const cJSON *m, int k)
{
	const cJSON *first = cJSON_GetArrayItem(m, 0);
	if (cJSON_IsArray(first))
		return cJSON_GetArrayItem(m, k);
	return k == 0 ? m : NULL;
}

static int n_interfaces(const cJSON *r)
{
	const cJSON *e;
	cJSON_ArrayForEach(e, r) if (e->string && avo_member(e->string))
	{
		const cJSON *first = cJSON_GetArrayItem(e, 0);
		return cJSON_IsArray(first) ? cJSON_GetArraySize(e) : 1;
	}
	return 0;
}

static int plot_avo(canvas *cv, const popts *po, const answers *A, char *method,
                    size_t msize)
{
	const answer *sel[16];
	char methods[16][40];
	int nsel, nm = 0, nrun = 0;
	double lo = INFINITY, hi = -INFINITY, alo = INFINITY, ahi = -INFINITY;
	char lab[256];
	size_t ml = 0;

	nsel = pick(A, (char **)po->ids, po->nids, fits_avo,
	            "reflectivity against angle (reflect.interface with an "
	            "angle array)",
	            sel, 16);
	if (nsel < 0)
		return CLI_EXIT_INPUT;
	/* Ranges, and the methods in a stable order (colours by method). */
	for (int s = 0; s < nsel; s++) {
		const cJSON *r = sel[s]->result, *e;
		size_t n;
		double *ang =
		    nums(cJSON_GetObjectItemCaseSensitive(r, "angle"), &n);
		if (!ang) {
			fprintf(stderr,
			        WHO ": %s: angle is not an array of "
			            "numbers\n",
			        sel[s]->id);
			return CLI_EXIT_INPUT;
		}
		range_of(ang, n, &alo, &ahi);
		free(ang);
		cJSON_ArrayForEach(e, r)
		{
			int ni = n_interfaces(r), known = 0;
			if (!e->string || !avo_member(e->string))
				continue;
			for (int k = 0; k < ni; k++) {
				size_t m;
				double *v = nums(avo_row(e, k), &m);
				if (v)
					range_of(v, m, &lo, &hi);
				free(v);
			}
			for (int k = 0; k < nm; k++)
				known |= strcmp(methods[k], e->string) == 0;
			if (!known && nm < 16)
				snprintf(methods[nm++], sizeof methods[0], "%s",
				         e->string);
		}
	}
	if (!isfinite(lo)) {
		fprintf(stderr, WHO ": %s: every reflectivity is null\n",
		        A->src);
		return CLI_EXIT_INPUT;
	}
	base_layout(cv, 250);
	cv->x0 = alo, cv->x1 = ahi;
	cv->y0 = lo, cv->y1 = hi;
	pad_range(&cv->y0, &cv->y1, 0.08);
	if (cv->x1 <= cv->x0)
		cv->x1 = cv->x0 + 1;
	snprintf(lab, sizeof lab, "incidence angle [%s]",
	         unit_of(sel[0]->result, "angle")
	             ? unit_of(sel[0]->result, "angle")
	             : "deg");
	axes(cv, lab, "PP reflection coefficient", 8, 6);
	/* the zero line */
	cairo_set_line_width(cv->cr, 1);
	set_rgb(cv, c_trend);
	if (cv->y0 < 0 && cv->y1 > 0) {
		cairo_move_to(cv->cr, cv->px0, floor(map_y(cv, 0)) + 0.5);
		cairo_line_to(cv->cr, cv->px1, floor(map_y(cv, 0)) + 0.5);
		cairo_stroke(cv->cr);
	}
	legend_heading(cv, "method (colour)");
	for (int k = 0; k < nm; k++)
		legend(cv, series_colour(k), 0, 0,
		       strcmp(methods[k], "rpp_re") == 0
		           ? "zoeppritz (exact, real part)"
		           : methods[k] + 4);
	legend_heading(cv, "case (line style)");
	for (int s = 0; s < nsel; s++) {
		const cJSON *r = sel[s]->result;
		size_t n;
		double *ang =
		    nums(cJSON_GetObjectItemCaseSensitive(r, "angle"), &n);
		int ni = n_interfaces(r);
		if (!ang)
			return CLI_EXIT_INPUT;
		for (int k = 0; k < ni; k++) {
			char cas[200];
			if (po->iface >= 0 && k != po->iface)
				continue;
			if (ni > 1)
				snprintf(cas, sizeof cas, "%s interface %d",
				         sel[s]->id[0] ? sel[s]->id : "answer",
				         k);
			else
				snprintf(cas, sizeof cas, "%s",
				         sel[s]->id[0] ? sel[s]->id : "answer");
			for (int mth = 0; mth < nm; mth++) {
				const cJSON *m =
				    cJSON_GetObjectItemCaseSensitive(
				        r, methods[mth]);
				size_t len;
				double *v =
				    m ? nums(avo_row(m, k), &len) : NULL;
				char sl[300];
				if (!v)
					continue;
				snprintf(sl, sizeof sl, "%s: %s", cas,
				         methods[mth]);
				curve(cv, len < n ? len : n, ang, v,
				      series_colour(mth),
				      strcmp(methods[mth], "rpp_re") == 0 ? 2.4
				                                          : 1.6,
				      nrun, sl);
				free(v);
			}
			legend(cv, c_ink, nrun, 0, cas);
			nrun++;
		}
		free(ang);
	}
	ml += (size_t)snprintf(method, msize, "reflect.interface (");
	for (int k = 0; k < nm && ml < msize; k++)
		ml += (size_t)snprintf(
		    method + ml, msize - ml, "%s%s", k ? ", " : "",
		    strcmp(methods[k], "rpp_re") == 0 ? "zoeppritz exact"
		                                      : methods[k] + 4);
	if (ml < msize)
		snprintf(method + ml, msize - ml, ") from %s", A->src);
	return 0;
}

/* ---- intercept-gradient crossplot --------------------------------------- */

static int fits_ig(const cJSON *r)
{
	return cJSON_GetObjectItemCaseSensitive(r, "intercept") &&
	       cJSON_GetObjectItemCaseSensitive(r, "gradient");
}

static double *scalar_or_array(const cJSON *v, size_t *n)
{
	if (cJSON_IsNumber(v) || cJSON_IsNull(v)) {
		double *d = malloc(sizeof *d);
		if (d)
			*d = cJSON_IsNumber(v) ? v->valuedouble : NAN;
		*n = 1;
		return d;
	}
	return nums(v, n);
}

static double num_or(const cJSON *r, const char *name, double dflt)
{
	const cJSON *v = cJSON_GetObjectItemCaseSensitive(r, name);
	return cJSON_IsNumber(v) ? v->valuedouble : dflt;
}

/* The class of (a, b) by the daemon's rule (reflect.md; Rutherford &
 * Williams 1989 classes I-III, IIp, Castagna, Swan & Foster 1998 class
 * IV), for shading only: the labels drawn come from the answer. */
static int ig_class(double a, double b, double a_small, double s2)
{
	if (a > a_small)
		return b < 0 ? 1 : 0;
	if (a >= -a_small)
		return b < 0 ? ((a > 0 && a + b * s2 < 0) ? 5 : 2) : 0;
	return b < 0 ? 3 : 4;
}

static int plot_ig(canvas *cv, const popts *po, const answers *A, char *method,
                   size_t msize)
{
	static const char *const cname[6] = {NULL,  "I",  "II",
	                                     "III", "IV", "IIp"};
	static const int ccol[6] = {-1,      OI_BLUE,   OI_GREEN,
	                            OI_VERM, OI_PURPLE, OI_SKY};
	const answer *sel[16];
	int nsel = pick(A, (char **)po->ids, po->nids, fits_ig,
	                "intercept and gradient (reflect.interface)", sel, 16);
	double amax = 0, bmax = 0, a_small = 0.02, theta = 30, s2;
	double slope = po->trend_given ? po->trend : -1.0;
	char lab[200];

	if (nsel < 0)
		return CLI_EXIT_INPUT;
	a_small = num_or(sel[0]->result, "class_a_small", a_small);
	theta = num_or(sel[0]->result, "class_theta_max", theta);
	if (unit_of(sel[0]->result, "class_theta_max") &&
	    strcmp(unit_of(sel[0]->result, "class_theta_max"), "rad") == 0)
		theta *= 180 / M_PI;
	s2 = pow(sin(theta * M_PI / 180), 2);
	for (int s = 0; s < nsel; s++) {
		size_t na, nb;
		double *a = scalar_or_array(cJSON_GetObjectItemCaseSensitive(
		                                sel[s]->result, "intercept"),
		                            &na);
		double *b = scalar_or_array(cJSON_GetObjectItemCaseSensitive(
		                                sel[s]->result, "gradient"),
		                            &nb);
		if (!a || !b || na != nb) {
			free(a);
			free(b);
			fprintf(stderr,
			        WHO ": %s: intercept and gradient are not "
			            "numbers of one length\n",
			        sel[s]->id);
			return CLI_EXIT_INPUT;
		}
		for (size_t i = 0; i < na; i++) {
			if (isfinite(a[i]) && fabs(a[i]) > amax)
				amax = fabs(a[i]);
			if (isfinite(b[i]) && fabs(b[i]) > bmax)
				bmax = fabs(b[i]);
		}
		free(a);
		free(b);
	}
	amax = fmax(amax * 1.25, a_small * 3);
	bmax = fmax(bmax * 1.25, amax);
	base_layout(cv, 230);
	cv->x0 = -amax, cv->x1 = amax;
	cv->y0 = -bmax, cv->y1 = bmax;
	/* Class regions, shaded cell by cell on a fine grid of the plane so
	 * the shading follows the rule exactly (one fill per class). */
	clip_area(cv);
	for (int c = 1; c <= 5; c++) {
		const int nx = 240, ny = 240;
		double dx = (cv->x1 - cv->x0) / nx, dy = (cv->y1 - cv->y0) / ny;
		rgb col = okabe_ito[ccol[c]];
		for (int j = 0; j < ny; j++) {
			int start = -1;
			double b = cv->y0 + (j + 0.5) * dy;
			for (int i = 0; i <= nx; i++) {
				double a = cv->x0 + (i + 0.5) * dx;
				int in =
				    i < nx && ig_class(a, b, a_small, s2) == c;
				if (in && start < 0)
					start = i;
				if (!in && start >= 0) {
					double xa =
					    map_x(cv, cv->x0 + start * dx);
					double xb = map_x(cv, cv->x0 + i * dx);
					double ya = map_y(cv, cv->y0 + j * dy);
					double yb =
					    map_y(cv, cv->y0 + (j + 1) * dy);
					cairo_rectangle(cv->cr, xa,
					                fmin(ya, yb), xb - xa,
					                fabs(yb - ya));
					start = -1;
				}
			}
		}
		cairo_set_source_rgba(cv->cr, col.r, col.g, col.b, 0.16);
		cairo_fill(cv->cr);
	}
	unclip(cv);
	snprintf(lab, sizeof lab, "intercept A");
	axes(cv, lab, "gradient B", 6, 6);
	/* Class names where each region is widest. */
	text(cv, map_x(cv, amax * 0.62), map_y(cv, -bmax * 0.85), 12, 1, 0,
	     c_ink, "I");
	text(cv, map_x(cv, 0), map_y(cv, -bmax * 0.92), 12, 1, 0, c_ink, "II");
	text(cv, map_x(cv, -amax * 0.62), map_y(cv, -bmax * 0.85), 12, 1, 0,
	     c_ink, "III");
	text(cv, map_x(cv, -amax * 0.62), map_y(cv, bmax * 0.8), 12, 1, 0,
	     c_ink, "IV");
	/* Background trend B = slope * A. */
	{
		double xs[2] = {-amax, amax},
		       ys[2] = {-amax * slope, amax * slope};
		char tl[120];
		snprintf(tl, sizeof tl, "background trend B = %.3g A", slope);
		curve(cv, 2, xs, ys, c_trend, 1.4, 1, tl);
	}
	legend_heading(cv, "AVO class (shading)");
	for (int c = 1; c <= 5; c++) {
		rgb col = okabe_ito[ccol[c]];
		double x = cv->legend_x, y = cv->legend_y;
		cairo_set_source_rgba(cv->cr, col.r, col.g, col.b, 0.35);
		cairo_rectangle(cv->cr, x, y - 9, 22, 11);
		cairo_fill(cv->cr);
		text(cv, x + 28, y, 10, 0, 0, c_ink, cname[c]);
		cv->legend_y += 15;
	}
	snprintf(lab, sizeof lab,
	         "|A| <= %.3g near zero; IIp: A+B sin^2 %.3g "
	         "deg < 0",
	         a_small, theta);
	text(cv, cv->legend_x, cv->legend_y, 8.5, 0, 0, c_ink, lab);
	cv->legend_y += 14;
	legend(cv, c_trend, 1, 0,
	       po->trend_given ? "background trend (--trend)"
	                       : "background trend, slope -1");
	legend_heading(cv, "interfaces (points)");
	for (int s = 0; s < nsel; s++) {
		const cJSON *r = sel[s]->result;
		const cJSON *cls = cJSON_GetObjectItemCaseSensitive(r, "class");
		size_t na, nb;
		double *a = scalar_or_array(
		    cJSON_GetObjectItemCaseSensitive(r, "intercept"), &na);
		double *b = scalar_or_array(
		    cJSON_GetObjectItemCaseSensitive(r, "gradient"), &nb);
		rgb col = series_colour(s);
		char sl[200];
		snprintf(sl, sizeof sl, "%s",
		         sel[s]->id[0] ? sel[s]->id : "answer");
		if (!a || !b) {
			free(a);
			free(b);
			return CLI_EXIT_INPUT;
		}
		points(cv, na, a, b, NULL, col, 4.5, sl);
		for (size_t i = 0; i < na; i++) {
			const cJSON *c = cJSON_IsArray(cls)
			                     ? cJSON_GetArrayItem(cls, (int)i)
			                     : cls;
			char t[64];
			if (!isfinite(a[i]) || !isfinite(b[i]))
				continue;
			snprintf(t, sizeof t, "%s",
			         cJSON_IsString(c) ? c->valuestring : "-");
			text(cv, map_x(cv, a[i]) + 7, map_y(cv, b[i]) - 5, 9.5,
			     0, 0, c_ink, t);
		}
		legend(cv, col, 0, 1, sl);
		free(a);
		free(b);
	}
	snprintf(method, msize,
	         "reflect.interface intercept and gradient (Shuey 1985), "
	         "classes as the daemon's rule (Rutherford & Williams 1989; "
	         "Castagna et al. 1998); trend slope %.3g%s; from %s",
	         slope, po->trend_given ? " (--trend)" : " (common practice)",
	         A->src);
	return 0;
}

/* ---- a table of curves (LAS/CSV or an answer) --------------------------- */

typedef struct table {
	size_t ncol, nrow;
	char *name[MAX_COLS];
	char *unit[MAX_COLS];
	double *col[MAX_COLS];
	int qc; /* column of the QC flags, -1 none */
	char src[512];
	char how[256];
} table;

static void table_free(table *T)
{
	for (size_t i = 0; i < T->ncol; i++) {
		free(T->name[i]);
		free(T->unit[i]);
		free(T->col[i]);
	}
	T->ncol = 0;
}

static int table_find(const table *T, const char *name)
{
	for (size_t i = 0; i < T->ncol; i++)
		if (strcasecmp(T->name[i], name) == 0)
			return (int)i;
	return -1;
}

static void table_names(const table *T, char *buf, size_t size)
{
	size_t l = 0;
	buf[0] = '\0';
	for (size_t i = 0; i < T->ncol && l + 40 < size; i++)
		l += (size_t)snprintf(buf + l, size - l, "%s%s", i ? " " : "",
		                      T->name[i]);
}

/* Reads a LAS or CSV file (every row) into T. */
static int read_log(table *T, const char *path, int csv)
{
	cli_las_reader *r = cli_las_reader_new();
	FILE *f = fopen(path, "rb");
	double *block = NULL;
	size_t cap = 0, nc = 0;
	int rc = CLI_EXIT_INPUT, st;

	if (!r || !f) {
		fprintf(stderr, WHO ": %s: %s\n", path,
		        f ? "out of memory" : strerror(errno));
		goto out;
	}
	if (csv)
		cli_las_set_csv(r, -999.25);
	while ((st = cli_las_read(r, f)) == CLI_LAS_HEADER) {
		nc = cli_las_ncurves(r);
		if (nc == 0 || nc > MAX_COLS) {
			fprintf(stderr, WHO ": %s: %zu curves\n", path, nc);
			goto out;
		}
		T->ncol = nc;
		T->qc = -1;
		for (size_t i = 0; i < nc; i++) {
			const cli_las_line *c = cli_las_curve(r, i);
			T->name[i] = strdup(c->mnem);
			T->unit[i] = strdup(c->unit ? c->unit : "");
			T->col[i] = NULL;
			if (!T->name[i] || !T->unit[i])
				goto out;
			if (strcasecmp(c->mnem, "qc") == 0)
				T->qc = (int)i;
		}
		block = malloc(4096 * nc * sizeof *block);
		if (!block)
			goto out;
		cli_las_set_block(r, block, 4096);
	}
	for (;;) {
		size_t nr;
		if (st == CLI_LAS_ERR) {
			fprintf(stderr, WHO ": %s: %s\n", path,
			        cli_las_error(r));
			goto out;
		}
		nr = cli_las_rows(r);
		if (nr == 0)
			break;
		if (T->nrow + nr > cap) {
			size_t ncap = cap ? cap * 2 : 8192;
			while (ncap < T->nrow + nr)
				ncap *= 2;
			for (size_t i = 0; i < nc; i++) {
				double *d =
				    realloc(T->col[i], ncap * sizeof *d);
				if (!d) {
					fprintf(stderr,
					        WHO ": out of memory\n");
					goto out;
				}
				T->col[i] = d;
			}
			cap = ncap;
		}
		for (size_t k = 0; k < nr; k++)
			for (size_t i = 0; i < nc; i++)
				T->col[i][T->nrow + k] = block[k * nc + i];
		T->nrow += nr;
		cli_las_set_block(r, block, 4096);
		st = cli_las_read(r, f);
	}
	if (T->nrow == 0) {
		fprintf(stderr, WHO ": %s: no data rows\n", path);
		goto out;
	}
	rc = 0;
out:
	free(block);
	if (f)
		fclose(f);
	cli_las_reader_free(r);
	return rc;
}

static int ends_ci(const char *s, const char *suf)
{
	size_t a = strlen(s), b = strlen(suf);
	return a >= b && strcasecmp(s + a - b, suf) == 0;
}

/* A log through log.process (by `rockwire log`'s own code) unless it
 * already has a qc curve; the result in T. */
static int load_log(table *T, const cli_opts *o, const popts *po)
{
	char tmp[] = "/tmp/rockwire-plot-XXXXXX.csv";
	const char *path = po->input;
	int csv = ends_ci(path, ".csv"), rc, fd;
	char *argv[620];
	int argc = 0;

	memset(T, 0, sizeof *T);
	T->qc = -1;
	snprintf(T->src, sizeof T->src, "%s", path);
	if (strcmp(path, "-") == 0) {
		fprintf(stderr, WHO ": a log is read from a file, not stdin\n");
		return CLI_EXIT_USAGE;
	}
	rc = read_log(T, path, csv);
	if (rc)
		return rc;
	if (T->qc >= 0 && po->nlogargs == 0) {
		snprintf(T->how, sizeof T->how, "curves as in the file");
		return 0;
	}
	table_free(T);
	T->nrow = 0;
	fd = mkstemps(tmp, 4);
	if (fd < 0) {
		fprintf(stderr, WHO ": temporary file: %s\n", strerror(errno));
		return CLI_EXIT_IO;
	}
	close(fd);
	argv[argc++] = (char *)path;
	argv[argc++] = "-o";
	argv[argc++] = tmp;
	argv[argc++] = "--format";
	argv[argc++] = "csv";
	argv[argc++] = "--no-progress";
	for (size_t i = 0; i < po->nlogargs; i++)
		argv[argc++] = po->logargs[i];
	argv[argc] = NULL;
	rc = cli_cmd_log(o, argc, argv);
	if (rc == 0)
		rc = read_log(T, tmp, 1);
	unlink(tmp);
	snprintf(T->how, sizeof T->how, "log.process");
	return rc;
}

/* Every 1-D numeric array member of a result as a column. */
static int table_from_result(table *T, const answer *a, const char *src)
{
	const cJSON *e;
	size_t n = 0;

	memset(T, 0, sizeof *T);
	T->qc = -1;
	snprintf(T->src, sizeof T->src, "%.360s%s%.120s", src,
	         a->id[0] ? " " : "", a->id);
	cJSON_ArrayForEach(e, a->result)
	{
		size_t len;
		double *d;
		if (!e->string || T->ncol == MAX_COLS)
			continue;
		d = nums(e, &len);
		if (!d)
			continue;
		if (n == 0)
			n = len;
		if (len != n || len == 0) {
			free(d);
			continue;
		}
		T->name[T->ncol] = strdup(e->string);
		T->unit[T->ncol] = strdup(unit_of(a->result, e->string)
		                              ? unit_of(a->result, e->string)
		                              : "");
		T->col[T->ncol] = d;
		if (strcmp(e->string, "qc") == 0)
			T->qc = (int)T->ncol;
		T->ncol++;
	}
	T->nrow = n;
	snprintf(T->how, sizeof T->how, "an answer");
	return T->ncol ? 0 : CLI_EXIT_INPUT;
}

/* ---- QC legend ---------------------------------------------------------- */

enum {
	QC_IMPOSSIBLE,
	QC_IMPLAUSIBLE,
	QC_PREDICTED,
	QC_OUTSIDE,
	QC_INPUT,
	QC_NCLASS
};
static const char *const qc_class_name[QC_NCLASS] = {
    "impossible", "implausible", "predicted", "outside_calibration", "input"};
static const int qc_class_col[QC_NCLASS] = {OI_VERM, OI_ORANGE, OI_GREEN,
                                            OI_PURPLE, OI_SKY};

typedef struct qclegend {
	cJSON *info;
	const char *name[64];
	int cls[64]; /* QC_* or -1 */
	int known;
} qclegend;

/* service.info's QC legend from the daemon (a connection of its own);
 * without one, bits are named "bit N" and put in the input class. */
static void qc_fetch(qclegend *L, const cli_opts *o)
{
	cli_conn c;
	cJSON *resp = NULL;
	const cJSON *flags, *q;

	memset(L, 0, sizeof *L);
	for (int i = 0; i < 64; i++)
		L->cls[i] = QC_INPUT;
	if (cli_connect(o, &c)) {
		fprintf(stderr, WHO ": no daemon for the QC legend: flags are "
		                    "shown by bit number\n");
		return;
	}
	if (cli__roundtrip(&c, WHO, "service.info", NULL, 1,
	                   cli__now_ms() + 20000, &resp) == 0) {
		L->info = resp;
		flags = cJSON_GetObjectItemCaseSensitive(
		    cJSON_GetObjectItemCaseSensitive(resp, "result"),
		    "qc_flags");
		cJSON_ArrayForEach(q, flags)
		{
			const cJSON *ix =
			    cJSON_GetObjectItemCaseSensitive(q, "index");
			const cJSON *nm =
			    cJSON_GetObjectItemCaseSensitive(q, "name");
			const cJSON *cl =
			    cJSON_GetObjectItemCaseSensitive(q, "class");
			int b = cJSON_IsNumber(ix) ? (int)ix->valuedouble : -1;
			if (b < 0 || b > 63)
				continue;
			L->name[b] =
			    cJSON_IsString(nm) ? nm->valuestring : NULL;
			for (int k = 0; k < QC_NCLASS; k++)
				if (cJSON_IsString(cl) &&
				    strcmp(cl->valuestring, qc_class_name[k]) ==
				        0)
					L->cls[b] = k;
		}
		L->known = 1;
	}
	cli_disconnect(&c);
}

/* The most severe class of a flag word, or -1 for clean. */
static int qc_worst(const qclegend *L, double f)
{
	uint64_t v = isfinite(f) && f >= 0 ? (uint64_t)f : 0;
	int worst = -1;
	for (int b = 0; b < 64; b++)
		if (v >> b & 1u)
			if (worst < 0 || L->cls[b] < worst)
				worst = L->cls[b];
	return worst;
}

/* ---- crossplots --------------------------------------------------------- */

/* A rock.template answer: axes porosity and sw, node grids of
 * attributes ([porosity][sw] or [sw][porosity], told apart by the axes'
 * lengths; a third axis takes its first slice). Draws iso-porosity and
 * iso-saturation lines of attributes xn, yn. */
static int draw_template(canvas *cv, const char *path, const char *xn,
                         const char *yn, int draw, char *note, size_t nsize)
{
	answers A;
	const cJSON *r = NULL, *gx, *gy;
	double *phi = NULL, *sw = NULL;
	size_t nphi = 0, nsw = 0;
	int rc = CLI_EXIT_INPUT, order = -1;

	if (load_answers(&A, path))
		return CLI_EXIT_INPUT;
	for (size_t i = 0; i < A.n && !r; i++)
		if (A.a[i].result &&
		    cJSON_GetObjectItemCaseSensitive(A.a[i].result,
		                                     "porosity") &&
		    cJSON_GetObjectItemCaseSensitive(A.a[i].result, "sw"))
			r = A.a[i].result;
	if (!r) {
		fprintf(stderr,
		        WHO ": --template %s: no rock.template answer (with "
		            "porosity and sw axes) in it\n",
		        path);
		goto out;
	}
	phi = nums(cJSON_GetObjectItemCaseSensitive(r, "porosity"), &nphi);
	sw = nums(cJSON_GetObjectItemCaseSensitive(r, "sw"), &nsw);
	gx = cJSON_GetObjectItemCaseSensitive(r, xn);
	gy = cJSON_GetObjectItemCaseSensitive(r, yn);
	if (!phi || !sw || nphi < 2 || nsw < 2) {
		fprintf(stderr,
		        WHO ": --template %s: porosity and sw must be arrays "
		            "of 2 or more numbers\n",
		        path);
		goto out;
	}
	if (!cJSON_IsArray(gx) || !cJSON_IsArray(gy)) {
		fprintf(stderr,
		        WHO ": --template %s: the template has no %s grid "
		            "(the crossplot's %s)\n",
		        path, !cJSON_IsArray(gx) ? xn : yn,
		        !cJSON_IsArray(gx) ? "x" : "y");
		goto out;
	}
	{
		/* a 3-D grid: its first slice */
		const cJSON *f = cJSON_GetArrayItem(gx, 0);
		if (cJSON_IsArray(f) &&
		    cJSON_IsArray(cJSON_GetArrayItem(f, 0))) {
			gx = f;
			gy = cJSON_GetArrayItem(gy, 0);
		}
	}
	if ((size_t)cJSON_GetArraySize(gx) == nphi &&
	    (size_t)cJSON_GetArraySize(cJSON_GetArrayItem(gx, 0)) == nsw)
		order = 0; /* [phi][sw] */
	else if ((size_t)cJSON_GetArraySize(gx) == nsw &&
	         (size_t)cJSON_GetArraySize(cJSON_GetArrayItem(gx, 0)) == nphi)
		order = 1; /* [sw][phi] */
	if (order < 0) {
		fprintf(stderr,
		        WHO ": --template %s: the %s grid is neither "
		            "[phi][sw] nor [sw][phi] (%zu x %zu)\n",
		        path, xn, nphi, nsw);
		goto out;
	}
	if (!draw) {
		/* widen the crossplot's ranges to the template's nodes */
		for (size_t i = 0; i < nphi * nsw; i++) {
			size_t a = order ? i / nphi : i / nsw;
			size_t b = order ? i % nphi : i % nsw;
			const cJSON *vx = cJSON_GetArrayItem(
			    cJSON_GetArrayItem(gx, (int)a), (int)b);
			const cJSON *vy = cJSON_GetArrayItem(
			    cJSON_GetArrayItem(gy, (int)a), (int)b);
			if (cJSON_IsNumber(vx) && cJSON_IsNumber(vy)) {
				range_of(&vx->valuedouble, 1, &cv->x0, &cv->x1);
				range_of(&vy->valuedouble, 1, &cv->y0, &cv->y1);
			}
		}
		rc = 0;
		goto out;
	}
	clip_area(cv);
	cairo_set_line_width(cv->cr, 1);
	set_rgb(cv, c_tmpl);
	for (int pass = 0; pass < 2; pass++) {
		/* pass 0: iso-porosity (sw varies); 1: iso-saturation */
		size_t nl = pass ? nsw : nphi, np = pass ? nphi : nsw;
		for (size_t l = 0; l < nl; l++) {
			int pen = 0;
			double lx = NAN, ly = NAN, fx = NAN, fy = NAN;
			for (size_t p = 0; p < np; p++) {
				size_t ip = pass ? p : l, is = pass ? l : p;
				const cJSON *rx = cJSON_GetArrayItem(
				    gx, (int)(order ? is : ip));
				const cJSON *ry = cJSON_GetArrayItem(
				    gy, (int)(order ? is : ip));
				const cJSON *vx = cJSON_GetArrayItem(
				    rx, (int)(order ? ip : is));
				const cJSON *vy = cJSON_GetArrayItem(
				    ry, (int)(order ? ip : is));
				if (!cJSON_IsNumber(vx) ||
				    !cJSON_IsNumber(vy)) {
					pen = 0;
					continue;
				}
				lx = map_x(cv, vx->valuedouble);
				ly = map_y(cv, vy->valuedouble);
				if (!pen)
					fx = lx, fy = ly;
				if (pen)
					cairo_line_to(cv->cr, lx, ly);
				else
					cairo_move_to(cv->cr, lx, ly);
				pen = 1;
			}
			cairo_stroke(cv->cr);
			if (isfinite(lx)) {
				char t[32];
				snprintf(t, sizeof t, "%s %.2g",
				         pass ? "sw" : "phi",
				         pass ? sw[l] : phi[l]);
				if (pass) /* iso-saturation: at its high phi end
				           */
					text(cv, lx + 3, ly - 2, 8, 0, 0,
					     c_trend, t);
				else /* iso-porosity: at its sw = first end */
					text(cv, fx - 3, fy + 10, 8, 2, 0,
					     c_trend, t);
				set_rgb(cv, c_tmpl);
			}
		}
	}
	unclip(cv);
	snprintf(note, nsize, "; rock.template grid from %s (%zu phi x %zu sw)",
	         path, nphi, nsw);
	rc = 0;
out:
	free(phi);
	free(sw);
	answers_free(&A);
	return rc;
}

static int plot_cross(canvas *cv, const popts *po, const cli_opts *o, table *T,
                      char *method, size_t msize)
{
	const char *xn = po->x ? po->x : "ai", *yn = po->y ? po->y : "vpvs";
	const char *cn = po->color;
	int ix = table_find(T, xn), iy = table_find(T, yn), ic = -1;
	double lo = INFINITY, hi = -INFINITY;
	char lx[160], ly[160], names[2048], tnote[600] = "";
	unsigned char *sel;
	size_t plotted = 0;
	qclegend L;

	if (ix < 0 || iy < 0) {
		table_names(T, names, sizeof names);
		fprintf(stderr, WHO ": %s: no curve '%s' (curves: %s)\n",
		        T->src, ix < 0 ? xn : yn, names);
		return CLI_EXIT_USAGE;
	}
	if (cn && strcasecmp(cn, "qc") != 0) {
		ic = table_find(T, cn);
		if (ic < 0) {
			table_names(T, names, sizeof names);
			fprintf(stderr,
			        WHO ": --color %s: no such curve "
			            "(curves: %s)\n",
			        cn, names);
			return CLI_EXIT_USAGE;
		}
	}
	if (!cn && T->qc < 0) {
		int g = table_find(T, "gr");
		ic = g;
	}
	sel = malloc(T->nrow ? T->nrow : 1);
	if (!sel)
		return CLI_EXIT_IO;
	base_layout(cv, 230);
	cv->x0 = INFINITY, cv->x1 = -INFINITY;
	cv->y0 = INFINITY, cv->y1 = -INFINITY;
	range_of(T->col[ix], T->nrow, &cv->x0, &cv->x1);
	range_of(T->col[iy], T->nrow, &cv->y0, &cv->y1);
	if (po->tmpl && draw_template(cv, po->tmpl, T->name[ix], T->name[iy], 0,
	                              tnote, sizeof tnote)) {
		free(sel);
		return CLI_EXIT_INPUT;
	}
	pad_range(&cv->x0, &cv->x1, 0.05);
	pad_range(&cv->y0, &cv->y1, 0.05);
	label_unit(lx, sizeof lx, T->name[ix], T->unit[ix]);
	label_unit(ly, sizeof ly, T->name[iy], T->unit[iy]);
	axes(cv, lx, ly, 7, 6);
	if (po->tmpl && draw_template(cv, po->tmpl, T->name[ix], T->name[iy], 1,
	                              tnote, sizeof tnote)) {
		free(sel);
		return CLI_EXIT_INPUT;
	}
	if (ic >= 0) {
		const int nb = 8;
		char cl[160];
		range_of(T->col[ic], T->nrow, &lo, &hi);
		if (!(hi > lo))
			hi = lo + 1;
		label_unit(cl, sizeof cl, T->name[ic], T->unit[ic]);
		legend_heading(cv, cl);
		for (int k = nb - 1; k >= 0; k--) {
			double a = lo + (hi - lo) * k / nb,
			       b = lo + (hi - lo) * (k + 1) / nb;
			char bl[80], sl[200];
			for (size_t i = 0; i < T->nrow; i++) {
				double v = T->col[ic][i];
				int bin = (int)floor((v - lo) / (hi - lo) * nb);
				if (bin == nb)
					bin = nb - 1;
				sel[i] = isfinite(v) && bin == k;
			}
			snprintf(bl, sizeof bl, "%.4g - %.4g", a, b);
			snprintf(sl, sizeof sl, "%s %s", T->name[ic], bl);
			plotted += points(cv, T->nrow, T->col[ix], T->col[iy],
			                  sel, ramp(k, nb), 2.6, sl);
			legend(cv, ramp(k, nb), 0, 1, bl);
		}
		snprintf(method, msize, "crossplot of %s (%s) coloured by %s%s",
		         T->src, T->how, T->name[ic], tnote);
	} else {
		static const char *const clean = "clean";
		qc_fetch(&L, o);
		legend_heading(cv, "QC class (worst flag)");
		for (int k = -1; k < QC_NCLASS; k++) {
			rgb c = k < 0 ? okabe_ito[OI_BLUE]
			              : okabe_ito[qc_class_col[k]];
			size_t cnt = 0;
			char sl[120];
			for (size_t i = 0; i < T->nrow; i++) {
				int w = T->qc >= 0
				            ? qc_worst(&L, T->col[T->qc][i])
				            : -1;
				sel[i] = w == k;
				cnt += sel[i];
			}
			if (cnt == 0)
				continue;
			snprintf(sl, sizeof sl, "%s (%zu)",
			         k < 0 ? clean : qc_class_name[k], cnt);
			plotted += points(cv, T->nrow, T->col[ix], T->col[iy],
			                  sel, c, 2.6, sl);
			legend(cv, c, 0, 1, sl);
		}
		cJSON_Delete(L.info);
		snprintf(method, msize,
		         "crossplot of %s (%s) coloured by QC class%s%s",
		         T->src, T->how, L.known ? "" : " (no legend: bits)",
		         tnote);
	}
	{
		char t[120];
		snprintf(t, sizeof t, "%zu of %zu samples plotted", plotted,
		         T->nrow);
		cv->legend_y += 6;
		text(cv, cv->legend_x, cv->legend_y, 9, 0, 0, c_ink, t);
	}
	free(sel);
	return 0;
}

/* ---- log tracks --------------------------------------------------------- */

static int plot_tracks(canvas *cv, const popts *po, const cli_opts *o, table *T,
                       char *method, size_t msize)
{
	/* Default tracks: inputs, then computed curves. */
	static const char *const dflt[] = {"GR",    "DT,DTS", "RHOB,DRHO",
	                                   "vp,vs", "ai,si",  "vpvs,nu"};
	char spec[MAX_TRACKS][256];
	int tc[MAX_TRACKS][8], ntc[MAX_TRACKS];
	size_t nt = 0;
	int id = 0; /* depth: the first column */
	double dlo = INFINITY, dhi = -INFINITY, tw, x;
	qclegend L;
	size_t bitcnt[64] = {0};
	char names[2048];

	size_t nspec = po->ntracks ? po->ntracks : sizeof dflt / sizeof *dflt;
	for (size_t k = 0; k < nspec && nt < MAX_TRACKS; k++) {
		char *save = NULL, *tok;
		snprintf(spec[nt], sizeof spec[nt], "%s",
		         po->ntracks ? po->tracks[k] : dflt[k]);
		ntc[nt] = 0;
		for (tok = strtok_r(spec[nt], ",", &save); tok && ntc[nt] < 8;
		     tok = strtok_r(NULL, ",", &save)) {
			int c = table_find(T, tok);
			if (c < 0 && po->ntracks) {
				table_names(T, names, sizeof names);
				fprintf(stderr,
				        WHO ": --track %s: no curve '%s' "
				            "(curves: %s)\n",
				        po->tracks[k], tok, names);
				return CLI_EXIT_USAGE;
			}
			if (c >= 0 && c != T->qc)
				tc[nt][ntc[nt]++] = c;
		}
		if (ntc[nt])
			nt++;
	}
	if (!nt) {
		table_names(T, names, sizeof names);
		fprintf(stderr,
		        WHO ": %s: none of the default curves; name them "
		            "with --track (curves: %s)\n",
		        T->src, names);
		return CLI_EXIT_USAGE;
	}
	range_of(T->col[id], T->nrow, &dlo, &dhi);
	if (isfinite(po->top))
		dlo = po->top;
	if (isfinite(po->base))
		dhi = po->base;
	if (!(dhi > dlo)) {
		fprintf(stderr, WHO ": the depth range is empty\n");
		return CLI_EXIT_USAGE;
	}
	qc_fetch(&L, o);
	cv->px0 = 70;
	cv->py0 = 44 + 16 * 4 + 10;
	cv->py1 = cv->h - 34 - 18;
	{
		double strip = 18.0 * QC_NCLASS + 8, right = 160;
		tw = (cv->w - cv->px0 - strip - right - 16 - 8.0 * nt) / nt;
		if (tw < 30) {
			fprintf(stderr,
			        WHO ": %zu tracks do not fit in %g px; "
			            "widen --size\n",
			        nt, cv->w);
			cJSON_Delete(L.info);
			return CLI_EXIT_USAGE;
		}
	}
	cv->y0 = dlo, cv->y1 = dhi;
	cv->ydown = 1;
	x = cv->px0;
	for (size_t k = 0; k < nt; k++) {
		double hy = 44;
		cv->px0 = x;
		cv->px1 = x + tw;
		for (int j = 0; j < ntc[k]; j++) {
			int c = tc[k][j];
			double lo = INFINITY, hi = -INFINITY;
			char hl[200], sl[200];
			rgb col = series_colour(j); /* per track */
			range_of(T->col[c], T->nrow, &lo, &hi);
			pad_range(&lo, &hi, 0.04);
			cv->x0 = lo, cv->x1 = hi;
			if (j == 0)
				axes_ex(cv, NULL, NULL, 3, 10,
				        AX_NO_XTICKS | (k ? AX_NO_YTICKS : 0));
			snprintf(hl, sizeof hl, "%s %.4g-%.4g%s%s", T->name[c],
			         lo, hi, T->unit[c][0] ? " " : "", T->unit[c]);
			set_rgb(cv, col);
			cairo_rectangle(cv->cr, x, hy + 4, tw, 2.5);
			cairo_fill(cv->cr);
			{
				/* the header shrinks to the track's width */
				double fw = text_width(cv, 9.5, hl) + 4;
				text(cv, x + 2, hy,
				     fw > tw ? 9.5 * tw / fw : 9.5, 0, 0, col,
				     hl);
			}
			snprintf(sl, sizeof sl, "track %zu: %s", k + 1,
			         T->name[c]);
			curve(cv, T->nrow, T->col[c], T->col[id], col, 1.3, 0,
			      sl);
			hy += 16;
		}
		x += tw + 8;
	}
	/* depth label with its unit */
	{
		char dl[120];
		label_unit(dl, sizeof dl, T->name[id], T->unit[id]);
		text(cv, 16, cv->py0 - 8, 9.5, 0, 0, c_ink, dl);
	}
	/* QC strip: one column per class, a bar over each flagged sample's
	 * depth step. */
	cv->px0 = x + 4;
	cv->px1 = cv->px0 + 18.0 * QC_NCLASS;
	for (int k = 0; k < QC_NCLASS; k++) {
		double cx = cv->px0 + k * 18;
		rgb col = okabe_ito[qc_class_col[k]];
		size_t drawn = 0;
		clip_area(cv);
		for (size_t i = 0; T->qc >= 0 && i < T->nrow; i++) {
			double f = T->col[T->qc][i], d = T->col[id][i];
			double dn = i + 1 < T->nrow ? T->col[id][i + 1] : d;
			double dp = i ? T->col[id][i - 1] : d;
			uint64_t v = isfinite(f) && f > 0 ? (uint64_t)f : 0;
			int hit = 0;
			for (int b = 0; b < 64; b++)
				hit |= (v >> b & 1u) && L.cls[b] == k;
			if (!hit || !isfinite(d))
				continue;
			{
				double ya = map_y(cv, (d + dp) / 2);
				double yb = map_y(cv, (d + dn) / 2);
				cairo_rectangle(cv->cr, cx, fmin(ya, yb), 14,
				                fmax(fabs(yb - ya), 1.0));
			}
			drawn++;
		}
		set_rgb(cv, col);
		cairo_fill(cv->cr);
		unclip(cv);
		set_rgb(cv, c_ink);
		cairo_set_line_width(cv->cr, 1);
		cairo_rectangle(cv->cr, floor(cx) + 0.5, floor(cv->py0) + 0.5,
		                14, floor(cv->py1 - cv->py0));
		cairo_stroke(cv->cr);
		text(cv, cx + 10.5, cv->py0 - 4, 8.5, 0, 1, c_ink,
		     qc_class_name[k]);
		{
			char sl[80];
			snprintf(sl, sizeof sl, "QC %s", qc_class_name[k]);
			note_series(cv, "qc", sl, col, drawn);
		}
	}
	/* Flags seen, by name, with counts. */
	for (size_t i = 0; T->qc >= 0 && i < T->nrow; i++) {
		double f = T->col[T->qc][i];
		uint64_t v = isfinite(f) && f > 0 ? (uint64_t)f : 0;
		for (int b = 0; b < 64; b++)
			bitcnt[b] += v >> b & 1u;
	}
	cv->legend_x = cv->px0 + 18.0 * QC_NCLASS + 10;
	cv->legend_y = cv->py0 + 10;
	legend_heading(cv, T->qc >= 0 ? "QC flags (samples)" : "no QC curve");
	for (int b = 0; b < 64; b++) {
		char t[120], bn[16];
		if (!bitcnt[b])
			continue;
		snprintf(bn, sizeof bn, "bit %d", b);
		snprintf(t, sizeof t, "%s: %zu", L.name[b] ? L.name[b] : bn,
		         bitcnt[b]);
		set_rgb(cv, okabe_ito[qc_class_col[L.cls[b]]]);
		cairo_rectangle(cv->cr, cv->legend_x, cv->legend_y - 8, 10, 10);
		cairo_fill(cv->cr);
		text(cv, cv->legend_x + 14, cv->legend_y, 9, 0, 0, c_ink, t);
		cv->legend_y += 14;
	}
	cJSON_Delete(L.info);
	snprintf(method, msize, "log tracks of %s (%s)%s", T->src, T->how,
	         L.known ? "" : "; QC legend unavailable");
	return 0;
}

/* ---- fluid-substitution sweeps ------------------------------------------ */

static int fits_sweep(const cJSON *r)
{
	const cJSON *e;
	if (!cJSON_IsArray(cJSON_GetObjectItemCaseSensitive(r, "vp")) ||
	    !cJSON_IsArray(cJSON_GetObjectItemCaseSensitive(r, "vs")) ||
	    !cJSON_IsArray(cJSON_GetObjectItemCaseSensitive(r, "rho")))
		return 0;
	cJSON_ArrayForEach(e, r) if (e->string &&
	                             strncmp(e->string, "fluid_new_sat_", 14) ==
	                                 0) return 1;
	return 0;
}

static int plot_sweep(canvas *cv, const popts *po, const answers *A,
                      char *method, size_t msize)
{
	const answer *sel[8];
	int nsel = pick(A, (char **)po->ids, po->nids, fits_sweep,
	                "a saturation sweep (rock.substitute with saturation "
	                "arrays)",
	                sel, 8);
	const char *satname = po->sat ? po->sat : "brine";
	char satkey[80], xl[120], yl[3][120];
	double *vals[8][4];
	size_t n[8];
	double gap = 56, pw;
	const char *vu, *ru;

	if (nsel < 0)
		return CLI_EXIT_INPUT;
	snprintf(satkey, sizeof satkey, "fluid_new_sat_%s", satname);
	memset(vals, 0, sizeof vals);
	for (int s = 0; s < nsel; s++) {
		const cJSON *r = sel[s]->result;
		size_t m[4];
		const cJSON *sv = cJSON_GetObjectItemCaseSensitive(r, satkey);
		if (!sv) {
			fprintf(stderr,
			        WHO ": %s: no %s in the answer (--saturation "
			            "names the phase: brine, gas, oil)\n",
			        sel[s]->id, satkey);
			goto fail;
		}
		vals[s][0] = nums(sv, &m[0]);
		vals[s][1] =
		    nums(cJSON_GetObjectItemCaseSensitive(r, "vp"), &m[1]);
		vals[s][2] =
		    nums(cJSON_GetObjectItemCaseSensitive(r, "vs"), &m[2]);
		vals[s][3] =
		    nums(cJSON_GetObjectItemCaseSensitive(r, "rho"), &m[3]);
		if (!vals[s][0] || !vals[s][1] || !vals[s][2] || !vals[s][3] ||
		    m[0] != m[1] || m[1] != m[2] || m[2] != m[3]) {
			fprintf(stderr,
			        WHO ": %s: %s, vp, vs and rho must be "
			            "arrays of one length\n",
			        sel[s]->id, satkey);
			goto fail;
		}
		n[s] = m[0];
		/* vp -> vp, vs -> AI = rho vp, rho -> Vp/Vs */
		for (size_t i = 0; i < n[s]; i++) {
			double vp = vals[s][1][i], vs = vals[s][2][i];
			double rho = vals[s][3][i];
			vals[s][2][i] = rho * vp;
			vals[s][3][i] = vs > 0 ? vp / vs : NAN;
		}
	}
	vu = unit_of(sel[0]->result, "vp");
	ru = unit_of(sel[0]->result, "rho");
	snprintf(xl, sizeof xl, "%s saturation (fraction)", satname);
	snprintf(yl[0], sizeof yl[0], "vp [%s]", vu ? vu : "?");
	snprintf(yl[1], sizeof yl[1], "AI = rho vp [%s*%s]", vu ? vu : "?",
	         ru ? ru : "?");
	snprintf(yl[2], sizeof yl[2], "Vp/Vs");
	pw = (cv->w - 70 - 200 - 2 * gap - 16) / 3;
	for (int p = 0; p < 3; p++) {
		double lo = INFINITY, hi = -INFINITY;
		cv->px0 = 70 + p * (pw + gap);
		cv->px1 = cv->px0 + pw;
		cv->py0 = 44;
		cv->py1 = cv->h - 34 - 48;
		cv->x0 = 0, cv->x1 = 1;
		for (int s = 0; s < nsel; s++)
			range_of(vals[s][p + 1], n[s], &lo, &hi);
		pad_range(&lo, &hi, 0.06);
		cv->y0 = lo, cv->y1 = hi;
		axes(cv, xl, NULL, 4, 6);
		text(cv, cv->px0, cv->py0 - 6, 10.5, 0, 0, c_ink, yl[p]);
		for (int s = 0; s < nsel; s++) {
			char sl[200];
			snprintf(sl, sizeof sl, "%s: %s",
			         sel[s]->id[0] ? sel[s]->id : "answer",
			         p == 0   ? "vp"
			         : p == 1 ? "ai"
			                  : "vpvs");
			curve(cv, n[s], vals[s][0], vals[s][p + 1],
			      series_colour(s), 1.8, 0, sl);
		}
	}
	cv->legend_x = cv->px1 + 18;
	cv->legend_y = cv->py0 + 10;
	legend_heading(cv, "case");
	for (int s = 0; s < nsel; s++)
		legend(cv, series_colour(s), 0, 0,
		       sel[s]->id[0] ? sel[s]->id : "answer");
	snprintf(method, msize,
	         "rock.substitute (Gassmann 1951) saturation sweep from %s; "
	         "AI and Vp/Vs computed here from vp, vs and rho",
	         A->src);
	for (int s = 0; s < nsel; s++)
		for (int k = 0; k < 4; k++)
			free(vals[s][k]);
	return 0;
fail:
	for (int s = 0; s < nsel; s++)
		for (int k = 0; k < 4; k++)
			free(vals[s][k]);
	return CLI_EXIT_INPUT;
}

/* ---- the command -------------------------------------------------------- */

void cli_usage_plot(FILE *f)
{
	fprintf(
	    f,
	    "usage: rockwire plot KIND INPUT -o OUT.png|OUT.svg|OUT.pdf\n"
	    "       [--size WxH] [--title TEXT] [--id ID ...] [--verbose]\n"
	    "       [kind options]\n"
	    "\n"
	    "Draws answers of the daemon (INPUT: response lines or result\n"
	    "objects, e.g. `rockwire send` or `rockwire call` output; '-' is\n"
	    "stdin) or a LAS / CSV log (run through log.process unless it\n"
	    "has a qc curve). The format follows OUT's extension (--format\n"
	    "png|svg|pdf for '-', stdout). Every picture has a caption with\n"
	    "the caution and the method; the file's metadata carries them "
	    "too.\n"
	    "\n"
	    "Kinds:\n"
	    "  avo     reflect.interface answers with an angle array: every\n"
	    "          method's PP reflectivity against angle (colour by\n"
	    "          method, line style by answer or interface)\n"
	    "          [--interface N]\n"
	    "  ig      intercept against gradient of reflect.interface\n"
	    "          answers, with the AVO class regions of the answer's\n"
	    "          own thresholds and a background trend B = S A\n"
	    "          [--trend S] (default -1, common practice)\n"
	    "  cross   two curves of a log or an answer: --x NAME --y NAME\n"
	    "          (default ai, vpvs), coloured by --color NAME or by QC\n"
	    "          class (default), [--template FILE] a rock.template\n"
	    "          answer drawn behind\n"
	    "  tracks  depth tracks of a log, input and computed curves side\n"
	    "          by side, and a QC strip of flagged samples by class\n"
	    "          [--track A,B ...] [--top D] [--base D]\n"
	    "  sweep   rock.substitute answers over a saturation array: vp,\n"
	    "          AI and Vp/Vs against saturation\n"
	    "          [--saturation brine|gas|oil] (default brine)\n"
	    "\n"
	    "Log inputs take `rockwire log` options after --: --set, "
	    "--curve,\n"
	    "--params, --units (e.g. -- --set vs_predict=greenberg_castagna)."
	    "\n"
	    "--verbose lists each series drawn (kind, label, colour, points).\n"
	    "Colours: the colour-blind-safe palette of Okabe & Ito 2008.\n"
	    "\n"
	    "Screening estimates only: not a substitute for qualified "
	    "review,\n"
	    "local regulations and licensed practice; never the sole basis\n"
	    "for well-control decisions.\n"
	    "\n"
	    "Exit codes: 0 ok, 2 usage, 3 no daemon (log inputs), 4 I/O\n"
	    "failure, 5 malformed input (the message says where).\n");
}

static int parse_size(const char *s, int *w, int *h)
{
	char *end;
	long a = strtol(s, &end, 10), b;
	if (end == s || (*end != 'x' && *end != 'X'))
		return -1;
	s = end + 1;
	b = strtol(s, &end, 10);
	if (end == s || *end || a < 200 || b < 150 || a > 8000 || b > 8000)
		return -1;
	*w = (int)a;
	*h = (int)b;
	return 0;
}

static int parse_num(const char *opt, const char *v, double *out)
{
	char *end;
	double x = strtod(v, &end);
	if (end == v || *end || !isfinite(x)) {
		fprintf(stderr, WHO ": %s wants a number, not '%s'\n", opt, v);
		return -1;
	}
	*out = x;
	return 0;
}

int cli_cmd_plot(const cli_opts *o, int argc, char **argv)
{
	static const char *const kinds[] = {"avo", "ig", "cross", "tracks",
	                                    "sweep"};
	static const char *const opts[] = {
	    "--output",     "--size", "--title", "--id",        "--verbose",
	    "--format",     "--x",    "--y",     "--color",     "--template",
	    "--track",      "--top",  "--base",  "--interface", "--trend",
	    "--saturation", "--help"};
	popts po;
	canvas cv;
	answers A;
	table T;
	char method[1400] = "", title[700];
	int rc, fmt = -1, have_answers = 0, have_table = 0;

	memset(&po, 0, sizeof po);
	memset(&T, 0, sizeof T);
	memset(&cv, 0, sizeof cv);
	po.w = 960;
	po.h = 640;
	po.iface = -1;
	po.top = po.base = NAN;
	for (int i = 0; i < argc; i++) {
		const char *a = argv[i];
		const char *v = i + 1 < argc ? argv[i + 1] : NULL;
		int takes = a[0] == '-' && a[1] && strcmp(a, "--verbose") &&
		            strcmp(a, "--") && strcmp(a, "--help");
		if (strcmp(a, "--") == 0) {
			for (i++; i < argc && po.nlogargs < 600; i++)
				po.logargs[po.nlogargs++] = argv[i];
			break;
		}
		if (takes && !v) {
			fprintf(stderr, WHO ": %s needs a value\n", a);
			return CLI_EXIT_USAGE;
		}
		if (strcmp(a, "-o") == 0 || strcmp(a, "--output") == 0)
			po.out = v, i++;
		else if (strcmp(a, "--size") == 0) {
			if (parse_size(v, &po.w, &po.h)) {
				fprintf(stderr,
				        WHO ": --size wants WxH, 200x150 to "
				            "8000x8000, not '%s'\n",
				        v);
				return CLI_EXIT_USAGE;
			}
			i++;
		} else if (strcmp(a, "--title") == 0)
			po.title = v, i++;
		else if (strcmp(a, "--id") == 0) {
			if (po.nids == MAX_IDS) {
				fprintf(stderr, WHO ": at most %d --id\n",
				        MAX_IDS);
				return CLI_EXIT_USAGE;
			}
			po.ids[po.nids++] = argv[++i];
		} else if (strcmp(a, "--verbose") == 0)
			po.verbose = 1;
		else if (strcmp(a, "--format") == 0)
			po.format = v, i++;
		else if (strcmp(a, "--x") == 0)
			po.x = v, i++;
		else if (strcmp(a, "--y") == 0)
			po.y = v, i++;
		else if (strcmp(a, "--color") == 0 ||
		         strcmp(a, "--colour") == 0)
			po.color = v, i++;
		else if (strcmp(a, "--template") == 0)
			po.tmpl = v, i++;
		else if (strcmp(a, "--saturation") == 0)
			po.sat = v, i++;
		else if (strcmp(a, "--track") == 0) {
			if (po.ntracks == MAX_TRACKS) {
				fprintf(stderr, WHO ": at most %d --track\n",
				        MAX_TRACKS);
				return CLI_EXIT_USAGE;
			}
			po.tracks[po.ntracks++] = argv[++i];
		} else if (strcmp(a, "--top") == 0) {
			if (parse_num(a, v, &po.top))
				return CLI_EXIT_USAGE;
			i++;
		} else if (strcmp(a, "--base") == 0) {
			if (parse_num(a, v, &po.base))
				return CLI_EXIT_USAGE;
			i++;
		} else if (strcmp(a, "--trend") == 0) {
			if (parse_num(a, v, &po.trend))
				return CLI_EXIT_USAGE;
			po.trend_given = 1;
			i++;
		} else if (strcmp(a, "--interface") == 0) {
			double d;
			if (parse_num(a, v, &d) || d < 0 || d != floor(d) ||
			    d > 100000) {
				fprintf(stderr, WHO
				        ": --interface wants an index >= 0\n");
				return CLI_EXIT_USAGE;
			}
			po.iface = (int)d;
			i++;
		} else if (a[0] == '-' && a[1]) {
			cli__unknown_option(WHO, a, opts,
			                    sizeof opts / sizeof *opts);
			return CLI_EXIT_USAGE;
		} else if (!po.kind)
			po.kind = a;
		else if (!po.input)
			po.input = a;
		else {
			fprintf(stderr,
			        WHO ": one input only ('%s' is extra)\n", a);
			return CLI_EXIT_USAGE;
		}
	}
	if (!po.kind || !po.input || !po.out) {
		fprintf(stderr, WHO ": %s\n",
		        !po.kind    ? "which kind? avo, ig, cross, tracks or "
		                      "sweep"
		        : !po.input ? "which input? an answers file, '-' or a "
		                      "LAS/CSV log"
		                    : "-o OUT.png|svg|pdf is required");
		fprintf(stderr, "usage: rockwire plot KIND INPUT -o OUT "
		                "(rockwire plot --help)\n");
		return CLI_EXIT_USAGE;
	}
	{
		int known = 0;
		for (size_t k = 0; k < sizeof kinds / sizeof *kinds; k++)
			known |= strcmp(po.kind, kinds[k]) == 0;
		if (!known) {
			const char *s = cli__suggest(po.kind, kinds, 5);
			fprintf(stderr,
			        WHO ": unknown kind '%s'%s%s%s (avo, ig, "
			            "cross, tracks, sweep)\n",
			        po.kind, s ? "; did you mean " : "", s ? s : "",
			        s ? "?" : "");
			return CLI_EXIT_USAGE;
		}
	}
	{
		const char *f = po.format;
		if (!f) {
			if (ends_ci(po.out, ".png"))
				f = "png";
			else if (ends_ci(po.out, ".svg"))
				f = "svg";
			else if (ends_ci(po.out, ".pdf"))
				f = "pdf";
		}
		if (f && strcmp(f, "png") == 0)
			fmt = FMT_PNG;
		else if (f && strcmp(f, "svg") == 0)
			fmt = FMT_SVG;
		else if (f && strcmp(f, "pdf") == 0)
			fmt = FMT_PDF;
		if (fmt < 0) {
			fprintf(stderr,
			        WHO ": -o %s: the extension (or --format) must "
			            "be png, svg or pdf\n",
			        po.out);
			return CLI_EXIT_USAGE;
		}
	}
	if (po.nlogargs && strcmp(po.kind, "tracks") &&
	    strcmp(po.kind, "cross")) {
		fprintf(stderr, WHO ": options after -- go to log.process, for "
		                    "tracks and cross of a log only\n");
		return CLI_EXIT_USAGE;
	}
	/* Inputs. */
	if (strcmp(po.kind, "tracks") == 0 ||
	    (strcmp(po.kind, "cross") == 0 &&
	     (ends_ci(po.input, ".las") || ends_ci(po.input, ".csv")))) {
		rc = load_log(&T, o, &po);
		if (rc)
			goto out;
		have_table = 1;
	} else {
		rc = load_answers(&A, po.input);
		if (rc)
			return rc;
		have_answers = 1;
	}
	if (strcmp(po.kind, "cross") == 0 && !have_table) {
		const answer *sel[1];
		const char *xn = po.x ? po.x : "ai";
		int k;
		/* The first result with the x curve. */
		for (k = 0; k < (int)A.n; k++)
			if (A.a[k].result &&
			    (po.nids ? strcmp(A.a[k].id, po.ids[0]) == 0
			             : cJSON_GetObjectItemCaseSensitive(
			                   A.a[k].result, xn) != NULL))
				break;
		if (k == (int)A.n) {
			fprintf(stderr, WHO ": %s: no answer with %s%s%s\n",
			        A.src, po.nids ? "id " : "curve ",
			        po.nids ? po.ids[0] : xn,
			        po.nids ? "" : " (--x names the curve)");
			rc = CLI_EXIT_INPUT;
			goto out;
		}
		sel[0] = &A.a[k];
		if (table_from_result(&T, sel[0], A.src)) {
			fprintf(stderr,
			        WHO ": %s: the answer has no numeric "
			            "arrays\n",
			        A.src);
			rc = CLI_EXIT_INPUT;
			goto out;
		}
		have_table = 1;
	}
	if (canvas_open(&cv, fmt, po.w, po.h)) {
		fprintf(stderr, WHO ": cairo could not make a %dx%d surface\n",
		        po.w, po.h);
		rc = CLI_EXIT_IO;
		goto out;
	}
	cv.verbose = po.verbose;
	if (strcmp(po.kind, "avo") == 0)
		rc = plot_avo(&cv, &po, &A, method, sizeof method);
	else if (strcmp(po.kind, "ig") == 0)
		rc = plot_ig(&cv, &po, &A, method, sizeof method);
	else if (strcmp(po.kind, "sweep") == 0)
		rc = plot_sweep(&cv, &po, &A, method, sizeof method);
	else if (strcmp(po.kind, "cross") == 0)
		rc = plot_cross(&cv, &po, o, &T, method, sizeof method);
	else
		rc = plot_tracks(&cv, &po, o, &T, method, sizeof method);
	if (rc)
		goto out;
	if (po.title)
		snprintf(title, sizeof title, "%s", po.title);
	else
		snprintf(title, sizeof title, "%s: %s",
		         strcmp(po.kind, "avo") == 0      ? "AVO curves"
		         : strcmp(po.kind, "ig") == 0     ? "Intercept-gradient"
		         : strcmp(po.kind, "cross") == 0  ? "Crossplot"
		         : strcmp(po.kind, "tracks") == 0 ? "Log tracks"
		                                          : "Fluid sweep",
		         have_table ? T.src : A.src);
	frame_text(&cv, title, method);
	if (cairo_status(cv.cr) != CAIRO_STATUS_SUCCESS) {
		fprintf(stderr, WHO ": cairo: %s\n",
		        cairo_status_to_string(cairo_status(cv.cr)));
		rc = CLI_EXIT_IO;
		goto out;
	}
	rc = canvas_write(&cv, po.out, title, method);
out:
	canvas_free(&cv);
	/* Frees cairo's font caches (and the fontconfig patterns they hold)
	 * so leak checkers see only our own memory; no cairo object is
	 * alive here. */
	cairo_debug_reset_static_data();
	if (have_answers)
		answers_free(&A);
	if (have_table || T.ncol)
		table_free(&T);
	return rc;
}
