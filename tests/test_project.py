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


def _usage_commands() -> list[tuple[str, list[str]]]:
    """The README's ``wellfault ...`` usage commands after the quick start, as (folder, argv):
    a block's ``cd DIR`` line sets the folder, continuation lines are joined, comments
    dropped."""
    import shlex

    text = (REPO_ROOT / "README.md").read_text()
    usage = text.split("## Quick start", 1)[1].split("\n## ", 1)[1]
    out = []
    for block in re.findall(r"```bash\n(.+?)\n```", usage, flags=re.S):
        folder = "."
        for line in block.replace("\\\n", " ").splitlines():
            line = line.split("#", 1)[0].strip()
            if line.startswith("cd "):
                folder = line[3:].strip()
            elif line.startswith("wellfault "):
                out.append((folder, shlex.split(line)[1:]))
    return out


def test_readme_usage_commands_run_on_the_demo_field(tmp_path, monkeypatch, capsys):
    """Every ``wellfault`` command of the README's usage runs as printed (in a copy of the
    repository's demo field, so its outputs land in a temporary folder) and exits 0."""
    import shutil

    from wellfault.cli.app import main

    cmds = _usage_commands()
    assert {argv[0] for _, argv in cmds} >= {"detect", "screen", "watch", "survey"}
    shutil.copytree(REPO_ROOT / "synthetic_wells", tmp_path / "synthetic_wells")
    for folder, argv in cmds:
        monkeypatch.chdir(tmp_path / folder)
        code = main(argv)
        out = capsys.readouterr()
        assert code in (0, None), (argv, out.err[-2000:])
    assert (tmp_path / "synthetic_wells" / "cuts.csv").is_file()
    assert (tmp_path / "synthetic_wells" / "VR_6H.html").is_file()
    assert (tmp_path / "screen_out" / "cuts.csv").is_file()
    assert (tmp_path / "screen_out" / "field.html").is_file()
