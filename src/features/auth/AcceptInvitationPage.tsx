import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate, useParams } from 'react-router-dom';
import { z } from 'zod';
import { nameSchema, newPasswordSchema, ROLE_LABELS } from '@schemas/people';
import { ErrorNote, Field, Spinner } from '@/components/ui';
import { AuthFrame } from './AuthFrame';
import { useAcceptInvitation, useInvitationLookup } from './api';

const schema = z
  .object({ name: nameSchema, password: newPasswordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export function AcceptInvitationPage() {
  const { token = '' } = useParams();
  const lookup = useInvitationLookup(token);
  const accept = useAcceptInvitation();
  const navigate = useNavigate();
  const form = useForm<z.infer<typeof schema>>({ resolver: zodResolver(schema), defaultValues: { name: '', password: '', confirm: '' } });
  return (
    <AuthFrame title="Join Tidegauge">
      {lookup.isPending && <Spinner label="Checking the invitation…" />}
      {lookup.error && <ErrorNote error={lookup.error} />}
      {lookup.data && (
        <form noValidate className="space-y-4" onSubmit={form.handleSubmit((v) => accept.mutate({ token, name: v.name, password: v.password }, { onSuccess: () => navigate('/', { replace: true }) }))}>
          <p className="text-sm text-ink-soft">
            You are joining as <strong className="text-ink">{lookup.data.email}</strong> with the role{lookup.data.roles.length > 1 ? 's' : ''}{' '}
            {lookup.data.roles.map((r) => ROLE_LABELS[r]).join(', ')}.
          </p>
          <Field label="Your name" htmlFor="name" error={form.formState.errors.name?.message}>
            <input id="name" className="field" autoComplete="name" autoFocus {...form.register('name')} />
          </Field>
          <Field label="Password" htmlFor="password" error={form.formState.errors.password?.message} hint="At least 10 characters.">
            <input id="password" type="password" className="field" autoComplete="new-password" {...form.register('password')} />
          </Field>
          <Field label="Password again" htmlFor="confirm" error={form.formState.errors.confirm?.message}>
            <input id="confirm" type="password" className="field" autoComplete="new-password" {...form.register('confirm')} />
          </Field>
          <ErrorNote error={accept.error} />
          <button type="submit" className="btn w-full justify-center" disabled={accept.isPending}>
            {accept.isPending ? 'Joining…' : 'Join and sign in'}
          </button>
        </form>
      )}
    </AuthFrame>
  );
}
