#!/usr/bin/python3
"""Makes a JSON Lines corpus of real text from this machine's documentation.

The documents are the text files under /usr/share/doc and /usr/share/man
(gzip-compressed ones decompressed; manual pages as their raw source text),
in sorted path order, one document per file, id = the path. Their
duplication is the machine's own: licence texts shipped by many packages,
manual pages installed under several names and in several languages,
READMEs copied between related packages.

Left out: symbolic links (the file they name is taken once), files with a
NUL byte in their first 64 KiB (binary), and package change logs (long
histories, unlike the pages of a crawl). Each text is cut at the end of the
last line that fits in --max-document-bytes. To keep the corpus near 37 MB
on a full Debian installation, a document is taken when the first byte of
the SHA-1 of its (cut) text is a multiple of --share: copies of one text are
taken or left together, so exact duplication is kept whole.

--copies 3 writes the corpus three times over (ids of the second and third
copy prefixed "copy2:" and "copy3:"): heavy duplication.

The output depends only on the files installed; the script prints the
number of documents and bytes written.

    tools/make_real_corpus.py --out /tmp/real-1.jsonl
    tools/make_real_corpus.py --out /tmp/real-3.jsonl --copies 3
"""

import argparse
import gzip
import hashlib
import json
import os
import sys


def texts(roots, max_bytes, share):
    """(path, text) of every document taken, in sorted path order."""
    for root in roots:
        for dirpath, dirs, files in os.walk(root):
            dirs.sort()
            for name in sorted(files):
                path = os.path.join(dirpath, name)
                if os.path.islink(path) or not os.path.isfile(path):
                    continue
                if "changelog" in name.lower():
                    continue
                try:
                    with open(path, "rb") as f:
                        data = f.read()
                    if path.endswith(".gz"):
                        data = gzip.decompress(data)
                except (OSError, EOFError, gzip.BadGzipFile):
                    continue
                if b"\0" in data[:65536]:
                    continue
                if len(data) > max_bytes:
                    cut = data.rfind(b"\n", 0, max_bytes)
                    data = data[:cut + 1 if cut > 0 else max_bytes]
                if hashlib.sha1(data).digest()[0] % share != 0:
                    continue
                yield path, data.decode("utf-8", "replace")


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--out", required=True)
    parser.add_argument("--copies", type=int, default=1)
    parser.add_argument("--max-document-bytes", type=int, default=12288)
    parser.add_argument("--share", type=int, default=3)
    parser.add_argument("--roots", default="/usr/share/doc,/usr/share/man")
    args = parser.parse_args()
    lines = [json.dumps({"id": path, "text": text}, ensure_ascii=False) + "\n"
             for path, text in texts(args.roots.split(","), args.max_document_bytes, args.share)]
    written = 0
    with open(f"{args.out}.tmp", "w", encoding="utf-8") as out:
        for copy in range(1, args.copies + 1):
            for line in lines:
                if copy > 1:
                    line = line.replace('{"id": "', f'{{"id": "copy{copy}:', 1)
                out.write(line)
                written += len(line.encode("utf-8"))
    os.replace(f"{args.out}.tmp", args.out)
    print(f"{args.out}: {len(lines) * args.copies} documents, {written / 1e6:.1f} MB",
          file=sys.stderr)


if __name__ == "__main__":
    main()
