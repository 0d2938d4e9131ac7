// pansite explorer: the page. Plain JavaScript, no library, nothing from elsewhere.
// The server draws every image; the page asks for them by standpoint and shows the newest.
"use strict";

const token = new URLSearchParams(location.search).get("token") || "";
const pageId = Math.random().toString(36).slice(2, 10);
const $ = (id) => document.getElementById(id);

// Where the viewer stands and looks (metres, degrees), and what is drawn.
const view = { x: 0, y: 0, ground: null, eye: 1.6, heading: 0, pitch: 0 };
const look = { azimuth: 0, pitch: 0 };
let scene = null;
let plan = null; // { image, pxPerMetre, originX, originY }
const stats = { underlay: [], look: [] };
window.pansiteExplorer = { view, look, stats, picks: [], probe: null, p95 };

function p95(list) {
  if (!list.length) return null;
  const sorted = [...list].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.ceil(0.95 * sorted.length) - 1)];
}

function round(v, places) {
  const k = 10 ** places;
  return Math.round(v * k) / k;
}

// The ground under the viewer: a standpoint's own (a balcony, a raised floor), kept as it
// moves; for any other none is sent, and the server stands the viewer on the scene's ground
// wherever it goes (down a hill, the eye follows it).
function groundQuery() {
  return view.ground === null ? "" : `&ground=${round(view.ground, 3)}`;
}

function moveTo(x, y) {
  [view.x, view.y] = [x, y];
}

function standpointQuery(heading, pitch) {
  return `x=${round(view.x, 3)}&y=${round(view.y, 3)}${groundQuery()}` +
    `&eye=${round(view.eye, 3)}&heading=${round(heading, 2)}&pitch=${round(pitch, 2)}`;
}

function hiddenQuery() {
  return `hidden=${$("hidden").value}`;
}

// The aids asked of the underlay (and of a print), as the server's parameters: each means
// what `pansite render`'s option of the same job means, so the page draws what it would.
function aidParams() {
  const step = $("grid-step").value;
  if (step === "off") return { grid: "off" };
  const on = (id) => ($(id).checked ? "on" : "off");
  const p = { grid: "on", step, labels: on("aid-labels"), names: on("aid-names"),
    vanishing: on("aid-vanishing") };
  const bearing = Number($("fan-bearing").value);
  if ($("aid-fan").checked && $("fan-bearing").value !== "" && Number.isFinite(bearing)) {
    p.fan = bearing;
    p.fan_step = $("fan-step").value;
  }
  const [px, py] = [$("pole-x").value, $("pole-y").value];
  if ($("aid-pole").checked && px !== "" && py !== "") {
    p.pole_x = Number(px);
    p.pole_y = Number(py);
  }
  if ($("aid-divide").checked && $("divide-item").value) {
    p.divide = $("divide-item").value;
    p.parts = $("divide-parts").value;
  }
  if (scene && scene.sun) {
    p.sun_path = on("sun-path");
    p.seasons = on("sun-seasons");
  }
  return p;
}

function aidQuery() {
  return new URLSearchParams(aidParams()).toString();
}

// Each pane has at most one request in flight; while it is out, only the latest wish is
// remembered and asked for when it returns (the server also replaces waiting requests).
const panes = {
  underlay: { busy: false, again: false, url: () => {
    const c = $("underlay");
    return `/underlay.png?${standpointQuery(view.heading, view.pitch)}&w=${c.width}&h=${c.height}` +
      `&${hiddenQuery()}&${aidQuery()}&tone=${$("tone").value}` +
      `&pane=u${pageId}`;
  } },
  look: { busy: false, again: false, url: () => {
    const c = $("look");
    return `/look.png?${standpointQuery(look.azimuth, look.pitch)}&w=${c.width}&h=${c.height}` +
      `&fov=${$("fov").value}&${hiddenQuery()}&pane=l${pageId}`;
  } },
};

async function ask(name) {
  const pane = panes[name];
  if (pane.busy) { pane.again = true; return; }
  pane.busy = true;
  pane.again = false;
  const url = pane.url();
  const started = performance.now();
  try {
    const response = await fetch(url);
    if (response.status === 200) {
      const bitmap = await createImageBitmap(await response.blob());
      const ms = performance.now() - started;
      stats[name].push(ms);
      if (stats[name].length > 500) stats[name].shift();
      const canvas = $(name);
      const g = canvas.getContext("2d");
      g.drawImage(bitmap, 0, 0);
      canvas.dataset.shown = url;
      canvas.dataset.version = response.headers.get("X-Scene-Version") || "";
      $("status").textContent = `drawn in ${response.headers.get("X-Render-Ms")} ms; ` +
        `p95 underlay ${fmt(p95(stats.underlay), 0)} ms, look ${fmt(p95(stats.look), 0)} ms`;
    } else if (response.status !== 204) {
      say(await response.text(), true);
    }
  } catch (e) {
    say(`the explorer does not answer (${e.message})`, true);
  } finally {
    pane.busy = false;
    if (pane.again) ask(name);
  }
}

