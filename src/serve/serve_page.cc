// The page served at GET /: one self-contained HTML document (no external
// resources) for editors: paste a text or pick files, check them against
// the index, and read each match with its exact Jaccard similarity and
// containments, and the passages of the upload whose shingles the matched
// document holds, highlighted.
#include "serve/serve_http.h"

namespace kindred::serve {

const char* ServicePage() {
  return R"PAGE(<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>kindred: check an upload</title>
<style>
body { font: 15px/1.45 system-ui, sans-serif; margin: 1.5em auto; max-width: 60em; padding: 0 1em; color: #222; }
h1 { font-size: 1.4em; margin-bottom: .2em; }
.caution { background: #fff6d6; border: 1px solid #e0c860; padding: .6em .8em; border-radius: 4px; }
textarea { width: 100%; min-height: 10em; font: inherit; box-sizing: border-box; }
fieldset { border: 1px solid #ccc; border-radius: 4px; margin: .8em 0; }
label { margin-right: 1em; }
button { font: inherit; padding: .35em 1.2em; }
table { border-collapse: collapse; margin: .5em 0; }
th, td { border-bottom: 1px solid #ddd; padding: .25em .6em; text-align: left; }
td.num { text-align: right; font-variant-numeric: tabular-nums; }
.upload { border-top: 2px solid #888; margin-top: 1.2em; }
.passages { white-space: pre-wrap; background: #f7f7f7; padding: .6em; border-radius: 4px; max-height: 30em; overflow: auto; }
mark { background: #ffd27a; }
#status.error { color: #a00; }
</style>
</head>
<body>
<h1>Check an upload against the archive</h1>
<p class="caution"><strong>Caution:</strong> similarity of text is not proof of copying.
Shared passages can be quotations, common phrases, notices or a licensed reprint.
A decision that affects a person (rejecting an upload, a plagiarism or copyright claim)
needs a human look at both documents.</p>
<form id="form">
<fieldset>
<legend>Upload</legend>
<p><label for="text">Paste a text</label><br>
<textarea id="text" name="text" placeholder="Paste the text to check"></textarea></p>
<p><label for="files">or pick files (each one document)</label>
<input type="file" id="files" name="files" multiple></p>
</fieldset>
<fieldset>
<legend>Options</legend>
<label>Threshold <input type="number" id="threshold" min="0.01" max="1" step="0.01" placeholder="index default"></label>
<label>Measure <select id="measure"><option value="">index default</option><option>jaccard</option><option>containment</option></select></label>
<label>Token <input type="password" id="token" autocomplete="off" placeholder="if the service needs one"></label>
</fieldset>
<button type="submit" id="submit">Check</button> <span id="status" role="status"></span>
</form>
<div id="results"></div>
<script>
"use strict";
const $ = (id) => document.getElementById(id);
function el(tag, attrs, text) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) e.setAttribute(k, v);
  if (text !== undefined) e.textContent = text;
  return e;
}
function pct(x) { return (100 * x).toFixed(1) + "%"; }
// The text with the byte spans [begin, end) of its UTF-8 form marked.
function marked(text, spans) {
  const bytes = new TextEncoder().encode(text);
  const dec = new TextDecoder();
  const box = el("div", {"class": "passages"});
  let at = 0;
  for (const [b, e] of spans) {
    if (b > at) box.appendChild(document.createTextNode(dec.decode(bytes.slice(at, b))));
    box.appendChild(el("mark", {}, dec.decode(bytes.slice(b, e))));
    at = e;
  }
  if (at < bytes.length) box.appendChild(document.createTextNode(dec.decode(bytes.slice(at))));
  return box;
}
function show(docs, reply) {
  const out = $("results");
  out.textContent = "";
  out.appendChild(el("p", {"id": "summary"}, reply.checked + " document(s) checked, " +
      reply.matched + " match archived documents (" + reply.seconds.toFixed(3) + " s)."));
  docs.forEach((doc, i) => {
    const section = el("section", {"class": "upload", "data-id": doc.id});
    section.appendChild(el("h2", {}, doc.id));
    const mine = reply.matches.filter((m) => m.id === doc.id);
    if (mine.length === 0) {
      section.appendChild(el("p", {"class": "none"}, "No match at the threshold."));
      out.appendChild(section);
      return;
    }
    const table = el("table");
    const head = el("tr");
    for (const h of ["match", "in", "Jaccard", "upload in match", "match in upload", "shared shingles"])
      head.appendChild(el("th", {}, h));
    table.appendChild(head);
    for (const m of mine) {
      const row = el("tr", {"class": "match", "data-match": m.match});
      row.appendChild(el("td", {}, m.match));
      row.appendChild(el("td", {}, m.match_in === "index" ? "archive" : "this upload"));
      row.appendChild(el("td", {"class": "num jaccard"}, m.jaccard.toFixed(4)));
      row.appendChild(el("td", {"class": "num"}, pct(m.containment_id_in_match)));
      row.appendChild(el("td", {"class": "num"}, pct(m.containment_match_in_id)));
      row.appendChild(el("td", {"class": "num"}, m.shared + " of " + m.shingles_id));
      table.appendChild(row);
    }
    section.appendChild(table);
    for (const m of mine) {
      section.appendChild(el("h3", {}, "Passages of the upload found in " + m.match));
      const box = marked(doc.text, m.marked_spans || []);
      box.setAttribute("data-match", m.match);
      section.appendChild(box);
    }
    out.appendChild(section);
  });
}
$("form").addEventListener("submit", async (event) => {
  event.preventDefault();
  const status = $("status");
  status.className = "";
  status.textContent = "Checking...";
  const docs = [];
  if ($("text").value.trim() !== "") docs.push({id: "pasted text", text: $("text").value});
  for (const file of $("files").files) docs.push({id: file.name, text: await file.text()});
  if (docs.length === 0) { status.textContent = "Paste a text or pick a file first."; return; }
  const body = {documents: docs, marked_spans: true};
  if ($("threshold").value !== "") body.threshold = Number($("threshold").value);
  if ($("measure").value !== "") body.measure = $("measure").value;
  const headers = {"Content-Type": "application/json"};
  if ($("token").value !== "") headers["Authorization"] = "Bearer " + $("token").value;
  try {
    const res = await fetch("/v1/check", {method: "POST", headers, body: JSON.stringify(body)});
    const reply = await res.json();
    if (!res.ok) throw new Error(reply.error + " (" + reply.kind + ")");
    status.textContent = "Done.";
    show(docs, reply);
  } catch (e) {
    status.className = "error";
    status.textContent = "Error: " + e.message;
  }
});
</script>
</body>
</html>
)PAGE";
}

}  // namespace kindred::serve
