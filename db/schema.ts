import { sql } from "drizzle-orm";
import { index, integer, primaryKey, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";

// All times are integer milliseconds since the Unix epoch (UTC). Pressures in bar (gauge), temperatures in °C.

export const sites = sqliteTable("sites", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  name: text("name").notNull().unique(),
  code: text("code").notNull().unique(),
  timeZone: text("time_zone").notNull(),
  address: text("address").notNull().default(""),
  createdAt: integer("created_at").notNull(),
});

export const users = sqliteTable("users", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  email: text("email").notNull().unique(),
  name: text("name").notNull(),
  passwordHash: text("password_hash").notNull(),
  role: text("role", { enum: ["viewer", "supervisor", "technician", "engineer", "manager", "admin"] })
    .notNull()
    .default("viewer"),
  disabled: integer("disabled", { mode: "boolean" }).notNull().default(false),
  pressureUnit: text("pressure_unit", { enum: ["bar", "psi", "MPa"] }).notNull().default("bar"),
  temperatureUnit: text("temperature_unit", { enum: ["C", "F"] }).notNull().default("C"),
  createdAt: integer("created_at").notNull(),
  updatedAt: integer("updated_at").notNull(),
});

/** A user with no rows here sees every site. */
export const userSites = sqliteTable(
  "user_sites",
  {
    userId: integer("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    siteId: integer("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
  },
  (t) => [primaryKey({ columns: [t.userId, t.siteId] })],
);

/** Server-side record of each signed-in session: gives idle and absolute lifetimes and revocation. */
export const userSessions = sqliteTable(
  "user_sessions",
  {
    id: text("id").primaryKey(),
    userId: integer("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    createdAt: integer("created_at").notNull(),
    lastSeenAt: integer("last_seen_at").notNull(),
    revokedAt: integer("revoked_at"),
    ip: text("ip").notNull().default(""),
  },
  (t) => [index("user_sessions_user_idx").on(t.userId)],
);

export const compressorModels = sqliteTable("compressor_models", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  name: text("name").notNull().unique(),
  maker: text("maker").notNull().default(""),
  stages: integer("stages").notNull(),
  ratedDeliveryLpm: real("rated_delivery_lpm").notNull(),
  ratedPressureBar: real("rated_pressure_bar").notNull(),
  createdAt: integer("created_at").notNull(),
});

export const compressors = sqliteTable(
  "compressors",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    siteId: integer("site_id")
      .notNull()
      .references(() => sites.id),
    modelId: integer("model_id")
      .notNull()
      .references(() => compressorModels.id),
    name: text("name").notNull(),
    serial: text("serial").notNull().unique(),
    deviceId: text("device_id").notNull().unique(),
    /** Hash of the device's MQTT password; null until an admin issues one. */
    deviceSecretHash: text("device_secret_hash"),
    stopPressureBar: real("stop_pressure_bar").notNull(),
    restartPressureBar: real("restart_pressure_bar").notNull(),
    bankVolumeL: real("bank_volume_l").notNull().default(0),
    inService: integer("in_service", { mode: "boolean" }).notNull().default(true),
    createdAt: integer("created_at").notNull(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [index("compressors_site_idx").on(t.siteId)],
);

/** One row per telemetry message. Rebuilt WITHOUT ROWID by migration 0001. */
export const readings = sqliteTable(
  "readings",
  {
    compressorId: integer("compressor_id").notNull(),
    ts: integer("ts").notNull(),
    seq: integer("seq").notNull(),
    deliveryBar: real("delivery_bar"),
    stage1Bar: real("stage1_bar"),
    stage2Bar: real("stage2_bar"),
    stage3Bar: real("stage3_bar"),
    stage4Bar: real("stage4_bar"),
    stage1C: real("stage1_c"),
    stage2C: real("stage2_c"),
    stage3C: real("stage3_c"),
    stage4C: real("stage4_c"),
    oilBar: real("oil_bar"),
    purifierC: real("purifier_c"),
    intakeC: real("intake_c"),
    runState: integer("run_state").notNull(),
    motorOn: integer("motor_on").notNull(),
    hourMeterH: real("hour_meter_h"),
    starts: integer("starts"),
    tripCode: integer("trip_code"),
    // ---- Plausibility per model (sensor faults) ----
    /**
     * Pressures the reading reported beyond what its model can reach (bar, by field name, e.g. {"deliveryBar": 675}):
     * a sensor fault. Those columns hold null, so trends, rollups and alarms never take them as pressures.
     */
    implausible: text("implausible", { mode: "json" }).$type<Record<string, number>>(),
    // ---- end plausibility ----
  },
  (t) => [primaryKey({ columns: [t.compressorId, t.ts] })],
);

export const auditLog = sqliteTable(
  "audit_log",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    ts: integer("ts").notNull(),
    actorUserId: integer("actor_user_id"),
    actor: text("actor").notNull(),
    action: text("action").notNull(),
    targetType: text("target_type"),
    targetId: text("target_id"),
    siteId: integer("site_id"),
    ip: text("ip").notNull().default(""),
    details: text("details", { mode: "json" }).$type<Record<string, unknown>>(),
  },
  (t) => [
    index("audit_log_ts_idx").on(t.ts),
    index("audit_log_action_actor_idx").on(t.action, t.actor, t.ts),
    index("audit_log_action_ip_idx").on(t.action, t.ip, t.ts),
    // A thing's history (a threshold set's changes, newest first).
    index("audit_log_target_idx").on(t.action, t.targetType, t.targetId, t.ts),
  ],
);

export const settings = sqliteTable("settings", {
  key: text("key").primaryKey(),
  value: text("value").notNull(),
  updatedAt: integer("updated_at")
    .notNull()
    .default(sql`(unixepoch() * 1000)`),
});

export type UserRow = typeof users.$inferSelect;
export type SiteRow = typeof sites.$inferSelect;
export type CompressorModelRow = typeof compressorModels.$inferSelect;
export type CompressorRow = typeof compressors.$inferSelect;
export type ReadingRow = typeof readings.$inferSelect;
export type AuditRow = typeof auditLog.$inferSelect;

// ---- Telemetry ingestion: rollups, last known state, device events, ingester health ----

/** Rollup columns; a signal's mean is its sum / n (nulls are not counted). */
function rollupColumns() {
  return {
    compressorId: integer("compressor_id").notNull(),
    /** Start of the bucket, ms (UTC, aligned to the minute or hour). */
    bucketTs: integer("bucket_ts").notNull(),
    /** Readings in the bucket. */
    n: integer("n").notNull().default(0),
    deliveryBarMin: real("delivery_bar_min"),
    deliveryBarMax: real("delivery_bar_max"),
    deliveryBarSum: real("delivery_bar_sum").notNull().default(0),
    deliveryBarN: integer("delivery_bar_n").notNull().default(0),
    stage1CMin: real("stage1_c_min"),
    stage1CMax: real("stage1_c_max"),
    stage1CSum: real("stage1_c_sum").notNull().default(0),
    stage1CN: integer("stage1_c_n").notNull().default(0),
    stage2CMin: real("stage2_c_min"),
    stage2CMax: real("stage2_c_max"),
    stage2CSum: real("stage2_c_sum").notNull().default(0),
    stage2CN: integer("stage2_c_n").notNull().default(0),
    stage3CMin: real("stage3_c_min"),
    stage3CMax: real("stage3_c_max"),
    stage3CSum: real("stage3_c_sum").notNull().default(0),
    stage3CN: integer("stage3_c_n").notNull().default(0),
    stage4CMin: real("stage4_c_min"),
    stage4CMax: real("stage4_c_max"),
    stage4CSum: real("stage4_c_sum").notNull().default(0),
    stage4CN: integer("stage4_c_n").notNull().default(0),
    oilBarMin: real("oil_bar_min"),
    oilBarMax: real("oil_bar_max"),
    oilBarSum: real("oil_bar_sum").notNull().default(0),
    oilBarN: integer("oil_bar_n").notNull().default(0),
    purifierCMin: real("purifier_c_min"),
    purifierCMax: real("purifier_c_max"),
    purifierCSum: real("purifier_c_sum").notNull().default(0),
    purifierCN: integer("purifier_c_n").notNull().default(0),
    intakeCMin: real("intake_c_min"),
    intakeCMax: real("intake_c_max"),
    intakeCSum: real("intake_c_sum").notNull().default(0),
    intakeCN: integer("intake_c_n").notNull().default(0),
    /** Seconds of the bucket covered by readings (gaps longer than the store's max gap are not counted). */
    coveredS: real("covered_s").notNull().default(0),
    /** Seconds with the motor on. */
    runS: real("run_s").notNull().default(0),
    /** Seconds in the tripped state. */
    trippedS: real("tripped_s").notNull().default(0),
    /** Device time of the earliest reading in the bucket; with the ranges below, a bucket's readings summed up exactly. */
    firstTs: integer("first_ts"),
    minRunState: integer("min_run_state"),
    maxRunState: integer("max_run_state"),
    minStarts: integer("min_starts"),
    maxStarts: integer("max_starts"),
    /** Device time of the latest reading in the bucket, and its hour meter, starts and state. */
    lastTs: integer("last_ts"),
    hourMeterH: real("hour_meter_h"),
    starts: integer("starts"),
    lastRunState: integer("last_run_state"),
    lastMotorOn: integer("last_motor_on"),
  };
}

export const readings1m = sqliteTable("readings_1m", rollupColumns(), (t) => [
  primaryKey({ columns: [t.compressorId, t.bucketTs] }),
]);

export const readings1h = sqliteTable("readings_1h", rollupColumns(), (t) => [
  primaryKey({ columns: [t.compressorId, t.bucketTs] }),
]);

/** Last known values and comms state of each compressor, written by the ingester. */
export const compressorState = sqliteTable("compressor_state", {
  compressorId: integer("compressor_id").primaryKey(),
  online: integer("online", { mode: "boolean" }).notNull().default(false),
  /** Server time any valid message last arrived from the device. */
  lastSeenAt: integer("last_seen_at"),
  /** Server time the last reading arrived. */
  receivedAt: integer("received_at"),
  /** Device time of the last reading. */
  ts: integer("ts"),
  seq: integer("seq"),
  runState: integer("run_state"),
  motorOn: integer("motor_on"),
  deliveryBar: real("delivery_bar"),
  stage1Bar: real("stage1_bar"),
  stage2Bar: real("stage2_bar"),
  stage3Bar: real("stage3_bar"),
  stage4Bar: real("stage4_bar"),
  stage1C: real("stage1_c"),
  stage2C: real("stage2_c"),
  stage3C: real("stage3_c"),
  stage4C: real("stage4_c"),
  oilBar: real("oil_bar"),
  purifierC: real("purifier_c"),
  intakeC: real("intake_c"),
  hourMeterH: real("hour_meter_h"),
  starts: integer("starts"),
  tripCode: integer("trip_code"),
  fillRateBarPerMin: real("fill_rate_bar_per_min"),
  updatedAt: integer("updated_at").notNull(),
});

/** Comms loss/restore detected by the ingester, and state changes and trips reported by the machine. */
export const deviceEvents = sqliteTable(
  "device_events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    ts: integer("ts").notNull(),
    compressorId: integer("compressor_id").notNull(),
    kind: text("kind", { enum: ["comms_lost", "comms_restored", "state", "trip"] }).notNull(),
    runState: text("run_state", { enum: ["stopped", "standby", "starting", "running", "tripped"] }),
    tripCode: integer("trip_code"),
    text: text("text").notNull().default(""),
    /** Server time the event was recorded. */
    receivedAt: integer("received_at").notNull(),
  },
  (t) => [
    uniqueIndex("device_events_dedupe_idx").on(t.compressorId, t.ts, t.kind),
    index("device_events_ts_idx").on(t.ts),
  ],
);

