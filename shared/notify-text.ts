import type { AlarmState } from "./alarm-lifecycle";
import { signalInfo, type AlarmSignal, type Priority } from "./alarm-rules";
import { parseLimitKey } from "./alarm-text";
import { airAlarmCautions, airAlarmKindOf } from "./air-quality-alarms";
import { cautions, SAFETY_NOTICE } from "./safety";
import { tripCodeInfo } from "./trip-codes";
import { formatPressure, formatTemperature, type UnitPreference } from "./units";

// The words of Airkeep's alarm e-mails: subject, plain text and a simple HTML part. Pure; the notifier supplies the
// alarm as it is in the database at the moment the message is written.

export type NoticeAlarm = {
  id: number;
  key: string;
  priority: Priority;
  signal: string | null;
  title: string;
  compressorName: string;
  siteName: string;
  timeZone: string;
  state: AlarmState;
  active: boolean;
  raisedAt: number;
  clearedAt: number | null;
  value: number | null;
  limitValue: number | null;
  tripCode: number | null;
  chattering: boolean;
  ackAt: number | null;
  ackByName: string | null;
  ackComment: string | null;
  /** Server time data last arrived from the compressor (null: never). */
  lastDataAt: number | null;
};

export type MailContext = {
  now: number;
  /** NEXTAUTH_URL: where the links point. */
  baseUrl: string;
  units: UnitPreference;
  recipientName: string;
};

export type ComposedMail = { subject: string; text: string; html: string };

export const priorityWord: Record<Priority, string> = { critical: "Critical", warning: "Warning", advisory: "Advisory" };

/** Data older than this, at the moment of writing, is called out as possibly stale. */
export const STALE_DATA_MS = 2 * 60_000;

const isSignal = (s: string | null): s is AlarmSignal => s !== null && s in signalInfo;

/** The alarm's direction from its key (signal.direction.priority). */
export function alarmDirection(key: string): "high" | "low" | null {
  return parseLimitKey(key)?.direction ?? null;
}

/** The trade's cautions that matter for this alarm. */
export function cautionsFor(a: Pick<NoticeAlarm, "key" | "signal" | "tripCode">): string[] {
  const out = new Set<string>();
  const signal = parseLimitKey(a.key)?.signal ?? a.signal ?? "";
  const dir = alarmDirection(a.key);
  if (/^(finalStageC|stage\dC)$/.test(signal)) out.add(cautions.hotStage);
  if (signal === "intakeC") out.add(cautions.intakeCo);
  if (signal === "purifierC") out.add(cautions.spentCartridge);
  if (signal === "oilBar") out.add(cautions.oilCarryOver);
  if (signal === "deliveryBar" && dir === "high") out.add(cautions.cylinderFill);
  const airKind = airAlarmKindOf(a.key);
  if (airKind) for (const c of airAlarmCautions(airKind)) out.add(c);
  if (a.key === "trip") {
    const info = tripCodeInfo(a.tripCode);
    if (info?.category === "temperature") out.add(cautions.hotStage);
    if (info?.key === "delivery-overpressure") out.add(cautions.cylinderFill);
    if (info?.key === "purifier-lockout") out.add(cautions.spentCartridge);
    if (info?.key === "condensate-drain") {
      out.add(cautions.oilCarryOver);
      out.add(cautions.spentCartridge);
    }
    if (info?.key === "oil-pressure-low") out.add(cautions.oilCarryOver);
  }
  return [...out];
}

/** A value of the alarm's signal in the reader's units. */
export function formatSignal(signal: string | null, value: number | null, units: UnitPreference): string | null {
  if (value == null || !isSignal(signal)) return value == null ? null : String(value);
  return signalInfo[signal].kind === "pressure" ? formatPressure(value, units.pressureUnit) : formatTemperature(value, units.temperatureUnit);
}

/** "2025-03-30 02:15:07 BST" in the site's time zone. */
export function formatLocal(ms: number, timeZone: string): string {
  const parts: Record<string, string> = {};
  for (const p of new Intl.DateTimeFormat("en-GB", {
    timeZone,
    hourCycle: "h23",
    year: "numeric",
    month: "2-digit",
    day: "2-digit",
    hour: "2-digit",
    minute: "2-digit",
    second: "2-digit",
    timeZoneName: "short",
  }).formatToParts(new Date(ms)))
    parts[p.type] = p.value;
  return `${parts.year}-${parts.month}-${parts.day} ${parts.hour}:${parts.minute}:${parts.second} ${parts.timeZoneName ?? timeZone}`;
}

