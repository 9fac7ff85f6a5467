"""Type stubs of the extension module kindred._kindred (pybind11). Use the
package kindred: it re-exports Settings and the set and signature
functions, and wraps the rest."""

from typing import Iterable, List, Optional, Sequence, Tuple, Union

import numpy as np
import numpy.typing as npt

_Text = Union[str, bytes]
_Set = npt.NDArray[np.uint64]
_Documents = Iterable[Tuple[Union[str, int, bytes], _Text]]

class Settings:
    """The settings that decide a signature."""
    def __init__(self, shingle: str = "word", k: int = 5, perms: int = 128,
                 seed: int = 0x6B696E6472656431, signer: str = "oph") -> None: ...
    @property
    def shingle(self) -> str: ...
    @property
    def k(self) -> int: ...
    @property
    def perms(self) -> int: ...
    @property
    def seed(self) -> int: ...
    @property
    def signer(self) -> str: ...

def shingles(text: _Text, settings: Optional[Settings] = None) -> _Set:
    """The shingle set of a text: sorted, distinct XXH3-64 hashes."""
def sign(texts: Iterable[_Text], settings: Optional[Settings] = None,
         threads: int = 1) -> npt.NDArray[np.uint32]:
    """MinHash signatures, one row of settings.perms slots per text."""
def sign_set(set: _Set, settings: Optional[Settings] = None) -> npt.NDArray[np.uint32]:
    """The MinHash signature of a shingle set."""
def estimate(a: npt.NDArray[np.uint32], b: npt.NDArray[np.uint32]) -> float:
    """The fraction of agreeing slots of two signatures."""
def overlap(a: _Set, b: _Set) -> Tuple[int, int, int]:
    """(shared, size_a, size_b) of two shingle sets."""
def jaccard(a: _Set, b: _Set) -> float:
    """Exact Jaccard similarity of two shingle sets."""
def containment(a: _Set, b: _Set) -> float:
    """Exact containment |A n B| / min(|A|, |B|)."""

def create_index(path: str, settings: Optional[Settings] = None, threshold: float = 0.8,
                 bands: int = 0, rows: int = 0) -> None: ...

class IndexHandle:
    def __init__(self, path: str) -> None: ...
    path: str
    documents: int
    settings: Settings
    threshold: float
    banding: Tuple[int, int]
    def reopen(self) -> None: ...
    def run(self, documents: _Documents, on_duplicate: Optional[str] = None,
            threshold: Optional[float] = None, measure: Optional[str] = None, bands: int = 0,
            rows: int = 0, threads: int = 1, max_bucket: int = 5000
            ) -> Tuple[List[tuple], List[Tuple[str, str]]]: ...

class SweepHandle:
    ids: List[str]
    pairs: List[Tuple[int, int, float, float, int, int, int]]
    groups: List[Tuple[int, List[int]]]
    empty: List[bool]
    stats: dict
    def records(self, kind: str, format: str = "jsonl") -> str: ...

def sweep_files(inputs: Sequence[str], input_format: str = "auto", id_field: str = "id",
                text_field: str = "text", priority_field: str = "", **options) -> SweepHandle: ...
def sweep_texts(documents: _Documents, **options) -> SweepHandle: ...

# The cluster sweep's stages (kindred.cluster): the library's stage functions
# over its records (src/core/RECORDS.md; which go where: cluster/RECORDS.md).
def stage_sign_shard(path: str, settings: Settings, input_format: str, id_field: str,
                     text_field: str, priority_field: str, bands: int, rows: int,
                     partitions: int, threads: int = 1) -> Tuple[bytes, List[bytes]]: ...
def stage_candidates(parts: List[bytes], offsets: List[int], documents: int, ranges: int,
                     max_bucket: int) -> List[bytes]: ...
def stage_plan(parts: List[bytes], offsets: List[int]) -> Tuple[bytes, List[bytes]]: ...
def stage_read_sets(path: str, settings: Settings, input_format: str, id_field: str,
                    text_field: str, priority_field: str, table: bytes, wanted: List[bytes],
                    offset: int) -> List[bytes]: ...
def stage_write_kept(path: str, input_format: str, id_field: str, text_field: str,
                     priority_field: str, dropped: bytes, documents: int,
                     lines_path: str) -> int: ...
def stage_verify(pairs: bytes, sets: List[bytes], threshold: float, bands: int,
                 rows: int) -> bytes: ...
def stage_pair_ends(scored: bytes) -> bytes: ...
def stage_finish(tables: List[bytes], shards: List[str], scored: List[bytes],
                 stars: Optional[bytes], keep: str, grouping: str,
                 format: str) -> Tuple[bytes, bytes, bytes, List[bytes]]: ...
def choose_banding(threshold: float, perms: int) -> Tuple[int, int]: ...
