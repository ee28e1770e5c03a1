import { z } from "zod";

// Read at use time, not import time: `next build` runs without a database or secrets.
const envSchema = z.object({
  DATABASE_URL: z.string().url().default("postgres://postgres@127.0.0.1:54329/hearth"),
  SESSION_SECRET: z.string().min(32).optional(),
  APP_URL: z.string().url().default("http://127.0.0.1:3000"),
  SMTP_HOST: z.string().default("127.0.0.1"),
  SMTP_PORT: z.coerce.number().int().positive().default(2525),
  SMTP_SECURE: z.enum(["true", "false"]).default("false"),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default("Hearth <hearth@shop.invalid>"),
  MAIL_CAPTURE_URL: z.string().url().optional(), // the local capture server's read API
  S3_ENDPOINT: z.string().url().optional(),
  S3_REGION: z.string().default("us-east-1"),
  S3_BUCKET: z.string().default("hearth"),
  S3_ACCESS_KEY_ID: z.string().default("S3RVER"),
  S3_SECRET_ACCESS_KEY: z.string().default("S3RVER"),
  S3_FORCE_PATH_STYLE: z.enum(["true", "false"]).default("true"),
  UPLOAD_MAX_BYTES: z.coerce.number().int().positive().default(100 * 1024 * 1024),
  JSON_MAX_BYTES: z.coerce.number().int().positive().default(1024 * 1024), // a JSON request body; larger is a 413
  TRUSTED_PROXIES: z.string().default(""), // IPs/CIDRs whose X-Forwarded-For is believed; empty = the socket address
  // An upload up to this size is parsed whole in the request; a larger one is checked for shape
  // as it streams to disk and measured by the worker from the store.
  UPLOAD_PARSE_MAX_BYTES: z.coerce.number().int().positive().default(16 * 1024 * 1024),
  S3_CONNECT_TIMEOUT_MS: z.coerce.number().int().positive().default(3_000),
  S3_IDLE_TIMEOUT_MS: z.coerce.number().int().positive().default(15_000),
  DB_CONNECT_TIMEOUT_MS: z.coerce.number().int().positive().default(5_000),
  DB_POOL_MAX: z.coerce.number().int().positive().default(10),
  NODE_ENV: z.string().default("development"),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

export function getEnv(): Env {
  if (!cached) cached = envSchema.parse(process.env);
  return cached;
}

/** For tests that change the environment between cases. */
export function resetEnvCache() {
  cached = undefined;
}
