/**
 * A new record id: UUID v4 text (the job record's identity, see src/model/job.ts). Uses
 * crypto.randomUUID where the page is a secure context, and builds the same form from
 * crypto.getRandomValues where it is not (a phone on the shop's LAN over plain http), so ids
 * never depend on how the app was opened.
 */
export function newId(): string {
  if (typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  return uuidFromBytes(crypto.getRandomValues(new Uint8Array(16)));
}

/** RFC 9562 §5.4: version 4 in the high nibble of byte 6, variant 10 in the top bits of byte 8. */
export function uuidFromBytes(bytes: Uint8Array): string {
  const b = Uint8Array.from(bytes);
  b[6] = (b[6]! & 0x0f) | 0x40;
  b[8] = (b[8]! & 0x3f) | 0x80;
  const hex = Array.from(b, (x) => x.toString(16).padStart(2, '0')).join('');
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

/** The current time as the job record's ISO 8601 UTC text. */
export function nowIso(): string {
  return new Date().toISOString();
}
