#!/usr/bin/python3
"""Independent implementation of kindred's HTML-to-text definition.

Parses with html5lib (Debian python3-html5lib), an implementation of the
same WHATWG HTML5 parsing algorithm that shares no code with Gumbo or with
kindred, and walks the tree it builds: text nodes in document order, the
contents of head, script, style, noscript, template, svg and math left out,
a line break before and after every element that is not phrasing content
and for every br. The encoding is html5lib's own detection (byte-order mark,
then its <meta> prescan), with UTF-8 as the default, as kindred's rule
without an HTTP charset. Words are then the tokens of shingle_reference.py
(PyICU: NFKC_Casefold and UAX #29).

Usage: html_text_reference.py TEXTS.jsonl FILE...
  TEXTS.jsonl holds kindred's texts of the same files ({"id": FILE, "text":
  ...}, from build/tools/kindred_texts --html FILE...). Prints one line per
  file whose word tokens differ, and a summary line
  "compared N files: M identical"; exits 1 when any differ.
"""

import json
import os
import sys

import html5lib

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import shingle_reference as ref  # noqa: E402

# The definition's lists (README, "Text of HTML pages").
PHRASING = set(
    "a abbr area audio b bdi bdo br button canvas cite code data datalist del dfn em embed i "
    "iframe img input ins kbd label link map mark math meta meter noscript object output picture "
    "progress q ruby s samp script select slot small span strong sub sup svg template textarea "
    "time u var video wbr acronym big blink font nobr strike tt rb rp rt rtc".split())
SKIPPED = set("head script style noscript template svg math".split())


def phrasing(name):
    return name in PHRASING or "-" in name  # custom elements are phrasing


def local_name(tag):
    return tag.rsplit("}", 1)[-1].lower() if isinstance(tag, str) else None


def text_of(root):
    out = []
    # An explicit stack: (element, phase); phase 0 = enter, 1 = leave.
    stack = [(root, 0)]
    while stack:
        node, phase = stack.pop()
        name = local_name(node.tag)
        if phase == 1:
            if not phrasing(name) and name != "br":
                out.append("\n")
            if node.tail:
                out.append(node.tail)
            continue
        if name is None:  # a comment or processing instruction: only its tail
            if node.tail:
                out.append(node.tail)
            continue
        if name in SKIPPED or name == "<!doctype>":
            if node.tail:
                out.append(node.tail)
            continue
        if name == "br":
            out.append("\n")
            stack.append((node, 1))
            continue
        if not phrasing(name):
            out.append("\n")
        if node.text:
            out.append(node.text)
        stack.append((node, 1))
        for child in reversed(list(node)):
            stack.append((child, 0))
    return "".join(out)


def reference_text(data):
    parser = html5lib.HTMLParser(tree=html5lib.getTreeBuilder("etree"),
                                 namespaceHTMLElements=False)
    document = parser.parse(data, default_encoding="utf-8", useChardet=False)
    return text_of(document)


def tokens(text):
    return ref.words(ref.NORMALIZER.normalize(text))


def main():
    ours = {}
    with open(sys.argv[1], encoding="utf-8") as f:
        for line in f:
            doc = json.loads(line)
            ours[doc["id"]] = doc["text"]
    files = sys.argv[2:]
    same = 0
    for path in files:
        with open(path, "rb") as f:
            data = f.read()
        want = tokens(reference_text(data))
        got = tokens(ours.get(path, ""))
        if want == got:
            same += 1
            continue
        first = next((i for i, (a, b) in enumerate(zip(want, got)) if a != b),
                     min(len(want), len(got)))
        print(f"DIFF {path}: {len(want)} reference tokens, {len(got)} kindred tokens; "
              f"first difference at token {first}: {want[first:first + 5]} vs "
              f"{got[first:first + 5]}")
    print(f"compared {len(files)} files: {same} identical")
    return 0 if same == len(files) else 1


if __name__ == "__main__":
    sys.exit(main())
