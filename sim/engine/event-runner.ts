/**
 * Carries out a model's events (sim/circuit/compile-events.ts) on a state
 * vector, for the direct-method kernel, tau-leaping and the ODE alike.
 *
 * fire(t, stop): the scheduled events of clock stop `stop` (none for -1) in the
 * circuit's order, then every species condition that rose (false -> true)
 * since it was last evaluated, in the circuit's order, repeated until no
 * condition rises (at most 1,000 firings at one instant). Each event's values
 * are computed from the state just before its own assignments. Species
 * amounts assigned by an event are rounded to whole counts for the stochastic
 * engines (round = true) and kept as they are for the ODE; a negative or
 * non-finite amount, or a non-finite parameter value, throws with the event,
 * target, value and time. Parameter assignments re-derive the fields that
 * follow parameters and K^n; assignment rules are re-applied after each event.
 *
 * With enabled = false (a burn-in) nothing fires but the condition states
 * follow the state, so an event fires only on a rise after the run starts.
 */
import { applyRules, deriveParams, treeFn, type CompiledModel, type TreeFn } from "@/sim/circuit/compile-model";

const MAX_FIRINGS = 1000;

export class EventRunner {
  /** Last value of each event's species condition (1 true, 0 false), by event index. */
  readonly trig: Uint8Array;
  enabled = true;
  private readonly conds: (TreeFn | null)[];
  private readonly values: TreeFn[][];
  private readonly buf: number[] = [];

  constructor(
    private readonly model: CompiledModel,
    private readonly x: Float64Array,
    private readonly p: Float64Array,
    private readonly sig: Float64Array,
    private readonly round: boolean,
  ) {
    this.trig = new Uint8Array(model.events.length);
    this.conds = model.events.map((e) => (e.condition ? treeFn(model, e.condition) : null));
    this.values = model.events.map((e) => e.assigns.map((a) => treeFn(model, a.value)));
  }

  /** Sets every condition state from the current state, without firing. */
  init(): void {
    for (const k of this.model.speciesTriggers) this.trig[k] = this.conds[k]!(this.x, this.sig, this.p, 0) ? 1 : 0;
  }

  /** Whether some species condition differs from its last state. */
  changed(): boolean {
    for (const k of this.model.speciesTriggers)
      if ((this.conds[k]!(this.x, this.sig, this.p, 0) ? 1 : 0) !== this.trig[k]) return true;
    return false;
  }

  /** Whether some species condition rose (false -> true) since it was last evaluated. */
  rose(): boolean {
    for (const k of this.model.speciesTriggers)
      if (this.trig[k] === 0 && this.conds[k]!(this.x, this.sig, this.p, 0)) return true;
    return false;
  }

  /** Fires the events due at time t; returns the number of firings. */
  fire(t: number, stop: number): number {
    const { model } = this;
    const queue: number[] = stop >= 0 && this.enabled ? [...model.stopEvents[stop]] : [];
    let fired = 0;
    for (;;) {
      for (const i of queue) {
        this.apply(i, t);
        if (++fired > MAX_FIRINGS)
          throw new Error(
            `events fired more than ${MAX_FIRINGS} times at t = ${t} min (last "${model.events[i].name}"): their conditions keep re-arming each other`,
          );
      }
      queue.length = 0;
      for (const k of model.speciesTriggers) {
        const c = this.conds[k]!(this.x, this.sig, this.p, 0) ? 1 : 0;
        if (c === 1 && this.trig[k] === 0 && this.enabled) queue.push(k);
        this.trig[k] = c;
      }
      if (queue.length === 0) return fired;
    }
  }

  private apply(i: number, t: number): void {
    const e = this.model.events[i];
    const fns = this.values[i];
    const vals = this.buf;
    vals.length = 0;
    for (const f of fns) vals.push(f(this.x, this.sig, this.p, 0));
    let params = false;
    e.assigns.forEach((a, k) => {
      let v = vals[k];
      if (a.target === "species") {
        if (this.round) v = Math.round(v);
        if (!(v >= 0 && v < Infinity))
          throw new Error(
            `event "${e.name}" at t = ${t} min: ${this.model.speciesNames[a.index]} would be ${vals[k]}; a species amount must be a finite number, not negative`,
          );
        this.x[a.index] = v;
      } else {
        if (!Number.isFinite(v))
          throw new Error(
            `event "${e.name}" at t = ${t} min: parameter ${this.model.parameterNames[this.model.parameterSlots.indexOf(a.index)]} would be ${v}; a parameter must be finite`,
          );
        this.p[a.index] = v;
        params = true;
      }
    });
    if (params) deriveParams(this.model, this.p);
    if (this.model.rules.length > 0) applyRules(this.model, this.x, this.p, this.sig, this.round);
  }
}
