import { test } from "node:test";
import assert from "node:assert/strict";
import { csvField, keyFigureRows, toCsv, uTimesL } from "../js/lib/figures.js";

// The example response of the public contract (model-v1.md, "Response 200").
const RESULT = {
  id: "abc",
  heat_flows: { inside: 9.49, outside: -9.49 },
  L2D: 0.4745,
  psi: { value: 0.061, L2D: 0.4745, sum_UL: 0.4135,
    flanking: [{ id: "wall", u_value: 0.28, length: 1.2 }] },
  probes: { P1: 19.2 },
  surfaces: { inside: { min_temperature: 16.77, at: [0, 0] } },
  condensation: { fRsi: 0.81, min_temperature: 16.2, at: [0, 0], fRsi_critical: 0.72,
    verdict: "pass" },
  mesh: { nodes: 12000, elements: 23500, relative_change: 0.0004, converged: true },
  warnings: [],
};

test("key figures carry ψ, each U·l term, fRsi and the verdict", () => {
  const rows = keyFigureRows(RESULT);
  const get = (q) => rows.find((r) => r[0] === q);
  assert.deepEqual(get("psi"), ["psi", 0.061, "W/(m·K)"]);
  assert.deepEqual(get("flanking wall U·l"), ["flanking wall U·l", 0.336, "W/(m·K)"]);
  assert.deepEqual(get("fRsi"), ["fRsi", 0.81, ""]);
  assert.deepEqual(get("verdict"), ["verdict", "pass", ""]);
  assert.deepEqual(get("heat flow outside"), ["heat flow outside", -9.49, "W/m"]);
  assert.deepEqual(get("probe P1"), ["probe P1", 19.2, "°C"]);
  assert.deepEqual(get("warnings"), ["warnings", 0, ""]);
});

test("missing blocks are left out, not written as empty", () => {
  const rows = keyFigureRows({ id: "x", heat_flows: { a: 1, b: -1 } });
  assert.deepEqual(rows.map((r) => r[0]), ["evaluation id", "heat flow a", "heat flow b",
    "warnings"]);
});

test("U·l has no binary noise", () => {
  assert.equal(uTimesL({ u_value: 0.1, length: 3 }), 0.3);
});

test("CSV quoting follows RFC 4180", () => {
  assert.equal(csvField("plain"), "plain");
  assert.equal(csvField("a,b"), '"a,b"');
  assert.equal(csvField('say "hi"'), '"say ""hi"""');
  assert.equal(csvField("two\nlines"), '"two\nlines"');
  assert.equal(csvField(undefined), "");
  assert.equal(toCsv([["psi", 0.061, "W/(m·K)"]]), "quantity,value,unit\r\npsi,0.061,W/(m·K)\r\n");
});

test("exterior surfaces are θse, and coupling coefficients of three environments are listed", () => {
  const rows = keyFigureRows({
    id: "y",
    surfaces: { in: { side: "interior", min_temperature: 17 }, out: { side: "exterior", min_temperature: 1 } },
    coupling_coefficients: { environments: ["a", "b", "c"], matrix: [[1, 0.2, 0.3], [0.2, 1, 0.4], [0.3, 0.4, 1]] },
  });
  const names = rows.map((r) => r[0]);
  assert.ok(names.includes("theta_si,min in") && names.includes("theta_se,min out"));
  assert.deepEqual(rows.filter((r) => r[0].startsWith("L ")).map((r) => [r[0], r[1]]),
    [["L a-b", 0.2], ["L a-c", 0.3], ["L b-c", 0.4]]);
});

test("a temperature-certified result says so and gives no heat flow figures", () => {
  const rows = keyFigureRows({ id: "c1", heat_flows: { hot: null, cold: null }, L2D: null,
    condensation: { fRsi: null, verdict: null, not_assessed: "the interior surface meets a known temperature" },
    mesh: { nodes: 290, converged: true, certified_on: "temperatures", probe_change: 0.0047 } });
  const quantities = rows.map((r) => r[0]);
  assert.ok(!quantities.includes("L2D") && !quantities.includes("fRsi") && !quantities.includes("heat flow hot"));
  assert.deepEqual(rows.find((r) => r[0] === "mesh certified on"), ["mesh certified on", "temperatures", ""]);
  assert.deepEqual(rows.find((r) => r[0] === "mesh largest probe change"), ["mesh largest probe change", 0.0047, "K"]);
  assert.ok(rows.some((r) => r[0] === "fRsi not assessed"));
});
