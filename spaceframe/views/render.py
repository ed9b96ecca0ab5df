"""Pictures of an audit, rendered off-screen: mechanisms in motion, states of self-stress.

A mechanism is drawn as the frame moving through one seamless cycle of the
mode (``sin`` of the phase, so the last picture leads back into the first):
members as tubes, the joints that move as vermillion balls, the members at
them in blue, the frame at rest ghosted in light grey behind, supports as
green stalks ending in a plate (one stalk for each direction held), and the
mode's one-line description as the caption.  A state of self-stress is a
still: each member coloured by its force on a fixed scale from compression
(blue, -1) through zero (light grey) to tension (orange, +1), with a legend
in words.  Colours are from a colour-blind-safe set, and every colour is
named in the picture's legend.

pyvista (VTK) renders; it is imported on first use.  With no X display the
EGL path (Mesa's ``libEGL``) is chosen, which needs no window system.
"""

from __future__ import annotations

import os
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import SpaceframeError
from ..results import AuditResult
from .scene import (AMPLITUDE, Scene, carrying_members, moving_joints, phases, scene_of,
                    view_direction)

__all__ = ["mode_frames", "state_picture", "write_frames", "support_glyphs", "PALETTE", "SIZE"]

#: Colours of the pictures (colour-blind-safe), each with the word used in legends.
PALETTE = {
    "member": ("#5d6b75", "slate"),        # members the mode does not touch
    "moving_member": ("#0072b2", "blue"),  # members at a moving joint
    "moving_joint": ("#d55e00", "vermillion"),
    "support": ("#009e73", "green"),
    "ghost": ("#b5b5b5", "light grey"),
    "tension": ("#c25a12", "orange"),
    "zero": ("#e3e3e3", "light grey"),
    "compression": ("#1d5fa6", "blue"),
    "text": ("#202020", "black"),
    "background": ("#ffffff", "white"),
}

#: Picture size in pixels (width, height) for animations; multiples of 16 for video.
SIZE = (800, 480)

#: Height in pixels of the caption band (the legend band's grows with its rows).
_TOP = 64

_CAUTION_SHORT = ("Idealised pin-jointed model; results to be checked by a competent engineer "
                  "under local codes.")


def _pyvista():
    """Import pyvista for off-screen use, choosing a headless OpenGL path."""
    if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
        # no window system: EGL renders straight into memory (Mesa's software driver will do)
        os.environ.setdefault("VTK_DEFAULT_OPENGL_WINDOW", "vtkEGLRenderWindow")
    pyvista = require("pyvista")
    pyvista.OFF_SCREEN = True
    return pyvista


def _lines(pv, points: np.ndarray, ends: np.ndarray):
    """PolyData of line segments ``points[ends]``, each member with its own two points."""
    pts = points[ends].reshape(-1, 3)
    cells = np.column_stack([np.full(len(ends), 2), np.arange(0, 2 * len(ends)).reshape(-1, 2)])
    return pv.PolyData(pts, lines=cells.ravel()) if len(ends) else pv.PolyData()


def _tubes(pv, points, ends, radius):
    mesh = _lines(pv, points, ends)
    return mesh.tube(radius=radius, n_sides=10) if mesh.n_points else mesh


def support_glyphs(pv, scene: Scene, points):
    """Support glyphs as one mesh: a green stalk and end plate per held direction, at the
    joints' positions ``points`` (n, 3); None without supports."""
    glyphs = scene.glyphs()
    if not glyphs:
        return None
    e = scene.extent
    shift = points - scene.coords
    parts = []
    for (start, end, d), j in zip(glyphs, (j for j, _ in scene.supports)):
        a, b = start + shift[j], end + shift[j]
        parts.append(pv.Tube(pointa=a, pointb=b, radius=0.006 * e, n_sides=8))
        parts.append(pv.Cylinder(center=b, direction=d, radius=0.028 * e, height=0.006 * e,
                                 resolution=20))
    return pv.merge(parts)


