/*
 * 3x+1 records written as a plain C loop: for every start s in [lo, hi],
 * follow the classic (undivided) trajectory n -> n/2, 3n+1 one step at a time
 * until it reaches 1, and keep the record holders of
 *   - the steps to reach 1 (delay),
 *   - the first step below s (glide),
 *   - the largest value on the way (peak).
 * No table of earlier starts, no sieve: the plain way.
 *
 * Used by benchmarks/bench_records.py, which compiles it with gcc -O2.
 *
 * usage: plain_records LO HI
 * prints: wall seconds and CPU seconds of the loop, then one line per record:
 * kind start value
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

#define MAXREC 4096

int main(int argc, char **argv) {
    if (argc != 3) {
        fprintf(stderr, "usage: plain_records LO HI\n");
        return 2;
    }
    const uint64_t lo = strtoull(argv[1], NULL, 10);
    const uint64_t hi = strtoull(argv[2], NULL, 10);
    static uint64_t rs[3][MAXREC], rv[3][MAXREC];
    int nrec[3] = {0, 0, 0};
    uint64_t best[3] = {0, 0, 0};
    int have[3] = {0, 0, 0};
    struct timespec t0, t1, c0, c1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &c0);
    for (uint64_t s = lo; s <= hi; s++) {
        uint64_t v = s, peak = s, steps = 0, glide = 0;
        while (v != 1) {
            if (v & 1) {
                if (v > (UINT64_MAX - 1) / 3) {
                    fprintf(stderr, "overflow at start %llu\n", (unsigned long long)s);
                    return 1;
                }
                v = 3 * v + 1;
            } else {
                v >>= 1;
            }
            steps++;
            if (v > peak) peak = v;
            if (!glide && v < s) glide = steps;
        }
        uint64_t val[3] = {steps, glide, peak};
        for (int k = 0; k < 3; k++) {
            if (k == 1 && !glide) continue; /* 1 never drops below itself */
            if (!have[k] || val[k] > best[k]) {
                have[k] = 1;
                best[k] = val[k];
                if (nrec[k] < MAXREC) {
                    rs[k][nrec[k]] = s;
                    rv[k][nrec[k]] = val[k];
                    nrec[k]++;
                }
            }
        }
    }
    clock_gettime(CLOCK_MONOTONIC, &t1);
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &c1);
    printf("%.6f %.6f\n", (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec),
           (c1.tv_sec - c0.tv_sec) + 1e-9 * (c1.tv_nsec - c0.tv_nsec));
    const char *names[3] = {"full_delay", "full_glide", "full_peak"};
    for (int k = 0; k < 3; k++)
        for (int i = 0; i < nrec[k]; i++)
            printf("%s %llu %llu\n", names[k], (unsigned long long)rs[k][i],
                   (unsigned long long)rv[k][i]);
    return 0;
}
