import next from "eslint-config-next";

const config = [
  ...next,
  { ignores: [".next/**", ".next-*/**", ".data/**", "node_modules/**", "db/schema.ts"] },
  {
    files: ["components/**/*.{ts,tsx}"],
    rules: { "no-restricted-imports": ["error", { patterns: ["@/db/*"] }] },
  },
  {
    files: ["lib/**/*.ts", "worker/**/*.ts"],
    ignores: ["lib/auth/session.ts", "lib/http/**"],
    rules: { "no-restricted-imports": ["error", { patterns: ["next/*", "next", "server-only"] }] },
  },
];
export default config;
