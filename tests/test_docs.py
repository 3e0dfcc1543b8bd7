"""Runtime documentation: what ``help()`` shows for the public API.

Every public class and function (``specwell.__all__``) and every public method and property of
the compiled classes has a non-trivial numpydoc docstring; every parameter of a signature is
named in its Parameters section; the compiled objects carry text signatures whose parameter
names, kinds and defaults match ``_core.pyi``, and their docstrings are the stub's (the stub is
the source text, copied into the Rust ``///`` comments by ``tools/sync_docs.py``). The Examples
sections run as doctests. The checkers are themselves tested against deliberately wrong docs.
"""

from __future__ import annotations

import ast
import doctest
import inspect
import pathlib
import re

import numpy as np
import pytest

import specwell as sw
from specwell import _core

STUB = pathlib.Path(_core.__file__).with_name("_core.pyi")
# Section headers of numpydoc.
_SECTIONS = {"Parameters", "Returns", "Yields", "Raises", "Warns", "Notes", "Examples", "See Also",
             "References", "Attributes", "Methods", "Other Parameters"}


# --- checkers ---------------------------------------------------------------------------------

def sections(doc: str) -> dict[str, list[str]]:
    """numpydoc sections of a docstring: {header: body lines}; the summary part under ""."""
    lines = inspect.cleandoc(doc).splitlines()
    out: dict[str, list[str]] = {"": []}
    current = ""
    i = 0
    while i < len(lines):
        line = lines[i]
        nxt = lines[i + 1] if i + 1 < len(lines) else ""
        if line.strip() in _SECTIONS and nxt.strip() and set(nxt.strip()) == {"-"}:
            current = line.strip()
            out[current] = []
            i += 2
            continue
        out[current].append(line)
        i += 1
    return out


def documented_parameters(doc: str) -> set[str]:
    """Names in the Parameters section: 'a, b : float' and 'a' entry lines (not indented)."""
    names: set[str] = set()
    for line in sections(doc).get("Parameters", []):
        if not line.strip() or line.startswith((" ", "\t")):
            continue
        head = line.split(" : ", 1)[0]
        names.update(n.strip().lstrip("*") for n in head.split(","))
    return names


def doc_problems(obj, name: str) -> list[str]:
    """What is wrong with the docstring of a callable or class (empty: nothing)."""
    doc = inspect.getdoc(obj) if not isinstance(obj, str) else obj
    if not doc or len(doc.split()) < 4:
        return [f"{name}: missing or trivial docstring {doc!r}"]
    if "_core.pyi" in doc:
        return [f"{name}: docstring points to the stub instead of documenting"]
    summary = sections(doc)[""]
    if not summary or not summary[0].strip():
        return [f"{name}: no summary line"]
    problems = []
    try:
        sig = inspect.signature(obj)
    except (TypeError, ValueError):
        return problems
    params = [p.name for p in sig.parameters.values() if p.name not in ("self", "cls")]
    missing = [p for p in params if p not in documented_parameters(doc)]
    if missing:
        problems.append(f"{name}: parameters {missing} not in the Parameters section")
    return problems


def _stub_signature(fn: ast.FunctionDef, drop_first: bool) -> list[tuple[str, str, object]]:
    """(name, kind, default) of a stub function; default is a literal or '<required>'."""
    a = fn.args
    out = []
    positional = a.posonlyargs + a.args
    defaults = [None] * (len(positional) - len(a.defaults)) + list(a.defaults)
    for arg, d in zip(positional, defaults):
        out.append((arg.arg, "positional", "<required>" if d is None else ast.literal_eval(d)))
    for arg, d in zip(a.kwonlyargs, a.kw_defaults):
        out.append((arg.arg, "keyword", "<required>" if d is None else ast.literal_eval(d)))
    return out[1:] if drop_first else out


def _runtime_signature(obj) -> list[tuple[str, str, object]]:
    out = []
    for p in inspect.signature(obj).parameters.values():
        if p.name in ("self", "cls"):
            continue
        kind = "keyword" if p.kind is inspect.Parameter.KEYWORD_ONLY else "positional"
        out.append((p.name, kind, "<required>" if p.default is inspect.Parameter.empty else p.default))
    return out


