// A scale bar for drawings: a round length of about 120 pixels at the current zoom.

import { s } from "../dom.js";

const UNIT_M = { mm: 0.001, m: 1 };

function niceLength(metres) {
  const mag = 10 ** Math.floor(Math.log10(metres));
  return [1, 2, 5, 10].map((k) => k * mag).find((v) => v >= metres) ?? metres;
}

function label(metres) {
  return metres >= 1 ? `${Number(metres.toPrecision(3))} m` : `${Number((metres * 1000).toPrecision(3))} mm`;
}

/** SVG group of a scale bar at the bottom left of a `height`-pixel drawing. */
export function scaleBar(view, unit, height) {
  const perUnit = UNIT_M[unit] ?? 1;
  const metres = niceLength((120 / view.scale) * perUnit);
  const px = (metres / perUnit) * view.scale;
  const y = height - 14;
  return s("g", { class: "scalebar", "aria-hidden": "true" },
    s("rect", { x: 10, y: y - 16, width: px + 12, height: 24, rx: 3, class: "scalebar-bg" }),
    s("line", { x1: 16, y1: y, x2: 16 + px, y2: y, class: "scalebar-line" }),
    s("line", { x1: 16, y1: y - 4, x2: 16, y2: y + 4, class: "scalebar-line" }),
    s("line", { x1: 16 + px, y1: y - 4, x2: 16 + px, y2: y + 4, class: "scalebar-line" }),
    s("text", { x: 16 + px / 2, y: y - 5, "text-anchor": "middle", class: "scalebar-text" }, label(metres)),
  );
}
