#!/usr/bin/python3
"""Benchmark of `kindred serve`: checks and adds over loopback HTTP against
a large index (not a test; the README quotes its figures).

Builds (once, kept in --workdir) a synthetic corpus of --docs documents of
about 5 KB (tools/gen_corpus.py, 700 to 900 words) and an index of it, starts
the service, and measures with build/tools/kindred_serve_load:
  1. one client, one document per check: median and 99th percentile latency;
  2. 16 clients, checks per second;
  3. 16 clients, one document per add: acknowledged documents per second
     (each durable before its reply, by group commit).
Uploads are documents of the corpus under new ids (each finds its original,
so every check reads and verifies at least one stored set) and, for a
second figure, new documents of the same vocabulary that match nothing.
The add phase appends to the index in --workdir (ids unique per run).
"""

import argparse
import json
import os
import pathlib
import re
import subprocess
import sys
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent


def generate(path, docs, seed):
    if path.exists():
        return
    print(f"generating {path.name}: {docs} documents of about 5 KB", file=sys.stderr)
    subprocess.run(["/usr/bin/python3", str(ROOT / "tools/gen_corpus.py"), "--docs", str(docs),
                    "--seed", str(seed), "--dup-rate", "0.05", "--words-min", "700",
                    "--words-max", "900", "--out", str(path)], check=True)


def bodies(path, lines, template):
    with open(path, "w") as out:
        for line in lines:
            doc = json.loads(line)
            out.write(json.dumps({"documents": [{"id": template.format(doc["id"]),
                                                 "text": doc["text"]}]}) + "\n")


def load(tool, port, token, route, clients, seconds, requests, body_file):
    out = subprocess.run([str(tool), str(port), token, route, str(clients), str(seconds),
                          str(requests), str(body_file)], capture_output=True, text=True)
    result = json.loads(out.stdout)
    return result


def cpu_seconds(pid):
    """User + system CPU seconds of a process so far."""
    fields = open(f"/proc/{pid}/stat").read().rsplit(")", 1)[1].split()
    return (int(fields[11]) + int(fields[12])) / os.sysconf("SC_CLK_TCK")


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--kindred", default=str(ROOT / "build/kindred"))
    parser.add_argument("--load-tool", default=str(ROOT / "build/tools/kindred_serve_load"))
    parser.add_argument("--workdir", default="/tmp/kindred-bench")
    parser.add_argument("--docs", type=int, default=1000000)
    parser.add_argument("--seconds", type=float, default=10)
    parser.add_argument("--single", type=int, default=2000, help="checks of the one-client run")
    args = parser.parse_args()
    work = pathlib.Path(args.workdir)
    work.mkdir(parents=True, exist_ok=True)
    corpus = work / f"serve-corpus-{args.docs}.jsonl"
    generate(corpus, args.docs, seed=5)
    index = work / f"serve-{args.docs}.kin"
    if not index.exists():
        start = time.monotonic()
        subprocess.run([args.kindred, "build", "-q", str(index), str(corpus)], check=True)
        print(f"built {index.name}: {time.monotonic() - start:.0f} s, "
              f"{index.stat().st_size / 2**30:.2f} GiB", file=sys.stderr)
    fresh = work / "serve-fresh-2000.jsonl"
    generate(fresh, 2000, seed=99)
    with open(corpus) as f:
        sample = [next(f) for _ in range(2000)]
    copies = work / "serve-bodies-copies.jsonl"
    bodies(copies, sample, "upload-{}")
    originals = work / "serve-bodies-fresh.jsonl"
    with open(fresh) as f:
        bodies(originals, f.readlines(), "fresh-{}")
    adds = work / "serve-bodies-adds.jsonl"
    with open(fresh) as f:
        bodies(adds, f.readlines(), "@ID@")
    token = "bench-token-0123456789abcdef"
    token_file = work / "token"
    token_file.write_text(token + "\n")
    log = open(work / "serve.log", "w")
    start = time.monotonic()
    server = subprocess.Popen([args.kindred, "serve", str(index), "--listen", "127.0.0.1:0", "-q",
                               "--workers", "16", "--allow-add", "--token-file", str(token_file)],
                              stderr=log)
    port = None
    while port is None:
        text = (work / "serve.log").read_text()
        found = re.search(r"listening on http://127\.0\.0\.1:(\d+)/", text)
        if found:
            port = int(found.group(1))
        elif server.poll() is not None:
            sys.exit("serve failed: " + text)
        time.sleep(0.05)
    load_average = open("/proc/loadavg").read().split()[0]
    print(f"machine: {os.cpu_count()} cores, load average {load_average} before the run; index of {args.docs} documents of about 5 KB; "
          f"service ready in {time.monotonic() - start:.1f} s")
    try:
        for label, body_file in [("uploads that copy an indexed document", copies),
                                 ("uploads that match nothing", originals)]:
            cpu = cpu_seconds(server.pid)
            one = load(args.load_tool, port, token, "/v1/check", 1, 600, args.single, body_file)
            cpu = (cpu_seconds(server.pid) - cpu) / max(1, one["requests"])
            many = load(args.load_tool, port, token, "/v1/check", 16, args.seconds, 0, body_file)
            print(f"check, {label}:")
            print(f"  1 client:   median {one['median_ms']:.3f} ms, 99th percentile "
                  f"{one['p99_ms']:.3f} ms ({one['requests']} checks, {one['errors']} errors); "
                  f"service CPU {cpu * 1e3:.3f} ms per check")
            print(f"  16 clients: {many['per_second']:.0f} checks/s, median {many['median_ms']:.3f} ms, "
                  f"99th percentile {many['p99_ms']:.3f} ms ({many['requests']} checks, "
                  f"{many['errors']} errors)")
        added = load(args.load_tool, port, token, "/v1/add", 16, args.seconds, 0, adds)
        print(f"add, 16 clients, one document each: {added['per_second']:.0f} documents/s "
              f"acknowledged, median {added['median_ms']:.3f} ms, 99th percentile "
              f"{added['p99_ms']:.3f} ms ({added['requests']} adds, {added['errors']} errors)")
        metrics = subprocess.run(["curl", "-s", "--noproxy", "*", "-H", f"Authorization: Bearer {token}",
                                  f"http://127.0.0.1:{port}/metrics"], capture_output=True, text=True).stdout
        segments = re.search(r"^kindred_segments_written_total (\d+)", metrics, re.M)
        if segments:
            print(f"  segments written by group commit: {segments.group(1)}")
    finally:
        server.terminate()
        server.wait()


if __name__ == "__main__":
    main()
