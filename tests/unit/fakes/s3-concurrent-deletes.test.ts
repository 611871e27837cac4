// The S3 fake's deletes succeed side by side in one folder (fakes/s3/concurrent-deletes.ts):
// s3rver's own store failed most of eight deletes at once in a folder they emptied
// (ENOENT from its clean-up of empty folders; 508 of 800 in a trial here), though
// each object was gone. S3 has no folders, and no such failure.
import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, describe, expect, it } from "vitest";
import { tolerateFolderRaces } from "@/fakes/s3/concurrent-deletes";

const require = createRequire(import.meta.url);
// s3rver's file store and object model, as its server uses them.
const FilesystemStore = require("s3rver/lib/stores/filesystem.js") as new (dir: string) => {
  putBucket(name: string): Promise<void>;
  putObject(object: unknown): Promise<void>;
  deleteObject(bucket: string, key: string): Promise<void>;
  listObjects(bucket: string, options: { prefix: string; maxKeys: number }): Promise<{ objects: unknown[] }>;
};
const S3Object = require("s3rver/lib/models/object.js") as new (bucket: string, key: string, content: Readable, metadata: Record<string, string>) => unknown;

const dir = mkdtempSync(join(tmpdir(), "crownlight-s3-deletes-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("the S3 fake's deletes", () => {
  it("delete eight objects of one folder at once, every one, and leave no folder behind", async () => {
    const store = new FilesystemStore(dir);
    tolerateFolderRaces(store);
    await store.putBucket("b");
    for (let round = 0; round < 20; round++) {
      const keys = Array.from({ length: 8 }, (_, i) => `tiles/${round}/x/${i}.jpg`);
      for (const key of keys) await store.putObject(new S3Object("b", key, Readable.from([Buffer.from(key)]), {}));
      const results = await Promise.allSettled(keys.map((key) => store.deleteObject("b", key)));
      expect(results.filter((r) => r.status === "rejected")).toEqual([]);
    }
    expect((await store.listObjects("b", { prefix: "tiles/", maxKeys: 1000 })).objects).toEqual([]);
    expect(readdirSync(join(dir, "b")).filter((name) => name === "tiles")).toEqual([]);
  });

  it("still fail for a fault that is not a folder's race", async () => {
    const store = { deleteObject: async () => { throw Object.assign(new Error("no space"), { code: "ENOSPC" }); } };
    tolerateFolderRaces(store);
    await expect(store.deleteObject()).rejects.toThrow("no space");
  });
});
