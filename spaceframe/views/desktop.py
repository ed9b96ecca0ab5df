"""The interactive desktop viewer: a window to turn the frame and play its mechanisms.

One pyvista window in two viewports: the frame on the left, and beside it a
panel with the model's name and counts, the chosen mode's description, a
mode slider (0 = at rest, then the mechanisms as the audit numbers them), a
play/pause switch, an amplitude slider, a self-stress state slider (members
coloured by force, orange tension, blue compression) and, where a bracing
proposal is given, a switch that shows the proposed members; no control
sits over the frame.  The window's title names the model file.  Clicking near a joint names it, its
tags (role, frame, bay) and the nearest member.  The same object runs
off-screen, which is how the tests drive it.
"""

from __future__ import annotations

import numpy as np

from .._optional import require
from ..naming import count
from ..results import AuditResult
from .render import PALETTE, _lines, _pyvista, support_glyphs
from .scene import AMPLITUDE, moving_joints, phases, scene_of

__all__ = ["DeskViewer"]

# slider labels: VTK 9.4 and newer format them with {}-style, older with printf-style
_FMT_INT, _FMT_REAL = "{:.0f}", "{:.2f}"

#: Share of the window's width given to the frame; the control panel takes the rest.
VIEW_SHARE = 0.68
#: Font size of the panel's words.
_FONT = 9
#: Background of the control panel (the report's band colour).
_PANEL = "#f5f5f3"