/** Health counters of the background services (one row per component: "ingester", "broker"). */
export const ingesterStatus = sqliteTable("ingester_status", {
  component: text("component").primaryKey(),
  pid: integer("pid").notNull(),
  startedAt: integer("started_at").notNull(),
  updatedAt: integer("updated_at").notNull(),
  connected: integer("connected", { mode: "boolean" }).notNull().default(false),
  messagesPerS: real("messages_per_s").notNull().default(0),
  wsClients: integer("ws_clients").notNull().default(0),
  lastFlushAt: integer("last_flush_at"),
  counters: text("counters", { mode: "json" }).$type<Record<string, number>>().notNull(),
});

export type ReadingRollupRow = typeof readings1m.$inferSelect;
export type CompressorStateRow = typeof compressorState.$inferSelect;
export type DeviceEventRow = typeof deviceEvents.$inferSelect;
export type IngesterStatusRow = typeof ingesterStatus.$inferSelect;

// ---- Display links: revocable, unattended wall-screen access to the board ----

/** A wall screen's link to the read-only board. Only a SHA-256 hash of the link token is stored. */
export const displayLinks = sqliteTable("display_links", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  tokenHash: text("token_hash").notNull().unique(),
  label: text("label").notNull(),
  /** Sites the screen shows; null means every site. */
  siteIds: text("site_ids", { mode: "json" }).$type<number[]>(),
  createdBy: integer("created_by")
    .notNull()
    .references(() => users.id),
  createdAt: integer("created_at").notNull(),
  revokedAt: integer("revoked_at"),
  lastUsedAt: integer("last_used_at"),
  /** How the wall screen shows: its theme and units, set per link (a control room far from the office's habits). */
  theme: text("theme", { enum: ["light", "dark"] }).notNull().default("dark"),
  pressureUnit: text("pressure_unit", { enum: ["bar", "psi", "MPa"] }).notNull().default("bar"),
  temperatureUnit: text("temperature_unit", { enum: ["C", "F"] }).notNull().default("C"),
});

