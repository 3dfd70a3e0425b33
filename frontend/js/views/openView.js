// Open a stored evaluation by id (or by a pasted result address).

import { h, replace } from "../dom.js";

/** The id in a pasted value: a bare id or an address ending in #/evaluations/<id>. */
export function idFrom(text) {
  const value = String(text).trim();
  const match = value.match(/evaluations\/([A-Za-z0-9._-]+)/);
  return match ? match[1] : value;
}

export function openView(root) {
  const input = h("input", { id: "open-id", name: "id", required: true, autocomplete: "off",
    spellcheck: false, testid: "open-id", placeholder: "e.g. 3f9c…" });
  const error = h("p", { class: "field-error", hidden: true, role: "alert", testid: "field-error" });
  const form = h("form", { class: "card narrow-card" },
    h("h2", { class: "card-title" }, "Open an evaluation"),
    h("div", { class: "field" }, h("label", { for: "open-id" }, "Evaluation id or result address"), input, error),
    h("div", { class: "actions" }, h("button", { type: "submit", class: "primary", testid: "open-submit" }, "Open")));
  form.addEventListener("submit", (e) => {
    e.preventDefault();
    const id = idFrom(input.value);
    error.hidden = Boolean(id);
    error.textContent = id ? "" : "Paste an evaluation id.";
    if (id) location.hash = `#/evaluations/${encodeURIComponent(id)}`;
  });
  replace(root, h("div", { class: "single" }, form));
  input.focus();
  return () => {};
}
