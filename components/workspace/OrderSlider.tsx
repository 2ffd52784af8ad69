'use client';
/**
 * Choose how many states to keep: a range input that moves only between allowed orders, a number field
 * that snaps to the nearest allowed order, and at once the figures of that order (bound, states kept for
 * unstable/marginal poles, reduced stiffness ratio, largest stable explicit steps), read from stored or
 * precomputed data so nothing is decomposed while the slider moves.
 *
 * Keys: the range input has the browser's own (arrows, Page Up/Down, Home/End) over allowed orders; in the
 * number field, arrow up/down step to the next allowed order and Enter commits a typed one.
 */
import { useEffect, useId, useState, type KeyboardEvent } from 'react';
import { formatNumber, formatOptional, formatTime } from '@/lib/format';
import {
  checkAllowedOrders,
  figuresFor,
  nearestOrderIndex,
  orderValueText,
  snapToAllowedOrder,
  stepAllowedOrder,
  type OrderFiguresSource,
} from './order-steps';

export interface OrderSliderProps {
  /** allowed orders, strictly increasing */
  readonly orders: readonly number[];
  readonly value: number;
  readonly onChange: (order: number) => void;
  readonly figures?: OrderFiguresSource;
  /** full model's number of states, shown for scale */
  readonly fullOrder?: number;
  readonly timeBase?: string;
  readonly label?: string;
  readonly disabled?: boolean;
  /**
   * For a method without an a-priori error bound: the bound figure is left out and this sentence says why
   * (frequency-limited balanced truncation: its errors are measured once the reduction has run).
   */
  readonly noBoundNote?: string;
}

export function OrderSlider({
  orders: givenOrders,
  value,
  onChange,
  figures,
  fullOrder,
  timeBase = 's',
  label = 'States to keep (order r)',
  disabled,
  noBoundNote,
}: OrderSliderProps) {
  const problem = allowedOrdersProblem(givenOrders);
  // Hooks below run in every render; a bad list is shown as a message after them.
  const orders = problem === null ? givenOrders : [Math.max(0, Math.trunc(value) || 0)];
  const index = nearestOrderIndex(value, orders);
  const order = orders[index];
  const current = figuresFor(figures, order);
  const [draft, setDraft] = useState(String(order));
  const rangeId = useId();
  const numberId = useId();
  const figuresId = useId();

  useEffect(() => setDraft(String(order)), [order]);

  const commit = (text: string) => {
    const typed = Number(text);
    if (text.trim() === '' || !Number.isFinite(typed)) {
      setDraft(String(order));
      return;
    }
    const snapped = snapToAllowedOrder(typed, orders);
    setDraft(String(snapped));
    if (snapped !== order) onChange(snapped);
  };

  const onNumberKey = (e: KeyboardEvent<HTMLInputElement>) => {
    if (e.key === 'ArrowUp' || e.key === 'ArrowDown') {
      e.preventDefault();
      const from = Number.isFinite(Number(draft)) && draft.trim() !== '' ? Number(draft) : order;
      const next = stepAllowedOrder(from, orders, e.key === 'ArrowUp' ? 1 : -1);
      setDraft(String(next));
      if (next !== order) onChange(next);
    } else if (e.key === 'Enter') {
      e.preventDefault();
      commit(draft);
    }
  };

  if (problem !== null) {
    return (
      <p role="alert" className="panel p-4 text-sm">
        The order cannot be chosen: {problem}
      </p>
    );
  }
  const exact = current ? current.keptUnstable + current.keptMarginal : null;
  return (
    <div className="panel p-4" data-testid="order-slider">
      <div className="flex flex-wrap items-end gap-4">
        <div className="min-w-[16rem] flex-1">
          <label htmlFor={rangeId} className="field-label">
            {label}
          </label>
          <input
            id={rangeId}
            type="range"
            min={0}
            max={orders.length - 1}
            step={1}
            value={index}
            disabled={disabled}
            aria-valuetext={orderValueText(order, current, timeBase)}
            aria-describedby={figuresId}
            onChange={(e) => onChange(orders[Number(e.target.value)])}
            className="mt-2 w-full accent-teal"
          />
          <div className="num flex justify-between text-xs text-graphite-soft" aria-hidden="true">
            <span>{orders[0]}</span>
            <span>{orders[orders.length - 1]}</span>
          </div>
        </div>
        <div className="w-28">
          <label htmlFor={numberId} className="field-label">
            Order r
          </label>
          <input
            id={numberId}
            type="number"
            inputMode="numeric"
            min={orders[0]}
            max={orders[orders.length - 1]}
            value={draft}
            disabled={disabled}
            onChange={(e) => setDraft(e.target.value)}
            onBlur={() => commit(draft)}
            onKeyDown={onNumberKey}
            className="field-input num"
          />
        </div>
        {fullOrder !== undefined ? (
          <p className="num pb-2 text-sm text-graphite-soft">of {fullOrder} states</p>
        ) : null}
      </div>
      <dl id={figuresId} className="mt-3 grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
        {noBoundNote === undefined ? <Figure term="Error bound" value={current ? formatOptional(current.errorBound, (v) => formatNumber(v)) : '—'} /> : null}
        <Figure term="Kept for unstable / marginal poles" value={current ? `${exact} (${current.keptUnstable} + ${current.keptMarginal})` : '—'} />
        <Figure term="Stiffness ratio" value={current ? formatOptional(current.stiffnessRatio, (v) => formatNumber(v)) : '—'} />
        <Figure
          term="Largest stable step: Euler / RK4"
          value={
            current
              ? `${formatOptional(current.maxStableStepEuler, (v) => formatTime(v, timeBase))} / ${formatOptional(current.maxStableStepRk4, (v) => formatTime(v, timeBase))}`
              : '—'
          }
        />
      </dl>
      {noBoundNote !== undefined ? (
        <p className="mt-2 text-xs text-graphite-soft" data-testid="order-slider-no-bound">
          {noBoundNote}
        </p>
      ) : null}
    </div>
  );
}

function allowedOrdersProblem(orders: readonly number[]): string | null {
  try {
    checkAllowedOrders(orders);
    return null;
  } catch (e) {
    return e instanceof Error ? e.message : String(e);
  }
}

function Figure({ term, value }: { term: string; value: string }) {
  return (
    <div>
      <dt className="text-xs text-graphite-soft">{term}</dt>
      <dd className="num">{value}</dd>
    </div>
  );
}
