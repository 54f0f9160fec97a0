#!/usr/bin/env node
// Local S3 fake for Nightmark (s3rver), loopback only, files kept on disk.
//
//   node scripts/s3-fake.mjs [--port 4569] [--dir .nightmark/s3-dev] [--bucket nightmark-uploads]
//   env: S3_PORT, S3_DIR, S3_BUCKET
//
// Clients: endpoint http://127.0.0.1:PORT, forcePathStyle: true, keys S3RVER / S3RVER.
import { mkdirSync } from "node:fs";
import { resolve } from "node:path";
import S3rver from "s3rver";

const HOST = "127.0.0.1";

function arg(name) {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 ? process.argv[i + 1] : undefined;
}

const port = Number(arg("port") ?? process.env.S3_PORT ?? 4569);
const directory = resolve(arg("dir") ?? process.env.S3_DIR ?? ".nightmark/s3-dev");
const bucket = arg("bucket") ?? process.env.S3_BUCKET ?? "nightmark-uploads";

mkdirSync(directory, { recursive: true });

// Let the browser PUT/GET directly (presigned URLs) from the app's origin.
const cors = `<CORSConfiguration>
  <CORSRule>
    <AllowedOrigin>*</AllowedOrigin>
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>POST</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedMethod>DELETE</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

const server = new S3rver({
  address: HOST,
  port,
  directory,
  silent: true,
  // path-style only: no vhost matching on *.localhost
  vhostBuckets: false,
  configureBuckets: [{ name: bucket, configs: [cors] }],
});

try {
  const addr = await server.run();
  console.log(`[s3] s3rver on http://${HOST}:${addr.port}, bucket ${bucket}, store ${directory}`);
} catch (err) {
  console.error(`[s3] failed to start: ${err.message}`);
  process.exit(1);
}

function shutdown() {
  server.close().finally(() => process.exit(0));
  setTimeout(() => process.exit(0), 1000).unref();
}
process.on("SIGINT", shutdown);
process.on("SIGTERM", shutdown);
