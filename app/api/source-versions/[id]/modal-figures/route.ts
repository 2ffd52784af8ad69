// The order slider's figures for modal truncation with the band rule, for the band the form holds now.
// Worked out from the stored analysis (mode list and kept poles): sums and minima, no decomposition.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { parseParams, parseQuery, route } from '@/lib/http';
import { bandOrderFigures } from '@/lib/source-models';

const paramsSchema = z.object({ id: z.uuid({ error: 'The source version id must be a UUID.' }) });
const querySchema = z
  .object({
    minFrequency: z.coerce.number({ error: 'minFrequency must be a number.' }).positive('minFrequency must be above 0.'),
    maxFrequency: z.coerce.number({ error: 'maxFrequency must be a number.' }).positive('maxFrequency must be above 0.'),
  })
  .refine((q) => q.maxFrequency > q.minFrequency, { message: 'maxFrequency must be above minFrequency.', path: ['maxFrequency'] });

export const dynamic = 'force-dynamic';

export const GET = route<{ id: string }>(async (request, { params }) => {
  await requireRole();
  const { id } = await parseParams(params, paramsSchema);
  const { minFrequency, maxFrequency } = parseQuery(request, querySchema);
  return bandOrderFigures(id, [minFrequency, maxFrequency]);
});
