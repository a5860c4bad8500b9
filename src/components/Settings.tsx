/** Settings: your account (name, password, e-mail verification) and the theme. */
import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { password, personName } from '../lib/rules';
import { authClient } from './auth-client';
import { applyTheme, readThemeChoice, type ThemeChoice } from './theme';
import { Field, Notice, Panel } from './ui';

interface User {
  name: string;
  email: string;
  emailVerified: boolean;
}

const nameForm = z.object({ name: personName });
const passwordForm = z
  .object({
    current: z.string().min(1, 'Enter your current password'),
    next: password,
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, { message: 'The two passwords differ', path: ['confirm'] });

function NameForm({ user }: { user: User }) {
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(nameForm), defaultValues: { name: user.name } });
  return (
    <form
      className="space-y-2 p-3"
      noValidate
      onSubmit={handleSubmit(async (v) => {
        const { error } = await authClient.updateUser({ name: v.name });
        setStatus(error ? { ok: false, text: error.message ?? 'Could not save.' } : { ok: true, text: 'Name saved.' });
      })}
    >
      <Field label="Name" error={formState.errors.name}>
        <input className="field" autoComplete="name" {...register('name')} />
      </Field>
      <button className="btn btn-primary" disabled={formState.isSubmitting}>
        Save name
      </button>
      {status && <Notice tone={status.ok ? 'ok' : 'bad'}>{status.text}</Notice>}
    </form>
  );
}

function PasswordForm() {
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const { register, handleSubmit, formState, reset } = useForm({ resolver: zodResolver(passwordForm) });
  return (
    <form
      className="space-y-2 p-3"
      noValidate
      onSubmit={handleSubmit(async (v) => {
        const { error } = await authClient.changePassword({ currentPassword: v.current, newPassword: v.next, revokeOtherSessions: true });
        if (error) return setStatus({ ok: false, text: error.message ?? 'Could not change the password.' });
        reset();
        setStatus({ ok: true, text: 'Password changed; your other sessions are signed out.' });
      })}
    >
      <Field label="Current password" error={formState.errors.current}>
        <input className="field" type="password" autoComplete="current-password" {...register('current')} />
      </Field>
      <Field label="New password" error={formState.errors.next}>
        <input className="field" type="password" autoComplete="new-password" {...register('next')} />
      </Field>
      <Field label="New password again" error={formState.errors.confirm}>
        <input className="field" type="password" autoComplete="new-password" {...register('confirm')} />
      </Field>
      <button className="btn btn-primary" disabled={formState.isSubmitting}>
        Change password
      </button>
      {status && <Notice tone={status.ok ? 'ok' : 'bad'}>{status.text}</Notice>}
    </form>
  );
}

function Verification({ user }: { user: User }) {
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  if (user.emailVerified)
    return (
      <p className="p-3 text-[13px] text-ok">
        ✓ <span className="mono">{user.email}</span> is verified.
      </p>
    );
  return (
    <div className="space-y-2 p-3 text-[13px]">
      <p className="text-warn">
        ! <span className="mono">{user.email}</span> is not verified yet.
      </p>
      <button
        className="btn"
        onClick={async () => {
          const { error } = await authClient.sendVerificationEmail({ email: user.email, callbackURL: '/verify-email' });
          setStatus(error ? { ok: false, text: error.message ?? 'Could not send.' } : { ok: true, text: 'A new verification link is on its way.' });
        }}
      >
        Send a new verification link
      </button>
      {status && <Notice tone={status.ok ? 'ok' : 'bad'}>{status.text}</Notice>}
    </div>
  );
}

function ThemePicker() {
  const [choice, setChoice] = useState<ThemeChoice>('system');
  useEffect(() => {
    setChoice(readThemeChoice());
    const on = (e: Event) => setChoice((e as CustomEvent<ThemeChoice>).detail);
    window.addEventListener('skiplane-theme', on);
    return () => window.removeEventListener('skiplane-theme', on);
  }, []);
  return (
    <fieldset className="flex gap-4 p-3 text-[13px]">
      <legend className="sr-only">Theme</legend>
      {(['light', 'dark', 'system'] as const).map((t) => (
        <label key={t} className="flex cursor-pointer items-center gap-1.5">
          <input type="radio" name="theme" value={t} checked={choice === t} onChange={() => applyTheme(t)} />
          {t === 'system' ? 'follow the system' : t}
        </label>
      ))}
    </fieldset>
  );
}

export default function Settings({ user }: { user: User }) {
  return (
    <div className="max-w-2xl space-y-4">
      <h1 className="text-[18px] font-semibold">Settings</h1>
      <Panel title="Account">
        <NameForm user={user} />
        <div className="border-t border-line">
          <Verification user={user} />
        </div>
      </Panel>
      <Panel title="Password">
        <PasswordForm />
      </Panel>
      <Panel title="Theme">
        <ThemePicker />
      </Panel>
    </div>
  );
}
