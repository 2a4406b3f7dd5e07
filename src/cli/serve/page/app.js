// lamella designer: the page holds the scene document being edited and
// asks the server for everything it shows. Nothing is computed here.
"use strict";

const token = new URLSearchParams(location.hash.slice(1)).get("token") || "";
const session = Array.from(crypto.getRandomValues(new Uint8Array(8)), (b) => b.toString(16).padStart(2, "0")).join("");
const $ = (id) => document.getElementById(id);

let doc = null;          // the scene document
let info = null;         // /api/session: file, materials, choices, limits
let selected = null;     // path (indices) of the selected stack item
let variablesKey = "";   // pointers of the sliders shown
let targetMode = null;   // "hex" or "lab": the target field edited last
let liveCtl = null;      // the live request in flight
let liveQueued = false;
let slowTimer = null;
let matchJob = null;
let lastLive = null;

// ---- talking to the server -------------------------------------------------

async function call(path, body, signal) {
  const r = await fetch(path, {
    method: body === undefined ? "GET" : "POST",
    headers: { "x-lamella-token": token, "x-lamella-session": session, "content-type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
    signal,
  });
  if (r.ok) return r;
  const e = await r.json().catch(() => ({ error: `${r.status} ${r.statusText}` }));
  const err = new Error(e.error || r.statusText);
  err.superseded = !!e.superseded;
  throw err;
}

function view() {
  const v = (id) => $(id).value || null;
  return { illuminant: v("illuminant"), observer: v("observer"), side: v("side"), polarization: v("polarization"), analyzer: v("analyzer"), gamut: v("gamut") };
}

function target() {
  const hex = $("target-hex").value.trim();
  const lab = $("target-lab").value.trim();
  if (targetMode === "lab" && lab) return { lab };
  if (hex) return { hex };
  if (lab) return { lab };
  return null;
}

function design() {
  return { scene: doc, view: view(), target: target() };
}

// ---- messages ----------------------------------------------------------------

// A message: an error, or with `kind` "ok" (done) or "note" (a warning).
function say(text, kind) {
  const m = $("message");
  m.hidden = !text;
  m.textContent = text || "";
  m.className = kind ? `message ${kind}` : "message";
}

function status(text) {
  $("status").textContent = text;
}

// ---- the stack table -----------------------------------------------------------

function items() {
  if (doc.coating && Array.isArray(doc.coating.platelet)) return doc.coating.platelet;
  if (!Array.isArray(doc.stack)) doc.stack = [];
  return doc.stack;
}

function listOf(path) {
  let list = items();
  for (const i of path.slice(0, -1)) list = list[i].stack;
  return list;
}

function materialNames() {
  const own = Object.keys(doc.materials || {});
  return own.concat(info.materials.filter((m) => !own.includes(m)));
}

function el(tag, attrs, ...kids) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs || {})) {
    if (k === "class") e.className = v;
    else if (k.startsWith("on")) e.addEventListener(k.slice(2), v);
    else e.setAttribute(k, v);
  }
  for (const k of kids) e.append(k);
  return e;
}

