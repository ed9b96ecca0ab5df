"""The HTML report in a real headless Chromium: no errors, no network, a live 3D view.

The browser is Debian's ``chromium`` driven through Playwright's Python
package (never a browser that Playwright downloads).  Without a browser the
tests skip, except in CI (``CI`` set), where they must run.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import numpy as np
import pytest

import spaceframe
from spaceframe import Frame
from spaceframe.views.report import render_report

MODELS = Path(__file__).resolve().parents[2] / "models"
ARTIFACTS = Path(__file__).resolve().parents[1] / "artifacts"
CHROMIUM = "/usr/bin/chromium"
ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]


def _why_no_browser() -> str | None:
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        return "the playwright package is not installed (pip install '.[test]')"
    if not (os.path.exists(CHROMIUM) or shutil.which("chromium")):
        return f"no Chromium at {CHROMIUM} (apt-get install chromium)"
    return None


@pytest.fixture(scope="module")
def browser():
    why = _why_no_browser()
    if why:
        if os.environ.get("CI"):
            pytest.fail(f"CI must run the browser tests: {why}")
        pytest.skip(why)
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM if os.path.exists(CHROMIUM)
                              else shutil.which("chromium"), args=ARGS)
        yield b
        b.close()


def _open(browser, html: str, tmp_path, name="report.html"):
    """Load ``html`` from a file; return the page, its console errors and every request."""
    path = tmp_path / name
    path.write_text(html, encoding="utf-8")
    page = browser.new_page(viewport={"width": 1300, "height": 1000})
    errors, requests = [], []
    page.on("console", lambda m: errors.append(m.text) if m.type == "error" else None)
    page.on("pageerror", lambda e: errors.append(str(e)))
    page.on("request", lambda r: requests.append(r.url))
    page.goto(path.as_uri())
    page.wait_for_load_state("load")
    return page, errors, requests, path


def _canvas(page) -> np.ndarray:
    """The canvas pixels as an ``(h, w, c)`` array (the canvas's own PNG, decoded)."""
    import base64
    import io

    from PIL import Image

    url = page.evaluate("() => document.getElementById('view').toDataURL('image/png')")
    png = base64.b64decode(url.split(",", 1)[1])
    return np.asarray(Image.open(io.BytesIO(png)).convert("RGB"))


def _colours_after(page, act, rgb, *, within: int) -> bool:
    """After ``act()`` the canvas has changed and more than 30 of its pixels lie within
    ``within`` of the colour ``rgb``."""
    before = _canvas(page)
    act()
    page.wait_for_timeout(150)
    after = _canvas(page)
    near = np.abs(after.astype(int) - np.array(rgb)).max(axis=2) < within
    return bool(near.sum() > 30 and np.abs(after.astype(int) - before.astype(int)).sum() > 0)


def test_report_opens_clean_draws_and_animates(browser, tmp_path):
    result = spaceframe.audit(spaceframe.load(MODELS / "canopy_sway.toml"))
    page, errors, requests, path = _open(browser, render_report(result), tmp_path)
    try:
        assert requests == [path.as_uri()]
        assert page.title().startswith("spaceframe report: Footpath canopy")
        assert "MECHANISM" in page.inner_text("#verdict")
        assert "competent engineer" in page.inner_text("#cautions")
        assert page.locator("#mechanisms tbody tr").count() == result.mechanisms
        assert page.locator("#states tbody tr").count() == result.self_stress_forces.shape[0]
        still = _canvas(page)
        assert (still[:, :, :3] < 200).any(axis=2).mean() > 0.01, "the canvas is blank"
        page.click("#mode-list button >> nth=0")
        page.wait_for_timeout(250)
        a = _canvas(page)
        page.wait_for_timeout(400)
        b = _canvas(page)
        assert np.abs(a.astype(int) - b.astype(int)).sum() > 0, "the chosen mode does not move"
        assert page.get_attribute("#mode-list button >> nth=0", "aria-pressed") == "true"
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "report_canopy_sway.png"), full_page=False)
        assert errors == []
    finally:
        page.close()


