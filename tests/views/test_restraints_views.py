"""The chords in the HTML report: the plain section, the viewer's data, escaping."""

from __future__ import annotations

import json
import re

import numpy as np

import spaceframe
from spaceframe import Frame
from spaceframe.analysis.restraints import restraints
from spaceframe.views.report import render_report

from common.roofs import roof


def _data(html: str) -> dict:
    return json.loads(re.search(r'id="spaceframe-data">(.*?)</script>', html, re.S).group(1))


def test_report_holds_the_chords_and_their_lengths_per_member():
    """Bottom ties at L2 only: out of plane the bottom chord runs 4000 mm from L0 to L2 and
    8000 mm from L2 to L6 (restraint points L0, L2, L6, derived as in the restraint tests), so
    its six members lie in lengths 4000, 4000, 8000, 8000, 8000, 8000."""
    frame = roof(["L2"])
    result = spaceframe.audit(frame)
    held = restraints(frame, chords="role=chord", audit=result)
    html = render_report(result, None, None, held)
    assert '<section id="restraints-section">' in html and 'id="chords"' in html
    doc = _data(html)["restraints"]
    assert doc["longest"] == 8000.0 and doc["units"] == "mm"
    bottom = next(c for c in doc["chords"] if c["span"].endswith("F1.L0-F1.L6"))
    assert bottom["segments"] == [4000.0, 4000.0, 8000.0, 8000.0, 8000.0, 8000.0]
    ids = [frame.joint_ids[j] for j in bottom["points"]]
    assert ids == ["F1.L0", "F1.L2", "F1.L6"]
    assert "8000" in html and "competent engineer" in html


def test_chord_ids_with_markup_are_escaped():
    f = Frame.from_arrays([[0, 0], [1, 0], [2, 0]], [[0, 1], [1, 2]],
                          joint_ids=["<b>", "M", "&x"], supports={0: "pin", 2: "pin"})
    result = spaceframe.audit(f)
    html = render_report(result, None, None, restraints(f, audit=result))
    section = re.search(r'<section id="restraints-section">.*?</section>', html, re.S).group(0)
    assert "<b>" not in section and "&lt;b&gt;-&amp;x" in section
    assert _data(html)["restraints"]["chords"][0]["span"] == "C1 <b>-&x"
    assert np.isclose(_data(html)["restraints"]["longest"], 2.0)


def test_ties_to_moving_joints_are_listed_in_natural_order():
    """The purlins that tie a top chord to joints that move are named P1.0, P1.1, P1.2, ...,
    not P1.0, P1.1, P1.10, ... (the joint lists' natural order, kept for member lists too)."""
    from spaceframe.families import plane_truss_roof
    from spaceframe.views.restraints_text import render_restraints
    text = render_restraints(restraints(plane_truss_roof(3, 12)))
    assert "are tied (P1.0, P1.1, P1.2, P1.3 and " in text
    assert "P1.10, P1.11" not in text
