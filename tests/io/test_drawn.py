"""Drawings as drafters draw them: units, one-line chords with T-junctions, layers.

The DXF files are written with ezdxf, a DXF library independent of the
reader (which goes through trimesh).  The reference truss is built here from
its panel points; the counts come from the counting rule and numpy's rank of
a compatibility matrix built from scratch (tests/common/matrices.py).
"""

from __future__ import annotations

import json

import numpy as np
import pytest
from click.testing import CliRunner

import spaceframe
from spaceframe import ModelError, SpaceframeWarning
from spaceframe.cli import main
from spaceframe.io.drawing import INSUNITS
from spaceframe.selection import apply_rules

from common.matrices import dense_compatibility

ezdxf = pytest.importorskip("ezdxf")
pytest.importorskip("trimesh")

SPAN, HEIGHT, PANELS = 12000.0, 2000.0, 6       # mm: a 12 m Pratt truss, 2 m deep


def pratt_members():
    """The truss as built: joints L0..L6 (bottom), U0..U6 (top), members between them."""
    x = np.linspace(0, SPAN, PANELS + 1)
    coords = np.array([[v, 0.0] for v in x] + [[v, HEIGHT] for v in x])
    L, U = list(range(PANELS + 1)), list(range(PANELS + 1, 2 * PANELS + 2))
    ends = [(L[i], L[i + 1]) for i in range(PANELS)] + [(U[i], U[i + 1]) for i in range(PANELS)]
    ends += [(L[i], U[i]) for i in range(PANELS + 1)]
    ends += [(U[i], L[i + 1]) if i < PANELS // 2 else (L[i], U[i + 1]) for i in range(PANELS)]
    return coords, ends


def write_truss(path, *, web_layer="TRUSS", short=0.0, cross=False, insunits=4):
    """The truss as a drafter draws it: each chord one line, webs meeting it part-way."""
    doc = ezdxf.new()
    doc.header["$INSUNITS"] = insunits
    msp = doc.modelspace()
    chord = {"layer": "TRUSS"}
    msp.add_line((0, 0), (SPAN, 0), dxfattribs=chord)
    msp.add_line((0, HEIGHT), (SPAN, HEIGHT), dxfattribs=chord)
    x = np.linspace(0, SPAN, PANELS + 1)
    for i, v in enumerate(x):                      # end posts and verticals
        layer = "TRUSS" if i in (0, PANELS) else web_layer
        msp.add_line((v, 0), (v, HEIGHT - (short if i == 2 else 0.0)),
                     dxfattribs={"layer": layer})
    for i in range(PANELS):                         # diagonals, down towards mid-span
        a, b = ((x[i], HEIGHT), (x[i + 1], 0)) if i < PANELS // 2 else \
            ((x[i], 0), (x[i + 1], HEIGHT))
        msp.add_line(a, b, dxfattribs={"layer": web_layer})
    if cross:                                       # a second diagonal crossing the first
        msp.add_line((x[0], 0), (x[1], HEIGHT), dxfattribs={"layer": "TRUSS"})
    doc.saveas(path)
    return path


def edge_set(coords, ends):
    key = [tuple(np.round(c, 6)) for c in coords]
    return {frozenset((key[a], key[b])) for a, b in ends}


def test_truss_in_mm_with_one_line_chords_is_the_truss_as_drawn(tmp_path):
    path = write_truss(tmp_path / "pratt.dxf")
    with pytest.warns(SpaceframeWarning, match=r"2 line\(s\) split.*into 12 members"):
        frame = spaceframe.load(path)
    coords, ends = pratt_members()
    assert frame.units == "mm" and frame.dimension == 2
    assert (frame.n_joints, frame.n_members) == (14, 25)
    assert edge_set(frame.coords, frame.ends.tolist()) == edge_set(coords, ends)
    # lengths in mm: the longest member is a diagonal of a 2000 x 2000 mm panel
    assert np.isclose(frame.lengths().max(), np.hypot(2000.0, 2000.0))
    held = apply_rules(frame, ["pin at nearest 0 0", "y at nearest 12000 0"])
    r = spaceframe.audit(held)
    # common practice: a simple truss of triangles on a pin and a roller is statically
    # determinate, m + r = 2j (25 + 3 = 28) with no mechanism and no redundancy
    assert held.n_members + held.n_restraints == 2 * held.n_joints
    assert (r.mechanisms, r.self_stress_states) == (0, 0)
    # numpy's rank of the compatibility matrix built from scratch agrees: full column rank
    C = dense_compatibility(coords, ends, held=[(0, 0), (0, 1), (PANELS, 1)])
    assert np.linalg.matrix_rank(C) == C.shape[1] == len(ends)


def test_units_reach_text_json_and_the_converted_file(tmp_path):
    path = write_truss(tmp_path / "pratt.dxf")
    rules = ["--supports", "pin at nearest 0 0", "--supports", "y at nearest 12000 0"]
    text = CliRunner().invoke(main, ["audit", str(path), *rules])
    assert text.exit_code == 0 and "lengths in mm" in text.stdout
    doc = json.loads(CliRunner().invoke(main, ["audit", str(path), "--json", *rules]).stdout)
    assert doc["units"] == "mm"
    out = tmp_path / "pratt.toml"
    res = CliRunner().invoke(main, ["convert", str(path), "-o", str(out), *rules])
    assert res.exit_code == 0 and "lengths in mm" in res.stdout
    native = spaceframe.load(out)
    assert native.units == "mm" and np.isclose(native.coords[:, 0].max(), SPAN)
    # a DXF that says mm cannot be read as metres by mistake
    bad = CliRunner().invoke(main, ["audit", str(path), "--units", "m"])
    assert bad.exit_code == 2 and "$INSUNITS = 4" in bad.stderr


@pytest.mark.filterwarnings("ignore:.*T-junctions")
def test_insunits_table_agrees_with_ezdxf(tmp_path):
    # reference library: ezdxf.units.conversion_factor(code, metres)
    metres = {"m": 1.0, "cm": 0.01, "mm": 0.001, "ft": 0.3048, "in": 0.0254}
    for code, (unit, factor) in INSUNITS.items():
        if code in (8, 9):      # microinches and mils, which ezdxf does not convert:
            # 1 mil = 1e-3 in, 1 microinch = 1e-6 in (from memory)
            assert (unit, factor) == ("in", {8: 1e-6, 9: 1e-3}[code])
            continue
        assert np.isclose(factor * metres[unit], ezdxf.units.conversion_factor(code, 6),
                          rtol=1e-6), code
    inches = spaceframe.load(write_truss(tmp_path / "in.dxf", insunits=1))
    assert inches.units == "in"
    unitless = write_truss(tmp_path / "none.dxf", insunits=0)
    assert spaceframe.load(unitless).units == "m"
    assert spaceframe.load(unitless, units="mm").units == "mm"


def test_webs_on_another_layer_give_the_layer_advice(tmp_path):
    path = write_truss(tmp_path / "layers.dxf", web_layer="WEBS")
    res = CliRunner().invoke(main, ["audit", str(path), "--layers", "WEBS"])
    assert res.exit_code == 2 and "Traceback" not in res.output
    assert "different layers" in res.stderr and "TRUSS" in res.stderr
    assert "--layers" in res.stderr and "merge distance" not in res.stderr
    # both layers named: the truss as drawn
    both = CliRunner().invoke(main, ["audit", str(path), "--layers", "TRUSS,WEBS"])
    assert both.exit_code == 1 and "25 members" in both.stdout


def test_no_split_and_short_web_give_their_own_advice(tmp_path):
    path = write_truss(tmp_path / "pratt.dxf")
    res = CliRunner().invoke(main, ["audit", str(path), "--no-split"])
    assert res.exit_code == 2 and "T-junction" in res.stderr and "--no-split" in res.stderr
    short = write_truss(tmp_path / "short.dxf", short=5.0)     # a vertical 5 mm short of the chord
    res = CliRunner().invoke(main, ["audit", str(short)])
    assert res.exit_code == 2 and "nearly but do not meet" in res.stderr
    assert "(4000, 1995)" in res.stderr and "at least 5" in res.stderr
    ok = CliRunner().invoke(main, ["audit", str(short), "--merge", "6"])
    assert ok.exit_code == 1 and "25 members" in ok.stdout


@pytest.mark.filterwarnings("ignore:.*T-junctions")
def test_crossing_with_no_end_stays_unjoined(tmp_path):
    path = write_truss(tmp_path / "x.dxf", cross=True)
    with pytest.warns(SpaceframeWarning, match=r"cross without a joint.*\(1000, 1000\)"):
        frame = spaceframe.load(path)
    assert (frame.n_joints, frame.n_members) == (14, 26)


def test_layers_on_convert_and_extrude(tmp_path):
    path = write_truss(tmp_path / "layers.dxf", web_layer="WEBS")
    with open(tmp_path / "grid.txt", "w"):
        pass
    out = tmp_path / "chords.toml"
    res = CliRunner().invoke(main, ["convert", str(path), "-o", str(out), "--layers", "TRUSS"])
    assert res.exit_code == 0, res.output
    # chords and end posts only: the rectangle's four sides, the chords split at nothing
    assert spaceframe.load(out).n_members == 4
    spec = tmp_path / "roof.spec.toml"
    spec.write_text('frames = 2\nspacing = 5000.0\n[drawing]\nlayers = ["NONE"]\n'
                    '[[support]]\nat = "nearest 0 0"\nplane = "pin"\n')
    roof = tmp_path / "roof.toml"
    res = CliRunner().invoke(main, ["extrude", str(path), str(spec), "-o", str(roof),
                                    "--layers", "TRUSS,WEBS"])
    assert res.exit_code == 0, res.output
    built = spaceframe.load(roof)
    assert built.units == "mm" and built.n_joints == 2 * 14


def test_joint_ids_in_the_text_come_with_coordinates_and_layer(tmp_path):
    path = write_truss(tmp_path / "pratt.dxf")
    res = CliRunner().invoke(main, ["audit", str(path), "--supports", "pin at nearest 0 0"])
    assert res.exit_code == 1
    assert "J1 (0, 0; layer TRUSS)" in res.stdout


def test_svg_view_box_and_width_give_the_units(tmp_path):
    # 1 user unit = 600 mm / 60 = 10 mm; y turned up
    svg = tmp_path / "t.svg"
    svg.write_text('<svg xmlns="http://www.w3.org/2000/svg" width="600mm" height="200mm" '
                   'viewBox="0 0 60 20"><line x1="0" y1="20" x2="60" y2="20" stroke="black"/>'
                   '<line x1="0" y1="20" x2="30" y2="0" stroke="black"/>'
                   '<line x1="30" y1="0" x2="60" y2="20" stroke="black"/>'
                   '<line x1="30" y1="0" x2="30" y2="20" stroke="black"/></svg>')
    with pytest.warns(SpaceframeWarning, match="1 line"):
        frame = spaceframe.load(svg)
    assert frame.units == "mm" and (frame.n_joints, frame.n_members) == (4, 5)
    assert np.isclose(np.ptp(frame.coords[:, 0]), 600.0) and np.isclose(
        np.ptp(frame.coords[:, 1]), 200.0)
    with pytest.raises(ModelError, match="--units says m"):
        spaceframe.load(svg, units="m")


def test_bracing_csv_names_the_unit_of_its_lengths(tmp_path):
    # the truss with one diagonal left out: a panel that racks, braced by its other diagonal
    path = write_truss(tmp_path / "pratt.dxf")
    with pytest.warns(SpaceframeWarning, match="T-junctions"):
        frame = spaceframe.load(path)
    diagonal = int(np.flatnonzero(np.isclose(frame.lengths(), np.hypot(2000.0, 2000.0)))[0])
    native = tmp_path / "pratt.toml"
    from spaceframe.edit import remove_members
    from spaceframe.io import save
    save(remove_members(frame, [diagonal]), native)
    out = tmp_path / "braces.csv"
    res = CliRunner().invoke(main, ["brace", str(native), "--supports", "pin at nearest 0 0",
                                    "--supports", "y at nearest 12000 0", "--csv", str(out)])
    assert res.exit_code == 0, res.output
    header, first = out.read_text().splitlines()[:2]
    assert "length_mm" in header.split(",")
    # the brace is the panel's other diagonal: 2828.427 mm long
    assert np.isclose(float(first.split(",")[header.split(",").index("length_mm")]),
                      np.hypot(2000.0, 2000.0), rtol=1e-5)
