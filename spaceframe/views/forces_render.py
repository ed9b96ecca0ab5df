"""A still of one load case: members coloured by force, arrows for loads and reactions.

Members are tubes coloured on the one diverging force scale of
:func:`spaceframe.views.render.force_colours` (compression blue, none light
grey, tension orange), scaled to the case's largest force so that ``-1`` and
``+1`` are the largest compression and tension; members carrying nothing are
thin and grey.  Loads are pink arrows pointing at their joints, reactions
green arrows (the supports' colour) pushing on theirs, each as long as its
force relative to the largest of its kind.  pyvista is imported on first use.
"""

from __future__ import annotations

import numpy as np

from ..errors import SpaceframeError
from ..force_results import ForcesResult
from .forces_text import case_heading
from .render import PALETTE, SIZE, Stage, force_colours, legend_entry
from .scene import ARROW, embed, frame_scene, view_direction

__all__ = ["forces_picture"]


def forces_picture(result: ForcesResult, case: int, *, size=SIZE) -> np.ndarray:
    """Case ``case`` (0-based) as a still ``(h, w, 3) uint8``.

    Raises
    ------
    SpaceframeError
        For a case that is not carried (it has no forces to draw).

    Notes
    -----
    Cost: one off-screen render; O(m + n) geometry.
    """
    f = result.frame
    name = result.names[case]
    if not result.carried[case]:
        words = "; ".join(e.description.rstrip(".") for e in result.excited[case][:1])
        raise SpaceframeError(f"case {name!r} is not carried ({words}): it has no forces to "
                              f"draw; brace the frame first")
    t = result.shown_forces(case)
    top = float(np.max(np.abs(t))) if t.size else 0.0
    carrying = t != 0
    scene = frame_scene(f)
    u = result.force_units
    big_t = int(np.argmax(t)) if t.size else 0
    big_c = int(np.argmin(t)) if t.size else 0
    caption = (f"{int(np.sum(t > 0))} members in tension (largest {t[big_t]:.3g} {u}, "
               f"{f.member_ids[big_t]}), {int(np.sum(t < 0))} in compression (largest "
               f"{t[big_c]:.3g} {u}, {f.member_ids[big_c]}); colour scaled to the largest force."
               if top else "No member carries force in this case.")
    title = f"{case_heading(name, result.kinds[case])}: member forces, {f.name or 'frame'}"
    legend = [legend_entry("tension", "tension: the member pulls on its joints"),
              legend_entry("compression", "compression: the member pushes"),
              legend_entry("ghost", "thin: carries nothing"),
              legend_entry("load", "arrow: load"),
              legend_entry("reaction", "arrow: reaction of a support")]
    cmap = force_colours()
    stage = Stage(scene, size, title, caption, legend, cmap, dimension=f.dimension)
    try:
        pv, p, e = stage.pv, stage.plotter, stage.e
        stage.forces(t / (top or 1.0), carrying, cmap)
        loads = embed(np.asarray(result.loads[case], float), f.dimension)
        reactions = np.zeros_like(loads)
        reactions[result.reaction_joints] = embed(result.shown_reactions(case), f.dimension)
        tips = [scene.coords]
        for key, vectors in (("load", loads), ("reaction", reactions)):
            mesh, ends = _arrows(pv, scene.coords, vectors, e)
            if mesh is not None:
                p.add_mesh(mesh, color=PALETTE[key][0], lighting=False)  # the legend's colour
                tips.append(ends)
        stage.camera(view_direction(scene.coords), tips)
        return stage.shot()
    finally:
        stage.close()


def _arrows(pv, points: np.ndarray, vectors: np.ndarray, extent: float):
    """Arrows ending at ``points`` along ``vectors`` (longest ``ARROW * extent``), one mesh,
    and their tails ``(k, 3)`` (for the camera); ``(None, None)`` when every vector is 0."""
    size = np.linalg.norm(vectors, axis=1)
    top = float(size.max()) if size.size else 0.0
    keep = np.flatnonzero(size > 1e-9 * top) if top > 0 else np.zeros(0, dtype=int)
    if not keep.size:
        return None, None
    parts, tails = [], []
    for j in keep:
        length = max(ARROW * extent * size[j] / top, 0.02 * extent)
        d = vectors[j] / size[j]
        tail = points[j] - length * d
        parts.append(pv.Arrow(start=tail, direction=d, scale=length, tip_length=0.3,
                              tip_radius=0.09, shaft_radius=0.03))
        tails.append(tail)
    return pv.merge(parts), np.array(tails)
