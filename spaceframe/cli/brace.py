"""``spaceframe brace MODEL``: the fewest, shortest members and restraints that remove every
mechanism, proven by a re-audit of the braced frame."""

from __future__ import annotations

import csv
import io
import json
import sys

import click

from .common import (debug_option, force_option, json_option, model_argument, run_guarded,
                     supports_option)

__all__ = ["brace_command"]

EXIT_HELD = 0
EXIT_MECHANISM = 1


def _box(text: str, dimension: int):
    """``"x0,y0,z0,x1,y1,z1"`` (plane frame: four numbers) to low and high corners."""
    from ..errors import SpaceframeError

    try:
        v = [float(x) for x in text.replace(" ", ",").split(",") if x]
    except ValueError:
        v = []
    if len(v) != 2 * dimension:
        example = "0,0,0,6,25,3" if dimension == 3 else "0,0,6,3"
        raise SpaceframeError(f"--exclude-box takes {2 * dimension} numbers, the two opposite "
                              f"corners, e.g. {example!r}; not {text!r}")
    lo, hi = v[:dimension], v[dimension:]
    return [min(a, b) for a, b in zip(lo, hi)], [max(a, b) for a, b in zip(lo, hi)]


def _joint_indices(frame, ids, option: str):
    from ..errors import SpaceframeError
    from ..suggest import did_you_mean

    index = {j: i for i, j in enumerate(frame.joint_ids)}
    out = []
    for jid in ids:
        if jid not in index:
            raise SpaceframeError(f"{option}: joint {jid!r} is not in "
                                  f"{frame.source or 'the model'}"
                                  f"{did_you_mean(jid, frame.joint_ids)}; give joint ids of "
                                  f"the model")
        out.append(index[jid])
    return out


def _attach(frame, values):
    """``--attach`` values: ``J1,J2`` (every free axis), ``J:y`` or ``J:xz`` (those axes),
    ``J:0,1,0`` (a direction vector).  Returns joint indices and (joint, unit direction)
    pairs; a direction the joint's supports already hold matches nothing and is refused."""
    from ..analysis.bracing.candidates import free_directions
    from ..errors import SpaceframeError
    from ..supports import restraint_rows

    d = frame.dimension
    entries = []
    for token in (t.strip() for v in values for t in v.split(",") if t.strip()):
        last = entries[-1] if entries else None
        if (last is not None and last[1] is not None and last[1] and _number(last[1][-1])
                and len(last[1]) < d and _number(token)):
            last[1].append(token)
            continue
        jid, sep, direction = token.partition(":")
        entries.append((jid.strip(), [direction.strip()] if sep else None))
    joints, directions = [], []
    for jid, direction in entries:
        (j,) = _joint_indices(frame, [jid], "--attach")
        if direction is None:
            joints.append(j)
            continue
        text = direction[0] if len(direction) == 1 and not _number(direction[0]) else None
        try:
            spec = text if text is not None else [[float(x) for x in direction]]
            rows = restraint_rows(spec, d, joint=jid)
        except (ValueError, SpaceframeError) as exc:
            raise SpaceframeError(f"--attach {jid}:{','.join(direction)}: the direction is axis "
                                  f"letters (e.g. 'y') or {d} numbers (e.g. "
                                  f"{'0,1,0' if d == 3 else '0,1'}); {exc}") from None
        free = free_directions(frame, j, rows)
        if not any(free):
            raise SpaceframeError(f"--attach {jid}:{','.join(direction)}: joint {jid}'s supports "
                                  f"already hold that direction, so a tie there holds nothing "
                                  f"new; give a direction it leaves free")
        directions += [(j, tuple(e.tolist())) for e, ok in zip(rows, free) if ok]
    return joints, directions


def _number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


def _compare(result, frame, path):
    """The designer's scheme (a braced model, or a CSV list of members) beside the proposal."""
    from .. import load
    from ..analysis.bracing.compare import compare_schemes, scheme_from_list
    from ..io.candidates import read_candidate_list

    if str(path).lower().endswith(".csv"):
        scheme = scheme_from_list(frame, read_candidate_list(path, frame)[0])
    else:
        scheme = load(path)
    return compare_schemes(result, scheme, source=str(path))


