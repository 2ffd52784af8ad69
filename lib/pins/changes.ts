// The changes to pins, each one transaction with its audit event: create, change and remove. Only a manager
// of the project (lib/projects.ts) makes them; members hear of later changes through lib/notifications/.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import { requireProject, requireProjectManager } from '@/lib/projects';
import type { SessionUser } from '@/lib/auth';
import type { PinInput, PinShape, PinUpdate } from '@/lib/pins/schemas';
import { noticeStateOf } from '@/lib/pins/resolution';
import { findPinById, type ResolvedPin } from '@/lib/pins/queries';

async function exactVersionId(trx: Knex.Transaction, model: { id: string; slug: string }, spec: PinShape): Promise<string | null> {
  if (spec.mode !== 'exact') return null;
  const version = await trx('reduced_versions').where({ reduced_model_id: model.id, number: spec.version }).first('id', 'status');
  if (!version) throw new ApiError(404, 'not_found', `Reduced model "${model.slug}" has no version v${spec.version}.`, 'version');
  if (version.status !== 'approved') {
    throw new ApiError(409, 'not_approved', `v${spec.version} of "${model.slug}" is ${String(version.status).replace('_', ' ')}; pin an approved version.`, 'version');
  }
  return version.id;
}

function pinColumns(spec: PinShape, versionId: string | null) {
  const exact = spec.mode === 'exact';
  return {
    mode: spec.mode,
    reduced_version_id: versionId,
    max_order: exact ? null : (spec.maxOrder ?? null),
    max_relative_h_infinity_error: exact ? null : (spec.maxRelativeHInfinityError ?? null),
    require_acceptance_passed: exact ? false : (spec.requireAcceptancePassed ?? false),
  };
}

export async function createPin(projectSlug: string, input: PinInput, actor: SessionUser, outer: Knex = db()): Promise<ResolvedPin> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const model = await trx('reduced_models').where({ slug: input.reducedModel }).first('id', 'slug');
    if (!model) throw new ApiError(404, 'not_found', `Reduced model "${input.reducedModel}" was not found.`, 'reducedModel');
    const versionId = await exactVersionId(trx, model, input);
    const existing = await trx('pins').where({ project_id: project.id, reduced_model_id: model.id }).first('id');
    if (existing) throw new ApiError(409, 'already_pinned', `This project already pins "${model.slug}"; change that pin instead.`, 'reducedModel');
    const [row] = await trx('pins')
      .insert({ project_id: project.id, reduced_model_id: model.id, ...pinColumns(input, versionId), created_by: actor.id })
      .returning('id');
    const pin = (await findPinById(project.id, row.id, trx))!;
    // Members hear about changes from now on, not about the state the pin was created in.
    await trx('pins').where({ id: pin.id }).update({ notice_state: JSON.stringify(noticeStateOf(pin.resolution)) });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.created',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId: pin.id, reducedModel: model.slug, mode: input.mode, version: input.version ?? null, limits: pin.limits },
    });
    return pin;
  });
}

export async function updatePin(projectSlug: string, pinId: string, change: PinUpdate, actor: SessionUser, outer: Knex = db()): Promise<ResolvedPin> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const before = await trx('pins').where({ id: pinId, project_id: project.id }).forUpdate().first();
    if (!before) throw notFound('That pin');
    const model = await trx('reduced_models').where({ id: before.reduced_model_id }).first('id', 'slug');
    const versionId = await exactVersionId(trx, model, change);
    await trx('pins').where({ id: pinId }).update({ ...pinColumns(change, versionId), updated_at: trx.fn.now() });
    const pin = (await findPinById(project.id, pinId, trx))!;
    await trx('pins').where({ id: pinId }).update({ notice_state: JSON.stringify(noticeStateOf(pin.resolution)) });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.changed',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId, reducedModel: model.slug, mode: change.mode, version: change.version ?? null, limits: pin.limits },
    });
    return pin;
  });
}

export async function deletePin(projectSlug: string, pinId: string, actor: SessionUser, outer: Knex = db()): Promise<void> {
  await outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const pin = await findPinById(project.id, pinId, trx);
    if (!pin) throw notFound('That pin');
    await trx('pins').where({ id: pinId }).delete();
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.removed',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId, reducedModel: pin.reducedModel.slug },
    });
  });
}
