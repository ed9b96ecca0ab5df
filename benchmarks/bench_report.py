"""Benchmark: the HTML report of a 100,000-member frame in headless Chromium.

Run from the repository root (needs Debian's chromium and the playwright package)::

    python benchmarks/bench_report.py [--nx 112]

A double-layer grid of ``8 nx^2`` members is audited, its report written, and
the page opened in headless Chromium (software rendering, as on this
machine): the table gives the file's size, the time until the page has drawn
the frame, and the frame rate while mechanism 1 animates and while the view is
turned, counted over three seconds with ``requestAnimationFrame``.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # the checkout, not an install

ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
        "--disable-component-update", "--disable-sync", "--no-first-run"]

FRAME_RATE = """async (ms) => {
  let n = 0; const t0 = performance.now();
  await new Promise(done => { function tick() { n++; if (performance.now() - t0 < ms)
    requestAnimationFrame(tick); else done(); } requestAnimationFrame(tick); });
  return n * 1000 / (performance.now() - t0);
}"""


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nx", type=int, default=112)
    args = ap.parse_args()
    import spaceframe
    from playwright.sync_api import sync_playwright
    from spaceframe.families import double_layer_grid
    from spaceframe.views.report import render_report

    frame = double_layer_grid(args.nx, supports="minimal")
    t0 = time.perf_counter()
    result = spaceframe.audit(frame, soft=False)
    html = render_report(result)
    t_write = time.perf_counter() - t0
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "report.html"
        path.write_text(html, encoding="utf-8")
        size = path.stat().st_size
        with sync_playwright() as p:
            browser = p.chromium.launch(executable_path="/usr/bin/chromium", args=ARGS)
            page = browser.new_page(viewport={"width": 1300, "height": 1000})
            errors = []
            page.on("pageerror", lambda e: errors.append(str(e)))
            t0 = time.perf_counter()
            page.goto(path.as_uri())
            page.wait_for_load_state("load")
            t_open = time.perf_counter() - t0
            idle = page.evaluate(FRAME_RATE, 3000)
            page.click("#mode-list button >> nth=0")
            animating = page.evaluate(FRAME_RATE, 3000)
            page.evaluate("() => spaceframeViewer.atRest()")
            box = page.locator("#view").bounding_box()
            page.mouse.move(box["x"] + 300, box["y"] + 300)
            page.mouse.down()
            t0 = time.perf_counter()
            for k in range(20):
                page.mouse.move(box["x"] + 300 + 10 * k, box["y"] + 300)
            t_turn = (time.perf_counter() - t0) / 20
            page.mouse.up()
            browser.close()
    print(f"double-layer grid {args.nx}x{args.nx}: {frame.n_joints:,} joints, "
          f"{frame.n_members:,} members")
    print(f"  audit + report written (soft=False)          {t_write:8.2f} s")
    print(f"  report file size                             {size / 2**20:8.1f} MiB")
    print(f"  page opened and first drawn                  {t_open:8.2f} s")
    print(f"  frame rate at rest (idle page)               {idle:8.1f} /s")
    print(f"  frame rate, mechanism 1 animating            {animating:8.1f} /s")
    print(f"  one drag step of the view, redrawn           {1000 * t_turn:8.0f} ms")
    print(f"  page errors                                  {len(errors)}")


if __name__ == "__main__":
    main()
