"""kindred: find near-duplicate text documents (shingles, MinHash, LSH,
exact Jaccard verification, groups, an index file), from Python.

    >>> import kindred
    >>> a = kindred.shingles("the harbour lights were lit at dusk again")
    >>> kindred.jaccard(a, a)
    1.0
    >>> result = kindred.sweep([("a", "one two three four five six"),
    ...                         ("b", "one two three four five six")])
    >>> [(p.a, p.b, p.jaccard) for p in result.pairs]
    [('a', 'b', 1.0)]

Texts are str or UTF-8 bytes (invalid bytes count as U+FFFD). Heavy calls
release the GIL. Errors are kindred.errors classes (KindredError and one
subclass per kind), with the message the command-line program prints.
"""

from __future__ import annotations

import os
from typing import Iterable, List, NamedTuple, Optional, Sequence, Tuple, Union

from . import errors
from .errors import *  # noqa: F401,F403  (the exception classes)
from . import _kindred
from ._kindred import Settings, shingles, sign, sign_set, estimate, overlap, jaccard, containment

__all__ = [
    "Settings", "shingles", "sign", "sign_set", "estimate", "overlap", "jaccard",
    "containment", "Index", "Match", "sweep", "SweepResult", "Pair", "Group",
    "Decision", "errors",
] + errors.__all__

Text = Union[str, bytes]
Documents = Iterable[Tuple[Union[str, int], Text]]


class Pair(NamedTuple):
    """A confirmed pair: ids, exact Jaccard, signature estimate, and the
    shared count and sizes of the two shingle sets."""
    a: str
    b: str
    jaccard: float
    estimate: float
    shared: int
    size_a: int
    size_b: int


class Group(NamedTuple):
    """A group of near-duplicates: its keeper and its members (ids, in the
    order read, keeper included)."""
    keeper: str
    members: List[str]

    @property
    def drops(self) -> List[str]:
        return [m for m in self.members if m != self.keeper]


class Decision(NamedTuple):
    """A keep or drop decision, as the decisions records give it."""
    id: str
    decision: str
    group: Optional[int]
    keeper: Optional[str]
    reason: str


class Match(NamedTuple):
    """A confirmed match of a checked or added document: ``other`` is an
    indexed document (``in_index``) or an earlier one of the same batch."""
    id: str
    other: str
    in_index: bool
    jaccard: float
    estimate: float
    shared: int
    size: int
    other_size: int


class SweepResult:
    """The result of kindred.sweep: pairs, groups, decisions and records."""

    def __init__(self, handle: "_kindred.SweepHandle"):
        self._handle = handle
        self.ids: List[str] = handle.ids
        """Document ids in the order read (document numbers index it)."""

    @property
    def pairs(self) -> List[Pair]:
        """Confirmed pairs, ascending by the documents' order."""
        ids = self.ids
        return [Pair(ids[a], ids[b], j, e, s, sa, sb)
                for a, b, j, e, s, sa, sb in self._handle.pairs]

    @property
    def groups(self) -> List[Group]:
        """Groups of two or more documents, ordered by their first member."""
        ids = self.ids
        return [Group(ids[k], [ids[m] for m in members]) for k, members in self._handle.groups]

    @property
    def decisions(self) -> List[Decision]:
        """One decision per grouped (or empty) document, in document order:
        exactly the records of the decisions file, as tuples."""
        import json
        out = []
        for line in self.records("decisions").splitlines():
            record = json.loads(line)
            out.append(Decision(record["id"], record["decision"], record.get("group"),
                                record.get("keeper"), record.get("reason", "")))
        return out

    @property
    def stats(self) -> dict:
        """Counts and timings of the sweep (documents, candidate pairs, ...)."""
        return self._handle.stats

    def records(self, kind: str, format: str = "jsonl") -> str:
        """The records of `kind` ("pairs", "groups" or "decisions") in
        `format` ("jsonl", "tsv", "csv"): the bytes `kindred sweep -o` writes."""
        return self._handle.records(kind, format)

    def write(self, output_dir: Union[str, os.PathLike], format: str = "jsonl") -> None:
        """Writes pairs, groups and decisions files into `output_dir`, as
        `kindred sweep -o output_dir` does."""
        os.makedirs(output_dir, exist_ok=True)
        for kind in ("pairs", "groups", "decisions"):
            _write_whole(os.path.join(output_dir, f"{kind}.{format}"),
                         self.records(kind, format).encode())

    def __repr__(self) -> str:
        return (f"<kindred.SweepResult: {len(self.ids)} documents, "
                f"{len(self._handle.pairs)} pairs, {len(self._handle.groups)} groups>")


