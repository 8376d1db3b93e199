/** How a run reads in words: its status and its figures with their units. No DOM. */
import type { TranslationBundle } from '@jupyterlab/translation';
import type { Run, RunFigure } from '../../model/workbench/runs';
import { formatValue } from '../format';

/** "running 45 %", "ok", "warning", "failed", "cancelled", "reading from the kernel". */
export function statusText(trans: Pick<TranslationBundle, '__'>, r: Run): string {
  switch (r.status) {
    case 'reading':
      return trans.__('reading from the kernel');
    case 'running':
      return trans.__('running %1 %', Math.floor(r.progress * 100));
    case 'ok':
      return trans.__('ok');
    case 'warning':
      return trans.__('warning');
    case 'failed':
      return trans.__('failed');
    case 'cancelled':
      return trans.__('cancelled');
  }
}

/** "final MSE −40.2 dB", "rank 3", "convergence 1 200 samples". */
export function formatFigure(trans: Pick<TranslationBundle, '__'>, f: RunFigure): string {
  const v = formatValue(f.value).replace('-', '−');
  return f.unit
    ? trans.__('%1 %2 %3', trans.__(f.label), v, f.unit)
    : trans.__('%1 %2', trans.__(f.label), v);
}

/** Milliseconds as the user reads them: "850 ms", "2.4 s". */
export function formatDuration(ms: number | null): string {
  if (ms === null) {
    return '–';
  }
  return ms < 1000 ? `${Math.round(ms)} ms` : `${(ms / 1000).toFixed(ms < 10000 ? 2 : 1)} s`;
}
