import type { Readable } from 'node:stream';
import { GetObjectCommand, HeadObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { getEnv } from '../server/env';

export interface S3Settings {
  endpoint: string;
  region: string;
  bucket: string;
  accessKeyId: string;
  secretAccessKey: string;
}

/**
 * An S3 client for our object store. Checksums are computed only when required: with the
 * SDK's default, s3rver stores the aws-chunked framing inside streamed objects.
 */
export function createS3Client(settings: S3Settings): S3Client {
  return new S3Client({
    endpoint: settings.endpoint,
    region: settings.region,
    forcePathStyle: true,
    credentials: { accessKeyId: settings.accessKeyId, secretAccessKey: settings.secretAccessKey },
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  });
}

export function settingsFromEnv(): S3Settings {
  const env = getEnv();
  return {
    endpoint: env.S3_ENDPOINT,
    region: env.S3_REGION,
    bucket: env.S3_BUCKET,
    accessKeyId: env.S3_ACCESS_KEY_ID,
    secretAccessKey: env.S3_SECRET_ACCESS_KEY,
  };
}

let client: S3Client | undefined;

export function getS3(): { client: S3Client; bucket: string } {
  const settings = settingsFromEnv();
  client ??= createS3Client(settings);
  return { client, bucket: settings.bucket };
}

/** Streams `body` into the object store under `key` (multipart for large bodies). */
export async function putObject(
  s3: { client: S3Client; bucket: string },
  key: string,
  body: Buffer | Uint8Array | Readable,
  contentType: string,
): Promise<void> {
  const upload = new Upload({
    client: s3.client,
    params: { Bucket: s3.bucket, Key: key, Body: body, ContentType: contentType },
  });
  await upload.done();
}

/** A readable stream of the object's bytes. */
export async function getObjectStream(
  s3: { client: S3Client; bucket: string },
  key: string,
): Promise<Readable> {
  const answer = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: key }));
  return answer.Body as Readable;
}

/** True when an object exists under `key`. */
export async function objectExists(
  s3: { client: S3Client; bucket: string },
  key: string,
): Promise<boolean> {
  try {
    await s3.client.send(new HeadObjectCommand({ Bucket: s3.bucket, Key: key }));
    return true;
  } catch (error) {
    if ((error as { name?: string }).name === 'NotFound') return false;
    throw error;
  }
}
