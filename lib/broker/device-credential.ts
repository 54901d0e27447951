import { randomBytes } from "node:crypto";
import { TOPIC_ROOT } from "@/shared/telemetry";

/** What an administrator copies into the device's gateway; the secret is shown once and never stored. */
export type DeviceCredential = {
  compressorId: number;
  compressorName: string;
  /** The MQTT username is the device id. */
  username: string;
  secret: string;
  topicPrefix: string;
};

/** 24 random bytes (192 bits), URL-safe so it can be pasted into any gateway's configuration. */
export function newDeviceSecret(): string {
  return randomBytes(24).toString("base64url");
}

/** Every topic the device may publish under starts with this. */
export function deviceTopicPrefix(siteCode: string, deviceId: string): string {
  return `${TOPIC_ROOT}/${siteCode}/${deviceId}/`;
}
