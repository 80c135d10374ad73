/**
 * Demo circuits and input programs of the invented fermentation-tank scenario
 * (for demos only, never for checks), seeded idempotently by stable demo keys per lab:
 * an item whose key exists is left alone (users may have edited it).
 *
 * Circuits come from the engine templates (genes qsaA = X, hldB = Y, rptC = Z,
 * signal Q = compound Q). Importing this module registers the seeder.
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { allTemplates as templates } from "@/sim/circuit/templates";
import { CircuitSchema, type Circuit } from "@/shared/schemas/circuit";
import type { InputProgram } from "@/shared/schemas/input-program";
import type { TemplateKey } from "@/shared/schemas/api-circuits";
import { registerDemoSeeder } from "./seed";
import { createCircuit } from "@/server/services/circuits.service";
import { createProgram } from "@/server/services/programs.service";

/** Stable keys of the demo circuits (for demo runs). */
export const DEMO_CIRCUIT_KEYS = {
  direct: "circuit-tank-direct",
  hold: "circuit-tank-hold",
  dosingPulse: "circuit-dosing-pulse",
} as const;

/** Stable keys of the demo input programs (for demo runs). */
export const DEMO_PROGRAM_KEYS = {
  feedSpikes: "program-feed-spikes",
  durationLadder: "program-duration-ladder",
} as const;

export interface DemoCircuit {
  demoKey: string;
  name: string;
  template: TemplateKey;
  description: string;
}

export const DEMO_CIRCUITS: DemoCircuit[] = [
  {
    demoKey: DEMO_CIRCUIT_KEYS.direct,
    name: "Tank sensor, direct",
    template: "simple",
    description:
      "The control: qsaA senses compound Q and drives the reporter rptC directly, so every 2-5 min feed spike shows up in the output.",
  },
  {
    demoKey: DEMO_CIRCUIT_KEYS.hold,
    name: "Tank sensor, hold",
    template: "c1ffl-and",
    description:
      "Coherent type-1 feed-forward circuit with AND logic: rptC needs qsaA and the slow hold factor hldB, so brief feed spikes are filtered and only a sustained exposure to compound Q reports.",
  },
  {
    demoKey: DEMO_CIRCUIT_KEYS.dosingPulse,
    name: "Dosing pulse",
    template: "i1ffl",
    description:
      "Incoherent type-1 feed-forward circuit: on exposure to compound Q, qsaA turns on the release enzyme rptC and the repressor hldB, which shuts rptC down again: a timed pulse of enzyme.",
  },
];

/** The demo circuit bodies, built from the engine templates. */
export function demoCircuitBody(d: DemoCircuit): Circuit {
  const base = CircuitSchema.parse(structuredClone(templates[d.template].circuit));
  return { ...base, name: d.name, description: d.description };
}

/**
 * Lifetime (1 / first-order removal rate, minutes) of the slowest-removed
 * species of a circuit, from its mass-action A -> (nothing) reactions; null when
 * some species has no such removal.
 */
export function slowestLifetimeMinutes(circuit: Circuit): number | null {
  let longest = 0;
  for (const s of circuit.species) {
    let removal = 0;
    for (const r of circuit.reactions) {
      if (r.rate.kind !== "massAction") continue;
      if (r.reactants.length !== 1 || r.reactants[0].species !== s.name || r.reactants[0].count !== 1) continue;
      if (r.products.some((p) => p.species === s.name)) continue;
      removal += r.rate.ratePerMinute;
    }
    if (removal <= 0) return null;
    longest = Math.max(longest, 1 / removal);
  }
  return longest;
}

/**
 * Recovery gap of the duration ladder: six lifetimes of the slowest species of
 * any demo circuit (e^-6 < 0.3 % of a level left, so every species, and the
 * output, is back at its OFF baseline before the next pulse), rounded up to
 * whole half hours; 240 min when a lifetime is undefined.
 */
export function ladderRecoveryGapMinutes(circuits: Circuit[] = DEMO_CIRCUITS.map(demoCircuitBody)): number {
  let longest = 0;
  for (const c of circuits) {
    const l = slowestLifetimeMinutes(c);
    if (l === null) return 240;
    longest = Math.max(longest, l);
  }
  return Math.max(60, Math.ceil((6 * longest) / 30) * 30);
}

