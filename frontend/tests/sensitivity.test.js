import { test } from "node:test";
import assert from "node:assert/strict";
import { barLayout, sensitivityBars } from "../js/lib/sensitivity.js";

test("ψ sensitivities sorted by magnitude", () => {
  const { quantity, bars } = sensitivityBars([
    { material: "eps", dL2D_dlnlambda: 0.2, dpsi_dlnlambda: 0.01 },
    { material: "concrete", dL2D_dlnlambda: 0.05, dpsi_dlnlambda: 0.04 },
    { material: "steel", dL2D_dlnlambda: 0.0, dpsi_dlnlambda: -0.02 },
  ]);
  assert.equal(quantity, "psi");
  assert.deepEqual(bars.map((b) => b.label), ["concrete", "steel", "eps"]);
});

test("L2D when ψ was not computed; nothing for no data", () => {
  const out = sensitivityBars([{ material: "a", dL2D_dlnlambda: 0.3, dpsi_dlnlambda: null }]);
  assert.equal(out.quantity, "L2D");
  assert.equal(out.bars[0].value, 0.3);
  assert.deepEqual(sensitivityBars(undefined).bars, []);
});

test("bars sit on a shared zero line and fill the plot", () => {
  const { zero, bars } = barLayout([{ label: "a", value: 3 }, { label: "b", value: -1 }]);
  assert.equal(zero, 0.25);
  assert.deepEqual([bars[0].start, bars[0].width], [0.25, 0.75]);
  assert.deepEqual([bars[1].start, bars[1].width], [0, 0.25]);
});

test("rounding noise counts as zero", () => {
  const { bars } = sensitivityBars([{ material: "a", dpsi_dlnlambda: 3e-17 }, { material: "b", dpsi_dlnlambda: 0.01 }]);
  assert.deepEqual(bars.map((b) => b.value), [0.01, 0]);
});

test("without a ψ in the result the bars are of L2D, whatever the entries carry", () => {
  const out = sensitivityBars([{ material: "a", dL2D_dlnlambda: 0.3, dpsi_dlnlambda: 0.1 }], { psi: false });
  assert.equal(out.quantity, "L2D");
  assert.equal(out.bars[0].value, 0.3);
});
