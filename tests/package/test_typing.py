"""The public API is fully typed: ``mypy --strict`` accepts everyday usage of it
(``tests/package/typing_usage.py``) against the package's annotations and the compiled core's stub,
and rejects wrong usage. Reference: mypy; the usage file also runs, so what it type-checks
is real usage."""

import subprocess
import sys
from pathlib import Path

import pytest

import statewright

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
USAGE = HERE / "typing_usage.py"


def _mypy(path, cache_dir):
    pytest.importorskip("mypy", reason="mypy is not installed; pip install '.[test]' installs it for this check")
    return subprocess.run(
        [sys.executable, "-m", "mypy", "--strict", "--no-color-output", "--cache-dir", str(cache_dir), str(path)],
        cwd=ROOT,
        capture_output=True,
        text=True,
        timeout=900,
    )


@pytest.fixture(scope="module")
def cache_dir(tmp_path_factory):
    return tmp_path_factory.mktemp("mypy_cache")


def test_usage_type_checks_under_strict_mypy(cache_dir):
    out = _mypy(USAGE, cache_dir)
    assert out.returncode == 0, f"mypy --strict {USAGE.name}:\n{out.stdout}{out.stderr}"  # (mypy --strict)


def test_package_sources_type_check_under_strict_mypy(cache_dir):
    # the package's own Python sources (the stubs of the compiled core included)
    package = ROOT / "python" / "statewright"
    out = _mypy(package, cache_dir)
    assert out.returncode == 0, f"mypy --strict python/statewright:\n{out.stdout}{out.stderr}"  # (mypy --strict)


def test_wrong_usage_is_rejected(cache_dir, tmp_path):
    # negative control: the check sees statewright's real types, not Any
    bad = tmp_path / "wrong_usage.py"
    bad.write_text(
        "import statewright as sw\n"
        "states: str = sw.realize([1.0], [1.0, 2.0]).n_states\n"
        "sw.realize([1.0], [1.0, 2.0]).no_such_method()\n"
        "sw.characteristic_polynomial([[1.0]], exact='yes')\n"
    )
    out = _mypy(bad, cache_dir)
    assert out.returncode == 1, out.stdout + out.stderr
    assert 'expression has type "int", variable has type "str"' in out.stdout  # (mypy --strict)
    assert '"Realization" has no attribute "no_such_method"' in out.stdout
    assert 'Argument "exact" to "characteristic_polynomial" has incompatible type "str"' in out.stdout


def test_usage_runs():
    pytest.importorskip("sympy")
    pytest.importorskip("scipy")
    out = subprocess.run([sys.executable, str(USAGE)], capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stdout + out.stderr  # (runtime: the typed usage is real usage)


def test_package_ships_its_types():
    package = Path(statewright.__file__).resolve().parent
    assert (package / "py.typed").is_file()  # (PEP 561 marker)
    assert (package / "_core.pyi").is_file()  # the compiled core's stub
