import { mkdirSync } from 'node:fs';
import { createRequire } from 'node:module';

/** The few parts of s3rver (it ships no types) that we use. */
interface S3rverInstance {
  run(): Promise<{ address: string; port: number }>;
  close(): Promise<void>;
}
type S3rverClass = new (options: {
  address: string;
  port: number;
  directory: string;
  silent: boolean;
  vhostBuckets: boolean;
  configureBuckets: { name: string; configs: string[] }[];
}) => S3rverInstance;

/** s3rver's fixed credentials; it checks request signatures against them. */
export const S3_FAKE_KEY = 'S3RVER';
export const S3_FAKE_REGION = 'us-east-1';
export const S3_FAKE_BUCKET = 'setwright-photos';

export interface ObjectStoreFake {
  /** What the API reads to reach it. */
  env: Record<string, string>;
  stop(): Promise<void>;
}

/**
 * The local stand-in for the S3-compatible object store: s3rver on 127.0.0.1, keeping its
 * objects as files under `directory`, with the bucket made before it answers.
 */
export async function startObjectStoreFake(o: { directory: string; port: number; log?: (line: string) => void }): Promise<ObjectStoreFake> {
  const log = o.log ?? (() => {});
  mkdirSync(o.directory, { recursive: true });
  const S3rver = createRequire(import.meta.url)('s3rver') as S3rverClass;
  const server = new S3rver({
    address: '127.0.0.1',
    port: o.port,
    directory: o.directory,
    silent: true,
    vhostBuckets: false,
    configureBuckets: [{ name: S3_FAKE_BUCKET, configs: [] }],
  });
  let address: { address: string; port: number };
  try {
    address = await server.run();
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EADDRINUSE') {
      throw new Error(`the object-store stand-in cannot listen on 127.0.0.1:${o.port}: something else uses that port (set SETWRIGHT_S3_PORT to another one)`);
    }
    throw err;
  }
  log(`object-store stand-in (s3rver) on 127.0.0.1:${address.port}, storing under ${o.directory}`);
  let stopped = false;
  return {
    env: {
      S3_ENDPOINT: `http://127.0.0.1:${address.port}`,
      S3_BUCKET: S3_FAKE_BUCKET,
      S3_ACCESS_KEY_ID: S3_FAKE_KEY,
      S3_SECRET_ACCESS_KEY: S3_FAKE_KEY,
      S3_REGION: S3_FAKE_REGION,
    },
    async stop() {
      if (stopped) return;
      stopped = true;
      log('stopping the object-store stand-in');
      await server.close().catch(() => undefined);
    },
  };
}
