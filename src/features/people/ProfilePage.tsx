import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { createTokenSchema, ROLE_LABELS } from '@schemas/people';
import { DataTable, hiddenHeader } from '@/components/DataTable';
import { ErrorNote, Field, formatDate, PageHeader, Spinner } from '@/components/ui';
import { useMe } from '@/features/auth/api';
import { useTokenMutations, useTokens } from './api';
import { PasswordForm } from './PasswordForm';
import { AlertSettingsForm } from './AlertSettingsForm';

export function ProfilePage() {
  const me = useMe();
  const tokens = useTokens();
  const { create, revoke } = useTokenMutations();
  const form = useForm<{ name: string }>({ resolver: zodResolver(createTokenSchema), defaultValues: { name: '' } });
  if (!me.data) return <Spinner />;
  return (
    <>
      <PageHeader title={me.data.name} kicker="Your profile">
        {me.data.email} · {me.data.roles.map((r) => ROLE_LABELS[r]).join(', ')}
      </PageHeader>
      <PasswordForm />
      <AlertSettingsForm />
      <section className="mt-10 space-y-4">
        <h2 className="font-heading text-lg font-bold">API tokens</h2>
        <p className="max-w-2xl text-sm text-ink-soft">
          Scripts use a token with <code>Authorization: Bearer …</code>. A token acts with your roles. It is shown once, when you create it; Tidegauge keeps only a hash.
        </p>
        <form noValidate className="flex items-end gap-2" onSubmit={form.handleSubmit((v) => create.mutate(v, { onSuccess: () => form.reset() }))}>
          <div className="w-72">
            <Field label="Token name" htmlFor="token-name" error={form.formState.errors.name?.message}>
              <input id="token-name" className="field" placeholder="for example: nightly load script" {...form.register('name')} />
            </Field>
          </div>
          <button className="btn" disabled={create.isPending}>
            Create a token
          </button>
        </form>
        <ErrorNote error={create.error ?? revoke.error} />
        {create.data && (
          <div className="card border-trend p-4" data-testid="new-token">
            <p className="text-sm font-semibold">Copy this token now: it will not be shown again.</p>
            <code className="mt-2 block break-all rounded bg-paper-deep p-2 text-sm">{create.data.token}</code>
          </div>
        )}
        {tokens.data && (
          <DataTable
            data={tokens.data}
            empty="No tokens yet."
            columns={[
              { accessorKey: 'name', header: 'Name' },
              { accessorKey: 'prefix', header: 'Begins with', cell: (c) => <code>{c.getValue()}…</code> },
              { accessorKey: 'createdAt', header: 'Created', cell: (c) => formatDate(c.getValue(), true) },
              { accessorKey: 'lastUsedAt', header: 'Last used', cell: (c) => formatDate(c.getValue(), true) },
              {
                id: 'state',
                header: hiddenHeader('State or action'),
                enableSorting: false,
                cell: (c) =>
                  c.row.original.revokedAt ? (
                    <span className="text-xs text-ink-faint">revoked {formatDate(c.row.original.revokedAt)}</span>
                  ) : (
                    <button className="btn-danger" onClick={() => revoke.mutate(c.row.original.id)}>
                      Revoke
                    </button>
                  ),
              },
            ]}
          />
        )}
      </section>
    </>
  );
}
