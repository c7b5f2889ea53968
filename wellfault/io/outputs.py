"""The one routine through which wellfault writes a file: safe for whatever the target is.

A replace through a temporary file (write beside the target, then :func:`os.replace`) means a
reader never sees half a file and a failed write leaves the old one whole; it is right for a
plain file and wrong for anything else. :func:`write_output` looks at the target first:

==========================================  =================================================
target                                      what is done
==========================================  =================================================
``-``, ``/dev/stdout``, ``/dev/stderr``     written to the process's own stream (no file is
                                            opened: a redirection with ``>>`` is honoured)
absent                                      created by the temporary-file replace, with the
                                            mode a plain ``open()`` gives (0666 less umask)
plain file, one link                        replaced through a temporary file; it keeps its
                                            mode, and its owner and group where the user may
                                            set them
plain file with other hard links            written in place (every name sees the new
                                            text; a replace would silently split the links)
symbolic link (a chain too)                 followed: the file it points to is written by
                                            the rules above and the link is kept
character or block device, named pipe       written straight through, never replaced
(``/dev/null``, a FIFO, a terminal)
folder, socket                              refused (:class:`~wellfault.errors.InputError`)
==========================================  =================================================

:func:`output_folder` is the counterpart for a folder of outputs (``wellfault screen --out``):
an existing file where a folder is wanted is refused and nothing is removed.

This is common practice for command-line tools (e.g. how editors and package managers save
files); no part of it replaces a non-plain file by a plain one.
"""

from __future__ import annotations

import os
import stat
import sys
import tempfile
from pathlib import Path
from typing import BinaryIO, Callable, Union

from ..errors import InputError

__all__ = ["write_output", "output_folder", "remove_stale_temporaries", "STDOUT", "is_stream"]

STDOUT = "-"
"""The name that means standard output wherever wellfault writes a single file."""

Content = Union[str, bytes, Callable[[BinaryIO], None]]

# the process's own streams, reached without opening a file (``/dev/stdout`` is a link to the
# descriptor: opening it would start a new file position at 0, or truncate an appended file)
_STREAM_NAMES = {"-": "stdout", "/dev/stdout": "stdout", "/dev/fd/1": "stdout",
                 "/proc/self/fd/1": "stdout", "/dev/stderr": "stderr", "/dev/fd/2": "stderr",
                 "/proc/self/fd/2": "stderr"}


def is_stream(target: str | os.PathLike) -> bool:
    """True when ``target`` names standard output or standard error rather than a file."""
    return os.fspath(target) in _STREAM_NAMES


def _as_bytes_writer(content: Content, encoding: str) -> Callable[[BinaryIO], None]:
    if callable(content):
        return content
    data = content.encode(encoding) if isinstance(content, str) else bytes(content)
    return lambda fh: fh.write(data)


def _why(err: OSError) -> str:
    return (err.strerror or str(err)).lower()


def _new_file_mode() -> int:
    """0666 less the process umask: the mode a plain ``open()`` gives a new file."""
    mask = os.umask(0o022)  # reading the umask means setting it: put it straight back
    os.umask(mask)
    return 0o666 & ~mask


def _keep_owner(path: str, st: os.stat_result) -> None:
    """Give ``path`` the owner and group of ``st`` as far as this user may set them."""
    for uid, gid in ((st.st_uid, st.st_gid), (-1, st.st_gid)):
        try:
            os.chown(path, uid, gid)
            return
        except (PermissionError, NotImplementedError):
            continue
        except OSError:
            return


