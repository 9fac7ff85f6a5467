#!/usr/bin/env python3
"""Makes sample_corpus/crawl/harbour.warc.gz: a small crawl of invented pages.

A loopback HTTP server (Python's http.server on 127.0.0.1) serves the pages
of a fictional harbour town's web site: pages in UTF-8, windows-1252 (charset
in the HTTP header) and Shift_JIS (charset only in a <meta> element), a page
sent gzip-compressed, one sent with chunked transfer coding, a redirect, an
image, a plain text notice and a link to a page that does not exist (404).
Two of the pages are near-duplicates (a reprint with a new headline).
GNU wget crawls the site and writes the WARC file (--warc-file), so the
archive comes from a program independent of kindred.

Usage: tools/make_sample_crawl.py [OUTPUT.warc.gz]   (port: $CRAWL_PORT or 8765)
"""
import gzip
import http.server
import os
import subprocess
import sys
import tempfile
import threading

PORT = int(os.environ.get("CRAWL_PORT", "8765"))

STORY = (
    "The harbour master of Port Wenlow confirmed on Tuesday that the old east breakwater "
    "will be rebuilt before the autumn storms. Fishing crews have asked for the work since "
    "the gale of last March opened a gap near the lighthouse steps, and the council voted "
    "to pay for new granite blocks from the quarry at Hollin Ridge. Boats will use the west "
    "channel while the cranes are in place, and the ferry timetable stays as it is.")

PAGES = {}


def page(title, body, charset="utf-8", head_extra=""):
    return (f"<!DOCTYPE html>\n<html><head>{head_extra}<title>{title}</title>"
            f"<style>p {{ margin: 0 }}</style><script>var visits = 1 < 2;</script></head>\n"
            f"<body><nav><a href=\"/\">Home</a> | <a href=\"/news/\">News</a></nav>\n"
            f"<h1>{title}</h1>\n{body}\n<footer>Port Wenlow Gazette</footer></body></html>\n")


def build_pages():
    index = page("Port Wenlow Gazette", "<ul>" + "".join(
        f"<li><a href=\"{href}\">{text}</a></li>" for href, text in [
            ("/news/breakwater.html", "Breakwater"),
            ("/news/breakwater-reprint.html", "Reprint"),
            ("/news/market.html", "Market"),
            ("/news/festival.html", "Festival"),
            ("/news/tides.html", "Tides"),
            ("/news/ferry.html", "Ferry"),
            ("/old-notice", "Old notice"),
            ("/notice.txt", "Notice"),
            ("/news/missing.html", "Missing"),
        ]) + "</ul><img src=\"/lighthouse.png\" alt=\"the lighthouse\">")
    PAGES["/"] = ("text/html; charset=utf-8", index.encode(), {})
    PAGES["/news/breakwater.html"] = ("text/html", page(
        "Breakwater to be rebuilt", f"<p>{STORY}</p><p>Caf&eacute; owners on the quay said"
        " they&#39;re glad &amp; relieved.</p>", head_extra='<meta charset="utf-8">').encode(), {})
    reprint = STORY.replace("Tuesday", "Wednesday")
    PAGES["/news/breakwater-reprint.html"] = ("text/html; charset=utf-8", page(
        "East breakwater work approved", f"<div class=story><p>{reprint}<br>Reprinted from the "
        "Port Wenlow Gazette.</div>").encode(), {})
    market = page("Market day on the quay", "<p>Stalls sell smoked mackerel, "
                  "\u201cwenlow\u201d pasties and caf\u00e9 cr\u00e8me at the Saturday market. "
                  "The market opens at eight.</p>")
    PAGES["/news/market.html"] = ("text/html; charset=windows-1252",
                                  market.encode("windows-1252"), {})
    festival = page("\u6e2f\u307e\u3064\u308a", "<p>\u6e2f\u753a\u306e\u590f\u307e\u3064\u308a"
                    "\u306f\u571f\u66dc\u65e5\u306b\u958b\u304b\u308c\u307e\u3059\u3002"
                    "Lantern boats leave the quay at dusk.</p>",
                    head_extra='<meta http-equiv="Content-Type" content="text/html; '
                               'charset=Shift_JIS">')
    PAGES["/news/festival.html"] = ("text/html", festival.encode("shift_jis"), {})
    tides = page("Tide tables", "<table><tr><td>High water</td><td>06:12</td></tr>"
                 "<tr><td>Low water</td><td>12:31</td></tr></table>")
    PAGES["/news/tides.html"] = ("text/html; charset=utf-8", gzip.compress(tides.encode(), mtime=0),
                                 {"Content-Encoding": "gzip"})
    ferry = page("Ferry timetable", "<p>The ferry to Skerry Island leaves at nine and at "
                 "three.<p>Tickets are sold on board.")
    PAGES["/news/ferry.html"] = ("text/html; charset=utf-8", ferry.encode(), {"chunked": True})
    PAGES["/notice.txt"] = ("text/plain; charset=utf-8",
                            b"Notice: the lighthouse steps are closed for repairs.\n", {})
    # An 8x8 grey PNG.
    png = bytes.fromhex(
        "89504e470d0a1a0a0000000d4948445200000008000000080800000000e164e157"
        "0000000e49444154789c6368a0123000001c80010152adbcc40000000049454e44ae426082")
    PAGES["/lighthouse.png"] = ("image/png", png, {})
    PAGES["/news/"] = ("text/html; charset=utf-8", page("News", "<p>See the front page.</p>").encode(), {})


