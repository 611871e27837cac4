// Sizes for people, client-safe. When rounding would make two different sizes
// read the same (2.0 GB and 2.0 GB), `exactWhenEqualTo` shows the bytes.

function rounded(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
  if (bytes >= 1024) return `${(bytes / 1024).toFixed(0)} kB`;
  return `${bytes} bytes`;
}

export function formatBytes(bytes: number, exactWhenEqualTo?: number): string {
  const text = rounded(bytes);
  if (exactWhenEqualTo !== undefined && exactWhenEqualTo !== bytes && rounded(exactWhenEqualTo) === text) return `${bytes.toLocaleString("en")} bytes`;
  return text;
}