// True when neither pane has a request out or waiting (the tests wait for it).
window.pansiteSettled = () =>
  !panes.underlay.busy && !panes.underlay.again && !panes.look.busy && !panes.look.again;

function redraw() {
  ask("underlay");
  ask("look");
  drawPlan();
  showWhere();
}

function fmt(v, places) {
  return v === null || v === undefined ? "-" : Number(v).toFixed(places);
}

function say(text, bad) {
  const m = $("message");
  m.textContent = text;
  m.className = bad ? "bad" : "";
}

function showWhere() {
  $("where").textContent = `x ${fmt(view.x, 2)} m, y ${fmt(view.y, 2)} m`;
  $("heading").value = round(view.heading, 1);
  $("pitch").value = view.pitch;
  $("pitch-value").textContent = `${fmt(view.pitch, 0)}°`;
  $("eye").value = round(view.eye, 2);
  $("fov-value").textContent = `${$("fov").value}°`;
}

// ---- the plan ----

function toPlan(x, y) {
  return [(x - plan.originX) * plan.pxPerMetre, (plan.originY - y) * plan.pxPerMetre];
}

function fromPlan(px, py) {
  return [plan.originX + px / plan.pxPerMetre, plan.originY - py / plan.pxPerMetre];
}

const ARROW_PX = 34;

function arrowTip() {
  const [px, py] = toPlan(view.x, view.y);
  const h = (view.heading * Math.PI) / 180;
  return [px + ARROW_PX * Math.sin(h), py - ARROW_PX * Math.cos(h)];
}

function drawPlan() {
  const canvas = $("plan");
  const g = canvas.getContext("2d");
  g.fillStyle = "#fff";
  g.fillRect(0, 0, canvas.width, canvas.height);
  if (!plan) return;
  g.drawImage(plan.image, 0, 0);
  const [px, py] = toPlan(view.x, view.y);
  // The look-around's field as a wedge.
  const fov = (Number($("fov").value) * Math.PI) / 180;
  const a = (look.azimuth * Math.PI) / 180;
  g.fillStyle = "rgba(47, 93, 138, 0.14)";
  g.beginPath();
  g.moveTo(px, py);
  g.arc(px, py, 70, a - fov / 2 - Math.PI / 2, a + fov / 2 - Math.PI / 2);
  g.closePath();
  g.fill();
  // The heading arrow and the standpoint.
  const [tx, ty] = arrowTip();
  g.strokeStyle = "#2f5d8a";
  g.fillStyle = "#2f5d8a";
  g.lineWidth = 2;
  g.beginPath();
  g.moveTo(px, py);
  g.lineTo(tx, ty);
  g.stroke();
  g.beginPath();
  g.arc(tx, ty, 5, 0, 2 * Math.PI);
  g.fill();
  g.beginPath();
  g.arc(px, py, 6, 0, 2 * Math.PI);
  g.fillStyle = "#fff";
  g.fill();
  g.stroke();
  // The measuring pole, if one is asked for: a small square.
  const pole = aidParams();
  if (pole.pole_x !== undefined) {
    const [qx, qy] = toPlan(pole.pole_x, pole.pole_y);
    g.strokeStyle = "#a3402a";
    g.lineWidth = 2;
    g.strokeRect(qx - 4, qy - 4, 8, 8);
  }
}

// Places the pole (Shift-click on the plan), switching it on.
function placePole(x, y) {
  $("pole-x").value = round(x, 2);
  $("pole-y").value = round(y, 2);
  $("aid-pole").checked = true;
}

// A switched-on fan or pole with no values yet starts from the view: the fan towards the
// heading, the pole ten metres ahead.
function fillAidDefaults() {
  if ($("aid-fan").checked && $("fan-bearing").value === "") {
    $("fan-bearing").value = Math.round(view.heading);
  }
  if ($("aid-pole").checked && ($("pole-x").value === "" || $("pole-y").value === "")) {
    const h = (view.heading * Math.PI) / 180;
    placePole(view.x + 10 * Math.sin(h), view.y + 10 * Math.cos(h));
  }
}

