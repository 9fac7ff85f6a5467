#!/usr/bin/python3
"""Generates a corpus with planted partial copies, for containment search.

The text material is that of gen_corpus.py (invented words, phrases of two
to four words, so unrelated documents share almost no runs of five words).
Documents come in three kinds, in a deterministic shuffled order:

  - sources: long documents of --long-min to --long-max words (log-uniform);
  - excerpts: a passage of 5% to 60% (--fraction-min/max) of a source's
    words, lightly edited (--edit-rates), with text of its own before and
    after so that about a share c of it is the passage, c drawn from
    [--share-min, 1]: the excerpt lies inside the source;
  - hosts (the reverse): a document of its own of --short-min to
    --short-max words, lightly edited, planted as 5% to 60% of a long
    document written around it: the short one lies inside the long one;
  - fillers: unrelated documents of --short-min to --filler-max words
    (default --long-min).

Output: JSON Lines ({"id", "text"}), ids "doc" and six digits; the --truth
file lists the planted pairs (inner, outer, kind, fraction, share, edit
rate). The truth is informational: tests compare with the exhaustive
containment sweep, which measures what was actually planted.

Standard library only. Example (the benchmark corpus):

    /usr/bin/python3 tools/gen_excerpts.py --docs 20000 --out ex.jsonl
"""

import argparse
import json
import math
import pathlib
import random
import sys

sys.path.insert(0, str(pathlib.Path(__file__).resolve().parent))
import gen_corpus  # noqa: E402


def words_of(text, rng, count):
    """`count` words of fresh text (whole phrases, so a little more)."""
    out = []
    while len(out) < count:
        out.extend(text.paragraph(rng, rng.randint(8, 24)).split(" "))
    return out[:count]


def log_uniform(rng, low, high):
    return int(round(math.exp(rng.uniform(math.log(low), math.log(high)))))


def lightly_edited(words, text, rng, rates):
    rate = rng.choice(rates)
    if rate == 0:
        return words, rate
    return gen_corpus.edit(" ".join(words), text, rng, rate).split(" "), rate


def parse_args(argv):
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--docs", type=int, default=200)
    p.add_argument("--out", required=True)
    p.add_argument("--truth")
    p.add_argument("--seed", type=int, default=16)
    p.add_argument("--planted", type=float, default=0.25,
                   help="share of documents that are excerpts or hosts")
    p.add_argument("--sources", type=float, default=0.05,
                   help="share of documents that are long sources")
    p.add_argument("--long-min", type=int, default=2000)
    p.add_argument("--long-max", type=int, default=50000)
    p.add_argument("--short-min", type=int, default=100)
    p.add_argument("--short-max", type=int, default=3000)
    p.add_argument("--filler-max", type=int, default=0,
                   help="longest filler (default: --long-min)")
    p.add_argument("--fraction-min", type=float, default=0.05)
    p.add_argument("--fraction-max", type=float, default=0.60)
    p.add_argument("--share-min", type=float, default=0.35)
    p.add_argument("--edit-rates", type=gen_corpus.parse_rates,
                   default=[0.0, 0.002, 0.005, 0.01])
    p.add_argument("--vocab", type=int, default=50000)
    return p.parse_args(argv)


def generate(args):
    """Yields (text, truth-row-or-None) per document, before shuffling."""
    text = gen_corpus.Text(args.seed, args.vocab, 1.1)
    rng = random.Random(args.seed)
    n_sources = max(1, int(args.docs * args.sources))
    n_planted = int(args.docs * args.planted)
    sources = []
    docs = []  # (words, truth) where truth = (inner, outer, ...) by position
    for _ in range(n_sources):
        words = words_of(text, rng, log_uniform(rng, args.long_min, args.long_max))
        sources.append(len(docs))
        docs.append((words, None))
    for k in range(n_planted):
        fraction = rng.uniform(args.fraction_min, args.fraction_max)
        share = rng.uniform(args.share_min, 1.0)
        if k % 2 == 0:  # an excerpt of a source
            src = rng.choice(sources)
            words = docs[src][0]
            n = max(5, int(len(words) * fraction))
            start = rng.randint(0, len(words) - n)
            passage, rate = lightly_edited(words[start:start + n], text, rng, args.edit_rates)
            own = words_of(text, rng, int(len(passage) * (1 - share) / share))
            cut = rng.randint(0, len(own))
            docs.append((own[:cut] + passage + own[cut:],
                         ("excerpt", len(docs), src, fraction, share, rate)))
        else:  # the reverse: a short document planted in a long one
            inner = words_of(text, rng, log_uniform(rng, args.short_min, args.short_max))
            inner_at = len(docs)
            docs.append((inner, None))
            copy, rate = lightly_edited(inner, text, rng, args.edit_rates)
            around = words_of(text, rng, int(len(copy) * (1 - fraction) / fraction))
            cut = rng.randint(0, len(around))
            docs.append((around[:cut] + copy + around[cut:],
                         ("host", inner_at, len(docs), fraction, share, rate)))
    while len(docs) < args.docs:
        top = args.filler_max or args.long_min
        docs.append((words_of(text, rng, log_uniform(rng, args.short_min, top)), None))
    return docs


def main(argv):
    args = parse_args(argv)
    docs = generate(args)
    order = list(range(len(docs)))
    random.Random(args.seed + 1).shuffle(order)
    ids = {}
    for position, index in enumerate(order):
        ids[index] = f"doc{position:06d}"
    with open(args.out, "w", encoding="utf-8") as out:
        for index in order:
            words, _ = docs[index]
            out.write(json.dumps({"id": ids[index], "text": " ".join(words)}) + "\n")
    if args.truth:
        rows = ["inner\touter\tkind\tfraction\tshare\tedit_rate\n"]
        for _, truth in docs:
            if truth is None:
                continue
            kind, inner, outer, fraction, share, rate = truth
            rows.append(f"{ids[inner]}\t{ids[outer]}\t{kind}\t{fraction:.3f}\t"
                        f"{share:.3f}\t{rate}\n")
        pathlib.Path(args.truth).write_text("".join(rows), encoding="ascii")
    print(f"gen_excerpts: {len(docs)} documents", file=sys.stderr)


if __name__ == "__main__":
    main(sys.argv[1:])
