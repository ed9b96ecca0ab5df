"""Shared fixtures; shared data and helpers are in ``common/``."""

from __future__ import annotations

import pytest


@pytest.fixture
def write(tmp_path):
    """Write text to a file in a temporary folder and return its path."""
    def _write(name, text):
        p = tmp_path / name
        p.write_text(text, encoding="utf-8")
        return p
    return _write
