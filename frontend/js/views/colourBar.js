// The vertical colour bar of the temperature field, warm at the top, ticks in °C.

import { h, s } from "../dom.js";
import { thermalLut } from "../lib/colormap.js";
import { fixed } from "../lib/format.js";

const HEIGHT = 240;

function gradientCanvas() {
  const lut = thermalLut();
  const n = lut.length / 3;
  const canvas = h("canvas", { class: "colourbar-canvas", width: 1, height: n });
  const ctx = canvas.getContext("2d");
  const image = ctx.createImageData(1, n);
  for (let i = 0; i < n; i++) {
    const k = (n - 1 - i) * 3;
    image.data.set([lut[k], lut[k + 1], lut[k + 2], 255], i * 4);
  }
  ctx.putImageData(image, 0, 0);
  return canvas;
}

/** Colour bar from `lo` to `hi` °C with the isotherm `levels` as ticks. */
export function colourBar(lo, hi, levels) {
  const ticks = [lo, ...levels, hi];
  const y = (t) => 6 + (1 - (t - lo) / (hi - lo || 1)) * HEIGHT;
  const axis = s("svg", { class: "colourbar-axis", viewBox: `0 0 64 ${HEIGHT + 12}`, "aria-hidden": "true" },
    ticks.map((t, i) => {
      const end = i === 0 || i === ticks.length - 1;
      const tooClose = !end && (Math.abs(y(t) - y(lo)) < 12 || Math.abs(y(t) - y(hi)) < 12);
      return s("g", {}, s("line", { x1: 0, x2: end ? 8 : 5, y1: y(t), y2: y(t), class: "tick" }),
        tooClose ? null : s("text", { x: 11, y: y(t) + 4, class: end ? "tick-label end" : "tick-label" },
          fixed(t, end ? 2 : 1)));
    }));
  return h("div", { class: "colourbar", role: "img", testid: "colour-bar",
    "aria-label": `Colour scale from ${fixed(lo, 2)} °C (dark) to ${fixed(hi, 2)} °C (light)` },
  h("span", { class: "colourbar-unit" }, "°C"), h("div", { class: "colourbar-body" }, gradientCanvas(), axis));
}
