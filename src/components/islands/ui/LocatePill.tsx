import { LOCATE_STATUS_LABELS, type LocateStatus } from '../../../lib/checklist/checklist';

/** Where a job's locate ticket stands, in words first; the colour only repeats it. */
const TONE: Record<LocateStatus, string> = {
  missing: 'bg-rust-100 text-rust-700',
  expired: 'bg-rust-100 text-rust-700',
  waiting: 'bg-timber-100 text-timber-800',
  ready: 'bg-moss-100 text-moss-700',
};

/** `note` follows the words, e.g. " until Dec 16, 2026". */
export function LocatePill({ status, note = '', testId = 'locate-status' }: { status: LocateStatus; note?: string; testId?: string }) {
  return <span className={`pill whitespace-nowrap ${TONE[status]}`} data-testid={testId}>{LOCATE_STATUS_LABELS[status]}{note}</span>;
}
