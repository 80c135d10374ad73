/**
 * SBML in and out of a lab: read a document into a preview or a saved circuit
 * (sim/sbml/import-sbml.ts does the reading; nothing is stored for a refused
 * document), and write a stored circuit, with an input program of the same lab
 * if asked, as SBML Level 3 Version 2 (sim/sbml/export-sbml.ts).
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { badRequest, HttpError, notFound } from "@/server/http-error";
import { createCircuit, getCircuitDetail, getCircuitVersion, updateCircuit, type Actor } from "./circuits.service";
import { exportSbml, importSbml, type SbmlProblem } from "@/sim/sbml";
import { compileProgram } from "@/sim/inputs/compile-program";
import type { Circuit, Reaction, StoichEntry } from "@/shared/schemas/circuit";
import { InputProgramSchema } from "@/shared/schemas/input-program";
import { EXPORT_DEFAULT_END_MINUTES, SBML_LIMITS, type SbmlPreview, type SbmlRefusal } from "@/shared/schemas/api-sbml";
import { megabytes } from "@/shared/limits";
import type { CircuitDetailResponse } from "@/shared/schemas/api-circuits";

/** 413 naming the SBML limit (the route's own body parser throws the same). */
export function sbmlTooLarge(): HttpError {
  return new HttpError(
    413,
    "sbml_too_large",
    `The SBML document is larger than ${megabytes(SBML_LIMITS.maxSbmlBytes)}, the most Linger imports. Split the model or remove annotations and notes it does not need.`,
  );
}

/** The 422 answer for a refused document: every refused element with its id, line and reason. */
export class SbmlRefused extends Error {
  constructor(readonly problems: SbmlProblem[]) {
    super(
      `The SBML document cannot be imported: ${problems.length} ${problems.length === 1 ? "element is" : "elements are"} refused (nothing was saved).`,
    );
  }
  body(): SbmlRefusal {
    return { error: { code: "sbml_refused", message: this.message, problems: this.problems } };
  }
}

const side = (entries: StoichEntry[]) =>
  entries.length === 0
    ? "nothing"
    : entries.map((e) => (e.count === 1 ? e.species : `${e.count} ${e.species}`)).join(" + ");

function rateInWords(r: Reaction): string {
  const rate = r.rate;
  const scaled = r.scaledBy ? `, times signal ${r.scaledBy}` : "";
  switch (rate.kind) {
    case "massAction":
      return `mass action, ${rate.use?.ratePerMinute ? `parameter ${rate.use.ratePerMinute} = ` : ""}${rate.ratePerMinute} per minute${scaled}`;
    case "constant":
      return `constant, ${rate.use?.ratePerMinute ? `parameter ${rate.use.ratePerMinute} = ` : ""}${rate.ratePerMinute} molecules per minute${scaled}`;
    case "regulated":
      return `regulated (${rate.regulators.map((g) => g.source).join(rate.logic === "and" ? " and " : " or ")}), at most ${rate.maxRatePerMinute} per minute${scaled}`;
    case "expression":
      return `expression: ${rate.formula}${scaled}`;
  }
}

/** Reads a document; throws SbmlRefused (422) or the 413. */
export function previewSbml(sbml: string): SbmlPreview {
  if (Buffer.byteLength(sbml, "utf8") > SBML_LIMITS.maxSbmlBytes) throw sbmlTooLarge();
  const r = importSbml(sbml);
  if (!r.ok) throw new SbmlRefused(r.problems);
  return {
    level: r.level,
    version: r.version,
    circuit: r.circuit,
    compartments: r.compartments,
    reactions: r.circuit.reactions.map((x) => ({
      name: x.name,
      scheme: `${side(x.reactants)} -> ${side(x.products)}`,
      rate: rateInWords(x),
    })),
    notes: r.notes,
    problems: [],
  };
}

function nameTaken(ctx: AppContext, labId: string, name: string): boolean {
  const c = schema.circuits;
  return !!ctx.db
    .select({ id: c.id })
    .from(c)
    .where(and(eq(c.labId, labId), isNull(c.archivedAt), sql`lower(${c.name}) = lower(${name})`))
    .get();
}

/** The model's name, or "<name> (imported 2)", "(imported 3)", ... when the lab already has it. */
function freeImportName(ctx: AppContext, labId: string, base: string): string {
  const stem = base.trim().slice(0, 100) || "Imported SBML model";
  if (!nameTaken(ctx, labId, stem)) return stem;
  for (let i = 2; ; i++) {
    const n = `${stem} (imported ${i})`;
    if (!nameTaken(ctx, labId, n)) return n;
  }
}

export interface SaveSbmlInput {
  sbml: string;
  name?: string;
  circuitId?: string;
  note?: string;
}

