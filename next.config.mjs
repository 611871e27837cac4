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
    serverActions: { bodySizeLimit: "25mb" },
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
