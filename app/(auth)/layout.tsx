import type { ReactNode } from 'react';

// Pages a person sees before or while signing in: one sheet in the middle of the page.
export default function AuthLayout({ children }: { children: ReactNode }) {
  return (
    <main className="flex min-h-screen items-center justify-center px-4 py-10">
      <div className="w-full max-w-md">
        <p className="text-lg font-semibold tracking-tight">Modeshelf</p>
        <p className="text-xs text-graphite-soft">reduced-order model registry</p>
        <div className="grid-rule mb-6 mt-2" aria-hidden="true" />
        {children}
      </div>
    </main>
  );
}
