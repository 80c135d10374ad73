/**
 * APPROXIMATE tau-leaping with the step selection of Cao, Gillespie & Petzold
 * 2006, J Chem Phys 124:044109 (eps = 0.03, critical reactions: fewer than
 * n_c = 10 firings left before a reactant runs out; when the leap would be
 * shorter than 10/a0, 100 exact direct-method steps are taken instead). Off by
 * default; results are labelled "tauLeap" wherever they appear.
 *
 * Linger adds one bound to the CGP selection: the expected gross consumption of
 * each species in a leap (not only the net change) stays below the same
 * max(eps x_i / g_i, 1); near equilibrium the net drift vanishes and CGP alone
 * allows leaps of several lifetimes, which inflates the variance (explicit-Euler
 * instability); see docs/engine.md.
 *
 * Differences from the exact kernel: the state is constant within a leap, so
 * grid points and crossings inside a leap are placed at the leap's start/end;
 * leaps stop exactly at switch times and at the clock stops of time-dependent
 * expression rates and scheduled events (species conditions of events are
 * checked after every step or leap, so approximately); `events` counts reaction firings (sum of the Poisson
 * counts). An expression rate that is negative or not finite throws
 * (reactionRate), as does an exact step of an expression reaction that would
 * make a count negative.
 */
import { applyRules, reactionRate, type CompiledModel } from "@/sim/circuit/compile-model";
import type { KernelContext } from "./generate-kernel";
import { AleaStream } from "@/sim/random/alea-stream";
import { samplePoisson } from "@/sim/random/poisson";

/** Step control of the leap selection, exported so labels (sim/analysis/method-label.ts) state what ran. */
export const TAU_LEAP_STEP_CONTROL = {
  epsilon: 0.03,
  criticalFirings: 10,
  exactStepsWhenShort: 100,
  shortLeapFactor: 10,
} as const;
const EPS = TAU_LEAP_STEP_CONTROL.epsilon;
const N_CRITICAL = TAU_LEAP_STEP_CONTROL.criticalFirings;
const SSA_STEPS = TAU_LEAP_STEP_CONTROL.exactStepsWhenShort;

