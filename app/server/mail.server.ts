import nodemailer, { type Transporter } from "nodemailer";
import { readdirSync, readFileSync, existsSync } from "node:fs";
import path from "node:path";
import { env } from "./env.server.ts";

let transporter: Transporter | undefined;

function transport(): Transporter {
  if (!transporter) {
    const url = env().SMTP_URL;
    if (!url) throw new Error("SMTP_URL is not set: e-mail cannot be sent");
    // The same code talks to the local catcher and to a real provider; only SMTP_URL differs.
    transporter = nodemailer.createTransport(url);
  }
  return transporter;
}

export type Mail = { to: string; subject: string; text: string; html: string };

export async function sendMail(mail: Mail) {
  await transport().sendMail({ from: env().MAIL_FROM, ...mail });
}

/**
 * The origin of links in mail, from configuration only, never from a request's Host or
 * Origin header: APP_URL; outside production (or a local plain-http run) the server's own
 * listening origin. Production without APP_URL refuses to build a link.
 */
export function mailOrigin(): string {
  const e = env();
  if (e.APP_URL) return new URL(e.APP_URL).origin;
  if (e.NODE_ENV === "production" && !e.BLINDCUT_INSECURE_COOKIES) throw new Error("APP_URL is required in production: mailed links are built from it");
  return process.env.BLINDCUT_LISTEN_ORIGIN ?? `http://localhost:${process.env.PORT ?? 3000}`;
}

export function appUrl(pathname: string) {
  return new URL(pathname, mailOrigin()).toString();
}

const escapeHtml = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** Blindcut's plain mail: a few paragraphs and one link, as text and as HTML. */
export function composeMail(to: string, subject: string, paragraphs: string[], link?: { label: string; url: string }): Mail {
  const text = [...paragraphs, ...(link ? [`${link.label}: ${link.url}`] : []), "— Blindcut"].join("\n\n");
  const html = [
    `<div style="font-family: Arial, sans-serif; font-size: 16px; line-height: 1.5; color: #17191b; max-width: 560px">`,
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    link
      ? `<p><a href="${escapeHtml(link.url)}" style="display:inline-block;background:#1f4e6b;color:#fff;padding:10px 16px;border-radius:4px;text-decoration:none;font-weight:bold">${escapeHtml(link.label)}</a></p><p style="font-size:13px;color:#4d535a">Or paste this address into your browser: ${escapeHtml(link.url)}</p>`
      : "",
    `<p style="color:#4d535a">— Blindcut</p></div>`,
  ].join("\n");
  return { to, subject, text, html };
}

export type CaughtMail = { id: string; receivedAt: string; from: string; to: string[]; subject: string; text: string; html: string };

/** Mail caught by the local SMTP server (development and tests only). */
export function caughtMail(): CaughtMail[] {
  const dir = env().MAIL_CATCH_DIR;
  if (!dir || !existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((f) => f.endsWith(".json"))
    .sort()
    .reverse()
    .map((f) => JSON.parse(readFileSync(path.join(dir, f), "utf8")) as CaughtMail);
}
