"""Files a user names: claim files, data files, certificates.

Every file the tool reads on a user's behalf goes through :func:`read_bytes`: only regular
files (a directory, a FIFO, a device such as ``/dev/zero`` or a socket is refused before
anything is read), opened without blocking, and never more than a stated number of bytes.
:func:`parse_json` turns such bytes into data and refuses what would otherwise surface as
a raw Python exception: nesting deeper than the decoder's recursion allows, integers of
thousands of digits, ``NaN``/``Infinity``, and unpaired surrogate escapes such as
``"\\ud800"`` (valid JSON that no UTF-8 text can hold).

Both raise :class:`UnreadableFile`, whose message names the file and what is wrong.

>>> import tempfile, os
>>> folder = tempfile.mkdtemp()
>>> read_bytes(folder, "data file", 10)  # doctest: +ELLIPSIS
Traceback (most recent call last):
...
verifier.userfiles.UnreadableFile: ...: data file is a directory, not a regular file
"""

from __future__ import annotations

import json
import os
import stat
from pathlib import Path

__all__ = ["UnreadableFile", "read_bytes", "read_text", "parse_json", "MAX_JSON_DIGITS",
           "inside"]

MAX_JSON_DIGITS = 1_000         # digits of one integer in a JSON file


class UnreadableFile(ValueError):
    """A user-named file that cannot be used: its message names the file and the reason."""


def _kind(mode: int) -> str:
    if stat.S_ISDIR(mode):
        return "a directory"
    if stat.S_ISFIFO(mode):
        return "a FIFO (named pipe)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "a special file"


def read_bytes(path: str | Path, what: str, max_bytes: int) -> bytes:
    """The content of a regular file of at most ``max_bytes`` bytes.

    ``what`` says what the file is for ("claim file", "certificate", ...) in messages.
    The file is opened with ``O_NONBLOCK`` and checked with ``fstat`` on the open
    descriptor, so a FIFO cannot block and a file swapped after a check is still
    caught; at most ``max_bytes + 1`` bytes are ever read.
    """
    name = str(path)
    try:
        descriptor = os.open(name, os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_CLOEXEC", 0))
    except FileNotFoundError:
        raise UnreadableFile(f"{name}: no such file") from None
    except IsADirectoryError:
        raise UnreadableFile(f"{name}: {what} is a directory, not a regular file") from None
    except OSError as error:
        raise UnreadableFile(f"{name}: cannot open the {what} "
                             f"({error.strerror or error})") from None
    try:
        mode = os.fstat(descriptor).st_mode
        if not stat.S_ISREG(mode):
            raise UnreadableFile(f"{name}: {what} is {_kind(mode)}, not a regular file")
        chunks, size = [], 0
        while size <= max_bytes:
            chunk = os.read(descriptor, min(1 << 20, max_bytes + 1 - size))
            if not chunk:
                break
            chunks.append(chunk)
            size += len(chunk)
        if size > max_bytes:
            raise UnreadableFile(f"{name}: {what} is larger than {max_bytes:,} bytes "
                                 "(the limit for one file)")
        return b"".join(chunks)
    except OSError as error:
        raise UnreadableFile(f"{name}: cannot read the {what} "
                             f"({error.strerror or error})") from None
    finally:
        os.close(descriptor)


def read_text(path: str | Path, what: str, max_bytes: int) -> str:
    """:func:`read_bytes`, decoded as UTF-8 (refused with a message if it is not)."""
    data = read_bytes(path, what, max_bytes)
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise UnreadableFile(f"{path}: {what} is not UTF-8 text (byte {error.start + 1})") \
            from None


def _integer(text: str) -> int:
    digits = len(text.lstrip("-"))
    if digits > MAX_JSON_DIGITS:
        raise _Refused(f"an integer of {digits:,} digits (at most {MAX_JSON_DIGITS:,} "
                       "are accepted)")
    return int(text)


def _constant(text: str):
    raise _Refused(f"{text} is not a JSON number")


class _Refused(Exception):
    pass


def parse_json(text: str, path: str | Path, what: str):
    """The data of a JSON text, or :class:`UnreadableFile` naming the file and the fault."""
    try:
        data = json.loads(text, parse_int=_integer, parse_constant=_constant)
    except json.JSONDecodeError as error:
        raise UnreadableFile(f"{path}:{error.lineno}:{error.colno}: invalid JSON in the {what} "
                             f"({error.msg})") from None
    except _Refused as error:
        raise UnreadableFile(f"{path}: {what} holds {error}") from None
    except RecursionError:
        raise UnreadableFile(f"{path}: {what} is nested too deeply (lists or objects inside "
                             "one another beyond what the reader accepts)") from None
    except ValueError as error:    # the interpreter's own limits on numbers
        raise UnreadableFile(f"{path}: {what} holds a value that cannot be read ({error})") \
            from None
    try:
        json.dumps(data, ensure_ascii=False).encode("utf-8")
    except UnicodeEncodeError:
        raise UnreadableFile(f"{path}: {what} holds an unpaired surrogate escape (such as "
                             "\\ud800), which is not a character") from None
    except RecursionError:
        raise UnreadableFile(f"{path}: {what} is nested too deeply") from None
    return data


def inside(path: str | Path, folder: str | Path) -> bool:
    """Whether ``path`` (already resolved) lies in ``folder`` (already resolved)."""
    path, folder = os.path.normcase(str(path)), os.path.normcase(str(folder))
    return path == folder or path.startswith(folder.rstrip(os.sep) + os.sep)
