/* Result printing for `rockwire call --format json|table|csv` (see
 * format.h). The result is first flattened into named members (dotted
 * names for nested objects, as the response's "units" map names them),
 * then printed by rank: scalars, columns, record tables, matrices. */
#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "format.h"
#include "logio.h"
#include "rpc.h"

#define MAX_COLS 256

enum { R_SCALAR, R_COLUMN, R_RECORDS, R_MATRIX, R_OTHER };

typedef struct member {
	char name[160];
	const cJSON *v;
	int rank;
	int n, m; /* length; columns of a matrix */
	const char *unit;
	int is_qc;
	int done;
} member;

typedef struct flat {
	member mem[MAX_COLS];
	size_t n;
	char omitted[512];
} flat;

void cli__fmt_cell(char *buf, double v, int digits)
{
	if (!isfinite(v)) {
		snprintf(buf, 40, "null");
		return;
	}
	if (v == 0) {
		snprintf(buf, 40, "0");
		return;
	}
	if (v == floor(v) && fabs(v) < 1e15) {
		snprintf(buf, 40, "%.0f", v);
		return;
	}
	/* %.<digits>g's text (cli__fmt_num: rwnum's digits, printf's
	 * layout), or the shortest that reads back */
	cli__fmt_num(buf, v, digits > 0 ? digits : 0, NULL);
}

void cli__qc_names(unsigned long long flags, const char *const qc[CLI_QC_BITS],
                   char *buf, size_t size)
{
	size_t used = 0;

	buf[0] = '\0';
	if (!flags) {
		snprintf(buf, size, "clean");
		return;
	}
	for (int b = 0; b < 64 && used < size; b++) {
		int w;
		if (!(flags >> b & 1u))
			continue;
		if (qc && qc[b])
			w = snprintf(buf + used, size - used, "%s%s",
			             used ? "|" : "", qc[b]);
		else
			w = snprintf(buf + used, size - used, "%sbit %d",
			             used ? "|" : "", b);
		if (w < 0)
			break;
		used += (size_t)w;
	}
}

static int scalar(const cJSON *e)
{
	return cJSON_IsNumber(e) || cJSON_IsString(e) || cJSON_IsNull(e) ||
	       cJSON_IsBool(e);
}

/* Rank of an array: a column of scalars, a rectangular matrix of
 * scalars, records (objects), or other. */
static int array_rank(const cJSON *v, int *m)
{
	const cJSON *e;
	int rank = -1;

	*m = 0;
	if (!v->child)
		return R_COLUMN;
	cJSON_ArrayForEach(e, v)
	{
		int r;
		if (scalar(e))
			r = R_COLUMN;
		else if (cJSON_IsObject(e))
			r = R_RECORDS;
		else if (cJSON_IsArray(e)) {
			const cJSON *x;
			int n = 0;
			cJSON_ArrayForEach(x, e)
			{
				if (!scalar(x))
					return R_OTHER;
				n++;
			}
			if (rank == R_MATRIX && n != *m)
				return R_OTHER;
			*m = n;
			r = R_MATRIX;
		} else
			return R_OTHER;
		if (rank >= 0 && r != rank)
			return R_OTHER;
		rank = r;
	}
	return rank;
}

static int is_qc_name(const char *name)
{
	const char *last = strrchr(name, '.');
	last = last ? last + 1 : name;
	return strcmp(last, "qc") == 0 || strncmp(last, "qc_", 3) == 0;
}

/* All exactly zero (an imaginary part or phase below critical). */
static int all_zero(const cJSON *v)
{
	const cJSON *e;
	if (cJSON_IsNumber(v))
		return v->valuedouble == 0;
	if (!cJSON_IsArray(v) || !v->child)
		return 0;
	cJSON_ArrayForEach(e, v)
	{
		if (!all_zero(e))
			return 0;
	}
	return 1;
}

static int ends_with(const char *s, const char *suf)
{
	size_t a = strlen(s), b = strlen(suf);
	return a >= b && strcmp(s + a - b, suf) == 0;
}

