"""What the reader of a picture sees (issue 11, section 5): the whole frame, the whole
caption, the colour scale beside the frame, sheets of a sensible width, an elevation."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

import spaceframe
from spaceframe.families import braced_tower
from spaceframe.views.render import mode_frames, sheet_grid, state_picture
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


def test_sheet_grid_keeps_rows_even_and_within_the_width():
    """Six poses make two rows of three, each pose scaled to a third of the sheet width at
    the asked ratio (800 x 480 -> 532 x 320: 1600 // 3 = 533, rounded down to even); a
    pose narrower than its share keeps its size.  Arithmetic by hand."""
    assert sheet_grid(6, (800, 480)) == ((2, 3), (532, 320))
    assert sheet_grid(4, (800, 480)) == ((1, 4), (400, 240))
    assert sheet_grid(7, (800, 480)) == ((2, 4), (400, 240))
    assert sheet_grid(2, (320, 240)) == ((1, 2), (320, 240))
    assert sheet_grid(1, (3000, 1000)) == ((1, 1), (1600, 534))


def test_hall_sheets_split_within_the_height_and_name_their_modes():
    """The demo roof's 37 mechanisms at 6 poses: the sheets hold every mode once, in order,
    each sheet at most SHEET_HEIGHT high, evened out (no sheet of one mode left over), and
    each file named after its first and last mode, zero-padded so the names sort."""
    from spaceframe.views.render import SHEET_HEIGHT, plan_sheets

    r = spaceframe.audit(spaceframe.load(MODELS / "hall_roof_unbraced.toml"))
    plan = plan_sheets(r, range(r.mechanisms), "hall.png", n=6)
    flat = [k for g in plan.groups for k in g]
    assert flat == list(range(37)) and len(plan.groups) > 1
    sizes = [len(g) for g in plan.groups]
    assert max(sizes) - min(sizes) <= 1
    assert [p.name for p in plan.paths][:2] == [f"hall-modes-01-{sizes[0]:02d}.png",
                                                f"hall-modes-{sizes[0] + 1:02d}-"
                                                f"{sizes[0] + sizes[1]:02d}.png"]
    assert sorted(p.name for p in plan.paths) == [p.name for p in plan.paths]
    one = plan_sheets(r, [4], "hall.png", n=6)
    assert [p.name for p in one.paths] == ["hall.png"] and SHEET_HEIGHT >= 4000


def test_sheet_words_each_mode_once(tmp_path):
    """Two modes of the footbridge on one sheet of two poses: the sheet is as wide as a row
    of poses and as high as two blocks (title, caption lines, one row of poses) plus one
    gap and one legend band, not two pictures each with its own caption and legend; a forced low height puts each mode
    on its sheet, named by the mode.  Heights read back with Pillow (``Image.size``)."""
    from PIL import Image

    from spaceframe.views.render import (_GAP, _TITLE, _caption_lines, _legend_height,
                                         _mode_legend, _mode_words, plan_sheets, write_sheets)

    r = spaceframe.audit(spaceframe.load(MODELS / "footbridge_truss.toml"))
    plan = plan_sheets(r, [0, 1], tmp_path / "b.png", n=2, size=(320, 240))
    written = write_sheets(r, plan)
    assert written == [tmp_path / "b.png"]
    w, h = Image.open(written[0]).size
    # as wide as the row of two 320 px poses; the captions wrap to that width
    heads = [_TITLE + 16 * len(_caption_lines(_mode_words(r, k)[1], 640, 10 ** 6)) + 6
             for k in (0, 1)]
    assert (w, h) == (640, sum(heads) + 2 * 240 + _GAP + _legend_height(_mode_legend(0), 640))
    split = plan_sheets(r, [0, 1], tmp_path / "c.png", n=2, size=(320, 240), height=400)
    assert [p.name for p in split.paths] == ["c-mode-01.png", "c-mode-02.png"]
    for p in write_sheets(r, split):
        assert Image.open(p).size[1] < h


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


def test_plane_frames_are_seen_with_x_to_the_right():
    """A plane frame scores the same from either side, so the camera stands on -y and the
    model's x runs left to right, as on a drawn elevation (common practice): for the demo
    Pratt truss at rest and the footbridge truss (a plane truss in space, y = 0) at rest
    and in motion, the screen's right has a positive x."""
    from spaceframe.views.render import screen_axes

    for name in ("hall_truss.toml", "footbridge_truss.toml"):
        r = spaceframe.audit(spaceframe.load(MODELS / name))
        s = scene_of(r)
        for i in [None, *range(min(2, len(s.modes)))]:
            right, _ = screen_axes(s.view(i))
            assert right[0] > 0.5, (name, i, right)
