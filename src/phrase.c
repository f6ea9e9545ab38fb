/*
** Phrases (src/phrase.h): message catalogs with named slots, and numbers and
** plural categories through ICU (CLDR). One catalog per language; the
** catalogs live in src/phrase_catalog.c.
**
** A message is a text with slots in braces ("{each} = {count}"). A message
** whose words change with a number is a list of CLDR plural forms,
** "one=({n} icon)|other=({n} icons)": the form is picked by the plural
** category ICU gives for {n} as it is written, so "1.5" and "1" may differ.
*/
#include <pthread.h>
#include <stdio.h>
#include <string.h>

#include <unicode/ucurr.h>
#include <unicode/uenum.h>
#include <unicode/uloc.h>
#include <unicode/unumberformatter.h>
#include <unicode/upluralrules.h>
#include <unicode/ustring.h>

#include "phrase.h"
#include "phrase_int.h"

static const char *const categories[] = {"zero", "one", "two", "few", "many", "other"};

/* ICU's locale id for a tag; "en" when the tag is empty or unreadable (the
** layout has checked it before any phrase is asked for). */
static void locale_id(const char *lang, char *id, size_t size)
{
    UErrorCode st = U_ZERO_ERROR;
    int32_t parsed = 0;
    uloc_forLanguageTag(lang && *lang ? lang : PHRASE_DEFAULT_LANG, id, (int32_t)size,
                        &parsed, &st);
    if (U_FAILURE(st) || st == U_STRING_NOT_TERMINATED_WARNING || !*id)
        snprintf(id, size, "%s", PHRASE_DEFAULT_LANG);
}

/* The catalog for a locale id: its language, and for Chinese its script
** (zh-Hant has no catalog yet). NULL when there is none. */
static const phrase_catalog *catalog_for_id(const char *id)
{
    char full[ULOC_FULLNAME_CAPACITY], lang[16], script[16];
    UErrorCode st = U_ZERO_ERROR;
    uloc_addLikelySubtags(id, full, sizeof full, &st);
    if (U_FAILURE(st))
        snprintf(full, sizeof full, "%s", id);
    st = U_ZERO_ERROR;
    uloc_getLanguage(full, lang, sizeof lang, &st);
    uloc_getScript(full, script, sizeof script, &st);
    if (U_FAILURE(st))
        return NULL;
    for (const phrase_catalog *c = phrase_catalogs; c->lang; c++)
        if (!strcmp(c->lang, lang) && (!c->script || !strcmp(c->script, script)))
            return c;
    return NULL;
}

static const phrase_catalog *catalog(const char *lang)
{
    char id[ULOC_FULLNAME_CAPACITY];
    locale_id(lang, id, sizeof id);
    const phrase_catalog *c = catalog_for_id(id);
    return c ? c : phrase_catalogs;
}

static void supported_list(char *buf, size_t size)
{
    size_t o = 0;
    buf[0] = '\0';
    for (const phrase_catalog *c = phrase_catalogs; c->lang && o < size; c++)
        o += (size_t)snprintf(buf + o, size - o, "%s%s%s%s", o ? ", " : "", c->lang,
                              c->script ? "-" : "", c->script ? c->script : "");
}

ug_status phrase_check_lang(const char *tag, char *why, size_t size)
{
    char id[ULOC_FULLNAME_CAPACITY], known[160];
    UErrorCode st = U_ZERO_ERROR;
    int32_t parsed = 0;
    supported_list(known, sizeof known);
    uloc_forLanguageTag(tag, id, sizeof id, &parsed, &st);
    if (U_FAILURE(st) || st == U_STRING_NOT_TERMINATED_WARNING || !*id
        || parsed != (int32_t)strlen(tag)) {
        snprintf(why, size, "'lang' expects a BCP 47 language tag such as en, pt-BR "
                 "or zh-Hans (found '%s')", tag);
        return UG_ESCHEMA;
    }
    if (!catalog_for_id(id)) {
        snprintf(why, size, "'lang' %s has no translation yet (languages: %s)", tag, known);
        return UG_ESCHEMA;
    }
    return UG_OK;
}

const char *phrase_dir(const char *lang)
{
    char id[ULOC_FULLNAME_CAPACITY];
    locale_id(lang, id, sizeof id);
    return uloc_isRightToLeft(id) ? "rtl" : "ltr";
}

