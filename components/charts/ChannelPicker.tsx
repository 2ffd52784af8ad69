'use client';
/**
 * Input × output choice for a MIMO model: two labelled native selects (keyboard use, type-ahead and
 * screen-reader support come with them). A single-input single-output model shows its one channel as text.
 */
import { useId } from 'react';
import { channelLabel, clampChannel, signalNames, type Channel } from './channel-names';

export interface ChannelPickerProps {
  readonly inputCount: number;
  readonly outputCount: number;
  /** names from the uploaded model, by index; missing ones become u1…, y1… */
  readonly inputLabels?: readonly string[];
  readonly outputLabels?: readonly string[];
  readonly value: Channel;
  readonly onChange: (channel: Channel) => void;
  readonly disabled?: boolean;
}

export function ChannelPicker({ inputCount, outputCount, inputLabels, outputLabels, value, onChange, disabled }: ChannelPickerProps) {
  const inputs = signalNames(inputLabels, inputCount, 'u');
  const outputs = signalNames(outputLabels, outputCount, 'y');
  const current = clampChannel(value, inputCount, outputCount);
  const inputId = useId();
  const outputId = useId();

  if (inputCount <= 1 && outputCount <= 1) {
    return (
      <p className="text-sm">
        <span className="field-label inline">Channel</span> <span className="num">{channelLabel(inputs, outputs, current)}</span>
      </p>
    );
  }
  return (
    <fieldset className="flex flex-wrap items-end gap-3" disabled={disabled} data-testid="channel-picker">
      <legend className="field-label mb-1">Channel</legend>
      <div>
        <label htmlFor={inputId} className="field-label">
          Input
        </label>
        <select
          id={inputId}
          className="field-input num"
          value={current.input}
          onChange={(e) => onChange({ ...current, input: Number(e.target.value) })}
        >
          {inputs.map((name, i) => (
            <option key={i} value={i}>
              {i + 1} · {name}
            </option>
          ))}
        </select>
      </div>
      <span aria-hidden="true" className="pb-2 text-graphite-soft">
        →
      </span>
      <div>
        <label htmlFor={outputId} className="field-label">
          Output
        </label>
        <select
          id={outputId}
          className="field-input num"
          value={current.output}
          onChange={(e) => onChange({ ...current, output: Number(e.target.value) })}
        >
          {outputs.map((name, i) => (
            <option key={i} value={i}>
              {i + 1} · {name}
            </option>
          ))}
        </select>
      </div>
    </fieldset>
  );
}
