'use client';
import { useState } from 'react';
import { apiFetch } from '@/components/api-client';

export function ForgotPasswordForm() {
  const [message, setMessage] = useState<{ tone: 'ok' | 'error'; text: string } | null>(null);
  const [pending, setPending] = useState(false);
  return (
    <form
      className="mt-4 space-y-4"
      onSubmit={async (e) => {
        e.preventDefault();
        const email = String(new FormData(e.currentTarget).get('email') ?? '');
        setPending(true);
        try {
          const result = await apiFetch<{ message: string }>('/api/links/reset-request', { method: 'POST', body: { email } });
          setMessage({ tone: 'ok', text: result.message });
        } catch (err) {
          setMessage({ tone: 'error', text: (err as Error).message });
        } finally {
          setPending(false);
        }
      }}
    >
      <label className="block">
        <span className="field-label">E-mail</span>
        <input className="field-input" name="email" type="email" autoComplete="username" required />
      </label>
      {message ? (
        <p
          role={message.tone === 'error' ? 'alert' : 'status'}
          className={`border-l-2 px-3 py-2 text-sm ${message.tone === 'ok' ? 'border-okabe-green' : 'border-okabe-vermillion'}`}
        >
          {message.text}
        </p>
      ) : null}
      <button type="submit" className="button-primary w-full" disabled={pending}>
        Send me a link
      </button>
    </form>
  );
}