def _csv_text(doc: dict) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    units = (doc["forces"] or {}).get("force_units", "force")
    w.writerow(["item", "id", "start", "end", "joint", "direction",
                f"length_{doc['units']}", "location", "modes", "carries", "key",
                f"tension_max_{units}", "tension_case", f"compression_max_{units}",
                "compression_case", "slack_in"])

    def forces(x):
        f = x.get("forces")
        if f is None:
            return ["", "", "", "", ""]
        t, c = f["tension"] or ["", ""], f["compression"] or ["", ""]
        num = lambda v: f"{v:.6g}" if v != "" else ""  # noqa: E731
        return [num(t[0]), t[1], num(c[0]), c[1], "; ".join(f.get("slack", []))]

    for a in doc["added"]:
        w.writerow(["member", a["id"], a["ends"][0], a["ends"][1], "", "",
                    f"{a['length']:.6g}", a["location"], " ".join(map(str, a["modes"])),
                    a["carries"], "key" if a["key"] else "", *forces(a)])
    for x in doc["restraints_added"]:
        w.writerow(["restraint", "", "", "", x["joint"],
                    x["axis"] or " ".join(f"{v:.6g}" for v in x["direction"]), "", "",
                    " ".join(map(str, x["modes"])), "both", "key" if x["key"] else "",
                    *forces(x)])
    return buf.getvalue()


@click.command("brace")
@model_argument
@json_option
@click.option("--csv", "csv_path", type=click.Path(path_type=str), metavar="FILE",
              help="Write the members and restraints to add as CSV.")
@click.option("--write", "write_path", type=click.Path(path_type=str), metavar="OUT.toml",
              help="Write the braced model (.toml or .json); new members tagged role = brace.")
@click.option("--no-panels", is_flag=True,
              help="Do not take panel diagonals as candidates (use --within or --candidates).")
@click.option("--no-ties", is_flag=True,
              help="In a frame of frames, do not take ties between corresponding joints of "
                   "adjacent frames, or the diagonals of the panels they close, as candidates.")
@click.option("--within", type=float, metavar="LENGTH",
              help="Also every pair of joints at most LENGTH apart that no member joins.")
@click.option("--candidates", "candidates_path", type=click.Path(path_type=str), metavar="FILE",
              help="A CSV list of candidate members: start,end[,weight] (weight, or a column "
                   "cost, replaces the length as cost).")
@click.option("--exclude-box", multiple=True, metavar="X0,Y0,Z0,X1,Y1,Z1",
              help="No brace may pass through this box (repeatable).")
@click.option("--exclude-bay", multiple=True, metavar="BAY",
              help="No brace in panels of this bay, as printed (B3) or as its label (3); "
                   "repeatable.")
@click.option("--exclude-panel", multiple=True, metavar="J1,J2,J3,J4",
              help="No brace in the panel with these corner joints (repeatable).")
@click.option("--restraints", type=click.Choice(["auto", "always", "never"]), default="auto",
              show_default=True,
              help="Restraint candidates (axis directions at supported or attachable joints): "
                   "auto = only when the frame has rigid-body modes or --attach is given, and "
                   "only for what no member removes; always = always, competing on cost.")
@click.option("--attach", multiple=True, metavar="JOINT[:DIRECTION][,...]",
              help="Joints that may be tied to the ground or a braced structure, such as a "
                   "deck or a facade (comma-separated; repeatable); ':y' or ':0,1,0' limits a "
                   "tie point to the directions it can hold.")
@click.option("--ties-first", is_flag=True,
              help="Restraints at the --attach joints come before every member.")
@click.option("--cost", "costs", metavar="KIND=FACTOR[,...]",
              help="Cost factor per kind: tie, brace (times the length), restraint (times the "
                   "median member length); e.g. 'tie=1,brace=1.5,restraint=0.5'.")
@click.option("--braced-bays", metavar="ends|every:N|LIST",
              help="Braces only in these bays and at least one in each: 'ends' (both end "
                   "bays), 'every:N' (one in every N consecutive bays) or bays 'B1,B5'.")
@click.option("--symmetric", is_flag=True,
              help="Mirror-image braces about the building's centre lines are chosen together.")
@click.option("--planes", metavar="roof,walls,plan",
              help="The planes that may hold braces (ties and restraints are not braces).")
@click.option("--allow-rakers", is_flag=True,
              help="Let members pass through the clear space of the frames at floor level.")
@click.option("--compare", "compare_path", type=click.Path(path_type=str), metavar="SCHEME",
              help="Audit the designer's scheme (a braced model, or a CSV of members "
                   "start,end) beside the proposal.")
@click.option("--tension-only", is_flag=True,
              help="The braces are rods that carry tension only (tagged carries = tension): "
                   "a chosen panel gets both diagonals, and the proposal is re-audited with "
                   "the rods acting one way.")
@click.option("--robust", is_flag=True,
              help="Propose a set that stays held after the loss of any one added member "
                   "(exact search on small candidate sets, greedy augmentation above).")
@click.option("--no-forces", is_flag=True,
              help="Leave out the forces in the added members under the load cases.")
@click.option("--alternatives", default=3, show_default=True, type=click.IntRange(0, 50),
              help="Alternative sets of the same size to look for.")
