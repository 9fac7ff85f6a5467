#!/usr/bin/python3
"""Benchmark of the upload check for containment against a large index.

Builds an index of --docs generated documents (tools/gen_corpus.py, 40 to
160 words each) with `kindred build --measure containment -t T`, which
stores the containment search's keys (format version 3), then checks
--uploads short documents against it:

    kindred check -v INDEX UPLOADS --measure containment -t T

Half the uploads are passages (50% to 90% of the words) of indexed
documents, so they lie inside them; a quarter are two indexed documents
joined, so indexed documents lie inside them; a quarter are new. The
figure is the per-document latency `check -v` reports (band lookup, reading
candidate sets, exact verification, once the index is open; signing not
included): the median of each run's median over --runs runs. Also timed:
the whole process checking one upload (opening included), and how many
uploads were matched with the documents they were made from.

With --compact, also the peak memory of `kindred compact` on a Jaccard
index of the same documents, without and with --memory, and of the
program given as --reference (one that holds every live document).

    tools/bench_containment_check.py --work /tmp/bench      # 1,000,000 documents
    tools/bench_containment_check.py --docs 20000           # a quick look

Needs: a Release build in build/.
"""

import argparse
import json
import os
import pathlib
import random
import re
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent


def run(command, out_path=os.devnull):
    """Runs `command`; returns (wall s, peak KiB, stderr)."""
    start = time.monotonic()
    with open(out_path, "wb") as out:
        process = subprocess.Popen(command, stdout=out, stderr=subprocess.PIPE)
        _, status, usage = os.wait4(process.pid, 0)
    wall = time.monotonic() - start
    stderr = process.stderr.read().decode("utf-8", "replace")
    process.stderr.close()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit(f"bench: {' '.join(command)} failed: {stderr[-500:]}")
    return wall, usage.ru_maxrss, stderr


def make_uploads(corpus, count, seed):
    """Short uploads made from a sample of the indexed documents; returns
    the list of (upload id, text, source ids, kind)."""
    rng = random.Random(seed)
    lines = []
    with open(corpus) as f:
        for i, line in enumerate(f):
            if i % 50 == 0:
                lines.append(json.loads(line))
    rng.shuffle(lines)
    uploads = []
    for i in range(count):
        doc = lines[i % len(lines)]
        words = doc["text"].split()
        kind = "inside" if i % 4 < 2 else ("contains" if i % 4 == 2 else "new")
        if kind == "inside":
            n = max(1, int(len(words) * rng.uniform(0.5, 0.9)))
            start = rng.randrange(len(words) - n + 1)
            uploads.append((f"up{i:04d}", " ".join(words[start:start + n]), {doc["id"]}, kind))
        elif kind == "contains":
            other = lines[(i + count) % len(lines)]
            uploads.append((f"up{i:04d}", doc["text"] + "\n\n" + other["text"],
                            {doc["id"], other["id"]}, kind))
        else:
            rng.shuffle(words)  # the same words, none of the same 5-word runs
            uploads.append((f"up{i:04d}", " ".join(words), set(), kind))
    return uploads


def latency(stderr):
    m = re.search(r"latency per document: median ([0-9.]+) ms, 99th percentile ([0-9.]+) ms",
                  stderr)
    if not m:
        sys.exit(f"bench: no latency line in: {stderr[-500:]}")
    return float(m.group(1)), float(m.group(2))


