import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CSV_HEADERS, CSV_NUMERIC_HEADERS, csvChunks, csvRecords, neutraliseFormula, quoteField, READING_UNITS, restoreFormula, toCsv } from '../../src/exchange/csv';
import type { JobPayload } from '../../src/exchange/format';
import type { Reading } from '../../src/model/job';
import { demoPayload, smallPayload } from './fixtures';

/** The CSV read back by csv-parse (an independent RFC 4180 parser), header row first. */
function readBack(text: string): string[][] {
  return parse(text, { bom: true, record_delimiter: '\r\n' }) as string[][];
}

/** What each cell should say for a reading, before neutralising (undefined: empty). */
function expectedCells(payload: JobPayload, reading: Reading): Record<string, string | number | undefined> {
  const job = payload.jobs.find((j) => j.id === reading.jobId)!;
  const asset = payload.assets.find((a) => a.id === job.assetId);
  const technician = payload.technicians.find((t) => t.id === job.technicianId);
  return {
    job_id: job.id,
    customer: job.customer,
    site: job.site,
    technician: technician?.name,
    asset_id: asset?.id,
    asset_kind: asset?.kind,
    asset_make: asset?.make,
    asset_model: asset?.model,
    asset_serial: asset?.serial,
    asset_tag: asset?.tag,
    reading_id: reading.id,
    kind: reading.kind,
    target: reading.target,
    value: reading.value,
    unit: READING_UNITS[reading.kind],
    typed: reading.text,
    taken_at: reading.takenAt,
    phase: reading.phase,
    expected_low: reading.expectedLow,
    expected_high: reading.expectedHigh,
    verdict: reading.verdict,
    supersedes: reading.supersedes,
    note: reading.note,
  };
}

function expectCsvMatches(payload: JobPayload, text: string): void {
  const [header, ...rows] = readBack(text);
  expect(header).toEqual(CSV_HEADERS);
  expect(rows).toHaveLength(payload.readings.length);
  rows.forEach((row, i) => {
    const want = expectedCells(payload, payload.readings[i]!);
    CSV_HEADERS.forEach((name, column) => {
      const cell = row[column]!;
      const expected = want[name];
      if (expected === undefined) expect(cell, name).toBe('');
      // + 0 turns -0 into 0: neither CSV nor JSON keeps the sign of zero.
      else if (typeof expected === 'number') expect(Number(cell) + 0, name).toBe(expected + 0);
      else if (CSV_NUMERIC_HEADERS.includes(name)) expect(cell, name).toBe(expected);
      else expect(restoreFormula(cell), name).toBe(expected);
    });
  });
}

