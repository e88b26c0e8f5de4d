/** Words and icons for an assumption's check status. Pure (no Angular). */
import type { AssumptionStatus } from '@shared/engine/result';

export interface StatusWords {
  readonly label: string;
  readonly icon: string;
  readonly tone: 'ok' | 'bad' | 'open' | 'vouch';
}

const WORDS: Record<AssumptionStatus, StatusWords> = {
  'not-rejected': { label: 'Checked, no evidence against', icon: 'check_circle', tone: 'ok' },
  rejected: { label: 'Evidence against it', icon: 'report', tone: 'bad' },
  'not-checked': { label: 'Not checked in this worksheet', icon: 'help', tone: 'open' },
  'by-design': { label: 'Cannot be checked from the data; you vouch for it', icon: 'person_check', tone: 'vouch' },
};

export function assumptionStatusWords(status: string): StatusWords {
  return WORDS[status as AssumptionStatus] ?? { label: status, icon: 'help', tone: 'open' };
}
