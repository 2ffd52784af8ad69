/**
 * The accuracy report as two tables: accuracy figures, then the simulation cost of full versus reduced,
 * which is what makes the reduced model worth having. No client state, so it also renders on the server.
 */
import { accuracyRows, simulationCostRows, type AccuracyFigures } from './figures-rows';

export interface FiguresTableProps {
  readonly figures: AccuracyFigures;
  readonly caption?: string;
}

export function FiguresTable({ figures, caption = 'Accuracy report' }: FiguresTableProps) {
  const rows = accuracyRows(figures);
  const cost = figures.simulation ? simulationCostRows(figures.simulation.full, figures.simulation.reduced) : null;
  return (
    <div className="panel p-4" data-testid="figures-table">
      <table className="w-full border-collapse text-sm">
        <caption className="pb-2 text-left text-sm font-medium">{caption}</caption>
        <tbody>
          {rows.map((r) => (
            <tr key={r.label} className="border-b border-rule last:border-b-0">
              <th scope="row" className="py-1.5 pr-4 text-left font-normal text-graphite-soft">
                {r.label}
              </th>
              <td className="num py-1.5 text-right whitespace-nowrap">{r.value}</td>
              <td className="py-1.5 pl-3 text-xs text-graphite-soft">{r.note ?? ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {cost ? (
        <table className="mt-4 w-full border-collapse text-sm">
          <caption className="pb-2 text-left text-sm font-medium">Simulation cost, same input and tolerances</caption>
          <thead>
            <tr className="border-b border-rule-strong">
              <th scope="col" className="py-1.5 pr-4 text-left font-medium">
                Figure
              </th>
              <th scope="col" className="py-1.5 text-right font-medium">
                Full model
              </th>
              <th scope="col" className="py-1.5 text-right font-medium">
                Reduced model
              </th>
              <th scope="col" className="py-1.5 text-right font-medium">
                Full ÷ reduced
              </th>
            </tr>
          </thead>
          <tbody>
            {cost.map((r) => (
              <tr key={r.label} className="border-b border-rule last:border-b-0">
                <th scope="row" className="py-1.5 pr-4 text-left font-normal text-graphite-soft">
                  {r.label}
                </th>
                <td className="num py-1.5 text-right whitespace-nowrap">{r.full}</td>
                <td className="num py-1.5 text-right whitespace-nowrap">{r.reduced}</td>
                <td className="num py-1.5 text-right whitespace-nowrap">{r.ratio}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </div>
  );
}