/** "42 s", "4 min 10 s", "3 h 12 min", "2 d 4 h". */
export function formatAge(ms: number): string {
  const s = Math.max(0, Math.round(ms / 1000));
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return s % 60 ? `${m} min ${s % 60} s` : `${m} min`;
  const h = Math.floor(m / 60);
  if (h < 24) return m % 60 ? `${h} h ${m % 60} min` : `${h} h`;
  const d = Math.floor(h / 24);
  return h % 24 ? `${d} d ${h % 24} h` : `${d} d`;
}

export function alarmLink(baseUrl: string, id: number): string {
  return `${baseUrl.replace(/\/+$/, "")}/alarms?id=${id}`;
}

export function escapeHtml(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#39;");
}

// ---- Pieces ---------------------------------------------------------------------------------------

type Line = { label: string; value: string };

function readingLines(a: NoticeAlarm, ctx: MailContext): Line[] {
  const lines: Line[] = [];
  const value = formatSignal(a.signal, a.value, ctx.units);
  const limit = formatSignal(a.signal, a.limitValue, ctx.units);
  const dir = alarmDirection(a.key);
  if (value !== null) {
    const against =
      limit !== null ? `, ${dir === "low" ? "below" : dir === "high" ? "above" : "against"} the ${priorityWord[a.priority].toLowerCase()} limit of ${limit}` : "";
    lines.push({ label: "Value", value: `${value}${against}` });
  } else if (limit !== null) {
    lines.push({ label: "Limit", value: limit });
  }
  if (a.key === "trip" && a.tripCode != null) {
    const info = tripCodeInfo(a.tripCode);
    lines.push({ label: "Trip", value: info ? `${info.code} ${info.label}: ${info.description}` : `code ${a.tripCode} (not in Airkeep's table)` });
  }
  lines.push({
    label: a.key === "comms" ? "Lost at" : "Reading taken",
    value: `${formatLocal(a.raisedAt, a.timeZone)}, ${formatAge(ctx.now - a.raisedAt)} before this message was written`,
  });
  if (a.lastDataAt == null) {
    lines.push({ label: "Latest data", value: "none received from this compressor" });
  } else {
    const age = ctx.now - a.lastDataAt;
    const stale = age > STALE_DATA_MS ? ". The unit may be offline: what you see may be out of date" : "";
    lines.push({ label: "Latest data", value: `${formatLocal(a.lastDataAt, a.timeZone)} (${formatAge(age)} old when this was written)${stale}` });
  }
  if (a.chattering) lines.push({ label: "Note", value: "this alarm is chattering (raised repeatedly in a short time)" });
  return lines;
}

function stateLines(a: NoticeAlarm): Line[] {
  const lines: Line[] = [];
  if (a.clearedAt != null && !a.active) lines.push({ label: "Cleared", value: formatLocal(a.clearedAt, a.timeZone) });
  if (a.ackAt != null) {
    const who = a.ackByName ? ` by ${a.ackByName}` : "";
    const comment = a.ackComment ? `: “${a.ackComment}”` : "";
    lines.push({ label: "Acknowledged", value: `${formatLocal(a.ackAt, a.timeZone)}${who}${comment}` });
  } else if (a.state === "cleared-unacknowledged") {
    lines.push({ label: "Acknowledged", value: "not yet: the alarm still needs acknowledging" });
  }
  return lines;
}

function textBlock(lines: Line[]): string {
  const width = Math.max(...lines.map((l) => l.label.length), 0) + 2;
  return lines.map((l) => `${`${l.label}:`.padEnd(width)}${l.value}`).join("\n");
}

function htmlTable(lines: Line[]): string {
  return `<table style="border-collapse:collapse;font-size:14px">${lines
    .map(
      (l) =>
        `<tr><th style="text-align:left;vertical-align:top;padding:2px 12px 2px 0;color:#555;font-weight:600">${escapeHtml(l.label)}</th><td style="padding:2px 0">${escapeHtml(l.value)}</td></tr>`,
    )
    .join("")}</table>`;
}

