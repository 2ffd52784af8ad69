/**
 * The order slider's rules. The engine hands the page the orders that may be chosen (for instance none
 * that would split a complex-conjugate pair, none below the states kept exactly for unstable and
 * marginal poles); the slider moves only between those, and a typed number snaps to the nearest one.
 */
import { formatNumber, formatTime } from '@/lib/format';

export interface OrderFigures {
  /** a-priori error bound at this order (absolute gain); null when the method has none */
  readonly errorBound: number | null;
  /** states kept exactly because their poles are unstable */
  readonly keptUnstable: number;
  /** states kept exactly because their poles are marginal (rigid-body modes, integrators) */
  readonly keptMarginal: number;
  /** fastest over slowest decay rate of the reduced model's stable poles; null with fewer than one */
  readonly stiffnessRatio: number | null;
  /** largest stable fixed step of forward Euler for the reduced spectrum, model time unit */
  readonly maxStableStepEuler: number | null;
  /** the same for classical fourth-order Runge–Kutta */
  readonly maxStableStepRk4: number | null;
}

/** Either a lookup the client computes, or the figures precomputed per order (serialisable from a server page). */
export type OrderFiguresSource = ((order: number) => OrderFigures | undefined) | Readonly<Record<number, OrderFigures>>;

export function figuresFor(source: OrderFiguresSource | undefined, order: number): OrderFigures | undefined {
  if (!source) return undefined;
  return typeof source === 'function' ? source(order) : source[order];
}

export function checkAllowedOrders(orders: readonly number[]): void {
  if (orders.length === 0) throw new Error('OrderSlider: orders must list at least one allowed order');
  orders.forEach((r, i) => {
    if (!Number.isInteger(r) || r < 0) throw new Error(`OrderSlider: orders must hold non-negative integers (entry ${i} is ${r})`);
    if (i > 0 && r <= orders[i - 1]) throw new Error(`OrderSlider: orders must be strictly increasing (entry ${i} is not above entry ${i - 1})`);
  });
}

/** Index of the allowed order nearest to `value`; halfway between two, the larger (more accurate) one. */
export function nearestOrderIndex(value: number, orders: readonly number[]): number {
  let best = 0;
  for (let i = 1; i < orders.length; i++) {
    if (Math.abs(orders[i] - value) <= Math.abs(orders[best] - value)) best = i;
  }
  return best;
}

export function snapToAllowedOrder(value: number, orders: readonly number[]): number {
  return orders[nearestOrderIndex(value, orders)];
}

/**
 * One arrow-key step from `current`: the next allowed order up or down. From a value that is not allowed
 * (a half-typed number) the step goes to the nearest allowed order in that direction.
 */
export function stepAllowedOrder(current: number, orders: readonly number[], direction: 1 | -1): number {
  const at = orders.indexOf(current);
  if (at >= 0) return orders[Math.min(orders.length - 1, Math.max(0, at + direction))];
  if (direction > 0) return orders.find((r) => r > current) ?? orders[orders.length - 1];
  for (let i = orders.length - 1; i >= 0; i--) if (orders[i] < current) return orders[i];
  return orders[0];
}

/** What assistive technology reads for the slider's position. */
export function orderValueText(order: number, figures: OrderFigures | undefined, timeBase = 's'): string {
  const parts = [`order ${order}`];
  if (figures) {
    if (figures.errorBound !== null) parts.push(`error bound ${formatNumber(figures.errorBound)}`);
    const exact = figures.keptUnstable + figures.keptMarginal;
    if (exact > 0) parts.push(`${exact} kept exactly for unstable or marginal poles`);
    if (figures.maxStableStepRk4 !== null) parts.push(`largest stable RK4 step ${formatTime(figures.maxStableStepRk4, timeBase)}`);
  }
  return parts.join(', ');
}
