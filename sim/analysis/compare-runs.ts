/**
 * Two to four runs side by side (docs/metrics.md, "Comparing runs"): headline
 * figures, filter curves on the union of durations, overlaid histograms on
 * shared bins, and for every pair of runs
 * - response delays and output pulse widths: two-sample Kolmogorov-Smirnov
 *   (Smirnov 1948) and Mann-Whitney U (Mann & Whitney 1947) with rank-biserial
 *   effect size, plus the Wasserstein-1 distance of the observed values.
 *   A censored delay (no response) is coded as longer than every observed delay
 *   (+Infinity) in both tests, so "responds less often" counts as "later";
 * - pass probability at each shared duration: Fisher's exact test.
 * p-values are Holm-adjusted (Holm 1979) within each family across the pairs
 * compared: {delay KS}, {delay MW}, {width KS}, {width MW}, and all
 * (pair, duration) pass tests together. A difference is "within noise" when the
 * adjusted p-values are all >= 0.05.
 *
 * When the runs were measured with different settings (threshold, hysteresis,
 * response window, method, end time, replicate count), `settingsWarnings`
 * says so in words, one sentence per setting: a difference in pass or delay
 * may then come from the settings, not from the circuits.
 *
 * @example compareRuns([{ id: "a", name: "hold", summary, delays, widths }, { ... }]).flags
 */
import type { Comparison, ComparisonPair, RunSettingsBlock, RunSummary, TwoSample } from "@/shared/schemas/analysis";
import { describe } from "@/sim/stats/describe";
import { fisherExact } from "@/sim/stats/fisher-exact";
import { histogram, sturgesBinCount } from "@/sim/stats/histogram";
import { holm } from "@/sim/stats/holm";
import { ks2 } from "@/sim/stats/ks-two-sample";
import { mannWhitney } from "@/sim/stats/mann-whitney";
import { wasserstein1 } from "@/sim/stats/wasserstein-1";
import { formatCount, formatProbability, formatQuantity } from "@/shared/number-format";

export interface RunToCompare {
  id: string;
  name: string;
  summary: RunSummary;
  /** Response delays of the evaluable pulses; null = censored (no response in the window). */
  delays: readonly (number | null)[];
  /** Output pulse widths (minutes). */
  widths: readonly number[];
  /** The run's settings block; when every run has one, differences are stated in settingsWarnings. */
  settings?: RunSettingsBlock | null;
}

const sameNumber = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(a), Math.abs(b));

/** One sentence per setting that differs between the runs, naming each run's value. */
export function settingsWarnings(runs: readonly { name: string; settings?: RunSettingsBlock | null }[]): string[] {
  if (!runs.every((r) => r.settings)) return [];
  const list = (f: (s: RunSettingsBlock) => string) => runs.map((r) => `${r.name}: ${f(r.settings!)}`).join("; ");
  const differs = (f: (s: RunSettingsBlock) => number | null) =>
    runs.some((r) => {
      const a = f(r.settings!);
      const b = f(runs[0].settings!);
      return a === null || b === null ? a !== b : !sameNumber(a, b);
    });
  const out: string[] = [];
  if (differs((s) => s.thresholdMolecules))
    out.push(
      `The runs use different thresholds (${list((s) => (s.thresholdMolecules === null ? "none" : formatQuantity(s.thresholdMolecules, "molecules")))}): pass, delay and d50 are measured against different output levels.`,
    );
  if (differs((s) => s.hysteresis))
    out.push(
      `The runs use different hysteresis bands (${list((s) => formatProbability(s.hysteresis))}): output pulses and widths are cut differently.`,
    );
  if (differs((s) => s.windowMinutes))
    out.push(
      `The runs use different response windows (${list((s) => formatQuantity(s.windowMinutes, "min"))}): a late response counts as a pass in one and not in another.`,
    );
  if (runs.some((r) => r.settings!.method.name !== runs[0].settings!.method.name))
    out.push(
      `The runs were simulated by different methods (${list((s) => s.method.label)}): an approximate method can shift noise-driven figures.`,
    );
  if (differs((s) => s.endTimeMinutes))
    out.push(
      `The runs end at different times (${list((s) => formatQuantity(s.endTimeMinutes, "min"))}): they see different input pulses.`,
    );
  if (differs((s) => s.replicates))
    out.push(
      `The runs have different replicate counts (${list((s) => formatCount(s.replicates))}): their intervals differ in width for that reason alone.`,
    );
  return out;
}