function footerText(cautionList: string[]): string {
  const parts: string[] = [];
  if (cautionList.length) parts.push(`Cautions:\n${cautionList.map((c) => `- ${c}`).join("\n")}`);
  parts.push(`Safety: ${SAFETY_NOTICE}`);
  parts.push("You receive this because you are a notification contact in Airkeep (set up under Admin → Contacts).");
  return parts.join("\n\n");
}

function footerHtml(cautionList: string[]): string {
  const c = cautionList.length
    ? `<p style="margin:12px 0 4px;font-weight:600">Cautions</p><ul style="margin:0;padding-left:20px">${cautionList
        .map((x) => `<li>${escapeHtml(x)}</li>`)
        .join("")}</ul>`
    : "";
  return `${c}<p style="margin:12px 0;padding:8px;border:1px solid #999;background:#f2f2f2"><strong>Safety:</strong> ${escapeHtml(
    SAFETY_NOTICE,
  )}</p><p style="color:#666;font-size:12px">You receive this because you are a notification contact in Airkeep (set up under Admin → Contacts).</p>`;
}

function htmlPage(title: string, body: string): string {
  return `<!doctype html><html><head><meta charset="utf-8"><title>${escapeHtml(title)}</title></head><body style="font-family:Arial,Helvetica,sans-serif;color:#111;background:#fff;max-width:640px">${body}</body></html>`;
}

function badge(text: string): string {
  return `<span style="display:inline-block;border:2px solid #111;padding:1px 6px;font-weight:700;letter-spacing:.03em">${escapeHtml(text)}</span>`;
}

function button(href: string, label: string): string {
  return `<p style="margin:16px 0"><a href="${escapeHtml(href)}" style="display:inline-block;background:#111;color:#fff;padding:8px 14px;text-decoration:none;font-weight:600">${escapeHtml(label)}</a></p>`;
}

// ---- Single-alarm notices --------------------------------------------------------------------------

export type AlarmMailKind = "raise" | "escalation" | "re-alarm" | "resolved";

export type AlarmMailExtra = {
  /** Escalation: minutes the alarm has waited for an acknowledgement. */
  waitedMin?: number;
  /** Escalation: names of those told before. */
  toldBefore?: string[];
};

export function composeAlarmMail(kind: AlarmMailKind, a: NoticeAlarm, ctx: MailContext, extra: AlarmMailExtra = {}): ComposedMail {
  const where = `${a.compressorName}, ${a.siteName}`;
  const p = priorityWord[a.priority];
  const head =
    kind === "escalation"
      ? `[${p}] Escalated, not acknowledged`
      : kind === "re-alarm"
        ? `[${p}] Announced again`
        : kind === "resolved"
          ? `[Cleared] ${p}`
          : `[${p}]`;
  const subject = `${head} ${where}: ${a.title}`;
  const link = alarmLink(ctx.baseUrl, a.id);

  const intro: string[] = [];
  if (kind === "raise") {
    intro.push(`${p} alarm at ${a.siteName}: ${a.title} on ${a.compressorName}.`);
    if (!a.active) intro.push("The condition has cleared since, but the alarm still needs acknowledging.");
  }
  if (kind === "escalation") {
    const waited = extra.waitedMin != null ? ` for ${extra.waitedMin} min` : "";
    const before = extra.toldBefore?.length ? ` ${extra.toldBefore.join(", ")} ${extra.toldBefore.length > 1 ? "were" : "was"} told first.` : "";
    intro.push(`This ${p.toLowerCase()} alarm has not been acknowledged${waited}, so it now comes to you.${before}`);
    intro.push(`${a.title} on ${a.compressorName} at ${a.siteName}.`);
  }
  if (kind === "re-alarm")
    intro.push(`${a.title} on ${a.compressorName} at ${a.siteName} is announced again: the condition is still present and the alarm needs acknowledging.`);
  if (kind === "resolved") {
    intro.push(
      a.state === "normal"
        ? `${a.title} on ${a.compressorName} at ${a.siteName} has cleared and the alarm is back to normal.`
        : `${a.title} on ${a.compressorName} at ${a.siteName} has cleared. The alarm still needs acknowledging.`,
    );
  }

  const lines: Line[] = [
    { label: "Priority", value: p },
    { label: "Site", value: a.siteName },
    { label: "Compressor", value: a.compressorName },
    { label: "What", value: a.title },
    ...readingLines(a, ctx),
    ...(kind === "resolved" || a.ackAt != null || !a.active ? stateLines(a) : []),
  ];
  const cautionList = kind === "resolved" ? [] : cautionsFor(a);
  const action = kind === "resolved" ? "Open the alarm" : "Open and acknowledge the alarm";

  const text = [
    `Hello ${ctx.recipientName},`,
    intro.join(" "),
    textBlock(lines),
    `${action}: ${link}`,
    footerText(cautionList),
  ].join("\n\n");
  const html = htmlPage(
    subject,
    `<p>${badge(kind === "resolved" ? `Cleared · ${p}` : p)}</p><p>Hello ${escapeHtml(ctx.recipientName)},</p><p>${escapeHtml(
      intro.join(" "),
    )}</p>${htmlTable(lines)}${button(link, action)}<p style="font-size:12px;color:#555">${escapeHtml(link)}</p>${footerHtml(cautionList)}`,
  );
  return { subject, text: `${text}\n`, html };
}

