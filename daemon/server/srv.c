/* The server's entry point: configuration defaults, and srv_run, which
 * sets up the loop, the signals, the tick and the listeners (or stdio),
 * runs until shutdown and tears everything down. The concerns themselves
 * live in the files listed in internal.h. */
#include <errno.h>
#include <fcntl.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "server/internal.h"

void srv_config_default(srv_config *cfg)
{
	memset(cfg, 0, sizeof *cfg);
	cfg->socket_mode = 0600;
	cfg->backlog = 4096;
	cfg->max_per_peer = 128;
	cfg->owner_reserve = SRV_RESERVE_AUTO;
	cfg->tcp_idle_timeout_s = 120;
	cfg->lines_per_turn = 20;
	cfg->offload_bytes = 256 * 1024;
	cfg->offload_work = 1000;
	cfg->pool_lines = 64;
	proto_limits_default(&cfg->limits);
}

unsigned srv_fix_std_fds(void)
{
	unsigned closed = 0;

	for (int fd = 0; fd <= 2; fd++) {
		if (fcntl(fd, F_GETFD) >= 0 || errno != EBADF)
			continue;
		/* the lowest free number is fd itself */
		if (open("/dev/null", fd ? O_WRONLY : O_RDONLY) == fd)
			closed |= 1u << fd;
	}
	return closed;
}

int srv_run(const srv_config *cfg)
{
	srv *s;
	int rc = SRV_EXIT_OK;
	char msg[400];

	signal(SIGPIPE, SIG_IGN);
	if (cfg->threads) {
		/* read by libuv when its pool first starts */
		char n[24];
		snprintf(n, sizeof n, "%zu", cfg->threads);
		setenv("UV_THREADPOOL_SIZE", n, 1);
	}
	if (cfg->log_path && srv_log_open(cfg->log_path) < 0) {
		srv_log("error", "--log %s: %s", cfg->log_path,
		        strerror(errno));
		return SRV_EXIT_RUNTIME;
	}
#if !RW_WITH_SYSTEMD
	if (getenv("NOTIFY_SOCKET") && *getenv("NOTIFY_SOCKET")) {
		srv_log(
		    "error",
		    "NOTIFY_SOCKET: the service manager waits for a readiness "
		    "notification, but this rockwired was built without it "
		    "(cmake -DRW_WITH_SYSTEMD=OFF); use Type=simple, or "
		    "rebuild with -DRW_WITH_SYSTEMD=ON");
		return SRV_EXIT_USAGE;
	}
#endif
	s = calloc(1, sizeof *s);
	if (!s)
		return SRV_EXIT_RUNTIME;
	s->cfg = cfg;
	s->loop = uv_default_loop();
	s->ctx = proto_ctx_new(&cfg->limits);
	if (!s->ctx) {
		free(s);
		return SRV_EXIT_RUNTIME;
	}
	if (srv__notify_open(&s->notify) < 0)
		srv_log("warning", "NOTIFY_SOCKET unusable; not notifying");
	s->stats = proto_ctx_server_stats(s->ctx);
	s->rl_refused.what = "refused-connection warnings";
	srv__pool_init(s);
	s->conn_cap = cfg->limits.max_conns;
	uv_idle_init(s->loop, &s->idle);
	s->idle.data = s;
	uv_timer_init(s->loop, &s->drain_timer);
	s->drain_timer.data = s;
	uv_unref((uv_handle_t *)&s->drain_timer);
	uv_timer_init(s->loop, &s->tick);
	s->tick.data = s;
	uv_timer_start(&s->tick, srv__on_tick, SRV_TICK_MS, SRV_TICK_MS);
	uv_unref((uv_handle_t *)&s->tick);
	uv_signal_init(s->loop, &s->sig_int);
	uv_signal_init(s->loop, &s->sig_term);
	uv_signal_init(s->loop, &s->sig_hup);
	s->sig_int.data = s->sig_term.data = s->sig_hup.data = s;
	uv_signal_start(&s->sig_int, srv__on_signal, SIGINT);
	uv_signal_start(&s->sig_term, srv__on_signal, SIGTERM);
	uv_signal_start(&s->sig_hup, srv__on_signal, SIGHUP);

	if (cfg->use_stdio) {
		s->stats->transport = "stdio";
		if (cfg->std_closed & 3) {
			srv_log("error", "--stdio: %s closed: nowhere to %s",
			        cfg->std_closed & 2 ? "stdout is" : "stdin is",
			        cfg->std_closed & 2 ? "write answers"
			                            : "read requests from");
			rc = SRV_EXIT_RUNTIME;
		} else if (srv__start_stdio(s) < 0) {
			rc = SRV_EXIT_RUNTIME;
		}
	} else {
		rc = srv__start_listeners(s);
	}
	if (rc == SRV_EXIT_OK) {
		srv__fd_budget(s);
		s->stats->settings.set = 1;
		s->stats->settings.connection_cap = s->conn_cap;
		s->stats->settings.max_per_peer = cfg->max_per_peer;
		s->stats->settings.owner_reserve = srv__owner_reserve(cfg);
		s->stats->settings.tcp_idle_timeout_s = cfg->tcp_idle_timeout_s;
		s->stats->settings.lines_per_turn = cfg->lines_per_turn;
		s->stats->settings.offload_bytes = cfg->offload_bytes;
		s->stats->settings.offload_work = cfg->offload_work;
		s->stats->settings.pool_threads = s->pool_threads;
		s->stats->settings.pool_per_peer = s->pool_per_peer;
		s->stats->settings.pool_lines = cfg->pool_lines;
		s->stats->settings.backlog = cfg->backlog;
	}
	if (rc != SRV_EXIT_OK) {
		s->stopping = 1;
		s->stop_notified = 1;
		srv__close_listeners(s);
		srv__close_all(s);
	} else {
		snprintf(msg, sizeof msg, "READY=1\nSTATUS=serving %s",
		         s->stats->transport);
		if (srv__notify_send(&s->notify, msg) < 0)
			srv_log("warning", "readiness notification failed: %s",
			        strerror(errno));
	}
	srv__maybe_finish(s);
	uv_run(s->loop, UV_RUN_DEFAULT);
	srv__close_listeners(s);
	/* Listeners that failed half-way are closed above; let them go. */
	uv_run(s->loop, UV_RUN_NOWAIT);
	srv__notify_stopping(s);
	srv__notify_close(&s->notify);
	if (uv_loop_close(s->loop) != 0)
		srv_log("warning", "loop closed with handles still open");
	uv_tty_reset_mode();
	proto_ctx_free(s->ctx);
	if (rc == SRV_EXIT_OK)
		rc = s->exit_code; /* an I/O failure while serving */
	free(s);
	return rc;
}
