/**
 * The fast direct-method kernel (the default) against the reference kernel
 * (generate-kernel.ts, variant "reference": the kernel as it stood before the
 * speed work of issue 16). Same generator, same floating-point operations in
 * the same order, so every chunk result must be bit-identical for the same
 * seeds: checked over every rate kind (mass action incl. dimers, constant,
 * Hill AND/OR with leak and non-integer n, signal regulators, expressions with
 * clock stops), events (scheduled, triggered on the output, parameter
 * assignments), assignment rules, burn-in, extrinsic variation, the event cap,
 * recorded events, many seeds and chunk splits. The reference kernel's source
 * is frozen by digest, so the reference itself cannot drift.
 */
import { describe, test } from "node:test";
import { benchmark, digest, mixed } from "@/tests/helpers/kernel-cases";
import assert from "node:assert/strict";
import { createHash } from "node:crypto";
import { runSetup, simulateChunk, templates } from "@/sim";
import { generateKernel, kernelSource, KernelContext } from "@/sim/engine/generate-kernel";
import { EventRunner } from "@/sim/engine/event-runner";
import { resolveThreshold } from "@/sim/engine/resolve-threshold";
import { applyRules, deriveParams } from "@/sim/circuit/compile-model";
import { PulseTracker } from "@/sim/metrics/pulse-tracker";
import { AleaStream } from "@/sim/random/alea-stream";
import { RunSpecSchema, type RunSpec, type RunSpecInput } from "@/shared/schemas/run-spec";
import type { CircuitInput } from "@/shared/schemas/circuit";

const spec = (over: Partial<RunSpecInput>): RunSpec => RunSpecSchema.parse({ ...benchmark, ...over });

/** Expression rates with clock stops, a triggered event on the output, a scheduled parameter change and a rule. */
const vat: CircuitInput = {
  name: "vat",
  species: [
    { name: "X", initialCount: 0 },
    { name: "R", initialCount: 0 },
    { name: "twice", initialCount: 0 },
  ],
  signals: [{ name: "S", offLevel: 0, onLevel: 1 }],
  parameters: [
    { name: "k", value: 12 },
    { name: "g", value: 0.1 },
  ],
  reactions: [
    {
      name: "make",
      products: [{ species: "X" }],
      rate: { kind: "expression", formula: "piecewise(k, time >= 10 and time < 150, k / 4) * (0.2 + S)" },
    },
    { name: "deg", reactants: [{ species: "X" }], rate: { kind: "expression", formula: "g * X" } },
    {
      name: "report",
      products: [{ species: "R" }],
      rate: { kind: "expression", formula: "3 * X^2 / (400 + X^2)" },
    },
    { name: "degR", reactants: [{ species: "R" }], rate: { kind: "massAction", ratePerMinute: 0.05 } },
  ],
  rules: [{ target: "twice", value: "2 * R + 1" }],
  events: [
    { name: "harvest", when: "R >= 40", assign: [{ target: "R", value: "R - 15" }] },
    { name: "slow", at: [120], assign: [{ target: "g", value: "0.2" }] },
  ],
  outputSpecies: "R",
};

const periodic = { kind: "periodic" as const, start: 20, onDuration: 40, offDuration: 60 };

