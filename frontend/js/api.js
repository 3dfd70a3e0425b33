// The Coldseam HTTP API (model-v1 contract). Every non-2xx answer becomes an ApiError carrying
// the normalised problems [{field, message}] so views can put each one beside its input.

import { accessProblems, withKey } from "./lib/access.js";
import { problems } from "./lib/errors.js";

export const BASE = "api/v1";
const KEY_STORE = "coldseam.api-key";

/** Dispatched on window when the server answers 401: the key form opens itself. */
export const KEY_NEEDED = "coldseam:key-needed";

/** The access key of a server that needs one (kept for this browser tab only, never in the URL). */
export function apiKey() {
  return sessionStorage.getItem(KEY_STORE) || "";
}

export function setApiKey(key) {
  if (key) sessionStorage.setItem(KEY_STORE, key);
  else sessionStorage.removeItem(KEY_STORE);
}

/** Every request of the page goes through here: its headers carry the key when one is set. */
function headers(extra = {}) {
  return withKey(apiKey(), extra);
}

/** The ApiError of a failed answer; a 401 also asks the key form to open. */
async function failure(response) {
  const sent = Boolean(apiKey());
  const list = accessProblems(response.status, problems(await readBody(response), response.status), sent);
  if (response.status === 401) window.dispatchEvent(new CustomEvent(KEY_NEEDED, { detail: { sent } }));
  return new ApiError(response.status, list);
}

export class ApiError extends Error {
  constructor(status, problemList) {
    super(problemList.map((p) => p.message).join("; "));
    this.status = status;
    this.problems = problemList;
  }
}

async function readBody(response) {
  const text = await response.text();
  if (!text) return null;
  try {
    return JSON.parse(text);
  } catch {
    return text;
  }
}

/** Fetch `path` under the API base; `json` or `form` is the body. Resolves {status, data}. */
export async function call(path, { method = "GET", json, form, text, type, signal } = {}) {
  const init = { method, signal, headers: headers({ Accept: "application/json" }) };
  if (json !== undefined) {
    init.body = JSON.stringify(json);
    init.headers["Content-Type"] = "application/json";
  } else if (form) init.body = form;
  else if (text !== undefined) {
    init.body = text;
    init.headers["Content-Type"] = type || "text/plain";
  }
  let response;
  try {
    response = await fetch(`${BASE}/${path}`, init);
  } catch (err) {
    if (err.name === "AbortError") throw err;
    throw new ApiError(0, [{ field: "", message: "The Coldseam service cannot be reached." }]);
  }
  if (!response.ok) throw await failure(response);
  return { status: response.status, data: await readBody(response) };
}

export const listTemplates = () => call("templates").then((r) => asList(r.data, "templates"));
export const listMaterials = () => call("materials").then((r) => asList(r.data, "materials"));

/** A list answer, either bare or wrapped as {key: [...]}. */
export function asList(data, key) {
  if (Array.isArray(data)) return data;
  if (data && Array.isArray(data[key])) return data[key];
  if (data && Array.isArray(data.items)) return data.items;
  return [];
}

export function templateSection(id, params, signal) {
  return call(`templates/${encodeURIComponent(id)}/section`, { method: "POST", json: { parameters: params }, signal })
    .then((r) => r.data);
}

/** Start an evaluation without waiting; resolves the evaluation document (202 or 200). */
export function startEvaluation(request) {
  return call("evaluations?wait=false", { method: "POST", json: request }).then((r) => r.data);
}

export function getEvaluation(id, signal) {
  return call(`evaluations/${encodeURIComponent(id)}`, { signal }).then((r) => r.data);
}

export function getField(id, signal) {
  return call(`evaluations/${encodeURIComponent(id)}/field`, { signal }).then((r) => r.data);
}

/** POST a DXF file, with an optional layer map and drawing unit. */
export function importDxf(file, layerMap, unit) {
  const form = new FormData();
  form.append("file", file, file.name);
  if (layerMap) form.append("layer_map", JSON.stringify(layerMap));
  if (unit) form.append("unit", unit);
  return call("imports/dxf", { method: "POST", form }).then((r) => r.data);
}

/** A resource of the API as a blob URL (for links when the server needs a key). */
export async function blobUrl(url) {
  const response = await fetch(url, { headers: headers() });
  if (!response.ok) throw await failure(response);
  return URL.createObjectURL(await response.blob());
}

/** Address of an evaluation's own resource (picture, report) for links. */
export function evaluationUrl(id, tail) {
  return `${BASE}/evaluations/${encodeURIComponent(id)}/${tail}`;
}

/** Start a batch: a batch document (JSON), or a CSV schedule as text. Resolves {id, ...}. */
export function startBatch({ json, csv, name }) {
  const query = name ? `?name=${encodeURIComponent(name)}` : "";
  const body = csv !== undefined ? { text: csv, type: "text/csv" } : { json };
  return call(`batches${query}`, { method: "POST", ...body }).then((r) => r.data);
}

export function getBatch(id, signal) {
  return call(`batches/${encodeURIComponent(id)}?limit=1000`, { signal }).then((r) => r.data);
}

export function cancelBatch(id) {
  return call(`batches/${encodeURIComponent(id)}/cancel`, { method: "POST" }).then((r) => r.data);
}

/** Address of a batch's own resource (results.csv, results.xlsx, report) for links. */
export function batchUrl(id, tail) {
  return `${BASE}/batches/${encodeURIComponent(id)}/${tail}`;
}
