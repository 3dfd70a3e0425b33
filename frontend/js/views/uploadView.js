// Flow 2: drop a section JSON (a bare section or a whole evaluation request) or a DXF drawing;
// a DXF goes through the layer-mapping step; then preview and evaluate.

import { ApiError, importDxf, listMaterials } from "../api.js";
import { h, replace } from "../dom.js";
import { assessPanel } from "./assess.js";
import { layerMapFiles, mappingTable } from "./dxfMapping.js";
import { flankingEditor } from "./flanking.js";
import { placeProblems, problemList, showProblems } from "./problems.js";
import { sectionPreview } from "./sectionPreview.js";

/** sessionStorage key of a request handed over from a result page. */
export const REUSE_KEY = "coldseam.reuse-request";

/** Render the upload flow into `root`. */
export function uploadView(root) {
  const state = { request: null, materials: null, flanking: null };
  const stage = h("div", { class: "stage" }, h("p", { class: "placeholder stage-empty" },
    "The section appears here once a file is read."));
  const problems = problemList();
  const mapping = h("div", { class: "mapping mapping-wide", testid: "mapping-area" });
  const flankBox = h("div", {});
  const assess = assessPanel(() => fullRequest(state), (p) => (state.flanking ? state.flanking.place(p) : p));
  assess.setReady(false);
  const show = (request, extra = []) => {
    state.request = request;
    state.flanking = flankingEditor(request.psi, request.section?.unit || "mm");
    replace(flankBox, state.flanking.el);
    replace(stage, safePreview(request.section, state.materials || []), extra);
    assess.setReady(true);
  };
  const ctx = { state, stage, problems, mapping, assess, show };
  const fileInput = h("input", { type: "file", id: "section-file", accept: ".json,.dxf,application/json",
    testid: "upload-input", class: "file-input" });
  fileInput.addEventListener("change", () => fileInput.files[0] && readFile(fileInput.files[0], ctx));
  const zone = dropZone(fileInput, (file) => readFile(file, ctx));
  replace(root, h("div", { class: "workspace" }, mapping, h("div", { class: "panel" },
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Section file"), zone, problems),
    flankBox, assess.el), stage));
  const handed = sessionStorage.getItem(REUSE_KEY);
  if (handed) {
    sessionStorage.removeItem(REUSE_KEY);
    listMaterials().catch(() => []).then((m) => { state.materials = m; show(JSON.parse(handed)); });
  }
  return () => {};
}

/** The request to evaluate: the file's, with the flanking elements of the editor. */
function fullRequest(state) {
  if (!state.request) return null;
  const { psi, bad } = state.flanking ? state.flanking.read() : { psi: state.request.psi, bad: false };
  if (bad) return null;
  const out = { ...state.request };
  if (psi) out.psi = { ...(state.request.psi || {}), ...psi };
  else delete out.psi;
  return out;
}

function dropZone(fileInput, onFile) {
  const zone = h("div", { class: "dropzone", testid: "dropzone" },
    h("label", { for: "section-file", class: "drop-label" }, "Drop a section JSON or a DXF drawing here, or choose one"), fileInput,
    h("p", { class: "hint" }, "JSON: a section model or a whole evaluation request (model v1). DXF: closed shapes per material layer, lines along exposed surfaces per environment layer."));
  zone.addEventListener("dragover", (e) => { e.preventDefault(); zone.classList.add("over"); });
  zone.addEventListener("dragleave", () => zone.classList.remove("over"));
  zone.addEventListener("drop", (e) => {
    e.preventDefault();
    zone.classList.remove("over");
    if (e.dataTransfer.files[0]) onFile(e.dataTransfer.files[0]);
  });
  return zone;
}

function safePreview(section, library) {
  try {
    return sectionPreview(section, library);
  } catch (err) {
    return h("p", { class: "placeholder" }, `This section cannot be drawn here (${err.message}); `
      + "the service will say what is wrong when it is evaluated.");
  }
}

