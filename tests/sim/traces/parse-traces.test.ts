import { test, describe } from "node:test";
import assert from "node:assert/strict";
import {
  parseTraces,
  pulsesFromLevels,
  detectDelimiter,
  type ParsedTraces,
  type ParseFailure,
} from "@/sim/traces/parse-traces";

function ok(r: ParsedTraces | ParseFailure): ParsedTraces {
  if (!r.ok) assert.fail(`expected a parse, got errors: ${JSON.stringify(r.errors)}`);
  return r;
}
function fail(r: ParsedTraces | ParseFailure) {
  if (r.ok) assert.fail("expected errors");
  return r.errors;
}
const cell = (r: ParsedTraces, name: string) => {
  const c = r.cells.find((x) => x.cell === name);
  assert.ok(c, `cell ${name}`);
  return { times: [...c.times], values: [...c.values] };
};

describe("parseTraces: long layout", () => {
  test("reads cells, keeps file order, converts seconds to minutes", () => {
    const text = "cell,time,value\nA,0,1.5\nA,60,2\nB,30,7\nA,120,3\nB,90,8\nB,150,9\n";
    const r = ok(parseTraces(text, { timeUnit: "s" }));
    assert.equal(r.layout, "long");
    assert.equal(r.delimiter, "comma");
    assert.equal(r.rows, 6);
    assert.deepEqual(
      r.cells.map((c) => c.cell),
      ["A", "B"],
    );
    assert.deepEqual(cell(r, "A"), { times: [0, 1, 2], values: [1.5, 2, 3] });
    assert.deepEqual(cell(r, "B"), { times: [0.5, 1.5, 2.5], values: [7, 8, 9] });
  });

  test("hours to minutes, header aliases and case, CRLF line ends", () => {
    const text = "Cell_ID,Time,Fluorescence\r\nc1,0,1\r\nc1,0.5,2\r\nc1,1,3\r\n";
    const r = ok(parseTraces(text, { timeUnit: "h" }));
    assert.deepEqual(cell(r, "c1").times, [0, 30, 60]);
  });

  test("missing frames (empty, NA, NaN) are absent, not errors", () => {
    const text = "cell,time,value\nA,0,1\nA,1,\nA,2,NA\nA,3,NaN\nA,4,5\nA,5,6\n";
    const r = ok(parseTraces(text, { timeUnit: "min" }));
    assert.deepEqual(cell(r, "A"), { times: [0, 4, 5], values: [1, 5, 6] });
  });

  test("channel column: one channel is kept; several need a choice", () => {
    const text = "cell,time,value,channel\nA,0,1,gfp\nA,0,9,rfp\nA,1,2,gfp\nA,1,9,rfp\nA,2,3,gfp\nA,2,9,rfp\n";
    const errs = fail(parseTraces(text, { timeUnit: "min" }));
    assert.equal(errs[0].line, 1);
    assert.equal(errs[0].column, 4);
    assert.match(errs[0].message, /several channels/);
    const r = ok(parseTraces(text, { timeUnit: "min", channel: "gfp" }));
    assert.deepEqual(cell(r, "A").values, [1, 2, 3]);
  });

  test("schedule column gives pulses [first ON frame, first OFF frame)", () => {
    const text = "cell,time,value,input\nA,0,1,0\nA,2,1,1\nA,4,1,1\nA,6,1,0\nB,0,1,0\nB,2,1,1\nB,6,1,0\nB,8,1,1\n";
    const r = ok(parseTraces(text, { timeUnit: "min", scheduleColumn: "input" }));
    // B's last frame is ON: the pulse lasts at least until the last frame time seen (8)... which is its start, so it is dropped
    assert.deepEqual(r.schedule, [{ on: 2, off: 6 }]);
    assert.equal(r.cells.length, 2, "the input column is not a cell");
  });

  test("schedule levels that disagree between cells at one time are an error with line and column", () => {
    const text = "cell,time,value,input\nA,0,1,0\nA,1,1,1\nA,2,1,1\nB,0,1,0\nB,1,1,0\nB,2,1,1\n";
    const errs = fail(parseTraces(text, { timeUnit: "min", scheduleColumn: "input" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 6, column: 4 });
    assert.match(errs[0].message, /disagrees with 1 on line 3/);
  });
});

describe("parseTraces: wide layout", () => {
  test("TSV detected, one column per cell, cells starting and ending at different times", () => {
    const text = "time\tc1\tc2\tc3\n0\t1\t\t5\n1\t2\t10\t6\n2\t3\t11\t7\n3\t\t12\t8\n4\t\t13\t\n";
    assert.equal(detectDelimiter(text), "tab");
    const r = ok(parseTraces(text, { timeUnit: "min" }));
    assert.equal(r.layout, "wide");
    assert.equal(r.delimiter, "tab");
    assert.deepEqual(cell(r, "c1"), { times: [0, 1, 2], values: [1, 2, 3] });
    assert.deepEqual(cell(r, "c2"), { times: [1, 2, 3, 4], values: [10, 11, 12, 13] });
    assert.deepEqual(cell(r, "c3"), { times: [0, 1, 2, 3], values: [5, 6, 7, 8] });
  });

  test("the first column is the time column when none is named time; the schedule column is not a cell", () => {
    const text = "minute;a;b;q\n0;1;4;0\n10;2;5;1\n20;3;6;0\n";
    const r = ok(parseTraces(text, { timeUnit: "min", scheduleColumn: "Q" }));
    assert.equal(r.delimiter, "semicolon");
    assert.deepEqual(
      r.cells.map((c) => c.cell),
      ["a", "b"],
    );
    assert.deepEqual(r.schedule, [{ on: 10, off: 20 }]);
  });

  test("forcing the wide layout on a long file reads every column but time as a cell", () => {
    const text = "time,x\n0,1\n1,2\n2,3\n";
    const r = ok(parseTraces(text, { timeUnit: "s", layout: "wide" }));
    assert.deepEqual(cell(r, "x").times, [0, 1 / 60, 2 / 60]);
  });
});

describe("parseTraces: validation names the line and column of the first problems", () => {
  test("non-numeric value", () => {
    const errs = fail(parseTraces("cell,time,value\nA,0,1\nA,1,abc\nA,2,3\nA,3,4\n", { timeUnit: "min" }));
    assert.equal(errs.length, 1);
    assert.deepEqual(errs[0], { line: 3, column: 3, message: 'value "abc" is not a number' });
  });

  test("non-numeric time", () => {
    const errs = fail(parseTraces("time,c1\n0,1\nten,2\n2,3\n3,4\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 3, column: 1 });
    assert.match(errs[0].message, /time "ten" is not a number/);
  });

  test("time going backwards within a cell (long)", () => {
    const errs = fail(
      parseTraces("cell,time,value\nA,0,1\nB,0,1\nA,5,2\nB,1,2\nA,3,3\nA,6,4\nB,2,3\n", { timeUnit: "min" }),
    );
    assert.equal(errs.length, 1);
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 6, column: 2 });
    assert.match(errs[0].message, /time goes backwards within cell "A" \(3 after 5\)/);
  });

  test("time going backwards (wide)", () => {
    const errs = fail(parseTraces("time,c1,c2\n0,1,1\n2,1,1\n1,1,1\n3,1,1\n4,1,1\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 4, column: 1 });
    assert.match(errs[0].message, /backwards/);
  });

  test("duplicate cell and time (long) and duplicate time (wide)", () => {
    let errs = fail(parseTraces("cell,time,value\nA,0,1\nA,1,2\nA,1,3\nA,2,4\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 4, column: 2 });
    assert.match(errs[0].message, /duplicate cell and time: cell "A" already has time 1/);
    errs = fail(parseTraces("time,c1\n0,1\n1,2\n1,3\n2,4\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 4, column: 1 });
    assert.match(errs[0].message, /duplicate time 1/);
  });

  test("too few points: named at the cell's first line (long) or its header column (wide)", () => {
    let errs = fail(parseTraces("cell,time,value\nA,0,1\nA,1,2\nA,2,3\nB,0,1\nB,1,\nB,2,2\n", { timeUnit: "min" }));
    assert.deepEqual(errs, [{ line: 5, column: 3, message: 'cell "B" has 2 values; at least 3 are needed' }]);
    errs = fail(parseTraces("time,c1,c2\n0,1,\n1,2,5\n2,3,\n", { timeUnit: "min" }));
    assert.deepEqual(errs, [{ line: 1, column: 3, message: 'cell "c2" has 1 value; at least 3 are needed' }]);
  });

  test("line numbers count blank lines and quoted line breaks as in the file", () => {
    const text = 'cell,time,value\n\n"A\nx",0,1\n\n"A\nx",1,oops\n';
    const errs = fail(parseTraces(text, { timeUnit: "min" }));
    assert.equal(errs[0].line, 6);
    assert.equal(errs[0].column, 3);
  });

  test("short lines, missing long columns, duplicate header names", () => {
    let errs = fail(parseTraces("cell,time,value\nA,0,1\nA,1\nA,2,3\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 3, column: 3 });
    errs = fail(parseTraces("cell,time\nA,0\n", { timeUnit: "min", layout: "long" }));
    assert.match(errs[0].message, /missing: value/);
    errs = fail(parseTraces("time,a,a\n0,1,2\n", { timeUnit: "min" }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 1, column: 3 });
  });

  test("at most maxErrors problems are listed, in file order", () => {
    const rows = ["cell,time,value"];
    for (let i = 0; i < 50; i++) rows.push(`A,${i},x${i}`);
    const errs = fail(parseTraces(rows.join("\n"), { timeUnit: "min" }));
    assert.equal(errs.length, 20);
    assert.deepEqual(
      errs.map((e) => e.line),
      Array.from({ length: 20 }, (_, i) => i + 2),
    );
  });

  test("row and cell limits", () => {
    const rows = ["cell,time,value"];
    for (let i = 0; i < 30; i++) rows.push(`A,${i},1`);
    let errs = fail(parseTraces(rows.join("\n"), { timeUnit: "min", limits: { maxRows: 25 } }));
    assert.match(errs[0].message, /too many rows: at most 25/);
    assert.equal(errs[0].line, 27);
    const wide = "time," + Array.from({ length: 6 }, (_, i) => `c${i}`).join(",") + "\n0,1,1,1,1,1,1\n";
    errs = fail(parseTraces(wide, { timeUnit: "min", limits: { maxCells: 5 } }));
    assert.match(errs[0].message, /too many cells/);
    const long = ["cell,time,value", ...Array.from({ length: 6 }, (_, i) => `c${i},0,1`)].join("\n");
    errs = fail(parseTraces(long, { timeUnit: "min", limits: { maxCells: 5 } }));
    assert.deepEqual({ line: errs[0].line, column: errs[0].column }, { line: 7, column: 1 });
  });

  test("an empty file and a header alone", () => {
    assert.match(fail(parseTraces("", { timeUnit: "min" }))[0].message, /empty/);
    assert.match(fail(parseTraces("cell,time,value\n", { timeUnit: "min" }))[0].message, /no data rows/);
  });
});

test("pulsesFromLevels: ON from the first frame above onAbove to the first frame not above", () => {
  assert.deepEqual(pulsesFromLevels([0, 1, 2, 3, 4, 5], [0, 1, 1, 0, 2, 2], 0), [
    { on: 1, off: 3 },
    { on: 4, off: 5 },
  ]);
  assert.deepEqual(pulsesFromLevels([0, 1, 2], [0.4, 0.6, 0.2], 0.5), [{ on: 1, off: 2 }]);
});

test("comment lines (#) and blank lines are skipped but still counted for line numbers", () => {
  const text = "# synthetic demo\ncell,time,value\n# note\nA,0,1\nA,1,x\n";
  const r = parseTraces(text, { timeUnit: "min" });
  assert.equal(r.ok, false);
  if (!r.ok) assert.deepEqual({ line: r.errors[0].line, column: r.errors[0].column }, { line: 5, column: 3 });
});
