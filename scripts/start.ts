/**
 * npm start: build the web export when it is missing or stale, then run the
 * server (migrations and demo seeding happen at boot).
 */
import { existsSync } from "node:fs";
import { join, resolve } from "node:path";

async function main() {
  const root = resolve(__dirname, "..");
  const buildScript = join(root, "scripts", "build-web.ts");
  if (existsSync(buildScript)) {
    const mod = await import(buildScript);
    await mod.ensureWebBuild();
  }
  await import(join(root, "server", "index.ts"));
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
