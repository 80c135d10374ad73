import { test } from "node:test";
import assert from "node:assert/strict";
import { readFileSync } from "node:fs";
import { API_DOC, docWithTable } from "@/scripts/api-table";

test("docs/api.md lists every route of the route table (run `npx tsx scripts/api-table.ts --write`)", () => {
  const doc = readFileSync(API_DOC, "utf8");
  assert.equal(doc, docWithTable(doc));
});