def stub_items() -> dict[str, tuple[ast.FunctionDef, bool, str | None]]:
    """Qualified name -> (stub function, drop first argument, stub docstring) of the stub's
    module functions, class constructors (``Class``) and methods (``Class.method``)."""
    tree = ast.parse(STUB.read_text(encoding="utf-8"))
    items = {}
    for node in tree.body:
        if isinstance(node, ast.FunctionDef):
            items[node.name] = (node, False, ast.get_docstring(node))
        elif isinstance(node, ast.ClassDef):
            for f in node.body:
                if not isinstance(f, ast.FunctionDef):
                    continue
                decorators = {d.id for d in f.decorator_list if isinstance(d, ast.Name)}
                if f.name == "__new__":
                    items[node.name] = (f, True, ast.get_docstring(node))
                elif not f.name.startswith("_") and "property" not in decorators:
                    items[f"{node.name}.{f.name}"] = (f, True, ast.get_docstring(f))
    return items


def stub_docs() -> dict[str, str]:
    """Qualified name -> docstring of every documented stub class, method, property, function."""
    tree = ast.parse(STUB.read_text(encoding="utf-8"))
    docs = {}
    for node in tree.body:
        if isinstance(node, (ast.FunctionDef, ast.ClassDef)) and ast.get_docstring(node):
            docs[node.name] = ast.get_docstring(node)
        if isinstance(node, ast.ClassDef):
            for f in node.body:
                if isinstance(f, ast.FunctionDef) and ast.get_docstring(f):
                    docs[f"{node.name}.{f.name}"] = ast.get_docstring(f)
    return docs


def resolve(qualname: str):
    obj = _core
    for part in qualname.split("."):
        obj = inspect.getattr_static(obj, part) if inspect.isclass(obj) else getattr(obj, part)
    return obj


# --- what is checked --------------------------------------------------------------------------

PUBLIC = [n for n in sw.__all__ if inspect.isclass(getattr(sw, n)) or callable(getattr(sw, n))]
CLASSES = [n for n in PUBLIC if inspect.isclass(getattr(sw, n)) and not issubclass(getattr(sw, n), BaseException)]


def _members():
    for cname in CLASSES:
        cls = getattr(sw, cname)
        for mname, member in vars(cls).items():
            if not mname.startswith("_"):
                yield f"{cname}.{mname}", member


MEMBERS = dict(_members())


def test_public_names_are_covered():
    # The classes the task names, so that a renamed export cannot silently drop out.
    for name in ("Hamiltonian", "Spectrum", "FourierGrid", "HermiteBasis", "ElementBasis", "ProductGrid",
                 "Heterostructure", "Layer", "SplitStep", "Run", "Batch", "GroundState", "Material",
                 "SelfConsistent"):
        assert name in CLASSES
    assert len(MEMBERS) > 100


@pytest.mark.parametrize("name", PUBLIC)
def test_public_object_documented(name):
    obj = getattr(sw, name)
    assert doc_problems(obj, name) == []


@pytest.mark.parametrize("name", sorted(MEMBERS))
def test_member_documented(name):
    member = MEMBERS[name]
    if isinstance(member, property) or inspect.isgetsetdescriptor(member):
        doc = member.__doc__
        assert doc and len(doc.split()) >= 2, f"{name}: property without a docstring"
        return
    cname, mname = name.split(".")
    obj = getattr(getattr(sw, cname), mname)  # bound for a classmethod: signature without cls
    assert callable(obj)
    assert doc_problems(obj, name) == []


@pytest.mark.parametrize("qualname", sorted(stub_items()))
def test_runtime_signature_matches_stub(qualname):
    fn, drop_first, _ = stub_items()[qualname]
    if qualname.split(".")[0].startswith("_"):
        pytest.skip("private rebuild helper")
    obj = getattr(_core, qualname) if "." not in qualname else getattr(getattr(_core, qualname.split(".")[0]), qualname.split(".")[1])
    if not callable(obj):
        pytest.skip("not callable")
    stub = _stub_signature(fn, drop_first)
    runtime = _runtime_signature(obj)  # raises if the compiled object has no text signature
    assert runtime == stub