static void flatten(flat *F, const cJSON *obj, const cJSON *units,
                    const char *prefix, const cli_fmt *fmt)
{
	const cJSON *e;

	cJSON_ArrayForEach(e, obj)
	{
		member *m;
		char name[160];
		if (!e->string)
			continue;
		snprintf(name, sizeof name, "%s%s%s", prefix,
		         *prefix ? "." : "", e->string);
		if (!*prefix && strcmp(e->string, "units") == 0 &&
		    cJSON_IsObject(e))
			continue;
		if (cJSON_IsObject(e)) {
			flatten(F, e, units, name, fmt);
			continue;
		}
		if (!fmt->all_columns &&
		    (ends_with(name, "_im") || ends_with(name, "_phase")) &&
		    all_zero(e)) {
			size_t u = strlen(F->omitted);
			snprintf(F->omitted + u, sizeof F->omitted - u, "%s%s",
			         u ? ", " : "", name);
			continue;
		}
		if (F->n == MAX_COLS)
			return;
		m = &F->mem[F->n++];
		memset(m, 0, sizeof *m);
		snprintf(m->name, sizeof m->name, "%s", name);
		m->v = e;
		m->is_qc = is_qc_name(name);
		{
			const cJSON *u =
			    cJSON_GetObjectItemCaseSensitive(units, name);
			m->unit = cJSON_IsString(u) ? u->valuestring : NULL;
		}
		if (cJSON_IsArray(e)) {
			m->rank = array_rank(e, &m->m);
			m->n = cJSON_GetArraySize(e);
		} else
			m->rank = R_SCALAR;
	}
}

/* ---- cells ----------------------------------------------------------- */

/* Text of one scalar cell. csv: shortest exact numbers and "" for null. */
static void cell_text(const cli_fmt *fmt, const member *m, const cJSON *e,
                      char *buf, size_t size)
{
	int csv = fmt->format == CLI_FMT_CSV;

	if (cJSON_IsNumber(e)) {
		if (m && m->is_qc && fmt->qc_names && e->valuedouble >= 0 &&
		    e->valuedouble == floor(e->valuedouble))
			cli__qc_names((unsigned long long)e->valuedouble,
			              fmt->qc, buf, size);
		else {
			char num[48];
			/* a QC set is an integer below 2^53: all its digits */
			if (m && m->is_qc && e->valuedouble >= 0 &&
			    e->valuedouble < 9007199254740992.0 &&
			    e->valuedouble == floor(e->valuedouble))
				snprintf(num, sizeof num, "%.0f",
				         e->valuedouble);
			else
				cli__fmt_cell(num, e->valuedouble,
				              csv           ? 0
				              : fmt->digits ? fmt->digits
				                            : 7);
			snprintf(buf, size, "%s", num);
		}
	} else if (cJSON_IsString(e))
		snprintf(buf, size, "%s", e->valuestring);
	else if (cJSON_IsBool(e))
		snprintf(buf, size, "%s", cJSON_IsTrue(e) ? "true" : "false");
	else if (cJSON_IsNull(e) || !e)
		snprintf(buf, size, "%s", csv ? "" : "null");
	else {
		char *s = cJSON_PrintUnformatted(e);
		snprintf(buf, size, "%s", s ? s : "?");
		cJSON_free(s);
	}
}

/* Writes a CSV field, quoted when it holds ',', '"' or a line break. */
static void csv_field(FILE *f, const char *s)
{
	if (!strpbrk(s, ",\"\r\n")) {
		fputs(s, f);
		return;
	}
	fputc('"', f);
	for (; *s; s++) {
		if (*s == '"')
			fputc('"', f);
		fputc(*s, f);
	}
	fputc('"', f);
}

static void head_text(const char *name, const char *unit, char *buf,
                      size_t size)
{
	int n;
	if (unit && *unit)
		n = snprintf(buf, size, "%s[%s]", name, unit);
	else
		n = snprintf(buf, size, "%s", name);
	/* A heading longer than the column keeps its start and says so. */
	if (n >= 0 && (size_t)n >= size && size > 4)
		memcpy(buf + size - 4, "...", 4);
}

