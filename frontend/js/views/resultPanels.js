// The figures of a result: headline tiles (ψ, L2D, fRsi with its verdict, θsi,min), tables of
// heat flows, ψ terms (and U_f of a frame), condensation check, air cavities, probes, mesh
// convergence, the sensitivity chart, warnings and the caution.

import { card, h, s } from "../dom.js";
import { uTimesL } from "../lib/figures.js";
import { fixed, percent, pointMm, sig } from "../lib/format.js";
import { cavityRows } from "../lib/cavities.js";
import { barLayout, sensitivityBars } from "../lib/sensitivity.js";
import { pairs, scroller, table } from "./tables.js";

function tile(label, value, unit, testid, extra) {
  return h("div", { class: "tile" }, h("span", { class: "tile-label" }, label),
    h("span", { class: "tile-value" }, h("span", { testid }, value), unit ? h("span", { class: "tile-unit" }, unit) : null),
    extra || null);
}

/** Pass/fail badge of the condensation verdict, with the criterion in words. */
export function verdictBadge(c, testid = "verdict") {
  if (!c || !c.verdict) return h("span", { class: "badge badge-none", testid }, "not assessed");
  const pass = c.verdict === "pass";
  return h("span", { class: `badge ${pass ? "badge-pass" : "badge-fail"}`, testid,
    title: `fRsi ${fixed(c.fRsi, 3)} against the critical ${fixed(c.fRsi_critical, 3)}` },
  h("span", { "aria-hidden": "true" }, pass ? "\u2713 " : "\u2717 "), pass ? "Pass" : "Fail");
}

function minInterior(result) {
  const temps = Object.values(result.surfaces || {}).filter((x) => x.side !== "exterior")
    .map((x) => x.min_temperature).filter(Number.isFinite);
  return temps.length ? Math.min(...temps) : null;
}

/** Why a figure is not given, when the result says so (null values with a reason). */
function singularNote(result) {
  return result.mesh?.certified_on === "temperatures" ? "not given: the heat flow is unbounded where known temperatures meet" : null;
}

/** The headline strip. */
export function headline(result) {
  const c = result.condensation;
  const unbounded = singularNote(result);
  const crit = c && c.fRsi_critical !== null && c.fRsi_critical !== undefined
    ? `critical ${fixed(c.fRsi_critical, 3)} (${c.criterion === "fixed" ? "fixed" : "mould, ISO 13788"})` : "";
  const psiNote = unbounded && result.psi ? unbounded : result.psi ? null : "no flanking elements given";
  return h("div", { class: "headline" },
    tile("Linear thermal transmittance ψ", result.psi ? fixed(result.psi.value, 4) : "—", "W/(m·K)", "psi-value",
      psiNote ? h("span", { class: "tile-note" }, psiNote) : null),
    tile("Thermal coupling coefficient L2D", result.L2D != null ? fixed(result.L2D, 4) : "—", "W/(m·K)", "l2d-value",
      result.L2D != null ? null : h("span", { class: "tile-note", testid: "l2d-note" },
        unbounded && result.L2D === null ? unbounded : l2dReason(result))),
    tile("Temperature factor fRsi", c ? fixed(c.fRsi, 3) : "—", "", "frsi-value",
      h("span", { class: "tile-note" }, verdictBadge(c), " ", c?.not_assessed ? "see the condensation card" : crit)),
    tile("Lowest interior surface temperature θsi,min", fixed(minInterior(result), 2), "°C", "theta-min"));
}

/** Why a result has no L2D: it is defined between exactly two environments. */
function l2dReason(result) {
  const n = Object.keys(result.heat_flows || {}).length;
  if (n > 2) return `${n} environments: L2D is defined between two; see the coupling coefficients Lij below`;
  return "not computed for this section";
}

function heatFlowCard(result) {
  const rows = Object.entries(result.heat_flows || {}).map(([env, q]) => [env, fixed(q, 3), "W/m"]);
  if (result.L2D != null) rows.push(["L2D", fixed(result.L2D, 5), "W/(m·K)"]);
  const body = [pairs(rows)];
  const L = result.coupling_coefficients;
  if (L && typeof L === "object") body.push(couplingTable(L));
  const reason = result.mesh?.heat_flow_singular?.reason;
  if (reason) body.push(h("p", { class: "muted", testid: "heat-flow-singular" }, `No heat flow: ${reason}.`));
  return card("Heat flows (into the section)", body);
}

function couplingTable(L) {
  const ids = L.environments || [];
  return scroller(table(["Lij W/(m·K)", ...ids], ids.map((id, i) => [id, ...ids.map((_, j) => sig(L.matrix?.[i]?.[j], 4))]),
    { testid: "coupling" }));
}

