/* Listeners and accepting: Unix sockets (a stale socket reclaimed only
 * when nobody answers on it, the file created with its final mode and
 * removed at exit only if it is still ours), loopback TCP (anything else
 * needs --allow-remote), and sockets passed by the service manager. Each
 * accepted socket becomes a connection; past --max-connections it gets
 * one "server busy" line and is closed. TCP is compiled only with
 * RW_WITH_TCP, socket activation only with RW_WITH_SYSTEMD (CMake options
 * of the same names); without them the daemon refuses, by name, what
 * would need them. */
#include <arpa/inet.h>
#include <errno.h>
#include <netdb.h>
#include <netinet/in.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/un.h>
#include <unistd.h>

#include "server/internal.h"

#if RW_WITH_TCP
static void peer_name(conn *c)
{
	struct sockaddr_storage ss;
	char host[INET6_ADDRSTRLEN] = "?";
	int len = sizeof ss, port = 0;
	size_t n = strlen(c->name);

	if (c->kind != CONN_TCP ||
	    uv_tcp_getpeername(&c->in.tcp, (struct sockaddr *)&ss, &len) < 0)
		return;
	if (ss.ss_family == AF_INET) {
		struct sockaddr_in *a = (struct sockaddr_in *)&ss;
		inet_ntop(AF_INET, &a->sin_addr, host, sizeof host);
		port = ntohs(a->sin_port);
	} else if (ss.ss_family == AF_INET6) {
		struct sockaddr_in6 *a = (struct sockaddr_in6 *)&ss;
		inet_ntop(AF_INET6, &a->sin6_addr, host, sizeof host);
		port = ntohs(a->sin6_port);
	}
	snprintf(c->name + n, sizeof c->name - n, "(%s:%d)", host, port);
}
#endif

/* Answers a refused connection with one -32000 line and closes it once
 * the line is written. */
static void refuse(conn *c, const char *rule, const char *why)
{
	srv *s = c->srv;

	s->stats->connections_refused++;
	if (srv__ratelimit(&s->rl_refused, uv_now(s->loop)))
		srv_log("warning", "%s from %s: refused (%s; %llu open)",
		        c->name, c->peer ? c->peer->key : "?", rule,
		        (unsigned long long)s->stats->connections_open);
	conn_set(c, CF_REFUSED | CF_LAST_WORD);
	s->refusing++;
	proto_error_line(s->ctx, &c->pending, PROTO_SERVER_BUSY, NULL, why);
	conn_set_state(c, CONN_EOF);
	srv__conn_flush(c);
}

static void on_connection(uv_stream_t *server, int status)
{
	srv_listener *l = server->data;
	srv *s = l->srv;
	const char *rule;
	char why[200];
	conn *c;
	int rc;

	if (status < 0) {
		/* libuv closes what it cannot accept (EMFILE) itself */
		s->stats->connections_dropped++;
		if (srv__ratelimit(&s->rl_refused, uv_now(s->loop)))
			srv_log("warning", "%s: accept: %s", l->name,
			        uv_strerror(status));
		return;
	}
	if (s->refusing >= SRV_REFUSING_MAX) {
		/* Leave it with libuv, which stops accepting until we take
		 * it: refusals in flight hold descriptors. */
		l->deferred = 1;
		return;
	}
	c = srv__conn_new(s, l->kind == LST_TCP ? CONN_TCP : CONN_UNIX);
	if (!c) {
		srv_log("error", "accept: out of memory");
		return;
	}
#if RW_WITH_TCP
	if (l->kind == LST_TCP)
		uv_tcp_init(s->loop, &c->in.tcp);
	else
#endif
		uv_pipe_init(s->loop, &c->in.pipe, 0);
	c->in.h.data = c;
	srv__conn_ref(c); /* the handle's */
	conn_set(c, CF_IN_OPEN);
	c->in_kind = IO_STREAM;
	c->out_kind = IO_STREAM;
	c->out_stream = &c->in.s;
	rc = uv_accept(server, &c->in.s);
	if (rc < 0) {
		srv_log("warning", "%s: accept: %s", l->name, uv_strerror(rc));
		srv__conn_close(c);
		return;
	}
#if RW_WITH_TCP
	if (l->kind == LST_TCP) {
		uv_tcp_nodelay(&c->in.tcp, 1);
		peer_name(c);
	}
#endif
	srv__peer_attach(c);
	if ((rule = srv__admit(c, why, sizeof why))) {
		refuse(c, rule, why);
		return;
	}
	srv__conn_update_read(c);
}

