// next-auth's own endpoints (sign-in, sign-out, session, CSRF). The credentials it receives are validated
// with zod in lib/auth/options.ts before anything else happens.
import NextAuth from 'next-auth';
import { authOptions } from '@/lib/auth/options';

const handler = NextAuth(authOptions);

export { handler as GET, handler as POST };
