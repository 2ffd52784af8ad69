/**
 * The ECharts chart kinds and components our option builders use (tree-shaken `echarts/core` imports),
 * listed once: the page registers them with the canvas renderer (`EChart.tsx`), the render tests with the
 * SVG renderer, so a test draws exactly what the app can draw.
 */
import { LineChart, ScatterChart } from 'echarts/charts';
import {
  AriaComponent,
  DataZoomInsideComponent,
  DataZoomSliderComponent,
  GridComponent,
  LegendComponent,
  MarkAreaComponent,
  MarkLineComponent,
  MarkPointComponent,
  TitleComponent,
  TooltipComponent,
} from 'echarts/components';

export const CHART_MODULES = [
  LineChart,
  ScatterChart,
  AriaComponent,
  DataZoomInsideComponent,
  DataZoomSliderComponent,
  GridComponent,
  LegendComponent,
  MarkAreaComponent,
  MarkLineComponent,
  MarkPointComponent,
  TitleComponent,
  TooltipComponent,
];
