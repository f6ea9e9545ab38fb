/*
** Test driver for tests/lang_ref.py (numbers and plural categories against
** python3-babel, which reads CLDR without ICU): reads one case a line,
**     LANG NUMBER [STYLE ROUNDING]
** (STYLE plain, compact or compact-short; ROUNDING nearest, down or up) and
** prints LANG, NUMBER, the number as the chart writes it and its CLDR
** plural category, separated by tabs, or "error: MESSAGE". tests/amount_ref.py
** uses the styles.
*/
#include <stdio.h>
#include <string.h>

#include "phrase.h"

int main(void)
{
    char line[256], lang[64], num[128], style[32] = "plain", mode[16] = "nearest";
    char why[300], out[PHRASE_NUMBER_MAX];
    while (fgets(line, sizeof line, stdin)) {
        ug_dec d;
        int got = sscanf(line, "%63s %127s %31s %15s", lang, num, style, mode);
        if (got == 2)
            strcpy(style, "plain"), strcpy(mode, "nearest");
        if (got != 2 && got != 4) {
            printf("error: expected LANG NUMBER [STYLE ROUNDING]\n");
            continue;
        }
        if (phrase_check_lang(lang, why, sizeof why)) {
            printf("error: %s\n", why);
            continue;
        }
        if (ug_dec_parse(num, strlen(num), &d) != UG_DEC_OK) {
            printf("error: not a decimal: %s\n", num);
            continue;
        }
        const phrase_numbers how = {.compact = strncmp(style, "compact", 7) == 0,
                                    .short_words = strcmp(style, "compact-short") == 0};
        phrase_rounding r = !strcmp(mode, "down") ? PHRASE_DOWN
                            : !strcmp(mode, "up") ? PHRASE_UP : PHRASE_NEAREST;
        const char *cat = "other";
        phrase_amount(lang, &how, d, r, out, &cat);
        printf("%s\t%s\t%s\t%s\n", lang, num, out, cat);
    }
    return 0;
}
