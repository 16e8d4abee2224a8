/* Client connections: to a daemon's Unix socket, or to a private
 * `rockwired --stdio` child over a socket pair. Blocking line I/O plus a
 * poll()-driven pump for pipelined streams. */
#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <poll.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/un.h>
#include <sys/wait.h>
#include <unistd.h>

#include "cli.h"

static void default_socket(char *buf, size_t size)
{
	const char *xdg = getenv("XDG_RUNTIME_DIR");
	if (xdg && *xdg)
		snprintf(buf, size, "%s/rockwire.sock", xdg);
	else
		snprintf(buf, size, "/tmp/rockwire-%ld.sock", (long)getuid());
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

int cli_connect(const cli_opts *o, cli_conn *c)
{
	char path[512];
	int err = 0, fd;

	memset(c, 0, sizeof *c);
	c->rfd = c->wfd = -1;
	signal(SIGPIPE, SIG_IGN);
	if (!o->spawn) {
		if (o->socket_path)
			snprintf(path, sizeof path, "%s", o->socket_path);
		else
			default_socket(path, sizeof path);
		fd = connect_unix(path, &err);
		if (fd >= 0) {
			c->rfd = c->wfd = fd;
			snprintf(c->desc, sizeof c->desc, "unix:%.240s", path);
			return 0;
		}
		if (err != ENOENT && err != ECONNREFUSED) {
			fprintf(stderr, "rockwire: %s: %s\n", path,
			        strerror(err));
			return -1;
		}
		/* Nothing listens there: fall back to a private daemon. */
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
	return status;
}

int cli_write_all(cli_conn *c, const char *buf, size_t n)
{
	while (n) {
		ssize_t w = write(c->wfd, buf, n);
		if (w < 0) {
			if (errno == EINTR)
				continue;
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
	if (c->rstart > c->rcap / 2) {
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
	size_t scanned = 0;

	for (;;) {
		char *start = c->rbuf + c->rstart;
		size_t avail = c->rlen - c->rstart;
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
		}
		if (rbuf_room(c, 65536))
			return -1;
		scanned = c->rlen - c->rstart;
		ssize_t r = read(c->rfd, c->rbuf + c->rlen, 65536);
		if (r < 0) {
			if (errno == EINTR)
				continue;
			fprintf(stderr, "rockwire: read from %s: %s\n", c->desc,
			        strerror(errno));
			return -1;
		}
		if (r == 0)
			c->eof = 1;
		c->rlen += (size_t)r;
	}
}

int cli_pump(cli_conn *c, int in_fd, int out_fd)
{
	char *ibuf = malloc(65536), *obuf = malloc(65536);
	size_t ilen = 0, ioff = 0;
	int in_open = 1, rc = 0;

	if (!ibuf || !obuf) {
		free(ibuf);
		free(obuf);
		return -1;
	}
	fcntl(c->wfd, F_SETFL, fcntl(c->wfd, F_GETFL) | O_NONBLOCK);
	for (;;) {
		struct pollfd p[3];
		int n = 0, iw = -1, ir = -1, dr;
		if (in_open && ioff == ilen) {
			p[n] = (struct pollfd){in_fd, POLLIN, 0};
			ir = n++;
		}
		if (ioff < ilen) {
			p[n] = (struct pollfd){c->wfd, POLLOUT, 0};
			iw = n++;
		}
		p[n] = (struct pollfd){c->rfd, POLLIN, 0};
		dr = n++;
		if (poll(p, (nfds_t)n, -1) < 0) {
			if (errno == EINTR)
				continue;
			rc = -1;
			break;
		}
		if (ir >= 0 && p[ir].revents) {
			ssize_t r = read(in_fd, ibuf, 65536);
			if (r <= 0) {
				if (r < 0 && errno == EINTR)
					continue;
				in_open = 0;
				cli_close_write(c);
			} else {
				ilen = (size_t)r;
				ioff = 0;
			}
		}
		if (iw >= 0 && p[iw].revents) {
			ssize_t w = write(c->wfd, ibuf + ioff, ilen - ioff);
			if (w < 0 && errno != EAGAIN && errno != EINTR) {
				fprintf(stderr, "rockwire: write to %s: %s\n",
				        c->desc, strerror(errno));
				rc = -1;
				break;
			}
			if (w > 0)
				ioff += (size_t)w;
			if (ioff == ilen && !in_open)
				cli_close_write(c);
		}
		if (p[dr].revents) {
			ssize_t r = read(c->rfd, obuf, 65536);
			if (r < 0 && errno == EINTR)
				continue;
			if (r <= 0)
				break; /* the daemon has answered everything */
			for (ssize_t off = 0; off < r;) {
				ssize_t w = write(out_fd, obuf + off,
				                  (size_t)(r - off));
				if (w < 0) {
					if (errno == EINTR)
						continue;
					rc = -1;
					goto out;
				}
				off += w;
			}
		}
	}
out:
	free(ibuf);
	free(obuf);
	return rc;
}