async function readFile(file, ctx) {
  ctx.state.request = null;
  ctx.state.flanking = null;
  ctx.assess.setReady(false);
  showProblems(ctx.problems, []);
  replace(ctx.mapping);
  ctx.state.materials ??= await listMaterials().catch(() => []);
  if (/\.dxf$/i.test(file.name)) return inspectDxf(file, ctx);
  let data;
  try {
    data = JSON.parse(await file.text());
  } catch (err) {
    showProblems(ctx.problems, [{ field: file.name, message: `This file is not valid JSON (${err.message}).` }]);
    return;
  }
  const request = asRequest(data);
  if (!request) {
    showProblems(ctx.problems, [{ field: file.name, message: "This JSON holds neither a section (with \"regions\") nor an evaluation request (with \"section\")." }]);
    return;
  }
  ctx.show(request);
}

/** An evaluation request from uploaded JSON: a request as is, a bare section wrapped. */
function asRequest(data) {
  if (!data || typeof data !== "object" || Array.isArray(data)) return null;
  if (data.section && typeof data.section === "object") return data;
  if (Array.isArray(data.regions)) return { section: data };
  return null;
}

async function inspectDxf(file, ctx) {
  try {
    const answer = await importDxf(file);
    if (answer.section) return ctx.show({ section: named(answer.section, file) }, warningsBlock(answer.warnings));
    mappingStep(file, answer, ctx);
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    showProblems(ctx.problems, err.problems);
  }
}

function mappingStep(file, answer, ctx) {
  const table = mappingTable(answer.layers || [], ctx.state.materials, answer.climate || null);
  const notes = h("ul", { class: "warning-list warnings-inline", testid: "layer-map-notes", hidden: true });
  const showNotes = (lines) => {
    notes.hidden = !lines.length;
    replace(notes, lines.map((line) => h("li", {}, line)));
  };
  const unit = h("select", { id: "dxf-unit", testid: "dxf-unit" },
    h("option", { value: "" }, "— choose —"), h("option", { value: "mm" }, "millimetres (mm)"),
    h("option", { value: "m" }, "metres (m)"));
  unit.value = answer.unit || "";
  unit.addEventListener("input", () => { unitError.hidden = true; });
  const unitError = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error", "data-field": "unit" });
  const list = problemList();
  const button = h("button", { type: "button", class: "secondary", testid: "build-section" }, "Build section");
  button.addEventListener("click", () => buildSection(file, table, unit, unitError, list, ctx));
  replace(ctx.mapping, h("section", { class: "card" }, h("h2", { class: "card-title" }, "Layers"),
    h("p", { class: "hint" }, `Say what each layer of ${file.name} stands for. Surface layers with the same environment id make one environment.`),
    layerMapFiles(table, file.name, showNotes), notes,
    h("div", { class: "field" }, h("label", { for: "dxf-unit" },
      answer.unit ? `Drawing unit (the file says ${answer.unit})` : "Drawing unit (the file does not say)"), unit, unitError),
    warningList(answer.warnings, "inspect-warnings"), table.el, h("div", { class: "actions" }, button), list));
}

async function buildSection(file, table, unit, unitError, list, ctx) {
  const { layerMap, bad } = table.read();
  unitError.hidden = Boolean(unit.value);
  replace(unitError, unit.value ? "" : "Say whether the drawing is in millimetres or metres.");
  if (bad || !unit.value) return;
  showProblems(list, []);
  try {
    const answer = await importDxf(file, layerMap, unit.value);
    ctx.show({ section: named(answer.section, file) }, warningsBlock(answer.warnings));
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    const unitField = { name: "unit", showError: (m) => { unitError.hidden = !m; replace(unitError, m || ""); } };
    showProblems(list, placeProblems(err.problems, [...table.fields, unitField]));
  }
}

function named(section, file) {
  return { name: `Drawing ${file.name}`, ...section };
}

function warningList(warnings, testid) {
  if (!warnings || !warnings.length) return null;
  return h("ul", { class: "warning-list warnings-inline", testid },
    warnings.map((w) => h("li", {}, typeof w === "string" ? w : w.message || JSON.stringify(w))));
}

function warningsBlock(warnings) {
  if (!warnings || !warnings.length) return [];
  return h("section", { class: "card warnings" }, h("h2", { class: "card-title" }, "Import warnings"),
    warningList(warnings, "import-warnings"));
}