const char *phrase_tag(const char *lang, char *buf, size_t size)
{
    char id[ULOC_FULLNAME_CAPACITY];
    UErrorCode st = U_ZERO_ERROR;
    locale_id(lang, id, sizeof id);
    uloc_toLanguageTag(id, buf, (int32_t)size, false, &st);
    if (U_FAILURE(st) || st == U_STRING_NOT_TERMINATED_WARNING)
        snprintf(buf, size, "%s", PHRASE_DEFAULT_LANG);
    return buf;
}

const char *phrase_text(const char *lang, phrase_id id)
{
    const char *t = catalog(lang)->text[id];
    return t ? t : phrase_catalogs[0].text[id];
}

/* ---- numbers and plural categories (ICU) -------------------------------- */

static const char *category_name(const UChar *u)
{
    char name[16];
    u_austrncpy(name, u, sizeof name - 1);
    name[sizeof name - 1] = '\0';
    for (size_t k = 0; k < sizeof categories / sizeof categories[0]; k++)
        if (!strcmp(name, categories[k]))
            return categories[k];
    return "other";
}

/* ICU builds a number formatter and plural rules from the locale's data each
** time one is opened, which was a fifth of a batch's time: they are opened
** once per locale and skeleton and kept for the process. Both are immutable
** and safe to use from several threads at once (ICU's LocalizedNumberFormatter
** and PluralRules are thread-safe for formatting and selecting); the lock
** guards only the table. A full table opens and closes per call as before. */
#define ICU_CACHE 32
#define SKELETON_MAX 64

static struct {
    char id[ULOC_FULLNAME_CAPACITY];
    char skel[SKELETON_MAX];
    UNumberFormatter *f;
    UPluralRules *rules;
} icu_cache[ICU_CACHE];
static size_t icu_cached;
static pthread_mutex_t icu_lock = PTHREAD_MUTEX_INITIALIZER;

static UNumberFormatter *open_formatter(const char *id, const char *skel, UErrorCode *st)
{
    UChar u[SKELETON_MAX];
    u_uastrncpy(u, skel, SKELETON_MAX - 1);
    u[SKELETON_MAX - 1] = 0;
    return unumf_openForSkeletonAndLocale(u, -1, id, st);
}

/* The cached formatter and rules for id and skel; false when the table is
** full or ICU fails (the caller then opens its own). */
static bool cached_icu(const char *id, const char *skel, UNumberFormatter **f,
                       UPluralRules **rules)
{
    bool ok = false;
    pthread_mutex_lock(&icu_lock);
    for (size_t i = 0; i < icu_cached && !ok; i++)
        if (!strcmp(icu_cache[i].id, id) && !strcmp(icu_cache[i].skel, skel)) {
            *f = icu_cache[i].f, *rules = icu_cache[i].rules;
            ok = true;
        }
    if (!ok && icu_cached < ICU_CACHE && strlen(skel) < SKELETON_MAX) {
        UErrorCode st = U_ZERO_ERROR;
        UNumberFormatter *nf = open_formatter(id, skel, &st);
        UPluralRules *pr = U_SUCCESS(st) ? uplrules_open(id, &st) : NULL;
        if (U_SUCCESS(st)) {
            size_t i = icu_cached++;
            snprintf(icu_cache[i].id, sizeof icu_cache[i].id, "%s", id);
            snprintf(icu_cache[i].skel, sizeof icu_cache[i].skel, "%s", skel);
            icu_cache[i].f = *f = nf;
            icu_cache[i].rules = *rules = pr;
            ok = true;
        } else {
            uplrules_close(pr);
            unumf_close(nf);
        }
    }
    pthread_mutex_unlock(&icu_lock);
    return ok;
}

