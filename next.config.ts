import type { NextConfig } from 'next';

const nextConfig: NextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // scripts/test.sh builds into its own folder so a test run never replaces the build `npm start` serves.
  distDir: process.env.NEXT_DIST_DIR || '.next',
  // Server-only packages with dynamic requires or native-style loading stay plain Node modules.
  serverExternalPackages: ['knex', 'pg', 'pg-boss', 'nodemailer', 'smtp-server', 'bcryptjs'],
  // Types are checked once by `tsc --noEmit` in scripts/test.sh over the whole tree; checking again during
  // the build would only double the time on a 2-core machine.
  typescript: { ignoreBuildErrors: true },
  experimental: {
    // forbidden() and app/forbidden.tsx: role refusals render a 403 page.
    authInterrupts: true,
  },
};

export default nextConfig;