export type DisplayLinkRow = typeof displayLinks.$inferSelect;

// ---- Thresholds: limits per compressor model (the template) with per-compressor overrides ----

export const thresholdLimits = sqliteTable(
  "threshold_limits",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    scopeType: text("scope_type", { enum: ["model", "compressor"] }).notNull(),
    scopeId: integer("scope_id").notNull(),
    signal: text("signal").notNull(),
    direction: text("direction", { enum: ["high", "low"] }).notNull(),
    priority: text("priority", { enum: ["critical", "warning", "advisory"] }).notNull(),
    /** Stored in bar or °C. */
    value: real("value").notNull(),
    deadband: real("deadband").notNull().default(0),
    onDelayS: real("on_delay_s").notNull().default(0),
    offDelayS: real("off_delay_s").notNull().default(0),
    /** A compressor override with enabled = false switches an inherited limit off. */
    enabled: integer("enabled", { mode: "boolean" }).notNull().default(true),
    updatedAt: integer("updated_at").notNull(),
    updatedBy: integer("updated_by"),
  },
  (t) => [uniqueIndex("threshold_limits_key_idx").on(t.scopeType, t.scopeId, t.signal, t.direction, t.priority)],
);

/** One version counter per threshold set, for the optimistic check on save. */
export const thresholdSets = sqliteTable(
  "threshold_sets",
  {
    scopeType: text("scope_type", { enum: ["model", "compressor"] }).notNull(),
    scopeId: integer("scope_id").notNull(),
    version: integer("version").notNull().default(0),
    updatedAt: integer("updated_at").notNull(),
    updatedBy: integer("updated_by"),
  },
  (t) => [primaryKey({ columns: [t.scopeType, t.scopeId] })],
);

