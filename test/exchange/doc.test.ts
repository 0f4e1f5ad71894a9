import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CSV_HEADERS } from '../../src/exchange/csv';
import { DIGEST_PIECE_BYTES } from '../../src/exchange/digest';
import { LIMITS, SCHEMA_VERSION } from '../../src/exchange/format';
import { readJobFile } from '../../src/exchange/parse';

const doc = readFileSync(new URL('../../docs/exchange-format.md', import.meta.url), 'utf8');
const spaced = (n: number) => n.toLocaleString('en-GB').replaceAll(',', ' ');

describe('docs/exchange-format.md', () => {
  it('has an example file, exactly as written, that reads as sound', async () => {
    const example = /## Example[\s\S]*?```\n([\s\S]*?)\n```/.exec(doc)?.[1];
    expect(example).toBeDefined();
    const result = await readJobFile(`${example!}\n`, 'example.json');
    expect(result.ok).toBe(true);
    if (result.ok) {
      expect(result.file.schemaVersion).toBe(SCHEMA_VERSION);
      expect(result.file.payload.readings).toHaveLength(2);
    }
  });

  it('has a version-1 example, re-indented, that still reads as sound', async () => {
    const example = /### Version 1[\s\S]*?```json\n([\s\S]*?)\n```/.exec(doc)?.[1];
    expect(example).toBeDefined();
    const result = await readJobFile(example!, 'example-v1.json');
    expect(result.ok).toBe(true);
    if (result.ok) expect(result.file.schemaVersion).toBe(1);
  });

  it('states the schema version, the digest pieces and the limits the code enforces', () => {
    expect(doc).toContain(`schema version ${SCHEMA_VERSION}`);
    expect(doc).toContain(`pieces of ${spaced(DIGEST_PIECE_BYTES)} bytes`);
    expect(doc).toContain(`split -b ${DIGEST_PIECE_BYTES}`);
    for (const n of [LIMITS.fileBytes, LIMITS.lineBytes, LIMITS.jobs, LIMITS.readings, LIMITS.assets, LIMITS.technicians, LIMITS.shortTextChars, LIMITS.longTextChars]) {
      expect(doc).toContain(spaced(n));
    }
    for (const n of [LIMITS.idChars, LIMITS.partsPerJob, LIMITS.problemsListed]) expect(doc).toContain(String(n));
  });

  it('lists every CSV column', () => {
    for (const header of CSV_HEADERS) expect(doc).toContain(`\`${header}\``);
  });
});
