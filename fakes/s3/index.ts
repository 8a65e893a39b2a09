/**
 * A local S3 fake (s3rver) for development and tests: listens on 127.0.0.1 only, stores
 * objects under `directory`, and creates the bucket with a CORS rule so browsers can PUT
 * to presigned URLs and read ETags.
 */
import type { AddressInfo } from 'node:net';
import S3rver from 's3rver';

export interface S3Fake {
  endpoint: string;
  bucket: string;
  close(): Promise<void>;
}

const corsConfig = `<CORSConfiguration>
  <CORSRule>
    <AllowedOrigin>*</AllowedOrigin>
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>POST</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

export async function startS3Fake(options: {
  directory: string;
  bucket: string;
  port?: number;
}): Promise<S3Fake> {
  const server = new S3rver({
    address: '127.0.0.1',
    port: options.port ?? 0,
    directory: options.directory,
    silent: true,
    configureBuckets: [{ name: options.bucket, configs: [corsConfig] }],
  });
  const address = (await server.run()) as AddressInfo;
  return {
    endpoint: `http://127.0.0.1:${address.port}`,
    bucket: options.bucket,
    close: () => server.close(),
  };
}
