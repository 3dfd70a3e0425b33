// Junction schedules and grids for the page, no DOM: the values typed for a grid, the batch
// document of a grid, and the series of a ψ-against-parameter plot from a finished batch.

/** The values of a grid cell: "100, 160, 200" → [100, 160, 200]; text stays text; blank → []. */
export function parseValues(text) {
  return String(text ?? "")
    .split(/[,;]/)
    .map((part) => part.trim())
    .filter((part) => part !== "")
    .map((part) => (Number.isFinite(Number(part)) ? Number(part) : part));
}

/** How many items a grid of `valuesByName` ({name: [values]}) makes (1 when nothing varies). */
export function gridSize(valuesByName) {
  return Object.values(valuesByName).reduce((n, values) => n * Math.max(values.length, 1), 1);
}

/** The batch document of a grid: only parameters with values are sent. */
export function gridDocument(template, valuesByName, { length, name } = {}) {
  const parameters = {};
  for (const [key, values] of Object.entries(valuesByName)) {
    if (values.length) parameters[key] = values.length === 1 ? values[0] : values;
  }
  const grid = { template, parameters };
  if (Number.isFinite(length)) grid.length = length;
  const doc = { grid };
  if (name) doc.name = name;
  return doc;
}

/** The parameters of a batch's grid that take more than one value, in the grid's order. */
export function variedParameters(batch) {
  const parameters = (batch && batch.grid && batch.grid.parameters) || {};
  return Object.entries(parameters)
    .filter(([, values]) => Array.isArray(values) && values.length > 1)
    .map(([key]) => key);
}

/**
 * The plot of ψ against the first numeric varied parameter of a grid batch: one series per
 * combination of the other varied parameters, points sorted by x; null when there is nothing
 * to plot. Items not done are left out of their series.
 */
export function psiSeries(batch) {
  const varied = variedParameters(batch);
  const items = (batch.items || []).filter((i) => i.parameters && varied.every((k) => k in i.parameters));
  const x = varied.find((k) => items.some((i) => typeof i.parameters[k] === "number"));
  if (!x) return null;
  const others = varied.filter((k) => k !== x);
  const byLabel = new Map();
  for (const item of items) {
    const label = others.map((k) => `${k}=${item.parameters[k]}`).join(", ") || "ψ";
    if (!byLabel.has(label)) byLabel.set(label, []);
    if (item.status === "done" && Number.isFinite(item.psi)) byLabel.get(label).push([item.parameters[x], item.psi]);
  }
  const series = [...byLabel].map(([label, points]) => ({ label, points: points.sort((a, b) => a[0] - b[0]) }));
  return { parameter: x, series };
}

/** Rounded axis limits with a little room: [lo, hi] around `values`. */
export function axisRange(values) {
  const finite = values.filter(Number.isFinite);
  if (!finite.length) return [0, 1];
  let lo = Math.min(...finite);
  let hi = Math.max(...finite);
  if (lo === hi) {
    const pad = Math.abs(lo) * 0.1 || 1;
    return [lo - pad, hi + pad];
  }
  const pad = (hi - lo) * 0.05;
  return [lo - pad, hi + pad];
}

/** Counts of a batch as one line: "12 of 40 finished · 1 failed · 2 running". */
export function countsLine(batch) {
  const c = batch.counts || {};
  const finished = (c.done || 0) + (c.failed || 0);
  return `${finished} of ${batch.total} finished · ${c.failed || 0} failed · ${c.running || 0} running`;
}
