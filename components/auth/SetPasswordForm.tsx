'use client';
// Choosing a password from an invitation or reset link, then signing straight in with it.
import { signIn } from 'next-auth/react';
import { useState } from 'react';
import { apiFetch } from '@/components/api-client';
import { MIN_PASSWORD_LENGTH, passwordSchema } from '@/lib/auth/password-rules';

export function SetPasswordForm({ token, email, submitLabel }: { token: string; email: string; submitLabel: string }) {
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  return (
    <form
      className="mt-4 space-y-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        const password = String(form.get('password') ?? '');
        const repeated = String(form.get('repeat') ?? '');
        const rule = passwordSchema.safeParse(password);
        if (!rule.success) return setError(rule.error.issues[0].message);
        if (password !== repeated) return setError('The two passwords differ.');
        setPending(true);
        setError(null);
        try {
          await apiFetch('/api/links/redeem', { method: 'POST', body: { token, password } });
        } catch (err) {
          setPending(false);
          return setError((err as Error).message);
        }
        const result = await signIn('credentials', { redirect: false, email, password, callbackUrl: '/' });
        if (result?.ok && !result.error) {
          window.location.assign('/');
        } else {
          window.location.assign('/signin');
        }
      }}
    >
      <label className="block">
        <span className="field-label">New password</span>
        <input
          className="field-input"
          name="password"
          type="password"
          autoComplete="new-password"
          minLength={MIN_PASSWORD_LENGTH}
          required
        />
        <span className="mt-1 block text-xs text-graphite-soft">At least {MIN_PASSWORD_LENGTH} characters.</span>
      </label>
      <label className="block">
        <span className="field-label">Repeat it</span>
        <input className="field-input" name="repeat" type="password" autoComplete="new-password" required />
      </label>
      {error ? (
        <p role="alert" className="border-l-2 border-okabe-vermillion px-3 py-2 text-sm">
          {error}
        </p>
      ) : null}
      <button type="submit" className="button-primary w-full" disabled={pending}>
        {pending ? 'Saving…' : submitLabel}
      </button>
    </form>
  );
}