function showAidSwitches() {
  $("aids-over").disabled = $("grid-step").value === "off";
}

let drag = null;

function planPoint(event) {
  const canvas = $("plan");
  const r = canvas.getBoundingClientRect();
  return [((event.clientX - r.left) * canvas.width) / r.width,
    ((event.clientY - r.top) * canvas.height) / r.height];
}

function setLookTo(azimuth) {
  look.azimuth = ((azimuth % 360) + 360) % 360;
}

function planDown(event) {
  if (!plan) return;
  const [px, py] = planPoint(event);
  if (event.shiftKey) {
    placePole(...fromPlan(px, py));
    redraw();
    return;
  }
  const [tx, ty] = arrowTip();
  $("plan").setPointerCapture(event.pointerId);
  if (Math.hypot(px - tx, py - ty) <= 10) {
    drag = { mode: "turn" };
  } else {
    drag = { mode: "move", last: [px, py] };
    moveTo(...fromPlan(px, py));
  }
  redraw();
}

function planMove(event) {
  if (!drag) return;
  const [px, py] = planPoint(event);
  if (drag.mode === "turn") {
    const [sx, sy] = toPlan(view.x, view.y);
    view.heading = round(((Math.atan2(px - sx, sy - py) * 180) / Math.PI + 360) % 360, 1);
    setLookTo(view.heading);
  } else {
    const [lx, ly] = drag.last;
    if (Math.hypot(px - lx, py - ly) >= 3) {
      // The look-around turns towards where the standpoint is dragged.
      setLookTo((Math.atan2(px - lx, ly - py) * 180) / Math.PI);
      drag.last = [px, py];
    }
    moveTo(...fromPlan(px, py));
  }
  redraw();
}

function planUp() {
  drag = null;
}

// ---- the underlay: hover read-out and kept points ----

let probing = false;
let probeWanted = null;

function underlayPoint(event) {
  const canvas = $("underlay");
  const r = canvas.getBoundingClientRect();
  return [((event.clientX - r.left) * canvas.width) / r.width,
    ((event.clientY - r.top) * canvas.height) / r.height];
}

async function probe(u, v) {
  if (probing) { probeWanted = [u, v]; return null; }
  probing = true;
  const c = $("underlay");
  try {
    const url = `/probe?${standpointQuery(view.heading, view.pitch)}&w=${c.width}&h=${c.height}` +
      `&u=${round(Math.min(Math.max(u, 0), c.width), 2)}&v=${round(Math.min(Math.max(v, 0), c.height), 2)}`;
    const response = await fetch(url);
    if (response.status !== 200) return null;
    const found = await response.json();
    window.pansiteExplorer.probe = found;
    showProbe(found);
    return found;
  } finally {
    probing = false;
    if (probeWanted) {
      const [pu, pv] = probeWanted;
      probeWanted = null;
      probe(pu, pv);
    }
  }
}

function describeCorner(c) {
  if (!c) return "no corner";
  return `${c.item}, corner (${fmt(c.x, 2)}, ${fmt(c.y, 2)}, ${fmt(c.z, 2)}) ${fmt(c.off_deg, 1)}° off`;
}

function showProbe(found) {
  const r = $("readout");
  r.dataset.azimuth = found.azimuth;
  r.dataset.elevation = found.elevation;
  r.textContent = `azimuth ${fmt(found.azimuth, 2)}°, elevation ${fmt(found.elevation, 2)}°, ` +
    `distance ${found.distance === null ? "open sky or ground beyond" : fmt(found.distance, 2) + " m"}; ` +
    `nearest: ${describeCorner(found.corner)}`;
}

async function keepPoint(event) {
  const [u, v] = underlayPoint(event);
  const found = await probe(u, v);
  if (!found) return;
  window.pansiteExplorer.picks.push(found);
  const row = document.createElement("tr");
  const cells = [window.pansiteExplorer.picks.length, `${fmt(found.azimuth, 2)}°`,
    `${fmt(found.elevation, 2)}°`, found.distance === null ? "-" : `${fmt(found.distance, 2)} m`,
    describeCorner(found.corner)];
  for (const text of cells) {
    const td = document.createElement("td");
    td.textContent = text;
    row.appendChild(td);
  }
  $("picks").tBodies[0].appendChild(row);
}

// ---- the look-around: drag to turn ----

let lookDrag = null;

function lookDown(event) {
  $("look").setPointerCapture(event.pointerId);
  lookDrag = { x: event.clientX, y: event.clientY };
}

