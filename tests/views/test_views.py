"""Pictures: off-screen renders, animations, stills of self-stress, the report file.

Renders run off-screen through pyvista (EGL where there is no display).
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe.cli import main
from spaceframe.views.render import PALETTE, mode_frames, state_picture
from spaceframe.views.report import render_report
from spaceframe.views.scene import phases, scene_of, view_direction

pytest.importorskip("pyvista")
iio = pytest.importorskip("imageio.v3")

MODELS = Path(__file__).resolve().parents[2] / "models"
SMALL = (480, 320)


def run(*args):
    return CliRunner().invoke(main, [str(a) for a in args])


@pytest.fixture(scope="module")
def canopy():
    return spaceframe.audit(spaceframe.load(MODELS / "canopy_sway.toml"))


@pytest.fixture(scope="module")
def platform():
    return spaceframe.audit(spaceframe.load(MODELS / "plant_platform.toml"))


def _ink(img) -> float:
    """Share of pixels that are not near-white."""
    return float((np.asarray(img)[:, :, :3] < 230).any(axis=2).mean())


def _has(img, hex_colour, tol=40) -> bool:
    rgb = np.array([int(hex_colour[i:i + 2], 16) for i in (1, 3, 5)])
    return bool((np.abs(img[:, :, :3].astype(int) - rgb).max(axis=2) < tol).sum() > 30)


def test_phases_loop_seamlessly():
    p = phases(8)
    assert len(p) == 8 and p[0] == 0.0
    assert np.isclose(p[1] - p[0], 2 * np.pi / 8) and p[-1] < 2 * np.pi


def test_view_looks_across_the_motion(canopy):
    s = scene_of(canopy)
    v = view_direction(s.coords, s.modes[0])          # the canopy sways along y
    assert abs(v[1]) < 0.5                            # not looking along the motion
    assert v[2] > 0                                   # from above
    flat = s.coords * [1, 0, 1]                       # a plane truss in y = 0
    assert abs(view_direction(flat)[1]) > 0.3         # not seen edge on


def test_mechanism_frames_are_drawn_and_move(canopy):
    frames = mode_frames(canopy, 0, n=4, size=SMALL)
    assert len(frames) == 4 and frames[0].shape == (SMALL[1], SMALL[0], 3)
    assert all(_ink(f) > 0.03 for f in frames), "a blank render"
    diffs = [np.abs(a.astype(int) - b.astype(int)).sum() for a, b in zip(frames, frames[1:])]
    assert min(diffs) > 0, "consecutive poses of a mechanism are the same picture"
    assert _has(frames[1], PALETTE["moving_joint"][0]) and _has(frames[1], PALETTE["support"][0])


def test_a_held_frame_does_not_move(platform):
    frames = mode_frames(platform, None, n=3, size=SMALL)
    assert _ink(frames[0]) > 0.03
    assert all(np.array_equal(frames[0], f) for f in frames[1:])
    assert not _has(frames[0], PALETTE["moving_joint"][0])


def test_self_stress_still_shows_tension_and_compression(canopy):
    img = state_picture(canopy, 0, size=SMALL)
    assert _has(img, PALETTE["tension"][0]) and _has(img, PALETTE["compression"][0])


def test_gif_has_the_frame_count_and_loops(tmp_path):
    out = tmp_path / "sway.gif"
    r = run("animate", MODELS / "canopy_sway.toml", "-o", out, "--frames", 8, "--size",
            "480x320", "--quiet")
    assert r.exit_code == 0, r.output
    frames = iio.imread(out, index=None)
    assert frames.shape[0] == 8
    from PIL import Image
    assert Image.open(out).info.get("loop") == 0
    again = run("animate", MODELS / "canopy_sway.toml", "-o", out, "--quiet")
    assert again.exit_code == 2 and "--force" in again.output


def test_png_sheet_says_what_it_wrote_and_checks_every_sheet(tmp_path):
    """``--all`` to PNG: one sheet as wide as a row of poses holding each mode's poses under its caption
    (12 mechanisms of 2 small poses fit in one), and the command says what it wrote.
    The hall's 37 modes go on several sheets; an existing one among them is refused before
    any render (exit 2, nothing written), as for the file asked for."""
    out = tmp_path / "bridge.png"
    r = run("animate", MODELS / "footbridge_truss.toml", "-o", out, "--all", "--frames", 2,
            "--size", "320x240")
    assert r.exit_code == 0, r.output
    sheet = iio.imread(out)
    audit = spaceframe.audit(spaceframe.load(MODELS / "footbridge_truss.toml"))
    assert sheet.shape[1] == 2 * 320                     # a row of two poses
    assert audit.mechanisms * 240 < sheet.shape[0] < audit.mechanisms * (240 + 110) + 120
    assert f"wrote {out} (modes 1-{audit.mechanisms}: 2 poses of 320x240 px each" in r.output
    taken = tmp_path / "hall-modes-01-05.png"
    taken.write_bytes(b"mine")
    r = run("animate", MODELS / "hall_roof_unbraced.toml", "-o", tmp_path / "hall.png",
            "--all", "--quiet")
    assert r.exit_code == 2 and "hall-modes-01-05.png" in r.output and "--force" in r.output
    assert taken.read_bytes() == b"mine" and sorted(p.name for p in tmp_path.iterdir()) == \
        ["bridge.png", "hall-modes-01-05.png"]


def test_held_frame_gives_one_still(tmp_path):
    out = tmp_path / "platform.gif"
    r = run("animate", MODELS / "plant_platform.toml", "-o", out, "--size", "320x240", "--quiet")
    assert r.exit_code == 0 and "held" in r.output
    assert iio.imread(out, index=None).shape[0] == 1


def test_mp4_when_imageio_ffmpeg_is_there(tmp_path):
    pytest.importorskip("imageio_ffmpeg")
    out = tmp_path / "sway.mp4"
    r = run("animate", MODELS / "canopy_sway.toml", "-o", out, "--frames", 4, "--size",
            "320x240", "--quiet")
    assert r.exit_code == 0, r.output
    assert out.stat().st_size > 1000


@pytest.mark.parametrize("args, words", [
    (["--mode", "3"], "1 mechanism"),
    (["--mode", "1", "--state", "1"], "one of"),
    (["--state", "1"], ".png"),
    (["--size", "big"], "WIDTHxHEIGHT"),
])
def test_bad_animate_options_exit_2(tmp_path, args, words):
    r = run("animate", MODELS / "canopy_sway.toml", "-o", tmp_path / "x.gif", *args)
    assert r.exit_code == 2, r.output
    assert words in r.output and "Traceback" not in r.output


def test_never_writes_over_the_input(tmp_path):
    model = tmp_path / "m.png"
    model.write_bytes(b"not a model")
    before = model.read_bytes()
    r = run("animate", model, "-o", model, "--force")
    assert r.exit_code == 2 and "input" in r.output
    assert model.read_bytes() == before
    r = run("animate", MODELS / "canopy_sway.toml", "-o", tmp_path / "x.webm")
    assert r.exit_code == 2 and ".gif" in r.output


def test_report_file_is_self_contained_and_carries_the_audit(tmp_path, canopy):
    out = tmp_path / "r.html"
    r = run("report", MODELS / "canopy_sway.toml", "-o", out)
    assert r.exit_code == 0, r.output                 # written, though the frame has a mechanism
    html = out.read_text(encoding="utf-8")
    assert not re.search(r"<(script|link|img)[^>]+(src|href)=", html), "an external resource"
    assert "http://" not in html and "https://" not in html
    data = re.search(r'<script type="application/json" id="spaceframe-data">(.*?)</script>',
                     html, re.S).group(1)
    doc = json.loads(data)
    assert doc["audit"]["mechanisms"] == 1 and doc["audit"]["caution"] == spaceframe.results.CAUTION
    assert len(doc["geometry"]["modes"]) == 1
    # the proposal of `spaceframe brace` is in, and its braced frame re-audits as held
    assert doc["bracing"]["added"] and doc["bracing"]["after_stable"] is True
    assert run("report", MODELS / "canopy_sway.toml", "-o", out).exit_code == 2


def test_report_escapes_script_ends():
    frame = spaceframe.Frame.from_arrays([[0, 0], [1, 0], [0, 1]], [[0, 1], [1, 2], [2, 0]],
                                         joint_ids=["A", "</script>", "C"],
                                         supports={0: "pin", 1: "y"}, name="a & <b>")
    html = render_report(spaceframe.audit(frame))
    assert html.count("</script>") == 2               # the data element's and the script's
    data = re.search(r'id="spaceframe-data">(.*?)</script>', html, re.S).group(1)
    assert json.loads(data)["geometry"]["joints"][1] == "</script>"


class _Terminal:
    """A stream that says it is a terminal and keeps what is written."""

    def __init__(self):
        self.text = []

    def isatty(self):
        return True

    def write(self, s):
        self.text.append(s)
        return len(s)

    def flush(self):
        pass


def test_progress_only_on_a_terminal():
    import io

    from spaceframe.views.progress import progress

    pipe = io.StringIO()
    with progress(3, "rendering", stream=pipe) as step:
        for _ in range(3):
            step()
    assert pipe.getvalue() == ""
    tty = _Terminal()
    with progress(3, "rendering", stream=tty, quiet=True) as step:
        step()
    assert tty.text == []
    with progress(3, "rendering", stream=tty) as step:
        for _ in range(3):
            step()
    assert "rendering" in "".join(tty.text)
