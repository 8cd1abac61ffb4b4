import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { changePasswordSchema } from '@schemas/auth';
import { ErrorNote, Field } from '@/components/ui';
import { useChangePassword } from '@/features/auth/api';
import { RevokeTokensChoice } from '@/features/auth/RevokeTokensChoice';

const formSchema = changePasswordSchema.extend({ confirm: z.string() }).refine((v) => v.newPassword === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });
type FormValues = z.input<typeof formSchema>;

/** Changing one's password on the Profile page: every other session ends. */
export function PasswordForm() {
  const change = useChangePassword();
  const form = useForm<FormValues>({ resolver: zodResolver(formSchema), defaultValues: { currentPassword: '', newPassword: '', confirm: '', revokeTokens: true } });
  const e = form.formState.errors;
  return (
    <section className="space-y-4" aria-labelledby="password-heading">
      <h2 id="password-heading" className="font-heading text-lg font-bold">
        Password
      </h2>
      <form
        noValidate
        className="grid max-w-xl gap-3"
        onSubmit={form.handleSubmit((v) => change.mutate({ currentPassword: v.currentPassword, newPassword: v.newPassword, revokeTokens: v.revokeTokens }, { onSuccess: () => form.reset() }))}
      >
        <Field label="Current password" htmlFor="current-password" error={e.currentPassword?.message}>
          <input id="current-password" type="password" className="field" autoComplete="current-password" {...form.register('currentPassword')} />
        </Field>
        <Field label="New password" htmlFor="new-password" error={e.newPassword?.message} hint="At least 10 characters.">
          <input id="new-password" type="password" className="field" autoComplete="new-password" {...form.register('newPassword')} />
        </Field>
        <Field label="New password again" htmlFor="confirm-password" error={e.confirm?.message}>
          <input id="confirm-password" type="password" className="field" autoComplete="new-password" {...form.register('confirm')} />
        </Field>
        <RevokeTokensChoice id="revoke-tokens" field={form.register('revokeTokens')} />
        <p className="text-xs text-ink-faint">Changing the password signs you out everywhere else and stops any password-reset link sent before.</p>
        <ErrorNote error={change.error} />
        {change.isSuccess && (
          <p role="status" className="text-sm text-ok" data-testid="password-changed">
            Password changed. Other sessions have ended{change.data.revokedTokens ? `, and ${change.data.revokedTokens} API token${change.data.revokedTokens === 1 ? ' was' : 's were'} revoked` : ''}.
          </p>
        )}
        <div>
          <button className="btn" disabled={change.isPending}>
            Change the password
          </button>
        </div>
      </form>
    </section>
  );
}
