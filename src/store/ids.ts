/** A new record id: UUID v4 text (the job record's identity, see src/model/job.ts). */
export function newId(): string {
  return crypto.randomUUID();
}

/** The current time as the job record's ISO 8601 UTC text. */
export function nowIso(): string {
  return new Date().toISOString();
}
