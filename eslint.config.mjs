import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";
import drizzle from "eslint-plugin-drizzle";

// Next.js rules (React, hooks, accessibility, TypeScript) and Drizzle's rules
// against an update or delete without a where clause, on the names our code
// gives the database and transactions.
const config = [
  ...nextVitals,
  ...nextTs,
  {
    plugins: { drizzle },
    rules: {
      "drizzle/enforce-delete-with-where": ["error", { drizzleObjectName: ["db", "tx"] }],
      "drizzle/enforce-update-with-where": ["error", { drizzleObjectName: ["db", "tx"] }],
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
    },
  },
  {
    ignores: [".next/**", ".next-test/**", ".next-test_lane*/**", "node_modules/**", ".data/**", ".cache/**", ".artifacts/**", "next-env.d.ts", "db/migrations/**"],
  },
];

export default config;
