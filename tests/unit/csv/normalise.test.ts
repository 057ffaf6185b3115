import { describe, expect, it } from 'vitest';
import { parseCsv } from '../../../src/lib/csv/tokenizer';
import { chooseMapping, guessMapping, headerSignature, mappingSchema, normaliseHeader, requiredProblems, resolveColumns, type Mapping } from '../../../src/lib/csv/mapping';
import { normaliseReceiptRow, normaliseTimesheetRow, type RowContext } from '../../../src/lib/csv/normalise';
import { receiptLineKey } from '../../../src/lib/csv/line-key';

function run(text: string, mapping?: Partial<Mapping>) {
  const [head, ...rows] = parseCsv(text);
  const m = mapping ? mappingSchema.parse({ kind: 'receipts', ...mapping }) : guessMapping('receipts', head.cells, rows.slice(0, 20).map((r) => r.cells));
  const ctx: RowContext = { mapping: m, columns: resolveColumns(m, head.cells), headers: head.cells };
  return { mapping: m, rows: rows.map((r) => ({ row: r.row, ...normaliseReceiptRow(r.cells, ctx) })) };
}

describe('header mapping', () => {
  it('normalises headers so small differences do not matter', () => {
    expect(['Inv. Date', 'Item #', 'PO#', 'QTY', ' Ext Price '].map(normaliseHeader)).toEqual(['inv date', 'item no', 'po no', 'qty', 'ext price']);
  });

  it('guesses columns, date format and decimal mark from a semicolon file', () => {
    const text = 'Belegdatum;Beleg;Pos;Artikel;Bezeichnung;Menge;ME;Preis;Betrag;Job\n' +
      '14.03.2026;88121;1;CB-80;Concrete 80 lb;12;bag;6,45;77,40;J-0142\n';
    const [head, row] = parseCsv(text);
    const g = guessMapping('receipts', head.cells, [row.cells]);
    // No synonyms for these headers except Job: the bookkeeper maps the rest by hand.
    expect(g.columns.jobRef).toBe('Job');
    expect(g.columns.date).toBeUndefined();
    expect(requiredProblems(g)).toHaveProperty(['columns.date']);
  });

  it('guesses a plain English export completely', () => {
    const { mapping } = run('Invoice Date,Invoice #,Line,SKU,Description,Qty,UOM,Unit Price,Ext,Tax,PO,Memo\n3/14/2026,A-1,1,PT4410,4x4x10 post,12,EA,"$14.20","$170.40",0.00,PO 142,\n');
    expect(mapping.columns).toEqual({ date: 'Invoice Date', receiptNumber: 'Invoice #', lineNumber: 'Line', sku: 'SKU', description: 'Description', quantity: 'Qty', unit: 'UOM', unitPrice: 'Unit Price', amount: 'Ext', tax: 'Tax', jobRef: 'PO', memo: 'Memo' });
    expect(mapping.dateFormat).toBe('mdy');
    expect(mapping.decimal).toBe('.');
  });

  it('chooses the supplier’s saved mapping, then one saved for the same headers', () => {
    const headers = ['Date', 'Amount', 'Job'];
    const m = mappingSchema.parse({ columns: { date: 'Date', amount: 'Amount', jobRef: 'Job' } });
    const saved = [
      { id: 1, supplierId: 7, mapping: m, headerSignature: 'x' },
      { id: 2, supplierId: 9, mapping: m, headerSignature: headerSignature(headers) },
    ];
    expect(chooseMapping(saved, headers, 7)?.id).toBe(1);
    expect(chooseMapping(saved, headers, null)?.id).toBe(2);
    expect(chooseMapping(saved, ['Other'], null)).toBeNull();
  });
});

