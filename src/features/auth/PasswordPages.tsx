import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { z } from 'zod';
import { emailSchema, newPasswordSchema } from '@schemas/people';
import { ErrorNote, Field } from '@/components/ui';
import { AuthFrame } from './AuthFrame';
import { RevokeTokensChoice } from './RevokeTokensChoice';
import { useCompleteReset, useRequestReset } from './api';

export function ForgotPasswordPage() {
  const request = useRequestReset();
  const form = useForm<{ email: string }>({ resolver: zodResolver(z.object({ email: emailSchema })), defaultValues: { email: '' } });
  return (
    <AuthFrame title="Reset your password">
      {request.isSuccess ? (
        <p className="text-sm">{request.data.message} The link expires in an hour.</p>
      ) : (
        <form noValidate className="space-y-4" onSubmit={form.handleSubmit((v) => request.mutate(v.email))}>
          <Field label="E-mail" htmlFor="email" error={form.formState.errors.email?.message}>
            <input id="email" type="email" className="field" autoFocus {...form.register('email')} />
          </Field>
          <ErrorNote error={request.error} />
          <button className="btn w-full justify-center" disabled={request.isPending}>
            Send a reset link
          </button>
        </form>
      )}
      <p className="mt-4 text-center text-sm">
        <Link to="/sign-in" className="text-trend underline">
          Back to sign-in
        </Link>
      </p>
    </AuthFrame>
  );
}

const resetSchema = z.object({ password: newPasswordSchema, confirm: z.string(), revokeTokens: z.boolean() }).refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export function ResetPasswordPage() {
  const { token = '' } = useParams();
  const complete = useCompleteReset();
  const navigate = useNavigate();
  const form = useForm<z.infer<typeof resetSchema>>({ resolver: zodResolver(resetSchema), defaultValues: { password: '', confirm: '', revokeTokens: true } });
  return (
    <AuthFrame title="Choose a new password">
      <form noValidate className="space-y-4" onSubmit={form.handleSubmit((v) => complete.mutate({ token, password: v.password, revokeTokens: v.revokeTokens }, { onSuccess: () => navigate('/', { replace: true }) }))}>
        <Field label="New password" htmlFor="password" error={form.formState.errors.password?.message} hint="At least 10 characters.">
          <input id="password" type="password" className="field" autoComplete="new-password" autoFocus {...form.register('password')} />
        </Field>
        <Field label="New password again" htmlFor="confirm" error={form.formState.errors.confirm?.message}>
          <input id="confirm" type="password" className="field" autoComplete="new-password" {...form.register('confirm')} />
        </Field>
        <RevokeTokensChoice id="revoke-tokens" field={form.register('revokeTokens')} />
        <p className="text-xs text-ink-faint">Every other session of yours ends, and older reset links stop working.</p>
        <ErrorNote error={complete.error} />
        <button className="btn w-full justify-center" disabled={complete.isPending}>
          Set the password and sign in
        </button>
      </form>
    </AuthFrame>
  );
}
