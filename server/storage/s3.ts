import { DeleteObjectCommand, GetObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import { createReadStream } from 'node:fs';
import { readFile } from 'node:fs/promises';
import type { S3StorageConfig } from '../config';
import type { FileSource, ObjectStore } from './types';

const STREAM_ABOVE_BYTES = 16 * 1024 * 1024;

/** Objects under `files/<sha256>` in one bucket of an S3-compatible store. */
export function s3ObjectStore(config: S3StorageConfig): ObjectStore & { client: S3Client } {
  const client = new S3Client({
    endpoint: config.endpoint,
    region: config.region,
    forcePathStyle: config.forcePathStyle,
    credentials:
      config.accessKeyId && config.secretAccessKey
        ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey }
        : undefined,
    // Many self-hosted stores do not understand the SDK's optional
    // checksum trailers (aws-chunked bodies), so only send them when required.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
    maxAttempts: 3,
  });
  const Bucket = config.bucket;
  const objectKey = (key: string) => `files/${key}`;
  return {
    client,
    async putObject(key: string, source: FileSource) {
      // A stream cannot be sent twice, so the SDK does not retry it: small
      // files go as bytes (retried on a passing network fault), large ones stream.
      const body =
        'path' in source ? (source.sizeBytes <= STREAM_ABOVE_BYTES ? await readFile(source.path) : createReadStream(source.path)) : source.bytes;
      const length = 'path' in source ? source.sizeBytes : source.bytes.byteLength;
      await client.send(new PutObjectCommand({ Bucket, Key: objectKey(key), Body: body, ContentLength: length, ContentType: 'application/octet-stream' }));
    },
    async getObject(key: string) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: objectKey(key) }));
        if (!out.Body) return null;
        const bytes = await out.Body.transformToByteArray();
        // In shared memory, as the database's files are (./index.ts readInSlices): a mesh thread reads them where
        // they are instead of a copy made on the calling thread (about 3 ms a megabyte on a small machine).
        const shared = Buffer.from(new SharedArrayBuffer(bytes.byteLength));
        shared.set(bytes);
        return shared;
      } catch (err) {
        if ((err as { name?: string }).name === 'NoSuchKey') return null;
        throw err;
      }
    },
    async deleteObject(key: string) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: objectKey(key) }));
    },
  };
}
