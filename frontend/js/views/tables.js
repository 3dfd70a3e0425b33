// Small table builders for the results page.

import { h } from "../dom.js";

/** A two-or-more column table: `head` labels, `rows` arrays of cells (strings or nodes). */
export function table(head, rows, props = {}) {
  return h("table", { class: "figures", ...props },
    h("thead", {}, h("tr", {}, head.map((c, i) => h("th", { scope: "col", class: i ? "num" : "" }, c)))),
    h("tbody", {}, rows.map((r) => h("tr", {}, r.map((c, i) =>
      i === 0 ? h("th", { scope: "row" }, c) : h("td", { class: "num" }, c))))));
}

/** A table of label → value pairs with units. */
export function pairs(rows, props = {}) {
  return h("table", { class: "figures pairs", ...props },
    h("tbody", {}, rows.filter(Boolean).map(([label, value, unit, testid]) => h("tr", {},
      h("th", { scope: "row" }, label),
      h("td", { class: "num", testid }, value),
      h("td", { class: "unit" }, unit || "")))));
}

/** A wide table scrolls sideways inside its own box, never the page. */
export function scroller(node) {
  return h("div", { class: "table-scroll", tabindex: 0, role: "region", "aria-label": "Table (scrolls sideways)" }, node);
}
