/**
 * Wilson score interval for a binomial proportion, without continuity
 * correction (Wilson 1927, J Am Stat Assoc 22:209).
 *
 *   centre = (p + z^2/(2n)) / (1 + z^2/n)
 *   half   = z sqrt(p(1-p)/n + z^2/(4n^2)) / (1 + z^2/n)
 *
 * Stays inside [0, 1] and behaves well at 0 and n successes, unlike the Wald
 * interval. With n = 0 it returns the uninformative [0, 1].
 *
 * @example wilson(50, 100) // [0.4038, 0.5962]
 */
import { Z_95 } from "./normal-distribution";

export function wilson(successes: number, trials: number, z: number = Z_95): [number, number] {
  if (!Number.isInteger(successes) || !Number.isInteger(trials) || successes < 0 || trials < 0 || successes > trials) {
    throw new RangeError(`wilson: need whole numbers 0 <= successes <= trials (got ${successes} of ${trials})`);
  }
  if (trials === 0) return [0, 1];
  const n = trials;
  const p = successes / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const centre = (p + z2 / (2 * n)) / denom;
  const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
  // exact ends at 0 and n successes (avoids -1e-17 from round-off)
  const lo = successes === 0 ? 0 : Math.max(0, centre - half);
  const hi = successes === n ? 1 : Math.min(1, centre + half);
  return [lo, hi];
}
