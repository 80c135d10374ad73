/**
 * SBML Level 3 Version 2 export: every template circuit passes libSBML's
 * consistency checks (Debian's python3-sbml5 under /usr/bin/python3; errors of
 * severity >= LIBSBML_SEV_ERROR must be 0, unit warnings allowed), and a
 * mass-action circuit survives export -> import -> simulate with identical grid
 * statistics for the same seed. Model: DSMTS 001-01 / 002-01 (Evans, Gillespie &
 * Wilkinson 2008, Bioinformatics 24:285; tests/fixtures/dsmts/LICENSE.txt).
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import path from "node:path";
import { exportSbml, importSbml, LINGER_SBML_NS } from "@/sim/sbml";
import { simulateChunk, templates } from "@/sim";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import type { Circuit } from "@/shared/schemas/circuit";
import { libsbmlErrors } from "@/tests/helpers/libsbml";

const dsmts = (id: string): Circuit => {
  const r = importSbml(readFileSync(path.join(__dirname, "../../fixtures/dsmts", id, `${id}-sbml-l3v2.xml`), "utf8"));
  if (!r.ok) throw new Error("fixture");
  return r.circuit;
};

test("every template circuit and two DSMTS circuits export to SBML with no libSBML errors", () => {
  const circuits = [...Object.values(templates).map((t) => t.circuit), dsmts("00001"), dsmts("00020")];
  assert.ok(circuits.some((c) => c.reactions.some((r) => r.rate.kind === "regulated")));
  const docs = circuits.map((c) => exportSbml(c));
  assert.deepEqual(
    libsbmlErrors(docs),
    docs.map(() => []),
  );
  assert.ok(docs[0].includes(`xmlns:linger="${LINGER_SBML_NS}"`));
  // A broken document is caught by the same check (the validator can fail).
  const broken = docs[0].replace('compartment="cell"', 'compartment="nowhere"');
  assert.ok(libsbmlErrors([broken])[0].length > 0);
});

test("export -> import gives back the mass-action circuit and the same statistics for the same seed", () => {
  for (const id of ["00001", "00020"]) {
    const original = dsmts(id);
    const back = importSbml(exportSbml(original));
    if (!back.ok) assert.fail(JSON.stringify(back.problems));
    assert.deepEqual(back.circuit.species, original.species);
    assert.deepEqual(back.circuit.reactions, original.reactions);
    assert.equal(back.circuit.outputSpecies, original.outputSpecies);
    const spec = (c: Circuit) =>
      RunSpecSchema.parse({ circuit: c, endTimeMinutes: 20, gridStepMinutes: 1, replicates: 200, seed: "round-trip" });
    const a = simulateChunk(spec(original), 0, 200, { trajectoryReplicates: 0 });
    const b = simulateChunk(spec(back.circuit), 0, 200, { trajectoryReplicates: 0 });
    assert.deepEqual(Array.from(b.gridSum), Array.from(a.gridSum));
    assert.deepEqual(Array.from(b.gridSumSq), Array.from(a.gridSumSq));
    assert.ok(a.events > 0);
  }
});
