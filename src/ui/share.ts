/**
 * Handing files to the person: the device's share sheet where it can share files (Web Share
 * API Level 2, navigator.canShare({ files })), else a download through a Blob and <a download>.
 */

export interface OutgoingFile {
  name: string;
  type: string;
  /** The file's contents; a list of pieces is joined by the Blob, not as one string first. */
  parts: BlobPart[];
}

/** "needs-tap": sharing is possible, but the browser wants a fresh tap (the export took a while). */
export type ShareOutcome = 'shared' | 'downloaded' | 'cancelled' | 'needs-tap';

/**
 * Shares the files, or downloads each when sharing files is not possible here.
 * @returns "cancelled" when the person closed the share sheet; "needs-tap" when the browser
 *          refused a share without a recent tap (call again from a button)
 * @throws the share error when sharing failed for another reason than a cancel
 */
export async function shareOrDownload(files: readonly OutgoingFile[], title: string): Promise<ShareOutcome> {
  const asFiles = files.map((file) => new File(file.parts, file.name, { type: file.type }));
  if (typeof navigator.canShare === 'function' && typeof navigator.share === 'function' && navigator.canShare({ files: asFiles })) {
    try {
      await navigator.share({ files: asFiles, title });
      return 'shared';
    } catch (error) {
      if (error instanceof DOMException && error.name === 'AbortError') return 'cancelled';
      // NotAllowedError: the tap that started a long export has expired; ask for another.
      if (error instanceof DOMException && error.name === 'NotAllowedError') return 'needs-tap';
      throw error;
    }
  }
  for (const file of asFiles) download(file);
  return 'downloaded';
}

function download(file: File): void {
  const url = URL.createObjectURL(file);
  const link = document.createElement('a');
  link.href = url;
  link.download = file.name;
  link.hidden = true;
  document.body.append(link);
  link.click();
  link.remove();
  // The download has taken its copy once click() returns; a delay keeps older engines safe.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
