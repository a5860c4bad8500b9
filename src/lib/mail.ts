/**
 * Outgoing e-mail. With SMTP_URL set, nodemailer sends for real. Without it a
 * fake outbox is active: nodemailer's streamTransport builds the full RFC 822
 * message and we write it as an .eml file under data/outbox/, which project
 * owners can read at /dev/outbox.
 */
import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import nodemailer, { type Transporter } from 'nodemailer';
import { mailFrom, outboxDir, smtpUrl } from './env';

export interface Mail {
  to: string;
  subject: string;
  text: string;
}

let transport: { key: string; t: Transporter } | null = null;

export function outboxActive(): boolean {
  return !smtpUrl();
}

function getTransport(): Transporter {
  const key = smtpUrl() ?? 'outbox';
  if (transport?.key !== key) {
    const url = smtpUrl();
    transport = {
      key,
      t: url ? nodemailer.createTransport(url) : nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'windows' }),
    };
  }
  return transport.t;
}

export async function sendMail(mail: Mail): Promise<void> {
  const info = await getTransport().sendMail({
    from: mailFrom(),
    to: mail.to,
    subject: mail.subject,
    text: mail.text,
    // base64 keeps long links whole; quoted-printable would wrap them at 76 columns.
    textEncoding: 'base64',
  });
  if (!outboxActive()) return;
  const raw = (info as unknown as { message: Buffer }).message;
  const dir = outboxDir();
  await fs.mkdir(dir, { recursive: true });
  const stamp = new Date().toISOString().replace(/[:.]/g, '-');
  const file = path.join(dir, `${stamp}-${crypto.randomBytes(4).toString('hex')}.eml`);
  await fs.writeFile(file, raw);
}

/**
 * Decodes RFC 2047 encoded words. Adjacent words are joined before decoding
 * (the blank between them is not text), so a character split across two
 * base64 words comes out whole.
 */
export function decodeHeader(value: string): string {
  return value.replace(/(?:=\?utf-8\?[BQ]\?[^?]*\?=\s*)+/gi, (run) => {
    const bytes: Buffer[] = [];
    for (const m of run.matchAll(/=\?utf-8\?([BQ])\?([^?]*)\?=/gi)) {
      const [, kind, data] = m;
      bytes.push(
        kind.toUpperCase() === 'B'
          ? Buffer.from(data, 'base64')
          : Buffer.from(
              data.replace(/_/g, ' ').replace(/=([0-9A-F]{2})/gi, (_, h: string) => String.fromCharCode(parseInt(h, 16))),
              'latin1',
            ),
      );
    }
    // Keep a trailing blank that separated the run from plain text after it.
    return Buffer.concat(bytes).toString('utf8') + (/\s$/.test(run) ? ' ' : '');
  });
}

export interface OutboxMessage {
  id: string;
  to: string;
  from: string;
  subject: string;
  date: string;
  text: string;
  links: string[];
}

/** Unfolded headers and the decoded text body of a single-part message we wrote. */
export function parseEml(raw: string): Omit<OutboxMessage, 'id'> {
  const split = raw.search(/\r?\n\r?\n/);
  const head = split < 0 ? raw : raw.slice(0, split);
  const body = split < 0 ? '' : raw.slice(split).replace(/^\r?\n\r?\n/, '');
  const headers = new Map<string, string>();
  for (const line of head.replace(/\r?\n[ \t]+/g, ' ').split(/\r?\n/)) {
    const i = line.indexOf(':');
    if (i > 0) headers.set(line.slice(0, i).trim().toLowerCase(), line.slice(i + 1).trim());
  }
  const enc = (headers.get('content-transfer-encoding') ?? '').toLowerCase();
  let text: string;
  if (enc === 'base64') text = Buffer.from(body.replace(/\s+/g, ''), 'base64').toString('utf8');
  else if (enc === 'quoted-printable')
    text = Buffer.from(
      body.replace(/=\r?\n/g, '').replace(/=([0-9A-F]{2})/gi, (_, h: string) => String.fromCharCode(parseInt(h, 16))),
      'latin1',
    ).toString('utf8');
  else text = body;
  return {
    to: decodeHeader(headers.get('to') ?? ''),
    from: decodeHeader(headers.get('from') ?? ''),
    subject: decodeHeader(headers.get('subject') ?? ''),
    date: new Date(headers.get('date') ?? 0).toISOString(),
    text: text.replace(/\r\n/g, '\n'),
    links: [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map((m) => m[0]),
  };
}

/** Messages in the fake outbox, newest first. */
export async function readOutbox(limit = 200): Promise<OutboxMessage[]> {
  const dir = outboxDir();
  let names: string[];
  try {
    names = (await fs.readdir(dir)).filter((n) => n.endsWith('.eml'));
  } catch {
    return [];
  }
  names.sort().reverse();
  const out: OutboxMessage[] = [];
  for (const name of names.slice(0, limit)) {
    const raw = await fs.readFile(path.join(dir, name), 'utf8');
    out.push({ id: name.replace(/\.eml$/, ''), ...parseEml(raw) });
  }
  return out;
}
