/**
 * How severities and statuses look: a short word, an icon and a theme colour each, so a chip is
 * never told apart by colour alone. The colours are our theme's own (app/plugins/vuetify.ts).
 */
import {
  mdiAlert,
  mdiAlertCircleOutline,
  mdiAlertOctagon,
  mdiCancel,
  mdiCheckCircleOutline,
  mdiCircleOutline,
  mdiEyeOutline,
  mdiWrenchOutline,
} from '@mdi/js';
import { erratumStatusLabels, severityLabels, type ErratumStatus, type Severity } from '@shared/domain';

export interface Look {
  /** The word on the chip. */
  short: string;
  /** The full wording, for titles and forms. */
  long: string;
  icon: string;
  /** A theme colour name, or undefined for the neutral chip. */
  color: string | undefined;
}

export const severityLooks: Record<Severity, Look> = {
  cosmetic: { short: 'Cosmetic', long: severityLabels.cosmetic, icon: mdiEyeOutline, color: undefined },
  minor: { short: 'Minor', long: severityLabels.minor, icon: mdiAlertCircleOutline, color: 'info' },
  major: { short: 'Major', long: severityLabels.major, icon: mdiAlert, color: 'warning' },
  critical: { short: 'Critical', long: severityLabels.critical, icon: mdiAlertOctagon, color: 'error' },
};

export const statusLooks: Record<ErratumStatus, Look> = {
  open: { short: 'Open', long: erratumStatusLabels.open, icon: mdiCircleOutline, color: 'secondary' },
  workaround: {
    short: 'Workaround',
    long: erratumStatusLabels.workaround,
    icon: mdiWrenchOutline,
    color: 'primary',
  },
  fixed_later: {
    short: 'Fixed later',
    long: erratumStatusLabels.fixed_later,
    icon: mdiCheckCircleOutline,
    color: 'success',
  },
  wont_fix: { short: "Won't fix", long: erratumStatusLabels.wont_fix, icon: mdiCancel, color: undefined },
};

/** "E3" for erratum number 3. */
export function erratumCode(number: number): string {
  return `E${number}`;
}

/** Board labels in the project's board order. */
export function boardLabels(affected: readonly { id: number; label: string }[], boards: readonly { id: number }[]) {
  const rank = new Map(boards.map((b, i) => [b.id, i]));
  return [...affected]
    .sort((a, b) => (rank.get(a.id) ?? Number.MAX_SAFE_INTEGER) - (rank.get(b.id) ?? Number.MAX_SAFE_INTEGER))
    .map((b) => b.label);
}