def test_pick_names_a_joint_and_views_turn(browser, tmp_path):
    result = spaceframe.audit(spaceframe.load(MODELS / "plant_platform.toml"))
    page, errors, _, _ = _open(browser, render_report(result), tmp_path)
    try:
        x, y = page.evaluate("() => spaceframeViewer.screenOf('T1_1')")
        page.mouse.click(x, y)
        assert "T1_1" in page.inner_text("#picked")
        before = _canvas(page)
        box = page.locator("#view").bounding_box()
        cx, cy = box["x"] + 200, box["y"] + 200
        page.mouse.move(cx, cy)
        page.mouse.down()
        page.mouse.move(cx + 120, cy + 30, steps=5)
        page.mouse.up()
        assert np.abs(_canvas(page).astype(int) - before.astype(int)).sum() > 0, "orbit did nothing"
        page.mouse.move(box["x"] + 400, box["y"] + 260)
        turned = _canvas(page)
        page.mouse.wheel(0, -400)
        assert np.abs(_canvas(page).astype(int) - turned.astype(int)).sum() > 0, "zoom did nothing"
        page.click("#state-list button >> nth=0")
        assert "tension" in page.inner_text("#legend")
        assert errors == []
    finally:
        page.close()


def test_ids_that_look_like_markup_stay_text(browser, tmp_path):
    evil = "</script><img src=x onerror=alert(1)>"
    frame = Frame.from_arrays([[0, 0, 0], [4, 0, 0], [2, 0, 3]], [[0, 1], [1, 2], [2, 0]],
                              joint_ids=["A", evil, "C&amp;"], member_ids=["AB", "BC", "CA"],
                              supports={0: "pin", 1: "yz"}, name="<b>Bold</b> & co")
    html = render_report(spaceframe.audit(frame))
    assert "</script><img" not in html
    page, errors, requests, path = _open(browser, html, tmp_path)
    try:
        assert requests == [path.as_uri()]
        assert page.inner_text("#title") == "<b>Bold</b> & co"
        assert page.locator("img").count() == 0
        x, y = page.evaluate("(id) => spaceframeViewer.screenOf(id)", evil)
        page.mouse.click(x, y)
        assert evil in page.inner_text("#picked")
        assert errors == []
    finally:
        page.close()


def test_bracing_toggle_draws_the_braces_and_gives_the_audit_after(browser, tmp_path):
    """The canopy with its proposal (from `spaceframe brace`'s engine): the toggle adds the
    brace to the drawing and shows the braced frame's audit, which the core engine found
    held; the bracing table lists the member."""
    from spaceframe.analysis.bracing import recommend_bracing

    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    result = spaceframe.audit(frame)
    proposal = recommend_bracing(frame)
    assert proposal.after.stable
    page, errors, requests, path = _open(browser, render_report(result, proposal), tmp_path)
    try:
        assert requests == [path.as_uri()]
        assert page.locator("#bracing tbody tr").count() == len(proposal.members_added)
        assert not page.is_visible("#bracing-after")
        plain = _canvas(page)
        page.click("#bracing-toggle")
        braced = _canvas(page)
        # the brace is drawn in its own orange: pixels of that colour appear
        orange = np.all(np.abs(braced.astype(int) - [0xE6, 0x9F, 0x00]) < 24, axis=2)
        was = np.all(np.abs(plain.astype(int) - [0xE6, 0x9F, 0x00]) < 24, axis=2)
        assert orange.sum() > was.sum() + 20, "the toggle drew no brace"
        assert page.is_visible("#bracing-after")
        assert "0 mechanisms" in page.inner_text("#bracing-after")
        assert "HELD" in page.inner_text("#bracing-after")
        assert "proposed bracing" in page.inner_text("#legend")
        page.click("#bracing-toggle")
        assert not page.is_visible("#bracing-after")
        ARTIFACTS.mkdir(exist_ok=True)
        page.click("#bracing-toggle")
        page.screenshot(path=str(ARTIFACTS / "report_canopy_bracing.png"), full_page=False)
        assert errors == []
    finally:
        page.close()


