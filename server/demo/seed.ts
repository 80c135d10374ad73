/**
 * Demo content (the invented fermentation-tank scenario), seeded idempotently
 * item by item with stable keys on every start, so later features can add
 * items. LINGER_SEED_DEMO=0 skips it.
 */
import { and, eq } from "drizzle-orm";
import type { AppContext } from "@/server/context";
import { schema } from "@/db/client";
import { newId } from "@/server/ids";
import { hashPassword, verifyPassword } from "@/server/services/password";

export const DEMO_LAB_KEY = "tank-sensor-group";
export const DEMO_LAB_NAME = "Tank Sensor Group";
export const DEMO_ACCOUNTS = [
  { email: "owner@example.org", displayName: "Demo owner", role: "owner" as const },
  { email: "editor@example.org", displayName: "Demo editor", role: "editor" as const },
  { email: "viewer@example.org", displayName: "Demo viewer", role: "viewer" as const },
];

/** Extra seeders registered by features (circuits, programs, runs, traces). Each must be idempotent. */
export type DemoSeeder = (ctx: AppContext, lab: { id: string; ownerId: string }) => Promise<void> | void;
const seeders: { name: string; run: DemoSeeder }[] = [];
export function registerDemoSeeder(name: string, run: DemoSeeder) {
  if (!seeders.some((s) => s.name === name)) seeders.push({ name, run });
}

export async function seedDemoAccounts(ctx: AppContext): Promise<{ id: string; ownerId: string }> {
  const { db } = ctx;
  const now = new Date();
  let lab = db.select().from(schema.labs).where(eq(schema.labs.demoKey, DEMO_LAB_KEY)).get();
  if (!lab) {
    lab = { id: newId("lab_"), name: DEMO_LAB_NAME, demoKey: DEMO_LAB_KEY, createdAt: now };
    db.insert(schema.labs).values(lab).run();
  }
  let ownerId = "";
  for (const acct of DEMO_ACCOUNTS) {
    let user = db.select().from(schema.users).where(eq(schema.users.email, acct.email)).get();
    if (!user) {
      user = {
        id: newId("usr_"),
        email: acct.email,
        displayName: acct.displayName,
        passwordHash: await hashPassword(ctx.env.LINGER_DEMO_PASSWORD),
        isSiteAdmin: false,
        notifyOnRunEnd: true,
        createdAt: now,
      };
      db.insert(schema.users).values(user).run();
    } else if (!(await verifyPassword(ctx.env.LINGER_DEMO_PASSWORD, user.passwordHash))) {
      // The demo password follows LINGER_DEMO_PASSWORD.
      db.update(schema.users)
        .set({ passwordHash: await hashPassword(ctx.env.LINGER_DEMO_PASSWORD) })
        .where(eq(schema.users.id, user.id))
        .run();
    }
    const member = db
      .select()
      .from(schema.memberships)
      .where(and(eq(schema.memberships.labId, lab.id), eq(schema.memberships.userId, user.id)))
      .get();
    if (!member)
      db.insert(schema.memberships).values({ labId: lab.id, userId: user.id, role: acct.role, createdAt: now }).run();
    if (acct.role === "owner") ownerId = user.id;
  }
  return { id: lab.id, ownerId };
}

export async function seedDemo(ctx: AppContext): Promise<void> {
  const lab = await seedDemoAccounts(ctx);
  for (const s of seeders) {
    try {
      await s.run(ctx, lab);
    } catch (e) {
      console.error(`[seed] demo seeder "${s.name}" failed:`, e);
    }
  }
}
