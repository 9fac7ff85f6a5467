#!/usr/bin/env python3
"""Lists source files over 400 lines and C++ functions over 60 lines.

The project keeps files under about 400 lines and functions under about 60
(DEVELOPERS.md, "Conventions"). A file or function may be longer when a
comment says why:

    // long file: <why>         anywhere in the first 30 lines of the file
    // long function: <why>     on one of the 3 lines before the function

or, for files whose text should not carry it (generated data, code owned
elsewhere for now), an entry of tools/check_sizes_allow.txt:

    PATH                 # why          (the file)
    PATH:FUNCTION        # why          (one function of it)

An entry without its "# why" is itself reported.

Functions are found by a brace-matching heuristic, not a parser: comments,
string and character literals are blanked out, then every `{` whose text
since the previous `;`, `{` or `}` looks like a function head (a parameter
list, not a control statement, class, namespace, enum or initializer) at
namespace or class scope opens a function; its length runs from the first
line of the head to the closing brace. Lambdas and local classes count as
part of the function that holds them.

    tools/check_sizes.py                    # src/ include/ tools/ tests/
    tools/check_sizes.py src/cli            # some paths only
    tools/check_sizes.py --exclude src/core # leave a directory out

Prints one line per finding ("path:line: function Name is 75 lines (limit
60)") and exits 1 when there is one, 0 otherwise.
"""
import argparse
import os
import re
import sys

FILE_LIMIT = 400
FUNCTION_LIMIT = 60
SUFFIXES = (".cc", ".h", ".cpp", ".hpp", ".py", ".sh")
CPP_SUFFIXES = (".cc", ".h", ".cpp", ".hpp")
LONG_FILE = re.compile(r"(//|#)\s*long file:\s*\S")
LONG_FUNCTION = re.compile(r"//\s*long function:\s*\S")
NOT_FUNCTION_WORDS = {"if", "for", "while", "switch", "catch", "do", "else", "try", "return",
                      "sizeof", "decltype", "alignof", "static_assert"}
SCOPE_HEAD = re.compile(r"(namespace|class|struct|union|enum)\b")


def blank_literals(text):
    """Comments, strings and characters replaced by spaces, newlines kept."""
    out = []
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if text.startswith("//", i):
            j = text.find("\n", i)
            j = n if j < 0 else j
            out.append(" " * (j - i))
            i = j
        elif text.startswith("/*", i):
            j = text.find("*/", i + 2)
            j = n if j < 0 else j + 2
            out.append(re.sub(r"[^\n]", " ", text[i:j]))
            i = j
        elif c == "R" and text.startswith('R"', i) and (i == 0 or not text[i - 1].isalnum()):
            m = re.match(r'R"([^(\s]*)\(', text[i:])
            if not m:
                out.append(c)
                i += 1
                continue
            end = text.find(")" + m.group(1) + '"', i)
            j = n if end < 0 else end + len(m.group(1)) + 2
            out.append(re.sub(r"[^\n]", " ", text[i:j]))
            i = j
        elif c in "\"'":
            if c == "'" and i > 0 and text[i - 1].isalnum() and i + 1 < n and text[i + 1].isalnum():
                out.append(" ")  # a digit separator: 1'000
                i += 1
                continue
            j = i + 1
            while j < n and text[j] != c and text[j] != "\n":
                j += 2 if text[j] == "\\" else 1
            j = min(j + 1, n)
            out.append(" " * (j - i))
            i = j
        else:
            out.append(c)
            i += 1
    return "".join(out)


def head_kind(head):
    """'function', 'scope' (namespace, class...) or 'other' for a `{`."""
    head = re.sub(r"^\s*#.*$", "", head, flags=re.M).strip()
    if not head:
        return "other"
    opening = re.sub(r"^template\s*<.*?>\s*", "", head, flags=re.S)
    if SCOPE_HEAD.match(opening) or opening.startswith("extern"):
        # namespace a, class X : public Y, enum class E : int, extern "C"
        return "scope"
    if head.endswith("=") or head.endswith(",") or head.endswith("(") or head.endswith("return"):
        return "other"  # an initializer or an argument
    m = re.match(r"\s*([A-Za-z_]\w*)", head)
    if m and m.group(1) in NOT_FUNCTION_WORDS:
        return "other"
    if "(" not in head or "]" in head.split("(")[0]:
        return "other"  # no parameters, or a lambda
    # The head ends with its parameter list, qualifiers, a trailing return
    # type, or a constructor's initializer list.
    if re.search(r"\)\s*(const|noexcept|override|final|mutable|\s)*(->\s*[\w:<>,\s\*&]+)?$", head):
        return "function"
    if re.search(r"\)\s*:\s*[\w:]+\s*[\({]", head) or re.search(r"[\)\}]\s*$", head):
        return "function"
    return "other"


