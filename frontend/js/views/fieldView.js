// The temperature field of an evaluation: the nodal field rasterised through Coldseam's
// thermal colour map, isotherms, piece outlines, exposed and adiabatic edges, the lowest
// interior surface temperatures marked, air cavities hatched, a colour bar in °C and a readout
// under the cursor (a cavity's λeq when over one).

import { h, replace, s } from "../dom.js";
import { buildLocator, locate } from "../lib/barycentric.js";
import { HATCH_ID, hatchSpec, materialText } from "../lib/cavities.js";
import { isolines, niceLevels } from "../lib/contour.js";
import { thermalLut } from "../lib/colormap.js";
import { fixed } from "../lib/format.js";
import { degrees, firstFree, textBox } from "../lib/labels.js";
import { rasterise } from "../lib/raster.js";
import { boundsOf, linePath, ringPath, toScreen, toWorld } from "../lib/viewport.js";
import { ADIABATIC, environmentColours } from "../palette.js";
import { colourBar } from "./colourBar.js";
import { attachPanZoom } from "./panzoom.js";
import { scaleBar } from "./scalebar.js";

/** A zoomable figure of `field` (FIELD_FORMAT of the engine). */
export function fieldFigure(field) {
  const model = prepare(field);
  const canvas = h("canvas", { class: "field-canvas", testid: "field-canvas" });
  const overlay = s("svg", { class: "field-overlay", role: "img", testid: "field-overlay",
    "aria-label": `Temperature field, ${fixed(model.lo, 1)} to ${fixed(model.hi, 1)} °C` });
  const surface = h("div", { class: "surface field-surface", tabindex: 0,
    "aria-label": "Temperature field; + and − zoom, arrow keys pan, 0 fits" }, canvas, overlay);
  const readout = h("p", { class: "readout", testid: "field-readout", "aria-live": "polite" },
    "Point at the field to read the temperature.");
  const zoom = attachPanZoom(surface, () => model.box, (view) => draw(canvas, overlay, surface, model, view));
  surface.addEventListener("pointermove", (e) => hover(e, surface, readout, model, zoom.view()));
  const focus = minimumBox(model);
  if (focus) {
    zoom.toolbar.prepend(h("button", { type: "button", testid: "zoom-minimum", title: "Zoom to the lowest interior surface temperature",
      onclick: () => zoom.zoomTo(focus) }, "θsi,min"));
  }
  return h("figure", { class: "drawing field" },
    h("div", { class: "drawing-head" }, h("span", { class: "drawing-title" }, "Temperature field, design run"), zoom.toolbar),
    h("div", { class: "field-row" }, surface, colourBar(model.lo, model.hi, model.levels)),
    readout, minLegend(model));
}

function prepare(field) {
  const temps = field.temperature;
  let lo = Infinity;
  let hi = -Infinity;
  for (const t of temps) { lo = Math.min(lo, t); hi = Math.max(hi, t); }
  const levels = niceLevels(lo, hi, 10);
  return {
    field, lo, hi, levels,
    lines: levels.map((level) => ({ level, lines: isolines(field.points, field.triangles, temps, level) })),
    locator: buildLocator(field.points, field.triangles),
    envColours: environmentColours((field.boundaries || []).map((b) => ({ id: b.environment, side: b.side }))),
    box: boundsOf([field.points]),
  };
}

function draw(canvas, overlay, surface, model, view) {
  const width = surface.clientWidth;
  const height = surface.clientHeight;
  if (!view || !width || !height || !surface.isConnected) return;
  const dpr = window.devicePixelRatio || 1;
  canvas.width = Math.round(width * dpr);
  canvas.height = Math.round(height * dpr);
  canvas.style.width = `${width}px`;
  canvas.style.height = `${height}px`;
  const ctx = canvas.getContext("2d");
  const image = ctx.createImageData(canvas.width, canvas.height);
  const { points, triangles, temperature } = model.field;
  rasterise({ rgba: image.data, width: canvas.width, height: canvas.height,
    view: { scale: view.scale * dpr, tx: view.tx * dpr, ty: view.ty * dpr },
    points, triangles, values: temperature, lo: model.lo, hi: model.hi, lut: thermalLut() });
  ctx.putImageData(image, 0, 0);
  overlay.setAttribute("viewBox", `0 0 ${width} ${height}`);
  const area = { x0: 0, y0: 0, x1: width, y1: height };
  const taken = [];
  const markers = minMarkers(model.field, view, taken, area); // marks first: isotherm labels keep clear
  replace(overlay, pieces(model.field, view), cavities(model.field, view),
    isothermPaths(model, view, taken, area), edges(model, view), markers, scaleBar(view, "m", height));
}

