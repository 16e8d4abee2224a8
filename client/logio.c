/* Helpers shared by `rockwire log` and `rockwire feed`: name=value
 * parameters, number formatting and the bounded request pipeline. */
#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "logio.h"
#include "proto/numfmt.h"

int cli__param_set(cJSON *params, const char *arg, const char *who)
{
	const char *eq = strchr(arg, '=');
	const char *seg = arg;
	cJSON *obj = params, *val;
	char key[256];

	if (!eq || eq == arg) {
		fprintf(stderr, "%s: '%s' is not name=value\n", who, arg);
		return -1;
	}
	/* The whole value must be JSON: "8.5in" is not the number 8.5. */
	val = cJSON_ParseWithOpts(eq + 1, NULL, 1);
	if (!val)
		val = cJSON_CreateString(eq + 1);
	if (!val)
		return -1;
	for (;;) {
		const char *dot = memchr(seg, '.', (size_t)(eq - seg));
		size_t n = (size_t)((dot ? dot : eq) - seg);
		cJSON *next;
		if (n == 0 || n >= sizeof key) {
			fprintf(stderr, "%s: bad name in '%s'\n", who, arg);
			cJSON_Delete(val);
			return -1;
		}
		memcpy(key, seg, n);
		key[n] = '\0';
		next = cJSON_GetObjectItemCaseSensitive(obj, key);
		if (!dot) {
			if (next)
				cJSON_DeleteItemFromObjectCaseSensitive(obj,
				                                        key);
			cJSON_AddItemToObject(obj, key, val);
			return 0;
		}
		if (!next) {
			next = cJSON_AddObjectToObject(obj, key);
		} else if (!cJSON_IsObject(next)) {
			fprintf(stderr,
			        "%s: '%s' is both a value and an "
			        "object\n",
			        who, key);
			cJSON_Delete(val);
			return -1;
		}
		obj = next;
		seg = dot + 1;
	}
}

/* Lays out JSON number text t (proto_num_fmt*: "-123.45", "3000",
 * "1.5e-7"; not zero) as printf's %.Pg would print the same digits:
 * exponent form "1.5e-07" when the decimal exponent X is below -4 or at
 * least P, else plain; trailing zeros dropped. P 0: 15 for up to 15
 * significant digits, else 17 (the old %.15g / %.17g choice). Returns the
 * length written to buf (at most 25 bytes and a NUL). */
static size_t g_layout(char *buf, const char *t, int P)
{
	char dig[32];
	size_t nd = 0, n = 0;
	int X = -1, seen_point = 0, lead = 1, e = 0, eneg = 0;

	if (*t == '-')
		buf[n++] = *t++;
	for (; *t && *t != 'e'; t++) {
		if (*t == '.') {
			seen_point = 1;
			continue;
		}
		if (lead && *t == '0') {
			if (seen_point)
				X--; /* 0.00123: each zero after the point */
			continue;
		}
		if (lead && !seen_point)
			X = -1;
		lead = 0;
		if (!seen_point)
			X++;
		if (nd < sizeof dig)
			dig[nd++] = *t;
	}
	if (lead) { /* zero */
		buf[n++] = '0';
		buf[n] = '\0';
		return n;
	}
	if (*t == 'e') {
		t++;
		if (*t == '-') {
			eneg = 1;
			t++;
		}
		while (*t)
			e = e * 10 + (*t++ - '0');
		X += eneg ? -e : e;
	}
	while (nd > 1 && dig[nd - 1] == '0')
		nd--;
	if (P <= 0)
		P = nd <= 15 ? 15 : 17;
	if (X < -4 || X >= P) {
		int a = X < 0 ? -X : X;
		buf[n++] = dig[0];
		if (nd > 1) {
			buf[n++] = '.';
			memcpy(buf + n, dig + 1, nd - 1);
			n += nd - 1;
		}
		buf[n++] = 'e';
		buf[n++] = X < 0 ? '-' : '+';
		if (a >= 100)
			buf[n++] = (char)('0' + a / 100);
		buf[n++] = (char)('0' + a / 10 % 10);
		buf[n++] = (char)('0' + a % 10);
	} else if (X < 0) {
		buf[n++] = '0';
		buf[n++] = '.';
		for (int z = -1; z > X; z--)
			buf[n++] = '0';
		memcpy(buf + n, dig, nd);
		n += nd;
	} else {
		for (int i = 0; i <= X; i++)
			buf[n++] = (size_t)i < nd ? dig[i] : '0';
		if (nd > (size_t)X + 1) {
			buf[n++] = '.';
			memcpy(buf + n, dig + X + 1, nd - (size_t)X - 1);
			n += nd - (size_t)X - 1;
		}
	}
	buf[n] = '\0';
	return n;
}