function renderStack() {
  $("stack-where").textContent = doc.coating && doc.coating.platelet ? "the coating's platelet" : "top (light side) to substrate";
  const body = $("stack").tBodies[0];
  body.replaceChildren();
  const names = materialNames();
  let n = 0;
  const walk = (list, path, depth) => {
    list.forEach((item, i) => {
      const here = path.concat(i);
      const key = here.join(".");
      const ops = el("td", { class: "ops" },
        el("button", { type: "button", title: "Move up", "aria-label": "Move up", onclick: () => move(here, -1) }, "↑"),
        el("button", { type: "button", title: "Move down", "aria-label": "Move down", onclick: () => move(here, 1) }, "↓"),
        el("button", { type: "button", title: "Remove", "aria-label": "Remove", onclick: () => remove(here) }, "×"));
      const pad = `padding-left:${depth * 14}px`;
      let row;
      if (Array.isArray(item.stack)) {
        const count = el("input", { class: "count", type: "number", min: "1", step: "1", value: item.repeat, "aria-label": "Repeat count" });
        count.addEventListener("input", () => { const c = parseInt(count.value, 10); if (c >= 1) { item.repeat = c; changed(); } });
        row = el("tr", { class: "group" }, el("td", {}, ""), el("td", { style: pad }, "repeat group"), el("td", {}, ""), el("td", { class: "n" }, count), ops);
        body.append(row);
        walk(item.stack, here, depth + 1);
      } else {
        n += 1;
        const sel = el("select", { "aria-label": `Material of layer ${n}` });
        const opts = names.includes(item.material) ? names : [item.material].concat(names);
        for (const m of opts) sel.append(el("option", { value: m }, m));
        sel.value = item.material;
        sel.addEventListener("change", () => { item.material = sel.value; changed(); });
        const t = el("input", { class: "thick", type: "number", min: "0", step: "any", value: item.thickness_nm, "data-key": key, "aria-label": `Thickness of layer ${n}, nm` });
        t.addEventListener("input", () => { const v = parseFloat(t.value); if (v >= 0) { item.thickness_nm = v; syncSliders(); changed(); } });
        const vary = el("button", { type: "button", class: "vary", title: "Let this layer's thickness vary (a slider, and match moves it)" }, item.vary_nm ? `${item.vary_nm[0]}–${item.vary_nm[1]}` : "vary");
        vary.addEventListener("click", () => {
          if (item.vary_nm) delete item.vary_nm;
          else { const x = item.thickness_nm; item.vary_nm = [Math.max(1, Math.round(x * 0.5)), Math.round(x * 1.5 + 1)]; }
          changed(true);
        });
        row = el("tr", {}, el("td", { class: "n" }, String(n)), el("td", { style: pad }, sel), el("td", { class: "n" }, t), el("td", {}, vary), ops);
        body.append(row);
      }
      if (selected && selected.join(".") === key) row.classList.add("selected");
      row.addEventListener("click", (ev) => { if (ev.target.tagName === "TD") { selected = here; renderStack(); } });
    });
  };
  walk(items(), [], 0);
}

function move(path, by) {
  const list = listOf(path);
  const i = path[path.length - 1], j = i + by;
  if (j < 0 || j >= list.length) return;
  [list[i], list[j]] = [list[j], list[i]];
  selected = path.slice(0, -1).concat(j);
  changed(true);
}

function remove(path) {
  const list = listOf(path);
  list.splice(path[path.length - 1], 1);
  selected = null;
  changed(true);
}

function insert(item) {
  const path = selected || [items().length - 1];
  const list = selected ? listOf(path) : items();
  const at = selected ? path[path.length - 1] + 1 : list.length;
  list.splice(at, 0, item);
  selected = path.slice(0, -1).concat(at);
  changed(true);
}

// ---- sliders for the vary_nm layers --------------------------------------------

function atPointer(pointer) {
  let o = doc;
  for (const part of pointer.split("/").slice(1)) o = o[part.replace(/~1/g, "/").replace(/~0/g, "~")];
  return o;
}

function renderSliders(variables) {
  const key = variables.map((v) => `${v.pointer}:${v.low_nm}:${v.high_nm}`).join(",");
  if (key === variablesKey) return;
  variablesKey = key;
  const box = $("sliders");
  box.replaceChildren();
  if (!variables.length) {
    box.append(el("p", { class: "hint" }, "Mark a layer's thickness range with “vary” in the table to get a slider."));
    return;
  }
  variables.forEach((v, i) => {
    const layer = atPointer(v.pointer);
    const label = `${v.material} (${v.pointer.replace(/^\//, "").replace(/\//g, " ")})`;
    const range = el("input", { type: "range", min: v.low_nm, max: v.high_nm, step: "1", value: layer.thickness_nm, "data-pointer": v.pointer, "aria-label": `Thickness of ${label}, nm`, id: `slider-${i}` });
    const number = el("input", { type: "number", min: v.low_nm, max: v.high_nm, step: "any", value: layer.thickness_nm, "data-pointer": v.pointer, "aria-label": `Thickness of ${label}, nm (typed)` });
    const set = (x, from) => {
      if (!(x >= v.low_nm && x <= v.high_nm)) return;
      layer.thickness_nm = x;
      if (from !== range) range.value = x;
      if (from !== number) number.value = x;
      const cell = document.querySelector(`#stack input.thick[data-key="${keyOf(v.pointer)}"]`);
      if (cell) cell.value = x;
      changed();
    };
    range.addEventListener("input", () => set(parseFloat(range.value), range));
    number.addEventListener("input", () => set(parseFloat(number.value), number));
    box.append(el("div", { class: "slider" },
      el("div", { class: "name" }, el("b", {}, v.material), ` · ${v.low_nm}–${v.high_nm} nm · ${v.pointer}`),
      range, number));
  });
}

