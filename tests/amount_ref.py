#!/usr/bin/python3
"""Compact numbers ("412.5 million", "412,5 Mio.") and their plural
categories against CLDR's own data, through tests/ref/lang_driver (our
src/phrase.c on ICU 72).

usage: amount_ref.py DRIVER [AMOUNTS_PER_LANGUAGE]

The reference is read without ICU:
  - compact patterns: CLDR's XML as Debian ships it (unicode-cldr-core,
    /usr/share/unicode/cldr/common/main/LANG.xml, decimalFormatLength long
    and short, Latin digits; Debian 12 ships CLDR 41, ICU 72 carries 42);
  - the decimal and group signs: the same file's symbols; grouping as ICU
    does in compact notation, from five digits on ("4235", "73.178");
  - plural rules: python3-babel's CLDR plural rules, evaluated with CLDR's
    exponent operand e (UTS #35 part 3, "Plural Operand Meanings": a compact
    number's operands are those of the whole amount, with e its exponent).
The algorithm is UTS #35 part 3's "Compact Number Formats": the pattern for
the amount's power of ten, picked by the plural form of the shortened
number, an explicit "1" pattern for exactly one (fr "mille"); a pattern of
"0" means no compact form (de short thousands). Rounding to one decimal is
done here with Python's decimal module in the mode asked for (half up,
floor, ceiling), and a rounding that reaches the next power of ten uses the
next pattern, as ICU does. Arabic is compared digit for digit in Latin
digits (the comparison is shown to catch a wrong digit below).
"""
import random
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from decimal import ROUND_CEILING, ROUND_FLOOR, ROUND_HALF_UP, Decimal

import babel.plural
from babel import Locale

CLDR = "/usr/share/unicode/cldr/common/main"
LANGS = ["en", "es", "fr", "de", "pt", "pl", "ar", "zh-Hans"]
MODES = {"nearest": ROUND_HALF_UP, "down": ROUND_FLOOR, "up": ROUND_CEILING}
REQUIRED = [Decimal(x) for x in (
    "0", "1", "2", "5", "12", "22", "101", "1.5", "1234567.25", "999", "1000",
    "1234567", "999950", "999999", "1200", "412487000", "1000000", "2000000",
    "1000000000", "99999", "12.25", "999.95", "0.05")]
ARAB = {chr(0x0660 + d): str(d) for d in range(10)}
ARAB.update({"\u066c": ",", "\u066b": ".", "\u061c": "", "\u200f": "", "\u200e": ""})


def latin_digits(text):
    return "".join(ARAB.get(ch, ch) for ch in text)


def cldr_file(lang):
    return f"{CLDR}/{lang.replace('-', '_')}.xml"


def load(lang):
    """{style: {(power, count): pattern}} and the decimal and group signs, for the
    language's default numbering system (Latin digits for ar: compared in
    Latin digits anyway)."""
    root = ET.parse(cldr_file(lang)).getroot()
    base = None if lang != "zh-Hans" else ET.parse(cldr_file("zh")).getroot()
    out = {"long": {}, "short": {}}
    signs = {}
    for tree in [t for t in (root, base) if t is not None]:
        for sym in tree.iter("symbols"):
            if sym.get("numberSystem") != "latn":
                continue
            for name in ("decimal", "group"):
                node = sym.find(name)
                if node is not None and name not in signs:
                    signs[name] = node.text
        for df in tree.iter("decimalFormats"):
            if df.get("numberSystem") != "latn":
                continue
            for length in df.iter("decimalFormatLength"):
                style = length.get("type")
                if style not in out or out[style]:
                    continue
                for p in length.iter("pattern"):
                    if p.get("count") and p.get("alt") is None:
                        out[style][(int(p.get("type")), p.get("count"))] = p.text
    return out, (signs.get("decimal", "."), signs.get("group", ","))


def plural_with_e():
    """babel's compiled rules, fed operands we give (babel 2.10 always sets
    c and e to 0)."""
    current = {}
    real = babel.plural.extract_operands
    babel.plural.extract_operands = lambda n: current["ops"]
    rules = {}

    def category(lang, ops):
        if lang not in rules:
            rule = Locale.parse(lang.replace("-", "_")).plural_form
            rules[lang] = babel.plural.to_python(rule)
        current["ops"] = ops
        return rules[lang](0)
    category.restore = lambda: setattr(babel.plural, "extract_operands", real)
    return category


def operands(value):
    """CLDR operands n, i, v, w, f, t, c, e of a plain decimal."""
    text = format(value, "f")
    whole, _, frac = text.partition(".")
    frac_t = frac.rstrip("0")
    return (abs(value), int(whole), len(frac), len(frac_t), int(frac or 0),
            int(frac_t or 0), 0, 0)


def plain(n, mode, signs):
    """n at most one decimal (our skeleton's .#), grouped as below."""
    decimal, group = signs
    shown = n.quantize(Decimal("0.1"), rounding=MODES[mode])
    shown = shown.to_integral() if shown == shown.to_integral() else shown.normalize()
    whole, _, frac = format(shown, "f").partition(".")
    return grouped(whole, group) + (decimal + frac if frac else ""), shown


