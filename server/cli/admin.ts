/**
 * Site administration from the shell.
 *
 *   npm run admin -- create <email>
 *     Creates the account if needed, makes it a site admin, and prints a
 *     one-time link (valid 24 hours) to set its password.
 */
import { openDatabase } from "@/db/client";
import { parseEnv } from "@/server/env";
import { createSiteAdmin, type AccountsCtx } from "@/server/services/auth.service";

const USAGE = "Usage: npm run admin -- create <email>";

async function main(argv: string[]): Promise<number> {
  const [command, email] = argv;
  if (command !== "create" || !email) {
    console.error(USAGE);
    return 2;
  }
  if (!/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(email)) {
    console.error(`"${email}" does not look like an e-mail address.\n${USAGE}`);
    return 2;
  }
  let env;
  try {
    env = parseEnv();
  } catch (e) {
    console.error((e as Error).message);
    return 2;
  }
  const handle = openDatabase(env.DATABASE_URL);
  try {
    const ctx: AccountsCtx = { db: handle.db, sqlite: handle.sqlite, env };
    const r = await createSiteAdmin(ctx, email);
    console.log(`${r.created ? "Created" : "Promoted"} ${email.trim().toLowerCase()} as site admin.`);
    console.log("Set the password with this one-time link (valid for 24 hours):");
    console.log(r.link);
    return 0;
  } finally {
    handle.close();
  }
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (e) => {
    console.error(e);
    process.exit(1);
  },
);