// ---- Digest ----------------------------------------------------------------------------------------

export type DigestMailKind = "digest" | "digest-escalation" | "digest-again" | "digest-resolved";

export type DigestInput = {
  siteId: number;
  siteName: string;
  timeZone: string;
  windowMin: number;
  /** The alarms this digest is about. */
  alarms: NoticeAlarm[];
  /** Alarms at the site in the same window that were already sent one by one. */
  alreadySent: NoticeAlarm[];
  /** Escalation: minutes waited and who was told before. */
  waitedMin?: number;
  toldBefore?: string[];
};

const byUrgency = (x: NoticeAlarm, y: NoticeAlarm) => {
  const rank: Record<Priority, number> = { critical: 0, warning: 1, advisory: 2 };
  return rank[x.priority] - rank[y.priority] || x.raisedAt - y.raisedAt || x.id - y.id;
};

export function highestPriority(list: readonly { priority: Priority }[]): Priority {
  if (list.some((a) => a.priority === "critical")) return "critical";
  if (list.some((a) => a.priority === "warning")) return "warning";
  return "advisory";
}

function digestLine(a: NoticeAlarm, ctx: MailContext): string {
  const value = formatSignal(a.signal, a.value, ctx.units);
  const limit = formatSignal(a.signal, a.limitValue, ctx.units);
  const reading = value !== null ? ` — ${value}${limit !== null ? ` (limit ${limit})` : ""}` : "";
  return `${priorityWord[a.priority]}: ${a.compressorName}: ${a.title}${reading}; raised ${formatLocal(a.raisedAt, a.timeZone)}, ${formatAge(
    ctx.now - a.raisedAt,
  )} ago`;
}