function pieces(field, view) {
  return s("g", { class: "pieces" }, (field.pieces || []).map((p) => s("path", {
    d: [p.polygon, ...(p.holes || [])].map((ring) => ringPath(view, ring)).join(""), class: "piece" })));
}

/** Air cavities in Coldseam's hatch; each path names its cavity for tests and tools. */
function cavities(field, view) {
  const drawn = (field.cavities || []).filter((c) => (c.rings || []).length);
  if (!drawn.length) return null;
  const build = ([tag, attrs, children]) => s(tag, attrs, ...(children || []).map(build));
  return s("g", { class: "cavities", testid: "field-cavities" }, s("defs", {}, build(hatchSpec())),
    drawn.map((c) => s("path", { d: c.rings.map((ring) => ringPath(view, ring)).join(""), class: "cavity",
      fill: `url(#${HATCH_ID})`, "fill-rule": "evenodd", "data-region": c.region })));
}

function isothermPaths(model, view, taken, area) {
  return s("g", { class: "isotherms" }, model.lines.map(({ level, lines }) => s("g", {},
    lines.map((line) => s("path", { d: linePath(view, line), class: "isotherm" })),
    isothermLabel(level, lines, view, taken, area))));
}

const LABEL_SPOTS = [0.5, 0.3, 0.7, 0.15, 0.85, 0.4, 0.6];
const ISO_FONT = 11;

/** A label "12.5 °C" on the longest piece of an isotherm, where it covers no label placed so far. */
function isothermLabel(level, lines, view, taken, area) {
  const longest = lines.reduce((a, b) => (b.length > (a?.length || 0) ? b : a), null);
  if (!longest || longest.length < 4) return null;
  const text = degrees(level);
  const screen = longest.map((p) => toScreen(view, ...p));
  const along = [0];
  for (let i = 1; i < screen.length; i++) {
    along.push(along[i - 1] + Math.hypot(screen[i][0] - screen[i - 1][0], screen[i][1] - screen[i - 1][1]));
  }
  const total = along[along.length - 1];
  if (total < 3 * textBox(0, 0, text, ISO_FONT).x1) return null; // too short to carry its label
  // spots by length along the line, not by point count: points crowd where the mesh is fine
  const candidates = LABEL_SPOTS.map((f) => {
    const k = Math.max(0, along.findIndex((d) => d >= f * total));
    const [x, y] = screen[k];
    return { x, y: y - 3, box: textBox(x, y - 3, text, ISO_FONT, "middle") };
  });
  const chosen = firstFree(candidates, taken, area);
  return chosen ? s("text", { x: chosen.x, y: chosen.y, class: "isotherm-label", "text-anchor": "middle" }, text) : null;
}

function edges(model, view) {
  const exposed = (model.field.boundaries || []).flatMap((b) => b.segments.map((seg) =>
    s("path", { d: linePath(view, seg), class: "edge-exposed", stroke: model.envColours.get(b.environment) })));
  const adiabatic = (model.field.adiabatic || []).map((seg) =>
    s("path", { d: linePath(view, seg), class: "edge-adiabatic", stroke: ADIABATIC }));
  return s("g", {}, adiabatic, exposed);
}

/** The lowest interior surface temperatures: design run and condensation run. */
function interiorMinima(field) {
  const interior = new Set((field.boundaries || []).filter((b) => b.side === "interior").map((b) => b.environment));
  const known = knownTemperatureSurfaces(field);
  const out = Object.entries(field.min_surface || {})
    .filter(([env]) => (interior.has(env) || !interior.size) && !known.has(env))
    .map(([env, m]) => ({ kind: "design", env, ...m }));
  if (field.condensation_min) out.push({ kind: "condensation", env: "", ...field.condensation_min });
  return out;
}

