// Pins: a controller project's dependency on a reduced model (README.md, "Pull API"), and how a pin resolves to a
// version now.
//
//   exact            always that version, even once it is retired: a controller can re-download exactly what
//                    it was built with. A retired version is flagged, never silently swapped.
//   newest approved  the highest-numbered approved version (a retired one never) that meets every limit the
//                    pin sets: maximum order, maximum relative H-infinity error (the accuracy report's
//                    hInfinityErrorRelative, ||G - Gr||inf / ||G||inf), and "acceptance band passed".
//
// Either way the resolved version is flagged "upstream changed" when its source model has a version with a
// greater number than the source version it was reduced from.
//
// This file holds the rule itself, pure (no database): the caller loads the facts (lib/pins/queries.ts).
import type { StoredAcceptance } from '@/lib/acceptance';
import type { PinMode } from '@/lib/pins/schemas';

export interface PinLimits {
  maxOrder: number | null;
  /** Ratio, not per cent: 0.01 admits versions whose ||G - Gr||inf / ||G||inf is at most 1 %. */
  maxRelativeHInfinityError: number | null;
  requireAcceptancePassed: boolean;
}

export interface PinRow {
  id: string;
  project_id: string;
  reduced_model_id: string;
  mode: PinMode;
  reduced_version_id: string | null;
  max_order: number | null;
  max_relative_h_infinity_error: number | null;
  require_acceptance_passed: boolean;
  notice_state: NoticeState | null;
  created_by: string;
  created_at: Date;
  updated_at: Date;
}

/** What members were last told about a pin (lib/notifications/pin-notices.ts). */
export interface NoticeState {
  resolvedVersionId: string | null;
  retired: boolean;
  upstreamChanged: boolean;
  /** Highest approved version number seen that satisfies the pin. */
  newestSatisfyingNumber: number | null;
}

/** The facts about one approved or retired version that resolution and the lock file need. */
export interface VersionFacts {
  id: string;
  reducedModelId: string;
  number: number;
  status: 'approved' | 'retired';
  order: number;
  matricesSha256: string;
  sourceModelId: string;
  sourceModelSlug: string;
  sourceVersionId: string;
  sourceVersionNumber: number;
  newestSourceVersionNumber: number;
  hInfinityErrorRelative: number | null;
  acceptancePassed: boolean | null;
  /** the stored acceptance verdict (lib/acceptance.ts); null when the recipe set no band */
  acceptance: StoredAcceptance | null;
}

export interface PinSpec {
  mode: PinMode;
  exactVersionId: string | null;
  limits: PinLimits;
}

export interface PinResolution {
  /** The version the pin resolves to now; null when no approved version meets a newest-approved pin. */
  version: VersionFacts | null;
  retired: boolean;
  upstreamChanged: boolean;
  /** The newest approved version of the model, limits aside (to say why a newer one was passed over). */
  newestApproved: VersionFacts | null;
  /** Approved versions newer than the resolved one that satisfy the pin (exact pins: any newer approved). */
  newerSatisfying: VersionFacts[];
  /** One sentence for people: what the pin resolves to, and why. */
  explanation: string;
}

export function limitsOf(row: Pick<PinRow, 'max_order' | 'max_relative_h_infinity_error' | 'require_acceptance_passed'>): PinLimits {
  return {
    maxOrder: row.max_order,
    maxRelativeHInfinityError: row.max_relative_h_infinity_error,
    requireAcceptancePassed: row.require_acceptance_passed,
  };
}

export function specOf(row: PinRow): PinSpec {
  return { mode: row.mode, exactVersionId: row.reduced_version_id, limits: limitsOf(row) };
}

/** Why a version does not meet a pin's limits: one phrase per limit it breaks (empty when it meets them). */
export function limitFailures(limits: PinLimits, v: VersionFacts): string[] {
  const failures: string[] = [];
  if (limits.maxOrder !== null && v.order > limits.maxOrder) failures.push(`order ${v.order} > ${limits.maxOrder}`);
  if (limits.maxRelativeHInfinityError !== null) {
    if (v.hInfinityErrorRelative === null) failures.push('no relative H-infinity error in its accuracy report');
    else if (v.hInfinityErrorRelative > limits.maxRelativeHInfinityError) {
      failures.push(`relative H-infinity error ${v.hInfinityErrorRelative.toPrecision(3)} > ${limits.maxRelativeHInfinityError}`);
    }
  }
  if (limits.requireAcceptancePassed && v.acceptancePassed !== true) {
    failures.push(v.acceptancePassed === false ? 'acceptance band failed' : 'no acceptance band checked');
  }
  return failures;
}

function upstreamChanged(v: VersionFacts): boolean {
  return v.newestSourceVersionNumber > v.sourceVersionNumber;
}

/**
 * Resolves a pin against the approved and retired versions of its reduced model. Pure: the caller loads the
 * facts (loadVersionFacts), so resolution can be checked without a database.
 */
export function resolvePin(spec: PinSpec, versions: readonly VersionFacts[]): PinResolution {
  const approved = versions.filter((v) => v.status === 'approved').sort((a, b) => b.number - a.number);
  const newestApproved = approved[0] ?? null;
  const satisfying = spec.mode === 'exact' ? approved : approved.filter((v) => limitFailures(spec.limits, v).length === 0);

  let version: VersionFacts | null;
  let explanation: string;
  if (spec.mode === 'exact') {
    version = versions.find((v) => v.id === spec.exactVersionId) ?? null;
    explanation = version
      ? `Pinned exactly to v${version.number}${version.status === 'retired' ? ', which has been retired' : ''}.`
      : 'The pinned version is no longer on the shelf.';
  } else {
    version = satisfying[0] ?? null;
    if (!version) {
      explanation = newestApproved
        ? `No approved version meets the limits (newest approved v${newestApproved.number}: ${limitFailures(spec.limits, newestApproved).join(', ')}).`
        : 'The reduced model has no approved version yet.';
    } else if (newestApproved && newestApproved.number > version.number) {
      explanation = `v${version.number} is the newest approved version within the limits; v${newestApproved.number} is not (${limitFailures(spec.limits, newestApproved).join(', ')}).`;
    } else {
      explanation = `v${version.number} is the newest approved version${hasLimits(spec.limits) ? ' and meets the limits' : ''}.`;
    }
  }
  const newerSatisfying = version ? satisfying.filter((v) => v.number > version.number) : [];
  return {
    version,
    retired: version?.status === 'retired',
    upstreamChanged: version ? upstreamChanged(version) : false,
    newestApproved,
    newerSatisfying,
    explanation,
  };
}

export function hasLimits(limits: PinLimits): boolean {
  return limits.maxOrder !== null || limits.maxRelativeHInfinityError !== null || limits.requireAcceptancePassed;
}

export function noticeStateOf(resolution: PinResolution): NoticeState {
  const numbers = [resolution.version, ...resolution.newerSatisfying].flatMap((v) => (v && v.status === 'approved' ? [v.number] : []));
  return {
    resolvedVersionId: resolution.version?.id ?? null,
    retired: resolution.retired,
    upstreamChanged: resolution.upstreamChanged,
    newestSatisfyingNumber: numbers.length > 0 ? Math.max(...numbers) : null,
  };
}
