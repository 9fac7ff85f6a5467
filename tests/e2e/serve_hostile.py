"""kindred serve against hostile and malformed requests: each gets its
documented status and a JSON error, slow clients are cut off, and the
service keeps answering the others throughout.
Usage: serve_hostile.py KINDRED_BINARY SOURCE_DIR"""

import json
import os
import socket
import sys
import tempfile
import threading
import time

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from serve_lib import Server, check, finish, run  # noqa: E402

K, SRC = sys.argv[1], sys.argv[2]
T = tempfile.mkdtemp()
TOKEN = "hostile-token-0123456789"
INDEX = os.path.join(T, "archive.kin")
assert run([K, "build", INDEX, os.path.join(SRC, "sample_corpus", "archive"), "-q"]).returncode == 0

server = Server(K, INDEX, "--allow-add", "--max-document-size", "64K", "--max-request-size", "1M",
                "--request-timeout", "2", "--io-timeout", "2", token=TOKEN, workdir=T)


def expect_error(what, status_wanted, kind_wanted, method, path, body=None, **kwargs):
    status, headers, data = server.request(method, path, body, **kwargs)
    try:
        reply = json.loads(data)
    except ValueError:
        reply = {}
    check(status == status_wanted and reply.get("kind") == kind_wanted and reply.get("error"),
          "%s: %d %s, expected %d %s" % (what, status, data[:200], status_wanted, kind_wanted))
    return headers


def healthy(what):
    status, reply = server.json("GET", "/v1/health")
    check(status == 200 and reply.get("status") == "ok", "health after %s" % what)


doc = {"id": "a", "text": "the harbour master said the boats would stay in port until friday"}
expect_error("malformed JSON", 400, "bad_request", "POST", "/v1/check", '{"documents": [')
expect_error("missing documents", 400, "bad_request", "POST", "/v1/check", {"docs": []})
expect_error("missing text", 400, "bad_request", "POST", "/v1/check", {"documents": [{"id": "x"}]})
expect_error("unknown measure", 400, "bad_request", "POST", "/v1/check",
             {"documents": [doc], "measure": "cosine"})
expect_error("threshold out of range", 400, "bad_request", "POST", "/v1/check",
             {"documents": [doc], "threshold": 7})
expect_error("deeply nested JSON", 400, "bad_request", "POST", "/v1/check",
             '{"documents":' + "[" * 100000 + "]" * 100000 + "}")
expect_error("wrong token", 401, "unauthorized", "POST", "/v1/check", {"documents": [doc]},
             token="not-the-token-at-all")
expect_error("no token for add", 401, "unauthorized", "POST", "/v1/add", {"documents": [doc]},
             token="")
expect_error("unknown path", 404, "not_found", "GET", "/v1/nothing")
headers = expect_error("wrong method", 405, "method_not_allowed", "GET", "/v1/check")
check(headers.get("allow") == "POST", "405 names the allowed method")
expect_error("repeated id in a request", 409, "duplicate_id", "POST", "/v1/check",
             {"documents": [doc, doc]})
expect_error("document over the limit", 413, "too_large", "POST", "/v1/check",
             {"documents": [{"id": "big", "text": "word " * 20000}]})
expect_error("request over the limit", 413, "too_large", "POST", "/v1/check",
             {"documents": [{"id": str(i), "text": "x" * 60000} for i in range(20)]})
expect_error("unsupported media type", 415, "unsupported_media_type", "POST", "/v1/check",
             "<a/>", content_type="application/xml")
healthy("the error replies")

# Invalid UTF-8 is read as U+FFFD, as in files, not refused.
status, reply = server.json("POST", "/v1/check",
                            b'{"documents":[{"id":"bad","text":"caf\xe9 \xff\xfe harbour"}]}')
check(status == 200 and reply.get("checked") == 1, "invalid UTF-8 in JSON: %d %s" % (status, reply))
status, reply = server.json("POST", "/v1/check?id=raw", b"caf\xe9 \xff harbour",
                            content_type="text/plain")
check(status == 200 and reply.get("checked") == 1, "invalid UTF-8 as text: %d %s" % (status, reply))

# A body of 1 GB announced: refused at once from its headers, nothing read.
start = time.monotonic()
s = socket.create_connection(("127.0.0.1", server.port), timeout=10)
s.sendall(b"POST /v1/check HTTP/1.1\r\nHost: x\r\nAuthorization: Bearer " + TOKEN.encode() +
          b"\r\nContent-Type: application/json\r\nContent-Length: 1073741824\r\n\r\n{")