def _replace(target: Path, write: Callable[[BinaryIO], None], old: os.stat_result | None,
             what: str) -> None:
    folder = target.parent if str(target.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{target.name}.", suffix=".tmp")
    except OSError as err:
        raise InputError(f"cannot write {what} {str(target)!r}: {_why(err)} in "
                         f"folder {str(folder)!r}; check that it exists and is writable, or "
                         "choose another path") from err
    try:
        with os.fdopen(fd, "wb") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        # mkstemp makes the file private (0600): give it the old file's mode and owner, or
        # the mode a plain open() would give a new one
        if old is not None:
            os.chmod(tmp, stat.S_IMODE(old.st_mode))
            _keep_owner(tmp, old)
        else:
            os.chmod(tmp, _new_file_mode())
        os.replace(tmp, target)
    except OSError as err:
        Path(tmp).unlink(missing_ok=True)
        raise InputError(f"cannot write {what} {str(target)!r}: {_why(err)}; "
                         "check the path and the free space") from err
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise


def _through(target: Path, write: Callable[[BinaryIO], None], flags: int, what: str) -> None:
    """Open ``target`` as it is (no create, no replace) and write."""
    try:
        fd = os.open(target, os.O_WRONLY | flags)
    except OSError as err:
        raise InputError(f"cannot write {what} {str(target)!r}: {_why(err)}; check "
                         "the path and its permissions") from err
    with os.fdopen(fd, "wb") as fh:
        write(fh)


def write_output(target: str | os.PathLike, content: Content, *, what: str = "the output",
                 encoding: str = "utf-8") -> Path:
    """Write ``content`` to ``target`` in the way that suits what ``target`` is.

    Parameters
    ----------
    target : str or PathLike
        A file path, ``-`` for standard output, or a device, pipe or symbolic link (module
        docstring: the table of cases).
    content : str, bytes or callable
        Text (encoded with ``encoding``), bytes, or a function that writes to a binary file
        handle (e.g. ``lambda fh: df.to_parquet(fh)``); it is called once.
    what : str, default "the output"
        How the file is named in error messages (``"the report"``, ``"the cut table"``).
    encoding : str, default "utf-8"
        Encoding of text content.

    Returns
    -------
    Path
        The target as given (``Path("-")`` for standard output), not the file a link
        points to.

    Raises
    ------
    InputError
        ``target`` is a folder or a socket, its folder does not exist or is not writable, or
        the write failed (the old file is then left whole where it was a plain file).
    """
    name = os.fspath(target)
    write = _as_bytes_writer(content, encoding)
    stream = _STREAM_NAMES.get(name)
    if stream is not None:
        out = getattr(sys, stream)
        out.flush()
        buffer = getattr(out, "buffer", None)
        if buffer is not None:
            write(buffer)
            buffer.flush()
        else:  # a replaced text stream (tests, notebooks): decode what was written
            import io

            raw = io.BytesIO()
            write(raw)
            out.write(raw.getvalue().decode(encoding))
            out.flush()
        return Path(name)
    if name == "":
        raise InputError(f"no path given for {what}; give a file name, or - for standard output")
    path = Path(os.path.realpath(name))  # follows every link: the link itself is kept
    try:
        st = os.stat(path)
    except FileNotFoundError:
        st = None
    except NotADirectoryError as err:
        raise InputError(f"cannot write {what} {name!r}: part of its folder path is a file, "
                         "not a folder; choose another path") from err
    except OSError as err:  # a loop of links, a name too long, no permission to look
        raise InputError(f"cannot write {what} {name!r}: {_why(err)}; check the "
                         "path") from err
    if st is None:
        if not path.parent.is_dir():
            raise InputError(f"cannot write {what} {name!r}: folder {str(path.parent)!r} does "
                             "not exist; create it or choose another path")
        _replace(path, write, None, what)
    elif stat.S_ISDIR(st.st_mode):
        raise InputError(f"cannot write {what} {name!r}: it is a folder; give a file name "
                         "inside it")
    elif stat.S_ISREG(st.st_mode):
        if st.st_nlink > 1:  # keep every hard link pointing at the new text
            _through(path, write, os.O_TRUNC, what)
        else:
            _replace(path, write, st, what)
    elif stat.S_ISSOCK(st.st_mode):
        raise InputError(f"cannot write {what} {name!r}: it is a socket; give a file name")
    else:  # character or block device, named pipe: write into it, never replace it
        _through(path, write, 0, what)
    return Path(name)


def output_folder(folder: str | os.PathLike, *, what: str = "the output folder") -> Path:
    """Make sure ``folder`` is a folder (creating it and its parents); return it as a Path.

    Raises
    ------
    InputError
        ``folder`` (or a part of its path) is an existing file, or it cannot be created.
        Nothing is removed.
    """
    path = Path(folder)
    if os.fspath(folder) in _STREAM_NAMES:
        raise InputError(f"{what} cannot be {os.fspath(folder)!r}: it holds several files; "
                         "give a folder path")
    if path.exists() and not path.is_dir():
        raise InputError(f"{what} {str(path)!r} is a file, not a folder; choose a folder path "
                         "(nothing was changed)")
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise InputError(f"cannot create {what} {str(path)!r}: {_why(err)}; check "
                         "the path and its permissions") from err
    return path


def remove_stale_temporaries(target: str | os.PathLike) -> list[Path]:
    """Remove the temporary files a killed :func:`write_output` left beside ``target``.

    A process killed outright (``SIGKILL``, power loss) while replacing ``target`` leaves its
    temporary file, ``.<name>.<random>.tmp``, in the folder; the target itself is whole (old
    or new). Returns the files removed.
    """
    path = Path(target)
    removed = []
    for p in path.parent.glob(f".{path.name}.*.tmp"):
        if p.is_file() and not p.is_symlink():
            p.unlink(missing_ok=True)
            removed.append(p)
    return removed
