import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { signInSchema, type SignInBody } from '@schemas/auth';
import { ErrorNote, Field } from '@/components/ui';
import { ApiError } from '@/lib/api';
import { AuthFrame } from './AuthFrame';
import { useMe, useSignIn } from './api';

export function SignInPage() {
  const me = useMe();
  const [params] = useSearchParams();
  const next = safeNext(params.get('next'));
  const navigate = useNavigate();
  const signIn = useSignIn();
  const form = useForm<SignInBody>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });
  if (me.data) return <Navigate to={next} replace />;
  const retry = signIn.error instanceof ApiError && signIn.error.status === 429 ? (signIn.error.details as { retryAfterSeconds?: number })?.retryAfterSeconds : undefined;
  return (
    <AuthFrame title="Sign in">
      <form
        noValidate
        className="space-y-4"
        onSubmit={form.handleSubmit((values) => signIn.mutate(values, { onSuccess: () => navigate(next, { replace: true }) }))}
      >
        <Field label="E-mail" htmlFor="email" error={form.formState.errors.email?.message}>
          <input id="email" type="email" autoComplete="username" autoFocus className="field" {...form.register('email')} />
        </Field>
        <Field label="Password" htmlFor="password" error={form.formState.errors.password?.message}>
          <input id="password" type="password" autoComplete="current-password" className="field" {...form.register('password')} />
        </Field>
        <ErrorNote error={signIn.error} />
        {retry !== undefined && <p className="text-xs text-ink-soft">You can try again in about {Math.ceil(retry / 60)} minute(s).</p>}
        <button type="submit" className="btn w-full justify-center" disabled={signIn.isPending}>
          {signIn.isPending ? 'Signing in…' : 'Sign in'}
        </button>
        <p className="text-center text-sm">
          <Link to="/forgot-password" className="text-trend underline">
            Forgot your password?
          </Link>
        </p>
      </form>
    </AuthFrame>
  );
}

/** Only same-site paths are followed after sign-in. */
export function safeNext(next: string | null): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/';
}
