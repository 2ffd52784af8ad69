// Upload of a source model (or of a new version of one: the form's sourceModelId) as multipart/form-data,
// streamed to disk (lib/uploads). Outside proxy.ts's matcher, because the proxy would buffer the body; the
// role check below is the whole of the guard. Answers 202 with the version and its analysis job.
import { NextResponse } from 'next/server';
import { requireRole } from '@/lib/auth';
import { route } from '@/lib/http';
import { registerUpload } from '@/lib/source-models';

export const dynamic = 'force-dynamic';

export const POST = route(async (request) => {
  const user = await requireRole('engineer');
  return NextResponse.json(await registerUpload(request, user), { status: 202 });
});
