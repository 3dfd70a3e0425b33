// Downloads of a result: the JSON document and a CSV of key figures made in the page, and the
// server's picture and printable report.

import { apiKey, blobUrl, evaluationUrl } from "../api.js";
import { blobLink, card, h } from "../dom.js";
import { keyFigureRows, toCsv } from "../lib/figures.js";

function fileStem(result) {
  const name = (result.name || "evaluation").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-|-$/g, "");
  return `coldseam-${name || "evaluation"}-${String(result.id).slice(0, 8)}`;
}

/** The downloads card of `result`. */
export function downloadsCard(result) {
  const stem = fileStem(result);
  const link = (label, tail, testid, extra = {}) => keyed(
    h("a", { class: "download", href: evaluationUrl(result.id, tail), testid, ...extra }, label));
  return card("Downloads", h("ul", { class: "downloads" },
    h("li", {}, blobLink("Result (JSON)", `${stem}.json`, "application/json",
      JSON.stringify(result, null, 2), "download-json")),
    h("li", {}, blobLink("Key figures (CSV)", `${stem}.csv`, "text/csv",
      toCsv(keyFigureRows(result)), "download-csv")),
    h("li", {}, link("Picture (SVG)", "picture.svg", "download-svg", { download: `${stem}.svg` })),
    h("li", {}, link("Picture (PNG)", "picture.png", "download-png", { download: `${stem}.png` })),
    result.dynamics && result.dynamics.transient ?
      h("li", {}, link("Transient run (SVG)", "transient.svg", "download-transient", { download: `${stem}-transient.svg` })) : null),
  reportForm(result));
}

/** The report's title block: project, prepared by, checked by, date (today unless changed). */
function reportForm(result) {
  const field = (name, label, props = {}) => {
    const input = h("input", { id: `report-${name}`, name, autocomplete: "off", maxlength: 200, testid: `report-${name}`, ...props });
    return [input, h("div", { class: "field" }, h("label", { for: `report-${name}` }, label), input)];
  };
  const [project, projectField] = field("project", "Project");
  const [author, authorField] = field("author", "Prepared by");
  const [checked, checkedField] = field("checked_by", "Checked by");
  const today = new Date().toISOString().slice(0, 10);
  const [date, dateField] = field("date", "Date", { type: "date", value: today });
  const anchor = keyed(h("a", { class: "download", href: reportUrl(), testid: "download-report", target: "_blank", rel: "noopener" },
    "Printable report"));
  function reportUrl() {
    const query = new URLSearchParams();
    for (const [key, input] of [["project", project], ["author", author], ["checked_by", checked], ["date", date]]) {
      const value = input?.value?.trim();
      if (value && !(key === "date" && value === today)) query.set(key, value); // the service dates it today
    }
    const text = query.toString();
    return evaluationUrl(result.id, text ? `report?${text}` : "report");
  }
  for (const input of [project, author, checked, date]) {
    input.addEventListener("input", () => { anchor.href = reportUrl(); delete anchor.dataset.fetched; });
  }
  return h("fieldset", { class: "report-form" }, h("legend", {}, "Report title block"),
    h("div", { class: "report-fields" }, projectField, authorField, checkedField, dateField), anchor);
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
