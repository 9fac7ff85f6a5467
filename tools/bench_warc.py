#!/usr/bin/python3
"""Crawl archive benchmark: sweeping a .warc.gz of HTML pages.

Makes (once, deterministically) build/bench/pages.warc.gz: WARC/1.1 response
records, one gzip member each, of HTML pages built from the real text of
this machine's documentation (/usr/share/doc: changelogs, READMEs,
copyright files) inside real-world markup (head with styles and scripts,
navigation lists, article paragraphs with inline links and entities,
tables, asides, footers, comments); about one page in ten is a reprint of
an earlier one with a new headline and navigation. At least --mb MB of HTML.

Then measures, in the same run (medians of --runs, alternating, as
tools/bench.py does):
  1. kindred sweep -j 1 of the file against `gzip -dc FILE > /dev/null`;
  2. HTML to text alone (kindred_texts --html-speed, in memory, on a
     sample of the pages) in MB/s: kindred's fast path (with the pages it
     declines left to Gumbo, and how many), Gumbo alone (the reference),
     and the whole payload step (charset conversion + HTML to text);
     beside html5lib's tree building plus the same walk
     (tests/reference/html_text_reference.py);
  3. the same documents as WARC and as JSON Lines of their texts
     (kindred_texts): pairs and groups must be byte-identical.

    tools/bench_warc.py [--mb 200] [--runs 3]
"""
import argparse
import glob
import gzip
import hashlib
import html
import json
import os
import pathlib
import random
import subprocess
import sys
import time

ROOT = pathlib.Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "tools"))
sys.path.insert(0, str(ROOT / "tests" / "reference"))
import bench  # noqa: E402

STYLE = "".join(f".c{i} {{ margin: {i}px; color: #{i:03x}; font-family: sans-serif }}\n"
                for i in range(60))
SCRIPT = ("window.dataLayer = window.dataLayer || []; function track(a, b) { if (a < b && b > 0) "
          "{ dataLayer.push({'event': a}); } return '<div>' + a + '</div>'; }\n") * 12


def paragraphs():
    """Paragraphs of real text from /usr/share/doc, in a fixed order."""
    files = sorted(glob.glob("/usr/share/doc/*/changelog*.gz") +
                   glob.glob("/usr/share/doc/*/README*") +
                   glob.glob("/usr/share/doc/*/copyright"))
    out = []
    for path in files:
        try:
            raw = gzip.open(path).read() if path.endswith(".gz") else open(path, "rb").read()
        except OSError:
            continue
        text = raw.decode("utf-8", "replace")
        for block in text.split("\n\n"):
            block = " ".join(block.split())
            if len(block) > 80:
                out.append(block)
    return out


def page(rng, title, paras, nav_seed):
    nav = "".join(f'<li class="c{(nav_seed + i) % 60}"><a href="/section/{(nav_seed * 7 + i) % 997}">'
                  f"Section {(nav_seed * 7 + i) % 997}</a></li>" for i in range(25))
    body = []
    for i, p in enumerate(paras):
        words = html.escape(p).split(" ")
        if len(words) > 8:
            k = rng.randrange(1, len(words) - 4)
            words[k] = f'<a href="/ref/{k}">{words[k]}</a>'
            words[k + 2] = f"<em>{words[k + 2]}</em>"
        body.append(f'<p class="c{i % 60}">{" ".join(words)}&nbsp;</p>')
        if i % 6 == 5:
            body.append(f"<h3>Part {i // 6}</h3><!-- section break {i} -->")
    table = "".join(f"<tr><td>{r}</td><td>{r * r}</td><td>row&nbsp;{r}</td></tr>" for r in range(8))
    return (f"<!DOCTYPE html>\n<html lang=en><head><meta charset=utf-8><title>{html.escape(title)}"
            f"</title><link rel=stylesheet href=/main.css><style>{STYLE}</style>"
            f"<script>{SCRIPT}</script></head>\n<body><div id=wrap><header><ul class=nav>{nav}"
            f"</ul></header>\n<main><article><h1>{html.escape(title)}</h1>\n" + "\n".join(body) +
            f"</article><aside><table>{table}</table></aside></main>\n<footer>&copy; Example "
            f"Press &amp; partners <a href=/about>About</a><script>track(1, 2)</script></footer>"
            f"</div></body></html>\n")


