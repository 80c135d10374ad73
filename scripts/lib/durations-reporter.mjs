/**
 * A node:test reporter (scripts/test-all.ts passes it with --test-reporter; plain
 * JavaScript because node loads reporters before tsx's hooks) that writes, when the
 * run ends, one JSON object: each test file's path from the repository's top and the
 * seconds its top-level tests took, summed (their before/after hooks included; the
 * file's module loading is not). The suite orders files slowest first from these
 * (tests/test-durations.json).
 */
import { dirname, relative, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..", "..");

/** @param {AsyncIterable<{ type: string, data?: { file?: string, nesting?: number, details?: { duration_ms?: number } } }>} source */
export default async function* durationsReporter(source) {
  /** @type {Record<string, number>} */
  const seconds = {};
  for await (const event of source) {
    if (event.type !== "test:pass" && event.type !== "test:fail") continue;
    const { file, nesting, details } = event.data ?? {};
    if (!file || nesting !== 0 || typeof details?.duration_ms !== "number") continue;
    const key = relative(ROOT, file);
    seconds[key] = (seconds[key] ?? 0) + details.duration_ms / 1000;
  }
  yield JSON.stringify(seconds) + "\n";
}
