// Local stand-in for S3 (s3rver), on loopback only. The app reaches it through
// @aws-sdk/client-s3 exactly as it would reach real S3; only env differs.
// Buckets are created at start with a CORS rule that lets the app's origins
// upload parts straight from the browser and read each part's ETag.
import path from "node:path";
import S3rver from "s3rver";
import { tolerateFolderRaces } from "./concurrent-deletes";
import { sealTokensWithoutLegacyDes } from "./continuation-tokens";
import { multipartExtras } from "./multipart-extras";

const endpoint = new URL(process.env.S3_ENDPOINT ?? "http://127.0.0.1:4569");
const port = Number(endpoint.port || 4569);
const directory = path.resolve(process.env.S3_FAKE_DIR ?? ".data/s3");

const bucketNames = new Set<string>();
for (const key of ["S3_BUCKET_ORIGINALS", "S3_BUCKET_DERIVED", "S3_BUCKET_EXPORTS"]) {
  const name = process.env[key];
  if (name) {
    bucketNames.add(name);
    // The test suite uses its own buckets beside the development ones.
    bucketNames.add(name.replace(/^crownlight-/, "crownlight-test-"));
  }
}

// The development app, and the test app of every lane (scripts/test.sh: port 3100 + lane).
const origins = new Set<string>(
  [3000, ...Array.from({ length: 15 }, (_, lane) => 3100 + lane)].flatMap((port) => [`http://127.0.0.1:${port}`, `http://localhost:${port}`]),
);
if (process.env.APP_URL) origins.add(new URL(process.env.APP_URL).origin);

const cors = `<CORSConfiguration>
  <CORSRule>
${[...origins].map((o) => `    <AllowedOrigin>${o}</AllowedOrigin>`).join("\n")}
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>POST</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

const server = new S3rver({
  address: "127.0.0.1",
  port,
  directory,
  silent: true,
  // Path-style addressing only: the SDK is set to forcePathStyle.
  vhostBuckets: false,
  configureBuckets: [...bucketNames].map((name) => ({ name, configs: [cors] })),
});

tolerateFolderRaces((server as unknown as { store: Parameters<typeof tolerateFolderRaces>[0] }).store);
sealTokensWithoutLegacyDes();

// ListParts and AbortMultipartUpload, which s3rver lacks, go ahead of its router
// (the last middleware), so that they answer before it refuses the method.
const stack = (server as unknown as { middleware: unknown[] }).middleware;
stack.splice(stack.length - 1, 0, multipartExtras());

await server.run();
console.log(`s3 fake listening on http://127.0.0.1:${port}, buckets: ${[...bucketNames].join(", ")}`);

// Once it serves (a fault at start still ends it): s3rver reads an upload's part files through
// streams with no "error" listener, so a part file that vanishes under it (an abort racing a
// complete) would end the fake, and every later request with it. A real S3 fails that one
// request; the fake logs the fault and stays up. A promise left rejected is a fault of ours, not
// a client's, and still ends it.
process.on("uncaughtException", (err, origin) => {
  console.error(`s3 fake: ${origin === "unhandledRejection" ? "a promise was left rejected" : "a request failed outside its handler"}: ${err.stack ?? err.message}`);
  if (origin === "unhandledRejection") process.exit(1);
});

const shutdown = () => {
  server.close().finally(() => process.exit(0));
};
process.on("SIGTERM", shutdown);
process.on("SIGINT", shutdown);
