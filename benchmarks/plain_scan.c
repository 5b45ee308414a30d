/*
 * The scan's classification of every start, written as a plain C loop.
 *
 * For the map n -> n/2 (n even), (a n + b)/2 (n odd) and each start s in
 * [lo, hi]: follow the orbit one step at a time until it drops below s
 * (|v| < s, or v = -s), returns to s, closes another cycle (Brent's method on
 * the same values), reaches the step cap, or would overflow int64 (counted as
 * unresolved: this loop has no exact continuation). No sieve, no jumps.
 *
 * Used by benchmarks/bench_scan.py, which compiles it with gcc -O2.
 *
 * usage: plain_scan A B LO HI CAP
 * prints: drops cycles other unresolved seconds
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <time.h>

int main(int argc, char **argv) {
    if (argc != 6) {
        fprintf(stderr, "usage: plain_scan A B LO HI CAP\n");
        return 2;
    }
    const int64_t a = strtoll(argv[1], NULL, 10);
    const int64_t b = strtoll(argv[2], NULL, 10);
    const int64_t lo = strtoll(argv[3], NULL, 10);
    const int64_t hi = strtoll(argv[4], NULL, 10);
    const int64_t cap = strtoll(argv[5], NULL, 10);
    const int64_t vmax = (INT64_MAX - llabs(b)) / llabs(a);
    int64_t drops = 0, cycles = 0, other = 0, unresolved = 0;
    struct timespec t0, t1;
    clock_gettime(CLOCK_MONOTONIC, &t0);
    for (int64_t s = lo; s <= hi; s++) {
        int64_t v = s, tortoise = s, power = 1, lam = 0, i = 0;
        int outcome = 3; /* 0 drop, 1 cycle, 2 other, 3 unresolved */
        while (i < cap) {
            if (v & 1) {
                if (llabs(v) > vmax) break; /* would overflow */
                v = (a * v + b) >> 1;
            } else {
                v >>= 1;
            }
            i++;
            if (llabs(v) < s || v == -s) { outcome = 0; break; }
            if (v == s) { outcome = 1; break; }
            if (v == tortoise) { outcome = 2; break; }
            if (++lam == power) { tortoise = v; power <<= 1; lam = 0; }
        }
        if (outcome == 0) drops++;
        else if (outcome == 1) cycles++;
        else if (outcome == 2) other++;
        else unresolved++;
    }
    clock_gettime(CLOCK_MONOTONIC, &t1);
    double secs = (t1.tv_sec - t0.tv_sec) + 1e-9 * (t1.tv_nsec - t0.tv_nsec);
    printf("%lld %lld %lld %lld %.6f\n", (long long)drops, (long long)cycles, (long long)other,
           (long long)unresolved, secs);
    return 0;
}
