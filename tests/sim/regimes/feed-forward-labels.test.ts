/**
 * The existing feed-forward templates' deterministic labels (Mangan &
 * Alon 2003, PNAS 100:11980): the incoherent type-1 circuit makes a pulse under a sustained
 * input (pulse generation, common practice), and stops doing so when its
 * repressor's K is raised so far that the repression no longer bites; the
 * coherent and simple circuits settle without a pulse (their Jacobians are
 * triangular, so every eigenvalue is a real decay rate).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { compileModel } from "@/sim/circuit/compile-model";
import { setParameter, templates } from "@/sim";
import { classifyDeterministic } from "@/sim/regimes";

test("i1ffl at its defaults: pulse generator (output falls to at most half its peak while Q stays on)", () => {
  const v = classifyDeterministic({ model: compileModel(templates.i1ffl.circuit) });
  assert.equal(v.label, "pulse generator");
  assert.ok((v.evidence.finalOverPeak as number) <= 0.5);
});

test("i1ffl with the repressor's K x 100: no longer a pulse generator", () => {
  const c = setParameter(structuredClone(templates.i1ffl.circuit), "K(makeZ,hldB)", 4000);
  const v = classifyDeterministic({ model: compileModel(c) });
  assert.notEqual(v.label, "pulse generator", JSON.stringify(v.evidence));
});

test("simple regulation and the coherent circuits: steady without a pass curve, real dominant eigenvalues", () => {
  for (const key of ["simple", "c1ffl-and", "c1ffl-or"] as const) {
    const v = classifyDeterministic({ model: compileModel(templates[key].circuit) });
    assert.equal(v.label, "steady", key);
    assert.equal(v.evidence.onDominantImag, 0, key);
  }
});
