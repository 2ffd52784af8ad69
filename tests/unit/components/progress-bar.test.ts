/**
 * The progress bar of a job with counts, time left and cancel (issue 14), rendered to HTML on the server:
 * the words it shows are the ones the job route's figures call for, and the buttons appear only when given.
 */
import { describe, expect, it } from 'vitest';
import { createElement as h } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { ProgressBar } from '@/components/workspace/ProgressBar';

const noop = () => undefined;

describe('ProgressBar with counts and cancel', () => {
  it('shows the stage counts, the time left and a cancel button while running', () => {
    const html = renderToStaticMarkup(
      h(ProgressBar, {
        status: 'running',
        stage: 'Low-rank gramians',
        fraction: 0.3,
        counts: { done: 14, total: 200, atMost: true, unit: 'ADI step', note: 'residual 3·10⁻⁷' },
        timeLeft: { seconds: 185, lowerBound: false },
        onCancel: noop,
      }),
    );
    expect(html).toContain('ADI step 14 of at most 200, residual 3·10⁻⁷ · about 3 min left');
    expect(html).toMatch(/<button[^>]*>Cancel job<\/button>/);
  });

  it('shows no cancel button without the callback, and none while the job is stopping', () => {
    expect(renderToStaticMarkup(h(ProgressBar, { status: 'queued', stage: '' }))).not.toContain('Cancel job');
    const stopping = renderToStaticMarkup(
      h(ProgressBar, { status: 'running', stage: 'x', fraction: 0.5, onCancel: noop, cancelRequested: true, cancelledBy: 'Ada Test', timeLeft: { seconds: 40, lowerBound: false } }),
    );
    expect(stopping).not.toContain('Cancel job');
    expect(stopping).toContain('Stopping (cancelled by Ada Test)');
    expect(stopping).not.toContain('left'); // no time left for a job that is stopping
  });

  it('shows a cancelled job with who cancelled it and, when allowed, a button to queue it again', () => {
    const html = renderToStaticMarkup(
      h(ProgressBar, { status: 'cancelled', stage: 'Cancelled during “Computing poles”', label: 'Analysis of v2', cancelledBy: 'Ada Test', onRetry: noop }),
    );
    expect(html).toContain('Analysis of v2: cancelled by Ada Test');
    expect(html).toContain('Cancelled during “Computing poles”. Nothing of it was kept.');
    expect(html).toMatch(/<button[^>]*>Queue again<\/button>/);
    expect(html).not.toContain('role="progressbar"');
  });
});
