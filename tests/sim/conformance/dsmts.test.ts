/**
 * Stochastic conformance: the Discrete Stochastic Model Test Suite (Evans,
 * Gillespie & Wilkinson 2008, "The SBML discrete stochastic models test suite",
 * Bioinformatics 24:285), cases in tests/fixtures/dsmts/ with their licence.
 *
 * Each importable case runs with N = 10,000 replicates (the suite's usual
 * choice) and one fixed seed for every case, on the real worker pool. At every
 * time point t > 0 and every checked species, the suite's statistics are
 *   Z = sqrt(N) (mean - mu) / sigma     (suite range -3..3)
 *   Y = sqrt(N/2) (s^2 / sigma^2 - 1)   (suite range -5..5)
 * where mu and sigma are the exact mean and sd of the results file and s is the
 * sample sd (n - 1). Adjacent time points are strongly correlated, so a correct
 * simulator leaves the suite's ranges now and then: a case fails when any
 * |Z| > 4.5 or |Y| > 7, or when more than 3 of its points fall outside the
 * suite's ranges. Where sigma is 0, every replicate must equal mu (sample sd 0
 * and mean mu). The table of docs/conformance.md comes from this test's
 * diagnostics (one table row per case).
 */
import { test, after } from "node:test";
import assert from "node:assert/strict";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { reduceChunks, type GridPartial } from "@/sim";
import { importSbml, formatSbmlProblems } from "@/sim/sbml";
import type { RunSpec } from "@/shared/schemas/run-spec";
import { RunSpecSchema } from "@/shared/schemas/run-spec";
import { createSimPool } from "@/server/compute/pool";
import { runAllChunks } from "@/server/compute/run-all-chunks";

const N = 10_000;
const SEED = "dsmts-2008";
const dir = path.join(__dirname, "../../fixtures/dsmts");
const cases = readdirSync(dir)
  .filter((d) => /^\d{5}$/.test(d))
  .sort();
const pool = createSimPool({ threads: 2 });
after(() => pool.destroy());

function settings(id: string) {
  const text = readFileSync(path.join(dir, id, `${id}-settings.txt`), "utf8");
  const get = (k: string) => (text.match(new RegExp(`^${k}:[ \\t]*(.*)$`, "m"))?.[1] ?? "").trim();
  return {
    duration: Number(get("duration")),
    steps: Number(get("steps")),
    variables: get("variables")
      .split(",")
      .map((s) => s.trim())
      .filter(Boolean),
  };
}

function results(id: string) {
  const [head, ...rows] = readFileSync(path.join(dir, id, `${id}-results.csv`), "utf8")
    .trim()
    .split(/\r?\n/);
  const cols = head.split(",");
  const data = rows.map((r) => r.split(",").map(Number));
  return (name: string) => data.map((r) => r[cols.indexOf(name)]);
}

test("DSMTS fixtures: every case of the folder is checked below", () => {
  assert.equal(cases.length, 29);
});

/**
 * Case 00003 (birth 1, death 1.1 per unit time from 100) ends near extinction:
 * at t = 50 most replicates are 0 and a few are large, so the sample variance is
 * far from normal and the normal-theory Y statistic is too narrow. Over six
 * other seeds the sd at t = 50 ranged 3.63..3.98 around the exact 3.749, about
 * 4.5 times the spread normal theory gives (0.027), while Z stayed within
 * range. Its result is reported (docs/conformance.md) but marked todo rather
 * than tuned to a seed that passes; dsmts-00003-exact.test.ts checks its whole
 * distribution against the exact law instead.
 */
const KNOWN: Record<string, string> = {
  "00003": "heavy-tailed near extinction: Y beyond 7 at t = 50 with this seed (docs/conformance.md)",
};

for (const id of cases) {
  test(`DSMTS ${id}: Z and Y within the suite's criteria at every t > 0`, { todo: KNOWN[id] }, async (t) => {
    const imported = importSbml(readFileSync(path.join(dir, id, `${id}-sbml-l3v2.xml`), "utf8"));
    if (!imported.ok) assert.fail(formatSbmlProblems(imported.problems));
    const s = settings(id);
    const spec: RunSpec = RunSpecSchema.parse({
      circuit: imported.circuit,
      endTimeMinutes: s.duration,
      gridStepMinutes: s.duration / s.steps,
      replicates: N,
      seed: SEED,
    });
    const partials: GridPartial[] = [];
    const run = await runAllChunks(spec, {
      pool,
      trajectoryReplicates: 0,
      onChunk: (r) => void partials.push({ gridSum: r.gridSum, gridSumSq: r.gridSumSq, gridCount: r.gridCount }),
    });
    const { mean, sd } = reduceChunks(spec, partials);
    const ng = s.steps + 1;
    const col = results(id);
    const outside: string[] = [];
    const gross: string[] = [];
    let maxZ = 0;
    let maxY = 0;
    for (const v of s.variables) {
      const i = imported.circuit.species.findIndex((x) => x.name === v);
      assert.ok(i >= 0, `species ${v}`);
      const mu = col(`${v}-mean`);
      const sigma = col(`${v}-sd`);
      assert.equal(mu.length, ng);
      for (let g = 1; g < ng; g++) {
        const m = mean[i * ng + g];
        const sdv = sd[i * ng + g];
        const time = g * (s.duration / s.steps);
        if (sigma[g] === 0) {
          if (m !== mu[g] || sdv !== 0)
            gross.push(`${v} t=${time}: expected every replicate = ${mu[g]}, mean ${m} sd ${sdv}`);
          continue;
        }
        const z = (Math.sqrt(N) * (m - mu[g])) / sigma[g];
        const y = Math.sqrt(N / 2) * ((sdv * sdv) / (sigma[g] * sigma[g]) - 1);
        maxZ = Math.max(maxZ, Math.abs(z));
        maxY = Math.max(maxY, Math.abs(y));
        if (Math.abs(z) >= 3) outside.push(`${v} t=${time} Z=${z.toFixed(2)}`);
        if (Math.abs(y) >= 5) outside.push(`${v} t=${time} Y=${y.toFixed(2)}`);
        if (Math.abs(z) > 4.5 || Math.abs(y) > 7) gross.push(`${v} t=${time}: Z=${z.toFixed(2)} Y=${y.toFixed(2)}`);
      }
    }
    const pass = gross.length === 0 && outside.length <= 3;
    const line = `| ${id} | ${s.variables.join(", ")} | ${run.events} | ${maxZ.toFixed(2)} | ${maxY.toFixed(2)} | ${pass ? "pass" : "FAIL"} | ${outside.join("; ") || "none"} |`;
    t.diagnostic(line);
    assert.deepEqual(gross, [], "a point beyond |Z| 4.5 or |Y| 7, or an sd-0 point off its value");
    assert.ok(outside.length <= 3, `more than 3 points outside the suite's ranges: ${outside.join("; ")}`);
  });
}
