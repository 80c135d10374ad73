/**
 * Behaviour labels in plain words (docs/regimes.md): what each label means,
 * the evidence's named numbers with units, the sentence shown when the
 * mean-field and stochastic labels differ, and wiring beside behaviour.
 */
import type { RegimeLabelValue, RegimeVerdictView, RunRegimeView } from "@/shared/schemas/regime";
import { formatNumber } from "@/components/charts/chart-spec";

const MEANS: Record<RegimeLabelValue, string> = {
  silent: "the output never reaches the threshold",
  steady: "it settles to one steady level, without ringing worth the name",
  follower: "it tracks the input, passing short and long pulses alike",
  "persistence filter": "short pulses rarely pass, long ones almost always do",
  "pulse generator": "under a sustained input the output peaks, then falls back while the input is still on",
  memory: "the output stays on after the input is removed (two states that each hold)",
  "damped oscillation": "it rings down after a disturbance instead of settling at once",
  "sustained oscillation": "it oscillates for ever, with a period and amplitude of its own",
  unclear: "no rule held",
};

/** The label as a noun phrase for sentences ("a persistence filter", "memory"). */
export function labelPhrase(label: RegimeLabelValue): string {
  switch (label) {
    case "memory":
      return "a switch with memory";
    case "damped oscillation":
      return "a damped oscillator";
    case "sustained oscillation":
      return "a sustained oscillator";
    case "silent":
      return "silent";
    case "steady":
      return "steady";
    case "unclear":
      return "unclear";
    default:
      return `a ${label}`;
  }
}

/** What a verdict means, in one sentence (noise-driven quasi-cycles said as such). */
export function verdictMeaning(v: RegimeVerdictView): string {
  if (v.label === "unclear") return v.reason ? `Unclear: ${v.reason}.` : "Unclear: no rule held.";
  if (v.label === "damped oscillation" && v.evidence.quasiCycles === 1)
    return "Noise keeps irregular cycles going, but their amplitude wanders and they lose their rhythm from one period to the next (noise-driven quasi-cycles, not a limit cycle).";
  const m = MEANS[v.label];
  return m.charAt(0).toUpperCase() + m.slice(1) + ".";
}

/** Named evidence numbers in words, with units (keys the rules use; others shown as named). */
const EVIDENCE_WORDS: Record<string, string> = {
  turnoverMinutes: "slowest turnover (min)",
  outputLifetimeMinutes: "output lifetime (min)",
  replicates: "replicates per ensemble",
  windowMinutes: "window (min)",
  sampleMinutes: "sampling step (min)",
  meanFieldStableStates: "stable states of the mean-field model",
  acfTrough: "autocorrelation trough",
  acfFirstPeak: "peak coherence (autocorrelation one period later)",
  acfPeriodMinutes: "period from the autocorrelation (min)",
  amplitudeCv: "amplitude spread (CV; 0.52 for noise-driven cycles)",
  meanAmplitude: "mean amplitude (molecules)",
  amplitudeWindows: "periods measured",
  quasiCycles: "noise-driven quasi-cycles",
  ringingCondition: "condition (0 input off, 1 on)",
  memoryCondition: "condition (0 input off, 1 on)",
  memoryLevel: "on level (molecules)",
  longestOnDwellMinutes: "longest stay on (min)",
  longestOffDwellMinutes: "longest stay off (min)",
  onDwellOverLifetimes: "longest stay on (output lifetimes)",
  replicatesEndingOn: "replicates ending on",
  replicatesCounted: "replicates counted",
  thresholdMolecules: "threshold (molecules)",
  highestOutput: "highest output (molecules)",
  stepStart: "output before the input (molecules)",
  stepPeak: "peak under the input (molecules)",
  stepPeakMinutes: "time to peak (min)",
  stepFinal: "level at the end under the input (molecules)",
  finalOverPeak: "end level ÷ peak",
  durationsMinutes: "pulse durations (min)",
  passFractions: "fraction passed",
  passLow: "Wilson 95% low",
  passHigh: "Wilson 95% high",
  blockedDurationMinutes: "duration rarely passed (min)",
  passedDurationMinutes: "duration almost always passed (min)",
  periodMinutes: "period (min)",
  relativeSwing: "relative swing of the cycle",
  swingRatio: "late ÷ early swing",
  peakRatio: "successive peak ratio",
  offSteadyStates: "steady states, input off",
  offStableStates: "stable states, input off",
  offStableOutputs: "stable output levels, input off (molecules)",
  offDominantReal: "dominant eigenvalue real part, input off (/min)",
  offDominantImag: "dominant eigenvalue imaginary part, input off (/min)",
  onSteadyStates: "steady states, input on",
  onStableStates: "stable states, input on",
  onStableOutputs: "stable output levels, input on (molecules)",
  onDominantReal: "dominant eigenvalue real part, input on (/min)",
  onDominantImag: "dominant eigenvalue imaginary part, input on (/min)",
  unstableDominantReal: "unstable state's eigenvalue real part (/min)",
  unstableDominantImag: "unstable state's eigenvalue imaginary part (/min)",
  eventBudget: "reaction firings allowed",
  events: "reaction firings used",
};

