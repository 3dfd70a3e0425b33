// The key figures of a result as rows [quantity, value, unit], shared by the results table
// and the CSV download, and the CSV text itself (RFC 4180 quoting).

function push(rows, quantity, value, unit = "") {
  if (value === undefined || value === null) return;
  rows.push([quantity, value, unit]);
}

function psiRows(rows, psi) {
  if (!psi) return;
  push(rows, "psi", psi.value, "W/(m·K)");
  push(rows, "psi L2D", psi.L2D, "W/(m·K)");
  push(rows, "psi sum U·l", psi.sum_UL, "W/(m·K)");
  for (const f of psi.flanking || []) {
    push(rows, `flanking ${f.id} U`, f.u_value, "W/(m²·K)");
    push(rows, `flanking ${f.id} l`, f.length, "m");
    if (f.u_value !== undefined && f.length !== undefined) {
      push(rows, `flanking ${f.id} U·l`, f.UL ?? uTimesL(f), "W/(m·K)");
    }
  }
}

/** U·l of one flanking element (W/(m·K)), rounded to remove binary noise. */
export function uTimesL(flank) {
  return Number((flank.u_value * flank.length).toPrecision(12));
}

function condensationRows(rows, c) {
  if (!c) return;
  push(rows, "fRsi", c.fRsi, "");
  push(rows, "fRsi critical", c.fRsi_critical, "");
  push(rows, "verdict", c.verdict, "");
  push(rows, "fRsi not assessed", c.not_assessed, "");
  push(rows, "theta_si,min (fRsi run)", c.min_temperature, "°C");
}

function meshRows(rows, mesh) {
  if (!mesh) return;
  push(rows, "mesh nodes", mesh.nodes, "");
  push(rows, "mesh elements", mesh.elements, "");
  push(rows, "mesh relative change of heat flow", mesh.relative_change, "");
  push(rows, "mesh converged", mesh.converged, "");
  push(rows, "mesh certified on", mesh.certified_on, "");
  push(rows, "mesh largest probe change", mesh.probe_change, "K");
}

function couplingRows(rows, coupling) {
  if (!coupling || !Array.isArray(coupling.environments)) return;
  const ids = coupling.environments;
  ids.forEach((a, i) => ids.forEach((b, j) => {
    if (j > i) push(rows, `L ${a}-${b}`, coupling.matrix?.[i]?.[j], "W/(m·K)");
  }));
}

/** Rows [quantity, value, unit] of the key figures of a model-v1 result. */
export function keyFigureRows(result) {
  const rows = [];
  push(rows, "evaluation id", result.id);
  for (const [env, q] of Object.entries(result.heat_flows || {})) {
    push(rows, `heat flow ${env}`, q, "W/m");
  }
  push(rows, "L2D", result.L2D, "W/(m·K)");
  psiRows(rows, result.psi);
  for (const [env, s] of Object.entries(result.surfaces || {})) {
    const symbol = s.side === "exterior" ? "theta_se,min" : "theta_si,min";
    push(rows, `${symbol} ${env}`, s.min_temperature, "°C");
  }
  couplingRows(rows, result.coupling_coefficients);
  condensationRows(rows, result.condensation);
  for (const [id, t] of Object.entries(result.probes || {})) push(rows, `probe ${id}`, t, "°C");
  meshRows(rows, result.mesh);
  push(rows, "warnings", (result.warnings || []).length);
  return rows;
}

/** One CSV field, quoted when it holds a comma, quote, or line break. */
export function csvField(value) {
  const s = value === null || value === undefined ? "" : String(value);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** CSV text (CRLF line ends, header row first). */
export function toCsv(rows, header = ["quantity", "value", "unit"]) {
  return [header, ...rows].map((r) => r.map(csvField).join(",")).join("\r\n") + "\r\n";
}
