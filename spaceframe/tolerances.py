"""Every tolerance spaceframe uses, in one place, with the inequality it tests.

All tests are relative, so an audit gives the same answer whatever the unit
of length (mm or m) and whatever the size of the frame.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Tolerances", "DEFAULT"]


@dataclass(frozen=True)
class Tolerances:
    """Tolerances of the model checks and of the rank decision.

    Attributes
    ----------
    rank : float
        A singular value ``s`` of the compatibility matrix (rows are member
        direction cosines, so the matrix is dimensionless) is judged zero when
        ``s <= rank * s_max``.  Default ``1e-6``.  Why: a zero singular value
        comes out of the sparse engine near ``sqrt(eps) * s_max`` (about
        ``1.5e-8 * s_max``, because it works with the squared matrix), while
        the smallest non-zero singular value of a well-made double-layer grid
        falls with size to about ``7e-5 * s_max`` at 100,000 members and an
        extrapolated ``7e-6 * s_max`` at 1,000,000.  ``1e-6`` sits between.
    narrow_gap : float
        A warning is given when the smallest singular value judged non-zero
        is less than ``narrow_gap`` times the largest judged zero (or, when
        nothing is judged zero, than ``narrow_gap * rank * s_max``).
        Default ``100``: the decision then rests on less than two decades.
    near_threshold : float
        A warning is also given when a singular value on either side of the
        decision lies within this factor of the threshold:
        ``rank / near_threshold < s / s_max < rank * near_threshold``.
        Default ``2``.
    coincident : float
        Two joints are reported as coincident when their distance is
        ``<= coincident * size``, ``size`` being the diagonal of the model's
        bounding box.  Default ``1e-9``.
    short_member : float
        A member is rejected as of zero length when its length is
        ``<= short_member * size``.  Default ``1e-9``.
    restraint_dependence : float
        Restraint directions at one joint count as independent while the
        smallest singular value of their unit vectors exceeds this.
        Default ``1e-9``.
    merge : float
        Imported geometry (meshes, line files, drawings) gives each vertex or
        line end on its own; two of them become one joint when their distance
        is ``<= merge * size``, ``size`` being the diagonal of the bounding box
        of all the vertices.  Default ``1e-6``: a millimetre-drawn 1 km frame
        still joins ends that differ by 1 mm, while distinct joints of a real
        frame lie at least ``1e-4 * size`` apart.  A drawing's spec may give an
        absolute distance instead.
    near_miss : float
        In a drawing, a line end that joins no other line but lies within
        ``near_miss * size`` of another end or line (and farther than the merge
        distance) is a gap the drafter most likely did not mean; it is
        reported as an error.  Default ``0.01``.
    select : float
        A support selection rule ``z = min`` or ``x = 0`` picks the joints
        with ``|coordinate - value| <= select * size`` unless the rule gives
        ``within DISTANCE``.  Default ``1e-6``.
    panel_plane : float
        Four joints bound a planar panel (a bracing candidate) when the two
        lines through opposite corners pass within ``panel_plane * L`` of each
        other, ``L`` the longer of the two diagonals, and cross inside both.
        Default ``1e-4``: a panel out of plane by 0.1 mm in 1 m is still one
        panel, a twisted one (a warped roof bay) is not.
    held_stiffness : float
        An IFC boundary condition that gives a translational spring instead of
        a fixed translation holds that direction when its stiffness ``k``
        satisfies ``k >= held_stiffness``, in N/m (the file's number, SI units
        assumed).  Default ``1e10``: some 250 times the axial stiffness EA/L of
        a steel tube of 10 cm^2 and 5 m (4e7 N/m), so such a support moves far
        less than any member stretches; softer springs are left free (a
        pin-jointed audit has no springs).
    """

    rank: float = 1e-6
    narrow_gap: float = 100.0
    near_threshold: float = 2.0
    coincident: float = 1e-9
    short_member: float = 1e-9
    restraint_dependence: float = 1e-9
    merge: float = 1e-6
    near_miss: float = 0.01
    select: float = 1e-6
    panel_plane: float = 1e-4
    held_stiffness: float = 1e10


DEFAULT = Tolerances()
