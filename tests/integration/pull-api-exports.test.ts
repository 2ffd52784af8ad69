// The pull API's exports against what was registered and against outside references:
//   - JSON, CSV bundle and C header carry the registered matrices bit for bit, and the SHA-256 of
//     lib/checksums.ts (the C header is compiled with the system C compiler, gcc, and its arrays printed
//     back with %.17g, which round-trips IEEE doubles);
//   - the discretised export matches scipy.signal.cont2discrete(method='zoh') and numpy.linalg.eigvals from
//     Debian's python3-scipy / python3-numpy (tests/reference/pull_export_reference.py) within 1e-10;
//   - the sample-time check uses the fastest kept time constant 1/max|lambda| of numpy's poles.
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import JSZip from 'jszip';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { matricesSha256, type StateSpaceRows } from '@/lib/checksums';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { createProject, updateProject } from '@/lib/projects';
import { createPin } from '@/lib/pins';
import { createProjectToken } from '@/lib/project-tokens';
import { CAUTION_TEXT } from '@/lib/caution';
import { SAMPLE_TIME_FRACTION } from '@/lib/exports/discrete';
import { makeUser, migrateTestDatabase } from './helpers';
import { addVersion, makeProjectShelf, retireVersion, stiffTestModel, uniqueSlug, type ProjectShelf } from './fixtures/projects';
import { pull } from './fixtures/pull';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });
const REFERENCE = path.resolve(__dirname, '..', 'reference', 'pull_export_reference.py');
const GCC = '/usr/bin/gcc';

interface Reference {
  Ad: number[][];
  Bd: number[][];
  Cd: number[][];
  Dd: number[][];
  discretePoles: [number, number][];
  continuousPoles: [number, number][];
}

function scipyZoh(m: StateSpaceRows, ts: number): Reference {
  const out = execFileSync('/usr/bin/python3', [REFERENCE], { input: JSON.stringify({ ...m, ts }), encoding: 'utf8' });
  return JSON.parse(out);
}

function expectBitForBit(actual: number[][], expected: readonly (readonly number[])[], what: string) {
  expect(actual.length, what).toBe(expected.length);
  expected.forEach((row, i) => {
    expect(actual[i].length, `${what} row ${i}`).toBe(row.length);
    row.forEach((x, j) => expect(Object.is(actual[i][j], x), `${what}[${i}][${j}]: ${actual[i][j]} vs ${x}`).toBe(true));
  });
}

function maxAbsDiff(a: number[][], b: number[][]): number {
  let worst = 0;
  a.forEach((row, i) => row.forEach((x, j) => (worst = Math.max(worst, Math.abs(x - b[i][j])))));
  return worst;
}

/** Sorts complex numbers by real, then imaginary part, for comparing pole sets. */
const byReIm = (p: [number, number][]) => [...p].sort((x, y) => x[0] - y[0] || x[1] - y[1]);

const MODEL = stiffTestModel(5, 2, 3, 11, 3);
const DESCRIPTION = { labels: { inputs: ['heater "north"', 'fan'], outputs: ['T zone', 'T wall', 'T süd'], states: ['x1', 'x2', 'x3', 'x4', 'x5'] }, timeBase: 's' };

let engineer: SessionUser;
let shelf: ProjectShelf;
let project: { id: string; slug: string };
let token: string;

