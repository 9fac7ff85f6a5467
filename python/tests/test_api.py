"""The Python package against the kindred program (same inputs, same
outputs) and against independent computations (named beside each check)."""

import json
import os
import threading

import numpy as np
import pytest

import kindred
from conftest import run_cli


def archive_documents(path):
    with open(path, encoding="utf-8") as lines:
        return [(r["id"], r["text"]) for r in map(json.loads, lines)]


def test_shingles_match_independent_reference(archive):
    # Reference: tests/reference/shingle_reference.py (PyICU + xxhash, no
    # shared code), for word 5-shingles and char 3-shingles.
    import shingle_reference as ref
    docs = archive_documents(archive)[:12] + [("greek", "Ο Σωκράτης ΣΟΦΟΣ ήταν."),
                                              ("empty", "")]
    for mode, k in (("word", 5), ("char", 3)):
        settings = kindred.Settings(shingle=mode, k=k)
        for _, text in docs:
            got = kindred.shingles(text, settings)
            assert got.dtype == np.uint64
            want = ref.shingle_set(ref.normalize(text.encode()), mode, k, settings.seed)
            assert set(got.tolist()) == want
            assert list(got) == sorted(got.tolist())


def test_jaccard_and_containment_match_python_sets(archive):
    # Reference: Jaccard and containment computed with Python's set
    # operations on the same hash sets.
    docs = archive_documents(archive)[:30]
    sets = [kindred.shingles(text) for _, text in docs]
    for i in range(0, len(sets) - 1):
        a, b = sets[i], sets[i + 1]
        sa, sb = set(a.tolist()), set(b.tolist())
        union = len(sa | sb)
        assert kindred.jaccard(a, b) == (len(sa & sb) / union if union else 0.0)
        smaller = min(len(sa), len(sb))
        assert kindred.containment(a, b) == (len(sa & sb) / smaller if smaller else 0.0)
        assert kindred.overlap(a, b) == (len(sa & sb), len(sa), len(sb))
    with pytest.raises(ValueError):
        kindred.jaccard(np.array([3, 1], dtype=np.uint64), sets[0])


def test_signatures_agree_with_the_program_s_estimates(archive, tmp_path):
    # Reference: the estimates in the pairs file of `kindred sweep` on the
    # same corpus; and sign() of a text equals sign_set() of its set.
    out = tmp_path / "out"
    run_cli("sweep", archive, "-q", "-o", str(out))
    docs = dict(archive_documents(archive))
    pairs = [json.loads(line) for line in open(out / "pairs.jsonl")]
    assert pairs
    ids = sorted({p[f] for p in pairs for f in ("a", "b")})
    signatures = kindred.sign([docs[i] for i in ids], threads=2)
    assert signatures.shape == (len(ids), 128) and signatures.dtype == np.uint32
    row = {doc_id: signatures[n] for n, doc_id in enumerate(ids)}
    for p in pairs:
        estimate = kindred.estimate(row[p['a']], row[p['b']])
        assert f"{estimate:.6f}" == f"{p['estimate']:.6f}"
    first = ids[0]
    assert np.array_equal(kindred.sign_set(kindred.shingles(docs[first])), row[first])


def test_sweep_of_files_writes_the_program_s_bytes(archive, tmp_path):
    # Reference: `kindred sweep -o` on the same input and options.
    for options, kwargs in (([], {}), (["-t", "0.6", "--keep", "longest", "--format", "tsv"],
                                       dict(threshold=0.6, keep="longest"))):
        out = tmp_path / f"cli{len(options)}"
        run_cli("sweep", archive, "-q", "-o", str(out), *options)
        fmt = "tsv" if "tsv" in options else "jsonl"
        result = kindred.sweep([archive], threads=2, **kwargs)
        mine = tmp_path / f"py{len(options)}"
        result.write(mine, format=fmt)
        for kind in ("pairs", "groups", "decisions"):
            assert (mine / f"{kind}.{fmt}").read_bytes() == (out / f"{kind}.{fmt}").read_bytes()
    assert result.groups and all(g.keeper in g.members for g in result.groups)


def test_sweep_of_texts_finds_the_program_s_pairs(archive, tmp_path):
    # Reference: `kindred sweep` over the JSON Lines file holding the same
    # (id, text) documents.
    out = tmp_path / "cli"
    run_cli("sweep", archive, "-q", "-o", str(out))
    result = kindred.sweep(archive_documents(archive))
    assert result.records("pairs") == (out / "pairs.jsonl").read_text()
    assert result.records("decisions") == (out / "decisions.jsonl").read_text()
    drops = [d.id for d in result.decisions if d.decision == "drop"]
    assert drops == [d for g in result.groups for d in g.drops] or \
        sorted(drops) == sorted(d for g in result.groups for d in g.drops)