class _Stage:
    """One off-screen plotter with the parts of a frame's picture that stay put.

    The 3D view fills the band between a caption (top) and a legend (bottom);
    both are drawn with Pillow onto each screenshot (:func:`_compose`), so
    the words sit in their own space and never over the frame.
    """

    def __init__(self, scene: Scene, size, title: str, caption: str, legend, scale=None):
        pv = self.pv = _pyvista()
        self.scene = scene
        self.size, self.title, self.caption = tuple(size), title, caption
        self.legend = legend
        self.scale = scale  # a colour map on [-1, 1] to draw as a bar over the view
        w, h = self.size
        self.bottom = _legend_height(legend, w)
        try:
            self.plotter = pv.Plotter(off_screen=True,
                                      window_size=[w, h - _TOP - self.bottom])
        except Exception as exc:  # VTK raises plain RuntimeErrors for a missing GL
            raise SpaceframeError(
                f"cannot open an off-screen OpenGL context ({exc}); install Mesa's EGL "
                f"(Debian: apt-get install libegl1) or set VTK_DEFAULT_OPENGL_WINDOW") from None
        p = self.plotter
        p.set_background(PALETTE["background"][0])
        p.enable_anti_aliasing("ssaa")
        self.e = scene.extent

    def shot(self) -> np.ndarray:
        """The current view with its caption and legend, ``(h, w, 3) uint8``."""
        self.plotter.render()  # screenshot() alone may return the previous render
        view = self.plotter.screenshot(return_img=True)[:, :, :3]
        return _compose(view, self.size, self.title, self.caption, self.legend, self.bottom,
                        self.scale)

    def ghost(self):
        mesh = _lines(self.pv, self.scene.coords, self.scene.ends)
        if mesh.n_points:
            self.plotter.add_mesh(mesh, color=PALETTE["ghost"][0], line_width=3)

    def supports(self, points):
        """Green stalks with end plates, one per held direction, following their joints."""
        return support_glyphs(self.pv, self.scene, points)

    def camera(self, direction, points_sets):
        """Look at the frame from ``direction``, fitted to every pose in ``points_sets``."""
        p = self.plotter
        allpts = np.vstack(points_sets)
        lo, hi = allpts.min(axis=0), allpts.max(axis=0)
        pad = 0.08 * self.e
        lo, hi = lo - pad, hi + pad
        centre = 0.5 * (lo + hi)
        up = (0, 0, 1) if abs(direction[2]) < 0.95 else (0, 1, 0)
        p.camera_position = [tuple(centre + 3 * self.e * direction), tuple(centre), up]
        p.reset_camera(bounds=(lo[0], hi[0], lo[1], hi[1], lo[2], hi[2]))
        p.camera.zoom(1.35)  # reset_camera fits the bounding sphere: generous for a frame

    def close(self):
        self.plotter.close()


def mode_frames(result: AuditResult, mode: int | None, *, n: int = 24, size=SIZE,
                on_frame=None) -> list[np.ndarray]:
    """Pictures of one cycle of a mechanism, ``n`` of them, as ``(h, w, 3) uint8`` arrays.

    Parameters
    ----------
    result : AuditResult
    mode : int or None
        0-based index into the audit's mechanisms (its own order); None draws
        the frame at rest (every picture the same), as for a frame that is held.
    n : int
        Pictures per cycle, at phases ``pi/2 + linspace(0, 2 pi, n + 1)[:-1]`` (the
        first at the largest movement).  With an odd ``n`` two pictures in a
        row repeat (the turn-round), which a GIF merges into one.
    size : (int, int)
        Width and height in pixels.
    on_frame : callable, optional
        Called with no argument after each picture (progress display).

    Notes
    -----
    Cost: one off-screen render per picture, O(m) tube geometry each.
    """
    scene = scene_of(result)
    if mode is not None and not 0 <= mode < len(scene.modes):
        raise SpaceframeError(f"mode {mode + 1} does not exist: the audit found "
                              f"{len(scene.modes)} mechanism(s)")
    title, caption = _mode_words(result, mode)
    motion = scene.modes[mode] if mode is not None else None
    if motion is None:
        legend = [_entry("member", "members"),
                  _entry("support", "stalk and plate: a direction a support holds")]
    else:
        legend = [_entry("moving_joint", "joints that move"),
                  _entry("moving_member", "members at them"),
                  _entry("support", "stalk and plate: a direction a support holds"),
                  _entry("ghost", "the frame at rest")]
    stage = _Stage(scene, size, title, caption, legend)
    try:
        return _animate(stage, scene, mode, motion, n, on_frame)
    finally:
        stage.close()