def test_bracing_switch_between_least_cost_and_robust(browser, tmp_path):
    """Both proposals of the canopy are plain tables; the script's switch shows one at a
    time and draws that one: the robust proposal (two braces, each able to stand in for the
    other) draws more orange than the least-cost one (one brace, which is key)."""
    from spaceframe.analysis.bracing import recommend_bracing

    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    result = spaceframe.audit(frame)
    least = recommend_bracing(frame)
    robust = recommend_bracing(frame, robust=True)
    assert len(robust.members_added) == 2 and len(least.members_added) == 1
    page, errors, requests, path = _open(
        browser, render_report(result, least, robust=robust), tmp_path)
    try:
        assert page.is_visible("#bracing-switch")
        assert page.is_visible("#bracing") and not page.is_visible("#bracing-robust")
        assert page.locator("#bracing-robust tbody tr").count() == 2
        assert "key" in page.inner_text("#bracing tbody")
        page.click("#bracing-toggle")
        orange = lambda img: np.all(np.abs(img.astype(int) - [0xE6, 0x9F, 0x00]) < 24,  # noqa
                                    axis=2).sum()
        one = orange(_canvas(page))
        assert page.evaluate("window.spaceframeViewer.bracingShownCount()") == 1
        page.click("#bracing-switch button[data-proposal=robust]")
        assert page.is_visible("#bracing-robust") and not page.is_visible("#bracing")
        assert page.evaluate("window.spaceframeViewer.bracingShownCount()") == 2
        two = orange(_canvas(page))
        assert two > one + 20
        assert "HELD" in page.inner_text("#bracing-after")
        assert "Robust" in page.inner_text("#bracing-section")
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "report_canopy_robust.png"), full_page=True)
        page.click("#bracing-switch button[data-proposal=default]")
        assert page.is_visible("#bracing") and not page.is_visible("#bracing-robust")
        assert errors == []
    finally:
        page.close()


def test_held_frame_has_no_bracing_section(browser, tmp_path):
    result = spaceframe.audit(spaceframe.load(MODELS / "plant_platform.toml"))
    page, errors, _, _ = _open(browser, render_report(result), tmp_path)
    try:
        assert not page.is_visible("#bracing-section")
        assert not page.is_visible("#bracing-controls")
        assert errors == []
    finally:
        page.close()


def test_report_reads_with_scripts_off(browser, tmp_path):
    """With JavaScript disabled the verdict, the counts, every mechanism and the bracing
    proposal are on the page as plain HTML; the empty 3D view is not shown, and a note
    says it needs scripts."""
    from spaceframe.analysis.bracing import recommend_bracing

    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    result = spaceframe.audit(frame)
    proposal = recommend_bracing(frame)
    robust = recommend_bracing(frame, robust=True)
    path = tmp_path / "noscript.html"
    path.write_text(render_report(result, proposal, robust=robust), encoding="utf-8")
    context = browser.new_context(java_script_enabled=False, viewport={"width": 1300,
                                                                        "height": 1000})
    page = context.new_page()
    try:
        page.goto(path.as_uri())
        assert page.title().startswith("spaceframe report: Footpath canopy")
        assert page.inner_text("#verdict").startswith("MECHANISM - 1 internal mechanism")
        rows = page.locator("#counts tbody tr")
        assert rows.count() == 9
        assert page.inner_text("#counts").count("\n") >= 9
        text = page.inner_text("#counts")
        assert f"mechanisms\t{result.mechanisms}" in text
        assert f"states of self-stress\t{result.self_stress_states}" in text
        mech = page.locator("#mechanisms tbody tr")
        assert mech.count() == result.mechanisms
        assert result.mode_info[0].description in mech.nth(0).inner_text()
        assert page.locator("#states tbody tr").count() == result.self_stress_forces.shape[0]
        assert page.locator("#bracing tbody tr").count() == len(proposal.members_added)
        # both proposals read as plain tables; the switch is the script's
        assert page.locator("#bracing-robust tbody tr").count() == len(robust.members_added)
        assert not page.is_visible("#bracing-switch")
        assert "competent engineer" in page.inner_text("#cautions")
        assert not page.is_visible("#viewer-section")
        assert "needs JavaScript" in page.inner_text("main")
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "report_canopy_noscript.png"), full_page=True)
    finally:
        context.close()