export function evidenceRows(v: RegimeVerdictView): { key: string; label: string; value: string }[] {
  return Object.entries(v.evidence).map(([key, val]) => ({
    key,
    label: EVIDENCE_WORDS[key] ?? key,
    value: val === null ? "–" : Array.isArray(val) ? val.map((x) => formatNumber(x)).join(", ") : formatNumber(val),
  }));
}

/** The sentence shown when the two labels differ (null when they agree). */
export function differenceSentence(r: RunRegimeView): string | null {
  const d = r.deterministic.label;
  const s = r.stochastic.label;
  if (d === s) return null;
  return `The mean-field model says ${labelPhrase(d)}, the stochastic ensemble says ${labelPhrase(s)}: at these copy numbers noise changes what this circuit does, and that difference is a finding.`;
}

/** Wiring label beside measured behaviour ("wired as ...; at these parameters it behaves as ..."). */
export function wiringVersusBehaviour(wiring: string, r: RunRegimeView): string {
  const d = r.deterministic.label;
  const s = r.stochastic.label;
  const behaves = (l: RegimeLabelValue) =>
    l === "unclear"
      ? "its behaviour is unclear"
      : l === "silent" || l === "steady"
        ? `it is ${l}`
        : `it behaves as ${labelPhrase(l)}`;
  if (d === s) return `Wired as ${wiring}; at these parameters ${behaves(d)}.`;
  return `Wired as ${wiring}; at these parameters, in the mean-field model ${behaves(d)}, and with molecular noise ${behaves(s)}.`;
}

/** The circuit's wiring in a phrase, from its feed-forward loop or its species-to-species edges. */
export function wiringPhrase(
  feedForward: { label: string } | null,
  edges: { from: string; to: string; sign: "activates" | "represses" }[],
  species: string[],
): string {
  if (feedForward)
    return `${/^[aeiou]/i.test(feedForward.label) ? "an" : "a"} ${feedForward.label} feed-forward circuit`;
  const sp = new Set(species);
  const inner = edges.filter((e) => sp.has(e.from) && sp.has(e.to));
  if (inner.some((e) => e.from === e.to && e.sign === "represses"))
    return "a self-repressing gene (negative autoregulation)";
  // a cycle among species: depth-first search on the species edges
  const next = new Map<string, string[]>();
  for (const e of inner) next.set(e.from, [...(next.get(e.from) ?? []), e.to]);
  const state = new Map<string, number>();
  let cycle = false;
  const visit = (n: string) => {
    state.set(n, 1);
    for (const m of next.get(n) ?? []) {
      if (state.get(m) === 1) cycle = true;
      else if (!state.has(m)) visit(m);
    }
    state.set(n, 2);
  };
  for (const n of sp) if (!state.has(n)) visit(n);
  if (cycle)
    return inner.every((e) => e.sign === "represses") ? "a feedback loop of repressors" : "a circuit with feedback";
  return "a circuit without feedback";
}