class DeskViewer:
    """A window on one audited frame (and, optionally, its bracing proposal).

    Parameters
    ----------
    result : AuditResult
    bracing : BracingResult, optional
        From :func:`spaceframe.analysis.bracing.recommend_bracing`.
    off_screen : bool
        Render without a window (tests, screenshots).
    size : (int, int)
        Window size in pixels.
    """

    def __init__(self, result: AuditResult, bracing=None, *, off_screen: bool = False,
                 size=(1100, 760)):
        import os
        if off_screen:
            pv = _pyvista()
        else:
            os.environ.pop("VTK_DEFAULT_OPENGL_WINDOW", None)
            pv = require("pyvista")
        self.pv, self.result, self.bracing = pv, result, bracing
        self.scene = scene_of(result)
        self.mode, self.state, self.playing = 0, 0, False
        self.amplitude, self.phase = AMPLITUDE, 0.0
        self.step_phases = phases(48)
        self.step_index = 0
        self.size = tuple(size)
        p = self.plotter = pv.Plotter(off_screen=off_screen, window_size=list(size),
                                      shape=(1, 2), col_weights=[VIEW_SHARE, 1 - VIEW_SHARE],
                                      border=False, title=window_title(result))
        ink = PALETTE["text"][0]
        p.subplot(0, 1)                                   # the control panel
        p.set_background(_PANEL, all_renderers=False)
        w, h = self.size
        self._words = p.add_text(self._panel_words(), position=(10, h - 10), font_size=_FONT,
                                 color=ink)
        self._words.GetTextProperty().SetVerticalJustificationToTop()
        p.subplot(0, 0)                                   # the frame
        p.set_background(PALETTE["background"][0], all_renderers=False)
        self._members = pv.PolyData()
        self._actors = {}
        self._draw()
        p.subplot(0, 1)
        self._building = True    # the widgets call back with their first values: no redraw yet
        self._widgets()
        self._building = False
        p.subplot(0, 0)
        p.add_axes(color=ink, line_width=2, labels_off=False)
        direction = self.scene.view()
        c = 0.5 * (self.scene.coords.min(axis=0) + self.scene.coords.max(axis=0))
        up = (0, 0, 1) if abs(direction[2]) < 0.95 else (0, 1, 0)
        p.camera_position = [tuple(c + 3 * self.scene.extent * direction), tuple(c), up]
        p.reset_camera()

    # -- what is drawn ---------------------------------------------------------------
    def points(self) -> np.ndarray:
        """Joint positions now, ``(n, 3)``."""
        s = self.scene
        if self.mode == 0:
            return s.coords.copy()
        return s.coords + self.amplitude * s.extent * np.sin(self.phase) * s.modes[self.mode - 1]

    def _member_colours(self):
        n = len(self.scene.ends)
        if self.state:
            t = self.result.self_stress_forces[self.state - 1]
            lo, mid, hi = (np.array(_rgb(PALETTE[k][0])) for k in
                           ("compression", "zero", "tension"))
            f = np.clip(np.abs(t), 0, 1)[:, None]
            return np.where(t[:, None] < 0, mid + (lo - mid) * f, mid + (hi - mid) * f)
        colours = np.tile(_rgb(PALETTE["member"][0]), (n, 1)).astype(float)
        if self.mode:
            u = self.scene.modes[self.mode - 1]
            hit = moving_joints(u)[self.scene.ends].any(axis=1)
            colours[hit] = _rgb(PALETTE["moving_member"][0])
        return colours

    def _draw(self):
        p, pv = self.plotter, self.pv
        for name in list(self._actors):
            p.remove_actor(self._actors.pop(name), render=False)
        pts = self.points()
        if self.mode:
            ghost = _lines(pv, self.scene.coords, self.scene.ends)
            if ghost.n_points:
                self._actors["ghost"] = p.add_mesh(ghost, color=PALETTE["ghost"][0], line_width=2,
                                                   render=False)
        mesh = _lines(pv, pts, self.scene.ends)
        if mesh.n_points:
            mesh.cell_data["colour"] = (self._member_colours()).astype(np.uint8)
            self._actors["members"] = p.add_mesh(mesh, scalars="colour", rgb=True, line_width=4,
                                                 render_lines_as_tubes=True, render=False)
        self._members = mesh
        glyphs = support_glyphs(pv, self.scene, pts)
        if glyphs is not None:
            self._actors["supports"] = p.add_mesh(glyphs, color=PALETTE["support"][0],
                                                  render=False)
        joints = pv.PolyData(pts)
        self._actors["joints"] = p.add_mesh(joints, color=PALETTE["text"][0], point_size=6,
                                            render_points_as_spheres=True, pickable=True,
                                            render=False)
        if self._bracing_shown():
            ends = np.array([self.bracing.candidates.ends[i]
                             for i in self.bracing.members_added], dtype=np.int64)
            braces = _lines(pv, pts, ends.reshape(-1, 2))
            if braces.n_points:
                self._actors["bracing"] = p.add_mesh(braces, color="#e69f00", line_width=6,
                                                     render_lines_as_tubes=True, render=False)

    def _bracing_shown(self) -> bool:
        return bool(getattr(self, "show_braces", False) and self.bracing is not None)

    def _caption(self) -> str:
        r = self.result
        if self.state:
            return (f"State of self-stress {self.state} of {r.self_stress_forces.shape[0]}: "
                    f"orange tension (pulls), blue compression (pushes), grey none")
        head = (f"{r.frame.name or '(unnamed frame)'}\n{count(r.mechanisms, 'mechanism')}, "
                f"{count(r.self_stress_states, 'state of self-stress', 'states of self-stress')}")
        if self.mode:
            info = r.mode_info[self.mode - 1]
            return (f"{head}\n\nMechanism {self.mode} of {r.mechanisms} ({info.kind}):\n"
                    f"{info.description}")
        words = head
        if self._bracing_shown():
            a = self.bracing.after
            words += (f"\n\nProposed bracing shown (orange): "
                      f"{count(len(self.bracing.members_added), 'member')}; after it "
                      f"{count(a.mechanisms, 'mechanism')}")
        return words + "\n\nIdealised pin-jointed model: check by a competent engineer."

    def _panel_words(self) -> str:
        """The caption (:meth:`_caption`), each line wrapped to the panel's width."""
        width = self._panel_chars()
        return "\n".join(_wrap(line, width) if line else "" for line in
                         self._caption().split("\n"))

    def _panel_chars(self) -> int:
        """Characters of the panel's text to a line (each at most 1.1 font sizes wide)."""
        return max(20, int((1 - VIEW_SHARE) * self.size[0] / (1.1 * _FONT)) - 2)

    def _refresh(self):
        if getattr(self, "_building", False):
            return
        self._draw()
        self._words.SetInput(self._panel_words())
        self.plotter.render()

    # -- controls (the widgets call these; so can a script or a test) ----------------------
    def set_mode(self, k: int):
        self.mode = int(np.clip(round(k), 0, self.result.mechanisms))
        self.state, self.phase = 0, (np.pi / 2 if self.mode else 0.0)
        self._refresh()

    def set_state(self, k: int):
        self.state = int(np.clip(round(k), 0, self.result.self_stress_forces.shape[0]))
        if self.state:
            self.mode = 0
        self._refresh()

    def set_amplitude(self, a: float):
        self.amplitude = float(a)
        self._refresh()

    def set_playing(self, on: bool):
        self.playing = bool(on)

    def set_bracing(self, on: bool):
        self.show_braces = bool(on)
        self._refresh()

    def step(self):
        """Advance the playing mode by one step of its cycle."""
        if self.mode and self.playing:
            self.step_index = (self.step_index + 1) % len(self.step_phases)
            self.phase = float(self.step_phases[self.step_index])
            self._refresh()

    def pick(self, point) -> str:
        """Name the joint nearest ``point`` (3,), its tags and the nearest member."""
        f = self.result.frame
        pts, q = self.points(), np.asarray(point, float)
        j = int(np.argmin(np.linalg.norm(pts - q, axis=1)))
        words = [f"joint {f.joint_ids[j]}"] + _tags(f.joint_tags, j)
        a, b = pts[self.scene.ends[:, 0]], pts[self.scene.ends[:, 1]]
        if len(a):
            ab = b - a
            t = np.clip(np.einsum("md,md->m", q - a, ab) /
                        np.maximum(np.einsum("md,md->m", ab, ab), 1e-300), 0, 1)
            d = np.linalg.norm(a + t[:, None] * ab - q, axis=1)
            k = int(np.argmin(d))
            words.append(f"nearest member {f.member_ids[k]}"
                         + "".join(f" {w}" for w in _tags(f.member_tags, k)))
        text = "; ".join(words)
        self._picked.SetInput(text)
        return text

    def _widgets(self):
        """Sliders and switches in the panel beside the frame, stacked from its foot up."""
        p, r = self.plotter, self.result
        w, h = self.size
        pw = (1 - VIEW_SHARE) * w                     # the panel's width in pixels
        x0, x1 = 0.08, 0.92                           # in the panel (the active renderer)
        y = [0.07]
        ink = PALETTE["text"][0]

        def slider(callback, rng, value, title, fmt):
            p.add_slider_widget(callback, rng, value=value, title=title, fmt=fmt,
                                pointa=(x0, y[0]), pointb=(x1, y[0]), style="modern",
                                title_height=0.022, tube_width=0.006, slider_width=0.02)
            y[0] += 0.12

        def switch(callback, words, colour):
            top = int(y[0] * h)
            p.add_checkbox_button_widget(callback, value=False, position=(int(x0 * pw), top),
                                         size=22, color_on=colour)
            p.add_text(words, position=(int(x0 * pw) + 30, top + 3), font_size=9, color=ink)
            y[0] += 34 / h

        q = r.self_stress_forces.shape[0]
        if q:
            slider(self.set_state, [0, q], 0, "self-stress state (0 = none)", _FMT_INT)
        if r.mechanisms:
            slider(self.set_amplitude, [0.0, 0.3], AMPLITUDE, "amplitude (of the frame's size)",
                   _FMT_REAL)
            slider(self.set_mode, [0, r.mechanisms], 0, "mechanism (0 = at rest)", _FMT_INT)
            y[0] -= 0.05
            switch(self.set_playing, "play / pause", PALETTE["moving_joint"][0])
            if not p.off_screen:
                p.add_timer_event(max_steps=10 ** 9, duration=60, callback=lambda _s: self.step())
        if self.bracing is not None and self.bracing.members_added:
            switch(self.set_bracing, "proposed bracing (orange)", "#e69f00")
        self._picked = p.add_text("Click near a joint to name it.",
                                  position=(int(x0 * pw), int(y[0] * h) + 4), font_size=8,
                                  color=ink)
        p.enable_point_picking(callback=lambda pt: self.pick(pt), show_message=False,
                               show_point=False, left_clicking=True)

    def screenshot(self) -> np.ndarray:
        self.plotter.render()
        return self.plotter.screenshot(return_img=True)[:, :, :3]

    def show(self):
        self.plotter.show()

    def close(self):
        self.plotter.close()


def window_title(result: AuditResult) -> str:
    """The window's title: the model file and the frame's name."""
    from pathlib import Path

    f = result.frame
    where = Path(f.source).name if f.source else ""
    name = f.name or "(unnamed frame)"
    return "spaceframe view: " + (f"{where} - {name}" if where else name)


def _rgb(hex_colour: str):
    h = hex_colour.lstrip("#")
    return [int(h[i:i + 2], 16) for i in (0, 2, 4)]


def _tags(tags, i) -> list[str]:
    return [f"{name} {labels[i]}" for name, labels in tags.items() if labels[i]]


def _wrap(text: str, width: int = 80) -> str:
    import textwrap
    return "\n".join(textwrap.wrap(text, width, break_on_hyphens=False))
