/**
 * Which chunk goes out next: the run queue's feeding rule, shared by the
 * embedded pool and the Redis queue (where it is what keeps labs fair across
 * machines, BullMQ's open-source package having no per-group fairness).
 *
 * Rule: among labs with chunks waiting, the lab with the fewest chunks out (in
 * flight on a thread, or queued in Redis) goes first; ties go round-robin after
 * the lab served last. Inside a lab, round-robin over participants (a run, or a
 * whole sweep), a sweep's points in order.
 *
 * Bound: with a window of W chunks and L labs with work waiting, every freed
 * slot goes to a lab holding the fewest, so once the chunks that were out when
 * the last lab arrived have come back (one window turnover), no lab holds more
 * than ceil(W / L) of the window while another lab waits.
 */
export interface FeedRun {
  id: string;
  labId: string;
  /** Round-robin participant inside the lab: the sweep id, or the run id. */
  group: string;
  /** Order inside the group (a sweep's point index). */
  order: number;
  pending: number[];
  inFlight: number;
  stopped: boolean;
}

export interface FeedState {
  lastLab: string;
  lastGroupByLab: Map<string, string>;
}

export const newFeedState = (): FeedState => ({ lastLab: "", lastGroupByLab: new Map() });

/** Takes the next chunk (removing it from the run's pending list), or null when nothing waits. */
export function pickNextChunk<R extends FeedRun>(
  runs: Iterable<R>,
  state: FeedState,
): { run: R; chunkIndex: number } | null {
  // lab -> group -> runs, in first-seen order
  const labs = new Map<string, Map<string, R[]>>();
  const held = new Map<string, number>();
  for (const r of runs) {
    held.set(r.labId, (held.get(r.labId) ?? 0) + r.inFlight);
    if (r.stopped || r.pending.length === 0) continue;
    let groups = labs.get(r.labId);
    if (!groups) labs.set(r.labId, (groups = new Map()));
    const g = groups.get(r.group) ?? [];
    g.push(r);
    groups.set(r.group, g);
  }
  if (labs.size === 0) return null;
  const labKeys = [...labs.keys()];
  const fewest = Math.min(...labKeys.map((l) => held.get(l) ?? 0));
  const after = labKeys.indexOf(state.lastLab);
  let lab = labKeys[0];
  for (let i = 1; i <= labKeys.length; i++) {
    const k = labKeys[(after + i + labKeys.length) % labKeys.length];
    if ((held.get(k) ?? 0) === fewest) {
      lab = k;
      break;
    }
  }
  state.lastLab = lab;
  const groups = labs.get(lab)!;
  const groupKeys = [...groups.keys()];
  const start = groupKeys.indexOf(state.lastGroupByLab.get(lab) ?? "");
  const key = groupKeys[(start + 1) % groupKeys.length];
  state.lastGroupByLab.set(lab, key);
  const run = groups.get(key)!.sort((a, b) => a.order - b.order)[0];
  return { run, chunkIndex: run.pending.shift()! };
}
