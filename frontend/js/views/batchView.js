// A batch at #/batches/<id>: progress per item while it runs, then the table with ψ, ψ·l, fRsi,
// verdicts and Σ ψ·l, the plot of ψ against the varied parameter of a grid, and the downloads.
// The address is shareable.

import { ApiError, apiKey, batchUrl, blobUrl, cancelBatch, getBatch } from "../api.js";
import { card, h, replace } from "../dom.js";
import { fixed } from "../lib/format.js";
import { countsLine, psiSeries } from "../lib/schedule.js";
import { problemList, showProblems } from "./problems.js";
import { psiPlot } from "./psiPlot.js";

const POLL_MS = 700;

/** Render batch `id` into `root`; returns a function that stops polling. */
export function batchView(root, id) {
  const controller = new AbortController();
  replace(root, h("p", { class: "placeholder" }, "Loading the batch…"));
  follow(root, id, controller.signal);
  return () => controller.abort();
}

async function follow(root, id, signal) {
  try {
    for (;;) {
      const batch = await getBatch(id, signal);
      show(root, batch);
      if (batch.status === "done" || batch.status === "failed") return;
      await sleep(POLL_MS, signal);
    }
  } catch (err) {
    if (err.name === "AbortError") return;
    if (!(err instanceof ApiError)) throw err;
    const list = problemList();
    showProblems(list, err.problems);
    replace(root, card(`Batch ${id}`, list, h("p", {}, h("a", { href: "#/schedule" }, "Start a schedule"))));
  }
}

function sleep(ms, signal) {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(resolve, ms);
    signal.addEventListener("abort", () => { clearTimeout(timer); reject(new DOMException("stopped", "AbortError")); });
  });
}

function show(root, batch) {
  const finished = batch.status === "done" || batch.status === "failed";
  const c = batch.counts;
  const plot = finished ? psiSeries(batch) : null;
  replace(root, h("article", { class: "batch", testid: "batch", "data-status": batch.status },
    h("header", { class: "result-head" }, h("h1", {}, batch.name || "Junction schedule"),
      h("p", { class: "muted mono" }, batch.id)),
    h("section", { class: "card" }, h("h2", { class: "card-title" }, finished ? "Finished" : "Evaluating"),
      h("progress", { max: batch.total || 1, value: c.done + c.failed, testid: "batch-progress", "aria-label": "Batch progress" }),
      h("p", { class: "progress-stage", testid: "batch-counts", "aria-live": "polite" }, `${countsLine(batch)} · ${batch.status}`),
      finished ? null : h("div", { class: "actions" }, h("button", { type: "button", class: "secondary", testid: "batch-cancel",
        onclick: () => cancelBatch(batch.id).catch(() => {}) }, "Cancel the rest"))),
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Junctions"), itemsTable(batch),
      h("p", { class: "sum-line" }, "Σ ψ·l = ", h("strong", { testid: "sum-psi-l" }, fixed(batch.sum_psi_l, 2)), " W/K",
        batch.sum_psi_l_items < batch.items_with_length
          ? h("span", { class: "muted", testid: "sum-partial" }, ` (over ${batch.sum_psi_l_items} of the ${batch.items_with_length} junctions with a length${finished ? ": the others failed" : " so far"})`) : null),
      batch.total > batch.items.length ? h("p", { class: "hint" }, `The first ${batch.items.length} of ${batch.total} items are shown; the downloads hold them all.`) : null),
    plot && plot.series.some((line) => line.points.length) ? card(`ψ against ${plot.parameter}`, psiPlot(plot)) : null,
    finished ? downloads(batch) : null,
    h("p", { class: "caution", testid: "caution", role: "note" }, batch.caution || "")));
}

function itemsTable(batch) {
  const head = ["Junction", "Status", "ψ W/(m·K)", "l m", "ψ·l W/K", "fRsi", "Verdict"];
  return h("div", { class: "table-scroll" }, h("table", { class: "figures batch-items", testid: "batch-items" },
    h("thead", {}, h("tr", {}, head.map((label, n) => h("th", { scope: "col", class: n > 1 ? "num" : "" }, label)))),
    h("tbody", {}, batch.items.map((item) => h("tr", { testid: "batch-item", "data-status": item.status },
      h("th", { scope: "row" }, item.evaluation_id && item.status === "done"
        ? h("a", { href: `#/evaluations/${encodeURIComponent(item.evaluation_id)}` }, item.id) : item.id),
      h("td", {}, statusCell(item)),
      h("td", { class: "num", testid: "item-psi" }, fixed(item.psi, 4)),
      h("td", { class: "num" }, fixed(item.length, 2)),
      h("td", { class: "num", testid: "item-psi-l" }, fixed(item.psi_l, 3)),
      h("td", { class: "num" }, fixed(item.fRsi, 3)),
      h("td", { class: "num" }, verdict(item)))))));
}

function statusCell(item) {
  if (item.status === "failed") {
    const error = item.error || {};
    return h("span", { class: "bad-line", testid: "item-error" }, error.detail || error.message || "failed");
  }
  if (item.status === "running") {
    return h("span", {}, h("progress", { max: 1, value: item.progress ?? 0, class: "item-progress", "aria-label": `${item.id} progress` }),
      ` ${item.stage || "running"}`);
  }
  return item.status;
}

function verdict(item) {
  if (!item.verdict) return "—";
  return h("span", { class: `badge badge-${item.verdict === "pass" ? "pass" : "fail"}` }, item.verdict === "pass" ? "Pass" : "Fail");
}

function downloads(batch) {
  const link = (label, tail, testid, extra = {}) => keyed(h("a", { class: "download", href: batchUrl(batch.id, tail), testid, ...extra }, label));
  return card("Downloads", h("ul", { class: "downloads" },
    h("li", {}, link("Results (CSV)", "results.csv", "batch-csv", { download: "" })),
    h("li", {}, link("Results (XLSX spreadsheet)", "results.xlsx", "batch-xlsx", { download: "" })),
    h("li", {}, link("Printable schedule report", "report", "batch-report", { target: "_blank", rel: "noopener" }))));
}

/** With an API key, links cannot carry it: fetch with the key and follow a blob URL instead. */
function keyed(anchor) {
  anchor.addEventListener("click", async (event) => {
    if (!apiKey() || anchor.dataset.fetched) return;
    event.preventDefault();
    try {
      anchor.href = await blobUrl(anchor.href);
      anchor.dataset.fetched = "1";
      anchor.click();
    } catch (err) {
      anchor.title = err.message;
    }
  });
  return anchor;
}
