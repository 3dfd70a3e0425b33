import { test } from "node:test";
import assert from "node:assert/strict";
import { accessProblems, checkKey, KEY_LABEL, withKey } from "../js/lib/access.js";

test("a typed key is trimmed; empty means no key", () => {
  assert.deepEqual(checkKey("  site-office-key \n"), { key: "site-office-key", error: "" });
  assert.deepEqual(checkKey("   "), { key: "", error: "" });
  assert.deepEqual(checkKey(undefined), { key: "", error: "" });
});

test("a key that cannot go in a header is refused with a reason", () => {
  for (const bad of ["two words", "clé-du-chantier", "line\nbreak", "tab\there"]) {
    const { error } = checkKey(bad);
    assert.match(error, /letters, digits and punctuation/, bad);
  }
});

test("the bearer header is added only with a key, and extra headers are kept", () => {
  assert.deepEqual(withKey("k1", { Accept: "application/json" }),
    { Accept: "application/json", Authorization: "Bearer k1" });
  assert.deepEqual(withKey("", { Accept: "application/json" }), { Accept: "application/json" });
  const extra = { Accept: "text/plain" };
  withKey("k2", extra);
  assert.deepEqual(extra, { Accept: "text/plain" }, "the caller's object is not changed");
});

test("a 401 says the server needs an access key, or refused the one given", () => {
  const server = [{ field: "", message: "this server needs an API key: send the header 'Authorization: Bearer <key>'" }];
  const [missing] = accessProblems(401, server, false);
  assert.match(missing.message, /^This server needs an access key\./);
  assert.ok(missing.message.includes(KEY_LABEL));
  assert.doesNotMatch(missing.message, /Bearer|header/);
  const [refused] = accessProblems(401, server, true);
  assert.match(refused.message, /did not accept the access key/);
});

test("other answers pass unchanged", () => {
  const list = [{ field: "/parameters/x", message: "too big" }];
  assert.equal(accessProblems(422, list, true), list);
  assert.equal(accessProblems(404, list, false), list);
});
