// SVG preview of a section model: regions coloured by material, exposed outline pieces in
// their environment's colour with the surface resistance, adiabatic pieces dashed, probes.

import { h, replace, s } from "../dom.js";
import { classifyOutline, inRing, inUnion } from "../lib/outline.js";
import { firstFree, textBox } from "../lib/labels.js";
import { boundsOf, linePath, ringPath, toScreen, toWorld } from "../lib/viewport.js";
import { ADIABATIC, environmentColours, lambdaText, materialColours } from "../palette.js";
import { attachPanZoom } from "./panzoom.js";
import { scaleBar } from "./scalebar.js";

/** A zoomable preview figure of `section`. */
export function sectionPreview(section, library = []) {
  const model = prepare(section, library);
  const svg = s("svg", { class: "drawing-svg", role: "img", testid: "section-preview",
    "aria-label": `Section preview: ${section.name || "unnamed section"}` });
  const tip = h("div", { class: "tooltip", hidden: true, role: "status" });
  const surface = h("div", { class: "surface", tabindex: 0,
    "aria-label": "Section drawing; + and − zoom, arrow keys pan, 0 fits" }, svg, tip);
  const zoom = attachPanZoom(surface, () => model.box, (view) => draw(svg, model, view, surface));
  surface.addEventListener("pointermove", (e) => hover(e, surface, tip, model, zoom.view()));
  surface.addEventListener("pointerleave", () => { tip.hidden = true; });
  return h("figure", { class: "drawing" },
    h("div", { class: "drawing-head" }, h("span", { class: "drawing-title" },
      section.name || "Section", section.unit ? ` · ${section.unit}` : ""), zoom.toolbar),
    surface, legend(model));
}

/** Section materials by id, a library material's λ filled in where the section names one. */
function materialsOf(section, library) {
  const lib = new Map(library.map((m) => [m.id, m]));
  return new Map((section.materials || []).map((m) => {
    const row = m.conductivity === undefined && lib.get(m.library);
    return [m.id, row ? { ...m, conductivity: row.conductivity, libraryName: row.name } : m];
  }));
}

function prepare(section, library) {
  const regions = section.regions || [];
  const materials = materialsOf(section, library);
  return {
    section,
    regions,
    materials,
    colours: materialColours([...regions.map((r) => materials.get(r.material) || { id: r.material })]),
    envColours: environmentColours(section.environments || []),
    outline: classifyOutline(section),
    box: boundsOf(regions.map((r) => r.polygon)),
  };
}

function draw(svg, model, view, surface) {
  if (!view) return;
  const regionPaths = model.regions.map((r, i) => s("path", {
    d: [r.polygon, ...(r.holes || [])].map((ring) => ringPath(view, ring)).join(""),
    fill: model.colours.get(r.material), "fill-rule": "evenodd", class: "region",
    "data-region": i,
  }));
  const adiabatic = model.outline.adiabatic.map((seg) =>
    s("path", { d: linePath(view, seg), class: "edge-adiabatic", stroke: ADIABATIC }));
  const exposed = model.outline.exposed.map((e) =>
    s("path", { d: linePath(view, e.segment), class: "edge-exposed",
      stroke: model.envColours.get(e.environment) }));
  replace(svg, s("g", {}, regionPaths), s("g", {}, adiabatic), s("g", {}, exposed),
    resistanceLabels(model, view, surface.clientWidth, surface.clientHeight), probes(model.section.probes || [], view),
    scaleBar(view, model.section.unit, surface.clientHeight || 400));
}

/** One "Rs" label per boundary, outside the section beside its longest exposed piece, kept
 * inside the drawing and clear of the other labels. */
function resistanceLabels(model, view, width, height) {
  const longest = new Map();
  for (const e of model.outline.exposed) {
    const len = Math.hypot(e.segment[1][0] - e.segment[0][0], e.segment[1][1] - e.segment[0][1]);
    if (!longest.has(e.boundary) || longest.get(e.boundary).len < len) {
      longest.set(e.boundary, { len, seg: e.segment });
    }
  }
  const taken = [];
  const labels = [];
  for (const [bd, { seg }] of longest) {
    const text = `${bd.environment} · ${rsText(bd.surface_resistance)}`;
    const [sx, sy] = outsidePoint(model, view, seg);
    const half = textBox(0, 0, text, RS_FONT).x1 / 2;
    const x = width ? Math.min(Math.max(sx, half + 2), width - half - 2) : sx;
    const candidates = [0, 16, -16, 32, -32].map((dy) => ({ x, y: sy + dy, box: textBox(x, sy + dy, text, RS_FONT, "middle") }));
    const chosen = firstFree(candidates, taken, width ? { x0: 0, y0: 0, x1: width, y1: height } : null, true);
    labels.push(s("text", { x: chosen.x, y: chosen.y, class: "rs-label", "text-anchor": "middle",
      fill: model.envColours.get(bd.environment) }, text));
  }
  return s("g", {}, labels);
}

