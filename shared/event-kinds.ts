/** The kinds of entry in the event log (events.kind), with the words the filter shows. */
export const eventKinds = [
  "alarm",
  "trip",
  "acknowledge",
  "shelve",
  "comms",
  "state",
  "threshold",
  "config",
  "auth",
  "service",
  "air-test",
  "mail",
] as const;
export type EventKind = (typeof eventKinds)[number];

export const eventKindLabels: Record<EventKind, string> = {
  alarm: "Alarm",
  trip: "Trip",
  acknowledge: "Acknowledgement",
  shelve: "Shelving",
  comms: "Communication",
  state: "Run state",
  threshold: "Threshold change",
  config: "Configuration",
  auth: "Sign-in",
  service: "Service",
  "air-test": "Air test",
  mail: "E-mail",
};

export function eventKindLabel(kind: string): string {
  return (eventKindLabels as Record<string, string>)[kind] ?? kind;
}
