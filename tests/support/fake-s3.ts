import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { createRequire } from 'node:module';

interface S3rverServer {
  run(): Promise<AddressInfo>;
  close(): Promise<void>;
}
type S3rverClass = new (options: { address: string; port: number; silent: boolean; directory: string; configureBuckets: Array<{ name: string }> }) => S3rverServer;

/** s3rver ships no type declarations: the one class it exports, typed by what the tests use. */
const S3rver = createRequire(import.meta.url)('s3rver') as S3rverClass;

export interface FakeS3 {
  endpoint: string;
  bucket: string;
  /** A STORAGE_URL for this server, under the given key prefix; s3rver's built-in key pair. */
  storageUrl: (prefix: string) => string;
  close: () => Promise<void>;
}

/** A local S3-compatible server (s3rver, pure JavaScript) on a loopback port, its objects in a temporary folder. */
export async function startFakeS3(bucket = 'rholog-traces'): Promise<FakeS3> {
  const directory = fs.mkdtempSync(path.join(os.tmpdir(), 'rholog-s3-'));
  const server = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory, configureBuckets: [{ name: bucket }] });
  const { port } = await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  return {
    endpoint,
    bucket,
    storageUrl: (prefix) => `s3://S3RVER:S3RVER@${bucket}/${prefix}?endpoint=${encodeURIComponent(endpoint)}&region=us-east-1&forcePathStyle=on`,
    close: async () => {
      await server.close();
      fs.rmSync(directory, { recursive: true, force: true });
    },
  };
}