function psiCard(psi) {
  if (!psi) return card("ψ", h("p", { class: "muted" }, "ψ needs flanking elements in the request (psi.flanking)."));
  const rows = (psi.flanking || []).map((f) => [f.source && f.source !== "given" ? `${f.id} (U from cut)` : f.id,
    fixed(f.u_value, 4), fixed(f.length, 3), fixed(f.UL ?? uTimesL(f), 4)]);
  return card("ψ = L2D − Σ U·l",
    scroller(table(["Flanking element", "U W/(m²·K)", "l m", "U·l W/(m·K)"], rows, { testid: "psi-terms" })),
    pairs([["L2D", fixed(psi.L2D, 5), "W/(m·K)"], ["Σ U·l", fixed(psi.sum_UL, 5), "W/(m·K)"],
      ["ψ", fixed(psi.value, 5), "W/(m·K)"], psi.dimensions ? ["Dimensions", psi.dimensions, ""] : null,
      psi.frame ? ["U_f (frame, calibration panel)", fixed(psi.frame.u_frame, 4), "W/(m²·K)", "u-frame"] : null]));
}

function cavitiesCard(cavities) {
  if (!cavities || !cavities.length) return null;
  return card(`Air cavities (${cavities.length})`,
    table(["Cavity", "b mm", "d mm", "Heat flow", "λeq W/(m·K)"], cavityRows(cavities), { testid: "cavity-table" }),
    h("p", { class: "muted" }, "λeq = d·(ha + hr), ISO 10077-2; b across and d along the heat flow."));
}

function condensationCard(result) {
  const c = result.condensation;
  const surfaces = Object.entries(result.surfaces || {}).map(([env, x]) =>
    [`Lowest surface temperature, ${env}${x.side ? ` (${x.side})` : ""}`, fixed(x.min_temperature, 2), "°C"]);
  if (!c) return card("Surface temperatures", pairs(surfaces));
  if (c.not_assessed) {
    return card("Condensation and mould (ISO 13788)",
      h("p", { class: "verdict-line" }, verdictBadge(c, "verdict-detail"), ` ${c.not_assessed}.`), pairs(surfaces));
  }
  return card("Condensation and mould (ISO 13788)",
    h("p", { class: "verdict-line" }, verdictBadge(c, "verdict-detail"), ` fRsi ${fixed(c.fRsi, 3)} ${c.verdict === "pass" ? "≥" : "<"} ${fixed(c.fRsi_critical, 3)}`),
    pairs([...surfaces,
      ["θsi,min, fRsi run", fixed(c.min_temperature, 2), "°C"],
      ["at", pointMm(c.at), ""],
      ["fRsi critical, mould (surface RH 80 %)", fixed(c.fRsi_critical_mould, 3), ""],
      ["fRsi critical, condensation", fixed(c.fRsi_critical_condensation, 3), ""],
      ["Surface condensation", c.surface_condensation === undefined ? "—" : c.surface_condensation ? "yes" : "no", ""],
      ["Indoor / outdoor", `${fixed(c.indoor_temperature, 1)} / ${fixed(c.outdoor_temperature, 1)}`, "°C"],
      ["Indoor relative humidity", percent(c.indoor_relative_humidity, 0), ""],
      ["Dew point", fixed(c.dew_point, 1), "°C"]]),
    (c.assumptions || []).length ? h("ul", { class: "notes" }, c.assumptions.map((a) => h("li", {}, a))) : null);
}

function probesCard(probes) {
  const rows = Object.entries(probes || {}).map(([id, t]) => [id, fixed(t, 2), "°C"]);
  return rows.length ? card("Probes", pairs(rows)) : null;
}

function meshCard(mesh) {
  if (!mesh) return null;
  if (mesh.certified_on === "temperatures") return temperatureCertificate(mesh);
  const dash = (v, f) => (v === null || v === undefined ? "—" : f(v));
  const levels = (mesh.levels || []).map((l, i) => [String(i + 1), String(l.nodes), sig(l.heat_flow, 6),
    dash(l.psi, (v) => fixed(v, 5)), dash(l.min_temperature, (v) => fixed(v, 3)),
    dash(l.relative_change, (v) => percent(v, 3)), dash(l.temperature_change, (v) => fixed(v, 3))]);
  const status = mesh.converged ? "within the ISO 10211 1 % rule" : "NOT within the ISO 10211 1 % rule";
  const tone = !mesh.converged ? "bad-line" : mesh.target_met === false ? "warn-line" : "ok-line";
  return card("Mesh convergence",
    h("p", { class: tone, testid: "convergence" },
      `${mesh.nodes} nodes, ${mesh.elements} ${mesh.element || ""} elements; last change ${percent(mesh.relative_change, 3)} — ${status}`
      + (mesh.target_met === false ? "; the requested accuracy was not reached" : "")),
    levels.length ? scroller(table(["Level", "Nodes", "Heat flow W/m", "ψ W/(m·K)", "θsi,min °C", "Δ flow", "Δθ K"], levels, { testid: "levels" })) : null);
}

