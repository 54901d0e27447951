import { z } from "zod";
import type { Priority } from "./alarm-rules";

// What the admin mailbox screen reads: the built-in SMTP fake's received messages and the outbox queue.

export type MailboxItemDto = {
  id: number;
  receivedAt: number;
  messageId: string | null;
  /** Id of an earlier message with the same Message-ID (a duplicate delivery), if any. */
  duplicateOf: number | null;
  from: string;
  to: string;
  subject: string;
  size: number;
};

export type MailboxMessageDto = MailboxItemDto & {
  envelopeFrom: string;
  envelopeTo: string[];
  text: string;
  html: string | null;
  headers: [string, string][];
};

export type MailboxPage = { items: MailboxItemDto[]; total: number };

export const outboxStatuses = ["pending", "sending", "sent", "failed"] as const;
export type OutboxStatus = (typeof outboxStatuses)[number];

export type OutboxItemDto = {
  id: number;
  key: string;
  kind: string;
  priority: Priority | null;
  alarmId: number | null;
  toAddress: string;
  toName: string;
  subject: string;
  messageId: string;
  status: OutboxStatus;
  attempts: number;
  nextAttemptAt: number;
  sentAt: number | null;
  serverMessageId: string | null;
  lastError: string | null;
  createdAt: number;
};

export type OutboxSummary = { items: OutboxItemDto[]; counts: Record<OutboxStatus, number> };

export const mailboxQuerySchema = z.object({
  limit: z.coerce.number().int().min(1).max(500).default(100),
  offset: z.coerce.number().int().min(0).default(0),
  q: z.string().trim().max(200).default(""),
});
export type MailboxQuery = z.infer<typeof mailboxQuerySchema>;
