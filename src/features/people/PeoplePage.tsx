import { zodResolver } from '@hookform/resolvers/zod';
import type { ColumnDef } from '@tanstack/react-table';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router-dom';
import { inviteSchema, ROLE_LABELS, ROLES, type InviteBody, type Role } from '@schemas/people';
import { DataTable, hiddenHeader } from '@/components/DataTable';
import { ErrorNote, Field, formatDate, PageHeader, Spinner, Tabs } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useAudit, useInvitationAction, useInvitations, useInvite, usePeople, useSettings, useUpdatePerson, useUpdateSettings, type Person } from './api';

export function PeoplePage() {
  const [tab, setTab] = useState<'people' | 'invitations' | 'audit' | 'settings'>('people');
  const tabs = [
    ['people', 'People'],
    ['invitations', 'Invitations'],
    ['audit', 'Audit log'],
    ['settings', 'Workspace settings'],
  ] as const;
  return (
    <>
      <PageHeader title="People" actions={<Link to="/people/mailbox" className="btn-quiet">Mailbox</Link>}>
        Who can use Tidegauge and what they may do.
      </PageHeader>
      <Tabs tabs={tabs} value={tab} onChange={setTab} label="People and the workspace">
        {tab === 'people' && <PeopleTab />}
        {tab === 'invitations' && <InvitationsTab />}
        {tab === 'audit' && <AuditTab />}
        {tab === 'settings' && <SettingsTab />}
      </Tabs>
    </>
  );
}

function RoleEditor({ person, disabled }: { person: Person; disabled: boolean }) {
  const update = useUpdatePerson();
  const toggle = (role: Role) => {
    const roles = person.roles.includes(role) ? person.roles.filter((r) => r !== role) : [...person.roles, role];
    if (roles.length) update.mutate({ id: person.id, roles });
  };
  return (
    <div>
      <div className="flex flex-wrap gap-1">
        {ROLES.map((role) => (
          <label key={role} className={`tag cursor-pointer gap-1 ${person.roles.includes(role) ? 'border-trend bg-trend-light text-ink' : ''}`}>
            <input type="checkbox" className="sr-only" checked={person.roles.includes(role)} disabled={disabled || update.isPending} onChange={() => toggle(role)} aria-label={`${ROLE_LABELS[role]} for ${person.name}`} />
            {role}
          </label>
        ))}
      </div>
      {update.error && <p className="mt-1 text-xs text-alert">{update.error.message}</p>}
    </div>
  );
}

function PeopleTab() {
  const people = usePeople();
  const me = useMe();
  const update = useUpdatePerson();
  const [filter, setFilter] = useState('');
  const [role, setRole] = useState<Role | ''>('');
  const columns = useMemo<ColumnDef<Person, any>[]>(
    () => [
      { accessorKey: 'name', header: 'Name', cell: (c) => <span className="font-semibold">{c.getValue()}</span> },
      { accessorKey: 'email', header: 'E-mail' },
      { id: 'roles', header: 'Roles', enableSorting: false, accessorFn: (p) => p.roles.join(' '), cell: (c) => <RoleEditor person={c.row.original} disabled={c.row.original.status !== 'active'} /> },
      { accessorKey: 'status', header: 'Status', cell: (c) => <span className={`tag ${c.getValue() === 'active' ? 'text-ok' : 'text-alert'}`}>{c.getValue()}</span> },
      { accessorKey: 'lastSignInAt', header: 'Last sign-in', cell: (c) => formatDate(c.getValue(), true) },
      {
        id: 'actions',
        header: hiddenHeader('Actions'),
        enableSorting: false,
        cell: (c) => {
          const p = c.row.original;
          if (p.id === me.data?.id) return <span className="text-xs text-ink-faint">you</span>;
          return p.status === 'active' ? (
            <button className="btn-danger" onClick={() => confirm(`Deactivate ${p.name}? Their sessions and API tokens end at once.`) && update.mutate({ id: p.id, status: 'deactivated' })}>
              Deactivate
            </button>
          ) : (
            <button className="btn-quiet" onClick={() => update.mutate({ id: p.id, status: 'active' })}>
              Reactivate
            </button>
          );
        },
      },
    ],
    [me.data?.id, update],
  );
  if (people.isPending) return <Spinner />;
  if (people.error) return <ErrorNote error={people.error} />;
  const rows = role ? people.data.filter((p) => p.roles.includes(role)) : people.data;
  return (
    <div className="space-y-3">
      <div className="flex flex-wrap gap-3">
        <input className="field max-w-xs" placeholder="Filter by name or e-mail" value={filter} onChange={(e) => setFilter(e.target.value)} aria-label="Filter people" />
        <select className="field max-w-[12rem]" value={role} onChange={(e) => setRole(e.target.value as Role | '')} aria-label="Filter by role">
          <option value="">All roles</option>
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </div>
      <ErrorNote error={update.error} />
      <DataTable data={rows} columns={columns} globalFilter={filter} initialSorting={[{ id: 'name', desc: false }]} testId="people-table" />
    </div>
  );
}

