"""kindred.cluster: the sweep on a Dask distributed cluster.

The stages of a local sweep, as tasks over the shards of a corpus; the files
written are byte-identical to those of ``kindred sweep -o OUT`` over the same
shards in the same order, for any number of workers and partitions:

  sign       a task per shard: SignShard, lean (band keys only, as a local
             sweep signs; documents numbered by shard, then position, as a
             local sweep numbers them): its document table and its band-key
             table cut into P partitions by key hash
  candidates a task per partition: that partition's band keys from every
             shard -> FindPartitionCandidates (the crowded-bucket cap
             applied exactly as locally), cut into V ranges of first
             documents
  plan       a task per range: MergeCandidatePairs, and the documents each
             shard must send
  sets       a task per shard: ReadShardSets, reading the shard again and
             parsing only the wanted documents, each checked against the
             shard's document table (a shard that changed is an error)
  verify     a task per range: VerifyCandidates on the sets
  groups     connected components of the confirmed pairs, in large-star /
             small-star rounds over edge lists partitioned by node
             (components.py), a task per partition and step
  finish     one task: GroupDocuments on the components' stars, keep
             decisions, the three record files written by the worker
  kept       with write_kept, a task per shard: its kept documents, in its
             own format, into a file of the shard's name

The graph is submitted at once (then a round of the groups stage at a
time, as each depends on whether the one before changed anything): no
stage waits for the one before to end before its tasks are submitted.

The tasks exchange the library's records (src/core/RECORDS.md) as bytes;
RECORDS.md beside this file says which go where. Every task is a pure
function of its inputs, so a task re-run after a worker is lost gives the
same bytes.

    >>> from distributed import Client, LocalCluster
    >>> import kindred.cluster
    >>> with LocalCluster(n_workers=2, threads_per_worker=1) as c, Client(c) as client:
    ...     summary = kindred.cluster.sweep(client, ["a.jsonl", "b.jsonl"], "out")
"""

from __future__ import annotations

import os
import time
import uuid
from dataclasses import dataclass, field
from typing import List, Optional, Sequence

from .. import Settings, _kindred, errors
from . import stages

__all__ = ["sweep", "StageSummary", "ClusterSummary"]


@dataclass
class StageSummary:
    """One stage: its tasks, its wall time (from the end of the stage
    before, or the start, to the end of its own last task: the stages
    overlap, as the graph is submitted at once), and the bytes its tasks
    handed on to the next stages (moved between workers unless the
    scheduler ran the consumer where the bytes were)."""
    name: str
    tasks: int
    seconds: float
    bytes_out: int


@dataclass
class ClusterSummary:
    documents: int
    shards: int
    partitions: int
    ranges: int
    bands: int
    rows: int
    candidate_pairs: int
    confirmed_pairs: int
    kept: Optional[int] = None  # documents written by write_kept
    component_steps: int = 0    # large-star and small-star steps of the groups stage
    stages: List[StageSummary] = field(default_factory=list)

    @property
    def bytes_moved(self) -> int:
        """Bytes handed between tasks."""
        return sum(s.bytes_out for s in self.stages)

    def text(self) -> str:
        """The summary as the command prints it on stderr."""
        per_doc = self.bytes_moved / max(self.documents, 1)
        lines = [f"kindred.cluster sweep: {self.documents} documents in {self.shards} shards; "
                 f"{self.bands} bands x {self.rows} rows; {self.partitions} key partitions, "
                 f"{self.ranges} verify ranges; {self.candidate_pairs} candidate pairs, "
                 f"{self.confirmed_pairs} confirmed",
                 f"{'stage':<11}{'tasks':>6}{'seconds':>9}{'bytes out':>12}{'per doc':>9}"]
        for s in self.stages:
            lines.append(f"{s.name:<11}{s.tasks:>6}{s.seconds:>9.2f}{s.bytes_out:>12}"
                         f"{s.bytes_out / max(self.documents, 1):>9.1f}")
        lines.append(f"{'total':<11}{sum(s.tasks for s in self.stages):>6}"
                     f"{sum(s.seconds for s in self.stages):>9.2f}{self.bytes_moved:>12}"
                     f"{per_doc:>9.1f}")
        return "\n".join(lines)


