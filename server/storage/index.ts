import path from 'node:path';
import type { AppConfig } from '../config';
import { FolderStorage } from './folder-storage';
import type { RawStorage } from './raw-storage';
import { parseS3Url, S3Storage } from './s3-storage';

export * from './raw-storage';

/** The raw trace store STORAGE_URL names: unset or file: → the UPLOAD_DIR folder; s3://… → object storage. */
export function openStorage(config: Pick<AppConfig, 'storageUrl' | 'uploadDir'>): RawStorage & { close?: () => void } {
  if (config.storageUrl?.startsWith('s3://')) return new S3Storage(parseS3Url(config.storageUrl), path.join(config.uploadDir, 'scratch'));
  return new FolderStorage(config.uploadDir);
}
