// Flow 3: an evaluation by id at #/evaluations/<id>: progress while it runs, then the field,
// the figures, the warnings, the caution and the downloads. The address is shareable.

import { ApiError, getEvaluation, getField } from "../api.js";
import { h, replace } from "../dom.js";
import { percent } from "../lib/format.js";
import { downloadsCard } from "./downloads.js";
import { dynamicsCard } from "./dynamicsView.js";
import { fieldFigure } from "./fieldView.js";
import { problemList, showProblems } from "./problems.js";
import { figureCards, headline, warningsCard } from "./resultPanels.js";
import { REUSE_KEY } from "./uploadView.js";

const POLL_MS = 600;
const STAGES = { geometry: "Checking the geometry", meshing: "Meshing", solving: "Solving",
  "post-processing": "Computing the figures" };

/** Render evaluation `id` into `root`; returns a function that stops polling. */
export function resultView(root, id) {
  const controller = new AbortController();
  const progress = h("progress", { max: 1, value: 0, testid: "progress", "aria-label": "Evaluation progress" });
  const stage = h("p", { class: "progress-stage", testid: "progress-stage", "aria-live": "polite" }, "Waiting for the service…");
  replace(root, h("section", { class: "card progress-card", testid: "progress-card" },
    h("h2", { class: "card-title" }, "Evaluating"), h("p", { class: "muted mono" }, id), progress, stage));
  follow(root, id, controller.signal, { progress, stage });
  return () => controller.abort();
}

async function follow(root, id, signal, ui) {
  const started = Date.now();
  try {
    for (;;) {
      const doc = await getEvaluation(id, signal);
      if (doc.status === "done") return await showDone(root, doc, signal);
      if (doc.status === "failed") return showFailed(root, doc);
      ui.progress.value = doc.progress ?? 0;
      const what = doc.status === "queued" ? "Queued" : STAGES[doc.stage] || doc.stage || "Running";
      const seconds = Math.round((Date.now() - started) / 1000);
      ui.stage.textContent = `${what} · ${percent(doc.progress ?? 0, 0)} · ${seconds} s`;
      await sleep(POLL_MS, signal);
    }
  } catch (err) {
    if (err.name === "AbortError") return;
    if (!(err instanceof ApiError)) throw err;
    const list = problemList();
    showProblems(list, err.problems);
    replace(root, h("section", { class: "card" }, h("h2", { class: "card-title" }, `Evaluation ${id}`), list,
      h("p", {}, h("a", { href: "#/open" }, "Open another evaluation"))));
  }
}

function sleep(ms, signal) {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(resolve, ms);
    signal.addEventListener("abort", () => { clearTimeout(timer); reject(new DOMException("stopped", "AbortError")); });
  });
}

function showFailed(root, doc) {
  const list = problemList();
  const error = doc.error || {};
  showProblems(list, [{ field: error.field || "", message: error.message || error.detail || "The evaluation failed." }]);
  replace(root, h("section", { class: "card" }, h("h2", { class: "card-title" }, "The evaluation failed"),
    h("p", { class: "muted mono" }, doc.id), list,
    h("p", {}, "Correct the input and evaluate again: ", h("a", { href: "#/upload" }, "upload a section"), " or ",
      h("a", { href: "#/template" }, "use a template"), "."), reuseButton(doc.request)));
}

async function showDone(root, result, signal) {
  const fieldHolder = h("div", { class: "field-holder" }, h("p", { class: "placeholder" }, "Loading the temperature field…"));
  replace(root, h("article", { class: "results", testid: "results" },
    resultHeader(result), headline(result),
    h("div", { class: "result-grid" },
      h("div", { class: "result-main" }, fieldHolder, dynamicsCard(result), warningsCard(result), downloadsCard(result)),
      h("div", { class: "result-side" }, figureCards(result))),
    h("p", { class: "caution", testid: "caution", role: "note" }, result.caution || "")));
  try {
    replace(fieldHolder, fieldFigure(await getField(result.id, signal)));
  } catch (err) {
    if (err.name === "AbortError") return;
    if (!(err instanceof ApiError)) throw err;
    replace(fieldHolder, h("p", { class: "placeholder" }, `The temperature field is not available: ${err.message}`));
  }
}

function resultHeader(result) {
  const address = `${location.origin}${location.pathname}#/evaluations/${result.id}`;
  const copy = h("button", { type: "button", class: "secondary small", testid: "copy-link" }, "Copy link");
  copy.addEventListener("click", async () => {
    try {
      await navigator.clipboard.writeText(address);
      copy.textContent = "Link copied";
    } catch {
      copy.textContent = "Copy the address bar";
    }
  });
  return h("header", { class: "result-head" },
    h("div", {}, h("h1", {}, result.name || "Evaluation"),
      h("p", { class: "muted" }, h("span", { class: "mono", testid: "evaluation-id" }, result.id),
        result.created_at ? ` · ${result.created_at.replace("T", " ").replace("Z", " UTC")}` : "",
        result.engine_version ? ` · ${result.engine_version}` : "")),
    h("div", { class: "share" }, reuseButton(result.request),
      h("a", { href: `#/evaluations/${result.id}`, class: "permalink", testid: "permalink" }, "Permanent link"), copy));
}

/** Take this evaluation's request to the upload view, to change and evaluate again. */
function reuseButton(request) {
  if (!request) return null;
  return h("button", { type: "button", class: "small", testid: "reuse-input", onclick: () => {
    sessionStorage.setItem(REUSE_KEY, JSON.stringify(request));
    location.hash = "#/upload";
  } }, "Use this input again");
}
