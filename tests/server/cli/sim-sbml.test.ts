/**
 * The CLI runs an SBML model (detected by content, not by file name) with
 * --end-time/--grid-step in minutes and no input program. Model: DSMTS 001-01
 * (Evans, Gillespie & Wilkinson 2008, Bioinformatics 24:285; licence in
 * tests/fixtures/dsmts/LICENSE.txt), a linear birth-death process whose exact
 * mean is 100 * exp(-0.01 t).
 */
import { test, describe } from "node:test";
import assert from "node:assert/strict";
import { execFileSync } from "node:child_process";
import { copyFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";

const root = path.resolve(__dirname, "../../..");
const model = path.join(root, "tests/fixtures/dsmts/00001/00001-sbml-l3v2.xml");
const run = (args: string[]) =>
  execFileSync(process.execPath, ["--import", "tsx", path.join(root, "server/cli/sim.ts"), ...args], {
    cwd: root,
    stdio: "pipe",
  });

describe("npm run sim with SBML", () => {
  test("an SBML file named .txt runs without input pulses; grid-mean.csv has time, mean_X, sd_X at 0..T", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-sbml-"));
    try {
      const renamed = path.join(dir, "model.txt");
      copyFileSync(model, renamed);
      const out = path.join(dir, "out");
      run([
        renamed,
        "--end-time",
        "20",
        "--grid-step",
        "2",
        "--replicates",
        "400",
        "--seed",
        "7",
        "--out",
        out,
        "--quiet",
      ]);
      const rows = readFileSync(path.join(out, "grid-mean.csv"), "utf8").trim().split("\n");
      assert.equal(rows[0], "time,mean_X,sd_X");
      assert.deepEqual(
        rows.slice(1).map((r) => Number(r.split(",")[0])),
        [0, 2, 4, 6, 8, 10, 12, 14, 16, 18, 20],
      );
      const [t, mean, sd] = rows[rows.length - 1].split(",").map(Number);
      assert.equal(t, 20);
      // Exact mean 100 e^{-0.2} = 81.873, sd 17.654 (the suite's results file). 400 replicates:
      // SE of the mean sigma/sqrt(N) = 0.88, of the sd about sigma/sqrt(2N) = 0.62; 4.5 SE bands.
      assert.ok(Math.abs(mean - 81.873) < 4.5 * (17.654 / Math.sqrt(400)), `mean ${mean}`);
      assert.ok(Math.abs(sd - 17.654) < 4.5 * (17.654 / Math.sqrt(800)), `sd ${sd}`);
      assert.equal(rows[1], "0,100,0");
      // no input pulses: the tables keep their shape (header, no rows) and the dictionary says why
      assert.match(readFileSync(path.join(out, "pulses.csv"), "utf8"), /^replicate,pulse_index,on_min,[a-z_,]+\n$/);
      const pkg = JSON.parse(readFileSync(path.join(out, "datapackage.json"), "utf8"));
      assert.equal(pkg.note, "no input pulses");
      const analysis = JSON.parse(readFileSync(path.join(out, "analysis.json"), "utf8"));
      assert.equal(analysis.note, "no input pulses");
      const summary = JSON.parse(readFileSync(path.join(out, "summary.json"), "utf8"));
      assert.equal(summary.replicates, 400);
      assert.equal(summary.spec.endTimeMinutes, 20);
      assert.equal(summary.spec.program, undefined);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("SBML needs --end-time and --grid-step; a refused model names the element, id and line", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-sbml-"));
    try {
      assert.throws(
        () => run([model, "--out", path.join(dir, "o"), "--quiet"]),
        (e: { stderr: Buffer }) => /--end-time and --grid-step \(minutes\) are required/.test(String(e.stderr)),
      );
      const withEvent = path.join(root, "tests/fixtures/dsmts/00001/00001-sbml-l3v2.xml");
      const src = readFileSync(withEvent, "utf8").replace(
        "</listOfReactions>",
        `</listOfReactions>\n<listOfRules><rateRule variable="Mu"><math xmlns="http://www.w3.org/1998/Math/MathML"><cn>1</cn></math></rateRule></listOfRules>`,
      );
      const f = path.join(dir, "rule.xml");
      writeFileSync(f, src);
      assert.throws(
        () => run([f, "--end-time", "5", "--grid-step", "1", "--out", path.join(dir, "o"), "--quiet"]),
        (e: { stderr: Buffer }) => /rateRule "Mu" \(line 47\): rate rules are not supported/.test(String(e.stderr)),
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("--export-sbml writes the spec's circuit as an SBML Level 3 Version 2 document with every reaction", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-sbml-"));
    try {
      const out = path.join(dir, "c.xml");
      run([path.join(root, "docs/examples/c1ffl-and.json"), "--export-sbml", out, "--quiet"]);
      const text = readFileSync(out, "utf8");
      assert.match(text, /<sbml xmlns="http:\/\/www.sbml.org\/sbml\/level3\/version2\/core" level="3" version="2">/);
      const spec = JSON.parse(readFileSync(path.join(root, "docs/examples/c1ffl-and.json"), "utf8"));
      for (const r of spec.circuit.reactions) assert.ok(text.includes(`<reaction id="${r.name}"`), r.name);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  test("--end-time and --grid-step override a JSON spec's values", () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "linger-sbml-"));
    try {
      const out = path.join(dir, "o");
      run([
        path.join(root, "docs/examples/c1ffl-and.json"),
        "--end-time",
        "30",
        "--grid-step",
        "10",
        "--replicates",
        "3",
        "--out",
        out,
        "--quiet",
      ]);
      const rows = readFileSync(path.join(out, "grid-mean.csv"), "utf8").trim().split("\n");
      assert.deepEqual(
        rows.slice(1).map((r) => Number(r.split(",")[0])),
        [0, 10, 20, 30],
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