def _raise_first(stages_in_order):
    """Waits for the stages' futures in order and raises the exception of
    the first task (stage by stage, in order within a stage) that failed,
    as a local sweep reports the first bad shard; returns if none did."""
    from distributed import wait
    for futures in stages_in_order:
        wait(futures)
        for future in futures:
            if future.status == "error":
                raise future.exception()


class _Clock:
    """When each stage's last task finished, from the futures' done
    callbacks (the whole graph is submitted at once: no stage waits for the
    one before it to finish before its tasks are submitted)."""

    def __init__(self):
        self.start = time.monotonic()
        self.ends = {}

    def watch(self, name, futures):
        def done(_future, name=name):
            now = time.monotonic()
            self.ends[name] = max(self.ends.get(name, 0.0), now)
        for future in futures:
            future.add_done_callback(done)

    def last(self, name):
        """`name` finished now (its done callbacks may be late)."""
        self.ends[name] = time.monotonic()

    def seconds(self, names):
        """Each stage's wall time: from the end of the stage before (the
        start, for the first) to the end of its own last task."""
        out, before = [], self.start
        for name in names:
            end = max(self.ends.get(name, before), before)
            out.append(end - before)
            before = end
        return out


def _bytes_of(client, leaves):
    """The bytes of each list of futures of `leaves` (each holding one bytes
    object), from the sizes the workers reported to the scheduler (for
    bytes, their length); measured by a task where the scheduler has none."""
    keys = [f.key for stage in leaves for f in stage]

    def nbytes(keys, dask_scheduler=None):
        tasks = dask_scheduler.tasks
        return [tasks[k].nbytes if k in tasks else -1 for k in keys]

    try:
        sizes = iter(client.run_on_scheduler(nbytes, keys))
    except Exception:  # a scheduler that runs no code of clients: measure them all
        sizes = iter([-1] * len(keys))
    out = []
    for stage in leaves:
        got = [next(sizes) for _ in stage]
        missing = [f for f, n in zip(stage, got) if n < 0]
        if missing:
            got = [n for n in got if n >= 0] + client.gather(
                [client.submit(stages.size, f, pure=False) for f in missing])
        out.append(sum(got))
    return out


class _Graph:
    """Tasks to submit together: one call for a whole graph, not a call per
    task (each submission costs the client and the scheduler more than a
    small task's work). A task's arguments name the tasks of the same graph
    by key, and those of graphs submitted before by their futures."""

    def __init__(self, tag: str):
        self.tag, self.tasks = tag, {}

    def add(self, name: str, function, *args) -> str:
        key = f"kindred-{name}-{self.tag}-{len(self.tasks)}"
        self.tasks[key] = (function, *args)
        return key

    def pick(self, key, index: int) -> str:
        return self.add("pick", stages.pick, key, index)

    def submit(self, client) -> dict:
        """Submits the tasks: key -> future."""
        keys = list(self.tasks)
        return dict(zip(keys, client.get(self.tasks, keys, sync=False)))


