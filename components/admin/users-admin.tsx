"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { inviteUser, updateUser } from "@/lib/actions/admin-users";
import { DataTable, type DataColumn } from "@/components/data-table";
import { adminQueries } from "@/components/queries/admin";
import { roleLabels, roles, type Role } from "@/shared/roles";
import type { SiteDto } from "@/shared/site-schema";
import { userInviteSchema, userUpdateSchema, type UserDto } from "@/shared/user-schema";
import {
  buttonClass,
  CheckboxField,
  CheckboxGroupField,
  FormActions,
  FormAlert,
  FormPanel,
  SelectField,
  StatusLine,
  TextField,
  type FormApi,
  useSchemaForm,
} from "./form-kit";
import { useAdminRefresh } from "./use-admin-refresh";

const roleOptions = roles.map((r) => ({ value: r, label: roleLabels[r] }));
const scopeHint = "The sites this person sees when Every site is not ticked.";
const lastAdminText = "The last enabled administrator must stay an enabled administrator.";

type Panel = { kind: "invite" } | { kind: "edit"; user: UserDto } | null;

export function UsersAdmin({ currentUserId }: { currentUserId: number }) {
  const users = useQuery(adminQueries.users());
  const sites = useQuery(adminQueries.sites());
  const refresh = useAdminRefresh();
  const [panel, setPanel] = useState<Panel>(null);
  const [status, setStatus] = useState<string | null>(null);
  const [rowError, setRowError] = useState<string | null>(null);
  const [busyId, setBusyId] = useState<number | null>(null);
  const [confirmId, setConfirmId] = useState<number | null>(null);

  const siteList = sites.data ?? [];
  const siteNames = new Map(siteList.map((s) => [s.id, s.name]));
  const list = users.data ?? [];
  const enabledAdmins = list.filter((u) => u.role === "admin" && !u.disabled).length;
  const isLastAdmin = (u: UserDto) => u.role === "admin" && !u.disabled && enabledAdmins <= 1;
  const scopeText = (u: UserDto) =>
    u.allSites ? "All sites" : u.siteIds.length ? u.siteIds.map((id) => siteNames.get(id) ?? `#${id}`).join(", ") : "No site";

  async function setDisabled(u: UserDto, disabled: boolean) {
    setBusyId(u.id);
    setRowError(null);
    setStatus(null);
    try {
      const result = await updateUser({ id: u.id, role: u.role, allSites: u.allSites, siteIds: u.siteIds, disabled });
      if (!result.ok) setRowError(result.error);
      else
        setStatus(
          disabled ? `Disabled ${u.email} and signed them out everywhere.` : `Enabled ${u.email}; they can sign in again.`,
        );
      await refresh();
    } catch {
      setRowError("The server could not be reached. Check the connection and try again.");
    } finally {
      setBusyId(null);
      setConfirmId(null);
    }
  }

  const columns: DataColumn<UserDto>[] = [
    {
      id: "email",
      header: "E-mail",
      sortValue: (u) => u.email,
      cell: (u) => (
        <span className="break-all">
          {u.email}
          {u.id === currentUserId && <span className="ml-1 text-xs text-muted">(you)</span>}
        </span>
      ),
    },
    { id: "name", header: "Name", sortValue: (u) => u.name, cell: (u) => u.name },
    { id: "role", header: "Role", sortValue: (u) => roleLabels[u.role], cell: (u) => roleLabels[u.role] },
    { id: "sites", header: "Sites", sortValue: (u) => scopeText(u), cell: (u) => scopeText(u) },
    {
      id: "status",
      header: "Status",
      sortValue: (u) => (u.disabled ? "Disabled" : "Enabled"),
      cell: (u) =>
        u.disabled ? (
          <span className="rounded border border-dashed border-muted px-1 text-xs font-semibold text-muted">Disabled</span>
        ) : (
          <span className="text-xs">Enabled</span>
        ),
    },
    {
      id: "actions",
      header: <span className="sr-only">Actions</span>,
      cell: (u) => {
        const busy = busyId === u.id;
        const last = isLastAdmin(u);
        return (
          <div className="flex flex-wrap justify-end gap-1">
            <button
              type="button"
              className={buttonClass.small}
              onClick={() => {
                setStatus(null);
                setPanel({ kind: "edit", user: u });
              }}
              aria-label={`Edit access of ${u.email}`}
            >
              Edit access
            </button>
            {u.disabled ? (
              <button
                type="button"
                className={buttonClass.small}
                disabled={busy}
                onClick={() => setDisabled(u, false)}
                aria-label={`Enable ${u.email}`}
              >
                Enable
              </button>
            ) : confirmId === u.id ? (
              <>
                <button
                  type="button"
                  className={`${buttonClass.small} border-ink font-semibold`}
                  disabled={busy}
                  onClick={() => setDisabled(u, true)}
                  aria-label={`Confirm: disable ${u.email} and sign them out`}
                >
                  Confirm disable
                </button>
                <button type="button" className={buttonClass.small} onClick={() => setConfirmId(null)}>
                  Keep
                </button>
              </>
            ) : (
              <button
                type="button"
                className={buttonClass.small}
                disabled={busy || last}
                title={last ? lastAdminText : undefined}
                onClick={() => setConfirmId(u.id)}
                aria-label={last ? `Disable ${u.email} (not possible: ${lastAdminText})` : `Disable ${u.email}`}
              >
                Disable
              </button>
            )}
          </div>
        );
      },
    },
  ];

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        <h1 className="text-xl font-semibold">Users</h1>
        <button
          type="button"
          className={`${buttonClass.primary} ml-auto`}
          onClick={() => {
            setStatus(null);
            setPanel({ kind: "invite" });
          }}
        >
          Invite a user
        </button>
      </div>
      {panel?.kind === "invite" && (
        <InviteUserForm
          sites={siteList}
          onCancel={() => setPanel(null)}
          onDone={async (u) => {
            setPanel(null);
            setStatus(`Invited ${u.email} as ${roleLabels[u.role].toLowerCase()}. Give them the initial password by a separate channel.`);
            await refresh();
          }}
        />
      )}
      {panel?.kind === "edit" && (
        <EditUserForm
          key={panel.user.id}
          user={panel.user}
          sites={siteList}
          lastAdmin={isLastAdmin(panel.user)}
          onCancel={() => setPanel(null)}
          onDone={async (u) => {
            setPanel(null);
            setStatus(`Saved access of ${u.email}.`);
            await refresh();
          }}
        />
      )}
      {rowError && (
        <p role="alert" className="rounded border-2 border-ink bg-raised px-2 py-1.5 text-sm font-semibold">
          {rowError}
        </p>
      )}
      <StatusLine message={status} />
      {users.error && <p role="alert">Could not load users: {users.error.message}</p>}
      <DataTable
        data-testid="users-table"
        caption="Users"
        rows={list}
        columns={columns}
        rowKey={(u) => u.id}
        initialSort={{ columnId: "email", direction: "asc" }}
        loading={users.isPending}
        emptyText="No users."
        rowProps={(u) => ({ "data-testid": "user-row", className: u.disabled ? "text-muted" : undefined })}
      />
    </div>
  );
}

