// The print bundle's ZIP (lib/editions/export/pack.ts): the files and metadata.json
// packed under the edition's name, and a file that cannot be read fails the export
// with the fault, rather than ending the worker (yazl reports it as an "error"
// event on its ZipFile, which nothing else listens to).
import { mkdtemp, readFile, writeFile } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { METADATA_FILE, packZip } from "@/lib/editions/export/pack";
import { readZipEntries } from "../../support/zip";

const edition = { title: "Kestrel Ridge Bulletin", issueLabel: "2027-09" };

async function bundleDir(): Promise<string> {
  const dir = await mkdtemp(join(tmpdir(), "crownlight-pack-"));
  await writeFile(join(dir, METADATA_FILE), '{"edition":"Kestrel Ridge Bulletin"}');
  await writeFile(join(dir, "credits.txt"), "Corona, 2027 August 2, by Nadia Fairweather.");
  return dir;
}

describe("packZip", () => {
  it("packs the files and metadata.json under the edition's name", async () => {
    const dir = await bundleDir();
    const zip = await packZip(dir, [{ name: "credits.txt", path: join(dir, "credits.txt"), kind: "text", position: null }], edition);
    expect(zip.zipName).toMatch(/^Kestrel.Ridge.Bulletin.*2027-09.*print-bundle\.zip$/);
    const entries = await readZipEntries(await readFile(zip.zipPath));
    expect([...entries.keys()].sort()).toEqual(["credits.txt", METADATA_FILE]);
    expect(entries.get("credits.txt")?.toString()).toBe("Corona, 2027 August 2, by Nadia Fairweather.");
  });

  it("fails with the fault when a file is gone, and the process goes on", async () => {
    const dir = await bundleDir();
    const files = [{ name: "plate-1.tif", path: join(dir, "plate-1.tif"), kind: "plate", position: 1 }];
    await expect(packZip(dir, files, edition)).rejects.toThrow(/ENOENT|no such file/);
  });
});
