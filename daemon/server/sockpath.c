/* Socket paths: the default path, the checks on its directory, the
 * checks on what already exists at a path, and the validation of
 * --listen specs. The rules are those of protocol-docs/limits.md
 * ("Default socket path"), which the client follows too:
 *
 *   1. $XDG_RUNTIME_DIR/rockwire.sock when XDG_RUNTIME_DIR is set to an
 *      absolute path (a relative one is ignored, as the XDG Base
 *      Directory specification says);
 *   2. else /tmp/rockwire-<euid>/rockwire.sock, the directory created
 *      mode 0700 when missing.
 *
 * The directory is checked with lstat: a directory (not a symbolic
 * link), owned by the effective uid, not writable by group or others.
 * Anything else means another user may have planted it, and the daemon
 * refuses it, naming the owner. */
#include <errno.h>
#include <limits.h>
#include <pwd.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/un.h>
#include <unistd.h>

#include "server/internal.h"

#define SOCK_NAME   "rockwire.sock"
#define SUN_PATH_SZ sizeof(((struct sockaddr_un *)0)->sun_path)

void srv__owner_text(uid_t uid, char *buf, size_t size)
{
	struct passwd pw, *res = NULL;
	char tmp[1024];

	if (getpwuid_r(uid, &pw, tmp, sizeof tmp, &res) == 0 && res &&
	    res->pw_name)
		snprintf(buf, size, "uid %ld (%s)", (long)uid, res->pw_name);
	else
		snprintf(buf, size, "uid %ld", (long)uid);
}

/* The directory part of the default path; 1 when it is the /tmp
 * fallback (which the daemon may create). */
static int default_dir(char *buf, size_t size)
{
	const char *xdg = getenv("XDG_RUNTIME_DIR");
	int n;

	if (xdg && xdg[0] == '/') {
		n = snprintf(buf, size, "%s", xdg);
		/* a trailing '/' would double in the path */
		while (n > 1 && buf[n - 1] == '/')
			buf[--n] = '\0';
		return (n < 0 || (size_t)n >= size) ? -1 : 0;
	}
	n = snprintf(buf, size, "/tmp/rockwire-%ld", (long)geteuid());
	return (n < 0 || (size_t)n >= size) ? -1 : 1;
}

int srv_default_socket_path(char *buf, size_t size)
{
	char dir[PATH_MAX];
	int n;

	if (default_dir(dir, sizeof dir) < 0)
		return -1;
	n = snprintf(buf, size, "%s/%s", dir, SOCK_NAME);
	if (n < 0 || (size_t)n >= size || (size_t)n >= SUN_PATH_SZ)
		return -1;
	return 0;
}

/* Checks the directory with lstat. Returns 0, or -1 after logging why. */
static int check_dir(const char *dir)
{
	struct stat st;
	char who[160], me[160];

	if (lstat(dir, &st) < 0) {
		srv_log("error", "socket directory %s: %s", dir,
		        strerror(errno));
		return -1;
	}
	srv__owner_text(st.st_uid, who, sizeof who);
	srv__owner_text(geteuid(), me, sizeof me);
	if (S_ISLNK(st.st_mode)) {
		srv_log("error",
		        "socket directory %s is a symbolic link owned by %s; "
		        "refusing it (another user may have planted it)",
		        dir, who);
		return -1;
	}
	if (!S_ISDIR(st.st_mode)) {
		srv_log("error",
		        "socket directory %s is not a directory (owned by %s); "
		        "refusing it",
		        dir, who);
		return -1;
	}
	if (st.st_uid != geteuid()) {
		srv_log(
		    "error",
		    "socket directory %s is owned by %s, not by %s: another "
		    "user may have planted it; refusing it (remove it, or "
		    "set XDG_RUNTIME_DIR or --socket)",
		    dir, who, me);
		return -1;
	}
	if (st.st_mode & (S_IWGRP | S_IWOTH)) {
		srv_log("error",
		        "socket directory %s has mode %04o: writable by %s, so "
		        "others could replace the socket; refusing it (chmod "
		        "0700 it)",
		        dir, (unsigned)(st.st_mode & 07777),
		        st.st_mode & S_IWOTH ? "everyone" : "its group");
		return -1;
	}
	return 0;
}

