/** Source files (.ts, .tsx) below a folder, sorted, for tests that read the code itself. */
import { readdirSync, statSync } from "node:fs";
import { join } from "node:path";

export function sourceFiles(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir).sort()) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) sourceFiles(p, out);
    else if (/\.tsx?$/.test(name)) out.push(p);
  }
  return out;
}