/* d written by ICU with the number skeleton skel (ICU's "Number Skeletons"
** syntax). Formats d once and reads both the text and its plural category
** from the same formatted number, so visible fraction digits (and a compact
** number's exponent) count as CLDR says. */
static bool format_icu(const char *lang, const char *skel, ug_dec d, char *buf,
                       const char **plural)
{
    char id[ULOC_FULLNAME_CAPACITY], raw[64];
    UChar text[PHRASE_NUMBER_MAX / 2], cat[16];
    UErrorCode st = U_ZERO_ERROR;
    locale_id(lang, id, sizeof id);
    UNumberFormatter *f = NULL;
    UPluralRules *rules = NULL;
    bool own = !cached_icu(id, skel, &f, &rules);
    if (own)
        f = open_formatter(id, skel, &st);
    UFormattedNumber *r = unumf_openResult(&st);
    unumf_formatDecimal(f, ug_dec_format(d, raw), -1, r, &st);
    int32_t n = unumf_resultToString(r, text, PHRASE_NUMBER_MAX / 2, &st);
    u_strToUTF8(buf, PHRASE_NUMBER_MAX, NULL, text, n, &st);
    if (plural && U_SUCCESS(st)) {
        if (own)
            rules = uplrules_open(id, &st);
        int32_t cn = uplrules_selectFormatted(rules, r, cat, 15, &st);
        cat[U_SUCCESS(st) && cn < 15 ? cn : 0] = 0;
        *plural = U_SUCCESS(st) ? category_name(cat) : "other";
    }
    unumf_closeResult(r);
    if (own) {
        uplrules_close(rules);
        unumf_close(f);
    }
    return U_SUCCESS(st) && st != U_STRING_NOT_TERMINATED_WARNING;
}

/* "" or ".000": exactly min_frac fraction digits (at most 7). */
static const char *fraction_skeleton(int min_frac, char *skel)
{
    int k = 0;
    if (min_frac > 0)
        for (skel[k++] = '.'; k <= min_frac && k < 8; k++)
            skel[k] = '0';
    skel[k] = '\0';
    return skel;
}

char *phrase_number(const char *lang, ug_dec d, int min_frac, char *buf)
{
    char skel[16];
    if (!format_icu(lang, fraction_skeleton(min_frac, skel), d, buf, NULL))
        ug_dec_format(d, buf);
    return buf;
}

char *phrase_percent(const char *lang, ug_dec d, char *buf)
{
    if (!format_icu(lang, "percent", d, buf, NULL))
        strcat(ug_dec_format(d, buf), "%");
    return buf;
}

char *phrase_percent_change(const char *lang, ug_dec d, char *buf)
{
    if (!format_icu(lang, "percent sign-except-zero", d, buf, NULL))
        strcat(ug_dec_format(d, buf), "%");
    return buf;
}

const char *phrase_plural(const char *lang, ug_dec d, int min_frac)
{
    char buf[PHRASE_NUMBER_MAX], skel[16];
    const char *cat = "other";
    return format_icu(lang, fraction_skeleton(min_frac, skel), d, buf, &cat) ? cat
                                                                             : "other";
}

/* ---- amounts: compact numbers and money ---------------------------------- */

static bool is_whole(ug_dec d)
{
    return d.v % UG_DEC_SCALE == 0;
}

/* The ICU skeleton for an amount. Compact numbers keep one decimal
** ("412.5 million": a tenth of the unit word is as close as a reader takes
** in); money not compacted is whole when the amount is, else in the
** currency's own minor unit (CLDR's currency data, "€12.50"). Which way the
** last digit goes follows what the sentence claims: a lower bound ("more
** than") rounds down and an upper bound ("fewer than") up, so rounding never
** makes a true statement false; anything else rounds half up, as people
** round by hand (common practice, no source). */
static void amount_skeleton(const phrase_numbers *how, ug_dec d, phrase_rounding r,
                            char *skel, size_t size)
{
    static const char *const modes[] = {
        [PHRASE_NEAREST] = "rounding-mode-half-up",
        [PHRASE_DOWN] = "rounding-mode-floor",
        [PHRASE_UP] = "rounding-mode-ceiling",
    };
    size_t o = 0;
    if (how->compact) /* CLDR has no long words for money: "€412.5M" */
        o += (size_t)snprintf(skel, size, "%s ", how->short_words || how->currency
                                                     ? "compact-short"
                                                     : "compact-long");
    if (how->currency)
        o += (size_t)snprintf(skel + o, size - o, "currency/%s ", how->currency);
    if (how->sign)
        o += (size_t)snprintf(skel + o, size - o, "sign-except-zero ");
    if (how->compact || how->currency)
        o += (size_t)snprintf(skel + o, size - o, "%s ",
                              how->compact  ? ".#"
                              : is_whole(d) ? "precision-integer"
                                            : "precision-currency-standard");
    snprintf(skel + o, o < size ? size - o : 0, "%s", modes[r]);
}

