"""The desktop viewer, driven off-screen through the calls its widgets make."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe.cli import main

MODELS = Path(__file__).resolve().parents[2] / "models"


@pytest.fixture(scope="module")
def canopy_viewer():
    from spaceframe.analysis.bracing import recommend_bracing
    from spaceframe.views.desktop import DeskViewer

    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    v = DeskViewer(spaceframe.audit(frame), recommend_bracing(frame), off_screen=True,
                   size=(640, 420))
    yield v
    v.close()


def differs(a, b) -> bool:
    return np.abs(a.astype(int) - b.astype(int)).sum() > 0


def test_mode_plays_and_moves_the_frame(canopy_viewer):
    v = canopy_viewer
    rest = v.screenshot()
    assert (rest < 200).any(axis=2).mean() > 0.005, "the window is blank"
    v.set_mode(1)
    assert "Mechanism 1 of 1 (sway)" in v._caption()
    a = v.screenshot()
    assert differs(rest, a)
    v.set_playing(True)
    for _ in range(6):
        v.step()
    assert differs(a, v.screenshot()), "playing does not move the mode"
    v.set_playing(False)
    before = v.points()
    v.set_amplitude(0.3)
    assert np.abs(v.points() - v.scene.coords).max() > np.abs(before - v.scene.coords).max()
    v.set_mode(0)


def test_state_colours_and_bracing_switch(canopy_viewer):
    v = canopy_viewer
    rest = v.screenshot()
    v.set_state(1)
    assert "tension" in v._caption()
    assert differs(rest, v.screenshot())
    v.set_state(0)
    v.set_bracing(True)
    assert "bracing" in v._actors and "Proposed bracing shown" in v._caption()
    assert differs(rest, v.screenshot())
    v.set_bracing(False)
    assert "bracing" not in v._actors


def test_pick_names_joint_tags_and_member():
    """An extruded roof's joints carry their frame and role: picking says them."""
    from spaceframe.views.desktop import DeskViewer

    frame = spaceframe.load(MODELS / "hall_roof_unbraced.toml")
    v = DeskViewer(spaceframe.audit(frame, soft=False), off_screen=True, size=(480, 320))
    try:
        j = frame.joint_ids.index("F3.U2")
        text = v.pick(frame.coords[j] + 1e-3)
        assert text.startswith("joint F3.U2") and "frame 3" in text and "nearest member" in text
    finally:
        v.close()


def test_view_without_a_display_says_what_to_do(monkeypatch):
    monkeypatch.delenv("DISPLAY", raising=False)
    monkeypatch.delenv("WAYLAND_DISPLAY", raising=False)
    res = CliRunner().invoke(main, ["view", str(MODELS / "canopy_sway.toml")])
    assert res.exit_code == 2 and "spaceframe report" in res.output
    assert "Traceback" not in res.output


def test_controls_sit_beside_the_frame_and_counts_read_right(canopy_viewer):
    """The frame has its own viewport on the left; every slider and switch lives in the
    panel beside it, so none covers the frame.  The window's title names the model file,
    and one mechanism is "1 mechanism"."""
    from spaceframe.views.desktop import VIEW_SHARE

    v = canopy_viewer
    view, panel = v.plotter.renderers[0], v.plotter.renderers[1]
    assert view.GetViewport()[2] == pytest.approx(VIEW_SHARE)
    assert panel.GetViewport()[0] == pytest.approx(VIEW_SHARE)
    widgets = list(v.plotter.widgets.slider_widgets) + list(v.plotter.widgets.button_widgets)
    assert len(widgets) == 5                     # mode, amplitude, state; play, bracing
    for w in widgets:
        assert w.GetCurrentRenderer() is panel
    assert "canopy_sway.toml" in v.plotter.title
    words = v._caption()
    assert "1 mechanism," in words and "1 mechanisms" not in words
    assert "2 states of self-stress" in words
