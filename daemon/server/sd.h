/* Socket activation and readiness notification for a service manager
 * (the systemd protocol, implemented here without libsystemd). Internal
 * to the server layer. */
#ifndef RW_SRV_SD_H
#define RW_SRV_SD_H

#include <sys/socket.h>
#include <sys/un.h>

#include "rw_features.h"

typedef struct srv_notify {
	int fd; /* datagram socket, or -1 */
	struct sockaddr_un addr;
	socklen_t addr_len;
} srv_notify;

/* Takes the sockets passed by the service manager: only when LISTEN_PID
 * is this process and LISTEN_FDS = n > 0, the fds 3 .. 3+n-1 that are
 * open, at most `max` of them (marked close-on-exec). LISTEN_PID,
 * LISTEN_FDS and LISTEN_FDNAMES are unset whenever present. Returns the
 * count stored in fds; *ignored is non-zero when the variables were
 * present but not for us (or more fds than `max` were passed). */
int srv__listen_fds(int *fds, int max, int *ignored);

/* Reads and unsets NOTIFY_SOCKET. Returns 1 when notifications will be
 * sent, 0 when there is no such variable, -1 when it is unusable (not an
 * absolute path or '@' name, too long, or no socket). */
#if RW_WITH_SYSTEMD
int srv__notify_open(srv_notify *n);
/* Sends one notification such as "READY=1"; 0, or -1 on failure. A
 * no-op returning 0 when notification is off. */
int srv__notify_send(srv_notify *n, const char *msg);
void srv__notify_close(srv_notify *n);
#else
/* Built without it (cmake -DRW_WITH_SYSTEMD=OFF): sd.c is not compiled,
 * notification is always off, and srv_run refuses a NOTIFY_SOCKET by
 * name (a service manager would otherwise wait for READY=1 in vain). */
static inline int srv__notify_open(srv_notify *n)
{
	n->fd = -1;
	return 0;
}
static inline int srv__notify_send(srv_notify *n, const char *msg)
{
	(void)n;
	(void)msg;
	return 0;
}
static inline void srv__notify_close(srv_notify *n)
{
	n->fd = -1;
}
#endif

#endif
