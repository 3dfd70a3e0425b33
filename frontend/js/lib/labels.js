// Placing text labels on a drawing so that none covers another: boxes in screen pixels,
// estimated from the text length (the page's label fonts are about 0.6 em per character).

/** Box {x0, y0, x1, y1} of `text` drawn at (x, y) (SVG baseline) in a `size` px font. */
export function textBox(x, y, text, size = 12, anchor = "start") {
  const width = 0.6 * size * String(text).length;
  const x0 = anchor === "middle" ? x - width / 2 : anchor === "end" ? x - width : x;
  return { x0, y0: y - 0.85 * size, x1: x0 + width, y1: y + 0.25 * size };
}

/** Whether boxes `a` and `b` come closer than `gap` px. */
export function overlaps(a, b, gap = 2) {
  return a.x0 < b.x1 + gap && b.x0 < a.x1 + gap && a.y0 < b.y1 + gap && b.y0 < a.y1 + gap;
}

function inside(box, area) {
  return !area || (box.x0 >= area.x0 && box.x1 <= area.x1 && box.y0 >= area.y0 && box.y1 <= area.y1);
}

/**
 * The first candidate {box, ...} whose box meets none of `taken` and lies in `area`; it is
 * added to `taken`. Null when none is free (with `fallback`, the last candidate is taken
 * anyway).
 */
export function firstFree(candidates, taken, area = null, fallback = false) {
  const free = candidates.find((c) => inside(c.box, area) && !taken.some((t) => overlaps(c.box, t)));
  const chosen = free || (fallback ? candidates[candidates.length - 1] : null);
  if (chosen) taken.push(chosen.box);
  return chosen || null;
}

/** A temperature label with its unit: "2.5 °C", "12 °C", "−4 °C". */
export function degrees(value) {
  const v = Number(value);
  const text = Number.isInteger(v) ? String(v) : String(Number(v.toFixed(2)));
  return `${text.replace(/^-/, "\u2212")} °C`;
}