const cases: { name: string; spec: RunSpec; start: number; count: number }[] = [
  { name: "benchmark, seed bench-1", spec: spec({ replicates: 1000 }), start: 0, count: 8 },
  { name: "benchmark, seed fast-2, replicates 700-705", spec: spec({ seed: "fast-2" }), start: 700, count: 6 },
  {
    name: "benchmark, burn-in, extrinsic Hill n and rate, recorded events",
    spec: spec({
      seed: "fast-3",
      replicates: 4,
      start: "offSteadyState",
      burnInMinutes: 200,
      recordEventsFor: 2,
      extrinsic: [
        { parameter: "rate(makeZ)", cv: 0.3 },
        { parameter: "n(makeY,X)", cv: 0.2 },
      ],
    }),
    start: 0,
    count: 4,
  },
  ...(Object.keys(templates) as (keyof typeof templates)[]).map((k) => ({
    name: `template ${k}, burn-in, extrinsic rate`,
    spec: spec({
      circuit: templates[k].circuit,
      inputSignal: templates[k].inputSignal,
      program: periodic,
      endTimeMinutes: 600,
      gridStepMinutes: 2,
      replicates: 5,
      seed: `fast-${k}`,
      start: "offSteadyState",
      burnInMinutes: 100,
      extrinsic: [{ parameter: `rate(${templates[k].circuit.reactions[0].name})`, cv: 0.3 }],
    }),
    start: 0,
    count: 5,
  })),
  ...["m1", "m2", "m3"].map((seed) => ({
    name: `mixed, seed ${seed}, extrinsic n and rate, recorded events`,
    spec: spec({
      circuit: mixed,
      program: { kind: "periodic", start: 5, onDuration: 7, offDuration: 11 },
      endTimeMinutes: 300,
      gridStepMinutes: 0.5,
      replicates: 6,
      seed,
      recordEventsFor: 2,
      threshold: { value: 8, windowMinutes: 4 },
      extrinsic: [
        { parameter: "n(makeC,B)", cv: 0.2 },
        { parameter: "rate(bind)", cv: 0.4 },
      ],
    }),
    start: 0,
    count: 6,
  })),
  {
    name: "mixed, event cap",
    spec: spec({
      circuit: mixed,
      program: { kind: "periodic", start: 5, onDuration: 7, offDuration: 11 },
      endTimeMinutes: 200,
      gridStepMinutes: 1,
      replicates: 3,
      seed: "fast-cap",
      threshold: { value: 8, windowMinutes: 4 },
      eventCapPerReplicate: 1500,
    }),
    start: 0,
    count: 3,
  },
  ...["v1", "v2"].map((seed) => ({
    name: `expressions with clock stops, events, a rule; seed ${seed}`,
    spec: spec({
      circuit: vat,
      inputSignal: "S",
      program: periodic,
      endTimeMinutes: 400,
      gridStepMinutes: 1,
      replicates: 6,
      seed,
      recordEventsFor: 1,
      threshold: { value: 25, windowMinutes: 30 },
      extrinsic: [{ parameter: "param(k)", cv: 0.25 }],
    }),
    start: 0,
    count: 6,
  })),
  {
    name: "random program drawn per replicate",
    spec: spec({
      seed: "fast-random",
      replicates: 5,
      program: {
        kind: "random",
        start: 50,
        meanInterval: 200,
        durations: { dist: "uniform", min: 5, max: 60 },
        perReplicate: true,
      },
    }),
    start: 0,
    count: 5,
  },
];

describe("fast kernel: bit-identical to the reference kernel", () => {
  for (const c of cases)
    test(c.name, () => {
      const ref = simulateChunk(c.spec, c.start, c.count, { keepAllGrid: true, kernel: "reference" });
      const fast = simulateChunk(c.spec, c.start, c.count, { keepAllGrid: true, kernel: "fast" });
      assert.ok(ref.events > 0);
      assert.ok(ref.pulses.length > 0 || c.name.includes("cap"), "the case exercises the tracker");
      assert.equal(digest(fast), digest(ref));
      // and the default is the fast kernel
      assert.equal(digest(simulateChunk(c.spec, c.start, c.count, { keepAllGrid: true })), digest(fast));
    });

  test("chunk splits (any thread count) give the same replicates and pulse records", () => {
    const s = spec({ seed: "fast-split", replicates: 9 });
    const whole = simulateChunk(s, 0, 9);
    const parts = [simulateChunk(s, 0, 4), simulateChunk(s, 4, 2), simulateChunk(s, 6, 3)];
    assert.deepEqual(
      parts.flatMap((p) => p.replicates),
      whole.replicates,
    );
    assert.deepEqual(
      parts.flatMap((p) => p.pulses),
      whole.pulses,
    );
  });
});

