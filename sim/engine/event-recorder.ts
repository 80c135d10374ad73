/**
 * Full event recording for the first few replicates: the time and reaction
 * index of every firing, in growable typed arrays (amortised doubling, no
 * allocation per event), truncated after maxEvents.
 */
export class EventRecorder {
  times: Float64Array;
  reactions: Int32Array;
  count = 0;
  truncated = false;

  constructor(
    readonly maxEvents = 1_000_000,
    initialCapacity = 4096,
  ) {
    this.times = new Float64Array(initialCapacity);
    this.reactions = new Int32Array(initialCapacity);
  }

  push(t: number, reaction: number): void {
    const n = this.count;
    if (n >= this.times.length) {
      if (n >= this.maxEvents) {
        this.truncated = true;
        return;
      }
      const cap = Math.min(this.maxEvents, this.times.length * 2);
      const nt = new Float64Array(cap);
      nt.set(this.times);
      const nr = new Int32Array(cap);
      nr.set(this.reactions);
      this.times = nt;
      this.reactions = nr;
    }
    this.times[n] = t;
    this.reactions[n] = reaction;
    this.count = n + 1;
  }

  /** Trimmed copies of the recorded arrays. */
  snapshot(): { times: Float64Array; reactions: Int32Array; truncated: boolean } {
    return {
      times: this.times.slice(0, this.count),
      reactions: this.reactions.slice(0, this.count),
      truncated: this.truncated,
    };
  }
}
