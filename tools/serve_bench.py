#!/usr/bin/python3
"""Benchmark of `kindred serve`: checks and adds over loopback HTTP against
a large index (not a test; the README quotes its figures).

Builds (once, kept in --workdir) a synthetic corpus of --docs documents of
about 5 KB (tools/gen_corpus.py, 700 to 900 words) and an index of it, starts
the service, and measures with build/tools/kindred_serve_load, each phase
--runs times (each run printed, then the medians):
  1. checks, one document each: one client (median and 99th percentile
     latency), then 16 clients (checks per second);
  2. the same while --mixed-adders clients add documents meanwhile;
  3. 16 clients, one document per add: acknowledged documents per second
     (each durable before its reply, by group commit).
Latencies are measured by the client; the service's own time per request
(the "seconds" of its replies) is printed beside them. The load average
before each run is printed too: the machine is shared.
Uploads are documents of the corpus under new ids (each finds its original,
so every check reads and verifies at least one stored set) and, for a
second figure, new documents of the same vocabulary that match nothing.
The add phase appends to the index in --workdir (ids unique per run).
"""

import argparse
import json
import statistics
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


def segments_written(port, token):
    metrics = subprocess.run(["curl", "-s", "--noproxy", "*", "-H", f"Authorization: Bearer {token}",
                              f"http://127.0.0.1:{port}/metrics"], capture_output=True,
                             text=True).stdout
    found = re.search(r"^kindred_segments_written_total (\d+)", metrics, re.M)
    return int(found.group(1)) if found else 0


def run_phase(args, label, measure, pid=None):
    """Runs `measure` args.runs times; prints each run and the medians."""
    results = []
    for _ in range(args.runs):
        load_average = open("/proc/loadavg").read().split()[0]
        cpu = cpu_seconds(pid) if pid else 0
        result = measure()
        if pid:
            result["cpu_ms"] = (cpu_seconds(pid) - cpu) / max(1, result["requests"]) * 1e3
        result["load"] = float(load_average)
        results.append(result)
        extra = f", service CPU {result['cpu_ms']:.3f} ms per request" if pid else ""
        note = f", {result['note']}" if "note" in result else ""
        print(f"  {label}: {result['per_second']:.0f}/s, median {result['median_ms']:.3f} ms, "
              f"99th percentile {result['p99_ms']:.3f} ms (inside the service: median "
              f"{result['service_median_ms']:.3f} ms, 99th percentile {result['service_p99_ms']:.3f} ms; "
              f"{result['requests']} requests, "
              f"{result['errors']} errors{extra}{note}; load average {load_average})", flush=True)
    if args.runs > 1:
        def mid(key):
            return statistics.median(r[key] for r in results)
        print(f"  {label}, median of {args.runs} runs: {mid('per_second'):.0f}/s, median "
              f"{mid('median_ms'):.3f} ms, 99th percentile {mid('p99_ms'):.3f} ms "
              f"(load average {mid('load'):.1f})", flush=True)


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--kindred", default=str(ROOT / "build/kindred"))
    parser.add_argument("--load-tool", default=str(ROOT / "build/tools/kindred_serve_load"))
    parser.add_argument("--workdir", default="/tmp/kindred-bench")
    parser.add_argument("--docs", type=int, default=1000000)
    parser.add_argument("--seconds", type=float, default=10)
    parser.add_argument("--single", type=int, default=2000, help="checks of the one-client run")
    parser.add_argument("--runs", type=int, default=3, help="runs of each phase (medians quoted)")
    parser.add_argument("--phases", default="check,mixed,add",
                        help="comma-separated: check, mixed (checks while adds run), add")
    parser.add_argument("--mixed-adders", type=int, default=4,
                        help="clients adding during the mixed phase")
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
          f"service ready in {time.monotonic() - start:.1f} s; {args.runs} runs of each phase, medians last")
    try:
        for label, body_file in [("uploads that copy an indexed document", copies),
                                 ("uploads that match nothing", originals)]:
            if "check" not in args.phases:
                break
            print(f"check, {label}:")
            run_phase(args, "1 client", lambda: load(args.load_tool, port, token, "/v1/check", 1,
                                                     600, args.single, body_file),
                      server.pid)
            run_phase(args, "16 clients", lambda: load(args.load_tool, port, token, "/v1/check", 16,
                                                       args.seconds, 0, body_file), server.pid)
        if "mixed" in args.phases:
            print(f"check while {args.mixed_adders} clients add (one document each), uploads that "
                  f"copy an indexed document:")
            for clients in (1, 16):
                def mixed(clients=clients):
                    adders = subprocess.Popen(
                        [str(args.load_tool), str(port), token, "/v1/add", str(args.mixed_adders),
                         str(args.seconds + 2), "0", str(adds)],
                        stdout=subprocess.PIPE, text=True)
                    time.sleep(1)
                    result = load(args.load_tool, port, token, "/v1/check", clients,
                                  args.seconds, 0, copies)
                    added = json.loads(adders.communicate()[0])
                    result["note"] = f"adds meanwhile {added['per_second']:.0f}/s"
                    return result
                run_phase(args, f"{clients} client{'s' if clients > 1 else ''}", mixed)
        if "add" in args.phases:
            print("add, 16 clients, one document each (acknowledged documents/s):")
            before = segments_written(port, token)
            run_phase(args, "16 clients", lambda: load(args.load_tool, port, token, "/v1/add", 16,
                                                       args.seconds, 0, adds), server.pid)
            print(f"  segments written by group commit: {segments_written(port, token) - before}")
    finally:
        server.terminate()
        server.wait()


if __name__ == "__main__":
    main()
