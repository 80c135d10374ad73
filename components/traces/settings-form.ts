/**
 * The preprocessing and threshold settings of a trace set as form text, and
 * the upload form around them: checks with plain messages (keyed by the
 * settings' schema paths, as the server names them), and conversion to the
 * wire shapes of shared/schemas/api-traces.ts.
 */
import {
  TRACE_LIMITS,
  TraceSettingsSchema,
  type TraceSettings,
  type TraceSettingsInput,
  type TraceUploadOptionsInput,
} from "@/shared/schemas/api-traces";
import { issuesToMap, parseNumber } from "@/components/forms/zod-errors";

export type SettingsValues = {
  backgroundMode: "none" | "value" | "preInput";
  backgroundValue: string;
  scaleMode: "entered" | "fitPlateau";
  unitsPerMolecule: string;
  onSteadyStateMolecules: string;
  minPulseMinutes: string;
  smoothingMode: "none" | "movingAverage";
  widthFrames: string;
  thresholdMolecules: string;
  hysteresis: string;
  windowMinutes: string;
  noiseDurationMinutes: string;
  gapFactor: string;
  maxGapMinutes: string;
};

/** Errors keyed by the path inside TraceSettings ("scale.unitsPerMolecule", "thresholdMolecules" ...). */
export type SettingsErrors = Record<string, string>;

export const SETTINGS_DEFAULTS: SettingsValues = {
  backgroundMode: "preInput",
  backgroundValue: "",
  scaleMode: "entered",
  unitsPerMolecule: "1",
  onSteadyStateMolecules: "",
  minPulseMinutes: "30",
  smoothingMode: "none",
  widthFrames: "3",
  thresholdMolecules: "",
  hysteresis: "0.2",
  windowMinutes: "30",
  noiseDurationMinutes: "10",
  gapFactor: "1.5",
  maxGapMinutes: "",
};

const str = (n: number | undefined) => (n === undefined ? "" : String(n));

/** Form text from stored settings (for editing a saved set). */
export function settingsToValues(s: TraceSettings): SettingsValues {
  return {
    backgroundMode: s.background.mode,
    backgroundValue: s.background.mode === "value" ? String(s.background.value) : "",
    scaleMode: s.scale.mode,
    unitsPerMolecule:
      s.scale.mode === "entered" ? String(s.scale.unitsPerMolecule) : SETTINGS_DEFAULTS.unitsPerMolecule,
    onSteadyStateMolecules: s.scale.mode === "fitPlateau" ? String(s.scale.onSteadyStateMolecules) : "",
    minPulseMinutes:
      s.scale.mode === "fitPlateau" ? String(s.scale.minPulseMinutes) : SETTINGS_DEFAULTS.minPulseMinutes,
    smoothingMode: s.smoothing.mode,
    widthFrames: s.smoothing.mode === "movingAverage" ? String(s.smoothing.widthFrames) : SETTINGS_DEFAULTS.widthFrames,
    thresholdMolecules: String(s.thresholdMolecules),
    hysteresis: String(s.hysteresis),
    windowMinutes: String(s.windowMinutes),
    noiseDurationMinutes: String(s.noiseDurationMinutes),
    gapFactor: String(s.gapFactor),
    maxGapMinutes: str(s.maxGapMinutes),
  };
}

/** The settings object the form describes (numbers may be NaN when the text is not a number; validate first). */
export function valuesToSettings(v: SettingsValues): TraceSettingsInput {
  const n = parseNumber;
  return {
    background:
      v.backgroundMode === "value" ? { mode: "value", value: n(v.backgroundValue) } : { mode: v.backgroundMode },
    scale:
      v.scaleMode === "entered"
        ? { mode: "entered", unitsPerMolecule: n(v.unitsPerMolecule) }
        : {
            mode: "fitPlateau",
            onSteadyStateMolecules: n(v.onSteadyStateMolecules),
            minPulseMinutes: n(v.minPulseMinutes),
          },
    smoothing:
      v.smoothingMode === "movingAverage" ? { mode: "movingAverage", widthFrames: n(v.widthFrames) } : { mode: "none" },
    thresholdMolecules: n(v.thresholdMolecules),
    hysteresis: n(v.hysteresis),
    windowMinutes: n(v.windowMinutes),
    noiseDurationMinutes: n(v.noiseDurationMinutes),
    gapFactor: n(v.gapFactor),
    ...(v.maxGapMinutes.trim() ? { maxGapMinutes: n(v.maxGapMinutes) } : {}),
  };
}

