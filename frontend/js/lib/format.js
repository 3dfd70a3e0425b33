// Number formatting for engineering figures.

/** Fixed-decimals string, "—" for a missing value; minus sign typographically correct. */
export function fixed(value, decimals) {
  if (value === null || value === undefined || !Number.isFinite(Number(value))) return "—";
  const s = Number(value).toFixed(decimals);
  return s.startsWith("-") && Number(s) !== 0 ? "\u2212" + s.slice(1) : s.replace(/^-/, "");
}

/** Significant-figure string for quantities of unknown magnitude. */
export function sig(value, digits = 4) {
  if (value === null || value === undefined || !Number.isFinite(Number(value))) return "—";
  const v = Number(value);
  if (v === 0) return "0";
  const mag = Math.floor(Math.log10(Math.abs(v)));
  const decimals = Math.max(0, digits - 1 - mag);
  return fixed(v, Math.min(decimals, 8));
}

/** Percentage from a fraction. */
export function percent(fraction, decimals = 2) {
  if (fraction === null || fraction === undefined) return "—";
  return `${fixed(100 * fraction, decimals)} %`;
}

/** A point in metres shown in millimetres: "(120, 45) mm". */
export function pointMm(at) {
  if (!Array.isArray(at)) return "—";
  return `(${fixed(at[0] * 1000, 0)}, ${fixed(at[1] * 1000, 0)}) mm`;
}
