/**
 * A deterministic-only regime map: the mean-field label (./classify-deterministic.ts)
 * at every point of a one- or two-parameter grid, without any stochastic
 * simulation, for a quick first look at where the behaviours lie (docs/regimes.md).
 * Points are numbered as sweeps number them: i * columns + j for two axes.
 *
 * Example: deterministicRegimeMap({ circuit: feedbackTemplates.ring.circuit,
 *   axes: [{ parameter: "rate(makeA)", values: [10, 100] }] }).labels // ["damped oscillation", "sustained oscillation"]
 */
import type { Circuit } from "@/shared/schemas/circuit";
import { compileModel } from "@/sim/circuit/compile-model";
import { setParameter } from "@/sim/circuit/parameters";
import { classifyDeterministic } from "./classify-deterministic";
import type { RegimeLabel, RegimeVerdict } from "./labels";

export interface MapAxis {
  parameter: string;
  values: number[];
}

export interface DeterministicMapInput {
  circuit: Circuit;
  systemSize?: number;
  axes: MapAxis[];
  thresholdMolecules?: number;
}

export interface DeterministicMap {
  /** One verdict per point, in point order. */
  verdicts: RegimeVerdict[];
  labels: RegimeLabel[];
  /** Parameter values of each point. */
  points: Record<string, number>[];
}

export function gridPoints(axes: MapAxis[]): Record<string, number>[] {
  if (axes.length < 1 || axes.length > 2) throw new Error("a map has one or two axes");
  const [a, b] = axes;
  const out: Record<string, number>[] = [];
  for (const x of a.values)
    if (!b) out.push({ [a.parameter]: x });
    else for (const y of b.values) out.push({ [a.parameter]: x, [b.parameter]: y });
  return out;
}

export function deterministicRegimeMap(input: DeterministicMapInput): DeterministicMap {
  const points = gridPoints(input.axes);
  const verdicts = points.map((p) => {
    let c = input.circuit;
    for (const [ref, v] of Object.entries(p)) c = setParameter(c, ref, v);
    try {
      return classifyDeterministic({
        model: compileModel(c, input.systemSize ?? 1),
        thresholdMolecules: input.thresholdMolecules,
      });
    } catch (e) {
      return { label: "unclear" as const, evidence: {}, reason: (e as Error).message };
    }
  });
  return { verdicts, labels: verdicts.map((v) => v.label), points };
}
