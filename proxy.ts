// Runs before every page and API request (Next.js 16 "proxy", formerly middleware): a visitor without a
// session is sent to /signin (pages) or answered 401 in the API error shape (route handlers). This is only
// the front door; every page and route handler still checks the role itself (lib/auth.ts).
import { NextResponse, type NextRequest } from 'next/server';
import { getToken } from 'next-auth/jwt';

// Reachable without a session. (The pull API, /api/v1, is not matched at all: see `config`.)
const PUBLIC_PATHS: RegExp[] = [
  /^\/signin$/,
  /^\/forgot$/,
  /^\/invite\/[^/]+$/,
  /^\/reset\/[^/]+$/,
  /^\/api\/auth\//,
  /^\/api\/links\/(redeem|reset-request)$/,
  /^\/api\/health$/,
];

export async function proxy(request: NextRequest) {
  const { pathname, search } = request.nextUrl;
  if (PUBLIC_PATHS.some((re) => re.test(pathname))) return NextResponse.next();

  const token = await getToken({ req: request, secret: process.env.NEXTAUTH_SECRET });
  if (token) return NextResponse.next();

  if (pathname.startsWith('/api/')) {
    return NextResponse.json(
      { error: { code: 'unauthenticated', message: 'Sign in to continue.' } },
      { status: 401 },
    );
  }
  const signIn = new URL('/signin', request.url);
  if (pathname !== '/') signIn.searchParams.set('callbackUrl', `${pathname}${search}`);
  return NextResponse.redirect(signIn);
}

export const config = {
  // Static assets and Next.js internals never need a session. Upload routes (/api/uploads/…) are left out
  // because Next.js buffers, and cuts at 10 MB, the whole body of a request that passes through the proxy;
  // those handlers stream the body to disk and check the session themselves (requireRole). The pull API
  // (/api/v1/…) is left out too: controller projects authenticate there with a project token, checked in
  // every one of its route handlers (lib/pull-api.ts), and skipping the proxy keeps its latency down.
  matcher: ['/((?!_next/static|_next/image|favicon.ico|robots.txt|api/uploads/|api/v1/).*)'],
};
