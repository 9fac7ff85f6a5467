#!/usr/bin/python3
"""Benchmark of the containment sweep against the exhaustive reference.

On a generated corpus of planted partial copies (tools/gen_excerpts.py:
passages of 5% to 60% of long documents of up to 50,000 words inside short
ones, and short documents inside long ones, lightly edited), it times

    kindred sweep --measure containment -t T --print pairs CORPUS
    kindred sweep --measure containment -t T --exhaustive --print pairs CORPUS

(whole-process wall times; the LSH sweep's median of --runs runs) and
measures the LSH sweep's recall: the share of the reference's pairs with
containment >= T + 0.05 that it reports. The reference runs once, at the
lowest threshold: its cost is the all-pairs comparison, which does not
depend on T, and its pairs at a higher threshold are those of its output
whose containment reaches it.

    tools/bench_containment.py                 # 20,000 documents
    tools/bench_containment.py --docs 2000     # a quick look

Needs: a Release build in build/.
"""

import argparse
import json
import os
import pathlib
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent


def run(command, out_path):
    """Runs `command` with stdout to out_path. Returns (wall s, cpu s, peak KiB,
    stderr)."""
    start = time.monotonic()
    with open(out_path, "wb") as out:
        process = subprocess.Popen(command, stdout=out, stderr=subprocess.PIPE)
        _, status, usage = os.wait4(process.pid, 0)
    wall = time.monotonic() - start
    stderr = process.stderr.read().decode("utf-8", "replace")
    process.stderr.close()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit(f"bench: {' '.join(command)} failed: {stderr[-500:]}")
    return wall, usage.ru_utime + usage.ru_stime, usage.ru_maxrss, stderr


def pairs_of(path):
    with open(path) as f:
        return [json.loads(line) for line in f]


def containment(pair):
    return max(pair["containment_a_in_b"], pair["containment_b_in_a"])


def main():
    p = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    p.add_argument("--docs", type=int, default=20000)
    p.add_argument("--thresholds", default="0.5,0.7,0.9")
    p.add_argument("--runs", type=int, default=3)
    p.add_argument("--threads", type=int, default=2)
    p.add_argument("--work", help="directory for the corpus and outputs (kept)")
    p.add_argument("--binary", default=str(ROOT / "build" / "kindred"))
    args = p.parse_args()
    work = pathlib.Path(args.work or tempfile.mkdtemp(prefix="kindred-contain-"))
    work.mkdir(parents=True, exist_ok=True)
    corpus = work / f"excerpts-{args.docs}.jsonl"
    if not corpus.exists():
        subprocess.run([sys.executable, str(ROOT / "tools" / "gen_excerpts.py"),
                        "--docs", str(args.docs), "--sources", "0.01", "--planted", "0.1",
                        "--filler-max", "600", "--out", str(corpus),
                        "--truth", str(work / f"excerpts-{args.docs}.truth.tsv")], check=True)
    print(f"corpus: {corpus} ({corpus.stat().st_size / 1e6:.0f} MB, {args.docs} documents)")
    thresholds = [float(t) for t in args.thresholds.split(",")]
    base = [args.binary, "sweep", "--measure", "containment", "--print", "pairs",
            "-j", str(args.threads)]
    low = min(thresholds)
    ex_wall, ex_cpu, ex_rss, _ = run(base + ["-t", str(low), "--exhaustive", str(corpus)],
                             work / "exhaustive.jsonl")
    reference = pairs_of(work / "exhaustive.jsonl")
    print(f"exhaustive, t={low}: {ex_wall:.1f} s wall, {ex_cpu:.1f} s CPU, peak "
          f"{ex_rss / 1024:.0f} MB, {len(reference)} pairs")
    print("Medians of the LSH runs; speed-up = exhaustive / LSH, by wall and by CPU time")
    print("t     LSH wall s  LSH CPU s  speed-up wall  speed-up CPU  pairs>=t+0.05  recall  "
          "candidates  peak MB")
    for t in thresholds:
        walls, cpus = [], []
        for _ in range(args.runs):
            wall, cpu, rss, stderr = run(base + ["-t", str(t), str(corpus)],
                                         work / f"lsh-{t}.jsonl")
            walls.append(wall)
            cpus.append(cpu)
        found = {(q["a"], q["b"]) for q in pairs_of(work / f"lsh-{t}.jsonl")}
        want = [(q["a"], q["b"]) for q in reference if containment(q) >= t + 0.05 - 1e-9]
        recall = sum(k in found for k in want) / max(1, len(want))
        candidates = next((line.split()[2] for line in stderr.splitlines()
                           if "candidate pairs" in line), "?")
        lsh, lsh_cpu = statistics.median(walls), statistics.median(cpus)
        print(f"{t:<5} {lsh:10.2f}  {lsh_cpu:9.2f}  {ex_wall / lsh:13.1f}  {ex_cpu / lsh_cpu:12.1f}"
              f"  {len(want):13d}  {recall:6.4f}  {candidates:>10}  {rss / 1024:7.0f}")


if __name__ == "__main__":
    main()
