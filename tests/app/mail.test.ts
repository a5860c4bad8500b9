/** The fake outbox writes real RFC 822 messages and reads them back intact. */
import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { outboxActive, readOutbox, sendMail } from '../../src/lib/mail';
import { tempDir } from './support/harness';

describe('outbox', () => {
  it('is active without SMTP_URL and writes .eml files that read back with non-ASCII text and long links whole', async () => {
    expect(outboxActive()).toBe(true);
    const link = 'http://localhost:4321/invite/' + 'A1b2_C3d4-'.repeat(12);
    await sendMail({ to: 'zoë@example.test', subject: 'Zoë asks for a review of “acc-skip-8” r12 — settle time 0x1f ps?', text: `Grüße,\n\n${link}\n` });
    const files = fs.readdirSync(path.join(tempDir, 'outbox')).filter((f) => f.endsWith('.eml'));
    expect(files).toHaveLength(1);
    const raw = fs.readFileSync(path.join(tempDir, 'outbox', files[0]), 'utf8');
    expect(raw).toMatch(/^From: /m);
    expect(raw).toMatch(/^Message-ID: /im);
    const [msg] = await readOutbox();
    expect(msg.subject).toBe('Zoë asks for a review of “acc-skip-8” r12 — settle time 0x1f ps?');
    expect(msg.to).toContain('example.test');
    expect(msg.text).toContain('Grüße');
    expect(msg.links).toEqual([link]);
  });
});