void srv__listen_resume(srv *s)
{
	for (int i = 0; i < s->n_lst && s->refusing < SRV_REFUSING_MAX; i++) {
		srv_listener *l = &s->lst[i];
		if (l->deferred && l->open) {
			l->deferred = 0;
			on_connection(&l->h.s, 0);
		}
	}
}

/* Reclaims a stale socket file at path: only when it is a socket and
 * connecting to it is refused. Returns 0 when the path is free. */
static int reclaim_stale(const char *path)
{
	struct sockaddr_un sa;
	struct stat st;
	int fd, rc, err;

	if (lstat(path, &st) < 0)
		return errno == ENOENT
		           ? 0
		           : (srv_log("error", "%s: %s", path, strerror(errno)),
		              -1);
	if (srv__check_existing(path, &st) < 0)
		return -1;
	memset(&sa, 0, sizeof sa);
	sa.sun_family = AF_UNIX;
	if (strlen(path) >= sizeof sa.sun_path) {
		srv_log("error", "%s: socket path too long", path);
		return -1;
	}
	memcpy(sa.sun_path, path, strlen(path) + 1);
	fd = socket(AF_UNIX, SOCK_STREAM, 0);
	if (fd < 0) {
		srv_log("error", "socket: %s", strerror(errno));
		return -1;
	}
	rc = connect(fd, (struct sockaddr *)&sa, sizeof sa);
	err = errno;
	close(fd);
	if (rc == 0) {
		srv_log("error",
		        "another daemon is already listening on %s; stop it or "
		        "choose another --socket",
		        path);
		return -1;
	}
	if (err != ECONNREFUSED) {
		srv_log("error", "%s: cannot probe the existing socket: %s",
		        path, strerror(err));
		return -1;
	}
	if (unlink(path) < 0) {
		srv_log("error", "%s: cannot remove stale socket: %s", path,
		        strerror(errno));
		return -1;
	}
	srv_log("info", "removed stale socket %s", path);
	return 0;
}

static srv_listener *listener_new(srv *s, enum srv_lst_kind kind)
{
	srv_listener *l;

	if (s->n_lst >= SRV_MAX_LISTEN) {
		srv_log("error", "more than %d listeners", SRV_MAX_LISTEN);
		return NULL;
	}
	l = &s->lst[s->n_lst];
	memset(l, 0, sizeof *l);
	l->srv = s;
	l->kind = kind;
#if RW_WITH_TCP
	if (kind == LST_TCP)
		uv_tcp_init(s->loop, &l->h.tcp);
	else
#endif
		uv_pipe_init(s->loop, &l->h.pipe, 0);
	l->h.h.data = l;
	l->open = 1;
	s->n_lst++;
	return l;
}

static int listener_listen(srv_listener *l)
{
	int rc = uv_listen(&l->h.s, l->srv->cfg->backlog, on_connection);

	if (rc < 0) {
		srv_log("error", "listen %s: %s", l->name, uv_strerror(rc));
		return -1;
	}
	return 0;
}

static int start_unix(srv *s, const char *path, unsigned mode)
{
	srv_listener *l;
	struct stat st;
	mode_t old;
	int rc;

	if (reclaim_stale(path) < 0)
		return -1;
	if (!(l = listener_new(s, LST_UNIX)))
		return -1;
	snprintf(l->name, sizeof l->name, "unix:%s", path);
	/* The socket is created with the final mode: umask around bind, so
	 * it is never briefly wider than asked. */
	old = umask((mode_t)(~mode & 0777));
	rc = uv_pipe_bind(&l->h.pipe, path);
	umask(old);
	if (rc < 0) {
		srv_log("error", "bind %s: %s", path, uv_strerror(rc));
		return -1;
	}
	if (lstat(path, &st) == 0) {
		l->dev = st.st_dev;
		l->ino = st.st_ino;
	}
	l->path = strdup(path);
	if (listener_listen(l) < 0)
		return -1;
	srv_log("info", "listening on %s (mode %04o)", path, mode);
	if (mode & 0007)
		srv_log("warning",
		        "%s: mode %04o lets every local user connect "
		        "(--allow-world-access); the protocol has no "
		        "authentication",
		        path, mode);
	return 0;
}

