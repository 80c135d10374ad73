/**
 * Each feedback template shows its textbook behaviour at its defaults
 * (sources beside each check): negative autoregulation settles without
 * ringing (a one-gene loop has a single real eigenvalue), the mutual-repression
 * latch at a = 4 > 2 is bistable (Cherry & Adler 2000, J Theor Biol 203:117), the
 * ring of three at a = 10, n = 3 is past its Hopf point a = 3 * 2^(1/3) and
 * oscillates, and the extra repression edge makes the ring a switch (bistable
 * switching, common practice in dynamical-systems work on gene circuits).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { feedbackTemplates, type FeedbackTemplateKey } from "@/sim/circuit/templates";
import { classifyDeterministic } from "@/sim/regimes";
import { validateCircuit } from "@/sim";

const expected: Record<FeedbackTemplateKey, string> = {
  nar: "steady",
  latch: "memory",
  ring: "sustained oscillation",
  "ring-extra": "memory",
};

for (const key of Object.keys(expected) as FeedbackTemplateKey[]) {
  test(`feedback template ${key}: ${expected[key]} at its defaults`, () => {
    const t = feedbackTemplates[key];
    assert.deepEqual(validateCircuit(t.circuit), { ok: true });
    const v = classifyDeterministic({ model: compileModel(t.circuit) });
    assert.equal(v.label, expected[key], JSON.stringify(v));
  });
}

test("the latch's two stable states are 100 x (2 - sqrt 3) and 100 x (2 + sqrt 3) molecules of ltcA", () => {
  const v = classifyDeterministic({ model: compileModel(feedbackTemplates.latch.circuit) });
  const outs = v.evidence.offStableOutputs as number[];
  assert.equal(outs.length, 2);
  // a = 4: u(1+v^2) = 4 = v(1+u^2); with uv = 1 both read u + v = 4, so u, v = 2 -+ sqrt 3 (solved by hand)
  assert.ok(Math.abs(outs[0] - 100 * (2 - Math.sqrt(3))) < 1e-3, String(outs));
  assert.ok(Math.abs(outs[1] - 100 * (2 + Math.sqrt(3))) < 1e-3, String(outs));
});
