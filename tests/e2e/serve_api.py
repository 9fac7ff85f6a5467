"""kindred serve end to end: its answers equal kindred check's and kindred
add's on the same documents and index; a restart sees every acknowledged
add; the writer lock is held only with --allow-add and released on stop.
Usage: serve_api.py KINDRED_BINARY SOURCE_DIR"""

import json
import os
import shutil
import signal
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, jsonl, read_documents, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
T = tempfile.mkdtemp()
TOKEN = "e2e-token-0123456789abcdef"
SUBMISSIONS = os.path.join(SRC, "sample_corpus", "submissions")
INDEX = os.path.join(T, "archive.kin")

r = run([K, "build", INDEX, os.path.join(SRC, "sample_corpus", "archive"), "-q"])
assert r.returncode == 0, r.stderr
docs = read_documents(SUBMISSIONS)
body = {"documents": [{"id": i, "text": t} for i, t in docs]}

# Checks: the same match records as kindred check on the same files, under
# the stored settings and under another threshold and measure (a banding
# other than the stored one).
server = Server(K, INDEX, token=TOKEN, workdir=T)
for options, flags in [({}, []),
                       ({"threshold": 0.5, "measure": "containment"},
                        ["-t", "0.5", "--measure", "containment"])]:
    status, reply = server.json("POST", "/v1/check", dict(body, **options))
    check(status == 200, "check %s: status %d %s" % (options, status, reply))
    cli = run([K, "check", INDEX, SUBMISSIONS, "-q", *flags])
    check(cli.returncode == 0, "kindred check: " + cli.stderr)
    want = jsonl(cli.stdout)
    check(reply.get("matches") == want,
          "check %s: service %s\n  cli %s" % (options, reply.get("matches"), want))
    check(reply.get("checked") == len(docs), "check: count of documents checked")
    matched = len({m["id"] for m in want if m["match_in"] == "index"})
    check(reply.get("matched") == matched, "check: count of matched uploads")
    if options:
        check(len(want) > 0, "the containment check finds the planted copies")

# One text/plain document, id from the query string.
name, text = docs[0]
status, reply = server.json("POST", "/v1/check?id=" + name, text, content_type="text/plain")
cli = run([K, "check", INDEX, os.path.join(SUBMISSIONS, name), "-q", "--format", "jsonl"])
want = [dict(m, id=name) for m in jsonl(cli.stdout)]
check(status == 200 and reply["matches"] == want, "text/plain check: %s vs %s" % (reply, want))
check("POST /v1/check 200 1 document " in server.text_log(),
      "the request log reads \"1 document\": " + server.text_log()[-300:])

# Marked spans: byte ranges of the upload, within it.
status, reply = server.json("POST", "/v1/check",
                            dict(body, threshold=0.5, measure="containment", marked_spans=True))
check(status == 200 and reply["matches"], "check with marked spans")
texts = dict(docs)
for m in reply["matches"]:
    size = len(texts[m["id"]].encode())
    spans = m.get("marked_spans")
    check(spans and all(0 <= b < e <= size for b, e in spans), "marked spans of %s" % m["id"])

# Read-only without --allow-add: no lock, adds refused.
status, reply = server.json("POST", "/v1/add", body)
check(status == 405 and reply.get("kind") == "read_only", "add on a read-only service: %s" % reply)
copy = os.path.join(T, "copy.kin")
shutil.copy(INDEX, copy)
check(server.stop() == 0, "SIGTERM: exit 0")

# Adds: the same matches and ids as kindred add on a copy of the index.
server = Server(K, INDEX, "--allow-add", token=TOKEN, workdir=T)
busy = run([K, "add", INDEX, SUBMISSIONS, "-q"])
check(busy.returncode == 6, "kindred add while the service holds the lock: exit %d" % busy.returncode)
cli_check = run([K, "check", INDEX, SUBMISSIONS, "-q"])
check(cli_check.returncode == 0, "kindred check beside the service: " + cli_check.stderr)
first, second = body["documents"][:9], body["documents"][9:]
acknowledged = []
for part in (first, second):
    status, reply = server.json("POST", "/v1/add", {"documents": part})
    check(status == 200, "add: %d %s" % (status, reply))
    part_dir = os.path.join(T, "part%d" % len(acknowledged))
    os.mkdir(part_dir)
    for d in part:
        with open(os.path.join(part_dir, d["id"]), "w") as f:
            f.write(d["text"])
    cli = run([K, "add", copy, part_dir, "-q"])
    check(cli.returncode == 0, "kindred add: " + cli.stderr)
    check(reply["matches"] == jsonl(cli.stdout),
          "add: service %s\n  cli %s" % (reply["matches"], cli.stdout))
    check([d["id"] for d in reply["documents"]] == [d["id"] for d in part], "add: ids in order")
    check(all(d["action"] == "added" for d in reply["documents"]), "add: every document added")
    acknowledged += [d["id"] for d in reply["documents"]]
# Checks see an acknowledged add at once.
status, reply = server.json("POST", "/v1/check", {"documents": first[:1]})
check(any(m["match"] == first[0]["id"] and m["jaccard"] == 1 for m in reply["matches"]),
      "a check sees the add it follows: %s" % reply)
# Duplicate ids: error (409, nothing added), skip, replace.
status, reply = server.json("POST", "/v1/add", {"documents": first[:2]})
check(status == 409 and reply.get("kind") == "duplicate_id", "on_duplicate error: %s" % reply)
status, reply = server.json("POST", "/v1/add", {"documents": first[:2], "on_duplicate": "skip"})
check(status == 200 and [d["action"] for d in reply["documents"]] == ["skipped"] * 2,
      "on_duplicate skip: %s" % reply)
status, reply = server.json("POST", "/v1/add", {"documents": first[:1], "on_duplicate": "replace"})
check(status == 200 and reply["documents"][0]["action"] == "replaced", "replace: %s" % reply)
status, info = server.json("GET", "/v1/info")
cli_info = json.loads(run([K, "info", INDEX, "--format", "json"]).stdout)
check(info == cli_info, "info: %s vs %s" % (info, cli_info))
check(server.stop(signal.SIGINT) == 0, "SIGINT: exit 0")

# Restart: every acknowledged add is there; the lock was released.
after = json.loads(run([K, "info", INDEX, "--format", "json"]).stdout)
before = json.loads(run([K, "info", copy, "--format", "json"]).stdout)
check(after["live"] == before["live"], "live documents after restart: %d vs %d" % (after["live"], before["live"]))
server = Server(K, INDEX, token=TOKEN, workdir=T)
status, reply = server.json("POST", "/v1/check", body)
for doc_id in acknowledged:
    check(any(m["id"] == doc_id and m["match"] == doc_id and m["match_in"] == "index"
              for m in reply["matches"]), "after restart, %s is indexed" % doc_id)
server.stop()
check(run([K, "audit", INDEX]).returncode == 0, "audit after the adds")
check(run([K, "add", INDEX, os.path.join(T, "part0"), "-q", "--on-duplicate", "skip"]).returncode == 0,
      "kindred add once the service stopped (the lock was released)")
shutil.rmtree(T)
finish()
