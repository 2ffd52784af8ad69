import type { Metadata } from 'next';
import Link from 'next/link';
import { inspectToken } from '@/lib/auth/tokens';
import { SetPasswordForm } from '@/components/auth/SetPasswordForm';

export const metadata: Metadata = { title: 'Choose a new password' };

export default async function ResetPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const state = await inspectToken(token);
  const usable = state.valid && state.info.purpose === 'reset';
  return (
    <section className="panel p-6">
      <h1 className="text-xl font-semibold">Choose a new password</h1>
      {usable ? (
        <>
          <p className="mt-2 text-sm text-graphite-soft">
            For <span className="font-medium">{state.info.email}</span>. Your old password stops working once you save.
          </p>
          <SetPasswordForm token={token} email={state.info.email} submitLabel="Save new password" />
        </>
      ) : (
        <p className="mt-3 text-sm" role="alert">
          {state.valid ? 'This is not a password reset link.' : state.message}{' '}
          <Link href="/forgot">Ask for a new link</Link>.
        </p>
      )}
    </section>
  );
}
