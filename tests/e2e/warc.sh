# End to end: crawl archives. The sample crawl was written by GNU wget
# (tools/make_sample_crawl.py), a WARC writer independent of kindred.
source "$(dirname "$0")/common.bash"

CRAWL=$SOURCE_DIR/sample_corpus/crawl/harbour.warc.gz
TEXTS=$(dirname "$KINDRED")/tools/kindred_texts
BASE=http://127.0.0.1:8765

# Every 2xx HTML or text response is a document, its id the URI.
"$TEXTS" "$CRAWL" >"$WORK/texts.jsonl" 2>"$WORK/counts" || fail "kindred_texts on the crawl"
$PY - "$WORK/texts.jsonl" "$BASE" <<'PY' || fail "documents of the sample crawl"
import json, sys
docs = {}
for line in open(sys.argv[1], encoding="utf-8"):
    d = json.loads(line)
    docs[d["id"]] = " ".join(d["text"].split())
base = sys.argv[2]
want = {base + p for p in ["/", "/news/", "/news/breakwater.html", "/news/breakwater-reprint.html",
        "/news/market.html", "/news/festival.html", "/news/tides.html", "/news/ferry.html",
        "/notice.txt"]}
want.add("metadata://gnu.org/software/wget/warc/wget_arguments.txt")  # a text/plain resource
assert set(docs) == want, sorted(set(docs) ^ want)
checks = {
    "/news/market.html": "\u201cwenlow\u201d pasties and caf\u00e9 cr\u00e8me",  # windows-1252 (HTTP)
    "/news/festival.html": "\u6e2f\u307e\u3064\u308a",                          # Shift_JIS (meta)
    "/news/tides.html": "High water 06:12 Low water 12:31",                     # gzip
    "/news/ferry.html": "leaves at nine and at three. Tickets are sold",        # chunked
    "/news/breakwater.html": "Caf\u00e9 owners on the quay said they're glad & relieved.",
    "/notice.txt": "Notice: the lighthouse steps are closed for repairs.",
}
for path, text in checks.items():
    assert text in docs[base + path], (path, docs[base + path])
for page in docs.values():
    assert "visits" not in page and "margin" not in page, page  # script and style left out
PY

# sweep: the reprint is a drop; the summary counts the records that are not documents.
expect_exit 0 "sweep of the crawl" -- "$KINDRED" sweep "$CRAWL" -t 0.5 --print decisions
grep -q "\"$BASE/news/breakwater-reprint.html\".*drop" "$WORK/out" || fail "reprint not dropped: $(cat "$WORK/out")"
expect_stderr "HTTP status 404: 1" "404 counted"
expect_stderr "response of type image/png: 1" "image counted"
expect_stderr "warcinfo record: 1" "warcinfo counted"
# wget wrote a WARC-Payload-Digest (SHA-1) for every response: all match.
(($(zcat "$CRAWL" | grep -ac '^WARC-Payload-Digest: sha1:') >= 9)) || fail "the crawl lacks payload digests"
grep -q "digest" "$WORK/err" && fail "payload digests of the wget crawl reported as mismatched"
expect_exit 0 "forced format" -- "$KINDRED" sweep --input-format warc -t 0.5 --print decisions - <"$CRAWL"
grep -q "breakwater-reprint.html\".*drop" "$WORK/out" || fail "standard input: reprint not dropped"
# The same archive plain, gzip-compressed as a whole, and zstd-compressed.
gzip -dc "$CRAWL" >"$WORK/plain.warc"
gzip -c "$WORK/plain.warc" >"$WORK/whole.warc.gz"
zstd -q -c "$WORK/plain.warc" >"$WORK/crawl.warc.zst"
"$KINDRED" sweep "$CRAWL" -t 0.5 -q --print decisions >"$WORK/decisions_member.jsonl"
for variant in plain.warc whole.warc.gz crawl.warc.zst; do
  expect_exit 0 "$variant" -- "$KINDRED" sweep "$WORK/$variant" -t 0.5 -q --print decisions
  cmp -s "$WORK/out" "$WORK/decisions_member.jsonl" || fail "$variant: other decisions"
done
expect_exit 0 "record ids" -- "$KINDRED" sweep "$CRAWL" -t 0.5 --warc-id record-id --print decisions
grep -q '"<urn:uuid:' "$WORK/out" || fail "--warc-id record-id: $(head -c 300 "$WORK/out")"

