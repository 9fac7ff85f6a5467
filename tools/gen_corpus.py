#!/usr/bin/python3
"""Generates a large synthetic corpus with planted near-duplicates.

Documents are paragraphs of sentences made of invented, pronounceable words
whose frequencies follow a Zipf-like law (rank r has weight 1 / r^s). Text is
built by joining pre-built phrases of two to four words, so documents that
are not planted copies share almost no runs of five words. A fraction of
documents (--dup-rate) are near-duplicates of an earlier document: a number
of word edits (replace, insert, delete) equal to an edit rate picked from
--edit-rates times the original's word count, at least one. A fraction
(--boilerplate) end with the same long boilerplate paragraph, which makes
frequent LSH buckets without making those documents duplicates.

Output is deterministic: the same options give the same bytes. Ids are
"doc" and nine digits (jsonl), or the file's path relative to --out (tree:
"0000/doc000000123.txt", a thousand files per folder); the --truth file
lists planted pairs with those same ids: original, duplicate, edit rate.

Standard library only. Example (about 1 GB, a few minutes):

    /usr/bin/python3 tools/gen_corpus.py --docs 1000000 --out big.jsonl \\
        --truth big.truth.tsv
"""

import argparse
import itertools
import pathlib
import random
import sys

PHRASES = 1 << 16          # pre-built phrases of two to four words
BOILERPLATE_WORDS = 90
ONSETS = ["b", "c", "d", "f", "g", "h", "j", "k", "l", "m", "n", "p", "r",
          "s", "t", "v", "w", "z", "br", "cr", "dr", "fl", "gr", "pl", "st",
          "tr", "sh", "ch", "th", "qu"]
VOWELS = ["a", "e", "i", "o", "u", "ai", "ea", "ou", "io", "ee"]
CODAS = ["", "", "", "n", "r", "s", "l", "m", "t", "k", "nd", "st"]


def syllable(rng):
    return rng.choice(ONSETS) + rng.choice(VOWELS) + rng.choice(CODAS)


def vocabulary(rng, size):
    """`size` distinct invented words, shorter ones at the frequent ranks
    (common words are short in natural languages too)."""
    words, seen = [], set()
    for rank in itertools.count():
        if len(words) == size:
            return words
        syllables = 1 if rank < 200 else 2 if rank < 4000 else 3 if \
            rank < 40000 else 4
        for _ in range(100):
            w = "".join(syllable(rng) for _ in range(syllables))
            if w not in seen:
                break
        else:
            w = f"{w}{rank}"  # never reached with the default sizes
        seen.add(w)
        words.append(w)


