// Signing in over plain HTTP, the way a browser's form does it through next-auth's credentials endpoint,
// to call route handlers as a given person without driving a page.
import { BASE_URL } from './browser';

function cookiePairs(response: Response): string[] {
  return response.headers.getSetCookie().map((c) => c.split(';')[0]);
}

/** Returns the Cookie header value of a signed-in session. */
export async function signInOverHttp(email: string, password: string): Promise<string> {
  const csrf = await fetch(`${BASE_URL}/api/auth/csrf`);
  const csrfCookies = cookiePairs(csrf);
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const response = await fetch(`${BASE_URL}/api/auth/callback/credentials`, {
    method: 'POST',
    redirect: 'manual',
    headers: { 'content-type': 'application/x-www-form-urlencoded', cookie: csrfCookies.join('; ') },
    body: new URLSearchParams({ csrfToken, email, password, json: 'true' }),
  });
  const session = cookiePairs(response).find((c) => c.startsWith('next-auth.session-token='));
  if (!session) throw new Error(`signing in ${email} over HTTP gave no session cookie (status ${response.status})`);
  return [...csrfCookies, session].join('; ');
}

export async function call(
  method: string,
  path: string,
  options: { cookie?: string; body?: unknown } = {},
): Promise<{ status: number; body: any }> {
  const response = await fetch(`${BASE_URL}${path}`, {
    method,
    redirect: 'manual',
    headers: {
      ...(options.cookie ? { cookie: options.cookie } : {}),
      ...(options.body !== undefined ? { 'content-type': 'application/json' } : {}),
    },
    body: options.body !== undefined ? JSON.stringify(options.body) : undefined,
  });
  const text = await response.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON; keep the text for the failure message
  }
  return { status: response.status, body };
}