export interface DemoProgram {
  demoKey: string;
  name: string;
  body: InputProgram;
}

/** Time (min) of the one true 60-min exposure in "Feed spikes". */
export const FEED_SPIKES_TRUE_EXPOSURE = { start: 600, duration: 60 } as const;
/** The ladder's pulse durations (min). */
export const LADDER_DURATIONS_MINUTES = [1, 2, 5, 10, 20, 40, 80] as const;

export function demoPrograms(): DemoProgram[] {
  return [
    {
      demoKey: DEMO_PROGRAM_KEYS.feedSpikes,
      name: "Feed spikes",
      body: {
        kind: "random",
        start: 0,
        meanInterval: 45,
        durations: { dist: "uniform", min: 2, max: 5 },
        seed: "tank-feed-spikes",
        perReplicate: false,
        extraPulses: [{ ...FEED_SPIKES_TRUE_EXPOSURE }],
      },
    },
    {
      demoKey: DEMO_PROGRAM_KEYS.durationLadder,
      name: "Duration ladder",
      body: {
        kind: "ladder",
        start: 60,
        durations: [...LADDER_DURATIONS_MINUTES],
        repeats: 1,
        gap: ladderRecoveryGapMinutes(),
      },
    },
  ];
}

/** A name for a seeded item: its own, or with " (demo)" when a user item already has it. */
function seedName<T extends typeof schema.circuits | typeof schema.inputPrograms>(
  ctx: AppContext,
  table: T,
  labId: string,
  name: string,
): string {
  const taken = (n: string) =>
    !!ctx.db
      .select({ id: table.id })
      .from(table as typeof schema.circuits)
      .where(and(eq(table.labId, labId), isNull(table.archivedAt), sql`lower(${table.name}) = lower(${n})`))
      .get();
  if (!taken(name)) return name;
  for (let i = 1; ; i++) {
    const n = i === 1 ? `${name} (demo)` : `${name} (demo ${i})`;
    if (!taken(n)) return n;
  }
}

/** Seeds the demo circuits and programs into a lab; items already there (by key) are left as they are. */
export function seedDemoCircuitsAndPrograms(ctx: AppContext, lab: { id: string; ownerId: string }): void {
  const actor = { userId: lab.ownerId || null };
  for (const d of DEMO_CIRCUITS) {
    const exists = ctx.db
      .select({ id: schema.circuits.id })
      .from(schema.circuits)
      .where(and(eq(schema.circuits.labId, lab.id), eq(schema.circuits.demoKey, d.demoKey)))
      .get();
    if (exists) continue;
    createCircuit(ctx, actor, lab.id, {
      name: seedName(ctx, schema.circuits, lab.id, d.name),
      body: demoCircuitBody(d),
      note: `Demo circuit from the template "${templates[d.template].title}"`,
      demoKey: d.demoKey,
    });
  }
  for (const d of demoPrograms()) {
    const exists = ctx.db
      .select({ id: schema.inputPrograms.id })
      .from(schema.inputPrograms)
      .where(and(eq(schema.inputPrograms.labId, lab.id), eq(schema.inputPrograms.demoKey, d.demoKey)))
      .get();
    if (exists) continue;
    createProgram(ctx, actor, lab.id, {
      name: seedName(ctx, schema.inputPrograms, lab.id, d.name),
      body: d.body,
      demoKey: d.demoKey,
    });
  }
}

/** Id of a seeded demo circuit in a lab, by key (null when absent). */
export function demoCircuitId(ctx: AppContext, labId: string, demoKey: string): string | null {
  return (
    ctx.db
      .select({ id: schema.circuits.id })
      .from(schema.circuits)
      .where(and(eq(schema.circuits.labId, labId), eq(schema.circuits.demoKey, demoKey)))
      .get()?.id ?? null
  );
}

/** Id of a seeded demo program in a lab, by key (null when absent). */
export function demoProgramId(ctx: AppContext, labId: string, demoKey: string): string | null {
  return (
    ctx.db
      .select({ id: schema.inputPrograms.id })
      .from(schema.inputPrograms)
      .where(and(eq(schema.inputPrograms.labId, labId), eq(schema.inputPrograms.demoKey, demoKey)))
      .get()?.id ?? null
  );
}

registerDemoSeeder("circuits-and-programs", seedDemoCircuitsAndPrograms);
