#!/usr/bin/env python3
"""The house rules a reviewer would otherwise check by hand (DEVELOPERS.md,
"Rooms and the flow of a run"):

  1. includes run one way: models -> sim -> analysis -> study -> report -> cli
     (a folder includes only itself and the folders before it);
  2. no library source file over 600 lines;
  3. no function over 80 lines (from its first signature line to its closing brace).

Usage: check_layout.py SOURCE_DIR. Prints every breach and exits 1 when there is one.
The function finder is a brace matcher over comment- and string-free text, not a
C++ parser: a brace at namespace or class level whose header ends in ')' (plus
qualifiers) opens a function.
"""
import pathlib
import re
import sys

LAYERS = ["models", "sim", "analysis", "study", "report", "cli"]
MAX_FILE_LINES = 600
MAX_FUNCTION_LINES = 80


def strip(text):
    """Comments and string/char literals blanked out, newlines kept."""
    out, i, n = [], 0, len(text)
    while i < n:
        c = text[i]
        if text.startswith("//", i):
            j = text.find("\n", i)
            j = n if j < 0 else j
            out.append(" " * (j - i)); i = j
        elif text.startswith("/*", i):
            j = text.find("*/", i + 2)
            j = n if j < 0 else j + 2
            out.append(re.sub(r"[^\n]", " ", text[i:j])); i = j
        elif text.startswith('R"', i):
            m = re.match(r'R"([^(]*)\(', text[i:])
            end = text.find(")" + m.group(1) + '"', i)
            j = end + len(m.group(1)) + 2
            out.append('""' + re.sub(r"[^\n]", " ", text[i + 2:j - 1]) ); i = j
        elif c in "\"'":
            j = i + 1
            while j < n and text[j] != c:
                j += 2 if text[j] == "\\" else 1
            out.append(c + " " * (j - i - 1) + c); i = j + 1
        else:
            out.append(c); i += 1
    return "".join(out)


def functions(text):
    """(name, first line, last line) of every function body at namespace or class level."""
    s = re.sub(r"(?m)^[ \t]*#.*$", lambda m: " " * len(m.group(0)), strip(text))  # preprocessor lines
    stack, found, header_start = [], [], 0
    for i, c in enumerate(s):
        if c in ";{}" and all(k == "scope" for k in stack) and c != "{":
            header_start = i + 1
        if c == "{":
            if all(k == "scope" for k in stack):
                header = s[header_start:i]
                if re.search(r"\b(namespace|class|struct|union|enum)\b[^()]*$", header) or re.search(r'extern\s*""\s*$', header):
                    stack.append("scope")
                elif re.search(r"\)\s*(const|noexcept|override|final|mutable|->[^{;]*|\s)*$", header) and not re.search(r"=\s*$", header):
                    name = re.findall(r"([~\w:]+)\s*\(", header)
                    first = s.count("\n", 0, header_start + len(header) - len(header.lstrip())) + 1
                    stack.append(("function", name[0] if name else "?", first))
                else:
                    stack.append("other")
            else:
                stack.append("other")
        elif c == "}":
            if not stack:
                continue
            kind = stack.pop()
            if isinstance(kind, tuple):
                found.append((kind[1], kind[2], s.count("\n", 0, i) + 1))
            if all(k == "scope" for k in stack):
                header_start = i + 1
    return found


def main(root):
    root = pathlib.Path(root)
    breaches = []
    for layer_index, layer in enumerate(LAYERS):
        allowed = set(LAYERS[: layer_index + 1])
        for path in sorted((root / layer).glob("*.[ch]pp")):
            text = path.read_text(encoding="utf-8")
            rel = path.relative_to(root)
            for number, line in enumerate(text.splitlines(), 1):
                m = re.match(r'\s*#\s*include\s+"([a-z_]+)/', line)
                if m and m.group(1) in LAYERS and m.group(1) not in allowed:
                    breaches.append(f"{rel}:{number}: includes {m.group(1)}/, which comes after {layer}/ in the flow")
            lines = text.count("\n")
            if lines > MAX_FILE_LINES:
                breaches.append(f"{rel}: {lines} lines (at most {MAX_FILE_LINES})")
            for name, first, last in functions(text):
                if last - first + 1 > MAX_FUNCTION_LINES:
                    breaches.append(f"{rel}:{first}: {name} is {last - first + 1} lines (at most {MAX_FUNCTION_LINES})")
    for b in breaches:
        print(b)
    print(f"check_layout: {len(breaches)} breach(es)")
    return 1 if breaches else 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1] if len(sys.argv) > 1 else "."))