beforeAll(async () => {
  await migrateTestDatabase();
  engineer = asSession(await makeUser({ role: 'engineer', label: 'export-eng' }));
  shelf = await makeProjectShelf('export');
  await addVersion(shelf, { matrices: MODEL, description: DESCRIPTION, hInfinityErrorRelative: 2.5e-3 });
  project = await createProject({ name: 'Export checks', slug: uniqueSlug('export') }, engineer);
  await createPin(project.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved' }, engineer);
  token = (await createProjectToken(project.slug, { name: 'exports' }, engineer)).token;
});

afterAll(async () => {
  await closeDb();
});

describe('JSON export', () => {
  it('carries the registered matrices bit for bit, with the registered SHA-256 in the body and the headers', async () => {
    const response = await pull.model(project.slug, shelf.reducedModel.slug, { token });
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toBe('application/json; charset=utf-8');
    const doc = await response.json();
    for (const key of ['A', 'B', 'C', 'D'] as const) expectBitForBit(doc.matrices[key], MODEL[key], key);
    const stored = await db()('reduced_versions').where({ reduced_model_id: shelf.reducedModel.id, number: 1 }).first('matrices_sha256');
    expect(doc.matricesSha256).toBe(stored.matrices_sha256);
    expect(doc.registeredMatricesSha256).toBe(stored.matrices_sha256);
    expect(matricesSha256(doc.matrices)).toBe(stored.matrices_sha256);
    expect(response.headers.get('x-modeshelf-matrices-sha256')).toBe(stored.matrices_sha256);
    expect(response.headers.get('x-modeshelf-version')).toBe('1');
  });

  it('carries labels, units, order, recipe, source lineage, accuracy report and the caution', async () => {
    const doc = await (await pull.model(project.slug, shelf.reducedModel.slug, { token })).json();
    expect(doc).toMatchObject({
      format: 'modeshelf-reduced-model',
      formatVersion: 1,
      kind: 'continuous',
      order: 5,
      inputs: 2,
      outputs: 3,
      timeBase: 's',
      labels: DESCRIPTION.labels,
      recipe: { method: 'balanced', order: 1 },
      lineage: { sourceModel: { slug: shelf.sourceModel.slug }, sourceVersion: { number: 1 }, upstreamChanged: false },
      accuracyReport: { figures: { hInfinityErrorRelative: 2.5e-3 }, acceptancePassed: true },
      pin: { project: { slug: project.slug }, mode: 'newest_approved' },
      discretisation: null,
      warnings: [],
      caution: CAUTION_TEXT,
    });
  });

  it('serves a retired version pinned exactly, flagged in the body and the headers', async () => {
    const s = await makeProjectShelf('retired-export');
    const v1 = await addVersion(s, { matrices: stiffTestModel(2) });
    const p = await createProject({ name: 'Retired export', slug: uniqueSlug('ret') }, engineer);
    await createPin(p.slug, { reducedModel: s.reducedModel.slug, mode: 'exact', version: 1 }, engineer);
    await retireVersion(v1.id, s.reviewer.id);
    const t = (await createProjectToken(p.slug, { name: 'rebuild' }, engineer)).token;
    const response = await pull.model(p.slug, s.reducedModel.slug, { token: t });
    expect(response.status).toBe(200);
    expect(response.headers.get('x-modeshelf-warnings')).toBe('retired');
    const doc = await response.json();
    expect(doc.flags).toEqual({ retired: true, upstreamChanged: false });
    expect(doc.warnings[0]).toMatch(/has been retired/);
    expectBitForBit(doc.matrices.A, stiffTestModel(2).A, 'A');
  });
});

describe('CSV bundle', () => {
  it('holds one CSV per matrix that reads back bit for bit, names, README with the caution, and a manifest of checksums', async () => {
    const response = await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { format: 'csv' } });
    expect(response.headers.get('content-type')).toBe('application/zip');
    expect(response.headers.get('content-disposition')).toBe(`attachment; filename="${shelf.reducedModel.slug}-v1-csv.zip"`);
    const zip = await JSZip.loadAsync(Buffer.from(await response.arrayBuffer()));
    const folder = `${shelf.reducedModel.slug}-v1/`;
    const names = Object.keys(zip.files).filter((n) => !zip.files[n].dir).sort();
    expect(names).toEqual(['A.csv', 'B.csv', 'C.csv', 'D.csv', 'README.txt', 'manifest.json', 'names.csv'].map((n) => folder + n).sort());
    const read = (n: string) => zip.file(folder + n)!.async('string');
    for (const key of ['A', 'B', 'C', 'D'] as const) {
      const rows = (await read(`${key}.csv`)).trim().split('\n').map((line) => line.split(',').map(Number));
      expectBitForBit(rows, MODEL[key], `${key}.csv`);
    }
    expect(await read('names.csv')).toContain('input,1,"heater ""north"""');
    const readme = await read('README.txt');
    expect(readme.replace(/\s+/g, ' ')).toContain(CAUTION_TEXT);
    const manifest = JSON.parse(await read('manifest.json'));
    expect(manifest.matrices).toBeUndefined();
    expect(manifest.matricesSha256).toBe(matricesSha256(MODEL));
    for (const n of ['A.csv', 'B.csv', 'C.csv', 'D.csv', 'names.csv', 'README.txt']) {
      expect(manifest.files[n].sha256, n).toBe(createHash('sha256').update(await read(n)).digest('hex'));
    }
  });
});

