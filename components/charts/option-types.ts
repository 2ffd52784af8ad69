/**
 * The ECharts option type narrowed to the chart kinds and components Modeshelf registers (see EChart.tsx),
 * so a builder that reaches for an unregistered component fails to type-check instead of drawing nothing.
 */
import type { ComposeOption } from 'echarts/core';
import type { LineSeriesOption, ScatterSeriesOption } from 'echarts/charts';
import type {
  AriaComponentOption,
  DataZoomComponentOption,
  GridComponentOption,
  LegendComponentOption,
  MarkAreaComponentOption,
  MarkLineComponentOption,
  MarkPointComponentOption,
  TitleComponentOption,
  TooltipComponentOption,
} from 'echarts/components';

export type ChartOption = ComposeOption<
  | LineSeriesOption
  | ScatterSeriesOption
  | AriaComponentOption
  | DataZoomComponentOption
  | GridComponentOption
  | LegendComponentOption
  | MarkAreaComponentOption
  | MarkLineComponentOption
  | MarkPointComponentOption
  | TitleComponentOption
  | TooltipComponentOption
>;

export type { LineSeriesOption, ScatterSeriesOption };
