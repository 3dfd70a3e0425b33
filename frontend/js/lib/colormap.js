// Coldseam thermal colour map: a path through OKLab with lightness rising monotonically from a
// deep blue-violet (cold) through teal and green to a pale straw (warm), resampled so equal steps
// in value are equal steps in OKLab distance (perceptually uniform by construction).
// OKLab: B. Ottosson, "A perceptual color space for image processing" (2020).

/** Control points in OKLCH: [L 0..1, C, h degrees]. Lightness strictly increasing. */
export const CONTROL_LCH = [
  [0.27, 0.10, 285],
  [0.42, 0.12, 255],
  [0.56, 0.10, 215],
  [0.68, 0.11, 170],
  [0.80, 0.13, 125],
  [0.93, 0.11, 95],
];

const LUT_SIZE = 256;

/** OKLab [L, a, b] to linear sRGB [r, g, b] (may be outside 0..1). */
export function oklabToLinearSrgb([L, a, b]) {
  const l = (L + 0.3963377774 * a + 0.2158037573 * b) ** 3;
  const m = (L - 0.1055613458 * a - 0.0638541728 * b) ** 3;
  const s = (L - 0.0894841775 * a - 1.2914855480 * b) ** 3;
  return [
    4.0767416621 * l - 3.3077115913 * m + 0.2309699292 * s,
    -1.2684380046 * l + 2.6097574011 * m - 0.3413193965 * s,
    -0.0041960863 * l - 0.7034186147 * m + 1.7076147010 * s,
  ];
}

/** Linear sRGB to OKLab. */
export function linearSrgbToOklab([r, g, b]) {
  const l = Math.cbrt(0.4122214708 * r + 0.5363325363 * g + 0.0514459929 * b);
  const m = Math.cbrt(0.2119034982 * r + 0.6806995451 * g + 0.1073969566 * b);
  const s = Math.cbrt(0.0883024619 * r + 0.2817188376 * g + 0.6299787005 * b);
  return [
    0.2104542553 * l + 0.7936177850 * m - 0.0040720468 * s,
    1.9779984951 * l - 2.4285922050 * m + 0.4505937099 * s,
    0.0259040371 * l + 0.7827717662 * m - 0.8086757660 * s,
  ];
}

function gammaEncode(c) {
  return c <= 0.0031308 ? 12.92 * c : 1.055 * c ** (1 / 2.4) - 0.055;
}

function lchToLab([L, C, h]) {
  const rad = (h * Math.PI) / 180;
  return [L, C * Math.cos(rad), C * Math.sin(rad)];
}

function inGamut(rgb) {
  return rgb.every((c) => c >= -1e-6 && c <= 1 + 1e-6);
}

/** Largest chroma at constant L and hue that is inside sRGB (bisection); returns OKLab. */
export function clipToGamut(lab) {
  const [L, a, b] = lab;
  if (inGamut(oklabToLinearSrgb(lab))) return [L, a, b];
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 30; i++) {
    const mid = (lo + hi) / 2;
    if (inGamut(oklabToLinearSrgb([L, a * mid, b * mid]))) lo = mid;
    else hi = mid;
  }
  return [L, a * lo, b * lo];
}

function lerp(p, q, t) {
  return p.map((v, i) => v + (q[i] - v) * t);
}

function hueLerp(p, q, t) {
  let dh = q[2] - p[2];
  if (dh > 180) dh -= 360;
  if (dh < -180) dh += 360;
  return [p[0] + (q[0] - p[0]) * t, p[1] + (q[1] - p[1]) * t, p[2] + dh * t];
}

/** Dense OKLab samples along the control path (piecewise in LCH), gamut-clipped. */
function densePath(control, perSegment) {
  const out = [];
  for (let k = 0; k < control.length - 1; k++) {
    for (let i = 0; i < perSegment; i++) {
      out.push(clipToGamut(lchToLab(hueLerp(control[k], control[k + 1], i / perSegment))));
    }
  }
  out.push(clipToGamut(lchToLab(control[control.length - 1])));
  return out;
}

export function deltaE(p, q) {
  return Math.hypot(p[0] - q[0], p[1] - q[1], p[2] - q[2]);
}

/** Resample a polyline in OKLab at `n` points equally spaced in arc length. */
function resampleByArcLength(path, n) {
  const cum = [0];
  for (let i = 1; i < path.length; i++) cum.push(cum[i - 1] + deltaE(path[i - 1], path[i]));
  const total = cum[cum.length - 1];
  const out = [];
  let j = 1;
  for (let i = 0; i < n; i++) {
    const target = (total * i) / (n - 1);
    while (j < path.length - 1 && cum[j] < target) j++;
    const span = cum[j] - cum[j - 1] || 1;
    out.push(lerp(path[j - 1], path[j], Math.min(1, Math.max(0, (target - cum[j - 1]) / span))));
  }
  return out;
}

/** The OKLab colours of the map, `n` entries, cold first. */
export function buildLabTable(n = LUT_SIZE, control = CONTROL_LCH) {
  return resampleByArcLength(densePath(control, 64), n);
}

/** OKLab to 8-bit sRGB [r, g, b]. */
export function labToRgb8(lab) {
  return oklabToLinearSrgb(lab).map((c) =>
    Math.round(255 * Math.min(1, Math.max(0, gammaEncode(Math.min(1, Math.max(0, c)))))),
  );
}

/** Flat Uint8ClampedArray lookup table, RGB triplets, `n` entries. */
export function buildLut(n = LUT_SIZE) {
  const lut = new Uint8ClampedArray(n * 3);
  buildLabTable(n).forEach((lab, i) => lut.set(labToRgb8(lab), i * 3));
  return lut;
}

let defaultLut = null;

/** The shared 256-entry table. */
export function thermalLut() {
  defaultLut ??= buildLut();
  return defaultLut;
}

/** Colour of value `v` on the range [lo, hi] as [r, g, b] 0..255 (clamped at the ends). */
export function colourAt(v, lo, hi, lut = thermalLut()) {
  const n = lut.length / 3;
  const t = hi > lo ? (v - lo) / (hi - lo) : 0.5;
  const i = Math.round(Math.min(1, Math.max(0, t)) * (n - 1)) * 3;
  return [lut[i], lut[i + 1], lut[i + 2]];
}

/** CSS colour string for value `v` on [lo, hi]. */
export function cssColourAt(v, lo, hi, lut = thermalLut()) {
  const [r, g, b] = colourAt(v, lo, hi, lut);
  return `rgb(${r}, ${g}, ${b})`;
}

/** Relative luminance-ish lightness of an sRGB colour: choose dark or light text over it. */
export function textColourOver([r, g, b]) {
  const L = linearSrgbToOklab([r, g, b].map((c) => (c / 255) ** 2.2))[0];
  return L > 0.62 ? "#10202a" : "#ffffff";
}
