import { Router } from 'express';
import type { Mailer } from './mailer';

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);

/** Development only: the messages the local mail catcher holds, newest first, as JSON or a plain page. */
export function devMailRoutes(mailer: Mailer): Router {
  const router = Router();
  router.get('/', (_req, res) => {
    const messages = [...(mailer.captured ?? [])].reverse();
    res.set('Cache-Control', 'no-store');
    res.format({
      'application/json': () => res.json({ messages }),
      'text/html': () => {
        const items = messages
          .map(
            (m) =>
              `<article><h2>${escapeHtml(m.subject)}</h2><p>To ${escapeHtml(m.envelope.to.join(', '))} · ${escapeHtml(m.receivedAt)}</p><pre>${escapeHtml(m.text)}</pre></article>`,
          )
          .join('\n');
        res
          .type('html')
          .send(
            `<!doctype html><html lang="en"><meta charset="utf-8"><title>Mail caught in development</title><h1>Mail caught in development</h1>${items || '<p>No mail yet.</p>'}</html>`,
          );
      },
    });
  });
  return router;
}
