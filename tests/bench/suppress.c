/*
** make bench: complementary suppression of a 1,000-group x 12-category table
** with its margins published (about 5 % small cells, fixed seed): the pattern
** (disclose_pattern.c), then the attacker's linear programs that prove it
** (disclose_audit.c). Prints one CSV line per stage:
**   stage,small_cells,complements,seconds
** and fails when a small cell is left exposed.
*/
#define _POSIX_C_SOURCE 200809L
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "disclose.h"

enum { ROWS = 1000, COLS = 12, N = ROWS * COLS };

static uint64_t next(uint64_t *s)
{
    *s ^= *s << 13, *s ^= *s >> 7, *s ^= *s << 17; /* xorshift64 */
    return *s;
}

static double now(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + (double)t.tv_nsec / 1e9;
}

static ug_dec whole(uint64_t v)
{
    return (ug_dec){(ug_i128)v * 1000000};
}

int main(void)
{
    static ug_dec raw[N], pub[N];
    static pub_status st[N];
    static disclose_interval out[N];
    uint64_t seed = 20261202;
    size_t nsmall = 0, ncomp = 0, n = 0;
    for (size_t k = 0; k < N; k++) {
        bool small = next(&seed) % 100 < 5;
        raw[k] = whole(small ? 1 + next(&seed) % 9 : 10 + next(&seed) % 191);
        st[k] = small ? PUB_SMALL : PUB_EXACT;
        pub[k] = small ? (ug_dec){0} : raw[k];
        nsmall += small;
    }
    disclose_grid g = {.rows = ROWS, .cols = COLS, .raw = raw, .published = pub,
                       .status = st, .lo = whole(1), .hi = whole(9),
                       .complement_floor = whole(10), .margins_published = true};
    ug_error err;
    memset(&err, 0, sizeof err);
    size_t stuck = 0;
    double t0 = now();
    if (disclose_complement(&g, st, &stuck, &err) != UG_OK) {
        fprintf(stderr, "suppress: cell %zu: %s\n", stuck, err.msg);
        return 1;
    }
    double t1 = now();
    for (size_t k = 0; k < N; k++)
        ncomp += st[k] == PUB_COMPLEMENT;
    if (disclose_audit(&g, out, &n, &err) != UG_OK) {
        fprintf(stderr, "suppress: audit: %s\n", err.msg);
        return 1;
    }
    double t2 = now();
    for (size_t i = 0; i < n; i++)
        if (!disclose_interval_covers(&g, &out[i])) {
            fprintf(stderr, "suppress: cell %zu narrowed to [%g, %g]\n", out[i].cell,
                    out[i].min, out[i].max);
            return 1;
        }
    printf("pattern,%zu,%zu,%.6f\n", nsmall, ncomp, t1 - t0);
    printf("audit,%zu,%zu,%.6f\n", n, ncomp, t2 - t1);
    printf("pattern+audit,%zu,%zu,%.6f\n", nsmall, ncomp, t2 - t0);
    return 0;
}
