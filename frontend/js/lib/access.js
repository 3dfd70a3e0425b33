// Access keys of a server that has them: checking what was typed, the request headers that
// carry a key, and the server's 401 answers put in an engineer's words. No DOM, no storage.

/** Where the page keeps the key field (the masthead button and the form's label say this). */
export const KEY_LABEL = "Access key";

/**
 * The key as typed, trimmed, and what is wrong with it ("" when it is usable). A key is sent
 * in an HTTP header, so it must be printable ASCII without spaces.
 */
export function checkKey(text) {
  const key = String(text ?? "").trim();
  if (!key) return { key: "", error: "" };
  if (!/^[\x21-\x7e]+$/.test(key)) {
    return { key, error: "An access key is letters, digits and punctuation only, without spaces or accents; check that it was copied whole." };
  }
  return { key, error: "" };
}

/** Headers of a request: `extra`, with `Authorization: Bearer <key>` when a key is given. */
export function withKey(key, extra = {}) {
  return key ? { ...extra, Authorization: `Bearer ${key}` } : { ...extra };
}

/**
 * The problems to show for an answer with `status`: a 401 is the server asking for an access
 * key (or refusing the one sent), said plainly with where to enter it; others pass unchanged.
 */
export function accessProblems(status, problems, keySent) {
  if (status !== 401) return problems;
  const message = keySent
    ? `This server did not accept the access key given. Check it under “${KEY_LABEL}” at the top of the page (ask whoever runs the server for a valid key).`
    : `This server needs an access key. Enter it under “${KEY_LABEL}” at the top of the page (ask whoever runs the server for one).`;
  return [{ field: "", message }];
}
