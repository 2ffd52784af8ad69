/**
 * Names for the input→output channels of a MIMO model. Uploaded models may name their inputs and outputs;
 * where they do not, inputs are u1…um and outputs y1…yp (the usual state-space letters).
 */
import { ChartDataError } from './series-checks';

export interface Channel {
  /** 0-based input index */
  readonly input: number;
  /** 0-based output index */
  readonly output: number;
}

export function signalNames(names: readonly string[] | undefined, count: number, letter: 'u' | 'y'): string[] {
  if (!Number.isInteger(count) || count < 0) {
    throw new ChartDataError('ChannelPicker', letter === 'u' ? 'inputCount' : 'outputCount', `must be a non-negative integer (got ${count})`);
  }
  return Array.from({ length: count }, (_, i) => {
    const given = names?.[i]?.trim();
    return given ? given : `${letter}${i + 1}`;
  });
}

export function channelLabel(inputs: readonly string[], outputs: readonly string[], channel: Channel): string {
  return `${inputs[channel.input] ?? `u${channel.input + 1}`} → ${outputs[channel.output] ?? `y${channel.output + 1}`}`;
}

/** A channel kept inside the model's dimensions (after the model changed under a stored selection). */
export function clampChannel(channel: Channel, inputCount: number, outputCount: number): Channel {
  const clamp = (v: number, n: number) => (n <= 0 ? 0 : Math.min(Math.max(0, Math.trunc(v)), n - 1));
  return { input: clamp(channel.input, inputCount), output: clamp(channel.output, outputCount) };
}
