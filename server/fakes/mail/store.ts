// Every message the mail fake received, newest last in memory. Optionally
// mirrored to a JSON file so a restarted fake still shows earlier mail.
import { randomUUID } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import type { AddressObject, ParsedMail } from 'mailparser';

export interface StoredAttachment {
  filename: string | null;
  contentType: string;
  size: number;
  contentId: string | null;
  content: string; // base64
}

export interface StoredMessage {
  id: string;
  receivedAt: string; // ISO time the fake got it
  envelope: { from: string | null; to: string[] }; // what the SMTP client said
  from: string | null; // header, as text: "Kneepoint <shop@…>"
  to: string[]; // header addresses
  cc: string[];
  subject: string;
  date: string | null; // Date header
  messageId: string | null;
  text: string | null;
  html: string | null;
  attachments: StoredAttachment[];
}

function addresses(field: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(field) ? field : field ? [field] : [];
  return list.flatMap((a) => a.value.map((v) => v.address ?? '').filter(Boolean));
}

export function toStored(parsed: ParsedMail, envelope: StoredMessage['envelope']): StoredMessage {
  return {
    id: randomUUID(),
    receivedAt: new Date().toISOString(),
    envelope,
    from: parsed.from?.text ?? null,
    to: addresses(parsed.to),
    cc: addresses(parsed.cc),
    subject: parsed.subject ?? '',
    date: parsed.date ? parsed.date.toISOString() : null,
    messageId: parsed.messageId ?? null,
    text: parsed.text ?? null,
    html: typeof parsed.html === 'string' ? parsed.html : null,
    attachments: parsed.attachments.map((a) => ({
      filename: a.filename ?? null,
      contentType: a.contentType,
      size: a.size,
      contentId: a.contentId ?? null,
      content: a.content.toString('base64'),
    })),
  };
}

export class MailStore {
  private messages: StoredMessage[] = [];

  constructor(private file?: string) {
    if (file) mkdirSync(dirname(file), { recursive: true });
    if (file && existsSync(file)) this.messages = JSON.parse(readFileSync(file, 'utf8')) as StoredMessage[];
  }

  add(msg: StoredMessage): void {
    this.messages.push(msg);
    this.save();
  }

  newestFirst(): StoredMessage[] {
    return [...this.messages].reverse();
  }

  get(id: string): StoredMessage | undefined {
    return this.messages.find((m) => m.id === id);
  }

  clear(): void {
    this.messages = [];
    this.save();
  }

  // Write to a temp file and rename, so a crash never leaves half a file.
  private save(): void {
    if (!this.file) return;
    writeFileSync(`${this.file}.tmp`, JSON.stringify(this.messages));
    renameSync(`${this.file}.tmp`, this.file);
  }
}