/** "Every site", or the sites ticked below it (an empty list is no site). */
function SiteScopeFields<V extends { allSites: boolean; siteIds: number[] }>({ form, sites }: { form: FormApi<V>; sites: SiteDto[] }) {
  return (
    <>
      <CheckboxField
        form={form}
        name="allSites"
        label="Every site (also sites added later)"
        hint="Administrators always see every site."
        className="md:col-span-2"
      />
      <CheckboxGroupField
        form={form}
        name="siteIds"
        label="Site scope"
        hint={scopeHint}
        disabled={Boolean(form.values.allSites)}
        options={siteOptions(sites)}
        className="md:col-span-2"
      />
    </>
  );
}

function siteOptions(sites: SiteDto[]) {
  return sites.map((s) => ({ value: s.id, label: `${s.name} (${s.code})` }));
}

function randomPassword(): string {
  const alphabet = "ABCDEFGHJKLMNPQRSTUVWXYZabcdefghijkmnopqrstuvwxyz23456789";
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => alphabet[b % alphabet.length]).join("");
}

function InviteUserForm({
  sites,
  onDone,
  onCancel,
}: {
  sites: SiteDto[];
  onDone: (u: UserDto) => void;
  onCancel: () => void;
}) {
  const form = useSchemaForm({
    schema: userInviteSchema,
    initial: { email: "", name: "", role: "viewer" as Role, allSites: true, siteIds: [] as number[], password: "" },
  });
  const [showPassword, setShowPassword] = useState(false);
  return (
    <FormPanel title="Invite a user">
      <form
        id={form.id}
        noValidate
        aria-label="Invite a user"
        className="grid gap-3 md:grid-cols-2"
        onSubmit={async (e) => {
          e.preventDefault();
          const created = await form.submit(inviteUser);
          if (created) onDone(created);
        }}
      >
        <TextField form={form} name="email" label="E-mail" type="email" autoComplete="off" />
        <TextField form={form} name="name" label="Name" maxLength={120} />
        <SelectField form={form} name="role" label="Role" options={roleOptions} />
        <div>
          <TextField
            form={form}
            name="password"
            label="Initial password"
            type={showPassword ? "text" : "password"}
            autoComplete="new-password"
            hint="At least 10 characters. Pass it on by a separate channel."
          />
          <div className="mt-1 flex gap-2">
            <button
              type="button"
              className={buttonClass.small}
              onClick={() => {
                form.set("password", randomPassword());
                setShowPassword(true);
              }}
            >
              Generate
            </button>
            <button type="button" className={buttonClass.small} onClick={() => setShowPassword((s) => !s)} aria-pressed={showPassword}>
              {showPassword ? "Hide" : "Show"}
            </button>
          </div>
        </div>
        <SiteScopeFields form={form} sites={sites} />
        <div className="space-y-2 md:col-span-2">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel="Invite" pendingLabel="Inviting…" onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}

function EditUserForm({
  user,
  sites,
  lastAdmin,
  onDone,
  onCancel,
}: {
  user: UserDto;
  sites: SiteDto[];
  lastAdmin: boolean;
  onDone: (u: UserDto) => void;
  onCancel: () => void;
}) {
  const form = useSchemaForm({
    schema: userUpdateSchema,
    initial: { role: user.role as Role, allSites: user.allSites, siteIds: user.siteIds },
    toInput: (v) => ({ id: user.id, role: v.role, allSites: v.allSites, siteIds: v.allSites ? [] : v.siteIds, disabled: user.disabled }),
    check: (v) => (lastAdmin && v.role !== "admin" ? { role: [lastAdminText] } : {}),
  });
  return (
    <FormPanel title={`Access of ${user.email}`}>
      <form
        id={form.id}
        noValidate
        aria-label={`Access of ${user.email}`}
        className="grid gap-3 md:grid-cols-2"
        onSubmit={async (e) => {
          e.preventDefault();
          const saved = await form.submit(updateUser);
          if (saved) onDone(saved);
        }}
      >
        <SelectField form={form} name="role" label="Role" options={roleOptions} />
        <p className="self-end text-sm text-muted">
          {user.name} · {user.disabled ? "disabled" : "enabled"}
        </p>
        <SiteScopeFields form={form} sites={sites} />
        <div className="space-y-2 md:col-span-2">
          <FormAlert message={form.formError} />
          <FormActions pending={form.pending} submitLabel="Save access" onCancel={onCancel} />
        </div>
      </form>
    </FormPanel>
  );
}