def compact_memory(args, work, binary):
    jaccard = work / "jaccard.kin"
    if not jaccard.exists():
        run([binary, "build", "-q", str(jaccard), str(work / "indexed.jsonl")])
    rows = []
    for name, command in [("compact", [binary, "compact", "-q"]),
                          ("compact --memory 256M", [binary, "compact", "-q", "--memory", "256M"]),
                          ("reference compact", [args.reference, "compact", "-q"])]:
        if command[0] is None:
            continue
        copy = work / "compacted.kin"
        subprocess.run(["cp", str(jaccard), str(copy)], check=True)
        wall, peak, _ = run(command + [str(copy)])
        rows.append((name, wall, peak))
    print("\ncompact of the Jaccard index (one segment):")
    for name, wall, peak in rows:
        print(f"  {name:24s} {wall:7.1f} s wall, peak memory {peak / 1024:7.0f} MB")


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--docs", type=int, default=1000000)
    p.add_argument("--uploads", type=int, default=200)
    p.add_argument("--threshold", type=float, default=0.8)
    p.add_argument("--runs", type=int, default=5)
    p.add_argument("--work", help="directory for the corpus and index (kept, reused)")
    p.add_argument("--binary", default=str(ROOT / "build" / "kindred"))
    p.add_argument("--compact", action="store_true", help="also measure compact's memory")
    p.add_argument("--reference", help="another kindred binary for the compact comparison")
    args = p.parse_args()
    work = pathlib.Path(args.work or tempfile.mkdtemp(prefix="kindred-bench-"))
    work.mkdir(parents=True, exist_ok=True)
    corpus, index = work / "indexed.jsonl", work / "containment.kin"
    if not corpus.exists():
        subprocess.run([sys.executable, str(ROOT / "tools" / "gen_corpus.py"), "--docs",
                        str(args.docs), "--words-min", "40", "--words-max", "160", "--out",
                        str(corpus)], check=True, stderr=subprocess.DEVNULL)
    t = str(args.threshold)
    if not index.exists():
        wall, peak, _ = run([args.binary, "build", "-q", str(index), str(corpus), "--measure",
                             "containment", "-t", t])
        print(f"build: {wall:.1f} s wall, peak memory {peak / 1024:.0f} MB, "
              f"{index.stat().st_size / 1e9:.2f} GB index")
    uploads = make_uploads(corpus, args.uploads, 16)
    upload_path = work / "uploads.jsonl"
    with open(upload_path, "w") as f:
        for uid, text, _, _ in uploads:
            f.write(json.dumps({"id": uid, "text": text}) + "\n")
    with open(work / "one.jsonl", "w") as f:
        f.write(json.dumps({"id": uploads[0][0], "text": uploads[0][1]}) + "\n")
    check = [args.binary, "check", "-v", str(index), "--measure", "containment", "-t", t]
    medians, p99s, one_walls, one_latencies = [], [], [], []
    for _ in range(args.runs):
        _, _, stderr = run(check + [str(upload_path)], work / "matches.jsonl")
        median, p99 = latency(stderr)
        medians.append(median)
        p99s.append(p99)
        wall, peak, stderr = run(check + [str(work / "one.jsonl")])
        one_walls.append(wall)
        one_latencies.append(latency(stderr)[0])
    found = {}
    with open(work / "matches.jsonl") as f:
        for line in f:
            m = json.loads(line)
            if m["match_in"] == "index":
                found.setdefault(m["id"], set()).add((m["match"], m["contained"]))
    print(f"{args.docs} indexed documents, {args.uploads} uploads, containment >= {t}")
    print(f"latency per upload (median of {args.runs} runs' medians): "
          f"{statistics.median(medians):.3f} ms; 99th percentile {statistics.median(p99s):.3f} ms")
    print(f"one upload, whole process (open included): {statistics.median(one_walls) * 1e3:.0f} ms;"
          f" its latency {statistics.median(one_latencies):.3f} ms; peak memory {peak / 1024:.0f} MB")
    for kind, way in [("inside", "id_in_match"), ("contains", "match_in_id"), ("new", None)]:
        made = [u for u in uploads if u[3] == kind]
        hit = sum(1 for uid, _, sources, _ in made
                  if sources and all((s, way) in found.get(uid, set()) or
                                     (s, "both") in found.get(uid, set()) for s in sources))
        matched = sum(1 for uid, _, _, _ in made if uid in found)
        print(f"  {kind:9s} {len(made):4d} uploads: {hit} matched with every source "
              f"({way or '-'}), {matched} with anything")
    if args.compact:
        compact_memory(args, work, args.binary)


if __name__ == "__main__":
    main()
