/* Load generator of tests/bench: feeds a file of request lines to a line
 * server and counts the answers, so the daemon and the floors are driven
 * and timed by the same code. Prints one JSON line.
 *   loadgen stdio FILE -- CMD [ARG...]
 *       runs CMD with stdin FILE and stdout a pipe; counts answer lines;
 *       wall time from fork to exit and the child's peak RSS (wait4)
 *   loadgen socket PATH FILE CONNS
 *       CONNS connections to the Unix socket PATH, each sending its share
 *       of FILE's lines as fast as the socket takes them while reading the
 *       answers (pipelined); time until every answer is in
 *   loadgen latency PATH FILE COUNT
 *       one connection, one request in flight: COUNT round trips cycling
 *       through FILE's lines; p50, p99 and mean in microseconds
 * Part of the benchmarks; never built by the test suite. */
#include <errno.h>
#include <fcntl.h>
#include <poll.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/time.h>
#include <sys/un.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

static double now(void)
{
	struct timespec t;
	clock_gettime(CLOCK_MONOTONIC, &t);
	return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static char *slurp(const char *path, size_t *len)
{
	FILE *f = fopen(path, "rb");
	char *b;
	long n;

	if (!f || fseek(f, 0, SEEK_END) || (n = ftell(f)) < 0 ||
	    fseek(f, 0, SEEK_SET))
		return NULL;
	b = malloc((size_t)n + 1);
	if (!b || fread(b, 1, (size_t)n, f) != (size_t)n)
		return NULL;
	fclose(f);
	*len = (size_t)n;
	return b;
}

static size_t count_nl(const char *p, size_t n)
{
	size_t c = 0;
	const char *e = p + n;
	while ((p = memchr(p, '\n', (size_t)(e - p))) != NULL) {
		c++;
		p++;
	}
	return c;
}

static int dial(const char *path)
{
	struct sockaddr_un a;
	int fd = socket(AF_UNIX, SOCK_STREAM, 0);

	memset(&a, 0, sizeof a);
	a.sun_family = AF_UNIX;
	snprintf(a.sun_path, sizeof a.sun_path, "%s", path);
	if (fd < 0 || connect(fd, (struct sockaddr *)&a, sizeof a) < 0) {
		perror("loadgen: connect");
		exit(3);
	}
	return fd;
}

static int run_stdio(const char *file, char **cmd)
{
	int pfd[2], in, status;
	pid_t pid;
	struct rusage ru;
	static char buf[1 << 16];
	size_t lines = 0, bytes = 0;
	ssize_t n;
	double t0;

	if (pipe(pfd) < 0 || (in = open(file, O_RDONLY)) < 0) {
		perror("loadgen");
		return 1;
	}
	t0 = now();
	pid = fork();
	if (pid == 0) {
		dup2(in, 0);
		dup2(pfd[1], 1);
		close(pfd[0]);
		close(pfd[1]);
		close(in);
		execvp(cmd[0], cmd);
		perror("loadgen: exec");
		_exit(127);
	}
	close(pfd[1]);
	close(in);
	while ((n = read(pfd[0], buf, sizeof buf)) != 0) {
		if (n < 0) {
			if (errno == EINTR)
				continue;
			break;
		}
		lines += count_nl(buf, (size_t)n);
		bytes += (size_t)n;
	}
	close(pfd[0]);
	if (wait4(pid, &status, 0, &ru) < 0) {
		perror("loadgen: wait4");
		return 1;
	}
	printf(
	    "{\"mode\":\"stdio\",\"lines\":%zu,\"bytes\":%zu,\"seconds\":%.6f,"
	    "\"maxrss_kb\":%ld,\"status\":%d}\n",
	    lines, bytes, now() - t0, ru.ru_maxrss,
	    WIFEXITED(status) ? WEXITSTATUS(status) : -1);
	return 0;
}

typedef struct lconn {
	int fd;
	const char *p;
	size_t left, want, got;
} lconn;

static int run_socket(const char *path, const char *file, int nconn)
{
	size_t len, total, per, i, lines = 0;
	char *data = slurp(file, &len);
	lconn *c;
	struct pollfd *pf;
	static char buf[1 << 16];
	const char *p;
	double t0;
	int open_n;

	if (!data || nconn < 1) {
		fprintf(stderr, "loadgen: cannot read %s\n", file);
		return 1;
	}
	total = count_nl(data, len);
	c = calloc((size_t)nconn, sizeof *c);
	pf = calloc((size_t)nconn, sizeof *pf);
	/* contiguous shares of whole lines */
	per = total / (size_t)nconn;
	p = data;
	for (i = 0; i < (size_t)nconn; i++) {
		size_t k = i + 1 == (size_t)nconn ? total - lines : per;
		const char *q = p;
		for (size_t j = 0; j < k; j++)
			q = (const char *)memchr(q, '\n',
			                         (size_t)(data + len - q)) +
			    1;
		c[i].p = p;
		c[i].left = (size_t)(q - p);
		c[i].want = k;
		lines += k;
		p = q;
	}
	t0 = now();
	for (i = 0; i < (size_t)nconn; i++) {
		c[i].fd = dial(path);
		fcntl(c[i].fd, F_SETFL, O_NONBLOCK);
	}
	open_n = nconn;
	while (open_n > 0) {
		for (i = 0; i < (size_t)nconn; i++) {
			pf[i].fd = c[i].got < c[i].want ? c[i].fd : -1;
			pf[i].events = POLLIN | (c[i].left ? POLLOUT : 0);
			pf[i].revents = 0;
		}
		if (poll(pf, (nfds_t)nconn, 30000) <= 0) {
			fprintf(stderr, "loadgen: stalled\n");
			return 1;
		}
		for (i = 0; i < (size_t)nconn; i++) {
			if (pf[i].revents & POLLOUT) {
				ssize_t w = write(c[i].fd, c[i].p, c[i].left);
				if (w > 0) {
					c[i].p += w;
					c[i].left -= (size_t)w;
				}
			}
			if (pf[i].revents & (POLLIN | POLLHUP | POLLERR)) {
				ssize_t r = read(c[i].fd, buf, sizeof buf);
				if (r > 0) {
					c[i].got += count_nl(buf, (size_t)r);
				} else if (r == 0 || errno != EAGAIN) {
					fprintf(
					    stderr,
					    "loadgen: connection %zu closed "
					    "after %zu of %zu answers\n",
					    i, c[i].got, c[i].want);
					return 1;
				}
				if (c[i].got >= c[i].want)
					open_n--;
			}
		}
	}
	double t = now() - t0;
	for (i = 0; i < (size_t)nconn; i++)
		close(c[i].fd);
	printf(
	    "{\"mode\":\"socket\",\"conns\":%d,\"lines\":%zu,\"seconds\":%.6f,"
	    "\"per_second\":%.1f}\n",
	    nconn, lines, t, (double)lines / t);
	free(data);
	free(c);
	free(pf);
	return 0;
}

static int cmp_d(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return x < y ? -1 : x > y;
}

static int run_latency(const char *path, const char *file, long count)
{
	size_t len, nl, i;
	char *data = slurp(file, &len);
	const char **starts;
	size_t *lens;
	double *t, sum = 0;
	static char buf[1 << 16];
	int fd;

	if (!data || count < 1)
		return 1;
	nl = count_nl(data, len);
	starts = malloc(nl * sizeof *starts);
	lens = malloc(nl * sizeof *lens);
	t = malloc((size_t)count * sizeof *t);
	{
		const char *p = data;
		for (i = 0; i < nl; i++) {
			const char *q =
			    memchr(p, '\n', (size_t)(data + len - p));
			starts[i] = p;
			lens[i] = (size_t)(q - p) + 1;
			p = q + 1;
		}
	}
	fd = dial(path);
	for (long k = 0; k < count; k++) {
		const char *p = starts[(size_t)k % nl];
		size_t left = lens[(size_t)k % nl];
		double t0 = now();
		while (left) {
			ssize_t w = write(fd, p, left);
			if (w <= 0) {
				perror("loadgen: write");
				return 1;
			}
			p += w;
			left -= (size_t)w;
		}
		for (;;) {
			ssize_t r = read(fd, buf, sizeof buf);
			if (r <= 0) {
				perror("loadgen: read");
				return 1;
			}
			if (memchr(buf, '\n', (size_t)r))
				break;
		}
		t[k] = (now() - t0) * 1e6;
		sum += t[k];
	}
	close(fd);
	qsort(t, (size_t)count, sizeof *t, cmp_d);
	printf("{\"mode\":\"latency\",\"count\":%ld,\"p50_us\":%.2f,"
	       "\"p99_us\":%.2f,\"mean_us\":%.2f}\n",
	       count, t[count / 2], t[(size_t)((double)count * 0.99)],
	       sum / (double)count);
	free(data);
	free(starts);
	free(lens);
	free(t);
	return 0;
}

int main(int argc, char **argv)
{
	if (argc >= 5 && strcmp(argv[1], "stdio") == 0 &&
	    strcmp(argv[3], "--") == 0)
		return run_stdio(argv[2], argv + 4);
	if (argc == 5 && strcmp(argv[1], "socket") == 0)
		return run_socket(argv[2], argv[3], atoi(argv[4]));
	if (argc == 5 && strcmp(argv[1], "latency") == 0)
		return run_latency(argv[2], argv[3], atol(argv[4]));
	fprintf(stderr, "usage: loadgen stdio FILE -- CMD [ARG...]\n"
	                "       loadgen socket PATH FILE CONNS\n"
	                "       loadgen latency PATH FILE COUNT\n");
	return 2;
}
