/**
 * Compiles an input program (shared/schemas/input-program.ts) into sorted,
 * non-overlapping pulses [on, off) and the switch times of the driven signal.
 *
 * - pulses: the explicit list; periodic: on/off from start, `count` pulses or
 *   until the end time; ladder: each duration `repeats` times, each pulse
 *   followed by the recovery gap; random: Poisson arrivals (exponential gaps of
 *   mean meanInterval between pulse starts, from start) with durations from the
 *   given distribution, plus extraPulses.
 * - Random programs use their own stream seedrandom.alea(program.seed) unless a
 *   uniform source is passed (the engine passes the replicate's stream when
 *   perReplicate is set).
 * - Pulses starting at or after the end time are dropped; a pulse may end after
 *   the end time (it is then censored by the tracker). Overlapping pulses are
 *   merged (level = the larger); touching pulses merge when their levels agree.
 * - durationBin: the exact duration for pulses, periodic and ladder programs;
 *   for random durations the centre of its DURATION_BIN_MINUTES-wide bin,
 *   (floor(d / w) + 0.5) * w.
 * - switchTimes/levels: the signal takes levels[i] from switchTimes[i] on;
 *   only times before the end time are listed.
 */
import {
  DURATION_BIN_MINUTES,
  PROGRAM_LIMITS,
  type DurationDistribution,
  type InputProgram,
} from "@/shared/schemas/input-program";
import { AleaStream, type UniformSource } from "@/sim/random/alea-stream";
import { sampleExponential, sampleGamma } from "@/sim/random/distributions";

export interface CompiledPulse {
  on: number;
  off: number;
  level: number;
  durationBin: number;
}

export interface CompiledProgram {
  pulses: CompiledPulse[];
  switchTimes: Float64Array;
  levels: Float64Array;
}

export interface SignalLevels {
  offLevel: number;
  onLevel: number;
}

interface RawPulse {
  on: number;
  off: number;
  level: number;
  binned: boolean;
  /** The duration as declared (exact); off - on can differ from it by round-off. */
  duration?: number;
}

function sampleDuration(u: UniformSource, d: DurationDistribution): number {
  if (d.dist === "exponential") return sampleExponential(u, d.mean);
  if (d.dist === "gamma") return sampleGamma(u, d.shape, d.mean / d.shape);
  return d.min + (d.max - d.min) * u();
}

export function compileProgram(
  /** Absent for a run without input pulses: no pulses, no switches. */
  program: InputProgram | undefined,
  endTimeMinutes: number,
  rng?: UniformSource,
  signal: SignalLevels = { offLevel: 0, onLevel: 1 },
): CompiledProgram {
  const raw: RawPulse[] = [];
  const end = endTimeMinutes;
  const lvl = (l: number | undefined) => l ?? signal.onLevel;
  if (program === undefined) return { pulses: [], switchTimes: new Float64Array(0), levels: new Float64Array(0) };
  switch (program.kind) {
    case "pulses":
      for (const p of program.pulses)
        raw.push({ on: p.start, off: p.start + p.duration, level: lvl(p.level), binned: false, duration: p.duration });
      break;
    case "periodic": {
      const max = program.count ?? PROGRAM_LIMITS.maxPulses;
      for (let i = 0; i < max; i++) {
        const on = program.start + i * (program.onDuration + program.offDuration);
        if (on >= end) break;
        raw.push({
          on,
          off: on + program.onDuration,
          level: lvl(program.level),
          binned: false,
          duration: program.onDuration,
        });
      }
      break;
    }
    case "ladder": {
      let t = program.start;
      outer: for (const d of program.durations)
        for (let k = 0; k < program.repeats; k++) {
          if (t >= end || raw.length >= PROGRAM_LIMITS.maxPulses) break outer;
          raw.push({ on: t, off: t + d, level: lvl(program.level), binned: false, duration: d });
          t += d + program.gap;
        }
      break;
    }
    case "random": {
      let u = rng;
      if (!u) {
        const s = new AleaStream(program.seed);
        u = () => s.next();
      }
      let t = program.start + sampleExponential(u, program.meanInterval);
      while (t < end && raw.length < PROGRAM_LIMITS.maxPulses) {
        const d = sampleDuration(u, program.durations);
        if (d > 0) raw.push({ on: t, off: t + d, level: lvl(program.level), binned: true });
        t += sampleExponential(u, program.meanInterval);
      }
      for (const p of program.extraPulses)
        raw.push({ on: p.start, off: p.start + p.duration, level: lvl(p.level), binned: false, duration: p.duration });
      break;
    }
  }
  raw.sort((a, b) => a.on - b.on || a.off - b.off);
  const merged: RawPulse[] = [];
  for (const p of raw) {
    if (p.on >= end) continue;
    const last = merged[merged.length - 1];
    if (last && (p.on < last.off || (p.on === last.off && p.level === last.level))) {
      last.off = Math.max(last.off, p.off);
      last.level = Math.max(last.level, p.level);
      last.binned = last.binned || p.binned;
      // a merged pulse has no declared duration: its own length counts
      last.duration = undefined;
    } else merged.push({ ...p });
  }
  const pulses: CompiledPulse[] = merged.slice(0, PROGRAM_LIMITS.maxPulses).map((p) => {
    const d = p.off - p.on;
    const w = DURATION_BIN_MINUTES;
    return {
      on: p.on,
      off: p.off,
      level: p.level,
      durationBin: p.binned ? (Math.floor(d / w) + 0.5) * w : (p.duration ?? d),
    };
  });
  const times: number[] = [];
  const levels: number[] = [];
  for (const p of pulses) {
    times.push(p.on);
    levels.push(p.level);
    if (p.off < end) {
      times.push(p.off);
      levels.push(signal.offLevel);
    }
  }
  return { pulses, switchTimes: Float64Array.from(times), levels: Float64Array.from(levels) };
}
