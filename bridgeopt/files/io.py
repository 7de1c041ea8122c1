"""Reading TOML and JSON files and writing files atomically, with errors that name the file.

Small helpers shared by scenario files, sweep files, JSON output and the sweep's
result tables.
"""

from __future__ import annotations

import json
import os
import stat
import tempfile
import tomllib
from pathlib import Path
from typing import Callable

from bridgeopt.errors import InputError

__all__ = ["read_toml", "read_json", "read_input_bytes", "atomic_write", "MAX_INPUT_BYTES",
           "written_by_bridgeopt"]

#: Largest input file read (scenario, sweep, design JSON, proposed layout). [bytes]
MAX_INPUT_BYTES = 32 * 1024 * 1024


def read_input_bytes(path: str | os.PathLike, what: str) -> bytes:
    """The bytes of an input file: a regular file of at most :data:`MAX_INPUT_BYTES`.

    Devices, pipes and sockets are refused before they are opened (reading one could
    block for ever or never end).

    Parameters
    ----------
    path : path-like
        The file.
    what : str
        What the file is, for messages (``"scenario file (.toml)"``).

    Returns
    -------
    bytes

    Raises
    ------
    InputError
        With the field ``"file"``: missing, a directory or other non-regular file,
        too large, or unreadable.
    """
    path = Path(path)
    try:
        info = path.stat()
    except FileNotFoundError:
        raise InputError("file", str(path), f"an existing {what}") from None
    except OSError as err:
        raise InputError("file", str(path), f"a readable {what} ({err.strerror})") from None
    if stat.S_ISDIR(info.st_mode):
        raise InputError("file", str(path), f"a {what}, not a directory")
    if not stat.S_ISREG(info.st_mode):
        raise InputError("file", str(path), f"a regular {what} (not a device, pipe or socket)")
    if info.st_size > MAX_INPUT_BYTES:
        raise InputError("file", str(path), f"a {what} of at most {MAX_INPUT_BYTES // 2**20} MiB "
                         f"(this one has {info.st_size / 2**20:.1f} MiB)")
    try:
        with open(path, "rb") as fh:
            data = fh.read(MAX_INPUT_BYTES + 1)
    except OSError as err:
        raise InputError("file", str(path), f"a readable {what} ({err.strerror})") from None
    if len(data) > MAX_INPUT_BYTES:
        raise InputError("file", str(path), f"a {what} of at most {MAX_INPUT_BYTES // 2**20} MiB")
    return data


def read_toml(path: str | os.PathLike, what: str) -> dict:
    """The TOML document at ``path``; ``what`` names it in errors (``"scenario file"``).

    Parameters
    ----------
    path : path
        The ``.toml`` file.
    what : str
        What the file is, for messages (``"scenario file"``, ``"sweep file"``).

    Returns
    -------
    dict
        The document's tables and values, as :mod:`tomllib` gives them.

    Raises
    ------
    InputError
        With the field ``"file"``: the file is missing, a directory, not UTF-8,
        unreadable, or not valid TOML.  A byte-order mark is tolerated.
    """
    path = Path(path)
    data = read_input_bytes(path, f"{what} (.toml)")
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError("file", str(path), "a UTF-8 text file in TOML") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as err:
        raise InputError("file", str(path), f"a TOML document; {err}") from None


def read_json(path: str | os.PathLike, what: str):
    """The JSON document at ``path``; ``what`` names it in errors (``"design JSON file"``).

    Parameters
    ----------
    path : path
        The JSON file (UTF-8).
    what : str
        What the file is, for messages (``"design JSON file"``, ``"layout JSON file"``).

    Returns
    -------
    object
        The decoded document (usually a dict).

    Raises
    ------
    InputError
        With the field ``"file"``: the file is missing, unreadable or not valid JSON.
    """
    path = Path(path)
    data = read_input_bytes(path, what)
    try:
        return json.loads(data.decode("utf-8"))
    except (UnicodeDecodeError, json.JSONDecodeError) as err:
        raise InputError("file", str(path), f"a readable JSON file ({err})") from None


def atomic_write(path: str | os.PathLike, write: Callable[[str], None]) -> Path:
    """Write ``path`` through ``write(temporary_path)``, synced, then renamed into place.

    A reader never sees a half-written file; on failure the old file, if any, is
    left as it was and the temporary file is removed.

    Parameters
    ----------
    path : path
        The file to write (its folder must exist).
    write : callable
        ``write(temporary_path)`` writes the whole content to the path it is given.

    Returns
    -------
    Path
        ``path``.
    """
    path = Path(path)
    fd, tmp = tempfile.mkstemp(dir=path.parent if str(path.parent) else ".",
                               prefix=f".{path.name}.", suffix=".tmp")
    os.close(fd)
    try:
        write(tmp)
        with open(tmp, "rb") as fh:
            os.fsync(fh.fileno())
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # mkstemp makes the file private; use the usual mode
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        raise
    return path


def written_by_bridgeopt(path: str | os.PathLike) -> bool:
    """Whether ``path`` is a JSON file that bridgeopt wrote (its ``schema`` is ours).

    Used before replacing a file: the program replaces only its own output unless the
    user says ``--force``.

    Parameters
    ----------
    path : path-like
        An existing file.

    Returns
    -------
    bool
    """
    try:
        if Path(path).stat().st_size > MAX_INPUT_BYTES:
            return False
        data = json.loads(Path(path).read_bytes().decode("utf-8"))
    except (OSError, UnicodeDecodeError, ValueError):
        return False
    return isinstance(data, dict) and str(data.get("schema", "")).startswith("bridgeopt.")