def test_load_case_selector_colours_members_by_force(browser, tmp_path):
    """The canopy's roof load is carried (its columns in compression: gravity down the
    columns, common practice), its wind along y is not (it acts on the sway; derived in
    the model's comment): the selector colours the first, and offers no forces for the
    second."""
    frame = spaceframe.load(MODELS / "canopy_sway.toml")
    forces = spaceframe.forces(frame)
    html = render_report(spaceframe.audit(frame), None, forces)
    page, errors, requests, path = _open(browser, html, tmp_path)
    try:
        assert requests == [path.as_uri()]
        assert page.locator("#cases tbody tr").count() == len(forces.names)
        assert "not carried" in page.inner_text("#cases-summary")
        assert page.is_disabled("#case-list button >> nth=1")
        before = _canvas(page)
        # the compression colour at full strength
        assert _colours_after(page, lambda: page.click("#case-list button >> nth=0"),
                              [0x1d, 0x5f, 0xa6], within=40)
        after = _canvas(page)
        assert "tension (kN)" in page.inner_text("#legend")
        assert "competent engineer" in page.inner_text("#forces-caution")
        # the arrows of the case, in the forces still's colours: pink loads, green reactions
        pink = np.array([0xcc, 0x79, 0xa7])
        is_pink = lambda img: (np.abs(img.astype(int) - pink).max(axis=2) < 30).sum()  # noqa: E731
        assert is_pink(before) == 0 and is_pink(after) > 40
        legend = page.inner_text("#legend")
        assert "pink arrow: load" in legend and "green arrow: reaction" in legend
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "report_canopy_forces.png"), full_page=False)
        assert errors == []
    finally:
        page.close()


def test_load_arrows_point_at_their_joints(browser, tmp_path):
    """The hall truss's roof case: a load of -y (down) at each top-chord joint, so the pink
    arrow at the ridge runs straight down the screen onto the ridge joint (at rest the
    view's up is the model's up: a plane frame's y, common practice for an elevation), and
    the reactions at the two bearings push up (the truss is symmetric: 11.25 kN each, the
    half of the 22.5 kN roof load; see the model's comments)."""
    frame = spaceframe.load(MODELS / "hall_truss.toml")
    forces = spaceframe.forces(frame)
    html = render_report(spaceframe.audit(frame), None, forces)
    page, errors, _, _ = _open(browser, html, tmp_path)
    try:
        page.evaluate("() => window.spaceframeViewer.chooseCase(0)")
        page.wait_for_timeout(100)
        img = _canvas(page)
        box = page.locator("#view").bounding_box()
        scale = img.shape[1] / box["width"]
        ridge = page.evaluate("() => window.spaceframeViewer.screenOf('U3')")
        x, y = ((ridge[0] - box["x"]) * scale, (ridge[1] - box["y"]) * scale)
        pink = np.abs(img.astype(int) - [0xcc, 0x79, 0xa7]).max(axis=2) < 30
        above = pink[int(y) - 60:int(y) - 8, int(x) - 3:int(x) + 4]
        below = pink[int(y) + 8:int(y) + 60, int(x) - 3:int(x) + 4]
        assert above.any(axis=1).mean() > 0.8 and not below.any()
        assert errors == []
    finally:
        page.close()


