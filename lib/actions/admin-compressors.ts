"use server";

import { z } from "zod";
import { adminCreateCompressor, adminSetDeviceCredential, adminUpdateCompressor } from "@/db/admin";
import { getDb } from "@/db/client";
import { runAction } from "@/lib/api/action";
import { hashPassword } from "@/lib/auth/password";
import { compressorInputSchema, compressorUpdateSchema } from "@/shared/compressor-schema";
import { actorOf, asFailures } from "./admin-support";
import { deviceTopicPrefix, newDeviceSecret, type DeviceCredential } from "@/lib/broker/device-credential";

/** { name, siteId, modelId, serial, deviceId, stopPressureBar, restartPressureBar, bankVolumeL, inService } */
export async function createCompressor(input: unknown) {
  return runAction("admin.compressors", compressorInputSchema, input, async (data, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminCreateCompressor(getDb(), data, actor));
  });
}

/** The same fields as createCompressor, plus id. */
export async function updateCompressor(input: unknown) {
  return runAction("admin.compressors", compressorUpdateSchema, input, async ({ id, ...data }, user) => {
    const actor = await actorOf(user);
    return asFailures(() => adminUpdateCompressor(getDb(), id, data, actor));
  });
}

const credentialRequestSchema = z.object({ id: z.number().int().positive() });

/** { id } → a new MQTT secret for the compressor's device, returned once; only its hash is kept. Replaces any earlier one. */
export async function issueDeviceCredential(input: unknown) {
  return runAction("admin.compressors", credentialRequestSchema, input, async ({ id }, user): Promise<DeviceCredential> => {
    const secret = newDeviceSecret();
    const secretHash = await hashPassword(secret);
    const actor = await actorOf(user);
    const c = asFailures(() => adminSetDeviceCredential(getDb(), id, secretHash, actor));
    return {
      compressorId: c.id,
      compressorName: c.name,
      username: c.deviceId,
      secret,
      topicPrefix: deviceTopicPrefix(c.siteCode, c.deviceId),
    };
  });
}
