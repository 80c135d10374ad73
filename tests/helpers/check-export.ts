/**
 * Checks a CSV export against its data dictionary entry (a Table Schema
 * resource of datapackage.json): the header is exactly the listed fields, in
 * order; every cell parses as its field's type (integer, number, boolean as
 * true/false, string within its enum), empty only as the missing value; no
 * packed cells (no ';' lists); one observation per row (the primary key is
 * unique); names are snake_case and a field with a unit ends in it (_min,
 * _molecules...) except where the dictionary says the name is fixed.
 */
import assert from "node:assert/strict";
import Papa from "papaparse";
import type { TableResource } from "@/sim/analysis";

const UNIT_SUFFIX: Record<string, string> = {
  min: "_min",
  molecules: "_molecules",
  "molecules^2": "_molecules2",
  "trace units": "_trace_units",
};

export function checkCsvAgainstResource(
  text: string,
  resource: TableResource,
  opts: { fixedNames?: string[]; minRows?: number } = {},
): Record<string, string>[] {
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
  assert.deepEqual(parsed.errors, [], `${resource.path}: ${JSON.stringify(parsed.errors.slice(0, 3))}`);
  const fields = resource.schema.fields;
  assert.deepEqual(
    parsed.meta.fields,
    fields.map((f) => f.name),
    `${resource.path}: header = dictionary`,
  );
  const fixed = new Set(opts.fixedNames ?? []);
  for (const f of fields) {
    assert.ok(f.description.length > 0, `${resource.path}.${f.name} has a description`);
    if (fixed.has(f.name)) continue;
    if (f.unit && UNIT_SUFFIX[f.unit]) {
      assert.ok(f.name.endsWith(UNIT_SUFFIX[f.unit]), `${resource.path}.${f.name} ends in its unit ${f.unit}`);
    }
  }
  const rows = parsed.data;
  assert.ok(rows.length >= (opts.minRows ?? 0), `${resource.path}: ${rows.length} rows`);
  for (const [i, row] of rows.entries()) {
    for (const f of fields) {
      const v = row[f.name];
      const where = `${resource.path} line ${i + 2} ${f.name}=${JSON.stringify(v)}`;
      assert.ok(v !== undefined, where);
      assert.ok(!v.includes(";"), `${where}: packed cell`);
      if (v === "") continue;
      if (f.type === "integer") assert.match(v, /^-?\d+$/, where);
      else if (f.type === "number") assert.ok(Number.isFinite(Number(v)), where);
      else if (f.type === "boolean") assert.ok(v === "true" || v === "false", where);
      else if (f.constraints) assert.ok(f.constraints.enum.includes(v), where);
    }
    for (const f of fields.filter((x) => x.type === "boolean"))
      assert.notEqual(row[f.name], "", "booleans are never empty");
  }
  const key = resource.schema.primaryKey;
  if (key) {
    const seen = new Set(rows.map((r) => key.map((k) => r[k]).join("|")));
    assert.equal(seen.size, rows.length, `${resource.path}: one row per ${key.join(", ")}`);
  }
  return rows;
}
