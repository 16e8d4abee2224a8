/* Peers and admission. A peer is who is on the other end: the uid of a
 * Unix-socket client (SO_PEERCRED), the address of a TCP client (all of
 * loopback counts as one peer, since any local user can use any 127.x
 * address; beyond loopback an IPv4 address, or an IPv6 /64). The daemon
 * counts connections and thread-pool jobs per peer, so one peer cannot
 * hold every connection slot (--max-per-peer) or every pool thread, and
 * it keeps --owner-reserve slots for the uid the daemon runs as (the
 * socket's owner; the owner is not capped per peer). Refusals are
 * answered with one -32000 line and counted; their warnings are
 * rate-limited. Past the file-descriptor limit (ulimit -n) connections
 * are refused the same way while descriptors remain to answer them,
 * and left in the kernel's queue otherwise (never closed unanswered). */
#define _GNU_SOURCE /* struct ucred */
#include <arpa/inet.h>
#include <dirent.h>
#include <errno.h>
#include <netinet/in.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <unistd.h>

#include "server/internal.h"

/* Descriptors kept free for answering refusals, reopening the log and
 * the like: refusals in flight never pass half of them. */
#define FD_SLACK 16

static size_t peer_key(conn *c, char *key, size_t size, uid_t *uid,
                       int *has_uid)
{
	*has_uid = 0;
	if (c->kind == CONN_UNIX) {
		struct ucred cr;
		socklen_t len = sizeof cr;
		uv_os_fd_t fd;
		if (uv_fileno(&c->in.h, &fd) == 0 &&
		    getsockopt(fd, SOL_SOCKET, SO_PEERCRED, &cr, &len) == 0) {
			*uid = cr.uid;
			*has_uid = 1;
			return (size_t)snprintf(key, size, "uid %ld",
			                        (long)cr.uid);
		}
		return (size_t)snprintf(key, size, "unix peer");
	}
#if RW_WITH_TCP
	if (c->kind == CONN_TCP) {
		struct sockaddr_storage ss;
		int len = sizeof ss;
		char host[INET6_ADDRSTRLEN] = "?";
		if (uv_tcp_getpeername(&c->in.tcp, (struct sockaddr *)&ss,
		                       &len) < 0)
			return (size_t)snprintf(key, size, "tcp peer");
		if (srv__is_loopback((struct sockaddr *)&ss))
			return (size_t)snprintf(key, size, "loopback");
		if (ss.ss_family == AF_INET6) {
			struct in6_addr a =
			    ((struct sockaddr_in6 *)&ss)->sin6_addr;
			memset(a.s6_addr + 8, 0, 8); /* the /64 */
			inet_ntop(AF_INET6, &a, host, sizeof host);
			return (size_t)snprintf(key, size, "%s/64", host);
		}
		inet_ntop(AF_INET, &((struct sockaddr_in *)&ss)->sin_addr, host,
		          sizeof host);
		return (size_t)snprintf(key, size, "%s", host);
	}
#endif
	return (size_t)snprintf(key, size, "stdio");
}

void srv__peer_attach(conn *c)
{
	srv *s = c->srv;
	char key[sizeof c->peer->key];
	uid_t uid = 0;
	int has_uid;
	srv_peer *p;

	assert(!c->peer);
	peer_key(c, key, sizeof key, &uid, &has_uid);
	for (p = s->peers; p; p = p->next)
		if (strcmp(p->key, key) == 0)
			break;
	if (!p) {
		p = calloc(1, sizeof *p);
		if (!p)
			return; /* not counted: admitted as an unknown peer */
		snprintf(p->key, sizeof p->key, "%s", key);
		p->owner = has_uid && uid == geteuid();
		p->next = s->peers;
		s->peers = p;
	}
	p->conns++;
	c->peer = p;
}

void srv__peer_detach(conn *c)
{
	srv *s = c->srv;
	srv_peer *p = c->peer, **pp;

	if (!p)
		return;
	assert(p->conns > 0);
	c->peer = NULL;
	if (--p->conns > 0)
		return;
	assert(p->pool_jobs == 0);
	for (pp = &s->peers; *pp != p; pp = &(*pp)->next)
		assert(*pp);
	*pp = p->next;
	free(p);
}

/* Counts the descriptors open now (from /proc/self/fd); -1 if unknown. */
static long open_fds(void)
{
	DIR *d = opendir("/proc/self/fd");
	struct dirent *e;
	long n = 0;

	if (!d)
		return -1;
	while ((e = readdir(d)))
		if (e->d_name[0] != '.')
			n++;
	closedir(d);
	return n - 1; /* the directory's own descriptor */
}

void srv__fd_budget(srv *s)
{
	struct rlimit rl;
	long base = open_fds();
	size_t want = s->cfg->limits.max_conns;

	s->conn_cap = want;
	if (getrlimit(RLIMIT_NOFILE, &rl) < 0 || rl.rlim_cur == RLIM_INFINITY)
		return;
	if (base < 0)
		base = 16;
	s->fd_limit = (long)rl.rlim_cur;
	if (s->fd_limit - base - FD_SLACK < (long)want) {
		long cap = s->fd_limit - base - FD_SLACK;
		s->conn_cap = cap > 0 ? (size_t)cap : 0;
		srv_log("warning",
		        "ulimit -n %ld leaves room for %zu connections (%ld "
		        "descriptors in use, %d kept spare), below "
		        "--max-connections %zu: later ones are answered "
		        "-32000; raise the limit to serve more",
		        s->fd_limit, s->conn_cap, base, FD_SLACK, want);
	}
}

size_t srv__owner_reserve(const srv_config *cfg)
{
	if (cfg->owner_reserve != SRV_RESERVE_AUTO)
		return cfg->owner_reserve;
	return cfg->limits.max_conns / 8 < 16 ? cfg->limits.max_conns / 8 : 16;
}

const char *srv__admit(conn *c, char *why, size_t size)
{
	srv *s = c->srv;
	const srv_config *cfg = s->cfg;
	size_t open = (size_t)s->stats->connections_open; /* c included */
	size_t cap = s->conn_cap;
	size_t reserve = srv__owner_reserve(cfg);
	int owner = c->peer && c->peer->owner;

	if (open > cap) {
		if (cap < cfg->limits.max_conns) {
			if (!s->fd_warned) {
				s->fd_warned = 1;
				srv_log("warning",
				        "out of file descriptors (ulimit -n "
				        "%ld): refusing connections past %zu",
				        s->fd_limit, cap);
			}
			snprintf(why, size,
			         "server busy: out of file descriptors; retry "
			         "later");
			return "descriptor limit";
		}
		snprintf(why, size,
		         "server busy: too many connections; retry later");
		return "connection limit";
	}
	if (!owner && reserve && open + reserve > cap) {
		snprintf(why, size,
		         "server busy: the last %zu connections are kept for "
		         "the socket's owner; retry later",
		         reserve);
		return "owner's reserve";
	}
	if (!owner && cfg->max_per_peer && c->peer &&
	    c->peer->conns > cfg->max_per_peer) {
		snprintf(why, size,
		         "server busy: %zu connections from %s already "
		         "(--max-per-peer); close some or retry later",
		         c->peer->conns - 1, c->peer->key);
		return "per-peer limit";
	}
	if (open <= cap / 2)
		s->fd_warned = 0;
	return NULL;
}