// The table's key ("0.1") of a layer pointer ("/stack/0/stack/1").
function keyOf(pointer) {
  return pointer.split("/").filter((p) => /^\d+$/.test(p)).join(".");
}

function syncSliders() {
  for (const input of document.querySelectorAll("#sliders input")) {
    const layer = atPointer(input.dataset.pointer);
    if (document.activeElement !== input) input.value = layer.thickness_nm;
  }
}

// ---- live results ---------------------------------------------------------------

function changed(structure) {
  if (structure) renderStack();
  scheduleLive();
  clearTimeout(slowTimer);
  slowTimer = setTimeout(atRest, 350);
}

function scheduleLive() {
  if (liveQueued) return;
  liveQueued = true;
  requestAnimationFrame(() => { liveQueued = false; sendLive(false); });
}

// `fine`: the design is at rest, so the strip is drawn at full sampling.
async function sendLive(fine) {
  // A newer request supersedes the one in flight: the server drops the
  // older one at its next check.
  if (liveCtl) liveCtl.abort();
  const ctl = (liveCtl = new AbortController());
  const started = performance.now();
  try {
    // The strip is drawn at the width it is shown, so its columns meet cleanly.
    const width = Math.min(2400, Math.max(320, Math.round($("strip").clientWidth)));
    const r = await (await call("/api/live", { ...design(), fine, strip_width: width }, ctl.signal)).json();
    if (ctl !== liveCtl) return;
    liveCtl = null;
    showLive(r);
    status(`${r.server_ms.toFixed(0)} ms server · ${(performance.now() - started).toFixed(0)} ms round trip`);
  } catch (e) {
    if (ctl !== liveCtl) return;
    liveCtl = null;
    if (e.name !== "AbortError" && !e.superseded) { say(e.message); status("error"); }
  }
}

function chart(box, part) {
  if (!part) { box.replaceChildren(); return; }
  if (part.svg) box.innerHTML = part.svg;
  else box.replaceChildren(el("div", { class: "chart-error" }, part.error));
}

function fmt(x, d) { return Number(x).toFixed(d).replace("-", "−"); }

function showLive(r) {
  lastLive = r;
  say(r.warnings.join("\n"), "note");
  chart($("strip"), r.strip);
  chart($("ab"), r.ab);
  const sw = $("swatches");
  sw.replaceChildren();
  (r.colours || []).forEach((c, i) => {
    const [R, G, B] = c.srgb.map((x) => Math.round(x * 255));
    const chip = el("div", { class: c.in_gamut ? "chip" : "chip out", style: `background:rgb(${R},${G},${B})`, "data-angle": c.angle_deg, "data-rgb": `${R},${G},${B}`, title: c.in_gamut ? c.hex : `${c.hex}: outside sRGB, shown approximately` });
    const de = r.delta_e00 ? el("span", { class: r.delta_e00[i] <= 1 ? "de near" : "de" }, `ΔE ${fmt(r.delta_e00[i], 1)}`) : "";
    chip.title += ` · L* ${fmt(c.L, 1)} a* ${fmt(c.a, 1)} b* ${fmt(c.b, 1)}`;
    sw.append(el("div", { class: "swatch" }, chip, el("b", {}, `${fmt(c.angle_deg, 0)}°`), c.hex.replace("≈", ""), el("br"),
      `L* ${fmt(c.L, 1)}`, el("br"), de));
  });
  renderSliders(r.variables || []);
  // Match targets: the scene's angles, or a coating's geometries.
  const sel = $("match-angle");
  const keep = sel.value;
  const points = r.coating ? r.coating.geometries.map((g) => g.name) : (r.colours || []).map((c) => String(c.angle_deg));
  if (sel.options.length !== points.length || [...sel.options].some((o, i) => o.value !== points[i])) {
    sel.replaceChildren(...points.map((p) => el("option", { value: p }, r.coating ? p : `${p}°`)));
    if (points.includes(keep)) sel.value = keep;
  }
  $("tab-geometries").hidden = !r.coating;
  if (r.coating) showCoating(r.coating);
  document.body.dataset.liveCount = String(Number(document.body.dataset.liveCount || 0) + 1);
}

