// The assessment options (indoor climate, fRsi criterion, accuracy) and the Evaluate button,
// shared by the template and upload flows. Evaluation starts without waiting and the page moves
// to the shareable result address, which follows the progress.

import { ApiError, startEvaluation } from "../api.js";
import { h } from "../dom.js";
import { numberField } from "./inputs.js";
import { placeProblems, problemList, showProblems } from "./problems.js";

const CRITERIA = [
  ["climate", "Mould limit of the indoor climate"],
  ["fixed", "A fixed critical value"],
];

function select(name, label, options, value) {
  const id = `sel-${name}`;
  const el = h("select", { id, name, testid: `select-${name}` },
    options.map(([v, text]) => h("option", { value: v }, text)));
  el.value = value;
  return { el, wrap: h("div", { class: "field" }, h("label", { for: id }, label), el) };
}

function initialFrom(request) {
  const c = request.condensation || {};
  const indoor = c.indoor || {};
  return {
    rh: indoor.relative_humidity !== undefined ? indoor.relative_humidity * 100 : 50,
    criterion: c.criterion ?? 0.75,
    mode: c.criterion ? "fixed" : "climate",
  };
}

/**
 * Options and Evaluate button for the request returned by `getRequest()` (null while the
 * input is not ready). `onProblems(problems)` may place problems in the host form and returns
 * those it did not place.
 */
export function assessPanel(getRequest, onProblems = (p) => p) {
  const start = initialFrom(getRequest() || {});
  const noop = () => {};
  const rh = numberField({ name: "relative_humidity", unit: "%", min: 1, max: 99, default: start.rh,
    description: "Indoor relative humidity" }, noop);
  const fixed = numberField({ name: "criterion", min: 0.01, max: 0.99, default: start.criterion,
    description: "Critical fRsi" }, noop);
  const mode = select("criterion_mode", "Critical fRsi", CRITERIA, start.mode);
  const accuracy = select("accuracy", "Mesh convergence",
    [["default", "Tight: 0.1 % and 0.01 K"], ["iso", "ISO 10211 rule: 1 %"]], "default");
  const sync = () => { fixed.el.hidden = mode.el.value !== "fixed"; };
  mode.el.addEventListener("input", sync);
  sync();
  const list = problemList();
  const button = h("button", { type: "button", class: "primary", testid: "evaluate" }, "Evaluate");
  const fields = [rh, fixed];
  button.addEventListener("click", () =>
    evaluate(getRequest, { rh, fixed, mode, accuracy }, button, list, fields, onProblems));
  const el = h("section", { class: "card assess" }, h("h2", { class: "card-title" }, "Assessment"),
    rh.el, mode.wrap, h("p", { class: "hint field" }, "The mould limit is the fRsi at which the surface reaches 80 % relative humidity (ISO 13788)."),
    fixed.el, accuracy.wrap, h("div", { class: "actions" }, button), list);
  return { el, setReady: (ready) => { button.disabled = !ready; } };
}

function withOptions(request, opts) {
  const out = structuredClone(request);
  const c = { ...(out.condensation || {}) };
  c.indoor = { ...(c.indoor || {}), relative_humidity: opts.rh.read().value / 100 };
  delete c.indoor.humidity_class;
  if (opts.mode.el.value === "fixed") c.criterion = opts.fixed.read().value;
  else delete c.criterion;
  out.condensation = c;
  out.options = { ...(out.options || {}), accuracy: opts.accuracy.el.value };
  return out;
}

async function evaluate(getRequest, opts, button, list, fields, onProblems) {
  const base = getRequest();
  const bad = [opts.rh, ...(opts.mode.el.value === "fixed" ? [opts.fixed] : [])]
    .filter((f) => f.read().problem);
  if (!base || bad.length) { bad[0]?.focus(); return; }
  button.disabled = true;
  button.textContent = "Starting…";
  showProblems(list, []);
  try {
    const doc = await startEvaluation(withOptions(base, opts));
    location.hash = `#/evaluations/${encodeURIComponent(doc.id)}`;
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    showProblems(list, onProblems(placeProblems(err.problems, fields)));
  } finally {
    button.disabled = false;
    button.textContent = "Evaluate";
  }
}
