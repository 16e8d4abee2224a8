/* Client connections: to a daemon's Unix socket, or to a private
 * `rockwired --stdio` child over a socket pair. Before trusting a socket
 * path the client checks who owns it and the directories above it, and
 * after connecting who runs the daemon (SO_PEERCRED): another local user
 * must not be able to plant a socket that answers in the daemon's place.
 * Blocking line I/O with a bound on the line length. */
#define _GNU_SOURCE /* struct ucred, SO_PEERCRED */
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <poll.h>
#include <pwd.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/un.h>
#include <sys/wait.h>
#include <unistd.h>

#include "cli.h"

void cli__default_socket(char *buf, size_t size)
{
	const char *xdg = getenv("XDG_RUNTIME_DIR");
	if (xdg && *xdg)
		snprintf(buf, size, "%s/rockwire.sock", xdg);
	else
		snprintf(buf, size, "/tmp/rockwire-%ld/rockwire.sock",
		         (long)getuid());
}

/* "uid N (name)" for messages. */
static void who_is(uid_t uid, char *buf, size_t size)
{
	struct passwd *pw = getpwuid(uid);
	if (pw && pw->pw_name)
		snprintf(buf, size, "uid %ld (%s)", (long)uid, pw->pw_name);
	else
		snprintf(buf, size, "uid %ld", (long)uid);
}

/* One directory on the way to the socket. last: the one holding it. */
static int dir_safe(const char *dir, int last, int is_default, char *why,
                    size_t whylen)
{
	struct stat st;
	uid_t me = getuid();
	char owner[96];

	if (stat(dir, &st) < 0) {
		if (errno == ENOENT || errno == ENOTDIR)
			return 0;
		snprintf(why, whylen, "directory %s: %s", dir, strerror(errno));
		return -1;
	}
	who_is(st.st_uid, owner, sizeof owner);
	if (!S_ISDIR(st.st_mode)) {
		snprintf(why, whylen, "%s is not a directory", dir);
		return -1;
	}
	if (last && is_default) {
		/* The default folder is the user's own, closed to others. */
		if (st.st_uid != me) {
			snprintf(why, whylen,
			         "directory %s is owned by %s, not by you", dir,
			         owner);
			return -1;
		}
		if (st.st_mode & 077) {
			snprintf(why, whylen,
			         "directory %s has mode %04o; it must be 0700 "
			         "(open to you only)",
			         dir, (unsigned)(st.st_mode & 07777));
			return -1;
		}
		return 1;
	}
	if (st.st_uid != me && st.st_uid != 0) {
		snprintf(why, whylen,
		         "directory %s is owned by %s, not by you or root", dir,
		         owner);
		return -1;
	}
	/* Group write is the owner's choice of a trusted group; write by
	 * everyone is safe only with the sticky bit (as /tmp), where nobody
	 * can remove or rename another user's entry. */
	if ((st.st_mode & S_IWOTH) && !(st.st_mode & S_ISVTX)) {
		snprintf(why, whylen,
		         "directory %s is writable by others (mode %04o) "
		         "without the sticky bit",
		         dir, (unsigned)(st.st_mode & 07777));
		return -1;
	}
	return 1;
}

int cli__socket_safe(const char *path, int is_default, char *why, size_t whylen)
{
	char dir[PATH_MAX], real[PATH_MAX], owner[96];
	const char *slash = strrchr(path, '/');
	struct stat st;
	uid_t me = getuid();
	int rc;

	why[0] = '\0';
	if (!slash)
		snprintf(dir, sizeof dir, ".");
	else if (slash == path)
		snprintf(dir, sizeof dir, "/");
	else
		snprintf(dir, sizeof dir, "%.*s", (int)(slash - path), path);
	if (!realpath(dir, real)) {
		if (errno == ENOENT || errno == ENOTDIR)
			return 0; /* nothing there: nothing listens */
		snprintf(why, whylen, "directory %s: %s", dir, strerror(errno));
		return -1;
	}
	/* Every directory from / down to the one holding the socket. */
	for (char *p = real + 1;; p++) {
		int last = *p == '\0';
		char save = *p;
		if (*p != '/' && !last)
			continue;
		*p = '\0';
		rc = dir_safe(real[0] ? real : "/", last, is_default, why,
		              whylen);
		*p = save;
		if (rc <= 0)
			return rc;
		if (last)
			break;
	}
	if (lstat(path, &st) < 0) {
		if (errno == ENOENT)
			return 0;
		snprintf(why, whylen, "%s: %s", path, strerror(errno));
		return -1;
	}
	who_is(st.st_uid, owner, sizeof owner);
	if (S_ISLNK(st.st_mode)) {
		snprintf(why, whylen, "%s is a symbolic link (owned by %s)",
		         path, owner);
		return -1;
	}
	if (!S_ISSOCK(st.st_mode)) {
		snprintf(why, whylen, "%s is not a socket", path);
		return -1;
	}
	if (st.st_uid != me && st.st_uid != 0) {
		snprintf(why, whylen, "%s is owned by %s, not by you", path,
		         owner);
		return -1;
	}
	if (st.st_mode & S_IWOTH) {
		snprintf(why, whylen,
		         "%s is writable by others (mode %04o): anyone could "
		         "talk to that daemon",
		         path, (unsigned)(st.st_mode & 07777));
		return -1;
	}
	return 1;
}