#if RW_WITH_TCP
int srv__is_loopback(const struct sockaddr *sa)
{
	if (sa->sa_family == AF_INET) {
		const struct sockaddr_in *a = (const struct sockaddr_in *)sa;
		return (ntohl(a->sin_addr.s_addr) >> 24) == 127;
	}
	if (sa->sa_family == AF_INET6) {
		const struct sockaddr_in6 *a = (const struct sockaddr_in6 *)sa;
		const unsigned char *b = a->sin6_addr.s6_addr;
		if (IN6_IS_ADDR_LOOPBACK(&a->sin6_addr))
			return 1;
		return IN6_IS_ADDR_V4MAPPED(&a->sin6_addr) && b[12] == 127;
	}
	return 0;
}

static void addr_text(const struct sockaddr *sa, char *buf, size_t size)
{
	char host[INET6_ADDRSTRLEN] = "?";

	if (sa->sa_family == AF_INET6) {
		const struct sockaddr_in6 *a = (const struct sockaddr_in6 *)sa;
		inet_ntop(AF_INET6, &a->sin6_addr, host, sizeof host);
		snprintf(buf, size, "tcp:[%s]:%d", host, ntohs(a->sin6_port));
	} else {
		const struct sockaddr_in *a = (const struct sockaddr_in *)sa;
		inet_ntop(AF_INET, &a->sin_addr, host, sizeof host);
		snprintf(buf, size, "tcp:%s:%d", host, ntohs(a->sin_port));
	}
}

static void warn_no_auth(const srv_listener *l, int loopback)
{
	if (loopback)
		srv_log("warning",
		        "%s: the protocol has no authentication: any local "
		        "user can connect to this port",
		        l->name);
	else
		srv_log("warning",
		        "%s: listening beyond loopback (--allow-remote): the "
		        "protocol has no authentication or encryption; anyone "
		        "who can reach this address can use the daemon",
		        l->name);
}

/* Parses "HOST:PORT" or "[V6]:PORT" and listens there. */
static int start_tcp(srv *s, const char *spec)
{
	char host[128];
	const char *port, *h = spec;
	size_t hl;
	struct addrinfo hints, *ai = NULL;
	struct sockaddr_storage ss;
	int len = sizeof ss, rc, loop;
	srv_listener *l;

	if (*h == '[') {
		const char *e = strchr(h, ']');
		if (!e || e[1] != ':')
			goto bad;
		hl = (size_t)(e - h - 1);
		h++;
		port = e + 2;
	} else {
		const char *e = strrchr(h, ':');
		if (!e)
			goto bad;
		hl = (size_t)(e - h);
		port = e + 1;
	}
	if (!hl || hl >= sizeof host || !*port)
		goto bad;
	memcpy(host, h, hl);
	host[hl] = '\0';
	memset(&hints, 0, sizeof hints);
	hints.ai_socktype = SOCK_STREAM;
	hints.ai_flags = AI_NUMERICSERV | AI_PASSIVE;
	if (strcmp(host, "localhost") == 0)
		snprintf(host, sizeof host, "127.0.0.1");
	hints.ai_flags |= AI_NUMERICHOST;
	if ((rc = getaddrinfo(host, port, &hints, &ai)) != 0 || !ai) {
		srv_log("error",
		        "--listen tcp:%s: not a numeric address and port (%s)",
		        spec, gai_strerror(rc));
		return -1;
	}
	loop = srv__is_loopback(ai->ai_addr);
	if (!loop && !s->cfg->allow_remote) {
		srv_log("error",
		        "--listen tcp:%s: not a loopback address; the protocol "
		        "has no authentication, so give --allow-remote to "
		        "listen beyond this host",
		        spec);
		freeaddrinfo(ai);
		return -1;
	}
	if (!(l = listener_new(s, LST_TCP))) {
		freeaddrinfo(ai);
		return -1;
	}
	snprintf(l->name, sizeof l->name, "tcp:%s", spec);
	rc = uv_tcp_bind(&l->h.tcp, ai->ai_addr,
	                 ai->ai_family == AF_INET6 ? UV_TCP_IPV6ONLY : 0);
	freeaddrinfo(ai);
	if (rc < 0) {
		srv_log("error", "bind tcp:%s: %s", spec, uv_strerror(rc));
		return -1;
	}
	if (listener_listen(l) < 0)
		return -1;
	/* Name it by the bound address, so port 0 shows the real port. */
	if (uv_tcp_getsockname(&l->h.tcp, (struct sockaddr *)&ss, &len) == 0)
		addr_text((struct sockaddr *)&ss, l->name, sizeof l->name);
	srv_log("info", "listening on %s", l->name);
	warn_no_auth(l, loop);
	return 0;
bad:
	srv_log("error", "--listen tcp:%s: expected HOST:PORT or [V6]:PORT",
	        spec);
	return -1;
}
#endif

