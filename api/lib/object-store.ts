import type { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  type S3ClientConfig,
} from '@aws-sdk/client-s3';
import type { Config } from '../config';

export type ObjectStoreConfig = Pick<
  Config,
  'S3_ENDPOINT' | 'S3_BUCKET' | 'S3_REGION' | 'S3_ACCESS_KEY_ID' | 'S3_SECRET_ACCESS_KEY' | 'S3_FORCE_PATH_STYLE'
>;

/** What the store says about one object. */
export interface ObjectInfo {
  contentType: string | undefined;
  contentLength: number | undefined;
  /** The store's own entity tag, quotes included. */
  etag: string | undefined;
  /** User metadata (x-amz-meta-*), lower-case keys. */
  metadata: Record<string, string>;
}

export interface ObjectStream extends ObjectInfo {
  body: Readable;
}

/** The S3 client settings from config; also used by tests and scripts that look at the bucket themselves. */
export function s3ClientConfig(config: ObjectStoreConfig): S3ClientConfig {
  return {
    region: config.S3_REGION,
    ...(config.S3_ENDPOINT ? { endpoint: config.S3_ENDPOINT } : {}),
    ...(config.S3_ACCESS_KEY_ID && config.S3_SECRET_ACCESS_KEY
      ? { credentials: { accessKeyId: config.S3_ACCESS_KEY_ID, secretAccessKey: config.S3_SECRET_ACCESS_KEY } }
      : {}),
    forcePathStyle: config.S3_FORCE_PATH_STYLE === 'true',
    // Checksums only where S3 demands them: simple stores (the local stand-in among them) reject the newer defaults.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    maxAttempts: 3,
    requestHandler: { connectionTimeout: 5_000, requestTimeout: 60_000 },
  };
}

function isMissing(err: unknown): boolean {
  const e = err as { name?: string; $metadata?: { httpStatusCode?: number } };
  return e?.name === 'NoSuchKey' || e?.name === 'NotFound' || e?.$metadata?.httpStatusCode === 404;
}

/**
 * The one way the API reaches the object store: S3 over the AWS SDK, one bucket, from config.
 * Keys are always made by the API, never taken from a client.
 */
export class ObjectStore {
  readonly bucket: string;
  private readonly client: S3Client;

  constructor(config: ObjectStoreConfig) {
    this.bucket = config.S3_BUCKET;
    this.client = new S3Client(s3ClientConfig(config));
  }

  async put(key: string, body: Buffer, contentType: string, metadata: Record<string, string> = {}): Promise<void> {
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: key,
        Body: body,
        ContentType: contentType,
        ContentLength: body.length,
        Metadata: metadata,
      }),
    );
  }

  /** The object's bytes as a stream, or null when there is no such key. The caller must consume or destroy the stream. */
  async getStream(key: string): Promise<ObjectStream | null> {
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.bucket, Key: key }));
      return {
        body: out.Body as Readable,
        contentType: out.ContentType,
        contentLength: out.ContentLength,
        etag: out.ETag,
        metadata: out.Metadata ?? {},
      };
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  async head(key: string): Promise<ObjectInfo | null> {
    try {
      const out = await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: key }));
      return { contentType: out.ContentType, contentLength: out.ContentLength, etag: out.ETag, metadata: out.Metadata ?? {} };
    } catch (err) {
      if (isMissing(err)) return null;
      throw err;
    }
  }

  /** Remove an object; removing one that is not there is not an error (as in S3). */
  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.bucket, Key: key }));
  }

  /** Close the client's connections (tests and scripts that make their own store). */
  destroy(): void {
    this.client.destroy();
  }
}