describe("fast kernel with a tiny path block (a hand-over every 3 changes)", () => {
  /** One replicate through the kernel directly: grid values, final state, generator state and pulse records. */
  function oneReplicate(s: RunSpec, variant: "fast" | "reference", rep: number, pathBuf?: Float64Array) {
    const setup = runSetup(s);
    const m = setup.model;
    const kernel = generateKernel(m, { inputSignal: setup.inputSignal, variedSlots: new Set(), variant });
    const x = Float64Array.from(m.init);
    const p = Float64Array.from(m.baseParams);
    deriveParams(m, p);
    const sig = Float64Array.from(m.signalOff);
    if (m.rules.length > 0) applyRules(m, x, p, sig, true);
    const rs = new Float64Array(4);
    new AleaStream(`${s.seed}/${rep}`).saveTo(rs);
    const ctx = new KernelContext();
    if (pathBuf) ctx.pathBuf = pathBuf;
    const runner = m.events.length > 0 ? new EventRunner(m, x, p, sig, true) : null;
    if (runner) {
      ctx.trig = runner.trig;
      ctx.stopFire = m.stopFire;
      ctx.onEvents = (t, stop) => runner.fire(t, stop);
      runner.init();
    }
    const program = setup.sharedProgram!;
    const tracker = new PulseTracker(program.pulses, resolveThreshold(s), "step");
    tracker.reset(rep, 0, x[m.outputIndex]);
    Object.assign(ctx, {
      t: 0,
      tEnd: s.endTimeMinutes,
      switchTimes: program.switchTimes,
      switchLevels: program.levels,
      gridTimes: setup.grid,
      gridBuf: new Float64Array(m.nSpecies * setup.grid.length),
      tracker,
      eventCap: s.eventCapPerReplicate,
      stopTimes: m.clockStops,
      stopProbe: m.clockProbe,
    });
    kernel(x, p, sig, rs, ctx);
    return { x, rs, grid: ctx.gridBuf, events: ctx.events, status: ctx.status, pulses: tracker.finish(ctx.t) };
  }
  const tiny = [
    ["benchmark", spec({ seed: "tiny-1" })],
    [
      "expressions, events, a rule",
      spec({
        circuit: vat,
        program: periodic,
        endTimeMinutes: 400,
        seed: "tiny-2",
        threshold: { value: 25, windowMinutes: 30 },
      }),
    ],
  ] as const;
  for (const [name, s] of tiny)
    test(name, () => {
      for (const rep of [0, 1, 2]) {
        const want = oneReplicate(s, "reference", rep);
        assert.ok(want.pulses.length > 0 && want.events > 1000);
        assert.deepEqual(oneReplicate(s, "fast", rep, new Float64Array(7)), want);
        assert.deepEqual(oneReplicate(s, "fast", rep, new Float64Array(0)), want);
      }
    });
});

describe("reference kernel source", () => {
  /** sha256 of kernelSource(..., variant "reference"), computed from generate-kernel.ts before the fast kernel existed. */
  const FROZEN_SOURCE: Record<string, string> = {
    benchmark: "d120eba905070e392c6afd3acdf45484333f659006ac710f79cdb32b4f017979",
    mixed: "e6ea8a9e068a3eeaf4c5f4c3d600a1d00ab9f149d5770b987542373b79312cf6",
    vat: "8b186d121c8969ebc0710fa235778f6c9f92e683e15969b525654a76a587cf79",
    "benchmark, varied": "08cad1c19d1db439526623c866f6612292336e474eadeae39bc6d669c8183ee3",
  };
  const sources: Record<string, () => string> = {
    benchmark: () => {
      const s = runSetup(spec({}));
      return kernelSource(s.model, { inputSignal: s.inputSignal, variedSlots: new Set(), variant: "reference" });
    },
    mixed: () => {
      const s = runSetup(spec({ circuit: mixed, threshold: { value: 8, windowMinutes: 4 } }));
      return kernelSource(s.model, { inputSignal: s.inputSignal, variedSlots: new Set(), variant: "reference" });
    },
    vat: () => {
      const s = runSetup(spec({ circuit: vat, threshold: { value: 25, windowMinutes: 30 } }));
      return kernelSource(s.model, { inputSignal: s.inputSignal, variedSlots: new Set(), variant: "reference" });
    },
    "benchmark, varied": () => {
      const s = runSetup(spec({}));
      const varied = new Set([s.model.reactions[2].regulators[0].nSlot, s.model.reactions[4].rateSlot]);
      return kernelSource(s.model, { inputSignal: s.inputSignal, variedSlots: varied, variant: "reference" });
    },
  };
  for (const [name, src] of Object.entries(sources))
    test(`${name}: unchanged`, () => {
      assert.equal(createHash("sha256").update(src()).digest("hex"), FROZEN_SOURCE[name]);
    });
});