def grouped(n, group):
    """n with the group sign every three digits, from five digits on: ICU
    groups compact notation with minimum two digits before the first sign
    (icu4c number_formatimpl.cpp: "Compact notation uses minGrouping by
    default since ICU 59"; UNUM_GROUPING_MIN2 in unumberformatter.h)."""
    text = str(n)
    if len(text) < 5:
        return text
    head = len(text) % 3 or 3
    parts = [text[:head]] + [text[i:i + 3] for i in range(head, len(text), 3)]
    return group.join(parts)


def compact_pattern(patterns, power):
    """The 'other' pattern for 10**power, or None when CLDR gives none or
    gives "0" (UTS #35: no compact form, the number is written in full)."""
    other = patterns.get((10 ** power, "other"))
    return None if power < 3 or other in (None, "0") else other


def compact(lang, data, signs, style, n, mode, category):
    """The text UTS #35 gives n in style, and its plural category."""
    decimal, group = signs
    patterns = data[style]
    power = n.adjusted() if n >= 1 else 0
    while True:
        other = compact_pattern(patterns, power)
        if other is None:
            text, shown = plain(n, mode, signs)
            if shown < Decimal(10) ** (power + 1) or not compact_pattern(patterns, power + 1):
                return text, category(lang, operands(shown))
            power += 1  # 999.95 rounds to 1000: "1K", as below
            continue
        zeros = len(re.search(r"0+", other).group())
        scale = power - zeros + 1
        shown = (Decimal(n) / Decimal(10) ** scale).quantize(Decimal("0.1"),
                                                             rounding=MODES[mode])
        # a rounding that reaches the next power of ten takes its pattern
        if shown >= Decimal(10) ** zeros and compact_pattern(patterns, power + 1):
            power += 1
            continue
        break
    shown = shown.to_integral() if shown == shown.to_integral() else shown.normalize()
    count = category(lang, operands(shown))
    # explicit "1" (UTS #35 part 3, "Compact Number Formats"): fr "mille"
    if shown == 1 and (10 ** power, "1") in patterns:
        pattern = patterns[(10 ** power, "1")]
    else:
        pattern = patterns.get((10 ** power, count), other)
    digits = format(shown, "f").replace(".", decimal)
    text = re.sub(r"0+", digits.replace("\\", "\\\\"), pattern, count=1).replace("'", "")
    # the exponent moves the decimal point and keeps what is visible:
    # 1.2c6 is 1200000 with v = 0 (scaleb, not a product, which would
    # keep the product's exponent and write 1200000.0)
    return text, category(lang, operands(shown.scaleb(scale))[:7] + (scale,))


def amounts(rng, per):
    out = list(REQUIRED)
    while len(out) < per:
        whole = rng.randrange(10 ** rng.randint(1, 13))
        out.append(Decimal(whole) if rng.random() < 0.8
                   else Decimal(whole) + Decimal(rng.randrange(100)) / 100)
    return out[:per]


def main():
    assert latin_digits("\u0661\u0663") == "13" and latin_digits("\u0661\u0663") != "12"
    driver = sys.argv[1]
    per = int(sys.argv[2]) if len(sys.argv) > 2 else 500
    rng = random.Random(1912)
    category = plural_with_e()
    # the reference itself: CLDR's own examples (plurals.xml: fr "1c6" many)
    assert category("fr", (1000000, 1000000, 0, 0, 0, 0, 0, 6)) == "many"
    assert category("fr", (1000, 1000, 0, 0, 0, 0, 0, 3)) == "other"
    data = {lang: load(lang) for lang in LANGS}
    # the reference against the issue's own examples, and CLDR's explicit 1
    ref = lambda lang, style, n: compact(lang, *data[lang], style, Decimal(n), "nearest", category)[0]
    assert ref("en", "long", 412500000) == "412.5 million"
    assert ref("de", "short", 412500000) == "412,5\u00a0Mio."
    assert ref("fr", "long", 1000) == "mille" and ref("de", "short", 4235) == "4235"
    cases = [(lang, n, style, mode) for lang in LANGS for n in amounts(rng, per)
             for style in ("compact", "compact-short") for mode in MODES]
    feed = "".join(f"{l} {n} {s} {m}\n" for l, n, s, m in cases)
    res = subprocess.run([driver], input=feed, capture_output=True, text=True, check=True)
    lines = res.stdout.splitlines()
    assert len(lines) == len(cases), (len(lines), len(cases))
    bad, plural_bad = [], []
    for (lang, n, style, mode), line in zip(cases, lines):
        if line.startswith("error:"):
            bad.append(f"{lang} {n}: {line}")
            continue
        _, _, ours, cat = line.split("\t")
        pats, dec = data[lang]
        theirs, want = compact(lang, pats, dec, "short" if style == "compact-short" else "long",
                               n, mode, category)
        got = latin_digits(ours) if lang == "ar" else ours
        if got.replace("\u00a0", " ") != theirs.replace("\u00a0", " "):
            bad.append(f"{lang} {n} {style} {mode}: ours {ours!r}, CLDR {theirs!r}")
        if cat != want:
            plural_bad.append(f"{lang} {n} {style} {mode}: ours {cat}, CLDR {want}")
    category.restore()
    for line in (bad + plural_bad)[:40]:
        print("FAIL", line)
    print(f"amount_ref: {len(cases)} compact amounts ({per} per language, 2 styles, "
          f"3 roundings) in {len(LANGS)} languages, {len(bad)} format and "
          f"{len(plural_bad)} plural disagreements")
    return 1 if bad or plural_bad else 0


if __name__ == "__main__":
    sys.exit(main())
