"""Helpers of the end-to-end tests of `kindred serve`: start the real
program on a loopback port, talk HTTP to it, stop it."""

import http.client
import json
import os
import re
import signal
import subprocess
import sys
import tempfile
import time

FAILURES = []


def check(condition, what):
    if not condition:
        FAILURES.append(what)
        print("FAIL: " + what, file=sys.stderr)
    return condition


def finish():
    if FAILURES:
        print("%d check(s) failed" % len(FAILURES), file=sys.stderr)
        sys.exit(1)
    print("all checks passed")


def run(args, **kwargs):
    return subprocess.run(args, capture_output=True, text=True, **kwargs)


class Server:
    """The program serving an index on 127.0.0.1, on a port it picks."""

    def __init__(self, kindred, index, *args, token=None, workdir=None, preexec_fn=None):
        self.workdir = workdir or tempfile.mkdtemp()
        self.token = token
        self.log_path = os.path.join(self.workdir, "serve-%d.log" % time.monotonic_ns())
        command = [kindred, "serve", index, "--listen", "127.0.0.1:0", *args]
        if token is not None:
            token_path = os.path.join(self.workdir, "token")
            with open(token_path, "w") as f:
                f.write(token + "\n")
            command += ["--token-file", token_path]
        self.log = open(self.log_path, "w")
        self.process = subprocess.Popen(command, stderr=self.log, stdout=subprocess.DEVNULL,
                                        preexec_fn=preexec_fn)
        self.port = self._wait_for_port()

    def _wait_for_port(self):
        deadline = time.monotonic() + 30
        while time.monotonic() < deadline:
            with open(self.log_path) as f:
                found = re.search(r"listening on http://127\.0\.0\.1:(\d+)/", f.read())
            if found:
                return int(found.group(1))
            if self.process.poll() is not None:
                raise RuntimeError("serve exited %d: %s" % (self.process.returncode, self.text_log()))
            time.sleep(0.02)
        raise RuntimeError("serve did not start: " + self.text_log())

    def text_log(self):
        with open(self.log_path) as f:
            return f.read()

    def request(self, method, path, body=None, content_type="application/json", token=None,
                headers=None, timeout=60):
        """(status, headers dict, body bytes); a dict body is sent as JSON."""
        connection = http.client.HTTPConnection("127.0.0.1", self.port, timeout=timeout)
        all_headers = dict(headers or {})
        if isinstance(body, (dict, list)):
            body = json.dumps(body).encode()
        elif isinstance(body, str):
            body = body.encode()
        if body is not None:
            all_headers["Content-Type"] = content_type
        token = self.token if token is None else token
        if token:
            all_headers["Authorization"] = "Bearer " + token
        connection.request(method, path, body=body, headers=all_headers)
        response = connection.getresponse()
        data = response.read()
        connection.close()
        return response.status, {k.lower(): v for k, v in response.getheaders()}, data

    def json(self, method, path, body=None, **kwargs):
        status, headers, data = self.request(method, path, body, **kwargs)
        try:
            return status, json.loads(data)
        except ValueError:
            return status, {"unparsed": data.decode("utf-8", "replace")}

    def stop(self, sig=signal.SIGTERM, timeout=30):
        """Sends `sig` and returns the exit status."""
        self.process.send_signal(sig)
        try:
            return self.process.wait(timeout=timeout)
        finally:
            self.log.close()


def jsonl(text):
    return [json.loads(line) for line in text.splitlines() if line.strip()]


def read_documents(directory):
    """[(id, text)] of the files of a directory, ids as kindred gives them."""
    out = []
    for name in sorted(os.listdir(directory)):
        with open(os.path.join(directory, name), "rb") as f:
            out.append((name, f.read().decode("utf-8", "replace")))
    return out
