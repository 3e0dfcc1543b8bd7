"""The layering rule of the crate, checked on the Rust sources (DEVELOPERS.md, "Layout").

Data flows one way: model → basis → problem → eigen (and propagate, transport) → observables, with
linalg a leaf that every layer may call and that names nothing physical. The check
reads the `crate::<module>` paths each top-level module uses outside its test code.
"""

import pathlib
import re

import pytest

SRC = pathlib.Path(__file__).resolve().parents[1] / "src"

# Which top-level modules each module may use (besides `error`, which every module may).
ALLOWED = {
    "model": set(),
    "linalg": set(),
    "basis": {"model", "linalg"},
    "problem": {"model", "basis", "linalg"},
    "eigen": {"model", "basis", "problem", "linalg"},
    "observables": {"eigen", "problem", "basis", "model", "linalg"},
    "propagate": {"model", "basis", "problem", "linalg"},
    "selfconsistent": {"model", "basis", "problem", "linalg", "eigen"},
    "transport": {"model", "basis", "problem", "linalg"},
}


def _non_test_code(text: str) -> str:
    """The source without comments and without `#[cfg(test)]` items (the unit tests at
    the bottom of a file); doc links may point anywhere."""
    i = text.find("#[cfg(test)]")
    text = text if i < 0 else text[:i]
    return "\n".join(re.sub(r"//.*", "", line) for line in text.splitlines())


def _module_files(module: str):
    single = SRC / f"{module}.rs"
    if single.exists():
        return [single]
    return sorted((SRC / module).rglob("*.rs"))


def _uses(module: str) -> set:
    used = set()
    for path in _module_files(module):
        code = _non_test_code(path.read_text())
        used |= set(re.findall(r"\bcrate::(\w+)", code))
    return used - {module, "error"}


def test_sources_found():
    assert all(_module_files(m) for m in ALLOWED), "a module listed in the rule has no source file"


@pytest.mark.parametrize("module", sorted(ALLOWED))
def test_module_uses_only_lower_layers(module):
    extra = _uses(module) - ALLOWED[module]
    assert not extra, f"src/{module} uses {sorted(extra)}, outside its allowed layers {sorted(ALLOWED[module])}"


def test_no_cycles_among_top_level_modules():
    graph = {m: _uses(m) & set(ALLOWED) for m in ALLOWED}
    state = {}

    def visit(m, path):
        if state.get(m) == "done":
            return
        assert state.get(m) != "open", "import cycle: " + " → ".join(path + [m])
        state[m] = "open"
        for n in graph[m]:
            visit(n, path + [m])
        state[m] = "done"

    for m in graph:
        visit(m, [])


def test_eigensolvers_name_no_basis_or_hamiltonian():
    words = re.compile(r"\b(Hamiltonian|HermiteBasis|FourierGrid|LayeredBasis|ElementBasis|BasisRef|Units|Heterostructure)\b")
    for path in sorted((SRC / "linalg").rglob("*.rs")):
        code = "\n".join(re.sub(r"//.*", "", line) for line in path.read_text().splitlines())
        hits = sorted(set(words.findall(code)))
        assert not hits, f"{path.name} names {hits}"