class Handler(http.server.BaseHTTPRequestHandler):
    protocol_version = "HTTP/1.1"

    def log_message(self, *args):
        pass

    def do_GET(self):
        if self.path == "/old-notice":
            self.send_response(301)
            self.send_header("Location", "/notice.txt")
            self.send_header("Content-Length", "0")
            self.end_headers()
            return
        if self.path not in PAGES:
            body = b"<html><body><h1>Not found</h1></body></html>"
            self.send_response(404)
            self.send_header("Content-Type", "text/html")
            self.send_header("Content-Length", str(len(body)))
            self.end_headers()
            self.wfile.write(body)
            return
        content_type, body, extra = PAGES[self.path]
        self.send_response(200)
        self.send_header("Content-Type", content_type)
        if extra.get("chunked"):
            self.send_header("Transfer-Encoding", "chunked")
            self.end_headers()
            for i in range(0, len(body), 100):
                part = body[i:i + 100]
                self.wfile.write(b"%x\r\n%s\r\n" % (len(part), part))
            self.wfile.write(b"0\r\n\r\n")
            return
        for name, value in extra.items():
            self.send_header(name, value)
        self.send_header("Content-Length", str(len(body)))
        self.end_headers()
        self.wfile.write(body)


def main():
    out = sys.argv[1] if len(sys.argv) > 1 else os.path.join(
        os.path.dirname(__file__), "..", "sample_corpus", "crawl", "harbour.warc.gz")
    out = os.path.abspath(out)
    os.makedirs(os.path.dirname(out), exist_ok=True)
    build_pages()
    server = http.server.ThreadingHTTPServer(("127.0.0.1", PORT), Handler)
    threading.Thread(target=server.serve_forever, daemon=True).start()
    with tempfile.TemporaryDirectory() as work:
        # Relative names only: wget records its arguments in the archive.
        subprocess.run(["wget", "--recursive", "--level=2", "--page-requisites", "--no-verbose",
                        "--tries=1", "-e", "robots=off", "--directory-prefix", "site",
                        "--warc-file=crawl", "--no-warc-keep-log",
                        f"http://127.0.0.1:{PORT}/"], check=False, cwd=work)
        os.replace(os.path.join(work, "crawl.warc.gz"), out)
    server.shutdown()
    print(out)


if __name__ == "__main__":
    main()
