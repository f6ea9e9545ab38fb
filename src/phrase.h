/*
** Phrases: the words and numbers a reader of a chart sees, in the chart's
** language (FORMAT.md §6). Sentences come from one message catalog per
** language with named slots ("Each icon = {count}"); numbers and plural
** categories come from ICU, which implements CLDR, so no locale data is
** written here by hand. Messages to the person running the tool are not
** phrases: they stay English.
*/
#ifndef UG_PHRASE_H
#define UG_PHRASE_H

#include "ug.h"

/* Room for any ug_dec formatted in any shipped language (Arabic-Indic digits
** and separators take two or three bytes each). */
#define PHRASE_NUMBER_MAX 256
#define PHRASE_DEFAULT_LANG "en"

typedef enum {
    PH_EACH_ICON,   /* the subject of the key: "Each icon" */
    PH_EACH_SQUARE,
    PH_KEY,         /* {each} = {count} */
    PH_IS,          /* {each} is {count} */
    PH_COUNT,       /* {n} {unit}, by {n}'s plural form: "1 million de ménages" */
    PH_COUNT_ELIDED, /* the same before a unit that elides: "d’habitants" */
    PH_ELIDE_BEFORE, /* the letters a unit may start with to elide; "": never */
    PH_ICONS,       /* plural by {n}: "12 icons" */
    PH_SQUARES,
    PH_FEWER,       /* fewer than {n} */
    PH_LESS,        /* less than {n}: an amount of money, not a count */
    PH_NOT_SHOWN,
    PH_MORE,        /* more than {n} */
    PH_AT_LEAST,
    PH_ABOUT,
    PH_ABOUT_MORE,  /* about {n} and more not shown */
    PH_SOURCE,      /* "Source: " */
    PH_KIND_ROWS,   /* the description's first words, by form */
    PH_KIND_WAFFLE,
    PH_KIND_TITLE,  /* {kind}: {title} */
    PH_STOP,        /* the full stop ending a sentence */
    PH_SPACE,       /* between sentences, and before "(12 icons)" */
    PH_PAREN,       /* ({text}) */
    PH_LIST_SEP,    /* ", " between the items of a list */
    PH_LABEL_SEP,   /* ": " between a label and its count */
    PH_GROUP_LEAD,  /* {group}, {total} in all{change}: */
    PH_SHARE_OF,    /* {pct} of the {count}{shown} */
    PH_SHARE_EACH,  /* {pct} of each {group}'s {unit}{shown} */
    PH_SHARE_TOTAL, /* {pct} of the total{shown}, {n} */
    PH_SHOWN,       /* " shown": the share is of published counts only */
    PH_TOTAL_WORD,  /* "total", what a waffle without a unit is a share of */
    PH_GROUP_WORD,  /* "group", when the layout names no group-label */
    PH_CLIPPED,     /* "; a clipped icon shows part of that" */
    PH_FOR_SHOWN,   /* " for the counts shown", after a category's icons */
    PH_NOTE_ROUNDED, /* counts rounded to multiples of {n} */
    PH_NOTE_SMALL,  /* {from} to {to} not shown ({label}) */
    PH_NOTE_SMALL_MONEY, /* amounts below {n} not shown ({label}): cents too */
    PH_NOTE_COMPLEMENT, /* larger counts hidden too ({label}) */
    PH_NOTE_REQUESTED, /* marked {label}: withheld */
    PH_NOTE_WITHHELD, /* marked {label}: withheld by the source */
    PH_NOTE_SHARES, /* shares of the counts shown */
    PH_NOTE_ZEROS,  /* zeros shown as {zero} */
    PH_CHANGE_HIDDEN, /* " (change not shown)" */
    PH_CHANGE_FROM, /* From {from} to {to}:  */
    PH_CHANGE_ARROW, /* " \u2192 " from one period's count to the next; points the
                     ** way the text reads (an arrow is not mirrored by bidi) */
    PH_BOTH_TOTALS, /* biproportional: {group} {icons} {all} */
    PH_ICONS_WORD,  /* "icons" alone */
    PH_SQUARES_WORD, /* "squares" alone */
    PH_CAP_ICON,    /* table caption: each icon = {value} */
    PH_CAP_SQUARE,  /* each square = {share} of the total */
    PH_TH_GROUP,    /* table headings */
    PH_TH_CATEGORY,
    PH_TH_COUNT,
    PH_TH_ICONS,
    PH_TH_SHOWN,
    PH_DETAIL_SEP,  /* " · " between a key entry's count and its icons */
    PH_SHARE_PCT,   /* counts-are: percent: {pct} of {unit}, no total known */
    PH_SHARE_PCT_WHOLE, /* {pct} of the whole, when no unit-label names it */
    PH_NOTE_PERCENT, /* the figures are shares; their total is not stated */
    PH_GROUP_LEAD_SHARES, /* {group}: , a percent chart's group (no sum) */
    PH_TH_SHARE,    /* the table's heading for a percent chart's shares */
    PH_COUNT_OF_IDS
} phrase_id;

