// next-auth configuration: e-mail and password (credentials provider), checked by lib/auth/sign-in.ts;
// sessions are JWTs in an http-only cookie carrying the account id and role.
import type { NextAuthOptions } from 'next-auth';
import CredentialsProvider from 'next-auth/providers/credentials';
import { z } from 'zod';
import { checkSignIn } from '@/lib/auth/sign-in';
import { isRole } from '@/lib/roles';

const credentialsSchema = z.object({
  email: z.string({ error: 'E-mail is required.' }).trim().min(1, 'E-mail is required.').max(320),
  password: z.string({ error: 'Password is required.' }).min(1, 'Password is required.').max(1024),
});

/** The client's address as our own server saw it. Next.js sets x-forwarded-for for direct connections. */
export function clientAddress(headers: Record<string, unknown> | undefined): string {
  const forwarded = headers?.['x-forwarded-for'];
  const first = typeof forwarded === 'string' ? forwarded.split(',')[0].trim() : '';
  if (first) return first;
  const real = headers?.['x-real-ip'];
  return typeof real === 'string' && real ? real : 'unknown';
}

export const SESSION_MAX_AGE_SECONDS = 12 * 60 * 60; // one working day

export const authOptions: NextAuthOptions = {
  secret: process.env.NEXTAUTH_SECRET,
  session: { strategy: 'jwt', maxAge: SESSION_MAX_AGE_SECONDS },
  pages: { signIn: '/signin', error: '/signin' },
  providers: [
    CredentialsProvider({
      id: 'credentials',
      name: 'E-mail and password',
      credentials: {
        email: { label: 'E-mail', type: 'email' },
        password: { label: 'Password', type: 'password' },
      },
      async authorize(credentials, req) {
        const parsed = credentialsSchema.safeParse(credentials ?? {});
        if (!parsed.success) throw new Error(parsed.error.issues[0]?.message ?? 'E-mail and password are required.');
        const result = await checkSignIn({
          email: parsed.data.email,
          password: parsed.data.password,
          address: clientAddress(req?.headers as Record<string, unknown> | undefined),
        });
        // next-auth hands the thrown message to the sign-in form as `error`.
        if (!result.ok) throw new Error(result.message);
        return result.user;
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.sub = user.id;
        token.role = user.role;
        token.name = user.name;
        token.email = user.email;
      }
      return token;
    },
    async session({ session, token }) {
      session.user = {
        id: token.sub ?? '',
        email: token.email ?? '',
        name: token.name ?? '',
        role: isRole(token.role) ? token.role : 'viewer',
      };
      return session;
    },
  },
};
