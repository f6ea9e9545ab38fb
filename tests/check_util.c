/* Tests for src/util.c and src/dec.c: exact decimals, buffers, atomic writes,
** text escaped for terminals. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <glib.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "ug.h"
#include "check_run.h"

typedef struct {
    const char *text;
    ug_dec_result result;
    const char *canonical; /* ug_dec_format of the parsed value */
} dec_case;

static const dec_case dec_cases[] = {
    {"412", UG_DEC_OK, "412"},
    {"41.25", UG_DEC_OK, "41.25"},
    {"0.5", UG_DEC_OK, "0.5"},
    {" 7 ", UG_DEC_OK, "7"},
    {"+3", UG_DEC_OK, "3"},
    {".5", UG_DEC_OK, "0.5"},
    {"5.", UG_DEC_OK, "5"},
    {"0.000001", UG_DEC_OK, "0.000001"},
    {"1000000000000000", UG_DEC_OK, "1000000000000000"},
    {"1000000000000000.999999", UG_DEC_OK, "1000000000000000.999999"},
    {"1000000000000001", UG_DEC_TOO_LARGE, "0"},
    {"0.0000001", UG_DEC_PLACES_MAX, "0"},
    {"-1", UG_DEC_NEGATIVE, "0"},
    {"-0", UG_DEC_NEGATIVE, "0"},
    {"1e3", UG_DEC_SYNTAX, "0"},
    {"NaN", UG_DEC_SYNTAX, "0"},
    {"inf", UG_DEC_SYNTAX, "0"},
    {"1,000", UG_DEC_SYNTAX, "0"},
    {".", UG_DEC_SYNTAX, "0"},
    {"0x10", UG_DEC_SYNTAX, "0"},
    {"", UG_DEC_EMPTY, "0"},
    {"   ", UG_DEC_EMPTY, "0"},
    {"99999999999999999999999999999999999999999", UG_DEC_TOO_LARGE, "0"},
};

START_TEST(test_dec_parse_table)
{
    const dec_case *c = &dec_cases[_i];
    ug_dec d;
    char buf[48];
    ck_assert_int_eq(ug_dec_parse(c->text, strlen(c->text), &d), c->result);
    if (c->result == UG_DEC_OK)
        ck_assert_str_eq(ug_dec_format(d, buf), c->canonical);
}
END_TEST

/* 0.1 + 0.2 is not 0.3 in binary floating point; in scaled integers it is. */
START_TEST(test_dec_sum_is_exact)
{
    ug_dec a, b, c;
    ug_dec_parse("0.1", 3, &a);
    ug_dec_parse("0.2", 3, &b);
    ug_dec_parse("0.3", 3, &c);
    ck_assert(a.v + b.v == c.v);
}
END_TEST

/* Grouping by threes (CLDR en: "#,##0.###", minimum grouping digits 1, from
** common/main/en.xml and common/main/root.xml; python3-babel 2.10's
** format_decimal(v, locale="en") gave the same strings, checked by hand on
** 2026-12-03). */
START_TEST(test_dec_format_grouped)
{
    static const struct {
        ug_i128 v;
        const char *want;
    } cases[] = {
        {0, "0"}, {999, "999"}, {1000, "1,000"}, {-123, "-123"}, {-1234, "-1,234"},
        {1234567, "1,234,567"}, {-100000, "-100,000"}, {12345, "12,345"},
    };
    char buf[64];
    for (size_t i = 0; i < sizeof cases / sizeof *cases; i++)
        ck_assert_str_eq(ug_dec_format_grouped((ug_dec){cases[i].v * UG_DEC_SCALE}, buf),
                         cases[i].want);
    ck_assert_str_eq(ug_dec_format_grouped((ug_dec){12345 * UG_DEC_SCALE + UG_DEC_SCALE / 2}, buf),
                     "12,345.5");
    ck_assert_str_eq(ug_dec_format_grouped((ug_dec){-(1234 * UG_DEC_SCALE + UG_DEC_SCALE / 4)}, buf),
                     "-1,234.25");
}
END_TEST

START_TEST(test_ratio_format_half_up)
{
    char buf[64];
    ck_assert_str_eq(ug_ratio_format(1, 8, 2, buf), "0.13");  /* 0.125 */
    ck_assert_str_eq(ug_ratio_format(-1, 8, 2, buf), "-0.13");
    ck_assert_str_eq(ug_ratio_format(2, 3, 4, buf), "0.6667");
    ck_assert_str_eq(ug_ratio_format(0, 3, 1, buf), "0.0");
    ck_assert_str_eq(ug_i128_format_scaled(-1500000, buf), "-1.5");
}
END_TEST

START_TEST(test_buf_grows_and_takes)
{
    ug_buf b;
    ug_buf_init(&b);
    for (int i = 0; i < 1000; i++)
        ug_buf_printf(&b, "%04d", i);
    char *out;
    size_t len;
    ug_error err = {0};
    ck_assert_int_eq(ug_buf_take(&b, &out, &len, &err), UG_OK);
    ck_assert_uint_eq(len, 4000);
    ck_assert(strncmp(out + 3996, "0999", 4) == 0);
    ug_free(out);
}
END_TEST