@pytest.mark.parametrize("qualname", sorted(stub_docs()))
def test_runtime_docstring_is_the_stubs(qualname):
    runtime = resolve(qualname).__doc__
    assert runtime is not None, f"{qualname} has no runtime docstring; run tools/sync_docs.py and rebuild"
    assert inspect.cleandoc(runtime) == inspect.cleandoc(stub_docs()[qualname]), (
        f"{qualname}: runtime docstring differs from _core.pyi; run tools/sync_docs.py and rebuild")


def _docstrings_with_examples():
    seen = {}
    for name in PUBLIC:
        seen[name] = inspect.getdoc(getattr(sw, name))
    for name, member in MEMBERS.items():
        seen[name] = member.__doc__
    return {k: v for k, v in seen.items() if v and ">>>" in v}


@pytest.mark.parametrize("name", sorted(_docstrings_with_examples()))
def test_examples_run(name):
    doc = _docstrings_with_examples()[name]
    test = doctest.DocTestParser().get_doctest(inspect.cleandoc(doc), {"np": np, "sw": sw}, name, None, 0)
    runner = doctest.DocTestRunner(optionflags=doctest.NORMALIZE_WHITESPACE)
    out = []
    runner.run(test, out=out.append)
    assert runner.failures == 0, "".join(out)


@pytest.mark.parametrize("module", ["specwell.states", "specwell.io", "specwell.plotting", "specwell.demo"])
def test_python_modules_documented(module):
    if module == "specwell.plotting":
        pytest.importorskip("matplotlib")
    mod = __import__(module, fromlist=["_"])
    names = getattr(mod, "__all__", None) or [n for n in vars(mod) if not n.startswith("_")]
    problems = []
    for n in names:
        obj = getattr(mod, n)
        if (inspect.isfunction(obj) or inspect.isclass(obj)) and obj.__module__ == module:
            problems += doc_problems(obj, f"{module}.{n}")
    assert problems == []


def test_examples_exist_for_the_main_entry_points():
    assert {"Hamiltonian", "Hamiltonian.solve", "SplitStep", "Heterostructure"} <= set(_docstrings_with_examples())


# --- the checkers fail where they should --------------------------------------------------------

def _wrong(a, b, *, c=1):
    """Do something with a and b.

    Parameters
    ----------
    a : int
        The first.
    c : int
        Keyword.
    """


def _right(a, b, *, c=1):
    """Do something with a and b.

    Parameters
    ----------
    a, b : int
        The inputs.
    c : int, keyword-only
        Keyword.

    Returns
    -------
    b : int
        Not a parameter name source.
    """


def test_checker_catches_an_undocumented_parameter():
    assert doc_problems(_wrong, "_wrong") == ["_wrong: parameters ['b'] not in the Parameters section"]
    assert doc_problems(_right, "_right") == []
    assert documented_parameters(_right.__doc__) == {"a", "b", "c"}


def test_checker_catches_trivial_and_pointer_docs():
    def f(x):
        """See `specwell._core.pyi` for the documented signature."""
    def g(x):
        """Short."""
    assert doc_problems(f, "f") and doc_problems(g, "g")


def test_signature_comparison_catches_a_renamed_or_reordered_parameter():
    fn = ast.parse("def f(self, count: int, method: str = 'auto', *, tol: float = 1e-10): ...").body[0]
    stub = _stub_signature(fn, True)
    assert stub == [("count", "positional", "<required>"), ("method", "positional", "auto"), ("tol", "keyword", 1e-10)]

    def runtime(count, mode="auto", *, tol=1e-10): ...
    def runtime_default(count, method="dense", *, tol=1e-10): ...
    def runtime_kind(count, method="auto", tol=1e-10): ...
    assert _runtime_signature(runtime) != stub
    assert _runtime_signature(runtime_default) != stub
    assert _runtime_signature(runtime_kind) != stub


def test_help_shows_parameters_and_defaults():
    text = inspect.signature(sw.Hamiltonian.solve)
    assert str(text) == "(self, /, count, method='auto', tol=1e-10, max_iter=None, initial=None, seed=None)"
    assert str(inspect.signature(sw.Hamiltonian)) == "(basis, potential, mass=None, units='natural')"
    assert re.search(r"^Parameters\n-+\nbasis :", inspect.getdoc(sw.Hamiltonian), re.M)
