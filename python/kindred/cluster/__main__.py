"""python3 -m kindred.cluster sweep: the sweep on a Dask distributed cluster.

    python3 -m kindred.cluster sweep -o OUT [--scheduler tcp://HOST:8786 |
        --local-workers N] [kindred sweep's options] SHARDS...

Writes pairs, groups and decisions files into OUT, byte-identical to those of
`kindred sweep -o OUT SHARDS...`. Exit codes are the program's (README,
"Exit codes").
"""

from __future__ import annotations

import argparse
import contextlib
import logging
import os
import sys
import warnings

from .. import Settings, errors


def _parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(prog="python3 -m kindred.cluster",
                                     description="kindred's sweep on a Dask cluster")
    commands = parser.add_subparsers(dest="command", required=True)
    sweep = commands.add_parser("sweep", help="find near-duplicates across shards")
    add = sweep.add_argument
    add("shards", nargs="+", help="shard files, in order (paths every worker can read)")
    add("-o", "--output-dir", required=True,
        help="write pairs, groups and decisions files into this directory")
    where = sweep.add_mutually_exclusive_group()
    where.add_argument("--scheduler", help="address of a running dask scheduler")
    where.add_argument("--local-workers", type=int, default=2,
                       help="without --scheduler: worker processes on this machine (2)")
    add("--partitions", type=int, default=0, help="band-key partitions (two per worker)")
    add("--ranges", type=int, default=0, help="verify ranges (two per worker)")
    add("-t", "--threshold", type=float, default=0.8)
    add("--shingle", default="word", help="word or char")
    add("-k", "--shingle-size", type=int, default=5)
    add("--perms", type=int, default=128)
    add("--signer", default="oph")
    add("--seed", type=lambda s: int(s, 0), default=None)
    add("--bands", type=int, default=0)
    add("--rows", type=int, default=0)
    add("--keep", default="first", help="first, longest or priority")
    add("--grouping", default="components", help="components or keepers")
    add("--max-bucket", type=int, default=5000)
    add("--format", default="jsonl", choices=["jsonl", "tsv", "csv"])
    add("--input-format", default="auto")
    add("--id-field", default="id")
    add("--text-field", default="text")
    add("--priority-field", default="")
    add("--write-kept", metavar="DIR",
        help="JSON Lines or WARC shards: write each shard's kept documents into DIR, "
             "under the shard's file name, in its own format")
    add("-q", "--quiet", action="store_true", help="no summary on stderr")
    return parser


@contextlib.contextmanager
def local_cluster(workers: int):
    """A LocalCluster of `workers` single-threaded worker processes, as the
    command starts one (a context manager: the cluster, stopped at the
    end)."""
    from distributed import LocalCluster
    import dask
    # Dask starts workers with MALLOC_TRIM_THRESHOLD_=65536, which hands
    # freed memory back at once, so that every large record a stage makes
    # is fresh pages to fault in. The sweep's workers keep it for reuse.
    environ = dict(dask.config.get("distributed.nanny.pre-spawn-environ", {}))
    environ["MALLOC_TRIM_THRESHOLD_"] = 1 << 30
    environ["MALLOC_MMAP_THRESHOLD_"] = 1 << 30
    # And, as the kindred program does, malloc asks for transparent huge
    # pages (fewer page faults on the records' fresh memory).
    tunables = os.environ.get("GLIBC_TUNABLES", "")
    if "KINDRED_NO_HUGE_PAGES" not in os.environ and "glibc.malloc.hugetlb" not in tunables:
        environ["GLIBC_TUNABLES"] = ":".join(filter(None, [tunables, "glibc.malloc.hugetlb=1"]))
    # Workers come from a fork server that has imported distributed,
    # NumPy and the task functions once (Dask's default, spawn, starts
    # a fresh interpreter per worker that imports them all again).
    config = {"distributed.nanny.pre-spawn-environ": environ,
              "distributed.worker.multiprocessing-method": "forkserver"}
    with dask.config.set(config):
        from distributed.utils import get_mp_context
        get_mp_context().set_forkserver_preload(["distributed", "numpy",
                                                 "kindred.cluster.stages"])
    with dask.config.set(config), LocalCluster(n_workers=workers, threads_per_worker=1,
                                               processes=True, dashboard_address=None) as cluster:
        yield cluster


def _run(args) -> int:
    from distributed import Client
    from . import sweep

    seed = {} if args.seed is None else {"seed": args.seed}
    settings = Settings(shingle=args.shingle, k=args.shingle_size, perms=args.perms,
                        signer=args.signer, **seed)
    options = dict(settings=settings, threshold=args.threshold, bands=args.bands,
                   rows=args.rows, keep=args.keep, grouping=args.grouping,
                   max_bucket=args.max_bucket, format=args.format,
                   input_format=args.input_format, id_field=args.id_field,
                   text_field=args.text_field, priority_field=args.priority_field,
                   partitions=args.partitions, ranges=args.ranges,
                   write_kept=args.write_kept)
    if args.scheduler:
        with Client(args.scheduler) as client:
            summary = sweep(client, args.shards, args.output_dir, **options)
    else:
        with local_cluster(args.local_workers) as cluster, Client(cluster) as client:
            summary = sweep(client, args.shards, args.output_dir, **options)
    if not args.quiet:
        print(summary.text(), file=sys.stderr)
    return 0


def _quiet_batched_send_timeouts(record) -> bool:
    """A logging filter for asyncio's log: drops its report of a timeout no
    one retrieved (a wait of distributed's batched sender on its timer,
    left when the client closes, seen on a loaded machine), which is not
    the sweep's and would follow the program's one line on stderr."""
    text = record.getMessage()
    return not (text.startswith("Future exception was never retrieved") and
                "exception=TimeoutError('Timeout')" in text)


def main(argv=None) -> int:
    args = _parser().parse_args(argv)
    # Debian's tornado warns on every event loop distributed makes: noise.
    warnings.filterwarnings("ignore", category=DeprecationWarning)
    logging.getLogger("asyncio").addFilter(_quiet_batched_send_timeouts)
    try:
        return _run(args)
    except errors.KindredError as error:
        prefix = "kindred.cluster: sweep: " if error.exit_code == 2 else "kindred: "
        print(f"{prefix}{error}", file=sys.stderr)
        return error.exit_code
    except (OSError, TimeoutError) as error:  # a scheduler that cannot be reached, ...
        print(f"kindred.cluster: {type(error).__name__}: {error}", file=sys.stderr)
        return errors.InternalError.exit_code


if __name__ == "__main__":
    sys.exit(main())
