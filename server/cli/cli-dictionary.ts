/**
 * datapackage.json for the CLI's output directory: every CSV the simulator
 * writes, with every column's type, unit and meaning (Frictionless Data
 * Package / Table Schema, sim/analysis/export-dictionary.ts), and the run's
 * settings block with its method label. grid-mean.csv keeps its fixed columns
 * (time, mean_<species>, sd_<species>): the one table whose time column has no
 * unit suffix, kept for the scripts that read it.
 */
import type { RunSettingsBlock } from "@/shared/schemas/analysis";
import {
  EXPORT_CONVENTIONS,
  field,
  packageName,
  tableResource,
  type DataPackage,
  type TableField,
} from "@/sim/analysis";
import { OUTPUT_PULSE_COLUMNS, PULSE_COLUMNS } from "@/sim/analysis/csv-export";

/** Column name of an extrinsic factor: `factor_` + the parameter reference in snake form (rate(makeX) -> factor_rate_makeX). */
export function factorColumn(ref: string): string {
  return `factor_${ref.replace(/[^A-Za-z0-9]+/g, "_").replace(/^_+|_+$/g, "")}`;
}

const num = (name: string, unit: string | undefined, description: string): TableField => ({
  name,
  type: "number",
  description,
  ...(unit ? { unit } : {}),
});
const int = (name: string, description: string): TableField => ({ name, type: "integer", description });

export function cliDataPackage(opts: {
  title: string;
  settings: RunSettingsBlock;
  species: readonly string[];
  factors: { ref: string; column: string }[];
  recordedReplicates: readonly number[];
  noInput: boolean;
  /** ode.csv is written only when the mean-field model could be solved. */
  hasOde: boolean;
}): DataPackage {
  const speciesFields = (what: string) =>
    opts.species.map((n) => num(n, "molecules", `${what} of species ${n} (column named after the species).`));
  const noPulses = opts.noInput ? " The run has no input pulses, so the table has its header and no rows." : "";
  return {
    profile: "tabular-data-package",
    name: packageName(opts.title),
    title: opts.title,
    description: "The files written by `npm run sim` for one run (definitions in docs/metrics.md and docs/runs.md).",
    conventions:
      EXPORT_CONVENTIONS +
      " Exception: grid-mean.csv keeps its fixed columns time, mean_<species>, sd_<species> (time in minutes, amounts in molecules).",
    settings: opts.settings,
    method: opts.settings.method,
    ...(opts.noInput ? { note: "no input pulses" } : {}),
    resources: [
      tableResource({
        name: "grid-mean",
        path: "grid-mean.csv",
        title: "Mean and SD on the grid",
        description: "One row per grid time: mean and standard deviation over replicates of every species.",
        fields: [
          num("time", "min", "Grid time (fixed interface: no unit suffix)."),
          ...opts.species.flatMap((n) => [
            num(`mean_${n}`, "molecules", `Mean over replicates of ${n}.`),
            num(`sd_${n}`, "molecules", `Standard deviation over replicates of ${n}.`),
          ]),
        ],
        primaryKey: ["time"],
      }),
      tableResource({
        name: "grid-replicates",
        path: "grid-replicates.csv",
        title: "Every replicate on the grid",
        description: "One row per (replicate, grid time): the count of every species.",
        fields: [
          int("replicate", "Replicate index, from 0."),
          num("time_min", "min", "Grid time."),
          ...speciesFields("Count"),
        ],
        primaryKey: ["replicate", "time_min"],
      }),
      tableResource({
        name: "replicates",
        path: "replicates.csv",
        title: "Replicates",
        description: "One row per replicate: events, cap, end time, output moments and extrinsic factors.",
        fields: [
          int("replicate", "Replicate index, from 0."),
          int("events", "Reaction firings simulated."),
          field({
            name: "capped",
            type: "boolean",
            unit: null,
            description: "Stopped at the event cap before the end time.",
          }),
          num("end_time_min", "min", "Time the replicate's path ended (the end time, or earlier at the cap)."),
          num("output_mean_molecules", "molecules", "Time-averaged output. Empty = unknown."),
          num("output_variance_molecules2", "molecules^2", "Time-averaged variance of the output. Empty = unknown."),
          ...opts.factors.map((f) =>
            num(f.column, undefined, `Lognormal extrinsic factor (mean 1) drawn for ${f.ref} in this replicate.`),
          ),
        ],
        primaryKey: ["replicate"],
      }),
      tableResource({
        name: "pulses",
        path: "pulses.csv",
        title: "Input pulses",
        description: `One row per (replicate, input pulse) whose response window opened.${noPulses}`,
        fields: PULSE_COLUMNS.map(field),
        primaryKey: ["replicate", "pulse_index"],
      }),
      tableResource({
        name: "output-pulses",
        path: "output-pulses.csv",
        title: "Output pulses",
        description: `One row per output pulse, with the input pulse in whose window it started.${noPulses}`,
        fields: OUTPUT_PULSE_COLUMNS.map(field),
        primaryKey: ["replicate", "pulse_index", "output_pulse_index"],
        foreignKeys: [
          {
            fields: ["replicate", "pulse_index"],
            reference: { resource: "pulses", fields: ["replicate", "pulse_index"] },
          },
        ],
      }),
      ...(opts.hasOde
        ? [
            tableResource({
              name: "ode",
              path: "ode.csv",
              title: "Mean-field solution",
              description: "One row per grid time: the deterministic (mean-field) amount of every species.",
              fields: [num("time_min", "min", "Grid time."), ...speciesFields("Mean-field amount")],
              primaryKey: ["time_min"],
            }),
          ]
        : []),
      ...opts.recordedReplicates.flatMap((r) => [
        tableResource({
          name: `events-${r}`,
          path: `events-${r}.csv`,
          title: `Every firing of replicate ${r}`,
          description: "One row per reaction firing, in time order; the state at time 0 is in the -initial file.",
          fields: [
            num("time_min", "min", "Time of the firing."),
            { name: "reaction", type: "string", description: "Name of the reaction that fired." },
          ],
        }),
        tableResource({
          name: `events-${r}-initial`,
          path: `events-${r}-initial.csv`,
          title: `Initial state of replicate ${r}`,
          description: "One row per species: its count at time 0 (after any burn-in).",
          fields: [
            { name: "species", type: "string", description: "Species name." },
            int("count", "Molecules at time 0."),
          ],
          primaryKey: ["species"],
        }),
      ]),
    ],
  };
}
