// GET /api/projects/{project}/pins/{pin}/export?format=json|csv|c&ts=<seconds>|project — the project page's
// downloads for a signed-in person: the same exports the pull API serves, without a project token.
import { z } from 'zod';
import { requireRole } from '@/lib/auth';
import { ApiError, parseParams, parseQuery, route } from '@/lib/http';
import { projectSlugSchema, requireProject } from '@/lib/projects';
import { findPinById } from '@/lib/pins';
import { exportQuerySchema, exportResponse, exportVersion } from '@/lib/exports';

const paramsSchema = z.object({ project: projectSlugSchema, pin: z.uuid({ error: 'The pin id must be a UUID.' }) });

export const GET = route<{ project: string; pin: string }>(async (request, { params }) => {
  await requireRole();
  const { project: slug, pin: pinId } = await parseParams(params, paramsSchema);
  const query = parseQuery(request, exportQuerySchema);
  const project = await requireProject(slug);
  const pin = await findPinById(project.id, pinId);
  if (!pin) throw new ApiError(404, 'not_found', 'That pin was not found in this project.');
  const version = pin.resolution.version;
  if (!version) throw new ApiError(409, 'unresolved_pin', `The pin resolves to no version: ${pin.resolution.explanation}`);
  return exportResponse(
    await exportVersion({
      versionId: version.id,
      format: query.format,
      ts: query.ts,
      projectSampleTime: project.sample_time,
      pin: {
        project: { slug: project.slug, name: project.name },
        mode: pin.mode,
        exactVersionNumber: pin.exactVersionNumber,
        limits: pin.limits,
        explanation: pin.resolution.explanation,
      },
    }),
  );
});
