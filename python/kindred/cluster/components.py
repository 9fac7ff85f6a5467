"""Connected components of the confirmed pairs, spread over tasks: the
alternating large-star / small-star algorithm of Kiveris, Lattanzi,
Mirrokni, Rastogi and Vassilvitskii, "Connected Components in MapReduce and
Beyond" (SoCC 2014), over edge lists partitioned by node.

An edge list is plain bytes: u32 pairs (node, neighbour), little-endian.
Node v's edges go to partition v mod P. A round is a large-star step, then a
small-star step, each a task per partition that reads that partition's
edge lists from every task of the step before:

  large-star  node u and all its neighbours: with m the smallest of u and
              them, every neighbour v > u is linked to m instead of u
  small-star  node u and its smaller neighbours N: with m the smallest of
              N, every other member of N, and u, is linked to m

Each step also says whether it changed anything that could change: a
large-star step leaves its edges as they are when no node has both a
smaller and a larger neighbour, a small-star step when no node has two
smaller ones. When neither changed, every component is a star whose centre
is its smallest member, and the small-star step's edges (member, centre)
are the answer. Every task is a pure function of its input bytes (inputs
are read in a fixed order and the outputs sorted), so a re-run gives the
same bytes.
"""

from __future__ import annotations

from typing import List, Sequence, Tuple

import numpy as np

_U32 = np.dtype("<u4")


def _route(nodes: np.ndarray, others: np.ndarray, parts: int) -> List[bytes]:
    """Edges (nodes[i], others[i]) into `parts` lists by node."""
    out = []
    where = nodes % parts
    for p in range(parts):
        keep = where == p
        out.append(np.column_stack((nodes[keep], others[keep])).astype(_U32).tobytes())
    return out


def _both_ways(a: np.ndarray, b: np.ndarray, parts: int) -> List[bytes]:
    return _route(np.concatenate((a, b)), np.concatenate((b, a)), parts)


def _grouped(lists: Sequence[bytes]):
    """The distinct edges of `lists`, sorted by node then neighbour: (nodes,
    neighbours, start of each node's run, end of each node's run)."""
    if not lists:
        empty = np.zeros(0, np.uint64)
        return empty, empty, empty, empty
    joined = np.frombuffer(b"".join(lists), dtype=_U32).astype(np.uint64)
    packed = np.unique(joined[0::2] << np.uint64(32) | joined[1::2])
    nodes, others = packed >> np.uint64(32), packed & np.uint64(0xFFFFFFFF)
    starts = np.flatnonzero(np.r_[True, nodes[1:] != nodes[:-1]]) if len(nodes) else \
        np.zeros(0, np.int64)
    ends = np.r_[starts[1:], len(nodes)].astype(np.int64)
    return nodes, others, starts, ends


def first_edges(ends: bytes, parts: int) -> List[bytes]:
    """The pairs (u32 a, u32 b each) as edge lists for a large-star step."""
    pairs = np.frombuffer(ends, dtype=_U32).astype(np.uint64)
    return _both_ways(pairs[0::2], pairs[1::2], parts)


def large_star(lists: Sequence[bytes], parts: int) -> Tuple[List[bytes], bool]:
    """One partition's large-star step: (edge lists for the small-star step,
    keyed by the larger node; whether a node had a smaller and a larger
    neighbour)."""
    nodes, others, starts, ends = _grouped(lists)
    if len(nodes) == 0:
        return [b""] * parts, False
    smallest = np.minimum(others[starts], nodes[starts])
    changed = bool(np.any((others[starts] < nodes[starts]) & (others[ends - 1] > nodes[starts])))
    centre = np.repeat(smallest, ends - starts)
    up = others > nodes
    return _route(others[up], centre[up], parts), changed


def small_star(lists: Sequence[bytes], parts: int) -> Tuple[List[bytes], bytes, bool]:
    """One partition's small-star step (its lists hold each node's smaller
    neighbours): (edge lists for the next large-star step; the edges as
    (member, centre) u32 pairs; whether a node had two smaller
    neighbours)."""
    nodes, others, starts, ends = _grouped(lists)
    if len(nodes) == 0:
        return [b""] * parts, b"", False
    counts = ends - starts
    changed = bool(np.any(counts > 1))
    centre = np.repeat(others[starts], counts)
    moved = others != centre
    members = np.concatenate((nodes[starts], others[moved]))
    centres = np.concatenate((others[starts], centre[moved]))
    order = np.lexsort((centres, members))
    members, centres = members[order], centres[order]
    star = np.column_stack((members, centres)).astype(_U32).tobytes()
    return _both_ways(members, centres, parts), star, changed
