"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useRef, useState, type FormEvent } from "react";
import { buttonClass, CheckboxGroupField, FormAlert, FormPanel, SelectField, TextField, useSchemaForm } from "@/components/admin/form-kit";
import { displayLinkQueries } from "@/components/queries/live";
import type { DisplayLinkDto } from "@/shared/display-link-schema";
import { createDisplayLinkAction, revokeDisplayLinkAction, type CreatedDisplayLink } from "@/lib/actions/admin-displays";
import { displayLinkInputSchema, type DisplayLinkInput } from "@/shared/display-link-schema";
import { pressureLabel, pressureUnits, temperatureLabel, temperatureUnits } from "@/shared/units";

/** "2025-03-14 14:05 UTC": the same on the server and in every browser. */
function utc(ms: number | null): string {
  if (ms == null) return "—";
  return `${new Date(ms).toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

function CreatedLink({ created, onDone }: { created: CreatedDisplayLink; onDone: () => void }) {
  const [copied, setCopied] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);
  async function copy() {
    try {
      await navigator.clipboard.writeText(created.url);
      setCopied("Copied.");
    } catch {
      input.current?.select();
      setCopied("Select the address and copy it with the keyboard.");
    }
  }
  return (
    <section aria-labelledby="created-link-title" className="space-y-2 rounded border-2 border-ink bg-raised p-3" data-testid="created-display-link">
      <h2 id="created-link-title" className="font-semibold">
        Display link for “{created.link.label}” created
      </h2>
      <p className="text-sm">
        Open this address on the wall screen. <strong>Copy it now: it is shown only once</strong> (Airkeep keeps only a hash of it).
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label htmlFor="created-link-url" className="sr-only">
          Display link address
        </label>
        <input
          id="created-link-url"
          ref={input}
          readOnly
          value={created.url}
          onFocus={(e) => e.currentTarget.select()}
          className="num min-w-0 flex-1 rounded border border-line bg-white px-2 py-1 text-sm"
          data-testid="display-link-url"
        />
        <button type="button" className={buttonClass.primary} onClick={copy}>
          Copy
        </button>
        <button type="button" className={buttonClass.secondary} onClick={onDone}>
          Done
        </button>
      </div>
      <p role="status" className="min-h-5 text-sm text-muted">
        {copied}
      </p>
    </section>
  );
}

function RevokeButton({ link, onRevoked }: { link: DisplayLinkDto; onRevoked: (message: string) => Promise<void> }) {
  const [confirming, setConfirming] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (link.revokedAt != null) return null;
  async function revoke() {
    setPending(true);
    setError(null);
    try {
      const r = await revokeDisplayLinkAction({ id: link.id });
      if (r.ok) await onRevoked(`“${link.label}” revoked. Its screen now shows the revoked page.`);
      else setError(r.error);
    } catch {
      setError("The server could not be reached.");
    } finally {
      setPending(false);
      setConfirming(false);
    }
  }
  return (
    <div className="flex flex-wrap items-center gap-1">
      {confirming ? (
        <>
          <button type="button" className={buttonClass.small} onClick={revoke} disabled={pending} aria-busy={pending || undefined}>
            Confirm revoke
          </button>
          <button type="button" className={buttonClass.small} onClick={() => setConfirming(false)} disabled={pending}>
            Keep
          </button>
        </>
      ) : (
        <button type="button" className={buttonClass.small} onClick={() => setConfirming(true)} aria-label={`Revoke ${link.label}`}>
          Revoke
        </button>
      )}
      {error && (
        <span role="alert" className="text-xs font-semibold text-ink">
          {error}
        </span>
      )}
    </div>
  );
}

export function DisplayLinksAdmin({
  sites,
  limitedToSites,
}: {
  sites: { value: number; label: string }[];
  limitedToSites: boolean;
}) {
  const client = useQueryClient();
  const links = useQuery(displayLinkQueries.list());
  const [creating, setCreating] = useState(false);
  const [created, setCreated] = useState<CreatedDisplayLink | null>(null);
  const [status, setStatus] = useState<string | null>(null);
  const initial: DisplayLinkInput = { label: "", siteIds: [], theme: "dark", pressureUnit: "bar", temperatureUnit: "C" };
  const form = useSchemaForm<DisplayLinkInput>({ schema: displayLinkInputSchema, initial });
  const refresh = () => client.invalidateQueries({ queryKey: displayLinkQueries.list().queryKey });

  async function submit(e: FormEvent) {
    e.preventDefault();
    const result = await form.submit(createDisplayLinkAction);
    if (!result) return;
    setCreated(result);
    setCreating(false);
    form.reset(initial);
    await refresh();
  }

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <h1 className="text-2xl font-semibold">Display links</h1>
        {!creating && !created && (
          <button type="button" className={buttonClass.primary} onClick={() => setCreating(true)}>
            New display link
          </button>
        )}
      </div>
      <p className="max-w-3xl text-sm text-muted">
        A display link opens the board on a wall screen without signing in: read-only, board only, with the safety notice.
        Revoke a link when its screen is retired or the address may have leaked.
      </p>

      {created && <CreatedLink created={created} onDone={() => setCreated(null)} />}

      {creating && (
        <FormPanel title="New display link">
          <form id={form.id} onSubmit={submit} noValidate className="grid max-w-2xl gap-3">
            <FormAlert message={form.formError} />
            <TextField form={form} name="label" label="Label" hint="Where the screen is, e.g. “Control room east wall”." maxLength={80} />
            <CheckboxGroupField
              form={form}
              name="siteIds"
              label="Sites shown"
              hint={limitedToSites ? "Choose one or more of your sites." : "Leave all unticked to show every site, including sites added later."}
              options={sites}
            />
            <div className="grid gap-3 sm:grid-cols-3">
              <SelectField
                form={form}
                name="theme"
                label="Theme"
                hint="Dark suits a control room at night."
                options={[
                  { value: "dark", label: "Dark (control room)" },
                  { value: "light", label: "Light" },
                ]}
              />
              <SelectField form={form} name="pressureUnit" label="Pressure unit" options={pressureUnits.map((u) => ({ value: u, label: pressureLabel(u) }))} />
              <SelectField
                form={form}
                name="temperatureUnit"
                label="Temperature unit"
                options={temperatureUnits.map((u) => ({ value: u, label: temperatureLabel(u) }))}
              />
            </div>
            <div className="flex gap-2">
              <button type="submit" className={buttonClass.primary} disabled={form.pending} aria-busy={form.pending || undefined}>
                {form.pending ? "Creating…" : "Create link"}
              </button>
              <button
                type="button"
                className={buttonClass.secondary}
                onClick={() => {
                  setCreating(false);
                  form.reset(initial);
                }}
              >
                Cancel
              </button>
            </div>
          </form>
        </FormPanel>
      )}

      <p role="status" className="min-h-5 text-sm text-muted">
        {status}
      </p>

      {links.error && <p role="alert">{links.error.message}</p>}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[48rem] border-collapse text-sm" data-testid="display-links-table">
          <caption className="sr-only">Display links</caption>
          <thead>
            <tr className="border-b border-line text-left text-xs text-muted">
              <th scope="col" className="py-1 pr-3">Label</th>
              <th scope="col" className="py-1 pr-3">Sites</th>
              <th scope="col" className="py-1 pr-3">Created</th>
              <th scope="col" className="py-1 pr-3">Last used</th>
              <th scope="col" className="py-1 pr-3">Status</th>
              <th scope="col" className="py-1">
                <span className="sr-only">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {(links.data ?? []).map((l) => (
              <tr key={l.id} className="border-b border-line align-top" data-testid="display-link-row" data-link-id={l.id}>
                <th scope="row" className="py-1.5 pr-3 text-left font-semibold">
                  {l.label}
                </th>
                <td className="py-1.5 pr-3">{l.siteNames ? l.siteNames.join(", ") : "Every site"}</td>
                <td className="num py-1.5 pr-3">
                  {utc(l.createdAt)}
                  <span className="block font-sans text-xs text-muted">by {l.createdByName}</span>
                </td>
                <td className="num py-1.5 pr-3">{l.lastUsedAt ? utc(l.lastUsedAt) : "Never"}</td>
                <td className="py-1.5 pr-3">
                  {l.revokedAt != null ? (
                    <span className="hatch-stale inline-block rounded border border-dashed border-faint px-1.5 text-xs font-semibold text-muted">
                      Revoked {utc(l.revokedAt)}
                    </span>
                  ) : (
                    <span className="inline-block rounded border border-line px-1.5 text-xs font-semibold">Active</span>
                  )}
                </td>
                <td className="py-1.5">
                  <RevokeButton
                    link={l}
                    onRevoked={async (message) => {
                      await refresh();
                      setStatus(message);
                    }}
                  />
                </td>
              </tr>
            ))}
            {links.data?.length === 0 && (
              <tr>
                <td colSpan={6} className="py-3 text-muted">
                  No display links yet.
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
