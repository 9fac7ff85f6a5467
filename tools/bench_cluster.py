#!/usr/bin/python3
"""Benchmark of the cluster sweep (python3 -m kindred.cluster sweep) against
`kindred sweep --threads 2` on the same shards: wall times (median of
--runs), the ratio, whether the output files are identical, and the bytes
handed between tasks per stage (from the cluster sweep's summary). Twice:
the whole command (interpreter, imports, starting a LocalCluster, the sweep,
stopping it), and --runs sweeps on one LocalCluster started once, as a
cluster user runs them (with the times of the imports, of starting the
cluster and of stopping it apart).

    PYTHONPATH=build/python /usr/bin/python3 tools/bench_cluster.py \
        --docs 200000 --shards 20 [--workers 2] [--runs 3] [--keep-dir DIR]

The corpus comes from tools/gen_corpus.py (5% planted near-duplicates by
default), cut into --shards JSON Lines files. Never a timed test: run by hand.
"""

import argparse
import ctypes
import filecmp
import json
import os
import pathlib
import resource
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent


def make_shards(directory, docs, shards, seed):
    corpus = directory / "corpus.jsonl"
    subprocess.run([sys.executable, str(ROOT / "tools" / "gen_corpus.py"), "--docs", str(docs),
                    "--seed", str(seed), "--out", str(corpus)], check=True)
    lines = corpus.read_bytes().splitlines(keepends=True)
    paths = []
    per = (len(lines) + shards - 1) // shards
    for n in range(shards):
        path = directory / f"shard-{n:03d}.jsonl"
        path.write_bytes(b"".join(lines[n * per:(n + 1) * per]))
        paths.append(str(path))
    corpus.unlink()
    return paths


