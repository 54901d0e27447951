"use server";

import { adminInviteUser, adminUpdateUser } from "@/db/admin";
import { getDb } from "@/db/client";
import { runAction } from "@/lib/api/action";
import { hashPassword } from "@/lib/auth/password";
import { userInviteSchema, userUpdateSchema } from "@/shared/user-schema";
import { actorOf, asFailures } from "./admin-support";

/** Creates an account: { email, name, role, siteIds: number[] (empty = every site), password }. */
export async function inviteUser(input: unknown) {
  return runAction("admin.users", userInviteSchema, input, async ({ password, ...data }, user) => {
    const passwordHash = await hashPassword(password);
    const actor = await actorOf(user);
    return asFailures(() => adminInviteUser(getDb(), { ...data, passwordHash }, actor));
  });
}

/** Changes role, site scope and disabled flag: { id, role, siteIds, disabled }. Disabling signs the person out everywhere. */
export async function updateUser(input: unknown) {
  return runAction("admin.users", userUpdateSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateUser(getDb(), data, actor));
  });
}
