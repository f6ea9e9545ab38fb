/*
** Colour strings -> sRGB (layout stage). See colorparse.h for what is
** accepted. The named colours are the table of CSS Color Module Level 4,
** §6.1 "Named Colors" (W3C), typed in alphabetical order so lookup can
** bisect; tests/check_colorparse.c checks the count (148) and sample values.
*/
#include <string.h>

#include "colorparse.h"

typedef struct {
    const char *name;
    unsigned long rgb;
} named;

static const named names[] = {
    {"aliceblue", 0xF0F8FF},
    {"antiquewhite", 0xFAEBD7},
    {"aqua", 0x00FFFF},
    {"aquamarine", 0x7FFFD4},
    {"azure", 0xF0FFFF},
    {"beige", 0xF5F5DC},
    {"bisque", 0xFFE4C4},
    {"black", 0x000000},
    {"blanchedalmond", 0xFFEBCD},
    {"blue", 0x0000FF},
    {"blueviolet", 0x8A2BE2},
    {"brown", 0xA52A2A},
    {"burlywood", 0xDEB887},
    {"cadetblue", 0x5F9EA0},
    {"chartreuse", 0x7FFF00},
    {"chocolate", 0xD2691E},
    {"coral", 0xFF7F50},
    {"cornflowerblue", 0x6495ED},
    {"cornsilk", 0xFFF8DC},
    {"crimson", 0xDC143C},
    {"cyan", 0x00FFFF},
    {"darkblue", 0x00008B},
    {"darkcyan", 0x008B8B},
    {"darkgoldenrod", 0xB8860B},
    {"darkgray", 0xA9A9A9},
    {"darkgreen", 0x006400},
    {"darkgrey", 0xA9A9A9},
    {"darkkhaki", 0xBDB76B},
    {"darkmagenta", 0x8B008B},
    {"darkolivegreen", 0x556B2F},
    {"darkorange", 0xFF8C00},
    {"darkorchid", 0x9932CC},
    {"darkred", 0x8B0000},
    {"darksalmon", 0xE9967A},
    {"darkseagreen", 0x8FBC8F},
    {"darkslateblue", 0x483D8B},
    {"darkslategray", 0x2F4F4F},
    {"darkslategrey", 0x2F4F4F},
    {"darkturquoise", 0x00CED1},
    {"darkviolet", 0x9400D3},
    {"deeppink", 0xFF1493},
    {"deepskyblue", 0x00BFFF},
    {"dimgray", 0x696969},
    {"dimgrey", 0x696969},
    {"dodgerblue", 0x1E90FF},
    {"firebrick", 0xB22222},
    {"floralwhite", 0xFFFAF0},
    {"forestgreen", 0x228B22},
    {"fuchsia", 0xFF00FF},
    {"gainsboro", 0xDCDCDC},
    {"ghostwhite", 0xF8F8FF},
    {"gold", 0xFFD700},
    {"goldenrod", 0xDAA520},
    {"gray", 0x808080},
    {"green", 0x008000},
    {"greenyellow", 0xADFF2F},
    {"grey", 0x808080},
    {"honeydew", 0xF0FFF0},
    {"hotpink", 0xFF69B4},
    {"indianred", 0xCD5C5C},
    {"indigo", 0x4B0082},
    {"ivory", 0xFFFFF0},
    {"khaki", 0xF0E68C},
    {"lavender", 0xE6E6FA},
    {"lavenderblush", 0xFFF0F5},
    {"lawngreen", 0x7CFC00},
    {"lemonchiffon", 0xFFFACD},
    {"lightblue", 0xADD8E6},
    {"lightcoral", 0xF08080},
    {"lightcyan", 0xE0FFFF},
    {"lightgoldenrodyellow", 0xFAFAD2},
    {"lightgray", 0xD3D3D3},
    {"lightgreen", 0x90EE90},
    {"lightgrey", 0xD3D3D3},
    {"lightpink", 0xFFB6C1},
    {"lightsalmon", 0xFFA07A},
    {"lightseagreen", 0x20B2AA},
    {"lightskyblue", 0x87CEFA},
    {"lightslategray", 0x778899},
    {"lightslategrey", 0x778899},
    {"lightsteelblue", 0xB0C4DE},
    {"lightyellow", 0xFFFFE0},
    {"lime", 0x00FF00},
    {"limegreen", 0x32CD32},
    {"linen", 0xFAF0E6},
    {"magenta", 0xFF00FF},
    {"maroon", 0x800000},
    {"mediumaquamarine", 0x66CDAA},
    {"mediumblue", 0x0000CD},
    {"mediumorchid", 0xBA55D3},
    {"mediumpurple", 0x9370DB},
    {"mediumseagreen", 0x3CB371},
    {"mediumslateblue", 0x7B68EE},
    {"mediumspringgreen", 0x00FA9A},
    {"mediumturquoise", 0x48D1CC},
    {"mediumvioletred", 0xC71585},
    {"midnightblue", 0x191970},
    {"mintcream", 0xF5FFFA},
    {"mistyrose", 0xFFE4E1},
    {"moccasin", 0xFFE4B5},
    {"navajowhite", 0xFFDEAD},
    {"navy", 0x000080},
    {"oldlace", 0xFDF5E6},
    {"olive", 0x808000},
    {"olivedrab", 0x6B8E23},
    {"orange", 0xFFA500},
    {"orangered", 0xFF4500},
    {"orchid", 0xDA70D6},
    {"palegoldenrod", 0xEEE8AA},
    {"palegreen", 0x98FB98},
    {"paleturquoise", 0xAFEEEE},
    {"palevioletred", 0xDB7093},
    {"papayawhip", 0xFFEFD5},
    {"peachpuff", 0xFFDAB9},
    {"peru", 0xCD853F},
    {"pink", 0xFFC0CB},
    {"plum", 0xDDA0DD},
    {"powderblue", 0xB0E0E6},
    {"purple", 0x800080},
    {"rebeccapurple", 0x663399},
    {"red", 0xFF0000},
    {"rosybrown", 0xBC8F8F},
    {"royalblue", 0x4169E1},
    {"saddlebrown", 0x8B4513},
    {"salmon", 0xFA8072},
    {"sandybrown", 0xF4A460},
    {"seagreen", 0x2E8B57},
    {"seashell", 0xFFF5EE},
    {"sienna", 0xA0522D},
    {"silver", 0xC0C0C0},
    {"skyblue", 0x87CEEB},
    {"slateblue", 0x6A5ACD},
    {"slategray", 0x708090},
    {"slategrey", 0x708090},
    {"snow", 0xFFFAFA},
    {"springgreen", 0x00FF7F},
    {"steelblue", 0x4682B4},
    {"tan", 0xD2B48C},
    {"teal", 0x008080},
    {"thistle", 0xD8BFD8},
    {"tomato", 0xFF6347},
    {"turquoise", 0x40E0D0},
    {"violet", 0xEE82EE},
    {"wheat", 0xF5DEB3},
    {"white", 0xFFFFFF},
    {"whitesmoke", 0xF5F5F5},
    {"yellow", 0xFFFF00},
    {"yellowgreen", 0x9ACD32},
};

