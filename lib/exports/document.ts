// One export of one reduced-model version, independent of its file format: what the JSON carries in full,
// and what the CSV bundle and the C header lay out in their own ways. Continuous exports carry the
// registered matrices; discretised ones the zero-order-hold matrices, with the registered digest kept
// beside theirs so a lock file always records the version's own checksum.
import { CAUTION_TEXT } from '@/lib/caution';
import type { PinLimits, PinMode } from '@/lib/pins';
import { acceptanceSentence, storedAcceptance } from '@/lib/acceptance';
import { describeRecipe, NO_BOUND_NOTE } from '@/lib/recipe-words';
import type { ExportSource, RegisteredMatrices } from './source';
import type { Discretisation } from './discrete';

export const EXPORT_FORMAT = 'modeshelf-reduced-model';
export const EXPORT_FORMAT_VERSION = 1;

export interface PinContext {
  project: { slug: string; name: string };
  mode: PinMode;
  exactVersionNumber: number | null;
  limits: PinLimits;
  explanation: string;
}

export interface ExportDocument {
  source: ExportSource;
  kind: 'continuous' | 'discrete';
  /** The matrices this export carries: registered (continuous) or zero-order hold (discrete). */
  matrices: RegisteredMatrices;
  /** SHA-256 of `matrices` (lib/checksums.ts). */
  matricesSha256: string;
  /** SHA-256 of the registered continuous matrices: what modeshelf.lock.json records. */
  registeredMatricesSha256: string;
  discretisation: Discretisation | null;
  flags: { retired: boolean; upstreamChanged: boolean };
  pin: PinContext | null;
  caution: string;
  generatedAt: Date;
}

export function buildExportDocument(
  source: ExportSource,
  options: { discretisation?: Discretisation | null; pin?: PinContext | null; now?: Date } = {},
): ExportDocument {
  const discretisation = options.discretisation ?? null;
  return {
    source,
    kind: discretisation ? 'discrete' : 'continuous',
    matrices: discretisation ? discretisation.matrices : source.matrices,
    matricesSha256: discretisation ? discretisation.matricesSha256 : source.matricesSha256,
    registeredMatricesSha256: source.matricesSha256,
    discretisation,
    flags: { retired: source.version.status === 'retired', upstreamChanged: source.lineage.upstreamChanged },
    pin: options.pin ?? null,
    caution: CAUTION_TEXT,
    generatedAt: options.now ?? new Date(),
  };
}

/** Sentences a reader must see before use: retired, upstream changed, and the sample-time warning. */
export function exportWarnings(doc: ExportDocument): string[] {
  const s = doc.source;
  const warnings: string[] = [];
  if (doc.flags.retired) {
    warnings.push(`${s.reducedModel.slug} v${s.version.number} has been retired: it is exported so a controller can be rebuilt exactly, not for new work.`);
  }
  if (doc.flags.upstreamChanged) {
    warnings.push(
      `Upstream changed: source model ${s.lineage.sourceModel.slug} now has v${s.lineage.newestSourceVersionNumber}; this reduced model was made from v${s.lineage.sourceVersion.number}.`,
    );
  }
  if (doc.discretisation?.check.warning) warnings.push(doc.discretisation.check.warning);
  return warnings;
}

/** The recipe in one line of plain text, for the C header and the CSV bundle's README (lib/recipe-words.ts). */
export function recipeLine(s: ExportSource): string {
  return `Recipe: ${describeRecipe(s.recipe, { timeBase: s.timeBase, resultOrder: s.version.order, plain: true })}`;
}

/** The stored acceptance verdict in one line (lib/acceptance.ts): what the comparison page and the API show. */
export function acceptanceLine(s: ExportSource): string {
  const v = storedAcceptance(s.accuracyReport?.figures, s.accuracyReport?.acceptancePassed);
  return `Acceptance band: ${v ? acceptanceSentence(v, s.timeBase, true) : 'none set'}`;
}

function exportAcceptance(s: ExportSource) {
  const v = storedAcceptance(s.accuracyReport?.figures, s.accuracyReport?.acceptancePassed);
  return v ? { ...v, text: acceptanceSentence(v, s.timeBase, true) } : null;
}

