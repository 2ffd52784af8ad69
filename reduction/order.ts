/**
 * Choosing the reduced order: a fixed order, or the smallest order whose a-priori error bound meets a
 * tolerance relative to ‖G‖∞ (the usual rule with balanced truncation's bound, e.g. Antoulas,
 * "Approximation of Large-Scale Dynamical Systems", SIAM 2005, §7.2; Gugercin & Antoulas, "A survey of
 * model reduction by balanced truncation and some new results", Int. J. Control 77(8), 2004).
 *
 * Orders count every state of the reduced model, including the states kept exactly for marginal and
 * unstable poles; only cut points of the method are allowed (modal truncation never splits a complex
 * pair: an order inside a pair is raised to include the whole pair).
 */
import { ModelError } from './errors';

export interface OrderRule {
  /** Total number of states of the reduced model. */
  readonly order?: number;
  /** Relative tolerance: choose the smallest order with errorBound ≤ tolerance · ‖G‖∞. */
  readonly tolerance?: number;
}

export interface OrderChoice {
  /** Total states of the reduced model. */
  readonly order: number;
  /** States of the reduced stable part (order − states kept for marginal/unstable poles). */
  readonly stableOrder: number;
  readonly rule: 'order' | 'tolerance';
  /** The order the caller asked for, when it had to be raised to a cut point. */
  readonly requestedOrder?: number;
  /** For the tolerance rule: tolerance · ‖G‖∞, the bound the chosen order meets. */
  readonly target?: number;
}

export interface OrderSpace {
  /** States kept exactly for marginal and unstable poles: the smallest possible order. */
  readonly unstableStates: number;
  readonly stableStates: number;
  /** Allowed stable orders, ascending, starting at 0 and ending at stableStates. */
  readonly cutPoints: readonly number[];
  /** The a-priori error bound when the stable part keeps `stableOrder` states. */
  errorBoundAt(stableOrder: number): number;
}

/**
 * The tolerance rule itself: the first of `orders` (ascending) whose a-priori bound is at most `target`
 * (tolerance · ‖G‖∞); undefined when none is. Shared by the engine (chooseOrder) and the recipe form's
 * order table (components/source-models/recipe-choices.ts), so the two cannot pick different orders.
 */
export function firstOrderWithin(orders: readonly number[], boundAt: (order: number) => number | null | undefined, target: number): number | undefined {
  return orders.find((order) => {
    const bound = boundAt(order);
    return bound !== null && bound !== undefined && bound <= target;
  });
}

/** Validate an order rule and turn it into an allowed order (throws ModelError on `order`/`tolerance`). */
export function chooseOrder(space: OrderSpace, rule: OrderRule, referenceNorm: () => number): OrderChoice {
  const hasOrder = rule.order !== undefined;
  const hasTolerance = rule.tolerance !== undefined;
  if (hasOrder === hasTolerance) {
    throw new ModelError('invalid_option', 'order', 'give exactly one of order or tolerance');
  }
  const { unstableStates, stableStates, cutPoints } = space;
  if (hasOrder) {
    const order = rule.order as number;
    if (!Number.isInteger(order) || order < 0) {
      throw new ModelError('invalid_option', 'order', `order must be a whole number ≥ 0, got ${order}`);
    }
    if (order - unstableStates > stableStates) {
      throw new ModelError(
        'order_too_large',
        'order',
        `order ${order} is larger than the model: its stable part has ${stableStates} states` +
          (unstableStates > 0 ? ` (plus ${unstableStates} kept for marginal/unstable poles)` : ''),
      );
    }
    if (order < unstableStates) {
      throw new ModelError(
        'invalid_option',
        'order',
        `order ${order} is too small: ${unstableStates} states are kept exactly for marginal and unstable poles`,
      );
    }
    const wanted = order - unstableStates;
    const stableOrder = cutPoints.find((c) => c >= wanted) as number;
    return {
      order: stableOrder + unstableStates,
      stableOrder,
      rule: 'order',
      ...(stableOrder !== wanted ? { requestedOrder: order } : {}),
    };
  }
  const tolerance = rule.tolerance as number;
  if (!Number.isFinite(tolerance) || tolerance <= 0) {
    throw new ModelError('invalid_option', 'tolerance', `tolerance must be a positive number, got ${tolerance}`);
  }
  const target = tolerance * referenceNorm();
  const stableOrder = firstOrderWithin(cutPoints, (c) => space.errorBoundAt(c), target) ?? stableStates;
  return { order: stableOrder + unstableStates, stableOrder, rule: 'tolerance', target };
}
