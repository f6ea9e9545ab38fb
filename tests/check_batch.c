/* Tests for src/batch.c: the file-name part made from a row's name. */
#define _POSIX_C_SOURCE 200809L
#include <check.h>
#include <string.h>

#include "batch.h"
#include "check_run.h"

typedef struct {
    const char *name, *slug;
} slug_case;

/* U+0301 is COMBINING ACUTE ACCENT, U+0308 COMBINING DIAERESIS (Unicode
** block Combining Diacritical Marks): the decomposed spellings must give the
** slug of the precomposed ones, not a '-' where the mark was. */
static const slug_case slugs[] = {
    {"North East", "north-east"},
    {"\u00e9cole", "ecole"},
    {"e\u0301cole", "ecole"},
    {"U\u0308nicode", "unicode"},
    {"\u00dcnicode", "unicode"},
    {"Cafe\u0301 cre\u0300me", "cafe-creme"},
    {"\u0301lead", "lead"},
    {"../etc", "etc"},
    {"\u2603", ""},
};

START_TEST(test_slug)
{
    char buf[80];
    size_t n = batch_slug(slugs[_i].name, buf, sizeof buf);
    ck_assert_str_eq(buf, slugs[_i].slug);
    ck_assert_uint_eq(n, strlen(slugs[_i].slug));
}
END_TEST

static Suite *batch_suite(void)
{
    Suite *s = suite_create("batch");
    TCase *t = tcase_create("slug");
    tcase_add_loop_test(t, test_slug, 0, sizeof slugs / sizeof slugs[0]);
    suite_add_tcase(s, t);
    return s;
}

int main(void)
{
    return check_run(batch_suite());
}
