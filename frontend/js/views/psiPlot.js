// ψ against the varied parameter of a grid batch, drawn as SVG in the page.

import { s } from "../dom.js";
import { fixed, sig } from "../lib/format.js";
import { axisRange } from "../lib/schedule.js";

const W = 560;
const H = 300;
const M = { left: 64, right: 16, top: 16, bottom: 44 };

/** Ticks at the grid's own values when there are few of them, else five even steps. */
function xTicks(xs, lo, hi) {
  const distinct = [...new Set(xs)].sort((a, b) => a - b);
  if (distinct.length && distinct.length <= 8) return distinct;
  return [0, 0.25, 0.5, 0.75, 1].map((f) => lo + f * (hi - lo));
}

/** The plot of `plot` ({parameter, series}); an SVG element. */
export function psiPlot(plot) {
  const xs = plot.series.flatMap((line) => line.points.map((p) => p[0]));
  const ys = plot.series.flatMap((line) => line.points.map((p) => p[1]));
  const [x0, x1] = axisRange(xs);
  const [y0, y1] = axisRange(ys);
  const px = (x) => M.left + ((x - x0) / (x1 - x0)) * (W - M.left - M.right);
  const py = (y) => H - M.bottom - ((y - y0) / (y1 - y0)) * (H - M.top - M.bottom);
  const ticks = (lo, hi) => [0, 0.25, 0.5, 0.75, 1].map((f) => lo + f * (hi - lo));
  return s("svg", { viewBox: `0 0 ${W} ${H}`, class: "psi-plot", role: "img", testid: "psi-plot",
    "aria-label": `ψ against ${plot.parameter}` },
  s("line", { x1: M.left, y1: H - M.bottom, x2: W - M.right, y2: H - M.bottom, class: "plot-axis" }),
  s("line", { x1: M.left, y1: M.top, x2: M.left, y2: H - M.bottom, class: "plot-axis" }),
  xTicks(xs, x0, x1).map((x) => s("text", { x: px(x), y: H - M.bottom + 16, class: "plot-tick", "text-anchor": "middle" }, sig(x, 3))),
  ticks(y0, y1).map((y) => s("text", { x: M.left - 6, y: py(y) + 4, class: "plot-tick", "text-anchor": "end" }, fixed(y, 4))),
  s("text", { x: (M.left + W - M.right) / 2, y: H - 6, class: "plot-label", "text-anchor": "middle" }, plot.parameter),
  s("text", { x: 14, y: (M.top + H - M.bottom) / 2, class: "plot-label", "text-anchor": "middle",
    transform: `rotate(-90 14 ${(M.top + H - M.bottom) / 2})` }, "ψ W/(m·K)"),
  plot.series.map((line, n) => s("g", { class: `plot-series plot-series-${n % 6}`, testid: "psi-series" },
    s("title", { text: line.label }),
    s("polyline", { points: line.points.map(([x, y]) => `${px(x)},${py(y)}`).join(" "), class: "plot-line" }),
    line.points.map(([x, y]) => s("circle", { cx: px(x), cy: py(y), r: 3.5, class: "plot-point" },
      s("title", { text: `${line.label}: ${plot.parameter} ${x}, ψ ${fixed(y, 4)} W/(m·K)` }))))),
  plot.series.length > 1 ? plot.series.map((line, n) => s("text", { x: W - M.right - 4, y: M.top + 12 + 14 * n,
    "text-anchor": "end", class: `plot-legend plot-series-${n % 6}` }, line.label)) : null);
}
