import crypto from "node:crypto";

// All configuration comes from the environment, read once here.
export interface Config {
  env: "development" | "test" | "production";
  port: number;
  host: string;
  publicUrl: string;
  databaseUrl: string;
  jwtSecret: string;
  sessionHours: number;
  smtp: { host: string; port: number; secure: boolean; user?: string; pass?: string };
  mailFrom: string;
  /** Run the local SMTP fake inside the server process (development and tests). */
  mailFake: boolean;
  dataDir: string;
  blob: { driver: "fs" | "s3"; bucket: string; endpoint?: string; region: string; accessKeyId?: string; secretAccessKey?: string; forcePathStyle: boolean };
  uploadLimitBytes: number;
  workerConcurrency: number;
  loginRateLimit: number;
  /** Calendar feed fetches per link per 15 minutes (failed fetches per address: 20 times this). */
  feedRateLimit: number;
}

const num = (v: string | undefined, d: number) => (v === undefined || v === "" ? d : Number(v));

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const mode = (env.NODE_ENV === "production" ? "production" : env.NODE_ENV === "test" ? "test" : "development") as Config["env"];
  let jwtSecret = env.JWT_SECRET ?? "";
  if (!jwtSecret) {
    if (mode === "production") throw new Error("JWT_SECRET must be set when NODE_ENV=production (refusing to start with a development secret).");
    jwtSecret = devSecret();
  }
  const port = num(env.PORT, 5180);
  return {
    env: mode,
    port,
    host: env.HOST ?? "127.0.0.1",
    publicUrl: env.PUBLIC_URL ?? `http://localhost:${port}`,
    databaseUrl: env.DATABASE_URL ?? "postgres://app@127.0.0.1:55432/barhound",
    jwtSecret,
    sessionHours: num(env.SESSION_HOURS, 12),
    smtp: {
      host: env.SMTP_HOST ?? "127.0.0.1",
      port: num(env.SMTP_PORT, 2525),
      secure: env.SMTP_SECURE === "true",
      user: env.SMTP_USER || undefined,
      pass: env.SMTP_PASS || undefined,
    },
    mailFrom: env.MAIL_FROM ?? "Barhound <no-reply@barhound.local>",
    mailFake: env.MAIL_FAKE ? env.MAIL_FAKE === "true" : mode !== "production",
    dataDir: env.DATA_DIR ?? ".data",
    blob: {
      driver: env.BLOB_DRIVER === "s3" ? "s3" : "fs",
      bucket: env.S3_BUCKET ?? "barhound-captures",
      endpoint: env.S3_ENDPOINT || undefined,
      region: env.S3_REGION ?? "us-east-1",
      accessKeyId: env.S3_ACCESS_KEY_ID || undefined,
      secretAccessKey: env.S3_SECRET_ACCESS_KEY || undefined,
      forcePathStyle: env.S3_FORCE_PATH_STYLE !== "false",
    },
    uploadLimitBytes: num(env.UPLOAD_LIMIT_MB, 512) * 1024 * 1024,
    workerConcurrency: num(env.WORKER_CONCURRENCY, 2),
    loginRateLimit: num(env.LOGIN_RATE_LIMIT, 10),
    feedRateLimit: num(env.FEED_RATE_LIMIT, 30),
  };
}

// A development secret that is stable for the life of the process tree (children inherit it through the env).
function devSecret(): string {
  if (!process.env.BARHOUND_DEV_SECRET) process.env.BARHOUND_DEV_SECRET = crypto.randomBytes(32).toString("hex");
  return process.env.BARHOUND_DEV_SECRET;
}