# A directory: its WARC files are read by content, beside text files.
mkdir -p "$WORK/tree/sub"
cp "$CRAWL" "$WORK/tree/sub/crawl.bin"
printf 'A plain text note about the harbour.\n' >"$WORK/tree/note.txt"
expect_exit 0 "a tree with a WARC file" -- "$KINDRED" sweep "$WORK/tree" -t 0.5 --print decisions
expect_stderr "11 documents" "tree: documents of the WARC file and the text file"
"$TEXTS" "$WORK/tree" >"$WORK/tree_texts.jsonl" 2>/dev/null || fail "kindred_texts on a tree"
grep -q '^{"id":"note.txt"' "$WORK/tree_texts.jsonl" || fail "tree: the text file is missing"
mkdir -p "$WORK/warc_tree"
cp "$CRAWL" "$WORK/warc_tree/a.warc.gz"
expect_exit 0 "a tree of WARC files, kept" -- "$KINDRED" sweep "$WORK/warc_tree" --input-format warc \
  -t 0.5 -q --write-kept "$WORK/tree_kept.warc"
"$TEXTS" "$WORK/tree_kept.warc" 2>/dev/null | grep -v 'breakwater-reprint' | wc -l | grep -qx 9 ||
  fail "tree of WARC files: kept documents"

# build and check read crawl archives too; the same URI twice is a duplicate id.
expect_exit 0 "build from the crawl" -- "$KINDRED" build "$WORK/crawl.kin" "$CRAWL" -t 0.5
expect_stderr "10 documents" "build: documents"
expect_exit 0 "check against it" -- "$KINDRED" check "$WORK/crawl.kin" "$CRAWL" -t 0.5
grep -q '"id":"http://127.0.0.1:8765/news/ferry.html","match":"http://127.0.0.1:8765/news/ferry.html"' \
  "$WORK/out" || fail "check: the chunked page does not match itself"
cat "$CRAWL" "$CRAWL" >"$WORK/twice.warc.gz"
expect_exit 3 "the same URI twice" -- "$KINDRED" sweep "$WORK/twice.warc.gz"
expect_stderr 'duplicate id "http://127.0.0.1:8765/"' "duplicate URI named"

# --write-kept: every record byte-identical to an input record, one gzip
# member each, the drop and its request left out, and read back the same.
for kept in kept.warc.gz kept.warc; do
  expect_exit 0 "write-kept $kept" -- "$KINDRED" sweep "$CRAWL" -t 0.5 -q --write-kept "$WORK/$kept"
  "$TEXTS" "$WORK/$kept" >"$WORK/kept_texts.jsonl" 2>/dev/null || fail "reading $kept back"
  grep -v 'breakwater-reprint' "$WORK/texts.jsonl" | cmp -s - "$WORK/kept_texts.jsonl" ||
    fail "$kept: documents read back differ"
  $PY - "$CRAWL" "$WORK/$kept" <<'PY' || fail "$kept: records"
import re, sys, zlib
def members(path):
    data = open(path, "rb").read()
    if data[:2] != b"\x1f\x8b":
        return None, data
    out = []
    while data:
        d = zlib.decompressobj(31)
        out.append(d.decompress(data))
        data = d.unused_data
    return out, b"".join(out)
def records(data):
    # Splits at each "WARC/1." that starts a record (after CRLF CRLF).
    starts = [m.start() for m in re.finditer(rb"(?:^|\r\n\r\n)(WARC/1\.[01]\r\n)", data)]
    starts = [s if s == 0 else s + 4 for s in starts]
    return [data[a:b] for a, b in zip(starts, starts[1:] + [len(data)])]
in_members, in_data = members(sys.argv[1])
out_members, out_data = members(sys.argv[2])
inputs, outputs = records(in_data), records(out_data)
assert set(outputs) <= set(inputs), "a kept record differs from every input record"
if out_members is not None:
    assert out_members == outputs, "not one gzip member per record"
dropped = [r for r in inputs if r not in outputs]
assert len(dropped) == 2, [r[:300] for r in dropped]
assert all(b"breakwater-reprint" in r for r in dropped)
assert sum(r.count(b"WARC-Type: warcinfo") for r in outputs) == 1
PY
done

expect_exit 2 "WARC input without --write-kept" -- "$KINDRED" sweep "$CRAWL" -q --list-kept "$WORK/list.txt"
expect_stderr "is a crawl archive: give --write-kept FILE for its kept records" "WARC kept output named before any reading"
[[ -e $WORK/list.txt ]] && fail "a path list was written for a WARC input"

# Malformed archives: exit 3 naming the file and the record's byte offset,
# and no kept file left behind.
$PY - "$WORK" "$CRAWL" <<'PY'
import gzip, sys, zlib
work, crawl = sys.argv[1], sys.argv[2]
def rec(uri, block, length=None, extra=b""):
    return (b"WARC/1.1\r\nWARC-Type: resource\r\nWARC-Target-URI: " + uri.encode() +
            b"\r\nContent-Type: text/plain\r\n" + extra + b"Content-Length: " +
            str(len(block) if length is None else length).encode() + b"\r\n\r\n" + block + b"\r\n\r\n")
