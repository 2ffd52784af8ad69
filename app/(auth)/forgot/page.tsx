import type { Metadata } from 'next';
import Link from 'next/link';
import { ForgotPasswordForm } from '@/components/auth/ForgotPasswordForm';

export const metadata: Metadata = { title: 'Forgot password' };

export default function ForgotPasswordPage() {
  return (
    <section className="panel p-6">
      <h1 className="text-xl font-semibold">Forgot your password?</h1>
      <p className="mt-2 text-sm text-graphite-soft">
        Give the e-mail address of your account. If it has one, a link to choose a new password is sent there; the
        link works once, for an hour.
      </p>
      <ForgotPasswordForm />
      <p className="mt-4 text-sm">
        <Link href="/signin">Back to sign in</Link>
      </p>
    </section>
  );
}
