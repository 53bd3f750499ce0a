import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

/**
 * Raw trace files, kept byte for byte as uploaded. Names are generated (the
 * uploader's file name is only recorded), written once with 'wx' and never
 * opened for writing again.
 */
export function sha256(bytes: Buffer): string {
  return createHash('sha256').update(bytes).digest('hex');
}

export async function writeRaw(uploadDir: string, bytes: Buffer, when = new Date()): Promise<string> {
  const rel = path.posix.join('traces', String(when.getUTCFullYear()), String(when.getUTCMonth() + 1).padStart(2, '0'), `${randomUUID()}.csv`);
  const abs = path.join(uploadDir, rel);
  await fs.mkdir(path.dirname(abs), { recursive: true });
  await fs.writeFile(abs, bytes, { flag: 'wx', mode: 0o440 });
  return rel;
}

export function rawAbsolutePath(uploadDir: string, rel: string): string {
  const abs = path.resolve(uploadDir, rel);
  if (!abs.startsWith(path.resolve(uploadDir) + path.sep)) throw new Error(`stored path escapes the upload directory: ${rel}`);
  return abs;
}

export async function readRaw(uploadDir: string, rel: string): Promise<Buffer> {
  return fs.readFile(rawAbsolutePath(uploadDir, rel));
}

export async function removeRaw(uploadDir: string, rel: string) {
  await fs.rm(rawAbsolutePath(uploadDir, rel), { force: true });
}
