// spaceframe report: the 3D view, added on top of a page whose words and tables are plain
// HTML (written by spaceframe/views/report.py, so the report reads with scripts off).
// Plain canvas 2D with its own orthographic projection; no library, no network.
// Every string from the document goes in through textContent, never as markup.
"use strict";
(function () {
  const doc = JSON.parse(document.getElementById("spaceframe-data").textContent);
  const audit = doc.audit;
  const geo = doc.geometry;

  const COLOUR = {
    member: "#5d6b75", movingMember: "#0072b2", movingJoint: "#d55e00", joint: "#3a3a3a",
    support: "#009e73", ghost: "#c4c4c4", pick: "#111111", brace: "#e69f00",
    load: "#cc79a7", reaction: "#009e73",          // the arrows' colours of the forces still
    compression: [0x1d, 0x5f, 0xa6], zero: [0xe3, 0xe3, 0xe3], tension: [0xc2, 0x5a, 0x12],
    short: [0xbf, 0xe3, 0xd0], long: [0x7a, 0x1f, 0x5c], point: "#1a1a1a",
  };

  // ---- small DOM helpers ------------------------------------------------------------
  function el(tag, text, cls) {
    const e = document.createElement(tag);
    if (text !== undefined && text !== null) e.textContent = String(text);
    if (cls) e.className = cls;
    return e;
  }
  function plural(n, word) { return n + " " + word + (n === 1 ? "" : "s"); }
  // ---- the 3D view ----------------------------------------------------------------------
  const canvas = document.getElementById("view");
  const ctx = canvas.getContext("2d");
  const X = geo.coords, E = geo.ends;
  const centre = [0, 1, 2].map(a => {
    let lo = Infinity, hi = -Infinity;
    for (const p of X) { lo = Math.min(lo, p[a]); hi = Math.max(hi, p[a]); }
    return X.length ? (lo + hi) / 2 : 0;
  });
  const view = { az: 0, el: 0.5, zoom: 1, panX: 0, panY: 0 };
  const show = { mode: -1, state: -1, loadcase: -1, t0: 0, picked: null, bracing: false, chords: false };
  let bracing = doc.bracing;              // the proposal drawn: least cost, or robust
  const loads = doc.loads;                        // null for a model without load cases
  const chords = doc.restraints;                  // null without chords
  // each chord member's unrestrained length, and the chords' restraint points
  const segment = new Map(), points = new Set();
  if (chords) for (const c of chords.chords) {
    c.members.forEach((k, i) => segment.set(k, c.segments[i]));
    for (const j of c.points) points.add(j);
  }
  function fmt(v) { return (v > 0 ? "+" : "") + Number(v.toPrecision(4)) + " " + loads.force_units; }
  let animating = false;

  function setDirection(v) {
    view.az = Math.atan2(v[1], v[0]);
    view.el = Math.asin(Math.max(-1, Math.min(1, v[2])));
  }
  function fit(v) { setDirection(v); view.zoom = 1; view.panX = 0; view.panY = 0; }

  function basis() {
    const ca = Math.cos(view.az), sa = Math.sin(view.az), ce = Math.cos(view.el), se = Math.sin(view.el);
    const back = [ce * ca, ce * sa, se];          // from the centre towards the eye
    const right = [-sa, ca, 0];                    // horizontal, across the view
    const up = [-se * ca, -se * sa, ce];           // back x right, so up stays up
    return { back, right, up };
  }
  function scale() { return 0.78 * view.zoom * Math.min(canvas.width, canvas.height) / geo.extent; }

  function positions() {
    if (show.mode < 0) return X;
    const u = geo.modes[show.mode];
    const phase = animating ? 2 * Math.PI * ((performance.now() - show.t0) / 2000 % 1) : 0;
    const a = geo.amplitude * geo.extent *                       // the one-way motion: one side only
      (show.mode === geo.one_way ? (1 + Math.sin(phase)) / 2 : Math.sin(phase));
    return X.map((p, j) => [p[0] + a * u[j][0], p[1] + a * u[j][1], p[2] + a * u[j][2]]);
  }

  function projector() {
    const b = basis(), s = scale();
    const cx = canvas.width / 2 + view.panX, cy = canvas.height / 2 + view.panY;
    return p => {
      const d = [p[0] - centre[0], p[1] - centre[1], p[2] - centre[2]];
      return [cx + s * (d[0] * b.right[0] + d[1] * b.right[1] + d[2] * b.right[2]),
        cy - s * (d[0] * b.up[0] + d[1] * b.up[1] + d[2] * b.up[2]),
        d[0] * b.back[0] + d[1] * b.back[1] + d[2] * b.back[2]];
    };
  }

  function lengthColour(f) {
    const c = COLOUR.short.map((v, i) => Math.round(v + (COLOUR.long[i] - v) * Math.max(0, Math.min(1, f))));
    return "rgb(" + c.join(",") + ")";
  }

  function forceColour(t) {
    const [a, b, f] = t < 0 ? [COLOUR.zero, COLOUR.compression, -t] : [COLOUR.zero, COLOUR.tension, t];
    const c = a.map((v, i) => Math.round(v + (b[i] - v) * Math.min(1, f)));
    return "rgb(" + c.join(",") + ")";
  }

  function draw() {
    const W = canvas.width, H = canvas.height;
    ctx.fillStyle = "#ffffff";
    ctx.fillRect(0, 0, W, H);
    const P = projector();
    const now = positions().map(P);
    const moving = show.mode >= 0 ? geo.moving[show.mode] : null;
    const forces = show.state >= 0 ? geo.forces[show.state]
      : show.loadcase >= 0 ? loads.cases[show.loadcase].scaled : null;
    ctx.lineCap = "round";
    if (show.mode >= 0 && E.length <= 20000) {        // the frame at rest, ghosted behind
      const rest = X.map(P);
      ctx.strokeStyle = COLOUR.ghost; ctx.lineWidth = E.length > 4000 ? 0.75 : 1.5;
      ctx.beginPath();
      for (const [a, b] of E) { ctx.moveTo(rest[a][0], rest[a][1]); ctx.lineTo(rest[b][0], rest[b][1]); }
      ctx.stroke();
    }
    // Members are stroked one path per style: a few strokes whatever the frame's size.
    // Small frames are drawn back to front, so nearer members cover farther ones; large ones
    // with thin square-ended lines, which a software canvas strokes several times faster.
    const big = E.length > 4000;
    const order = big ? null : E.map((e, k) => k).sort((k, l) =>
      (now[E[k][0]][2] + now[E[k][1]][2]) - (now[E[l][0]][2] + now[E[l][1]][2]));
    const thin = big ? 0.45 : 1;
    ctx.lineCap = big ? "butt" : "round";
    const groups = [];                                 // key -> [colour, width, members]
    // while the view is dragged or a mode moves, a large frame is drawn from a sample of
    // its members (the legend says so); at rest it is drawn whole
    const stride = ((drag && drag.moved) || animating) && E.length > 20000
      ? Math.ceil(E.length / 20000) : 1;
    const n = E.length;
    for (let i = 0; i < n; i += stride) {
      const k = order ? order[i] : i;
      const a = E[k][0], b = E[k][1];
      let key = 1, colour = COLOUR.member, width = 2.5;
      if (moving && (moving[a] || moving[b])) { key = 2; colour = COLOUR.movingMember; width = 3.5; }
      if (show.chords) {
        const len = segment.get(k);
        if (len !== undefined) {
          const q = Math.round(16 * len / (chords.longest || 1));
          key = 200 + q; colour = lengthColour(q / 16); width = 4.5;
        } else { key = 0; colour = COLOUR.ghost; width = 1.5; }
      }
      if (forces) {
        const t = forces[k];
        if (Math.abs(t) > 1e-6) {
          const q = Math.round(t * 16);
          key = 40 + q; colour = forceColour(q / 16); width = 4.5;
        } else { key = 0; colour = COLOUR.ghost; width = 1.5; }
      }
      if (show.picked && show.picked.kind === "member" && show.picked.index === k) { key = 99; colour = COLOUR.pick; width = 6; }
      if (order) {                                     // small frame: in depth order
        ctx.strokeStyle = colour; ctx.lineWidth = width;
        ctx.beginPath(); ctx.moveTo(now[a][0], now[a][1]); ctx.lineTo(now[b][0], now[b][1]); ctx.stroke();
        continue;
      }
      if (!groups[key]) groups[key] = [colour, width * thin, []];
      groups[key][2].push(k);
    }
    const rank = key => (key === 0 ? 0 : key === 1 ? 1 : key === 99 ? 3 : 2);
    const keys = Object.keys(groups).map(Number).sort((p, q) => rank(p) - rank(q));
    for (const key of keys) {
      const [colour, width, list] = groups[key];
      ctx.strokeStyle = colour; ctx.lineWidth = width;
      ctx.beginPath();
      for (const k of list) {
        const a = E[k][0], b = E[k][1];
        ctx.moveTo(now[a][0], now[a][1]); ctx.lineTo(now[b][0], now[b][1]);
      }
      ctx.stroke();
    }
    ctx.lineCap = "round";
    if (show.bracing && bracing) {                    // proposed members: orange, dashed
      ctx.strokeStyle = COLOUR.brace; ctx.lineWidth = 4; ctx.setLineDash([10, 6]);
      ctx.beginPath();
      for (const b of bracing.added) {
        const [a, c] = b.joint_indices;
        ctx.moveTo(now[a][0], now[a][1]); ctx.lineTo(now[c][0], now[c][1]);
      }
      ctx.stroke(); ctx.setLineDash([]);
    }
    drawSupports(P, now);
    if (show.loadcase >= 0) drawArrows(now);
    if (show.chords) {                                // restraint points: dark squares, white rim
      ctx.fillStyle = COLOUR.point; ctx.strokeStyle = "#ffffff"; ctx.lineWidth = 1.5;
      for (const j of points) {
        ctx.beginPath(); ctx.rect(now[j][0] - 5, now[j][1] - 5, 10, 10); ctx.fill(); ctx.stroke();
      }
    }
    // joints: one path per colour on a large frame (only moving and picked joints stand out)
    const bigJ = now.length > 4000;
    const plain = [], moved = [];
    for (let j = 0; j < now.length; j++) {
      const picked = show.picked && show.picked.kind === "joint" && show.picked.index === j;
      const mv = moving && moving[j];
      if (picked) {
        ctx.fillStyle = COLOUR.pick;
        ctx.beginPath(); ctx.arc(now[j][0], now[j][1], 7, 0, 2 * Math.PI); ctx.fill();
      } else if (!bigJ) {
        ctx.fillStyle = mv ? COLOUR.movingJoint : COLOUR.joint;
        ctx.beginPath(); ctx.arc(now[j][0], now[j][1], mv ? 6 : 2.5, 0, 2 * Math.PI); ctx.fill();
      } else (mv ? moved : plain).push(j);
    }
    for (const [list, colour, half] of [[plain, COLOUR.joint, 1.5], [moved, COLOUR.movingJoint, 2.5]]) {
      if (!list.length) continue;
      ctx.fillStyle = colour;
      ctx.beginPath();
      for (const j of list) ctx.rect(now[j][0] - half, now[j][1] - half, 2 * half, 2 * half);
      ctx.fill();
    }
    if (animating) requestAnimationFrame(draw);
  }

  // A support is drawn as one stalk per held direction, ending in a plate across it.
  function drawSupports(P, now) {
    const b = basis(), s = scale();
    ctx.strokeStyle = COLOUR.support;
    for (const sup of geo.supports) {
      const j = sup[0], d = sup[1], len = geo.glyph * geo.extent;
      const p0 = now[j];
      const tip = [p0[0] + s * len * dot(d, b.right), p0[1] - s * len * dot(d, b.up)];
      ctx.lineWidth = 3;
      ctx.beginPath(); ctx.moveTo(p0[0], p0[1]); ctx.lineTo(tip[0], tip[1]); ctx.stroke();
      const sx = tip[0] - p0[0], sy = tip[1] - p0[1], l = Math.hypot(sx, sy);
      ctx.lineWidth = 4;
      ctx.beginPath();
      if (l > 2) {
        const px = -sy / l * 8, py = sx / l * 8;
        ctx.moveTo(tip[0] - px, tip[1] - py); ctx.lineTo(tip[0] + px, tip[1] + py);
      } else {                                          // held along the line of sight
        ctx.arc(p0[0], p0[1], 8, 0, 2 * Math.PI);
      }
      ctx.stroke();
    }
  }
  function dot(u, v) { return u[0] * v[0] + u[1] * v[1] + u[2] * v[2]; }

  // ---- picking ------------------------------------------------------------------------
  function pickAt(x, y) {
    const P = projector();
    const now = positions().map(P);
    let best = null, bestD = 9;
    now.forEach((p, j) => {
      const dd = Math.hypot(p[0] - x, p[1] - y);
      if (dd < bestD) { bestD = dd; best = { kind: "joint", index: j }; }
    });
    if (!best) {
      bestD = 7;
      E.forEach(([a, b], k) => {
        const dd = segmentDistance(x, y, now[a], now[b]);
        if (dd < bestD) { bestD = dd; best = { kind: "member", index: k }; }
      });
    }
    show.picked = best;
    const out = document.getElementById("picked");
    if (!best) out.textContent = "Nothing picked.";
    else if (best.kind === "joint") {
      const p = X[best.index];
      out.textContent = "joint " + geo.joints[best.index] + " at (" + p.map(v => v.toFixed(3)).join(", ") + ")";
    } else {
      const [a, b] = E[best.index];
      let text = "member " + geo.members[best.index] + ": " + geo.joints[a] + " to " + geo.joints[b];
      if (show.chords && segment.has(best.index)) {
        text += "; unrestrained length " + Number(segment.get(best.index).toPrecision(4)) + " " + chords.units;
      } else if (show.state >= 0) {
        const t = geo.forces[show.state][best.index];
        text += "; force " + (t > 0 ? "+" : "") + t.toFixed(3) + (t > 1e-6 ? " tension" : t < -1e-6 ? " compression" : " (none)");
      } else if (show.loadcase >= 0) {
        const c = loads.cases[show.loadcase], t = c.scaled[best.index] * c.largest;
        text += "; case " + c.name + ": " + (t === 0 ? "no force" : fmt(t) + (t > 0 ? " tension" : " compression"));
      }
      out.textContent = text;
    }
    if (!animating) draw();
  }
  function segmentDistance(x, y, a, b) {
    const dx = b[0] - a[0], dy = b[1] - a[1], l2 = dx * dx + dy * dy;
    const t = l2 > 0 ? Math.max(0, Math.min(1, ((x - a[0]) * dx + (y - a[1]) * dy) / l2)) : 0;
    return Math.hypot(a[0] + t * dx - x, a[1] + t * dy - y);
  }

  // ---- pointer and wheel ----------------------------------------------------------------
  let drag = null;
  function canvasXY(ev) {
    const r = canvas.getBoundingClientRect();
    return [(ev.clientX - r.left) * canvas.width / r.width, (ev.clientY - r.top) * canvas.height / r.height];
  }
  canvas.addEventListener("contextmenu", ev => ev.preventDefault());
  canvas.addEventListener("pointerdown", ev => {
    const [x, y] = canvasXY(ev);
    drag = { x, y, x0: x, y0: y, pan: ev.shiftKey || ev.button !== 0, moved: false };
    canvas.setPointerCapture(ev.pointerId);
  });
  canvas.addEventListener("pointermove", ev => {
    if (!drag) return;
    const [x, y] = canvasXY(ev);
    const dx = x - drag.x, dy = y - drag.y;
    if (Math.hypot(x - drag.x0, y - drag.y0) > 4) drag.moved = true;
    if (drag.pan) { view.panX += dx; view.panY += dy; }
    else {
      view.az -= dx * 0.01;
      view.el = Math.max(-1.5, Math.min(1.5, view.el + dy * 0.01));
    }
    drag.x = x; drag.y = y;
    if (!animating) draw();
  });
  canvas.addEventListener("pointerup", ev => {
    const moved = drag && drag.moved;
    if (drag && !drag.moved) { const [x, y] = canvasXY(ev); pickAt(x, y); }
    drag = null;
    if (moved && !animating) draw();                  // the whole frame again, not the sample
  });
  canvas.addEventListener("wheel", ev => {
    ev.preventDefault();
    view.zoom = Math.max(0.1, Math.min(40, view.zoom * Math.exp(-ev.deltaY * 0.001)));
    if (!animating) draw();
  }, { passive: false });

  // ---- mode and state lists --------------------------------------------------------------
  const buttons = [];
  function press(active) { for (const b of buttons) b.setAttribute("aria-pressed", String(b === active)); }
  function chooseMode(i, button) {
    show.chords = false; show.mode = i; show.state = -1; show.loadcase = -1; show.t0 = performance.now();
    fit(geo.views[i]);
    press(button);
    legend();
    if (!animating) { animating = true; requestAnimationFrame(draw); }
  }
  function chooseState(i, button) {
    show.chords = false; show.mode = -1; show.state = i; show.loadcase = -1; animating = false;
    fit(geo.rest_view);
    press(button);
    legend();
    draw();
  }
  function chooseCase(i, button) {
    show.chords = false; show.mode = -1; show.state = -1; show.loadcase = i; animating = false;
    fit(geo.rest_view);
    press(button);
    legend();
    draw();
  }
  function chooseChords(button) {
    show.mode = -1; show.state = -1; show.loadcase = -1; show.chords = true; animating = false;
    fit(geo.rest_view);
    press(button);
    legend();
    draw();
  }
  function atRest() {
    show.chords = false; show.mode = -1; show.state = -1; show.loadcase = -1; animating = false; press(null); legend(); draw();
  }

  function fillLists() {
    const ml = document.getElementById("mode-list");
    if (!audit.mechanism_modes.length) ml.appendChild(el("li", "None: nothing moves.", "muted"));
    audit.mechanism_modes.forEach((m, i) => {
      const li = el("li"), b = el("button", (i + 1) + ". " + m.kind + ": " + (m.description || ""));
      b.type = "button"; b.setAttribute("aria-pressed", "false"); b.dataset.mode = String(i);
      b.addEventListener("click", () => chooseMode(i, b));
      buttons.push(b); li.appendChild(b); ml.appendChild(li);
    });
    const sl = document.getElementById("state-list");
    if (!doc.states.length) sl.appendChild(el("li", "None.", "muted"));
    doc.states.forEach((s, i) => {
      const li = el("li"), b = el("button", "State " + (i + 1) + ": " + plural(s.members, "member"));
      b.type = "button"; b.setAttribute("aria-pressed", "false"); b.dataset.state = String(i);
      b.addEventListener("click", () => chooseState(i, b));
      buttons.push(b); li.appendChild(b); sl.appendChild(li);
    });
    if (loads) fillCases();
    if (chords) {
      document.getElementById("chord-controls").hidden = false;
      const b = document.getElementById("chords-toggle");
      b.textContent = "Unrestrained lengths (" + chords.chords.length + " chords, " +
        chords.chords[0].direction + ")";
      b.addEventListener("click", () => chooseChords(b));
      buttons.push(b);
    }
    if (bracing) fillBracing();
    document.getElementById("rest").addEventListener("click", atRest);
    document.getElementById("fit").addEventListener("click", () => {
      fit(show.mode >= 0 ? geo.views[show.mode] : geo.rest_view); if (!animating) draw();
    });
  }

  // The load cases: a selector that colours the members by force and draws the arrows of
  // the loads and reactions (the table of cases is plain HTML above, for scripts off too).
  function fillCases() {
    document.getElementById("case-controls").hidden = false;
    const cl = document.getElementById("case-list");
    loads.cases.forEach((c, i) => {
      const li = el("li"), b = el("button", c.name + (c.carried ? "" : ": not carried"));
      b.type = "button"; b.setAttribute("aria-pressed", "false"); b.dataset.loadcase = String(i);
      if (c.carried) b.addEventListener("click", () => chooseCase(i, b));
      else { b.disabled = true; b.title = c.excited.map(e => e.description).join(" "); }
      buttons.push(b); li.appendChild(b); cl.appendChild(li);
    });
  }

  // Arrows of a load case: loads pointing at their joints, reactions pushing on theirs, each
  // as long as its force over the largest of its kind (the longest loads.arrow x extent).
  function drawArrows(now) {
    const c = loads.cases[show.loadcase], b = basis(), s = scale();
    for (const [list, colour] of [[c.arrows.loads, COLOUR.load], [c.arrows.reactions, COLOUR.reaction]]) {
      let top = 0;
      for (const [, v] of list) top = Math.max(top, Math.hypot(v[0], v[1], v[2]));
      if (!(top > 0)) continue;
      ctx.strokeStyle = colour; ctx.fillStyle = colour; ctx.lineWidth = 2.5;
      for (const [j, v] of list) {
        const size = Math.hypot(v[0], v[1], v[2]);
        // pixels; the shortest 1/8 of the longest, as in the forces still (0.02 / 0.16)
        const len = Math.max(size / top, 0.125) * loads.arrow * geo.extent * s;
        const dx = dot(v, b.right) / size, dy = -dot(v, b.up) / size;         // on screen
        const tip = now[j], flat = Math.hypot(dx, dy);
        if (flat < 0.15) {                                // along the line of sight: a ring
          ctx.beginPath(); ctx.arc(tip[0], tip[1], 6, 0, 2 * Math.PI); ctx.stroke(); continue;
        }
        const tail = [tip[0] - len * dx, tip[1] - len * dy];
        const ux = dx / flat, uy = dy / flat, head = Math.min(10, 0.35 * len * flat);
        ctx.beginPath(); ctx.moveTo(tail[0], tail[1]);
        ctx.lineTo(tip[0] - head * ux, tip[1] - head * uy); ctx.stroke();
        ctx.beginPath(); ctx.moveTo(tip[0], tip[1]);
        ctx.lineTo(tip[0] - head * ux - 0.5 * head * uy, tip[1] - head * uy + 0.5 * head * ux);
        ctx.lineTo(tip[0] - head * ux + 0.5 * head * uy, tip[1] - head * uy - 0.5 * head * ux);
        ctx.closePath(); ctx.fill();
      }
    }
  }

  // The proposal: a table, and a toggle that draws the braces and gives the audit after them.
  function fillBracing() {
    document.getElementById("bracing-controls").hidden = false;
    const toggle = document.getElementById("bracing-toggle");
    const after = document.getElementById("bracing-after");
    const afterText = () => {
      const a = bracing.after;
      const which = doc.bracing_robust && bracing === doc.bracing_robust ? "the robust " : "";
      after.textContent = "Audit after " + which + "bracing: " + plural(a.mechanisms, "mechanism") + ", " +
        plural(a.self_stress_states, "state") + " of self-stress. " + bracing.after_verdict;
    };
    toggle.addEventListener("click", () => {
      show.bracing = !show.bracing;
      toggle.setAttribute("aria-pressed", String(show.bracing));
      toggle.textContent = show.bracing ? "Hide the proposed bracing" : "Show the proposed bracing";
      after.hidden = !show.bracing;
      afterText();
      if (show.bracing) {               // at rest, seen as for the first mode: across its motion
        atRest();
        if (geo.views.length) { fit(geo.views[0]); draw(); }
      } else { legend(); if (!animating) draw(); }
    });
    // two proposals (least cost, robust): a switch on top of the two plain tables
    const sw = document.getElementById("bracing-switch");
    if (!sw || !doc.bracing_robust) return;
    const blocks = { default: document.getElementById("bracing-block"),
      robust: document.getElementById("bracing-block-robust") };
    const choose = which => {
      bracing = which === "robust" ? doc.bracing_robust : doc.bracing;
      for (const b of sw.querySelectorAll("button")) {
        b.setAttribute("aria-pressed", String(b.dataset.proposal === which));
      }
      blocks.default.hidden = which !== "default";
      blocks.robust.hidden = which !== "robust";
      afterText();
      if (!animating) draw();
    };
    for (const b of sw.querySelectorAll("button")) {
      b.addEventListener("click", () => choose(b.dataset.proposal));
    }
    sw.hidden = false;
    choose("default");
  }

  function legend() {
    const box = document.getElementById("legend");
    box.textContent = "";
    const entries = [];
    if (show.state >= 0) {
      const d = el("div"), ramp = el("span", null, "ramp");
      ramp.style.background = "linear-gradient(to right, " + forceColour(-1) + ", " + forceColour(0) + ", " + forceColour(1) + ")";
      d.appendChild(el("span", "compression -1")); d.appendChild(ramp); d.appendChild(el("span", "+1 tension"));
      box.appendChild(d);
      entries.push([COLOUR.ghost, "light grey, thin: carries nothing in this state"]);
    } else if (show.loadcase >= 0) {
      const c = loads.cases[show.loadcase], top = Number(c.largest.toPrecision(4));
      const d = el("div"), ramp = el("span", null, "ramp");
      ramp.style.background = "linear-gradient(to right, " + forceColour(-1) + ", " + forceColour(0) + ", " + forceColour(1) + ")";
      d.appendChild(el("span", "compression -" + top)); d.appendChild(ramp);
      d.appendChild(el("span", "+" + top + " tension (" + loads.force_units + ")"));
      box.appendChild(d);
      entries.push([COLOUR.ghost, "light grey, thin: carries nothing in case " + c.name],
        [COLOUR.load, "pink arrow: load, pointing at its joint"],
        [COLOUR.reaction, "green arrow: reaction of a support on the frame"]);
    } else if (show.chords) {
      const d = el("div"), ramp = el("span", null, "ramp");
      ramp.style.background = "linear-gradient(to right, " + lengthColour(0) + ", " + lengthColour(1) + ")";
      d.appendChild(el("span", "0")); d.appendChild(ramp);
      d.appendChild(el("span", Number(chords.longest.toPrecision(4)) + " " + chords.units +
        ": unrestrained length " + chords.chords[0].direction));
      box.appendChild(d);
      entries.push([COLOUR.point, "dark squares: restraint points"],
        [COLOUR.ghost, "light grey, thin: members of no chord"]);
    } else if (show.mode >= 0) {
      entries.push([COLOUR.movingJoint, "vermillion: joints that move"],
        [COLOUR.movingMember, "blue: members at them"]);
      if (E.length <= 20000) entries.push([COLOUR.ghost, "light grey: the frame at rest"]);
      else entries.push([COLOUR.member, "large frame: while it moves, 1 member in " +
        Math.ceil(E.length / 20000) + " is drawn"]);
    } else {
      entries.push([COLOUR.member, "slate: members"], [COLOUR.joint, "dark dots: joints"]);
    }
    if (show.bracing) entries.push([COLOUR.brace, "orange, dashed: proposed bracing"]);
    entries.push([COLOUR.support, "green stalk and plate: a direction a support holds"],
      [COLOUR.pick, "black, thick: what you picked"]);
    for (const [c, words] of entries) {
      const d = el("div"), sw = el("span", null, "swatch");
      sw.style.background = c;
      d.appendChild(sw); d.appendChild(el("span", words)); box.appendChild(d);
    }
  }

  // For tests and for scripting: where a joint is drawn, and the choices above.
  window.spaceframeViewer = {
    screenOf(jointId) {
      const j = geo.joints.indexOf(jointId);
      if (j < 0) return null;
      const p = projector()(positions()[j]);
      const r = canvas.getBoundingClientRect();
      return [r.left + p[0] * r.width / canvas.width, r.top + p[1] * r.height / canvas.height];
    },
    chooseMode(i) { chooseMode(i, buttons[i]); },
    chooseCase(i) { chooseCase(i, buttons.find(b => b.dataset.loadcase === String(i))); },
    chooseChords() { chooseChords(document.getElementById("chords-toggle")); },
    bracingShown() { return show.bracing; },
    bracingShownCount() { return show.bracing && bracing ? bracing.added.length : 0; },
    atRest,
  };

  document.getElementById("viewer-section").hidden = false;
  fillLists();
  fit(geo.rest_view);
  legend();
  draw();
})();
