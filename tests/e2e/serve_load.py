"""kindred serve under load: 16 concurrent clients mixing checks and adds
for a bounded number of rounds: no error, no lost add, memory flat.
Usage: serve_load.py KINDRED_BINARY SOURCE_DIR [ROUNDS_PER_CLIENT]"""

import os
import random
import sys
import tempfile
import threading

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, read_documents, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
ROUNDS = int(sys.argv[3]) if len(sys.argv) > 3 else 40
CLIENTS = 16
T = tempfile.mkdtemp()
TOKEN = "load-token-0123456789abcdef"
INDEX = os.path.join(T, "archive.kin")
assert run([K, "build", INDEX, os.path.join(SRC, "sample_corpus", "archive"), "-q"]).returncode == 0
uploads = read_documents(os.path.join(SRC, "sample_corpus", "submissions"))
words = " ".join(t for _, t in uploads).split()


def rss_kb(pid):
    with open("/proc/%d/status" % pid) as f:
        for line in f:
            if line.startswith("VmRSS:"):
                return int(line.split()[1])
    return 0


server = Server(K, INDEX, "--allow-add", "-q", token=TOKEN, workdir=T)
errors, added = [], []
lock = threading.Lock()
rss = []


def client(number):
    rng = random.Random(number)
    for round_number in range(ROUNDS):
        if round_number == ROUNDS // 2 and number == 0:
            rss.append(rss_kb(server.process.pid))
        if rng.random() < 0.5:
            name, text = rng.choice(uploads)
            status, reply = server.json("POST", "/v1/check", {"documents": [{"id": name, "text": text}]})
        else:
            ids = ["c%d-r%d-%d" % (number, round_number, i) for i in range(rng.randint(1, 3))]
            docs = [{"id": i, "text": " ".join(rng.choice(words) for _ in range(80))} for i in ids]
            status, reply = server.json("POST", "/v1/add", {"documents": docs})
            if status == 200:
                with lock:
                    added.extend(ids)
        if status != 200:
            with lock:
                errors.append((status, reply))


threads = [threading.Thread(target=client, args=(n,)) for n in range(CLIENTS)]
for t in threads:
    t.start()
for t in threads:
    t.join()
rss.append(rss_kb(server.process.pid))
check(not errors, "errors under load: %s" % errors[:5])
status, metrics = server.request("GET", "/metrics")[0:3:2]
segments = [l for l in metrics.decode().splitlines() if l.startswith("kindred_segments_written_total ")]
print("adds acknowledged: %d documents; %s; RSS mid %d kB, end %d kB"
      % (len(added), segments[0] if segments else "?", rss[0], rss[-1]))
check(rss[-1] < 2 * rss[0] + 64 * 1024, "memory flat: %d kB then %d kB" % (rss[0], rss[-1]))
check(server.stop() == 0, "exit 0")
live = run([K, "info", INDEX, "--format", "json"]).stdout
import json  # noqa: E402
base = sum(len(f) for _, _, f in os.walk(os.path.join(SRC, "sample_corpus", "archive")))
check(json.loads(live)["live"] == base + len(added),
      "no lost add: %d live, %d + %d expected" % (json.loads(live)["live"], base, len(added)))
check(run([K, "audit", INDEX]).returncode == 0, "audit after the load")
finish()