def _animate(stage: _Stage, scene: Scene, mode, motion, n, on_frame):
    pv, p, e = stage.pv, stage.plotter, stage.e
    moving = np.zeros(len(scene.coords), bool)
    if motion is not None:
        moving = moving_joints(motion)
    touched = moving[scene.ends].any(axis=1)
    if motion is not None:
        stage.ghost()
    rest = scene.displaced(mode, 0.0)

    colours = {"still": "member", "moving": "moving_member", "joints": "moving_joint",
               "supports": "support"}
    actors: list = []

    def pose(points):
        """Replace the moving parts by their meshes at ``points``."""
        for actor in actors:
            p.remove_actor(actor, render=False)
        actors.clear()
        parts = {"still": _tubes(pv, points, scene.ends[~touched], 0.007 * e),
                 "moving": _tubes(pv, points, scene.ends[touched], 0.009 * e),
                 "joints": (pv.PolyData(points[moving]).glyph(
                     geom=pv.Sphere(radius=0.022 * e), scale=False, orient=False)
                     if moving.any() else pv.PolyData()),
                 "supports": stage.supports(points) or pv.PolyData()}
        for key, mesh in parts.items():
            if mesh.n_points:
                actors.append(p.add_mesh(mesh, color=PALETTE[colours[key]][0], render=False,
                                         smooth_shading=True, specular=0.2))

    extremes = [rest] if motion is None else \
        [scene.displaced(mode, np.pi / 2), scene.displaced(mode, -np.pi / 2)]
    stage.camera(view_direction(scene.coords, motion), [scene.coords, *extremes])
    frames = []
    for phi in phases(n) + np.pi / 2:  # start at the largest movement: a still reads best
        pose(scene.displaced(mode, phi))
        frames.append(stage.shot())
        if on_frame:
            on_frame()
    return frames


def state_picture(result: AuditResult, state: int, *, size=SIZE) -> np.ndarray:
    """A state of self-stress as a still ``(h, w, 3) uint8``: members coloured by force.

    Parameters
    ----------
    state : int
        0-based index into the computed states of self-stress.

    Notes
    -----
    The colour scale is fixed at ``[-1, 1]`` (each state's largest force is
    1): blue compression, light grey zero, orange tension.
    """
    q = result.self_stress_forces.shape[0]
    if not 0 <= state < q:
        raise SpaceframeError(
            f"state of self-stress {state + 1} does not exist: {q} computed"
            + (f" of {result.self_stress_states}" if q < result.self_stress_states else ""))
    LinearSegmentedColormap = require("matplotlib.colors").LinearSegmentedColormap

    scene = scene_of(result)
    t = np.asarray(result.self_stress_forces[state], float)
    carrying = carrying_members(t)
    title = f"State of self-stress {state + 1} of {result.self_stress_states}: " \
            f"{result.frame.name or 'frame'}"
    caption = (f"{int(carrying.sum())} members carry forces with no load applied; colour says "
               f"how much and which way (largest force = 1).")
    cmap = LinearSegmentedColormap.from_list(
        "spaceframe_force", [PALETTE["compression"][0], PALETTE["zero"][0],
                             PALETTE["tension"][0]])
    legend = [_entry("tension", "tension: the member pulls on its joints"),
              _entry("compression", "compression: the member pushes"),
              _entry("ghost", "thin: carries nothing here"),
              _entry("support", "stalk and plate: a direction held")]
    stage = _Stage(scene, size, title, caption, legend, cmap)
    try:
        pv, p, e = stage.pv, stage.plotter, stage.e
        idle = _tubes(pv, scene.coords, scene.ends[~carrying], 0.004 * e)
        if idle.n_points:
            p.add_mesh(idle, color=PALETTE["ghost"][0])
        lines = _lines(pv, scene.coords, scene.ends[carrying])
        lines.point_data["force"] = np.repeat(t[carrying], 2)
        p.add_mesh(lines.tube(radius=0.011 * e, n_sides=12), scalars="force", cmap=cmap,
                   clim=[-1.0, 1.0], smooth_shading=True, show_scalar_bar=False)
        sup = stage.supports(scene.coords)
        if sup is not None:
            p.add_mesh(sup, color=PALETTE["support"][0])
        stage.camera(view_direction(scene.coords), [scene.coords])
        return stage.shot()
    finally:
        stage.close()


