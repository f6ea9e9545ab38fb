/*
** The chart model: what a layout file says, typed and validated, every value
** keeping the place it came from. layout.c and data.c build it; every later
** stage reads it and never changes it. All memory belongs to the chart's arena.
*/
#ifndef UG_MODEL_H
#define UG_MODEL_H

#include "ug.h"

#define UG_MAX_CATEGORIES 1000
#define UG_MAX_GROUPS 1000
#define UG_MAX_STRING 4096     /* bytes in one text value */
#define UG_MAX_DEPTH 32        /* YAML nesting */
/* the limits' defaults are public (unitgram.h: UG_DEFAULT_*) */

/* The chart forms, one line each (an X-macro: every table of forms is made
** from this list, so a new form is a line here, its pack function in pack.c
** and its words): identifier, the layout's name for it (`form:`), the
** description's first words, what a cell is called (one, several) when
** every glyph is a plain square (NULL: always "icon"), the default columns,
** and whether its
** cells are shares of the total unless an icon value is stated. */
#define UG_CHART_FORMS(X)                                                       \
    X(ROWS, "rows", "Pictogram chart", NULL, NULL, 20, false)                  \
    X(WAFFLE, "waffle", "Waffle chart", "square", "squares", 10, true)

#define UG_FORM_ENUM_(id, name, kind, cell, cells, columns, shares) UG_FORM_##id,
typedef enum { UG_CHART_FORMS(UG_FORM_ENUM_) UG_FORM_COUNT } ug_form;
#undef UG_FORM_ENUM_

typedef struct {
    const char *name, *kind, *cell, *cells;
    long columns;
    bool shares;
} ug_form_info;

/* The form's line of UG_CHART_FORMS (layout.c); the names, NULL-terminated,
** for the layout's `form:` key. */
const ug_form_info *ug_form_about(ug_form f);
extern const char *const ug_form_names[];
/* `change:` (FORMAT.md §5): against the period before, or the first. */
typedef enum { UG_CHANGE_NONE, UG_CHANGE_PREVIOUS, UG_CHANGE_FIRST } ug_change;
typedef enum { UG_ROUND_WHOLE, UG_ROUND_PARTIAL } ug_rounding;
/* `counts-are:`: what the categories' numbers are. Percent: each group's
** shares of a total nobody stated, so no sum of them is a count. */
typedef enum { UG_COUNTS_ARE_COUNTS, UG_COUNTS_ARE_PERCENT } ug_counts_are;
/* `number-format:` (FORMAT.md §6): how the key, labels and description write
** amounts; the table keeps the exact figures. */
typedef enum {
    UG_NUMBERS_PLAIN,
    UG_NUMBERS_COMPACT,      /* CLDR's long words: "412.5 million" */
    UG_NUMBERS_COMPACT_SHORT /* and its short ones: "412.5M" */
} ug_number_format;
typedef enum {
    UG_METHOD_LARGEST_REMAINDER,
    UG_METHOD_SAINTE_LAGUE,
    UG_METHOD_DHONDT,
    UG_METHOD_BIPROPORTIONAL /* FORMAT.md §7: both totals agree */
} ug_method;
typedef enum { UG_ARRANGE_INLINE, UG_ARRANGE_SPLIT } ug_arrangement;
typedef enum { UG_FILL_BY_ROW, UG_FILL_BY_COLUMN, UG_FILL_SNAKE } ug_fill;
typedef enum { UG_START_TOP_LEFT, UG_START_BOTTOM_LEFT } ug_start;
typedef enum { UG_PALETTE_OKABE_ITO, UG_PALETTE_TOL_BRIGHT, UG_PALETTE_TOL_MUTED } ug_palette;
typedef enum { UG_COMPLEMENT_AUTO, UG_COMPLEMENT_NONE } ug_complement;
typedef enum { UG_MARGINS_PUBLISHED, UG_MARGINS_HIDDEN } ug_margins;
typedef enum { UG_ZEROS_SHOW, UG_ZEROS_HIDE } ug_zeros;
typedef enum {
    UG_PROTECT_CONTROLLED,
    UG_PROTECT_CONVENTIONAL,
    UG_PROTECT_RANDOM
} ug_protect_method;


typedef struct {
    unsigned char r, g, b;
    bool set;     /* false: not given in the layout */
    ug_mark mark;
} ug_color;

typedef struct {
    const char *text; /* NULL when absent */
    ug_mark mark;
} ug_text;

/* CLDR's plural categories, in the order of its plural rules. */
#define UG_PLURAL_CATEGORIES(X) X(ZERO, "zero") X(ONE, "one") X(TWO, "two") \
    X(FEW, "few") X(MANY, "many") X(OTHER, "other")
