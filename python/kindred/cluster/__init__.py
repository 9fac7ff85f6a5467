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
from dataclasses import dataclass, field
from typing import List, Optional, Sequence

from .. import Settings, _kindred, errors
from . import stages

__all__ = ["sweep", "StageSummary", "ClusterSummary"]


@dataclass
class StageSummary:
    """One stage: its tasks, its wall time, and the bytes its tasks handed
    on to the next stages (moved between workers unless the scheduler ran
    the consumer where the bytes were)."""
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


def _first_error(futures):
    """Waits for `futures`; raises the exception of the first (in order)
    that failed, as a local sweep reports the first bad shard."""
    from distributed import wait
    wait(futures)
    for future in futures:
        if future.status == "error":
            raise future.exception()


def _stage(summary, name, client, futures, sizes_of):
    """Waits for a stage, and records its tasks and time; the bytes of
    `sizes_of` (its outputs) are counted on the workers and gathered at the
    end (_sizes), so that the stage does not wait for them."""
    start = summary._clock
    _first_error(futures)
    now = time.monotonic()
    summary.stages.append(StageSummary(name, len(futures), now - start, 0))
    summary._sizes.append([client.submit(stages.size, f, pure=False) for f in sizes_of])
    summary._clock = now


def _sizes(summary, client):
    """Fills in the bytes of every stage, and the pair counts."""
    sizes, counts = client.gather([summary._sizes, summary._counts])
    for stage, stage_sizes in zip(summary.stages, sizes):
        stage.bytes_out = sum(stage_sizes)
    summary.candidate_pairs, summary.confirmed_pairs = (sum(c) for c in counts)


def _components(summary, client, scored, parts):
    """The connected components of the confirmed pairs (components.py:
    large-star / small-star rounds, a task per node partition and step) ->
    a future of the star edges (member, smallest member), one bytes."""
    submit = client.submit
    firsts = [submit(stages.first_edges, f, parts) for f in scored]
    lists = [[submit(stages.pick, f, p) for p in range(parts)] for f in firsts]
    tasks, moved, steps = len(firsts), list(firsts), 0
    while True:
        large = [submit(stages.large_star, [row[p] for row in lists], parts) for p in range(parts)]
        to_small = [[submit(stages.pick, submit(stages.pick, f, 0), p) for p in range(parts)]
                    for f in large]
        small = [submit(stages.small_star, [row[p] for row in to_small], parts)
                 for p in range(parts)]
        lists = [[submit(stages.pick, submit(stages.pick, f, 0), p) for p in range(parts)]
                 for f in small]
        star_parts = [submit(stages.pick, f, 1) for f in small]
        flags = client.gather([submit(stages.pick, f, 1) for f in large] +
                              [submit(stages.pick, f, 2) for f in small])
        tasks += 2 * parts
        steps += 2
        moved += large + small
        if not any(flags):
            break
    stars = submit(stages.join, star_parts)
    _first_error([stars])
    now = time.monotonic()
    summary.stages.append(StageSummary("groups", tasks, now - summary._clock, 0))
    summary._sizes.append([submit(stages.size, f, pure=False) for f in moved])
    summary.component_steps = steps
    summary._clock = now
    return stars


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
    summary._clock = time.monotonic()
    summary._sizes, summary._counts = [], []
    submit = client.submit

    signed = [submit(stages.sign_shard, path, settings, options, bands, rows, partitions)
              for path in shards]
    tables = [submit(stages.pick, f, 0) for f in signed]
    keys = [[submit(stages.pick, submit(stages.pick, f, 1), p) for p in range(partitions)]
            for f in signed]
    _first_error(signed)
    counts = client.gather([submit(stages.document_count, t) for t in tables])
    offsets = [sum(counts[:n]) for n in range(len(counts) + 1)]
    documents = offsets[-1]
    summary.documents = documents
    _stage(summary, "sign", client, signed, signed)

    found = [submit(stages.candidates, [keys[s][p] for s in range(len(shards))], offsets,
                    documents, ranges, max_bucket)
             for p in range(partitions)]
    routed = [[submit(stages.pick, f, v) for v in range(ranges)] for f in found]
    _stage(summary, "candidates", client, found, found)

    plans = [submit(stages.plan, [routed[p][v] for p in range(partitions)], offsets)
             for v in range(ranges)]
    pairs = [submit(stages.pick, f, 0) for f in plans]
    wanted = [[submit(stages.pick, submit(stages.pick, f, 1), s) for s in range(len(shards))]
              for f in plans]
    _stage(summary, "plan", client, plans, plans)
    summary._counts = [[submit(stages.candidate_count, f) for f in pairs]]

    extracted = [submit(stages.read_sets, shards[s], settings, options, tables[s],
                        [wanted[v][s] for v in range(ranges)], offsets[s])
                 for s in range(len(shards))]
    sets = [[submit(stages.pick, f, v) for v in range(ranges)] for f in extracted]
    _stage(summary, "sets", client, extracted, extracted)

    scored = [submit(stages.verify, pairs[v], [sets[s][v] for s in range(len(shards))],
                     threshold, bands, rows) for v in range(ranges)]
    _stage(summary, "verify", client, scored, scored)
    summary._counts.append([submit(stages.scored_count, f) for f in scored])

    stars = None
    if grouping == "components":
        stars = _components(summary, client, scored, partitions)
    done = submit(stages.finish, tables, shards, scored, stars, keep, grouping, format,
                  os.fspath(output_dir))
    _stage(summary, "finish", client, [done], [done] if write_kept else [])
    if write_kept:
        kept = [submit(stages.write_kept, shards[s], options, submit(stages.pick, done, s),
                       counts[s], os.fspath(write_kept)) for s in range(len(shards))]
        _first_error(kept)
        summary.kept = sum(client.gather(kept))
        summary.stages.append(StageSummary("kept", len(kept), time.monotonic() - summary._clock,
                                           0))
        summary._sizes.append([])
    _sizes(summary, client)
    return summary