/* One named slot of a message. */
typedef struct {
    const char *name, *value;
} phrase_slot;

/* UG_OK when tag is a well-formed BCP 47 tag of a language with a catalog;
** else UG_ESCHEMA with why (English, for the person running the tool). */
ug_status phrase_check_lang(const char *tag, char *why, size_t size);
/* "rtl" or "ltr" for the language's script (ICU's uloc_isRightToLeft). */
const char *phrase_dir(const char *lang);
/* The canonical BCP 47 tag ICU makes of lang ("zh-Hans", "pt-BR"). */
const char *phrase_tag(const char *lang, char *buf, size_t size);

/* The message in lang's catalog (English where the catalog has none), with
** slots put in by name; slots end with a {NULL, NULL}. An unknown slot name
** is left out. A message with plural forms picks the form of {n}. */
void phrase_say(ug_buf *b, const char *lang, phrase_id id, const phrase_slot *slots);
/* The message as written in the catalog, for messages without slots. */
const char *phrase_text(const char *lang, phrase_id id);

/* d in lang's number format (CLDR grouping, minimum grouping, decimal sign
** and digits): "1,234.5", "1.234,5", "1234", "١٬٢٣٤٫٥". min_frac > 0 shows
** exactly that many fraction digits. Never fails: on an ICU error the plain
** digits are written. */
char *phrase_number(const char *lang, ug_dec d, int min_frac, char *buf);
/* d as a percentage in lang ("1%", "0,5 %"): d is already in percent. */
char *phrase_percent(const char *lang, ug_dec d, char *buf);
/* A change in percent with its sign ("+8%", "-3 %"); 0 without one. */
char *phrase_percent_change(const char *lang, ug_dec d, char *buf);
/* The CLDR plural category of d as phrase_number writes it ("one", "few",
** "other"...), from ICU's plural rules. */
const char *phrase_plural(const char *lang, ug_dec d, int min_frac);
/* How a chart writes its amounts (`number-format`, `currency`): plain
** numbers by default; compact ("412.5 million", "412,5 Mio.") with CLDR's
** long words, or its short ones ("412.5M"); money in an ISO 4217 currency. */
typedef struct {
    bool compact, short_words;
    const char *currency; /* NULL: not money */
    bool sign;            /* a change: "+34", "-12", with the language's signs */
} phrase_numbers;

/* Which way an amount's last shown digit is rounded: to the nearest (half
** up), or down for a lower bound and up for an upper bound. */
typedef enum { PHRASE_NEAREST, PHRASE_DOWN, PHRASE_UP } phrase_rounding;

/* d as an amount in lang, by how (NULL: plain, as phrase_number); *plural,
** when asked for, is the CLDR plural category of the text written ("1.2
** million" is `many` in French). Never fails: the plain digits on an ICU
** error. */
char *phrase_amount(const char *lang, const phrase_numbers *how, ug_dec d,
                    phrase_rounding r, char *buf, const char **plural);
/* UG_OK when code is an ISO 4217 code ICU knows as in use; else UG_ESCHEMA
** with why. */
ug_status phrase_check_currency(const char *code, char *why, size_t size);
/* The form of a plural-forms text ("one=icon|other=icons") for category; the
** `other` form when category has none; the whole text when it has no forms. */
void phrase_pick_form(const char *forms, const char *category, ug_buf *b);

#endif