// ---- Alarms: one row per occurrence, from raise until it returns to normal; kept afterwards as history ----

export const alarms = sqliteTable(
  "alarms",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    compressorId: integer("compressor_id").notNull(),
    siteId: integer("site_id").notNull(),
    /** Limit key (signal.direction.priority), "trip" or "comms". */
    key: text("key").notNull(),
    priority: text("priority", { enum: ["critical", "warning", "advisory"] }).notNull(),
    signal: text("signal"),
    state: text("state", {
      enum: [
        "normal",
        "active-unacknowledged",
        "active-acknowledged",
        "cleared-unacknowledged",
        "shelved",
        "suppressed",
        "out-of-service",
      ],
    }).notNull(),
    /** Whether the condition is present now, whatever the state. */
    active: integer("active", { mode: "boolean" }).notNull(),
    raisedAt: integer("raised_at").notNull(),
    clearedAt: integer("cleared_at"),
    value: real("value"),
    limitValue: real("limit_value"),
    tripCode: integer("trip_code"),
    chattering: integer("chattering", { mode: "boolean" }).notNull().default(false),
    ackAt: integer("ack_at"),
    ackBy: integer("ack_by"),
    ackComment: text("ack_comment"),
    shelvedUntil: integer("shelved_until"),
    shelvedBy: integer("shelved_by"),
    shelveComment: text("shelve_comment"),
    outOfServiceReason: text("out_of_service_reason"),
    notifiedAt: integer("notified_at"),
    escalationLevel: integer("escalation_level").notNull().default(0),
    reAlarmedAt: integer("re_alarmed_at"),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [
    uniqueIndex("alarms_open_idx").on(t.compressorId, t.key).where(sql`state <> 'normal'`),
    index("alarms_state_idx").on(t.state, t.priority),
    index("alarms_compressor_idx").on(t.compressorId, t.raisedAt),
    index("alarms_site_idx").on(t.siteId, t.raisedAt),
  ],
);

