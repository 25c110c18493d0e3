#!/usr/bin/env python3
"""Size of arcwright's public API and its long functions (issue 8 figures).

Usage: python3 scripts/api_size.py [--doc DIR] [--src DIR]

1. Public items, counted from the rustdoc HTML of `cargo doc --no-deps` (run it
   first, into a clean `target/doc`: stale pages of removed items stay there
   otherwise). rustdoc writes a page only for what
   a user of the crate can reach, so crate-private modules and `pub` items in
   them drop out by themselves. Counted: every item page (module, struct, enum,
   trait, function, type alias, constant, static, macro) plus, on struct, enum
   and trait pages, the public fields, the variants, the inherent methods and
   associated items, and the trait's own methods (trait implementations such as
   `Debug` or `From` are not counted; nor are the redirect pages rustdoc
   writes at the private path of a re-exported item).
2. Functions over 100 lines in `src/`: every `fn` with a body, from the line of
   `fn` to the line of its closing brace, braces matched outside comments,
   strings and character literals. Test modules count like any other code.
"""
import argparse
import os
import re
import sys

PAGE = re.compile(r"^(struct|enum|fn|trait|type|constant|static|macro|union)\.[^.]+\.html$")


def public_items(doc):
    pages, members = 0, 0
    for root, _, files in os.walk(doc):
        for f in files:
            if f == "index.html":
                pages += 1  # a module
                continue
            m = PAGE.match(f)
            if not m:
                continue
            html = open(os.path.join(root, f), encoding="utf-8").read()
            if "<title>Redirection</title>" in html:
                continue  # a redirect page for a re-export, not an item
            pages += 1
            if m.group(1) not in ("struct", "enum", "trait", "union"):
                continue
            members += len(re.findall(r'id="(?:structfield|variant)\.', html))
            if m.group(1) == "trait":
                end = html.find('id="implementors"')
                own = html[: end if end > 0 else len(html)]
                members += len(re.findall(r'id="(?:tymethod|method|associatedtype|associatedconstant)\.', own))
            else:
                start = html.find('id="implementations-list"')
                if start < 0:
                    continue
                end = html.find('id="trait-implementations"', start)
                own = html[start : end if end > 0 else len(html)]
                members += len(re.findall(r'id="(?:method|associatedconstant|associatedtype)\.', own))
    return pages, members


def strip(text):
    """The source with comments, strings and char literals blanked (newlines kept)."""
    out, i, n = [], 0, len(text)
    while i < n:
        c = text[i]
        if text.startswith("//", i):
            j = text.find("\n", i)
            j = n if j < 0 else j
            i = j
        elif text.startswith("/*", i):
            depth, j = 1, i + 2
            while j < n and depth:
                if text.startswith("/*", j):
                    depth, j = depth + 1, j + 2
                elif text.startswith("*/", j):
                    depth, j = depth - 1, j + 2
                else:
                    j += 1
            out.append("\n" * text.count("\n", i, j))
            i = j
        elif c == "r" and re.match(r'r#*"', text[i:]) and (i == 0 or not (text[i - 1].isalnum() or text[i - 1] == "_")):
            hashes = re.match(r'r(#*)"', text[i:]).group(1)
            close = '"' + hashes
            j = text.find(close, i + 2 + len(hashes))
            j = n if j < 0 else j + len(close)
            out.append("\n" * text.count("\n", i, j))
            i = j
        elif c == '"':
            j = i + 1
            while j < n and text[j] != '"':
                j += 2 if text[j] == "\\" else 1
            out.append("\n" * text.count("\n", i, j + 1))
            i = j + 1
        elif c == "'":
            m = re.match(r"'(\\.[^']*|[^'\\])'", text[i:])
            if m:
                i += len(m.group(0))
            else:  # a lifetime
                out.append(c)
                i += 1
        else:
            out.append(c)
            i += 1
    return "".join(out)


FN = re.compile(r"\bfn\s+([A-Za-z_][A-Za-z0-9_]*)")


def long_functions(src, limit=100):
    found = []
    for root, _, files in os.walk(src):
        for f in sorted(files):
            if not f.endswith(".rs"):
                continue
            path = os.path.join(root, f)
            text = strip(open(path, encoding="utf-8").read())
            for m in FN.finditer(text):
                # the body starts at the first `{` before any `;` (a declaration has none)
                k = m.end()
                while k < len(text) and text[k] not in "{;":
                    k += 1
                if k >= len(text) or text[k] == ";":
                    continue
                depth, j = 0, k
                while j < len(text):
                    if text[j] == "{":
                        depth += 1
                    elif text[j] == "}":
                        depth -= 1
                        if depth == 0:
                            break
                    j += 1
                first = text.count("\n", 0, m.start()) + 1
                last = text.count("\n", 0, j) + 1
                if last - first + 1 > limit:
                    found.append((last - first + 1, path, first, m.group(1)))
    return sorted(found, reverse=True)


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--doc", default="target/doc/arcwright")
    ap.add_argument("--src", default="src")
    a = ap.parse_args()
    if os.path.isdir(a.doc):
        pages, members = public_items(a.doc)
        print(f"public items: {pages + members} ({pages} item pages, {members} fields/variants/methods)")
    else:
        print(f"no rustdoc output at {a.doc}; run `cargo doc --no-deps` first", file=sys.stderr)
    long = long_functions(a.src)
    print(f"functions over 100 lines in {a.src}: {len(long)}")
    for lines, path, line, name in long:
        print(f"  {lines:4} lines  {path}:{line}  {name}")


if __name__ == "__main__":
    main()