answer = s.recv(4096)
s.close()
check(answer.startswith(b"HTTP/1.1 413") and time.monotonic() - start < 5,
      "1 GB announced: %r" % answer[:100])
healthy("a 1 GB announcement")

# A slow client (a byte a second) is cut off after the request timeout,
# while others are answered.
slow = socket.create_connection(("127.0.0.1", server.port), timeout=30)
request = b"POST /v1/check HTTP/1.1\r\nHost: x\r\nContent-Length: 100\r\n\r\n"
cut = threading.Event()


def dribble():
    try:
        for byte in request:
            slow.sendall(bytes([byte]))
            time.sleep(0.5)
            healthy_during.append(server.request("GET", "/v1/health")[0])
    except OSError:
        pass
    cut.set()


healthy_during = []
start = time.monotonic()
thread = threading.Thread(target=dribble)
thread.start()
slow.settimeout(15)
try:
    data = slow.recv(100)
except OSError:
    data = b""
elapsed = time.monotonic() - start
check(data == b"" and elapsed < 6, "slow client cut off: %r after %.1f s" % (data, elapsed))
slow.close()
thread.join()
check(healthy_during and all(s == 200 for s in healthy_during),
      "answers during the slow client: %s" % healthy_during)
check("cut off 127.0.0.1:" in server.text_log(), "the log names the connection cut off")

# A flood of header lines (each under the line limit) is cut off once it
# passes the request limit, instead of filling memory.
cuts_before = server.text_log().count("cut off")
flood = socket.create_connection(("127.0.0.1", server.port), timeout=3)
flood.sendall(b"GET /v1/health HTTP/1.1\r\nHost: x\r\n")
lines = (b"X-Filler: " + b"a" * 90 + b"\r\n") * 10000
start, sent = time.monotonic(), 0
try:
    while time.monotonic() - start < 20 and sent < 256 << 20:
        flood.sendall(lines)
        sent += len(lines)
except OSError:
    pass
flood.close()
check(sent < 64 << 20 and server.text_log().count("cut off") > cuts_before,
      "a header flood is cut off (%d bytes sent in %.1f s)" % (sent, time.monotonic() - start))
healthy("a header flood")

# A disk-full add answers 500 and leaves the index unchanged: see the
# library's fault-injection tests (the service passes the writer's error on).
check(server.stop() == 0, "exit 0 after the hostile requests")

# Full: with one worker and no queue, a second connection is answered 503
# with Retry-After while the first holds the worker.
server = Server(K, INDEX, "--workers", "1", "--queue", "0", "--request-timeout", "3",
                token=TOKEN, workdir=T)
hold = socket.create_connection(("127.0.0.1", server.port), timeout=10)
hold.sendall(b"GET /v1/health HTTP/1.1\r\nHost: x\r\n")  # headers never finished
time.sleep(0.3)
status, headers, data = server.request("GET", "/v1/health")
check(status == 503 and headers.get("retry-after") and json.loads(data).get("kind") == "busy",
      "full: %d %s %s" % (status, headers, data))
hold.close()
time.sleep(0.3)
status, _, _ = server.request("GET", "/v1/health")
check(status == 200, "answers again once the worker is free: %d" % status)
# The one worker may still hold the last connection for a moment: every 503
# met on the way to the metrics is one more rejection to count.
rejected = 1
for _ in range(50):
    status, _, data = server.request("GET", "/metrics")
    if status != 503:
        break
    rejected += 1
    time.sleep(0.1)
metrics = data.decode()
check(status == 200 and "kindred_busy_rejections_total %d" % rejected in metrics,
      "metrics count the 503s (%d): %d %s" % (rejected, status, metrics[-300:]))
check(server.stop() == 0, "exit 0")

# Configuration refused: another address without a token, adds without one.
r = run([K, "serve", INDEX, "--listen", "0.0.0.0:0"])
check(r.returncode == 2 and "--token-file" in r.stderr, "non-loopback without a token: " + r.stderr)
r = run([K, "serve", INDEX, "--allow-add"])
check(r.returncode == 2 and "--token-file" in r.stderr, "--allow-add without a token: " + r.stderr)
finish()
