/** How the memory budget writes its numbers: exact bytes, percentages, and deltas in words. */
import type { SizeReportFormat } from '@shared/checks/size-report';

export const reportFormatNames: Record<SizeReportFormat, string> = {
  berkeley: 'Berkeley format (size)',
  sysv: 'SysV format (size -A)',
  gnu: 'GNU format (size -G)',
};

/** Exact bytes, because a budget is argued over tens of bytes: "32,256 B". */
export function formatBytes(bytes: number): string {
  return `${bytes.toLocaleString('en')} B`;
}

export function formatPercent(percent: number): string {
  if (!Number.isFinite(percent)) return '—';
  return `${(Math.round(percent * 10) / 10).toLocaleString('en', { minimumFractionDigits: 1 })} %`;
}

export interface Delta {
  kind: 'saved' | 'spent' | 'same' | 'first';
  /** "−312 B flash saved", "+48 B RAM spent", "no change in RAM", "first build". */
  text: string;
}

/** Bytes against the previous build, in words (the colour only repeats them). */
export function describeDelta(delta: number | null, memory: 'flash' | 'RAM'): Delta {
  if (delta === null) return { kind: 'first', text: 'first build' };
  if (delta === 0) return { kind: 'same', text: `no change in ${memory}` };
  const bytes = Math.abs(delta).toLocaleString('en');
  return delta < 0
    ? { kind: 'saved', text: `−${bytes} B ${memory} saved` }
    : { kind: 'spent', text: `+${bytes} B ${memory} spent` };
}
