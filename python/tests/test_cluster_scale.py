"""The cluster sweep on a generated corpus of 50,000 short documents in 16
shards with planted near-duplicates, against `kindred sweep -o` (the
reference: the program's own files over the same shards in the same order):
LocalClusters of 2 and 3 worker processes, a real dask-scheduler with two
dask-worker processes, a worker killed by SIGKILL in the map stage and in
the shuffle, and bad shards."""

import glob
import os
import shutil
import signal
import subprocess
import sys
import threading
import time

import pytest

import kindred
import kindred.cluster
from conftest import BINARY, SOURCE, run_cli

distributed = pytest.importorskip("distributed")

SHARDS = 16
# Short documents: word 3-shingles and a threshold of 0.5, so that a planted
# copy with one word edited in twenty is still a duplicate.
CLI_OPTIONS = ["-k", "3", "-t", "0.5"]
OPTIONS = dict(settings=kindred.Settings(k=3), threshold=0.5)


@pytest.fixture(scope="module")
def corpus(tmp_path_factory):
    """(shards, the reference output directory)."""
    root = tmp_path_factory.mktemp("generated")
    text = subprocess.run(
        ["/usr/bin/python3", os.path.join(SOURCE, "tools", "gen_corpus.py"), "--docs", "50000",
         "--seed", "13", "--words-min", "16", "--words-max", "32", "--vocab", "20000",
         "--edit-rates", "0.02,0.05,0.1"],
        check=True, capture_output=True).stdout
    lines = text.splitlines(keepends=True)
    assert len(lines) == 50000
    per = (len(lines) + SHARDS - 1) // SHARDS
    shards = []
    for n in range(SHARDS):
        path = root / f"part-{n:02d}.jsonl"
        path.write_bytes(b"".join(lines[n * per:(n + 1) * per]))
        shards.append(str(path))
    reference = root / "reference"
    run_cli("sweep", *shards, *CLI_OPTIONS, "-q", "-o", str(reference))
    # Planted near-duplicates were found (5% of the documents by default),
    # some in groups of three or more.
    assert (reference / "pairs.jsonl").read_bytes().count(b"\n") > 2000
    groups = (reference / "groups.jsonl").read_bytes().count(b"\n")
    assert 1000 < groups < (reference / "pairs.jsonl").read_bytes().count(b"\n")
    return shards, reference


def same_files(a, b):
    for kind in ("pairs", "groups", "decisions"):
        assert (a / f"{kind}.jsonl").read_bytes() == (b / f"{kind}.jsonl").read_bytes(), kind


@pytest.fixture(scope="module")
def pause_dir(tmp_path_factory):
    return tmp_path_factory.mktemp("pause")


@pytest.fixture(scope="module")
def local(pause_dir):
    """A LocalCluster of 3 worker processes (scaled down to 2 by the test of
    two) whose tasks can be held at the start of a stage (stages._test_hook)
    while a test kills their worker. Started once: starting one costs
    seconds."""
    os.environ["KINDRED_CLUSTER_TEST_PAUSE"] = str(pause_dir)
    try:
        with distributed.LocalCluster(n_workers=3, threads_per_worker=1, processes=True,
                                      dashboard_address=None) as cluster, \
                distributed.Client(cluster) as client:
            yield cluster, client
    finally:
        del os.environ["KINDRED_CLUSTER_TEST_PAUSE"]


def workers(client):
    return len(client.scheduler_info()["workers"])


def test_three_local_workers(local, corpus, tmp_path):
    shards, reference = corpus
    cluster, client = local
    assert workers(client) == 3
    summary = kindred.cluster.sweep(client, shards, str(tmp_path / "out"), partitions=5,
                                    ranges=7, **OPTIONS)
    same_files(reference, tmp_path / "out")
    assert summary.documents == 50000 and summary.partitions == 5
    groups = next(s for s in summary.stages if s.name == "groups")
    assert groups.tasks > 5 and summary.component_steps >= 2