/* ---- axes of matrices ------------------------------------------------ */

static const char *const axis_names[] = {
    "angle", "chi", "depth", "time", "offset", "saturation", "frequency"};

static const member *find_member(const flat *F, const char *name, int len)
{
	for (size_t i = 0; i < F->n; i++)
		if (F->mem[i].rank == R_COLUMN && F->mem[i].n == len &&
		    strcmp(F->mem[i].name, name) == 0)
			return &F->mem[i];
	return NULL;
}

/* The member labelling an axis called name with len entries: the member
 * of that name, or for interfaces and samples their depth or time. */
static const member *axis_member(const flat *F, const char *name, int len)
{
	const member *m = find_member(F, name, len);
	if (m)
		return m;
	if (strcmp(name, "interface") == 0 || strcmp(name, "sample") == 0) {
		if ((m = find_member(F, "depth", len)))
			return m;
		return find_member(F, "time", len);
	}
	return NULL;
}

static int known_axis(const char *name)
{
	for (size_t i = 0; i < sizeof axis_names / sizeof *axis_names; i++)
		if (strcmp(axis_names[i], name) == 0)
			return 1;
	return strcmp(name, "interface") == 0 || strcmp(name, "sample") == 0;
}

typedef struct axes {
	char row[32], col[32];     /* axis names, "" unknown */
	const member *rowm, *colm; /* their labels, or NULL */
} axes;

/* x-axes of a result member in the method's schema, when given. */
static int schema_axes(const cli_fmt *fmt, const char *name, axes *a)
{
	const cJSON *md, *res, *props, *node, *xa;

	if (!fmt->discover || !fmt->method)
		return 0;
	md = cli__method_doc(fmt->discover, fmt->method);
	res = cJSON_GetObjectItemCaseSensitive(md, "result");
	res = cli__schema_deref(
	    fmt->discover, cJSON_GetObjectItemCaseSensitive(res, "schema"));
	props = cJSON_GetObjectItemCaseSensitive(res, "properties");
	node = cli__schema_deref(fmt->discover,
	                         cJSON_GetObjectItemCaseSensitive(props, name));
	xa = cJSON_GetObjectItemCaseSensitive(node, "x-axes");
	if (cJSON_GetArraySize(xa) != 2 ||
	    !cJSON_IsString(cJSON_GetArrayItem(xa, 0)) ||
	    !cJSON_IsString(cJSON_GetArrayItem(xa, 1)))
		return 0;
	snprintf(a->row, sizeof a->row, "%s",
	         cJSON_GetArrayItem(xa, 0)->valuestring);
	snprintf(a->col, sizeof a->col, "%s",
	         cJSON_GetArrayItem(xa, 1)->valuestring);
	return 1;
}

/* "[a][b]" layouts named in the method's description. */
static size_t described_layouts(const cli_fmt *fmt, char pairs[][2][32],
                                size_t max)
{
	const cJSON *md, *d;
	const char *p;
	size_t n = 0;

	if (!fmt->discover || !fmt->method)
		return 0;
	md = cli__method_doc(fmt->discover, fmt->method);
	d = cJSON_GetObjectItemCaseSensitive(md, "description");
	if (!cJSON_IsString(d))
		return 0;
	for (p = d->valuestring; (p = strchr(p, '[')) && n < max; p++) {
		char a[32], b[32];
		size_t la = strspn(p + 1, "abcdefghijklmnopqrstuvwxyz_");
		const char *q = p + 1 + la;
		size_t lb;
		if (!la || la >= sizeof a || q[0] != ']' || q[1] != '[')
			continue;
		lb = strspn(q + 2, "abcdefghijklmnopqrstuvwxyz_");
		if (!lb || lb >= sizeof b || q[2 + lb] != ']')
			continue;
		memcpy(a, p + 1, la);
		a[la] = '\0';
		memcpy(b, q + 2, lb);
		b[lb] = '\0';
		if (!known_axis(a) || !known_axis(b))
			continue;
		snprintf(pairs[n][0], 32, "%s", a);
		snprintf(pairs[n][1], 32, "%s", b);
		n++;
	}
	return n;
}