#define UG_PLURAL_ENUM_(id, name) UG_PLURAL_##id,
typedef enum { UG_PLURAL_CATEGORIES(UG_PLURAL_ENUM_) UG_PLURAL_COUNT } ug_plural;
#undef UG_PLURAL_ENUM_

/* One cell named in `suppress: cells:`; resolved against groups and
** categories by the disclosure stage (which knows both after CSV loading). */
typedef struct {
    ug_text group;     /* NULL in a chart without groups */
    ug_text category;  /* an id or a label */
    ug_mark mark;
} ug_cell_ref;

typedef struct {
    ug_text *items;
    size_t n;
    ug_mark mark;
} ug_text_list;

typedef struct {
    const char *id;       /* given or a slug of the label; unique */
    ug_text label;
    ug_text glyph;        /* library name, primitive or path; NULL: "square" */
    ug_color color;       /* resolved: from the layout or the palette */
    bool color_given;
    ug_text note;
    ug_text column;       /* CSV column (wide tables) or category value (long) */
    ug_dec *counts;       /* one per group, or one without groups */
    ug_mark *count_marks; /* where each count came from (YAML or CSV cell) */
    bool *withheld;       /* per group: the CSV cell was a hidden mark (the
                             count is 0 and unknown); NULL when none is */
    ug_mark mark;         /* the category's mapping */
} ug_category;

typedef struct {
    const char *file;      /* resolved path of the CSV */
    ug_text file_text;     /* as written */
    ug_text group_column;
    ug_text category_column; /* long tables */
    ug_text count_column;
    ug_text_list hidden_marks; /* cell texts meaning "withheld at the source" */
    long rows_last;        /* `rows: last N`; 0 when not given */
    ug_text_list rows_names; /* `rows: [names]` */
    ug_mark rows_mark;
    bool present;
} ug_data_spec;

/* Where the key goes: beside the plot when it fits there unwrapped (auto),
** or always below, or beside even if its texts must wrap. */
typedef enum { UG_KEY_AUTO, UG_KEY_BELOW, UG_KEY_BESIDE } ug_key_place;

/* The roles of a chart's text, largest first (style.type). */
typedef enum {
    UG_TYPE_TITLE,
    UG_TYPE_SUBTITLE,
    UG_TYPE_LABEL,    /* group and category names, the key */
    UG_TYPE_NOTE,     /* value statement, notes, source */
    UG_TYPE_COUNT
} ug_type_role;

struct ug_chart {
    ug_arena arena;
    const char *path;        /* the layout file as named by the caller */
    const char *dir;         /* its folder, for relative paths */

    ug_text title, subtitle, description, unit_label;
    /* `unit-label` as CLDR plural forms (FORMAT.md §6), by UG_PLURAL_*; text
    ** NULL for a form not given. unit_label holds the `other` form then. */
    ug_text unit_forms[UG_PLURAL_COUNT];
    bool has_unit_forms;
    ug_text lang;                /* BCP 47 tag; NULL: the page's, else "en" */
    ug_text group_label;         /* what one group is ("school"); NULL: "group" */
    ug_number_format number_format;
    ug_mark number_format_mark;
    ug_text currency;            /* ISO 4217 code; NULL: the counts are no money */
    ug_text_list source, notes;

    ug_form form;
    ug_counts_are counts_are;
    ug_mark counts_are_mark;
    ug_change change;        /* groups are periods: state each one's change */
    ug_mark change_mark;
    ug_mark form_mark;
    bool has_icon_value, icon_value_auto;
    ug_dec icon_value;       /* > 0 when has_icon_value && !icon_value_auto */
    ug_mark icon_value_mark;
    bool has_cells;
    long cells;              /* waffle; 100 when not given */
    ug_mark cells_mark;
    ug_rounding rounding;
    ug_mark rounding_mark;
    ug_method method;
    ug_mark method_mark;

    double icon_size, icon_gap; /* px */
    ug_mark icon_mark;
    long columns;               /* 0: not given (rows: 20, waffle: 10) */
    ug_mark columns_mark;
    long cluster;               /* rows: 0 = none; default 5 */
    ug_arrangement arrangement;
    bool direct_labels;        /* split rows with groups: each line names its */
    ug_mark direct_labels_mark; /* category; not given: on (resolve_direct_labels) */
    ug_key_place key_place;    /* default auto: beside the plot when it fits */
    ug_fill fill;
    ug_start start;

    ug_text_list groups;     /* n == 0: no groups */
    ug_category *cats;
    size_t ncats;
    ug_mark categories_mark;

    bool has_total;
    ug_dec total;
    ug_mark total_mark;

    bool has_suppress;
    ug_dec suppress_below;   /* 0: no threshold (only `cells` or `zeros`) */
    ug_text suppress_label;  /* default "fewer than N" */
    ug_mark suppress_mark;
    ug_complement suppress_complement; /* default auto */
    ug_margins suppress_margins;       /* default published */
    ug_zeros suppress_zeros;           /* default show */
    ug_mark suppress_zeros_mark;
    ug_cell_ref *suppress_cells;       /* cells hidden whatever their count */
    size_t nsuppress_cells;

