"""Reading TOML and JSON files and writing files atomically, with errors that name the file.

Small helpers shared by scenario files, sweep files, JSON output and the sweep's
result tables.
"""

from __future__ import annotations

import json
import os
import tempfile
import tomllib
from pathlib import Path
from typing import Callable

from bridgeopt.errors import InputError

__all__ = ["read_toml", "read_json", "atomic_write"]


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
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except FileNotFoundError:
        raise InputError("file", str(path), f"an existing {what} (.toml)") from None
    except IsADirectoryError:
        raise InputError("file", str(path), f"a {what} (.toml), not a directory") from None
    except UnicodeDecodeError:
        raise InputError("file", str(path), "a UTF-8 text file in TOML") from None
    except OSError as err:
        raise InputError("file", str(path), f"a readable file ({err.strerror})") from None
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
    try:
        return json.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise InputError("file", str(path), f"an existing {what}") from None
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as err:
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
