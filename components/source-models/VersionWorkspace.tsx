'use client';
// The analysed version's workspace: the pole map, the Hankel singular values, the modes table and the
// recipe form. The order chosen in the form marks the Hankel chart (and, for modal truncation, the kept
// poles on the map) as it moves; everything shown comes from the stored analysis, nothing is decomposed.
import { useMemo, useState } from 'react';
import { HankelChart } from '@/components/charts/HankelChart';
import { PoleMap } from '@/components/charts/PoleMap';
import { ModesTable } from '@/components/workspace/ModesTable';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';
import { keptPoles, suggestedOrder, storedTable, type Method, type ModalSelection } from './recipe-choices';
import { RecipeForm, type RecipeSource } from './RecipeForm';

/** The analysed source version, as the recipe form takes it (RecipeSource). */
export type WorkspaceProps = RecipeSource;

export function VersionWorkspace(props: WorkspaceProps) {
  const { analysis, timeBase } = props;
  // Arriving from a controller project with an acceptance band: reduce for that band.
  const [method, setMethod] = useState<Method>(props.seed ? 'frequency-limited' : 'balanced');
  const [selection, setSelection] = useState<ModalSelection>('dominance');
  const initialTable = storedTable(analysis, 'balanced', 'dominance');
  const [order, setOrder] = useState<number>(() => (initialTable ? suggestedOrder(initialTable, analysis.stablePartHInfinityNorm) : 1));

  const keptExact = analysis.marginalPoles + analysis.unstablePoles;
  const stableOrder = Math.max(0, order - keptExact);
  const sparse = analysis.path === 'sparse';
  const kept = useMemo(() => keptPoles(analysis, method, selection, order), [analysis, method, selection, order]);
  const modes = useMemo(
    () => analysis.modes.map((m) => ({ re: m.re, im: m.im, pair: m.pair, stability: m.stability, dominance: m.dominance })),
    [analysis.modes],
  );

  return (
    <div className="space-y-6">
      <div className="grid gap-6 xl:grid-cols-2">
        <PoleMap
          re={analysis.poles.re}
          im={analysis.poles.im}
          stability={analysis.poles.stability}
          kept={kept ?? undefined}
          timeBase={timeBase}
          title={sparse ? `Computed poles (${analysis.poles.re.length} of ${analysis.states.toLocaleString('en-US')}, estimated)` : 'Pole map'}
        />
        {analysis.hankelSingularValues.length > 0 ? (
          <div>
            <HankelChart
              hankelSingularValues={analysis.hankelSingularValues}
              errorBound={analysis.hankelBound}
              order={method === 'balanced' || method === 'residualization' ? stableOrder : undefined}
              title={sparse ? `Leading Hankel singular values (${analysis.hankelSingularValues.length} resolved, estimated)` : 'Hankel singular values of the stable part'}
            />
            {sparse ? (
              <p className="mt-1 text-xs text-graphite-soft" data-testid="hsv-leading-note">
                Large-model path: the values the low-rank gramian factors resolve, accurate to about the gramian residual; the smaller ones are not
                computed, so each bound 2Σσ(r+1..k) sums the resolved values only (an estimate). Choose the order where the values have fallen far enough.
              </p>
            ) : null}
            <p className="mt-1 text-xs text-graphite-soft">
              Index and order count stable states{keptExact > 0 ? `; ${keptExact} marginal or unstable states are kept exactly on top` : ''}. The bound
              2Σσ(r+1..n) holds for balanced truncation and residualization (Enns 1984; Glover 1984), not for
              frequency-limited balanced truncation, which balances on its band's gramians instead.
            </p>
          </div>
        ) : (
          <p className="panel p-4 text-sm">The model has no stable part, so it has no Hankel singular values to reduce by.</p>
        )}
      </div>
      <RecipeForm
        {...props}
        method={method}
        onMethod={setMethod}
        selection={selection}
        onSelection={setSelection}
        order={order}
        onOrder={setOrder}
      />
      <ModesTable
        modes={modes}
        timeBase={timeBase}
        caption={sparse ? `Computed modes (${analysis.modes.length}), the dominant ones first (estimated)` : `Modes (${analysis.modes.length}), most dominant first`}
      />
    </div>
  );
}