good = rec("http://a/", b"first page")
open(f"{work}/offset", "w").write(str(len(good)))
cases = {
    "wrong_length.warc": good + rec("http://b/", b"second page", length=5),
    "truncated.warc": (good + rec("http://b/", b"second page"))[:-9],
    "no_version.warc": good + b"HTTP/1.1 200 OK\r\n\r\n",
    "long_line.warc": good + b"WARC/1.1\r\nWARC-Type: " + b"x" * (10 << 20) + b"\r\n",
}
for name, data in cases.items():
    open(f"{work}/{name}", "wb").write(data)
member = gzip.compress(rec("http://b/", b"second page " * 1000), mtime=0)
open(f"{work}/cut.warc.gz", "wb").write(gzip.compress(good, mtime=0) + member[: len(member) // 2])
# A response whose gzip content coding expands to 256 MiB (a decompression bomb).
bomb = zlib.compressobj(9, zlib.DEFLATED, 31)
body = b"".join(bomb.compress(b"\0" * (16 << 20)) for _ in range(16)) + bomb.flush()
http = (b"HTTP/1.1 200 OK\r\nContent-Type: text/html\r\nContent-Encoding: gzip\r\n"
        b"Content-Length: " + str(len(body)).encode() + b"\r\n\r\n" + body)
resp = (b"WARC/1.1\r\nWARC-Type: response\r\nWARC-Target-URI: http://bomb/\r\n"
        b"Content-Type: application/http; msgtype=response\r\nContent-Length: " +
        str(len(http)).encode() + b"\r\n\r\n" + http + b"\r\n\r\n")
open(f"{work}/bomb.warc.gz", "wb").write(gzip.compress(good, mtime=0) + gzip.compress(resp, mtime=0))
PY
offset=$(cat "$WORK/offset")
for bad in wrong_length.warc truncated.warc no_version.warc long_line.warc cut.warc.gz bomb.warc.gz; do
  # Memory stays bounded: well under the 10 MB line and the 256 MiB bomb
  # (the bound leaves room for sanitizer builds).
  expect_exit 3 "$bad" -- /usr/bin/time -f "%M" -o "$WORK/rss" \
    "$KINDRED" sweep "$WORK/$bad" --max-document-size 1M -q --write-kept "$WORK/kept_$bad"
  (( $(tail -1 "$WORK/rss") < 200000 )) || fail "$bad: peak memory $(tail -1 "$WORK/rss") KB"
  case $bad in
    cut.warc.gz) expect_stderr "$WORK/$bad: truncated gzip stream" "$bad: file named" ;;
    *) expect_stderr "$WORK/$bad: record at byte $offset" "$bad: file and offset named" ;;
  esac
  [[ -e $WORK/kept_$bad ]] && fail "$bad: a kept file was left"
  compgen -G "$WORK/.kept_$bad.tmp*" >/dev/null && fail "$bad: a temporary kept file was left"
done

# The summary counts the HTML pages and those the reference parser read
# because the fast path declined them (text in a table: foster parenting).
$PY - "$WORK/pages.warc" <<'PY' || fail "pages.warc"
import sys
def rec(uri, block):
    return (b"WARC/1.1\r\nWARC-Type: resource\r\nWARC-Target-URI: " + uri.encode() +
            b"\r\nContent-Type: text/html\r\nContent-Length: " + str(len(block)).encode() +
            b"\r\n\r\n" + block + b"\r\n\r\n")
open(sys.argv[1], "wb").write(rec("http://a/", b"<p>an ordinary page of words</p>") +
                              rec("http://b/", b"<table>stray text in a table</table>") +
                              rec("http://c/", b"<p>another page</p>"))
PY
expect_exit 0 "sweep of html pages" -- "$KINDRED" sweep "$WORK/pages.warc"
expect_stderr "HTML pages        3, 1 of them by the reference parser" "sweep counts the fallback"
expect_exit 0 "build of html pages" -- "$KINDRED" build "$WORK/pages.kin" "$WORK/pages.warc"
expect_stderr "HTML pages        3, 1 of them by the reference parser" "build counts the fallback"
expect_exit 0 "check of html pages" -- "$KINDRED" check "$WORK/pages.kin" "$WORK/pages.warc"
expect_stderr "HTML pages        3, 1 of them by the reference parser" "check counts the fallback"

finish