def _components(client, scored, parts, watch, tag):
    """The connected components of the confirmed pairs (components.py:
    large-star / small-star rounds, a task per node partition and step; a
    graph a step, as each round depends on whether the one before changed
    anything) -> (a future of the star edges (member, smallest member), one
    bytes; the tasks; the futures of the edge lists handed on; the steps)."""
    graph = _Graph(f"{tag}-edges")
    firsts = [graph.add("first-edges", stages.first_edges, f, parts) for f in scored]
    lists = [[graph.pick(f, p) for p in range(parts)] for f in firsts]
    futures = graph.submit(client)
    lists = [[futures[k] for k in row] for row in lists]
    tasks, moved, steps = len(firsts), [x for row in lists for x in row], 0
    while True:
        graph = _Graph(f"{tag}-round-{steps // 2}")
        large = [graph.add("large-star", stages.large_star, [row[p] for row in lists], parts)
                 for p in range(parts)]
        to_small = [[graph.pick(f, p) for p in range(parts)] for f in large]
        small = [graph.add("small-star", stages.small_star, [row[p] for row in to_small], parts)
                 for p in range(parts)]
        lists = [[graph.pick(f, p) for p in range(parts)] for f in small]
        star_parts = [graph.pick(f, parts) for f in small]
        flags = [graph.pick(f, parts) for f in large] + [graph.pick(f, parts + 1) for f in small]
        futures = graph.submit(client)
        watch([futures[k] for k in large + small])
        flags = client.gather([futures[k] for k in flags])
        lists = [[futures[k] for k in row] for row in lists]
        tasks += 2 * parts
        steps += 2
        moved += [futures[k] for row in to_small for k in row] + [x for row in lists for x in row]
        if not any(flags):
            break
    graph = _Graph(f"{tag}-stars")
    stars = graph.add("stars", stages.join, [futures[k] for k in star_parts])
    stars = graph.submit(client)[stars]
    watch([stars])
    return stars, tasks, moved + [futures[k] for k in star_parts], steps


def _map_graph(client, tag, shards, settings, options, threshold, bands, rows, partitions,
               ranges, max_bucket):
    """The whole graph up to the components, submitted at once: the
    scheduler runs each task as soon as its inputs are there (a pick runs
    where its tuple is). -> (key -> future; the keys of the tasks of sign,
    candidates, plan, sets and verify; the keys of the bytes each stage
    hands on; the keys of the document tables, of the document counts, of
    the candidate then confirmed pair counts, of the scored pairs)."""
    n = len(shards)
    graph = _Graph(tag)
    add, pick = graph.add, graph.pick
    signed = [add("sign", stages.sign_shard, path, settings, options, bands, rows, partitions)
              for path in shards]
    tables = [pick(f, 0) for f in signed]
    keys = [[pick(f, 1 + p) for p in range(partitions)] for f in signed]
    counts = [add("count", stages.document_count, t) for t in tables]
    found = [add("candidates", stages.candidates, [keys[s][p] for s in range(n)], counts,
                 ranges, max_bucket) for p in range(partitions)]
    routed = [[pick(f, v) for v in range(ranges)] for f in found]
    plans = [add("plan", stages.plan, [routed[p][v] for p in range(partitions)], counts)
             for v in range(ranges)]
    pairs = [pick(f, 0) for f in plans]
    wanted = [[pick(f, 1 + s) for s in range(n)] for f in plans]
    extracted = [add("sets", stages.read_sets, shards[s], settings, options, tables[s],
                     [wanted[v][s] for v in range(ranges)], counts[:s]) for s in range(n)]
    sets = [[pick(f, v) for v in range(ranges)] for f in extracted]
    scored = [add("verify", stages.verify, pairs[v], [sets[s][v] for s in range(n)], threshold,
                  bands, rows) for v in range(ranges)]
    pair_counts = [add("count", stages.candidate_count, f) for f in pairs] + \
        [add("count", stages.scored_count, f) for f in scored]
    futures = graph.submit(client)
    stages_keys = [signed, found, plans, extracted, scored]
    leaves = [tables + [k for row in keys for k in row], [r for row in routed for r in row],
              pairs + [w for row in wanted for w in row], [x for row in sets for x in row],
              scored]
    return futures, stages_keys, leaves, tables, counts, pair_counts, scored


