"""kindred serve on a full disk, end to end: an add that cannot be written
answers 500 {"error": ..., "kind": "write_failed"} and leaves the index file
byte for byte as it was; checks keep working meanwhile; once there is room
again the next add succeeds, and a restart sees it and not the refused one.

The full disk is the file size limit (RLIMIT_FSIZE, SIGXFSZ ignored): a
write past it fails with EFBIG, which the program handles as it handles
ENOSPC (both are "the disk is full"). That needs no mount and no root, so
the test runs everywhere. The limit is lifted on the running service with
prlimit(2), as an operator would free space.
Usage: serve_disk_full.py KINDRED_BINARY SOURCE_DIR"""

import os
import resource
import signal
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, read_documents, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
T = tempfile.mkdtemp()
TOKEN = "e2e-token-0123456789abcdef"
INDEX = os.path.join(T, "archive.kin")

r = run([K, "build", INDEX, os.path.join(SRC, "sample_corpus", "archive"), "-q"])
assert r.returncode == 0, r.stderr
with open(INDEX, "rb") as f:
    before = f.read()
# Not one byte more than the index holds.
LIMIT = len(before)


def full_disk():
    signal.signal(signal.SIGXFSZ, signal.SIG_IGN)
    resource.setrlimit(resource.RLIMIT_FSIZE, (LIMIT, resource.RLIM_INFINITY))


name, text = read_documents(os.path.join(SRC, "sample_corpus", "submissions"))[0]
server = Server(K, INDEX, "--allow-add", token=TOKEN, workdir=T, preexec_fn=full_disk)
status, reply = server.json("POST", "/v1/add", {"documents": [{"id": "refused", "text": text}]})
check(status == 500, "add on a full disk: status %d %s" % (status, reply))
check(reply.get("kind") == "write_failed", "add on a full disk: kind %s" % reply)
check("nothing of this request was added" in reply.get("error", ""),
      "add on a full disk: the message says nothing was added: %s" % reply)
with open(INDEX, "rb") as f:
    check(f.read() == before, "the index file changed after the refused add")
status, reply = server.json("POST", "/v1/check", {"documents": [{"id": "probe", "text": text}]})
check(status == 200, "check on a full disk: status %d %s" % (status, reply))
check(all(m.get("match") != "refused" for m in reply.get("matches", [])),
      "a check found the refused document: %s" % reply)

# Room again: the next add opens the writer again and is committed.
resource.prlimit(server.process.pid, resource.RLIMIT_FSIZE,
                 (resource.RLIM_INFINITY, resource.RLIM_INFINITY))
status, reply = server.json("POST", "/v1/add", {"documents": [{"id": "accepted", "text": text}]})
check(status == 200, "add with room again: status %d %s" % (status, reply))
check([d["action"] for d in reply.get("documents", [])] == ["added"], "add with room: %s" % reply)
check(server.stop() == 0, "serve exit status after SIGTERM")

ids = run([K, "info", INDEX, "--format", "json"])
check(ids.returncode == 0, "info after the service: " + ids.stderr)
audit = run([K, "audit", INDEX])
check(audit.returncode == 0, "audit after the service: " + audit.stdout + audit.stderr)
probe = os.path.join(T, "probe.txt")
with open(probe, "w") as f:
    f.write(text)
found = run([K, "check", INDEX, probe, "-q"])
check(found.returncode == 0, "kindred check after the service: " + found.stderr)
check('"accepted"' in found.stdout, "the acknowledged add is in the index: " + found.stdout)
check('"refused"' not in found.stdout, "the refused add is not in the index: " + found.stdout)
finish()