describe('CSV of readings', () => {
  it('reads back through an independent RFC 4180 parser as the same data', () => {
    for (const payload of [smallPayload(), demoPayload(60)]) expectCsvMatches(payload, toCsv(payload));
  });

  it('ends every record in CRLF, quotes commas, quotes and line breaks, and doubles inner quotes', () => {
    const text = toCsv(smallPayload(), { bom: false });
    expect(text.startsWith('job_id,customer,site,technician,')).toBe(true);
    expect(text.endsWith('\r\n')).toBe(true);
    expect(text).toContain(`,"'+Greywick Café, ""the one by the bridge""","Plant room\nback door",`);
    expect(text).toContain(`,"'=Tomas ""TB"" Brenner, senior",`);
    expect(text).toContain(`,"Messung bei offenem Deckel, ""warm"""\r\n`);
    expect(quoteField('plain')).toBe('plain');
    expect(quoteField('a,b')).toBe('"a,b"');
    expect(quoteField('say "hi"')).toBe('"say ""hi"""');
    expect(quoteField('cr\rhere')).toBe('"cr\rhere"');
  });

  it('starts with a UTF-8 byte-order mark unless asked not to', () => {
    expect(toCsv(smallPayload()).charCodeAt(0)).toBe(0xfeff);
    expect(toCsv(smallPayload(), { bom: false }).charCodeAt(0)).toBe('j'.charCodeAt(0));
  });

  it('neutralises text that a spreadsheet would run as a formula (OWASP CSV Injection)', () => {
    // OWASP "CSV Injection": cells beginning with = + - @ tab or carriage return.
    for (const text of ['=1+1', '+5 V', '-12 V rail', '@SUM(A1)', '\tindent', '\rCR', "'already quoted"]) {
      expect(neutraliseFormula(text)).toBe(`'${text}`);
      expect(restoreFormula(neutraliseFormula(text))).toBe(text);
    }
    for (const text of ['1=2', 'a-b', 'Résumé', '', ' =space first']) expect(neutraliseFormula(text)).toBe(text);
  });

  it('leaves the number columns as numbers, minus signs included, and neutralises text columns', () => {
    const text = toCsv(smallPayload(), { bom: false });
    const rows = readBack(text);
    const byId = new Map(rows.slice(1).map((row) => [row[CSV_HEADERS.indexOf('reading_id')]!, row]));
    const diode = byId.get('r-4')!;
    expect(diode[CSV_HEADERS.indexOf('value')]).toBe('-0.55');
    expect(diode[CSV_HEADERS.indexOf('expected_low')]).toBe('-0.8');
    expect(diode[CSV_HEADERS.indexOf('typed')]).toBe("'-0,55");
    expect(diode[CSV_HEADERS.indexOf('note')]).toBe("'-reversed leads");
    expect(diode[CSV_HEADERS.indexOf('asset_id')]).toBe('asset-2');
    expect(byId.get('r-1')![CSV_HEADERS.indexOf('asset_serial')]).toBe("'-00417");
    expect(byId.get('r-1')![CSV_HEADERS.indexOf('asset_tag')]).toBe("'@TAG-7");
    expect(byId.get('r-3')![CSV_HEADERS.indexOf('value')]).toBe('OL');
  });

  it('yields one record at a time, header first', () => {
    const payload = smallPayload();
    const records = [...csvRecords(payload)];
    expect(records).toHaveLength(payload.readings.length + 1);
    for (const record of records) expect(record.endsWith('\r\n')).toBe(true);
    expect(records.join('')).toBe(toCsv(payload));
  });

  it('gathers the records into pieces of about the asked size, whole records each, the same text in all', () => {
    const payload = demoPayload(40);
    const chunks = [...csvChunks(payload, {}, 2000)];
    expect(chunks.join('')).toBe(toCsv(payload));
    expect(chunks.length).toBeGreaterThan(2);
    for (const chunk of chunks.slice(0, -1)) {
      expect(chunk.length).toBeGreaterThanOrEqual(2000);
      expect(chunk.endsWith('\r\n')).toBe(true);
    }
  });

  it('gives each reading its own job’s cells when jobs alternate', () => {
    const payload = smallPayload();
    // Readings of job-a and job-b interleaved: the job columns must follow each row's job.
    payload.readings = [payload.readings[0]!, payload.readings[3]!, payload.readings[1]!, payload.readings[4]!];
    const rows = (parse(toCsv(payload, { bom: false }), { columns: true }) as Record<string, string>[]).map((row) => [row.reading_id, row.job_id, row.asset_id]);
    expect(rows).toEqual([
      ['r-1', 'job-a', 'asset-1'],
      ['r-4', 'job-b', 'asset-2'],
      ['r-2', 'job-a', 'asset-1'],
      ['r-5', 'job-b', 'asset-2'],
    ]);
  });

  it('round-trips any text in any text column', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'grapheme', maxLength: 40 }), fc.string({ unit: 'binary', maxLength: 40 }), fc.double({ noNaN: true, noDefaultInfinity: true }), (customer, note, value) => {
        const payload = smallPayload();
        payload.jobs[0]!.customer = customer;
        payload.readings[0]!.note = note;
        payload.readings[0]!.value = value;
        expectCsvMatches(payload, toCsv(payload));
      }),
      { numRuns: 300 },
    );
  });
});
