"""The cluster sweep against `kindred sweep` (the reference: the program's
own output files over the same shards in the same order)."""

import os
import struct

import pytest

import kindred
import kindred.cluster
from conftest import run_cli

distributed = pytest.importorskip("distributed")


@pytest.fixture(scope="module")
def client():
    with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        yield client


@pytest.fixture(scope="module")
def shards(archive, tmp_path_factory):
    """The sample corpus's JSON Lines file cut into 3 shards."""
    root = tmp_path_factory.mktemp("shards")
    lines = open(archive, "rb").read().splitlines(keepends=True)
    paths = []
    for n in range(3):
        path = root / f"shard-{n}.jsonl"
        path.write_bytes(b"".join(lines[n::3]))
        paths.append(str(path))
    return paths


def same_files(a, b, fmt="jsonl"):
    for kind in ("pairs", "groups", "decisions"):
        assert (a / f"{kind}.{fmt}").read_bytes() == (b / f"{kind}.{fmt}").read_bytes(), kind


def test_cluster_sweep_writes_the_program_s_bytes(client, shards, tmp_path):
    for n, (options, kwargs, fmt) in enumerate((
            ([], dict(partitions=3, ranges=2), "jsonl"),
            (["-t", "0.5", "--keep", "longest", "--format", "tsv", "--max-bucket", "2"],
             dict(threshold=0.5, keep="longest", format="tsv", max_bucket=2, partitions=5,
                  ranges=3), "tsv"))):
        want, got = tmp_path / f"cli{n}", tmp_path / f"cluster{n}"
        run_cli("sweep", *shards, "-q", "-o", str(want), *options)
        summary = kindred.cluster.sweep(client, shards, str(got), **kwargs)
        same_files(want, got, fmt)
        assert summary.documents == 147 and summary.confirmed_pairs > 0
        assert [s.name for s in summary.stages] == [
            "sign", "candidates", "plan", "sets", "verify", "groups", "finish"]
        assert "per doc" in summary.text()
    # Kept documents: the shards' kept files, in shard order, hold the bytes
    # of the program's --write-kept file.
    run_cli("sweep", *shards, "-q", "-o", str(tmp_path / "cli-kept"), "--write-kept",
            str(tmp_path / "kept.jsonl"))
    summary = kindred.cluster.sweep(client, shards, str(tmp_path / "cluster-kept"),
                                    write_kept=str(tmp_path / "kept"))
    joined = b"".join((tmp_path / "kept" / os.path.basename(s)).read_bytes() for s in shards)
    assert joined == (tmp_path / "kept.jsonl").read_bytes()
    assert summary.kept == joined.count(b"\n") < 147


def test_cluster_sweep_reports_bad_shards_as_the_program_does(client, shards, tmp_path):
    missing = str(tmp_path / "gone.jsonl")
    done = run_cli("sweep", shards[0], missing, "-q", "-o", str(tmp_path / "a"), check=False)
    with pytest.raises(kindred.BadInputError) as caught:
        kindred.cluster.sweep(client, [shards[0], missing], str(tmp_path / "b"))
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert not os.path.exists(tmp_path / "b")
    # The same shard twice: every id repeated.
    done = run_cli("sweep", shards[1], shards[1], "-q", "-o", str(tmp_path / "c"), check=False)
    with pytest.raises(kindred.BadInputError) as caught:
        kindred.cluster.sweep(client, [shards[1], shards[1]], str(tmp_path / "d"))
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert done.returncode == caught.value.exit_code
    assert not os.path.exists(tmp_path / "d")
    # A malformed line in the third shard: the program's message and code.
    bad = tmp_path / "bad.jsonl"
    bad.write_bytes(open(shards[2], "rb").read()[:2000].rsplit(b"\n", 1)[0] + b"\n{\"id\": 7,\n")
    done = run_cli("sweep", shards[0], shards[1], str(bad), "-q", "-o", str(tmp_path / "e"),
                   check=False)
    with pytest.raises(kindred.BadInputError) as caught:
        kindred.cluster.sweep(client, [shards[0], shards[1], str(bad)], str(tmp_path / "f"))
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert done.returncode == caught.value.exit_code == 3
    assert not os.path.exists(tmp_path / "f")


def test_a_shard_that_changed_before_its_second_reading_is_an_error(shards, tmp_path):
    # The sets stage reads a shard again; a document that changed since the
    # sign stage read it is an InputChangedError naming the shard and line.
    from kindred.cluster import stages
    options = dict(input_format="auto", id_field="id", text_field="text", priority_field="")
    shard = tmp_path / "shard.jsonl"
    shard.write_bytes(open(shards[0], "rb").read())
    settings = kindred.Settings()
    table, *keys = stages.sign_shard(str(shard), settings, options, 15, 8, 2)
    wanted = [struct.pack("<II", 100, 103)]
    sets = stages.read_sets(str(shard), settings, options, table, wanted, 100)
    # A set store record (src/core/RECORDS.md): u32 perms, u64 count, then
    # the first entry's u32 document.
    assert len(sets) == 1 and sets[0][:8] == b"KNDRSETS"
    assert struct.unpack_from("<IQI", sets[0], 24) == (128, 2, 100)
    lines = shard.read_bytes().splitlines(keepends=True)
    lines[3] = lines[3].replace(b"the", b"a", 3)
    shard.write_bytes(b"".join(lines))
    with pytest.raises(kindred.InputChangedError) as caught:
        stages.read_sets(str(shard), settings, options, table, wanted, 100)
    assert str(caught.value).startswith(f"{shard}:4: document ")
    assert caught.value.exit_code == 3


def _stars_in_process(pairs, parts):
    """The components rounds run in this process, as the cluster runs them
    (a task per partition and step; every task reads every list sent to its
    partition). Returns ({member: smallest member}, steps)."""
    import numpy as np
    from kindred.cluster import components
    ends = np.array(pairs, dtype="<u4").tobytes()
    lists = [components.first_edges(ends, parts)]
    steps = 0
    while True:
        large = [components.large_star([row[p] for row in lists], parts) for p in range(parts)]
        small = [components.small_star([out[0][p] for out in large], parts)
                 for p in range(parts)]
        lists = [out[0] for out in small]
        steps += 2
        if not any(out[1] for out in large) and not any(out[2] for out in small):
            break
        assert steps < 100
    star = np.frombuffer(b"".join(out[1] for out in small), dtype="<u4").reshape(-1, 2)
    return {int(m): int(c) for m, c in star}, steps


def test_components_rounds_agree_with_union_find():
    # Reference: union-find over the same edges (a plain Python one here),
    # each component named by its smallest member.
    import random
    rng = random.Random(5)
    graphs = [[(n, n + 1) for n in range(200)],                   # a long path
              [(n, 199 - n) for n in range(100)],                 # a matching
              [(0, n) for n in range(1, 50)] + [(n, 60) for n in range(50, 60)]]
    for _ in range(5):
        graphs.append([tuple(sorted(rng.sample(range(300), 2))) for _ in range(250)])
    for pairs in graphs:
        parent = {}

        def find(x):
            while parent.setdefault(x, x) != x:
                x = parent[x]
            return x
        for a, b in pairs:
            ra, rb = find(a), find(b)
            parent[max(ra, rb)] = min(ra, rb)
        want = {n: find(n) for n in parent if find(n) != n}
        for parts in (1, 3):
            got, steps = _stars_in_process(pairs, parts)
            assert got == want
    # A path of 200 nodes needs several rounds, not one.
    assert _stars_in_process(graphs[0], 2)[1] > 2