function lookMove(event) {
  if (!lookDrag) return;
  const r = $("look").getBoundingClientRect();
  const perPx = Number($("fov").value) / r.width;
  setLookTo(look.azimuth - (event.clientX - lookDrag.x) * perPx);
  look.pitch = Math.max(-80, Math.min(80, look.pitch + (event.clientY - lookDrag.y) * perPx));
  lookDrag = { x: event.clientX, y: event.clientY };
  ask("look");
  drawPlan();
}

// ---- keyboard: arrows move, Alt (or Ctrl) with arrows turns; Shift for larger steps ----

function onKey(event) {
  const tag = (event.target.tagName || "").toLowerCase();
  if (tag === "input" || tag === "select" || tag === "textarea") return;
  const keys = { ArrowUp: [0, 1], ArrowDown: [0, -1], ArrowLeft: [-1, 0], ArrowRight: [1, 0] };
  const k = keys[event.key];
  if (!k) return;
  event.preventDefault();
  const big = event.shiftKey ? 10 : 1;
  if (event.altKey || event.ctrlKey) {
    view.heading = ((view.heading + k[0] * 5 * big) % 360 + 360) % 360;
    view.pitch = Math.max(-60, Math.min(60, view.pitch + k[1] * 2 * big));
    setLookTo(view.heading);
    look.pitch = view.pitch;
  } else {
    moveTo(view.x + k[0] * 0.5 * big, view.y + k[1] * 0.5 * big);
  }
  redraw();
}

// ---- keep and print ----

async function post(path, body) {
  const response = await fetch(path, {
    method: "POST",
    headers: { "Content-Type": "application/json", "X-Pansite-Token": token },
    body: JSON.stringify(body),
  });
  const type = response.headers.get("Content-Type") || "";
  const answer = type.includes("json") ? await response.json() : { error: await response.text() };
  return [response.status, answer];
}

function viewBody() {
  const body = { x: round(view.x, 3), y: round(view.y, 3),
    eye: round(view.eye, 3), heading: round(view.heading, 2), pitch: round(view.pitch, 2),
    hidden: $("hidden").value };
  if (view.ground !== null) body.ground = round(view.ground, 3);
  return body;
}

// The items a division may name, and the sun's switches when the scene has a sun.
function showSceneAids() {
  const select = $("divide-item");
  const chosen = select.value;
  select.replaceChildren();
  for (const label of scene.labels || []) {
    const option = document.createElement("option");
    option.value = label;
    option.textContent = label;
    select.appendChild(option);
  }
  if ((scene.labels || []).includes(chosen)) {
    select.value = chosen;
  } else if (chosen) {
    // The item divided is gone from the saved scene: divide nothing rather than another.
    $("aid-divide").checked = false;
  }
  $("aid-divide").disabled = !(scene.labels || []).length;
  const box = $("sun-aids");
  if (scene.sun && box.hidden) {
    $("sun-path").checked = scene.sun.path;
    $("sun-seasons").checked = scene.sun.seasons;
  }
  box.hidden = !scene.sun;
}

async function keep() {
  const name = $("keep-name").value.trim();
  if (!name) { say("give the standpoint a name first", true); return; }
  const body = viewBody();
  delete body.hidden;
  body.name = name;
  const [status, answer] = await post("/keep", body);
  if (status === 200) {
    say(`kept "${answer.name}" in ${answer.file}`);
    $("keep-name").value = "";
  } else {
    say(answer.error || `refused (${status})`, true);
  }
}

async function print() {
  const body = viewBody();
  body.paper = $("paper").value;
  body.format = $("format").value;
  body.tone = $("tone").value;
  Object.assign(body, aidParams());
  say("printing...");
  const [status, answer] = await post("/print", body);
  say(status === 200 ? `written: ${answer.file}` : answer.error || `refused (${status})`, status !== 200);
}

// ---- the scene and its changes ----

async function loadScene(first) {
  const response = await fetch("/scene");
  scene = await response.json();
  $("scene-name").textContent = scene.name;
  const select = $("standpoints");
  select.replaceChildren();
  scene.standpoints.forEach((s, i) => {
    const option = document.createElement("option");
    option.value = i;
    option.textContent = s.name;
    select.appendChild(option);
  });
  if (first && scene.standpoints.length) {
    choose(scene.default || 0);
    select.value = scene.default || 0;
  }
  $("keep").disabled = !scene.keep;
  $("keep-name").disabled = !scene.keep;
  $("keep").title = scene.keep ? "" : scene.no_keep_reason;
  if (!scene.keep) say(`keeping standpoints is off: ${scene.no_keep_reason}`);
  showProblem(scene.problem);
  showSceneAids();
  await loadPlan();
  redraw();
}

