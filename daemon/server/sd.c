/* The service-manager side of the daemon, without libsystemd: socket
 * activation (sockets passed from fd 3 on, announced by LISTEN_FDS and
 * LISTEN_PID) and readiness notification (datagrams such as "READY=1" to
 * the AF_UNIX socket named by NOTIFY_SOCKET, a path or, with a leading
 * '@', an abstract address). Both follow the documented systemd
 * interface (sd_listen_fds(3), sd_notify(3)). */
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <stddef.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/un.h>
#include <unistd.h>

#include "server/sd.h"

#define SD_FIRST_FD 3

/* Parses a decimal in [0, max]; -1 when it is not one. */
static long parse_dec(const char *s, long max)
{
	char *end;
	long v;

	if (!s || *s < '0' || *s > '9')
		return -1;
	errno = 0;
	v = strtol(s, &end, 10);
	if (errno || *end || v < 0 || v > max)
		return -1;
	return v;
}

int srv__listen_fds(int *fds, int max, int *ignored)
{
	const char *pid_s = getenv("LISTEN_PID");
	const char *n_s = getenv("LISTEN_FDS");
	long pid, n;
	int i, got = 0;

	*ignored = 0;
	if (!n_s && !pid_s)
		return 0;
	pid = parse_dec(pid_s, LONG_MAX);
	n = parse_dec(n_s, 4096);
	/* The variables are for one process only: never pass them on. */
	unsetenv("LISTEN_PID");
	unsetenv("LISTEN_FDS");
	unsetenv("LISTEN_FDNAMES");
	if (pid != (long)getpid() || n <= 0) {
		*ignored = 1;
		return 0;
	}
	for (i = 0; i < n; i++) {
		int fd = SD_FIRST_FD + i;
		int fl = fcntl(fd, F_GETFD);
		if (fl < 0)
			continue;
		/* Ours alone: not inherited by anything we might run. */
		fcntl(fd, F_SETFD, fl | FD_CLOEXEC);
		if (got < max)
			fds[got++] = fd;
		else
			*ignored += 1;
	}
	return got;
}

int srv__notify_open(srv_notify *n)
{
	const char *e = getenv("NOTIFY_SOCKET");
	size_t len;

	memset(n, 0, sizeof *n);
	n->fd = -1;
	if (!e || !*e)
		return 0;
	len = strlen(e);
	if ((e[0] != '/' && e[0] != '@') || len >= sizeof n->addr.sun_path) {
		unsetenv("NOTIFY_SOCKET");
		return -1;
	}
	n->addr.sun_family = AF_UNIX;
	memcpy(n->addr.sun_path, e, len);
	if (e[0] == '@')
		n->addr.sun_path[0] = '\0'; /* abstract namespace */
	n->addr_len = (socklen_t)(offsetof(struct sockaddr_un, sun_path) + len +
	                          (e[0] == '/'));
	unsetenv("NOTIFY_SOCKET");
	n->fd = socket(AF_UNIX, SOCK_DGRAM | SOCK_CLOEXEC, 0);
	return n->fd < 0 ? -1 : 1;
}

int srv__notify_send(srv_notify *n, const char *msg)
{
	ssize_t r;

	if (n->fd < 0)
		return 0;
	do
		r = sendto(n->fd, msg, strlen(msg), MSG_NOSIGNAL,
		           (const struct sockaddr *)&n->addr, n->addr_len);
	while (r < 0 && errno == EINTR);
	return r < 0 ? -1 : 0;
}

void srv__notify_close(srv_notify *n)
{
	if (n->fd >= 0)
		close(n->fd);
	n->fd = -1;
}
