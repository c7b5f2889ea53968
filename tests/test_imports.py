"""The import rule (DEVELOPERS.md, "Imports"): a command loads only what it uses.

Each check runs in a fresh interpreter (``sys.modules`` of this test process holds whatever
other tests imported) and looks at which libraries got imported: a behaviour, not a timing.
The figures are in benchmarks/bench_cli.py.
"""

from __future__ import annotations

import ast
import json
import subprocess
import sys

import pytest

from conftest import REPO_ROOT

FIELD = REPO_ROOT / "synthetic_wells"
#: Libraries only some commands need: the lag screen's change-point library (and the
#: scipy.stats it pulls in), figures and reports, a Dask cluster, Parquet.
OPTIONAL = ("ruptures", "scipy.stats", "matplotlib", "dask", "distributed", "pyarrow")
#: What the alignment engine needs, and the tables: not for ``import wellfault`` or ``--help``.
ENGINE = ("numba", "scipy", "numpy", "pandas", "lasio")

_PROBE = """
import json, sys
{setup}
print(json.dumps(sorted(m for m in {names!r} if m in sys.modules)))
"""


def _imported(setup: str, names=OPTIONAL + ENGINE) -> set[str]:
    """Which of ``names`` a fresh interpreter has imported after running ``setup``."""
    code = _PROBE.format(setup=setup, names=tuple(names))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=REPO_ROOT, check=True, timeout=300)
    return set(json.loads(out.stdout.strip().splitlines()[-1]))


def _detect(*args: str) -> str:
    argv = ["detect", str(FIELD / "VR_6H.las"), "--survey", str(FIELD / "VR_6H_survey.csv"),
            "--dip", "8/070", *args]
    return ("import contextlib, io\nfrom wellfault.cli import main\n"
            "with contextlib.redirect_stdout(io.StringIO()), "
            "contextlib.redirect_stderr(io.StringIO()):\n"
            f"    assert main({argv!r}) == 0")


def test_import_wellfault_loads_no_library():
    assert _imported("import wellfault") == set()


def test_help_loads_no_library():
    setup = ("import contextlib, io\nfrom wellfault.cli import main\n"
             "with contextlib.redirect_stdout(io.StringIO()):\n"
             "    try:\n        main(['--help'])\n    except SystemExit:\n        pass")
    assert _imported(setup) == set()


def test_detect_by_tops_loads_neither_the_engine_nor_optional_libraries():
    # pandas may import pyarrow itself (pandas 3 does when it is installed): only what
    # wellfault adds to what pandas, numpy and lasio import on their own counts
    own = _imported("import numpy, pandas, lasio")
    used = _imported(_detect("--tops", str(FIELD / "tops.csv"), "--column",
                             str(FIELD / "column.csv")))
    assert used - own == set()


def test_detect_by_curves_loads_the_engine_but_no_optional_library():
    own = _imported("import numpy, pandas, lasio, numba")
    used = _imported(_detect("--type-well", str(FIELD / "VR_1.las"), "--type-tops",
                             str(FIELD / "tops.csv")))
    assert "numba" in used
    assert used - own == set()


def test_lag_screen_loads_its_change_point_library_when_used():
    assert "ruptures" in _imported("import wellfault.align as a\na.lag_changepoints")


@pytest.mark.parametrize("package", ["wellfault", "wellfault.align"])
def test_every_public_name_resolves_and_the_type_checking_imports_match(package):
    import importlib

    mod = importlib.import_module(package)
    for name in mod.__all__:
        assert getattr(mod, name) is not None, name
    tree = ast.parse(open(mod.__file__, encoding="utf-8").read())
    typed = {a.asname or a.name for node in ast.walk(tree) if isinstance(node, ast.If)
             for sub in node.body if isinstance(sub, ast.ImportFrom) for a in sub.names}
    assert typed == set(mod._LAZY)
    with pytest.raises(AttributeError, match="no attribute 'nothing_here'"):
        getattr(mod, "nothing_here")


def test_numba_kernels_load_from_the_on_disk_cache_in_a_new_process():
    """The kernels compile once (``cache=True``): a second process finds every kernel it
    calls in the cache and compiles nothing."""
    code = (_detect("--type-well", str(FIELD / "VR_1.las"), "--type-tops",
                    str(FIELD / "tops.csv")) + "\n"
            "import json, sys\n"
            "from numba.core.registry import CPUDispatcher\n"
            "hits, misses = 0, []\n"
            "for name, m in list(sys.modules.items()):\n"
            "    if name.startswith('wellfault.align.'):\n"
            "        for f in vars(m).values():\n"
            "            if isinstance(f, CPUDispatcher):\n"
            "                hits += sum(f.stats.cache_hits.values())\n"
            "                misses += [f.__name__] * sum(f.stats.cache_misses.values())\n"
            "print(json.dumps([hits, misses]))")
    runs = []
    for _ in range(2):   # the first may compile (a new checkout, an edited kernel)
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             cwd=REPO_ROOT, check=True, timeout=600)
        runs.append(json.loads(out.stdout.strip().splitlines()[-1]))
    hits, misses = runs[1]
    assert misses == [] and hits > 0


def test_the_installed_command_entry_point_runs_and_keeps_exit_codes(tmp_path):
    """``wellfault.cli.app.console`` (the ``wellfault`` script): the cut table written, exit 0;
    bad input exit 2."""
    out = tmp_path / "cuts.csv"
    argv = ["detect", str(FIELD / "VR_6H.las"), "--survey", str(FIELD / "VR_6H_survey.csv"),
            "--dip", "8/070", "--tops", str(FIELD / "tops.csv"), "--column",
            str(FIELD / "column.csv"), "--out", str(out)]
    code = "from wellfault.cli import console\nconsole()"
    done = subprocess.run([sys.executable, "-c", code, *argv], capture_output=True, text=True,
                          cwd=REPO_ROOT, timeout=300)
    assert done.returncode == 0 and "qualified geoscientist" in done.stderr
    assert out.read_text().startswith("well,")
    bad = subprocess.run([sys.executable, "-c", code, *argv[:2], "--dip", "95/070"],
                         capture_output=True, text=True, cwd=REPO_ROOT, timeout=300)
    assert bad.returncode == 2