def write_frames(rows: list[list[np.ndarray]], path: str | Path, *, fps: float = 12.0):
    """Write pictures to ``path``: a looping GIF, an MP4, or a PNG strip, by suffix.

    Parameters
    ----------
    rows : list of list of (h, w, 3) uint8
        One list of pictures per mode.  A GIF or MP4 plays them all in turn;
        a PNG lays each list out as one row (a strip per mode).
    path : str or Path
        Ends in ``.gif``, ``.mp4`` or ``.png``.
    fps : float
        Pictures per second of a GIF or MP4.
    """
    path = Path(path)
    suffix = path.suffix.lower()
    iio = require("imageio.v3")
    frames = [f for row in rows for f in row]
    if suffix == ".gif":
        # duration per picture in milliseconds; loop=0 repeats for ever
        iio.imwrite(path, np.stack(frames), extension=".gif", duration=1000.0 / fps, loop=0)
    elif suffix == ".mp4":
        require("imageio_ffmpeg")  # ships its own ffmpeg binary in the wheel
        iio2 = require("imageio.v2")
        with iio2.get_writer(path, fps=fps, codec="libx264", quality=7,
                             macro_block_size=16, format="FFMPEG") as w:
            for f in frames:
                w.append_data(f)
    elif suffix == ".png":
        width = max(len(r) for r in rows)
        h, w = rows[0][0].shape[:2]
        sheet = np.full((h * len(rows), w * width, 3), 255, np.uint8)
        for i, row in enumerate(rows):
            for k, f in enumerate(row):
                sheet[i * h:(i + 1) * h, k * w:(k + 1) * w] = f[:, :, :3]
        iio.imwrite(path, sheet, extension=".png")
    else:
        raise SpaceframeError(f"{path}: cannot tell the picture format from the suffix "
                              f"{path.suffix!r}; use .gif, .mp4 or .png")


def _entry(key: str, words: str) -> tuple[str, str]:
    """A legend entry: the colour, and its name followed by what it shows."""
    colour, name = PALETTE[key]
    return colour, f"{name}: {words}"


