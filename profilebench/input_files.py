"""Bounded reading of an input file (a project, a point list, an r/t table).

Below every layer, as errors.py is, so that the r/t tables (assess) and the project files (io)
read their files the same way: never a device, a pipe or a file over its size limit.
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

from profilebench.errors import ProjectFileError

__all__ = ["check_input_file", "read_input_bytes", "megabytes"]


def megabytes(size: int) -> str:
    """A byte count for messages, in MiB (2**20 bytes) as the limits are set: "20 MiB"."""
    return f"{size / 2**20:.4g} MiB"


def check_input_file(path, kind: str, choose: str, limit: int) -> Path:
    """``path`` checked as an input file of at most ``limit`` bytes, before anything reads it.

    Raises ProjectFileError, saying what is wrong and what to do, for a missing path, a link
    that leads nowhere or loops, a folder, something that is not a regular file (a device or a
    pipe, whose reading might never end or never start) and a file over ``limit`` bytes.
    """
    p = Path(path)
    shown = str(p)
    if "\0" in shown:
        raise ProjectFileError(f"{shown!r} holds a NUL character, which no file name can; {choose}")
    try:
        st = os.stat(p)
    except FileNotFoundError:
        if os.path.lexists(p):
            raise ProjectFileError(
                f"{shown!r} is a link to {os.readlink(p)!r}, which does not exist; {choose}"
            ) from None
        raise ProjectFileError(f"no {kind} at {shown!r}; check the path") from None
    except OSError as exc:  # a loop of links, a name too long, a folder that cannot be entered
        raise ProjectFileError(f"cannot open {shown!r}: {exc.strerror or exc}; {choose}") from None
    if stat.S_ISDIR(st.st_mode):
        raise ProjectFileError(f"{shown!r} is a folder, not a {kind}; {choose}")
    if not stat.S_ISREG(st.st_mode):
        raise ProjectFileError(
            f"{shown!r} is not a regular file; {choose} (a device or a pipe is not read)"
        )
    if st.st_size > limit:
        raise ProjectFileError(
            f"{shown!r} is {megabytes(st.st_size)}, over the {megabytes(limit)} limit for a "
            f"{kind}; it is probably not one: {choose}"
        )
    return p


def read_input_bytes(path, kind: str, choose: str, limit: int) -> bytes:
    """The bytes of the input file ``path``, at most ``limit`` of them.

    ``kind`` names the file in messages ("project file", "point file"); ``choose`` says what to
    pick instead ("choose a .json project file"). Raises ProjectFileError as
    :func:`check_input_file` does, and for a file that grew over ``limit`` while being read or
    cannot be read. The file is opened without blocking, so a pipe put in its place after the
    check is not waited on.
    """
    p = check_input_file(path, kind, choose, limit)
    shown = str(p)
    try:
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with open(fd, "rb") as fh:
            if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):
                raise ProjectFileError(f"{shown!r} is not a regular file; {choose}")
            raw = fh.read(limit + 1)
    except OSError as exc:
        raise ProjectFileError(
            f"cannot read {shown!r}: {exc.strerror or exc}; check permissions"
        ) from exc
    if raw is None or len(raw) > limit:
        raise ProjectFileError(
            f"{shown!r} is over the {megabytes(limit)} limit for a {kind}; {choose}"
        )
    return raw
