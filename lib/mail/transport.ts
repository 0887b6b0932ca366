import nodemailer, { type Transporter } from "nodemailer";

/**
 * SMTP settings from the environment; by default the local mail server the app's scripts start
 * (scripts/mail-server.ts) on 127.0.0.1:2525. Production sets SMTP_HOST and friends.
 */
export function smtpSettings(env: NodeJS.ProcessEnv = process.env) {
  return {
    host: env.SMTP_HOST ?? "127.0.0.1",
    port: Number(env.SMTP_PORT ?? 2525),
    secure: env.SMTP_SECURE === "1",
    auth: env.SMTP_USER ? { user: env.SMTP_USER, pass: env.SMTP_PASSWORD ?? "" } : undefined,
    from: env.MAIL_FROM ?? "Delta Ledger <no-reply@delta-ledger.invalid>",
  };
}

export function createTransport(env: NodeJS.ProcessEnv = process.env): { transporter: Transporter; from: string } {
  const s = smtpSettings(env);
  return {
    // A local server without TLS is the default; production points at a real relay.
    transporter: nodemailer.createTransport({ host: s.host, port: s.port, secure: s.secure, auth: s.auth, ignoreTLS: !s.secure && s.host === "127.0.0.1", connectionTimeout: 5000, greetingTimeout: 5000, socketTimeout: 10000 }),
    from: s.from,
  };
}

export function appUrl(env: NodeJS.ProcessEnv = process.env): string {
  return (env.APP_URL ?? `http://localhost:${env.PORT ?? 3000}`).replace(/\/$/, "");
}
