#!/usr/bin/python3
"""Numbers and plural categories of every shipped language against
python3-babel (Debian 12: babel 2.10, which reads CLDR's own data and does
not use ICU), through tests/ref/lang_driver (our src/phrase.c, on ICU 72).

usage: lang_ref.py DRIVER [NUMBERS_PER_LANGUAGE]

Checked for each language:
  - the plural category: babel's Locale.plural_form on the same decimal
    (source: CLDR plural rules as babel reads them);
  - the formatted number: babel's format_decimal with every digit kept
    (decimal_quantization=False; source: CLDR number symbols and patterns
    as babel reads them).
Two known gaps between babel 2.10 and ICU 72 are counted and reported, never
silently passed (ENVIRONMENT.md, "python3-babel ... does not apply CLDR's
minimum grouping"; REFERENCES.md §14):
  - minimum grouping: CLDR sets minimumGroupingDigits 2 for es and pl, so a
    four-digit whole part is not grouped ("1234"); babel 2.10 groups it;
  - numbering system: ICU writes ar in CLDR's default numbering system for
    ar (Arabic-Indic digits, U+066B/U+066C separators, U+061C marks) and
    babel 2.10 only in Latin digits: such a case passes when ICU's text,
    read back digit for digit into Latin digits, equals babel's.
Any other difference fails, listing the cases.
"""
import random
import subprocess
import sys
from decimal import Decimal

from babel import Locale
from babel.numbers import format_decimal

LANGS = ["en", "es", "fr", "de", "pt", "pl", "ar", "zh-Hans"]
# REFERENCES.md §14 (CLDR minimumGroupingDigits = 2)
MIN_GROUPING_2 = {"es", "pl"}
REQUIRED = ["0", "1", "2", "5", "12", "22", "101", "1.5", "1234567.25"]


def numbers(rng, n):
    out = list(REQUIRED) + [str(i) for i in range(0, 230)]
    while len(out) < n:
        whole = rng.randrange(10 ** rng.randint(1, 12))
        places = rng.choice([0, 0, 0, 1, 2, 3, 6])
        if places:
            frac = str(rng.randrange(1, 10 ** places)).rjust(places, "0").rstrip("0")
            out.append(f"{whole}.{frac}")
        else:
            out.append(str(whole))
    return out[:n]


ARAB = {chr(0x0660 + d): str(d) for d in range(10)}
ARAB.update({"\u066c": ",", "\u066b": ".", "\u061c": "", "\u200f": "", "\u200e": ""})


def latin_digits(text):
    return "".join(ARAB.get(ch, ch) for ch in text)


def ungroup_four(text, lang, num):
    """babel's text as CLDR's minimum grouping 2 would write it."""
    whole = num.split(".")[0]
    if lang not in MIN_GROUPING_2 or len(whole) != 4:
        return text
    sym = Locale.parse(lang.replace("-", "_")).number_symbols["group"]
    return text.replace(sym, "", 1)


def classify(lang, num, ours, theirs):
    if ours == theirs:
        return "same"
    grouped = ungroup_four(theirs, lang, num)
    if ours == grouped:
        return "minimum grouping"
    if lang == "ar" and latin_digits(ours) in (theirs, grouped):
        return "arab digits"
    return None


def main():
    # the comparison itself must see a wrong separator and a wrong digit
    assert classify("de", "1234", "1,234", "1.234") is None
    assert classify("ar", "12", "\u0661\u0663", "12") is None
    driver = sys.argv[1]
    per = int(sys.argv[2]) if len(sys.argv) > 2 else 3000
    rng = random.Random(19)
    cases = [(lang, num) for lang in LANGS for num in numbers(rng, per)]
    feed = "".join(f"{l} {n}\n" for l, n in cases)
    res = subprocess.run([driver], input=feed, capture_output=True, text=True, check=True)
    lines = res.stdout.splitlines()
    assert len(lines) == len(cases), (len(lines), len(cases))
    bad, counts, plural_bad = [], {}, []
    for (lang, num), line in zip(cases, lines):
        if line.startswith("error:"):
            bad.append(f"{lang} {num}: {line}")
            continue
        _, _, ours, cat = line.split("\t")
        loc = Locale.parse(lang.replace("-", "_"))
        theirs = format_decimal(Decimal(num), locale=loc, decimal_quantization=False)
        kind = classify(lang, num, ours, theirs)
        counts[(lang, kind)] = counts.get((lang, kind), 0) + 1
        if kind is None:
            bad.append(f"{lang} {num}: ours {ours!r}, babel {theirs!r}")
        want = loc.plural_form(Decimal(num))
        if cat != want:
            plural_bad.append(f"{lang} {num}: ours {cat}, babel {want}")
    for lang in LANGS:
        parts = [f"{k or 'UNEXPLAINED'} {v}" for (l, k), v in sorted(
            counts.items(), key=lambda kv: str(kv[0][1])) if l == lang]
        print(f"lang_ref {lang}: {per} numbers: " + ", ".join(parts))
    for line in (bad + plural_bad)[:40]:
        print("FAIL", line)
    print(f"lang_ref: {len(cases)} numbers in {len(LANGS)} languages, "
          f"{len(bad)} format and {len(plural_bad)} plural disagreements")
    return 1 if bad or plural_bad else 0


if __name__ == "__main__":
    sys.exit(main())