@supports_option
@force_option
@debug_option
def brace_command(model, as_json, csv_path, write_path, no_panels, no_ties, within,
                  candidates_path,
                  exclude_box, exclude_bay, exclude_panel, restraints, attach, ties_first,
                  costs, braced_bays, symmetric, planes, allow_rakers, compare_path,
                  tension_only, robust, no_forces, alternatives, supports, force, debug):
    """Recommend the fewest, then shortest, bracing members (and restraints) that remove
    every mechanism of the frame in MODEL, and re-audit the braced frame.

    Candidates: both diagonals of every planar four-sided panel bounded by members, and
    of every wall panel closed by the ground; in a frame of frames (extruded), ties
    between corresponding joints of adjacent frames and the diagonals of the panels they
    close; more with --within and --candidates.
    The selection is exact (greedy over a linear matroid).  With one-way members
    (--tension-only, or members tagged carries in the model) it is greedy + repair under
    Roth & Whiteley's test; --robust says whether its search was exact or greedy.
    The forces in what is added are given under the model's load cases (and notional
    horizontal loads).
    Layout rules (--braced-bays, --symmetric, --planes, the clear space at
    floor level, --ties-first, --cost) keep the choice within what they allow,
    and the output says how each filter matched and whether the choice under
    them is exact.

    Caution: an idealised pin-jointed model; the bracing scheme is to be
    checked by a competent engineer under the local codes.

    Exit status: 0 when the braced frame is held, 1 when mechanisms remain, 2 for bad
    input or usage.
    """
    def job():
        from .. import load
        from ..analysis.bracing import recommend_bracing
        from ..io import WRITERS, save
        from ..io.candidates import read_candidate_list
        from ..io.output import check_output, write_text
        from ..selection import supports_for
        from ..views.bracing_document import bracing_document
        from ..views.bracing_text import render_bracing

        from ..analysis.bracing.layout import LayoutRules, parse_costs

        frame = supports_for(load(model), model, supports)
        inputs = tuple(p for p in (model, candidates_path, compare_path) if p)
        for path, suffixes in ((csv_path, None), (write_path, WRITERS)):
            if path:
                check_output(path, inputs=inputs, overwrite=force, suffixes=suffixes)
        listed = read_candidate_list(candidates_path, frame)[:2] if candidates_path else None
        boxes = [_box(b, frame.dimension) for b in exclude_box]
        panels = [set(_joint_indices(frame, [j.strip() for j in p.split(",") if j.strip()],
                                     "--exclude-panel")) for p in exclude_panel]
        attach_joints, attach_dirs = _attach(frame, attach)
        if ties_first and not (attach_joints or attach_dirs):
            from ..errors import SpaceframeError
            raise SpaceframeError("--ties-first puts restraints at the --attach joints first; "
                                  "give the tie points with --attach JOINT[:DIRECTION]")
        if restraints == "never" and (attach_joints or attach_dirs):
            from ..errors import SpaceframeError
            raise SpaceframeError("--attach gives tie points, which are restraints, and "
                                  "--restraints never leaves every restraint out; drop one")
        rules = LayoutRules(braced_bays=braced_bays, symmetric=symmetric,
                            planes=tuple(planes.split(",")) if planes is not None else None,
                            allow_rakers=allow_rakers, ties_first=ties_first,
                            costs=parse_costs(costs))
        result = recommend_bracing(
            frame, panels=not no_panels, ties=not no_ties, within=within, listed=listed,
            restraints=restraints, attachable=attach_joints, attach_directions=attach_dirs,
            exclude_boxes=boxes, exclude_bays=exclude_bay, exclude_panels=panels,
            tension_only=tension_only, robust=robust, forces=not no_forces,
            alternatives=alternatives, layout=rules)
        if write_path:
            save(result.braced, write_path, overwrite=force, inputs=inputs)
        comparison = _compare(result, frame, compare_path) if compare_path else None
        doc = bracing_document(result) if (csv_path or as_json) else None
        if doc is not None and comparison is not None:
            from ..views.bracing_document import compare_document
            doc["compare"] = compare_document(comparison)
        if csv_path:
            write_text(csv_path, _csv_text(doc), overwrite=force)
        if as_json:
            click.echo(json.dumps(doc, indent=1, allow_nan=False))
        else:
            click.echo(render_bracing(result), nl=False)
            if comparison is not None:
                from ..views.bracing_text import render_comparison
                click.echo("\n" + render_comparison(comparison), nl=False)
            for path, what in ((write_path, "braced model"), (csv_path, "list")):
                if path:
                    click.echo(f"wrote {path} ({what})", err=True)
        return result

    result = run_guarded(job, debug=debug)
    sys.exit(EXIT_HELD if result.after.stable else EXIT_MECHANISM)