static int connect_unix(const char *path, int *err)
{
	struct sockaddr_un sa;
	int fd;

	memset(&sa, 0, sizeof sa);
	sa.sun_family = AF_UNIX;
	if (strlen(path) >= sizeof sa.sun_path) {
		*err = ENAMETOOLONG;
		return -1;
	}
	memcpy(sa.sun_path, path, strlen(path) + 1);
	fd = socket(AF_UNIX, SOCK_STREAM | SOCK_CLOEXEC, 0);
	if (fd < 0) {
		*err = errno;
		return -1;
	}
	if (connect(fd, (struct sockaddr *)&sa, sizeof sa) < 0) {
		*err = errno;
		close(fd);
		return -1;
	}
	return fd;
}

/* Finds rockwired: $ROCKWIRED, then beside this executable, then PATH. */
static void find_daemon(const cli_opts *o, char *buf, size_t size)
{
	const char *env = getenv("ROCKWIRED");
	char self[PATH_MAX - 32];
	ssize_t n;

	if (o->daemon_path) {
		snprintf(buf, size, "%s", o->daemon_path);
		return;
	}
	if (env && *env) {
		snprintf(buf, size, "%s", env);
		return;
	}
	n = readlink("/proc/self/exe", self, sizeof self - 1);
	if (n > 0) {
		char *slash;
		self[n] = '\0';
		slash = strrchr(self, '/');
		if (slash) {
			*slash = '\0';
			snprintf(buf, size, "%s/rockwired", self);
			if (access(buf, X_OK) == 0)
				return;
		}
	}
	snprintf(buf, size, "rockwired");
}

static int spawn_daemon(const cli_opts *o, cli_conn *c)
{
	char path[PATH_MAX];
	int sv[2];
	pid_t pid;

	find_daemon(o, path, sizeof path);
	if (socketpair(AF_UNIX, SOCK_STREAM | SOCK_CLOEXEC, 0, sv) < 0) {
		fprintf(stderr, "rockwire: socketpair: %s\n", strerror(errno));
		return -1;
	}
	pid = fork();
	if (pid < 0) {
		fprintf(stderr, "rockwire: fork: %s\n", strerror(errno));
		close(sv[0]);
		close(sv[1]);
		return -1;
	}
	if (pid == 0) {
		/* The child must not die of the signals meant for us. */
		signal(SIGINT, SIG_IGN);
		if (dup2(sv[1], 0) < 0 || dup2(sv[1], 1) < 0)
			_exit(127);
		execlp(path, path, "--stdio", (char *)NULL);
		fprintf(stderr, "rockwire: cannot run %s: %s\n", path,
		        strerror(errno));
		_exit(127);
	}
	close(sv[1]);
	c->rfd = c->wfd = sv[0];
	c->child = pid;
	snprintf(c->desc, sizeof c->desc, "private daemon %.200s (pid %ld)",
	         path, (long)pid);
	return 0;
}

/* The daemon behind fd must run as this user or as root. */
static int peer_safe(int fd, const char *path)
{
#ifdef SO_PEERCRED
	struct ucred cr;
	socklen_t len = sizeof cr;
	char owner[96];

	if (getsockopt(fd, SOL_SOCKET, SO_PEERCRED, &cr, &len) < 0)
		return 0; /* not knowable here: the path checks stand */
	if (cr.uid != getuid() && cr.uid != 0) {
		who_is(cr.uid, owner, sizeof owner);
		fprintf(stderr,
		        "rockwire: refusing %s: the daemon there runs as %s, "
		        "not as you; use --socket PATH or --spawn\n",
		        path, owner);
		return -1;
	}
#else
	(void)fd;
	(void)path;
#endif
	return 0;
}

int cli_connect(const cli_opts *o, cli_conn *c)
{
	char path[512], why[PATH_MAX + 256];
	int err = 0, fd, safe;

	memset(c, 0, sizeof *c);
	c->rfd = c->wfd = -1;
	c->max_line = o->max_line ? o->max_line : CLI_DEFAULT_MAX_LINE;
	signal(SIGPIPE, SIG_IGN);
	if (!o->spawn) {
		if (o->socket_path)
			snprintf(path, sizeof path, "%s", o->socket_path);
		else
			cli__default_socket(path, sizeof path);
		safe = cli__socket_safe(path, !o->socket_path, why, sizeof why);
		if (safe < 0) {
			fprintf(stderr,
			        "rockwire: refusing the socket: %s; remove it, "
			        "or use --socket PATH or --spawn\n",
			        why);
			return -1;
		}
		if (safe > 0) {
			fd = connect_unix(path, &err);
			if (fd >= 0) {
				if (peer_safe(fd, path)) {
					close(fd);
					return -1;
				}
				c->rfd = c->wfd = fd;
				snprintf(c->desc, sizeof c->desc, "unix:%.240s",
				         path);
				return 0;
			}
			if (err != ECONNREFUSED && err != ENOENT) {
				fprintf(stderr, "rockwire: %s: %s\n", path,
				        strerror(err));
				return -1;
			}
		}
		/* Nothing listens there: a private daemon. */
	}
	return spawn_daemon(o, c);
}

