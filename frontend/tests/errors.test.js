import { test } from "node:test";
import assert from "node:assert/strict";
import { matchField, pointerParts, problems } from "../js/lib/errors.js";

test("a single Coldseam detail", () => {
  const body = { detail: { field: "/section/unit", message: "'unit' is required" } };
  assert.deepEqual(problems(body, 422), [{ field: "/section/unit", message: "'unit' is required" }]);
});

test("a list of details, and FastAPI's own validation list", () => {
  const ours = { detail: [{ field: "/a", message: "m1" }, { field: "/b", message: "m2" }] };
  assert.equal(problems(ours, 422).length, 2);
  const fastapi = { detail: [{ loc: ["body", "params", "width"], msg: "too big", type: "x" }] };
  assert.deepEqual(problems(fastapi, 422), [{ field: "/params/width", message: "too big" }]);
});

test("a detail with an errors list expands it", () => {
  const body = { detail: { field: "/x", message: "first", errors: [
    { field: "/x", message: "first" }, { field: "/y", message: "second" }] } };
  assert.deepEqual(problems(body, 422).map((p) => p.field), ["/x", "/y"]);
});

test("strings and empty bodies still say something", () => {
  assert.deepEqual(problems({ detail: "file too large" }, 413), [{ field: "", message: "file too large" }]);
  assert.match(problems(null, 502)[0].message, /502/);
});

test("pointers map to the deepest known input name", () => {
  assert.deepEqual(pointerParts("/layer_map/A~1B/material"), ["layer_map", "A/B", "material"]);
  assert.equal(matchField("/params/slab_thickness", ["slab_thickness", "width"]), "slab_thickness");
  assert.equal(matchField("/section/regions/0", ["width"]), null);
  assert.equal(matchField("", ["width"]), null);
});

test("Coldseam's own error body: field and message beside a joined detail", () => {
  const body = { detail: "/section/unit: 'unit' is required", field: "/section/unit",
    message: "'unit' is required", kind: "InvalidSection", request_id: "r1" };
  assert.deepEqual(problems(body, 422), [{ field: "/section/unit", message: "'unit' is required" }]);
  const many = { ...body, errors: [{ field: "/a", message: "x" }, { field: "/b", message: "y" }] };
  assert.deepEqual(problems(many, 422).map((p) => p.field), ["/a", "/b"]);
  assert.deepEqual(problems({ detail: "no evaluation abc (for this key)" }, 404),
    [{ field: "", message: "no evaluation abc (for this key)" }]);
});