def _compose(view: np.ndarray, size, title: str, caption: str,
             legend: list[tuple[str, str]], bottom: int, scale=None) -> np.ndarray:
    """Put ``view`` between a caption band and a legend band, ``(h, w, 3) uint8``.

    ``scale`` (a colour map on [-1, 1]) adds a force scale at the top of the
    view: a bar from -1 (compression) to +1 (tension), labelled in words.
    """
    Image, ImageDraw, ImageFont = (require(f"PIL.{m}") for m in ("Image", "ImageDraw",
                                                                   "ImageFont"))

    w, h = size
    img = Image.new("RGB", (w, h), PALETTE["background"][0])
    img.paste(Image.fromarray(np.ascontiguousarray(view)), (0, _TOP))
    d = ImageDraw.Draw(img)
    ink = PALETTE["text"][0]
    big, small, tiny = (ImageFont.load_default(size=s) for s in (15, 12, 10))
    d.text((10, 6), _fit(title, big, w - 20), font=big, fill=ink)
    for k, line in enumerate(_wrap(caption, small, w - 20)[:2]):
        d.text((10, 27 + 16 * k), line, font=small, fill=ink)
    for (colour, words), (x, row) in zip(legend, _legend_layout(legend, w)):
        y = h - bottom + 6 + 17 * row
        d.rectangle([x, y + 1, x + 13, y + 13], fill=colour, outline="#606060")
        d.text((x + 19, y), words, font=small, fill=ink)
    if scale is not None:
        bar_w, bx, by = 240, (w - 240) // 2, _TOP + 10
        ramp = (np.asarray([scale(v)[:3] for v in np.linspace(0, 1, bar_w)]) * 255).astype(np.uint8)
        img.paste(Image.fromarray(np.repeat(ramp[None], 12, axis=0)), (bx, by))
        d.rectangle([bx - 1, by - 1, bx + bar_w, by + 12], outline="#606060")
        left, right = "compression  -1", "+1  tension"
        d.text((bx - 8 - small.getlength(left), by - 1), left, font=small, fill=ink)
        d.text((bx + bar_w + 8, by - 1), right, font=small, fill=ink)
        d.text((bx + bar_w / 2 - 3, by + 14), "0", font=small, fill=ink)
    d.text((10, h - 14), _CAUTION_SHORT, font=tiny, fill="#555555")
    d.line([(0, _TOP - 1), (w, _TOP - 1)], fill="#dddddd")
    d.line([(0, h - bottom), (w, h - bottom)], fill="#dddddd")
    return np.asarray(img)


def _legend_layout(legend, w: int) -> list[tuple[float, int]]:
    """Where each legend entry starts: ``(x, row)``, filling rows of width ``w``."""
    ImageFont = require("PIL.ImageFont")

    small = ImageFont.load_default(size=12)
    out, x, row = [], 10.0, 0
    for _, words in legend:
        width = 20 + small.getlength(words) + 18
        if x + width > w and x > 10:
            x, row = 10.0, row + 1
        out.append((x, row))
        x += width
    return out


def _legend_height(legend, w: int) -> int:
    """Height of the legend band: its rows of entries and the caution line."""
    rows = 1 + max((row for _, row in _legend_layout(legend, w)), default=0)
    return 6 + 17 * rows + 18


def _wrap(text: str, font, width: float) -> list[str]:
    """Split ``text`` into lines no wider than ``width`` pixels in ``font``."""
    lines, line = [], ""
    for word in text.split():
        trial = f"{line} {word}".strip()
        if line and font.getlength(trial) > width:
            lines.append(line)
            line = word
        else:
            line = trial
    return lines + ([line] if line else [])


def _fit(text: str, font, width: float) -> str:
    """``text``, cut with an ellipsis to fit ``width`` pixels."""
    if font.getlength(text) <= width:
        return text
    while text and font.getlength(text + "...") > width:
        text = text[:-1]
    return text + "..."


def _mode_words(result: AuditResult, mode: int | None) -> tuple[str, str]:
    """Title and caption of a mode's picture."""
    name = result.frame.name or "frame"
    if mode is None:
        return (f"{name}: held", "No mechanism: every joint is held in every direction by "
                                 "members and supports, so nothing moves.")
    info = result.mode_info[mode] if mode < len(result.mode_info) else None
    kind = result.mode_kinds[mode]
    title = f"Mechanism {mode + 1} of {result.mechanisms} ({kind}): {name}"
    text = info.description if info else ""
    return title, f"{text}  (movement drawn at {AMPLITUDE:.0%} of the frame's size)"