function showCoating(c) {
  const t = $("geometries");
  t.replaceChildren(el("tr", {}, ...["geometry", "", "L*", "a*", "b*", "C*", "h°", "hex"].map((h) => el("th", {}, h))));
  for (const g of c.geometries) {
    const [R, G, B] = g.srgb.map((x) => Math.round(x * 255));
    t.append(el("tr", {}, el("td", {}, g.name), el("td", { class: "chipcell" }, el("span", { style: `background:rgb(${R},${G},${B})` })),
      ...[g.L, g.a, g.b, g.C, g.h].map((x) => el("td", { class: "n" }, fmt(x, 1))), el("td", {}, g.hex)));
  }
  const notes = [];
  if (c.flop_index !== undefined) notes.push(`flop index ${fmt(c.flop_index, 2)}`);
  if (c.hue_travel_deg !== undefined) notes.push(`hue travel ${fmt(c.hue_travel_deg, 1)}°`);
  if (notes.length) t.append(el("tr", {}, el("td", { colspan: "8" }, notes.join(" · "))));
  chart($("coating-ab"), c.ab);
  if (!lastLive.colours) { $("strip").replaceChildren(el("div", { class: "chart-error" }, "A coating: its colour per geometry is under Geometries.")); }
}

// ---- spectra and preview: after a pause, for the tab in view -------------------------

function currentTab() {
  return document.querySelector(".tabs [aria-selected=true]").dataset.tab;
}

// The design has not changed for a moment: the fine strip, and the view in
// the open tab.
function atRest() {
  sendLive(true);
  updateSlow();
}

async function updateSlow() {
  const tab = currentTab();
  if (tab === "spectra") {
    const angles = $("spectra-angles").value.split(",").map((s) => parseFloat(s)).filter((x) => !Number.isNaN(x));
    try {
      const r = await (await call("/api/spectra-chart", { ...design(), angles, transmittance: $("spectra-t").checked })).json();
      chart($("spectra"), r);
    } catch (e) { if (!e.superseded) chart($("spectra"), { error: e.message }); }
  } else if (tab === "preview") {
    renderInto($("preview"), "360x270");
  }
}

async function renderInto(img, size) {
  try {
    const r = await call("/api/render", { ...design(), size });
    const url = URL.createObjectURL(await r.blob());
    if (img.src.startsWith("blob:")) URL.revokeObjectURL(img.src);
    img.src = url;
  } catch (e) {
    if (!e.superseded) { img.removeAttribute("src"); img.alt = e.message; say(e.message); }
  }
}

// ---- match ----------------------------------------------------------------------------

async function startMatch() {
  const t = target();
  if (!t) { say("Give a target colour first (hex, L*,a*,b* or the picker)."); return; }
  const point = $("match-angle").value;
  const body = { ...design(), max_evals: parseInt($("match-evals").value, 10) || 6000, seed: 1 };
  if (lastLive && lastLive.coating) body.geometry = point; else body.angle = parseFloat(point || "0");
  try {
    const r = await (await call("/api/match", body)).json();
    matchJob = r.job;
    $("match").disabled = true;
    $("cancel").disabled = false;
    $("match-info").textContent = "searching…";
    pollMatch();
  } catch (e) { say(e.message); }
}

async function pollMatch() {
  if (matchJob === null) return;
  let r;
  try { r = await (await call(`/api/match/${matchJob}`)).json(); } catch (e) { say(e.message); return endMatch(); }
  $("progress-bar").style.width = `${Math.min(100, (100 * r.evaluations) / r.max_evals)}%`;
  $("match-info").textContent = `${r.evaluations} of ${r.max_evals} evaluations` + (r.best_cost !== undefined ? ` · best cost ${fmt(r.best_cost, 2)}` : "");
  if (r.state === "running" || r.state === "cancelling") { setTimeout(pollMatch, 200); return; }
  if (r.state === "done") {
    doc = r.scene;
    variablesKey = "";
    changed(true);
    const rep = r.report;
    $("match-info").textContent = `matched: ΔE00 ${fmt(rep.delta_e00, 2)} at the target (${rep.reachable ? "reached" : "not reached"}; stopped: ${rep.stopped}, ${rep.evaluations} evaluations). The stack now holds the match.`;
    $("progress-bar").style.width = "100%";
  } else if (r.state === "cancelled") {
    $("match-info").textContent = `cancelled after ${r.evaluations} evaluations; the design is unchanged.`;
  } else {
    say(r.error || "the match failed");
    $("match-info").textContent = "failed";
  }
  document.body.dataset.matchState = r.state;
  endMatch();
}

function endMatch() {
  matchJob = null;
  $("match").disabled = false;
  $("cancel").disabled = true;
}

async function cancelMatch() {
  if (matchJob === null) return;
  $("cancel").disabled = true;
  try { await call(`/api/match/${matchJob}/cancel`, {}); } catch (e) { say(e.message); }
}

