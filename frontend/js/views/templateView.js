// Flow 1: pick a junction template, fill its parameters, watch the section preview follow, and
// evaluate.

import { ApiError, listMaterials, listTemplates, templateSection } from "../api.js";
import { debounce, h, replace } from "../dom.js";
import { assessPanel } from "./assess.js";
import { parameterField } from "./inputs.js";
import { placeProblems, problemList, showProblems } from "./problems.js";
import { sectionPreview } from "./sectionPreview.js";

/** Render the template flow into `root`; `templateId` preselects one. */
export async function templateView(root, templateId) {
  const stage = h("div", { class: "stage" }, h("p", { class: "placeholder" }, "Loading templates…"));
  const panel = h("div", { class: "panel" });
  replace(root, h("div", { class: "workspace" }, panel, stage));
  let templates;
  let materials;
  try {
    [templates, materials] = await Promise.all([listTemplates(), listMaterials().catch(() => [])]);
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    const list = problemList();
    showProblems(list, err.problems);
    replace(stage, list);
    return () => {};
  }
  return buildForm(panel, stage, templates, materials, templateId);
}

function buildForm(panel, stage, templates, materials, templateId) {
  const state = { materials, template: null, fields: [], request: null, controller: null, seq: 0 };
  const picker = h("select", { id: "template-picker", testid: "template-picker" },
    templates.map((t) => h("option", { value: t.id }, t.title || t.id)));
  const about = h("p", { class: "template-about", testid: "template-description" });
  const paramsBox = h("div", { class: "params" });
  const climateBox = h("div", { class: "params", testid: "climate-params" });
  const previewProblems = problemList();
  // the climate (temperatures, humidity, Rsi of the fRsi run) is the template's own parameters
  const assess = assessPanel(() => state.request, (problems) => placeProblems(problems, state.fields),
    { climate: false });
  const refresh = debounce(() => updatePreview(state, stage, previewProblems, assess), 300);
  const choose = (id) => {
    state.template = templates.find((t) => t.id === id) || templates[0];
    picker.value = state.template.id;
    history.replaceState(null, "", `#/template/${encodeURIComponent(state.template.id)}`);
    replace(about, state.template.description || "");
    state.fields = (state.template.parameters || []).map((p) => parameterField(p, materials, refresh));
    const isClimate = (f) => CLIMATE.has(f.name);
    replace(paramsBox, state.fields.filter((f) => !isClimate(f)).map((f) => f.el));
    replace(climateBox, state.fields.filter(isClimate).map((f) => f.el));
    state.request = null;
    assess.setReady(false);
    updatePreview(state, stage, previewProblems, assess);
  };
  picker.addEventListener("input", () => choose(picker.value));
  replace(panel,
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Junction"),
      h("div", { class: "field" }, h("label", { for: "template-picker" }, "Junction type"), picker),
      about),
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Dimensions and materials"),
      paramsBox, previewProblems),
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Climate"),
      h("p", { class: "hint" }, "Design condition of the condensation and mould check; ψ and L2D do not depend on it."),
      climateBox),
    assess.el);
  if (templates.length) choose(templateId && templates.some((t) => t.id === templateId) ? templateId : templates[0].id);
  else replace(stage, h("p", { class: "placeholder" }, "This server offers no templates."));
  return () => state.controller?.abort();
}

/** The design-climate parameters every template takes (GET /api/v1/templates). */
const CLIMATE = new Set(["indoor_temperature", "outdoor_temperature", "indoor_relative_humidity",
  "humidity_class", "condensation_surface_resistance"]);

function readParams(fields) {
  const params = {};
  let bad = false;
  for (const f of fields) {
    const { value, problem } = f.read();
    params[f.name] = value;
    bad ||= Boolean(problem);
  }
  return { params, bad };
}

async function updatePreview(state, stage, list, assess) {
  const { params, bad } = readParams(state.fields);
  state.controller?.abort();
  if (bad) { state.request = null; assess.setReady(false); return; }
  const controller = new AbortController();
  state.controller = controller;
  const seq = ++state.seq;
  stage.classList.add("busy");
  try {
    const request = await templateSection(state.template.id, params, controller.signal);
    if (seq !== state.seq) return;
    state.request = request;
    showProblems(list, []);
    placeProblems([], state.fields);
    replace(stage, sectionPreview(request.section, state.materials));
    assess.setReady(true);
  } catch (err) {
    if (err.name === "AbortError" || seq !== state.seq) return;
    if (!(err instanceof ApiError)) throw err;
    state.request = null;
    assess.setReady(false);
    showProblems(list, placeProblems(err.problems, state.fields));
  } finally {
    if (seq === state.seq) stage.classList.remove("busy");
  }
}
