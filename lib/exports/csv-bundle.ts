// The CSV bundle: a zip with one CSV per matrix (plain numbers, one matrix row per line, no header row, so
// any CSV reader loads it as a numeric array), the signal and state names, a README with provenance and
// the caution, and a manifest (the JSON export without the matrices, plus each file's SHA-256).
//
// Numbers are written as the shortest decimal that reads back to the same double (ECMA-262
// Number::toString), so a reader that rounds correctly recovers the registered matrices bit for bit.
// The zip's entries are dated with the version's registration time, not the download time.
import { createHash } from 'node:crypto';
import JSZip from 'jszip';
import type { ExportDocument } from './document';
import { acceptanceLine, accuracyLine, exportJson, exportStem, exportWarnings, recipeLine } from './document';
import type { Rows } from './source';
import { wrapWords } from './wrap';

export function csvNumber(x: number): string {
  return Object.is(x, -0) ? '0' : String(x);
}

export function matrixCsv(rows: Rows): string {
  return rows.map((r) => r.map(csvNumber).join(',')).join('\n') + '\n';
}

/** RFC 4180 quoting where a field needs it. */
function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

function namesCsv(doc: ExportDocument): string {
  const lines = ['kind,index,name'];
  const { inputs, outputs, states } = doc.source.labels;
  inputs.forEach((n, i) => lines.push(`input,${i + 1},${csvField(n)}`));
  outputs.forEach((n, i) => lines.push(`output,${i + 1},${csvField(n)}`));
  states.forEach((n, i) => lines.push(`state,${i + 1},${csvField(n)}`));
  return lines.join('\n') + '\n';
}

const wrap = (text: string) => wrapWords(text, 96);

export function matrixFileNames(doc: ExportDocument): Record<'A' | 'B' | 'C' | 'D', string> {
  return doc.kind === 'discrete'
    ? { A: 'Ad.csv', B: 'Bd.csv', C: 'Cd.csv', D: 'Dd.csv' }
    : { A: 'A.csv', B: 'B.csv', C: 'C.csv', D: 'D.csv' };
}

function readme(doc: ExportDocument, files: Record<'A' | 'B' | 'C' | 'D', string>): string {
  const s = doc.source;
  const d = doc.discretisation;
  const lines = [
    `Modeshelf reduced model ${s.reducedModel.name} (${s.reducedModel.slug}) v${s.version.number}, ${s.version.status}`,
    '',
    'CAUTION',
    ...wrap(doc.caution),
    '',
    ...(exportWarnings(doc).length > 0 ? ['WARNINGS', ...exportWarnings(doc).flatMap((w) => wrap(`- ${w}`)), ''] : []),
    'WHAT IS IN THIS BUNDLE',
    d
      ? `Discrete-time model by zero-order hold at ts = ${d.ts} s: x[k+1] = Ad x[k] + Bd u[k], y[k] = Cd x[k] + Dd u[k].`
      : `Continuous-time model: dx/dt = A x + B u, y = C x + D u (time in ${s.timeBase}).`,
    `${files.A}  ${s.version.order} x ${s.version.order}     ${files.B}  ${s.version.order} x ${s.labels.inputs.length}`,
    `${files.C}  ${s.labels.outputs.length} x ${s.version.order}     ${files.D}  ${s.labels.outputs.length} x ${s.labels.inputs.length}`,
    'names.csv     the input, output and state names, in matrix order',
    ...(d ? ['poles.csv     the discrete poles (eigenvalues of Ad): re, im, magnitude'] : []),
    'manifest.json provenance (recipe, source lineage, accuracy report) and the SHA-256 of every file',
    '',
    'Each CSV holds one matrix row per line, numbers only, written so they read back to the same doubles.',
    `SHA-256 of the matrices in this bundle: ${doc.matricesSha256}`,
    `SHA-256 of the registered matrices (modeshelf.lock.json): ${doc.registeredMatricesSha256}`,
    '(SHA-256 of the UTF-8 text JSON.stringify({A, B, C, D}), each matrix an array of rows.)',
    '',
    'PROVENANCE',
    `Source model ${s.lineage.sourceModel.slug} v${s.lineage.sourceVersion.number} (${s.lineage.sourceVersion.states} states, checksum ${s.lineage.sourceVersion.checksum})`,
    recipeLine(s),
    accuracyLine(s),
    acceptanceLine(s),
    `Generated ${doc.generatedAt.toISOString()}`,
  ];
  return lines.join('\n') + '\n';
}

export async function csvBundle(doc: ExportDocument): Promise<Buffer> {
  const files = matrixFileNames(doc);
  const contents: [string, string][] = [
    [files.A, matrixCsv(doc.matrices.A)],
    [files.B, matrixCsv(doc.matrices.B)],
    [files.C, matrixCsv(doc.matrices.C)],
    [files.D, matrixCsv(doc.matrices.D)],
    ['names.csv', namesCsv(doc)],
  ];
  if (doc.discretisation) {
    contents.push(['poles.csv', 're,im,magnitude\n' + doc.discretisation.poles.map((p) => [p.re, p.im, p.magnitude].map(csvNumber).join(',')).join('\n') + '\n']);
  }
  contents.push(['README.txt', readme(doc, files)]);
  const sha = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');
  const manifest = {
    ...exportJson(doc, false),
    files: Object.fromEntries(contents.map(([name, text]) => [name, { sha256: sha(text), bytes: Buffer.byteLength(text) }])),
  };
  contents.push(['manifest.json', JSON.stringify(manifest, null, 2) + '\n']);

  const zip = new JSZip();
  const folder = zip.folder(exportStem(doc))!;
  const date = doc.source.version.registeredAt;
  for (const [name, text] of contents) folder.file(name, text, { date });
  return zip.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE', compressionOptions: { level: 6 } });
}
