// Tests run against the test world that scripts/test.sh prepares: its database,
// Redis database 1, the fakes, and the app on 127.0.0.1:3100.
export const APP = process.env.APP_URL ?? "http://127.0.0.1:3100";
export const MAILBOX = `http://127.0.0.1:${process.env.MAILBOX_PORT ?? 1080}`;

export function requireTestDatabase(): string {
  const url = process.env.DATABASE_URL ?? "";
  if (!/\/crownlight_test(_lane\d{1,2})?$/.test(url)) {
    throw new Error(`integration tests need the test database (run them through npm test); DATABASE_URL is ${url || "unset"}`);
  }
  return url;
}
