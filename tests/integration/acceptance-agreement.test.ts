// One acceptance verdict per reduced-model version, everywhere: the worker decides it once
// (reduction/acceptance.ts through lib/engine-tasks/reduction-task.ts) and stores it; the comparison page's
// data, the review sheet, the reduced-model list, the JSON, CSV and C-header exports and the pull API's pin
// list all show that stored verdict, for a failing, a passing and a not-checked band.
//
// Two versions are real reductions (balanced truncation of a made-up stiff 6-state network, run in-process
// as the seed does, registered with lib/reduced-models/); the third stores a verdict of the same function
// on a band that reaches past the computed frequencies. The reference for "the worker decided with the
// shared rule" is acceptanceVerdict run again here on the stored error curve.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import JSZip from 'jszip';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { acceptanceVerdict, type AcceptanceStatus } from '@/reduction/acceptance';
import { acceptancePassedColumn, acceptanceSentence, ACCEPTANCE_WORD } from '@/lib/acceptance';
import { runAnalysis } from '@/lib/engine-tasks/analysis-task';
import { acceptanceRecord, runReduction, type RecipeInput } from '@/lib/engine-tasks/reduction-task';
import type { ReductionCurves } from '@/lib/engine-tasks/records';
import { getComparisonPage, listReducedModels, registerReducedVersion } from '@/lib/reduced-models';
import { reviewSheet } from '@/lib/review';
import { createProject } from '@/lib/projects';
import { createPin } from '@/lib/pins';
import { createProjectToken } from '@/lib/project-tokens';
import { acceptanceText } from '@/components/review/figure-lines';
import { makeUser, migrateTestDatabase } from './helpers';
import { addReducedVersion, addSourceVersion, makeRecipe, makeReducedModel, makeSourceModel, markApproved } from './fixtures/shelf';
import { stiffTestModel, uniqueSlug } from './fixtures/projects';
import { pull } from './fixtures/pull';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });

let author: UserRow;
let reviewer: UserRow;
let scratch = '';
const versions: { status: AcceptanceStatus; id: string; slug: string; band: { minFrequency: number; maxFrequency: number; maxError: number } }[] = [];
let project: { slug: string };
let token = '';

beforeAll(async () => {
  await migrateTestDatabase();
  author = await makeUser({ role: 'engineer', label: 'acc-author' });
  reviewer = await makeUser({ role: 'reviewer', label: 'acc-reviewer' });
  scratch = mkdtempSync(path.join(os.tmpdir(), 'acceptance-'));
  const file = path.join(scratch, 'network.json');
  writeFileSync(file, JSON.stringify({ ...stiffTestModel(6, 1, 1, 5, 3), timeBase: 's' }));
  const files = [{ role: 'model' as const, name: 'network.json', path: file }];
  const analysis = runAnalysis(files, 'test', () => {});

  const sourceModel = await makeSourceModel(author.id, 'acc-net');
  const sourceVersion = await addSourceVersion(sourceModel.id, author.id, 6);
  const hInfinityNorm = analysis.stablePartHInfinityNorm ?? 1;
  // The same band, [0.5, 50] rad/s inside the poles' band (decay rates 1 to 1000): a limit no order-2 model
  // meets (1e-9·‖G‖∞), and one every model meets (10·‖G‖∞, above any error of a stable truncation's bound).
  for (const [status, maxError] of [['fail', 1e-9 * hInfinityNorm], ['pass', 10 * hInfinityNorm]] as const) {
    const recipe: RecipeInput = { method: 'balanced', order: 2, tolerance: null, acceptance: { minFrequency: 0.5, maxFrequency: 50, maxError } };
    const record = runReduction(files, recipe, analysis, 'test', () => {});
    const registered = await db().transaction(async (trx) => {
      const [recipeRow] = await trx('recipes')
        .insert({ method: 'balanced', order: 2, options: JSON.stringify({}), acceptance: JSON.stringify(recipe.acceptance), created_by: author.id })
        .returning('*');
      const payload = { recipeId: recipeRow.id, sourceVersionId: sourceVersion.id, target: { kind: 'new', name: `Acceptance ${status} ${uniqueSlug('rom')}`, description: 'test' } };
      const [job] = await trx('jobs')
        .insert({ kind: 'reduction', subject_type: 'source_version', subject_id: sourceVersion.id, status: 'running', attempts: 1, attempt: 1, payload: JSON.stringify(payload), created_by: author.id })
        .returning('*');
      return registerReducedVersion(trx, job, record);
    });
    versions.push({ status, id: registered.reducedVersionId, slug: registered.reducedModelSlug, band: recipe.acceptance! });
  }

  // Not checked: the same function on the first version's stored curve, for a band reaching past its top.
  const stored = (await db()('accuracy_reports').where({ reduced_version_id: versions[0].id }).first('curves', 'figures')) as { curves: ReductionCurves; figures: Record<string, unknown> };
  const w = stored.curves.frequency.frequencies;
  const band = { minFrequency: 0.5, maxFrequency: w[w.length - 1] * 10, maxError: 10 * hInfinityNorm };
  const record = acceptanceRecord(band, w, stored.curves.frequency.error);
  const reducedModel = await makeReducedModel(sourceModel.id, author.id);
  const recipe = await makeRecipe(author.id, 2);
  const third = await addReducedVersion({
    reducedModelId: reducedModel.id,
    sourceVersionId: sourceVersion.id,
    recipeId: recipe.id,
    authorId: author.id,
    figures: { ...stored.figures, acceptance: record },
  });
  await db()('accuracy_reports')
    .where({ reduced_version_id: third.id })
    .update({ curves: JSON.stringify(stored.curves), acceptance_passed: acceptancePassedColumn(record.status ?? null) });
  versions.push({ status: 'not-checked', id: third.id, slug: reducedModel.slug, band });

  for (const v of versions) await markApproved(v.id, reviewer.id);
  project = await createProject({ name: 'Acceptance agreement', slug: uniqueSlug('acc') }, asSession(author));
  for (const v of versions) await createPin(project.slug, { reducedModel: v.slug, mode: 'newest_approved' }, asSession(author));
  token = (await createProjectToken(project.slug, { name: 'acceptance' }, asSession(author))).token;
}, 120_000);