int srv__default_socket(char *path, size_t size)
{
	char dir[PATH_MAX];
	int fallback = default_dir(dir, sizeof dir);

	if (fallback < 0 || srv_default_socket_path(path, size) < 0) {
		srv_log("error",
		        "the default socket path under %s is longer than a "
		        "socket address holds (%zu bytes); give --socket",
		        fallback == 0 ? "$XDG_RUNTIME_DIR" : "/tmp",
		        SUN_PATH_SZ - 1);
		return SRV_EXIT_USAGE;
	}
	if (fallback == 1) {
		if (mkdir(dir, 0700) == 0) {
			/* ours from birth: the mode is exact whatever the
			 * umask */
			if (chmod(dir, 0700) < 0) {
				srv_log("error", "chmod %s: %s", dir,
				        strerror(errno));
				return SRV_EXIT_LISTEN;
			}
			srv_log("info", "created socket directory %s (0700)",
			        dir);
		} else if (errno != EEXIST) {
			srv_log("error",
			        "cannot create socket directory %s: %s", dir,
			        strerror(errno));
			return SRV_EXIT_LISTEN;
		}
	}
	return check_dir(dir) < 0 ? SRV_EXIT_LISTEN : SRV_EXIT_OK;
}

int srv__check_existing(const char *path, const struct stat *st)
{
	char who[160], me[160];

	srv__owner_text(st->st_uid, who, sizeof who);
	srv__owner_text(geteuid(), me, sizeof me);
	if (S_ISLNK(st->st_mode)) {
		srv_log("error",
		        "%s is a symbolic link owned by %s; refusing to follow "
		        "or remove it",
		        path, who);
		return -1;
	}
	if (!S_ISSOCK(st->st_mode)) {
		srv_log("error",
		        "%s exists and is not a socket (owned by %s); refusing "
		        "to touch it",
		        path, who);
		return -1;
	}
	if (st->st_uid != geteuid()) {
		srv_log("error",
		        "%s is a socket owned by %s, not by %s: another user "
		        "may have planted it; refusing to use or remove it",
		        path, who, me);
		return -1;
	}
	return 0;
}

#if RW_WITH_TCP
/* Parses a decimal port of at most 5 digits; -1 when it is not one. */
static long parse_port(const char *s)
{
	long v = 0;
	int n = 0;

	for (; *s; s++, n++) {
		if (*s < '0' || *s > '9' || n >= 5)
			return -1;
		v = v * 10 + (*s - '0');
	}
	return n ? v : -1;
}
#endif

int srv_check_listen_spec(const char *spec, char *err, size_t size)
{
	if (strncmp(spec, "unix:", 5) == 0) {
		size_t n = strlen(spec + 5);
		if (!n) {
			snprintf(err, size, "'%s': empty socket path", spec);
			return -1;
		}
		if (n >= SUN_PATH_SZ) {
			snprintf(err, size,
			         "socket path of %zu bytes is longer than a "
			         "socket address holds (%zu bytes)",
			         n, SUN_PATH_SZ - 1);
			return -1;
		}
		return 0;
	}
	if (strncmp(spec, "tcp:", 4) == 0) {
#if RW_WITH_TCP
		const char *colon = strrchr(spec + 4, ':');
		long port;
		if (!colon || colon == spec + 4) {
			snprintf(err, size,
			         "'%s' is not tcp:HOST:PORT or tcp:[V6]:PORT",
			         spec);
			return -1;
		}
		port = parse_port(colon + 1);
		if (port < 0 || port > 65535) {
			snprintf(err, size,
			         "'%s': port '%s' is not in 1..65535 (or 0 to "
			         "pick a free one)",
			         spec, colon + 1);
			return -1;
		}
		return 0;
#else
		snprintf(err, size,
		         "'%s': this rockwired was built without TCP (cmake "
		         "-DRW_WITH_TCP=OFF); use unix:PATH, or rebuild with "
		         "-DRW_WITH_TCP=ON",
		         spec);
		return -1;
#endif
	}
#if RW_WITH_TCP
	snprintf(err, size, "'%s' is not unix:PATH or tcp:HOST:PORT", spec);
#else
	snprintf(err, size, "'%s' is not unix:PATH (built without TCP)", spec);
#endif
	return -1;
}
