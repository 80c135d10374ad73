/**
 * Builds the web app into dist/ with `expo export --platform web` when dist/
 * is missing or stale. Stale = the hash of app/, components/, shared/,
 * app.json and package-lock.json differs from dist/.build-hash.
 *
 *   tsx scripts/build-web.ts           build if stale
 *   tsx scripts/build-web.ts --force   always build
 *
 * ensureWebBuild() is exported for scripts/start.ts and the test runner.
 */
import { createHash } from "node:crypto";
import { spawn } from "node:child_process";
import {
  copyFileSync,
  existsSync,
  mkdirSync,
  readFileSync,
  readdirSync,
  rmSync,
  statSync,
  writeFileSync,
} from "node:fs";
import path from "node:path";

const ROOT = path.resolve(__dirname, "..");
const DIST = path.join(ROOT, "dist");
const HASH_FILE = path.join(DIST, ".build-hash");
const INPUTS = ["app", "components", "shared", "public", "assets", "app.json", "package-lock.json"];

function hashInputs(): string {
  const h = createHash("sha256");
  const walk = (abs: string) => {
    if (!existsSync(abs)) return;
    const st = statSync(abs);
    const rel = path.relative(ROOT, abs);
    if (st.isDirectory()) {
      for (const name of readdirSync(abs).sort()) {
        if (name === "node_modules" || name.startsWith(".")) continue;
        walk(path.join(abs, name));
      }
    } else if (!rel.endsWith("canvaskit.wasm")) {
      h.update(rel + "\0");
      h.update(readFileSync(abs));
      h.update("\0");
    }
  };
  for (const p of INPUTS) walk(path.join(ROOT, p));
  return h.digest("hex");
}

/** Copies Skia's canvaskit.wasm into public/ so the export ships it (the chart engine on the web). */
function copyCanvaskit(): void {
  const src = path.join(ROOT, "node_modules", "canvaskit-wasm", "bin", "full", "canvaskit.wasm");
  const dest = path.join(ROOT, "public", "canvaskit.wasm");
  mkdirSync(path.dirname(dest), { recursive: true });
  if (!existsSync(src)) throw new Error(`canvaskit.wasm not found at ${src}; is @shopify/react-native-skia installed?`);
  if (!existsSync(dest) || statSync(dest).size !== statSync(src).size) copyFileSync(src, dest);
}

export function isWebBuildFresh(): boolean {
  if (!existsSync(path.join(DIST, "index.html")) || !existsSync(HASH_FILE)) return false;
  return readFileSync(HASH_FILE, "utf8").trim() === hashInputs();
}

function run(cmd: string, args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, args, {
      cwd: ROOT,
      stdio: ["ignore", "inherit", "inherit"],
      env: { ...process.env, EXPO_NO_TELEMETRY: "1", EXPO_OFFLINE: "1", CI: "1", NODE_ENV: "production" },
    });
    child.on("error", reject);
    child.on("exit", (code) =>
      code === 0 ? resolve() : reject(new Error(`${cmd} ${args.join(" ")} exited with ${code}`)),
    );
  });
}

/** Builds dist/ if it is missing or stale (or always with force). Resolves with whether it built. */
export async function ensureWebBuild(
  opts: { force?: boolean; quiet?: boolean } = {},
): Promise<{ built: boolean; dist: string }> {
  if (!opts.force && isWebBuildFresh()) {
    if (!opts.quiet) console.log("web build: dist/ is up to date");
    return { built: false, dist: DIST };
  }
  copyCanvaskit();
  const hash = hashInputs();
  if (!opts.quiet) console.log("web build: exporting with expo (about 40 s cold)…");
  // Start from an empty dist/ so no chunk of an older build is left behind.
  rmSync(DIST, { recursive: true, force: true });
  const expoBin = path.join(ROOT, "node_modules", ".bin", "expo");
  await run(expoBin, ["export", "--platform", "web", "--output-dir", "dist", "--clear"]);
  writeFileSync(HASH_FILE, hash + "\n");
  return { built: true, dist: DIST };
}

if (require.main === module) {
  ensureWebBuild({ force: process.argv.includes("--force") }).then(
    (r) => console.log(r.built ? `web build: wrote ${path.relative(ROOT, r.dist)}/` : "web build: nothing to do"),
    (e) => {
      console.error(e instanceof Error ? e.message : e);
      process.exit(1);
    },
  );
}
