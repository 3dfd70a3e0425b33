// Bars of the sensitivity chart from `result.sensitivities`: per material, the change of ψ
// (or of L2D when ψ is not computed) per unit relative change of its conductivity.

/** [{label, value}] sorted by magnitude, with the quantity shown; empty when nothing to show. */
/** Sensitivities smaller than this (W/(m·K)) are rounding noise of the solve: shown as zero. */
export const NOISE = 1e-9;

export function sensitivityBars(sensitivities, { psi = true } = {}) {
  if (!Array.isArray(sensitivities) || !sensitivities.length) return { quantity: null, bars: [] };
  // ψ only when the result has one: without flanking elements there is no ψ to move
  const hasPsi = psi && sensitivities.some((s) => Number.isFinite(s.dpsi_dlnlambda));
  const key = hasPsi ? "dpsi_dlnlambda" : "dL2D_dlnlambda";
  const bars = sensitivities
    .filter((s) => Number.isFinite(s[key]))
    .map((s) => ({ label: String(s.material ?? s.id ?? "?"), value: Math.abs(s[key]) < NOISE ? 0 : s[key] }))
    .sort((a, b) => Math.abs(b.value) - Math.abs(a.value));
  return { quantity: hasPsi ? "psi" : "L2D", bars };
}

/** Bar geometry: each bar's start and width in 0..1 of the plot, around a zero line. */
export function barLayout(bars) {
  const lo = Math.min(0, ...bars.map((b) => b.value));
  const hi = Math.max(0, ...bars.map((b) => b.value));
  const span = hi - lo || 1;
  const zero = -lo / span;
  return {
    zero,
    bars: bars.map((b) => ({ ...b, start: Math.min(zero, zero + b.value / span),
      width: Math.abs(b.value) / span })),
  };
}