/**
 * The accuracy in one line: the measured H-infinity error and the bound; for a method without a bound
 * (frequency-limited balanced truncation) the sentence saying so, the errors measured inside and outside
 * its band, and whether the reduced model is stable.
 */
export function accuracyLine(s: ExportSource): string {
  const report = s.accuracyReport?.figures ?? {};
  const figure = (v: unknown) => (typeof v === 'number' ? String(v) : 'not reported');
  const fl = report.frequencyLimited && typeof report.frequencyLimited === 'object' ? (report.frequencyLimited as Record<string, unknown>) : null;
  if (fl || typeof report.errorBoundNote === 'string') {
    const note = typeof report.errorBoundNote === 'string' ? report.errorBoundNote : NO_BOUND_NOTE;
    const stable = typeof report.reducedStable === 'boolean' ? (report.reducedStable ? 'yes' : 'NO') : 'not reported';
    return (
      `Accuracy: ${note}; measured error inside the band ${figure(fl?.inBandError)}, outside the band ${figure(fl?.outOfBandError)}, ` +
      `H-infinity error ${figure(report.hInfinityError)}; reduced model stable: ${stable}`
    );
  }
  return `Accuracy: H-infinity error ${figure(report.hInfinityError)}, relative ${figure(report.hInfinityErrorRelative)}, bound ${figure(report.errorBound)}`;
}

/** The file name stem: "<model>-v<n>" plus "-zoh-<ts>s" when discretised. */
export function exportStem(doc: ExportDocument): string {
  const base = `${doc.source.reducedModel.slug}-v${doc.source.version.number}`;
  return doc.discretisation ? `${base}-zoh-${String(doc.discretisation.ts).replace(/[^0-9a-zA-Z.-]/g, '_')}s` : base;
}

/** The document as the JSON export writes it (also the manifest of the CSV bundle, without matrices). */
export function exportJson(doc: ExportDocument, includeMatrices = true) {
  const s = doc.source;
  const d = doc.discretisation;
  return {
    format: EXPORT_FORMAT,
    formatVersion: EXPORT_FORMAT_VERSION,
    reducedModel: { slug: s.reducedModel.slug, name: s.reducedModel.name, description: s.reducedModel.description },
    version: { number: s.version.number, id: s.version.id, status: s.version.status, registeredAt: s.version.registeredAt.toISOString() },
    kind: doc.kind,
    order: s.version.order,
    inputs: s.labels.inputs.length,
    outputs: s.labels.outputs.length,
    statesKeptUnstable: s.version.statesKeptUnstable,
    timeBase: s.timeBase,
    labels: s.labels,
    ...(includeMatrices ? { matrices: doc.matrices } : {}),
    matricesSha256: doc.matricesSha256,
    registeredMatricesSha256: doc.registeredMatricesSha256,
    checksumRule: 'SHA-256 (hex) of the UTF-8 text JSON.stringify({A, B, C, D}), each matrix an array of rows',
    discretisation: d
      ? {
          method: d.method,
          ts: d.ts,
          tsUnit: 's',
          tsInModelUnit: d.tsInModelUnit,
          tsSource: d.tsSource,
          poles: d.poles,
          check: d.check,
        }
      : null,
    equations: d
      ? `x[k+1] = A x[k] + B u[k], y[k] = C x[k] + D u[k]; u held constant over each sample of ${d.ts} s`
      : `dx/dt = A x + B u, y = C x + D u (time in ${s.timeBase})`,
    recipe: s.recipe,
    lineage: {
      sourceModel: s.lineage.sourceModel,
      sourceVersion: s.lineage.sourceVersion,
      newestSourceVersion: s.lineage.newestSourceVersionNumber,
      upstreamChanged: s.lineage.upstreamChanged,
      inputChecksum: s.lineage.inputChecksum,
      predecessorVersion: s.lineage.predecessorVersionNumber,
      engineVersion: s.version.engineVersion,
    },
    accuracyReport: s.accuracyReport,
    // The stored verdict, decided by the worker (lib/acceptance.ts): what the pages and the pins list show.
    acceptance: exportAcceptance(s),
    flags: doc.flags,
    warnings: exportWarnings(doc),
    pin: doc.pin,
    caution: doc.caution,
    generatedAt: doc.generatedAt.toISOString(),
  };
}