size_t cli__fmt_num(char *buf, double v, int digits, const char *null_text)
{
	char tmp[PROTO_NUM_FMT_MAX];
	size_t n;

	if (!isfinite(v)) {
		const char *t = null_text ? null_text : "null";
		size_t len = strlen(t);
		if (len > 39)
			len = 39;
		memcpy(buf, t, len);
		buf[len] = '\0';
		return len;
	}
	if (v == 0) { /* printf's sign of zero (proto_num_fmt writes 0) */
		n = signbit(v) ? 2 : 1;
		memcpy(buf, "-0", 3);
		if (n == 1)
			memcpy(buf, "0", 2);
		return n;
	}
	if (digits > 17)
		digits = 17;
	/* the shortest digits that read back (digits <= 0) laid out as
	 * %.15g would (as %.17g when there are 16 or 17: %.15g would not
	 * read back), or `digits` digits laid out as %.<digits>g */
	n = digits > 0 ? proto_num_fmt_digits(tmp, v, digits)
	               : proto_num_fmt(tmp, v);
	{
		/* Fast path: plain text ("2.4482", "-999.25", "0.0123",
		 * "3000") is already what %g prints when its integer part
		 * has fewer digits than the precision (JSON's layout never
		 * writes plain text for exponents below -4). */
		const char *t = tmp + (tmp[0] == '-');
		size_t i = 0, j;
		int P = digits > 0 ? digits : 15;
		while (t[i] >= '0' && t[i] <= '9')
			i++;
		j = i;
		if (t[j] == '.')
			for (j++; t[j] >= '0' && t[j] <= '9'; j++)
				;
		if (t[j] != 'e' && (t[0] == '0' || (int)i <= P)) {
			memcpy(buf, tmp, n + 1);
			return n;
		}
	}
	return g_layout(buf, tmp, digits > 0 ? digits : 0);
}

char *cli__buf_reserve(cli_buf *b, size_t n)
{
	if (b->off && b->off == b->len)
		b->off = b->len = 0;
	if (b->cap - b->len < n + 1) {
		size_t cap = b->cap ? b->cap : 4096;
		char *d;
		if (b->off) {
			memmove(b->data, b->data + b->off, b->len - b->off);
			b->len -= b->off;
			b->off = 0;
		}
		while (cap - b->len < n + 1)
			cap *= 2;
		if (cap != b->cap) {
			d = realloc(b->data, cap);
			if (!d)
				return NULL;
			b->data = d;
			b->cap = cap;
		}
	}
	return b->data + b->len;
}

int cli__buf_put(cli_buf *b, const char *s, size_t n)
{
	char *w = cli__buf_reserve(b, n);

	if (!w)
		return -1;
	memcpy(w, s, n);
	b->len += n;
	b->data[b->len] = '\0';
	return 0;
}

int cli__buf_puts(cli_buf *b, const char *s)
{
	return cli__buf_put(b, s, strlen(s));
}

void cli__buf_free(cli_buf *b)
{
	free(b->data);
	memset(b, 0, sizeof *b);
}

int cli__pipe_step(cli_conn *c, cli_buf *out, int want_read, int extra_fd,
                   int *extra_ready, int timeout_ms,
                   int (*on_line)(void *ctx, char *line, size_t len), void *ctx)
{
	struct pollfd p[3];
	int n = 0, iw = -1, ir = -1, ie = -1;
	char *line;
	size_t len;

	if (extra_ready)
		*extra_ready = 0;
	if (out->off < out->len && c->wfd >= 0) {
		fcntl(c->wfd, F_SETFL, fcntl(c->wfd, F_GETFL) | O_NONBLOCK);
		p[n] = (struct pollfd){c->wfd, POLLOUT, 0};
		iw = n++;
	}
	if (want_read) {
		p[n] = (struct pollfd){c->rfd, POLLIN, 0};
		ir = n++;
	}
	if (extra_fd >= 0) {
		p[n] = (struct pollfd){extra_fd, POLLIN, 0};
		ie = n++;
	}
	if (!n) {
		/* nothing to watch: just wait (a reconnect pause) */
		if (timeout_ms > 0)
			poll(NULL, 0, timeout_ms);
		return 0;
	}
	if (poll(p, (nfds_t)n, timeout_ms) < 0)
		return errno == EINTR ? 0 : -1;
	if (iw >= 0 && p[iw].revents) {
		ssize_t w =
		    write(c->wfd, out->data + out->off, out->len - out->off);
		if (w < 0 && errno != EAGAIN && errno != EINTR) {
			fprintf(stderr, "rockwire: write to %s: %s\n", c->desc,
			        strerror(errno));
			return -1;
		}
		if (w > 0)
			out->off += (size_t)w;
	}
	if (ie >= 0 && p[ie].revents && extra_ready)
		*extra_ready = 1;
	if (ir >= 0 && p[ir].revents) {
		/* One read, then every complete line it brought. */
		int got = cli_read_line(c, &line, &len, 0);
		while (got == 1) {
			if (on_line(ctx, line, len))
				return -1;
			got = cli_read_line(c, &line, &len, 0);
		}
		if (got == 0)
			return 1;
		if (got == -1)
			return -1;
	}
	return 0;
}
