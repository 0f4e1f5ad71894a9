import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CSV_HEADERS } from '../../src/exchange/csv';
import { LIMITS, SCHEMA_VERSION } from '../../src/exchange/format';
import { readJobFile } from '../../src/exchange/parse';

const doc = readFileSync(new URL('../../docs/exchange-format.md', import.meta.url), 'utf8');

describe('docs/exchange-format.md', () => {
  it('has an example file that reads as sound', async () => {
    const example = /## Example[\s\S]*?```json\n([\s\S]*?)\n```/.exec(doc)?.[1];
    expect(example).toBeDefined();
    const result = await readJobFile(example!, 'example.json');
    expect(result.ok).toBe(true);
  });

  it('states the schema version and the limits the code enforces', () => {
    expect(doc).toContain(`schema version ${SCHEMA_VERSION}`);
    const spaced = (n: number) => n.toLocaleString('en-GB').replaceAll(',', ' ');
    for (const n of [LIMITS.fileBytes, LIMITS.jobs, LIMITS.readings, LIMITS.assets, LIMITS.technicians, LIMITS.shortTextChars, LIMITS.longTextChars]) {
      expect(doc).toContain(spaced(n));
    }
    for (const n of [LIMITS.idChars, LIMITS.partsPerJob, LIMITS.problemsListed]) expect(doc).toContain(String(n));
  });

  it('lists every CSV column', () => {
    for (const header of CSV_HEADERS) expect(doc).toContain(`\`${header}\``);
  });
});