afterAll(async () => {
  rmSync(scratch, { recursive: true, force: true });
  await closeDb();
});

describe('the acceptance verdict of one version', () => {
  it('is decided by the worker with the shared rule on the curve it stored', async () => {
    for (const v of versions) {
      const report = await db()('accuracy_reports').where({ reduced_version_id: v.id }).first('figures', 'curves', 'acceptance_passed');
      const again = acceptanceVerdict(report.curves.frequency.frequencies, report.curves.frequency.error, v.band);
      expect(again.status, v.status).toBe(v.status);
      expect(report.figures.acceptance, v.status).toMatchObject({ status: v.status, worstError: again.worstError, worstFrequency: again.worstFrequency, pointsChecked: again.pointsChecked });
      expect(report.acceptance_passed, v.status).toBe(acceptancePassedColumn(v.status));
    }
  });

  it('is the same on the comparison page, the review sheet, the list, in the exports and in the pull API', async () => {
    const pins = await (await pull.pins(project.slug, { token })).json();
    const list = await listReducedModels();
    for (const v of versions) {
      const word = ACCEPTANCE_WORD[v.status];
      // Page data: the comparison page (chart), the review sheet and the list.
      const page = (await getComparisonPage(v.slug, 1))!;
      expect(page.version.acceptance?.status, v.status).toBe(v.status);
      const sentence = acceptanceSentence(page.version.acceptance!, page.source.timeBase);
      expect(sentence.startsWith(`${word}:`), sentence).toBe(true);
      const sheet = (await reviewSheet(v.id, { id: reviewer.id, name: reviewer.name, role: 'reviewer' }))!;
      expect(sheet.version.acceptance?.status, v.status).toBe(v.status);
      expect(acceptanceText(sheet.version.accuracy!.figures, sheet.version.accuracy!.acceptancePassed).startsWith(word)).toBe(true);
      expect(list.find((m) => m.slug === v.slug)?.latest.acceptance?.status, v.status).toBe(v.status);

      // Exports: JSON, C header and the CSV bundle's README.
      const doc = await (await pull.model(project.slug, v.slug, { token })).json();
      expect(doc.acceptance.status, v.status).toBe(v.status);
      expect(doc.acceptance.text.startsWith(`${word}:`)).toBe(true);
      const header = await (await pull.model(project.slug, v.slug, { token, query: { format: 'c' } })).text();
      expect(header, v.status).toMatch(new RegExp(`\\n \\* Acceptance band: ${word}: `));
      const zip = await JSZip.loadAsync(Buffer.from(await (await pull.model(project.slug, v.slug, { token, query: { format: 'csv' } })).arrayBuffer()));
      const readme = await zip.file(`${v.slug}-v1/README.txt`)!.async('string');
      expect(readme, v.status).toContain(`Acceptance band: ${word}: `);

      // The pull API's pin list.
      const pin = pins.pins.find((p: { reducedModel: { slug: string } }) => p.reducedModel.slug === v.slug);
      expect(pin.resolved.acceptance, v.status).toBe(v.status);
      expect(pin.resolved.acceptancePassed, v.status).toBe(acceptancePassedColumn(v.status));
    }
  });
});
