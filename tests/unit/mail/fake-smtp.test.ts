import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import nodemailer from 'nodemailer';
import { afterEach, describe, expect, it } from 'vitest';
import { startFakeSmtp, type Outbox } from '../../../api/fakes/smtp';

const open: Outbox[] = [];
afterEach(async () => {
  for (const o of open.splice(0)) await o.close();
});

async function start(options: Partial<Parameters<typeof startFakeSmtp>[0]> = {}) {
  const outbox = await startFakeSmtp({ port: 0, ...options });
  open.push(outbox);
  return outbox;
}

const transport = (url: string) =>
  nodemailer.createTransport({ url, connectionTimeout: 2_000, greetingTimeout: 2_000 });

describe('the local mail capture', () => {
  it('listens on loopback only and names its URL', async () => {
    const outbox = await start();
    expect(outbox.url).toBe(`smtp://127.0.0.1:${outbox.port}`);
    expect(outbox.port).toBeGreaterThan(0);
  });

  it('keeps the raw source, the envelope and the parsed fields of what it receives', async () => {
    const outbox = await start();
    await transport(outbox.url).sendMail({
      from: 'Reworkbook <notifications@reworkbook.invalid>',
      to: 'ilse@makers.invalid',
      subject: 'Relay board: Rev B ordered',
      text: 'Plain words.',
      html: '<p>Plain <b>words</b>.</p>',
      headers: { 'X-Trace': 'rev-b' },
    });
    const [message] = outbox.messages();
    expect(message).toBeDefined();
    expect(message!.envelope).toEqual({ from: 'notifications@reworkbook.invalid', to: ['ilse@makers.invalid'] });
    expect(message!.subject).toBe('Relay board: Rev B ordered');
    expect(message!.to).toBe('ilse@makers.invalid');
    expect(message!.from).toBe('"Reworkbook" <notifications@reworkbook.invalid>');
    expect(message!.text.trim()).toBe('Plain words.');
    expect(message!.html).toBe('<p>Plain <b>words</b>.</p>');
    expect(message!.headers).toContainEqual({ name: 'X-Trace', value: 'rev-b' });
    expect(message!.raw).toMatch(/^Subject: Relay board: Rev B ordered\r$/m);
    expect(outbox.message(message!.id)).toBe(message);
  });

  it('offers neither AUTH nor STARTTLS (no credentials, no TLS on loopback)', async () => {
    const outbox = await start();
    const capabilities = await new Promise<string>((resolve, reject) => {
      const socket = net.connect(outbox.port, '127.0.0.1');
      let seen = '';
      socket.setEncoding('utf8');
      socket.on('data', (chunk: string) => {
        seen += chunk;
        if (/^220 /m.test(seen) && !seen.includes('EHLO-SENT')) {
          seen += 'EHLO-SENT\n';
          socket.write('EHLO test.invalid\r\n');
        } else if (/^250 /m.test(seen)) {
          socket.end('QUIT\r\n');
          resolve(seen);
        }
      });
      socket.on('error', reject);
    });
    expect(capabilities).toMatch(/^250[- ]SIZE/m);
    expect(capabilities).not.toMatch(/AUTH/);
    expect(capabilities).not.toMatch(/STARTTLS/);
    const tlsRequired = nodemailer.createTransport({ url: outbox.url, requireTLS: true, connectionTimeout: 2_000 });
    await expect(
      tlsRequired.sendMail({ from: 'a@reworkbook.invalid', to: 'b@makers.invalid', text: 'x' }),
    ).rejects.toThrow();
    expect(outbox.messages()).toEqual([]);
  });

  it('rejects a message over its size limit and keeps nothing of it', async () => {
    const outbox = await start({ maxBytes: 2_000 });
    await expect(
      transport(outbox.url).sendMail({ from: 'a@reworkbook.invalid', to: 'b@makers.invalid', text: 'x'.repeat(5_000) }),
    ).rejects.toThrow(/552|exceed/i);
    expect(outbox.messages()).toEqual([]);
  });

  it('stops and starts again on the same port, keeping what it had', async () => {
    const outbox = await start();
    const send = () =>
      transport(outbox.url).sendMail({ from: 'a@reworkbook.invalid', to: 'b@makers.invalid', text: 'x' });
    await send();
    await outbox.close();
    await expect(send()).rejects.toThrow(/ECONNREFUSED/);
    await outbox.restart();
    await send();
    expect(outbox.messages()).toHaveLength(2);
  });

  it('writes .eml files to its folder and reads them back on the next start', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'rwb-outbox-'));
    try {
      const first = await start({ dir });
      await transport(first.url).sendMail({
        from: 'a@reworkbook.invalid',
        to: 'b@makers.invalid',
        subject: 'Kept',
        text: 'x',
      });
      const [sent] = first.messages();
      const file = path.join(dir, `${sent!.id}.eml`);
      expect(fs.readFileSync(file, 'utf8')).toBe(sent!.raw);
      await first.close();

      const second = await start({ dir });
      expect(second.messages().map((m) => [m.id, m.subject])).toEqual([[sent!.id, 'Kept']]);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
