"""Every tolerance spaceframe uses, in one place, with the inequality it tests.

All tests are relative, so an audit gives the same answer whatever the unit
of length (mm or m) and whatever the size of the frame (the one exception,
``parallel_lines``, says so).  ``size`` is always :meth:`spaceframe.model.Frame.size`,
the diagonal of the joints' bounding box.

Three small frozen dataclasses:

- :class:`Tolerances`: the numerical decisions (rank, model checks, the
  tests inside the analysis).  ``DEFAULT`` is the instance every function
  takes unless given another (``tol=``).
- :class:`Limits`: sizes that choose a method (dense or sparse engine, whether
  redundancy shares are computed); ``Tolerances.limits``.
- :class:`Display`: what the views and the readable accounts show (which
  joints count as moving, what is left out as zero, rounding); ``DISPLAY``.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Tolerances", "Limits", "Display", "DEFAULT", "DISPLAY"]


@dataclass(frozen=True)
class Limits:
    """Sizes at which the analysis changes method.

    None of them changes a count: each chooses how a result is computed, or
    whether an optional one (redundancy shares) is.

    Attributes
    ----------
    dense_engine : int
        The rank engine is the dense SVD when ``members * free_coordinates
        <= dense_engine``, the sparse one otherwise (``method="auto"``).
        Default ``100_000``: up to there the SVD takes well under a second.
    redundancy_auto : int
        With ``redundancy=None`` the sparse engine computes every member's
        redundancy share when ``free_coordinates <= redundancy_auto`` (one
        solve per free coordinate).  Default ``3_000``.
    redundancy_max : int
        Redundancy shares asked for are computed when ``free_coordinates <=
        redundancy_max`` and left out (None) above.  Default ``20_000``.
    dense_soft : int
        Soft modes come from a dense symmetric eigensolver when
        ``free_coordinates <= dense_soft``, from block inverse iteration
        above.  Default ``1_500``.
    soft_auto : int
        With ``soft=None`` (the default) the audit looks for soft modes when
        ``free_coordinates <= soft_auto``: their search factorises a second
        matrix, ``C.T diag(EA / L) C``, which above this size costs a third of
        the audit and more.  Larger frames get them on request
        (``audit(soft=True)``, ``spaceframe audit --soft``) and their account
        says they were not looked for.  Default ``20_000``.
    common_prestress : int
        The search for one state of self-stress that stiffens every internal
        mechanism at once runs when ``internal_mechanisms <= common_prestress``
        (otherwise ``prestress_stable`` stays undetermined).  Default ``12``.
    pardiso_engine : int
        The sparse engine factorises with MKL PARDISO (the optional extra
        ``pardiso``, where installed) when ``free_coordinates >=
        pardiso_engine``, with SuperLU otherwise (and always without the
        extra).  Both give the same counts; below this size SuperLU is as
        fast.  Default ``2_000``.
    split_basis : int
        With mechanisms found joint by joint, the mechanism basis is made
        canonical block by block (``nullspace.canonical_split``, never a dense
        ``free_coordinates x mechanisms`` array) when ``free_coordinates *
        mechanisms > split_basis``, as one dense array otherwise.  The two give
        the same modes to rounding.  Default ``1_000_000``.
    dense_modes : int
        The audit holds its mechanisms and their stiffening states dense
        (``(k, n, d)`` and ``(k, m)`` arrays) when ``mechanisms * joints *
        dimension <= dense_modes``, and as sparse rows otherwise
        (:class:`spaceframe.modeset.ModeSet`), as also whenever the basis was
        made block by block (``split_basis``).  The two
        give the same modes, orders and states to rounding.  Default
        ``20_000_000`` (160 MB of modes).
    block_prestress : int
        The product forces of the internal mechanisms are projected onto the
        states of self-stress block by block (:mod:`spaceframe.analysis.blocks`,
        a small SVD per block of ``C``) and their stiffening states held sparse
        when ``internal_mechanisms > block_prestress``; up to it, in the solves
        of the whole frame that also serve the key members.  The two give the
        same orders and states to the solves' rounding (about ``1e-9``).
        Default ``64`` (four block solves; above ``common_prestress``, so the
        search for one state for all is made the same way either side).
    robust_search : int
        A robust bracing proposal (no added item whose loss brings a
        mechanism back) is searched for exactly, subsets in order of cost,
        while ``subsets seen <= robust_search``; above, it is the greedy
        augmentation of the least-cost basis.  Default ``20_000``.
    """

    dense_engine: int = 100_000
    redundancy_auto: int = 3_000
    redundancy_max: int = 20_000
    dense_soft: int = 1_500
    soft_auto: int = 20_000
    common_prestress: int = 12
    pardiso_engine: int = 2_000
    split_basis: int = 1_000_000
    dense_modes: int = 20_000_000
    block_prestress: int = 64
    robust_search: int = 20_000


@dataclass(frozen=True)
class Display:
    """Thresholds of what the readable accounts, the JSON and the pictures show.

    Modes are scaled so that their largest joint movement is 1 and states of
    self-stress so that their largest force is 1: these fractions are of that.

    Attributes
    ----------
    moving : float
        A joint moves in a mode when its movement exceeds ``moving`` times the
        largest: ``|u_j| > moving * max_i |u_i|`` (the mode's joint list and
        description, highlighted joints and members in pictures, the report
        and the interactive view).  Default ``0.05``.
    floor : float
        An entry is left out as zero when ``|x| <= floor`` (of the largest, 1):
        the joints of a mode's displacements and the members of a state's
        forces in the JSON and text, the members drawn as carrying a state in
        pictures and counted in the report.  Default ``1e-6``, the last digit
        kept by ``decimals``.
    decimals : int
        Movements, forces, directions and redundancy shares in the JSON and
        the report are rounded, ``round(x, decimals)``: a difference with
        ``|x - y| < 0.5 * 10**-decimals`` may not show.  Default ``6``.
    force_decimals : int
        The report's per-member force colours are rounded,
        ``round(t, force_decimals)``: a difference with ``|t - u| < 0.5 *
        10**-force_decimals`` may not show.  Default ``3``.
    zero_coordinate : float
        A point printed in a sentence (a rotation axis) shows a coordinate as
        0 when ``|p| <= zero_coordinate * size``; a support glyph counts its
        joint as level with the frame's centre along the held direction when
        ``|side| < zero_coordinate * extent``.  Default ``1e-9``.
    axis_plane : float
        A plane is named by an axis (``horizontal plane z = 2.4``, ``the
        plane y = 0``) when its unit normal ``n`` has ``|n_a| > axis_plane``,
        and called vertical when ``|n_z| < 1 - axis_plane``.  Default ``0.999``.
    along_axis : float
        A direction ``v`` is worded by its axis (``along +x``) when its
        largest component has ``|v_a| >= along_axis * ||v||``, and otherwise by
        its components (``along (+0.50, +0.87, +0.00)``); a slide is called
        along the building when its unit direction ``u`` and the extrusion
        direction ``e`` have ``|u . e| >= along_axis``.  Default ``0.98``
        (within about 11 degrees of the axis).
    """

    moving: float = 0.05
    floor: float = 1e-6
    decimals: int = 6
    force_decimals: int = 3
    zero_coordinate: float = 1e-9
    axis_plane: float = 0.999
    along_axis: float = 0.98


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
        extrapolated ``7e-6 * s_max`` at 1,000,000.  ``1e-6`` sits between
        for a compact frame; a slender or very large one is judged with the
        lower threshold of :meth:`rank_threshold`.
    rank_floor : float
        The lowest relative threshold :meth:`rank_threshold` goes to, however
        slender the frame: ``s <= rank_floor * s_max`` is always zero.
        Default ``1e-7``: the sparse engine counts eigenvalues of ``C.T C``
        below ``(threshold)**2``, and a count at ``1e-14 * s_max**2`` still
        stands some 45 times above the rounding of those eigenvalues
        (``eps * s_max**2``, ``eps = 2.2e-16``).
    slender_margin : float
        A slender frame's genuine stiffness is expected no lower than its
        bending scale ``b`` (:meth:`spaceframe.model.Frame.bending_scale`:
        ``(depth / length) * (member / length)``) by much, and the relative
        rank threshold is kept this factor below it, ``threshold <= b /
        slender_margin`` (see :meth:`rank_threshold`); the same factor keeps
        the one-way decision below it (:meth:`one_way_threshold`).  Default
        ``100``: measured, the smallest non-zero singular value is 0.12 of
        ``b`` on lone towers of 100 to 900 storeys and 0.45 of it on
        double-layer grids, so 12 to 45 times above the threshold.
    narrow_gap : float
        A warning is given when the smallest singular value judged non-zero
        is less than ``narrow_gap`` times the largest judged zero,
        ``s_nonzero < narrow_gap * s_zero`` (tested only when both exist:
        with nothing judged zero, ``near_threshold`` alone applies).
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
        smallest singular value of their unit vectors exceeds this,
        ``s_min > restraint_dependence``; a direction that would bring it
        lower is dropped with a warning.  Default ``1e-9``.
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
        ``near_miss * size`` of another line (``distance <= near_miss * size``;
        farther than the merge distance, or it would have joined) is a gap the
        drafter most likely did not mean; it is reported as an error.
        Default ``0.01``.
    select : float
        A support selection rule ``z = min`` or ``x = 0`` picks the joints
        with ``|coordinate - value| <= select * size`` unless the rule gives
        ``within DISTANCE``.  Default ``1e-6``.
    panel_plane : float
        Four joints bound a planar panel (a bracing candidate) when the two
        lines through opposite corners pass within ``panel_plane * L`` of each
        other (``gap <= panel_plane * L``), ``L`` the longer of the two
        diagonals, and cross inside both.  A whole frame lies in one plane when
        every joint has ``distance <= panel_plane * extent`` from its
        least-squares plane.
        Default ``1e-4``: a panel out of plane by 0.1 mm in 1 m is still one
        panel, a twisted one (a warped roof bay) is not.
    s_max_estimate : float
        Relative accuracy asked of the Lanczos estimate of the largest
        eigenvalue ``lambda_max = s_max**2`` of ``K = C.T C`` in the sparse
        engine (ARPACK stops when its Ritz value ``theta`` has
        ``|lambda_max - theta| <= s_max_estimate * |theta|``).  Default
        ``1e-2``: the threshold ``rank * s_max`` moves by half a percent at most.
    refine : float
        The sparse engine's projection onto the states of self-stress takes
        one step of iterative refinement for each column ``y`` whose solve of
        ``K x = C.T y`` leaves ``||C.T y - K x|| > refine * ||C.T y||``.
        Default ``1e-10``.
    echelon_zero : float
        In a canonical basis (each vector's largest entry 1), an entry with
        ``|e| < echelon_zero`` is set to exactly 0, so that rounding noise
        does not show as a tiny movement or force.  Default ``1e-12``.
    independent : float
        Choosing the internal mechanisms of the local basis, a candidate mode
        ``v`` is taken when what is left of it after projection on the modes
        already taken, ``r``, has ``||r|| > independent * ||v||``.  Default
        ``1e-8``.
    translation_rank : float
        The axis translations expressed in free coordinates span the
        directions whose singular values have ``s > translation_rank * s_1``.
        Default ``1e-12``.
    principal_cosine : float
        A permitted rigid-body motion is a pure translation when its principal
        angle to the span of translations has ``cos >= 1 - principal_cosine``.
        Default ``1e-9``.
    in_span : float
        A rotation ``v`` about an axis through the centroid is among the
        permitted rigid-body motions ``R`` when ``||v - R R.T v|| <= in_span *
        ||v||``, and is kept as a new one when what is left of it after the
        rotations already kept exceeds ``in_span * ||v||``.  Default ``1e-9``.
    direction_rank : float
        The unit direction vectors of the members at a joint (singular values
        ``s_1 >= s_2 >= s_3``) span exactly a plane when ``s_2 > direction_rank``
        and ``s_3 < direction_rank * s_1``, and a line when ``s_2 <=
        direction_rank``.  Default ``1e-6``.
    pure_translation : float
        A rigid-body mode fitted as ``u = t + omega x (x - c)`` is a slide
        when ``|omega| * size < pure_translation * |t|``, a rotation
        otherwise.  Default ``1e-6``.
    on_axis : float
        A joint lies on a rotation axis (or at the point a plane frame turns
        about) when its distance from it is ``<= on_axis * size``.  Default
        ``1e-6``.
    rigid_inside : float
        The permitted rigid-body motions ``G`` (``r`` orthonormal columns) lie
        in the mechanism space ``M`` found when ``||G - M M.T G||_F <=
        rigid_inside * sqrt(r)``; otherwise the engine has failed.  Default
        ``1e-6``.
    axis_restraint : float
        A restraint direction ``h`` is an axis when it has one non-zero
        component with ``abs(|h_a| - 1) <= axis_restraint``; a joint held only
        along axes keeps the other axes as its free coordinates.  Default
        ``1e-15``.
    key : float
        A member is key (carries no force in any state of self-stress) when
        both seeded probes projected onto the self-stress space have
        ``|t_e| <= key * max |t|`` on it.  Default ``1e-8``.
    stiffening : float
        The product-force test: a mode's product forces ``p`` have a
        stiffening component when ``||P p|| > stiffening * ||p||`` (``P`` the
        projection onto the states of self-stress); one state ``t`` stiffens
        all modes when the smallest eigenvalue of their geometric stiffness
        matrix exceeds ``stiffening`` times its largest entry.  Default ``1e-8``.
    sparse_drop : float
        A stiffening state held sparse (many modes, ``Limits.dense_modes``) and
        projected with the whole frame's factorisation keeps member ``e`` when
        ``|t_e| > sparse_drop * max |t|``; the rest is the rounding of the
        solve, far below what is shown (``Display.floor``).  Default ``1e-12``.
    soft : float
        A held mode is reported as soft when its stiffness ``lambda`` (an
        eigenvalue of ``K = C.T diag(EA / L) C``) has ``lambda < soft * k``,
        ``k`` the frame's typical joint stiffness (the median diagonal entry
        of ``K``).  Default ``1e-3``
        (0.1 %: the bending of a whole truss sits near 0.2 % and is not a
        weakness).
    soft_shift : float
        The soft-mode iteration factorises ``K + soft_shift * k * I`` (``k`` as
        for ``soft``): positive definite although ``K`` is singular on the
        mechanisms, and a shift ``soft_shift * k << soft * k``, far below the
        stiffness of any mode worth reporting.  Default ``1e-10``.
    in_plane_direction : float
        An extrusion direction ``v`` (unit) lies in the plane frame's own plane
        when ``|v . n| < in_plane_direction``, ``n`` the plane's normal; it is
        rejected.  Default ``1e-3``.
    crossing_margin : float
        Two straight lines cross (a drawing's line work; a bracing panel's
        diagonals) when the crossing point's parameter ``t`` along each has
        ``crossing_margin < t < 1 - crossing_margin``: not at an end.
        Default ``1e-9``.
    parallel_lines : float
        Two lines of a drawing ``r`` and ``s`` (plane vectors) are tested for a
        crossing only when ``|r x s| > parallel_lines``.  Absolute, in the
        drawing's units squared.  Default ``1e-12``.
    parallel_diagonals : float
        Bracing panels: two diagonals ``d1``, ``d2`` are parallel (three
        corners in a line, no panel) when ``|d1 x d2| <= parallel_diagonals *
        |d1| |d2|``.  Default ``1e-6``.
    acts : float
        Bracing: a candidate acts on a mode when the mode stretches it by
        ``e > acts * u_max``, ``u_max`` the mode's largest joint movement
        (modes are scaled so that it is 1).  Default ``0.01``.
    clear_space : float
        Bracing, the rule against rakers: a point of a candidate at ``(s, z)``
        in a frame's plane is inside its clear space when
        ``s_min + m < s < s_max - m`` (between its outer joints),
        ``z_0 + m < z`` (above its lowest support) and ``z < z_low(s) - m``
        (below its lowest member there), ``m = clear_space * size``; so a brace
        along a wall line, on the ground or in the plane of a chord is not
        inside.  Default ``1e-6``.
    hint_stretch : float
        Bracing, for a mode no candidate acts on: a member from its most
        moving joint ``j`` to a nearby joint ``q`` would act on it when
        ``|w . (u_q - u_j)| > hint_stretch``, ``w`` the unit vector from ``j``
        to ``q`` (the mode's largest movement 1).  Default ``0.1``.
    held_stiffness : float
        An IFC boundary condition that gives a translational spring instead of
        a fixed translation holds that direction when its stiffness ``k``
        satisfies ``k >= held_stiffness``, in N/m (the file's number, SI units
        assumed).  Default ``1e10``: some 250 times the axial stiffness EA/L of
        a steel tube of 10 cm^2 and 5 m (4e7 N/m), so such a support moves far
        less than any member stretches; softer springs are left free (a
        pin-jointed audit has no springs).
    mechanism_load : float
        A load ``f`` (all joint forces of a case, one vector) acts on the
        mechanisms, and is not carried, when ``||P f|| > mechanism_load *
        ||f||``, ``P`` the orthogonal projection onto the mechanism space.
        Default ``1e-6``: the sparse engine's mechanism basis is accurate to
        about ``1e-8``, and a load with a millionth of itself on a mechanism
        is, for a designer, not carried.
    zero_force : float
        A member force ``N`` of a case counts as none (neither tension nor
        compression; written as 0) when ``|N| <= zero_force * max |N|`` over
        that case's members, and a reaction component likewise against the
        largest reaction component.  Default ``1e-9``: round-off of the
        solve is about ``1e-13`` of the largest force.
    forces_shift : float
        The stiffness solve of a frame that still has mechanisms factorises
        ``K + forces_shift * k * I`` (``k`` the median diagonal entry of
        ``K``), the mechanisms projected out: positive definite, and, as
        iterative refinement follows, without effect on the forces once
        ``||f - K u|| <= forces_refined * ||f||``.  Default ``1e-8``.
    forces_refined : float
        Iterative refinement of the forces solve stops once every case has
        ``||f - K u|| <= forces_refined * ||f||``, or once a step leaves a
        residual ``r_new > forces_stalled * r_old`` (round-off reached).
        Default ``1e-13``.
    forces_stalled : float
        See ``forces_refined``: a step whose residual has ``r_new >
        forces_stalled * r_old`` ends the refinement.
        Default ``0.25``.
    forces_fault : float
        A carried case whose forces leave ``||C.T t - f|| > forces_fault *
        ||f||`` is a fault of the solve (an internal error), not a verdict.
        Default ``1e-5``: ten times ``mechanism_load``, the most a carried
        load may have on the mechanisms.
    one_way : float
        A frame with one-way members (:mod:`spaceframe.analysis.oneway`) is
        held when its best proper state of self-stress, scaled so its largest
        force is 1, has ``min over one-way members of sigma_e s_e > one_way``
        (``sigma_e = +1`` tension-only, ``-1`` compression-only).  Default
        ``1e-5``: a hundred times the linear programmes' feasibility tolerance
        (``lp_feasibility``, ``1e-7`` absolute on forces of at most 1; tighter,
        its interior-point method stalls on frames of 20,000 members), while a
        rod force a hundred thousand times smaller than the largest force in
        the frame is no force to rely on (in a compact frame; a slender one is
        decided with the lower threshold of :meth:`one_way_threshold`).  A
        one-way member counts as going slack in the motion that proves a
        frame not held when it slackens by more than ``one_way`` of the most
        slackened one.
    one_way_floor : float
        The lowest threshold :meth:`one_way_threshold` goes to: a proper state
        with ``t* <= one_way_floor`` never holds the frame.  Default ``1e-6``:
        ten times ``lp_feasibility``, the programmes' own error on forces.
    lp_feasibility : float
        The primal and dual feasibility tolerance given to HiGHS for the two
        linear programmes of the one-way test: a point is feasible when every
        equation and bound holds to ``|violation| <= lp_feasibility``
        (absolute, on member forces of at most 1).  Default ``1e-7`` (HiGHS's
        own): tighter, its interior-point method stalls on frames of 20,000
        members.
    prestress_balance : float
        A prestress the model declares (``[prestress]``) must be a state of
        self-stress: at every joint, the force its members' prestress leaves
        in the directions no support holds must be
        ``<= prestress_balance * max |t|``, ``t`` the declared member forces.
        Default ``1e-3``: forces typed to four significant figures pass, a
        member left out of the list (a whole force unbalanced) does not.
    local_mechanism : float
        A direction ``d`` (unit vector in a joint's free coordinates) is a
        local mechanism of that joint when ``||C_j d|| <= local_mechanism``,
        ``C_j`` the rows of the joint's members in those coordinates (direction
        cosines, so the test is dimensionless): it is then taken out before the
        rank decision (:func:`spaceframe.analysis.nullspace.local_mechanisms`).
        Default ``1e-9``: exactly collinear or coplanar members give
        ``||C_j d||`` of about ``1e-16``, and a perturbation this small moves no
        singular value by more than ``sqrt(2) * 1e-9``, far below the rank
        threshold ``rank * s_max`` (``s_max >= 1`` for any frame with a member
        free at both ends), so the decision is the one the global engine makes.
    chord_straight : float
        Chords (:mod:`spaceframe.analysis.restraints`): two members meeting at
        a joint continue one straight line when their unit directions ``a``,
        ``b`` (each pointing away from the joint) have ``a . b <= -(1 -
        chord_straight)``.  Default ``1e-4``: within about 0.8 degrees of
        straight (``arccos(1 - 1e-4)``), so a chord drawn with rounded
        coordinates stays one line while a kink of a few degrees (a pitched
        top chord at its ridge) ends it.
    restraint_motion : float
        A joint is moved along a unit lateral direction ``e`` by mechanism
        ``i`` (scaled so its largest joint movement is 1) when ``|e . u_ij| >
        restraint_motion``; a joint no mechanism moves that way is a
        restraint point.  A mechanism lies in the lateral motions a
        continuous chord holds when, at every joint, what is left of ``u_ij``
        after its projection onto those directions has ``||r_ij|| <=
        restraint_motion``.  Default ``1e-6``: the canonical basis sets
        entries below ``echelon_zero`` to 0, the sparse engine's basis is
        accurate to about ``1e-8``.  A member with unit direction ``d`` at a
        joint reaches along ``e`` (it ties the joint that way) when ``|d . e| >
        restraint_motion``.
    limits : Limits
        The sizes that choose a method (each tested as ``size <= limit``).
    """

    rank: float = 1e-6
    rank_floor: float = 1e-7
    slender_margin: float = 100.0
    narrow_gap: float = 100.0
    near_threshold: float = 2.0
    coincident: float = 1e-9
    short_member: float = 1e-9
    restraint_dependence: float = 1e-9
    merge: float = 1e-6
    near_miss: float = 0.01
    select: float = 1e-6
    panel_plane: float = 1e-4
    s_max_estimate: float = 1e-2
    refine: float = 1e-10
    echelon_zero: float = 1e-12
    independent: float = 1e-8
    translation_rank: float = 1e-12
    principal_cosine: float = 1e-9
    in_span: float = 1e-9
    direction_rank: float = 1e-6
    pure_translation: float = 1e-6
    on_axis: float = 1e-6
    rigid_inside: float = 1e-6
    axis_restraint: float = 1e-15
    key: float = 1e-8
    stiffening: float = 1e-8
    sparse_drop: float = 1e-12
    soft: float = 1e-3
    soft_shift: float = 1e-10
    in_plane_direction: float = 1e-3
    crossing_margin: float = 1e-9
    parallel_lines: float = 1e-12
    parallel_diagonals: float = 1e-6
    acts: float = 0.01
    clear_space: float = 1e-6
    hint_stretch: float = 0.1
    held_stiffness: float = 1e10
    mechanism_load: float = 1e-6
    zero_force: float = 1e-9
    forces_shift: float = 1e-8
    forces_refined: float = 1e-13
    forces_stalled: float = 0.25
    forces_fault: float = 1e-5
    one_way: float = 1e-5
    one_way_floor: float = 1e-6
    lp_feasibility: float = 1e-7
    prestress_balance: float = 1e-3
    local_mechanism: float = 1e-9
    chord_straight: float = 1e-4
    restraint_motion: float = 1e-6
    limits: Limits = Limits()

    def rank_threshold(self, scale: float | None) -> float:
        """The relative rank threshold for a frame of bending scale ``scale``.

        ``min(rank, max(rank_floor, scale / slender_margin))``: singular
        values ``s <= threshold * s_max`` are judged zero.  A compact frame
        (``scale >= slender_margin * rank``, ``1e-4`` and above) keeps
        ``rank``; a slender or very large one, whose bending stiffness falls
        with the square of its length (a lone tower 1,000 times taller than
        wide has bending singular values near ``1e-6``), is judged with a
        threshold ``slender_margin`` below its scale, but never below
        ``rank_floor``.  ``scale`` None (unknown) gives ``rank``.

        Examples
        --------
        >>> t = Tolerances()
        >>> t.rank_threshold(0.05), t.rank_threshold(2e-5), t.rank_threshold(1e-9)
        (1e-06, 2e-07, 1e-07)
        """
        if scale is None or not scale > 0:
            return self.rank
        return min(self.rank, max(self.rank_floor, scale / self.slender_margin))

    def one_way_threshold(self, scale: float | None) -> float:
        """The one-way margin for a frame of bending scale ``scale``.

        ``min(one_way, max(one_way_floor, scale / slender_margin))``: the
        frame is held when its best proper state has ``t* >`` this.  In a
        slender frame the forces of a state of self-stress can differ as
        much as its stiffnesses do (a 400-storey tower's plan diagonals carry
        ``6e-6`` of its legs' force in the only state that tensions them), so
        the margin falls with the scale as the rank threshold does.

        Examples
        --------
        >>> t = Tolerances()
        >>> t.one_way_threshold(0.05), t.one_way_threshold(1.3e-5)
        (1e-05, 1e-06)
        """
        if scale is None or not scale > 0:
            return self.one_way
        return min(self.one_way, max(self.one_way_floor, scale / self.slender_margin))


DEFAULT = Tolerances()
DISPLAY = Display()
