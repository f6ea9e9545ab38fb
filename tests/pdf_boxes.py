#!/usr/bin/python3
"""Text boxes of a PDF, as poppler's pdftotext -bbox-layout reads them.

usage: pdf_boxes.py FILE.pdf WORDS.txt
Checks, on every page, with poppler (not our code) finding the words:
  - every word lies on the page;
  - no two words overlap (more than 0.5 pt both ways: glyph boxes from the
    font's ascent and descent touch between tight lines, they do not cross);
  - no word is broken across lines: where a line ends with a and the next
    line of its block starts with b, a+b is not a word of WORDS.txt (the
    layout's own texts and the chart's description, whole) unless a or b is
    one itself.
Prints one line per problem; exits 1 if there is any.
"""
import re
import subprocess
import sys
import xml.etree.ElementTree as ET

NS = "{http://www.w3.org/1999/xhtml}"
SLACK = 0.5  # pt


def words_of(text):
    return set(w for w in re.findall(r"\w+", text))


def page_words(pdf):
    out = subprocess.run(["pdftotext", "-bbox-layout", pdf, "-"], check=True,
                         capture_output=True, text=True).stdout
    root = ET.fromstring(out)
    for page in root.iter(NS + "page"):
        yield page, float(page.get("width")), float(page.get("height"))


def box(el):
    return tuple(float(el.get(k)) for k in ("xMin", "yMin", "xMax", "yMax"))


def check_page(page, w, h, known, problems, n):
    words = [(box(el), el.text or "") for el in page.iter(NS + "word")]
    for (x0, y0, x1, y1), t in words:
        if x0 < -SLACK or y0 < -SLACK or x1 > w + SLACK or y1 > h + SLACK:
            problems.append(f"page {n}: '{t}' leaves the page ({x0:.1f},{y0:.1f})-({x1:.1f},{y1:.1f})")
    words.sort()
    for i, ((ax0, ay0, ax1, ay1), at) in enumerate(words):
        for (bx0, by0, bx1, by1), bt in words[i + 1:]:
            if bx0 >= ax1 - SLACK:
                break  # sorted by xMin: nothing further right can overlap
            if min(ax1, bx1) - max(ax0, bx0) > SLACK and min(ay1, by1) - max(ay0, by0) > SLACK:
                problems.append(f"page {n}: '{at}' and '{bt}' overlap")
    for block in page.iter(NS + "block"):
        lines = [[el.text or "" for el in line.iter(NS + "word")]
                 for line in block.iter(NS + "line")]
        for a, b in zip(lines, lines[1:]):
            if not a or not b:
                continue
            tail, head = re.sub(r"\W+$", "", a[-1]), re.sub(r"^\W+", "", b[0])
            if tail and head and (tail + head) in known and tail not in known \
                    and head not in known:
                problems.append(f"page {n}: '{tail + head}' broken as '{tail}' / '{head}'")


def main():
    pdf, words_file = sys.argv[1], sys.argv[2]
    known = words_of(open(words_file, encoding="utf-8").read())
    problems = []
    pages = 0
    for pages, (page, w, h) in enumerate(page_words(pdf), 1):
        check_page(page, w, h, known, problems, pages)
    if not pages:
        problems.append("no page")
    for p in problems:
        print(p)
    sys.exit(1 if problems else 0)


if __name__ == "__main__":
    main()
