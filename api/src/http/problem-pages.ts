import { Router } from 'express';
import { problems } from './problem';
import { isProblemType, PROBLEM_TYPES, type ProblemType } from './problem-types';

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
/** `code` spans in the descriptions become <code> */
const withCode = (text: string) => escapeHtml(text).replace(/`([^`]+)`/g, '<code>$1</code>');

function page(name: ProblemType): string {
  const { status, title, about } = PROBLEM_TYPES[name];
  return `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeHtml(title)} — Sylvasift API problem</title></head>
<body>
<main>
<h1>${escapeHtml(title)}</h1>
<p>HTTP status ${status}. Problem type <code>/api/problems/${name}</code>.</p>
<p>${withCode(about)}</p>
<p>Every error of the Sylvasift API is <code>application/problem+json</code> (RFC 9457) with this page as its <code>type</code>, a human <code>detail</code> and, for invalid input, <code>invalid-params</code>. The contract is at <a href="/api/docs">/api/docs</a>.</p>
</main>
</body>
</html>
`;
}

/** The pages problem `type` URLs point at: /api/problems/<name>, one short page per kind of problem. */
export function problemPages(): Router {
  const router = Router();
  router.get('/:name', (req, res) => {
    const name = req.params['name'] ?? '';
    if (!isProblemType(name)) throw problems.notFound(`There is no problem type "${name}"; the list is in openapi.yaml.`);
    res.set('Cache-Control', 'public, max-age=3600').type('text/html').send(page(name));
  });
  return router;
}