class Text:
    """The generator's fixed material: vocabulary, phrases, boilerplate."""

    def __init__(self, seed, vocab_size, zipf):
        rng = random.Random(seed)
        self.words = vocabulary(rng, vocab_size)
        self.cum = list(itertools.accumulate(
            1.0 / (r + 1) ** zipf for r in range(vocab_size)))
        self.phrases = []
        for _ in range(PHRASES):
            n = rng.choice((2, 3, 3, 4))
            p = " ".join(rng.choices(self.words, cum_weights=self.cum, k=n))
            self.phrases.append(p + "," if rng.random() < 0.08 else p)
        self.capitals = [p[0].upper() + p[1:] for p in self.phrases]
        self.boilerplate = self.paragraph(rng, BOILERPLATE_WORDS // 3)

    def word(self, rng):
        return rng.choices(self.words, cum_weights=self.cum)[0]

    def sentence(self, picks):
        s = " ".join([self.capitals[picks[0]]]
                     + [self.phrases[j] for j in picks[1:]])
        return (s[:-1] if s[-1] == "," else s) + "."

    def paragraph(self, rng, n_phrases):
        picks = [int(rng.random() * PHRASES) for _ in range(n_phrases)]
        out, i = [], 0
        while i < n_phrases:
            k = rng.randint(2, 6)
            out.append(self.sentence(picks[i:i + k]))
            i += k
        return " ".join(out)


def original_text(text, seed, index, words_min, words_max, boilerplate):
    """The text of document `index` as first written; a pure function of its
    arguments, so a duplicate can regenerate its original."""
    rng = random.Random(seed * 4294967296 + index)
    with_boilerplate = rng.random() < boilerplate
    remaining = rng.randint(words_min, words_max) // 3 + 1
    paragraphs = []
    while remaining > 0:
        n = min(remaining, rng.randint(8, 24))
        paragraphs.append(text.paragraph(rng, n))
        remaining -= n
    if with_boilerplate:
        paragraphs.append(text.boilerplate)
    return "\n\n".join(paragraphs)


def is_plain(token):
    return token.isalpha() and token.islower()


def edit_once(tokens, vocab, rng):
    """Replaces, inserts or deletes one plain lower-case word, never touching
    sentence starts, punctuation or paragraph breaks."""
    plain = [i for i, t in enumerate(tokens) if is_plain(t)]
    if not plain:
        tokens.append(vocab.word(rng))
        return
    while True:
        pos, op, new = rng.choice(plain), rng.randrange(3), vocab.word(rng)
        if op == 0 and new != tokens[pos]:
            tokens[pos] = new
            return
        if op == 1:
            tokens.insert(pos + 1, new)
            return
        if op == 2 and len(plain) > 5:
            del tokens[pos]
            return


def edit(text, vocab, rng, rate):
    """`text` with max(1, round(rate * words)) word edits; more while the
    result equals `text` (an insert can be undone by a delete)."""
    tokens = text.split(" ")
    edits = max(1, round(rate * len(tokens)))
    while True:
        for _ in range(edits):
            edit_once(tokens, vocab, rng)
        result = " ".join(tokens)
        if result != text:
            return result
        edits = 1


def parse_rates(value):
    rates = [float(x) for x in value.split(",")]
    if not rates or any(not 0 < r < 1 for r in rates):
        raise argparse.ArgumentTypeError("edit rates must be in (0, 1)")
    return rates


def fraction(value):
    f = float(value)
    if not 0 <= f <= 1:
        raise argparse.ArgumentTypeError("must be between 0 and 1")
    return f


def parse_args(argv):
    p = argparse.ArgumentParser(
        description=__doc__.split("\n\n")[0],
        formatter_class=argparse.RawDescriptionHelpFormatter,
        epilog=__doc__.split("\n\n", 1)[1])
    p.add_argument("--docs", type=int, default=1000, help="documents")
    p.add_argument("--seed", type=int, default=1, help="random seed")
    p.add_argument("--format", choices=["jsonl", "tree"], default="jsonl")
    p.add_argument("--out", default="-",
                   help="jsonl file ('-': stdout) or tree directory")
    p.add_argument("--dup-rate", type=fraction, default=0.05,
                   help="fraction of documents that are planted duplicates")
    p.add_argument("--edit-rates", type=parse_rates,
                   default=[0.02, 0.05, 0.1, 0.2],
                   help="comma-separated fractions of words edited in a "
                        "duplicate, one picked per duplicate")
    p.add_argument("--words-min", type=int, default=80)
    p.add_argument("--words-max", type=int, default=200,
                   help="document length range in words before any "
                        "boilerplate (defaults give about 1 KB a document)")
    p.add_argument("--vocab", type=int, default=50000,
                   help="vocabulary size")
    p.add_argument("--zipf", type=float, default=1.1,
                   help="Zipf exponent of word frequencies")
    p.add_argument("--boilerplate", type=fraction, default=0.0,
                   help="fraction of documents ending with one shared "
                        "boilerplate paragraph")
    p.add_argument("--truth", help="write the planted pairs here (TSV)")
    p.add_argument("--id-prefix", default="",
                   help="put this before every id, so that shards made with "
                        "different seeds can be read together")
    args = p.parse_args(argv)
    if args.docs < 0 or not 10 <= args.words_min <= args.words_max:
        p.error("need --docs >= 0 and 10 <= --words-min <= --words-max")
    if args.vocab < 100:
        p.error("need --vocab >= 100")
    if args.format == "tree" and args.out == "-":
        p.error("--format tree needs an --out directory")
    return args


class JsonlSink:
    def __init__(self, out, prefix):
        self.file = (sys.stdout.buffer if out == "-"
                     else open(out, "wb", buffering=1 << 20))
        self.batch = []
        self.prefix = prefix

    def doc_id(self, index):
        return f"{self.prefix}doc{index:09d}"

    def write(self, index, text):
        # The text holds only ASCII letters, spaces, ".", "," and "\n".
        self.batch.append('{"id": "%s", "text": "%s"}\n'
                          % (self.doc_id(index), text.replace("\n", "\\n")))
        if len(self.batch) >= 2000:
            self.flush()

    def flush(self):
        self.file.write("".join(self.batch).encode("ascii"))
        self.batch = []

    def close(self):
        self.flush()
        if self.file is not sys.stdout.buffer:
            self.file.close()
        else:
            self.file.flush()


class TreeSink:
    def __init__(self, out, prefix):
        self.prefix = prefix
        self.root = pathlib.Path(out)
        self.root.mkdir(parents=True, exist_ok=True)
        if any(self.root.iterdir()):
            sys.exit(f"gen_corpus: {out}: directory is not empty")

    def doc_id(self, index):
        return f"{index // 1000:04d}/{self.prefix}doc{index:09d}.txt"

    def write(self, index, text):
        path = self.root / self.doc_id(index)
        if index % 1000 == 0:
            path.parent.mkdir(exist_ok=True)
        path.write_bytes(text.encode("ascii") + b"\n")

    def close(self):
        pass


def generate(args, sink, truth):
    text = Text(args.seed, args.vocab, args.zipf)
    picks = random.Random(args.seed + 1)
    source = {}  # duplicate index -> original index
    lengths = (args.words_min, args.words_max, args.boilerplate)
    for i in range(args.docs):
        if i > 0 and picks.random() < args.dup_rate:
            j = picks.randrange(i)
            j = source.get(j, j)
            rate = picks.choice(args.edit_rates)
            source[i] = j
            body = edit(original_text(text, args.seed, j, *lengths), text,
                        random.Random(args.seed * 4294967296 + i), rate)
            truth.append(f"{sink.doc_id(j)}\t{sink.doc_id(i)}\t{rate:g}\n")
        else:
            body = original_text(text, args.seed, i, *lengths)
        sink.write(i, body)
    return len(source)


def main(argv):
    args = parse_args(argv)
    sink = JsonlSink(args.out, args.id_prefix) if args.format == "jsonl" \
        else TreeSink(args.out, args.id_prefix)
    truth = ["original\tduplicate\tedit_rate\n"]
    planted = generate(args, sink, truth)
    sink.close()
    if args.truth:
        pathlib.Path(args.truth).write_text("".join(truth), encoding="ascii")
    print(f"gen_corpus: {args.docs} documents, {planted} planted duplicates",
          file=sys.stderr)


if __name__ == "__main__":
    main(sys.argv[1:])
