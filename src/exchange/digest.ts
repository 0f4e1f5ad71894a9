/**
 * The digest of a version-2 job file: SHA-256 (FIPS 180-4) as a hash list over 64 KiB pieces.
 *
 * The file's body (every byte before its seal line) is cut into consecutive pieces of
 * DIGEST_PIECE_BYTES, the last one shorter; each piece is hashed with SHA-256; the digest is the
 * SHA-256 of those 32-byte piece digests one after another. WebCrypto hashes only whole buffers,
 * so this is what lets a reader check a file while it streams in, without a second copy of a
 * file that may be hundreds of megabytes (docs/exchange-format.md, "The digest").
 *
 * Pieces are cut at byte offsets, not at lines, so the digest does not depend on how the writer
 * split its records into lines: only on the bytes.
 */
import { sha256Bytes } from './canonical';

/**
 * Bytes per piece: 2^16. Part of the format (a reader must cut the same pieces). Small enough
 * that the copy WebCrypto takes of each piece comes from memory the allocator reuses (in Node 20
 * hashing 146 MB in 1 MiB or 256 KiB pieces cost three times the CPU of 64 KiB ones, measured
 * with bench/exchange.ts's file), large enough that the list of piece digests stays small
 * (32 bytes per 64 KiB).
 */
export const DIGEST_PIECE_BYTES = 65_536;

const HEX = Array.from({ length: 256 }, (_, byte) => byte.toString(16).padStart(2, '0'));

/** Lowercase hex of bytes. */
export function toHex(bytes: Uint8Array): string {
  let hex = '';
  for (const byte of bytes) hex += HEX[byte];
  return hex;
}

/**
 * Hashes a body given in any number of slices, in order. `add` copies what it is given (the
 * caller may reuse its buffers at once); `finish` resolves to the lowercase hex digest.
 * WebCrypto runs each piece off the calling thread where the runtime can (Node's thread pool,
 * the browser's crypto thread), so hashing overlaps with whatever the caller does next.
 */
export class PieceHasher {
  private readonly piece = new Uint8Array(DIGEST_PIECE_BYTES);
  private filled = 0;
  private readonly digests: Promise<Uint8Array>[] = [];
  /** Bytes added so far. */
  length = 0;

  add(bytes: Uint8Array): void {
    this.length += bytes.byteLength;
    let offset = 0;
    while (offset < bytes.byteLength) {
      const room = DIGEST_PIECE_BYTES - this.filled;
      const take = Math.min(room, bytes.byteLength - offset);
      if (this.filled === 0 && take === DIGEST_PIECE_BYTES) {
        // A whole piece inside the caller's slice: hashed from there (digest() copies it).
        this.digests.push(sha256Bytes(bytes.subarray(offset, offset + take)));
      } else {
        this.piece.set(bytes.subarray(offset, offset + take), this.filled);
        this.filled += take;
        if (this.filled === DIGEST_PIECE_BYTES) this.flush();
      }
      offset += take;
    }
  }

  private flush(): void {
    // digest() takes its own copy of the bytes before it returns (Web Cryptography API,
    // SubtleCrypto.digest step "get a copy of the bytes"), so the piece buffer is free again.
    this.digests.push(sha256Bytes(this.piece.subarray(0, this.filled)));
    this.filled = 0;
  }

  /** The digest of everything added; the hasher is spent afterwards. */
  async finish(): Promise<string> {
    // An empty body has no pieces: its digest is SHA-256 of nothing (no file has one: its head
    // is in the body).
    if (this.filled > 0) this.flush();
    const pieces = await Promise.all(this.digests);
    const list = new Uint8Array(pieces.length * 32);
    pieces.forEach((digest, i) => list.set(digest, i * 32));
    return toHex(await sha256Bytes(list));
  }
}

/** The version-2 digest of a whole body at once (see PieceHasher). */
export function pieceDigestHex(body: Uint8Array): Promise<string> {
  const hasher = new PieceHasher();
  hasher.add(body);
  return hasher.finish();
}