export function tauLeapRun(
  model: CompiledModel,
  x: Float64Array,
  p: Float64Array,
  sig: Float64Array,
  rs: Float64Array,
  ctx: KernelContext,
  inputSignal: number,
): void {
  const stream = new AleaStream("-");
  stream.loadFrom(rs);
  const u = () => stream.next();
  const nS = model.nSpecies;
  const nR = model.nReactions;
  const R = model.reactions;
  const a = new Float64Array(nR);
  const k = new Float64Array(nR);
  const critical = new Uint8Array(nR);
  const xNew = new Float64Array(nS);
  const mu = new Float64Array(nS);
  const s2 = new Float64Array(nS);
  const cons = new Float64Array(nS);
  const gOrder = new Float64Array(nS); // highest reactant order per species (2.5 marks 2A)
  for (const r of R)
    for (const e of r.reactants) {
      const ord = e.count === 2 ? 2.5 : r.order;
      if (ord > gOrder[e.species]) gOrder[e.species] = ord;
    }
  const out = model.outputIndex;
  const gt = ctx.gridTimes;
  const ng = gt.length;
  const gb = ctx.gridBuf;
  let t = ctx.t;
  let ev = ctx.events;
  let status = 0;
  let ssaLeft = 0;
  let iterations = 0;
  const xs = ctx.stopTimes;
  let xi = 0;
  while (xi < xs.length && xs[xi] <= t) xi++;
  let tq = ctx.stopProbe[xi];
  const writeGrid = (limit: number, inclusive: boolean) => {
    while (ctx.gridIndex < ng && (inclusive ? gt[ctx.gridIndex] <= limit : gt[ctx.gridIndex] < limit)) {
      for (let i = 0; i < nS; i++) gb![i * ng + ctx.gridIndex] = x[i];
      ctx.gridIndex++;
    }
  };
  const apply = (j: number, times: number) => {
    for (const d of R[j].delta) x[d.species] += d.change * times;
  };
  for (;;) {
    let a0 = 0;
    for (let j = 0; j < nR; j++) {
      a[j] = reactionRate(model, p, x, sig, j, false, tq);
      if (a[j] < 0) a[j] = 0;
      a0 += a[j];
    }
    const tSw = ctx.switchIndex < ctx.switchTimes.length ? ctx.switchTimes[ctx.switchIndex] : Infinity;
    const tX = xi < xs.length ? xs[xi] : Infinity;
    const tStop = Math.min(tSw, ctx.tEnd, tX);
    const atClockStop = () => {
      if (tX < tSw && tX <= ctx.tEnd && t >= tX) {
        xi++;
        tq = ctx.stopProbe[xi];
        if (ctx.onEvents !== null && ctx.stopFire[xi - 1] === 1) {
          const before = x[out];
          ctx.onEvents(t, xi - 1);
          if (ctx.tracker && x[out] !== before) ctx.tracker.push(t, x[out]);
        }
        return true;
      }
      return false;
    };
    let tau: number;
    let mode: "ssa" | "leap";
    // step selection
    let tau1 = Infinity;
    let a0c = 0;
    if (ssaLeft > 0) mode = "ssa";
    else {
      for (let j = 0; j < nR; j++) {
        let L = Infinity;
        for (const d of R[j].delta) if (d.change < 0) L = Math.min(L, Math.floor(x[d.species] / -d.change));
        critical[j] = a[j] > 0 && L < N_CRITICAL ? 1 : 0;
        if (critical[j]) a0c += a[j];
      }
      mu.fill(0);
      s2.fill(0);
      cons.fill(0);
      for (let j = 0; j < nR; j++) {
        if (critical[j]) continue;
        for (const d of R[j].delta) {
          mu[d.species] += d.change * a[j];
          s2[d.species] += d.change * d.change * a[j];
          if (d.change < 0) cons[d.species] -= d.change * a[j];
        }
      }
      for (let i = 0; i < nS; i++) {
        if (gOrder[i] === 0 || (mu[i] === 0 && s2[i] === 0)) continue;
        const g = gOrder[i] === 2.5 ? 2 + 1 / Math.max(1, x[i] - 1) : gOrder[i];
        const bound = Math.max((EPS * x[i]) / g, 1);
        tau1 = Math.min(tau1, bound / Math.abs(mu[i]), (bound * bound) / s2[i], bound / cons[i]);
      }
      if (a0 > 0 && tau1 < TAU_LEAP_STEP_CONTROL.shortLeapFactor / a0) {
        ssaLeft = SSA_STEPS;
        mode = "ssa";
      } else mode = "leap";
    }
    if (mode === "ssa") {
      ssaLeft--;
      tau = a0 > 0 ? -Math.log(1 - u()) / a0 : Infinity;
      if (t + tau >= tStop) {
        ssaLeft = 0;
        if (tX < tSw && tX <= ctx.tEnd) {
          writeGrid(tX, false);
          t = tX;
          atClockStop();
          continue;
        }
        if (tSw < ctx.tEnd) {
          writeGrid(tSw, false);
          t = tSw;
          if (inputSignal >= 0) sig[inputSignal] = ctx.switchLevels[ctx.switchIndex];
          ctx.switchIndex++;
          continue;
        }
        writeGrid(ctx.tEnd, true);
        t = ctx.tEnd;
        break;
      }
      writeGrid(t + tau, false);
      t += tau;
      const r = u() * a0;
      let cum = 0;
      let j = -1;
      for (let q = 0; q < nR; q++) {
        cum += a[q];
        if (r < cum) {
          j = q;
          break;
        }
      }
      if (j < 0)
        for (let q = nR - 1; q >= 0; q--)
          if (a[q] > 0) {
            j = q;
            break;
          }
      const before = x[out];
      apply(j, 1);
      if (R[j].expr !== null)
        for (const d of R[j].delta)
          if (x[d.species] < 0)
            throw new Error(
              `reaction "${R[j].name}" fired with too few molecules of "${model.speciesNames[d.species]}" at t = ${t} min (the count would go negative): its expression must be 0 when a reactant runs out`,
            );
      if (ctx.recorder) ctx.recorder.push(t, j);
      if (model.rules.length > 0) applyRules(model, x, p, sig, true);
      if (ctx.onEvents !== null) ctx.onEvents(t, -1);
      if (ctx.tracker && x[out] !== before) ctx.tracker.push(t, x[out]);
      ev++;
    } else {
      const tau2 = a0c > 0 ? -Math.log(1 - u()) / a0c : Infinity;
      let leap = tau1;
      let fired = false;
      for (;;) {
        tau = Math.min(leap, tau2);
        const clipped = t + tau >= tStop;
        if (clipped) tau = tStop - t;
        xNew.set(x);
        let n = 0;
        for (let j = 0; j < nR; j++) {
          k[j] = critical[j] ? 0 : samplePoisson(u, a[j] * tau);
          n += k[j];
        }
        if (!clipped && tau2 <= leap && a0c > 0) {
          const r = u() * a0c;
          let cum = 0;
          for (let j = 0; j < nR; j++)
            if (critical[j]) {
              cum += a[j];
              if (r < cum) {
                k[j] = 1;
                n++;
                break;
              }
            }
        }
        let negative = false;
        for (let j = 0; j < nR; j++) if (k[j] > 0) for (const d of R[j].delta) xNew[d.species] += d.change * k[j];
        for (let i = 0; i < nS; i++) if (xNew[i] < 0) negative = true;
        if (negative) {
          leap /= 2;
          continue;
        }
        writeGrid(t + tau, false);
        t += tau;
        const before = x[out];
        x.set(xNew);
        if (model.rules.length > 0) applyRules(model, x, p, sig, true);
        if (ctx.onEvents !== null) ctx.onEvents(t, -1);
        if (ctx.tracker && x[out] !== before) ctx.tracker.push(t, x[out]);
        ev += n;
        fired = true;
        if (clipped) {
          if (atClockStop()) {
            // clock stop of a time-dependent rate: rates are recomputed on the next pass
          } else if (tSw < ctx.tEnd && t >= tSw) {
            if (inputSignal >= 0) sig[inputSignal] = ctx.switchLevels[ctx.switchIndex];
            ctx.switchIndex++;
          } else if (t >= ctx.tEnd) {
            writeGrid(ctx.tEnd, true);
            status = -1;
          }
        }
        break;
      }
      if (status === -1) {
        status = 0;
        break;
      }
      if (!fired) continue;
    }
    if (ev >= ctx.eventCap) {
      status = 1;
      break;
    }
    if ((++iterations & 1023) === 0 && ctx.checkpoint !== null && ctx.checkpoint() === false) {
      status = 2;
      break;
    }
  }
  stream.saveTo(rs);
  ctx.t = t;
  ctx.events = ev;
  ctx.status = status;
}