const ALPHA = 0.05;
const MAX_BINS = 40;

function fmtP(p: number): string {
  if (!Number.isFinite(p)) return "n/a";
  if (p < 0.001) return "< 0.001";
  return `= ${p.toFixed(3)}`;
}
function fmt(x: number | null, digits = 3): string {
  return x === null || !Number.isFinite(x) ? "n/a" : String(Number(x.toPrecision(digits)));
}

interface RawTwoSample {
  a: number[];
  b: number[];
  finiteA: number[];
  finiteB: number[];
}

function rawTwoSample(a: readonly (number | null)[], b: readonly (number | null)[]): RawTwoSample {
  const code = (xs: readonly (number | null)[]) => xs.map((x) => (x === null ? Infinity : x));
  const fin = (xs: readonly (number | null)[]) => xs.filter((x): x is number => x !== null && Number.isFinite(x));
  return { a: code(a), b: code(b), finiteA: fin(a), finiteB: fin(b) };
}

function medianWithCensoring(xs: number[]): number | null {
  // with +Infinity for censored values the sample median is still defined when
  // fewer than half are censored; report null otherwise
  const m = describe(xs.filter((x) => !Number.isNaN(x)).map((x) => (Number.isFinite(x) ? x : Number.MAX_VALUE))).median;
  return m === null || m >= Number.MAX_VALUE / 2 ? null : m;
}