def function_name(head):
    before = head.split("(")[0].split()
    return before[-1] if before else "?"


def read_allowed(path):
    """The entries of the allow-list; entries without a reason are findings."""
    allowed, findings = set(), []
    if not os.path.exists(path):
        return allowed, findings
    with open(path, encoding="utf-8") as f:
        for number, line in enumerate(f, 1):
            entry, _, why = line.partition("#")
            entry = entry.strip()
            if not entry:
                continue
            if not why.strip():
                findings.append(f"{path}:{number}: allow-list entry {entry} says not why")
            allowed.add(entry)
    return allowed, findings


def check_functions(path, lines, text):
    blank = blank_literals(text)
    findings = []
    stack = []  # (kind, start line, name)
    head_start = 0
    for pos, c in enumerate(blank):
        if c in ";{}":
            if c == "{":
                head = blank[head_start:pos]
                kind = head_kind(head)
                inside = [k for k, _, _ in stack]
                if kind == "function" and any(k in ("function", "other") for k in inside):
                    kind = "other"  # a lambda or local class: part of its function
                first = blank.count("\n", 0, head_start + len(head) - len(head.lstrip()))
                stack.append((kind, first, function_name(head.strip())))
            elif c == "}" and stack:
                kind, first, name = stack.pop()
                last = blank.count("\n", 0, pos)
                length = last - first + 1
                if kind == "function" and length > FUNCTION_LIMIT:
                    allowed = any(LONG_FUNCTION.search(lines[k])
                                  for k in range(max(0, first - 3), first + 1))
                    if not allowed:
                        findings.append(f"{path}:{first + 1}: function {name} is {length} lines "
                                        f"(limit {FUNCTION_LIMIT})")
            head_start = pos + 1
    return findings


def check_file(path):
    with open(path, encoding="utf-8", errors="replace") as f:
        text = f.read()
    lines = text.split("\n")
    count = len(lines) - (1 if text.endswith("\n") else 0)
    findings = []
    if count > FILE_LIMIT and not any(LONG_FILE.search(line) for line in lines[:30]):
        findings.append(f"{path}:1: file is {count} lines (limit {FILE_LIMIT})")
    if path.endswith(CPP_SUFFIXES):
        findings += check_functions(path, lines, text)
    return findings


def walk(paths, excludes):
    for root in paths:
        if os.path.isfile(root):
            yield root
            continue
        for directory, dirs, files in os.walk(root):
            dirs[:] = sorted(d for d in dirs if not d.startswith(".") and d != "build")
            if any(os.path.normpath(directory).startswith(os.path.normpath(e)) for e in excludes):
                dirs[:] = []
                continue
            for name in sorted(files):
                if name.endswith(SUFFIXES):
                    yield os.path.join(directory, name)


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--allow", default=os.path.join(here, "check_sizes_allow.txt"),
                        help="the allow-list (default: tools/check_sizes_allow.txt)")
    parser.add_argument("paths", nargs="*", default=["src", "include", "tools", "tests"])
    parser.add_argument("--exclude", action="append", default=[],
                        help="leave this directory out (repeatable)")
    args = parser.parse_args()
    allowed, findings = read_allowed(args.allow)
    for path in walk(args.paths, args.exclude):
        for finding in check_file(path):
            name = os.path.normpath(path)
            function = re.search(r"function (\S+) is", finding)
            if name in allowed or (function and f"{name}:{function.group(1)}" in allowed):
                continue
            findings.append(finding)
    for line in findings:
        print(line)
    return 1 if findings else 0


if __name__ == "__main__":
    sys.exit(main())
