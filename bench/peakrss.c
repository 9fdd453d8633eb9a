/* peakrss.c - runs a command and prints its peak resident set size (KiB,
 * from wait4's rusage) and wall time (s) on stderr: "peak_rss_kib S wall_s T".
 *   peakrss COMMAND [ARGS...] */
#define _DEFAULT_SOURCE
#include <stdio.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>

int main(int argc, char **argv)
{
    if (argc < 2)
        return 2;
    struct timespec a, b;
    clock_gettime(CLOCK_MONOTONIC, &a);
    pid_t pid = fork();
    if (pid == 0) {
        execvp(argv[1], argv + 1);
        _exit(127);
    }
    int status;
    struct rusage ru;
    wait4(pid, &status, 0, &ru);
    clock_gettime(CLOCK_MONOTONIC, &b);
    fprintf(stderr, "peak_rss_kib %ld wall_s %.3f\n", ru.ru_maxrss,
            (double)(b.tv_sec - a.tv_sec) + 1e-9 * (double)(b.tv_nsec - a.tv_nsec));
    return WIFEXITED(status) ? WEXITSTATUS(status) : 1;
}
