#!/usr/bin/python3
"""Writes invented HTML pages, plain and hostile, for the HTML-to-text
comparison with html5lib: DIR/page_NNN.html.

Usage: hostile_pages.py DIR [COUNT]
The first pages are fixed cases; the rest are random mixes (seeded, so the
same every run) of hostile fragments: unclosed and misnested tags, comments
inside scripts, stray '&', CDATA, NUL bytes, foreign content, raw text
elements, tables with stray text, broken character references.
"""
import os
import random
import sys

FIXED = [
    b"<!DOCTYPE html><html><head><title>T</title></head><body><p>Plain page.</p></body></html>",
    b"<p>one<p>two<div>three</div>four<br>five<span>six</span>seven",
    b"<b>bold<i>both</b>italic</i> after <a href=x>link<p>para</a> end",
    b"<script>var a = '<!-- </script>'; b</script>after script",
    b"<script><!-- document.write('<script>x</script>'); --></script>visible",
    b"fish & chips &amp c&eacute &notin; &notit; &#0; &#x110000; &#xD800; &#65 &#x41;",
    b"a<![CDATA[b<c]]>d <svg><![CDATA[inside svg]]></svg> e",
    b"nul\x00byte <p>\x00</p> <textarea>t\x00a</textarea>",
    b"<table>stray<tr>text<td>cell</td>more</tr></table>after",
    b"<table><td>a<table><td>b</table>c</table>",
    b"<math><mi>x</mi><annotation-xml encoding='text/html'><p>in math</p></annotation-xml></math>"
    b"<svg><foreignObject><p>in svg</p></foreignObject><desc>d</desc></svg>out",
    b"<select><option>one<option>two</select><button><p>in button</button>",
    b"<noscript><p>no script</p></noscript><noembed>ne</noembed><noframes>nf</noframes>",
    b"<iframe>raw <b>text</b></iframe><xmp>x<b>mp</b></xmp><plaintext>rest <b>is</b> text",
    b"<head><noscript><style>s</style></noscript><meta charset=utf-8></head>body<title>t2</title>",
    b"<template><p>hidden</p></template><table><template>t</template><tr><td>cell2",
    b"<ul><li>one<li>two</ul><dl><dt>term<dd>def</dl><h1>head<h2>sub</h2>",
    b"<ruby>kan<rp>(</rp><rt>ji</rt><rp>)</rp></ruby> <wbr>w<custom-el>ce</custom-el>x<foo>y</foo>",
    b"<frameset><frame src=a></frameset>text after frameset",
    b"</br></p>end tags<image src=x>img<isindex>",
    b"<div><!-- comment -- with -- dashes -->c</div><!-->d<!--->e<!---->f",
    b"<p>caf\xc3\xa9 \xe6\xb8\xaf \xf0\x9f\x90\x9f invalid \xff\xfe utf8 \xc3</p>",
    b"<meta charset=windows-1252><p>caf\xe9 \x93quote\x94</p>",
    b"<meta http-equiv=content-type content='text/html; charset=shift_jis'><p>\x82\xa0\x82\xa2</p>",
    b"\xef\xbb\xbf<p>bom page</p>",
    b"<style>p{}</style><STYLE>q{}</STYLE><Script>s</SCRIPT>case",
    b"<a><a>nested</a></a><nobr>a<nobr>b</nobr>c",
    b"<body><body>two bodies</body></body></html></html>after html",
    b"<pre>\nline\n  indented</pre><listing>\nl</listing>",
    b"a<b<c>d</b>e <p =x>f</p> <1>g</1> <>h</> <!x>i",
]

FRAGMENTS = [
    b"<p>", b"</p>", b"<div>", b"</div>", b"<b>", b"</b>", b"<i>", b"</i>", b"<span>", b"</span>",
    b"<table>", b"</table>", b"<tr>", b"<td>", b"</td>", b"<li>", b"<ul>", b"</ul>", b"<br>",
    b"<script>", b"</script>", b"<style>", b"</style>", b"<!--", b"-->", b"<![CDATA[", b"]]>",
    b"&", b"&amp;", b"&lt", b"&#", b"&#x", b"\x00", b"<svg>", b"</svg>", b"<math>", b"</math>",
    b"<template>", b"</template>", b"<noscript>", b"</noscript>", b"<textarea>", b"</textarea>",
    b"<title>", b"</title>", b"<head>", b"</head>", b"<body>", b"<a href='x'>", b"</a>",
    b"<select>", b"<option>", b"</select>", b"<h1>", b"</h1>", b"<button>", b"<form>",
    b"<frameset>", b"<xmp>", b"</xmp>", b"<iframe>", b"</iframe>", b"<plaintext>", b"<custom-tag>",
    b"<unknown>", b"</unknown>", b"<foreignObject>", b"<mi>", b"<desc>", b"<caption>", b"<col>",
    b"<nobr>", b"<ruby>", b"<rt>", b"<dd>", b"<pre>", b"<!DOCTYPE html>", b"<html>", b"</html>",
]
WORDS = [b"harbour", b"tide", b"ferry", b"quay", b"lantern", b"mackerel", b"caf\xc3\xa9",
         b"\xe6\xb8\xaf", b"42", b"storm", b"x", b"rope"]


def random_page(rng):
    parts = []
    for _ in range(rng.randint(5, 60)):
        parts.append(rng.choice(FRAGMENTS) if rng.random() < 0.5 else rng.choice(WORDS))
        if rng.random() < 0.5:
            parts.append(b" " if rng.random() < 0.7 else b"")
    return b"".join(parts)


def main():
    out = sys.argv[1]
    count = int(sys.argv[2]) if len(sys.argv) > 2 else 200
    os.makedirs(out, exist_ok=True)
    rng = random.Random(14)
    pages = FIXED + [random_page(rng) for _ in range(max(0, count - len(FIXED)))]
    for i, page in enumerate(pages):
        with open(os.path.join(out, f"page_{i:03d}.html"), "wb") as f:
            f.write(page)


if __name__ == "__main__":
    main()