def test_two_local_workers(local, corpus, tmp_path):
    shards, reference = corpus
    cluster, client = local
    cluster.scale(2)
    deadline = time.monotonic() + 60
    while workers(client) != 2 and time.monotonic() < deadline:
        time.sleep(0.05)
    assert workers(client) == 2
    summary = kindred.cluster.sweep(client, shards, str(tmp_path / "out"), **OPTIONS)
    same_files(reference, tmp_path / "out")
    assert summary.partitions == 4  # two per worker


def _holding(pause_dir, run, actions):
    """Runs `run` in a thread with the tasks of the stages of `actions`
    ((stage, action(pid)) in the order the stages run) held at their start:
    when a task of the stage is held, calls the action with its worker's
    process id (SIGKILL, or a change to a shard), then lets every task of
    that stage go. Returns what `run` raised, or None."""
    for stage, _ in actions:
        (pause_dir / f"pause-{stage}").touch()
    failure = []

    def target():
        try:
            run()
        except BaseException as error:  # noqa: B902 (handed to the test)
            failure.append(error)

    def release(stages):
        for stage in stages:
            for mark in glob.glob(str(pause_dir / f"in-{stage}-*")):
                os.unlink(mark)

    thread = threading.Thread(target=target)
    thread.start()
    done = []
    try:
        for stage, action in actions:
            deadline = time.monotonic() + 120
            marks = []
            while not marks and thread.is_alive() and time.monotonic() < deadline:
                release(done)
                marks = glob.glob(str(pause_dir / f"in-{stage}-*"))
                thread.join(0.02)
            assert marks, f"no task reached the {stage} stage"
            (pause_dir / f"pause-{stage}").unlink()
            action(int(marks[0].rsplit("-", 1)[1]))
            done.append(stage)
    finally:
        for stage, _ in actions:
            if (pause_dir / f"pause-{stage}").exists():
                (pause_dir / f"pause-{stage}").unlink()
        while thread.is_alive():  # release the held tasks, and any that come late
            release([stage for stage, _ in actions])
            thread.join(0.05)
    return failure[0] if failure else None


def _kill(pid):
    os.kill(pid, signal.SIGKILL)


def test_workers_killed_in_the_map_and_in_the_shuffle(local, corpus, pause_dir, tmp_path):
    # sign: the map stage; candidates: the shuffle (each task gathers its
    # partition from every map output). The killed workers' outputs are
    # made again; the files are the same.
    shards, reference = corpus
    client = local[1]
    error = _holding(pause_dir, lambda: kindred.cluster.sweep(client, shards,
                                                              str(tmp_path / "out"), **OPTIONS),
                     [("sign", _kill), ("candidates", _kill)])
    assert error is None
    same_files(reference, tmp_path / "out")
    client.wait_for_workers(2, timeout=60)