    struct {
        bool present;
        ug_dec round_to;       /* > 0 */
        ug_protect_method method; /* default controlled */
        long seed;             /* random: needs `seed` */
        bool has_seed;
        ug_mark mark;
    } protect;

    struct {
        bool has_tolerance;
        ug_dec tolerance_percent;  /* default 10 */
        bool has_small_count;
        ug_dec small_count;        /* default 10 */
        ug_text small_count_preset; /* cms | cdc-wonder | nhs-hes (resolve.h:
                                       audit_small_count_preset); text NULL
                                       when a number or absent */
        ug_text_list ignore;
        ug_mark mark;
    } audit;

    struct {
        double width;            /* px, default 800 */
        const char *font;        /* default "DejaVu Sans" */
        ug_mark font_mark;       /* where it was named; the file when not */
        ug_color background;     /* default #ffffff */
        ug_color ink;            /* default #222222 */
        ug_palette palette;
        /* the type scale, px by UG_TYPE_*: largest to smallest, checked */
        double type[UG_TYPE_COUNT];
        ug_mark type_mark;       /* line 0: not stated (a page may pick its own) */
        ug_mark mark;
    } style;

    ug_data_spec data;
    bool is_template; /* a batch template: --each-row's CSV brings the counts
                         and is the data file, so neither is asked for here */
    const char *template_csv; /* that CSV, the template's data from the start */
    ug_limits limits;            /* resolved: no zeros */
};

/* ---- the page model (page files, FORMAT.md §2) ------------------------- */

typedef enum { UG_PANEL_CHART, UG_PANEL_TEXT } ug_panel_kind;
typedef enum { UG_ORIENT_PORTRAIT, UG_ORIENT_LANDSCAPE } ug_orientation;

typedef struct {
    ug_panel_kind kind;
    ug_chart *chart;       /* UG_PANEL_CHART: owned by the page */
    ug_text chart_file;    /* the path as written; text NULL for an inline chart */
    ug_text text;          /* UG_PANEL_TEXT: the paragraph (newlines kept) */
    long span;             /* columns spanned, 1..page columns; default 1 */
    /* the panel's own `icon` and `columns`, over its chart's (mark line 0:
    ** not given); the loader writes them into the chart it owns */
    double icon_size, icon_gap;
    ug_mark icon_mark;
    long columns;
    ug_mark columns_mark;
    ug_mark mark;          /* the panel's mapping */
} ug_panel;

/* The roles of a page's text, largest first (page `type:`): the page's
** title, and the type scale panels' charts take unless they state one. */
typedef enum {
    UG_PAGE_TYPE_TITLE,
    UG_PAGE_TYPE_PANEL_TITLE,
    UG_PAGE_TYPE_SUBTITLE,
    UG_PAGE_TYPE_TEXT,     /* text panels */
    UG_PAGE_TYPE_LABEL,
    UG_PAGE_TYPE_NOTE,
    UG_PAGE_TYPE_SOURCE,   /* the sources at the foot */
    UG_PAGE_TYPE_COUNT
} ug_page_type_role;

struct ug_page {
    ug_arena arena;
    const char *path;        /* the page file as named by the caller */
    const char *dir;         /* its folder, for chart file paths */

    ug_text size;            /* as written ("A4", "200mm x 250mm"); NULL: A4 */
    double width, height;    /* px (96 per inch), orientation applied */
    ug_orientation orientation;
    double margin;           /* px, default 15mm */
    long columns;            /* default 1 */
    ug_mark page_mark;

    ug_text title;
    ug_text_list source;
    ug_text lang;            /* BCP 47 tag its panels take unless they say */
    ug_number_format number_format; /* its panels' too, unless they say or are percent */
    ug_mark number_format_mark;
    ug_panel *panels;
    size_t npanels;
    ug_mark panels_mark;
    bool shared_scale;
    ug_mark shared_scale_mark;
    double type[UG_PAGE_TYPE_COUNT]; /* px; defaults in page_new */
    ug_mark type_mark;
    /* `fit:` the composer shrinks icons and text together, one factor for
    ** every panel, down to these floors (px), before it gives up */
    bool shrink;             /* default true */
    double min_icon, min_text;
    ug_mark fit_mark;
    ug_limits limits;        /* resolved: no zeros */
};

static inline bool chart_is_percent(const ug_chart *c)
{
    return c->counts_are == UG_COUNTS_ARE_PERCENT;
}

/* Number of count columns per category: groups.n, or 1 without groups. */
static inline size_t chart_ngroups(const ug_chart *c)
{
    return c->groups.n ? c->groups.n : 1;
}

#endif
