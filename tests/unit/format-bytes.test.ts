import { describe, expect, it } from "vitest";
import { formatBytes } from "@/lib/format/bytes";

describe("sizes for people", () => {
  it("rounds to kB, MB and GB of 1024", () => {
    expect(formatBytes(512)).toBe("512 bytes");
    expect(formatBytes(115 * 1024)).toBe("115 kB");
    expect(formatBytes(8 * 1024 ** 2)).toBe("8.0 MB");
    expect(formatBytes(2 * 1024 ** 3)).toBe("2.0 GB");
  });

  it("shows exact bytes when two different sizes would read the same", () => {
    const limit = 2 * 1024 ** 3;
    expect(formatBytes(limit + 1, limit)).toBe("2,147,483,649 bytes");
    expect(formatBytes(limit, limit + 1)).toBe("2,147,483,648 bytes");
    expect(formatBytes(3 * 1024 ** 3, limit)).toBe("3.0 GB");
  });
});
