/* Signals and shutdown. SIGTERM / SIGINT stop accepting, stop reading,
 * take in once what the kernel already holds for each connection (it was
 * sent before the stop), answer every complete line, and end the loop
 * when the last connection is gone or --drain-timeout passes; a second
 * signal closes everything at once. SIGHUP reopens the --log file. */
#include <errno.h>
#include <signal.h>
#include <string.h>

#include "server/internal.h"

static void close_if_open(uv_handle_t *h)
{
	if (!uv_is_closing(h))
		uv_close(h, NULL);
}

void srv__notify_stopping(srv *s)
{
	if (s->stop_notified)
		return;
	s->stop_notified = 1;
	srv__notify_send(&s->notify, "STOPPING=1");
}

void srv__maybe_finish(srv *s)
{
	if (!s->stopping && !(s->cfg->use_stdio && !s->listening))
		return;
	if (s->conns)
		return;
	/* Nothing left: close our own handles; the loop then ends. */
	srv__notify_stopping(s);
	close_if_open((uv_handle_t *)&s->sig_int);
	close_if_open((uv_handle_t *)&s->sig_term);
	close_if_open((uv_handle_t *)&s->sig_hup);
	close_if_open((uv_handle_t *)&s->idle);
	close_if_open((uv_handle_t *)&s->drain_timer);
	close_if_open((uv_handle_t *)&s->tick);
}

void srv__close_all(srv *s)
{
	conn *c, *next;

	for (c = s->conns; c; c = next) {
		srv__conn_ref(c);
		srv__conn_close(c);
		next = c->next;
		srv__conn_unref(c);
	}
}

static void on_drain_timeout(uv_timer_t *t)
{
	srv *s = t->data;

	srv_log("warning", "drain timeout: closing remaining connections");
	srv__close_all(s);
}

static void srv_stop(srv *s, const char *why)
{
	conn *c, *next;

	if (s->stopping) {
		srv_log("warning", "%s again: closing remaining connections",
		        why);
		srv__close_all(s);
		return;
	}
	s->stopping = 1;
	srv_log("info", "%s: stopping; answering what was already read", why);
	srv__notify_stopping(s);
	srv__close_listeners(s);
	/* Stop reading everywhere; lines already buffered are still
	 * answered (a partial last line without '\n' is not a request). */
	for (c = s->conns; c; c = next) {
		srv__conn_ref(c);
		if (!conn_closing(c)) {
			srv__read_stop(c);
			if (!conn_eof(c))
				srv__drain_kernel(c, 1);
			conn_set_state(c, CONN_EOF);
			conn_set(c, CF_DROP_TAIL);
			srv__conn_schedule(c);
			srv__conn_check_done(c);
		}
		next = c->next;
		srv__conn_unref(c);
	}
	uv_timer_start(&s->drain_timer, on_drain_timeout,
	               (uint64_t)(s->cfg->limits.drain_timeout_s * 1000), 0);
	srv__maybe_finish(s);
}

void srv__on_signal(uv_signal_t *h, int signum)
{
	srv *s = h->data;

	if (signum == SIGHUP) {
		if (!s->cfg->log_path) {
			srv_log("info", "SIGHUP: logs go to stderr; nothing to "
			                "reopen");
		} else if (srv_log_open(s->cfg->log_path) < 0) {
			srv_log("warning",
			        "SIGHUP: cannot reopen %s: %s; "
			        "logging to the old file",
			        s->cfg->log_path, strerror(errno));
		} else {
			srv_log("info", "SIGHUP: log reopened");
		}
		return;
	}
	srv_stop(s, signum == SIGINT ? "SIGINT" : "SIGTERM");
}
