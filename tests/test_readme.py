"""The README's Python examples run on the installed package, and its commands are CI's."""

import math
import pathlib
import re

import numpy as np
import pytest

ROOT = pathlib.Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")


def _blocks(lang):
    return re.findall(rf"```{lang}\n(.*?)```", README, flags=re.S)


def test_test_command_is_what_ci_runs():
    commands = _blocks("bash")
    assert len(commands) >= 2, "README must show the main-job and the test commands"
    assert "python -m specwell.demo" in commands[0]
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    assert commands[1].strip() in ci


def test_python_examples_run(tmp_path, monkeypatch):
    pytest.importorskip("scipy")
    monkeypatch.chdir(tmp_path)
    blocks = _blocks("python")
    assert blocks
    ns: dict = {}
    for code in blocks:
        exec(compile(code, "README.md", "exec"), ns)  # noqa: S102 - the README is ours
    # Spot checks of what the comments promise.
    np.testing.assert_allclose(ns["sw"].Hamiltonian(ns["sw"].HermiteBasis(60), lambda x: 0.5 * x**2).solve(5).energies,
                               [0.5, 1.5, 2.5, 3.5, 4.5], atol=1e-10)  # E_n = n + ½ (Griffiths §2.3)
    s = 1.5**2 / 2  # Huang-Rhys factor of the displaced oscillators in the example
    fc = ns["lower"].overlaps(ns["upper"])[0] ** 2
    np.testing.assert_allclose(fc, [math.exp(-s) * s**n / math.factorial(n) for n in range(10)], atol=1e-10)
    assert ns["sc"].iterations <= 40 and np.isfinite(ns["sc"].fermi_level)
    assert np.all(ns["st"].bound) and len(ns["st"].energies) >= 1  # every level solve() returns is bound
