"""The task functions of the cluster sweep: thin, pure wrappers of the
extension's stage functions (bytes in, bytes out; see RECORDS.md). Workers
import them by name, so they live in a module of their own."""

from __future__ import annotations

import struct
from typing import List, Sequence, Tuple

from .. import _kindred


def sign_shard(path: str, settings, options: dict, bands: int, rows: int,
               partitions: int) -> Tuple[bytes, List[bytes], bytes]:
    return _kindred.stage_sign_shard(path, settings, options["input_format"],
                                     options["id_field"], options["text_field"],
                                     options["priority_field"], bands, rows, partitions, 1)


def pick(value, index: int):
    """One element of a task's tuple or list (runs where the value is)."""
    return value[index]


def document_count(table: bytes) -> int:
    return struct.unpack_from("<I", table, 0)[0]


def candidates(parts: Sequence[bytes], offsets: List[int], documents: int, perms: int,
               bands: int, rows: int, ranges: int, max_bucket: int) -> List[bytes]:
    return _kindred.stage_candidates(list(parts), offsets, documents, perms, bands, rows, ranges,
                                     max_bucket)


def verify_plan(parts: Sequence[bytes], offsets: List[int]) -> Tuple[bytes, List[bytes]]:
    return _kindred.stage_verify_plan(list(parts), offsets)


def read_sets(path: str, settings, options: dict, bands: int, rows: int, digests: bytes,
              wanted: Sequence[bytes], offset: int) -> List[bytes]:
    return _kindred.stage_read_sets(path, settings, options["input_format"], options["id_field"],
                                    options["text_field"], options["priority_field"], bands, rows,
                                    digests, list(wanted), offset)


def verify(pairs: bytes, sets: Sequence[bytes], settings, threshold: float, bands: int,
           rows: int) -> bytes:
    return _kindred.stage_verify(pairs, list(sets), settings, threshold, bands, rows)


def finish(tables: Sequence[bytes], shards: List[str], scored: Sequence[bytes], keep: str,
           grouping: str, format: str, output_dir: str) -> List[bytes]:
    """Groups, then writes pairs, groups and decisions into output_dir, each
    file whole or not at all (on the worker: the records never pass through
    the client). Returns each shard's drops (u32 local numbers)."""
    import os
    from .. import _write_whole
    pairs, groups, decisions, drops = _kindred.stage_finish(list(tables), shards, list(scored),
                                                            keep, grouping, format)
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
    return sum(size(v) for v in value)
