// The S3-compatible store (AWS SDK v3): one bucket, our keys under an optional prefix. Writes go through
// lib-storage's Upload, which sends a small body in one PutObject and a large one as a multipart upload
// (parts of PART_BYTES, a few at a time, so memory stays bounded whatever the file's size); an upload that
// fails is aborted, so it leaves no object and no stray parts. Reads are streams.
import { createReadStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { Readable } from 'node:stream';
import { buffer } from 'node:stream/consumers';
import type { S3Client, S3ClientConfig } from '@aws-sdk/client-s3';
import type { S3StoreConfig } from './config';
import { checkKey, StorageError, StorageKeyNotFound, type ObjectStore } from './types';

// The SDK is loaded on first use: a worker thread or checker process that never touches S3 (the local
// store, the default) does not pay for loading it.
type Sdk = { s3: typeof import('@aws-sdk/client-s3'); storage: typeof import('@aws-sdk/lib-storage') };
let sdk: Promise<Sdk> | null = null;
function loadSdk(): Promise<Sdk> {
  sdk ??= Promise.all([import('@aws-sdk/client-s3'), import('@aws-sdk/lib-storage')]).then(([s3, storage]) => ({ s3, storage }));
  return sdk;
}

/** Size of one multipart part (S3's smallest is 5 MiB); at most QUEUE parts are in memory at once. */
export const PART_BYTES = 8 * 1024 * 1024;
const QUEUE = 4;

interface AwsError {
  name?: string;
  Code?: string;
  message?: string;
  $metadata?: { httpStatusCode?: number };
}

function statusOf(e: unknown): number | undefined {
  return (e as AwsError)?.$metadata?.httpStatusCode;
}

function isNotFound(e: unknown): boolean {
  const err = e as AwsError;
  return err?.name === 'NoSuchKey' || err?.name === 'NotFound' || err?.Code === 'NoSuchKey' || statusOf(e) === 404;
}

export class S3Store implements ObjectStore {
  readonly kind = 's3' as const;
  readonly location: string;
  private clientPromise: Promise<S3Client> | null = null;

  constructor(readonly config: S3StoreConfig) {
    this.location = `s3://${config.bucket}/${config.prefix}${config.endpoint ? ` at ${config.endpoint}` : ` (${config.region})`}`;
  }

  /** The SDK client (made on first use). */
  client(): Promise<S3Client> {
    this.clientPromise ??= loadSdk().then(({ s3 }) => {
      const options: S3ClientConfig = {
        region: this.config.region,
        endpoint: this.config.endpoint,
        forcePathStyle: this.config.forcePathStyle,
        credentials: this.config.credentials,
        // Checksums only where S3 requires them: many S3-compatible stores do not accept the SDK's default
        // trailing-checksum uploads. Our own integrity check is the SHA-256 of the content key (scratch.ts).
        requestChecksumCalculation: 'WHEN_REQUIRED',
        responseChecksumValidation: 'WHEN_REQUIRED',
      };
      return new s3.S3Client(options);
    });
    return this.clientPromise;
  }

  /** Closes the client's connections (tests; a server keeps its store for its lifetime). */
  async close(): Promise<void> {
    if (this.clientPromise) (await this.clientPromise).destroy();
    this.clientPromise = null;
  }

  private objectKey(key: string): string {
    return this.config.prefix + checkKey(key);
  }

  private failure(action: string, key: string, e: unknown): Error {
    if (isNotFound(e)) {
      const err = e as AwsError;
      if (err?.name === 'NoSuchBucket' || err?.Code === 'NoSuchBucket') {
        return new StorageError(`the bucket "${this.config.bucket}" does not exist at ${this.location}`, e);
      }
      return new StorageKeyNotFound(key, this.location);
    }
    const err = e as AwsError;
    const what = err?.name && err.name !== 'Error' ? `${err.name}: ${err.message ?? ''}` : (err?.message ?? String(e));
    return new StorageError(`could not ${action} "${key}" in ${this.location} (${what.trim()})`, e);
  }

  async put(key: string, body: Buffer | string | Readable): Promise<void> {
    const Key = this.objectKey(key);
    const { storage } = await loadSdk();
    const upload = new storage.Upload({
      client: await this.client(),
      params: { Bucket: this.config.bucket, Key, Body: body, ContentType: 'application/octet-stream' },
      partSize: PART_BYTES,
      queueSize: QUEUE,
      leavePartsOnError: false,
    });
    try {
      await upload.done();
    } catch (e) {
      // A stream that failed while being read surfaces here too; nothing was completed in the bucket.
      throw this.failure('write', key, e);
    }
  }

  async putFile(key: string, filePath: string, options: { move?: boolean } = {}): Promise<void> {
    await this.put(key, createReadStream(filePath));
    if (options.move) await rm(filePath, { force: true });
  }

  async get(key: string): Promise<Buffer> {
    return buffer(await this.getStream(key));
  }

  async getStream(key: string): Promise<Readable> {
    try {
      const { s3 } = await loadSdk();
      const out = await (await this.client()).send(new s3.GetObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      const body = out.Body;
      if (body instanceof Readable) return body;
      if (!body) throw new StorageError(`the store answered "${key}" without a body`);
      // Not Node (never here in practice): the SDK's web stream.
      return Readable.fromWeb((body as { transformToWebStream(): ReadableStream }).transformToWebStream() as never);
    } catch (e) {
      if (e instanceof StorageError) throw e;
      throw this.failure('read', key, e);
    }
  }

  async exists(key: string): Promise<boolean> {
    try {
      const { s3 } = await loadSdk();
      await (await this.client()).send(new s3.HeadObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      return true;
    } catch (e) {
      const err = this.failure('look up', key, e);
      if (err instanceof StorageKeyNotFound) return false;
      throw err;
    }
  }

  async size(key: string): Promise<number> {
    try {
      const { s3 } = await loadSdk();
      const out = await (await this.client()).send(new s3.HeadObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      return Number(out.ContentLength ?? 0);
    } catch (e) {
      throw this.failure('look up', key, e);
    }
  }

  async delete(key: string): Promise<void> {
    try {
      const { s3 } = await loadSdk();
      await (await this.client()).send(new s3.DeleteObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
    } catch (e) {
      const err = this.failure('remove', key, e);
      if (!(err instanceof StorageKeyNotFound)) throw err;
    }
  }

  localPath(): null {
    return null;
  }
}
