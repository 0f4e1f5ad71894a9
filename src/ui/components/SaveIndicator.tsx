import { useEffect, useState } from 'preact/hooks';
import type { Saver, SaveStatus } from '../saver';

/** The saver's status as a hook: re-renders on every change. */
export function useSaveStatus(saver: Saver): SaveStatus {
  const [status, setStatus] = useState(saver.current);
  useEffect(() => saver.subscribe(setStatus), [saver]);
  return status;
}

/** "Saving…", "Saved", or "Not saved" in the header; read out when it changes. */
export function SaveIndicator({ saver }: { saver: Saver }) {
  const status = useSaveStatus(saver);
  const state = status.failed.length > 0 ? 'failed' : status.pending > 0 ? 'saving' : status.savedAt === null ? 'idle' : 'saved';
  const words = { failed: '⚠ Not saved', saving: 'Saving…', saved: '✓ Saved', idle: '' }[state];
  return (
    <span class={`save-indicator ${state}`} role="status" data-save-state={state}>
      {words}
    </span>
  );
}

/** The failed writes in words, with one button to run them again. Nothing typed is dropped. */
export function SaveFailures({ saver }: { saver: Saver }) {
  const status = useSaveStatus(saver);
  if (status.failed.length === 0) return null;
  const first = status.failed[0]!;
  return (
    <div class="notice problem save-failures" role="alert">
      <p>
        <strong>Not saved: {first.what}.</strong> {first.message}
        {status.failed.length > 1 ? ` (${status.failed.length - 1} more change${status.failed.length > 2 ? 's' : ''} waiting.)` : ''}
      </p>
      <p>What you entered is still on screen and will be saved when you try again.</p>
      <button type="button" class="primary" onClick={() => void saver.retryFailed()}>
        Try again
      </button>
    </div>
  );
}
