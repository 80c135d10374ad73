/**
 * A queue of asynchronous tasks, each owned by a key (a lab), started at most
 * `concurrency` at a time and round-robin across keys: the next task comes
 * from the key after the one served last, so one lab's backlog never sits in
 * front of another lab's single task (the run queue does the same for
 * simulation chunks). Within a key, tasks start in submission order.
 *
 * Example:
 *   const q = createFairQueue((t: Task) => pool.run(t), { concurrency: 1 });
 *   await q.submit(labId, task);
 */
export interface FairQueue<T, R> {
  submit(key: string, task: T): Promise<R>;
  /** Tasks waiting (not started) for a key, or for all keys. */
  waiting(key?: string): number;
  running(): number;
}

export function createFairQueue<T, R>(
  start: (task: T) => Promise<R>,
  opts: { concurrency: number; onStart?: (key: string, task: T) => void },
): FairQueue<T, R> {
  const queues = new Map<string, { task: T; resolve: (r: R) => void; reject: (e: unknown) => void }[]>();
  /**
   * Every key seen, in round-robin order (a key stays after its queue empties, so a
   * lab served last is not first again when it submits once more); `next` is where
   * the search for the next key with waiting tasks starts.
   */
  let ring: string[] = [];
  let next = 0;
  let active = 0;

  function pickKey(): string | null {
    for (let i = 0; i < ring.length; i++) {
      const k = (next + i) % ring.length;
      if (queues.has(ring[k])) {
        next = k + 1;
        return ring[k];
      }
    }
    return null;
  }

  function pump() {
    while (active < opts.concurrency) {
      const key = pickKey();
      if (key === null) return;
      const q = queues.get(key)!;
      const item = q.shift()!;
      if (q.length === 0) queues.delete(key);
      active++;
      opts.onStart?.(key, item.task);
      let p: Promise<R>;
      try {
        p = start(item.task);
      } catch (e) {
        p = Promise.reject(e);
      }
      p.then(item.resolve, item.reject).finally(() => {
        active--;
        pump();
      });
    }
  }

  function addKey(key: string) {
    if (ring.length >= 1000) {
      // forget idle keys now and then (a long-running server sees many labs)
      ring = ring.filter((k) => queues.has(k));
      next = 0;
    }
    ring.push(key);
  }

  return {
    submit(key, task) {
      return new Promise<R>((resolve, reject) => {
        let q = queues.get(key);
        if (!q) {
          q = [];
          queues.set(key, q);
          if (!ring.includes(key)) addKey(key);
        }
        q.push({ task, resolve, reject });
        pump();
      });
    },
    waiting(key) {
      if (key !== undefined) return queues.get(key)?.length ?? 0;
      let n = 0;
      for (const q of queues.values()) n += q.length;
      return n;
    },
    running: () => active,
  };
}