/** Environments whose surfaces all have Rs = 0: their temperature is given, a minimum there marks nothing. */
function knownTemperatureSurfaces(field) {
  const rs = new Map();
  for (const b of field.boundaries || []) rs.set(b.environment, [...(rs.get(b.environment) || []), b.surface_resistance]);
  return new Set([...rs].filter(([, list]) => list.every((r) => r === 0)).map(([env]) => env));
}

/** A box around the lowest interior surface temperature: a fifth of the section, 0.4 m at least. */
function minimumBox(model) {
  const first = interiorMinima(model.field)[0];
  if (!first) return null;
  const { x0, y0, x1, y1 } = model.box;
  const half = Math.max(0.2, 0.1 * Math.max(x1 - x0, y1 - y0));
  const [x, y] = first.at;
  return { x0: x - half, y0: y - half, x1: x + half, y1: y + half };
}

const MIN_FONT = 12;
const MIN_OFFSETS = [[10, -14], [10, 22], [-10, -14], [-10, 22], [10, 40], [-10, 40], [10, -32], [-10, -32]];

/** Markers of the lowest interior surface temperatures, each label where it covers no other. */
function minMarkers(field, view, taken, area) {
  const minima = interiorMinima(field).map((m) => ({ ...m, xy: toScreen(view, ...m.at) }));
  for (const { xy: [x, y] } of minima) taken.push({ x0: x - 7, y0: y - 7, x1: x + 7, y1: y + 7 });
  return s("g", { class: "min-markers" }, minima.map((m) => {
    const [x, y] = m.xy;
    const design = m.kind === "design";
    const text = design ? `θsi,min ${fixed(m.temperature, 2)} °C` : `fRsi run ${fixed(m.temperature, 2)} °C`;
    const order = design ? MIN_OFFSETS : [MIN_OFFSETS[1], MIN_OFFSETS[0], ...MIN_OFFSETS.slice(2)];
    const chosen = firstFree(order.map(([dx, dy]) => {
      const anchor = dx < 0 ? "end" : "start";
      return { x: x + dx, y: y + dy, anchor, box: textBox(x + dx, y + dy, text, MIN_FONT, anchor) };
    }), taken, area, true);
    return s("g", { class: `min-marker ${m.kind}` },
      design ? s("circle", { cx: x, cy: y, r: 6 }) : s("rect", { x: x - 5, y: y - 5, width: 10, height: 10 }),
      s("text", { x: chosen.x, y: chosen.y, "text-anchor": chosen.anchor, class: "min-label",
        testid: design ? "min-surface-label" : "condensation-min-label" }, text));
  }));
}

function minLegend(model) {
  const items = interiorMinima(model.field).map((m) => h("li", {},
    h("span", { class: `marker-key ${m.kind}`, "aria-hidden": "true" }),
    m.kind === "design" ? `Lowest surface temperature${m.env ? ` (${m.env})` : ""}, design run: ${fixed(m.temperature, 2)} °C`
      : `Lowest interior surface temperature, fRsi run (Rsi for fRsi): ${fixed(m.temperature, 2)} °C`));
  return h("figcaption", { class: "legend" }, h("ul", { class: "legend-list" }, items,
    h("li", {}, h("span", { class: "swatch swatch-iso", "aria-hidden": "true" }),
      `isotherms every ${model.levels.length > 1 ? fixed(model.levels[1] - model.levels[0], 1) : "—"} K`)));
}

function hover(event, surface, readout, model, view) {
  if (!view) return;
  const rect = surface.getBoundingClientRect();
  const [x, y] = toWorld(view, event.clientX - rect.left, event.clientY - rect.top);
  const hit = locate(model.locator, x, y);
  if (!hit) { replace(readout, "Outside the section."); return; }
  const tri = model.field.triangles[hit.triangle];
  const theta = hit.weights.reduce((sum, w, k) => sum + w * model.field.temperature[tri[k]], 0);
  const mat = model.field.materials?.[model.field.material?.[hit.triangle]];
  const flux = model.field.heat_flux?.[hit.triangle];
  replace(readout, h("strong", {}, `θ ${fixed(theta, 2)} °C`),
    ` at (${fixed(x * 1000, 0)}, ${fixed(y * 1000, 0)}) mm`,
    mat ? ` · ${materialText(mat)}` : "",
    Number.isFinite(flux) ? ` · |q| ${fixed(flux, 1)} W/m²` : "");
}