START_TEST(test_buf_out_of_memory_is_reported)
{
    ug_buf b;
    ug_buf_init(&b);
    ug_mem_fail_after(0);
    ug_buf_puts(&b, "hello");
    ug_mem_fail_after(-1);
    char *out;
    ug_error err = {0};
    ck_assert_int_eq(ug_buf_take(&b, &out, NULL, &err), UG_ENOMEM);
    ck_assert_ptr_null(out);
}
END_TEST

/* The two failure modes the allocation-failure tests use: from the Nth
** allocation on, or the Nth alone. */
START_TEST(test_mem_fail_modes)
{
    void *p[4];
    ug_mem_fail_after(1);
    for (int i = 0; i < 4; i++)
        p[i] = ug_malloc(8);
    ck_assert_ptr_nonnull(p[0]);
    ck_assert_ptr_null(p[1]);
    ck_assert_ptr_null(p[2]);
    ck_assert_ptr_null(p[3]);
    ug_free(p[0]);
    ck_assert_int_eq(ug_mem_fail_once(1), 4); /* allocations made meanwhile */
    for (int i = 0; i < 4; i++)
        p[i] = ug_malloc(8);
    ck_assert_int_eq(ug_mem_fail_after(-1), 4);
    ck_assert_ptr_nonnull(p[0]);
    ck_assert_ptr_null(p[1]);
    ck_assert_ptr_nonnull(p[2]);
    ck_assert_ptr_nonnull(p[3]);
    for (int i = 0; i < 4; i++)
        ug_free(p[i]);
}
END_TEST

START_TEST(test_arena_zeroes_and_aligns)
{
    ug_arena a = {0};
    for (int i = 0; i < 5000; i++) {
        unsigned char *p = ug_arena_alloc(&a, (size_t)(i % 37) + 1);
        ck_assert_ptr_nonnull(p);
        ck_assert_uint_eq((uintptr_t)p % 16, 0);
        ck_assert_uint_eq(p[0], 0);
    }
    ck_assert_str_eq(ug_arena_strdup(&a, "pantry"), "pantry");
    ug_arena_free(&a);
}
END_TEST

START_TEST(test_first_error_wins)
{
    ug_error err = {0};
    ug_mark m = {"a.yaml", 3, 7};
    ug_fail(&err, UG_ESCHEMA, m, "first %d", 1);
    ug_fail(&err, UG_EDATA, ug_mark_file("b.yaml"), "second");
    char buf[600];
    ck_assert_str_eq(ug_error_format(&err, buf, sizeof buf), "a.yaml:3:7: first 1");
    ck_assert_int_eq(err.status, UG_ESCHEMA);
}
END_TEST

/* Escapes for terminals: the directional formatting characters of Unicode
** UAX #9 (ALM U+061C, LRM U+200E, RLM U+200F, LRE..RLO U+202A..U+202E,
** LRI..PDI U+2066..U+2069), C0 and C1 controls and DEL (ECMA-48), the line
** and paragraph separators; text around them is untouched. */
typedef struct {
    const char *in, *out;
} visible_case;

static const visible_case visible_cases[] = {
    {"plain \u00e9cole", "plain \u00e9cole"},
    {"\u202egnp.exe\u202c", "<U+202E>gnp.exe<U+202C>"},
    {"a\u2066b\u2069c\u200e\u200f\u061c", "a<U+2066>b<U+2069>c<U+200E><U+200F><U+061C>"},
    {"\u202a\u202b\u202d\u2067\u2068", "<U+202A><U+202B><U+202D><U+2067><U+2068>"},
    {"\x1b[2J\x07\t\n\x7f", "<U+001B>[2J<U+0007><U+0009><U+000A><U+007F>"},
    {"\xc2\x9b" "31m\xc2\x85", "<U+009B>31m<U+0085>"},
    {"\u2028\u2029", "<U+2028><U+2029>"},
    {"\xff\xc3(\xe2\x80", "<0xFF><0xC3>(<0xE2><0x80>"},
    {"\u200d\u00a0\u2069x", "\u200d\u00a0<U+2069>x"},
};

