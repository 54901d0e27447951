"use client";

import { useId } from "react";
import type { z } from "zod";
import {
  acknowledgeAlarmsAction,
  outOfServiceAction,
  returnToServiceAction,
  shelveAlarmsAction,
  type AlarmActionOutcome,
} from "@/lib/actions/alarms";
import type { ActionResult } from "@/lib/api/action";
import { acknowledgeSchema, MAX_SHELVE_MINUTES, outOfServiceSchema, returnToServiceSchema, shelveSchema } from "@/shared/alarm-schema";
import { formatDuration } from "@/shared/alarm-text";
import { buttonClass, FieldError, FormAlert, FormPanel, SelectField, useSchemaForm } from "../admin/form-kit";
import type { AlarmActionKind } from "./format";

export const shelveChoices = [15, 30, 60, 120, 240, 480, 720, 1440].filter((m) => m <= MAX_SHELVE_MINUTES);

/** One tap fills the comment: what on-call people most often say when they acknowledge from a phone. */
export const quickPhrases = ["On my way", "Checking remotely", "Known cause, being handled", "Station informed"] as const;

type Values = { comment: string; minutes: string };

const config: Record<
  AlarmActionKind,
  {
    title: (n: number) => string;
    submit: string;
    commentLabel: string;
    commentRequired: boolean;
    schema: z.ZodType;
    toInput: (ids: number[], v: Values) => unknown;
    action: (input: unknown) => Promise<ActionResult<AlarmActionOutcome>>;
    done: (n: number) => string;
  }
> = {
  acknowledge: {
    title: (n) => (n === 1 ? "Acknowledge alarm" : `Acknowledge ${n} alarms`),
    submit: "Acknowledge",
    commentLabel: "Comment (optional: what you found or did)",
    commentRequired: false,
    schema: acknowledgeSchema,
    toInput: (ids, v) => ({ ids, comment: v.comment }),
    action: acknowledgeAlarmsAction,
    done: (n) => `Acknowledged ${n} alarm${n === 1 ? "" : "s"}.`,
  },
  shelve: {
    title: (n) => (n === 1 ? "Shelve alarm" : `Shelve ${n} alarms`),
    submit: "Shelve",
    commentLabel: "Comment (why it may be set aside)",
    commentRequired: true,
    schema: shelveSchema,
    toInput: (ids, v) => ({ ids, comment: v.comment, minutes: v.minutes }),
    action: shelveAlarmsAction,
    done: (n) => `Shelved ${n} alarm${n === 1 ? "" : "s"}.`,
  },
  "out-of-service": {
    title: () => "Take alarm out of service",
    submit: "Take out of service",
    commentLabel: "Reason (e.g. sensor awaiting replacement)",
    commentRequired: true,
    schema: outOfServiceSchema,
    toInput: (ids, v) => ({ id: ids[0], reason: v.comment }),
    action: outOfServiceAction,
    done: () => "Alarm taken out of service.",
  },
  "return-to-service": {
    title: () => "Return alarm to service",
    submit: "Return to service",
    commentLabel: "Comment (what was put right)",
    commentRequired: true,
    schema: returnToServiceSchema,
    toInput: (ids, v) => ({ id: ids[0], comment: v.comment }),
    action: returnToServiceAction,
    done: () => "Alarm returned to service.",
  },
};

/**
 * The form for one operator action on one or more alarms: a required comment (and for shelving, how long),
 * validated with the same shared schema the server action uses.
 */
export function AlarmActionPanel({
  kind,
  ids,
  names,
  onDone,
  onCancel,
}: {
  kind: AlarmActionKind;
  ids: number[];
  /** What the alarms are, for the person to check before confirming. */
  names: string[];
  onDone: (outcome: AlarmActionOutcome, message: string) => void;
  onCancel: () => void;
}) {
  const c = config[kind];
  const form = useSchemaForm<Values>({
    schema: c.schema,
    initial: { comment: "", minutes: "60" },
    toInput: (v) => c.toInput(ids, v),
  });
  const commentId = form.fieldId("comment");
  const hintId = useId();
  const commentError = form.errorOf("comment") ?? form.errorOf("reason" as keyof Values & string);
  const idsError = form.errorOf("ids" as keyof Values & string) ?? form.errorOf("id" as keyof Values & string);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    const outcome = await form.submit(c.action);
    if (outcome) onDone(outcome, c.done(outcome.done.length));
  }

  return (
    <FormPanel title={c.title(ids.length)}>
      <form id={form.id} onSubmit={submit} noValidate className="space-y-2" data-testid="alarm-action-form" data-action={kind}>
        <ul className="max-h-32 list-disc overflow-y-auto pl-5 text-sm">
          {names.map((n, i) => (
            <li key={i}>{n}</li>
          ))}
        </ul>
        {kind === "shelve" && (
          <SelectField
            form={form}
            name="minutes"
            label="Shelve for"
            hint={`Shelving ends by itself; at most ${formatDuration(MAX_SHELVE_MINUTES * 60_000)}.`}
            options={shelveChoices.map((m) => ({ value: String(m), label: formatDuration(m * 60_000) }))}
            className="max-w-xs"
          />
        )}
        <div>
          <label htmlFor={commentId} className="block text-xs font-semibold text-muted">
            {c.commentLabel}
          </label>
          <textarea
            id={commentId}
            name="comment"
            rows={2}
            maxLength={500}
            required={c.commentRequired}
            value={form.values.comment}
            onChange={(e) => form.set("comment", e.target.value)}
            aria-invalid={commentError ? true : undefined}
            aria-describedby={[hintId, commentError ? `${commentId}-error` : ""].filter(Boolean).join(" ")}
            className={`mt-0.5 w-full max-w-2xl rounded border bg-white px-2 py-1 text-sm text-ink aria-[invalid=true]:border-2 ${
              commentError ? "border-ink" : "border-line"
            }`}
          />
          {kind === "acknowledge" && (
            <div className="mt-1 flex flex-wrap gap-1" role="group" aria-label="Quick phrases">
              {quickPhrases.map((phrase) => (
                <button key={phrase} type="button" className={buttonClass.small} onClick={() => form.set("comment", phrase)}>
                  {phrase}
                </button>
              ))}
            </div>
          )}
          <p id={hintId} className="text-xs text-muted">
            {c.commentRequired ? "Required. " : ""}It is kept with the alarm and in the event log.
          </p>
          <FieldError id={`${commentId}-error`} message={commentError} />
          <FieldError id={`${commentId}-ids-error`} message={idsError} />
        </div>
        <FormAlert message={form.formError} />
        <div className="flex gap-2 pt-1">
          <button type="submit" className={buttonClass.primary} disabled={form.pending} aria-busy={form.pending || undefined}>
            {form.pending ? "Saving…" : c.submit}
          </button>
          <button type="button" className={buttonClass.secondary} onClick={onCancel}>
            Cancel
          </button>
        </div>
      </form>
    </FormPanel>
  );
}
