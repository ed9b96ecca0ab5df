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
named in the picture's legend.  A GIF or MP4 shows one picture at a time, each
with its caption and legend; a PNG of poses is a sheet (:func:`write_sheets`)
that words each mode once above its poses and gives the legend once.

pyvista (VTK) renders; it is imported on first use.  With no X display the
EGL path (Mesa's ``libEGL``) is chosen, which needs no window system.
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .._optional import require
from ..errors import SpaceframeError
from ..naming import count
from ..results import AuditResult
from .scene import AMPLITUDE, Scene, carrying_members, moving_joints, phases, scene_of

__all__ = ["mode_frames", "state_picture", "write_frames", "plan_sheets", "write_sheets",
           "contact_sheet", "sheet_grid", "SheetPlan", "Block", "Stage", "legend_entry",
           "force_colours", "support_glyphs", "screen_axes", "PALETTE", "SIZE", "SHEET_WIDTH",
           "SHEET_HEIGHT", "SHEET_COLUMNS"]

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
    "load": ("#cc79a7", "pink"),          # load arrows of a forces picture
    "reaction": ("#009e73", "green"),      # reaction arrows (the supports' colour)
    "text": ("#202020", "black"),
    "background": ("#ffffff", "white"),
}

#: Picture size in pixels (width, height) for animations; multiples of 16 for video.
SIZE = (800, 480)

#: Height in pixels of the title line; the caption band below it grows with its lines, the
#: legend band with its rows.
_TITLE = 27
#: Width of a PNG sheet of poses in pixels (:func:`write_sheets`).
SHEET_WIDTH = 1600

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
    e = scene.unit
    shift = points - scene.coords
    parts = []
    for (start, end, d), j in zip(glyphs, (j for j, _ in scene.supports)):
        a, b = start + shift[j], end + shift[j]
        parts.append(pv.Tube(pointa=a, pointb=b, radius=0.006 * e, n_sides=8))
        parts.append(pv.Cylinder(center=b, direction=d, radius=0.028 * e, height=0.006 * e,
                                 resolution=20))
    return pv.merge(parts)


