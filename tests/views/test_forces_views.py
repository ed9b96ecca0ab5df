"""The forces still: coloured by the force scale, arrows drawn, refused for a case not carried."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe.cli import main
from spaceframe.views.render import PALETTE

pytest.importorskip("pyvista")
iio = pytest.importorskip("imageio.v3")

MODELS = Path(__file__).resolve().parents[2] / "models"


def _has(img, hex_colour, tol=40) -> bool:
    rgb = np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)])
    return bool(np.any(np.abs(img.astype(int) - rgb).max(axis=2) < tol))


def test_forces_still_shows_tension_compression_and_arrows(tmp_path):
    """The hall truss under gravity (determinate; top chord in compression, bottom chord in
    tension, as every simply supported truss under downward load: common practice)."""
    out = tmp_path / "forces.png"
    res = CliRunner().invoke(main, ["animate", str(MODELS / "hall_truss.toml"), "--forces",
                                    "gravity", "-o", str(out), "--size", "640x400"])
    assert res.exit_code == 0, res.output
    img = iio.imread(out)
    assert img.shape[:2] == (400, 640)
    view = img[64:300]
    for key in ("tension", "compression", "load", "reaction"):
        assert _has(view, PALETTE[key][0], tol=30), key


def test_forces_still_refused_when_not_carried_or_not_png(tmp_path):
    canopy = str(MODELS / "canopy_sway.toml")
    res = CliRunner().invoke(main, ["animate", canopy, "--forces", "wind_y", "-o",
                                    str(tmp_path / "w.png")])
    assert res.exit_code == 2 and "not carried" in res.output and "sway" in res.output
    res = CliRunner().invoke(main, ["animate", canopy, "--forces", "roof", "-o",
                                    str(tmp_path / "w.gif")])
    assert res.exit_code == 2 and "still" in res.output
    assert not (tmp_path / "w.png").exists()


def test_forces_still_of_a_plane_frame_names_its_axes_x_and_y(monkeypatch):
    """The hall truss is a plane frame ([x, y], y up, as its model file says): the axis
    triad of its forces still is drawn for two dimensions (x and y), as its mode pictures
    are, not with the z of a space frame."""
    from spaceframe.views import render
    from spaceframe.views.forces_render import forces_picture

    seen = []
    real = render._triad
    monkeypatch.setattr(render, "_triad", lambda d, axes, origin, font, dimension, **kw:
                        seen.append(dimension) or real(d, axes, origin, font, dimension, **kw))
    r = spaceframe.forces(spaceframe.load(MODELS / "hall_truss.toml"), ["gravity"])
    forces_picture(r, 0, size=(480, 320))
    assert seen == [2]
