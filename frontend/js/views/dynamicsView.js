// The dynamic results of an evaluation: the ISO 13786 periodic figures in a table, the slowest
// time constants, and the transient picture drawn by the server (surface temperatures with
// the dew point, heat flows).

import { apiKey, blobUrl, evaluationUrl } from "../api.js";
import { card, h } from "../dom.js";
import { fixed } from "../lib/format.js";
import { pairs, table } from "./tables.js";

/** Rows [figure, environments, value, unit, time shift] of a `dynamics.periodic` block. */
export function periodicRows(periodic) {
  const rows = [];
  const pair = (key) => key.replace("|", " → ");
  for (const [key, v] of Object.entries(periodic.coupling || {}))
    rows.push(["Periodic coupling", pair(key), fixed(v.modulus, 4), "W/(m·K)", `${fixed(v.time_shift_hours, 2)} h`]);
  for (const [key, v] of Object.entries(periodic.decrement_factor || {}))
    rows.push(["Decrement factor", pair(key), fixed(v, 3), "", "—"]);
  for (const [env, v] of Object.entries(periodic.admittance || {}))
    rows.push(["Admittance", env, fixed(v.modulus, 3), "W/(m·K)", `${fixed(v.time_shift_hours, 2)} h`]);
  for (const [env, v] of Object.entries(periodic.heat_capacity || {}))
    rows.push(["Heat capacity", env, fixed(v / 1000, 1), "kJ/(m·K)", "—"]);
  return rows;
}

function transientFigure(result) {
  const img = h("img", { class: "transient-plot", testid: "transient-plot",
    alt: "Lowest surface temperatures, air temperatures, dew point and heat flows over the transient run" });
  const url = evaluationUrl(result.id, "transient.svg");
  if (apiKey()) blobUrl(url).then((blob) => { img.src = blob; }).catch((err) => { img.alt = err.message; });
  else img.src = url;
  return h("figure", { class: "transient" }, img);
}

/** The dynamics card, or null when the evaluation asked for none. */
export function dynamicsCard(result) {
  const d = result.dynamics;
  if (!d) return null;
  const body = [];
  if (d.periodic) {
    body.push(h("p", { class: "hint" }, `ISO 13786 figures per metre of junction at a period of ${fixed(d.periodic.period_hours, 1)} h; the time shift is the lag behind the cause.`));
    body.push(table(["Figure", "Environments", "Value", "Unit", "Time shift"], periodicRows(d.periodic), { testid: "periodic-table" }));
  }
  if (d.time_constants_hours)
    body.push(pairs([["Slowest time constants", d.time_constants_hours.map((t) => fixed(t, 2)).join(", "), "h", "time-constants"]]));
  if (d.transient) body.push(transientFigure(result));
  return card("Dynamic behaviour", body);
}
