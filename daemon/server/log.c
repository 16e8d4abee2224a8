/* Logging: one line per event on stderr, which --log points at a file
 * (reopened on SIGHUP for rotation); warnings a client can provoke at
 * will (refused connections) go through a rate limiter. */
#include <errno.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdio.h>
#include <time.h>
#include <unistd.h>

#include "server/internal.h"

void srv_log(const char *level, const char *fmt, ...)
{
	char msg[1024], stamp[32];
	struct timespec ts;
	struct tm tm;
	va_list ap;

	clock_gettime(CLOCK_REALTIME, &ts);
	gmtime_r(&ts.tv_sec, &tm);
	strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", &tm);
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	fprintf(stderr, "%s rockwired[%ld]: %s: %s\n", stamp, (long)getpid(),
	        level, msg);
}

int srv_log_open(const char *path)
{
	int fd = open(path, O_WRONLY | O_APPEND | O_CREAT | O_CLOEXEC, 0600);
	int err;

	if (fd < 0)
		return -1;
	if (fd != STDERR_FILENO && dup2(fd, STDERR_FILENO) < 0) {
		err = errno;
		close(fd);
		errno = err;
		return -1;
	}
	if (fd != STDERR_FILENO)
		close(fd);
	return 0;
}

int srv__ratelimit(srv_ratelimit *rl, uint64_t now_ms)
{
	srv__ratelimit_flush(rl, now_ms);
	if (rl->count < SRV_LOG_BURST) {
		rl->count++;
		return 1;
	}
	rl->suppressed++;
	return 0;
}

void srv__ratelimit_flush(srv_ratelimit *rl, uint64_t now_ms)
{
	if (now_ms - rl->start_ms < SRV_LOG_WINDOW_MS)
		return;
	if (rl->suppressed)
		srv_log("warning", "%lu more %s not logged in the last %u s",
		        rl->suppressed, rl->what,
		        (unsigned)((now_ms - rl->start_ms) / 1000));
	rl->start_ms = now_ms;
	rl->count = 0;
	rl->suppressed = 0;
}
