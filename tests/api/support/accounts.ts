import request from 'supertest';
import type { CreatedApp } from '../../../api/src/app';
import type { Role, Scope } from '../../../api/src/auth/principal';

export interface SignedInUser {
  token: string;
  userId: number;
  email: string;
  password: string;
}

let counter = 0;

/** A unique address per call, so tests sharing one app never collide. */
export function uniqueEmail(label = 'user'): string {
  counter += 1;
  return `${label}-${process.pid}-${Date.now().toString(36)}-${counter}@example.invalid`;
}

/**
 * Signs a new user up through the API, gives them `role` directly in the database (sign-up always
 * makes learners), and signs them in. Returns the session token for `Authorization: Bearer`.
 */
export async function signUpAndSignIn(
  created: CreatedApp,
  role: Role,
  overrides: { email?: string; password?: string; displayName?: string } = {},
): Promise<SignedInUser> {
  const email = overrides.email ?? uniqueEmail(role);
  const password = overrides.password ?? 'correct horse battery';
  const displayName = overrides.displayName ?? `Test ${role} ${counter}`;
  const signUp = await request(created.app).post('/api/v1/accounts').send({ email, password, displayName });
  if (signUp.status !== 201) throw new Error(`sign-up failed: ${signUp.status} ${JSON.stringify(signUp.body)}`);
  const userId = (signUp.body as { id: number }).id;
  if (role !== 'learner') await created.context.models.User.update({ role }, { where: { id: userId } });
  const signIn = await request(created.app).post('/api/v1/sessions').send({ email, password });
  if (signIn.status !== 201) throw new Error(`sign-in failed: ${signIn.status} ${JSON.stringify(signIn.body)}`);
  return { token: (signIn.body as { token: string }).token, userId, email: email.toLowerCase(), password };
}

/** Creates a partner key with the given scopes for the user behind `token`; `key` is the secret. */
export async function createPartnerKey(created: CreatedApp, token: string, scopes: Scope[], name = 'Test key'): Promise<{ key: string; id: number }> {
  const res = await request(created.app).post('/api/v1/keys').set('Authorization', `Bearer ${token}`).send({ name, scopes });
  if (res.status !== 201) throw new Error(`key creation failed: ${res.status} ${JSON.stringify(res.body)}`);
  const body = res.body as { key: string; id: number };
  return { key: body.key, id: body.id };
}