/* Does axis `name` fit a dimension of length len? */
static int axis_fits(const flat *F, const char *name, int len)
{
	if (axis_member(F, name, len))
		return 1;
	/* interfaces and samples need no label member; a named axis that
	 * is present with another length does not fit */
	if (strcmp(name, "interface") == 0 || strcmp(name, "sample") == 0)
		return 1;
	for (size_t i = 0; i < F->n; i++)
		if (strcmp(F->mem[i].name, name) == 0)
			return 0;
	return 0;
}

static void matrix_axes(const flat *F, const cli_fmt *fmt, const member *m,
                        axes *a)
{
	char pairs[8][2][32];
	size_t np, fit = 0, pick = 0;

	memset(a, 0, sizeof *a);
	if (!schema_axes(fmt, m->name, a)) {
		np = described_layouts(fmt, pairs, 8);
		for (size_t i = 0; i < np; i++) {
			int dup = 0;
			if (!axis_fits(F, pairs[i][0], m->n) ||
			    !axis_fits(F, pairs[i][1], m->m))
				continue;
			for (size_t j = 0; j < i; j++)
				if (strcmp(pairs[j][0], pairs[i][0]) == 0 &&
				    strcmp(pairs[j][1], pairs[i][1]) == 0)
					dup = 1;
			if (dup)
				continue;
			fit++;
			pick = i;
		}
		if (fit == 1) {
			snprintf(a->row, sizeof a->row, "%s", pairs[pick][0]);
			snprintf(a->col, sizeof a->col, "%s", pairs[pick][1]);
		} else if (m->n != m->m) {
			/* By length alone, when each dimension matches one
			 * axis member and the two differ. */
			const char *r = NULL, *c = NULL;
			int nr = 0, nc = 0;
			for (size_t i = 0;
			     i < sizeof axis_names / sizeof *axis_names; i++) {
				if (find_member(F, axis_names[i], m->n))
					r = axis_names[i], nr++;
				if (find_member(F, axis_names[i], m->m))
					c = axis_names[i], nc++;
			}
			if (nr == 1)
				snprintf(a->row, sizeof a->row, "%s", r);
			if (nc == 1)
				snprintf(a->col, sizeof a->col, "%s", c);
		}
	}
	if (a->row[0])
		a->rowm = axis_member(F, a->row, m->n);
	if (a->col[0])
		a->colm = axis_member(F, a->col, m->m);
}

/* Label of entry i of an axis. */
static void axis_label(const cli_fmt *fmt, const axes *a, int is_row, int i,
                       char *buf, size_t size)
{
	const member *am = is_row ? a->rowm : a->colm;
	if (am)
		cell_text(fmt, am, cJSON_GetArrayItem(am->v, i), buf, size);
	else
		snprintf(buf, size, "%d", i);
}

static void axis_head(const axes *a, int is_row, char *buf, size_t size)
{
	const member *am = is_row ? a->rowm : a->colm;
	const char *name = is_row ? a->row : a->col;
	if (am)
		head_text(am->name, am->unit, buf, size);
	else if (*name)
		snprintf(buf, size, "%s", name);
	else
		snprintf(buf, size, is_row ? "first index" : "second index");
}

/* ---- printers -------------------------------------------------------- */

static void print_scalars(FILE *f, const flat *F, const cli_fmt *fmt)
{
	char buf[512];
	for (size_t i = 0; i < F->n; i++) {
		const member *m = &F->mem[i];
		if (m->rank != R_SCALAR)
			continue;
		cell_text(fmt, m, m->v, buf, sizeof buf);
		if (cJSON_IsNull(m->v))
			snprintf(buf, sizeof buf, "null");
		fprintf(f, "# %s = %s%s%s\n", m->name, buf, m->unit ? " " : "",
		        m->unit ? m->unit : "");
	}
}

