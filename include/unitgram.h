/*
** unitgram — unit charts and pictograms from counts.
**
** The one public header. Every handle is opaque; every function that can fail
** returns a ug_status and, when it fails, fills the caller's ug_error with the
** place in the input (file, 1-based line and column) and a message. Objects a
** function returns belong to the caller and have a matching *_free, which
** accepts NULL. Inputs are borrowed and never modified.
**
** Pipeline: ug_chart_load -> ug_chart_allocate -> ug_scene_pack -> ug_scene_svg
** (-> ug_render for PNG/PDF). See DEVELOPERS.md for which file owns which stage.
*/
#ifndef UNITGRAM_H
#define UNITGRAM_H

#include <stddef.h>
#include <stdio.h>

#ifdef __cplusplus
extern "C" {
#endif

#define UG_VERSION "0.1.0"

/* The library is compiled with -fvisibility=hidden, so a function leaves it
** (the shared library's dynamic symbols, the static archive's globals) only
** when its declaration here carries UG_API (GCC manual, "Common Function
** Attributes: visibility" and "Options for Code Generation Conventions:
** -fvisibility"; Ulrich Drepper, "How To Write Shared Libraries" §2.2,
** "Export Control"). Compilers without the attribute export everything. */
#ifndef UG_API
# if defined(__GNUC__) && __GNUC__ >= 4
#  define UG_API __attribute__((visibility("default")))
# else
#  define UG_API
# endif
#endif

typedef enum {
    UG_OK = 0,
    UG_ENOMEM,   /* out of memory */
    UG_EIO,      /* a file could not be read or written */
    UG_ESYNTAX,  /* YAML or CSV syntax */
    UG_ESCHEMA,  /* a key, type or value the format does not allow */
    UG_EDATA,    /* counts that cannot be used (negative, mismatched, ...) */
    UG_ELIMIT,   /* input beyond a stated limit */
    UG_ERENDER   /* text layout or rendering failed */
} ug_status;

typedef struct {
    const char *file; /* points into the owning ug_error or model; may be NULL */
    unsigned line, column; /* 1-based; 0 when the place is the whole file */
} ug_mark;

/* Every call that takes a ug_error clears it first, so one ug_error can be
** reused from call to call: after a failure it holds that call's error. */
typedef struct {
    ug_status status;
    ug_mark where;     /* where.file points at file[] below */
    char file[1024];
    char msg[512];
} ug_error;

/* "file:line:col: message" (or "file: message" without a line) into buf. */
UG_API const char *ug_error_format(const ug_error *err, char *buf, size_t size);
UG_API const char *ug_status_name(ug_status st);

/* ---- option structs ---------------------------------------------------- */

/* Every option struct has a `size` member: 0, or sizeof the struct as the
** caller's copy of this header declares it. Fields added in later versions
** go after `size` and are read only when size covers them, so a program
** built against an older header keeps working; 0 means the struct as first
** released (zero-initialised and designated-initialiser code needs no
** change). Fill them with designated initialisers ({.glyph_cache = c}):
** a positional one stops short of `size` and compilers warn about it
** (-Wmissing-field-initializers, part of GCC's -Wextra). */

/* ---- the context: where the library gets memory, files and glyphs ------ */

/* A context holds what would otherwise be process-wide: the allocator, the
** glyph roots, default limits, a hook reading files from memory, the fonts
** text is measured with (made on first use, released with the context) and
** the fault-injection counters of the tests. Every call made on a thread uses
** the context bound to that thread (ug_context_use), or the one handed to the
** call's _in form (ug_chart_load_in(ctx, ...), at the end); a thread that binds
** none has its own default context (libc's allocator, the installed glyph
** folder, the UG_DEFAULT_* limits), so code that never names a context works
** as before, thread by thread.
**
** One context per thread: a context must not be bound on two threads at once
** (its fault counters change on every allocation). Objects and *out buffers
** made while a context is bound come from its allocator: free them while the
** same context (or one with the same allocator) is bound. The libraries
** unitgram uses (libyaml, libxml2, cairo, pango, librsvg, GLPK) keep their
** own allocators. */
typedef struct ug_context ug_context;

/* The file hook: serve path's bytes from memory. Return 1 with *data and *len
** set (borrowed; the library copies them before the hook is called again),
** 0 to let the library read the file from disk, -1 to refuse the file (the
** call fails with UG_EIO naming it). Layout files, CSV files and glyph
** folders' index.yaml go through it; glyph files are read from the glyph
** roots on disk. The stated limits apply to served bytes too. */
typedef int (*ug_read_hook)(void *ud, const char *path, const char **data, size_t *len);

/* The allocator, in the manner of Lua's lua_Alloc: n == 0 frees ptr (which may
** be NULL) and returns NULL; otherwise it returns a block of n bytes holding
** what ptr (NULL for a new block) held, or NULL when out of memory, leaving
** ptr untouched. Blocks need the alignment malloc(3) gives. */
typedef void *(*ug_alloc_fn)(void *ud, void *ptr, size_t n);

typedef struct {
    size_t size;                    /* see "option structs" above */
    ug_alloc_fn alloc;              /* NULL: malloc, realloc and free */
    void *alloc_ud;
    const char *const *glyph_roots; /* the library's glyph folders, searched in
                                       order in place of the installed data
                                       folder; copied. NULL: that folder */
    size_t nglyph_roots;
    size_t max_file_bytes, max_icons, max_panels; /* defaults for loads whose
                                       ug_limits leave them 0; 0: UG_DEFAULT_* */
    ug_read_hook read_file;         /* NULL: every file from disk */
    void *read_ud;
} ug_context_options;

/* A new context (allocated with opt's allocator); opt may be NULL. Limits
** above their ceilings are refused with UG_ELIMIT. */
UG_API ug_status ug_context_new(const ug_context_options *opt, ug_context **out,
                                ug_error *err);
/* Unbinds it first when it is bound on the calling thread. Free it after
** every object made under it. NULL is allowed. */
UG_API void ug_context_free(ug_context *ctx);
/* Bind ctx to the calling thread (NULL: the thread's default context) and
** return the context bound before (NULL: the default), so a library can
** bind its own and restore the caller's. */
UG_API ug_context *ug_context_use(ug_context *ctx);
/* The context calls on this thread use now (never NULL). */
UG_API ug_context *ug_context_current(void);

/* ---- the chart model (layout files, FORMAT.md §1) --------------------- */

typedef struct ug_chart ug_chart;

/* The caps a loader enforces. A value above its ceiling is refused with
** UG_ELIMIT rather than quietly lowered. */
typedef struct {
    size_t max_file_bytes;   /* 0 = the context's default (UG_DEFAULT_MAX_FILE) */
    size_t max_icons;        /* 0 = UG_DEFAULT_MAX_ICONS; at most UG_CEILING_ICONS */
    size_t max_panels;       /* 0 = UG_DEFAULT_MAX_PANELS; at most UG_CEILING_PANELS */
    size_t size;             /* see "option structs" */
} ug_limits;

#define UG_DEFAULT_MAX_FILE 4194304 /* 4 MiB */
#define UG_DEFAULT_MAX_ICONS 100000
#define UG_DEFAULT_MAX_PANELS 48

#define UG_CEILING_ICONS 10000000
#define UG_CEILING_PANELS 1000

UG_API ug_status ug_chart_load(const char *path, const ug_limits *limits,
                               ug_chart **out, ug_error *err);
/* name is used in error messages and to resolve relative paths (data.file). */
UG_API ug_status ug_chart_load_string(const char *text, size_t len, const char *name,
                                      const ug_limits *limits, ug_chart **out,
                                      ug_error *err);
UG_API void ug_chart_free(ug_chart *chart);

/* ---- the page model (page files, FORMAT.md §2) ------------------------- */

typedef struct ug_page ug_page;

/* Load a page file and every chart file its panels name (paths relative to
** the page's folder). A chart file given here, or a page file given to
** ug_chart_load, is refused with a message saying which kind it is. */
UG_API ug_status ug_page_load(const char *path, const ug_limits *limits,
                              ug_page **out, ug_error *err);
UG_API ug_status ug_page_load_string(const char *text, size_t len, const char *name,
                                     const ug_limits *limits, ug_page **out,
                                     ug_error *err);
UG_API void ug_page_free(ug_page *page);

/* Which loader a layout file is for, decided as the loaders decide it: a
** page when the top-level mapping has a `page` key, however it is written
** (block or flow style, quoted, after a byte-order mark); a `page:` inside a
** comment or a string is text. Anything else (a top that is not a mapping,
** say) is a chart, for ug_chart_load to explain. The file is read and parsed
** with the loaders' reader and limits; charts a page names and CSV files are
** not read. On an error *out is UG_LAYOUT_CHART. */
typedef enum { UG_LAYOUT_CHART, UG_LAYOUT_PAGE } ug_layout_kind;
UG_API ug_status ug_layout_detect(const char *path, const ug_limits *limits,
                                  ug_layout_kind *out, ug_error *err);
UG_API ug_status ug_layout_detect_string(const char *text, size_t len, const char *name,
                                         const ug_limits *limits, ug_layout_kind *out,
                                         ug_error *err);

/* ---- allocation: counts -> whole icons (FORMAT.md §3) ------------------ */

typedef struct ug_allocation ug_allocation;

typedef enum { UG_REPORT_TEXT, UG_REPORT_CSV, UG_REPORT_JSON } ug_report_format;

/* The allocation borrows chart: it reads the chart's labels, colours and
** settings whenever it is reported, packed or drawn, so free the
** allocation first and keep the chart unchanged while it lives. */
UG_API ug_status ug_chart_allocate(const ug_chart *chart, ug_allocation **out,
                                   ug_error *err);
UG_API void ug_allocation_free(ug_allocation *a);
/* The allocation report as text, CSV or JSON; *out is malloc'd, NUL-ended. */
UG_API ug_status ug_allocation_report(const ug_allocation *a, ug_report_format fmt,
                                      char **out, size_t *len, ug_error *err);
/* The analyst's internal view: the allocation of every count as counted,
** hidden ones included. Its report says first that it is not for
** publication; never draw or publish it. */
UG_API ug_status ug_chart_allocate_internal(const ug_chart *chart, ug_allocation **out,
                                            ug_error *err);
/* The published table as CSV (FORMAT.md §4): columns group, category, count
** (the published count or a hidden cell's placeholder), icons, status (exact,
** rounded, small, requested, complement, withheld, partial) and level (cell,
** group total, category total, total); with n > 1 charts a first column
** names the chart. Written from the published table only. */
UG_API ug_status ug_table_csv(const ug_allocation *const *allocs, size_t n, char **out,
                              size_t *len, ug_error *err);

/* ---- the picture: allocation -> placed boxes -> SVG -------------------- */

typedef struct ug_scene ug_scene;

/* Place every icon, text line and key entry of a chart; the chart and the
** allocation are borrowed and must outlive nothing (the scene copies what it
** needs). Glyphs are resolved from the layout's folder and the library. */
UG_API ug_status ug_scene_pack(const ug_chart *chart, const ug_allocation *alloc,
                               ug_scene **out, ug_error *err);
UG_API void ug_scene_free(ug_scene *scene);
UG_API double ug_scene_width(const ug_scene *scene);   /* px (SVG user units) */
                             UG_API double ug_scene_height(const ug_scene *scene);
/* The scene as an SVG document; *out is malloc'd and NUL-ended. */
UG_API ug_status ug_scene_svg(const ug_scene *scene, char **out, size_t *len,
                              ug_error *err);
/* Plain-language description of the chart (the SVG's <desc>); the layout's
** `description:` when it gives one. *out is malloc'd and NUL-ended. */
UG_API ug_status ug_chart_describe(const ug_chart *chart, const ug_allocation *alloc,
                                   char **out, size_t *len, ug_error *err);

/* ---- packing options (additive: ug_scene_pack is ug_scene_pack_with(NULL)) */

/* Glyphs loaded once and shared: a batch of charts asks the cache instead of
** reading, sanitizing and measuring the same glyph files again. One cache
** serves one set of glyph folders (the options it is used with); threads
** drawing at once may share it. */
typedef struct ug_glyph_cache ug_glyph_cache;

UG_API ug_status ug_glyph_cache_new(ug_glyph_cache **out, ug_error *err);
UG_API void ug_glyph_cache_free(ug_glyph_cache *cache);

typedef struct {
    const char *const *glyph_dirs; /* extra glyph folders (--glyph-dir), searched
                                      after the library; may be NULL */
    size_t nglyph_dirs;
    ug_glyph_cache *glyph_cache;   /* optional; borrowed, must outlive the call */
    size_t size;                   /* see "option structs" */
} ug_pack_options;

/* ug_scene_pack with options; opt may be NULL (the defaults). */
UG_API ug_status ug_scene_pack_with(const ug_chart *chart, const ug_allocation *alloc,
                                    const ug_pack_options *opt, ug_scene **out,
                                    ug_error *err);

/* One warning per thing glyph sanitizing removed from the scene's glyph
** files, each placed at the `glyph:` key of the first category (of chart, the
** chart the scene was packed from) that uses the glyph. *out is a malloc'd
** array of *n entries (status UG_OK, where and msg filled), NULL when none;
** release it with free(). */
UG_API ug_status ug_scene_glyph_warnings(const ug_scene *scene, const ug_chart *chart,
                                         ug_error **out, size_t *n, ug_error *err);

/* The files drawing this chart reads: the layout itself, its CSV (if any) and
** every glyph file the scene loaded. Without a scene (packing failed), the
** glyph files the chart names by path, joined to the layout's folder, so a
** watcher still sees a broken glyph being fixed. A NULL-terminated
** array in one malloc'd block (free() it); NULL when out of memory. */
UG_API char **ug_chart_inputs(const ug_chart *chart, const ug_scene *scene);
/* The same for a page: the page file first, then each chart's inputs in
** panel order, as ug_chart_inputs gives them without a scene. */
UG_API char **ug_page_inputs(const ug_page *page);

/* ---- batches: one chart per row of a CSV ------------------------------- */

/* A template layout drawn once per row of a wide CSV table: each row becomes
** a chart of its own (its group-column value, or its first column, names it;
** the template's categories name the count columns). Every chart shares one
** icon value (`auto` is resolved once, over all rows) and one icon size.
** `{group}` in the template's title and subtitle is replaced by the row's
** name. Each row also gets a safe file-name part (ug_batch_slug); two rows
** whose names give the same slug are an error at open time. */
typedef struct ug_batch ug_batch;

UG_API ug_status ug_batch_open(const char *template_path, const char *csv_path,
                               const ug_limits *limits, ug_batch **out, ug_error *err);
UG_API void ug_batch_free(ug_batch *batch);
UG_API size_t ug_batch_count(const ug_batch *batch);
/* The row's name as written in the CSV; NULL when i is out of range. */
UG_API const char *ug_batch_name(const ug_batch *batch, size_t i);
/* [a-z0-9_-]+ from the name: letters lower-cased, accents dropped, anything
** else a '-', no leading '-'; an empty result becomes "row-N" (N the row's
** 1-based number). NULL when i is out of range. */
UG_API const char *ug_batch_slug(const ug_batch *batch, size_t i);
/* Whether the template's title or subtitle holds {group}, so that each
** chart says which row it shows; when not, *where (may be NULL) is the
** title's place, for a warning. 1 or 0. */
UG_API int ug_batch_names_rows(const ug_batch *batch, ug_mark *where);
/* `pattern` with every "{group}" replaced by slug i; *out malloc'd (free()). */
UG_API ug_status ug_batch_path(const ug_batch *batch, size_t i, const char *pattern,
                               char **out, ug_error *err);
/* Row i as a chart of its own (no groups, the shared icon value pinned). The
** chart belongs to the batch and stays valid until the next ug_batch_chart
** call or ug_batch_free. */
UG_API ug_status ug_batch_chart(ug_batch *batch, size_t i, const ug_chart **out,
                                ug_error *err);
/* Row i as a chart the caller owns (release with ug_chart_free, before the
** batch: it borrows the batch's template). Rows may be taken and drawn in
** several threads at once, one row per thread. */
UG_API ug_status ug_batch_row(const ug_batch *batch, size_t i, ug_chart **out,
                              ug_error *err);
/* Pack a row's chart (from ug_batch_chart or ug_batch_row) in the layout the
** batch shares: every row gets the same canvas size, line length and place
** for each category's icons, label and key entry, sized for the largest row
** (FORMAT.md §5). Reads the batch only, so threads may call it at once. */
UG_API ug_status ug_batch_pack(const ug_batch *batch, const ug_chart *row,
                               const ug_allocation *alloc, const ug_pack_options *opt,
                               ug_scene **out, ug_error *err);

/* ---- output: PNG, PDF and a web page (src/raster.c, src/html.c) -------- */

typedef enum { UG_OUT_SVG, UG_OUT_PNG, UG_OUT_PDF, UG_OUT_HTML, UG_OUT_CSV } ug_output_format;

/* The format a file name asks for by its extension (.svg .png .pdf .html .htm .csv,
** any case); SVG for anything else, "-" included. */
UG_API ug_output_format ug_output_format_from_path(const char *path);
/* "svg", "png", "pdf", "html", "csv" (any case) -> 0 and *out; -1 for anything else. */
UG_API int ug_output_format_parse(const char *name, ug_output_format *out);
UG_API const char *ug_output_format_name(ug_output_format fmt);

/* Render SVG bytes as PNG, PDF or (a checked copy of) SVG; fmt must not be
** UG_OUT_HTML (see ug_html_page). The SVG's size is in CSS px, 96 per inch:
** a PNG is px * dpi/96 * scale pixels a side (at most 100 megapixels), a PDF
** page px * 0.75 * scale points (dpi does not apply). *out is malloc'd. */
UG_API ug_status ug_render_svg(const char *svg, size_t len, ug_output_format fmt,
                               double dpi, double scale, char **out, size_t *out_len,
                               ug_error *err);
/* The same, written to path only once the render has succeeded (atomically,
** through ug_write_file_atomic). */
UG_API ug_status ug_render_svg_file(const char *svg, size_t len, ug_output_format fmt,
                                    double dpi, double scale, const char *path,
                                    ug_error *err);

/* Several SVGs as one PDF, a page each in order, every page sized to its SVG
** as ug_render_svg sizes a one-page PDF. titles (may be NULL, or hold NULLs)
** name the pages in the document's outline, which PDF readers show as
** bookmarks. Used for a batch drawn to one file. *out is malloc'd. */
UG_API ug_status ug_render_pdf_pages(const char *const *svgs, const size_t *lens,
                                     const char *const *titles, size_t n,
                                     double scale, char **out, size_t *out_len,
                                     ug_error *err);

/* One self-contained web page: the SVG inline, the description in a
** paragraph and, as the picture's text alternative, one data table per
** allocation (a row per group and category: count, icons, shown value).
** title NULL: the first chart's title; description NULL: the first chart's
** stated description, or none. No scripts, no external files. */
UG_API ug_status ug_html_page(const char *title, const char *svg, size_t svg_len,
                              const char *description,
                              const ug_allocation *const *allocs, size_t nallocs,
                              char **out, size_t *len, ug_error *err);

/* A one-page handout (FORMAT.md §2) in any output format: the page's charts
** and text blocks on its column grid, sources at the foot. Content that does
** not fit is an error naming the panel and the missing height; nothing is
** shrunk. The web page holds the page's picture and one table per chart. */
UG_API ug_status ug_page_draw(const ug_page *page, ug_output_format fmt, double dpi,
                              double scale, char **out, size_t *len, ug_error *err);
/* ug_page_draw with the options every panel is packed with (glyph folders,
** a glyph cache); opt may be NULL. The page loads each glyph once. */
UG_API ug_status ug_page_draw_with(const ug_page *page, const ug_pack_options *opt,
                                   ug_output_format fmt, double dpi, double scale, char **out,
                                   size_t *len, ug_error *err);
/* A page composed once (fitted, its panels allocated and packed), to draw in
** any number of formats and to audit from the same allocations and scenes,
** so drawing and auditing a handout allocate and pack it once. It borrows
** page and opt's glyph folders and cache: free it before them. opt may be
** NULL. */
typedef struct ug_composed_page ug_composed_page;
UG_API ug_status ug_page_compose(const ug_page *page, const ug_pack_options *opt,
                                 ug_composed_page **out, ug_error *err);
/* The composed page in a format, as ug_page_draw_with gives it. */
UG_API ug_status ug_composed_page_draw(const ug_composed_page *cp, ug_output_format fmt,
                                       double dpi, double scale, char **out, size_t *len,
                                       ug_error *err);
/* Frees a composed page (NULL is allowed). Its audit, ug_composed_page_audit,
** stands with ug_page_audit below. */
UG_API void ug_composed_page_free(ug_composed_page *cp);
/* The handout's description (its SVG's <desc>): every chart's description in
** reading order. *out is malloc'd and NUL-ended. */
UG_API ug_status ug_page_describe(const ug_page *page, char **out, size_t *len,
                                  ug_error *err);

/* ---- the glyph library ------------------------------------------------ */

/* Every glyph the search path offers (the context's glyph roots or the
** installed data folder, UNITGRAM_GLYPH_PATH, then dirs), sorted by name; a name in
** several folders is the first one found, as when a chart names it. */
typedef struct ug_glyph_library ug_glyph_library;

UG_API ug_status ug_glyph_library_open(const char *const *dirs, size_t ndirs,
                                       ug_glyph_library **out, ug_error *err);
UG_API void ug_glyph_library_free(ug_glyph_library *lib);
UG_API size_t ug_glyph_library_count(const ug_glyph_library *lib);
/* NULL when i is out of range. Keywords come from the folder's index.yaml,
** joined with ", "; "" when the index does not describe the glyph. */
UG_API const char *ug_glyph_library_name(const ug_glyph_library *lib, size_t i);
UG_API const char *ug_glyph_library_keywords(const ug_glyph_library *lib, size_t i);
UG_API const char *ug_glyph_library_folder(const ug_glyph_library *lib, size_t i);
/* The index's one-line description (the glyph's accessible name) and subject
** identifier; NULL when the index gives none or i is out of range. */
UG_API const char *ug_glyph_library_description(const ug_glyph_library *lib, size_t i);
UG_API const char *ug_glyph_library_subject(const ug_glyph_library *lib, size_t i);
/* The subject sets in display order: identifier ("health-care") and title
** ("Health and care"); NULL when i is out of range. */
UG_API size_t ug_glyph_subject_count(void);
UG_API const char *ug_glyph_subject_id(size_t i);
UG_API const char *ug_glyph_subject_title(size_t i);
/* The built-in shapes (square, circle, ...) a chart can name as glyphs. */
UG_API size_t ug_glyph_primitive_count(void);
UG_API const char *ug_glyph_primitive_name(size_t i);
/* A labelled contact sheet (SVG) of every glyph, a heading per subject set
** in display order ("Other" last for glyphs without one); *out is malloc'd. */
UG_API ug_status ug_glyph_library_sheet_svg(const ug_glyph_library *lib, char **out,
                                            size_t *len, ug_error *err);
/* The same for one set (a subject id, or "other"); UG_ESCHEMA if unknown. */
UG_API ug_status ug_glyph_library_subject_sheet_svg(const ug_glyph_library *lib,
                                                    const char *subject, char **out,
                                                    size_t *len, ug_error *err);
/* Load one glyph reference as a layout in base_dir would (a library name, a
** primitive or a path). *warnings (malloc'd, "" if none) gets one line per
** thing sanitizing removed; *ink the covered fraction of the unit box. */
UG_API ug_status ug_glyph_check(const char *ref, const char *base_dir,
                                const char *const *dirs, size_t ndirs, char **warnings,
                                double *ink, ug_error *err);

/* ---- audit: honesty, privacy and accessibility findings (src/audit.c) --- */

typedef enum { UG_SEVERITY_NOTE, UG_SEVERITY_WARNING, UG_SEVERITY_ERROR } ug_severity;

typedef struct {
    const char *rule;     /* stable kebab-case name, e.g. "vanished-category" */
    ug_severity severity;
    ug_mark where;        /* the model mark the finding is about */
    const char *message;  /* plain language */
    const char *fix;      /* a computed suggestion; NULL when there is none */
    const char *source;   /* where the rule comes from (a standard, a published
                             rule, or "common practice, no source") */
} ug_finding;

typedef struct ug_findings ug_findings;

/* Check a chart; rules named in the layout's audit.ignore are left out.
** The findings own copies of everything they show (the chart may go first). */
UG_API ug_status ug_chart_audit(const ug_chart *chart, ug_findings **out, ug_error *err);
/* Every chart of a page file, plus the page's own rule: charts counting the
** same thing side by side must share icon value and size (page-scale-mismatch). */
UG_API ug_status ug_page_audit(const ug_page *page, const ug_pack_options *opt,
                               ug_findings **out, ug_error *err);
/* ug_page_audit of a page composed once (ug_page_compose), which the audit
** reads and leaves as it was: the draw and its audit share the panels'
** allocations and scenes. */
UG_API ug_status ug_composed_page_audit(const ug_composed_page *cp, ug_findings **out,
                                        ug_error *err);
/* The same, finding glyphs as ug_scene_pack_with does (opt may be NULL). */
UG_API ug_status ug_chart_audit_with(const ug_chart *chart, const ug_pack_options *opt,
                                     ug_findings **out, ug_error *err);
/* The audit of a chart as drawn: it reads alloc (from ug_chart_allocate of
** this chart) and, when given, the glyphs of scene (from packing them)
** instead of allocating and loading the glyphs again; the findings are those
** ug_chart_audit_with gives. Both are borrowed for the call; scene may be NULL. */
UG_API ug_status ug_chart_audit_drawn(const ug_chart *chart, const ug_allocation *alloc,
                                      const ug_scene *scene, ug_findings **out,
                                      ug_error *err);
UG_API size_t ug_findings_count(const ug_findings *f);
/* How many findings have at least this severity. */
UG_API size_t ug_findings_count_severity(const ug_findings *f, ug_severity at_least);
UG_API const ug_finding *ug_findings_at(const ug_findings *f, size_t i);
/* UG_REPORT_TEXT or UG_REPORT_JSON; *out is malloc'd, NUL-ended. */
UG_API ug_status ug_findings_format(const ug_findings *f, ug_report_format fmt,
                                    char **out, size_t *len, ug_error *err);
UG_API void ug_findings_free(ug_findings *f);
UG_API const char *ug_severity_name(ug_severity s); /* "error", "warning", "note" */

/* ---- utilities ---------------------------------------------------------- */

/* s made safe to print on a terminal or in a log: control characters,
** DEL, the line and paragraph separators and the bidirectional formatting
** characters (which could reorder or hide the rest of the line) become
** "<U+202E>", a byte that is not UTF-8 "<0xFF>"; the rest is copied. Writes
** at most size - 1 bytes and a NUL (never half an escape or a character)
** and returns the length the whole result needs, like snprintf. */
UG_API size_t ug_text_visible(const char *s, char *out, size_t size);

/* The commented starter layout `unitgram init` writes (page != 0: a page file),
** its first comment naming chart.yaml (handout.yaml); NULL when out of memory. */
UG_API const char *ug_starter_layout(int page);
/* The same, its comment naming `path` as the file to draw and the output the
** draw command writes beside it ("out/foo.yaml" -> "out/foo.svg", a page's
** .pdf), quoted for the shell when needed; a path holding a control
** character, "-" or NULL gives the usual names. malloc'd (free()); NULL when
** out of memory. */
UG_API char *ug_starter_layout_for(int page, const char *path);

/* Write len bytes to path through a temporary file in the same folder and
** rename(2), so a failure leaves any previous file untouched. "-" = stdout.
** An existing device or FIFO is written in place; a FIFO nothing reads is
** refused at once, never waited on. */
UG_API ug_status ug_write_file_atomic(const char *path, const void *data, size_t len,
                                      ug_error *err);
/* The same with the fsync before the rename made optional (sync == 0): a
** batch writing a thousand files skips a thousand journal commits and calls
** sync(2) once at the end instead. A crash before that sync may lose or
** empty files of the batch. */
UG_API ug_status ug_write_file_atomic_sync(const char *path, const void *data, size_t len,
                                           int sync, ug_error *err);
/* Write len bytes to path as a new file, replacing nothing: the bytes go to
** a temporary file that is linked into place, so anything already at path (a
** file, a folder, a FIFO, a symlink, even a dangling one) is left as it was,
** never written through or waited on; then *existed (when given) is set. */
UG_API ug_status ug_write_file_new(const char *path, const void *data, size_t len,
                                   int *existed, ug_error *err);
/* The same for root/rel, where rel's folders (made when missing) must be real
** folders below root: a symlinked folder on the way is refused, never
** followed, so a batch cannot be led outside its output folder. */
UG_API ug_status ug_write_file_beneath(const char *root, const char *rel, const void *data,
                                       size_t len, int sync, ug_error *err);
/* Remove the temporary files of writes in flight. Async-signal-safe: a
** program's handler for SIGINT, SIGTERM or SIGHUP calls it before exiting so
** a stopped run leaves no temporary file beside its outputs. */
UG_API void ug_remove_partial_outputs(void);

/* ---- every call with its context (generated by src/context_calls.py) ---- */
/* NAME_in(ctx, ...) is NAME(...) made with ctx bound to the calling thread
** for the call (NULL: the thread's default context), the context bound
** before restored after it: for a program that hands its context to every
** call rather than binding it once. The one-context-per-thread rule above
** holds: ctx must not be in use on another thread at the same time. */
UG_API const char *ug_error_format_in(ug_context *ctx, const ug_error *err, char *buf,
                                      size_t size);
UG_API const char *ug_status_name_in(ug_context *ctx, ug_status st);
UG_API ug_status ug_chart_load_in(ug_context *ctx, const char *path, const ug_limits *limits,
                                  ug_chart **out, ug_error *err);
UG_API ug_status ug_chart_load_string_in(ug_context *ctx, const char *text, size_t len,
                                         const char *name, const ug_limits *limits,
                                         ug_chart **out, ug_error *err);
UG_API void ug_chart_free_in(ug_context *ctx, ug_chart *chart);
UG_API ug_status ug_page_load_in(ug_context *ctx, const char *path, const ug_limits *limits,
                                 ug_page **out, ug_error *err);
UG_API ug_status ug_page_load_string_in(ug_context *ctx, const char *text, size_t len,
                                        const char *name, const ug_limits *limits,
                                        ug_page **out, ug_error *err);
UG_API void ug_page_free_in(ug_context *ctx, ug_page *page);
UG_API ug_status ug_layout_detect_in(ug_context *ctx, const char *path,
                                     const ug_limits *limits, ug_layout_kind *out,
                                     ug_error *err);
UG_API ug_status ug_layout_detect_string_in(ug_context *ctx, const char *text, size_t len,
                                            const char *name, const ug_limits *limits,
                                            ug_layout_kind *out, ug_error *err);
UG_API ug_status ug_chart_allocate_in(ug_context *ctx, const ug_chart *chart,
                                      ug_allocation **out, ug_error *err);
UG_API void ug_allocation_free_in(ug_context *ctx, ug_allocation *a);
UG_API ug_status ug_allocation_report_in(ug_context *ctx, const ug_allocation *a,
                                         ug_report_format fmt, char **out, size_t *len,
                                         ug_error *err);
UG_API ug_status ug_chart_allocate_internal_in(ug_context *ctx, const ug_chart *chart,
                                               ug_allocation **out, ug_error *err);
UG_API ug_status ug_table_csv_in(ug_context *ctx, const ug_allocation *const *allocs, size_t n,
                                 char **out, size_t *len, ug_error *err);
UG_API ug_status ug_scene_pack_in(ug_context *ctx, const ug_chart *chart,
                                  const ug_allocation *alloc, ug_scene **out, ug_error *err);
UG_API void ug_scene_free_in(ug_context *ctx, ug_scene *scene);
UG_API double ug_scene_width_in(ug_context *ctx, const ug_scene *scene);
UG_API ug_status ug_scene_svg_in(ug_context *ctx, const ug_scene *scene, char **out,
                                 size_t *len, ug_error *err);
UG_API ug_status ug_chart_describe_in(ug_context *ctx, const ug_chart *chart,
                                      const ug_allocation *alloc, char **out, size_t *len,
                                      ug_error *err);
UG_API ug_status ug_glyph_cache_new_in(ug_context *ctx, ug_glyph_cache **out, ug_error *err);
UG_API void ug_glyph_cache_free_in(ug_context *ctx, ug_glyph_cache *cache);
UG_API ug_status ug_scene_pack_with_in(ug_context *ctx, const ug_chart *chart,
                                       const ug_allocation *alloc, const ug_pack_options *opt,
                                       ug_scene **out, ug_error *err);
UG_API ug_status ug_scene_glyph_warnings_in(ug_context *ctx, const ug_scene *scene,
                                            const ug_chart *chart, ug_error **out, size_t *n,
                                            ug_error *err);
UG_API char **ug_chart_inputs_in(ug_context *ctx, const ug_chart *chart,
                                 const ug_scene *scene);
UG_API char **ug_page_inputs_in(ug_context *ctx, const ug_page *page);
UG_API ug_status ug_batch_open_in(ug_context *ctx, const char *template_path,
                                  const char *csv_path, const ug_limits *limits,
                                  ug_batch **out, ug_error *err);
UG_API void ug_batch_free_in(ug_context *ctx, ug_batch *batch);
UG_API size_t ug_batch_count_in(ug_context *ctx, const ug_batch *batch);
UG_API const char *ug_batch_name_in(ug_context *ctx, const ug_batch *batch, size_t i);
UG_API const char *ug_batch_slug_in(ug_context *ctx, const ug_batch *batch, size_t i);
UG_API int ug_batch_names_rows_in(ug_context *ctx, const ug_batch *batch, ug_mark *where);
UG_API ug_status ug_batch_path_in(ug_context *ctx, const ug_batch *batch, size_t i,
                                  const char *pattern, char **out, ug_error *err);
UG_API ug_status ug_batch_chart_in(ug_context *ctx, ug_batch *batch, size_t i,
                                   const ug_chart **out, ug_error *err);
UG_API ug_status ug_batch_row_in(ug_context *ctx, const ug_batch *batch, size_t i,
                                 ug_chart **out, ug_error *err);
UG_API ug_status ug_batch_pack_in(ug_context *ctx, const ug_batch *batch, const ug_chart *row,
                                  const ug_allocation *alloc, const ug_pack_options *opt,
                                  ug_scene **out, ug_error *err);
UG_API ug_output_format ug_output_format_from_path_in(ug_context *ctx, const char *path);
UG_API int ug_output_format_parse_in(ug_context *ctx, const char *name, ug_output_format *out);
UG_API const char *ug_output_format_name_in(ug_context *ctx, ug_output_format fmt);
UG_API ug_status ug_render_svg_in(ug_context *ctx, const char *svg, size_t len,
                                  ug_output_format fmt, double dpi, double scale, char **out,
                                  size_t *out_len, ug_error *err);
UG_API ug_status ug_render_svg_file_in(ug_context *ctx, const char *svg, size_t len,
                                       ug_output_format fmt, double dpi, double scale,
                                       const char *path, ug_error *err);
UG_API ug_status ug_render_pdf_pages_in(ug_context *ctx, const char *const *svgs,
                                        const size_t *lens, const char *const *titles,
                                        size_t n, double scale, char **out, size_t *out_len,
                                        ug_error *err);
UG_API ug_status ug_html_page_in(ug_context *ctx, const char *title, const char *svg,
                                 size_t svg_len, const char *description,
                                 const ug_allocation *const *allocs, size_t nallocs,
                                 char **out, size_t *len, ug_error *err);
UG_API ug_status ug_page_draw_in(ug_context *ctx, const ug_page *page, ug_output_format fmt,
                                 double dpi, double scale, char **out, size_t *len,
                                 ug_error *err);
UG_API ug_status ug_page_draw_with_in(ug_context *ctx, const ug_page *page,
                                      const ug_pack_options *opt, ug_output_format fmt,
                                      double dpi, double scale, char **out, size_t *len,
                                      ug_error *err);
UG_API ug_status ug_page_compose_in(ug_context *ctx, const ug_page *page,
                                    const ug_pack_options *opt, ug_composed_page **out,
                                    ug_error *err);
UG_API ug_status ug_composed_page_draw_in(ug_context *ctx, const ug_composed_page *cp,
                                          ug_output_format fmt, double dpi, double scale,
                                          char **out, size_t *len, ug_error *err);
UG_API void ug_composed_page_free_in(ug_context *ctx, ug_composed_page *cp);
UG_API ug_status ug_page_describe_in(ug_context *ctx, const ug_page *page, char **out,
                                     size_t *len, ug_error *err);
UG_API ug_status ug_glyph_library_open_in(ug_context *ctx, const char *const *dirs,
                                          size_t ndirs, ug_glyph_library **out, ug_error *err);
UG_API void ug_glyph_library_free_in(ug_context *ctx, ug_glyph_library *lib);
UG_API size_t ug_glyph_library_count_in(ug_context *ctx, const ug_glyph_library *lib);
UG_API const char *ug_glyph_library_name_in(ug_context *ctx, const ug_glyph_library *lib,
                                            size_t i);
UG_API const char *ug_glyph_library_keywords_in(ug_context *ctx, const ug_glyph_library *lib,
                                                size_t i);
UG_API const char *ug_glyph_library_folder_in(ug_context *ctx, const ug_glyph_library *lib,
                                              size_t i);
UG_API const char *ug_glyph_library_description_in(ug_context *ctx,
                                                   const ug_glyph_library *lib, size_t i);
UG_API const char *ug_glyph_library_subject_in(ug_context *ctx, const ug_glyph_library *lib,
                                               size_t i);
UG_API size_t ug_glyph_subject_count_in(ug_context *ctx);
UG_API const char *ug_glyph_subject_id_in(ug_context *ctx, size_t i);
UG_API const char *ug_glyph_subject_title_in(ug_context *ctx, size_t i);
UG_API size_t ug_glyph_primitive_count_in(ug_context *ctx);
UG_API const char *ug_glyph_primitive_name_in(ug_context *ctx, size_t i);
UG_API ug_status ug_glyph_library_sheet_svg_in(ug_context *ctx, const ug_glyph_library *lib,
                                               char **out, size_t *len, ug_error *err);
UG_API ug_status ug_glyph_library_subject_sheet_svg_in(ug_context *ctx,
                                                       const ug_glyph_library *lib,
                                                       const char *subject, char **out,
                                                       size_t *len, ug_error *err);
UG_API ug_status ug_glyph_check_in(ug_context *ctx, const char *ref, const char *base_dir,
                                   const char *const *dirs, size_t ndirs, char **warnings,
                                   double *ink, ug_error *err);
UG_API ug_status ug_chart_audit_in(ug_context *ctx, const ug_chart *chart, ug_findings **out,
                                   ug_error *err);
UG_API ug_status ug_page_audit_in(ug_context *ctx, const ug_page *page,
                                  const ug_pack_options *opt, ug_findings **out,
                                  ug_error *err);
UG_API ug_status ug_composed_page_audit_in(ug_context *ctx, const ug_composed_page *cp,
                                           ug_findings **out, ug_error *err);
UG_API ug_status ug_chart_audit_with_in(ug_context *ctx, const ug_chart *chart,
                                        const ug_pack_options *opt, ug_findings **out,
                                        ug_error *err);
UG_API ug_status ug_chart_audit_drawn_in(ug_context *ctx, const ug_chart *chart,
                                         const ug_allocation *alloc, const ug_scene *scene,
                                         ug_findings **out, ug_error *err);
UG_API size_t ug_findings_count_in(ug_context *ctx, const ug_findings *f);
UG_API size_t ug_findings_count_severity_in(ug_context *ctx, const ug_findings *f,
                                            ug_severity at_least);
UG_API const ug_finding *ug_findings_at_in(ug_context *ctx, const ug_findings *f, size_t i);
UG_API ug_status ug_findings_format_in(ug_context *ctx, const ug_findings *f,
                                       ug_report_format fmt, char **out, size_t *len,
                                       ug_error *err);
UG_API void ug_findings_free_in(ug_context *ctx, ug_findings *f);
UG_API const char *ug_severity_name_in(ug_context *ctx, ug_severity s);
UG_API size_t ug_text_visible_in(ug_context *ctx, const char *s, char *out, size_t size);
UG_API const char *ug_starter_layout_in(ug_context *ctx, int page);
UG_API char *ug_starter_layout_for_in(ug_context *ctx, int page, const char *path);
UG_API ug_status ug_write_file_atomic_in(ug_context *ctx, const char *path, const void *data,
                                         size_t len, ug_error *err);
UG_API ug_status ug_write_file_atomic_sync_in(ug_context *ctx, const char *path,
                                              const void *data, size_t len, int sync,
                                              ug_error *err);
UG_API ug_status ug_write_file_new_in(ug_context *ctx, const char *path, const void *data,
                                      size_t len, int *existed, ug_error *err);
UG_API ug_status ug_write_file_beneath_in(ug_context *ctx, const char *root, const char *rel,
                                          const void *data, size_t len, int sync,
                                          ug_error *err);
/* ---- end of the generated calls ---- */

#ifdef __cplusplus
}
#endif
#endif
