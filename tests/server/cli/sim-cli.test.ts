/** The CLI writes the documented files, byte-identical for any --threads (apart from summary timing). */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { REGIME_LABELS } from "@/sim/regimes";
import { methodLabel, type DataPackage } from "@/sim/analysis";
import { checkCsvAgainstResource } from "@/tests/helpers/check-export";

const root = path.resolve(__dirname, "../../..");
const run = (args: string[]) =>
  execFileSync(process.execPath, ["--import", "tsx", path.join(root, "server/cli/sim.ts"), ...args], {
    cwd: root,
    stdio: "pipe",
  });

describe("npm run sim", () => {
  test("same spec and seed: identical files for 1 thread in-process and --threads 2", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-cli-"));
    try {
      const spec = path.join(root, "docs/examples/c1ffl-and.json");
      run([spec, "--out", path.join(dir, "a"), "--replicates", "120", "--quiet"]);
      run([spec, "--out", path.join(dir, "b", "nested"), "--replicates", "120", "--threads", "2", "--quiet"]);
      const files = readdirSync(path.join(dir, "a")).sort();
      assert.deepEqual(files, [
        "analysis.json",
        "datapackage.json",
        "grid-mean.csv",
        "grid-replicates.csv",
        "ode.csv",
        "output-pulses.csv",
        "pulses.csv",
        "regime.json",
        "replicates.csv",
        "summary.json",
      ]);
      for (const f of files) {
        const a = readFileSync(path.join(dir, "a", f), "utf8");
        const b = readFileSync(path.join(dir, "b", "nested", f), "utf8");
        if (f === "summary.json") {
          const ja = JSON.parse(a);
          const jb = JSON.parse(b);
          delete ja.timing;
          delete jb.timing;
          assert.deepEqual(ja, jb);
        } else assert.equal(a, b, f);
      }
      // every CSV is described by datapackage.json and loads as it says (one observation per row, units in names)
      const pkg = JSON.parse(readFileSync(path.join(dir, "a", "datapackage.json"), "utf8")) as DataPackage;
      assert.deepEqual(
        pkg.resources.map((r) => r.path).sort(),
        files.filter((f) => f.endsWith(".csv")),
      );
      for (const r of pkg.resources)
        checkCsvAgainstResource(readFileSync(path.join(dir, "a", r.path), "utf8"), r, {
          // grid-mean.csv is the fixed interface; species columns are named after the species (unit in the dictionary)
          fixedNames: r.name === "grid-mean" ? r.schema.fields.map((f) => f.name) : ["qsaA", "hldB", "rptC"],
          minRows: 1,
        });
      const widths =
        readFileSync(path.join(dir, "a", "output-pulses.csv"), "utf8")
          .trim()
          .split("\n").length - 1;
      const pulses = checkCsvAgainstResource(
        readFileSync(path.join(dir, "a", "pulses.csv"), "utf8"),
        pkg.resources.find((r) => r.name === "pulses")!,
      );
      assert.equal(
        widths,
        pulses.reduce((n, p) => n + Number(p.output_pulses), 0),
        "one output-pulses row per counted output pulse",
      );
      assert.equal(pkg.method!.accuracy, "exact");
      assert.equal(pkg.settings!.replicates, 120);
      const analysis = JSON.parse(readFileSync(path.join(dir, "a", "analysis.json"), "utf8"));
      assert.equal(analysis.settings.method.label, "Exact: direct method (Gillespie 1977)");
      assert.equal(analysis.settings.thresholdSource, "default");
      const summary = JSON.parse(readFileSync(path.join(dir, "a", "summary.json"), "utf8"));
      assert.equal(summary.replicates, 120);
      assert.match(summary.engineVersion, /^linger-engine /);
      // regime.json: one of the documented labels with its evidence (docs/regimes.md)
      const regime = JSON.parse(readFileSync(path.join(dir, "a", "regime.json"), "utf8"));
      assert.ok(REGIME_LABELS.includes(regime.deterministic.label), regime.deterministic.label);
      // the C1-FFL AND filters brief pulses (persistence detection: Mangan, Zaslaver & Alon 2003, J Mol Biol 334:197, from memory): the example's
      // 2-5 min spikes rarely pass, its 60 min exposure almost always does
      assert.equal(regime.deterministic.label, "persistence filter");
      assert.equal(typeof regime.deterministic.evidence, "object");
      // the stochastic label reads the same pass curve from the replicates: a filter there too
      assert.equal(regime.stochastic.label, "persistence filter", JSON.stringify(regime.stochastic));
      assert.ok(Array.isArray(regime.stochastic.evidence.passFractions));
      const header = readFileSync(path.join(dir, "a", "grid-mean.csv"), "utf8").split("\n")[0];
      assert.equal(header, "time,mean_qsaA,sd_qsaA,mean_hldB,sd_hldB,mean_rptC,sd_rptC");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("a tau-leaping run is labelled approximate, with its step control, in analysis.json, summary.json and datapackage.json", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-cli-tau-"));
    try {
      const spec = JSON.parse(readFileSync(path.join(root, "docs/examples/c1ffl-and.json"), "utf8"));
      const file = path.join(dir, "tau.json");
      writeFileSync(file, JSON.stringify({ ...spec, method: "tauLeap" }));
      run([file, "--out", path.join(dir, "out"), "--replicates", "10", "--quiet"]);
      const read = (f: string) => JSON.parse(readFileSync(path.join(dir, "out", f), "utf8"));
      const method = methodLabel("tauLeap");
      assert.deepEqual(read("analysis.json").settings.method, method);
      assert.deepEqual(read("summary.json").methodLabel, method);
      const pkg = read("datapackage.json") as DataPackage;
      assert.deepEqual(pkg.method, method);
      assert.equal(pkg.method!.accuracy, "approximate");
      assert.equal(pkg.method!.stepControl!.epsilon, 0.03);
      // never as a row inside a CSV: no table mentions the method
      for (const r of pkg.resources) assert.doesNotMatch(readFileSync(path.join(dir, "out", r.path), "utf8"), /tau/i);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("an invalid spec fails with a message naming the field", () => {
    assert.throws(
      () => run([path.join(root, "package.json"), "--out", os.tmpdir()]),
      (e: { stderr: Buffer }) => /not a valid run spec/.test(e.stderr.toString()),
    );
  });
});
