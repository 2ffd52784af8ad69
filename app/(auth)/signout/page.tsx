import type { Metadata } from 'next';
import Link from 'next/link';
import { SignOutButton } from '@/components/auth/SignOutButton';

export const metadata: Metadata = { title: 'Sign out' };

export default function SignOutPage() {
  return (
    <section className="panel p-6">
      <h1 className="text-xl font-semibold">Sign out</h1>
      <p className="mt-2 text-sm text-graphite-soft">This ends your session in this browser.</p>
      <div className="mt-4 flex items-center gap-4">
        <SignOutButton />
        <Link href="/" className="text-sm">
          Back to the shelf
        </Link>
      </div>
    </section>
  );
}