// ---- Event log: every alarm transition, trip, acknowledgement, comms loss, change and sign-in, searchable (FTS5) ----

export const events = sqliteTable(
  "events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    ts: integer("ts").notNull(),
    /** alarm, trip, acknowledge, shelve, comms, state, threshold, config, auth, service, air-test, mail */
    kind: text("kind").notNull(),
    /** Dotted verb, e.g. alarm.raise, alarm.acknowledge, auth.sign_in_failed. */
    action: text("action").notNull(),
    priority: text("priority", { enum: ["critical", "warning", "advisory"] }),
    siteId: integer("site_id"),
    compressorId: integer("compressor_id"),
    alarmId: integer("alarm_id"),
    actor: text("actor").notNull().default(""),
    /** The sentence people read and search. */
    text: text("text").notNull(),
    details: text("details", { mode: "json" }).$type<Record<string, unknown>>(),
  },
  (t) => [
    index("events_ts_idx").on(t.ts),
    index("events_site_ts_idx").on(t.siteId, t.ts),
    index("events_compressor_ts_idx").on(t.compressorId, t.ts),
    index("events_kind_ts_idx").on(t.kind, t.ts),
  ],
);

export type ThresholdLimitRow = typeof thresholdLimits.$inferSelect;
export type AlarmRow = typeof alarms.$inferSelect;
export type EventRow = typeof events.$inferSelect;

// ---- Mail: contacts, notification rules, on-call rota, notifier state, outbox, and the SMTP fake's mailbox ----