#define NNAMES (sizeof names / sizeof names[0])

size_t colorparse_named_count(void) { return NNAMES; }

const char *colorparse_named_at(size_t i, unsigned long *rgb)
{
    if (i >= NNAMES)
        return NULL;
    *rgb = names[i].rgb;
    return names[i].name;
}

static int lower(int c) { return c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c; }

/* ASCII case-insensitive compare of s[0..n) with a lower-case NUL-ended key. */
static int keycmp(const char *s, size_t n, const char *key)
{
    for (size_t i = 0; i < n; i++) {
        int a = lower((unsigned char)s[i]), b = (unsigned char)key[i];
        if (!b || a != b)
            return a - b;
    }
    return key[n] ? -(unsigned char)key[n] : 0;
}

static bool lookup(const char *s, size_t n, unsigned long *rgb)
{
    size_t lo = 0, hi = NNAMES;
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        int c = keycmp(s, n, names[mid].name);
        if (c == 0) {
            *rgb = names[mid].rgb;
            return true;
        }
        if (c < 0)
            hi = mid;
        else
            lo = mid + 1;
    }
    return false;
}

static int hexval(int c)
{
    if (c >= '0' && c <= '9')
        return c - '0';
    c = lower(c);
    return c >= 'a' && c <= 'f' ? c - 'a' + 10 : -1;
}

static bool parse_hex(const char *s, size_t n, unsigned long *rgb)
{
    if (n != 3 && n != 6)
        return false;
    unsigned long v = 0;
    for (size_t i = 0; i < n; i++) {
        int h = hexval((unsigned char)s[i]);
        if (h < 0)
            return false;
        v = n == 3 ? (v << 8) | (unsigned long)(h * 17) : (v << 4) | (unsigned long)h;
    }
    *rgb = v;
    return true;
}

static void skip_space(const char *s, size_t n, size_t *i)
{
    while (*i < n && (s[*i] == ' ' || s[*i] == '\t'))
        (*i)++;
}

/* One integer channel 0..255 followed by `end` (',' or ')'). */
static bool channel(const char *s, size_t n, size_t *i, char end, unsigned long *v)
{
    size_t digits = 0;
    *v = 0;
    skip_space(s, n, i);
    while (*i < n && s[*i] >= '0' && s[*i] <= '9' && digits < 4) {
        *v = *v * 10 + (unsigned long)(s[(*i)++] - '0');
        digits++;
    }
    skip_space(s, n, i);
    if (!digits || *v > 255 || *i >= n || s[*i] != end)
        return false;
    (*i)++;
    return true;
}

static bool parse_rgb_fn(const char *s, size_t n, unsigned long *rgb)
{
    size_t i = 4;
    unsigned long r, g, b;
    if (n < 4 || keycmp(s, 4, "rgb(") != 0)
        return false;
    if (!channel(s, n, &i, ',', &r) || !channel(s, n, &i, ',', &g) ||
        !channel(s, n, &i, ')', &b) || i != n)
        return false;
    *rgb = r << 16 | g << 8 | b;
    return true;
}

bool colorparse(const char *s, size_t n, colorparse_rgb *out, const char **why)
{
    unsigned long rgb = 0;
    bool ok;
    if (n && s[0] == '#')
        ok = parse_hex(s + 1, n - 1, &rgb);
    else if (n >= 4 && keycmp(s, 4, "rgb(") == 0)
        ok = parse_rgb_fn(s, n, &rgb);
    else
        ok = lookup(s, n, &rgb);
    if (!ok) {
        if (keycmp(s, n, "transparent") == 0 || keycmp(s, n, "currentcolor") == 0)
            *why = "names no colour of its own; write a colour such as #0072B2";
        else
            *why = "expected #rgb, #rrggbb, rgb(r, g, b) with 0..255, or a CSS "
                   "named colour";
        return false;
    }
    out->r = (unsigned char)(rgb >> 16);
    out->g = (unsigned char)(rgb >> 8 & 0xFF);
    out->b = (unsigned char)(rgb & 0xFF);
    return true;
}
