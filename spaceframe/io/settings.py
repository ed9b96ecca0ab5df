"""Small TOML files that are not models (extrusion specs, batch variants): read and parse."""

from __future__ import annotations

import os
import re
import tomllib
from pathlib import Path

from ..errors import ModelError

__all__ = ["read_settings"]


def read_settings(path, kind: str) -> tuple[dict, str]:
    """Read a UTF-8 TOML file and parse it.

    Parameters
    ----------
    path : str or os.PathLike
    kind : str
        What the file is, for messages: ``"spec"``, ``"variants"``.

    Returns
    -------
    doc : dict
        The parsed document.
    text : str
        The file's text, for finding the line of an item in later messages.

    Raises
    ------
    ModelError
        For a missing or unreadable file, and for a TOML syntax error (with
        the line the parser gives).
    """
    source = os.fspath(path)
    try:
        text = Path(source).read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise ModelError(f"no such {kind} file; check the path and its spelling",
                         path=source) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ModelError(f"cannot be read ({exc}); a {kind} file is UTF-8 TOML text",
                         path=source) from None
    try:
        return tomllib.loads(text), text
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"at line (\d+)", str(exc))
        raise ModelError(f"not valid TOML: {exc}; fix the syntax there", path=source,
                         line=int(m.group(1)) if m else None) from None
