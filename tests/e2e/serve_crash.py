"""kindred serve killed (SIGKILL) during a stream of adds from 4 clients:
every document whose add was acknowledged is in the index afterwards, the
audit passes, and each unacknowledged request is wholly in or wholly out.
Usage: serve_crash.py KINDRED_BINARY SOURCE_DIR [TRIALS]"""

import json
import os
import random
import shutil
import signal
import sys
import tempfile
import threading
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, jsonl, read_documents, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
TRIALS = int(sys.argv[3]) if len(sys.argv) > 3 else 3
T = tempfile.mkdtemp()
TOKEN = "crash-token-0123456789abcdef"
BASE = os.path.join(T, "base.kin")
assert run([K, "build", BASE, os.path.join(SRC, "sample_corpus", "archive"), "-q"]).returncode == 0
words = " ".join(t for _, t in read_documents(os.path.join(SRC, "sample_corpus", "submissions"))).split()


def trial(number):
    index = os.path.join(T, "trial%d.kin" % number)
    shutil.copy(BASE, index)
    server = Server(K, index, "--allow-add", "-q", token=TOKEN, workdir=T)
    stop = threading.Event()
    lock = threading.Lock()
    acknowledged, unacknowledged, texts = [], [], {}

    def client(c):
        rng = random.Random(number * 100 + c)
        n = 0
        while not stop.is_set():
            ids = ["t%d-c%d-%d-%d" % (number, c, n, i) for i in range(rng.randint(1, 3))]
            n += 1
            docs = [{"id": i, "text": " ".join(rng.choice(words) for _ in range(60))} for i in ids]
            with lock:
                texts.update({d["id"]: d["text"] for d in docs})
            try:
                status, _ = server.json("POST", "/v1/add", {"documents": docs}, timeout=10)
            except OSError:
                status = None
            with lock:
                (acknowledged if status == 200 else unacknowledged).append(ids)
            if status != 200:
                return

    threads = [threading.Thread(target=client, args=(c,)) for c in range(4)]
    for t in threads:
        t.start()
    # Kill at a random moment once adds are being acknowledged (a slow build,
    # under a sanitizer, takes longer to answer the first).
    deadline = time.monotonic() + 30
    while not acknowledged and time.monotonic() < deadline:
        time.sleep(0.02)
    time.sleep(random.Random(number).uniform(0.2, 0.8))
    server.stop(signal.SIGKILL)
    stop.set()
    for t in threads:
        t.join()
    audit = run([K, "audit", index])
    check(audit.returncode == 0, "trial %d: audit: %s %s" % (number, audit.stdout, audit.stderr))
    uploads = os.path.join(T, "uploads%d.jsonl" % number)
    with open(uploads, "w") as f:
        for doc_id, text in texts.items():
            f.write(json.dumps({"id": doc_id, "text": text}) + "\n")
    found = run([K, "check", index, uploads, "-q"])
    check(found.returncode == 0, "trial %d: check: %s" % (number, found.stderr))
    present = {m["id"] for m in jsonl(found.stdout) if m["match_in"] == "index" and m["match"] == m["id"]}
    lost = [i for ids in acknowledged for i in ids if i not in present]
    check(not lost, "trial %d: acknowledged but lost: %s" % (number, lost))
    torn = [ids for ids in unacknowledged if 0 < sum(i in present for i in ids) < len(ids)]
    check(not torn, "trial %d: requests partly in: %s" % (number, torn))
    print("trial %d: %d requests acknowledged, %d not, %d of these in the index"
          % (number, len(acknowledged), len(unacknowledged),
             sum(all(i in present for i in ids) for ids in unacknowledged)))
    check(len(acknowledged) > 0, "trial %d: some adds were acknowledged" % number)


for number in range(TRIALS):
    trial(number)
shutil.rmtree(T)
finish()
