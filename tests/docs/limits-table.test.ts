/**
 * The README's "Limits" table says what shared/limits.ts enforces: each row is
 * rebuilt from the one table of limits and compared with the README's text, so a
 * changed limit with a stale README fails here.
 */
import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { LIMITS, megabytes } from "@/shared/limits";

const n = (x: number) => x.toLocaleString("en-US");

function readmeLimits(): Map<string, string> {
  const text = readFileSync(join(__dirname, "../../README.md"), "utf8");
  const section = text.split("\n## Limits")[1]?.split("\n## ")[0] ?? "";
  const rows = new Map<string, string>();
  for (const line of section.split("\n")) {
    const cells = line.split("|").map((c) => c.trim());
    if (cells.length === 4 && cells[1] && !/^-+$/.test(cells[1]) && cells[1] !== "what") rows.set(cells[1], cells[2]);
  }
  return rows;
}

test("every README limit row that names a value states the enforced one", () => {
  const rows = readmeLimits();
  assert.ok(rows.size >= 8, `only ${rows.size} rows read from the README's Limits table`);
  const expected: Record<string, string> = {
    "replicates per run": n(LIMITS.run.maxReplicates),
    "stored (replicate, input pulse) rows per run": n(LIMITS.api.maxPulseRowsPerRun),
    "runs queued or running per lab (sweep points not counted)": `${LIMITS.api.maxActiveRunsPerLab} (429)`,
    "sweeps queued or running per lab": `${LIMITS.api.maxActiveSweepsPerLab} (429)`,
    "points per sweep; replicates x points per sweep": `${n(LIMITS.api.maxSweepPoints)}; ${n(LIMITS.api.maxSweepReplicates)}`,
    "points per deterministic regime map; points added by boundary refinement (sweep or map)": `${n(LIMITS.api.maxRegimeMapPoints)}; ${n(LIMITS.api.maxRefinementPoints)}`,
    "replicates per sweep point whose own figures are kept for design targets": n(
      LIMITS.api.maxReplicateFiguresPerPoint,
    ),
    "species / reactions / signals per circuit": `${LIMITS.circuit.maxSpecies} / ${LIMITS.circuit.maxReactions} / ${LIMITS.circuit.maxSignals}`,
    "JSON request body (a run bundle travels in one)": `${megabytes(LIMITS.api.maxJsonBodyBytes)} (413)`,
    "SBML document for import (its own limit, also when the JSON around it is larger than the one above)": `${megabytes(LIMITS.sbml.maxSbmlBytes)} (413)`,
    "items per list page (`?limit=`): default; most": `${LIMITS.page.pageSize}; ${LIMITS.page.maxPageSize}`,
    "runs looked up by id in one request (`?ids=`)": n(LIMITS.api.maxRunIdsPerLookup),
  };
  for (const [what, value] of Object.entries(expected)) assert.equal(rows.get(what), value, `README row "${what}"`);
  const grid = [...rows.entries()].find(([k]) => k.startsWith("grid points per run"));
  assert.equal(grid?.[1], n(LIMITS.run.maxGridPoints));
  const upload = rows.get("trace upload") ?? "";
  assert.ok(upload.startsWith(`${megabytes(LIMITS.trace.maxFileBytes)} (413)`), upload);
});
