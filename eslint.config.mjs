import next from "eslint-config-next";

// Arrows run downhill only: app and worker → db and adapters → lib. lib/ is the pure core that
// the web app, the worker and the benchmarks share, so it may not reach a database, the framework
// or a network client.
const SERVICE_IMPORTS = ["@/db/*", "@/adapters/*", "@/app/*", "pg", "pg-boss", "nodemailer", "@aws-sdk/*", "smtp-server", "s3rver"];
const FRAMEWORK_IMPORTS = ["next", "next/*", "server-only"];

const config = [
  ...next,
  { ignores: [".next/**", ".next-*/**", ".data/**", "node_modules/**", "db/schema.ts", "test-results/**"] },
  {
    files: ["lib/**/*.{ts,tsx}"],
    rules: { "no-restricted-imports": ["error", { patterns: [...SERVICE_IMPORTS, ...FRAMEWORK_IMPORTS] }] },
  },
  {
    files: ["components/**/*.{ts,tsx}"],
    rules: { "no-restricted-imports": ["error", { patterns: ["@/db/*", "@/adapters/*", "@/app/_server/*"] }] },
  },
  {
    files: ["db/**/*.ts", "adapters/**/*.ts", "worker/**/*.ts"],
    rules: { "no-restricted-imports": ["error", { patterns: ["@/app/*", ...FRAMEWORK_IMPORTS] }] },
  },
];
export default config;