/* Columns of one length, as an aligned table or CSV rows. */
static void print_columns(FILE *f, flat *F, const cli_fmt *fmt, size_t j)
{
	size_t g[MAX_COLS], ng = 0;
	int n = F->mem[j].n, width[MAX_COLS], left[MAX_COLS];
	int csv = fmt->format == CLI_FMT_CSV;
	char buf[1024];

	for (size_t k = j; k < F->n; k++)
		if (!F->mem[k].done && F->mem[k].rank == R_COLUMN &&
		    F->mem[k].n == n) {
			F->mem[k].done = 1;
			g[ng++] = k;
		}
	for (size_t c = 0; c < ng; c++) {
		const member *m = &F->mem[g[c]];
		head_text(m->name, m->unit, buf, sizeof buf);
		width[c] = (int)strlen(buf);
		left[c] = 0;
		if (!csv) {
			const cJSON *e;
			/* Text (and QC names) reads best left-aligned. */
			left[c] = m->is_qc && fmt->qc_names;
			cJSON_ArrayForEach(e, m->v)
			{
				if (cJSON_IsString(e))
					left[c] = 1;
			}
			cJSON_ArrayForEach(e, m->v)
			{
				char cb[1024];
				cell_text(fmt, m, e, cb, sizeof cb);
				if ((int)strlen(cb) > width[c])
					width[c] = (int)strlen(cb);
			}
			if (width[c] < 10)
				width[c] = 10;
			fprintf(f, "%s%*s", c ? "  " : "",
			        left[c] && c + 1 < ng ? -width[c]
			        : left[c]             ? 0
			                              : width[c],
			        buf);
		} else {
			if (c)
				fputc(',', f);
			csv_field(f, buf);
		}
	}
	fputc('\n', f);
	{
		const cJSON *it[MAX_COLS];
		for (size_t c = 0; c < ng; c++)
			it[c] = F->mem[g[c]].v->child;
		for (int i = 0; i < n; i++) {
			for (size_t c = 0; c < ng; c++) {
				cell_text(fmt, &F->mem[g[c]], it[c], buf,
				          sizeof buf);
				it[c] = it[c] ? it[c]->next : NULL;
				if (csv) {
					if (c)
						fputc(',', f);
					csv_field(f, buf);
				} else
					fprintf(f, "%s%*s", c ? "  " : "",
					        left[c] && c + 1 < ng
					            ? -width[c]
					        : left[c] ? 0
					                  : width[c],
					        buf);
			}
			fputc('\n', f);
		}
	}
}

/* An array of objects as a table with one column per member name. */
static void print_records(FILE *f, const member *m, const cli_fmt *fmt)
{
	const char *keys[MAX_COLS];
	size_t nk = 0;
	const cJSON *r, *e;
	int csv = fmt->format == CLI_FMT_CSV;
	char buf[1024];

	cJSON_ArrayForEach(r, m->v)
	{
		cJSON_ArrayForEach(e, r)
		{
			size_t k;
			for (k = 0; k < nk; k++)
				if (strcmp(keys[k], e->string) == 0)
					break;
			if (k == nk && nk < MAX_COLS)
				keys[nk++] = e->string;
		}
	}
	if (!csv)
		fprintf(f, "%s:\n", m->name);
	for (size_t k = 0; k < nk; k++) {
		if (csv) {
			if (k)
				fputc(',', f);
			csv_field(f, keys[k]);
		} else
			fprintf(f, "%s%s", k ? "\t" : "", keys[k]);
	}
	fputc('\n', f);
	cJSON_ArrayForEach(r, m->v)
	{
		for (size_t k = 0; k < nk; k++) {
			e = cJSON_GetObjectItemCaseSensitive(r, keys[k]);
			member tmp;
			memset(&tmp, 0, sizeof tmp);
			tmp.is_qc = is_qc_name(keys[k]);
			if (e)
				cell_text(fmt, &tmp, e, buf, sizeof buf);
			else
				buf[0] = '\0';
			if (csv) {
				if (k)
					fputc(',', f);
				csv_field(f, buf);
			} else
				fprintf(f, "%s%s", k ? "\t" : "", buf);
		}
		fputc('\n', f);
	}
}

