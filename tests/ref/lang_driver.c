/*
** Test driver for tests/lang_ref.py (numbers and plural categories against
** python3-babel, which reads CLDR without ICU): reads one case a line,
**     LANG NUMBER
** and prints LANG, NUMBER, the number as the chart writes it and its CLDR
** plural category, separated by tabs, or "error: MESSAGE".
*/
#include <stdio.h>
#include <string.h>

#include "phrase.h"

int main(void)
{
    char line[256], lang[64], num[128], why[300], out[PHRASE_NUMBER_MAX];
    while (fgets(line, sizeof line, stdin)) {
        ug_dec d;
        if (sscanf(line, "%63s %127s", lang, num) != 2) {
            printf("error: expected LANG NUMBER\n");
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
        printf("%s\t%s\t%s\t%s\n", lang, num, phrase_number(lang, d, 0, out),
               phrase_plural(lang, d, 0));
    }
    return 0;
}
