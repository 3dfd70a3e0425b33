// Open a stored evaluation: the key's evaluations listed to click (newest first), or an id or
// a result address pasted.

import { ApiError, call } from "../api.js";
import { h, replace } from "../dom.js";
import { fixed } from "../lib/format.js";
import { scroller } from "./tables.js";

/** The id in a pasted value: a bare id or an address ending in #/evaluations/<id>. */
export function idFrom(text) {
  const value = String(text).trim();
  const match = value.match(/evaluations\/([A-Za-z0-9._-]+)/);
  return match ? match[1] : value;
}

const STATUS = { done: "done", queued: "queued", running: "running", failed: "failed" };

export function openView(root) {
  const controller = new AbortController();
  const input = h("input", { id: "open-id", name: "id", required: true, autocomplete: "off",
    spellcheck: false, testid: "open-id", placeholder: "e.g. 3f9c…" });
  const error = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error" });
  const form = h("form", { class: "card narrow-card" },
    h("h2", { class: "card-title" }, "Open an evaluation by id"),
    h("div", { class: "field" }, h("label", { for: "open-id" }, "Evaluation id or result address"), input, error),
    h("div", { class: "actions" }, h("button", { type: "submit", class: "primary", testid: "open-submit" }, "Open")));
  form.addEventListener("submit", (e) => {
    e.preventDefault();
    const id = idFrom(input.value);
    error.hidden = Boolean(id);
    error.textContent = id ? "" : "Paste an evaluation id.";
    if (id) location.hash = `#/evaluations/${encodeURIComponent(id)}`;
  });
  const list = h("section", { class: "card", testid: "evaluation-list" },
    h("h2", { class: "card-title" }, "Your evaluations"), h("p", { class: "placeholder" }, "Loading the list…"));
  replace(root, h("div", { class: "single" }, list, form));
  fillList(list, controller.signal);
  return () => controller.abort();
}

async function fillList(card, signal) {
  try {
    const { data } = await call("evaluations?limit=50", { signal });
    const items = data?.items || [];
    const body = items.length ? scroller(listTable(items))
      : h("p", { class: "muted" }, "No evaluations yet with this access key.");
    replace(card, h("h2", { class: "card-title" }, `Your evaluations (${data?.total ?? items.length})`), body);
  } catch (err) {
    if (err.name === "AbortError") return;
    if (!(err instanceof ApiError)) throw err;
    replace(card, h("h2", { class: "card-title" }, "Your evaluations"),
      h("p", { class: "muted" }, `The list is not available: ${err.message}`));
  }
}

function listTable(items) {
  const head = ["Name", "Date (UTC)", "ψ W/(m·K)", "fRsi", "Status"];
  return h("table", { class: "figures evaluation-list" },
    h("thead", {}, h("tr", {}, head.map((c, i) => h("th", { scope: "col", class: i > 1 ? "num" : "" }, c)))),
    h("tbody", {}, items.map((item) => h("tr", {},
      h("th", { scope: "row" }, h("a", { href: `#/evaluations/${encodeURIComponent(item.id)}`, testid: "evaluation-link" },
        item.name || item.id)),
      h("td", {}, String(item.created_at || "").replace("T", " ").replace(/(\.\d+)?Z$/, "")),
      h("td", { class: "num" }, fixed(item.psi, 4)),
      h("td", { class: "num" }, item.fRsi === null || item.fRsi === undefined ? "—"
        : `${fixed(item.fRsi, 3)}${item.verdict ? ` (${item.verdict})` : ""}`),
      h("td", { class: "num" }, STATUS[item.status] || String(item.status))))));
}
