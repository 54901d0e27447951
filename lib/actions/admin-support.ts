import { headers } from "next/headers";
import { AdminRefusal, type AdminActor } from "@/db/admin";
import { ActionFailure } from "@/lib/api/action";
import type { CurrentUser } from "@/lib/auth/current-user";
import { clientAddress } from "@/lib/web/request-facts";

/** Who made an administrative change, and from where (for the audit row). */
export async function actorOf(user: CurrentUser): Promise<AdminActor> {
  return { userId: user.id, email: user.email, ip: clientAddress(await headers()) };
}

/** Runs an administrative write; refusals become ActionFailures with their status and field errors. */
export function asFailures<T>(write: () => T): T {
  try {
    return write();
  } catch (e) {
    if (e instanceof AdminRefusal) throw new ActionFailure(e.status, e.message, e.fieldErrors);
    throw e;
  }
}
