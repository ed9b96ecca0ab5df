"""Bracing recommendations: the fewest, shortest members and restraints that remove every mechanism.

The package has one module per step:

- :mod:`.candidates`: what could be added.  One generator function per
  origin of candidates (planar panels, wall panels on the ground, ties
  between frames, tie panels, a user's list, pairs within a distance,
  restraint directions), registered in :data:`GENERATORS`; the candidates
  are records (:class:`MemberCandidate`, :class:`RestraintCandidate`) and,
  gathered, the columns of a :class:`CandidateSet`.
- :mod:`.selection`: the exact choice.  Each candidate's reach onto an
  orthonormal basis of the mechanisms, one greedy pass of the linear matroid
  in order of cost (Rado 1957; Edmonds 1971), the re-audit of the braced
  frame; :func:`recommend_bracing` runs it all.
- :mod:`.result`: :class:`BracingResult` and :func:`braced_frame` (the frame
  with the chosen members and restraints, through :mod:`spaceframe.edit`).
- :mod:`.rules`: the member rules on the greedy choice: the ties a diagonal
  needs, rods that act one way (greedy + repair under Roth & Whiteley's
  test), key items, single losses.
- :mod:`.robust`: a proposal that stays held after the loss of any one
  added item (exact search, or greedy augmentation of the least-cost basis).
- :mod:`.forces`: the forces in what is added, under the model's cases and
  notional horizontal loads.
- :mod:`.frames`: the frames of a frame of frames, planar ids and bays.
- :mod:`.layout`: layout rules (planes, braced bays, mirror-image groups, the
  clear space at floor level, per-kind costs, ties to a building first) and
  the search under those that are no matroid constraint.
- :mod:`.compare`: the designer's scheme audited beside the proposal.

The analysis returns data (origins, joint indices, bay labels, remedies);
the words (``"bottom-chord tie at L2, bay 3"``, hints, notes) and the JSON
document are made in :mod:`spaceframe.views.bracing_document`.
"""

from .candidates import (GENERATORS, ORIGINS, CandidateOptions, CandidateSet, MemberCandidate,
                         RestraintCandidate, Search, find_candidates, panel_diagonals,
                         tie_candidates)
from .compare import Comparison, compare_schemes
from .forces import ProposalForces, proposal_forces
from .layout import LayoutChoice, LayoutRules
from .result import (ACTS, BRACING_CAUTION, BracingResult, LateralRestraint, MemberRules, Remedy,
                     RobustInfo, braced_frame)
from .robust import RobustChoice, robust_elements
from .rules import coloops, hold_one_way, hold_single_losses, key_items, with_needed_ties
from .selection import (PER_MODE, expand_elements, greedy_basis, lateral_restraint,
                        matroid_elements, planar_plane, reach_rows, recommend_bracing, remedies)

__all__ = ["recommend_bracing", "find_candidates", "panel_diagonals", "tie_candidates",
           "planar_plane", "reach_rows", "greedy_basis", "matroid_elements", "expand_elements",
           "remedies", "lateral_restraint", "braced_frame", "BracingResult", "Remedy",
           "LateralRestraint", "CandidateSet", "CandidateOptions", "MemberCandidate",
           "RestraintCandidate", "Search", "GENERATORS", "ORIGINS", "ACTS", "PER_MODE",
           "BRACING_CAUTION", "MemberRules", "RobustInfo", "ProposalForces", "proposal_forces",
           "RobustChoice", "robust_elements", "coloops", "hold_one_way", "hold_single_losses",
           "key_items", "with_needed_ties", "LayoutRules", "LayoutChoice", "compare_schemes",
           "Comparison"]