class Stage:
    """One off-screen plotter with the parts of a frame's picture that stay put.

    The 3D view fills the band between a caption (top) and a legend (bottom);
    both are drawn with Pillow onto each screenshot (:func:`_compose`), so
    the words (the caption whole, on as many lines as it needs), the colour
    scale and the axis triad sit in their own space and never over the frame.
    With ``bands=False`` the view fills ``size`` and :meth:`view` gives it bare
    (a sheet of poses words each mode once).

    Every picture of the package is made on one: :func:`mode_frames`,
    :func:`state_picture`, :func:`write_sheets` and
    :func:`spaceframe.views.forces_render.forces_picture`.
    """

    def __init__(self, scene: Scene, size, title: str, caption: str, legend, scale=None,
                 dimension: int = 3, *, bands: bool = True):
        pv = self.pv = _pyvista()
        self.scene = scene
        self.size, self.title, self.caption = tuple(size), title, caption
        self.legend = legend
        self.scale = scale  # a colour map on [-1, 1] to draw as a bar in the legend band
        self.dimension = dimension
        self.axes = None    # the camera's screen axes (right, up) in the scene, once placed
        w, h = self.size
        if bands:
            self.bottom = _legend_height(legend, w, scale is not None)
            # the whole caption, unless a small picture would leave the frame less than half
            # its height: then as many lines as fit, the last one ending in an ellipsis
            self.lines = _caption_lines(caption, w, (h // 2 - self.bottom - _TITLE - 6) // 16)
            self.top = _TITLE + 16 * max(len(self.lines), 1) + 6
        else:               # the bare view, for a sheet that words it once (:func:`write_sheets`)
            self.bottom, self.lines, self.top = 0, [], 0
        try:
            self.plotter = pv.Plotter(off_screen=True,
                                      window_size=[w, h - self.top - self.bottom])
        except Exception as exc:  # VTK raises plain RuntimeErrors for a missing GL
            raise SpaceframeError(
                f"cannot open an off-screen OpenGL context ({exc}); install Mesa's EGL "
                f"(Debian: apt-get install libegl1) or set VTK_DEFAULT_OPENGL_WINDOW") from None
        p = self.plotter
        p.set_background(PALETTE["background"][0])
        p.enable_anti_aliasing("ssaa")
        self.e = scene.unit

    def view(self) -> np.ndarray:
        """The current 3D view alone, ``(h, w, 3) uint8`` (no caption, legend or triad)."""
        self.plotter.render()  # screenshot() alone may return the previous render
        return np.ascontiguousarray(self.plotter.screenshot(return_img=True)[:, :, :3])

    def shot(self) -> np.ndarray:
        """The current view with its caption and legend, ``(h, w, 3) uint8``."""
        return _compose(self.view(), self.size, self.title, self.lines, self.legend,
                        (self.top, self.bottom), self.scale, self.axes, self.dimension)

    def ghost(self):
        mesh = _lines(self.pv, self.scene.coords, self.scene.ends)
        if mesh.n_points:
            self.plotter.add_mesh(mesh, color=PALETTE["ghost"][0], line_width=3)

    def forces(self, t, carrying, cmap):
        """Members coloured by ``t`` (on [-1, 1]) where ``carrying``, the rest thin and grey."""
        pv, p, e, scene = self.pv, self.plotter, self.e, self.scene
        idle = _tubes(pv, scene.coords, scene.ends[~carrying], 0.004 * e)
        if idle.n_points:
            p.add_mesh(idle, color=PALETTE["ghost"][0])
        if carrying.any():
            lines = _lines(pv, scene.coords, scene.ends[carrying])
            lines.point_data["force"] = np.repeat(t[carrying], 2)
            p.add_mesh(lines.tube(radius=0.011 * e, n_sides=12), scalars="force", cmap=cmap,
                       clim=[-1.0, 1.0], smooth_shading=True, show_scalar_bar=False)

    def supports(self, points):
        """Green stalks with end plates, one per held direction, following their joints."""
        return support_glyphs(self.pv, self.scene, points)

    def camera(self, direction, points_sets):
        """Look at the frame from ``direction``, fitted to every pose in ``points_sets``.

        The projection is orthographic (an engineer's elevation: parallel lines
        stay parallel) and its scale is fitted to the frame's projected outline
        in both directions, so a tall frame is not cropped and a long one not lost.
        """
        p = self.plotter
        allpts = np.vstack(points_sets)
        right, up = screen_axes(direction)
        x, y = allpts @ right, allpts @ up
        pad = 0.09 * self.e + 0.02 * self.scene.extent  # glyphs and balls reach past the joints
        cx, cy = 0.5 * (x.min() + x.max()), 0.5 * (y.min() + y.max())
        half_w, half_h = 0.5 * np.ptp(x) + pad, 0.5 * np.ptp(y) + pad
        w, h = self.plotter.window_size
        centre = allpts.mean(axis=0)
        depth = centre @ direction
        focus = cx * right + cy * up + depth * direction
        p.camera_position = [tuple(focus + 3 * self.scene.extent * direction), tuple(focus),
                             tuple(up)]
        p.enable_parallel_projection()
        p.camera.parallel_scale = 1.04 * max(half_h, half_w * h / w)
        p.reset_camera_clipping_range()
        self.axes = (right, up)

    def close(self):
        self.plotter.close()


def mode_frames(result: AuditResult, mode: int | None, *, n: int = 24, size=SIZE,
                on_frame=None) -> list[np.ndarray]:
    """Pictures of one cycle of a mechanism, ``n`` of them, as ``(h, w, 3) uint8`` arrays.

    Each picture carries the title, the caption and the legend (a GIF or MP4
    shows one at a time); :func:`write_sheets` lays poses out with the words once.

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
    scene, title, caption, legend = _mode_setup(result, mode)
    stage = Stage(scene, size, title, caption, legend, dimension=result.frame.dimension)
    try:
        return _animate(stage, scene, mode, n, on_frame, stage.shot)
    finally:
        stage.close()


def _mode_setup(result: AuditResult, mode: int | None):
    """The scene, title, caption and legend of mode ``mode``'s pictures."""
    scene = scene_of(result)
    if mode is not None and not 0 <= mode < len(scene.modes):
        raise SpaceframeError(f"mode {mode + 1} does not exist: the audit found "
                              f"{count(len(scene.modes), 'mechanism')}")
    title, caption = _mode_words(result, mode)
    return scene, title, caption, _mode_legend(mode)


def _mode_legend(mode: int | None) -> list[tuple[str, str]]:
    """The legend of a mode's pictures (of the frame at rest for ``mode=None``)."""
    if mode is None:
        return [legend_entry("member", "members"),
                legend_entry("support", "stalk and plate: a direction a support holds")]
    return [legend_entry("moving_joint", "joints that move"),
            legend_entry("moving_member", "members at them"),
            legend_entry("support", "stalk and plate: a direction a support holds"),
            legend_entry("ghost", "the frame at rest")]


def _animate(stage: Stage, scene: Scene, mode, n, on_frame, take):
    """``n`` poses of mode ``mode`` on ``stage``, each as ``take()`` gives it."""
    pv, p, e = stage.pv, stage.plotter, stage.e
    motion = scene.modes[mode] if mode is not None else None
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
    stage.camera(scene.view(mode), [scene.coords, *extremes])
    frames = []
    for phi in phases(n) + np.pi / 2:  # start at the largest movement: a still reads best
        pose(scene.displaced(mode, phi))
        frames.append(take())
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
    scene = scene_of(result)
    t = np.asarray(result.self_stress_forces[state], float)
    carrying = carrying_members(t)
    title = f"State of self-stress {state + 1} of {result.self_stress_states}: " \
            f"{result.frame.name or 'frame'}"
    caption = (f"{count(int(carrying.sum()), 'member')} carry forces with no load applied; colour says "
               f"how much and which way (largest force = 1).")
    cmap = force_colours()
    legend = [legend_entry("tension", "tension: the member pulls on its joints"),
              legend_entry("compression", "compression: the member pushes"),
              legend_entry("ghost", "thin: carries nothing here"),
              legend_entry("support", "stalk and plate: a direction held")]
    stage = Stage(scene, size, title, caption, legend, cmap, dimension=result.frame.dimension)
    try:
        p = stage.plotter
        stage.forces(t, carrying, cmap)
        sup = stage.supports(scene.coords)
        if sup is not None:
            p.add_mesh(sup, color=PALETTE["support"][0])
        stage.camera(scene.view(), [scene.coords])
        return stage.shot()
    finally:
        stage.close()


def force_colours():
    """The one diverging force scale on [-1, 1]: compression blue, zero light grey,
    tension orange (a matplotlib colour map)."""
    LinearSegmentedColormap = require("matplotlib.colors").LinearSegmentedColormap
    return LinearSegmentedColormap.from_list(
        "spaceframe_force", [PALETTE["compression"][0], PALETTE["zero"][0],
                             PALETTE["tension"][0]])


def write_frames(rows: list[list[np.ndarray]], path: str | Path, *, fps: float = 12.0):
    """Write pictures to ``path``: a looping GIF or an MP4 of them all, or one still PNG.

    Parameters
    ----------
    rows : list of list of (h, w, 3) uint8
        One list of pictures per mode; a GIF or MP4 plays them all in turn.
        A PNG holds one picture (a still); poses of modes go on sheets,
        :func:`write_sheets`.
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
        if len(frames) != 1:
            raise SpaceframeError(f"{path}: a PNG written here holds one still; lay poses of "
                                  f"modes out with write_sheets")
        iio.imwrite(path, frames[0], extension=".png")
    else:
        raise SpaceframeError(f"{path}: cannot tell the picture format from the suffix "
                              f"{path.suffix!r}; use .gif, .mp4 or .png")


# ---------------------------------------------------------------- sheets of poses

#: Tallest PNG sheet in pixels: beyond it the modes go on as many sheets as they need
#: (a mode's block is never split, so one taller than this has a sheet of its own).
SHEET_HEIGHT = 4800
#: Most poses side by side in a sheet's row.
SHEET_COLUMNS = 4
#: Gap in pixels between two modes' blocks on a sheet.
_GAP = 14


@dataclass(frozen=True)
class Block:
    """One mode on a sheet: its title and caption once, then its poses in rows.

    Attributes
    ----------
    title, caption : str
    lines : list of str
        The caption wrapped to the sheet's width.
    views : list of (h, w, 3) uint8
        The bare 3D views of the poses, in phase order (empty until rendered).
    axes : tuple of two (3,) float or None
        The camera's screen axes, for the axis triad on the first pose.
    """

    title: str
    caption: str
    lines: list
    views: list = field(default_factory=list)
    axes: tuple | None = None


@dataclass(frozen=True)
class SheetPlan:
    """Which modes go on which PNG sheet, and at what size; made before any render, so
    that every file can be checked first (:func:`plan_sheets`).

    Attributes
    ----------
    paths : tuple of Path
        The sheets' files: the path asked for when one sheet holds every mode,
        else ``<stem>-modes-<first>-<last>.png`` (``<stem>-mode-<k>.png`` for a
        sheet of one mode), numbers from 1 as the audit lists the modes,
        zero-padded to the width of the audit's count so that the names sort in order.
    groups : tuple of tuple of (int or None)
        The 0-based modes of each sheet (None: the frame at rest).
    poses : int
        Poses per mode.
    grid : (int, int)
        Rows and columns of each mode's poses.
    pose_size : (int, int)
        Width and height of one pose in pixels.
    width : int
        The sheets' width in pixels: a row of poses.
    """

    paths: tuple
    groups: tuple
    poses: int
    grid: tuple
    pose_size: tuple
    width: int


def sheet_grid(n: int, size=SIZE, width: int = SHEET_WIDTH) -> tuple[tuple, tuple]:
    """Rows and columns of ``n`` poses on a sheet, and the size of one pose:
    ``((rows, cols), (w, h))``.

    The poses of a mode fill ``ceil(n / SHEET_COLUMNS)`` rows, as evenly as they
    go (6 poses: 2 rows of 3); a pose is ``size`` scaled down to fit ``width``
    (never up), its height to the same ratio, both even.

    Examples
    --------
    >>> sheet_grid(6, (800, 480))
    ((2, 3), (532, 320))
    >>> sheet_grid(2, (320, 240))
    ((1, 2), (320, 240))
    """
    rows = -(-max(n, 1) // SHEET_COLUMNS)
    cols = -(-max(n, 1) // rows)
    w = min(size[0], width // cols) // 2 * 2
    h = max(2, round(w * size[1] / size[0] / 2) * 2)
    return (rows, cols), (w, h)


def _block_height(lines: list, grid, pose_size) -> int:
    return _TITLE + 16 * max(len(lines), 1) + 6 + grid[0] * pose_size[1]


def _sheet_legend(modes) -> list[tuple[str, str]]:
    """The legend of a sheet of ``modes``: each entry once, in order."""
    out = []
    for mode in modes:
        out += [e for e in _mode_legend(mode) if e not in out]
    return out


def plan_sheets(result: AuditResult, modes, path, *, n: int, size=SIZE,
                width: int = SHEET_WIDTH, height: int = SHEET_HEIGHT) -> SheetPlan:
    """Lay ``n`` poses of each of ``modes`` out on PNG sheets at most ``height`` px high.

    Parameters
    ----------
    result : AuditResult
    modes : sequence of (int or None)
        0-based modes (the audit's order, then any one-way motion), or
        ``[None]`` for the frame at rest.
    path : str or Path
        The ``.png`` asked for; more sheets take their names from it
        (:class:`SheetPlan`).
    n : int
        Poses per mode.
    size : (int, int)
        The largest size of one pose (see :func:`sheet_grid`).
    width, height : int
        The sheets' most width and height in pixels; a sheet is as wide as its
        row of poses (a held frame's one pose: its own width).

    Notes
    -----
    Cost: the captions' wrapping only; nothing is rendered.
    """
    path = Path(path)
    grid, pose = sheet_grid(n, size, width)
    width = grid[1] * pose[0]       # as wide as a row of poses: no empty margin at the right
    modes = list(modes)
    foot = _legend_height(_sheet_legend(modes), width)
    heights = [_block_height(_caption_lines(_mode_words(result, k)[1], width, 10 ** 6), grid,
                             pose) for k in modes]
    fits = lambda hs: sum(hs) + _GAP * (len(hs) - 1) + foot <= height  # noqa: E731
    cuts, start = [], 0                   # greedy: the fewest sheets, each filled in turn
    for i in range(1, len(modes) + 1):
        if i == len(modes) or not fits(heights[start:i + 1]):
            cuts.append(i)
            start = i
    even = np.linspace(0, len(modes), len(cuts) + 1).round().astype(int)   # as many, evened
    if all(fits(heights[a:b]) or b - a == 1 for a, b in zip(even, even[1:])):
        cuts = even[1:].tolist()
    groups = [tuple(modes[a:b]) for a, b in zip([0, *cuts], cuts)]
    if len(groups) == 1:
        paths = (path,)
    else:
        digits = len(str(max(max(modes) + 1, result.mechanisms)))   # as the audit numbers
        num = lambda k: f"{k + 1:0{digits}d}"  # noqa: E731
        paths = tuple(path.with_name(
            f"{path.stem}-mode-{num(g[0])}{path.suffix}" if len(g) == 1 else
            f"{path.stem}-modes-{num(g[0])}-{num(g[-1])}{path.suffix}") for g in groups)
    return SheetPlan(paths=paths, groups=tuple(groups), poses=n, grid=grid, pose_size=pose,
                     width=width)


def write_sheets(result: AuditResult, plan: SheetPlan, *, on_frame=None) -> list[Path]:
    """Render the poses of :func:`plan_sheets` and write its sheets; the paths written.

    Each sheet holds, per mode, the title and the whole caption once, then
    the mode's poses in rows (the first at the largest movement, with the
    axis triad); the legend and the caution once at its foot.  The files'
    paths should have been checked (``io.output.check_output``) beforehand.

    Notes
    -----
    Cost: one off-screen render per pose, O(m) tube geometry each.
    """
    iio = require("imageio.v3")
    written = []
    for target, group in zip(plan.paths, plan.groups):
        blocks = [_render_block(result, k, plan, on_frame) for k in group]
        iio.imwrite(target, contact_sheet(blocks, _sheet_legend(group), plan.width,
                                          dimension=result.frame.dimension), extension=".png")
        written.append(Path(target))
    return written


def _render_block(result: AuditResult, mode, plan: SheetPlan, on_frame) -> Block:
    scene, title, caption, legend = _mode_setup(result, mode)
    stage = Stage(scene, plan.pose_size, title, caption, legend,
                  dimension=result.frame.dimension, bands=False)
    try:
        views = _animate(stage, scene, mode, plan.poses, on_frame, stage.view)
        axes = stage.axes
    finally:
        stage.close()
    return Block(title, caption, _caption_lines(caption, plan.width, 10 ** 6), views, axes)


def contact_sheet(blocks: list[Block], legend, width: int = SHEET_WIDTH, *,
                  dimension: int = 3) -> np.ndarray:
    """Modes' blocks one below another with the legend once at the foot, ``(H, W, 3) uint8``.

    Each block is its title line, its caption lines and its poses in rows of
    ``ceil(p / ceil(p / SHEET_COLUMNS))`` (:func:`sheet_grid`), left-aligned;
    a grey rule and a gap part two blocks.  ``W`` is ``width`` or the widest
    row of poses when that is wider.
    """
    Image, ImageDraw, ImageFont = (require(f"PIL.{m}") for m in ("Image", "ImageDraw",
                                                                   "ImageFont"))
    ph, pw = blocks[0].views[0].shape[:2]
    (rows, cols), _ = sheet_grid(len(blocks[0].views), (pw, ph), width)
    w = max(width, cols * pw)
    heights = [_TITLE + 16 * max(len(b.lines), 1) + 6 + rows * ph for b in blocks]
    foot = _legend_height(legend, w)
    total = sum(heights) + _GAP * (len(blocks) - 1) + foot
    img = Image.new("RGB", (w, total), PALETTE["background"][0])
    d = ImageDraw.Draw(img)
    ink = PALETTE["text"][0]
    big, small, tiny = (ImageFont.load_default(size=s) for s in (15, 12, 10))
    y = 0
    for i, (b, bh) in enumerate(zip(blocks, heights)):
        if i:
            d.line([(0, y + _GAP // 2), (w, y + _GAP // 2)], fill="#bbbbbb", width=2)
            y += _GAP
        _draw_caption(d, b.title, b.lines, y, w, big, small)
        top = y + _TITLE + 16 * max(len(b.lines), 1) + 6
        for k, view in enumerate(b.views):
            img.paste(Image.fromarray(view), ((k % cols) * pw, top + (k // cols) * ph))
        for c in range(1, min(cols, len(b.views))):     # hairlines between poses
            d.line([(c * pw, top), (c * pw, top + rows * ph)], fill="#eeeeee")
        if b.axes is not None:
            _triad(d, b.axes, (34, top + ph - 34), small, dimension)
        y += bh
    d.line([(0, y), (w, y)], fill="#dddddd")
    _draw_legend(d, legend, y + 6, w, small)
    d.text((10, total - 14), _CAUTION_SHORT, font=tiny, fill="#555555")
    return np.asarray(img)


def legend_entry(key: str, words: str) -> tuple[str, str]:
    """A legend entry: the colour, and its name followed by what it shows."""
    colour, name = PALETTE[key]
    return colour, f"{name}: {words}"


def _compose(view: np.ndarray, size, title: str, caption: list[str],
             legend: list[tuple[str, str]], bands, scale=None, axes=None,
             dimension: int = 3) -> np.ndarray:
    """Put ``view`` between a caption band and a legend band, ``(h, w, 3) uint8``.

    ``caption`` is its lines (:func:`_caption_lines`); ``bands`` is ``(top, bottom)``,
    the two bands' heights.  ``scale`` (a
    colour map on [-1, 1]) adds a force scale as the first row of the legend
    band: a bar from -1 (compression) to +1 (tension), labelled in words.
    ``axes`` (the camera's screen axes ``right, up`` in the scene) adds an axis
    triad in the lower left corner of the view, labelled with the model's axes
    (a plane frame's x and y).
    """
    Image, ImageDraw, ImageFont = (require(f"PIL.{m}") for m in ("Image", "ImageDraw",
                                                                   "ImageFont"))

    w, h = size
    top, bottom = bands
    img = Image.new("RGB", (w, h), PALETTE["background"][0])
    img.paste(Image.fromarray(np.ascontiguousarray(view)), (0, top))
    d = ImageDraw.Draw(img)
    ink = PALETTE["text"][0]
    big, small, tiny = (ImageFont.load_default(size=s) for s in (15, 12, 10))
    _draw_caption(d, title, caption, 0, w, big, small)
    y0 = h - bottom + 6
    if scale is not None:
        bar_w = 240
        left, right = "compression  -1", "+1  tension"
        bx = 10 + small.getlength(left) + 8
        ramp = (np.asarray([scale(v)[:3] for v in np.linspace(0, 1, bar_w)]) * 255).astype(np.uint8)
        img.paste(Image.fromarray(np.repeat(ramp[None], 12, axis=0)), (int(bx), y0 + 1))
        d.rectangle([bx - 1, y0, bx + bar_w, y0 + 13], outline="#606060")
        d.text((10, y0), left, font=small, fill=ink)
        d.text((bx + bar_w + 8, y0), right, font=small, fill=ink)
        d.line([(bx + bar_w / 2, y0 + 13), (bx + bar_w / 2, y0 + 16)], fill="#606060")
        d.text((bx + bar_w + 8 + small.getlength(right) + 14, y0), "(0 in the middle: light grey)",
               font=small, fill="#555555")
        y0 += _SCALE_ROW
    _draw_legend(d, legend, y0, w, small)
    if axes is not None:
        _triad(d, axes, (34, top + (h - top - bottom) - 34), small, dimension)
    d.text((10, h - 14), _CAUTION_SHORT, font=tiny, fill="#555555")
    d.line([(0, top - 1), (w, top - 1)], fill="#dddddd")
    d.line([(0, h - bottom), (w, h - bottom)], fill="#dddddd")
    return np.asarray(img)


def _draw_caption(d, title: str, lines: list, y: int, w: int, big, small):
    """The title line and the caption's lines from ``y`` down, in a band ``w`` wide."""
    ink = PALETTE["text"][0]
    d.text((10, y + 6), _fit(title, big, w - 20), font=big, fill=ink)
    for k, line in enumerate(lines):
        d.text((10, y + _TITLE + 16 * k), line, font=small, fill=ink)


def _draw_legend(d, legend, y: int, w: int, font):
    """The legend's entries (a swatch and its words) in rows of width ``w`` from ``y``."""
    for (colour, words), (x, row) in zip(legend, _legend_layout(legend, w)):
        ly = y + 17 * row
        d.rectangle([x, ly + 1, x + 13, ly + 13], fill=colour, outline="#606060")
        d.text((x + 19, ly), words, font=font, fill=PALETTE["text"][0])


#: Height in pixels of the colour scale's row in the legend band.
_SCALE_ROW = 22


def screen_axes(direction) -> tuple[np.ndarray, np.ndarray]:
    """The screen's right and up, ``(3,)`` each, for a camera at ``direction`` from the frame.

    Up is the scene's z (the model's up) as seen across the line of sight; a
    camera looking straight down takes the scene's y as up.
    """
    view = -np.asarray(direction, float)
    view = view / np.linalg.norm(view)
    world_up = np.array([0.0, 0.0, 1.0]) if abs(view[2]) < 0.95 else np.array([0.0, 1.0, 0.0])
    right = np.cross(view, world_up)
    right /= np.linalg.norm(right)
    return right, np.cross(right, view)


def _triad(d, axes, origin, font, dimension: int, length: float = 24.0):
    """Axis arrows at ``origin`` (pixels), each axis drawn as the camera sees it."""
    right, up = axes
    names = ("x", "y", "z") if dimension == 3 else ("x", None, "y")  # a plane frame's y is up
    colour = "#404040"
    ox, oy = origin
    for a, name in enumerate(names):
        if name is None:
            continue
        e = np.eye(3)[a]
        dx, dy = length * float(e @ right), -length * float(e @ up)
        if dx * dx + dy * dy < 9.0:          # seen end on: a dot and the name
            d.ellipse([ox - 2, oy - 2, ox + 2, oy + 2], fill=colour)
            d.text((ox + 4, oy - 14), name, font=font, fill=colour)
            continue
        d.line([(ox, oy), (ox + dx, oy + dy)], fill=colour, width=2)
        n = np.hypot(dx, dy)
        ux, uy = dx / n, dy / n
        tip = (ox + dx, oy + dy)
        d.polygon([tip, (tip[0] - 6 * ux + 3 * uy, tip[1] - 6 * uy - 3 * ux),
                   (tip[0] - 6 * ux - 3 * uy, tip[1] - 6 * uy + 3 * ux)], fill=colour)
        d.text((ox + dx * 1.35 - 3, oy + dy * 1.35 - 7), name, font=font, fill=colour)


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


def _legend_height(legend, w: int, scale: bool = False) -> int:
    """Height of the legend band: the colour scale, its rows of entries and the caution line."""
    rows = 1 + max((row for _, row in _legend_layout(legend, w)), default=0)
    return 6 + (_SCALE_ROW if scale else 0) + 17 * rows + 18


def _caption_lines(caption: str, w: int, most: int) -> list[str]:
    """The caption wrapped to width ``w``: every line, or ``most`` (at least 2) with the
    last one cut with an ellipsis."""
    font = require("PIL.ImageFont").load_default(size=12)
    lines = _wrap(caption, font, w - 20)
    most = max(int(most), 2)
    if len(lines) <= most:
        return lines
    return lines[:most - 1] + [_fit(" ".join(lines[most - 1:]), font, w - 20)]


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
    if mode >= result.mechanisms and result.one_way is not None:  # the scene's one-way motion
        info = result.one_way.info
        return (f"One-way motion ({info.kind}): {name}",
                f"{info.description}  (movement drawn at {AMPLITUDE:.0%} of the frame's size)")
    info = result.mode_info[mode] if mode < len(result.mode_info) else None
    kind = result.mode_kinds[mode]
    title = f"Mechanism {mode + 1} of {result.mechanisms} ({kind}): {name}"
    text = info.description if info else ""
    return title, f"{text}  (movement drawn at {AMPLITUDE:.0%} of the frame's size)"