describe("PulseTracker.pushPath", () => {
  /** Random paths around theta with exact hits of theta, downTheta and boundary times, NaN gaps for linear paths. */
  function randomPath(seed: string, linear: boolean): Float64Array {
    const u = new AleaStream(seed);
    const out: number[] = [];
    let t = 0;
    let x = 0;
    for (let i = 0; i < 4000; i++) {
      const r = u.next();
      t += r < 0.05 ? 0 : r < 0.1 ? 5 - (t % 5) : u.next() * 1.2;
      // drawn towards 30 during every other pulse and its window, towards 5 otherwise
      const k = Math.floor((t - 40) / 150);
      const target = k >= 0 && k % 2 === 0 && t - 40 - 150 * k < 60 ? 30 : 5;
      x = Math.max(0, x + Math.round((target - x) * 0.2 + (u.next() - 0.5) * 6));
      const v = linear && u.next() < 0.02 ? NaN : u.next() < 0.004 ? 20 : u.next() < 0.004 ? 14 : x;
      out.push(t, v);
    }
    return Float64Array.from(out);
  }
  const pulses = Array.from({ length: 12 }, (_, i) => ({
    on: 40 + 150 * i,
    off: 40 + 150 * i + (i % 2 ? 60 : 5),
    durationBin: i % 2,
  }));
  const thr = { theta: 20, downTheta: 14, windowMinutes: 30 };
  for (const kind of ["step", "linear"] as const)
    for (const seed of ["p1", "p2", "p3", "p4"])
      test(`${kind} path ${seed}: the same records as push, for any block sizes`, () => {
        const path = randomPath(`${kind}-${seed}`, kind === "linear");
        const a = new PulseTracker(pulses, thr, kind);
        a.reset(0, 0, 3);
        for (let i = 0; i < path.length; i += 2) a.push(path[i], path[i + 1]);
        const want = a.finish(path[path.length - 2] + 1);
        assert.ok(want.some((s) => s.passed) && want.some((s) => !s.passed), "the path has passes and misses");
        const u = new AleaStream(`blocks-${seed}`);
        const b = new PulseTracker(pulses, thr, kind);
        b.reset(0, 0, 3);
        for (let i = 0; i < path.length;) {
          const n = 2 * (1 + Math.floor(u.next() * 300));
          const block = path.slice(i, Math.min(path.length, i + n));
          b.pushPath(block, block.length);
          i += n;
        }
        assert.deepEqual(b.finish(path[path.length - 2] + 1), want);
      });
});

describe("one compiled kernel per source (generate-kernel.ts)", () => {
  const withRates = (makeX: number, hill: number, over: Partial<RunSpecInput> = {}): RunSpec => {
    const circuit = structuredClone(benchmark.circuit) as any;
    circuit.reactions[0].rate.ratePerMinute = makeX;
    circuit.reactions[2].rate.regulators[0].hill = hill;
    return spec({ circuit, replicates: 40, ...over });
  };
  const kernelOf = (s: RunSpec) => {
    const setup = runSetup(s);
    return generateKernel(setup.model, { inputSignal: setup.inputSignal, variedSlots: new Set() });
  };

  test("the same circuit with other rates, seed or replicates shares one function; another Hill exponent does not", () => {
    const a = withRates(10, 2);
    const b = withRates(7, 2, { seed: "other-seed", replicates: 25 });
    const c = withRates(10, 3);
    assert.equal(kernelOf(a), kernelOf(b));
    assert.notEqual(kernelOf(a), kernelOf(c), "an integer Hill exponent is written into the source");
  });

  test("a shared kernel gives each run its own results (against the reference kernel, compiled apart)", () => {
    const a = withRates(10, 2);
    const b = withRates(7, 2, { seed: "other-seed" });
    simulateChunk(a, 0, 20); // runs (and lets V8 optimise) the shared kernel with a's parameters first
    const fast = simulateChunk(b, 0, 20);
    const reference = simulateChunk(b, 0, 20, { kernel: "reference" });
    assert.ok(fast.events > 0 && fast.pulses.length > 0);
    assert.deepEqual(fast, reference);
    assert.notDeepEqual(fast.gridSum, simulateChunk(a, 0, 20).gridSum, "the two rate sets give different runs");
  });
});
