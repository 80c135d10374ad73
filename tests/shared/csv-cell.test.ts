// Expected values follow OWASP's CSV Injection guidance (cells starting with = + - @ tab CR are formulas
// to a spreadsheet; prefix them with a single quote), with plain numbers kept numeric (our rule).
import assert from "node:assert/strict";
import { test } from "node:test";
import { csvCell } from "@/shared/csv-cell";

test("formula-like cells get a leading single quote", () => {
  for (const s of [
    '=HYPERLINK("http://x","y")',
    "+SUM(1+1)",
    "@cmd",
    "-1+2",
    "\tx",
    "\r=1",
    "\n=1",
    "-",
    "+",
    "=",
    "@",
  ]) {
    assert.equal(csvCell(s), `'${s}`, JSON.stringify(s));
  }
});

test("plain numbers and ordinary text are left alone", () => {
  for (const s of ["-1.5", "+2", "-3e-4", "1e5", "-.5", "42", "cell_1", "", "a=b", "x-1", "'=already"]) {
    assert.equal(csvCell(s), s, JSON.stringify(s));
  }
});