/**
 * Saves a document as a new circuit (created: true) or as a new version of a
 * circuit of the same lab. The whole document is read before anything is stored.
 */
export function saveSbml(
  ctx: AppContext,
  actor: Actor,
  labId: string,
  input: SaveSbmlInput,
): { created: boolean; detail: CircuitDetailResponse } {
  const preview = previewSbml(input.sbml);
  const body: Circuit = preview.circuit;
  const note = input.note?.trim() || `Imported from SBML Level ${preview.level} Version ${preview.version}`;
  if (input.circuitId) {
    const row = ctx.db
      .select({ labId: schema.circuits.labId })
      .from(schema.circuits)
      .where(eq(schema.circuits.id, input.circuitId))
      .get();
    if (!row || row.labId !== labId) throw notFound("That circuit");
    updateCircuit(ctx, actor, input.circuitId, { body, note, ...(input.name ? { name: input.name } : {}) });
    return { created: false, detail: getCircuitDetail(ctx, input.circuitId) };
  }
  const name = input.name?.trim() || freeImportName(ctx, labId, body.name);
  const id = createCircuit(ctx, actor, labId, { name, body, note });
  return { created: true, detail: getCircuitDetail(ctx, id) };
}

/** A download name from the circuit's name: letters, digits, dot, dash and underscore only. */
export function sbmlFileName(circuitName: string): string {
  const stem = circuitName
    .normalize("NFKD")
    .replace(/[^A-Za-z0-9._-]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 80);
  return `${stem || "circuit"}.sbml.xml`;
}

export interface ExportSbmlOptions {
  programId?: string;
  signal?: string;
  endTimeMinutes?: number;
  version?: number;
}

/** A stored circuit (and optionally a program of its lab) as SBML text, with its download name. */
export function exportCircuitSbml(
  ctx: AppContext,
  circuitId: string,
  labId: string,
  opts: ExportSbmlOptions,
): { xml: string; fileName: string; circuitName: string } {
  const row = ctx.db
    .select({ currentVersion: schema.circuits.currentVersion, name: schema.circuits.name })
    .from(schema.circuits)
    .where(eq(schema.circuits.id, circuitId))
    .get();
  if (!row) throw notFound("That circuit");
  const version = opts.version ?? row.currentVersion;
  const body = getCircuitVersion(ctx, circuitId, version).body;
  let program: { signal: string; switchTimes: ArrayLike<number>; levels: ArrayLike<number> } | undefined;
  if (opts.programId) {
    const p = ctx.db
      .select({ labId: schema.inputPrograms.labId, body: schema.inputPrograms.body })
      .from(schema.inputPrograms)
      .where(eq(schema.inputPrograms.id, opts.programId))
      .get();
    if (!p || p.labId !== labId) throw notFound("That input program");
    const parsed = InputProgramSchema.safeParse(p.body);
    if (!parsed.success)
      throw badRequest("That input program is not readable.", [{ path: "programId", message: "not readable" }]);
    const prog = parsed.data;
    if (prog.kind === "random" && prog.perReplicate)
      throw badRequest(
        "This program draws new pulses for every replicate, so no single file can hold it. Export without a program, or use a program shared by all replicates.",
        [{ path: "programId", message: "drawn per replicate: cannot be written as fixed events" }],
        "invalid",
      );
    const signalName = opts.signal ?? (body.signals.length === 1 ? body.signals[0].name : undefined);
    if (body.signals.length === 0)
      throw badRequest(
        `The circuit "${row.name}" has no signal for the program to drive. Export it without a program.`,
        [{ path: "programId", message: "the circuit has no signal" }],
        "invalid",
      );
    if (signalName === undefined)
      throw badRequest(
        `The circuit has ${body.signals.length} signals; name the one the program drives with signal=.`,
        [{ path: "signal", message: `one of ${body.signals.map((s) => s.name).join(", ")}` }],
        "invalid",
      );
    const signal = body.signals.find((s) => s.name === signalName);
    if (!signal)
      throw badRequest(
        `"${signalName}" is not a signal of the circuit.`,
        [{ path: "signal", message: `one of ${body.signals.map((s) => s.name).join(", ")}` }],
        "invalid",
      );
    const compiled = compileProgram(prog, opts.endTimeMinutes ?? EXPORT_DEFAULT_END_MINUTES, undefined, signal);
    program = { signal: signal.name, switchTimes: compiled.switchTimes, levels: compiled.levels };
  } else if (opts.signal) {
    throw badRequest("signal= only goes with programId=.", [{ path: "signal", message: "needs programId" }], "invalid");
  }
  return { xml: exportSbml(body, program), fileName: sbmlFileName(row.name), circuitName: row.name };
}
