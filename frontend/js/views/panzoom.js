// Zoom and pan for a drawing surface: wheel zooms about the cursor, drag pans, and buttons
// plus keys (+, −, 0, arrows) do the same for keyboard users.

import { h } from "../dom.js";
import { fitView, panBy, zoomAt } from "../lib/viewport.js";

const STEP = 1.25;

/**
 * Make `surface` zoomable. `getBox()` gives the world box to fit, `draw(view)` repaints.
 * Returns {toolbar, refit, zoomTo(box), view()}.
 */
export function attachPanZoom(surface, getBox, draw) {
  let view = null;
  let frame = 0;
  const size = () => [surface.clientWidth || 600, surface.clientHeight || 400];
  const schedule = () => {
    cancelAnimationFrame(frame);
    frame = requestAnimationFrame(() => draw(view));
  };
  const set = (next) => { view = next; schedule(); };
  const refit = () => {
    if (surface.isConnected && surface.clientWidth) set(fitView(getBox(), ...size()));
  };
  const zoom = (factor, sx, sy) => {
    if (!view) return;
    const [w, hgt] = size();
    set(zoomAt(view, factor, sx ?? w / 2, sy ?? hgt / 2));
  };
  wheel(surface, zoom);
  const pan = (dx, dy) => view && set(panBy(view, dx, dy));
  drag(surface, pan);
  keys(surface, zoom, pan, refit);
  new ResizeObserver(() => refit()).observe(surface);
  const toolbar = h("div", { class: "zoom-tools", role: "group", "aria-label": "Zoom" },
    h("button", { type: "button", title: "Zoom in", "aria-label": "Zoom in", onclick: () => zoom(STEP) }, "+"),
    h("button", { type: "button", title: "Zoom out", "aria-label": "Zoom out", onclick: () => zoom(1 / STEP) }, "\u2212"),
    h("button", { type: "button", title: "Fit to view", "aria-label": "Fit to view", onclick: refit }, "Fit"),
  );
  const zoomTo = (box) => { if (surface.clientWidth) set(fitView(box, ...size())); };
  return { toolbar, refit, zoomTo, view: () => view };
}

function wheel(surface, zoom) {
  surface.addEventListener("wheel", (event) => {
    event.preventDefault();
    const rect = surface.getBoundingClientRect();
    const factor = Math.exp(-event.deltaY * 0.0015);
    zoom(factor, event.clientX - rect.left, event.clientY - rect.top);
  }, { passive: false });
}

function drag(surface, pan) {
  let last = null;
  surface.addEventListener("pointerdown", (event) => {
    if (event.button !== 0) return;
    last = [event.clientX, event.clientY];
    surface.setPointerCapture(event.pointerId);
    surface.classList.add("dragging");
  });
  surface.addEventListener("pointermove", (event) => {
    if (!last) return;
    pan(event.clientX - last[0], event.clientY - last[1]);
    last = [event.clientX, event.clientY];
  });
  const end = () => { last = null; surface.classList.remove("dragging"); };
  surface.addEventListener("pointerup", end);
  surface.addEventListener("pointercancel", end);
}

function keys(surface, zoom, pan, refit) {
  const moves = { ArrowLeft: [40, 0], ArrowRight: [-40, 0], ArrowUp: [0, 40], ArrowDown: [0, -40] };
  surface.addEventListener("keydown", (event) => {
    if (event.key === "+" || event.key === "=") zoom(STEP);
    else if (event.key === "-" || event.key === "_") zoom(1 / STEP);
    else if (event.key === "0") refit();
    else if (moves[event.key]) pan(...moves[event.key]);
    else return;
    event.preventDefault();
  });
}
