// Two S3 calls that s3rver 3.7 lacks and that our uploads rely on: ListParts
// (GET /bucket/key?uploadId=..., for resuming after a reload) and
// AbortMultipartUpload (DELETE /bucket/key?uploadId=..., for cancel and the
// sweeper); and S3's NoSuchUpload for CompleteMultipartUpload (POST) of an upload
// that is gone, where s3rver would fail on its missing files. They read and remove s3rver's own upload folders: the parts of an
// upload are files named by part number, each with a ".md5" beside it (the ETag).
import { promises as fs } from "node:fs";
import path from "node:path";

interface Store {
  getResourcePath(bucket: string, key: string | undefined, resource: string): string;
}

interface Ctx {
  method: string;
  path: string;
  query: Record<string, string | string[] | undefined>;
  status: number;
  body: unknown;
  type: string;
  store: Store;
}

function xmlEscape(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}

function noSuchUpload(ctx: Ctx, uploadId: string): void {
  ctx.status = 404;
  ctx.type = "application/xml";
  ctx.body = `<?xml version="1.0" encoding="UTF-8"?>\n<Error><Code>NoSuchUpload</Code><Message>The specified upload does not exist.</Message><UploadId>${xmlEscape(uploadId)}</UploadId></Error>`;
}

async function readUploadKey(dir: string): Promise<string | null> {
  try {
    return await fs.readFile(path.join(dir, "key"), "utf8");
  } catch {
    return null;
  }
}

export function multipartExtras() {
  return async (ctx: Ctx, next: () => Promise<unknown>) => {
    const uploadId = typeof ctx.query.uploadId === "string" ? ctx.query.uploadId : undefined;
    const isPart = "partNumber" in ctx.query;
    if (!uploadId || isPart || (ctx.method !== "GET" && ctx.method !== "DELETE" && ctx.method !== "POST")) return next();
    const match = /^\/([^/]+)\/(.+)$/.exec(ctx.path);
    if (!match) return next();
    const bucket = decodeURIComponent(match[1]);
    const key = decodeURIComponent(match[2]);
    if (!/^[0-9a-f]+$/.test(uploadId)) return noSuchUpload(ctx, uploadId);
    const dir = path.join(ctx.store.getResourcePath(bucket, undefined, "uploads"), uploadId);
    if ((await readUploadKey(dir)) !== key) return noSuchUpload(ctx, uploadId);
    // CompleteMultipartUpload of an upload that is still there goes on to s3rver; one already
    // aborted or completed (a cancel that met the last part) was answered NoSuchUpload above, as S3 does.
    if (ctx.method === "POST") return next();

    if (ctx.method === "DELETE") {
      await fs.rm(dir, { recursive: true, force: true });
      ctx.status = 204;
      ctx.body = null;
      return;
    }
    const names = await fs.readdir(dir);
    const numbers = names.filter((n) => /^\d+$/.test(n)).map(Number).sort((a, b) => a - b);
    const parts = await Promise.all(
      numbers.map(async (n) => {
        const [stat, md5] = await Promise.all([fs.stat(path.join(dir, String(n))), fs.readFile(path.join(dir, `${n}.md5`), "utf8").catch(() => "")]);
        return `<Part><PartNumber>${n}</PartNumber><LastModified>${stat.mtime.toISOString()}</LastModified><ETag>"${md5.trim()}"</ETag><Size>${stat.size}</Size></Part>`;
      }),
    );
    ctx.status = 200;
    ctx.type = "application/xml";
    ctx.body =
      `<?xml version="1.0" encoding="UTF-8"?>\n<ListPartsResult xmlns="http://s3.amazonaws.com/doc/2006-03-01/">` +
      `<Bucket>${xmlEscape(bucket)}</Bucket><Key>${xmlEscape(key)}</Key><UploadId>${uploadId}</UploadId>` +
      `<PartNumberMarker>0</PartNumberMarker><NextPartNumberMarker>${numbers.at(-1) ?? 0}</NextPartNumberMarker>` +
      `<MaxParts>10000</MaxParts><IsTruncated>false</IsTruncated>${parts.join("")}</ListPartsResult>`;
  };
}