char *phrase_amount(const char *lang, const phrase_numbers *how, ug_dec d,
                    phrase_rounding r, char *buf, const char **plural)
{
    char skel[SKELETON_MAX];
    if (plural)
        *plural = "other";
    if (!how || (!how->compact && !how->currency && !how->sign))
        skel[0] = '\0'; /* as phrase_number writes it; text and category from one format */
    else
        amount_skeleton(how, d, r, skel, sizeof skel);
    if (!format_icu(lang, skel, d, buf, plural))
        ug_dec_format(d, buf);
    return buf;
}

ug_status phrase_check_currency(const char *code, char *why, size_t size)
{
    bool known = false;
    UErrorCode st = U_ZERO_ERROR;
    bool shaped = strlen(code) == 3;
    for (size_t k = 0; shaped && k < 3; k++)
        shaped = code[k] >= 'A' && code[k] <= 'Z';
    /* ICU's list of ISO 4217 codes in use, not a table of our own */
    UEnumeration *all = shaped ? ucurr_openISOCurrencies(UCURR_COMMON | UCURR_NON_DEPRECATED,
                                                         &st) : NULL;
    const char *c;
    while (all && U_SUCCESS(st) && !known && (c = uenum_next(all, NULL, &st)))
        known = !strcmp(c, code);
    uenum_close(all);
    if (known)
        return UG_OK;
    snprintf(why, size, shaped ? "'currency' %s is not an ISO 4217 code in use (such as "
                                 "EUR, USD or PLN)"
                               : "'currency' expects an ISO 4217 code in capitals, such "
                                 "as EUR, USD or PLN (found '%s')", code);
    return UG_ESCHEMA;
}

/* ---- messages ------------------------------------------------------------ */

/* Where form `cat` starts in a plural-forms text, and its length; NULL when
** the text has no such form. */
static const char *find_form(const char *forms, const char *cat, size_t *len)
{
    size_t cl = strlen(cat);
    for (const char *p = forms; p && *p; p = strchr(p, '|') ? strchr(p, '|') + 1 : NULL)
        if (!strncmp(p, cat, cl) && p[cl] == '=') {
            const char *end = strchr(p, '|');
            *len = end ? (size_t)(end - p - cl - 1) : strlen(p + cl + 1);
            return p + cl + 1;
        }
    return NULL;
}

static bool has_forms(const char *text)
{
    for (size_t k = 0; k < sizeof categories / sizeof categories[0]; k++) {
        size_t cl = strlen(categories[k]);
        if (!strncmp(text, categories[k], cl) && text[cl] == '=')
            return true;
    }
    return false;
}

void phrase_pick_form(const char *forms, const char *category, ug_buf *b)
{
    size_t len = 0;
    const char *p = NULL;
    if (!has_forms(forms)) {
        ug_buf_puts(b, forms);
        return;
    }
    if (!(p = find_form(forms, category, &len)))
        p = find_form(forms, "other", &len);
    if (p)
        ug_buf_add(b, p, len);
}

static const char *slot_value(const phrase_slot *slots, const char *name, size_t len)
{
    for (size_t k = 0; slots && slots[k].name; k++)
        if (strlen(slots[k].name) == len && !strncmp(slots[k].name, name, len))
            return slots[k].value;
    return NULL;
}

/* Copies text into b with each {name} replaced by its slot's value. */
static void fill(ug_buf *b, const char *text, size_t len, const phrase_slot *slots)
{
    const char *p = text, *end = text + len;
    while (p < end) {
        const char *open = memchr(p, '{', (size_t)(end - p));
        const char *close = open ? memchr(open, '}', (size_t)(end - open)) : NULL;
        if (!close) {
            ug_buf_add(b, p, (size_t)(end - p));
            return;
        }
        ug_buf_add(b, p, (size_t)(open - p));
        const char *v = slot_value(slots, open + 1, (size_t)(close - open - 1));
        if (v)
            ug_buf_puts(b, v);
        p = close + 1;
    }
}

void phrase_say(ug_buf *b, const char *lang, phrase_id id, const phrase_slot *slots)
{
    const char *text = phrase_text(lang, id);
    if (!has_forms(text)) {
        fill(b, text, strlen(text), slots);
        return;
    }
    /* the count that picks the form travels as {n} and its category as
    ** {plural}, which the caller took from the same formatted number */
    const char *cat = slot_value(slots, "plural", 6);
    ug_buf form;
    ug_buf_init(&form);
    phrase_pick_form(text, cat ? cat : "other", &form);
    fill(b, form.data ? form.data : "", form.len, slots);
    b->failed = b->failed || form.failed;
    ug_buf_free(&form);
}
