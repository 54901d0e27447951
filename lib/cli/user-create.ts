import { parseArgs } from "node:util";
import { writeAudit } from "@/db/audit";
import { openDatabase } from "@/db/client";
import { runMigrations } from "@/db/migrate";
import { createUser, findUserByEmail } from "@/db/users";
import { hashPassword } from "@/lib/auth/password";
import { userInviteSchema } from "@/shared/user-schema";

const { values } = parseArgs({
  options: {
    email: { type: "string" },
    name: { type: "string" },
    role: { type: "string", default: "admin" },
    password: { type: "string" },
  },
});

const parsed = userInviteSchema.safeParse({
  email: values.email,
  name: values.name ?? values.email,
  role: values.role,
  allSites: true,
  siteIds: [],
  password: values.password ?? process.env.AIRKEEP_PASSWORD,
});
if (!parsed.success) {
  console.error("Usage: npm run user:create -- --email you@example.org --name \"Your Name\" [--role admin] --password '…'");
  for (const problem of parsed.error.issues) console.error(`  ${problem.path.join(".")}: ${problem.message}`);
  process.exit(2);
}

const db = openDatabase();
runMigrations(db);
if (findUserByEmail(db, parsed.data.email)) {
  console.error(`A user ${parsed.data.email} already exists.`);
  process.exit(1);
}
const user = createUser(db, { ...parsed.data, passwordHash: await hashPassword(parsed.data.password) });
writeAudit(db, { actor: "cli", action: "user.invite", targetType: "user", targetId: user.id, details: { email: user.email, role: user.role } });
console.log(`Created ${user.role} ${user.email}.`);
