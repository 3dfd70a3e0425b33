// API error bodies to a list of {field, message}, and matching of a field pointer to a form
// input. Accepts Coldseam's own bodies ({detail, field, message, errors}), a `detail` that is
// {field, message} or a list of them, FastAPI's default validation list ({loc, msg}), a plain
// string, or nothing useful at all.

function one(item) {
  if (typeof item === "string") return { field: "", message: item };
  if (!item || typeof item !== "object") return { field: "", message: String(item) };
  if ("message" in item || "field" in item) {
    return { field: String(item.field ?? ""), message: String(item.message ?? "") };
  }
  if ("msg" in item) {
    const loc = (item.loc || []).filter((p) => p !== "body").map(String);
    return { field: loc.length ? "/" + loc.join("/") : "", message: String(item.msg) };
  }
  return { field: "", message: JSON.stringify(item) };
}

/**
 * Normalised problems of an error response body with HTTP `status`. Coldseam's own bodies are
 * {detail: "<field>: <message>", field, message, errors?: [{field, message}]}.
 */
export function problems(body, status) {
  if (body && typeof body === "object" && Array.isArray(body.errors) && body.errors.length) {
    return body.errors.map(one);
  }
  if (body && typeof body === "object" && typeof body.message === "string" && body.message) {
    return [one(body)];
  }
  const detail = body && typeof body === "object" && "detail" in body ? body.detail : body;
  if (detail && typeof detail === "object" && Array.isArray(detail.errors)) {
    return detail.errors.map(one);
  }
  const list = Array.isArray(detail) ? detail.map(one) : detail ? [one(detail)] : [];
  if (list.length) return list;
  return [{ field: "", message: `The server answered ${status} without an explanation.` }];
}

/** Path segments of a JSON pointer ("/section/regions/0" → ["section", "regions", "0"]). */
export function pointerParts(pointer) {
  if (!pointer) return [];
  return pointer
    .replace(/^#?\//, "")
    .split("/")
    .map((p) => p.replace(/~1/g, "/").replace(/~0/g, "~"))
    .filter((p) => p !== "");
}

/**
 * The input name a problem belongs to, given the names on the form: the deepest pointer
 * segment that names an input ("/params/slab_thickness" → "slab_thickness"), else null.
 */
export function matchField(pointer, names) {
  const known = new Set(names);
  const parts = pointerParts(pointer);
  for (let i = parts.length - 1; i >= 0; i--) if (known.has(parts[i])) return parts[i];
  return null;
}
