/**
 * Object storage for drawings and photos, through the S3 API. With S3_ENDPOINT unset, Stipple
 * runs s3rver (a local S3 stand-in) on 127.0.0.1 with its files under .data/s3. Nothing is
 * ever public: the browser gets images through access-checked routes.
 */
import {
	CreateBucketCommand,
	DeleteObjectsCommand,
	GetObjectCommand,
	HeadBucketCommand,
	ListObjectsV2Command,
	PutObjectCommand,
	S3Client
} from '@aws-sdk/client-s3';
import fs from 'node:fs';
import S3rver from 's3rver';

let client: S3Client | undefined;

export function bucket() {
	return process.env.S3_BUCKET ?? 'stipple';
}

function s3(): S3Client {
	if (client) return client;
	const endpoint = process.env.S3_ENDPOINT;
	if (!endpoint) throw new Error('S3_ENDPOINT is not set and no local S3 stand-in was started.');
	client = new S3Client({
		endpoint,
		region: process.env.S3_REGION ?? 'us-east-1',
		forcePathStyle: process.env.S3_FORCE_PATH_STYLE !== 'false',
		credentials: {
			accessKeyId: process.env.S3_ACCESS_KEY_ID ?? 'S3RVER',
			secretAccessKey: process.env.S3_SECRET_ACCESS_KEY ?? 'S3RVER'
		},
		// Without these, streamed uploads to s3rver are stored corrupted (STACK.md).
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED'
	});
	return client;
}

export async function putObject(key: string, body: Buffer, contentType: string) {
	await s3().send(new PutObjectCommand({ Bucket: bucket(), Key: key, Body: body, ContentType: contentType }));
}

export async function getObject(key: string) {
	const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
	if (!res.Body) throw new Error(`object ${key} has no body`);
	return {
		body: res.Body.transformToWebStream(),
		contentType: res.ContentType ?? 'application/octet-stream',
		length: res.ContentLength
	};
}

export async function getObjectBytes(key: string): Promise<Buffer> {
	const res = await s3().send(new GetObjectCommand({ Bucket: bucket(), Key: key }));
	if (!res.Body) throw new Error(`object ${key} has no body`);
	return Buffer.from(await res.Body.transformToByteArray());
}

export async function deleteObjects(keys: string[]) {
	if (keys.length === 0) return;
	await s3().send(new DeleteObjectsCommand({ Bucket: bucket(), Delete: { Objects: keys.map((Key) => ({ Key })) } }));
}

/** Creates the bucket when it is missing (a fresh stand-in, or a new real bucket name). */
export async function ensureBucket() {
	try {
		await s3().send(new HeadBucketCommand({ Bucket: bucket() }));
	} catch {
		await s3().send(new CreateBucketCommand({ Bucket: bucket() }));
	}
}

export function closeStorage() {
	client?.destroy();
	client = undefined;
}

export interface LocalS3 {
	endpoint: string;
	stop(): Promise<void>;
}

export async function startLocalS3(directory: string): Promise<LocalS3> {
	fs.mkdirSync(directory, { recursive: true });
	const server = new S3rver({
		address: '127.0.0.1',
		port: 0,
		directory,
		silent: true,
		configureBuckets: [{ name: bucket() }]
	});
	const { port } = await server.run();
	return { endpoint: `http://127.0.0.1:${port}`, stop: () => server.close() };
}

/** Keys under a prefix (for checks that nothing was left behind). */
export async function listKeys(prefix: string): Promise<string[]> {
	const keys: string[] = [];
	let token: string | undefined;
	do {
		const res = await s3().send(
			new ListObjectsV2Command({ Bucket: bucket(), Prefix: prefix, ContinuationToken: token })
		);
		for (const o of res.Contents ?? []) if (o.Key) keys.push(o.Key);
		token = res.IsTruncated ? res.NextContinuationToken : undefined;
	} while (token);
	return keys;
}