def timed(command, env=None, cpu=None, lingering=None):
    """Runs `command`: (wall seconds until it exits, its stderr); appends to
    `cpu` the CPU seconds (user + system) of it and of the processes it
    started, and to `lingering` the seconds its last descendant outlived
    it."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.monotonic()
    done = subprocess.run(command, capture_output=True, env=env)
    exited = time.monotonic()
    if done.returncode != 0:
        sys.exit(f"{' '.join(command[:4])}...: exit {done.returncode}\n{done.stderr.decode()}")
    _reap()
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if cpu is not None:
        cpu.append(after.ru_utime - before.ru_utime + after.ru_stime - before.ru_stime)
    if lingering is not None:
        lingering.append(time.monotonic() - exited)
    return exited - start, done.stderr.decode()


def _subreaper():
    """Makes this process the reaper of its orphaned descendants (Linux
    PR_SET_CHILD_SUBREAPER), so that the CPU time of the cluster's fork
    server and its workers, which the command does not wait for, is counted
    in RUSAGE_CHILDREN once _reap has waited for them."""
    ctypes.CDLL(None, use_errno=True).prctl(36, 1, 0, 0, 0)


def _reap():
    while True:
        try:
            os.waitpid(-1, 0)
        except ChildProcessError:
            return


def running_cluster(workers, runs, output_dir, shards):
    """In a fresh process: the phases of a cluster sweep, timed apart:
    imports, starting the LocalCluster (as the command starts it), each
    sweep on the running cluster, stopping it; and the CPU seconds of the
    sweeps (client and workers). Prints them as JSON."""
    start = time.monotonic()
    import warnings
    warnings.filterwarnings("ignore", category=DeprecationWarning)
    from distributed import Client
    import kindred.cluster
    from kindred.cluster.__main__ import local_cluster
    imported = time.monotonic()

    def cpu():
        usage = resource.getrusage(resource.RUSAGE_SELF)
        return usage.ru_utime + usage.ru_stime

    with local_cluster(workers) as cluster:
        with Client(cluster) as client:
            client.wait_for_workers(workers)
            started = time.monotonic()
            sweeps, cpus = [], []
            for _ in range(runs):
                before = cpu() + sum(client.run(cpu).values())
                begin = time.monotonic()
                summary = kindred.cluster.sweep(client, shards, output_dir)
                sweeps.append(time.monotonic() - begin)
                cpus.append(cpu() + sum(client.run(cpu).values()) - before)
            swept = time.monotonic()
    stopped = time.monotonic()
    print(json.dumps(dict(imports=imported - start, start=started - imported, sweeps=sweeps,
                          cpu=cpus, stop=stopped - swept, summary=summary.text())))


def main():
    if sys.argv[1:2] == ["--running-cluster"]:
        workers, runs, output_dir, *shards = sys.argv[2:]
        return running_cluster(int(workers), int(runs), output_dir, shards)
    _subreaper()
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--docs", type=int, default=200000)
    parser.add_argument("--shards", type=int, default=20)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--seed", type=int, default=7)
    parser.add_argument("--binary", default=str(ROOT / "build" / "kindred"))
    parser.add_argument("--keep-dir", help="make the shards here and keep them")
    args = parser.parse_args()
    work = pathlib.Path(args.keep_dir or tempfile.mkdtemp(prefix="kindred-cluster-bench-"))
    work.mkdir(parents=True, exist_ok=True)
    shards = sorted(str(p) for p in work.glob("shard-*.jsonl")) or \
        make_shards(work, args.docs, args.shards, args.seed)
    env = dict(os.environ)
    env.setdefault("PYTHONPATH", str(ROOT / "build" / "python"))
    local, cluster, summary = [], [], ""
    local_cpu, cluster_cpu, lingering, loads = [], [], [], [os.getloadavg()[0]]
    for run in range(args.runs):
        seconds, _ = timed([args.binary, "sweep", "--threads", "2", "-q", "-o",
                            str(work / "local"), *shards], cpu=local_cpu)
        local.append(seconds)
        seconds, summary = timed(["/usr/bin/python3", "-m", "kindred.cluster", "sweep",
                                  "--local-workers", str(args.workers), "-o",
                                  str(work / "cluster"), *shards], env, cpu=cluster_cpu,
                                 lingering=lingering)
        cluster.append(seconds)
        loads.append(os.getloadavg()[0])
    done = subprocess.run(["/usr/bin/python3", __file__, "--running-cluster", str(args.workers),
                           str(args.runs), str(work / "running"), *shards],
                          capture_output=True, env=env)
    _reap()
    if done.returncode != 0:
        sys.exit(f"--running-cluster: exit {done.returncode}\n{done.stderr.decode()}")
    phases = json.loads(done.stdout.decode().strip().splitlines()[-1])
    loads.append(os.getloadavg()[0])
    same = all(filecmp.cmp(work / "local" / f"{k}.jsonl", work / out / f"{k}.jsonl",
                           shallow=False) for k in ("pairs", "groups", "decisions")
               for out in ("cluster", "running"))
    print(f"documents {sum(1 for s in shards for _ in open(s, 'rb'))} in {len(shards)} shards; "
          f"{args.workers} workers; medians of {args.runs} runs")
    print(f"load average (1 min) before, after each run, after the running-cluster runs: "
          f"{' '.join(f'{x:.1f}' for x in loads)}")
    print(f"kindred sweep --threads 2   {statistics.median(local):8.2f} s wall "
          f"{statistics.median(local_cpu):8.2f} s CPU")
    print(f"kindred.cluster sweep       {statistics.median(cluster):8.2f} s wall "
          f"{statistics.median(cluster_cpu):8.2f} s CPU "
          f"({statistics.median(cluster) / statistics.median(local):.2f}x wall, "
          f"{statistics.median(cluster_cpu) / statistics.median(local_cpu):.2f}x CPU); "
          f"its workers outlived it by {statistics.median(lingering):.2f} s")
    sweep = statistics.median(phases["sweeps"])
    print(f"on a running cluster        {sweep:8.2f} s wall "
          f"{statistics.median(phases['cpu']):8.2f} s CPU "
          f"({sweep / statistics.median(local):.2f}x wall, "
          f"{statistics.median(phases['cpu']) / statistics.median(local_cpu):.2f}x CPU); "
          f"each: {' '.join(f'{x:.2f}' for x in phases['sweeps'])}")
    print(f"  imports {phases['imports']:.2f} s, starting the cluster {phases['start']:.2f} s, "
          f"stopping it {phases['stop']:.2f} s")
    print(f"outputs identical: {'yes' if same else 'NO'}")
    print(summary.rstrip())
    print("on the running cluster, the last sweep:")
    print(phases["summary"])
    return 0 if same else 1


if __name__ == "__main__":
    sys.exit(main())
