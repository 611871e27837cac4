/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  // The test command builds into its own folder so a running development app is untouched.
  distDir: process.env.NEXT_DIST_DIR || ".next",
  poweredByHeader: false,
  // sharp and the pg driver stay native Node modules on the server.
  serverExternalPackages: ["sharp", "pg", "exiftool-vendored", "bullmq", "ioredis"],
  experimental: {
    // Track files of moving sites are sent as text through a server action.
    // proxy.ts refuses larger bodies with a message naming the limit
    // (SERVER_ACTION_BODY_LIMIT_BYTES in lib/http/security-headers.ts), and the
    // proxy must pass on the whole body, so its buffer is as large.
    serverActions: { bodySizeLimit: "25mb" },
    proxyClientMaxBodySize: "25mb",
    // forbidden() and unauthorized() from next/navigation for pages.
    authInterrupts: true,
  },
  async headers() {
    return [
      {
        source: "/:path*",
        headers: [
          { key: "X-Content-Type-Options", value: "nosniff" },
          { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
          { key: "X-Frame-Options", value: "SAMEORIGIN" },
        ],
      },
    ];
  },
};

export default nextConfig;
