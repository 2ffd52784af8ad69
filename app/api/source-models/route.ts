// The source-model table's page of rows: sorted, filtered and paginated on the server.
import { requireRole } from '@/lib/auth';
import { parseQuery, route } from '@/lib/http';
import { listSourceModels, sourceModelListSchema } from '@/lib/source-models';

export const dynamic = 'force-dynamic';

export const GET = route(async (request) => {
  await requireRole();
  return listSourceModels(parseQuery(request, sourceModelListSchema));
});
