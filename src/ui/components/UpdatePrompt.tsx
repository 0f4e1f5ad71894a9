/**
 * The quiet "new version" note. The app never reloads itself: only "Update now" does, and the
 * open job is already saved by then (every entry is written as it is made).
 */
export function UpdatePrompt({ onAccept, onLater, jobOpen }: { onAccept: () => void; onLater: () => void; jobOpen: boolean }) {
  return (
    <div class="update-prompt" role="region" aria-label="App update">
      <p>
        A new version of the app is ready.
        {jobOpen ? ' Your readings are saved; the job stays where it is.' : ''}
      </p>
      <div class="button-row">
        <button type="button" class="primary" onClick={onAccept}>
          Update now
        </button>
        <button type="button" class="secondary" onClick={onLater}>
          Later
        </button>
      </div>
    </div>
  );
}