/* Every scalar value U+0000..U+10FFFF (surrogates excluded), encoded by
** GLib's g_unichar_to_utf8 (an encoder we did not write), decodes to itself
** with GLib's length; and GLib's validating decoder agrees with ours on
** every 1- to 4-byte sequence of a sample that covers each lead byte with
** good and bad continuations. */
START_TEST(test_utf8_decode_against_glib)
{
    char buf[8];
    for (unsigned long c = 0; c <= 0x10FFFF; c++) {
        if (c >= 0xD800 && c <= 0xDFFF)
            continue;
        int n = g_unichar_to_utf8((gunichar)c, buf);
        unsigned long got = 0;
        /* plain tests in the loop: each ck_assert writes a checkpoint */
        if (ug_utf8_decode(buf, (size_t)n, &got) != (size_t)n || got != c)
            ck_abort_msg("U+%04lX: decoded as U+%04lX", c, got);
        if (n > 1 && ug_utf8_decode(buf, (size_t)n - 1, &got) != 0) /* cut short */
            ck_abort_msg("U+%04lX cut short was accepted", c);
    }
    static const unsigned char conts[] = {0x00, 0x7F, 0x80, 0x8F, 0x90, 0x9F, 0xA0, 0xBF, 0xC0};
    /* from 1: GLib's validating decoder takes a NUL byte as the end of the
    ** text, where ours reads U+0000 (our callers stop at NUL first) */
    for (unsigned lead = 1; lead < 256; lead++)
        for (size_t a = 0; a < sizeof conts; a++)
            for (size_t b = 0; b < sizeof conts; b++)
                for (size_t d = 0; d < sizeof conts; d++) {
                    char s[4] = {(char)lead, (char)conts[a], (char)conts[b], (char)conts[d]};
                    unsigned long ours = 0;
                    size_t k = ug_utf8_decode(s, 4, &ours);
                    gunichar theirs = g_utf8_get_char_validated(s, 4);
                    bool valid = theirs != (gunichar)-1 && theirs != (gunichar)-2;
                    if (valid != (k > 0) ||
                        (valid && (ours != theirs ||
                                   k != (size_t)(g_utf8_next_char(s) - s))))
                        ck_abort_msg("%02X %02X %02X %02X: ours %zu bytes U+%04lX, "
                                     "GLib %s", lead, conts[a], conts[b], conts[d], k,
                                     ours, valid ? "valid" : "invalid");
                }
}
END_TEST

/* RFC 3629 §10: overlong forms ("C0 AF" for '/') and surrogates (§3:
** "ED A0 80") must be refused, as must code points past U+10FFFF. */
START_TEST(test_utf8_decode_refuses)
{
    static const char *const bad[] = {"\xC0\xAF", "\xE0\x80\xAF", "\xED\xA0\x80",
                                      "\xF4\x90\x80\x80", "\xF8\x88\x80\x80\x80", "\x80",
                                      "\xFF"};
    unsigned long c;
    for (size_t i = 0; i < sizeof bad / sizeof *bad; i++)
        ck_assert_uint_eq(ug_utf8_decode(bad[i], strlen(bad[i]), &c), 0);
    ck_assert_uint_eq(ug_utf8_decode("", 0, &c), 0);
}
END_TEST

START_TEST(test_text_visible)
{
    const visible_case *c = &visible_cases[_i];
    char out[128];
    size_t n = ug_text_visible(c->in, out, sizeof out);
    ck_assert_str_eq(out, c->out);
    ck_assert_uint_eq(n, strlen(c->out));
    ug_buf b;
    ug_buf_init(&b);
    ug_buf_visible(&b, c->in);
    ck_assert_str_eq(b.data ? b.data : "", c->out);
    ug_buf_free(&b);
}
END_TEST

/* A short buffer gets whole escapes and whole characters only, and the
** length the whole result needs, as snprintf reports it. */
START_TEST(test_text_visible_truncates_whole)
{
    char out[12];
    ck_assert_uint_eq(ug_text_visible("ab\u202ecd", out, sizeof out), 12);
    ck_assert_str_eq(out, "ab<U+202E>c");
    ck_assert_uint_eq(ug_text_visible("ab\u202ecd", out, 6), 12);
    ck_assert_str_eq(out, "ab");
    ck_assert_uint_eq(ug_text_visible("\u00e9\u00e9\u00e9", out, 6), 6);
    ck_assert_str_eq(out, "\u00e9\u00e9");
    ck_assert_uint_eq(ug_text_visible("x", NULL, 0), 1);
}
END_TEST

static Suite *util_suite(void)
{
    Suite *s = suite_create("util");
    TCase *tc = tcase_create("core");
    tcase_add_loop_test(tc, test_dec_parse_table, 0,
                        (int)(sizeof dec_cases / sizeof dec_cases[0]));
    tcase_add_test(tc, test_dec_sum_is_exact);
    tcase_add_test(tc, test_ratio_format_half_up);
    tcase_add_test(tc, test_dec_format_grouped);
    tcase_add_test(tc, test_buf_grows_and_takes);
    tcase_add_test(tc, test_buf_out_of_memory_is_reported);
    tcase_add_test(tc, test_mem_fail_modes);
    tcase_add_test(tc, test_arena_zeroes_and_aligns);
    tcase_add_test(tc, test_first_error_wins);
    tcase_add_loop_test(tc, test_text_visible, 0,
                        sizeof visible_cases / sizeof visible_cases[0]);
    tcase_add_test(tc, test_text_visible_truncates_whole);
    tcase_add_test(tc, test_utf8_decode_against_glib);
    tcase_add_test(tc, test_utf8_decode_refuses);
    suite_add_tcase(s, tc);
    return s;
}

int main(void)
{
    return check_run(util_suite());
}
