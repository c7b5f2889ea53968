"""`wellfault screen` as real processes: a Dask cluster of its own processes, and a SIGKILL.

Both run the command as a user would (a subprocess, the demo field with curve evidence) and
compare the written tables with an uninterrupted serial run of the same command: the cluster's
tables must be the same (README "Screen a whole field"), and so must those of a run killed
outright part-way (SIGKILL to its whole process group: no chance to clean up) and then resumed
with ``--resume``, with no well lost or counted twice and no half-written file left.
"""

from __future__ import annotations

import json
import os
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pandas as pd
import pytest

REPO = Path(__file__).resolve().parents[2]
DEMO = REPO / "synthetic_wells"
TABLES = ("cuts", "errors", "wells", "faults", "fault_profiles")

pytestmark = [
    pytest.mark.skipif(os.name != "posix", reason="process groups and SIGKILL are POSIX"),
    pytest.mark.skipif(not (DEMO / "manifest.csv").is_file(), reason="demo field not present"),
]


def _env() -> dict:
    path = os.pathsep.join(p for p in (str(REPO), os.environ.get("PYTHONPATH", "")) if p)
    return dict(os.environ, PYTHONPATH=path, PYTHONUNBUFFERED="1")


def _screen_cmd(field: Path, out: Path, *extra: str) -> list[str]:
    return [sys.executable, "-c", "import sys; from wellfault.cli import main; sys.exit(main())",
            "screen", str(field / "manifest.csv"), "--column", str(field / "column.csv"),
            "--type-well", str(field / "VR_1.las"), "--type-tops", str(field / "tops.csv"),
            "--out", str(out), "--no-progress", *extra]


def _tables(out: Path) -> dict[str, pd.DataFrame]:
    got = {name: pd.read_csv(out / f"{name}.csv") for name in TABLES}
    got["wells"] = got["wells"].drop(columns="seconds")  # a timing, not a result
    return got


def _assert_same(a: dict, b: dict) -> None:
    for name in TABLES:
        pd.testing.assert_frame_equal(a[name], b[name], obj=name)


@pytest.fixture(scope="module")
def field(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("demo") / "field"
    shutil.copytree(DEMO, folder)
    return folder


@pytest.fixture(scope="module")
def serial(field, tmp_path_factory) -> dict[str, pd.DataFrame]:
    out = tmp_path_factory.mktemp("serial") / "out"
    done = subprocess.run(_screen_cmd(field, out, "--workers", "1"), env=_env(),
                          capture_output=True, text=True, timeout=600)
    assert done.returncode == 0, done.stderr
    return _tables(out)


def _kill_group(proc: subprocess.Popen) -> None:
    try:
        os.killpg(proc.pid, signal.SIGKILL)
    except ProcessLookupError:
        pass
    proc.wait(timeout=60)


def _lines(path: Path) -> int:
    try:
        return path.read_bytes().count(b"\n")
    except FileNotFoundError:
        return 0


def test_killed_run_resumes_to_the_same_tables(field, serial, tmp_path):
    out = tmp_path / "out"
    detect_log = out / ".wells" / "detect.jsonl"
    n_wells = len(pd.read_csv(field / "manifest.csv"))
    proc = subprocess.Popen(_screen_cmd(field, out, "--workers", "2"), env=_env(),
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                            start_new_session=True)  # its own group: the pool dies with it
    try:
        deadline = time.monotonic() + 600
        while _lines(detect_log) < 2 and proc.poll() is None and time.monotonic() < deadline:
            time.sleep(0.02)
        still_running = proc.poll() is None
        done_before_kill = _lines(detect_log)
    finally:
        _kill_group(proc)
    assert still_running, "the run ended before it could be killed part-way"
    assert 0 < done_before_kill < n_wells
    assert not (out / "cuts.csv").exists()  # killed before the tables: none, not half of one

    resumed = subprocess.run(_screen_cmd(field, out, "--workers", "1", "--resume"), env=_env(),
                             capture_output=True, text=True, timeout=600)
    assert resumed.returncode == 0, resumed.stderr
    got = _tables(out)
    _assert_same(serial, got)
    assert got["wells"]["well"].is_unique and len(got["wells"]) == n_wells
    # every well detected exactly once in the checkpoint after the resume (none redone, none
    # lost: the run killed part-way kept what it had flushed)
    indices = [json.loads(line)["i"] for line in detect_log.read_text().splitlines()
               if line.strip().endswith("}")]
    assert sorted(set(indices)) == list(range(n_wells))
    assert not [p for p in out.iterdir() if p.name.endswith(".tmp")]


def _free_port() -> int:
    import socket

    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def test_a_dask_cluster_of_separate_processes_gives_the_serial_tables(field, serial, tmp_path):
    pytest.importorskip("distributed", reason="the cluster path needs dask.distributed")
    address = f"tcp://127.0.0.1:{_free_port()}"
    host, port = address[len("tcp://"):].split(":")
    started = []
    try:
        started.append(subprocess.Popen(
            [sys.executable, "-m", "distributed.cli.dask_scheduler", "--host", host,
             "--port", port, "--no-dashboard"], env=_env(), stdout=subprocess.DEVNULL,
            stderr=subprocess.DEVNULL, start_new_session=True))
        for _ in range(2):  # two worker processes, one thread each
            started.append(subprocess.Popen(
                [sys.executable, "-m", "distributed.cli.dask_worker", address, "--nthreads", "1",
                 "--no-nanny", "--no-dashboard", "--local-directory", str(tmp_path / "dw")],
                env=_env(), stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                start_new_session=True))
        from distributed import Client

        with Client(address, timeout="60s") as client:  # wait for both workers to join
            client.wait_for_workers(2, timeout=120)
            assert len(client.scheduler_info()["workers"]) == 2
        out = tmp_path / "out"
        done = subprocess.run(_screen_cmd(field, out, "--scheduler", address), env=_env(),
                              capture_output=True, text=True, timeout=600)
        assert done.returncode == 0, done.stderr
        assert "(dask)" in done.stderr  # the summary names the runner
        _assert_same(serial, _tables(out))
    finally:
        for proc in reversed(started):
            _kill_group(proc)