/** A surface resistance with its unit; Rs 0 is a known surface temperature. */
export function rsText(rs) {
  return rs === 0 ? "known temperature (Rs 0)" : `Rs ${rs} m²·K/W`;
}

const RS_FONT = 12;

function outsidePoint(model, view, [a, b]) {
  const [ax, ay] = toScreen(view, ...a);
  const [bx, by] = toScreen(view, ...b);
  const len = Math.hypot(bx - ax, by - ay) || 1;
  const [nx, ny] = [-(by - ay) / len, (bx - ax) / len];
  const mx = (ax + bx) / 2;
  const my = (ay + by) / 2;
  const probe = toWorld(view, mx + nx * 4, my + ny * 4);
  const sign = inUnion(probe[0], probe[1], model.regions) ? -1 : 1;
  const off = Math.abs(nx) > 0.7 ? 46 : 14;
  return [mx + sign * nx * off, my + sign * ny * off + 4];
}

function probes(list, view) {
  return s("g", {}, list.map((p) => {
    const [x, y] = toScreen(view, ...p.point);
    return s("g", { class: "probe" },
      s("circle", { cx: x, cy: y, r: 4.5 }),
      s("line", { x1: x - 8, y1: y, x2: x + 8, y2: y }),
      s("line", { x1: x, y1: y - 8, x2: x, y2: y + 8 }),
      s("text", { x: x + 8, y: y - 8 }, p.id));
  }));
}

function hover(event, surface, tip, model, view) {
  if (!view) return;
  const rect = surface.getBoundingClientRect();
  const [sx, sy] = [event.clientX - rect.left, event.clientY - rect.top];
  const [x, y] = toWorld(view, sx, sy);
  const region = [...model.regions].reverse().find((r) =>
    inRing(x, y, r.polygon) && !(r.holes || []).some((hole) => inRing(x, y, hole)));
  if (!region) { tip.hidden = true; return; }
  const mat = model.materials.get(region.material) || {};
  const lam = mat.cavity ? "air cavity: λeq computed per cavity"
    : mat.conductivity !== undefined ? `λ ${lambdaText(mat.conductivity)} W/(m·K)` : `library ${mat.library ?? ""}`;
  replace(tip, h("strong", {}, region.material), mat.libraryName ? h("span", {}, mat.libraryName) : null,
    h("span", {}, lam));
  tip.hidden = false;
  tip.style.left = `${Math.min(sx + 14, rect.width - 160)}px`;
  tip.style.top = `${sy + 14}px`;
}

function legend(model) {
  const mats = [...model.colours].map(([id, colour]) => {
    const m = model.materials.get(id) || {};
    const lam = m.cavity ? "air cavity" : m.conductivity !== undefined
      ? `λ ${lambdaText(m.conductivity)} W/(m·K)` : `library ${m.library}`;
    return h("li", { title: m.libraryName || m.description || "" }, swatch(colour, "fill"), h("span", {}, id),
      h("span", { class: "muted" }, lam));
  });
  const envs = (model.section.environments || []).map((env) => h("li", {},
    swatch(model.envColours.get(env.id), "line"), h("span", {}, env.id),
    h("span", { class: "muted" }, `${env.side}, ${env.temperature} °C`)));
  return h("figcaption", { class: "legend" },
    h("ul", { class: "legend-list", "aria-label": "Materials" }, mats),
    h("ul", { class: "legend-list", "aria-label": "Environments" }, envs,
      h("li", {}, swatch(ADIABATIC, "dash"), h("span", {}, "adiabatic"),
        h("span", { class: "muted" }, "cut-off or symmetry"))));
}

function swatch(colour, kind) {
  const el = h("span", { class: `swatch swatch-${kind}`, "aria-hidden": "true" });
  if (kind === "fill") el.style.background = colour;
  else el.style.borderColor = colour;
  return el;
}
