import { describe, expect, it } from 'vitest';
import { CsvRecordTooLong, CsvTokenizer } from '../../../src/lib/csv/tokenizer';

describe('record length limit', () => {
  it('refuses a record longer than the limit, quoted or not, fed in any chunks', () => {
    for (const text of [`a,b\n1,${'x'.repeat(500)}\n`, `a,b\n1,"${'x'.repeat(500)}"\n`, 'y'.repeat(500)]) {
      const t = new CsvTokenizer({ maxRecordChars: 200 });
      expect(() => { for (let i = 0; i < text.length; i += 37) t.push(text.slice(i, i + 37)); t.end(); }).toThrow(CsvRecordTooLong);
    }
  });
  it('counts per record: many short records pass', () => {
    const t = new CsvTokenizer({ maxRecordChars: 50 });
    const rows = t.push('a,b\n' + '12345,67890\n'.repeat(1000));
    expect([...rows, ...t.end()]).toHaveLength(1001);
  });
});
