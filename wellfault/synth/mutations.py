"""Seeded damage of the kinds users' files suffer, for fuzzing the readers and the commands.

Used by ``tests/test_fuzz.py`` (edits drawn by hypothesis) and ``benchmarks/bench_mutations.py``
(edits drawn from a seeded generator, thousands of files): lines deleted, repeated, swapped or
blanked, bytes flipped, text typed into numbers, truncation, unit strings changed, other
separators, a byte-order mark, Windows line ends, odd numbers (nan, inf, huge, negative), stray
section markers. An edit is ``(kind, a, b)``: ``a`` a position (taken modulo the file's size),
``b`` a payload. Nothing here is needed to run wellfault on real data.
"""

from __future__ import annotations

import re

import numpy as np

__all__ = ["KINDS", "ODD_NUMBERS", "UNIT_SWAPS", "TYPO_ALPHABET", "SEPARATORS", "STRAY_LINES",
           "mutate", "draw_edits"]

KINDS = ("delete", "duplicate", "swap", "flip", "typo", "truncate", "unit", "separator", "bom",
         "number", "blank", "crlf", "insert_line", "tilde")
ODD_NUMBERS = ["nan", "NaN", "inf", "-inf", "1e308", "-1e308", "1e-320", "0", "-0", "-5",
               "-999.25", "-9999", "99999999999999999999", "1,5", "1.2.3", "", " ", "abc",
               "0x10", "1e", "+", "−3"]
UNIT_SWAPS = [(".M ", ".FT "), (".M ", ". "), (".M ", ".FURLONG "), ("_m,", "_ft,"),
              ("_m\n", "\n"), ("md_m", "md"), ("md_m", "md (fathoms)"), ("thickness_m", "thick"),
              ("md_m", "MD [ft]"), ("_deg", "_rad"), ("M ", "m ")]
TYPO_ALPHABET = "aO lI,;.-+eE\t\"#~:"
SEPARATORS = [";", "\t", " ", ";;"]
STRAY_LINES = ["", "#", "~A", "~Curve", "A,1", "F-1,A,1e400", "1000.0 1 1",
               "-999.25 -999.25 -999.25", ",,,", "\"", "well,surface,md_m", "~Version",
               "WRAP. YES : wrapped", "VERS. 3.0 : v3", "NULL. nan : null", "STEP.M 0 : s"]


def _numbers(text: str) -> list[tuple[int, int]]:
    return [m.span() for m in re.finditer(r"[-+]?\d+(?:\.\d*)?(?:[eE][-+]?\d+)?", text)]


def mutate(data: bytes, edits: list[tuple]) -> bytes:
    """Apply the edits to a file's bytes."""
    for kind, a, b in edits:
        lines = data.split(b"\n")
        n = len(lines)
        if kind == "delete" and n > 1:
            del lines[a % n]
        elif kind == "duplicate":
            lines.insert(a % n, lines[a % n])
        elif kind == "swap" and n > 1:
            i, j = a % n, b % n
            lines[i], lines[j] = lines[j], lines[i]
        elif kind == "flip" and data:
            buf = bytearray(data)
            buf[a % len(buf)] ^= b
            data = bytes(buf)
            continue
        elif kind == "typo" and data:
            k = a % (len(data) + 1)
            data = data[:k] + b.encode() + data[k:]
            continue
        elif kind == "truncate":
            data = data[: a % (len(data) + 1)]
            continue
        elif kind == "unit":
            old, new = UNIT_SWAPS[b]
            data = data.replace(old.encode(), new.encode(), 1 + a % 3)
            continue
        elif kind == "separator":
            data = data.replace(b",", b.encode()) if a % 2 else data.replace(b" ", b.encode())
            continue
        elif kind == "bom":
            data = (b"\xef\xbb\xbf" if a % 3 else b"\xff\xfe") + data
            continue
        elif kind == "number":
            text = data.decode("utf-8", errors="replace")
            spans = _numbers(text)
            if spans:
                i, j = spans[a % len(spans)]
                data = (text[:i] + b + text[j:]).encode("utf-8")
            continue
        elif kind == "blank":
            lines[a % n] = b""
        elif kind == "crlf":
            data = data.replace(b"\n", b"\r\n")
            continue
        elif kind == "insert_line":
            lines.insert(a % (n + 1), b.encode())
        elif kind == "tilde":
            lines[a % n] = b"~" + lines[a % n]
        data = b"\n".join(lines)
    return data


def draw_edits(rng: np.random.Generator, max_edits: int = 4) -> list[tuple]:
    """A short list of edits drawn from ``rng`` (the seeded counterpart of the test strategy)."""
    out = []
    for _ in range(int(rng.integers(1, max_edits + 1))):
        kind = KINDS[int(rng.integers(len(KINDS)))]
        a = int(rng.integers(0, 10**6))
        if kind == "number":
            pick = int(rng.integers(3))
            if pick == 0:
                b = ODD_NUMBERS[int(rng.integers(len(ODD_NUMBERS)))]
            elif pick == 1:
                b = repr(float(rng.standard_cauchy() * 10.0 ** int(rng.integers(-5, 12))))
            else:
                b = str(int(rng.integers(-10**12, 10**12)))
        elif kind == "typo":
            n = int(rng.integers(1, 4))
            b = "".join(TYPO_ALPHABET[int(i)] for i in rng.integers(len(TYPO_ALPHABET), size=n))
        elif kind == "flip":
            b = int(rng.integers(1, 256))
        elif kind == "unit":
            b = int(rng.integers(len(UNIT_SWAPS)))
        elif kind == "separator":
            b = SEPARATORS[int(rng.integers(len(SEPARATORS)))]
        elif kind == "insert_line":
            b = STRAY_LINES[int(rng.integers(len(STRAY_LINES)))]
        else:
            b = int(rng.integers(0, 10**6))
        out.append((kind, a, b))
    return out
