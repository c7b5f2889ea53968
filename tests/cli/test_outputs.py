"""How outputs are written (wellfault.io.outputs): never replace what is not a plain file.

The rules are common practice for command-line tools: a plain file is replaced through a
temporary file beside it (readers never see half a file, a failed write leaves the old file
whole), keeping its mode and owner; a symbolic link is followed and kept; a hard-linked file is
written in place; a device or a named pipe is written straight through; ``-`` is standard output;
a folder where a file is wanted (or a file where a folder is wanted) is refused, nothing removed.
Every test here runs without administrator rights; the read-only-folder case drops them in a
child process when the suite runs as root (root may write into any folder).
"""

from __future__ import annotations

import os
import shutil
import stat
import tempfile
import threading
from pathlib import Path

import pandas as pd
import pytest
from test_cli import detect_args, files, last_error, run  # noqa: F401  (files is a fixture)

from wellfault.errors import InputError
from wellfault.io import write_table
from wellfault.io.outputs import output_folder, write_output

posix = pytest.mark.skipif(os.name != "posix", reason="POSIX file types and modes")


def _mode(path: Path) -> int:
    return stat.S_IMODE(os.stat(path).st_mode)


# ------------------------------------------------------------------------------- plain files
def test_a_plain_file_is_replaced_whole_keeping_its_mode(tmp_path, monkeypatch):
    target = tmp_path / "r.html"
    target.write_text("old", encoding="utf-8")
    os.chmod(target, 0o640)
    inode = target.stat().st_ino
    write_output(target, "new")
    assert target.read_text(encoding="utf-8") == "new"
    assert _mode(target) == 0o640
    assert target.stat().st_ino != inode  # a new file took its place in one step

    def fail(src, dst):
        raise OSError("disk full")

    monkeypatch.setattr(os, "replace", fail)
    with pytest.raises(InputError, match="disk full"):
        write_output(target, "newer")
    assert target.read_text(encoding="utf-8") == "new"  # the old file is intact
    assert [p.name for p in tmp_path.iterdir()] == ["r.html"]  # no temporary file left


@posix
def test_a_new_file_gets_the_mode_open_would_give(tmp_path):
    old = os.umask(0o027)
    try:
        assert _mode(write_output(tmp_path / "new.csv", "a\n")) == 0o640
    finally:
        os.umask(old)


@posix
@pytest.mark.skipif(not hasattr(os, "geteuid") or os.geteuid() != 0,
                    reason="giving a file to another owner needs administrator rights")
def test_a_replaced_file_keeps_its_owner_and_group(tmp_path):
    target = tmp_path / "theirs.csv"
    target.write_text("x\n")
    os.chown(target, 65534, 65534)
    write_output(target, "y\n")
    st = target.stat()
    assert (st.st_uid, st.st_gid) == (65534, 65534) and target.read_text() == "y\n"


def test_bytes_and_a_writer_function_are_written_as_given(tmp_path):
    assert write_output(tmp_path / "b.bin", b"\x00\x01").read_bytes() == b"\x00\x01"
    path = write_output(tmp_path / "t.parquet", lambda fh: fh.write(b"PAR1"))
    assert path.read_bytes() == b"PAR1"


# ------------------------------------------------------------------------------------ links
@posix
def test_a_symbolic_link_is_followed_and_kept(tmp_path):
    real = tmp_path / "data" / "cuts.csv"
    real.parent.mkdir()
    real.write_text("old\n")
    link = tmp_path / "latest.csv"
    link.symlink_to(real)
    chain = tmp_path / "chain.csv"
    chain.symlink_to(link)
    write_table(pd.DataFrame({"a": [1]}), chain)
    assert chain.is_symlink() and link.is_symlink()
    assert os.readlink(link) == str(real)
    assert real.read_text() == "a\n1\n"


@posix
def test_a_dangling_link_gets_its_target_created(tmp_path):
    link = tmp_path / "out.csv"
    link.symlink_to(tmp_path / "made.csv")
    write_output(link, "x\n")
    assert link.is_symlink() and (tmp_path / "made.csv").read_text() == "x\n"


@posix
def test_a_hard_linked_file_is_written_in_place_not_split(tmp_path):
    one = tmp_path / "one.csv"
    one.write_text("old\n")
    two = tmp_path / "two.csv"
    os.link(one, two)
    write_output(one, "new\n")
    assert one.stat().st_ino == two.stat().st_ino and one.stat().st_nlink == 2
    assert two.read_text() == "new\n"


# ------------------------------------------------------------------- devices, pipes, streams
@posix
def test_a_named_pipe_is_written_through_and_stays_a_pipe(tmp_path):
    fifo = tmp_path / "feed"
    os.mkfifo(fifo)
    got = []
    reader = threading.Thread(target=lambda: got.append(fifo.read_bytes()))
    reader.start()
    write_table(pd.DataFrame({"md_m": [1.5]}), fifo)
    reader.join(timeout=10)
    assert got == [b"md_m\n1.50\n"]  # lengths in metres are written to 0.01 m
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


