"use server";

import { getDb } from "@/db/client";
import { setUserUnits } from "@/db/users";
import { runAction } from "@/lib/api/action";
import { unitPreferenceUpdateSchema } from "@/shared/user-schema";

export async function saveUnitPreference(input: unknown) {
  return runAction("board.view", unitPreferenceUpdateSchema, input, (units, user) => {
    setUserUnits(getDb(), user.id, units);
    return units;
  });
}