def _write_whole(path: str, data: bytes) -> None:
    """Writes a file whole or not at all: a temporary file, synced, renamed."""
    temporary = f"{path}.tmp.{os.getpid()}"
    try:
        with open(temporary, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temporary, path)
    except OSError as error:
        try:
            os.unlink(temporary)
        except OSError:
            pass
        kind = errors.DiskFullError if error.errno in (28, 122) else errors.WriteFailedError
        raise kind(f"{path}: {error.strerror}") from None


def sweep(documents: Union[Sequence[Union[str, os.PathLike]], Documents], *,
          settings: Optional[Settings] = None, threshold: float = 0.8,
          measure: str = "jaccard", bands: int = 0, rows: int = 0,
          min_contained_size: int = 20, keep: str = "first",
          grouping: str = "components", max_bucket: int = 5000,
          exhaustive: bool = False, threads: int = 1, input_format: str = "auto",
          id_field: str = "id", text_field: str = "text",
          priority_field: str = "") -> SweepResult:
    """Finds the near-duplicate pairs and groups of a corpus.

    `documents` is a list of input paths (files, JSON Lines, trees, WARC,
    compressed or not: what `kindred sweep` reads; the input options apply)
    or an iterable of (id, text) pairs. The other arguments are
    `kindred sweep`'s options: bands and rows 0 choose the banding for the
    threshold. Raises a kindred.errors class on bad input or settings.
    """
    options = dict(settings=settings, threshold=threshold, measure=measure, bands=bands,
                   rows=rows, min_contained_size=min_contained_size, keep=keep,
                   grouping=grouping, max_bucket=max_bucket, exhaustive=exhaustive,
                   threads=threads)
    if isinstance(documents, (str, os.PathLike)):
        documents = [documents]
    items = list(documents) if not isinstance(documents, list) else documents
    if items and all(isinstance(item, (str, os.PathLike)) for item in items):
        handle = _kindred.sweep_files([os.fspath(p) for p in items], input_format, id_field,
                                      text_field, priority_field, **options)
    else:
        handle = _kindred.sweep_texts(items, **options)
    return SweepResult(handle)


class Index:
    """An index file (``.kin``): open it, check documents against it, add
    documents to it. Opening verifies the file; an add takes the file's
    writer lock for its duration (IndexBusyError when another writer holds it).
    """

    def __init__(self, path: Union[str, os.PathLike]):
        self._handle = _kindred.IndexHandle(os.fspath(path))

    @classmethod
    def create(cls, path: Union[str, os.PathLike], settings: Optional[Settings] = None, *,
               threshold: float = 0.8, bands: int = 0, rows: int = 0) -> "Index":
        """Creates an empty index (never replaces a file) and opens it."""
        _kindred.create_index(os.fspath(path), settings, threshold, bands, rows)
        return cls(path)

    @property
    def path(self) -> str:
        return self._handle.path

    @property
    def documents(self) -> int:
        """Live documents."""
        return self._handle.documents

    @property
    def settings(self) -> Settings:
        return self._handle.settings

    @property
    def threshold(self) -> float:
        """The stored default threshold."""
        return self._handle.threshold

    @property
    def banding(self) -> Tuple[int, int]:
        """(bands, rows) of the stored band-key tables."""
        return self._handle.banding

    def check(self, documents: Documents, *, threshold: Optional[float] = None,
              measure: Optional[str] = None, bands: int = 0, rows: int = 0,
              threads: int = 1, max_bucket: int = 5000) -> List[Match]:
        """The confirmed matches of (id, text) documents among the indexed
        ones and among themselves, as `kindred check` finds them. Read-only."""
        matches, _ = self._handle.run(documents, None, threshold, measure, bands, rows,
                                      threads, max_bucket)
        return [Match(*m) for m in matches]

    def add(self, documents: Documents, *, on_duplicate: str = "error",
            threshold: Optional[float] = None, measure: Optional[str] = None,
            threads: int = 1, max_bucket: int = 5000) -> Tuple[List[Match], List[Tuple[str, str]]]:
        """Appends (id, text) documents as one durable segment, as
        `kindred add` does. Returns their matches and, per document, its id
        and what was done ("added", "skipped", "replaced"). on_duplicate:
        "error", "skip" or "replace" for an id already indexed."""
        matches, actions = self._handle.run(documents, on_duplicate, threshold, measure, 0, 0,
                                            threads, max_bucket)
        return [Match(*m) for m in matches], list(actions)

    def __repr__(self) -> str:
        return f"<kindred.Index {self.path!r}: {self.documents} documents>"
