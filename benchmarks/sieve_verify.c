/*
 * Convergence verification of 3x+1 on [LO, HI]: every start n >= 2 reaches a
 * value below n. Written for this benchmark from the description of the method in
 *
 *   D. Barina, "Convergence verification of the Collatz problem",
 *   The Journal of Supercomputing 77 (2021) 2681-2688,
 *
 * with its three ingredients:
 *   1. a 2^K residue sieve: a class r mod 2^K is dropped when, for some
 *      i <= K, i steps of T(n) = n/2, (3n+1)/2 multiply by 3^o / 2^i < 1
 *      (o odd steps); then every n = r (mod 2^K) with n >= 2^K goes below n
 *      within i steps, so only the surviving classes are tested;
 *   2. runs of odd steps jumped at once: if n + 1 = 2^a m (m odd) then
 *      T^a(n) = 3^a m - 1, with a = ctz(n + 1) and 3^a from a table;
 *      runs of even steps likewise with ctz(n);
 *   3. 128-bit unsigned arithmetic (overflow is detected and reported).
 *
 * Starts below 2^K are tested one by one (the sieve argument needs n >= 2^K).
 *
 * Usage: sieve_verify LO HI [K=24] [THREADS=1]
 * Output (one JSON line): surviving classes, starts tested after the sieve,
 * starts left undecided by a 128-bit overflow (exit status 1 if any), seconds
 * for the sieve table and for the verification. A start whose orbit never
 * went below it would loop forever (none exists in the ranges verified).
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#ifdef _OPENMP
#include <omp.h>
#endif

typedef unsigned __int128 u128;

static u128 pow3[81];
static u128 limit3[81]; /* largest m with m * 3^b < 2^128 (no division in the loop) */

static double now(void) {
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return ts.tv_sec + 1e-9 * ts.tv_nsec;
}

static inline int ctz128(u128 x) {
    uint64_t lo = (uint64_t)x;
    if (lo) return __builtin_ctzll(lo);
    return 64 + __builtin_ctzll((uint64_t)(x >> 64));
}

/* 1: n0 reaches a value below n0; 0: overflow of 128 bits (not decided). */
static inline int converges(u128 n0) {
    u128 n = n0;
    for (;;) {
        u128 t = n + 1;                 /* n odd here, or even on the first pass */
        if (!(n & 1)) goto even;
        {
            int a = ctz128(t);
            t >>= a;                    /* n + 1 = 2^a m */
            while (a > 0) {             /* t = 3^a m, in pieces of at most 3^80 */
                int b = a > 80 ? 80 : a;
                if (t > limit3[b]) return 0;
                t *= pow3[b];
                a -= b;
            }
            n = t - 1;                  /* T^a(n) = 3^a m - 1, even */
        }
    even:
        n >>= ctz128(n);
        if (n < n0) return 1;
    }
}

/* Surviving residues r mod 2^K (r odd, no prefix with 3^o < 2^i). */
static uint32_t *build_sieve(int K, uint64_t *count) {
    uint64_t size = 1ULL << K, n_alive = 0, cap = 1 << 16;
    uint32_t *alive = malloc(cap * sizeof *alive);
    /* the parity of T^i(n) for i < K depends only on n mod 2^K, so r stands for its class */
    for (uint64_t r = 1; r < size; r += 2) {
        u128 v = r;
        u128 p3 = 1, p2 = 1;
        int dropped = 0;
        for (int i = 1; i <= K; i++) {
            if (v & 1) { v = (3 * v + 1) >> 1; p3 *= 3; } else { v >>= 1; }
            p2 <<= 1;
            if (p3 < p2) { dropped = 1; break; }
        }
        if (!dropped) {
            if (n_alive == cap) { cap *= 2; alive = realloc(alive, cap * sizeof *alive); }
            alive[n_alive++] = (uint32_t)r;
        }
    }
    *count = n_alive;
    return alive;
}

static u128 parse_u128(const char *s) {
    u128 x = 0;
    for (; *s; s++) {
        if (*s < '0' || *s > '9') { fprintf(stderr, "bad number\n"); exit(2); }
        x = 10 * x + (u128)(*s - '0');
    }
    return x;
}

int main(int argc, char **argv) {
    if (argc < 3) { fprintf(stderr, "usage: %s LO HI [K] [THREADS]\n", argv[0]); return 2; }
    uint64_t lo = (uint64_t)parse_u128(argv[1]), hi = (uint64_t)parse_u128(argv[2]);
    int K = argc > 3 ? atoi(argv[3]) : 24;
    int threads = argc > 4 ? atoi(argv[4]) : 1;
    if (K < 2 || K > 32 || lo < 1 || hi < lo) { fprintf(stderr, "bad arguments\n"); return 2; }
#ifdef _OPENMP
    omp_set_num_threads(threads);
#else
    threads = 1;
#endif
    pow3[0] = 1;
    for (int i = 1; i <= 80; i++) pow3[i] = 3 * pow3[i - 1];
    for (int i = 0; i <= 80; i++) limit3[i] = (~(u128)0) / pow3[i];

    double t0 = now();
    uint64_t n_alive;
    uint32_t *alive = build_sieve(K, &n_alive);
    double t1 = now();

    uint64_t size = 1ULL << K;
    uint64_t tested = 0, overflow = 0;
    /* starts below 2^K (and >= 2): one by one */
    uint64_t small_hi = hi < size - 1 ? hi : size - 1;
    if (lo <= small_hi) {
        uint64_t from = lo < 2 ? 2 : lo;
#pragma omp parallel for schedule(dynamic, 65536) reduction(+ : tested, overflow)
        for (uint64_t n = from; n <= small_hi; n++) {
            tested++;
            if (!converges(n)) overflow++;
        }
    }
    /* starts >= 2^K: blocks of 2^K, surviving classes only */
    uint64_t q_lo = (lo > size ? lo : size) >> K, q_hi = hi >> K;
    if (hi >= size) {
#pragma omp parallel for schedule(dynamic, 1) reduction(+ : tested, overflow)
        for (uint64_t q = q_lo; q <= q_hi; q++) {
            uint64_t base = q << K;
            for (uint64_t j = 0; j < n_alive; j++) {
                uint64_t n = base + alive[j];
                if (n < lo || n > hi || n < size) continue;
                tested++;
                if (!converges(n)) overflow++;
            }
        }
    }
    double t2 = now();
    printf("{\"lo\": %llu, \"hi\": %llu, \"K\": %d, \"threads\": %d, \"survivors\": %llu, "
           "\"tested\": %llu, \"overflow\": %llu, \"sieve_seconds\": %.6f, "
           "\"verify_seconds\": %.6f}\n",
           (unsigned long long)lo, (unsigned long long)hi, K, threads,
           (unsigned long long)n_alive, (unsigned long long)tested,
           (unsigned long long)overflow, t1 - t0, t2 - t1);
    free(alive);
    return overflow ? 1 : 0;
}
