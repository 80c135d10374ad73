/**
 * Every limit Linger enforces, in one table for the client and the server alike:
 * the schemas in shared/schemas validate with these values, the forms and the
 * server's body parser read them from here, and the README's "Limits" table is
 * checked against them (tests/docs/limits-table.test.ts). Change a limit here,
 * nowhere else.
 */
import { RUN_LIMITS } from "./schemas/run-spec";
import { API_LIMITS } from "./schemas/api-runs";
import { CIRCUIT_LIMITS } from "./schemas/circuit";
import { PROGRAM_LIMITS } from "./schemas/input-program";
import { TRACE_LIMITS } from "./schemas/api-traces";
import { SBML_LIMITS } from "./schemas/api-sbml";
import { PAGE_SIZE, PAGE_SIZE_MAX } from "./schemas/pagination";

/** Every list route answers in pages (shared/schemas/pagination.ts): items per page by default and at most. */
export const PAGE_LIMITS = { pageSize: PAGE_SIZE, maxPageSize: PAGE_SIZE_MAX } as const;

export { RUN_LIMITS, API_LIMITS, CIRCUIT_LIMITS, PROGRAM_LIMITS, TRACE_LIMITS, SBML_LIMITS };

export const LIMITS = {
  run: RUN_LIMITS,
  api: API_LIMITS,
  circuit: CIRCUIT_LIMITS,
  program: PROGRAM_LIMITS,
  trace: TRACE_LIMITS,
  sbml: SBML_LIMITS,
  page: PAGE_LIMITS,
} as const;

/** "2 MB" for 2 * 1024 * 1024: how byte limits are written in messages. */
export function megabytes(bytes: number): string {
  return `${Math.round((bytes / (1024 * 1024)) * 10) / 10} MB`;
}
