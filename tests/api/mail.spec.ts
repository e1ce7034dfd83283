import { expect } from 'chai';
import nodemailer from 'nodemailer';
import request from 'supertest';
import { startFakeSmtpServer } from '../../api/src/mail/fake-smtp';
import { startTestApp } from './support/test-app';

describe('api: mail', () => {
  it('the local fake SMTP server keeps the envelope (RFC 5321 MAIL FROM / RCPT TO) and the decoded text', async () => {
    const server = await startFakeSmtpServer();
    try {
      const transport = nodemailer.createTransport({ host: '127.0.0.1', port: server.port, secure: false, ignoreTLS: true });
      const text = `Grüße from the ridge — a line long enough that quoted-printable has to wrap it ${'x'.repeat(120)}\nsecond line`;
      await transport.sendMail({ from: 'club@tanager-ridge.example', to: ['a@example.invalid', 'b@example.invalid'], subject: 'Fällt die Übung aus?', text });
      transport.close();
      expect(server.messages).to.have.length(1);
      const [message] = server.messages;
      expect(message?.envelope).to.deep.equal({ from: 'club@tanager-ridge.example', to: ['a@example.invalid', 'b@example.invalid'] });
      expect(message?.subject).to.equal('Fällt die Übung aus?');
      expect(message?.text).to.equal(text);
    } finally {
      await server.close();
    }
  });

  it('lists caught mail on /api/dev/mail as JSON or a page, outside production', async () => {
    const created = await startTestApp();
    try {
      await request(created.app)
        .post('/api/v1/accounts')
        .send({ email: 'page@example.invalid', password: 'long enough words', displayName: 'Page' })
        .expect(201);
      await request(created.app).post('/api/v1/password-resets').send({ email: 'page@example.invalid' }).expect(202);
      let messages: Array<{ subject: string; envelope: { from: string } }> = [];
      for (let i = 0; i < 50 && messages.length === 0; i++) {
        messages = (await request(created.app).get('/api/dev/mail').set('Accept', 'application/json').expect(200)).body.messages;
        if (messages.length === 0) await new Promise((resolve) => setTimeout(resolve, 20));
      }
      expect(messages[0]?.subject).to.equal('Reset your Sylvasift password');
      expect(messages[0]?.envelope.from).to.equal('no-reply@sylvasift.invalid');
      const page = await request(created.app).get('/api/dev/mail').set('Accept', 'text/html').expect(200);
      expect(page.headers['content-type']).to.match(/^text\/html/);
      expect(page.text).to.include('Reset your Sylvasift password');
    } finally {
      await created.close();
    }
  });

  it('has no mail page in production, where SMTP_URL is required', async () => {
    const created = await startTestApp({
      NODE_ENV: 'production',
      SMTP_URL: 'smtp://127.0.0.1:2525',
      DATABASE_URL: 'sqlite::memory:',
      LOG_LEVEL: 'silent',
      SCRYPT_N: '1024',
    });
    try {
      expect(created.context.mailer.captured).to.equal(undefined);
      await request(created.app).get('/api/dev/mail').set('Accept', 'application/json').expect(404);
    } finally {
      await created.close();
    }
  });
});