@pytest.mark.skipif(not os.access("/dev/null", os.W_OK), reason="/dev/null is not writable here")
def test_dev_null_stays_a_character_device(files):  # noqa: F811
    code, out, err = run(*detect_args(files, "--out", "/dev/null"))
    assert code == 0, err
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)
    write_output("/dev/null", "discarded")
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_dash_is_standard_output(capfd):
    write_output("-", "a,b\n1,2\n")
    assert capfd.readouterr().out == "a,b\n1,2\n"


@posix
def test_dev_stdout_is_the_process_stream_not_a_file_to_replace(capfd):
    write_output("/dev/stdout", "to the stream\n")
    assert capfd.readouterr().out == "to the stream\n"


# ----------------------------------------------------------------- folders and permissions
def test_a_folder_where_a_file_is_wanted_is_refused_and_kept(tmp_path):
    folder = tmp_path / "cuts.csv"
    folder.mkdir()
    (folder / "keep.txt").write_text("k")
    with pytest.raises(InputError, match="is a folder"):
        write_output(folder, "x")
    assert (folder / "keep.txt").read_text() == "k"
    with pytest.raises(InputError, match="does not exist"):
        write_output(tmp_path / "nowhere" / "r.html", "x")


def test_a_file_where_a_folder_is_wanted_is_refused_and_kept(tmp_path):
    f = tmp_path / "out"
    f.write_text("mine")
    with pytest.raises(InputError, match="is a file, not a folder"):
        output_folder(f)
    assert f.read_text() == "mine"
    with pytest.raises(InputError, match="part of its folder path is a file"):
        write_output(f / "cuts.csv", "x")


def _in_child_without_rights(fn) -> tuple[int, str]:
    """Run ``fn()`` in a forked child, as an unprivileged user when this process is root."""
    rd, wr = os.pipe()
    pid = os.fork()
    if pid == 0:  # child: never return into pytest
        code = 1
        try:
            os.close(rd)
            if os.geteuid() == 0:  # root may write into any folder: be nobody
                os.setgroups([])
                os.setgid(65534)
                os.setuid(65534)
            code, text = fn()
            os.write(wr, text.encode())
        finally:
            os._exit(code)
    os.close(wr)
    with os.fdopen(rd, "rb") as fh:
        text = fh.read().decode()
    _, status = os.waitpid(pid, 0)
    return os.waitstatus_to_exitcode(status), text


@posix
def test_a_read_only_folder_gives_a_clear_error():
    base = Path(tempfile.mkdtemp(prefix="wellfault_ro_"))  # pytest's tmp_path is private to root
    os.chmod(base, 0o755)
    folder = base / "ro"
    folder.mkdir()
    os.chmod(folder, 0o555)
    target = folder / "cuts.csv"

    def attempt():
        try:
            write_output(target, "x")
        except InputError as err:
            return 3, str(err)
        return 0, "written"

    try:
        code, text = _in_child_without_rights(attempt)
        assert code == 3, text
        assert "permission denied in folder" in text and str(target) in text
        assert list(folder.iterdir()) == []  # no temporary file left behind
    finally:
        os.chmod(folder, 0o755)
        shutil.rmtree(base)


# ---------------------------------------------------------------------------- the command
def test_detect_out_and_report_refuse_a_folder_with_exit_2(files, tmp_path):  # noqa: F811
    folder = tmp_path / "a_folder"
    folder.mkdir()
    code, out, err = run(*detect_args(files, "--out", folder))
    assert code == 2 and "is a folder" in last_error(err)
    assert folder.is_dir()


def test_detect_report_to_stdout(files, tmp_path):  # noqa: F811
    pytest.importorskip("matplotlib", reason="reports embed matplotlib figures")
    code, out, err = run(*detect_args(files, "--out", tmp_path / "cuts.csv", "--report", "-"))
    assert code == 0, err
    assert out.lstrip().lower().startswith("<!doctype html")
    assert "report written to standard output" in err
    code, out, err = run(*detect_args(files, "--report", "-"))
    assert code == 2 and "both go to standard output" in err


def test_detect_out_dash_is_the_default_table_on_stdout(files):  # noqa: F811
    code, out, _ = run(*detect_args(files, "--out", "-"))
    assert code == 0 and out == run(*detect_args(files))[1]


def test_screen_out_that_is_a_file_exits_2_and_keeps_the_file(files, tmp_path):  # noqa: F811
    manifest = tmp_path / "wells.csv"
    manifest.write_text(f"well,las,tops\nC-1,{files['las']},{files['tops']}\n")
    column = files["column"]
    out = tmp_path / "results"
    out.write_text("not a folder")
    code, _, err = run("screen", manifest, "--column", column, "--out", out, "--no-progress")
    assert code == 2 and "is a file, not a folder" in last_error(err)
    assert out.read_text() == "not a folder"
