"""Copy the docstrings of ``python/specwell/_core.pyi`` into the ``///`` doc comments of the
bindings in ``src/python/*.rs``, so that ``help()`` on the compiled objects shows the same
numpydoc text as the stub.

The stub is the source text: edit a docstring there, run ``python tools/sync_docs.py``, rebuild.
``tests/test_docs.py`` fails when the two disagree. Only ``///`` lines (and the message string of
``create_exception!``) are rewritten; code and attributes are left as they are.

``python tools/sync_docs.py --check`` exits 1 (and lists the items) if a rewrite would change a file.
"""

from __future__ import annotations

import ast
import inspect
import pathlib
import re
import sys

ROOT = pathlib.Path(__file__).resolve().parents[1]
STUB = ROOT / "python" / "specwell" / "_core.pyi"
RUST = sorted((ROOT / "src" / "python").glob("*.rs"))


def stub_docs() -> tuple[dict, dict, dict]:
    """(class docs, {class: {member: doc}}, function docs) of the stub, cleaned with inspect.cleandoc."""
    tree = ast.parse(STUB.read_text(encoding="utf-8"))
    classes, members, functions = {}, {}, {}
    for node in tree.body:
        if isinstance(node, ast.ClassDef):
            doc = ast.get_docstring(node)
            if doc:
                classes[node.name] = doc
            members[node.name] = {
                item.name: ast.get_docstring(item)
                for item in node.body
                if isinstance(item, ast.FunctionDef) and ast.get_docstring(item)
            }
        elif isinstance(node, ast.FunctionDef) and ast.get_docstring(node):
            functions[node.name] = ast.get_docstring(node)
    return classes, members, functions


def doc_lines(doc: str, indent: str) -> list[str]:
    """The ``///`` lines of a docstring; refuses text rustdoc would run as a doctest."""
    lines = inspect.cleandoc(doc).splitlines()
    for i, line in enumerate(lines):
        prev = lines[i - 1].strip() if i else ""
        if line.startswith("    ") and (not prev or set(prev) == {"-"}):
            raise SystemExit(f"an indented line after a blank line is a Rust doctest in rustdoc: {line!r}")
        if "\t" in line:
            raise SystemExit(f"tab in docstring: {line!r}")
    return [f"{indent}///" + (f" {line}" if line else "") + "\n" for line in lines]


def item_start(lines: list[str], i: int) -> int:
    """First line of the doc comments and attributes above the item on line ``i``."""
    j = i
    while j > 0:
        s = lines[j - 1].strip()
        if not s or s == "}" or s.endswith("{") or (s.startswith("//") and not s.startswith("///")):
            break
        j -= 1
    return j


def rewrite(path: pathlib.Path, classes, members, functions, used: set) -> str:
    lines = path.read_text(encoding="utf-8").splitlines(keepends=True)
    # Rust struct name -> Python class name.
    py_of_struct = {}
    for i, line in enumerate(lines):
        m = re.match(r'#\[pyclass\(name = "(\w+)"', line)
        if m:
            s = next(re.match(r"pub struct (\w+)", l) for l in lines[i:] if re.match(r"pub struct (\w+)", l))
            py_of_struct[s.group(1)] = m.group(1)
    edits = []  # (start, end, new lines)
    current = None  # Python class of the #[pymethods] block we are in
    for i, line in enumerate(lines):
        m = re.match(r"impl (\w+) \{", line)
        if m:
            current = py_of_struct.get(m.group(1)) if i > 0 and lines[i - 1].startswith("#[pymethods]") else None
            continue
        if line.startswith("}"):
            current = None
        m = re.match(r"#\[pyclass\(name = \"(\w+)\"", line)
        if m and m.group(1) in classes:
            edits.append((item_start(lines, i), i, doc_lines(classes[m.group(1)], ""), m.group(1)))
            continue
        m = re.match(r"(\s*)(?:pub )?fn (\w+)", line)
        if not m:
            continue
        indent, name = m.groups()
        start = item_start(lines, i)
        attrs = "".join(lines[start:i])
        g = re.search(r"#\[getter\((\w+)\)\]", attrs)
        pyname = g.group(1) if g else name
        if current and indent == "    ":
            doc = members.get(current, {}).get(pyname)
            key = f"{current}.{pyname}"
            if "#[new]" in attrs:
                doc = None
        elif not indent and "#[pyfunction]" in attrs:
            doc, key = functions.get(name), name
        else:
            continue
        if doc is None:
            continue
        # Keep the attributes, replace the doc lines.
        body = [l for l in lines[start:i] if not l.strip().startswith("///")]
        edits.append((start, i, doc_lines(doc, indent) + body, key))
    out = list(lines)
    for start, end, new, key in sorted(edits, reverse=True):
        if key in used:
            raise SystemExit(f"{key} documented twice")
        used.add(key)
        out[start:end] = new
    text = "".join(out)
    # create_exception!(specwell, Name, Base, "doc"): the message string.
    def exc(m):
        name = m.group(2)
        if name not in classes:
            return m.group(0)
        used.add(name)
        lit = inspect.cleandoc(classes[name]).replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n")
        return f'{m.group(1)}"{lit}"\n);'
    text = re.sub(r'(pyo3::create_exception!\(\s*specwell,\s*(\w+),\s*[\w:]+,\s*)"(?:[^"\\]|\\.)*"\s*\);', exc, text)
    return text


def main() -> int:
    classes, members, functions = stub_docs()
    used: set = set()
    changed = []
    for path in RUST:
        new = rewrite(path, classes, members, functions, used)
        if new != path.read_text(encoding="utf-8"):
            changed.append(path)
            if "--check" not in sys.argv:
                path.write_text(new, encoding="utf-8")
    wanted = set(classes) | {f"{c}.{m}" for c, ms in members.items() for m in ms} | set(functions)
    missing = sorted(wanted - used)
    if missing:
        print("stub docstrings without a Rust item (set in Python, or missing):", ", ".join(missing))
    if changed:
        print(("would change: " if "--check" in sys.argv else "changed: ") + ", ".join(p.name for p in changed))
        return 1 if "--check" in sys.argv else 0
    return 0


if __name__ == "__main__":
    sys.exit(main())
