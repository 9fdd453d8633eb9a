/* peakrss.c - runs a command and prints its peak resident set size (KiB,
 * from wait4's rusage), wall time (s) and CPU time (user + system, s, of the
 * command and its threads; and user time alone) on stderr:
 * "peak_rss_kib S wall_s T cpu_s C user_s U".
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
    double user = (double)ru.ru_utime.tv_sec + 1e-6 * (double)ru.ru_utime.tv_usec;
    double sys = (double)ru.ru_stime.tv_sec + 1e-6 * (double)ru.ru_stime.tv_usec;
    fprintf(stderr, "peak_rss_kib %ld wall_s %.3f cpu_s %.3f user_s %.3f\n", ru.ru_maxrss,
            (double)(b.tv_sec - a.tv_sec) + 1e-9 * (double)(b.tv_nsec - a.tv_nsec), user + sys, user);
    return WIFEXITED(status) ? WEXITSTATUS(status) : 1;
}