function choose(index) {
  const s = scene.standpoints[index];
  Object.assign(view, { x: s.x, y: s.y, ground: s.own_ground ? s.ground : null, eye: s.eye,
    heading: s.heading, pitch: s.pitch });
  look.azimuth = s.heading;
  look.pitch = s.pitch;
}

async function loadPlan() {
  const canvas = $("plan");
  const response = await fetch(`/plan.png?w=${canvas.width}&h=${canvas.height}&pane=p${pageId}`);
  if (response.status !== 200) return;
  const image = await createImageBitmap(await response.blob());
  plan = {
    image,
    pxPerMetre: Number(response.headers.get("X-Plan-Px-Per-Metre")),
    originX: Number(response.headers.get("X-Plan-Origin-X")),
    originY: Number(response.headers.get("X-Plan-Origin-Y")),
  };
  window.pansiteExplorer.plan = { pxPerMetre: plan.pxPerMetre, originX: plan.originX, originY: plan.originY };
}

function showProblem(message) {
  const box = $("problem");
  box.hidden = !message;
  box.textContent = message ? `The scene could not be read; the last good drawing stays.\n${message}` : "";
}

function listen() {
  const events = new EventSource("/events");
  events.addEventListener("scene", () => loadScene(false));
  events.addEventListener("problem", (e) => showProblem(JSON.parse(e.data).message));
}

// ---- sizes: each image at its pane's resolution ----

function fitCanvases() {
  const ratio = Math.min(window.devicePixelRatio || 1, 2);
  const u = $("underlay");
  const width = Math.min(4096, 2 * Math.round((u.getBoundingClientRect().width * ratio) / 2));
  if (width >= 64 && width !== u.width) { u.width = width; u.height = width / 2; }
  const l = $("look");
  const lw = Math.min(2048, Math.round(l.getBoundingClientRect().width * ratio));
  if (lw >= 64 && lw !== l.width) { l.width = lw; l.height = Math.round((lw * 9) / 16); }
}

function start() {
  fitCanvases();
  const plan = $("plan");
  plan.addEventListener("pointerdown", planDown);
  plan.addEventListener("pointermove", planMove);
  plan.addEventListener("pointerup", planUp);
  plan.addEventListener("pointercancel", planUp);
  const u = $("underlay");
  u.addEventListener("mousemove", (e) => { const [a, b] = underlayPoint(e); probe(a, b); });
  u.addEventListener("click", keepPoint);
  const l = $("look");
  l.addEventListener("pointerdown", lookDown);
  l.addEventListener("pointermove", lookMove);
  l.addEventListener("pointerup", () => { lookDrag = null; });
  document.addEventListener("keydown", onKey);
  $("standpoints").addEventListener("change", (e) => { choose(Number(e.target.value)); redraw(); });
  $("heading").addEventListener("change", (e) => {
    const h = Number(e.target.value);
    if (Number.isFinite(h)) { view.heading = ((h % 360) + 360) % 360; setLookTo(view.heading); redraw(); }
  });
  $("pitch").addEventListener("input", (e) => { view.pitch = Number(e.target.value); look.pitch = view.pitch; redraw(); });
  $("eye").addEventListener("change", (e) => {
    const v = Number(e.target.value);
    if (Number.isFinite(v) && v >= 0 && v <= 1000) { view.eye = v; redraw(); }
  });
  $("standing").addEventListener("click", () => { view.eye = scene.standing_eye; redraw(); });
  $("seated").addEventListener("click", () => { view.eye = scene.seated_eye; redraw(); });
  $("hidden").addEventListener("change", redraw);
  const aidChanged = () => { fillAidDefaults(); showAidSwitches(); ask("underlay"); drawPlan(); };
  for (const input of document.querySelectorAll("#aids input, #aids select")) {
    input.addEventListener("change", aidChanged);
  }
  $("tone").addEventListener("change", () => ask("underlay"));
  $("fov").addEventListener("input", () => { showWhere(); ask("look"); drawPlan(); });
  $("keep").addEventListener("click", keep);
  $("print").addEventListener("click", print);
  window.addEventListener("resize", () => { fitCanvases(); redraw(); });
  if (!token) say("opened without the token: keeping and printing are refused; open the address pansite printed", true);
  loadScene(true).then(listen);
}

start();
