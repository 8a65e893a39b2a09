import type { Readable } from 'node:stream';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  S3Client,
} from '@aws-sdk/client-s3';
import { Upload } from '@aws-sdk/lib-storage';
import { getSignedUrl } from '@aws-sdk/s3-request-presigner';
import { getEnv } from '../server/env';
import { attachmentDisposition } from './content-disposition';

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

/**
 * Part of an object: `range` is an HTTP byte range such as "bytes=0-1048575". Answers the
 * body with the range S3 actually served and the object's total size.
 */
export async function getObjectRange(
  s3: { client: S3Client; bucket: string },
  key: string,
  range: string,
): Promise<{ body: Readable; contentRange: string | null; contentLength: number | null }> {
  const answer = await s3.client.send(
    new GetObjectCommand({ Bucket: s3.bucket, Key: key, Range: range }),
  );
  return {
    body: answer.Body as Readable,
    contentRange: answer.ContentRange ?? null,
    contentLength: answer.ContentLength ?? null,
  };
}

const networkCodes = new Set(['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'EHOSTUNREACH']);

/**
 * True for a failure to reach or use the object store: an S3 error answer (the SDK's
 * errors carry `$metadata`) or a dropped or refused connection, here or in its `cause`.
 */
export function isStorageError(error: unknown): boolean {
  for (let e = error, depth = 0; e instanceof Error && depth < 5; depth++) {
    const { $metadata, code } = e as Error & { $metadata?: unknown; code?: string };
    if ($metadata !== undefined || networkCodes.has(code ?? '') || e.name === 'TimeoutError') {
      return true;
    }
    e = e.cause;
  }
  return false;
}

/** True when the bucket answers now (within `timeoutMs`); used to explain a failed job. */
export async function storageReachable(
  s3: { client: S3Client; bucket: string },
  timeoutMs = 3000,
): Promise<boolean> {
  try {
    await s3.client.send(new HeadBucketCommand({ Bucket: s3.bucket }), {
      abortSignal: AbortSignal.timeout(timeoutMs),
    });
    return true;
  } catch {
    return false;
  }
}

/** Deletes the object under `key`; deleting a missing object is not an error. */
export async function deleteObject(
  s3: { client: S3Client; bucket: string },
  key: string,
): Promise<void> {
  await s3.client.send(new DeleteObjectCommand({ Bucket: s3.bucket, Key: key }));
}

/** A short-lived GET URL for the object, optionally offered as a download named `fileName`. */
export async function presignGetUrl(
  s3: { client: S3Client; bucket: string },
  key: string,
  options: { expiresInSeconds: number; downloadName?: string },
): Promise<string> {
  const disposition = options.downloadName
    ? attachmentDisposition(options.downloadName)
    : undefined;
  return getSignedUrl(
    s3.client,
    new GetObjectCommand({
      Bucket: s3.bucket,
      Key: key,
      ...(disposition ? { ResponseContentDisposition: disposition } : {}),
    }),
    { expiresIn: options.expiresInSeconds },
  );
}