/** Plain-words checks first; the shared schema backs them up for anything else. */
export function validateSettings(v: SettingsValues): SettingsErrors {
  const e: SettingsErrors = {};
  const n = parseNumber;
  if (!(n(v.thresholdMolecules) > 0)) e.thresholdMolecules = "Threshold must be a positive number of molecules.";
  if (v.backgroundMode === "value" && !Number.isFinite(n(v.backgroundValue)))
    e["background.value"] = "Enter the background in trace units.";
  if (v.scaleMode === "entered" && !(n(v.unitsPerMolecule) > 0))
    e["scale.unitsPerMolecule"] = "Scale must be a positive number of trace units per molecule.";
  if (v.scaleMode === "fitPlateau") {
    if (!(n(v.onSteadyStateMolecules) > 0))
      e["scale.onSteadyStateMolecules"] = "Enter the model's ON steady state in molecules (positive).";
    if (!(n(v.minPulseMinutes) > 0)) e["scale.minPulseMinutes"] = "Enter a positive number of minutes.";
  }
  if (v.smoothingMode === "movingAverage") {
    const w = n(v.widthFrames);
    if (!(Number.isInteger(w) && w >= 3 && w <= 51 && w % 2 === 1))
      e["smoothing.widthFrames"] = "Width must be an odd whole number of frames from 3 to 51.";
  }
  const h = n(v.hysteresis);
  if (!(h >= 0 && h <= 0.9)) e.hysteresis = "Hysteresis must be between 0 and 0.9.";
  if (!(n(v.windowMinutes) > 0)) e.windowMinutes = "Response window must be a positive number of minutes.";
  if (!(n(v.noiseDurationMinutes) > 0)) e.noiseDurationMinutes = "Noise duration must be a positive number of minutes.";
  const g = n(v.gapFactor);
  if (!(g >= 1 && g <= 100)) e.gapFactor = "Gap factor must be between 1 and 100 frame intervals.";
  if (v.maxGapMinutes.trim() && !(n(v.maxGapMinutes) > 0))
    e.maxGapMinutes = "Longest allowed gap must be positive (or empty to keep every pulse).";
  if (Object.keys(e).length === 0) {
    const r = TraceSettingsSchema.safeParse(valuesToSettings(v));
    if (!r.success) Object.assign(e, issuesToMap(r.error.issues));
  }
  return e;
}

// ---------------------------------------------------------------- upload form

export type UploadValues = {
  name: string;
  layout: "auto" | "long" | "wide";
  timeUnit: "s" | "min" | "h";
  scheduleSource: "column" | "program";
  scheduleColumn: string;
  onAbove: string;
  programId: string;
  channel: string;
  settings: SettingsValues;
};

export const UPLOAD_DEFAULTS: UploadValues = {
  name: "",
  layout: "auto",
  timeUnit: "min",
  scheduleSource: "column",
  scheduleColumn: "input",
  onAbove: "0",
  programId: "",
  channel: "",
  settings: SETTINGS_DEFAULTS,
};

/** Errors of the upload form: top-level keys (file, name, scheduleColumn, onAbove, programId, channel) and `settings.<path>`. */
export type UploadErrors = Record<string, string>;

export function validateUpload(v: UploadValues, file: { size: number | null } | null): UploadErrors {
  const e: UploadErrors = {};
  if (!file) e.file = "Choose a CSV or TSV file.";
  else if (file.size !== null && file.size > TRACE_LIMITS.maxFileBytes)
    e.file = `The file is larger than ${TRACE_LIMITS.maxFileBytes / (1024 * 1024)} MB; split it or drop columns you do not need.`;
  if (v.name.trim().length > 120) e.name = "At most 120 characters.";
  if (v.scheduleSource === "column") {
    if (!v.scheduleColumn.trim()) e.scheduleColumn = "Name the column that holds the input level.";
    if (!Number.isFinite(parseNumber(v.onAbove))) e.onAbove = "Enter a number (the input is ON above it).";
  } else if (!v.programId) e.programId = "Choose an input program.";
  if (v.channel.trim().length > 100) e.channel = "At most 100 characters.";
  for (const [k, m] of Object.entries(validateSettings(v.settings))) e[`settings.${k}`] = m;
  return e;
}

/** The multipart `options` JSON of a valid form. */
export function toUploadOptions(v: UploadValues): TraceUploadOptionsInput {
  return {
    ...(v.name.trim() ? { name: v.name.trim() } : {}),
    layout: v.layout,
    timeUnit: v.timeUnit,
    ...(v.channel.trim() ? { channel: v.channel.trim() } : {}),
    schedule:
      v.scheduleSource === "column"
        ? { source: "column", column: v.scheduleColumn.trim(), onAbove: parseNumber(v.onAbove) }
        : { source: "program", programId: v.programId },
    settings: valuesToSettings(v.settings),
  };
}

/**
 * Server field errors of an upload ("options.settings.scale.unitsPerMolecule",
 * "schedule.programId", "file") as form keys; line/column problems of the file
 * are shown separately and are left out here.
 */
export function uploadServerErrors(fields: { path: string; message: string }[]): UploadErrors {
  const out: UploadErrors = {};
  for (const f of fields) {
    if (/^line \d+/.test(f.path)) continue;
    let p = f.path.replace(/^(body\.)?options\./, "");
    if (p === "schedule.column") p = "scheduleColumn";
    else if (p === "schedule.onAbove") p = "onAbove";
    else if (p === "schedule.programId") p = "programId";
    if (!(p in out)) out[p] = f.message;
  }
  return out;
}
