/*
** Exact decimals: the text of a count becomes an integer scaled by 10^6.
**
** Counts are never floating point. "0.1 + 0.2" must equal "0.3" exactly, or two
** remainders that are truly equal would be ordered by rounding noise instead
** of by the stated tie rule (FORMAT.md §3).
*/
#include <string.h>

#include "ug.h"

static bool is_space(char c) { return c == ' ' || c == '\t'; }

static void trim(const char **s, size_t *n)
{
    while (*n && is_space(**s)) {
        (*s)++;
        (*n)--;
    }
    while (*n && is_space((*s)[*n - 1]))
        (*n)--;
}

static ug_dec_result read_digits(const char **p, const char *end, ug_i128 *acc,
                                 int *count, int limit_places)
{
    while (*p < end && **p >= '0' && **p <= '9') {
        if (limit_places >= 0 && *count >= limit_places)
            return UG_DEC_PLACES_MAX;
        *acc = *acc * 10 + (**p - '0');
        if (limit_places < 0 && *acc > UG_DEC_MAX_INTEGER)
            return UG_DEC_TOO_LARGE;
        (*count)++;
        (*p)++;
    }
    return UG_DEC_OK;
}

ug_dec_result ug_dec_parse(const char *s, size_t n, ug_dec *out)
{
    out->v = 0;
    trim(&s, &n);
    if (n == 0)
        return UG_DEC_EMPTY;
    const char *p = s, *end = s + n;
    if (*p == '-')
        return UG_DEC_NEGATIVE;
    if (*p == '+')
        p++;
    ug_i128 whole = 0, frac = 0;
    int nwhole = 0, nfrac = 0;
    ug_dec_result r = read_digits(&p, end, &whole, &nwhole, -1);
    if (r != UG_DEC_OK)
        return r;
    if (p < end && *p == '.') {
        p++;
        r = read_digits(&p, end, &frac, &nfrac, UG_DEC_PLACES);
        if (r != UG_DEC_OK)
            return r;
    }
    if (p != end || (nwhole == 0 && nfrac == 0))
        return UG_DEC_SYNTAX;
    for (int i = nfrac; i < UG_DEC_PLACES; i++)
        frac *= 10;
    out->v = whole * UG_DEC_SCALE + frac;
    return UG_DEC_OK;
}

const char *ug_dec_result_text(ug_dec_result r)
{
    switch (r) {
    case UG_DEC_OK: return "ok";
    case UG_DEC_EMPTY: return "a count is empty";
    case UG_DEC_SYNTAX:
        return "expected a plain decimal number such as 412 or 41.25";
    case UG_DEC_NEGATIVE: return "a count cannot be negative";
    case UG_DEC_PLACES_MAX: return "more than 6 decimal places";
    case UG_DEC_TOO_LARGE: return "larger than 10^15, the largest count allowed";
    }
    return "?";
}

/* Digits of a non-negative integer, most significant first. */
static char *utoa128(ug_i128 v, char *buf)
{
    char tmp[48];
    int n = 0;
    do {
        tmp[n++] = (char)('0' + (int)(v % 10));
        v /= 10;
    } while (v);
    for (int i = 0; i < n; i++)
        buf[i] = tmp[n - 1 - i];
    buf[n] = '\0';
    return buf + n;
}

char *ug_i128_format_scaled(ug_i128 v, char *buf)
{
    char *p = buf;
    if (v < 0) {
        *p++ = '-';
        v = -v;
    }
    p = utoa128(v / UG_DEC_SCALE, p);
    ug_i128 frac = v % UG_DEC_SCALE;
    if (frac) {
        char digits[8];
        for (int i = UG_DEC_PLACES - 1; i >= 0; i--) {
            digits[i] = (char)('0' + (int)(frac % 10));
            frac /= 10;
        }
        int last = UG_DEC_PLACES - 1;
        while (digits[last] == '0')
            last--;
        *p++ = '.';
        memcpy(p, digits, (size_t)last + 1);
        p[last + 1] = '\0';
    }
    return buf;
}

char *ug_dec_format(ug_dec d, char *buf) { return ug_i128_format_scaled(d.v, buf); }

char *ug_dec_format_grouped(ug_dec d, char *buf)
{
    char raw[48];
    ug_dec_format(d, raw);
    size_t sign = raw[0] == '-', digits = strcspn(raw + sign, "."), o = 0;
    for (size_t i = 0; raw[i]; i++) {
        size_t left = sign + digits - i; /* whole digits from here on */
        if (i > sign && i < sign + digits && left % 3 == 0)
            buf[o++] = ',';
        buf[o++] = raw[i];
    }
    buf[o] = '\0';
    return buf;
}

double ug_dec_to_double(ug_dec d)
{
    return (double)(d.v / UG_DEC_SCALE) + (double)(d.v % UG_DEC_SCALE) / 1e6;
}

char *ug_ratio_format(ug_i128 num, ug_i128 den, int places, char *buf)
{
    bool neg = (num < 0) != (den < 0) && num != 0;
    if (num < 0)
        num = -num;
    if (den < 0)
        den = -den;
    ug_i128 scale = 1;
    for (int i = 0; i < places; i++)
        scale *= 10;
    ug_i128 q = (2 * num * scale + den) / (2 * den); /* half-up */
    char *p = buf;
    if (neg && q)
        *p++ = '-';
    p = utoa128(q / scale, p);
    if (places > 0) {
        *p++ = '.';
        ug_i128 frac = q % scale;
        for (int i = places - 1; i >= 0; i--) {
            p[i] = (char)('0' + (int)(frac % 10));
            frac /= 10;
        }
        p[places] = '\0';
    }
    return buf;
}
