#!/usr/bin/python3
"""Independent computation of kindred's canonical shingle sets.

Built only from general-purpose libraries: Python's own UTF-8 decoding with
errors="replace", PyICU (Debian python3-icu) for NFKC_Casefold, UAX #29 word
segmentation and the White_Space property, and Python xxhash (Debian
python3-xxhash) for XXH3-64. It shares no code with the C++ implementation.

Usage: shingle_reference.py --seed N [--pairs] DIR
       shingle_reference.py --repair DIR
Reads every regular file under DIR (recursively, sorted by relative path) as
one document and prints, for word k = 1, 3, 5 and char k = 3, 5:
  S <TAB> path <TAB> mode <TAB> k <TAB> invalid <TAB> hex hashes (sorted, space separated)
and with --pairs, for every pair of documents a < b:
  J <TAB> mode <TAB> k <TAB> path_a <TAB> path_b <TAB> |A & B| <TAB> |A | B|
With --repair it prints instead, for each document, its bytes decoded with
errors="replace" and encoded back to UTF-8:
  R <TAB> path <TAB> replacements <TAB> hex of the repaired bytes
"""

import argparse
import os
import sys

import icu
import xxhash

SETTINGS = [("word", 1), ("word", 3), ("word", 5), ("char", 3), ("char", 5)]
NORMALIZER = icu.Normalizer2.getNFKCCasefoldInstance()
WORDS = icu.BreakIterator.createWordInstance(icu.Locale.getRoot())
WORD_NONE_LIMIT = 100  # UBRK_WORD_NONE_LIMIT: numbers, letters, kana, ideographs


def count_replacements(data):
    """Number of U+FFFD that decoding with errors="replace" inserts."""
    return data.decode("utf-8", "replace").count("\ufffd") - \
        data.decode("utf-8", "ignore").count("\ufffd")


def normalize(data):
    return NORMALIZER.normalize(data.decode("utf-8", "replace"))


def words(text):
    ustr = icu.UnicodeString(text)
    WORDS.setText(ustr)
    out = []
    start = WORDS.first()
    for end in WORDS:
        if WORDS.getRuleStatus() >= WORD_NONE_LIMIT:
            out.append(str(ustr[start:end]))
        start = end
    return out


def folded(text):
    out = []
    pending = False
    for ch in text:
        if icu.Char.isUWhiteSpace(ch):
            pending = bool(out)
            continue
        if pending:
            out.append(" ")
            pending = False
        out.append(ch)
    return "".join(out)


def windows(items, k, joiner):
    if not items:
        return []
    if len(items) < k:
        return [joiner.join(items)]
    return [joiner.join(items[i:i + k]) for i in range(len(items) - k + 1)]


def shingle_set(text, mode, k, seed):
    if mode == "word":
        shingles = windows(words(text), k, " ")
    else:
        shingles = windows(list(folded(text)), k, "")
    return {xxhash.xxh3_64_intdigest(s.encode("utf-8"), seed) for s in shingles}


def documents(root):
    paths = []
    for directory, _, files in os.walk(root):
        for name in files:
            full = os.path.join(directory, name)
            if os.path.isfile(full) and not os.path.islink(full):
                paths.append(os.path.relpath(full, root))
    return sorted(paths)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--pairs", action="store_true")
    parser.add_argument("--repair", action="store_true")
    parser.add_argument("dir")
    args = parser.parse_args()
    out = sys.stdout
    if args.repair:
        for path in documents(args.dir):
            with open(os.path.join(args.dir, path), "rb") as f:
                data = f.read()
            repaired = data.decode("utf-8", "replace").encode("utf-8")
            out.write("R\t%s\t%d\t%s\n" % (path, count_replacements(data),
                                               repaired.hex()))
        return
    sets = {}
    for path in documents(args.dir):
        with open(os.path.join(args.dir, path), "rb") as f:
            data = f.read()
        text = normalize(data)
        invalid = count_replacements(data)
        for mode, k in SETTINGS:
            hashes = shingle_set(text, mode, k, args.seed)
            sets[(path, mode, k)] = hashes
            listed = " ".join("%016x" % h for h in sorted(hashes))
            out.write("S\t%s\t%s\t%d\t%d\t%s\n" % (path, mode, k, invalid, listed))
    if args.pairs:
        paths = documents(args.dir)
        for mode, k in SETTINGS:
            for i, a in enumerate(paths):
                for b in paths[i + 1:]:
                    sa, sb = sets[(a, mode, k)], sets[(b, mode, k)]
                    out.write("J\t%s\t%d\t%s\t%s\t%d\t%d\n" %
                              (mode, k, a, b, len(sa & sb), len(sa | sb)))


if __name__ == "__main__":
    main()
