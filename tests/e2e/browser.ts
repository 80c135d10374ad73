/**
 * Headless Chromium for browser tests: Debian's /usr/bin/chromium driven by
 * playwright-core, a fresh profile per launch, screenshots under
 * test-results/screenshots/ (git-ignored).
 */
import assert from "node:assert/strict";
import { mkdirSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";

const ROOT = resolve(__dirname, "..", "..");
export const SCREENSHOT_DIR = join(ROOT, "test-results", "screenshots");

export const PHONE = { name: "phone", width: 390, height: 844 } as const;
export const WIDE = { name: "wide", width: 1280, height: 800 } as const;
export type Viewport = typeof PHONE | typeof WIDE;

export const CHROMIUM_FLAGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export type BrowserSession = { context: BrowserContext; page: Page; close(): Promise<void> };

/** Launches Chromium with a fresh user-data dir at the given viewport. */
export async function launchBrowser(viewport: Viewport): Promise<BrowserSession> {
  const userDataDir = mkdtempSync(join(tmpdir(), "linger-chromium-"));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    headless: true,
    args: CHROMIUM_FLAGS,
    viewport: { width: viewport.width, height: viewport.height },
    deviceScaleFactor: 1,
    isMobile: false,
    hasTouch: viewport.width < 768,
    locale: "en-GB",
    timezoneId: "UTC",
  });
  context.setDefaultTimeout(20_000);
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close().catch(() => {});
      rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}

/**
 * Saves test-results/screenshots/<name>.png, and, when the screen's scroll
 * view is taller than the window, more shots scrolled down (<name>-2.png ...,
 * at most maxShots in all); the scroll position is restored afterwards.
 */
export async function screenshot(page: Page, name: string, maxShots = 4): Promise<string> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  const base = name.replace(/[^a-z0-9-]+/gi, "-");
  const file = join(SCREENSHOT_DIR, `${base}.png`);
  const marker = await page.evaluate(() => {
    let best: HTMLElement | null = null;
    document.querySelectorAll<HTMLElement>("div").forEach((el) => {
      const oy = getComputedStyle(el).overflowY;
      if ((oy === "auto" || oy === "scroll") && el.scrollHeight > el.clientHeight + 4) {
        if (!best || el.clientHeight * el.scrollHeight > best.clientHeight * best.scrollHeight) best = el;
      }
    });
    if (!best) return null;
    const el = best as HTMLElement;
    el.setAttribute("data-shot-scroller", "1");
    return { top: el.scrollTop, height: el.scrollHeight, view: el.clientHeight };
  });
  if (!marker) {
    await page.screenshot({ path: file });
    return file;
  }
  const shots = Math.min(maxShots, Math.ceil(marker.height / marker.view));
  for (let i = 0; i < shots; i++) {
    await page.evaluate((y) => {
      const el = document.querySelector<HTMLElement>("[data-shot-scroller]");
      if (el) el.scrollTop = y;
    }, i * marker.view);
    await page.waitForTimeout(150);
    await page.screenshot({ path: i === 0 ? file : join(SCREENSHOT_DIR, `${base}-${i + 1}.png`) });
  }
  await page.evaluate((y) => {
    const el = document.querySelector<HTMLElement>("[data-shot-scroller]");
    if (el) {
      el.scrollTop = y;
      el.removeAttribute("data-shot-scroller");
    }
  }, marker.top);
  return file;
}

/** True once the Inter text face is loaded in the page (checked through document.fonts). */
export async function interLoaded(page: Page): Promise<boolean> {
  return page.evaluate(async () => {
    await document.fonts.ready;
    const faces: { family: string; status: string }[] = [];
    document.fonts.forEach((f) => faces.push({ family: f.family.replace(/["']/g, ""), status: f.status }));
    return (
      faces.some((f) => f.family.startsWith("Inter") && f.status === "loaded") &&
      document.fonts.check('16px "Inter_400Regular"')
    );
  });
}

export type AxeViolation = {
  id: string;
  impact: string | null;
  help: string;
  nodes: { target: string[]; html: string }[];
};

/** Runs axe-core in the page; returns the serious and critical violations. */
export async function axeSeriousViolations(page: Page): Promise<AxeViolation[]> {
  const source = readFileSync(require.resolve("axe-core/axe.min.js"), "utf8");
  await page.evaluate(source);
  const result = await page.evaluate(async () => {
    const axe = (
      window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: AxeViolation[] }> } }
    ).axe;
    const r = await axe.run(document, {
      runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "best-practice"] },
    });
    return r.violations.map((v) => ({
      id: v.id,
      impact: v.impact,
      help: v.help,
      nodes: v.nodes.slice(0, 5).map((n) => ({ target: n.target, html: n.html.slice(0, 200) })),
    }));
  });
  return result.filter((v) => v.impact === "serious" || v.impact === "critical");
}

/** Touch targets smaller than 44x44 px among visible interactive elements. */
export async function smallTouchTargets(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    const els = document.querySelectorAll(
      'button, a[href], input, select, textarea, [role="button"], [role="link"], [role="radio"], [role="checkbox"], [role="switch"], [role="tab"]',
    );
    els.forEach((el) => {
      const r = (el as HTMLElement).getBoundingClientRect();
      const style = getComputedStyle(el as HTMLElement);
      if (r.width === 0 || r.height === 0 || style.visibility === "hidden" || style.display === "none") return;
      if (el.closest('[aria-hidden="true"]')) return;
      if (r.width < 44 - 0.5 || r.height < 44 - 0.5) {
        out.push(
          `${el.tagName.toLowerCase()}[${el.getAttribute("aria-label") ?? (el.textContent ?? "").trim().slice(0, 30)}] ${Math.round(r.width)}x${Math.round(r.height)}`,
        );
      }
    });
    return out;
  });
}

/** Interactive elements without an accessible name (aria-label, labelledby or text). */
export async function unlabelledControls(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    document
      .querySelectorAll(
        'button, a[href], input, select, textarea, [role="button"], [role="link"], [role="radio"], [role="checkbox"], [role="switch"]',
      )
      .forEach((el) => {
        const name =
          el.getAttribute("aria-label") ||
          el.getAttribute("aria-labelledby") ||
          (el.textContent ?? "").trim() ||
          el.getAttribute("title");
        const r = (el as HTMLElement).getBoundingClientRect();
        if (!name && r.width > 0) out.push(el.outerHTML.slice(0, 120));
      });
    return out;
  });
}

/** No serious or critical axe-core violation, no touch target under 44 px, no control without an accessible name. */
export async function assertAccessible(page: Page, where: string): Promise<void> {
  const serious = await axeSeriousViolations(page);
  assert.deepEqual(serious, [], `${where}: ${JSON.stringify(serious, null, 2)}`);
  assert.deepEqual(await smallTouchTargets(page), [], `${where}: touch targets under 44 px`);
  assert.deepEqual(await unlabelledControls(page), [], `${where}: controls without an accessible name`);
}
