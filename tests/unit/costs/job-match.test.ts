import { describe, expect, it } from 'vitest';
import { extractJobRefs, matchJob } from '../../../src/lib/costs/job-match';

const jobs = [
  { id: 1, code: 'J-0142' },
  { id: 2, code: 'J-0150' },
  { id: 3, code: 'C-0150' },
];

describe('job references', () => {
  it('finds codes and PO numbers the way counter clerks write them', () => {
    expect(extractJobRefs('for J-0142 back yard')).toEqual([{ code: 'J-0142', number: 142 }]);
    expect(extractJobRefs('PO 142')).toEqual([{ number: 142 }]);
    expect(extractJobRefs('P.O.#142')).toEqual([{ number: 142 }]);
    expect(extractJobRefs('po-142, job #150')).toEqual([{ number: 142 }, { number: 150 }]);
    expect(extractJobRefs('j0142')).toEqual([{ code: 'J-0142', number: 142 }]);
    expect(extractJobRefs('no reference here')).toEqual([]);
  });

  it('matches the job column first, then the memo', () => {
    expect(matchJob([{ field: 'jobRef', text: 'J-142' }, { field: 'memo', text: 'J-0150' }], jobs)).toEqual({ jobId: 1, reason: 'J-0142 from the job column' });
    expect(matchJob([{ field: 'jobRef', text: null }, { field: 'memo', text: 'deliver to site, PO 142' }], jobs)).toEqual({ jobId: 1, reason: 'J-0142 from the memo' });
    expect(matchJob([{ field: 'jobRef', text: '142' }], jobs).jobId).toBe(1);
  });

  it('leaves a line unmatched, with the reason, when the reference is unknown or ambiguous', () => {
    expect(matchJob([{ field: 'jobRef', text: 'PO 150' }], jobs)).toEqual({ jobId: null, reason: 'no job with that code or PO number' });
    expect(matchJob([{ field: 'memo', text: 'J-0142 and J-0150' }], jobs)).toEqual({ jobId: null, reason: 'the memo names J-0142 and J-0150' });
    expect(matchJob([{ field: 'memo', text: 'cash sale' }], jobs)).toEqual({ jobId: null, reason: 'no job code or PO number on the line' });
  });
});