def make_archive(path, mb):
    rng = random.Random(2)
    pool = paragraphs()
    print(f"generating {path}: {len(pool)} paragraphs of /usr/share/doc text", file=sys.stderr)
    total = 0
    n = 0
    made = []
    with open(path, "wb") as out:
        while total < mb * 1_000_000:
            if n % 10 == 9 and made:
                title, paras = made[rng.randrange(len(made))]
                title = "Reprint: " + title
            else:
                start = rng.randrange(len(pool))
                paras = pool[start:start + rng.randint(8, 30)]
                title = paras[0][:60]
                made.append((title, paras))
            body = page(rng, title, paras, n).encode("utf-8")
            total += len(body)
            http = (b"HTTP/1.1 200 OK\r\nContent-Type: text/html; charset=utf-8\r\n"
                    b"Content-Length: %d\r\n\r\n" % len(body)) + body
            digest = hashlib.sha1(str(n).encode()).hexdigest()
            record = (b"WARC/1.1\r\nWARC-Type: response\r\nWARC-Target-URI: http://example.test/page/%d\r\n"
                      b"WARC-Record-ID: <urn:uuid:%s>\r\nContent-Type: application/http; msgtype=response\r\n"
                      b"Content-Length: %d\r\n\r\n" % (n, digest[:32].encode(), len(http)))
            out.write(gzip.compress(record + http + b"\r\n\r\n", compresslevel=6, mtime=0))
            n += 1
    print(f"{n} pages, {total / 1e6:.1f} MB of HTML, file {os.path.getsize(path) / 1e6:.1f} MB",
          file=sys.stderr)
    return n, total


def extraction_speed(kindred_texts, warc, work, sample_mb):
    pages_path = work / "pages_html.jsonl"
    if not pages_path.exists():
        with gzip.open(warc) as f, open(pages_path, "w") as out:
            data = f.read(int(sample_mb * 1.3e6))
            for record in data.split(b"\r\n\r\nWARC/1.1")[:-1]:
                body = record.split(b"\r\n\r\n", 2)
                if len(body) == 3:
                    out.write(json.dumps({"html": body[2].decode("utf-8")}) + "\n")
    ours = subprocess.run([str(kindred_texts), "--html-speed", str(pages_path), "3"], check=True,
                          capture_output=True, text=True).stdout.strip()
    print(f"\nHTML to text alone, kindred: {ours}")
    import html_text_reference as ref
    htmls = [json.loads(line)["html"] for line in open(pages_path)][:150]
    start = time.monotonic()
    size = 0
    for h in htmls:
        ref.text_of(ref.html5lib.HTMLParser(tree=ref.html5lib.getTreeBuilder("etree"),
                                            namespaceHTMLElements=False).parse(h))
        size += len(h.encode())
    elapsed = time.monotonic() - start
    print(f"HTML to text alone, html5lib reference: {len(htmls)} pages, {size / 1e6:.1f} MB, "
          f"{elapsed:.2f} s, {size / 1e6 / elapsed:.2f} MB/s")


def same_results(kindred, kindred_texts, warc, work):
    texts = work / "texts.jsonl"
    with open(texts, "wb") as out:
        run = subprocess.run([str(kindred_texts), str(warc)], stdout=out, stderr=subprocess.PIPE,
                             check=True, text=True)
    paths = [line for line in run.stderr.splitlines() if line.startswith("HTML pages:")]
    if paths:
        fast, reference = [int(w) for w in paths[0].replace(",", " ").split() if w.isdigit()]
        print(f"\nthe whole archive: {paths[0]} (fallback rate "
              f"{100.0 * reference / max(1, fast + reference):.2f}%)")
    outputs = {}
    for name, source in (("warc", warc), ("jsonl", texts)):
        d = work / f"out_{name}"
        subprocess.run(["rm", "-rf", str(d)], check=True)
        subprocess.run([str(kindred), "sweep", str(source), "-q", "-o", str(d)], check=True)
        outputs[name] = {f: (d / f).read_bytes() for f in sorted(os.listdir(d))}
    same = outputs["warc"] == outputs["jsonl"]
    pairs = outputs["warc"].get("pairs.jsonl", b"").count(b"\n")
    groups = outputs["warc"].get("groups.jsonl", b"").count(b"\n")
    print(f"\nWARC vs JSON Lines of the same texts: {pairs} pairs, {groups} groups; outputs "
          f"{'byte-identical' if same else 'DIFFER'} ({', '.join(outputs['warc'])})")
    return same


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--mb", type=float, default=200)
    parser.add_argument("--runs", type=int, default=3)
    parser.add_argument("--build", default=str(ROOT / "build"))
    args = parser.parse_args()
    build = pathlib.Path(args.build)
    kindred, kindred_texts = build / "kindred", build / "tools" / "kindred_texts"
    work = build / "bench"
    work.mkdir(exist_ok=True)
    warc = work / f"pages_{int(args.mb)}.warc.gz"
    if not warc.exists():
        make_archive(warc, args.mb)
    print(f"input: {warc} ({os.path.getsize(warc) / 1e6:.1f} MB compressed)")
    a, b, ratio = bench.compare(
        "sweep of the .warc.gz, one thread (A) vs gzip -dc of it (B)",
        [str(kindred), "sweep", str(warc), "-j", "1", "-q", "--print", "none"],
        ["sh", "-c", f"gzip -dc {warc} >/dev/null"], args.runs)
    print(f"  sweep speed relative to gzip -dc: {ratio:.2f}x (bar: at least 0.5x)")
    extraction_speed(kindred_texts, warc, work, 40)
    ok = same_results(kindred, kindred_texts, warc, work)
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
