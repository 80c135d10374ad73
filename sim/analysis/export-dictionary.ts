/**
 * The data dictionary of an export: a Frictionless Tabular Data Package
 * descriptor (datapackage.json; Data Package and Table Schema specifications,
 * frictionlessdata.io) listing every CSV with every column's name, type, unit
 * and meaning, booleans as `true` / `false`, the empty cell as the missing
 * value. Plain JSON that follows the specification (no library needed to
 * write it). Linger adds `unit` to each field (Table Schema allows extra
 * properties) and, at the top, the run's `settings` block with its `method`
 * label, so the numbers travel with the choices that made them.
 *
 * @example runDataPackage({ title: "My run", filePrefix: "My-run", settings }).resources.map((r) => r.path)
 */
import type { RunSettingsBlock } from "@/shared/schemas/analysis";
import {
  DURATION_COLUMNS,
  HEADLINE_COLUMNS,
  HEADLINE_METRICS,
  OUTPUT_PULSE_COLUMNS,
  PULSE_COLUMNS,
  REPLICATE_COLUMNS,
  type ExportColumn,
} from "./csv-export";

export interface TableField {
  name: string;
  type: "integer" | "number" | "boolean" | "string";
  description: string;
  /** Linger's addition: the unit of the values; absent for counts, fractions, ratios and text. */
  unit?: string;
  trueValues?: string[];
  falseValues?: string[];
  constraints?: { enum: string[] };
}

export interface TableResource {
  name: string;
  path: string;
  profile: "tabular-data-resource";
  title: string;
  description: string;
  format: "csv";
  mediatype: "text/csv";
  encoding: "utf-8";
  dialect: { delimiter: ","; header: true; lineTerminator: "\n" };
  schema: {
    fields: TableField[];
    missingValues: [""];
    primaryKey?: string[];
    foreignKeys?: { fields: string[]; reference: { resource: string; fields: string[] } }[];
  };
  /** headline.csv only: the metrics its rows hold, with unit and meaning. */
  metrics?: { name: string; unit: string | null; description: string }[];
}

export interface DataPackage {
  profile: "tabular-data-package";
  name: string;
  title: string;
  description: string;
  /** How every table is written (the one rule). */
  conventions: string;
  settings: RunSettingsBlock | null;
  method: RunSettingsBlock["method"] | null;
  resources: TableResource[];
  [extra: string]: unknown;
}

export const EXPORT_CONVENTIONS =
  "One observation per row. Column names are snake_case and end in their unit (_min = minutes, _molecules, " +
  "_molecules2 = molecules squared); counts, fractions and ratios have no unit suffix. Booleans are written true / false. " +
  "An empty cell means not defined (for a delay: no response in the window). Settings and the simulation method are " +
  "in this file, never rows of a table. Load with pandas.read_csv(path) or R's read.csv(path).";

/** A Table Schema field from an export column (or a plain description for tables written elsewhere). */
export function field(c: Pick<ExportColumn<never>, "name" | "type" | "unit" | "description" | "values">): TableField {
  return {
    name: c.name,
    type: c.type,
    description: c.description,
    ...(c.unit ? { unit: c.unit } : {}),
    ...(c.type === "boolean" ? { trueValues: ["true"], falseValues: ["false"] } : {}),
    ...(c.values ? { constraints: { enum: c.values } } : {}),
  };
}

export function tableResource(r: {
  name: string;
  path: string;
  title: string;
  description: string;
  fields: TableField[];
  primaryKey?: string[];
  foreignKeys?: TableResource["schema"]["foreignKeys"];
  metrics?: TableResource["metrics"];
}): TableResource {
  return {
    name: r.name,
    path: r.path,
    profile: "tabular-data-resource",
    title: r.title,
    description: r.description,
    format: "csv",
    mediatype: "text/csv",
    encoding: "utf-8",
    dialect: { delimiter: ",", header: true, lineTerminator: "\n" },
    schema: {
      fields: r.fields,
      missingValues: [""],
      ...(r.primaryKey ? { primaryKey: r.primaryKey } : {}),
      ...(r.foreignKeys ? { foreignKeys: r.foreignKeys } : {}),
    },
    ...(r.metrics ? { metrics: r.metrics } : {}),
  };
}

/** A data package name: lower case letters, digits and - _ . only (Data Package specification). */
export function packageName(s: string): string {
  return (
    s
      .toLowerCase()
      .replace(/[^a-z0-9._-]+/g, "-")
      .replace(/^-+|-+$/g, "")
      .slice(0, 60) || "run"
  );
}

/** The run export files, as the server names its downloads: `<prefix>-<file>`. */
export const RUN_EXPORT_FILES = {
  pulses: "pulses.csv",
  outputPulses: "output-pulses.csv",
  replicates: "replicates.csv",
  aggregates: "aggregates.csv",
  headline: "headline.csv",
} as const;

/** The dictionary of a run's CSV exports (the web app's downloads), named `<filePrefix>-<file>`. */
export function runDataPackage(opts: {
  title: string;
  filePrefix: string;
  settings: RunSettingsBlock | null;
  extra?: Record<string, unknown>;
}): DataPackage {
  const p = (f: string) => `${opts.filePrefix}-${f}`;
  const pulseKey = {
    fields: ["replicate", "pulse_index"],
    reference: { resource: "pulses", fields: ["replicate", "pulse_index"] },
  };
  return {
    profile: "tabular-data-package",
    name: packageName(opts.title),
    title: opts.title,
    description:
      "Per-pulse, per-output-pulse, per-replicate, per-duration and headline figures of one Linger run " +
      "(definitions in docs/metrics.md).",
    conventions: EXPORT_CONVENTIONS,
    settings: opts.settings,
    method: opts.settings ? opts.settings.method : null,
    ...(opts.extra ?? {}),
    resources: [
      tableResource({
        name: "pulses",
        path: p(RUN_EXPORT_FILES.pulses),
        title: "Input pulses",
        description: "One row per (replicate, input pulse) whose response window opened.",
        fields: PULSE_COLUMNS.map(field),
        primaryKey: ["replicate", "pulse_index"],
      }),
      tableResource({
        name: "output-pulses",
        path: p(RUN_EXPORT_FILES.outputPulses),
        title: "Output pulses",
        description: "One row per output pulse, with the input pulse in whose window it started.",
        fields: OUTPUT_PULSE_COLUMNS.map(field),
        primaryKey: ["replicate", "pulse_index", "output_pulse_index"],
        foreignKeys: [pulseKey],
      }),
      tableResource({
        name: "replicates",
        path: p(RUN_EXPORT_FILES.replicates),
        title: "Replicates",
        description: "One row per replicate: simulation totals, output moments and its pulse figures.",
        fields: REPLICATE_COLUMNS.map(field),
        primaryKey: ["replicate"],
      }),
      tableResource({
        name: "aggregates",
        path: p(RUN_EXPORT_FILES.aggregates),
        title: "Figures by input pulse duration",
        description: "One row per distinct input pulse duration: the filter curve and per-duration delays.",
        fields: DURATION_COLUMNS.map(field),
        primaryKey: ["duration_min"],
      }),
      tableResource({
        name: "headline",
        path: p(RUN_EXPORT_FILES.headline),
        title: "Headline figures",
        description:
          "One row per headline figure (metric, value, unit); the metrics list below gives each one's meaning.",
        fields: HEADLINE_COLUMNS.map(field),
        primaryKey: ["metric"],
        metrics: HEADLINE_METRICS.map((m) => ({ name: m.metric, unit: m.unit, description: m.description })),
      }),
    ],
  };
}
