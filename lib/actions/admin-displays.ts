"use server";

import { headers } from "next/headers";
import { getDb } from "@/db/client";
import { createDisplayLink, DisplayLinkRefusal, revokeDisplayLink } from "@/db/display-links";
import { ActionFailure, runAction } from "@/lib/api/action";
import { requestOrigin } from "@/lib/web/request-facts";
import { actorOf } from "./admin-support";
import { displayLinkInputSchema, displayLinkRevokeSchema, type DisplayLinkDto } from "@/shared/display-link-schema";

function refusals<T>(write: () => T): T {
  try {
    return write();
  } catch (e) {
    if (e instanceof DisplayLinkRefusal) throw new ActionFailure(e.status, e.message, e.fieldErrors);
    throw e;
  }
}

/** The address the administrator reached Airkeep by (a wall screen on the same network uses the same one). */
async function publicOrigin(): Promise<string> {
  return requestOrigin(await headers()) ?? new URL(process.env.NEXTAUTH_URL ?? "http://localhost:3000").origin;
}

export type CreatedDisplayLink = { link: DisplayLinkDto; url: string };

/** { label, siteIds } → the new link and its address, shown once (only a hash of its token is stored). */
export async function createDisplayLinkAction(input: unknown) {
  return runAction("admin.displays", displayLinkInputSchema, input, async (data, user): Promise<CreatedDisplayLink> => {
    // An administrator limited to some sites may not open a screen onto others.
    if (user.siteIds) {
      const mine = user.siteIds;
      if (!data.siteIds.length || data.siteIds.some((id) => !mine.includes(id))) {
        throw new ActionFailure(400, "Your account is limited to some sites: choose only those.", {
          siteIds: ["Choose one or more of your own sites"],
        });
      }
    }
    const actor = await actorOf(user);
    const { link, token } = refusals(() =>
      createDisplayLink(
        getDb(),
        {
          label: data.label,
          siteIds: data.siteIds.length ? data.siteIds : null,
          theme: data.theme,
          units: { pressureUnit: data.pressureUnit, temperatureUnit: data.temperatureUnit },
        },
        actor,
      ),
    );
    return { link, url: `${await publicOrigin()}/display/${token}` };
  });
}

/** { id } → the link, revoked: its screen shows the revoked page and gets no more live data. */
export async function revokeDisplayLinkAction(input: unknown) {
  return runAction("admin.displays", displayLinkRevokeSchema, input, async ({ id }, user) => {
    const actor = await actorOf(user);
    return refusals(() => revokeDisplayLink(getDb(), id, actor));
  });
}