// ---- save, download, report -------------------------------------------------------------

function text() { return JSON.stringify(doc, null, 2) + "\n"; }

async function save() {
  try {
    const r = await (await call("/api/save", { scene: doc })).json();
    say(`Saved to ${r.saved}.`, "ok");
    document.body.dataset.saved = r.saved;
  } catch (e) { say(e.message); }
}

function download() {
  const a = el("a", { href: URL.createObjectURL(new Blob([text()], { type: "application/json" })), download: (info.file || "design.json").split("/").pop() });
  document.body.append(a);
  a.click();
  a.remove();
}

async function report() {
  const w = window.open("", "_blank");
  try {
    const r = await call("/api/report", design());
    const url = URL.createObjectURL(new Blob([await r.text()], { type: "text/html" }));
    if (w) w.location = url; else location.assign(url);
  } catch (e) { if (w) w.close(); say(e.message); }
}

// ---- start ------------------------------------------------------------------------------------

function fillChoices() {
  const ill = $("illuminant");
  ill.replaceChildren(el("option", { value: "" }, `scene (${doc.illuminant && typeof doc.illuminant === "string" ? doc.illuminant : "its own"})`),
    ...info.illuminants.map((n) => el("option", { value: n }, n)));
  const obs = $("observer");
  obs.replaceChildren(el("option", { value: "" }, `scene (${doc.observer || "CIE1964_10"})`), ...info.observers.map((n) => el("option", { value: n }, n)));
}

function wire() {
  for (const id of ["illuminant", "observer", "side", "polarization", "analyzer", "gamut"]) $(id).addEventListener("change", () => changed());
  $("target-picker").addEventListener("input", () => { $("target-hex").value = $("target-picker").value.toUpperCase(); targetMode = "hex"; changed(); });
  $("target-hex").addEventListener("input", () => {
    targetMode = "hex";
    const v = $("target-hex").value.trim();
    if (/^#?[0-9a-fA-F]{6}$/.test(v)) { $("target-picker").value = v.startsWith("#") ? v : `#${v}`; changed(); } else if (!v) changed();
  });
  $("target-lab").addEventListener("input", () => { targetMode = "lab"; if (/^\s*-?[\d.]+\s*,\s*-?[\d.]+\s*,\s*-?[\d.]+\s*$/.test($("target-lab").value) || !$("target-lab").value.trim()) changed(); });
  $("add-layer").addEventListener("click", () => {
    const near = selected ? listOf(selected)[selected[selected.length - 1]] : null;
    insert({ material: near && near.material ? near.material : "sio2_film", thickness_nm: 100 });
  });
  $("add-group").addEventListener("click", () => insert({ repeat: 2, stack: [{ material: "tio2", thickness_nm: 60 }, { material: "sio2_film", thickness_nm: 90 }] }));
  $("match").addEventListener("click", startMatch);
  $("cancel").addEventListener("click", cancelMatch);
  $("save").addEventListener("click", save);
  $("download").addEventListener("click", download);
  $("report").addEventListener("click", report);
  $("render-large").addEventListener("click", () => { $("large").showModal(); renderInto($("large-img"), "960x720"); });
  $("spectra-angles").addEventListener("change", updateSlow);
  $("spectra-t").addEventListener("change", updateSlow);
  for (const b of document.querySelectorAll(".tabs button")) {
    b.addEventListener("click", () => {
      for (const o of document.querySelectorAll(".tabs button")) o.setAttribute("aria-selected", String(o === b));
      for (const t of document.querySelectorAll(".tab")) t.hidden = t.id !== `tab-${b.dataset.tab}`;
      updateSlow();
    });
  }
}

// For tests: whether every live request has been answered.
window.lamella = { idle: () => liveCtl === null && !liveQueued, doc: () => doc };

async function start() {
  if (!token) { say("This page needs the full address lamella serve printed (it ends in #token=…)."); return; }
  try {
    info = await (await call("/api/session")).json();
  } catch (e) { say(e.message); return; }
  doc = info.scene;
  $("file").textContent = info.file ? `${info.file} — ${doc.title || "untitled"}` : `starter design (not saved to a file) — ${doc.title || ""}`;
  $("save").disabled = !info.can_save;
  if (!info.can_save) $("save").title = "Started without a scene file: download the JSON instead";
  $("cautions").replaceChildren(...info.cautions.map((c) => el("li", {}, c)));
  $("version").textContent = `lamella ${info.version}`;
  fillChoices();
  wire();
  renderStack();
  changed();
}

start();