void cli_close_write(cli_conn *c)
{
	if (c->wfd >= 0) {
		if (c->wfd == c->rfd)
			shutdown(c->wfd, SHUT_WR);
		else
			close(c->wfd);
		if (c->wfd != c->rfd)
			c->wfd = -1;
	}
}

int cli_disconnect(cli_conn *c)
{
	int status = 0;

	if (c->rfd >= 0)
		close(c->rfd);
	if (c->wfd >= 0 && c->wfd != c->rfd)
		close(c->wfd);
	c->rfd = c->wfd = -1;
	if (c->child > 0) {
		while (waitpid(c->child, &status, 0) < 0 && errno == EINTR)
			;
		status = WIFEXITED(status) ? WEXITSTATUS(status) : 128;
		c->child = 0;
	}
	free(c->rbuf);
	c->rbuf = NULL;
	c->rlen = c->rcap = c->rstart = 0;
	return status;
}

int cli_write_all(cli_conn *c, const char *buf, size_t n)
{
	while (n) {
		ssize_t w = write(c->wfd, buf, n);
		if (w < 0) {
			if (errno == EINTR)
				continue;
			if (errno == EAGAIN) {
				struct pollfd p = {c->wfd, POLLOUT, 0};
				poll(&p, 1, -1);
				continue;
			}
			fprintf(stderr, "rockwire: write to %s: %s\n", c->desc,
			        strerror(errno));
			return -1;
		}
		buf += w;
		n -= (size_t)w;
	}
	return 0;
}

/* Makes room for at least `extra` more bytes in the receive buffer. */
static int rbuf_room(cli_conn *c, size_t extra)
{
	if (c->rstart && c->rstart == c->rlen)
		c->rstart = c->rlen = 0;
	if (c->rstart && c->rstart > c->rcap / 2) {
		memmove(c->rbuf, c->rbuf + c->rstart, c->rlen - c->rstart);
		c->rlen -= c->rstart;
		c->rstart = 0;
	}
	if (c->rcap - c->rlen < extra) {
		size_t cap = c->rcap ? c->rcap : 65536;
		char *b;
		while (cap - c->rlen < extra)
			cap *= 2;
		b = realloc(c->rbuf, cap);
		if (!b)
			return -1;
		c->rbuf = b;
		c->rcap = cap;
	}
	return 0;
}

int cli_read_line(cli_conn *c, char **line, size_t *len, int timeout_ms)
{
	size_t max = c->max_line ? c->max_line : CLI_DEFAULT_MAX_LINE;
	size_t scanned = 0;

	for (;;) {
		/* No pointer arithmetic on a buffer not yet allocated. */
		size_t avail = c->rlen - c->rstart;
		char *start = c->rbuf ? c->rbuf + c->rstart : NULL;
		char *nl = avail
		               ? memchr(start + scanned, '\n', avail - scanned)
		               : NULL;
		if (nl) {
			*nl = '\0';
			*line = start;
			*len = (size_t)(nl - start);
			c->rstart += *len + 1;
			return 1;
		}
		scanned = avail;
		if (avail > max) {
			fprintf(stderr,
			        "rockwire: a response line from %s is longer "
			        "than %zu bytes (--max-line)\n",
			        c->desc, max);
			return -3;
		}
		if (c->eof) {
			if (avail) {
				/* A last line without '\n'. */
				if (rbuf_room(c, 1))
					return -1;
				start = c->rbuf + c->rstart;
				start[avail] = '\0';
				*line = start;
				*len = avail;
				c->rstart = c->rlen;
				return 1;
			}
			return 0;
		}
		if (timeout_ms >= 0) {
			struct pollfd p = {c->rfd, POLLIN, 0};
			int r = poll(&p, 1, timeout_ms);
			if (r == 0)
				return -2;
			if (r < 0 && errno != EINTR)
				return -1;
			if (r < 0)
				return -2; /* interrupted: let the caller look
				            */
		}
		if (rbuf_room(c, 65536)) {
			fprintf(stderr, "rockwire: out of memory\n");
			return -1;
		}
		ssize_t r = read(c->rfd, c->rbuf + c->rlen, 65536);
		if (r < 0) {
			if (errno == EINTR)
				continue;
			if (errno == EAGAIN)
				return timeout_ms >= 0 ? -2 : -1;
			fprintf(stderr, "rockwire: read from %s: %s\n", c->desc,
			        strerror(errno));
			return -1;
		}
		if (r == 0)
			c->eof = 1;
		c->rlen += (size_t)r;
		/* The read may have moved the buffer: rescan from where the
		 * unscanned bytes start. */
	}
}