def test_load_cases_read_with_scripts_off(browser, tmp_path):
    """With JavaScript off the table of cases is on the page: each case carried or not, its
    largest tension and compression with how many members carry each, and its reactions
    (the roof case: 11.25 kN up at each bearing, half the roof load, by symmetry); the
    canopy's wind case names the mechanism it acts on instead."""
    for model, checks in (("hall_truss.toml", ["roof\tcase\tyes", "L0 (+0.00, +11.25)",
                                                "of 10 members in tension"]),
                          ("canopy_sway.toml", ["wind_y\tcase\tno\tMechanism 1"])):
        frame = spaceframe.load(MODELS / model)
        forces = spaceframe.forces(frame)
        path = tmp_path / f"{model}.html"
        path.write_text(render_report(spaceframe.audit(frame), None, forces), encoding="utf-8")
        context = browser.new_context(java_script_enabled=False,
                                      viewport={"width": 1300, "height": 1000})
        page = context.new_page()
        try:
            page.goto(path.as_uri())
            assert page.is_visible("#cases")
            assert page.locator("#cases tbody tr").count() == len(forces.names)
            text = page.inner_text("#cases")
            for words in checks:
                assert words in text, (words, text)
            assert "competent engineer" in page.inner_text("#forces-caution")
            ARTIFACTS.mkdir(exist_ok=True)
            page.locator("#cases-section").screenshot(
                path=str(ARTIFACTS / f"report_{model.split('.')[0]}_cases_noscript.png"))
        finally:
            context.close()


def test_chords_coloured_by_unrestrained_length_and_restraint_case(browser, tmp_path):
    """The roof of flat trusses with bottom ties at L2 and L4 into braced end bays (the
    restraint tests' roof): out of plane the bottom chords run 4000 mm between restraint
    points, the top chords 2000 mm (derived there).  The chords view colours them by that
    length and marks the restraint points; the restraint-force case is one more load case."""
    from common.roofs import roof
    from spaceframe.analysis.restraints import restraints
    from spaceframe.loads import LoadCase, LoadSet

    base = roof(["L2", "L4"])
    tops = [j for j in base.joint_ids if ".U" in j]
    loads = LoadSet(cases=(LoadCase("roof", tuple(tops), [[0.0, 0.0, -2.0]] * len(tops)),))
    frame = Frame(**{**{k: getattr(base, k) for k in (
        "joint_ids", "coords", "member_ids", "ends", "restraint_joint", "restraint_dir",
        "units", "joint_tags", "member_tags", "name")}, "loads": loads})
    result = spaceframe.audit(frame)
    forces = spaceframe.forces(frame)
    held = restraints(frame, chords="role=chord", fraction=0.02, audit=result, forces=forces)
    page, errors, requests, path = _open(browser, render_report(result, None, forces, held),
                                         tmp_path)
    try:
        assert requests == [path.as_uri()]
        assert "HELD WITH CONTINUOUS CHORDS" in page.inner_text("#restraints-verdict")
        assert page.locator("#chords tbody tr").count() == 10
        assert page.locator("#case-list button").count() == 2
        # the longest length's colour (4000 mm)
        assert _colours_after(page, lambda: page.evaluate("window.spaceframeViewer.chooseChords()"),
                              [0x7a, 0x1f, 0x5c], within=30)
        assert "restraint points" in page.inner_text("#legend")
        assert "4000 mm" in page.inner_text("#legend")
        ARTIFACTS.mkdir(exist_ok=True)
        page.screenshot(path=str(ARTIFACTS / "report_roof_chords.png"), full_page=False)
        page.evaluate("window.spaceframeViewer.chooseCase(1)")
        page.wait_for_timeout(150)
        assert "restraint forces (2 %)" in page.inner_text("#legend")
        page.screenshot(path=str(ARTIFACTS / "report_roof_restraint_case.png"), full_page=False)
        assert errors == []
    finally:
        page.close()
