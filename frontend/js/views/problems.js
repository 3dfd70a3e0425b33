// Showing API problems: each beside the input it names when the form knows it, the rest in a
// list at the place the request was made.

import { h, replace } from "../dom.js";
import { matchField } from "../lib/errors.js";

/** An empty problems list element (hidden until filled). */
export function problemList() {
  return h("ul", { class: "problems", hidden: true, role: "alert", testid: "error-messages" });
}

/** Fill `list` with problems; empty hides it. */
export function showProblems(list, problems) {
  replace(list, problems.map((p) => h("li", { testid: "error-message" },
    p.field ? h("code", { class: "pointer" }, p.field) : null, h("span", {}, p.message))));
  list.hidden = problems.length === 0;
}

/**
 * Put each problem beside the matching field of `fields` ({name, showError}); return the
 * problems no field claimed.
 */
export function placeProblems(problems, fields) {
  const byName = new Map(fields.map((f) => [f.name, f]));
  const rest = [];
  for (const f of fields) f.showError("");
  for (const p of problems) {
    const name = matchField(p.field, [...byName.keys()]);
    if (name) byName.get(name).showError(p.message);
    else rest.push(p);
  }
  return rest;
}