def test_index_check_and_add_match_the_program(archive, source, tmp_path):
    # Reference: `kindred build` then `kindred check` on the same files.
    index = tmp_path / "archive.kin"
    run_cli("build", str(index), archive, "-q")
    submissions = os.path.join(source, "sample_corpus", "submissions")
    done = run_cli("check", str(index), submissions, "-q")
    want = sorted((r["id"], r["match"], f"{r['jaccard']:.6f}")
                  for r in map(json.loads, done.stdout.decode().splitlines())
                  if "match" in r)
    docs = [(name, open(os.path.join(submissions, name), "rb").read())
            for name in sorted(os.listdir(submissions))]
    got = sorted((m.id, m.other, f"{m.jaccard:.6f}")
                 for m in kindred.Index(index).check(docs))
    assert got == want and got
    # An add reports the same matches, then the documents are indexed.
    book = kindred.Index(index)
    before = book.documents
    matches, actions = book.add(docs[:3])
    assert [a for _, a in actions] == ["added"] * 3 and book.documents == before + 3
    again = book.check(docs[:1])
    assert any(m.other == docs[0][0] and m.jaccard == 1.0 for m in again)


def test_created_index_answers_as_a_built_one(archive, source, tmp_path):
    # Reference: `kindred build` of the same documents, checked by the program.
    built = tmp_path / "built.kin"
    run_cli("build", str(built), archive, "-q")
    submissions = os.path.join(source, "sample_corpus", "submissions")
    want = run_cli("check", str(built), submissions, "-q").stdout.decode().splitlines()
    made = kindred.Index.create(tmp_path / "made.kin")
    matches, actions = made.add(archive_documents(archive))
    assert len(actions) == made.documents == 147 and made.banding == (15, 8)
    got = run_cli("check", str(tmp_path / "made.kin"), submissions, "-q")
    assert got.stdout.decode().splitlines() == want and want
    with pytest.raises(kindred.InvalidRequestError):
        made.add([("x", "a text")], on_duplicate="sometimes")
    # An id already indexed: the program's message and exit code.
    first = tmp_path / "first.jsonl"
    first.write_bytes(open(archive, "rb").readline())
    done = run_cli("add", str(tmp_path / "made.kin"), str(first), "-q", check=False)
    with pytest.raises(kindred.BadInputError) as caught:
        made.add(archive_documents(archive)[:1])
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert done.returncode == caught.value.exit_code == 3


def test_errors_carry_the_program_s_message_and_kind(tmp_path):
    # Reference: the program's stderr and exit code for the same mistakes.
    missing = str(tmp_path / "nowhere.jsonl")
    done = run_cli("sweep", missing, check=False)
    with pytest.raises(kindred.BadInputError) as caught:
        kindred.sweep([missing])
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert done.returncode == caught.value.exit_code == 3
    assert isinstance(caught.value, kindred.KindredError) and caught.value.kind == "bad_input"
    bad = tmp_path / "bad.jsonl"
    bad.write_text('{"id": "a", "text": "one"}\n{"id": "b", "text": \n')
    done = run_cli("sweep", str(bad), check=False)
    with pytest.raises(kindred.KindredError) as caught:
        kindred.sweep([str(bad)])
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert done.returncode == caught.value.exit_code
    with pytest.raises(kindred.InvalidRequestError):
        kindred.Settings(k=0)
    with pytest.raises(kindred.IndexDamagedError):
        (tmp_path / "junk.kin").write_bytes(b"not an index at all" * 10)
        kindred.Index(tmp_path / "junk.kin")


def test_signing_releases_the_gil():
    # While one thread is inside sign(), this thread keeps running Python:
    # with the GIL held it would wait for the whole call instead.
    texts = [" ".join(f"w{i}x{j}" for j in range(3000)) for i in range(150)]
    started = threading.Event()
    ticks = 0

    def work():
        started.set()
        kindred.sign(texts, kindred.Settings(signer="classic", perms=256))

    worker = threading.Thread(target=work)
    worker.start()
    started.wait()
    while worker.is_alive():
        ticks += 1
    worker.join()
    assert ticks > 10000
