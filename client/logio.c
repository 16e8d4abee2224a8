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

size_t cli__fmt_num(char *buf, double v, int digits, const char *null_text)
{
	int n;

	if (!isfinite(v)) {
		const char *t = null_text ? null_text : "null";
		size_t len = strlen(t);
		if (len > 39)
			len = 39;
		memcpy(buf, t, len);
		buf[len] = '\0';
		return len;
	}
	if (digits > 0) {
		n = snprintf(buf, 40, "%.*g", digits, v);
		return (size_t)n;
	}
	n = snprintf(buf, 40, "%.15g", v);
	if (strtod(buf, NULL) != v)
		n = snprintf(buf, 40, "%.17g", v);
	return (size_t)n;
}

int cli__buf_put(cli_buf *b, const char *s, size_t n)
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
				return -1;
			b->data = d;
			b->cap = cap;
		}
	}
	memcpy(b->data + b->len, s, n);
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