describe('C header', () => {
  it('is ASCII, carries provenance and the caution in its comment block, and sizes as macros', async () => {
    const response = await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { format: 'c' } });
    const header = await response.text();
    expect(/^[\x09\x0a\x20-\x7e]*$/.test(header)).toBe(true);
    const comment = header.slice(0, header.indexOf('*/'));
    expect(comment.replace(/\s*\n \* /g, ' ')).toContain(CAUTION_TEXT);
    expect(comment).toContain(`\n * Source model: ${shelf.sourceModel.slug} v1 (40 states)\n`);
    expect(comment).toContain(`\n * Matrices SHA-256 (this file): ${matricesSha256(MODEL)}\n`);
    expect(comment).toContain(`\n * Registered SHA-256 (lock file): ${matricesSha256(MODEL)}\n`);
    expect(header).toMatch(/#define \w+_V1_STATES 5\n/);
  });

  it.runIf(existsSync(GCC))('compiles (gcc -std=c99 -pedantic -Wall -Werror) and its arrays print back bit for bit', async () => {
    const header = await (await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { format: 'c' } })).text();
    const id = `${shelf.reducedModel.slug.replace(/-/g, '_')}_v1`;
    const ID = id.toUpperCase();
    const dir = mkdtempSync(path.join(os.tmpdir(), 'modeshelf-header-'));
    try {
      writeFileSync(path.join(dir, 'model.h'), header);
      const print = (name: string, rows: string, cols: string) =>
        `for (i = 0; i < ${rows}; i++) { for (j = 0; j < ${cols}; j++) printf("%s%.17g", j ? "," : "", ${id}_${name}[i][j]); printf("\\n"); } printf("--\\n");`;
      writeFileSync(
        path.join(dir, 'main.c'),
        `#include <stdio.h>\n#include "model.h"\nint main(void) { int i, j;\n` +
          print('A', `${ID}_STATES`, `${ID}_STATES`) +
          print('B', `${ID}_STATES`, `${ID}_INPUTS`) +
          print('C', `${ID}_OUTPUTS`, `${ID}_STATES`) +
          print('D', `${ID}_OUTPUTS`, `${ID}_INPUTS`) +
          `for (i = 0; i < ${ID}_INPUTS; i++) printf("%s\\n", ${id}_input_labels[i]);\n` +
          `for (i = 0; i < ${ID}_OUTPUTS; i++) printf("%s\\n", ${id}_output_labels[i]);\n` +
          `printf("%s\\n", ${ID}_MATRICES_SHA256); return 0; }\n`,
      );
      execFileSync(GCC, ['-std=c99', '-pedantic', '-Wall', '-Wextra', '-Werror', '-o', path.join(dir, 'main'), path.join(dir, 'main.c')], { cwd: dir });
      const out = execFileSync(path.join(dir, 'main'), { encoding: 'utf8' }).split('--\n');
      (['A', 'B', 'C', 'D'] as const).forEach((key, k) => {
        const rows = out[k].trim().split('\n').map((l) => l.split(',').map(Number));
        expectBitForBit(rows, MODEL[key], `header ${key}`);
      });
      expect(out[4].trim().split('\n')).toEqual([...DESCRIPTION.labels.inputs, ...DESCRIPTION.labels.outputs, matricesSha256(MODEL)]);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('discretised export (?ts=)', () => {
  const reference = () => scipyZoh(MODEL, 0.01);

  it('matches scipy.signal.cont2discrete(method="zoh") within 1e-10, with numpy’s discrete poles', async () => {
    const ref = reference();
    const response = await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: '0.01' } });
    expect(response.status).toBe(200);
    const doc = await response.json();
    expect(doc.kind).toBe('discrete');
    expect(maxAbsDiff(doc.matrices.A, ref.Ad)).toBeLessThan(1e-10);
    expect(maxAbsDiff(doc.matrices.B, ref.Bd)).toBeLessThan(1e-10);
    expectBitForBit(doc.matrices.C, MODEL.C, 'Cd');
    expectBitForBit(doc.matrices.D, MODEL.D, 'Dd');
    const poles = byReIm(doc.discretisation.poles.map((p: { re: number; im: number }) => [p.re, p.im]));
    const refPoles = byReIm(ref.discretePoles);
    poles.forEach((p, i) => {
      expect(Math.abs(p[0] - refPoles[i][0])).toBeLessThan(1e-10);
      expect(Math.abs(p[1] - refPoles[i][1])).toBeLessThan(1e-10);
    });
    expect(poles.some((p) => p[1] !== 0)).toBe(true); // the model's lightly damped pair
    // This file's digest is of the ZOH matrices; the registered one stays what the lock file records.
    expect(doc.matricesSha256).toBe(matricesSha256(doc.matrices));
    expect(doc.registeredMatricesSha256).toBe(matricesSha256(MODEL));
    expect(doc.discretisation).toMatchObject({ method: 'zero-order hold', ts: 0.01, tsUnit: 's', tsSource: 'query' });
  });

  it('warns when ts exceeds the stated fraction of the fastest kept time constant (1/max|λ| from numpy)', async () => {
    const ref = reference();
    const fastestRate = Math.max(...ref.continuousPoles.map(([re, im]) => Math.hypot(re, im)));
    const tau = 1 / fastestRate;
    const fine = await (await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: String(0.5 * SAMPLE_TIME_FRACTION * tau) } })).json();
    expect(Math.abs(fine.discretisation.check.fastestTimeConstant - tau) / tau).toBeLessThan(1e-10);
    expect(fine.discretisation.check).toMatchObject({ fraction: 0.2, resolvesDynamics: true, warning: null });
    expect(fine.warnings).toEqual([]);

    const coarse = await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: String(2 * SAMPLE_TIME_FRACTION * tau) } });
    expect(coarse.headers.get('x-modeshelf-warnings')).toBe('sample-time');
    const body = await coarse.json();
    expect(body.discretisation.check.resolvesDynamics).toBe(false);
    expect(body.warnings[0]).toMatch(/exceeds 0.2 x the fastest kept time constant/);
  });

  it("uses the project's sample time for ts=project, and converts seconds into a model's own time unit", async () => {
    await updateProject(project.slug, { sampleTime: 0.004 }, engineer);
    const ref = scipyZoh(MODEL, 0.004);
    const doc = await (await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: 'project' } })).json();
    expect(doc.discretisation).toMatchObject({ ts: 0.004, tsSource: 'project' });
    expect(maxAbsDiff(doc.matrices.A, ref.Ad)).toBeLessThan(1e-10);

    // The same matrices stated in milliseconds: ts = 0.004 s is 4 ms of model time.
    const ms = await makeProjectShelf('millis');
    await addVersion(ms, { matrices: MODEL, description: { ...DESCRIPTION, timeBase: 'ms' } });
    const p = await createProject({ name: 'Millisecond model', slug: uniqueSlug('ms') }, engineer);
    await createPin(p.slug, { reducedModel: ms.reducedModel.slug, mode: 'newest_approved' }, engineer);
    const t = (await createProjectToken(p.slug, { name: 'ms' }, engineer)).token;
    const msDoc = await (await pull.model(p.slug, ms.reducedModel.slug, { token: t, query: { ts: '0.004' } })).json();
    const msRef = scipyZoh(MODEL, 4);
    expect(msDoc.discretisation.tsInModelUnit).toBeCloseTo(4, 12);
    expect(maxAbsDiff(msDoc.matrices.A, msRef.Ad)).toBeLessThan(1e-10);
    expect(maxAbsDiff(msDoc.matrices.B, msRef.Bd)).toBeLessThan(1e-10);
  });

  it('gives the C header and the CSV bundle the ZOH matrices and the sample time', async () => {
    const header = await (await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: '0.01', format: 'c' } })).text();
    expect(header).toMatch(/#define \w+_V1_DISCRETE 1\n#define \w+_V1_SAMPLE_TIME_S 0\.01\n/);
    expect(header).toContain('Discrete time, zero-order hold at ts = 0.01 s');
    const zip = await JSZip.loadAsync(Buffer.from(await (await pull.model(project.slug, shelf.reducedModel.slug, { token, query: { ts: '0.01', format: 'csv' } })).arrayBuffer()));
    const folder = Object.keys(zip.files).find((n) => zip.files[n].dir)!;
    expect(folder).toBe(`${shelf.reducedModel.slug}-v1-zoh-0.01s/`);
    const ad = (await zip.file(`${folder}Ad.csv`)!.async('string')).trim().split('\n').map((l) => l.split(',').map(Number));
    expect(maxAbsDiff(ad, reference().Ad)).toBeLessThan(1e-10);
    expect(zip.file(`${folder}poles.csv`)).not.toBeNull();
  });
});