def test_bad_shards(local, corpus, pause_dir, tmp_path):
    shards = corpus[0][:8]
    client = local[1]
    # A missing shard: named, no output.
    missing = shards[:3] + [str(tmp_path / "gone.jsonl")] + shards[3:]
    with pytest.raises(kindred.KindredError) as caught:
        kindred.cluster.sweep(client, missing, str(tmp_path / "a"))
    done = run_cli("sweep", *missing, "-q", "-o", str(tmp_path / "a-cli"), check=False)
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert "gone.jsonl" in str(caught.value) and done.returncode == caught.value.exit_code != 0
    assert not os.path.exists(tmp_path / "a")
    # A malformed line (the 101st) in the seventh shard: shard and line named.
    bad = list(shards)
    bad[6] = str(tmp_path / "seventh.jsonl")
    lines = open(shards[6], "rb").read().splitlines(keepends=True)
    lines[100] = b'{"id": "x", "text": \n'
    open(bad[6], "wb").write(b"".join(lines))
    with pytest.raises(kindred.BadInputError) as caught:
        kindred.cluster.sweep(client, bad, str(tmp_path / "b"))
    done = run_cli("sweep", *bad, "-q", "-o", str(tmp_path / "b-cli"), check=False)
    assert str(caught.value).startswith(f"{bad[6]}:101")
    assert done.stderr.decode() == f"kindred: {caught.value}\n"
    assert caught.value.exit_code == done.returncode == 3
    assert not os.path.exists(tmp_path / "b")
    # A shard that changes after the map stage read it (while the shuffle
    # runs) and before the sets stage reads it again.
    changed = list(shards)
    changed[4] = str(tmp_path / "fifth.jsonl")
    shutil.copy(shards[4], changed[4])

    def change():  # every text one word longer
        data = open(changed[4], "rb").read()
        open(changed[4], "wb").write(data.replace(b'"text": "', b'"text": "also '))

    error = _holding(pause_dir,
                     lambda: kindred.cluster.sweep(client, changed, str(tmp_path / "c")),
                     [("candidates", lambda pid: change())])
    assert isinstance(error, kindred.InputChangedError), error
    assert str(error).startswith(f"{changed[4]}:") and "changed since it was first read" in \
        str(error)
    assert error.exit_code == 3
    assert not os.path.exists(tmp_path / "c")


def test_a_real_scheduler_and_workers(corpus, tmp_path):
    """dask-scheduler and two dask-worker processes on 127.0.0.1 (free
    ports), the command line against them; stopped however the test ends."""
    shards, reference = corpus
    address_file = tmp_path / "scheduler.json"
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(p for p in sys.path if p) if "PYTHONPATH" not in env \
        else env["PYTHONPATH"]
    common = ["--no-dashboard"]
    processes = []
    try:
        processes.append(subprocess.Popen(
            ["/usr/bin/dask-scheduler", "--host", "127.0.0.1", "--port", "0",
             "--scheduler-file", str(address_file), *common], env=env,
            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL))
        deadline = time.monotonic() + 60
        while not address_file.exists() and time.monotonic() < deadline:
            time.sleep(0.05)
        for n in range(2):
            processes.append(subprocess.Popen(
                ["/usr/bin/dask-worker", "--scheduler-file", str(address_file), "--host",
                 "127.0.0.1", "--nthreads", "1", "--local-directory", str(tmp_path / f"w{n}"),
                 "--no-nanny", *common], env=env, stdout=subprocess.DEVNULL,
                stderr=open(tmp_path / f"worker{n}.log", "wb")))
        import json
        address = json.loads(address_file.read_text())["address"]
        with distributed.Client(address, timeout=60) as client:
            client.wait_for_workers(2, timeout=60)
        command = ["/usr/bin/python3", "-m", "kindred.cluster", "sweep", "--scheduler", address,
                   *CLI_OPTIONS]
        done = subprocess.run([*command, "-o", str(tmp_path / "out"), *shards], env=env,
                              capture_output=True)
        assert done.returncode == 0, done.stderr.decode()
        same_files(reference, tmp_path / "out")
        assert "per doc" in done.stderr.decode()
        # A user's error: the program's one line on stderr, its exit code.
        gone = str(tmp_path / "gone.jsonl")
        done = subprocess.run([*command, "-q", "-o", str(tmp_path / "bad"), shards[0], gone],
                              env=env, capture_output=True)
        cli = run_cli("sweep", shards[0], gone, "-q", "-o", str(tmp_path / "bad-cli"),
                      check=False)
        assert (done.returncode, done.stderr) == (cli.returncode, cli.stderr)
        assert not os.path.exists(tmp_path / "bad")
        # The worker that ran the failed task did not log it as a failure of
        # its own (kindred's errors are the caller's to report).
        logs = b"".join((tmp_path / f"worker{n}.log").read_bytes() for n in range(2))
        assert b"Compute Failed" not in logs and b"Traceback" not in logs
    finally:
        for process in reversed(processes):
            process.kill()
        for process in processes:
            process.wait()
