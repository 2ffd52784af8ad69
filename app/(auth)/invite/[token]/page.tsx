import type { Metadata } from 'next';
import Link from 'next/link';
import { inspectToken } from '@/lib/auth/tokens';
import { SetPasswordForm } from '@/components/auth/SetPasswordForm';

export const metadata: Metadata = { title: 'Accept invitation' };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const state = await inspectToken(token);
  const usable = state.valid && state.info.purpose === 'invite';
  return (
    <section className="panel p-6">
      <h1 className="text-xl font-semibold">Accept your invitation</h1>
      {usable ? (
        <>
          <p className="mt-2 text-sm text-graphite-soft">
            Welcome, {state.info.name}. Choose the password for <span className="font-medium">{state.info.email}</span>.
          </p>
          <SetPasswordForm token={token} email={state.info.email} submitLabel="Set password and continue" />
        </>
      ) : (
        <p className="mt-3 text-sm" role="alert">
          {state.valid ? 'This is not an invitation link.' : state.message} <Link href="/signin">Go to sign in</Link>.
        </p>
      )}
    </section>
  );
}