export function compareRuns(runs: readonly RunToCompare[]): Comparison {
  if (runs.length < 2 || runs.length > 4) throw new RangeError("compareRuns needs two to four runs");
  const ids = new Set(runs.map((r) => r.id));
  if (ids.size !== runs.length) throw new RangeError("compareRuns: run ids must be distinct");

  // ---- headlines
  const headlineRuns = runs.map((r) => {
    const s = r.summary;
    return {
      id: r.id,
      name: r.name,
      ...(r.settings !== undefined ? { settings: r.settings } : {}),
      headline: {
        evaluable: s.counts.evaluable,
        passed: s.counts.passed,
        d50: s.d50,
        d50Ci: s.d50Ci,
        d50Note: s.d50Note,
        falsePassRate: s.falsePassRate,
        medianDelay: s.delay.median,
        medianDelayCi: s.delay.medianCi,
        delayCostMedian: s.delayCost ? s.delayCost.medianDelay : null,
        medianWidth: s.widths.summary.median,
        medianPeak: s.pulseGeneration.peak.median,
        medianTimeToPeak: s.pulseGeneration.timeToPeak.median,
        medianFwhm: s.pulseGeneration.fwhm.median,
        cv: s.noise.cv,
        fano: s.noise.fano,
      },
    };
  });

  // ---- filter curves on the union of durations
  const durations = [...new Set(runs.flatMap((r) => r.summary.byDuration.map((e) => e.duration)))].sort(
    (a, b) => a - b,
  );
  const filterCurves = durations.map((duration) => ({
    duration,
    runs: runs.map((r) => {
      const e = r.summary.byDuration.find((x) => x.duration === duration);
      if (!e) return null;
      const f = r.summary.logistic.fitted.find((x) => x.duration === duration);
      return {
        pulses: e.pulses,
        passed: e.passed,
        passProbability: e.passProbability,
        ci: e.ci,
        fitted: f ? f.passProbability : null,
      };
    }),
  }));

  // ---- overlaid histograms on shared bins
  const sharedHistogram = (samples: number[][]) => {
    const pooled = samples.flat();
    const bins = Math.min(MAX_BINS, sturgesBinCount(pooled.length));
    let min = pooled.length ? Infinity : 0;
    let max = pooled.length ? -Infinity : 1;
    for (const v of pooled) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
    const hs = samples.map((s) => histogram(s, { binCount: bins, min, max }));
    return { edges: hs[0].edges, counts: hs.map((h) => h.counts) };
  };
  const observedDelays = runs.map((r) => r.delays.filter((x): x is number => x !== null && Number.isFinite(x)));
  const dh = sharedHistogram(observedDelays);
  const wh = sharedHistogram(runs.map((r) => r.widths.filter((x) => Number.isFinite(x))));
  const distributions = {
    delays: {
      edges: dh.edges,
      runs: runs.map((r, i) => ({ counts: dh.counts[i], censored: r.delays.filter((x) => x === null).length })),
    },
    widths: { edges: wh.edges, runs: runs.map((_, i) => ({ counts: wh.counts[i] })) },
  };

  // ---- pairwise tests
  const pairIdx: [number, number][] = [];
  for (let i = 0; i < runs.length; i++) for (let j = i + 1; j < runs.length; j++) pairIdx.push([i, j]);

  const testSamples = (raw: RawTwoSample) => {
    const ks = raw.a.length && raw.b.length ? ks2(raw.a, raw.b) : null;
    const mw = raw.a.length && raw.b.length ? mannWhitney(raw.a, raw.b) : null;
    const w1 = raw.finiteA.length && raw.finiteB.length ? wasserstein1(raw.finiteA, raw.finiteB) : null;
    return { raw, ks, mw, w1 };
  };
  const delayTests = pairIdx.map(([i, j]) => testSamples(rawTwoSample(runs[i].delays, runs[j].delays)));
  const widthTests = pairIdx.map(([i, j]) => testSamples(rawTwoSample(runs[i].widths, runs[j].widths)));
  const adjust = (tests: ReturnType<typeof testSamples>[]) => ({
    ks: holm(tests.map((t) => (t.ks ? t.ks.pValue : NaN))),
    mw: holm(tests.map((t) => (t.mw ? t.mw.pValue : NaN))),
  });
  const delayAdj = adjust(delayTests);
  const widthAdj = adjust(widthTests);

  const toTwoSample = (t: ReturnType<typeof testSamples>, ksHolm: number, mwHolm: number): TwoSample => {
    const withinNoise =
      t.ks && t.mw && Number.isFinite(ksHolm) && Number.isFinite(mwHolm) ? ksHolm >= ALPHA && mwHolm >= ALPHA : null;
    return {
      nA: t.raw.a.length,
      nB: t.raw.b.length,
      medianA: medianWithCensoring(t.raw.a),
      medianB: medianWithCensoring(t.raw.b),
      ks:
        t.ks && Number.isFinite(t.ks.pValue)
          ? { d: t.ks.d, pValue: t.ks.pValue, pHolm: ksHolm, critical05: t.ks.critical05 }
          : null,
      mannWhitney:
        t.mw && Number.isFinite(t.mw.pValue)
          ? {
              u: t.mw.u,
              z: t.mw.z,
              pValue: t.mw.pValue,
              pHolm: mwHolm,
              rankBiserial: t.mw.rankBiserial,
              probabilityAGreater: t.mw.probabilityAGreater,
            }
          : null,
      wasserstein1: t.w1,
      withinNoise,
    };
  };

  // pass differences at shared durations, Holm across all (pair, duration)
  type PassRaw = { pair: number; duration: number; pa: number; pb: number; p: number };
  const passRaw: PassRaw[] = [];
  pairIdx.forEach(([i, j], pair) => {
    for (const ea of runs[i].summary.byDuration) {
      const eb = runs[j].summary.byDuration.find((x) => x.duration === ea.duration);
      if (!eb || ea.pulses === 0 || eb.pulses === 0) continue;
      passRaw.push({
        pair,
        duration: ea.duration,
        pa: ea.passed / ea.pulses,
        pb: eb.passed / eb.pulses,
        p: fisherExact(ea.passed, ea.pulses, eb.passed, eb.pulses),
      });
    }
  });
  const passAdj = holm(passRaw.map((r) => r.p));

  const flags: string[] = [];
  const pairs: ComparisonPair[] = pairIdx.map(([i, j], k) => {
    const A = runs[i].name;
    const B = runs[j].name;
    const delays = toTwoSample(delayTests[k], delayAdj.ks[k], delayAdj.mw[k]);
    const widths = toTwoSample(widthTests[k], widthAdj.ks[k], widthAdj.mw[k]);
    const passDifferences = passRaw
      .map((r, idx) => ({ r, pHolm: passAdj[idx] }))
      .filter(({ r }) => r.pair === k)
      .map(({ r, pHolm }) => ({
        duration: r.duration,
        passProbabilityA: r.pa,
        passProbabilityB: r.pb,
        difference: r.pa - r.pb,
        pValue: r.p,
        pHolm,
        withinNoise: !(pHolm < ALPHA),
      }));
    const pairFlags: string[] = [];
    const describeTwo = (what: string, t: TwoSample, laterWord: string) => {
      if (t.withinNoise === null) {
        pairFlags.push(`${what} of ${A} and ${B} cannot be compared: one of them has none.`);
      } else if (t.withinNoise) {
        pairFlags.push(
          `${what} of ${A} and ${B} differ by no more than noise (Kolmogorov-Smirnov p ${fmtP(t.ks!.pHolm)}, Mann-Whitney p ${fmtP(t.mannWhitney!.pHolm)}, Holm-adjusted).`,
        );
      } else {
        const r = t.mannWhitney!.rankBiserial;
        const who = r > 0 ? A : B;
        pairFlags.push(
          `${what} differ beyond noise: ${who} tends to be ${laterWord} (rank-biserial r = ${fmt(r, 2)}; Kolmogorov-Smirnov D = ${fmt(t.ks!.d, 2)}, p ${fmtP(t.ks!.pHolm)}; Mann-Whitney p ${fmtP(t.mannWhitney!.pHolm)}, Holm-adjusted).`,
        );
      }
    };
    describeTwo("Response delays", delays, "later (no response counts as latest)");
    describeTwo("Output pulse widths", widths, "wider");
    const beyond = passDifferences.filter((d) => !d.withinNoise);
    if (passDifferences.length === 0) {
      pairFlags.push(`${A} and ${B} share no input pulse duration: pass probabilities cannot be compared.`);
    } else if (beyond.length === 0) {
      pairFlags.push(
        `Pass probabilities of ${A} and ${B} agree within noise at every shared duration (Fisher's exact test, Holm-adjusted).`,
      );
    } else {
      for (const d of beyond) {
        pairFlags.push(
          `At ${fmt(d.duration)} min ${A} passes ${fmt(d.passProbabilityA * 100, 3)}% and ${B} ${fmt(d.passProbabilityB * 100, 3)}% of pulses: a difference beyond noise (Fisher p ${fmtP(d.pHolm)}, Holm-adjusted).`,
        );
      }
    }
    const ca = runs[i].summary.d50Ci;
    const cb = runs[j].summary.d50Ci;
    if (ca && cb) {
      const overlap = ca[0] <= cb[1] && cb[0] <= ca[1];
      pairFlags.push(
        overlap
          ? `The d50 intervals of ${A} and ${B} overlap: their d50 may not differ.`
          : `The d50 intervals of ${A} (${fmt(ca[0])}-${fmt(ca[1])} min) and ${B} (${fmt(cb[0])}-${fmt(cb[1])} min) do not overlap.`,
      );
    }
    flags.push(...pairFlags);
    return { a: runs[i].id, b: runs[j].id, delays, widths, passDifferences, flags: pairFlags };
  });

  const method =
    "Response delays and output pulse widths are compared pair by pair with the two-sample Kolmogorov-Smirnov test " +
    "(asymptotic p-value) and the Mann-Whitney U test (normal approximation with tie and continuity correction, " +
    "rank-biserial effect size); a pulse with no response counts as later than every observed delay. Pass " +
    "probabilities are compared at each shared duration with Fisher's exact test. p-values are Holm-adjusted across " +
    "the pairs compared, separately for each test and quantity (pass tests across all pairs and durations together). " +
    "A difference is within noise when the adjusted p-values are 0.05 or more.";

  return {
    runs: headlineRuns,
    durations,
    filterCurves,
    distributions,
    pairs,
    flags,
    settingsWarnings: settingsWarnings(runs),
    method,
  };
}