describe('receipt rows', () => {
  const file = [
    'Date,Receipt,Line,SKU,Description,Qty,Unit Price,Amount,Tax,Job,Memo',
    '2026-03-02,R100,1,PT4410,"4x4x10 treated post, ground contact",12 ea,14.20,170.40,12.57,J-0142,',
    '2026-03-02,R100,2,CB80,Concrete 80 lb,20,6.45,,,J-0142,',
    '',
    '2026-03-05,R101,1,CB80,Return: concrete 80 lb,-4,6.45,(25.80),,,PO 142',
    '2026-03-05,R101,2,=HYPERLINK("x"),Formula-looking item,1,1.00,1.00,,,',
    'yesterday,R102,1,XX,Bad date,1,1.00,oops,,,',
    ',,,,Subtotal,,,171.18,,,',
    ',,,,Grand total,,,184.18,,,',
  ].join('\r\n');

  it('turns good rows into lines, computes a missing amount, and keeps credits negative', () => {
    const { rows } = run(file, { dateFormat: 'iso', columns: { date: 'Date', receiptNumber: 'Receipt', lineNumber: 'Line', sku: 'SKU', description: 'Description', quantity: 'Qty', unitPrice: 'Unit Price', amount: 'Amount', tax: 'Tax', jobRef: 'Job', memo: 'Memo' } });
    const lines = rows.filter((r) => r.kind === 'line').map((r) => (r.kind === 'line' ? r.values : null)!);
    expect(lines.map((l) => [l.sku, l.quantity, l.unit, l.amountCents, l.taxCents, l.totalCents])).toEqual([
      ['PT4410', '12', 'each', 17040, 1257, 18297],
      ['CB80', '20', null, 12900, 0, 12900],
      ['CB80', '-4', null, -2580, 0, -2580],
      ['=HYPERLINK("x")', '1', null, 100, 0, 100],
    ]);
    expect(lines[0].description).toBe('4x4x10 treated post, ground contact');
    expect(lines[2].memo).toBe('PO 142');
  });

  it('takes the tax back with a return, however the receipt signs it', () => {
    const text = [
      'Date,Receipt,Description,Qty,Amount,Tax',
      '2026-03-09,R-1,Returned posts,-4,56.80,4.19',
      '2026-03-09,R-2,Returned posts,4,(56.80),4.19',
      '2026-03-09,R-3,Returned posts,-4,-56.80,-4.19',
      '2026-03-09,R-4,Posts,4,56.80,4.19',
    ].join('\n');
    const { rows } = run(text, { dateFormat: 'iso', columns: { date: 'Date', receiptNumber: 'Receipt', description: 'Description', quantity: 'Qty', amount: 'Amount', tax: 'Tax' } });
    const lines = rows.map((r) => (r.kind === 'line' ? r.values : null)!);
    // 56.80 + 4.19 = 60.99 either way; a return is the same amount the other way.
    expect(lines.map((l) => [l.amountCents, l.taxCents, l.totalCents])).toEqual([
      [-5680, -419, -6099],
      [-5680, -419, -6099],
      [-5680, -419, -6099],
      [5680, 419, 6099],
    ]);
  });

  it('reports blank, total and bad rows with their row numbers and plain reasons', () => {
    const { rows } = run(file, { dateFormat: 'iso', columns: { date: 'Date', sku: 'SKU', description: 'Description', quantity: 'Qty', unitPrice: 'Unit Price', amount: 'Amount' } });
    const other = rows.filter((r) => r.kind !== 'line').map((r) => [r.row, r.kind, 'reason' in r ? r.reason : '']);
    expect(other).toEqual([
      [4, 'blank', ''],
      [7, 'error', 'date: "yesterday" is not a ISO year-month-day date; amount: "oops" is not an amount'],
      [8, 'skipped', 'a total row ("Subtotal")'],
      [9, 'skipped', 'a total row ("Grand total")'],
    ]);
  });

  it('reads a European semicolon file with a comma decimal and day-first dates', () => {
    const text = 'Datum;Nr;Artikel;Menge;Betrag;Auftrag\n02.03.2026;5531;Schotter 0/32;1,5 t;1.234,56;J-0150\n';
    const { rows } = run(text, { dateFormat: 'dmy', decimal: ',', columns: { date: 'Datum', receiptNumber: 'Nr', description: 'Artikel', quantity: 'Menge', amount: 'Betrag', jobRef: 'Auftrag' } });
    expect(rows[0]).toMatchObject({ kind: 'line', values: { date: '2026-03-02', quantity: '1.5', unit: 't', amountCents: 123456, jobRef: 'J-0150' } });
  });

  it('says what is missing when a row has no amount at all', () => {
    const { rows } = run('Date,Desc,Amount\n2026-01-02,Nails,\n', { columns: { date: 'Date', description: 'Desc', amount: 'Amount' } });
    expect(rows[0]).toEqual({ row: 2, kind: 'error', reason: 'no line amount (and no quantity with a unit price to work it out)' });
  });

  it('keys a line by supplier, receipt and line number, or by its content and occurrence', () => {
    const { rows } = run(file, { dateFormat: 'iso', columns: { date: 'Date', receiptNumber: 'Receipt', lineNumber: 'Line', sku: 'SKU', quantity: 'Qty', unitPrice: 'Unit Price', amount: 'Amount' } });
    const first = rows[0];
    if (first.kind !== 'line') throw new Error('expected a line');
    expect(receiptLineKey(first.values, 'Cedar Hollow Lumber', 1)).toBe('r|cedar hollow lumber|r100|1');
    expect(receiptLineKey({ ...first.values, lineNumber: null }, null, 2)).toMatch(/^c\|\|2026-03-02\|r100\|pt4410\|.*\|2$/);
  });
});

describe('timesheet rows', () => {
  it('reads hours and tasks, and refuses what it cannot use', () => {
    const text = 'Date,Employee,Job,Hours,Task\n3/2/2026,Avery Stone,J-0142,7.5,Dig and set posts\n3/2/2026,Avery Stone,J-0142,30,posts\n3/3/2026,,J-0142,4,juggling\n';
    const [head, ...rows] = parseCsv(text);
    const m = guessMapping('timesheet', head.cells, rows.map((r) => r.cells));
    expect(m.columns).toMatchObject({ date: 'Date', worker: 'Employee', jobRef: 'Job', hours: 'Hours', task: 'Task' });
    const ctx = { mapping: m, columns: resolveColumns(m, head.cells), headers: head.cells };
    const out = rows.map((r) => normaliseTimesheetRow(r.cells, ctx));
    expect(out[0]).toEqual({ kind: 'line', values: { date: '2026-03-02', workerName: 'Avery Stone', jobRef: 'J-0142', hours: '7.5', task: 'dig_set_posts', notes: null } });
    expect(out[1]).toMatchObject({ kind: 'error', reason: 'hours: 30 is not between 0 and 24' });
    expect(out[2].kind).toBe('error');
    expect(out[2].kind === 'error' && out[2].reason).toContain('no worker');
    expect(out[2].kind === 'error' && out[2].reason).toContain('"juggling" is not one of');
  });
});