def sweep(client, shards: Sequence[str], output_dir: str, *,
          settings: Optional[Settings] = None, threshold: float = 0.8, bands: int = 0,
          rows: int = 0, keep: str = "first", grouping: str = "components",
          max_bucket: int = 5000, format: str = "jsonl", input_format: str = "auto",
          id_field: str = "id", text_field: str = "text", priority_field: str = "",
          partitions: int = 0, ranges: int = 0,
          write_kept: Optional[str] = None) -> ClusterSummary:
    """Sweeps `shards` (paths every worker can read) on the cluster of
    `client` (a distributed.Client) and writes pairs, groups and decisions
    files into `output_dir` (a directory the workers can write). Options as
    kindred.sweep; partitions and ranges (0: two per worker) split the
    candidate and verify stages. With write_kept, a directory: each shard's
    kept documents go into a file of the shard's name there, in its own
    format (JSON Lines or WARC shards), so that the files in shard order
    hold what `kindred sweep --write-kept FILE` writes. Raises
    kindred.errors classes."""
    settings = settings or Settings()
    if not shards:
        raise errors.InvalidRequestError("give at least one shard")
    if keep == "priority" and not priority_field:
        raise errors.InvalidRequestError("keep='priority' needs priority_field")
    if not 0 < threshold <= 1:
        raise errors.InvalidRequestError("threshold must be in (0, 1]")
    if (bands == 0) != (rows == 0):
        raise errors.InvalidRequestError("give bands and rows together")
    if bands == 0:
        bands, rows = _kindred.choose_banding(threshold, settings.perms)
    if bands * rows > settings.perms:
        raise errors.InvalidRequestError(
            f"bands x rows ({bands} x {rows}) is more than perms ({settings.perms})")
    if max_bucket < 2:
        raise errors.InvalidRequestError("max_bucket must be at least 2")
    names = [os.path.basename(os.fspath(s)) for s in shards]
    if write_kept and len(set(names)) != len(names):
        raise errors.InvalidRequestError(
            "write_kept: shards with the same file name would write the same kept file")
    workers = max(1, len(client.scheduler_info().get("workers", {})))
    partitions = partitions or 2 * workers
    ranges = ranges or 2 * workers
    shards = [os.fspath(s) for s in shards]
    options = dict(input_format=input_format, id_field=id_field, text_field=text_field,
                   priority_field=priority_field)
    summary = ClusterSummary(0, len(shards), partitions, ranges, bands, rows, 0, 0)
    clock = _Clock()
    n = len(shards)
    tag = uuid.uuid4().hex

    futures, stage_keys, leaf_keys, tables, counts, pair_counts, scored = _map_graph(
        client, tag, shards, settings, options, threshold, bands, rows, partitions, ranges,
        max_bucket)

    def of(names):
        return [futures[k] for k in names]

    stage_futures = [of(k) for k in stage_keys]
    names = ["sign", "candidates", "plan", "sets", "verify"]
    for name, stage in zip(names, stage_futures):
        clock.watch(name, stage)
    task_counts = [len(f) for f in stage_futures]
    leaves = [of(k) for k in leaf_keys]
    try:
        stars = None
        if grouping == "components":
            stars, tasks, moved, summary.component_steps = _components(
                client, of(scored), partitions, lambda fs: clock.watch("groups", fs), tag)
            names.append("groups")
            task_counts.append(tasks)
            leaves.append(moved)
        graph = _Graph(f"{tag}-finish")
        done = graph.add("finish", stages.finish, of(tables), shards, of(scored), stars, keep,
                         grouping, format, os.fspath(output_dir))
        drops = [graph.pick(done, s) for s in range(n)] if write_kept else []
        kept = [graph.add("kept", stages.write_kept, shards[s], options, drops[s],
                          futures[counts[s]], os.fspath(write_kept))
                for s in range(n)] if write_kept else []
        last = graph.submit(client)
        done, drops, kept = last[done], [last[k] for k in drops], [last[k] for k in kept]
        clock.watch("finish", [done])
        names.append("finish")
        task_counts.append(1)
        leaves.append(drops)
        if write_kept:
            clock.watch("kept", kept)
            names.append("kept")
            task_counts.append(n)
            leaves.append([])
        documents, kept_counts, pair_counts = client.gather([of(counts), kept, of(pair_counts)])
        _raise_first([[done]])
        clock.last(names[-1])
    except Exception:
        _raise_first(stage_futures)
        raise
    summary.documents = sum(documents)
    if write_kept:
        summary.kept = sum(kept_counts)
    for name, tasks, seconds, size in zip(names, task_counts, clock.seconds(names),
                                          _bytes_of(client, leaves)):
        summary.stages.append(StageSummary(name, tasks, seconds, size))
    summary.candidate_pairs = sum(pair_counts[:ranges])
    summary.confirmed_pairs = sum(pair_counts[ranges:])
    return summary