/** Someone Airkeep may e-mail; optionally the person's own account (for their units). */
export const contacts = sqliteTable("contacts", {
  id: integer("id").primaryKey({ autoIncrement: true }),
  name: text("name").notNull(),
  email: text("email").notNull().unique(),
  userId: integer("user_id").references(() => users.id, { onDelete: "set null" }),
  /** An inactive contact receives nothing, whatever the rules and the rota say. */
  active: integer("active", { mode: "boolean" }).notNull().default(true),
  note: text("note").notNull().default(""),
  createdAt: integer("created_at").notNull(),
  updatedAt: integer("updated_at").notNull(),
});

/**
 * Who is told about an alarm: a site (null = every site), the lowest priority that matches, and the target — one contact,
 * or whoever is on call at the alarm's site. "chain" rules form the escalation order (by position); "copy" rules are told
 * at the first notice and of the all-clear, and are never escalated to.
 */
export const notificationRules = sqliteTable(
  "notification_rules",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    siteId: integer("site_id").references(() => sites.id, { onDelete: "cascade" }),
    minPriority: text("min_priority", { enum: ["critical", "warning", "advisory"] }).notNull(),
    target: text("target", { enum: ["contact", "on-call"] }).notNull(),
    contactId: integer("contact_id").references(() => contacts.id, { onDelete: "cascade" }),
    mode: text("mode", { enum: ["chain", "copy"] }).notNull().default("chain"),
    position: integer("position").notNull().default(0),
    /** Minutes without acknowledgement before the next in the chain is told; null = ESCALATE_AFTER_MIN. */
    escalateAfterMin: integer("escalate_after_min"),
    enabled: integer("enabled", { mode: "boolean" }).notNull().default(true),
    createdAt: integer("created_at").notNull(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [index("notification_rules_site_idx").on(t.siteId)],
);

/** One line of a site's on-call rota: a contact on the given weekdays between local start and end (site time zone). */
export const onCallEntries = sqliteTable(
  "on_call_entries",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    siteId: integer("site_id")
      .notNull()
      .references(() => sites.id, { onDelete: "cascade" }),
    contactId: integer("contact_id")
      .notNull()
      .references(() => contacts.id, { onDelete: "cascade" }),
    /** Order among people on call at the same time: the first is told first, the next on escalation. */
    position: integer("position").notNull().default(0),
    /** ISO weekdays the shift starts on, 1 = Monday … 7 = Sunday. */
    weekdays: text("weekdays", { mode: "json" }).$type<number[]>().notNull(),
    /** Local wall-clock "HH:MM"; an end at or before the start runs past midnight into the next day. */
    startTime: text("start_time").notNull(),
    endTime: text("end_time").notNull(),
    createdAt: integer("created_at").notNull(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [index("on_call_entries_site_idx").on(t.siteId, t.position)],
);

/** The notifier's record of one notice thread: a single alarm, or a digest window at one site. */
export const notifyThreads = sqliteTable(
  "notify_threads",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    /** "alarm:<id>" or "digest:<siteId>:<windowStart>". */
    key: text("key").notNull().unique(),
    kind: text("kind", { enum: ["alarm", "digest"] }).notNull(),
    siteId: integer("site_id").notNull(),
    priority: text("priority", { enum: ["critical", "warning", "advisory"] }).notNull(),
    windowStart: integer("window_start").notNull(),
    /** Digest: alarms raised at the site before this are held for the next digest. */
    windowEnd: integer("window_end"),
    /** Escalation steps taken (0 = only the first notice). */
    level: integer("level").notNull().default(0),
    lastStepAt: integer("last_step_at").notNull(),
    nextStepAt: integer("next_step_at"),
    /** Every contact told so far (first notice, escalations, re-alarms). */
    contactIds: text("contact_ids", { mode: "json" }).$type<number[]>().notNull(),
    reAlarmSeenAt: integer("re_alarm_seen_at"),
    /** Set once the all-clear was queued (or found unnecessary): the thread is finished. */
    resolvedAt: integer("resolved_at"),
    createdAt: integer("created_at").notNull(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [index("notify_threads_open_idx").on(t.resolvedAt, t.siteId)],
);

/** Alarms the notifier has handled, and the thread each belongs to. */
export const notifyAlarms = sqliteTable(
  "notify_alarms",
  {
    alarmId: integer("alarm_id").primaryKey(),
    threadId: integer("thread_id")
      .notNull()
      .references(() => notifyThreads.id, { onDelete: "cascade" }),
    siteId: integer("site_id").notNull(),
    handledAt: integer("handled_at").notNull(),
  },
  (t) => [index("notify_alarms_thread_idx").on(t.threadId)],
);

/** Mail waiting for, or handed to, the SMTP server: one row per message and recipient, never enqueued twice. */
export const mailOutbox = sqliteTable(
  "mail_outbox",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    /** Idempotency key, e.g. alarm:12:raise:0:to:3, alarm:12:resolved:to:3, digest:2:1711760400000:raise:0:to:3. */
    key: text("key").notNull().unique(),
    kind: text("kind", { enum: ["raise", "escalation", "re-alarm", "resolved", "digest", "digest-escalation", "digest-resolved", "report", "test"] }).notNull(),
    priority: text("priority", { enum: ["critical", "warning", "advisory"] }),
    siteId: integer("site_id"),
    alarmId: integer("alarm_id"),
    threadId: integer("thread_id"),
    contactId: integer("contact_id"),
    toAddress: text("to_address").notNull(),
    toName: text("to_name").notNull().default(""),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html").notNull(),
    /** Derived from the key (and this database's mail instance id): a resend after a crash carries the same one. */
    messageId: text("message_id").notNull().unique(),
    status: text("status", { enum: ["pending", "sending", "sent", "failed"] }).notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    nextAttemptAt: integer("next_attempt_at").notNull(),
    claimToken: text("claim_token"),
    claimedAt: integer("claimed_at"),
    sentAt: integer("sent_at"),
    /** The id the SMTP server gave the message in its reply, when it gave one. */
    serverMessageId: text("server_message_id"),
    serverResponse: text("server_response"),
    lastError: text("last_error"),
    createdAt: integer("created_at").notNull(),
    updatedAt: integer("updated_at").notNull(),
  },
  (t) => [
    index("mail_outbox_due_idx").on(t.status, t.nextAttemptAt),
    index("mail_outbox_alarm_idx").on(t.alarmId),
    index("mail_outbox_created_idx").on(t.createdAt),
  ],
);

/** What the built-in SMTP fake received (the demo's mailbox). */
export const mailReceived = sqliteTable(
  "mail_received",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    receivedAt: integer("received_at").notNull(),
    messageId: text("message_id"),
    /** An earlier message with the same Message-ID: this one is a duplicate delivery. */
    duplicateOf: integer("duplicate_of"),
    envelopeFrom: text("envelope_from").notNull().default(""),
    envelopeTo: text("envelope_to", { mode: "json" }).$type<string[]>().notNull(),
    fromText: text("from_text").notNull().default(""),
    toText: text("to_text").notNull().default(""),
    subject: text("subject").notNull().default(""),
    text: text("text").notNull().default(""),
    html: text("html"),
    headers: text("headers", { mode: "json" }).$type<[string, string][]>().notNull(),
    size: integer("size").notNull(),
    remoteAddress: text("remote_address").notNull().default(""),
  },
  (t) => [index("mail_received_message_id_idx").on(t.messageId), index("mail_received_at_idx").on(t.receivedAt)],
);

export type ContactRow = typeof contacts.$inferSelect;
export type NotificationRuleRow = typeof notificationRules.$inferSelect;
export type OnCallEntryRow = typeof onCallEntries.$inferSelect;
export type NotifyThreadRow = typeof notifyThreads.$inferSelect;
export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type MailReceivedRow = typeof mailReceived.$inferSelect;
