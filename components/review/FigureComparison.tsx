import { comparisonNote, figureLines } from './figure-lines';

type Figures = Record<string, unknown> | null | undefined;

/**
 * An accuracy report's figures in one column, or several reports side by side (at approval against now;
 * an old version against its re-run). With two columns a last column says how the second compares.
 */
export function FigureComparison({
  caption,
  columns,
  sets,
  acceptance,
  testId,
}: {
  caption: string;
  columns: string[];
  sets: Figures[];
  acceptance?: (boolean | null | undefined)[];
  testId?: string;
}) {
  const lines = figureLines(sets, acceptance);
  const compare = sets.length === 2;
  if (lines.length === 0) {
    return <p className="text-sm text-graphite-soft">{caption}: no accuracy figures recorded.</p>;
  }
  return (
    <table className="w-full text-left text-sm" data-testid={testId}>
      <caption className="pb-2 text-left text-xs font-medium uppercase tracking-wider text-graphite-soft">{caption}</caption>
      <thead>
        <tr className="border-b border-rule">
          <th scope="col" className="py-1.5 pr-4 font-medium">
            Figure
          </th>
          {columns.map((c) => (
            <th key={c} scope="col" className="py-1.5 pr-4 font-medium">
              {c}
            </th>
          ))}
          {compare ? (
            <th scope="col" className="py-1.5 font-medium">
              Change
            </th>
          ) : null}
        </tr>
      </thead>
      <tbody>
        {lines.map((line) => (
          <tr key={line.key} className="border-b border-rule last:border-0" data-figure={line.key}>
            <th scope="row" className="py-1.5 pr-4 font-normal">
              {line.label}
            </th>
            {line.values.map((v, i) => (
              <td key={i} className="num py-1.5 pr-4">
                {v}
              </td>
            ))}
            {compare ? <td className="py-1.5 text-graphite-soft">{comparisonNote(line)}</td> : null}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
