import { createHash } from 'node:crypto';
import { AppError } from '../errors';

/**
 * Where raw trace files are kept, byte for byte as uploaded, under keys like
 * `traces/2026/12/<uuid>.csv` (the trace row's `rawPath`). Uploads always
 * arrive in this instance's local inbox first; adopt() moves one into the
 * store. Every read checks the bytes against the SHA-256 recorded at upload.
 */
export interface RawStorage {
  readonly kind: 'folder' | 's3';
  /** What to show in logs and /api/ready (no secrets). */
  readonly describe: string;
  /** Move a received file from the inbox into the store; answers its key. The inbox file is gone afterwards. */
  adopt(inboxPath: string, when?: Date): Promise<string>;
  /** The stored bytes, checked against their SHA-256. */
  read(key: string, sha256: string): Promise<Buffer>;
  /** A local file holding the stored bytes (checked), for the analysis workers; release() when done. */
  checkout(key: string, sha256: string): Promise<{ path: string; release: () => Promise<void> }>;
  remove(key: string): Promise<void>;
  /** Every stored key with its last change, for the clean-up of files no trace refers to. */
  list(): Promise<Array<{ key: string; modifiedMs: number }>>;
  /** Throws when the store cannot be reached. */
  ping(): Promise<void>;
}

export function sha256Of(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export class RawFileMissing extends AppError {
  constructor(key: string) {
    super(410, 'raw_file_missing', `The stored file of this trace (${key}) is missing from the trace store.`);
  }
}

export class RawFileChanged extends AppError {
  constructor(key: string) {
    super(409, 'raw_file_changed', `The stored file of this trace (${key}) no longer matches the SHA-256 recorded at upload; it is not served or analysed.`);
  }
}

export function checkBytes(key: string, bytes: Uint8Array, sha256: string): Buffer {
  if (sha256Of(bytes) !== sha256) throw new RawFileChanged(key);
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}
