import { randomUUID } from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  ListObjectsV2Command,
  NoSuchKey,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import { checkBytes, RawFileMissing, sha256Of, type RawStorage } from './raw-storage';

export interface S3Location {
  bucket: string;
  /** Key prefix inside the bucket, '' or ending in '/'. */
  prefix: string;
  endpoint?: string;
  region: string;
  forcePathStyle: boolean;
  credentials?: { accessKeyId: string; secretAccessKey: string };
}

/**
 * `s3://[key:secret@]bucket[/prefix]?endpoint=https://…&region=…&forcePathStyle=on`.
 * Without key and secret in the URL the SDK's usual sources apply
 * (AWS_ACCESS_KEY_ID / AWS_SECRET_ACCESS_KEY, a profile, an instance role).
 */
export function parseS3Url(url: string): S3Location {
  const u = new URL(url);
  if (u.protocol !== 's3:' || !u.hostname) throw new Error('STORAGE_URL: must look like s3://bucket/prefix?endpoint=…&region=…');
  const prefix = decodeURIComponent(u.pathname.replace(/^\/+/, ''));
  const on = (v: string | null) => v === 'on' || v === 'true' || v === '1';
  return {
    bucket: u.hostname,
    prefix: prefix && !prefix.endsWith('/') ? `${prefix}/` : prefix,
    endpoint: u.searchParams.get('endpoint') ?? undefined,
    region: u.searchParams.get('region') ?? 'us-east-1',
    forcePathStyle: on(u.searchParams.get('forcePathStyle')),
    credentials: u.username ? { accessKeyId: decodeURIComponent(u.username), secretAccessKey: decodeURIComponent(u.password) } : undefined,
  };
}

function isMissing(err: unknown) {
  return err instanceof NoSuchKey || (err instanceof S3ServiceException && (err.name === 'NoSuchKey' || err.$metadata.httpStatusCode === 404));
}

/**
 * Raw traces in S3-compatible object storage (the official AWS SDK v3
 * client), shared by every instance. The SHA-256 is stored with each object
 * and checked again on every read.
 */
export class S3Storage implements RawStorage {
  readonly kind = 's3' as const;
  readonly describe: string;
  private readonly client: S3Client;

  constructor(
    private readonly where: S3Location,
    /** Local folder for copies handed to the analysis workers. */
    private readonly scratchDir: string,
  ) {
    this.describe = `s3 bucket ${where.bucket}${where.prefix ? `/${where.prefix}` : ''}${where.endpoint ? ` at ${where.endpoint}` : ''}`;
    this.client = new S3Client({
      region: where.region,
      endpoint: where.endpoint,
      forcePathStyle: where.forcePathStyle,
      credentials: where.credentials,
      // Plain PUTs with a Content-MD5-free body: what every S3-compatible store accepts.
      requestChecksumCalculation: 'WHEN_REQUIRED',
      responseChecksumValidation: 'WHEN_REQUIRED',
    });
  }

  private objectKey(key: string) {
    return `${this.where.prefix}${key}`;
  }

  async adopt(inboxPath: string, when = new Date()) {
    const key = path.posix.join('traces', String(when.getUTCFullYear()), String(when.getUTCMonth() + 1).padStart(2, '0'), `${randomUUID()}.csv`);
    const bytes = await fs.readFile(inboxPath);
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.where.bucket,
        Key: this.objectKey(key),
        Body: bytes,
        ContentType: 'text/csv',
        Metadata: { sha256: sha256Of(bytes) },
      }),
    );
    await fs.rm(inboxPath, { force: true });
    return key;
  }

  async read(key: string, sha256: string) {
    try {
      const res = await this.client.send(new GetObjectCommand({ Bucket: this.where.bucket, Key: this.objectKey(key) }));
      return checkBytes(key, await res.Body!.transformToByteArray(), sha256);
    } catch (err) {
      if (isMissing(err)) throw new RawFileMissing(key);
      throw err;
    }
  }

  async checkout(key: string, sha256: string) {
    const bytes = await this.read(key, sha256);
    await fs.mkdir(this.scratchDir, { recursive: true, mode: 0o750 });
    const file = path.join(this.scratchDir, `${randomUUID()}.csv`);
    await fs.writeFile(file, bytes, { mode: 0o600, flag: 'wx' });
    return { path: file, release: () => fs.rm(file, { force: true }) };
  }

  async remove(key: string) {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.where.bucket, Key: this.objectKey(key) }));
  }

  async list() {
    const out: Array<{ key: string; modifiedMs: number }> = [];
    let token: string | undefined;
    do {
      const page = await this.client.send(
        new ListObjectsV2Command({ Bucket: this.where.bucket, Prefix: `${this.where.prefix}traces/`, ContinuationToken: token }),
      );
      for (const o of page.Contents ?? []) {
        if (o.Key) out.push({ key: o.Key.slice(this.where.prefix.length), modifiedMs: o.LastModified?.getTime() ?? 0 });
      }
      token = page.IsTruncated ? page.NextContinuationToken : undefined;
    } while (token);
    return out;
  }

  async ping() {
    await this.client.send(new HeadBucketCommand({ Bucket: this.where.bucket }));
  }

  close() {
    this.client.destroy();
  }
}
