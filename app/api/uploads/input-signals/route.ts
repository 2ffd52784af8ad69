// An input signal (CSV) for a reduced version's comparison page, as multipart/form-data; answers 202 with
// the response job. Outside proxy.ts's matcher like every upload route; the role check is the guard.
import { NextResponse } from 'next/server';
import { requireRole } from '@/lib/auth';
import { route } from '@/lib/http';
import { requestInputResponse } from '@/lib/reduced-models';

export const dynamic = 'force-dynamic';

export const POST = route(async (request) => {
  const user = await requireRole('engineer', 'reviewer');
  return NextResponse.json(await requestInputResponse(request, user), { status: 202 });
});