/* A matrix for people: rows and columns labelled by their axes. */
static void print_matrix_table(FILE *f, const flat *F, const member *m,
                               const cli_fmt *fmt)
{
	axes a;
	char head[256], rh[128], ch[128], buf[1024];
	int w = 12, rw;
	const cJSON *row;
	int i = 0;

	matrix_axes(F, fmt, m, &a);
	axis_head(&a, 1, rh, sizeof rh);
	axis_head(&a, 0, ch, sizeof ch);
	head_text(m->name, m->unit, head, sizeof head);
	fprintf(f, "%s: rows %s, columns %s\n", head, rh, ch);
	cJSON_ArrayForEach(row, m->v)
	{
		const cJSON *e;
		cJSON_ArrayForEach(e, row)
		{
			cell_text(fmt, m, e, buf, sizeof buf);
			if ((int)strlen(buf) > w)
				w = (int)strlen(buf);
		}
	}
	rw = (int)strlen(rh) > 10 ? (int)strlen(rh) : 10;
	fprintf(f, "%*s", rw, rh);
	for (int j = 0; j < m->m; j++) {
		axis_label(fmt, &a, 0, j, buf, sizeof buf);
		fprintf(f, "  %*s", w, buf);
	}
	fputc('\n', f);
	cJSON_ArrayForEach(row, m->v)
	{
		const cJSON *e;
		axis_label(fmt, &a, 1, i++, buf, sizeof buf);
		fprintf(f, "%*s", rw, buf);
		cJSON_ArrayForEach(e, row)
		{
			cell_text(fmt, m, e, buf, sizeof buf);
			fprintf(f, "  %*s", w, buf);
		}
		fputc('\n', f);
	}
}

/* Matrices of one shape and axes in long form: one CSV row per element,
 * the two axes first. */
static void print_matrix_csv(FILE *f, flat *F, const cli_fmt *fmt, size_t j)
{
	axes a, b;
	size_t g[MAX_COLS], ng = 0;
	member *m0 = &F->mem[j];
	char buf[1024];

	matrix_axes(F, fmt, m0, &a);
	for (size_t k = j; k < F->n; k++) {
		member *m = &F->mem[k];
		if (m->done || m->rank != R_MATRIX || m->n != m0->n ||
		    m->m != m0->m)
			continue;
		matrix_axes(F, fmt, m, &b);
		if (strcmp(a.row, b.row) || strcmp(a.col, b.col))
			continue;
		m->done = 1;
		g[ng++] = k;
	}
	axis_head(&a, 1, buf, sizeof buf);
	csv_field(f, buf);
	fputc(',', f);
	axis_head(&a, 0, buf, sizeof buf);
	csv_field(f, buf);
	for (size_t c = 0; c < ng; c++) {
		head_text(F->mem[g[c]].name, F->mem[g[c]].unit, buf,
		          sizeof buf);
		fputc(',', f);
		csv_field(f, buf);
	}
	fputc('\n', f);
	for (int r = 0; r < m0->n; r++)
		for (int c = 0; c < m0->m; c++) {
			axis_label(fmt, &a, 1, r, buf, sizeof buf);
			csv_field(f, buf);
			fputc(',', f);
			axis_label(fmt, &a, 0, c, buf, sizeof buf);
			csv_field(f, buf);
			for (size_t k = 0; k < ng; k++) {
				const member *m = &F->mem[g[k]];
				const cJSON *e = cJSON_GetArrayItem(
				    cJSON_GetArrayItem(m->v, r), c);
				cell_text(fmt, m, e, buf, sizeof buf);
				fputc(',', f);
				csv_field(f, buf);
			}
			fputc('\n', f);
		}
}

/* A copy of obj with "<qc>_names" beside every QC member. */
static cJSON *with_qc_names(const cJSON *obj, const cli_fmt *fmt);

