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

/** ISO 13788 interior surface resistance of the fRsi run; the server's default (a test checks). */
export const DEFAULT_CONDENSATION_RSI = 0.25;
const HUMIDITY_CLASSES = [["", "none: the relative humidity above"],
  ["1", "1: unoccupied, storage"], ["2", "2: offices, dwellings with normal occupancy"],
  ["3", "3: unknown occupancy"], ["4", "4: sports halls, kitchens"], ["5", "5: laundries, pools"]];

function initialFrom(request) {
  const c = request.condensation || {};
  const indoor = c.indoor || {};
  return {
    rh: indoor.relative_humidity !== undefined ? indoor.relative_humidity * 100 : 50,
    humidityClass: indoor.humidity_class ? String(indoor.humidity_class) : "",
    rsi: c.interior_surface_resistance ?? DEFAULT_CONDENSATION_RSI,
    criterion: c.criterion ?? 0.75,
    mode: c.criterion ? "fixed" : "climate",
  };
}

/** Indoor humidity, humidity class and Rsi of the fRsi run (the upload flow's climate). */
function climateFields(start) {
  const noop = () => {};
  const rh = numberField({ name: "relative_humidity", unit: "%", min: 1, max: 99, default: start.rh,
    description: "Indoor relative humidity" }, noop);
  const cls = select("humidity_class", "ISO 13788 humidity class (instead of the relative humidity)",
    HUMIDITY_CLASSES, start.humidityClass);
  const rsi = numberField({ name: "interior_surface_resistance", unit: "m²·K/W", min: 0.04, max: 1,
    default: start.rsi, description: "Rsi of the fRsi run (ISO 13788: 0.25 opaque)" }, noop);
  const sync = () => { rh.el.hidden = Boolean(cls.el.value); };
  cls.el.addEventListener("input", sync);
  sync();
  return { rh, cls, rsi, els: [rh.el, cls.wrap, rsi.el],
    checked: () => [...(cls.el.value ? [] : [rh]), rsi] };
}

/**
 * Options and Evaluate button for the request returned by `getRequest()` (null while the
 * input is not ready). `onProblems(problems)` may place problems in the host form and returns
 * those it did not place.
 */
export function assessPanel(getRequest, onProblems = (p) => p, { climate = true } = {}) {
  const start = initialFrom(getRequest() || {});
  const noop = () => {};
  const air = climate ? climateFields(start) : null;
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
  const fields = [...(air ? [air.rh, air.rsi] : []), fixed];
  button.addEventListener("click", () =>
    evaluate(getRequest, { air, fixed, mode, accuracy }, button, list, fields, onProblems));
  const el = h("section", { class: "card assess" }, h("h2", { class: "card-title" }, "Assessment"),
    air ? air.els : null, mode.wrap, h("p", { class: "hint field" }, "The mould limit is the fRsi at which the surface reaches 80 % relative humidity (ISO 13788)."),
    fixed.el, accuracy.wrap, h("div", { class: "actions" }, button), list);
  return { el, setReady: (ready) => { button.disabled = !ready; } };
}

function withOptions(request, opts) {
  const out = structuredClone(request);
  const c = { ...(out.condensation || {}) };
  if (opts.air) {
    c.indoor = { ...(c.indoor || {}) };
    delete c.indoor.humidity_class;
    delete c.indoor.relative_humidity;
    if (opts.air.cls.el.value) c.indoor.humidity_class = Number(opts.air.cls.el.value);
    else c.indoor.relative_humidity = opts.air.rh.read().value / 100;
    c.interior_surface_resistance = opts.air.rsi.read().value;
  }
  if (opts.mode.el.value === "fixed") c.criterion = opts.fixed.read().value;
  else delete c.criterion;
  out.condensation = c;
  out.options = { ...(out.options || {}), accuracy: opts.accuracy.el.value };
  return out;
}

async function evaluate(getRequest, opts, button, list, fields, onProblems) {
  const base = getRequest();
  const bad = [...(opts.air ? opts.air.checked() : []), ...(opts.mode.el.value === "fixed" ? [opts.fixed] : [])]
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
