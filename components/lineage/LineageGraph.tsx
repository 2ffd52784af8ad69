'use client';
/**
 * The lineage graph (ECharts "graph" series on a fixed three-column layout; see lineage-option.ts).
 * Registers the graph chart on the same tree-shaken ECharts core as components/charts/EChart.tsx. A click
 * on a reduced version opens its review sheet, on a project its page.
 */
import { useMemo } from 'react';
import { useRouter } from 'next/navigation';
import * as echarts from 'echarts/core';
import { GraphChart } from 'echarts/charts';
import { AriaComponent, GridComponent, TooltipComponent } from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';
import ReactEChartsCore from 'echarts-for-react/lib/core';
import { useChartTheme } from '@/components/charts/useChartTheme';
import type { Lineage } from '@/lib/lineage';
import { buildLineageOption, graphHeight } from './lineage-option';

echarts.use([GraphChart, AriaComponent, GridComponent, TooltipComponent, CanvasRenderer]);

export function LineageGraph({ lineage }: { lineage: Lineage }) {
  const theme = useChartTheme();
  const router = useRouter();
  const option = useMemo(() => buildLineageOption(lineage, theme), [lineage, theme]);
  const slugOf = useMemo(() => new Map(lineage.nodes.flatMap((n) => (n.kind === 'project' ? [[n.id, n.slug] as const] : []))), [lineage]);
  if (lineage.nodes.length === 0) return null;
  return (
    <div data-testid="lineage-graph" className="panel px-2 py-2">
      <ReactEChartsCore
        echarts={echarts}
        option={option}
        notMerge
        lazyUpdate
        opts={{ renderer: 'canvas' }}
        style={{ height: graphHeight(lineage), width: '100%' }}
        onEvents={{
          click: (params: { dataType?: string; data?: { id?: string; kind?: string } }) => {
            if (params.dataType !== 'node' || !params.data?.id) return;
            if (params.data.kind === 'reduced_version') router.push(`/reviews/${params.data.id}`);
            else if (params.data.kind === 'project') router.push(`/projects/${slugOf.get(params.data.id)}`);
          },
        }}
      />
    </div>
  );
}
