import { JOB_STATUS_LABELS, type JobStatus } from '../../../lib/jobs/schema';

/** Status in words first; the colour only repeats it. */
const TONE: Record<JobStatus, string> = {
  lead: 'bg-galv-100 text-galv-800',
  measured: 'bg-galv-200 text-galv-800',
  bid_sent: 'bg-timber-100 text-timber-800',
  won: 'bg-moss-100 text-moss-700',
  lost: 'bg-rust-100 text-rust-700',
  building: 'bg-timber-200 text-timber-900',
  completed: 'bg-moss-100 text-moss-700',
  closed: 'bg-galv-700 text-white',
};

export function StatusPill({ status }: { status: JobStatus }) {
  return <span className={`pill whitespace-nowrap ${TONE[status]}`}>{JOB_STATUS_LABELS[status]}</span>;
}
