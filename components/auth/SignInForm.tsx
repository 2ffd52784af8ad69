'use client';
import { signIn } from 'next-auth/react';
import { useState } from 'react';

export function SignInForm({ callbackUrl }: { callbackUrl: string }) {
  const [error, setError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);

  return (
    <form
      className="mt-4 space-y-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const form = new FormData(e.currentTarget);
        setPending(true);
        setError(null);
        const result = await signIn('credentials', {
          redirect: false,
          email: String(form.get('email') ?? ''),
          password: String(form.get('password') ?? ''),
          callbackUrl,
        });
        if (result?.ok && !result.error) {
          // A full load, so every server component renders for the new session.
          window.location.assign(callbackUrl);
          return;
        }
        setPending(false);
        setError(
          result?.error && result.error !== 'CredentialsSignin'
            ? result.error
            : 'Sign-in failed. Check your e-mail and password.',
        );
      }}
    >
      <label className="block">
        <span className="field-label">E-mail</span>
        <input className="field-input" name="email" type="email" autoComplete="username" required autoFocus />
      </label>
      <label className="block">
        <span className="field-label">Password</span>
        <input className="field-input" name="password" type="password" autoComplete="current-password" required />
      </label>
      {error ? (
        <p role="alert" className="border-l-2 border-okabe-vermillion bg-sheet px-3 py-2 text-sm" data-testid="signin-error">
          {error}
        </p>
      ) : null}
      <button type="submit" className="button-primary w-full" disabled={pending}>
        {pending ? 'Signing in…' : 'Sign in'}
      </button>
    </form>
  );
}
