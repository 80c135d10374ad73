/**
 * Reproducible random streams: Baagoe's Alea generator as shipped in the
 * seedrandom package (seedrandom.alea), seeded by seedrandom's own Mash hash.
 * The state is held as four numbers so the per-circuit inner loop can step the
 * same generator inline (same sequence as seedrandom.alea(seed)()).
 *
 * Replicate streams: replicate i of a run with seed S uses
 * seedrandom.alea(`${S}/${i}`), never the worker or chunk that ran it, so results
 * do not depend on how replicates are split across threads (docs/engine.md).
 *
 * Example: `const s = new AleaStream("run-1/0"); s.next(); // in [0, 1)`
 */
import seedrandom from "seedrandom";

interface AleaState {
  c: number;
  s0: number;
  s1: number;
  s2: number;
}

export class AleaStream {
  s0: number;
  s1: number;
  s2: number;
  c: number;

  constructor(seed: string) {
    const prng = seedrandom.alea(seed, { state: true }) as unknown as { state(): AleaState };
    const st = prng.state();
    this.s0 = st.s0;
    this.s1 = st.s1;
    this.s2 = st.s2;
    this.c = st.c;
  }

  /** Uniform on [0, 1) with 32-bit resolution (seedrandom's alea `quick`). */
  next(): number {
    const t = 2091639 * this.s0 + this.c * 2.3283064365386963e-10;
    this.s0 = this.s1;
    this.s1 = this.s2;
    this.c = t | 0;
    this.s2 = t - this.c;
    return this.s2;
  }

  /** Uniform on (0, 1]: for logarithms. */
  nextOpenZero(): number {
    return 1 - this.next();
  }

  /** Copies the state into a Float64Array [s0, s1, s2, c] (for the inner loop). */
  saveTo(out: Float64Array): void {
    out[0] = this.s0;
    out[1] = this.s1;
    out[2] = this.s2;
    out[3] = this.c;
  }

  /** Restores the state from a Float64Array written by saveTo or the inner loop. */
  loadFrom(src: Float64Array): void {
    this.s0 = src[0];
    this.s1 = src[1];
    this.s2 = src[2];
    this.c = src[3];
  }
}

/** The seed string of replicate `replicateIndex` of a run seeded `runSeed`. */
export function replicateSeed(runSeed: string, replicateIndex: number): string {
  return `${runSeed}/${replicateIndex}`;
}

/** Any source of uniforms on [0, 1). */
export type UniformSource = () => number;
