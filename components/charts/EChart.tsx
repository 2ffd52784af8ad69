'use client';
/**
 * The one place ECharts is registered and mounted. Only the chart kinds and components our option
 * builders use are pulled in (tree-shaken `echarts/core` imports), matching `ChartOption`.
 *
 * Builders validate their input and throw `ChartDataError`; `useBuiltOption` turns that into a visible
 * message in place of the chart, so one bad array does not take the whole page down.
 */
import { useMemo, type DependencyList } from 'react';
import * as echarts from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';
import { CHART_MODULES } from './echarts-modules';
import ReactEChartsCore from 'echarts-for-react/lib/core';
import type { ChartOption } from './option-types';
import { INK } from './theme';

echarts.use([...CHART_MODULES, CanvasRenderer]);

export type BuiltOption = { option: ChartOption; problem: null } | { option: null; problem: string };

export function useBuiltOption(build: () => ChartOption, deps: DependencyList): BuiltOption {
  return useMemo(() => {
    try {
      return { option: build(), problem: null };
    } catch (e) {
      return { option: null, problem: e instanceof Error ? e.message : String(e) };
    }
    // `deps` is the caller's list of what `build` reads, as with useMemo itself.
  }, deps);
}

export interface EChartProps {
  readonly built: BuiltOption;
  /** CSS height of the drawing area; width follows the container */
  readonly height?: number | string;
  readonly className?: string;
  /** stable hook for browser tests, e.g. "pole-map" */
  readonly testId?: string;
}

export function EChart({ built, height = 320, className, testId }: EChartProps) {
  if (built.problem !== null) {
    return (
      <div
        role="alert"
        data-testid={testId}
        className={`flex items-center justify-center border border-dashed border-rule-strong px-4 text-sm ${className ?? ''}`}
        style={{ height, color: INK.graphite }}
      >
        <span>Chart cannot be drawn: {built.problem}</span>
      </div>
    );
  }
  return (
    <div data-testid={testId} className={className}>
      <ReactEChartsCore
        echarts={echarts}
        option={built.option}
        notMerge
        lazyUpdate
        opts={{ renderer: 'canvas' }}
        style={{ height, width: '100%' }}
      />
    </div>
  );
}