#if RW_WITH_SYSTEMD

/* Adopts one socket passed by the service manager. */
static int start_activated(srv *s, int fd)
{
	struct sockaddr_storage ss;
	socklen_t len = sizeof ss;
	int type = 0, acc = 0, rc;
	socklen_t tl = sizeof type, al = sizeof acc;
	srv_listener *l;

	if (getsockname(fd, (struct sockaddr *)&ss, &len) < 0 ||
	    getsockopt(fd, SOL_SOCKET, SO_TYPE, &type, &tl) < 0 ||
	    getsockopt(fd, SOL_SOCKET, SO_ACCEPTCONN, &acc, &al) < 0) {
		srv_log("error", "activated fd %d: not a socket: %s", fd,
		        strerror(errno));
		return -1;
	}
	if (type != SOCK_STREAM || !acc) {
		srv_log("error",
		        "activated fd %d: not a listening stream socket", fd);
		return -1;
	}
	if (ss.ss_family == AF_UNIX) {
		struct sockaddr_un *u = (struct sockaddr_un *)&ss;
		if (!(l = listener_new(s, LST_UNIX)))
			return -1;
		if (len > offsetof(struct sockaddr_un, sun_path) &&
		    u->sun_path[0])
			snprintf(
			    l->name, sizeof l->name, "unix:%.*s",
			    (int)(len - offsetof(struct sockaddr_un, sun_path)),
			    u->sun_path);
		else
			snprintf(l->name, sizeof l->name, "unix:fd%d", fd);
		rc = uv_pipe_open(&l->h.pipe, fd);
	} else if (ss.ss_family == AF_INET || ss.ss_family == AF_INET6) {
#if RW_WITH_TCP
		int loop = srv__is_loopback((struct sockaddr *)&ss);
		if (!loop && !s->cfg->allow_remote) {
			char a[128];
			addr_text((struct sockaddr *)&ss, a, sizeof a);
			srv_log("error",
			        "activated %s: not a loopback address; give "
			        "--allow-remote to serve it",
			        a);
			return -1;
		}
		if (!(l = listener_new(s, LST_TCP)))
			return -1;
		addr_text((struct sockaddr *)&ss, l->name, sizeof l->name);
		rc = uv_tcp_open(&l->h.tcp, fd);
		if (rc == 0)
			warn_no_auth(l, loop);
#else
		srv_log("error",
		        "activated fd %d: a TCP socket, but this rockwired "
		        "was built without TCP (cmake -DRW_WITH_TCP=OFF); pass "
		        "a Unix socket, or rebuild with -DRW_WITH_TCP=ON",
		        fd);
		return -1;
#endif
	} else {
		srv_log("error", "activated fd %d: unsupported address family",
		        fd);
		return -1;
	}
	l->activated = 1;
	if (rc < 0) {
		srv_log("error", "activated %s: %s", l->name, uv_strerror(rc));
		return -1;
	}
	if (listener_listen(l) < 0)
		return -1;
	srv_log("info", "listening on %s (passed by the service manager)",
	        l->name);
	return 0;
}
#else
/* Socket activation is not built in: sockets passed for this process
 * are refused by name rather than left unserved. Returns 0 when none
 * were, -1 (logged) when they were. */
