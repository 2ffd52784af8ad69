// The C header: the matrices as static const double arrays with their sizes as macros, names as string
// tables, and a comment block of provenance, warnings and the caution, for a controller's firmware build.
// Plain C99, ASCII only (names are transliterated or escaped), include-guarded by model and version.
//
// Numbers are the shortest decimal that reads back to the same double (ECMA-262 Number::toString); a
// conforming compiler rounds a decimal floating constant to the nearest double (C99 6.4.4.2 with Annex F),
// so the arrays hold the exported doubles bit for bit.
import type { ExportDocument } from './document';
import { acceptanceLine, accuracyLine, exportWarnings, recipeLine } from './document';
import type { Rows } from './source';
import { wrapWords } from './wrap';

/** An identifier stem from a slug: "kiln-zone-3" → "kiln_zone_3" (prefixed when it would start with a digit). */
export function cIdentifier(slug: string): string {
  const id = slug.replace(/[^A-Za-z0-9]+/g, '_').replace(/^_+|_+$/g, '').toLowerCase();
  return /^[a-z_]/.test(id) ? id : `m_${id}`;
}

export function cNumber(x: number): string {
  if (!Number.isFinite(x)) throw new Error(`a C header cannot hold the non-finite value ${x}`);
  const s = Object.is(x, -0) ? '0' : String(x);
  return /[.e]/.test(s) ? s : `${s}.0`;
}

/** ASCII text safe inside a C block comment. */
function commentText(text: string): string {
  return text
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .replace(/[\u2010-\u2015\u2212]/g, '-')
    .replace(/[\u2018\u2019]/g, "'")
    .replace(/[\u201c\u201d]/g, '"')
    .replace(/[^\x20-\x7e]/g, '?')
    .replace(/\*\//g, '* /');
}

/** A C string literal, ASCII only: quotes and backslashes escaped, other bytes as octal escapes. */
export function cString(text: string): string {
  let out = '"';
  for (const byte of Buffer.from(text, 'utf8')) {
    if (byte === 0x22 || byte === 0x5c) out += `\\${String.fromCharCode(byte)}`;
    else if (byte >= 0x20 && byte < 0x7f && byte !== 0x3f) out += String.fromCharCode(byte); // '?' escaped: no trigraphs
    else out += `\\${byte.toString(8).padStart(3, '0')}`;
  }
  return `${out}"`;
}

function wrapComment(text: string, width = 92): string[] {
  return wrapWords(commentText(text), width);
}

function array(name: string, rows: Rows, rowsMacro: string, colsMacro: string): string {
  const body = rows.map((r) => `  { ${r.map(cNumber).join(', ')} }`).join(',\n');
  return `static const double ${name}[${rowsMacro}][${colsMacro}] = {\n${body}\n};\n`;
}

function stringTable(name: string, values: readonly string[], sizeMacro: string): string {
  return `static const char *const ${name}[${sizeMacro}] = {\n${values.map((v) => `  ${cString(v)}`).join(',\n')}\n};\n`;
}

export function cHeader(doc: ExportDocument): string {
  const s = doc.source;
  const d = doc.discretisation;
  const id = `${cIdentifier(s.reducedModel.slug)}_v${s.version.number}`;
  const ID = id.toUpperCase();
  const guard = `MODESHELF_${ID}_H`;
  const n = s.version.order;

  const comment: string[] = [
    `Modeshelf reduced model ${s.reducedModel.name} (${s.reducedModel.slug}) v${s.version.number}, ${s.version.status}`,
    d
      ? `Discrete time, zero-order hold at ts = ${d.ts} s: x[k+1] = A x[k] + B u[k], y[k] = C x[k] + D u[k]`
      : `Continuous time: dx/dt = A x + B u, y = C x + D u (time in ${s.timeBase})`,
    `${n} states, ${s.labels.inputs.length} inputs, ${s.labels.outputs.length} outputs`,
    '',
    `Source model: ${s.lineage.sourceModel.slug} v${s.lineage.sourceVersion.number} (${s.lineage.sourceVersion.states} states)`,
    `Source checksum: ${s.lineage.sourceVersion.checksum}`,
    recipeLine(s),
    accuracyLine(s),
    acceptanceLine(s),
    `Matrices SHA-256 (this file): ${doc.matricesSha256}`,
    `Registered SHA-256 (lock file): ${doc.registeredMatricesSha256}`,
    `Generated ${doc.generatedAt.toISOString()} by Modeshelf`,
  ];
  if (d) {
    comment.push(
      `Discrete poles: ${d.poles.map((p) => (p.im === 0 ? cNumber(p.re) : `${cNumber(p.re)}${p.im < 0 ? '-' : '+'}${cNumber(Math.abs(p.im))}i`)).join(', ')}`,
    );
  }
  const warnings = exportWarnings(doc);
  const block = [
    '/*',
    // Provenance lines stay whole (a checksum must not be split); only an over-long one is wrapped.
    ...comment.flatMap((line) => (line === '' ? [' *'] : commentText(line).length <= 110 ? [` * ${commentText(line)}`] : wrapComment(line).map((l) => ` * ${l}`))),
    ' *',
    ' * CAUTION',
    ...wrapComment(doc.caution).map((l) => ` * ${l}`),
    ...(warnings.length > 0
      ? [' *', ' * WARNINGS', ...warnings.flatMap((w) => wrapComment(w, 90).map((l, i) => (i === 0 ? ` * - ${l}` : ` *   ${l}`)))]
      : []),
    ' */',
  ].join('\n');

  const [A, B, C, D] = d ? ['Ad', 'Bd', 'Cd', 'Dd'] : ['A', 'B', 'C', 'D'];
  return [
    block,
    `#ifndef ${guard}`,
    `#define ${guard}`,
    '',
    `#define ${ID}_STATES ${n}`,
    `#define ${ID}_INPUTS ${s.labels.inputs.length}`,
    `#define ${ID}_OUTPUTS ${s.labels.outputs.length}`,
    `#define ${ID}_DISCRETE ${d ? 1 : 0}`,
    ...(d ? [`#define ${ID}_SAMPLE_TIME_S ${cNumber(d.ts)}`] : []),
    `#define ${ID}_TIME_BASE ${cString(s.timeBase)}`,
    `#define ${ID}_MATRICES_SHA256 ${cString(doc.matricesSha256)}`,
    `#define ${ID}_REGISTERED_SHA256 ${cString(doc.registeredMatricesSha256)}`,
    '',
    array(`${id}_${A}`, doc.matrices.A, `${ID}_STATES`, `${ID}_STATES`),
    array(`${id}_${B}`, doc.matrices.B, `${ID}_STATES`, `${ID}_INPUTS`),
    array(`${id}_${C}`, doc.matrices.C, `${ID}_OUTPUTS`, `${ID}_STATES`),
    array(`${id}_${D}`, doc.matrices.D, `${ID}_OUTPUTS`, `${ID}_INPUTS`),
    stringTable(`${id}_input_labels`, s.labels.inputs, `${ID}_INPUTS`),
    stringTable(`${id}_output_labels`, s.labels.outputs, `${ID}_OUTPUTS`),
    stringTable(`${id}_state_labels`, s.labels.states, `${ID}_STATES`),
    `#endif /* ${guard} */`,
    '',
  ].join('\n');
}
