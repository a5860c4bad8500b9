/** Sign-in, sign-up, forgot and reset password: react-hook-form + zod, talking to better-auth. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { email, password, personName } from '../lib/rules';
import { authClient } from './auth-client';
import { Field, Notice } from './ui';

/** Only same-site paths may be a destination after sign-in. */
export function safeNext(next: string | null | undefined): string {
  return next && next.startsWith('/') && !next.startsWith('//') ? next : '/';
}

function authError(e: { message?: string; code?: string; status?: number } | null | undefined, fallback: string): string {
  if (!e) return fallback;
  if (e.status === 429) return 'Too many attempts; wait a few seconds and try again.';
  return e.message || fallback;
}

const signInSchema = z.object({ email, password: z.string().min(1, 'Enter your password') });

export function SignInForm({ next }: { next?: string }) {
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(signInSchema) });
  const onSubmit = handleSubmit(async (v) => {
    setError(null);
    const { error } = await authClient.signIn.email({ email: v.email, password: v.password });
    if (error) return setError(authError(error, 'Sign-in failed.'));
    window.location.assign(safeNext(next));
  });
  return (
    <form onSubmit={onSubmit} className="space-y-3" noValidate>
      <Field label="E-mail" error={formState.errors.email}>
        <input className="field" type="email" autoComplete="email" {...register('email')} />
      </Field>
      <Field label="Password" error={formState.errors.password}>
        <input className="field" type="password" autoComplete="current-password" {...register('password')} />
      </Field>
      {error && <Notice tone="bad">{error}</Notice>}
      <button className="btn btn-primary w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}

const signUpSchema = z
  .object({ name: personName, email, password, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });

export function SignUpForm({ next }: { next?: string }) {
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(signUpSchema) });
  const onSubmit = handleSubmit(async (v) => {
    setError(null);
    const { error } = await authClient.signUp.email({ name: v.name, email: v.email, password: v.password, callbackURL: '/verify-email' });
    if (error) return setError(authError(error, 'Sign-up failed.'));
    window.location.assign(safeNext(next));
  });
  return (
    <form onSubmit={onSubmit} className="space-y-3" noValidate>
      <Field label="Name" error={formState.errors.name}>
        <input className="field" autoComplete="name" {...register('name')} />
      </Field>
      <Field label="E-mail" error={formState.errors.email}>
        <input className="field" type="email" autoComplete="email" {...register('email')} />
      </Field>
      <Field label="Password" error={formState.errors.password} hint="8 to 128 characters.">
        <input className="field" type="password" autoComplete="new-password" {...register('password')} />
      </Field>
      <Field label="Password again" error={formState.errors.confirm}>
        <input className="field" type="password" autoComplete="new-password" {...register('confirm')} />
      </Field>
      {error && <Notice tone="bad">{error}</Notice>}
      <button className="btn btn-primary w-full justify-center" disabled={formState.isSubmitting}>
        {formState.isSubmitting ? 'Creating account…' : 'Create account'}
      </button>
    </form>
  );
}

const forgotSchema = z.object({ email });

export function ForgotPasswordForm() {
  const [sent, setSent] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(forgotSchema) });
  const onSubmit = handleSubmit(async (v) => {
    setError(null);
    const { error } = await authClient.requestPasswordReset({ email: v.email, redirectTo: '/reset-password' });
    if (error) return setError(authError(error, 'The request failed.'));
    setSent(v.email);
  });
  if (sent) return <Notice tone="ok">If an account uses {sent}, a link to choose a new password is on its way. It works for one hour.</Notice>;
  return (
    <form onSubmit={onSubmit} className="space-y-3" noValidate>
      <Field label="E-mail" error={formState.errors.email}>
        <input className="field" type="email" autoComplete="email" {...register('email')} />
      </Field>
      {error && <Notice tone="bad">{error}</Notice>}
      <button className="btn btn-primary w-full justify-center" disabled={formState.isSubmitting}>
        Send reset link
      </button>
    </form>
  );
}

const resetSchema = z
  .object({ password, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });

export function ResetPasswordForm({ token, linkError }: { token?: string; linkError?: string }) {
  const [done, setDone] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(resetSchema) });
  if (linkError || !token)
    return (
      <Notice tone="bad">
        This reset link is invalid or has expired. <a href="/forgot-password">Ask for a new one</a>.
      </Notice>
    );
  if (done)
    return (
      <Notice tone="ok">
        Your password is changed and other sessions are signed out. <a href="/sign-in">Sign in</a> with the new one.
      </Notice>
    );
  const onSubmit = handleSubmit(async (v) => {
    setError(null);
    const { error } = await authClient.resetPassword({ newPassword: v.password, token });
    if (error) return setError(authError(error, 'The password could not be changed.'));
    setDone(true);
  });
  return (
    <form onSubmit={onSubmit} className="space-y-3" noValidate>
      <Field label="New password" error={formState.errors.password} hint="8 to 128 characters.">
        <input className="field" type="password" autoComplete="new-password" {...register('password')} />
      </Field>
      <Field label="New password again" error={formState.errors.confirm}>
        <input className="field" type="password" autoComplete="new-password" {...register('confirm')} />
      </Field>
      {error && <Notice tone="bad">{error}</Notice>}
      <button className="btn btn-primary w-full justify-center" disabled={formState.isSubmitting}>
        Set new password
      </button>
    </form>
  );
}
