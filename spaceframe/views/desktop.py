"""The interactive desktop viewer: a window to turn the frame and play its mechanisms.

One pyvista window with, along its left edge, a mode slider (0 = at rest,
then the mechanisms as the audit numbers them), a play/pause switch, an
amplitude slider, a self-stress state slider (members coloured by force,
orange tension, blue compression) and, where a bracing proposal is given, a
switch that shows the proposed members.  Clicking near a joint names it, its
tags (role, frame, bay) and the nearest member.  The same object runs
off-screen, which is how the tests drive it.
"""

from __future__ import annotations

import numpy as np

from .._optional import require
from ..results import AuditResult
from .render import PALETTE, _lines, _pyvista, support_glyphs
from .scene import AMPLITUDE, moving_joints, phases, scene_of, view_direction

__all__ = ["DeskViewer"]

# slider labels: VTK 9.4 and newer format them with {}-style, older with printf-style
_FMT_INT, _FMT_REAL = "{:.0f}", "{:.2f}"


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
        p = self.plotter = pv.Plotter(off_screen=off_screen, window_size=list(size),
                                      title="spaceframe: " + (result.frame.name or "frame"))
        p.set_background(PALETTE["background"][0])
        self._members = pv.PolyData()
        self._actors = {}
        self._draw()
        self._picked = p.add_text("Click near a joint to name it.", position=(10, 80),
                                  font_size=9, color=PALETTE["text"][0])
        self._words = p.add_text(self._caption(), position="upper_left", font_size=10,
                                 color=PALETTE["text"][0])
        self._widgets()
        direction = view_direction(self.scene.coords)
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
        if self.mode:
            info = r.mode_info[self.mode - 1]
            return f"Mechanism {self.mode} of {r.mechanisms} ({info.kind}): {_wrap(info.description)}"
        words = f"{r.mechanisms} mechanisms, {r.self_stress_states} states of self-stress"
        if self._bracing_shown():
            a = self.bracing.after
            words += (f"\nProposed bracing shown (orange): {len(self.bracing.members_added)} "
                      f"members; after it {a.mechanisms} mechanisms")
        return words + "\nIdealised pin-jointed model: check by a competent engineer."

    def _refresh(self):
        self._draw()
        self._words.SetText(2, self._caption())
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
        """Sliders stacked at the lower right, switches at the lower left, words at the top."""
        p, r = self.plotter, self.result
        y = [0.08]

        def slider(callback, rng, value, title, fmt):
            p.add_slider_widget(callback, rng, value=value, title=title, fmt=fmt,
                                pointa=(0.64, y[0]), pointb=(0.97, y[0]), style="modern",
                                title_height=0.025)
            y[0] += 0.13

        if r.mechanisms:
            slider(self.set_mode, [0, r.mechanisms], 0, "mechanism (0 = at rest)", _FMT_INT)
            slider(self.set_amplitude, [0.0, 0.3], AMPLITUDE, "amplitude (of the frame's size)",
                   _FMT_REAL)
            p.add_checkbox_button_widget(self.set_playing, value=False, position=(10, 10),
                                         size=26, color_on=PALETTE["moving_joint"][0])
            p.add_text("play / pause", position=(42, 14), font_size=9, color=PALETTE["text"][0])
            if not p.off_screen:
                p.add_timer_event(max_steps=10 ** 9, duration=60, callback=lambda _s: self.step())
        q = r.self_stress_forces.shape[0]
        if q:
            slider(self.set_state, [0, q], 0, "self-stress state (0 = none)", _FMT_INT)
        if self.bracing is not None and self.bracing.members_added:
            p.add_checkbox_button_widget(self.set_bracing, value=False, position=(10, 44),
                                         size=26, color_on="#e69f00")
            p.add_text("proposed bracing (orange)", position=(42, 48), font_size=9,
                       color=PALETTE["text"][0])
        p.enable_point_picking(callback=lambda pt: self.pick(pt), show_message=False,
                               show_point=False, left_clicking=True)

    def screenshot(self) -> np.ndarray:
        self.plotter.render()
        return self.plotter.screenshot(return_img=True)[:, :, :3]

    def show(self):
        self.plotter.show()

    def close(self):
        self.plotter.close()


def _rgb(hex_colour: str):
    h = hex_colour.lstrip("#")
    return [int(h[i:i + 2], 16) for i in (0, 2, 4)]


def _tags(tags, i) -> list[str]:
    return [f"{name} {labels[i]}" for name, labels in tags.items() if labels[i]]


def _wrap(text: str, width: int = 80) -> str:
    import textwrap
    return "\n".join(textwrap.wrap(text, width))