static int refuse_activation(void)
{
	const char *pid_s = getenv("LISTEN_PID");
	const char *n_s = getenv("LISTEN_FDS");
	int ours;

	if (!pid_s && !n_s)
		return 0;
	ours = pid_s && strtol(pid_s, NULL, 10) == (long)getpid();
	unsetenv("LISTEN_PID");
	unsetenv("LISTEN_FDS");
	unsetenv("LISTEN_FDNAMES");
	if (!ours) {
		srv_log("warning",
		        "LISTEN_FDS/LISTEN_PID present but not meant for this "
		        "process; ignored");
		return 0;
	}
	srv_log("error",
	        "LISTEN_FDS: sockets passed by the service manager, but this "
	        "rockwired was built without socket activation (cmake "
	        "-DRW_WITH_SYSTEMD=OFF); give --socket or --listen, or "
	        "rebuild with -DRW_WITH_SYSTEMD=ON");
	return -1;
}
#endif

static void transport_text(srv *s)
{
	size_t n = 0;

	s->transport[0] = '\0';
	for (int i = 0; i < s->n_lst && n < sizeof s->transport; i++) {
		int w = snprintf(s->transport + n, sizeof s->transport - n,
		                 "%s%s", i ? " " : "", s->lst[i].name);
		if (w < 0)
			break;
		n += (size_t)w;
	}
	s->stats->transport = s->transport;
}

int srv__start_listeners(srv *s)
{
	const srv_config *cfg = s->cfg;
	int nfd = 0, rc;
	char path[sizeof(((struct sockaddr_un *)0)->sun_path)];
#if RW_WITH_SYSTEMD
	int fds[SRV_MAX_LISTEN], ignored;

	nfd = srv__listen_fds(fds, SRV_MAX_LISTEN, &ignored);
	if (ignored)
		srv_log("warning",
		        "LISTEN_FDS/LISTEN_PID present but %s; ignored",
		        nfd ? "more sockets than supported"
		            : "not meant for this process");
	for (int i = 0; i < nfd; i++)
		if (start_activated(s, fds[i]) < 0)
			return SRV_EXIT_LISTEN;
#else
	if (refuse_activation() < 0)
		return SRV_EXIT_USAGE;
#endif
	for (int i = 0; i < cfg->n_listen; i++) {
		const char *spec = cfg->listen[i];
		if (strncmp(spec, "unix:", 5) == 0)
			rc = start_unix(s, spec + 5, cfg->socket_mode);
#if RW_WITH_TCP
		else if (strncmp(spec, "tcp:", 4) == 0)
			rc = start_tcp(s, spec + 4);
#endif
		else {
			srv_log("error",
			        "--listen %s: expected unix:PATH or "
			        "tcp:HOST:PORT",
			        spec);
			rc = -1;
		}
		if (rc < 0)
			return SRV_EXIT_LISTEN;
	}
	if (!nfd && !cfg->n_listen) {
		if ((rc = srv__default_socket(path, sizeof path)) !=
		    SRV_EXIT_OK)
			return rc;
		if (start_unix(s, path, cfg->socket_mode) < 0)
			return SRV_EXIT_LISTEN;
	}
	s->listening = 1;
	transport_text(s);
	return SRV_EXIT_OK;
}

void srv__close_listeners(srv *s)
{
	struct stat st;

	for (int i = 0; i < s->n_lst; i++) {
		srv_listener *l = &s->lst[i];
		if (l->open) {
			l->open = 0;
			uv_close(&l->h.h, NULL);
		}
		/* Remove only the socket we created, not one that replaced
		 * it, and never one the service manager owns. */
		if (l->path && lstat(l->path, &st) == 0 &&
		    st.st_dev == l->dev && st.st_ino == l->ino)
			unlink(l->path);
		free(l->path);
		l->path = NULL;
	}
	s->listening = 0;
}
