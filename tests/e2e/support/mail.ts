/** Reads e-mailed links out of the fake SMTP server's captured messages, through the development mail page. */
import type { APIRequestContext } from 'playwright-core';

interface CapturedMail {
  envelope: { to: string[] };
  subject: string;
  text: string;
}

function isCapturedList(body: unknown): body is { messages: CapturedMail[] } {
  return typeof body === 'object' && body !== null && Array.isArray((body as { messages?: unknown }).messages);
}

/**
 * Waits for the newest message to `address` whose subject contains `subjectPart` and returns the path
 * (`/account/<kind>/<token>`) of the link of that kind in it. Messages leave in the background, so it polls.
 */
export async function mailedLinkPath(
  request: APIRequestContext,
  baseUrl: string,
  address: string,
  subjectPart: string,
  kind: 'reset-password' | 'invitation',
): Promise<string> {
  const pattern = new RegExp(`/account/${kind}/[A-Za-z0-9_-]+`);
  for (let attempt = 0; attempt < 100; attempt++) {
    const res = await request.get(`${baseUrl}/api/dev/mail`, { headers: { Accept: 'application/json' } });
    const body: unknown = await res.json();
    if (!isCapturedList(body)) throw new Error(`the development mail page answered unexpectedly: ${JSON.stringify(body)}`);
    const matching = body.messages.filter((message) => message.envelope.to.includes(address) && message.subject.includes(subjectPart));
    const found = matching[0];
    if (found) {
      const link = pattern.exec(found.text);
      if (!link) throw new Error(`no ${kind} link in the mail to ${address}:\n${found.text}`);
      return link[0];
    }
    await new Promise((resolve) => setTimeout(resolve, 50));
  }
  throw new Error(`no mail to ${address} about "${subjectPart}"`);
}
