"""The task functions of the cluster sweep: thin, pure wrappers of the
extension's stage functions, which call the library's (bytes in, bytes out;
see RECORDS.md). Workers import them by name, so they live in a module of
their own."""

from __future__ import annotations

import struct
from typing import List, Optional, Sequence, Tuple

from .. import _kindred
from . import components


def sign_shard(path: str, settings, options: dict, bands: int, rows: int,
               partitions: int) -> Tuple[bytes, ...]:
    """(its document table, then its band keys' P partitions), one flat
    tuple, so that each element is one pick away."""
    _test_hook("sign", path)
    table, keys = _kindred.stage_sign_shard(path, settings, options["input_format"],
                                            options["id_field"], options["text_field"],
                                            options["priority_field"], bands, rows, partitions, 1)
    return (table, *keys)


def pick(value, index: int):
    """One element of a task's tuple or list (runs where the value is)."""
    return value[index]


def document_count(table: bytes) -> int:
    """The rows of a document table record (src/core/RECORDS.md: the u64
    count after the 24-byte frame header and the u32 first document)."""
    return struct.unpack_from("<Q", table, 28)[0]


def offsets_of(counts: Sequence[int]) -> List[int]:
    """The number of each shard's first document, and then the corpus's
    documents, from the shards' document counts."""
    offsets = [0]
    for count in counts:
        offsets.append(offsets[-1] + count)
    return offsets


def candidates(parts: Sequence[bytes], counts: Sequence[int], ranges: int,
               max_bucket: int) -> List[bytes]:
    _test_hook("candidates", None)
    offsets = offsets_of(counts)
    return _kindred.stage_candidates(list(parts), offsets, offsets[-1], ranges, max_bucket)


def plan(parts: Sequence[bytes], counts: Sequence[int]) -> Tuple[bytes, ...]:
    """(the range's pairs, then each shard's document list), one flat tuple."""
    pairs, wanted = _kindred.stage_plan(list(parts), offsets_of(counts))
    return (pairs, *wanted)


def candidate_count(pairs: bytes) -> int:
    """The pairs of a candidate-pairs record (its u64 count, after four
    u64 counts)."""
    return struct.unpack_from("<Q", pairs, 24 + 32)[0]


def read_sets(path: str, settings, options: dict, table: bytes, wanted: Sequence[bytes],
              offset) -> List[bytes]:
    """`offset`: the number of the shard's first document, or the document
    counts of the shards before it."""
    if not isinstance(offset, int):
        offset = sum(offset)
    return _kindred.stage_read_sets(path, settings, options["input_format"], options["id_field"],
                                    options["text_field"], options["priority_field"], table,
                                    list(wanted), offset)


def verify(pairs: bytes, sets: Sequence[bytes], threshold: float, bands: int,
           rows: int) -> bytes:
    return _kindred.stage_verify(pairs, list(sets), threshold, bands, rows)


def scored_count(scored: bytes) -> int:
    return struct.unpack_from("<Q", scored, 24)[0]


def first_edges(scored: bytes, parts: int) -> List[bytes]:
    return components.first_edges(_kindred.stage_pair_ends(scored), parts)


def large_star(lists: Sequence[bytes], parts: int) -> tuple:
    """(the P edge lists, then whether it changed anything), flat."""
    out, changed = components.large_star(list(lists), parts)
    return (*out, changed)


def small_star(lists: Sequence[bytes], parts: int) -> tuple:
    """(the P edge lists, the star edges, whether it changed anything), flat."""
    out, star, changed = components.small_star(list(lists), parts)
    return (*out, star, changed)


def join(parts: Sequence[bytes]) -> bytes:
    return b"".join(parts)


def finish(tables: Sequence[bytes], shards: List[str], scored: Sequence[bytes],
           stars: Optional[bytes], keep: str, grouping: str, format: str,
           output_dir: str) -> List[bytes]:
    """Groups, then writes pairs, groups and decisions into output_dir, each
    file whole or not at all (on the worker: the records never pass through
    the client). Returns each shard's drops (u32 local numbers)."""
    import os
    from .. import _write_whole
    pairs, groups, decisions, drops = _kindred.stage_finish(list(tables), shards, list(scored),
                                                            stars, keep, grouping, format)
    os.makedirs(output_dir, exist_ok=True)
    for kind, data in (("pairs", pairs), ("groups", groups), ("decisions", decisions)):
        _write_whole(os.path.join(output_dir, f"{kind}.{format}"), data)
    return drops


def write_kept(path: str, options: dict, dropped: bytes, documents: int, kept_dir: str) -> int:
    """Writes a shard's kept documents into kept_dir under the shard's own
    file name, in its own format (JSON Lines lines or WARC records)."""
    import os
    os.makedirs(kept_dir, exist_ok=True)
    return _kindred.stage_write_kept(path, options["input_format"], options["id_field"],
                                     options["text_field"], options["priority_field"], dropped,
                                     documents, os.path.join(kept_dir, os.path.basename(path)))


def size(value) -> int:
    """Bytes of a stage's output (bytes, or a list or tuple of them)."""
    if isinstance(value, (bytes, bytearray)):
        return len(value)
    if isinstance(value, bool):
        return 0
    return sum(size(v) for v in value)


def _test_hook(stage: str, path) -> None:
    """For the fault tests only: with KINDRED_CLUSTER_TEST_PAUSE set to a
    directory, a task of `stage` announces itself by creating a file there
    and waits until that file is removed (so a test can kill its worker
    while it is known to be inside the stage). Unset: nothing."""
    import os
    where = os.environ.get("KINDRED_CLUSTER_TEST_PAUSE")
    if not where or not os.path.isdir(where) or \
            not os.path.exists(os.path.join(where, f"pause-{stage}")):
        return
    import time
    mark = os.path.join(where, f"in-{stage}-{os.getpid()}")
    open(mark, "w").close()
    while os.path.exists(mark):
        time.sleep(0.02)


class _QuietUserErrors:
    """A logging filter for the worker's log: drops its "Compute Failed"
    report of a task that raised one of kindred's errors (bad input, a
    changed shard...), which the sweep reports to its caller anyway, with
    the program's message and exit code. Other failures are still logged."""

    def filter(self, record) -> bool:
        if not str(record.msg).startswith("Compute Failed"):
            return True
        text = str(record.args[-1]) if record.args else ""
        return not any(text.startswith(name + "(") for name in _USER_ERRORS)


def _install_filter() -> None:
    import logging
    from .. import errors
    global _USER_ERRORS
    _USER_ERRORS = [name for name, value in vars(errors).items()
                    if isinstance(value, type) and issubclass(value, errors.KindredError)
                    and name != "InternalError"]
    logging.getLogger("distributed.worker").addFilter(_QuietUserErrors())


_USER_ERRORS: List[str] = []
_install_filter()
