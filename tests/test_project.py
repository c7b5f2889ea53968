"""Project-level checks: the README's set-up commands, CI, licence, the caution text."""

from __future__ import annotations

import re

from conftest import REPO_ROOT


def _readme_commands() -> list[str]:
    text = (REPO_ROOT / "README.md").read_text()
    quick = text.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    return re.findall(r"```bash\n(.+?)\n```", quick)


def test_readme_quick_start_has_exactly_two_commands():
    cmds = _readme_commands()
    assert len(cmds) == 2
    assert "wellfault demo" in cmds[0]
    assert "pytest" in cmds[1]


def test_ci_runs_exactly_the_readme_test_command():
    ci = (REPO_ROOT / ".ci" / "run").read_text().splitlines()
    assert _readme_commands()[1] in ci


def test_readme_and_cli_show_the_caution():
    from wellfault import CAUTION

    readme = (REPO_ROOT / "README.md").read_text()
    assert "qualified geoscientist" in readme
    assert "qualified geoscientist" in CAUTION


def test_licence_is_apache_2():
    text = (REPO_ROOT / "LICENSE").read_text()
    assert "Apache License" in text and "Version 2.0, January 2004" in text


def test_readme_python_example_runs(monkeypatch):
    """The README's Python example runs as printed, on the invented field."""
    text = (REPO_ROOT / "README.md").read_text()
    blocks = re.findall(r"```python\n(.+?)\n```", text, flags=re.S)
    assert blocks
    monkeypatch.chdir(REPO_ROOT)
    for code in blocks:
        namespace: dict = {}
        exec(compile(code, "README.md", "exec"), namespace)  # noqa: S102 - our own README
    assert "result" in namespace and len(namespace["result"].cuts) == 1
