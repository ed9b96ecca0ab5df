"""What the reader of a picture sees (issue 11, section 5): the whole frame, the whole
caption, the colour scale beside the frame, sheets of a sensible width, an elevation."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import spaceframe
from spaceframe.families import braced_tower
from spaceframe.views.render import SHEET_WIDTH, contact_sheet, mode_frames, state_picture
from spaceframe.views.scene import scene_of

pytest.importorskip("pyvista")

MODELS = Path(__file__).resolve().parents[2] / "models"
WHITE = 235


def _view_band(img):
    """The rows of the 3D view: between the caption's and the legend's grey rules."""
    rule = np.flatnonzero((np.abs(img[:, :, :3].astype(int) - 0xdd) <= 2).all(axis=2).mean(axis=1)
                          > 0.98)
    return img[rule[0] + 1:rule[-1]]


def _ink_rows(band):
    return np.flatnonzero((band[:, 80:, :3] < WHITE).any(axis=2).any(axis=1))


def test_tall_tower_is_not_cropped():
    """A tower 16 storeys high (48 m on a 2 m base) in an 800 x 480 picture: the frame
    reaches neither edge of the view band, so nothing is cut off."""
    r = spaceframe.audit(braced_tower(16, bracing="none"))
    band = _view_band(mode_frames(r, 0, n=1)[0])
    rows = _ink_rows(band)
    assert len(rows) and rows[0] > 2 and rows[-1] < len(band) - 3
    assert rows[-1] - rows[0] > 0.7 * len(band)          # and it is drawn large


def test_caption_is_whole_at_800_px():
    """The hall's mode sentences run to three lines at 800 px: every word of the sentence
    is in the caption, none cut with an ellipsis."""
    from spaceframe.views.render import _caption_lines, _mode_words

    r = spaceframe.audit(spaceframe.load(MODELS / "hall_roof_unbraced.toml"))
    _, caption = _mode_words(r, 30)
    lines = _caption_lines(caption, 800, 10)
    assert len(lines) >= 3 and " ".join(lines) == " ".join(caption.split())


def test_colour_scale_is_below_the_frame():
    """The force scale sits in the legend band: the view band holds no pixel of the bar's
    middle colours away from the frame (the bar was drawn over the view's top rows)."""
    r = spaceframe.audit(spaceframe.load(MODELS / "canopy_sway.toml"))
    img = state_picture(r, 0)
    band = _view_band(img)
    top = band[:40, 250:550, :3].astype(int)              # where the bar used to be
    assert (top >= WHITE).all()
    below = img[len(img) - 90:, :, :3].astype(int)
    assert (np.abs(below - [0x1d, 0x5f, 0xa6]).max(axis=2) < 30).sum() > 20   # the bar's blue end


def test_png_sheet_wraps_into_rows():
    """Six poses of 800 px make two columns and three rows (1,600 px wide), not one strip
    4,800 px wide; each mode starts a new row."""
    pose = np.zeros((480, 800, 3), np.uint8)
    sheet = contact_sheet([[pose] * 6, [pose] * 6])
    assert sheet.shape == (480 * 6, SHEET_WIDTH, 3)
    assert contact_sheet([[pose] * 2]).shape == (480, 1600, 3)
    assert contact_sheet([[np.zeros((240, 2000, 3), np.uint8)] * 3]).shape == (720, 2000, 3)


def test_hall_is_seen_in_elevation_across_the_motion():
    """The tie line of the demo roof slides along the hall (y): the camera looks low (at
    most 30 degrees above level), across that motion (not along y) and at the trusses'
    faces (not along their span, x, where they are seen edge on as a flat grid)."""
    r = spaceframe.audit(spaceframe.load(MODELS / "hall_roof_unbraced.toml"))
    s = scene_of(r)
    i = r.mode_kinds.index("tie-line")
    for v in (s.view(i), s.view()):
        assert np.degrees(np.arcsin(v[2])) <= 30.0 + 1e-9
        assert 0.3 <= abs(v[1]) <= 0.9
