import type { Metadata } from 'next';
import Link from 'next/link';
import { currentUser } from '@/lib/auth';
import { SignInForm } from '@/components/auth/SignInForm';

export const metadata: Metadata = { title: 'Sign in' };

function safeCallback(value: string | string[] | undefined): string {
  const v = Array.isArray(value) ? value[0] : value;
  // Only paths on this site: an absolute URL here would make the sign-in page an open redirect.
  return v && v.startsWith('/') && !v.startsWith('//') ? v : '/';
}

export default async function SignInPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const user = await currentUser();
  const callbackUrl = safeCallback(params.callbackUrl);
  return (
    <section className="panel p-6">
      <h1 className="text-xl font-semibold">Sign in</h1>
      {user ? (
        <p className="mt-3 text-sm">
          You are signed in as {user.name}. <Link href={callbackUrl}>Continue</Link> or{' '}
          <Link href="/signout">sign out</Link>.
        </p>
      ) : (
        <>
          <SignInForm callbackUrl={callbackUrl} />
          <p className="mt-4 text-sm">
            <Link href="/forgot">Forgot your password?</Link>
          </p>
        </>
      )}
    </section>
  );
}