static cJSON *names_of(const cJSON *v, const cli_fmt *fmt)
{
	char buf[1024];
	if (cJSON_IsNumber(v)) {
		cli__qc_names((unsigned long long)v->valuedouble, fmt->qc, buf,
		              sizeof buf);
		return cJSON_CreateString(buf);
	}
	if (cJSON_IsArray(v)) {
		cJSON *a = cJSON_CreateArray(), *e;
		cJSON_ArrayForEach(e, v)
		{
			cJSON_AddItemToArray(a, names_of(e, fmt));
		}
		return a;
	}
	return cJSON_CreateNull();
}

static cJSON *with_qc_names(const cJSON *obj, const cli_fmt *fmt)
{
	cJSON *out = cJSON_CreateObject();
	const cJSON *e;

	if (!out)
		return NULL;
	cJSON_ArrayForEach(e, obj)
	{
		cJSON *v = cJSON_IsObject(e) && strcmp(e->string, "units") != 0
		               ? with_qc_names(e, fmt)
		               : cJSON_Duplicate(e, 1);
		if (!v || !cJSON_AddItemToObject(out, e->string, v)) {
			cJSON_Delete(v);
			cJSON_Delete(out);
			return NULL;
		}
		if (is_qc_name(e->string) && !ends_with(e->string, "_names") &&
		    !cJSON_IsObject(e)) {
			char nm[192];
			cJSON *names = names_of(e, fmt);
			snprintf(nm, sizeof nm, "%s_names", e->string);
			if (!names ||
			    cJSON_GetObjectItemCaseSensitive(obj, nm) ||
			    !cJSON_AddItemToObject(out, nm, names))
				cJSON_Delete(names);
		}
	}
	return out;
}

int cli__result_has_matrix(const cJSON *result)
{
	const cJSON *e;
	cJSON_ArrayForEach(e, result)
	{
		int m;
		if (cJSON_IsArray(e) && array_rank(e, &m) == R_MATRIX)
			return 1;
		if (cJSON_IsObject(e) && cli__result_has_matrix(e))
			return 1;
	}
	return 0;
}

int cli__print_result(FILE *f, const cJSON *result, const cli_fmt *fmt)
{
	flat *F;
	const cJSON *units;
	int blocks = 0;

	if (fmt->format == CLI_FMT_JSON || !cJSON_IsObject(result)) {
		cJSON *copy = NULL;
		char *s;
		if (fmt->qc_names && cJSON_IsObject(result)) {
			copy = with_qc_names(result, fmt);
		}
		s = fmt->pretty ? cJSON_Print(copy ? copy : result)
		                : cJSON_PrintUnformatted(copy ? copy : result);
		if (s) {
			fputs(s, f);
			fputc('\n', f);
		}
		cJSON_free(s);
		cJSON_Delete(copy);
		return ferror(f) ? -1 : 0;
	}
	F = calloc(1, sizeof *F);
	if (!F)
		return -1;
	units = cJSON_GetObjectItemCaseSensitive(result, "units");
	flatten(F, result, units, "", fmt);
	print_scalars(f, F, fmt);
	for (size_t j = 0; j < F->n; j++) {
		member *m = &F->mem[j];
		if (m->done || m->rank == R_SCALAR)
			continue;
		if (blocks++)
			fputc('\n', f);
		switch (m->rank) {
		case R_COLUMN: print_columns(f, F, fmt, j); break;
		case R_RECORDS:
			m->done = 1;
			print_records(f, m, fmt);
			break;
		case R_MATRIX:
			if (fmt->format == CLI_FMT_CSV)
				print_matrix_csv(f, F, fmt, j);
			else {
				m->done = 1;
				print_matrix_table(f, F, m, fmt);
			}
			break;
		default: {
			char *s = cJSON_PrintUnformatted(m->v);
			m->done = 1;
			fprintf(f, "# %s = %s\n", m->name, s ? s : "?");
			cJSON_free(s);
		}
		}
	}
	if (F->omitted[0])
		fprintf(f,
		        "%s# all zero, not shown: %s (--all-columns shows "
		        "them)\n",
		        blocks ? "\n" : "", F->omitted);
	free(F);
	return ferror(f) ? -1 : 0;
}