/** The certificate of a section whose heat flow is unbounded: on its temperatures. */
function temperatureCertificate(mesh) {
  const dash = (v, f) => (v === null || v === undefined ? "—" : f(v));
  const target = mesh.target?.temperature_change;
  const levels = (mesh.levels || []).map((l, i) => [String(i + 1), String(l.nodes),
    dash(l.probe_change, (v) => fixed(v, 4)), dash(l.min_temperature, (v) => fixed(v, 3))]);
  const status = mesh.converged ? "temperatures converged" : "temperatures NOT converged";
  const tone = !mesh.converged ? "bad-line" : mesh.target_met === false ? "warn-line" : "ok-line";
  return card("Mesh convergence",
    h("p", { class: tone, testid: "convergence" },
      `${mesh.nodes} nodes, ${mesh.elements} ${mesh.element || ""} elements; largest probe change ${dash(mesh.probe_change, (v) => fixed(v, 4))} K`
      + `${Number.isFinite(target) ? ` (target ${fixed(target, 2)} K)` : ""} — ${status}`),
    h("p", { class: "hint" }, `Certified on temperatures: ${mesh.heat_flow_singular?.reason || "the heat flow is unbounded"}.`),
    levels.length ? scroller(table(["Level", "Nodes", "Largest probe change K", "θsi,min °C"], levels, { testid: "levels" })) : null);
}

function sensitivityCard(result) {
  const { quantity, bars } = sensitivityBars(result.sensitivities, { psi: Boolean(result.psi) });
  if (!bars.length) return null;
  const symbol = quantity === "psi" ? "ψ" : "L2D";
  if (bars.every((b) => b.value === 0)) {
    return card(`Sensitivity of ${symbol} to λ`, h("p", { class: "muted", testid: "sensitivity-none" },
      `${symbol} does not change with the λ of any material here (all ∂${symbol}/∂ln λ below 1e-9 W/(m·K)).`));
  }
  const layout = barLayout(bars);
  const rowH = 26;
  const width = 380;
  const labelW = Math.min(180, 12 + 6.6 * Math.max(...bars.map((b) => b.label.length)));
  const plotW = width - labelW - 70;
  const svg = s("svg", { viewBox: `0 0 ${width} ${bars.length * rowH + 8}`, class: "barchart", role: "img",
    testid: "sensitivity-chart", "aria-label": `Change of ${symbol} per relative change of each material's λ` },
  layout.bars.map((b, i) => s("g", {},
    s("text", { x: labelW - 6, y: i * rowH + 18, "text-anchor": "end", class: "bar-label" }, b.label),
    s("rect", { x: labelW + b.start * plotW, y: i * rowH + 6, width: Math.max(1, b.width * plotW), height: 16,
      class: b.value >= 0 ? "bar-pos" : "bar-neg" }),
    s("text", { x: labelW + plotW + 6, y: i * rowH + 18, class: "bar-value" }, sig(b.value, 3)))),
  s("line", { x1: labelW + layout.zero * plotW, x2: labelW + layout.zero * plotW, y1: 2, y2: bars.length * rowH + 6, class: "bar-zero" }));
  return card(`Sensitivity of ${symbol} to λ`,
    h("p", { class: "hint" }, `∂${symbol}/∂ln λ in W/(m·K): roughly the change for λ 100 % higher; a 10 % change of λ moves it by about a tenth of the bar.`), svg);
}

/** Warnings, always shown. */
export function warningsCard(result) {
  const list = result.warnings || [];
  return h("section", { class: `card ${list.length ? "warnings" : ""}` },
    h("h2", { class: "card-title" }, list.length ? `Warnings (${list.length})` : "Warnings"),
    h("ul", { testid: "warnings", class: "warning-list" },
      list.length ? list.map((w) => h("li", {}, typeof w === "string" ? w : w.message || JSON.stringify(w)))
        : h("li", { class: "muted" }, "None.")));
}

/** The cards beside the field, in reading order. */
export function figureCards(result) {
  return [psiCard(result.psi), condensationCard(result), cavitiesCard(result.cavities), heatFlowCard(result),
    probesCard(result.probes), meshCard(result.mesh), sensitivityCard(result)].filter(Boolean);
}
