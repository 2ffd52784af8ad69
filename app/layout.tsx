import type { Metadata } from 'next';
import type { ReactNode } from 'react';
import { plexMono, plexSans } from './fonts';
import { Providers } from '@/components/providers';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Modeshelf', template: '%s · Modeshelf' },
  description: 'Registry for reduced-order models of large linear state-space systems, with review and versions.',
};

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={`${plexSans.variable} ${plexMono.variable}`}>
      <body className="min-h-screen">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
