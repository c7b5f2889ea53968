"""Field screening, resume: the checkpoint of finished wells and the fingerprint of each well's
inputs."""

from __future__ import annotations

import dataclasses
import hashlib
import json
import os
import time
from pathlib import Path

from ..about import __version__
from ..errors import InputError
from ..io.outputs import output_folder, write_output
from .screen_well import _ATTITUDE, WellTask, _Config


# ------------------------------------------------------------------------------- checkpoint
class _Checkpoint:
    """Per-well results of a run in ``DIR/.wells/``: one JSON line per (pass, well).

    Each line is written with one ``write`` call as its well finishes and flushed at least
    every half second (and at the end); a line cut short by a crash is dropped on reading. ``run.json`` holds the fingerprint of the run's
    settings and manifest: resuming a different run is refused.
    """

    def __init__(self, out_dir: Path, fingerprint: str, resume: bool) -> None:
        self.folder = out_dir / ".wells"
        self.fingerprint = fingerprint
        self.loaded: dict[str, dict[int, dict]] = {"thickness": {}, "detect": {},
                                                   "separation": {}, "remeasure": {}}
        self._files: dict = {}
        self._flushed = time.monotonic()
        run = self.folder / "run.json"
        if resume and run.is_file():
            stored = json.loads(run.read_text(encoding="utf-8")).get("fingerprint")
            if stored != fingerprint:
                raise InputError(
                    f"{self.folder}: the checkpoint belongs to a different run (other settings "
                    "or manifest); run without --resume to start afresh, or remove the folder")
            for kind in self.loaded:
                self._read(kind)
        else:
            output_folder(self.folder, what="the checkpoint folder")
            for p in self.folder.glob("*"):
                if p.is_file() and not p.is_symlink():  # our own files; anything else is left
                    p.unlink()
            write_output(run, json.dumps({"fingerprint": fingerprint, "version": __version__}),
                         what="the checkpoint")

    def _path(self, kind: str) -> Path:
        return self.folder / f"{kind}.jsonl"

    def _read(self, kind: str) -> None:
        path = self._path(kind)
        if not path.is_file():
            return
        data = path.read_bytes()
        end = data.rfind(b"\n") + 1
        if end < len(data):  # a line cut short by a crash: drop it before appending
            with open(path, "r+b") as fh:
                fh.truncate(end)
        for line in data[:end].splitlines():
            try:
                rec = json.loads(line)
            except ValueError:
                continue
            self.loaded[kind][int(rec["i"])] = rec

    def append(self, kind: str, outcomes: list[dict]) -> None:
        fh = self._files.get(kind)
        if fh is None:
            fh = self._files[kind] = open(self._path(kind), "a", encoding="utf-8")
        for o in outcomes:
            fh.write(json.dumps(o, separators=(",", ":")) + "\n")
        now = time.monotonic()
        if now - self._flushed > 0.5:  # at most half a second of wells to redo after a crash
            fh.flush()
            self._flushed = now

    def close(self) -> None:
        for fh in self._files.values():
            fh.close()
        self._files.clear()


def _stamp(path) -> list | None:
    if not path or _ATTITUDE.match(str(path)):
        return None
    try:
        st = os.stat(path)
    except OSError:
        return None
    return [st.st_size, st.st_mtime_ns]


def _fingerprint(cfg: _Config, tasks: list[WellTask], settings: dict) -> str:
    col = cfg.column
    doc = {
        "version": __version__,
        "column": [list(col.names), [repr(float(v)) for v in col.s_m],
                   repr(float(col.base_s_m)), [bool(v) for v in col.unconformity]],
        "bed_dip": None if cfg.bed_dip is None else cfg.bed_dip.describe(),
        "tolerance": dataclasses.asdict(cfg.tolerance),
        "planes": [dataclasses.asdict(p) for p in cfg.planes],
        "depth_unit": cfg.depth_unit,
        "curves": None if cfg.curves is None else repr(cfg.curves),
        "settings": settings,
        "wells": [[t.index, t.well, t.las, t.survey, t.tops, t.dip, t.x_m, t.y_m,
                   t.elevation_m, t.depth_unit] for t in tasks],
        # the files as they are now: a checkpoint made from other versions is not resumed
        "files": [[_stamp(f) for f in (t.las, t.survey, t.tops, t.dip)] for t in tasks],
    }
    return hashlib.sha256(json.dumps(doc, sort_keys=True, default=repr).encode()).hexdigest()