function InvitationsTab() {
  const invitations = useInvitations();
  const invite = useInvite();
  const action = useInvitationAction();
  const form = useForm<InviteBody>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', roles: ['viewer'] } });
  return (
    <div className="grid gap-6 lg:grid-cols-[22rem_1fr]">
      <form
        noValidate
        className="card space-y-4 p-4"
        onSubmit={form.handleSubmit((v) => invite.mutate(v, { onSuccess: () => form.reset({ email: '', roles: ['viewer'] }) }))}
        aria-label="Invite someone"
      >
        <h2 className="font-heading text-lg font-bold">Invite someone</h2>
        <Field label="E-mail" htmlFor="invite-email" error={form.formState.errors.email?.message}>
          <input id="invite-email" type="email" className="field" {...form.register('email')} />
        </Field>
        <fieldset>
          <legend className="label">Roles</legend>
          <div className="space-y-1">
            {ROLES.map((r) => (
              <label key={r} className="flex items-center gap-2 text-sm">
                <input type="checkbox" value={r} {...form.register('roles')} /> {ROLE_LABELS[r]}
              </label>
            ))}
          </div>
          {form.formState.errors.roles && <p className="mt-1 text-xs text-alert">{form.formState.errors.roles.message}</p>}
        </fieldset>
        <ErrorNote error={invite.error} />
        {invite.isSuccess && <p className="text-sm text-ok">{invite.data.mailed ? 'Invitation sent.' : 'Invitation saved, but the mail could not be sent: use Resend.'}</p>}
        <button className="btn" disabled={invite.isPending}>
          Send the invitation
        </button>
      </form>
      <div>
        {invitations.isPending && <Spinner />}
        <ErrorNote error={invitations.error ?? action.error} />
        {invitations.data && (
          <DataTable
            data={invitations.data}
            empty="No pending invitations."
            columns={[
              { accessorKey: 'email', header: 'E-mail' },
              { id: 'roles', header: 'Roles', accessorFn: (i) => i.roles.join(', ') },
              { accessorKey: 'invitedBy', header: 'Invited by' },
              { accessorKey: 'expiresAt', header: 'Expires', cell: (c) => (c.row.original.expired ? <span className="text-alert">expired</span> : formatDate(c.getValue())) },
              {
                id: 'actions',
                header: hiddenHeader('Actions'),
                enableSorting: false,
                cell: (c) => (
                  <div className="flex gap-2">
                    <button className="btn-quiet" onClick={() => action.mutate({ id: c.row.original.id, action: 'resend' })}>
                      Resend
                    </button>
                    <button className="btn-danger" onClick={() => action.mutate({ id: c.row.original.id, action: 'withdraw' })}>
                      Withdraw
                    </button>
                  </div>
                ),
              },
            ]}
          />
        )}
      </div>
    </div>
  );
}

function AuditTab() {
  const audit = useAudit();
  const [filter, setFilter] = useState('');
  if (audit.isPending) return <Spinner />;
  if (audit.error) return <ErrorNote error={audit.error} />;
  return (
    <div className="space-y-3">
      <input className="field max-w-xs" placeholder="Filter the log" value={filter} onChange={(e) => setFilter(e.target.value)} aria-label="Filter the audit log" />
      <DataTable
        dense
        data={audit.data}
        globalFilter={filter}
        columns={[
          { accessorKey: 'at', header: 'When (UTC)', cell: (c) => formatDate(c.getValue(), true) },
          { accessorKey: 'action', header: 'What' },
          { id: 'actor', header: 'Who', accessorFn: (r) => r.actor?.email ?? '—' },
          { id: 'target', header: 'On', accessorFn: (r) => (r.targetType ? `${r.targetType} ${r.targetId ?? ''}` : '—') },
          { id: 'details', header: 'Details', accessorFn: (r) => (r.details ? JSON.stringify(r.details) : ''), cell: (c) => <code className="text-xs">{c.getValue()}</code> },
          { accessorKey: 'ip', header: 'Address' },
        ]}
      />
    </div>
  );
}

function SettingsTab() {
  const settings = useSettings();
  const update = useUpdateSettings();
  if (!settings.data) return <Spinner />;
  return (
    <div className="card max-w-xl space-y-3 p-4">
      <label className="flex items-start gap-3">
        <input type="checkbox" className="mt-1" checked={settings.data.publicExhibitLinks} onChange={(e) => update.mutate({ publicExhibitLinks: e.target.checked })} />
        <span>
          <span className="font-semibold">Public links to published exhibits</span>
          <span className="block text-sm text-ink-soft">When on, anyone with the link of a published exhibit can read it without signing in. Follow your institution’s publication rules.</span>
        </span>
      </label>
      <PublicationSettings key={`${settings.data.institutionName}|${settings.data.sourceLineWording}`} institutionName={settings.data.institutionName} sourceLineWording={settings.data.sourceLineWording} onSave={(v) => update.mutate(v)} saving={update.isPending} />
      <ErrorNote error={update.error} />
    </div>
  );
}

/** The institution's name and the wording of exhibits' source line (printed on figures and packs). */
function PublicationSettings(props: { institutionName: string; sourceLineWording: string; saving: boolean; onSave: (v: { institutionName: string; sourceLineWording: string }) => void }) {
  const [name, setName] = useState(props.institutionName);
  const [wording, setWording] = useState(props.sourceLineWording);
  const dirty = name !== props.institutionName || wording !== props.sourceLineWording;
  return (
    <form
      className="space-y-3 border-t border-hairline pt-3"
      aria-label="Exhibits as printed"
      onSubmit={(e) => {
        e.preventDefault();
        props.onSave({ institutionName: name.trim(), sourceLineWording: wording.trim() });
      }}
    >
      <h2 className="font-heading text-base font-bold">Exhibits as printed</h2>
      <Field label="Institution’s name" htmlFor="set-institution">
        <input id="set-institution" className="field" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. Research Department" />
      </Field>
      <Field label="Source line wording" htmlFor="set-wording">
        <input id="set-wording" className="field" value={wording} onChange={(e) => setWording(e.target.value)} />
      </Field>
      <p className="text-xs text-ink-faint">{'{sources}'} stands for the exhibit’s sources. Exhibits freeze both when they are submitted.</p>
      <button className="btn" disabled={!dirty || props.saving}>
        {dirty ? 'Save' : 'Saved'}
      </button>
    </form>
  );
}