export function composeDigestMail(kind: DigestMailKind, d: DigestInput, ctx: MailContext): ComposedMail {
  const alarms = [...d.alarms].sort(byUrgency);
  const p = priorityWord[highestPriority(alarms)];
  const n = alarms.length;
  const subject =
    kind === "digest-resolved"
      ? `[Cleared] ${n} alarm${n === 1 ? "" : "s"} at ${d.siteName} ${n === 1 ? "has" : "have"} cleared`
      : kind === "digest-escalation"
        ? `[${p}] Escalated, not acknowledged: ${n} alarm${n === 1 ? "" : "s"} at ${d.siteName}`
        : kind === "digest-again"
          ? `[${p}] Announced again: ${n} alarm${n === 1 ? "" : "s"} at ${d.siteName}`
          : `[${p}] ${n} alarm${n === 1 ? "" : "s"} at ${d.siteName} (many alarms in ${d.windowMin} min)`;
  const siteLink = `${ctx.baseUrl.replace(/\/+$/, "")}/alarms?site=${d.siteId}`;
  const intro =
    kind === "digest-resolved"
      ? `Every alarm of the earlier digest for ${d.siteName} has cleared.`
      : kind === "digest-escalation"
        ? `These alarms at ${d.siteName} have not been acknowledged${d.waitedMin != null ? ` for ${d.waitedMin} min` : ""}, so they now come to you.${
            d.toldBefore?.length ? ` ${d.toldBefore.join(", ")} ${d.toldBefore.length > 1 ? "were" : "was"} told first.` : ""
          }`
        : kind === "digest-again"
          ? `These alarms of an earlier digest for ${d.siteName} are announced again: the condition is still present and they need acknowledging.`
          : `More alarms than usual were raised at ${d.siteName} within ${d.windowMin} minutes. To avoid a flood of messages they come in one digest; further alarms at this site are collected for the next digest, at most ${d.windowMin} minutes later.`;
  const cautionList = kind === "digest-resolved" ? [] : [...new Set(alarms.flatMap((a) => cautionsFor(a)))];

  const textList = alarms.map((a) => `- ${digestLine(a, ctx)}\n  ${alarmLink(ctx.baseUrl, a.id)}`).join("\n");
  const sentList = d.alreadySent.length
    ? `\n\nAlready sent one by one in the same period:\n${[...d.alreadySent]
        .sort(byUrgency)
        .map((a) => `- ${digestLine(a, ctx)}`)
        .join("\n")}`
    : "";
  const latest = alarms.map((a) => a.lastDataAt).filter((t): t is number => t != null);
  const ageNote = latest.length
    ? `Oldest latest-data time among these compressors: ${formatLocal(Math.min(...latest), d.timeZone)} (${formatAge(ctx.now - Math.min(...latest))} old when this was written).`
    : "No data received from these compressors.";

  const text = [
    `Hello ${ctx.recipientName},`,
    intro,
    `${textList}${sentList}`,
    ageNote,
    `All alarms at ${d.siteName}: ${siteLink}`,
    footerText(cautionList),
  ].join("\n\n");

  const htmlRows = alarms
    .map((a) => {
      const value = formatSignal(a.signal, a.value, ctx.units);
      const limit = formatSignal(a.signal, a.limitValue, ctx.units);
      return `<tr><td style="padding:3px 8px 3px 0;font-weight:700">${escapeHtml(priorityWord[a.priority])}</td><td style="padding:3px 8px 3px 0">${escapeHtml(
        a.compressorName,
      )}</td><td style="padding:3px 8px 3px 0"><a href="${escapeHtml(alarmLink(ctx.baseUrl, a.id))}">${escapeHtml(a.title)}</a></td><td style="padding:3px 8px 3px 0;font-family:monospace">${escapeHtml(
        value ?? "—",
      )}${limit !== null ? ` / ${escapeHtml(limit)}` : ""}</td><td style="padding:3px 0;font-family:monospace">${escapeHtml(formatLocal(a.raisedAt, a.timeZone))}</td></tr>`;
    })
    .join("");
  const html = htmlPage(
    subject,
    `<p>${badge(kind === "digest-resolved" ? "Cleared" : `${p} · digest`)}</p><p>Hello ${escapeHtml(ctx.recipientName)},</p><p>${escapeHtml(intro)}</p>` +
      `<table style="border-collapse:collapse;font-size:14px"><tr style="text-align:left;color:#555"><th>Priority</th><th>Compressor</th><th>What</th><th>Value / limit</th><th>Raised</th></tr>${htmlRows}</table>` +
      (d.alreadySent.length
        ? `<p style="margin-top:12px">Already sent one by one in the same period:</p><ul>${[...d.alreadySent]
            .sort(byUrgency)
            .map((a) => `<li>${escapeHtml(digestLine(a, ctx))}</li>`)
            .join("")}</ul>`
        : "") +
      `<p>${escapeHtml(ageNote)}</p>${button(siteLink, `All alarms at ${d.siteName}`)}${footerHtml(cautionList)}`,
  );
  return { subject, text: `${text}\n`, html };
}

// ---- Test message ----------------------------------------------------------------------------------

export function composeTestMail(ctx: MailContext, sentBy: string): ComposedMail {
  const subject = "[Test] Airkeep can reach you by e-mail";
  const body = `${sentBy} sent this test message from Airkeep's contact list to check that alarm e-mails reach you. Nothing is wrong.`;
  const text = [`Hello ${ctx.recipientName},`, body, footerText([])].join("\n\n");
  const html = htmlPage(subject, `<p>${badge("Test")}</p><p>Hello ${escapeHtml(ctx.recipientName)},</p><p>${escapeHtml(body)}</p>${footerHtml([])}`);
  return { subject, text: `${text}\n`, html };
}
