// bracegrid editor: plain JavaScript and SVG, no build step, no network beyond this server.
// The page holds the edits; the server validates them with the project loader and checks them.
"use strict";

(() => {
  const TOKEN = document.querySelector('meta[name="bracegrid-token"]').content;
  const SVGNS = "http://www.w3.org/2000/svg";
  const CYCLE = { none: "tie", tie: "brace", brace: "none" };
  const PART_COLOURS = ["#f2a33a", "#5aa9e6", "#e05d8f", "#7bc47f", "#b58ae0", "#e0c35d"];
  const HISTORY_LIMIT = 300;

  const $ = (id) => document.getElementById(id);
  const esc = (s) => String(s).replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]);
  const money = (v) => (v === null || v === undefined ? "–" : Number(v).toFixed(2));
  const pct = (v) => (v === null || v === undefined ? "–" : (100 * v).toFixed(2) + " %");
  const key = (r, c, d) => `${r},${c},${d}`;
  const bayKey = (r, c) => `${r},${c}`;

  // ---------------------------------------------------------------- state
  const state = {
    project: null,
    version: "",
    unit: "m",
    frames: [],
    current: 0,
    mode: "diagonal",
    selected: new Set(),
    history: [],
    future: [],
    proposal: null,
    job: null,
    cursor: { row: 1, col: 1, diag: "rising" },
    dirty: false,
    checkSeq: 0,
    shownSeq: 0,
    inflight: false,
    pending: false,
    editTime: 0,
    geometry: null,
  };
  window.bracegrid = state; // for the browser tests and for the curious

  function frameFromServer(f) {
    const members = new Map();
    for (const m of f.members) members.set(key(m.row, m.col, m.diagonal), { kind: m.kind, existing: m.existing });
    return {
      name: f.name,
      widths: f.widths.map(String),
      heights: f.heights.map(String),
      widthsMm: f.widths_mm.slice(),
      heightsMm: f.heights_mm.slice(),
      supports: f.supports,
      blocked: new Set(f.blocked.map(([r, c]) => bayKey(r, c))),
      openingBlocked: new Set(f.blocked_by_openings.map(([r, c]) => bayKey(r, c))),
      openings: f.openings,
      members,
      general: Boolean(f.general),
      generalNote: f.general_note || "",
      verdict: null,
      problems: [],
      size: null,
      loadCases: f.load_cases || [],
      forces: null,
    };
  }

  const frame = () => state.frames[state.current];

  function editOf(f) {
    const members = [];
    for (const [k, m] of f.members) {
      const [r, c, d] = k.split(",");
      members.push({ row: Number(r), col: Number(c), kind: m.kind, diagonal: d, existing: m.existing });
    }
    members.sort((a, b) => a.row - b.row || a.col - b.col || (a.diagonal < b.diagonal ? -1 : 1));
    const blocked = [...f.blocked].map((b) => b.split(",").map(Number));
    blocked.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
    return { name: f.name, widths: f.widths, heights: f.heights, supports: f.supports, blocked, members };
  }

  function snapshot(f) {
    return {
      widths: f.widths.slice(), heights: f.heights.slice(), widthsMm: f.widthsMm.slice(), heightsMm: f.heightsMm.slice(),
      supports: f.supports, blocked: new Set(f.blocked), members: new Map([...f.members].map(([k, m]) => [k, { ...m }])),
    };
  }

  function restore(f, s) {
    Object.assign(f, { widths: s.widths.slice(), heights: s.heights.slice(), widthsMm: s.widthsMm.slice(), heightsMm: s.heightsMm.slice(),
      supports: s.supports, blocked: new Set(s.blocked), members: new Map([...s.members].map(([k, m]) => [k, { ...m }])) });
  }

  // ---------------------------------------------------------------- server
  async function api(method, path, body) {
    const opts = { method, headers: { "X-Bracegrid-Token": TOKEN } };
    if (body !== undefined) {
      opts.headers["Content-Type"] = "application/json";
      opts.body = JSON.stringify(body);
    }
    let res;
    try {
      res = await fetch(path, opts);
    } catch (err) {
      return { ok: false, status: 0, data: { error: "offline", message: "the editor's server does not answer (was it stopped?)" } };
    }
    let data = null;
    try { data = await res.json(); } catch (err) { data = { error: "bad-answer", message: `answer ${res.status} was not JSON` }; }
    return { ok: res.ok, status: res.status, data };
  }

  const withToken = (href) => `${href}${href.includes("?") ? "&" : "?"}t=${encodeURIComponent(TOKEN)}`;

  async function loadProject() {
    const got = await api("GET", "/api/project");
    if (!got.ok) {
      showFileState(`Cannot load the project: ${got.data.message}`, "bad");
      return false;
    }
    const p = got.data;
    state.project = p;
    state.version = p.version;
    state.unit = p.length_unit;
    state.frames = p.frames.map(frameFromServer);
    state.current = Math.min(state.current, state.frames.length - 1);
    state.history = [];
    state.future = [];
    state.selected.clear();
    state.proposal = null;
    state.dirty = false;
    $("project-name").textContent = p.name;
    $("caution").textContent = p.caution;
    document.querySelectorAll(".unit").forEach((el) => { el.textContent = `(${p.length_unit})`; });
    $("conflict").hidden = true;
    renderFrameTabs();
    selectFrame(state.current);
    showFileState(`${p.file} · version ${p.version.slice(0, 8)} · no unsaved changes`, "ok");
    return true;
  }

  function scheduleCheck() {
    state.checkSeq += 1;
    state.editTime = performance.now();
    if (state.inflight) { state.pending = true; return; }
    runCheck();
  }

  async function runCheck() {
    state.inflight = true;
    state.pending = false;
    const seq = state.checkSeq;
    const idx = state.current;
    const f = frame();
    const started = state.editTime;
    const got = await api("POST", "/api/check", { frame: editOf(f) });
    state.inflight = false;
    f.forces = null;
    if (got.ok) {
      f.verdict = got.data;
      f.problems = [];
      f.widthsMm = got.data.sizes.widths_mm;
      f.heightsMm = got.data.sizes.heights_mm;
      f.openingBlocked = new Set(got.data.blocked_by_openings.map(([r, c]) => bayKey(r, c)));
      f.size = got.data.sizes;
    } else if (got.status === 422 && got.data.problems) {
      f.problems = got.data.problems.filter((p) => p.frame === null || p.frame === f.name);
      f.verdict = null;
    } else {
      f.problems = [{ field: "project", message: got.data.message }];
      f.verdict = null;
    }
    if (idx === state.current) {
      if (got.ok) {
        const shape = JSON.stringify([f.widthsMm, f.heightsMm, f.widths, f.heights, f.supports, f.size]);
        if (shape !== state.gridShape) { state.gridShape = shape; renderGrid(); } else renderMembers();
      }
      renderVerdict(seq);
      renderProblems();
      const ms = performance.now() - started;
      state.lastMs = ms;
      const server = got.ok ? ` (server ${got.data.server_ms.toFixed(1)} ms)` : "";
      $("timing").textContent = `checked in ${ms.toFixed(0)} ms${server}`;
      renderForces();
    }
    if (state.pending) runCheck();
    else if (got.ok && f.loadCases.length) runForces(f, seq);
  }

  // Member forces come after the verdict (they cost more than the check) and only for the
  // latest edit: an answer for an older edit is dropped.
  async function runForces(f, seq) {
    const got = await api("POST", "/api/forces", { frame: editOf(f) });
    if (seq !== state.checkSeq) return;
    f.forces = got.ok ? got.data : { available: false, reason: got.data.message || "forces not available" };
    if (f === frame()) { renderMembers(); renderForces(); }
  }

  // ---------------------------------------------------------------- edits and history
  function edit(change, { check = true } = {}) {
    const f = frame();
    const before = snapshot(f);
    const changed = change(f);
    if (changed === false) return;
    state.history.push({ frame: state.current, before, after: snapshot(f) });
    if (state.history.length > HISTORY_LIMIT) state.history.shift();
    state.future = [];
    markDirty();
    renderMembers();
    if (check) scheduleCheck();
  }

  function undo() {
    const step = state.history.pop();
    if (!step) return;
    state.future.push(step);
    if (step.frame !== state.current) selectFrame(step.frame, { check: false });
    restore(frame(), step.before);
    afterHistoryMove();
  }

  function redo() {
    const step = state.future.pop();
    if (!step) return;
    state.history.push(step);
    if (step.frame !== state.current) selectFrame(step.frame, { check: false });
    restore(frame(), step.after);
    afterHistoryMove();
  }

  function afterHistoryMove() {
    markDirty();
    fillFrameFields();
    renderGrid();
    scheduleCheck();
  }

  function markDirty() {
    state.dirty = true;
    $("undo").disabled = state.history.length === 0;
    $("redo").disabled = state.future.length === 0;
    showFileState(`${state.project.file} · unsaved changes`, "warn");
  }

  function setDiagonal(f, r, c, d, kind) {
    const k = key(r, c, d);
    const had = f.members.get(k);
    if (kind === "none") {
      if (!had) return false;
      f.members.delete(k);
      return true;
    }
    if (had && had.kind === kind) return false;
    f.members.set(k, { kind, existing: had ? had.existing : true });
    return true;
  }

  function isOpeningBay(f, r, c) { return f.openingBlocked.has(bayKey(r, c)); }

  function setBlocked(f, r, c, on) {
    const b = bayKey(r, c);
    if (isOpeningBay(f, r, c)) return false;
    if (on === f.blocked.has(b)) return false;
    if (on) {
      f.blocked.add(b);
      f.members.delete(key(r, c, "rising"));
      f.members.delete(key(r, c, "falling"));
    } else {
      f.blocked.delete(b);
    }
    return true;
  }

  function parseSizes(text) {
    return text.split(/[,;]+|\s{2,}/).map((s) => s.trim()).filter((s) => s.length > 0);
  }

  function pruneOutside(f) {
    const rows = f.heights.length, cols = f.widths.length;
    for (const k of [...f.members.keys()]) {
      const [r, c] = k.split(",").map(Number);
      if (r > rows || c > cols) f.members.delete(k);
    }
    for (const b of [...f.blocked]) {
      const [r, c] = b.split(",").map(Number);
      if (r > rows || c > cols) f.blocked.delete(b);
    }
  }

  // ---------------------------------------------------------------- geometry
  function lines(sizes) {
    const out = [0];
    for (const s of sizes) out.push(out[out.length - 1] + s);
    return out;
  }

  function computeGeometry(f) {
    const xs = lines(f.widthsMm), ys = lines(f.heightsMm);
    const W = xs[xs.length - 1], H = ys[ys.length - 1];
    const big = Math.max(W, H);
    const font = Math.min(big / 42, Math.min(...f.widthsMm) * 0.42, Math.min(...f.heightsMm) * 0.55);
    const left = font * 7.5, right = font * 6.5, top = font * 7.5, bottom = font * 5.5;
    return { xs, ys, W, H, font, left, right, top, bottom, rows: f.heightsMm.length, cols: f.widthsMm.length };
  }

  // SVG coordinates: x to the right from the frame's left edge, y downwards; frame y (up) -> H - y.
  const sy = (g, y) => g.H - y;

  function pointerBay(evt) {
    const g = state.geometry;
    const svg = $("grid");
    const pt = svg.createSVGPoint();
    pt.x = evt.clientX; pt.y = evt.clientY;
    const p = pt.matrixTransform(svg.getScreenCTM().inverse());
    const x = p.x, y = g.H - p.y;
    if (x < 0 || y < 0 || x > g.W || y > g.H) return null;
    let col = 1; while (col < g.cols && x > g.xs[col]) col++;
    let row = 1; while (row < g.rows && y > g.ys[row]) row++;
    const w = g.xs[col] - g.xs[col - 1], h = g.ys[row] - g.ys[row - 1];
    const dx = x - g.xs[col - 1], dy = y - g.ys[row - 1];
    const len = Math.hypot(w, h);
    const toRising = Math.abs(h * dx - w * dy) / len;
    const toFalling = Math.abs(h * dx + w * dy - w * h) / len;
    return { row, col, diag: toRising <= toFalling ? "rising" : "falling" };
  }

  function ends(g, r, c, d) {
    const x0 = g.xs[c - 1], x1 = g.xs[c], y0 = g.ys[r - 1], y1 = g.ys[r];
    return d === "rising" ? [x0, sy(g, y0), x1, sy(g, y1)] : [x0, sy(g, y1), x1, sy(g, y0)];
  }

  // ---------------------------------------------------------------- drawing
  function renderFrameTabs() {
    const nav = $("frames");
    nav.textContent = "";
    state.frames.forEach((f, i) => {
      const b = document.createElement("button");
      b.type = "button";
      b.className = "frame-tab";
      b.textContent = f.name;
      b.dataset.index = String(i);
      b.setAttribute("aria-pressed", String(i === state.current));
      b.addEventListener("click", () => selectFrame(i));
      nav.appendChild(b);
    });
  }

  function selectFrame(i, { check = true } = {}) {
    state.current = i;
    state.selected.clear();
    state.proposal = null;
    $("proposal-card").hidden = true;
    document.querySelectorAll(".frame-tab").forEach((b) => b.setAttribute("aria-pressed", String(Number(b.dataset.index) === i)));
    const f = frame();
    state.cursor = { row: Math.min(state.cursor.row, f.heights.length), col: Math.min(state.cursor.col, f.widths.length), diag: state.cursor.diag };
    fillFrameFields();
    renderGrid();
    renderVerdict(state.checkSeq);
    renderProblems();
    renderForces();
    if (f.general) flash(f.generalNote);
    if (check) scheduleCheck();
  }

  function fillFrameFields() {
    const f = frame();
    $("widths").value = f.widths.join(", ");
    $("heights").value = f.heights.join(", ");
    $("supports").value = f.supports;
  }

  function el(tag, attrs, text) {
    const e = document.createElementNS(SVGNS, tag);
    for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
    if (text !== undefined) e.textContent = text;
    return e;
  }

  function sizeLabel(text) {
    return /^[-+]?[\d.]+(e[-+]?\d+)?$/i.test(text) ? `${text} ${state.unit}` : text;
  }

  function renderGrid() {
    const f = frame();
    const g = computeGeometry(f);
    state.geometry = g;
    state.gridShape = JSON.stringify([f.widthsMm, f.heightsMm, f.widths, f.heights, f.supports, f.size]);
    const svg = $("grid");
    svg.textContent = "";
    svg.setAttribute("viewBox", `${-g.left} ${-g.top} ${g.W + g.left + g.right} ${g.H + g.top + g.bottom}`);
    svg.setAttribute("preserveAspectRatio", "xMidYMid meet");
    svg.dataset.rows = String(g.rows);
    svg.dataset.cols = String(g.cols);
    const defs = el("defs", {});
    const hatch = el("pattern", { id: "hatch", patternUnits: "userSpaceOnUse", width: g.font * 0.7, height: g.font * 0.7, patternTransform: "rotate(45)" });
    hatch.appendChild(el("line", { x1: 0, y1: 0, x2: 0, y2: g.font * 0.7, class: "hatch-line" }));
    defs.appendChild(hatch);
    svg.appendChild(defs);
    const fs = g.font;
    // title
    const size = f.size ? `${f.size.width} × ${f.size.height} ${state.unit}` : "";
    svg.appendChild(el("text", { x: 0, y: -g.top + fs * 1.4, class: "title", "font-size": fs * 1.25 }, `${f.name}`));
    svg.appendChild(el("text", { x: 0, y: -g.top + fs * 2.9, class: "subtitle", "font-size": fs * 0.85 },
      `${g.cols} bays × ${g.rows} rows ${size ? "· " + size : ""} · supports ${f.supports}`));
    // layers, bottom to top
    for (const name of ["shade", "blocked", "openings", "frame", "util", "members", "offers", "marks", "cursor", "labels"]) {
      svg.appendChild(el("g", { id: `layer-${name}`, class: `layer-${name}` }));
    }
    const frameLayer = $("layer-frame");
    for (const x of g.xs) frameLayer.appendChild(el("line", { x1: x, y1: 0, x2: x, y2: g.H, class: "bar" }));
    for (const y of g.ys) frameLayer.appendChild(el("line", { x1: 0, y1: sy(g, y), x2: g.W, y2: sy(g, y), class: "bar" }));
    if (f.supports === "base") {
      frameLayer.appendChild(el("line", { x1: -fs, y1: g.H, x2: g.W + fs, y2: g.H, class: "ground" }));
      for (const x of g.xs) {
        const t = fs * 0.45;
        frameLayer.appendChild(el("path", { d: `M${x} ${g.H} l${-t} ${t * 1.5} h${2 * t} z`, class: "pin" }));
      }
    }
    // labels and dimensions
    const labels = $("layer-labels");
    const dimY = -fs * 1.2, tagY = g.H + (f.supports === "base" ? fs * 2.6 : fs * 1.6);
    for (let c = 1; c <= g.cols; c++) {
      const cx = (g.xs[c - 1] + g.xs[c]) / 2;
      labels.appendChild(el("text", { x: cx, y: tagY, class: "tag", "font-size": fs, "text-anchor": "middle" }, `c${c}`));
      labels.appendChild(el("text", { x: cx, y: dimY - fs * 0.35, class: "dim", "font-size": fs * 0.8, "text-anchor": "middle" }, sizeLabel(f.widths[c - 1] ?? "")));
      labels.appendChild(el("line", { x1: g.xs[c - 1], y1: dimY, x2: g.xs[c], y2: dimY, class: "dimline" }));
    }
    for (const x of g.xs) labels.appendChild(el("line", { x1: x, y1: dimY - fs * 0.4, x2: x, y2: dimY + fs * 0.4, class: "dimline" }));
    const dimX = -fs * 1.3;
    for (let r = 1; r <= g.rows; r++) {
      const cy = sy(g, (g.ys[r - 1] + g.ys[r]) / 2);
      labels.appendChild(el("text", { x: -fs * 3.6, y: cy + fs * 0.35, class: "tag", "font-size": fs, "text-anchor": "middle" }, `r${r}`));
      const t = el("text", { x: dimX - fs * 0.35, y: cy, class: "dim", "font-size": fs * 0.8, "text-anchor": "middle",
        transform: `rotate(-90 ${dimX - fs * 0.35} ${cy})` }, sizeLabel(f.heights[r - 1] ?? ""));
      labels.appendChild(t);
      labels.appendChild(el("line", { x1: dimX, y1: sy(g, g.ys[r - 1]), x2: dimX, y2: sy(g, g.ys[r]), class: "dimline" }));
    }
    for (const y of g.ys) labels.appendChild(el("line", { x1: dimX - fs * 0.4, y1: sy(g, y), x2: dimX + fs * 0.4, y2: sy(g, y), class: "dimline" }));
    if (f.size) {
      labels.appendChild(el("text", { x: g.W / 2, y: dimY - fs * 1.6, class: "dim overall", "font-size": fs * 0.8, "text-anchor": "middle" },
        `overall ${f.size.width} ${state.unit}`));
    }
    // openings
    const openings = $("layer-openings");
    for (const o of f.openings) {
      const pts = o.polygon_mm.map(([x, y]) => `${x},${sy(g, y)}`).join(" ");
      openings.appendChild(el("polygon", { points: pts, class: "opening" }));
      const cx = o.polygon_mm.reduce((s, p) => s + p[0], 0) / o.polygon_mm.length;
      const cy = o.polygon_mm.reduce((s, p) => s + p[1], 0) / o.polygon_mm.length;
      openings.appendChild(el("text", { x: cx, y: sy(g, cy), class: "opening-name", "font-size": fs * 0.85, "text-anchor": "middle" }, o.name));
    }
    renderMembers();
  }

  function renderMembers() {
    const f = frame();
    const g = state.geometry;
    if (!g) return;
    // blocked bays (hatched) — listed ones can be toggled, opening ones cannot
    let html = "";
    const bay = (b, cls) => {
      const [r, c] = b.split(",").map(Number);
      if (r > g.rows || c > g.cols) return "";
      return `<rect x="${g.xs[c - 1]}" y="${sy(g, g.ys[r])}" width="${g.xs[c] - g.xs[c - 1]}" height="${g.ys[r] - g.ys[r - 1]}" class="${cls}"/>`;
    };
    for (const b of f.openingBlocked) html += bay(b, "blocked by-opening");
    for (const b of f.blocked) html += bay(b, "blocked listed");
    $("layer-blocked").innerHTML = html;
    // members
    const critical = new Set();
    const verdict = f.verdict && f.verdict.verdict;
    if (verdict) for (const m of verdict.critical_members) critical.add(key(m.row, m.col, m.diagonal));
    const rated = utilisationView(f);
    html = "";
    let marks = "";
    for (const [k, m] of f.members) {
      const [r, c, d] = k.split(",");
      const R = Number(r), C = Number(c);
      if (R > g.rows || C > g.cols) continue;
      const [x1, y1, x2, y2] = ends(g, R, C, d);
      const bar = rated && rated.diagonals.get(k);
      const util = bar ? ` rated${bar.over ? " over" : ""}" data-colour="${bar.colour}" data-util="${bar.utilisation ?? ""}` : "";
      const cls = `member ${m.kind}${m.existing ? "" : " planned"}${state.selected.has(k) ? " picked" : ""}${util}`;
      html += `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}" class="${cls}" data-key="${k}"/>`;
      if (critical.has(k)) {
        const t = 0.28;
        const px = x1 + (x2 - x1) * t, py = y1 + (y2 - y1) * t;
        marks += `<circle cx="${px}" cy="${py}" r="${g.font * 0.38}" class="crit"/>`;
      }
    }
    $("layer-members").innerHTML = html;
    $("layer-marks").innerHTML = marks;
    $("layer-util").innerHTML = rated ? gridBarsHtml(g, rated.grid) : "";
    // colours go in through the CSS object model: the page's policy allows no inline style attributes
    for (const line of document.querySelectorAll("#grid [data-colour]")) line.style.stroke = line.dataset.colour;
    renderOffers();
    renderShade();
    renderCursor();
  }

  // The utilisation view of the current frame: diagonals by bay key, rated grid bars; null when off.
  function utilisationView(f) {
    if (!f.forces || !f.forces.available || !$("colour-util").checked) return null;
    const diagonals = new Map();
    const grid = [];
    for (const b of f.forces.bars) {
      if (b.kind === "tie" || b.kind === "brace") diagonals.set(key(b.row, b.col, b.diagonal), b);
      else if (b.utilisation !== null) grid.push(b);
    }
    return { diagonals, grid };
  }

  function gridBarsHtml(g, bars) {
    let html = "";
    for (const b of bars) {
      let x1, y1, x2, y2;
      if (b.kind === "standard") { x1 = x2 = g.xs[b.line]; y1 = sy(g, g.ys[b.row - 1]); y2 = sy(g, g.ys[b.row]); }
      else { y1 = y2 = sy(g, g.ys[b.line]); x1 = g.xs[b.col - 1]; x2 = g.xs[b.col]; }
      if (x1 === undefined || y1 === undefined) continue;
      html += `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}" class="grid-util${b.over ? " over" : ""}" data-colour="${b.colour}" data-bar="${esc(b.label)}" data-util="${b.utilisation}"><title>${esc(b.label)}: ${(100 * b.utilisation).toFixed(0)} % (${esc(b.case)})</title></line>`;
    }
    return html;
  }

  function renderForces() {
    const f = frame();
    const card = $("forces-card");
    card.hidden = !f.loadCases.length;
    if (card.hidden) return;
    const box = $("forces-state");
    const list = $("forces-cases");
    list.textContent = "";
    $("forces-limits").textContent = "";
    const fc = f.forces;
    if (!fc) {
      box.dataset.state = "pending";
      box.textContent = f.verdict ? "analysing the load cases…" : "Forces follow the verdict";
      return;
    }
    if (!fc.available) {
      box.dataset.state = "invalid";
      box.textContent = `No forces: ${fc.reason}`;
      $("forces-limits").textContent = fc.model_limits || "";
      return;
    }
    box.dataset.state = fc.ok ? "stable" : "unstable";
    const u = fc.max_utilisation;
    const gov = fc.governing ? ` in ${fc.governing.label}, ${fc.governing.case}` : "";
    box.textContent = u === null
      ? "No capacities given: forces only (see bracegrid forces)"
      : `${fc.ok ? "Within capacity" : "Not within capacity"}: largest utilisation ${(100 * u).toFixed(0)} %${gov}`;
    for (const c of fc.cases) {
      const li = document.createElement("li");
      const word = c.mechanism ? "mechanism" : (c.ok ? "ok" : "over");
      li.dataset.state = word;
      li.textContent = `${c.title}: ${c.mechanism ? "a mechanism (see the verdict)" : (c.max_utilisation === null ? "no capacities" : `${(100 * c.max_utilisation).toFixed(0)} %`)}${word === "over" ? " — over capacity or uplift" : ""}`;
      list.appendChild(li);
    }
    const stops = fc.ramp.map(([at, col]) => `${col} ${100 * at}%`).join(", ");
    $("forces-ramp").style.background = `linear-gradient(to right, ${stops})`;
    $("forces-over").style.background = fc.over_colour;
    $("forces-limits").textContent = fc.model_limits;
  }

  function renderShade() {
    const f = frame();
    const g = state.geometry;
    const verdict = f.verdict && f.verdict.verdict;
    let html = "";
    if (verdict && !verdict.stable) {
      verdict.loose_parts.forEach((p, i) => {
        const colour = PART_COLOURS[i % PART_COLOURS.length];
        for (const r of p.rows) {
          if (r > g.rows) continue;
          html += `<rect x="0" y="${sy(g, g.ys[r])}" width="${g.W}" height="${g.ys[r] - g.ys[r - 1]}" fill="${colour}" class="loose-band"/>`;
        }
        for (const c of p.columns) {
          if (c > g.cols) continue;
          html += `<rect x="${g.xs[c - 1]}" y="0" width="${g.xs[c] - g.xs[c - 1]}" height="${g.H}" fill="${colour}" class="loose-band"/>`;
        }
        const sense = { clockwise: "↻", anticlockwise: "↺", both: "⇄" }[p.direction] || "";
        let x, y, anchor = "start";
        if (p.rows.length) { x = g.W + g.font * 0.6; y = sy(g, (g.ys[p.rows[0] - 1] + g.ys[p.rows[0]]) / 2) + g.font * 0.35; }
        else { const c = p.columns[0]; x = (g.xs[c - 1] + g.xs[c]) / 2; y = g.H + g.font * (frame().supports === "base" ? 4.2 : 3.2); anchor = "middle"; }
        html += `<text x="${x}" y="${y}" font-size="${g.font * 0.9}" text-anchor="${anchor}" fill="${colour}" class="loose-tag">M${i + 1} ${sense}</text>`;
      });
    }
    $("layer-shade").innerHTML = html;
  }

  function renderOffers() {
    const g = state.geometry;
    const p = state.proposal;
    let html = "";
    if (p && p.frame === frame().name) {
      for (const m of p.added) {
        if (m.row > g.rows || m.col > g.cols) continue;
        const [x1, y1, x2, y2] = ends(g, m.row, m.col, m.diagonal);
        html += `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}" class="offer ${m.kind}"/>`;
      }
      for (const m of p.removed) {
        if (m.row > g.rows || m.col > g.cols) continue;
        const [x1, y1, x2, y2] = ends(g, m.row, m.col, m.diagonal);
        const mx = (x1 + x2) / 2, my = (y1 + y2) / 2, s = g.font * 0.5;
        html += `<path d="M${mx - s} ${my - s} L${mx + s} ${my + s} M${mx - s} ${my + s} L${mx + s} ${my - s}" class="offer-out"/>`;
      }
    }
    $("layer-offers").innerHTML = html;
  }

  function renderCursor() {
    const g = state.geometry;
    const { row, col, diag } = state.cursor;
    if (row > g.rows || col > g.cols) { $("layer-cursor").innerHTML = ""; return; }
    const [x1, y1, x2, y2] = ends(g, row, col, diag);
    $("layer-cursor").innerHTML =
      `<rect x="${g.xs[col - 1]}" y="${sy(g, g.ys[row])}" width="${g.xs[col] - g.xs[col - 1]}" height="${g.ys[row] - g.ys[row - 1]}" class="cursor-bay"/>` +
      `<line x1="${x1}" y1="${y1}" x2="${x2}" y2="${y2}" class="cursor-diag"/>`;
  }

  function renderVerdict(seq) {
    const f = frame();
    const box = $("verdict-state");
    const loose = $("loose");
    loose.textContent = "";
    $("critical").textContent = "";
    $("summary").textContent = "";
    if (!f.verdict) {
      box.dataset.state = f.problems.length ? "invalid" : "pending";
      box.textContent = f.problems.length ? "Not checked: fix the fields marked below" : "checking…";
      box.dataset.seq = String(seq);
      state.shownSeq = seq;
      return;
    }
    const v = f.verdict.verdict;
    const s = f.verdict.summary;
    box.dataset.state = v.stable ? "stable" : "unstable";
    box.dataset.seq = String(seq);
    box.textContent = v.stable
      ? "Stable: no mechanism in either racking sense"
      : `Not stable: ${v.racking_modes} racking mode${v.racking_modes === 1 ? "" : "s"} left`;
    v.loose_parts.forEach((p, i) => {
      const li = document.createElement("li");
      const sw = document.createElement("span");
      sw.className = "swatch";
      sw.dataset.part = String(i % PART_COLOURS.length);
      li.appendChild(sw);
      li.appendChild(document.createTextNode(`M${i + 1}: ${p.description}`));
      loose.appendChild(li);
    });
    if (v.stable) {
      const n = v.critical_members.length;
      $("critical").textContent = n === 0
        ? "No critical member: any single member may be lost."
        : `${n} critical member${n === 1 ? "" : "s"} (ringed): losing any one of them leaves a mechanism.`;
    }
    const rows = [
      ["braces", s.braces], ["ties", s.ties], ["members", s.members + (s.proposed ? ` (${s.proposed} proposed)` : "")],
      ["diagonal length", `${s.diagonal_length_m.toFixed(2)} m`], ["cost", money(s.cost)],
      ["count check", `${v.maxwell.count} of ${v.maxwell.needed} needed`],
    ];
    for (const [k, val] of rows) {
      const dt = document.createElement("dt"); dt.textContent = k;
      const dd = document.createElement("dd"); dd.textContent = String(val); dd.dataset.field = k.replace(/ /g, "-");
      $("summary").append(dt, dd);
    }
    state.shownSeq = seq;
  }

  function renderProblems() {
    const f = frame();
    for (const id of ["widths", "heights", "supports"]) {
      const mine = f.problems.filter((p) => p.field === id);
      $(`${id}-message`).textContent = mine.map((p) => p.message).join("\n");
      $(id).classList.toggle("wrong", mine.length > 0);
    }
    const rest = f.problems.filter((p) => !["widths", "heights", "supports"].includes(p.field));
    const ul = $("frame-messages");
    ul.textContent = "";
    for (const p of rest) {
      const li = document.createElement("li");
      li.textContent = p.message;
      ul.appendChild(li);
    }
  }

  function showFileState(text, tone) {
    const p = $("file-state");
    p.textContent = text;
    p.dataset.tone = tone;
  }

  // ---------------------------------------------------------------- pointer and keyboard
  let drag = null;

  function onPointerDown(evt) {
    if (evt.button !== 0) return;
    const hit = pointerBay(evt);
    if (!hit) return;
    if (frame().general) { flash(frame().generalNote); return; }
    evt.preventDefault();
    $("grid").focus();
    state.cursor = { ...hit };
    const f = frame();
    const before = snapshot(f);
    if (state.mode === "diagonal") {
      if (f.blocked.has(bayKey(hit.row, hit.col)) || isOpeningBay(f, hit.row, hit.col)) {
        flash("That bay is kept clear; switch to “Keep clear” to open it.");
        renderCursor();
        return;
      }
      const had = f.members.get(key(hit.row, hit.col, hit.diag));
      const value = CYCLE[had ? had.kind : "none"];
      setDiagonal(f, hit.row, hit.col, hit.diag, value);
      drag = { before, value, diag: hit.diag, seen: new Set([bayKey(hit.row, hit.col)]) };
    } else if (state.mode === "block") {
      if (isOpeningBay(f, hit.row, hit.col)) { flash("An opening covers that bay; it stays clear."); return; }
      const value = !f.blocked.has(bayKey(hit.row, hit.col));
      setBlocked(f, hit.row, hit.col, value);
      drag = { before, value, seen: new Set([bayKey(hit.row, hit.col)]) };
    } else {
      const k = key(hit.row, hit.col, hit.diag);
      if (f.members.has(k)) {
        if (state.selected.has(k)) state.selected.delete(k); else state.selected.add(k);
      }
      updateRepairButton();
      renderMembers();
      return;
    }
    $("grid").setPointerCapture(evt.pointerId);
    renderMembers();
    scheduleCheck();
  }

  function onPointerMove(evt) {
    if (!drag) return;
    const hit = pointerBay(evt);
    if (!hit) return;
    const b = bayKey(hit.row, hit.col);
    if (drag.seen.has(b)) return;
    drag.seen.add(b);
    const f = frame();
    let changed;
    if (state.mode === "diagonal") {
      if (f.blocked.has(b) || isOpeningBay(f, hit.row, hit.col)) return;
      changed = setDiagonal(f, hit.row, hit.col, drag.diag, drag.value);
    } else {
      changed = setBlocked(f, hit.row, hit.col, drag.value);
    }
    state.cursor = { row: hit.row, col: hit.col, diag: drag.diag || state.cursor.diag };
    if (changed) { renderMembers(); scheduleCheck(); }
  }

  function onPointerUp() {
    if (!drag) return;
    const f = frame();
    state.history.push({ frame: state.current, before: drag.before, after: snapshot(f) });
    if (state.history.length > HISTORY_LIMIT) state.history.shift();
    state.future = [];
    drag = null;
    markDirty();
  }

  function onKey(evt) {
    const mod = evt.ctrlKey || evt.metaKey;
    if (mod && evt.key.toLowerCase() === "z") { evt.preventDefault(); if (evt.shiftKey) redo(); else undo(); return; }
    if (mod && evt.key.toLowerCase() === "y") { evt.preventDefault(); redo(); return; }
    if (mod && evt.key.toLowerCase() === "s") { evt.preventDefault(); save(); return; }
    if (document.activeElement !== $("grid")) return;
    if (frame().general) return;
    const f = frame();
    const c = state.cursor;
    const moves = { ArrowLeft: [0, -1], ArrowRight: [0, 1], ArrowUp: [1, 0], ArrowDown: [-1, 0] };
    if (moves[evt.key]) {
      evt.preventDefault();
      const [dr, dc] = moves[evt.key];
      c.row = Math.max(1, Math.min(f.heights.length, c.row + dr));
      c.col = Math.max(1, Math.min(f.widths.length, c.col + dc));
      renderCursor();
      return;
    }
    const k = evt.key.toLowerCase();
    if (k === "d") { c.diag = c.diag === "rising" ? "falling" : "rising"; renderCursor(); return; }
    if (evt.key === " " || evt.key === "Enter") {
      evt.preventDefault();
      if (f.blocked.has(bayKey(c.row, c.col)) || isOpeningBay(f, c.row, c.col)) { flash("That bay is kept clear."); return; }
      const had = f.members.get(key(c.row, c.col, c.diag));
      edit((fr) => setDiagonal(fr, c.row, c.col, c.diag, CYCLE[had ? had.kind : "none"]));
      return;
    }
    if (k === "b") { edit((fr) => setBlocked(fr, c.row, c.col, !fr.blocked.has(bayKey(c.row, c.col)))); return; }
    if (evt.key === "Delete" || evt.key === "Backspace") {
      evt.preventDefault();
      edit((fr) => {
        const a = setDiagonal(fr, c.row, c.col, "rising", "none");
        const b = setDiagonal(fr, c.row, c.col, "falling", "none");
        return a || b;
      });
    }
  }

  let flashTimer = 0;
  function flash(text) {
    const hint = $("hint");
    hint.textContent = text;
    hint.classList.add("flash");
    clearTimeout(flashTimer);
    flashTimer = setTimeout(() => {
      hint.classList.remove("flash");
      hint.textContent = "Click a diagonal to cycle it; drag to paint. Keys: arrows move, Space cycles, D swaps diagonal, B keeps clear, Ctrl+Z / Ctrl+Shift+Z.";
    }, 3500);
  }

  // ---------------------------------------------------------------- jobs
  function solverOptions() {
    const limit = Number($("time-limit").value) || 20;
    const seed = Math.max(0, Math.floor(Number($("seed").value) || 0));
    return { time_limit: Math.max(1, Math.min(600, limit)), seed, stability_only: $("stability-only").checked };
  }

  function updateRepairButton() {
    $("repair").disabled = state.selected.size === 0 || state.job !== null;
  }

  function setBusy(busy) {
    for (const id of ["optimize", "compare"]) $(id).disabled = busy;
    $("cancel").hidden = !busy;
    updateRepairButton();
  }

  async function startJob(kind) {
    if (state.job) return;
    const f = frame();
    const body = { frame: editOf(f), ...solverOptions() };
    if (kind === "repair") {
      body.without = [...state.selected].map((k) => { const [r, c, d] = k.split(","); return { row: Number(r), col: Number(c), diagonal: d }; });
      body.keep_clear = $("keep-clear").checked;
    }
    $("job-message").textContent = "";
    const got = await api("POST", `/api/${kind}`, body);
    if (!got.ok) {
      $("job-message").textContent = got.data.message || "the job did not start";
      return;
    }
    state.job = { id: got.data.job, kind, frame: f.name, source: null };
    setBusy(true);
    $("progress").hidden = false;
    $("progress-stage").textContent = kind === "compare" ? "comparing strategies…" : "starting the solver…";
    for (const id of ["p-cost", "p-bound", "p-gap", "p-time"]) $(id).textContent = "–";
    const source = new EventSource(withToken(got.data.events));
    state.job.source = source;
    source.onmessage = (msg) => onJobEvent(JSON.parse(msg.data));
    source.onerror = () => { if (state.job && state.job.source === source) { source.close(); finishJob("the progress stream broke off"); } };
  }

  function onJobEvent(e) {
    if (!state.job) return;
    if (e.type === "progress") {
      $("progress-stage").textContent = e.stage + (e.steps ? ` (${e.step} of ${e.steps})` : "");
      if ("bound" in e) {
        $("p-cost").textContent = money(e.cost);
        $("p-bound").textContent = money(e.bound);
        $("p-gap").textContent = pct(e.gap);
        $("p-time").textContent = `${e.seconds.toFixed(1)} s`;
      }
      return;
    }
    const job = state.job;
    if (e.type === "done") {
      if (job.kind === "compare") showCompare(e);
      else showProposal(job, e);
      finishJob(`${job.kind} finished in ${e.seconds.toFixed(1)} s`);
    } else if (e.type === "cancelled") {
      finishJob(`${job.kind} cancelled after ${e.seconds.toFixed(1)} s; nothing changed`);
    } else if (e.type === "failed") {
      finishJob(e.message);
    }
  }

  function finishJob(message) {
    if (state.job && state.job.source) state.job.source.close();
    state.job = null;
    setBusy(false);
    $("job-message").textContent = message;
  }

  async function cancelJob() {
    if (!state.job) return;
    $("progress-stage").textContent = "cancelling…";
    await api("POST", `/api/jobs/${state.job.id}/cancel`, {});
  }

  function showProposal(job, e) {
    const s = e.solution;
    state.proposal = { frame: e.frame, added: e.added, removed: e.removed, blocked: e.blocked, solution: s };
    if (e.frame !== frame().name) return;
    const adds = e.added.length, outs = e.removed.length;
    const status = s.status === "optimal" ? "proven cheapest" : `within ${pct(s.gap)} of the bound`;
    $("proposal-text").textContent =
      `${job.kind === "repair" ? "Repair" : "Optimizer"}: ${outs ? `take out ${outs}, ` : ""}add ${adds} member${adds === 1 ? "" : "s"} ` +
      `(${s.new_braces} braces, ${s.new_ties} ties) for ${money(s.added_cost)}; whole layout ${money(s.cost)}, ${status}, ` +
      `by ${s.method}.${s.strength ? ` Loads: ${s.strength.words}.` : ""} Shown dashed in green until accepted.`;
    $("proposal-card").hidden = false;
    renderOffers();
  }

  function acceptProposal() {
    const p = state.proposal;
    if (!p || p.frame !== frame().name) return;
    edit((f) => {
      for (const m of p.removed) f.members.delete(key(m.row, m.col, m.diagonal));
      for (const m of p.added) f.members.set(key(m.row, m.col, m.diagonal), { kind: m.kind, existing: false });
      f.blocked = new Set(p.blocked.map(([r, c]) => bayKey(r, c)));
      return true;
    });
    state.proposal = null;
    state.selected.clear();
    updateRepairButton();
    $("proposal-card").hidden = true;
    renderOffers();
  }

  function discardProposal() {
    state.proposal = null;
    $("proposal-card").hidden = true;
    renderOffers();
  }

  function showCompare(e) {
    const body = $("compare-table").querySelector("tbody");
    body.textContent = "";
    for (const fr of e.frames) {
      for (const s of fr.strategies) {
        const tr = document.createElement("tr");
        for (const v of [s.key, s.status, money(s.cost), money(s.saving), s.braces, s.ties, pct(s.gap)]) {
          const td = document.createElement("td");
          td.textContent = String(v);
          tr.appendChild(td);
        }
        if (s.note) tr.title = s.note;
        body.appendChild(tr);
      }
    }
    const ul = $("compare-files");
    ul.textContent = "";
    for (const file of e.files) {
      const li = document.createElement("li");
      const a = document.createElement("a");
      a.href = withToken(file.href);
      a.textContent = file.name;
      a.target = "_blank";
      a.rel = "noopener";
      li.appendChild(a);
      ul.appendChild(li);
    }
    const note = document.createElement("li");
    note.className = "folder";
    note.textContent = `written to ${e.folder}`;
    ul.appendChild(note);
    $("compare-card").hidden = false;
  }

  // ---------------------------------------------------------------- saving
  async function save() {
    const frames = state.frames.map(editOf);
    const got = await api("POST", "/api/save", { version: state.version, frames });
    if (got.ok) {
      state.version = got.data.version;
      state.dirty = false;
      $("conflict").hidden = true;
      const backup = got.data.backup ? ` (previous version kept as ${got.data.backup})` : "";
      showFileState(`Saved ${got.data.saved}${backup} · version ${got.data.version.slice(0, 8)}`, "ok");
      return;
    }
    if (got.status === 409) {
      $("conflict-text").textContent = got.data.message;
      $("conflict").hidden = false;
      showFileState("Not saved: the file is not the version you edited", "bad");
      return;
    }
    if (got.status === 422 && got.data.problems) {
      for (const f of state.frames) f.problems = got.data.problems.filter((p) => p.frame === null || p.frame === f.name);
      renderProblems();
      const where = got.data.problems.map((p) => p.frame).filter((n) => n && n !== frame().name);
      showFileState(`Not saved: fix the fields marked${where.length ? ` (also in ${[...new Set(where)].join(", ")})` : ""}`, "bad");
      return;
    }
    showFileState(`Not saved: ${got.data.message}`, "bad");
  }

  async function saveCopy() {
    const got = await api("POST", "/api/save-copy", { frames: state.frames.map(editOf) });
    if (got.ok) {
      const p = $("copy-link");
      p.textContent = "Copy saved: ";
      const a = document.createElement("a");
      a.href = withToken(got.data.href);
      a.textContent = got.data.saved;
      p.appendChild(a);
      p.appendChild(document.createTextNode(` in ${got.data.folder}`));
    } else {
      $("copy-link").textContent = `Copy not saved: ${got.data.message}`;
    }
  }

  async function reload() {
    if (state.dirty && !window.confirm("Reload the file from disk? Your unsaved edits will be lost.")) return;
    await loadProject();
  }

  // ---------------------------------------------------------------- wiring
  function sizeFieldChanged(which) {
    const text = $(which).value;
    const values = parseSizes(text);
    edit((f) => {
      if (values.join(",") === f[which].join(",")) return false;
      f[which] = values;
      pruneOutside(f);
      return true;
    });
  }

  function wire() {
    const svg = $("grid");
    $("colour-util").addEventListener("change", () => renderMembers());
    svg.addEventListener("pointerdown", onPointerDown);
    svg.addEventListener("pointermove", onPointerMove);
    svg.addEventListener("pointerup", onPointerUp);
    svg.addEventListener("pointercancel", onPointerUp);
    svg.addEventListener("focus", renderCursor);
    document.addEventListener("keydown", onKey);
    document.querySelectorAll('input[name="mode"]').forEach((r) => r.addEventListener("change", () => {
      state.mode = r.value;
      document.body.dataset.mode = r.value;
    }));
    $("undo").addEventListener("click", undo);
    $("redo").addEventListener("click", redo);
    $("save").addEventListener("click", save);
    $("reload").addEventListener("click", reload);
    $("save-copy").addEventListener("click", saveCopy);
    $("optimize").addEventListener("click", () => startJob("optimize"));
    $("repair").addEventListener("click", () => startJob("repair"));
    $("compare").addEventListener("click", () => startJob("compare"));
    $("cancel").addEventListener("click", cancelJob);
    $("accept").addEventListener("click", acceptProposal);
    $("discard").addEventListener("click", discardProposal);
    for (const which of ["widths", "heights"]) {
      $(which).addEventListener("change", () => sizeFieldChanged(which));
      $(which).addEventListener("keydown", (e) => { if (e.key === "Enter") sizeFieldChanged(which); });
    }
    $("supports").addEventListener("change", () => edit((f) => {
      const v = $("supports").value;
      if (v === f.supports) return false;
      f.supports = v;
      return true;
    }));
    window.addEventListener("beforeunload", (e) => { if (state.dirty) { e.preventDefault(); e.returnValue = ""; } });
    let resizeTimer = 0;
    window.addEventListener("resize", () => { clearTimeout(resizeTimer); resizeTimer = setTimeout(renderGrid, 150); });
  }

  wire();
  loadProject();
})();
